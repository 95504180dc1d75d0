package analyze

import (
	"errors"
	"fmt"
	"math"

	"github.com/wavsieve/wavsieve/design"
)

// Fractional-octave band levels.
//
// A BandBank splits each channel into the 1/b-octave bands of
// IEC 61260-1 (design.DesignBand filters, second-order sections) and
// accumulates the mean square of every band over the file and, with an
// interval, over consecutive stretches of it.
//
// The bands do not all run at the file's rate. The bank decimates by
// octaves: the signal goes through an anti-alias low-pass (elliptic,
// second-order sections, passband to 1/8 of the rate with 0.002 dB
// ripple, 80 dB from 1/4 of the rate) and every second sample is kept;
// a band runs at the lowest of these rates at which its upper edge lies
// at or below 1/4 of the rate, so that the low-pass passband (1/8 of
// the previous rate) covers it and nothing folds into it from above.
// Bands too high for that run at the file's rate. Each octave of bands
// then costs about what the octave above it costs at half the samples,
// and the whole bank stays within about twice the cost of the bands of
// the top two octaves.

// BankOptions configure a BandBank.
type BankOptions struct {
	SampleRate float64
	Channels   int
	// Fraction is b of the 1/b-octave bands: 1, 2, 3, 6, 12 or 24.
	Fraction int
	// FromHz and ToHz bound the exact mid-band frequencies of the bands
	// (nominal values work: each end is 1% wide). FromHz 0 means 16 Hz for
	// octaves and 12.5 Hz otherwise; ToHz 0 means the highest band whose
	// upper edge lies below 0.45 of the rate. An explicit ToHz may go
	// higher, as long as the upper edge stays below the Nyquist frequency.
	FromHz, ToHz float64
	// IntervalFrames, when positive, also gives levels over consecutive
	// intervals of this many frames (the last one may be shorter).
	IntervalFrames int64
	// Prefilter, when not nil, runs before the bank and the overall
	// level, at the file's rate: a frequency weighting.
	Prefilter []design.Section
	// FullRate runs every band at the file's rate, without decimation
	// (slower; for comparison).
	FullRate bool
	// ClipAt, when positive, counts the input samples whose magnitude is
	// ClipAt or more (before the prefilter): samples at full scale, which
	// may have been clipped. 0 counts nothing (float files whose samples
	// are in engineering units).
	ClipAt float64
}

// DefaultBandEdgeFraction is the highest upper band edge, as a fraction
// of the sample rate, of the bands a bank includes by default.
const DefaultBandEdgeFraction = 0.45

// BankLevels are mean squares (in squared sample units) of one stretch
// of the signal.
type BankLevels struct {
	StartFrame, Frames int64
	// Overall[c] is the mean square of channel c (after the prefilter).
	Overall []float64
	// Bands[c][i] is the mean square of band i of channel c.
	Bands [][]float64
	// AtClip[c] counts the samples of channel c at or beyond
	// BankOptions.ClipAt (whole file only).
	AtClip []int64
}

// BandBank computes band levels. Feed it interleaved frames with Write;
// it keeps its state between calls and allocates only in NewBandBank
// and when an interval completes. It is not safe for concurrent use.
type BandBank struct {
	opt    BankOptions
	bands  []design.Band
	level  []int // decimation level of each band
	filts  []design.Designed
	stages []*bankStage // one per decimation level, level 0 first
	ch     int

	pre *bankBand // the prefilter, with its state per channel; nil when none

	// accumulators
	totalFrames int64
	atClip      []int64     // per channel
	overallSum  []float64   // per channel, whole file
	overallInt  []float64   // per channel, current interval
	bandSum     [][]float64 // [c][band]
	bandCount   []int64     // per level: samples seen at that level (whole file)
	intervals   []BankLevels
	intBand     [][]float64 // [c][band], current interval
	intCount    []int64     // per level, current interval
	intStart    int64
	intFrames   int64
	planar      []float64
}

// bankStage is the work at one rate: the bands that run there and the
// low-pass that feeds the next rate.
type bankStage struct {
	rate  float64
	bands []int      // indices into BandBank.bands
	run   []bankBand // the bands of the stage
	// lp is the anti-alias low-pass, padded to whole groups of four
	// sections; nil at the last stage. lpz[c] is its state for channel c.
	lp  [][4]design.Section
	lpz [][][4][2]float64
	odd []bool      // per channel: the next low-pass output is dropped
	buf [][]float64 // per channel: samples waiting for this stage
	tmp []float64
}

// bankBand is one band's filter at its stage (or the prefilter), with its
// state per channel.
type bankBand struct {
	index int              // into BandBank.bands; -1 for the prefilter
	secs  []design.Section // normalised, a0 = 1
	z     [][][2]float64   // [channel][section]
}

// run filters x in place through the band's sections with the state of
// channel c, three or four sections at a time as wavefronts.
func (bb *bankBand) run(x []float64, c int) {
	secs, z := bb.secs, bb.z[c]
	for len(secs) > 0 {
		switch {
		case len(secs) == 3:
			wave3(x, (*[3]design.Section)(secs), (*[3][2]float64)(z))
			secs, z = nil, nil
		case len(secs) >= 4:
			wave4(x, (*[4]design.Section)(secs[:4]), (*[4][2]float64)(z[:4]))
			secs, z = secs[4:], z[4:]
		default:
			for k := range secs {
				oneSection(x, &secs[k], &z[k])
			}
			secs, z = nil, nil
		}
	}
}

// sumSquares returns the sum of the squares of x, with four partial sums
// so that the additions do not wait on each other.
func sumSquares(x []float64) float64 {
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+4 <= len(x); i += 4 {
		w := x[i : i+4 : i+4]
		s0 += w[0] * w[0]
		s1 += w[1] * w[1]
		s2 += w[2] * w[2]
		s3 += w[3] * w[3]
	}
	for ; i < len(x); i++ {
		s0 += x[i] * x[i]
	}
	return (s0 + s1) + (s2 + s3)
}

// normalised returns the sections scaled to a0 = 1.
func normalised(secs []design.Section) []design.Section {
	out := make([]design.Section, len(secs))
	for i, s := range secs {
		out[i] = design.Section{s[0] / s[3], s[1] / s[3], s[2] / s[3], 1, s[4] / s[3], s[5] / s[3]}
	}
	return out
}

// aboveNyquist is a band range reaching past the Nyquist frequency; it
// is design.ErrAboveNyquist for errors.Is.
type aboveNyquist string

func (e aboveNyquist) Error() string        { return string(e) }
func (e aboveNyquist) Is(target error) bool { return target == design.ErrAboveNyquist }

// ErrNoBands is returned by NewBandBank when no band lies in the range.
var ErrNoBands = errors.New("analyze: no band lies in the requested range at this sample rate")

// bankLowpass is the anti-alias filter of the decimation by 2 from rate:
// its edges are the same fractions of every rate it is designed at.
func bankLowpass(rate float64) (*design.Filter, error) {
	return design.Design(design.Spec{Stages: []design.Stage{{
		Family: design.Elliptic, Response: design.Lowpass,
		PassbandHz: design.Edges{rate / 8}, StopbandHz: design.Edges{rate / 4},
		RippleDB: 0.002, AttenuationDB: 80,
	}}}, rate)
}

// NewBandBank designs the bank's filters for the options.
func NewBandBank(o BankOptions) (*BandBank, error) {
	if !(o.SampleRate > 0) || math.IsInf(o.SampleRate, 0) {
		return nil, fmt.Errorf("analyze: invalid sample rate %g", o.SampleRate)
	}
	if o.Channels < 1 {
		return nil, fmt.Errorf("analyze: invalid channel count %d", o.Channels)
	}
	if !design.ValidFraction(o.Fraction) {
		return nil, fmt.Errorf("analyze: unsupported fraction %d: use 1, 2, 3, 6, 12 or 24", o.Fraction)
	}
	if o.IntervalFrames < 0 {
		return nil, fmt.Errorf("analyze: invalid interval of %d frames", o.IntervalFrames)
	}
	from, to := o.FromHz, o.ToHz
	if from == 0 {
		from = 12.5
		if o.Fraction == 1 {
			from = 16
		}
	}
	defaultTo := to == 0
	if defaultTo {
		to = o.SampleRate / 2
	}
	if defaultTo && from > to {
		return nil, ErrNoBands
	}
	if !(from > 0) || !(to >= from) {
		return nil, fmt.Errorf("analyze: invalid band range %g Hz to %g Hz", from, to)
	}
	var bands []design.Band
	for _, bd := range design.BandsBetween(o.Fraction, from, to) {
		if defaultTo && !(bd.UpperHz < DefaultBandEdgeFraction*o.SampleRate) {
			continue
		}
		if !(bd.UpperHz < o.SampleRate/2) {
			return nil, aboveNyquist(fmt.Sprintf("analyze: the 1/%d-octave band %s Hz reaches %.6g Hz, above the Nyquist frequency %g Hz; lower the upper end of the range", o.Fraction, bd.Label, bd.UpperHz, o.SampleRate/2))
		}
		bands = append(bands, bd)
	}
	if len(bands) == 0 {
		return nil, ErrNoBands
	}
	b := &BandBank{opt: o, bands: bands, ch: o.Channels}
	// Assign each band its level: the deepest k with f2 <= rate/2^k/4.
	maxLevel := 0
	b.level = make([]int, len(bands))
	for i, bd := range bands {
		k := 0
		if !o.FullRate {
			for bd.UpperHz <= o.SampleRate/math.Pow(2, float64(k+1))/4 {
				k++
			}
		}
		b.level[i] = k
		maxLevel = max(maxLevel, k)
	}
	b.filts = make([]design.Designed, len(bands))
	rate := o.SampleRate
	for k := 0; k <= maxLevel; k++ {
		st := &bankStage{rate: rate}
		var secs [][]design.Section // of each band of the stage
		for i := range bands {
			if b.level[i] != k {
				continue
			}
			d, err := design.DesignBand(bands[i], rate)
			if err != nil {
				return nil, err
			}
			b.filts[i] = d
			st.bands = append(st.bands, i)
			secs = append(secs, normalised(d.Sections))
		}
		st.buf = make([][]float64, o.Channels)
		st.odd = make([]bool, o.Channels)
		for j, bi := range st.bands {
			bb := bankBand{index: bi, secs: secs[j], z: make([][][2]float64, o.Channels)}
			for c := range bb.z {
				bb.z[c] = make([][2]float64, len(secs[j]))
			}
			st.run = append(st.run, bb)
		}
		if k < maxLevel {
			lp, err := bankLowpass(rate)
			if err != nil {
				return nil, fmt.Errorf("analyze: anti-alias low-pass at %g Hz: %w", rate, err)
			}
			ls := normalised(lp.Sections())
			for len(ls)%4 != 0 {
				ls = append(ls, identity)
			}
			for i := 0; i < len(ls); i += 4 {
				st.lp = append(st.lp, [4]design.Section(ls[i:i+4]))
			}
			st.lpz = make([][][4][2]float64, o.Channels)
			for c := range st.lpz {
				st.lpz[c] = make([][4][2]float64, len(st.lp))
			}
		}
		b.stages = append(b.stages, st)
		rate /= 2
	}
	if len(o.Prefilter) > 0 {
		b.pre = &bankBand{index: -1, secs: normalised(o.Prefilter), z: make([][][2]float64, o.Channels)}
		for c := range b.pre.z {
			b.pre.z[c] = make([][2]float64, len(o.Prefilter))
		}
	}
	b.overallSum = make([]float64, o.Channels)
	b.atClip = make([]int64, o.Channels)
	b.overallInt = make([]float64, o.Channels)
	b.bandSum = make([][]float64, o.Channels)
	b.intBand = make([][]float64, o.Channels)
	for c := range b.bandSum {
		b.bandSum[c] = make([]float64, len(bands))
		b.intBand[c] = make([]float64, len(bands))
	}
	b.bandCount = make([]int64, len(b.stages))
	b.intCount = make([]int64, len(b.stages))
	return b, nil
}

// Reset puts the bank back as NewBandBank left it: filters at rest, no
// levels, ready for another file of the same rate and channel count.
func (b *BandBank) Reset() {
	for _, st := range b.stages {
		for c := range st.buf {
			st.buf[c] = st.buf[c][:0]
			st.odd[c] = false
		}
		for bi := range st.run {
			for c := range st.run[bi].z {
				clear(st.run[bi].z[c])
			}
		}
		for c := range st.lpz {
			clear(st.lpz[c])
		}
	}
	if b.pre != nil {
		for c := range b.pre.z {
			clear(b.pre.z[c])
		}
	}
	b.totalFrames, b.intStart, b.intFrames = 0, 0, 0
	clear(b.overallSum)
	clear(b.atClip)
	clear(b.overallInt)
	for c := range b.bandSum {
		clear(b.bandSum[c])
		clear(b.intBand[c])
	}
	clear(b.bandCount)
	clear(b.intCount)
	b.intervals = nil
}

// SetClipAt changes BankOptions.ClipAt, for a bank reused (after Reset)
// on a file of another sample format.
func (b *BandBank) SetClipAt(v float64) { b.opt.ClipAt = v }

// Bands returns the bands of the bank, lowest first.
func (b *BandBank) Bands() []design.Band { return b.bands }

// Filters returns the designed filter of each band, at the rate the band
// runs at (see Rates).
func (b *BandBank) Filters() []design.Designed { return b.filts }

// Rates returns the rate each band runs at.
func (b *BandBank) Rates() []float64 {
	out := make([]float64, len(b.bands))
	for i, k := range b.level {
		out[i] = b.stages[k].rate
	}
	return out
}

// Write feeds interleaved frames. len(frames) must be a whole number of
// frames; Write panics otherwise (a programming error).
func (b *BandBank) Write(frames []float64) {
	if len(frames)%b.ch != 0 {
		panic(fmt.Sprintf("analyze: BandBank.Write: %d samples is not a whole number of %d-channel frames", len(frames), b.ch))
	}
	n := int64(len(frames) / b.ch)
	for n > 0 {
		m := n
		if iv := b.opt.IntervalFrames; iv > 0 {
			m = min(m, iv-b.intFrames)
		}
		b.write(frames[:int(m)*b.ch])
		frames = frames[int(m)*b.ch:]
		n -= m
		b.intFrames += m
		b.totalFrames += m
		if iv := b.opt.IntervalFrames; iv > 0 && b.intFrames == iv {
			b.closeInterval()
		}
	}
}

func (b *BandBank) write(frames []float64) {
	n := len(frames) / b.ch
	if cap(b.planar) < n {
		b.planar = make([]float64, n)
	}
	x := b.planar[:n]
	for c := 0; c < b.ch; c++ {
		for i := range x {
			x[i] = frames[i*b.ch+c]
		}
		if at := b.opt.ClipAt; at > 0 {
			for _, v := range x {
				if math.Abs(v) >= at {
					b.atClip[c]++
				}
			}
		}
		if b.pre != nil {
			b.pre.run(x, c)
		}
		s := sumSquares(x)
		b.overallSum[c] += s
		b.overallInt[c] += s
		b.stages[0].buf[c] = append(b.stages[0].buf[c][:0], x...)
	}
	for k := range b.stages {
		b.runStage(k)
	}
}

// runStage filters the waiting samples of stage k through its bands and
// hands the decimated low-pass output to stage k+1.
func (b *BandBank) runStage(k int) {
	st := b.stages[k]
	n := len(st.buf[0])
	if n == 0 {
		return
	}
	if cap(st.tmp) < n {
		st.tmp = make([]float64, n)
	}
	tmp := st.tmp[:n]
	for c := 0; c < b.ch; c++ {
		x := st.buf[c]
		for bi := range st.run {
			bb := &st.run[bi]
			copy(tmp, x)
			bb.run(tmp, c)
			sum := sumSquares(tmp)
			b.bandSum[c][bb.index] += sum
			b.intBand[c][bb.index] += sum
		}
		if st.lp != nil {
			for q := range st.lp {
				wave4(x, &st.lp[q], &st.lpz[c][q])
			}
			next := b.stages[k+1]
			keep := next.buf[c][:0]
			odd := st.odd[c]
			for _, v := range x {
				if !odd {
					keep = append(keep, v)
				}
				odd = !odd
			}
			st.odd[c] = odd
			next.buf[c] = keep
		}
		st.buf[c] = x[:0]
	}
	b.bandCount[k] += int64(n)
	b.intCount[k] += int64(n)
}

func (b *BandBank) closeInterval() {
	lv := BankLevels{StartFrame: b.intStart, Frames: b.intFrames, Overall: make([]float64, b.ch), Bands: make([][]float64, b.ch)}
	for c := 0; c < b.ch; c++ {
		lv.Overall[c] = b.overallInt[c] / float64(b.intFrames)
		b.overallInt[c] = 0
		lv.Bands[c] = make([]float64, len(b.bands))
		for i := range b.bands {
			if cnt := b.intCount[b.level[i]]; cnt > 0 {
				lv.Bands[c][i] = b.intBand[c][i] / float64(cnt)
			}
			b.intBand[c][i] = 0
		}
	}
	for k := range b.intCount {
		b.intCount[k] = 0
	}
	b.intervals = append(b.intervals, lv)
	b.intStart += b.intFrames
	b.intFrames = 0
}

// Result returns the levels over everything written so far and, with an
// interval, the levels of each interval (a last, shorter one included).
// Call it once, after the last Write.
func (b *BandBank) Result() (whole BankLevels, intervals []BankLevels) {
	if b.opt.IntervalFrames > 0 && b.intFrames > 0 {
		b.closeInterval()
	}
	whole = BankLevels{Frames: b.totalFrames, Overall: make([]float64, b.ch), Bands: make([][]float64, b.ch), AtClip: append([]int64(nil), b.atClip...)}
	for c := 0; c < b.ch; c++ {
		if b.totalFrames > 0 {
			whole.Overall[c] = b.overallSum[c] / float64(b.totalFrames)
		}
		whole.Bands[c] = make([]float64, len(b.bands))
		for i := range b.bands {
			if cnt := b.bandCount[b.level[i]]; cnt > 0 {
				whole.Bands[c][i] = b.bandSum[c][i] / float64(cnt)
			}
		}
	}
	return whole, b.intervals
}
