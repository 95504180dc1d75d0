package verify

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/humscene"
	"github.com/wavsieve/wavsieve/process/wavio"
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

// TestTrackedNotchPerChannel reads a tracking notch per channel on an
// invented two-channel recording of the Reedmere pump house
// (process/humscene) whose channels hear two supplies: channel 1 the
// mains pump (around 50 Hz, a 1 Hz rise over 2 s), channel 2 the
// standby pump on its own generator set (around 49.3 Hz, a 0.6 Hz sag).
// Filtered with one track per channel (apply --track
// --track-per-channel), the verification per channel (verify
// --track-per-channel, and apply --verify's observer) reads each
// channel along its own track and passes; read with one track from all
// channels, both channels are read along one track that is not their
// own. Filtered with one shared track, the notches miss both hums, and
// the verification per channel says so.
func TestTrackedNotchPerChannel(t *testing.T) {
	// trackTolHz: how far the range of a channel's track, over the frames
	// read, may lie from the range of the true fundamental there (the
	// tracker's own tests ask 1 mHz of a steady hum; here the hum moves,
	// the rate is low and the track is smoothed over tenths of seconds).
	const trackTolHz = 0.02
	// sameTrackHz: the observer reads the track the run measured, and
	// verify measures it again with the same tracker on the same input.
	const sameTrackHz = 1e-6
	const rate, dur, harmonics = 4000.0, 24.0, 5
	scenes := []*humscene.Scene{humscene.Reedmere(rate, dur, 7), humscene.ReedmereStandby(rate, dur, 8)}
	dir := t.TempDir()
	in := filepath.Join(dir, "pump-house.wav")
	writeChannels(t, in, rate, scenes[0].Mix(1), scenes[1].Mix(1))
	stage := design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: harmonics, BandwidthHz: 0.5, Tracking: true}
	spec := design.Spec{Stages: []design.Stage{stage}, ZeroPhase: true}

	// The run tracked per channel, measured as apply --verify does.
	ob := NewObserver(Options{})
	own := process.FileJob{Input: in, Output: filepath.Join(dir, "own.wav"), Spec: spec, NewTracker: humscene.Tracker, TrackPerChannel: true, Observe: ob.Observe}
	res, err := process.FilterFile(context.Background(), own)
	if err != nil {
		t.Fatal(err)
	}
	if !res.TrackPerChannel {
		t.Error("the run's result does not say that it tracked each channel")
	}
	observed := ob.Result(res)
	shared := process.FileJob{Input: in, Output: filepath.Join(dir, "shared.wav"), Spec: spec, NewTracker: humscene.Tracker}
	if _, err := process.FilterFile(context.Background(), shared); err != nil {
		t.Fatal(err)
	}
	verifyFiles := func(out string, perChannel bool) *Result {
		r, err := Files(context.Background(), spec, in, out, Options{NewTracker: humscene.Tracker, TrackPerChannel: perChannel})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	// trueRange is the range of channel c's true fundamental over the
	// frames a result read.
	trueRange := func(r *Result, c int) (lo, hi float64) {
		f := scenes[c-1].Freq[r.SkippedFrames : r.Frames-r.SkippedFrames]
		return slices.Min(f), slices.Max(f)
	}
	// ranges returns each channel's track range from r's notch centres,
	// all centres of a channel agreeing.
	ranges := func(t *testing.T, r *Result) map[int][]float64 {
		t.Helper()
		out := map[int][]float64{}
		n := 0
		for _, c := range r.Checks {
			if c.Kind != KindNotch {
				continue
			}
			n++
			if len(c.TrackRangeHz) != 2 {
				t.Fatalf("channel %d, %.3f Hz: no track range: %s", c.Channel, c.FrequencyHz, c.Reason)
			}
			if prev, ok := out[c.Channel]; ok && !slices.Equal(prev, c.TrackRangeHz) {
				t.Fatalf("channel %d: centres read along tracks %v and %v", c.Channel, prev, c.TrackRangeHz)
			}
			out[c.Channel] = c.TrackRangeHz
		}
		if n != 2*harmonics || len(out) != 2 {
			t.Fatalf("%d notch centres checked on %d channels, want %d on 2", n, len(out), 2*harmonics)
		}
		return out
	}
	// ownTrack checks that each channel was read along its own track,
	// and that the run passed.
	ownTrack := func(t *testing.T, r *Result) map[int][]float64 {
		t.Helper()
		if !r.TrackPerChannel {
			t.Error("the result does not say that each channel was read along its own track")
		}
		if r.Verdict != Pass {
			t.Errorf("verdict %s (%d passed, %d failed, %d unmeasurable), want pass", r.Verdict, r.Passed, r.Failed, r.Unmeasurable)
		}
		got := ranges(t, r)
		for ch, tr := range got {
			lo, hi := trueRange(r, ch)
			t.Logf("channel %d: track %.3f-%.3f Hz, true %.3f-%.3f Hz", ch, tr[0], tr[1], lo, hi)
			if math.Abs(tr[0]-lo) > trackTolHz || math.Abs(tr[1]-hi) > trackTolHz {
				t.Errorf("channel %d read along %.3f-%.3f Hz; its hum moved over %.3f-%.3f Hz", ch, tr[0], tr[1], lo, hi)
			}
		}
		for _, c := range r.Checks {
			if c.Kind == KindNotch && !strings.Contains(c.Reason, fmt.Sprintf("channel %d's own track", c.Channel)) {
				t.Errorf("channel %d, %.3f Hz: the reason does not name the channel's own track: %s", c.Channel, c.FrequencyHz, c.Reason)
			}
		}
		return got
	}

	var perChannel map[int][]float64
	t.Run("filtered per channel, read per channel", func(t *testing.T) {
		perChannel = ownTrack(t, verifyFiles(own.Output, true))
	})
	t.Run("apply --verify", func(t *testing.T) {
		got := ownTrack(t, observed)
		for ch, tr := range got {
			if p := perChannel[ch]; len(p) == 2 && (math.Abs(p[0]-tr[0]) > sameTrackHz || math.Abs(p[1]-tr[1]) > sameTrackHz) {
				t.Errorf("channel %d: the observer read along %v, verify along %v", ch, tr, p)
			}
		}
	})
	t.Run("filtered per channel, read along one track", func(t *testing.T) {
		r := verifyFiles(own.Output, false)
		if r.TrackPerChannel {
			t.Error("a shared reading says it was per channel")
		}
		got := ranges(t, r)
		if !slices.Equal(got[1], got[2]) {
			t.Fatalf("one track read as %v and %v", got[1], got[2])
		}
		off := false
		for ch := 1; ch <= 2; ch++ {
			lo, hi := trueRange(r, ch)
			off = off || math.Abs(got[ch][0]-lo) > trackTolHz || math.Abs(got[ch][1]-hi) > trackTolHz
		}
		if !off {
			t.Errorf("one track %v from all channels fits both channels' hum: the scene does not tell the readings apart", got[1])
		}
	})
	t.Run("filtered along one track, read per channel", func(t *testing.T) {
		r := verifyFiles(shared.Output, true)
		ranges(t, r)
		if r.Verdict != Fail {
			t.Errorf("verdict %s, want fail: one track from both channels sits on neither channel's hum", r.Verdict)
		}
	})
}

// writeChannels writes the channels as one 64-bit float WAV file.
func writeChannels(t *testing.T, name string, rate float64, chans ...[]float64) {
	t.Helper()
	n := len(chans[0])
	x := make([]float64, 0, n*len(chans))
	for i := 0; i < n; i++ {
		for _, c := range chans {
			x = append(x, c[i])
		}
	}
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: int(rate), Channels: len(chans), Bits: 64, Encoding: wavio.Float}})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.WriteFrames(x); err != nil {
		w.Abort()
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}
