#!/usr/bin/env python3
"""From Python: kernstep's package against HiGHS kept alive, over the same variants, in one run.

Two families:
  - the 3x3x4 tables with all 2-margins (36 variables, 33 rows, entries >= 0; a Graver basis
    of 19,722 moves built once into a temporary cache before the clock starts);
  - the invented lanes scenario of 6 depots x 20 zones that benches/estimates.py uses
    (benches/network_scenarios.py, seed 20261202), compiled into its model (a network matrix,
    solved along its cycles, no stored set).
and two workloads of VARIANTS variants each (fixed seeds):
  - days: what a planner re-optimises each morning, a few numbers changed from the model's:
    the right-hand side of the model's optimum with 3 entries moved by -2..2 (inside the
    bounds), 3 costs redrawn, and on every fourth day one capacity set near its flow;
  - random: every number redrawn: the right-hand side of a random point inside the box
    (entries 0..5 for the tables, 0..capacity or 25 for the lanes), every cost redrawn, and
    upper bounds near that point on every third variant (every other for the tables).
For each family and workload, in one run:
  - HiGHS (highspy) in its best re-optimisation mode: one model passed once, then per variant
    only the row bounds, costs and column bounds changed, one thread, `run()`;
  - kernstep, a loop of `TestSet.solve` (one call per variant);
  - kernstep, one `TestSet.solve_many` of all the variants, with 1 thread and with one thread
    per core.
Every timing is the median of REPEATS runs. The script prints microseconds per variant, the
ratio HiGHS / kernstep, and how many variants have the same optimum as HiGHS (a different
optimum, or a status other than optimal, counts as unequal and makes the exit code 1).

Usage: python3 benches/python_vs_highs.py [VARIANTS] [REPEATS]   (defaults 1000 and 3)
Needs the package (`pip install ./python`), numpy and highspy.
"""

from __future__ import annotations

import os
import random
import statistics
import sys
import tempfile
import time

import highspy
import numpy as np

import kernstep

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
import network_scenarios as ns  # noqa: E402


def three_way(p, q, s):
    """The p x q x s tables with all 2-margins (as benches/completion.rs builds them)."""
    var = lambda i, j, k: (i * q + j) * s + k  # noqa: E731
    lines = ([[var(i, j, k) for k in range(s)] for i in range(p) for j in range(q)]
             + [[var(i, j, k) for j in range(q)] for i in range(p) for k in range(s)]
             + [[var(i, j, k) for i in range(p)] for j in range(q) for k in range(s)])
    a = np.zeros((len(lines), p * q * s), dtype=np.int64)
    for r, cells in enumerate(lines):
        a[r, cells] = 1
    return a


INT64_MAX = np.iinfo(np.int64).max


def tables_model(cache):
    a = three_way(3, 3, 4)
    n = a.shape[1]
    rng = np.random.default_rng(1234)
    model = kernstep.Model(a, b=a @ rng.integers(0, 6, size=n), c=rng.integers(1, 10, size=n),
                           lower=0)
    return model, kernstep.TestSet.build(model, cache_dir=cache, progress=False), 6, 9


def lanes_model(directory):
    path = os.path.join(directory, "lanes_6x20.toml")
    with open(path, "w") as out:
        out.write(ns.to_toml(ns.make_scenario(6, 20, random.Random(20261202))))
    model = kernstep.Model.from_file(path)
    return model, kernstep.TestSet.load(model), 26, 29


def upper_array(model):
    """The model's upper bounds with INT64_MAX for none."""
    return np.array([INT64_MAX if v is None else v for v in model.upper], dtype=np.int64)


def with_none(u):
    """Upper bounds as objects with None for none (how a caller passes them)."""
    return np.where(u == INT64_MAX, None, u).astype(object)


def days(model, testset, count, seed, cost_top):
    """A few numbers changed from the model's per variant (see the module documentation)."""
    rng = np.random.default_rng(seed)
    n = model.shape[1]
    base = testset.solve().x
    cap = upper_array(model)
    limited = np.flatnonzero(cap != INT64_MAX)
    b, c, u = [], [], []
    for k in range(count):
        x = base.copy()
        moved = rng.choice(n, 3, replace=False)
        x[moved] = np.clip(x[moved] + rng.integers(-2, 3, size=3), 0, cap[moved])
        cost = model.c.copy()
        cost[rng.choice(n, 3, replace=False)] = rng.integers(1, cost_top + 1, size=3)
        upper = cap.copy()
        if k % 4 == 0 and limited.size:
            j = rng.choice(limited)
            upper[j] = x[j] + rng.integers(0, 3)
        b.append(model.A @ x)
        c.append(cost)
        u.append(upper)
    return np.array(b), np.array(c), with_none(np.array(u))


def random_variants(model, count, seed, point_top, cost_top, every):
    """Every number redrawn per variant (see the module documentation)."""
    rng = np.random.default_rng(seed)
    n = model.shape[1]
    cap = upper_array(model)
    points = rng.integers(0, np.minimum(cap, point_top) + 1, size=(count, n))
    c = rng.integers(0, cost_top + 1, size=(count, n))
    u = np.tile(cap, (count, 1))
    near = points + rng.integers(0, 4, size=(count, n))
    cut = np.arange(count) % every == 0
    u[cut] = np.minimum(u[cut], near[cut])
    return points @ model.A.T, c, with_none(u)


def highs_kept(model, b, c, u):
    """HiGHS with one model kept alive; per variant the numbers only. ([objective], s)."""
    m, n = model.shape
    inf = highspy.kHighsInf
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.setOptionValue("threads", 1)
    h.setOptionValue("mip_rel_gap", 0.0)
    a = model.A
    lp = highspy.HighsLp()
    lp.num_col_, lp.num_row_ = n, m
    lp.col_cost_ = np.zeros(n)
    lp.col_lower_ = np.array([-inf if v is None else v for v in model.lower], dtype=float)
    lp.col_upper_ = np.array([inf if v is None else v for v in model.upper], dtype=float)
    lp.row_lower_ = lp.row_upper_ = np.zeros(m)
    starts, index, value = [0], [], []
    for j in range(n):
        rows = np.flatnonzero(a[:, j])
        index += rows.tolist()
        value += a[rows, j].astype(float).tolist()
        starts.append(len(index))
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.start_, lp.a_matrix_.index_, lp.a_matrix_.value_ = starts, index, value
    lp.integrality_ = [highspy.HighsVarType.kInteger] * n
    h.passModel(lp)
    cols = np.arange(n, dtype=np.int32)
    rows = np.arange(m, dtype=np.int32)
    lower = np.array(lp.col_lower_)
    uppers = np.array([[inf if v is None else float(v) for v in row] for row in u])
    bf, cf = b.astype(float), c.astype(float)
    out = []
    start = time.perf_counter()
    for k in range(len(b)):
        h.changeRowsBounds(m, rows, bf[k], bf[k])
        h.changeColsCost(n, cols, cf[k])
        h.changeColsBounds(n, cols, lower, uppers[k])
        h.run()
        if h.getModelStatus() != highspy.HighsModelStatus.kOptimal:
            out.append(None)
        else:
            # highspy returns floats (and -0.0): round before comparing.
            out.append(int(round(h.getInfo().objective_function_value)))
    return out, time.perf_counter() - start


def kernstep_loop(testset, b, c, u):
    out = []
    start = time.perf_counter()
    for k in range(len(b)):
        result = testset.solve(b=b[k], c=c[k], upper=u[k])
        out.append(result.objective if result.status == kernstep.Status.OPTIMAL else None)
    return out, time.perf_counter() - start


def kernstep_many(testset, b, c, u, threads):
    start = time.perf_counter()
    batch = testset.solve_many(B=b, C=c, U=u, threads=threads)
    seconds = time.perf_counter() - start
    optimal = batch.status == kernstep.Status.OPTIMAL
    return [int(v) if ok else None for v, ok in zip(batch.objective, optimal)], seconds


def median_run(run, repeats):
    """The answers of the first run and the median seconds of `repeats` runs."""
    answers, times = None, []
    for _ in range(repeats):
        out, seconds = run()
        answers = answers or out
        times.append(seconds)
    return answers, statistics.median(times)


def compare(title, model, testset, b, c, u, repeats, cores):
    """Times every peer on the variants and prints one table; True when all are equal."""
    count = len(b)
    highs, highs_s = median_run(lambda: highs_kept(model, b, c, u), repeats)
    runs = [
        ("solve loop", lambda: kernstep_loop(testset, b, c, u)),
        ("solve_many, 1 thread", lambda: kernstep_many(testset, b, c, u, 1)),
        (f"solve_many, {cores} threads", lambda: kernstep_many(testset, b, c, u, cores)),
    ]
    m, n = model.shape
    print(f"\n{title}: {m} rows x {n} variables, {len(testset)} stored moves "
          f"({testset.kind}), {count} variants, median of {repeats} runs")
    print(f"  {'peer':<24} {'us/variant':>11} {'HiGHS/this':>11} {'equal optima':>13}")
    print(f"  {'HiGHS kept alive':<24} {highs_s / count * 1e6:>11.1f} {'1':>10}x "
          f"{sum(v is not None for v in highs):>8} opt.")
    equal_all = True
    for label, run in runs:
        answers, seconds = median_run(run, repeats)
        equal = sum(a == h and h is not None for a, h in zip(answers, highs))
        equal_all &= equal == count
        print(f"  {label:<24} {seconds / count * 1e6:>11.1f} "
              f"{highs_s / seconds:>10.0f}x {equal:>8}/{count}")
    return equal_all


def main():
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    repeats = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    cores = os.cpu_count() or 1
    equal = True
    with tempfile.TemporaryDirectory() as directory:
        families = [("3x3x4 tables", tables_model(directory)),
                    ("lanes 6x20", lanes_model(directory))]
        for name, (model, testset, point_top, cost_top) in families:
            every = 2 if name.startswith("3x3x4") else 3
            workloads = [
                ("days", days(model, testset, count, 7, cost_top)),
                ("random", random_variants(model, count, 8, point_top, cost_top, every)),
            ]
            for workload, (b, c, u) in workloads:
                equal &= compare(f"{name}, {workload}", model, testset, b, c, u, repeats,
                                 cores)
    sys.exit(0 if equal else 1)


if __name__ == "__main__":
    main()
