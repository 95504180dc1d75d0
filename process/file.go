package process

import (
	"context"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// FileJob is one file to filter.
type FileJob struct {
	Input  string
	Output string
	Spec   design.Spec

	// Encoding and Bits choose the output sample format; zero keeps the input's.
	Encoding wavio.Encoding
	Bits     int
	// NoDither turns off TPDF dither on integer output; DitherSeed fixes
	// its seed (0: DefaultDitherSeed of the input, so that the same input
	// gives the same output on every run; the seed used is reported).
	NoDither   bool
	DitherSeed uint64
	// Only lists the channels to filter (from 0); empty means all.
	Only []int
	// SteadyStart starts a causal run in the steady state of the first
	// frame, so a DC offset gives no start-up thump.
	SteadyStart bool
	// TempDir holds the zero-phase spill; "" means the output's folder.
	TempDir string
	// SpillMemoryBytes is the part of a zero-phase spill kept in memory
	// (ZeroPhaseOptions.SpillMemoryBytes); Run shares the default among
	// its workers so that the process stays within its memory bound.
	SpillMemoryBytes int64
	spillIOBytes     int // each spill file buffer (Run sets it); 0: 4 MiB
	// AllowNonFinite replaces NaN and infinite input samples by zero,
	// counting them per channel (FileResult.NonFinite), instead of
	// refusing the file.
	AllowNonFinite bool
	// AllowShort accepts an input that ends before the frame count its
	// header gives (a file cut short, or shortened while it is read):
	// what was read is written, with a warning. By default such a file
	// fails and no output is written.
	AllowShort bool
	// BlockFrames is the processing block; 0 means 8192 frames, fewer for
	// more than two channels (blocks of at most 128 KiB).
	BlockFrames int
	// Observe, if set, is called once the input is open and the filter
	// designed; the function it returns (if not nil) then sees every block
	// of the run in order: the input frames and the output frames as
	// computed in float64, before they are quantised to the output format
	// (interleaved, the same number of frames; it must not keep them). It
	// runs on the goroutine that writes the output; an error it returns
	// fails the file. When the file ends, done or not, that function is
	// called once more with nil, nil (so that it can let go of its
	// memory). Verification uses it to measure the filter itself rather
	// than the filter plus the output's quantisation.
	Observe func(job *FileJob, in wavio.Format, frames int64, f *design.Filter) func(in, out []float64) error
	// Progress, if set, is called after each block with the frames done,
	// from the goroutine that reads the input.
	Progress func(done, total int64)
	// NewTracker measures the hum for a tracking notch stage
	// (design.Stage.Tracking), in a first pass over the input; a spec
	// with such a stage fails without it. TrackPerChannel asks it for one
	// track per channel instead of one shared by all.
	NewTracker      NewHumTracker
	TrackPerChannel bool

	measured []FrequencyTrack // the track of this run, for Observe
}

// MeasuredTracks returns the hum's track(s) a run of a spec with a
// tracking notch stage measured and filtered along, for Observe; nil
// without one.
func (j *FileJob) MeasuredTracks() []FrequencyTrack { return j.measured }

// StageSummary is what a manifest records of one designed stage.
type StageSummary struct {
	Family   string    `json:"family"`
	Response string    `json:"response,omitempty"`
	Curve    string    `json:"curve,omitempty"` // a weighting stage's curve
	Order    int       `json:"order"`
	Sections int       `json:"sections"`
	EdgesHz  []float64 `json:"edges_hz"`
}

// FileResult is the outcome of one file. Its record (JSON and CSV) is
// written and read by package process/runrecord, which owns its columns.
type FileResult struct {
	Input         string
	Output        string
	SampleRate    int
	Channels      int
	Frames        int64
	Format        string
	OutFormat     string
	DurationS     float64
	ZeroPhase     bool
	Design        []StageSummary
	DesignDigest  string // FileJob.DesignDigest of the design and settings used
	PeakInDBFS    []float64
	PeakOutDBFS   []float64
	Clipped       []int64
	DitherSeed    uint64
	PadFrames     int
	EdgeTransient int
	// TrackRangeHz is the lowest and highest hum fundamental a tracking
	// notch followed.
	TrackRangeHz []float64
	// TrackPerChannel is true when a tracking notch followed each
	// channel's own track (FileJob.TrackPerChannel).
	TrackPerChannel bool
	Warnings        []string
	// NonFinite counts, per channel, the NaN and infinite input samples
	// replaced by zero (FileJob.AllowNonFinite); nil when there were none.
	NonFinite []int64
	Seconds   float64
	Status    string
	Error     string
	// Err is the error behind Error, for callers that tell cases apart
	// (*ShortInputError, *FormatError, *wavio.NotRegularError, ...).
	Err error
}

// Statuses of a FileResult.
const (
	StatusDone    = "done"
	StatusSkipped = "skipped"
	StatusFailed  = "failed"
)

// DefaultDitherSeed is the dither seed of an input when none is given: a
// 64-bit FNV-1a hash (a general-purpose hash, chosen for being small and
// fixed) of the input's file name, without its folder, and its size in
// bytes. The same file gives the same seed, so identical runs write
// identical bytes, wherever the file is run from; files that differ in
// name or size get unrelated dither.
func DefaultDitherSeed(input string, size int64) uint64 {
	h := fnv.New64a()
	io.WriteString(h, filepath.Base(input))
	fmt.Fprintf(h, "\x00%d", size)
	return h.Sum64() | 1
}

// DesignFor designs spec at the sample rate of a file, naming the file
// in the error.
func DesignFor(spec design.Spec, rate int, name string) (*design.Filter, error) {
	return DesignContext(context.Background(), spec, rate, name)
}

// DesignContext is DesignFor, stopped early when ctx is cancelled.
func DesignContext(ctx context.Context, spec design.Spec, rate int, name string) (*design.Filter, error) {
	f, err := design.DesignContext(ctx, spec, float64(rate))
	if err != nil {
		if ctx.Err() != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		return nil, fmt.Errorf("%s: at this file's %d Hz rate: %w", name, rate, err)
	}
	return f, nil
}

// ShortInputError reports an input that ended before the frame count
// its header gives (FileJob.AllowShort accepts it).
type ShortInputError struct {
	Input          string
	Read, Declared int64
}

func (e *ShortInputError) Error() string {
	return fmt.Sprintf("%s: the input ended after %d of the %d frames its header gives (cut short, or changed while it was read); no output was written", e.Input, e.Read, e.Declared)
}

// FormatError reports an output format the writer cannot produce for an
// input (for example a sample rate whose byte rate passes 32 bits).
type FormatError struct {
	Input  string
	Format wavio.Format
	Err    error
}

func (e *FormatError) Error() string {
	return fmt.Sprintf("%s: cannot write the output as %s: %v; choose another output sample format", e.Input, e.Format, e.Err)
}

func (e *FormatError) Unwrap() error { return e.Err }

// FilterFile designs the spec at the input's sample rate, filters the
// input and writes the output through a temporary file that is renamed
// into place only when everything succeeded. The input is never
// modified. Cancelling ctx stops the run between blocks and removes the
// temporary file.
func FilterFile(ctx context.Context, job FileJob) (res FileResult, err error) {
	start := time.Now()
	res = FileResult{Input: job.Input, Output: job.Output, ZeroPhase: job.Spec.ZeroPhase, Status: StatusFailed}
	defer func() {
		res.Seconds = time.Since(start).Seconds()
		if err != nil {
			res.Error, res.Err = err.Error(), err
		} else {
			res.Status = StatusDone
		}
	}()
	same, serr := wavio.SameFile(job.Input, job.Output)
	if serr == nil && same {
		return res, fmt.Errorf("%s: the output is the input file itself; choose another output", job.Input)
	}
	if err := wavio.CheckOutputPath(job.Output); err != nil {
		return res, fmt.Errorf("%s: the output %s: %w; it was not written by this program: remove it or choose another output folder", job.Input, job.Output, err)
	}
	r, err := wavio.Open(job.Input, &wavio.ReaderOptions{ZeroNonFinite: job.AllowNonFinite})
	if err != nil {
		return res, fmt.Errorf("%s: %w", job.Input, err)
	}
	defer r.Close()
	// The reader's warnings, those found while streaming included, go
	// to the result whatever the outcome.
	defer func() {
		for _, w := range r.Warnings() {
			res.Warnings = append(res.Warnings, w.String())
		}
	}()
	inF := r.Format()
	res.SampleRate, res.Channels, res.Frames = inF.SampleRate, inF.Channels, r.Frames()
	if c := r.ClaimedFrames(); c > r.Frames() && !job.AllowShort {
		// Cut short on disk before this run: the same failure as a file
		// that shrinks while it is read.
		return res, &ShortInputError{Input: job.Input, Read: r.Frames(), Declared: c}
	}
	res.Format = inF.String()
	res.DurationS = float64(res.Frames) / float64(inF.SampleRate)
	filt, err := DesignContext(ctx, job.Spec, inF.SampleRate, job.Input)
	if err != nil {
		return res, err
	}
	filtered := inF.Channels
	if len(job.Only) > 0 {
		filtered = len(job.Only)
	}
	if err := checkState(len(filt.Sections()), filtered); err != nil {
		return res, fmt.Errorf("%s: %w", job.Input, err)
	}
	res.Warnings = append(res.Warnings, filt.Warnings()...)
	for _, st := range filt.Stages {
		res.Design = append(res.Design, StageSummary{Family: st.Family, Response: st.Response, Curve: st.Spec.Curve, Order: st.Order, Sections: len(st.Sections), EdgesHz: st.EdgesHz})
	}
	block := job.BlockFrames
	if block <= 0 {
		block = blockFramesFor(inF.Channels)
	}
	tIdx, err := trackingStage(filt)
	if err != nil {
		return res, fmt.Errorf("%s: %w", job.Input, err)
	}
	var trk *tracked
	if tIdx >= 0 {
		if trk, err = trackPass(ctx, &job, filt, tIdx, block); err != nil {
			return res, fmt.Errorf("%s: tracking the hum: %w (wavsieve survey shows what hum the file holds; without tracking a fixed notch runs)", job.Input, err)
		}
		res.TrackRangeHz = []float64{trk.lo, trk.hi}
		res.TrackPerChannel = job.TrackPerChannel
		res.Warnings = append(res.Warnings, trk.warnings(filt.Stages[tIdx].Spec.FundamentalHz)...)
		job.measured = trk.tracks
	}
	outF := job.OutputFormat(inF)
	res.OutFormat = outF.String()
	if err := outF.Writable(); err != nil {
		return res, &FormatError{Input: job.Input, Format: outF, Err: err}
	}
	res.DesignDigest = job.DesignDigest(filt, outF)
	seed := job.DitherSeed
	if seed == 0 && !job.NoDither {
		if st, err := os.Stat(job.Input); err == nil {
			seed = DefaultDitherSeed(job.Input, st.Size())
		}
	}
	w, err := wavio.Create(job.Output, wavio.WriterOptions{Format: outF, Chunks: r.Chunks(), NoDither: job.NoDither, DitherSeed: seed})
	if err != nil {
		return res, fmt.Errorf("%s: writing %s: %w", job.Input, job.Output, err)
	}
	committed := false
	defer func() {
		if !committed {
			w.Abort()
		}
	}()
	res.DitherSeed = w.DitherSeed()
	if hasChunk(r.Chunks(), "bext") {
		line := wavio.CodingHistoryLine(outF, "wavsieve "+describe(filt))
		if err := w.AppendCodingHistory(line); err != nil {
			return res, fmt.Errorf("%s: bext: %w", job.Output, err)
		}
	}
	// The input is read and decoded on one goroutine, a few blocks
	// ahead, and the output encoded and written on another, a few
	// blocks behind: the filtering in between sees the same blocks in
	// the same order, so the output is the same.
	src := &peakSource{ctx: ctx, r: r, peak: make([]float64, inF.Channels), total: res.Frames, progress: job.Progress}
	outPeak := make([]float64, inF.Channels)
	cfg := Config{Channels: inF.Channels, Only: job.Only, SteadyStart: job.SteadyStart}
	var out FrameSink = w
	if job.Observe != nil {
		if see := job.Observe(&job, inF, res.Frames, filt); see != nil {
			t, err := newTapSink(w, job.Input, see, block)
			if err != nil {
				see(nil, nil)
				return res, err
			}
			defer t.close()
			out = t
		}
	}
	// In a zero-phase run reading is the forward pass and writing ends the
	// backward one: each counts for half of the work.
	var halfway *halves
	if job.Spec.ZeroPhase && job.Progress != nil {
		halfway = &halves{fn: job.Progress, total: res.Frames}
		src.progress = halfway.read
	}
	ra := newReadAhead(src, inF.Channels, block)
	defer ra.close()
	if job.Spec.ZeroPhase {
		var opt ZeroPhaseOptions
		if trk != nil {
			c, tv, err := trackedCascade(filt, trk, cfg)
			if err != nil {
				return res, fmt.Errorf("%s: %w", job.Input, err)
			}
			opt = trackedZeroPhaseOptions(filt, trk, c, tv, res.Frames, inF.Channels, block)
		} else {
			opt = zeroPhaseOptions(filt, res.Frames, inF.Channels, block)
		}
		opt.SpillMemoryBytes = job.SpillMemoryBytes
		opt.ioBytes = job.spillIOBytes
		opt.TempDir = job.TempDir
		// The edge buffers come from the pool shared by every file of
		// the process (see MemoryBudget).
		release, err := edges.acquire(ctx, edgeBytes(opt, inF.Channels))
		if err != nil {
			return res, fmt.Errorf("%s: %w", job.Input, err)
		}
		defer release()
		if opt.TempDir == "" {
			opt.TempDir = dirOf(job.Output)
		}
		sink := out
		if halfway != nil {
			sink = &countingSink{dst: out, ch: inF.Channels, add: halfway.wrote}
		}
		wb := newWriteBehind(sink, outPeak, block, nil)
		rep, zerr := ZeroPhase(wb, ra, filt.Sections(), cfg, opt)
		werr := wb.close()
		ra.close()
		if zerr != nil {
			return res, fmt.Errorf("%s: %w", job.Input, firstErr(src.err, zerr))
		}
		if werr != nil {
			return res, fmt.Errorf("%s: %w", job.Input, werr)
		}
		res.PadFrames, res.EdgeTransient = rep.PadFrames, rep.TransientFrames
	} else {
		var err error
		if trk != nil {
			var c *Cascade
			var tv *trackComb
			if c, tv, err = trackedCascade(filt, trk, cfg); err == nil {
				if err = preroll(filt, trk, c, tv, inF.Channels); err == nil {
					err = causalWith(out, outPeak, ra, c)
				}
			}
		} else {
			err = causal(out, outPeak, ra, filt.Sections(), cfg)
		}
		ra.close()
		if err != nil {
			return res, fmt.Errorf("%s: %w", job.Input, err)
		}
	}
	if n, first := r.NonFinite(); n > 0 {
		res.NonFinite = r.NonFiniteByChannel()
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d NaN or infinite input samples replaced by zero, the first at frame %d channel %d", n, first.Frame, first.Channel+1))
	}
	if src.done < res.Frames {
		if !job.AllowShort {
			return res, &ShortInputError{Input: job.Input, Read: src.done, Declared: res.Frames}
		}
		res.Warnings = append(res.Warnings, fmt.Sprintf("the input ended after %d of the %d frames its header gives; the output holds the %d read", src.done, res.Frames, src.done))
		res.Frames = src.done
		res.DurationS = float64(res.Frames) / float64(inF.SampleRate)
	}
	res.Clipped = w.Clipped()
	if err := w.Close(); err != nil {
		return res, fmt.Errorf("%s: %w", job.Output, err)
	}
	committed = true
	res.PeakInDBFS, res.PeakOutDBFS = dbfs(src.peak), dbfs(outPeak)
	return res, nil
}

// zeroPhaseOptions sizes the padding from the decay of the chain's
// transients: 80 dB, so that what is left at the ends is below the
// quantisation of 16-bit audio relative to the signal (common practice
// is to pad by several time constants). Notch stages extend by their
// fitted hum instead of by reflection.
//
// The pad is at most the file's own length, and at most what the edge
// buffers hold for the channel count: a filter that rings for longer
// (poles within a hair of the unit circle) is padded that far, and the
// rest of its decay is reported as the transient left at each end.
func zeroPhaseOptions(f *design.Filter, frames int64, channels, block int) ZeroPhaseOptions {
	const decayDB = 80
	decay := f.DecaySamples(decayDB, 0)
	pad := int64(decay)
	pad = min(pad, max(frames, 1))
	ch := int64(max(channels, 1))
	// The engine holds four pad-length buffers (head, tail and the two
	// pads) and two fit-length ones per channel: a quarter of its budget
	// goes to the pads, half to the fit.
	pad = min(pad, int64(memBudget/4)/(4*8*ch))
	opt := ZeroPhaseOptions{PadFrames: int(pad), DecayFrames: decay, BlockFrames: block, SampleRateHz: f.SampleRate}
	var tones []float64
	for _, st := range f.Stages {
		tones = append(tones, st.NotchHz...)
	}
	if len(tones) > 0 {
		opt.Extension = ExtendTones
		opt.ToneHz = tones
		// One second of fit, or what the file has: enough to tell apart
		// tones 1 Hz apart (common practice: resolution ~ 1 / length).
		cols := int64(1 + 2*len(tones))
		fit := int64(f.SampleRate)
		fit = min(fit, frames/2, int64(memBudget/2)/(16*ch+16*cols))
		if fit < 2*cols {
			// Too many tones for the file or the memory: reflect instead.
			opt.Extension, opt.ToneHz = ExtendOdd, nil
			return opt
		}
		opt.FitFrames = int(fit)
	}
	return opt
}

// causal streams the blocks of src through the cascade into dst, in
// place, tracking the output's peaks: each block goes from the reading
// goroutine to the filter and on to the writing goroutine, which hands
// it back to the reader.
func causal(dst FrameSink, peak []float64, src *readAhead, sos []design.Section, cfg Config) error {
	c, err := NewCascade(sos, cfg)
	if err != nil {
		return err
	}
	return causalWith(dst, peak, src, c)
}

// causalWith is causal with a cascade ready to run.
func causalWith(dst FrameSink, peak []float64, src *readAhead, c *Cascade) error {
	wb := newWriteBehind(dst, peak, 0, src.free)
	for {
		p, rerr := src.next()
		if len(p) > 0 {
			c.Process(p, p)
			trackPeaks(peak, p)
			if err := wb.put(p); err != nil {
				break // wb.close reports it
			}
		} else if p != nil {
			src.free <- p[:cap(p)]
		}
		if rerr != nil {
			if werr := wb.close(); werr != nil {
				return werr
			}
			if errors.Is(rerr, io.EOF) {
				return nil
			}
			return rerr
		}
	}
	return wb.close()
}

// aheadBlocks is the number of blocks in flight between two goroutines
// of a file run: 4, fewer for blocks of many channels, so that they
// stay within 8 MiB (never fewer than 2).
func aheadBlocks(block, ch int) int {
	return max(2, min(4, (8<<20)/max(1, 8*block*ch)))
}

// readAhead reads a FrameSource on its own goroutine into aheadBlocks
// blocks and hands them over in order, through next (the block itself)
// or ReadFrames (a copy). close stops the goroutine; only then may the
// source be closed or its fields read.
type readAhead struct {
	ch     int
	free   chan []float64 // empty blocks, full length
	full   chan aheadBlock
	stop   chan struct{}
	exited chan struct{}
	cur    []float64 // block being read by ReadFrames
	off    int
	err    error // error that came with the last block
	closed bool
}

type aheadBlock struct {
	p   []float64
	err error
}

func newReadAhead(src FrameSource, ch, block int) *readAhead {
	n := aheadBlocks(block, ch)
	r := &readAhead{
		ch:     ch,
		free:   make(chan []float64, n),
		full:   make(chan aheadBlock, n),
		stop:   make(chan struct{}),
		exited: make(chan struct{}),
	}
	for range n {
		r.free <- make([]float64, block*ch)
	}
	go func() {
		defer close(r.exited)
		for {
			var p []float64
			select {
			case p = <-r.free:
			case <-r.stop:
				return
			}
			n, err := src.ReadFrames(p)
			r.full <- aheadBlock{p[:n*ch], err} // never blocks: room for every block
			if err != nil {
				return
			}
		}
	}()
	return r
}

// next returns the next block (nil after the source's error) and the
// error the source returned with it. The caller owns the block until it
// sends it, full length, to r.free.
func (r *readAhead) next() ([]float64, error) {
	if r.err != nil {
		return nil, r.err
	}
	b := <-r.full
	r.err = b.err
	return b.p, b.err
}

// ReadFrames copies the next frames into dst, as FrameSource.
func (r *readAhead) ReadFrames(dst []float64) (int, error) {
	for r.off == len(r.cur) {
		if r.cur != nil {
			r.free <- r.cur[:cap(r.cur)]
			r.cur = nil
		}
		if r.err != nil {
			return 0, r.err
		}
		p, err := r.next()
		if len(p) == 0 && err == nil {
			r.free <- p[:cap(p)]
			continue
		}
		r.cur, r.off = p, 0
	}
	n := copy(dst[:len(dst)/r.ch*r.ch], r.cur[r.off:])
	r.off += n
	if r.off == len(r.cur) && r.err != nil {
		return n / r.ch, r.err
	}
	return n / r.ch, nil
}

func (r *readAhead) close() {
	if !r.closed {
		r.closed = true
		close(r.stop)
		<-r.exited
	}
}

// writeBehind writes to a FrameSink on its own goroutine. put hands a
// block over; WriteFrames tracks the peaks of the frames per channel
// (in the caller's goroutine, which has less to do than the encoder)
// and copies them into blocks of its own. Written blocks go, full
// length, to free. close waits for the writes and returns the first
// error; after an error the remaining blocks are dropped.
type writeBehind struct {
	peak   []float64 // one per channel
	full   chan []float64
	free   chan []float64
	exited chan struct{}
	failed atomic.Bool
	err    error // set before failed
	closed bool
}

// newWriteBehind returns a writeBehind for frames of len(peak) channels
// that sends written blocks to free, or with free nil to a pool of
// aheadBlocks blocks of block frames for WriteFrames.
func newWriteBehind(dst FrameSink, peak []float64, block int, free chan []float64) *writeBehind {
	n := aheadBlocks(block, len(peak))
	w := &writeBehind{peak: peak, full: make(chan []float64, n), free: free, exited: make(chan struct{})}
	if free == nil {
		w.free = make(chan []float64, n)
		for range n {
			w.free <- make([]float64, block*len(peak))
		}
	}
	go func() {
		defer close(w.exited)
		for p := range w.full {
			if !w.failed.Load() {
				if err := dst.WriteFrames(p); err != nil {
					w.err = err
					w.failed.Store(true)
				}
			}
			w.free <- p[:cap(p)]
		}
	}()
	return w
}

func (w *writeBehind) put(p []float64) error {
	if w.failed.Load() {
		w.free <- p[:cap(p)]
		return w.err
	}
	w.full <- p
	return nil
}

func (w *writeBehind) WriteFrames(src []float64) error {
	trackPeaks(w.peak, src)
	for len(src) > 0 {
		if w.failed.Load() {
			return w.err
		}
		p := <-w.free
		n := copy(p, src)
		w.full <- p[:n]
		src = src[n:]
	}
	return nil
}

func (w *writeBehind) close() error {
	if !w.closed {
		w.closed = true
		close(w.full)
		<-w.exited
	}
	return w.err
}

// peakSource reads from a wavio.Reader, tracks each channel's peak,
// reports progress and stops when ctx is cancelled.
type peakSource struct {
	ctx      context.Context
	r        *wavio.Reader
	peak     []float64
	done     int64
	total    int64
	progress func(done, total int64)
	err      error
}

func (p *peakSource) ReadFrames(dst []float64) (int, error) {
	if err := p.ctx.Err(); err != nil {
		p.err = err
		return 0, err
	}
	n, err := p.r.ReadFrames(dst)
	trackPeaks(p.peak, dst[:n*len(p.peak)])
	p.done += int64(n)
	if p.progress != nil {
		p.progress(p.done, p.total)
	}
	if err != nil && !errors.Is(err, io.EOF) {
		p.err = err
	}
	return n, err
}

// halves reports the progress of a zero-phase run from two goroutines:
// frames read (the forward pass) and frames written (after the backward
// pass), each half of the work.
type halves struct {
	mu     sync.Mutex
	fn     func(done, total int64)
	total  int64
	rd, wr int64
}

func (h *halves) read(done, _ int64) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.rd = done
	h.fn((h.rd+h.wr)/2, h.total)
}

func (h *halves) wrote(n int64) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.wr += n
	h.fn((h.rd+h.wr)/2, h.total)
}

// tapSink shows each output block, with the input frames at the same
// place read from a second reader of the input, to see, then passes the
// block on to dst.
type tapSink struct {
	dst FrameSink
	r   *wavio.Reader
	see func(in, out []float64) error
	buf []float64
	ch  int
}

func newTapSink(dst FrameSink, input string, see func(in, out []float64) error, block int) (*tapSink, error) {
	r, err := wavio.Open(input, &wavio.ReaderOptions{AllowNonFinite: true})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", input, err)
	}
	ch := r.Format().Channels
	return &tapSink{dst: dst, r: r, see: see, buf: make([]float64, block*ch), ch: ch}, nil
}

func (t *tapSink) WriteFrames(src []float64) error {
	for at := 0; at < len(src); {
		n := min(len(src)-at, len(t.buf))
		got := 0
		for got < n {
			k, err := t.r.ReadFrames(t.buf[got:n])
			got += k * t.ch
			if err != nil {
				if got < n {
					return fmt.Errorf("process: reading the input again for the measurement: %w", noEOF(err))
				}
				break
			}
		}
		if err := t.see(t.buf[:n], src[at:at+n]); err != nil {
			return err
		}
		at += n
	}
	return t.dst.WriteFrames(src)
}

func (t *tapSink) close() {
	t.see(nil, nil)
	t.r.Close()
}

func noEOF(err error) error {
	if errors.Is(err, io.EOF) {
		return io.ErrUnexpectedEOF
	}
	return err
}

// countingSink passes frames on to dst and counts them.
type countingSink struct {
	dst FrameSink
	ch  int
	add func(frames int64)
}

func (c *countingSink) WriteFrames(src []float64) error {
	err := c.dst.WriteFrames(src)
	c.add(int64(len(src) / c.ch))
	return err
}

// trackPeaks raises peak[k] to the largest |x| of channel k in the
// interleaved frames of x (NaN is never larger).
func trackPeaks(peak, x []float64) {
	ch := len(peak)
	if ch == 2 {
		l, r := peak[0], peak[1]
		for i := 0; i+1 < len(x); i += 2 {
			if a := math.Abs(x[i]); a > l {
				l = a
			}
			if a := math.Abs(x[i+1]); a > r {
				r = a
			}
		}
		peak[0], peak[1] = l, r
		return
	}
	for i := 0; i+ch <= len(x); i += ch {
		for k, v := range x[i : i+ch] {
			if a := math.Abs(v); a > peak[k] {
				peak[k] = a
			}
		}
	}
}

func dbfs(peak []float64) []float64 {
	out := make([]float64, len(peak))
	for i, v := range peak {
		out[i] = math.Round(20*math.Log10(math.Max(v, 1e-15))*100) / 100
	}
	return out
}

func hasChunk(c []wavio.Chunk, id string) bool {
	for _, v := range c {
		if v.ID == id {
			return true
		}
	}
	return false
}

// describe is the free text of the CodingHistory line: what was done.
func describe(f *design.Filter) string {
	var parts []string
	for _, st := range f.Stages {
		s := fmt.Sprintf("%s %s order %d", st.Family, st.Response, st.Order)
		if st.Form == design.FormNotch {
			s = fmt.Sprintf("notch x%d from %g Hz", len(st.NotchHz), st.NotchHz[0])
		} else if st.Weighting != nil {
			s = fmt.Sprintf("%s (%s), %d poles", st.Weighting.Name(), st.Weighting.Standard, len(st.ZPK.Poles))
		} else {
			var e []string
			for _, hz := range st.EdgesHz {
				e = append(e, fmt.Sprintf("%.6g", hz))
			}
			s += " at " + strings.Join(e, "/") + " Hz"
		}
		parts = append(parts, s)
	}
	mode := "causal"
	if f.ZeroPhase {
		mode = "zero-phase"
	}
	return "filter " + mode + ": " + strings.Join(parts, "; ")
}

func firstErr(a, b error) error {
	if a != nil {
		return a
	}
	return b
}

func dirOf(name string) string {
	i := strings.LastIndexAny(name, string(os.PathSeparator)+"/")
	if i < 0 {
		return "."
	}
	if i == 0 {
		return "/"
	}
	return name[:i]
}
