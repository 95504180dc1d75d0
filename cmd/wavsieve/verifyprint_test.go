package main

import (
	"strings"
	"testing"

	"github.com/wavsieve/wavsieve/analyze/verify"
)

// TestOpenChecksWording: the verdict line names mask rows as mask checks,
// not as edges, cutoffs or notches, and counts only decisive checks that
// did not pass.
func TestOpenChecksWording(t *testing.T) {
	cases := []struct {
		name   string
		checks []verify.Check
		open   int
		what   string
	}{
		{"edges only", []verify.Check{{Kind: verify.KindMask, Verdict: verify.Pass}, {Kind: "stopband-edge", Verdict: verify.Unmeasurable}}, 1, "edge, cutoff or notch"},
		{"a mask row open", []verify.Check{{Kind: verify.KindMask, Verdict: verify.Unmeasurable}, {Kind: "cutoff", Verdict: verify.Pass}}, 1, "edge, cutoff, notch or mask"},
		{"inside-band points do not count", []verify.Check{{Kind: "passband", Verdict: verify.Unmeasurable}}, 0, "edge, cutoff or notch"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			open, what := openChecks(c.checks)
			if open != c.open || what != c.what {
				t.Errorf("openChecks = %d, %q; want %d, %q", open, what, c.open, c.what)
			}
		})
	}
}

// TestVerdictLineCount: the verdict line says "1 ... check", "2 ...
// checks".
func TestVerdictLineCount(t *testing.T) {
	cases := []struct {
		name string
		open int
		want string
	}{
		{"one", 1, "; 1 edge, cutoff or notch check not shown to pass)"},
		{"two", 2, "; 2 edge, cutoff or notch checks not shown to pass)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := &verify.Result{Method: "recording", SampleRate: 8000, Channels: []int{1}, Window: "blackman-harris", ConfidenceLevel: 0.99}
			r.Checks = append(r.Checks, verify.Check{Channel: 1, Stage: 1, Kind: "passband", Verdict: verify.Pass})
			for i := 0; i < c.open; i++ {
				r.Checks = append(r.Checks, verify.Check{Channel: 1, Stage: 1, Kind: "cutoff", Verdict: verify.Unmeasurable})
			}
			r.Finish()
			var b strings.Builder
			printVerify(&b, r)
			if !strings.Contains(b.String(), c.want) {
				t.Errorf("verdict line lacks %q:\n%s", c.want, b.String())
			}
		})
	}
}

// TestProbeAtRateHeading: a probe given --rate and no --input is named by
// the format it stands for, not as "the format of probe at 8000 Hz".
func TestProbeAtRateHeading(t *testing.T) {
	code, out, errs := runCmd(t, append([]string{"verify", "--probe", "--rate", "8000"}, lowpassSpec...)...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	want := "Verify tone probe in the format of 8000 Hz, 1 ch, 24-bit pcm (--rate): a steady tone at each check frequency"
	if !strings.Contains(out, want) {
		t.Errorf("heading lacks %q:\n%s", want, out)
	}
}
