#!/usr/bin/python3
"""SEG-Y files for the app/horizonjob tests, written and read with Debian's
python3-segyio (the outside reference for SEG-Y), peaks with python3-scipy.

Run with /usr/bin/python3 (the Go tests do):

  segyio_volume.py write VOLUME NI NX IL0 XL0 OUT.sgy
      Writes the traces of VOLUME (map_stats.py's format, inline-major,
      NI inlines of NX crosslines) with segyio.create: IEEE floats (format
      5), inline sorting, inlines IL0.., crosslines XL0.., the sample
      interval of VOLUME, CDP X = 512000 + 25 xl and CDP Y = 6780000 + 25 il
      (grid indices, metres, coordinate scalar 1).

  segyio_volume.py peaks FILE.sgy GUIDE OUT
      Reads every trace of FILE.sgy with segyio (in file order, which is
      the grid's inline-major order for the files written above) and, like
      peaks.py, writes for each trace the time in ms of the
      scipy.signal.find_peaks peak (positive height) nearest the GUIDE
      time, refined by the parabola through it and its neighbours (NaN
      where GUIDE is NaN or there is no peak).
"""
import struct
import sys

import numpy as np
import scipy.signal
import segyio


def write(vol, ni, nx, il0, xl0, out):
    ni, nx, il0, xl0 = int(ni), int(nx), int(il0), int(xl0)
    with open(vol, "rb") as f:
        ntr, ns = struct.unpack("<ii", f.read(8))
        dt, t0 = struct.unpack("<dd", f.read(16))
        data = np.frombuffer(f.read(), dtype="<f4").reshape(ntr, ns)
    assert ntr == ni * nx
    spec = segyio.spec()
    spec.ilines = list(range(il0, il0 + ni))
    spec.xlines = list(range(xl0, xl0 + nx))
    spec.samples = [t0 + dt * k for k in range(ns)]
    spec.format = 5
    spec.sorting = 2
    with segyio.create(out, spec) as f:
        f.bin.update(hdt=int(round(dt * 1000)), hns=ns)
        for k in range(ntr):
            il, xl = k // nx, k % nx
            f.header[k] = {
                segyio.TraceField.INLINE_3D: il0 + il,
                segyio.TraceField.CROSSLINE_3D: xl0 + xl,
                segyio.TraceField.CDP_X: 512000 + 25 * xl,
                segyio.TraceField.CDP_Y: 6780000 + 25 * il,
                segyio.TraceField.SourceGroupScalar: 1,
                segyio.TraceField.TRACE_SAMPLE_COUNT: ns,
                segyio.TraceField.TRACE_SAMPLE_INTERVAL: int(round(dt * 1000)),
            }
            f.trace[k] = data[k]


def peaks(path, guide, out):
    guide = np.fromfile(guide, dtype="<f8")
    with segyio.open(path, ignore_geometry=True) as f:
        times = np.asarray(f.samples, dtype=np.float64)
        dt = times[1] - times[0]
        res = np.full(f.tracecount, np.nan)
        for k in range(f.tracecount):
            g = guide[k]
            if np.isnan(g):
                continue
            x = np.asarray(f.trace[k], dtype=np.float64)
            p, _ = scipy.signal.find_peaks(x, height=0)
            p = p[(p > 0) & (p < len(x) - 1)]
            if len(p) == 0:
                continue
            i = p[np.argmin(np.abs(times[p] - g))]
            a, c, b = x[i - 1], x[i], x[i + 1]
            den = a - 2 * c + b
            res[k] = times[0] + dt * (i + (0.5 * (a - b) / den if den != 0 else 0.0))
    res.astype("<f8").tofile(out)


if __name__ == "__main__":
    if sys.argv[1] == "write":
        write(*sys.argv[2:8])
    elif sys.argv[1] == "peaks":
        peaks(*sys.argv[2:5])
    else:
        raise SystemExit("usage: segyio_volume.py write|peaks ...")
