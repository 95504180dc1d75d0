package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestReportCountsFiles: the closing line counts "1 file", "2 files".
func TestReportCountsFiles(t *testing.T) {
	for _, c := range []struct {
		name  string
		files int
		want  string
	}{
		{"one", 1, "(1 file, "},
		{"two", 2, "(2 files, "},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			var ins []string
			for i := 0; i < c.files; i++ {
				in := filepath.Join(dir, string(rune('a'+i))+".wav")
				writeNoiseWAV(t, in, 8000, 1, 1, uint64(i+1))
				ins = append(ins, in)
			}
			code, out, errs := runCmd(t, append([]string{"survey", "--json"}, ins...)...)
			if code != exitOK {
				t.Fatalf("survey: exit %d: %s", code, errs)
			}
			doc := filepath.Join(dir, "survey.json")
			if err := os.WriteFile(doc, []byte(out), 0o644); err != nil {
				t.Fatal(err)
			}
			code, _, errs = runCmd(t, "report", "--from", doc, "--output", filepath.Join(dir, "r.html"))
			if code != exitOK || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stderr %q; want 0 and %q", code, errs, c.want)
			}
		})
	}
}
