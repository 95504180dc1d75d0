package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const designHelp = `Design a filter from a spec at one sample rate, and report it.

Usage:
  wavsieve design (--spec <file> | --family <name> ...) (--rate <Hz> | --rate-of <file.wav>) [flags]

The spec is rate-free, in Hz and dB: give it as a JSON spec file, or with
the flags below. The rate comes from --rate, or from the header of a WAV
file with --rate-of. Every critical frequency is pre-warped, so the digital
filter's edges fall exactly on the requested Hz; an edge at or above the
Nyquist frequency is an error, never clamped.

Order form: --order N and --cutoff (one frequency, or lo,hi for a band).
The cutoff is the -3 dB point for Butterworth, the passband edge for
Chebyshev I and elliptic, the stopband edge for Chebyshev II, and for
Bessel as --bessel-norm says. Tolerance form: --passband, --stopband,
--ripple and --attenuation, and the minimum order is computed; the
passband edges are then met exactly, with the margin at the stopband.
A bandpass or bandstop of order N has 2N poles.

--weighting CURVE adds a standard weighting after the other stages (A, C,
Z of IEC 61672-1; Wb ... Wm of ISO 8041-1), alone or chained. For it the
report gives its deviation from the analog definition and from the
standard's table, and the class it meets and up to which frequency;
--plot draws it inside the standard's tolerance band. A weighted level
from a file is not a sound level meter's reading: the microphone and its
calibration are unknown to wavsieve ('wavsieve help weighting').

The report gives each stage's family, response, order and sections, the
designed response at each edge against the spec with its margin, the
-3 dB points, the passband group delay, the largest pole radius and the
time for a transient to decay by 60 dB. With --zero-phase the response
reported and met is that of the forward-backward run (twice the dB).

Examples:
  # an order-4 Butterworth high-pass at 20 Hz for a 48 kHz file
  wavsieve design --family butterworth --response highpass --order 4 --cutoff 20 --rate 48000

  # the smallest elliptic low-pass with 0.1 dB ripple to 3 kHz and 80 dB from 3.4 kHz
  wavsieve design --family elliptic --response lowpass --passband 3000 --stopband 3400 \
      --ripple 0.1 --attenuation 80 --rate-of field.wav --plot design.svg

  # A-weighting at 44.1 kHz, with its class 1 check and plot
  wavsieve design --weighting A --rate 44100 --plot a-weighting.svg

  # a spec file with a rumble high-pass and hum notches, as JSON
  wavsieve design --spec samples/specs/rumble-and-hum.json --rate 44100 --json

Flags:
`

type designResult struct {
	SampleRate float64      `json:"sample_rate_hz"`
	ZeroPhase  bool         `json:"zero_phase"`
	Stages     []stageJSON  `json:"stages"`
	Sections   [][6]float64 `json:"sections"`
	Summary    *summaryJSON `json:"summary,omitempty"`
	Source     string       `json:"rate_source,omitempty"`
}

type stageJSON struct {
	Family    string       `json:"family"`
	Response  string       `json:"response,omitempty"`
	Form      string       `json:"form"`
	Order     int          `json:"order"`
	Zeros     [][2]float64 `json:"zeros"`
	Poles     [][2]float64 `json:"poles"`
	Gain      float64      `json:"gain"`
	Sections  [][6]float64 `json:"sections"`
	EdgesHz   []float64    `json:"design_edges_hz"`
	ExactEdge string       `json:"exact_edge,omitempty"`
	NotchHz   []float64    `json:"notch_hz,omitempty"`
	Checks    []checkJSON  `json:"checks"`
	Spec      design.Stage `json:"spec"`

	Weighting *weightingJSON `json:"weighting,omitempty"`
	Mask      []maskJSON     `json:"mask,omitempty"`
}

type checkJSON struct {
	FrequencyHz float64  `json:"frequency_hz"`
	Kind        string   `json:"kind"`
	DesignedDB  float64  `json:"designed_db"`
	LimitDB     *float64 `json:"limit_db"`
	MarginDB    *float64 `json:"margin_db"`
	Exact       bool     `json:"exact"`
}

type summaryJSON struct {
	ThreeDBHz        []float64 `json:"minus_3db_hz"`
	GroupDelayMinS   float64   `json:"passband_group_delay_min_s"`
	GroupDelayMaxS   float64   `json:"passband_group_delay_max_s"`
	MaxPoleRadius    float64   `json:"max_pole_radius"`
	Decay60dBSamples int       `json:"decay_60db_samples"`
	Decay60dBS       float64   `json:"decay_60db_s"`
}

func runDesign(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("design", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	var sf specFlags
	sf.register(fs)
	rate := fs.Float64("rate", 0, "sample rate in `Hz`")
	rateOf := fs.String("rate-of", "", "take the sample rate from the header of this WAV `file`")
	asJSON := fs.Bool("json", false, "print the design as one JSON document on stdout")
	plot := fs.String("plot", "", "draw magnitude, phase, group delay and the pole/zero diagram to this `file` (.svg or .png)")
	help := fs.BoolP("help", "h", false, "show this help")
	if code, done := parseOrHelp(fs, args, "design", designHelp, help, stdout, stderr); done {
		return code
	}
	if fs.NArg() > 0 {
		return report(stderr, "design", usagef("unexpected argument %q", fs.Arg(0)), "")
	}
	spec, err := sf.spec(fs)
	if err != nil {
		return report(stderr, "design", err, "")
	}
	source := ""
	switch {
	case *rateOf != "" && fs.Changed("rate"):
		return report(stderr, "design", usagef("give --rate or --rate-of, not both"), "")
	case *rateOf != "":
		r, err := wavio.Open(*rateOf, nil)
		if err != nil {
			return report(stderr, "design", fmt.Errorf("%s: %w", *rateOf, err), "--rate-of needs a readable WAV file; or give the rate with --rate")
		}
		*rate = float64(r.Format().SampleRate)
		r.Close()
		source = *rateOf
	case !fs.Changed("rate"):
		return report(stderr, "design", usagef("no sample rate: give --rate HZ or --rate-of FILE.wav"), "")
	}
	// From here on Ctrl-C and SIGTERM stop the design between stages and
	// before the plot is written; a second one ends the process at once.
	ctx, stop := signalContext()
	defer stop()
	f, err := design.DesignContext(ctx, spec, *rate)
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "wavsieve design: interrupted; nothing was written")
		return exitFail
	}
	if err != nil {
		return report(stderr, "design", sf.valueError(err), designHint(err))
	}
	for _, w := range f.Warnings() {
		fmt.Fprintf(stderr, "wavsieve design: warning: %s\n", w)
	}
	if *plot != "" {
		if err := writePlot(ctx, *plot, f); err != nil {
			if ctx.Err() != nil {
				fmt.Fprintln(stderr, "wavsieve design: interrupted; nothing was written")
				return exitFail
			}
			return report(stderr, "design", err, "")
		}
	}
	res := designDocument(f, source)
	if *asJSON {
		if err := writeJSON(stdout, res, true); err != nil {
			return report(stderr, "design", err, "")
		}
		return exitOK
	}
	printDesign(stdout, f, res)
	if *plot != "" {
		fmt.Fprintf(stdout, "plot written to %s\n", *plot)
	}
	return exitOK
}

func designHint(err error) string {
	switch design.KindOf(err) {
	case design.ErrAboveNyquist:
		return "every edge must lie below half the sample rate of the file it is applied to"
	case design.ErrOrderLimit:
		return "a wider transition band lowers the order fastest"
	}
	return ""
}

// writePlot renders the plot to a temporary file beside name and renames
// it into place, so a failed render leaves nothing behind.
func writePlot(ctx context.Context, name string, f *design.Filter) error {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(name), "."))
	if ext != "svg" && ext != "png" {
		return usagef("--plot %s: the file name must end in .svg or .png", name)
	}
	var buf bytes.Buffer
	if err := plots.Design(f, &buf, ext, plots.DesignOptions{}); err != nil {
		return err
	}
	// Drawing a large design takes seconds: a Ctrl-C meanwhile writes
	// nothing.
	if err := ctx.Err(); err != nil {
		return err
	}
	return writeFileAtomic(name, buf.Bytes())
}

// writeFileAtomic writes data to a temporary file in name's folder, syncs
// it and renames it to name.
func writeFileAtomic(name string, data []byte) error {
	if isDir(name) {
		return fmt.Errorf("%s is a folder; give the name of a file to write (in that folder or elsewhere)", name)
	}
	dir := filepath.Dir(name)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	// A locked temporary file that a later run recognises and removes if
	// this one is killed before the rename.
	tmp, err := wavio.CreateTemp(dir, filepath.Base(name))
	if err != nil {
		return err
	}
	_, werr := tmp.Write(data)
	if werr == nil {
		werr = tmp.Chmod(0o644)
	}
	if werr == nil {
		werr = tmp.Sync()
	}
	cerr := tmp.Close()
	if werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Rename(tmp.Name(), name)
	}
	if werr != nil {
		os.Remove(tmp.Name())
		return werr
	}
	return nil
}

func roots(r []complex128) [][2]float64 {
	out := make([][2]float64, len(r))
	for i, v := range r {
		out[i] = [2]float64{real(v), imag(v)}
	}
	return out
}

func sections(s []design.Section) [][6]float64 {
	out := make([][6]float64, len(s))
	for i, v := range s {
		out[i] = v
	}
	return out
}

func designDocument(f *design.Filter, source string) designResult {
	res := designResult{SampleRate: f.SampleRate, ZeroPhase: f.ZeroPhase, Sections: sections(f.Sections()), Source: source}
	for _, st := range f.Stages {
		sj := stageJSON{
			Family: st.Family, Response: st.Response, Form: st.Form, Order: st.Order,
			Zeros: roots(st.ZPK.Zeros), Poles: roots(st.ZPK.Poles), Gain: st.ZPK.Gain,
			Sections: sections(st.Sections), EdgesHz: st.EdgesHz, ExactEdge: st.ExactEdge,
			NotchHz: st.NotchHz, Spec: st.Spec, Checks: []checkJSON{},
		}
		for _, c := range st.Checks {
			cj := checkJSON{FrequencyHz: c.FrequencyHz, Kind: c.Kind, DesignedDB: c.DesignedDB, Exact: c.Exact}
			if c.HasLimit {
				l, m := c.LimitDB, c.MarginDB
				cj.LimitDB, cj.MarginDB = &l, &m
			}
			sj.Checks = append(sj.Checks, cj)
		}
		sj.Weighting, sj.Mask = weightingDocument(f, st)
		if sj.Mask == nil {
			sj.Mask = maskRows(f, st)
		}
		res.Stages = append(res.Stages, sj)
	}
	lo, hi := f.PassbandGroupDelay()
	d := f.DecaySamples(60, 0)
	res.Summary = &summaryJSON{
		ThreeDBHz: f.ThreeDBPointsHz(), GroupDelayMinS: finite(lo), GroupDelayMaxS: finite(hi),
		MaxPoleRadius: f.MaxPoleRadius(), Decay60dBSamples: d, Decay60dBS: float64(d) / f.SampleRate,
	}
	if res.Summary.ThreeDBHz == nil {
		res.Summary.ThreeDBHz = []float64{}
	}
	return res
}

func finite(v float64) float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0
	}
	return v
}

func printDesign(w io.Writer, f *design.Filter, res designResult) {
	mode := "causal"
	if f.ZeroPhase {
		mode = "zero-phase (forward-backward: responses below are the effective, squared ones)"
	}
	fmt.Fprintf(w, "Design at %g Hz, %s\n", f.SampleRate, mode)
	for i, st := range f.Stages {
		what := st.Family
		if st.Response != "" {
			what += " " + st.Response
		}
		switch st.Form {
		case design.FormStandard:
			if st.Weighting != nil {
				printWeighting(w, f, i, st)
			} else {
				printBandStage(w, f, i, st)
			}
			continue
		case design.FormTolerance:
			fmt.Fprintf(w, "\nStage %d: %s, order %d (the minimum for the tolerances), %d sections, %d poles\n", i+1, what, st.Order, len(st.Sections), len(st.ZPK.Poles))
			fmt.Fprintf(w, "  the %s edges are met exactly; the margin is at the stopband\n", st.ExactEdge)
		case design.FormNotch:
			fmt.Fprintf(w, "\nStage %d: %d hum notches from %s Hz, %d sections\n", i+1, st.Order, fmtHz(st.NotchHz[0]), len(st.Sections))
			fmt.Fprintf(w, "  centres (Hz): %s\n", joinHz(st.NotchHz, 12))
		default:
			fmt.Fprintf(w, "\nStage %d: %s, order %d, %d sections, %d poles\n", i+1, what, st.Order, len(st.Sections), len(st.ZPK.Poles))
		}
		if len(st.Checks) > 0 {
			fmt.Fprintf(w, "  %-12s %-11s %12s %12s %12s\n", "at (Hz)", "edge", "designed dB", "spec dB", "margin dB")
			shown := st.Checks
			if len(shown) > 12 {
				shown = shown[:12]
			}
			for _, c := range shown {
				lim, mar := "-", "-"
				if c.HasLimit {
					lim = fmt.Sprintf("%.4f", c.LimitDB)
					m := c.MarginDB
					if math.Abs(m) < 5e-5 {
						m = 0 // no "-0.0000" for an edge met exactly
					}
					mar = fmt.Sprintf("%+.4f", m)
				}
				fmt.Fprintf(w, "  %-12s %-11s %12.4f %12s %12s\n", fmtHz(c.FrequencyHz), c.Kind, c.DesignedDB, lim, mar)
			}
			if len(st.Checks) > len(shown) {
				fmt.Fprintf(w, "  ... %d more edges in --json\n", len(st.Checks)-len(shown))
			}
		}
	}
	s := res.Summary
	fmt.Fprintf(w, "\nWhole chain: %d sections\n", len(res.Sections))
	if len(s.ThreeDBHz) > 0 {
		fmt.Fprintf(w, "  -3 dB at (Hz):          %s\n", joinHz(s.ThreeDBHz, 8))
	}
	if f.ZeroPhase {
		fmt.Fprintf(w, "  group delay:            none (zero-phase); one pass has %.4g to %.4g ms in the passband\n", s.GroupDelayMinS*1e3, s.GroupDelayMaxS*1e3)
	} else {
		fmt.Fprintf(w, "  passband group delay:   %.4g to %.4g ms\n", s.GroupDelayMinS*1e3, s.GroupDelayMaxS*1e3)
	}
	fmt.Fprintf(w, "  largest pole radius:    %.10f (1 - r = %.3g)\n", s.MaxPoleRadius, 1-s.MaxPoleRadius)
	fmt.Fprintf(w, "  60 dB transient decay:  %d samples (%.4g s)\n", s.Decay60dBSamples, s.Decay60dBS)
}

func fmtHz(v float64) string { return fmt.Sprintf("%.6g", v) }

func joinHz(v []float64, maxN int) string {
	var parts []string
	for i, x := range v {
		if i == maxN {
			parts = append(parts, fmt.Sprintf("... (%d in all)", len(v)))
			break
		}
		parts = append(parts, fmtHz(x))
	}
	return strings.Join(parts, ", ")
}
