package design

import (
	"math"
	"math/cmplx"
)

// csqrt is the principal complex square root.
func csqrt(x complex128) complex128 { return cmplx.Sqrt(x) }

// zpkAt evaluates a digital zeros/poles/gain at w rad/sample.
func zpkAt(f ZPK, w float64) complex128 {
	e := cmplx.Exp(complex(0, w))
	h := complex(f.Gain, 0)
	for _, z := range f.Zeros {
		h *= e - z
	}
	for _, p := range f.Poles {
		h /= e - p
	}
	return h
}

// rootPhase is the continuous phase of the factor (1 - r e^{-jw}) seen in
// the causal form of H(z): for |r| < 1 its real part stays positive, so
// its argument never wraps; for |r| > 1 it is written as
// -r e^{-jw} (1 - e^{jw}/r). A root on the unit circle gives the genuine
// jump of pi where w crosses it.
func rootPhase(r complex128, w float64) float64 {
	e := cmplx.Exp(complex(0, -w))
	if cmplx.Abs(r) <= 1 {
		return cmplx.Phase(1 - r*e)
	}
	return cmplx.Phase(-r) - w + cmplx.Phase(1-1/(r*e))
}

// zpkPhase is the unwrapped phase (rad) of a digital zpk in causal form.
func zpkPhase(f ZPK, w float64) float64 {
	ph := 0.0
	if f.Gain < 0 {
		ph = math.Pi
	}
	for _, z := range f.Zeros {
		ph += rootPhase(z, w)
	}
	for _, p := range f.Poles {
		ph -= rootPhase(p, w)
	}
	// H(z) = k prod(z - z_i)/prod(z - p_i) = k z^(M-N) prod(1 - z_i z^-1)/prod(1 - p_i z^-1).
	return ph + float64(len(f.Zeros)-len(f.Poles))*w
}

// zpkGroupDelay is -d(phase)/dw in samples, from the roots:
// each root r contributes Re[r e^{-jw} / (1 - r e^{-jw})] with sign + for
// poles and - for zeros (Oppenheim & Schafer, "Discrete-Time Signal
// Processing", 3rd ed., eq. 5.83 generalised to complex roots).
func zpkGroupDelay(f ZPK, w float64) float64 {
	e := cmplx.Exp(complex(0, -w))
	gd := 0.0
	term := func(r complex128) float64 {
		x := r * e
		return real(x / (1 - x))
	}
	for _, p := range f.Poles {
		gd += term(p)
	}
	for _, z := range f.Zeros {
		if cmplx.Abs(1-z*e) < 1e-12 {
			continue // a zero on the unit circle exactly at w: delay undefined there
		}
		gd -= term(z)
	}
	return gd - float64(len(f.Zeros)-len(f.Poles))
}

// maxRadius is the largest pole radius.
func maxRadius(p []complex128) float64 {
	r := 0.0
	for _, v := range p {
		r = math.Max(r, cmplx.Abs(v))
	}
	return r
}
