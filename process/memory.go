package process

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"
)

// mappedBytes is the memory mapped outside the Go heap for spills (see
// mapSamples) at this moment, for the memory tests and benchmarks.
var mappedBytes atomic.Int64

// Memory of a batch run.
//
// MemoryBudget is the peak resident memory Run is held to, for any input
// and any number of workers. It is shared out as follows (figures per
// run, whatever the worker count):
//
//   - spillPool: the in-memory part of the zero-phase spills and their
//     two file buffers, divided evenly among the workers (spillShare);
//     past its share a spill goes to its file, which changes the speed,
//     never the output;
//   - edgePool: the edge buffers of zero-phase runs (pads, head, tail,
//     the hum fit; at most memBudget for one file), taken from a shared
//     pool before a file starts, so that only as many long-ringing
//     filters run at once as fit, the others waiting their turn;
//   - per worker, blocks sized by bytes (blockBytes: a few blocks in
//     flight between the reading, filtering and writing goroutines), the
//     reader's and writer's 64 KiB buffers and at most about 1 MiB of
//     metadata (see package wavio), about 2 MiB in all;
//   - the filter state of one file, at most stateBudget;
//   - the Go runtime and the program itself, about 20 MB;
//   - with apply --verify, the measurement of the files under way,
//     within verify.ObserverMemory (64 MiB), given back as each file
//     ends.
//
// With 32 workers that is at most 96 + 64 + 64 + 16 + 20 MiB; the figures
// measured are in the README's reliability section.
const (
	MemoryBudget = 256 << 20
	spillPool    = 96 << 20
	edgePool     = 64 << 20
	stateBudget  = 16 << 20
	// blockBytes bounds one processing block: 8192 frames up to two
	// channels, fewer frames for more, never fewer than one.
	blockBytes = 128 << 10
)

// blockFramesFor returns the default block length for ch channels.
func blockFramesFor(ch int) int {
	return max(1, min(defaultBlockFrames, blockBytes/(8*max(ch, 1))))
}

// spillShare returns the in-memory spill (SpillMemoryBytes: negative for
// none) and the size of each spill file buffer of one of n workers.
func spillShare(n int) (mem int64, io int) {
	share := int64(spillPool) / int64(max(n, 1))
	io = int(min(max(share/4, 64<<10), int64(spillIOBytes)))
	step := int64(spillStep) * 8
	mem = (share - 2*int64(io)) / step * step
	if mem < step {
		mem = -1
	}
	return mem, io
}

// pool is a counting semaphore of bytes.
type pool struct {
	mu   sync.Mutex
	cond *sync.Cond
	free int64
	size int64
}

func newPool(size int64) *pool {
	p := &pool{free: size, size: size}
	p.cond = sync.NewCond(&p.mu)
	return p
}

// edges is the pool of zero-phase edge buffers shared by all runs of the
// process.
var edges = newPool(edgePool)

// acquire takes n bytes (at most the pool's size), waiting until they
// are free or ctx is done; release gives them back.
func (p *pool) acquire(ctx context.Context, n int64) (release func(), err error) {
	n = min(n, p.size)
	stop := context.AfterFunc(ctx, func() {
		p.mu.Lock()
		p.cond.Broadcast()
		p.mu.Unlock()
	})
	defer stop()
	p.mu.Lock()
	defer p.mu.Unlock()
	for p.free < n {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		p.cond.Wait()
	}
	p.free -= n
	var once sync.Once
	return func() {
		once.Do(func() {
			p.mu.Lock()
			p.free += n
			p.cond.Broadcast()
			p.mu.Unlock()
		})
	}, nil
}

// edgeBytes is the memory of the edge buffers of a zero-phase run with
// opt on ch channels: head and tail, two pads, the fit's design matrix,
// and the copy of the tail ring taken at the end.
func edgeBytes(opt ZeroPhaseOptions, ch int) int64 {
	keep := int64(max(opt.PadFrames+1, opt.FitFrames))
	b := (3*keep + 2*int64(opt.PadFrames)) * int64(ch) * 8
	b += int64(opt.FitFrames) * int64(1+2*len(opt.ToneHz)) * 8 * 2
	return b
}

// checkState refuses a filter whose state for the channels filtered
// would pass stateBudget.
func checkState(sections, channels int) error {
	need := int64(sections) * int64(channels) * 4 * 8
	if need > stateBudget {
		return fmt.Errorf("process: unsupported: %d sections on %d channels need %d MiB of filter state, more than %d MiB; filter fewer channels or use a shorter filter", sections, channels, need>>20, stateBudget>>20)
	}
	return nil
}
