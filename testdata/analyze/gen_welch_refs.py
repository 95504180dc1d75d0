#!/usr/bin/python3
"""Reference spectra for the analyze package tests.

Run with Debian's interpreter and its python3-scipy / python3-numpy:

    /usr/bin/python3 testdata/analyze/gen_welch_refs.py > testdata/analyze/welch_refs.json

The input signals are made here from fixed seeds and stored in the output, so
the Go tests read exactly the samples SciPy saw. The output records the SciPy,
NumPy and Python versions that produced it.
"""
import json
import platform
import sys

import numpy as np
import scipy
from scipy import signal

N = 800
FS = 1000.0

rng = np.random.default_rng(20240601)
t = np.arange(N) / FS
# x: white noise, a tone, a slow ramp and an offset, so that the detrend
# settings change the result.
x = (rng.standard_normal(N)
     + 0.7 * np.sin(2 * np.pi * 123.4 * t + 0.3)
     + 0.002 * np.arange(N) + 0.25)
# y: x through a 3-tap FIR, plus independent noise.
b = np.array([0.5, 0.3, -0.2])
y = signal.lfilter(b, [1.0], x) + 0.3 * rng.standard_normal(N)

# name, scipy window, nperseg, noverlap, scaling, detrend, average
WELCH = [
    ("hann-64-32-density-constant-mean", "hann", 64, 32, "density", "constant", "mean"),
    ("hann-64-48-spectrum-linear-mean", "hann", 64, 48, "spectrum", "linear", "mean"),
    ("hann-256-128-density-none-mean", "hann", 256, 128, "density", False, "mean"),
    ("hamming-100-25-density-none-mean", "hamming", 100, 25, "density", False, "mean"),
    ("blackmanharris-128-64-density-constant-median", "blackmanharris", 128, 64, "density", "constant", "median"),
    ("flattop-64-0-spectrum-none-median", "flattop", 64, 0, "spectrum", False, "median"),
    ("kaiser8.6-63-20-density-linear-mean", ("kaiser", 8.6), 63, 20, "density", "linear", "mean"),
    ("boxcar-32-16-density-constant-median", "boxcar", 32, 16, "density", "constant", "median"),
    ("hann-8-7-spectrum-linear-median", "hann", 8, 7, "spectrum", "linear", "median"),
]

# name, scipy window, nperseg, noverlap, detrend, average
CROSS = [
    ("hann-64-32-constant-mean", "hann", 64, 32, "constant", "mean"),
    ("hann-128-96-linear-median", "hann", 128, 96, "linear", "median"),
    ("blackmanharris-100-50-none-mean", "blackmanharris", 100, 50, False, "mean"),
]


def wname(w):
    return "%s:%r" % w if isinstance(w, tuple) else w


out = {
    "generator": "testdata/analyze/gen_welch_refs.py",
    "python": platform.python_version(),
    "scipy": scipy.__version__,
    "numpy": np.__version__,
    "sample_rate_hz": FS,
    "x": x.tolist(),
    "y": y.tolist(),
    "welch": [],
    "cross": [],
}
for name, win, nper, nover, scaling, detrend, average in WELCH:
    f, p = signal.welch(x, fs=FS, window=win, nperseg=nper, noverlap=nover,
                        scaling=scaling, detrend=detrend, average=average)
    out["welch"].append({
        "name": name, "window": wname(win), "nperseg": nper, "noverlap": nover,
        "scaling": scaling, "detrend": detrend or "none", "average": average,
        "call": "scipy.signal.welch(x, fs=%g, window=%r, nperseg=%d, noverlap=%d, "
                "scaling=%r, detrend=%r, average=%r)" % (FS, win, nper, nover, scaling, detrend, average),
        "frequencies_hz": f.tolist(), "psd": p.tolist(),
    })
for name, win, nper, nover, detrend, average in CROSS:
    kw = dict(fs=FS, window=win, nperseg=nper, noverlap=nover, detrend=detrend)
    f, pxy = signal.csd(x, y, average=average, **kw)
    _, cxy = signal.coherence(x, y, **kw)
    out["cross"].append({
        "name": name, "window": wname(win), "nperseg": nper, "noverlap": nover,
        "detrend": detrend or "none", "average": average,
        "call": "scipy.signal.csd(x, y, fs=%g, window=%r, nperseg=%d, noverlap=%d, detrend=%r, average=%r); "
                "scipy.signal.coherence with the same arguments except average (mean)"
                % (FS, win, nper, nover, detrend, average),
        "frequencies_hz": f.tolist(),
        "csd_re": pxy.real.tolist(), "csd_im": pxy.imag.tolist(),
        "coherence": cxy.tolist(),
    })
json.dump(out, sys.stdout, indent=None, separators=(",", ":"))
sys.stdout.write("\n")
