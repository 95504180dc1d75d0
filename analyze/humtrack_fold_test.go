package analyze

import (
	"math"
	"testing"
)

// foldTol bounds the difference between the folded and the plain dot
// product: a few roundings of sums of order 1.
const foldTol = 1e-14

// TestFoldedDot checks the folded dot product of the tracker's
// decimation against the plain sum of products, for the tracker's own
// symmetric kernels (odd lengths, from 1 up) and for short ones that
// miss the four-way loop.
func TestFoldedDot(t *testing.T) {
	for _, tc := range []struct {
		name string
		rate float64
	}{
		{"8 kHz", 8000},
		{"48 kHz", 48000},
		{"96 kHz", 96000},
		{"no decimation", 1500},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tk, err := NewTracker(TrackOptions{SampleRate: tc.rate, Channels: 1, NominalHz: 50})
			if err != nil {
				t.Fatal(err)
			}
			h := tk.h
			for i := range h {
				if h[i] != h[len(h)-1-i] {
					t.Fatalf("kernel of %d taps not symmetric at %d", len(h), i)
				}
			}
			for _, n := range []int{len(h), 1, 3, 5, 7, 9, 11} {
				k := h
				if n != len(h) {
					k = make([]float64, n)
					for i := range k {
						k[i] = 1 / (1 + math.Abs(float64(i-n/2)))
					}
				}
				x := make([]float64, n)
				want := 0.0
				for i := range x {
					x[i] = math.Sin(0.37*float64(i)) + 0.1*float64(i%5)
					want += k[i] * x[i]
				}
				if got := foldedDot(k, x); math.Abs(got-want) > foldTol {
					t.Errorf("%d taps: folded %.17g, plain %.17g", n, got, want)
				}
			}
		})
	}
}
