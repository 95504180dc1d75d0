package design

import (
	"context"
	"errors"
	"strings"
	"testing"
)

// TestParseSpecBOM: a spec file that starts with a UTF-8 byte-order mark
// (RFC 8259, section 8.1 lets a parser ignore it) reads as without it.
func TestParseSpecBOM(t *testing.T) {
	body := `{"family":"butterworth","response":"lowpass","order":4,"cutoff_hz":1000}`
	plain, err := ParseSpec([]byte(body))
	if err != nil {
		t.Fatal(err)
	}
	bom, err := ParseSpec(append([]byte("\xEF\xBB\xBF"), body...))
	if err != nil {
		t.Fatalf("with a BOM: %v", err)
	}
	if len(bom.Stages) != 1 || bom.Stages[0].Order != plain.Stages[0].Order || bom.Stages[0].CutoffHz[0] != 1000 {
		t.Fatalf("with a BOM: %+v", bom)
	}
}

// TestSpecLimits: an oversized spec, too many stages and too many
// sections are refused with messages naming the limit.
func TestSpecLimits(t *testing.T) {
	stage := `{"family":"butterworth","response":"lowpass","order":2,"cutoff_hz":1000}`
	stages := func(n int) string {
		return `{"stages":[` + strings.TrimSuffix(strings.Repeat(stage+",", n), ",") + `]}`
	}
	comb := Stage{Family: Notch, FundamentalHz: 10, BandwidthHz: 1, Harmonics: 2000} // 2000 below Nyquist at 48 kHz
	for _, tc := range []struct {
		name string
		run  func() error
		want string
	}{
		{"file size", func() error { _, err := ParseSpec([]byte(strings.Repeat(" ", MaxSpecBytes+1))); return err }, "limit of"},
		{"stages in the file", func() error { _, err := ParseSpec([]byte(stages(MaxStages + 1))); return err }, "stages, more than the limit"},
		{"stages at design", func() error {
			s, err := ParseSpec([]byte(stages(MaxStages)))
			if err != nil {
				return err
			}
			s.Stages = append(s.Stages, s.Stages[0])
			_, err = Design(s, 48000)
			return err
		}, "stages, more than the limit"},
		{"sections", func() error {
			_, err := Design(Spec{Stages: []Stage{comb}}, 48000)
			return err
		}, "notches below the Nyquist"},
		{"sections of several combs", func() error {
			c := comb
			c.Harmonics = 1000
			_, err := Design(Spec{Stages: []Stage{c, c, c}}, 48000)
			return err
		}, "more than the limit of 2048"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.run()
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
	if _, err := ParseSpec([]byte(stages(MaxStages))); err != nil {
		t.Fatalf("%d stages refused: %v", MaxStages, err)
	}
}

// TestCheckSpec: the rate-free check refuses what fails at every rate
// and lets through what only some rates refuse.
func TestCheckSpec(t *testing.T) {
	lp := func(order int, hz float64) Spec {
		return Spec{Stages: []Stage{{Family: Butterworth, Response: Lowpass, Order: order, CutoffHz: Edges{hz}}}}
	}
	for _, tc := range []struct {
		name string
		spec Spec
		ok   bool
	}{
		{"order 99", lp(99, 1000), false},
		{"no family", Spec{Stages: []Stage{{Response: Lowpass, Order: 2, CutoffHz: Edges{10}}}}, false},
		{"negative edge", lp(2, -5), false},
		{"edge above most rates", lp(2, 1e6), true},
		{"plain", lp(4, 1000), true},
		{"notch", Spec{Stages: []Stage{{Family: Notch, FundamentalHz: 50, BandwidthHz: 1}}}, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if err := CheckSpec(tc.spec); (err == nil) != tc.ok {
				t.Fatalf("CheckSpec: %v, want ok %v", err, tc.ok)
			}
		})
	}
}

// TestDesignContextCancelled: a cancelled context stops the design with
// its error.
func TestDesignContextCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	spec := Spec{Stages: []Stage{{Family: Notch, FundamentalHz: 50, BandwidthHz: 1}}}
	if _, err := DesignContext(ctx, spec, 48000); !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	if _, err := DesignContext(context.Background(), spec, 48000); err != nil {
		t.Fatal(err)
	}
}
