package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/wavsieve/wavsieve/process/runrecord"
)

// lowpass is the filter flags of the record tests.
var lowpass = []string{"--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "3000"}

func applyArgs(extra ...string) []string {
	return append(append([]string{"apply"}, lowpass...), extra...)
}

func TestApplyConcurrentRunsOneRecord(t *testing.T) {
	// Two runs into one folder at once, each with its own dither seed and
	// --replace: whichever order they run in, every row of the record
	// describes the file on disk (its dither seed remakes it byte for
	// byte), and no row is lost.
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	for i := 0; i < 6; i++ {
		writeTestWAV(t, filepath.Join(in, fmt.Sprintf("f%d.wav", i)), 16000, 1, 0.2)
	}
	out := filepath.Join(dir, "out")
	var wg sync.WaitGroup
	codes := make([]int, 2)
	for i := range codes {
		wg.Add(1)
		go func(i int) {
			defer wg.Done()
			codes[i], _, _ = runCmd(t, applyArgs("--replace", "--no-progress", "-j", "1", "--dither-seed", fmt.Sprint(i+1), "--output", out, in)...)
		}(i)
	}
	wg.Wait()
	if codes[0] != exitOK || codes[1] != exitOK {
		t.Fatalf("exit codes %v", codes)
	}
	rec, err := runrecord.Read(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(rec.Files) != 6 {
		t.Fatalf("%d rows, want 6", len(rec.Files))
	}
	for _, f := range rec.Files {
		again := filepath.Join(dir, "again", filepath.Base(f.Output))
		code, _, stderr := runCmd(t, applyArgs("--no-progress", "--dither-seed", fmt.Sprint(f.DitherSeed), "--output", again, f.Input)...)
		if code != exitOK {
			t.Fatalf("remake %s: %s", f.Input, stderr)
		}
		a, errA := os.ReadFile(f.Output)
		b, errB := os.ReadFile(again)
		if errA != nil || errB != nil {
			t.Fatalf("%s: %v, %v", f.Output, errA, errB)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s: the record's dither seed %d does not remake the file on disk", f.Output, f.DitherSeed)
		}
	}
}

func TestApplyRunsAddToOneRecord(t *testing.T) {
	// Two single-file runs into one folder keep both rows.
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.wav"), filepath.Join(dir, "b.wav")
	writeTestWAV(t, a, 16000, 1, 0.2)
	writeTestWAV(t, b, 22050, 2, 0.2)
	out := filepath.Join(dir, "out")
	for _, in := range []string{a, b} {
		if code, _, stderr := runCmd(t, applyArgs("--no-progress", "--output", out, in)...); code != exitOK {
			t.Fatalf("%s: %s", in, stderr)
		}
	}
	rec, err := runrecord.Read(filepath.Join(out, "wavsieve-manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	if len(rec.Files) != 2 || rec.Files[0].SampleRate != 16000 || rec.Files[1].SampleRate != 22050 {
		t.Errorf("rows: %+v", rec.Files)
	}
}

func TestApplyRecordNotWritable(t *testing.T) {
	// --manifest under a path whose parent is a file: exit 1 before any
	// filtering, and no summary naming a record that does not exist.
	dir := t.TempDir()
	in := filepath.Join(dir, "a.wav")
	writeTestWAV(t, in, 16000, 1, 0.2)
	blocker := filepath.Join(dir, "file")
	os.WriteFile(blocker, []byte("x"), 0o644)
	out := filepath.Join(dir, "out")
	code, _, stderr := runCmd(t, applyArgs("--no-progress", "--manifest", filepath.Join(blocker, "m"), "--output", out, in)...)
	if code != exitFail {
		t.Fatalf("exit %d, want 1: %s", code, stderr)
	}
	if strings.Contains(stderr, "manifest "+filepath.Join(blocker, "m")+".json") {
		t.Errorf("the summary names a record that was not written: %s", stderr)
	}
	if _, err := os.Stat(filepath.Join(out, "a.wav")); err == nil {
		t.Error("filtered although the record could not be written")
	}
}

func TestVerifyAndReportReadTheFolder(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	writeTestWAV(t, filepath.Join(in, "a.wav"), 16000, 1, 2)
	out := filepath.Join(dir, "out")
	if code, _, stderr := runCmd(t, applyArgs("--no-progress", "--output", out, in)...); code != exitOK {
		t.Fatal(stderr)
	}
	for _, from := range []string{out, filepath.Join(out, "wavsieve-manifest.csv")} {
		t.Run(filepath.Base(from), func(t *testing.T) {
			code, stdout, stderr := runCmd(t, "verify", "--manifest", from, "--json")
			if (code != exitOK && code != exitFail && code != 3) || !strings.Contains(stdout, `"verdict"`) || !strings.Contains(stdout, "a.wav") {
				t.Errorf("verify --manifest %s: exit %d: %s", from, code, stderr)
			}
			html := filepath.Join(dir, filepath.Base(from)+".html")
			code, _, stderr = runCmd(t, "report", "--from", from, "--output", html)
			if code != exitOK {
				t.Errorf("report --from %s: exit %d: %s", from, code, stderr)
			}
		})
	}
}

func TestApplyPlanningErrorLeavesNoFolder(t *testing.T) {
	// Two inputs that would write one output: refused before anything is
	// filtered, and the output folder the record's lock needed is gone.
	dir := t.TempDir()
	writeTestWAV(t, filepath.Join(dir, "x", "a.wav"), 16000, 1, 0.2)
	writeTestWAV(t, filepath.Join(dir, "y", "a.wav"), 16000, 1, 0.2)
	out := filepath.Join(dir, "out")
	code, _, stderr := runCmd(t, applyArgs("--no-progress", "--output", out, filepath.Join(dir, "x"), filepath.Join(dir, "y"))...)
	if code == exitOK || !strings.Contains(stderr, "both be written") {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("the output folder was left behind")
	}
}

func TestApplyOutputInsideInput(t *testing.T) {
	// -r with the output folder inside the input folder: the outputs are
	// left out of the input walk, so a second run skips, not refuses.
	dir := t.TempDir()
	writeTestWAV(t, filepath.Join(dir, "a.wav"), 16000, 1, 0.2)
	writeTestWAV(t, filepath.Join(dir, "sub", "b.wav"), 16000, 1, 0.2)
	out := filepath.Join(dir, "clean")
	for run, want := range []string{"2 done, 0 skipped", "0 done, 2 skipped"} {
		code, _, stderr := runCmd(t, applyArgs("--no-progress", "-r", "--output", out, dir)...)
		if code != exitOK || !strings.Contains(stderr, want) {
			t.Fatalf("run %d: exit %d: %s", run+1, code, stderr)
		}
	}
}
