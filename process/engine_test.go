package process

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

// engineRefs is testdata/engine/engine_refs.json, written by
// testdata/engine/gen_engine_refs.py (SciPy version in ScipyVersion).
type engineRefs struct {
	ScipyVersion string    `json:"scipy_version"`
	Fs           float64   `json:"fs"`
	Channels     int       `json:"channels"`
	Frames       int       `json:"frames"`
	Signal       []float64 `json:"signal"`
	Cases        []struct {
		Name       string           `json:"name"`
		Design     string           `json:"design"`
		Sections   []design.Section `json:"sections"`
		Padlen     int              `json:"padlen"`
		Sosfilt    []float64        `json:"sosfilt"`
		SosfiltZi  []float64        `json:"sosfilt_zi"`
		Filtfilt   []float64        `json:"sosfiltfilt_odd"`
		ZiUnit     [][2]float64     `json:"zi_unit"`
		ZiExact    [][2]float64     `json:"zi_exact"`
		DCGain     float64          `json:"dc_gain_exact"`
		SosfiltZiX []float64        `json:"sosfilt_zi_exact"`
	} `json:"cases"`
	Notch struct {
		Design   string           `json:"design"`
		Fs       float64          `json:"fs"`
		Sections []design.Section `json:"sections"`
	} `json:"notch"`
}

var (
	refsOnce sync.Once
	refs     engineRefs
	refsErr  error
)

func loadRefs(t testing.TB) *engineRefs {
	t.Helper()
	refsOnce.Do(func() {
		var b []byte
		b, refsErr = os.ReadFile(filepath.Join("..", "testdata", "engine", "engine_refs.json"))
		if refsErr == nil {
			refsErr = json.Unmarshal(b, &refs)
		}
	})
	if refsErr != nil {
		t.Fatal(refsErr)
	}
	return &refs
}

func rms(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s / float64(len(x)))
}

func maxAbsDiff(a, b []float64) (float64, int) {
	m, at := 0.0, -1
	for i := range a {
		if d := math.Abs(a[i] - b[i]); d > m || math.IsNaN(d) {
			m, at = d, i
		}
	}
	return m, at
}

// causalTol is the agreement asked of the causal output with
// scipy.signal.sosfilt, relative to the signal's RMS (project
// requirement; float64 rounding differences are ~1e-15).
const causalTol = 1e-12

func TestCascadeMatchesSciPy(t *testing.T) {
	r := loadRefs(t)
	tol := causalTol * rms(r.Signal)
	for _, tc := range r.Cases {
		t.Run(tc.Name, func(t *testing.T) {
			c, err := NewCascade(tc.Sections, Config{Channels: r.Channels})
			if err != nil {
				t.Fatal(err)
			}
			// Expected: scipy.signal.sosfilt(sos, x) per channel (SciPy r.ScipyVersion).
			got := c.Process(nil, r.Signal)
			if d, at := maxAbsDiff(got, tc.Sosfilt); d > tol {
				t.Errorf("sosfilt: max |diff| %g at %d, tolerance %g (SciPy %s)", d, at, tol, r.ScipyVersion)
			}

			cs, err := NewCascade(tc.Sections, Config{Channels: r.Channels, SteadyStart: true})
			if err != nil {
				t.Fatal(err)
			}
			got = cs.Process(nil, r.Signal)
			// Expected: scipy.signal.sosfilt(sos, x, zi=zi_exact*x[0]), zi_exact
			// the steady state solved in exact rational arithmetic by the
			// generator (SciPy r.ScipyVersion runs the filter).
			if d, at := maxAbsDiff(got, tc.SosfiltZiX); d > tol {
				t.Errorf("sosfilt with exact zi: max |diff| %g at %d, tolerance %g (SciPy %s)", d, at, tol, r.ScipyVersion)
			}
			// Expected: scipy.signal.sosfilt(sos, x, zi=sosfilt_zi(sos)*x[0]).
			// SciPy's float64 solve of the steady state is itself off by up to
			// ziErr (2.7e-12 relative on the 45-55 Hz bandstop); that error
			// starts the filter off the steady state and decays. Allowed: the
			// RMS tolerance plus ten times the state error times the largest
			// first sample (the margin of ten is common practice).
			ziErr, x0 := 0.0, math.Max(math.Abs(r.Signal[0]), math.Abs(r.Signal[1]))
			for s := range tc.ZiUnit {
				for k := 0; k < 2; k++ {
					ziErr = math.Max(ziErr, math.Abs(tc.ZiUnit[s][k]-tc.ZiExact[s][k]))
				}
			}
			if d, at := maxAbsDiff(got, tc.SosfiltZi); d > tol+10*ziErr*x0 {
				t.Errorf("sosfilt with sosfilt_zi: max |diff| %g at %d, tolerance %g (SciPy %s)", d, at, tol+10*ziErr*x0, r.ScipyVersion)
			}
			// Reset must start the steady state again from the next frame.
			cs.Reset()
			again := cs.Process(nil, r.Signal)
			if d, at := maxAbsDiff(again, got); d != 0 {
				t.Errorf("after Reset: output differs by %g at %d", d, at)
			}
		})
	}
}

func TestSteadyStateMatchesExact(t *testing.T) {
	r := loadRefs(t)
	// Expected: zi_exact, the systems of scipy.signal.lfilter_zi and
	// sosfilt_zi solved in exact rational arithmetic by
	// gen_engine_refs.py. Our float64 Cramer solve stays within a few
	// units in the last place of it: tolerance 16 u, u = 2^-53, relative
	// to the largest state of the filter (common practice).
	const tol = 16 * 0x1p-53
	for _, tc := range r.Cases {
		zi := steadyState(tc.Sections)
		scale := 0.0
		for _, z := range tc.ZiExact {
			scale = max(scale, math.Abs(z[0]), math.Abs(z[1]))
		}
		for s := range zi {
			for k := 0; k < 2; k++ {
				if d := math.Abs(zi[s][k] - tc.ZiExact[s][k]); d > tol*scale {
					t.Errorf("%s: zi[%d][%d] = %v, exact %v (scipy.signal.sosfilt_zi %s: %v)", tc.Name, s, k, zi[s][k], tc.ZiExact[s][k], r.ScipyVersion, tc.ZiUnit[s][k])
				}
			}
		}
	}
}

// TestCascadeChannelLayouts checks mono, a pair plus a single (three
// channels) and a selection against the per-channel SciPy output.
func TestCascadeChannelLayouts(t *testing.T) {
	r := loadRefs(t)
	tc := r.Cases[0]
	tol := causalTol * rms(r.Signal)
	n := r.Frames
	col := func(x []float64, k int) []float64 {
		out := make([]float64, n)
		for i := range out {
			out[i] = x[i*r.Channels+k]
		}
		return out
	}
	in0, in1 := col(r.Signal, 0), col(r.Signal, 1)
	want0, want1 := col(tc.Sosfilt, 0), col(tc.Sosfilt, 1) // scipy.signal.sosfilt per channel

	check := func(name string, got, want []float64) {
		t.Helper()
		if d, at := maxAbsDiff(got, want); d > tol {
			t.Errorf("%s: max |diff| %g at %d, tolerance %g", name, d, at, tol)
		}
	}
	t.Run("mono", func(t *testing.T) {
		c, err := NewCascade(tc.Sections, Config{Channels: 1})
		if err != nil {
			t.Fatal(err)
		}
		check("mono", c.Process(nil, in1), want1)
	})
	t.Run("three", func(t *testing.T) {
		x := make([]float64, 3*n)
		for i := 0; i < n; i++ {
			x[3*i], x[3*i+1], x[3*i+2] = in0[i], in1[i], in0[i]
		}
		c, err := NewCascade(tc.Sections, Config{Channels: 3})
		if err != nil {
			t.Fatal(err)
		}
		y := c.Process(x, x) // in place
		for k, want := range [][]float64{want0, want1, want0} {
			got := make([]float64, n)
			for i := range got {
				got[i] = y[3*i+k]
			}
			check("channel", got, want)
		}
	})
	t.Run("only", func(t *testing.T) {
		c, err := NewCascade(tc.Sections, Config{Channels: 2, Only: []int{1}})
		if err != nil {
			t.Fatal(err)
		}
		y := c.Process(nil, r.Signal)
		check("filtered channel 1", col(y, 1), want1)
		if d, at := maxAbsDiff(col(y, 0), in0); d != 0 {
			t.Errorf("channel 0 not passed through: diff %g at %d", d, at)
		}
	})
}

// TestCascadeBlockSize: random block sizes, in place and not, with and
// without the assembly kernel, all give the one-block output bit for bit.
func TestCascadeBlockSize(t *testing.T) {
	r := loadRefs(t)
	for _, tc := range r.Cases {
		for _, ch := range []int{1, 2, 3} {
			x := make([]float64, ch*r.Frames)
			for i := range x {
				x[i] = r.Signal[i%len(r.Signal)] * float64(1+i%ch)
			}
			whole, err := NewCascade(tc.Sections, Config{Channels: ch, SteadyStart: true})
			if err != nil {
				t.Fatal(err)
			}
			want := whole.Process(nil, x)
			rng := rand.New(rand.NewPCG(uint64(ch), 7))
			for _, wave := range []bool{true, false} {
				saved := useWave4
				useWave4 = useWave4 && wave
				c, _ := NewCascade(tc.Sections, Config{Channels: ch, SteadyStart: true})
				got := make([]float64, len(x))
				copy(got, x)
				for i := 0; i < r.Frames; {
					n := min(rng.IntN(40), r.Frames-i)
					p := got[i*ch : (i+n)*ch]
					if n%2 == 0 {
						c.Process(p, p)
					} else {
						c.Process(p, append([]float64(nil), p...))
					}
					i += n
				}
				useWave4 = saved
				if d, at := maxAbsDiff(got, want); d != 0 {
					t.Errorf("%s, %d channels, wave4 %v: differs by %g at %d", tc.Name, ch, wave, d, at)
				}
			}
		}
	}
}

// TestCascadeReverse: processReverse over reverse blocks of random
// length, with and without the assembly kernel, gives bit for bit what
// Process gives on the time-reversed frames.
func TestCascadeReverse(t *testing.T) {
	r := loadRefs(t)
	for _, tc := range r.Cases {
		for _, ch := range []int{1, 2, 3} {
			x := make([]float64, ch*r.Frames)
			for i := range x {
				x[i] = r.Signal[i%len(r.Signal)] * float64(1+i%ch)
			}
			rev := append([]float64(nil), x...)
			reverseFrames(rev, ch)
			whole, _ := NewCascade(tc.Sections, Config{Channels: ch, SteadyStart: true})
			want := whole.Process(nil, rev)
			reverseFrames(want, ch)
			rng := rand.New(rand.NewPCG(uint64(ch), 9))
			for _, wave := range []bool{true, false} {
				saved := useWave4
				useWave4 = useWave4 && wave
				c, _ := NewCascade(tc.Sections, Config{Channels: ch, SteadyStart: true})
				got := append([]float64(nil), x...)
				for end := r.Frames; end > 0; {
					start := max(0, end-rng.IntN(40))
					c.processReverse(got[start*ch : end*ch])
					end = start
				}
				useWave4 = saved
				if d, at := maxAbsDiff(got, want); d != 0 {
					t.Errorf("%s, %d channels, wave4 %v: differs by %g at %d", tc.Name, ch, wave, d, at)
				}
			}
		}
	}
}

// TestCascadeDCSteadyStart: with SteadyStart a constant input comes out
// constant from the first frame (no transient), at the DC gain.
func TestCascadeDCSteadyStart(t *testing.T) {
	r := loadRefs(t)
	const u = 0x1p-53 // unit roundoff of float64
	for _, tc := range r.Cases {
		// Rounding in y = b0 x + z1 and in the sums of b and a is amplified
		// by the cancellation in sum(b) and sum(a) for zeros or poles near
		// z = 1. Tolerance from the bound on the relative error of a sum,
		// (n-1) u sum|x_i| / |sum x_i| (Higham, Accuracy and Stability of
		// Numerical Algorithms, 2nd ed., eq. 4.3), summed over the
		// sections, with a factor 8 of margin (common practice).
		kappa := 0.0
		for _, s := range tc.Sections {
			kappa += (math.Abs(s[0]) + math.Abs(s[1]) + math.Abs(s[2])) / math.Abs(s[0]+s[1]+s[2])
			kappa += (1 + math.Abs(s[4]) + math.Abs(s[5])) / math.Abs(1+s[4]+s[5])
		}
		tol := 8 * 2 * u * kappa
		dc := []float64{0.75, -3}
		x := make([]float64, 2*4000)
		for i := range x {
			x[i] = dc[i%2]
		}
		c, _ := NewCascade(tc.Sections, Config{Channels: 2, SteadyStart: true})
		y := c.Process(nil, x)
		for i, v := range y {
			// Expected: dc_gain_exact (exact rational arithmetic in
			// gen_engine_refs.py) times the offset.
			// Errors are relative to the offset, the input level.
			want := tc.DCGain * dc[i%2]
			if d := math.Abs(v - want); d > tol*math.Abs(dc[i%2]) {
				t.Fatalf("%s: frame %d channel %d: %v, want %v (error %g of the offset, tolerance %g)", tc.Name, i/2, i%2, v, want, d/math.Abs(dc[i%2]), tol)
			}
			// No transient: the output stays at its first value within the
			// same rounding bound (a start from rest would be off by up to
			// the whole offset).
			if d := math.Abs(v - y[i%2]); d > tol*math.Abs(dc[i%2]) {
				t.Fatalf("%s: frame %d channel %d: %v drifts from the first output %v", tc.Name, i/2, i%2, v, y[i%2])
			}
		}
	}
}

func TestCascadeNoAllocs(t *testing.T) {
	r := loadRefs(t)
	c, _ := NewCascade(r.Cases[0].Sections, Config{Channels: 3, SteadyStart: true})
	x := make([]float64, 3*512)
	y := make([]float64, len(x))
	if n := testing.AllocsPerRun(20, func() { c.Process(y, x); c.Process(y, y) }); n != 0 {
		t.Errorf("Process allocates %v times per block, want 0", n)
	}
}

func TestCascadeErrors(t *testing.T) {
	good := design.Section{1, 0, 0, 1, -0.5, 0.25}
	cases := []struct {
		name string
		sos  []design.Section
		cfg  Config
	}{
		{"no sections", nil, Config{Channels: 1}},
		{"no channels", []design.Section{good}, Config{Channels: 0}},
		{"nan", []design.Section{{math.NaN(), 0, 0, 1, 0, 0}}, Config{Channels: 1}},
		{"a0 zero", []design.Section{{1, 0, 0, 0, 0, 0}}, Config{Channels: 1}},
		{"pole outside", []design.Section{{1, 0, 0, 1, 0, -1.2}}, Config{Channels: 1}},
		{"pole at z=1", []design.Section{{1, 0, 0, 1, -1, 0}}, Config{Channels: 1}},
		{"channel out of range", []design.Section{good}, Config{Channels: 2, Only: []int{2}}},
		{"channel twice", []design.Section{good}, Config{Channels: 2, Only: []int{1, 1}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c, err := NewCascade(tc.sos, tc.cfg)
			if err == nil || c != nil {
				t.Fatalf("NewCascade: got %v, %v; want an error", c, err)
			}
			if s := err.Error(); len(s) < 9 || s[:9] != "process: " {
				t.Errorf("error %q lacks the process: prefix", s)
			}
		})
	}
	// a0 != 1 is normalised: {2,0,0,2,-1,0.5} is {1,0,0,1,-0.5,0.25}.
	c1, _ := NewCascade([]design.Section{good}, Config{Channels: 1})
	c2, err := NewCascade([]design.Section{{2, 0, 0, 2, -1, 0.5}}, Config{Channels: 1})
	if err != nil {
		t.Fatal(err)
	}
	x := []float64{1, 0, 0, 2, -1, 0.5, 0.25}
	if d, _ := maxAbsDiff(c1.Process(nil, x), c2.Process(nil, x)); d != 0 {
		t.Errorf("a0 = 2 not normalised: differs by %g", d)
	}
}

// benchSignal is 10 minutes of 48 kHz stereo, interleaved (a 60 Hz and a
// 3 kHz tone plus a DC offset; the content does not change the speed).
var benchSignal = sync.OnceValue(func() []float64 {
	const frames = 10 * 60 * 48000
	x := make([]float64, 2*frames)
	for i := 0; i < frames; i++ {
		t := float64(i) / 48000
		x[2*i] = 0.1 + 0.5*math.Sin(2*math.Pi*60*t) + 0.2*math.Sin(2*math.Pi*3000*t)
		x[2*i+1] = -0.1 + 0.4*math.Sin(2*math.Pi*50*t+1) + 0.2*math.Sin(2*math.Pi*7000*t)
	}
	return x
})

// BenchmarkCascadeEllip8 runs the order-8 elliptic high-pass of the
// reference file (4 sections) over 10 minutes of 48 kHz stereo in blocks
// of 8192 frames and reports M section-samples per second: "copy" from
// one 10-minute array into another, "inplace" over one array, as a
// streaming caller that filters the reader's block in place does.
func BenchmarkCascadeEllip8(b *testing.B) {
	r := loadRefs(b)
	sos := r.Cases[0].Sections
	x := benchSignal()
	for _, inPlace := range []bool{false, true} {
		name := "copy"
		if inPlace {
			name = "inplace"
		}
		b.Run(name, func(b *testing.B) {
			y := make([]float64, len(x))
			copy(y, x) // fault the pages in before timing
			src := x
			if inPlace {
				src = y
			}
			c, _ := NewCascade(sos, Config{Channels: 2})
			const block = 2 * 8192
			for b.Loop() {
				c.Reset()
				for i := 0; i < len(x); i += block {
					j := min(i+block, len(x))
					c.Process(y[i:j], src[i:j])
				}
			}
			b.ReportMetric(float64(b.N)*float64(len(x)*len(sos))/b.Elapsed().Seconds()/1e6, "Msecsamples/s")
		})
	}
}
