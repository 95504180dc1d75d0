package main

// weightingHelp is the text of 'wavsieve help weighting'.
const weightingHelp = `Standard weightings

A weighting stage filters with a curve a standard defines, instead of a
filter of your own choosing:

  A, C, Z             IEC 61672-1:2013 (sound level meters), from the
                      analog definition of its Annex E
  Wb Wc Wd We Wf Wh   ISO 8041-1:2017 Table 3 (human response to
  Wj Wk Wm            vibration): Wk, Wd, Wf, Wc, We, Wj as ISO 2631-1,
                      Wb as ISO 2631-4, Wm as ISO 2631-2, Wh as ISO 5349-1

Give it with --weighting CURVE on design, apply and verify, or as a spec
stage {"family": "weighting", "curve": "A"}. It chains with other stages:
--weighting adds the curve after the stages of --spec or of --family, so
a rumble high-pass then A-weighting is

  wavsieve apply --family butterworth --response highpass --order 2 --cutoff 10 \
      --weighting A --output weighted/ recordings/

How the curve is made at a file's rate: the high-pass factors of the
curve go through the bilinear transform, and the rest is a digital filter
fitted by least squares to the magnitude the curve needs (a plain bilinear
A-weighting at 48 kHz is 2.7 dB low at 12.5 kHz). 'wavsieve design
--weighting A --rate 48000' reports, at that rate, the deviation from the
analog definition, the deviation from the standard's table, and the class
whose acceptance limits the design meets (IEC 61672-1:2013 Table 3, at the
exact frequency of every nominal frequency below 0.45 of the rate);
--plot draws the curve inside the class 1 band. For the ISO curves the
table is the tolerance of ISO 8041-1:2017 Tables 4 and 5 (+12 %/-11 %
in the middle of the band, +26 %/-21 % near its limits, no lower limit
beyond them) around the analog definition, at the exact frequency of
every one-third-octave band of the curve's Annex B table (0.1 to 400 Hz;
Wf 0.02 to 2 Hz; Wh 0.8 Hz to 4 kHz) below 0.45 of the rate. 'wavsieve
verify' checks a weighting at the rows of that table.

At 44.1 kHz and above, A and C stay within 0.01 dB of the analog
definition from 10 Hz to 16 kHz; ISO curves stay within 0.01 dB from
2 f1 to f2/2 at rates from 8 times their upper band limit f2. A and C
meet class 1 at the 20 kHz row at any rate above 39.9 kHz (where that
row lies below the Nyquist frequency). A weighting runs causally only:
--zero-phase would square it, and is refused.

Caution:
` + weightingCaution + `
`
