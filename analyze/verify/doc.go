// Package verify proves what a filtering run did: it reads the transfer
// from a run's input to its output at exactly the frequencies the spec (or
// a standard's tolerance mask) names, with a confidence interval, and
// judges each reading against the design and the limits without ever
// claiming more than the data shows.
//
// # Checks
//
// Points lists the checks of a designed filter: every passband_hz,
// stopband_hz and cutoff_hz value of each stage at exactly that frequency,
// points inside the bands, every notch centre and the -3 dB points of each
// notch, and for a stage that carries a tolerance mask (design.MaskPoint)
// one check per mask row. A check has a kind (KindPassbandEdge, ...); the
// run's verdict counts the decisive kinds (edges, cutoffs, notches, mask
// rows): RunVerdict is "pass" only when every decisive check was measured
// and passed, "fail" when any check failed, and "inconclusive" otherwise.
//
// # Readings
//
// A Session is fed a run's input and output frames in order (from files,
// from a probe, or from inside apply through an Observer) and reads, for
// each check, the cross and auto spectra at the check's exact frequency: a
// single-frequency DFT of each Blackman-Harris windowed segment, averaged
// over half-overlapped segments (Welch's method evaluated at one
// frequency). The segment length is chosen per check, so that the designed
// response changes by less than ResolutionDB across the window's main
// lobe; the interval of each reading (H1 confidence region, Bendat &
// Piersol) is widened by that change, so that it covers the response at
// the check's exact frequency.
//
// # Honest floors
//
// A check is unmeasurable, with the reason and the level, where the
// input's level at the frequency is at its own quantisation floor, where
// the output expected at the level that decides the check lies below the
// output's quantisation or dither floor, where the energy reaching the
// check through the window's whole response comes mostly from elsewhere
// (sidelobe leakage of a strong band into an empty region), where the
// coherence is too low to read down to the level that decides, or where
// the recording is too short for the resolution the check needs.
//
// # Probes
//
// ToneProbe measures the processing chain (design at the rate, zero-phase
// with its padding, output encoding and dither: exactly what apply does)
// with steady tones, one at each check frequency, skipping the transients;
// NoiseProbe does the same with white noise. A measurement is of the given
// files or chain, not a calibrated certification.
package verify
