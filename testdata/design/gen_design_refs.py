#!/usr/bin/python3
"""Generate scipy_refs.json: reference designs for the wavsieve design package.

Run from the repository root with Debian's Python (python3-scipy, python3-numpy):

    /usr/bin/python3 testdata/design/gen_design_refs.py

Every case is a spec stage in the wavsieve spec-file format (see the design
notes), designed by SciPy at one sample rate. Order-form stages map onto
scipy.signal.butter/cheby1/cheby2/ellip/bessel(..., fs=rate, output='zpk');
tolerance-form stages onto buttord/cheb1ord/cheb2ord/ellipord(..., fs=rate)
followed by the design function with the returned (N, Wn).

Cases SciPy rejects, or whose SciPy result has a pole radius >= 1 - 1e-12,
are left out and listed under "skipped" in the output (and printed), as are
tolerance specs whose minimum order exceeds design.MaxOrder (32).

Skipped with SciPy 1.10.1 (all: minimum order above MaxOrder):
    butter_lp_tol_3000_3600_22050            N = 38
    butter_lp_tol_20000_24000_96000          N = 42
    butter_bp_tol_300_3400_200_4500_96000    N = 35
    butter_lp_tol_3400_3600_16000            N = 66
    butter_hp_tol_200_180_16000              N = 51
No case was rejected by SciPy or had a pole radius >= 1 - 1e-12.
"""

import json
import math
import os
import sys

import numpy as np
import scipy
import scipy.signal as sig
import scipy.special as sp

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "scipy_refs.json")

RATES = [8000, 11025, 16000, 22050, 32000, 37800, 44100, 48000, 50000,
         88200, 96000, 176400, 192000]

FAMILY_FUNC = {
    "butterworth": "butter",
    "chebyshev1": "cheby1",
    "chebyshev2": "cheby2",
    "elliptic": "ellip",
    "bessel": "bessel",
}
ORD_FUNC = {
    "butterworth": "buttord",
    "chebyshev1": "cheb1ord",
    "chebyshev2": "cheb2ord",
    "elliptic": "ellipord",
}
BESSEL_NORM = {"phase": "phase", "delay": "delay", "magnitude": "mag"}
SHORT = {"butterworth": "butter", "chebyshev1": "cheby1", "chebyshev2": "cheby2",
         "elliptic": "ellip", "bessel": "bessel",
         "lowpass": "lp", "highpass": "hp", "bandpass": "bp", "bandstop": "bs"}

POLE_RADIUS_LIMIT = 1 - 1e-12
MAX_ORDER = 32  # design.MaxOrder: larger minimum orders are an error in wavsieve


def fnum(x):
    """A float as it is written in the call strings (shortest repr)."""
    x = float(x)
    if x == int(x) and abs(x) < 1e15:
        return repr(int(x))
    return repr(x)


def wn_str(w):
    w = list(np.atleast_1d(w))
    if len(w) == 1:
        return fnum(w[0])
    return "[" + ", ".join(fnum(v) for v in w) + "]"


def cplx_list(a):
    a = np.atleast_1d(np.asarray(a, dtype=complex))
    pts = sorted(((float(v.real), float(v.imag)) for v in a))
    return [[re, im] for re, im in pts]


def design_args(family, n, wn, btype, rate, ripple, atten, norm):
    """Return (callable, args, kwargs, call string) for the design function."""
    name = FAMILY_FUNC[family]
    func = getattr(sig, name)
    args = [n]
    sargs = [str(n)]
    if family in ("chebyshev1", "elliptic"):
        args.append(ripple)
        sargs.append(fnum(ripple))
    if family in ("chebyshev2", "elliptic"):
        args.append(atten)
        sargs.append(fnum(atten))
    wl = list(np.atleast_1d(wn).astype(float))
    wn_arg = wl[0] if len(wl) == 1 else wl
    args.append(wn_arg)
    sargs.append(wn_str(wl))
    kw = {"btype": btype, "fs": rate, "output": "zpk"}
    s = "scipy.signal.%s(%s, btype=%r, fs=%s, output='zpk'" % (
        name, ", ".join(sargs), btype, fnum(rate))
    if family == "bessel":
        kw["norm"] = BESSEL_NORM[norm]
        s += ", norm=%r" % BESSEL_NORM[norm]
    s += ")"
    return func, args, kw, s


def edges_of(spec):
    e = []
    for key in ("cutoff_hz", "passband_hz", "stopband_hz"):
        if key in spec:
            e.extend(spec[key])
    return e


def freq_grid(rate, edges, extra=()):
    lo = min(1.0, rate / 100000.0)
    hi = 0.499 * rate
    f = list(np.geomspace(lo, hi, 64))
    for e in list(edges) + list(extra):
        for r in (0.9, 0.97, 0.99, 0.999, 1.0, 1.001, 1.01, 1.03, 1.1):
            v = e * r
            if 0 < v < 0.5 * rate:
                f.append(v)
    f = sorted(set(float(v) for v in f))
    return f


class Gen:
    def __init__(self):
        self.cases = []
        self.skipped = []
        self.names = set()

    def _name(self, name):
        base, i = name, 2
        while name in self.names:
            name = "%s_%d" % (base, i)
            i += 1
        self.names.add(name)
        return name

    def _finish(self, name, rate, spec, call, n, wn, z, p, k):
        z = np.atleast_1d(z)
        p = np.atleast_1d(p)
        if len(p) and np.max(np.abs(p)) >= POLE_RADIUS_LIMIT:
            self.skip(name, rate, spec, "pole radius %r" % float(np.max(np.abs(p))))
            return
        freqs = freq_grid(rate, edges_of(spec) + list(np.atleast_1d(wn)))
        _, h = sig.freqz_zpk(z, p, k, worN=np.array(freqs), fs=rate)
        mag = 20 * np.log10(np.maximum(np.abs(h), 1e-300))
        if not np.all(np.isfinite(mag)) or not np.isfinite(k):
            self.skip(name, rate, spec, "non-finite response")
            return
        self.cases.append({
            "name": self._name(name),
            "rate_hz": rate,
            "spec": spec,
            "scipy_call": call,
            "order": int(n),
            "wn_hz": [float(v) for v in np.atleast_1d(wn)],
            "zeros": cplx_list(z),
            "poles": cplx_list(p),
            "gain": float(np.real(k)),
            "freqs_hz": freqs,
            "mag_db": [float(v) for v in mag],
        })

    def skip(self, name, rate, spec, why):
        self.skipped.append({"name": name, "rate_hz": rate, "spec": spec, "reason": why})
        print("skipped %s @ %s: %s" % (name, rate, why), file=sys.stderr)

    def order(self, family, response, n, cutoff, rate, ripple=None, atten=None,
              norm=None, name=None, omit_norm=False):
        cutoff = [float(c) for c in np.atleast_1d(cutoff)]
        spec = {"family": family, "response": response, "order": n,
                "cutoff_hz": cutoff}
        if family in ("chebyshev1", "elliptic"):
            spec["ripple_db"] = float(ripple)
        if family in ("chebyshev2", "elliptic"):
            spec["attenuation_db"] = float(atten)
        if family == "bessel":
            norm = norm or "phase"
            if not omit_norm:
                spec["bessel_norm"] = norm
        if name is None:
            name = "%s_%s_n%d_%s_%s" % (
                SHORT[family], SHORT[response], n,
                "_".join(fnum(c) for c in cutoff), fnum(rate))
            if family == "bessel":
                name = name.replace("bessel_", "bessel%s_" % norm[:3], 1)
        func, args, kw, call = design_args(family, n, cutoff, response, rate,
                                           ripple, atten, norm)
        try:
            z, p, k = func(*args, **kw)
        except Exception as exc:  # SciPy rejects the spec
            self.skip(name, rate, spec, "scipy: %s" % exc)
            return
        self._finish(name, rate, spec, call, n, cutoff, z, p, k)

    def tol(self, family, response, wp, ws, ripple, atten, rate, name=None):
        wp = [float(v) for v in np.atleast_1d(wp)]
        ws = [float(v) for v in np.atleast_1d(ws)]
        spec = {"family": family, "response": response, "passband_hz": wp,
                "stopband_hz": ws, "ripple_db": float(ripple),
                "attenuation_db": float(atten)}
        if name is None:
            name = "%s_%s_tol_%s_%s_%s" % (
                SHORT[family], SHORT[response],
                "_".join(fnum(v) for v in wp), "_".join(fnum(v) for v in ws),
                fnum(rate))
        ordname = ORD_FUNC[family]
        wpa = wp[0] if len(wp) == 1 else wp
        wsa = ws[0] if len(ws) == 1 else ws
        call = "scipy.signal.%s(%s, %s, gpass=%s, gstop=%s, fs=%s)" % (
            ordname, wn_str(wp), wn_str(ws), fnum(ripple), fnum(atten), fnum(rate))
        try:
            n, wn = getattr(sig, ordname)(wpa, wsa, gpass=ripple, gstop=atten, fs=rate)
            n = int(n)
            if n > MAX_ORDER:
                self.skip(name, rate, spec, "minimum order %d > MaxOrder %d" % (n, MAX_ORDER))
                return
            func, args, kw, dcall = design_args(family, n, wn, response, rate,
                                                ripple, atten, None)
            z, p, k = func(*args, **kw)
        except Exception as exc:
            self.skip(name, rate, spec, "scipy: %s" % exc)
            return
        # the design call with N and Wn exactly as the *ord function returned them
        call = call + " -> (N, Wn); " + dcall.replace(
            wn_str(np.atleast_1d(wn)), "Wn", 1).replace("(%d," % n, "(N,", 1)
        self._finish(name, rate, spec, call, n, wn, z, p, k)


def main_cases(g):
    fams = [("butterworth", None), ("chebyshev1", None), ("chebyshev2", None),
            ("elliptic", None), ("bessel", "phase"), ("bessel", "delay"),
            ("bessel", "magnitude")]
    resps = ["lowpass", "highpass", "bandpass", "bandstop"]
    # (rate, order, single-edge fraction, band fractions)
    plan = [
        (44100, 4, 0.0907, (0.02, 0.09)),
        (48000, 5, 0.25, (0.1, 0.2)),
        (8000, 3, 0.125, (0.0375, 0.1)),
        (192000, 6, 0.005, (0.001, 0.01)),
    ]
    ripples = [0.5, 1.0, 0.1, 3.0]
    attens = [40.0, 60.0, 80.0, 50.0]
    i = 0
    for fi, (fam, norm) in enumerate(fams):
        for ri, resp in enumerate(resps):
            for pi, (rate0, n, frac, band) in enumerate(plan):
                # rotate the other rates in so that every rate gets used
                rate = rate0 if (fi + ri + pi) % 3 else RATES[i % len(RATES)]
                i += 1
                if resp in ("lowpass", "highpass"):
                    cut = [round(frac * rate, 1)]
                else:
                    cut = [round(band[0] * rate, 1), round(band[1] * rate, 1)]
                nn = n if resp in ("lowpass", "highpass") else max(2, n - 1)
                g.order(fam, resp, nn, cut, rate,
                        ripple=ripples[(fi + pi) % 4], atten=attens[(ri + pi) % 4],
                        norm=norm)


def tolerance_cases(g):
    fams = ["butterworth", "chebyshev1", "chebyshev2", "elliptic"]
    sets = [
        # rate, lowpass (wp, ws), highpass (wp, ws), bandpass, bandstop
        (48000, (4000, 5000), (1000, 700), ([1000, 3000], [700, 4000]),
         ([900, 3200], [1200, 2500]), 1.0, 50.0),
        (22050, (3000, 3600), (300, 200), ([500, 2000], [350, 2800]),
         ([400, 2500], [700, 1500]), 0.5, 60.0),
        (96000, (20000, 24000), (50, 30), ([300, 3400], [200, 4500]),
         ([40, 80], [55, 65]), 0.1, 80.0),
        (16000, (3400, 3600), (200, 180), ([1000, 1200], [950, 1250]),
         ([100, 600], [150, 500]), 1.0, 40.0),
    ]
    for fam in fams:
        for (rate, lp, hp, bp, bs, rip, att) in sets:
            g.tol(fam, "lowpass", lp[0], lp[1], rip, att, rate)
            g.tol(fam, "highpass", hp[0], hp[1], rip, att, rate)
            g.tol(fam, "bandpass", bp[0], bp[1], rip, att, rate)
            g.tol(fam, "bandstop", bs[0], bs[1], rip, att, rate)
    # Butterworth needs wide transitions to stay below MaxOrder
    for (rate, lp, hp, bp, bs, rip, att) in [
            (44100, (2000, 4000), (500, 250), ([500, 2000], [200, 5000]),
             ([300, 3000], [800, 1200]), 1.0, 40.0),
            (192000, (20000, 40000), (20, 10), ([1000, 10000], [500, 30000]),
             ([1000, 20000], [3000, 6000]), 3.0, 30.0),
            (11025, (1000, 1500), (2000, 1500), ([1000, 2000], [600, 3000]),
             ([500, 3000], [1000, 1500]), 0.5, 60.0)]:
        g.tol("butterworth", "lowpass", lp[0], lp[1], rip, att, rate)
        g.tol("butterworth", "highpass", hp[0], hp[1], rip, att, rate)
        g.tol("butterworth", "bandpass", bp[0], bp[1], rip, att, rate)
        g.tol("butterworth", "bandstop", bs[0], bs[1], rip, att, rate)


def hard_cases(g):
    # 10 Hz high-pass at 192 kHz, order 8
    for fam in ("butterworth", "chebyshev1", "chebyshev2", "elliptic", "bessel"):
        g.order(fam, "highpass", 8, [10], 192000, ripple=0.5, atten=60,
                norm="phase")
    g.order("bessel", "highpass", 8, [10], 192000, norm="delay")
    g.order("butterworth", "highpass", 8, [10], 176400)
    # edges near 0.45 fs
    for rate in (44100, 48000, 8000):
        e = round(0.45 * rate, 1)
        g.order("butterworth", "lowpass", 6, [e], rate)
        g.order("elliptic", "lowpass", 7, [e], rate, ripple=0.1, atten=80)
        g.order("chebyshev2", "highpass", 6, [e], rate, atten=60)
    g.order("chebyshev1", "bandpass", 4, [round(0.3 * 96000), round(0.45 * 96000)],
            96000, ripple=0.5)
    g.tol("elliptic", "lowpass", 0.44 * 48000, 0.46 * 48000, 0.1, 90, 48000)
    # narrow mains-hum band-stops
    for rate in (44100, 48000):
        for band in ([45, 55], [49, 51], [58, 62], [59, 61]):
            for n in (2, 3, 4):
                g.order("butterworth", "bandstop", n, band, rate)
            g.order("chebyshev1", "bandstop", 2, band, rate, ripple=0.5)
            g.order("chebyshev2", "bandstop", 3, band, rate, atten=40)
            g.order("elliptic", "bandstop", 2, band, rate, ripple=0.5, atten=40)
            g.order("elliptic", "bandstop", 4, band, rate, ripple=0.1, atten=60)
        g.order("bessel", "bandstop", 3, [45, 55], rate, norm="magnitude")
    # high orders
    g.order("elliptic", "lowpass", 16, [4000], 48000, ripple=0.1, atten=100)
    g.order("elliptic", "highpass", 16, [200], 44100, ripple=0.5, atten=80)
    g.order("elliptic", "bandpass", 16, [1000, 2000], 48000, ripple=0.5, atten=80)
    for rate in (48000, 44100, 96000):
        g.order("butterworth", "lowpass", 16, [rate / 20], rate)
        g.order("butterworth", "bandstop", 16, [rate / 20 * 0.8, rate / 20 * 1.25], rate)
    g.order("butterworth", "highpass", 16, [1000], 16000)
    g.order("chebyshev1", "lowpass", 16, [3000], 32000, ripple=0.5)
    g.order("chebyshev2", "lowpass", 16, [5000], 22050, atten=120)
    for nm in ("phase", "delay", "magnitude"):
        g.order("bessel", "lowpass", 16, [2000], 48000, norm=nm)
    g.order("bessel", "bandpass", 10, [300, 3000], 48000, norm="delay")
    # low ripple, high attenuation
    g.order("chebyshev1", "lowpass", 8, [5000], 44100, ripple=0.01)
    g.order("elliptic", "lowpass", 10, [5000], 44100, ripple=0.01, atten=120)
    g.order("elliptic", "highpass", 9, [100], 48000, ripple=0.01, atten=100)
    g.order("chebyshev2", "highpass", 10, [80], 48000, atten=100)
    g.order("chebyshev2", "bandstop", 6, [1000, 1500], 32000, atten=120)
    g.order("elliptic", "bandstop", 5, [2000, 3000], 37800, ripple=0.01, atten=100)
    # cheby2 / elliptic band designs
    g.order("chebyshev2", "bandpass", 6, [300, 3400], 8000, atten=60)
    g.order("chebyshev2", "bandpass", 8, [20000, 30000], 176400, atten=80)
    g.order("elliptic", "bandpass", 6, [300, 3400], 11025, ripple=1, atten=60)
    g.order("elliptic", "bandpass", 5, [18000, 20000], 88200, ripple=0.2, atten=70)
    g.order("elliptic", "bandstop", 8, [4000, 8000], 50000, ripple=0.5, atten=70)
    # tolerance specs with narrow transitions
    g.tol("elliptic", "lowpass", 20000, 20500, 0.1, 100, 44100)
    g.tol("chebyshev1", "lowpass", 1000, 1050, 0.5, 60, 48000)
    g.tol("chebyshev2", "highpass", 20, 18, 1, 60, 48000)
    g.tol("butterworth", "lowpass", 1000, 1300, 1, 60, 48000)
    g.tol("elliptic", "bandpass", [1000, 1100], [980, 1120], 0.5, 70, 44100)
    g.tol("elliptic", "bandstop", [40, 70], [49, 61], 1, 40, 48000)
    g.tol("chebyshev2", "bandstop", [45, 56], [49, 51], 1, 30, 44100)
    g.tol("elliptic", "highpass", 10, 8, 0.1, 80, 192000)
    g.tol("chebyshev1", "bandpass", [5000, 6000], [4800, 6300], 0.01, 80, 192000)


def rate_sweep(g):
    # the same rate-free specs at every supported rate
    for rate in RATES:
        g.order("butterworth", "lowpass", 4, [1000], rate)
        g.order("chebyshev1", "highpass", 5, [300], rate, ripple=0.5)
        g.order("chebyshev2", "bandpass", 4, [500, 2000], rate, atten=50)
        g.order("elliptic", "bandstop", 3, [1000, 1400], rate, ripple=1, atten=45)
        g.order("bessel", "lowpass", 5, [2500], rate, norm="delay")
        g.tol("elliptic", "lowpass", 3000, 3500, 0.5, 60, rate)


def zpk_obj(z, p, k):
    return {"zeros": cplx_list(z), "poles": cplx_list(p), "gain": float(np.real(k))}


def bilinear_cases():
    out = []

    def add(name, fs, z, p, k):
        zd, pd, kd = sig.bilinear_zpk(z, p, k, fs)
        out.append({"name": name, "fs": fs, "analog": zpk_obj(z, p, k),
                    "digital": zpk_obj(zd, pd, kd)})

    z, p, k = sig.buttap(4)
    add("buttap4_fs2", 2.0, z, p, k)
    add("buttap4_fs48000", 48000.0, z, p, k)
    z, p, k = sig.ellipap(5, 0.5, 60)
    add("ellipap5_fs1", 1.0, z, p, k)
    add("ellipap5_fs44100", 44100.0, z, p, k)
    z, p, k = sig.cheb2ap(4, 40)
    add("cheb2ap4_fs8000", 8000.0, z, p, k)
    # pre-warped 1 kHz low-pass at 48 kHz (what butter does internally)
    fs = 48000.0
    warped = 2 * fs * math.tan(math.pi * 1000 / fs)
    z, p, k = sig.lp2lp_zpk(*sig.buttap(6), wo=warped)
    add("butter6_lp_1000_prewarped_fs48000", fs, z, p, k)
    z, p, k = sig.lp2hp_zpk(*sig.ellipap(4, 1, 50), wo=2 * fs * math.tan(math.pi * 100 / fs))
    add("ellip4_hp_100_prewarped_fs48000", fs, z, p, k)
    w1 = 2 * fs * math.tan(math.pi * 300 / fs)
    w2 = 2 * fs * math.tan(math.pi * 3400 / fs)
    z, p, k = sig.lp2bp_zpk(*sig.buttap(3), wo=math.sqrt(w1 * w2), bw=w2 - w1)
    add("butter3_bp_300_3400_prewarped_fs48000", fs, z, p, k)
    z, p, k = sig.lp2bs_zpk(*sig.ellipap(3, 0.5, 40), wo=math.sqrt(w1 * w2), bw=w2 - w1)
    add("ellip3_bs_300_3400_prewarped_fs48000", fs, z, p, k)
    z, p, k = sig.lp2bp_zpk(*sig.besselap(4, "phase"), wo=2 * math.pi * 1000, bw=2 * math.pi * 200)
    add("besselap4_bp_unwarped_fs16000", 16000.0, z, p, k)
    return out


def prototype_cases():
    out = []
    ns = list(range(1, 11)) + [16]

    def add(name, call, n, zpk):
        out.append(dict(name=name, call=call, order=n, **zpk_obj(*zpk)))

    for n in ns:
        add("buttap_%d" % n, "scipy.signal.buttap(%d)" % n, n, sig.buttap(n))
    for n in ns:
        for rp in (0.5, 0.01):
            add("cheb1ap_%d_%s" % (n, fnum(rp)), "scipy.signal.cheb1ap(%d, %s)" % (n, fnum(rp)),
                n, sig.cheb1ap(n, rp))
    for n in ns:
        for rs in (40.0, 100.0):
            add("cheb2ap_%d_%s" % (n, fnum(rs)), "scipy.signal.cheb2ap(%d, %s)" % (n, fnum(rs)),
                n, sig.cheb2ap(n, rs))
    for n in ns:
        for rp, rs in ((0.5, 60.0), (0.1, 100.0)):
            add("ellipap_%d_%s_%s" % (n, fnum(rp), fnum(rs)),
                "scipy.signal.ellipap(%d, %s, %s)" % (n, fnum(rp), fnum(rs)),
                n, sig.ellipap(n, rp, rs))
    for n in ns:
        for ours, theirs in BESSEL_NORM.items():
            add("besselap_%d_%s" % (n, ours), "scipy.signal.besselap(%d, norm=%r)" % (n, theirs),
                n, sig.besselap(n, norm=theirs))
    return out


def ellipk_cases():
    ms = [0.0, 1e-12, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99, 0.999999, 1 - 1e-9,
          1 - 1e-12, -0.5, 0.3]
    return [{"m": m, "k": float(sp.ellipk(m))} for m in ms]


def ellipj_cases():
    um = [(0.0, 0.5), (0.5, 0.0), (0.5, 0.5), (1.0, 0.3), (1.5, 0.9),
          (2.0, 0.99), (0.3, 1 - 1e-9), (1.0, 1.0), (3.0, 0.7), (-0.8, 0.4),
          (float(sp.ellipk(0.8)), 0.8), (5.0, 0.1), (0.1, 0.999999)]
    out = []
    for u, m in um:
        sn, cn, dn, ph = sp.ellipj(u, m)
        out.append({"u": u, "m": m, "sn": float(sn), "cn": float(cn),
                    "dn": float(dn), "ph": float(ph)})
    return out


def main():
    g = Gen()
    main_cases(g)
    tolerance_cases(g)
    hard_cases(g)
    rate_sweep(g)
    # one Bessel stage without bessel_norm: the default is phase
    g.order("bessel", "lowpass", 4, [1000], 48000, norm="phase",
            name="bessel_lp_n4_1000_48000_default_norm", omit_norm=True)
    doc = {
        "generator": "testdata/design/gen_design_refs.py",
        "scipy_version": scipy.__version__,
        "numpy_version": np.__version__,
        "cases": g.cases,
        "skipped": g.skipped,
        "bilinear": bilinear_cases(),
        "prototypes": prototype_cases(),
        "ellipk": ellipk_cases(),
        "ellipj": ellipj_cases(),
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=None, allow_nan=False, separators=(",", ":"))
        f.write("\n")
    print("%d cases, %d skipped -> %s (%d bytes)" % (
        len(g.cases), len(g.skipped), OUT, os.path.getsize(OUT)), file=sys.stderr)


if __name__ == "__main__":
    main()
