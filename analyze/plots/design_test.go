package plots

import (
	"bytes"
	"encoding/xml"
	"image"
	_ "image/png" // registers the PNG decoder for image.Decode
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"gonum.org/v1/plot/vg"
)

// rate is the sample rate of the test designs, Hz.
const rate = 48000

// testSpecs are the designs drawn by the rendering tests.
var testSpecs = []struct {
	name string
	spec design.Spec
}{
	{"butterworth lowpass order", design.Spec{Stages: []design.Stage{{
		Family: design.Butterworth, Response: design.Lowpass, Order: 4, CutoffHz: design.Edges{1000},
	}}}},
	{"elliptic bandstop tolerance", design.Spec{Stages: []design.Stage{{
		Family: design.Elliptic, Response: design.Bandstop,
		PassbandHz: design.Edges{1000, 4000}, StopbandHz: design.Edges{1800, 2400},
		RippleDB: 0.5, AttenuationDB: 60,
	}}}},
	{"notch chain", design.Spec{Stages: []design.Stage{{
		Family: design.Notch, FundamentalHz: 50, Harmonics: 5, BandwidthHz: 2,
	}}}},
	{"zero-phase highpass then notch", design.Spec{ZeroPhase: true, Stages: []design.Stage{
		{Family: design.Chebyshev1, Response: design.Highpass,
			PassbandHz: design.Edges{100}, StopbandHz: design.Edges{40}, RippleDB: 1, AttenuationDB: 40},
		{Family: design.Notch, FundamentalHz: 60, Harmonics: 3, BandwidthHz: 3},
	}}},
}

func mustDesign(t *testing.T, spec design.Spec) *design.Filter {
	t.Helper()
	f, err := design.Design(spec, rate)
	if err != nil {
		t.Fatalf("design: %v", err)
	}
	return f
}

// TestDesignRenders draws every test design in both formats and checks
// that the output parses as what it claims to be.
func TestDesignRenders(t *testing.T) {
	// Image size asked for, and the PNG size it must give at DPI dots per inch.
	const wantW, wantH = 960, 720
	for _, tc := range testSpecs {
		f := mustDesign(t, tc.spec)
		t.Run(tc.name+"/png", func(t *testing.T) {
			var buf bytes.Buffer
			opts := DesignOptions{Width: vg.Length(wantW) * vg.Inch / DPI, Height: vg.Length(wantH) * vg.Inch / DPI}
			if err := Design(f, &buf, "png", opts); err != nil {
				t.Fatal(err)
			}
			checkPNG(t, buf.Bytes(), wantW, wantH)
		})
		t.Run(tc.name+"/svg", func(t *testing.T) {
			var buf bytes.Buffer
			if err := Design(f, &buf, "svg", DesignOptions{Title: "test"}); err != nil {
				t.Fatal(err)
			}
			checkSVG(t, buf.Bytes())
		})
	}
}

func checkPNG(t *testing.T, b []byte, w, h int) {
	t.Helper()
	img, kind, err := image.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("decoding the output: %v", err)
	}
	if kind != "png" {
		t.Fatalf("output is %s, want png", kind)
	}
	if got := img.Bounds().Size(); got.X != w || got.Y != h {
		t.Errorf("image is %dx%d pixels, want %dx%d", got.X, got.Y, w, h)
	}
}

func checkSVG(t *testing.T, b []byte) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("output is not well-formed XML: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok && root == "" {
			root = se.Name.Local
		}
	}
	if root != "svg" {
		t.Errorf("root element is %q, want svg", root)
	}
}

// TestDesignWritePNG writes one image for a person to look at when
// PLOTS_OUT names a directory; otherwise it renders to a temporary one.
func TestDesignWritePNG(t *testing.T) {
	dir := os.Getenv("PLOTS_OUT")
	if dir == "" {
		dir = t.TempDir()
	}
	for i, tc := range testSpecs {
		if dir != os.Getenv("PLOTS_OUT") && i > 0 {
			break // one image is enough when nobody looks
		}
		f := mustDesign(t, tc.spec)
		name := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "_")+".png")
		out, err := os.Create(name)
		if err != nil {
			t.Fatal(err)
		}
		err = Design(f, out, "png", DesignOptions{})
		if cerr := out.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		// The default size, 10 x 7.5 inches at DPI.
		checkPNG(t, b, 10*DPI, 7.5*DPI)
	}
}

// TestPoleZeroZoom: a hum comb with a rumble high-pass has every root
// within a few hundredths of z = 1, so its pole/zero view is zoomed to
// them (and still holds every root); a low-pass with zeros at z = -1 keeps
// the full view.
func TestPoleZeroZoom(t *testing.T) {
	cases := []struct {
		name string
		spec design.Spec
		zoom bool
	}{
		{"comb and high-pass", design.Spec{Stages: []design.Stage{
			{Family: design.Butterworth, Response: design.Highpass, Order: 4, CutoffHz: design.Edges{25}},
			{Family: design.Notch, FundamentalHz: 50, Harmonics: 7, BandwidthHz: 2}}}, true},
		{"low-pass", testSpecs[0].spec, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := mustDesign(t, c.spec)
			p := poleZeroPanel(f)
			if got := strings.Contains(p.Title.Text, "zoomed"); got != c.zoom {
				t.Fatalf("title %q: zoomed %v, want %v", p.Title.Text, got, c.zoom)
			}
			for _, d := range f.Stages {
				for _, r := range append(append([]complex128(nil), d.ZPK.Zeros...), d.ZPK.Poles...) {
					if real(r) < p.X.Min || real(r) > p.X.Max || imag(r) < p.Y.Min || imag(r) > p.Y.Max {
						t.Errorf("root %v outside the view [%g, %g] x [%g, %g]", r, p.X.Min, p.X.Max, p.Y.Min, p.Y.Max)
					}
				}
			}
			if c.zoom && p.X.Max-p.X.Min > zoomShare*2.3 {
				t.Errorf("zoomed view %g wide", p.X.Max-p.X.Min)
			}
		})
	}
}
