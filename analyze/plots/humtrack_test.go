package plots

import (
	"bytes"
	"strings"
	"testing"
)

func TestHumTrackRenders(t *testing.T) {
	s := HumTrackPlot{Title: "test", TimesS: []float64{0, 1, 2}, Hz: []float64{50, 50.2, 50.1},
		BlockTimesS: []float64{0.5, 1.5}, InDB: []float64{-30, -31}, OutDB: []float64{-80, -82}}
	var b bytes.Buffer
	if err := HumTrack(&b, "svg", s); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "<svg") || !strings.Contains(b.String(), "fundamental of the hum") {
		t.Errorf("no SVG with the panel's title")
	}
	s.Hz = s.Hz[:2]
	if err := HumTrack(&b, "svg", s); err == nil {
		t.Errorf("mismatched track: no error")
	}
}
