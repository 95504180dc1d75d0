#!/usr/bin/python3
"""Generate engine_refs.json: SciPy reference outputs for the section
filter engine in package process.

Run with Debian's interpreter (python3-numpy, python3-scipy):

    /usr/bin/python3 testdata/engine/gen_engine_refs.py

Every filter is designed by SciPy and stored as second-order sections
[b0, b1, b2, a0, a1, a2]; the test signal is stored too, so the Go tests
need nothing but this file. Python's json writes floats with repr, which
round-trips float64 exactly.
"""
import json
import os
from fractions import Fraction

import numpy as np
import scipy
import scipy.signal as sig

FS = 48000.0
FRAMES = 1024
CHANNELS = 2


def signal():
    rng = np.random.default_rng(20240611)
    n = np.arange(FRAMES)
    ch0 = (0.5 + 0.8 * np.sin(2 * np.pi * 60 * n / FS)
           + 0.3 * np.sin(2 * np.pi * 3000 * n / FS)
           + 0.05 * rng.standard_normal(FRAMES))
    ch1 = (-0.25 + 0.6 * np.sin(2 * np.pi * 180 * n / FS + 0.3)
           + 0.4 * np.sin(2 * np.pi * 12000 * n / FS)
           + 0.05 * rng.standard_normal(FRAMES))
    return np.stack([ch0, ch1], axis=1)  # (frames, channels): interleaved


def interleave(cols):
    return np.stack(cols, axis=1).reshape(-1).tolist()


def exact_steady_state(sos):
    """The steady state of sosfilt_zi, solved in exact rational arithmetic
    (fractions.Fraction) from the float64 coefficients, rounded once at
    the end, and the exact DC gain prod(sum(b)/sum(a)).

    Same systems as scipy.signal.lfilter_zi, (I - A^T) zi = b[1:] - a[1:]*b0,
    solved by Cramer's rule; the inputs of section k are scaled by the DC
    gain of the sections before it, as in scipy.signal.sosfilt_zi. SciPy
    solves in float64, which for sections with poles and zeros close to
    z = 1 (the 45-55 Hz bandstop at 48 kHz) loses about 12 digits."""
    zi = []
    scale = Fraction(1)
    for row in sos:
        b0, b1, b2, a0, a1, a2 = (Fraction(float(v)) for v in row)
        b0, b1, b2, a1, a2 = b0 / a0, b1 / a0, b2 / a0, a1 / a0, a2 / a0
        r1, r2 = b1 - a1 * b0, b2 - a2 * b0
        det = 1 + a1 + a2
        zi.append([float(scale * (r1 + r2) / det),
                   float(scale * ((1 + a1) * r2 - a2 * r1) / det)])
        scale *= (b0 + b1 + b2) / det
    return np.array(zi), float(scale)


def case(name, call, sos, x, padlen):
    chans = [x[:, c] for c in range(CHANNELS)]
    zi = sig.sosfilt_zi(sos)
    zx, gain = exact_steady_state(sos)
    return {
        "name": name,
        "design": call,
        "sections": sos.tolist(),
        "padlen": padlen,
        "sosfilt": interleave([sig.sosfilt(sos, c) for c in chans]),
        "sosfilt_zi": interleave([sig.sosfilt(sos, c, zi=zi * c[0])[0] for c in chans]),
        "sosfiltfilt_odd": interleave(
            [sig.sosfiltfilt(sos, c, padtype="odd", padlen=padlen) for c in chans]),
        "zi_unit": zi.tolist(),
        "zi_exact": zx.tolist(),
        "dc_gain_exact": gain,
        "sosfilt_zi_exact": interleave([sig.sosfilt(sos, c, zi=zx * c[0])[0] for c in chans]),
    }


def main():
    x = signal()
    cases = []
    designs = [
        ("ellip8_hp100", "scipy.signal.ellip(8, 0.5, 80, 100, 'highpass', fs=48000, output='sos')",
         sig.ellip(8, 0.5, 80, 100, "highpass", fs=FS, output="sos"), 300),
        ("butter4_bs45_55", "scipy.signal.butter(4, [45, 55], 'bandstop', fs=48000, output='sos')",
         sig.butter(4, [45, 55], "bandstop", fs=FS, output="sos"), 500),
        ("cheby1_6_lp2000", "scipy.signal.cheby1(6, 1, 2000, 'lowpass', fs=48000, output='sos')",
         sig.cheby1(6, 1, 2000, "lowpass", fs=FS, output="sos"), 200),
    ]
    for name, call, sos, padlen in designs:
        cases.append(case(name, call, sos, x, padlen))

    b, a = sig.iirnotch(50, 5, fs=8000)
    notch = {
        "design": "scipy.signal.tf2sos(*scipy.signal.iirnotch(50, 5, fs=8000))",
        "fs": 8000.0,
        "sections": sig.tf2sos(b, a).tolist(),
    }

    doc = {
        "generator": "testdata/engine/gen_engine_refs.py",
        "scipy_version": scipy.__version__,
        "numpy_version": np.__version__,
        "fs": FS,
        "channels": CHANNELS,
        "frames": FRAMES,
        "signal": x.reshape(-1).tolist(),
        "cases": cases,
        "notch": notch,
    }
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "engine_refs.json")
    with open(out, "w") as f:
        json.dump(doc, f, separators=(",", ":"))
        f.write("\n")


if __name__ == "__main__":
    main()
