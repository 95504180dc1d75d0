package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"github.com/wavsieve/wavsieve/design"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// VerifyMark is one measured check: the gain H1 read at a frequency with
// its confidence interval and the verdict ("pass", "fail" or
// "unmeasurable"). A LowDB that is not finite (the interval reaches zero
// gain) draws the bar down to the bottom of the panel.
type VerifyMark struct {
	FrequencyHz float64
	MeasuredDB  float64
	LowDB       float64
	HighDB      float64
	Verdict     string
}

// VerifyOptions are the optional settings of Verify.
type VerifyOptions struct {
	Title string
	// Width and Height of the image; zero: 8 x 6 inches.
	Width, Height vg.Length
}

var (
	passMark   = color.RGBA{R: 0x3a, G: 0x7d, B: 0x44, A: 0xff} // green
	failMark   = color.RGBA{R: 0xb0, G: 0x1c, B: 0x2e, A: 0xff} // crimson
	unmeasMark = color.RGBA{R: 0x9a, G: 0x9a, B: 0x9a, A: 0xff} // grey
)

// Verify draws the designed effective response of f with the spec's
// forbidden areas (as the magnitude panel of Design does) and, over it,
// the measured gains with their confidence intervals, coloured by verdict,
// and writes the image to w in format "svg" or "png".
func Verify(w io.Writer, format string, f *design.Filter, marks []VerifyMark, opts VerifyOptions) error {
	format, width, height, err := checkFilterPlot(f, format, opts.Width, opts.Height, spectrumWidth, spectrumHeight)
	if err != nil {
		return err
	}
	s := newSweep(f)
	p := magnitudePanel(f, s)
	p.Title.Text = "Designed effective response and measured gain (H1)"
	groups := []struct {
		verdict string
		label   string
		col     color.RGBA
		shape   draw.GlyphDrawer
	}{
		{"pass", "measured: pass", passMark, draw.CircleGlyph{}},
		{"fail", "measured: fail", failMark, draw.CrossGlyph{}},
		{"unmeasurable", "measured: unmeasurable", unmeasMark, draw.RingGlyph{}},
	}
	for _, g := range groups {
		var pts plotter.XYs
		for _, m := range marks {
			if m.Verdict != g.verdict || !(m.FrequencyHz > s.lo && m.FrequencyHz < s.hi) || !isFinite(m.MeasuredDB) {
				continue
			}
			y := math.Max(p.Y.Min, math.Min(p.Y.Max, m.MeasuredDB))
			pts = append(pts, plotter.XY{X: m.FrequencyHz, Y: y})
			lo, hi := m.LowDB, m.HighDB
			if !isFinite(lo) {
				lo = p.Y.Min
			}
			if !isFinite(hi) {
				hi = p.Y.Max
			}
			lo, hi = math.Max(lo, p.Y.Min), math.Min(hi, p.Y.Max)
			if hi > lo {
				if l, err := plotter.NewLine(plotter.XYs{{X: m.FrequencyHz, Y: lo}, {X: m.FrequencyHz, Y: hi}}); err == nil {
					l.Color = g.col
					l.Width = vg.Points(1.5)
					p.Add(l)
				}
			}
		}
		if len(pts) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			continue
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: g.col, Radius: vg.Points(3), Shape: g.shape}
		p.Add(sc)
		p.Legend.Add(g.label, sc)
	}
	heading := []string{opts.Title}
	if opts.Title == "" {
		heading = []string{fmt.Sprintf("Verification at %g Hz: bars are confidence intervals; a measurement, not a calibrated certification", f.SampleRate)}
	}
	return render(w, format, width, height, func(c draw.Canvas) {
		c = drawHeading(c, heading)
		c = draw.Crop(c, vg.Points(6), -vg.Points(12), vg.Points(6), -vg.Points(4))
		p.Draw(c)
	})
}
