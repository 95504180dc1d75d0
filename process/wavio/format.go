package wavio

import (
	"errors"
	"fmt"
	"io"
)

// Encoding is how a sample is stored: integer PCM or IEEE float.
type Encoding int

const (
	// PCM is linear integer PCM (format tag 1). 8-bit samples are unsigned,
	// wider ones two's complement.
	PCM Encoding = 1
	// Float is IEEE 754 floating point (format tag 3), 32 or 64 bits.
	Float Encoding = 3
)

func (e Encoding) String() string {
	switch e {
	case PCM:
		return "pcm"
	case Float:
		return "float"
	}
	return fmt.Sprintf("encoding(%d)", int(e))
}

// Format describes the samples of a WAV file. The Reader fills it from the
// header; the Writer takes it as the output format.
type Format struct {
	SampleRate int      // frames per second, at least 1
	Channels   int      // samples per frame, at least 1
	Bits       int      // container size of one sample in bits (8, 16, 24, 32, ...; 32 or 64 for Float)
	ValidBits  int      // significant bits, <= Bits; 0 in a Writer's Format means Bits
	Encoding   Encoding // PCM or Float
	// ChannelMask is the speaker mask of WAVE_FORMAT_EXTENSIBLE; 0 when the
	// header has none, or assigns no speakers.
	ChannelMask uint32
	// RF64 is set by the Reader for RF64/BW64 files. The Writer ignores it
	// and switches to RF64 by itself when the output passes 4 GiB.
	RF64 bool
	// BigEndian is set by the Reader for RIFX files. The Writer ignores it
	// and always writes little-endian RIFF.
	BigEndian bool
}

// WithSample returns f with the given sample encoding and container size,
// ValidBits reset to the full container. Use it to choose an output format
// that keeps the rate, channels and mask of an input:
//
//	out := r.Format().WithSample(wavio.PCM, 24)
func (f Format) WithSample(e Encoding, bits int) Format {
	f.Encoding = e
	f.Bits = bits
	f.ValidBits = bits
	return f
}

// BlockAlign is the size of one frame in bytes.
func (f Format) BlockAlign() int { return f.Channels * (f.Bits / 8) }

func (f Format) String() string {
	s := fmt.Sprintf("%d Hz, %d ch, %d-bit %s", f.SampleRate, f.Channels, f.Bits, f.Encoding)
	if f.ValidBits != 0 && f.ValidBits != f.Bits {
		s += fmt.Sprintf(" (%d valid)", f.ValidBits)
	}
	return s
}

// FormatError reports a file that is not a valid WAV file.
type FormatError string

func (e FormatError) Error() string { return "wavio: invalid " + string(e) }

// UnsupportedError reports a valid WAV file that uses a feature this
// package does not implement, such as a compressed encoding.
type UnsupportedError string

func (e UnsupportedError) Error() string { return "wavio: unsupported " + string(e) }

// NonFiniteError reports a NaN or infinite sample at a position counted from
// the first frame of the data chunk. Channel counts from 0; the message
// counts channels from 1, as every message of wavsieve does.
type NonFiniteError struct {
	Frame   int64
	Channel int
	Value   float64
}

func (e *NonFiniteError) Error() string {
	return fmt.Sprintf("wavio: non-finite sample %v at frame %d, channel %d (counted from 1)", e.Value, e.Frame, e.Channel+1)
}

// errTruncated wraps io.ErrUnexpectedEOF for a header that ends early.
func errTruncated(what string, err error) error {
	return fmt.Errorf("wavio: truncated %s: %w", what, err)
}

// WarningKind classifies a tolerated defect.
type WarningKind int

const (
	// WarnMissingPad: an odd-sized chunk is not followed by its pad byte.
	WarnMissingPad WarningKind = iota + 1
	// WarnUnfinalized: the data size is 0 or 0xFFFFFFFF, as left by a
	// recorder that stopped before finishing the header; data is taken to
	// run to the end of the file.
	WarnUnfinalized
	// WarnDataOverrun: the data chunk claims more bytes than the file holds;
	// what is there is read.
	WarnDataOverrun
	// WarnPartialFrame: the data ends inside a frame; the partial frame is
	// dropped.
	WarnPartialFrame
	// WarnTrailingBytes: bytes after the data that do not form chunks, or
	// lie beyond the RIFF size.
	WarnTrailingBytes
	// WarnChunkDropped: a metadata chunk larger than ReaderOptions.MaxChunkSize
	// or cut short by the end of the file was not kept.
	WarnChunkDropped
	// WarnHeader: a header field is inconsistent but not needed to read the
	// samples (for example valid bits of 0, or a wrong byte rate).
	WarnHeader
	// WarnSecondData: a second data chunk follows the first; it is not
	// read.
	WarnSecondData
	// WarnOmitted: more warnings than the Reader lists; this one counts
	// the rest.
	WarnOmitted
)

// Warning is a defect the Reader tolerated.
type Warning struct {
	Kind   WarningKind
	Offset int64 // byte offset in the file where it was found
	Msg    string
}

func (w Warning) String() string {
	if w.Offset < 0 {
		return w.Msg
	}
	return fmt.Sprintf("offset %d: %s", w.Offset, w.Msg)
}

// Chunk is a RIFF chunk other than fmt, data, fact and ds64, kept byte-exact.
//
// Its body is Data or, when Source is set, the Length bytes at Offset
// in Source: the Reader keeps a chunk too large to hold in memory that
// way, and the Writer copies it from there when it writes the chunk, so
// Source must stay open until the Writer is closed.
type Chunk struct {
	ID        string // four characters, for example "bext", "LIST", "iXML"
	Data      []byte // the body, without the pad byte (nil with Source)
	AfterData bool   // the chunk came after the data chunk

	Source io.ReaderAt // where the body is, instead of Data
	Offset int64       // its offset in Source
	Length int64       // its length
}

// Size returns the length of the chunk's body.
func (c Chunk) Size() int64 {
	if c.Source != nil {
		return c.Length
	}
	return int64(len(c.Data))
}

// Format tags and the sub-format GUID tail of WAVE_FORMAT_EXTENSIBLE
// (Microsoft, "WAVEFORMATEXTENSIBLE" and mmreg.h: the GUIDs are
// {tag-0000-0010-8000-00AA00389B71}).
const (
	tagPCM        = 0x0001
	tagFloat      = 0x0003
	tagExtensible = 0xFFFE
)

var guidTail = [14]byte{0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}

// tagNames names the compressed encodings met in practice (mmreg.h).
var tagNames = map[uint16]string{
	0x0002: "Microsoft ADPCM",
	0x0006: "A-law",
	0x0007: "mu-law",
	0x0011: "IMA ADPCM",
	0x0031: "GSM 6.10",
	0x0050: "MPEG",
	0x0055: "MPEG layer 3",
	0x0092: "Dolby AC-3 SPDIF",
	0x00FF: "AAC",
	0x2000: "Dolby AC-3",
}

func unsupportedTag(tag uint16) error {
	if n, ok := tagNames[tag]; ok {
		return UnsupportedError(fmt.Sprintf("encoding %s (format tag 0x%04x)", n, tag))
	}
	return UnsupportedError(fmt.Sprintf("encoding: format tag 0x%04x", tag))
}

// Writable reports whether the Writer can produce f: nil, or an error
// saying what in f it cannot write.
func (f Format) Writable() error {
	if f.ValidBits == 0 {
		f.ValidBits = f.Bits
	}
	return checkWritable(f)
}

// checkWritable reports whether the Writer can produce f.
func checkWritable(f Format) error {
	if f.SampleRate < 1 || int64(f.SampleRate) > 0xFFFFFFFF {
		return fmt.Errorf("wavio: invalid sample rate %d", f.SampleRate)
	}
	if f.Channels < 1 || f.Channels > 0xFFFF {
		return fmt.Errorf("wavio: invalid channel count %d", f.Channels)
	}
	switch f.Encoding {
	case PCM:
		if f.Bits < 8 || f.Bits > 64 || f.Bits%8 != 0 {
			return UnsupportedError(fmt.Sprintf("output: %d-bit pcm (the writer takes containers of 8 to 64 bits in whole bytes)", f.Bits))
		}
		if f.ValidBits < 0 || f.ValidBits > f.Bits {
			return fmt.Errorf("wavio: invalid valid bits %d for a %d-bit container", f.ValidBits, f.Bits)
		}
	case Float:
		if f.Bits != 32 && f.Bits != 64 {
			return UnsupportedError(fmt.Sprintf("output: %d-bit float (the writer takes 32 or 64)", f.Bits))
		}
		if f.ValidBits != 0 && f.ValidBits != f.Bits {
			return UnsupportedError(fmt.Sprintf("output: %d valid bits in %d-bit float", f.ValidBits, f.Bits))
		}
	default:
		return UnsupportedError("output " + f.Encoding.String())
	}
	if int64(f.SampleRate)*int64(f.BlockAlign()) > 0xFFFFFFFF {
		return fmt.Errorf("wavio: invalid format: byte rate of %d Hz x %d bytes exceeds 32 bits", f.SampleRate, f.BlockAlign())
	}
	if f.BlockAlign() > 0xFFFF {
		return fmt.Errorf("wavio: invalid format: frame of %d bytes exceeds the 16-bit block align", f.BlockAlign())
	}
	return nil
}

var errClosed = errors.New("wavio: writer is closed")
