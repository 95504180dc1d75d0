package verify

import (
	"fmt"
	"sync"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// Observer measures the files of an apply run while they are filtered
// (process.FileJob.Observe), on the output as computed in float64 before
// it is quantised to the output format, so that the measurement floor is
// the filter's, not the output word length's. It is safe for the
// concurrent workers of a batch.
type Observer struct {
	o        Options
	mu       sync.Mutex
	sessions map[string]observed // by output path
}

type observed struct {
	s   *Session
	err error
}

// NewObserver returns an observer that reads every file with options o
// (o.In and o.Out are set per file).
func NewObserver(o Options) *Observer {
	return &Observer{o: o, sessions: map[string]observed{}}
}

// Observe is a process.FileJob.Observe.
func (ob *Observer) Observe(job *process.FileJob, fi wavio.Format, frames int64, f *design.Filter) func(in, out []float64) error {
	o := ob.o
	o.In, o.Out = fi, wavio.Format{}
	if o.Tracks == nil {
		// A tracking notch is read along the track the run filtered with.
		o.Tracks = job.MeasuredTracks()
	}
	s, err := NewSession(f, nil, fi.Channels, frames, o)
	if err != nil {
		err = fmt.Errorf("%s: %w", job.Input, err)
	}
	ob.mu.Lock()
	ob.sessions[job.Output] = observed{s, err}
	ob.mu.Unlock()
	if err != nil {
		return nil
	}
	return s.Feed
}

// Result judges the file of r, or returns nil when r was not done. A file
// that could not be measured gets a result with its error and verdict
// Inconclusive.
func (ob *Observer) Result(r process.FileResult) *Result {
	if r.Status != process.StatusDone {
		return nil
	}
	ob.mu.Lock()
	s, ok := ob.sessions[r.Output]
	ob.mu.Unlock()
	switch {
	case ok && s.err == nil:
		return s.s.Result(r.Input, r.Output, "float64 output before quantisation")
	case !ok:
		s.err = fmt.Errorf("%s: not measured", r.Output)
	}
	res := &Result{Input: r.Input, Output: r.Output, Checks: []Check{}, Error: s.err.Error()}
	res.Finish()
	return res
}
