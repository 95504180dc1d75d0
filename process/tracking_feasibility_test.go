package process_test

import (
	"math"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process"
	"github.com/wavsieve/wavsieve/process/humscene"
)

// The design check of feasibility of the tracking notch. Its figures are
// the project's own requirement for the tracking notch, not an outside
// source; the reduction is measured with the twin-polarity method of
// package humscene (the file and a twin whose wanted sound has its
// polarity reversed are filtered alike; half their sum is what the hum
// drives), per harmonic, in 1 s blocks, the first and last left out, as
// in TestTrackingNotchGoal.
const (
	// feasibilityHopS: the true track is given to the notch as a point
	// every 5 ms (the notch itself is re-designed every 1 ms along it,
	// interpolating linearly between the points).
	feasibilityHopS = 0.005
	// feasibilityFloorDB: with the true track, every harmonic's worst
	// second keeps at least this much reduction. The requirement states
	// 46-55 dB; only the lower end is asserted, see
	// TestTrackingFeasibility.
	feasibilityFloorDB = 46.0
	// surveyBlockS is the block of the survey's drift measurement: a
	// tracker this coarse gives one frequency every 2 s.
	surveyBlockS = 2.0
	// feasibilityUpperFrom is the first of the upper harmonics that a
	// 2 s track fails during the 1 Hz move.
	feasibilityUpperFrom = 7
)

// pointTrack is a frequency track given as points every hopS seconds
// from startS, interpolated linearly and held beyond the ends (as the
// tracker's own tracks are read).
type pointTrack struct {
	startS, hopS float64
	hz           []float64
}

func (p *pointTrack) At(sec float64) float64 {
	x := (sec - p.startS) / p.hopS
	n := len(p.hz)
	if !(x > 0) {
		return p.hz[0]
	}
	if x >= float64(n-1) {
		return p.hz[n-1]
	}
	i := int(x)
	return p.hz[i] + (x-float64(i))*(p.hz[i+1]-p.hz[i])
}

func (p *pointTrack) Range() (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, f := range p.hz {
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}
	return lo, hi
}

// trueTrack samples the scene's true fundamental every hopS seconds.
func trueTrack(s *humscene.Scene, hopS float64) *pointTrack {
	p := &pointTrack{hopS: hopS}
	for j := 0; ; j++ {
		i := int(math.Round(float64(j) * hopS * s.Rate))
		if i >= len(s.Freq) {
			break
		}
		p.hz = append(p.hz, s.Freq[i])
	}
	return p
}

// blockTrack is what a tracker of blockS blocks gives at best: the true
// fundamental's mean over each whole block, placed at the block's
// centre, interpolated linearly between the centres.
func blockTrack(s *humscene.Scene, blockS float64) *pointTrack {
	p := &pointTrack{startS: blockS / 2, hopS: blockS}
	m := int(math.Round(blockS * s.Rate))
	for st := 0; st+m <= len(s.Freq); st += m {
		sum := 0.0
		for _, f := range s.Freq[st : st+m] {
			sum += f
		}
		p.hz = append(p.hz, sum/float64(m))
	}
	return p
}

// filterAlong runs a 0.5 Hz tracking notch comb along the given track
// (the tracker bypassed: the same track for the file and its twin) and
// measures it.
func filterAlong(t *testing.T, s *humscene.Scene, tr process.FrequencyTrack, zeroPhase bool) *humscene.Result {
	t.Helper()
	spec := design.Spec{Stages: []design.Stage{{Family: design.Notch, FundamentalHz: s.Nominal, Harmonics: s.Harmonics, BandwidthHz: goalWidthHz, Tracking: true}}, ZeroPhase: zeroPhase}
	given := &humscene.Recorder{Tracks: []process.FrequencyTrack{tr}}
	dir := t.TempDir()
	yp, _, err := humscene.Filter(dir, "plus", s.Mix(1), s.Rate, spec, given.Replay)
	if err != nil {
		t.Fatal(err)
	}
	ym, _, err := humscene.Filter(dir, "minus", s.Mix(-1), s.Rate, spec, given.Replay)
	if err != nil {
		t.Fatal(err)
	}
	r, err := humscene.Measure(s, yp, ym, s.Harmonics)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// moveBlocks returns the measured 1 s blocks (not the first or last)
// that overlap one of the scene's large moves.
func moveBlocks(s *humscene.Scene) []int {
	nb := int(float64(len(s.Hum)) / s.Rate / humscene.BlockS)
	var blocks []int
	for b := 1; b < nb-1; b++ {
		lo, hi := float64(b)*humscene.BlockS, float64(b+1)*humscene.BlockS
		for _, m := range s.Moves {
			if m[0] < hi && m[1] > lo {
				blocks = append(blocks, b)
				break
			}
		}
	}
	return blocks
}

// worstIn returns the least reduction of harmonic k (from 1) over the
// given blocks, and the block.
func worstIn(r *humscene.Result, k int, blocks []int) (float64, int) {
	w, at := math.Inf(1), -1
	for _, b := range blocks {
		if v := r.Reduction[k-1][b]; v < w {
			w, at = v, b
		}
	}
	return w, at
}

// TestTrackingFeasibility is the design check of feasibility: a 0.5 Hz
// notch re-designed along the true track, given every 5 ms, keeps
// 46 dB or more of hum reduction at every harmonic in its worst second;
// a track as coarse as the survey's 2 s blocks fails the upper harmonics
// during the 1 Hz move, where the true track passes. Short scenes (12 s
// at 24 kHz) keep it fast, as in TestTrackingNotchGoal.
//
// Measured on these scenes (go test ./process/ -run Feasibility -v),
// worst second per harmonic, true track every 5 ms, causal:
//
//	Reedmere (9 harmonics):   69.5 63.5 60.2 57.0 55.7 53.9 52.7 51.3 50.4 dB
//	Calder Fold (7):          82.5 80.1 76.5 73.6 71.3 69.4 67.9 dB
//
// and zero phase on Reedmere 63.2 ... 44.7 dB (9th harmonic). The
// requirement's 46-55 dB is an expectation of what is feasible; a
// higher figure shows headroom, not a fault, so only the lower end is
// asserted. The upper end means nothing per harmonic: the track's
// error at harmonic k is k times the fundamental's, so the lower
// harmonics always keep more (Reedmere's fundamental 69.5 dB against
// its 9th's 50.4 dB), and the worst harmonic's figure depends on the
// scene (50.4 dB on Reedmere, whose worst second is the settling just
// after the start, the same for points every 1, 5 or 20 ms; 67.9 dB on
// Calder Fold, whose worst seconds are in its ramps) and on the track's
// timing (measured once with a point every sample: Calder Fold's 7th
// harmonic kept 68.2 dB, 61.0 dB with the track half a sample late and
// 78.5 dB with it half a sample early). Zero phase is held to the
// goal's 40 dB, not the 46 dB floor: its worst second (44.7 dB, 9th
// harmonic) is the last one measured, next to where the backward pass
// starts from the end padding (the hum fitted at one frequency over the
// file's last 0.25 s); its notches are 0.5 Hz wide combined, each pass
// wider.
//
// The 2 s track (exact block means, the best a survey of 2 s blocks can
// give) leaves about 0 dB (-1.0 to -0.3 dB) at the 7th to 9th harmonics
// in the seconds of the 1 Hz move, where the 5 ms true track keeps
// 70.0 dB or more.
func TestTrackingFeasibility(t *testing.T) {
	const rate, dur = 24000.0, 12.0
	reedmere := humscene.Reedmere(rate, dur, 1)
	fine := map[*humscene.Scene]*humscene.Result{}
	cases := []struct {
		name      string
		scene     *humscene.Scene
		zeroPhase bool
		floorDB   float64
	}{
		{"reedmere causal", reedmere, false, feasibilityFloorDB},
		{"calder fold generator causal", humscene.CalderFold(rate, dur, 2), false, feasibilityFloorDB},
		{"reedmere zero phase", reedmere, true, goalReductionDB},
	}
	for _, tc := range cases {
		t.Run("true track every 5 ms, "+tc.name, func(t *testing.T) {
			r := filterAlong(t, tc.scene, trueTrack(tc.scene, feasibilityHopS), tc.zeroPhase)
			if !tc.zeroPhase {
				fine[tc.scene] = r
			}
			t.Logf("worst second per harmonic %.1f dB; median %.1f dB", r.Worst, r.Median)
			for k, w := range r.Worst {
				if w < tc.floorDB {
					t.Errorf("harmonic %d: %.1f dB in its worst second, want >= %g", k+1, w, tc.floorDB)
				}
			}
		})
	}
	t.Run("2 s blocks fail the 1 Hz move", func(t *testing.T) {
		s := reedmere
		blocks := moveBlocks(s)
		if len(blocks) == 0 {
			t.Fatalf("no measured block overlaps the moves %v", s.Moves)
		}
		r := filterAlong(t, s, blockTrack(s, surveyBlockS), false)
		f := fine[s]
		if f == nil {
			f = filterAlong(t, s, trueTrack(s, feasibilityHopS), false)
		}
		for k := feasibilityUpperFrom; k <= s.Harmonics; k++ {
			coarse, cb := worstIn(r, k, blocks)
			exact, eb := worstIn(f, k, blocks)
			t.Logf("harmonic %d during the move (blocks %v): 2 s track %.1f dB (block %d), 5 ms true track %.1f dB (block %d)", k, blocks, coarse, cb, exact, eb)
			if !(coarse < goalReductionDB) {
				t.Errorf("harmonic %d: the 2 s track keeps %.1f dB during the move, want it below the goal's %g (it should fail)", k, coarse, goalReductionDB)
			}
			if exact < goalReductionDB {
				t.Errorf("harmonic %d: the 5 ms true track keeps %.1f dB during the move, want >= %g", k, exact, goalReductionDB)
			}
		}
	})
}
