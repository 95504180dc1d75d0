package design

import (
	"math"
	"reflect"
	"strings"
)

// family is one row of the family table: everything the package knows
// about a family, looked up by its name. Adding a family is adding a row
// (and, if it brings keys of its own, fields to Stage); nothing else in
// the package switches on family names.
type family struct {
	name string
	// keys lists the stage keys (JSON names, see Stage) the family takes
	// besides "family". A stage of this family with any other key set is
	// refused before check runs.
	keys []string
	// check validates the stage's values against the rate.
	check func(fam *family, st Stage, rate float64) error
	// build designs the stage at rate: it sets Form, Order, ZPK and
	// EdgesHz (and whatever else the family reports) of d, whose Spec,
	// Family and Response are set. passes is 2 for a zero-phase chain, in
	// which case the effective (squared) response must meet the spec.
	build func(fam *family, d *Designed, rate, passes float64) error

	// The classical families (built by buildClassical) also give:

	// prototype returns the analog low-pass prototype of order n with its
	// critical frequency at 1 rad/s (rp: passband ripple, rs: stopband
	// attenuation, dB, for the families that use them).
	prototype func(st Stage, n int, rp, rs float64) ZPK
	// order returns the real-valued minimum order that meets ripple and
	// attenuation (ep = 10^(rp/10) - 1, es = 10^(rs/10) - 1) at
	// prototype selectivity nat; nil when the family has no tolerance form.
	order func(nat, ep, es float64) float64
	// natural returns the pre-warped critical frequencies to design an
	// order-n filter with, so that the passband edges pb are met exactly;
	// nil when they are the passband edges themselves.
	natural func(response string, pb []float64, n int, ep, es float64) []float64
	// cutoff says what cutoff_hz means for the family, and cutoffDB the
	// response level that defines it (ok false when no level does).
	cutoff   string
	cutoffDB func(st Stage) (db float64, ok bool)
	// maxOrder, when above 0, is a lower order limit than MaxOrder, and
	// maxOrderWhy the reason, as a clause after a comma.
	maxOrder    int
	maxOrderWhy string
	// needRipple and needAtten: ripple_db and attenuation_db are needed
	// in order form.
	needRipple, needAtten bool
}

// families is the family table.
var families = []family{
	{
		name: Butterworth, keys: classicalKeys, check: checkClassical, build: buildClassical,
		prototype: func(_ Stage, n int, _, _ float64) ZPK { return butterPrototype(n) },
		// Parks & Burrus, "Digital Filter Design", 1987, eq. 7.15.
		order: func(nat, ep, es float64) float64 { return math.Log10(es/ep) / (2 * math.Log10(nat)) },
		natural: func(response string, pb []float64, n int, ep, _ float64) []float64 {
			// The -3 dB frequency that gives exactly the ripple at the passband edge.
			return butterNatural(response, pb, math.Pow(ep, -1/(2*float64(n))))
		},
		cutoff:   "-3 dB point",
		cutoffDB: func(Stage) (float64, bool) { return halfPowerDB, true },
	},
	{
		name: Chebyshev1, keys: classicalKeys, check: checkClassical, build: buildClassical,
		prototype:  func(_ Stage, n int, rp, _ float64) ZPK { return cheby1Prototype(n, rp) },
		order:      chebyOrder,
		cutoff:     "passband edge (where the response leaves the ripple band)",
		cutoffDB:   func(st Stage) (float64, bool) { return -st.RippleDB, true },
		needRipple: true,
	},
	{
		name: Chebyshev2, keys: classicalKeys, check: checkClassical, build: buildClassical,
		prototype: func(_ Stage, n int, _, rs float64) ZPK { return cheby2Prototype(n, rs) },
		order:     chebyOrder,
		natural: func(response string, pb []float64, n int, ep, es float64) []float64 {
			// The stopband edge that gives exactly the ripple at the passband edge.
			return cheby2Natural(response, pb, 1/math.Cosh(math.Acosh(math.Sqrt(es/ep))/float64(n)))
		},
		cutoff:    "stopband edge (where the attenuation first reaches attenuation_db)",
		cutoffDB:  func(st Stage) (float64, bool) { return -st.AttenuationDB, true },
		needAtten: true,
	},
	{
		name: Elliptic, keys: classicalKeys, check: checkClassical, build: buildClassical,
		prototype: func(_ Stage, n int, rp, rs float64) ZPK { return ellipPrototype(n, rp, rs) },
		// Degree equation N = K(k) K'(k1) / (K'(k) K(k1)) (Parks & Burrus
		// 1987, eq. 7.60).
		order: func(nat, ep, es float64) float64 {
			m0 := 1 / (nat * nat)
			m1 := ep / es
			return ellipK(m0) * ellipKm1(m1) / (ellipKm1(m0) * ellipK(m1))
		},
		cutoff:     "passband edge (where the response leaves the ripple band)",
		cutoffDB:   func(st Stage) (float64, bool) { return -st.RippleDB, true },
		needRipple: true, needAtten: true,
	},
	{
		name: Bessel, keys: append(append([]string(nil), classicalKeys...), "bessel_norm"),
		check: checkClassical, build: buildClassical,
		prototype: func(st Stage, n int, _, _ float64) ZPK {
			norm := st.BesselNorm
			if norm == "" {
				norm = NormPhase
			}
			return besselPrototype(n, norm)
		},
		cutoff:   "see bessel_norm",
		maxOrder: MaxBesselOrder, maxOrderWhy: ", where its polynomial's roots are still found accurately in float64",
		cutoffDB: func(st Stage) (float64, bool) {
			return halfPowerDB, st.BesselNorm == NormMagnitude
		},
	},
	{
		name: Notch, keys: []string{"fundamental_hz", "harmonics", "bandwidth_hz", "q", "odd_harmonics_only", "tracking"},
		check: validateNotch, build: buildNotch,
		cutoff: "none: notches at fundamental_hz and its harmonics",
	},
	{
		name: Weighting, keys: []string{"curve"},
		check: checkWeighting, build: buildWeighting,
		cutoff: "none: the curve its standard defines",
	},
	{
		name: BandFamily, keys: []string{"fraction", "midband_hz"},
		check: checkBand, build: buildBand,
		cutoff: "none: the band edges of IEC 61260-1 (-3 dB)",
	},
}

// classicalKeys are the keys of the classical families (Butterworth,
// Chebyshev I and II, elliptic, Bessel).
var classicalKeys = []string{"response", "order", "cutoff_hz", "passband_hz", "stopband_hz", "ripple_db", "attenuation_db"}

// halfPowerDB is -3.0103 dB, 10 log10(1/2).
var halfPowerDB = 10 * math.Log10(0.5)

// chebyOrder is the minimum order of Chebyshev I and II (Parks & Burrus
// 1987, eq. 7.41).
func chebyOrder(nat, ep, es float64) float64 {
	return math.Acosh(math.Sqrt(es/ep)) / math.Acosh(nat)
}

// lookupFamily returns the family table's row for name.
func lookupFamily(name string) (*family, bool) {
	for i := range families {
		if families[i].name == name {
			return &families[i], true
		}
	}
	return nil, false
}

// Families lists the family names of the family table, in its order.
func Families() []string {
	out := make([]string, len(families))
	for i, f := range families {
		out[i] = f.name
	}
	return out
}

// familyList is the family names as prose: "a, b or c".
func familyList() string {
	n := Families()
	if len(n) == 1 {
		return n[0]
	}
	return strings.Join(n[:len(n)-1], ", ") + " or " + n[len(n)-1]
}

// setKeys lists the JSON names of the keys set (non-zero) in st, other
// than "family", in the order of Stage's fields. It reads the struct tags,
// so a key added to Stage is covered without further code.
func setKeys(st Stage) []string {
	v := reflect.ValueOf(st)
	t := v.Type()
	var out []string
	for i := 0; i < t.NumField(); i++ {
		name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ",")
		if name == "" || name == "-" || name == "family" {
			continue
		}
		if !v.Field(i).IsZero() {
			out = append(out, name)
		}
	}
	return out
}

// checkKeys refuses keys that the family does not take.
func (f *family) checkKeys(st Stage) error {
	var extra []string
	for _, k := range setKeys(st) {
		found := false
		for _, a := range f.keys {
			if a == k {
				found = true
				break
			}
		}
		if !found {
			extra = append(extra, k)
		}
	}
	if len(extra) == 0 {
		return nil
	}
	return errorf(ErrInvalid, "invalid spec: %s %s not apply to the %s family, which takes %s; remove %s",
		strings.Join(extra, ", "), pick(len(extra) == 1, "does", "do"), f.name, strings.Join(f.keys, ", "), pick(len(extra) == 1, "it", "them"))
}

func pick(c bool, a, b string) string {
	if c {
		return a
	}
	return b
}

// buildClassical designs a classical family (one with a prototype) in
// order form or tolerance form.
func buildClassical(fam *family, d *Designed, rate, passes float64) error {
	st := d.Spec
	if st.Order > 0 {
		d.Form = FormOrder
		d.Order = st.Order
		wn := make([]float64, len(st.CutoffHz))
		for i, hz := range st.CutoffHz {
			wn[i] = Prewarp(hz, rate)
		}
		d.ZPK = Bilinear(analogDesign(fam, st, st.Order, wn, st.RippleDB, st.AttenuationDB))
		d.EdgesHz = append([]float64(nil), st.CutoffHz...)
	} else {
		d.Form = FormTolerance
		pb := make([]float64, len(st.PassbandHz))
		for i, hz := range st.PassbandHz {
			pb[i] = Prewarp(hz, rate)
		}
		sb := make([]float64, len(st.StopbandHz))
		for i, hz := range st.StopbandHz {
			sb[i] = Prewarp(hz, rate)
		}
		rp, rs := st.RippleDB/passes, st.AttenuationDB/passes
		n, wn := minOrder(fam, st.Response, pb, sb, rp, rs)
		if n > MaxOrder {
			return errorf(ErrOrderLimit, "the tolerances need a %s filter of order %d, above the limit of %d: widen the transition band, allow more ripple or ask for less attenuation", st.Family, n, MaxOrder)
		}
		d.Order = n
		d.ZPK = Bilinear(analogDesign(fam, st, n, wn, rp, rs))
		d.ExactEdge = "passband"
		for _, w := range wn {
			d.EdgesHz = append(d.EdgesHz, unwarp(w, rate))
		}
	}
	if want := d.Order * (1 + len(st.CutoffHz)/2 + len(st.PassbandHz)/2); len(d.ZPK.Poles) != want {
		return errorf(ErrUnstable, "the %s design of order %d came out with %d poles instead of %d; lower the order", st.Family, d.Order, len(d.ZPK.Poles), want)
	}
	return nil
}

// analogDesign returns the analog filter on the pre-warped axis.
func analogDesign(fam *family, st Stage, n int, wn []float64, rp, rs float64) ZPK {
	proto := fam.prototype(st, n, rp, rs)
	switch st.Response {
	case Lowpass:
		return toLowpass(proto, wn[0])
	case Highpass:
		return toHighpass(proto, wn[0])
	case Bandpass:
		return toBandpass(proto, math.Sqrt(wn[0]*wn[1]), wn[1]-wn[0])
	default:
		return toBandstop(proto, math.Sqrt(wn[0]*wn[1]), wn[1]-wn[0])
	}
}

// buildNotch designs a comb of second-order notches.
func buildNotch(_ *family, d *Designed, rate, passes float64) error {
	d.Form = FormNotch
	centres, widths, err := notchCentres(d.Spec, rate)
	if err != nil {
		return err
	}
	// Each pass is down by 3/passes dB at the edges, so that the
	// effective response is -3 dB there.
	g2 := math.Pow(0.5, 1/passes)
	var all ZPK
	all.Gain = 1
	for i, c := range centres {
		n := notchZPK(c, widths[i], rate, g2)
		all.Zeros = append(all.Zeros, n.Zeros...)
		all.Poles = append(all.Poles, n.Poles...)
		all.Gain *= n.Gain
		d.notchGains = append(d.notchGains, n.Gain)
	}
	d.ZPK, d.Order = all, len(centres)
	d.NotchHz, d.NotchBandwidthHz = centres, widths
	d.EdgesHz = centres
	return nil
}
