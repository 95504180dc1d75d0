package verify

import (
	"context"
	"errors"
	"testing"
	"time"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// TestToneProbeCancelledLargeDesign: a tone probe of a 1000-notch design,
// its context cancelled (Ctrl-C in the command), returns
// context.Canceled in seconds. The grouping of its 3000 points once
// evaluated the design's response per pair of points and took minutes
// before the first check of the context.
func TestToneProbeCancelledLargeDesign(t *testing.T) {
	// Loose bound for a loaded 2-core machine; the grouping takes about
	// 0.1 s and the run before the fix about two minutes.
	const maxWait = 10 * time.Second
	spec, err := design.ParseSpec([]byte(`{"stages": [{"family": "notch", "fundamental_hz": 20, "harmonics": 1000, "bandwidth_hz": 0.5}]}`))
	if err != nil {
		t.Fatal(err)
	}
	in := wavio.Format{SampleRate: 48000, Channels: 1, Bits: 24, Encoding: wavio.PCM}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	start := time.Now()
	_, err = ToneProbe(ctx, Chain{Spec: spec, In: in, Name: "probe", TempDir: t.TempDir()}, Options{})
	if d := time.Since(start); d > maxWait {
		t.Errorf("took %v after the cancellation, want under %v", d, maxWait)
	}
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("got %v, want context.Canceled", err)
	}
}
