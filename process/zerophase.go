package process

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sync"
	"time"
	"unsafe"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// Extension chooses how the zero-phase functions extend the signal
// beyond its ends before filtering.
type Extension int

const (
	// ExtendOdd reflects the signal about its end values:
	// 2*x[0] - x[pad..1] before the start and 2*x[N-1] - x[N-2..N-1-pad]
	// after the end (scipy.signal.sosfiltfilt, padtype='odd').
	ExtendOdd Extension = iota
	// ExtendTones fits, per channel, a constant plus a sine and a cosine
	// at each of ToneHz by least squares to the first and to the last
	// FitFrames frames, and extrapolates each model into the pad. For
	// notch stages: a reflected hum does not continue the hum in phase,
	// so the notch rings at the ends; the fitted hum does, and the ends
	// come out clean.
	ExtendTones
)

// ZeroPhaseOptions are the parameters of a forward-backward run.
type ZeroPhaseOptions struct {
	// PadFrames is the length of the extension at each end, sized by the
	// caller from the decay of the filter's impulse response. With
	// ExtendOdd it is shortened to frames-1 on a shorter signal.
	PadFrames int
	// DecayFrames is the number of frames the caller considers the
	// impulse response to need to die out. It only feeds the report.
	DecayFrames int

	Extension Extension
	// ToneHz, SampleRateHz and FitFrames are for ExtendTones. Each
	// frequency must lie strictly between 0 and SampleRateHz/2, and the
	// fit needs at least 1 + 2*len(ToneHz) frames.
	ToneHz []float64
	// ToneHzEnd, if set, are the frequencies fitted at the end of the
	// signal instead of ToneHz (as many as ToneHz): a hum that drifted.
	ToneHzEnd    []float64
	SampleRateHz float64
	FitFrames    int

	// TempDir is the directory of the spill file of ZeroPhase; "" means
	// os.TempDir(). ZeroPhaseSlice does not use it.
	TempDir string
	// SpillMemoryBytes is how much of the spill ZeroPhase keeps in memory
	// before it goes to the file (rounded down to 8 MiB steps): 0 means
	// 112 MiB, a negative value none.
	SpillMemoryBytes int64
	// BlockFrames is the block length of the passes; 0 means 8192.
	BlockFrames int

	ioBytes int // each spill file buffer; 0 means spillIOBytes

	// cascade, if set, is the filter to run instead of one built from
	// the sections (a cascade with tracking notches).
	cascade *Cascade
}

// EdgeReport describes the edges of a zero-phase run.
type EdgeReport struct {
	Frames int // frames in the signal
	// PadFrames is the extension used at each end; PadShortened is true
	// when it is less than the requested PadFrames because the signal
	// was too short.
	PadFrames    int
	PadShortened bool
	// FitFrames is the number of frames fitted at each end (ExtendTones).
	FitFrames int
	// TransientFrames estimates how many frames at each end may still
	// carry a start-up transient: DecayFrames - PadFrames, or 0.
	TransientFrames int
}

// FrameSource delivers interleaved frames in forward order. ReadFrames
// works like io.Reader.Read: it fills dst with up to len(dst)/channels
// whole frames, returns how many, and io.EOF at the end; the caller
// uses the frames before looking at the error. It must not keep dst.
type FrameSource interface {
	ReadFrames(dst []float64) (frames int, err error)
}

// FrameSink receives interleaved frames in forward order. It must not
// keep src after returning.
type FrameSink interface {
	WriteFrames(src []float64) error
}

// memBudget bounds the buffers held for the edges (head, tail, pads, the
// tone fit) and spillMemory the part of the spill held in memory, so
// that peak memory stays under 200 MB whatever the file size.
const (
	memBudget   = 48 << 20
	spillMemory = 112 << 20
)

const defaultBlockFrames = 8192

// ZeroPhase filters src forward and then backward with the sections and
// writes the result to dst in forward order, streaming: the forward
// pass goes to a float64 spill (its first opt.SpillMemoryBytes in
// memory, the rest in a file in opt.TempDir, removed before returning),
// the backward pass runs over it from the end and overwrites it with
// the final values, and a last forward read feeds dst. The file is read
// and written in 4 MiB segments by a second goroutine while the first
// filters; the result does not depend on its timing. Memory stays
// bounded (edge buffers under 48 MiB, the in-memory spill, two 4 MiB
// file buffers, a few blocks); disk use is 8 bytes per sample beyond
// the in-memory part.
//
// The edges follow scipy.signal.sosfiltfilt: the signal is extended at
// both ends (opt.Extension), the forward pass starts in the steady state
// of its first extended frame and the backward pass in the steady
// state of the last forward output. The result equals
// ZeroPhaseSlice's bit for bit.
func ZeroPhase(dst FrameSink, src FrameSource, sos []design.Section, cfg Config, opt ZeroPhaseOptions) (EdgeReport, error) {
	z, err := newZeroPhase(sos, cfg, opt)
	if err != nil {
		return EdgeReport{}, err
	}
	mem := int64(spillMemory)
	if opt.SpillMemoryBytes != 0 {
		mem = max(0, opt.SpillMemoryBytes)
	}
	st := newSpillStore(z.ch, int(mem/8)/spillStep*spillStep, z.block, opt.ioBytes, opt.TempDir)
	defer st.close()
	rep, err := z.run(src, st)
	if err != nil {
		return rep, err
	}
	return rep, st.deliver(dst, rep.Frames, z.block)
}

// ZeroPhaseSlice is ZeroPhase for a signal held in memory: it filters
// the interleaved frames of src into dst and returns dst. dst may be src;
// a nil dst is allocated. It panics if len(src) is not a whole number
// of frames or if dst is not nil and len(dst) != len(src).
func ZeroPhaseSlice(dst, src []float64, sos []design.Section, cfg Config, opt ZeroPhaseOptions) ([]float64, EdgeReport, error) {
	z, err := newZeroPhase(sos, cfg, opt)
	if err != nil {
		return dst, EdgeReport{}, err
	}
	if len(src)%z.ch != 0 {
		panic(fmt.Sprintf("process: ZeroPhaseSlice: %d samples is not a whole number of %d-channel frames", len(src), z.ch))
	}
	if dst == nil {
		dst = make([]float64, len(src))
	}
	if len(dst) != len(src) {
		panic(fmt.Sprintf("process: ZeroPhaseSlice: len(dst) = %d, len(src) = %d", len(dst), len(src)))
	}
	st := &spillStore{ch: z.ch, mem: dst, memFrames: len(dst) / z.ch}
	rep, err := z.run(&sliceSource{x: src, ch: z.ch}, st)
	return dst, rep, err
}

type zeroPhase struct {
	c        *Cascade
	ch       int
	block    int
	opt      ZeroPhaseOptions
	omega    []float64 // tone frequencies, radians per frame
	omegaEnd []float64 // at the end of the signal
}

func newZeroPhase(sos []design.Section, cfg Config, opt ZeroPhaseOptions) (*zeroPhase, error) {
	cfg.SteadyStart = false
	c := opt.cascade
	if c == nil {
		var err error
		if c, err = NewCascade(sos, cfg); err != nil {
			return nil, err
		}
	}
	z := &zeroPhase{c: c, ch: cfg.Channels, block: opt.BlockFrames, opt: opt}
	if z.block == 0 {
		z.block = defaultBlockFrames
	}
	if z.block < 0 {
		return nil, fmt.Errorf("process: invalid block length %d frames", opt.BlockFrames)
	}
	if opt.PadFrames < 0 {
		return nil, fmt.Errorf("process: invalid pad length %d frames", opt.PadFrames)
	}
	if opt.DecayFrames < 0 {
		return nil, fmt.Errorf("process: invalid decay length %d frames", opt.DecayFrames)
	}
	switch opt.Extension {
	case ExtendOdd:
	case ExtendTones:
		if !(opt.SampleRateHz > 0) || math.IsInf(opt.SampleRateHz, 0) {
			return nil, fmt.Errorf("process: invalid sample rate %v Hz for the tone extension", opt.SampleRateHz)
		}
		if len(opt.ToneHz) == 0 {
			return nil, errors.New("process: tone extension without frequencies")
		}
		for _, f := range opt.ToneHz {
			if !(f > 0 && f < opt.SampleRateHz/2) {
				return nil, fmt.Errorf("process: invalid tone frequency %v Hz: must lie between 0 and %v Hz (Nyquist)", f, opt.SampleRateHz/2)
			}
			z.omega = append(z.omega, 2*math.Pi*f/opt.SampleRateHz)
		}
		z.omegaEnd = z.omega
		if opt.ToneHzEnd != nil {
			if len(opt.ToneHzEnd) != len(opt.ToneHz) {
				return nil, fmt.Errorf("process: %d tone frequencies at the end for %d at the start", len(opt.ToneHzEnd), len(opt.ToneHz))
			}
			z.omegaEnd = nil
			for _, f := range opt.ToneHzEnd {
				if !(f > 0 && f < opt.SampleRateHz/2) {
					return nil, fmt.Errorf("process: invalid tone frequency %v Hz: must lie between 0 and %v Hz (Nyquist)", f, opt.SampleRateHz/2)
				}
				z.omegaEnd = append(z.omegaEnd, 2*math.Pi*f/opt.SampleRateHz)
			}
		}
		if opt.FitFrames < 1+2*len(opt.ToneHz) {
			return nil, fmt.Errorf("process: invalid fit length %d frames: %d tones need at least %d", opt.FitFrames, len(opt.ToneHz), 1+2*len(opt.ToneHz))
		}
	default:
		return nil, fmt.Errorf("process: unsupported extension %d", opt.Extension)
	}
	// Head and tail buffers, two pad buffers, and the fit's design matrix.
	edge := float64(2*(opt.PadFrames+1+opt.FitFrames)+2*opt.PadFrames) * float64(z.ch) * 8
	edge += float64(opt.FitFrames) * float64(1+2*len(opt.ToneHz)) * 8 * 2
	if edge > memBudget {
		return nil, fmt.Errorf("process: unsupported edge length: pad of %d and fit of %d frames need %.0f MB, more than %d MB", opt.PadFrames, opt.FitFrames, edge/1e6, memBudget>>20)
	}
	return z, nil
}

// run does the forward pass into st, then the backward pass in place
// in st. Positions in st are sample indices of the signal.
func (z *zeroPhase) run(src FrameSource, st *spillStore) (EdgeReport, error) {
	ch, c := z.ch, z.c
	rep := EdgeReport{PadFrames: z.opt.PadFrames}
	pad := z.opt.PadFrames
	keep := pad + 1 // frames kept at each end
	if z.opt.Extension == ExtendTones {
		keep = max(keep, z.opt.FitFrames)
	}

	// Head: the first keep frames, to build the left extension.
	head := make([]float64, keep*ch)
	nh, eof, err := readFull(src, head, ch)
	if err != nil {
		return rep, err
	}
	head = head[:nh*ch]
	if nh == 0 {
		return EdgeReport{}, nil
	}
	if eof {
		rep.Frames = nh
	}
	if z.opt.Extension == ExtendOdd && eof && pad > nh-1 {
		pad = nh - 1
		rep.PadFrames, rep.PadShortened = pad, true
	}
	padBuf := make([]float64, pad*ch)
	if err := z.extendLeft(padBuf, head, &rep); err != nil {
		return rep, err
	}
	first := head[:ch]
	if pad > 0 {
		first = padBuf[:ch]
	}
	c.Reset()
	c.Prime(first)
	c.Process(padBuf, padBuf) // output before the signal is not wanted

	// Forward pass over the signal, keeping the last keep input frames.
	// The frames are read straight into the store's memory or its file
	// buffer and filtered there in place, block by block while they are
	// in cache.
	tail := newRing(keep, ch)
	last := make([]float64, ch) // last forward output
	ps := &prefixSource{pre: head, src: src, ch: ch, eof: eof}
	forward := func(p []float64) (frames int, eof bool, err error) {
		n, eof, err := readFull(ps, p, ch)
		if err != nil || n == 0 {
			return 0, eof, err
		}
		q := p[:n*ch]
		tail.push(q)
		c.Process(q, q)
		copy(last, q[len(q)-ch:])
		return n, eof, nil
	}
	at := 0 // frames done
	for done := false; !done; {
		if m := st.memSpan(at); m != nil {
			st.prefault(at)
			n, eof, err := forward(m[:min(len(m), z.block*ch)])
			if err != nil {
				return rep, err
			}
			at, done = at+n, eof
			continue
		}
		buf, err := st.fileBuf()
		if err != nil {
			return rep, err
		}
		off := 0
		for off < len(buf) && !done {
			n, eof, err := forward(buf[off:min(off+z.block*ch, len(buf))])
			if err != nil {
				return rep, err
			}
			off, done = off+n*ch, eof
		}
		st.fileWrite(buf[:off])
		at += off / ch
	}
	frames := at
	rep.Frames = frames

	// Right extension, filtered forward; its output is the start of the
	// backward pass.
	if err := z.extendRight(padBuf, tail.frames(), &rep); err != nil {
		return rep, err
	}
	c.Process(padBuf, padBuf)
	if pad > 0 {
		copy(last, padBuf[len(padBuf)-ch:])
	}

	// Backward pass: the right extension, then the signal from its end,
	// in place (Cascade.processReverse).
	c.Reset()
	c.Prime(last)
	c.processReverse(padBuf)
	if err := st.backward(c, frames); err != nil {
		return rep, err
	}
	rep.TransientFrames = max(0, z.opt.DecayFrames-rep.PadFrames)
	return rep, nil
}

// extendLeft fills pad (the frames before the signal, in time order)
// from the head of the signal.
func (z *zeroPhase) extendLeft(pad, head []float64, rep *EdgeReport) error {
	ch := z.ch
	n := len(pad) / ch
	if z.opt.Extension == ExtendOdd {
		// pad[j] = 2*x[0] - x[n-j]
		for j := 0; j < n; j++ {
			for k := 0; k < ch; k++ {
				pad[j*ch+k] = 2*head[k] - head[(n-j)*ch+k]
			}
		}
		return nil
	}
	fit := min(z.opt.FitFrames, len(head)/ch)
	rep.FitFrames = fit
	return z.extrapolate(pad, head[:fit*ch], -n, z.omega)
}

// extendRight fills pad (the frames after the signal) from the last
// frames of the signal, oldest first.
func (z *zeroPhase) extendRight(pad, tail []float64, rep *EdgeReport) error {
	ch := z.ch
	n := len(pad) / ch
	m := len(tail) / ch
	if z.opt.Extension == ExtendOdd {
		// pad[j] = 2*x[N-1] - x[N-2-j]
		for j := 0; j < n; j++ {
			for k := 0; k < ch; k++ {
				pad[j*ch+k] = 2*tail[(m-1)*ch+k] - tail[(m-2-j)*ch+k]
			}
		}
		return nil
	}
	fit := min(z.opt.FitFrames, m)
	rep.FitFrames = min(rep.FitFrames, fit)
	return z.extrapolate(pad, tail[(m-fit)*ch:], fit, z.omegaEnd)
}

// extrapolate fits x[t] = c + sum_k (a_k cos(w_k t) + b_k sin(w_k t)),
// t = 0..len(x)/ch-1, per channel by least squares (QR), and writes the
// model at t = from, from+1, ... into pad.
func (z *zeroPhase) extrapolate(pad, x []float64, from int, omega []float64) error {
	ch := z.ch
	cs, err := fitTones(x, ch, omega)
	if err != nil {
		return err
	}
	r := make([]float64, 1+2*len(omega))
	for j := 0; j < len(pad)/ch; j++ {
		toneRow(r, float64(from+j), omega)
		for k := 0; k < ch; k++ {
			v := 0.0
			for i, ri := range r {
				v += ri * cs.Data[i*cs.Stride+k]
			}
			pad[j*ch+k] = v
		}
	}
	return nil
}

// toneRow writes the row of the tone model at t: 1, then cos and sin of
// each w_k t.
func toneRow(dst []float64, t float64, omega []float64) {
	dst[0] = 1
	for k, w := range omega {
		s, c := math.Sincos(w * t)
		dst[1+2*k], dst[2+2*k] = c, s
	}
}

// fitTones fits the tone model of extrapolate to the interleaved frames
// of x, per channel, and returns its coefficients (a row per model
// column, a column per channel).
func fitTones(x []float64, ch int, omega []float64) (blas64.General, error) {
	m := len(x) / ch
	p := 1 + 2*len(omega)
	if m < p {
		return blas64.General{}, fmt.Errorf("process: tone extension: the signal has %d frames, the fit of %d tones needs %d", m, len(omega), p)
	}
	a := mat.NewDense(m, p, nil)
	for t := 0; t < m; t++ {
		toneRow(a.RawRowView(t), float64(t), omega)
	}
	b := mat.NewDense(m, ch, append([]float64(nil), x...))
	var qr mat.QR
	qr.Factorize(a)
	var coef mat.Dense
	if err := qr.SolveTo(&coef, false, b); err != nil {
		return blas64.General{}, fmt.Errorf("process: tone extension: the fit is ill-conditioned (tones too close for %d frames?): %w", m, err)
	}
	return coef.RawMatrix(), nil
}

// readFull reads whole frames into dst until it is full or the source
// ends. eof reports the end of the source.
func readFull(src FrameSource, dst []float64, ch int) (frames int, eof bool, err error) {
	want := len(dst) / ch
	for frames < want {
		n, err := src.ReadFrames(dst[frames*ch:])
		if n < 0 || n > want-frames {
			return frames, false, fmt.Errorf("process: frame source returned %d frames for room of %d", n, want-frames)
		}
		frames += n
		if err == io.EOF {
			return frames, true, nil
		}
		if err != nil {
			return frames, false, fmt.Errorf("process: reading frames: %w", err)
		}
		if n == 0 {
			return frames, false, fmt.Errorf("process: reading frames: %w", io.ErrNoProgress)
		}
	}
	return frames, false, nil
}

func reverseFrames(x []float64, ch int) {
	for i, j := 0, len(x)-ch; i < j; i, j = i+ch, j-ch {
		for k := 0; k < ch; k++ {
			x[i+k], x[j+k] = x[j+k], x[i+k]
		}
	}
}

// ring keeps the last n frames pushed.
type ring struct {
	buf      []float64
	ch, next int
	full     bool
}

func newRing(n, ch int) *ring { return &ring{buf: make([]float64, n*ch), ch: ch} }

func (r *ring) push(p []float64) {
	if len(r.buf) == 0 {
		return
	}
	if len(p) >= len(r.buf) {
		copy(r.buf, p[len(p)-len(r.buf):])
		r.next, r.full = 0, true
		return
	}
	n := copy(r.buf[r.next:], p)
	if n < len(p) {
		copy(r.buf, p[n:])
		r.full = true
	}
	r.next = (r.next + len(p)) % len(r.buf)
	if r.next == 0 {
		r.full = true
	}
}

// frames returns the kept frames, oldest first.
func (r *ring) frames() []float64 {
	if !r.full {
		return r.buf[:r.next]
	}
	out := make([]float64, 0, len(r.buf))
	return append(append(out, r.buf[r.next:]...), r.buf[:r.next]...)
}

// spillStore holds the signal between the passes: its first memFrames
// frames in mem, the rest in a file (created when first needed). The
// file is read and written in segments of ioFrames frames through two
// buffers by an I/O goroutine, so that the transfers overlap the
// filtering; the filtering itself and the order of every operation on
// the samples stay those of a single goroutine, so the output does not
// depend on the timing. The file holds raw float64 in the machine's
// byte order: it is private to this process and removed by close.
type spillStore struct {
	ch        int
	mem       []float64
	memFrames int
	release   func() // frees mem and the buffers
	faulted   int    // samples of mem asked to be mapped

	dir        string
	ioFrames   int
	bufs       [2][]float64
	f          *os.File
	reqs       chan spillReq
	exited     chan struct{}
	done       [2]chan error
	pending    [2]int
	cur        int // buffer the forward pass fills next
	fileFrames int // frames written to the file
	unlinked   bool
}

type spillReq struct {
	op   int // opRead, opWrite or opFault
	p    []float64
	at   int64 // byte offset in the file
	done chan error
}

const (
	opRead = iota
	opWrite
	opFault // map the memory of p (prefault)
)

// spillStep is the unit of SpillMemoryBytes, in samples (8 MiB), and
// spillIOBytes the size of each of the two file buffers: a few large
// sequential transfers instead of one system call per block. They are
// variables so that tests can run many steps and segments on a short
// signal.
var (
	spillStep    = 1 << 20
	spillIOBytes = 4 << 20
)

// newSpillStore reserves memSamples of memory (rounded down to whole
// frames) and the two file buffers in one mapping (getSpillMemory),
// which the system backs only as it is touched.
func newSpillStore(ch, memSamples, block, ioBytes int, dir string) *spillStore {
	s := &spillStore{ch: ch, dir: dir, memFrames: memSamples / ch}
	if ioBytes <= 0 {
		ioBytes = spillIOBytes
	}
	s.ioFrames = max(block, ioBytes/8/ch)
	memN, ioN := s.memFrames*ch, s.ioFrames*ch
	all, release := getSpillMemory(memN + 2*ioN)
	s.mem, s.release = all[:memN:memN], release
	s.bufs[0] = all[memN : memN+ioN : memN+ioN]
	s.bufs[1] = all[memN+ioN:]
	return s
}

// spillKept holds the memory of the last spill that finished, for
// spillKeep, so that runs in a row (the files of a batch, a benchmark)
// reuse memory already mapped instead of mapping and faulting it in
// again; at most one is kept.
var spillKept struct {
	sync.Mutex
	x       []float64
	release func()
	timer   *time.Timer
}

const spillKeep = 2 * time.Second

// getSpillMemory returns n samples, the kept ones if they have that
// length, and the function that gives them back.
func getSpillMemory(n int) ([]float64, func()) {
	k := &spillKept
	k.Lock()
	x, release := k.x, k.release
	if len(x) == n && x != nil {
		k.x, k.release = nil, nil
	} else {
		x, release = nil, nil
	}
	k.Unlock()
	if x == nil {
		x, release = mapSamples(n)
	}
	return x, func() { putSpillMemory(x, release) }
}

// putSpillMemory keeps x for spillKeep in place of any memory kept
// before, which is freed.
func putSpillMemory(x []float64, release func()) {
	k := &spillKept
	k.Lock()
	defer k.Unlock()
	if k.release != nil {
		k.release()
	}
	k.x, k.release = x, release
	if k.timer == nil {
		k.timer = time.AfterFunc(spillKeep, freeSpillMemory)
	} else {
		k.timer.Reset(spillKeep)
	}
}

func freeSpillMemory() {
	k := &spillKept
	k.Lock()
	defer k.Unlock()
	if k.release != nil {
		k.release()
	}
	k.x, k.release = nil, nil
}

// close stops the I/O goroutine, removes the file and frees the memory.
func (s *spillStore) close() {
	if s.reqs != nil {
		close(s.reqs)
		<-s.exited
		s.reqs = nil
	}
	if s.f != nil {
		s.f.Close()
		if !s.unlinked {
			os.Remove(s.f.Name())
		}
		s.f = nil
	}
	if s.release != nil {
		s.release()
		s.release, s.mem, s.bufs = nil, nil, [2][]float64{}
	}
}

// startIO starts the I/O goroutine if it is not running.
func (s *spillStore) startIO() {
	if s.reqs == nil {
		s.reqs = make(chan spillReq, 4)
		s.exited = make(chan struct{})
		s.done = [2]chan error{make(chan error, 4), make(chan error, 4)}
		go s.serve()
	}
}

// prefault asks the I/O goroutine to map the memory up to two steps
// beyond frame at, so that the forward pass, which comes next, finds it
// mapped: the page faults are taken on the other core (only for the
// memory of mapSamples, which release returns to the system).
func (s *spillStore) prefault(at int) {
	if s.release == nil {
		return
	}
	end := min(len(s.mem), (at*s.ch/spillStep+2)*spillStep)
	for s.faulted < end {
		n := min(spillStep, end-s.faulted)
		s.startIO()
		s.reqs <- spillReq{op: opFault, p: s.mem[s.faulted : s.faulted+n]}
		s.faulted += n
	}
}

// memSpan returns the memory from frame at to the end of the in-memory
// part, or nil if at is beyond it.
func (s *spillStore) memSpan(at int) []float64 {
	if at >= s.memFrames {
		return nil
	}
	return s.mem[at*s.ch:]
}

// fileBuf returns the buffer the forward pass fills next, once its
// previous transfer is done.
func (s *spillStore) fileBuf() ([]float64, error) {
	if s.f == nil {
		f, err := wavio.CreateTemp(s.dir, "wavsieve-spill.f64")
		if err != nil {
			return nil, fmt.Errorf("process: zero-phase spill: %w", err)
		}
		// Unlinked at once: the open file lives on until it is closed,
		// and a killed run leaves nothing on disk. (Where the system
		// refuses, close removes it, or the next run's RemoveStale.)
		if os.Remove(f.Name()) == nil {
			s.unlinked = true
		}
		s.f = f
		s.startIO()
	}
	if err := s.wait(s.cur); err != nil {
		return nil, err
	}
	return s.bufs[s.cur], nil
}

// fileWrite queues p (the start of the buffer fileBuf returned) for
// writing after the frames already in the file.
func (s *spillStore) fileWrite(p []float64) {
	if len(p) == 0 {
		return
	}
	s.submit(s.cur, opWrite, p, s.fileFrames)
	s.fileFrames += len(p) / s.ch
	s.cur ^= 1
}

// segment returns the frames of file segment k, of ioFrames frames.
func (s *spillStore) segment(k int) (at, n int) {
	at = k * s.ioFrames
	return at, min(s.ioFrames, s.fileFrames-at)
}

func (s *spillStore) segments() int {
	if s.fileFrames == 0 {
		return 0
	}
	return (s.fileFrames + s.ioFrames - 1) / s.ioFrames
}

func (s *spillStore) submit(i, op int, p []float64, atFrame int) {
	s.pending[i]++
	s.reqs <- spillReq{op: op, p: p, at: 8 * int64(atFrame) * int64(s.ch), done: s.done[i]}
}

// wait waits for the transfers queued on buffer i and returns the first
// error among them.
func (s *spillStore) wait(i int) error {
	var first error
	for ; s.pending[i] > 0; s.pending[i]-- {
		if err := <-s.done[i]; err != nil && first == nil {
			first = err
		}
	}
	return first
}

func (s *spillStore) waitAll() error {
	e0 := s.wait(0)
	return firstErr(e0, s.wait(1))
}

// serve runs the transfers in the order they were queued.
func (s *spillStore) serve() {
	defer close(s.exited)
	for r := range s.reqs {
		var err error
		switch r.op {
		case opFault:
			prefault(r.p)
			continue
		case opWrite:
			_, err = s.f.WriteAt(asBytes(r.p), r.at)
		default:
			if _, err = s.f.ReadAt(asBytes(r.p), r.at); err == io.EOF {
				err = io.ErrUnexpectedEOF
			}
		}
		if err != nil {
			err = fmt.Errorf("process: zero-phase spill: %w", err)
		}
		r.done <- err
	}
}

// backward runs c backward over the frames, in place: first the file
// segments from the last one, each read ahead while the previous one
// is filtered, then the memory.
func (s *spillStore) backward(c *Cascade, frames int) error {
	if k := s.segments(); k > 0 {
		if err := s.waitAll(); err != nil {
			return err
		}
		read := func(k int) {
			if k >= 0 {
				at, n := s.segment(k)
				i := k % 2
				s.submit(i, opRead, s.bufs[i][:n*s.ch], at)
			}
		}
		read(k - 1)
		read(k - 2)
		for k--; k >= 0; k-- {
			i := k % 2
			if err := s.wait(i); err != nil {
				return err
			}
			at, n := s.segment(k)
			p := s.bufs[i][:n*s.ch]
			c.processReverse(p)
			s.submit(i, opWrite, p, at)
			read(k - 2)
		}
		if err := s.waitAll(); err != nil {
			return err
		}
	}
	c.processReverse(s.mem[:min(frames, s.memFrames)*s.ch])
	return nil
}

// deliver writes the frames to dst in forward order, in blocks of block
// frames: the memory, then the file segments, read ahead.
func (s *spillStore) deliver(dst FrameSink, frames, block int) error {
	k := s.segments()
	for j := 0; j < min(k, 2); j++ {
		at, n := s.segment(j)
		s.submit(j, opRead, s.bufs[j][:n*s.ch], at)
	}
	put := func(p []float64) error {
		for len(p) > 0 {
			n := min(len(p), block*s.ch)
			if err := dst.WriteFrames(p[:n]); err != nil {
				return fmt.Errorf("process: zero-phase output: %w", err)
			}
			p = p[n:]
		}
		return nil
	}
	if err := put(s.mem[:min(frames, s.memFrames)*s.ch]); err != nil {
		return err
	}
	for j := 0; j < k; j++ {
		i := j % 2
		if err := s.wait(i); err != nil {
			return err
		}
		_, n := s.segment(j)
		if err := put(s.bufs[i][:n*s.ch]); err != nil {
			return err
		}
		if j+2 < k {
			at, n := s.segment(j + 2)
			s.submit(i, opRead, s.bufs[i][:n*s.ch], at)
		}
	}
	return nil
}

// asBytes views float64 samples as their bytes, without copying.
func asBytes(p []float64) []byte {
	return unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(p))), 8*len(p))
}

// sliceSource reads frames from a slice.
type sliceSource struct {
	x  []float64
	ch int
}

func (s *sliceSource) ReadFrames(dst []float64) (int, error) {
	n := copy(dst[:len(dst)/s.ch*s.ch], s.x)
	s.x = s.x[n:]
	if len(s.x) == 0 {
		return n / s.ch, io.EOF
	}
	return n / s.ch, nil
}

// prefixSource delivers the frames of pre, then the rest of src; eof
// says that src has already ended.
type prefixSource struct {
	pre []float64
	src FrameSource
	ch  int
	eof bool
}

func (s *prefixSource) ReadFrames(dst []float64) (int, error) {
	if len(s.pre) == 0 {
		if s.eof {
			return 0, io.EOF
		}
		return s.src.ReadFrames(dst)
	}
	n := copy(dst[:len(dst)/s.ch*s.ch], s.pre)
	s.pre = s.pre[n:]
	if len(s.pre) == 0 && s.eof {
		return n / s.ch, io.EOF
	}
	return n / s.ch, nil
}
