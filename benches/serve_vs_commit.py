#!/usr/bin/env python3
"""Solving from a warm cache against the release before a change, side by side in one run.

Builds the `kernstep` binary of REV (default HEAD~1) from `git archive` in a temporary
directory and the working tree's own, writes the three-way tables model P x Q x S (line sums
fixed; benches/ranks.py) with the numbers of one day (the line sums of a table drawn with a
fixed seed, costs drawn from [-20, 20]), stores its Graver basis in a cache directory (built
once by this tree's binary, or reused with --cache; REV gets a cache of its own, built by
itself, when it cannot read this tree's), checks that both binaries print the same optimum,
then times `kernstep solve MODEL --cache-dir DIR` of both with farm-bench (A = this tree,
B = REV; runs alternate A B A B, ratios taken pair by pair). Quote the medians of `A/B wall`
and the peak memory of each.

Usage: python3 benches/serve_vs_commit.py [REV] [--tables 3x3x5] [--runs N] [--cache DIR]
       [--threads T]   (defaults HEAD~1, 3x3x5, 11, a new directory, 2 threads to build)
"""

import argparse
import json
import os
import random
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "benches"))
from build_vs_commit import build_release, checkout  # noqa: E402
from ranks import tables  # noqa: E402


def day_model(p, q, s, seed=7):
    """The P x Q x S tables model with the line sums of a random table and random costs."""
    rng = random.Random(seed)
    model = tables(p, q, s)
    n = p * q * s
    table = [rng.randint(0, 9) for _ in range(n)]
    model["rhs"] = [sum(a * x for a, x in zip(row, table)) for row in model["matrix"]]
    model["cost"] = [rng.randint(-20, 20) for _ in range(n)]
    return model


def solve(binary, model, cache):
    """The objective and plan `solve --json` prints, or None when the solve failed."""
    done = subprocess.run([binary, "solve", model, "--cache-dir", cache, "--json"],
                          capture_output=True, text=True)
    if done.returncode != 0:
        return None
    document = json.loads(done.stdout)
    return int(document["objective"]), [int(v) for v in document["x"]]


def ensure_cache(binary, model, cache, threads):
    """Stores the model's set in `cache` with `binary` unless it is there already."""
    subprocess.run([binary, "build", model, "--cache-dir", cache, "--progress", "none",
                    "--threads", str(threads)], capture_output=True, check=True)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("rev", nargs="?", default="HEAD~1")
    parser.add_argument("--tables", default="3x3x5")
    parser.add_argument("--runs", type=int, default=11)
    parser.add_argument("--cache")
    parser.add_argument("--threads", type=int, default=2)
    args = parser.parse_args()
    work = tempfile.mkdtemp(prefix="kernstep-serve-")
    base_source = os.path.join(work, "base")
    os.mkdir(base_source)
    checkout(args.rev, base_source)
    base = build_release(base_source, os.path.join(work, "base-target"))
    new = build_release(ROOT, os.path.join(ROOT, "target"))
    p, q, s = (int(x) for x in args.tables.split("x"))
    model = os.path.join(work, f"tables_{args.tables}.json")
    with open(model, "w") as f:
        json.dump(day_model(p, q, s), f)
    cache = args.cache or os.path.join(work, "cache")
    ensure_cache(new, model, cache, args.threads)
    base_cache = cache
    if solve(base, model, cache) is None:
        base_cache = os.path.join(work, "base-cache")
        print(f"{args.rev} cannot read this tree's cache: it builds its own", flush=True)
        ensure_cache(base, model, base_cache, args.threads)
    a, b = solve(new, model, cache), solve(base, model, base_cache)
    print(f"\n== {args.tables} tables: same optimum: {a == b} (objective {a and a[0]})",
          flush=True)
    if a is None or a != b:
        sys.exit(f"{args.tables}: the answers differ between {args.rev} and this tree")
    command = ["solve", model, "--cache-dir"]
    subprocess.run(["farm-bench", "-n", str(args.runs), "--warmup", "1",
                    "--vs", " ".join([base] + command + [base_cache]),
                    "--", new] + command + [cache], check=True)


if __name__ == "__main__":
    main()
