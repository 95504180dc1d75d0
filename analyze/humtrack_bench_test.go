package analyze

import (
	"math"
	"testing"
)

// BenchmarkTracker times the hum tracker on 30 s of 48 kHz mono (nine
// harmonics of a wandering 50 Hz over noise): Write of the whole signal,
// then Result. Compare with the tracking notch's share of a file run in
// process's BenchmarkNotchComb:
//
//	go test ./analyze/ -run '^$' -bench Tracker -benchtime 10x
func BenchmarkTracker(b *testing.B) {
	const rate = 48000.0
	x := humSignal(rate, 30, func(t float64) float64 { return 50 + 0.2*math.Sin(2*math.Pi*t/11) }, testAmps, 0.01, 5)
	b.SetBytes(int64(len(x)) * 4)
	for i := 0; i < b.N; i++ {
		tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
		if err != nil {
			b.Fatal(err)
		}
		for j := 0; j < len(x); j += 4096 {
			tk.Write(x[j:min(j+4096, len(x))])
		}
		if _, err := tk.Result(); err != nil {
			b.Fatal(err)
		}
	}
}
