#!/usr/bin/python3
"""Speed and agreement of 'wavsieve bands' against SciPy, side by side.

Workload: a one-third-octave bank from 25 Hz to 20 kHz over 10 minutes of
48 kHz mono (float32 WAV of white noise plus a slow random walk, so the
low bands carry energy too).

SciPy side: scipy.io.wavfile.read, then for every band a Butterworth
band-pass, scipy.signal.butter(N, [f1, f2], 'bandpass', fs=48000,
output='sos') with the order wavsieve found to meet the IEC 61260-1
class 1 mask for that band (3, and 4 close to Nyquist), run over the
whole signal at 48 kHz with scipy.signal.sosfilt, and the mean square of
the output.

wavsieve side: the built command, 'wavsieve bands --fraction 3 --from 25
--to 20000 --json FILE', process start, WAV reading and JSON included.

Each side is timed (wall clock) three times, alternating, and the best
run of each is reported with the largest level difference over the
bands. Run from the repository root:

    /usr/bin/python3 testdata/bands/bench_bands.py [repeats]

Needs Debian's python3-scipy and a Go toolchain.
"""
import json
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
import scipy
from scipy import signal
from scipy.io import wavfile

RATE = 48000
SECONDS = 600
G = 10 ** 0.3


def make_signal(n):
    rng = np.random.default_rng(20261204)
    x = rng.standard_normal(n) * 0.05
    walk = signal.lfilter([0.02], [1, -0.999], rng.standard_normal(n))
    return (x + walk * 0.05).astype(np.float32)


def scipy_bank(path, bands):
    fs, x = wavfile.read(path)
    x = x.astype(np.float64)
    out = []
    for b in bands:
        fm = b["exact_midband_hz"]
        f1, f2 = fm / G ** (1 / 6), fm * G ** (1 / 6)
        sos = signal.butter(b["order"], [f1, f2], btype="bandpass", fs=fs, output="sos")
        y = signal.sosfilt(sos, x)
        out.append(10 * np.log10(np.mean(y * y)))
    return out


def main():
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    with tempfile.TemporaryDirectory() as tmp:
        exe = os.path.join(tmp, "wavsieve")
        subprocess.run(["go", "build", "-o", exe, "./cmd/wavsieve"], cwd=root, check=True)
        wav = os.path.join(tmp, "noise-10min-48k.wav")
        wavfile.write(wav, RATE, make_signal(RATE * SECONDS))
        cmd = [exe, "bands", "--fraction", "3", "--from", "25", "--to", "20000", "--json", wav]
        go_best = sp_best = float("inf")
        doc = None
        sp_levels = None
        for _ in range(repeats):
            t0 = time.perf_counter()
            res = subprocess.run(cmd, check=True, capture_output=True)
            go_best = min(go_best, time.perf_counter() - t0)
            doc = json.loads(res.stdout)
            f = doc["files"][0]
            orders = {b["midband_hz"]: b["order"] for b in f["filters"]}
            bands = [dict(b, order=orders[b["midband_hz"]]) for b in f["channels"][0]["bands"]]
            t0 = time.perf_counter()
            sp_levels = scipy_bank(wav, bands)
            sp_best = min(sp_best, time.perf_counter() - t0)
        f = doc["files"][0]
        go_levels = [b["level_db"] for b in f["channels"][0]["bands"]]
        diffs = [abs(a - b) for a, b in zip(go_levels, sp_levels)]
        worst = int(np.argmax(diffs))
        print(f"workload: {len(go_levels)} third-octave bands "
              f"{f['channels'][0]['bands'][0]['midband_hz']:g} Hz to "
              f"{f['channels'][0]['bands'][-1]['midband_hz']:g} Hz, {SECONDS} s of {RATE} Hz mono float32")
        print(f"orders: {sorted(set(b['order'] for b in f['filters']))}; "
              f"rates the bands ran at: {sorted(set(b['rate_hz'] for b in f['filters']))}")
        print(f"wavsieve bands: {go_best:.2f} s (best of {repeats})")
        print(f"scipy {scipy.__version__} butter+sosfilt per band: {sp_best:.2f} s (best of {repeats})")
        print(f"speed ratio: {sp_best / go_best:.2f}x")
        print(f"largest level difference: {diffs[worst]:.4f} dB "
              f"(band {f['channels'][0]['bands'][worst]['midband_hz']:g} Hz)")
        print(f"uptime: {os.popen('uptime').read().strip()}")


if __name__ == "__main__":
    main()
