package process

import (
	"strings"
	"testing"
)

// TestTrackedWarnings checks the two cautions of a tracked run: a track
// that never comes within trackFarHz of the stage's fundamental, and a
// hum measured in fewer than trackMinFound of the track's points.
func TestTrackedWarnings(t *testing.T) {
	for _, tc := range []struct {
		name          string
		lo, hi, found float64
		far, few      bool
	}{
		{"grid around nominal", 49.9, 50.1, 0.97, false, false},
		{"grid just off nominal", 50.1, 50.2, 0.97, false, false},
		{"generator sag reaching nominal", 58.8, 60.0, 0.95, false, false},
		{"noise above nominal", 50.28, 50.46, 0.97, true, false},
		{"below nominal", 59.02, 59.15, 0.97, true, false},
		{"hum in few points", 49.9, 50.1, 0.3, false, true},
		{"both", 51.0, 51.5, 0.2, true, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			fund := 50.0
			if tc.hi > 55 {
				fund = 60
			}
			w := (&tracked{lo: tc.lo, hi: tc.hi, found: tc.found}).warnings(fund)
			var far, few bool
			for _, s := range w {
				far = far || strings.Contains(s, "fundamental_hz")
				few = few || strings.Contains(s, "measured in only")
			}
			if far != tc.far || few != tc.few || len(w) != btoi(tc.far)+btoi(tc.few) {
				t.Errorf("track %g-%g Hz, found %g, fundamental %g: warnings %q; want far %v, few %v", tc.lo, tc.hi, tc.found, fund, w, tc.far, tc.few)
			}
		})
	}
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}
