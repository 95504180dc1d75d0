#!/usr/bin/python3
"""Reference responses for the verification tests (analyze/verify).

Writes verify_refs.json: for each filter below, designed by SciPy from the
same tolerances as the Go test's spec, the SciPy sosfreqz magnitude in dB
at exactly each passband and stopband edge. Run with Debian's python3-scipy:

    /usr/bin/python3 testdata/verify/gen_verify_refs.py
"""
import json
import os

import numpy as np
import scipy
from scipy import signal

CASES = [
    # name, rate, passband edge, stopband edge, ripple dB, attenuation dB
    ("elliptic-lowpass-8k", 8000.0, 1000.0, 1300.0, 0.5, 60.0),
    ("elliptic-highpass-44k1", 44100.0, 2000.0, 1500.0, 0.2, 70.0),
]

out = {"scipy": scipy.__version__, "numpy": np.__version__, "cases": []}
for name, fs, wp, ws, rp, rs in CASES:
    n, wn = signal.ellipord(wp, ws, rp, rs, fs=fs)
    btype = "lowpass" if wp < ws else "highpass"
    sos = signal.ellip(n, rp, rs, wn, btype=btype, output="sos", fs=fs)
    edges = [wp, ws]
    _, h = signal.sosfreqz(sos, worN=np.array(edges), fs=fs)
    out["cases"].append({
        "name": name, "sample_rate_hz": fs, "response": btype,
        "passband_hz": wp, "stopband_hz": ws, "ripple_db": rp, "attenuation_db": rs,
        "order": int(n),
        "edges_hz": edges,
        "sosfreqz_db": [float(20 * np.log10(abs(v))) for v in h],
    })

path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "verify_refs.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
