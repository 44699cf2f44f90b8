#!/usr/bin/env python3
"""The overnight build against the release before a change, side by side in one run.

Builds the `kernstep` binary of REV (default HEAD~1) from `git archive` in a temporary
directory and the working tree's own, writes the three-way tables models P x Q x S (line sums
fixed; benches/ranks.py), then for each model and thread count times `kernstep build MODEL
--out FILE` of both binaries with farm-bench (A = this tree, B = REV; runs alternate A B A B,
ratios taken pair by pair) and checks that both wrote the same set, element by element in the
same order. Prints farm-bench's report: quote the medians of `A/B wall` and the peaks.

Usage: python3 benches/build_vs_commit.py [REV] [--tables 3x3x4,3x3x5] [--threads 1,2]
       [--runs N] [--timeout S]   (defaults HEAD~1, 3x3x4, 1,2, 5, 600)
"""

import argparse
import json
import os
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "benches"))
from ranks import tables  # noqa: E402


def build_release(source, target):
    """`cargo build --release` of the binary in `source` into `target`; its path."""
    subprocess.run(["cargo", "build", "--release", "--quiet", "--bin", "kernstep"],
                   cwd=source, env={**os.environ, "CARGO_TARGET_DIR": target}, check=True)
    return os.path.join(target, "release", "kernstep")


def checkout(rev, into):
    """The files of commit `rev` in the directory `into`."""
    archive = subprocess.run(["git", "archive", rev], cwd=ROOT, capture_output=True, check=True)
    subprocess.run(["tar", "-x", "-C", into], input=archive.stdout, check=True)


def elements(binary, model, threads, out):
    """The elements `build --out` writes for `model`."""
    subprocess.run([binary, "build", model, "--out", out, "--progress", "none",
                    "--threads", str(threads)], capture_output=True, check=True)
    with open(out) as f:
        return json.load(f)["elements"]


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("rev", nargs="?", default="HEAD~1")
    parser.add_argument("--tables", default="3x3x4")
    parser.add_argument("--threads", default="1,2")
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--timeout", type=int, default=600)
    args = parser.parse_args()
    work = tempfile.mkdtemp(prefix="kernstep-vs-")
    base_source = os.path.join(work, "base")
    os.mkdir(base_source)
    checkout(args.rev, base_source)
    base = build_release(base_source, os.path.join(work, "base-target"))
    new = build_release(ROOT, os.path.join(ROOT, "target"))
    for shape in args.tables.split(","):
        p, q, s = (int(x) for x in shape.split("x"))
        model = os.path.join(work, f"tables_{shape}.json")
        with open(model, "w") as f:
            json.dump(tables(p, q, s), f)
        for threads in args.threads.split(","):
            a_out, b_out = os.path.join(work, "a.json"), os.path.join(work, "b.json")
            same = elements(new, model, threads, a_out) == elements(base, model, threads, b_out)
            print(f"\n== {shape} tables, {threads} thread(s): sets identical: {same}", flush=True)
            if not same:
                sys.exit(f"{shape}: the sets differ between {args.rev} and this tree")
            command = ["build", model, "--progress", "none", "--threads", threads, "--out"]
            subprocess.run(["farm-bench", "-n", str(args.runs), "--warmup", "0",
                            "--timeout", str(args.timeout),
                            "--vs", " ".join([base] + command + [b_out]),
                            "--", new] + command + [a_out], check=True)


if __name__ == "__main__":
    main()
