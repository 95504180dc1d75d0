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

// SpectrumPlot is the input of Spectrum: one or two level curves over
// the same frequencies.
type SpectrumPlot struct {
	Title         string
	FrequenciesHz []float64 // non-decreasing; points at or below 0 Hz are not drawn
	Series        []SpectrumSeries
	// YLabel names the level axis; empty: "level (dB)".
	YLabel string
	// Width and Height of the image; zero: 8 x 6 inches.
	Width, Height vg.Length
}

// SpectrumSeries is one curve of a SpectrumPlot, one value per frequency.
// Values that are not finite leave a gap.
type SpectrumSeries struct {
	Name string
	DB   []float64
	// LowerDB and UpperDB, both or neither, bound a band drawn shaded
	// around the curve (a confidence interval, say).
	LowerDB, UpperDB []float64
}

// Default size of a Spectrum image.
const (
	spectrumWidth  = 8 * vg.Inch
	spectrumHeight = 6 * vg.Inch
)

// spectrumSpanDB is the deepest the level axis goes below the highest
// level, so that a null at -300 dB does not squash the rest.
const spectrumSpanDB = 200

// Spectrum draws the series of s over a logarithmic frequency axis and,
// for two series, their difference (second minus first) in a panel
// below, and writes the image to w in format "svg" or "png".
func Spectrum(w io.Writer, format string, s SpectrumPlot) error {
	format, err := checkFormat(format)
	if err != nil {
		return err
	}
	width, height, err := checkSize(s.Width, s.Height, spectrumWidth, spectrumHeight)
	if err != nil {
		return err
	}
	top, bottom, err := spectrumPanels(s)
	if err != nil {
		return err
	}
	return render(w, format, width, height, func(c draw.Canvas) {
		ct, cb := placeSpectrum(c, s.Title, top, bottom)
		top.Draw(ct)
		if bottom != nil {
			bottom.Draw(cb)
		}
	})
}

// spectrumPanels builds the level panel and, for two series, the
// difference panel (nil otherwise).
func spectrumPanels(s SpectrumPlot) (top, bottom *plot.Plot, err error) {
	lo, hi, err := checkSpectrum(s)
	if err != nil {
		return nil, nil, err
	}
	s = thinSpectrum(s, lo, hi)
	colors := []color.RGBA{curveColor, secondColor}
	ylabel := s.YLabel
	if ylabel == "" {
		ylabel = "level (dB)"
	}
	top = newPanel("", "frequency (Hz)", ylabel)
	logFrequencyAxis(top, lo, hi)
	top.Legend.Top, top.Legend.Left = true, false
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for i, ser := range s.Series {
		for _, vs := range [][]float64{ser.DB, ser.LowerDB, ser.UpperDB} {
			for j, v := range vs {
				if s.FrequenciesHz[j] > 0 && isFinite(v) {
					ymin, ymax = math.Min(ymin, v), math.Max(ymax, v)
				}
			}
		}
		if ser.LowerDB != nil {
			fill := color.NRGBA{R: colors[i].R, G: colors[i].G, B: colors[i].B, A: bandAlpha}
			for _, ring := range bandRings(s.FrequenciesHz, ser.LowerDB, ser.UpperDB) {
				poly, err := plotter.NewPolygon(ring)
				if err != nil {
					continue
				}
				poly.Color = fill
				poly.LineStyle.Width = 0
				top.Add(poly)
			}
		}
		l := addCurve(top, positive(s.FrequenciesHz), ser.DB, draw.LineStyle{Color: colors[i], Width: vg.Points(1.2)})
		if l != nil && ser.Name != "" {
			top.Legend.Add(ser.Name, l)
		}
	}
	ymin = math.Max(ymin, ymax-spectrumSpanDB)
	pad := math.Max(1, 0.05*(ymax-ymin))
	top.X.Min, top.X.Max = lo, hi
	top.Y.Min, top.Y.Max = ymin-pad, ymax+pad

	if len(s.Series) == 2 {
		a, b := s.Series[0], s.Series[1]
		// The names can be long (file names): they go in the panel's
		// title, and the axis keeps a short label that always fits.
		bottom = newPanel("", "frequency (Hz)", "difference (dB)")
		logFrequencyAxis(bottom, lo, hi)
		diff := make([]float64, len(a.DB))
		dmin, dmax := -1.0, 1.0
		for j := range diff {
			diff[j] = b.DB[j] - a.DB[j]
			if s.FrequenciesHz[j] > 0 && isFinite(diff[j]) {
				dmin, dmax = math.Min(dmin, diff[j]), math.Max(dmax, diff[j])
			}
		}
		addCurve(bottom, []float64{lo, hi}, []float64{0, 0}, draw.LineStyle{Color: guideColor, Width: vg.Points(0.8)})
		addCurve(bottom, positive(s.FrequenciesHz), diff, draw.LineStyle{Color: markColor, Width: vg.Points(1)})
		bottom.Title.Text = shorten(nameOr(b.Name, "second"), legendChars) + " minus " + shorten(nameOr(a.Name, "first"), legendChars)
		bottom.Title.TextStyle.Font.Size = vg.Points(8.5)
		bottom.Title.Padding = vg.Points(2)
		dmin = math.Max(dmin, dmax-spectrumSpanDB)
		dpad := 0.05 * (dmax - dmin)
		bottom.X.Min, bottom.X.Max = lo, hi
		bottom.Y.Min, bottom.Y.Max = dmin-dpad, dmax+dpad
		top.X.Label.Text = ""
	}

	return top, bottom, nil
}

// placeSpectrum draws the title at the top of c and returns the canvases
// of the two panels (cb is unused when bottom is nil).
func placeSpectrum(c draw.Canvas, title string, top, bottom *plot.Plot) (ct, cb draw.Canvas) {
	if title != "" {
		c = drawHeading(c, []string{title})
	}
	c = draw.Crop(c, vg.Points(6), -vg.Points(12), vg.Points(6), -vg.Points(4))
	if bottom == nil {
		return c, c
	}
	return spectrumLayout(c, top, bottom)
}

// minDiffPanel is the least height of the difference panel's data area:
// below it the curve cannot be read.
const minDiffPanel = vg.Inch

// legendChars bounds each name in the difference panel's title.
const legendChars = 40

// spectrumLayout splits c between the level panel (top) and the
// difference panel (bottom): two thirds and one third, the difference's
// data area at least minDiffPanel high, and the data areas lined up.
func spectrumLayout(c draw.Canvas, top, bottom *plot.Plot) (ct, cb draw.Canvas) {
	split := c.Min.Y + (c.Max.Y-c.Min.Y)/3
	ct, cb = c, c
	ct.Min.Y = split + vg.Points(6)
	cb.Max.Y = split - vg.Points(6)
	if d := minDiffPanel - bottom.DataCanvas(cb).Rectangle.Size().Y; d > 0 {
		cb.Max.Y += d
		ct.Min.Y += d
	}
	dt, db := top.DataCanvas(ct), bottom.DataCanvas(cb)
	if d := dt.Min.X - db.Min.X; d > 0 {
		cb.Min.X += d
	} else {
		ct.Min.X -= d
	}
	if d := dt.Max.X - db.Max.X; d < 0 {
		cb.Max.X += d
	} else {
		ct.Max.X -= d
	}
	return ct, cb
}

// shorten keeps at most n characters of s, marking a cut with an ellipsis
// in the middle (the end of a file name tells files apart).
func shorten(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	h := (n - 1) / 2
	return string(r[:h]) + "…" + string(r[len(r)-(n-1-h):])
}

// thinBins is the number of logarithmic frequency bins a spectrum is
// thinned to: about one per point of the default plot width, so that
// nothing visible is lost.
const thinBins = 500

// thinSpectrum keeps, in each of thinBins logarithmic bins between lo and
// hi, the first and last point and those where any curve (a level, a
// band edge, the difference of two levels) is lowest or highest, so that
// every peak and null survives; points that are not finite are kept, as
// gaps. A spectrum of 8193 points then draws from about 2000, and the
// SVG shrinks as much.
func thinSpectrum(s SpectrumPlot, lo, hi float64) SpectrumPlot {
	n := len(s.FrequenciesHz)
	if n <= 2*thinBins {
		return s
	}
	var curves [][]float64
	for _, ser := range s.Series {
		curves = append(curves, ser.DB, ser.LowerDB, ser.UpperDB)
	}
	if len(s.Series) == 2 {
		d := make([]float64, n)
		for i := range d {
			d[i] = s.Series[1].DB[i] - s.Series[0].DB[i]
		}
		curves = append(curves, d)
	}
	keep := make([]bool, n)
	llo, span := math.Log(lo), math.Log(hi)-math.Log(lo)
	bin := func(hz float64) int {
		return min(thinBins-1, max(0, int((math.Log(hz)-llo)/span*thinBins)))
	}
	start := 0
	for start < n {
		if !(s.FrequenciesHz[start] > 0) {
			keep[start] = true
			start++
			continue
		}
		b := bin(s.FrequenciesHz[start])
		end := start
		for end < n && s.FrequenciesHz[end] > 0 && bin(s.FrequenciesHz[end]) == b {
			end++
		}
		keep[start], keep[end-1] = true, true
		for _, c := range curves {
			if c == nil {
				continue
			}
			lo, hi := -1, -1
			for i := start; i < end; i++ {
				if !isFinite(c[i]) {
					keep[i] = true
					continue
				}
				if lo < 0 || c[i] < c[lo] {
					lo = i
				}
				if hi < 0 || c[i] > c[hi] {
					hi = i
				}
			}
			if lo >= 0 {
				keep[lo], keep[hi] = true, true
			}
		}
		start = end
	}
	pick := func(v []float64) []float64 {
		if v == nil {
			return nil
		}
		out := make([]float64, 0, n/4)
		for i, k := range keep {
			if k {
				out = append(out, v[i])
			}
		}
		return out
	}
	t := s
	t.FrequenciesHz = pick(s.FrequenciesHz)
	t.Series = make([]SpectrumSeries, len(s.Series))
	for i, ser := range s.Series {
		t.Series[i] = SpectrumSeries{Name: ser.Name, DB: pick(ser.DB), LowerDB: pick(ser.LowerDB), UpperDB: pick(ser.UpperDB)}
	}
	return t
}

// checkSpectrum checks the shape of s and returns the frequency range to
// draw.
func checkSpectrum(s SpectrumPlot) (lo, hi float64, err error) {
	if n := len(s.Series); n < 1 || n > 2 {
		return 0, 0, fmt.Errorf("plots: invalid spectrum: %d series, want one or two", n)
	}
	n := len(s.FrequenciesHz)
	for i, v := range s.FrequenciesHz {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, 0, fmt.Errorf("plots: invalid spectrum: frequency %d is %g", i, v)
		}
		if i > 0 && v < s.FrequenciesHz[i-1] {
			return 0, 0, fmt.Errorf("plots: invalid spectrum: frequencies decrease at index %d (%g Hz after %g Hz)", i, v, s.FrequenciesHz[i-1])
		}
	}
	for _, ser := range s.Series {
		if len(ser.DB) != n {
			return 0, 0, fmt.Errorf("plots: invalid spectrum: series %q has %d values for %d frequencies", ser.Name, len(ser.DB), n)
		}
		if (ser.LowerDB == nil) != (ser.UpperDB == nil) {
			return 0, 0, fmt.Errorf("plots: invalid spectrum: series %q has only one side of its band", ser.Name)
		}
		if ser.LowerDB != nil && (len(ser.LowerDB) != n || len(ser.UpperDB) != n) {
			return 0, 0, fmt.Errorf("plots: invalid spectrum: series %q has a band of %d and %d values for %d frequencies", ser.Name, len(ser.LowerDB), len(ser.UpperDB), n)
		}
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for i, f := range s.FrequenciesHz {
		if !(f > 0) {
			continue
		}
		for _, ser := range s.Series {
			if isFinite(ser.DB[i]) {
				lo, hi = math.Min(lo, f), math.Max(hi, f)
			}
		}
	}
	if !(hi > lo) {
		return 0, 0, fmt.Errorf("plots: invalid spectrum: fewer than two positive frequencies with a finite level")
	}
	return lo, hi, nil
}

// positive returns hz with the frequencies a log axis cannot show
// replaced by NaN, so that the curves leave them out.
func positive(hz []float64) []float64 {
	out := make([]float64, len(hz))
	for i, v := range hz {
		out[i] = v
		if !(v > 0) {
			out[i] = math.NaN()
		}
	}
	return out
}

// bandRings returns the outline of the band between lower and upper for
// each run of points where both are finite at a positive frequency:
// along the upper edge, then back along the lower one.
func bandRings(hz, lower, upper []float64) []plotter.XYs {
	var rings []plotter.XYs
	start := -1
	flush := func(end int) {
		if start >= 0 && end-start >= 2 {
			ring := make(plotter.XYs, 0, 2*(end-start))
			for j := start; j < end; j++ {
				ring = append(ring, plotter.XY{X: hz[j], Y: upper[j]})
			}
			for j := end - 1; j >= start; j-- {
				ring = append(ring, plotter.XY{X: hz[j], Y: lower[j]})
			}
			rings = append(rings, ring)
		}
		start = -1
	}
	for j := range hz {
		ok := hz[j] > 0 && isFinite(lower[j]) && isFinite(upper[j])
		if ok && start < 0 {
			start = j
		}
		if !ok {
			flush(j)
		}
	}
	flush(len(hz))
	return rings
}

func nameOr(name, alt string) string {
	if name == "" {
		return alt
	}
	return name
}
