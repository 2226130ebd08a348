#!/usr/bin/python3
"""Read a SEG-Y file with Debian's python3-segyio and dump what the Go tests
of app/export compare against: sampling, format, textual header, the binary
header fields and every trace header field as segyio decodes them (a JSON
object on stdout), and all samples as little-endian float32 to DATA_PATH.

usage: readback.py SEGY_PATH DATA_PATH

segyio is an outside implementation of the SEG-Y standard: reading our output
through it checks the layout, the headers and the sample encoding (IBM or IEEE)
independently of quadtrace's own reader.
"""
import json
import sys

import numpy as np
import segyio


def main():
    path, data_path = sys.argv[1], sys.argv[2]
    with segyio.open(path, "r", ignore_geometry=True) as f:
        out = {
            "segyio_version": segyio.__version__,
            "samples": len(f.samples),
            "interval_us": int(segyio.tools.dt(f)),
            "format": int(f.format) if f.format is not None else 0,
            "traces": f.tracecount,
            "text": f.text[0].decode("ascii", "replace"),
            "bin": {str(int(k)): int(v) for k, v in f.bin.items()},
            "headers": [{str(int(k)): int(v) for k, v in h.items()} for h in f.header],
        }
        data = np.asarray(f.trace.raw[:], dtype="<f4")
        data.tofile(data_path)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
