package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
)

// TestApplyTrackWarnsOffNominal runs apply --track with the right and
// the wrong mains frequency: on the demo's Reedmere recording (50 Hz
// hum) given --hum 50 the run must not warn; on the vibration file (a
// 60 Hz generator set) given --hum 50 the tracker follows noise near
// 50 Hz and the run must warn on stderr and in the manifest's warnings.
// (A steady synthetic 60 Hz hum given --hum 50 is refused outright: no
// hum stands above the floor there.)
func TestApplyTrackWarnsOffNominal(t *testing.T) {
	dir := t.TempDir()
	for _, tc := range []struct {
		name, file string
		warn       bool
	}{
		{"right mains", "reedmere-north-48k.wav", false},
		{"wrong mains", "pumphouse-vibration-12800.wav", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			outDir := filepath.Join(dir, "out-"+tc.file)
			in := filepath.Join("..", "..", "samples", tc.file)
			code, out, errs := runCLI("apply", "--family", "notch", "--hum", "50", "--harmonics", "7", "--notch-width", "0.5", "--track", "--json", "--no-progress", "--output", outDir, in)
			if code != exitOK {
				t.Fatalf("exit %d, stderr %q", code, errs)
			}
			var man struct {
				Files []struct {
					TrackRangeHz []float64 `json:"track_range_hz"`
					Warnings     []string  `json:"warnings"`
				} `json:"files"`
			}
			if err := json.Unmarshal([]byte(out), &man); err != nil || len(man.Files) != 1 {
				t.Fatalf("manifest: %v\n%s", err, out)
			}
			const key = "from the notch's fundamental_hz"
			inManifest := false
			for _, w := range man.Files[0].Warnings {
				inManifest = inManifest || strings.Contains(w, key)
			}
			onStderr := strings.Contains(errs, "warning") && strings.Contains(errs, key)
			if inManifest != tc.warn || onStderr != tc.warn {
				t.Errorf("%s --hum 50, track %v Hz: warning in manifest %v, on stderr %v, want %v\nstderr: %s", tc.file, man.Files[0].TrackRangeHz, inManifest, onStderr, tc.warn, errs)
			}
		})
	}
}
