package analyze

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/stat/distuv"
)

// Transfer is a transfer-function estimate from an input x to an output y.
// All slices have one value per bin, at Frequencies.
type Transfer struct {
	SampleRate  float64      // Hz
	Frequencies []float64    // Hz
	Pxx, Pyy    []float64    // auto spectra, FS^2/Hz (or FS^2, as the estimator's Scaling)
	Pxy         []complex128 // cross spectrum, conj(X) Y convention
	// H is the H1 estimate Pxy / Pxx (dimensionless, output over input).
	H []complex128
	// Coherence is |Pxy|^2 / (Pxx Pyy), 0..1.
	Coherence []float64
	Segments  int
	// DOF is the equivalent degrees of freedom at the bins between DC and
	// Nyquist (see Estimator.DegreesOfFreedom); 0 for median averaging.
	DOF float64

	evenLen bool // the segment length is even: the last bin is Nyquist
}

// Transfer estimates the H1 transfer function from x (input) to y (output),
// which must have the same length, with the coherence. It allocates the
// result.
func (e *Estimator) Transfer(x, y []float64) (*Transfer, error) {
	if err := e.checkPair(x, y); err != nil {
		return nil, err
	}
	e.run(x, y)
	nb := e.nbins
	tr := &Transfer{
		SampleRate:  e.opt.SampleRate,
		Frequencies: e.Frequencies(nil),
		Pxx:         make([]float64, nb),
		Pyy:         make([]float64, nb),
		Pxy:         make([]complex128, nb),
		H:           make([]complex128, nb),
		Coherence:   make([]float64, nb),
		Segments:    e.Segments(len(x)),
		evenLen:     e.n%2 == 0,
	}
	copy(tr.Pxx, e.out[:nb])
	copy(tr.Pyy, e.out[nb:2*nb])
	for k := 0; k < nb; k++ {
		pxy := complex(e.out[2*nb+k], e.out[3*nb+k])
		tr.Pxy[k] = pxy
		tr.H[k] = pxy / complex(tr.Pxx[k], 0)
		a := cmplx.Abs(pxy)
		tr.Coherence[k] = a * a / (tr.Pxx[k] * tr.Pyy[k])
	}
	if e.opt.Average == Mean {
		tr.DOF, _ = e.DegreesOfFreedom(len(x))
	}
	return tr, nil
}

// Bin returns the index of the bin nearest to f Hz, or an error if f is not
// in [0, fs/2].
func (tr *Transfer) Bin(f float64) (int, error) {
	return nearestBin(tr.Frequencies, tr.SampleRate, f)
}

func nearestBin(freqs []float64, fs, f float64) (int, error) {
	if !(f >= 0 && f <= fs/2) {
		return 0, fmt.Errorf("analyze: %w: frequency %g Hz outside [0, %g] Hz", ErrInvalidOption, f, fs/2)
	}
	df := freqs[1] - freqs[0]
	k := int(math.Round(f / df))
	return min(k, len(freqs)-1), nil
}

// TransferPoint is the transfer estimate at one bin.
type TransferPoint struct {
	FrequencyHz float64    // centre of the bin used
	Bin         int        //
	H           complex128 // H1, output over input
	GainDB      float64    // 20 log10 |H|
	PhaseRad    float64    // arg H, in (-pi, pi]
	Coherence   float64    // 0..1
	// Level is the confidence level of the bounds below, e.g. 0.95.
	Level float64
	// GainLowDB and GainHighDB bound 20 log10 |H|; GainLowDB is -Inf when
	// the uncertainty circle contains zero.
	GainLowDB, GainHighDB float64
	// PhaseErrRad is the half-width of the phase interval, PhaseRad +-
	// PhaseErrRad; pi when the uncertainty circle contains zero.
	PhaseErrRad float64
	// DOF is the equivalent degrees of freedom at this bin.
	DOF float64
}

// At returns H1 at the bin nearest f Hz, with the coherence and a joint
// confidence region for gain and phase at the given level (0 < level < 1).
// The region is the circle |H - H^| <= r about the estimate, with
//
//	r^2 = 2/(nu-2) F_{2,nu-2}(level) (1 - g^2)/g^2 |H^|^2,
//
// g^2 the coherence and nu the equivalent degrees of freedom (Bendat &
// Piersol, "Random Data", 4th ed., 2010, sec. 9.2.4, after Goodman 1965;
// cited from memory, written with (1 - g^2) Pyy/Pxx = (1 - g^2)/g^2 |H|^2).
// The F quantile comes from gonum's stat/distuv.F. The region assumes
// mean averaging and noise on the output only; with median averaging, or
// nu <= 2, At returns an error wrapping ErrUnsupported.
func (tr *Transfer) At(f, level float64) (TransferPoint, error) {
	k, err := tr.Bin(f)
	if err != nil {
		return TransferPoint{}, err
	}
	if !(level > 0 && level < 1) {
		return TransferPoint{}, fmt.Errorf("analyze: %w: confidence level %g outside (0, 1)", ErrInvalidOption, level)
	}
	h := tr.H[k]
	p := TransferPoint{
		FrequencyHz: tr.Frequencies[k],
		Bin:         k,
		H:           h,
		GainDB:      20 * math.Log10(cmplx.Abs(h)),
		PhaseRad:    cmplx.Phase(h),
		Coherence:   tr.Coherence[k],
		Level:       level,
	}
	nu := tr.DOF
	if k == 0 || (tr.evenLen && k == len(tr.H)-1) {
		nu /= 2
	}
	p.DOF = nu
	if !(nu > 2) {
		return p, fmt.Errorf("analyze: %w: transfer confidence with %g degrees of freedom (need mean averaging and more than 2)", ErrUnsupported, nu)
	}
	g2 := p.Coherence
	fq := distuv.F{D1: 2, D2: nu - 2}.Quantile(level)
	mag := cmplx.Abs(h)
	r := math.Sqrt(2/(nu-2)*fq*math.Max(0, 1-g2)/g2) * mag
	p.GainHighDB = 20 * math.Log10(mag+r)
	if r < mag {
		p.GainLowDB = 20 * math.Log10(mag-r)
		p.PhaseErrRad = math.Asin(r / mag)
	} else {
		p.GainLowDB = math.Inf(-1)
		p.PhaseErrRad = math.Pi
	}
	return p, nil
}
