package main

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// TestSurveyDriftNoteNamesTrack: a hum that drifts more than a fixed
// notch can follow (50 to 51.2 Hz in 12 s, an invented test signal) gets
// a note that names the way to track it: the flag and the spec key.
func TestSurveyDriftNoteNamesTrack(t *testing.T) {
	const rate, seconds = 8000, 12
	name := filepath.Join(t.TempDir(), "drift.wav")
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: 1, Bits: 32, Encoding: wavio.Float}})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	buf := make([]float64, rate*seconds)
	phase := 0.0 // cycles of the fundamental
	for i := range buf {
		f := 50 + 1.2*float64(i)/float64(len(buf))
		for k, a := range map[int]float64{1: 0.05, 2: 0.02, 3: 0.03} {
			buf[i] += a * math.Sin(2*math.Pi*float64(k)*phase)
		}
		buf[i] += 1e-4 * rng.NormFloat64()
		phase += f / rate
	}
	w.WriteFrames(buf)
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "survey", name)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "cannot follow it") || !strings.Contains(out, "apply --track") || !strings.Contains(out, `"tracking": true`) {
		t.Errorf("survey does not point a drifting hum to --track:\n%s", out)
	}
}
