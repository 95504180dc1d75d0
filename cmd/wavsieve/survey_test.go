package main

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// surveyHumTolHz is the accuracy the survey promises for the fundamental.
const surveyHumTolHz = 0.05

// writeSurveyWAV writes a constructed file: a hum at f0 (0 for none)
// with the given harmonic amplitudes, white noise of RMS noise, and
// clip samples of 1.5 (beyond full scale) from frame 1000 on.
func writeSurveyWAV(t *testing.T, name string, rate int, seconds, f0 float64, amps map[int]float64, noise float64, enc wavio.Encoding, bits, clip int) {
	t.Helper()
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: 1, Bits: bits, Encoding: enc}, NoDither: true})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(uint64(rate), uint64(bits)))
	x := make([]float64, int(seconds*float64(rate)))
	for i := range x {
		tt := float64(i) / float64(rate)
		for k, a := range amps {
			x[i] += a * math.Sin(2*math.Pi*float64(k)*f0*tt+float64(k))
		}
		x[i] += noise * rng.NormFloat64()
	}
	for i := 1000; i < 1000+clip; i++ {
		x[i] = 1.5
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

func TestSurveyUsage(t *testing.T) {
	code, out, errs := runCLI("survey", "--help")
	if code != exitOK || !strings.Contains(out, "Usage:") || !strings.Contains(out, "--write-spec") || errs != "" {
		t.Errorf("--help: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	for _, args := range [][]string{
		{"survey"},
		{"survey", "--mains", "55", "x.wav"},
		{"survey", "--block", "-2", "x.wav"},
		{"survey", "--no-such-flag", "x.wav"},
	} {
		code, out, errs := runCLI(args...)
		if code != exitUsage || out != "" || !strings.Contains(errs, "Run 'wavsieve survey --help'") {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want exit 2 and a pointer to the help", args, code, out, errs)
		}
	}
}

func TestSurveyFolderJSON(t *testing.T) {
	dir := t.TempDir()
	hum := filepath.Join(dir, "hum.wav")
	quiet := filepath.Join(dir, "quiet.wav")
	bad := filepath.Join(dir, "broken.wav")
	// Constructed: 49.97 Hz with odd harmonics 1, 3, 5 over a -80 dBFS
	// floor, 16-bit, with 10 samples at 1.5 that the writer saturates.
	writeSurveyWAV(t, hum, 8000, 6, 49.97, map[int]float64{1: 0.03, 3: 0.01, 5: 0.003}, 1e-4, wavio.PCM, 16, 10)
	writeSurveyWAV(t, quiet, 8000, 3, 0, nil, 0.01, wavio.Float, 32, 0)
	if err := os.WriteFile(bad, []byte("RIFF\x04\x00\x00\x00WAVEjunk"), 0o644); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(hum)
	code, out, errs := runCLI("survey", "--json", dir, filepath.Join(dir, "missing.wav"))
	if code != exitFail {
		t.Errorf("exit %d, want 1 (one unreadable file, one missing)", code)
	}
	if !strings.Contains(errs, "broken.wav") || !strings.Contains(errs, "missing.wav") {
		t.Errorf("stderr %q does not name the failed files", errs)
	}
	if after, _ := os.ReadFile(hum); !bytes.Equal(before, after) {
		t.Error("the input file was modified")
	}
	var doc struct {
		Files []map[string]json.RawMessage `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("stdout is not JSON: %v\n%s", err, out)
	}
	if len(doc.Files) != 4 {
		t.Fatalf("%d files, want broken, hum, quiet and missing", len(doc.Files))
	}
	byName := map[string]map[string]json.RawMessage{}
	for _, f := range doc.Files {
		var p string
		json.Unmarshal(f["path"], &p)
		byName[filepath.Base(p)] = f
	}
	for _, n := range []string{"broken.wav", "missing.wav"} {
		var e string
		json.Unmarshal(byName[n]["error"], &e)
		if !strings.Contains(e, n) {
			t.Errorf("%s: error %q does not name it", n, e)
		}
	}
	// The contract's keys, exactly.
	h := byName["hum.wav"]
	for _, k := range []string{"path", "sample_rate_hz", "channels", "duration_s", "hum", "suggested_spec"} {
		if _, ok := h[k]; !ok {
			t.Errorf("hum.wav: key %q missing", k)
		}
	}
	var humDoc struct {
		Fundamental *float64 `json:"fundamental_hz"`
		Drift       *float64 `json:"drift_hz"`
		Harmonics   []struct {
			Frequency *float64 `json:"frequency_hz"`
			Above     *float64 `json:"above_floor_db"`
		} `json:"harmonics"`
	}
	if err := json.Unmarshal(h["hum"], &humDoc); err != nil || humDoc.Fundamental == nil || humDoc.Drift == nil {
		t.Fatalf("hum %s: %v", h["hum"], err)
	}
	if math.Abs(*humDoc.Fundamental-49.97) > surveyHumTolHz {
		t.Errorf("fundamental %.4f Hz, made at 49.97", *humDoc.Fundamental)
	}
	if len(humDoc.Harmonics) != 3 || humDoc.Harmonics[2].Frequency == nil || humDoc.Harmonics[2].Above == nil ||
		math.Abs(*humDoc.Harmonics[2].Frequency-5*49.97) > 5*surveyHumTolHz {
		t.Errorf("harmonics %s, want 1, 3 and 5", h["hum"])
	}
	var rate float64
	json.Unmarshal(h["sample_rate_hz"], &rate)
	spec, err := design.ParseSpec(h["suggested_spec"])
	if err != nil {
		t.Fatalf("suggested spec %s: %v", h["suggested_spec"], err)
	}
	if _, err := design.Design(spec, rate); err != nil {
		t.Errorf("suggested spec %s does not design at %g Hz: %v", h["suggested_spec"], rate, err)
	}
	if st := spec.Stages[len(spec.Stages)-1]; st.Family != design.Notch || st.Harmonics != 5 || !st.OddOnly {
		t.Errorf("notch stage %+v, want harmonics up to 5, odd only", st)
	}
	var stats []struct {
		Clipped int64 `json:"clipped_samples"`
		Runs    int64 `json:"clipped_runs"`
	}
	json.Unmarshal(h["channel_stats"], &stats)
	if len(stats) != 1 || stats[0].Clipped != 10 || stats[0].Runs != 1 {
		t.Errorf("clipping %+v, want the 10 samples written at 1.5 in one run", stats)
	}
	if q := byName["quiet.wav"]; string(q["hum"]) != "null" || string(q["suggested_spec"]) != "null" {
		t.Errorf("quiet.wav: hum %s, spec %s; want null for both", q["hum"], q["suggested_spec"])
	}
}

func TestSurveyWriteSpecAndApply(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "hum.wav")
	writeSurveyWAV(t, in, 8000, 6, 60.03, map[int]float64{1: 0.02, 2: 0.02, 3: 0.005}, 1e-4, wavio.Float, 32, 0)
	specPath := filepath.Join(dir, "specs", "hum.json")
	code, out, errs := runCLI("survey", "--write-spec", specPath, in)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	if !strings.Contains(out, "mains hum 60.03") || !strings.Contains(out, "suggested spec:") {
		t.Errorf("report lacks the hum or the spec:\n%s", out)
	}
	data, err := os.ReadFile(specPath)
	if err != nil {
		t.Fatal(err)
	}
	spec, err := design.ParseSpec(data)
	if err != nil {
		t.Fatalf("written spec %s: %v", data, err)
	}
	if st := spec.Stages[0]; st.Family != design.Notch || math.Abs(st.FundamentalHz-60.03) > surveyHumTolHz || st.OddOnly || st.Harmonics != 3 {
		t.Errorf("written spec %s: want a notch at 60.03 Hz with harmonics 1-3", data)
	}
	// The spec is ready for apply.
	code, _, errs = runCLI("apply", "--spec", specPath, "--no-progress", "--output", filepath.Join(dir, "out"), in)
	if code != exitOK {
		t.Errorf("apply with the written spec: exit %d, stderr %q", code, errs)
	}

	// No hum and no rumble: nothing written, exit 1.
	quiet := filepath.Join(dir, "quiet.wav")
	writeSurveyWAV(t, quiet, 8000, 3, 0, nil, 0.01, wavio.Float, 32, 0)
	none := filepath.Join(dir, "none.json")
	code, _, errs = runCLI("survey", "--write-spec", none, quiet)
	if _, err := os.Stat(none); code != exitFail || err == nil || !strings.Contains(errs, "nothing to filter") {
		t.Errorf("no hum: exit %d, stderr %q, file written: %v", code, errs, err == nil)
	}
	// Two inputs: a usage error.
	code, _, errs = runCLI("survey", "--write-spec", none, in, quiet)
	if code != exitUsage || !strings.Contains(errs, "exactly one input") {
		t.Errorf("two inputs: exit %d, stderr %q", code, errs)
	}
	// The input itself is refused.
	code, _, errs = runCLI("survey", "--write-spec", in, in)
	if code != exitFail || !strings.Contains(errs, "input file") {
		t.Errorf("spec over the input: exit %d, stderr %q", code, errs)
	}
}

func TestSurveyDemoSampleCLI(t *testing.T) {
	// samples/README.md: reedmere-north-48k.wav hums from 49.92 to
	// 50.06 Hz over its 6 s, mean 49.99 Hz.
	code, out, errs := runCLI("survey", "--json", "../../samples/reedmere-north-48k.wav")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var doc struct {
		Files []struct {
			Hum *struct {
				Fundamental float64 `json:"fundamental_hz"`
			} `json:"hum"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Files) != 1 || doc.Files[0].Hum == nil {
		t.Fatalf("document %s: %v", out, err)
	}
	if f := doc.Files[0].Hum.Fundamental; math.Abs(f-49.99) > surveyHumTolHz {
		t.Errorf("fundamental %.4f Hz, README mean 49.99", f)
	}
}

// TestSurveyReportsSubAudioTone: a 3 Hz tone of power -16 dBFS (amplitude
// sqrt(2) 10^(-16/20), a sine's power being A^2/2) over a quiet white floor
// is reported with its level, and a high-pass suggested for it.
func TestSurveyReportsSubAudioTone(t *testing.T) {
	name := filepath.Join(t.TempDir(), "tone3.wav")
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: 8000, Channels: 1, Bits: 32, Encoding: wavio.Float}})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 3))
	x := make([]float64, 8*8000)
	for i := range x {
		x[i] = math.Sqrt2*math.Pow(10, -16.0/20)*math.Sin(2*math.Pi*3*float64(i)/8000) + 0.003*rng.NormFloat64()
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "survey", name)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"a steady 3.0 Hz tone at -16.0 dBFS", "high-pass at 10 Hz", `"cutoff_hz":[10]`} {
		if !strings.Contains(out, want) {
			t.Errorf("survey output lacks %q:\n%s", want, out)
		}
	}
}
