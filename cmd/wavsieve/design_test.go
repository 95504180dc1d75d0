package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

func runCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

func TestDesignJSONContract(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "spec.json")
	os.WriteFile(spec, []byte(`{"stages":[{"family":"elliptic","response":"highpass","passband_hz":40,"stopband_hz":20,"ripple_db":0.5,"attenuation_db":60},{"family":"notch","fundamental_hz":50,"bandwidth_hz":2,"harmonics":3}]}`), 0o644)
	code, out, errs := runCmd(t, "design", "--spec", spec, "--rate", "48000", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// Keys required by the JSON output contract of the design notes.
	var doc struct {
		Rate      *float64 `json:"sample_rate_hz"`
		ZeroPhase *bool    `json:"zero_phase"`
		Stages    []struct {
			Family   string       `json:"family"`
			Response string       `json:"response"`
			Order    int          `json:"order"`
			Zeros    [][2]float64 `json:"zeros"`
			Poles    [][2]float64 `json:"poles"`
			Gain     *float64     `json:"gain"`
			Sections [][6]float64 `json:"sections"`
		} `json:"stages"`
		Sections [][6]float64 `json:"sections"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("stdout is not one JSON document: %v\n%s", err, out)
	}
	if doc.Rate == nil || *doc.Rate != 48000 || doc.ZeroPhase == nil || *doc.ZeroPhase {
		t.Errorf("sample_rate_hz / zero_phase wrong: %v %v", doc.Rate, doc.ZeroPhase)
	}
	if len(doc.Stages) != 2 || doc.Stages[0].Family != "elliptic" || doc.Stages[1].Family != "notch" {
		t.Fatalf("stages %+v", doc.Stages)
	}
	n := 0
	for _, st := range doc.Stages {
		if st.Gain == nil || len(st.Poles) == 0 || len(st.Zeros) != len(st.Poles) || len(st.Sections) != (len(st.Poles)+1)/2 {
			t.Errorf("stage %s: gain %v, %d zeros, %d poles, %d sections", st.Family, st.Gain, len(st.Zeros), len(st.Poles), len(st.Sections))
		}
		n += len(st.Sections)
	}
	if len(doc.Sections) != n {
		t.Errorf("top-level sections %d, stages hold %d", len(doc.Sections), n)
	}
	for i, s := range doc.Sections {
		if s[3] != 1 {
			t.Errorf("section %d not normalised to a0 = 1: %v", i, s)
		}
	}
	// The chain's last rows are the notch stage's, in order.
	last := doc.Stages[1].Sections
	if got := doc.Sections[len(doc.Sections)-len(last):]; got[0] != last[0] {
		t.Errorf("chain order: %v vs %v", got[0], last[0])
	}
}

func TestDesignHumanSummary(t *testing.T) {
	code, out, errs := runCmd(t, "design", "--family", "butterworth", "--response", "highpass", "--order", "4", "--cutoff", "20", "--rate", "48000")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"butterworth highpass, order 4", "2 sections", "-3 dB at (Hz):", "20", "largest pole radius", "passband group delay"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	if errs != "" {
		t.Errorf("stderr not empty: %s", errs)
	}
}

func TestDesignRateFromWAV(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "in.wav")
	w, err := wavio.Create(name, wavio.WriterOptions{Format: wavio.Format{SampleRate: 37800, Channels: 1, Bits: 16, Encoding: wavio.PCM}, NoDither: true})
	if err != nil {
		t.Fatal(err)
	}
	w.WriteFrames(make([]float64, 100))
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "design", "--family", "chebyshev1", "--response", "lowpass", "--order", "5", "--ripple", "1", "--cutoff", "5000", "--rate-of", name, "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Rate float64 `json:"sample_rate_hz"`
	}
	json.Unmarshal([]byte(out), &doc)
	if doc.Rate != 37800 {
		t.Errorf("rate %g, file has 37800", doc.Rate)
	}
}

func TestDesignZeroPhaseFlag(t *testing.T) {
	code, out, _ := runCmd(t, "design", "--family", "butterworth", "--response", "lowpass", "--order", "4", "--cutoff", "1000", "--rate", "8000", "--zero-phase", "--json")
	if code != exitOK {
		t.Fatal(out)
	}
	var doc struct {
		ZeroPhase bool `json:"zero_phase"`
		Stages    []struct {
			Checks []struct {
				DesignedDB float64 `json:"designed_db"`
			} `json:"checks"`
		} `json:"stages"`
	}
	json.Unmarshal([]byte(out), &doc)
	// Forward-backward doubles the dB: -6.02 dB at a Butterworth cutoff (common practice).
	if !doc.ZeroPhase || math.Abs(doc.Stages[0].Checks[0].DesignedDB-20*math.Log10(0.5)) > 1e-9 {
		t.Errorf("zero-phase report: %+v", doc)
	}
}

func TestDesignPlot(t *testing.T) {
	dir := t.TempDir()
	for _, ext := range []string{"svg", "png"} {
		name := filepath.Join(dir, "d."+ext)
		code, _, errs := runCmd(t, "design", "--family", "elliptic", "--response", "bandstop", "--passband", "40,60", "--stopband", "48,52", "--ripple", "1", "--attenuation", "40", "--rate", "8000", "--plot", name)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		b, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		if ext == "png" && !bytes.HasPrefix(b, []byte("\x89PNG")) || ext == "svg" && !bytes.Contains(b[:min(len(b), 400)], []byte("<svg")) {
			t.Errorf("%s plot does not look like %s", name, ext)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		t.Errorf("temporary files left behind: %v", entries)
	}
}

func TestDesignErrors(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"no rate", []string{"design", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "100"}, exitUsage, "no sample rate"},
		{"no spec", []string{"design", "--rate", "48000"}, exitUsage, "no filter given"},
		{"unknown flag", []string{"design", "--frobnicate"}, exitUsage, "unknown flag"},
		{"above nyquist", []string{"design", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "30000", "--rate", "48000"}, exitUsage, "Nyquist"},
		{"bad edge list", []string{"design", "--family", "butterworth", "--response", "bandpass", "--order", "2", "--cutoff", "1,2,3", "--rate", "48000"}, exitUsage, "one frequency or two"},
		{"missing spec file", []string{"design", "--spec", "/nonexistent/spec.json", "--rate", "48000"}, exitFail, "/nonexistent/spec.json"},
		{"missing wav", []string{"design", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "100", "--rate-of", "/nonexistent.wav"}, exitFail, "/nonexistent.wav"},
		{"bad plot name", []string{"design", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "100", "--rate", "8000", "--plot", "x.gif"}, exitUsage, ".svg or .png"},
		{"unknown command", []string{"frobnicate"}, exitUsage, "unknown command"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCmd(t, c.args...)
			if code != c.code {
				t.Errorf("exit %d, want %d; stderr %s", code, c.code, errs)
			}
			if !strings.Contains(errs, c.want) {
				t.Errorf("stderr %q lacks %q", errs, c.want)
			}
			if out != "" {
				t.Errorf("stdout not empty on error: %q", out)
			}
		})
	}
}

func TestHelp(t *testing.T) {
	for _, args := range [][]string{{"--help"}, {"design", "--help"}, {"design", "-h"}} {
		code, out, _ := runCmd(t, args...)
		if code != exitOK || !strings.Contains(out, "Usage:") {
			t.Errorf("%v: exit %d, output %q", args, code, out)
		}
	}
	_, out, _ := runCmd(t, "design", "--help")
	if !strings.Contains(out, "2N poles") || !strings.Contains(out, "Examples:") {
		t.Errorf("design help lacks the band-order note or examples")
	}
}
