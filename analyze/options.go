package analyze

import (
	"fmt"
	"math"
	"strings"
)

// Detrend says what is removed from each segment before it is windowed.
type Detrend int

// Detrend choices. The zero value removes the mean, as scipy.signal.welch's
// default detrend="constant" does.
const (
	DetrendMean   Detrend = iota // subtract the segment's mean
	DetrendNone                  // use the samples as they are
	DetrendLinear                // subtract the least-squares straight line
)

// Scaling says what the values of a spectrum are.
type Scaling int

// Scaling choices. The zero value is Density.
const (
	// Density is a power spectral density in FS^2/Hz (dBFS^2/Hz in
	// decibels): its integral over frequency is the signal's power.
	Density Scaling = iota
	// Spectrum is a power spectrum in FS^2 (dBFS in decibels): the value at
	// the bin of a sinusoid is its power (for an exactly centred sinusoid, or
	// for any frequency with the flat-top window).
	Spectrum
)

// Average says how the segments' periodograms are combined.
type Average int

// Average choices. The zero value is Mean.
const (
	Mean Average = iota
	// Median takes the per-bin median (the mean of the two middle values for
	// an even count) divided by the bias of the median of chi-square(2)
	// variables relative to their mean, 1 + sum_{k=1}^{(K-1)/2}
	// (1/(2k+1) - 1/(2k)) for K segments (Allen et al., "FINDCHIRP", Phys.
	// Rev. D 85, 2012, appendix B; the form scipy.signal.welch uses). It
	// resists bursts but has no chi-square confidence intervals here.
	Median
)

var (
	detrendNames = [...]string{DetrendMean: "mean", DetrendNone: "none", DetrendLinear: "linear"}
	scalingNames = [...]string{Density: "density", Spectrum: "spectrum"}
	averageNames = [...]string{Mean: "mean", Median: "median"}
)

func enumString(names []string, v int, typ string) string {
	if v >= 0 && v < len(names) {
		return names[v]
	}
	return fmt.Sprintf("%s(%d)", typ, v)
}

func enumParse(names []string, s, what string) (int, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, n := range names {
		if n == t {
			return i, nil
		}
	}
	return 0, fmt.Errorf("analyze: %w %s %q (known: %s)", ErrUnsupported, what, s, strings.Join(names, ", "))
}

// String returns "mean", "none" or "linear".
func (d Detrend) String() string { return enumString(detrendNames[:], int(d), "Detrend") }

// String returns "density" or "spectrum".
func (s Scaling) String() string { return enumString(scalingNames[:], int(s), "Scaling") }

// String returns "mean" or "median".
func (a Average) String() string { return enumString(averageNames[:], int(a), "Average") }

// Units returns the unit of the values: "FS^2/Hz" or "FS^2", where FS is
// digital full scale (a sample value of 1.0).
func (s Scaling) Units() string {
	if s == Spectrum {
		return "FS^2"
	}
	return "FS^2/Hz"
}

// ParseDetrend parses "none", "mean" or "linear".
func ParseDetrend(s string) (Detrend, error) {
	v, err := enumParse(detrendNames[:], s, "detrend")
	return Detrend(v), err
}

// ParseScaling parses "density" or "spectrum".
func ParseScaling(s string) (Scaling, error) {
	v, err := enumParse(scalingNames[:], s, "scaling")
	return Scaling(v), err
}

// ParseAverage parses "mean" or "median".
func ParseAverage(s string) (Average, error) {
	v, err := enumParse(averageNames[:], s, "average")
	return Average(v), err
}

// Options configures an Estimator. The zero values of Window, Detrend,
// Scaling and Average are Hann, DetrendMean, Density and Mean.
type Options struct {
	// SampleRate in Hz, finite and > 0.
	SampleRate float64
	// Segment is the length of each segment and of its transform, in
	// samples, at least 4. Powers of two use this package's own real FFT,
	// other lengths gonum's.
	Segment int
	// Overlap is the number of samples that neighbouring segments share,
	// 0 <= Overlap < Segment. Half the segment is usual for Hann.
	Overlap int
	Window  Window
	Detrend Detrend
	Scaling Scaling
	Average Average
	// Workers is the number of goroutines sharing the segments of one
	// signal; 0 means runtime.GOMAXPROCS(0). Results do not depend on it
	// beyond rounding.
	Workers int
}

// DefaultOptions returns the options of a usual analysis at the given rate:
// periodic Hann, 8192-sample segments, 50% overlap, mean removed, density,
// mean averaging.
func DefaultOptions(sampleRate float64) Options {
	return Options{SampleRate: sampleRate, Segment: 8192, Overlap: 4096}
}

func (o Options) validate() error {
	switch {
	case !(o.SampleRate > 0) || math.IsInf(o.SampleRate, 0):
		return fmt.Errorf("analyze: %w: sample rate %g Hz is not finite and positive", ErrInvalidOption, o.SampleRate)
	case o.Segment < 4:
		return fmt.Errorf("analyze: %w: segment of %d samples (need at least 4)", ErrInvalidOption, o.Segment)
	case o.Segment > 1<<26:
		return fmt.Errorf("analyze: %w: segment of %d samples (at most %d)", ErrInvalidOption, o.Segment, 1<<26)
	case o.Overlap < 0:
		return fmt.Errorf("analyze: %w: negative overlap %d", ErrInvalidOption, o.Overlap)
	case o.Overlap >= o.Segment:
		return fmt.Errorf("analyze: %w: overlap %d not below segment %d", ErrInvalidOption, o.Overlap, o.Segment)
	case o.Workers < 0:
		return fmt.Errorf("analyze: %w: negative worker count %d", ErrInvalidOption, o.Workers)
	}
	if err := o.Window.validate(); err != nil {
		return err
	}
	if o.Detrend < 0 || int(o.Detrend) >= len(detrendNames) {
		return fmt.Errorf("analyze: %w detrend %d", ErrUnsupported, int(o.Detrend))
	}
	if o.Scaling < 0 || int(o.Scaling) >= len(scalingNames) {
		return fmt.Errorf("analyze: %w scaling %d", ErrUnsupported, int(o.Scaling))
	}
	if o.Average < 0 || int(o.Average) >= len(averageNames) {
		return fmt.Errorf("analyze: %w average %d", ErrUnsupported, int(o.Average))
	}
	return nil
}
