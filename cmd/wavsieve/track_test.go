package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// trackCLITolHz: a steady synthetic hum over a low floor is tracked to
// this (the tracker's own test asks 1 mHz; here the file is short).
const trackCLITolHz = 0.005

// TestSurveyTrackAndApplyTrack checks the command line of tracking: the
// survey's fine track (text, --json, --track-csv) on a steady 60.03 Hz
// hum, then apply --track on the same file, whose manifest records the
// range the notches followed.
func TestSurveyTrackAndApplyTrack(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "hum.wav")
	writeSurveyWAV(t, in, 8000, 6, 60.03, map[int]float64{1: 0.02, 2: 0.02, 3: 0.005}, 1e-4, wavio.Float, 32, 0)
	csvPath := filepath.Join(dir, "track.csv")
	code, out, errs := runCLI("survey", "--track-csv", csvPath, in)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	if !strings.Contains(out, "fine track: 60.0") {
		t.Errorf("report lacks the fine track:\n%s", out)
	}
	data, err := os.ReadFile(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	if lines[0] != "time_s,fundamental_hz" || len(lines) < 200 {
		t.Fatalf("track CSV: header %q, %d lines", lines[0], len(lines))
	}
	for _, l := range lines[1:] {
		_, v, _ := strings.Cut(l, ",")
		f, err := strconv.ParseFloat(v, 64)
		if err != nil || math.Abs(f-60.03) > trackCLITolHz {
			t.Fatalf("track CSV line %q: want 60.03 Hz within %g", l, trackCLITolHz)
		}
	}
	code, out, _ = runCLI("survey", "--json", in)
	var doc struct {
		Files []struct {
			HumTrack *struct {
				LowestHz  float64   `json:"lowest_hz"`
				HighestHz float64   `json:"highest_hz"`
				Hz        []float64 `json:"fundamental_hz"`
			} `json:"hum_track"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || code != exitOK || doc.Files[0].HumTrack == nil {
		t.Fatalf("survey --json: exit %d, %v, no hum_track", code, err)
	}
	if ht := doc.Files[0].HumTrack; len(ht.Hz) != len(lines)-1 || math.Abs(ht.LowestHz-60.03) > trackCLITolHz {
		t.Errorf("hum_track: %d points (CSV %d), lowest %.4f Hz", len(ht.Hz), len(lines)-1, ht.LowestHz)
	}

	// apply --track: the manifest carries the range.
	outDir := filepath.Join(dir, "out")
	code, out, errs = runCLI("apply", "--family", "notch", "--hum", "60", "--harmonics", "3", "--notch-width", "0.5", "--track", "--json", "--no-progress", "--output", outDir, in)
	if code != exitOK {
		t.Fatalf("apply --track: exit %d, stderr %q", code, errs)
	}
	var man struct {
		Files []struct {
			TrackRangeHz []float64 `json:"track_range_hz"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &man); err != nil || len(man.Files) != 1 {
		t.Fatalf("manifest: %v\n%s", err, out)
	}
	if r := man.Files[0].TrackRangeHz; len(r) != 2 || math.Abs(r[0]-60.03) > trackCLITolHz || math.Abs(r[1]-60.03) > trackCLITolHz {
		t.Errorf("manifest track_range_hz %v, want [60.03 60.03] within %g", r, trackCLITolHz)
	}
	// --track with a spec that has no notch is a usage error.
	spec := filepath.Join(dir, "lp.json")
	os.WriteFile(spec, []byte(`{"family":"butterworth","response":"lowpass","order":2,"cutoff_hz":1000}`), 0o644)
	code, _, errs = runCLI("apply", "--spec", spec, "--track", "--no-progress", "--output", outDir, in)
	if code != exitUsage || !strings.Contains(errs, "no notch stage") {
		t.Errorf("--track without a notch: exit %d, stderr %q", code, errs)
	}
}
