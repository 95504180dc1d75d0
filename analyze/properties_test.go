package analyze

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Tolerances of the property tests.
const (
	// parsevalTol: the exact Parseval identities hold to rounding.
	parsevalTol = 1e-12
	// noiseTol: relative error allowed for statistical estimates of white
	// noise power; the estimates below have over 5000 degrees of freedom,
	// whose relative standard deviation is sqrt(2/nu) < 2%, and are averaged
	// over all bins, which brings it far lower.
	noiseTol = 0.01
	// toneTolDB: a sinusoid's power is read within 0.05 dB.
	toneTolDB = 0.05
	// fftTol: agreement of our real FFT with gonum's, relative to the
	// largest coefficient.
	fftTol = 1e-13
	// coverageTol: allowed gap between the empirical coverage of a
	// confidence interval and its level, over some thousands of
	// partially correlated bins.
	coverageTol = 0.03
)

func whiteNoise(seed uint64, n int, sigma float64) []float64 {
	r := rand.New(rand.NewPCG(seed, 7))
	x := make([]float64, n)
	for i := range x {
		x[i] = sigma * r.NormFloat64()
	}
	return x
}

func sine(n int, fs, f, amp, phase float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = amp * math.Sin(2*math.Pi*f*float64(i)/fs+phase)
	}
	return x
}

func mustEstimator(t testing.TB, o Options) *Estimator {
	t.Helper()
	e, err := NewEstimator(o)
	if err != nil {
		t.Fatal(err)
	}
	return e
}

func TestRealFFTMatchesGonum(t *testing.T) {
	for _, n := range []int{4, 8, 16, 32, 64, 512, 2048, 8192, 32768} {
		t.Run(fmt.Sprint("n=", n), func(t *testing.T) {
			f := newRealFFT(n)
			x := whiteNoise(uint64(n), n, 1)
			ones := make([]float64, n)
			for i := range ones {
				ones[i] = 1
			}
			z := make([]complex128, n/2)
			got := make([]complex128, n/2+1)
			f.load(z, x, ones, 0, 0)
			f.transform(z)
			f.unpack(got, z)
			// Expected: gonum dsp/fourier.FFT.Coefficients (FFTPACK rfftf).
			want := fourier.NewFFT(n).Coefficients(nil, x)
			var scale float64
			for _, v := range want {
				scale = math.Max(scale, cmplx.Abs(v))
			}
			for k := range want {
				if d := cmplx.Abs(got[k] - want[k]); d > fftTol*scale {
					t.Fatalf("n=%d bin %d: %v, gonum %v", n, k, got[k], want[k])
				}
			}
		})
	}
}

func TestParseval(t *testing.T) {
	const fs = 8000.0
	x := whiteNoise(3, 20000, 0.3)
	for i := range x {
		x[i] += 0.1 + 2e-5*float64(i) // offset and drift, for the detrend cases
	}
	cases := []struct {
		name string
		opt  Options
	}{
		{"rectangular-none", Options{SampleRate: fs, Segment: 500, Window: Window{Kind: Rectangular}, Detrend: DetrendNone}},
		{"hann-mean-overlap", Options{SampleRate: fs, Segment: 1024, Overlap: 512, Detrend: DetrendMean}},
		{"kaiser-linear", Options{SampleRate: fs, Segment: 777, Overlap: 100, Window: Window{Kind: Kaiser, Beta: 6}, Detrend: DetrendLinear}},
		{"flattop-none-spectrum-off", Options{SampleRate: fs, Segment: 256, Overlap: 200, Window: Window{Kind: FlatTop}, Detrend: DetrendNone}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := mustEstimator(t, c.opt)
			p, err := e.PSD(nil, x)
			if err != nil {
				t.Fatal(err)
			}
			df := fs / float64(c.opt.Segment)
			var got float64
			for _, v := range p {
				got += v * df
			}
			// Expected: Parseval's theorem for the DFT, sum |X[k]|^2 = n sum
			// x[t]^2 (Oppenheim & Schafer, "Discrete-Time Signal
			// Processing", 3rd ed., eq. (8.36), cited from memory), folded
			// to one side: the integrated density is the mean over segments
			// of sum (w d)^2 / sum w^2, d the detrended segment; for the
			// rectangular window that is the mean square.
			w := c.opt.Window.Coefficients(nil, c.opt.Segment)
			var sw2 float64
			for _, v := range w {
				sw2 += v * v
			}
			k := e.Segments(len(x))
			var want float64
			for s := 0; s < k; s++ {
				seg := x[s*e.step : s*e.step+e.n]
				a, b := e.trend(seg)
				for i, v := range seg {
					d := (v - a - b*float64(i)) * w[i]
					want += d * d
				}
			}
			want /= float64(k) * sw2
			if math.Abs(got-want) > parsevalTol*want {
				t.Errorf("integrated density %.15g, Parseval %.15g", got, want)
			}
		})
	}
	t.Run("hann-long-noise-variance", func(t *testing.T) {
		// Expected: the integrated one-sided density of a stationary signal
		// is its variance (Bendat & Piersol, "Random Data", 4th ed., sec.
		// 5.2, cited from memory): here sigma^2 = 0.25.
		const sigma = 0.5
		x := whiteNoise(4, 1<<20, sigma)
		e := mustEstimator(t, Options{SampleRate: fs, Segment: 2048, Overlap: 1024})
		p, _ := e.PSD(nil, x)
		var got float64
		for _, v := range p {
			got += v * fs / 2048
		}
		if math.Abs(got/(sigma*sigma)-1) > noiseTol {
			t.Errorf("integrated density %g, variance %g", got, sigma*sigma)
		}
	})
}

func TestWhiteNoiseDensity(t *testing.T) {
	const fs = 48000.0
	const sigma = 0.1
	x := whiteNoise(5, 1<<20, sigma)
	for _, w := range []Window{{Kind: Hann}, {Kind: BlackmanHarris}, {Kind: FlatTop}, {Kind: Kaiser, Beta: 9}} {
		t.Run(w.String(), func(t *testing.T) {
			e := mustEstimator(t, Options{SampleRate: fs, Segment: 1024, Overlap: 512, Window: w})
			p, _ := e.PSD(nil, x)
			var mean float64
			for _, v := range p[1 : len(p)-1] {
				mean += v
			}
			mean /= float64(len(p) - 2)
			// Expected: white noise of variance s^2 sampled at fs has the
			// two-sided density s^2/fs, one-sided G = 2 s^2/fs (Bendat &
			// Piersol, "Random Data", 4th ed., sec. 5.2.1, G(f) = 2 S(f);
			// cited from memory).
			want := 2 * sigma * sigma / fs
			if math.Abs(mean/want-1) > noiseTol {
				t.Errorf("mean density %g FS^2/Hz, want %g", mean, want)
			}
			// The same noise read with Spectrum scaling is the density times
			// the ENBW in Hz (Harris 1978, eq. (11) and sec. III.B).
			o := e.Options()
			o.Scaling = Spectrum
			ps, _ := mustEstimator(t, o).PSD(nil, x)
			bw := e.ENBW().Hz
			for k := range ps {
				if math.Abs(ps[k]-p[k]*bw) > parsevalTol*ps[k] {
					t.Fatalf("bin %d: spectrum %g, density*enbw %g", k, ps[k], p[k]*bw)
				}
			}
		})
	}
}

func TestSineLevel(t *testing.T) {
	const fs = 48000.0
	const n = 4096
	const amp = 0.5
	// Expected: a sinusoid of amplitude A has power A^2/2 (any signals
	// text, e.g. Oppenheim & Schafer; common practice).
	want := 10 * math.Log10(amp*amp/2)
	for _, frac := range []float64{0, 0.25, 0.5} {
		f := (300 + frac) * fs / n // on a bin, a quarter off, half-way
		x := sine(10*n, fs, f, amp, 0.4)
		t.Run(fmt.Sprintf("offset-%.2f-bin/flat-top-peak", frac), func(t *testing.T) {
			e := mustEstimator(t, Options{SampleRate: fs, Segment: n, Overlap: n / 2, Window: Window{Kind: FlatTop}, Scaling: Spectrum})
			p, _ := e.PSD(nil, x)
			peak := 0.0
			for _, v := range p {
				peak = math.Max(peak, v)
			}
			if got := 10 * math.Log10(peak); math.Abs(got-want) > toneTolDB {
				t.Errorf("offset %.2f bin: peak %.4f dBFS, want %.4f", frac, got, want)
			}
		})
		for _, w := range []Window{{Kind: Hann}, {Kind: Hamming}, {Kind: BlackmanHarris}, {Kind: FlatTop}, {Kind: Kaiser, Beta: 12}} {
			t.Run(fmt.Sprintf("offset-%.2f-bin/integrated-%v", frac, w), func(t *testing.T) {
				noisy := whiteNoise(6, len(x), 1e-3)
				for i := range noisy {
					noisy[i] += x[i]
				}
				e := mustEstimator(t, Options{SampleRate: fs, Segment: n, Overlap: n / 2, Window: w})
				p, _ := e.PSD(nil, noisy)
				tone, err := e.Tone(p, f)
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(tone.LevelDB-want) > toneTolDB {
					t.Errorf("offset %.2f bin: %.4f dBFS, want %.4f", frac, tone.LevelDB, want)
				}
				// Expected floor: 2 s^2/fs with s = 1e-3 (Bendat & Piersol,
				// as in TestWhiteNoiseDensity), read by a median of some
				// 16 bins: within 1.5 dB. Hann's and Hamming's sidelobes
				// (-31 and -43 dB, Harris 1978, Table I) bury a floor 95 dB
				// below the tone, so only the low-sidelobe windows are held
				// to it.
				floor := 10 * math.Log10(2*1e-6/fs)
				lowSidelobes := w.Kind != Hann && w.Kind != Hamming
				if lowSidelobes && math.Abs(tone.FloorDB-floor) > 1.5 {
					t.Errorf("floor %.2f dBFS^2/Hz, want %.2f", tone.FloorDB, floor)
				}
				if math.Abs(tone.FrequencyHz-f) > fs/n/4 {
					t.Errorf("frequency %.3f Hz, want %.3f", tone.FrequencyHz, f)
				}
			})
		}
	}
}

func TestENBWAndOverlapCorrelation(t *testing.T) {
	cases := []struct {
		name     string
		w        Window
		n, ov    int
		enbw     float64 // bins
		enbwTol  float64
		rho1     float64 // correlation at one step
		rho1Tol  float64
		rhoWhere string
	}{
		// Periodic Hann: sum w = n/2, sum w^2 = 3n/8, so ENBW = 1.5 bins
		// exactly; at 50% overlap w[t] w[t+n/2] = sin^2 cos^2 and rho = 1/6
		// exactly (derived; Harris 1978, Table I lists 1.50 and 16.7%).
		{"hann-50", Window{Kind: Hann}, 1024, 512, 1.5, 1e-12, 1.0 / 6, 1e-12, "derived"},
		// Harris 1978, Table I (cited from memory): Hann at 75% overlap
		// 65.9%; 4-term Blackman-Harris ENBW 2.00 bins, 50% overlap 3.8%;
		// printed to three figures.
		{"hann-75", Window{Kind: Hann}, 1024, 768, 1.5, 1e-12, 0.659, 0.0005, "Harris 1978"},
		// Periodic Hamming a - b cos: ENBW (a^2 + b^2/2)/a^2 = 1.36282 bins
		// and rho = (a^2 - b^2/2) / (2 (a^2 + b^2/2)) = 0.233769 at 50%
		// (derived, a = 0.54, b = 0.46; Harris lists 1.36).
		{"hamming-50", Window{Kind: Hamming}, 1024, 512, (0.54*0.54 + 0.46*0.46/2) / (0.54 * 0.54), 1e-12,
			(0.54*0.54 - 0.46*0.46/2) / (2 * (0.54*0.54 + 0.46*0.46/2)), 1e-12, "derived"},
		{"blackman-harris-50", Window{Kind: BlackmanHarris}, 1024, 512, 2.00, 0.005, 0.038, 0.0005, "Harris 1978"},
		// Rectangular: ENBW 1 bin; 50% overlap correlation 1/2 (derived).
		{"rectangular-50", Window{Kind: Rectangular}, 1000, 500, 1, 1e-12, 0.5, 1e-12, "derived"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := mustEstimator(t, Options{SampleRate: 1000, Segment: c.n, Overlap: c.ov, Window: c.w})
			bw := e.ENBW()
			if math.Abs(bw.Bins-c.enbw) > c.enbwTol {
				t.Errorf("ENBW %.6f bins, %s %.4f", bw.Bins, c.rhoWhere, c.enbw)
			}
			if math.Abs(bw.Hz-bw.Bins*1000/float64(c.n)) > 1e-12 {
				t.Errorf("ENBW %g Hz for %g bins", bw.Hz, bw.Bins)
			}
			rho := e.overlapCorrelation()
			if math.Abs(rho[0]-c.rho1) > c.rho1Tol {
				t.Errorf("overlap correlation %.6f, %s %.4f", rho[0], c.rhoWhere, c.rho1)
			}
		})
	}
}

func TestDegreesOfFreedom(t *testing.T) {
	// Without overlap the segments are independent and nu = 2K (Welch
	// 1967; exact). Hann at 50% with K segments: rho(1) = 1/6, rho(m>1) =
	// 0, so nu = 2K / (1 + 2 (1 - 1/K) / 36) (Percival & Walden 1993, eq.
	// (292b), evaluated by hand).
	e := mustEstimator(t, Options{SampleRate: 1, Segment: 64, Overlap: 0})
	if nu, _ := e.DegreesOfFreedom(64 * 10); nu != 20 {
		t.Errorf("no overlap, 10 segments: nu %g, want 20", nu)
	}
	e = mustEstimator(t, Options{SampleRate: 1, Segment: 64, Overlap: 32})
	k := 19.0 // (640 - 64)/32 + 1
	want := 2 * k / (1 + 2*(1-1/k)/36)
	if nu, _ := e.DegreesOfFreedom(640); math.Abs(nu-want) > 1e-12 {
		t.Errorf("hann 50%%: nu %g, want %g", nu, want)
	}
	e = mustEstimator(t, Options{SampleRate: 1, Segment: 64, Average: Median})
	if _, err := e.DegreesOfFreedom(640); !errors.Is(err, ErrUnsupported) {
		t.Errorf("median: error %v, want ErrUnsupported", err)
	}
}

func TestConfidenceCoverage(t *testing.T) {
	// A confidence interval at level L must contain the true density in a
	// fraction L of the bins. True density of white noise: 2 s^2/fs
	// (Bendat & Piersol, as above). At 75% overlap the naive 2K degrees of
	// freedom would be about twice too many and the coverage far too low.
	const fs = 1000.0
	const level = 0.9
	cases := []struct {
		name string
		opt  Options
	}{
		{"hann-75-overlap", Options{SampleRate: fs, Segment: 256, Overlap: 192}},
		{"hann-50-overlap", Options{SampleRate: fs, Segment: 256, Overlap: 128}},
		{"blackman-harris-no-overlap", Options{SampleRate: fs, Segment: 256, Window: Window{Kind: BlackmanHarris}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := mustEstimator(t, c.opt)
			const n = 256 * 8
			iv, err := e.Confidence(n, 10, level)
			if err != nil {
				t.Fatal(err)
			}
			in, total := 0, 0
			p := make([]float64, e.Bins())
			for trial := 0; trial < 40; trial++ {
				x := whiteNoise(uint64(100+trial), n, 1)
				e.PSD(p, x)
				for _, v := range p[1 : len(p)-1] {
					if truth := 2 / fs; iv.Low*v <= truth && truth <= iv.High*v {
						in++
					}
					total++
				}
			}
			if cov := float64(in) / float64(total); math.Abs(cov-level) > coverageTol {
				t.Errorf("coverage %.3f of a %.2f interval (nu %.2f)", cov, level, iv.DOF)
			}
		})
	}
}

// fir applies the causal FIR b to x with zero initial state.
func fir(b, x []float64) []float64 {
	y := make([]float64, len(x))
	for i := range x {
		for j, c := range b {
			if i-j >= 0 {
				y[i] += c * x[i-j]
			}
		}
	}
	return y
}

// firResponse is H(f) = sum_j b_j exp(-2 pi i f j / fs) (Oppenheim &
// Schafer, "Discrete-Time Signal Processing", 3rd ed., eq. (2.132) form of
// the frequency response; common practice).
func firResponse(b []float64, f, fs float64) complex128 {
	var h complex128
	for j, c := range b {
		h += complex(c, 0) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(j)/fs))
	}
	return h
}

func TestTransferOfFIR(t *testing.T) {
	const fs = 48000.0
	// A 5-tap low-pass FIR with zeros near 0.3 fs and 0.4 fs; |H(0)| = 1.
	b := []float64{0.1, 0.25, 0.3, 0.25, 0.1}
	x := whiteNoise(9, 1<<19, 0.3)
	y := fir(b, x)
	const (
		// hAbsTol bounds |H^ - H|. Without output noise the estimate's
		// error is window leakage averaged over some 1000 segments
		// (measured 3e-4 to 7e-4 for these cases).
		hAbsTol = 2e-3
		// cohMin: the coherence of a noise-free linear system is 1 up to
		// that leakage, where |H| > -20 dB.
		cohMin = 0.999
	)
	cases := []struct {
		name string
		opt  Options
		// skip: bins next to DC not checked. Removing a mean or line from
		// each segment of x and of y is not a filter that commutes with H,
		// and changes the bins within about twice the main lobe of DC.
		skip int
	}{
		{"hann-1024-none", Options{SampleRate: fs, Segment: 1024, Overlap: 512, Detrend: DetrendNone}, 0},
		{"hann-1024-mean", Options{SampleRate: fs, Segment: 1024, Overlap: 512}, 4},
		{"blackman-harris-2000-linear", Options{SampleRate: fs, Segment: 2000, Overlap: 500, Window: Window{Kind: BlackmanHarris}, Detrend: DetrendLinear}, 8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := mustEstimator(t, c.opt)
			tr, err := e.Transfer(x, y)
			if err != nil {
				t.Fatal(err)
			}
			checked := 0
			for k := 1 + c.skip; k < e.Bins()-1; k += 3 {
				f := e.Frequency(k)
				want := firResponse(b, f, fs) // analytic response, above
				p, err := tr.At(f, 0.95)
				if err != nil {
					t.Fatal(err)
				}
				if p.Bin != k || p.FrequencyHz != f {
					t.Fatalf("At(%g Hz) used bin %d at %g Hz", f, p.Bin, p.FrequencyHz)
				}
				if d := cmplx.Abs(p.H - want); d > hAbsTol {
					t.Errorf("%.0f Hz: H %v, analytic %v (|diff| %.2g)", f, p.H, want, d)
				}
				if cmplx.Abs(want) > 0.1 && p.Coherence < cohMin {
					t.Errorf("%.0f Hz: coherence %.5f", f, p.Coherence)
				}
				if !(p.GainLowDB <= p.GainDB && p.GainDB <= p.GainHighDB) {
					t.Errorf("%.0f Hz: interval [%g, %g] dB misses the estimate %g", f, p.GainLowDB, p.GainHighDB, p.GainDB)
				}
				checked++
			}
			if checked < 100 {
				t.Fatalf("only %d bins checked", checked)
			}
		})
	}
}

func TestTransferConfidenceCoverage(t *testing.T) {
	// With noise on the output, the true response must lie inside the
	// confidence circle of At in a fraction `level` of the bins (the claim
	// of Bendat & Piersol's region, checked here by simulation).
	const fs = 1000.0
	const level = 0.9
	b := []float64{0.6, -0.3, 0.2}
	e := mustEstimator(t, Options{SampleRate: fs, Segment: 128, Overlap: 64})
	in, total := 0, 0
	for trial := 0; trial < 30; trial++ {
		x := whiteNoise(uint64(200+trial), 128*12, 1)
		y := fir(b, x)
		noise := whiteNoise(uint64(900+trial), len(x), 0.5)
		for i := range y {
			y[i] += noise[i]
		}
		tr, err := e.Transfer(x, y)
		if err != nil {
			t.Fatal(err)
		}
		for k := 1; k < e.Bins()-1; k++ {
			f := e.Frequency(k)
			p, err := tr.At(f, level)
			if err != nil {
				t.Fatal(err)
			}
			h := firResponse(b, f, fs)
			// Inside the circle |H - H^| <= r, r recovered from the gain
			// bound: |H^| + r = 10^(high/20).
			r := math.Pow(10, p.GainHighDB/20) - cmplx.Abs(p.H)
			if cmplx.Abs(h-p.H) <= r {
				in++
			}
			total++
		}
	}
	if cov := float64(in) / float64(total); math.Abs(cov-level) > coverageTol {
		t.Errorf("coverage %.3f of a %.2f region", cov, level)
	}
}
