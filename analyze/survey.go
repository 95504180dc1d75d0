package analyze

import (
	"fmt"
	"math"
	"slices"

	"github.com/wavsieve/wavsieve/design"
)

// Survey defaults. Each is the value a zero field of SurveyOptions takes.
const (
	// DefaultSurveyBlockSeconds is the length of the blocks in which the
	// hum's fundamental is tracked: long enough for 0.5 Hz bins (so that a
	// tone 1.1 Hz from the hum is resolved by the Hann window's main lobe
	// of +-2 bins), short enough to follow the slow drift of a supply.
	DefaultSurveyBlockSeconds = 2.0
	// DefaultSurveyThresholdDB is how far a harmonic must stand above the
	// local noise floor to count as present, as a density plot shows it
	// (Tone.AboveFloorDB).
	DefaultSurveyThresholdDB = 10.0
	// DefaultSurveySearchHz is how far from the nominal 50 or 60 Hz the
	// fundamental is looked for. Interconnected grids keep within
	// +-0.2 Hz in normal operation and +-1 Hz is their emergency band
	// (common practice); a generator set may stray further, then raise it.
	DefaultSurveySearchHz = 1.0
	// DefaultSurveyMaxHarmonics is the highest harmonic number examined.
	DefaultSurveyMaxHarmonics = 20
	// DefaultSurveyRumbleBelowHz is the corner below which the rumble's
	// energy is measured, the lower limit of hearing (common practice).
	DefaultSurveyRumbleBelowHz = 20.0
)

// Fixed parameters of the survey, with the reason for each value.
const (
	// surveyMinSeconds is the shortest block that gives bins narrow
	// enough (4 Hz) to separate the harmonics of 50 Hz with their floors.
	surveyMinSeconds = 0.25
	// rumbleBandHz is the top of the band in which rumble is looked for:
	// ten times the usual rumble corner of 20 Hz.
	rumbleBandHz = 200.0
	// rumbleRefLowHz and rumbleRefHighHz bound the band whose median
	// density is the floor the rumble is compared with: the band above the
	// rumble, with the speech and call band, whose median is not moved by
	// tones and calls that occupy less than half of it.
	rumbleRefLowHz, rumbleRefHighHz = 200.0, 2000.0
	// rumbleMedianBins is the half-width of the running median that takes
	// tones out of the spectrum before the rumble is measured: 8 bins on
	// each side cover the 5 bins of a Hann main lobe more than twice, and
	// a running median keeps a monotone slope unchanged.
	rumbleMedianBins = 8
	// rumbleResidual is the share of the rumble's excess power that may
	// lie above the suggested corner (1%, -20 dB).
	rumbleResidual = 0.01
	// rumbleRoundHz: suggested corners are rounded up to a multiple of it.
	rumbleRoundHz = 5.0
	// subToneShare is the least share of a channel's power that a steady
	// tone below the rumble corner must carry to be reported (1%, -20 dB):
	// then it moves the meters and the headroom, and is worth a high-pass.
	subToneShare = 0.01
	// subToneCornerFactor puts the suggested corner for such a tone at this
	// multiple of its frequency (then rounded up to rumbleRoundHz): the
	// order-4 Butterworth high-pass is 10 log10(1 + 3^8) = 38 dB down there
	// (|H|^2 = 1 / (1 + (fc/f)^2N), the Butterworth magnitude).
	subToneCornerFactor = 3.0
	// highpassOrder is the order of the suggested Butterworth high-pass
	// (24 dB per octave).
	highpassOrder = 4
	// wantedLossFactor keeps the suggested corner at or below this
	// fraction of the lowest wanted frequency f, where an order-4
	// Butterworth high-pass loses at most 0.1 dB: 1/(1 + (fc/f)^8) >=
	// 10^(-0.01) gives fc/f <= (10^0.01 - 1)^(1/8) = 0.6245.
	wantedLossFactor = 0.6245
	// notchDepthDB is the attenuation the suggested notches keep at the
	// edges of the hum's drift: a second-order notch of -3 dB width B is
	// down A dB at an offset d from its centre when B = 2 d sqrt(10^(A/10)
	// - 1) (from |H|^2 = x^2/(1 + x^2), x = 2 d / B, for a narrow notch).
	notchDepthDB = 20.0
	// notchMarginHz is added to the half-range of the drift, for the
	// error of the fundamental's estimate (the 0.05 Hz asked of it, with
	// room to spare) and a slow wander beyond the file.
	notchMarginHz = 0.02
	// notchMinWidthHz is the narrowest -3 dB width suggested at the
	// fundamental: a narrower notch rings for longer than a second.
	notchMinWidthHz = 0.5
	// notchMinQ is the widest notch suggested: beyond it a fixed notch
	// cannot follow the drift without taking out neighbouring content,
	// and the survey says so.
	notchMinQ = 5.0
	// grandkeBiasBins is the error left in an interpolated peak position
	// at high signal-to-noise ratios (the neighbouring lobes and the
	// negative-frequency image), used to cap a harmonic's weight.
	grandkeBiasBins = 0.005
	// grandkeNoiseBins scales the spread of an interpolated peak position
	// with the signal-to-noise ratio rho of the bin, c/sqrt(rho) bins: the
	// Cramer-Rao bound for a sinusoid in white noise is
	// sqrt(6 / (4 pi^2 ENBW rho)) = 0.32/sqrt(rho) bins with the Hann ENBW
	// of 1.5 bins (Rife & Boorstyn, IEEE Trans. Inf. Theory 20, 1974,
	// cited from memory), and the interpolation does about half as well.
	grandkeNoiseBins = 0.64
	// outlierSigmas rejects a harmonic whose frequency differs from the
	// fit by more than this many of its standard deviations (a close
	// machine tone or a call in its bins).
	outlierSigmas = 5.0
)

// SurveyOptions configures a Surveyor. SampleRate and Channels are
// required; every other zero field takes its default.
type SurveyOptions struct {
	SampleRate float64
	Channels   int
	// Frames is the number of frames the caller will write, or a negative
	// value when it is not known. With it the tracking blocks are spread
	// evenly over the whole signal; without it they are BlockSeconds long
	// and the last partial block is not tracked.
	Frames int64
	// PCMBits is the number of significant bits of integer PCM input: a
	// sample at or within one LSB of either end of the integer range
	// counts as clipped. 0 means float input, whose samples count as
	// clipped beyond +-1.0.
	PCMBits int
	// MainsHz is 50 or 60 to look only for that mains frequency, or 0 to
	// take the one whose harmonics stand higher.
	MainsHz       float64
	BlockSeconds  float64
	ThresholdDB   float64
	SearchHz      float64
	MaxHarmonics  int
	RumbleBelowHz float64
	// LowestWantedHz is the lowest frequency of wanted content, if known
	// (0: not known). The suggested high-pass corner is kept low enough
	// that it costs at most 0.1 dB there.
	LowestWantedHz float64
}

// ChannelStats are the level statistics of one channel, in units of full
// scale (dBFS here is 20 log10 of an amplitude). A dB value is nil when
// the amplitude is 0.
type ChannelStats struct {
	Channel    int      `json:"channel"` // counted from 1
	Peak       float64  `json:"peak"`
	PeakDBFS   *float64 `json:"peak_dbfs"`
	RMS        float64  `json:"rms"`
	RMSDBFS    *float64 `json:"rms_dbfs"`
	DCOffset   float64  `json:"dc_offset"`
	Clipped    int64    `json:"clipped_samples"`
	ClipRuns   int64    `json:"clipped_runs"`
	LongestRun int64    `json:"longest_clipped_run"`
}

// Harmonic is one harmonic of the hum that stands above the floor.
type Harmonic struct {
	Number      int     `json:"number"`
	FrequencyHz float64 `json:"frequency_hz"`
	// AboveFloorDB is the largest over the channels of how far the
	// harmonic stands above its local floor (see Tone.AboveFloorDB).
	AboveFloorDB float64 `json:"above_floor_db"`
	// LevelDB is its power in that channel, dBFS (dB re 1 FS^2: a
	// sinusoid of amplitude A reads 20 log10 A - 3.01).
	LevelDB float64 `json:"level_dbfs"`
	// Channels and ChannelLevels give AboveFloorDB and LevelDB per
	// channel, nil where no power stands above the floor at all.
	Channels      []*float64 `json:"channels_above_floor_db"`
	ChannelLevels []*float64 `json:"channels_level_dbfs"`
}

// TrackPoint is the fundamental measured in one block.
type TrackPoint struct {
	StartS        float64 `json:"start_s"`
	EndS          float64 `json:"end_s"`
	FundamentalHz float64 `json:"fundamental_hz"`
	// SigmaHz is the standard deviation of the estimate from the spread
	// of the harmonics about the fit.
	SigmaHz   float64 `json:"sigma_hz"`
	Harmonics int     `json:"harmonics_used"`
}

// Hum is the mains hum found in a signal.
type Hum struct {
	MainsHz float64 `json:"mains_hz"`
	// FundamentalHz is the mean of the fundamental over the blocks of
	// Track, each estimated from all its harmonics.
	FundamentalHz float64 `json:"fundamental_hz"`
	// DriftHz is the largest minus the smallest value of Track. With
	// blocks of length B over a file of length T, a linear drift of D
	// reads D (T - B)/T.
	DriftHz   float64      `json:"drift_hz"`
	Harmonics []Harmonic   `json:"harmonics"`
	OddOnly   bool         `json:"odd_harmonics_only"`
	Track     []TrackPoint `json:"track"`
	BlockS    float64      `json:"block_s"`
	// Checked is the number of harmonics examined.
	Checked int `json:"harmonics_checked"`
}

// Rumble is the low-frequency energy of one channel measured against the
// floor of the band above it.
type Rumble struct {
	Channel  int     `json:"channel"`
	BelowHz  float64 `json:"below_hz"`
	LevelDB  float64 `json:"level_dbfs"`         // power below BelowHz, dB re 1 FS^2
	FloorDB  float64 `json:"reference_floor_db"` // median density 200-2000 Hz, dBFS^2/Hz
	ExcessDB float64 `json:"excess_db"`          // mean density below BelowHz over that floor
	Present  bool    `json:"present"`
	// CornerHz is where the suggested high-pass would go: the frequency
	// above which 1% of the excess power below 200 Hz lies, rounded up to
	// 5 Hz, and lowered to keep wanted content (0 when not Present).
	CornerHz float64 `json:"suggested_highpass_hz"`
	// ToneHz and ToneDBFS describe a steady tone below BelowHz that
	// carries at least 1% of the channel's power (0 and 0 when there is
	// none): the running median that measures the rumble does not see a
	// narrow line, so it is looked for apart. Such a tone makes the rumble
	// Present, with a corner at least 3 times its frequency.
	ToneHz   float64 `json:"sub_audio_tone_hz,omitempty"`
	ToneDBFS float64 `json:"sub_audio_tone_dbfs,omitempty"`
}

// Survey is what a Surveyor found in one signal.
type Survey struct {
	SampleRate float64        `json:"sample_rate_hz"`
	Channels   int            `json:"channels"`
	Frames     int64          `json:"frames"`
	DurationS  float64        `json:"duration_s"`
	Stats      []ChannelStats `json:"channel_stats"`
	// Hum is nil when no mains hum stands above the floor: neither the
	// fundamental nor two or more harmonics reach ThresholdDB.
	Hum *Hum `json:"hum"`
	// Rumble has one entry per channel; nil when the signal is too short
	// or its rate too low to measure it.
	Rumble []Rumble `json:"rumble"`
	// Spec is the suggested filter, designed at SampleRate to check it;
	// nil when there is nothing to take out or it could not be designed
	// (SpecError says why).
	Spec      *design.Spec `json:"suggested_spec"`
	SpecError string       `json:"suggested_spec_error,omitempty"`
	// Notes say what could not be measured or suggested, and why.
	Notes       []string `json:"notes,omitempty"`
	ThresholdDB float64  `json:"threshold_db"`
}

type chanStats struct {
	peak, sum, sumsq float64
	clipped, runs    int64
	run, longest     int64
}

// candidate accumulates the evidence for one mains frequency.
type candidate struct {
	mains float64
	k     int // harmonics examined
	track []TrackPoint
	power [][]float64 // [channel][harmonic-1], lobe power summed over blocks
	floor [][]float64 // [channel][harmonic-1], floor density summed
	found [][]int     // [channel][harmonic-1], blocks in which it was found
	last  float64     // fundamental of the last block, for blocks without one
}

// Surveyor surveys one signal written to it in blocks of interleaved
// frames: level statistics and clipping per channel, the mains hum
// (fundamental, drift and harmonics), rumble, and a suggested filter.
//
// Memory is bounded by one tracking block per channel: the signal is
// never held whole. The fundamental is tracked in consecutive blocks of
// about BlockSeconds: each block's periodogram (periodic Hann window,
// mean removed) is searched for the harmonic comb that stands highest
// near the nominal mains frequency, each harmonic's peak is interpolated
// with the ratio of its two largest bins (exact for a tone and a Hann
// window: Grandke, "Interpolation algorithms for discrete Fourier
// transforms of weighted signals", IEEE Trans. Instrum. Meas. 32, 1983,
// cited from memory), and the fundamental is the weighted least-squares
// fit of f_k = k f0 over the harmonics and channels, with outliers
// rejected. Harmonic levels are the lobe powers over the floors, averaged
// over the blocks.
//
// A Surveyor is not safe for concurrent use.
type Surveyor struct {
	o        SurveyOptions
	stats    []chanStats
	clipHi   float64
	clipLo   float64
	frames   int64
	blockLen int // samples per channel analysed in each block
	stride   int // frames from one block's start to the next
	pos      int // frames into the current stride
	buf      [][]float64
	est      *Estimator
	psd      [][]float64
	sumPSD   [][]float64
	blocks   int
	starts   []int64
	cands    []*candidate
	short    bool // too short for the spectral survey
	scratch  []float64
}

// NewSurveyor checks the options and allocates a Surveyor.
func NewSurveyor(o SurveyOptions) (*Surveyor, error) {
	if !(o.SampleRate > 0) || math.IsInf(o.SampleRate, 0) {
		return nil, fmt.Errorf("analyze: %w: survey sample rate %g Hz", ErrInvalidOption, o.SampleRate)
	}
	if o.Channels < 1 {
		return nil, fmt.Errorf("analyze: %w: survey of %d channels", ErrInvalidOption, o.Channels)
	}
	if o.PCMBits < 0 || o.PCMBits == 1 || o.PCMBits > 64 {
		return nil, fmt.Errorf("analyze: %w: %d PCM bits", ErrInvalidOption, o.PCMBits)
	}
	if o.MainsHz != 0 && o.MainsHz != 50 && o.MainsHz != 60 {
		return nil, fmt.Errorf("analyze: %w: mains frequency %g Hz: use 50, 60 or 0 for either", ErrInvalidOption, o.MainsHz)
	}
	def := func(v *float64, d float64, what string) error {
		if *v == 0 {
			*v = d
		}
		if !(*v > 0) || math.IsInf(*v, 0) {
			return fmt.Errorf("analyze: %w: survey %s %g", ErrInvalidOption, what, *v)
		}
		return nil
	}
	if err := def(&o.BlockSeconds, DefaultSurveyBlockSeconds, "block length (s)"); err != nil {
		return nil, err
	}
	if err := def(&o.ThresholdDB, DefaultSurveyThresholdDB, "threshold (dB)"); err != nil {
		return nil, err
	}
	if err := def(&o.SearchHz, DefaultSurveySearchHz, "search range (Hz)"); err != nil {
		return nil, err
	}
	if err := def(&o.RumbleBelowHz, DefaultSurveyRumbleBelowHz, "rumble corner (Hz)"); err != nil {
		return nil, err
	}
	if o.SearchHz >= 10 {
		return nil, fmt.Errorf("analyze: %w: search range %g Hz must stay below 10 Hz so that 50 and 60 Hz stay apart", ErrInvalidOption, o.SearchHz)
	}
	if o.LowestWantedHz < 0 || math.IsInf(o.LowestWantedHz, 0) || math.IsNaN(o.LowestWantedHz) {
		return nil, fmt.Errorf("analyze: %w: lowest wanted frequency %g Hz", ErrInvalidOption, o.LowestWantedHz)
	}
	if o.MaxHarmonics == 0 {
		o.MaxHarmonics = DefaultSurveyMaxHarmonics
	}
	if o.MaxHarmonics < 1 || o.MaxHarmonics > 200 {
		return nil, fmt.Errorf("analyze: %w: %d harmonics: use 1 to 200", ErrInvalidOption, o.MaxHarmonics)
	}
	s := &Surveyor{o: o, stats: make([]chanStats, o.Channels)}
	if o.PCMBits > 0 {
		// Codes run from -2^(b-1) to 2^(b-1) - 1, scaled by 2^-(b-1): at or
		// within one LSB of either end is code >= 2^(b-1) - 2 or
		// <= -2^(b-1) + 1.
		lsb := math.Ldexp(1, -(o.PCMBits - 1))
		s.clipHi, s.clipLo = 1-2*lsb, -1+lsb
	} else {
		s.clipHi, s.clipLo = math.Nextafter(1, 2), math.Nextafter(-1, -2)
	}

	target := int(math.Round(o.BlockSeconds * o.SampleRate))
	stride := target
	if o.Frames >= 0 {
		n := int64(1)
		if target > 0 && o.Frames >= int64(target) {
			n = o.Frames / int64(target)
		}
		stride = int(o.Frames / n)
	}
	s.stride = stride
	s.blockLen = smoothLength(stride)
	if float64(s.blockLen) < surveyMinSeconds*o.SampleRate || s.blockLen < 64 {
		s.short = true
		return s, nil
	}
	eo := Options{SampleRate: o.SampleRate, Segment: s.blockLen, Window: Window{Kind: Hann}, Detrend: DetrendMean, Scaling: Density, Workers: 1}
	est, err := NewEstimator(eo)
	if err != nil {
		return nil, err
	}
	s.est = est
	s.buf = make([][]float64, o.Channels)
	s.psd = make([][]float64, o.Channels)
	s.sumPSD = make([][]float64, o.Channels)
	for c := range s.buf {
		s.buf[c] = make([]float64, s.blockLen)
		s.psd[c] = make([]float64, est.Bins())
		s.sumPSD[c] = make([]float64, est.Bins())
	}
	mains := []float64{50, 60}
	if o.MainsHz != 0 {
		mains = []float64{o.MainsHz}
	}
	df := o.SampleRate / float64(s.blockLen)
	for _, m := range mains {
		// Harmonics whose search range and floor lie below 0.45 fs.
		k := 0
		for k < o.MaxHarmonics && float64(k+1)*(m+o.SearchHz)+12*df < 0.45*o.SampleRate {
			k++
		}
		if k == 0 {
			continue
		}
		c := &candidate{mains: m, k: k, last: m, power: make([][]float64, o.Channels), floor: make([][]float64, o.Channels), found: make([][]int, o.Channels)}
		for ch := range c.power {
			c.power[ch] = make([]float64, k)
			c.floor[ch] = make([]float64, k)
			c.found[ch] = make([]int, k)
		}
		s.cands = append(s.cands, c)
	}
	return s, nil
}

// smoothLength returns the largest n' <= n of the form 2^a 3^b 5^c, a
// length gonum's FFT handles with its fast radices.
func smoothLength(n int) int {
	best := 1
	for p2 := 1; p2 <= n; p2 *= 2 {
		for p3 := p2; p3 <= n; p3 *= 3 {
			for p5 := p3; p5 <= n; p5 *= 5 {
				best = max(best, p5)
			}
		}
	}
	if n < 1 {
		return 0
	}
	return best
}

// Write adds interleaved frames. It panics if len(frames) is not a
// multiple of the channel count. Write never keeps frames.
func (s *Surveyor) Write(frames []float64) {
	nc := s.o.Channels
	if len(frames)%nc != 0 {
		panic("analyze: survey block is not a whole number of frames")
	}
	n := len(frames) / nc
	for c := 0; c < nc; c++ {
		st := &s.stats[c]
		for i := c; i < len(frames); i += nc {
			v := frames[i]
			st.sum += v
			st.sumsq += v * v
			if a := math.Abs(v); a > st.peak {
				st.peak = a
			}
			if v >= s.clipHi || v <= s.clipLo {
				st.clipped++
				if st.run == 0 {
					st.runs++
				}
				st.run++
				st.longest = max(st.longest, st.run)
			} else {
				st.run = 0
			}
		}
	}
	s.frames += int64(n)
	if s.short {
		return
	}
	for i := 0; i < n; {
		take := min(n-i, s.stride-s.pos)
		if s.pos < s.blockLen {
			m := min(take, s.blockLen-s.pos)
			for c := 0; c < nc; c++ {
				b := s.buf[c][s.pos : s.pos+m]
				for j := range b {
					b[j] = frames[(i+j)*nc+c]
				}
			}
			if s.pos+m == s.blockLen {
				s.block(s.frames - int64(n) + int64(i+m) - int64(s.blockLen))
			}
		}
		s.pos += take
		i += take
		if s.pos == s.stride {
			s.pos = 0
		}
	}
}

// block analyses the block in s.buf, which started at frame start.
func (s *Surveyor) block(start int64) {
	for c := range s.buf {
		s.est.PSD(s.psd[c], s.buf[c]) // cannot fail: the length is the segment
		for k, v := range s.psd[c] {
			s.sumPSD[c][k] += v
		}
	}
	s.blocks++
	s.starts = append(s.starts, start)
	t0 := float64(start) / s.o.SampleRate
	t1 := float64(start+int64(s.blockLen)) / s.o.SampleRate
	for _, cand := range s.cands {
		f0, sigma, obs := s.fundamental(cand)
		if len(obs) > 0 {
			cand.track = append(cand.track, TrackPoint{StartS: t0, EndS: t1, FundamentalHz: f0, SigmaHz: sigma, Harmonics: len(obs)})
			cand.last = f0
		} else {
			f0 = cand.last
		}
		s.levels(cand, f0, obs)
	}
}

// harmObs is one harmonic peak found in one channel of a block.
type harmObs struct {
	k, ch int
	f, vr float64 // frequency (Hz) and its variance (Hz^2)
	db    float64 // how far it stands above its floor, dB
}

// floorNear returns the median density of psd over the bins from lo to
// hi (clamped to the spectrum), corrected for the median of a single
// periodogram's chi-square(2) bins, which is ln 2 times their mean.
func (s *Surveyor) floorNear(psd []float64, lo, hi int) float64 {
	lo, hi = max(1, lo), min(len(psd)-1, hi)
	s.scratch = append(s.scratch[:0], psd[lo:hi+1]...)
	return medianOf(s.scratch) / math.Ln2
}

// fundamental estimates the fundamental of cand's mains in the current
// block from the periodograms in s.psd. It returns the estimate, its
// standard deviation and the harmonic peaks that agree with it (none
// when no peak stood above the threshold).
func (s *Surveyor) fundamental(cand *candidate) (f0, sigma float64, obs []harmObs) {
	df := s.o.SampleRate / float64(s.blockLen)
	S := s.o.SearchHz
	K := cand.k
	nb := s.est.Bins()
	thr := math.Pow(10, s.o.ThresholdDB/10)
	enbw := s.est.ENBW().Bins
	floors := make([][]float64, len(s.psd))
	for c, p := range s.psd {
		floors[c] = make([]float64, K)
		for k := 1; k <= K; k++ {
			fk := float64(k) * cand.mains
			w := float64(k)*S + 10*df
			floors[c][k-1] = s.floorNear(p, int((fk-w)/df), int(math.Ceil((fk+w)/df)))
		}
	}
	// Coarse: the comb that stands highest, on a grid fine enough that the
	// highest harmonic moves by a quarter bin per step.
	step := df / (4 * float64(K))
	best, bestScore := cand.mains, 0.0
	for f := cand.mains - S; f <= cand.mains+S; f += step {
		score := 0.0
		for c, p := range s.psd {
			for k := 1; k <= K; k++ {
				x := float64(k) * f / df
				i := int(x)
				if i+1 >= nb {
					break
				}
				v := p[i] + (x-float64(i))*(p[i+1]-p[i])
				if r := v / floors[c][k-1]; r > 1 {
					score += math.Log10(r)
				}
			}
		}
		if score > bestScore {
			best, bestScore = f, score
		}
	}
	// Fine: each harmonic in turn, predicted from the fit of those below.
	est := best
	for k := 1; k <= K; k++ {
		for c, p := range s.psd {
			fl := floors[c][k-1]
			b0 := int(math.Round(float64(k) * est / df))
			pk := -1
			for b := max(2, b0-2); b <= min(nb-3, b0+2); b++ {
				if pk < 0 || p[b] > p[pk] {
					pk = b
				}
			}
			if pk < 0 || p[pk] < p[pk-1] || p[pk] < p[pk+1] {
				continue
			}
			var lobe float64
			for b := pk - 2; b <= pk+2; b++ {
				lobe += p[b] - fl
			}
			rho := lobe / (enbw * fl)
			if !(rho >= thr) {
				continue
			}
			a0 := math.Sqrt(math.Max(p[pk]-fl, 0))
			al := math.Sqrt(math.Max(p[pk-1]-fl, 0))
			ar := math.Sqrt(math.Max(p[pk+1]-fl, 0))
			// Grandke's ratio for the Hann window: with alpha the larger
			// neighbour over the peak, delta = (2 alpha - 1)/(alpha + 1)
			// bins towards that neighbour (from |W(x)| proportional to
			// sinc(x)/(1 - x^2)).
			var delta float64
			if ar >= al {
				a := ar / a0
				delta = (2*a - 1) / (a + 1)
			} else {
				a := al / a0
				delta = -(2*a - 1) / (a + 1)
			}
			sd := df * math.Hypot(grandkeNoiseBins/math.Sqrt(rho), grandkeBiasBins)
			obs = append(obs, harmObs{k: k, ch: c, f: (float64(pk) + delta) * df, vr: sd * sd, db: 10 * math.Log10(rho)})
		}
		if f, _, in := consensus(obs); len(in) > 0 {
			est = f
		}
	}
	return consensus(obs)
}

// consensus fits the fundamental to the harmonic peaks obs, robustly: a
// peak of a close machine tone, or a line of a pulsed call, lands near a
// harmonic without being one. Each peak in turn proposes f0 = f_k / k;
// the peaks that agree with the proposal (within outlierSigmas standard
// deviations of both) are fitted by least squares, and the agreement is
// tested again against the fit until it no longer changes. The fit
// whose agreeing peaks stand highest (dB above the floor, summed) wins.
// It returns that fit, its standard deviation and its agreeing peaks.
func consensus(obs []harmObs) (f0, sigma float64, in []harmObs) {
	agree := func(o harmObs, f, vf float64) bool {
		k := float64(o.k)
		return math.Abs(o.f-k*f) <= outlierSigmas*math.Sqrt(o.vr+k*k*vf)
	}
	mask := make([]bool, len(obs))
	bestScore := 0.0
	var bestMask []bool
	for _, h := range obs {
		f, vf := h.f/float64(h.k), h.vr/float64(h.k*h.k)
		for range 8 {
			changed := false
			for j, o := range obs {
				a := agree(o, f, vf)
				changed = changed || a != mask[j]
				mask[j] = a
			}
			if !changed {
				break
			}
			nf, sg, n := fitComb(obs, mask)
			if n == 0 {
				break
			}
			f, vf = nf, sg*sg
		}
		score := 0.0
		for j, o := range obs {
			if mask[j] {
				score += o.db
			}
		}
		if score > bestScore {
			bestScore = score
			bestMask = slices.Clone(mask)
		}
	}
	if bestMask == nil {
		return 0, 0, nil
	}
	f0, sigma, _ = fitComb(obs, bestMask)
	for j, o := range obs {
		if bestMask[j] {
			in = append(in, o)
		}
	}
	return f0, sigma, in
}

// fitComb fits f_k = k f0 by weighted least squares to the observations
// marked in use: f0 = sum(k f_k / v_k) / sum(k^2 / v_k), with standard
// deviation 1/sqrt(sum(k^2 / v_k)).
func fitComb(obs []harmObs, use []bool) (f0, sigma float64, n int) {
	var num, den float64
	for i, o := range obs {
		if !use[i] {
			continue
		}
		k := float64(o.k)
		num += k * o.f / o.vr
		den += k * k / o.vr
		n++
	}
	if n == 0 {
		return 0, 0, 0
	}
	return num / den, 1 / math.Sqrt(den), n
}

// levels adds the lobe power and floor of each harmonic of f0 in the
// current block to cand's sums. The floor is Tone's, corrected for the
// median of single-periodogram bins (ln 2 of their mean), and is always
// added. The power, the lobe's sum over that floor, is added only for the
// harmonics among found (the peaks that agree with f0), so that a call or
// machine tone beside a harmonic does not count as hum.
func (s *Surveyor) levels(cand *candidate, f0 float64, found []harmObs) {
	df := s.o.SampleRate / float64(s.blockLen)
	for c, p := range s.psd {
		for k := 1; k <= cand.k; k++ {
			t, err := s.est.Tone(p, float64(k)*f0)
			if err != nil {
				continue
			}
			fl := t.FloorDensity / math.Ln2
			cand.floor[c][k-1] += fl
			if !slices.ContainsFunc(found, func(o harmObs) bool { return o.k == k && o.ch == c }) {
				continue
			}
			var sum float64
			for b := t.LowBin; b <= t.HighBin; b++ {
				sum += p[b] - fl
			}
			cand.power[c][k-1] += sum * df
			cand.found[c][k-1]++
		}
	}
}

// Result returns the survey of everything written so far. It may be
// called more than once.
func (s *Surveyor) Result() *Survey {
	sv := &Survey{
		SampleRate:  s.o.SampleRate,
		Channels:    s.o.Channels,
		Frames:      s.frames,
		DurationS:   float64(s.frames) / s.o.SampleRate,
		ThresholdDB: s.o.ThresholdDB,
	}
	for c, st := range s.stats {
		cs := ChannelStats{Channel: c + 1, Peak: st.peak, Clipped: st.clipped, ClipRuns: st.runs, LongestRun: st.longest}
		if s.frames > 0 {
			n := float64(s.frames)
			cs.DCOffset = st.sum / n
			cs.RMS = math.Sqrt(st.sumsq / n)
		}
		cs.PeakDBFS = dbAmp(cs.Peak)
		cs.RMSDBFS = dbAmp(cs.RMS)
		sv.Stats = append(sv.Stats, cs)
	}
	switch {
	case s.short:
		sv.Notes = append(sv.Notes, fmt.Sprintf("no hum or rumble survey: blocks of %d samples are too short; they need %g s and 64 samples at least", s.blockLen, surveyMinSeconds))
		return sv
	case s.blocks == 0:
		sv.Notes = append(sv.Notes, fmt.Sprintf("no hum or rumble survey: the signal is shorter than one block of %g s; survey it with shorter blocks", float64(s.stride)/s.o.SampleRate))
		return sv
	case len(s.cands) == 0:
		sv.Notes = append(sv.Notes, fmt.Sprintf("no hum survey: the sample rate %g Hz is too low for 50 or 60 Hz and a floor beside it", s.o.SampleRate))
	}
	sv.Hum = s.hum()
	sv.Rumble = s.rumble()
	s.suggest(sv)
	return sv
}

func dbAmp(a float64) *float64 {
	if !(a > 0) {
		return nil
	}
	v := 20 * math.Log10(a)
	return &v
}

// aboveFloor returns cand's averaged level of harmonic k in channel c:
// how far it stands above the floor in dB (false when no power stands
// above it at all) and its power in dBFS.
func (s *Surveyor) aboveFloor(cand *candidate, c, k int) (above, level float64, ok bool) {
	p := cand.power[c][k-1] / float64(s.blocks)
	fl := cand.floor[c][k-1] / float64(s.blocks)
	if !(p > 0) || !(fl > 0) {
		return 0, 0, false
	}
	return 10 * math.Log10(p/s.est.ENBW().Hz/fl), 10 * math.Log10(p), true
}

// hum picks the mains frequency whose harmonics stand highest over the
// threshold and returns its hum, or nil when neither the fundamental nor
// two or more harmonics reach the threshold in any channel.
func (s *Surveyor) hum() *Hum {
	var best *Hum
	bestScore := 0.0
	for _, cand := range s.cands {
		h := &Hum{MainsHz: cand.mains, Checked: cand.k, BlockS: float64(s.blockLen) / s.o.SampleRate, Track: cand.track}
		score := 0.0
		fundamental := false
		for k := 1; k <= cand.k; k++ {
			hm := Harmonic{Number: k, AboveFloorDB: math.Inf(-1)}
			for c := 0; c < s.o.Channels; c++ {
				a, l, ok := s.aboveFloor(cand, c, k)
				if !ok {
					hm.Channels = append(hm.Channels, nil)
					hm.ChannelLevels = append(hm.ChannelLevels, nil)
					continue
				}
				hm.Channels = append(hm.Channels, &a)
				hm.ChannelLevels = append(hm.ChannelLevels, &l)
				if a > hm.AboveFloorDB {
					hm.AboveFloorDB, hm.LevelDB = a, l
				}
			}
			if hm.AboveFloorDB >= s.o.ThresholdDB {
				h.Harmonics = append(h.Harmonics, hm)
				score += hm.AboveFloorDB
				fundamental = fundamental || k == 1
			}
		}
		if len(cand.track) == 0 || !fundamental && len(h.Harmonics) < 2 {
			continue
		}
		if score > bestScore {
			best, bestScore = h, score
		}
	}
	if best == nil {
		return nil
	}
	lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
	for _, t := range best.Track {
		lo, hi = math.Min(lo, t.FundamentalHz), math.Max(hi, t.FundamentalHz)
		sum += t.FundamentalHz
	}
	best.FundamentalHz = sum / float64(len(best.Track))
	best.DriftHz = hi - lo
	even := false
	for i := range best.Harmonics {
		best.Harmonics[i].FrequencyHz = float64(best.Harmonics[i].Number) * best.FundamentalHz
		even = even || best.Harmonics[i].Number%2 == 0
	}
	best.OddOnly = !even && best.Harmonics[len(best.Harmonics)-1].Number >= 3
	return best
}

// rumble measures each channel's rumble from its mean periodogram.
func (s *Surveyor) rumble() []Rumble {
	df := s.o.SampleRate / float64(s.blockLen)
	nb := s.est.Bins()
	top := int(rumbleBandHz / df)
	refLo, refHi := int(math.Ceil(rumbleRefLowHz/df)), min(int(rumbleRefHighHz/df), int(0.45*s.o.SampleRate/df))
	below := int(s.o.RumbleBelowHz / df)
	if below < 1 || top+rumbleMedianBins >= nb || refHi-refLo < 2*rumbleMedianBins {
		return nil
	}
	var out []Rumble
	mean := make([]float64, nb)
	smooth := make([]float64, top+1)
	for c := range s.sumPSD {
		for k, v := range s.sumPSD[c] {
			mean[k] = v / float64(s.blocks)
		}
		// Running median from bin 1 (the mean is removed, so bin 0 holds
		// nothing), one-sided near it.
		for k := 1; k <= top; k++ {
			s.scratch = append(s.scratch[:0], mean[max(1, k-rumbleMedianBins):k+rumbleMedianBins+1]...)
			smooth[k] = medianOf(s.scratch)
		}
		s.scratch = append(s.scratch[:0], mean[refLo:refHi+1]...)
		ref := medianOf(s.scratch)
		r := Rumble{Channel: c + 1, BelowHz: float64(below) * df, FloorDB: 10 * math.Log10(ref)}
		var pBelow, sBelow float64
		for k := 1; k <= below; k++ {
			pBelow += mean[k] * df
			sBelow += smooth[k]
		}
		r.LevelDB = 10 * math.Log10(pBelow)
		r.ExcessDB = 10 * math.Log10(sBelow/float64(below)/ref)
		if math.IsNaN(r.ExcessDB) || math.IsInf(r.ExcessDB, 0) || math.IsInf(r.LevelDB, 0) || math.IsInf(r.FloorDB, 0) {
			// A silent channel: nothing to compare.
			r.ExcessDB, r.LevelDB, r.FloorDB = 0, -400, -400
		}
		r.Present = r.ExcessDB >= s.o.ThresholdDB
		corner := 0.0
		if r.Present {
			var total float64
			for k := 1; k <= top; k++ {
				total += math.Max(0, smooth[k]-ref)
			}
			tail := total
			corner = float64(top) * df
			for k := 1; k <= top; k++ {
				tail -= math.Max(0, smooth[k]-ref)
				if tail <= rumbleResidual*total {
					corner = float64(k) * df
					break
				}
			}
			corner = math.Ceil(corner/rumbleRoundHz) * rumbleRoundHz
		}
		if hz, p := subAudioTone(mean, smooth, below, df, s.o.ThresholdDB); hz > 0 {
			r.ToneHz, r.ToneDBFS = hz, 10*math.Log10(p)
			corner = math.Max(corner, math.Ceil(subToneCornerFactor*hz/rumbleRoundHz)*rumbleRoundHz)
			r.Present = true
		}
		if r.Present {
			if w := s.o.LowestWantedHz; w > 0 && corner > wantedLossFactor*w {
				corner = math.Floor(wantedLossFactor * w)
			}
			r.CornerHz = corner
		}
		out = append(out, r)
	}
	return out
}

// subAudioTone finds the strongest steady tone in bins 1..below of the
// mean density: its peak bin must stand thresholdDB above the running
// median, and its power, the excess over the median summed over the Hann
// main lobe (5 bins; Harris 1978, "On the use of windows for harmonic
// analysis with the discrete Fourier transform", Proc. IEEE 66(1): the
// Hann main lobe is 4 bins wide between its nulls), must be at least
// subToneShare of the channel's total power. It returns the tone's
// frequency (the power-weighted centre of the lobe) and power in FS^2,
// or 0, 0.
func subAudioTone(mean, smooth []float64, below int, df, thresholdDB float64) (hz, power float64) {
	peak := 1
	for k := 2; k <= below && k < len(smooth); k++ {
		if mean[k] > mean[peak] {
			peak = k
		}
	}
	if peak >= len(smooth) || !(mean[peak] >= smooth[peak]*math.Pow(10, thresholdDB/10)) {
		return 0, 0
	}
	var total float64
	for _, v := range mean[1:] {
		total += v * df
	}
	var p, moment float64
	for k := max(1, peak-2); k <= peak+2 && k < len(smooth); k++ {
		e := math.Max(0, mean[k]-smooth[k]) * df
		p += e
		moment += e * float64(k) * df
	}
	if !(p >= subToneShare*total) {
		return 0, 0
	}
	return moment / p, p
}

// suggest builds the suggested spec: a Butterworth high-pass of order 4
// at the highest rumble corner of the channels, then notches at the
// hum's fundamental and its harmonics up to the highest that stands above
// the floor (odd ones only when no even one does), of constant q chosen
// so that each harmonic stays notchDepthDB down over the drift, and
// designs it at the sample rate to check it.
func (s *Surveyor) suggest(sv *Survey) {
	var spec design.Spec
	corner := 0.0
	for _, r := range sv.Rumble {
		if r.Present {
			corner = math.Max(corner, r.CornerHz)
		}
	}
	if corner > 0 {
		spec.Stages = append(spec.Stages, design.Stage{Family: design.Butterworth, Response: design.Highpass, Order: highpassOrder, CutoffHz: design.Edges{corner}})
	} else if len(sv.Rumble) > 0 {
		for _, r := range sv.Rumble {
			if r.ExcessDB >= s.o.ThresholdDB {
				sv.Notes = append(sv.Notes, fmt.Sprintf("channel %d: rumble below %g Hz stands %.1f dB over the floor, but a high-pass there would cut the wanted content", r.Channel, r.BelowHz, r.ExcessDB))
			}
		}
	}
	if h := sv.Hum; h != nil {
		st, note := notchStage(h)
		spec.Stages = append(spec.Stages, st)
		if note != "" {
			sv.Notes = append(sv.Notes, note)
		}
	}
	if len(spec.Stages) == 0 {
		return
	}
	if _, err := design.Design(spec, s.o.SampleRate); err != nil {
		sv.SpecError = err.Error()
		return
	}
	sv.Spec = &spec
}

// notchStage returns the notch stage for h. The hum at harmonic k lies
// within k (f0 +- d), where d is half the range of the track widened by
// half the largest step between neighbouring blocks (for a linear drift
// that is exactly half its true range, which the block means underread),
// plus notchMarginHz. A constant q keeps every harmonic notchDepthDB
// down over that range: q = f0 / (2 d sqrt(10^(depth/10) - 1)), at most
// f0 / notchMinWidthHz and at least notchMinQ.
func notchStage(h *Hum) (design.Stage, string) {
	step := 0.0
	for i := 1; i < len(h.Track); i++ {
		step = math.Max(step, math.Abs(h.Track[i].FundamentalHz-h.Track[i-1].FundamentalHz))
	}
	d := h.DriftHz/2 + step/2 + notchMarginHz
	q := h.FundamentalHz / (2 * d * math.Sqrt(math.Pow(10, notchDepthDB/10)-1))
	q = math.Min(q, h.FundamentalHz/notchMinWidthHz)
	note := ""
	if q < notchMinQ {
		note = fmt.Sprintf("the hum drifts %.3f Hz: notches of q %g cannot follow it; consider tracking the hum instead (apply --track, or \"tracking\": true on the notch stage)", h.DriftHz, notchMinQ)
		q = notchMinQ
	}
	q = math.Floor(q*10) / 10 // rounded down: wider, never narrower
	highest := h.Harmonics[len(h.Harmonics)-1].Number
	return design.Stage{
		Family:        design.Notch,
		FundamentalHz: math.Round(h.FundamentalHz*1000) / 1000,
		Q:             q,
		Harmonics:     highest,
		OddOnly:       h.OddOnly,
	}, note
}
