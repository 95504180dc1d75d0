package process_test

import (
	"context"
	"path/filepath"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// BenchmarkNotchComb times the fixed comb and the tracking comb of the
// same nine harmonics side by side on one 30 s, 48 kHz mono recording of
// the Reedmere scene (32-bit float), the whole file run (read, track,
// filter, write), causal and zero phase. Compare with
//
//	go test ./process/ -run '^$' -bench NotchComb -benchtime 5x
func BenchmarkNotchComb(b *testing.B) {
	s := humscene.Reedmere(48000, 30, 1)
	dir := b.TempDir()
	in := filepath.Join(dir, "in.wav")
	if err := humscene.WriteWAV(in, s.Mix(1), s.Rate, 32); err != nil {
		b.Fatal(err)
	}
	for _, zp := range []bool{false, true} {
		for _, track := range []bool{false, true} {
			name := "fixed"
			if track {
				name = "tracking"
			}
			if zp {
				name += "/zero-phase"
			} else {
				name += "/causal"
			}
			spec := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, Harmonics: 9, BandwidthHz: 0.5, Tracking: track}}, ZeroPhase: zp}
			b.Run(name, func(b *testing.B) {
				b.SetBytes(int64(len(s.Hum)) * 4)
				cpu0 := cpuSeconds()
				defer func() { b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N), "cpu-s/op") }()
				for i := 0; i < b.N; i++ {
					job := process.FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: spec, NewTracker: humscene.Tracker}
					if _, err := process.FilterFile(context.Background(), job); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
