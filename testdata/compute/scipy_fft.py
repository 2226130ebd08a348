#!/usr/bin/python3
"""Checks quadtrace's FFT (compute/fft.go, compute/rfft.go) against
scipy.fft (Debian python3-scipy, pocketfft, float64).

Run by compute/fft_test.go with /usr/bin/python3:

  scipy_fft.py IN OUT

IN holds the transforms quadtrace computed, one record after another, all
little-endian: int32 kind (0 = complex fft, 1 = real rfft), int32 n, then
for kind 0 the n complex results as 2n float64 (re, im), for kind 1 the
n//2+1 complex results. The input of each record is not stored: both sides
compute it from the same integer formula (exact in float64),

  u_j = ((1103515245 * (j + 7919 * s) + 12345) mod 2^31) / 2^31 - 0.5

with s = 2n for the real part (and the real input) and s = 2n + 1 for the
imaginary part.

OUT receives one line per record: kind, n and the relative error
||X - X_scipy||_2 / ||X_scipy||_2 (0 when both are zero).
"""
import struct
import sys

import numpy as np
import scipy.fft


def sequence(n, s):
    j = np.arange(n, dtype=np.int64)
    v = (1103515245 * (j + 7919 * s) + 12345) % 2147483648
    return v.astype(np.float64) / 2147483648.0 - 0.5


def main(argv):
    if len(argv) != 3:
        sys.stderr.write(__doc__)
        return 2
    with open(argv[1], "rb") as f:
        data = f.read()
    pos = 0
    lines = []
    while pos < len(data):
        kind, n = struct.unpack_from("<ii", data, pos)
        pos += 8
        count = n if kind == 0 else n // 2 + 1
        got = np.frombuffer(data, dtype="<f8", count=2 * count, offset=pos)
        pos += 16 * count
        got = got[0::2] + 1j * got[1::2]
        if kind == 0:
            want = scipy.fft.fft(sequence(n, 2 * n) + 1j * sequence(n, 2 * n + 1))
        else:
            want = scipy.fft.rfft(sequence(n, 2 * n))
        den = np.linalg.norm(want)
        num = np.linalg.norm(got - want)
        err = num / den if den > 0 else num
        lines.append(f"{kind} {n} {err:.6e}")
    with open(argv[2], "w") as f:
        f.write("\n".join(lines) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
