package plots

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// beforeAfter is a made-up pair of spectra: a falling floor with a hum
// line, and the same through the order-4 Butterworth lowpass of
// testSpecs, on the bins of a 1024-point Welch estimate at rate (bin 0
// at 0 Hz, which the log axis leaves out), with a band of +-bandDB.
func beforeAfter(t *testing.T) SpectrumPlot {
	t.Helper()
	const bins, bandDB = 513, 2.0
	f := mustDesign(t, testSpecs[0].spec)
	hz := make([]float64, bins)
	a, b := make([]float64, bins), make([]float64, bins)
	alo, ahi := make([]float64, bins), make([]float64, bins)
	for i := range hz {
		hz[i] = float64(i) * rate / 1024
		a[i] = -60 - 10*math.Log10(1+hz[i]/1000)
		if i == 1 {
			a[i] += 30 // a line near 47 Hz
		}
		b[i] = a[i] + f.EffectiveDB(hz[i])
		alo[i], ahi[i] = a[i]-bandDB, a[i]+bandDB
	}
	return SpectrumPlot{
		Title:         "before and after",
		FrequenciesHz: hz,
		Series: []SpectrumSeries{
			{Name: "input", DB: a, LowerDB: alo, UpperDB: ahi},
			{Name: "output", DB: b},
		},
		YLabel: "PSD (dB re 1/Hz)",
	}
}

func TestSpectrumRenders(t *testing.T) {
	// Asked-for size and the PNG pixels it gives at DPI.
	const wantW, wantH = 640, 480
	two := beforeAfter(t)
	one := two
	one.Series = one.Series[:1]
	for _, tc := range []struct {
		name string
		s    SpectrumPlot
	}{{"two series", two}, {"one series", one}} {
		t.Run(tc.name+"/png", func(t *testing.T) {
			s := tc.s
			s.Width, s.Height = vg.Length(wantW)*vg.Inch/DPI, vg.Length(wantH)*vg.Inch/DPI
			var buf bytes.Buffer
			if err := Spectrum(&buf, "png", s); err != nil {
				t.Fatal(err)
			}
			checkPNG(t, buf.Bytes(), wantW, wantH)
		})
		t.Run(tc.name+"/svg", func(t *testing.T) {
			var buf bytes.Buffer
			if err := Spectrum(&buf, "SVG", tc.s); err != nil {
				t.Fatal(err)
			}
			checkSVG(t, buf.Bytes())
		})
	}
	if dir := os.Getenv("PLOTS_OUT"); dir != "" {
		var buf bytes.Buffer
		if err := Spectrum(&buf, "png", two); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "spectrum.png"), buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func TestBandRings(t *testing.T) {
	nan := math.NaN()
	hz := []float64{0, 1, 2, 3, 4, 5}
	lo := []float64{-1, -1, -2, nan, -4, -5}
	up := []float64{1, 1, 2, 3, 4, 5}
	rings := bandRings(hz, lo, up)
	// Bin 0 is at 0 Hz and bin 3 has no lower edge: the runs are bins 1-2
	// and 4-5, each outlined along the upper edge and back.
	want := [][]float64{{1, 1, 2, 2, 2, -2, 1, -1}, {4, 4, 5, 5, 5, -5, 4, -4}}
	if len(rings) != len(want) {
		t.Fatalf("%d rings, want %d", len(rings), len(want))
	}
	for i, r := range rings {
		var got []float64
		for _, p := range r {
			got = append(got, p.X, p.Y)
		}
		for j := range want[i] {
			if j >= len(got) || got[j] != want[i][j] {
				t.Fatalf("ring %d = %v, want %v", i, got, want[i])
			}
		}
	}
}

func TestErrors(t *testing.T) {
	f := mustDesign(t, testSpecs[0].spec)
	good := beforeAfter(t)
	short := good
	short.Series = []SpectrumSeries{{Name: "x", DB: []float64{1, 2}}}
	half := good
	half.Series = []SpectrumSeries{{Name: "x", DB: good.Series[0].DB, LowerDB: good.Series[0].LowerDB}}
	dc := SpectrumPlot{FrequenciesHz: []float64{0}, Series: []SpectrumSeries{{DB: []float64{1}}}}
	down := SpectrumPlot{FrequenciesHz: []float64{2, 1}, Series: []SpectrumSeries{{DB: []float64{1, 1}}}}
	three := good
	three.Series = append(three.Series, good.Series[0])
	cases := []struct {
		name string
		run  func() error
		want string
	}{
		{"design format", func() error { return Design(f, &bytes.Buffer{}, "pdf", DesignOptions{}) }, "plots: unsupported format \"pdf\""},
		{"design nil", func() error { return Design(nil, &bytes.Buffer{}, "png", DesignOptions{}) }, "plots: invalid filter"},
		{"design size", func() error {
			return Design(f, &bytes.Buffer{}, "png", DesignOptions{Width: -1})
		}, "plots: invalid size"},
		{"spectrum format", func() error { return Spectrum(&bytes.Buffer{}, "gif", good) }, "plots: unsupported format"},
		{"spectrum length", func() error { return Spectrum(&bytes.Buffer{}, "svg", short) }, "2 values for 513 frequencies"},
		{"spectrum half band", func() error { return Spectrum(&bytes.Buffer{}, "svg", half) }, "one side of its band"},
		{"spectrum only dc", func() error { return Spectrum(&bytes.Buffer{}, "svg", dc) }, "fewer than two positive frequencies"},
		{"spectrum decreasing", func() error { return Spectrum(&bytes.Buffer{}, "svg", down) }, "frequencies decrease"},
		{"spectrum three", func() error { return Spectrum(&bytes.Buffer{}, "svg", three) }, "3 series"},
		{"write failure", func() error { return Spectrum(failWriter{}, "svg", good) }, "plots: writing the svg image: disk full"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.run()
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
			if tc.name == "write failure" && !errors.Is(err, errDiskFull) {
				t.Errorf("error %v does not wrap the writer's error", err)
			}
		})
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errDiskFull }

var errDiskFull = &diskFull{}

type diskFull struct{}

func (*diskFull) Error() string { return "disk full" }

// TestSpectrumDifferencePanelSize: whatever the length of the series'
// names, the difference panel keeps a data area of at least minDiffPanel
// (1 inch) high and most of the width, the level panel stays the larger,
// on both the SVG and the PNG canvas; and both formats render.
func TestSpectrumDifferencePanelSize(t *testing.T) {
	const minWidthShare = 0.7 // of the image width, for the data areas
	names := map[string][2]string{
		"short":     {"in", "out"},
		"file":      {"before: reedmere-north-48k.wav (ch1)", "after: reedmere-north-48k.wav (ch1)"},
		"very long": {strings.Repeat("a-very-long-folder-name/", 12) + "x.wav", strings.Repeat("another-long-folder/", 12) + "y.wav"},
	}
	canvases := map[string]func(w, h vg.Length) vg.CanvasSizer{
		"svg": func(w, h vg.Length) vg.CanvasSizer { return vgsvg.New(w, h) },
		"png": func(w, h vg.Length) vg.CanvasSizer { return vgimg.New(w, h) },
	}
	for name, pair := range names {
		for format, mk := range canvases {
			t.Run(name+"/"+format, func(t *testing.T) {
				s := beforeAfter(t)
				s.Series[0].Name, s.Series[1].Name = pair[0], pair[1]
				s.Title = "Welch spectrum: " + pair[0]
				top, bottom, err := spectrumPanels(s)
				if err != nil {
					t.Fatal(err)
				}
				c := draw.New(mk(spectrumWidth, spectrumHeight))
				ct, cb := placeSpectrum(c, s.Title, top, bottom)
				dt, db := top.DataCanvas(ct).Rectangle.Size(), bottom.DataCanvas(cb).Rectangle.Size()
				if db.Y < minDiffPanel || db.X < minWidthShare*spectrumWidth {
					t.Errorf("difference panel's data area %v x %v, want at least %v high and %v wide", db.X, db.Y, minDiffPanel, minWidthShare*spectrumWidth)
				}
				if dt.Y <= db.Y || dt.X != db.X {
					t.Errorf("level panel %v x %v against difference %v x %v: want it taller and as wide", dt.X, dt.Y, db.X, db.Y)
				}
				var b bytes.Buffer
				if err := Spectrum(&b, format, s); err != nil || b.Len() == 0 {
					t.Errorf("%s: %v, %d bytes", format, err, b.Len())
				}
			})
		}
	}
}

// TestThinSpectrumKeepsExtremes: thinning a dense spectrum keeps its
// peaks and nulls exactly and cuts the points drawn.
func TestThinSpectrumKeepsExtremes(t *testing.T) {
	const n = 8193
	hz := make([]float64, n)
	db := make([]float64, n)
	for i := range hz {
		hz[i] = float64(i) * 24000 / (n - 1)
		db[i] = -100 + 5*math.Sin(float64(i)*0.37)
	}
	db[5000], db[6000] = -20, -180 // one peak, one null
	s := SpectrumPlot{FrequenciesHz: hz, Series: []SpectrumSeries{{Name: "x", DB: db}}}
	lo, hi, err := checkSpectrum(s)
	if err != nil {
		t.Fatal(err)
	}
	th := thinSpectrum(s, lo, hi)
	if m := len(th.FrequenciesHz); m >= n/2 || m < thinBins {
		t.Errorf("%d points kept of %d", m, n)
	}
	var peak, null bool
	for i, f := range th.FrequenciesHz {
		peak = peak || f == hz[5000] && th.Series[0].DB[i] == -20
		null = null || f == hz[6000] && th.Series[0].DB[i] == -180
	}
	if !peak || !null {
		t.Errorf("peak kept %v, null kept %v", peak, null)
	}
}
