package plots

import (
	"image/color"
	"math"

	"github.com/wavsieve/wavsieve/design"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// maskFill shades the band a standard allows (teal, translucent).
var maskFill = color.NRGBA{R: 0x20, G: 0x90, B: 0x90, A: 0x40}

// addMasks draws, for each stage that carries a standard's tolerance
// mask, the allowed band (from the lower to the upper acceptance limit,
// through the mask's points) and the table's design goals as marks. The
// mask is of the stage's own response; in a chain, the band is moved by
// what the other stages do at each point, so that it sits where the
// chain's response must lie for the stage to meet it.
func addMasks(p *plot.Plot, f *design.Filter, floor, ceil float64) {
	shown := false
	for _, d := range f.Stages {
		if len(d.Mask) < 2 {
			continue
		}
		own := &design.Filter{SampleRate: f.SampleRate, ZeroPhase: f.ZeroPhase, Stages: []design.Designed{d}}
		offset := func(hz float64) float64 {
			if len(f.Stages) == 1 {
				return 0
			}
			return f.EffectiveDB(hz) - own.EffectiveDB(hz)
		}
		var upper, lower, goals plotter.XYs
		for _, m := range d.Mask {
			o := offset(m.FrequencyHz)
			hi, lo := m.UpperDB+o, m.LowerDB+o
			if math.IsInf(m.LowerDB, -1) {
				lo = floor
			}
			upper = append(upper, plotter.XY{X: m.FrequencyHz, Y: math.Min(hi, ceil)})
			lower = append(lower, plotter.XY{X: m.FrequencyHz, Y: math.Max(lo, floor)})
			if !math.IsNaN(m.TargetDB) {
				goals = append(goals, plotter.XY{X: m.FrequencyHz, Y: m.TargetDB + o})
			}
		}
		band := append(plotter.XYs{}, upper...)
		for j := len(lower) - 1; j >= 0; j-- {
			band = append(band, lower[j])
		}
		poly, err := plotter.NewPolygon(band)
		if err != nil {
			continue
		}
		poly.LineStyle.Width = 0
		poly.Color = maskFill
		p.Add(poly)
		if sc, err := plotter.NewScatter(goals); err == nil && len(goals) > 0 {
			sc.GlyphStyle = draw.GlyphStyle{Color: markColor, Radius: vg.Points(1.6), Shape: draw.CrossGlyph{}}
			p.Add(sc)
			if !shown {
				p.Legend.Add("standard's table", sc)
			}
		}
		if !shown {
			p.Legend.Add(maskLegend(d), poly)
			shown = true
		}
	}
}

// maskLegend names the band of a stage's mask.
func maskLegend(d design.Designed) string {
	if d.Weighting != nil && d.Weighting.Standard == design.StandardISO8041 {
		return "tolerance limits, " + d.Weighting.Standard + " Table 5"
	}
	if d.Weighting != nil {
		return "class 1 limits, " + d.Weighting.Standard + " Table 3"
	}
	return "acceptance limits"
}
