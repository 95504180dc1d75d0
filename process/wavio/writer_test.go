package wavio

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestScale checks the float<->int mapping documented in codec.go against
// bytes worked out by hand from it (v / 2^(N-1); 8-bit offset 128; round
// half to even, IEEE 754 section 4.3.1 default rounding). The WAVE format
// documents say 8-bit PCM is unsigned with silence at 128 and wider PCM is
// signed two's complement, little-endian: IBM and Microsoft, "Multimedia
// Programming Interface and Data Specifications 1.0", 1991, the data
// chunk's description of the PCM format; and Microsoft, "Multiple Channel
// Audio Data and WAVE Files" (WAVE_FORMAT_EXTENSIBLE), for the container
// size. Both quoted from memory. The scale v / 2^(N-1) (full scale at
// -2^(N-1)) is common practice, and the choice codec.go documents.
func TestScale(t *testing.T) {
	cases := []struct {
		bits int
		x    float64
		want []byte
	}{
		{8, 0, []byte{128}},
		{8, -1, []byte{0}},
		{8, 127.0 / 128, []byte{255}},
		{8, 0.5, []byte{192}},
		{16, 0.5, []byte{0x00, 0x40}},                  // 16384
		{16, -1, []byte{0x00, 0x80}},                   // -32768
		{16, 2.5 / 32768, []byte{0x02, 0x00}},          // 2.5 rounds to even 2
		{16, 3.5 / 32768, []byte{0x04, 0x00}},          // 3.5 rounds to even 4
		{16, -2.5 / 32768, []byte{0xfe, 0xff}},         // -2.5 rounds to -2
		{24, -1.0 / 8388608, []byte{0xff, 0xff, 0xff}}, // -1
		{24, 0.25, []byte{0x00, 0x00, 0x20}},           // 2097152
		{32, -0.5, []byte{0x00, 0x00, 0x00, 0xc0}},     // -1073741824
	}
	for _, c := range cases {
		f := Format{SampleRate: 8000, Channels: 1, Bits: c.bits, Encoding: PCM}
		data := encodeWAV(t, f, []float64{c.x}, nil)
		got := data[len(data)-len(c.want)-(len(c.want)&1):][:len(c.want)]
		if !bytes.Equal(got, c.want) {
			t.Errorf("%d-bit %v: wrote % x, want % x", c.bits, c.x, got, c.want)
		}
		r, err := NewReader(bytes.NewReader(data), nil)
		if err != nil {
			t.Fatal(err)
		}
		back := readAll(t, r, 1)
		if want := onGrid(f, []float64{c.x})[0]; back[0] != want {
			t.Errorf("%d-bit %v: read back %v, want %v", c.bits, c.x, back[0], want)
		}
	}
}

func TestClipping(t *testing.T) {
	f := Format{SampleRate: 8000, Channels: 2, Bits: 16, Encoding: PCM}
	// Channel 0: 1.0 is one step above the largest int16 (32767/32768),
	// 1.5 and -1.5 beyond full scale; channel 1: within range except -2.
	x := []float64{1.0, 0, 1.5, 0.5, -1.5, -2, -1, 0.999}
	var m memWS
	w, err := NewWriter(&m, WriterOptions{Format: f, NoDither: true})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if c := w.Clipped(); c[0] != 3 || c[1] != 1 {
		t.Fatalf("Clipped() = %v, want [3 1]", c)
	}
	r, _ := NewReader(bytes.NewReader(m.b), nil)
	got := readAll(t, r, 4)
	hi := 32767.0 / 32768
	want := []float64{hi, 0, hi, 0.5, -1, -1, -1, onGrid(f, []float64{0.999})[0]}
	if !equalSamples(got, want) {
		t.Fatalf("saturated samples %v, want %v", got, want)
	}
	// Float output keeps values beyond full scale.
	ff := Format{SampleRate: 8000, Channels: 2, Bits: 64, Encoding: Float}
	r, _ = NewReader(bytes.NewReader(encodeWAV(t, ff, x, nil)), nil)
	if got := readAll(t, r, 4); !equalSamples(got, x) {
		t.Fatalf("float output changed samples beyond full scale: %v", got)
	}
}

func TestWriterRefusesNonFinite(t *testing.T) {
	for _, f := range []Format{
		{SampleRate: 8000, Channels: 2, Bits: 16, Encoding: PCM},
		{SampleRate: 8000, Channels: 2, Bits: 32, Encoding: Float},
		{SampleRate: 8000, Channels: 2, Bits: 64, Encoding: Float},
	} {
		w, err := NewWriter(&memWS{}, WriterOptions{Format: f, NoDither: true})
		if err != nil {
			t.Fatal(err)
		}
		err = w.WriteFrames([]float64{0, 0, 0.1, math.Inf(-1)})
		var nf *NonFiniteError
		if !errors.As(err, &nf) || nf.Frame != 1 || nf.Channel != 1 {
			t.Fatalf("%v: got %v, want a NonFiniteError at frame 1 channel 1", f, err)
		}
		if err := w.Close(); !errors.As(err, &nf) {
			t.Fatalf("%v: Close after a failed write returned %v", f, err)
		}
	}
}

// TestDither checks TPDF dither statistically. With TPDF dither of 2 LSB
// peak-to-peak the total error (dither plus rounding) has mean 0 and
// variance 1/4 LSB^2 for any input (Lipshitz, Wannamaker and Vanderkooy,
// "Quantization and Dither: A Theoretical Survey", J. Audio Eng. Soc.
// 40(5), 1992, quoted from memory: 1/12 from rounding plus 1/6 from the
// dither, the variance of the sum of two independent uniform variables of
// 1 LSB width, 2 x 1/12), where plain rounding of a constant gives a fixed
// error.
func TestDither(t *testing.T) {
	f := Format{SampleRate: 8000, Channels: 1, Bits: 16, Encoding: PCM}
	const n = 200000
	const level = 0.3 / 32768 // 0.3 LSB: rounding alone always gives 0
	x := make([]float64, n)
	for i := range x {
		x[i] = level
	}
	write := func(opts WriterOptions) ([]float64, *Writer) {
		var m memWS
		opts.Format = f
		w, err := NewWriter(&m, opts)
		if err != nil {
			t.Fatal(err)
		}
		if err := w.WriteFrames(x); err != nil {
			t.Fatal(err)
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		r, _ := NewReader(bytes.NewReader(m.b), nil)
		return readAll(t, r, 4096), w
	}
	got, w := write(WriterOptions{DitherSeed: 42})
	if w.DitherSeed() != 42 {
		t.Fatalf("DitherSeed() = %d, want 42", w.DitherSeed())
	}
	var mean, sq float64
	for _, v := range got {
		e := (v - level) * 32768
		mean += e
		sq += e * e
	}
	mean /= n
	variance := sq/n - mean*mean
	// Standard error of the mean is sqrt(0.25/n) ~ 0.0011 LSB; 5 sigma.
	if math.Abs(mean) > 0.0056 {
		t.Errorf("dithered error mean %.4f LSB, want 0", mean)
	}
	if math.Abs(variance-0.25) > 0.01 {
		t.Errorf("dithered error variance %.4f LSB^2, want 0.25", variance)
	}
	again, _ := write(WriterOptions{DitherSeed: 42})
	if !equalSamples(got, again) {
		t.Error("the same seed gave different output")
	}
	other, _ := write(WriterOptions{DitherSeed: 43})
	if equalSamples(got, other) {
		t.Error("a different seed gave the same output")
	}
	plainOut, w := write(WriterOptions{NoDither: true})
	for _, v := range plainOut {
		if v != 0 {
			t.Fatal("without dither 0.3 LSB did not round to 0")
		}
	}
	if w.DitherSeed() != 0 {
		t.Errorf("DitherSeed() = %d without dither, want 0", w.DitherSeed())
	}
	_, w = write(WriterOptions{})
	if w.DitherSeed() == 0 {
		t.Error("no seed recorded for a clock-seeded writer")
	}
}

func fmtTag(t *testing.T, data []byte) (tag uint16, fmtSize uint32) {
	t.Helper()
	i := bytes.Index(data, []byte("fmt "))
	if i < 0 {
		t.Fatal("no fmt chunk")
	}
	return binary.LittleEndian.Uint16(data[i+8:]), binary.LittleEndian.Uint32(data[i+4:])
}

func TestExtensibleChoice(t *testing.T) {
	cases := []struct {
		f   Format
		ext bool
	}{
		{Format{Channels: 2, Bits: 16, Encoding: PCM}, false},
		{Format{Channels: 1, Bits: 8, Encoding: PCM}, false},
		{Format{Channels: 3, Bits: 16, Encoding: PCM}, true},
		{Format{Channels: 2, Bits: 24, Encoding: PCM}, true},
		{Format{Channels: 1, Bits: 32, Encoding: Float}, true},
		{Format{Channels: 2, Bits: 16, Encoding: PCM, ChannelMask: 0x3}, true},
	}
	for _, c := range cases {
		c.f.SampleRate = 48000
		data := encodeWAV(t, c.f, make([]float64, c.f.Channels), nil)
		tag, size := fmtTag(t, data)
		if got := tag == tagExtensible; got != c.ext || (c.ext && size != 40) {
			t.Errorf("%v: format tag 0x%04x, size %d; want extensible %v", c.f, tag, size, c.ext)
		}
		hasFact := bytes.Contains(data, []byte("fact\x04\x00\x00\x00\x01\x00\x00\x00"))
		if hasFact != (c.f.Encoding == Float) {
			t.Errorf("%v: fact chunk with one frame present = %v", c.f, hasFact)
		}
	}
}

func TestChunksCopied(t *testing.T) {
	bext := make([]byte, 602)
	copy(bext, "a description")
	bext = append(bext, "A=ANALOGUE,M=stereo\r\n\x00\x00"...)
	in := []Chunk{
		{ID: "bext", Data: bext},
		{ID: "iXML", Data: []byte("<BWFXML/>")}, // odd size: padded on output
		{ID: "LIST", Data: []byte("INFOICMT\x04\x00\x00\x00hi!\x00")},
		{ID: "cue ", Data: make([]byte, 28), AfterData: true},
		{ID: "zzzz", Data: []byte{9}, AfterData: true},
	}
	f := Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: PCM}
	x := onGrid(f, signal(11, 2)) // 66 bytes of data
	var m memWS
	w, err := NewWriter(&m, WriterOptions{Format: f, NoDither: true, Chunks: in})
	if err != nil {
		t.Fatal(err)
	}
	line := CodingHistoryLine(f, "wavsieve filter lowpass 8 kHz")
	if line != "A=PCM,F=48000,W=24,M=stereo,T=wavsieve filter lowpass 8 kHz\r\n" {
		t.Fatalf("CodingHistoryLine = %q", line)
	}
	if err := w.AppendCodingHistory(line); err != nil {
		t.Fatal(err)
	}
	if err := w.AddChunk(Chunk{ID: "axml", Data: []byte("<x/>"), AfterData: true}); err != nil {
		t.Fatal(err)
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.AddChunk(Chunk{ID: "late", Data: []byte("x")}); err == nil {
		t.Error("a before-data chunk was accepted after frames were written")
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	r, err := NewReader(bytes.NewReader(m.b), nil)
	if err != nil {
		t.Fatal(err)
	}
	got := r.Chunks()
	ids := ""
	for _, c := range got {
		ids += c.ID + map[bool]string{false: "<", true: ">"}[c.AfterData]
	}
	if ids != "bext<iXML<LIST<cue >zzzz>axml>" {
		t.Fatalf("chunk order %s", ids)
	}
	wantHist := "A=ANALOGUE,M=stereo\r\n" + line
	if h := string(got[0].Data[602:]); h != wantHist {
		t.Fatalf("coding history %q, want %q", h, wantHist)
	}
	if !bytes.Equal(got[0].Data[:602], bext[:602]) {
		t.Fatal("bext fields before the coding history changed")
	}
	for i := 1; i < 5; i++ {
		if !bytes.Equal(got[i].Data, in[i].Data) {
			t.Fatalf("chunk %s not byte-exact", got[i].ID)
		}
	}
	if riffSize := binary.LittleEndian.Uint32(m.b[4:]); int(riffSize) != len(m.b)-8 {
		t.Fatalf("RIFF size %d for a %d-byte file", riffSize, len(m.b))
	}
	if len(r.Warnings()) != 0 {
		t.Fatalf("warnings: %v", r.Warnings())
	}
	if _, err := AppendCodingHistory(make([]byte, 100), "x"); err == nil {
		t.Error("a 100-byte bext chunk was accepted")
	}
	for _, id := range []string{"fmt ", "data", "ds64", "abc", "fact"} {
		if _, err := NewWriter(&memWS{}, WriterOptions{Format: f, Chunks: []Chunk{{ID: id}}}); err == nil {
			t.Errorf("chunk id %q accepted", id)
		}
	}
}

func TestWriterFormatRefused(t *testing.T) {
	for _, f := range []Format{
		{SampleRate: 0, Channels: 1, Bits: 16, Encoding: PCM},
		{SampleRate: 8000, Channels: 0, Bits: 16, Encoding: PCM},
		{SampleRate: 8000, Channels: 1, Bits: 12, Encoding: PCM},
		{SampleRate: 8000, Channels: 1, Bits: 16, Encoding: Float},
		{SampleRate: 8000, Channels: 1, Bits: 16, ValidBits: 17, Encoding: PCM},
		{SampleRate: 8000, Channels: 1, Bits: 16},
	} {
		if _, err := NewWriter(&memWS{}, WriterOptions{Format: f}); err == nil || !strings.HasPrefix(err.Error(), "wavio: ") {
			t.Errorf("%+v: got %v, want a wavio error", f, err)
		}
	}
}

func TestCreateIsAtomic(t *testing.T) {
	dir := t.TempDir()
	f := Format{SampleRate: 8000, Channels: 1, Bits: 16, Encoding: PCM}
	name := filepath.Join(dir, "out.wav")
	list := func() []string {
		es, _ := os.ReadDir(dir)
		var s []string
		for _, e := range es {
			s = append(s, e.Name())
		}
		return s
	}

	w, err := Create(name, WriterOptions{Format: f, NoDither: true})
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	if err := w.WriteFrames(make([]float64, 100)); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(name); !errors.Is(err, os.ErrNotExist) {
		t.Fatal("the final name exists before Close")
	}
	if l := list(); len(l) != 1 || !strings.HasPrefix(l[0], ".out.wav.wavsieve-tmp-") {
		t.Fatalf("folder during writing: %v", l)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if err := w.Abort(); err != nil {
		t.Fatalf("Abort after Close: %v", err)
	}
	if l := list(); len(l) != 1 || l[0] != "out.wav" {
		t.Fatalf("folder after Close: %v", l)
	}
	r, err := Open(name, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Frames() != 100 {
		t.Fatalf("%d frames, want 100", r.Frames())
	}
	r.Close()
	before, _ := os.ReadFile(name)

	// Abort leaves the earlier file alone and no temporary file.
	w, err = Create(name, WriterOptions{Format: f, NoDither: true})
	if err != nil {
		t.Fatal(err)
	}
	w.WriteFrames(make([]float64, 7))
	if err := w.Abort(); err != nil {
		t.Fatal(err)
	}
	if l := list(); len(l) != 1 {
		t.Fatalf("folder after Abort: %v", l)
	}
	if after, _ := os.ReadFile(name); !bytes.Equal(before, after) {
		t.Fatal("Abort changed the existing file")
	}
	if err := w.WriteFrames(make([]float64, 1)); err == nil {
		t.Fatal("WriteFrames after Abort succeeded")
	}

	// A failed write makes Close remove the temporary file.
	w, _ = Create(name, WriterOptions{Format: f, NoDither: true})
	w.WriteFrames([]float64{math.NaN()})
	if err := w.Close(); err == nil {
		t.Fatal("Close after a failed write succeeded")
	}
	if l := list(); len(l) != 1 {
		t.Fatalf("folder after a failed Close: %v", l)
	}

	if _, err := Create(filepath.Join(dir, "missing", "x.wav"), WriterOptions{Format: f}); err == nil {
		t.Fatal("Create in a missing folder succeeded")
	}
}

func TestSameFile(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.wav")
	os.WriteFile(a, []byte("x"), 0o644)
	link := filepath.Join(dir, "b.wav")
	if err := os.Link(a, link); err != nil {
		t.Skip("no hard links here:", err)
	}
	os.WriteFile(filepath.Join(dir, "c.wav"), []byte("x"), 0o644)
	cases := []struct {
		p, q string
		same bool
	}{
		{a, a, true},
		{a, filepath.Join(dir, ".", "a.wav"), true},
		{a, link, true},
		{a, filepath.Join(dir, "c.wav"), false},
		{a, filepath.Join(dir, "new.wav"), false},
	}
	for _, c := range cases {
		got, err := SameFile(c.p, c.q)
		if err != nil || got != c.same {
			t.Errorf("SameFile(%s, %s) = %v, %v; want %v", c.p, c.q, got, err, c.same)
		}
	}
}

// TestRF64Switch lowers the threshold so that a small output takes the
// RF64 path, and checks the layout of EBU Tech 3306 section 3 and that the
// Reader reads it back.
func TestRF64Switch(t *testing.T) {
	old := maxRIFF
	maxRIFF = 1000
	defer func() { maxRIFF = old }()
	f := Format{SampleRate: 48000, Channels: 2, Bits: 32, Encoding: Float}
	x := onGrid(f, signal(400, 2)) // 3200 bytes of data
	data := encodeWAV(t, f, x, []Chunk{{ID: "LIST", Data: []byte("INFO")}, {ID: "tail", Data: []byte("t"), AfterData: true}})
	le := binary.LittleEndian
	if string(data[0:4]) != "RF64" || le.Uint32(data[4:]) != 0xFFFFFFFF || string(data[12:16]) != "ds64" {
		t.Fatalf("header % x", data[:16])
	}
	if le.Uint64(data[20:]) != uint64(len(data)-8) || le.Uint64(data[28:]) != 3200 || le.Uint64(data[36:]) != 400 {
		t.Fatalf("ds64 body % x", data[20:48])
	}
	r, err := NewReader(bytes.NewReader(data), nil)
	if err != nil {
		t.Fatal(err)
	}
	if !r.Format().RF64 || r.Frames() != 400 {
		t.Fatalf("format %+v, %d frames", r.Format(), r.Frames())
	}
	if got := readAll(t, r, 77); !equalSamples(got, x) {
		t.Fatal("samples differ")
	}
	if c := r.Chunks(); len(c) != 2 || c[1].ID != "tail" || len(r.Warnings()) != 0 {
		t.Fatalf("chunks %+v, warnings %v", c, r.Warnings())
	}
}

// sparse is an io.WriteSeeker and io.ReaderAt that keeps only the bytes
// written below keepLow or at or above keepHigh, and reads zeros elsewhere,
// so that files past 4 GiB can be written and read in little memory.
type sparse struct {
	low, high         []byte
	keepLow, keepHigh int64
	off, size         int64
}

func (s *sparse) Write(p []byte) (int, error) {
	start, end := s.off, s.off+int64(len(p))
	if start < s.keepLow {
		e := min(end, s.keepLow)
		if e > int64(len(s.low)) {
			s.low = append(s.low, make([]byte, e-int64(len(s.low)))...)
		}
		copy(s.low[start:e], p)
	}
	if end > s.keepHigh {
		from := max(start, s.keepHigh)
		if need := end - s.keepHigh; need > int64(len(s.high)) {
			s.high = append(s.high, make([]byte, need-int64(len(s.high)))...)
		}
		copy(s.high[from-s.keepHigh:], p[from-start:])
	}
	s.off = end
	s.size = max(s.size, end)
	return len(p), nil
}

func (s *sparse) Seek(off int64, whence int) (int64, error) {
	if whence != io.SeekStart {
		return 0, errors.New("sparse: only SeekStart")
	}
	s.off = off
	return off, nil
}

func (s *sparse) ReadAt(p []byte, off int64) (int, error) {
	for i := range p {
		o := off + int64(i)
		switch {
		case o >= s.size:
			return i, io.EOF
		case o < int64(len(s.low)):
			p[i] = s.low[o]
		case o >= s.keepHigh && o-s.keepHigh < int64(len(s.high)):
			p[i] = s.high[o-s.keepHigh]
		default:
			p[i] = 0
		}
	}
	return len(p), nil
}

// TestRF64Large writes and reads a real output past 4 GiB (float64 mono,
// 2^29 + 1000 frames) into a sparse store. It takes a few seconds.
func TestRF64Large(t *testing.T) {
	if testing.Short() {
		t.Skip("writes 4 GiB through the encoder")
	}
	f := Format{SampleRate: 768000, Channels: 1, Bits: 64, Encoding: Float}
	const frames = 1<<29 + 1000
	s := &sparse{keepLow: 1 << 12, keepHigh: 1<<32 - 1<<12}
	w, err := NewWriter(s, WriterOptions{Format: f, Chunks: []Chunk{{ID: "tail", Data: []byte("end"), AfterData: true}}})
	if err != nil {
		t.Fatal(err)
	}
	block := make([]float64, 1<<16)
	left := int64(frames)
	for left > 0 {
		n := min(left, int64(len(block)))
		if left <= int64(len(block)) {
			for i := range block[:n] {
				block[i] = float64(i) / float64(n) // a ramp in the last block
			}
		}
		if err := w.WriteFrames(block[:n]); err != nil {
			t.Fatal(err)
		}
		left -= n
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if string(s.low[:4]) != "RF64" {
		t.Fatalf("a %d-byte output is labelled %q", s.size, s.low[:4])
	}
	r, err := NewReaderAt(s, s.size, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Frames() != frames || !r.Format().RF64 {
		t.Fatalf("read back %d frames, RF64 %v", r.Frames(), r.Format().RF64)
	}
	if c := r.Chunks(); len(c) != 1 || string(c[0].Data) != "end" {
		t.Fatalf("chunk after 4 GiB of data: %+v", c)
	}
	last := int64(frames) % int64(len(block))
	if err := r.SeekFrame(frames - last); err != nil {
		t.Fatal(err)
	}
	got := readAll(t, r, 100)
	if int64(len(got)) != last || got[1] != 1/float64(last) || got[last-1] != float64(last-1)/float64(last) {
		t.Fatalf("last block read back wrong: %d samples", len(got))
	}
}
