#!/usr/bin/env python3
"""Fingerprints of what the solver selects, to compare before and after a change to the scan.

For each example scenario the script draws the same DAYS days as benches/replan_scenarios.py
(same generator, same seed), runs `kernstep batch` on them with 1 and 2 threads, and prints
one digest per run of every day's status, objective, step count and plan (times left out).
A change to the solver's hot path must leave every digest as it was: run the script on the
old and the new build and compare the lines.

Usage: python3 benches/selections.py [DAYS] [ENGINE]
       (default 1000 days and `auto`; ENGINE `moves` solves the lane network with its
       enumerated Graver basis, as before the network engine; builds the release binary)
"""

import hashlib
import json
import os
import random
import subprocess
import sys
import tempfile
import tomllib

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "benches"))
from scenario_days import SCENARIOS, draw_day  # noqa: E402


def main():
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    engine = sys.argv[2] if len(sys.argv) > 2 else "auto"
    subprocess.run(["cargo", "build", "--release"], cwd=ROOT, check=True, capture_output=True)
    binary = os.path.join(ROOT, "target", "release", "kernstep")
    rng = random.Random(20261202)
    with tempfile.TemporaryDirectory() as tmp:
        for file in SCENARIOS:
            path = os.path.join(ROOT, "examples", "scenarios", file)
            with open(path, "rb") as f:
                s = tomllib.load(f)
            days = [draw_day(s, rng, f"d{k:04d}") for k in range(count)]
            days_path = os.path.join(tmp, "days.jsonl")
            with open(days_path, "w") as f:
                f.writelines(json.dumps(d) + "\n" for d in days)
            for threads in (1, 2):
                out = os.path.join(tmp, "plans.jsonl")
                run = subprocess.run([binary, "batch", path, days_path, "--threads", str(threads),
                                      "--cache-dir", os.path.join(tmp, "cache"), "--build", "--engine", engine,
                                      "--out", out], capture_output=True, text=True)
                if run.returncode not in (0, 1):
                    raise SystemExit(f"kernstep batch failed: {run.stderr}")
                digest = hashlib.sha256()
                with open(out) as f:
                    for line in f:
                        record = old_shape(json.loads(line))
                        record.pop("seconds", None)
                        digest.update(json.dumps(record, sort_keys=True).encode())
                print(f"{file:<22} {threads} thread(s)  {count} days  {digest.hexdigest()[:16]}")


def old_shape(record):
    """A day record in the layout the digests were first taken of: no schema field, the
    objective and plan values as JSON numbers (kernstep.day/1 writes them as decimal
    strings), so that the digests compare answers, not spellings."""
    record.pop("schema", None)
    if record.get("objective") is not None:
        record["objective"] = int(record["objective"])
    if record.get("plan") is not None:
        record["plan"] = {name: int(v) for name, v in record["plan"].items()}
    return record


if __name__ == "__main__":
    main()
