package main

import (
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// writeNoiseWAV writes white Gaussian noise at 0.1 FS rms (-20 dBFS) as
// 16-bit PCM.
func writeNoiseWAV(t *testing.T, name string, rate, ch int, seconds float64, seed uint64) {
	t.Helper()
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: ch, Bits: 16, Encoding: wavio.PCM}, DitherSeed: seed})
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(seed, 5))
	buf := make([]float64, int(seconds*float64(rate))*ch)
	for i := range buf {
		buf[i] = 0.1 * r.NormFloat64()
	}
	if err := w.WriteFrames(buf); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

// The spec of these tests: an elliptic low-pass at 8 kHz, 0.5 dB to 1 kHz,
// 60 dB from 1.3 kHz (minimum order 7: scipy.signal.ellipord(1000, 1300,
// 0.5, 60, fs=8000), SciPy 1.10.1, and wavsieve design agree).
var lowpassSpec = []string{"--family", "elliptic", "--response", "lowpass", "--passband", "1000", "--stopband", "1300", "--ripple", "0.5", "--attenuation", "60"}

type verifyJSON struct {
	Pass    *bool                        `json:"pass"`
	Verdict string                       `json:"verdict"`
	Checks  []map[string]json.RawMessage `json:"checks"`
	Files   []struct {
		Method string `json:"method"`
	} `json:"files"`
}

func decodeVerify(t *testing.T, out string) verifyJSON {
	t.Helper()
	var v verifyJSON
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	if v.Pass == nil {
		t.Fatal(`no "pass" key`)
	}
	if len(v.Checks) == 0 {
		t.Fatal("no checks")
	}
	if *v.Pass != (v.Verdict == "pass") {
		t.Fatalf("pass %v with verdict %q", *v.Pass, v.Verdict)
	}
	// The keys of the verify document, a contract for scripts.
	for _, c := range v.Checks {
		for _, k := range []string{"channel", "stage", "kind", "frequency_hz", "designed_db", "design_range_db", "measured_db", "interval_db", "limit_db", "margin_db", "coherence", "random_error", "verdict", "reason"} {
			if _, ok := c[k]; !ok {
				t.Fatalf("check without %q: %v", k, c)
			}
		}
	}
	return v
}

func verdicts(v verifyJSON) map[string]int {
	n := map[string]int{}
	for _, c := range v.Checks {
		var s string
		json.Unmarshal(c["verdict"], &s)
		n[s]++
	}
	return n
}

func applyTo(t *testing.T, in, out string, extra ...string) {
	t.Helper()
	code, _, errs := runCmd(t, append(append([]string{"apply", "--no-progress", "--dither-seed", "9", "--output", out}, extra...), in)...)
	if code != exitOK {
		t.Fatalf("apply: exit %d: %s", code, errs)
	}
}

func TestVerifyRightAndWrongFilters(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeNoiseWAV(t, in, 8000, 1, 20, 1)
	cases := []struct {
		name   string
		filter []string // what apply ran
		want   int
	}{
		{"the spec's filter passes", lowpassSpec, exitOK},
		{"a lower order fails", []string{"--family", "elliptic", "--response", "lowpass", "--order", "3", "--cutoff", "1000", "--ripple", "0.5", "--attenuation", "60"}, exitFail},
		{"a shifted cutoff fails", []string{"--family", "elliptic", "--response", "lowpass", "--passband", "1150", "--stopband", "1450", "--ripple", "0.5", "--attenuation", "60"}, exitFail},
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, "out"+string(rune('a'+i))+".wav")
			applyTo(t, in, out, c.filter...)
			code, stdout, stderr := runCmd(t, append([]string{"verify", "--input", in, "--output", out, "--json"}, lowpassSpec...)...)
			if code != c.want {
				t.Fatalf("exit %d, want %d; stderr %s\n%s", code, c.want, stderr, stdout)
			}
			v := decodeVerify(t, stdout)
			n := verdicts(v)
			if *v.Pass != (c.want == exitOK) || (c.want == exitOK) != (n["fail"] == 0) {
				t.Fatalf("pass %v with verdicts %v", *v.Pass, n)
			}
			if c.want == exitOK && v.Verdict != "pass" {
				t.Fatalf("verdict %s, verdicts %v: 20 s of noise resolve every edge of this spec", v.Verdict, n)
			}
		})
	}
}

func TestVerifyUnmeasurableBelowDitherFloor(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in.wav"), filepath.Join(dir, "out.wav")
	writeNoiseWAV(t, in, 8000, 1, 8, 2)
	// 130 dB of stopband written to 16 bits: the dither floor (about
	// -140 dBFS^2/Hz against -63.8 dBFS^2/Hz of input) hides it.
	deep := []string{"--family", "elliptic", "--response", "lowpass", "--passband", "1000", "--stopband", "1300", "--ripple", "0.5", "--attenuation", "130"}
	applyTo(t, in, out, deep...)
	code, stdout, stderr := runCmd(t, append([]string{"verify", "--input", in, "--output", out}, deep...)...)
	if code != 3 {
		t.Fatalf("exit %d, want 3: an unmeasured stopband edge makes the run inconclusive, not failed: %s\n%s", code, stderr, stdout)
	}
	if testing.Verbose() {
		t.Log(stdout)
	}
	for _, want := range []string{"unmeasurable", "floor", "not a calibrated certification", "Verdict: inconclusive"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("table lacks %q:\n%s", want, stdout)
		}
	}
	for _, line := range strings.Split(stdout, "\n") {
		f := strings.Fields(line)
		if len(f) > 3 && (f[2] == "stopband" || f[2] == "stopband-edge") && f[len(f)-1] != "unmeasurable" {
			t.Errorf("stopband check not unmeasurable: %s", line)
		}
	}
}

func TestVerifyZeroPhaseDoubling(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in.wav"), filepath.Join(dir, "out.wav")
	writeNoiseWAV(t, in, 8000, 1, 8, 3)
	bw := []string{"--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "1000"}
	applyTo(t, in, out, append(bw, "--zero-phase")...)
	// Checked against the squared design (-6.02 dB at the cutoff) the run
	// passes; as if causal (-3.01 dB) its cutoff reads 3 dB low and fails.
	// Both figures are definitions: the Butterworth |H|^2 = 1/(1 + (f/fc)^2N)
	// is 1/2 at fc (10 log10 0.5 = -3.0103 dB), and forward-backward squares
	// it (-6.0206 dB).
	if code, stdout, stderr := runCmd(t, append([]string{"verify", "--input", in, "--output", out, "--zero-phase"}, bw...)...); code == exitFail {
		t.Fatalf("zero-phase run as zero-phase: exit %d: %s\n%s", code, stderr, stdout)
	}
	code, stdout, _ := runCmd(t, append([]string{"verify", "--input", in, "--output", out, "--json"}, bw...)...)
	if code != exitFail {
		t.Fatalf("zero-phase run as causal: exit %d\n%s", code, stdout)
	}
	v := decodeVerify(t, stdout)
	if n := verdicts(v); n["fail"] == 0 || v.Verdict != "fail" {
		t.Fatalf("verdict %s with %v: %s", v.Verdict, n, stdout)
	}
}

func TestVerifyProbe(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeNoiseWAV(t, in, 8000, 2, 0.5, 4)
	// --probe takes an optional value and never the next argument:
	// "--probe --rate 8000" is a tone probe at 8 kHz.
	for _, c := range []struct {
		args   []string
		method string
	}{
		{[]string{"--probe", "--input", in}, "tone probe"},
		{[]string{"--probe", "--rate", "8000"}, "tone probe"},
		{[]string{"--probe=noise", "--rate", "8000"}, "noise probe"},
	} {
		code, stdout, stderr := runCmd(t, append(append([]string{"verify", "--json"}, c.args...), lowpassSpec...)...)
		if code != exitOK {
			t.Fatalf("%v: exit %d: %s\n%s", c.args, code, stderr, stdout)
		}
		v := decodeVerify(t, stdout)
		if len(v.Files) != 1 || v.Files[0].Method != c.method {
			t.Fatalf("%v: not a %s report", c.args, c.method)
		}
		if n := verdicts(v); n["fail"] != 0 || v.Verdict != "pass" {
			t.Fatalf("%v: verdict %s, verdicts %v", c.args, v.Verdict, n)
		}
	}
	if code, _, stderr := runCmd(t, append([]string{"verify", "--probe", "noise", "--rate", "8000"}, lowpassSpec...)...); code != exitUsage || !strings.Contains(stderr, "--probe=noise") {
		t.Fatalf("--probe noise: exit %d, %s", code, stderr)
	}
}

func TestApplyVerifyRecordsVerdicts(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeNoiseWAV(t, in, 8000, 1, 8, 5)
	outDir := filepath.Join(dir, "out")
	applyTo(t, filepath.Join(dir, "in.wav"), outDir, append([]string{"--verify"}, lowpassSpec...)...)
	b, err := os.ReadFile(filepath.Join(outDir, "wavsieve-manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Files []struct {
			Verify *verifyJSON `json:"verify"`
		} `json:"files"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if len(m.Files) != 1 || m.Files[0].Verify == nil || m.Files[0].Verify.Verdict == "fail" || m.Files[0].Verify.Verdict == "" || len(m.Files[0].Verify.Checks) == 0 {
		t.Fatalf("manifest verify entry: %s", b)
	}
	code, stdout, stderr := runCmd(t, "verify", "--manifest", filepath.Join(outDir, "wavsieve-manifest.json"), "--plot", filepath.Join(dir, "v.svg"))
	if code == exitFail || code == exitUsage {
		t.Fatalf("verify --manifest: exit %d: %s\n%s", code, stderr, stdout)
	}
	svg, err := os.ReadFile(filepath.Join(dir, "v.svg"))
	if err != nil || !strings.Contains(string(svg), "<svg") {
		t.Fatalf("plot not written: %v", err)
	}
}

func TestVerifyErrors(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeNoiseWAV(t, in, 8000, 1, 0.1, 6)
	cases := []struct {
		name   string
		args   []string
		code   int
		stderr string
	}{
		{"no files", lowpassSpec, exitUsage, "Run 'wavsieve verify --help'"},
		{"no spec", []string{"--input", in, "--output", in}, exitUsage, "no filter given"},
		{"missing output", append([]string{"--input", in, "--output", filepath.Join(dir, "none.wav")}, lowpassSpec...), exitFail, "none.wav"},
		{"too short: inconclusive", append([]string{"--input", in, "--output", in}, lowpassSpec...), 3, ""},
		{"bad plot name", append([]string{"--input", in, "--output", in, "--plot", "x.pdf"}, lowpassSpec...), exitUsage, "--plot"},
		{"bad segment", append([]string{"--input", in, "--output", in, "--segment", "1000"}, lowpassSpec...), exitUsage, "power of two"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := runCmd(t, append([]string{"verify"}, c.args...)...)
			if code != c.code || !strings.Contains(stderr, c.stderr) {
				t.Fatalf("exit %d, stderr %q; want %d and %q\n%s", code, stderr, c.code, c.stderr, stdout)
			}
		})
	}
	code, stdout, _ := runCmd(t, "verify", "--help")
	if code != exitOK || !strings.Contains(stdout, "not a calibrated certification") || !strings.Contains(stdout, "--probe") {
		t.Fatalf("help: exit %d\n%s", code, stdout)
	}
}

func TestVerifyHumNotchesBesidePassbandPoints(t *testing.T) {
	// The demo recording carries strong 50 Hz hum and harmonics; the
	// passband checks of the rumble high-pass fall within a window's main
	// lobe of the notches, and the hum's energy pulls H1 toward the notch
	// depth there. The right filter must not fail, and six seconds cannot
	// show notches 1.8 Hz wide: the run is inconclusive, not a pass (a
	// constructed regression case, not a reference value).
	dir := t.TempDir()
	out := filepath.Join(dir, "clean.wav")
	code, _, stderr := runCmd(t, "apply", "--spec", "../../samples/specs/rumble-and-hum.json", "--zero-phase", "--output", out, "../../samples/reedmere-north-48k.wav")
	if code != exitOK {
		t.Fatalf("apply: exit %d: %s", code, stderr)
	}
	code, stdout, stderr := runCmd(t, "verify", "--spec", "../../samples/specs/rumble-and-hum.json", "--zero-phase", "--input", "../../samples/reedmere-north-48k.wav", "--output", out, "--json")
	if code != 3 {
		t.Fatalf("verify: exit %d, want 3: %s\n%s", code, stderr, stdout)
	}
	var doc struct {
		Pass   bool `json:"pass"`
		Checks []struct {
			Verdict string `json:"verdict"`
		} `json:"checks"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	for _, c := range doc.Checks {
		if c.Verdict == "fail" {
			t.Errorf("a check of the right filter failed")
		}
	}
	if doc.Pass {
		t.Errorf("pass over unmeasured notches")
	}
}

type stopChecks []struct {
	Kind    string `json:"kind"`
	Verdict string `json:"verdict"`
}

// stopband counts the stopband checks with the verdict.
func (c stopChecks) stopband(verdict string) int {
	n := 0
	for _, x := range c {
		if strings.HasPrefix(x.Kind, "stopband") && x.Verdict == verdict {
			n++
		}
	}
	return n
}

func TestApplyVerifyMeasuresBeforeQuantisation(t *testing.T) {
	// A 110 dB stopband lies below the floor of a 16-bit output (about
	// -98 dB relative to a full-scale sine; common practice: 6.02 dB per
	// bit plus 1.76 dB). Measured on the written file the stopband is
	// unmeasurable; apply --verify measures the float64 output before
	// quantisation and sees it.
	dir := t.TempDir()
	in := filepath.Join(dir, "noise.wav")
	writeNoiseWAV(t, in, 8000, 1, 20, 7)
	spec := []string{"--family", "elliptic", "--response", "lowpass", "--passband", "1000", "--stopband", "1300", "--ripple", "0.5", "--attenuation", "110"}
	out := filepath.Join(dir, "out")
	code, stdout, stderr := runCmd(t, append([]string{"apply", "--verify", "--json", "--output", out, in}, spec...)...)
	if code != exitOK {
		t.Fatalf("apply --verify: exit %d: %s", code, stderr)
	}
	var m struct {
		Files []struct {
			Verify struct {
				MeasuredOn string     `json:"method"`
				Checks     stopChecks `json:"checks"`
			} `json:"verify"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(stdout), &m); err != nil || len(m.Files) != 1 {
		t.Fatalf("manifest: %v", err)
	}
	v := m.Files[0].Verify
	if v.MeasuredOn == "" || v.Checks.stopband("pass") == 0 || v.Checks.stopband("fail") != 0 {
		t.Errorf("inline: measured on %q, %d stopband checks pass, %d fail", v.MeasuredOn, v.Checks.stopband("pass"), v.Checks.stopband("fail"))
	}
	code, stdout, _ = runCmd(t, append([]string{"verify", "--json", "--input", in, "--output", filepath.Join(out, "noise.wav")}, spec...)...)
	var f struct {
		Checks stopChecks `json:"checks"`
	}
	json.Unmarshal([]byte(stdout), &f)
	if f.Checks.stopband("unmeasurable") == 0 || f.Checks.stopband("fail") != 0 {
		t.Errorf("on the 16-bit file (exit %d): %d stopband checks unmeasurable, %d fail", code, f.Checks.stopband("unmeasurable"), f.Checks.stopband("fail"))
	}
}
