package analyze

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// Tolerances for the comparison with SciPy.
const (
	// scipyRelTol: agreement asked of every value, relative.
	scipyRelTol = 1e-9
	// scipyAbsFloor: values that detrending drives to rounding noise (DC
	// after mean removal, 1e-30 against 1e-3 elsewhere) are compared
	// absolutely, at this fraction of the largest value of the same
	// spectrum.
	scipyAbsFloor = 1e-12
)

// scipyRefs is testdata/analyze/welch_refs.json, written by
// testdata/analyze/gen_welch_refs.py (SciPy 1.10.1, NumPy 1.24.2, Debian's
// /usr/bin/python3 3.11.2; the file records the versions).
type scipyRefs struct {
	SciPy      string    `json:"scipy"`
	SampleRate float64   `json:"sample_rate_hz"`
	X          []float64 `json:"x"`
	Y          []float64 `json:"y"`
	Welch      []struct {
		Name        string    `json:"name"`
		Window      string    `json:"window"`
		Nperseg     int       `json:"nperseg"`
		Noverlap    int       `json:"noverlap"`
		Scaling     string    `json:"scaling"`
		Detrend     string    `json:"detrend"`
		Average     string    `json:"average"`
		Call        string    `json:"call"`
		Frequencies []float64 `json:"frequencies_hz"`
		PSD         []float64 `json:"psd"`
	} `json:"welch"`
	Cross []struct {
		Name        string    `json:"name"`
		Window      string    `json:"window"`
		Nperseg     int       `json:"nperseg"`
		Noverlap    int       `json:"noverlap"`
		Detrend     string    `json:"detrend"`
		Average     string    `json:"average"`
		Frequencies []float64 `json:"frequencies_hz"`
		CSDRe       []float64 `json:"csd_re"`
		CSDIm       []float64 `json:"csd_im"`
		Coherence   []float64 `json:"coherence"`
	} `json:"cross"`
}

func loadSciPyRefs(t *testing.T) *scipyRefs {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "analyze", "welch_refs.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r scipyRefs
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Welch) == 0 || len(r.Cross) == 0 || len(r.X) == 0 {
		t.Fatal("welch_refs.json holds no cases")
	}
	return &r
}

// scipyWindow maps the generator's window names to ours.
func scipyWindow(t *testing.T, name string) Window {
	t.Helper()
	m := map[string]string{
		"hann": "hann", "hamming": "hamming", "blackmanharris": "blackman-harris",
		"flattop": "flat-top", "boxcar": "rectangular", "kaiser:8.6": "kaiser:8.6",
	}
	w, err := ParseWindow(m[name])
	if err != nil {
		t.Fatalf("window %q: %v", name, err)
	}
	return w
}

func scipyOptions(t *testing.T, fs float64, win string, nper, nover int, scaling, detrend, average string) Options {
	t.Helper()
	o := Options{SampleRate: fs, Segment: nper, Overlap: nover, Window: scipyWindow(t, win)}
	var err error
	if detrend == "constant" {
		detrend = "mean"
	}
	if o.Detrend, err = ParseDetrend(detrend); err != nil {
		t.Fatal(err)
	}
	if o.Scaling, err = ParseScaling(scaling); err != nil {
		t.Fatal(err)
	}
	if o.Average, err = ParseAverage(average); err != nil {
		t.Fatal(err)
	}
	return o
}

func maxAbs(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

// closeTo reports whether got is within scipyRelTol of want, or within
// scipyAbsFloor * scale of it.
func closeTo(got, want, scale float64) bool {
	d := math.Abs(got - want)
	return d <= scipyRelTol*math.Abs(want) || d <= scipyAbsFloor*scale
}

func TestWelchMatchesSciPy(t *testing.T) {
	r := loadSciPyRefs(t)
	for _, c := range r.Welch {
		t.Run(c.Name, func(t *testing.T) {
			for _, workers := range []int{1, 2} {
				o := scipyOptions(t, r.SampleRate, c.Window, c.Nperseg, c.Noverlap, c.Scaling, c.Detrend, c.Average)
				o.Workers = workers
				e, err := NewEstimator(o)
				if err != nil {
					t.Fatal(err)
				}
				got, err := e.PSD(nil, r.X)
				if err != nil {
					t.Fatal(err)
				}
				// Expected: c.PSD from c.Call, SciPy r.SciPy (1.10.1).
				if len(got) != len(c.PSD) {
					t.Fatalf("%d bins, scipy %d", len(got), len(c.PSD))
				}
				f := e.Frequencies(nil)
				scale := maxAbs(c.PSD)
				for k := range got {
					if !closeTo(got[k], c.PSD[k], scale) {
						t.Errorf("workers %d: bin %d (%g Hz): %.17g, scipy %.17g", workers, k, f[k], got[k], c.PSD[k])
					}
					if !closeTo(f[k], c.Frequencies[k], 1) {
						t.Errorf("bin %d at %g Hz, scipy %g Hz", k, f[k], c.Frequencies[k])
					}
				}
			}
		})
	}
}

func TestCSDAndCoherenceMatchSciPy(t *testing.T) {
	r := loadSciPyRefs(t)
	for _, c := range r.Cross {
		t.Run(c.Name, func(t *testing.T) {
			o := scipyOptions(t, r.SampleRate, c.Window, c.Nperseg, c.Noverlap, "density", c.Detrend, c.Average)
			e, err := NewEstimator(o)
			if err != nil {
				t.Fatal(err)
			}
			got, err := e.CSD(nil, r.X, r.Y)
			if err != nil {
				t.Fatal(err)
			}
			// Expected: scipy.signal.csd(x, y, ...) (SciPy 1.10.1), see the
			// case's "call" in the JSON.
			want := make([]complex128, len(c.CSDRe))
			mags := make([]float64, len(want))
			for k := range want {
				want[k] = complex(c.CSDRe[k], c.CSDIm[k])
				mags[k] = cmplx.Abs(want[k])
			}
			scale := maxAbs(mags)
			for k := range got {
				if !closeTo(real(got[k]), real(want[k]), scale) || !closeTo(imag(got[k]), imag(want[k]), scale) {
					t.Errorf("csd bin %d: %v, scipy %v", k, got[k], want[k])
				}
			}
			// scipy.signal.coherence always averages by the mean.
			o.Average = Mean
			e, err = NewEstimator(o)
			if err != nil {
				t.Fatal(err)
			}
			coh, err := e.Coherence(nil, r.X, r.Y)
			if err != nil {
				t.Fatal(err)
			}
			for k := range coh {
				// Expected: scipy.signal.coherence (SciPy 1.10.1).
				if !closeTo(coh[k], c.Coherence[k], 1) {
					t.Errorf("coherence bin %d: %.17g, scipy %.17g", k, coh[k], c.Coherence[k])
				}
			}
		})
	}
}
