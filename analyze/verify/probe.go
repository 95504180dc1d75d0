package verify

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"sync"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// Files reads a filtering run from its input and output files, streaming
// both, and judges it against spec designed at their rate. The formats of
// the files set the floors. A run too short for a check gives that check
// unmeasurable, not an error.
func Files(ctx context.Context, spec design.Spec, in, out string, o Options) (*Result, error) {
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
		return nil, fmt.Errorf("verify: %w: %s (%d Hz) and %s (%d Hz) differ in sample rate", ErrMismatch, in, fi.SampleRate, out, fo.SampleRate)
	case fi.Channels != fo.Channels:
		return nil, fmt.Errorf("verify: %w: %s (%d channels) and %s (%d channels) differ in channel count", ErrMismatch, in, fi.Channels, out, fo.Channels)
	case ri.Frames() < 0:
		return nil, fmt.Errorf("verify: %w: %s: the header does not give the length", ErrUnknownLength, in)
	case ri.Frames() != ro.Frames():
		return nil, fmt.Errorf("verify: %w: %s (%d frames) and %s (%d frames) differ in length", ErrMismatch, in, ri.Frames(), out, ro.Frames())
	}
	f, err := process.DesignFor(spec, fi.SampleRate, in)
	if err != nil {
		return nil, err
	}
	o.In, o.Out = fi, fo
	if o.Tracks == nil && o.NewTracker != nil {
		job := process.FileJob{Input: in, NewTracker: o.NewTracker, TrackPerChannel: o.TrackPerChannel}
		if o.Tracks, err = process.MeasureTrack(ctx, job, f); err != nil {
			return nil, fmt.Errorf("%s: tracking the hum: %w", in, err)
		}
	}
	s, err := NewSession(f, nil, fi.Channels, ri.Frames(), o)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", in, err)
	}
	if err := feedFiles(ctx, s, ri, ro, in, out); err != nil {
		return nil, err
	}
	return s.Result(in, out, "recording"), nil
}

// feedFiles streams two open files through a session.
func feedFiles(ctx context.Context, s *Session, ri, ro *wavio.Reader, in, out string) error {
	const block = 1 << 15
	nc := ri.Format().Channels
	bx, by := make([]float64, block*nc), make([]float64, block*nc)
	for done := int64(0); done < s.frames-s.skip; {
		if err := ctx.Err(); err != nil {
			return err
		}
		n, err1 := readFull(ri, bx)
		m, err2 := readFull(ro, by)
		if n != m {
			return fmt.Errorf("verify: %w: %s and %s: reading stopped at different frames (%d, %d)", ErrMismatch, in, out, done+int64(n), done+int64(m))
		}
		if err := s.Feed(bx[:n*nc], by[:n*nc]); err != nil {
			return err
		}
		done += int64(n)
		if err1 != nil || err2 != nil || n == 0 {
			for _, e := range []error{err1, err2} {
				if e != nil && !errors.Is(e, io.EOF) {
					return fmt.Errorf("%s / %s: %w", in, out, e)
				}
			}
			break
		}
	}
	return nil
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

// Chain is the processing a probe goes through: what apply would do to a
// file of format In.
type Chain struct {
	Spec design.Spec
	// In is the probe's input format (rate, channels, sample format).
	In wavio.Format
	// Encoding and Bits are the output sample format; Bits 0 keeps In's.
	Encoding   wavio.Encoding
	Bits       int
	NoDither   bool
	DitherSeed uint64
	// Only lists the channels filtered (counted from 0), as apply
	// --channels; nil filters all.
	Only []int
	// TempDir is where the probe files go ("" for the system's).
	TempDir string
	// Name stands for the probe in messages and results.
	Name string
}

func (ch Chain) out() wavio.Format {
	if ch.Bits == 0 {
		return ch.In
	}
	return ch.In.WithSample(ch.Encoding, ch.Bits)
}

// Probe levels: a tone of amplitude toneAmp (-6 dBFS peak); white Gaussian
// noise at noiseRMS (-20 dBFS), whose peaks (about 5 sigma over a minute
// of samples) stay 6 dB below full scale.
const (
	toneAmp  = 0.5
	noiseRMS = 0.1
	// toneSegments half-overlapped segments are read from each tone;
	// maxProbeFrames bounds any probe file.
	toneSegments   = 16
	noiseSegments  = 64
	maxProbeFrames = 1 << 24
)

// ToneProbe measures the chain with a steady tone at each check frequency,
// filtered exactly as apply would filter a file of the chain's format (a
// temporary file through process.FilterFile: the design at the rate,
// zero-phase padding, output encoding and dither), then read between the
// transients. Tones that do not interact share a file (see toneGroups); a
// tone where the design is deep (a notch centre) is played alone. Checks
// whose tones would need a file longer than 2^24 frames come out
// unmeasurable.
func ToneProbe(ctx context.Context, ch Chain, o Options) (*Result, error) {
	f, err := process.DesignFor(ch.Spec, ch.In.SampleRate, ch.Name)
	if err != nil {
		return nil, err
	}
	if err := o.validate(ch.In.Channels); err != nil {
		return nil, err
	}
	dir, err := os.MkdirTemp(ch.TempDir, "wavsieve-probe-")
	if err != nil {
		return nil, fmt.Errorf("verify: probe: %w", err)
	}
	defer os.RemoveAll(dir)
	o.Tone = true
	o.In, o.Out = ch.In, ch.out()
	res := &Result{Input: ch.Name, Method: "tone probe", SampleRate: ch.In.SampleRate, ZeroPhase: f.ZeroPhase, Window: window.String(),
		ConfidenceLevel: o.level(), Checks: []Check{}, Filter: f}
	skip := int64(f.DecaySamples(toneDecayDB, 0))
	res.SkippedFrames = skip
	for _, c := range NewSessionChannels(ch.In.Channels, o.Channels) {
		res.Channels = append(res.Channels, c+1)
	}
	// The groups are independent runs: a few at once, each in its own
	// files, the first error cancelling the others.
	groups := toneGroups(f, Points(f), o.Segment)
	results := make([]*Result, len(groups))
	frames := make([]int64, len(groups))
	errs := make([]error, len(groups))
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < min(probeWorkers(), len(groups)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for gi := range next {
				// After a cancellation (Ctrl-C, or another group's
				// error) the groups left are skipped, not started.
				if err := ctx.Err(); err != nil {
					errs[gi] = err
					continue
				}
				results[gi], frames[gi], errs[gi] = toneGroup(ctx, ch, f, groups[gi], skip, o, filepath.Join(dir, fmt.Sprintf("group-%d", gi)))
				if errs[gi] != nil {
					cancel()
				}
			}
		}()
	}
	for gi := range groups {
		next <- gi
	}
	close(next)
	wg.Wait()
	// The error that stopped the run, rather than the cancellations it
	// caused.
	var first error
	for _, e := range errs {
		if e != nil && (first == nil || errors.Is(first, context.Canceled) && !errors.Is(e, context.Canceled)) {
			first = e
		}
	}
	if first != nil {
		return nil, first
	}
	for gi, r := range results {
		res.Frames += frames[gi]
		res.Checks = append(res.Checks, r.Checks...)
	}
	sort.SliceStable(res.Checks, func(i, j int) bool {
		a, b := res.Checks[i], res.Checks[j]
		return a.Channel < b.Channel || a.Channel == b.Channel && a.FrequencyHz < b.FrequencyHz
	})
	res.Finish()
	return res, nil
}

// probeWorkers is how many tone groups run at once: up to the processors,
// at most 4 (each holds a file pair in a temporary folder).
func probeWorkers() int { return max(1, min(runtime.NumCPU(), 4)) }

// toneGroup plays the tones of one group through the chain in files under
// base (a path prefix) and reads them.
func toneGroup(ctx context.Context, ch Chain, f *design.Filter, grp []Point, skip int64, o Options, base string) (*Result, int64, error) {
	seg := o.Segment
	var hz []float64
	for _, p := range grp {
		seg = max(seg, toneSegment(f.SampleRate, p.FrequencyHz))
		hz = append(hz, p.FrequencyHz)
	}
	frames := 2*skip + int64(seg)*(toneSegments+1)/2
	og := o
	og.Segment = seg
	s, err := NewSession(f, grp, ch.In.Channels, min(frames, maxProbeFrames), og)
	if err != nil {
		return nil, 0, err
	}
	if frames <= maxProbeFrames {
		pin, pout := base+"-in.wav", base+"-out.wav"
		defer os.Remove(pin)
		defer os.Remove(pout)
		if err := writeTones(pin, ch.In, frames, hz, ch.DitherSeed); err != nil {
			return nil, 0, err
		}
		job := process.FileJob{Input: pin, Output: pout, Spec: ch.Spec, Encoding: ch.Encoding, Bits: ch.Bits, NoDither: ch.NoDither,
			DitherSeed: ch.DitherSeed, Only: ch.Only, TempDir: filepath.Dir(base)}
		fr, err := process.FilterFile(ctx, job)
		if err != nil {
			return nil, 0, fmt.Errorf("verify: probe: %w", err)
		}
		if n := sum(fr.Clipped); n > 0 {
			return nil, 0, fmt.Errorf("verify: %w: %d samples of the tones at %v Hz clipped at full scale; the filter's gain is too high for a -6 dBFS probe", ErrProbeClipped, n, hz)
		}
		if err := feedPair(ctx, s, pin, pout); err != nil {
			return nil, 0, err
		}
	}
	r := s.Result(ch.Name, "", "tone probe")
	if frames > maxProbeFrames {
		for i := range r.Checks {
			r.Checks[i].Verdict = Unmeasurable
			r.Checks[i].Reason = fmt.Sprintf("the tone would need %d frames to settle and be read, more than the probe's %d", frames, maxProbeFrames)
			r.Checks[i].MeasuredDB, r.Checks[i].IntervalDB, r.Checks[i].MarginDB = nil, nil, nil
		}
	}
	return r, frames, nil
}

// toneLeak is the largest relative error one tone may put into another's
// reading through the window (about 0.001 dB).
const toneLeak = 1e-4

// toneGroups puts the points' tones into groups that can share a file:
// in each group, every tone's reading picks up every other tone (and its
// image at minus its frequency) through the window's response, scaled by
// the design there against the design at the reading, by at most
// toneLeak. A tone where the design is deep (a notch centre) so ends up
// alone.
func toneGroups(f *design.Filter, pts []Point, segment int) [][]Point {
	// Each point's gain is evaluated once: the grouping compares every
	// pair, and a response of a large design (1000 notches) costs
	// milliseconds, so evaluating it per pair took minutes.
	gains := make(map[float64]float64, len(pts))
	for _, p := range pts {
		if _, ok := gains[p.FrequencyHz]; !ok {
			gains[p.FrequencyHz] = math.Pow(10, f.EffectiveDB(p.FrequencyHz)/20)
		}
	}
	gain := func(hz float64) float64 { return gains[hz] }
	leak := func(reader, other Point) float64 {
		seg := segment
		if seg == 0 {
			seg = toneSegment(f.SampleRate, reader.FrequencyHz)
		}
		g := gain(reader.FrequencyHz)
		if !(g > 1e-12) {
			return math.Inf(1)
		}
		bins := float64(seg) / f.SampleRate
		w := math.Max(bhResponse2((other.FrequencyHz-reader.FrequencyHz)*bins), bhResponse2((other.FrequencyHz+reader.FrequencyHz)*bins))
		return math.Sqrt(w) * gain(other.FrequencyHz) / g
	}
	var groups [][]Point
	for _, p := range pts {
		placed := false
		for gi, grp := range groups {
			ok := true
			for _, q := range grp {
				if q.FrequencyHz == p.FrequencyHz || leak(p, q) > toneLeak || leak(q, p) > toneLeak {
					ok = false
				}
			}
			if ok {
				groups[gi] = append(grp, p)
				placed = true
				break
			}
		}
		if !placed {
			groups = append(groups, []Point{p})
		}
	}
	return groups
}

// NewSessionChannels lists the channels a session checks (counted from 0).
func NewSessionChannels(channels int, only []int) []int {
	if len(only) > 0 {
		return only
	}
	c := make([]int, channels)
	for i := range c {
		c[i] = i
	}
	return c
}

// toneSegment is the reading window of a tone: long enough (at least 4096)
// to keep the tone's images at -f and fs - f outside its main lobe.
func toneSegment(fs, hz float64) int {
	room := math.Min(hz, fs/2-hz)
	seg := 4096
	for seg < MaxSegment && lobeBins*fs/float64(seg) > room/2 {
		seg *= 2
	}
	return seg
}

// NoiseProbe measures the chain with white noise, long enough for the
// longest segment the checks need (at most 2^24 frames).
func NoiseProbe(ctx context.Context, ch Chain, o Options) (*Result, error) {
	f, err := process.DesignFor(ch.Spec, ch.In.SampleRate, ch.Name)
	if err != nil {
		return nil, err
	}
	// Plan as for an endless run, to learn the longest segment wanted.
	s, err := NewSession(f, nil, ch.In.Channels, math.MaxInt64/4, o)
	if err != nil {
		return nil, err
	}
	seg := 0
	for _, g := range s.groups {
		seg = max(seg, g.seg)
	}
	frames := min(2*s.skip+int64(max(seg, MinSegment))*(noiseSegments+1)/2, maxProbeFrames)
	dir, err := os.MkdirTemp(ch.TempDir, "wavsieve-probe-")
	if err != nil {
		return nil, fmt.Errorf("verify: probe: %w", err)
	}
	defer os.RemoveAll(dir)
	pin, pout := filepath.Join(dir, "noise-in.wav"), filepath.Join(dir, "noise-out.wav")
	if err := writeNoise(pin, ch.In, frames, ch.DitherSeed); err != nil {
		return nil, err
	}
	job := process.FileJob{Input: pin, Output: pout, Spec: ch.Spec, Encoding: ch.Encoding, Bits: ch.Bits, NoDither: ch.NoDither, DitherSeed: ch.DitherSeed, Only: ch.Only, TempDir: dir}
	fr, err := process.FilterFile(ctx, job)
	if err != nil {
		return nil, fmt.Errorf("verify: probe: %w", err)
	}
	if n := sum(fr.Clipped); n > 0 {
		return nil, fmt.Errorf("verify: %w: %d samples clipped at full scale in the filtered noise; the filter's gain is too high for a -20 dBFS probe", ErrProbeClipped, n)
	}
	r, err := Files(ctx, ch.Spec, pin, pout, o)
	if err != nil {
		return nil, err
	}
	r.Input, r.Output, r.Method = ch.Name, "", "noise probe"
	return r, nil
}

// feedPair streams a probe's input and output files through s.
func feedPair(ctx context.Context, s *Session, in, out string) error {
	ri, err := wavio.Open(in, nil)
	if err != nil {
		return fmt.Errorf("verify: probe: %w", err)
	}
	defer ri.Close()
	ro, err := wavio.Open(out, nil)
	if err != nil {
		return fmt.Errorf("verify: probe: %w", err)
	}
	defer ro.Close()
	return feedFiles(ctx, s, ri, ro, in, out)
}

// writeTones writes frames of sines at hz on every channel, in format f,
// each of amplitude toneAmp / len(hz), so that their sum stays within
// toneAmp.
func writeTones(name string, f wavio.Format, frames int64, hz []float64, seed uint64) error {
	amp := toneAmp / float64(len(hz))
	w := make([]float64, len(hz))
	for i, h := range hz {
		w[i] = 2 * math.Pi * h / float64(f.SampleRate)
	}
	return writeSignal(name, f, frames, seed, func(t int64, _ int) float64 {
		var v float64
		for _, wi := range w {
			v += math.Sin(wi * float64(t))
		}
		return amp * v
	})
}

// writeNoise writes frames of white Gaussian noise at noiseRMS, seeded so
// that a probe can be repeated.
func writeNoise(name string, f wavio.Format, frames int64, seed uint64) error {
	rng := rand.New(rand.NewPCG(seed, 0x70726f6265))
	return writeSignal(name, f, frames, seed, func(int64, int) float64 { return noiseRMS * rng.NormFloat64() })
}

func writeSignal(name string, f wavio.Format, frames int64, seed uint64, v func(t int64, c int) float64) error {
	f.ValidBits = 0
	w, err := wavio.Create(name, wavio.WriterOptions{Format: f, DitherSeed: seed + 1})
	if err != nil {
		return fmt.Errorf("verify: probe: %w", err)
	}
	buf := make([]float64, 1<<14*f.Channels)
	for done := int64(0); done < frames; {
		n := min(int64(len(buf)/f.Channels), frames-done)
		b := buf[:n*int64(f.Channels)]
		for i := range b {
			b[i] = v(done+int64(i/f.Channels), i%f.Channels)
		}
		if err := w.WriteFrames(b); err != nil {
			w.Abort()
			return fmt.Errorf("verify: probe: %w", err)
		}
		done += n
	}
	return w.Close()
}

func sum(v []int64) int64 {
	var s int64
	for _, x := range v {
		s += x
	}
	return s
}
