package design

import (
	"math"
	"math/cmplx"
	"sort"
)

// Analog low-pass prototypes with their critical frequency at 1 rad/s.
// Each returns zeros, poles and gain of H(s) = k prod(s - z) / prod(s - p).

// butterPrototype: poles evenly spaced on the left unit half circle,
// p_m = -exp(j pi m / (2N)) for m = -N+1, -N+3, ..., N-1
// (Parks & Burrus, "Digital Filter Design", 1987, eq. 7.11). |H(j1)|^2 = 1/2.
func butterPrototype(n int) ZPK {
	p := make([]complex128, 0, n)
	for m := -n + 1; m < n; m += 2 {
		if m == 0 {
			p = append(p, -1)
			continue
		}
		p = append(p, -cmplx.Exp(complex(0, math.Pi*float64(m)/float64(2*n))))
	}
	return ZPK{Poles: p, Gain: 1}
}

// cheby1Prototype: equiripple passband of rp dB up to 1 rad/s.
// Poles -sinh(mu + j theta_m), mu = asinh(1/eps)/N, eps^2 = 10^(rp/10) - 1
// (Parks & Burrus 1987, eq. 7.37). The gain puts the peaks at 0 dB.
func cheby1Prototype(n int, rp float64) ZPK {
	eps2 := math.Expm1(rp / 10 * math.Ln10)
	eps := math.Sqrt(eps2)
	mu := math.Asinh(1/eps) / float64(n)
	p := make([]complex128, 0, n)
	for m := -n + 1; m < n; m += 2 {
		theta := math.Pi * float64(m) / float64(2*n)
		p = append(p, -cmplx.Sinh(complex(mu, theta)))
	}
	k := real(prodNeg(p))
	if n%2 == 0 {
		k /= math.Sqrt(1 + eps2)
	}
	return ZPK{Poles: p, Gain: k}
}

// cheby2Prototype: equiripple stopband at least rs dB down from 1 rad/s on.
// Poles are the reciprocals of Chebyshev I-like poles and zeros lie at
// j / sin((2m-1) pi / (2N)) (Parks & Burrus 1987, eqs. 7.47-7.48).
func cheby2Prototype(n int, rs float64) ZPK {
	de := 1 / math.Sqrt(math.Expm1(rs/10*math.Ln10))
	mu := math.Asinh(1/de) / float64(n)
	var z []complex128
	for m := -n + 1; m < n; m += 2 {
		if m == 0 {
			continue // odd order: that zero is at infinity
		}
		z = append(z, cmplx.Conj(complex(0, -1)/complex(math.Sin(float64(m)*math.Pi/float64(2*n)), 0)))
	}
	p := make([]complex128, 0, n)
	for m := -n + 1; m < n; m += 2 {
		b := -cmplx.Exp(complex(0, math.Pi*float64(m)/float64(2*n)))
		q := complex(math.Sinh(mu)*real(b), math.Cosh(mu)*imag(b))
		p = append(p, 1/q)
	}
	k := real(prodNeg(p) / prodNeg(z))
	return ZPK{Zeros: z, Poles: p, Gain: k}
}

// ellipPrototype: equiripple in both bands, rp dB of passband ripple up to
// 1 rad/s and rs dB of stopband attenuation. The modulus comes from the
// degree equation; zeros at j/(k sn(j_i K/N)), poles from Jacobi's
// imaginary transformation of the ripple parameter (Daniels, "Approximation
// Methods for Electronic Filter Design", 1974, ch. 5; Parks & Burrus 1987,
// section 7.5).
func ellipPrototype(n int, rp, rs float64) ZPK {
	eps2 := math.Expm1(rp / 10 * math.Ln10)
	if n == 1 {
		p := -math.Sqrt(1 / eps2)
		return ZPK{Poles: []complex128{complex(p, 0)}, Gain: -p}
	}
	m1 := eps2 / math.Expm1(rs/10*math.Ln10)
	k1 := ellipK(m1)
	m := ellipDegree(n, m1)
	capK := ellipK(m)
	var z []complex128
	var p []complex128
	v0 := capK * arcScImag(1/math.Sqrt(eps2), m1) / (float64(n) * k1)
	sv, cv, dv := ellipJ(v0, 1-m)
	const tiny = 2.220446049250313e-16
	for j := 1 - n%2; j < n; j += 2 {
		s, c, d := ellipJ(float64(j)*capK/float64(n), m)
		if math.Abs(s) > tiny {
			zi := complex(0, 1/(math.Sqrt(m)*s))
			z = append(z, zi, cmplx.Conj(zi))
		}
		den := 1 - (d*sv)*(d*sv)
		pi := complex(-c*d*sv*cv/den, -s*dv/den)
		if math.Abs(imag(pi)) > tiny*cmplx.Abs(pi) {
			p = append(p, pi, cmplx.Conj(pi))
		} else {
			p = append(p, complex(real(pi), 0))
		}
	}
	k := real(prodNeg(p) / prodNeg(z))
	if n%2 == 0 {
		k /= math.Sqrt(1 + eps2)
	}
	return ZPK{Zeros: z, Poles: p, Gain: k}
}

// besselPrototype: maximally flat group delay. The poles are the roots of
// the reverse Bessel polynomial theta_N(s) = sum_k (2N-k)! / (2^(N-k) k! (N-k)!) s^k
// (Thomson 1949; Parks & Burrus 1987, eq. 7.72), which gives a group
// delay of 1 s at DC ("delay" normalisation). "phase" scales the poles so
// that their product is 1, so that the asymptotes meet at 1 rad/s as for a
// Butterworth; "magnitude" scales them so that |H(j1)| = 1/sqrt(2).
func besselPrototype(n int, norm string) ZPK {
	coef := reverseBessel(n) // coef[k] multiplies s^k
	p := polyRoots(coef)
	a0 := coef[0]
	switch norm {
	case NormDelay:
		return ZPK{Poles: p, Gain: a0}
	case NormMagnitude:
		w := besselHalfPower(p, a0)
		for i := range p {
			p[i] /= complex(w, 0)
		}
		return ZPK{Poles: p, Gain: a0 * math.Pow(w, -float64(n))}
	default: // phase
		f := math.Pow(10, -math.Log10(a0)/float64(n))
		for i := range p {
			p[i] *= complex(f, 0)
		}
		return ZPK{Poles: p, Gain: 1}
	}
}

// reverseBessel returns the coefficients of theta_n, lowest power first.
func reverseBessel(n int) []float64 {
	// theta_n(s) coefficients a_k = (2n-k)! / (2^(n-k) k! (n-k)!) (Thomson
	// 1949), built down from a_n = 1 by the ratio of consecutive ones,
	// a_{k-1} = a_k k (2n-k+1) / (2 (n-k+1)): exact integers as long as
	// float64 holds them, and finite far beyond.
	c := make([]float64, n+1)
	c[n] = 1
	for k := n; k > 0; k-- {
		c[k-1] = c[k] * float64(2*n-k+1) * float64(k) / (2 * float64(n-k+1))
	}
	return c
}

// besselHalfPower finds w with |H(jw)| = 1/sqrt(2) for H = k / prod(s - p),
// by bisection on the monotone log magnitude.
func besselHalfPower(p []complex128, k float64) float64 {
	f := func(w float64) float64 {
		s := 0.0
		for _, pi := range p {
			s += math.Log(cmplx.Abs(complex(0, w) - pi))
		}
		return s - math.Log(k) - 0.5*math.Ln2
	}
	lo, hi := 0.0, 1.0
	for f(hi) < 0 {
		hi *= 2
	}
	for i := 0; i < 200 && hi-lo > 1e-16*hi; i++ {
		mid := (lo + hi) / 2
		if f(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// polyRoots returns the roots of sum c[k] x^k (real coefficients, c[n] != 0)
// by the Aberth-Ehrlich simultaneous iteration, then Newton polishing, and
// makes conjugate pairs exact.
func polyRoots(c []float64) []complex128 {
	n := len(c) - 1
	if n < 1 {
		return nil
	}
	eval := func(x complex128) (complex128, complex128) {
		v := complex(c[n], 0)
		d := complex(0, 0)
		for k := n - 1; k >= 0; k-- {
			d = d*x + v
			v = v*x + complex(c[k], 0)
		}
		return v, d
	}
	// Start on a circle of the roots' geometric-mean radius, rotated off the axes.
	r := math.Pow(math.Abs(c[0]/c[n]), 1/float64(n))
	x := make([]complex128, n)
	for i := range x {
		x[i] = cmplx.Rect(r, 2*math.Pi*(float64(i)+0.25)/float64(n)+0.4)
	}
	for iter := 0; iter < 500; iter++ {
		maxStep := 0.0
		for i := range x {
			v, d := eval(x[i])
			if v == 0 {
				continue
			}
			ratio := v / d
			sum := complex(0, 0)
			for j := range x {
				if j != i {
					sum += 1 / (x[i] - x[j])
				}
			}
			step := ratio / (1 - ratio*sum)
			x[i] -= step
			if a := cmplx.Abs(step) / (cmplx.Abs(x[i]) + 1e-300); a > maxStep {
				maxStep = a
			}
		}
		if maxStep < 1e-15 {
			break
		}
	}
	for i := range x {
		for it := 0; it < 3; it++ {
			v, d := eval(x[i])
			if d == 0 {
				break
			}
			x[i] -= v / d
		}
	}
	return conjugateClean(x)
}

// conjugateClean makes nearly real roots real and nearly conjugate pairs
// exact conjugates, then orders them by real part then imaginary part.
func conjugateClean(x []complex128) []complex128 {
	out := make([]complex128, 0, len(x))
	var upper []complex128
	for _, v := range x {
		switch {
		case math.Abs(imag(v)) <= 1e-10*cmplx.Abs(v):
			out = append(out, complex(real(v), 0))
		case imag(v) > 0:
			upper = append(upper, v)
		}
	}
	for _, v := range upper {
		out = append(out, v, cmplx.Conj(v))
	}
	sortRoots(out)
	return out
}

func sortRoots(x []complex128) {
	sort.Slice(x, func(i, j int) bool {
		if real(x[i]) != real(x[j]) {
			return real(x[i]) < real(x[j])
		}
		return imag(x[i]) < imag(x[j])
	})
}

// prodNeg returns prod(-x); 1 for an empty slice.
func prodNeg(x []complex128) complex128 {
	r := complex(1, 0)
	for _, v := range x {
		r *= -v
	}
	return r
}
