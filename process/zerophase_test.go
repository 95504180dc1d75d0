package process

import (
	"context"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// zeroPhaseTol is the agreement asked of the zero-phase output with
// scipy.signal.sosfiltfilt, relative to the signal's RMS (project
// requirement).
const zeroPhaseTol = 1e-9

// chunkSource delivers a slice in chunks of random length, to exercise
// short reads.
type chunkSource struct {
	x   []float64
	ch  int
	rng *rand.Rand
}

func (s *chunkSource) ReadFrames(dst []float64) (int, error) {
	n := min(len(dst)/s.ch, 1+s.rng.IntN(700), len(s.x)/s.ch)
	copy(dst, s.x[:n*s.ch])
	s.x = s.x[n*s.ch:]
	if len(s.x) == 0 {
		return n, io.EOF
	}
	return n, nil
}

type sliceSink struct{ x []float64 }

func (s *sliceSink) WriteFrames(p []float64) error { s.x = append(s.x, p...); return nil }

func spill(t testing.TB, x []float64, sos []design.Section, cfg Config, opt ZeroPhaseOptions, seed uint64) ([]float64, EdgeReport) {
	t.Helper()
	opt.TempDir = t.TempDir()
	if opt.SpillMemoryBytes == 0 {
		opt.SpillMemoryBytes = -1 // all on disk
	}
	var out sliceSink
	rep, err := ZeroPhase(&out, &chunkSource{x: x, ch: cfg.Channels, rng: rand.New(rand.NewPCG(seed, 1))}, sos, cfg, opt)
	if err != nil {
		t.Fatal(err)
	}
	return out.x, rep
}

func TestZeroPhaseMatchesSciPy(t *testing.T) {
	r := loadRefs(t)
	tol := zeroPhaseTol * rms(r.Signal)
	for _, tc := range r.Cases {
		t.Run(tc.Name, func(t *testing.T) {
			cfg := Config{Channels: r.Channels}
			opt := ZeroPhaseOptions{PadFrames: tc.Padlen, DecayFrames: 2 * tc.Padlen, BlockFrames: 100}
			got, rep, err := ZeroPhaseSlice(nil, r.Signal, tc.Sections, cfg, opt)
			if err != nil {
				t.Fatal(err)
			}
			// Expected: scipy.signal.sosfiltfilt(sos, x, padtype='odd',
			// padlen=tc.Padlen) per channel, full length (SciPy r.ScipyVersion).
			if d, at := maxAbsDiff(got, tc.Filtfilt); d > tol {
				t.Errorf("in memory: max |diff| %g at %d, tolerance %g (SciPy %s)", d, at, tol, r.ScipyVersion)
			}
			want := EdgeReport{Frames: r.Frames, PadFrames: tc.Padlen, TransientFrames: tc.Padlen}
			if rep != want {
				t.Errorf("report %+v, want %+v", rep, want)
			}
			sp, rep2 := spill(t, r.Signal, tc.Sections, cfg, opt, 3)
			if rep2 != rep {
				t.Errorf("spill report %+v, in-memory %+v", rep2, rep)
			}
			// Spill and memory agree bit for bit.
			if len(sp) != len(got) {
				t.Fatalf("spill gave %d samples, want %d", len(sp), len(got))
			}
			if d, at := maxAbsDiff(sp, got); d != 0 {
				t.Errorf("spill differs from in-memory by %g at %d", d, at)
			}
		})
	}
}

// TestZeroPhaseSpillBitForBit varies the block length, the chunking of
// the source, the channel selection and in-place use.
func TestZeroPhaseSpillBitForBit(t *testing.T) {
	r := loadRefs(t)
	tc := r.Cases[1]
	for i, opt := range []ZeroPhaseOptions{
		{PadFrames: 300, BlockFrames: 1},
		{PadFrames: 300, BlockFrames: 77},
		{PadFrames: 0},
		{PadFrames: 1023, BlockFrames: 5000},
		{PadFrames: 200, BlockFrames: 300, SpillMemoryBytes: 8 << 20}, // in memory
	} {
		for _, only := range [][]int{nil, {0}, {1}} {
			cfg := Config{Channels: 2, Only: only}
			mem := append([]float64(nil), r.Signal...)
			if _, _, err := ZeroPhaseSlice(mem, mem, tc.Sections, cfg, opt); err != nil {
				t.Fatal(err)
			}
			ref, _, _ := ZeroPhaseSlice(nil, r.Signal, tc.Sections, cfg, ZeroPhaseOptions{PadFrames: opt.PadFrames})
			sp, _ := spill(t, r.Signal, tc.Sections, cfg, opt, uint64(i))
			for _, got := range [][]float64{mem, sp} {
				if d, at := maxAbsDiff(got, ref); d != 0 {
					t.Errorf("case %d, channels %v: differs by %g at %d", i, only, d, at)
				}
			}
			for _, c := range only {
				for f := 0; f < r.Frames; f++ {
					if k := 2*f + 1 - c; sp[k] != r.Signal[k] {
						t.Fatalf("case %d: unselected channel %d changed at frame %d", i, 1-c, f)
					}
				}
			}
		}
	}
}

// TestZeroPhaseSpillSegments shrinks the memory step and the file
// segments so that a short signal goes through many of them (memory
// then file, buffers read ahead and written behind), and checks the
// result bit for bit against ZeroPhaseSlice.
func TestZeroPhaseSpillSegments(t *testing.T) {
	r := loadRefs(t)
	tc := r.Cases[0]
	savedStep, savedIO := spillStep, spillIOBytes
	defer func() { spillStep, spillIOBytes = savedStep, savedIO }()
	spillStep = 64
	for _, c := range []struct {
		name          string
		ioBytes       int
		mem           int64 // SpillMemoryBytes
		block, frames int
	}{
		{"file only, many segments", 8 * 2 * 50, -1, 77, r.Frames},
		{"memory then file", 8 * 2 * 64, 8 * 64 * 5, 30, r.Frames},
		{"segment longer than block", 8 * 2 * 200, 8 * 64 * 3, 7, r.Frames},
		{"last segment whole", 8 * 2 * 128, -1, 128, r.Frames},
		{"all in memory", 8 * 2 * 64, 8 * 64 * 100, 100, r.Frames},
		{"short", 8 * 2 * 16, 8 * 64, 5, 100},
	} {
		t.Run(c.name, func(t *testing.T) {
			spillIOBytes = c.ioBytes
			x := r.Signal[:2*c.frames]
			cfg := Config{Channels: 2}
			opt := ZeroPhaseOptions{PadFrames: 60, BlockFrames: c.block, SpillMemoryBytes: c.mem}
			want, _, err := ZeroPhaseSlice(nil, x, tc.Sections, cfg, opt)
			if err != nil {
				t.Fatal(err)
			}
			got, _ := spill(t, x, tc.Sections, cfg, opt, 5)
			if len(got) != len(want) {
				t.Fatalf("got %d samples, want %d", len(got), len(want))
			}
			if d, at := maxAbsDiff(got, want); d != 0 {
				t.Errorf("differs by %g at %d", d, at)
			}
		})
	}
}

// TestFilterFileZeroPhaseMatchesSlice: FilterFile, with its reading and
// writing goroutines, gives the samples of ZeroPhaseSlice over the
// decoded input, written with the same dither seed; and the causal run
// those of Cascade.Process. Three channels (a pair and a single), odd
// block length, 24-bit output with dither.
func TestFilterFileZeroPhaseMatchesSlice(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	pcm24 := wavio.Format{Bits: 24, Encoding: wavio.PCM}
	writeTone(t, in, 8000, 3, 2.5, pcm24, nil)
	x, _, _ := readAll(t, in)
	spec := design.Spec{Stages: []design.Stage{{Family: design.Elliptic, Response: design.Highpass, Order: 6, CutoffHz: design.Edges{120}, RippleDB: 0.5, AttenuationDB: 70}}}
	f, err := design.Design(spec, 8000)
	if err != nil {
		t.Fatal(err)
	}
	for _, zp := range []bool{false, true} {
		spec.ZeroPhase = zp
		const block, seed = 333, 7
		out := filepath.Join(dir, "out.wav")
		if _, err := FilterFile(context.Background(), FileJob{Input: in, Output: out, Spec: spec, BlockFrames: block, DitherSeed: seed}); err != nil {
			t.Fatal(err)
		}
		got, _, _ := readAll(t, out)

		cfg := Config{Channels: 3}
		var y []float64
		if zp {
			y, _, err = ZeroPhaseSlice(nil, x, f.Sections(), cfg, zeroPhaseOptions(f, int64(len(x)/3), 3, block))
			if err != nil {
				t.Fatal(err)
			}
		} else {
			c, _ := NewCascade(f.Sections(), cfg)
			y = c.Process(nil, x)
		}
		ref := filepath.Join(dir, "ref.wav")
		w, err := wavio.Create(ref, wavio.WriterOptions{Format: wavio.Format{SampleRate: 8000, Channels: 3, Bits: 24, Encoding: wavio.PCM}, DitherSeed: seed})
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < len(y); i += 3 * block {
			if err := w.WriteFrames(y[i:min(i+3*block, len(y))]); err != nil {
				t.Fatal(err)
			}
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		want, _, _ := readAll(t, ref)
		if len(got) != len(want) {
			t.Fatalf("zero-phase %v: %d samples, want %d", zp, len(got), len(want))
		}
		if d, at := maxAbsDiff(got, want); d != 0 {
			t.Errorf("zero-phase %v: differs by %g at %d", zp, d, at)
		}
	}
}

// TestFilterFileFailsMidway: an output that fails in the middle (the
// output's observer returns an error after some blocks) and a cancel in the middle
// stop the reading and writing goroutines, return the error, and leave
// no output and no spill file.
func TestFilterFileFailsMidway(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	const frames = 20000
	w, err := wavio.Create(in, wavio.WriterOptions{Format: wavio.Format{SampleRate: 8000, Channels: 2, Bits: 64, Encoding: wavio.Float}})
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, 2*frames)
	for i := range x {
		x[i] = 0.3 * math.Sin(float64(i)*0.01)
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	// The writer refuses a NaN: put one into the data chunk (the last
	// chunk of the file) by hand, at frame 12345, channel 1.
	b, err := os.ReadFile(in)
	if err != nil {
		t.Fatal(err)
	}
	at := len(b) - 8*len(x) + 8*(2*12345+1)
	binary.LittleEndian.PutUint64(b[at:], math.Float64bits(math.NaN()))
	if err := os.WriteFile(in, b, 0o644); err != nil {
		t.Fatal(err)
	}
	outDir := filepath.Join(dir, "out")
	if err := os.Mkdir(outDir, 0o755); err != nil {
		t.Fatal(err)
	}
	spec := design.Spec{Stages: []design.Stage{{Family: design.Butterworth, Response: design.Highpass, Order: 2, CutoffHz: design.Edges{100}}}}
	for _, zp := range []bool{false, true} {
		spec.ZeroPhase = zp
		job := FileJob{Input: in, Output: filepath.Join(outDir, "o.wav"), Spec: spec, Encoding: wavio.PCM, Bits: 24, AllowNonFinite: true, BlockFrames: 100}
		errMidway := errors.New("refused midway")
		job.Observe = func(*FileJob, wavio.Format, int64, *design.Filter) func(in, out []float64) error {
			blocks := 0
			return func(in, out []float64) error {
				if blocks++; blocks > 50 {
					return errMidway
				}
				return nil
			}
		}
		if _, err := FilterFile(context.Background(), job); !errors.Is(err, errMidway) {
			t.Errorf("zero-phase %v, observer failing midway: error %v", zp, err)
		}
		job.Observe = nil
		ctx, cancel := context.WithCancel(context.Background())
		job.Encoding, job.Bits = wavio.Float, 64
		job.Progress = func(done, total int64) {
			if done >= total/2 {
				cancel()
			}
		}
		if _, err := FilterFile(ctx, job); !errors.Is(err, context.Canceled) {
			t.Errorf("zero-phase %v, cancelled: error %v", zp, err)
		}
	}
	entries, _ := os.ReadDir(outDir)
	if len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}

// TestZeroPhaseIsZeroPhase: a symmetric pulse in the middle of silence
// comes out symmetric, and its cross-correlation with the input peaks
// at lag 0 (the forward-backward response is |H|^2, real and even:
// Oppenheim & Schafer, 3rd ed., problem 5.71).
func TestZeroPhaseIsZeroPhase(t *testing.T) {
	r := loadRefs(t)
	const n = 4001 // odd: the centre is a sample
	x := make([]float64, n)
	for i := range x {
		d := float64(i-n/2) / 40
		x[i] = math.Exp(-d*d) * math.Cos(float64(i-n/2)*0.3)
	}
	for _, tc := range r.Cases[1:] { // bandstop and lowpass: the pulse passes
		y, _, err := ZeroPhaseSlice(nil, x, tc.Sections, Config{Channels: 1}, ZeroPhaseOptions{PadFrames: 500})
		if err != nil {
			t.Fatal(err)
		}
		peak := 0.0
		for _, v := range y {
			peak = max(peak, math.Abs(v))
		}
		// Symmetric to 1e-9 of the peak: what remains of the start-up at
		// 2000 frames from the edges (common practice).
		for i := 0; i < n/2; i++ {
			if d := math.Abs(y[i] - y[n-1-i]); d > 1e-9*peak {
				t.Fatalf("%s: y[%d] = %v, y[%d] = %v", tc.Name, i, y[i], n-1-i, y[n-1-i])
			}
		}
		best, lag := math.Inf(-1), 0
		for l := -20; l <= 20; l++ {
			s := 0.0
			for i := max(0, -l); i < min(n, n-l); i++ {
				s += x[i] * y[i+l]
			}
			if s > best {
				best, lag = s, l
			}
		}
		if lag != 0 {
			t.Errorf("%s: cross-correlation peaks at lag %d, want 0", tc.Name, lag)
		}
	}
}

// TestZeroPhaseShortSignal: the pad shrinks to frames-1 and the report
// says so; the result is that of the shorter pad.
func TestZeroPhaseShortSignal(t *testing.T) {
	r := loadRefs(t)
	sos := r.Cases[2].Sections
	x := r.Signal[:2*50]
	opt := ZeroPhaseOptions{PadFrames: 300, DecayFrames: 400}
	got, rep, err := ZeroPhaseSlice(nil, x, sos, Config{Channels: 2}, opt)
	if err != nil {
		t.Fatal(err)
	}
	if want := (EdgeReport{Frames: 50, PadFrames: 49, PadShortened: true, TransientFrames: 400 - 49}); rep != want {
		t.Errorf("report %+v, want %+v", rep, want)
	}
	want, _, _ := ZeroPhaseSlice(nil, x, sos, Config{Channels: 2}, ZeroPhaseOptions{PadFrames: 49})
	if d, at := maxAbsDiff(got, want); d != 0 {
		t.Errorf("differs from pad 49 by %g at %d", d, at)
	}
	sp, rep2 := spill(t, x, sos, Config{Channels: 2}, opt, 9)
	if d, _ := maxAbsDiff(sp, got); d != 0 || rep2 != rep {
		t.Errorf("spill: diff %g, report %+v", d, rep2)
	}
	// One frame: no pad at all, and the output is defined.
	one, rep, err := ZeroPhaseSlice(nil, []float64{0.5, -1}, sos, Config{Channels: 2}, opt)
	if err != nil || rep.PadFrames != 0 || math.IsNaN(one[0]) {
		t.Errorf("one frame: %v %+v %v", one, rep, err)
	}
	// No frames.
	if _, rep, err := ZeroPhaseSlice(nil, nil, sos, Config{Channels: 2}, opt); err != nil || rep.Frames != 0 {
		t.Errorf("empty: %+v %v", rep, err)
	}
}

// TestZeroPhaseTones: a 50 Hz hum with harmonics through a 50 Hz notch
// (scipy.signal.iirnotch(50, 5, fs=8000), from the reference file) and
// its 150 Hz twin. With the fitted tone extension the ends are clean;
// odd reflection leaves the notch ringing there.
func TestZeroPhaseTones(t *testing.T) {
	r := loadRefs(t)
	fs := r.Notch.Fs
	notch := r.Notch.Sections
	// The 150 Hz notch: the same design rotated, b = (1, -2cos w, 1)*g,
	// a = (1, -2 r cos w, r^2), r and g kept from the 50 Hz one.
	w3 := 2 * math.Pi * 150 / fs
	rad := math.Sqrt(notch[0][5])
	g := notch[0][0]
	sos := []design.Section{notch[0], {g, -2 * g * math.Cos(w3), g, 1, -2 * rad * math.Cos(w3), rad * rad}}
	const n = 16000
	x := make([]float64, n)
	for i := range x {
		tt := float64(i) / fs
		x[i] = 0.2 + math.Sin(2*math.Pi*50*tt+0.7) + 0.5*math.Sin(2*math.Pi*150*tt+2)
	}
	// Pole radius r = 0.996: the ringing decays as r^n, to 1e-5 over
	// the 3000-frame pad.
	base := ZeroPhaseOptions{PadFrames: 3000, DecayFrames: 3000}
	odd, _, err := ZeroPhaseSlice(nil, x, sos, Config{Channels: 1}, base)
	if err != nil {
		t.Fatal(err)
	}
	tones := base
	tones.Extension, tones.ToneHz, tones.SampleRateHz, tones.FitFrames = ExtendTones, []float64{50, 150}, fs, 1600
	clean, rep, err := ZeroPhaseSlice(nil, x, sos, Config{Channels: 1}, tones)
	if err != nil {
		t.Fatal(err)
	}
	if rep.FitFrames != 1600 || rep.TransientFrames != 0 {
		t.Errorf("report %+v", rep)
	}
	// Forward and backward, the notches pass DC at the squared gain
	// prod(sum b / sum a)^2; the hum should be gone, leaving that constant.
	dc := 0.2
	for _, s := range sos {
		h := (s[0] + s[1] + s[2]) / (s[3] + s[4] + s[5])
		dc *= h * h
	}
	resid := func(y []float64, from, to int) float64 {
		m := 0.0
		for _, v := range y[from:to] {
			m = max(m, math.Abs(v-dc))
		}
		return m
	}
	const edge = 400
	oddEnds := max(resid(odd, 0, edge), resid(odd, n-edge, n))
	cleanEnds := max(resid(clean, 0, edge), resid(clean, n-edge, n))
	// A pure sum of the fitted tones is extended exactly, so what is left
	// is the start-up ringing decayed over the pad, about 1e-5 of the hum
	// amplitude: 1e-4 allowed (common practice for a clean end).
	if cleanEnds > 1e-4 {
		t.Errorf("tone extension: hum left at the ends %g, want < 1e-4", cleanEnds)
	}
	if oddEnds < 100*cleanEnds || oddEnds < 1e-3 {
		t.Errorf("odd reflection left %g at the ends, tone extension %g: the test does not show the difference", oddEnds, cleanEnds)
	}
	sp, _ := spill(t, x, sos, Config{Channels: 1}, tones, 5)
	if d, _ := maxAbsDiff(sp, clean); d != 0 {
		t.Errorf("spill differs from in-memory by %g", d)
	}
}

type failSource struct{ err error }

func (f failSource) ReadFrames(dst []float64) (int, error) { return 0, f.err }

type failSink struct{}

func (failSink) WriteFrames([]float64) error { return errors.New("disk full") }

func TestZeroPhaseErrors(t *testing.T) {
	good := []design.Section{{1, 0, 0, 1, -0.5, 0.25}}
	cfg := Config{Channels: 1}
	for _, tc := range []struct {
		name string
		opt  ZeroPhaseOptions
	}{
		{"negative pad", ZeroPhaseOptions{PadFrames: -1}},
		{"negative block", ZeroPhaseOptions{BlockFrames: -1}},
		{"tone at nyquist", ZeroPhaseOptions{Extension: ExtendTones, ToneHz: []float64{4000}, SampleRateHz: 8000, FitFrames: 100}},
		{"no tones", ZeroPhaseOptions{Extension: ExtendTones, SampleRateHz: 8000, FitFrames: 100}},
		{"fit too short", ZeroPhaseOptions{Extension: ExtendTones, ToneHz: []float64{50, 100}, SampleRateHz: 8000, FitFrames: 4}},
		{"no rate", ZeroPhaseOptions{Extension: ExtendTones, ToneHz: []float64{50}, FitFrames: 100}},
		{"huge pad", ZeroPhaseOptions{PadFrames: 1 << 30}},
		{"unknown extension", ZeroPhaseOptions{Extension: 7}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, _, err := ZeroPhaseSlice(nil, []float64{1, 2, 3}, good, cfg, tc.opt); err == nil {
				t.Error("no error")
			}
		})
	}
	t.Run("signal shorter than the fit model", func(t *testing.T) {
		opt := ZeroPhaseOptions{Extension: ExtendTones, ToneHz: []float64{50, 100}, SampleRateHz: 8000, FitFrames: 100}
		if _, _, err := ZeroPhaseSlice(nil, []float64{1, 2, 3}, good, cfg, opt); err == nil {
			t.Error("no error")
		}
	})
	t.Run("source error", func(t *testing.T) {
		boom := errors.New("boom")
		_, err := ZeroPhase(&sliceSink{}, failSource{boom}, good, cfg, ZeroPhaseOptions{TempDir: t.TempDir()})
		if !errors.Is(err, boom) {
			t.Errorf("got %v, want it to wrap %v", err, boom)
		}
	})
	t.Run("sink error", func(t *testing.T) {
		src := &chunkSource{x: []float64{1, 2, 3}, ch: 1, rng: rand.New(rand.NewPCG(1, 1))}
		if _, err := ZeroPhase(failSink{}, src, good, cfg, ZeroPhaseOptions{TempDir: t.TempDir()}); err == nil {
			t.Error("no error")
		}
	})
	t.Run("bad temp dir", func(t *testing.T) {
		src := &chunkSource{x: []float64{1, 2, 3}, ch: 1, rng: rand.New(rand.NewPCG(1, 1))}
		if _, err := ZeroPhase(&sliceSink{}, src, good, cfg, ZeroPhaseOptions{TempDir: "/nonexistent/dir", SpillMemoryBytes: -1}); err == nil {
			t.Error("no error")
		}
	})
}

// BenchmarkZeroPhaseEllip8 runs the order-8 elliptic high-pass forward
// and backward over 10 minutes of 48 kHz stereo, through the spill file
// and in memory, with a pad of 4800 frames, and reports M
// section-samples per second (both passes counted).
func BenchmarkZeroPhaseEllip8(b *testing.B) {
	r := loadRefs(b)
	sos := r.Cases[0].Sections
	x := benchSignal()
	opt := ZeroPhaseOptions{PadFrames: 4800}
	cfg := Config{Channels: 2}
	work := float64(2 * len(x) * len(sos))
	b.Run("spill", func(b *testing.B) { // 112 MiB in memory, the rest on disk
		opt := opt
		opt.TempDir = b.TempDir()
		for b.Loop() {
			if _, err := ZeroPhase(discard{}, &sliceSource{x: x, ch: 2}, sos, cfg, opt); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.N)*work/b.Elapsed().Seconds()/1e6, "Msecsamples/s")
	})
	b.Run("disk", func(b *testing.B) { // all of the spill on disk
		opt := opt
		opt.TempDir = b.TempDir()
		opt.SpillMemoryBytes = -1
		for b.Loop() {
			if _, err := ZeroPhase(discard{}, &sliceSource{x: x, ch: 2}, sos, cfg, opt); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.N)*work/b.Elapsed().Seconds()/1e6, "Msecsamples/s")
	})
	b.Run("memory", func(b *testing.B) {
		y := make([]float64, len(x))
		copy(y, x)
		for b.Loop() {
			if _, _, err := ZeroPhaseSlice(y, x, sos, cfg, opt); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.N)*work/b.Elapsed().Seconds()/1e6, "Msecsamples/s")
	})
}

type discard struct{}

func (discard) WriteFrames([]float64) error { return nil }
