package verify

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

// exactRel is how close a check's frequency must be to its edge: the
// contract says 1e-6 relative; the plan copies the spec's value, so it is
// met exactly.
const exactRel = 1e-6

func TestRandomErrorISO7626(t *testing.T) {
	// ISO 7626-2:2015, Annex A, worked example: coherence 0.8 over 75
	// averages gives a normalised random error of 4.08 % (the formula is
	// Bendat & Piersol's, table 9.6).
	const want, tol = 0.0408, 0.00005
	if got := RandomError(0.8, 75); math.Abs(got-want) > tol {
		t.Fatalf("RandomError(0.8, 75) = %.5f, want %.4f", got, want)
	}
	if got := RandomError(1, 10); got != 0 {
		t.Fatalf("full coherence: %g, want 0", got)
	}
	if got := RandomError(0, 10); !math.IsInf(got, 1) {
		t.Fatalf("no coherence: %g, want +Inf", got)
	}
}

// randomToleranceSpec draws a tolerance stage whose edges lie below
// 0.4 of the rate.
func randomToleranceSpec(r *rand.Rand, rate float64) design.Stage {
	fams := []string{design.Butterworth, design.Chebyshev1, design.Chebyshev2, design.Elliptic}
	resps := []string{design.Lowpass, design.Highpass, design.Bandpass, design.Bandstop}
	st := design.Stage{Family: fams[r.IntN(len(fams))], Response: resps[r.IntN(len(resps))],
		RippleDB: 0.1 + r.Float64(), AttenuationDB: 30 + 40*r.Float64()}
	top := 0.4 * rate
	a := top * (0.05 + 0.3*r.Float64())
	w := 1.2 + 0.5*r.Float64() // edge ratio of the transition bands
	switch st.Response {
	case design.Lowpass:
		st.PassbandHz, st.StopbandHz = design.Edges{a}, design.Edges{a * w}
	case design.Highpass:
		st.PassbandHz, st.StopbandHz = design.Edges{a * w}, design.Edges{a}
	case design.Bandpass:
		st.StopbandHz, st.PassbandHz = design.Edges{a, a * w * w * w}, design.Edges{a * w, a * w * w}
	case design.Bandstop:
		st.PassbandHz, st.StopbandHz = design.Edges{a, a * w * w * w}, design.Edges{a * w, a * w * w}
	}
	return st
}

func TestPointsAtExactEdges(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 9))
	for _, rate := range []float64{8000, 12800, 44100, 48000, 96000} {
		for i := 0; i < 40; i++ {
			st := randomToleranceSpec(r, rate)
			f, err := design.Design(design.Spec{Stages: []design.Stage{st}, ZeroPhase: r.IntN(2) == 0}, rate)
			if err != nil {
				continue // an order above the limit: not this test's concern
			}
			pts := Points(f)
			// And through a session's result, as the JSON carries it (a
			// run too short to read gives every check, unmeasurable).
			s, err := NewSession(f, nil, 1, 1000, Options{})
			if err != nil {
				t.Fatal(err)
			}
			res := s.Result("in", "out", "test")
			if len(res.Checks) != len(pts) || res.Verdict != Inconclusive {
				t.Fatalf("%d checks for %d points, verdict %s", len(res.Checks), len(pts), res.Verdict)
			}
			for i, c := range res.Checks {
				if c.FrequencyHz != pts[i].FrequencyHz || c.Kind != pts[i].Kind || c.Verdict != Unmeasurable || c.Reason == "" {
					t.Fatalf("check %d: %+v for point %+v", i, c, pts[i])
				}
			}
			for _, e := range []struct {
				kind  string
				edges design.Edges
			}{{KindPassbandEdge, st.PassbandHz}, {KindStopbandEdge, st.StopbandHz}} {
				for _, hz := range e.edges {
					found := false
					for _, p := range pts {
						found = found || p.Kind == e.kind && math.Abs(p.FrequencyHz-hz) <= exactRel*hz
					}
					if !found {
						t.Fatalf("%g Hz, %+v: no %s check at %g Hz in %+v", rate, st, e.kind, hz, pts)
					}
				}
			}
		}
	}
}

func TestPointsFromMask(t *testing.T) {
	f, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Butterworth, Response: design.Highpass, Order: 2, CutoffHz: design.Edges{20}}}}, 48000)
	if err != nil {
		t.Fatal(err)
	}
	// A hand-built mask (invented rows; the limits of a real standard come
	// from its stage): the plan must take it instead of the spec's edges.
	f.Stages[0].Mask = []design.MaskPoint{
		{FrequencyHz: 31.5, Label: "31.5", TargetDB: 0, LowerDB: -1.5, UpperDB: 1.5},
		{FrequencyHz: 1000, Label: "1k", TargetDB: 0, LowerDB: -0.7, UpperDB: math.Inf(1)},
		{FrequencyHz: 30000, Label: "above Nyquist", LowerDB: math.Inf(-1), UpperDB: 0},
	}
	pts := Points(f)
	if len(pts) != 2 {
		t.Fatalf("%d points, want the 2 mask rows below Nyquist: %+v", len(pts), pts)
	}
	for i, want := range []struct {
		hz, lo, hi float64
		label      string
	}{{31.5, -1.5, 1.5, "31.5"}, {1000, -0.7, math.Inf(1), "1k"}} {
		p := pts[i]
		if p.Kind != KindMask || p.FrequencyHz != want.hz || p.LowerDB != want.lo || p.UpperDB != want.hi || p.Label != want.label {
			t.Errorf("point %d: %+v, want %+v", i, p, want)
		}
	}
}

func TestRunVerdict(t *testing.T) {
	c := func(kind, verdict string) Check { return Check{Kind: kind, Verdict: verdict} }
	cases := []struct {
		name   string
		checks []Check
		want   string
	}{
		{"every edge passed", []Check{c(KindPassbandEdge, Pass), c(KindStopbandEdge, Pass), c(KindStopband, Unmeasurable)}, Pass},
		{"an edge unmeasured", []Check{c(KindPassbandEdge, Pass), c(KindStopbandEdge, Unmeasurable)}, Inconclusive},
		{"a notch unmeasured", []Check{c(KindCutoff, Pass), c(KindNotch, Unmeasurable)}, Inconclusive},
		{"a mask row unmeasured", []Check{c(KindMask, Pass), c(KindMask, Unmeasurable)}, Inconclusive},
		{"an interior point failed", []Check{c(KindPassbandEdge, Pass), c(KindStopband, Fail)}, Fail},
		{"fail beats unmeasured", []Check{c(KindStopbandEdge, Unmeasurable), c(KindNotchEdge, Fail)}, Fail},
		{"no decisive check", []Check{c(KindStopband, Pass)}, Inconclusive},
		{"nothing", nil, Inconclusive},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := RunVerdict(tc.checks); got != tc.want {
				t.Fatalf("%s, want %s", got, tc.want)
			}
		})
	}
	for v, code := range map[string]int{Pass: 0, Fail: 1, Inconclusive: 3} {
		if ExitCode(v) != code {
			t.Errorf("ExitCode(%s) = %d, want %d", v, ExitCode(v), code)
		}
	}
}

func TestCheckJSONKeys(t *testing.T) {
	v := 1.5
	b, err := json.Marshal(Check{Channel: 1, Stage: 1, Kind: KindStopbandEdge, FrequencyHz: 1600, DesignedDB: &v,
		DesignRangeDB: &Pair{-61, -60}, IntervalDB: &Pair{math.Inf(-1), -70}, Verdict: Pass, Reason: "x"})
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]json.RawMessage
	json.Unmarshal(b, &m)
	for _, k := range []string{"channel", "stage", "kind", "frequency_hz", "designed_db", "design_range_db", "measured_db", "interval_db", "limit_db", "margin_db", "coherence", "random_error", "verdict", "reason"} {
		if _, ok := m[k]; !ok {
			t.Errorf("key %q missing: %s", k, b)
		}
	}
	if string(m["interval_db"]) != "[null,-70]" || string(m["measured_db"]) != "null" {
		t.Errorf("interval %s, measured %s: want [null,-70] and null", m["interval_db"], m["measured_db"])
	}
}
