package main

import (
	"bytes"
	"encoding/binary"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/wavsieve/wavsieve/process/runrecord"
)

var hpFlags = []string{"--family", "butterworth", "--response", "highpass", "--order", "2", "--cutoff", "100"}

func applyCmd(extra ...string) []string {
	return append(append([]string{"apply", "--no-progress"}, hpFlags...), extra...)
}

// TestApplyChecksSpecFirst: a spec that fails at every rate, or a spec
// file past the size limit, is refused before anything is created; a
// spec file with a UTF-8 byte-order mark is accepted.
func TestApplyChecksSpecFirst(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in", "a.wav")
	writeTestWAV(t, in, 8000, 1, 0.2)
	big := filepath.Join(dir, "big.json")
	os.WriteFile(big, bytes.Repeat([]byte(" "), 2<<20), 0o644)
	bom := filepath.Join(dir, "bom.json")
	os.WriteFile(bom, []byte("\xEF\xBB\xBF{\"family\":\"butterworth\",\"response\":\"highpass\",\"order\":2,\"cutoff_hz\":100}"), 0o644)
	for _, tc := range []struct {
		name    string
		args    []string
		code    int
		created bool
		msg     string
	}{
		{"order 99", []string{"apply", "--family", "butterworth", "--response", "lowpass", "--order", "99", "--cutoff", "100"}, exitUsage, false, "invalid order 99"},
		{"spec too large", []string{"apply", "--spec", big}, exitFail, false, "limit for a spec file"},
		{"byte-order mark", []string{"apply", "--no-progress", "--spec", bom}, exitOK, true, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(dir, "out-"+strings.ReplaceAll(tc.name, " ", "-"))
			code, _, stderr := runCmd(t, append(tc.args, "-o", out, in)...)
			if code != tc.code || !strings.Contains(stderr, tc.msg) {
				t.Fatalf("exit %d, want %d; stderr %q, want %q", code, tc.code, stderr, tc.msg)
			}
			if _, err := os.Stat(out); (err == nil) != tc.created {
				t.Fatalf("output folder created: %v, want %v", err == nil, tc.created)
			}
		})
	}
}

// TestApplyFIFOInput: a FIFO in an input folder fails alone, the run
// ends, the other file is done and the record is written.
func TestApplyFIFOInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	writeTestWAV(t, filepath.Join(in, "a.wav"), 8000, 1, 0.2)
	if err := syscall.Mkfifo(filepath.Join(in, "x.wav"), 0o644); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	out := filepath.Join(dir, "out")
	type result struct {
		code   int
		stderr string
	}
	done := make(chan result, 1)
	go func() {
		code, _, stderr := runCLI(applyCmd("-o", out, in)...)
		done <- result{code, stderr}
	}()
	select {
	case r := <-done:
		if r.code != exitFail || !strings.Contains(r.stderr, "x.wav") || !strings.Contains(r.stderr, "1 done") {
			t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
		}
	case <-time.After(60 * time.Second):
		t.Fatal("the run did not end")
	}
	if _, err := os.Stat(filepath.Join(out, "wavsieve-manifest.json")); err != nil {
		t.Fatal("no record written")
	}
}

// TestApplyRemovesStaleTemporaries: temporary files of a killed run (an
// output and a 0-byte record, their owner gone) are removed by the next
// run, which says so.
func TestApplyRemovesStaleTemporaries(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	writeTestWAV(t, filepath.Join(in, "a.wav"), 8000, 1, 0.2)
	out := filepath.Join(dir, "out")
	os.MkdirAll(out, 0o755)
	p, err := os.StartProcess("/bin/true", []string{"true"}, &os.ProcAttr{})
	if err != nil {
		t.Skip(err)
	}
	p.Wait()
	dead := strconv.Itoa(p.Pid)
	stale := []string{
		filepath.Join(out, ".a.wav.wavsieve-tmp-"+dead+"-1"),
		filepath.Join(out, ".wavsieve-manifest.json.wavsieve-tmp-"+dead+"-2"),
	}
	os.WriteFile(stale[0], make([]byte, 5000), 0o600)
	os.WriteFile(stale[1], nil, 0o600)
	code, _, stderr := runCmd(t, applyCmd("-o", out, in)...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, s := range stale {
		if _, err := os.Stat(s); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("%s is still there", filepath.Base(s))
		}
	}
	if strings.Count(stderr, "left by an interrupted run") != 2 {
		t.Errorf("stderr %q", stderr)
	}
}

// TestApplyOutputInsideInputNoNesting: -r with the output folder inside the input
// folder works twice: the second run does not take the outputs for
// inputs.
func TestApplyOutputInsideInputNoNesting(t *testing.T) {
	in := t.TempDir()
	writeTestWAV(t, filepath.Join(in, "a.wav"), 8000, 1, 0.2)
	out := filepath.Join(in, "filtered")
	for round := 1; round <= 2; round++ {
		code, _, stderr := runCmd(t, applyCmd("-r", "-o", out, in)...)
		if code != exitOK || strings.Contains(stderr, "would overwrite an input") {
			t.Fatalf("round %d: exit %d: %s", round, code, stderr)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "filtered")); err == nil {
		t.Fatal("an output of an output was written")
	}
}

// TestApplySecondDataChunk: a file with two data chunks is filtered
// from the first, with a warning on stderr and in the record.
func TestApplySecondDataChunk(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "two.wav")
	le := binary.LittleEndian
	data := make([]byte, 2*800)
	var b bytes.Buffer
	b.WriteString("RIFF")
	binary.Write(&b, le, uint32(4+24+2*(8+len(data))))
	b.WriteString("WAVEfmt ")
	for _, v := range []any{uint32(16), uint16(1), uint16(1), uint32(8000), uint32(16000), uint16(2), uint16(16)} {
		binary.Write(&b, le, v)
	}
	for range 2 {
		b.WriteString("data")
		binary.Write(&b, le, uint32(len(data)))
		b.Write(data)
	}
	os.WriteFile(in, b.Bytes(), 0o644)
	out := filepath.Join(dir, "out")
	code, _, stderr := runCmd(t, applyCmd("-o", out, in)...)
	if code != exitOK || !strings.Contains(stderr, "second data chunk") {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	rec, _ := os.ReadFile(filepath.Join(out, "wavsieve-manifest.json"))
	if !strings.Contains(string(rec), "second data chunk") {
		t.Fatal("the warning is not in the record")
	}
}

// TestApplyUnwritableFormatHint: an input whose output format cannot be
// written (a 4 GHz rate: the byte rate passes 32 bits) fails naming the
// input, with a hint about --sample-format.
func TestApplyUnwritableFormatHint(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "fast.wav")
	le := binary.LittleEndian
	var b bytes.Buffer
	b.WriteString("RIFF")
	binary.Write(&b, le, uint32(4+24+8+400))
	b.WriteString("WAVEfmt ")
	for _, v := range []any{uint32(16), uint16(1), uint16(2), uint32(4_000_000_000), uint32(0), uint16(4), uint16(16)} {
		binary.Write(&b, le, v)
	}
	b.WriteString("data")
	binary.Write(&b, le, uint32(400))
	b.Write(make([]byte, 400))
	os.WriteFile(in, b.Bytes(), 0o644)
	code, _, stderr := runCmd(t, applyCmd("-o", filepath.Join(dir, "out"), in)...)
	if code != exitFail || !strings.Contains(stderr, in+": cannot write the output") || !strings.Contains(stderr, "--sample-format") {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
}

// TestHelperApply runs the command line when started by
// TestApplyInterruptedInDesign; otherwise it does nothing.
func TestHelperApply(t *testing.T) {
	if os.Getenv("WAVSIEVE_HELPER_APPLY") != "1" {
		return
	}
	args := os.Args
	for i, a := range args {
		if a == "--" {
			args = args[i+1:]
			break
		}
	}
	os.Exit(run(args, os.Stdin, os.Stdout, os.Stderr))
}

// TestApplyInterruptedInDesign: SIGINT and SIGTERM sent while a spec of
// two 1000-notch stages is being designed (seconds per file) stop the
// run: exit 1, "interrupted", no output and no temporary file.
func TestApplyInterruptedInDesign(t *testing.T) {
	if testing.Short() {
		t.Skip("starts the program")
	}
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	writeTestWAV(t, filepath.Join(in, "a.wav"), 48000, 1, 0.1)
	writeTestWAV(t, filepath.Join(in, "b.wav"), 48000, 1, 0.1)
	spec := filepath.Join(dir, "heavy.json")
	os.WriteFile(spec, []byte(`{"stages":[{"family":"notch","fundamental_hz":10,"harmonics":1000,"bandwidth_hz":1},{"family":"notch","fundamental_hz":11,"harmonics":1000,"bandwidth_hz":1}]}`), 0o644)
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		t.Run(sig.String(), func(t *testing.T) {
			out := filepath.Join(dir, "out-"+strconv.Itoa(int(sig)))
			cmd := exec.Command(os.Args[0], "-test.run=^TestHelperApply$", "--", "apply", "--no-progress", "-j", "1", "--spec", spec, "-o", out, in)
			cmd.Env = append(os.Environ(), "WAVSIEVE_HELPER_APPLY=1")
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Skip(err)
			}
			// Once the record's lock is taken, the signal handlers are
			// set and planning and designing follow.
			lock := runrecord.LockPath(runrecord.Base(out, 0, 0))
			for i := 0; i < 3000; i++ {
				if _, err := os.Stat(lock); err == nil {
					break
				}
				time.Sleep(10 * time.Millisecond)
			}
			time.Sleep(100 * time.Millisecond)
			cmd.Process.Signal(sig)
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			var err error
			select {
			case err = <-done:
			case <-time.After(60 * time.Second):
				cmd.Process.Kill()
				t.Fatal("the run did not stop")
			}
			var ee *exec.ExitError
			if !errors.As(err, &ee) || ee.ExitCode() != exitFail || !strings.Contains(stderr.String(), "interrupted") {
				t.Fatalf("exit %v, stderr %q", err, stderr.String())
			}
			ents, _ := os.ReadDir(out)
			for _, e := range ents {
				if strings.HasSuffix(e.Name(), ".wav") || strings.Contains(e.Name(), "wavsieve-tmp-") {
					t.Errorf("left %s", e.Name())
				}
			}
		})
	}
}

// TestApplyBadHeaderHints: a file that is not a WAV file and one cut
// inside its header each fail alone, and each message says what to do.
func TestApplyBadHeaderHints(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "notwav.wav"), []byte(strings.Repeat("not a wave file ", 8)), 0o644)
	os.WriteFile(filepath.Join(dir, "cut.wav"), []byte("RIFF\x24\x00\x00\x00WAVEfmt "), 0o644)
	code, _, stderr := runCmd(t, applyCmd("-o", filepath.Join(dir, "out"), filepath.Join(dir, "notwav.wav"), filepath.Join(dir, "cut.wav"))...)
	if code != exitFail {
		t.Fatalf("exit %d, want %d: %s", code, exitFail, stderr)
	}
	for _, want := range []string{"notwav.wav", "hint: it is not a WAV file", "cut.wav", "hint: the file ends inside its header", "2 failed"} {
		if !strings.Contains(stderr, want) {
			t.Errorf("stderr lacks %q:\n%s", want, stderr)
		}
	}
}
