package process

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// PlanOptions say where the outputs of a batch go.
type PlanOptions struct {
	// OutputDir receives the outputs, mirroring each input folder's tree.
	OutputDir string
	// OutputFile names the output of a single input file instead.
	OutputFile string
	// Recursive descends into sub-folders of folder inputs.
	Recursive bool
	// Shard and Shards (1 <= Shard <= Shards) keep only every Shards-th
	// input of the sorted list, starting with the Shard-th, so that
	// Shards machines given the same inputs share them without overlap.
	Shard, Shards int
	// Replace redoes inputs whose output is already complete.
	Replace bool
	// Job is the filtering to be done (its spec and settings); with
	// Recorded it decides whether an existing output may be skipped.
	Job *FileJob
	// Recorded returns the design digest recorded for an output by an
	// earlier run (FileResult.DesignDigest), or "" when there is none.
	Recorded func(output string) string
	// Context, if set, stops PlanInputs (between files, and in the
	// designs it makes to compare digests) when it is cancelled.
	Context context.Context
}

// Input is one input file found by Discover. Plan fills in its header.
type Input struct {
	// Path is the file as found; Rel its path below the folder (or
	// pattern) it was found in, which its output mirrors.
	Path, Rel string
	// Format and Frames are read from the header by Plan for the inputs
	// of its share; Err is the error that reading it gave.
	Format wavio.Format
	Frames int64
	Err    error
}

// Item is one planned file: its input (with what its header said), its
// output, and a reason when it is to be skipped or refused.
type Item struct {
	Input  string
	Output string
	Skip   string
	// Refuse, when not empty, fails the item without touching its
	// output: an existing complete output made another way.
	Refuse string
	// Source is the discovered input, header included.
	Source Input
}

// Plan expands inputs (files, folders and glob patterns) into items:
// Discover, then PlanInputs.
func Plan(inputs []string, opt PlanOptions) ([]Item, error) {
	found, err := Discover(inputs, opt.Recursive, opt.OutputDir)
	if err != nil {
		return nil, err
	}
	return PlanInputs(found, opt)
}

// Discover expands inputs (files, folders and glob patterns) into the
// sorted list of input files, reading nothing but folder listings. WAV
// files are recognised by their .wav, .bwf or .rf64 extension inside
// folders; a file named explicitly is taken whatever its name. The
// folders in skip (an output folder inside an input folder) are left out
// of the walk, so that a run's own outputs never become its inputs.
func Discover(inputs []string, recursive bool, skip ...string) ([]Input, error) {
	var skipAbs []string
	for _, d := range skip {
		if d == "" {
			continue
		}
		if a, err := filepath.Abs(d); err == nil {
			skipAbs = append(skipAbs, a)
		}
	}
	var found []Input
	for _, arg := range inputs {
		matches := []string{arg}
		if strings.ContainsAny(arg, "*?[") {
			m, err := filepath.Glob(arg)
			if err != nil {
				return nil, fmt.Errorf("process: bad pattern %q: %w", arg, err)
			}
			if len(m) == 0 {
				return nil, fmt.Errorf("process: %s: no file matches this pattern", arg)
			}
			matches = m
		}
		for _, p := range matches {
			st, err := os.Stat(p)
			if err != nil {
				return nil, wavio.PathError(p, err)
			}
			if !st.IsDir() {
				found = append(found, Input{Path: p, Rel: filepath.Base(p)})
				continue
			}
			err = filepath.WalkDir(p, func(path string, d fs.DirEntry, err error) error {
				if err != nil {
					return err
				}
				if d.IsDir() {
					if path != p && !recursive {
						return filepath.SkipDir
					}
					if path != p && len(skipAbs) > 0 {
						a, _ := filepath.Abs(path)
						for _, s := range skipAbs {
							if a == s {
								return filepath.SkipDir
							}
						}
					}
					return nil
				}
				if isWAVName(d.Name()) {
					rel, _ := filepath.Rel(p, path)
					found = append(found, Input{Path: path, Rel: rel})
				}
				return nil
			})
			if err != nil {
				return nil, fmt.Errorf("process: %w", err)
			}
		}
	}
	if len(found) == 0 {
		return nil, fmt.Errorf("process: no WAV files found in the inputs")
	}
	sort.SliceStable(found, func(i, j int) bool { return found[i].Path < found[j].Path })
	return found, nil
}

// InShare reports whether the i-th input of the sorted list belongs to
// share k of n (n 0: there are no shares).
func InShare(i, k, n int) bool { return n <= 0 || i%n == k-1 }

// PlanInputs gives each discovered input of the share its output, reads
// its header (once: the items carry it on to filtering) and decides
// whether an existing output is skipped. It refuses outputs that would
// overwrite an input, and two inputs that would write the same output.
//
// An existing output is skipped only when it is complete (as many
// frames, channels and the same rate as its input) and opt.Recorded
// returns the digest of the design it would be made with now; a complete
// output made another way, or with no record, is refused (Item.Refuse)
// unless opt.Replace is set.
func PlanInputs(found []Input, opt PlanOptions) ([]Item, error) {
	if (opt.OutputDir == "") == (opt.OutputFile == "") {
		return nil, fmt.Errorf("process: give an output folder or, for one input, an output file")
	}
	if opt.Shards < 0 || opt.Shards > 0 && (opt.Shard < 1 || opt.Shard > opt.Shards) {
		return nil, fmt.Errorf("process: invalid shard %d of %d: it must be from 1 to the number of shards", opt.Shard, opt.Shards)
	}
	found = outsideOutput(found, opt.OutputDir)
	if len(found) == 0 {
		return nil, fmt.Errorf("process: no WAV files found in the inputs outside the output folder")
	}
	if opt.OutputFile != "" && len(found) != 1 {
		return nil, fmt.Errorf("process: an output file takes exactly one input, got %d; give an output folder instead", len(found))
	}
	var items []Item
	byOut := map[string]string{}
	inAbs := map[string]bool{}
	for _, f := range found {
		a, _ := filepath.Abs(f.Path)
		inAbs[a] = true
	}
	ctx := opt.Context
	if ctx == nil {
		ctx = context.Background()
	}
	for i, f := range found {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("process: planning stopped: %w", err)
		}
		if !InShare(i, opt.Shard, opt.Shards) {
			continue
		}
		out := opt.OutputFile
		if out == "" {
			out = filepath.Join(opt.OutputDir, f.Rel)
		}
		oa, _ := filepath.Abs(out)
		if inAbs[oa] {
			return nil, fmt.Errorf("process: %s: the output %s would overwrite an input; choose another output folder", f.Path, out)
		}
		if same, err := wavio.SameFile(f.Path, out); err == nil && same {
			return nil, fmt.Errorf("process: %s: the output %s is the input file itself; choose another output folder", f.Path, out)
		}
		if prev, ok := byOut[oa]; ok {
			return nil, fmt.Errorf("process: %s and %s would both be written to %s; give them separate folders", prev, f.Path, out)
		}
		byOut[oa] = f.Path
		it := Item{Input: f.Path, Output: out}
		// wavio.Open refuses what is not a regular file (a FIFO would wait
		// for a writer) before opening it.
		if r, err := wavio.Open(f.Path, nil); err != nil {
			f.Err = err
		} else {
			f.Format, f.Frames = r.Format(), r.Frames()
			r.Close()
		}
		it.Source = f
		if !opt.Replace && f.Err == nil && completeOutput(f, out) {
			it.Skip, it.Refuse = skipOrRefuse(f, out, opt)
		}
		items = append(items, it)
	}
	return items, nil
}

// outsideOutput leaves out the inputs found inside the output folder (an
// output folder inside a folder input, walked with -r): they are this
// program's outputs, not inputs.
func outsideOutput(found []Input, outDir string) []Input {
	if outDir == "" {
		return found
	}
	od, err := filepath.Abs(outDir)
	if err != nil {
		return found
	}
	var keep []Input
	for _, f := range found {
		a, err := filepath.Abs(f.Path)
		if err == nil && f.Rel != filepath.Base(f.Path) && strings.HasPrefix(a, od+string(filepath.Separator)) {
			continue
		}
		keep = append(keep, f)
	}
	return keep
}

// skipOrRefuse decides about a complete existing output.
func skipOrRefuse(f Input, out string, opt PlanOptions) (skip, refuse string) {
	var rec string
	if opt.Recorded != nil {
		rec = opt.Recorded(out)
	}
	if rec == "" {
		return "", fmt.Sprintf("%s: the output %s exists but no run record says how it was made; give --replace to redo it", f.Path, out)
	}
	if opt.Job == nil {
		return "", fmt.Sprintf("%s: the output %s exists; give --replace to redo it", f.Path, out)
	}
	ctx := opt.Context
	if ctx == nil {
		ctx = context.Background()
	}
	filt, err := design.DesignContext(ctx, opt.Job.Spec, float64(f.Format.SampleRate))
	if err != nil {
		// The design fails at this rate: filtering will say why.
		return "", ""
	}
	if opt.Job.DesignDigest(filt, opt.Job.OutputFormat(f.Format)) != rec {
		return "", fmt.Sprintf("%s: the output %s exists but was made with another design or settings; give --replace to redo it", f.Path, out)
	}
	return "output exists, complete and made with the same design (give --replace to redo it)", ""
}

func isWAVName(n string) bool {
	e := strings.ToLower(filepath.Ext(n))
	return e == ".wav" || e == ".bwf" || e == ".rf64"
}

// completeOutput says whether out is a readable WAV file with as many
// frames, channels and the same rate as the input. Outputs are only ever
// renamed into place once finished, so a readable one with the right
// length is complete.
//
// Only a regular file counts: a symbolic link there (even to a WAV file
// of the right shape) or a FIFO is not an output of this program.
func completeOutput(in Input, out string) bool {
	if st, err := os.Lstat(out); err != nil || !st.Mode().IsRegular() {
		return false
	}
	o, err := wavio.Open(out, nil)
	if err != nil {
		return false
	}
	defer o.Close()
	return o.Frames() == in.Frames && o.Format().SampleRate == in.Format.SampleRate && o.Format().Channels == in.Format.Channels
}

// Hooks are called from the workers of Run, so they must be safe for
// concurrent use. Any of them may be nil.
type Hooks struct {
	Start    func(i int, it Item)
	Progress func(i int, done, total int64)
	Done     func(i int, r FileResult)
}

// Run filters the items with the given number of workers, each item with
// a copy of tmpl whose Input, Output and Progress are set from it. A
// failed item does not stop the others. Results come back
// in item order. Cancelling ctx stops the items not yet started (they
// are reported failed with the context's error) and, between blocks,
// those running; no partial output is left.
func Run(ctx context.Context, items []Item, workers int, tmpl FileJob, h Hooks) []FileResult {
	if workers < 1 {
		workers = 1
	}
	res := make([]FileResult, len(items))
	if tmpl.SpillMemoryBytes == 0 {
		// Workers share the in-memory part of their zero-phase spills
		// and its buffers, so that peak memory stays within MemoryBudget
		// whatever the number of workers; past it the spill goes to its
		// file.
		tmpl.SpillMemoryBytes, tmpl.spillIOBytes = spillShare(workers)
	}
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				it := items[i]
				var r FileResult
				switch {
				case it.Skip != "":
					r = FileResult{Input: it.Input, Output: it.Output, Status: StatusSkipped, Error: it.Skip}
				case it.Refuse != "":
					r = FileResult{Input: it.Input, Output: it.Output, Status: StatusFailed, Error: it.Refuse, Err: errors.New(it.Refuse)}
				case ctx.Err() != nil:
					r = FileResult{Input: it.Input, Output: it.Output, Status: StatusFailed, Error: it.Input + ": not started: the run was interrupted"}
				default:
					if h.Start != nil {
						h.Start(i, it)
					}
					job := tmpl
					job.Input, job.Output, job.Progress = it.Input, it.Output, nil
					if h.Progress != nil {
						job.Progress = func(done, total int64) { h.Progress(i, done, total) }
					}
					if err := os.MkdirAll(filepath.Dir(it.Output), 0o755); err != nil {
						r = FileResult{Input: it.Input, Output: it.Output, Status: StatusFailed, Error: err.Error()}
						break
					}
					r, _ = FilterFile(ctx, job)
					if r.Status == StatusFailed && ctx.Err() != nil {
						r.Error = it.Input + ": interrupted before it was finished; no output was written"
					}
				}
				res[i] = r
				if h.Done != nil {
					h.Done(i, r)
				}
			}
		}()
	}
	for i := range items {
		next <- i
	}
	close(next)
	wg.Wait()
	return res
}
