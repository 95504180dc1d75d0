package verify

import (
	"runtime"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// TestObserverMemory reads the runtime's memory statistics around the
// observer: what a measured file allocates stays near the budget it takes
// (so that ObserverMemory holds for any number of workers), and the
// budget is whole again once the file ends.
func TestObserverMemory(t *testing.T) {
	const (
		// slack covers the session's bookkeeping besides its buffers.
		slack = 2 << 20
		// overcount is how far the allocation may pass the estimate.
		overcount = 1.1
	)
	highpass := design.Stage{Family: design.Elliptic, Response: design.Highpass, PassbandHz: design.Edges{40}, StopbandHz: design.Edges{20}, RippleDB: 0.5, AttenuationDB: 40}
	cases := []struct {
		name   string
		notch  design.Stage
		frames int64
	}{
		// samples/specs/rumble-and-hum.json on a 120 s file.
		{"rumble and hum, 120 s", design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: 7, BandwidthHz: 2}, 5760000},
		// A narrow comb on a 23 min file wants 2^22-sample segments,
		// more than the budget: those checks are left to verify.
		{"narrow notch comb, 23 min", design.Stage{Family: design.Notch, FundamentalHz: 50, Harmonics: 19, BandwidthHz: 0.3}, 1 << 26},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := mustDesign(t, design.Spec{Stages: []design.Stage{highpass, c.notch}, ZeroPhase: true}, 48000)
			ob := NewObserver(Options{})
			job := &process.FileJob{Input: "in.wav", Output: "out.wav"}
			fi := wavio.Format{Channels: 2, SampleRate: 48000}
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			see := ob.Observe(job, fi, c.frames, f)
			runtime.ReadMemStats(&after)
			if see == nil {
				t.Fatalf("no measurement: %v", ob.sessions["out.wav"].err)
			}
			taken := ObserverMemory - ob.free
			got := int64(after.TotalAlloc - before.TotalAlloc)
			if taken <= 0 || taken > ObserverMemory || float64(got) > overcount*float64(taken)+slack {
				t.Errorf("allocated %d MiB, took %d MiB of the observer's budget", got>>20, taken>>20)
			}
			see(make([]float64, 2*4800), make([]float64, 2*4800))
			see(nil, nil)
			if ob.free != ObserverMemory {
				t.Errorf("budget after the file ended: %d of %d bytes free", ob.free, ObserverMemory)
			}
			if ob.sessions["out.wav"].s != nil {
				t.Error("the ended file's session is still held")
			}
		})
	}
}
