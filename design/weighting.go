package design

import (
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Weighting is the family of the standard weightings: a stage
// {"family": "weighting", "curve": "A"}.
const Weighting = "weighting"

// Standards the weighting curves come from.
const (
	StandardIEC61672 = "IEC 61672-1:2013"
	StandardISO8041  = "ISO 8041-1:2017"
)

// WeightingInfo is what the design of a weighting reports about itself.
type WeightingInfo struct {
	Curve    string
	Standard string
	// Method says how the digital filter was obtained at this rate.
	Method string
	// FittedPoles is the number of poles of the fitted correction (0 when
	// the bilinear transform alone met the goal).
	FittedPoles int
	// GoalLoHz and GoalHiHz bound the band where the response is held
	// to the analog definition (empty for Z): A and C from 10 Hz to
	// min(16 kHz, 0.4 rate); ISO curves from 2 f1 to f2/2 (capped at 0.4
	// rate).
	GoalLoHz, GoalHiHz float64
	// AnalogDevDB is the largest |designed - analog definition| over the
	// goal band, in dB, found at AnalogDevHz.
	AnalogDevDB, AnalogDevHz float64
	// PlainBilinearDevDB is the same figure for a plain bilinear
	// transform of the analog definition, for comparison.
	PlainBilinearDevDB float64
	// TableDevDB is the largest |designed - table value| over the rows of
	// the standard's table below 0.45 of the rate (IEC curves only; NaN
	// otherwise).
	TableDevDB float64
	// Class is the best class (1 or 2) whose acceptance limits the design
	// meets at every row of the table below 0.45 of the rate, 0 when it
	// meets neither, -1 when the standard gives no table here.
	Class int
	// Class1UpToHz is the highest exact table frequency below the Nyquist
	// frequency up to which every row meets class 1 (0: none).
	Class1UpToHz float64
}

// WeightingCurves lists the curves a weighting stage accepts.
func WeightingCurves() []string {
	out := []string{"A", "C", "Z"}
	var iso []string
	for k := range isoTable {
		iso = append(iso, k)
	}
	sort.Strings(iso)
	return append(out, iso...)
}

// afactor is one analog factor of a weighting, in rad/s:
// H(s) = gain prod(s - z) / prod(s - p). A factor with zeros at s = 0
// (a high-pass) has dc set.
type afactor struct {
	zeros, poles []complex128
	gain         float64
	dc           bool
}

// curve is one weighting: its analog factors, gain and the bands of its
// goal, fit and normalisation.
type curve struct {
	name, standard string
	factors        []afactor
	gain           float64
	refHz          float64 // the digital response equals the analog one here
	fitLoHz        float64 // lower end of the fit band
	fitCapHz       float64 // the fit band ends at min(0.42 rate, fitCapHz)
	goalLo, goalHi float64 // the goal band, before the cap at 0.4 rate
	minRate        float64 // lowest sample rate accepted
	corners        []float64
	iec            bool // has IEC 61672-1 Table 3
}

func tw(hz float64) float64 { return 2 * math.Pi * hz }

// quadRoots returns the roots of s^2 + (w/q) s + w^2.
func quadRoots(w, q float64) []complex128 {
	b := w / q
	d := cmplx.Sqrt(complex(b*b/4-w*w, 0))
	return []complex128{complex(-b/2, 0) + d, complex(-b/2, 0) - d}
}

// lookupCurve builds the curve of a name, or reports false.
func lookupCurve(name string) (*curve, bool) {
	switch name {
	case "A":
		// IEC 61672-1:2013, eq. E.6: A(f) = 20 lg[f4^2 f^4 / ((f^2 + f1^2)
		// (f^2 + f2^2)^1/2 (f^2 + f3^2)^1/2 (f^2 + f4^2))] - A1000.
		return &curve{
			name: "A", standard: StandardIEC61672, iec: true,
			factors: []afactor{
				{zeros: []complex128{0, 0}, poles: []complex128{complex(-tw(iecF1), 0), complex(-tw(iecF1), 0)}, gain: 1, dc: true},
				{zeros: []complex128{0}, poles: []complex128{complex(-tw(iecF2), 0)}, gain: 1, dc: true},
				{zeros: []complex128{0}, poles: []complex128{complex(-tw(iecF3), 0)}, gain: 1, dc: true},
				{poles: []complex128{complex(-tw(iecF4), 0), complex(-tw(iecF4), 0)}, gain: tw(iecF4) * tw(iecF4)},
			},
			gain: math.Pow(10, -iecA1000/20), refHz: 1000, fitLoHz: 10, fitCapHz: 20000,
			goalLo: 10, goalHi: 16000, minRate: 2500, corners: []float64{iecF1, iecF2, iecF3, iecF4},
		}, true
	case "C":
		// IEC 61672-1:2013, eq. E.1: C(f) = 20 lg[f4^2 f^2 / ((f^2 + f1^2)
		// (f^2 + f4^2))] - C1000.
		return &curve{
			name: "C", standard: StandardIEC61672, iec: true,
			factors: []afactor{
				{zeros: []complex128{0, 0}, poles: []complex128{complex(-tw(iecF1), 0), complex(-tw(iecF1), 0)}, gain: 1, dc: true},
				{poles: []complex128{complex(-tw(iecF4), 0), complex(-tw(iecF4), 0)}, gain: tw(iecF4) * tw(iecF4)},
			},
			gain: math.Pow(10, -iecC1000/20), refHz: 1000, fitLoHz: 10, fitCapHz: 20000,
			goalLo: 10, goalHi: 16000, minRate: 2500, corners: []float64{iecF1, iecF4},
		}, true
	case "Z":
		// IEC 61672-1:2013: Z is 0 dB at every frequency (Table 3).
		return &curve{name: "Z", standard: StandardIEC61672, iec: true, gain: 1, refHz: 1000, minRate: 2500}, true
	}
	p, ok := isoTable[name]
	if !ok {
		return nil, false
	}
	// The cascade of ISO 8041-1:2017 (and ISO 2631-1:1997 Annex A), quoted
	// from memory; the step's normalisation is the one whose Wk and Wd
	// reproduce the weighting factors of ISO 2631-1 Table 3
	// (TestISOWeightingTableValues):
	//   band limits  H_h = s^2 / (s^2 + w1 s/Q1 + w1^2),
	//                H_l = w2^2 / (s^2 + w2 s/Q1 + w2^2), Q1 = 1/sqrt 2,
	//   transition   H_t = (1 + s/w3) w4^2 / (s^2 + w4 s/Q4 + w4^2),
	//   upward step  H_s = (s^2 + w5 s/Q5 + w5^2) / (s^2 + w6 s/Q6 + w6^2),
	//   gain K. (The step rises from (f5/f6)^2 at low frequencies to 1.)
	q1 := 1 / math.Sqrt2
	c := &curve{name: name, standard: StandardISO8041, gain: p.k}
	c.factors = append(c.factors,
		afactor{zeros: []complex128{0, 0}, poles: quadRoots(tw(p.f1), q1), gain: 1, dc: true},
		afactor{poles: quadRoots(tw(p.f2), q1), gain: tw(p.f2) * tw(p.f2)})
	c.corners = []float64{p.f1, p.f2}
	if p.f4 > 0 {
		t := afactor{poles: quadRoots(tw(p.f4), p.q4), gain: tw(p.f4) * tw(p.f4)}
		if p.f3 > 0 {
			t.zeros = []complex128{complex(-tw(p.f3), 0)}
			t.gain /= tw(p.f3)
			c.corners = append(c.corners, p.f3)
		}
		c.factors = append(c.factors, t)
		c.corners = append(c.corners, p.f4)
	}
	if p.f5 > 0 {
		c.factors = append(c.factors, afactor{zeros: quadRoots(tw(p.f5), p.q5), poles: quadRoots(tw(p.f6), p.q6), gain: 1})
		c.corners = append(c.corners, p.f5, p.f6)
	}
	sort.Float64s(c.corners)
	c.goalLo, c.goalHi = 2*p.f1, p.f2/2
	c.refHz = math.Sqrt(c.goalLo * c.goalHi)
	c.fitLoHz, c.fitCapHz = p.f1, math.Inf(1)
	c.minRate = 2.5 * p.f2
	return c, true
}

// analog returns the analog definition's response at hz.
func (c *curve) analog(hz float64) complex128 {
	s := complex(0, tw(hz))
	h := complex(c.gain, 0)
	for _, f := range c.factors {
		h *= complex(f.gain, 0)
		for _, z := range f.zeros {
			h *= s - z
		}
		for _, p := range f.poles {
			h /= s - p
		}
	}
	return h
}

// WeightingDB returns the analog definition of a weighting curve at hz,
// in dB, or false for an unknown curve.
func WeightingDB(name string, hz float64) (float64, bool) {
	c, ok := lookupCurve(name)
	if !ok {
		return 0, false
	}
	return db(c.analog(hz)), true
}

// bilinearFactors maps analog factors to the z-plane by the plain
// bilinear transform s = 2 rate (1 - z^-1)/(1 + z^-1) (no pre-warping:
// the factors are defined in Hz, not by edges), with unit gain.
func bilinearFactors(fs []afactor, rate float64) ZPK {
	var a ZPK
	a.Gain = 1
	k := complex(1/(2*rate), 0)
	for _, f := range fs {
		for _, z := range f.zeros {
			a.Zeros = append(a.Zeros, z*k)
		}
		for _, p := range f.poles {
			a.Poles = append(a.Poles, p*k)
		}
	}
	d := Bilinear(a)
	d.Gain = 1
	return d
}

// normalise sets the gain of d so that its response equals the curve's
// analog one at refHz.
func (c *curve) normalise(d *ZPK, rate float64) {
	d.Gain = 1
	d.Gain = cmplx.Abs(c.analog(c.refHz)) / cmplx.Abs(zpkAt(*d, 2*math.Pi*c.refHz/rate))
}

// goalBand returns the goal band at rate.
func (c *curve) goalBand(rate float64) (lo, hi float64) {
	return c.goalLo, math.Min(c.goalHi, 0.4*rate)
}

// maxDev returns the largest |digital - analog| in dB over [lo, hi] on a
// log grid of n points, and where.
func (c *curve) maxDev(d ZPK, rate, lo, hi float64, n int) (float64, float64) {
	worst, at := 0.0, lo
	for i := 0; i < n; i++ {
		hz := lo * math.Pow(hi/lo, float64(i)/float64(n-1))
		e := math.Abs(db(zpkAt(d, 2*math.Pi*hz/rate)) - db(c.analog(hz)))
		if e > worst || math.IsNaN(e) {
			worst, at = e, hz
		}
	}
	return worst, at
}

// Thresholds of the weighting design.
const (
	// plainEnoughDB: a plain bilinear transform whose deviation from the
	// analog definition over the goal band stays below this is kept as
	// it is (the fit would gain nothing worth its sections).
	plainEnoughDB = 0.002
	// devGridPoints: the log grid the deviation is measured on.
	devGridPoints = 600
)

// designWeighting designs a weighting curve at rate.
//
// # Method
//
// A weighting is defined as an analog filter, and a plain bilinear
// transform warps it: the response at f is the analog one at
// (rate/pi) tan(pi f / rate), which for A at 48 kHz is 2.7 dB low at
// 12.5 kHz, and for the ISO curves about 0.1 dB off at f2/2 when the rate
// is 8 f2. Pre-warping cannot help, as a curve has no single edge to
// pre-warp. So the design splits the curve in two:
//
//   - the high-pass factors (those with zeros at 0 Hz: the f1, f2, f3
//     poles of A, f1 of C, the band-limiting high-pass of ISO curves) go
//     through the plain bilinear transform: their poles lie far below the
//     Nyquist frequency, and a zero at 0 Hz must stay exactly there;
//   - the rest (the f4 double pole of A and C; the band-limiting
//     low-pass, transition and step of ISO curves) is replaced by a
//     digital filter fitted to the magnitude that the whole curve needs
//     from it: target(f) = |analog curve(f)| / |bilinear high-pass(f)|,
//     which also absorbs the high-pass part's own small warping error.
//
// The fit is linear in the squared magnitude: with u = 1 - cos(w),
// |H(e^jw)|^2 = P(u)/Q(u) for polynomials P and Q of degree N (any
// real digital filter of order N has this form). P and Q are found by
// the Sanathanan-Koerner iteration (Sanathanan & Koerner, IEEE Trans.
// Automatic Control 8(1), 1963: weighted linear least squares of
// P - target^2 Q, reweighted by 1/(target^2 Q) until it converges, which
// makes the error relative, i.e. in dB), over a log grid from fitLoHz to
// min(0.42 rate, fitCapHz) and, with 1/50 of the weight, on up to Nyquist
// so that nothing rises there. The filter is then the spectral factor:
// each root u_r of P or Q gives the z-plane root inside the unit circle
// of z^2 - 2 (1 - u_r) z + 1 (since u - u_r = (z - z_r)(1/z - z_r)/(2 z_r)
// on the unit circle), so poles and zeros are inside the unit circle
// (stable and minimum phase). N runs from the number of replaced poles
// to two more; the N with the smallest deviation from the analog
// definition over the goal band is kept, among stable results only. If
// the plain bilinear transform is within plainEnoughDB of the analog
// curve over the goal band already (high rates), it is kept.
//
// The gain is set so that the digital response equals the analog one at
// the curve's reference frequency (1 kHz for A and C, where both are
// 0 dB by the normalisations A1000 and C1000).
func designWeighting(c *curve, rate float64) (ZPK, WeightingInfo) {
	info := WeightingInfo{Curve: c.name, Standard: c.standard, Class: -1, TableDevDB: math.NaN()}
	if len(c.factors) == 0 { // Z
		info.Method = "none: Z-weighting is flat (one pass-through section)"
		return ZPK{Gain: c.gain}, info
	}
	lo, hi := c.goalBand(rate)
	info.GoalLoHz, info.GoalHiHz = lo, hi
	plain := bilinearFactors(c.factors, rate)
	c.normalise(&plain, rate)
	info.PlainBilinearDevDB, _ = c.maxDev(plain, rate, lo, hi, devGridPoints)
	best, bestDev, bestN := plain, info.PlainBilinearDevDB, 0
	if info.PlainBilinearDevDB >= plainEnoughDB {
		var dcf, rest []afactor
		for _, f := range c.factors {
			if f.dc {
				dcf = append(dcf, f)
			} else {
				rest = append(rest, f)
			}
		}
		low := bilinearFactors(dcf, rate)
		np := 0
		for _, f := range rest {
			np += len(f.poles)
		}
		for n := np; n <= np+2; n++ {
			z, p, ok := fitCorrection(c, low, rate, n)
			if !ok {
				continue
			}
			cand := ZPK{Zeros: append(append([]complex128(nil), low.Zeros...), z...), Poles: append(append([]complex128(nil), low.Poles...), p...)}
			if !(maxRadius(cand.Poles) < 1) {
				continue
			}
			c.normalise(&cand, rate)
			if dev, _ := c.maxDev(cand, rate, lo, hi, devGridPoints); dev < bestDev {
				best, bestDev, bestN = cand, dev, n
			}
		}
	}
	info.FittedPoles = bestN
	if bestN == 0 {
		info.Method = "bilinear transform of the analog definition (its deviation is below the goal at this rate)"
	} else {
		info.Method = "bilinear transform of the high-pass factors, times a least-squares fitted magnitude correction"
	}
	info.AnalogDevDB, info.AnalogDevHz = c.maxDev(best, rate, lo, hi, devGridPoints)
	return best, info
}

// fitCorrection fits an order-n digital filter to the magnitude the
// curve needs beyond the bilinear high-pass part low (see
// designWeighting). It returns the zeros and poles, or false when the
// fit fails.
func fitCorrection(c *curve, low ZPK, rate float64, n int) ([]complex128, []complex128, bool) {
	const (
		nLog   = 400  // log-spaced points of the fit band
		nHigh  = 50   // linear points from the fit band's top to Nyquist
		hiWt   = 0.02 // their weight
		skIter = 30   // Sanathanan-Koerner iterations
	)
	fhi := math.Min(0.42*rate, c.fitCapHz)
	flo := math.Min(c.fitLoHz, fhi/10)
	var hz, wt []float64
	for i := 0; i < nLog; i++ {
		hz = append(hz, flo*math.Pow(fhi/flo, float64(i)/float64(nLog-1)))
		wt = append(wt, 1)
	}
	for i := 1; i < nHigh; i++ {
		hz = append(hz, fhi+(0.499*rate-fhi)*float64(i)/float64(nHigh-1))
		wt = append(wt, hiWt)
	}
	m := len(hz)
	us, t2 := make([]float64, m), make([]float64, m)
	umax := 0.0
	for i, f := range hz {
		w := 2 * math.Pi * f / rate
		us[i] = 1 - math.Cos(w)
		umax = math.Max(umax, us[i])
		t := cmplx.Abs(c.analog(f)) / cmplx.Abs(zpkAt(low, w))
		t2[i] = t * t
	}
	for i := range us {
		us[i] /= umax
	}
	cols := 2*n + 1
	q := make([]float64, m) // Q(u) at the grid, from the last iteration
	for i := range q {
		q[i] = 1
	}
	var pc, qc []float64
	a := mat.NewDense(m, cols, nil)
	b := mat.NewVecDense(m, nil)
	norm := make([]float64, cols)
	for it := 0; it < skIter; it++ {
		for i := 0; i < m; i++ {
			g := wt[i] / (t2[i] * q[i])
			pw := 1.0
			for k := 0; k <= n; k++ {
				a.Set(i, k, g*pw)
				if k > 0 {
					a.Set(i, n+k, -g*t2[i]*pw)
				}
				pw *= us[i]
			}
			b.SetVec(i, g*t2[i])
		}
		// Column scaling: the powers of u span many decades.
		for k := 0; k < cols; k++ {
			norm[k] = mat.Norm(a.ColView(k), 2)
			if norm[k] == 0 {
				return nil, nil, false
			}
			for i := 0; i < m; i++ {
				a.Set(i, k, a.At(i, k)/norm[k])
			}
		}
		var qr mat.QR
		qr.Factorize(a)
		var x mat.VecDense
		if err := qr.SolveVecTo(&x, false, b); err != nil {
			return nil, nil, false
		}
		pc = make([]float64, n+1)
		qc = make([]float64, n+1)
		qc[0] = 1
		for k := 0; k <= n; k++ {
			pc[k] = x.AtVec(k) / norm[k]
			if k > 0 {
				qc[k] = x.AtVec(n+k) / norm[n+k]
			}
		}
		for i := range q {
			// |Q| in the weights: an intermediate Q may cross zero;
			// the final one is checked below.
			q[i] = math.Max(math.Abs(polyVal(qc, us[i])), 1e-300)
		}
	}
	for i := range us {
		if !(polyVal(pc, us[i]) > 0) || !(polyVal(qc, us[i]) > 0) {
			return nil, nil, false
		}
	}
	z, ok1 := spectralRoots(pc, umax)
	p, ok2 := spectralRoots(qc, umax)
	return z, p, ok1 && ok2
}

func polyVal(c []float64, x float64) float64 {
	v := 0.0
	for k := len(c) - 1; k >= 0; k-- {
		v = v*x + c[k]
	}
	return v
}

// spectralRoots maps the roots of a polynomial in u/umax (u = 1 - cos w)
// to z-plane roots inside the unit circle, one per root.
func spectralRoots(c []float64, umax float64) ([]complex128, bool) {
	for len(c) > 1 && c[len(c)-1] == 0 {
		c = c[:len(c)-1]
	}
	var out []complex128
	for _, r := range polyRoots(c) { // conjugate pairs are exact
		if imag(r) < 0 {
			continue // taken with its upper partner
		}
		a := 1 - r*complex(umax, 0)
		d := cmplx.Sqrt(a*a - 1)
		z := a + d
		if cmplx.Abs(z) > 1 {
			z = a - d
		}
		if !(cmplx.Abs(z) < 1) {
			return nil, false
		}
		if imag(r) == 0 {
			out = append(out, z)
		} else {
			out = append(out, z, cmplx.Conj(z))
		}
	}
	return out, true
}

// mask returns the standard's table as mask points for the rows below
// 0.45 of the rate, and fills the table figures of info.
func (c *curve) mask(d ZPK, rate float64, info *WeightingInfo) []MaskPoint {
	if t, ok := isoTolerance[c.name]; ok && c.standard == StandardISO8041 {
		return c.isoMask(t, rate)
	}
	if !c.iec {
		return nil
	}
	var out []MaskPoint
	info.TableDevDB = 0
	meets1, meets2 := true, true
	upTo, broken := 0.0, false
	for _, r := range iecTable {
		hz := iecExactHz(r.n)
		if hz >= rate/2 {
			break
		}
		target := 0.0
		switch c.name {
		case "A":
			target = r.a
		case "C":
			target = r.c
		}
		v := db(zpkAt(d, 2*math.Pi*hz/rate))
		dev := v - target
		ok1 := dev <= r.up1 && dev >= r.lo1
		if !broken && ok1 {
			upTo = hz
		} else {
			broken = true
		}
		if hz >= 0.45*rate {
			continue
		}
		info.TableDevDB = math.Max(info.TableDevDB, math.Abs(dev))
		meets1 = meets1 && ok1
		meets2 = meets2 && dev <= r.up2 && dev >= r.lo2
		out = append(out, MaskPoint{
			FrequencyHz: hz, Label: r.label, TargetDB: target,
			LowerDB: target + r.lo1, UpperDB: target + r.up1,
			Source: "IEC 61672-1:2013, Table 3 (" + c.name + " weighting, class 1 acceptance limits)",
		})
	}
	info.Class1UpToHz = upTo
	switch {
	case meets1:
		info.Class = 1
	case meets2:
		info.Class = 2
	default:
		info.Class = 0
	}
	return out
}

// isoMask returns the tolerance mask of an ISO 8041-1 curve: one row at
// the exact frequency of every one-third-octave band of the curve's
// Annex B table below 0.45 of the rate. The design goal of a row is the
// analog definition at its exact frequency (Annex B tabulates the same
// formulas); its limits are those of Table 5 for the row's region of
// Table 4 (see isoTolerance). ISO 8041-1 has no classes: info keeps
// Class -1 and no table deviation.
func (c *curve) isoMask(t isoTol, rate float64) []MaskPoint {
	var out []MaskPoint
	src := StandardISO8041 + ", Tables 4 and 5 (" + c.name + " weighting tolerances; goal: the analog definition)"
	for n := t.lo; n <= t.hi; n++ {
		hz := math.Pow(10, float64(n)/10)
		if hz >= 0.45*rate {
			break
		}
		target := db(c.analog(hz))
		lo, up := t.limitsDB(n)
		out = append(out, MaskPoint{
			FrequencyHz: hz, Label: thirdOctaveLabel(n), TargetDB: target,
			LowerDB: target + lo, UpperDB: target + up, Source: src,
		})
	}
	return out
}

// checkWeighting validates a weighting stage.
func checkWeighting(_ *family, st Stage, rate float64) error {
	if st.Curve == "" {
		return errorf(ErrInvalid, "invalid spec: a weighting stage needs a curve: one of %s", joinOr(WeightingCurves()))
	}
	c, ok := lookupCurve(st.Curve)
	if !ok {
		return errorf(ErrUnsupported, "unsupported weighting curve %q; use one of %s", st.Curve, joinOr(WeightingCurves()))
	}
	if rate < c.minRate {
		return errorf(ErrAboveNyquist, "the %s weighting needs a sample rate of at least %g Hz (its reference and band-limit frequencies must lie well below the Nyquist frequency), got %g Hz", c.name, c.minRate, rate)
	}
	return nil
}

// buildWeighting designs a weighting stage.
func buildWeighting(_ *family, d *Designed, rate, passes float64) error {
	if passes != 1 {
		return errorf(ErrInvalid, "invalid spec: the %s weighting is defined for one causal pass; remove zero_phase or --zero-phase (forward-backward would square it)", d.Spec.Curve)
	}
	c, _ := lookupCurve(d.Spec.Curve)
	zpk, info := designWeighting(c, rate)
	d.Form = FormStandard
	d.ZPK = zpk
	d.Order = len(zpk.Poles)
	d.EdgesHz = append([]float64(nil), c.corners...)
	d.Mask = c.mask(zpk, rate, &info)
	d.Weighting = &info
	if len(zpk.Poles) == 0 {
		d.Sections = []Section{{zpk.Gain, 0, 0, 1, 0, 0}}
	}
	return nil
}

func joinOr(s []string) string {
	if len(s) == 1 {
		return s[0]
	}
	out := ""
	for i, v := range s {
		switch {
		case i == 0:
		case i == len(s)-1:
			out += " or "
		default:
			out += ", "
		}
		out += v
	}
	return out
}

// Name is the curve's usual name: "A-weighting", "weighting Wk".
func (w *WeightingInfo) Name() string {
	if len(w.Curve) == 1 {
		return w.Curve + "-weighting"
	}
	return "weighting " + w.Curve
}
