package plots

import (
	"math"

	"github.com/wavsieve/wavsieve/design"
	"gonum.org/v1/plot/plotter"
)

// Kinds of forbidden region.
const (
	regionPassband = "passband"
	regionStopband = "stopband"
)

// region is an area of the magnitude plane the effective response must
// not enter, as the corners of a rectangle in Hz and dB, counter-clockwise
// from the lower left.
type region struct {
	Kind string
	XYs  plotter.XYs
}

// band is a frequency interval in Hz.
type band struct{ lo, hi float64 }

// toleranceRegions returns the forbidden areas of a tolerance-form stage
// on a plot spanning lo to hi Hz and floor to ceil dB: below -RippleDB
// over each passband and above -AttenuationDB over each stopband. The
// levels are those of the spec, which bound the effective response (the
// designer accounts for the two passes of a zero-phase run). A stage of
// another form, or one whose edges do not fit its response, gives none.
func toleranceRegions(st design.Stage, lo, hi, floor, ceil float64) []region {
	if st.Order > 0 { // order form; a stage without passband and stopband edges falls to the default below
		return nil
	}
	pb, sb := st.PassbandHz, st.StopbandHz
	var pass, stop []band
	switch {
	case st.Response == design.Lowpass && len(pb) == 1 && len(sb) == 1:
		pass = []band{{lo, pb[0]}}
		stop = []band{{sb[0], hi}}
	case st.Response == design.Highpass && len(pb) == 1 && len(sb) == 1:
		pass = []band{{pb[0], hi}}
		stop = []band{{lo, sb[0]}}
	case st.Response == design.Bandpass && len(pb) == 2 && len(sb) == 2:
		pass = []band{{pb[0], pb[1]}}
		stop = []band{{lo, sb[0]}, {sb[1], hi}}
	case st.Response == design.Bandstop && len(pb) == 2 && len(sb) == 2:
		pass = []band{{lo, pb[0]}, {pb[1], hi}}
		stop = []band{{sb[0], sb[1]}}
	default:
		return nil
	}
	var out []region
	add := func(kind string, b band, bottom, top float64) {
		x0, x1 := math.Max(b.lo, lo), math.Min(b.hi, hi)
		if !(x1 > x0) || !(top > bottom) {
			return
		}
		out = append(out, region{Kind: kind, XYs: plotter.XYs{
			{X: x0, Y: bottom}, {X: x1, Y: bottom}, {X: x1, Y: top}, {X: x0, Y: top},
		}})
	}
	for _, b := range pass {
		add(regionPassband, b, floor, math.Min(-st.RippleDB, ceil))
	}
	for _, b := range stop {
		add(regionStopband, b, math.Max(-st.AttenuationDB, floor), ceil)
	}
	return out
}
