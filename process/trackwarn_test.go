package process_test

import (
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// TestTrackingWarnsOffNominal runs a tracking notch on a recording of
// 50 Hz hum (the Reedmere scene) with the stage's fundamental_hz right
// and wrong: given 60 Hz the tracker follows whatever stands nearest
// 60 Hz and its harmonics, and the run must say so in its warnings (which
// apply prints and the run record keeps); given 50 Hz it must not.
func TestTrackingWarnsOffNominal(t *testing.T) {
	const rate, dur = 8000, 8
	s := humscene.Reedmere(rate, dur, 3)
	for _, tc := range []struct {
		name string
		hz   float64
		warn bool
	}{
		{"right fundamental", 50, false},
		{"wrong fundamental", 60, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			spec := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: tc.hz, Harmonics: 7, BandwidthHz: 0.5, Tracking: true}}}
			_, res, err := humscene.Filter(t.TempDir(), "in.wav", s.Mix(1), rate, spec, humscene.Tracker)
			if err != nil {
				t.Fatal(err)
			}
			var far []string
			for _, w := range res.Warnings {
				if strings.Contains(w, "from the notch's fundamental_hz") {
					far = append(far, w)
				}
			}
			if got := len(far) > 0; got != tc.warn {
				t.Errorf("track %.3f-%.3f Hz for fundamental_hz %g: warned %v, want %v (warnings %q)", res.TrackRangeHz[0], res.TrackRangeHz[1], tc.hz, got, tc.warn, res.Warnings)
			}
		})
	}
}
