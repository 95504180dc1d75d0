package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// BandsPlot is the input of Bands: the band levels of one file, one
// series per channel.
type BandsPlot struct {
	Title     string
	Reference string // what the levels are re: "dB re 20 uPa"
	Weighting string
	Fraction  int
	Labels    []string    // nominal mid-band of each band
	Channels  [][]float64 // [channel][band] level in dB; -Inf: no energy
	Overall   []float64   // per channel
	Caution   string      // printed under the title
	// Width and Height of the image; zero: 9 x 5 inches.
	Width, Height vg.Length
}

// channelColors colour the channels' bars in turn.
var channelColors = []color.Color{curveColor, secondColor, cutoffColor, poleColor, guideColor}

// bandsSpanDB is the depth of the level axis below the highest level.
const bandsSpanDB = 80

// Bands draws the band levels as bars, the channels side by side in
// each band, and writes the image to w in format "svg" or "png".
func Bands(w io.Writer, format string, s BandsPlot) error {
	format, err := checkFormat(format)
	if err != nil {
		return err
	}
	width, height, err := checkSize(s.Width, s.Height, 9*vg.Inch, 5*vg.Inch)
	if err != nil {
		return err
	}
	if len(s.Labels) == 0 || len(s.Channels) == 0 {
		return fmt.Errorf("plots: no bands to draw")
	}
	top := math.Inf(-1)
	for c, lv := range s.Channels {
		if len(lv) != len(s.Labels) {
			return fmt.Errorf("plots: channel %d has %d levels for %d bands", c+1, len(lv), len(s.Labels))
		}
		for _, v := range lv {
			if isFinite(v) {
				top = math.Max(top, v)
			}
		}
	}
	if math.IsInf(top, -1) {
		return fmt.Errorf("plots: every band is silent: nothing to draw")
	}
	ceil := 10 * math.Ceil(top/10+0.05)
	floor := ceil - bandsSpanDB
	p := newPanel("", "nominal mid-band frequency (Hz)", "level ("+s.Reference+")")
	p.Y.Min, p.Y.Max = floor, ceil
	p.X.Min, p.X.Max = -0.6, float64(len(s.Labels))-0.4
	p.X.Tick.Marker = bandTicks(s.Labels)
	nc := len(s.Channels)
	bw := 0.8 / float64(nc)
	for c, lv := range s.Channels {
		var rects []plotter.XYer
		for i, v := range lv {
			if !isFinite(v) || v <= floor {
				continue
			}
			x0 := float64(i) - 0.4 + float64(c)*bw
			rects = append(rects, plotter.XYs{{X: x0, Y: floor}, {X: x0 + bw*0.9, Y: floor}, {X: x0 + bw*0.9, Y: math.Min(v, ceil)}, {X: x0, Y: math.Min(v, ceil)}})
		}
		if len(rects) == 0 {
			continue
		}
		poly, err := plotter.NewPolygon(rects...)
		if err != nil {
			return fmt.Errorf("plots: %w", err)
		}
		poly.Color = channelColors[c%len(channelColors)]
		poly.LineStyle.Width = 0
		p.Add(poly)
		name := fmt.Sprintf("channel %d", c+1)
		if c < len(s.Overall) && isFinite(s.Overall[c]) {
			name += fmt.Sprintf(" (overall %.1f dB)", s.Overall[c])
		}
		p.Legend.Add(name, poly)
	}
	head := []string{s.Title, fmt.Sprintf("1/%d-octave band levels, IEC 61260-1 class 1 filters, weighting %s", s.Fraction, s.Weighting)}
	if s.Caution != "" {
		head = append(head, s.Caution)
	}
	return render(w, format, width, height, func(c draw.Canvas) {
		c = drawHeading(c, head)
		p.Draw(c)
	})
}

// bandTicks labels the bands at their index, every band when they are
// few, otherwise every third (one per octave for third-octave bands) or
// so, so that labels do not overlap.
type bandTicks []string

// Ticks implements plot.Ticker.
func (b bandTicks) Ticks(min, max float64) []plot.Tick {
	step := 1
	for len(b)/step > 16 {
		step++
	}
	var t []plot.Tick
	for i, l := range b {
		tk := plot.Tick{Value: float64(i)}
		if i%step == 0 {
			tk.Label = l
		}
		t = append(t, tk)
	}
	return t
}
