#!/usr/bin/env python3
"""Stable day-to-day plans: `kernstep batch --chain --change-cost W` against HiGHS kept alive
on the linearised model, on a lanes scenario and a truckloads scenario.

For each scenario (examples/scenarios/brackle_lanes.toml, examples/scenarios/hollin_trucks.toml)
the script draws DAYS feasible days (fixed seed, benches/scenario_days.py) and, in one run:
  - `kernstep batch SCENARIO DAYS --chain --change-cost W --threads 1` as a whole process with
    the test set already in the cache (a first run with `--build` stores it: the price is a
    convex cost, so a lanes network is served by its enumerated Graver basis); each day after
    the first minimises its cost plus W per unit changed against the day before, over every
    variable of the compiled model;
  - HiGHS (highspy), one thread, the program passed once and then per day only costs, bounds
    and right-hand sides changed. The program is compiled from the scenario independently by
    scripts/demo_reference.py and linearised the textbook way (Bertsimas and Tsitsiklis 1997,
    section 1.3): per variable x_j two integer columns u_j, v_j >= 0 with cost W and a row
    x_j - u_j + v_j = p_j. The previous plan p of each day is kernstep's plan of the day before
    (so both solve the same program even where a day has several optima); the first day is
    unpriced for both (u and v cost 0). Days are compiled before the clock starts.
Prints ms per day (kernstep's whole process, and the part spent solving as its records count
it), the throughput ratio against HiGHS kept, and how many days' objectives are
equal (kernstep's objective is the whole one: plan cost plus change cost). Every timing is the
best of REPEATS runs.

Usage: python3 benches/stable_plans.py [DAYS] [W] [REPEATS]
       (defaults 200, 3 and 3; needs `pip install highspy`)
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
from replan_scenarios import best_of, kernstep  # noqa: E402
from scenario_days import draw_day  # noqa: E402

SCENARIOS = ["brackle_lanes.toml", "hollin_trucks.toml"]
INF = highspy.kHighsInf


def chained_batch(path, days_path, cache, price, build=False):
    """`kernstep batch --chain --change-cost`; the records and the wall time."""
    with tempfile.TemporaryDirectory() as out_dir:
        out = os.path.join(out_dir, "plans.jsonl")
        run, wall = kernstep("batch", path, days_path, "--chain", "--change-cost", str(price),
                             "--threads", "1", "--cache-dir", cache, "--out", out,
                             *(["--build"] if build else []))
        if run.returncode not in (0, 1):
            raise SystemExit(f"kernstep batch failed: {run.stderr}")
        with open(out) as f:
            return [json.loads(line) for line in f if line.strip()], wall


def linearised(programs, priced):
    """HiGHS holding day 0's program plus u, v and a change row per priced column."""
    cols, rows = programs[0]
    h, names = ref.highs_program(cols, rows)
    h.setOptionValue("threads", 1)
    first_change = h.getNumCol()
    for j in priced:
        h.addVar(0, INF)
        h.addVar(0, INF)
        u, v = h.getNumCol() - 2, h.getNumCol() - 1
        for k in (u, v):
            h.changeColIntegrality(k, highspy.HighsVarType.kInteger)
        h.addRow(0, 0, 3, [names.index(j), u, v], [1.0, -1.0, 1.0])
    return h, names, first_change


def highs_chain(programs, plans, price):
    """HiGHS on every day, day d priced against `plans[d - 1]` (day 0 unpriced)."""
    names = list(programs[0][0])
    priced = [n for n in names if "/over" not in n and "/room" not in n]
    h, order, first_change = linearised(programs, priced)
    assert order == names
    n_rows = len(programs[0][1])
    every, every_row = list(range(len(names))), list(range(n_rows))
    change_cols = list(range(first_change, first_change + 2 * len(priced)))
    change_rows = list(range(n_rows, n_rows + len(priced)))
    days = []
    for d, (cols_d, rows_d) in enumerate(programs):
        assert list(cols_d) == names, "the column order is the same every day"
        previous = plans[d - 1] if d else {}
        p = [float(previous.get(n, 0)) for n in priced]
        days.append((
            [float(cols_d[n][0]) for n in names],
            [float(cols_d[n][1]) for n in names],
            [INF if cols_d[n][2] is None else float(cols_d[n][2]) for n in names],
            [float(r) for _, r in rows_d],
            [float(price if d else 0)] * len(change_cols),
            p,
        ))
    objectives = []
    start = time.perf_counter()
    for cost, lower, upper, rhs, change_cost, p in days:
        h.changeColsCost(len(every), every, cost)
        h.changeColsBounds(len(every), every, lower, upper)
        h.changeRowsBounds(len(every_row), every_row, rhs, rhs)
        h.changeColsCost(len(change_cols), change_cols, change_cost)
        h.changeRowsBounds(len(change_rows), change_rows, p, p)
        h.run()
        if h.getModelStatus() == highspy.HighsModelStatus.kOptimal:
            objectives.append(round(h.getInfo().objective_function_value))
        else:
            objectives.append(None)
    return objectives, time.perf_counter() - start


def main():
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 200
    price = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    repeats = int(sys.argv[3]) if len(sys.argv) > 3 else 3
    subprocess.run(["cargo", "build", "--release"], cwd=ROOT, check=True, capture_output=True)
    rng = random.Random(20261226)
    print(f"HiGHS {highspy.Highs().version()} (highspy), one thread, linearised model kept; "
          f"{count} chained days, change price {price} per unit, best of {repeats} runs")
    print(f"{'scenario':<28}{'method':<40}{'ms/day':>10}{'vs HiGHS kept':>15}")
    for file in SCENARIOS:
        path = os.path.join(ROOT, "examples", "scenarios", file)
        with open(path, "rb") as f:
            s = tomllib.load(f)
        days = [draw_day(s, rng, f"d{k:04d}") for k in range(count)]
        base = ref.tables(s)
        programs = [ref.program(s, ref.day_tables(base, change)) for change in days]
        with tempfile.TemporaryDirectory() as tmp:
            days_path = os.path.join(tmp, "days.jsonl")
            with open(days_path, "w") as f:
                f.writelines(json.dumps(d) + "\n" for d in days)
            cache = os.path.join(tmp, "cache")
            chained_batch(path, days_path, cache, price, build=True)
            records, wall = best_of(repeats, lambda: chained_batch(path, days_path, cache, price))
        plans = [r["plan"] or {} for r in records]
        ours = [int(r["objective"]) if r["status"] == "optimal" else None for r in records]
        theirs, highs_s = best_of(repeats, lambda: highs_chain(programs, plans, price))
        equal = sum(a == b and a is not None for a, b in zip(ours, theirs))
        moved = sum(int(r["change"]["priced"]["moved"]) for r in records if r.get("change"))
        name = f"{s['kind']} ({file.split('.')[0]})"
        base_ms = highs_s / count * 1000
        ms = wall / count * 1000
        print(f"{name:<28}{'HiGHS, linearised model kept':<40}{base_ms:>10.4f}{1.0:>14.1f}x")
        print(f"{name:<28}{'kernstep batch --chain --change-cost':<40}{ms:>10.4f}"
              f"{base_ms / ms:>14.1f}x   equal objectives {equal}/{count}")
        solve_ms = sum(r["seconds"] for r in records) / count * 1000
        print(f"{name:<28}{'  of which solving (records seconds)':<40}{solve_ms:>10.4f}"
              f"{base_ms / solve_ms:>14.1f}x")
        print(f"{name:<28}({moved} units moved over the chain; kernstep whole process, "
              f"set cached)")


if __name__ == "__main__":
    main()
