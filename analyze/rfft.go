package analyze

import (
	"math"
	"math/bits"
)

// realFFT is a forward real-input DFT for a power-of-two length n >= 4,
//
//	X[k] = sum_{t=0}^{n-1} x[t] exp(-2 pi i k t / n),  k = 0..n/2,
//
// computed as a complex DFT of half length m = n/2 on z[t] = x[2t] + i x[2t+1]
// followed by the usual split into even and odd parts (Press et al.,
// "Numerical Recipes", 3rd ed., sec. 12.3, "FFT of real functions"; the
// section is cited from memory):
//
//	X[k] = E[k] + exp(-2 pi i k / n) O[k],
//	E[k] = (Z[k] + conj Z[m-k]) / 2,  O[k] = (Z[k] - conj Z[m-k]) / (2i).
//
// The complex DFT is an iterative decimation-in-time transform on
// bit-reversed input, made of radix-4 passes (plus one radix-2 pass when
// log2 m is odd) with all twiddle factors tabulated once by math.Sincos, so
// no error accumulates from recurrences. The bit-reversal permutation is
// fused with the caller's loading step (see load), which also applies the
// window and the detrend, so each segment is read once.
//
// gonum's fourier.FFT (FFTPACK) is used instead for lengths that are not a
// power of two. Both are checked against each other in the tests.
type realFFT struct {
	n, m int
	rev  []int32      // rev[t]: bit-reversed position of z[t] in the length-m transform
	tw   []complex128 // per radix-4 pass: w^j, w^2j, w^3j for j in [0, h)
	post []complex128 // exp(-2 pi i k / n), k in [0, m/2]
	r2   bool         // a leading radix-2 pass is needed (log2 m odd)
}

func isPow2(n int) bool { return n > 0 && n&(n-1) == 0 }

func newRealFFT(n int) *realFFT {
	if !isPow2(n) || n < 4 {
		panic("analyze: internal: realFFT length must be a power of two >= 4")
	}
	m := n / 2
	f := &realFFT{n: n, m: m}
	logm := bits.TrailingZeros(uint(m))
	f.rev = make([]int32, m)
	for t := range f.rev {
		f.rev[t] = int32(bits.Reverse32(uint32(t)) >> (32 - logm))
	}
	if logm == 0 {
		f.rev[0] = 0
	}
	f.r2 = logm%2 == 1
	h := 1
	if f.r2 {
		h = 2
	}
	for ; 4*h <= m; h *= 4 {
		for j := 0; j < h; j++ {
			for p := 1; p <= 3; p++ {
				s, c := math.Sincos(-2 * math.Pi * float64(p*j) / float64(4*h))
				f.tw = append(f.tw, complex(c, s))
			}
		}
	}
	f.post = make([]complex128, m/2+1)
	for k := range f.post {
		s, c := math.Sincos(-2 * math.Pi * float64(k) / float64(n))
		f.post[k] = complex(c, s)
	}
	return f
}

// transform runs the in-place complex DFT on z, which must already hold the
// packed input in bit-reversed order (len(z) == m).
func (f *realFFT) transform(z []complex128) {
	m := f.m
	z = z[:m]
	h := 1
	if f.r2 {
		for i := 0; i+1 < m; i += 2 {
			a, b := z[i], z[i+1]
			z[i], z[i+1] = a+b, a-b
		}
		h = 2
	}
	tw := f.tw
	for ; 4*h <= m; h *= 4 {
		w := tw[:3*h]
		tw = tw[3*h:]
		if h == 1 {
			// First radix-4 pass: all twiddles are 1.
			for i := 0; i+3 < m; i += 4 {
				q := z[i : i+4 : i+4]
				a, c, b, d := q[0], q[1], q[2], q[3]
				s0, s1 := a+c, a-c
				s2, s3 := b+d, b-d
				// -i*s3
				ms3 := complex(imag(s3), -real(s3))
				q[0] = s0 + s2
				q[2] = s0 - s2
				q[1] = s1 + ms3
				q[3] = s1 - ms3
			}
			continue
		}
		for i := 0; i < m; i += 4 * h {
			q0 := z[i : i+h : i+h]
			q1 := z[i+h : i+2*h : i+2*h]
			q2 := z[i+2*h : i+3*h : i+3*h]
			q3 := z[i+3*h : i+4*h : i+4*h]
			for j := 0; j < h; j++ {
				wj := w[3*j : 3*j+3 : 3*j+3]
				// In bit-reversed DIT order, the blocks hold the sub-DFTs of
				// the residues 0, 2, 1, 3 (mod 4) in that order.
				a := q0[j]
				c := mulc(q1[j], wj[1])
				b := mulc(q2[j], wj[0])
				d := mulc(q3[j], wj[2])
				s0, s1 := a+c, a-c
				s2, s3 := b+d, b-d
				ms3 := complex(imag(s3), -real(s3))
				q0[j] = s0 + s2
				q2[j] = s0 - s2
				q1[j] = s1 + ms3
				q3[j] = s1 - ms3
			}
		}
	}
}

// mulc is a complex product without the special-value handling of the
// language's complex multiplication, which inlines poorly.
func mulc(a, b complex128) complex128 {
	ar, ai := real(a), imag(a)
	br, bi := real(b), imag(b)
	return complex(ar*br-ai*bi, ar*bi+ai*br)
}

// unpack turns the half-length transform z into the one-sided spectrum
// X[0..n/2] in dst (len(dst) == m+1).
func (f *realFFT) unpack(dst, z []complex128) {
	m := f.m
	dst = dst[: m+1 : m+1]
	z = z[:m:m]
	z0 := z[0]
	dst[0] = complex(real(z0)+imag(z0), 0)
	dst[m] = complex(real(z0)-imag(z0), 0)
	post := f.post
	for k := 1; k <= m/2; k++ {
		zk, zr := z[k], z[m-k]
		// E = (Z[k] + conj Z[m-k])/2, O = (Z[k] - conj Z[m-k])/(2i)
		er := 0.5 * (real(zk) + real(zr))
		ei := 0.5 * (imag(zk) - imag(zr))
		or := 0.5 * (imag(zk) + imag(zr))
		oi := -0.5 * (real(zk) - real(zr))
		w := post[k]
		tr := real(w)*or - imag(w)*oi
		ti := real(w)*oi + imag(w)*or
		dst[k] = complex(er+tr, ei+ti)
		// X[m-k] = E[m-k] + w_{m-k} O[m-k] = conj(E[k] - w_k O[k]),
		// since E[m-k] = conj E[k], O[m-k] = conj O[k], w_{m-k} = -conj w_k.
		dst[m-k] = complex(er-tr, -ei+ti)
	}
}

// load packs the segment x (len n) into z in bit-reversed order, computing
// (x[t] - (a + b t)) * w[t] on the way: the detrend line a + b t (b = 0 for
// the mean, a = b = 0 for none) and the window w.
func (f *realFFT) load(z []complex128, x, w []float64, a, b float64) {
	m := f.m
	x = x[: 2*m : 2*m]
	w = w[: 2*m : 2*m]
	rev := f.rev[:m:m]
	if b == 0 {
		for t := 0; t < m; t++ {
			z[rev[t]] = complex((x[2*t]-a)*w[2*t], (x[2*t+1]-a)*w[2*t+1])
		}
		return
	}
	for t := 0; t < m; t++ {
		t0 := float64(2 * t)
		z[rev[t]] = complex((x[2*t]-(a+b*t0))*w[2*t], (x[2*t+1]-(a+b*(t0+1)))*w[2*t+1])
	}
}
