package design

import (
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzSpec feeds arbitrary bytes to ParseSpec and CheckSpec and designs
// what they accept at a few common rates. Nothing may panic; a design
// that succeeds must have only finite sections, each stable: both poles
// strictly inside the unit circle, which for 1 + a1 z^-1 + a2 z^-2 is
// |a2| < 1 and |a1| < 1 + a2 (the stability triangle; Proakis and
// Manolakis, Digital Signal Processing, 4th ed., section 3.6.7).
func FuzzSpec(f *testing.F) {
	names, _ := filepath.Glob(filepath.Join("..", "samples", "specs", "*.json"))
	for _, n := range names {
		if b, err := os.ReadFile(n); err == nil {
			f.Add(b)
		}
	}
	for _, s := range []string{
		`{"family":"butterworth","response":"lowpass","order":4,"cutoff_hz":1000}`,
		`{"family":"elliptic","response":"bandstop","passband_hz":[900,1300],"stopband_hz":[1000,1200],"ripple_db":0.5,"attenuation_db":60}`,
		`{"family":"chebyshev2","response":"highpass","order":8,"cutoff_hz":40,"attenuation_db":80}`,
		`{"family":"bessel","response":"bandpass","order":5,"cutoff_hz":[300,3000],"bessel_norm":"delay"}`,
		`{"stages":[{"family":"notch","fundamental_hz":50,"harmonics":5,"q":30},{"family":"chebyshev1","response":"lowpass","order":3,"cutoff_hz":5000,"ripple_db":1}],"zero_phase":true}`,
		"\xEF\xBB\xBF{\"family\":\"butterworth\",\"response\":\"highpass\",\"order\":32,\"cutoff_hz\":0.001}",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		spec, err := ParseSpec(data)
		if err != nil {
			return
		}
		if err := CheckSpec(spec); err != nil {
			return
		}
		for _, st := range spec.Stages {
			// Large combs are slow to design (about a second for
			// MaxNotches): keep each execution short.
			if st.Family == Notch && (st.Harmonics == 0 || st.Harmonics > 64) {
				return
			}
		}
		for _, rate := range []float64{8000, 44100, 192000} {
			flt, err := Design(spec, rate)
			if err != nil {
				continue
			}
			for i, s := range flt.Sections() {
				for _, v := range s {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("rate %g: section %d not finite: %v", rate, i, s)
					}
				}
				a1, a2 := s[4]/s[3], s[5]/s[3]
				if !(math.Abs(a2) < 1 && math.Abs(a1) < 1+a2) {
					t.Fatalf("rate %g: section %d has a pole on or outside the unit circle: %v", rate, i, s)
				}
			}
		}
	})
}
