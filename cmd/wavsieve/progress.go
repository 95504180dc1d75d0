package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"

	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"
	"golang.org/x/term"

	"github.com/wavsieve/wavsieve/process"
)

// progress shows the run on stderr: on a terminal, an overall bar (in
// frames, with rate and time left) and one bar per file being filtered;
// elsewhere one line per finished file.
type progress struct {
	w       io.Writer
	p       *mpb.Progress
	total   *mpb.Bar
	mu      sync.Mutex
	bars    map[int]*mpb.Bar
	last    map[int]int64
	items   []process.Item
	enabled bool
}

func newProgress(stderr io.Writer, items []process.Item, want bool) *progress {
	pr := &progress{w: stderr, items: items, bars: map[int]*mpb.Bar{}, last: map[int]int64{}}
	f, ok := stderr.(*os.File)
	if !want || !ok || !term.IsTerminal(int(f.Fd())) {
		return pr
	}
	var frames int64
	for _, it := range items {
		if it.Skip != "" {
			continue
		}
		frames += it.Source.Frames
	}
	pr.enabled = true
	pr.p = mpb.New(mpb.WithOutput(stderr), mpb.WithWidth(40))
	pr.total = pr.p.AddBar(frames,
		mpb.PrependDecorators(decor.Name(fmt.Sprintf("all %d files ", len(items))), decor.Percentage(decor.WCSyncSpace)),
		mpb.AppendDecorators(decor.AverageSpeed(0, " %.0f frames/s", decor.WCSyncSpace), decor.Name(" left "), decor.AverageETA(decor.ET_STYLE_MMSS)),
		mpb.BarPriority(-1))
	return pr
}

func (pr *progress) hooks() process.Hooks {
	return process.Hooks{
		Start: func(i int, it process.Item) {
			if !pr.enabled {
				return
			}
			n := it.Source.Frames
			pr.mu.Lock()
			pr.bars[i] = pr.p.AddBar(n, mpb.BarRemoveOnComplete(),
				mpb.PrependDecorators(decor.Name(shorten(filepath.Base(it.Input), 28), decor.WCSyncSpaceR), decor.Percentage(decor.WCSyncSpace)),
				mpb.AppendDecorators(decor.AverageETA(decor.ET_STYLE_MMSS)))
			pr.mu.Unlock()
		},
		Progress: func(i int, done, total int64) {
			if !pr.enabled {
				return
			}
			pr.mu.Lock()
			b := pr.bars[i]
			d := done - pr.last[i]
			pr.last[i] = done
			pr.mu.Unlock()
			if b != nil {
				b.SetCurrent(done)
			}
			pr.total.IncrInt64(d)
		},
		Done: func(i int, r process.FileResult) {
			if !pr.enabled {
				switch r.Status {
				case process.StatusDone:
					fmt.Fprintf(pr.w, "done %s -> %s (%.2f s)\n", r.Input, r.Output, r.Seconds)
				case process.StatusSkipped:
					fmt.Fprintf(pr.w, "skipped %s -> %s: %s\n", r.Input, r.Output, r.Error)
				}
				return
			}
			pr.mu.Lock()
			b := pr.bars[i]
			delete(pr.bars, i)
			pr.mu.Unlock()
			if b != nil {
				if r.Status == process.StatusDone {
					b.SetTotal(-1, true)
				} else {
					b.Abort(true)
				}
			}
		},
	}
}

func (pr *progress) finish() {
	if pr.enabled {
		pr.total.SetTotal(-1, true)
		pr.p.Wait()
	}
}

func shorten(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return "…" + s[len(s)-n+1:]
}
