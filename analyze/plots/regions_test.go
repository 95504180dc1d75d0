package plots

import (
	"math"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"gonum.org/v1/plot/plotter"
)

// TestToleranceRegions checks the forbidden rectangles against the spec
// given in each case: every expected corner is a frequency or level
// written in the case's Stage, or the plot bounds lo, hi, floor, ceil.
func TestToleranceRegions(t *testing.T) {
	const lo, hi, floor, ceil = 1, 23990, -140, 5
	const tol = 1e-12 // the corners are copies, not computed
	rect := func(kind string, x0, x1, y0, y1 float64) region {
		return region{Kind: kind, XYs: plotter.XYs{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}}
	}
	cases := []struct {
		name  string
		stage design.Stage
		want  []region
	}{
		{"lowpass", design.Stage{Family: design.Elliptic, Response: design.Lowpass,
			PassbandHz: design.Edges{1000}, StopbandHz: design.Edges{1500}, RippleDB: 0.5, AttenuationDB: 60},
			[]region{rect(regionPassband, lo, 1000, floor, -0.5), rect(regionStopband, 1500, hi, -60, ceil)}},
		{"highpass", design.Stage{Family: design.Chebyshev1, Response: design.Highpass,
			PassbandHz: design.Edges{100}, StopbandHz: design.Edges{40}, RippleDB: 1, AttenuationDB: 40},
			[]region{rect(regionPassband, 100, hi, floor, -1), rect(regionStopband, lo, 40, -40, ceil)}},
		{"bandpass", design.Stage{Family: design.Butterworth, Response: design.Bandpass,
			PassbandHz: design.Edges{300, 3000}, StopbandHz: design.Edges{150, 6000}, RippleDB: 3, AttenuationDB: 30},
			[]region{rect(regionPassband, 300, 3000, floor, -3),
				rect(regionStopband, lo, 150, -30, ceil), rect(regionStopband, 6000, hi, -30, ceil)}},
		{"bandstop", design.Stage{Family: design.Elliptic, Response: design.Bandstop,
			PassbandHz: design.Edges{1000, 4000}, StopbandHz: design.Edges{1800, 2400}, RippleDB: 0.5, AttenuationDB: 60},
			[]region{rect(regionPassband, lo, 1000, floor, -0.5), rect(regionPassband, 4000, hi, floor, -0.5),
				rect(regionStopband, 1800, 2400, -60, ceil)}},
		{"attenuation below the floor is clamped to it", design.Stage{Family: design.Chebyshev2, Response: design.Lowpass,
			PassbandHz: design.Edges{1000}, StopbandHz: design.Edges{1200}, RippleDB: 1, AttenuationDB: 200},
			[]region{rect(regionPassband, lo, 1000, floor, -1), rect(regionStopband, 1200, hi, floor, ceil)}},
		{"order form has none", design.Stage{Family: design.Butterworth, Response: design.Lowpass,
			Order: 4, CutoffHz: design.Edges{1000}}, nil},
		{"notch has none", design.Stage{Family: design.Notch, FundamentalHz: 50, BandwidthHz: 2}, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := toleranceRegions(tc.stage, lo, hi, floor, ceil)
			if len(got) != len(tc.want) {
				t.Fatalf("got %d regions %v, want %d", len(got), got, len(tc.want))
			}
			for i, w := range tc.want {
				g := got[i]
				if g.Kind != w.Kind || len(g.XYs) != len(w.XYs) {
					t.Fatalf("region %d is %s with %d corners, want %s with %d", i, g.Kind, len(g.XYs), w.Kind, len(w.XYs))
				}
				for j := range w.XYs {
					if math.Abs(g.XYs[j].X-w.XYs[j].X) > tol || math.Abs(g.XYs[j].Y-w.XYs[j].Y) > tol {
						t.Errorf("region %d (%s) corner %d = %v, want %v", i, g.Kind, j, g.XYs[j], w.XYs[j])
					}
				}
			}
		})
	}
}

// TestMagnitudeRange checks the dB range of the magnitude panel against
// the rule in magnitudeRange's comment, for specs whose numbers give the
// expected values directly.
func TestMagnitudeRange(t *testing.T) {
	cases := []struct {
		name       string
		spec       design.Spec
		wantFloor  float64
		wantCeilDB float64
	}{
		// attenuation_db 60: 60 + 40 below 0 dB.
		{"tolerance", testSpecs[1].spec, -100, 5},
		// No attenuation asked for: 80 + 40.
		{"order form", testSpecs[0].spec, -120, 5},
		// Order-form elliptic, 90 dB per pass run twice: 180 + 40, limited to 160.
		{"zero-phase order form", design.Spec{ZeroPhase: true, Stages: []design.Stage{{
			Family: design.Elliptic, Response: design.Lowpass, Order: 5, CutoffHz: design.Edges{1000},
			RippleDB: 0.1, AttenuationDB: 90}}}, -160, 5},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			f := mustDesign(t, tc.spec)
			s := newSweep(f)
			floor, ceil := magnitudeRange(f, s.magDB)
			if floor != tc.wantFloor || ceil != tc.wantCeilDB {
				t.Errorf("range %g..%g dB, want %g..%g", floor, ceil, tc.wantFloor, tc.wantCeilDB)
			}
		})
	}
}

// TestSweep checks the frequency grid: increasing, within the axis, from
// the decade at or below rate/1e5 to just below Nyquist, and holding the
// spec's edges.
func TestSweep(t *testing.T) {
	f := mustDesign(t, testSpecs[1].spec)
	s := newSweep(f)
	// 48000/1e5 = 0.48 Hz, whose decade starts at 0.1 Hz.
	const wantLo = 0.1
	if s.lo != wantLo || !(s.hi < rate/2) || s.hi < 0.999*rate/2 {
		t.Errorf("axis %g..%g Hz, want %g Hz to just below %g Hz", s.lo, s.hi, wantLo, rate/2.0)
	}
	if len(s.hz) < sweepPoints {
		t.Errorf("%d points, want at least %d", len(s.hz), sweepPoints)
	}
	for i := 1; i < len(s.hz); i++ {
		if !(s.hz[i] > s.hz[i-1]) {
			t.Fatalf("grid not increasing at %d: %g after %g", i, s.hz[i], s.hz[i-1])
		}
	}
	// The grid merges points closer than this, relative, so an edge may
	// be represented by a designed edge a rounding error away.
	const edgeTol = 1e-9
	// The edges of testSpecs[1].
	for _, hz := range []float64{1000, 1800, 2400, 4000} {
		found := false
		for _, g := range s.hz {
			found = found || math.Abs(g-hz) <= edgeTol*hz
		}
		if !found {
			t.Errorf("grid lacks the spec edge %g Hz", hz)
		}
	}
}

// TestClusterRoots checks the multiplicity count of coinciding roots.
func TestClusterRoots(t *testing.T) {
	rs := []complex128{-1, -1 + 1e-9, complex(0.5, 0.5), -1 - 1e-9i, complex(0.5, -0.5), -1 + 1e-3}
	got := clusterRoots(rs, coincide)
	// Three roots within 1e-6 of -1, one 1e-3 away, and a conjugate pair.
	want := []root{{-1, 3}, {complex(0.5, 0.5), 1}, {complex(0.5, -0.5), 1}, {-1 + 1e-3, 1}}
	if len(got) != len(want) {
		t.Fatalf("got %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("cluster %d = %v, want %v", i, got[i], want[i])
		}
	}
	// A Butterworth lowpass of order 4 has its 4 zeros at z = -1 (the
	// bilinear image of the analog zeros at infinity).
	f := mustDesign(t, testSpecs[0].spec)
	z := clusterRoots(f.Stages[0].ZPK.Zeros, coincide)
	if len(z) != 1 || z[0].n != 4 {
		t.Errorf("butterworth zeros cluster as %v, want 4 at -1", z)
	}
}
