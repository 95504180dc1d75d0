// Package analyze measures spectra of float64 signals: Welch power spectral
// densities, cross spectra, H1 transfer estimates with their coherence and
// confidence regions, and tone levels over a local noise floor. It is the
// evidence side of wavsieve: before/after spectra that show a filter's
// stopband attenuated.
//
// # Units
//
// Samples are in units of digital full scale (FS: a sample value of 1.0).
// A density is in FS^2/Hz, a power spectrum and a tone's power in FS^2,
// frequencies in Hz. In decibels this package writes 10 log10 of those:
// dBFS^2/Hz for densities and dBFS for powers, dB re 1 FS^2, so a full-scale
// sinusoid (power 1/2) reads -3.01 dBFS. Gains are 20 log10 |H| in dB.
//
// # Band levels
//
// BandBank splits signals into the octave and fractional-octave bands of
// IEC 61260-1 (class 1 band filters from design.DesignBand), decimating
// by octaves so that the low bands run at low rates, and gives the mean
// square of every band and channel over the whole signal and over
// intervals. Calibration turns mean squares into levels in dB re full
// scale or re the ISO 1683 reference of a physical quantity. Band levels
// from a file are no class 1 instrument reading unless the whole chain is.
//
// # Estimates
//
// An Estimator is made once from Options (sample rate, segment length,
// overlap, window, detrend, scaling, averaging) and reused: it owns every
// buffer, so PSD, CSD, Coherence and Transfer allocate nothing per segment
// (only the result where the caller passes no dst). Spectra computes several
// channels and returns a Result whose JSON form carries sample_rate_hz,
// window, segment, overlap, scaling, units, frequencies_hz and channels.
//
// The estimates follow scipy.signal.welch, csd and coherence with
// boundary=None and padded=False (only whole segments), nfft equal to the
// segment, and return_onesided=True: DC and Nyquist are not doubled. They
// agree with SciPy 1.10.1 to 1e-9 relative in the tests
// (testdata/analyze/welch_refs.json). The cross spectrum is conj(X) Y, so
// H1 = Pxy/Pxx is output over input.
//
// # Windows
//
// All windows are periodic (DFT-even), as spectral estimation uses and as
// scipy.signal.get_window returns: the first n points of the symmetric
// window of length n+1. gonum's dsp/window functions are symmetric and are
// not used. Hann is the default; Hamming, 4-term Blackman-Harris, the 5-term
// flat top (for reading tone levels from a peak), Kaiser with a beta, and
// rectangular are offered. Estimator.ENBW gives the equivalent noise
// bandwidth in bins and in Hz.
//
// # Confidence
//
// Estimator.DegreesOfFreedom gives the equivalent degrees of freedom of a
// mean-averaged estimate with the overlap correction of Welch (1967) in the
// form of Percival & Walden (1993, eq. (292b)); Estimator.Confidence turns
// them into chi-square intervals and Transfer.At into a joint gain and
// phase region for H1 (Bendat & Piersol, "Random Data"). Quantiles come from
// gonum's stat/distuv. Median averaging has no intervals here.
//
// A verifier asks Transfer.At(f, 0.95) for H1 at the bin nearest f: gain in
// dB with its bounds, phase with its half-width, and the coherence.
//
// # Speed
//
// Segments of a power-of-two length go through this package's own real FFT:
// a radix-4 complex transform of half the length on tabulated twiddles with
// the real-input split, whose loading step also removes the trend and
// applies the window. Other lengths use gonum's dsp/fourier.FFT (FFTPACK).
// The two agree to 1e-13 of the largest coefficient in the tests. Each call
// shares the segments of a signal among Options.Workers goroutines (default
// GOMAXPROCS), each with its own buffers.
//
// Measured on the 2-core test machine (Go 1.26, SciPy 1.10.1 with NumPy
// 1.24.2): one 8192-sample segment (detrend, window, transform, unpack)
// 46 us with this FFT against 142 us with gonum's FFT; Welch over 10
// minutes of 48 kHz stereo with 8192-sample segments and 50% overlap
// (BenchmarkWelch10MinStereo) 0.40 s on two goroutines and 0.70 s on one,
// against 1.05 s for scipy.signal.welch on the same-size data, a ratio of
// 2.6. testdata/analyze/bench_welch.sh runs both sides and prints the ratio;
// the machine is shared, so figures vary from run to run.
package analyze
