// Command generate writes the demo recordings in samples/: synthetic
// recordings from Reedmere marsh, an invented wetland monitoring station,
// and from an invented pump test rig. Every signal is computed here from
// fixed parameters and fixed seeds, so running it again gives the same
// bytes on the same kind of machine (the committed files come from amd64;
// another architecture may round the last bits of the float arithmetic
// differently). Run it from the repository root:
//
//	go run ./samples/generate
//
// Levels are given in dB re full scale (dBFS) as peak amplitudes: a tone
// "at -34 dBFS" has an amplitude of 10^(-34/20) of full scale. Noise
// levels are RMS and say so. No file may peak at or above -1 dBFS; the
// program checks every file, after reading it back, and fails otherwise.
package main

import (
	"bytes"
	"encoding/binary"
	"errors"
	"flag"
	"fmt"
	"io"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// peakLimitDB is the highest peak any file may reach.
const peakLimitDB = -1.0

func main() {
	dir := flag.String("dir", "samples", "output `folder`")
	flag.Parse()
	if err := run(*dir, os.Stderr); err != nil {
		fmt.Fprintln(os.Stderr, "generate:", err)
		os.Exit(1)
	}
}

// recording is one file to write: its format, its planar samples and
// its metadata chunks.
type recording struct {
	name       string
	format     wavio.Format
	ch         [][]float64
	chunks     []wavio.Chunk
	ditherSeed uint64 // for integer output; fixed so that the bytes repeat
}

func run(dir string, log io.Writer) error {
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		return fmt.Errorf("%s: not a folder; run from the repository root or pass -dir", dir)
	}
	recs := []func() (*recording, error){north, south, hydrophone, vibration}
	for _, mk := range recs {
		r, err := mk()
		if err != nil {
			return err
		}
		path := filepath.Join(dir, r.name)
		if err := r.write(path); err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		peak, err := checkFile(path, r.format)
		if err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		fi, err := os.Stat(path)
		if err != nil {
			return err
		}
		fmt.Fprintf(log, "%s: %s, %d frames, peak %.1f dBFS, %d bytes\n",
			path, r.format, len(r.ch[0]), peak, fi.Size())
	}
	return nil
}

// write encodes r through wavio.Create, which writes a temporary file
// and renames it only once it is complete.
func (r *recording) write(path string) error {
	if p := peakDB(r.ch); p >= peakLimitDB {
		return fmt.Errorf("peak %.2f dBFS is not below %.0f dBFS; lower the levels", p, peakLimitDB)
	}
	opts := wavio.WriterOptions{Format: r.format, Chunks: r.chunks}
	if r.format.Encoding == wavio.PCM {
		opts.DitherSeed = r.ditherSeed
	} else {
		opts.NoDither = true
	}
	w, err := wavio.Create(path, opts)
	if err != nil {
		return err
	}
	defer w.Abort()
	const block = 4096
	nch := len(r.ch)
	n := len(r.ch[0])
	buf := make([]float64, block*nch)
	for start := 0; start < n; start += block {
		m := min(block, n-start)
		for i := range m {
			for c := range nch {
				buf[i*nch+c] = r.ch[c][start+i]
			}
		}
		if err := w.WriteFrames(buf[:m*nch]); err != nil {
			return err
		}
	}
	for c, k := range w.Clipped() {
		if k != 0 {
			return fmt.Errorf("channel %d: %d samples clipped", c+1, k)
		}
	}
	return w.Close()
}

// checkFile reads the written file back and checks its format and that
// its peak stays below peakLimitDB. It returns the peak in dBFS.
func checkFile(path string, want wavio.Format) (float64, error) {
	r, err := wavio.Open(path, nil)
	if err != nil {
		return 0, err
	}
	defer r.Close()
	got := r.Format()
	if got.SampleRate != want.SampleRate || got.Channels != want.Channels ||
		got.Bits != want.Bits || got.Encoding != want.Encoding {
		return 0, fmt.Errorf("read back as %s, wrote %s", got, want)
	}
	buf := make([]float64, 4096*got.Channels)
	peak := 0.0
	for {
		n, err := r.ReadFrames(buf)
		for _, v := range buf[:n*got.Channels] {
			peak = math.Max(peak, math.Abs(v))
		}
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return 0, err
		}
	}
	p := 20 * math.Log10(peak)
	if p >= peakLimitDB {
		return p, fmt.Errorf("peak %.2f dBFS read back, not below %.0f dBFS", p, peakLimitDB)
	}
	return p, nil
}

// peakDB is the largest absolute sample over all channels, in dBFS.
func peakDB(ch [][]float64) float64 {
	peak := 0.0
	for _, x := range ch {
		for _, v := range x {
			peak = math.Max(peak, math.Abs(v))
		}
	}
	return 20 * math.Log10(peak)
}

func db(x float64) float64 { return math.Pow(10, x/20) }

func planar(channels, frames int) [][]float64 {
	ch := make([][]float64, channels)
	for i := range ch {
		ch[i] = make([]float64, frames)
	}
	return ch
}

// ---- Random numbers ----

// rng is SplitMix64 (Steele, Lea and Flood, "Fast splittable pseudorandom
// number generators", OOPSLA 2014), written out here so that the sequence
// cannot change with the Go release.
type rng struct{ s uint64 }

func (r *rng) next() uint64 {
	r.s += 0x9e3779b97f4a7c15
	z := r.s
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// uniform returns a number in (0, 1).
func (r *rng) uniform() float64 { return (float64(r.next()>>11) + 0.5) / (1 << 53) }

// normal returns a standard normal number by the Box-Muller transform
// (only the cosine branch, to keep the sequence simple).
func (r *rng) normal() float64 {
	u, v := r.uniform(), r.uniform()
	return math.Sqrt(-2*math.Log(u)) * math.Cos(2*math.Pi*v)
}

// ---- Filters used to shape noise ----

// biquad is a second-order section in transposed direct form II.
type biquad struct{ b0, b1, b2, a1, a2, z1, z2 float64 }

func (f *biquad) step(x float64) float64 {
	y := f.b0*x + f.z1
	f.z1 = f.b1*x - f.a1*y + f.z2
	f.z2 = f.b2*x - f.a2*y
	return y
}

// lowpass2 is the bilinear-transform second-order low-pass with cutoff fc
// and quality factor q (R. Bristow-Johnson, "Cookbook formulae for audio
// EQ biquad filter coefficients").
func lowpass2(fc, q, rate float64) *biquad {
	w := 2 * math.Pi * fc / rate
	alpha := math.Sin(w) / (2 * q)
	c := math.Cos(w)
	a0 := 1 + alpha
	return &biquad{
		b0: (1 - c) / 2 / a0, b1: (1 - c) / a0, b2: (1 - c) / 2 / a0,
		a1: -2 * c / a0, a2: (1 - alpha) / a0,
	}
}

// bandpass2 is the cookbook band-pass with 0 dB peak gain at fc.
func bandpass2(fc, q, rate float64) *biquad {
	w := 2 * math.Pi * fc / rate
	alpha := math.Sin(w) / (2 * q)
	c := math.Cos(w)
	a0 := 1 + alpha
	return &biquad{
		b0: alpha / a0, b1: 0, b2: -alpha / a0,
		a1: -2 * c / a0, a2: (1 - alpha) / a0,
	}
}

// rms returns the root mean square of x.
func rms(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s / float64(len(x)))
}

// scaleTo scales x in place to the given RMS level in dBFS.
func scaleTo(x []float64, rmsDB float64) {
	g := db(rmsDB) / rms(x)
	for i := range x {
		x[i] *= g
	}
}

// ---- Signal components ----

// hum describes mains hum whose fundamental drifts linearly from
// startHz to endHz over the file. levels maps a harmonic number to its
// amplitude in dBFS; phases are fixed per harmonic.
type hum struct {
	startHz, endHz float64
	levels         map[int]float64
}

// add adds the hum to x, scaled by gain dB, with phase offset phi (radians
// at the fundamental).
func (h hum) add(x []float64, rate, gainDB, phi float64) {
	dur := float64(len(x)) / rate
	slope := (h.endHz - h.startHz) / dur
	// Harmonics in increasing order: a map's order varies from run to
	// run, and so would the rounding of the sums.
	for _, k := range slices.Sorted(maps.Keys(h.levels)) {
		a := db(h.levels[k] + gainDB)
		p0 := phi*float64(k) + 0.7*float64(k*k)
		for i := range x {
			t := float64(i) / rate
			// Phase is the integral of the drifting frequency.
			ph := 2 * math.Pi * (h.startHz*t + slope*t*t/2)
			x[i] += a * math.Sin(float64(k)*ph+p0)
		}
	}
}

// rumble returns wind (or water-flow) rumble: white noise through two
// cascaded second-order low-passes at fc (Q 0.707 each, so 24 dB per
// octave above fc), modulated by a gust envelope, and scaled to rmsDB
// RMS. The filters run over two seconds of noise first, so the file
// starts in steady state.
func rumble(frames int, rate, fc, rmsDB float64, seed uint64, gusts []gust) []float64 {
	r := rng{seed}
	f1, f2 := lowpass2(fc, math.Sqrt2/2, rate), lowpass2(fc, math.Sqrt2/2, rate)
	pre := int(2 * rate)
	for range pre {
		f2.step(f1.step(r.normal()))
	}
	x := make([]float64, frames)
	for i := range x {
		t := float64(i) / rate
		x[i] = f2.step(f1.step(r.normal())) * gustEnvelope(t, gusts)
	}
	scaleTo(x, rmsDB)
	return x
}

// gust is one sinusoidal term of a gust envelope.
type gust struct{ hz, depth, phase float64 }

// gustEnvelope is 1 + sum of depth*sin(2 pi hz t + phase), floored at 0.15.
func gustEnvelope(t float64, gusts []gust) float64 {
	e := 1.0
	for _, g := range gusts {
		e += g.depth * math.Sin(2*math.Pi*g.hz*t+g.phase)
	}
	return math.Max(e, 0.15)
}

// whiteNoise returns Gaussian white noise at rmsDB RMS.
func whiteNoise(frames int, rmsDB float64, seed uint64) []float64 {
	r := rng{seed}
	x := make([]float64, frames)
	for i := range x {
		x[i] = r.normal()
	}
	scaleTo(x, rmsDB)
	return x
}

// croak is a pulsed frog call: pulses short tone bursts (Hann windowed,
// pulseMs long, one every periodMs) whose carrier glides linearly from
// startHz to endHz over the call, with a second partial at 1.5 times the
// carrier, 8 dB down. The call envelope rises over the first quarter of
// the pulses and falls over the last. peakDB is the call's own peak.
type croak struct {
	at                float64 // start, s
	startHz, endHz    float64
	pulses            int
	pulseMs, periodMs float64
	peakDB            []float64 // per channel
}

func (c croak) render(rate float64) []float64 {
	period := c.periodMs / 1000
	plen := c.pulseMs / 1000
	n := int((float64(c.pulses-1)*period + plen) * rate)
	y := make([]float64, n+1)
	for p := range c.pulses {
		frac := float64(p) / float64(max(c.pulses-1, 1))
		fc := c.startHz + (c.endHz-c.startHz)*frac
		env := math.Min(1, math.Min(4*(frac+0.1), 4*(1.1-frac)))
		t0 := float64(p) * period
		i0 := int(t0 * rate)
		m := int(plen * rate)
		for i := 0; i <= m && i0+i < len(y); i++ {
			t := float64(i) / rate
			w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(m))
			s := math.Sin(2*math.Pi*fc*t) + db(-8)*math.Sin(2*math.Pi*1.5*fc*t+1)
			y[i0+i] += env * w * s
		}
	}
	return y
}

// chirp is a bird call: count frequency sweeps from startHz to endHz
// (exponential sweep, durMs long, Hann windowed), one every gapMs.
type chirp struct {
	at             float64 // start, s
	startHz, endHz float64
	count          int
	durMs, gapMs   float64
	peakDB         []float64 // per channel
}

func (c chirp) render(rate float64) []float64 {
	d := c.durMs / 1000
	gap := c.gapMs / 1000
	n := int((float64(c.count-1)*gap + d) * rate)
	y := make([]float64, n+1)
	ratio := c.endHz / c.startHz
	m := int(d * rate)
	for k := range c.count {
		i0 := int(float64(k) * gap * rate)
		// Slight rise in level through the phrase.
		amp := 0.8 + 0.2*float64(k)/float64(max(c.count-1, 1))
		for i := 0; i <= m && i0+i < len(y); i++ {
			t := float64(i) / rate
			// Phase of f(t) = f0 * ratio^(t/d): f0 d (ratio^(t/d) - 1) / ln(ratio).
			ph := 2 * math.Pi * c.startHz * d * (math.Pow(ratio, t/d) - 1) / math.Log(ratio)
			w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(m))
			y[i0+i] += amp * w * math.Sin(ph)
		}
	}
	return y
}

// addEvent adds the rendered event y, starting at time at, to every
// channel, scaled so that its own peak in channel c is peaks[c] dBFS.
func addEvent(ch [][]float64, rate, at float64, y []float64, peaks []float64) {
	p := 0.0
	for _, v := range y {
		p = math.Max(p, math.Abs(v))
	}
	i0 := int(at * rate)
	for c := range ch {
		g := db(peaks[c]) / p
		for i, v := range y {
			if i0+i < len(ch[c]) {
				ch[c][i0+i] += g * v
			}
		}
	}
}

func addAll(dst, src []float64, gain float64) {
	for i := range dst {
		dst[i] += gain * src[i]
	}
}

// ---- The recordings ----

// Pump hum heard at the Reedmere recorders: the drainage pump's motor
// gives the 50 Hz fundamental and mostly odd harmonics, its supply
// transformer some 100 Hz.
func northHum() hum {
	return hum{startHz: 49.92, endHz: 50.06, levels: map[int]float64{
		1: -36, 2: -42, 3: -33, 5: -37, 7: -41, 9: -47,
	}}
}

// north is the reed-bed recorder at the north station: stereo, 48 kHz,
// 24-bit, 6 s.
func north() (*recording, error) {
	const rate, secs = 48000.0, 6.0
	n := int(rate * secs)
	ch := planar(2, n)
	h := northHum()
	h.add(ch[0], rate, 0, 0)
	h.add(ch[1], rate, -1.5, 0.4)
	gusts := []gust{{0.23, 0.55, 0.3}, {0.61, 0.3, 2.1}, {1.37, 0.12, 4.0}}
	common := rumble(n, rate, 15, -22, 101, gusts)
	left := rumble(n, rate, 15, -22, 102, gusts)
	right := rumble(n, rate, 15, -22, 103, gusts)
	// Wind is partly common to both capsules: 0.8 common, 0.6 own,
	// which keeps the RMS of each channel at -22 dBFS.
	addAll(ch[0], common, 0.8)
	addAll(ch[0], left, 0.6)
	addAll(ch[1], common, 0.8)
	addAll(ch[1], right, 0.6)
	addAll(ch[0], whiteNoise(n, -72, 104), 1)
	addAll(ch[1], whiteNoise(n, -72, 105), 1)
	for _, c := range northCroaks {
		addEvent(ch, rate, c.at, c.render(rate), c.peakDB)
	}
	for _, c := range northChirps {
		addEvent(ch, rate, c.at, c.render(rate), c.peakDB)
	}
	return &recording{
		name:       "reedmere-north-48k.wav",
		format:     wavio.Format{SampleRate: rate, Channels: 2, Bits: 24, Encoding: wavio.PCM},
		ch:         ch,
		ditherSeed: 48024,
	}, nil
}

var northCroaks = []croak{
	// Frog A: low croak, 480 -> 430 Hz, 16 pulses of 14 ms every 24 ms.
	{at: 0.60, startHz: 480, endHz: 430, pulses: 16, pulseMs: 14, periodMs: 24, peakDB: []float64{-16, -19}},
	{at: 1.90, startHz: 485, endHz: 435, pulses: 14, pulseMs: 14, periodMs: 24, peakDB: []float64{-16, -19}},
	{at: 3.40, startHz: 475, endHz: 430, pulses: 18, pulseMs: 14, periodMs: 24, peakDB: []float64{-17, -20}},
	{at: 4.80, startHz: 480, endHz: 440, pulses: 16, pulseMs: 14, periodMs: 24, peakDB: []float64{-16, -19}},
	// Frog B: higher, 820 -> 760 Hz, 10 pulses of 20 ms every 32 ms.
	{at: 1.20, startHz: 820, endHz: 760, pulses: 10, pulseMs: 20, periodMs: 32, peakDB: []float64{-19, -14}},
	{at: 2.70, startHz: 830, endHz: 770, pulses: 10, pulseMs: 20, periodMs: 32, peakDB: []float64{-19, -14}},
	{at: 5.20, startHz: 810, endHz: 760, pulses: 12, pulseMs: 20, periodMs: 32, peakDB: []float64{-20, -15}},
}

var northChirps = []chirp{
	// Descending phrase, 6 -> 2.5 kHz.
	{at: 2.20, startHz: 6000, endHz: 2500, count: 4, durMs: 90, gapMs: 150, peakDB: []float64{-13, -15}},
	// Ascending phrase, 2.2 -> 5.2 kHz.
	{at: 4.10, startHz: 2200, endHz: 5200, count: 5, durMs: 70, gapMs: 120, peakDB: []float64{-16, -14}},
	// A single long down-sweep near the end.
	{at: 5.55, startHz: 5800, endHz: 3000, count: 1, durMs: 160, gapMs: 0, peakDB: []float64{-15, -17}},
}

// south is the south station's mono recorder: 44.1 kHz, 16-bit, 6 s.
// Closer to the pump, so the hum is stronger; more exposed, so the
// gusts are deeper.
func south() (*recording, error) {
	const rate, secs = 44100.0, 6.0
	n := int(rate * secs)
	ch := planar(1, n)
	h := hum{startHz: 50.04, endHz: 49.95, levels: map[int]float64{
		1: -34, 2: -41, 3: -31, 5: -35, 7: -39, 9: -45,
	}}
	h.add(ch[0], rate, 0, 1.1)
	gusts := []gust{{0.17, 0.7, 1.0}, {0.43, 0.35, 0.2}, {1.1, 0.15, 2.5}}
	addAll(ch[0], rumble(n, rate, 12, -20, 201, gusts), 1)
	addAll(ch[0], whiteNoise(n, -70, 202), 1)
	croaks := []croak{
		{at: 0.35, startHz: 560, endHz: 520, pulses: 20, pulseMs: 10, periodMs: 18, peakDB: []float64{-15}},
		{at: 1.60, startHz: 570, endHz: 525, pulses: 20, pulseMs: 10, periodMs: 18, peakDB: []float64{-15}},
		{at: 2.90, startHz: 660, endHz: 610, pulses: 8, pulseMs: 26, periodMs: 40, peakDB: []float64{-18}},
		{at: 4.25, startHz: 565, endHz: 520, pulses: 22, pulseMs: 10, periodMs: 18, peakDB: []float64{-14}},
	}
	chirps := []chirp{
		{at: 1.05, startHz: 4800, endHz: 2600, count: 3, durMs: 110, gapMs: 180, peakDB: []float64{-17}},
		{at: 3.50, startHz: 3000, endHz: 6000, count: 6, durMs: 50, gapMs: 90, peakDB: []float64{-13}},
		{at: 5.30, startHz: 5500, endHz: 2000, count: 2, durMs: 140, gapMs: 220, peakDB: []float64{-16}},
	}
	for _, c := range croaks {
		addEvent(ch, rate, c.at, c.render(rate), c.peakDB)
	}
	for _, c := range chirps {
		addEvent(ch, rate, c.at, c.render(rate), c.peakDB)
	}
	return &recording{
		name:       "reedmere-south-44k1.wav",
		format:     wavio.Format{SampleRate: rate, Channels: 1, Bits: 16, Encoding: wavio.PCM},
		ch:         ch,
		ditherSeed: 44116,
	}, nil
}

// hydrophone is the hydrophone in the drainage channel by the pump
// house: 96 kHz, 32-bit float, mono, 4 s, with bext and iXML chunks.
// The hum carries well through water and the structure, the frogs
// call close by, the birds are faint, and instead of wind there is
// slow water-flow rumble.
func hydrophone() (*recording, error) {
	const rate, secs = 96000.0, 4.0
	n := int(rate * secs)
	ch := planar(1, n)
	h := hum{startHz: 49.98, endHz: 50.04, levels: map[int]float64{
		1: -31, 2: -40, 3: -34, 5: -39, 7: -45, 9: -50,
	}}
	h.add(ch[0], rate, 0, 2.0)
	gusts := []gust{{0.11, 0.4, 0.5}, {0.29, 0.2, 3.0}}
	addAll(ch[0], rumble(n, rate, 10, -26, 301, gusts), 1)
	addAll(ch[0], whiteNoise(n, -75, 302), 1)
	croaks := []croak{
		{at: 0.40, startHz: 450, endHz: 410, pulses: 24, pulseMs: 12, periodMs: 20, peakDB: []float64{-12}},
		{at: 1.80, startHz: 455, endHz: 410, pulses: 24, pulseMs: 12, periodMs: 20, peakDB: []float64{-12}},
		{at: 3.10, startHz: 880, endHz: 800, pulses: 9, pulseMs: 18, periodMs: 30, peakDB: []float64{-17}},
	}
	chirps := []chirp{
		{at: 2.60, startHz: 5600, endHz: 2800, count: 3, durMs: 100, gapMs: 160, peakDB: []float64{-20}},
	}
	for _, c := range croaks {
		addEvent(ch, rate, c.at, c.render(rate), c.peakDB)
	}
	for _, c := range chirps {
		addEvent(ch, rate, c.at, c.render(rate), c.peakDB)
	}
	f := wavio.Format{SampleRate: rate, Channels: 1, Bits: 32, Encoding: wavio.Float}
	bext, err := bextChunk(bextFields{
		description: "Reedmere marsh (invented), station H1: hydrophone in the drainage channel by the pump house. Synthetic demo recording.",
		originator:  "wavsieve demo generator",
		reference:   "RMH1-20240517-054210",
		date:        "2024-05-17",
		time:        "05:42:10",
		// Samples since midnight: (5*3600 + 42*60 + 10) s at 96 kHz.
		timeReference: (5*3600 + 42*60 + 10) * 96000,
	}, wavio.CodingHistoryLine(f, "wavsieve demo generator (synthetic)"))
	if err != nil {
		return nil, err
	}
	return &recording{
		name:   "reedmere-hydrophone-96k.wav",
		format: f,
		ch:     ch,
		chunks: []wavio.Chunk{
			{ID: "bext", Data: bext},
			{ID: "iXML", Data: []byte(hydrophoneIXML)},
		},
	}, nil
}

// bextFields are the text and time fields of a bext chunk.
type bextFields struct {
	description, originator, reference, date, time string
	timeReference                                  uint64
}

// bextChunk lays out a bext chunk body per EBU Tech 3285: Description
// (256 bytes), Originator (32), OriginatorReference (32),
// OriginationDate (10, yyyy-mm-dd), OriginationTime (8, hh:mm:ss),
// TimeReference (uint64, samples since midnight, little-endian), Version
// (uint16), UMID (64), the five loudness fields (2 bytes each), 180
// reserved bytes, then CodingHistory. Text fields are ASCII padded with
// NULs. Version is 1: the UMID field is meaningful (all zero: none) and
// the ten loudness bytes are reserved and zero, rather than Version 2
// claiming a measured loudness of 0.
func bextChunk(f bextFields, history string) ([]byte, error) {
	var b bytes.Buffer
	text := func(s string, n int) error {
		if len(s) > n {
			return fmt.Errorf("bext field %q is longer than %d bytes", s, n)
		}
		b.WriteString(s)
		b.Write(make([]byte, n-len(s)))
		return nil
	}
	for _, fld := range []struct {
		s string
		n int
	}{
		{f.description, 256}, {f.originator, 32}, {f.reference, 32},
		{f.date, 10}, {f.time, 8},
	} {
		if err := text(fld.s, fld.n); err != nil {
			return nil, err
		}
	}
	binary.Write(&b, binary.LittleEndian, f.timeReference)
	binary.Write(&b, binary.LittleEndian, uint16(1))
	b.Write(make([]byte, 64))  // UMID: none
	b.Write(make([]byte, 10))  // loudness fields: zero
	b.Write(make([]byte, 180)) // reserved
	if b.Len() != 602 {
		return nil, fmt.Errorf("bext layout is %d bytes before CodingHistory, want 602", b.Len())
	}
	return wavio.AppendCodingHistory(b.Bytes(), history)
}

// hydrophoneIXML is a small iXML document for the hydrophone take.
const hydrophoneIXML = `<?xml version="1.0" encoding="UTF-8"?>
<BWFXML>
  <IXML_VERSION>3.01</IXML_VERSION>
  <PROJECT>Reedmere marsh monitoring (invented, synthetic demo)</PROJECT>
  <SCENE>H1 pump-house channel</SCENE>
  <TAKE>7</TAKE>
  <TAPE>RMH1-2024-05</TAPE>
  <CIRCLED>FALSE</CIRCLED>
  <NOTE>Synthetic: 50 Hz pump hum with harmonics, water-flow rumble, frog and bird calls. Written by the wavsieve demo generator.</NOTE>
  <SPEED>
    <FILE_SAMPLE_RATE>96000</FILE_SAMPLE_RATE>
    <AUDIO_BIT_DEPTH>32</AUDIO_BIT_DEPTH>
  </SPEED>
  <TRACK_LIST>
    <TRACK_COUNT>1</TRACK_COUNT>
    <TRACK>
      <CHANNEL_INDEX>1</CHANNEL_INDEX>
      <INTERLEAVE_INDEX>1</INTERLEAVE_INDEX>
      <NAME>HYDRO</NAME>
    </TRACK>
  </TRACK_LIST>
</BWFXML>
`

// accel describes one accelerometer channel of the vibration logger:
// levels in dBFS of the machine tones and the 60 Hz pickup, and of the
// broadband floor and cavitation bursts.
type accel struct {
	shaft, shaft2, vane, vane2 float64 // machine tones
	pickup                     map[int]float64
	floorRMS                   float64
	burstPeak                  float64
}

// Machine tones of the test-rig pump: a four-pole motor on the 60 Hz
// generator set runs at 1767 rpm, 29.45 Hz; twice that is 58.9 Hz, close
// to the pickup; the six-vane impeller gives a vane-pass tone at 176.7
// Hz and its double at 353.4 Hz.
const (
	shaftHz = 29.45
	vanes   = 6
)

// vibration is the logger file from the invented test rig: 12.8 kHz,
// 32-bit float, 4 channels, 5 s. Full scale 1.0 stands for 50 g.
func vibration() (*recording, error) {
	const rate, secs = 12800.0, 5.0
	n := int(rate * secs)
	chans := []accel{
		// 1: motor drive end, radial.
		{shaft: -24, shaft2: -31, vane: -33, vane2: -41, pickup: map[int]float64{1: -34, 2: -42, 3: -40, 5: -46, 7: -50}, floorRMS: -54, burstPeak: -34},
		// 2: motor non-drive end, radial.
		{shaft: -26, shaft2: -33, vane: -36, vane2: -44, pickup: map[int]float64{1: -32, 2: -41, 3: -39, 5: -45, 7: -49}, floorRMS: -55, burstPeak: -36},
		// 3: pump casing, radial: vane pass and cavitation strongest.
		{shaft: -27, shaft2: -34, vane: -28, vane2: -35, pickup: map[int]float64{1: -37, 2: -45, 3: -43, 5: -48, 7: -52}, floorRMS: -50, burstPeak: -24},
		// 4: base frame, axial.
		{shaft: -30, shaft2: -36, vane: -34, vane2: -42, pickup: map[int]float64{1: -36, 2: -44, 3: -42, 5: -47, 7: -51}, floorRMS: -56, burstPeak: -32},
	}
	ch := planar(len(chans), n)
	// The generator set's governor holds 60 Hz within a few hundredths.
	for c, a := range chans {
		x := ch[c]
		phi := 0.9 * float64(c)
		for _, tone := range []struct{ hz, lev float64 }{
			{shaftHz, a.shaft}, {2 * shaftHz, a.shaft2},
			{vanes * shaftHz, a.vane}, {2 * vanes * shaftHz, a.vane2},
		} {
			amp := db(tone.lev)
			for i := range x {
				t := float64(i) / rate
				x[i] += amp * math.Sin(2*math.Pi*tone.hz*t+phi+tone.hz/17)
			}
		}
		hum{startHz: 59.97, endHz: 60.02, levels: a.pickup}.add(x, rate, 0, 0.5+phi)
		// Broadband floor: white noise through a 2.5 kHz low-pass
		// (the sensors' mounted response), then scaled.
		r := rng{uint64(401 + c)}
		lp := lowpass2(2500, math.Sqrt2/2, rate)
		fl := make([]float64, n)
		for i := range fl {
			fl[i] = lp.step(r.normal())
		}
		scaleTo(fl, a.floorRMS)
		addAll(x, fl, 1)
	}
	addBursts(ch, chans, rate)
	return &recording{
		name:   "pumphouse-vibration-12800.wav",
		format: wavio.Format{SampleRate: rate, Channels: len(chans), Bits: 32, Encoding: wavio.Float},
		ch:     ch,
	}, nil
}

// addBursts adds cavitation bursts: short noise impulses at random times
// (about 6 a second, seeded), ringing a 3.15 kHz structural resonance
// (Q 20). Each channel gets the same bursts at its own level.
func addBursts(ch [][]float64, chans []accel, rate float64) {
	n := len(ch[0])
	r := rng{499}
	drive := make([]float64, n)
	t := 0.05
	for {
		// Exponential gaps: a Poisson process of 6 bursts a second.
		t += -math.Log(r.uniform()) / 6
		i0 := int(t * rate)
		if i0+64 >= n {
			break
		}
		a := 0.5 + r.uniform()
		for i := range 8 {
			drive[i0+i] += a * r.normal()
		}
	}
	bp := bandpass2(3150, 20, rate)
	y := make([]float64, n)
	for i := range y {
		y[i] = bp.step(drive[i])
	}
	p := 0.0
	for _, v := range y {
		p = math.Max(p, math.Abs(v))
	}
	for c, a := range chans {
		addAll(ch[c], y, db(a.burstPeak)/p)
	}
}
