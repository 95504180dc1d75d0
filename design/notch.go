package design

import (
	"fmt"
	"math"
)

// notchZPK returns a second-order digital notch with its null exactly at
// f0 Hz and its edges at the power ratio g2 (1/2 for -3 dB) exactly bw Hz
// apart, at the given rate.
//
// It is the bilinear transform of H(s) = (s^2 + W0^2) / (s^2 + B s + W0^2)
// with W0 = tan(pi f0 / rate). The analog edges where |H|^2 = g2 satisfy
// W2 - W1 = B g/sqrt(1-g^2) and W1 W2 = W0^2; their images under the
// bilinear map then satisfy tan((w2 - w1)/2) = (W2 - W1)/(1 + W0^2), so
// the digital width w2 - w1 is exact when B is set from it (the same
// result as the parametric notch of Orfanidis, "Introduction to Signal
// Processing", 1996, section 11.3, eq. 11.3.7, for g2 = 1/2).
func notchZPK(f0, bw, rate, g2 float64) ZPK {
	w0 := Prewarp(f0, rate)
	width := math.Tan(math.Pi*bw/rate) * (1 + w0*w0) // W2 - W1 of the analog edges
	b := width * math.Sqrt((1-g2)/g2)
	// Poles: roots of s^2 + b s + w0^2.
	disc := complex(b*b/4-w0*w0, 0)
	sq := csqrt(disc)
	analog := ZPK{
		Zeros: []complex128{complex(0, w0), complex(0, -w0)},
		Poles: []complex128{complex(-b/2, 0) + sq, complex(-b/2, 0) - sq},
		Gain:  1,
	}
	return Bilinear(analog)
}

// MaxNotches is the largest number of notches one notch stage may hold.
const MaxNotches = 1024

// DefaultNotchLimitHz bounds a notch stage that gives no harmonics: its
// notches are the fundamental and every harmonic below this frequency.
// Mains hum above 1 kHz rarely stands above a recording's floor, and each
// notch also takes signal out (common practice; a survey lists the
// harmonics that do stand out, and a spec can name them with harmonics).
const DefaultNotchLimitHz = 1000

// CombWarnShare is the share of white-noise power a notch stage may
// remove before Filter.Warnings warns about it.
const CombWarnShare = 0.05

// notchCentres lists the notch frequencies of a notch stage at a rate:
// the fundamental and its harmonics (odd ones only if asked), up to the
// harmonic number given (0: those below DefaultNotchLimitHz), keeping
// each whose band lies below the Nyquist frequency. It also returns the
// bandwidth of each.
func notchCentres(st Stage, rate float64) ([]float64, []float64, error) {
	nyq := rate / 2
	f0 := st.FundamentalHz
	var centres, widths []float64
	for h := 1; ; h++ {
		if st.Harmonics > 0 && h > st.Harmonics {
			break
		}
		if st.OddOnly && h%2 == 0 {
			continue
		}
		f := f0 * float64(h)
		if st.Harmonics == 0 && h > 1 && f >= DefaultNotchLimitHz {
			break
		}
		bw := st.BandwidthHz
		if st.Q > 0 {
			bw = f / st.Q
		}
		if f+bw/2 >= nyq {
			if h == 1 {
				return nil, nil, errorf(ErrAboveNyquist, "notch at %g Hz with %g Hz bandwidth does not fit below the Nyquist frequency %g Hz of the %g Hz rate", f, bw, nyq, rate)
			}
			break
		}
		if f-bw/2 <= 0 {
			return nil, nil, errorf(ErrInvalid, "notch at %g Hz is narrower than its %g Hz bandwidth reaches: use a smaller bandwidth_hz or a larger q", f, bw)
		}
		centres = append(centres, f)
		widths = append(widths, bw)
		if len(centres) > MaxNotches {
			return nil, nil, errorf(ErrOrderLimit, "more than %d notches below the Nyquist frequency %g Hz: set harmonics to limit them", MaxNotches, nyq)
		}
	}
	return centres, widths, nil
}

// NoiseShareRemoved returns the share (0 to 1) of the power of white noise
// that stage i, a notch stage, removes at the filter's rate, from its
// effective response (squared when zero-phase); 0 for other stages.
//
// Each narrow notch is taken alone: near its centre, 1 - |H|^2 of one pass
// of the second-order notch is a Lorentzian L of half-width B/2, where B
// is that pass's own -3 dB width (B = w sqrt((1-g2)/g2) for a pass whose
// edges w apart are at the power ratio g2, as in notchZPK). The integral
// of L is pi B / 2; with two passes 1 - |H|^4 = 2L - L^2 integrates to
// 3 pi B / 4 (integrals of the Lorentzian, derived here). The sum over the
// notches, divided by the Nyquist frequency, is the share; overlapping
// notches make it an overestimate, and it is capped at 1.
func (f *Filter) NoiseShareRemoved(i int) float64 {
	d := f.Stages[i]
	if d.Form != FormNotch {
		return 0
	}
	k, g2 := math.Pi/2, 0.5
	if f.ZeroPhase {
		k, g2 = 3*math.Pi/4, math.Sqrt(0.5)
	}
	var hz float64
	for _, w := range d.NotchBandwidthHz {
		hz += k * w * math.Sqrt((1-g2)/g2)
	}
	return math.Min(1, hz/(f.SampleRate/2))
}

// Warnings lists what a user should know about a design that is valid
// but probably not what was meant: a notch comb that removes more than
// CombWarnShare of broadband (white-noise) power.
func (f *Filter) Warnings() []string {
	var w []string
	for i, d := range f.Stages {
		if s := f.NoiseShareRemoved(i); s > CombWarnShare {
			w = append(w, fmt.Sprintf("stage %d: the %d notches remove about %.0f%% of the power of broadband sound (more than %.0f%%); limit them with harmonics, or narrow them with bandwidth_hz or a larger q", i+1, len(d.NotchHz), 100*s, 100*CombWarnShare))
		}
	}
	return w
}
