package design

import (
	"math"
)

// Minimum order from tolerances, computed on pre-warped edges (Parks &
// Burrus, "Digital Filter Design", 1987, eqs. 7.15, 7.41 and 7.60 for the
// Butterworth, Chebyshev and elliptic orders). The selectivity of a band
// response is that of its low-pass prototype under the band transform.
// For a band-stop, each passband edge may be moved toward its stopband
// (which only tightens the passband) to balance the two transitions and
// lower the order, as SciPy's *ord functions also do.

// selectivity returns the prototype stopband edge (in units of the
// passband edge, > 1) for pre-warped edges.
func selectivity(response string, pb, sb []float64) float64 {
	switch response {
	case Lowpass:
		return sb[0] / pb[0]
	case Highpass:
		return pb[0] / sb[0]
	case Bandpass:
		return math.Min(bpNat(pb, sb[0]), bpNat(pb, sb[1]))
	default: // Bandstop
		return math.Min(bsNat(pb, sb[0]), bsNat(pb, sb[1]))
	}
}

func bpNat(pb []float64, s float64) float64 {
	return math.Abs((s*s - pb[0]*pb[1]) / (s * (pb[0] - pb[1])))
}

func bsNat(pb []float64, s float64) float64 {
	return math.Abs(s * (pb[0] - pb[1]) / (s*s - pb[0]*pb[1]))
}

// minOrder returns the minimum prototype order and the pre-warped
// critical frequencies to design with, so that the passband edges are
// met exactly (ripple gp dB) and the stopband edges with margin.
func minOrder(fam *family, response string, pb, sb []float64, gp, gs float64) (int, []float64) {
	ep := math.Expm1(gp / 10 * math.Ln10)
	es := math.Expm1(gs / 10 * math.Ln10)
	pb = append([]float64(nil), pb...)
	if response == Bandstop {
		obj := func(i int) func(float64) float64 {
			return func(w float64) float64 {
				c := []float64{pb[0], pb[1]}
				c[i] = w
				return fam.order(selectivity(Bandstop, c, sb), ep, es)
			}
		}
		pb[0] = goldenMin(obj(0), pb[0], sb[0]-1e-12*sb[0])
		pb[1] = goldenMin(obj(1), sb[1]+1e-12*sb[1], pb[1])
	}
	nat := selectivity(response, pb, sb)
	x := fam.order(nat, ep, es)
	n := int(math.Ceil(x - 1e-12*x)) // an order that is an integer to rounding stays that integer
	if n < 1 {
		n = 1
	}
	if fam.natural == nil {
		return n, pb
	}
	return n, fam.natural(response, pb, n, ep, es)
}

func butterNatural(response string, pb []float64, w0 float64) []float64 {
	switch response {
	case Lowpass:
		return []float64{w0 * pb[0]}
	case Highpass:
		return []float64{pb[0] / w0}
	case Bandpass:
		d := pb[1] - pb[0]
		a := -w0*d/2 + math.Sqrt(w0*w0/4*d*d+pb[0]*pb[1])
		b := w0*d/2 + math.Sqrt(w0*w0/4*d*d+pb[0]*pb[1])
		return sorted2(math.Abs(a), math.Abs(b))
	default:
		d := pb[1] - pb[0]
		disc := math.Sqrt(d*d + 4*w0*w0*pb[0]*pb[1])
		return sorted2(math.Abs((d+disc)/(2*w0)), math.Abs((d-disc)/(2*w0)))
	}
}

func cheby2Natural(response string, pb []float64, nf float64) []float64 {
	switch response {
	case Lowpass:
		return []float64{pb[0] / nf}
	case Highpass:
		return []float64{pb[0] * nf}
	case Bandstop:
		a := nf/2*(pb[0]-pb[1]) + math.Sqrt(nf*nf*(pb[1]-pb[0])*(pb[1]-pb[0])/4+pb[1]*pb[0])
		return sorted2(a, pb[1]*pb[0]/a)
	default:
		a := 1/(2*nf)*(pb[0]-pb[1]) + math.Sqrt((pb[1]-pb[0])*(pb[1]-pb[0])/(4*nf*nf)+pb[1]*pb[0])
		return sorted2(a, pb[0]*pb[1]/a)
	}
}

func sorted2(a, b float64) []float64 {
	if a > b {
		a, b = b, a
	}
	return []float64{a, b}
}

// goldenMin minimises f on [a, b] by golden-section search.
func goldenMin(f func(float64) float64, a, b float64) float64 {
	const r = 0.6180339887498949
	c := b - r*(b-a)
	d := a + r*(b-a)
	fc, fd := f(c), f(d)
	for i := 0; i < 200 && b-a > 1e-15*math.Abs(b); i++ {
		if fc < fd {
			b, d, fd = d, c, fc
			c = b - r*(b-a)
			fc = f(c)
		} else {
			a, c, fc = c, d, fd
			d = a + r*(b-a)
			fd = f(d)
		}
	}
	return (a + b) / 2
}
