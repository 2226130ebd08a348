"""Print the binary header and one trace header of a SEG-Y file as segyio
(Debian's python3-segyio) reads them: JSON {"bin": {BYTE: VALUE},
"trace": {BYTE: VALUE}}, keyed by the first byte of each field as
segyio.BinField and segyio.TraceField number them.

usage: /usr/bin/python3 headers.py FILE TRACE [big|little]
"""
import json
import sys

import segyio

path, trace = sys.argv[1], int(sys.argv[2])
endian = sys.argv[3] if len(sys.argv) > 3 else "big"
with segyio.open(path, ignore_geometry=True, endian=endian) as f:
    b = f.bin
    h = f.header[trace]
    out = {
        "segyio_version": segyio.__version__,
        "bin": {int(k): int(b[k]) for k in segyio.BinField.enums() if k in b},
        "trace": {int(k): int(h[k]) for k in segyio.TraceField.enums() if k in h},
    }
json.dump(out, sys.stdout)
