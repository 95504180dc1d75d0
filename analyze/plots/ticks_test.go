package plots

import (
	"reflect"
	"testing"

	"gonum.org/v1/plot"
)

func labelled(ts []plot.Tick) []string {
	var out []string
	for _, t := range ts {
		if t.Label != "" {
			out = append(out, t.Label)
		}
	}
	return out
}

func TestFreqTicks(t *testing.T) {
	cases := []struct {
		name     string
		min, max float64
		want     []string
	}{
		{"audio range", 0.1, 23997.6, []string{"0.1", "1", "10", "100", "1k", "10k"}},
		{"two decades label 2 and 5", 20, 2000, []string{"20", "50", "100", "200", "500", "1k", "2k"}},
		{"not positive gives none", 0, 100, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := labelled(freqTicks{}.Ticks(tc.min, tc.max)); !reflect.DeepEqual(got, tc.want) {
				t.Errorf("labels %q, want %q", got, tc.want)
			}
		})
	}
}

func TestLinearTicks(t *testing.T) {
	cases := []struct {
		name     string
		tk       linearTicks
		min, max float64
		want     []string
	}{
		{"dB", linearTicks{target: 6}, -120, 5, []string{"-120", "-100", "-80", "-60", "-40", "-20", "0"}},
		{"unit circle", linearTicks{target: 5}, -1.15, 1.15, []string{"-1.0", "-0.5", "0.0", "0.5", "1.0"}},
		{"fifths", linearTicks{target: 4}, 0, 1, []string{"0.0", "0.2", "0.4", "0.6", "0.8", "1.0"}},
		{"degrees", linearTicks{target: 6, degrees: true}, -700, 0, []string{"-540", "-360", "-180", "0"}},
		{"empty range", linearTicks{target: 6}, 3, 3, []string{"3"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ticks := tc.tk.Ticks(tc.min, tc.max)
			var got []string
			for _, tk := range ticks {
				if tk.Label != "" && tk.Value >= tc.min-1e-9 && tk.Value <= tc.max+1e-9 {
					got = append(got, tk.Label)
				}
			}
			if tc.name != "empty range" {
				got = labelled(ticks)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("labels %q, want %q", got, tc.want)
			}
		})
	}
}
