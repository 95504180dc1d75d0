package analyze

import (
	"encoding/json"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// Tolerances of the survey tests.
const (
	// humTolHz is the accuracy asked of the fundamental (the survey's
	// requirement: better than 0.05 Hz).
	humTolHz = 0.05
	// trackTolHz bounds the error of one block's fundamental on the clean
	// synthetic signals below: a tenth of humTolHz, so that the drift,
	// a difference of two blocks, is good to about 0.01 Hz.
	trackTolHz = 0.005
	// levelTolDB bounds a harmonic's level against the amplitude it was
	// made with: the Hann lobe sum reads a steady tone's power exactly
	// (Tone's doc), and the floor under it is 30 dB or more down.
	levelTolDB = 0.5
)

// synth describes a constructed test signal.
type synth struct {
	rate     float64
	seconds  float64
	f0Start  float64 // fundamental at the start, Hz
	f0End    float64 // and at the end (linear drift)
	amps     map[int]float64
	noiseRMS float64 // white Gaussian floor
	rumble   float64 // RMS of low-passed noise, 0 for none
	rumbleFc float64
	dc       float64
	seed     uint64
}

// render returns the signal, one channel. The hum's phase is the integral
// of its frequency, so a drifting fundamental stays a clean comb.
func (s synth) render() []float64 {
	n := int(s.rate * s.seconds)
	x := make([]float64, n)
	rng := rand.New(rand.NewPCG(s.seed, 7))
	for k, a := range s.amps {
		phase := 0.3 * float64(k)
		for i := range x {
			t := float64(i) / s.rate
			// phase(t) = 2 pi k (f0Start t + (f0End - f0Start) t^2 / (2 T))
			ph := 2*math.Pi*float64(k)*(s.f0Start*t+(s.f0End-s.f0Start)*t*t/(2*s.seconds)) + phase
			x[i] += a * math.Sin(ph)
		}
	}
	for i := range x {
		x[i] += s.noiseRMS*rng.NormFloat64() + s.dc
	}
	if s.rumble > 0 {
		r := make([]float64, n)
		for i := range r {
			r[i] = rng.NormFloat64()
		}
		// Two cascaded second-order low-passes (RBJ cookbook biquad,
		// Q = 1/sqrt 2): 24 dB per octave above rumbleFc.
		for range 2 {
			biquadLowpass(r, s.rumbleFc, s.rate)
		}
		var ss float64
		for _, v := range r {
			ss += v * v
		}
		g := s.rumble / math.Sqrt(ss/float64(n))
		for i := range x {
			x[i] += g * r[i]
		}
	}
	return x
}

// biquadLowpass filters x in place with the low-pass of R. Bristow-Johnson's
// "Audio EQ Cookbook" at Q = 1/sqrt 2.
func biquadLowpass(x []float64, fc, rate float64) {
	w := 2 * math.Pi * fc / rate
	alpha := math.Sin(w) / (2 / math.Sqrt2)
	cw := math.Cos(w)
	a0 := 1 + alpha
	b0, b1, b2 := (1-cw)/2/a0, (1-cw)/a0, (1-cw)/2/a0
	a1, a2 := -2*cw/a0, (1-alpha)/a0
	var x1, x2, y1, y2 float64
	for i, v := range x {
		y := b0*v + b1*x1 + b2*x2 - a1*y1 - a2*y2
		x2, x1, y2, y1 = x1, v, y1, y
		x[i] = y
	}
}

func survey(t *testing.T, o SurveyOptions, x []float64, chunk int) *Survey {
	t.Helper()
	s, err := NewSurveyor(o)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(x); i += chunk * o.Channels {
		s.Write(x[i:min(len(x), i+chunk*o.Channels)])
	}
	return s.Result()
}

func dbOf(a float64) float64 { return 20*math.Log10(a) - 10*math.Log10(2) }

func numbers(h *Hum) []int {
	var n []int
	for _, hm := range h.Harmonics {
		n = append(n, hm.Number)
	}
	return n
}

func TestSurveyHum(t *testing.T) {
	// Constructed: 49.97 Hz with odd harmonics at -30, -36, -42 and
	// -48 dBFS amplitude, a -80 dBFS RMS white floor and -30 dBFS RMS of
	// rumble below 8 Hz.
	odd := map[int]float64{1: math.Pow(10, -30.0/20), 3: math.Pow(10, -36.0/20), 5: math.Pow(10, -42.0/20), 7: math.Pow(10, -48.0/20)}
	cases := []struct {
		name       string
		sig        synth
		mains      float64 // 0: auto
		wantMains  float64
		wantHarm   []int
		wantOdd    bool
		wantBlocks int
	}{
		{"odd 49.97 steady", synth{rate: 8000, seconds: 8, f0Start: 49.97, f0End: 49.97, amps: odd, noiseRMS: 1e-4, rumble: 0.03, rumbleFc: 8, seed: 1}, 0, 50, []int{1, 3, 5, 7}, true, 4},
		{"odd 49.97 given mains", synth{rate: 8000, seconds: 8, f0Start: 49.97, f0End: 49.97, amps: odd, noiseRMS: 1e-4, seed: 2}, 50, 50, []int{1, 3, 5, 7}, true, 4},
		{"drift 49.95 to 50.05", synth{rate: 8000, seconds: 8, f0Start: 49.95, f0End: 50.05, amps: odd, noiseRMS: 1e-4, rumble: 0.03, rumbleFc: 8, seed: 3}, 0, 50, []int{1, 3, 5, 7}, true, 4},
		{"60 Hz transformer", synth{rate: 11025, seconds: 6.5, f0Start: 60.02, f0End: 60.02, amps: map[int]float64{1: 0.01, 2: 0.02, 4: 0.002}, noiseRMS: 3e-5, seed: 4}, 0, 60, []int{1, 2, 4}, false, 3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sv := survey(t, SurveyOptions{SampleRate: c.sig.rate, Channels: 1, Frames: int64(c.sig.rate * c.sig.seconds), MainsHz: c.mains}, c.sig.render(), 3000)
			h := sv.Hum
			if h == nil {
				t.Fatal("no hum found")
			}
			if h.MainsHz != c.wantMains {
				t.Errorf("mains %g Hz, want %g", h.MainsHz, c.wantMains)
			}
			mean := (c.sig.f0Start + c.sig.f0End) / 2
			if math.Abs(h.FundamentalHz-mean) > humTolHz {
				t.Errorf("fundamental %.4f Hz, want %.4f within %g", h.FundamentalHz, mean, humTolHz)
			}
			if got := numbers(h); !slices.Equal(got, c.wantHarm) {
				t.Errorf("harmonics %v, want %v", got, c.wantHarm)
			}
			if h.OddOnly != c.wantOdd {
				t.Errorf("odd only %v, want %v", h.OddOnly, c.wantOdd)
			}
			if len(h.Track) != c.wantBlocks {
				t.Fatalf("%d blocks tracked, want %d", len(h.Track), c.wantBlocks)
			}
			// Each block's estimate against the mean frequency over the
			// block: for the linear drift, f0Start + slope * mid-time.
			slope := (c.sig.f0End - c.sig.f0Start) / c.sig.seconds
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, tp := range h.Track {
				want := c.sig.f0Start + slope*(tp.StartS+tp.EndS)/2
				if math.Abs(tp.FundamentalHz-want) > trackTolHz {
					t.Errorf("block %.2f-%.2f s: %.4f Hz, want %.4f within %g", tp.StartS, tp.EndS, tp.FundamentalHz, want, trackTolHz)
				}
				lo, hi = math.Min(lo, want), math.Max(hi, want)
			}
			if math.Abs(h.DriftHz-(hi-lo)) > 2*trackTolHz {
				t.Errorf("drift %.4f Hz, want %.4f within %g", h.DriftHz, hi-lo, 2*trackTolHz)
			}
			for _, hm := range h.Harmonics {
				want := dbOf(c.sig.amps[hm.Number])
				if math.Abs(hm.LevelDB-want) > levelTolDB {
					t.Errorf("harmonic %d: %.2f dBFS, want %.2f within %g", hm.Number, hm.LevelDB, want, levelTolDB)
				}
				if hm.AboveFloorDB < DefaultSurveyThresholdDB {
					t.Errorf("harmonic %d listed at %.1f dB above the floor, under the threshold", hm.Number, hm.AboveFloorDB)
				}
			}
			checkSpec(t, sv, c.sig)
		})
	}
}

// checkSpec checks that the suggested spec survives a JSON round trip
// through design.ParseSpec, designs at the rate, and that its notches
// keep every hum harmonic at least notchDepthDB down over the drift
// the signal was made with.
func checkSpec(t *testing.T, sv *Survey, sig synth) {
	t.Helper()
	if sv.Spec == nil {
		t.Fatalf("no suggested spec (%s)", sv.SpecError)
	}
	b, err := json.Marshal(sv.Spec)
	if err != nil {
		t.Fatal(err)
	}
	spec, err := design.ParseSpec(b)
	if err != nil {
		t.Fatalf("suggested spec %s does not parse: %v", b, err)
	}
	if _, err := design.Design(spec, sig.rate); err != nil {
		t.Fatalf("suggested spec %s does not design at %g Hz: %v", b, sig.rate, err)
	}
	notch := spec.Stages[len(spec.Stages)-1]
	if notch.Family != design.Notch {
		t.Fatalf("last stage %s, want a notch", b)
	}
	for _, hm := range sv.Hum.Harmonics {
		for _, f0 := range []float64{sig.f0Start, sig.f0End} {
			hz := float64(hm.Number) * f0
			// Only the notch stage: the high-pass adds attenuation at 50 Hz.
			nf, err := design.Design(design.Spec{Stages: []design.Stage{notch}}, sig.rate)
			if err != nil {
				t.Fatal(err)
			}
			if db := nf.MagnitudeDB(hz); db > -notchDepthDB {
				t.Errorf("spec %s: harmonic %d at %.3f Hz only %.1f dB down", b, hm.Number, hz, -db)
			}
		}
	}
	hasHP := spec.Stages[0].Family == design.Butterworth
	if hasHP != (sig.rumble > 0) {
		t.Errorf("spec %s: high-pass %v, rumble made %v", b, hasHP, sig.rumble > 0)
	}
}

func TestSurveyNoHum(t *testing.T) {
	// Constructed: white noise alone, and with rumble; a 50 Hz tone 6 dB
	// under what the threshold needs is not hum either.
	weak := map[int]float64{1: 1e-3 * math.Pow(10, -12.0/20)}
	for _, c := range []struct {
		name     string
		sig      synth
		wantSpec bool
	}{
		{"noise", synth{rate: 8000, seconds: 5, noiseRMS: 0.01, seed: 5}, false},
		{"noise and rumble", synth{rate: 8000, seconds: 5, noiseRMS: 1e-4, rumble: 0.05, rumbleFc: 10, seed: 6}, true},
		{"tone under the floor", synth{rate: 8000, seconds: 5, f0Start: 50, f0End: 50, amps: weak, noiseRMS: 0.01, seed: 7}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			sv := survey(t, SurveyOptions{SampleRate: c.sig.rate, Channels: 1, Frames: -1}, c.sig.render(), 1024)
			if sv.Hum != nil {
				t.Errorf("hum %+v found in a signal without one", *sv.Hum)
			}
			if (sv.Spec != nil) != c.wantSpec {
				t.Errorf("spec %+v, want one: %v", sv.Spec, c.wantSpec)
			}
			if c.wantSpec && (len(sv.Spec.Stages) != 1 || sv.Spec.Stages[0].Response != design.Highpass) {
				t.Errorf("spec %+v, want a single high-pass", sv.Spec)
			}
		})
	}
	// The tone of the last case, made 20 dB stronger, is found: the
	// threshold, not the method, kept it out.
	sig := synth{rate: 8000, seconds: 5, f0Start: 50, f0End: 50, amps: map[int]float64{1: weak[1] * 10}, noiseRMS: 0.01, seed: 7}
	if sv := survey(t, SurveyOptions{SampleRate: 8000, Channels: 1, Frames: -1}, sig.render(), 1024); sv.Hum == nil {
		t.Error("a tone 8 dB over the threshold was not found")
	}
}

func TestSurveyRumbleCorner(t *testing.T) {
	// Constructed: rumble from noise low-passed at fc with 24 dB per
	// octave. By the corner rule (1% of the excess above the corner,
	// rounded up to 5 Hz) the corner lies above fc and well below 4 fc,
	// where the rumble is 48 dB down; LowestWantedHz pulls it down to
	// 0.6245 of that frequency.
	for _, fc := range []float64{8, 15, 25} {
		sig := synth{rate: 8000, seconds: 4, noiseRMS: 1e-4, rumble: 0.05, rumbleFc: fc, seed: 8}
		x := sig.render()
		sv := survey(t, SurveyOptions{SampleRate: 8000, Channels: 1, Frames: int64(len(x))}, x, 4096)
		if len(sv.Rumble) != 1 || !sv.Rumble[0].Present {
			t.Fatalf("fc %g: rumble %+v not found", fc, sv.Rumble)
		}
		r := sv.Rumble[0]
		if r.CornerHz <= fc || r.CornerHz >= 4*fc || math.Mod(r.CornerHz, rumbleRoundHz) != 0 {
			t.Errorf("fc %g Hz: corner %g Hz, want a multiple of %g in (fc, 4 fc)", fc, r.CornerHz, rumbleRoundHz)
		}
		wanted := 2 * fc
		sv = survey(t, SurveyOptions{SampleRate: 8000, Channels: 1, Frames: int64(len(x)), LowestWantedHz: wanted}, x, 4096)
		if c := sv.Rumble[0].CornerHz; c > wantedLossFactor*wanted {
			t.Errorf("fc %g Hz, wanted from %g Hz: corner %g Hz", fc, wanted, c)
		} else if f, err := design.Design(*sv.Spec, 8000); err != nil {
			t.Error(err)
		} else if loss := -f.MagnitudeDB(wanted); loss > 0.1+1e-9 {
			t.Errorf("fc %g Hz: the high-pass at %g Hz takes %.3f dB at %g Hz", fc, c, loss, wanted)
		}
	}
}

func TestSurveyStats(t *testing.T) {
	lsb := 1.0 / 32768 // 16-bit PCM
	// Constructed two channels: channel 1 codes with clipped runs of 3 and
	// 1 (32767, 32766 and -32768, -32767 are at or within 1 LSB of the
	// ends; 32765 and -32766 are not), channel 2 a DC of 0.25 plus +-0.5.
	ch1 := []float64{32767, 32766, 32767, 0, 32765, -32768, -32766, -32767, -32767, 100}
	ch2 := []float64{0.75, -0.25, 0.75, -0.25, 0.75, -0.25, 0.75, -0.25, 0.75, -0.25}
	var x []float64
	for i := range ch1 {
		x = append(x, ch1[i]*lsb, ch2[i])
	}
	st := survey(t, SurveyOptions{SampleRate: 8000, Channels: 2, Frames: -1, PCMBits: 16}, x, 3).Stats
	if got := [3]int64{st[0].Clipped, st[0].ClipRuns, st[0].LongestRun}; got != [3]int64{6, 3, 3} {
		t.Errorf("channel 1 clipped, runs, longest = %v, want [6 3 3]", got)
	}
	if st[0].Peak != 1 {
		t.Errorf("channel 1 peak %g, want 1", st[0].Peak)
	}
	if st[1].DCOffset != 0.25 || st[1].Clipped != 0 {
		t.Errorf("channel 2 DC %g, clipped %d; want 0.25 and 0", st[1].DCOffset, st[1].Clipped)
	}
	// RMS of 0.75 and -0.25 alternating: sqrt((0.5625 + 0.0625)/2).
	if want := math.Sqrt(0.3125); math.Abs(st[1].RMS-want) > 1e-15 {
		t.Errorf("channel 2 RMS %g, want %g", st[1].RMS, want)
	}
	// Float: beyond +-1.0 only; a run of 2 and a run of 1.
	fl := []float64{1, 1.0000001, -1.5, -1, 0.5, 2}
	st = survey(t, SurveyOptions{SampleRate: 8000, Channels: 1, Frames: -1}, fl, 4).Stats
	if got := [3]int64{st[0].Clipped, st[0].ClipRuns, st[0].LongestRun}; got != [3]int64{3, 2, 2} {
		t.Errorf("float clipped, runs, longest = %v, want [3 2 2]", got)
	}
	if *st[0].PeakDBFS != 20*math.Log10(2) {
		t.Errorf("float peak %g dBFS, want %g", *st[0].PeakDBFS, 20*math.Log10(2))
	}
}

func TestSurveyChunking(t *testing.T) {
	// The result does not depend on how the frames are written.
	sig := synth{rate: 8000, seconds: 5, f0Start: 50.1, f0End: 50.0, amps: map[int]float64{1: 0.01, 3: 0.005}, noiseRMS: 1e-4, rumble: 0.02, rumbleFc: 10, seed: 9}
	x := sig.render()
	o := SurveyOptions{SampleRate: 8000, Channels: 1, Frames: int64(len(x))}
	a, _ := json.Marshal(survey(t, o, x, 1))
	for _, chunk := range []int{7, 4096, len(x)} {
		if b, _ := json.Marshal(survey(t, o, x, chunk)); string(a) != string(b) {
			t.Errorf("chunk %d: survey differs from frame by frame", chunk)
		}
	}
}

func TestSurveyShortAndErrors(t *testing.T) {
	sv := survey(t, SurveyOptions{SampleRate: 48000, Channels: 1, Frames: 100}, make([]float64, 100), 100)
	if sv.Hum != nil || sv.Spec != nil || len(sv.Notes) == 0 {
		t.Errorf("100 samples: hum %v, spec %v, notes %q; want none, none and a note", sv.Hum, sv.Spec, sv.Notes)
	}
	sv = survey(t, SurveyOptions{SampleRate: 48000, Channels: 2, Frames: 0}, nil, 1)
	if sv.Frames != 0 || sv.Stats[1].RMSDBFS != nil || sv.Stats[0].Peak != 0 {
		t.Errorf("empty signal: %+v", sv.Stats)
	}
	bad := []SurveyOptions{
		{SampleRate: 0, Channels: 1},
		{SampleRate: 8000, Channels: 0},
		{SampleRate: 8000, Channels: 1, MainsHz: 55},
		{SampleRate: 8000, Channels: 1, BlockSeconds: -1},
		{SampleRate: 8000, Channels: 1, SearchHz: 12},
		{SampleRate: 8000, Channels: 1, PCMBits: 1},
		{SampleRate: 8000, Channels: 1, LowestWantedHz: math.NaN()},
		{SampleRate: 8000, Channels: 1, MaxHarmonics: -3},
	}
	for _, o := range bad {
		if _, err := NewSurveyor(o); !errors.Is(err, ErrInvalidOption) {
			t.Errorf("%+v: error %v, want ErrInvalidOption", o, err)
		}
	}
}

func readWAV(t *testing.T, name string) ([]float64, wavio.Format, int64) {
	t.Helper()
	r, err := wavio.Open(name, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	f := r.Format()
	buf := make([]float64, 8192*f.Channels)
	var x []float64
	for {
		n, err := r.ReadFrames(buf)
		x = append(x, buf[:n*f.Channels]...)
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	return x, f, int64(len(x) / f.Channels)
}

func TestSurveyDemoNorth(t *testing.T) {
	// samples/README.md, reedmere-north-48k.wav: hum 49.92 -> 50.06 Hz
	// linear over 6 s; left 50 Hz -36, 100 Hz -42, 150 Hz -33, 250 Hz -37,
	// 350 Hz -41, 450 Hz -47 dBFS amplitude, right 1.5 dB lower; no 200,
	// 300 or 400 Hz; wind rumble with fc 15 Hz; peak -7.6 dBFS.
	x, f, frames := readWAV(t, "../samples/reedmere-north-48k.wav")
	sv := survey(t, SurveyOptions{SampleRate: float64(f.SampleRate), Channels: f.Channels, Frames: frames, PCMBits: f.ValidBits}, x, 8192)
	h := sv.Hum
	if h == nil {
		t.Fatal("no hum found")
	}
	const start, end, seconds = 49.92, 50.06, 6.0
	if math.Abs(h.FundamentalHz-(start+end)/2) > humTolHz {
		t.Errorf("fundamental %.4f Hz, README mean %.4f", h.FundamentalHz, (start+end)/2)
	}
	// Consecutive blocks of B s read a linear drift D as D (T - B)/T.
	want := (end - start) * (seconds - h.BlockS) / seconds
	if math.Abs(h.DriftHz-want) > 2*trackTolHz {
		t.Errorf("drift %.4f Hz, want %.4f (README %.2f Hz over %g s, blocks of %g s)", h.DriftHz, want, end-start, seconds, h.BlockS)
	}
	got := numbers(h)
	for _, k := range []int{1, 2, 3, 5, 7, 9} {
		if !slices.Contains(got, k) {
			t.Errorf("harmonic %d (README) not found: %v", k, got)
		}
	}
	for _, k := range []int{4, 6, 8} {
		if slices.Contains(got, k) {
			t.Errorf("harmonic %d found, not in the README: %v", k, got)
		}
	}
	left := map[int]float64{1: -36, 2: -42, 3: -33, 5: -37, 7: -41}
	for _, hm := range h.Harmonics {
		if a, ok := left[hm.Number]; ok {
			for ch, off := range []float64{0, -1.5} {
				// A sine's power is half its squared peak (a definition):
				// 10 log10(1/2) = -3.01 dB from the amplitude in dBFS.
				if l := hm.ChannelLevels[ch]; l == nil || math.Abs(*l-(a+off-3.01)) > levelTolDB {
					t.Errorf("harmonic %d channel %d: level %v, README %g dBFS amplitude", hm.Number, ch+1, l, a+off)
				}
			}
		}
	}
	peak := math.Max(*sv.Stats[0].PeakDBFS, *sv.Stats[1].PeakDBFS)
	if math.Abs(peak-(-7.6)) > 0.05 { // the README rounds to 0.1 dB
		t.Errorf("peak %.2f dBFS, README -7.6", peak)
	}
	if len(sv.Rumble) != 2 || !sv.Rumble[0].Present || sv.Rumble[0].CornerHz <= 15 {
		t.Errorf("rumble %+v: want it found, corner above the README's 15 Hz", sv.Rumble)
	}
	checkSpec(t, sv, synth{rate: 48000, f0Start: start, f0End: end, rumble: 1})
}

func TestSurveySubAudioTone(t *testing.T) {
	// Constructed: a steady 3 Hz tone of power -16 dBFS (amplitude
	// sqrt(2) 10^(-16/20): a sine's power is A^2/2, a definition) over a
	// white floor. The running median that measures rumble cannot see it,
	// so it is looked for apart; a tone carrying under 1% of the power is
	// not reported.
	const toneHzTol = 0.25 // half a 0.5 Hz bin of the 2 s blocks
	cases := []struct {
		name     string
		toneDBFS float64
		noiseRMS float64
		want     bool
	}{
		{"strong 3 Hz tone", -16, 0.01, true},
		{"weak 3 Hz tone", -70, 0.01, false},
		{"no tone", math.Inf(-1), 0.01, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sig := synth{rate: 8000, seconds: 8, f0Start: 3, f0End: 3, amps: map[int]float64{1: math.Sqrt2 * math.Pow(10, c.toneDBFS/20)}, noiseRMS: c.noiseRMS, seed: 11}
			x := sig.render()
			sv := survey(t, SurveyOptions{SampleRate: 8000, Channels: 1, Frames: int64(len(x))}, x, 4096)
			if len(sv.Rumble) != 1 {
				t.Fatalf("rumble %+v", sv.Rumble)
			}
			r := sv.Rumble[0]
			if !c.want {
				if r.ToneHz != 0 || r.Present {
					t.Errorf("reported %+v", r)
				}
				return
			}
			if math.Abs(r.ToneHz-3) > toneHzTol || math.Abs(r.ToneDBFS-c.toneDBFS) > levelTolDB {
				t.Errorf("tone %.2f Hz at %.2f dBFS, want 3 Hz at %g dBFS", r.ToneHz, r.ToneDBFS, c.toneDBFS)
			}
			// 3 x 3 Hz = 9 Hz, rounded up to 5 Hz.
			if !r.Present || r.CornerHz != 10 {
				t.Errorf("present %v, corner %g Hz, want a high-pass at 10 Hz", r.Present, r.CornerHz)
			}
			if sv.Spec == nil || sv.Spec.Stages[0].Response != design.Highpass || sv.Spec.Stages[0].CutoffHz[0] != 10 {
				t.Errorf("suggested spec %+v", sv.Spec)
			}
		})
	}
}
