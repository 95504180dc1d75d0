package process

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// HumTracker measures the hum's fundamental over time for a tracking
// notch stage: it is given every frame of the input, in order, and then
// asked for the track, one shared by all channels or one per channel.
type HumTracker interface {
	Write(frames []float64)
	Tracks() ([]FrequencyTrack, error)
}

// NewHumTracker makes the HumTracker of one file for a tracking notch
// stage. process does not measure hum itself; the caller supplies the
// tracker (analyze.Tracker in the command).
type NewHumTracker func(rate float64, channels int, stage design.Stage, perChannel bool) (HumTracker, error)

// ErrNoTracker is returned (wrapped) when a spec has a tracking notch
// stage and the job no NewTracker.
var ErrNoTracker = errors.New("process: a tracking notch needs a hum tracker")

// trackFitSeconds is the length fitted at each end of the signal to
// extend the hum before it (zero phase and the causal pre-roll): a
// quarter second, short enough that a drifting hum keeps one frequency
// within it (0.25 Hz/s moves the 9th harmonic 0.56 Hz in it), long
// enough to tell harmonics 50 Hz apart (resolution about 1/length:
// common practice).
const trackFitSeconds = 0.25

// prerollExactEvery is how often the causal pre-roll's tone model is
// computed exactly rather than turned.
const prerollExactEvery = 1024

// trackFarHz is how far the whole track may sit from the stage's
// fundamental_hz before the run warns: an interconnected grid wanders
// about +-0.2 Hz around its nominal frequency (common practice), so a
// track that never comes within 0.25 Hz of it has more likely followed
// something else (a 60 Hz file given 50 Hz) or a generator off its
// setting.
const trackFarHz = 0.25

// trackMinFound is the least share of the track's points where the hum
// must have been measured (the rest bridged) before the run warns.
const trackMinFound = 0.5

// tracked is the plan of a run with a tracking notch stage.
type tracked struct {
	stage  int // index in the filter's stages
	tracks []FrequencyTrack
	lo, hi float64 // range of the fundamental over all tracks
	found  float64 // least share of points measured over all tracks (1 if unknown)
	head   []float64
}

// foundOf is implemented by tracks that know the share of their points
// where the hum was measured.
type foundOf interface{ Found() float64 }

// warnings returns what the run should warn of about the track: a range
// far from the stage's fundamental, and a hum found in too few places.
func (t *tracked) warnings(fundamental float64) []string {
	var w []string
	if d := math.Max(t.lo-fundamental, fundamental-t.hi); d > trackFarHz {
		w = append(w, fmt.Sprintf("the tracked hum stays between %.2f and %.2f Hz, %.2f Hz or more from the notch's fundamental_hz %g: the notches may follow noise rather than the hum; check the mains frequency (wavsieve survey shows the hum the file holds)", t.lo, t.hi, d, fundamental))
	}
	if t.found < trackMinFound {
		w = append(w, fmt.Sprintf("the hum was measured in only %.0f%% of the track's points, the rest bridged: the notches may not follow the hum; check the mains frequency and the level of the hum (wavsieve survey)", 100*t.found))
	}
	return w
}

// trackingStage returns the index of the filter's tracking notch stage,
// -1 for none; more than one is an error.
func trackingStage(f *design.Filter) (int, error) {
	idx := -1
	for i, st := range f.Stages {
		if st.Spec.Tracking {
			if idx >= 0 {
				return -1, fmt.Errorf("stages %d and %d both track the hum: use one tracking notch stage", idx+1, i+1)
			}
			idx = i
		}
	}
	return idx, nil
}

// rangeOf is implemented by tracks that know their range.
type rangeOf interface{ Range() (lo, hi float64) }

// trackPass reads the whole input once and measures the hum's track.
// It keeps the first frames for the causal pre-roll.
func trackPass(ctx context.Context, job *FileJob, f *design.Filter, stage int, block int) (*tracked, error) {
	if job.NewTracker == nil {
		return nil, ErrNoTracker
	}
	r, err := wavio.Open(job.Input, &wavio.ReaderOptions{AllowNonFinite: job.AllowNonFinite})
	if err != nil {
		return nil, err
	}
	defer r.Close()
	inF := r.Format()
	tk, err := job.NewTracker(float64(inF.SampleRate), inF.Channels, f.Stages[stage].Spec, job.TrackPerChannel)
	if err != nil {
		return nil, err
	}
	// A pass that stops early frees the tracker's temporary file at once
	// (after Tracks, Close does nothing).
	if c, ok := tk.(interface{ Close() }); ok {
		defer c.Close()
	}
	// The hum tracker's memory (its spectra and the reduced-rate copy
	// while it reads; about 12 MB for two minutes of 48 kHz stereo) is
	// held within the pool of edge buffers: at most four passes at once
	// for all workers, each given back when its pass ends.
	release, err := edges.acquire(ctx, trackPassBytes)
	if err != nil {
		return nil, err
	}
	defer release()
	ch := inF.Channels
	keep := int(math.Ceil(trackFitSeconds * float64(inF.SampleRate)))
	t := &tracked{stage: stage}
	buf := make([]float64, block*ch)
	for {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		n, rerr := r.ReadFrames(buf)
		if n > 0 {
			p := buf[:n*ch]
			if len(t.head) < keep*ch {
				t.head = append(t.head, p[:min(len(p), keep*ch-len(t.head))]...)
			}
			tk.Write(p)
		}
		if rerr != nil {
			if errors.Is(rerr, io.EOF) {
				break
			}
			return nil, rerr
		}
	}
	// A tracker that can be stopped is, when ctx is done (the track of a
	// long file takes seconds).
	if tc, ok := tk.(interface {
		TracksContext(context.Context) ([]FrequencyTrack, error)
	}); ok {
		t.tracks, err = tc.TracksContext(ctx)
	} else {
		t.tracks, err = tk.Tracks()
	}
	if err != nil {
		return nil, err
	}
	t.lo, t.hi, t.found = math.Inf(1), math.Inf(-1), 1
	for _, tr := range t.tracks {
		if fo, ok := tr.(foundOf); ok {
			t.found = math.Min(t.found, fo.Found())
		}
		lo, hi := tr.At(0), tr.At(0)
		if ro, ok := tr.(rangeOf); ok {
			lo, hi = ro.Range()
		}
		t.lo, t.hi = math.Min(t.lo, lo), math.Max(t.hi, hi)
	}
	return t, nil
}

// trackedCascade builds the cascade of a run with a tracking stage: the
// fixed stages' sections, then the tracking comb (placed last: it is
// the only stage that varies in time, and the fixed stages commute).
func trackedCascade(f *design.Filter, t *tracked, cfg Config) (*Cascade, *trackComb, error) {
	var sos []design.Section
	for i, st := range f.Stages {
		if i != t.stage {
			sos = append(sos, st.Sections...)
		}
	}
	d := f.Stages[t.stage]
	fund := d.Spec.FundamentalHz
	var harm []float64
	for _, c := range d.NotchHz {
		h := c / fund
		if r := math.Round(h); math.Abs(h-r) < 1e-9 {
			h = r // whole harmonic numbers, as notchCentres made them
		}
		harm = append(harm, h)
	}
	// Each pass is down by 3/passes dB at the edges, as in the design.
	g2 := 0.5
	if f.ZeroPhase {
		g2 = math.Sqrt(0.5)
	}
	tv, err := newTrackComb(f.SampleRate, cfg, t.tracks, harm, d.NotchBandwidthHz, g2)
	if err != nil {
		return nil, nil, err
	}
	cfg.SteadyStart = false
	c, err := newTrackedCascade(sos, cfg, tv)
	if err != nil {
		return nil, nil, err
	}
	return c, tv, nil
}

// toneSet lists the tones the ends are extended with: every fixed notch
// centre and the tracking harmonics at the fundamental f0.
func toneSet(f *design.Filter, t *tracked, f0 float64) []float64 {
	var tones []float64
	for i, st := range f.Stages {
		if i == t.stage {
			fund := st.Spec.FundamentalHz
			for _, c := range st.NotchHz {
				if hz := c / fund * f0; hz < f.SampleRate/2 {
					tones = append(tones, hz)
				}
			}
			continue
		}
		tones = append(tones, st.NotchHz...)
	}
	return tones
}

// trackedZeroPhaseOptions are zeroPhaseOptions with the ends extended by
// the hum at the track's first and last frequencies, fitted over
// trackFitSeconds, and the tracked cascade.
func trackedZeroPhaseOptions(f *design.Filter, t *tracked, c *Cascade, tv *trackComb, frames int64, channels, block int) ZeroPhaseOptions {
	opt := zeroPhaseOptions(f, frames, channels, block)
	opt.PadFrames = int(min(int64(opt.PadFrames), max(frames-1, 0)))
	end := float64(frames) / f.SampleRate
	start, last := toneSet(f, t, t.tracks[0].At(0)), toneSet(f, t, t.tracks[0].At(end))
	if len(start) == len(last) && len(start) > 0 {
		fit := int(math.Ceil(trackFitSeconds * f.SampleRate))
		if cols := 1 + 2*len(start); fit >= 2*cols && int64(fit) <= frames/2 {
			opt.Extension, opt.ToneHz, opt.ToneHzEnd, opt.FitFrames = ExtendTones, start, last, fit
		} else {
			opt.Extension, opt.ToneHz, opt.ToneHzEnd, opt.FitFrames = ExtendOdd, nil, nil, 0
		}
	}
	opt.cascade = c
	tv.setPositions(-int64(opt.PadFrames), frames+int64(opt.PadFrames)-1)
	return opt
}

// trackPassBytes is what a tracking pass takes from the edge pool.
const trackPassBytes = edgePool / 4

// prerollChunkFrames is the pre-roll made and filtered at a time.
const prerollChunkFrames = 8192

// preroll runs the tracked cascade over the hum extrapolated before the
// signal (fitted to its first trackFitSeconds, as a zero-phase run's left
// extension), so that a causal run starts settled: a 0.5 Hz notch
// started from rest takes seconds to reach its depth.
func preroll(f *design.Filter, t *tracked, c *Cascade, tv *trackComb, ch int) error {
	tones := toneSet(f, t, t.tracks[0].At(0))
	// Long enough for the start from rest to fall by 60 dB, 20 dB under
	// what is left of the hum after a 40 dB notch (the dominant pole's
	// figure, without simulation).
	pad := f.DecaySamples(60, 1)
	pad = min(pad, memBudget/4/(8*ch))
	m := len(t.head) / ch
	if len(tones) == 0 || m < 2*(1+2*len(tones)) || pad == 0 {
		tv.setPositions(0, 0)
		return nil
	}
	var omega []float64
	for _, hz := range tones {
		omega = append(omega, 2*math.Pi*hz/f.SampleRate)
	}
	cs, err := fitTones(t.head, ch, omega)
	if err != nil {
		return err
	}
	// The fitted model before the signal, its rows by rotation: each
	// tone's (cos, sin) is turned by its step and set exactly every
	// prerollExactEvery frames, so that the turns' rounding (about 1e-16
	// each) cannot build up. Only the pre-roll, whose output is thrown
	// away, is made this way.
	// The pre-roll is made and filtered a chunk at a time (the cascade
	// keeps its state between calls), so that its memory is one chunk
	// whatever the pad, for each of the workers at once.
	chunk := min(pad, prerollChunkFrames)
	buf := make([]float64, chunk*ch)
	r := make([]float64, 1+2*len(omega))
	steps := make([]complex128, len(omega))
	for k, w := range omega {
		steps[k] = complex(math.Cos(w), math.Sin(w))
	}
	// The fitted coefficients of each channel, in a row.
	cols := make([]float64, ch*len(r))
	for k := 0; k < ch; k++ {
		for i := range r {
			cols[k*len(r)+i] = cs.Data[i*cs.Stride+k]
		}
	}
	tv.setPositions(-int64(pad), 0)
	for at := 0; at < pad; at += chunk {
		n := min(chunk, pad-at)
		for jj := 0; jj < n; jj++ {
			j := at + jj
			if j%prerollExactEvery == 0 {
				toneRow(r, float64(j-pad), omega)
			} else {
				for k, st := range steps {
					c, s := r[1+2*k], r[2+2*k]
					r[1+2*k], r[2+2*k] = c*real(st)-s*imag(st), c*imag(st)+s*real(st)
				}
			}
			for k := 0; k < ch; k++ {
				v := 0.0
				for i, ci := range cols[k*len(r) : (k+1)*len(r)] {
					v += r[i] * ci
				}
				buf[jj*ch+k] = v
			}
		}
		if at == 0 {
			c.Prime(buf[:ch])
		}
		c.Process(buf[:n*ch], buf[:n*ch])
	}
	return nil
}

// MeasureTrack measures the hum's track of job.Input for f's tracking
// notch stage as a run of job would (the same pass, with job.NewTracker
// and job.TrackPerChannel): one track shared by all channels, or one per
// channel. It returns nil and no error when f has no tracking stage.
// verify reads a tracking notch along it.
func MeasureTrack(ctx context.Context, job FileJob, f *design.Filter) ([]FrequencyTrack, error) {
	idx, err := trackingStage(f)
	if err != nil || idx < 0 {
		return nil, err
	}
	block := job.BlockFrames
	if block <= 0 {
		block = 4096 // frames per read: small enough for many channels
	}
	t, err := trackPass(ctx, &job, f, idx, block)
	if err != nil {
		return nil, err
	}
	return t.tracks, nil
}
