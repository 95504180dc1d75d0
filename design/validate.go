package design

import (
	"fmt"
	"math"
	"strings"
)

// validate checks a stage against the rate before anything is designed:
// its family's row, the keys that family takes, then the row's own
// checks. Every message says what is wrong and what would be accepted.
func validate(st Stage, rate float64) error {
	if st.Family == "" {
		return errorf(ErrInvalid, "invalid spec: no family given; use one of %s", familyList())
	}
	fam, ok := lookupFamily(st.Family)
	if !ok {
		return errorf(ErrUnsupported, "unsupported family %q; use one of %s", st.Family, familyList())
	}
	if err := fam.checkKeys(st); err != nil {
		return err
	}
	return fam.check(fam, st, rate)
}

// checkClassical checks a stage of a classical family (one with a
// prototype: order form or tolerance form).
func checkClassical(fam *family, st Stage, rate float64) error {
	nEdges := 1
	switch st.Response {
	case Lowpass, Highpass:
	case Bandpass, Bandstop:
		nEdges = 2
	case "":
		return errorf(ErrInvalid, "invalid spec: no response given for %s; use lowpass, highpass, bandpass or bandstop", st.Family)
	default:
		return errorf(ErrUnsupported, "unsupported response %q; use lowpass, highpass, bandpass or bandstop", st.Response)
	}
	if st.BesselNorm != "" {
		switch st.BesselNorm {
		case NormPhase, NormDelay, NormMagnitude:
		default:
			return errorf(ErrUnsupported, "unsupported bessel_norm %q; use phase, delay or magnitude", st.BesselNorm)
		}
	}
	tolerance := len(st.PassbandHz) > 0 || len(st.StopbandHz) > 0
	if tolerance {
		return validateTolerance(fam, st, rate, nEdges)
	}
	if st.Order == 0 && len(st.CutoffHz) > 0 {
		return errorf(ErrInvalid, "invalid spec: cutoff_hz needs order, the prototype order (for example 4); or, for the minimum order, give passband_hz, stopband_hz, ripple_db and attenuation_db instead of cutoff_hz")
	}
	if st.Order == 0 && len(st.CutoffHz) == 0 {
		return errorf(ErrInvalid, "invalid spec: give order and cutoff_hz, or passband_hz, stopband_hz, ripple_db and attenuation_db for the minimum order")
	}
	if st.Order < 1 || st.Order > MaxOrder {
		return errorf(ErrInvalid, "invalid order %d: it must be from 1 to %d (a band response has twice as many poles)", st.Order, MaxOrder)
	}
	if fam.maxOrder > 0 && st.Order > fam.maxOrder {
		return errorf(ErrInvalid, "invalid order %d: %s designs are limited to order %d%s", st.Order, st.Family, fam.maxOrder, fam.maxOrderWhy)
	}
	if len(st.CutoffHz) != nEdges {
		return errorf(ErrInvalid, "invalid spec: a %s needs %d cutoff_hz value(s), got %d", st.Response, nEdges, len(st.CutoffHz))
	}
	if err := checkEdges("cutoff_hz", st.CutoffHz, rate); err != nil {
		return err
	}
	if err := checkLevels(st, fam.needRipple, fam.needAtten); err != nil {
		return err
	}
	return nil
}

// MaxBesselOrder is the highest Bessel prototype order accepted.
const MaxBesselOrder = 25

func validateTolerance(fam *family, st Stage, rate float64, nEdges int) error {
	if fam.order == nil {
		return errorf(ErrInvalid, "invalid spec: %s has no tolerance form (its order is not set by edges); give order and cutoff_hz", st.Family)
	}
	if st.Order != 0 || len(st.CutoffHz) > 0 {
		return errorf(ErrInvalid, "invalid spec: give either order and cutoff_hz, or passband_hz and stopband_hz for the minimum order, not both")
	}
	if len(st.PassbandHz) != nEdges || len(st.StopbandHz) != nEdges {
		return errorf(ErrInvalid, "invalid spec: a %s needs %d passband_hz and %d stopband_hz value(s), got %d and %d", st.Response, nEdges, nEdges, len(st.PassbandHz), len(st.StopbandHz))
	}
	if err := checkEdges("passband_hz", st.PassbandHz, rate); err != nil {
		return err
	}
	if err := checkEdges("stopband_hz", st.StopbandHz, rate); err != nil {
		return err
	}
	p, s := st.PassbandHz, st.StopbandHz
	var ok bool
	var want string
	switch st.Response {
	case Lowpass:
		ok, want = p[0] < s[0], "the passband edge below the stopband edge"
	case Highpass:
		ok, want = s[0] < p[0], "the stopband edge below the passband edge"
	case Bandpass:
		ok, want = s[0] < p[0] && p[1] < s[1], "stopband_hz[0] < passband_hz[0] < passband_hz[1] < stopband_hz[1]"
	default:
		ok, want = p[0] < s[0] && s[1] < p[1], "passband_hz[0] < stopband_hz[0] < stopband_hz[1] < passband_hz[1]"
	}
	if !ok {
		return errorf(ErrInvalid, "invalid spec: the bands of a %s overlap or are out of order (passband %s Hz, stopband %s Hz); it needs %s", st.Response, fmtEdges(p), fmtEdges(s), want)
	}
	if !(st.RippleDB > 0) || !(st.AttenuationDB > 0) {
		return errorf(ErrInvalid, "invalid spec: the tolerance form needs ripple_db > 0 and attenuation_db > 0 (got %g and %g)", st.RippleDB, st.AttenuationDB)
	}
	if !(st.RippleDB < st.AttenuationDB) {
		return errorf(ErrInvalid, "invalid spec: ripple_db %g must be below attenuation_db %g", st.RippleDB, st.AttenuationDB)
	}
	return nil
}

func checkLevels(st Stage, needRipple, needAtten bool) error {
	if needRipple && !(st.RippleDB > 0 && st.RippleDB < 100) {
		return errorf(ErrInvalid, "invalid spec: %s needs ripple_db above 0 dB (and below 100), got %g", st.Family, st.RippleDB)
	}
	if !needRipple && st.RippleDB != 0 {
		return errorf(ErrInvalid, "invalid spec: ripple_db does not apply to %s in order form; remove it", st.Family)
	}
	if needAtten && !(st.AttenuationDB > 0 && st.AttenuationDB < 400) {
		return errorf(ErrInvalid, "invalid spec: %s needs attenuation_db above 0 dB (and below 400), got %g", st.Family, st.AttenuationDB)
	}
	if !needAtten && st.AttenuationDB != 0 {
		return errorf(ErrInvalid, "invalid spec: attenuation_db does not apply to %s in order form; remove it", st.Family)
	}
	if needRipple && needAtten && !(st.RippleDB < st.AttenuationDB) {
		return errorf(ErrInvalid, "invalid spec: ripple_db %g must be below attenuation_db %g", st.RippleDB, st.AttenuationDB)
	}
	return nil
}

func validateNotch(_ *family, st Stage, rate float64) error {
	if !(st.FundamentalHz > 0) || math.IsInf(st.FundamentalHz, 0) {
		return errorf(ErrInvalid, "invalid spec: notch needs fundamental_hz above 0, got %g", st.FundamentalHz)
	}
	if st.FundamentalHz >= rate/2 {
		return valueError(ErrAboveNyquist, "fundamental_hz", st.FundamentalHz, "Hz", fmt.Sprintf("is at or above the Nyquist frequency %g Hz of the %g Hz rate", rate/2, rate))
	}
	if st.Harmonics < 0 {
		return errorf(ErrInvalid, "invalid spec: harmonics %d is negative; omit it for every harmonic below %g Hz", st.Harmonics, float64(DefaultNotchLimitHz))
	}
	switch {
	case st.BandwidthHz != 0 && st.Q != 0:
		return errorf(ErrInvalid, "invalid spec: give bandwidth_hz or q for a notch, not both")
	case st.Q != 0:
		if !(st.Q > 0.5) || math.IsInf(st.Q, 0) {
			return errorf(ErrInvalid, "invalid spec: notch q must be above 0.5, got %g", st.Q)
		}
	default:
		if !(st.BandwidthHz > 0) || math.IsInf(st.BandwidthHz, 0) {
			return errorf(ErrInvalid, "invalid spec: notch bandwidth_hz must be above 0 Hz, got %g", st.BandwidthHz)
		}
	}
	return nil
}

func checkEdges(key string, e []float64, rate float64) error {
	nyq := rate / 2
	for _, f := range e {
		if !(f > 0) || math.IsInf(f, 0) {
			return valueError(ErrInvalid, key, f, "Hz", "must be above 0 Hz")
		}
		if f >= nyq {
			return valueError(ErrAboveNyquist, key, f, "Hz", fmt.Sprintf("is at or above the Nyquist frequency %g Hz of the %g Hz rate; use an edge below %g Hz or a file with a higher rate", nyq, rate, nyq))
		}
	}
	if len(e) == 2 && !(e[0] < e[1]) {
		return errorf(ErrInvalid, "invalid spec: %s edges must be in increasing order, got %s Hz", key, fmtEdges(e))
	}
	return nil
}

func fmtEdges(e []float64) string {
	s := make([]string, len(e))
	for i, v := range e {
		s[i] = fmt.Sprintf("%g", v)
	}
	return strings.Join(s, "-")
}
