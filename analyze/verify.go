package analyze

import (
	"fmt"
	"math"
	"math/bits"
	"math/cmplx"
	"sort"

	"github.com/wavsieve/wavsieve/design"
)

// This file measures what a filter did: the H1 transfer estimate from a
// filtering run's input to its output, read at the edges of the spec and at
// points inside each band, compared with the designed (effective) response
// and with the spec's limits. H1 = Pxy/Pxx rather than a ratio of output
// and input densities: noise added at the output (dither, quantisation) is
// uncorrelated with the input and averages out of Pxy, and the confidence
// region says how much of it is left.

// Verification constants. Each is a choice of this package, with its
// reason.
const (
	// VerifyLevel is the confidence level of the intervals that decide a
	// verdict. 0.99 rather than 0.95: a run has some thirty checks, and at
	// 0.95 one or two of a correct filter's would fall outside by chance.
	VerifyLevel = 0.99
	// VerifyTolDB is the allowance for what the confidence interval does
	// not cover: the response sloping across the resolution bandwidth
	// beyond the range taken into account, the window's leakage and the
	// chi-square and F approximations. A tenth of a dB, the smallest
	// passband ripple of the example specs (samples/specs).
	VerifyTolDB = 0.1
	// VerifySeeBelowDB is how far below the level a check must see (the
	// limit, or the designed response where there is no limit) the
	// measurement's noise radius must lie for the check to count as
	// measured: at 6 dB the interval at that level is bounded below.
	VerifySeeBelowDB = 6.0
	// VerifyMaxSpreadDB: a check without a limit whose designed response
	// changes by more than this within the resolution bandwidth (a notch
	// centre, a zero of the stopband) cannot be compared with a smoothed
	// measurement, and is reported unmeasurable.
	VerifyMaxSpreadDB = 6.0
	// VerifyDecayDB sizes the transients skipped at each end of a file, as
	// process sizes its zero-phase padding (80 dB, below the quantisation
	// of 16-bit audio relative to the signal).
	VerifyDecayDB = 80
	// VerifyFailCoherence is the least coherence at which a reading that
	// puts the gain above a limit or above the design fails the check.
	// Below it the output at that frequency is mostly noise uncorrelated
	// with the input, and the confidence region of H1 (derived for a
	// known coherence) is too optimistic: with no true transfer at all,
	// the estimated coherence of K independent segments exceeds c with
	// probability (1 - c)^(K-1) (Carter, Knapp & Nuttall, IEEE Trans.
	// Audio Electroacoust. 21, 1973; cited from memory), which at 0.15
	// and 29 segments is 1%, but at 0.5 under 1e-8. Such a reading is
	// reported unmeasurable instead.
	VerifyFailCoherence = 0.5
	// verifyEdgeGuardBins keeps an edge's measurement this many bins inside
	// its band, so that the main lobe of the Blackman-Harris window (four
	// bins each side of the centre; Harris 1978, table 1) stays in the band
	// where the limit applies.
	verifyEdgeGuardBins = 4
	// verifyTransitionBins is the number of bins wanted across the
	// narrowest transition band, so that leakage from the passband reaches
	// a stopband edge only through far sidelobes; verifyNotchBins across a
	// notch's width; verifyLowBins below the lowest check frequency.
	verifyTransitionBins = 32
	verifyNotchBins      = 8
	verifyLowBins        = 16
	// verifyDelayFactor: the segment is at least this many times the
	// largest group delay, so that the delay's bias of H1 (corrected, see
	// delayBias) stays small.
	verifyDelayFactor = 64
	// verifyMinSegments is the fewest segments a verification uses
	// (overlapped by half: about 2 x 16 degrees of freedom or more).
	verifyMinSegments = 16
	// Segment lengths: powers of two between these.
	verifyMinSegment = 256
	verifyMaxSegment = 1 << 20
)

// Verdicts of a check.
const (
	VerdictPass         = "pass"
	VerdictFail         = "fail"
	VerdictUnmeasurable = "unmeasurable"
)

// VerifyWindow is the window of verification estimates: the 4-term
// Blackman-Harris, whose sidelobes (-92 dB) keep the passband out of a
// deep stopband's bins.
var VerifyWindow = Window{Kind: BlackmanHarris}

// VerifyPoint is one frequency at which a filter is checked: an edge of
// the spec or a point inside a band.
type VerifyPoint struct {
	FrequencyHz float64
	// Kind is "passband-edge", "stopband-edge", "passband", "stopband",
	// "cutoff", "notch" or "notch-edge".
	Kind  string
	Stage int // index into Filter.Stages
	// Lo and Hi bound the band the point belongs to; the bin measured is
	// kept inside it.
	Lo, Hi float64
	// HasLimit says whether the spec bounds the response here: from
	// below (the passband, -ripple_db) or, with Upper, from above (the
	// stopband, -attenuation_db). Order-form and notch stages have no
	// limits: their checks compare with the design only.
	HasLimit bool
	LimitDB  float64
	Upper    bool
	// Edge is set for band edges: the bin is taken at least
	// verifyEdgeGuardBins inside the band.
	Edge bool
	// WidthHz is the width of the feature the point checks (a notch's
	// -3 dB width), or 0; a check without a limit whose feature is
	// narrower than two bins cannot be resolved.
	WidthHz float64
}

// VerifyPoints lists the frequencies at which to check f: for a tolerance
// stage each passband and stopband edge, the lowest passband minimum (or a
// point inside the band) and the highest stopband maxima (or points inside
// the band); for an order-form stage each cutoff and points an octave or
// two into the passband and stopband; for a notch stage the first three
// notches and their -3 dB edges. Points outside (0, 0.95 fs/2) are left out.
func VerifyPoints(f *design.Filter) []VerifyPoint {
	nyq := f.SampleRate / 2
	top := 0.95 * nyq
	var pts []VerifyPoint
	add := func(p VerifyPoint) {
		if p.FrequencyHz > 0 && p.FrequencyHz < top {
			pts = append(pts, p)
		}
	}
	for si, st := range f.Stages {
		one := &design.Filter{SampleRate: f.SampleRate, ZeroPhase: f.ZeroPhase, Stages: []design.Designed{st}}
		switch st.Form {
		case design.FormTolerance:
			for _, r := range bandRegions(st.Response, st.Spec.PassbandHz, st.Spec.StopbandHz, nyq) {
				lim, upper, kind := -st.Spec.RippleDB, false, "passband"
				if !r.pass {
					lim, upper, kind = -st.Spec.AttenuationDB, true, "stopband"
				}
				base := VerifyPoint{Stage: si, Lo: r.lo, Hi: r.hi, HasLimit: true, LimitDB: lim, Upper: upper}
				if r.lo > 0 {
					p := base
					p.FrequencyHz, p.Kind, p.Edge = r.lo, kind+"-edge", true
					add(p)
				}
				if r.hi < nyq {
					p := base
					p.FrequencyHz, p.Kind, p.Edge = r.hi, kind+"-edge", true
					add(p)
				}
				n := 1
				if !r.pass {
					n = 2
				}
				for _, hz := range interior(one, r, top, n, !r.pass) {
					p := base
					p.FrequencyHz, p.Kind = hz, kind
					add(p)
				}
			}
		case design.FormOrder:
			c := st.Spec.CutoffHz
			for _, hz := range c {
				add(VerifyPoint{FrequencyHz: hz, Kind: "cutoff", Stage: si, Lo: 0, Hi: nyq})
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
				add(VerifyPoint{FrequencyHz: hz, Kind: "passband", Stage: si, Lo: 0, Hi: nyq})
			}
			for _, hz := range stop {
				add(VerifyPoint{FrequencyHz: hz, Kind: "stopband", Stage: si, Lo: 0, Hi: nyq})
			}
		case design.FormNotch:
			for i, c := range st.NotchHz {
				if i == 3 {
					break
				}
				add(VerifyPoint{FrequencyHz: c, Kind: "notch", Stage: si, Lo: 0, Hi: nyq, WidthHz: st.NotchBandwidthHz[i]})
			}
			n := 0
			for _, ch := range st.Checks {
				if ch.Kind == "notch-edge" && n < 6 {
					add(VerifyPoint{FrequencyHz: ch.FrequencyHz, Kind: "notch-edge", Stage: si, Lo: 0, Hi: nyq, WidthHz: st.NotchBandwidthHz[n/2]})
					n++
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

// interior picks n points inside r: the highest local maxima of the
// stage's response for a stopband (where the limit is closest), the lowest
// minima for a passband, completed by logarithmically spaced points.
func interior(one *design.Filter, r bandRegion, top float64, n int, maxima bool) []float64 {
	lo, hi := r.lo, math.Min(r.hi, top)
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

// VerifySkipFrames is the number of frames skipped at each end of a file
// before measuring: the time a transient of f takes to decay by
// VerifyDecayDB.
func VerifySkipFrames(f *design.Filter) int {
	return f.DecaySamples(VerifyDecayDB, 0)
}

// VerifySegment chooses the segment length for verifying f at pts over a
// signal of n frames: a power of two with verifyTransitionBins across the
// narrowest transition band, verifyNotchBins across a notch, verifyLowBins
// below the lowest point and verifyDelayFactor times the largest group
// delay at the points (causal runs), but no longer than leaves
// verifyMinSegments half-overlapped segments in n, and no shorter than
// 256. Checks that this length cannot resolve are reported as such; a
// signal of fewer than VerifyMinFrames(segment) frames is too short.
func VerifySegment(f *design.Filter, pts []VerifyPoint, n int64) int {
	fs := f.SampleRate
	want := float64(verifyMinSegment)
	for _, st := range f.Stages {
		switch st.Form {
		case design.FormTolerance:
			for i := range st.Spec.PassbandHz {
				if i < len(st.Spec.StopbandHz) {
					w := math.Abs(st.Spec.StopbandHz[i] - st.Spec.PassbandHz[i])
					want = math.Max(want, verifyTransitionBins*fs/w)
				}
			}
		case design.FormNotch:
			for _, bw := range st.NotchBandwidthHz {
				want = math.Max(want, verifyNotchBins*fs/bw)
			}
		}
	}
	for _, p := range pts {
		want = math.Max(want, verifyLowBins*fs/p.FrequencyHz)
		if !f.ZeroPhase {
			want = math.Max(want, verifyDelayFactor*math.Abs(f.GroupDelay(p.FrequencyHz))*fs)
		}
	}
	seg := ceilPow2(int64(math.Min(want, verifyMaxSegment)))
	limit := floorPow2(2 * n / (verifyMinSegments + 1))
	seg = min(seg, limit)
	return int(max(seg, verifyMinSegment))
}

// VerifyMinFrames is the shortest signal, after the skipped transients,
// that a verification with this segment length accepts: four
// half-overlapped segments.
func VerifyMinFrames(segment int) int64 { return int64(segment) * 5 / 2 }

func ceilPow2(v int64) int64 {
	if v <= 1 {
		return 1
	}
	return 1 << (64 - bits.LeadingZeros64(uint64(v-1)))
}

func floorPow2(v int64) int64 {
	if v < 1 {
		return 1
	}
	return 1 << (63 - bits.LeadingZeros64(uint64(v)))
}

// VerifyEstimator returns the estimator verification uses for a segment
// length at rate fs: Blackman-Harris, half overlap, mean removed, density,
// mean averaging (the confidence regions need it).
func VerifyEstimator(fs float64, segment int) (*Estimator, error) {
	return NewEstimator(Options{SampleRate: fs, Segment: segment, Overlap: segment / 2, Window: VerifyWindow, Detrend: DetrendMean, Scaling: Density, Average: Mean})
}

// CheckResult is the verdict of one check. Values that are not finite are
// written as null in JSON.
type CheckResult struct {
	Channel int `json:"channel"` // counted from 1
	Stage   int `json:"stage"`   // counted from 1
	// FrequencyHz is the centre of the bin measured; SpecHz the frequency
	// of the spec or design it stands for.
	FrequencyHz float64 `json:"frequency_hz"`
	SpecHz      float64 `json:"spec_hz"`
	Kind        string  `json:"kind"`
	// DesignedDB is the designed effective response of the whole chain at
	// FrequencyHz; ExpectedDB what H1 should read for it (see delayBias),
	// with ExpectedLowDB and ExpectedHighDB its range over the resolution
	// bandwidth.
	DesignedDB     *float64 `json:"designed_db"`
	ExpectedDB     *float64 `json:"expected_db"`
	ExpectedLowDB  *float64 `json:"expected_low_db"`
	ExpectedHighDB *float64 `json:"expected_high_db"`
	MeasuredDB     *float64 `json:"measured_db"`
	// LimitDB is the spec's bound at this frequency for the whole chain:
	// the stage's limit plus the other stages' designed response.
	// LimitSense is "at least" or "at most".
	LimitDB    *float64 `json:"limit_db"`
	LimitSense string   `json:"limit_sense,omitempty"`
	// MarginDB is how far the measurement is inside the limit, or without
	// a limit inside the expected range widened by VerifyTolDB (negative:
	// outside).
	MarginDB *float64 `json:"margin_db"`
	// CILowDB and CIHighDB bound the measured gain at ConfidenceLevel;
	// CILowDB is null when the region contains zero gain.
	CILowDB         *float64 `json:"ci_low_db"`
	CIHighDB        *float64 `json:"ci_high_db"`
	ConfidenceLevel float64  `json:"confidence_level"`
	// FloorDB is the measurement floor: the radius of the confidence
	// region as a gain, below which a gain cannot be told from none.
	FloorDB   *float64 `json:"floor_db"`
	Coherence *float64 `json:"coherence"`
	Verdict   string   `json:"verdict"`
	Reason    string   `json:"reason,omitempty"`
}

// Verify reads tr, an H1 estimate made by e from a run's input to its
// output (one channel), at each of pts and judges it against f.
//
// A check fails when its confidence interval lies, by more than
// VerifyTolDB, on the wrong side of the limit, or wholly outside the
// expected range. It is unmeasurable when it fails neither way but the
// measurement floor is within VerifySeeBelowDB of the level that matters
// (the limit, or the designed response without a limit), or when it has
// no limit and the design changes by more than VerifyMaxSpreadDB within
// the resolution. Otherwise it passes.
func Verify(f *design.Filter, e *Estimator, tr *Transfer, pts []VerifyPoint, channel int) []CheckResult {
	out := make([]CheckResult, 0, len(pts))
	o := e.Options()
	df := o.SampleRate / float64(o.Segment)
	win := o.Window.Coefficients(nil, o.Segment)
	nb := len(tr.Frequencies)
	for _, p := range pts {
		r := CheckResult{Channel: channel, Stage: p.Stage + 1, SpecHz: p.FrequencyHz, Kind: p.Kind, ConfidenceLevel: VerifyLevel}
		k := int(math.Round(p.FrequencyHz / df))
		if p.Edge {
			if p.FrequencyHz == p.Lo {
				k = int(math.Ceil(p.FrequencyHz/df)) + verifyEdgeGuardBins
			} else {
				k = int(math.Floor(p.FrequencyHz/df)) - verifyEdgeGuardBins
			}
		}
		k = max(1, min(k, nb-2))
		fm := tr.Frequencies[k]
		r.FrequencyHz = fm
		designed := f.EffectiveDB(fm)
		r.DesignedDB = num(designed)
		if fm < p.Lo || fm > p.Hi {
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("the band is narrower than the %.4g Hz resolution needs; a longer recording (or --probe) allows a longer segment", df*(2*verifyEdgeGuardBins+1))
			out = append(out, r)
			continue
		}
		if !p.HasLimit && p.WidthHz > 0 && p.WidthHz < 2*df {
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("the feature is %.3g Hz wide and the bins %.3g Hz apart; a longer recording (or --probe) allows a longer segment", p.WidthHz, df)
			out = append(out, r)
			continue
		}
		// The expected range runs from the response with the delay's bias
		// (see delayBias) to the response without it: the bias model holds
		// for a delay common to the band, not for the long but local delay
		// of a narrow resonance, whose H1 shows little of it.
		bias := delayBias(f, win, fm)
		exp := designed + bias
		lo, hi := exp, designed
		// The range over the window's half-power width, about a bin on
		// each side for Blackman-Harris (1.90 bins wide at -3 dB: Harris
		// 1978, table 1), clipped to (0, fs/2).
		for _, d := range []float64{-1, -0.5, 0.5, 1} {
			hz := fm + d*df
			if !(hz > 0 && hz < o.SampleRate/2) {
				continue
			}
			v := f.EffectiveDB(hz)
			lo, hi = math.Min(lo, v+bias), math.Max(hi, v)
		}
		r.ExpectedDB, r.ExpectedLowDB, r.ExpectedHighDB = num(exp), num(lo), num(hi)
		// H1 at a bin is the response averaged over the window's main lobe
		// (four bins each side for Blackman-Harris; Harris 1978, table 1),
		// weighted by the input's spectrum there: a strong input line where
		// the design dips (a hum notch beside a passband point) pulls the
		// reading toward the dip. lobeLo and lobeHi bound what the design
		// can make of the reading; a verdict that only the lobe could
		// explain is no verdict.
		lobeLo, lobeHi := lo, hi
		for d := -float64(verifyEdgeGuardBins); d <= verifyEdgeGuardBins; d += 0.25 {
			hz := fm + d*df
			if !(hz > 0 && hz < o.SampleRate/2) {
				continue
			}
			v := f.EffectiveDB(hz)
			lobeLo, lobeHi = math.Min(lobeLo, v+bias), math.Max(lobeHi, v)
		}
		// Zeros on or next to the unit circle (notches, elliptic stopband
		// zeros) are narrower than that grid: take them too.
		for _, st := range f.Stages {
			for _, z := range st.ZPK.Zeros {
				if cmplx.Abs(z) < 0.999 {
					continue
				}
				hz := math.Abs(cmplx.Phase(z)) * o.SampleRate / (2 * math.Pi)
				if math.Abs(hz-fm) <= verifyEdgeGuardBins*df && hz > 0 && hz < o.SampleRate/2 {
					lobeLo = math.Min(lobeLo, f.EffectiveDB(hz)+bias)
				}
			}
		}
		var lim float64
		if p.HasLimit {
			one := &design.Filter{SampleRate: f.SampleRate, ZeroPhase: f.ZeroPhase, Stages: []design.Designed{f.Stages[p.Stage]}}
			lim = p.LimitDB + designed - one.EffectiveDB(fm)
			r.LimitDB = num(lim)
			r.LimitSense = "at least"
			if p.Upper {
				r.LimitSense = "at most"
			}
		}
		tp, err := tr.At(fm, VerifyLevel)
		pxx := tr.Pxx[k]
		if !(pxx > 0) || math.IsNaN(tp.GainDB) {
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("the input has no energy at %.6g Hz", fm)
			out = append(out, r)
			continue
		}
		if err != nil {
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("no confidence region: %v", err)
			out = append(out, r)
			continue
		}
		m := tp.GainDB
		r.MeasuredDB, r.CILowDB, r.CIHighDB, r.Coherence = num(m), num(tp.GainLowDB), num(tp.GainHighDB), num(tp.Coherence)
		radius := math.Pow(10, tp.GainHighDB/20) - cmplx.Abs(tp.H)
		floor := 20 * math.Log10(radius)
		r.FloorDB = num(floor)
		ciLo, ciHi := tp.GainLowDB, tp.GainHighDB

		// fails collects what the reading shows conclusively; high holds
		// the claims that the gain is too high, which need coherence.
		var fails, high []string
		if ciHi < lo-VerifyTolDB {
			fails = append(fails, fmt.Sprintf("measured %.2f dB (%s) where the design gives %s", m, ciText(ciLo, ciHi), rangeText(lo, hi)))
		}
		if ciLo > hi+VerifyTolDB {
			high = append(high, fmt.Sprintf("measured %.2f dB (%s) where the design gives %s", m, ciText(ciLo, ciHi), rangeText(lo, hi)))
		}
		target := hi
		if p.HasLimit {
			target = lim
			if p.Upper {
				r.MarginDB = num(lim - m)
				if ciLo > lim+VerifyTolDB {
					high = append(high, fmt.Sprintf("above the limit of %.2f dB by %.2f dB beyond the interval", lim, ciLo-lim))
				}
			} else {
				r.MarginDB = num(m - lim)
				if ciHi < lim-VerifyTolDB {
					fails = append(fails, fmt.Sprintf("below the limit of %.2f dB by %.2f dB beyond the interval", lim, lim-ciHi))
				}
			}
		} else {
			r.MarginDB = num(math.Min(m-(lo-VerifyTolDB), (hi+VerifyTolDB)-m))
		}
		if tp.Coherence >= VerifyFailCoherence {
			fails = append(fails, high...)
		}
		// Only a deep feature in the lobe (beyond VerifyMaxSpreadDB of the
		// local range) can pull the reading that far; a smooth response
		// weighted by a smooth input spectrum reads close to its centre.
		deep := lobeLo < lo-VerifyMaxSpreadDB || lobeHi > hi+VerifyMaxSpreadDB
		pulled := deep && len(fails) > 0 && ciHi >= lobeLo-VerifyTolDB && ciLo <= lobeHi+VerifyTolDB
		switch {
		case pulled:
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("not measurable at this resolution: within the window's main lobe (%.4g Hz each side) the design spans %s, and the input's energy there can pull the reading (%.2f dB) anywhere in that range; a longer recording (or --probe) allows a longer segment", verifyEdgeGuardBins*df, rangeText(lobeLo, lobeHi), m)
		case len(fails) > 0:
			r.Verdict = VerdictFail
			r.Reason = joinReasons(fails)
		case len(high) > 0:
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("not measurable below %.1f dB: the reading (%.2f dB) lies above the design or the limit, but at coherence %.3g the output here is mostly noise uncorrelated with the input, and such a reading can come from noise alone", math.Max(floor, m), m, tp.Coherence)
		case floor > target-VerifySeeBelowDB:
			r.Verdict = VerdictUnmeasurable
			nout := tr.Pyy[k] * math.Max(0, 1-tp.Coherence)
			r.Reason = fmt.Sprintf("not measurable below %.1f dB: the input's density here (%.1f dBFS²/Hz) is too low against the output's uncorrelated floor (%.1f dBFS²/Hz; coherence %.3g)", floor, 10*math.Log10(pxx), 10*math.Log10(nout), tp.Coherence)
		case !p.HasLimit && hi-lo > VerifyMaxSpreadDB:
			r.Verdict = VerdictUnmeasurable
			r.Reason = fmt.Sprintf("the design changes by %.1f dB within the %.3g Hz resolution here; a longer recording (or --probe) allows a longer segment", hi-lo, 2*df)
		default:
			r.Verdict = VerdictPass
		}
		out = append(out, r)
	}
	return out
}

// delayBias is what a causal filter's delay does to H1 in dB: a segment
// of the output holds the response to input partly outside the segment of
// the input, and E[Pxy] is scaled by the window's normalised
// autocorrelation at the delay, sum w[n] w[n+d] / sum w[n]^2 (the
// time-delay bias of Welch cross spectra: Bendat & Piersol, "Random
// Data", 4th ed., 2010, sec. 9.1.4, cited from memory). The delay is the
// group delay at hz, linearly interpolated between whole samples; zero for
// a zero-phase run.
func delayBias(f *design.Filter, w []float64, hz float64) float64 {
	if f.ZeroPhase {
		return 0
	}
	d := math.Abs(f.GroupDelay(hz) * f.SampleRate)
	if !(d > 0) || math.IsInf(d, 0) {
		return 0
	}
	n := len(w)
	i := int(d)
	if i >= n-1 {
		return math.Inf(-1)
	}
	corr := func(m int) float64 {
		var s float64
		for t := 0; t+m < n; t++ {
			s += w[t] * w[t+m]
		}
		return s
	}
	r0 := corr(0)
	fr := d - float64(i)
	rho := ((1-fr)*corr(i) + fr*corr(i+1)) / r0
	return 20 * math.Log10(rho)
}

func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func ciText(lo, hi float64) string {
	if math.IsInf(lo, -1) {
		return fmt.Sprintf("interval up to %.2f", hi)
	}
	return fmt.Sprintf("interval %.2f to %.2f", lo, hi)
}

func rangeText(lo, hi float64) string {
	if hi-lo < 0.01 {
		return fmt.Sprintf("%.2f dB", (lo+hi)/2)
	}
	return fmt.Sprintf("%.2f to %.2f dB", lo, hi)
}

func joinReasons(r []string) string {
	s := r[0]
	for _, x := range r[1:] {
		s += "; " + x
	}
	return s
}

// Accumulator averages Welch estimates of several channels over a signal
// delivered in pieces, so that a long file can be measured without holding
// it in memory. The result equals one call over the whole signal (to
// rounding): the pieces are buffered, whole segments are averaged a chunk
// at a time, and the overlap between chunks is kept, so every segment the
// whole signal has is used once. It needs mean averaging (a median needs
// all the segments at once).
type Accumulator struct {
	e      *Estimator
	cross  bool
	chunk  int
	bx, by [][]float64
	sums   [][]float64 // per channel: xx, yy, re xy, im xy, summed over segments
	segs   int
}

// NewAccumulator returns an accumulator of the auto spectra of channels
// channels, and with cross of the cross spectra with a second signal of as
// many channels. chunk is the number of samples per channel averaged at
// once (0: 2^21); the memory held is about 8 (chunk + Segment) bytes per
// channel and signal.
func (e *Estimator) NewAccumulator(channels int, cross bool, chunk int) (*Accumulator, error) {
	if e.opt.Average != Mean {
		return nil, fmt.Errorf("analyze: %w: averaging a signal in pieces needs mean averaging", ErrUnsupported)
	}
	if channels < 1 {
		return nil, fmt.Errorf("analyze: %w: no channels", ErrInvalidOption)
	}
	if chunk <= 0 {
		chunk = 1 << 21
	}
	chunk = max(chunk, 2*e.n)
	a := &Accumulator{e: e, cross: cross, chunk: chunk}
	a.bx = make([][]float64, channels)
	a.sums = make([][]float64, channels)
	if cross {
		a.by = make([][]float64, channels)
	}
	for c := range a.bx {
		a.bx[c] = make([]float64, 0, chunk+e.n)
		if cross {
			a.by[c] = make([]float64, 0, chunk+e.n)
		}
		a.sums[c] = make([]float64, 4*e.nbins)
	}
	return a, nil
}

// Add appends a piece of each channel (planar: x[c] is channel c), and of
// the second signal y when the accumulator has cross spectra (y is
// ignored otherwise). All pieces must have the same length. Add does not
// keep x or y.
func (a *Accumulator) Add(x, y [][]float64) error {
	if len(x) != len(a.bx) || a.cross && len(y) != len(a.bx) {
		return fmt.Errorf("analyze: %w: %d channels given to an accumulator of %d", ErrInvalidOption, len(x), len(a.bx))
	}
	n := len(x[0])
	for c := range x {
		if len(x[c]) != n || a.cross && len(y[c]) != n {
			return fmt.Errorf("analyze: %w: pieces of different lengths", ErrInvalidOption)
		}
	}
	for off := 0; off < n; {
		room := a.chunk + a.e.n - len(a.bx[0])
		take := min(room, n-off)
		for c := range x {
			a.bx[c] = append(a.bx[c], x[c][off:off+take]...)
			if a.cross {
				a.by[c] = append(a.by[c], y[c][off:off+take]...)
			}
		}
		off += take
		if len(a.bx[0]) >= a.chunk {
			a.flush()
		}
	}
	return nil
}

// flush averages the whole segments buffered and keeps the samples from
// the start of the first segment not yet used.
func (a *Accumulator) flush() {
	e := a.e
	k := e.Segments(len(a.bx[0]))
	if k == 0 {
		return
	}
	used := (k-1)*e.step + e.n
	nq := 1
	if a.cross {
		nq = 4
	}
	for c := range a.bx {
		var y []float64
		if a.cross {
			y = a.by[c][:used]
		}
		e.run(a.bx[c][:used], y)
		s := a.sums[c]
		for j := 0; j < nq*e.nbins; j++ {
			s[j] += float64(k) * e.out[j]
		}
		rest := copy(a.bx[c], a.bx[c][k*e.step:])
		a.bx[c] = a.bx[c][:rest]
		if a.cross {
			rest = copy(a.by[c], a.by[c][k*e.step:])
			a.by[c] = a.by[c][:rest]
		}
	}
	a.segs += k
}

// Segments returns the number of segments averaged so far, counting the
// buffered ones.
func (a *Accumulator) Segments() int {
	a.flush()
	return a.segs
}

// Samples returns the length of a signal with as many segments as have
// been averaged: what Estimator.Confidence and DegreesOfFreedom take.
func (a *Accumulator) Samples() int {
	k := a.Segments()
	if k == 0 {
		return 0
	}
	return (k-1)*a.e.step + a.e.n
}

// PSD returns the mean auto spectrum of channel c of the first signal.
func (a *Accumulator) PSD(c int) ([]float64, error) {
	if a.Segments() == 0 {
		return nil, fmt.Errorf("analyze: %w: %d segment samples needed", ErrShortSignal, a.e.n)
	}
	nb := a.e.nbins
	out := make([]float64, nb)
	inv := 1 / float64(a.segs)
	for k := range out {
		out[k] = a.sums[c][k] * inv
	}
	return out, nil
}

// Result returns the mean auto spectra of all channels of the first
// signal, as Estimator.Spectra would over the whole signal.
func (a *Accumulator) Result() (*Result, error) {
	n := a.Samples()
	if n == 0 {
		return nil, fmt.Errorf("analyze: %w: %d segment samples needed", ErrShortSignal, a.e.n)
	}
	o := a.e.opt
	bw := a.e.ENBW()
	r := &Result{
		SampleRate: o.SampleRate, Window: o.Window.String(), Segment: o.Segment, Overlap: o.Overlap,
		Scaling: o.Scaling.String(), Units: o.Scaling.Units(), Detrend: o.Detrend.String(), Average: o.Average.String(),
		Segments: a.segs, ENBWBins: bw.Bins, ENBWHz: bw.Hz, Frequencies: a.e.Frequencies(nil),
		Channels: make([][]float64, len(a.bx)),
	}
	r.DOF, _ = a.e.DegreesOfFreedom(n)
	for c := range a.bx {
		r.Channels[c], _ = a.PSD(c)
	}
	return r, nil
}

// Transfer returns the H1 estimate from channel c of the first signal to
// channel c of the second, as Estimator.Transfer would over the whole
// signals.
func (a *Accumulator) Transfer(c int) (*Transfer, error) {
	if !a.cross {
		return nil, fmt.Errorf("analyze: %w: the accumulator has no cross spectra", ErrInvalidOption)
	}
	n := a.Samples()
	if n == 0 {
		return nil, fmt.Errorf("analyze: %w: %d segment samples needed", ErrShortSignal, a.e.n)
	}
	e := a.e
	nb := e.nbins
	inv := 1 / float64(a.segs)
	s := a.sums[c]
	tr := &Transfer{
		SampleRate: e.opt.SampleRate, Frequencies: e.Frequencies(nil),
		Pxx: make([]float64, nb), Pyy: make([]float64, nb), Pxy: make([]complex128, nb),
		H: make([]complex128, nb), Coherence: make([]float64, nb),
		Segments: a.segs, evenLen: e.n%2 == 0,
	}
	for k := 0; k < nb; k++ {
		tr.Pxx[k] = s[k] * inv
		tr.Pyy[k] = s[nb+k] * inv
		pxy := complex(s[2*nb+k]*inv, s[3*nb+k]*inv)
		tr.Pxy[k] = pxy
		tr.H[k] = pxy / complex(tr.Pxx[k], 0)
		m := cmplx.Abs(pxy)
		tr.Coherence[k] = m * m / (tr.Pxx[k] * tr.Pyy[k])
	}
	tr.DOF, _ = e.DegreesOfFreedom(n)
	return tr, nil
}
