package design

import (
	"context"
	"fmt"
	"math"
	"sort"
)

// Filter is a chain of designed stages at one sample rate. The stages run
// in order; Sections gives the whole cascade.
type Filter struct {
	SampleRate float64
	ZeroPhase  bool
	Stages     []Designed
}

// Designed is one stage of a Filter.
type Designed struct {
	Spec     Stage // the stage as specified
	Family   string
	Response string // empty for a notch stage
	Form     string // FormOrder, FormTolerance or FormNotch
	Order    int    // prototype order; for a notch stage the number of notches

	ZPK      ZPK       // digital zeros, poles and gain: the source of truth
	Sections []Section // derived from ZPK, in the order they run

	// EdgesHz are the critical frequencies the stage was designed with, in
	// Hz (for the tolerance form, the natural frequencies found by the
	// order computation), as the digital filter realises them.
	EdgesHz []float64
	// Checks lists the designed response at each edge of the spec.
	Checks []Check
	// ExactEdge says which edge the tolerance form meets exactly
	// ("passband"); the margin is then at the stopband edge.
	ExactEdge string

	// Mask is the tolerance mask of a stage defined by a standard
	// (weighting, fractional-octave band), nil for the other families.
	Mask []MaskPoint
	// Weighting describes a weighting stage's design (nil otherwise).
	Weighting *WeightingInfo

	NotchHz          []float64 // centres of a notch stage
	NotchBandwidthHz []float64 // their -3 dB widths (of the effective response)

	notchGains []float64 // gain of each notch's own zpk
}

// Forms of a designed stage.
const (
	FormOrder     = "order"
	FormTolerance = "tolerance"
	FormNotch     = "notch"
	FormStandard  = "standard" // a curve defined by a standard (weighting)
)

// Check is the designed response at one frequency of the spec. The
// response is the effective one: squared in magnitude (doubled in dB)
// when the filter is zero-phase.
type Check struct {
	FrequencyHz float64
	Kind        string  // "passband", "stopband", "cutoff" or "notch-edge"
	DesignedDB  float64 // effective response in dB
	// LimitDB is the spec's bound: the lowest allowed response for a
	// passband edge, the highest for a stopband edge, and for a cutoff the
	// value that defines it (the family's nominal edge level).
	LimitDB  float64
	HasLimit bool
	// MarginDB is how far the design is inside the limit (negative: outside).
	// For a cutoff it is DesignedDB - LimitDB.
	MarginDB float64
	Exact    bool // met with no margin by construction
}

// Design designs every stage of spec at the given sample rate. Every
// critical frequency is pre-warped, so the digital filter's edges fall on
// the requested Hz. A spec that cannot be realised at this rate is an
// error; nothing is clamped.
func Design(spec Spec, rate float64) (*Filter, error) {
	return design(context.Background(), spec, rate)
}

func design(ctx context.Context, spec Spec, rate float64) (*Filter, error) {
	if !(rate > 0) || math.IsInf(rate, 0) {
		return nil, errorf(ErrInvalid, "invalid sample rate %g Hz: it must be positive and finite", rate)
	}
	if len(spec.Stages) == 0 {
		return nil, errorf(ErrInvalid, "invalid spec: no stages")
	}
	if len(spec.Stages) > MaxStages {
		return nil, errorf(ErrInvalid, "invalid spec: %d stages, more than the limit of %d; combine or remove stages", len(spec.Stages), MaxStages)
	}
	// The notch stages' sections are counted before anything is
	// designed, so that a chain of many large combs is refused at once.
	notches := 0
	for _, st := range spec.Stages {
		if st.Family == Notch && validate(st, rate) == nil {
			if c, _, err := notchCentres(st, rate); err == nil {
				notches += len(c)
			}
		}
	}
	if notches > MaxSections {
		return nil, errorf(ErrOrderLimit, "the notch stages need %d second-order sections at %g Hz, more than the limit of %d; set harmonics to fewer notches", notches, rate, MaxSections)
	}
	f := &Filter{SampleRate: rate, ZeroPhase: spec.ZeroPhase}
	for i, st := range spec.Stages {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("design: stopped before stage %d: %w", i+1, err)
		}
		d, err := designStage(ctx, st, rate, spec.ZeroPhase, f.Stages)
		if err != nil {
			if len(spec.Stages) > 1 {
				return nil, fmt.Errorf("stage %d: %w", i+1, err)
			}
			return nil, err
		}
		f.Stages = append(f.Stages, d)
	}
	return f, nil
}

// Sections returns the whole cascade in the order it runs.
func (f *Filter) Sections() []Section {
	var s []Section
	for _, st := range f.Stages {
		s = append(s, st.Sections...)
	}
	return s
}

// Response returns the complex frequency response of one pass of the
// chain at hz.
func (f *Filter) Response(hz float64) complex128 {
	w := 2 * math.Pi * hz / f.SampleRate
	h := complex(1, 0)
	for _, st := range f.Stages {
		h *= zpkAt(st.ZPK, w)
	}
	return h
}

// MagnitudeDB is the magnitude of one pass at hz in dB.
func (f *Filter) MagnitudeDB(hz float64) float64 {
	return db(f.Response(hz))
}

// EffectiveDB is the magnitude the signal sees, in dB: that of one pass,
// doubled when the filter runs forward and backward.
func (f *Filter) EffectiveDB(hz float64) float64 {
	if f.ZeroPhase {
		return 2 * f.MagnitudeDB(hz)
	}
	return f.MagnitudeDB(hz)
}

// Phase is the unwrapped phase of one pass at hz, in radians. It is
// continuous in hz except for jumps of pi at zeros on the unit circle.
// A zero-phase run has zero phase whatever this says.
func (f *Filter) Phase(hz float64) float64 {
	w := 2 * math.Pi * hz / f.SampleRate
	ph := 0.0
	for _, st := range f.Stages {
		ph += zpkPhase(st.ZPK, w)
	}
	return ph
}

// GroupDelay is the group delay of one pass at hz in seconds, computed
// from the poles and zeros (not by differencing the phase).
func (f *Filter) GroupDelay(hz float64) float64 {
	w := 2 * math.Pi * hz / f.SampleRate
	gd := 0.0
	for _, st := range f.Stages {
		gd += zpkGroupDelay(st.ZPK, w)
	}
	return gd / f.SampleRate
}

// MaxPoleRadius is the largest pole radius of the chain: the margin to
// instability is 1 minus it.
func (f *Filter) MaxPoleRadius() float64 {
	r := 0.0
	for _, st := range f.Stages {
		r = math.Max(r, maxRadius(st.ZPK.Poles))
	}
	return r
}

// DecaySamples returns the number of samples it takes a transient of the
// chain to die away by dB decibels: the larger of the time the slowest
// natural mode needs to decay that much, ln(10^(-dB/20)) / ln(r) for the
// largest pole radius r, and the time after which the impulse response
// stays below its peak by dB (simulated through the sections, for at most
// maxSamples samples, 0 meaning 2^22, and at most eight times the first
// figure). The first figure is what matters for hum notches, whose
// impulse response is small but rings for as long as their poles say.
func (f *Filter) DecaySamples(dB float64, maxSamples int) int {
	secs := f.Sections()
	r := f.MaxPoleRadius()
	est := 1
	if r > 0 && r < 1 {
		est = int(math.Ceil(math.Min(math.Log(math.Pow(10, -dB/20))/math.Log(r), 1<<40)))
	}
	// The simulation is bounded (maxSamples, or 2^22 samples by
	// default): past that the dominant-pole figure stands alone, which for
	// poles this close to the unit circle is the one that matters.
	limit := 8*est + 64
	if maxSamples <= 0 {
		maxSamples = 1 << 22
	}
	if limit > maxSamples || limit < 0 {
		limit = maxSamples
	}
	// And at most 2^26 section steps: a comb of hundreds of notches is
	// ruled by its poles, as the first figure says.
	limit = min(limit, max(1<<26/max(len(secs), 1), 1024))
	if est >= limit {
		return est // the simulation could not find a later sample
	}
	st := make([][2]float64, len(secs))
	thr, peak, last := 0.0, 0.0, 0
	for n := 0; n < limit; n++ {
		x := 0.0
		if n == 0 {
			x = 1
		}
		for i, s := range secs {
			// Transposed direct form II.
			y := s[0]*x + st[i][0]
			st[i][0] = s[1]*x - s[4]*y + st[i][1]
			st[i][1] = s[2]*x - s[5]*y
			x = y
		}
		a := math.Abs(x)
		if a > peak {
			peak = a
			thr = peak * math.Pow(10, -dB/20)
		}
		if a > thr {
			last = n
		}
	}
	return max(est, last+1)
}

// ThreeDBPointsHz lists the frequencies where the effective response
// crosses -3.0103 dB (half power), found on a log grid and refined by
// bisection. At most 16 are returned.
func (f *Filter) ThreeDBPointsHz() []float64 {
	level := 10 * math.Log10(0.5)
	g := logGrid(f.SampleRate, 4000)
	var out []float64
	prev := f.EffectiveDB(g[0]) - level
	for i := 1; i < len(g) && len(out) < 16; i++ {
		cur := f.EffectiveDB(g[i]) - level
		if (prev < 0) != (cur < 0) && !math.IsInf(prev, 0) && !math.IsInf(cur, 0) {
			lo, hi := g[i-1], g[i]
			flo := prev
			for k := 0; k < 100 && hi-lo > 1e-13*hi; k++ {
				mid := (lo + hi) / 2
				fm := f.EffectiveDB(mid) - level
				if (fm < 0) == (flo < 0) {
					lo, flo = mid, fm
				} else {
					hi = mid
				}
			}
			out = append(out, (lo+hi)/2)
		}
		prev = cur
	}
	return out
}

// PassbandGroupDelay returns the smallest and largest group delay (s) of
// one pass over the frequencies where the effective response is within
// 3.0103 dB of its peak.
func (f *Filter) PassbandGroupDelay() (lo, hi float64) {
	g := logGrid(f.SampleRate, 2000)
	peak := math.Inf(-1)
	mags := make([]float64, len(g))
	for i, hz := range g {
		mags[i] = f.EffectiveDB(hz)
		peak = math.Max(peak, mags[i])
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for i, hz := range g {
		if mags[i] >= peak-3.0103 {
			d := f.GroupDelay(hz)
			lo, hi = math.Min(lo, d), math.Max(hi, d)
		}
	}
	return lo, hi
}

// logGrid returns n log-spaced frequencies from 1e-5 of Nyquist to just
// below it.
func logGrid(rate float64, n int) []float64 {
	nyq := rate / 2
	a, b := math.Log(nyq*1e-5), math.Log(nyq*0.99999)
	g := make([]float64, n)
	for i := range g {
		g[i] = math.Exp(a + (b-a)*float64(i)/float64(n-1))
	}
	return g
}

func db(h complex128) float64 {
	return 20 * math.Log10(math.Max(math.Hypot(real(h), imag(h)), 1e-300))
}

// designStage designs one stage at rate through its row of the family
// table; before are the stages designed so far, for the section limit.
func designStage(ctx context.Context, st Stage, rate float64, zeroPhase bool, before []Designed) (Designed, error) {
	if err := validate(st, rate); err != nil {
		return Designed{}, err
	}
	fam, _ := lookupFamily(st.Family) // validate has found it
	d := Designed{Spec: st, Family: st.Family, Response: st.Response}
	passes := 1.0
	if zeroPhase {
		passes = 2
	}
	if err := fam.build(fam, &d, rate, passes); err != nil {
		return Designed{}, err
	}
	if r := maxRadius(d.ZPK.Poles); !(r < 1) {
		return Designed{}, errorf(ErrUnstable, "the %s design has a pole at radius %.15g, on or outside the unit circle: it would be unstable; lower the order or move the edges away from 0 Hz and Nyquist", st.Family, r)
	}
	if d.Sections == nil {
		d.Sections = ToSections(d.ZPK)
	}
	if err := countSections(before, len(d.Sections)); err != nil {
		return Designed{}, err
	}
	if err := ctx.Err(); err != nil {
		return Designed{}, fmt.Errorf("design: stopped: %w", err)
	}
	d.Checks = checks(d, rate, passes)
	return d, nil
}

// checks evaluates the designed stage at each edge of its spec.
func checks(d Designed, rate, passes float64) []Check {
	one := &Filter{SampleRate: rate, Stages: []Designed{d}}
	eff := func(hz float64) float64 { return passes * one.MagnitudeDB(hz) }
	st := d.Spec
	var out []Check
	switch d.Form {
	case FormTolerance:
		for _, hz := range st.PassbandHz {
			v := eff(hz)
			out = append(out, Check{FrequencyHz: hz, Kind: "passband", DesignedDB: v, LimitDB: -st.RippleDB, HasLimit: true, MarginDB: v + st.RippleDB, Exact: true})
		}
		for _, hz := range st.StopbandHz {
			v := eff(hz)
			out = append(out, Check{FrequencyHz: hz, Kind: "stopband", DesignedDB: v, LimitDB: -st.AttenuationDB, HasLimit: true, MarginDB: -st.AttenuationDB - v})
		}
	case FormOrder:
		fam, _ := lookupFamily(st.Family)
		nominal, ok := 0.0, false
		if fam.cutoffDB != nil {
			nominal, ok = fam.cutoffDB(st)
		}
		nominal *= passes
		for _, hz := range st.CutoffHz {
			v := eff(hz)
			c := Check{FrequencyHz: hz, Kind: "cutoff", DesignedDB: v}
			if ok {
				c.LimitDB, c.HasLimit, c.MarginDB, c.Exact = nominal, true, v-nominal, true
			}
			out = append(out, c)
		}
	case FormNotch:
		for i, c := range d.NotchHz {
			// The edges where the effective response is -3 dB: the roots of
			// tan(pi f1/rate) tan(pi f2/rate) = tan^2(pi c/rate), f2 - f1 = bw.
			// Each notch is checked on its own section: the width is a
			// property of each notch; in the chain, neighbours add a little.
			f1, f2 := notchEdges(c, d.NotchBandwidthHz[i], rate)
			own := ZPK{Zeros: d.ZPK.Zeros[2*i : 2*i+2], Poles: d.ZPK.Poles[2*i : 2*i+2], Gain: d.notchGains[i]}
			for _, hz := range []float64{f1, f2} {
				v := passes * db(zpkAt(own, 2*math.Pi*hz/rate))
				lim := 10 * math.Log10(0.5)
				out = append(out, Check{FrequencyHz: hz, Kind: "notch-edge", DesignedDB: v, LimitDB: lim, HasLimit: true, MarginDB: v - lim, Exact: true})
			}
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].FrequencyHz < out[j].FrequencyHz })
	return out
}

// notchEdges returns the -3 dB edges of a notch at c Hz, bw Hz wide.
func notchEdges(c, bw, rate float64) (float64, float64) {
	t0 := Prewarp(c, rate)
	g := func(f1 float64) float64 { return Prewarp(f1, rate)*Prewarp(f1+bw, rate) - t0*t0 }
	lo, hi := math.Max(0, c-bw), c
	for i := 0; i < 200 && hi-lo > 1e-14*c; i++ {
		mid := (lo + hi) / 2
		if g(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	f1 := (lo + hi) / 2
	return f1, f1 + bw
}
