package report

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// reportHumDropDB: the report must show the tracked hum this much lower
// in the output than in the input in every block (the tracking notch
// takes 40 dB or more off each harmonic; the sum is ruled by the lowest
// harmonics, which lose more).
const reportHumDropDB = 30.0

// TestHumTrackLevels runs a tracking notch on a short invented recording
// and checks what the report draws: a track within the hum's true range
// and the hum's level far lower after than before.
func TestHumTrackLevels(t *testing.T) {
	s := humscene.Reedmere(16000, 8, 3)
	dir := t.TempDir()
	spec := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, Harmonics: 9, BandwidthHz: 0.5, Tracking: true}}}
	if _, _, err := humscene.Filter(dir, "in", s.Mix(1), s.Rate, spec, humscene.Tracker); err != nil {
		t.Fatal(err)
	}
	hp, err := humTrackLevels(filepath.Join(dir, "in.wav"), filepath.Join(dir, "in-out.wav"), spec, Options{})
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, f := range s.Freq {
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}
	for i, hz := range hp.Hz {
		if hz < lo-0.05 || hz > hi+0.05 {
			t.Fatalf("track point %d at %.3f Hz, outside the true range %.3f-%.3f Hz", i, hz, lo, hi)
		}
	}
	if len(hp.BlockTimesS) != 8 {
		t.Fatalf("%d blocks, want 8", len(hp.BlockTimesS))
	}
	for b := range hp.InDB {
		if d := hp.InDB[b] - hp.OutDB[b]; d < reportHumDropDB {
			t.Errorf("block %d: hum %.1f dBFS in, %.1f out: %.1f dB less, want >= %g", b, hp.InDB[b], hp.OutDB[b], d, reportHumDropDB)
		}
	}
	t.Logf("hum in %.1f dBFS, out %.1f dBFS", hp.InDB, hp.OutDB)
	// The note lists the harmonics as survey does ("1,2,3"), not as a Go
	// slice ("[1 2 3]").
	if !strings.Contains(hp.Note, "harmonics 1,2") || strings.Contains(hp.Note, "[") {
		t.Errorf("note %q: want the harmonics as \"1,2,...\"", hp.Note)
	}
	if _, _, err := humTrackPlot(filepath.Join(dir, "in.wav"), filepath.Join(dir, "in-out.wav"), spec, Options{}); err != nil {
		t.Errorf("plot: %v", err)
	}
}
