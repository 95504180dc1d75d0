package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/analyze/verify"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/runrecord"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const verifyHelp = `Measure what a filtering run did, and check it against the spec.

Usage:
  wavsieve verify (--spec <file> | --family <name> ... | --manifest <file>) --input <file> --output <file> [flags]
  wavsieve verify (--spec <file> | --family <name> ...) --probe[=tones|noise] (--input <file> | --rate <Hz>) [flags]

The spec is designed at the file's sample rate, as apply does. Every edge
of the spec is checked at exactly its frequency: each passband_hz,
stopband_hz and cutoff_hz value, each notch centre and the -3 dB points
of each notch, plus points inside the bands (a stage of a standard with a
tolerance mask is checked at each row of its mask instead). At each check
the cross and auto spectra of input and output are read at that exact
frequency (a single-frequency DFT of each Blackman-Harris windowed
segment, averaged over half-overlapped segments), and the transfer H1 =
Pxy/Pxx is compared with the designed response (for --zero-phase the
squared one, twice the dB) and with the spec's limit. The segment length
is chosen per check, so that the design changes by less than 0.5 dB
across the window's main lobe; the interval (99%) covers the response at
the exact frequency, noise and resolution both. The transients at both
ends are skipped.

Verdicts of a check: pass (margin >= 0, from the limit or the design range
that decided it; a reading that agrees with an equiripple design touching
its limit passes with margin 0), fail (the interval lies beyond the limit
or away from the design), or unmeasurable, with the reason and the level:
the recording is too short for the resolution the check needs, the input
at that frequency is at its own quantisation floor or is mostly leakage of
other frequencies through the window's sidelobes, the output expected
there lies below the output's quantisation or dither floor, or the
coherence is too low to read down to the level that decides.

The run is "pass" only when every edge, cutoff and notch check (and every
mask row) was measured and passed, "fail" when any check failed, and
"inconclusive" otherwise.

--probe measures the processing chain instead of a recording: a steady tone
at each check frequency, one at a time, in the rate, channels and sample
format of --input (or --rate, one channel, 24-bit), filtered exactly as
apply would (design, zero-phase with its padding, output format and
dither) in a temporary folder, and read between the transients. Tones
resolve what no recording can (a notch 2 Hz wide, a notch centre 100 dB
down). --probe=noise uses white noise instead. Write the value with "=":
--probe alone means tones.

--manifest takes the spec and the files from the record apply wrote (its
JSON or CSV, or the output folder, whose share records it merges), and
verifies every file it records as done (or only --input's entry); the
paths are as apply recorded them, so run verify from where apply ran.

A tracking notch (--track, or "tracking": true) is read along the hum's
track, measured again in --input as apply measured it: each centre is
demodulated along the track and checked against -30 dB. Give
--track-per-channel when apply filtered with it, so that each channel is
read along its own track, not along one track from all channels;
--manifest takes this from the record.

This is a measurement of the given files or chain,
not a calibrated certification.

Exit codes: 0 pass, 1 fail (or the files could not be measured), 2 usage
error, 3 inconclusive.

Examples:
  # check a filtered recording against its spec
  wavsieve verify --spec samples/specs/rumble-highpass.json \
      --input samples/reedmere-north-48k.wav --output out/reedmere-north-48k.wav

  # every file of an apply run, as JSON
  wavsieve verify --manifest out/clean/wavsieve-manifest.json --json

  # the chain itself, with tones in the recording's format
  wavsieve verify --spec samples/specs/vibration-lowpass-zero-phase.json \
      --probe --input samples/pumphouse-vibration-12800.wav --plot verify.svg

Flags:
`

// verifyDocument is verify's JSON output: the verdict over all files,
// with every check, and each file's result.
type verifyDocument struct {
	Pass    bool             `json:"pass"`
	Verdict string           `json:"verdict"`
	Checks  []verify.Check   `json:"checks"`
	Files   []*verify.Result `json:"files"`
	Note    string           `json:"note"`
}

const verifyNote = "a measurement of these files, not a calibrated certification"

type verifyOpts struct {
	sf        specFlags
	input     string
	output    string
	manifest  string
	probe     string
	rate      int
	channels  string
	sampleFmt string
	noDither  bool
	seed      uint64
	segment   int
	asJSON    bool
	plot      string
	tempDir   string
	// trackPerChannel reads a tracking notch along each channel's own
	// track, as apply --track-per-channel filtered.
	trackPerChannel bool
}

func runVerify(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("verify", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	var o verifyOpts
	o.sf.register(fs)
	fs.StringVarP(&o.input, "input", "i", "", "the run's input WAV `file` (with --probe: the file whose rate, channels and format to probe)")
	fs.StringVarP(&o.output, "output", "o", "", "the run's output WAV `file`")
	fs.StringVar(&o.manifest, "manifest", "", "take the spec and the files from apply's record `file` (JSON or CSV) or output folder")
	fs.StringVar(&o.probe, "probe", "", "verify the chain with a probe of this `kind` instead of the recording: tones (the default) or noise, written --probe=noise")
	fs.Lookup("probe").NoOptDefVal = "tones"
	fs.IntVar(&o.rate, "rate", 0, "with --probe and no --input: the sample rate in `Hz`")
	fs.StringVar(&o.channels, "channels", "", "check only these channels, counted from 1 (`list` such as 1,3), as apply --channels filtered")
	fs.BoolVar(&o.trackPerChannel, "track-per-channel", false, "with --track: read the hum in each channel along its own track, as apply --track-per-channel filtered (default: one track from all channels; with --manifest, as the record says)")
	fs.StringVar(&o.sampleFmt, "sample-format", "", "with --probe: output samples pcm16, pcm24, pcm32, float32 or float64 (default: --output's, else the input's)")
	fs.BoolVar(&o.noDither, "no-dither", false, "with --probe: no TPDF dither, as apply --no-dither")
	fs.Uint64Var(&o.seed, "dither-seed", 1, "with --probe: `seed` of the dither and of the probe noise")
	fs.IntVar(&o.segment, "segment", 0, "segment length in `samples` for every check (default: chosen per check)")
	fs.BoolVar(&o.asJSON, "json", false, "print the verdicts as one JSON document on stdout")
	fs.StringVar(&o.plot, "plot", "", "draw the designed response, the spec's limits and the measurements to this `file` (.svg or .png)")
	fs.StringVar(&o.tempDir, "temp-dir", "", "`folder` for the probe files (default: the system's)")
	help := fs.BoolP("help", "h", false, "show this help")
	if code, done := parseOrHelp(fs, args, "verify", verifyHelp, help, stdout, stderr); done {
		return code
	}
	if fs.NArg() > 0 {
		if a := fs.Arg(0); a == "noise" || a == "tones" {
			return report(stderr, "verify", usagef("unexpected argument %q: write the probe's kind with '=', as --probe=%s", a, a), "")
		}
		return report(stderr, "verify", usagef("unexpected argument %q: name the files with --input and --output", fs.Arg(0)), "")
	}
	if o.probe != "" && o.probe != "tones" && o.probe != "noise" {
		return report(stderr, "verify", usagef("--probe=%s: use --probe (tones) or --probe=noise", o.probe), "")
	}
	if o.plot != "" {
		if ext := strings.ToLower(filepath.Ext(o.plot)); ext != ".svg" && ext != ".png" {
			return report(stderr, "verify", usagef("--plot %s: the file name must end in .svg or .png", o.plot), "")
		}
	}
	if o.segment != 0 && (o.segment < 8 || o.segment&(o.segment-1) != 0) {
		return report(stderr, "verify", usagef("--segment %d: give a power of two of at least 8", o.segment), "")
	}
	var only []int
	if o.channels != "" {
		var err error
		if only, err = parseChannels(o.channels); err != nil {
			return report(stderr, "verify", err, "")
		}
	}

	type pair struct {
		in, out    string
		spec       design.Spec
		perChannel bool // the run tracked the hum in each channel on its own
	}
	var pairs []pair
	if o.manifest != "" {
		if o.sf.file != "" || fs.Changed("family") {
			return report(stderr, "verify", usagef("--manifest carries the spec: give no --spec or filter flags with it"), "")
		}
		files, err := readManifest(o.manifest)
		if err != nil {
			return report(stderr, "verify", err, "give the record that apply wrote (wavsieve-manifest.json in the output folder, its --manifest, or the output folder itself)")
		}
		for _, f := range files {
			if o.sf.zeroPhase {
				f.spec.ZeroPhase = true
			}
			if o.input == "" || f.in == o.input {
				pairs = append(pairs, pair{f.in, f.out, f.spec, f.perChannel})
			}
		}
		if len(pairs) == 0 {
			return report(stderr, "verify", fmt.Errorf("%s: no file done in this run matches --input %q", o.manifest, o.input), "")
		}
	} else {
		sp, err := o.sf.spec(fs)
		if err != nil {
			return report(stderr, "verify", err, "")
		}
		switch {
		case o.probe != "" && o.input == "" && o.rate <= 0:
			return report(stderr, "verify", usagef("--probe needs --input FILE (for rate, channels and format) or --rate HZ"), "")
		case o.probe == "" && (o.input == "" || o.output == ""):
			return report(stderr, "verify", usagef("give the run's --input and --output files (or --manifest, or --probe)"), "")
		}
		pairs = []pair{{o.input, o.output, sp, false}}
	}
	if o.probe == "" && o.rate > 0 {
		return report(stderr, "verify", usagef("--rate is for --probe without --input; the files carry their rate"), "")
	}

	// From here on Ctrl-C and SIGTERM stop the measurement at its next
	// check; a second one ends the process at once.
	ctx, stop := signalContext()
	defer stop()
	vo := verify.Options{Channels: only, Segment: o.segment, NewTracker: analyze.NewHumTracker}
	doc := verifyDocument{Checks: []verify.Check{}, Note: verifyNote}
	for _, p := range pairs {
		var res *verify.Result
		var err error
		vo := vo
		vo.TrackPerChannel = o.trackPerChannel || p.perChannel
		if o.probe != "" {
			res, err = runProbe(ctx, p.spec, p.in, p.out, o, only, vo)
		} else {
			res, err = verify.Files(ctx, p.spec, p.in, p.out, vo)
		}
		if err != nil && ctx.Err() != nil {
			fmt.Fprintln(stderr, "wavsieve verify: interrupted; nothing was written")
			return exitFail
		}
		if err != nil {
			if _, ok := design.ValueOf(err); ok && o.sf.file == "" && fs.Changed("family") {
				// A value given by a flag: name the flag (a usage error).
				return report(stderr, "verify", o.sf.valueError(err), "")
			}
			return report(stderr, "verify", err, verifyHint(err))
		}
		doc.Files = append(doc.Files, res)
		doc.Checks = append(doc.Checks, res.Checks...)
	}
	doc.Verdict = verify.RunVerdict(doc.Checks)
	for _, r := range doc.Files {
		if r.Verdict == verify.Inconclusive && doc.Verdict == verify.Pass {
			doc.Verdict = verify.Inconclusive
		}
	}
	doc.Pass = doc.Verdict == verify.Pass
	if o.plot != "" {
		if err := writeVerifyPlot(o.plot, doc.Files[0]); err != nil {
			return report(stderr, "verify", err, "")
		}
	}
	if o.asJSON {
		if err := writeJSON(stdout, doc, true); err != nil {
			return report(stderr, "verify", err, "")
		}
	} else {
		for i, r := range doc.Files {
			if i > 0 {
				fmt.Fprintln(stdout)
			}
			printVerify(stdout, r)
		}
		if len(doc.Files) > 1 {
			fmt.Fprintf(stdout, "\nAll files: %s\n", doc.Verdict)
		}
		fmt.Fprintf(stdout, "\nNote: %s.\n", verifyNote)
		if o.plot != "" {
			fmt.Fprintf(stdout, "plot written to %s\n", o.plot)
		}
	}
	return verify.ExitCode(doc.Verdict)
}

func verifyHint(err error) string {
	switch {
	case errors.Is(err, verify.ErrMismatch):
		return "give the input and the output of one filtering run"
	case errors.Is(err, verify.ErrProbeClipped):
		return "the probe is written at -6 dBFS (tones) or -20 dBFS (noise); a filter with this much gain cannot be probed at full scale"
	case errors.Is(err, verify.ErrUnknownLength):
		return "rewrite the file with a complete header (wavsieve apply writes one)"
	}
	if errors.Is(err, design.ErrAboveNyquist) {
		return "every edge must lie below half the sample rate of the file"
	}
	return ""
}

// manifestPair is a file done in a recorded run, with the spec it was
// made with and whether its tracking notch followed each channel's own
// track.
type manifestPair struct {
	in, out    string
	spec       design.Spec
	perChannel bool
}

// readManifest returns the input, output and spec of every file done in
// a run record (a JSON or CSV record, or an output folder), read through
// its owner, package runrecord.
func readManifest(name string) ([]manifestPair, error) {
	rec, err := runrecord.Read(name)
	if err != nil {
		return nil, wavio.PathError(name, err)
	}
	var files []manifestPair
	for _, f := range rec.Files {
		if f.Status != runrecord.StatusDone {
			continue
		}
		raw := f.Spec
		if len(raw) == 0 {
			raw = rec.Spec
		}
		if len(raw) == 0 || string(raw) == "null" {
			return nil, fmt.Errorf("%s: the record holds no spec for %s", name, f.Output)
		}
		sp, err := design.ParseSpec(raw)
		if err != nil {
			return nil, fmt.Errorf("%s: the spec of %s: %w", name, f.Output, err)
		}
		files = append(files, manifestPair{f.Input, f.Output, sp, f.TrackPerChannel})
	}
	if len(files) == 0 {
		return nil, fmt.Errorf("%s: the record holds no file done", name)
	}
	return files, nil
}

// runProbe measures the chain with the probe asked for, in the format of
// in (or --rate, one channel, 24-bit PCM), the output written as out's
// format (or --sample-format, or the input's).
func runProbe(ctx context.Context, spec design.Spec, in, out string, o verifyOpts, only []int, vo verify.Options) (*verify.Result, error) {
	inF := wavio.Format{SampleRate: o.rate, Channels: 1, Bits: 24, Encoding: wavio.PCM}
	// Named by the format it stands for: "in the format of 48000 Hz, 1 ch,
	// 24-bit pcm (--rate)".
	name := fmt.Sprintf("%d Hz, 1 ch, 24-bit pcm (--rate)", o.rate)
	if in != "" {
		r, err := wavio.Open(in, nil)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", in, err)
		}
		inF = r.Format()
		r.Close()
		inF.ValidBits = 0
		name = in
	}
	ch := verify.Chain{Spec: spec, In: inF, NoDither: o.noDither, DitherSeed: o.seed, Only: only, TempDir: o.tempDir, Name: name}
	switch {
	case o.sampleFmt != "":
		var err error
		if ch.Encoding, ch.Bits, err = parseSampleFormat(o.sampleFmt); err != nil {
			return nil, err
		}
	case out != "":
		r, err := wavio.Open(out, nil)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", out, err)
		}
		ch.Encoding, ch.Bits = r.Format().Encoding, r.Format().Bits
		r.Close()
	}
	if o.probe == "noise" {
		return verify.NoiseProbe(ctx, ch, vo)
	}
	return verify.ToneProbe(ctx, ch, vo)
}

// openChecks counts the decisive checks that did not pass and names their
// kinds for the verdict line: a standard's mask rows are named as such,
// not as edges.
func openChecks(checks []verify.Check) (int, string) {
	open, mask := 0, false
	for _, c := range checks {
		if verify.Decisive(c.Kind) && c.Verdict != verify.Pass {
			open++
			mask = mask || c.Kind == verify.KindMask
		}
	}
	if mask {
		return open, "edge, cutoff, notch or mask"
	}
	return open, "edge, cutoff or notch"
}

func printVerify(w io.Writer, r *verify.Result) {
	mode := "causal"
	if r.ZeroPhase {
		mode = "zero-phase (designed responses are the squared, forward-backward ones)"
	}
	what := fmt.Sprintf("%s against %s", r.Output, r.Input)
	switch r.Method {
	case "tone probe":
		what = fmt.Sprintf("tone probe in the format of %s: a steady tone at each check frequency", r.Input)
	case "noise probe":
		what = fmt.Sprintf("noise probe in the format of %s", r.Input)
	}
	fmt.Fprintf(w, "Verify %s\n", what)
	fmt.Fprintf(w, "  %d Hz, %s; channels %s\n", r.SampleRate, mode, joinInts64(r.Channels))
	fmt.Fprintf(w, "  H1 read at each check's exact frequency, %s segments chosen per check, %d frames skipped at each end, %.0f%% intervals\n\n",
		r.Window, r.SkippedFrames, 100*r.ConfidenceLevel)
	// A limit from below shows as ">=", from above as "<="; a mask row
	// bounded on both sides shows both, lower..upper.
	limit := func(c verify.Check) string {
		switch {
		case c.LowerLimitDB != nil && c.UpperLimitDB != nil:
			return fmt.Sprintf("%.2f..%.2f", *c.LowerLimitDB, *c.UpperLimitDB)
		case c.LowerLimitDB != nil:
			return fmt.Sprintf(">= %.2f", *c.LowerLimitDB)
		case c.UpperLimitDB != nil:
			return fmt.Sprintf("<= %.2f", *c.UpperLimitDB)
		}
		return "-"
	}
	lw := 10
	for _, c := range r.Checks {
		lw = max(lw, len(limit(c)))
	}
	fmt.Fprintf(w, "  %-2s %-2s %-13s %11s %8s %15s %8s %15s %*s %7s  %s\n", "ch", "st", "kind", "Hz", "designed", "design range", "measured", "interval", lw, "limit", "margin", "verdict")
	for _, c := range r.Checks {
		kind := c.Kind
		if c.Label != "" && len(kind)+1+len(c.Label) <= 13 {
			kind += " " + c.Label
		}
		fmt.Fprintf(w, "  %-2d %-2d %-13s %11s %8s %15s %8s %15s %*s %7s  %s\n", c.Channel, c.Stage, kind, fmtHz(c.FrequencyHz),
			fmtDB(c.DesignedDB, "%.2f"), fmtPair(c.DesignRangeDB), fmtDB(c.MeasuredDB, "%.2f"), fmtPair(c.IntervalDB), lw, limit(c), fmtDB(c.MarginDB, "%+.2f"), c.Verdict)
		if c.Label != "" && len(c.Kind)+1+len(c.Label) > 13 {
			fmt.Fprintf(w, "        %s\n", c.Label)
		}
		if c.Reason != "" && (c.Verdict != verify.Pass || c.IntervalDB != nil && math.IsInf(c.IntervalDB[0], -1) || len(c.TrackRangeHz) > 0) {
			fmt.Fprintf(w, "        %s\n", c.Reason)
		}
	}
	fmt.Fprintf(w, "\nVerdict: %s (%d passed, %d failed, %d unmeasurable", r.Verdict, r.Passed, r.Failed, r.Unmeasurable)
	if open, what := openChecks(r.Checks); open > 0 && r.Verdict != verify.Fail {
		fmt.Fprintf(w, "; %d %s %s not shown to pass", open, what, map[bool]string{true: "check", false: "checks"}[open == 1])
	}
	fmt.Fprintln(w, ")")
	if r.Verdict == verify.Inconclusive && r.Method == "recording" {
		fmt.Fprintln(w, "A recording cannot show every edge; --probe measures the same chain with tones.")
	}
}

func fmtPair(p *verify.Pair) string {
	if p == nil {
		return "-"
	}
	f := func(v float64) string {
		if math.IsInf(v, 0) {
			if v < 0 {
				return "-inf"
			}
			return "+inf"
		}
		return fmt.Sprintf("%.2f", v)
	}
	return f(p[0]) + ".." + f(p[1])
}

func fmtDB(v *float64, format string) string {
	if v == nil {
		return "-"
	}
	return fmt.Sprintf(format, *v)
}

func joinInts64(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fmt.Sprint(x)
	}
	return strings.Join(s, ",")
}

func writeVerifyPlot(name string, r *verify.Result) error {
	if r.Filter == nil {
		return fmt.Errorf("%s: nothing measured to plot", name)
	}
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(name), "."))
	var marks []plots.VerifyMark
	val := func(p *float64, def float64) float64 {
		if p == nil {
			return def
		}
		return *p
	}
	for _, c := range r.Checks {
		m := plots.VerifyMark{FrequencyHz: c.FrequencyHz, MeasuredDB: val(c.MeasuredDB, math.NaN()), LowDB: math.Inf(-1), HighDB: math.NaN(), Verdict: c.Verdict}
		if c.IntervalDB != nil {
			m.LowDB, m.HighDB = c.IntervalDB[0], c.IntervalDB[1]
		}
		marks = append(marks, m)
	}
	var buf bytes.Buffer
	if err := plots.Verify(&buf, ext, r.Filter, marks, plots.VerifyOptions{}); err != nil {
		return err
	}
	return writeFileAtomic(name, buf.Bytes())
}

// recordRows are the rows of a run record for the results, each with
// the run's spec and its verification (v may be nil or hold nil for
// files not verified).
func recordRows(rs []process.FileResult, spec design.Spec, v []*verify.Result) []runrecord.File {
	sp, _ := json.Marshal(spec)
	out := make([]runrecord.File, len(rs))
	for i, r := range rs {
		var vj json.RawMessage
		if i < len(v) && v[i] != nil {
			vj, _ = json.Marshal(v[i])
		}
		out[i] = runrecord.FromResult(r, sp, vj)
	}
	return out
}

// inlineReports judges each finished file of an apply --verify run,
// printing a line for each, and returns the run's verdict over them.
func inlineReports(ob *verify.Observer, rs []process.FileResult, stderr io.Writer) ([]*verify.Result, string) {
	out := make([]*verify.Result, len(rs))
	verdict := ""
	for i, r := range rs {
		res := ob.Result(r)
		if res == nil {
			continue
		}
		out[i] = res
		switch {
		case res.Error != "":
			fmt.Fprintf(stderr, "wavsieve apply: verify: %s: inconclusive: %s\n", r.Output, res.Error)
		default:
			fmt.Fprintf(stderr, "wavsieve apply: verify: %s: %s (%d passed, %d failed, %d unmeasurable)\n", r.Output, res.Verdict, res.Passed, res.Failed, res.Unmeasurable)
		}
		switch {
		case res.Verdict == verify.Fail || verdict == verify.Fail:
			verdict = verify.Fail
		case res.Verdict == verify.Inconclusive || verdict == verify.Inconclusive:
			verdict = verify.Inconclusive
		default:
			verdict = verify.Pass
		}
	}
	return out, verdict
}
