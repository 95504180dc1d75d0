#!/usr/bin/python3
"""Reference magnitudes of the standard weightings for package design.

Writes testdata/design/weighting_refs.json (run from the repository root
with Debian's /usr/bin/python3 and its packaged SciPy/NumPy):

- "iec": the A and C weightings by the closed-form magnitude formulas of
  IEC 61672-1:2013 Annex E (eqs. E.1 and E.6, with f1..f4, A1000, C1000
  as printed there), evaluated with NumPy at log-spaced frequencies.
- "iso": the ISO 8041-1:2017 Table 3 weightings built as analog transfer
  functions (band-limiting high-pass and low-pass, Q = 1/sqrt 2;
  transition; upward step; gain K) with numpy.polymul and evaluated with
  scipy.signal.freqs. The parameters are the ones wavsieve uses (quoted
  in design/weighting_data.go).
- "plain_bilinear": the A weighting's zeros and poles mapped with
  scipy.signal.bilinear_zpk at 48 kHz (no pre-warping), evaluated with
  scipy.signal.freqz_zpk, normalised to the analog value at 1 kHz: the
  response a plain bilinear transform gives.
"""
import json
import numpy as np
import scipy
import scipy.signal as sig

F1, F2, F3, F4 = 20.598997, 107.65265, 737.86223, 12194.217
A1000, C1000 = -2.000, -0.062

FREQS = list(np.geomspace(1.0, 90000.0, 61))


def a_db(f):
    f = np.asarray(f, float)
    r = F4**2 * f**4 / ((f**2 + F1**2) * np.sqrt(f**2 + F2**2) * np.sqrt(f**2 + F3**2) * (f**2 + F4**2))
    return 20 * np.log10(r) - A1000


def c_db(f):
    f = np.asarray(f, float)
    r = F4**2 * f**2 / ((f**2 + F1**2) * (f**2 + F4**2))
    return 20 * np.log10(r) - C1000


ISO = {  # f1, f2, f3, f4, Q4, f5, Q5, f6, Q6, K (None: absent)
    "Wb": (0.4, 100, 16, 16, 0.55, 2.5, 0.9, 4.0, 0.95, 1.024),
    "Wc": (0.4, 100, 8, 8, 0.63, None, None, None, None, 1),
    "Wd": (0.4, 100, 2, 2, 0.63, None, None, None, None, 1),
    "We": (0.4, 100, 1, 1, 0.63, None, None, None, None, 1),
    "Wf": (0.08, 0.63, None, 0.25, 0.86, 0.0625, 0.80, 0.1, 0.80, 1),
    "Wh": (6.310, 1258.9, 15.915, 15.915, 0.64, None, None, None, None, 1),
    "Wj": (0.4, 100, None, None, None, 3.75, 0.91, 5.32, 0.91, 1),
    "Wk": (0.4, 100, 12.5, 12.5, 0.63, 2.37, 0.91, 3.35, 0.91, 1),
    "Wm": (0.7943, 100, 5.684, 5.684, 0.5, None, None, None, None, 1),
}


def iso_ba(p):
    f1, f2, f3, f4, q4, f5, q5, f6, q6, k = p
    w = lambda f: 2 * np.pi * f
    q1 = 1 / np.sqrt(2)
    b, a = np.array([k, 0.0, 0.0]), np.array([1.0, w(f1) / q1, w(f1) ** 2])
    b = np.polymul(b, [w(f2) ** 2])
    a = np.polymul(a, [1.0, w(f2) / q1, w(f2) ** 2])
    if f4:
        num = [w(f4) ** 2 / w(f3), w(f4) ** 2] if f3 else [w(f4) ** 2]
        b = np.polymul(b, num)
        a = np.polymul(a, [1.0, w(f4) / q4, w(f4) ** 2])
    if f5:
        b = np.polymul(b, [1.0, w(f5) / q5, w(f5) ** 2])
        a = np.polymul(a, [1.0, w(f6) / q6, w(f6) ** 2])
    return b, a


def main():
    out = {"generator": "testdata/design/gen_weighting_refs.py",
           "scipy_version": scipy.__version__, "numpy_version": np.__version__,
           "iec": [], "iso": [], "plain_bilinear": []}
    for name, fn in (("A", a_db), ("C", c_db)):
        out["iec"].append({"curve": name, "call": "IEC 61672-1:2013 eq. E.6 (A) / E.1 (C), closed form",
                           "freqs_hz": FREQS, "db": [float(v) for v in fn(FREQS)]})
    for name, p in ISO.items():
        f1, f2 = p[0], p[1]
        fr = list(np.geomspace(f1 / 4, f2 * 4, 41))
        b, a = iso_ba(p)
        _, h = sig.freqs(b, a, worN=2 * np.pi * np.array(fr))
        out["iso"].append({"curve": name, "call": "scipy.signal.freqs(b, a) of the ISO 8041-1 cascade",
                           "freqs_hz": fr, "db": [float(v) for v in 20 * np.log10(np.abs(h))]})
    # Plain bilinear A-weighting at 48 kHz.
    rate = 48000.0
    w = lambda f: 2 * np.pi * f
    z = [0, 0, 0, 0]
    p = [-w(F1), -w(F1), -w(F2), -w(F3), -w(F4), -w(F4)]
    zd, pd, kd = sig.bilinear_zpk(z, p, 1.0, rate)
    fr = [1000.0, 4000.0, 8000.0, 10000.0, 12589.254117941673, 15848.931924611135, 19952.62314968879]
    _, h = sig.freqz_zpk(zd, pd, kd, worN=fr, fs=rate)
    _, h1 = sig.freqz_zpk(zd, pd, kd, worN=[1000.0], fs=rate)
    dbs = 20 * np.log10(np.abs(h)) - 20 * np.log10(np.abs(h1[0])) + a_db(1000.0)
    out["plain_bilinear"].append({"curve": "A", "rate_hz": rate,
                                  "call": "scipy.signal.bilinear_zpk(analog A zpk, fs=48000), freqz_zpk, normalised to the analog value at 1 kHz",
                                  "freqs_hz": fr, "db": [float(v) for v in dbs]})
    with open("testdata/design/weighting_refs.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
