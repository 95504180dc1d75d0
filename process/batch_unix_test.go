//go:build unix

package process

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

func TestPlanRefusesAPipe(t *testing.T) {
	// A FIFO among the inputs is refused without being opened (opening
	// it would wait for a writer); the other inputs are planned.
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	os.MkdirAll(in, 0o755)
	writeTone(t, filepath.Join(in, "a.wav"), 8000, 1, 0.05, f64, nil)
	if err := syscall.Mkfifo(filepath.Join(in, "b.wav"), 0o644); err != nil {
		t.Skip("no FIFOs here:", err)
	}
	done := make(chan []Item)
	go func() {
		items, err := Plan([]string{in}, PlanOptions{OutputDir: filepath.Join(dir, "out")})
		if err != nil {
			t.Error(err)
		}
		done <- items
	}()
	select {
	case items := <-done:
		if len(items) != 2 || items[0].Refuse != "" || !strings.Contains(items[1].Refuse, "named pipe") {
			t.Errorf("%+v", items)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("planning a FIFO hangs")
	}
}

func TestPlanRefusesALinkAtTheOutput(t *testing.T) {
	// A symbolic link at the output name, to a WAV of the same shape, is
	// not skipped as if it were the output.
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	out := filepath.Join(dir, "out")
	os.MkdirAll(in, 0o755)
	os.MkdirAll(out, 0o755)
	writeTone(t, filepath.Join(in, "a.wav"), 8000, 1, 0.05, f64, nil)
	writeTone(t, filepath.Join(dir, "other.wav"), 8000, 1, 0.05, f64, nil)
	if err := os.Symlink(filepath.Join(dir, "other.wav"), filepath.Join(out, "a.wav")); err != nil {
		t.Skip(err)
	}
	always := func(string) string { return "any" }
	items, err := Plan([]string{in}, PlanOptions{OutputDir: out, Recorded: always})
	if err != nil {
		t.Fatal(err)
	}
	if items[0].Skip != "" || !strings.Contains(items[0].Refuse, "symbolic link") {
		t.Errorf("%+v", items[0])
	}
	items, _ = Plan([]string{in}, PlanOptions{OutputDir: out, Replace: true})
	if items[0].Skip != "" || items[0].Refuse != "" {
		t.Errorf("replace: %+v", items[0])
	}
}
