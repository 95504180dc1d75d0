package wavio

import (
	"bytes"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"testing"
	"testing/iotest"
)

// onGrid returns x moved to the nearest value the format holds exactly, so
// that a write-read round trip must return it unchanged. The scale is the
// one documented in codec.go (common practice: v / 2^(N-1)).
func onGrid(f Format, x []float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		switch {
		case f.Encoding == Float && f.Bits == 32:
			out[i] = float64(float32(v))
		case f.Encoding == Float:
			out[i] = v
		default:
			valid := f.ValidBits
			if valid == 0 {
				valid = f.Bits
			}
			s := math.Ldexp(1, valid-1)
			out[i] = math.Max(-s, math.Min(s-1, math.RoundToEven(v*s))) / s
		}
	}
	return out
}

var roundTripFormats = []Format{
	{Encoding: PCM, Bits: 8},
	{Encoding: PCM, Bits: 16},
	{Encoding: PCM, Bits: 24},
	{Encoding: PCM, Bits: 32},
	{Encoding: PCM, Bits: 24, ValidBits: 20},
	{Encoding: PCM, Bits: 16, ValidBits: 12},
	{Encoding: Float, Bits: 32},
	{Encoding: Float, Bits: 64},
}

func TestRoundTrip(t *testing.T) {
	rates := map[int]int{1: 1, 2: 768000, 3: 44100, 6: 48000, 8: 96000, 32: 8000}
	for _, base := range roundTripFormats {
		for ch, rate := range rates {
			f := base
			f.Channels, f.SampleRate = ch, rate
			if ch > 2 {
				f.ChannelMask = 1<<min(ch, 18) - 1
			}
			t.Run(f.String(), func(t *testing.T) {
				want := onGrid(f, signal(301, ch))
				data := encodeWAV(t, f, want, nil)
				r, err := NewReader(bytes.NewReader(data), nil)
				if err != nil {
					t.Fatal(err)
				}
				g := r.Format()
				wf := f
				if wf.ValidBits == 0 {
					wf.ValidBits = wf.Bits
				}
				if g != wf {
					t.Fatalf("format read back %+v, wrote %+v", g, wf)
				}
				if r.Frames() != 301 {
					t.Fatalf("Frames() = %d, want 301", r.Frames())
				}
				got := readAll(t, r, 64)
				if !equalSamples(got, want) {
					t.Fatal("samples differ after the round trip")
				}
				if len(r.Warnings()) != 0 {
					t.Fatalf("warnings on own output: %v", r.Warnings())
				}
				// Writing what was read gives the same bytes again.
				if again := encodeWAV(t, g, got, r.Chunks()); !bytes.Equal(again, data) {
					t.Fatal("second encoding differs from the first")
				}
			})
		}
	}
}

func equalSamples(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] && !(math.IsNaN(a[i]) && math.IsNaN(b[i])) {
			return false
		}
	}
	return true
}

// TestBlockSizes is the property that the block sizes of reading and of
// writing do not change the samples or the bytes.
func TestBlockSizes(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	for _, base := range roundTripFormats {
		f := base
		f.Channels, f.SampleRate = 3, 48000
		x := onGrid(f, signal(5000, 3))
		ref := encodeWAV(t, f, x, nil)
		for trial := range 8 {
			// Write in random blocks.
			var m memWS
			w, err := NewWriter(&m, WriterOptions{Format: f, NoDither: true})
			if err != nil {
				t.Fatal(err)
			}
			for rest := x; len(rest) > 0; {
				n := min(rng.IntN(3000), len(rest)/3) * 3
				if err := w.WriteFrames(rest[:n]); err != nil {
					t.Fatal(err)
				}
				rest = rest[n:]
			}
			if err := w.Close(); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(m.b, ref) {
				t.Fatalf("%v trial %d: bytes depend on the write block size", f, trial)
			}
			// Read in random blocks, changing size on every call.
			r, err := NewReader(bytes.NewReader(ref), nil)
			if err != nil {
				t.Fatal(err)
			}
			var got []float64
			for {
				dst := make([]float64, 3*rng.IntN(40000))
				n, err := r.ReadFrames(dst)
				got = append(got, dst[:3*n]...)
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatal(err)
				}
			}
			if !equalSamples(got, x) {
				t.Fatalf("%v trial %d: samples depend on the read block size", f, trial)
			}
		}
	}
}

// plain hides every method but Read, so that the Reader streams.
type plain struct{ r io.Reader }

func (p plain) Read(b []byte) (int, error) { return p.r.Read(b) }

func TestShortReads(t *testing.T) {
	f := Format{SampleRate: 44100, Channels: 2, Bits: 24, Encoding: PCM}
	x := onGrid(f, signal(3000, 2))
	chunks := []Chunk{{ID: "LIST", Data: []byte("INFOISFT\x05\x00\x00\x00test\x00")}, {ID: "note", Data: []byte("abc"), AfterData: true}}
	data := encodeWAV(t, f, x, chunks)
	wraps := map[string]func(io.Reader) io.Reader{
		"OneByteReader": iotest.OneByteReader,
		"HalfReader":    iotest.HalfReader,
		"DataErrReader": iotest.DataErrReader,
		"plain":         func(r io.Reader) io.Reader { return plain{r} },
	}
	for name, wrap := range wraps {
		t.Run(name, func(t *testing.T) {
			r, err := NewReader(wrap(bytes.NewReader(data)), nil)
			if err != nil {
				t.Fatal(err)
			}
			got := readAll(t, r, 100)
			if !equalSamples(got, x) {
				t.Fatal("samples differ")
			}
			if len(r.Warnings()) != 0 {
				t.Fatalf("warnings: %v", r.Warnings())
			}
			c := r.Chunks()
			if len(c) != 2 || c[0].ID != "LIST" || c[0].AfterData || c[1].ID != "note" || !c[1].AfterData || string(c[1].Data) != "abc" {
				t.Fatalf("chunks after a streamed read: %+v", c)
			}
		})
	}
	t.Run("ErrReader", func(t *testing.T) {
		cut := len(data) / 2
		boom := errors.New("boom")
		r, err := NewReader(io.MultiReader(bytes.NewReader(data[:cut]), iotest.ErrReader(boom)), nil)
		if err != nil {
			t.Fatal(err)
		}
		dst := make([]float64, 200)
		for {
			_, err = r.ReadFrames(dst)
			if err != nil {
				break
			}
		}
		if !errors.Is(err, boom) {
			t.Fatalf("got %v, want the source's error", err)
		}
		if _, err2 := r.ReadFrames(dst); err2 != err {
			t.Fatalf("error is not sticky: %v then %v", err, err2)
		}
	})
	t.Run("TimeoutReader", func(t *testing.T) {
		_, err := NewReader(iotest.TimeoutReader(iotest.OneByteReader(bytes.NewReader(data))), nil)
		if !errors.Is(err, iotest.ErrTimeout) {
			t.Fatalf("got %v, want iotest.ErrTimeout", err)
		}
	})
}

func TestSeekFrame(t *testing.T) {
	f := Format{SampleRate: 8000, Channels: 2, Bits: 16, Encoding: PCM}
	x := onGrid(f, signal(1000, 2))
	data := encodeWAV(t, f, x, []Chunk{{ID: "tail", Data: []byte{1, 2, 3}, AfterData: true}})
	r, err := NewReader(bytes.NewReader(data), nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Chunks()) != 1 || r.Chunks()[0].ID != "tail" {
		t.Fatalf("chunks after the data not found through the seeker: %+v", r.Chunks())
	}
	for _, at := range []int64{999, 0, 517, 1000} {
		if err := r.SeekFrame(at); err != nil {
			t.Fatal(err)
		}
		got := readAll(t, r, 33)
		if !equalSamples(got, x[2*at:]) {
			t.Fatalf("after SeekFrame(%d) the samples differ", at)
		}
	}
	if err := r.SeekFrame(1001); err == nil {
		t.Fatal("SeekFrame past the end succeeded")
	}
	s, _ := NewReader(plain{bytes.NewReader(data)}, nil)
	if err := s.SeekFrame(1); !errors.Is(err, ErrNotSeekable) {
		t.Fatalf("SeekFrame on a stream: %v, want ErrNotSeekable", err)
	}
}

func TestAllocsPerBlock(t *testing.T) {
	f := Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: PCM}
	data := encodeWAV(t, f, signal(1<<16, 2), nil)
	r, err := NewReader(bytes.NewReader(data), nil)
	if err != nil {
		t.Fatal(err)
	}
	dst := make([]float64, 2*256)
	if a := testing.AllocsPerRun(100, func() { r.ReadFrames(dst) }); a != 0 {
		t.Errorf("ReadFrames allocates %v times per block", a)
	}
	w, err := NewWriter(&memWS{b: make([]byte, 0, 1<<20)}, WriterOptions{Format: f})
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(100, func() { w.WriteFrames(dst) }); a != 0 {
		t.Errorf("WriteFrames allocates %v times per block", a)
	}
}

func TestReadFramesPanicsOnMisuse(t *testing.T) {
	f := Format{SampleRate: 8000, Channels: 2, Bits: 16, Encoding: PCM}
	r, err := NewReader(bytes.NewReader(encodeWAV(t, f, signal(10, 2), nil)), nil)
	if err != nil {
		t.Fatal(err)
	}
	defer func() {
		if recover() == nil {
			t.Fatal("ReadFrames with 3 samples for 2 channels did not panic")
		}
	}()
	r.ReadFrames(make([]float64, 3))
}
