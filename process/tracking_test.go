package process

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

// constTrack is a track that holds one frequency.
type constTrack float64

func (c constTrack) At(float64) float64 { return float64(c) }

// combTol bounds the difference between the tracking comb held at one
// frequency and the fixed comb designed by the design package: the two
// realise the same transfer function in different structures, so they
// differ by round-off alone (about 1e-12 of the signal here).
const combTol = 1e-9

// TestTrackCombMatchesDesign checks the closed forms of the tracking
// notches (k1 = -cos w0, k2 = a2 independent of the centre) against the
// notch sections designed by the bilinear transform: held at a constant
// fundamental, the comb's output equals the fixed comb's, causal and
// zero phase, at several rates.
func TestTrackCombMatchesDesign(t *testing.T) {
	for _, tc := range []struct {
		name      string
		rate      float64
		f0, bw    float64
		zeroPhase bool
	}{
		{"48 kHz causal", 48000, 50.0, 0.5, false},
		{"44.1 kHz zero phase", 44100, 60.0, 0.5, true},
		{"8 kHz wide notches", 8000, 50.3, 3, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			spec := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: tc.f0, Harmonics: 9, BandwidthHz: tc.bw}}, ZeroPhase: tc.zeroPhase}
			f, err := design.Design(spec, tc.rate)
			if err != nil {
				t.Fatal(err)
			}
			rng := rand.New(rand.NewPCG(1, 2))
			n := int(tc.rate * 2)
			x := make([]float64, 2*n)
			for i := 0; i < n; i++ {
				for c := 0; c < 2; c++ {
					x[2*i+c] = 0.3*math.Sin(2*math.Pi*tc.f0*3*float64(i)/tc.rate+float64(c)) + 0.1*rng.NormFloat64()
				}
			}
			cfg := Config{Channels: 2}
			var harm []float64
			for _, c := range f.Stages[0].NotchHz {
				harm = append(harm, c/tc.f0)
			}
			g2 := 0.5
			if tc.zeroPhase {
				g2 = math.Sqrt(0.5)
			}
			tv, err := newTrackComb(tc.rate, cfg, []FrequencyTrack{constTrack(tc.f0)}, harm, f.Stages[0].NotchBandwidthHz, g2)
			if err != nil {
				t.Fatal(err)
			}
			c, err := newTrackedCascade(nil, cfg, tv)
			if err != nil {
				t.Fatal(err)
			}
			var got, want []float64
			if tc.zeroPhase {
				opt := ZeroPhaseOptions{PadFrames: 3000}
				want, _, err = ZeroPhaseSlice(nil, x, f.Sections(), cfg, opt)
				if err != nil {
					t.Fatal(err)
				}
				opt.cascade = c
				tv.setPositions(-3000, int64(n)+3000-1)
				got, _, err = ZeroPhaseSlice(nil, x, nil, cfg, opt)
				if err != nil {
					t.Fatal(err)
				}
			} else {
				ref, err := NewCascade(f.Sections(), cfg)
				if err != nil {
					t.Fatal(err)
				}
				want = ref.Process(nil, x)
				got = c.Process(nil, x[:len(x)/2])
				got = append(got, c.Process(nil, x[len(x)/2:])...)
			}
			worst := 0.0
			for i := range got {
				worst = math.Max(worst, math.Abs(got[i]-want[i]))
			}
			if worst > combTol {
				t.Errorf("largest difference from the designed comb %.3g, want <= %g", worst, combTol)
			}
		})
	}
}

// TestTrackCombPerChannel checks one track per channel: each channel is
// notched at its own fundamental, as the fixed comb designed there.
func TestTrackCombPerChannel(t *testing.T) {
	const rate = 8000.0
	f := [2]float64{50, 50.7}
	n := int(rate * 2)
	x := make([]float64, 2*n)
	for i := 0; i < n; i++ {
		for c := 0; c < 2; c++ {
			x[2*i+c] = 0.3 * math.Sin(2*math.Pi*f[c]*2*float64(i)/rate)
		}
	}
	harm := []float64{1, 2, 3}
	widths := []float64{0.5, 0.5, 0.5}
	cfg := Config{Channels: 2}
	tv, err := newTrackComb(rate, cfg, []FrequencyTrack{constTrack(f[0]), constTrack(f[1])}, harm, widths, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	c, err := newTrackedCascade(nil, cfg, tv)
	if err != nil {
		t.Fatal(err)
	}
	got := c.Process(nil, x)
	for ch := 0; ch < 2; ch++ {
		d, err := design.Design(design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: f[ch], Harmonics: 3, BandwidthHz: 0.5}}}, rate)
		if err != nil {
			t.Fatal(err)
		}
		ref, err := NewCascade(d.Sections(), Config{Channels: 1})
		if err != nil {
			t.Fatal(err)
		}
		one := make([]float64, n)
		for i := range one {
			one[i] = x[2*i+ch]
		}
		want := ref.Process(nil, one)
		worst := 0.0
		for i := range want {
			worst = math.Max(worst, math.Abs(got[2*i+ch]-want[i]))
		}
		if worst > combTol {
			t.Errorf("channel %d: largest difference from the comb at %g Hz %.3g, want <= %g", ch+1, f[ch], worst, combTol)
		}
	}
	if _, err := newTrackComb(rate, Config{Channels: 3}, []FrequencyTrack{constTrack(50), constTrack(50)}, harm, widths, 0.5); err == nil {
		t.Errorf("two tracks for three channels: no error")
	}
}
