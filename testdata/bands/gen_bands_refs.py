#!/usr/bin/python3
"""Reference third-octave band levels from SciPy for the band bank's test.

Signal (rebuilt bit for bit by the Go test, analyze/bands_test.go): 240000
samples at 48 kHz of xorshift64* pseudo-noise, u = (state * 2685821657736338717
mod 2^64) >> 11 scaled to [-0.5, 0.5), seed 0x9E3779B97F4A7C15, passed
through y[n] = 0.995 y[n-1] + u[n] (so the low bands carry energy), plus a
sine of amplitude 0.25 at 1000 Hz.

Reference: for every third-octave band from 25 Hz to 16 kHz (IEC 61260-1
base 10: fm = 1000 * 10^(3x/30), edges fm * 10^(+-3/60)), a Butterworth
band-pass scipy.signal.butter(N, [f1, f2], 'bandpass', fs=48000,
output='sos') of the order wavsieve designs (3; 4 for the 12.5 and 16 kHz
bands at 48 kHz), run by scipy.signal.sosfilt over the whole signal at
48 kHz, and 10 log10 of the mean square of its output.

    /usr/bin/python3 testdata/bands/gen_bands_refs.py > testdata/bands/scipy_bands_refs.json
"""
import json

import numpy as np
import scipy
from scipy import signal

RATE = 48000
N = 240000
MASK = (1 << 64) - 1


def make_signal():
    s = 0x9E3779B97F4A7C15
    u = np.empty(N)
    for i in range(N):
        s ^= s >> 12
        s ^= (s << 25) & MASK
        s ^= s >> 27
        v = (s * 2685821657736338717) & MASK
        u[i] = (v >> 11) * 2.0 ** -53 - 0.5
    y = signal.lfilter([1.0], [1.0, -0.995], u)
    n = np.arange(N)
    return y + 0.25 * np.sin(2 * np.pi * 1000 * n / RATE)


def main():
    x = make_signal()
    g = 10 ** 0.3
    bands = []
    for k in range(-16, 13):  # 25 Hz .. 16 kHz
        fm = 1000 * g ** (k / 3)
        f1, f2 = fm * g ** (-1 / 6), fm * g ** (1 / 6)
        order = 4 if fm > 11000 else 3
        sos = signal.butter(order, [f1, f2], btype="bandpass", fs=RATE, output="sos")
        y = signal.sosfilt(sos, x)
        bands.append({"exact_midband_hz": fm, "order": order, "level_db": 10 * np.log10(np.mean(y * y))})
    print(json.dumps({
        "source": "scipy.signal.butter + sosfilt, SciPy " + scipy.__version__ + ", NumPy " + np.__version__,
        "rate_hz": RATE, "samples": N, "overall_db": 10 * np.log10(np.mean(x * x)),
        "first_samples": x[:4].tolist(),
        "bands": bands,
    }, indent=1))


if __name__ == "__main__":
    main()
