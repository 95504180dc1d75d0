package verify

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/stat/distuv"
)

// leakTol is the largest relative change of the expected reading that
// energy from outside the main lobe may make: TolDB as a magnitude ratio.
var leakTol = math.Pow(10, TolDB/20) - 1

// leakShare is the largest share of the input's level at a check that may
// be leakage through the window's sidelobes: beyond it the input there is
// mostly other frequencies' energy.
const leakShare = 0.5

// judge reads plan pi on checked channel ci (numbered channel) and gives
// its verdict.
func (s *Session) judge(pi, ci, channel int) Check {
	c := s.judgeAt(pi, ci, channel)
	if pl := &s.plans[pi]; pl.harm > 0 {
		// The reading is the hum's only where the hum's line stands well
		// above the sound around it: sound across the window's main lobe
		// passes the narrow notch mostly unchanged and lifts the reading
		// by up to its share of the input. A reading above the limit that
		// this share alone can explain decides nothing.
		if a := s.acc[pi][ci]; c.Verdict == Fail && a.xx > 0 {
			if share := 20 * math.Log10(a.side/a.xx); share > TrackDepthDB-SeeBelowDB {
				c.Verdict, c.MarginDB = Unmeasurable, nil
				c.Reason = fmt.Sprintf("the reading (%.2f dB) lies above the limit, but the hum's line stands only %.1f dB above the input's sound beside it, which alone can lift the reading that far", *c.MeasuredDB, -dB10(a.side/a.xx))
			}
		}
		k := s.trackOf(channel - 1)
		c.FrequencyHz = pl.harm * s.tmean[k]
		c.TrackRangeHz = []float64{s.tlo[k], s.thi[k]}
		read := "read along the hum's track"
		if s.perChannel() {
			read = fmt.Sprintf("read along channel %d's own track of the hum", channel)
		}
		if pl.seg == 0 {
			read = "to be " + read
		}
		c.Reason += fmt.Sprintf(" (%s as harmonic %g of a fundamental from %.3f to %.3f Hz, at %.6g Hz on average; nominal centre %.6g Hz; the limit of %.0f dB is wavsieve's own bound for a tracking notch)", read, pl.harm, s.tlo[k], s.thi[k], c.FrequencyHz, pl.p.FrequencyHz, TrackDepthDB)
	}
	return c
}

func (s *Session) judgeAt(pi, ci, channel int) Check {
	pl := &s.plans[pi]
	p := pl.p
	c := Check{Channel: channel, Stage: p.Stage + 1, Kind: p.Kind, FrequencyHz: p.FrequencyHz, Label: p.Label, Verdict: Unmeasurable}
	c.DesignedDB = num(pl.designed)
	lo, hi := p.LowerDB+pl.offset, p.UpperDB+pl.offset
	limited := p.HasLimit()
	c.LowerLimitDB, c.UpperLimitDB = num(lo), num(hi)
	if limited {
		if !math.IsInf(lo, -1) {
			c.LimitDB = num(lo)
		} else {
			c.LimitDB = num(hi)
		}
	}
	if !(math.IsNaN(pl.lo) || math.IsNaN(pl.hi)) && (pl.seg > 0 || pl.widen > 0) {
		c.DesignRangeDB = &Pair{pl.lo, pl.hi}
	}
	if limited && (math.IsNaN(pl.offset) || math.IsInf(pl.offset, 0)) {
		c.Reason = "another stage of the chain has a zero at this frequency, so this stage's limit cannot be read through the chain"
		return c
	}
	if pl.seg == 0 {
		c.Reason = pl.reason
		return c
	}
	a := s.acc[pi][ci]
	g := s.groups[pl.group]
	c.Segment, c.Averages, c.ResolutionHz = pl.seg, a.n, num(s.fs/float64(pl.seg))
	if a.n < MinSegments {
		c.Reason = fmt.Sprintf("only %d segments of %d samples were read; %d are needed", a.n, pl.seg, MinSegments)
		return c
	}
	k := float64(a.n)
	sxx, syy, sxy := a.xx/k, a.yy/k, a.xy/complex(k, 0)
	if !(sxx > 0) {
		c.Reason = fmt.Sprintf("the input has no energy at %.6g Hz", p.FrequencyHz)
		return c
	}
	h := sxy / complex(sxx, 0)
	mag := cmplx.Abs(h)
	g2 := 0.0
	if syy > 0 {
		g2 = math.Min(1, mag*mag*sxx/syy)
	}
	// The H1 confidence region: |H - H^| <= r with
	// r^2 = 2/(nu-2) F_{2,nu-2}(level) (1 - g^2) Pyy/Pxx (Bendat & Piersol,
	// "Random Data", 4th ed., 2010, sec. 9.2.4, after Goodman 1965; cited
	// from memory), nu the equivalent degrees of freedom of K half-
	// overlapped segments, 2K / (1 + 2 (1 - 1/K) rho^2) with rho the
	// window's correlation at half overlap (Welch 1967, eq. (16)).
	nu := 2 * k / (1 + 2*(1-1/k)*g.rho1*g.rho1)
	fq := distuv.F{D1: 2, D2: nu - 2}.Quantile(s.o.level())
	r := math.Sqrt(2 / (nu - 2) * fq * math.Max(0, 1-g2) * syy / sxx)
	m := 20 * math.Log10(mag)
	ciHi := 20 * math.Log10(mag+r)
	ciLo := math.Inf(-1)
	if mag > r {
		ciLo = 20 * math.Log10(mag-r)
	}
	ivLo, ivHi := ciLo-pl.widen, ciHi+pl.widen
	floor := 20 * math.Log10(r)
	c.MeasuredDB, c.IntervalDB = num(m), &Pair{ivLo, ivHi}
	c.Coherence, c.RandomError = num(g2), num(RandomError(g2, a.n))

	// The level the reading must reach down to: the lower limit (to show
	// the response above it), else the upper limit, else the top of the
	// design range.
	see := pl.hi
	if limited {
		see = hi
		if !math.IsInf(lo, -1) {
			see = lo
		}
	}
	gxx := 2 * sxx / (s.fs * g.sumW2)
	nin, inName := floorDensity(s.o.In, s.fs, true)
	nout, outName := floorDensity(s.o.Out, s.fs, true)
	switch {
	case gxx <= nin*math.Pow(10, FloorMarginDB/10):
		c.Reason = fmt.Sprintf("the input at %.6g Hz is at its own floor: %.1f dB re FS^2/Hz against the %s floor of %.1f", p.FrequencyHz, dB10(gxx), inName, dB10(nin))
		return c
	case gxx*math.Pow(10, see/10) <= nout:
		c.Reason = fmt.Sprintf("the output expected at %.1f dB here (%.1f dB re FS^2/Hz) lies below the output's %s floor of %.1f dB re FS^2/Hz", see, dB10(gxx)+see, outName, dB10(nout))
		return c
	}
	if g.psd != nil {
		dev, share, from, up := s.leakage(g, ci, pl)
		if share > leakShare {
			c.Reason = fmt.Sprintf("the data does not show this frequency: the input's level here (%.1f dB re FS^2/Hz) is mostly leakage through the window's sidelobes (%.0f%% of it), from around %.5g Hz (%.0f dB above)", dB10(gxx), 100*math.Min(1, share), from, up)
			return c
		}
		if dev > leakTol {
			c.Reason = fmt.Sprintf("the reading is not this frequency's: through the window's sidelobes the input around %.5g Hz (%.0f dB above its level here, where the design is %.0f dB higher) moves the expected reading by %.2f dB", from, up, 20*math.Log10(s.absAt(g, from))-pl.designed, 20*math.Log10(1+dev))
			return c
		}
	}

	// Conclusive failures first. A reading above what is allowed needs
	// coherence: noise alone can make it.
	coherent := g2 >= FailCoherence
	highFail := func(what string, bound float64) {
		if coherent {
			c.Verdict = Fail
			c.Reason = fmt.Sprintf("measured %.2f dB, interval %s, above %s %.2f dB", m, pairText(ivLo, ivHi), what, bound)
		} else {
			c.Reason = fmt.Sprintf("the reading (%.2f dB) lies above %s %.2f dB, but at coherence %.3g the output here is mostly noise uncorrelated with the input, and such a reading can come from noise alone", m, what, bound, g2)
		}
	}
	if limited {
		switch {
		case ivHi < lo-TolDB:
			c.Verdict = Fail
			c.Reason = fmt.Sprintf("measured %.2f dB, interval %s, below the limit %.2f dB", m, pairText(ivLo, ivHi), lo)
			c.MarginDB = num(m - lo)
			return c
		case ivLo > hi+TolDB:
			c.MarginDB = num(hi - m)
			highFail("the limit", hi)
			return c
		}
	} else {
		alo, ahi := pl.lo-TolDB, pl.hi+TolDB
		switch {
		case ivHi < alo:
			c.Verdict = Fail
			c.Reason = fmt.Sprintf("measured %.2f dB, interval %s, below the design's %s", m, pairText(ivLo, ivHi), pairText(pl.lo, pl.hi))
			c.MarginDB = num(m - alo)
			return c
		case ivLo > ahi:
			c.MarginDB = num(ahi - m)
			highFail("the design's top", pl.hi)
			return c
		}
	}
	if floor > see-SeeBelowDB {
		c.Reason = fmt.Sprintf("cannot read down to %.1f dB: at coherence %.3g over %d segments the reading's noise radius is %.1f dB", see, g2, a.n, floor)
		return c
	}
	if limited {
		inside := math.Min(m-lo, hi-m)
		switch {
		case ivLo >= lo && ivHi <= hi:
			c.Verdict, c.MarginDB = Pass, num(inside)
			c.Reason = "within the limit over the whole interval"
		case ivHi+TolDB >= pl.lo && ivLo-TolDB <= pl.hi && pl.designed >= lo-1e-3 && pl.designed <= hi+1e-3:
			c.Verdict, c.MarginDB = Pass, num(math.Max(0, inside))
			c.Reason = fmt.Sprintf("the interval reaches past the limit, but agrees with the design (%s, within the limit) within its uncertainty", pairText(pl.lo, pl.hi))
		default:
			c.Reason = fmt.Sprintf("the interval %s straddles the limit and does not agree with the design %s; more data would decide", pairText(ivLo, ivHi), pairText(pl.lo, pl.hi))
		}
		return c
	}
	alo, ahi := pl.lo-TolDB, pl.hi+TolDB
	inside := math.Min(m-alo, ahi-m)
	c.Verdict, c.MarginDB = Pass, num(math.Max(0, inside))
	if inside >= 0 {
		c.Reason = fmt.Sprintf("within the design range widened by %.2g dB", TolDB)
	} else {
		c.Reason = "agrees with the design range within its uncertainty"
	}
	if math.IsInf(ciLo, -1) {
		c.Reason += fmt.Sprintf("; the reading goes down to the floor of the output (%s) here, %.1f dB", outName, ivHi)
	}
	return c
}

// leakage returns how much energy from outside the main lobe moves the
// reading expected at plan pl (relative change of its magnitude), the
// frequency it mostly comes from, and how far the input there stands above
// the input at the check, in dB. The expected H1 reading is the design
// averaged over the input's spectrum weighted by the window's response
// around the check, sum |H| P W / sum P W; the part inside the main lobe
// alone gives the local reading.
func (s *Session) leakage(g *group, ci int, pl *plan) (dev, share, fromHz, upDB float64) {
	if g.absH == nil {
		g.absH = make([]float64, g.seg/2+1)
		for k := range g.absH {
			g.absH[k] = math.Pow(10, s.f.EffectiveDB(float64(k)*s.fs/float64(g.seg))/20)
		}
	}
	psd := g.psd[ci]
	centre := pl.p.FrequencyHz * float64(g.seg) / s.fs
	var lpw, lhpw, apw, ahpw float64
	for k, p := range psd {
		if p == 0 {
			continue
		}
		d := float64(k) - centre
		pw := p * bhResponse2(d)
		if math.Abs(d) <= lobeBins {
			lpw += pw
			lhpw += pw * g.absH[k]
		}
		apw += pw
		ahpw += pw * g.absH[k]
	}
	if !(lpw > 0) || !(lhpw > 0) {
		return 0, 0, 0, 0
	}
	el := lhpw / lpw
	dev = math.Abs((ahpw/apw)/el - 1)
	// The energy from outside the main lobe, against the input's level at
	// the check (the main lobe's sum over the window's equivalent noise
	// bandwidth in bins, L sum w^2 / (sum w)^2: Harris 1978, eq. (12)).
	// A region holding nothing but leakage reads about 1.
	share = (apw - lpw) / (lpw / g.enbw)
	worst, wk := 0.0, 0
	for k, p := range psd {
		d := float64(k) - centre
		if math.Abs(d) <= lobeBins || p == 0 {
			continue
		}
		if v := p * bhResponse2(d) * math.Max(math.Abs(g.absH[k]-el), el); v > worst {
			worst, wk = v, k
		}
	}
	here := psd[int(math.Round(centre))]
	return dev, share, float64(wk) * s.fs / float64(g.seg), dB10(psd[wk] / here)
}

func (s *Session) absAt(g *group, hz float64) float64 {
	return g.absH[int(math.Round(hz*float64(g.seg)/s.fs))]
}

func dB10(v float64) float64 { return 10 * math.Log10(v) }

func pairText(lo, hi float64) string {
	f := func(v float64) string {
		if math.IsInf(v, -1) {
			return "-inf"
		}
		if math.IsInf(v, 1) {
			return "+inf"
		}
		return fmt.Sprintf("%.2f", v)
	}
	if !math.IsInf(lo, 0) && !math.IsInf(hi, 0) && hi-lo < 0.005 {
		return f((lo+hi)/2) + " dB"
	}
	return f(lo) + ".." + f(hi) + " dB"
}
