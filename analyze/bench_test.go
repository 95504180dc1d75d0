package analyze

import (
	"math/rand/v2"
	"sync"
	"testing"
)

// benchStereo is 10 minutes of 48 kHz stereo noise, made once: the same size
// as testdata/analyze/bench_welch.py feeds scipy.signal.welch.
var benchStereo = sync.OnceValue(func() [][]float64 {
	const n = 10 * 60 * 48000
	r := rand.New(rand.NewPCG(1, 2))
	ch := make([][]float64, 2)
	for c := range ch {
		ch[c] = make([]float64, n)
		for i := range ch[c] {
			ch[c][i] = r.NormFloat64()
		}
	}
	return ch
})

// BenchmarkWelch10MinStereo times the PSD of both channels with the options
// of scipy.signal.welch(x, fs=48000, nperseg=8192) (periodic Hann, 50%
// overlap, mean removed, density, mean averaging).
func BenchmarkWelch10MinStereo(b *testing.B) {
	benchWelch(b, DefaultOptions(48000))
}

// BenchmarkWelch10MinStereoOneWorker is the same on one goroutine.
func BenchmarkWelch10MinStereoOneWorker(b *testing.B) {
	o := DefaultOptions(48000)
	o.Workers = 1
	benchWelch(b, o)
}

func benchWelch(b *testing.B, o Options) {
	x := benchStereo()
	e := mustEstimator(b, o)
	dst := make([][]float64, len(x))
	for c := range dst {
		dst[c] = make([]float64, e.Bins())
	}
	b.SetBytes(int64(8 * len(x) * len(x[0])))
	b.ResetTimer()
	for b.Loop() {
		for c := range x {
			if _, err := e.PSD(dst[c], x[c]); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// BenchmarkSegment8192 times one segment's detrend, window, transform and
// unpack with this package's FFT, and BenchmarkGonumSegment8192 the same
// with gonum's fourier.FFT, for the figures in doc.go.
func BenchmarkSegment8192(b *testing.B) {
	benchSegment(b, DefaultOptions(48000))
}

func BenchmarkGonumSegment8192(b *testing.B) {
	e := mustEstimator(b, DefaultOptions(48000))
	e.fft = nil // force the gonum path
	wk := e.work[0]
	wk.seg = make([]float64, e.n)
	wk.gfft = newGonumFFT(e.n)
	x := whiteNoise(1, e.n, 1)
	for b.Loop() {
		e.transform(wk, wk.x, x)
	}
}

func benchSegment(b *testing.B, o Options) {
	e := mustEstimator(b, o)
	wk := e.work[0]
	x := whiteNoise(1, e.n, 1)
	for b.Loop() {
		e.transform(wk, wk.x, x)
	}
}
