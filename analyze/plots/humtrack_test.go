package plots

import (
	"bytes"
	"math"
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

// TestHumTrackLevelPanel: the level axis leaves room above the highest
// and below the lowest level (a steady input level is not drawn on the
// frame); an infinite level (a silent block) is left out of the range.
func TestHumTrackLevelPanel(t *testing.T) {
	s := HumTrackPlot{BlockTimesS: []float64{0.5, 1.5, 2.5}, InDB: []float64{-32, -32, -32}, OutDB: []float64{-90, math.Inf(-1), -100}}
	p := levelPanel(s)
	if p.Y.Max < -32+levelLegendPadDB || p.Y.Min > -100-levelPadDB {
		t.Errorf("level axis %g..%g dB; want at least %g..%g", p.Y.Min, p.Y.Max, -100.0-levelPadDB, -32.0+levelLegendPadDB)
	}
}
