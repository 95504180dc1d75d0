// Package humscene synthesises the invented recordings on which the
// tracking notch is measured, and measures it with the twin-polarity
// method: the file and a twin whose wanted sound has its polarity
// reversed are filtered alike; half their sum is what the hum drives,
// half their difference what the wanted sound drives.
//
// The scenes belong to the project's invented scenario (samples/README.md):
// the drainage pump at Reedmere marsh, whose 50 Hz supply wanders, the
// standby pump beside it on a 50 Hz generator set of its own, and the
// 60 Hz generator set at the Calder Fold pump works, which sags when a
// load switches on. Nothing here was recorded.
package humscene

import (
	"math"
	"math/rand/v2"
)

// Scene is one synthetic recording, mono: hum plus wanted sound, with
// the hum's true fundamental at every sample.
type Scene struct {
	Name  string
	Rate  float64
	Hum   []float64 // the hum alone
	Clean []float64 // the wanted sound alone (calls, noise)
	Freq  []float64 // the hum's fundamental, Hz, at each sample
	Phase []float64 // its phase in cycles, at each sample
	// Harmonics is the number of harmonics in the hum (1..Harmonics).
	Harmonics int
	Nominal   float64
	// Calls are the frequencies of the steady tonal calls of the clean
	// signal (for the report of calls near a harmonic).
	Calls []float64
	// Moves are the spans, in seconds from the start, in which the
	// fundamental makes its large moves (Reedmere's 1 Hz rise, Calder
	// Fold's ramps); the slow wander is not listed.
	Moves [][2]float64
}

// Mix returns hum + sign*clean.
func (s *Scene) Mix(sign float64) []float64 {
	x := make([]float64, len(s.Hum))
	for i := range x {
		x[i] = s.Hum[i] + sign*s.Clean[i]
	}
	return x
}

func db2amp(db float64) float64 { return math.Pow(10, db/20) }

// build fills Hum, Freq and Phase from f(t) with harmonic levels in
// dBFS (peak) and fixed phases.
func (s *Scene) build(dur float64, f func(t float64) float64, levels []float64) {
	n := int(math.Round(dur * s.Rate))
	s.Hum, s.Freq, s.Phase = make([]float64, n), make([]float64, n), make([]float64, n)
	s.Harmonics = len(levels)
	cyc := 0.0
	for i := 0; i < n; i++ {
		t := float64(i) / s.Rate
		s.Freq[i] = f(t)
		s.Phase[i] = cyc
		v := 0.0
		for k, l := range levels {
			v += db2amp(l) * math.Cos(2*math.Pi*float64(k+1)*cyc+0.9*float64(k*k+1))
		}
		s.Hum[i] = v
		// Phase integral by the midpoint rule.
		cyc += f(t+0.5/s.Rate) / s.Rate
	}
}

// raised is a raised-cosine step from 0 to 1 between t0 and t0 + d.
func raised(t, t0, d float64) float64 {
	switch {
	case t <= t0:
		return 0
	case t >= t0+d:
		return 1
	}
	return 0.5 - 0.5*math.Cos(math.Pi*(t-t0)/d)
}

// Reedmere is the pump hum at the Reedmere north station: 50 Hz wandering
// slowly by up to +-0.25 Hz (two slow sinusoids), with one 1 Hz rise over
// 2 s at 40 % of the recording; nine harmonics of steady level, mostly
// odd (the motor) with some even (the transformer). The wanted sound is
// a floor of white noise at -66 dBFS RMS, pulsed frog calls at 520, 610,
// 740 and 860 Hz (-34 dBFS peak) and bird sweeps from 2 to 6 kHz
// (-30 dBFS peak).
func Reedmere(rate, dur float64, seed uint64) *Scene {
	s := &Scene{Name: "reedmere-pump", Rate: rate, Nominal: 50, Calls: []float64{520, 610, 740, 860}}
	move := 0.4 * dur
	s.Moves = [][2]float64{{move, move + 2}}
	f := func(t float64) float64 {
		return 50 + 0.15*math.Sin(2*math.Pi*t/23+0.4) + 0.1*math.Sin(2*math.Pi*t/9.7+1.3) + raised(t, move, 2)
	}
	s.build(dur, f, []float64{-30, -44, -36, -52, -40, -56, -46, -60, -50})
	s.Clean = make([]float64, len(s.Hum))
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	noise := db2amp(-66)
	for i := range s.Clean {
		s.Clean[i] = noise * rng.NormFloat64()
	}
	// Frogs: pulses of 40 ms every 100 ms, in bouts of 1.5 s.
	for j, fc := range s.Calls {
		a := db2amp(-34)
		for bout := 0.3 + 0.7*float64(j); bout+1.5 < dur; bout += 4.1 + 0.9*float64(j) {
			for p := 0.0; p < 1.5; p += 0.1 {
				t0 := bout + p
				for i := int(t0 * rate); i < int((t0+0.04)*rate) && i < len(s.Clean); i++ {
					u := (float64(i)/rate - t0) / 0.04
					s.Clean[i] += a * math.Sin(math.Pi*u) * math.Sin(2*math.Pi*fc*float64(i)/rate)
				}
			}
		}
	}
	// Birds: 0.3 s sweeps 2-6 kHz every 2.3 s.
	for t0 := 0.9; t0+0.3 < dur; t0 += 2.3 {
		a := db2amp(-30)
		ph := 0.0
		for i := int(t0 * rate); i < int((t0+0.3)*rate); i++ {
			u := (float64(i)/rate - t0) / 0.3
			fr := 2000 + 4000*u
			if fr < 0.45*rate {
				s.Clean[i] += a * math.Sin(math.Pi*u) * math.Sin(2*math.Pi*ph)
			}
			ph += fr / rate
		}
	}
	return s
}

// CalderFold is the pickup of the 60 Hz generator set at the Calder Fold
// pump works: 60 Hz sagging to 58.8 Hz when a load switches on and back,
// in ramps of 1 to 3 s, seven harmonics of steady level. The wanted
// sound is noise at -66 dBFS RMS and the pump's own tones at 97, 148 and
// 205 Hz (-40 dBFS peak), 3 Hz or more from every harmonic over the sag.
func CalderFold(rate, dur float64, seed uint64) *Scene {
	s := &Scene{Name: "calderfold-generator", Rate: rate, Nominal: 60, Calls: []float64{97, 148, 205}}
	s.Moves = [][2]float64{{0.2 * dur, 0.2*dur + 1}, {0.45 * dur, 0.45*dur + 3}, {0.6 * dur, 0.6*dur + 2}, {0.8 * dur, 0.8*dur + 1}}
	f := func(t float64) float64 {
		// Sags: down in 1 s at 20 %, back in 3 s at 45 %; down in 2 s at
		// 60 %, back in 1 s at 80 % of the recording.
		return 60 - 1.2*(raised(t, 0.2*dur, 1)-raised(t, 0.45*dur, 3)+raised(t, 0.6*dur, 2)-raised(t, 0.8*dur, 1))
	}
	s.build(dur, f, []float64{-28, -40, -34, -48, -42, -54, -50})
	s.Clean = make([]float64, len(s.Hum))
	rng := rand.New(rand.NewPCG(seed, 0xca1d))
	noise := db2amp(-66)
	for i := range s.Clean {
		t := float64(i) / rate
		v := noise * rng.NormFloat64()
		for _, fc := range s.Calls {
			v += db2amp(-40) * math.Sin(2*math.Pi*fc*t+fc)
		}
		s.Clean[i] = v
	}
	return s
}

// ReedmereStandby is the standby pump at the Reedmere pump house, run
// from its own 50 Hz generator set while the mains pump runs, as heard
// by a second input of the same recorder: a supply of its own, so its hum
// does not follow Reedmere's. The set runs slow, at 49.3 Hz, sags by
// 0.6 Hz over 1.5 s when the pump takes load at 55 % of the recording and
// recovers over 3 s at 75 %; seven harmonics of steady level, mostly odd
// (the pump's motor). The wanted sound is a floor of white noise at
// -66 dBFS RMS and pulsed frog calls at 560 and 690 Hz (-36 dBFS peak).
func ReedmereStandby(rate, dur float64, seed uint64) *Scene {
	s := &Scene{Name: "reedmere-standby", Rate: rate, Nominal: 50, Calls: []float64{560, 690}}
	f := func(t float64) float64 {
		return 49.3 + 0.04*math.Sin(2*math.Pi*t/7.3) - 0.6*(raised(t, 0.55*dur, 1.5)-raised(t, 0.75*dur, 3))
	}
	s.build(dur, f, []float64{-32, -50, -38, -54, -42, -58, -48})
	s.Clean = make([]float64, len(s.Hum))
	rng := rand.New(rand.NewPCG(seed, 0x57a9d))
	noise := db2amp(-66)
	for i := range s.Clean {
		s.Clean[i] = noise * rng.NormFloat64()
	}
	// Frogs: pulses of 50 ms every 120 ms, in bouts of 1.2 s.
	for j, fc := range s.Calls {
		a := db2amp(-36)
		for bout := 0.5 + 1.1*float64(j); bout+1.2 < dur; bout += 3.7 + 1.3*float64(j) {
			for p := 0.0; p < 1.2; p += 0.12 {
				t0 := bout + p
				for i := int(t0 * rate); i < int((t0+0.05)*rate) && i < len(s.Clean); i++ {
					u := (float64(i)/rate - t0) / 0.05
					s.Clean[i] += a * math.Sin(math.Pi*u) * math.Sin(2*math.Pi*fc*float64(i)/rate)
				}
			}
		}
	}
	return s
}
