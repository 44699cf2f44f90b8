#!/usr/bin/env python3
"""Re-optimisation of many variants: kernstep against the HiGHS MILP solver, side by side.

For each family (3x4 capacitated lanes; 3x3x3 tables with all 2-margins, which is the planar
three-index plan of product lines; truckloads on 2x3 lanes with trucks of capacity 4) the
script draws
VARIANTS feasible variants (new right-hand side and costs, fixed seed), then times
  - HiGHS (highspy) in its best re-optimisation mode: one model kept alive, only the
    right-hand side and costs changed between variants, one thread;
  - HiGHS from scratch: a new model per variant;
  - kernstep (benches/solve_variants.rs): Graver basis built once, then every variant solved,
    with 1 and 2 threads;
  - `kernstep batch` as a whole process (reading the files, building the set into an empty
    cache, solving every variant, writing the results), with 1 and 2 threads;
and prints per-variant times, the ratios, and how many optima agree.

Usage: python3 benches/replan_vs_highs.py [VARIANTS]   (default 1000; needs `pip install highspy`)
"""

import json
import os
import random
import subprocess
import sys
import tempfile
import time

import highspy

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
INF = highspy.kHighsInf


def lanes(p, q, rng):
    n = p * q
    matrix = [[1 if j // q == i else 0 for j in range(n)] for i in range(p)]
    matrix += [[1 if j % q == k else 0 for j in range(n)] for k in range(q)]
    upper = [rng.randint(3, 9) for _ in range(n)]
    return matrix, [0] * n, upper


def tables(p, q, s):
    n = p * q * s
    var = lambda i, j, k: (i * q + j) * s + k
    rows = []
    for i in range(p):
        for j in range(q):
            rows.append({var(i, j, k) for k in range(s)})
    for i in range(p):
        for k in range(s):
            rows.append({var(i, j, k) for j in range(q)})
    for j in range(q):
        for k in range(s):
            rows.append({var(i, j, k) for i in range(p)})
    matrix = [[1 if c in r else 0 for c in range(n)] for r in rows]
    return matrix, [0] * n, [None] * n


def truckloads(depots, zones, capacity, rng):
    """Lanes d->z with units u, spare s (0..C-1) and trucks t (u + s = C t); kept stock k_d."""
    lanes = [(d, z) for d in range(depots) for z in range(zones)]
    n = 3 * len(lanes) + depots
    rows = []
    for d in range(depots):
        row = [0] * n
        for e, (dd, _) in enumerate(lanes):
            row[3 * e] = 1 if dd == d else 0
        row[3 * len(lanes) + d] = 1
        rows.append(row)
    for z in range(zones):
        rows.append([1 if j % 3 == 0 and j < 3 * len(lanes) and lanes[j // 3][1] == z else 0
                     for j in range(n)])
    for e in range(len(lanes)):
        row = [0] * n
        row[3 * e], row[3 * e + 1], row[3 * e + 2] = 1, 1, -capacity
        rows.append(row)
    upper = []
    for _ in lanes:
        upper += [None, capacity - 1, rng.randint(2, 4)]
    upper += [None] * depots
    return rows, [0] * n, upper


def truck_point(matrix, upper, capacity, rng):
    """A feasible point: trucks first, then units that fit, spare filling the trucks."""
    n = len(upper)
    x = [0] * n
    e = 0
    while 3 * e + 2 < n and upper[3 * e + 2] is not None:
        t = rng.randint(0, upper[3 * e + 2])
        u = rng.randint(max(0, capacity * t - capacity + 1), capacity * t) if t else 0
        x[3 * e], x[3 * e + 1], x[3 * e + 2] = u, capacity * t - u, t
        e += 1
    for j in range(3 * e, n):
        x[j] = rng.randint(0, 5)
    return x


def variants(matrix, lower, upper, count, rng, point=None):
    """Feasible by construction: the right-hand side of a random point inside the box."""
    out = []
    for v in range(count):
        x = point() if point else [rng.randint(lo, hi if hi is not None else lo + 5)
                                   for lo, hi in zip(lower, upper)]
        rhs = [sum(a * b for a, b in zip(row, x)) for row in matrix]
        cost = [rng.randint(1, 9) for _ in x]
        out.append({"id": f"v{v:04d}", "rhs": rhs, "cost": cost})
    return out


def highs_model(matrix, rhs, cost, lower, upper):
    lp = highspy.HighsLp()
    lp.num_col_, lp.num_row_ = len(matrix[0]), len(matrix)
    lp.col_cost_ = [float(c) for c in cost]
    lp.col_lower_ = [float(v) for v in lower]
    lp.col_upper_ = [INF if v is None else float(v) for v in upper]
    lp.row_lower_ = lp.row_upper_ = [float(v) for v in rhs]
    start, index, value = [0], [], []
    for j in range(lp.num_col_):
        for i, row in enumerate(matrix):
            if row[j]:
                index.append(i)
                value.append(float(row[j]))
        start.append(len(index))
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.start_, lp.a_matrix_.index_, lp.a_matrix_.value_ = start, index, value
    lp.integrality_ = [highspy.HighsVarType.kInteger] * lp.num_col_
    return lp


def new_highs():
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.setOptionValue("threads", 1)
    h.setOptionValue("mip_rel_gap", 0.0)
    return h


def highs_kept(matrix, lower, upper, cases):
    h = new_highs()
    h.passModel(highs_model(matrix, cases[0]["rhs"], cases[0]["cost"], lower, upper))
    rows, cols = len(matrix), len(matrix[0])
    out = []
    start = time.perf_counter()
    for c in cases:
        h.changeColsCost(cols, list(range(cols)), [float(v) for v in c["cost"]])
        b = [float(v) for v in c["rhs"]]
        h.changeRowsBounds(rows, list(range(rows)), b, b)
        h.run()
        out.append(round(h.getInfo().objective_function_value))
    return out, time.perf_counter() - start


def highs_fresh(matrix, lower, upper, cases):
    out = []
    start = time.perf_counter()
    for c in cases:
        h = new_highs()
        h.passModel(highs_model(matrix, c["rhs"], c["cost"], lower, upper))
        h.run()
        out.append(round(h.getInfo().objective_function_value))
    return out, time.perf_counter() - start


def kernstep(binary, model_path, variants_path, threads):
    start = time.perf_counter()
    run = subprocess.run([binary, model_path, variants_path, str(threads)],
                         capture_output=True, text=True, check=True)
    wall = time.perf_counter() - start
    lines = [json.loads(l) for l in run.stdout.splitlines() if l.strip()]
    summary = lines[-1]
    summary["mean_steps"] = [sum(l["steps"][k] for l in lines[:-1]) / max(1, len(lines) - 1)
                             for k in (0, 1)]
    objectives = [int(l["objective"]) if l["objective"] is not None else None for l in lines[:-1]]
    return objectives, summary, wall


def batch(model_path, variants_path, threads):
    """Whole-process `kernstep batch`: read, build the set into an empty cache, solve, write."""
    with tempfile.TemporaryDirectory() as cache:
        start = time.perf_counter()
        run = subprocess.run([os.path.join(ROOT, "target", "release", "kernstep"), "batch",
                              model_path, variants_path, "--build", "--threads", str(threads),
                              "--cache-dir", cache], capture_output=True, text=True)
        wall = time.perf_counter() - start
    days = [json.loads(l) for l in run.stdout.splitlines() if l.startswith("{")]
    objectives = [int(d["objective"]) if d.get("objective") is not None else None for d in days]
    return objectives, wall


def bench_binary():
    out = subprocess.run(["cargo", "bench", "--bench", "solve_variants", "--no-run",
                          "--message-format=json"], cwd=ROOT, capture_output=True, text=True,
                         check=True).stdout
    for line in out.splitlines():
        msg = json.loads(line)
        if msg.get("executable") and msg.get("target", {}).get("name") == "solve_variants":
            return msg["executable"]
    raise SystemExit("could not find the solve_variants bench binary")


def main():
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    binary = bench_binary()
    rng = random.Random(20261201)
    subprocess.run(["cargo", "build", "--release"], cwd=ROOT, check=True, capture_output=True)
    trucks = truckloads(2, 3, 4, rng)
    families = [("lanes 3x4", lanes(3, 4, rng), None), ("tables 3x3x3", tables(3, 3, 3), None),
                ("trucks 2x3 C4", trucks, lambda: truck_point(trucks[0], trucks[2], 4, rng))]
    print(f"HiGHS {new_highs().version()} (highspy), one thread; {count} variants per family")
    header = f"{'family':<14}{'method':<38}{'ms/variant':>12}{'vs HiGHS kept':>15}"
    print(header)
    for name, (matrix, lower, upper), point in families:
        cases = variants(matrix, lower, upper, count, rng, point)
        with tempfile.TemporaryDirectory() as tmp:
            model_path = os.path.join(tmp, "model.json")
            with open(model_path, "w") as f:
                json.dump({"matrix": matrix, "rhs": cases[0]["rhs"], "cost": cases[0]["cost"],
                           "lower": lower, "upper": upper}, f)
            variants_path = os.path.join(tmp, "variants.jsonl")
            with open(variants_path, "w") as f:
                f.writelines(json.dumps(c) + "\n" for c in cases)
            kept, kept_s = highs_kept(matrix, lower, upper, cases)
            fresh, fresh_s = highs_fresh(matrix, lower, upper, cases)
            runs = [kernstep(binary, model_path, variants_path, t) for t in (1, 2)]
            batches = [batch(model_path, variants_path, t) for t in (1, 2)]
        base = kept_s / count * 1000
        rows = [("HiGHS, model kept (best mode)", kept_s, None), ("HiGHS, from scratch", fresh_s, None)]
        for t, (objs, summary, wall) in zip((1, 2), runs):
            equal = sum(a == b for a, b in zip(objs, kept))
            rows.append((f"kernstep, {t} thread(s), solves only", summary["solve_seconds"], equal))
            rows.append((f"kernstep, {t} thread(s), whole process", wall, equal))
        for t, (objs, wall) in zip((1, 2), batches):
            equal = sum(a == b for a, b in zip(objs, kept))
            rows.append((f"kernstep batch, {t} thread(s), process", wall, equal))
        for label, seconds, equal in rows:
            ms = seconds / count * 1000
            ratio = base / ms if ms > 0 else float("inf")
            tail = f"   equal optima {equal}/{count}" if equal is not None else ""
            print(f"{name:<14}{label:<38}{ms:>12.4f}{ratio:>14.1f}x{tail}")
        print(f"{name:<14}(Graver basis: {runs[0][1]['elements']} moves, built in "
              f"{runs[0][1]['build_seconds']:.3f} s, included in whole-process time; "
              f"mean steps phase I {runs[0][1]['mean_steps'][0]:.1f}, "
              f"phase II {runs[0][1]['mean_steps'][1]:.1f})")


if __name__ == "__main__":
    main()
