package design

import (
	"encoding/json"
	"errors"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// maskFile is testdata/bands/iec61260-1-2014-class1.json.
type maskFile struct {
	Rows []struct {
		X     float64  `json:"x"`
		Side  string   `json:"side"`
		MinDB float64  `json:"min_db"`
		MaxDB *float64 `json:"max_db"`
	} `json:"rows"`
	AnnexF struct {
		Upper []float64 `json:"upper"`
		Lower []float64 `json:"lower"`
	} `json:"annex_f_third_octave_omega"`
}

func loadMask(t testing.TB) *maskFile {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "bands", "iec61260-1-2014-class1.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m maskFile
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	return &m
}

// refLimits evaluates the committed mask at f for a 1/b-octave band at
// fm, independently of Class1Limits: the breakpoints of the file mapped
// with the formula of IEC 61260-1:2014 5.10, straight lines in dB
// against log frequency between them. It returns limits on the response
// (the negative of the attenuation).
func refLimits(m *maskFile, b int, fm, f float64) (lo, hi float64) {
	g := math.Pow(10, 0.3)
	omegaOf := func(x float64) float64 {
		return 1 + (math.Pow(g, 1/(2*float64(b)))-1)/(math.Pow(g, 0.5)-1)*(math.Pow(g, x)-1)
	}
	w := math.Abs(math.Log(f / fm))
	type pt struct{ lw, min, max float64 }
	var pass, stop []pt
	for _, r := range m.Rows {
		mx := math.Inf(1)
		if r.MaxDB != nil {
			mx = *r.MaxDB
		}
		p := pt{math.Log(omegaOf(r.X)), r.MinDB, mx}
		if r.Side == "passband" {
			pass = append(pass, p)
		} else {
			stop = append(stop, p)
		}
	}
	at := func(ps []pt, v func(pt) float64) float64 {
		if w <= ps[0].lw {
			return v(ps[0])
		}
		for i := 1; i < len(ps); i++ {
			if w <= ps[i].lw {
				t := (w - ps[i-1].lw) / (ps[i].lw - ps[i-1].lw)
				return v(ps[i-1]) + t*(v(ps[i])-v(ps[i-1]))
			}
		}
		return v(ps[len(ps)-1])
	}
	edge := pass[len(pass)-1].lw
	const same = 1e-9 // a frequency this close (relative) to the edge is at the edge
	switch {
	case w < edge-same:
		return -at(pass, func(p pt) float64 { return p.max }), -at(pass, func(p pt) float64 { return p.min })
	case w > edge+same:
		return math.Inf(-1), -at(stop, func(p pt) float64 { return p.min })
	default: // both rows of the band edge
		return -pass[len(pass)-1].max, -stop[0].min
	}
}

// sectionsDB is the response of the sections themselves in dB at f.
func sectionsDB(secs []Section, f, rate float64) float64 {
	return 20 * math.Log10(cmplx.Abs(sectionsAt(secs, 2*math.Pi*f/rate)))
}

func TestClass1TableMatchesTestdata(t *testing.T) {
	m := loadMask(t)
	code := Class1Table()
	if len(code) != len(m.Rows) {
		t.Fatalf("code table has %d rows, testdata %d", len(code), len(m.Rows))
	}
	for i, r := range m.Rows {
		mx := math.Inf(1)
		if r.MaxDB != nil {
			mx = *r.MaxDB
		}
		if code[i] != [3]float64{r.X, r.MinDB, mx} {
			t.Errorf("row %d: code %v, testdata x=%g min=%g max=%g", i, code[i], r.X, r.MinDB, mx)
		}
	}
}

func TestBandOmegaReproducesAnnexF(t *testing.T) {
	// IEC 61260-1:2014 Annex F, one-third-octave breakpoints (five
	// decimals, see testdata/bands/README.md).
	const tol = 6e-6
	m := loadMask(t)
	xs := []float64{1.0 / 8, 1.0 / 4, 3.0 / 8, 1.0 / 2, 1, 2, 3, 4}
	for i, x := range xs {
		up := BandOmega(3, x)
		if math.Abs(up-m.AnnexF.Upper[i]) > tol {
			t.Errorf("x=%g: Omega %.6f, Annex F %.5f", x, up, m.AnnexF.Upper[i])
		}
		if math.Abs(1/up-m.AnnexF.Lower[i]) > tol {
			t.Errorf("x=-%g: Omega %.6f, Annex F %.5f", x, 1/up, m.AnnexF.Lower[i])
		}
	}
}

func TestBandFrequencies(t *testing.T) {
	// Nominal mid-band frequencies: IEC 61260-1:2014 Annex E (R10 series),
	// as listed by python-acoustics (NOMINAL_THIRD_OCTAVE_CENTER_FREQUENCIES
	// and NOMINAL_OCTAVE_CENTER_FREQUENCIES of its iec_61260_1_2014 module).
	thirds := []float64{25, 31.5, 40, 50, 63, 80, 100, 125, 160, 200, 250, 315, 400, 500, 630, 800, 1000,
		1250, 1600, 2000, 2500, 3150, 4000, 5000, 6300, 8000, 10000, 12500, 16000, 20000}
	octaves := []float64{31.5, 63, 125, 250, 500, 1000, 2000, 4000, 8000, 16000}
	const relTol = 1e-12 // float64 rounding only: the formulas beside the checks are exact
	for _, tc := range []struct {
		name string
		b    int
		want []float64
		x0   int
	}{{"thirds", 3, thirds, -16}, {"octaves", 1, octaves, -5}} {
		t.Run(tc.name, func(t *testing.T) {
			for i, w := range tc.want {
				bd := NewBand(tc.b, tc.x0+i)
				if bd.NominalHz != w {
					t.Errorf("band %d: nominal %g, want %g", tc.x0+i, bd.NominalHz, w)
				}
				// Exact mid-band, IEC 61260-1:2014 5.4: 1000 G^(x/b).
				fm := 1000 * math.Pow(10, 0.3*float64(tc.x0+i)/float64(tc.b))
				if math.Abs(bd.ExactHz/fm-1) > relTol {
					t.Errorf("band %d: exact %.10g, want %.10g", tc.x0+i, bd.ExactHz, fm)
				}
				// Edges, IEC 61260-1:2014 5.5: fm G^(-+1/(2b)); their ratio is G^(1/b).
				if r := bd.UpperHz / bd.LowerHz; math.Abs(r/math.Pow(10, 0.3/float64(tc.b))-1) > relTol {
					t.Errorf("band %d: edge ratio %g", tc.x0+i, r)
				}
				if got := math.Sqrt(bd.LowerHz * bd.UpperHz); math.Abs(got/fm-1) > relTol {
					t.Errorf("band %d: edges not centred on fm", tc.x0+i)
				}
			}
		})
	}
	// Even b: 1000 G^((2x+1)/(2b)) (IEC 61260-1:2014 5.4); the half-octave band x = 0 lies
	// at 1000 G^(1/4).
	if got, want := NewBand(2, 0).ExactHz, 1000*math.Pow(10, 0.075); math.Abs(got/want-1) > relTol {
		t.Errorf("half-octave band 0: %g, want %g", got, want)
	}
	// Labels as band tables print them.
	for hz, want := range map[float64]string{31.5: "31.5", 1000: "1k", 1250: "1.25k", 12500: "12.5k", 800: "800", 16: "16"} {
		if got := BandLabel(hz); got != want {
			t.Errorf("BandLabel(%g) = %q, want %q", hz, got, want)
		}
	}
}

func TestFindBand(t *testing.T) {
	for _, tc := range []struct {
		name  string
		b     int
		hz    float64
		label string
		err   bool
	}{
		{"nominal 31.5", 3, 31.5, "31.5", false},
		{"exact 31.62", 3, 31.6228, "31.5", false},
		{"nominal 1k octave", 1, 1000, "1k", false},
		{"nominal 16 octave", 1, 16, "16", false},
		{"nominal 12.5k", 3, 12500, "12.5k", false},
		{"half octave", 2, 1190, "1.19k", false},
		{"between bands", 3, 1100, "", true},
		{"bad fraction", 5, 1000, "", true},
		{"negative", 3, -1, "", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			bd, err := FindBand(tc.b, tc.hz)
			if tc.err {
				if k := KindOf(err); k != ErrInvalid && k != ErrUnsupported {
					t.Fatalf("want an invalid or unsupported design error, got %v", err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if bd.Label != tc.label {
				t.Errorf("label %q, want %q", bd.Label, tc.label)
			}
		})
	}
}

// TestBandFiltersInsideClass1Mask designs every band from 16 Hz up to the
// highest whose upper edge lies below 0.45 of the rate, octaves and
// thirds, at 44.1 and 48 kHz, and checks the response of the sections
// on a dense grid (200 points per octave from 1 Hz to Nyquist, plus the
// breakpoints) against the committed class 1 mask of IEC 61260-1:2014.
func TestBandFiltersInsideClass1Mask(t *testing.T) {
	m := loadMask(t)
	// slackDB only absorbs float rounding of the limits themselves.
	const slackDB = 1e-9
	for _, rate := range []float64{44100, 48000} {
		for _, b := range []int{1, 3} {
			bands := BandsBetween(b, 16, 0.45*rate)
			var n int
			for _, bd := range bands {
				if bd.UpperHz >= 0.45*rate || bd.NominalHz < 16 {
					continue
				}
				n++
				d, err := DesignBand(bd, rate)
				if err != nil {
					t.Fatalf("%g Hz, 1/%d %s: %v", rate, b, bd.Label, err)
				}
				grid := []float64{}
				for f := 1.0; f < rate/2; f *= math.Pow(2, 1.0/200) {
					grid = append(grid, f)
				}
				for _, x := range []float64{1.0 / 8, 1.0 / 4, 3.0 / 8, 1.0 / 2, 1, 2, 3, 4} {
					for _, f := range []float64{bd.ExactHz * BandOmega(b, x), bd.ExactHz / BandOmega(b, x)} {
						if f < rate/2 {
							grid = append(grid, f)
						}
					}
				}
				worst := math.Inf(1)
				for _, f := range grid {
					lo, hi := refLimits(m, b, bd.ExactHz, f)
					r := sectionsDB(d.Sections, f, rate)
					margin := math.Min(r-lo, hi-r)
					worst = math.Min(worst, margin)
					if margin < -slackDB {
						t.Errorf("%g Hz, 1/%d band %s: response %.3f dB at %.6g Hz outside [%.2f, %.2f]", rate, b, bd.Label, r, f, lo, hi)
						break
					}
				}
				if d.Order != 3 {
					t.Logf("%g Hz, 1/%d band %s: order %d", rate, b, bd.Label, d.Order)
				}
				if d.Order < 3 || d.Order > 4 {
					t.Errorf("%g Hz, 1/%d band %s: order %d, want 3 (4 close to Nyquist)", rate, b, bd.Label, d.Order)
				}
				if worst < 0.04 {
					t.Logf("%g Hz, 1/%d band %s: worst margin %.3f dB", rate, b, bd.Label, worst)
				}
			}
			// 16 Hz (octave) or 16 Hz third up to 16 kHz at both rates.
			if want := map[int]int{1: 10, 3: 31}[b]; n != want {
				t.Errorf("%g Hz, 1/%d: %d bands checked, want %d", rate, b, n, want)
			}
		}
	}
}

func TestBandFractionsDesign(t *testing.T) {
	m := loadMask(t)
	for _, b := range BandFractions {
		bd, err := FindBand(b, 1000)
		if err != nil {
			bd = NewBand(b, 0)
		}
		d, err := DesignBand(bd, 48000)
		if err != nil {
			t.Fatalf("1/%d: %v", b, err)
		}
		if len(d.Mask) == 0 {
			t.Fatalf("1/%d: no mask", b)
		}
		for _, p := range d.Mask {
			lo, hi := refLimits(m, b, bd.ExactHz, p.FrequencyHz)
			if math.Abs(lo-p.LowerDB) > 1e-9 && !(math.IsInf(lo, -1) && math.IsInf(p.LowerDB, -1)) || math.Abs(hi-p.UpperDB) > 1e-9 {
				t.Errorf("1/%d %s: mask [%g, %g], testdata [%g, %g]", b, p.Label, p.LowerDB, p.UpperDB, lo, hi)
			}
			if r := sectionsDB(d.Sections, p.FrequencyHz, 48000); !p.Within(r) {
				t.Errorf("1/%d %s: response %.3f dB outside [%g, %g]", b, p.Label, r, p.LowerDB, p.UpperDB)
			}
		}
	}
}

func TestBandAboveNyquistRefused(t *testing.T) {
	bd, _ := FindBand(3, 20000)
	_, err := DesignBand(bd, 44100)
	if !errors.Is(err, ErrAboveNyquist) {
		t.Fatalf("20 kHz third at 44.1 kHz: want ErrAboveNyquist, got %v", err)
	}
}

// TestBandStage designs the band family through the spec, as apply and
// verify do, and checks that the stage carries the class 1 mask and meets
// it at every point.
func TestBandStage(t *testing.T) {
	spec, err := ParseSpec([]byte(`{"family": "band", "fraction": 3, "midband_hz": 1000}`))
	if err != nil {
		t.Fatal(err)
	}
	for _, rate := range []float64{44100, 48000, 96000} {
		f, err := Design(spec, rate)
		if err != nil {
			t.Fatalf("%g Hz: %v", rate, err)
		}
		st := f.Stages[0]
		if st.Form != FormStandard || st.Response != Bandpass || len(st.Mask) != 17 {
			t.Fatalf("%g Hz: form %q, response %q, %d mask points; want standard, bandpass, 17", rate, st.Form, st.Response, len(st.Mask))
		}
		for _, m := range st.Mask {
			if r := f.EffectiveDB(m.FrequencyHz); !m.Within(r) {
				t.Errorf("%g Hz, %s (%.2f Hz): %.3f dB outside [%g, %g]", rate, m.Label, m.FrequencyHz, r, m.LowerDB, m.UpperDB)
			}
			if m.Source == "" {
				t.Errorf("mask point %s without a source", m.Label)
			}
		}
	}
	for _, tc := range []struct {
		name, spec string
		rate       float64
		kind       ErrorKind
	}{
		{"zero phase", `{"family": "band", "fraction": 3, "midband_hz": 1000, "zero_phase": true}`, 48000, ErrInvalid},
		{"above Nyquist", `{"family": "band", "fraction": 1, "midband_hz": 16000}`, 44100, ErrAboveNyquist},
		{"not a midband", `{"family": "band", "fraction": 3, "midband_hz": 1100}`, 48000, ErrInvalid},
		{"bad fraction", `{"family": "band", "fraction": 4, "midband_hz": 1000}`, 48000, ErrUnsupported},
		{"no midband", `{"family": "band", "fraction": 3}`, 48000, ErrInvalid},
		{"foreign key", `{"family": "band", "fraction": 3, "midband_hz": 1000, "order": 4}`, 48000, ErrInvalid},
	} {
		t.Run(tc.name, func(t *testing.T) {
			spec, err := ParseSpec([]byte(tc.spec))
			if err == nil {
				_, err = Design(spec, tc.rate)
			}
			if KindOf(err) != tc.kind {
				t.Errorf("got %v (kind %d), want kind %d", err, KindOf(err), tc.kind)
			}
		})
	}
}
