#!/usr/bin/python3
"""Time scipy.signal.welch on 10 minutes of 48 kHz stereo noise.

The data has the size of analyze.BenchmarkWelch10MinStereo (2 x 28 800 000
float64 samples) and the call uses SciPy's defaults there too: periodic Hann,
nperseg 8192, noverlap 4096, detrend 'constant', density, mean. Prints the
best of --repeat runs, in seconds, as "scipy_welch_seconds S" on stdout.

    /usr/bin/python3 testdata/analyze/bench_welch.py [--repeat N]
"""
import argparse
import time

import numpy as np
import scipy
from scipy import signal


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()
    fs = 48000
    x = np.random.default_rng(1).standard_normal((2, 10 * 60 * fs))
    best = float("inf")
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        f, p = signal.welch(x, fs=fs, nperseg=8192)
        best = min(best, time.perf_counter() - t0)
    assert p.shape == (2, 4097)
    print("scipy %s numpy %s" % (scipy.__version__, np.__version__))
    print("scipy_welch_seconds %.3f" % best)


if __name__ == "__main__":
    main()
