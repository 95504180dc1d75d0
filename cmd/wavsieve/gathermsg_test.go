package main

import (
	"strings"
	"testing"
)

// TestGatherNoSharesMessage: a folder with no share records fails (exit 1)
// with a message naming the folder and what to check, without the
// library's package prefix.
func TestGatherNoSharesMessage(t *testing.T) {
	dir := t.TempDir()
	code, _, errs := runCmd(t, "gather", dir)
	if code != exitFail {
		t.Fatalf("exit %d, want 1; stderr %q", code, errs)
	}
	if !strings.Contains(errs, "wavsieve gather: "+dir+": no share records") || strings.Contains(errs, "runrecord:") {
		t.Errorf("stderr %q; want \"wavsieve gather: %s: no share records ...\" without \"runrecord:\"", errs, dir)
	}
}
