package analyze

import (
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"testing"
	"time"
)

// partsTolHz bounds the difference between a track computed part by
// part and the same track computed at once: a tenth of followTolHz. The
// parts differ only by their own medians (amplitudes, weights and fit
// differences), which move the points little.
const partsTolHz = followTolHz / 10

// TestTrackerPartsMatchWhole: a long signal tracked in parts (60 s, with
// 10 s margins) gives the track the whole signal gives, including where a
// move falls on the border between two parts and where the hum is masked
// across one.
func TestTrackerPartsMatchWhole(t *testing.T) {
	const rate, dur = 8000.0, 300.0
	// Parts of 60 s: borders at 60, 120, 180 and 240 s.
	f := func(tt float64) float64 {
		return 50 + 0.2*math.Sin(2*math.Pi*tt/37) + 0.5*math.Tanh(tt-60) - 0.5*math.Tanh(tt-181)
	}
	x := humSignal(rate, dur, f, testAmps, 0.001, 11)
	// The hum masked by a loud noise burst over the border at 120 s.
	rng := rand.New(rand.NewPCG(12, 7))
	for i := int(119.5 * rate); i < int(120.7*rate); i++ {
		x[i] += 0.5 * rng.NormFloat64()
	}
	track := func(chunkS float64) *HumTrack {
		tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
		if err != nil {
			t.Fatal(err)
		}
		tk.chunkS = chunkS
		for i := 0; i < len(x); i += 4096 {
			tk.Write(x[i:min(i+4096, len(x))])
		}
		tr, err := tk.Result()
		if err != nil {
			t.Fatal(err)
		}
		return tr[0]
	}
	whole, parts := track(math.Inf(1)), track(60)
	if len(whole.Hz) != len(parts.Hz) {
		t.Fatalf("%d points in parts, %d at once", len(parts.Hz), len(whole.Hz))
	}
	worst, at := 0.0, 0
	for i := range whole.Hz {
		if d := math.Abs(whole.Hz[i] - parts.Hz[i]); d > worst {
			worst, at = d, i
		}
	}
	t.Logf("largest difference %.2e Hz at %.2f s; bridged %d/%d points", worst, float64(at)*whole.HopS, parts.Bridged, whole.Bridged)
	if worst > partsTolHz {
		t.Errorf("tracked in parts, the track differs by %.2e Hz at %.2f s; want at most %.0e Hz", worst, float64(at)*whole.HopS, partsTolHz)
	}
	if parts.Bridged != whole.Bridged || parts.LongestGapS != whole.LongestGapS {
		t.Errorf("bridged %d points (longest %.2f s) in parts, %d (%.2f s) at once", parts.Bridged, parts.LongestGapS, whole.Bridged, whole.LongestGapS)
	}
	// The track itself still follows the hum (the parts do not hide a
	// shared fault).
	for i, v := range parts.Hz {
		tt := float64(i) * parts.HopS
		if tt < edgeS || tt > dur-edgeS || (tt > 119 && tt < 121.5) {
			continue
		}
		if d := math.Abs(v - f(tt)); d > followTolHz {
			t.Errorf("at %.2f s the track reads %.4f Hz (whole %.4f), the hum is at %.4f Hz", tt, v, whole.Hz[i], f(tt))
		}
	}
}

// resultHeapMax bounds the peak growth of the Go heap while Result
// tracks an hour of hum (2 kHz, 7.2 million reduced-rate samples). Held
// whole, its working arrays took about 16 bytes a sample (115 MB here)
// plus some 400 bytes a hop (72 MB); in parts, one part's arrays (about
// 10 MB) and the track (9 bytes a hop, 1.6 MB) remain, with the garbage
// collector's slack (GOGC 100 lets the heap reach twice what is live).
const resultHeapMax = 48 << 20

// TestTrackerResultHeapBounded: tracking a long signal holds a bounded
// part of it on the heap, however long it is.
func TestTrackerResultHeapBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("tracks an hour of audio")
	}
	const rate, dur = 2000.0, 3600.0
	tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50, Harmonics: 3})
	if err != nil {
		t.Fatal(err)
	}
	defer tk.Close()
	buf := make([]float64, 8192)
	for i := 0; i < int(rate*dur); i += len(buf) {
		for j := range buf {
			tt := float64(i+j) / rate
			ph := 2 * math.Pi * (50*tt + 0.3*math.Sin(2*math.Pi*tt/600)*600/(2*math.Pi))
			buf[j] = 0.05*math.Sin(ph) + 0.02*math.Sin(3*ph+0.4)
		}
		tk.Write(buf)
	}
	base := heapInUse()
	var peak uint64
	stop := make(chan struct{})
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		var m runtime.MemStats
		tick := time.NewTicker(2 * time.Millisecond)
		defer tick.Stop()
		for {
			runtime.ReadMemStats(&m)
			peak = max(peak, m.HeapAlloc)
			select {
			case <-stop:
				return
			case <-tick.C:
			}
		}
	}()
	tr, err := tk.Result()
	close(stop)
	wg.Wait()
	if err != nil {
		t.Fatal(err)
	}
	grow := int64(peak) - int64(base)
	t.Logf("heap before Result %d MB, peak while it ran %d MB (growth %d MB); %d points, %.4f to %.4f Hz", base>>20, peak>>20, grow>>20, len(tr[0].Hz), min(tr[0].Range()), max(tr[0].Range()))
	if grow > resultHeapMax {
		t.Errorf("the heap grew by %d MB while tracking an hour; want at most %d MB", grow>>20, resultHeapMax>>20)
	}
	if lo, hi := tr[0].Range(); math.Abs(lo-49.7) > 0.01 || math.Abs(hi-50.3) > 0.01 {
		t.Errorf("the track spans %.4f to %.4f Hz; the hum wandered from 49.7 to 50.3 Hz", lo, hi)
	}
}
