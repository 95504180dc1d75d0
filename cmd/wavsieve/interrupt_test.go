package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
)

// TestHelperSignalContext runs signalContext when started by
// TestSignalContext: it prints "ready", then "cancelled" once the context
// ends and waits (for a second signal) before exiting 0.
func TestHelperSignalContext(t *testing.T) {
	if os.Getenv("WAVSIEVE_HELPER_SIGNAL") != "1" {
		return
	}
	ctx, stop := signalContext()
	defer stop()
	fmt.Println("ready")
	select {
	case <-ctx.Done():
		fmt.Println("cancelled")
	case <-time.After(20 * time.Second):
		os.Exit(3)
	}
	time.Sleep(10 * time.Second)
	os.Exit(0)
}

// TestSignalContext: the first SIGINT or SIGTERM cancels the context of
// signalContext, and a second one ends the process at once.
func TestSignalContext(t *testing.T) {
	if testing.Short() {
		t.Skip("starts the program")
	}
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		t.Run(sig.String(), func(t *testing.T) {
			cmd := exec.Command(os.Args[0], "-test.run=^TestHelperSignalContext$")
			cmd.Env = append(os.Environ(), "WAVSIEVE_HELPER_SIGNAL=1")
			out, err := cmd.StdoutPipe()
			if err != nil {
				t.Fatal(err)
			}
			if err := cmd.Start(); err != nil {
				t.Skip(err)
			}
			defer cmd.Process.Kill()
			lines := bufio.NewScanner(out)
			expect := func(want string) {
				t.Helper()
				got := make(chan string, 1)
				go func() {
					for lines.Scan() {
						if l := lines.Text(); l == want {
							got <- l
							return
						}
					}
					got <- ""
				}()
				select {
				case l := <-got:
					if l != want {
						t.Fatalf("no %q line from the helper", want)
					}
				case <-time.After(10 * time.Second):
					t.Fatalf("no %q line within 10 s", want)
				}
			}
			expect("ready")
			cmd.Process.Signal(sig)
			expect("cancelled")
			// signalContext releases the handler just after the context
			// ends; a person's second Ctrl-C comes later than this.
			time.Sleep(200 * time.Millisecond)
			start := time.Now()
			cmd.Process.Signal(sig)
			err = cmd.Wait()
			var ee *exec.ExitError
			if !errors.As(err, &ee) {
				t.Fatalf("after a second %v: %v, want death by the signal", sig, err)
			}
			if ws, ok := ee.Sys().(syscall.WaitStatus); !ok || !ws.Signaled() || ws.Signal() != sig {
				t.Fatalf("after a second %v: %v, want death by the signal", sig, err)
			}
			// One second is the command line's promise after Ctrl-C.
			if d := time.Since(start); d > time.Second {
				t.Errorf("the second %v took %v to end the process", sig, d)
			}
		})
	}
}

// TestInterruptedReadsStop: a cancelled context (what Ctrl-C makes
// through signalContext) stops the readers of spectrum and survey at
// their first block.
func TestInterruptedReadsStop(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "a.wav")
	writeTestWAV(t, in, 48000, 1, 2)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	t.Run("spectrum", func(t *testing.T) {
		d, err := fileSpectrum(ctx, in, analyze.Options{Segment: 4096, Overlap: 2048}, false)
		if !errors.Is(err, context.Canceled) || d != nil {
			t.Fatalf("got %v, %v; want context.Canceled and no spectrum", d, err)
		}
	})
	t.Run("survey", func(t *testing.T) {
		f := surveyOne(ctx, in, analyze.SurveyOptions{BlockSeconds: 1, ThresholdDB: 10, MaxHarmonics: 5, SearchHz: 2})
		if !strings.Contains(f.Error, "interrupted") || f.Stats != nil {
			t.Fatalf("got error %q; want interrupted and no result", f.Error)
		}
	})
}

// TestDesignPlotInterrupted: a Ctrl-C (a cancelled context) while the
// design's plot is drawn writes no plot and no temporary.
func TestDesignPlotInterrupted(t *testing.T) {
	spec, err := design.ParseSpec([]byte(`{"stages": [{"family": "notch", "fundamental_hz": 50, "harmonics": 3, "bandwidth_hz": 2}]}`))
	if err != nil {
		t.Fatal(err)
	}
	f, err := design.Design(spec, 48000)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := writePlot(ctx, filepath.Join(dir, "d.svg"), f); !errors.Is(err, context.Canceled) {
		t.Fatalf("got %v, want context.Canceled", err)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Fatalf("left %v", ents)
	}
}
