package wavio

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"time"
)

// WriterOptions configure a Writer.
type WriterOptions struct {
	// Format is the output format. Pass a Reader's Format to keep the
	// input's, or change it with Format.WithSample. ValidBits 0 means Bits.
	// RF64 and BigEndian are ignored.
	Format Format
	// Chunks are metadata chunks to copy byte-exact, typically a Reader's
	// Chunks. Those with AfterData false are written before the data, in
	// order; the others after it, on Close.
	Chunks []Chunk
	// NoDither turns TPDF dither off. Dither is on by default for integer
	// output, since every float64 to integer conversion shortens the word.
	// Turn it off to copy integer samples bit-exact.
	NoDither bool
	// DitherSeed seeds the dither generator; 0 picks a seed from the clock.
	// Writer.DitherSeed reports the seed used, so a run can be repeated.
	DitherSeed uint64
}

// maxRIFF is the largest RIFF size before the Writer switches to RF64. A
// variable so that tests can exercise the switch without writing 4 GiB.
var maxRIFF int64 = 0xFFFFFFFF

const ds64BodySize = 28 // EBU Tech 3306 ds64 with an empty table

// Writer encodes interleaved float64 frames as a WAV file.
//
// Conversion to integer saturates (never wraps) and counts clipped samples
// per channel; TPDF dither of 2 LSB peak-to-peak is added first unless
// WriterOptions.NoDither is set. The header is finalised on Close. The
// output starts with a 28-byte JUNK chunk (EBU Tech 3306, section 3.5)
// which Close turns into a ds64 chunk, with the file relabelled RF64, if
// the RIFF size passes 4 GiB.
type Writer struct {
	w      io.WriteSeeker
	file   *os.File // Create: the temporary file
	tmp    string   // Create: its name
	final  string   // Create: the name it gets on Close
	closed bool
	err    error // sticky

	format    Format
	kind      sampleKind
	ba        int
	q         quantizer
	seed      uint64
	buf       []byte
	after     []Chunk
	before    []Chunk
	started   bool // the header has been written
	frames    int64
	off       int64 // bytes written so far
	dataSize  int64 // offset of the data chunk's size field
	factSize  int64 // offset of the fact chunk's sample count, or -1
	dataStart int64
}

// Create writes a WAV file under name through a temporary file in the same
// folder: Close syncs it and renames it to name; Abort, or an error, removes
// it. So an interrupted run never leaves a partial file under name (an
// existing file there is replaced only by a complete one). The file gets
// mode 0644. Use SameFile first to refuse writing over an input.
func Create(name string, opts WriterOptions) (*Writer, error) {
	if err := checkWritable(opts.Format); err != nil {
		return nil, err
	}
	dir, base := filepath.Split(name)
	if dir == "" {
		dir = "."
	}
	if err := CheckOutputPath(name); err != nil {
		return nil, err
	}
	f, err := CreateTemp(dir, base)
	if err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}
	w, err := NewWriter(f, opts)
	if err == nil {
		err = f.Chmod(0o644)
	}
	if err != nil {
		f.Close()
		os.Remove(f.Name())
		return nil, err
	}
	w.file, w.tmp, w.final = f, f.Name(), name
	return w, nil
}

// NewWriter writes a WAV file to ws, which must be positioned at the start
// of the output (Close seeks back to fill in the sizes). The caller keeps
// ownership of ws: Close finishes the header and leaves ws open, positioned
// at the end of the file; Abort only stops the Writer.
func NewWriter(ws io.WriteSeeker, opts WriterOptions) (*Writer, error) {
	f := opts.Format
	if err := checkWritable(f); err != nil {
		return nil, err
	}
	if f.ValidBits == 0 {
		f.ValidBits = f.Bits
	}
	f.RF64, f.BigEndian = false, false
	w := &Writer{w: ws, format: f, kind: kindOf(f), ba: f.BlockAlign(), factSize: -1}
	for _, c := range opts.Chunks {
		if err := checkChunk(c); err != nil {
			return nil, err
		}
		if c.Source == nil {
			c.Data = append([]byte(nil), c.Data...)
		}
		if c.AfterData {
			w.after = append(w.after, c)
		} else {
			w.before = append(w.before, c)
		}
	}
	w.q = quantizer{channels: f.Channels, clipped: make([]int64, f.Channels)}
	if f.Encoding == PCM {
		w.q.scale = math.Ldexp(1, f.ValidBits-1) // 2^63 overflows an int64 shift
		w.q.lo, w.q.hi = -w.q.scale, w.q.scale-1
		w.q.shift = uint(f.Bits - f.ValidBits)
		w.q.width = f.Bits / 8
		w.q.maxN = int64(uint64(1)<<(f.ValidBits-1) - 1)
		w.q.minN = -w.q.maxN - 1
		w.q.dither = !opts.NoDither
	}
	w.seed = opts.DitherSeed
	if w.seed == 0 && w.q.dither {
		w.seed = uint64(time.Now().UnixNano()) | 1
	}
	w.q.rng = splitMix{s: w.seed}
	// One block is about 8192 samples: 64 KiB of dither noise, at most
	// 64 KiB of output bytes.
	perBlock := max(8192/f.Channels, 1)
	w.buf = make([]byte, perBlock*w.ba)
	w.q.noise = make([]float64, perBlock*f.Channels)
	return w, nil
}

func checkChunk(c Chunk) error {
	if len(c.ID) != 4 || !isFourCC([]byte(c.ID)) {
		return fmt.Errorf("wavio: invalid chunk id %q: four printable ASCII characters", c.ID)
	}
	switch c.ID {
	case "fmt ", "data", "fact", "ds64", "RIFF", "RF64", "BW64", "RIFX":
		return fmt.Errorf("wavio: invalid chunk id %q: written by the writer itself", c.ID)
	}
	if c.Source != nil && (c.Offset < 0 || c.Length < 0 || c.Data != nil) {
		return fmt.Errorf("wavio: invalid chunk %q: source at offset %d, length %d, with data of its own", c.ID, c.Offset, c.Length)
	}
	if c.Size() > 0xFFFFFFFE {
		return fmt.Errorf("wavio: invalid chunk %q: %d bytes exceed the 32-bit size", c.ID, c.Size())
	}
	return nil
}

// Format returns the output format.
func (w *Writer) Format() Format { return w.format }

// DitherSeed returns the seed of the dither generator (0 with no dither).
func (w *Writer) DitherSeed() uint64 {
	if !w.q.dither {
		return 0
	}
	return w.seed
}

// Frames returns the number of frames written so far.
func (w *Writer) Frames() int64 { return w.frames }

// Clipped returns, per channel, how many samples were saturated because
// they lay outside the integer range. The slice is a copy.
func (w *Writer) Clipped() []int64 { return append([]int64(nil), w.q.clipped...) }

// AddChunk adds a metadata chunk. A chunk for before the data must be added
// before the first WriteFrames; one for after it, any time before Close.
func (w *Writer) AddChunk(c Chunk) error {
	if err := checkChunk(c); err != nil {
		return err
	}
	if w.closed {
		return errClosed
	}
	if c.Source == nil {
		c.Data = append([]byte(nil), c.Data...)
	}
	if c.AfterData {
		w.after = append(w.after, c)
		return nil
	}
	if w.started {
		return errors.New("wavio: chunk for before the data added after frames were written")
	}
	w.before = append(w.before, c)
	return nil
}

// AppendCodingHistory appends line (see CodingHistoryLine) to the
// CodingHistory of every bext chunk the Writer holds; it does nothing if
// there is none. A bext chunk before the data must be amended before the
// first WriteFrames.
func (w *Writer) AppendCodingHistory(line string) error {
	if w.closed {
		return errClosed
	}
	for _, list := range [][]Chunk{w.before, w.after} {
		for i := range list {
			if list[i].ID != "bext" || list[i].Source != nil {
				continue
			}
			if !list[i].AfterData && w.started {
				return errors.New("wavio: bext chunk before the data amended after frames were written")
			}
			b, err := AppendCodingHistory(list[i].Data, line)
			if err != nil {
				return err
			}
			list[i].Data = b
		}
	}
	return nil
}

func (w *Writer) put(p []byte) error {
	if w.err != nil {
		return w.err
	}
	n, err := w.w.Write(p)
	w.off += int64(n)
	if err != nil {
		w.err = fmt.Errorf("wavio: writing: %w", err)
	}
	return w.err
}

func (w *Writer) putChunk(c Chunk) error {
	var h [8]byte
	n := c.Size()
	copy(h[:4], c.ID)
	binary.LittleEndian.PutUint32(h[4:], uint32(n))
	w.put(h[:])
	if c.Source != nil {
		w.copyChunk(c)
	} else {
		w.put(c.Data)
	}
	if n&1 == 1 {
		w.put([]byte{0})
	}
	return w.err
}

// copyChunk copies the body of a chunk held as a reference from its
// Source, through a buffer of at most 64 KiB. A source that ends before
// Length bytes (a file shortened since it was read) is an error.
func (w *Writer) copyChunk(c Chunk) {
	buf := make([]byte, min(c.Length, 64<<10))
	for at := int64(0); at < c.Length && w.err == nil; {
		p := buf[:min(int64(len(buf)), c.Length-at)]
		k, err := c.Source.ReadAt(p, c.Offset+at)
		if k < len(p) {
			if err == nil || err == io.EOF {
				err = io.ErrUnexpectedEOF
			}
			w.err = fmt.Errorf("wavio: copying the %q chunk from the input: %w", c.ID, err)
			return
		}
		w.put(p)
		at += int64(k)
	}
}

// extensible reports whether the format needs WAVE_FORMAT_EXTENSIBLE:
// Microsoft's WAVEFORMATEXTENSIBLE documentation asks for it with more than
// two channels or more than 16 bits per sample, and it is the only way to
// state valid bits or a channel mask.
func (f Format) extensible() bool {
	return f.Channels > 2 || f.Bits > 16 || f.ValidBits != f.Bits || f.ChannelMask != 0
}

func (w *Writer) writeHeader() error {
	w.started = true
	f := w.format
	le := binary.LittleEndian
	var h []byte
	h = append(h, "RIFF\x00\x00\x00\x00WAVE"...)
	h = append(h, "JUNK"...)
	h = le.AppendUint32(h, ds64BodySize)
	h = append(h, make([]byte, ds64BodySize)...)
	tag := uint16(tagPCM)
	if f.Encoding == Float {
		tag = tagFloat
	}
	ext := f.extensible()
	fmtLen := uint32(16)
	if ext {
		fmtLen = 40
	}
	h = append(h, "fmt "...)
	h = le.AppendUint32(h, fmtLen)
	if ext {
		h = le.AppendUint16(h, tagExtensible)
	} else {
		h = le.AppendUint16(h, tag)
	}
	h = le.AppendUint16(h, uint16(f.Channels))
	h = le.AppendUint32(h, uint32(f.SampleRate))
	h = le.AppendUint32(h, uint32(int64(f.SampleRate)*int64(w.ba)))
	h = le.AppendUint16(h, uint16(w.ba))
	h = le.AppendUint16(h, uint16(f.Bits))
	if ext {
		h = le.AppendUint16(h, 22)
		h = le.AppendUint16(h, uint16(f.ValidBits))
		h = le.AppendUint32(h, f.ChannelMask)
		h = le.AppendUint16(h, tag)
		h = append(h, guidTail[:]...)
	}
	if f.Encoding == Float {
		// A fact chunk is required for every format but plain PCM
		// (Microsoft, Multimedia Programming Interface and Data
		// Specifications 1.0, "Fact Chunk").
		h = append(h, "fact\x04\x00\x00\x00"...)
		w.factSize = int64(len(h))
		h = append(h, 0, 0, 0, 0)
	}
	if err := w.put(h); err != nil {
		return err
	}
	for _, c := range w.before {
		if err := w.putChunk(c); err != nil {
			return err
		}
	}
	w.dataSize = w.off + 4
	w.put([]byte("data\x00\x00\x00\x00"))
	w.dataStart = w.off
	return w.err
}

// WriteFrames encodes the interleaved frames in src. It never keeps src.
// A NaN or infinite sample (or, for 32-bit float output, one beyond the
// float32 range) stops the Writer with a *NonFiniteError; after any error
// the Writer is unusable and Close removes a Create output.
//
// WriteFrames panics if len(src) is not a multiple of the channel count.
func (w *Writer) WriteFrames(src []float64) error {
	ch := w.format.Channels
	if len(src)%ch != 0 {
		panic(fmt.Sprintf("wavio: WriteFrames: len(src) = %d is not a multiple of %d channels", len(src), ch))
	}
	if w.closed {
		return errClosed
	}
	if w.err != nil {
		return w.err
	}
	if !w.started {
		if err := w.writeHeader(); err != nil {
			return err
		}
	}
	per := len(w.buf) / w.ba
	for len(src) > 0 {
		k := min(len(src)/ch, per)
		block := src[:k*ch]
		if bad := encode(w.kind, &w.q, block, w.buf); bad >= 0 {
			w.err = &NonFiniteError{Frame: w.frames + int64(bad/ch), Channel: bad % ch, Value: block[bad]}
			return w.err
		}
		if err := w.put(w.buf[:k*w.ba]); err != nil {
			return err
		}
		w.frames += int64(k)
		src = src[k*ch:]
	}
	return nil
}

// Close writes the chunks that follow the data, finalises the header and,
// for a Create output, syncs the file and renames it to its final name.
// If the Writer had failed, Close returns that error and removes a Create
// output. Calling Close or Abort again does nothing and returns nil, so
// `defer w.Abort()` is safe after a successful Close.
func (w *Writer) Close() error {
	if w.closed {
		return nil
	}
	err := w.finish()
	w.closed = true
	if w.file != nil {
		if err == nil {
			err = w.file.Sync()
		}
		if cerr := w.file.Close(); err == nil {
			err = cerr
		}
		if err == nil {
			err = os.Rename(w.tmp, w.final)
		}
		if err != nil {
			os.Remove(w.tmp)
			return wrapOS(err)
		}
		syncDir(filepath.Dir(w.final))
	}
	return err
}

func wrapOS(err error) error {
	var pe *os.PathError
	var le *os.LinkError
	if errors.As(err, &pe) || errors.As(err, &le) {
		return fmt.Errorf("wavio: %w", err)
	}
	return err
}

// syncDir makes the rename durable where the system allows it; failure to
// sync a folder is not an error of the output.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

func (w *Writer) finish() error {
	if w.err != nil {
		return w.err
	}
	if !w.started {
		if err := w.writeHeader(); err != nil {
			return err
		}
	}
	dataLen := w.frames * int64(w.ba)
	if dataLen&1 == 1 {
		w.put([]byte{0})
	}
	for _, c := range w.after {
		if err := w.putChunk(c); err != nil {
			return err
		}
	}
	if w.err != nil {
		return w.err
	}
	end := w.off
	riffSize := end - 8
	le := binary.LittleEndian
	patch := func(at int64, p []byte) {
		if w.err != nil {
			return
		}
		if _, err := w.w.Seek(at, io.SeekStart); err != nil {
			w.err = fmt.Errorf("wavio: finishing header: %w", err)
			return
		}
		if _, err := w.w.Write(p); err != nil {
			w.err = fmt.Errorf("wavio: finishing header: %w", err)
		}
	}
	if riffSize > maxRIFF || dataLen > maxRIFF {
		// EBU Tech 3306, section 3: RF64 with size fields of 0xFFFFFFFF
		// and the true sizes in ds64, which replaces the JUNK placeholder.
		h := []byte("RF64\xff\xff\xff\xffWAVEds64")
		h = le.AppendUint32(h, ds64BodySize)
		h = le.AppendUint64(h, uint64(riffSize))
		h = le.AppendUint64(h, uint64(dataLen))
		h = le.AppendUint64(h, uint64(w.frames))
		h = le.AppendUint32(h, 0)
		patch(0, h)
		patch(w.dataSize, []byte{0xff, 0xff, 0xff, 0xff})
		if w.factSize >= 0 {
			// The sample count is in ds64 (EBU Tech 3306, section 3.4).
			patch(w.factSize, []byte{0xff, 0xff, 0xff, 0xff})
		}
	} else {
		patch(4, le.AppendUint32(nil, uint32(riffSize)))
		patch(w.dataSize, le.AppendUint32(nil, uint32(dataLen)))
		if w.factSize >= 0 {
			patch(w.factSize, le.AppendUint32(nil, uint32(min(w.frames, 0xFFFFFFFF))))
		}
	}
	if w.err == nil {
		if _, err := w.w.Seek(end, io.SeekStart); err != nil {
			w.err = fmt.Errorf("wavio: finishing header: %w", err)
		}
	}
	return w.err
}

// Abort stops the Writer without finishing the file and, for a Create
// output, removes the temporary file. After Close it does nothing.
func (w *Writer) Abort() error {
	if w.closed {
		return nil
	}
	w.closed = true
	if w.err == nil {
		w.err = errors.New("wavio: writer aborted")
	}
	if w.file != nil {
		w.file.Close()
		if err := os.Remove(w.tmp); err != nil && !errors.Is(err, os.ErrNotExist) {
			return fmt.Errorf("wavio: %w", err)
		}
	}
	return nil
}

// SameFile reports whether the paths name the same existing file (by
// os.SameFile, so hard links and different spellings count). A path that
// does not exist yet is not the same as anything. Use it to refuse an
// output that would overwrite an input.
func SameFile(a, b string) (bool, error) {
	fa, err := os.Stat(a)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return false, nil
		}
		return false, fmt.Errorf("wavio: %w", err)
	}
	fb, err := os.Stat(b)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return false, nil
		}
		return false, fmt.Errorf("wavio: %w", err)
	}
	return os.SameFile(fa, fb), nil
}
