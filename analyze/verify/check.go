package verify

import (
	"encoding/json"
	"errors"
	"math"
	"sort"

	"github.com/wavsieve/wavsieve/design"
)

// Kinds of check.
const (
	KindPassbandEdge = "passband-edge" // a passband_hz value
	KindStopbandEdge = "stopband-edge" // a stopband_hz value
	KindCutoff       = "cutoff"        // a cutoff_hz value
	KindNotch        = "notch"         // a notch centre
	KindNotchEdge    = "notch-edge"    // a notch's -3 dB point
	KindPassband     = "passband"      // a point inside a passband
	KindStopband     = "stopband"      // a point inside a stopband
	KindMask         = "mask"          // a row of a standard's tolerance mask
)

// Decisive reports whether a check of this kind must be measured and pass
// for the run to pass.
func Decisive(kind string) bool {
	switch kind {
	case KindPassbandEdge, KindStopbandEdge, KindCutoff, KindNotch, KindMask:
		return true
	}
	return false
}

// Verdicts of a check (Pass, Fail, Unmeasurable) and of a run (Pass, Fail,
// Inconclusive).
const (
	Pass         = "pass"
	Fail         = "fail"
	Unmeasurable = "unmeasurable"
	Inconclusive = "inconclusive"
)

// Typed errors, so that a command can tell the cases apart.
var (
	// ErrInvalidOption is wrapped by errors about an option or argument
	// that can never be right.
	ErrInvalidOption = errors.New("invalid option")
	// ErrMismatch is wrapped when a run's input and output differ in rate,
	// channels or length: they are not one run.
	ErrMismatch = errors.New("input and output are not one run")
	// ErrUnknownLength is wrapped when a file's header does not give its
	// length.
	ErrUnknownLength = errors.New("length not known")
	// ErrProbeClipped is wrapped when a probe clipped in the output format.
	ErrProbeClipped = errors.New("probe clipped")
)

// Verification constants. Each is a choice of this package, with its
// reason.
const (
	// Level is the default confidence level of the intervals: 0.99 rather
	// than 0.95, since a run has tens of checks.
	Level = 0.99
	// ResolutionDB is how much the designed response may change across
	// the window's main lobe at a check: the segment length of each check
	// is the shortest that keeps the change below it. The interval is
	// widened by the change, so it is also the largest part of an interval
	// that comes from resolution rather than from noise.
	ResolutionDB = 0.5
	// TolDB allows for what neither the interval nor the resolution
	// covers (the chi-square and F approximations, far leakage): a tenth
	// of a dB, the smallest passband ripple of the example specs.
	TolDB = 0.1
	// SeeBelowDB is how far below the level that decides a check the
	// measurement's noise radius must lie for the check to count as
	// measured.
	SeeBelowDB = 6.0
	// FloorMarginDB: an input at most this far above its own quantisation
	// floor at a check frequency is taken as being at the floor (the floor
	// figure assumes white quantisation error; dither raises it by up to
	// 4.8 dB).
	FloorMarginDB = 6.0
	// NotchDepthDB is the depth a check compared with the design (a notch
	// centre, any point without a limit) must be shown to reach where the
	// design is deeper (a digital notch has its zero on the unit circle, so
	// its design is minus infinity): a reading at or below it agrees with
	// the design.
	NotchDepthDB = -100.0
	// FailCoherence is the least coherence at which a reading that puts
	// the gain above a limit or the design fails the check; below it the
	// output is mostly noise uncorrelated with the input, which alone can
	// make such a reading.
	FailCoherence = 0.5
	// MinSegments is the fewest half-overlapped segments a reading uses;
	// MaxSegments the most (beyond it the interval is narrow enough, and
	// the work stays bounded on long files).
	MinSegments = 8
	MaxSegments = 256
	// MinSegment and MaxSegment bound the segment lengths (powers of two).
	MinSegment = 256
	MaxSegment = 1 << 22
	// DecayDB sizes the transients skipped at each end of a recording.
	DecayDB = 80
	// lobeBins is the half-width of the Blackman-Harris main lobe in bins
	// (4-term, -92 dB: Harris, Proc. IEEE 66, 1978, table 1).
	lobeBins = 4
	// delayFactor: in a causal run the segment is at least this many times
	// the group delay, so that the delay's bias of H1 stays small.
	delayFactor = 64
)

// Point is one check of a filter, before any measurement.
type Point struct {
	Stage       int    // index into Filter.Stages
	Kind        string // KindPassbandEdge, ...
	FrequencyHz float64
	// LowerDB and UpperDB bound the stage's own effective response here
	// (-Inf, +Inf where the spec sets no bound). A check with neither is
	// compared with the design.
	LowerDB, UpperDB float64
	Label            string // a mask row's name
	Source           string // a mask row's standard and table
}

// HasLimit reports whether the spec or mask bounds the response at p.
func (p Point) HasLimit() bool { return !math.IsInf(p.LowerDB, -1) || !math.IsInf(p.UpperDB, 1) }

// Points lists the checks of f in order of frequency: for a stage with a
// tolerance mask, one per mask row below the Nyquist frequency; for a
// tolerance stage each passband and stopband edge at exactly its
// frequency, the deepest passband dip and the highest stopband peaks
// inside the bands; for an order stage each cutoff and points an octave
// or two into each band; for a notch stage every notch centre and its two
// -3 dB points.
func Points(f *design.Filter) []Point {
	nyq := f.SampleRate / 2
	var pts []Point
	add := func(p Point) {
		if p.FrequencyHz > 0 && p.FrequencyHz < nyq {
			pts = append(pts, p)
		}
	}
	free := func(si int, kind string, hz float64) Point {
		return Point{Stage: si, Kind: kind, FrequencyHz: hz, LowerDB: math.Inf(-1), UpperDB: math.Inf(1)}
	}
	for si, st := range f.Stages {
		if len(st.Mask) > 0 {
			for _, m := range st.Mask {
				add(Point{Stage: si, Kind: KindMask, FrequencyHz: m.FrequencyHz, LowerDB: m.LowerDB, UpperDB: m.UpperDB, Label: m.Label, Source: m.Source})
			}
			continue
		}
		one := &design.Filter{SampleRate: f.SampleRate, ZeroPhase: f.ZeroPhase, Stages: []design.Designed{st}}
		switch st.Form {
		case design.FormTolerance:
			for _, r := range bandRegions(st.Response, st.Spec.PassbandHz, st.Spec.StopbandHz, nyq) {
				base := free(si, KindPassband, 0)
				edge := KindPassbandEdge
				if r.pass {
					base.LowerDB = -st.Spec.RippleDB
				} else {
					base.Kind, edge, base.UpperDB = KindStopband, KindStopbandEdge, -st.Spec.AttenuationDB
				}
				for _, hz := range []float64{r.lo, r.hi} {
					if hz > 0 && hz < nyq {
						p := base
						p.Kind, p.FrequencyHz = edge, hz
						add(p)
					}
				}
				n := 1
				if !r.pass {
					n = 2
				}
				for _, hz := range interior(one, r, n, !r.pass) {
					p := base
					p.FrequencyHz = hz
					add(p)
				}
			}
		case design.FormOrder:
			c := st.Spec.CutoffHz
			for _, hz := range c {
				add(free(si, KindCutoff, hz))
			}
			var pass, stop []float64
			switch st.Response {
			case design.Lowpass:
				pass, stop = []float64{c[0] / 2, c[0] / 4}, []float64{2 * c[0], 4 * c[0]}
			case design.Highpass:
				pass, stop = []float64{2 * c[0], 4 * c[0]}, []float64{c[0] / 2, c[0] / 4}
			case design.Bandpass:
				pass, stop = []float64{math.Sqrt(c[0] * c[1])}, []float64{c[0] / 2, 2 * c[1]}
			case design.Bandstop:
				pass, stop = []float64{c[0] / 2, 2 * c[1]}, []float64{math.Sqrt(c[0] * c[1])}
			}
			for _, hz := range pass {
				add(free(si, KindPassband, hz))
			}
			for _, hz := range stop {
				add(free(si, KindStopband, hz))
			}
		case design.FormNotch:
			for _, c := range st.NotchHz {
				add(free(si, KindNotch, c))
			}
			for _, ch := range st.Checks {
				if ch.Kind == KindNotchEdge {
					add(free(si, KindNotchEdge, ch.FrequencyHz))
				}
			}
		}
	}
	sort.SliceStable(pts, func(i, j int) bool { return pts[i].FrequencyHz < pts[j].FrequencyHz })
	return pts
}

type bandRegion struct {
	lo, hi float64
	pass   bool
}

// bandRegions splits [0, nyq] into the pass and stop bands of a tolerance
// spec; the transition bands are left out.
func bandRegions(resp string, pb, sb design.Edges, nyq float64) []bandRegion {
	switch resp {
	case design.Lowpass:
		return []bandRegion{{0, pb[0], true}, {sb[0], nyq, false}}
	case design.Highpass:
		return []bandRegion{{0, sb[0], false}, {pb[0], nyq, true}}
	case design.Bandpass:
		return []bandRegion{{0, sb[0], false}, {pb[0], pb[1], true}, {sb[1], nyq, false}}
	case design.Bandstop:
		return []bandRegion{{0, pb[0], true}, {sb[0], sb[1], false}, {pb[1], nyq, true}}
	}
	return nil
}

// interior picks n points inside r (below 0.95 of Nyquist): the highest
// local maxima of the stage's response for a stopband (where the limit is
// closest), the lowest minima for a passband, completed by logarithmically
// spaced points.
func interior(one *design.Filter, r bandRegion, n int, maxima bool) []float64 {
	lo, hi := r.lo, math.Min(r.hi, 0.95*one.SampleRate/2)
	if lo <= 0 {
		lo = hi / 50
	}
	if !(hi > lo*1.05) {
		return nil
	}
	lo, hi = lo*1.02, hi/1.02
	const grid = 600
	hz := make([]float64, grid)
	v := make([]float64, grid)
	for i := range hz {
		hz[i] = lo * math.Pow(hi/lo, float64(i)/(grid-1))
		v[i] = one.EffectiveDB(hz[i])
		if !maxima {
			v[i] = -v[i]
		}
	}
	type ext struct{ hz, v float64 }
	var ex []ext
	for i := 1; i < grid-1; i++ {
		if v[i] > v[i-1] && v[i] >= v[i+1] {
			ex = append(ex, ext{hz[i], v[i]})
		}
	}
	sort.Slice(ex, func(i, j int) bool { return ex[i].v > ex[j].v })
	var out []float64
	for _, e := range ex {
		if len(out) < n {
			out = append(out, e.hz)
		}
	}
	for k := 1; len(out) < n && k <= n; k++ {
		out = append(out, lo*math.Pow(hi/lo, float64(k)/float64(n+1)))
	}
	return out
}

// Pair is a pair of dB values, [low, high], written to JSON with null for
// a value that is not finite (an interval open below writes [null, high]).
type Pair [2]float64

// MarshalJSON writes the pair with null for non-finite values.
func (p Pair) MarshalJSON() ([]byte, error) {
	return json.Marshal([2]*float64{num(p[0]), num(p[1])})
}

// UnmarshalJSON reads a pair written by MarshalJSON; null reads as -Inf
// for the low value and +Inf for the high one.
func (p *Pair) UnmarshalJSON(b []byte) error {
	var v [2]*float64
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	p[0], p[1] = math.Inf(-1), math.Inf(1)
	if v[0] != nil {
		p[0] = *v[0]
	}
	if v[1] != nil {
		p[1] = *v[1]
	}
	return nil
}

// Check is the verdict of one check on one channel. The JSON keys are a
// contract; a value that does not apply is null.
type Check struct {
	Channel     int     `json:"channel"` // counted from 1
	Stage       int     `json:"stage"`   // counted from 1
	Kind        string  `json:"kind"`
	FrequencyHz float64 `json:"frequency_hz"` // the check's exact frequency
	// DesignedDB is the designed effective response of the whole chain at
	// FrequencyHz; DesignRangeDB what the design gives across the
	// resolution of the reading (where the design is deeper than
	// NotchDepthDB and the check has no limit, down from NotchDepthDB), the
	// range a reading agreeing with the design lies in.
	DesignedDB    *float64 `json:"designed_db"`
	DesignRangeDB *Pair    `json:"design_range_db"`
	MeasuredDB    *float64 `json:"measured_db"`
	// IntervalDB bounds the response at FrequencyHz at ConfidenceLevel:
	// the H1 confidence region widened by the design's change across the
	// resolution.
	IntervalDB *Pair `json:"interval_db"`
	// LimitDB is the spec's or mask's bound for the whole chain (the
	// stage's limit plus the other stages' design) that decides the check;
	// null for a check compared with the design.
	LimitDB *float64 `json:"limit_db"`
	// MarginDB is how far the reading lies inside what decided the check
	// (the limit, or the design range widened by TolDB); >= 0 for a pass.
	MarginDB *float64 `json:"margin_db"`
	// Coherence of input and output at FrequencyHz, and the normalised
	// random error of the magnitude reading.
	Coherence   *float64 `json:"coherence"`
	RandomError *float64 `json:"random_error"`
	Verdict     string   `json:"verdict"`
	Reason      string   `json:"reason"`

	// Beyond the contract: the limits from below and from above (null or
	// left out where there is none), the mask row's label, the reading's
	// segment length, averages and resolution.
	LowerLimitDB *float64 `json:"lower_limit_db,omitempty"`
	UpperLimitDB *float64 `json:"upper_limit_db,omitempty"`
	Label        string   `json:"label,omitempty"`
	Segment      int      `json:"segment,omitempty"`
	Averages     int      `json:"averages,omitempty"`
	ResolutionHz *float64 `json:"resolution_hz,omitempty"`
	// TrackRangeHz is, for a centre of a tracking notch read along the
	// hum's track, the range of the track's fundamental over the frames
	// read (FrequencyHz is then the track's mean times the harmonic).
	TrackRangeHz []float64 `json:"track_range_hz,omitempty"`
}

// RunVerdict is the verdict over checks: Fail when any check failed, Pass
// when every decisive check (see Decisive) was measured and passed and
// there is at least one, Inconclusive otherwise.
func RunVerdict(checks []Check) string {
	decisive := 0
	open := false
	for _, c := range checks {
		if c.Verdict == Fail {
			return Fail
		}
		if Decisive(c.Kind) {
			decisive++
			if c.Verdict != Pass {
				open = true
			}
		}
	}
	if decisive == 0 || open {
		return Inconclusive
	}
	return Pass
}

// ExitCode is the exit status of a command reporting a run verdict: 0
// pass, 1 fail, 3 inconclusive.
func ExitCode(verdict string) int {
	switch verdict {
	case Pass:
		return 0
	case Fail:
		return 1
	}
	return 3
}

// RandomError is the normalised random error of a magnitude estimate from
// n averages at coherence g2:
//
//	eps = sqrt((1 - g2) / (2 n g2))
//
// (Bendat & Piersol, "Random Data", 4th ed., 2010, table 9.6, cited from
// memory; ISO 7626-2 Annex A works the example g2 = 0.8, n = 75 -> 4.08 %).
func RandomError(g2 float64, n int) float64 {
	if !(g2 > 0) || n < 1 {
		return math.Inf(1)
	}
	return math.Sqrt(math.Max(0, 1-g2) / (2 * float64(n) * g2))
}

func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}
