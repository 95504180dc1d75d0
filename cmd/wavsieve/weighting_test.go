package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// weightingLevelTolDB: a steady 1 kHz tone keeps its level through
// A-weighting (0 dB there by IEC 61672-1:2013, Annex E normalisation);
// the tolerance covers the 24-bit output and the start-up transient.
const weightingLevelTolDB = 0.02

func TestDesignWeightingJSON(t *testing.T) {
	code, out, errs := runCmd(t, "design", "--weighting", "A", "--rate", "48000", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Stages []struct {
			Family    string `json:"family"`
			Form      string `json:"form"`
			Weighting struct {
				Curve    string    `json:"curve"`
				Standard string    `json:"standard"`
				DevDB    float64   `json:"max_deviation_from_analog_db"`
				Class    *int      `json:"class"`
				Caution  string    `json:"caution"`
				Goal     []float64 `json:"goal_band_hz"`
			} `json:"weighting"`
			Mask []struct {
				Label  string   `json:"nominal"`
				Hz     float64  `json:"frequency_hz"`
				Table  *float64 `json:"table_db"`
				Lower  *float64 `json:"lower_db"`
				Upper  *float64 `json:"upper_db"`
				Within bool     `json:"within"`
			} `json:"mask"`
		} `json:"stages"`
		Sections [][6]float64 `json:"sections"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	st := doc.Stages[0]
	w := st.Weighting
	if st.Family != "weighting" || st.Form != "standard" || w.Curve != "A" || w.Standard != "IEC 61672-1:2013" || w.Class == nil || *w.Class != 1 || w.DevDB > 0.01 || !strings.Contains(w.Caution, "not a sound level meter") {
		t.Errorf("stage %+v", st.Weighting)
	}
	// IEC 61672-1:2013 Table 3 has 34 rows from 10 Hz to 20 kHz; at 48 kHz
	// all lie below 0.45 of the rate.
	if len(st.Mask) != 34 || st.Mask[0].Lower != nil || st.Mask[0].Label != "10" || math.Abs(st.Mask[33].Hz-19952.623) > 0.001 {
		t.Fatalf("mask %d rows: first %+v", len(st.Mask), st.Mask[0])
	}
	for _, m := range st.Mask {
		if !m.Within || m.Table == nil || m.Upper == nil {
			t.Errorf("row %+v", m)
		}
	}
	if len(doc.Sections) != 4 {
		t.Errorf("%d sections", len(doc.Sections))
	}
}

func TestWeightingFlagChains(t *testing.T) {
	code, out, errs := runCmd(t, "design", "--family", "butterworth", "--response", "highpass", "--order", "2", "--cutoff", "10", "--weighting", "C", "--rate", "44100")
	if code != exitOK || !strings.Contains(out, "Stage 2: C-weighting (IEC 61672-1:2013)") || !strings.Contains(out, "Stage 1: butterworth highpass") || !strings.Contains(out, "caution") {
		t.Fatalf("exit %d, stdout %s, stderr %s", code, out, errs)
	}
	spec := filepath.Join(t.TempDir(), "hp.json")
	if err := os.WriteFile(spec, []byte(`{"family": "butterworth", "response": "highpass", "order": 2, "cutoff_hz": 0.3}`), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCmd(t, "design", "--spec", spec, "--weighting", "Wk", "--rate", "800")
	if code != exitOK || !strings.Contains(out, "Stage 2: weighting Wk (ISO 8041-1:2017)") {
		t.Fatalf("exit %d, stdout %s, stderr %s", code, out, errs)
	}
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"unknown curve", []string{"design", "--weighting", "B", "--rate", "48000"}, exitFail, "unsupported weighting curve \"B\""},
		{"zero phase", []string{"design", "--weighting", "A", "--zero-phase", "--rate", "48000"}, exitFail, "the A weighting is defined for one causal pass; remove zero_phase or --zero-phase"},
		{"flags without family", []string{"design", "--weighting", "A", "--order", "2", "--rate", "48000"}, exitUsage, "need --family"},
		{"rate too low", []string{"design", "--weighting", "Wh", "--rate", "2000"}, exitFail, "sample rate of at least"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(errs, c.want) || out != "" {
				t.Errorf("exit %d, stdout %q, stderr %q", code, out, errs)
			}
		})
	}
}

func TestWeightingHelp(t *testing.T) {
	for _, args := range [][]string{{"help", "weighting"}, {"design", "--help"}, {"apply", "--help"}} {
		code, out, _ := runCmd(t, args...)
		if code != exitOK || !strings.Contains(out, "weighting") || !strings.Contains(strings.Join(strings.Fields(out), " "), "not a sound level meter") {
			t.Errorf("%v: exit %d, no weighting caution in the help", args, code)
		}
	}
	if code, _, errs := runCmd(t, "help", "nonsense"); code != exitUsage || !strings.Contains(errs, "weighting") {
		t.Errorf("unknown topic: exit %d, %s", code, errs)
	}
}

// TestApplyWeighting A-weights a file of a 1 kHz and a 100 Hz tone and
// checks the levels: 0 dB at 1 kHz and -19.1 dB at 100 Hz (IEC 61672-1:2013
// Table 3; the analog definition at the exact 100 Hz is -19.145 dB).
func TestApplyWeighting(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "tones.wav"), filepath.Join(dir, "a.wav")
	const rate, secs = 48000, 2.0
	w, err := wavio.Create(in, wavio.WriterOptions{Format: wavio.Format{SampleRate: rate, Channels: 2, Bits: 24, Encoding: wavio.PCM}, DitherSeed: 1})
	if err != nil {
		t.Fatal(err)
	}
	n := int(secs * rate)
	buf := make([]float64, 2*n)
	for i := 0; i < n; i++ {
		tt := float64(i) / rate
		buf[2*i] = 0.5 * math.Sin(2*math.Pi*1000*tt)
		buf[2*i+1] = 0.5 * math.Sin(2*math.Pi*100*tt)
	}
	if err := w.WriteFrames(buf); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := runCmd(t, "apply", "--weighting", "A", "--output", out, in); code != exitOK {
		t.Fatalf("apply: exit %d: %s", code, errs)
	}
	_, ch := readPlanar(t, out)
	rms := func(x []float64) float64 {
		s := 0.0
		for _, v := range x[len(x)/2:] { // the second half: past the transient
			s += v * v
		}
		return math.Sqrt(s / float64(len(x)-len(x)/2))
	}
	ref := 0.5 / math.Sqrt2
	if got := 20 * math.Log10(rms(ch[0])/ref); math.Abs(got) > weightingLevelTolDB {
		t.Errorf("1 kHz: %.4f dB", got)
	}
	if got := 20 * math.Log10(rms(ch[1])/ref); math.Abs(got-(-19.145)) > weightingLevelTolDB {
		t.Errorf("100 Hz: %.4f dB", got)
	}
	// The HTML report of the run carries the weighted-level caution.
	html := filepath.Join(dir, "r.html")
	if code, _, errs := runCmd(t, "report", "--from", dir, "--output", html); code != exitOK {
		t.Fatalf("report: exit %d: %s", code, errs)
	}
	if b, err := os.ReadFile(html); err != nil || !strings.Contains(string(b), "not a sound level meter") {
		t.Errorf("the report lacks the weighting caution (%v)", err)
	}
}

func TestDesignWeightingPlot(t *testing.T) {
	name := filepath.Join(t.TempDir(), "a.svg")
	code, out, errs := runCmd(t, "design", "--weighting", "A", "--rate", "44100", "--plot", name)
	if code != exitOK || !strings.Contains(out, "plot written") {
		t.Fatalf("exit %d: %s %s", code, out, errs)
	}
	b, err := os.ReadFile(name)
	if err != nil || !strings.Contains(string(b), "class 1 limits, IEC 61672-1:2013 Table 3") {
		t.Errorf("plot lacks the tolerance band's legend (%v)", err)
	}
}

// TestVerifyISOWeighting: verify checks an ISO 8041-1 curve at the rows
// of its tolerance table (ISO 8041-1:2017 Tables 4 and 5, see
// design/weighting_data.go), and the design report shows that table
// rather than IEC 61672-1 classes.
func TestVerifyISOWeighting(t *testing.T) {
	code, out, errs := runCmd(t, "verify", "--weighting", "Wk", "--probe", "--rate", "1000", "--json")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s\n%s", code, errs, out)
	}
	v := decodeVerify(t, out)
	if v.Verdict != "pass" {
		t.Errorf("verdict %q", v.Verdict)
	}
	masks := 0
	for _, c := range v.Checks {
		var kind, verdict string
		json.Unmarshal(c["kind"], &kind)
		json.Unmarshal(c["verdict"], &verdict)
		if kind == "mask" {
			masks++
			if verdict != "pass" {
				t.Errorf("mask check %s: %s", c["label"], verdict)
			}
		}
	}
	// Wk's Annex B table runs 0.1 Hz ... 400 Hz: 37 bands, all below 450 Hz.
	if masks != 37 {
		t.Errorf("%d mask checks, want 37", masks)
	}
	code, out, errs = runCmd(t, "design", "--weighting", "Wk", "--rate", "1000")
	if code != exitOK || !strings.Contains(out, "ISO 8041-1:2017 Tables 4 and 5") || !strings.Contains(out, "37 of 37") || strings.Contains(out, "class 1") {
		t.Errorf("exit %d, stderr %s\n%s", code, errs, out)
	}
}
