package plots

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// HumTrackPlot is the input of HumTrack: the fundamental a tracking notch
// followed, and the hum's level before and after.
type HumTrackPlot struct {
	Title string
	// TimesS and Hz are the track's points.
	TimesS, Hz []float64
	// BlockTimesS are the centres of the blocks in which the hum's level
	// was measured; InDB and OutDB the level at the track's harmonics in
	// the input and the output, dBFS.
	BlockTimesS, InDB, OutDB []float64
	Note                     string // printed under the title
	// Width and Height of the image; zero: 9 x 6 inches.
	Width, Height vg.Length
}

// HumTrack draws the track over time above the hum's level in the input
// and the output, and writes the image to w in format "svg" or "png".
func HumTrack(w io.Writer, format string, s HumTrackPlot) error {
	format, err := checkFormat(format)
	if err != nil {
		return err
	}
	width, height, err := checkSize(s.Width, s.Height, 9*vg.Inch, 6*vg.Inch)
	if err != nil {
		return err
	}
	if len(s.TimesS) == 0 || len(s.TimesS) != len(s.Hz) {
		return fmt.Errorf("plots: a hum track of %d times and %d frequencies", len(s.TimesS), len(s.Hz))
	}
	if len(s.BlockTimesS) != len(s.InDB) || len(s.BlockTimesS) != len(s.OutDB) {
		return fmt.Errorf("plots: hum levels of %d blocks, %d inputs, %d outputs", len(s.BlockTimesS), len(s.InDB), len(s.OutDB))
	}
	top := newPanel("fundamental of the hum", "time (s)", "Hz")
	addCurve(top, s.TimesS, s.Hz, draw.LineStyle{Color: curveColor, Width: vg.Points(1.2)})
	low := levelPanel(s)
	head := []string{s.Title}
	if s.Note != "" {
		head = append(head, s.Note)
	}
	panels := [][]*plot.Plot{{top}, {low}}
	return render(w, format, width, height, func(c draw.Canvas) {
		c = drawHeading(c, head)
		tiles := draw.Tiles{Rows: 2, Cols: 1, PadY: vg.Points(14), PadLeft: vg.Points(8), PadRight: vg.Points(12), PadBottom: vg.Points(6)}
		cs := plot.Align(panels, tiles, c)
		top.Draw(cs[0][0])
		low.Draw(cs[1][0])
	})
}

// levelPanel draws the hum level of input and output in the colours of
// the before/after spectra (input blue, output orange), with the level
// axis padded beyond the data so that a steady level is not drawn on the
// panel's frame.
func levelPanel(s HumTrackPlot) *plot.Plot {
	low := newPanel("hum at the tracked harmonics", "time (s)", "level (dBFS)")
	if l := addCurve(low, s.BlockTimesS, s.InDB, draw.LineStyle{Color: curveColor, Width: vg.Points(1.2)}); l != nil {
		low.Legend.Add("input", l)
	}
	if l := addCurve(low, s.BlockTimesS, s.OutDB, draw.LineStyle{Color: secondColor, Width: vg.Points(1.2)}); l != nil {
		low.Legend.Add("output", l)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range append(append([]float64(nil), s.InDB...), s.OutDB...) {
		if !math.IsInf(v, 0) && !math.IsNaN(v) {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if lo <= hi {
		low.Y.Min, low.Y.Max = lo-levelPadDB, hi+levelLegendPadDB
	}
	return low
}

// levelPadDB is the room left below the hum levels, levelLegendPadDB above
// them, where the legend sits (chosen for a readable plot, not measured).
const (
	levelPadDB       = 5
	levelLegendPadDB = 15
)
