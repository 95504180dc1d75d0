// Package plots draws the response of a designed filter and before/after
// spectra as SVG or PNG images, with gonum.org/v1/plot.
//
// # Design plots
//
// Design draws one image of four panels for a design.Filter: the
// effective magnitude in dB (what the signal sees, doubled in dB for a
// zero-phase run) with the spec's forbidden areas shaded, the unwrapped
// phase and the group delay of one pass, all over a logarithmic frequency
// axis, and the poles and zeros on the z-plane.
//
// The forbidden areas are drawn per stage of a tolerance-form spec: below
// -ripple_db over the passband and above -attenuation_db over the
// stopband. The curve is the whole chain, so with several stages the
// other stages' responses are included in it. Order-form stages get a
// vertical line at each cutoff and a marker at each -3 dB point of the
// chain.
//
// # Spectra
//
// Spectrum draws one or two level curves (dB over a logarithmic frequency
// axis), each with an optional confidence band, and for two curves their
// difference (second minus first) in a lower panel. Its input is plain
// slices, so any estimator can feed it.
//
// # Formats and sizes
//
// The format is "svg" or "png". PNG images are rendered at 96 dots per
// inch, so a width of 10 inches gives 960 pixels. Neither function keeps
// the writer or closes it.
package plots
