#!/usr/bin/python3
"""Reference maps along horizons for the compute/horizon tests, with numpy
(Debian's python3-numpy), written independently of the Go code.

Run with /usr/bin/python3 (the Go tests do):

  map_stats.py VOLUME TOP BASE OUT STAT FROM_MS TO_MS [STAT FROM_MS TO_MS ...]

VOLUME (little-endian): int32 ntr, int32 ns, float64 dt_ms, float64 t0_ms,
then ntr*ns float32 samples, trace after trace (NaN samples are gaps); or,
when its name ends in .sgy, a SEG-Y file read with segyio (Debian's
python3-segyio), traces in file order.
TOP and BASE: ntr float64 horizon times in ms, NaN where empty; BASE is
"-" for a window relative to TOP only. For each (STAT, FROM_MS, TO_MS) the
map is appended to OUT as ntr float64 values:

  value     numpy.interp of the trace at the TOP time (NaN off the trace)
  mean, mean-abs, rms, max-abs, min-abs
            over the samples whose time t has TOP+FROM <= t <= END, END =
            TOP+TO (or BASE+TO with a BASE), gaps left out; NaN when no
            sample is left.
"""
import struct
import sys

import numpy as np


def main(argv):
    vol, top, base, out = argv[1:5]
    if vol.endswith(".sgy"):
        import segyio

        with segyio.open(vol, ignore_geometry=True) as f:
            times = np.asarray(f.samples, dtype=np.float64)
            t0, dt = times[0], times[1] - times[0]
            data = segyio.tools.collect(f.trace[:]).astype(np.float64)
        ntr, ns = data.shape
    else:
        with open(vol, "rb") as f:
            ntr, ns = struct.unpack("<ii", f.read(8))
            dt, t0 = struct.unpack("<dd", f.read(16))
            data = np.frombuffer(f.read(), dtype="<f4").reshape(ntr, ns).astype(np.float64)
    top = np.fromfile(top, dtype="<f8")
    base = None if base == "-" else np.fromfile(base, dtype="<f8")
    times = t0 + dt * np.arange(ns)
    eps = 1e-9 * dt
    maps = []
    specs = argv[5:]
    for i in range(0, len(specs), 3):
        stat, lo, hi = specs[i], float(specs[i + 1]), float(specs[i + 2])
        if stat == "value":
            m = np.full(ntr, np.nan)
            for k in range(ntr):
                t = top[k]
                if np.isnan(t) or t < times[0] or t > times[-1]:
                    continue
                m[k] = np.interp(t, times, data[k])
            maps.append(m)
            continue
        start = top + lo
        end = (base if base is not None else top) + hi
        inside = (times[None, :] >= start[:, None] - eps) & (times[None, :] <= end[:, None] + eps)
        inside &= ~np.isnan(data)
        n = inside.sum(axis=1)
        with np.errstate(invalid="ignore", divide="ignore"):
            if stat == "mean":
                m = np.where(inside, data, 0).sum(axis=1) / n
            elif stat == "mean-abs":
                m = np.where(inside, np.abs(data), 0).sum(axis=1) / n
            elif stat == "rms":
                m = np.sqrt(np.where(inside, data * data, 0).sum(axis=1) / n)
            elif stat == "max-abs":
                m = np.where(inside, np.abs(data), -np.inf).max(axis=1)
            elif stat == "min-abs":
                m = np.where(inside, np.abs(data), np.inf).min(axis=1)
            else:
                raise SystemExit("unknown statistic " + stat)
        m = np.where((n == 0) | np.isnan(start) | np.isnan(end), np.nan, m)
        maps.append(m)
    np.concatenate(maps).astype("<f8").tofile(out)


if __name__ == "__main__":
    main(sys.argv)
