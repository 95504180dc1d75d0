package plots

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// The plots' text is Liberation Sans, a sans-serif metric-compatible with
// Arial: the HTML report sets its page in the same family (PageFontFamily),
// so that text in the plots and around them looks alike.
func init() {
	plot.DefaultFont = font.Font{Typeface: "Liberation", Variant: "Sans"}
	plotter.DefaultFont = plot.DefaultFont
}

// PageFontFamily is the CSS font-family list that matches the plots'
// text, for a page that embeds them.
const PageFontFamily = `"Liberation Sans", Arial, Helvetica, sans-serif`

// DPI is the resolution of PNG output in dots per inch.
const DPI = vgimg.DefaultDPI

// Limits on the image size: below the minimum the axes and titles no
// longer fit, above the maximum a PNG would take gigabytes.
const (
	minSide = 3 * vg.Inch
	maxSide = 40 * vg.Inch
)

// Palette of the plots. The fills are translucent so that the curve
// stays visible where it crosses a forbidden area.
var (
	curveColor    = color.RGBA{R: 0x1f, G: 0x4e, B: 0x79, A: 0xff}  // deep blue
	secondColor   = color.RGBA{R: 0xb3, G: 0x5c, B: 0x1e, A: 0xff}  // burnt orange
	passFill      = color.NRGBA{R: 0xe0, G: 0xa8, B: 0x20, A: 0x60} // amber
	stopFill      = color.NRGBA{R: 0xc0, G: 0x30, B: 0x50, A: 0x48} // rose
	cutoffColor   = color.RGBA{R: 0x3a, G: 0x7d, B: 0x44, A: 0xff}  // green
	markColor     = color.RGBA{R: 0x20, G: 0x20, B: 0x20, A: 0xff}  // near black
	poleColor     = color.RGBA{R: 0xb0, G: 0x1c, B: 0x2e, A: 0xff}  // crimson
	zeroColor     = color.RGBA{R: 0x1f, G: 0x4e, B: 0x79, A: 0xff}  // deep blue
	guideColor    = color.RGBA{R: 0x9a, G: 0x9a, B: 0x9a, A: 0xff}  // grey
	gridColor     = color.RGBA{R: 0xe4, G: 0xe4, B: 0xe4, A: 0xff}  // light grey
	bandAlpha     = uint8(0x40)
	defaultTextSz = vg.Points(9)
)

// checkFormat normalises format and rejects what cannot be rendered.
func checkFormat(format string) (string, error) {
	f := strings.ToLower(strings.TrimSpace(format))
	switch f {
	case "svg", "png":
		return f, nil
	}
	return "", fmt.Errorf("plots: unsupported format %q: want \"svg\" or \"png\"", format)
}

// checkSize returns the size to draw at: the defaults for zero values,
// an error for sizes outside [minSide, maxSide].
func checkSize(w, h, defW, defH vg.Length) (vg.Length, vg.Length, error) {
	if w == 0 {
		w = defW
	}
	if h == 0 {
		h = defH
	}
	for _, s := range []vg.Length{w, h} {
		if !(s >= minSide && s <= maxSide) {
			return 0, 0, fmt.Errorf("plots: invalid size %v x %v: each side must be between %v and %v", w, h, minSide, maxSide)
		}
	}
	return w, h, nil
}

// render creates a canvas of the format and size, lets paint draw on it
// and writes it to w. format must have passed checkFormat.
func render(w io.Writer, format string, width, height vg.Length, paint func(draw.Canvas)) error {
	var c vg.CanvasWriterTo
	switch format {
	case "svg":
		c = vgsvg.New(width, height)
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(DPI))}
	default:
		return fmt.Errorf("plots: unsupported format %q: want \"svg\" or \"png\"", format)
	}
	paint(draw.New(c))
	if format == "svg" {
		var b bytes.Buffer
		if _, err := c.WriteTo(&b); err != nil {
			return fmt.Errorf("plots: writing the svg image: %w", err)
		}
		if _, err := w.Write(simplifyPaths(b.Bytes())); err != nil {
			return fmt.Errorf("plots: writing the svg image: %w", err)
		}
		return nil
	}
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("plots: writing the %s image: %w", format, err)
	}
	return nil
}

// pathTolerance is how far, in points (1/72 inch), a simplified line may
// stray from the drawn one: a tenth of a point, below what a screen or a
// printer shows.
const pathTolerance = 0.1

var svgPath = regexp.MustCompile(`d="M([0-9.eE+-]+,[0-9.eE+-]+(?:L[0-9.eE+-]+,[0-9.eE+-]+)+)(Z?)"`)

// simplifyPaths drops from every straight-segment path of an SVG the
// points that lie within pathTolerance of the line through their kept
// neighbours (Ramer-Douglas-Peucker: Douglas and Peucker, "Algorithms for
// the reduction of the number of points required to represent a digitized
// line or its caricature", The Canadian Cartographer 10(2), 1973), so that
// a curve of thousands of points over a flat stretch costs a few bytes.
func simplifyPaths(svg []byte) []byte {
	return svgPath.ReplaceAllFunc(svg, func(m []byte) []byte {
		sub := svgPath.FindSubmatch(m)
		parts := strings.Split(string(sub[1]), "L")
		if len(parts) < 3 {
			return m
		}
		pts := make([][2]float64, len(parts))
		for i, p := range parts {
			x, y, ok := strings.Cut(p, ",")
			if !ok {
				return m
			}
			var err1, err2 error
			pts[i][0], err1 = strconv.ParseFloat(x, 64)
			pts[i][1], err2 = strconv.ParseFloat(y, 64)
			if err1 != nil || err2 != nil {
				return m
			}
		}
		keep := make([]bool, len(pts))
		keep[0], keep[len(pts)-1] = true, true
		rdp(pts, 0, len(pts)-1, keep)
		var b strings.Builder
		b.WriteString(`d="M`)
		first := true
		for i, k := range keep {
			if !k {
				continue
			}
			if !first {
				b.WriteByte('L')
			}
			first = false
			b.WriteString(parts[i])
		}
		b.Write(sub[2])
		b.WriteByte('"')
		return []byte(b.String())
	})
}

// rdp marks in keep the points of pts[i:j+1] needed to stay within
// pathTolerance of the polyline (pts[i] and pts[j] are kept).
func rdp(pts [][2]float64, i, j int, keep []bool) {
	for j > i+1 {
		ax, ay := pts[i][0], pts[i][1]
		dx, dy := pts[j][0]-ax, pts[j][1]-ay
		n := math.Hypot(dx, dy)
		far, at := -1.0, -1
		for k := i + 1; k < j; k++ {
			var d float64
			if n == 0 {
				d = math.Hypot(pts[k][0]-ax, pts[k][1]-ay)
			} else {
				d = math.Abs(dy*(pts[k][0]-ax)-dx*(pts[k][1]-ay)) / n
			}
			if d > far {
				far, at = d, k
			}
		}
		if far <= pathTolerance {
			return
		}
		keep[at] = true
		rdp(pts, i, at, keep)
		i = at
	}
}

// newPanel returns a plot with the project's text sizes and a grid.
func newPanel(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(10)
	p.Title.Padding = vg.Points(4)
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font.Size = defaultTextSz
		a.Tick.Label.Font.Size = vg.Points(8)
		a.Padding = 0
		a.Tick.Marker = linearTicks{target: 6}
	}
	p.Legend.TextStyle.Font.Size = vg.Points(7.5)
	p.Legend.ThumbnailWidth = vg.Points(14)
	p.Legend.Padding = vg.Points(1)
	p.Legend.XOffs = -vg.Points(4)
	p.Legend.YOffs = -vg.Points(4)
	p.Legend.Top = true
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = gridColor, gridColor
	p.Add(g)
	return p
}

// logFrequencyAxis sets a logarithmic Hz axis from lo to hi.
func logFrequencyAxis(p *plot.Plot, lo, hi float64) {
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = freqTicks{}
	p.X.Min, p.X.Max = lo, hi
	if p.X.Label.Text == "" {
		p.X.Label.Text = "frequency (Hz)"
	}
}

// freqTicks marks every 1-9 multiple of each decade and labels the
// decades (and 2 and 5 when the axis spans at most two decades), with a
// k for thousands. Unlike plot.LogTicks it returns no ticks instead of
// panicking on a range that is not positive.
type freqTicks struct{}

// Ticks implements plot.Ticker.
func (freqTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max > min) || math.IsInf(max, 0) {
		return nil
	}
	lo, hi := math.Floor(math.Log10(min)), math.Ceil(math.Log10(max))
	few := math.Log10(max/min) <= 2
	const slack = 1e-9 // relative: keep a tick that falls on an end
	var ticks []plot.Tick
	for e := lo; e <= hi; e++ {
		d := math.Pow(10, e)
		for m := 1; m < 10; m++ {
			v := d * float64(m)
			if v < min*(1-slack) || v > max*(1+slack) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || few && (m == 2 || m == 5) {
				t.Label = hzLabel(v)
			}
			ticks = append(ticks, t)
		}
	}
	return ticks
}

// hzLabel formats a frequency for a tick: 0.5, 20, 300, 1k, 20k.
func hzLabel(v float64) string {
	if v >= 1000 {
		return strconv.FormatFloat(v/1000, 'g', 6, 64) + "k"
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// segments splits the points into runs of finite values, dropping the
// others, so that a curve shows a gap where it is undefined.
func segments(x, y []float64) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	for i := range x {
		if isFinite(x[i]) && isFinite(y[i]) {
			cur = append(cur, plotter.XY{X: x[i], Y: y[i]})
			continue
		}
		if len(cur) > 0 {
			out = append(out, cur)
			cur = nil
		}
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// addCurve adds a line through the finite points and returns one of its
// pieces for a legend entry (nil when nothing is finite).
func addCurve(p *plot.Plot, x, y []float64, sty draw.LineStyle) *plotter.Line {
	var first *plotter.Line
	for _, s := range segments(x, y) {
		l, err := plotter.NewLine(s)
		if err != nil { // cannot happen: segments keeps finite points only
			continue
		}
		l.LineStyle = sty
		p.Add(l)
		if first == nil {
			first = l
		}
	}
	return first
}

// textStyle is the style of free text on the canvas.
func textStyle(size vg.Length) draw.TextStyle {
	sty := plot.New().Title.TextStyle
	sty.Font.Size = size
	sty.XAlign = draw.XCenter
	sty.YAlign = draw.YTop
	return sty
}

// drawHeading writes lines centred at the top of c, the first larger,
// wrapping those wider than c, and returns c without the space they take.
func drawHeading(c draw.Canvas, lines []string) draw.Canvas {
	y := c.Max.Y - vg.Points(6)
	room := c.Max.X - c.Min.X - vg.Points(12)
	for i, s := range lines {
		sty := textStyle(vg.Points(9.5))
		if i == 0 {
			sty = textStyle(vg.Points(13))
		}
		for _, part := range wrap(s, room, func(s string) vg.Length { return sty.Rectangle(s).Size().X }) {
			c.FillText(sty, vg.Point{X: c.Center().X, Y: y}, part)
			y -= sty.Rectangle(part).Size().Y + vg.Points(2)
		}
	}
	c.Max.Y = y - vg.Points(4)
	return c
}

// wrap breaks s at spaces into lines no wider than room, as measured by
// width; a single word wider than room stays whole.
func wrap(s string, room vg.Length, width func(string) vg.Length) []string {
	var lines []string
	cur := ""
	for _, w := range strings.Fields(s) {
		next := w
		if cur != "" {
			next = cur + " " + w
		}
		if cur != "" && width(next) > room {
			lines = append(lines, cur)
			next = w
		}
		cur = next
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}
