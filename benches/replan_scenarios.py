#!/usr/bin/env python3
"""Daily re-planning throughput: `kernstep batch` on scenario and day files against HiGHS.

For each example scenario in examples/scenarios/ (one per kind: lanes, product_lines,
truckloads) the script draws DAYS feasible days (fixed seed) and writes them as a named day
file (JSON Lines, the README's "Daily variants" schema). Then, in one run:
  - HiGHS (highspy), best re-optimisation mode: the day-0 program passed once, then per day
    only costs, column bounds and row bounds changed, one thread. Each day's program is
    compiled from the scenario by scripts/demo_reference.py (an independent Python reading of
    the schema) before the clock starts, so HiGHS is timed on solving only;
  - `kernstep batch SCENARIO DAYS --threads T` as a whole process with the test set already
    in the cache (reading both files, loading the set, preparing, solving, writing every
    plan), T = 1 and 2; and once with an empty cache and `--build` (set built in the run);
and prints per-day times, the throughput ratio against HiGHS kept, and how many optima agree.
Every timing is the best of REPEATS runs (HiGHS over all days, each kernstep process), so a
busy moment of a shared machine does not decide a ratio.

Usage: python3 benches/replan_scenarios.py [DAYS] [REPEATS]
       (defaults 1000 and 5; needs `pip install highspy`)
"""

import json
import os
import random
import subprocess
import sys
import tempfile
import time
import tomllib

import highspy

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "scripts"))
sys.path.insert(0, os.path.join(ROOT, "benches"))
import demo_reference as ref  # noqa: E402
from scenario_days import SCENARIOS, draw_day  # noqa: E402

INF = highspy.kHighsInf


def compiled_days(s, days):
    """Per day the program as arrays in one fixed column and row order."""
    base = ref.tables(s)
    out = []
    for change in days:
        cols, rows = ref.program(s, ref.day_tables(base, change))
        out.append((cols, rows))
    return out


def best_of(repeats, run):
    """The result of the fastest of `repeats` calls of `run`, which returns (result, seconds)."""
    return min((run() for _ in range(repeats)), key=lambda r: r[1])


def highs_kept(programs):
    h, names = ref.highs_program(*programs[0])
    h.setOptionValue("threads", 1)
    rows = programs[0][1]
    every = list(range(len(names)))
    every_row = list(range(len(rows)))
    numbers = []
    for cols_d, rows_d in programs:
        assert list(cols_d) == names, "the column order is the same every day"
        numbers.append(([float(cols_d[n][0]) for n in names],
                        [float(cols_d[n][1]) for n in names],
                        [INF if cols_d[n][2] is None else float(cols_d[n][2]) for n in names],
                        [float(r) for _, r in rows_d]))
    objectives = []
    start = time.perf_counter()
    for cost, lower, upper, rhs in numbers:
        h.changeColsCost(len(every), every, cost)
        h.changeColsBounds(len(every), every, lower, upper)
        h.changeRowsBounds(len(every_row), every_row, rhs, rhs)
        h.run()
        if h.getModelStatus() == highspy.HighsModelStatus.kOptimal:
            objectives.append(round(h.getInfo().objective_function_value))
        else:
            objectives.append(None)
    return objectives, time.perf_counter() - start, h.version()


def kernstep(*args):
    binary = os.path.join(ROOT, "target", "release", "kernstep")
    start = time.perf_counter()
    run = subprocess.run([binary, *args], capture_output=True, text=True)
    return run, time.perf_counter() - start


def batch(scenario, days_path, cache, threads, build=False):
    with tempfile.TemporaryDirectory() as out_dir:
        out = os.path.join(out_dir, "plans.jsonl")
        run, wall = kernstep("batch", scenario, days_path, "--threads", str(threads),
                             "--cache-dir", cache, "--out", out, *(["--build"] if build else []))
        if run.returncode not in (0, 1):
            raise SystemExit(f"kernstep batch failed: {run.stderr}")
        with open(out) as f:
            results = [json.loads(line) for line in f if line.strip()]
    objectives = [int(r["objective"]) if r["status"] == "optimal" else None for r in results]
    return objectives, wall


def main():
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    repeats = int(sys.argv[2]) if len(sys.argv) > 2 else 5
    subprocess.run(["cargo", "build", "--release"], cwd=ROOT, check=True, capture_output=True)
    rng = random.Random(20261202)
    print(f"HiGHS {highspy.Highs().version()} (highspy), one thread, model kept; "
          f"{count} days per scenario, best of {repeats} runs")
    print(f"{'scenario':<30}{'method':<42}{'ms/day':>10}{'vs HiGHS kept':>15}")
    for file in SCENARIOS:
        path = os.path.join(ROOT, "examples", "scenarios", file)
        with open(path, "rb") as f:
            s = tomllib.load(f)
        days = [draw_day(s, rng, f"d{k:04d}") for k in range(count)]
        programs = compiled_days(s, days)
        kept, kept_s = best_of(repeats, lambda: highs_kept(programs)[:2])
        name = f"{s['kind']} ({file.split('.')[0]})"
        with tempfile.TemporaryDirectory() as tmp:
            days_path = os.path.join(tmp, "days.jsonl")
            with open(days_path, "w") as f:
                f.writelines(json.dumps(d) + "\n" for d in days)
            colds = iter(range(repeats))
            cold, cold_s = best_of(repeats, lambda: batch(
                path, days_path, os.path.join(tmp, f"cold{next(colds)}"), 1, build=True))
            warm_cache = os.path.join(tmp, "warm")
            built, build_s = kernstep("build", path, "--cache-dir", warm_cache)
            if built.returncode != 0:
                raise SystemExit(f"kernstep build failed: {built.stderr}")
            warm = [best_of(repeats, lambda: batch(path, days_path, warm_cache, t))
                    for t in (1, 2)]
        base = kept_s / count * 1000
        rows = [("HiGHS, model kept (best mode)", kept_s, kept)]
        rows += [(f"kernstep batch, {t} thread(s), set cached", w, o)
                 for t, (o, w) in zip((1, 2), warm)]
        rows.append(("kernstep batch, 1 thread, empty cache", cold_s, cold))
        for label, seconds, objectives in rows:
            ms = seconds / count * 1000
            equal = sum(a == b for a, b in zip(objectives, kept))
            print(f"{name:<30}{label:<42}{ms:>10.4f}{base / ms:>14.1f}x"
                  f"   equal optima {equal}/{count}")
        optimal = sum(o is not None for o in kept)
        print(f"{name:<30}(HiGHS optimal on {optimal}/{count} days; `kernstep build` alone "
              f"{build_s:.3f} s)")


if __name__ == "__main__":
    main()
