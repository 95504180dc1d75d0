package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/humscene"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// perChannelDoc is what the test reads of verify --json and of a
// record's verification.
type perChannelDoc struct {
	Verdict         string `json:"verdict"`
	TrackPerChannel bool   `json:"track_per_channel"`
	Checks          []struct {
		Channel      int       `json:"channel"`
		Kind         string    `json:"kind"`
		TrackRangeHz []float64 `json:"track_range_hz"`
	} `json:"checks"`
}

// trackRanges returns each channel's track range read from the notch
// centres of d.
func (d perChannelDoc) trackRanges(t *testing.T) map[int][]float64 {
	t.Helper()
	out := map[int][]float64{}
	for _, c := range d.Checks {
		if c.Kind == "notch" && len(c.TrackRangeHz) == 2 {
			out[c.Channel] = c.TrackRangeHz
		}
	}
	if len(out) != 2 {
		t.Fatalf("notch centres read along a track on %d channels, want 2", len(out))
	}
	return out
}

// sameTrackHz: verify measures the track again with the same tracker
// on the same input that apply measured it on.
const sameTrackHz = 1e-6

// TestVerifyTrackPerChannel: a file whose two channels hear two supplies
// (the invented Reedmere pump house of process/humscene: the mains pump
// around 50 Hz on channel 1, the standby pump's generator set around
// 49.3 Hz on channel 2), filtered with apply --track --track-per-channel,
// is verified along each channel's own track by apply --verify, by
// verify --track-per-channel and by verify --manifest (from the record's
// track_per_channel); plain verify reads both channels along one track.
// The report says how the run tracked, and a later run that asks for
// one shared track does not take the output as its own.
func TestVerifyTrackPerChannel(t *testing.T) {
	const rate, dur = 4000.0, 24.0
	a, b := humscene.Reedmere(rate, dur, 7), humscene.ReedmereStandby(rate, dur, 8)
	x, y := a.Mix(1), b.Mix(1)
	frames := make([]float64, 0, 2*len(x))
	for i := range x {
		frames = append(frames, x[i], y[i])
	}
	dir := t.TempDir()
	in := filepath.Join(dir, "pump-house.wav")
	w, err := wavio.Create(in, wavio.WriterOptions{Format: wavio.Format{SampleRate: int(rate), Channels: 2, Bits: 32, Encoding: wavio.Float}})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.WriteFrames(frames); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	notch := []string{"--family", "notch", "--hum", "50", "--harmonics", "5", "--notch-width", "0.5", "--track", "--zero-phase"}
	outDir := filepath.Join(dir, "clean")
	out := filepath.Join(outDir, "pump-house.wav")

	code, stdout, errs := runCLI(append(append([]string{"apply"}, notch...), "--track-per-channel", "--verify", "--json", "--no-progress", "--output", outDir, in)...)
	if code != exitOK {
		t.Fatalf("apply: exit %d, stderr %q", code, errs)
	}
	var man struct {
		Files []struct {
			TrackPerChannel bool          `json:"track_per_channel"`
			Verify          perChannelDoc `json:"verify"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(stdout), &man); err != nil || len(man.Files) != 1 {
		t.Fatalf("manifest: %v\n%s", err, stdout)
	}
	row := man.Files[0]
	if !row.TrackPerChannel || !row.Verify.TrackPerChannel || row.Verify.Verdict != "pass" {
		t.Fatalf("apply --verify: record track_per_channel %v, verification track_per_channel %v, verdict %q; want true, true, pass",
			row.TrackPerChannel, row.Verify.TrackPerChannel, row.Verify.Verdict)
	}
	applied := row.Verify.trackRanges(t)
	if slices.Equal(applied[1], applied[2]) {
		t.Fatalf("apply --verify read both channels along %v: not each along its own", applied[1])
	}

	verifyJSON := func(t *testing.T, args ...string) (int, perChannelDoc) {
		t.Helper()
		code, stdout, errs := runCLI(append([]string{"verify", "--json"}, args...)...)
		var doc struct {
			Files []perChannelDoc `json:"files"`
		}
		if err := json.Unmarshal([]byte(stdout), &doc); err != nil || len(doc.Files) != 1 {
			t.Fatalf("verify %v: exit %d, %v, stderr %q", args, code, err, errs)
		}
		return code, doc.Files[0]
	}
	for _, tc := range []struct {
		name string
		args []string
	}{
		{"--track-per-channel", append(slices.Clone(notch), "--track-per-channel", "--input", in, "--output", out)},
		{"--manifest", []string{"--manifest", outDir}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, d := verifyJSON(t, tc.args...)
			if code != exitOK || d.Verdict != "pass" || !d.TrackPerChannel {
				t.Fatalf("exit %d, verdict %q, track_per_channel %v; want 0, pass, true", code, d.Verdict, d.TrackPerChannel)
			}
			// The same tracker on the same input: the tracks apply --verify
			// read along.
			got := d.trackRanges(t)
			for ch := 1; ch <= 2; ch++ {
				for i := range 2 {
					if math.Abs(got[ch][i]-applied[ch][i]) > sameTrackHz {
						t.Errorf("channel %d read along %v, apply --verify along %v", ch, got[ch], applied[ch])
					}
				}
			}
		})
	}
	t.Run("one track", func(t *testing.T) {
		_, d := verifyJSON(t, append(slices.Clone(notch), "--input", in, "--output", out)...)
		if got := d.trackRanges(t); d.TrackPerChannel || !slices.Equal(got[1], got[2]) {
			t.Errorf("track_per_channel %v, channels read along %v: want one track for both", d.TrackPerChannel, got)
		}
	})
	t.Run("text", func(t *testing.T) {
		code, stdout, errs := runCLI(append(append([]string{"verify"}, notch...), "--track-per-channel", "--input", in, "--output", out)...)
		if code != exitOK || !strings.Contains(stdout, "channel 2's own track") {
			t.Errorf("exit %d, stderr %q; the table does not say channel 2 was read along its own track:\n%s", code, errs, stdout)
		}
	})
	t.Run("report", func(t *testing.T) {
		html := filepath.Join(dir, "report.html")
		if code, _, errs := runCLI("report", "--from", outDir, "--output", html); code != exitOK {
			t.Fatalf("exit %d, stderr %q", code, errs)
		}
		page, err := os.ReadFile(html)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(page), "each channel along its own track") {
			t.Error("the report does not say that each channel followed its own track")
		}
	})
	t.Run("a shared run does not skip the output", func(t *testing.T) {
		code, _, errs := runCLI(append(append([]string{"apply"}, notch...), "--no-progress", "--output", outDir, in)...)
		if code == exitOK || !strings.Contains(errs, "--replace") {
			t.Errorf("exit %d, stderr %q; want the output refused (made per channel), naming --replace", code, errs)
		}
	})
}
