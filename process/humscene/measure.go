package humscene

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
)

// Measurement limits of the goal, and the lengths they are measured on.
const (
	// BlockS is the block in which each harmonic's reduction is measured.
	BlockS = 1.0
	// ClickWindowS is the window of the click check.
	ClickWindowS = 0.010
	// PassbandGapHz: the passband is checked this far or further from
	// every harmonic (over the hum's whole range).
	PassbandGapHz = 3.0
	// passbandBlockS is the block of the transfer estimate: 4 s puts the
	// 3 Hz gap 12 bins from the notch, where the Hann window's sidelobes
	// are more than 60 dB down, so the notch does not leak into the bins
	// that are checked.
	passbandBlockS = 4.0
	// passbandBandHz is the resolution of the passband check: the
	// transfer is summed over 1 Hz bands. In single bins beside a strong
	// steady tone a moving notch's changing phase shows as sidebands some
	// 60 dB under the tone, which read as a change where the wanted sound
	// has almost no energy of its own.
	passbandBandHz = 1.0
	// HighCutHz is the corner above which output minus clean is checked.
	HighCutHz = 8000.0
	// callNearHz, callWithinDB: a block is reported, not counted, where a
	// call within 2 Hz of a harmonic stands within 10 dB of it.
	callNearHz, callWithinDB = 2.0, 10.0
)

// Result is what Measure found.
type Result struct {
	// Reduction[k-1][b] is how much less of harmonic k the hum drives out
	// than went in, in block b, dB; the first and last blocks are left
	// out (NaN).
	Reduction [][]float64
	// Worst[k-1] is the least reduction of harmonic k over the blocks
	// counted; Median[k-1] the median.
	Worst, Median []float64
	// Excluded lists harmonics that a call stands near (none in these
	// scenes, whose calls keep away from the hum).
	Excluded []string
	// PassbandDB is the largest change, in dB, of the wanted sound at
	// frequencies PassbandGapHz or more from every harmonic.
	PassbandDB float64
	PassbandAt float64
	// ClickDB is the largest RMS of the hum-driven residual in any 10 ms,
	// in dB re the input hum's RMS; ClickAtS where.
	ClickDB  float64
	ClickAtS float64
	// HighDBFS is the peak of output minus clean above HighCutHz, dBFS.
	HighDBFS float64
}

// Measure measures the outputs yPlus (of hum + clean) and yMinus (of
// hum - clean) of one filter on the scene, for the first harmonics
// harmonics of the hum.
func Measure(s *Scene, yPlus, yMinus []float64, harmonics int) (*Result, error) {
	n := len(s.Hum)
	if len(yPlus) != n || len(yMinus) != n {
		return nil, fmt.Errorf("humscene: outputs of %d and %d samples for a scene of %d", len(yPlus), len(yMinus), n)
	}
	hum := make([]float64, n)   // hum-driven output
	clean := make([]float64, n) // clean-driven output
	for i := range hum {
		hum[i] = (yPlus[i] + yMinus[i]) / 2
		clean[i] = (yPlus[i] - yMinus[i]) / 2
	}
	r := &Result{}
	// Per harmonic and block, the component at k times the true phase,
	// Hann-weighted.
	bl := int(BlockS * s.Rate)
	nb := n / bl
	win := hann(bl)
	for k := 1; k <= harmonics; k++ {
		red := make([]float64, nb)
		var counted []float64
		for b := 0; b < nb; b++ {
			if b == 0 || b == nb-1 {
				red[b] = math.NaN()
				continue
			}
			var zin, zout complex128
			for j := 0; j < bl; j++ {
				i := b*bl + j
				e := cmplx.Rect(win[j], -2*math.Pi*float64(k)*s.Phase[i])
				zin += complex(s.Hum[i], 0) * e
				zout += complex(hum[i], 0) * e
			}
			red[b] = 20 * math.Log10(cmplx.Abs(zin)/cmplx.Abs(zout))
			counted = append(counted, red[b])
		}
		r.Reduction = append(r.Reduction, red)
		r.Worst = append(r.Worst, minOf(counted))
		r.Median = append(r.Median, medianOf(counted))
		for _, c := range s.Calls {
			lo, hi := rangeOf(s.Freq)
			if c > float64(k)*lo-callNearHz && c < float64(k)*hi+callNearHz {
				r.Excluded = append(r.Excluded, fmt.Sprintf("harmonic %d: call at %g Hz", k, c))
			}
		}
	}
	r.PassbandDB, r.PassbandAt = passband(s, clean, harmonics)
	// Clicks: the hum-driven residual in every 10 ms, against the input
	// hum's RMS over the file.
	var hsum float64
	for _, v := range s.Hum {
		hsum += v * v
	}
	hrms := math.Sqrt(hsum / float64(n))
	cw := int(ClickWindowS * s.Rate)
	r.ClickDB = math.Inf(-1)
	for i := 0; i+cw <= n; i += cw {
		var e float64
		for _, v := range hum[i : i+cw] {
			e += v * v
		}
		d := 10*math.Log10(e/float64(cw)) - 20*math.Log10(hrms)
		if d > r.ClickDB {
			r.ClickDB, r.ClickAtS = d, float64(i)/s.Rate
		}
	}
	// Output minus clean above 8 kHz.
	if HighCutHz < 0.45*s.Rate {
		f, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Butterworth, Response: design.Highpass, Order: 8, CutoffHz: design.Edges{HighCutHz}}}, ZeroPhase: true}, s.Rate)
		if err != nil {
			return nil, err
		}
		d := make([]float64, n)
		for i := range d {
			d[i] = yPlus[i] - s.Clean[i]
		}
		hp, _, err := process.ZeroPhaseSlice(nil, d, f.Sections(), process.Config{Channels: 1}, process.ZeroPhaseOptions{PadFrames: int(0.01 * s.Rate)})
		if err != nil {
			return nil, err
		}
		peak := 0.0
		for _, v := range hp {
			peak = math.Max(peak, math.Abs(v))
		}
		r.HighDBFS = 20 * math.Log10(math.Max(peak, 1e-300))
	} else {
		r.HighDBFS = math.NaN()
	}
	return r, nil
}

// passband returns the largest change in dB of the transfer from clean
// to its output, cross-spectrum over auto-spectrum (Welch, 4 s Hann
// blocks, half overlap, summed over 1 Hz bands), at the frequencies PassbandGapHz or more from
// every harmonic's range, up to 0.45 of the rate.
func passband(s *Scene, out []float64, harmonics int) (float64, float64) {
	bl := int(passbandBlockS * s.Rate)
	nfft := 1
	for nfft < bl {
		nfft *= 2
	}
	fft := fourier.NewFFT(nfft)
	win := hann(bl)
	sxy := make([]complex128, nfft/2+1)
	sxx := make([]float64, nfft/2+1)
	bx, by := make([]float64, nfft), make([]float64, nfft)
	var cx, cy []complex128
	for st := 0; st+bl <= len(out); st += bl / 2 {
		for j := 0; j < bl; j++ {
			bx[j] = s.Clean[st+j] * win[j]
			by[j] = out[st+j] * win[j]
		}
		cx = fft.Coefficients(cx, bx)
		cy = fft.Coefficients(cy, by)
		for i := range sxx {
			sxy[i] += cy[i] * cmplx.Conj(cx[i])
			sxx[i] += real(cx[i])*real(cx[i]) + imag(cx[i])*imag(cx[i])
		}
	}
	lo, hi := rangeOf(s.Freq)
	df := s.Rate / float64(nfft)
	half := int(passbandBandHz / 2 / df)
	worst, at := 0.0, 0.0
	for i := 1; i < len(sxx); i++ {
		f := float64(i) * df
		if f > 0.45*s.Rate {
			break
		}
		near := f < PassbandGapHz
		for k := 1; k <= harmonics; k++ {
			if f > float64(k)*lo-PassbandGapHz && f < float64(k)*hi+PassbandGapHz {
				near = true
			}
		}
		if near {
			continue
		}
		// Sums over a band of +-passbandBandHz/2 about the bin.
		var bxy complex128
		var bxx float64
		for j := max(1, i-half); j <= min(len(sxx)-1, i+half); j++ {
			bxy += sxy[j]
			bxx += sxx[j]
		}
		if bxx == 0 {
			continue
		}
		d := 20 * math.Log10(cmplx.Abs(bxy)/bxx)
		if math.Abs(d) > math.Abs(worst) {
			worst, at = d, f
		}
	}
	return worst, at
}

func hann(n int) []float64 {
	w := make([]float64, n)
	for i := range w {
		w[i] = 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(n))
	}
	return w
}

func rangeOf(v []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}

func medianOf(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), v...)
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
	return s[len(s)/2]
}
