#!/usr/bin/python3
"""Time the work of `wavsieve apply` with NumPy and SciPy: read a
16/24/32-bit PCM WAV, decode it with plain NumPy, filter it with
scipy.signal.sosfilt (causal) or sosfiltfilt (zero-phase, padtype='odd'),
encode it back to the input's sample size with rounding half to even and
saturation, no dither, and write it as wavsieve does: to a temporary file,
fsync, rename. Prints one line per mode: name, best time of the runs in
seconds.

    /usr/bin/python3 bench_apply.py in.wav out_dir sections.json padlen [runs]

sections.json is the "sections" list of `wavsieve design --json` (rows
b0 b1 b2 a0 a1 a2); padlen the zero-phase pad of the apply manifest.
"""
import json
import os
import struct
import sys
import time

import numpy as np
import scipy
import scipy.signal as sig


def read_wav(name):
    """Returns (rate, bits, samples as float64 of shape (channels, frames))."""
    with open(name, "rb") as f:
        data = f.read()
    if data[:4] != b"RIFF" or data[8:12] != b"WAVE":
        raise ValueError("not a RIFF WAVE file")
    pos, fmt, body = 12, None, None
    while pos + 8 <= len(data):
        cid, size = data[pos:pos + 4], struct.unpack_from("<I", data, pos + 4)[0]
        if cid == b"fmt ":
            fmt = struct.unpack_from("<HHIIHH", data, pos + 8)
        elif cid == b"data":
            body = memoryview(data)[pos + 8:pos + 8 + size]
            break
        pos += 8 + size + (size & 1)
    _, ch, rate, _, align, bits = fmt
    n = len(body) // align
    raw = np.frombuffer(body, np.uint8, n * align)
    width = bits // 8
    if width == 3:
        # Each 3-byte sample goes into the top of an int32, shifted back
        # down with its sign.
        wide = np.zeros((n * ch, 4), np.uint8)
        wide[:, 1:] = raw.reshape(-1, 3)
        v = wide.view("<i4").ravel() >> 8
    else:
        v = raw.view({2: "<i2", 4: "<i4"}[width])
    x = v.reshape(n, ch).T * (1.0 / (1 << (bits - 1)))
    return rate, bits, np.ascontiguousarray(x)


def write_wav(name, rate, bits, y):
    ch, n = y.shape
    scale = float(1 << (bits - 1))
    q = np.clip(np.rint(y.T * scale), -scale, scale - 1).astype("<i4", order="C")
    width = bits // 8
    if width == 3:
        body = q.view(np.uint8).reshape(-1, 4)[:, :3].tobytes()
    else:
        body = q.astype({2: "<i2", 4: "<i4"}[width]).tobytes()
    head = b"RIFF" + struct.pack("<I", 36 + len(body)) + b"WAVEfmt " + struct.pack(
        "<IHHIIHH", 16, 1, ch, rate, rate * ch * width, ch * width, bits) + b"data" + struct.pack("<I", len(body))
    tmp = name + ".tmp"
    with open(tmp, "wb") as f:
        f.write(head)
        f.write(body)
        f.flush()
        os.fsync(f.fileno())
    os.rename(tmp, name)


def main():
    src, out_dir, sos_file, padlen = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
    runs = int(sys.argv[5]) if len(sys.argv) > 5 else 3
    with open(sos_file) as f:
        sos = np.array(json.load(f))
    print(f"scipy {scipy.__version__} numpy {np.__version__}")
    out = os.path.join(out_dir, "numpy-out.wav")
    for name, filt in [
        ("numpy-causal", lambda x: sig.sosfilt(sos, x, axis=-1)),
        ("numpy-zerophase", lambda x: sig.sosfiltfilt(sos, x, axis=-1, padtype="odd", padlen=padlen)),
    ]:
        best = float("inf")
        for _ in range(runs):
            t0 = time.perf_counter()
            rate, bits, x = read_wav(src)
            write_wav(out, rate, bits, filt(x))
            best = min(best, time.perf_counter() - t0)
        print(f"{name} {best:.3f}")
    os.remove(out)


if __name__ == "__main__":
    main()
