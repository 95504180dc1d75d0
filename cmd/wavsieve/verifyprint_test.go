package main

import (
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
