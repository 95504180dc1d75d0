package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// writeToneWAV writes seconds of a sine of peak amp at hz, mono.
func writeToneWAV(t *testing.T, name string, rate int, hz, amp, seconds float64, enc wavio.Encoding, bits int) {
	t.Helper()
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: 1, Bits: bits, Encoding: enc}, NoDither: true})
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, int(seconds*float64(rate)))
	for i := range x {
		x[i] = amp * math.Sin(2*math.Pi*hz*float64(i)/float64(rate))
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

type bandsJSON struct {
	Files []struct {
		Path       string  `json:"path"`
		SampleRate float64 `json:"sample_rate_hz"`
		Fraction   int     `json:"fraction"`
		Channels   []struct {
			Channel   int      `json:"channel"`
			OverallDB *float64 `json:"overall_db"`
			Bands     []struct {
				MidbandHz      float64  `json:"midband_hz"`
				ExactMidbandHz float64  `json:"exact_midband_hz"`
				LevelDB        *float64 `json:"level_db"`
			} `json:"bands"`
		} `json:"channels"`
		Intervals []json.RawMessage `json:"intervals"`
		Error     string            `json:"error"`
	} `json:"files"`
}

// decodeBands decodes the stdout of bands --json, failing the test on
// broken JSON or a document without files.
func decodeBands(t *testing.T, out string) bandsJSON {
	t.Helper()
	var doc bandsJSON
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("bands --json: %v\n%s", err, out)
	}
	if len(doc.Files) == 0 {
		t.Fatalf("bands --json lists no files:\n%s", out)
	}
	return doc
}

// sineBandTolDB is how close the band level of a steady sine at a band's
// mid-band frequency must be to the sine's level: a target of this
// project, inside the class 1 passband limits of +-0.4 dB at the mid-band
// frequency (IEC 61260-1:2014 Table 1, x = 0).
const sineBandTolDB = 0.1

func bandLevelAt(t *testing.T, doc bandsJSON, file int, hz float64) float64 {
	t.Helper()
	for _, b := range doc.Files[file].Channels[0].Bands {
		if b.MidbandHz == hz {
			if b.LevelDB == nil {
				t.Fatalf("band %g Hz has no level", hz)
			}
			return *b.LevelDB
		}
	}
	t.Fatalf("no band %g Hz", hz)
	return 0
}

func TestBandsJSONContract(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "tone.wav")
	writeToneWAV(t, name, 48000, 1000, 0.5, 2, wavio.Float, 32)
	code, out, errs := runCmd(t, "bands", "--json", name)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The keys the project's bands contract requires, exactly as named.
	var raw map[string]any
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatal(err)
	}
	f := raw["files"].([]any)[0].(map[string]any)
	for _, k := range []string{"path", "sample_rate_hz", "fraction", "channels"} {
		if _, ok := f[k]; !ok {
			t.Errorf("file has no %q", k)
		}
	}
	ch := f["channels"].([]any)[0].(map[string]any)
	for _, k := range []string{"channel", "overall_db", "bands"} {
		if _, ok := ch[k]; !ok {
			t.Errorf("channel has no %q", k)
		}
	}
	if ch["channel"].(float64) != 1 {
		t.Errorf("channels count from %v, want 1", ch["channel"])
	}
	b := ch["bands"].([]any)[0].(map[string]any)
	for _, k := range []string{"midband_hz", "exact_midband_hz", "level_db"} {
		if _, ok := b[k]; !ok {
			t.Errorf("band has no %q", k)
		}
	}
	doc := decodeBands(t, out)
	fd := doc.Files[0]
	if fd.Fraction != 3 || fd.SampleRate != 48000 || fd.Path != name {
		t.Errorf("file: fraction %d, rate %g, path %q", fd.Fraction, fd.SampleRate, fd.Path)
	}
	bands := fd.Channels[0].Bands
	// Defaults: 12.5 Hz up to the highest third whose upper edge lies
	// below 0.45 * 48000 = 21600 Hz: 16 kHz (its upper edge is 17.8 kHz,
	// the 20 kHz band's 22.4 kHz).
	if bands[0].MidbandHz != 12.5 || bands[len(bands)-1].MidbandHz != 16000 {
		t.Errorf("bands %g..%g, want 12.5..16000", bands[0].MidbandHz, bands[len(bands)-1].MidbandHz)
	}
	// Re full scale, a sine of peak 0.5 reads 20 log10(0.5 / sqrt 2).
	want := 20 * math.Log10(0.5/math.Sqrt2)
	if got := bandLevelAt(t, doc, 0, 1000); math.Abs(got-want) > sineBandTolDB {
		t.Errorf("1 kHz band %.2f dB, want %.2f", got, want)
	}
}

// TestBandsCalibrator: a 94 dB calibrator recorded so that its 1 kHz sine
// peaks at full scale reads 94.0 dB SPL in the 1 kHz band with
// --full-scale 94dB, in a float file and in a 24-bit one.
func TestBandsCalibrator(t *testing.T) {
	const tolDB = 0.05 // the level is printed to 0.01 dB; 94.0 means within half a tenth
	for _, tc := range []struct {
		name string
		enc  wavio.Encoding
		bits int
	}{{"float32", wavio.Float, 32}, {"pcm24", wavio.PCM, 24}} {
		t.Run(tc.name, func(t *testing.T) {
			name := filepath.Join(t.TempDir(), "calibrator.wav")
			writeToneWAV(t, name, 48000, 1000, 1.0, 5, tc.enc, tc.bits)
			code, out, errs := runCmd(t, "bands", "--full-scale", "94dB", "--fraction", "1", "--json", name)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			doc := decodeBands(t, out)
			if got := bandLevelAt(t, doc, 0, 1000); math.Abs(got-94) > tolDB {
				t.Errorf("1 kHz band %.2f dB SPL, want 94.0", got)
			}
			if got := *doc.Files[0].Channels[0].OverallDB; math.Abs(got-94) > tolDB {
				t.Errorf("overall %.2f dB SPL, want 94.0", got)
			}
			if !strings.Contains(out, `"reference": "dB re 20 uPa"`) {
				t.Errorf("no SPL reference in %s", out[:200])
			}
		})
	}
}

// TestBandsEngineeringUnits: a float file in m/s^2 whose samples pass
// +-1 is not reported as over full scale with --units, and reads re
// 1e-6 m/s^2 (ISO 1683); without --units the same file is flagged.
func TestBandsEngineeringUnits(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "accel.wav")
	writeToneWAV(t, name, 12800, 80, 5, 4, wavio.Float, 32)
	code, out, errs := runCmd(t, "bands", "--units", "m/s^2", "--json", name)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if strings.Contains(errs, "full scale") || strings.Contains(out, "samples_at_full_scale") {
		t.Errorf("engineering units reported as over full scale: %s", errs)
	}
	doc := decodeBands(t, out)
	// 5 m/s^2 peak: 20 log10(5 / sqrt 2 / 1e-6) = 130.97 dB re 1 um/s^2.
	want := 20 * math.Log10(5/math.Sqrt2/1e-6)
	if got := bandLevelAt(t, doc, 0, 80); math.Abs(got-want) > sineBandTolDB {
		t.Errorf("80 Hz band %.2f dB, want %.2f", got, want)
	}
	code, _, errs = runCmd(t, "bands", name)
	if code != exitOK || !strings.Contains(errs, "beyond full scale") {
		t.Errorf("without --units: exit %d, stderr %q; want a note on samples beyond full scale", code, errs)
	}
	// --units on a PCM file is refused for that file.
	pcm := filepath.Join(dir, "pcm.wav")
	writeToneWAV(t, pcm, 12800, 80, 0.5, 1, wavio.PCM, 16)
	code, _, errs = runCmd(t, "bands", "--units", "m/s^2", pcm, name)
	if code != exitFail || !strings.Contains(errs, "pcm.wav") || !strings.Contains(errs, "float files") {
		t.Errorf("--units on PCM: exit %d, stderr %q", code, errs)
	}
}

// TestBandsSensitivity: 10 mV/Pa into a recorder where a sample of 1.0 is
// 1 V: a sine of peak 0.01 is 1 Pa peak, 20 log10(1/sqrt 2/20e-6) =
// 90.97 dB SPL.
func TestBandsSensitivity(t *testing.T) {
	name := filepath.Join(t.TempDir(), "mic.wav")
	writeToneWAV(t, name, 44100, 250, 0.01, 3, wavio.PCM, 24)
	code, out, errs := runCmd(t, "bands", "--sensitivity", "10mV/Pa", "--full-scale-volts", "1.0", "--fraction", "1", "--json", name)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc := decodeBands(t, out)
	want := 20 * math.Log10(1/math.Sqrt2/20e-6)
	if got := bandLevelAt(t, doc, 0, 250); math.Abs(got-want) > sineBandTolDB {
		t.Errorf("250 Hz octave %.2f dB SPL, want %.2f", got, want)
	}
}

func TestBandsUsageErrors(t *testing.T) {
	name := filepath.Join(t.TempDir(), "t.wav")
	writeToneWAV(t, name, 48000, 1000, 0.5, 1, wavio.PCM, 16)
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"unknown weighting", []string{"--weighting", "B", name}, "use A, C or Z"},
		{"bad fraction", []string{"--fraction", "5", name}, "--fraction 5"},
		{"two calibrations", []string{"--full-scale", "94dB", "--units", "Pa", name}, "one of"},
		{"volts without sensitivity", []string{"--full-scale-volts", "1", name}, "--sensitivity"},
		{"sensitivity without volts", []string{"--sensitivity", "10mV/Pa", name}, "full-scale-volts"},
		{"bad full scale", []string{"--full-scale", "loud", name}, "invalid full scale"},
		{"json and csv", []string{"--json", "--csv", name}, "choose one"},
		{"no input", nil, "no input"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errs := runCmd(t, append([]string{"bands"}, tc.args...)...)
			if code != exitUsage || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, stderr %q; want 2 and %q", code, errs, tc.want)
			}
		})
	}
}

func TestBandsBatchCSVIntervalsPlot(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in")
	os.MkdirAll(in, 0o755)
	writeToneWAV(t, filepath.Join(in, "a.wav"), 48000, 500, 0.5, 3, wavio.PCM, 16)
	writeToneWAV(t, filepath.Join(in, "b.wav"), 44100, 2000, 0.25, 2.5, wavio.PCM, 24)
	os.WriteFile(filepath.Join(in, "broken.wav"), []byte("RIFF junk"), 0o644)
	plotDir := filepath.Join(dir, "plots")
	code, out, errs := runCmd(t, "bands", "--fraction", "1", "--interval", "1", "--csv", "--plot", plotDir, in)
	if code != exitFail {
		t.Errorf("exit %d with a broken file among good ones, want 1", code)
	}
	if !strings.Contains(errs, "broken.wav") {
		t.Errorf("stderr does not name the broken file: %q", errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "path,channel,start_s,end_s,band,midband_hz,exact_midband_hz,level_db,reference,weighting" {
		t.Errorf("header %v", rows[0])
	}
	// a.wav: 16 Hz..8 kHz octaves (10 bands) + overall, for the whole file
	// and 3 stretches; b.wav at 44.1 kHz the same 10 bands, whole + 3
	// stretches (1, 1, 0.5 s).
	if got, want := len(rows)-1, 2*4*11; got != want {
		t.Errorf("%d CSV rows, want %d", got, want)
	}
	for _, f := range []string{"a", "b"} {
		matches, _ := filepath.Glob(filepath.Join(plotDir, "*"+f+".bands.png"))
		if len(matches) != 1 {
			t.Errorf("bar chart of %s.wav: %v", f, matches)
		}
	}
	// The table names the caution.
	_, out, _ = runCmd(t, "bands", filepath.Join(in, "a.wav"))
	if !strings.Contains(out, "not the reading of a class 1") {
		t.Errorf("table without the caution")
	}
}

// TestBandStageDesignApplyVerify: the band family designs, filters and
// verifies like any other stage; verify checks it at every point of its
// class 1 mask.
func TestBandStageDesignApplyVerify(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "band.json")
	os.WriteFile(spec, []byte(`{"family": "band", "fraction": 3, "midband_hz": 1000}`), 0o644)
	code, out, errs := runCmd(t, "design", "--spec", spec, "--rate", "44100")
	if code != exitOK || !strings.Contains(out, "1/3-octave band 1k Hz") || strings.Contains(out, "OUTSIDE") {
		t.Fatalf("design: exit %d, %s %s", code, out, errs)
	}
	code, out, errs = runCmd(t, "design", "--spec", spec, "--rate", "44100", "--json")
	var dj struct {
		Stages []struct {
			Mask []struct {
				Within bool `json:"within"`
			} `json:"mask"`
		} `json:"stages"`
	}
	if err := json.Unmarshal([]byte(out), &dj); code != exitOK || err != nil || len(dj.Stages[0].Mask) != 17 {
		t.Fatalf("design --json: exit %d, %v, %s", code, err, errs)
	}
	for i, m := range dj.Stages[0].Mask {
		if !m.Within {
			t.Errorf("design --json: mask row %d not within", i)
		}
	}
	code, out, errs = runCmd(t, "verify", "--spec", spec, "--probe", "--rate", "44100", "--json")
	if code != exitOK {
		t.Fatalf("verify --probe: exit %d: %s", code, errs)
	}
	var doc struct {
		Verdict string `json:"verdict"`
		Checks  []struct {
			Kind string `json:"kind"`
		} `json:"checks"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	masks := 0
	for _, c := range doc.Checks {
		if c.Kind == "mask" {
			masks++
		}
	}
	// 17 breakpoints of Table 1 (8 each side and fm), all below 22 kHz.
	if doc.Verdict != "pass" || masks != 17 {
		t.Errorf("verify: verdict %q with %d mask checks, want pass with 17", doc.Verdict, masks)
	}
	in := filepath.Join(dir, "in.wav")
	writeToneWAV(t, in, 44100, 1000, 0.5, 1, wavio.PCM, 24)
	code, _, errs = runCmd(t, "apply", "--spec", spec, "--output", filepath.Join(dir, "out"), in)
	if code != exitOK {
		t.Errorf("apply: exit %d: %s", code, errs)
	}
}

// TestBandsWeighting: A-weighting leaves a 1 kHz tone as it is and takes
// 19.1 dB off a 100 Hz one, C-weighting 0.3 dB (IEC 61672-1:2013,
// Table 3, design goals at 100 Hz: A -19.1 dB, C -0.3 dB).
func TestBandsWeighting(t *testing.T) {
	const tolDB = 0.15 // the table's 0.1 dB rounding plus the level's 0.01 dB
	dir := t.TempDir()
	for _, tc := range []struct {
		hz     float64
		curve  string
		wantDB float64
	}{{1000, "A", 0}, {100, "A", -19.1}, {100, "C", -0.3}, {100, "Z", 0}} {
		name := filepath.Join(dir, "t.wav")
		writeToneWAV(t, name, 48000, tc.hz, 0.5, 3, wavio.Float, 32)
		code, out, errs := runCmd(t, "bands", "--weighting", tc.curve, "--json", name)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", tc.curve, code, errs)
		}
		doc := decodeBands(t, out)
		got := bandLevelAt(t, doc, 0, tc.hz) - 20*math.Log10(0.5/math.Sqrt2)
		if math.Abs(got-tc.wantDB) > tolDB {
			t.Errorf("%s-weighted %g Hz tone: %+.2f dB re unweighted, want %+.1f", tc.curve, tc.hz, got, tc.wantDB)
		}
		if o := *doc.Files[0].Channels[0].OverallDB - 20*math.Log10(0.5/math.Sqrt2); math.Abs(o-tc.wantDB) > tolDB {
			t.Errorf("%s-weighted %g Hz tone: overall %+.2f dB re unweighted, want %+.1f", tc.curve, tc.hz, o, tc.wantDB)
		}
	}
}
