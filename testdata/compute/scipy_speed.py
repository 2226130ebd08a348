#!/usr/bin/python3
"""Speed comparison for issue 3: quadtrace's instantaneous set against
scipy's pipeline, measured in one run on the same machine.

Run from anywhere with /usr/bin/python3 (Debian python3-scipy):

    /usr/bin/python3 testdata/compute/scipy_speed.py [--repeats N]

It builds the benchmark array of compute/bench_test.go (2000 traces x 1501
samples at 4 ms, same formula), times scipy.signal.hilbert + abs + angle +
unwrapped-difference frequency on it (the pipeline named in the issue; best
of N runs, single-threaded as scipy runs it), then runs

    go test -run '^$' -bench 'BenchmarkInstantaneousSet$' -benchtime 1x -count R -cpu 1 ./compute/
    go test -run '^$' -bench 'BenchmarkInstantaneousSet$' -benchtime 1x -count R -cpu N ./compute/

(N = all cores, R = 2 x repeats) in the project root, takes the best ns/op
of each sub-benchmark, times scipy again, and prints the ratio scipy /
quadtrace (above 1 = quadtrace faster) on one core and on all cores.

The Go benchmark has two forms of each padding: "pad=..." calls
compute.Instantaneous, which returns four new 12 MB sections per call (as
scipy returns new arrays), and "into,pad=..." calls
compute.InstantaneousInto with the same output sections every time, as the
program's whole-volume jobs (export, bricks) write each attribute into
reused output blocks.
The first form pays thousands of minor page faults per call (the Go
runtime returns part of the freed memory to the system between calls; the Go
benchmark reports faults/op), at roughly 15 microseconds each on this
virtual machine; scipy's pipeline takes none after its first call (its
allocator keeps the freed blocks; printed below from getrusage). Both
forms are printed. The
machine is shared, so both sides take their best single run of the same
number of runs (a mean over several iterations on the Go side would be
compared with scipy's luckiest run); when other jobs hold a core the
all-cores figure shows little gain over one core.
"""
import argparse
import os
import re
import resource
import subprocess
import sys
import time

import numpy as np
import scipy
import scipy.signal

TRACES, SAMPLES, DT = 2000, 1501, 0.004


def bench_array():
    """The array of benchSection in compute/bench_test.go."""
    i = np.arange(TRACES, dtype=np.float64)[:, None]
    k = np.arange(SAMPLES, dtype=np.float64)[None, :]
    noise = np.sin(i * 12.9898 + k * 78.233) * 43758.5453
    noise -= np.floor(noise)
    x = (np.sin(2 * np.pi * DT * k * (25 + 0.01 * i))
         + 0.5 * np.sin(2 * np.pi * DT * k * (40 - 0.005 * i))
         + (noise - 0.5))
    return x.astype(np.float32)


def scipy_pipeline(x):
    z = scipy.signal.hilbert(x, axis=-1)
    envelope = np.abs(z)
    phase = np.angle(z)
    frequency = np.diff(np.unwrap(phase, axis=-1), axis=-1) / (2 * np.pi * DT)
    return envelope, phase, frequency


def minor_faults():
    return resource.getrusage(resource.RUSAGE_SELF).ru_minflt


def time_scipy(x, repeats):
    """Best wall and best CPU (process_time) seconds of repeats runs, and
    the fewest minor page faults of a run."""
    best, best_cpu, faults = float("inf"), float("inf"), None
    for _ in range(repeats):
        t, c, f = time.perf_counter(), time.process_time(), minor_faults()
        scipy_pipeline(x)
        best = min(best, time.perf_counter() - t)
        best_cpu = min(best_cpu, time.process_time() - c)
        f = minor_faults() - f
        faults = f if faults is None else min(faults, f)
    return best, best_cpu, faults


def time_go(root, runs):
    # One go test per core count: with "-cpu 1,N" in one run, go test
    # reports the first one-core result of a sub-benchmark from a run made
    # with the default GOMAXPROCS (all cores; seen as CPU time twice the
    # wall time), which would flatter the one-core figure.
    cpus = [1, os.cpu_count()] if (os.cpu_count() or 1) > 1 else [1]
    best = {}
    for n in cpus:
        cmd = ["go", "test", "-run", "^$", "-bench", "BenchmarkInstantaneousSet$",
               "-benchtime", "1x", "-count", str(runs), "-cpu", str(n), "./compute/"]
        out = subprocess.run(cmd, cwd=root, capture_output=True, text=True)
        if out.returncode != 0:
            sys.exit("go test failed:\n" + out.stdout + out.stderr)
        for m in re.finditer(r"^BenchmarkInstantaneousSet/(\S+?)(?:-(\d+))?\s+\d+\s+([\d.]+) ns/op\s+([\d.]+) cpu-ns/op", out.stdout, re.M):
            name = f"{m.group(1)}, {m.group(2) or 1} core{'s' if m.group(2) else ''}"
            wall, cpu = best.get(name, (float("inf"), float("inf")))
            best[name] = (min(wall, float(m.group(3)) / 1e9), min(cpu, float(m.group(4)) / 1e9))
    if not best:
        sys.exit("no BenchmarkInstantaneousSet result in:\n" + out.stdout)
    return best


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--repeats", type=int, default=5)
    args = ap.parse_args()
    root = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
    x = bench_array()
    before, before_cpu, _ = time_scipy(x, args.repeats)
    go = time_go(root, 2 * args.repeats)
    after, after_cpu, faults = time_scipy(x, args.repeats)
    sp, sp_cpu = min(before, after), min(before_cpu, after_cpu)
    print(f"array: {TRACES} traces x {SAMPLES} samples, {os.cpu_count()} cores; scipy {scipy.__version__}, numpy {np.__version__}")
    print(f"scipy hilbert+abs+angle+unwrap-diff: {sp * 1e3:8.1f} ms wall, {sp_cpu * 1e3:.1f} ms CPU (best of {2 * args.repeats}; {before * 1e3:.1f} before, {after * 1e3:.1f} after the Go run; {faults} minor page faults per call at best)")
    for name, (sec, cpu) in sorted(go.items()):
        line = f"quadtrace Instantaneous {name:18s}: {sec * 1e3:8.1f} ms   ratio scipy/quadtrace = {sp / sec:.2f}"
        if name.endswith(" 1 core"):
            # One core: CPU time is the work done, not inflated by waits.
            line += f"   (CPU {cpu * 1e3:.1f} ms, ratio {sp_cpu / cpu:.2f})"
        print(line)


if __name__ == "__main__":
    main()
