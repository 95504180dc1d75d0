package analyze

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Estimator computes Welch spectra (Welch, "The use of fast Fourier transform
// for the estimation of power spectra", IEEE Trans. Audio Electroacoust. 15,
// 1967) with fixed Options. It holds all the buffers it needs, so that a
// spectrum costs no allocation per segment; the buffer for median averaging
// grows to the longest signal seen and is kept.
//
// Segments start at 0, step, 2 step, ... (step = Segment - Overlap) and only
// whole segments are used: the last len(x) - Segment - (K-1) step samples of a
// signal with K segments are ignored, as scipy.signal.welch does with its
// defaults.
//
// An Estimator is not safe for concurrent use; it runs its own goroutines
// (Options.Workers) inside each call.
type Estimator struct {
	opt    Options
	n      int // segment length
	step   int
	nbins  int // n/2 + 1
	win    []float64
	scale  []float64 // per bin: 1/(fs sum w^2) or 1/(sum w)^2, doubled off DC and Nyquist
	enbw   float64   // bins
	fft    *realFFT  // nil unless n is a power of two
	work   []*worker
	out    []float64 // 4*nbins: finished xx, yy, re(xy), im(xy)
	rows   []float64 // per segment periodograms, median averaging only
	column []float64 // one bin's values across segments, median only
	rho    []float64 // window overlap correlation, filled by overlapCorrelation
}

// worker holds one goroutine's buffers.
type worker struct {
	z    []complex128 // half-length transform (own FFT)
	x, y []complex128 // one-sided spectra of the current segment
	seg  []float64    // detrended, windowed segment (gonum path)
	gfft *fourier.FFT
	acc  []float64 // 4*nbins running sums
}

// NewEstimator checks the options and allocates an estimator for them.
func NewEstimator(o Options) (*Estimator, error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	if o.Workers == 0 {
		o.Workers = runtime.GOMAXPROCS(0)
	}
	n := o.Segment
	e := &Estimator{opt: o, n: n, step: n - o.Overlap, nbins: n/2 + 1}
	e.win = o.Window.Coefficients(nil, n)
	var s1, s2 float64
	for _, w := range e.win {
		s1 += w
		s2 += w * w
	}
	if !(s1 != 0 && s2 > 0) {
		return nil, fmt.Errorf("analyze: %w: window %v of %d samples sums to zero", ErrInvalidOption, o.Window, n)
	}
	// Equivalent noise bandwidth in bins: n sum w^2 / (sum w)^2 (Harris 1978,
	// eq. (11)).
	e.enbw = float64(n) * s2 / (s1 * s1)
	// Scaling and the one-sided fold: as scipy.signal.welch (SciPy 1.10.1,
	// _spectral_helper): density 1/(fs sum w^2), spectrum 1/(sum w)^2, all
	// bins but DC and (for even n) Nyquist doubled.
	base := 1 / (o.SampleRate * s2)
	if o.Scaling == Spectrum {
		base = 1 / (s1 * s1)
	}
	e.scale = make([]float64, e.nbins)
	for k := range e.scale {
		e.scale[k] = 2 * base
	}
	e.scale[0] = base
	if n%2 == 0 {
		e.scale[e.nbins-1] = base
	}
	if isPow2(n) {
		e.fft = newRealFFT(n)
	}
	e.work = make([]*worker, o.Workers)
	for i := range e.work {
		w := &worker{
			x:   make([]complex128, e.nbins),
			y:   make([]complex128, e.nbins),
			acc: make([]float64, 4*e.nbins),
		}
		if e.fft != nil {
			w.z = make([]complex128, n/2)
		} else {
			w.seg = make([]float64, n)
			w.gfft = newGonumFFT(n)
		}
		e.work[i] = w
	}
	e.out = make([]float64, 4*e.nbins)
	return e, nil
}

// Options returns the options, with Workers filled in.
func (e *Estimator) Options() Options { return e.opt }

// Bins returns the number of frequencies of a one-sided spectrum,
// Segment/2 + 1.
func (e *Estimator) Bins() int { return e.nbins }

// Frequency returns the frequency of bin k in Hz, k fs / Segment.
func (e *Estimator) Frequency(k int) float64 {
	return float64(k) * e.opt.SampleRate / float64(e.n)
}

// Frequencies writes the frequencies of all bins in Hz into dst and returns
// it; nil dst is allocated. It panics if dst is not nil and
// len(dst) != Bins().
func (e *Estimator) Frequencies(dst []float64) []float64 {
	if dst == nil {
		dst = make([]float64, e.nbins)
	}
	if len(dst) != e.nbins {
		panic("analyze: frequency slice length mismatch")
	}
	for k := range dst {
		dst[k] = e.Frequency(k)
	}
	return dst
}

// Bandwidth is a bandwidth in bins and in Hz.
type Bandwidth struct {
	Bins float64
	Hz   float64
}

// ENBW returns the window's equivalent noise bandwidth, n sum w^2 /
// (sum w)^2 bins (Harris 1978, eq. (11)): 1.5 for Hann, about 3.77 for the
// flat top. A density times it (in Hz) is the power one bin of the
// Spectrum scaling reads for noise.
func (e *Estimator) ENBW() Bandwidth {
	return Bandwidth{Bins: e.enbw, Hz: e.enbw * e.opt.SampleRate / float64(e.n)}
}

// Segments returns the number of whole segments in a signal of n samples,
// 0 if n < Segment.
func (e *Estimator) Segments(n int) int {
	if n < e.n {
		return 0
	}
	return (n-e.n)/e.step + 1
}

func (e *Estimator) checkLen(n int) error {
	if n < e.n {
		return fmt.Errorf("analyze: %w: %d samples, segment is %d", ErrShortSignal, n, e.n)
	}
	return nil
}

// PSD writes the one-sided Welch power spectrum of x (one channel) into dst
// and returns it: FS^2/Hz with Density scaling, FS^2 with Spectrum, at the
// frequencies of Frequencies. A nil dst is allocated; it panics if dst is
// not nil and len(dst) != Bins(). It returns an error wrapping
// ErrShortSignal if len(x) < Segment.
func (e *Estimator) PSD(dst, x []float64) ([]float64, error) {
	if dst != nil && len(dst) != e.nbins {
		panic("analyze: psd slice length mismatch")
	}
	if err := e.checkLen(len(x)); err != nil {
		return dst, err
	}
	e.run(x, nil)
	if dst == nil {
		dst = make([]float64, e.nbins)
	}
	copy(dst, e.out[:e.nbins])
	return dst, nil
}

// CSD writes the one-sided cross spectral density of x and y,
// Pxy = scale E[conj(X) Y] (the convention of scipy.signal.csd), into dst
// and returns it, in FS^2/Hz or FS^2 as PSD. A nil dst is allocated; it
// panics if dst is not nil and len(dst) != Bins(). x and y must have the
// same length.
func (e *Estimator) CSD(dst []complex128, x, y []float64) ([]complex128, error) {
	if dst != nil && len(dst) != e.nbins {
		panic("analyze: csd slice length mismatch")
	}
	if err := e.checkPair(x, y); err != nil {
		return dst, err
	}
	e.run(x, y)
	if dst == nil {
		dst = make([]complex128, e.nbins)
	}
	nb := e.nbins
	for k := range dst {
		dst[k] = complex(e.out[2*nb+k], e.out[3*nb+k])
	}
	return dst, nil
}

// Coherence writes the magnitude-squared coherence |Pxy|^2 / (Pxx Pyy)
// (dimensionless, 0..1) into dst and returns it, as scipy.signal.coherence
// computes it. With Median averaging each of the three spectra is a median
// (scipy.signal.coherence always averages by the mean). A bin where Pxx or
// Pyy is zero reads NaN. It panics if dst is
// not nil and len(dst) != Bins().
func (e *Estimator) Coherence(dst, x, y []float64) ([]float64, error) {
	if dst != nil && len(dst) != e.nbins {
		panic("analyze: coherence slice length mismatch")
	}
	if err := e.checkPair(x, y); err != nil {
		return dst, err
	}
	e.run(x, y)
	if dst == nil {
		dst = make([]float64, e.nbins)
	}
	nb := e.nbins
	for k := range dst {
		re, im := e.out[2*nb+k], e.out[3*nb+k]
		dst[k] = (re*re + im*im) / (e.out[k] * e.out[nb+k])
	}
	return dst, nil
}

func (e *Estimator) checkPair(x, y []float64) error {
	if len(x) != len(y) {
		return fmt.Errorf("analyze: %w: input of %d samples, output of %d", ErrInvalidOption, len(x), len(y))
	}
	return e.checkLen(len(x))
}

// run fills e.out with the averaged, scaled spectra: Pxx, and with y also
// Pyy, re Pxy, im Pxy. len(x) >= Segment and len(y) == len(x) or y == nil.
func (e *Estimator) run(x, y []float64) {
	nseg := e.Segments(len(x))
	nq := 1
	if y != nil {
		nq = 4
	}
	median := e.opt.Average == Median && nseg > 1
	stride := nq * e.nbins
	if median {
		if need := nseg * stride; cap(e.rows) < need {
			e.rows = make([]float64, need)
		}
		e.rows = e.rows[:nseg*stride]
	}
	// Few segments are not worth a goroutine each: keep at least 16 per
	// worker.
	nw := min(len(e.work), max(1, nseg/16))
	if nw == 1 {
		e.segments(e.work[0], x, y, 0, nseg, nq, median)
	} else {
		e.parallel(nw, x, y, nseg, nq, median)
	}
	nb := e.nbins
	out := e.out[:stride]
	if median {
		bias := medianBias(nseg)
		if cap(e.column) < nseg {
			e.column = make([]float64, nseg)
		}
		col := e.column[:nseg]
		for j := range out {
			for s := range col {
				col[s] = e.rows[s*stride+j]
			}
			out[j] = medianOf(col) / bias
		}
	} else {
		clear(out)
		for _, wk := range e.work[:nw] {
			for j, v := range wk.acc[:stride] {
				out[j] += v
			}
		}
		inv := 1 / float64(nseg)
		for j := range out {
			out[j] *= inv
		}
	}
	for q := 0; q < nq; q++ {
		o := out[q*nb : (q+1)*nb]
		for k := range o {
			o[k] *= e.scale[k]
		}
	}
}

// parallel splits the nseg segments into nw contiguous ranges, one per
// goroutine and worker.
func (e *Estimator) parallel(nw int, x, y []float64, nseg, nq int, median bool) {
	var wg sync.WaitGroup
	for i := 0; i < nw; i++ {
		lo, hi := i*nseg/nw, (i+1)*nseg/nw
		wk := e.work[i]
		wg.Add(1)
		go func() {
			defer wg.Done()
			e.segments(wk, x, y, lo, hi, nq, median)
		}()
	}
	wg.Wait()
}

// segments processes segments [lo, hi) with the buffers of wk: it adds their
// periodograms to wk.acc, or stores them in e.rows for the median.
func (e *Estimator) segments(wk *worker, x, y []float64, lo, hi, nq int, median bool) {
	nb := e.nbins
	stride := nq * nb
	acc := wk.acc[:stride]
	clear(acc)
	for s := lo; s < hi; s++ {
		dst := acc
		if median {
			dst = e.rows[s*stride : (s+1)*stride]
		}
		off := s * e.step
		xs := x[off : off+e.n]
		e.transform(wk, wk.x, xs)
		if y == nil {
			p := dst[:nb]
			X := wk.x[:nb]
			if median {
				for k, v := range X {
					p[k] = real(v)*real(v) + imag(v)*imag(v)
				}
			} else {
				for k, v := range X {
					p[k] += real(v)*real(v) + imag(v)*imag(v)
				}
			}
			continue
		}
		e.transform(wk, wk.y, y[off:off+e.n])
		X, Y := wk.x[:nb], wk.y[:nb]
		pxx, pyy, pre, pim := dst[:nb], dst[nb:2*nb], dst[2*nb:3*nb], dst[3*nb:4*nb]
		if median {
			clear(dst)
		}
		for k := range X {
			xr, xi := real(X[k]), imag(X[k])
			yr, yi := real(Y[k]), imag(Y[k])
			pxx[k] += xr*xr + xi*xi
			pyy[k] += yr*yr + yi*yi
			// conj(X) Y
			pre[k] += xr*yr + xi*yi
			pim[k] += xr*yi - xi*yr
		}
	}
}

// transform writes the one-sided DFT of the detrended, windowed segment xs
// into dst (len nbins).
func (e *Estimator) transform(wk *worker, dst []complex128, xs []float64) {
	a, b := e.trend(xs)
	if e.fft != nil {
		e.fft.load(wk.z, xs, e.win, a, b)
		e.fft.transform(wk.z)
		e.fft.unpack(dst, wk.z)
		return
	}
	seg := wk.seg
	for t, v := range xs {
		seg[t] = (v - (a + b*float64(t))) * e.win[t]
	}
	wk.gfft.Coefficients(dst, seg)
}

// trend returns the line a + b t removed from the segment: zero, its mean,
// or its least-squares line. The line is fitted about the centre
// tc = (n-1)/2 with sum (t - tc)^2 = n (n^2 - 1) / 12, which is exact and
// better conditioned than fitting about t = 0 (any regression text; common
// practice).
func (e *Estimator) trend(xs []float64) (a, b float64) {
	switch e.opt.Detrend {
	case DetrendNone:
		return 0, 0
	case DetrendMean:
		var s float64
		for _, v := range xs {
			s += v
		}
		return s / float64(len(xs)), 0
	}
	n := float64(len(xs))
	tc := (n - 1) / 2
	var s, st float64
	for t, v := range xs {
		s += v
		st += (float64(t) - tc) * v
	}
	b = st / (n * (n*n - 1) / 12)
	return s/n - b*tc, b
}

// medianBias is the ratio of the median of K chi-square(2) periodograms to
// their mean, as scipy.signal._spectral_py._median_bias (SciPy 1.10.1):
// 1 + sum_{k=1}^{(K-1)/2} (1/(2k+1) - 1/(2k)).
func medianBias(nseg int) float64 {
	b := 1.0
	for k := 1; k <= (nseg-1)/2; k++ {
		b += 1/float64(2*k+1) - 1/float64(2*k)
	}
	return b
}

// medianOf returns the median of v (the mean of the two middle values when
// len(v) is even, as numpy.median), reordering v.
func medianOf(v []float64) float64 {
	slices.Sort(v)
	h := len(v) / 2
	if len(v)%2 == 1 {
		return v[h]
	}
	return 0.5 * (v[h-1] + v[h])
}

func newGonumFFT(n int) *fourier.FFT { return fourier.NewFFT(n) }

// nan is returned where a quantity is undefined.
var nan = math.NaN()
