package analyze

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// overlapCorrelation returns rho(m) = sum_t w[t] w[t + m step] / sum_t w[t]^2
// for m = 1, 2, ... while m step < Segment: the correlation of the window
// with itself shifted by m segments (Harris 1978, sec. III.D, "overlap
// correlation"; 1/6 for Hann at 50%). Computed once and kept.
func (e *Estimator) overlapCorrelation() []float64 {
	if e.rho != nil || e.step >= e.n {
		return e.rho
	}
	var s2 float64
	for _, w := range e.win {
		s2 += w * w
	}
	e.rho = make([]float64, 0, (e.n-1)/e.step)
	for sh := e.step; sh < e.n; sh += e.step {
		var c float64
		for t := 0; t+sh < e.n; t++ {
			c += e.win[t] * e.win[t+sh]
		}
		e.rho = append(e.rho, c/s2)
	}
	return e.rho
}

// DegreesOfFreedom returns the equivalent degrees of freedom nu of a
// mean-averaged Welch estimate from n samples, at the bins between DC and
// Nyquist (half of it at those two):
//
//	nu = 2K / (1 + 2 sum_{m=1}^{K-1} (1 - m/K) rho(m)^2)
//
// with K segments and rho(m) the window's correlation with itself shifted by
// m steps. This is Welch (1967), eq. (16), in the form of Percival & Walden,
// "Spectral Analysis for Physical Applications", 1993, eq. (292b) (both
// cited from memory). It is exact, 2K, without overlap. nu/P times the
// estimate of a true density P is then taken as chi-square with nu degrees
// of freedom, an approximation that is good for Gaussian data away from
// strong spectral slopes.
//
// It returns an error wrapping ErrUnsupported for median averaging and one
// wrapping ErrShortSignal when n < Segment.
func (e *Estimator) DegreesOfFreedom(n int) (float64, error) {
	if e.opt.Average != Mean {
		return 0, fmt.Errorf("analyze: %w: degrees of freedom of median averaging", ErrUnsupported)
	}
	if err := e.checkLen(n); err != nil {
		return 0, err
	}
	k := e.Segments(n)
	rho := e.overlapCorrelation()
	var s float64
	for m := 1; m < k && m <= len(rho); m++ {
		r := rho[m-1]
		s += (1 - float64(m)/float64(k)) * r * r
	}
	return 2 * float64(k) / (1 + 2*s), nil
}

// Interval is a two-sided confidence interval for a spectral value P:
// the true value lies in [Low P, High P] with probability Level.
type Interval struct {
	Level float64 // e.g. 0.95
	DOF   float64 // equivalent degrees of freedom used
	Low   float64 // factor, < 1
	High  float64 // factor, > 1
}

// LowDB returns the lower end in dB relative to the estimate,
// 10 log10 Low (negative).
func (iv Interval) LowDB() float64 { return 10 * math.Log10(iv.Low) }

// HighDB returns the upper end in dB relative to the estimate,
// 10 log10 High (positive).
func (iv Interval) HighDB() float64 { return 10 * math.Log10(iv.High) }

// Confidence returns the confidence interval at the given level (0 < level
// < 1) of the value at bin of a mean-averaged PSD made from n samples. With nu = DegreesOfFreedom(n) (halved at DC and Nyquist,
// where each periodogram has one degree of freedom instead of two):
//
//	nu P^ / chi2_nu(1 - a/2) <= P <= nu P^ / chi2_nu(a/2),  a = 1 - level
//
// (Bendat & Piersol, "Random Data", 4th ed., 2010, eq. (8.159); Percival &
// Walden 1993, eq. (292a); both cited from memory). Quantiles come from
// gonum's stat/distuv.ChiSquared.
func (e *Estimator) Confidence(n, bin int, level float64) (Interval, error) {
	if !(level > 0 && level < 1) {
		return Interval{}, fmt.Errorf("analyze: %w: confidence level %g outside (0, 1)", ErrInvalidOption, level)
	}
	if bin < 0 || bin >= e.nbins {
		return Interval{}, fmt.Errorf("analyze: %w: bin %d outside [0, %d)", ErrInvalidOption, bin, e.nbins)
	}
	nu, err := e.DegreesOfFreedom(n)
	if err != nil {
		return Interval{}, err
	}
	if bin == 0 || (e.n%2 == 0 && bin == e.nbins-1) {
		nu /= 2
	}
	return chiSquareInterval(nu, level), nil
}

func chiSquareInterval(nu, level float64) Interval {
	a := 1 - level
	c := distuv.ChiSquared{K: nu}
	return Interval{
		Level: level,
		DOF:   nu,
		Low:   nu / c.Quantile(1-a/2),
		High:  nu / c.Quantile(a/2),
	}
}
