package plots

import (
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"sort"
	"strconv"
	"strings"

	"github.com/wavsieve/wavsieve/design"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// DesignOptions are the optional settings of Design.
type DesignOptions struct {
	// Title is the first line of the heading; empty: one naming the
	// sample rate. A line describing the stages always follows it.
	Title string
	// Width and Height of the image; zero: 10 x 7.5 inches (960 x 720
	// pixels in PNG).
	Width, Height vg.Length
}

// Default size of a Design image.
const (
	designWidth  = 10 * vg.Inch
	designHeight = 7.5 * vg.Inch
)

// sweepPoints is the number of log-spaced frequencies of the response
// panels, besides the spec's edges and the frequencies of the zeros on the
// unit circle, which are added so that the deep notches of elliptic and
// Chebyshev II designs show at their true depth.
const sweepPoints = 800

// coincide is the distance on the z-plane below which roots are drawn as
// one marker with their count beside it.
const coincide = 1e-6

// halfPowerDB is the level of the -3 dB points, 10 log10(1/2).
var halfPowerDB = 10 * math.Log10(0.5)

// Design draws the response of f as one image of four panels (effective
// magnitude with the spec's forbidden areas, phase, group delay, and the
// pole/zero diagram) and writes it to w in format "svg" or "png".
func Design(f *design.Filter, w io.Writer, format string, opts DesignOptions) error {
	format, width, height, err := checkFilterPlot(f, format, opts.Width, opts.Height, designWidth, designHeight)
	if err != nil {
		return err
	}
	s := newSweep(f)
	panels := [][]*plot.Plot{
		{magnitudePanel(f, s), phasePanel(f, s)},
		{delayPanel(f, s), poleZeroPanel(f)},
	}
	return render(w, format, width, height, func(c draw.Canvas) {
		c = drawHeading(c, heading(f, opts.Title))
		tiles := draw.Tiles{
			Rows: 2, Cols: 2,
			PadX: vg.Points(18), PadY: vg.Points(14),
			PadLeft: vg.Points(8), PadRight: vg.Points(12), PadBottom: vg.Points(6),
		}
		cs := plot.Align(panels, tiles, c)
		equalAspect(panels[1][1], cs[1][1])
		for i, row := range panels {
			for j, p := range row {
				p.Draw(cs[i][j])
			}
		}
	})
}

// sweep is the frequency grid of the response panels and the effective
// magnitude on it.
type sweep struct {
	lo, hi float64 // axis range, Hz
	hz     []float64
	magDB  []float64
}

// newSweep chooses the frequency axis: from the decade at or below
// rate/1e5 (lower still if an edge of the spec needs it) to just below
// Nyquist.
func newSweep(f *design.Filter) sweep {
	nyq := f.SampleRate / 2
	hi := nyq * (1 - 1e-4)
	lo := math.Pow(10, math.Floor(math.Log10(f.SampleRate*1e-5)))
	extra := specFrequencies(f)
	for _, hz := range extra {
		if hz > 0 && hz < 2*lo {
			lo = math.Pow(10, math.Floor(math.Log10(hz/2)))
		}
	}
	grid := make([]float64, 0, sweepPoints+len(extra))
	a, b := math.Log(lo), math.Log(hi)
	for i := 0; i < sweepPoints; i++ {
		grid = append(grid, math.Exp(a+(b-a)*float64(i)/(sweepPoints-1)))
	}
	for _, hz := range extra {
		if hz > lo && hz < hi {
			grid = append(grid, hz)
		}
	}
	sort.Float64s(grid)
	s := sweep{lo: lo, hi: hi}
	for i, hz := range grid {
		if i > 0 && hz <= grid[i-1]*(1+1e-12) {
			continue
		}
		s.hz = append(s.hz, hz)
		s.magDB = append(s.magDB, f.EffectiveDB(hz))
	}
	return s
}

// specFrequencies lists the frequencies of interest of f: the spec's
// edges, the designed edges and notch edges, and the frequencies of the
// zeros on the unit circle.
func specFrequencies(f *design.Filter) []float64 {
	var out []float64
	for _, d := range f.Stages {
		out = append(out, d.Spec.PassbandHz...)
		out = append(out, d.Spec.StopbandHz...)
		out = append(out, d.Spec.CutoffHz...)
		out = append(out, d.EdgesHz...)
		out = append(out, d.NotchHz...)
		for _, c := range d.Checks {
			out = append(out, c.FrequencyHz)
		}
	}
	return append(out, unitCircleZeroHz(f)...)
}

// unitCircleZeroHz lists the frequencies, strictly between 0 Hz and
// Nyquist, of the zeros of f on the unit circle.
func unitCircleZeroHz(f *design.Filter) []float64 {
	var out []float64
	for _, d := range f.Stages {
		for _, z := range d.ZPK.Zeros {
			if math.Abs(cmplx.Abs(z)-1) < coincide && imag(z) > 0 {
				out = append(out, cmplx.Phase(z)*f.SampleRate/(2*math.Pi))
			}
		}
	}
	return out
}

// magnitudeRange returns the dB range of the magnitude panel: down to
// 40 dB below the deepest attenuation the spec asks for (80 dB when it
// asks for none), but not below -160 dB, and up to a little above the
// peak.
func magnitudeRange(f *design.Filter, magDB []float64) (floor, ceil float64) {
	passes := 1.0
	if f.ZeroPhase {
		passes = 2
	}
	att := 0.0
	for _, d := range f.Stages {
		switch d.Form {
		case design.FormTolerance:
			att = math.Max(att, d.Spec.AttenuationDB)
		case design.FormOrder:
			if d.Spec.AttenuationDB > 0 {
				// The order form designs one pass to the attenuation
				// (only the families that need attenuation_db take it).
				att = math.Max(att, passes*d.Spec.AttenuationDB)
			}
		}
	}
	if !(att > 0) {
		att = 80
	}
	floor = math.Max(-att-40, -160)
	peak := math.Inf(-1)
	for _, v := range magDB {
		if isFinite(v) {
			peak = math.Max(peak, v)
		}
	}
	ceil = 5
	if peak > 2 {
		ceil = 5 * math.Ceil((peak+3)/5)
	}
	return floor, ceil
}

func magnitudePanel(f *design.Filter, s sweep) *plot.Plot {
	title := "Effective magnitude"
	if f.ZeroPhase {
		title += " (forward and backward: twice one pass in dB)"
	}
	p := newPanel(title, "frequency (Hz)", "magnitude (dB)")
	logFrequencyAxis(p, s.lo, s.hi)
	floor, ceil := magnitudeRange(f, s.magDB)

	var passShown, stopShown, cutShown bool
	anyOrder := false
	for _, d := range f.Stages {
		for _, r := range toleranceRegions(d.Spec, s.lo, s.hi, floor, ceil) {
			poly, err := plotter.NewPolygon(r.XYs)
			if err != nil {
				continue
			}
			poly.LineStyle.Width = 0
			if r.Kind == regionPassband {
				poly.Color = passFill
				if !passShown {
					p.Legend.Add(fmt.Sprintf("below passband limit -%g dB", d.Spec.RippleDB), poly)
					passShown = true
				}
			} else {
				poly.Color = stopFill
				if !stopShown {
					p.Legend.Add(fmt.Sprintf("above stopband limit -%g dB", d.Spec.AttenuationDB), poly)
					stopShown = true
				}
			}
			p.Add(poly)
		}
		if d.Form != design.FormOrder {
			continue
		}
		anyOrder = true
		for _, hz := range d.Spec.CutoffHz {
			if !(hz > s.lo && hz < s.hi) {
				continue
			}
			l, err := plotter.NewLine(plotter.XYs{{X: hz, Y: floor}, {X: hz, Y: ceil}})
			if err != nil {
				continue
			}
			l.Color = cutoffColor
			l.Width = vg.Points(1)
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
			p.Add(l)
			if !cutShown {
				p.Legend.Add("cutoff", l)
				cutShown = true
			}
		}
	}
	addMasks(p, f, floor, ceil)
	curve := addCurve(p, s.hz, s.magDB, draw.LineStyle{Color: curveColor, Width: vg.Points(1.2)})
	if curve != nil {
		p.Legend.Add("response", curve)
	}
	if anyOrder {
		var pts plotter.XYs
		for _, hz := range f.ThreeDBPointsHz() {
			if hz > s.lo && hz < s.hi {
				pts = append(pts, plotter.XY{X: hz, Y: halfPowerDB})
			}
		}
		if sc, err := plotter.NewScatter(pts); err == nil && len(pts) > 0 {
			sc.GlyphStyle = draw.GlyphStyle{Color: markColor, Radius: vg.Points(2.5), Shape: draw.SquareGlyph{}}
			p.Add(sc)
			p.Legend.Add("-3 dB point", sc)
		}
	}
	p.X.Min, p.X.Max = s.lo, s.hi
	p.Y.Min, p.Y.Max = floor, ceil
	placeLegend(p, f)
	return p
}

// placeLegend puts the legend of the magnitude panel where the first
// stage's response leaves room: under the passband curve of a lowpass or
// bandstop, beside it for the others.
func placeLegend(p *plot.Plot, f *design.Filter) {
	resp := ""
	if len(f.Stages) > 0 {
		resp = f.Stages[0].Response
	}
	switch resp {
	case design.Highpass:
		p.Legend.Top, p.Legend.Left = false, false
	case design.Bandpass:
		p.Legend.Top, p.Legend.Left = true, true
	default:
		p.Legend.Top, p.Legend.Left = false, true
	}
	if p.Legend.Left {
		p.Legend.XOffs = vg.Points(4)
	}
	if !p.Legend.Top {
		p.Legend.YOffs = vg.Points(4)
	}
}

func phasePanel(f *design.Filter, s sweep) *plot.Plot {
	title := "Phase of one pass"
	if f.ZeroPhase {
		title += " (the zero-phase run has none)"
	}
	p := newPanel(title, "frequency (Hz)", "unwrapped phase (degrees)")
	p.Y.Tick.Marker = linearTicks{target: 6, degrees: true}
	logFrequencyAxis(p, s.lo, s.hi)
	// The phase jumps by half a turn at a zero on the unit circle: leave
	// a gap there rather than a vertical stroke.
	onCircle := map[float64]bool{}
	for _, hz := range unitCircleZeroHz(f) {
		onCircle[hz] = true
	}
	deg := make([]float64, len(s.hz))
	for i, hz := range s.hz {
		deg[i] = f.Phase(hz) * 180 / math.Pi
		if onCircle[hz] {
			deg[i] = math.NaN()
		}
	}
	addCurve(p, s.hz, deg, draw.LineStyle{Color: curveColor, Width: vg.Points(1.2)})
	p.X.Min, p.X.Max = s.lo, s.hi
	return p
}

func delayPanel(f *design.Filter, s sweep) *plot.Plot {
	title := "Group delay of one pass"
	if f.ZeroPhase {
		title += " (the zero-phase run: 0 ms)"
	}
	p := newPanel(title, "frequency (Hz)", "group delay (ms)")
	logFrequencyAxis(p, s.lo, s.hi)
	ms := make([]float64, len(s.hz))
	for i, hz := range s.hz {
		ms[i] = f.GroupDelay(hz) * 1e3
	}
	addCurve(p, s.hz, ms, draw.LineStyle{Color: curveColor, Width: vg.Points(1.2)})
	p.X.Min, p.X.Max = s.lo, s.hi
	return p
}

// root is a point of the z-plane with the number of roots there.
type root struct {
	z complex128
	n int
}

// clusterRoots merges roots closer than tol into one with their count,
// at the first one's place, in the order first met.
func clusterRoots(rs []complex128, tol float64) []root {
	var out []root
next:
	for _, z := range rs {
		for i := range out {
			if cmplx.Abs(out[i].z-z) < tol {
				out[i].n++
				continue next
			}
		}
		out = append(out, root{z: z, n: 1})
	}
	return out
}

func poleZeroPanel(f *design.Filter) *plot.Plot {
	var zs, ps []complex128
	for _, d := range f.Stages {
		zs = append(zs, d.ZPK.Zeros...)
		ps = append(ps, d.ZPK.Poles...)
	}
	title := fmt.Sprintf("Poles (x) and zeros (o), largest pole radius %.6f", f.MaxPoleRadius())
	// A filter whose roots all crowd into a corner of the unit circle (a
	// hum comb and a rumble high-pass: every root within a few hundredths
	// of z = 1) would show one blob: the view is zoomed to the roots.
	zoom, box := rootBox(append(append([]complex128(nil), zs...), ps...))
	if zoom {
		title = fmt.Sprintf("Poles (x) and zeros (o) near z = 1 (zoomed), largest pole radius %.6f", f.MaxPoleRadius())
	}
	p := newPanel(title, "real part", "imaginary part")

	// Reach: the unit circle with a margin, or the farthest root within reason.
	const maxReach = 3
	reach := 1.15
	for _, r := range append(append([]complex128(nil), zs...), ps...) {
		if a := cmplx.Abs(r); isFinite(a) {
			reach = math.Max(reach, math.Min(a*1.08, maxReach))
		}
	}
	// The axes through the origin reach past any view equalAspect picks;
	// drawing clips them.
	guide := draw.LineStyle{Color: gridColor, Width: vg.Points(0.8)}
	far := 100 * reach
	addCurve(p, []float64{-far, far}, []float64{0, 0}, guide)
	addCurve(p, []float64{0, 0}, []float64{-far, far}, guide)
	const circlePoints = 361
	cx, cy := make([]float64, circlePoints), make([]float64, circlePoints)
	for i := range cx {
		a := 2 * math.Pi * float64(i) / (circlePoints - 1)
		cx[i], cy[i] = math.Cos(a), math.Sin(a)
	}
	if zoom {
		cx, cy = unitArc(box)
	}
	if l := addCurve(p, cx, cy, draw.LineStyle{Color: guideColor, Width: vg.Points(1)}); l != nil {
		p.Legend.Add("unit circle", l)
	}

	var labels plotter.XYLabels
	addRoots := func(rs []complex128, name string, g draw.GlyphStyle) {
		var pts plotter.XYs
		for _, r := range clusterRoots(rs, coincide) {
			x, y := real(r.z), imag(r.z)
			if !isFinite(x) || !isFinite(y) || !zoom && (math.Abs(x) > reach || math.Abs(y) > reach) {
				continue
			}
			pts = append(pts, plotter.XY{X: x, Y: y})
			if r.n > 1 {
				labels.XYs = append(labels.XYs, plotter.XY{X: x, Y: y})
				labels.Labels = append(labels.Labels, strconv.Itoa(r.n))
			}
		}
		if len(pts) == 0 {
			return
		}
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return
		}
		sc.GlyphStyle = g
		p.Add(sc)
		p.Legend.Add(name, sc)
	}
	addRoots(zs, "zero", draw.GlyphStyle{Color: zeroColor, Radius: vg.Points(3.2), Shape: draw.RingGlyph{}})
	addRoots(ps, "pole", draw.GlyphStyle{Color: poleColor, Radius: vg.Points(3.2), Shape: draw.CrossGlyph{}})
	if len(labels.Labels) > 0 {
		if l, err := plotter.NewLabels(labels); err == nil {
			for i := range l.TextStyle {
				l.TextStyle[i].Font.Size = vg.Points(7.5)
				l.TextStyle[i].Color = markColor
			}
			l.Offset = vg.Point{X: vg.Points(4), Y: vg.Points(3)}
			p.Add(l)
		}
	}
	p.Legend.Top, p.Legend.Left = true, false
	p.X.Min, p.X.Max = -reach, reach
	p.Y.Min, p.Y.Max = -reach, reach
	if zoom {
		p.X.Min, p.X.Max = box[0], box[1]
		p.Y.Min, p.Y.Max = box[2], box[3]
		p.X.Tick.Marker, p.Y.Tick.Marker = linearTicks{target: 4}, linearTicks{target: 4}
	}
	return p
}

// zoomShare: the pole/zero view is zoomed when every root lies in a box
// smaller than this share of the full view's side (2.3, the unit circle
// with its margin).
const zoomShare = 0.2

// rootBox returns whether the finite roots rs crowd into a region small
// enough to zoom to, and that region with a margin as [xmin, xmax, ymin,
// ymax], square.
func rootBox(rs []complex128) (bool, [4]float64) {
	xmin, xmax, ymin, ymax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, r := range rs {
		x, y := real(r), imag(r)
		if !isFinite(x) || !isFinite(y) {
			continue
		}
		xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		ymin, ymax = math.Min(ymin, y), math.Max(ymax, y)
	}
	side := math.Max(xmax-xmin, ymax-ymin)
	if !(side < zoomShare*2.3) {
		return false, [4]float64{}
	}
	half := math.Max(side*0.6, 1e-4)
	cx, cy := (xmin+xmax)/2, (ymin+ymax)/2
	return true, [4]float64{cx - half, cx + half, cy - half, cy + half}
}

// unitArc returns points of the unit circle dense enough to look round
// in box (as rootBox gives it), and reaching past it on both sides, so
// that equalAspect's wider view still shows it.
func unitArc(box [4]float64) (x, y []float64) {
	side := box[1] - box[0]
	cx, cy := (box[0]+box[1])/2, (box[2]+box[3])/2
	mid := math.Atan2(cy, cx)
	span := math.Min(math.Pi, 3*side) // radians either side of mid
	const n = 400
	for i := 0; i <= n; i++ {
		a := mid - span + 2*span*float64(i)/n
		x, y = append(x, math.Cos(a)), append(y, math.Sin(a))
	}
	return x, y
}

// equalAspect widens the longer axis of p about its centre so that one
// unit is as long on both axes when p is drawn on c. The axis sizes depend a little on the
// ranges through the tick labels, hence the few rounds.
func equalAspect(p *plot.Plot, c draw.Canvas) {
	cx, cy := (p.X.Min+p.X.Max)/2, (p.Y.Min+p.Y.Max)/2
	half := math.Min(p.X.Max-p.X.Min, p.Y.Max-p.Y.Min) / 2
	for i := 0; i < 3; i++ {
		dc := p.DataCanvas(c)
		w, h := float64(dc.Max.X-dc.Min.X), float64(dc.Max.Y-dc.Min.Y)
		if !(w > 0 && h > 0) {
			return
		}
		if w >= h {
			p.Y.Min, p.Y.Max = cy-half, cy+half
			p.X.Min, p.X.Max = cx-half*w/h, cx+half*w/h
		} else {
			p.X.Min, p.X.Max = cx-half, cx+half
			p.Y.Min, p.Y.Max = cy-half*h/w, cy+half*h/w
		}
	}
}

// heading returns the lines above the panels: the title, then what the
// stages are.
func heading(f *design.Filter, title string) []string {
	if title == "" {
		title = "Filter response at " + strconv.FormatFloat(f.SampleRate, 'g', -1, 64) + " Hz"
	}
	var descs []string
	for _, d := range f.Stages {
		descs = append(descs, stageDescription(d))
	}
	const maxStageLines = 4
	lines := []string{title}
	switch {
	case len(descs) == 0:
		lines = append(lines, "no stages: the filter passes everything")
	case len(descs) <= 2:
		lines = append(lines, strings.Join(descs, ", then "))
	default:
		for i, s := range descs {
			if i == maxStageLines-1 && len(descs) > maxStageLines {
				lines = append(lines, fmt.Sprintf("and %d more stages", len(descs)-i))
				break
			}
			lines = append(lines, fmt.Sprintf("stage %d: %s", i+1, s))
		}
	}
	if f.ZeroPhase {
		lines[len(lines)-1] += "; run zero-phase (forward and backward)"
	}
	return lines
}

// stageDescription says in a line what a designed stage is.
func stageDescription(d design.Designed) string {
	st := d.Spec
	switch d.Form {
	case design.FormNotch:
		if len(d.NotchHz) == 0 {
			return "notch chain with no notch below Nyquist"
		}
		width := fmt.Sprintf("%s Hz wide", hzList(d.NotchBandwidthHz[:1]))
		if st.Q > 0 {
			width = fmt.Sprintf("Q %g", st.Q)
		}
		if len(d.NotchHz) == 1 {
			return fmt.Sprintf("notch at %s Hz, %s", hzList(d.NotchHz), width)
		}
		return fmt.Sprintf("%d notches from %s Hz to %s Hz, %s", len(d.NotchHz),
			hzList(d.NotchHz[:1]), hzList(d.NotchHz[len(d.NotchHz)-1:]), width)
	case design.FormStandard:
		if w := d.Weighting; w != nil {
			return fmt.Sprintf("%s (%s), %d poles", w.Name(), w.Standard, len(d.ZPK.Poles))
		}
		return fmt.Sprintf("%s, %d poles", d.Family, len(d.ZPK.Poles))
	case design.FormTolerance:
		return fmt.Sprintf("%s %s of order %d from tolerances: passband %s Hz within %g dB, stopband %s Hz down %g dB",
			d.Family, d.Response, d.Order, hzList(st.PassbandHz), st.RippleDB, hzList(st.StopbandHz), st.AttenuationDB)
	default:
		return fmt.Sprintf("%s %s of order %d, cutoff %s Hz", d.Family, d.Response, d.Order, hzList(st.CutoffHz))
	}
}

// hzList writes frequencies as "1000" or "1000-3000".
func hzList(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', 6, 64)
	}
	return strings.Join(s, "-")
}

// checkFilterPlot checks the arguments of a plot of a filter: the format,
// the size (zero: the defaults) and the filter itself.
func checkFilterPlot(f *design.Filter, format string, w, h, defW, defH vg.Length) (string, vg.Length, vg.Length, error) {
	format, err := checkFormat(format)
	if err != nil {
		return "", 0, 0, err
	}
	width, height, err := checkSize(w, h, defW, defH)
	if err != nil {
		return "", 0, 0, err
	}
	if f == nil {
		return "", 0, 0, errors.New("plots: invalid filter: nil")
	}
	if !(f.SampleRate > 0) || math.IsInf(f.SampleRate, 0) {
		return "", 0, 0, fmt.Errorf("plots: invalid filter: sample rate %g Hz", f.SampleRate)
	}
	return format, width, height, nil
}
