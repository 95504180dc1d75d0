package analyze

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
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
	e, err := NewEstimator(Options{SampleRate: 8000, Segment: 1024, Overlap: 512, Window: Window{Kind: BlackmanHarris}})
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
