package verify

import (
	"context"
	"math"
	"path/filepath"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// TestTrackedNotchAlongTrack reads a tracking notch along the hum's track
// on an invented Reedmere recording (process/humscene) whose hum moves by
// 1 Hz over 2 s: filtered with a 0.5 Hz tracking notch, each of the first
// harmonics reads at least trackedDeepDB down and never fails, causal or
// zero phase, through verify and through apply --verify's observer;
// filtered with a fixed notch at the nominal centres, the same checks
// (the spec verified as tracking) do not pass. With the hum 50 dB down
// under the same wanted sound the readings lie near 0 dB, which the sound
// beside the hum's line explains: unmeasurable, never a fail.
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
	causalSpec := trackSpec
	causalSpec.ZeroPhase = false
	fixedSpec := design.Spec{Stages: []design.Stage{stage}, ZeroPhase: true}
	// The hum 50 dB down under the same wanted sound: read where it
	// still stands above the sound, unmeasurable where it does not.
	weak := make([]float64, len(x))
	for i := range weak {
		weak[i] = 0.003*sc.Hum[i] + sc.Clean[i]
	}
	dir := t.TempDir()
	for _, tc := range []struct {
		name     string
		x        []float64
		spec     design.Spec
		tracking bool
		mustRead bool // the hum stands far enough above the sound to be read
	}{
		{"tracking notch", x, trackSpec, true, true},
		{"causal tracking notch", x, causalSpec, true, true},
		{"weak hum", weak, trackSpec, true, false},
		{"fixed notch", x, fixedSpec, false, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var tk process.NewHumTracker
			if tc.tracking {
				tk = humscene.Tracker
			}
			_, res, err := humscene.Filter(dir, tc.name, tc.x, rate, tc.spec, tk)
			if err != nil {
				t.Fatal(err)
			}
			spec := tc.spec
			spec.Stages[0].Tracking = true // the fixed notch verified as tracking
			r, err := Files(context.Background(), spec, res.Input, res.Output, Options{NewTracker: humscene.Tracker})
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
				} else if k := math.Round(c.FrequencyHz / 50); !(c.FrequencyHz >= k*c.TrackRangeHz[0] && c.FrequencyHz <= k*c.TrackRangeHz[1]) {
					t.Errorf("%.3f Hz: not harmonic %g of the track's range %v", c.FrequencyHz, k, c.TrackRangeHz)
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
			if tc.tracking && tc.mustRead && passed == 0 {
				t.Error("no centre of the tracking notch was read: the check shows nothing")
			}
		})
	}
	t.Run("apply --verify", func(t *testing.T) {
		// The observer of an apply run reads the same way.
		ob := NewObserver(Options{})
		job := process.FileJob{Input: filepath.Join(dir, "tracking notch.wav"), Output: filepath.Join(dir, "observed.wav"),
			Spec: trackSpec, NewTracker: humscene.Tracker, Observe: ob.Observe}
		res, err := process.FilterFile(context.Background(), job)
		if err != nil {
			t.Fatal(err)
		}
		r := ob.Result(res)
		n := 0
		for _, c := range r.Checks {
			if c.Kind != KindNotch {
				continue
			}
			if c.Verdict != Pass || c.MeasuredDB == nil || *c.MeasuredDB > trackedDeepDB || len(c.TrackRangeHz) != 2 {
				t.Errorf("%.3f Hz: %s, %v dB, want a pass at %.0f dB or lower read along the track: %s", c.FrequencyHz, c.Verdict, c.MeasuredDB, trackedDeepDB, c.Reason)
			}
			n++
		}
		if n != harmonics {
			t.Errorf("%d notch centres checked, want %d", n, harmonics)
		}
	})
}
