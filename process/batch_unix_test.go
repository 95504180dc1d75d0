//go:build unix

package process

import (
	"errors"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/wavsieve/wavsieve/process/wavio"
)

func TestPlanRefusesAPipe(t *testing.T) {
	// Planning reads each header once, but never opens a FIFO among the
	// inputs (it would wait for a writer): it notes the error, which the
	// run reports for that file alone.
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
		var nr *wavio.NotRegularError
		if len(items) != 2 || items[0].Source.Err != nil || !errors.As(items[1].Source.Err, &nr) {
			t.Errorf("%+v", items)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("planning a FIFO hangs")
	}
}
