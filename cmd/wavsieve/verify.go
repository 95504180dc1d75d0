package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/plots"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/runrecord"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const verifyHelp = `Measure what a filtering run did, and check it against the spec.

Usage:
  wavsieve verify (--spec <file> | --family <name> ... | --manifest <file>) --input <file> --output <file> [flags]
  wavsieve verify (--spec <file> | --family <name> ...) --probe (--input <file> | --rate <Hz>) [flags]

The spec is designed at the file's sample rate, as apply does. The transfer
from the input to the output is estimated (H1, the cross spectrum over the
input's spectrum, so that noise added at the output averages out) with a
Blackman-Harris window, and read at each edge of the spec and at points
inside each band: for a tolerance spec the passband and stopband edges,
the deepest passband dip and the highest stopband peaks; for an order spec
the cutoffs and points an octave or two into each band; for hum notches the
first notches and their -3 dB edges. Each reading is compared with the
designed response (for --zero-phase the squared one, twice the dB) and with
the spec's limit, and gets a verdict with its margin and its confidence
interval (99%). The transients at both ends of the files are skipped.

A check fails when its interval lies beyond the limit, or away from the
design, by more than 0.1 dB. Where the input has too little energy at a
frequency to see down to the level that matters (the recording has nothing
there, or the stopband lies below the output's dither or quantisation
floor), the check says "unmeasurable", with the level it cannot see below
and why: it is reported, but does not fail the run.

--probe verifies the processing chain instead of a recording: a white noise
probe at -20 dBFS with the rate, channels and sample format of --input (or
--rate, one channel, 24-bit) is filtered exactly as apply would (same
design, zero-phase or not, output format and dither) in a temporary folder,
and measured. Use it where a recording has no energy at an edge.

--manifest takes the spec and the files from the manifest apply wrote, and
verifies every file it records as done (or only --input's entry); the
paths are as apply recorded them, so run verify from where apply ran.

This is a measurement of the given files, not a calibrated certification.

Exit codes: 0 every check passed or was unmeasurable, 1 a check failed or
the files could not be measured, 2 usage error.

Examples:
  # check a filtered recording against its spec
  wavsieve verify --spec samples/specs/rumble-highpass.json \
      --input samples/reedmere-north-48k.wav --output out/reedmere-north-48k.wav

  # every file of an apply run, as JSON
  wavsieve verify --manifest out/clean/wavsieve-manifest.json --json

  # the chain itself, with a noise probe in the recording's format
  wavsieve verify --spec samples/specs/vibration-lowpass-zero-phase.json \
      --probe --input samples/pumphouse-vibration-12800.wav --plot verify.svg

Flags:
`

// verifyReport is the verification of one input/output pair.
type verifyReport struct {
	Pass            bool                  `json:"pass"`
	Checks          []analyze.CheckResult `json:"checks"`
	Input           string                `json:"input"`
	Output          string                `json:"output"`
	Probe           bool                  `json:"probe"`
	SampleRate      int                   `json:"sample_rate_hz"`
	Channels        []int                 `json:"channels_checked"`
	ZeroPhase       bool                  `json:"zero_phase"`
	Segment         int                   `json:"segment"`
	Window          string                `json:"window"`
	Segments        int                   `json:"segments"`
	ResolutionHz    float64               `json:"resolution_hz"`
	SkippedFrames   int                   `json:"skipped_frames_each_end"`
	ConfidenceLevel float64               `json:"confidence_level"`
	Passed          int                   `json:"passed"`
	Failed          int                   `json:"failed"`
	Unmeasurable    int                   `json:"unmeasurable"`
	Note            string                `json:"note"`
	// NotMeasured is set when the file was too short to measure at all.
	NotMeasured bool `json:"not_measured,omitempty"`
	// MeasuredOn says what output was measured when it was not the file.
	MeasuredOn string `json:"measured_on,omitempty"`
	// Error says why a file apply --verify was asked to verify could not
	// be measured.
	Error string `json:"error,omitempty"`

	filter *design.Filter
}

// verifyDocument is verify's JSON output: the verdict over all files,
// with every check, and each file's report.
type verifyDocument struct {
	Pass   bool                  `json:"pass"`
	Checks []analyze.CheckResult `json:"checks"`
	Files  []*verifyReport       `json:"files"`
	Note   string                `json:"note"`
}

const verifyNote = "a measurement of these files, not a calibrated certification"

type verifyOpts struct {
	sf        specFlags
	input     string
	output    string
	manifest  string
	probe     bool
	rate      int
	channels  string
	sampleFmt string
	noDither  bool
	seed      uint64
	segment   int
	asJSON    bool
	plot      string
	tempDir   string
}

func runVerify(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("verify", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	var o verifyOpts
	o.sf.register(fs)
	fs.StringVarP(&o.input, "input", "i", "", "the run's input WAV `file` (with --probe: the file whose rate, channels and format to probe)")
	fs.StringVarP(&o.output, "output", "o", "", "the run's output WAV `file`")
	fs.StringVar(&o.manifest, "manifest", "", "take the spec and the files from apply's JSON manifest `file`")
	fs.BoolVar(&o.probe, "probe", false, "verify the chain with a noise probe instead of the recording")
	fs.IntVar(&o.rate, "rate", 0, "with --probe and no --input: the sample rate in `Hz`")
	fs.StringVar(&o.channels, "channels", "", "check only these channels, counted from 1 (`list` such as 1,3), as apply --channels filtered")
	fs.StringVar(&o.sampleFmt, "sample-format", "", "with --probe: output samples pcm16, pcm24, pcm32, float32 or float64 (default: --output's, else the input's)")
	fs.BoolVar(&o.noDither, "no-dither", false, "with --probe: no TPDF dither, as apply --no-dither")
	fs.Uint64Var(&o.seed, "dither-seed", 1, "with --probe: `seed` of the dither and of the probe noise")
	fs.IntVar(&o.segment, "segment", 0, "segment length in `samples` (default: chosen from the spec's transition bands and the file's length)")
	fs.BoolVar(&o.asJSON, "json", false, "print the verdicts as one JSON document on stdout")
	fs.StringVar(&o.plot, "plot", "", "draw the designed response, the spec's limits and the measurements to this `file` (.svg or .png)")
	fs.StringVar(&o.tempDir, "temp-dir", "", "`folder` for the probe files (default: the system's)")
	help := fs.BoolP("help", "h", false, "show this help")
	if err := fs.Parse(args); err != nil {
		return report(stderr, "verify", usagef("%v", err), "")
	}
	if *help {
		fmt.Fprint(stdout, verifyHelp)
		fmt.Fprint(stdout, fs.FlagUsages())
		return exitOK
	}
	if fs.NArg() > 0 {
		return report(stderr, "verify", usagef("unexpected argument %q: name the files with --input and --output", fs.Arg(0)), "")
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
		in, out string
		spec    design.Spec
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
				pairs = append(pairs, pair{f.in, f.out, f.spec})
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
		case o.probe && o.input == "" && o.rate <= 0:
			return report(stderr, "verify", usagef("--probe needs --input FILE (for rate, channels and format) or --rate HZ"), "")
		case !o.probe && (o.input == "" || o.output == ""):
			return report(stderr, "verify", usagef("give the run's --input and --output files (or --manifest, or --probe)"), "")
		}
		pairs = []pair{{o.input, o.output, sp}}
	}
	if !o.probe && o.rate > 0 {
		return report(stderr, "verify", usagef("--rate is for --probe without --input; the files carry their rate"), "")
	}

	doc := verifyDocument{Pass: true, Checks: []analyze.CheckResult{}, Note: verifyNote}
	for _, p := range pairs {
		var rep *verifyReport
		var err error
		if o.probe {
			rep, err = probeVerify(p.spec, p.in, p.out, o, only)
		} else {
			rep, err = verifyPair(p.spec, p.in, p.out, only, o.segment)
		}
		if err != nil {
			return report(stderr, "verify", err, verifyHint(err))
		}
		doc.Files = append(doc.Files, rep)
		doc.Checks = append(doc.Checks, rep.Checks...)
		doc.Pass = doc.Pass && rep.Pass
	}
	if o.plot != "" {
		if err := writeVerifyPlot(o.plot, doc.Files[0]); err != nil {
			return report(stderr, "verify", err, "")
		}
	}
	if o.asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", " ")
		if err := enc.Encode(doc); err != nil {
			return report(stderr, "verify", err, "")
		}
	} else {
		for i, r := range doc.Files {
			if i > 0 {
				fmt.Fprintln(stdout)
			}
			printVerify(stdout, r)
		}
		fmt.Fprintf(stdout, "\nNote: %s.\n", verifyNote)
		if o.plot != "" {
			fmt.Fprintf(stdout, "plot written to %s\n", o.plot)
		}
	}
	if !doc.Pass {
		return exitFail
	}
	return exitOK
}

func verifyHint(err error) string {
	s := err.Error()
	switch {
	case strings.Contains(s, "too short"):
		return "verify the chain with --probe, which needs no recording"
	case strings.Contains(s, "Nyquist"):
		return "every edge must lie below half the sample rate of the file"
	case strings.Contains(s, "differ"):
		return "give the input and the output of one filtering run"
	}
	return ""
}

// manifestPair is a file done in a recorded run, with the spec it was
// made with.
type manifestPair struct {
	in, out string
	spec    design.Spec
}

// readManifest returns the input, output and spec of every file done in
// a run record (a JSON or CSV record, or an output folder), read through
// its owner, package runrecord.
func readManifest(name string) ([]manifestPair, error) {
	rec, err := runrecord.Read(name)
	if err != nil {
		return nil, err
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
		files = append(files, manifestPair{f.Input, f.Output, sp})
	}
	if len(files) == 0 {
		return nil, fmt.Errorf("%s: the record holds no file done", name)
	}
	return files, nil
}

// verifyPair measures the transfer from in to out, channel by channel,
// streaming both files, and judges it against spec designed at their
// rate. only lists the channels to check (nil: all); segment 0 chooses
// the segment length.
func verifyPair(spec design.Spec, in, out string, only []int, segment int) (*verifyReport, error) {
	ri, err := wavio.Open(in, nil)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", in, err)
	}
	defer ri.Close()
	ro, err := wavio.Open(out, nil)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", out, err)
	}
	defer ro.Close()
	fi, fo := ri.Format(), ro.Format()
	switch {
	case fi.SampleRate != fo.SampleRate:
		return nil, fmt.Errorf("%s (%d Hz) and %s (%d Hz) differ in sample rate", in, fi.SampleRate, out, fo.SampleRate)
	case fi.Channels != fo.Channels:
		return nil, fmt.Errorf("%s (%d channels) and %s (%d channels) differ in channel count", in, fi.Channels, out, fo.Channels)
	case ri.Frames() != ro.Frames():
		return nil, fmt.Errorf("%s (%d frames) and %s (%d frames) differ in length", in, ri.Frames(), out, ro.Frames())
	case ri.Frames() < 0:
		return nil, fmt.Errorf("%s: the length is not known from the header", in)
	}
	f, err := process.DesignFor(spec, fi.SampleRate, in)
	if err != nil {
		return nil, err
	}
	vs, err := newVerifySession(f, in, out, fi, ri.Frames(), only, segment)
	if err != nil {
		return nil, err
	}
	const block = 1 << 16
	nc := fi.Channels
	bx, by := make([]float64, block*nc), make([]float64, block*nc)
	for vs.pos < vs.frames-vs.skip {
		n, err1 := readFull(ri, bx)
		m, err2 := readFull(ro, by)
		if n != m {
			return nil, fmt.Errorf("%s and %s: reading stopped at different frames (%d, %d)", in, out, vs.pos+int64(n), vs.pos+int64(m))
		}
		if err := vs.feed(bx[:n*nc], by[:n*nc]); err != nil {
			return nil, err
		}
		if err1 != nil || err2 != nil || n == 0 {
			if e := firstNonEOF(err1, err2); e != nil {
				return nil, fmt.Errorf("%s / %s: %w", in, out, e)
			}
			break
		}
	}
	return vs.finish()
}

// verifySession measures one run from its input and output frames fed
// in order: it skips the filter's transients at both ends and gathers
// the cross spectra of the checked channels.
type verifySession struct {
	f       *design.Filter
	in, out string
	rate    int
	est     *analyze.Estimator
	acc     *analyze.Accumulator
	pts     []analyze.VerifyPoint
	chans   []int
	nc      int
	seg     int
	skip    int64
	frames  int64
	pos     int64
	px, py  [][]float64
}

// newVerifySession prepares the measurement of a run of f over frames
// frames of format fi. It fails with errTooShort when too little lies
// between the transients.
func newVerifySession(f *design.Filter, in, out string, fi wavio.Format, frames int64, only []int, segment int) (*verifySession, error) {
	chans := only
	if len(chans) == 0 {
		for c := 0; c < fi.Channels; c++ {
			chans = append(chans, c)
		}
	}
	for _, c := range chans {
		if c >= fi.Channels {
			return nil, usagef("--channels: %s has %d channels, not %d", in, fi.Channels, c+1)
		}
	}
	pts := analyze.VerifyPoints(f)
	skip := int64(analyze.VerifySkipFrames(f))
	usable := frames - 2*skip
	seg := segment
	if seg == 0 {
		seg = analyze.VerifySegment(f, pts, usable)
	}
	if need := analyze.VerifyMinFrames(seg); usable < need {
		return nil, fmt.Errorf("%s: %w: %d frames, of which %d at each end are the filter's transients, and %d more are needed for four segments of %d; --probe measures the same chain on a probe signal of any length", in, errTooShort, frames, skip, need, seg)
	}
	est, err := analyze.VerifyEstimator(float64(fi.SampleRate), seg)
	if err != nil {
		return nil, err
	}
	acc, err := est.NewAccumulator(len(chans), true, 0)
	if err != nil {
		return nil, err
	}
	vs := &verifySession{f: f, in: in, out: out, rate: fi.SampleRate, est: est, acc: acc, pts: pts, chans: chans,
		nc: fi.Channels, seg: seg, skip: skip, frames: frames,
		px: make([][]float64, len(chans)), py: make([][]float64, len(chans))}
	return vs, nil
}

// feed takes the next frames of the input (bx) and the output (by),
// interleaved, as many of each.
func (vs *verifySession) feed(bx, by []float64) error {
	n := int64(len(bx) / vs.nc)
	lo, hi := max(vs.skip-vs.pos, 0), min(vs.frames-vs.skip-vs.pos, n)
	if hi > lo {
		for i, c := range vs.chans {
			vs.px[i], vs.py[i] = vs.px[i][:0], vs.py[i][:0]
			for t := lo; t < hi; t++ {
				vs.px[i] = append(vs.px[i], bx[int(t)*vs.nc+c])
				vs.py[i] = append(vs.py[i], by[int(t)*vs.nc+c])
			}
		}
		if err := vs.acc.Add(vs.px, vs.py); err != nil {
			return err
		}
	}
	vs.pos += n
	return nil
}

// finish judges what was fed.
func (vs *verifySession) finish() (*verifyReport, error) {
	f := vs.f
	rep := &verifyReport{
		Pass: true, Input: vs.in, Output: vs.out, SampleRate: vs.rate, ZeroPhase: f.ZeroPhase,
		Segment: vs.seg, Window: analyze.VerifyWindow.String(), Segments: vs.acc.Segments(),
		ResolutionHz: float64(vs.rate) / float64(vs.seg), SkippedFrames: int(vs.skip),
		ConfidenceLevel: analyze.VerifyLevel, Note: verifyNote, Checks: []analyze.CheckResult{}, filter: f,
	}
	for i, c := range vs.chans {
		rep.Channels = append(rep.Channels, c+1)
		tr, err := vs.acc.Transfer(i)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", vs.in, err)
		}
		rep.Checks = append(rep.Checks, analyze.Verify(f, vs.est, tr, vs.pts, c+1)...)
	}
	for _, c := range rep.Checks {
		switch c.Verdict {
		case analyze.VerdictPass:
			rep.Passed++
		case analyze.VerdictFail:
			rep.Failed++
			rep.Pass = false
		default:
			rep.Unmeasurable++
		}
	}
	return rep, nil
}

// readFull reads until buf is full or the data ends.
func readFull(r *wavio.Reader, buf []float64) (int, error) {
	nc := r.Format().Channels
	total := 0
	for total*nc < len(buf) {
		n, err := r.ReadFrames(buf[total*nc:])
		total += n
		if err != nil {
			return total, err
		}
		if n == 0 {
			break
		}
	}
	return total, nil
}

func firstNonEOF(errs ...error) error {
	for _, e := range errs {
		if e != nil && !errors.Is(e, io.EOF) {
			return e
		}
	}
	return nil
}

// Probe signal: white Gaussian noise at probeRMS, whose peaks (about 5
// sigma over a minute of samples) stay 6 dB below full scale.
const (
	probeRMS = 0.1
	// probeSegments half-overlapped segments are generated, for about 128
	// degrees of freedom; at most probeMaxFrames frames.
	probeSegments  = 64
	probeMaxFrames = 1 << 23
)

// probeVerify writes a noise probe with the rate, channels and format of
// in (or o.rate, one channel, 24-bit PCM), filters it as apply would into
// the output format of out (or o.sampleFmt, or the input's), and verifies
// the pair.
func probeVerify(spec design.Spec, in, out string, o verifyOpts, only []int) (*verifyReport, error) {
	inF := wavio.Format{SampleRate: o.rate, Channels: 1, Bits: 24, Encoding: wavio.PCM}
	if in != "" {
		r, err := wavio.Open(in, nil)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", in, err)
		}
		inF = r.Format()
		r.Close()
		inF.ValidBits = 0
	}
	var enc wavio.Encoding
	var bits int
	switch {
	case o.sampleFmt != "":
		var err error
		if enc, bits, err = parseSampleFormat(o.sampleFmt); err != nil {
			return nil, err
		}
	case out != "":
		r, err := wavio.Open(out, nil)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", out, err)
		}
		enc, bits = r.Format().Encoding, r.Format().Bits
		r.Close()
	}
	f, err := process.DesignFor(spec, inF.SampleRate, probeName(in, inF.SampleRate))
	if err != nil {
		return nil, err
	}
	pts := analyze.VerifyPoints(f)
	skip := int64(analyze.VerifySkipFrames(f))
	seg := int64(o.segment)
	if seg == 0 {
		seg = int64(analyze.VerifySegment(f, pts, math.MaxInt32))
	}
	frames := min(2*skip+seg*(probeSegments+1)/2, probeMaxFrames)
	if frames < 2*skip+seg {
		return nil, fmt.Errorf("%s: the filter's transients (%d frames at each end) leave no room for a probe of at most %d frames", probeName(in, inF.SampleRate), skip, probeMaxFrames)
	}
	dir, err := os.MkdirTemp(o.tempDir, "wavsieve-probe-")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(dir)
	pin, pout := filepath.Join(dir, "probe-in.wav"), filepath.Join(dir, "probe-out.wav")
	if err := writeProbe(pin, inF, frames, o.seed); err != nil {
		return nil, err
	}
	job := process.FileJob{Input: pin, Output: pout, Spec: spec, Encoding: enc, Bits: bits, NoDither: o.noDither, DitherSeed: o.seed, Only: only, TempDir: dir}
	job.NewTracker = newHumTracker
	res, err := process.FilterFile(context.Background(), job)
	if err != nil {
		return nil, fmt.Errorf("probe: %w", err)
	}
	if n := sum(res.Clipped); n > 0 {
		return nil, fmt.Errorf("probe: %d samples clipped at full scale in the filtered probe; the filter's gain is too high for a -20 dBFS probe", n)
	}
	rep, err := verifyPair(spec, pin, pout, only, int(seg))
	if err != nil {
		return nil, err
	}
	rep.Probe = true
	rep.Input, rep.Output = in, out
	if in == "" {
		rep.Input = probeName(in, inF.SampleRate)
	}
	return rep, nil
}

func probeName(in string, rate int) string {
	if in != "" {
		return in
	}
	return fmt.Sprintf("probe at %d Hz", rate)
}

// writeProbe writes frames of white Gaussian noise at probeRMS in format
// f, seeded so that a probe can be repeated.
func writeProbe(name string, f wavio.Format, frames int64, seed uint64) error {
	w, err := wavio.Create(name, wavio.WriterOptions{Format: f, DitherSeed: seed + 1})
	if err != nil {
		return fmt.Errorf("probe: %w", err)
	}
	rng := rand.New(rand.NewPCG(seed, 0x70726f6265))
	buf := make([]float64, 1<<14*f.Channels)
	for done := int64(0); done < frames; {
		n := min(int64(len(buf)/f.Channels), frames-done)
		b := buf[:n*int64(f.Channels)]
		for i := range b {
			b[i] = probeRMS * rng.NormFloat64()
		}
		if err := w.WriteFrames(b); err != nil {
			w.Abort()
			return fmt.Errorf("probe: %w", err)
		}
		done += n
	}
	return w.Close()
}

func printVerify(w io.Writer, r *verifyReport) {
	mode := "causal"
	if r.ZeroPhase {
		mode = "zero-phase (designed responses are the squared, forward-backward ones)"
	}
	what := fmt.Sprintf("%s against %s", r.Output, r.Input)
	if r.Probe {
		what = fmt.Sprintf("noise probe in the format of %s", r.Input)
	}
	fmt.Fprintf(w, "Verify %s\n", what)
	fmt.Fprintf(w, "  %d Hz, %s; channels %s\n", r.SampleRate, mode, joinInts64(r.Channels))
	fmt.Fprintf(w, "  H1 with %s segments of %d (%.4g Hz bins, %d segments), %d frames skipped at each end, %.0f%% intervals\n\n",
		r.Window, r.Segment, r.ResolutionHz, r.Segments, r.SkippedFrames, 100*r.ConfidenceLevel)
	fmt.Fprintf(w, "  %-3s %-5s %-14s %11s %10s %10s %19s %12s %9s  %s\n", "ch", "stage", "kind", "Hz", "designed", "measured", "interval", "limit", "margin", "verdict")
	for _, c := range r.Checks {
		lim := "-"
		if c.LimitDB != nil {
			op := ">="
			if c.LimitSense == "at most" {
				op = "<="
			}
			lim = fmt.Sprintf("%s %.2f", op, *c.LimitDB)
		}
		iv := "-"
		if c.CIHighDB != nil {
			lo := "-inf"
			if c.CILowDB != nil {
				lo = fmt.Sprintf("%.2f", *c.CILowDB)
			}
			iv = fmt.Sprintf("%s..%.2f", lo, *c.CIHighDB)
		}
		fmt.Fprintf(w, "  %-3d %-5d %-14s %11s %10s %10s %19s %12s %9s  %s\n", c.Channel, c.Stage, c.Kind, fmtHz(c.FrequencyHz),
			fmtDB(c.DesignedDB, "%.2f"), fmtDB(c.MeasuredDB, "%.2f"), iv, lim, fmtDB(c.MarginDB, "%+.2f"), c.Verdict)
		if c.Reason != "" && c.Verdict != analyze.VerdictPass {
			fmt.Fprintf(w, "        %s\n", c.Reason)
		}
	}
	verdict := "PASS"
	if !r.Pass {
		verdict = "FAIL"
	}
	fmt.Fprintf(w, "\nResult: %s: %d passed, %d failed, %d unmeasurable (unmeasurable checks are reported but do not fail the run)\n", verdict, r.Passed, r.Failed, r.Unmeasurable)
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

func writeVerifyPlot(name string, r *verifyReport) error {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(name), "."))
	var marks []plots.VerifyMark
	val := func(p *float64, def float64) float64 {
		if p == nil {
			return def
		}
		return *p
	}
	for _, c := range r.Checks {
		marks = append(marks, plots.VerifyMark{FrequencyHz: c.FrequencyHz, MeasuredDB: val(c.MeasuredDB, math.NaN()),
			LowDB: val(c.CILowDB, math.Inf(-1)), HighDB: val(c.CIHighDB, math.NaN()), Verdict: c.Verdict})
	}
	var buf bytes.Buffer
	if err := plots.Verify(&buf, ext, r.filter, marks, plots.VerifyOptions{}); err != nil {
		return err
	}
	return writeFileAtomic(name, buf.Bytes())
}

// recordRows are the rows of a run record for the results, each with
// the run's spec and its verification (v may be nil or hold nil for
// files not verified).
func recordRows(rs []process.FileResult, spec design.Spec, v []*verifyReport) []runrecord.File {
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

// errTooShort: the file leaves too little between its transients to measure.
var errTooShort = errors.New("too short to verify")

// inlineVerify measures the files of an apply run while they are
// filtered, on the output as computed in float64 before it is quantised
// to the output format, so that the measurement floor is the filter's,
// not the output word length's.
type inlineVerify struct {
	mu       sync.Mutex
	sessions map[string]inlineSession // by output path
	only     []int
}

type inlineSession struct {
	vs  *verifySession
	err error
}

// observe is the process.FileJob.Observe of an apply --verify run.
func (iv *inlineVerify) observe(job *process.FileJob, fi wavio.Format, frames int64, f *design.Filter) func(in, out []float64) error {
	vs, err := newVerifySession(f, job.Input, job.Output, fi, frames, iv.only, 0)
	iv.mu.Lock()
	iv.sessions[job.Output] = inlineSession{vs, err}
	iv.mu.Unlock()
	if err != nil {
		return nil
	}
	return vs.feed
}

// reports judges each finished file, printing a line for each.
func (iv *inlineVerify) reports(rs []process.FileResult, stderr io.Writer) []*verifyReport {
	out := make([]*verifyReport, len(rs))
	for i, r := range rs {
		if r.Status != process.StatusDone {
			continue
		}
		s, ok := iv.sessions[r.Output]
		err := s.err
		var rep *verifyReport
		switch {
		case !ok:
			err = fmt.Errorf("%s: not measured", r.Output)
		case err == nil:
			rep, err = s.vs.finish()
		}
		if err != nil {
			rep = &verifyReport{Input: r.Input, Output: r.Output, Checks: []analyze.CheckResult{}, Note: verifyNote, Error: err.Error()}
			// A file too short to measure is not verified, which is not a
			// failed verification: it says so and does not fail the run.
			rep.NotMeasured = errors.Is(err, errTooShort)
			fmt.Fprintf(stderr, "wavsieve apply: verify: %v\n", err)
		} else {
			rep.MeasuredOn = "the float64 output before quantisation"
			if !rep.Pass {
				fmt.Fprintf(stderr, "wavsieve apply: verify: %s: %d of %d checks failed (see the manifest, or run wavsieve verify for the table)\n", r.Output, rep.Failed, len(rep.Checks))
			} else {
				fmt.Fprintf(stderr, "wavsieve apply: verify: %s: %d passed, %d unmeasurable\n", r.Output, rep.Passed, rep.Unmeasurable)
			}
		}
		out[i] = rep
	}
	return out
}

// verifiedPass reports whether every verification made passed.
func verifiedPass(v []*verifyReport) bool {
	for _, r := range v {
		if r != nil && !r.Pass && !r.NotMeasured {
			return false
		}
	}
	return true
}
