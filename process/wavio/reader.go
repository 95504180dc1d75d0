package wavio

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"strings"
)

// ReaderOptions adjust a Reader. The zero value gives the defaults.
type ReaderOptions struct {
	// AllowNonFinite lets NaN and infinite float samples through to the
	// caller, who can check NonFinite afterwards. By default the first one
	// stops reading with a *NonFiniteError.
	AllowNonFinite bool
	// ZeroNonFinite replaces each NaN or infinite sample by 0 and counts
	// them per channel (NonFiniteByChannel); it implies AllowNonFinite.
	ZeroNonFinite bool
	// MaxChunkSize caps the body of one kept metadata chunk; larger ones
	// are skipped with a WarnChunkDropped warning. 0 means 64 MiB.
	MaxChunkSize int64
}

// Metadata budget. A Reader holds at most maxChunks metadata chunks, and
// at most metaMemory bytes of their bodies in memory, no one body larger
// than chunkInMemory: a larger chunk of a file that can seek is kept as a
// reference (Chunk.Source) and copied from the file when written; one
// that cannot be is dropped with a WarnChunkDropped warning. The
// warnings list holds at most maxWarnings entries plus one that counts
// the rest. So a header declaring huge or countless chunks costs at most
// about 1.5 MiB, whatever it claims.
const (
	defaultMaxChunk = 64 << 20
	readBufSize     = 64 << 10
	maxFmtSize      = 1 << 16 // no fmt chunk needs more; larger is invalid
	maxChunks       = 1024
	metaMemory      = 1 << 20
	chunkInMemory   = 256 << 10
	maxWarnings     = 64
)

// Reader decodes the samples of a WAV file as interleaved float64 frames.
//
// The Reader reads from its source sequentially and buffers at most one
// block (64 KiB) of it, so memory does not depend on the file's length.
// When the source is also an io.Seeker, the Reader learns the file size,
// reads the chunks after the data at construction and supports SeekFrame.
type Reader struct {
	src    io.Reader
	seeker io.Seeker // nil when src cannot seek
	closer io.Closer // set by Open
	br     *bufio.Reader
	off    int64 // offset in the file of the next byte br returns

	format   Format
	kind     sampleKind
	width    int // container bytes per sample
	ba       int // block align
	order    binary.ByteOrder
	fileSize int64 // -1 when unknown
	riffEnd  int64 // offset just past the RIFF form, -1 when unknown

	dataStart int64
	dataLen   int64 // bytes of audio to read; -1: runs to the end of the file
	dataOdd   bool  // the data chunk has an odd declared size and a pad byte
	frames    int64 // frame count, -1 while unknown
	claimed   int64 // frames the data chunk's size claims when the file holds fewer, else 0
	pos       int64 // frames returned so far (or the SeekFrame position)
	done      bool  // the data has been read to its end
	trailer   bool  // the chunks after the data have been parsed

	ds64Table []ds64Entry
	chunks    []Chunk
	warnings  []Warning
	err       error // sticky

	at          io.ReaderAt // src, when chunks can be referenced in it
	metaHeld    int64       // bytes of chunk bodies held in memory
	chunksOver  int64       // chunks not kept because there were too many
	warnOmitted int64       // warnings beyond maxWarnings
	nonFiniteCh []int64     // ZeroNonFinite: replaced samples per channel

	opts        ReaderOptions
	raw         []byte
	nonFinite   int64
	firstBad    NonFiniteError
	factFrames  int64 // the fact chunk's sample count, -1 when absent
	junkSkipped bool
}

// Open opens the named file and returns a Reader on it. The Reader's Close
// closes the file.
//
// Only a regular file is read: a FIFO, a device, a socket or a folder is
// refused with a *NotRegularError, checked before it is opened and again
// on the open file, which is opened without blocking so that a FIFO with
// no writer cannot stall the caller.
func Open(name string, opts *ReaderOptions) (*Reader, error) {
	f, err := OpenRegular(name)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, &NotFoundError{Path: name}
	}
	if err != nil {
		return nil, err
	}
	r, err := NewReader(f, opts)
	if err != nil {
		f.Close()
		return nil, err
	}
	r.closer = f
	return r, nil
}

// NewReaderAt returns a Reader over the first size bytes of ra.
func NewReaderAt(ra io.ReaderAt, size int64, opts *ReaderOptions) (*Reader, error) {
	return NewReader(io.NewSectionReader(ra, 0, size), opts)
}

// NewReader reads and checks the WAV header from r and returns a Reader
// positioned at the first frame. opts may be nil. The caller keeps
// ownership of r; NewReader never closes it.
//
// A header that ends early gives an error wrapping io.ErrUnexpectedEOF; a
// file that breaks the format gives a FormatError; a valid file with an
// encoding this package does not decode gives an UnsupportedError.
func NewReader(r io.Reader, opts *ReaderOptions) (*Reader, error) {
	rd := &Reader{src: r, fileSize: -1, riffEnd: -1, frames: -1}
	if opts != nil {
		rd.opts = *opts
	}
	if rd.opts.MaxChunkSize <= 0 {
		rd.opts.MaxChunkSize = defaultMaxChunk
	}
	bufSize := readBufSize
	if s, ok := r.(io.Seeker); ok {
		start, err1 := s.Seek(0, io.SeekCurrent)
		end, err2 := s.Seek(0, io.SeekEnd)
		if err1 == nil && err2 == nil && start == 0 {
			if _, err := s.Seek(0, io.SeekStart); err != nil {
				return nil, fmt.Errorf("wavio: %w", err)
			}
			rd.seeker = s
			rd.fileSize = end
			if end < int64(bufSize) {
				bufSize = int(max(end, 16))
			}
		} else if err1 == nil {
			// Not at the start, or no size: read sequentially from here.
			if _, err := s.Seek(start, io.SeekStart); err != nil {
				return nil, fmt.Errorf("wavio: %w", err)
			}
		}
	}
	if ra, ok := r.(io.ReaderAt); ok && rd.seeker != nil {
		rd.at = ra
	}
	if rd.opts.ZeroNonFinite {
		rd.opts.AllowNonFinite = true
	}
	rd.br = bufio.NewReaderSize(r, bufSize)
	if err := rd.readHeader(); err != nil {
		return nil, err
	}
	rawSize := readBufSize / rd.ba * rd.ba
	if rawSize == 0 {
		rawSize = rd.ba
	}
	if rd.dataLen >= 0 && int64(rawSize) > rd.dataLen {
		rawSize = int(max(rd.dataLen/int64(rd.ba), 1)) * rd.ba
	}
	rd.raw = make([]byte, rawSize)
	rd.nonFiniteCh = make([]int64, rd.format.Channels)
	if rd.seeker != nil && rd.dataLen >= 0 {
		if err := rd.scanTrailer(); err != nil {
			return nil, err
		}
	}
	rd.noteChunksOver()
	return rd, nil
}

// Format returns the format read from the header.
func (r *Reader) Format() Format { return r.format }

// Frames returns the number of frames in the data chunk, or -1 when it is
// not known before the end (a data size left unfinalised, read from a
// source that cannot seek). After io.EOF it is the number actually read.
func (r *Reader) Frames() int64 { return r.frames }

// Chunks returns the metadata chunks in file order. Chunks after the data
// are included once they have been read: at construction when the source
// can seek, otherwise when ReadFrames has returned io.EOF. The slice and
// the chunk bodies belong to the Reader; do not modify them.
func (r *Reader) Chunks() []Chunk { return r.chunks }

// Warnings returns the tolerated defects found so far: at most 64, and
// then one more that says how many were left out.
// ClaimedFrames returns the frame count that the data chunk's size
// claims when the file on disk holds fewer (a file cut short after its
// header was written), and 0 otherwise. Frames then gives what the file
// holds.
func (r *Reader) ClaimedFrames() int64 { return r.claimed }

func (r *Reader) Warnings() []Warning {
	if r.warnOmitted == 0 {
		return r.warnings
	}
	return append(r.warnings[:len(r.warnings):len(r.warnings)], Warning{Kind: WarnOmitted, Offset: -1, Msg: fmt.Sprintf("%d more warnings not listed", r.warnOmitted)})
}

// NonFiniteByChannel returns, per channel, how many NaN or infinite
// samples ReaderOptions.ZeroNonFinite replaced by 0 so far. The slice is
// a copy.
func (r *Reader) NonFiniteByChannel() []int64 { return append([]int64(nil), r.nonFiniteCh...) }

// NonFinite returns how many NaN or infinite samples were let through with
// ReaderOptions.AllowNonFinite, and the position of the first one.
func (r *Reader) NonFinite() (count int64, first NonFiniteError) {
	return r.nonFinite, r.firstBad
}

// Close closes the file if the Reader came from Open, and does nothing
// otherwise.
func (r *Reader) Close() error {
	if r.closer != nil {
		c := r.closer
		r.closer = nil
		return c.Close()
	}
	return nil
}

func (r *Reader) warn(k WarningKind, off int64, format string, args ...any) {
	if len(r.warnings) >= maxWarnings {
		r.warnOmitted++
		return
	}
	r.warnings = append(r.warnings, Warning{Kind: k, Offset: off, Msg: fmt.Sprintf(format, args...)})
}

// readFull reads len(p) bytes, tracking the offset.
func (r *Reader) readFull(p []byte) (int, error) {
	n, err := io.ReadFull(r.br, p)
	r.off += int64(n)
	return n, err
}

func (r *Reader) discard(n int64) (int64, error) {
	var done int64
	for n > 0 {
		step := int(min(n, 1<<30))
		m, err := r.br.Discard(step)
		done += int64(m)
		r.off += int64(m)
		n -= int64(m)
		if err != nil {
			return done, err
		}
	}
	return done, nil
}

// ds64Entry is one row of the ds64 table: a chunk ID and its 64-bit size.
type ds64Entry struct {
	id   [4]byte
	size uint64
}

func isFourCC(b []byte) bool {
	if len(b) < 4 {
		return false
	}
	for _, c := range b[:4] {
		if c < 0x20 || c > 0x7E {
			return false
		}
	}
	return true
}

// skipPad consumes the pad byte after an odd-sized chunk, tolerating
// writers that leave it out: if the byte is missing (the next four bytes
// already form a chunk ID and the four after the supposed pad do not, or
// the file ends), it warns instead.
func (r *Reader) skipPad(id string) error {
	p, _ := r.br.Peek(5)
	switch {
	case len(p) == 0:
		if r.riffEnd < 0 || r.off < r.riffEnd {
			r.warn(WarnMissingPad, r.off, "odd-sized %q chunk has no pad byte before the end of the file", id)
		}
		return nil
	case len(p) == 1:
	case isFourCC(p[:4]) && !(len(p) == 5 && isFourCC(p[1:5])):
		r.warn(WarnMissingPad, r.off, "odd-sized %q chunk has no pad byte", id)
		return nil
	}
	_, err := r.discard(1)
	return err
}

// readBody reads a chunk body of n bytes without trusting n for the
// allocation: with a known file size it is first checked against what is
// left, otherwise the buffer grows only as bytes arrive.
func (r *Reader) readBody(n int64) ([]byte, error) {
	if r.fileSize >= 0 {
		if n > r.fileSize-r.off {
			return nil, io.ErrUnexpectedEOF
		}
		b := make([]byte, n)
		_, err := r.readFull(b)
		return b, noEOF(err)
	}
	var b []byte
	for int64(len(b)) < n {
		step := min(n-int64(len(b)), 64<<10)
		b = append(b, make([]byte, step)...)
		m, err := r.readFull(b[int64(len(b))-step:])
		if err != nil {
			return b[:int64(len(b))-step+int64(m)], noEOF(err)
		}
	}
	return b, nil
}

func noEOF(err error) error {
	if err == io.EOF {
		return io.ErrUnexpectedEOF
	}
	return err
}

// chunkSize resolves a 32-bit chunk size through the ds64 table of RF64.
func (r *Reader) chunkSize(id string, size uint32) int64 {
	if size == 0xFFFFFFFF {
		for _, e := range r.ds64Table {
			if string(e.id[:]) == id {
				return int64(min(e.size, 1<<62)) // beyond any file
			}
		}
	}
	return int64(size)
}

func (r *Reader) readHeader() error {
	var hdr [12]byte
	if n, err := r.readFull(hdr[:]); err != nil {
		// A short file that does not even start like a WAV file is not a
		// truncated one.
		if n > 0 && (err == io.EOF || err == io.ErrUnexpectedEOF) && !isWAVMagicPrefix(string(hdr[:min(n, 4)])) {
			return FormatError("header: not a RIFF, RIFX, RF64 or BW64 file")
		}
		return errTruncated("header", noEOF(err))
	}
	switch string(hdr[0:4]) {
	case "RIFF":
		r.order = binary.LittleEndian
	case "RIFX":
		r.order = binary.BigEndian
		r.format.BigEndian = true
	case "RF64", "BW64":
		r.order = binary.LittleEndian
		r.format.RF64 = true
	default:
		return FormatError("header: not a RIFF, RIFX, RF64 or BW64 file")
	}
	if string(hdr[8:12]) != "WAVE" {
		return FormatError(fmt.Sprintf("header: form type %q, not a WAVE file", hdr[8:12]))
	}
	riffSize := int64(r.order.Uint32(hdr[4:8]))
	var ds64Data uint64
	haveDs64 := false
	if r.format.RF64 {
		// EBU Tech 3306, section 3: ds64 is the first chunk of an RF64 file,
		// holding 64-bit RIFF and data sizes, the sample count and a table
		// of other chunks' 64-bit sizes.
		var ch [8]byte
		if _, err := r.readFull(ch[:]); err != nil {
			return errTruncated("ds64 chunk", noEOF(err))
		}
		if string(ch[0:4]) != "ds64" {
			return FormatError(fmt.Sprintf("rf64 header: first chunk is %q, not ds64", ch[0:4]))
		}
		n := int64(binary.LittleEndian.Uint32(ch[4:8]))
		if n < 28 || n > maxFmtSize {
			return FormatError(fmt.Sprintf("ds64 chunk: size %d", n))
		}
		body, err := r.readBody(n)
		if err != nil {
			return errTruncated("ds64 chunk", err)
		}
		riffSize = int64(binary.LittleEndian.Uint64(body[0:8]))
		ds64Data = binary.LittleEndian.Uint64(body[8:16])
		haveDs64 = true
		count := int64(binary.LittleEndian.Uint32(body[24:28]))
		if count > (n-28)/12 {
			return FormatError(fmt.Sprintf("ds64 chunk: table of %d entries in %d bytes", count, n))
		}
		if ds64Data > 1<<62 {
			return FormatError(fmt.Sprintf("ds64 chunk: data size %d", ds64Data))
		}
		r.ds64Table = make([]ds64Entry, count)
		for i := range r.ds64Table {
			e := body[28+12*i : 40+12*i]
			copy(r.ds64Table[i].id[:], e[0:4])
			r.ds64Table[i].size = binary.LittleEndian.Uint64(e[4:12])
		}
		if n&1 == 1 {
			if err := r.skipPad("ds64"); err != nil {
				return errTruncated("header", noEOF(err))
			}
		}
	}
	if riffSize >= 4 && riffSize < 1<<62 && !(riffSize == 0xFFFFFFFF && !r.format.RF64) {
		r.riffEnd = 8 + riffSize
	}
	if r.fileSize >= 0 && r.riffEnd > r.fileSize && !(riffSize == 0 || riffSize == 0xFFFFFFFF) {
		// Reported with the data chunk if that is what is short.
		r.riffEnd = -1
	}

	haveFmt := false
	first := !r.format.RF64
	for {
		var ch [8]byte
		start := r.off
		if _, err := r.readFull(ch[:]); err != nil {
			if !haveFmt {
				return errTruncated("header: no fmt chunk", noEOF(err))
			}
			return errTruncated("header: no data chunk", noEOF(err))
		}
		id := string(ch[0:4])
		size := r.chunkSize(id, r.order.Uint32(ch[4:8]))
		wasFirst := first
		first = false
		switch id {
		case "fmt ":
			if haveFmt {
				return FormatError("header: second fmt chunk")
			}
			if size < 16 || size > maxFmtSize {
				return FormatError(fmt.Sprintf("fmt chunk: size %d", size))
			}
			body, err := r.readBody(size)
			if err != nil {
				return errTruncated("fmt chunk", err)
			}
			if err := r.parseFmt(body, start); err != nil {
				return err
			}
			haveFmt = true
		case "data":
			if !haveFmt {
				return FormatError("header: data chunk before fmt chunk")
			}
			declared := size
			if r.format.RF64 && r.order.Uint32(ch[4:8]) == 0xFFFFFFFF && haveDs64 {
				declared = int64(ds64Data)
			}
			return r.startData(declared, r.order.Uint32(ch[4:8]))
		case "fact":
			// The frame count comes from the data size; fact is not kept.
			if _, err := r.discard(size); err != nil {
				return errTruncated("fact chunk", noEOF(err))
			}
		case "ds64":
			// Only meaningful first in an RF64 file; elsewhere it is
			// skipped, as it describes sizes this file does not use.
			if _, err := r.discard(size); err != nil {
				return errTruncated("header", noEOF(err))
			}
		default:
			if id == "JUNK" && wasFirst && size == 28 && !r.junkSkipped {
				// The placeholder an RF64-capable writer reserves for a
				// ds64 chunk (EBU Tech 3306, section 3.5): not metadata.
				r.junkSkipped = true
				if _, err := r.discard(size); err != nil {
					return errTruncated("header", noEOF(err))
				}
				break
			}
			if err := r.keepChunk(id, size, start, false); err != nil {
				return errTruncated("header", err)
			}
		}
		if size&1 == 1 {
			if err := r.skipPad(id); err != nil {
				return errTruncated("header", noEOF(err))
			}
		}
	}
}

// keepChunk reads a metadata chunk body into r.chunks, keeps a reference
// to it in the file, or skips it when it is larger than the limit or
// beyond the metadata budget.
func (r *Reader) keepChunk(id string, size, start int64, after bool) error {
	if !isFourCC([]byte(id)) {
		// Not a chunk any writer can copy: its id is not four printable
		// characters (RIFF's FOURCC), so it cannot be written back.
		r.warn(WarnChunkDropped, start, "chunk with the id %q, not four printable characters, is not kept", id)
		_, err := r.discard(size)
		return noEOF(err)
	}
	if size > r.opts.MaxChunkSize {
		r.warn(WarnChunkDropped, start, "%q chunk of %d bytes exceeds the %d-byte limit and is not kept", id, size, r.opts.MaxChunkSize)
		_, err := r.discard(size)
		return noEOF(err)
	}
	if len(r.chunks) >= maxChunks {
		r.chunksOver++
		_, err := r.discard(size)
		return noEOF(err)
	}
	if size > chunkInMemory || r.metaHeld+size > metaMemory {
		if r.at == nil {
			r.warn(WarnChunkDropped, start, "%q chunk of %d bytes is beyond the %d-byte metadata held in memory for a file read as a stream, and is not kept", id, size, metaMemory)
			_, err := r.discard(size)
			return noEOF(err)
		}
		if r.fileSize >= 0 && size > r.fileSize-r.off {
			return io.ErrUnexpectedEOF
		}
		at := r.off
		if _, err := r.discard(size); err != nil {
			return noEOF(err)
		}
		r.chunks = append(r.chunks, Chunk{ID: id, AfterData: after, Source: r.at, Offset: at, Length: size})
		return nil
	}
	body, err := r.readBody(size)
	if err != nil {
		return err
	}
	r.metaHeld += int64(len(body))
	r.chunks = append(r.chunks, Chunk{ID: id, Data: body, AfterData: after})
	return nil
}

// noteChunksOver warns once about the chunks not kept for their number.
func (r *Reader) noteChunksOver() {
	if r.chunksOver > 0 {
		r.warn(WarnChunkDropped, -1, "%d metadata chunks beyond the first %d are not kept", r.chunksOver, maxChunks)
		r.chunksOver = 0
	}
}

func (r *Reader) parseFmt(b []byte, start int64) error {
	o := r.order
	tag := o.Uint16(b[0:2])
	channels := int(o.Uint16(b[2:4]))
	rate := int64(o.Uint32(b[4:8]))
	byteRate := int64(o.Uint32(b[8:12]))
	blockAlign := int(o.Uint16(b[12:14]))
	bits := int(o.Uint16(b[14:16]))
	valid := bits
	var mask uint32
	ext := false
	if tag == tagExtensible {
		if len(b) < 40 || o.Uint16(b[16:18]) < 22 {
			return FormatError(fmt.Sprintf("fmt chunk: WAVE_FORMAT_EXTENSIBLE in %d bytes, need 40", len(b)))
		}
		ext = true
		valid = int(o.Uint16(b[18:20]))
		mask = o.Uint32(b[20:24])
		// A GUID is stored as a 32-bit, two 16-bit and eight single-byte
		// fields, the integers in the file's byte order: bring a RIFX one
		// to the little-endian layout before comparing.
		var g [16]byte
		copy(g[:], b[24:40])
		if r.format.BigEndian {
			g[0], g[1], g[2], g[3] = g[3], g[2], g[1], g[0]
			g[4], g[5] = g[5], g[4]
			g[6], g[7] = g[7], g[6]
		}
		var tail [14]byte
		copy(tail[:], g[2:])
		sub := binary.LittleEndian.Uint16(g[0:2])
		if tail != guidTail {
			return UnsupportedError(fmt.Sprintf("encoding: sub-format GUID % x", b[24:40]))
		}
		tag = sub
	}
	switch tag {
	case tagPCM:
		r.format.Encoding = PCM
	case tagFloat:
		r.format.Encoding = Float
	default:
		return unsupportedTag(tag)
	}
	if channels == 0 {
		return FormatError("fmt chunk: zero channels")
	}
	if rate == 0 {
		return FormatError("fmt chunk: zero sample rate")
	}
	if bits == 0 {
		return FormatError("fmt chunk: zero bits per sample")
	}
	container := (bits + 7) / 8 * 8
	if ext {
		if bits%8 != 0 {
			return FormatError(fmt.Sprintf("fmt chunk: container of %d bits is not whole bytes", bits))
		}
		if valid == 0 {
			r.warn(WarnHeader, start, "valid bits per sample is 0, taken as %d", bits)
			valid = bits
		}
		if valid > bits {
			return FormatError(fmt.Sprintf("fmt chunk: %d valid bits in a %d-bit container", valid, bits))
		}
	} else {
		valid = bits
	}
	if r.format.Encoding == Float {
		if container != 32 && container != 64 {
			return UnsupportedError(fmt.Sprintf("encoding: %d-bit float", bits))
		}
		valid = container
	} else if container > 64 {
		return UnsupportedError(fmt.Sprintf("encoding: %d-bit pcm", bits))
	}
	if blockAlign != channels*container/8 {
		return FormatError(fmt.Sprintf("fmt chunk: block align %d does not match %d channels of %d bits", blockAlign, channels, container))
	}
	if byteRate != rate*int64(blockAlign) {
		r.warn(WarnHeader, start, "byte rate %d is not sample rate %d times block align %d", byteRate, rate, blockAlign)
	}
	r.format.SampleRate = int(rate)
	r.format.Channels = channels
	r.format.Bits = container
	r.format.ValidBits = valid
	r.format.ChannelMask = mask
	r.kind = kindOf(r.format)
	r.width = container / 8
	r.ba = blockAlign
	return nil
}

// startData sets up the data chunk whose body begins at r.off.
func (r *Reader) startData(declared int64, raw32 uint32) error {
	r.dataStart = r.off
	r.dataOdd = declared&1 == 1
	left := int64(-1)
	if r.fileSize >= 0 {
		left = r.fileSize - r.dataStart
	}
	// A data size of 0 is a real empty chunk when a finalised RIFF size
	// says that more follows it; otherwise it, like 0xFFFFFFFF, is what a
	// recorder leaves before it finishes the header.
	emptyOK := raw32 == 0 && r.riffEnd > r.dataStart
	switch {
	case !r.format.RF64 && (raw32 == 0 || raw32 == 0xFFFFFFFF) && left != 0 && !emptyOK:
		r.warn(WarnUnfinalized, r.dataStart-4, "data size 0x%08x left unfinalised; reading to the end of the file", raw32)
		r.dataLen = left // -1 when the size is unknown
		r.dataOdd = false
		r.riffEnd = -1
	case left >= 0 && declared > left:
		r.warn(WarnDataOverrun, r.dataStart-4, "data chunk claims %d bytes, the file holds %d", declared, left)
		r.dataLen = left
		r.dataOdd = false
		r.claimed = declared / int64(r.ba)
	default:
		r.dataLen = declared
	}
	if r.dataLen >= 0 {
		r.frames = r.dataLen / int64(r.ba)
		if rem := r.dataLen % int64(r.ba); rem != 0 {
			r.warn(WarnPartialFrame, r.dataStart+r.frames*int64(r.ba), "data ends %d bytes into a %d-byte frame; the partial frame is dropped", rem, r.ba)
		}
	}
	return nil
}

// scanTrailer reads the chunks after the data through the seeker, then
// returns to the first frame.
func (r *Reader) scanTrailer() error {
	end := r.dataStart + r.dataLen
	if _, err := r.seeker.Seek(end, io.SeekStart); err != nil {
		return fmt.Errorf("wavio: %w", err)
	}
	r.br.Reset(r.src)
	r.off = end
	r.parseTrailer()
	if _, err := r.seeker.Seek(r.dataStart, io.SeekStart); err != nil {
		return fmt.Errorf("wavio: %w", err)
	}
	r.br.Reset(r.src)
	r.off = r.dataStart
	return nil
}

// parseTrailer reads chunks from the end of the data to the end of the
// file. Defects here cost no audio and are warnings.
func (r *Reader) parseTrailer() {
	r.trailer = true
	defer r.noteChunksOver()
	if r.dataOdd {
		if err := r.skipPad("data"); err != nil {
			return
		}
	}
	for {
		if r.riffEnd >= 0 && r.off >= r.riffEnd {
			if p, _ := r.br.Peek(1); len(p) > 0 {
				n, _ := r.discard(1 << 62)
				r.warn(WarnTrailingBytes, r.riffEnd, "%d bytes after the end of the RIFF form", n)
			}
			return
		}
		start := r.off
		var ch [8]byte
		n, err := r.readFull(ch[:])
		if err != nil {
			if n > 0 {
				r.warn(WarnTrailingBytes, start, "%d trailing bytes after the data", n)
			}
			return
		}
		id := string(ch[0:4])
		if !isFourCC(ch[0:4]) {
			m, _ := r.discard(1 << 62)
			r.warn(WarnTrailingBytes, start, "%d trailing bytes after the data are not a chunk", m+8)
			return
		}
		size := r.chunkSize(id, r.order.Uint32(ch[4:8]))
		if id == "data" {
			r.warn(WarnSecondData, start, "a second data chunk of %d bytes follows the first and is not read: only the first one's %d frames are audio here", size, r.frames)
		}
		if id == "fmt " || id == "data" || id == "fact" || id == "ds64" {
			if _, err := r.discard(size); err != nil {
				return
			}
		} else if err := r.keepChunk(id, size, start, true); err != nil {
			r.warn(WarnChunkDropped, start, "%q chunk after the data is cut short by the end of the file", id)
			return
		}
		if size&1 == 1 {
			if err := r.skipPad(id); err != nil {
				return
			}
		}
	}
}

// finishData skips what is left of the data chunk and reads the trailer.
func (r *Reader) finishData() {
	r.done = true
	if r.trailer {
		return
	}
	if left := r.dataStart + r.dataLen - r.off; r.dataLen >= 0 && left > 0 {
		if _, err := r.discard(left); err != nil {
			r.trailer = true
			return
		}
	}
	r.parseTrailer()
}

// ReadFrames decodes up to len(dst)/channels frames into dst as interleaved
// samples (frame 0 channel 0, frame 0 channel 1, ...) and returns the
// number of frames decoded. It fills dst completely unless the data ends.
// At the end of the data it returns 0, io.EOF. As with io.Reader, use the
// frames returned before looking at err; ReadFrames never keeps dst.
//
// A NaN or infinite sample stops reading with a *NonFiniteError unless
// ReaderOptions.AllowNonFinite is set; the frames before it are returned.
// Float samples beyond full scale are returned as they are.
//
// ReadFrames panics if len(dst) is not a multiple of the channel count:
// that is a programming error, not a property of the file.
func (r *Reader) ReadFrames(dst []float64) (int, error) {
	ch := r.format.Channels
	if len(dst)%ch != 0 {
		panic(fmt.Sprintf("wavio: ReadFrames: len(dst) = %d is not a multiple of %d channels", len(dst), ch))
	}
	if r.err != nil {
		return 0, r.err
	}
	want := len(dst) / ch
	n := 0
	for n < want {
		if r.done {
			break
		}
		k := min(want-n, len(r.raw)/r.ba)
		if r.frames >= 0 {
			left := r.frames - r.pos
			if left <= 0 {
				r.finishData()
				break
			}
			k = int(min(int64(k), left))
		}
		m, err := r.readFull(r.raw[:k*r.ba])
		got := m / r.ba
		block := r.raw[:got*r.ba]
		if r.format.BigEndian {
			swapBytes(block, r.width)
		}
		out := dst[n*ch : (n+got)*ch]
		if bad := decode(r.kind, r.width, block, out); bad >= 0 {
			if e := r.checkNonFinite(out, bad); e != nil {
				good := int(e.Frame - r.pos)
				r.pos = e.Frame
				r.err = e
				return n + good, e
			}
		}
		n += got
		r.pos += int64(got)
		if err != nil {
			if err != io.EOF && err != io.ErrUnexpectedEOF {
				r.err = fmt.Errorf("wavio: reading data: %w", err)
				return n, r.err
			}
			// The file ended inside the data.
			if r.frames >= 0 && r.pos < r.frames {
				r.warn(WarnDataOverrun, r.off, "data chunk claims %d frames, the file ends after %d", r.frames, r.pos)
			}
			if rem := m % r.ba; rem != 0 {
				r.warn(WarnPartialFrame, r.off-int64(rem), "data ends %d bytes into a %d-byte frame; the partial frame is dropped", rem, r.ba)
			}
			r.frames = r.pos
			r.done = true
			r.trailer = true
			break
		}
	}
	if n == 0 && r.done {
		return 0, io.EOF
	}
	return n, nil
}

// checkNonFinite handles out, a decoded block whose first non-finite
// sample is at index bad. It returns the error to stop with, or nil when
// non-finite samples are allowed (after counting them).
func (r *Reader) checkNonFinite(out []float64, bad int) *NonFiniteError {
	ch := r.format.Channels
	if !r.opts.AllowNonFinite {
		return &NonFiniteError{Frame: r.pos + int64(bad/ch), Channel: bad % ch, Value: out[bad]}
	}
	for i := bad; i < len(out); i++ {
		if v := out[i]; v-v != 0 {
			if r.nonFinite == 0 {
				r.firstBad = NonFiniteError{Frame: r.pos + int64(i/ch), Channel: i % ch, Value: v}
			}
			r.nonFinite++
			if r.opts.ZeroNonFinite {
				out[i] = 0
				r.nonFiniteCh[i%ch]++
			}
		}
	}
	return nil
}

// ErrNotSeekable is returned by SeekFrame when the source is not an
// io.Seeker.
var ErrNotSeekable = errors.New("wavio: source cannot seek")

// SeekFrame moves to the given frame, counted from the start of the data,
// so that the next ReadFrames starts there. It needs a source that is an
// io.Seeker positioned at the start of the file when NewReader was called.
// Seeking clears a *NonFiniteError, so the caller may skip past one.
func (r *Reader) SeekFrame(frame int64) error {
	if r.seeker == nil {
		return ErrNotSeekable
	}
	if frame < 0 || (r.frames >= 0 && frame > r.frames) {
		return fmt.Errorf("wavio: invalid seek to frame %d of %d", frame, r.frames)
	}
	if r.err != nil {
		var nf *NonFiniteError
		if !errors.As(r.err, &nf) {
			return r.err
		}
		r.err = nil
	}
	off := r.dataStart + frame*int64(r.ba)
	if _, err := r.seeker.Seek(off, io.SeekStart); err != nil {
		r.err = fmt.Errorf("wavio: %w", err)
		return r.err
	}
	r.br.Reset(r.src)
	r.off = off
	r.pos = frame
	r.done = false
	return nil
}

// isWAVMagicPrefix says whether p begins one of the magic numbers a WAV file starts with.
func isWAVMagicPrefix(p string) bool {
	for _, m := range []string{"RIFF", "RIFX", "RF64", "BW64"} {
		if strings.HasPrefix(m, p) {
			return true
		}
	}
	return false
}
