package process

import (
	"context"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"

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
}

// Item is one planned file: its input, its output, and a reason when it
// is to be skipped.
type Item struct {
	Input  string
	Output string
	Skip   string
}

// Plan expands inputs (files, folders and glob patterns) into items.
// WAV files are recognised by their .wav or .bwf extension inside
// folders; a file named explicitly is taken whatever its name. Plan
// refuses outputs that would overwrite an input, and two inputs that
// would write the same output.
func Plan(inputs []string, opt PlanOptions) ([]Item, error) {
	if (opt.OutputDir == "") == (opt.OutputFile == "") {
		return nil, fmt.Errorf("process: give an output folder or, for one input, an output file")
	}
	if opt.Shards < 0 || opt.Shards > 0 && (opt.Shard < 1 || opt.Shard > opt.Shards) {
		return nil, fmt.Errorf("process: invalid shard %d of %d: it must be from 1 to the number of shards", opt.Shard, opt.Shards)
	}
	type src struct{ path, rel string }
	var found []src
	// An output folder inside an input folder is left out of the walk, so
	// that a run does not take its own outputs for inputs.
	outDir := ""
	if opt.OutputDir != "" {
		outDir, _ = filepath.Abs(opt.OutputDir)
	}
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
				return nil, fmt.Errorf("process: %w", err)
			}
			if !st.IsDir() {
				found = append(found, src{p, filepath.Base(p)})
				continue
			}
			err = filepath.WalkDir(p, func(path string, d fs.DirEntry, err error) error {
				if err != nil {
					return err
				}
				if d.IsDir() {
					if path != p && !opt.Recursive {
						return filepath.SkipDir
					}
					if a, _ := filepath.Abs(path); path != p && a == outDir {
						return filepath.SkipDir
					}
					return nil
				}
				if isWAVName(d.Name()) {
					rel, _ := filepath.Rel(p, path)
					found = append(found, src{path, rel})
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
	if opt.OutputFile != "" && len(found) != 1 {
		return nil, fmt.Errorf("process: an output file takes exactly one input, got %d; give an output folder instead", len(found))
	}
	sort.SliceStable(found, func(i, j int) bool { return found[i].path < found[j].path })
	var items []Item
	byOut := map[string]string{}
	inAbs := map[string]bool{}
	for _, f := range found {
		a, _ := filepath.Abs(f.path)
		inAbs[a] = true
	}
	for i, f := range found {
		if opt.Shards > 0 && i%opt.Shards != opt.Shard-1 {
			continue
		}
		out := opt.OutputFile
		if out == "" {
			out = filepath.Join(opt.OutputDir, f.rel)
		}
		oa, _ := filepath.Abs(out)
		if inAbs[oa] {
			return nil, fmt.Errorf("process: %s: the output %s would overwrite an input; choose another output folder", f.path, out)
		}
		if same, err := wavio.SameFile(f.path, out); err == nil && same {
			return nil, fmt.Errorf("process: %s: the output %s is the input file itself; choose another output folder", f.path, out)
		}
		if prev, ok := byOut[oa]; ok {
			return nil, fmt.Errorf("process: %s and %s would both be written to %s; give them separate folders", prev, f.path, out)
		}
		byOut[oa] = f.path
		it := Item{Input: f.path, Output: out}
		if !opt.Replace && completeOutput(f.path, out) {
			it.Skip = "output exists and is complete (use the replace option to redo it)"
		}
		items = append(items, it)
	}
	return items, nil
}

func isWAVName(n string) bool {
	e := strings.ToLower(filepath.Ext(n))
	return e == ".wav" || e == ".bwf" || e == ".rf64"
}

// completeOutput says whether out is a readable WAV file with as many
// frames, channels and the same rate as in. Outputs are only ever
// renamed into place once finished, so a readable one with the right
// length is complete.
//
// Only a regular file counts: a symbolic link there (even to a WAV file
// of the right shape) or a FIFO is not an output of this program.
func completeOutput(in, out string) bool {
	if st, err := os.Lstat(out); err != nil || !st.Mode().IsRegular() {
		return false
	}
	o, err := wavio.Open(out, nil)
	if err != nil {
		return false
	}
	defer o.Close()
	i, err := wavio.Open(in, nil)
	if err != nil {
		return false
	}
	defer i.Close()
	return o.Frames() == i.Frames() && o.Format().SampleRate == i.Format().SampleRate && o.Format().Channels == i.Format().Channels
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
