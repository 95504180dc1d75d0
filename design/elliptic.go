package design

import (
	"math"
	"math/cmplx"
)

// Jacobi elliptic functions and complete elliptic integrals of the first
// kind, all in terms of the parameter m = k^2.
//
// K(m) comes from the arithmetic-geometric mean, K(m) = pi / (2 AGM(1, sqrt(1-m)))
// (Abramowitz & Stegun 17.6), with the complementary parameter 1-m passed
// in directly where it is small so that nothing is lost to cancellation.
// sn, cn, dn come from the descending Landen / AGM scheme of
// Abramowitz & Stegun 16.4, with the series of 16.13 and 16.15 near m = 0
// and m = 1. The inverse of sn for complex argument runs the descending
// Landen transformation of the modulus (A&S 16.12 and 17.5) until the
// modulus vanishes, where sn becomes sin.

// agm returns the arithmetic-geometric mean of a and b (a, b > 0).
func agm(a, b float64) float64 {
	for i := 0; i < 64; i++ {
		an := (a + b) / 2
		bn := math.Sqrt(a * b)
		if math.Abs(an-bn) <= 1e-16*an {
			return (an + bn) / 2
		}
		a, b = an, bn
	}
	return (a + b) / 2
}

// ellipK returns the complete elliptic integral of the first kind K(m).
func ellipK(m float64) float64 {
	return ellipKm1(1 - m)
}

// ellipKm1 returns K(1-p), accurate for small p.
func ellipKm1(p float64) float64 {
	switch {
	case p <= 0:
		return math.Inf(1)
	case p > 1:
		// K of a negative parameter: A&S 17.4.17, K(-m) = K(m/(1+m))/sqrt(1+m).
		m := 1 - p // negative
		mm := -m
		return ellipK(mm/(1+mm)) / math.Sqrt(1+mm)
	}
	return math.Pi / (2 * agm(1, math.Sqrt(p)))
}

// ellipJ returns sn(u|m), cn(u|m), dn(u|m) for real u and 0 <= m <= 1.
func ellipJ(u, m float64) (sn, cn, dn float64) {
	const machEp = 1.11022302462515654042e-16
	if m < 1e-9 {
		// A&S 16.13.
		t, b := math.Sincos(u)
		ai := 0.25 * m * (u - t*b)
		return t - ai*b, b + ai*t, 1 - 0.5*m*t*t
	}
	if m >= 0.9999999999 {
		// A&S 16.15.
		ai := 0.25 * (1 - m)
		b := math.Cosh(u)
		t := math.Tanh(u)
		phi := 1 / b
		twon := b * math.Sinh(u)
		sn = t + ai*(twon-u)/(b*b)
		ai *= t * phi
		return sn, phi - ai*(twon-u), phi + ai*(twon+u)
	}
	// A&S 16.4: descending AGM.
	var a, c [10]float64
	a[0] = 1
	b := math.Sqrt(1 - m)
	c[0] = math.Sqrt(m)
	twon := 1.0
	i := 0
	for math.Abs(c[i]/a[i]) > machEp && i < 8 {
		ai := a[i]
		i++
		c[i] = (ai - b) / 2
		t := math.Sqrt(ai * b)
		a[i] = (ai + b) / 2
		b = t
		twon *= 2
	}
	phi := twon * a[i] * u
	var prev float64
	for ; i > 0; i-- {
		t := c[i] * math.Sin(phi) / a[i]
		prev = phi
		phi = (math.Asin(t) + phi) / 2
	}
	sn, cn = math.Sincos(phi)
	// Near the quarter period cn/cos(phi - prev) is 0/0; use
	// dn = sqrt(1 - m sn^2) there (DLMF 22.10.5).
	if f := math.Cos(phi - prev); math.Abs(f) >= 0.1 {
		return sn, cn, cn / f
	}
	return sn, cn, math.Sqrt(1 - m*sn*sn)
}

// complement returns sqrt(1 - k^2) computed as sqrt((1-k)(1+k)).
func complement(k complex128) complex128 {
	return cmplx.Sqrt((1 - k) * (1 + k))
}

// arcSn returns the inverse of w = sn(u|m) for complex w, by the descending
// Landen sequence of moduli k_{n+1} = (1 - k_n')/(1 + k_n').
func arcSn(w complex128, m float64) complex128 {
	k := math.Sqrt(m)
	if k >= 1 {
		return cmplx.Atanh(w)
	}
	ks := []float64{k}
	for n := 0; ks[len(ks)-1] != 0 && n < 10; n++ {
		kp := math.Sqrt((1 - ks[len(ks)-1]) * (1 + ks[len(ks)-1]))
		ks = append(ks, (1-kp)/(1+kp))
	}
	capK := math.Pi / 2
	for _, kn := range ks[1:] {
		capK *= 1 + kn
	}
	wn := w
	for i := 0; i+1 < len(ks); i++ {
		kn, knext := ks[i], ks[i+1]
		wn = 2 * wn / (complex(1+knext, 0) * (1 + complement(complex(kn, 0)*wn)))
	}
	return complex(capK, 0) * 2 / math.Pi * cmplx.Asin(wn)
}

// arcScImag returns the real v with sc(v | 1-m) = w, i.e. the imaginary
// part of arcsn(j w | m) (Jacobi's imaginary transformation, A&S 16.20).
func arcScImag(w, m float64) float64 {
	return imag(arcSn(complex(0, w), m))
}

// ellipDegree solves the degree equation N K'(m)/K(m) = K'(m1)/K(m1) for
// the parameter m of an order-n elliptic filter whose discrimination
// parameter is m1 = k1^2, through the nome: q = q1^(1/n) and the theta
// function series for k (A&S 17.3.17 and 16.38).
func ellipDegree(n int, m1 float64) float64 {
	q1 := math.Exp(-math.Pi * ellipKm1(m1) / ellipK(m1))
	q := math.Pow(q1, 1/float64(n))
	num, den := 0.0, 1.0
	for i := 0; i <= 7; i++ {
		num += math.Pow(q, float64(i*(i+1)))
	}
	for i := 1; i <= 8; i++ {
		den += 2 * math.Pow(q, float64(i*i))
	}
	r := num / den
	return 16 * q * r * r * r * r
}
