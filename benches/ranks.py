#!/usr/bin/env python3
"""Builds and batches across MPI ranks against one process, on this machine, in one run.

Needs the binary built with the feature (`cargo build --release --features mpi`) and OpenMPI's
`mpirun` (Debian: openmpi-bin libopenmpi-dev). Peers, each a whole process (or job), each
timed once per repeat, best of REPEATS:
  - build of the three-way tables P x Q x S (line sums fixed; default 3 x 3 x 4) into an
    empty cache: one process with 1 thread, one process with 2 threads, `mpirun -np 2` with 1
    thread per rank (the same two cores);
  - `batch` of DAYS drawn days of the product-line example scenario (benches/scenario_days.py),
    set cached: the same three peers.
For builds it prints the peak resident memory of the process (of the largest rank under
mpirun; GNU time reports it) and its ratio to one process's. Every peer's set (`cache export`, clock fields dropped) and every peer's results (timings
dropped) must equal one process's; the script stops otherwise. From the 1-thread and the
2-rank times it fits Amdahl's law, speedup(N) = 1 / (s + (1 - s) / N), and prints the model's
figures for 8 to 64 ranks (a model on paper: exchanges grow with the ranks, which it ignores).

Usage: python3 benches/ranks.py [DAYS] [REPEATS] [--tables PxQxS]   (defaults 1000, 3, 3x3x4)
"""

import argparse
import json
import os
import random
import subprocess
import sys
import tempfile
import time
import tomllib

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "benches"))
from scenario_days import draw_day  # noqa: E402

BINARY = os.path.join(ROOT, "target", "release", "kernstep")
MPIRUN = ["mpirun", "--allow-run-as-root", "--oversubscribe", "--bind-to", "none"]


def tables(p, q, s):
    """The three-way tables model: one row per line sum, every cell in [0, inf)."""
    def var(i, j, k):
        return (i * q + j) * s + k
    rows = []

    def line(cells):
        row = [0] * (p * q * s)
        for c in cells:
            row[c] = 1
        rows.append(row)
    for i in range(p):
        for j in range(q):
            line([var(i, j, k) for k in range(s)])
    for i in range(p):
        for k in range(s):
            line([var(i, j, k) for j in range(q)])
    for j in range(q):
        for k in range(s):
            line([var(i, j, k) for i in range(p)])
    n = p * q * s
    return {"matrix": rows, "rhs": [0] * len(rows), "cost": [0] * n,
            "lower": [0] * n, "upper": [None] * n}


def run(command):
    """Runs `command`; returns its outcome and wall seconds."""
    start = time.perf_counter()
    done = subprocess.run(command, capture_output=True, text=True)
    return done, time.perf_counter() - start


def peak_kib(stderr):
    """The largest peak resident memory (KiB) that the `TIMED` wrappers reported: that of the
    largest rank, or of the one process."""
    peaks = [int(line.split()[-1]) for line in stderr.splitlines()
             if line.startswith("kernstep-peak-kib ")]
    return max(peaks, default=0)


# Each process (each rank, under mpirun) reports its own peak: mpirun's own accounting mixes
# in its daemons.
TIMED = ["/usr/bin/time", "-f", "kernstep-peak-kib %M"]


PEERS = [("one process, 1 thread", [], ["--threads", "1"]),
         ("one process, 2 threads", [], ["--threads", "2"]),
         ("mpirun -np 2, 1 thread each", MPIRUN + ["-np", "2"], ["--threads", "1"])]


def exported(cache, key):
    done, _ = run([BINARY, "cache", "export", key, "--cache-dir", cache])
    doc = json.loads(done.stdout)
    for field in ("build_seconds", "created_unix"):
        doc["metadata"].pop(field, None)
    return doc


def bench_build(model, repeats, directory):
    print(f"\n== build {os.path.basename(model)} (peak: the largest process or rank)")
    reference, base, base_peak = None, None, None
    for label, launcher, extra in PEERS:
        best, peak = None, 0
        for r in range(repeats):
            cache = tempfile.mkdtemp(dir=directory)
            done, seconds = run(launcher + TIMED + [BINARY, "build", model, "--engine",
                                                    "moves",
                                                    "--json", "--cache-dir", cache] + extra)
            if done.returncode != 0:
                raise SystemExit(f"{label}: build failed: {done.stdout}{done.stderr}")
            row = json.loads(done.stdout)["models"][0]
            doc = exported(cache, row["key"])
            if reference is None:
                reference = doc
            elif doc != reference:
                raise SystemExit(f"{label}: the stored set differs from one process's")
            best = seconds if best is None else min(best, seconds)
            peak = max(peak, peak_kib(done.stderr))
        base = base or best
        base_peak = base_peak or peak
        memory = (f"peak {peak / 1024:7.1f} MiB ({peak / base_peak:.2f})" if peak and base_peak
                  else "peak not reported")
        print(f"   {label:<30}{best:>9.2f} s{base / best:>8.2f}x   {memory}   "
              f"{len(reference['elements'])} moves, identical")
    return base, best


def bench_batch(count, repeats, directory):
    scenario = os.path.join(ROOT, "examples", "scenarios", "vell_valley.toml")
    with open(scenario, "rb") as f:
        s = tomllib.load(f)
    rng = random.Random(20261202)
    days = os.path.join(directory, "days.jsonl")
    with open(days, "w") as f:
        f.writelines(json.dumps(draw_day(s, rng, f"d{k:04d}")) + "\n" for k in range(count))
    cache = os.path.join(directory, "batch_cache")
    run([BINARY, "build", scenario, "--cache-dir", cache])
    print(f"\n== batch of {count} days of vell_valley (product lines), set cached")
    reference, base = None, None
    for label, launcher, extra in PEERS:
        best = None
        for _ in range(repeats):
            done, seconds = run(launcher + [BINARY, "batch", scenario, days, "--cache-dir",
                                            cache] + extra)
            if done.returncode not in (0, 1):
                raise SystemExit(f"{label}: batch failed: {done.stderr}")
            records = [{k: v for k, v in json.loads(line).items() if k != "seconds"}
                       for line in done.stdout.splitlines()]
            if reference is None:
                reference = records
            elif records != reference:
                raise SystemExit(f"{label}: results differ from one process's")
            best = seconds if best is None else min(best, seconds)
        base = base or best
        print(f"   {label:<30}{best * 1000 / count:>9.4f} ms/day{base / best:>8.2f}x   "
              f"{len(reference)} days, identical")


def amdahl(one, two):
    """The serial share s with speedup(2) = one / two, and the model's speedups."""
    speedup = one / two
    serial = min(1.0, max(0.0, 2.0 / speedup - 1.0))
    print(f"\nAmdahl fit of the build: serial share {serial:.2f} (2 ranks: {speedup:.2f}x)")
    for n in (8, 16, 32, 64):
        print(f"   {n:>2} ranks: {1.0 / (serial + (1.0 - serial) / n):6.2f}x (model, exchanges ignored)")


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("days", nargs="?", type=int, default=1000)
    p.add_argument("repeats", nargs="?", type=int, default=3)
    p.add_argument("--tables", default="3x3x4")
    args = p.parse_args()
    dims = [int(x) for x in args.tables.lower().split("x")]
    directory = tempfile.mkdtemp(prefix="ranks_")
    model = os.path.join(directory, f"tables_{args.tables}.json")
    with open(model, "w") as f:
        json.dump(tables(*dims), f)
    one, two = bench_build(model, args.repeats, directory)
    bench_batch(args.days, args.repeats, directory)
    amdahl(one, two)


if __name__ == "__main__":
    main()
