package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"syscall"

	"github.com/spf13/pflag"
	"github.com/wavsieve/wavsieve/analyze"
	"github.com/wavsieve/wavsieve/analyze/verify"
	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/runrecord"
	"github.com/wavsieve/wavsieve/process/wavio"
)

const applyHelp = `Filter WAV files and folders, each designed at its own sample rate.

Usage:
  wavsieve apply (--spec <file> | --family <name> ...) --output <dir|file> [flags] <input>...

Inputs are WAV files, folders (with --recursive, their sub-folders too) and
glob patterns. The outputs mirror the input tree under the --output folder;
for a single input file --output may name the output file instead. Inputs
are never modified, outputs are written to a temporary file and renamed into
place when complete, and an output that already exists complete, made with
the same design, is skipped unless --replace is given. A file whose rate cannot take the spec (an edge
at or above its Nyquist frequency) fails alone; the others go on. So does
anything that is not a regular file (a FIFO, a device, a symbolic link at
an output's name), an input shorter than its header says (--allow-short
writes what was read, with a warning) and NaN or infinite float samples
(--allow-nonfinite replaces them by zero, counted in the record). The
temporary files of a run that was killed are removed by the next run into
the same folder. Peak memory stays under 256 MB whatever the input and -j.

With --zero-phase the filter runs forward, then backward over a temporary
spill file beside the output (or in --temp-dir), so files larger than memory
work; the ends are padded for as long as the filter takes to ring down, by
odd reflection, or for hum notches by the fitted hum itself.

A record of the run (the manifest, JSON and CSV) is written to the output
folder, or where --manifest says; --json prints this run's part of it on
stdout. Runs into one folder add to one record, one row per output; runs
that share a record wait for each other. Each row holds a digest of the
design and settings the output was made with: an existing complete output
is skipped only when its digest matches, and refused otherwise (give
--replace to redo it).

--shard K/N keeps every N-th input of the sorted list, starting with the
K-th, so that N machines given the same command share an archive: in a
Slurm array of N tasks, --shard $((SLURM_ARRAY_TASK_ID+1))/N (N written
out, so that resubmitting one task keeps the shares); in a Kubernetes
indexed Job, --shard $((JOB_COMPLETION_INDEX+1))/N. Each share writes
its own record, wavsieve-manifest.K-of-N.json, holding the whole input
list; 'wavsieve gather DIR' merges them and lists what is missing.

--weighting CURVE adds a standard weighting (A, C, Z; Wb ... Wm) after the
other stages, or alone ('wavsieve help weighting'). A level computed from
a weighted file is not a sound level meter's reading: the microphone, its
calibration and the measuring chain are unknown to wavsieve.

Exit codes: 0 every file done or skipped, 1 some failed, 2 usage error.

Examples:
  # take rumble and hum out of a folder of field recordings
  wavsieve apply --spec samples/specs/rumble-and-hum.json --output out/clean samples

  # one file, zero-phase low-pass, written as 32-bit float
  wavsieve apply --family elliptic --response lowpass --passband 2000 --stopband 2500 \
      --ripple 0.1 --attenuation 80 --zero-phase --sample-format float32 \
      --output out/logger-lp.wav logger.wav

  # A-weight a folder of recordings, each file designed at its own rate
  wavsieve apply --weighting A --output out/a-weighted recordings/

  # see what would be designed for each file, writing nothing
  wavsieve apply --spec hum.json --output out --recursive --dry-run archive/

Flags:
`

type applyOpts struct {
	sf              specFlags
	output          string
	recursive       bool
	replace         bool
	workers         int
	shard           string
	dryRun          bool
	asJSON          bool
	manifest        string
	sampleFmt       string
	noDither        bool
	seed            uint64
	channels        string
	steady          bool
	tempDir         string
	nonFinite       bool
	allowShort      bool
	trackPerChannel bool
	noProgress      bool
}

func runApply(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("apply", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	var o applyOpts
	o.sf.register(fs)
	fs.StringVarP(&o.output, "output", "o", "", "output `folder` (or file, for one input)")
	fs.BoolVarP(&o.recursive, "recursive", "r", false, "descend into sub-folders of folder inputs")
	fs.BoolVar(&o.replace, "replace", false, "redo outputs that already exist complete")
	fs.IntVarP(&o.workers, "workers", "j", runtime.NumCPU(), "files filtered at once")
	fs.StringVar(&o.shard, "shard", "", "process only share `K/N` of the inputs (see above)")
	fs.BoolVarP(&o.dryRun, "dry-run", "n", false, "print the design for every file and write nothing")
	fs.BoolVar(&o.asJSON, "json", false, "print the run manifest as JSON on stdout")
	fs.StringVar(&o.manifest, "manifest", "", "write the run record to `base`.json and base.csv, base.K-of-N with --shard (default: wavsieve-manifest in the output folder)")
	fs.StringVar(&o.sampleFmt, "sample-format", "", "output samples: pcm16, pcm24, pcm32, float32 or float64 (default: the input's)")
	fs.BoolVar(&o.noDither, "no-dither", false, "no TPDF dither when writing integer samples")
	fs.Uint64Var(&o.seed, "dither-seed", 0, "seed of the dither (default: from the input's file name and size, so identical runs give identical files; recorded in the manifest)")
	fs.StringVar(&o.channels, "channels", "", "filter only these channels, counted from 1 (`list` such as 1,3); others pass through")
	fs.BoolVar(&o.trackPerChannel, "track-per-channel", false, "with --track: follow the hum in each channel on its own (default: one track from all channels)")
	fs.BoolVar(&o.steady, "steady-start", false, "causal runs start settled on the first sample, so a DC offset gives no thump")
	fs.StringVar(&o.tempDir, "temp-dir", "", "`folder` for the zero-phase spill (default: beside each output)")
	fs.BoolVar(&o.nonFinite, "allow-nonfinite", false, "replace NaN and infinite float samples by zero (counted per channel in the manifest) instead of refusing the file")
	fs.BoolVar(&o.allowShort, "allow-short", false, "write what was read of an input that ends before its header's frame count, with a warning, instead of failing it")
	fs.BoolVar(&o.noProgress, "no-progress", false, "no progress display on a terminal")
	verifyRuns := fs.Bool("verify", false, "measure every file written against the spec (as wavsieve verify) and record the verdicts (pass, fail, inconclusive) in the manifest; a failed verification makes the exit code 1")
	help := fs.BoolP("help", "h", false, "show this help")
	if err := fs.Parse(args); err != nil {
		return report(stderr, "apply", usagef("%v", err), "")
	}
	if *help {
		fmt.Fprint(stdout, applyHelp)
		fmt.Fprint(stdout, fs.FlagUsages())
		return exitOK
	}
	spec, err := o.sf.spec(fs)
	if err != nil {
		return report(stderr, "apply", err, "")
	}
	// What can be checked without a file's rate is checked before
	// anything is created: a spec that fails at every rate is a usage
	// error.
	if err := o.sf.check(spec); err != nil {
		return report(stderr, "apply", err, "")
	}
	if fs.NArg() == 0 {
		return report(stderr, "apply", usagef("no input files or folders given"), "")
	}
	if o.output == "" {
		return report(stderr, "apply", usagef("no --output folder or file given"), "")
	}
	if err := checkApplyOutput(o.output, fs.Args()); err != nil {
		return report(stderr, "apply", err, "")
	}
	popt := process.PlanOptions{Recursive: o.recursive, Replace: o.replace}
	if o.shard != "" {
		k, n, ok := parseShard(o.shard)
		if !ok {
			return report(stderr, "apply", usagef("--shard %q: use K/N with 1 <= K <= N, for example 2/8", o.shard), "")
		}
		popt.Shard, popt.Shards = k, n
	}
	if o.workers < 1 {
		return report(stderr, "apply", usagef("--workers must be at least 1"), "")
	}
	tmpl := process.FileJob{Spec: spec, NoDither: o.noDither, DitherSeed: o.seed, SteadyStart: o.steady, TempDir: o.tempDir, AllowNonFinite: o.nonFinite, AllowShort: o.allowShort}
	tmpl.NewTracker, tmpl.TrackPerChannel = analyze.NewHumTracker, o.trackPerChannel
	if o.sampleFmt != "" {
		enc, bits, err := parseSampleFormat(o.sampleFmt)
		if err != nil {
			return report(stderr, "apply", err, "")
		}
		tmpl.Encoding, tmpl.Bits = enc, bits
	}
	if o.channels != "" {
		only, err := parseChannels(o.channels)
		if err != nil {
			return report(stderr, "apply", err, "")
		}
		tmpl.Only = only
	}
	// One input file and an --output that is not a folder: the output file.
	if fs.NArg() == 1 && isWAVFile(fs.Arg(0)) && !isDir(o.output) && strings.EqualFold(filepath.Ext(o.output), ".wav") {
		popt.OutputFile = o.output
	} else {
		popt.OutputDir = o.output
	}
	found, err := process.Discover(fs.Args(), popt.Recursive, popt.OutputDir)
	if err != nil {
		return report(stderr, "apply", err, "")
	}
	// The record of the run: given by --manifest, or in the output
	// folder, one per share when the inputs are shared out.
	base := o.manifest
	if base != "" && popt.Shards > 0 {
		base += fmt.Sprintf(".%d-of-%d", popt.Shard, popt.Shards)
	}
	if base == "" {
		dir := popt.OutputDir
		if dir == "" {
			dir = filepath.Dir(popt.OutputFile)
		}
		base = runrecord.Base(dir, popt.Shard, popt.Shards)
	}
	popt.Job = &tmpl

	// From here on Ctrl-C and SIGTERM stop the run at the next check
	// (between design stages, between blocks) and the run cleans up; a
	// second one ends the process at once.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	go func() {
		<-ctx.Done()
		stop()
	}()
	// Runs with one record are serialised from planning to the record's
	// writing, so that the record always describes the files on disk.
	// undo takes back the folder the lock made when the run stops before
	// filtering anything.
	undo := func() {}
	if !o.dryRun {
		if _, err := os.Stat(filepath.Dir(base)); err != nil {
			undo = func() {
				os.Remove(runrecord.LockPath(base))
				os.Remove(filepath.Dir(base))
			}
		}
		unlock, err := runrecord.Lock(ctx, base, func() {
			fmt.Fprintf(stderr, "wavsieve apply: waiting for another run that writes the record %s.json to finish\n", base)
		})
		switch {
		case errors.Is(err, runrecord.ErrNoLocks):
			fmt.Fprintf(stderr, "wavsieve apply: warning: %v; runs into this folder at the same time could lose each other's rows of the record\n", err)
		case err != nil:
			return report(stderr, "apply", fmt.Errorf("cannot take the record's lock: %w", err), "give --manifest a path in a folder you can write")
		}
		defer unlock()
	}
	rec, err := runrecord.Load(base)
	if err != nil {
		undo()
		return report(stderr, "apply", err, "")
	}
	// A share also trusts the record that gather made of earlier shares.
	var gathered *runrecord.Record
	if popt.Shards > 0 && o.manifest == "" {
		gathered, _ = runrecord.Load(runrecord.Base(popt.OutputDir, 0, 0))
	}
	popt.Recorded = func(out string) string {
		if f, ok := rec.Lookup(out); ok && f.Status == runrecord.StatusDone {
			return f.DesignDigest
		}
		if gathered != nil {
			if f, ok := gathered.Lookup(out); ok && f.Status == runrecord.StatusDone {
				return f.DesignDigest
			}
		}
		return ""
	}
	popt.Context = ctx
	items, err := process.PlanInputs(found, popt)
	if err != nil {
		undo()
		return report(stderr, "apply", err, "")
	}
	if o.dryRun {
		return dryRun(ctx, items, tmpl, &o.sf, o.asJSON, stdout, stderr)
	}
	holdMemory()
	removeStale(items, []string{o.tempDir, filepath.Dir(base)}, stderr)

	var inline *verify.Observer
	if *verifyRuns {
		inline = verify.NewObserver(verify.Options{Channels: tmpl.Only})
		tmpl.Observe = inline.Observe
	}
	prog := newProgress(stderr, items, !o.noProgress)
	results := process.Run(ctx, items, o.workers, tmpl, prog.hooks())
	prog.finish()
	for i, r := range results {
		// A value given by a flag is named by its flag, not its spec key:
		// a file that failed at its rate is designed again (it takes
		// microseconds) for the typed error.
		if r.Status != process.StatusFailed || r.SampleRate == 0 || o.sf.file != "" {
			continue
		}
		if _, err := design.Design(spec, float64(r.SampleRate)); err != nil {
			if _, ok := design.ValueOf(err); ok {
				results[i].Error = fmt.Sprintf("%s: at this file's %d Hz rate: %v", r.Input, r.SampleRate, o.sf.valueError(err))
			}
		}
	}

	var verified []*verify.Result
	verdict := ""
	if inline != nil && ctx.Err() == nil {
		verified, verdict = inlineReports(inline, results, stderr)
	}
	rows := recordRows(results, spec, verified)
	// What --json prints: this run's rows, a skipped file with what the
	// record holds of it.
	for i, r := range rows {
		if f, ok := rec.Lookup(r.Output); ok && r.Status == runrecord.StatusSkipped {
			f.Status, f.Error = r.Status, r.Error
			rows[i] = f
		}
	}
	rec.Merge(rows)
	rec.Spec, _ = json.Marshal(spec)
	rec.Workers = o.workers
	rec.Command = append([]string{programName(), "apply"}, args...)
	rec.WorkingDir, _ = os.Getwd()
	if popt.Shards > 0 {
		rec.Share = &runrecord.Share{Index: popt.Shard, Count: popt.Shards}
		rec.Inputs = make([]string, len(found))
		for i, f := range found {
			rec.Inputs[i] = f.Path
		}
	}
	werr := rec.Write(base)
	if werr != nil {
		fmt.Fprintf(stderr, "wavsieve apply: writing the record: %v\n", werr)
	}
	if o.asJSON {
		run := *rec
		run.Files = rows
		if j, err := run.JSON(); err == nil {
			stdout.Write(j)
		}
	}
	failed, done, skipped := 0, 0, 0
	for _, r := range results {
		switch r.Status {
		case process.StatusFailed:
			failed++
			fmt.Fprintf(stderr, "wavsieve apply: %s\n", userMessage(r.Error))
			if h := failureHint(r.Err); h != "" {
				fmt.Fprintf(stderr, "hint: %s\n", h)
			}
		case process.StatusDone:
			done++
			for _, w := range r.Warnings {
				fmt.Fprintf(stderr, "wavsieve apply: warning: %s: %s\n", r.Input, w)
			}
			if n := sum(r.Clipped); n > 0 {
				fmt.Fprintf(stderr, "wavsieve apply: warning: %s: %d samples clipped at full scale; lower the level or write float32\n", r.Output, n)
			}
		default:
			skipped++
		}
	}
	where := "manifest " + base + ".json"
	if werr != nil {
		where = "the manifest was NOT written"
	}
	fmt.Fprintf(stderr, "wavsieve apply: %d done, %d skipped, %d failed; %s\n", done, skipped, failed, where)
	if verdict != "" {
		fmt.Fprintf(stderr, "wavsieve apply: verification: %s\n", verdict)
	}
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "wavsieve apply: interrupted; no partial outputs were left")
		return exitFail
	}
	if werr != nil {
		return exitFail
	}
	if failed > 0 || verdict == verify.Fail {
		return exitFail
	}
	return exitOK
}

func sum(v []int64) int64 {
	var s int64
	for _, x := range v {
		s += x
	}
	return s
}

func parseShard(s string) (int, int, bool) {
	a, b, ok := strings.Cut(s, "/")
	if !ok {
		return 0, 0, false
	}
	k, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if err1 != nil || err2 != nil || n < 1 || k < 1 || k > n {
		return 0, 0, false
	}
	return k, n, true
}

// parseSampleFormat reads the value of --sample-format.
func parseSampleFormat(s string) (wavio.Encoding, int, error) {
	switch strings.ToLower(s) {
	case "pcm16":
		return wavio.PCM, 16, nil
	case "pcm24":
		return wavio.PCM, 24, nil
	case "pcm32":
		return wavio.PCM, 32, nil
	case "float32":
		return wavio.Float, 32, nil
	case "float64":
		return wavio.Float, 64, nil
	}
	return 0, 0, usagef("--sample-format %q: use pcm16, pcm24, pcm32, float32 or float64", s)
}

func parseChannels(s string) ([]int, error) {
	var out []int
	for _, p := range strings.Split(s, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(p))
		if err != nil || n < 1 {
			return nil, usagef("--channels %q: give channel numbers from 1, separated by commas", s)
		}
		out = append(out, n-1)
	}
	return out, nil
}

// checkApplyOutput refuses an --output that cannot be what the inputs
// need: standard output, a .wav name for several inputs (which would
// become a folder of that name), or an existing file where a folder is
// needed.
func checkApplyOutput(out string, inputs []string) error {
	if out == "-" {
		return usagef("--output -: apply writes WAV files, not standard output; give an output folder, or a .wav file name for one input")
	}
	if isDir(out) {
		return nil
	}
	oneFile := len(inputs) == 1 && isWAVFile(inputs[0]) && !strings.ContainsAny(inputs[0], "*?[")
	if !oneFile && isWAVName(out) {
		return usagef("--output %s names a file, but these inputs need an output folder (a file name takes exactly one input file); give a folder, for example --output %s", out, strings.TrimSuffix(out, filepath.Ext(out)))
	}
	if st, err := os.Stat(out); err == nil && !st.IsDir() && !oneFile {
		return usagef("--output %s is an existing file, but these inputs need an output folder; give a folder", out)
	}
	return nil
}

// isWAVName says whether a path's extension is one apply reads and writes.
func isWAVName(p string) bool {
	switch strings.ToLower(filepath.Ext(p)) {
	case ".wav", ".bwf", ".rf64":
		return true
	}
	return false
}

func isDir(p string) bool {
	st, err := os.Stat(p)
	return err == nil && st.IsDir()
}

func isWAVFile(p string) bool {
	st, err := os.Stat(p)
	return err == nil && !st.IsDir()
}

// dryRun designs the spec at every input's rate and prints what would be
// done; nothing is written.
func dryRun(ctx context.Context, items []process.Item, tmpl process.FileJob, sf *specFlags, asJSON bool, stdout, stderr io.Writer) int {
	var files []process.FileResult
	failed := 0
	for _, it := range items {
		r := process.FileResult{Input: it.Input, Output: it.Output, Status: process.StatusSkipped, Error: "dry run"}
		if it.Skip != "" {
			r.Error = it.Skip
		}
		if it.Refuse != "" {
			r.Error = it.Refuse
		}
		if err := it.Source.Err; err != nil {
			r.Status, r.Error = process.StatusFailed, fmt.Sprintf("%s: %v", it.Input, err)
			failed++
			files = append(files, r)
			continue
		}
		f := it.Source.Format
		r.SampleRate, r.Channels, r.Frames, r.Format = f.SampleRate, f.Channels, it.Source.Frames, f.String()
		r.DurationS = float64(r.Frames) / float64(f.SampleRate)
		filt, err := process.DesignContext(ctx, tmpl.Spec, f.SampleRate, it.Input)
		if err != nil {
			r.Status, r.Error = process.StatusFailed, err.Error()
			if _, ok := design.ValueOf(err); ok && sf.file == "" {
				r.Error = fmt.Sprintf("%s: at this file's %d Hz rate: %v", it.Input, f.SampleRate, sf.valueError(err))
			}
			failed++
		} else {
			for _, st := range filt.Stages {
				r.Design = append(r.Design, process.StageSummary{Family: st.Family, Response: st.Response, Curve: st.Spec.Curve, Order: st.Order, Sections: len(st.Sections), EdgesHz: st.EdgesHz})
			}
		}
		files = append(files, r)
	}
	if asJSON {
		rec := runrecord.New()
		rec.Spec, _ = json.Marshal(tmpl.Spec)
		rec.DryRun = true
		rec.Files = recordRows(files, tmpl.Spec, nil)
		if j, err := rec.JSON(); err == nil {
			stdout.Write(j)
		}
	} else {
		for _, r := range files {
			fmt.Fprintf(stdout, "%s -> %s\n", r.Input, r.Output)
			if r.Status == process.StatusFailed {
				fmt.Fprintf(stdout, "  would fail: %s\n", r.Error)
				continue
			}
			fmt.Fprintf(stdout, "  %s, %.3f s\n", r.Format, r.DurationS)
			for _, s := range r.Design {
				fmt.Fprintf(stdout, "  %s\n", stageLine(s))
			}
			if r.Error != "dry run" {
				fmt.Fprintf(stdout, "  would be skipped: %s\n", r.Error)
			}
		}
	}
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "wavsieve apply: interrupted")
		return exitFail
	}
	if failed > 0 {
		return exitFail
	}
	return exitOK
}

func stageLine(s process.StageSummary) string {
	what := s.Family
	if s.Response != "" {
		what += " " + s.Response
	}
	if s.Curve != "" {
		what += " " + s.Curve
	}
	var e []string
	for _, hz := range s.EdgesHz {
		e = append(e, fmtHz(hz))
	}
	edges := strings.Join(e, ", ")
	if len(e) > 6 {
		edges = strings.Join(e[:6], ", ") + fmt.Sprintf(", ... (%d)", len(e))
	}
	return fmt.Sprintf("%s, order %d, %d sections, at %s Hz", what, s.Order, s.Sections, edges)
}

func openWAV(name string) (*wavio.Reader, error) { return wavio.Open(name, nil) }

// failureHint says what to do about a failed file, when there is
// something to say.
func failureHint(err error) string {
	var fe *process.FormatError
	var se *process.ShortInputError
	var nr *wavio.NotRegularError
	var bad wavio.FormatError
	var uns wavio.UnsupportedError
	switch {
	case errors.As(err, &fe):
		return "choose the output format with --sample-format (pcm16, pcm24, pcm32, float32 or float64)"
	case errors.As(err, &se):
		return "check the input; --allow-short writes what could be read, with a warning"
	case errors.As(err, &nr):
		return "only regular files are read and written; move it away or name another file"
	case errors.Is(err, io.ErrUnexpectedEOF):
		return "the file ends inside its header (an interrupted copy or recording?): copy it again from its source"
	case errors.As(err, &bad):
		return "it is not a WAV file or its header is damaged: check that it is a WAV (RIFF, RF64 or BW64) file"
	case errors.As(err, &uns):
		return "convert it to integer PCM or float WAV first"
	}
	return ""
}

// removeStale removes the temporary files that killed runs left in the
// output folders of items and in the other folders given, and says so.
func removeStale(items []process.Item, more []string, stderr io.Writer) {
	seen := map[string]bool{}
	dirs := more
	for _, it := range items {
		dirs = append(dirs, filepath.Dir(it.Output))
	}
	for _, d := range dirs {
		if d == "" || seen[d] {
			continue
		}
		seen[d] = true
		gone, _ := wavio.RemoveStale(d)
		for _, g := range gone {
			fmt.Fprintf(stderr, "wavsieve apply: removed %s, a temporary file left by an interrupted run\n", g)
		}
	}
}

// holdMemory sets the Go runtime's soft memory limit for a batch run, so
// that the collector keeps the heap within its part of
// process.MemoryBudget (the in-memory spills lie outside the heap),
// unless GOMEMLIMIT says otherwise.
func holdMemory() {
	if os.Getenv("GOMEMLIMIT") == "" {
		debug.SetMemoryLimit(process.MemoryBudget / 2)
	}
}

// programName is how the record names this program in the commands it
// keeps: the path it was started by when that is a wavsieve, so that a
// resubmitted task finds the same program.
func programName() string {
	if len(os.Args) > 0 && strings.TrimSuffix(filepath.Base(os.Args[0]), ".exe") == "wavsieve" {
		return os.Args[0]
	}
	return "wavsieve"
}
