#!/usr/bin/python3
"""Record what scipy.io.wavfile reads from each fixture, for wavio's tests.

Run with Debian's interpreter and its python3-scipy package (the values
committed in expected.json came from SciPy 1.10.1 and NumPy 1.24.2):

    /usr/bin/python3 testdata/wav/gen_expected.py > testdata/wav/expected.json

For every file: the fmt chunk fields (parsed with struct), the sample rate, the NumPy dtype, frames and channels, and
the samples scaled to float64 the way wavio documents it: scipy returns
integer data left-justified in the dtype, so an integer value v of a dtype of
B bits becomes v / 2**(B-1), and uint8 becomes (v - 128) / 128; float data
is taken as it is. Small files are recorded whole; for larger ones the first
and last 16 frames and every step-th frame in between, plus the sum and the
sum of squares over all samples. Files scipy refuses get its message.
"""
import glob
import json
import os
import struct
import sys
import warnings

import numpy as np
import scipy
from scipy.io import wavfile

HERE = os.path.dirname(os.path.abspath(__file__))


def scaled(data):
    if data.dtype == np.uint8:
        return (data.astype(np.float64) - 128.0) / 128.0
    if data.dtype.kind == "i":
        return data.astype(np.float64) / float(2 ** (8 * data.dtype.itemsize - 1))
    return data.astype(np.float64)


def fmt_fields(path):
    """The fmt chunk fields, parsed here with struct (not by scipy)."""
    b = open(path, "rb").read()
    if b[:4] not in (b"RIFF", b"RIFX"):
        return None
    e = "<" if b[:4] == b"RIFF" else ">"
    pos = 12
    while pos + 8 <= len(b):
        cid = b[pos:pos + 4]
        (size,) = struct.unpack(e + "I", b[pos + 4:pos + 8])
        if cid == b"fmt ":
            tag, ch, rate, _, align, bits = struct.unpack(e + "HHIIHH", b[pos + 8:pos + 24])
            f = {"tag": tag, "channels": ch, "rate": rate, "block_align": align, "bits": bits}
            if tag == 0xFFFE:
                valid, mask, sub = struct.unpack(e + "HII", b[pos + 26:pos + 36])  # sub: GUID Data1
                f.update(valid_bits=valid, channel_mask=mask, sub_tag=sub)
            return f
        pos += 8 + size + (size & 1)
    return None


def record(path):
    rel = os.path.relpath(path, HERE)
    out = {"file": rel, "fmt": fmt_fields(path)}
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            rate, data = wavfile.read(path)
    except Exception as e:  # scipy's refusal is the record
        out["scipy_error"] = str(e)
        return out
    out["scipy_warnings"] = sorted({str(w.message) for w in caught})
    if data.ndim == 1:
        data = data[:, None]
    x = scaled(data)
    frames, channels = x.shape
    out.update(rate=int(rate), dtype=data.dtype.str, frames=frames, channels=channels)
    if frames <= 64:
        idx = list(range(frames))
    else:
        step = max(1, (frames - 32) // 100)
        idx = sorted(set(range(16)) | set(range(16, frames - 16, step)) | set(range(frames - 16, frames)))
    out["index"] = idx
    out["samples"] = [[float(v) for v in x[i]] for i in idx]
    out["sum"] = float(np.sum(x))
    out["sum_squares"] = float(np.sum(x * x))
    return out


def main():
    files = sorted(glob.glob(os.path.join(HERE, "*", "*.wav")))
    doc = {
        "generator": "testdata/wav/gen_expected.py",
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "files": [record(f) for f in files],
    }
    json.dump(doc, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
