package main

import (
	"context"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// trackSpillFDs counts this process's open files that are the hum
// tracker's deleted temporary files (analyze's "wavsieve-track-*", shown
// by Linux as "... (deleted)").
func trackSpillFDs(t *testing.T) int {
	t.Helper()
	ents, err := os.ReadDir("/proc/self/fd")
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, e := range ents {
		if l, err := os.Readlink(filepath.Join("/proc/self/fd", e.Name())); err == nil && strings.Contains(l, "wavsieve-track-") {
			n++
		}
	}
	return n
}

// watchCtx is a context that counts the tracker's temporary files each
// time the survey asks whether it was interrupted (once per block read),
// keeping the most it saw, and says "cancelled" from its stopAt-th
// question on (never when stopAt is 0).
type watchCtx struct {
	context.Context
	t      *testing.T
	calls  int
	stopAt int
	most   int
}

func (c *watchCtx) Err() error {
	c.calls++
	c.most = max(c.most, trackSpillFDs(c.t))
	if c.stopAt > 0 && c.calls >= c.stopAt {
		return context.Canceled
	}
	return nil
}

// TestSurveyClosesTracker: every way out of a file's survey frees the
// hum tracker's temporary file at once, not when the collector finds
// it: a file with no hum (the tracker's result is never asked for), a
// NaN sample met after the spill began, and an interruption after it.
// The collector is held off while the files are counted, so a leak
// cannot be hidden by a finalizer.
func TestSurveyClosesTracker(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("the tracker spills to a temporary file and /proc/self/fd lists it on Linux only")
	}
	defer debug.SetGCPercent(debug.SetGCPercent(-1))
	const rate, seconds = 8000, 14.0
	dir := t.TempDir()
	// The tracker keeps about 1.7 kHz of signal here (9 harmonics of up
	// to 62 Hz, oversampled 3 times) and writes its first 16384 samples
	// to its file after about 10 s: both bad files go wrong after that.
	write := func(name string, nanAt int) string {
		p := filepath.Join(dir, name)
		w, err := wavio.Create(p, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: 1, Bits: 32, Encoding: wavio.Float}, NoDither: true})
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(7, 11))
		x := make([]float64, int(seconds*rate))
		for i := range x {
			x[i] = 0.01 * rng.NormFloat64()
		}
		if err := w.WriteFrames(x); err != nil {
			t.Fatal(err)
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		if nanAt > 0 {
			// The writer refuses NaN: put it into the data chunk, the
			// file's last 4*len(x) bytes.
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			binary.LittleEndian.PutUint32(b[len(b)-4*len(x)+4*nanAt:], math.Float32bits(float32(math.NaN())))
			if err := os.WriteFile(p, b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		return p
	}
	noHum := write("no-hum.wav", 0)
	nan := write("nan.wav", int(13*rate))
	opt := analyze.SurveyOptions{BlockSeconds: 2, ThresholdDB: 10, MaxHarmonics: 9, SearchHz: 2}
	for _, tc := range []struct {
		name    string
		path    string
		stopAt  int    // interrupt at this block (0: never)
		wantErr string // in the file's error ("" for none)
	}{
		{"no hum", noHum, 0, ""},
		{"NaN after the spill began", nan, 0, "finite"},
		// 8192-frame blocks: the 12th is read at 11 s.
		{"interrupted after the spill began", noHum, 12, "interrupted"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := trackSpillFDs(t)
			ctx := &watchCtx{Context: context.Background(), t: t, stopAt: tc.stopAt}
			f := surveyOne(ctx, tc.path, opt)
			switch {
			case tc.wantErr == "" && f.Error != "":
				t.Fatalf("survey failed: %s", f.Error)
			case tc.wantErr != "" && !strings.Contains(f.Error, tc.wantErr):
				t.Fatalf("error %q, want one saying %q", f.Error, tc.wantErr)
			case tc.wantErr == "" && f.Hum != nil:
				t.Fatalf("found hum at %.3f Hz in white noise", f.Hum.FundamentalHz)
			}
			// The tracker must have had its file open, or there is
			// nothing to leak and the check below shows nothing.
			if ctx.most <= before {
				t.Fatalf("the tracker's temporary file never appeared (most open %d, %d before): the file is too short to test the leak", ctx.most, before)
			}
			if after := trackSpillFDs(t); after != before {
				t.Errorf("%d of the tracker's temporary files open after the survey, %d before", after, before)
			}
		})
	}
}
