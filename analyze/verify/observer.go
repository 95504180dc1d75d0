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
//
// Its memory is held within ObserverMemory whatever the number of
// workers: a file's reading buffers are taken from that budget before the
// file starts (a file waits while other files' buffers fill it), and are
// given back when the file ends, its result judged at once and kept.
type Observer struct {
	o        Options
	mu       sync.Mutex
	cond     *sync.Cond
	free     int64
	sessions map[string]observed // by output path
}

// ObserverMemory is the memory all files measured at once by an Observer
// may hold. A file that needs more than this alone is measured alone.
const ObserverMemory = 64 << 20

type observed struct {
	s   *Session
	res *Result // judged when the file ended with all its frames read
	err error
}

// observedMethod is what an Observer measures.
const observedMethod = "float64 output before quantisation"

// NewObserver returns an observer that reads every file with options o
// (o.In and o.Out are set per file).
func NewObserver(o Options) *Observer {
	ob := &Observer{o: o, sessions: map[string]observed{}, free: ObserverMemory}
	ob.cond = sync.NewCond(&ob.mu)
	return ob
}

// Observe is a process.FileJob.Observe.
func (ob *Observer) Observe(job *process.FileJob, fi wavio.Format, frames int64, f *design.Filter) func(in, out []float64) error {
	o := ob.o
	o.In, o.Out = fi, wavio.Format{}
	if o.Tracks == nil {
		// A tracking notch is read along the track the run filtered
		// with: one shared, or each channel's own.
		o.Tracks, o.TrackPerChannel = job.MeasuredTracks(), job.TrackPerChannel
	}
	s, err := newSession(f, nil, fi.Channels, frames, o, true)
	if err != nil {
		err = fmt.Errorf("%s: %w", job.Input, err)
		ob.mu.Lock()
		ob.sessions[job.Output] = observed{err: err}
		ob.mu.Unlock()
		return nil
	}
	need := min(s.bufferBytes(), ObserverMemory)
	ob.mu.Lock()
	for ob.free < need {
		ob.cond.Wait()
	}
	ob.free -= need
	ob.sessions[job.Output] = observed{s: s}
	ob.mu.Unlock()
	s.allocate()
	input, output := job.Input, job.Output
	ended := false
	return func(in, out []float64) error {
		if in != nil || out != nil {
			return s.Feed(in, out)
		}
		// The end of the file (process calls with nil, nil once).
		if ended {
			return nil
		}
		ended = true
		var res *Result
		if s.pos >= s.frames {
			res = s.Result(input, output, observedMethod)
		}
		ob.mu.Lock()
		ob.sessions[output] = observed{res: res, err: ob.sessions[output].err}
		ob.free += need
		ob.cond.Broadcast()
		ob.mu.Unlock()
		return nil
	}
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
	case ok && s.res != nil:
		return s.res
	case ok && s.s != nil && s.err == nil:
		return s.s.Result(r.Input, r.Output, observedMethod)
	case !ok || s.err == nil:
		s.err = fmt.Errorf("%s: not measured", r.Output)
	}
	res := &Result{Input: r.Input, Output: r.Output, Checks: []Check{}, Error: s.err.Error()}
	res.Finish()
	return res
}
