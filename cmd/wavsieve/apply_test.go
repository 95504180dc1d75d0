package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/runrecord"
	"github.com/wavsieve/wavsieve/process/wavio"
)

func writeTestWAV(t *testing.T, name string, rate, ch int, seconds float64) {
	t.Helper()
	os.MkdirAll(filepath.Dir(name), 0o755)
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: ch, Bits: 24, Encoding: wavio.PCM}, DitherSeed: 3})
	if err != nil {
		t.Fatal(err)
	}
	n := int(seconds * float64(rate))
	buf := make([]float64, n*ch)
	for i := range buf {
		tt := float64(i/ch) / float64(rate)
		buf[i] = 0.1*math.Sin(2*math.Pi*50*tt) + 0.3*math.Sin(2*math.Pi*440*tt)
	}
	w.WriteFrames(buf)
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

type manifestDoc struct {
	Files []struct {
		Input      string  `json:"input"`
		Output     string  `json:"output"`
		SampleRate int     `json:"sample_rate_hz"`
		Channels   int     `json:"channels"`
		Frames     int64   `json:"frames"`
		Status     string  `json:"status"`
		Error      *string `json:"error"`
		Design     []struct {
			Family string `json:"family"`
			Order  int    `json:"order"`
		} `json:"design"`
	} `json:"files"`
}

func TestApplyMixedRatesFolder(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	writeTestWAV(t, filepath.Join(in, "a44.wav"), 44100, 2, 0.5)
	writeTestWAV(t, filepath.Join(in, "b48.wav"), 48000, 1, 0.5)
	writeTestWAV(t, filepath.Join(in, "deep", "c96.wav"), 96000, 3, 0.5)
	writeTestWAV(t, filepath.Join(in, "deep", "d8k.wav"), 8000, 1, 0.5)
	out := filepath.Join(dir, "out")
	// A 5 kHz low-pass: impossible at 8 kHz only.
	code, stdout, stderr := runCmd(t, "apply", "--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "5000", "-r", "--output", out, "--json", in)
	if code != exitFail {
		t.Fatalf("exit %d, want 1 (one file fails): %s", code, stderr)
	}
	var m manifestDoc
	if err := json.Unmarshal([]byte(stdout), &m); err != nil {
		t.Fatalf("manifest: %v\n%s", err, stdout)
	}
	if len(m.Files) != 4 {
		t.Fatalf("%d files in manifest", len(m.Files))
	}
	for _, f := range m.Files {
		if f.Error == nil {
			t.Errorf("%s: no error key", f.Input)
		}
		if strings.HasSuffix(f.Input, "d8k.wav") {
			if f.Status != "failed" || !strings.Contains(*f.Error, "d8k.wav") || !strings.Contains(*f.Error, "Nyquist") {
				t.Errorf("8 kHz file: %s %v", f.Status, *f.Error)
			}
			if _, err := os.Stat(f.Output); err == nil {
				t.Errorf("failed file has an output")
			}
			continue
		}
		if f.Status != "done" || len(f.Design) != 1 || f.Design[0].Order != 4 {
			t.Errorf("%s: %+v", f.Input, f)
		}
		r, err := wavio.Open(f.Output, nil)
		if err != nil {
			t.Fatal(err)
		}
		if r.Format().SampleRate != f.SampleRate || int64(r.Frames()) != f.Frames || r.Format().Channels != f.Channels {
			t.Errorf("%s: output %v %d frames", f.Output, r.Format(), r.Frames())
		}
		r.Close()
	}
	if !strings.Contains(stderr, "d8k.wav") {
		t.Errorf("stderr does not name the failed file: %s", stderr)
	}
	// The mirrored tree, and the CSV manifest beside the JSON one.
	if _, err := os.Stat(filepath.Join(out, "deep", "c96.wav")); err != nil {
		t.Error(err)
	}
	fh, err := os.Open(filepath.Join(out, "wavsieve-manifest.csv"))
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(fh).ReadAll()
	fh.Close()
	if err != nil || len(rows) != 5 || rows[0][0] != "input" {
		t.Errorf("csv: %v rows, err %v", len(rows), err)
	}
	// A second run with the same spec skips the complete outputs, and the
	// record keeps their rows as they were.
	code, stdout, _ = runCmd(t, "apply", "--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "5000", "-r", "--output", out, "--json", in)
	if code != exitFail {
		t.Fatalf("second run exit %d, want 1 (the 8 kHz file fails again)", code)
	}
	m = manifestDoc{}
	json.Unmarshal([]byte(stdout), &m)
	skipped := 0
	for _, f := range m.Files {
		if f.Status == "skipped" {
			skipped++
			if f.SampleRate == 0 || f.Frames == 0 || len(f.Design) != 1 {
				t.Errorf("skipped %s lost its record: %+v", f.Input, f)
			}
		}
	}
	if skipped != 3 {
		t.Errorf("%d skipped, want the 3 complete outputs", skipped)
	}
	rec, err := runrecord.Read(filepath.Join(out, "wavsieve-manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	if len(rec.Files) != 4 {
		t.Fatalf("record: %d rows, want 4", len(rec.Files))
	}
	for _, f := range rec.Files {
		if want := "done"; !strings.HasSuffix(f.Input, "d8k.wav") && (f.Status != want || f.DesignDigest == "" || f.SampleRate == 0) {
			t.Errorf("record row of %s after a skipping run: %+v", f.Input, f)
		}
	}
	// Another design: the outputs are refused, pointing to --replace, and
	// left as they were; with --replace they are redone.
	code, _, stderr = runCmd(t, "apply", "--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "3000", "-r", "--output", out, in)
	if code != exitFail || !strings.Contains(stderr, "another design") || !strings.Contains(stderr, "--replace") {
		t.Fatalf("other design: exit %d: %s", code, stderr)
	}
	code, _, stderr = runCmd(t, "apply", "--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "3000", "-r", "--replace", "--output", out, in)
	if code != exitOK || !strings.Contains(stderr, "4 done") {
		t.Fatalf("--replace: exit %d: %s", code, stderr)
	}
	rec2, err := runrecord.Read(filepath.Join(out, "wavsieve-manifest.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for i, f := range rec2.Files {
		if f.Status != "done" || f.DesignDigest == rec.Files[i].DesignDigest {
			t.Errorf("after --replace: %s %s digest %s (was %s)", f.Input, f.Status, f.DesignDigest, rec.Files[i].DesignDigest)
		}
	}
}

func TestApplySingleFileAndDryRun(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "take1.wav")
	writeTestWAV(t, in, 48000, 2, 0.5)
	out := filepath.Join(dir, "clean.wav")
	code, stdout, stderr := runCmd(t, "apply", "--family", "notch", "--hum", "50", "--notch-width", "2", "--harmonics", "3", "--dry-run", "--output", out, in)
	if code != exitOK || !strings.Contains(stdout, "notch, order 3, 3 sections, at 50, 100, 150 Hz") {
		t.Fatalf("dry run exit %d: %s %s", code, stdout, stderr)
	}
	if _, err := os.Stat(out); err == nil {
		t.Fatal("dry run wrote the output")
	}
	code, _, stderr = runCmd(t, "apply", "--family", "notch", "--hum", "50", "--notch-width", "2", "--harmonics", "3", "--zero-phase", "--sample-format", "float32", "--output", out, in)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	r, err := wavio.Open(out, nil)
	if err != nil {
		t.Fatal(err)
	}
	if f := r.Format(); f.Encoding != wavio.Float || f.Bits != 32 {
		t.Errorf("output format %v", f)
	}
	r.Close()
}

func TestApplyUsageErrors(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "x.wav")
	writeTestWAV(t, in, 8000, 1, 0.1)
	spec := []string{"--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "1000"}
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"no inputs", append([]string{"apply", "--output", dir}, spec...), exitUsage, "no input"},
		{"no output", append([]string{"apply", in}, spec...), exitUsage, "no --output"},
		{"bad shard", append([]string{"apply", "--output", filepath.Join(dir, "o"), "--shard", "3/2", in}, spec...), exitUsage, "--shard"},
		{"bad format", append([]string{"apply", "--output", filepath.Join(dir, "o"), "--sample-format", "pcm12", in}, spec...), exitUsage, "--sample-format"},
		{"output is input", append([]string{"apply", "--output", dir, dir}, spec...), exitFail, "overwrite an input"},
		{"missing input", append([]string{"apply", "--output", filepath.Join(dir, "o"), filepath.Join(dir, "nope.wav")}, spec...), exitFail, "nope.wav"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(stderr, c.want) {
				t.Errorf("exit %d (want %d), stderr %q (want %q)", code, c.code, stderr, c.want)
			}
		})
	}
}
