#!/usr/bin/python3
"""Time scipy.signal.sosfilt and sosfiltfilt on the workload of the Go
benchmarks BenchmarkCascadeEllip8 and BenchmarkZeroPhaseEllip8: the
order-8 elliptic high-pass of engine_refs.json (4 sections) over 10
minutes of 48 kHz stereo, pad 4800 frames. Prints one line per
function: name, best time of the runs in seconds, M section-samples per
second (both passes counted for sosfiltfilt).

    /usr/bin/python3 testdata/engine/bench_engine.py [runs]
"""
import json
import os
import sys
import time

import numpy as np
import scipy
import scipy.signal as sig


def main():
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    here = os.path.dirname(os.path.abspath(__file__))
    with open(os.path.join(here, "engine_refs.json")) as f:
        sos = np.array(json.load(f)["cases"][0]["sections"])
    frames = 10 * 60 * 48000
    t = np.arange(frames) / 48000.0
    x = np.stack([
        0.1 + 0.5 * np.sin(2 * np.pi * 60 * t) + 0.2 * np.sin(2 * np.pi * 3000 * t),
        -0.1 + 0.4 * np.sin(2 * np.pi * 50 * t + 1) + 0.2 * np.sin(2 * np.pi * 7000 * t),
    ])  # (channels, frames), C order: SciPy filters along the last axis
    work = x.size * len(sos)
    print(f"scipy {scipy.__version__} numpy {np.__version__}")
    for name, fn, passes in [
        ("sosfilt", lambda: sig.sosfilt(sos, x, axis=-1), 1),
        ("sosfiltfilt", lambda: sig.sosfiltfilt(sos, x, axis=-1, padtype="odd", padlen=4800), 2),
    ]:
        best = float("inf")
        for _ in range(runs):
            t0 = time.perf_counter()
            fn()
            best = min(best, time.perf_counter() - t0)
        print(f"{name} {best:.4f} {passes * work / best / 1e6:.1f}")


if __name__ == "__main__":
    main()
