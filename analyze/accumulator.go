package analyze

import (
	"fmt"
	"math/cmplx"
)

// Accumulator averages Welch estimates of several channels over a signal
// delivered in pieces, so that a long file can be measured without holding
// it in memory. The result equals one call over the whole signal (to
// rounding): the pieces are buffered, whole segments are averaged a chunk
// at a time, and the overlap between chunks is kept, so every segment the
// whole signal has is used once. It needs mean averaging (a median needs
// all the segments at once).
type Accumulator struct {
	e      *Estimator
	cross  bool
	chunk  int
	bx, by [][]float64
	sums   [][]float64 // per channel: xx, yy, re xy, im xy, summed over segments
	segs   int
}

// NewAccumulator returns an accumulator of the auto spectra of channels
// channels, and with cross of the cross spectra with a second signal of as
// many channels. chunk is the number of samples per channel averaged at
// once (0: 2^21); the memory held is about 8 (chunk + Segment) bytes per
// channel and signal.
func (e *Estimator) NewAccumulator(channels int, cross bool, chunk int) (*Accumulator, error) {
	if e.opt.Average != Mean {
		return nil, fmt.Errorf("analyze: %w: averaging a signal in pieces needs mean averaging", ErrUnsupported)
	}
	if channels < 1 {
		return nil, fmt.Errorf("analyze: %w: no channels", ErrInvalidOption)
	}
	if chunk <= 0 {
		chunk = 1 << 21
	}
	chunk = max(chunk, 2*e.n)
	a := &Accumulator{e: e, cross: cross, chunk: chunk}
	a.bx = make([][]float64, channels)
	a.sums = make([][]float64, channels)
	if cross {
		a.by = make([][]float64, channels)
	}
	for c := range a.bx {
		a.bx[c] = make([]float64, 0, chunk+e.n)
		if cross {
			a.by[c] = make([]float64, 0, chunk+e.n)
		}
		a.sums[c] = make([]float64, 4*e.nbins)
	}
	return a, nil
}

// Add appends a piece of each channel (planar: x[c] is channel c), and of
// the second signal y when the accumulator has cross spectra (y is
// ignored otherwise). All pieces must have the same length. Add does not
// keep x or y.
func (a *Accumulator) Add(x, y [][]float64) error {
	if len(x) != len(a.bx) || a.cross && len(y) != len(a.bx) {
		return fmt.Errorf("analyze: %w: %d channels given to an accumulator of %d", ErrInvalidOption, len(x), len(a.bx))
	}
	n := len(x[0])
	for c := range x {
		if len(x[c]) != n || a.cross && len(y[c]) != n {
			return fmt.Errorf("analyze: %w: pieces of different lengths", ErrInvalidOption)
		}
	}
	for off := 0; off < n; {
		room := a.chunk + a.e.n - len(a.bx[0])
		take := min(room, n-off)
		for c := range x {
			a.bx[c] = append(a.bx[c], x[c][off:off+take]...)
			if a.cross {
				a.by[c] = append(a.by[c], y[c][off:off+take]...)
			}
		}
		off += take
		if len(a.bx[0]) >= a.chunk {
			a.flush()
		}
	}
	return nil
}

// flush averages the whole segments buffered and keeps the samples from
// the start of the first segment not yet used.
func (a *Accumulator) flush() {
	e := a.e
	k := e.Segments(len(a.bx[0]))
	if k == 0 {
		return
	}
	used := (k-1)*e.step + e.n
	nq := 1
	if a.cross {
		nq = 4
	}
	for c := range a.bx {
		var y []float64
		if a.cross {
			y = a.by[c][:used]
		}
		e.run(a.bx[c][:used], y)
		s := a.sums[c]
		for j := 0; j < nq*e.nbins; j++ {
			s[j] += float64(k) * e.out[j]
		}
		rest := copy(a.bx[c], a.bx[c][k*e.step:])
		a.bx[c] = a.bx[c][:rest]
		if a.cross {
			rest = copy(a.by[c], a.by[c][k*e.step:])
			a.by[c] = a.by[c][:rest]
		}
	}
	a.segs += k
}

// Segments returns the number of segments averaged so far, counting the
// buffered ones.
func (a *Accumulator) Segments() int {
	a.flush()
	return a.segs
}

// Samples returns the length of a signal with as many segments as have
// been averaged: what Estimator.Confidence and DegreesOfFreedom take.
func (a *Accumulator) Samples() int {
	k := a.Segments()
	if k == 0 {
		return 0
	}
	return (k-1)*a.e.step + a.e.n
}

// PSD returns the mean auto spectrum of channel c of the first signal.
func (a *Accumulator) PSD(c int) ([]float64, error) {
	if a.Segments() == 0 {
		return nil, fmt.Errorf("analyze: %w: %d segment samples needed", ErrShortSignal, a.e.n)
	}
	nb := a.e.nbins
	out := make([]float64, nb)
	inv := 1 / float64(a.segs)
	for k := range out {
		out[k] = a.sums[c][k] * inv
	}
	return out, nil
}

// Result returns the mean auto spectra of all channels of the first
// signal, as Estimator.Spectra would over the whole signal.
func (a *Accumulator) Result() (*Result, error) {
	n := a.Samples()
	if n == 0 {
		return nil, fmt.Errorf("analyze: %w: %d segment samples needed", ErrShortSignal, a.e.n)
	}
	o := a.e.opt
	bw := a.e.ENBW()
	r := &Result{
		SampleRate: o.SampleRate, Window: o.Window.String(), Segment: o.Segment, Overlap: o.Overlap,
		Scaling: o.Scaling.String(), Units: o.Scaling.Units(), Detrend: o.Detrend.String(), Average: o.Average.String(),
		Segments: a.segs, ENBWBins: bw.Bins, ENBWHz: bw.Hz, Frequencies: a.e.Frequencies(nil),
		Channels: make([][]float64, len(a.bx)),
	}
	r.DOF, _ = a.e.DegreesOfFreedom(n)
	for c := range a.bx {
		r.Channels[c], _ = a.PSD(c)
	}
	return r, nil
}

// Transfer returns the H1 estimate from channel c of the first signal to
// channel c of the second, as Estimator.Transfer would over the whole
// signals.
func (a *Accumulator) Transfer(c int) (*Transfer, error) {
	if !a.cross {
		return nil, fmt.Errorf("analyze: %w: the accumulator has no cross spectra", ErrInvalidOption)
	}
	n := a.Samples()
	if n == 0 {
		return nil, fmt.Errorf("analyze: %w: %d segment samples needed", ErrShortSignal, a.e.n)
	}
	e := a.e
	nb := e.nbins
	inv := 1 / float64(a.segs)
	s := a.sums[c]
	tr := &Transfer{
		SampleRate: e.opt.SampleRate, Frequencies: e.Frequencies(nil),
		Pxx: make([]float64, nb), Pyy: make([]float64, nb), Pxy: make([]complex128, nb),
		H: make([]complex128, nb), Coherence: make([]float64, nb),
		Segments: a.segs, evenLen: e.n%2 == 0,
	}
	for k := 0; k < nb; k++ {
		tr.Pxx[k] = s[k] * inv
		tr.Pyy[k] = s[nb+k] * inv
		pxy := complex(s[2*nb+k]*inv, s[3*nb+k]*inv)
		tr.Pxy[k] = pxy
		tr.H[k] = pxy / complex(tr.Pxx[k], 0)
		m := cmplx.Abs(pxy)
		tr.Coherence[k] = m * m / (tr.Pxx[k] * tr.Pyy[k])
	}
	tr.DOF, _ = e.DegreesOfFreedom(n)
	return tr, nil
}
