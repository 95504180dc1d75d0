package analyze

import (
	"fmt"
	"math"
)

// Tone is the level of a sinusoid read from a spectrum.
type Tone struct {
	// FrequencyHz is the power-weighted mean frequency of the main lobe,
	// closer to the tone's frequency than the peak bin's centre.
	FrequencyHz float64
	// Power is the tone's power in FS^2 with the noise floor under the lobe
	// taken out (never negative): A^2/2 for a sinusoid of amplitude A.
	Power float64
	// LevelDB is 10 log10 Power, in dBFS as this package uses it: dB re
	// 1 FS^2, so a full-scale sinusoid (A = 1) reads -3.01 dBFS.
	LevelDB float64
	// FloorDensity is the local noise floor in FS^2/Hz: the median of the
	// density over the bins beside the main lobe. For a flat Gaussian floor
	// the median reads low by the ratio of the chi-square median to its mean
	// (-0.15 dB at 20 degrees of freedom, less with more).
	FloorDensity float64
	// FloorDB is 10 log10 FloorDensity, dBFS^2/Hz.
	FloorDB float64
	// AboveFloorDB is how far the tone stands above the floor as a density
	// plot shows it: 10 log10(Power / ENBW(Hz) / FloorDensity).
	AboveFloorDB float64
	// LowBin and HighBin are the first and last bins summed.
	LowBin, HighBin int
}

// Tone measures the sinusoid nearest f Hz in psd, a spectrum made by this
// estimator (either scaling; Spectrum values are turned into densities by
// dividing by the ENBW in Hz). It takes the largest bin within a main-lobe
// half-width of f, sums the density over the window's main lobe about it
// (half-width ceil(L) bins, L the distance to the transform's first null: 2
// for Hann and Hamming, 4 for Blackman-Harris, 5 for the flat top,
// sqrt(1 + (beta/pi)^2) for Kaiser, 1 for rectangular) times the bin width,
// and removes the floor measured over the max(8, 3 ceil(L)) bins on each side
// beyond the lobe. Summing the lobe makes the result independent of where the
// tone falls between bins, whatever the window (Parseval over the lobe;
// Harris 1978, sec. IV; common practice).
//
// It panics if len(psd) != Bins(), and returns an error for f outside
// [0, fs/2] or a spectrum too short to hold the lobe and a floor.
func (e *Estimator) Tone(psd []float64, f float64) (Tone, error) {
	if len(psd) != e.nbins {
		panic("analyze: psd slice length mismatch")
	}
	fs := e.opt.SampleRate
	if !(f >= 0 && f <= fs/2) {
		return Tone{}, fmt.Errorf("analyze: %w: tone at %g Hz outside [0, %g] Hz", ErrInvalidOption, f, fs/2)
	}
	df := fs / float64(e.n)
	toDensity := 1.0
	if e.opt.Scaling == Spectrum {
		toDensity = 1 / e.ENBW().Hz
	}
	g := int(math.Ceil(e.opt.Window.mainLobeHalfWidth() - 1e-9))
	side := max(8, 3*g)
	if e.nbins < 2*(g+side)+1 {
		return Tone{}, fmt.Errorf("analyze: %w: %d bins cannot hold a main lobe of %d bins and a floor of %d on each side", ErrInvalidOption, e.nbins, 2*g+1, side)
	}
	c := int(math.Round(f / df))
	peak := c
	for k := max(0, c-g); k <= min(e.nbins-1, c+g); k++ {
		if psd[k] > psd[peak] {
			peak = k
		}
	}
	lo, hi := max(0, peak-g), min(e.nbins-1, peak+g)
	// The floor: bins beside the lobe, shifted inwards at the ends of the
	// spectrum so that there are always 2 side of them.
	flo := peak - g - side
	if flo < 0 {
		flo = 0
	}
	if flo+2*side+(hi-lo+1) > e.nbins {
		flo = e.nbins - (2*side + hi - lo + 1)
	}
	floor := make([]float64, 0, 2*side)
	for k := flo; len(floor) < 2*side; k++ {
		if k < lo || k > hi {
			floor = append(floor, psd[k]*toDensity)
		}
	}
	fd := medianOf(floor)
	var sum, fsum float64
	for k := lo; k <= hi; k++ {
		d := psd[k]*toDensity - fd
		sum += d
		fsum += d * e.Frequency(k)
	}
	t := Tone{
		Power:        math.Max(0, sum*df),
		FloorDensity: fd,
		LowBin:       lo,
		HighBin:      hi,
	}
	t.FrequencyHz = e.Frequency(peak)
	if sum > 0 {
		t.FrequencyHz = fsum / sum
	}
	t.LevelDB = 10 * math.Log10(t.Power)
	t.FloorDB = 10 * math.Log10(fd)
	t.AboveFloorDB = 10 * math.Log10(t.Power/e.ENBW().Hz/fd)
	return t, nil
}
