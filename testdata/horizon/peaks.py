#!/usr/bin/python3
"""Reference peak times for the horizon tracking tests, from Debian's
python3-scipy (scipy.signal.find_peaks) and numpy.

Run with /usr/bin/python3 (the Go tests do):

  peaks.py VOLUME GUIDE OUT

VOLUME is in map_stats.py's format (int32 ntr, int32 ns, float64 dt_ms,
float64 t0_ms, then ntr*ns little-endian float32 samples). GUIDE holds ntr
float64 times in ms (NaN: skip the trace). For each trace, of the peaks
scipy.signal.find_peaks finds with positive height, the one nearest the
guide time is refined by the vertex of the parabola through it and its two
neighbours, i + (x[i-1] - x[i+1]) / (2 (x[i-1] - 2 x[i] + x[i+1])); OUT gets
its time in ms as float64 (NaN for skipped traces or traces without a peak).
"""
import struct
import sys

import numpy as np
import scipy.signal


def main(vol, guide, out):
    with open(vol, "rb") as f:
        ntr, ns = struct.unpack("<ii", f.read(8))
        dt, t0 = struct.unpack("<dd", f.read(16))
        data = np.frombuffer(f.read(), dtype="<f4").reshape(ntr, ns).astype(np.float64)
    guide = np.fromfile(guide, dtype="<f8")
    res = np.full(ntr, np.nan)
    for k in range(ntr):
        g = guide[k]
        if np.isnan(g):
            continue
        x = data[k]
        peaks, _ = scipy.signal.find_peaks(x, height=0)
        peaks = peaks[(peaks > 0) & (peaks < ns - 1)]
        if len(peaks) == 0:
            continue
        i = peaks[np.argmin(np.abs(t0 + dt * peaks - g))]
        p, c, n = x[i - 1], x[i], x[i + 1]
        den = p - 2 * c + n
        v = i + (0.5 * (p - n) / den if den != 0 else 0.0)
        res[k] = t0 + dt * v
    res.astype("<f8").tofile(out)


if __name__ == "__main__":
    main(*sys.argv[1:4])
