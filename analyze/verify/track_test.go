package verify

import (
	"context"
	"math"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// TestTrackedNotchAlongTrack reads a tracking notch along the hum's track
// on an invented Reedmere recording (process/humscene) whose hum moves by
// 1 Hz over 2 s: filtered with a 0.5 Hz tracking notch, each of the first
// harmonics reads at least trackedDeepDB down and never fails; filtered
// with a fixed notch at the nominal centres, the same checks (the spec
// verified as tracking) do not pass.
func TestTrackedNotchAlongTrack(t *testing.T) {
	// trackedDeepDB is our own bound: the tracking notch is built to take
	// 40 dB off the hum (process's tracking goal test); 10 dB of room.
	const trackedDeepDB = -30.0
	const rate, dur, harmonics = 4000.0, 24.0, 5
	sc := humscene.Reedmere(rate, dur, 7)
	x := sc.Mix(1)
	stage := design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: harmonics, BandwidthHz: 0.5}
	trackSpec := design.Spec{Stages: []design.Stage{stage}, ZeroPhase: true}
	trackSpec.Stages[0].Tracking = true
	fixedSpec := design.Spec{Stages: []design.Stage{stage}, ZeroPhase: true}
	dir := t.TempDir()
	for _, tc := range []struct {
		name     string
		spec     design.Spec
		tracking bool
	}{
		{"tracking notch", trackSpec, true},
		{"fixed notch", fixedSpec, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var tk process.NewHumTracker
			if tc.tracking {
				tk = humscene.Tracker
			}
			_, res, err := humscene.Filter(dir, tc.name, x, rate, tc.spec, tk)
			if err != nil {
				t.Fatal(err)
			}
			r, err := Files(context.Background(), trackSpec, res.Input, res.Output, Options{NewTracker: humscene.Tracker})
			if err != nil {
				t.Fatal(err)
			}
			n, passed := 0, 0
			for _, c := range r.Checks {
				if c.Kind != KindNotch {
					continue
				}
				n++
				m := math.NaN()
				if c.MeasuredDB != nil {
					m = *c.MeasuredDB
				}
				t.Logf("%.3f Hz %s measured %.1f dB range %v: %s", c.FrequencyHz, c.Verdict, m, c.TrackRangeHz, c.Reason)
				if len(c.TrackRangeHz) != 2 || c.TrackRangeHz[1]-c.TrackRangeHz[0] < 0.5 {
					t.Errorf("%.3f Hz: track range %v does not show the 1 Hz move", c.FrequencyHz, c.TrackRangeHz)
				}
				if tc.tracking {
					if c.Verdict == Fail {
						t.Errorf("%.3f Hz: a tracking notch read along its track failed", c.FrequencyHz)
					}
					if c.Verdict == Pass {
						passed++
					}
					if c.Verdict == Pass && !(m <= trackedDeepDB) {
						t.Errorf("%.3f Hz: passed at %.1f dB, not %.0f dB or lower", c.FrequencyHz, m, trackedDeepDB)
					}
				} else if c.Verdict == Pass {
					t.Errorf("%.3f Hz: a fixed notch the hum moved away from passed as tracking (%.1f dB)", c.FrequencyHz, m)
				}
			}
			if n != harmonics {
				t.Fatalf("%d notch centres checked, want %d", n, harmonics)
			}
			if tc.tracking && passed == 0 {
				t.Error("no centre of the tracking notch was read: the check shows nothing")
			}
		})
	}
}
