#!/usr/bin/python3
"""The scipy pipeline for an envelope volume, timed for the export benchmark
of app/export (BenchmarkExportEnvelope): read a SEG-Y volume with Debian's
python3-segyio, compute the envelope |scipy.signal.hilbert(x)| of every
trace with python3-scipy, and write it with segyio as an IEEE-float (format
5) SEG-Y volume carrying the input's textual, binary and trace headers.
Traces go through in chunks so memory stays bounded as in the Go export.

usage: scipy_envelope.py INPUT OUTPUT
prints {"seconds": wall time from opening INPUT to closing OUTPUT, "traces": n}
"""
import json
import sys
import time

import numpy as np
import segyio
from scipy.signal import hilbert

CHUNK = 4000  # traces per chunk


def main():
    src_path, dst_path = sys.argv[1], sys.argv[2]
    t0 = time.perf_counter()
    with segyio.open(src_path, "r", ignore_geometry=True) as src:
        spec = segyio.tools.metadata(src)
        spec.format = 5
        with segyio.create(dst_path, spec) as dst:
            dst.text[0] = src.text[0]
            dst.bin = src.bin
            dst.bin.update(format=5)
            n = src.tracecount
            for a in range(0, n, CHUNK):
                b = min(n, a + CHUNK)
                x = np.asarray(src.trace.raw[a:b], dtype=np.float64)
                env = np.abs(hilbert(x, axis=1)).astype(np.float32)
                for i in range(a, b):
                    dst.header[i] = src.header[i]
                    dst.trace[i] = env[i - a]
    seconds = time.perf_counter() - t0
    json.dump({"seconds": seconds, "traces": n}, sys.stdout)


if __name__ == "__main__":
    main()
