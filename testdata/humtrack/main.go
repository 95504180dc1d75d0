// Command humtrack is the goal run of the tracking notch: it synthesises
// the two invented 60 s recordings of package humscene at 48 kHz (the
// Reedmere pump hum that wanders and moves 1 Hz in 2 s; the Calder Fold
// generator set that sags from 60 to 58.8 Hz and back in ramps of 1 to
// 3 s), filters each file and its polarity-reversed twin with the
// tracking notch (causal and zero phase) and with fixed combs (the
// survey's suggestion, and 0.5 Hz notches at the mean fundamental), and
// prints the twin-polarity figures side by side.
//
//	go run ./testdata/humtrack [-seconds 60] [-rate 48000] [-wav DIR] [-measure=false]
//
// With -wav it also writes each scene (hum + wanted sound) as a 32-bit
// float WAV file into DIR, for trying the command line on it.
package main

import (
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/humscene"
)

func main() {
	secs := flag.Float64("seconds", 60, "length of each recording")
	rate := flag.Float64("rate", 48000, "sample rate in Hz")
	wavDir := flag.String("wav", "", "also write the scenes as WAV files into this `folder`")
	measure := flag.Bool("measure", true, "filter and measure (false: only write the WAV files)")
	flag.Parse()
	if err := run(*secs, *rate, *wavDir, *measure); err != nil {
		fmt.Fprintln(os.Stderr, "humtrack:", err)
		os.Exit(1)
	}
}

type filterCase struct {
	name string
	spec design.Spec
}

func run(secs, rate float64, wavDir string, measure bool) error {
	dir, err := os.MkdirTemp("", "humtrack-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	if wavDir != "" {
		if err := os.MkdirAll(wavDir, 0o755); err != nil {
			return err
		}
	}
	for _, s := range []*humscene.Scene{humscene.Reedmere(rate, secs, 1), humscene.CalderFold(rate, secs, 2)} {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, f := range s.Freq {
			lo, hi = math.Min(lo, f), math.Max(hi, f)
		}
		fmt.Printf("\n## %s: %g s at %g Hz, true fundamental %.3f-%.3f Hz, %d harmonics\n\n", s.Name, secs, rate, lo, hi, s.Harmonics)
		if wavDir != "" {
			if err := writeFloat32(filepath.Join(wavDir, s.Name+".wav"), s.Mix(1), rate); err != nil {
				return err
			}
		}
		if !measure {
			continue
		}
		cases := []filterCase{}
		for _, zp := range []bool{false, true} {
			cases = append(cases, filterCase{"tracking 0.5 Hz" + pick(zp, ", zero phase", ""),
				design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: s.Nominal, Harmonics: s.Harmonics, BandwidthHz: 0.5, Tracking: true}}, ZeroPhase: zp}})
		}
		// The survey's suggested fixed comb, on the file itself.
		sv, err := analyze.NewSurveyor(analyze.SurveyOptions{SampleRate: rate, Channels: 1, Frames: int64(len(s.Hum))})
		if err != nil {
			return err
		}
		sv.Write(s.Mix(1))
		res := sv.Result()
		mean := (lo + hi) / 2
		for _, st := range specStages(res) {
			if st.Family == design.Notch {
				st.Harmonics = s.Harmonics
				cases = append(cases, filterCase{fmt.Sprintf("fixed, survey's q %g at %.3f Hz", st.Q, st.FundamentalHz), design.Spec{Stages: []design.Stage{st}}})
				mean = st.FundamentalHz
			}
		}
		cases = append(cases, filterCase{fmt.Sprintf("fixed 0.5 Hz at %.3f Hz", mean),
			design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: mean, Harmonics: s.Harmonics, BandwidthHz: 0.5}}}})
		fmt.Printf("| filter | worst 1 s block, dB less hum at harmonics 1..%d | median | passband change (>= 3 Hz from the hum) | worst 10 ms residual re hum RMS | output - clean above 8 kHz | time of one file |\n|---|---|---|---|---|---|---|\n", s.Harmonics)
		for _, c := range cases {
			rec := &humscene.Recorder{}
			start := time.Now()
			yp, _, err := humscene.Filter(dir, "plus", s.Mix(1), rate, c.spec, rec.New)
			if err != nil {
				return fmt.Errorf("%s: %w", c.name, err)
			}
			took := time.Since(start)
			ym, _, err := humscene.Filter(dir, "minus", s.Mix(-1), rate, c.spec, rec.Replay)
			if err != nil {
				return fmt.Errorf("%s: %w", c.name, err)
			}
			r, err := humscene.Measure(s, yp, ym, s.Harmonics)
			if err != nil {
				return err
			}
			fmt.Printf("| %s | %s | %s | %+.3f dB at %.1f Hz | %.1f dB at %.2f s | %.1f dBFS | %.2f s |\n", c.name, list(r.Worst), list(r.Median), r.PassbandDB, r.PassbandAt, r.ClickDB, r.ClickAtS, r.HighDBFS, took.Seconds())
			if len(r.Excluded) > 0 {
				fmt.Printf("  calls near a harmonic: %s\n", strings.Join(r.Excluded, "; "))
			}
		}
	}
	return nil
}

func specStages(sv *analyze.Survey) []design.Stage {
	if sv.Spec == nil {
		return nil
	}
	return sv.Spec.Stages
}

func list(v []float64) string {
	var b strings.Builder
	for i, x := range v {
		if i > 0 {
			b.WriteString(" ")
		}
		fmt.Fprintf(&b, "%.0f", x)
	}
	return b.String()
}

func pick(c bool, a, b string) string {
	if c {
		return a
	}
	return b
}

// writeFloat32 writes a mono 32-bit float WAV file.
func writeFloat32(name string, x []float64, rate float64) error {
	return humscene.WriteWAV(name, x, rate, 32)
}
