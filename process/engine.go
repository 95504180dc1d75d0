package process

import (
	"errors"
	"fmt"
	"math"

	"github.com/wavsieve/wavsieve/design"
)

// Config says which samples of an interleaved block a Cascade filters.
type Config struct {
	// Channels is the number of samples per frame. It must be at least 1.
	Channels int

	// Only lists the channels to filter, counted from 0. Nil or empty
	// means every channel; the others pass through unchanged.
	Only []int

	// SteadyStart makes the first frame after NewCascade or Reset set
	// the state, per channel, to the steady state of a constant input
	// equal to that frame's value, so a DC offset causes no start-up
	// transient. The zero-phase functions always start this way and
	// ignore the field.
	SteadyStart bool
}

// Cascade runs a chain of second-order sections over blocks of
// interleaved float64 frames, keeping its state per channel between
// blocks. Its methods are not safe for concurrent use.
type Cascade struct {
	ch     int
	sec    []design.Section // normalised to a0 = 1
	wide   []float64        // 10 per section: b0 b0 b1 b1 b2 b2 a1 a1 a2 a2
	units  []unit
	zi     [][2]float64 // steady state per section for a unit input to the cascade
	steady bool
	primed bool
	// tv, when set, is a comb of tracking notches run after the sections
	// (newTrackedCascade).
	tv *trackComb
	// tvPrime holds the constant input that primes tv at its next run
	// (in the direction of that run), nil when none is due.
	tvPrime []float64
}

// unit is one channel, or two adjacent channels filtered together.
// For a pair the state of section s is z[4s:4s+4] = z1(c), z1(c+1),
// z2(c), z2(c+1); for a single channel it is z[2s:2s+2] = z1, z2.
type unit struct {
	c    int
	pair bool
	z    []float64
}

// NewCascade checks the sections and returns a Cascade at rest (zero
// state). The sections are copied and normalised to a0 = 1. It is an
// error to give no section, a non-finite coefficient, a0 = 0, a section
// with a pole on or outside the unit circle, or a bad channel set.
func NewCascade(sos []design.Section, cfg Config) (*Cascade, error) {
	if len(sos) == 0 {
		return nil, errors.New("process: no filter sections")
	}
	return newCascade(sos, cfg)
}

// newTrackedCascade is NewCascade with a comb of tracking notches run
// after the sections, of which there may be none.
func newTrackedCascade(sos []design.Section, cfg Config, tv *trackComb) (*Cascade, error) {
	c, err := newCascade(sos, cfg)
	if err != nil {
		return nil, err
	}
	c.tv = tv
	return c, nil
}

func newCascade(sos []design.Section, cfg Config) (*Cascade, error) {
	if cfg.Channels < 1 {
		return nil, fmt.Errorf("process: invalid channel count %d", cfg.Channels)
	}
	c := &Cascade{ch: cfg.Channels, steady: cfg.SteadyStart}
	c.sec = make([]design.Section, len(sos))
	for i, s := range sos {
		for _, v := range s {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("process: section %d: invalid coefficient %v", i, v)
			}
		}
		if s[3] == 0 {
			return nil, fmt.Errorf("process: section %d: invalid a0 = 0", i)
		}
		if s[3] != 1 {
			a0 := s[3]
			for j := range s {
				s[j] /= a0
			}
		}
		// Jury's stability triangle for z^2 + a1 z + a2 (Oppenheim &
		// Schafer, Discrete-Time Signal Processing, 3rd ed., problem 6.21):
		// both poles lie strictly inside the unit circle iff
		// |a2| < 1 and |a1| < 1 + a2.
		if !(math.Abs(s[5]) < 1 && math.Abs(s[4]) < 1+s[5]) {
			return nil, fmt.Errorf("process: section %d: unstable: pole on or outside the unit circle (a1 = %v, a2 = %v)", i, s[4], s[5])
		}
		c.sec[i] = s
	}
	c.wide = make([]float64, 10*len(sos))
	for i, s := range c.sec {
		for j, v := range [5]float64{s[0], s[1], s[2], s[4], s[5]} {
			c.wide[10*i+2*j], c.wide[10*i+2*j+1] = v, v
		}
	}
	c.zi = steadyState(c.sec)

	sel := make([]bool, cfg.Channels)
	if len(cfg.Only) == 0 {
		for i := range sel {
			sel[i] = true
		}
	}
	for _, ch := range cfg.Only {
		if ch < 0 || ch >= cfg.Channels {
			return nil, fmt.Errorf("process: no channel %d (counted from 1): the data has %d channels", ch+1, cfg.Channels)
		}
		if sel[ch] {
			return nil, fmt.Errorf("process: invalid channel set: channel %d (counted from 1) given twice", ch+1)
		}
		sel[ch] = true
	}
	for ch := 0; ch < cfg.Channels; ch++ {
		if !sel[ch] {
			continue
		}
		if ch+1 < cfg.Channels && sel[ch+1] {
			c.units = append(c.units, unit{c: ch, pair: true, z: make([]float64, 4*len(sos))})
			ch++
			continue
		}
		c.units = append(c.units, unit{c: ch, z: make([]float64, 2*len(sos))})
	}
	return c, nil
}

// steadyState returns, per section, the state (z1, z2) of the
// transposed direct form II at rest under a constant unit input to the
// whole cascade. For one section with input u the state equations are
//
//	z1' = (b1 - a1 b0) u - a1 z1 + z2
//	z2' = (b2 - a2 b0) u - a2 z1
//
// and the fixed point z' = z solves the 2x2 system
//
//	[1+a1  -1] [z1]   [b1 - a1 b0]
//	[ a2    1] [z2] = [b2 - a2 b0]
//
// (the system scipy.signal.lfilter_zi solves, as I - A^T). Its
// determinant is 1 + a1 + a2 = sum(a), positive for every section
// NewCascade accepts (stability triangle). Eliminating with the output
// y = H(1) u, H(1) = sum(b)/sum(a), gives the solution
//
//	z2 = b2 u - a2 y,   z1 = y - b0 u
//
// which is what we evaluate: the sums are taken with compensated
// (TwoSum) summation, so that sections with zeros or poles close to
// z = 1, where sum(b) and sum(a) cancel to a few digits, keep full
// accuracy (a direct float64 solve, as SciPy's, loses up to 1e-11 on a
// 45-55 Hz bandstop at 48 kHz). Section k sees the constant input
// prod_{j<k} H_j(1), as in scipy.signal.sosfilt_zi.
func steadyState(sos []design.Section) [][2]float64 {
	zi := make([][2]float64, len(sos))
	scale := 1.0
	for i, s := range sos {
		b0, b2, a2 := s[0], s[2], s[5]
		h := sum3(s[0], s[1], s[2]) / sum3(1, s[4], s[5])
		zi[i] = [2]float64{scale * (h - b0), scale * (b2 - a2*h)}
		scale *= h
	}
	return zi
}

// sum3 returns a + b + c with compensated summation: TwoSum (Knuth, The
// Art of Computer Programming vol. 2, 4.2.2, theorem B) keeps the
// rounding error of each addition, and the errors are added back.
func sum3(a, b, c float64) float64 {
	s, e1 := twoSum(a, b)
	t, e2 := twoSum(s, c)
	return t + (e1 + e2)
}

func twoSum(a, b float64) (s, e float64) {
	s = a + b
	bb := s - a
	e = (a - (s - bb)) + (b - bb)
	return s, e
}

// Channels returns the number of samples per frame.
func (c *Cascade) Channels() int { return c.ch }

// Sections returns the number of second-order sections.
func (c *Cascade) Sections() int { return len(c.sec) }

// Reset puts the filter at rest: zero state, and with SteadyStart the
// next frame primes the state again.
func (c *Cascade) Reset() {
	for _, u := range c.units {
		clear(u.z)
	}
	c.primed = false
	if c.tv != nil {
		c.tv.reset()
		c.tvPrime = nil
	}
}

// Prime sets the state of every filtered channel ch to the steady state
// for a constant input frame[ch], as scipy.signal.sosfilt_zi scaled by
// that value. It panics if len(frame) != Channels().
func (c *Cascade) Prime(frame []float64) {
	if len(frame) != c.ch {
		panic(fmt.Sprintf("process: Prime: frame of %d samples, want %d", len(frame), c.ch))
	}
	for _, u := range c.units {
		if u.pair {
			x0, x1 := frame[u.c], frame[u.c+1]
			for s, z := range c.zi {
				u.z[4*s], u.z[4*s+1] = z[0]*x0, z[0]*x1
				u.z[4*s+2], u.z[4*s+3] = z[1]*x0, z[1]*x1
			}
			continue
		}
		x0 := frame[u.c]
		for s, z := range c.zi {
			u.z[2*s], u.z[2*s+1] = z[0]*x0, z[1]*x0
		}
	}
	c.primed = true
	if c.tv != nil {
		// The comb sees the sections' steady output, prod H_k(1) times
		// the input (steadyState's scale).
		g := 1.0
		for _, s := range c.sec {
			g *= sum3(s[0], s[1], s[2]) / sum3(1, s[4], s[5])
		}
		c.tvPrime = make([]float64, len(frame))
		for i, v := range frame {
			c.tvPrime[i] = g * v
		}
	}
}

// Process filters the interleaved frames of src into dst and returns
// dst. dst may be src (in place); a nil dst is allocated, otherwise
// Process allocates nothing. Channels not selected are copied
// unchanged. Process panics if len(src) is not a whole number of frames
// or dst is not nil and len(dst) != len(src): both are programming
// errors, not properties of the data.
func (c *Cascade) Process(dst, src []float64) []float64 {
	if len(src)%c.ch != 0 {
		panic(fmt.Sprintf("process: Process: block of %d samples is not a whole number of %d-channel frames", len(src), c.ch))
	}
	if dst == nil {
		dst = make([]float64, len(src))
	}
	if len(dst) != len(src) {
		panic(fmt.Sprintf("process: Process: len(dst) = %d, len(src) = %d", len(dst), len(src)))
	}
	if len(src) == 0 {
		return dst
	}
	if &dst[0] != &src[0] {
		copy(dst, src)
	}
	if c.steady && !c.primed {
		c.Prime(dst[:c.ch])
	}
	c.run(dst, 1)
	return dst
}

// processReverse filters the frames of x in place in reverse time
// order, last frame first: the result, bit for bit, of reversing the
// frames, calling Process and reversing them back, without the two
// reversals (the backward pass of ZeroPhase). With SteadyStart the last
// frame primes the state.
func (c *Cascade) processReverse(x []float64) {
	if len(x)%c.ch != 0 {
		panic(fmt.Sprintf("process: processReverse: block of %d samples is not a whole number of %d-channel frames", len(x), c.ch))
	}
	if len(x) == 0 {
		return
	}
	if c.steady && !c.primed {
		c.Prime(x[len(x)-c.ch:])
	}
	c.run(x, -1)
}

// run filters the frames of x in place, in time order for dir = 1 and
// in reverse for dir = -1.
func (c *Cascade) run(x []float64, dir int) {
	n := len(x) / c.ch
	step, first := c.ch, 0
	if dir < 0 {
		step, first = -c.ch, (n-1)*c.ch
	}
	for i := range c.units {
		u := &c.units[i]
		if u.pair {
			c.runPair(x, first+u.c, n, step, u.z)
		} else {
			c.runSingle(x, first+u.c, n, step, u.z)
		}
	}
	if c.tv != nil {
		if c.tvPrime != nil {
			c.tv.prime(c.tvPrime, dir > 0)
			c.tvPrime = nil
		}
		c.tv.run(x, dir)
	}
}

// runPair filters channels c and c+1 of n frames, the first at x[off],
// the next step samples further (step < 0 goes back in memory). Sections
// go in groups of four through the wavefront kernel (wave4: section k
// works on frame t-k at step t, so the four recursions are independent
// and overlap in the CPU), the rest one at a time. Every path does the
// same arithmetic in the same order for each sample, so the output does
// not depend on the path taken.
func (c *Cascade) runPair(x []float64, off, n, step int, z []float64) {
	s := 0
	if useWave4 && n >= 4 {
		for ; s+4 <= len(c.sec); s += 4 {
			// Prologue: bring sections s+0..s+2 to the wavefront.
			pairSection(x, off, 0, 3, step, &c.sec[s], z[4*s:4*s+4])
			pairSection(x, off, 0, 2, step, &c.sec[s+1], z[4*s+4:4*s+8])
			pairSection(x, off, 0, 1, step, &c.sec[s+2], z[4*s+8:4*s+12])
			_ = x[off+(n-1)*step+1] // the kernel's last frame is in x
			wave4(&x[off+3*step], n-3, step, &c.wide[10*s], &z[4*s])
			// Epilogue: sections s+1..s+3 catch up with the last frames.
			pairSection(x, off, n-1, n, step, &c.sec[s+1], z[4*s+4:4*s+8])
			pairSection(x, off, n-2, n, step, &c.sec[s+2], z[4*s+8:4*s+12])
			pairSection(x, off, n-3, n, step, &c.sec[s+3], z[4*s+12:4*s+16])
		}
	}
	for ; s < len(c.sec); s++ {
		pairSection(x, off, 0, n, step, &c.sec[s], z[4*s:4*s+4])
	}
}

// pairSection runs one section over frames [from, to) of a channel
// pair, frame j at x[off+j*step]. Transposed direct form II (Oppenheim
// & Schafer, 3rd ed., fig. 6.27):
//
//	y  = b0 x + z1
//	z1 = (b1 x - a1 y) + z2
//	z2 = b2 x - a2 y
//
// evaluated in this order, which is the order of scipy.signal.sosfilt's
// loop (so the two round alike, which matters for sections with poles
// and zeros close to z = 1). The float64 conversions forbid fused
// multiply-adds, so every architecture and the assembly kernel round
// alike too.
func pairSection(x []float64, off, from, to, step int, sec *design.Section, z []float64) {
	b0, b1, b2, a1, a2 := sec[0], sec[1], sec[2], sec[4], sec[5]
	l1, r1, l2, r2 := z[0], z[1], z[2], z[3]
	i := off + from*step
	for j := from; j < to; j++ {
		p := x[i : i+2 : i+2]
		xl, xr := p[0], p[1]
		yl := float64(b0*xl) + l1
		yr := float64(b0*xr) + r1
		l1 = float64(float64(b1*xl)-float64(a1*yl)) + l2
		r1 = float64(float64(b1*xr)-float64(a1*yr)) + r2
		l2 = float64(b2*xl) - float64(a2*yl)
		r2 = float64(b2*xr) - float64(a2*yr)
		p[0], p[1] = yl, yr
		i += step
	}
	z[0], z[1], z[2], z[3] = l1, r1, l2, r2
}

// runSingle filters one channel of n frames, the first at x[off], the
// next step samples further, section after section, with the arithmetic
// of pairSection.
func (c *Cascade) runSingle(x []float64, off, n, step int, z []float64) {
	for s := range c.sec {
		sec := &c.sec[s]
		b0, b1, b2, a1, a2 := sec[0], sec[1], sec[2], sec[4], sec[5]
		z1, z2 := z[2*s], z[2*s+1]
		i := off
		for j := 0; j < n; j++ {
			xi := x[i]
			y := float64(b0*xi) + z1
			z1 = float64(float64(b1*xi)-float64(a1*y)) + z2
			z2 = float64(b2*xi) - float64(a2*y)
			x[i] = y
			i += step
		}
		z[2*s], z[2*s+1] = z1, z2
	}
}
