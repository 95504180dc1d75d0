package process

import (
	"errors"
	"fmt"
	"math"
)

// FrequencyTrack is a fundamental frequency over time: At returns it in
// Hz at t seconds from the start of the signal (held beyond the ends).
type FrequencyTrack interface {
	At(seconds float64) float64
}

// trackUpdateSeconds is how often the tracking notches are re-designed:
// every millisecond (the track itself has a point every 20 ms). A 1 Hz
// move over 2 s changes the 9th harmonic's centre by 4.5 mHz per update,
// far below the notch's 0.5 Hz width; the step goes into the filter
// without a transient (see trackComb).
const trackUpdateSeconds = 0.001

// trackComb is a comb of second-order notches whose centres follow a
// frequency track: notch i sits at harmonics[i] times the fundamental of
// the track, with a fixed -3 dB width.
//
// Re-design. Each notch is the bilinear transform of the analog notch
// (s^2 + W0^2)/(s^2 + B s + W0^2) with W0 pre-warped, W0 = tan(pi f/rate):
// its digital zeros sit exactly at 2 pi f/rate, and its pole radius,
// set by the width, does not depend on the centre (design.notchZPK;
// the closed forms below are checked against it in the tests). Written
// as H(z) = (1 + A(z))/2 with A a second-order allpass (Regalia, Mitra &
// Vaidyanathan, "The digital all-pass filter: a versatile signal
// processing building block", Proc. IEEE 76(1), 1988, cited from
// memory),
//
//	A(z) = (k2 + k1 (1 + k2) z^-1 + z^-2) / (1 + k1 (1 + k2) z^-1 + k2 z^-2)
//
// the centre is k1 = -cos(2 pi f/rate) alone and the width k2 = a2 of
// the designed section alone: moving the notch changes one coefficient.
//
// Structure: why no clicks. A is run as a normalised lattice (Gray &
// Markel, "Digital lattice and ladder filter synthesis", IEEE Trans.
// Audio Electroacoust. 21(6), 1973, cited from memory): each of its two
// stages is a plane rotation by (k, sqrt(1 - k^2)) of the stage's input
// and its delayed state. A rotation keeps the sum of the squares of what
// it turns, so for any sequence of coefficients the state's energy plus
// the energy put out equals the state's energy before plus the energy
// put in: changing k1 from one sample to the next can neither inject
// energy nor make the filter unstable, and the state stays a valid state
// of the new filter (the normalised form is the one in which each state
// value has the signal's own scale). A direct form, by contrast, holds
// past outputs and inputs scaled by coefficients that the change makes
// stale, and its states at 50 Hz and 48 kHz are hundreds of times the
// signal, so a change of a1 by a part in a million injects a step.
// Cross-fading two filters would double the work and still leave the
// faded-out filter's ringing; a fitted hum model subtracted would remove
// the wanted sound within the model's band too. The step here is small
// (below a hundredth of the notch's width) every millisecond, so the
// output is the time-varying notch itself with no switching transient.
//
// For zero phase the backward pass runs the same notches at the same
// frame positions: coefficients are taken on a grid of whole update
// cells fixed to frame numbers, at the centre of each cell, in both
// directions.
type trackComb struct {
	rate   float64
	ch     int
	chans  []int            // channels filtered
	tracks []FrequencyTrack // one per entry of chans (shared: the same)
	shared bool
	harm   []float64 // harmonic numbers
	k2, c2 []float64 // width coefficients per notch
	p2, q2 []float64 // (1 + k2)/2 and c2/2: the notch output's weights
	cell   int       // frames per update
	// state per channel of chans, per notch: s1, s2
	st [][]float64
	// positions: the frame the next forward sample is, and the frame the
	// next backward sample is.
	posF, posB int64
	nyq        float64
	k1, c1     []float64 // scratch, per notch
	whole      bool      // harm is 1, 2, 3, ... (angle addition applies)
}

// newTrackComb returns the comb for notches at harmonics (multiples of
// the fundamental, not necessarily whole) of the given -3 dB widths per
// pass (powerRatio the squared magnitude at the width's edges: 1/2, or
// 1/sqrt 2 for each pass of a zero-phase run).
func newTrackComb(rate float64, cfg Config, tracks []FrequencyTrack, harmonics, widths []float64, powerRatio float64) (*trackComb, error) {
	if len(harmonics) == 0 || len(harmonics) != len(widths) {
		return nil, errors.New("process: tracking notch: no notches")
	}
	t := &trackComb{rate: rate, ch: cfg.Channels, harm: harmonics, nyq: rate / 2}
	if len(cfg.Only) == 0 {
		for c := 0; c < cfg.Channels; c++ {
			t.chans = append(t.chans, c)
		}
	} else {
		t.chans = append(t.chans, cfg.Only...)
	}
	switch len(tracks) {
	case 1:
		t.shared = true
		for range t.chans {
			t.tracks = append(t.tracks, tracks[0])
		}
	case cfg.Channels:
		for _, c := range t.chans {
			t.tracks = append(t.tracks, tracks[c])
		}
	default:
		return nil, fmt.Errorf("process: tracking notch: %d tracks for %d channels: give one, or one per channel", len(tracks), cfg.Channels)
	}
	for _, bw := range widths {
		k2 := notchRadiusCoef(bw, rate, powerRatio)
		t.k2 = append(t.k2, k2)
		t.c2 = append(t.c2, math.Sqrt((1-k2)*(1+k2)))
		t.p2 = append(t.p2, (1+k2)/2)
		t.q2 = append(t.q2, t.c2[len(t.c2)-1]/2)
	}
	t.cell = max(1, int(math.Round(trackUpdateSeconds*rate)))
	t.st = make([][]float64, len(t.chans))
	for i := range t.st {
		t.st[i] = make([]float64, 2*len(harmonics))
	}
	t.whole = true
	for n, h := range harmonics {
		t.whole = t.whole && h == float64(n+1)
	}
	t.k1 = make([]float64, len(harmonics))
	t.c1 = make([]float64, len(harmonics))
	return t, nil
}

// notchRadiusCoef returns a2 = k2 of the bilinear notch of -3 dB width
// bw Hz (edges at the power ratio g2): with the analog width
// B = tan(pi bw/rate)(1 + W0^2) sqrt((1-g2)/g2) (design.notchZPK), the
// bilinear image of s^2 + B s + W0^2 has a2 = (1 + W0^2 - B)/(1 + W0^2 + B)
// = (1 - t)/(1 + t), t = tan(pi bw/rate) sqrt((1-g2)/g2): independent
// of the centre.
func notchRadiusCoef(bw, rate, g2 float64) float64 {
	t := math.Tan(math.Pi*bw/rate) * math.Sqrt((1-g2)/g2)
	return (1 - t) / (1 + t)
}

// setPositions sets the frame number of the next forward sample and of
// the next backward sample.
func (t *trackComb) setPositions(fwd, bwd int64) { t.posF, t.posB = fwd, bwd }

// coefs sets k1 and c1 for the cell holding frame f of channel entry i.
func (t *trackComb) coefs(i int, f int64) {
	cell := int64(t.cell)
	c := f / cell
	if f < 0 && f%cell != 0 {
		c--
	}
	mid := (float64(c*cell) + float64(t.cell-1)/2) / t.rate
	f0 := t.tracks[i].At(mid)
	w0 := 2 * math.Pi * f0 / t.rate
	if t.whole {
		// Whole harmonics 1, 2, 3, ... in order: cos and sin of k w0 by
		// angle addition from one Sincos (the rounding grows by about one
		// part in 1e16 per step).
		s1, c1 := math.Sincos(w0)
		c, s := c1, s1
		for n := range t.harm {
			if n > 0 {
				c, s = c*c1-s*s1, s*c1+c*s1
			}
			if s <= 0 { // past Nyquist: hold just below it
				c, s = math.Cos(math.Pi-1e-9), math.Sin(math.Pi-1e-9)
			}
			t.k1[n], t.c1[n] = -c, s
		}
		return
	}
	for n, h := range t.harm {
		w := h * w0
		// Keep the centre inside (0, pi): a harmonic driven past Nyquist
		// by the track stays just below it.
		w = math.Min(math.Max(w, 1e-9), math.Pi-1e-9)
		s, co := math.Sincos(w)
		t.k1[n], t.c1[n] = -co, s
	}
}

// reset zeroes the state.
func (t *trackComb) reset() {
	for _, s := range t.st {
		clear(s)
	}
}

// prime sets the state to the steady state for the constant input
// frame (each notch passes DC unchanged): s2 = c2 u/(1 + k2),
// s1 = c1 s2/(1 + k1), the fixed point of the lattice equations below.
func (t *trackComb) prime(frame []float64, forward bool) {
	pos := t.posB
	if forward {
		pos = t.posF
	}
	for i, c := range t.chans {
		t.coefs(i, pos)
		u := frame[c]
		s := t.st[i]
		for n := range t.harm {
			s2 := t.c2[n] * u / (1 + t.k2[n])
			s[2*n+1] = s2
			s[2*n] = t.c1[n] * s2 / (1 + t.k1[n])
		}
	}
}

// run filters the frames of x in place, forward (dir 1) or backward.
func (t *trackComb) run(x []float64, dir int) {
	n := len(x) / t.ch
	if n == 0 {
		return
	}
	cell := int64(t.cell)
	pos := t.posF
	if dir < 0 {
		pos = t.posB
	}
	done := 0
	for done < n {
		// Frames left in this cell in the direction of travel.
		c := pos / cell
		if pos < 0 && pos%cell != 0 {
			c--
		}
		var m int
		if dir > 0 {
			m = int(min(int64(n-done), (c+1)*cell-pos))
		} else {
			m = int(min(int64(n-done), pos-c*cell+1))
		}
		for i, ch := range t.chans {
			if i == 0 || !t.shared {
				t.coefs(i, pos)
			}
			first := done
			if dir < 0 {
				first = n - 1 - done
			}
			t.runCell(x, first*t.ch+ch, m, dir*t.ch, t.st[i])
		}
		done += m
		pos += int64(dir * m)
	}
	if dir > 0 {
		t.posF = pos
	} else {
		t.posB = pos
	}
}

// runCell runs every notch over m samples of one channel, the first at
// x[off], the next step further. Per notch and sample (normalised
// lattice, input v, allpass output g2, notch output (v + g2)/2):
//
//	f1 = c2 v - k2 s2      g2 = k2 v + c2 s2     (stage 2 rotation)
//	f0 = c1 f1 - k1 s1     g1 = k1 f1 + c1 s1    (stage 1 rotation)
//	s1 = f0                s2 = g1
//
// with the notch output taken as p2 v + q2 s2, p2 = (1 + k2)/2,
// q2 = c2/2: the same value as (v + g2)/2 up to rounding, with one
// multiply and one add fewer.
func (t *trackComb) runCell(x []float64, off, m, step int, s []float64) {
	nn := 0
	// Three notches at a time in one loop (two where four are left):
	// their recursions are independent from one sample to the next, so
	// the CPU overlaps them; each notch's arithmetic is the same in every
	// grouping, so the grouping does not change the output.
	for len(t.harm)-nn >= 3 && len(t.harm)-nn != 4 {
		ak1, ac1, ak2, ac2 := t.k1[nn], t.c1[nn], t.k2[nn], t.c2[nn]
		ap2, aq2 := t.p2[nn], t.q2[nn]
		bk1, bc1, bk2, bc2 := t.k1[nn+1], t.c1[nn+1], t.k2[nn+1], t.c2[nn+1]
		bp2, bq2 := t.p2[nn+1], t.q2[nn+1]
		ck1, cc1, ck2, cc2 := t.k1[nn+2], t.c1[nn+2], t.k2[nn+2], t.c2[nn+2]
		cp2, cq2 := t.p2[nn+2], t.q2[nn+2]
		as1, as2, bs1, bs2 := s[2*nn], s[2*nn+1], s[2*nn+2], s[2*nn+3]
		cs1, cs2 := s[2*nn+4], s[2*nn+5]
		i := off
		for j := 0; j < m; j++ {
			v := x[i]
			f1 := ac2*v - ak2*as2
			g2 := ap2*v + aq2*as2
			f0 := ac1*f1 - ak1*as1
			as2 = ak1*f1 + ac1*as1
			as1 = f0
			v = g2
			f1 = bc2*v - bk2*bs2
			g2 = bp2*v + bq2*bs2
			f0 = bc1*f1 - bk1*bs1
			bs2 = bk1*f1 + bc1*bs1
			bs1 = f0
			v = g2
			f1 = cc2*v - ck2*cs2
			g2 = cp2*v + cq2*cs2
			f0 = cc1*f1 - ck1*cs1
			cs2 = ck1*f1 + cc1*cs1
			cs1 = f0
			x[i] = g2
			i += step
		}
		s[2*nn], s[2*nn+1], s[2*nn+2], s[2*nn+3] = as1, as2, bs1, bs2
		s[2*nn+4], s[2*nn+5] = cs1, cs2
		nn += 3
	}
	for ; nn+2 <= len(t.harm); nn += 2 {
		ak1, ac1, ak2, ac2 := t.k1[nn], t.c1[nn], t.k2[nn], t.c2[nn]
		ap2, aq2 := t.p2[nn], t.q2[nn]
		bk1, bc1, bk2, bc2 := t.k1[nn+1], t.c1[nn+1], t.k2[nn+1], t.c2[nn+1]
		bp2, bq2 := t.p2[nn+1], t.q2[nn+1]
		as1, as2, bs1, bs2 := s[2*nn], s[2*nn+1], s[2*nn+2], s[2*nn+3]
		i := off
		for j := 0; j < m; j++ {
			v := x[i]
			f1 := ac2*v - ak2*as2
			g2 := ap2*v + aq2*as2
			f0 := ac1*f1 - ak1*as1
			as2 = ak1*f1 + ac1*as1
			as1 = f0
			v = g2
			f1 = bc2*v - bk2*bs2
			g2 = bp2*v + bq2*bs2
			f0 = bc1*f1 - bk1*bs1
			bs2 = bk1*f1 + bc1*bs1
			bs1 = f0
			x[i] = g2
			i += step
		}
		s[2*nn], s[2*nn+1], s[2*nn+2], s[2*nn+3] = as1, as2, bs1, bs2
	}
	for ; nn < len(t.harm); nn++ {
		k1, c1, k2, c2 := t.k1[nn], t.c1[nn], t.k2[nn], t.c2[nn]
		p2, q2 := t.p2[nn], t.q2[nn]
		s1, s2 := s[2*nn], s[2*nn+1]
		i := off
		for j := 0; j < m; j++ {
			v := x[i]
			f1 := c2*v - k2*s2
			g2 := p2*v + q2*s2
			f0 := c1*f1 - k1*s1
			s2 = k1*f1 + c1*s1
			s1 = f0
			x[i] = g2
			i += step
		}
		s[2*nn], s[2*nn+1] = s1, s2
	}
}
