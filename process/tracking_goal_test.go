package process_test

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// Limits of the tracking notch's goal (measured with the twin-polarity
// method of package humscene).
const (
	// goalReductionDB: at least this much less hum-driven output at each
	// harmonic in every 1 s block but the first and last.
	goalReductionDB = 40.0
	// goalPassbandDB: the wanted sound 3 Hz or more from every harmonic
	// changes by at most this much.
	goalPassbandDB = 0.1
	// goalClickDB: the hum-driven residual stays this far under the
	// input hum's RMS in every 10 ms.
	goalClickDB = -30.0
	// goalHighDBFS: output minus clean above 8 kHz stays below this.
	goalHighDBFS = -90.0
	// goalWidthHz: the notches' -3 dB width (of the combined
	// forward-backward response for zero phase).
	goalWidthHz = 0.5
)

// TestTrackingNotchGoal runs the tracking notch on short versions of the
// two invented scenes (12 s at 24 kHz, so that go test stays fast; the
// 60 s run is testdata/humtrack) and checks the goal's figures.
func TestTrackingNotchGoal(t *testing.T) {
	const rate, dur = 24000.0, 12.0
	cases := []struct {
		name      string
		scene     *humscene.Scene
		zeroPhase bool
	}{
		{"reedmere causal", humscene.Reedmere(rate, dur, 1), false},
		{"reedmere zero phase", humscene.Reedmere(rate, dur, 1), true},
		{"calder fold generator causal", humscene.CalderFold(rate, dur, 2), false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := tc.scene
			spec := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: s.Nominal, Harmonics: s.Harmonics, BandwidthHz: goalWidthHz, Tracking: true}}, ZeroPhase: tc.zeroPhase}
			dir := t.TempDir()
			rec := &humscene.Recorder{}
			yp, res, err := humscene.Filter(dir, "plus", s.Mix(1), s.Rate, spec, rec.New)
			if err != nil {
				t.Fatal(err)
			}
			ym, _, err := humscene.Filter(dir, "minus", s.Mix(-1), s.Rate, spec, rec.Replay)
			if err != nil {
				t.Fatal(err)
			}
			r, err := humscene.Measure(s, yp, ym, s.Harmonics)
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("track %.3f-%.3f Hz; worst reduction per harmonic %.1f dB; passband %.3f dB at %.1f Hz; click %.1f dB at %.2f s; above 8 kHz %.1f dBFS",
				res.TrackRangeHz[0], res.TrackRangeHz[1], r.Worst, r.PassbandDB, r.PassbandAt, r.ClickDB, r.ClickAtS, r.HighDBFS)
			if len(r.Excluded) > 0 {
				t.Errorf("calls near a harmonic in a scene built to keep them away: %v", r.Excluded)
			}
			for k, w := range r.Worst {
				if w < goalReductionDB {
					t.Errorf("harmonic %d: %.1f dB in its worst block, want >= %g", k+1, w, goalReductionDB)
				}
			}
			if r.PassbandDB > goalPassbandDB || r.PassbandDB < -goalPassbandDB {
				t.Errorf("passband changed %.3f dB at %.1f Hz, want within %g", r.PassbandDB, r.PassbandAt, goalPassbandDB)
			}
			if r.ClickDB > goalClickDB {
				t.Errorf("hum-driven residual %.1f dB re hum RMS at %.2f s, want <= %g", r.ClickDB, r.ClickAtS, goalClickDB)
			}
			if !(r.HighDBFS < goalHighDBFS) {
				t.Errorf("output minus clean above 8 kHz peaks at %.1f dBFS, want < %g", r.HighDBFS, goalHighDBFS)
			}
			// The notch width: the design's own check of the effective
			// -3 dB edges.
			f, err := design.Design(spec, s.Rate)
			if err != nil {
				t.Fatal(err)
			}
			for _, w := range f.Stages[0].NotchBandwidthHz {
				if w > goalWidthHz {
					t.Errorf("notch %.3f Hz wide, want <= %g", w, goalWidthHz)
				}
			}
		})
	}
}

// TestTrackingErrors checks that a tracking run that cannot be done fails
// with an error naming the file, and writes no output.
func TestTrackingErrors(t *testing.T) {
	dir := t.TempDir()
	s := humscene.Reedmere(8000, 3, 1)
	hum := filepath.Join(dir, "hum.wav")
	if err := humscene.WriteWAV(hum, s.Mix(1), s.Rate, 32); err != nil {
		t.Fatal(err)
	}
	quiet := filepath.Join(dir, "quiet.wav")
	if err := humscene.WriteWAV(quiet, s.Clean, s.Rate, 32); err != nil {
		t.Fatal(err)
	}
	notch := design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: 5, BandwidthHz: 0.5, Tracking: true}
	cases := []struct {
		name    string
		in      string
		spec    design.Spec
		tracker process.NewHumTracker
		is      error
		text    string
	}{
		{"no tracker", hum, design.Spec{Stages: []design.Stage{notch}}, nil, process.ErrNoTracker, ""},
		{"two tracking stages", hum, design.Spec{Stages: []design.Stage{notch, notch}}, humscene.Tracker, nil, "both track the hum"},
		{"no hum in the file", quiet, design.Spec{Stages: []design.Stage{notch}}, humscene.Tracker, analyze.ErrNoHum, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(dir, "out.wav")
			_, err := process.FilterFile(context.Background(), process.FileJob{Input: tc.in, Output: out, Spec: tc.spec, NewTracker: tc.tracker})
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), tc.in) {
				t.Errorf("error %q does not name the file", err)
			}
			if tc.is != nil && !errors.Is(err, tc.is) {
				t.Errorf("error %q is not %v", err, tc.is)
			}
			if tc.text != "" && !strings.Contains(err.Error(), tc.text) {
				t.Errorf("error %q lacks %q", err, tc.text)
			}
			if _, serr := os.Stat(out); serr == nil {
				t.Errorf("output written despite the error")
			}
		})
	}
}
