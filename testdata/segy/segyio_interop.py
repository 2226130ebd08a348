#!/usr/bin/python3
"""Cross-check helper for quadtrace's segy package, using Debian's
python3-segyio (1.8.3) as the outside reference implementation.

  segyio_interop.py write OUTDIR   write reference files with segyio.create
                                   and print a JSON manifest of them
  segyio_interop.py dump FILE      print segyio's reading of FILE as JSON:
                                   binary header fields, textual header,
                                   every trace header field and every sample
                                   (as float32 bit patterns)

Formats written: segyio 1.8.3 documents spec.format 1 (IBM) and 5 (IEEE)
for segyio.create; its C core also writes 2 (4-byte integer) correctly.
Formats 3 and 8 (2- and 1-byte integers) are refused here because segyio
1.8.3 writes them wrongly (the last sample of every trace is lost and the
file comes out short, so segyio itself cannot reopen it); 6, 7, 9-12, 15, 16
raise "unknown format identifier" in segyio 1.8.3.
"""
import json
import os
import sys

import numpy as np
import segyio

FORMATS = [1, 2, 5]


def sample_values(fmt, il, xl, off, n):
    k = np.arange(n, dtype=np.float64)
    if fmt == 2:
        # integers, negative ones included, and a large magnitude
        v = il * 100000 + xl * 100 + off * 10 + k - 50
        v[0] = -2147483648 + il
        return v.astype(np.int32)
    v = il + xl / 100.0 + k * 1e-5 + off
    v[1] = -v[1] * 1e3  # a negative, larger value
    return v.astype(np.float32)


def write(outdir):
    manifest = []
    for fmt in FORMATS:
        for endian in ("big", "little"):
            for prestack in (False, True):
                name = "segyio-f%d-%s%s.sgy" % (fmt, endian, "-ps" if prestack else "")
                path = os.path.join(outdir, name)
                spec = segyio.spec()
                spec.ilines = [1, 2, 3]
                spec.xlines = [10, 11, 12, 13]
                spec.offsets = [1, 2] if prestack else [1]
                spec.samples = list(range(0, 7 * 4, 4))  # 7 samples, 4 ms
                spec.format = fmt
                spec.sorting = 2  # inline sorting
                spec.endian = endian
                with segyio.create(path, spec) as f:
                    tr = 0
                    for il in spec.ilines:
                        for xl in spec.xlines:
                            for off in spec.offsets:
                                f.header[tr] = {
                                    segyio.su.iline: il,
                                    segyio.su.xline: xl,
                                    segyio.su.offset: off,
                                    segyio.su.cdp: xl,
                                    segyio.su.cdpx: 100000 + 2500 * xl,
                                    segyio.su.cdpy: 200000 + 2500 * il,
                                    segyio.su.scalco: -100,
                                    segyio.su.delrt: 12,
                                    segyio.su.ns: len(spec.samples),
                                    segyio.su.dt: 4000,
                                    segyio.su.tracl: tr + 1,
                                    segyio.su.muts: -7,
                                    segyio.su.gain: 3,
                                }
                                f.trace[tr] = sample_values(fmt, il, xl, off, len(spec.samples))
                                tr += 1
                manifest.append({"name": name, "format": fmt, "endian": endian, "prestack": prestack})
    json.dump(manifest, sys.stdout)


def dump(path):
    endian = "big"
    with open(path, "rb") as raw:
        raw.seek(3224)
        code = raw.read(2)
        if code[0] != 0 and code[1] == 0:
            endian = "little"
    out = {}
    with segyio.open(path, ignore_geometry=True, endian=endian) as f:
        out["endian"] = endian
        out["format"] = int(f.format)
        out["tracecount"] = int(f.tracecount)
        out["samples"] = len(f.samples)
        out["bin"] = {str(int(k)): int(v) for k, v in f.bin.items()}
        out["text"] = f.text[0].decode("ascii", "replace")
        traces = []
        for i in range(f.tracecount):
            h = f.header[i]
            data = np.asarray(f.trace[i]).astype(np.float32)
            traces.append({
                "header": {str(int(k)): int(v) for k, v in h.items()},
                "bits": [int(b) for b in data.view(np.uint32)],
            })
        out["traces"] = traces
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    if len(sys.argv) != 3 or sys.argv[1] not in ("write", "dump"):
        sys.exit(__doc__)
    {"write": write, "dump": dump}[sys.argv[1]](sys.argv[2])
