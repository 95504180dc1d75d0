package analyze

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ErrInvalidOption is wrapped by every error about an option value that can
// never be right (a negative length, an overlap not below the segment).
var ErrInvalidOption = errors.New("invalid option")

// ErrUnsupported is wrapped by errors about a well-formed request that this
// package does not provide (an unknown window name, confidence intervals for
// median averaging).
var ErrUnsupported = errors.New("unsupported")

// ErrShortSignal is wrapped when a signal is shorter than one segment.
var ErrShortSignal = errors.New("signal shorter than one segment")

// WindowKind names a window family.
type WindowKind int

// The window families. The zero value is Hann.
const (
	Hann           WindowKind = iota // raised cosine, a = 0.5, 0.5
	Hamming                          // a = 0.54, 0.46
	BlackmanHarris                   // 4-term, -92 dB sidelobes
	FlatTop                          // 5-term flat top, for reading tone levels
	Kaiser                           // Kaiser-Bessel with shape Beta
	Rectangular                      // all ones
)

var windowNames = [...]string{
	Hann:           "hann",
	Hamming:        "hamming",
	BlackmanHarris: "blackman-harris",
	FlatTop:        "flat-top",
	Kaiser:         "kaiser",
	Rectangular:    "rectangular",
}

// Window selects a data window. The zero value is the periodic Hann window.
//
// All windows are built here in their periodic (DFT-even) form, w[t] for
// t = 0..n-1 being the first n points of the symmetric window of length n+1,
// as spectral estimation uses and as scipy.signal.get_window returns by
// default. gonum's dsp/window functions are symmetric and are not used.
type Window struct {
	Kind WindowKind
	// Beta is the Kaiser shape parameter (>= 0); ignored by other kinds.
	Beta float64
}

// String returns the window's name as ParseWindow accepts it: "hann",
// "hamming", "blackman-harris", "flat-top", "rectangular", or "kaiser:BETA".
func (w Window) String() string {
	if w.Kind == Kaiser {
		return "kaiser:" + strconv.FormatFloat(w.Beta, 'g', -1, 64)
	}
	if w.Kind >= 0 && int(w.Kind) < len(windowNames) {
		return windowNames[w.Kind]
	}
	return "WindowKind(" + strconv.Itoa(int(w.Kind)) + ")"
}

// ParseWindow parses a window name as printed by Window.String. A Kaiser
// window needs its beta: "kaiser:8.6".
func ParseWindow(s string) (Window, error) {
	name, arg, hasArg := strings.Cut(strings.ToLower(strings.TrimSpace(s)), ":")
	for k, n := range windowNames {
		if n != name {
			continue
		}
		w := Window{Kind: WindowKind(k)}
		if w.Kind != Kaiser {
			if hasArg {
				return Window{}, fmt.Errorf("analyze: %w: window %q takes no parameter", ErrInvalidOption, s)
			}
			return w, nil
		}
		if !hasArg {
			return Window{}, fmt.Errorf("analyze: %w: window %q needs a beta, as in \"kaiser:8.6\"", ErrInvalidOption, s)
		}
		b, err := strconv.ParseFloat(arg, 64)
		if err != nil {
			return Window{}, fmt.Errorf("analyze: %w: kaiser beta %q: %w", ErrInvalidOption, arg, err)
		}
		w.Beta = b
		return w, w.validate()
	}
	return Window{}, fmt.Errorf("analyze: %w window %q (known: hann, hamming, blackman-harris, flat-top, kaiser:BETA, rectangular)", ErrUnsupported, s)
}

func (w Window) validate() error {
	if w.Kind < 0 || int(w.Kind) >= len(windowNames) {
		return fmt.Errorf("analyze: %w window kind %d", ErrUnsupported, int(w.Kind))
	}
	if w.Kind == Kaiser && !(w.Beta >= 0 && w.Beta <= 700) {
		// I0(700) is about 1e302; beyond it the normalisation overflows.
		return fmt.Errorf("analyze: %w: kaiser beta %g outside [0, 700]", ErrInvalidOption, w.Beta)
	}
	return nil
}

// Cosine-sum coefficients a_k of w[t] = sum_k (-1)^k a_k cos(2 pi k t / n).
// Hann and Hamming: Harris, "On the use of windows for harmonic analysis with
// the discrete Fourier transform", Proc. IEEE 66(1), 1978, eqs. (27b), (30b).
// Blackman-Harris 4-term: Harris 1978, Table I ("-92 dB"). Flat top: the
// 5-term coefficients of scipy.signal.windows.flattop (SciPy 1.10.1 source,
// after D'Antona & Ferrero, "Digital Signal Processing for Measurement
// Systems", 2006, p. 70).
var cosineTerms = map[WindowKind][]float64{
	Hann:           {0.5, 0.5},
	Hamming:        {0.54, 0.46},
	BlackmanHarris: {0.35875, 0.48829, 0.14128, 0.01168},
	FlatTop:        {0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368},
}

// Coefficients writes the periodic window of length len(dst) into dst and
// returns it; a nil dst with n > 0 is allocated. It panics if dst is not nil
// and len(dst) != n, or if the window is invalid (check with ParseWindow or
// NewEstimator first).
func (w Window) Coefficients(dst []float64, n int) []float64 {
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("analyze: window length mismatch")
	}
	if err := w.validate(); err != nil {
		panic(err.Error())
	}
	switch w.Kind {
	case Rectangular:
		for i := range dst {
			dst[i] = 1
		}
	case Kaiser:
		// w[t] = I0(beta sqrt(1 - (2t/n - 1)^2)) / I0(beta), the symmetric
		// Kaiser window of length n+1 without its last point (Harris 1978,
		// eq. (46); Oppenheim & Schafer, "Discrete-Time Signal Processing",
		// 3rd ed., eq. (7.72)).
		den := besselI0(w.Beta)
		for t := range dst {
			r := 2*float64(t)/float64(n) - 1
			dst[t] = besselI0(w.Beta*math.Sqrt(math.Max(0, 1-r*r))) / den
		}
	default:
		a := cosineTerms[w.Kind]
		for t := range dst {
			v, sign := 0.0, 1.0
			for k, ak := range a {
				v += sign * ak * math.Cos(2*math.Pi*float64(k*t%n)/float64(n))
				sign = -sign
			}
			dst[t] = v
		}
	}
	return dst
}

// mainLobeHalfWidth is the distance in bins from the centre of the window's
// transform to its first null; a tone's power outside it is leakage. A cosine
// sum of K terms is K shifted Dirichlet kernels whose first common null is at
// K bins (Hann and Hamming 2, Blackman-Harris 4, the 5-term flat top 5;
// Harris 1978, Table I lists the same main-lobe widths). Kaiser: the
// transform of the continuous window, sinh(sqrt(beta^2 - x^2)) /
// sqrt(beta^2 - x^2) with x = pi f (f in bins), has its first null where
// x^2 = beta^2 + pi^2, i.e. at sqrt(1 + (beta/pi)^2) bins (Harris 1978,
// sec. V.E; derived here, the section cited from memory).
func (w Window) mainLobeHalfWidth() float64 {
	switch w.Kind {
	case Rectangular:
		return 1
	case Kaiser:
		return math.Sqrt(1 + (w.Beta/math.Pi)*(w.Beta/math.Pi))
	default:
		return float64(len(cosineTerms[w.Kind]))
	}
}

// besselI0 is the modified Bessel function of the first kind of order 0 by
// its power series I0(x) = sum_k ((x/2)^k / k!)^2 (Abramowitz & Stegun,
// "Handbook of Mathematical Functions", eq. 9.6.12), which converges for all
// x; the terms are summed until they no longer change the sum.
func besselI0(x float64) float64 {
	q := x * x / 4
	sum, term := 1.0, 1.0
	for k := 1.0; k < 1000; k++ {
		term *= q / (k * k)
		sum += term
		if term < sum*1e-17 {
			break
		}
	}
	return sum
}
