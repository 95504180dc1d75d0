package main

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// TestBandsToAboveNyquist: a --to whose band reaches past the Nyquist
// frequency of a file fails that file (exit 1) with a message naming the
// file, the band and the flag to change with its value.
func TestBandsToAboveNyquist(t *testing.T) {
	name := filepath.Join(t.TempDir(), "t.wav")
	writeToneWAV(t, name, 48000, 1000, 0.5, 1, wavio.PCM, 16)
	code, _, errs := runCmd(t, "bands", "--to", "30000", name)
	if code != exitFail {
		t.Fatalf("exit %d, want 1; stderr %q", code, errs)
	}
	for _, want := range []string{name, "above the Nyquist frequency 24000 Hz", "(--to 30000)"} {
		if !strings.Contains(errs, want) {
			t.Errorf("stderr %q lacks %q", errs, want)
		}
	}
}
