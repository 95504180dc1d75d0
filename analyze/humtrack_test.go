package analyze

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// Tolerances of the tracker tests (the accuracy the tracking notch asks
// of the tracker).
const (
	// constTolHz: a constant hum is read to 1 mHz at every point.
	constTolHz = 0.001
	// slopeTolRel: a linear drift's slope is read to 1 %.
	slopeTolRel = 0.01
	// followTolHz bounds the error at every point while the hum wanders by
	// +-0.25 Hz and moves 1 Hz in 2 s: 5 mHz at the fundamental is 0.045 Hz
	// at the 9th harmonic, a tenth of a 0.5 Hz notch.
	followTolHz = 0.005
	// edgeS: points this close to either end are not checked (the phase
	// windows are cut short there).
	edgeS = 0.5
)

// humSignal synthesises hum of the fundamental f(t) with harmonics 1..9
// of the given amplitudes (harmonic phases fixed, arbitrary), over white
// noise of RMS noise, at rate for dur seconds. Mono.
func humSignal(rate, dur float64, f func(t float64) float64, amps []float64, noise float64, seed uint64) []float64 {
	n := int(rate * dur)
	x := make([]float64, n)
	rng := rand.New(rand.NewPCG(seed, 7))
	cyc := 0.0
	for i := range x {
		t := float64(i) / rate
		v := 0.0
		for k, a := range amps {
			v += a * math.Cos(2*math.Pi*float64(k+1)*cyc+0.7*float64(k*k))
		}
		x[i] = v + noise*rng.NormFloat64()
		// Midpoint rule for the phase integral.
		cyc += f(t+0.5/rate) / rate
	}
	return x
}

var testAmps = []float64{0.05, 0.02, 0.03, 0.01, 0.015, 0.005, 0.008, 0.004, 0.006}

func runTracker(t *testing.T, x []float64, rate float64, o TrackOptions) *HumTrack {
	t.Helper()
	o.SampleRate, o.Channels = rate, 1
	tk, err := NewTracker(o)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(x); i += 4096 {
		tk.Write(x[i:min(i+4096, len(x))])
	}
	tr, err := tk.Result()
	if err != nil {
		t.Fatal(err)
	}
	return tr[0]
}

func TestTrackerReadsHum(t *testing.T) {
	const rate = 8000.0
	const dur = 12.0
	move := func(t float64) float64 {
		// +-0.25 Hz of slow wander (two slow sinusoids) and a 1 Hz rise
		// over 2 s (raised cosine) from t = 5 s.
		f := 50 + 0.15*math.Sin(2*math.Pi*t/9) + 0.1*math.Sin(2*math.Pi*t/4.3+1)
		switch {
		case t >= 7:
			f += 1
		case t > 5:
			f += 0.5 - 0.5*math.Cos(math.Pi*(t-5)/2)
		}
		return f
	}
	cases := []struct {
		name string
		f    func(t float64) float64
		tol  float64
	}{
		{"constant 50 Hz", func(float64) float64 { return 50 }, constTolHz},
		{"wander and 1 Hz move", move, followTolHz},
		{"60 Hz generator sag", func(t float64) float64 {
			if t > 4 && t < 6 {
				return 60 - 0.6*(1-math.Cos(math.Pi*(t-4)))
			}
			return 60
		}, followTolHz},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			x := humSignal(rate, dur, tc.f, testAmps, 0.001, 1)
			tr := runTracker(t, x, rate, TrackOptions{})
			worst, at := 0.0, 0.0
			for i, v := range tr.Hz {
				ts := float64(i) * tr.HopS
				if ts < edgeS || ts > dur-edgeS {
					continue
				}
				if e := math.Abs(v - tc.f(ts)); e > worst {
					worst, at = e, ts
				}
			}
			t.Logf("worst error %.5f Hz at %.2f s; harmonics %v; range %.3f-%.3f Hz", worst, at, tr.Harmonics, tr.Hz[0], tr.Hz[len(tr.Hz)-1])
			if worst > tc.tol {
				t.Errorf("worst error %.5f Hz at %.2f s, want <= %g", worst, at, tc.tol)
			}
		})
	}
}

func TestTrackerSlope(t *testing.T) {
	const rate = 8000.0
	const dur = 10.0
	const slope = 0.03 // Hz/s: 49.85 to 50.15 Hz
	f := func(t float64) float64 { return 49.85 + slope*t }
	x := humSignal(rate, dur, f, testAmps, 0.001, 2)
	tr := runTracker(t, x, rate, TrackOptions{})
	// Least-squares slope of the points away from the ends.
	var s0, s1, s2, sy, sxy float64
	for i, v := range tr.Hz {
		ts := float64(i) * tr.HopS
		if ts < edgeS || ts > dur-edgeS {
			continue
		}
		s0++
		s1 += ts
		s2 += ts * ts
		sy += v
		sxy += ts * v
	}
	got := (s0*sxy - s1*sy) / (s0*s2 - s1*s1)
	t.Logf("slope %.6f Hz/s, want %g", got, slope)
	if math.Abs(got-slope) > slopeTolRel*slope {
		t.Errorf("slope %.6f Hz/s, want %g within %g %%", got, slope, 100*slopeTolRel)
	}
}

func TestTrackerBridgesMaskedHum(t *testing.T) {
	const rate = 8000.0
	const dur = 10.0
	f := func(t float64) float64 { return 50 + 0.02*t }
	x := humSignal(rate, dur, f, testAmps, 0.001, 3)
	// A loud burst of noise masks the hum for 0.3 s.
	rng := rand.New(rand.NewPCG(9, 9))
	for i := int(4 * rate); i < int(4.3*rate); i++ {
		x[i] += 0.5 * rng.NormFloat64()
	}
	tr := runTracker(t, x, rate, TrackOptions{})
	if tr.Bridged == 0 {
		t.Errorf("no point bridged across a 0.3 s burst 20 dB over the hum")
	}
	worst := 0.0
	for i, v := range tr.Hz {
		ts := float64(i) * tr.HopS
		if ts < edgeS || ts > dur-edgeS {
			continue
		}
		worst = math.Max(worst, math.Abs(v-f(ts)))
	}
	t.Logf("bridged %d points, longest gap %.2f s, worst error %.4f Hz", tr.Bridged, tr.LongestGapS, worst)
	if worst > followTolHz {
		t.Errorf("worst error %.4f Hz across the burst, want <= %g", worst, followTolHz)
	}
}

func TestTrackerNoHum(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	x := make([]float64, 8000*5)
	for i := range x {
		x[i] = 0.1 * rng.NormFloat64()
	}
	tk, err := NewTracker(TrackOptions{SampleRate: 8000, Channels: 1})
	if err != nil {
		t.Fatal(err)
	}
	tk.Write(x)
	if _, err := tk.Result(); !errors.Is(err, ErrNoHum) {
		t.Errorf("white noise: got %v, want ErrNoHum", err)
	}
}

func TestSelectKth(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	for _, n := range []int{1, 2, 3, 10, 101, 1000} {
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(rng.IntN(20)) // with ties
		}
		s := append([]float64(nil), v...)
		slices.Sort(s)
		for _, k := range []int{0, n / 2, n - 1} {
			w := append([]float64(nil), v...)
			if got := selectKth(w, k); got != s[k] {
				t.Errorf("n %d k %d: %g, want %g", n, k, got, s[k])
			}
		}
	}
}
