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
