package verify

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/dsp/fourier"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// window is the window of every reading: the 4-term Blackman-Harris, whose
// -92 dB sidelobes keep a passband out of a deep stopband's reading.
var window = analyze.Window{Kind: analyze.BlackmanHarris}

// bhTerms are the 4-term Blackman-Harris coefficients a0..a3 (Harris, Proc.
// IEEE 66, 1978, table 1 and eq. (33)), used for the window's transform.
var bhTerms = [4]float64{0.35875, 0.48829, 0.14128, 0.01168}

// toneDecayDB sizes the transients skipped in a tone probe: a reading 100
// dB down needs the start-up transient well below it.
const toneDecayDB = 140

// psdSegments is the most segments whose whole spectrum is taken for the
// leakage rule: it needs the shape of the input's spectrum, not a precise
// level, and the FFT of a long segment costs more than its readings.
// psdSamples bounds the samples so transformed for long segments (at
// least 4 segments are).
const (
	psdSegments = 32
	psdSamples  = 1 << 23
)

// zeroDB: a designed response below it is a zero on the unit circle
// evaluated with rounding error, and is written as minus infinity.
const zeroDB = -300

// Result is the verification of one run: its verdict, its checks and how
// they were read.
type Result struct {
	// Pass is true exactly when Verdict is Pass.
	Pass    bool    `json:"pass"`
	Verdict string  `json:"verdict"`
	Checks  []Check `json:"checks"`
	Input   string  `json:"input"`
	Output  string  `json:"output"`
	// Method says what was measured: "recording", "float64 output before
	// quantisation" (apply --verify), "tone probe" or "noise probe".
	Method          string  `json:"method"`
	SampleRate      int     `json:"sample_rate_hz"`
	ZeroPhase       bool    `json:"zero_phase"`
	Channels        []int   `json:"channels_checked"` // counted from 1
	Frames          int64   `json:"frames"`
	SkippedFrames   int64   `json:"skipped_frames_each_end"`
	Window          string  `json:"window"`
	ConfidenceLevel float64 `json:"confidence_level"`
	Passed          int     `json:"passed"`
	Failed          int     `json:"failed"`
	Unmeasurable    int     `json:"unmeasurable"`
	// Error says why a run could not be measured at all (apply --verify).
	Error string `json:"error,omitempty"`
	// TrackPerChannel is true when a tracking notch was read along each
	// channel's own track of the hum (Options.TrackPerChannel), rather
	// than along one track shared by all channels.
	TrackPerChannel bool `json:"track_per_channel,omitempty"`

	// Filter is the design the checks were judged against.
	Filter *design.Filter `json:"-"`
}

// Finish sets the counts and the verdict from the checks.
func (r *Result) Finish() {
	r.Passed, r.Failed, r.Unmeasurable = 0, 0, 0
	for _, c := range r.Checks {
		switch c.Verdict {
		case Pass:
			r.Passed++
		case Fail:
			r.Failed++
		default:
			r.Unmeasurable++
		}
	}
	r.Verdict = RunVerdict(r.Checks)
	if r.Error != "" && r.Verdict == Pass {
		r.Verdict = Inconclusive
	}
	r.Pass = r.Verdict == Pass
}

// plan is one point with the reading chosen for it.
type plan struct {
	p        Point
	designed float64 // chain's effective response at the point
	offset   float64 // chain minus the stage alone, for the limits
	seg      int     // segment length; 0 when no reading is possible
	group    int
	lo, hi   float64 // design range at the resolution
	widen    float64 // the design's change across the resolution
	omega    float64 // radians per sample
	reason   string  // why no reading is possible
	// harm, for a centre of a tracking notch, is its multiple of the
	// hum's fundamental: it is read along the track at harm * f(t).
	harm float64
}

type group struct {
	seg    int
	win    []float64
	sumW2  float64
	rho1   float64 // the window's correlation at half overlap
	enbw   float64 // equivalent noise bandwidth, bins
	plans  []int
	bx, by [][]float64
	start  int
	segs   int
	psd    [][]float64 // per channel, summed |FFT|^2 of the input (not for tones)
	fft    *fourier.FFT
	coef   []complex128
	wx, wy []float64
	// tracked groups read tracking-notch centres along the hum's track;
	// ph is the fundamental's phase, in radians, over the segment.
	tracked  bool
	ph       []float64
	absH     []float64 // design magnitude at the FFT bins, made when judging
	finished bool
	// allocated says the reading buffers are made (Session.allocate).
	allocated bool
}

type sums struct {
	xx, yy float64
	xy     complex128
	n      int
	side   float64 // tracked centres: the input's power sideBins away
}

// Session reads one run from its input and output frames fed in order.
type Session struct {
	f      *design.Filter
	o      Options
	fs     float64
	nc     int
	chans  []int
	skip   int64
	frames int64
	pos    int64
	plans  []plan
	groups []*group
	acc    [][]sums // [plan][checked channel]
	// windows holds the windows made, by length.
	windows map[int][]float64
	// tstage is the index of the tracking notch stage, -1 for none;
	// tracks its track(s), tmean the mean of each over the frames read.
	tstage int
	tracks []process.FrequencyTrack
	tmean  []float64
	tlo    []float64
	thi    []float64
}

// NewSession prepares the reading of a run of f over frames frames of
// channels channels: the checks pts (nil: Points(f)), each with its segment
// length, and the transients skipped at both ends. A run too short for a
// check is no error: the check comes out unmeasurable, with the length it
// needs.
func NewSession(f *design.Filter, pts []Point, channels int, frames int64, o Options) (*Session, error) {
	return newSession(f, pts, channels, frames, o, false)
}

// newSession is NewSession; with lazy set the reading buffers are made by
// allocate, so that the observer can take their memory from its budget
// first.
func newSession(f *design.Filter, pts []Point, channels int, frames int64, o Options, lazy bool) (*Session, error) {
	if err := o.validate(channels); err != nil {
		return nil, err
	}
	if pts == nil {
		pts = Points(f)
	}
	s := &Session{f: f, o: o, fs: f.SampleRate, nc: channels, frames: frames, tstage: -1}
	s.chans = o.Channels
	if len(s.chans) == 0 {
		for c := 0; c < channels; c++ {
			s.chans = append(s.chans, c)
		}
	}
	decay := float64(DecayDB)
	if o.Tone {
		decay = toneDecayDB
	}
	s.skip = int64(f.DecaySamples(decay, 0))
	usable := frames - 2*s.skip
	for i, st := range f.Stages {
		if st.Spec.Tracking && st.Form == design.FormNotch {
			s.tstage = i
			s.trackStats(o.Tracks)
			break
		}
	}
	bySeg := map[int]int{}
	for _, p := range pts {
		var pl plan
		if p.Stage == s.tstage {
			pl = s.planTracked(p, usable)
		} else {
			pl = s.planPoint(p, usable)
		}
		if pl.seg > 0 {
			key := pl.seg
			if pl.harm > 0 {
				key = -pl.seg
			}
			gi, ok := bySeg[key]
			if !ok {
				gi = len(s.groups)
				bySeg[key] = gi
				s.groups = append(s.groups, s.newGroup(pl.seg, pl.harm > 0))
			}
			pl.group = gi
			s.groups[gi].plans = append(s.groups[gi].plans, len(s.plans))
		}
		s.plans = append(s.plans, pl)
	}
	s.acc = make([][]sums, len(s.plans))
	for i := range s.acc {
		s.acc[i] = make([]sums, len(s.chans))
	}
	if lazy {
		s.fitBudget(ObserverMemory)
		// A window made while planning is made again by allocate,
		// within the budget.
		s.windows = nil
	} else {
		s.allocate()
	}
	return s, nil
}

// fitBudget drops the groups of the longest segments until the reading
// buffers fit in limit bytes: their checks come out unmeasurable, saying
// how much memory they need and how to measure them.
func (s *Session) fitBudget(limit int64) {
	for len(s.groups) > 0 && s.bufferBytes() > limit {
		gi := 0
		for i, g := range s.groups {
			if g.seg > s.groups[gi].seg {
				gi = i
			}
		}
		g := s.groups[gi]
		one := &Session{o: s.o, chans: s.chans, groups: []*group{g}}
		for _, pi := range g.plans {
			pl := &s.plans[pi]
			pl.seg, pl.group = 0, -1
			pl.reason = fmt.Sprintf("not measured during apply: its %d-sample segments need %d MiB, more than the %d MiB apply --verify holds for all files at once; wavsieve verify on this file reads it", g.seg, one.bufferBytes()>>20, limit>>20)
		}
		s.groups = append(s.groups[:gi], s.groups[gi+1:]...)
		for i := gi; i < len(s.groups); i++ {
			for _, pi := range s.groups[i].plans {
				s.plans[pi].group = i
			}
		}
	}
}

// allocate makes the reading buffers of every group (once).
func (s *Session) allocate() {
	for _, g := range s.groups {
		if g.allocated {
			continue
		}
		g.allocated = true
		g.setWindow(s.windowOf(g.seg))
		g.bx, g.by = make([][]float64, len(s.chans)), make([][]float64, len(s.chans))
		for i := range g.bx {
			g.bx[i] = make([]float64, 0, g.seg+g.seg/2)
			g.by[i] = make([]float64, 0, g.seg+g.seg/2)
		}
		g.wx, g.wy = make([]float64, g.seg), make([]float64, g.seg)
		if g.tracked {
			g.ph = make([]float64, g.seg)
		}
		if !s.o.Tone && !g.tracked {
			g.psd = make([][]float64, len(s.chans))
			for i := range g.psd {
				g.psd[i] = make([]float64, g.seg/2+1)
			}
			g.fft = fourier.NewFFT(g.seg)
			g.coef = make([]complex128, g.seg/2+1)
		}
	}
}

// bufferBytes is about the memory allocate takes: per group and checked
// channel two reading buffers of 1.5 segments and the summed spectrum;
// per group the window, the two windowed segments, the phase, the FFT's
// tables and its coefficients.
func (s *Session) bufferBytes() int64 {
	var b int64
	for _, g := range s.groups {
		seg := int64(g.seg)
		b += int64(len(s.chans)) * (3*seg + seg/2 + 1) * 8
		b += (4*seg + 4*seg + 2*(seg/2+1)) * 8
	}
	return b
}

// newGroup returns a group of segments of seg samples; its window and
// buffers are made by allocate.
func (s *Session) newGroup(seg int, tracked bool) *group {
	return &group{seg: seg, tracked: tracked}
}

// setWindow sets the group's window and the figures of it that the
// judging uses.
func (g *group) setWindow(win []float64) {
	seg := g.seg
	g.win, g.sumW2 = win, 0
	var c float64
	for t, w := range g.win {
		g.sumW2 += w * w
		if t+seg/2 < seg {
			c += w * g.win[t+seg/2]
		}
	}
	g.rho1 = c / g.sumW2
	var sw float64
	for _, w := range g.win {
		sw += w
	}
	g.enbw = float64(seg) * g.sumW2 / (sw * sw)
}

// windowOf returns the window of length seg, made once per session.
func (s *Session) windowOf(seg int) []float64 {
	if w, ok := s.windows[seg]; ok {
		return w
	}
	if s.windows == nil {
		s.windows = map[int][]float64{}
	}
	w := window.Coefficients(nil, seg)
	s.windows[seg] = w
	return w
}

// stageDB is the effective response of stage si alone.
func (s *Session) stageDB(si int, hz float64) float64 {
	one := &design.Filter{SampleRate: s.f.SampleRate, ZeroPhase: s.f.ZeroPhase, Stages: []design.Designed{s.f.Stages[si]}}
	return one.EffectiveDB(hz)
}

// designRange is the range of the chain's design across [hz-b, hz+b],
// with the zeros on or next to the unit circle in it.
func (s *Session) designRange(hz, b float64, deep bool) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	take := func(v float64) {
		if deep {
			v = math.Max(v, NotchDepthDB)
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	const n = 40
	for i := 0; i <= n; i++ {
		take(s.f.EffectiveDB(hz - b + 2*b*float64(i)/n))
	}
	for _, st := range s.f.Stages {
		for _, z := range st.ZPK.Zeros {
			if cmplx.Abs(z) < 0.999 {
				continue
			}
			zh := math.Abs(cmplx.Phase(z)) * s.fs / (2 * math.Pi)
			if math.Abs(zh-hz) <= b {
				take(s.f.EffectiveDB(zh))
			}
		}
	}
	return lo, hi
}

// delayBias is what a causal filter's delay does to H1 in dB: a segment of
// the output holds the response to input partly outside the segment of the
// input, and E[Pxy] is scaled by the window's normalised autocorrelation at
// the delay, sum w[n] w[n+d] / sum w[n]^2 (the time-delay bias of Welch
// cross spectra: Bendat & Piersol, "Random Data", 4th ed., 2010, sec.
// 9.1.4, cited from memory). Zero for a zero-phase run.
func (s *Session) delayBias(hz float64, seg int) float64 {
	if s.f.ZeroPhase {
		return 0
	}
	d := math.Abs(s.f.GroupDelay(hz) * s.fs)
	if !(d >= 1) || math.IsInf(d, 0) {
		return 0
	}
	if int(d) >= seg-1 {
		return math.Inf(-1)
	}
	w := s.windowOf(seg)
	corr := func(m int) float64 {
		var c float64
		for t := 0; t+m < seg; t++ {
			c += w[t] * w[t+m]
		}
		return c
	}
	i := int(d)
	fr := d - float64(i)
	return 20 * math.Log10(((1-fr)*corr(i)+fr*corr(i+1))/corr(0))
}

// framesFor is the run length a segment length needs: the transients and
// MinSegments half-overlapped segments.
func (s *Session) framesFor(seg int) int64 {
	return 2*s.skip + int64(seg)*(MinSegments+1)/2
}

func (s *Session) planPoint(p Point, usable int64) plan {
	pl := plan{p: p, omega: 2 * math.Pi * p.FrequencyHz / s.fs}
	pl.designed = s.f.EffectiveDB(p.FrequencyHz)
	pl.offset = pl.designed - s.stageDB(p.Stage, p.FrequencyHz)
	if pl.designed < zeroDB {
		pl.designed = math.Inf(-1) // a zero on the unit circle, to rounding
	}
	// A check compared with the design (no limit) takes a design deeper
	// than NotchDepthDB (a zero on the unit circle: a notch centre, a
	// band-stop's centre) as NotchDepthDB: the reading must show that depth.
	notch := !p.HasLimit()
	fits := func(seg int) bool { return int64(seg)*(MinSegments+1)/2 <= usable }
	if s.o.Tone {
		// The tone is read at its own frequency: no resolution to choose,
		// only a window long enough to keep the tone's image at -f (and at
		// fs - f) out of the main lobe.
		room := math.Min(p.FrequencyHz, s.fs/2-p.FrequencyHz)
		seg := 4096
		for seg < MaxSegment && lobeBins*s.fs/float64(seg) > room/2 {
			seg *= 2
		}
		if s.o.Segment != 0 {
			seg = s.o.Segment
		}
		pl.lo, pl.hi = pl.designed, pl.designed
		if notch {
			pl.hi = math.Max(pl.designed, NotchDepthDB)
		}
		if !fits(seg) {
			pl.reason = fmt.Sprintf("the probe is too short for a %d-sample reading: %d frames needed", seg, s.framesFor(seg))
			return pl
		}
		pl.seg = seg
		return pl
	}
	try := func(seg int) (lo, hi float64, ok bool) {
		b := lobeBins * s.fs / float64(seg)
		if b >= p.FrequencyHz || b >= s.fs/2-p.FrequencyHz {
			return 0, 0, false
		}
		if !s.f.ZeroPhase && float64(seg) < delayFactor*math.Abs(s.f.GroupDelay(p.FrequencyHz))*s.fs {
			return 0, 0, false
		}
		lo, hi = s.designRange(p.FrequencyHz, b, notch)
		if hi-lo > ResolutionDB || !fits(seg) {
			// Too coarse; or too long for the run, when the delay's bias
			// (small at this length) need not be worked out.
			return lo, hi, hi-lo <= ResolutionDB
		}
		lo += s.delayBias(p.FrequencyHz, seg)
		return lo, hi, hi-lo <= ResolutionDB
	}
	if s.o.Segment != 0 {
		lo, hi, ok := try(s.o.Segment)
		pl.lo, pl.hi, pl.widen = lo, hi, hi-lo
		switch {
		case !ok && hi == 0 && lo == 0:
			pl.reason = fmt.Sprintf("a %d-sample segment cannot resolve %.6g Hz (its main lobe reaches 0 Hz or Nyquist, or the filter's delay is too long for it)", s.o.Segment, p.FrequencyHz)
		case !ok:
			pl.reason = fmt.Sprintf("the design changes by %.2f dB across the main lobe of a %d-sample segment (at most %.2g dB allowed); leave --segment out to choose it per check", hi-lo, s.o.Segment, ResolutionDB)
		case !fits(s.o.Segment):
			pl.reason = fmt.Sprintf("too short for %d-sample segments: %d frames needed, the run has %d", s.o.Segment, s.framesFor(s.o.Segment), s.frames)
		default:
			pl.seg = s.o.Segment
		}
		return pl
	}
	for seg := MinSegment; seg <= MaxSegment; seg *= 2 {
		lo, hi, ok := try(seg)
		if !ok {
			continue
		}
		pl.lo, pl.hi, pl.widen = lo, hi, hi-lo
		if !fits(seg) {
			pl.reason = fmt.Sprintf("too short to resolve: the design changes by less than %.2g dB across the window only with segments of %d samples, which need %d frames (%.3g s), and the run has %d; a longer recording, or --probe (tones), resolves it", ResolutionDB, seg, s.framesFor(seg), float64(s.framesFor(seg))/s.fs, s.frames)
			return pl
		}
		pl.seg = seg
		return pl
	}
	b := lobeBins * s.fs / MaxSegment
	pl.lo, pl.hi = s.designRange(p.FrequencyHz, b, notch)
	pl.widen = pl.hi - pl.lo
	pl.reason = fmt.Sprintf("not resolvable with a broadband signal: the design changes by %.1f dB even across the main lobe of a %d-sample window; --probe (tones) reads it", pl.hi-pl.lo, MaxSegment)
	return pl
}

// Feed takes the next frames of the input (x) and the output (y),
// interleaved with the run's channel count, as many of each. It keeps
// neither slice.
func (s *Session) Feed(x, y []float64) error {
	if len(x) != len(y) || len(x)%s.nc != 0 {
		return fmt.Errorf("verify: %w: %d input and %d output samples for %d channels", ErrInvalidOption, len(x), len(y), s.nc)
	}
	n := int64(len(x) / s.nc)
	lo, hi := max(s.skip-s.pos, 0), min(s.frames-s.skip-s.pos, n)
	s.pos += n
	if hi <= lo {
		return nil
	}
	max := s.o.maxSegments()
	for _, g := range s.groups {
		if g.finished {
			continue
		}
		// Move the unread tail to the front when the buffers would have
		// to grow: each sample is then copied about once.
		if g.start > 0 && len(g.bx[0])+int(hi-lo) > cap(g.bx[0]) {
			for i := range g.bx {
				k := copy(g.bx[i], g.bx[i][g.start:])
				g.bx[i] = g.bx[i][:k]
				copy(g.by[i], g.by[i][g.start:])
				g.by[i] = g.by[i][:k]
			}
			g.start = 0
		}
		for i, c := range s.chans {
			for t := lo; t < hi; t++ {
				g.bx[i] = append(g.bx[i], x[int(t)*s.nc+c])
				g.by[i] = append(g.by[i], y[int(t)*s.nc+c])
			}
		}
		for len(g.bx[0])-g.start >= g.seg && g.segs < max {
			s.segment(g)
			g.start += g.seg / 2
			g.segs++
		}
		if g.segs >= max {
			g.finished = true
			g.bx, g.by = nil, nil
		}
	}
	return nil
}

// segment reads one segment of every checked channel at each frequency of
// the group: X = sum w[n] (x[n] - mean) e^{-j omega n}, the single-
// frequency DFT (Goertzel's quantity, computed here with a phasor that is
// re-anchored every 1024 samples), and the input's whole spectrum for the
// leakage rule.
func (s *Session) segment(g *group) {
	for ci := range s.chans {
		xs := g.bx[ci][g.start : g.start+g.seg]
		ys := g.by[ci][g.start : g.start+g.seg]
		var mx, my float64
		for t := range xs {
			mx += xs[t]
			my += ys[t]
		}
		mx /= float64(g.seg)
		my /= float64(g.seg)
		for t, w := range g.win {
			g.wx[t] = w * (xs[t] - mx)
			g.wy[t] = w * (ys[t] - my)
		}
		if g.tracked {
			s.trackPhase(g, ci)
		}
		for _, pi := range g.plans {
			var X, Y complex128
			a := &s.acc[pi][ci]
			if g.tracked {
				var side float64
				X, Y, side = trackedDFT(g.wx, g.wy, g.ph, s.plans[pi].harm)
				a.side += side
			} else {
				X, Y = singleDFT(g.wx, g.wy, s.plans[pi].omega)
			}
			a.xx += real(X)*real(X) + imag(X)*imag(X)
			a.yy += real(Y)*real(Y) + imag(Y)*imag(Y)
			a.xy += cmplx.Conj(X) * Y
			a.n++
		}
		if g.psd != nil && g.segs < max(4, min(psdSegments, psdSamples/g.seg)) {
			g.fft.Coefficients(g.coef, g.wx)
			for k, c := range g.coef {
				g.psd[ci][k] += real(c)*real(c) + imag(c)*imag(c)
			}
		}
	}
}

// singleDFT returns sum x[n] e^{-j omega n} and the same of y.
func singleDFT(x, y []float64, omega float64) (complex128, complex128) {
	var xr, xi, yr, yi float64
	const anchor = 1024
	for b := 0; b < len(x); b += anchor {
		sn, cs := math.Sincos(omega * float64(b))
		ds, dc := math.Sincos(omega)
		e := min(b+anchor, len(x))
		for t := b; t < e; t++ {
			// e^{-j omega t} = cs - j sn
			xr += x[t] * cs
			xi -= x[t] * sn
			yr += y[t] * cs
			yi -= y[t] * sn
			cs, sn = cs*dc-sn*ds, sn*dc+cs*ds
		}
	}
	return complex(xr, xi), complex(yr, yi)
}

// floorDensity is the one-sided density, in FS^2/Hz, of the quantisation
// error of a format at rate fs: q^2/12 spread over fs/2, q the step (2^(1-b)
// for b-bit PCM over a full scale of +-1; the unit roundoff for float,
// taken at full scale), and q^2/4 with TPDF dither (q^2/12 of rounding plus
// q^2/6 of dither: Wannamaker, Lipshitz & Vanderkooy, JAES 48, 2000, cited
// from memory) when dithered is set and the format is PCM.
func floorDensity(f wavio.Format, fs float64, dithered bool) (float64, string) {
	var q float64
	var name string
	switch {
	case f.Bits == 0 || f.Encoding == wavio.Float && f.Bits == 64:
		q, name = math.Pow(2, -53), "float64"
	case f.Encoding == wavio.Float:
		q, name = math.Pow(2, -24), "float32"
	default:
		b := f.Bits
		if f.ValidBits > 0 && f.ValidBits < b {
			b = f.ValidBits
		}
		q, name = math.Pow(2, float64(1-b)), fmt.Sprintf("%d-bit", b)
	}
	v := q * q / 12
	if dithered && f.Bits != 0 && f.Encoding != wavio.Float {
		v, name = q*q/4, name+" dither"
	} else {
		name += " quantisation"
	}
	return 2 * v / fs, name
}

// bhResponse2 is the squared magnitude of the Blackman-Harris transform at
// d bins from its centre, relative to the centre: exact in the main lobe,
// W(d) = sum_k s_k sinc(d - k) with s_0 = a0, s_{+-k} = a_k / 2 (the
// window as a sum of shifted Dirichlet kernels, Harris 1978, sec. IV, for
// long windows), and beyond it the mean over the sidelobes' oscillation,
// (1/2) (sum_k s_k (-1)^k / (pi (d - k)))^2.
func bhResponse2(d float64) float64 {
	d = math.Abs(d)
	a0 := bhTerms[0]
	if d <= lobeBins {
		w := a0 * sinc(d)
		for k := 1; k < 4; k++ {
			w += bhTerms[k] / 2 * (sinc(d-float64(k)) + sinc(d+float64(k)))
		}
		return w * w / (a0 * a0)
	}
	v := a0 / d
	sign := -1.0
	for k := 1; k < 4; k++ {
		v += sign * bhTerms[k] / 2 * (1/(d-float64(k)) + 1/(d+float64(k)))
		sign = -sign
	}
	v /= math.Pi
	return v * v / 2 / (a0 * a0)
}

func sinc(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}

// Result judges what was fed. in and out name the run's files for the
// result; method says what was measured.
func (s *Session) Result(in, out, method string) *Result {
	r := &Result{Input: in, Output: out, Method: method, SampleRate: int(s.fs), ZeroPhase: s.f.ZeroPhase,
		Frames: s.frames, SkippedFrames: s.skip, Window: window.String(), ConfidenceLevel: s.o.level(), Checks: []Check{}, Filter: s.f}
	for _, c := range s.chans {
		r.Channels = append(r.Channels, c+1)
	}
	r.TrackPerChannel = s.perChannel()
	for ci, c := range s.chans {
		for pi := range s.plans {
			r.Checks = append(r.Checks, s.judge(pi, ci, c+1))
		}
	}
	sort.SliceStable(r.Checks, func(i, j int) bool { return r.Checks[i].Channel < r.Checks[j].Channel })
	r.Finish()
	return r
}
