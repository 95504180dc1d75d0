package analyze_test

import (
	"fmt"
	"math"

	"github.com/wavsieve/wavsieve/analyze"
)

// A sinusoid of amplitude 0.5 at 1 kHz over a small noise floor: its level is
// 10 log10(0.5^2/2) = -9.03 dBFS.
func ExampleEstimator_Tone() {
	const fs = 48000.0
	x := make([]float64, 48000)
	seed := uint32(1)
	for i := range x {
		seed = seed*1664525 + 1013904223 // a small deterministic dither
		x[i] = 0.5*math.Sin(2*math.Pi*1000*float64(i)/fs) + 1e-4*(float64(seed)/(1<<32)-0.5)
	}
	o := analyze.DefaultOptions(fs)
	o.Window = analyze.Window{Kind: analyze.BlackmanHarris}
	e, err := analyze.NewEstimator(o)
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := e.PSD(nil, x)
	if err != nil {
		fmt.Println(err)
		return
	}
	tone, err := e.Tone(p, 1000)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.1f Hz at %.2f dBFS\n", tone.FrequencyHz, tone.LevelDB)
	// Output:
	// 1000.0 Hz at -9.03 dBFS
}

// The transfer estimate of a two-tap averager y[t] = (x[t] + x[t-1])/2, whose
// gain at f is |cos(pi f/fs)|: -3.01 dB at fs/4. The gain is a definition:
// H(e^jw) = (1 + e^-jw)/2 = e^-jw/2 cos(w/2), and 20 log10 cos(pi/4) =
// 10 log10(1/2) = -3.0103 dB.
func ExampleTransfer_At() {
	const fs = 8000.0
	x := make([]float64, 1<<16)
	seed := uint32(7)
	for i := range x {
		seed = seed*1664525 + 1013904223
		x[i] = float64(seed)/(1<<32) - 0.5
	}
	y := make([]float64, len(x))
	for i := 1; i < len(x); i++ {
		y[i] = (x[i] + x[i-1]) / 2
	}
	o := analyze.DefaultOptions(fs)
	o.Segment, o.Overlap = 1024, 512
	e, err := analyze.NewEstimator(o)
	if err != nil {
		fmt.Println(err)
		return
	}
	tr, err := e.Transfer(x, y)
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := tr.At(2000, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.0f Hz: %.2f dB, coherence %.3f\n", p.FrequencyHz, p.GainDB, p.Coherence)
	// Output:
	// 2000 Hz: -3.01 dB, coherence 1.000
}

// Options are checked when the estimator is made.
func ExampleNewEstimator() {
	o := analyze.DefaultOptions(44100)
	o.Overlap = o.Segment
	_, err := analyze.NewEstimator(o)
	fmt.Println(err)
	_, err = analyze.ParseWindow("triangle")
	fmt.Println(err)
	// Output:
	// analyze: invalid option: overlap 8192 not below segment 8192
	// analyze: unsupported window "triangle" (known: hann, hamming, blackman-harris, flat-top, kaiser:BETA, rectangular)
}

// Spectra of two channels, ready to be written as JSON.
func ExampleEstimator_Spectra() {
	left := make([]float64, 4096)
	right := make([]float64, 4096)
	for i := range left {
		left[i] = math.Sin(2 * math.Pi * 0.1 * float64(i))
		right[i] = 0.5 * math.Cos(2*math.Pi*0.2*float64(i))
	}
	e, err := analyze.NewEstimator(analyze.Options{SampleRate: 1000, Segment: 256, Overlap: 128})
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := e.Spectra([][]float64{left, right})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Window, r.Scaling, r.Units, len(r.Frequencies), len(r.Channels), r.Segments)
	// The Hann window's equivalent noise bandwidth is 1.50 bins: Harris,
	// "On the use of windows for harmonic analysis with the discrete
	// Fourier transform", Proc. IEEE 66(1), 1978, Table 1 (quoted from
	// memory); it also follows from the definition N sum w^2 / (sum w)^2
	// with w = sin^2, whose sums are 3N/8 and N/2. 1.5 x 8000/2048 Hz.
	fmt.Printf("enbw %.2f bins = %.3f Hz\n", r.ENBWBins, r.ENBWHz)
	// Output:
	// hann density FS^2/Hz 129 2 31
	// enbw 1.50 bins = 5.859 Hz
}
