#!/usr/bin/python3
"""Reference values for the wavsieve notch and group-delay tests.

Run with Debian's python3-scipy:  /usr/bin/python3 testdata/design/gen_extra_refs.py
Writes testdata/design/scipy_extra.json.

notches: scipy.signal.iirnotch(f0, Q, fs) gives b, a of a second-order notch
  whose -3 dB width is f0/Q; we record b, a and the magnitude on a grid.
group_delay: the group delay of a few designs made with
  scipy.signal.*(..., output='zpk'), as the derivative of the phase
  sum(arg(e^jw - z)) - sum(arg(e^jw - p)) taken numerically by mpmath.diff
  at 40 significant digits (Debian's python3-mpmath), so that the reference
  does not depend on the closed form the Go code uses, nor on the rounding
  of polynomial coefficients (scipy.signal.group_delay on b, a loses
  several digits next to poles close to the unit circle).
"""
import json
import os

import numpy as np
import mpmath
import scipy
import scipy.signal as sig

out = {"generator": "testdata/design/gen_extra_refs.py",
       "scipy_version": scipy.__version__, "numpy_version": np.__version__,
       "notches": [], "group_delay": []}

for f0, q, fs in [(50, 30, 48000), (60, 35, 44100), (50, 10, 8000), (150, 30, 96000),
                  (1000, 2, 16000), (49.7, 50, 37800), (9000, 4, 22050)]:
    b, a = sig.iirnotch(f0, q, fs=fs)
    freqs = sorted(set([f0 * r for r in (0.5, 0.9, 0.98, 0.999, 1.001, 1.02, 1.1, 2)] +
                       list(np.geomspace(1, 0.49 * fs, 40))))
    _, h = sig.freqz(b, a, worN=freqs, fs=fs)
    out["notches"].append({
        "call": f"scipy.signal.iirnotch({f0}, {q}, fs={fs})",
        "f0_hz": f0, "q": q, "rate_hz": fs, "b": list(b), "a": list(a),
        "freqs_hz": freqs, "mag_db": list(20 * np.log10(np.maximum(abs(h), 1e-300)))})

designs = [
    ("ellip(6, 0.5, 60, 3000, 'lowpass', fs=48000)", lambda: sig.ellip(6, 0.5, 60, 3000, 'lowpass', fs=48000, output='zpk'), 48000,
     {"family": "elliptic", "response": "lowpass", "order": 6, "cutoff_hz": [3000], "ripple_db": 0.5, "attenuation_db": 60}),
    ("butter(4, [300, 3400], 'bandpass', fs=16000)", lambda: sig.butter(4, [300, 3400], 'bandpass', fs=16000, output='zpk'), 16000,
     {"family": "butterworth", "response": "bandpass", "order": 4, "cutoff_hz": [300, 3400]}),
    ("bessel(5, 1000, 'lowpass', fs=44100, norm='delay')", lambda: sig.bessel(5, 1000, 'lowpass', fs=44100, norm='delay', output='zpk'), 44100,
     {"family": "bessel", "response": "lowpass", "order": 5, "cutoff_hz": [1000], "bessel_norm": "delay"}),
    ("cheby1(8, 1, 20, 'highpass', fs=96000)", lambda: sig.cheby1(8, 1, 20, 'highpass', fs=96000, output='zpk'), 96000,
     {"family": "chebyshev1", "response": "highpass", "order": 8, "cutoff_hz": [20], "ripple_db": 1}),
]
for name, make, fs, spec in designs:
    z, p, k = make()
    freqs = list(np.geomspace(fs * 1e-4, 0.45 * fs, 60))
    mpmath.mp.dps = 40
    zs = [mpmath.mpc(complex(v)) for v in z]
    ps = [mpmath.mpc(complex(v)) for v in p]

    def phase(w):
        e = mpmath.expj(w)
        return sum(mpmath.arg(e - v) for v in zs) - sum(mpmath.arg(e - v) for v in ps)

    gd = [float(-mpmath.diff(phase, mpmath.mpf(2) * mpmath.pi * mpmath.mpf(f) / fs)) for f in freqs]
    out["group_delay"].append({"call": "scipy.signal." + name + " zpk, phase derivative by mpmath.diff " + mpmath.__version__,
                               "rate_hz": fs, "spec": spec, "freqs_hz": freqs, "delay_samples": gd})

here = os.path.dirname(os.path.abspath(__file__))
with open(os.path.join(here, "scipy_extra.json"), "w") as fh:
    json.dump(out, fh, indent=1)
    fh.write("\n")
