#!/usr/bin/env python3
"""The overnight build against the release before a change, side by side in one run.

Builds the `kernstep` binary of REV (default HEAD~1) from `git archive` in a temporary
directory and the working tree's own, writes the three-way tables models P x Q x S (line sums
fixed; benches/ranks.py), then for each model and thread count times `kernstep build MODEL
--out FILE` of both binaries with farm-bench (A = this tree, B = REV; runs alternate A B A B,
ratios taken pair by pair) and checks that both wrote the same set, element by element in the
same order. Prints farm-bench's report: quote the medians of `A/B wall` and the peaks.

With `--transport RxS,...` it also builds the R x S transportation matrices (the complete
bipartite graph K_{R,S}; its Graver basis is its cycles) with `--engine moves`, so that the
enumerated set is built rather than the implicit cycle entry.

Usage: python3 benches/build_vs_commit.py [REV] [--tables 3x3x4,3x3x5] [--transport 6x6]
       [--threads 1,2] [--runs N] [--timeout S]   (defaults HEAD~1, 3x3x4, none, 1,2, 5, 600)
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


def transport(r, s):
    """The R x S transportation model: one row per row sum and per column sum."""
    rows = [[1 if c // s == i else 0 for c in range(r * s)] for i in range(r)]
    rows += [[1 if c % s == j else 0 for c in range(r * s)] for j in range(s)]
    n = r * s
    return {"matrix": rows, "rhs": [0] * len(rows), "cost": [0] * n,
            "lower": [0] * n, "upper": [None] * n}


def elements(binary, command):
    """The elements `build ... --out FILE` writes."""
    subprocess.run([binary] + command, capture_output=True, check=True)
    with open(command[-1]) as f:
        return json.load(f)["elements"]


def quiet(binary):
    """`--progress none` when `binary` has that option (releases before it print no progress)."""
    help_text = subprocess.run([binary, "build", "--help"], capture_output=True, text=True).stdout
    return ["--progress", "none"] if "--progress" in help_text else []


def compare(base, new, label, model, extra, args, work):
    """Checks that both binaries build the same set of `model`, then times them."""
    for threads in args.threads.split(","):
        command = ["build", model, "--threads", threads] + extra
        a = command + quiet(new) + ["--out", os.path.join(work, "a.json")]
        b = command + quiet(base) + ["--out", os.path.join(work, "b.json")]
        same = elements(new, a) == elements(base, b)
        print(f"\n== {label}, {threads} thread(s): sets identical: {same}", flush=True)
        if not same:
            sys.exit(f"{label}: the sets differ between {args.rev} and this tree")
        subprocess.run(["farm-bench", "-n", str(args.runs), "--warmup", "0",
                        "--timeout", str(args.timeout),
                        "--vs", " ".join([base] + b), "--", new] + a, check=True)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("rev", nargs="?", default="HEAD~1")
    parser.add_argument("--tables", default="3x3x4")
    parser.add_argument("--transport", default="")
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
    models = [(f"{shape} tables", tables, shape, []) for shape in args.tables.split(",") if shape]
    models += [(f"{shape} transport", transport, shape, ["--engine", "moves"])
               for shape in args.transport.split(",") if shape]
    for label, make, shape, extra in models:
        model = os.path.join(work, f"{label.replace(' ', '_')}.json")
        with open(model, "w") as f:
            json.dump(make(*(int(x) for x in shape.split("x"))), f)
        compare(base, new, label, model, extra, args, work)


if __name__ == "__main__":
    main()
