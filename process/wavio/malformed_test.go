package wavio

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"strings"
	"testing"
)

// pcm16 is four stereo frames of 16-bit data: 0, 16384, -16384, -32768 on
// channel 0 and 1, 2, 3, 4 on channel 1.
var pcm16 = []byte{0, 0, 1, 0, 0, 0x40, 2, 0, 0, 0xc0, 3, 0, 0, 0x80, 4, 0}

// pcm16Samples is pcm16 by the scale of codec.go (v / 32768).
var pcm16Samples = []float64{0, 1.0 / 32768, 0.5, 2.0 / 32768, -0.5, 3.0 / 32768, -1, 4.0 / 32768}

var fmt16 = fmtBody(tagPCM, 2, 8000, 4, 16)

func chunks(parts ...[]byte) []byte { return bytes.Join(parts, nil) }

func ck(id string, body []byte) []byte {
	var b wavBuilder
	return b.chunk(id, uint32(len(body)), body, true).buf.Bytes()
}

func ckSize(id string, size uint32, body []byte) []byte {
	var b wavBuilder
	return b.chunk(id, size, body, false).buf.Bytes()
}

func extFmt(sub []byte, channels uint16, bits, valid uint16) []byte {
	var b wavBuilder
	ba := channels * bits / 8
	b.u16(tagExtensible).u16(channels).u32(8000).u32(8000 * uint32(ba)).u16(ba).u16(bits)
	b.u16(22).u16(valid).u32(0)
	b.raw(sub...)
	return b.buf.Bytes()
}

func guid(tag uint16) []byte { return append([]byte{byte(tag), byte(tag >> 8)}, guidTail[:]...) }

type badCase struct {
	name string
	data []byte
	// For files that must be refused: a check of the error.
	isErr func(error) bool
	msg   string // a part of the message
	// For files that are read with warnings: the kinds expected and the
	// samples.
	warn    []WarningKind
	samples []float64
}

func isTrunc(err error) bool { return errors.Is(err, io.ErrUnexpectedEOF) }
func isInvalid(err error) bool {
	var fe FormatError
	return errors.As(err, &fe)
}
func isUnsupported(err error) bool {
	var ue UnsupportedError
	return errors.As(err, &ue)
}

// malformedCorpus is the set of damaged files, each with the error or the
// warnings it must give. It also seeds FuzzReader.
func malformedCorpus() []badCase {
	good := riff(chunks(ck("fmt ", fmt16), ck("data", pcm16)))
	return []badCase{
		{name: "empty", data: nil, isErr: isTrunc, msg: "wavio: truncated header"},
		{name: "riff only", data: []byte("RIFF"), isErr: isTrunc, msg: "truncated header"},
		{name: "short text file", data: []byte("hello\n"), isErr: isInvalid, msg: "not a RIFF"},
		{name: "short riff prefix", data: []byte("RI"), isErr: isTrunc, msg: "truncated header"},
		{name: "not riff", data: []byte("OggS\x00\x02\x00\x00\x00\x00\x00\x00\x00\x00"), isErr: isInvalid, msg: "not a RIFF"},
		{name: "not wave", data: []byte("RIFF\x04\x00\x00\x00AVI "), isErr: isInvalid, msg: "not a WAVE file"},
		{name: "cut in fmt", data: good[:30], isErr: isTrunc, msg: "truncated fmt chunk"},
		{name: "no data chunk", data: riff(ck("fmt ", fmt16)), isErr: isTrunc, msg: "no data chunk"},
		{name: "no fmt chunk", data: riff(ck("LIST", []byte("INFO"))), isErr: isTrunc, msg: "no fmt chunk"},
		{name: "short fmt", data: riff(chunks(ck("fmt ", fmt16[:14]), ck("data", pcm16))), isErr: isInvalid, msg: "fmt chunk: size 14"},
		{name: "huge fmt", data: riff(chunks(ckSize("fmt ", 0x7FFFFFFF, fmt16))), isErr: isInvalid, msg: "fmt chunk: size"},
		{name: "a-law", data: riff(chunks(ck("fmt ", fmtBody(6, 1, 8000, 1, 8)), ck("data", pcm16))), isErr: isUnsupported, msg: "unsupported encoding A-law"},
		{name: "mu-law", data: riff(chunks(ck("fmt ", fmtBody(7, 1, 8000, 1, 8)), ck("data", pcm16))), isErr: isUnsupported, msg: "unsupported encoding mu-law"},
		{name: "adpcm", data: riff(chunks(ck("fmt ", fmtBody(2, 1, 8000, 256, 4)), ck("data", pcm16))), isErr: isUnsupported, msg: "unsupported encoding Microsoft ADPCM"},
		{name: "mpeg layer 3", data: riff(chunks(ck("fmt ", fmtBody(0x55, 2, 44100, 1, 0)), ck("data", pcm16))), isErr: isUnsupported, msg: "unsupported encoding MPEG layer 3"},
		{name: "unknown tag", data: riff(chunks(ck("fmt ", fmtBody(0x1234, 2, 8000, 4, 16)), ck("data", pcm16))), isErr: isUnsupported, msg: "unsupported encoding: format tag 0x1234"},
		{name: "extensible a-law", data: riff(chunks(ck("fmt ", extFmt(guid(6), 2, 16, 16)), ck("data", pcm16))), isErr: isUnsupported, msg: "A-law"},
		{name: "extensible unknown guid", data: riff(chunks(ck("fmt ", extFmt(bytes.Repeat([]byte{0xab}, 16), 2, 16, 16)), ck("data", pcm16))), isErr: isUnsupported, msg: "sub-format GUID"},
		{name: "extensible short", data: riff(chunks(ck("fmt ", extFmt(guid(1), 2, 16, 16)[:30]), ck("data", pcm16))), isErr: isInvalid, msg: "EXTENSIBLE"},
		{name: "zero channels", data: riff(chunks(ck("fmt ", fmtBody(tagPCM, 0, 8000, 4, 16)), ck("data", pcm16))), isErr: isInvalid, msg: "zero channels"},
		{name: "zero rate", data: riff(chunks(ck("fmt ", fmtBody(tagPCM, 2, 0, 4, 16)), ck("data", pcm16))), isErr: isInvalid, msg: "zero sample rate"},
		{name: "zero bits", data: riff(chunks(ck("fmt ", fmtBody(tagPCM, 2, 8000, 4, 0)), ck("data", pcm16))), isErr: isInvalid, msg: "zero bits"},
		{name: "block align", data: riff(chunks(ck("fmt ", fmtBody(tagPCM, 2, 8000, 3, 16)), ck("data", pcm16))), isErr: isInvalid, msg: "block align 3 does not match 2 channels of 16 bits"},
		{name: "valid above container", data: riff(chunks(ck("fmt ", extFmt(guid(1), 2, 16, 20)), ck("data", pcm16))), isErr: isInvalid, msg: "20 valid bits in a 16-bit container"},
		{name: "16-bit float", data: riff(chunks(ck("fmt ", fmtBody(tagFloat, 2, 8000, 4, 16)), ck("data", pcm16))), isErr: isUnsupported, msg: "16-bit float"},
		{name: "data before fmt", data: riff(chunks(ck("data", pcm16), ck("fmt ", fmt16))), isErr: isInvalid, msg: "data chunk before fmt"},
		{name: "rf64 without ds64", data: append([]byte("RF64\xff\xff\xff\xffWAVE"), chunks(ck("fmt ", fmt16), ck("data", pcm16))...), isErr: isInvalid, msg: "not ds64"},
		{name: "huge chunk before data", data: riff(chunks(ck("fmt ", fmt16), ckSize("LIST", 0x7FFFFFF0, []byte("INFO")), ck("data", pcm16))), isErr: isTrunc, msg: "truncated header"},
		{name: "second fmt", data: riff(chunks(ck("fmt ", fmt16), ck("fmt ", fmt16), ck("data", pcm16))), isErr: isInvalid, msg: "second fmt"},

		{name: "odd chunk without pad", data: riff(chunks(ck("fmt ", fmt16), ckSize("note", 3, []byte("abc")), ck("data", pcm16))), warn: []WarningKind{WarnMissingPad}, samples: pcm16Samples},
		{name: "data size 0", data: zeroRIFF(riff(chunks(ck("fmt ", fmt16), ckSize("data", 0, pcm16)))), warn: []WarningKind{WarnUnfinalized}, samples: pcm16Samples},
		{name: "data and riff size ffffffff", data: ffRIFF(riff(chunks(ck("fmt ", fmt16), ckSize("data", 0xFFFFFFFF, pcm16)))), warn: []WarningKind{WarnUnfinalized}, samples: pcm16Samples},
		{name: "empty data then chunk", data: riff(chunks(ck("fmt ", fmt16), ck("data", nil), ck("note", []byte("x")))), warn: nil, samples: nil},
		{name: "data size ffffffff", data: riff(chunks(ck("fmt ", fmt16), ckSize("data", 0xFFFFFFFF, pcm16))), warn: []WarningKind{WarnUnfinalized}, samples: pcm16Samples},
		{name: "data overrun", data: riff(chunks(ck("fmt ", fmt16), ckSize("data", 1000, pcm16))), warn: []WarningKind{WarnDataOverrun}, samples: pcm16Samples},
		{name: "partial frame", data: riff(chunks(ck("fmt ", fmt16), ck("data", pcm16[:14]))), warn: []WarningKind{WarnPartialFrame}, samples: pcm16Samples[:6]},
		{name: "trailing garbage", data: append(riff(chunks(ck("fmt ", fmt16), ck("data", pcm16))), 0, 0, 0, 0, 0, 0, 0, 0, 1), warn: []WarningKind{WarnTrailingBytes}, samples: pcm16Samples},
		{name: "short trailing bytes", data: append(riff(chunks(ck("fmt ", fmt16), ck("data", pcm16))), 'x', 'y'), warn: []WarningKind{WarnTrailingBytes}, samples: pcm16Samples},
		{name: "cut trailing chunk", data: riff(chunks(ck("fmt ", fmt16), ck("data", pcm16), ckSize("LIST", 500, []byte("INFO")))), warn: []WarningKind{WarnChunkDropped}, samples: pcm16Samples},
		{name: "wrong byte rate", data: riff(chunks(ck("fmt ", []byte{1, 0, 2, 0, 0x40, 0x1f, 0, 0, 1, 0, 0, 0, 4, 0, 16, 0}), ck("data", pcm16))), warn: []WarningKind{WarnHeader}, samples: pcm16Samples},
		{name: "zero valid bits", data: riff(chunks(ck("fmt ", extFmt(guid(1), 2, 16, 0)), ck("data", pcm16))), warn: []WarningKind{WarnHeader}, samples: pcm16Samples},
	}
}

// zeroRIFF and ffRIFF set the RIFF size as a recorder leaves it before
// finishing the header.
func zeroRIFF(b []byte) []byte { copy(b[4:8], []byte{0, 0, 0, 0}); return b }
func ffRIFF(b []byte) []byte   { copy(b[4:8], []byte{0xff, 0xff, 0xff, 0xff}); return b }

func TestMalformed(t *testing.T) {
	for _, c := range malformedCorpus() {
		for _, stream := range []bool{false, true} {
			name := c.name
			if stream {
				name += "/stream"
			}
			t.Run(name, func(t *testing.T) {
				var src io.Reader = bytes.NewReader(c.data)
				if stream {
					src = plain{src}
				}
				r, err := NewReader(src, nil)
				if c.isErr != nil {
					if err == nil {
						t.Fatalf("accepted, want an error containing %q", c.msg)
					}
					if !c.isErr(err) || !strings.Contains(err.Error(), c.msg) || !strings.HasPrefix(err.Error(), "wavio: ") {
						t.Fatalf("error %q (%T), want one containing %q", err, err, c.msg)
					}
					return
				}
				if err != nil {
					t.Fatal(err)
				}
				got := readAll(t, r, 3)
				if !equalSamples(got, c.samples) {
					t.Fatalf("samples %v, want %v", got, c.samples)
				}
				var kinds []WarningKind
				for _, w := range r.Warnings() {
					kinds = append(kinds, w.Kind)
				}
				if len(kinds) != len(c.warn) {
					t.Fatalf("warnings %v, want kinds %v", r.Warnings(), c.warn)
				}
				for i := range kinds {
					if kinds[i] != c.warn[i] {
						t.Fatalf("warnings %v, want kinds %v", r.Warnings(), c.warn)
					}
				}
			})
		}
	}
}

func TestGoodSkeleton(t *testing.T) {
	// The corpus is built on this file; it must read cleanly, or the
	// cases above would test nothing.
	r, err := NewReader(bytes.NewReader(riff(chunks(ck("fmt ", fmt16), ck("data", pcm16)))), nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := readAll(t, r, 3); !equalSamples(got, pcm16Samples) || len(r.Warnings()) != 0 {
		t.Fatalf("samples %v, warnings %v", got, r.Warnings())
	}
}

func TestNonFinite(t *testing.T) {
	// Frames: (0, 1), (2.5, NaN), (-Inf, 0.25); float32 bit patterns from
	// IEEE 754: 0x3f800000 = 1, 0x40200000 = 2.5, 0x7fc00000 = NaN,
	// 0xff800000 = -Inf, 0x3e800000 = 0.25.
	data := riff(chunks(ck("fmt ", fmtBody(tagFloat, 2, 8000, 8, 32)), ck("data", []byte{
		0, 0, 0, 0, 0, 0, 0x80, 0x3f,
		0, 0, 0x20, 0x40, 0, 0, 0xc0, 0x7f,
		0, 0, 0x80, 0xff, 0, 0, 0x80, 0x3e,
	})))
	r, err := NewReader(bytes.NewReader(data), nil)
	if err != nil {
		t.Fatal(err)
	}
	dst := make([]float64, 6)
	n, err := r.ReadFrames(dst)
	var nf *NonFiniteError
	if !errors.As(err, &nf) || nf.Frame != 1 || nf.Channel != 1 || n != 1 || dst[1] != 1 {
		t.Fatalf("got %d frames, %v; want 1 frame and a NaN at frame 1 channel 1", n, err)
	}
	if _, err2 := r.ReadFrames(dst); err2 != err {
		t.Fatalf("second call: %v", err2)
	}
	// The caller may skip past it.
	if err := r.SeekFrame(2); err != nil {
		t.Fatal(err)
	}
	if _, err := r.ReadFrames(dst[:2]); !errors.As(err, &nf) || nf.Frame != 2 || nf.Channel != 0 {
		t.Fatalf("after the seek: %v, want -Inf at frame 2 channel 0", err)
	}

	r, _ = NewReader(bytes.NewReader(data), &ReaderOptions{AllowNonFinite: true})
	got := readAll(t, r, 2)
	count, first := r.NonFinite()
	if len(got) != 6 || got[2] != 2.5 || got[5] != 0.25 || count != 2 || first.Frame != 1 || first.Channel != 1 {
		t.Fatalf("allowed: samples %v, count %d, first %+v", got, count, first)
	}
}

func TestMaxChunkSize(t *testing.T) {
	data := riff(chunks(ck("fmt ", fmt16), ck("big ", make([]byte, 100)), ck("data", pcm16), ck("tail", make([]byte, 100))))
	r, err := NewReader(bytes.NewReader(data), &ReaderOptions{MaxChunkSize: 50})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Chunks()) != 0 || len(r.Warnings()) != 2 || r.Warnings()[0].Kind != WarnChunkDropped {
		t.Fatalf("chunks %v, warnings %v", r.Chunks(), r.Warnings())
	}
	if got := readAll(t, r, 3); !equalSamples(got, pcm16Samples) {
		t.Fatal("samples differ")
	}
}

// TestBW64Table builds a BW64 file by hand (ITU-R BS.2088 keeps the RF64
// layout of EBU Tech 3306 under another ID): a ds64 chunk whose table gives
// the true size of a LIST chunk whose 32-bit size field is 0xFFFFFFFF.
func TestBW64Table(t *testing.T) {
	var ds wavBuilder
	body := chunks(ck("fmt ", fmt16), ckSize("LIST", 0xFFFFFFFF, []byte("INFO")), ckSize("data", 0xFFFFFFFF, pcm16))
	riffSize := uint64(4 + 8 + 40 + len(body))
	ds.raw(binary.LittleEndian.AppendUint64(nil, riffSize)...)
	ds.raw(binary.LittleEndian.AppendUint64(nil, uint64(len(pcm16)))...)
	ds.raw(binary.LittleEndian.AppendUint64(nil, 4)...) // sample count
	ds.u32(1).str("LIST").raw(binary.LittleEndian.AppendUint64(nil, 4)...)
	var b wavBuilder
	b.str("BW64").u32(0xFFFFFFFF).str("WAVE").chunk("ds64", 40, ds.buf.Bytes(), true)
	b.raw(body...)
	for _, stream := range []bool{false, true} {
		var src io.Reader = bytes.NewReader(b.buf.Bytes())
		if stream {
			src = plain{src}
		}
		r, err := NewReader(src, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !r.Format().RF64 || r.Frames() != 4 {
			t.Fatalf("RF64 %v, %d frames", r.Format().RF64, r.Frames())
		}
		if c := r.Chunks(); len(c) != 1 || string(c[0].Data) != "INFO" {
			t.Fatalf("chunks %+v", c)
		}
		if got := readAll(t, r, 3); !equalSamples(got, pcm16Samples) || len(r.Warnings()) != 0 {
			t.Fatalf("samples %v, warnings %v", got, r.Warnings())
		}
	}
}
