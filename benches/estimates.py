#!/usr/bin/env python3
"""Build estimates against real counts: `analyze --estimate PROBE` beside the finished build.

Reference sets (issue 21): the three-way tables 3x3x4 and 3x3x5 (line sums fixed, every cell
>= 0; the model of benches/ranks.py), the incidence matrix of K_{6,6} enumerated (its Graver
basis is its circuits: sum_k C(6,k)^2 k! (k-1)! / 2 = 113,865, the standard cycle count), and
a 6 x 20 lane plan (benches/network_scenarios.py, seed 20261202) up to norm 8. For each: the
estimate (moves, seconds, low and high ends), the real count (from `build --out`, or the
formula for K_{6,6}), the ratio estimate / real, and whether the range holds the real count.
Prints a line per set and the largest ratio either way; the goal is within 3x.

Usage: python3 benches/estimates.py [--probe SECONDS] [--skip-slow]
  --skip-slow  leaves out the two builds of several minutes (3x3x5 tables, the lane plan)
"""

import argparse
import json
import math
import os
import random
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "benches"))
from ranks import tables  # noqa: E402  (the three-way tables model)

BINARY = os.path.join(ROOT, "target", "release", "kernstep")


def complete_bipartite(p, q):
    """The node-arc incidence matrix of K_{p,q}, arcs from the p side to the q side."""
    rows = [[(1 if i == v else 0) - (1 if p + j == v else 0) for i in range(p) for j in range(q)]
            for v in range(p + q)]
    return {"matrix": rows, "rhs": [0] * (p + q)}


def circuits_of_complete_bipartite(p, q):
    """sum_k C(p,k) C(q,k) k! (k-1)! / 2: the cycles of K_{p,q} (standard count, OEIS A070968)."""
    return sum(math.comb(p, k) * math.comb(q, k) * math.factorial(k) * math.factorial(k - 1) // 2
               for k in range(2, min(p, q) + 1))


def run(*args):
    out = subprocess.run([BINARY, *args], capture_output=True, text=True)
    if out.returncode != 0:
        sys.exit(f"kernstep {' '.join(args)} failed ({out.returncode}): {out.stderr.strip()}")
    return out.stdout


def real_count(path, extra, directory):
    out = os.path.join(directory, "set.json")
    started = time.monotonic()
    run("build", path, "--engine", "moves", "--out", out, "--progress", "none", *extra)
    seconds = time.monotonic() - started
    with open(out) as f:
        return len(json.load(f)["elements"]), seconds


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--probe", type=float, default=20.0)
    p.add_argument("--skip-slow", action="store_true")
    args = p.parse_args()
    subprocess.run(["cargo", "build", "--release"], cwd=ROOT, check=True, capture_output=True)
    directory = tempfile.mkdtemp(prefix="estimates_")
    cases = [("tables 3x3x4", tables(3, 3, 4), None, None),
             ("K_{6,6}", complete_bipartite(6, 6), None, circuits_of_complete_bipartite(6, 6))]
    if not args.skip_slow:
        import network_scenarios as ns
        lanes = ns.to_toml(ns.make_scenario(6, 20, random.Random(20261202)))
        cases += [("tables 3x3x5", tables(3, 3, 5), None, None),
                  ("lanes 6x20 up to norm 8", lanes, 8, None)]
    worst = 1.0
    print(f"{'set':<26} {'estimate':>10} {'low':>10} {'high':>10} {'real':>10} {'ratio':>6} "
          f"{'in range':>8} {'est. s':>8} {'real s':>8}")
    for name, model, up_to, known in cases:
        suffix = ".toml" if isinstance(model, str) else ".json"
        path = os.path.join(directory, name.split()[0] + name.split()[-1].replace(",", "") + suffix)
        with open(path, "w") as f:
            f.write(model if isinstance(model, str) else json.dumps(model))
        extra = ["--up-to", str(up_to)] if up_to else []
        report = json.loads(run("analyze", path, "--estimate", f"{args.probe}s", "--json",
                                *extra))
        estimate = report["build_estimate"]
        figures = estimate.get("up_to_norm" if up_to else "complete")
        if figures is None:
            print(f"{name:<26} the probe finished too little to extrapolate from")
            continue
        build_extra = ["--norm-limit", str(up_to)] if up_to else ["--norm-limit", "none"]
        if known is None:
            real, real_seconds = real_count(path, build_extra, directory)
        else:
            real, real_seconds = known, float("nan")
        value = int(figures["elements"])
        ratio = value / real
        worst = max(worst, ratio, 1 / ratio)
        inside = int(figures["low"]["elements"]) <= real <= int(figures["high"]["elements"])
        print(f"{name:<26} {value:>10} {figures['low']['elements']:>10} "
              f"{figures['high']['elements']:>10} {real:>10} {ratio:>6.2f} {str(inside):>8} "
              f"{figures['seconds']:>8.1f} {real_seconds:>8.1f}"
              + ("  (measured in the probe)" if estimate["measured"] else ""))
    print(f"largest ratio either way: {worst:.2f} (goal: at most 3)")


if __name__ == "__main__":
    main()
