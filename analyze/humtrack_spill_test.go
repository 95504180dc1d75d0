package analyze

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"testing"
)

// heapGrowthMax bounds the growth of the Go heap in use while a tracker
// takes 50 more minutes of 8 kHz audio (after the first 10). Kept on the
// heap, the reduced-rate copy would grow by 19.2 MB (1600 samples/s, 4
// bytes each); spilled, only the write buffer and the pending input stay.
const heapGrowthMax = 2 << 20

// writeTone writes secs seconds of a 50 Hz hum with its 3rd harmonic,
// continuing from sample *i, in blocks of 8192 frames.
func writeTone(tk *Tracker, rate float64, secs float64, i *int, buf []float64) {
	end := *i + int(secs*rate)
	for *i < end {
		n := min(len(buf), end-*i)
		for j := range buf[:n] {
			ph := 2 * math.Pi * 50 * float64(*i+j) / rate
			buf[j] = 0.05*math.Sin(ph) + 0.02*math.Sin(3*ph+0.4)
		}
		tk.Write(buf[:n])
		*i += n
	}
}

func heapInUse() uint64 {
	runtime.GC()
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	return m.HeapInuse
}

func TestTrackerWriteHeapBounded(t *testing.T) {
	if !spillLow {
		t.Skip("the reduced-rate copy is spilled to a file on Linux only")
	}
	if testing.Short() {
		t.Skip("writes an hour of audio")
	}
	const rate = 8000
	tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
	if err != nil {
		t.Fatal(err)
	}
	defer tk.Close()
	buf := make([]float64, 8192)
	i := 0
	writeTone(tk, rate, 600, &i, buf)
	at10 := heapInUse()
	writeTone(tk, rate, 3000, &i, buf)
	at60 := heapInUse()
	if tk.store.files == nil {
		t.Fatal("the reduced-rate copy was not spilled to a temporary file")
	}
	grow := int64(at60) - int64(at10)
	t.Logf("heap in use after 10 min: %d B, after 60 min: %d B (growth %d B, %d reduced-rate samples)", at10, at60, grow, tk.next)
	if grow > heapGrowthMax {
		t.Errorf("heap in use grew by %d B from 10 to 60 min of audio; want at most %d B", grow, heapGrowthMax)
	}
}

// trackOnce tracks x (mono) and returns the fundamental at each hop.
func trackOnce(t *testing.T, x []float64, rate float64) []float64 {
	t.Helper()
	tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(x); i += 4096 {
		tk.Write(x[i:min(i+4096, len(x))])
	}
	spilled := tk.store.files != nil
	tr, err := tk.Result()
	if err != nil {
		t.Fatal(err)
	}
	if spilled != (spillLow && os.Getenv("TMPDIR") != filepath.Join(os.DevNull, "none")) {
		t.Errorf("spilled to a file: %v", spilled)
	}
	return tr[0].Hz
}

// TestTrackerSpillSameTrack: the track read back from the mapped file
// is the track kept in memory (no temporary directory), bit for bit.
func TestTrackerSpillSameTrack(t *testing.T) {
	const rate = 8000
	x := humSignal(rate, 30, func(tt float64) float64 { return 50 + 0.2*math.Sin(2*math.Pi*tt/11) }, testAmps, 0.01, 3)
	spilled := trackOnce(t, x, rate)
	t.Setenv("TMPDIR", filepath.Join(os.DevNull, "none")) // no temporary file can be made there
	inMem := trackOnce(t, x, rate)
	if !slices.Equal(spilled, inMem) {
		t.Error("the track from the temporary file differs from the track kept in memory")
	}
}

func TestTrackerSpillErrors(t *testing.T) {
	if !spillLow {
		t.Skip("the reduced-rate copy is spilled to a file on Linux only")
	}
	const rate = 8000
	x := humSignal(rate, 30, func(float64) float64 { return 50 }, testAmps, 0.01, 4)
	t.Run("write fails", func(t *testing.T) {
		tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
		if err != nil {
			t.Fatal(err)
		}
		tk.Write(x[:len(x)/2])
		if tk.store.files == nil {
			t.Fatal("nothing spilled after 15 s")
		}
		tk.store.files[0].Close() // the next write fails
		tk.Write(x[len(x)/2:])
		if _, err := tk.Result(); !errors.Is(err, ErrTrackSpill) {
			t.Errorf("error %v, want ErrTrackSpill", err)
		}
		if tk.store.files != nil || tk.store.mem != nil {
			t.Error("Result kept the temporary file or buffers after an error")
		}
	})
	t.Run("closed", func(t *testing.T) {
		tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
		if err != nil {
			t.Fatal(err)
		}
		tk.Write(x)
		tk.Close()
		if tk.store.files != nil || tk.store.mem != nil {
			t.Error("Close kept the temporary file or buffers")
		}
		tk.Write(x) // ignored
		if _, err := tk.Result(); err == nil {
			t.Error("Result after Close answered without an error")
		}
	})
	t.Run("stopped", func(t *testing.T) {
		tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
		if err != nil {
			t.Fatal(err)
		}
		tk.Write(x)
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		if _, err := tk.ResultContext(ctx); !errors.Is(err, context.Canceled) {
			t.Errorf("error %v, want context.Canceled", err)
		}
		if tk.store.files != nil || tk.store.mem != nil {
			t.Error("a stopped Result kept the temporary file or buffers")
		}
		if _, err := tk.Result(); !errors.Is(err, context.Canceled) {
			t.Errorf("Result after a stop: %v, want the same error", err)
		}
	})
	t.Run("result twice", func(t *testing.T) {
		tk, err := NewTracker(TrackOptions{SampleRate: rate, Channels: 1, NominalHz: 50})
		if err != nil {
			t.Fatal(err)
		}
		tk.Write(x)
		a, err := tk.Result()
		if err != nil {
			t.Fatal(err)
		}
		if tk.store.files != nil || tk.store.mem != nil {
			t.Error("Result kept the temporary file or buffers")
		}
		b, err := tk.Result()
		if err != nil || !slices.Equal(a[0].Hz, b[0].Hz) {
			t.Errorf("second Result: %v, same track %v", err, err == nil && slices.Equal(a[0].Hz, b[0].Hz))
		}
	})
}
