package analyze

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
)

// Defaults of the hum tracker; each is the value a zero field of
// TrackOptions takes.
const (
	// DefaultTrackHopSeconds is the time between two points of a hum
	// track: tens of milliseconds, so that a notch re-designed from the
	// track follows a 1 Hz move over 2 s (0.5 Hz/s: 0.01 Hz per hop).
	DefaultTrackHopSeconds = 0.02
	// DefaultTrackSearchHz is how far from the nominal 50 or 60 Hz the
	// fundamental is looked for: an interconnected grid stays within
	// +-0.2 Hz and has an emergency band of +-1 Hz (common practice); a
	// generator set sags further when a load switches on.
	DefaultTrackSearchHz = 2.0
	// DefaultTrackHarmonics is the highest harmonic number used to track.
	DefaultTrackHarmonics = 9
	// DefaultTrackThresholdDB is how far a harmonic must stand above its
	// local floor, on average over the file, to be used.
	DefaultTrackThresholdDB = 10.0
)

// Fixed parameters of the tracker, with the reason for each value.
const (
	// trackCoarseSeconds is the block of the coarse search: 1 s gives
	// 1 Hz bins, enough to tell the hum from a tone 2 Hz beside it, and
	// short enough that the centre of a 0.5 Hz/s ramp is read within a
	// few mHz (a Hann window reads a linear chirp at its centre).
	trackCoarseSeconds = 1.0
	// trackCoarseHopSeconds is the hop of the coarse blocks.
	trackCoarseHopSeconds = 0.25
	// trackCoarseStepHz is the grid step of the coarse search of the
	// fundamental, refined by a parabola through the best three points.
	trackCoarseStepHz = 0.004
	// trackPhaseSeconds is the window (Blackman) over which each
	// harmonic's phase is measured: its sidelobes are 58 dB down and
	// fall further, so the neighbouring harmonic 50 Hz away (10 bins of
	// 5 Hz) does not leak in; its main lobe of +-15 Hz still holds the
	// hum of the 20th harmonic when the fundamental's reference is off
	// by 0.5 Hz.
	trackPhaseSeconds = 0.2
	// trackBlendHoldSeconds: a shorter fit takes over only where the
	// longer one lags for this long on each side (2 hops), so that a
	// noise peak does not switch it in.
	trackBlendHoldSeconds = 0.04
	// trackBlendLow and trackBlendHigh: where the two fits differ by less
	// than trackBlendLow times the noise the long one is used, beyond
	// trackBlendHigh the short one, and a blend in between.
	trackBlendLow, trackBlendHigh = 2.0, 4.0
	// trackPasses is the number of times the phase is measured against
	// a reference that is the previous pass's track: each pass takes
	// the smoothing's bias down by the factor by which the residual's
	// curvature falls.
	trackPasses = 3
	// trackAmpLimitDB is how far a harmonic's amplitude in one window may
	// stray from its median over the file before that window's phase is
	// not trusted (a call or a gust beside the harmonic adds to it; a
	// masking sound changes its phase).
	trackAmpLimitDB = 6.0
	// trackOversample sets the reduced rate at which the tracker keeps the
	// signal: this many times the highest tracked frequency.
	trackOversample = 3.0
	// trackFloorHops is the half-width, in hops, over which a harmonic's
	// local floor is averaged: 5 hops (0.1 s at the default hop) keep its
	// spread under 1.5 dB while a burst still shows in it.
	trackFloorHops = 5
	// trackExactEvery is how often (in reduced-rate samples) the mixing
	// phasors are computed exactly rather than turned: 256 turns leave a
	// phase error of about 1e-13.
	trackExactEvery = 256
	// trackMinWeight is the share of the median weight (-20 dB) below
	// which a hop's combined phase step is not used.
	trackMinWeight = 0.01
	// trackSideShare is the share of the smoothing fit's weight needed
	// on each side of a point: a fit from one side would extrapolate.
	trackSideShare = 0.2
	// trackMaxWeightDB caps a harmonic's signal-to-floor ratio in the
	// weights (the estimate's own bias, not noise, limits it beyond).
	trackMaxWeightDB = 60.0
	// trackChunkSeconds is the longest stretch whose fine track is
	// computed at once; a longer signal is cut into equal parts no
	// longer than this, so that the working memory does not grow with
	// the file's length.
	trackChunkSeconds = 120.0
	// trackMarginSeconds is the signal taken on each side of a part and
	// dropped from its track: a point of the track depends on the signal
	// within about 2 s of it (3 passes of fits over +-0.5 s, the 0.2 s
	// phase window, the floor's +-0.1 s), so 10 s leave the part's own
	// points as they would be from the whole signal, up to the medians
	// (of the harmonics' amplitudes, weights and fit differences), which
	// are each part's own.
	trackMarginSeconds = 10.0
)

// trackSmoothSpans are the half-widths of the local linear fits that
// smooth the frequency deviations, longest first: 0.5 s where the hum
// holds steady (the phase noise averaged over 50 hops), 0.15 s and
// 0.06 s where a move makes the longer fit lag (a 1 s sag of 1.2 Hz
// bends the frequency by 6 Hz/s^2: a fit over +-0.15 s is off by about
// f” s^2/12 = 11 mHz there, one over +-0.06 s by 2 mHz).
var trackSmoothSpans = []float64{0.5, 0.15, 0.06}

// ErrNoHum is returned (wrapped) by Tracker.Result when no harmonic of
// the mains stands above the floor, so there is nothing to track.
var ErrNoHum = errors.New("no mains hum stands above the floor")

// TrackOptions configures a Tracker. SampleRate and Channels are
// required; every other zero field takes its default.
type TrackOptions struct {
	SampleRate float64
	Channels   int
	// MainsHz is 50 or 60, or 0 to take the one whose harmonics stand
	// higher. With NominalHz the search is centred on that value instead
	// (a notch stage's fundamental_hz).
	MainsHz   float64
	NominalHz float64
	SearchHz  float64
	// Harmonics is the highest harmonic number used to track.
	Harmonics   int
	HopSeconds  float64
	ThresholdDB float64
	// PerChannel tracks each channel on its own; otherwise one track is
	// measured from all channels together (the hum of one supply).
	PerChannel bool
}

// HumTrack is the fundamental of the hum over time: Hz[i] is its
// frequency at i*HopS seconds from the start.
type HumTrack struct {
	// Channel is the channel tracked, counted from 1, or 0 for a track
	// shared by all channels.
	Channel   int       `json:"channel"`
	NominalHz float64   `json:"nominal_hz"`
	HopS      float64   `json:"hop_s"`
	Hz        []float64 `json:"hz"`
	// Harmonics lists the harmonic numbers that stood above the floor
	// and were used.
	Harmonics []int `json:"harmonics_used"`
	// Bridged is the number of points where no harmonic could be trusted
	// (the hum masked), filled in from their neighbours; LongestGapS is
	// the longest such stretch.
	Bridged     int     `json:"bridged_points"`
	LongestGapS float64 `json:"longest_gap_s"`
}

// At returns the fundamental at t seconds, interpolated linearly between
// points and held beyond the ends.
func (t *HumTrack) At(sec float64) float64 {
	n := len(t.Hz)
	if n == 0 {
		return t.NominalHz
	}
	x := sec / t.HopS
	if !(x > 0) {
		return t.Hz[0]
	}
	if x >= float64(n-1) {
		return t.Hz[n-1]
	}
	i := int(x)
	f := x - float64(i)
	return t.Hz[i] + f*(t.Hz[i+1]-t.Hz[i])
}

// Range returns the lowest and highest frequency of the track.
func (t *HumTrack) Range() (lo, hi float64) {
	if len(t.Hz) == 0 {
		return t.NominalHz, t.NominalHz
	}
	return slices.Min(t.Hz), slices.Max(t.Hz)
}

// Found returns the share of the track's points where the hum was
// measured (the rest bridged from their neighbours), 0 to 1.
func (t *HumTrack) Found() float64 {
	if len(t.Hz) == 0 {
		return 0
	}
	return 1 - float64(t.Bridged)/float64(len(t.Hz))
}

// rateSpanS is the span over which the rate of change is measured, so
// that the estimate's noise from one hop to the next does not read as a
// fast change.
const rateSpanS = 0.1

// MaxRate returns the largest rate of change of the track in Hz per
// second, over spans of 0.1 s.
func (t *HumTrack) MaxRate() float64 {
	j := max(1, int(math.Round(rateSpanS/t.HopS)))
	r := 0.0
	for i := 0; i+j < len(t.Hz); i++ {
		r = math.Max(r, math.Abs(t.Hz[i+j]-t.Hz[i])/(float64(j)*t.HopS))
	}
	return r
}

// Tracker measures the hum's fundamental over time in a signal written
// to it in blocks of interleaved frames.
//
// Method. The signal is low-passed and kept at a reduced rate (a
// windowed-sinc FIR, Blackman window, at about 3 times the highest
// tracked harmonic).
//
//  1. Coarse: in 1 s blocks every 0.25 s the fundamental is the point of a
//     0.004 Hz grid where the harmonics, each divided by its local floor
//     (the median of the band one fundamental wide around it), add up
//     highest, refined by a parabola. Harmonics are used that stand
//     ThresholdDB above their floor on average; the mains (50 or 60 Hz)
//     is the one whose harmonics stand higher.
//  2. Phase: each harmonic k is mixed down by k times the phase of a
//     reference track and its phase measured in 0.2 s Blackman windows
//     every hop. The phase steps of all harmonics, each divided by k, are
//     combined with weights k^2 times its signal-to-floor ratio (the
//     inverse variance of its estimate of the fundamental's phase step,
//     as in a weighted least-squares fit of f_k = k f0), leaving out a
//     harmonic in a window where its amplitude strays 6 dB from its
//     median (masked by a call or a gust).
//  3. The combined frequency deviation is smoothed by weighted local
//     linear fits over +-0.5, +-0.15 and +-0.06 s: the longest where the
//     hum holds steady, a shorter one where the longer lags a move (where
//     the two differ by more than 2 to 4 times their usual difference for
//     longer than 2 hops). A point is fitted only with support on both
//     sides; hops with no trusted harmonic are bridged by linear
//     interpolation. The track is then the reference of the next pass (3
//     passes), which takes the smoothing's lag down pass by pass.
//
// The window sums of step 2 are taken from running sums (the Blackman
// window is a sum of three cosines), so a pass costs a few operations per
// reduced-rate sample and harmonic. Memory: the reduced-rate copy (4
// bytes a sample per channel, about 21 MB per channel-hour at 48 kHz
// with 9 harmonics of 50 Hz) goes to an unlinked temporary file as it
// is written (on Linux; see lowStore), so Write holds only buffers on
// the heap. Result reads it back one coarse block at a time, then
// computes the fine track in parts of at most 2 minutes, each read back
// with 10 s on either side whose points are dropped (a point depends on
// the signal within about 2 s of it): it holds one part's working arrays
// (about 20 bytes a reduced-rate sample and 400 bytes a hop, some 7 MB at
// 48 kHz) and the track itself (9 bytes a hop, 1.6 MB an hour), however
// long the signal. The coarse spectra are computed block by block and not
// kept. Each part takes its own medians (of the harmonics' amplitudes, the
// weights and the fits' differences), which follow a hum whose level
// changes over hours; within a part the track is what the whole signal
// would give to a tenth of the tracking tolerance (tested).
//
// Limits: a steady tone within the search range and the phase window's
// band (+-15 Hz of a harmonic), as loud as the hum, pulls the track
// towards it; the survey checks the track against its own block
// estimate and says so.
//
// A Tracker is not safe for concurrent use.
type Tracker struct {
	o      TrackOptions
	dec    int     // decimation factor
	rate   float64 // reduced rate
	h      []float64
	half   int
	pend   [][]float64 // per channel, input not yet consumed
	base   int64       // input index of pend[c][0]
	next   int64       // next output index
	store  *lowStore   // the reduced-rate signal, per channel
	n      int         // reduced-rate samples kept, once Result runs
	chunkS float64     // longest part tracked at once, seconds (trackChunkSeconds)
	ctx    context.Context
	frames int64
	done   bool // Result ran: out and err are its answer
	out    []*HumTrack
	err    error
	top    float64 // highest frequency tracked
}

// NewTracker checks the options and returns a Tracker.
func NewTracker(o TrackOptions) (*Tracker, error) {
	if !(o.SampleRate > 0) || math.IsInf(o.SampleRate, 0) {
		return nil, fmt.Errorf("analyze: %w: tracker sample rate %g Hz", ErrInvalidOption, o.SampleRate)
	}
	if o.Channels < 1 {
		return nil, fmt.Errorf("analyze: %w: tracker of %d channels", ErrInvalidOption, o.Channels)
	}
	if o.MainsHz != 0 && o.MainsHz != 50 && o.MainsHz != 60 {
		return nil, fmt.Errorf("analyze: %w: mains frequency %g Hz: use 50, 60 or 0 for either", ErrInvalidOption, o.MainsHz)
	}
	if o.NominalHz < 0 || math.IsNaN(o.NominalHz) || math.IsInf(o.NominalHz, 0) {
		return nil, fmt.Errorf("analyze: %w: nominal hum frequency %g Hz", ErrInvalidOption, o.NominalHz)
	}
	if o.SearchHz == 0 {
		o.SearchHz = DefaultTrackSearchHz
	}
	if o.Harmonics == 0 {
		o.Harmonics = DefaultTrackHarmonics
	}
	if o.HopSeconds == 0 {
		o.HopSeconds = DefaultTrackHopSeconds
	}
	if o.ThresholdDB == 0 {
		o.ThresholdDB = DefaultTrackThresholdDB
	}
	if !(o.SearchHz > 0 && o.SearchHz < 5) {
		return nil, fmt.Errorf("analyze: %w: search range %g Hz: use more than 0 and less than 5 Hz", ErrInvalidOption, o.SearchHz)
	}
	if o.Harmonics < 1 || o.Harmonics > 40 {
		return nil, fmt.Errorf("analyze: %w: %d tracked harmonics: use 1 to 40", ErrInvalidOption, o.Harmonics)
	}
	if !(o.HopSeconds >= 0.001 && o.HopSeconds <= 1) {
		return nil, fmt.Errorf("analyze: %w: track hop %g s: use 0.001 to 1 s", ErrInvalidOption, o.HopSeconds)
	}
	if !(o.ThresholdDB > 0) || math.IsInf(o.ThresholdDB, 0) {
		return nil, fmt.Errorf("analyze: %w: track threshold %g dB", ErrInvalidOption, o.ThresholdDB)
	}
	nominal := 60.0
	if o.NominalHz > 0 {
		nominal = o.NominalHz
	} else if o.MainsHz > 0 {
		nominal = o.MainsHz
	}
	t := &Tracker{o: o, chunkS: trackChunkSeconds}
	// Highest frequency tracked, kept below 0.4 of the rate.
	k := o.Harmonics
	for k > 1 && float64(k)*(nominal+o.SearchHz)+15 > 0.4*o.SampleRate {
		k--
	}
	t.o.Harmonics = k
	t.top = float64(k)*(nominal+o.SearchHz) + 15
	if t.top > 0.45*o.SampleRate {
		return nil, fmt.Errorf("analyze: %w: the sample rate %g Hz is too low to track hum at %g Hz", ErrInvalidOption, o.SampleRate, nominal)
	}
	t.dec = max(1, int(o.SampleRate/(trackOversample*t.top)))
	t.rate = o.SampleRate / float64(t.dec)
	if t.dec > 1 {
		// Windowed sinc, cut off at half the reduced rate; transition from
		// top to rate - top (what folds back lands above top). Blackman:
		// transition about 5.5 / L of the input rate, stopband 74 dB
		// (Oppenheim & Schafer, 3rd ed., table 7.2).
		tw := t.rate - 2*t.top
		n := int(math.Ceil(5.5*o.SampleRate/tw)) | 1
		t.half = n / 2
		t.h = make([]float64, n)
		fc := 0.5 / float64(t.dec)
		sum := 0.0
		for i := range t.h {
			m := float64(i - t.half)
			s := 2 * fc
			if m != 0 {
				s = math.Sin(2*math.Pi*fc*m) / (math.Pi * m)
			}
			x := 2 * math.Pi * float64(i) / float64(n-1)
			t.h[i] = s * (0.42 - 0.5*math.Cos(x) + 0.08*math.Cos(2*x))
			if i > t.half {
				t.h[i] = t.h[n-1-i] // exactly symmetric (see foldedDot)
			}
			sum += t.h[i]
		}
		for i := range t.h {
			t.h[i] /= sum
		}
	} else {
		t.h = []float64{1}
	}
	t.pend = make([][]float64, o.Channels)
	t.store = newLowStore(o.Channels)
	t.base = -int64(t.half)
	for c := range t.pend {
		t.pend[c] = make([]float64, t.half) // zeros before the start
	}
	return t, nil
}

// Write adds interleaved frames. It panics if len(x) is not a whole
// number of frames.
func (t *Tracker) Write(x []float64) {
	ch := t.o.Channels
	if len(x)%ch != 0 {
		panic(fmt.Sprintf("analyze: Tracker.Write: %d samples is not a whole number of %d-channel frames", len(x), ch))
	}
	if t.done {
		return
	}
	n := len(x) / ch
	if ch == 1 {
		t.pend[0] = append(t.pend[0], x...)
	} else {
		for c := 0; c < ch; c++ {
			p := t.pend[c]
			for i := 0; i < n; i++ {
				p = append(p, x[i*ch+c])
			}
			t.pend[c] = p
		}
	}
	t.frames += int64(n)
	t.decimate(false)
}

// decimate computes every reduced-rate sample whose input is all there
// (at the end, with zeros after the last frame).
func (t *Tracker) decimate(final bool) {
	ch := t.o.Channels
	last := t.frames - 1
	for {
		centre := t.next * int64(t.dec)
		if final {
			if centre > last {
				break
			}
		} else if centre+int64(t.half) > last {
			break
		}
		from := int(centre - int64(t.half) - t.base)
		for c := 0; c < ch; c++ {
			p := t.pend[c]
			seg := p[from:min(from+len(t.h), len(p))] // zeros beyond the end
			if len(seg) == len(t.h) {
				t.store.add(c, float32(foldedDot(t.h, seg)))
				continue
			}
			h := t.h[:len(seg)]
			// Four partial sums, so that the multiply-adds overlap.
			var s0, s1, s2, s3 float64
			i := 0
			for ; i+4 <= len(seg); i += 4 {
				s0 += h[i] * seg[i]
				s1 += h[i+1] * seg[i+1]
				s2 += h[i+2] * seg[i+2]
				s3 += h[i+3] * seg[i+3]
			}
			for ; i < len(seg); i++ {
				s0 += h[i] * seg[i]
			}
			t.store.add(c, float32((s0+s1)+(s2+s3)))
		}
		t.next++
	}
	// Drop the input no longer needed.
	keep := t.next*int64(t.dec) - int64(t.half) - t.base
	if keep > 1<<16 || final {
		k := int(min(keep, int64(len(t.pend[0]))))
		for c := 0; c < ch; c++ {
			t.pend[c] = append(t.pend[c][:0], t.pend[c][k:]...)
		}
		t.base += int64(k)
	}
}

// foldedDot returns the sum of h[i] x[i] for a symmetric h of odd
// length (h[i] = h[len-1-i], as the windowed sinc), folding x around the
// centre so that each coefficient multiplies once.
func foldedDot(h, x []float64) float64 {
	n := len(h)
	x = x[:n]
	half := n / 2
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+4 <= half; i += 4 {
		s0 += h[i] * (x[i] + x[n-1-i])
		s1 += h[i+1] * (x[i+1] + x[n-2-i])
		s2 += h[i+2] * (x[i+2] + x[n-3-i])
		s3 += h[i+3] * (x[i+3] + x[n-4-i])
	}
	for ; i < half; i++ {
		s0 += h[i] * (x[i] + x[n-1-i])
	}
	if n%2 == 1 {
		s1 += h[half] * x[half]
	}
	return (s0 + s1) + (s2 + s3)
}

// stopped returns the context's error, wrapped, when count is a
// multiple of 256 and the context of ResultContext is done.
func (t *Tracker) stopped(count int) error {
	if t.ctx == nil || count%256 != 0 {
		return nil
	}
	if err := t.ctx.Err(); err != nil {
		return fmt.Errorf("analyze: hum tracking stopped: %w", err)
	}
	return nil
}

// harm is one harmonic of one channel used for tracking.
type harm struct {
	k, c int
	snr  float64 // mean signal-to-floor power ratio
}

// Result tracks the hum in everything written. It returns one track,
// or one per channel with PerChannel. The error wraps ErrNoHum when no
// harmonic stands above the floor, ErrTrackSpill when the temporary file
// of the reduced-rate signal failed. Result frees the Tracker's
// temporary file and buffers; later calls return the same answer, and
// nothing more may be written.
func (t *Tracker) Result() ([]*HumTrack, error) {
	return t.ResultContext(context.Background())
}

// ResultContext is Result, stopped with ctx's error (wrapped) when ctx
// is done: checked every 256 coarse blocks (64 s of signal) and every
// part of the fine track (2 minutes), some tenths of a second of work
// at 48 kHz. A stopped Tracker frees its temporary file and answers
// every later call with the same error.
func (t *Tracker) ResultContext(ctx context.Context) ([]*HumTrack, error) {
	if !t.done {
		t.ctx = ctx
		t.out, t.err = t.result()
		t.ctx = nil
		t.done = true
		t.store.close()
	}
	return t.out, t.err
}

// Close frees the temporary file and buffers of a Tracker whose Result
// is not wanted (Result frees them itself). Nothing more may be written;
// Result then answers with an error.
func (t *Tracker) Close() {
	if !t.done {
		t.done = true
		t.err = fmt.Errorf("analyze: %w: hum tracker closed before its result", ErrInvalidOption)
		t.store.close()
	}
}

func (t *Tracker) result() ([]*HumTrack, error) {
	t.decimate(true)
	n := int(t.next)
	if float64(n) < 2*trackCoarseSeconds*t.rate {
		return nil, fmt.Errorf("analyze: %w: %.2f s of signal is too short to track hum; %g s at least", ErrInvalidOption, float64(t.frames)/t.o.SampleRate, 2*trackCoarseSeconds)
	}
	if err := t.store.finish(); err != nil {
		return nil, err
	}
	t.n = n
	var groups [][]int
	if t.o.PerChannel {
		for c := 0; c < t.o.Channels; c++ {
			groups = append(groups, []int{c})
		}
	} else {
		var all []int
		for c := 0; c < t.o.Channels; c++ {
			all = append(all, c)
		}
		groups = [][]int{all}
	}
	var out []*HumTrack
	for _, g := range groups {
		tr, err := t.track(g)
		if err != nil {
			if t.o.PerChannel {
				return nil, fmt.Errorf("analyze: channel %d: %w", g[0]+1, err)
			}
			return nil, fmt.Errorf("analyze: %w", err)
		}
		if t.o.PerChannel {
			tr.Channel = g[0] + 1
		}
		out = append(out, tr)
	}
	return out, nil
}

// coarse computes the coarse spectra of the blocks, one block at a
// time (the tracker reads them twice, block by block, so none is kept):
// of each only the bins the tracker reads (bins off to off+len-1 of the
// nfft/2+1 of the whole half-spectrum), those within one fundamental of
// every measured harmonic of every candidate nominal (humAbove's band
// and search range, at's grid points inside the search range).
type coarse struct {
	t      *Tracker
	chans  []int
	nfft   int
	df     float64
	off    int // first bin kept
	last   int // last bin kept
	bl     int // block length
	starts []int
	psd    [][]float64 // per channel of chans: the spectrum of the block loaded, [bin - off]

	fft       *realFFT
	ones, win []float64
	buf       []float64
	x         []float32 // one block of one channel
	z, coef   []complex128
}

func (t *Tracker) coarseSpectra(chans []int) *coarse {
	n := t.n
	bl := int(math.Round(trackCoarseSeconds * t.rate))
	hop := int(math.Round(trackCoarseHopSeconds * t.rate))
	nfft := 1
	for nfft < 4*bl {
		nfft *= 2
	}
	// nfft is a power of two: the project's own real FFT (rfft.go), which
	// is checked against gonum's and takes about half its time here.
	cs := &coarse{t: t, chans: chans, nfft: nfft, df: t.rate / float64(nfft), bl: bl, fft: newRealFFT(nfft)}
	cs.ones = make([]float64, nfft)
	for i := range cs.ones {
		cs.ones[i] = 1
	}
	cs.z = make([]complex128, nfft/2)
	cs.coef = make([]complex128, nfft/2+1)
	cs.win = make([]float64, bl)
	for i := range cs.win {
		cs.win[i] = 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(bl))
	}
	// The bins humAbove reads (it clamps to 1 .. nfft/2), and those at
	// reads: k f within the search range, which humAbove's range covers
	// with 1.5 Hz to spare (more than a bin, df <= 0.25 Hz, plus the grid's
	// rounding, k trackCoarseStepHz / 2).
	first, last := nfft/2, 1
	for _, f := range t.nominals() {
		for k := 1; k <= t.harmonicsOf(f); k++ {
			kf := float64(k)
			lo := int(math.Floor(min(kf*(f-t.o.SearchHz)-1.5, kf*f-f/2) / cs.df))
			hi := int(math.Ceil(max(kf*(f+t.o.SearchHz)+1.5, kf*f+f/2) / cs.df))
			first, last = min(first, max(lo, 0)), max(last, min(hi, nfft/2))
		}
	}
	cs.off, cs.last = min(first, last), max(first, last)
	cs.buf = make([]float64, nfft)
	cs.x = make([]float32, bl)
	cs.psd = make([][]float64, len(chans))
	for i := range cs.psd {
		cs.psd[i] = make([]float64, cs.last-cs.off+1)
	}
	for s := 0; s+bl <= n; s += hop {
		cs.starts = append(cs.starts, s)
	}
	return cs
}

// load computes the spectra of block b into cs.psd.
func (cs *coarse) load(b int) error {
	s, bl, buf, x := cs.starts[b], cs.bl, cs.buf, cs.x
	for ci, c := range cs.chans {
		if err := cs.t.store.read(c, s, x); err != nil {
			return err
		}
		clear(buf)
		mean := 0.0
		for i := 0; i < bl; i++ {
			mean += float64(x[i])
		}
		mean /= float64(bl)
		for i := 0; i < bl; i++ {
			buf[i] = (float64(x[i]) - mean) * cs.win[i]
		}
		cs.fft.load(cs.z, buf, cs.ones, 0, 0)
		cs.fft.transform(cs.z)
		cs.fft.unpack(cs.coef, cs.z)
		p := cs.psd[ci]
		for i, v := range cs.coef[cs.off : cs.last+1] {
			p[i] = real(v)*real(v) + imag(v)*imag(v)
		}
	}
	return nil
}

// at interpolates a power spectrum (bins cs.off on) linearly at hz; 0
// beyond the half-spectrum.
func (cs *coarse) at(p []float64, hz float64) float64 {
	x := hz / cs.df
	i := int(x)
	if i < 0 || i+1 > cs.nfft/2 {
		return 0
	}
	f := x - float64(i)
	return p[i-cs.off] + f*(p[i+1-cs.off]-p[i-cs.off])
}

// humAbove measures harmonic k of nominal f in one spectrum: the peak
// within the search range over the median of the band one fundamental
// wide around it (the peak's range left out). *scratchp is reused from
// call to call.
func (t *Tracker) humAbove(cs *coarse, p []float64, f float64, k int, scratchp *[]float64) (peak, floor float64) {
	kf := float64(k)
	lo := int(math.Floor((kf*(f-t.o.SearchHz) - 1.5) / cs.df))
	hi := int(math.Ceil((kf*(f+t.o.SearchHz) + 1.5) / cs.df))
	blo := int(math.Floor((kf*f - f/2) / cs.df))
	bhi := int(math.Ceil((kf*f + f/2) / cs.df))
	top := cs.nfft / 2 // the highest bin of the whole half-spectrum
	blo, bhi = max(blo, 1), min(bhi, top)
	lo, hi = max(lo, 1), min(hi, top)
	for i := lo; i <= hi; i++ {
		peak = math.Max(peak, p[i-cs.off])
	}
	scratch := (*scratchp)[:0]
	for i := blo; i <= bhi; i++ {
		if i < lo || i > hi {
			scratch = append(scratch, p[i-cs.off])
		}
	}
	*scratchp = scratch
	if len(scratch) == 0 {
		return peak, 0
	}
	return peak, selectKth(scratch, len(scratch)/2)
}

// selectKth returns the k-th smallest element of v (reordering v), by
// Hoare's quickselect with the middle element as pivot: the median
// without a full sort.
func selectKth(v []float64, k int) float64 {
	lo, hi := 0, len(v)-1
	for lo < hi {
		p := v[(lo+hi)/2]
		i, j := lo, hi
		for i <= j {
			for v[i] < p {
				i++
			}
			for v[j] > p {
				j--
			}
			if i <= j {
				v[i], v[j] = v[j], v[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return v[k]
		}
	}
	return v[k]
}

// nominals returns the candidate nominal frequencies.
func (t *Tracker) nominals() []float64 {
	switch {
	case t.o.NominalHz > 0:
		return []float64{t.o.NominalHz}
	case t.o.MainsHz > 0:
		return []float64{t.o.MainsHz}
	default:
		return []float64{50, 60}
	}
}

// harmonicsOf returns the harmonics of nominal f that are measured: up to
// t.o.Harmonics, the first always, the others while their search range
// and the phase window's band stay below t.top.
func (t *Tracker) harmonicsOf(f float64) int {
	k := 1
	for k < t.o.Harmonics && float64(k+1)*(f+t.o.SearchHz)+15 <= t.top+1e-9 {
		k++
	}
	return k
}

func (t *Tracker) track(chans []int) (*HumTrack, error) {
	cs := t.coarseSpectra(chans)
	nb := len(cs.starts)
	noms := t.nominals()
	var scratch []float64
	// Each harmonic's peaks and floors summed over the blocks, [nominal]
	// [k-1][channel of chans].
	sps := make([][][]float64, len(noms))
	sfs := make([][][]float64, len(noms))
	for fi, f := range noms {
		for range t.harmonicsOf(f) {
			sps[fi] = append(sps[fi], make([]float64, len(chans)))
			sfs[fi] = append(sfs[fi], make([]float64, len(chans)))
		}
	}
	// The harmonics are chosen on blocks that do not overlap (every
	// fourth): an average over the file needs no more, and each block
	// loaded costs an FFT per channel.
	every := max(1, int(math.Round(trackCoarseSeconds/trackCoarseHopSeconds)))
	for b := 0; b < nb; b += every {
		if err := t.stopped(b / every); err != nil {
			return nil, err
		}
		if err := cs.load(b); err != nil {
			return nil, err
		}
		for fi, f := range noms {
			for k := 1; k <= t.harmonicsOf(f); k++ {
				for ci := range chans {
					p, fl := t.humAbove(cs, cs.psd[ci], f, k, &scratch)
					sps[fi][k-1][ci] += p
					sfs[fi][k-1][ci] += fl
				}
			}
		}
	}
	bestScore, nominal := -1.0, 0.0
	var used []harm
	for fi, f := range noms {
		var hs []harm
		score := 0.0
		for k := 1; k <= t.harmonicsOf(f); k++ {
			for ci := range chans {
				sp, sf := sps[fi][k-1][ci], sfs[fi][k-1][ci]
				if !(sf > 0) {
					continue
				}
				// The peak bin of a zero-padded Hann window over the median
				// of single-periodogram bins: the median reads ln 2 of the mean
				// of exponentially distributed bins (common practice).
				r := sp / (sf / math.Ln2)
				db := 10 * math.Log10(r)
				if db >= t.o.ThresholdDB {
					hs = append(hs, harm{k: k, c: ci, snr: math.Min(r, math.Pow(10, trackMaxWeightDB/10))})
					score += db
				}
			}
		}
		if len(hs) > 0 && score > bestScore {
			bestScore, nominal, used = score, f, hs
		}
	}
	if used == nil {
		return nil, ErrNoHum
	}
	// Coarse track: per block, the grid point where the harmonics over
	// their floors add up highest.
	steps := int(math.Round(t.o.SearchHz / trackCoarseStepHz))
	cf := make([]float64, nb)
	ok := make([]bool, nb)
	floors := make([]float64, len(used))
	for b := 0; b < nb; b++ {
		if err := t.stopped(b); err != nil {
			return nil, err
		}
		if err := cs.load(b); err != nil {
			return nil, err
		}
		for j, u := range used {
			_, fl := t.humAbove(cs, cs.psd[u.c], nominal, u.k, &scratch)
			floors[j] = fl / math.Ln2
		}
		score := func(i int) float64 {
			f := nominal + float64(i)*trackCoarseStepHz
			s := 0.0
			for j, u := range used {
				if floors[j] > 0 {
					s += cs.at(cs.psd[u.c], float64(u.k)*f) / floors[j]
				}
			}
			return s
		}
		best, bi := -1.0, 0
		for i := -steps; i <= steps; i++ {
			if s := score(i); s > best {
				best, bi = s, i
			}
		}
		f := nominal + float64(bi)*trackCoarseStepHz
		if bi > -steps && bi < steps {
			a, c := score(bi-1), score(bi+1)
			if d := a - 2*best + c; d < 0 {
				f += trackCoarseStepHz * 0.5 * (a - c) / d
			}
		}
		cf[b] = f
		// A block counts when the comb stands above the threshold in it.
		ok[b] = best >= math.Pow(10, t.o.ThresholdDB/10)
	}
	bl := int(math.Round(trackCoarseSeconds * t.rate))
	ct := make([]float64, nb) // block centres, reduced-rate samples
	for b := range ct {
		ct[b] = float64(cs.starts[b]) + float64(bl)/2
	}
	if !slices.Contains(ok, true) {
		return nil, ErrNoHum
	}
	bridge(cf, ok)

	// A whole number of reduced-rate samples per hop, so that every
	// phase step spans the same time.
	n := t.n
	hopN := max(1, int(math.Round(t.o.HopSeconds*t.rate)))
	hop := float64(hopN)
	m := (n-1)/hopN + 1
	tr := &HumTrack{NominalHz: nominal, HopS: hop / t.rate}
	for _, u := range used {
		if !slices.Contains(tr.Harmonics, u.k) {
			tr.Harmonics = append(tr.Harmonics, u.k)
		}
	}
	slices.Sort(tr.Harmonics)
	lw := int(math.Round(trackPhaseSeconds*t.rate)) | 1
	win := make([]float64, lw)
	for i := range win {
		x := 2 * math.Pi * float64(i) / float64(lw-1)
		win[i] = 0.42 - 0.5*math.Cos(x) + 0.08*math.Cos(2*x)
	}
	// The fine track, part by part (one part when the signal is no longer
	// than a part and its two margins): each part is read back with its
	// margins, tracked, and its own hops kept.
	f := make([]float64, m)
	valid := make([]bool, m)
	margin := int(math.Ceil(trackMarginSeconds * t.rate / hop))
	parts, size := 1, m
	if most := math.Floor(t.chunkS * t.rate / hop); float64(m) > most+float64(2*margin) {
		parts = int(math.Ceil(float64(m) / most))
		size = (m + parts - 1) / parts
	}
	segs := make([][]float32, len(chans))
	for a := 0; a < m; a += size {
		if err := t.stopped(0); err != nil {
			return nil, err
		}
		b := min(m, a+size)
		a0, b0 := a, b
		if parts > 1 {
			a0, b0 = max(0, a-margin), min(m, b+margin)
		}
		s0, s1 := a0*hopN, n
		if b0 < m {
			s1 = (b0-1)*hopN + 1
		}
		for ci, c := range chans {
			segs[ci] = slices.Grow(segs[ci][:0], s1-s0)[:s1-s0]
			if err := t.store.read(c, s0, segs[ci]); err != nil {
				return nil, err
			}
		}
		// The first reference: the coarse track at every sample.
		ref := make([]float64, s1-s0)
		for i := range ref {
			ref[i] = interpAt(ct, cf, float64(s0+i))
		}
		pf, pv := t.fine(segs, used, ref, b0-a0, hop, win)
		if pf == nil {
			continue // nothing trusted in this part: bridged below
		}
		copy(f[a:b], pf[a-a0:b-a0])
		copy(valid[a:b], pv[a-a0:b-a0])
	}
	gap := 0
	for _, v := range valid {
		if v {
			gap = 0
			continue
		}
		tr.Bridged++
		gap++
		tr.LongestGapS = math.Max(tr.LongestGapS, float64(gap)*tr.HopS)
	}
	if tr.Bridged == len(valid) {
		return nil, ErrNoHum
	}
	bridge(f, valid)
	tr.Hz = f
	return tr, nil
}

// fine tracks one stretch of the signal (segs, per channel of the
// track's channels; ref is the first reference at each of its samples
// and is overwritten) over its m hops: trackPasses phase passes, each
// measured against the previous one's track. It returns the fundamental
// at each hop (bridged where nothing was trusted) and where it was
// measured, or nil when nothing could be trusted in some pass.
func (t *Tracker) fine(segs [][]float32, used []harm, ref []float64, m int, hop float64, win []float64) ([]float64, []bool) {
	var f []float64
	var valid []bool
	noise := make([][]float64, len(used))
	for pass := 0; pass < trackPasses; pass++ {
		f, valid = t.phasePass(segs, used, ref, m, hop, win, pass == 0, noise)
		if !slices.Contains(valid, true) {
			return nil, nil
		}
		bridge(f, valid)
		// The new reference.
		for i := range ref {
			x := float64(i) / hop
			j := min(int(x), m-2)
			if m == 1 {
				ref[i] = f[0]
				continue
			}
			fr := x - float64(j)
			ref[i] = f[j] + fr*(f[j+1]-f[j])
		}
	}
	return f, valid
}

// phasePass measures each harmonic's phase against k times the phase
// of ref, every hop, and returns the smoothed fundamental at each hop
// and whether any harmonic could be trusted there. With whole the fit
// smooths the reference plus the deviation (the first pass: the coarse
// reference has kinks at its points that a smoothed deviation alone
// would keep); otherwise it smooths the deviation alone and adds it to
// the reference, which takes the smoothing's bias down pass by pass.
func (t *Tracker) phasePass(segs [][]float32, used []harm, ref []float64, m int, hop float64, win []float64, whole bool, floors [][]float64) ([]float64, []bool) {
	n := len(ref)
	// Reference phase, in cycles (the fraction is what matters; float64
	// keeps 1e-9 cycles after 10 hours of 60 Hz).
	cyc := make([]float64, n)
	acc := 0.0
	for i := range cyc {
		cyc[i] = acc
		acc += ref[i] / t.rate
	}
	lw := len(win)
	hw := lw / 2
	// demod returns the windowed sum of channel c mixed down by kf times
	// the reference phase, at every hop. The Blackman window is a sum of
	// three cosines, so each window's sum is a combination of five running
	// sums (of the mixed signal times 1 and exp(-+i j theta),
	// exp(-+2 i j theta), theta = 2 pi/(lw-1)) taken at the window's two
	// ends: one pass over the signal, whatever the window's length.
	L := lw - 1
	rot := make([]complex128, L) // exp(i theta j), j mod L
	for j := range rot {
		rot[j] = cmplx.Rect(1, 2*math.Pi*float64(j)/float64(L))
	}
	type sums [5]complex128
	starts := make([]sums, m)
	ends := make([]sums, m)
	first := make([]int, m) // unclamped window start
	for h := range first {
		first[h] = int(math.Round(float64(h)*hop)) - hw
	}
	demod := func(c int, kf float64) []complex128 {
		x := segs[c]
		var run sums
		hs, he := 0, 0 // next hop whose start / end snapshot is due
		snap := func(i int) {
			for hs < m && max(0, first[hs]) == i {
				starts[hs] = run
				hs++
			}
			for he < m && min(n, first[he]+lw) == i {
				ends[he] = run
				he++
			}
		}
		// The mixing phasor p = exp(-2 pi i kf cyc) turns by
		// q = exp(-2 pi i kf ref/rate) per sample, and q by the small angle
		// of ref's change (exp(-i e) = 1 - i e - e^2/2 to e^3/6, below 1e-14
		// here); both are set exactly every trackExactEvery samples.
		var pp, q complex128
		w := 2 * math.Pi * kf / t.rate
		j1, j2 := 0, 0 // i mod L and 2i mod L
		for i := 0; i < n; {
			snap(i)
			if i%trackExactEvery == 0 {
				ph := kf * cyc[i]
				ph -= math.Floor(ph)
				sn, co := math.Sincos(2 * math.Pi * ph)
				pp = complex(co, -sn)
				a := kf * ref[i] / t.rate
				a -= math.Floor(a)
				sn, co = math.Sincos(2 * math.Pi * a)
				q = complex(co, -sn)
			}
			// Up to the next snapshot or exact setting, the samples run
			// through without either check.
			e := min(n, (i/trackExactEvery+1)*trackExactEvery)
			if hs < m {
				e = min(e, max(0, first[hs]))
			}
			if he < m {
				e = min(e, first[he]+lw)
			}
			s0, s1, s2, s3, s4 := run[0], run[1], run[2], run[3], run[4]
			for ; i < e; i++ {
				v := float64(x[i])
				d := complex(v*real(pp), v*imag(pp))
				pp *= q
				if i+1 < n {
					e := w * (ref[i+1] - ref[i])
					q *= complex(1-e*e/2, -e)
				}
				// d r and d conj(r) share their four products (the same
				// values as the complex products give).
				r1 := rot[j1]
				r2 := rot[j2]
				if j1++; j1 == L {
					j1 = 0
				}
				if j2 += 2; j2 >= L {
					j2 -= L
				}
				dr, di := real(d), imag(d)
				ac, bd, ad, bc := dr*real(r1), di*imag(r1), dr*imag(r1), di*real(r1)
				s0 += d
				s1 += complex(ac-bd, ad+bc)
				s2 += complex(ac+bd, bc-ad)
				ac, bd, ad, bc = dr*real(r2), di*imag(r2), dr*imag(r2), di*real(r2)
				s3 += complex(ac-bd, ad+bc)
				s4 += complex(ac+bd, bc-ad)
			}
			run = sums{s0, s1, s2, s3, s4}
		}
		snap(n)
		z := make([]complex128, m)
		for h := range z {
			var e sums
			for q := range e {
				e[q] = ends[h][q] - starts[h][q]
			}
			c0 := ((first[h] % L) + L) % L
			b1 := cmplx.Conj(rot[c0])       // exp(-i theta c0)
			b2 := cmplx.Conj(rot[(2*c0)%L]) // exp(-2 i theta c0)
			z[h] = 0.42*e[0] - 0.25*(b1*e[1]+cmplx.Conj(b1)*e[2]) + 0.04*(b2*e[3]+cmplx.Conj(b2)*e[4])
		}
		return z
	}
	// Per hop: the weighted phase step of the fundamental, in cycles.
	step := make([]float64, m)
	wsum := make([]float64, m)
	amps := make([]float64, m)
	fl := make([]float64, m)
	lim := math.Pow(10, trackAmpLimitDB/20)
	thr := math.Pow(10, t.o.ThresholdDB/10)
	maxSNR := math.Pow(10, trackMaxWeightDB/10)
	edge := int(math.Ceil(float64(hw) / hop))
	for j, u := range used {
		z := demod(u.c, float64(u.k))
		// The local floor: the power halfway to the next harmonic, in the
		// same window, averaged over +-trackFloorHops hops.
		// Measured in the first pass only: the floor does not depend on
		// the reference's fine detail.
		floor := floors[j]
		if floor == nil {
			zn := demod(u.c, float64(u.k)+0.5)
			for h := range fl {
				a := cmplx.Abs(zn[h])
				fl[h] = a * a
			}
			floor = movingMean(fl, trackFloorHops)
			floors[j] = floor
		}
		for h := range amps {
			amps[h] = cmplx.Abs(z[h])
		}
		// The median of the windows wholly inside the signal.
		med := median(amps[min(m-1, edge):max(1, m-edge)])
		snr := func(h int) float64 {
			if !(med > 0) || amps[h] < med/lim || amps[h] > med*lim {
				return 0
			}
			r := amps[h] * amps[h] / math.Max(floor[h], 1e-300)
			if r < thr {
				return 0
			}
			return math.Min(r, maxSNR)
		}
		prev := snr(0)
		for h := 1; h < m; h++ {
			cur := snr(h)
			if cur > 0 && prev > 0 {
				w := float64(u.k*u.k) * math.Min(cur, prev)
				dph := cmplx.Phase(z[h]*cmplx.Conj(z[h-1])) / (2 * math.Pi)
				step[h] += w * dph / float64(u.k)
				wsum[h] += w
			}
			prev = cur
		}
	}
	// Frequency deviation per hop, then a weighted local linear fit.
	// A hop whose weight falls far below the usual one is near a masking
	// sound, and its step is biased by it: it is left out.
	var ws []float64
	for _, w := range wsum[1:] {
		if w > 0 {
			ws = append(ws, w)
		}
	}
	minW := median(ws) * trackMinWeight
	dev := make([]float64, m)
	valid := make([]bool, m)
	refAt := func(h int) float64 { return ref[min(n-1, int(math.Round(float64(h)*hop)))] }
	for h := 1; h < m; h++ {
		if wsum[h] > 0 && wsum[h] >= minW {
			dev[h] = step[h] / wsum[h] / (hop / t.rate)
			if whole {
				dev[h] += (refAt(h-1) + refAt(h)) / 2
			}
			valid[h] = true
		}
	}
	// Hop 0 has no step of its own: it shares hop 1's.
	if m > 1 {
		dev[0], valid[0], wsum[0] = dev[1], valid[1], wsum[1]
	}
	base := refAt
	if whole {
		base = func(int) float64 { return 0 }
	}
	// Fits from the longest to the shortest: each shorter one replaces
	// the result where the two differ by more than the noise (a move the
	// longer fit lags), blended between trackBlendLow and trackBlendHigh
	// times it. The noise is read from the spread of their difference
	// over the track, most of which is steady (1.4826 median absolute
	// deviation, the usual robust estimate of a standard deviation).
	var cur []float64
	var okC []bool
	for _, sec := range trackSmoothSpans {
		fit, ok := localFit(dev, wsum, valid, max(1, int(math.Round(sec*t.rate/hop))), base)
		if cur == nil {
			cur, okC = fit, ok
			continue
		}
		var diffs []float64
		for h := range fit {
			if ok[h] && okC[h] {
				diffs = append(diffs, math.Abs(cur[h]-fit[h]))
			}
		}
		noise := 1.4826 * median(diffs)
		a := make([]float64, len(fit))
		for h := range fit {
			if ok[h] && okC[h] && noise > 0 {
				d := math.Abs(cur[h] - fit[h])
				a[h] = math.Min(1, math.Max(0, (d-trackBlendLow*noise)/((trackBlendHigh-trackBlendLow)*noise)))
			}
		}
		// An opening (running minimum, then running maximum, over
		// +-trackBlendHoldSeconds): a move lasts, a noise peak does not.
		r := max(1, int(math.Round(trackBlendHoldSeconds*t.rate/hop)))
		a = runningMax(runningMin(a, r), r)
		for h := range fit {
			if !ok[h] {
				continue
			}
			if !okC[h] {
				cur[h], okC[h] = fit[h], true
				continue
			}
			cur[h] = a[h]*fit[h] + (1-a[h])*cur[h]
		}
	}
	return cur, okC
}

// localFit smooths the per-step deviations dev (valid where valid, of
// weight wsum; step q lies at hop q - 1/2) by a weighted local linear
// fit over +-sw hops with triangular weights, evaluated at every hop. A
// hop without support on both sides is not fitted (no extrapolation).
func localFit(dev, wsum []float64, valid []bool, sw int, base func(int) float64) ([]float64, []bool) {
	m := len(dev)
	out := make([]float64, m)
	fitted := make([]bool, m)
	for h := 0; h < m; h++ {
		// Steps are centred between hops h-1 and h: at h - 1/2.
		var s0, s1, s2, sy, sxy, left, right float64
		for q := max(1, h-sw); q <= min(m-1, h+sw); q++ {
			if !valid[q] {
				continue
			}
			x := float64(q) - 0.5 - float64(h)
			// Triangular weights make the fit's response fall smoothly.
			w := wsum[q] * (1 - math.Abs(x)/float64(sw+1))
			if w <= 0 {
				continue
			}
			if x < 0 {
				left += w
			} else {
				right += w
			}
			s0 += w
			s1 += w * x
			s2 += w * x * x
			sy += w * dev[q]
			sxy += w * x * dev[q]
		}
		// No extrapolation: the fit needs support on both sides.
		if s0 == 0 || left < trackSideShare*s0 || right < trackSideShare*s0 {
			continue
		}
		den := s0*s2 - s1*s1
		a := sy / s0
		if den > 1e-12*s0*s0 {
			a = (sy*s2 - sxy*s1) / den
		}
		out[h] = base(h) + a
		fitted[h] = true
	}
	return out, fitted
}

// bridge fills the points not ok by linear interpolation between the
// nearest ok ones, holding the end values. At least one must be ok.
func bridge(v []float64, ok []bool) {
	prev := -1
	for i := range v {
		if !ok[i] {
			continue
		}
		if prev < 0 {
			for j := 0; j < i; j++ {
				v[j] = v[i]
			}
		} else {
			for j := prev + 1; j < i; j++ {
				f := float64(j-prev) / float64(i-prev)
				v[j] = v[prev] + f*(v[i]-v[prev])
			}
		}
		prev = i
	}
	for j := prev + 1; j < len(v); j++ {
		v[j] = v[prev]
	}
}

// interpAt interpolates (xs, ys) linearly at x, holding the end values.
func interpAt(xs, ys []float64, x float64) float64 {
	if x <= xs[0] {
		return ys[0]
	}
	if x >= xs[len(xs)-1] {
		return ys[len(ys)-1]
	}
	i, _ := slices.BinarySearch(xs, x)
	if i == 0 {
		return ys[0]
	}
	f := (x - xs[i-1]) / (xs[i] - xs[i-1])
	return ys[i-1] + f*(ys[i]-ys[i-1])
}

// runningMin and runningMax return the least and the largest of v over
// +-r points about each point.
func runningMin(v []float64, r int) []float64 {
	out := make([]float64, len(v))
	for i := range v {
		out[i] = slices.Min(v[max(0, i-r):min(len(v), i+r+1)])
	}
	return out
}

func runningMax(v []float64, r int) []float64 {
	out := make([]float64, len(v))
	for i := range v {
		out[i] = slices.Max(v[max(0, i-r):min(len(v), i+r+1)])
	}
	return out
}

// movingMean returns the mean of v over +-r points about each point
// (fewer at the ends).
func movingMean(v []float64, r int) []float64 {
	out := make([]float64, len(v))
	sum, cnt := 0.0, 0
	lo, hi := 0, 0 // window [lo, hi)
	for i := range v {
		for hi < len(v) && hi <= i+r {
			sum += v[hi]
			cnt++
			hi++
		}
		for lo < i-r {
			sum -= v[lo]
			cnt--
			lo++
		}
		out[i] = sum / float64(cnt)
	}
	return out
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	return s[len(s)/2]
}
