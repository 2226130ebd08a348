#!/usr/bin/python3
"""Reference vectors for the compute package tests, from Debian's
python3-scipy (scipy.signal.hilbert) and python3-segyio.

Run with /usr/bin/python3 (the Go tests do). Two sub-commands:

  scipy_reference.py dump-segy FILE OUT [FILE OUT ...]
      Reads every trace of the SEG-Y FILE with segyio (ignore_geometry)
      and writes them to OUT in the trace-file format below (big-endian
      files first, little-endian when that fails).

  scipy_reference.py hilbert IN OUT N [IN OUT N ...]
      Reads traces from the trace file IN and writes, for each trace x,
      z = scipy.signal.hilbert(x, N)[:ns] (N = 0: no padding, N = ns) as
      three float64 little-endian arrays of ntr*ns values, one after the
      other: imag(z) (quadrature), abs(z) (envelope), angle(z) (phase, rad).

Trace-file format (little-endian): int32 ntr, int32 ns, float64 dt in
seconds, then ntr*ns float32 samples, trace after trace.
"""
import struct
import sys

import numpy as np
import scipy.signal


def read_traces(path):
    with open(path, "rb") as f:
        ntr, ns = struct.unpack("<ii", f.read(8))
        (dt,) = struct.unpack("<d", f.read(8))
        data = np.frombuffer(f.read(4 * ntr * ns), dtype="<f4").reshape(ntr, ns)
    return data, dt


def write_traces(path, data, dt):
    data = np.asarray(data, dtype="<f4")
    with open(path, "wb") as f:
        f.write(struct.pack("<iid", data.shape[0], data.shape[1], dt))
        f.write(data.tobytes())


def dump_segy(src, out):
    import segyio

    try:
        f = segyio.open(src, "r", ignore_geometry=True)
    except RuntimeError:  # little-endian files (e.g. small-lsb.sgy)
        f = segyio.open(src, "r", ignore_geometry=True, endian="little")
    with f as s:
        data = np.stack([np.asarray(t, dtype=np.float32) for t in s.trace])
        dt = segyio.tools.dt(s) / 1e6
    write_traces(out, data, dt)


def hilbert(src, out, n_fft):
    data, _ = read_traces(src)
    ns = data.shape[1]
    n_fft = n_fft or ns
    z = scipy.signal.hilbert(data.astype(np.float64), N=n_fft, axis=-1)[:, :ns]
    with open(out, "wb") as f:
        for a in (np.imag(z), np.abs(z), np.angle(z)):
            f.write(np.ascontiguousarray(a, dtype="<f8").tobytes())


def main(argv):
    args = argv[2:]
    if len(argv) > 2 and argv[1] == "dump-segy" and len(args) % 2 == 0:
        for i in range(0, len(args), 2):
            dump_segy(args[i], args[i + 1])
    elif len(argv) > 2 and argv[1] == "hilbert" and len(args) % 3 == 0:
        for i in range(0, len(args), 3):
            hilbert(args[i], args[i + 1], int(args[i + 2]))
    else:
        sys.stderr.write(__doc__)
        return 2
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
