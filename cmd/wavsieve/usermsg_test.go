package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestUserMessage(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"leading", "design: unsupported weighting curve \"B\"", "unsupported weighting curve \"B\""},
		{"after a file", "in.wav: process: no channel 3 (counted from 1)", "in.wav: no channel 3 (counted from 1)"},
		{"two in a row", "verify: verify: input and output are not one run", "input and output are not one run"},
		{"after a wrapping", "x: at this file's 8000 Hz rate: design: invalid spec: y", "x: at this file's 8000 Hz rate: invalid spec: y"},
		{"left alone", "a.wav: the spec's design: fine", "a.wav: the spec's design: fine"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := userMessage(c.in); got != c.want {
				t.Errorf("userMessage(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

// TestMessagesWithoutLibraryPrefixes: messages a user sees name the file
// and the problem without the libraries' "design: ", "process: ",
// "verify: " or "wavio: " prefixes.
func TestMessagesWithoutLibraryPrefixes(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "wb.json")
	if err := os.WriteFile(spec, []byte(`{"family": "weighting", "curve": "B"}`), 0o644); err != nil {
		t.Fatal(err)
	}
	a, b := filepath.Join(dir, "a.wav"), filepath.Join(dir, "b.wav")
	writeNoiseWAV(t, a, 8000, 2, 1, 1)
	writeNoiseWAV(t, b, 16000, 2, 1, 2)
	lp := []string{"--family", "butterworth", "--response", "lowpass", "--order", "2", "--cutoff", "500"}
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"design, bad curve in a spec file", []string{"design", "--spec", spec, "--rate", "48000"}, exitFail, "wavsieve design: " + spec + ": unsupported weighting curve"},
		{"verify, not one run", append([]string{"verify", "--input", a, "--output", b}, lp...), exitFail, "wavsieve verify: input and output are not one run"},
		{"apply, channel past the last", append([]string{"apply", "--channels", "3", "--output", filepath.Join(dir, "o")}, append(lp, a)...), exitFail, "wavsieve apply: " + a + ": no channel 3"},
		{"weighting with zero phase", []string{"design", "--weighting", "A", "--zero-phase", "--rate", "48000"}, exitFail, "wavsieve design: invalid spec: the A weighting"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stderr %q; want %d and %q", code, errs, c.code, c.want)
			}
			for _, p := range libPrefixes {
				if strings.Contains(errs, ": "+p) {
					t.Errorf("stderr %q shows the library prefix %q", errs, p)
				}
			}
		})
	}
}
