package process

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/wavsieve/wavsieve/design"
)

// peakMeter samples the memory of the process while a run goes on: the
// Go heap in use (runtime.MemStats.HeapInuse) plus the spills mapped
// outside it (mappedBytes), every millisecond, and keeps the largest
// sum. Sampling can miss a short peak; the figures are a lower bound of
// the true peak, which the resident-size figure of the benchmark (the
// kernel's own high-water mark) complements.
type peakMeter struct {
	stop chan struct{}
	done sync.WaitGroup
	peak int64
}

func startPeakMeter() *peakMeter {
	m := &peakMeter{stop: make(chan struct{})}
	m.done.Add(1)
	go func() {
		defer m.done.Done()
		var ms runtime.MemStats
		for {
			runtime.ReadMemStats(&ms)
			m.peak = max(m.peak, int64(ms.HeapInuse)+mappedBytes.Load())
			select {
			case <-m.stop:
				return
			case <-time.After(time.Millisecond):
			}
		}
	}()
	return m
}

func (m *peakMeter) end() int64 {
	close(m.stop)
	m.done.Wait()
	return m.peak
}

// resetPeakRSS resets the kernel's high-water mark of this process's
// resident memory (Linux 4.0 and later: "5" to /proc/self/clear_refs);
// it reports whether it could.
func resetPeakRSS() bool {
	return os.WriteFile("/proc/self/clear_refs", []byte("5"), 0) == nil
}

// peakRSS returns VmHWM of /proc/self/status in bytes, or -1.
func peakRSS() int64 {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		return -1
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if v, ok := strings.CutPrefix(sc.Text(), "VmHWM:"); ok {
			kb, err := strconv.ParseInt(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(v), "kB")), 10, 64)
			if err == nil {
				return kb << 10
			}
		}
	}
	return -1
}

// zeroPhaseBatch writes n files of the given length (48 kHz 24-bit
// stereo) and returns their items.
func zeroPhaseBatch(tb testing.TB, n int, frames int) []Item {
	tb.Helper()
	dir := tb.TempDir()
	in := filepath.Join(dir, "in")
	os.Mkdir(in, 0o755)
	writeBenchWAV(tb, filepath.Join(in, "f00.wav"), frames)
	b, err := os.ReadFile(filepath.Join(in, "f00.wav"))
	if err != nil {
		tb.Fatal(err)
	}
	for i := 1; i < n; i++ {
		os.WriteFile(filepath.Join(in, fmt.Sprintf("f%02d.wav", i)), b, 0o644)
	}
	items, err := Plan([]string{in}, PlanOptions{OutputDir: filepath.Join(dir, "out"), Replace: true})
	if err != nil {
		tb.Fatal(err)
	}
	return items
}

// ringingHum is a zero-phase hum notch (5 harmonics of 50 Hz, 0.5 Hz wide):
// long-ringing, so it pads and fits the most at each end (the largest
// edge buffers), as a worst case for memory.
var ringingHum = design.Spec{ZeroPhase: true, Stages: []design.Stage{{Family: design.Notch, FundamentalHz: 50, Harmonics: 5, BandwidthHz: 0.5}}}

// TestZeroPhaseManyWorkersMemory: a zero-phase batch with 32 workers
// stays within MemoryBudget, as the runtime's heap statistics plus the
// spill mappings show (and, where the system allows resetting it, the
// kernel's high-water mark of the process).
func TestZeroPhaseManyWorkersMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("filters 32 files")
	}
	items := zeroPhaseBatch(t, 32, 48000)
	runtime.GC()
	rss := resetPeakRSS()
	m := startPeakMeter()
	res := Run(context.Background(), items, 32, FileJob{Spec: benchSpec(true), NoDither: true}, Hooks{})
	peak := m.end()
	for _, r := range res {
		if r.Status != StatusDone {
			t.Fatalf("%s: %s", r.Input, r.Error)
		}
	}
	if peak > MemoryBudget {
		t.Errorf("heap and spills peaked at %d MiB, more than %d MiB", peak>>20, MemoryBudget>>20)
	}
	if rss {
		if hwm := peakRSS(); hwm > MemoryBudget {
			t.Errorf("resident memory peaked at %d MiB, more than %d MiB", hwm>>20, MemoryBudget>>20)
		}
	}
}

// BenchmarkRunZeroPhasePeakMemory runs a zero-phase batch of 32 files of
// one minute each (48 kHz 24-bit stereo) with 2, 4, 13 and 32 workers,
// with the long-ringing hum notch, and reports the peak memory of each
// run: peak-rss-MB (the kernel's high-water mark, reset before each
// run; -1 where it cannot be) and peak-heap+spill-MB (sampled). Run:
//
//	go test -run '^$' -bench RunZeroPhasePeakMemory -benchtime 1x ./process
func BenchmarkRunZeroPhasePeakMemory(b *testing.B) {
	items := zeroPhaseBatch(b, 32, 60*48000)
	for _, workers := range []int{2, 4, 13, 32} {
		b.Run(fmt.Sprintf("j%d", workers), func(b *testing.B) {
			var rssPeak, samplePeak int64
			for b.Loop() {
				runtime.GC()
				ok := resetPeakRSS()
				m := startPeakMeter()
				res := Run(context.Background(), items, workers, FileJob{Spec: ringingHum}, Hooks{})
				samplePeak = max(samplePeak, m.end())
				if ok {
					rssPeak = max(rssPeak, peakRSS())
				} else {
					rssPeak = -1
				}
				for _, r := range res {
					if r.Status != StatusDone {
						b.Fatalf("%s: %s", r.Input, r.Error)
					}
				}
			}
			b.ReportMetric(float64(rssPeak)/(1<<20), "peak-rss-MB")
			b.ReportMetric(float64(samplePeak)/(1<<20), "peak-heap+spill-MB")
		})
	}
}
