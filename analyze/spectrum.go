package analyze

import (
	"fmt"
	"math"
)

// Result is the spectra of several channels with what a reader needs to
// interpret them. Its JSON form has the keys sample_rate_hz, window, segment,
// overlap, scaling, units, frequencies_hz and channels (one array of values
// per channel, one value per frequency), plus detrend, average, segments,
// enbw_bins, enbw_hz and degrees_of_freedom.
type Result struct {
	SampleRate  float64     `json:"sample_rate_hz"`
	Window      string      `json:"window"`
	Segment     int         `json:"segment"`
	Overlap     int         `json:"overlap"`
	Scaling     string      `json:"scaling"`
	Units       string      `json:"units"` // "FS^2/Hz" or "FS^2"
	Detrend     string      `json:"detrend"`
	Average     string      `json:"average"`
	Segments    int         `json:"segments"`
	ENBWBins    float64     `json:"enbw_bins"`
	ENBWHz      float64     `json:"enbw_hz"`
	DOF         float64     `json:"degrees_of_freedom"` // 0 for median averaging
	Frequencies []float64   `json:"frequencies_hz"`
	Channels    [][]float64 `json:"channels"`
}

// Spectra returns the PSD of each channel (planar: channels[c] is channel c),
// all of the same length. It allocates the result.
func (e *Estimator) Spectra(channels [][]float64) (*Result, error) {
	if len(channels) == 0 {
		return nil, fmt.Errorf("analyze: %w: no channels", ErrInvalidOption)
	}
	n := len(channels[0])
	for c, x := range channels {
		if len(x) != n {
			return nil, fmt.Errorf("analyze: %w: channel %d has %d samples, channel 1 has %d (channels counted from 1)", ErrInvalidOption, c+1, len(x), n)
		}
	}
	if err := e.checkLen(n); err != nil {
		return nil, err
	}
	o := e.opt
	bw := e.ENBW()
	r := &Result{
		SampleRate:  o.SampleRate,
		Window:      o.Window.String(),
		Segment:     o.Segment,
		Overlap:     o.Overlap,
		Scaling:     o.Scaling.String(),
		Units:       o.Scaling.Units(),
		Detrend:     o.Detrend.String(),
		Average:     o.Average.String(),
		Segments:    e.Segments(n),
		ENBWBins:    bw.Bins,
		ENBWHz:      bw.Hz,
		Frequencies: e.Frequencies(nil),
		Channels:    make([][]float64, len(channels)),
	}
	if o.Average == Mean {
		r.DOF, _ = e.DegreesOfFreedom(n)
	}
	for c, x := range channels {
		r.Channels[c], _ = e.PSD(nil, x)
	}
	return r, nil
}

// DB returns 10 log10 of each value of v in a new slice: dBFS^2/Hz for a
// density, dBFS for a power spectrum (dB re 1 FS^2; -Inf for 0).
func DB(v []float64) []float64 {
	d := make([]float64, len(v))
	for i, x := range v {
		d[i] = 10 * math.Log10(x)
	}
	return d
}
