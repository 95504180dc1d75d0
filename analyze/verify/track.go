package verify

import (
	"fmt"
	"math"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
)

// TrackDepthDB is the bound a centre of a tracking notch is checked
// against, read along the hum's track: our own bound, not a standard's.
// A tracking notch is built to take at least 40 dB off the hum at every
// harmonic as the hum moves; the check asks for 30 dB, leaving 10 dB for
// the tracker's error and for the wanted sound inside the notch, which
// the reading also holds. A fixed notch the hum has moved away from
// reads within a few dB of 0 and fails it.
const TrackDepthDB = -30.0

// trackStats takes the track(s) of the run and their mean and range over
// the frames that are read.
func (s *Session) trackStats(tracks []process.FrequencyTrack) {
	s.tracks = tracks
	a := float64(s.skip) / s.fs
	b := float64(max(s.frames-s.skip, s.skip+1)) / s.fs
	const n = 2000
	for _, tr := range tracks {
		sum, lo, hi := 0.0, math.Inf(1), math.Inf(-1)
		for i := 0; i <= n; i++ {
			v := tr.At(a + (b-a)*float64(i)/n)
			sum += v
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		s.tmean = append(s.tmean, sum/(n+1))
		s.tlo, s.thi = append(s.tlo, lo), append(s.thi, hi)
	}
}

// trackOf is the index of the track of channel c.
func (s *Session) trackOf(c int) int {
	if c < len(s.tracks) {
		return c
	}
	return 0
}

// perChannel says whether a tracking notch is read along each channel's
// own track: asked for, or given one track per channel.
func (s *Session) perChannel() bool {
	return s.tstage >= 0 && len(s.tracks) > 0 && (s.o.TrackPerChannel || len(s.tracks) > 1)
}

// sideBins is how far from a tracked centre, in bins of its segment, the
// input is also read to tell the hum's line from the sound around it:
// past the window's main lobe (lobeBins), and short of the neighbouring
// harmonics (at least 4*lobeBins bins away, see planTracked).
const sideBins = 6

// planTracked plans a check of the tracking notch stage. Its centres are
// read along the track, at harm * f(t), against TrackDepthDB; the hum is
// a line there once demodulated, so the reading is taken as a tone's: the
// window only long enough to keep out of its main lobe, by a factor of 4,
// the image at -harm * f, the Nyquist frequency and the neighbouring
// harmonics (one fundamental away). The notch's edges move with the hum
// and are not read.
func (s *Session) planTracked(p Point, usable int64) plan {
	st := s.f.Stages[p.Stage]
	pl := plan{p: p, omega: 2 * math.Pi * p.FrequencyHz / s.fs}
	// The notch's designed depth at its centre (minus infinity: a zero on
	// the unit circle), with the other stages at the nominal centre.
	pl.designed = s.f.EffectiveDB(p.FrequencyHz)
	if pl.designed < zeroDB {
		pl.designed = math.Inf(-1)
	}
	if p.Kind != KindNotch {
		pl.reason = "a tracking notch's edges move with the hum; only its centres are read, along the track"
		pl.lo, pl.hi = math.NaN(), math.NaN()
		return pl
	}
	pl.harm = p.FrequencyHz / st.Spec.FundamentalHz
	if r := math.Round(pl.harm); math.Abs(pl.harm-r) < 1e-9 {
		pl.harm = r
	}
	var others []design.Designed
	for i, o := range s.f.Stages {
		if i != p.Stage {
			others = append(others, o)
		}
	}
	pl.offset = 0
	if len(others) > 0 {
		rest := &design.Filter{SampleRate: s.f.SampleRate, ZeroPhase: s.f.ZeroPhase, Stages: others}
		pl.offset = rest.EffectiveDB(p.FrequencyHz)
	}
	pl.p.UpperDB = TrackDepthDB
	pl.lo, pl.hi = math.Inf(-1), pl.designed
	if len(s.tracks) == 0 {
		pl.harm = 0
		pl.reason = "the hum's track was not measured (a probe has no hum, or no tracker was given), so this tracking notch cannot be read along it"
		return pl
	}
	hi := pl.harm * maxOf(s.thi)
	room := math.Min(math.Min(pl.harm*minOf(s.tlo), s.fs/2-hi), minOf(s.tlo))
	if !(room > 0) {
		pl.reason = fmt.Sprintf("the track takes this harmonic to %.6g Hz, at or past the Nyquist frequency", hi)
		return pl
	}
	seg := MinSegment
	for seg < MaxSegment && lobeBins*s.fs/float64(seg) > room/4 {
		seg *= 2
	}
	if s.o.Segment != 0 {
		seg = s.o.Segment
	}
	if int64(seg)*(MinSegments+1)/2 > usable {
		pl.reason = fmt.Sprintf("too short to read harmonic %g along the track: %d-sample segments need %d frames (%.3g s), and the run has %d", pl.harm, seg, s.framesFor(seg), float64(s.framesFor(seg))/s.fs, s.frames)
		return pl
	}
	pl.seg = seg
	return pl
}

// trackPhase sets g.ph to the fundamental's phase over the segment about
// to be read on checked channel ci: 2 pi times the integral of f(t) dt
// from the segment's first frame, summed at mid-sample.
func (s *Session) trackPhase(g *group, ci int) {
	tr := s.tracks[s.trackOf(s.chans[ci])]
	first := s.skip + int64(g.segs)*int64(g.seg/2)
	ph := 0.0
	for n := range g.ph {
		g.ph[n] = ph
		ph += 2 * math.Pi * tr.At((float64(first+int64(n))+0.5)/s.fs) / s.fs
	}
}

// trackedDFT returns sum x[n] e^{-j h ph[n]} and the same of y: the
// segments demodulated by the harmonic's phase along the track (a
// heterodyne), so that a hum moving with the track stays at one
// frequency, 0, in the reading. side is the mean of |X|^2 read sideBins
// bins above and below, sum x[n] e^{-j (h ph[n] +- 2 pi sideBins n / N)}:
// the sound around the line.
func trackedDFT(x, y, ph []float64, h float64) (X, Y complex128, side float64) {
	var xr, xi, yr, yi float64
	var up, down complex128
	d := 2 * math.Pi * sideBins / float64(len(x))
	for t := range x {
		a := h * ph[t]
		sn, cs := math.Sincos(a)
		xr += x[t] * cs
		xi -= x[t] * sn
		yr += y[t] * cs
		yi -= y[t] * sn
		su, cu := math.Sincos(a + d*float64(t))
		up += complex(x[t]*cu, -x[t]*su)
		sd, cd := math.Sincos(a - d*float64(t))
		down += complex(x[t]*cd, -x[t]*sd)
	}
	side = (real(up)*real(up) + imag(up)*imag(up) + real(down)*real(down) + imag(down)*imag(down)) / 2
	return complex(xr, xi), complex(yr, yi), side
}

func maxOf(v []float64) float64 {
	m := math.Inf(-1)
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}
