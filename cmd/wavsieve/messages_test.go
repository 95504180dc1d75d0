package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMessages runs each case a user is known to trip on and checks that
// the message names the problem and what to do, and the exit code.
func TestMessages(t *testing.T) {
	dir := t.TempDir()
	north := "../../samples/reedmere-north-48k.wav"
	south := "../../samples/reedmere-south-44k1.wav"
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	wrongType := write("wrong-type.json", "{\"family\": \"butterworth\", \"response\": \"lowpass\",\n \"order\": 2, \"cutoff_hz\": 100,\n \"zero_phase\": \"yes\"}\n")
	trailing := write("trailing.json", "{\"stages\": [\n  {\"family\": \"notch\", \"fundamental_hz\": 50, \"bandwidth_hz\": 1},\n]}\n")
	bom := write("bom.json", "\xEF\xBB\xBF{\"family\": \"butterworth\", \"response\": \"lowpass\", \"order\": 2, \"cutoff_hz\": 100}")
	lp := []string{"--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "500"}
	folder := filepath.Join(dir, "afolder")
	os.Mkdir(folder, 0o755)
	with := func(a []string, b ...string) []string { return append(append([]string{}, a...), b...) }

	const missing = "nosuch.wav: no such file or folder; check the path"
	cases := []struct {
		name string
		args []string
		code int
		want []string // each must appear in stderr
		not  []string // none may appear in stderr
	}{
		{"apply missing input", with(append([]string{"apply"}, lp...), "--output", filepath.Join(dir, "o1"), "nosuch.wav"), exitFail, []string{missing}, []string{"stat", "directory"}},
		{"survey missing input", []string{"survey", "nosuch.wav"}, exitFail, []string{missing}, nil},
		{"spectrum missing input", []string{"spectrum", "nosuch.wav"}, exitFail, []string{missing}, []string{"open "}},
		{"design missing rate file", with(append([]string{"design"}, lp...), "--rate-of", "nosuch.wav"), exitFail, []string{missing}, nil},
		{"verify missing input", with(append([]string{"verify", "--probe"}, lp...), "--input", "nosuch.wav"), exitFail, []string{missing}, nil},
		{"missing spec file", []string{"design", "--spec", "nosuch.json", "--rate", "48000"}, exitFail, []string{"nosuch.json: no such file or folder; check the path"}, nil},
		{"spec of the wrong type", []string{"design", "--spec", wrongType, "--rate", "48000"}, exitFail,
			[]string{wrongType + ":3:16: ", `"zero_phase" must be true or false, not a string ("yes")`}, []string{"Go struct"}},
		{"spec with a trailing comma", []string{"design", "--spec", trailing, "--rate", "48000"}, exitFail,
			[]string{trailing + ":3:1: ", "invalid character ']'", "comma"}, nil},
		{"spec with a byte-order mark", []string{"design", "--spec", bom, "--rate", "48000"}, exitOK, nil, nil},
		{"cutoff above nyquist from a flag", []string{"design", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "30000", "--rate", "48000"}, exitUsage,
			[]string{"--cutoff 30000 Hz is at or above the Nyquist frequency 24000 Hz"}, []string{"design: design:", "cutoff_hz"}},
		{"a flag's edge above one file's nyquist", []string{"apply", "--family", "elliptic", "--response", "lowpass", "--passband", "7000", "--stopband", "8000", "--ripple", "0.1", "--attenuation", "80", "--output", filepath.Join(dir, "o3"), "../../samples/pumphouse-vibration-12800.wav"}, exitFail,
			[]string{"at this file's 12800 Hz rate: --passband 7000 Hz is at or above the Nyquist frequency 6400 Hz"}, []string{"passband_hz"}},
		{"verify probe with a flag's edge above nyquist", []string{"verify", "--probe", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "30000", "--rate", "48000"}, exitUsage,
			[]string{"--cutoff 30000 Hz is at or above the Nyquist frequency 24000 Hz"}, []string{"cutoff_hz"}},
		{"cutoff without order", []string{"design", "--family", "butterworth", "--response", "lowpass", "--cutoff", "500", "--rate", "48000"}, exitUsage,
			[]string{"--cutoff needs --order", "--passband, --stopband"}, []string{"invalid order 0"}},
		{"channel past the last", with(append([]string{"apply"}, lp...), "--channels", "3", "--output", filepath.Join(dir, "o2"), north), exitFail,
			[]string{"no channel 3 (counted from 1): the data has 2 channels"}, []string{"channel 2"}},
		{"wav output name for two inputs", with(append([]string{"apply"}, lp...), "--output", filepath.Join(dir, "x.wav"), north, south), exitUsage,
			[]string{"names a file, but these inputs need an output folder"}, nil},
		{"output to standard output", with(append([]string{"apply"}, lp...), "--output", "-", north), exitUsage,
			[]string{"--output -: apply writes WAV files, not standard output"}, nil},
		{"report into a folder", []string{"report", "--from", "x.json", "--output", folder}, exitUsage,
			[]string{"is a folder; give the report's file name"}, []string{"file exists"}},
		{"spec written onto a folder", []string{"survey", "--write-spec", folder, "../../samples/pumphouse-vibration-12800.wav"}, exitFail,
			[]string{"afolder is a folder; give the name of a file to write"}, []string{"file exists"}},
		{"negative overlap", []string{"spectrum", "--overlap", "-1", north}, exitUsage,
			[]string{"--overlap -1: give 0 or more samples"}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := runCmd(t, c.args...)
			if code != c.code {
				t.Errorf("exit %d, want %d; stderr:\n%s", code, c.code, errs)
			}
			for _, w := range c.want {
				if !strings.Contains(errs, w) {
					t.Errorf("stderr lacks %q:\n%s", w, errs)
				}
			}
			for _, n := range c.not {
				if strings.Contains(errs, n) {
					t.Errorf("stderr has %q:\n%s", n, errs)
				}
			}
		})
	}
	// Nothing was created by the refused outputs.
	for _, p := range []string{filepath.Join(dir, "x.wav"), "-"} {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("%s was created", p)
		}
	}
	// The help shows the default of --overlap once, in words.
	_, out, _ := runCmd(t, "spectrum", "--help")
	if strings.Contains(out, "(default -1)") || !strings.Contains(out, "(default: half the segment)") {
		t.Errorf("spectrum --help on --overlap:\n%s", out)
	}
}

// TestSkipNamesReplace: a second identical run skips the file and says
// which flag redoes it.
func TestSkipNamesReplace(t *testing.T) {
	out := filepath.Join(t.TempDir(), "o")
	args := []string{"apply", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "500", "--output", out, "../../samples/pumphouse-vibration-12800.wav"}
	if code, _, errs := runCmd(t, args...); code != exitOK {
		t.Fatalf("first run: exit %d: %s", code, errs)
	}
	code, _, errs := runCmd(t, args...)
	if code != exitOK || !strings.Contains(errs, "skipped") || !strings.Contains(errs, "--replace") {
		t.Errorf("second run: exit %d, stderr:\n%s", code, errs)
	}
}

// TestReportToStdout: --output - writes the page on stdout and no file
// named "-".
func TestReportToStdout(t *testing.T) {
	dir := t.TempDir()
	code, doc, errs := runCmd(t, "survey", "--json", "../../samples/pumphouse-vibration-12800.wav")
	if code != exitOK {
		t.Fatalf("survey: exit %d: %s", code, errs)
	}
	from := filepath.Join(dir, "survey.json")
	if err := os.WriteFile(from, []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "report", "--from", from, "--output", "-")
	if code != exitOK || !strings.HasPrefix(out, "<!DOCTYPE html>") || !strings.Contains(out, "</html>") {
		t.Fatalf("exit %d, %d bytes on stdout starting %.40q; stderr %s", code, len(out), out, errs)
	}
	if _, err := os.Stat("-"); err == nil {
		t.Error("a file named - was written")
	}
}

// TestDryRunNamesTheFlag: the dry run says which flag's value a file's
// rate cannot take, as the run itself does.
func TestDryRunNamesTheFlag(t *testing.T) {
	code, out, _ := runCmd(t, "apply", "--dry-run", "--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "7000",
		"--output", filepath.Join(t.TempDir(), "o"), "../../samples/pumphouse-vibration-12800.wav")
	if code != exitFail || !strings.Contains(out, "would fail: ") || !strings.Contains(out, "--cutoff 7000 Hz is at or above the Nyquist frequency 6400 Hz") || strings.Contains(out, "cutoff_hz") {
		t.Errorf("exit %d, stdout:\n%s", code, out)
	}
}
