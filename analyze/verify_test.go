package analyze

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
)

// accumulatorTol: chunked and whole-signal averages differ only by the
// order of the additions (sums of some hundred terms in float64).
const accumulatorTol = 1e-12

func noise(n int, rms float64, seed uint64) []float64 {
	r := rand.New(rand.NewPCG(seed, 7))
	x := make([]float64, n)
	for i := range x {
		x[i] = rms * r.NormFloat64()
	}
	return x
}

func TestAccumulatorMatchesWholeSignal(t *testing.T) {
	x := noise(50_001, 0.1, 1)
	y := noise(50_001, 0.1, 2)
	for i := range y {
		y[i] += 0.5 * x[i]
	}
	e, err := NewEstimator(Options{SampleRate: 8000, Segment: 1024, Overlap: 512, Window: VerifyWindow})
	if err != nil {
		t.Fatal(err)
	}
	want, err := e.Transfer(x, y)
	if err != nil {
		t.Fatal(err)
	}
	wantPSD, _ := e.PSD(nil, x)
	for _, piece := range []int{1, 777, 3000, 50_001} {
		a, err := e.NewAccumulator(1, true, 3000)
		if err != nil {
			t.Fatal(err)
		}
		for off := 0; off < len(x); off += piece {
			end := min(off+piece, len(x))
			a.Add([][]float64{x[off:end]}, [][]float64{y[off:end]})
		}
		got, err := a.Transfer(0)
		if err != nil {
			t.Fatal(err)
		}
		if got.Segments != want.Segments || got.DOF != want.DOF {
			t.Fatalf("piece %d: %d segments, %g dof; want %d, %g", piece, got.Segments, got.DOF, want.Segments, want.DOF)
		}
		psd, _ := a.PSD(0)
		for k := range want.H {
			if d := cmplx.Abs(got.H[k] - want.H[k]); d > accumulatorTol*cmplx.Abs(want.H[k]) {
				t.Fatalf("piece %d bin %d: H %v, want %v", piece, k, got.H[k], want.H[k])
			}
			if d := math.Abs(psd[k] - wantPSD[k]); d > accumulatorTol*wantPSD[k] {
				t.Fatalf("piece %d bin %d: PSD %g, want %g", piece, k, psd[k], wantPSD[k])
			}
		}
	}
}

func TestAccumulatorRefusesMedian(t *testing.T) {
	e, _ := NewEstimator(Options{SampleRate: 8000, Segment: 256, Average: Median})
	if _, err := e.NewAccumulator(1, false, 0); err == nil {
		t.Fatal("median averaging in pieces was accepted")
	}
}

// quantise16 rounds to 16-bit steps with TPDF dither of 2 LSB peak to
// peak, as process/wavio's writer does by default.
func quantise16(x []float64, seed uint64) []float64 {
	r := rand.New(rand.NewPCG(seed, 9))
	const lsb = 1.0 / 32768
	out := make([]float64, len(x))
	for i, v := range x {
		d := (r.Float64() - r.Float64()) * lsb
		out[i] = math.Round((v+d)/lsb) * lsb
	}
	return out
}

func mustDesign(t *testing.T, sp design.Spec, rate float64) *design.Filter {
	t.Helper()
	f, err := design.Design(sp, rate)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

func filterWith(t *testing.T, f *design.Filter, x []float64) []float64 {
	t.Helper()
	if f.ZeroPhase {
		d := f.DecaySamples(VerifyDecayDB, 0)
		y, _, err := process.ZeroPhaseSlice(nil, x, f.Sections(), process.Config{Channels: 1}, process.ZeroPhaseOptions{PadFrames: d, DecayFrames: d})
		if err != nil {
			t.Fatal(err)
		}
		return y
	}
	c, err := process.NewCascade(f.Sections(), process.Config{Channels: 1})
	if err != nil {
		t.Fatal(err)
	}
	return c.Process(nil, x)
}

// verifyRun measures y against x for filter f as the verify command does:
// skip the transients, choose the segment, estimate H1, judge.
func verifyRun(t *testing.T, f *design.Filter, x, y []float64) []CheckResult {
	t.Helper()
	skip := VerifySkipFrames(f)
	x, y = x[skip:len(x)-skip], y[skip:len(y)-skip]
	pts := VerifyPoints(f)
	seg := VerifySegment(f, pts, int64(len(x)))
	e, err := VerifyEstimator(f.SampleRate, seg)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := e.Transfer(x, y)
	if err != nil {
		t.Fatal(err)
	}
	return Verify(f, e, tr, pts, 1)
}

func count(res []CheckResult) map[string]int {
	n := map[string]int{}
	for _, r := range res {
		n[r.Verdict]++
	}
	return n
}

func TestVerifyVerdicts(t *testing.T) {
	const rate = 8000
	// The spec under test: an elliptic low-pass, 0.5 dB to 1 kHz, 60 dB
	// from 1.3 kHz (the design's minimum order is 5 at 8 kHz).
	spec := design.Spec{Stages: []design.Stage{{Family: "elliptic", Response: "lowpass", PassbandHz: design.Edges{1000}, StopbandHz: design.Edges{1300}, RippleDB: 0.5, AttenuationDB: 60}}}
	right := mustDesign(t, spec, rate)
	order := right.Stages[0].Order
	lower := mustDesign(t, design.Spec{Stages: []design.Stage{{Family: "elliptic", Response: "lowpass", Order: order - 1, CutoffHz: design.Edges{1000}, RippleDB: 0.5, AttenuationDB: 60}}}, rate)
	shifted := mustDesign(t, design.Spec{Stages: []design.Stage{{Family: "elliptic", Response: "lowpass", PassbandHz: design.Edges{1100}, StopbandHz: design.Edges{1400}, RippleDB: 0.5, AttenuationDB: 60}}}, rate)
	// 0.1 FS rms white noise: -20 dBFS, peaks below full scale.
	x := quantise16(noise(1<<17, 0.1, 11), 12)

	t.Run("right filter passes", func(t *testing.T) {
		res := verifyRun(t, right, x, quantise16(filterWith(t, right, x), 13))
		n := count(res)
		if n[VerdictPass] != len(res) || len(res) < 5 {
			t.Fatalf("verdicts %v: %+v", n, describeChecks(res))
		}
	})
	t.Run("lower order fails", func(t *testing.T) {
		res := verifyRun(t, right, x, quantise16(filterWith(t, lower, x), 13))
		if !failsAt(res, "stopband-edge") {
			t.Fatalf("no failed stopband edge: %+v", describeChecks(res))
		}
	})
	t.Run("shifted cutoff fails", func(t *testing.T) {
		res := verifyRun(t, right, x, quantise16(filterWith(t, shifted, x), 13))
		if !failsAt(res, "stopband-edge") {
			t.Fatalf("no failed stopband edge: %+v", describeChecks(res))
		}
	})
	t.Run("no input energy in the stopband is unmeasurable", func(t *testing.T) {
		// The input itself low-passed to 1.4 kHz with 100 dB beyond
		// 1.5 kHz, then quantised: above 1.5 kHz it holds only dither.
		pre := mustDesign(t, design.Spec{Stages: []design.Stage{{Family: "elliptic", Response: "lowpass", PassbandHz: design.Edges{1400}, StopbandHz: design.Edges{1500}, RippleDB: 0.1, AttenuationDB: 100}}}, rate)
		xin := quantise16(filterWith(t, pre, noise(1<<17, 0.1, 11)), 14)
		res := verifyRun(t, right, xin, quantise16(filterWith(t, right, xin), 13))
		n := count(res)
		if n[VerdictFail] != 0 {
			t.Fatalf("verdicts %v: %+v", n, describeChecks(res))
		}
		for _, r := range res {
			if r.FrequencyHz > 1600 && r.Verdict != VerdictUnmeasurable {
				t.Errorf("%g Hz: %s, want unmeasurable (input has no energy there)", r.FrequencyHz, r.Verdict)
			}
			if r.Kind == "passband-edge" && r.Verdict != VerdictPass {
				t.Errorf("passband edge: %s (%s)", r.Verdict, r.Reason)
			}
		}
	})
	t.Run("stopband deeper than the 16-bit floor is unmeasurable", func(t *testing.T) {
		deep := mustDesign(t, design.Spec{Stages: []design.Stage{{Family: "elliptic", Response: "lowpass", PassbandHz: design.Edges{1000}, StopbandHz: design.Edges{1300}, RippleDB: 0.5, AttenuationDB: 130}}}, rate)
		res := verifyRun(t, deep, x, quantise16(filterWith(t, deep, x), 13))
		n := count(res)
		if n[VerdictFail] != 0 {
			t.Fatalf("verdicts %v: %+v", n, describeChecks(res))
		}
		for _, r := range res {
			// The floor: dither and rounding of 16 bits is LSB^2/4 over
			// fs/2 (-140 dBFS^2/Hz) against -63.8 dBFS^2/Hz of input, so
			// no better than about -76 dB before the statistics: far
			// above -130 dB.
			if r.Kind == "stopband-edge" || r.Kind == "stopband" {
				if r.Verdict != VerdictUnmeasurable || r.FloorDB == nil || *r.FloorDB < -130 {
					t.Errorf("%g Hz: %s, floor %v: want unmeasurable", r.FrequencyHz, r.Verdict, r.FloorDB)
				}
			}
		}
	})
}

func TestVerifyZeroPhaseDoubling(t *testing.T) {
	const rate = 8000
	st := design.Stage{Family: "butterworth", Response: "lowpass", Order: 4, CutoffHz: design.Edges{1000}}
	zp := mustDesign(t, design.Spec{Stages: []design.Stage{st}, ZeroPhase: true}, rate)
	causal := mustDesign(t, design.Spec{Stages: []design.Stage{st}}, rate)
	x := quantise16(noise(1<<16, 0.1, 21), 22)
	yzp := quantise16(filterWith(t, zp, x), 23)
	ycausal := quantise16(filterWith(t, causal, x), 23)
	cases := []struct {
		name     string
		as       *design.Filter
		y        []float64
		wantFail bool
	}{
		{"zero-phase output as zero-phase", zp, yzp, false},
		{"zero-phase output as causal", causal, yzp, true},
		{"causal output as causal", causal, ycausal, false},
		{"causal output as zero-phase", zp, ycausal, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res := verifyRun(t, c.as, x, c.y)
			cut := false
			for _, r := range res {
				if r.Kind != "cutoff" {
					continue
				}
				cut = true
				// Designed at the cutoff: -3.01 dB for one pass of a
				// Butterworth, -6.02 dB forward and backward. A definition:
				// |H|^2 = 1 / (1 + (f/fc)^2N) is 1/2 at fc, 10 log10(1/2) =
				// -3.0103 dB, doubled in dB by the second pass.
				want := -3.0103
				if c.as.ZeroPhase {
					want *= 2
				}
				if math.Abs(*r.DesignedDB-want) > 0.2 {
					t.Errorf("designed %.3f dB at %g Hz, want about %.3f", *r.DesignedDB, r.FrequencyHz, want)
				}
				if (r.Verdict == VerdictFail) != c.wantFail {
					t.Errorf("cutoff verdict %s (%s), want fail=%v", r.Verdict, r.Reason, c.wantFail)
				}
			}
			if !cut {
				t.Fatal("no cutoff check")
			}
			if n := count(res); !c.wantFail && n[VerdictFail] != 0 {
				t.Errorf("verdicts %v: %+v", n, describeChecks(res))
			}
		})
	}
}

func failsAt(res []CheckResult, kind string) bool {
	for _, r := range res {
		if r.Kind == kind && r.Verdict == VerdictFail {
			return true
		}
	}
	return false
}

func describeChecks(res []CheckResult) []string {
	var s []string
	f := func(p *float64) float64 {
		if p == nil {
			return math.NaN()
		}
		return *p
	}
	for _, r := range res {
		s = append(s, r.Kind+" "+ftoa(r.FrequencyHz)+" designed "+ftoa(f(r.DesignedDB))+" measured "+ftoa(f(r.MeasuredDB))+" floor "+ftoa(f(r.FloorDB))+" "+r.Verdict+" "+r.Reason)
	}
	return s
}

func ftoa(v float64) string { return fmtG(v) }

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', 5, 64) }

func TestVerifyNarrowNotchNotFailed(t *testing.T) {
	const rate = 8000
	// 2 Hz notches at 50, 100 and 150 Hz: a 2^14-frame signal gives bins
	// several Hz apart (too coarse), a 2^19-frame one fine enough.
	notch := mustDesign(t, design.Spec{Stages: []design.Stage{{Family: "notch", FundamentalHz: 50, Harmonics: 3, BandwidthHz: 2}}}, rate)
	for _, n := range []int{1 << 14, 1 << 19} {
		x := quantise16(noise(n+2*VerifySkipFrames(notch), 0.1, 31), 32)
		res := verifyRun(t, notch, x, quantise16(filterWith(t, notch, x), 33))
		c := count(res)
		if c[VerdictFail] != 0 {
			t.Fatalf("%d frames: verdicts %v: %v", n, c, describeChecks(res))
		}
		if n == 1<<19 && c[VerdictPass] < 6 {
			t.Fatalf("%d frames: the notch edges should be resolved: %v", n, describeChecks(res))
		}
	}
}
