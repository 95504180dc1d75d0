package design

import (
	"math"
	"math/cmplx"
)

// Frequency transforms of an analog low-pass prototype (cutoff 1 rad/s)
// applied to its zeros and poles, never to polynomials (Parks & Burrus,
// "Digital Filter Design", 1987, section 7.8). wo is the target cutoff or
// band centre and bw the bandwidth, in rad/s of the pre-warped axis.

// toLowpass: s -> s/wo.
func toLowpass(f ZPK, wo float64) ZPK {
	deg := len(f.Poles) - len(f.Zeros)
	return ZPK{
		Zeros: scale(f.Zeros, wo),
		Poles: scale(f.Poles, wo),
		Gain:  f.Gain * math.Pow(wo, float64(deg)),
	}
}

// toHighpass: s -> wo/s. The zeros at infinity move to s = 0.
func toHighpass(f ZPK, wo float64) ZPK {
	deg := len(f.Poles) - len(f.Zeros)
	z := make([]complex128, 0, len(f.Poles))
	for _, v := range f.Zeros {
		z = append(z, complex(wo, 0)/v)
	}
	for i := 0; i < deg; i++ {
		z = append(z, 0)
	}
	p := make([]complex128, len(f.Poles))
	for i, v := range f.Poles {
		p[i] = complex(wo, 0) / v
	}
	return ZPK{Zeros: z, Poles: p, Gain: f.Gain * real(prodNeg(f.Zeros)/prodNeg(f.Poles))}
}

// toBandpass: s -> (s^2 + wo^2) / (s bw). Each root r becomes the two
// roots of x^2 - r bw x + wo^2; the zeros at infinity become zeros at
// s = 0 (one per missing zero) and stay at infinity (the other half).
func toBandpass(f ZPK, wo, bw float64) ZPK {
	deg := len(f.Poles) - len(f.Zeros)
	split := func(r []complex128) []complex128 {
		out := make([]complex128, 0, 2*len(r))
		for _, v := range r {
			h := v * complex(bw/2, 0)
			d := cmplx.Sqrt(h*h - complex(wo*wo, 0))
			out = append(out, h+d, h-d)
		}
		return out
	}
	z := split(f.Zeros)
	for i := 0; i < deg; i++ {
		z = append(z, 0)
	}
	return ZPK{Zeros: z, Poles: split(f.Poles), Gain: f.Gain * math.Pow(bw, float64(deg))}
}

// toBandstop: s -> s bw / (s^2 + wo^2). The zeros at infinity become
// zeros at +-j wo.
func toBandstop(f ZPK, wo, bw float64) ZPK {
	deg := len(f.Poles) - len(f.Zeros)
	split := func(r []complex128) []complex128 {
		out := make([]complex128, 0, 2*len(r))
		for _, v := range r {
			h := complex(bw/2, 0) / v
			d := cmplx.Sqrt(h*h - complex(wo*wo, 0))
			out = append(out, h+d, h-d)
		}
		return out
	}
	z := split(f.Zeros)
	for i := 0; i < deg; i++ {
		z = append(z, complex(0, wo), complex(0, -wo))
	}
	return ZPK{Zeros: z, Poles: split(f.Poles), Gain: f.Gain * real(prodNeg(f.Zeros)/prodNeg(f.Poles))}
}

// Bilinear maps an analog filter on the pre-warped axis to the z-plane
// with s = (1 - z^-1) / (1 + z^-1), that is z = (1 + s) / (1 - s). Zeros
// at infinity go to z = -1. The analog frequency Omega and the digital
// frequency omega (rad/sample) are then related by Omega = tan(omega/2)
// (Oppenheim & Schafer, "Discrete-Time Signal Processing", 3rd ed.,
// section 7.2.1, eqs. 7.20-7.26, with T = 2).
func Bilinear(f ZPK) ZPK {
	deg := len(f.Poles) - len(f.Zeros)
	z := make([]complex128, 0, len(f.Poles))
	num := complex(1, 0)
	for _, v := range f.Zeros {
		z = append(z, (1+v)/(1-v))
		num *= 1 - v
	}
	for i := 0; i < deg; i++ {
		z = append(z, -1)
	}
	p := make([]complex128, len(f.Poles))
	den := complex(1, 0)
	for i, v := range f.Poles {
		p[i] = (1 + v) / (1 - v)
		den *= 1 - v
	}
	return ZPK{Zeros: z, Poles: p, Gain: f.Gain * real(num/den)}
}

// Prewarp returns the analog frequency Omega = tan(pi f / rate) that the
// bilinear transform maps onto f Hz at the given sample rate.
func Prewarp(hz, rate float64) float64 {
	return math.Tan(math.Pi * hz / rate)
}

// unwarp is the inverse of Prewarp.
func unwarp(omega, rate float64) float64 {
	return math.Atan(omega) * rate / math.Pi
}

func scale(r []complex128, s float64) []complex128 {
	out := make([]complex128, len(r))
	for i, v := range r {
		out[i] = v * complex(s, 0)
	}
	return out
}
