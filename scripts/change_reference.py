#!/usr/bin/env python3
"""Writes tests/fixtures/change/random_models.json: HiGHS optima of small random integer
models whose cost carries a price per unit changed against a previous plan p,

    min c.x + sum_i p_i(x_i) + sum_i w_i |x_i - p_i|,  A x = b,  l <= x <= u,  x integer.

Usage: python3 scripts/change_reference.py [output directory]   (needs `pip install highspy`)

HiGHS solves the linearised model, written independently of the Rust code: the change of each
priced variable is split into two nonnegative integer parts, x_i = p_i + u_i - v_i (a row
x_i - u_i + v_i = p_i) with cost w_i (u_i + v_i); the minimisation holds u_i + v_i at
|x_i - p_i| (Bertsimas and Tsitsiklis, "Introduction to Linear Optimization", 1997,
section 1.3, absolute values in the objective). The convex piecewise-linear costs p_i are
linearised as in scripts/convex_reference.py (one integer overflow variable per break). As a
check of the linearisation, the optimum is compared with the whole objective evaluated at
HiGHS's plan.

The models are drawn with a fixed seed (the output is deterministic): 2 x 5 or 3 x 6
matrices with entries in -2..=2, boxes of width at most 6, costs in -4..=6, a convex cost
on some variables, a previous plan p in the box, today's right-hand side either that of p
(p is still feasible) or that of another point of the box, and prices: all 0, random in
0..=6 per variable, one price for every variable, or a very large one (10^6, more than any
plan of the box can save).
"""

import json
import os
import random
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import fixtures_highs as highs  # noqa: E402
from convex_reference import linearised, marginal_sum  # noqa: E402

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SEED = 20261226
CASES = 80
LARGE = 10**6


def convex_cost(rng):
    """Breaks increasing in -2..=6, nondecreasing slopes starting in -3..=2."""
    breaks = sorted(rng.sample(range(-2, 7), rng.randint(1, 2)))
    slopes = [rng.randint(-3, 2)]
    for _ in breaks:
        slopes.append(slopes[-1] + rng.randint(0, 3))
    return breaks, slopes


def point(rng, lower, upper):
    return [rng.randint(lo, hi) for lo, hi in zip(lower, upper)]


def times(matrix, x):
    return [sum(a * v for a, v in zip(row, x)) for row in matrix]


def prices(rng, n, kind):
    if kind == "zero":
        return [0] * n
    if kind == "uniform":
        return [rng.randint(1, 5)] * n
    if kind == "large":
        return [LARGE] * n
    return [rng.randint(0, 6) for _ in range(n)]


def drawn(rng, k):
    m, n = rng.choice([(2, 5), (3, 6)])
    while True:
        matrix = [[rng.randint(-2, 2) for _ in range(n)] for _ in range(m)]
        if all(any(row) for row in matrix):
            break
    lower = [rng.randint(-2, 1) for _ in range(n)]
    upper = [lo + rng.randint(0, 6) for lo in lower]
    previous = point(rng, lower, upper)
    kept = rng.random() < 0.4
    today = previous if kept else point(rng, lower, upper)
    convex = {i: convex_cost(rng) for i in range(n) if rng.random() < 0.3}
    kind = rng.choice(["zero", "random", "random", "uniform", "large"])
    return {
        "id": f"case_{k:02d}",
        "matrix": matrix,
        "rhs": times(matrix, today),
        "previous_rhs": times(matrix, previous),
        "previous": previous,
        "previous_feasible": kept,
        "cost": [rng.randint(-4, 6) for _ in range(n)],
        "lower": lower,
        "upper": upper,
        "convex": {str(i): {"breaks": b, "slopes": s} for i, (b, s) in convex.items()},
        "prices": kind,
        "change_cost": prices(rng, n, kind),
    }


def whole_objective(case, x):
    """c.x + sum p_i(x_i) + sum w_i |x_i - p_i|, from the marginal costs unit by unit."""
    total = sum(c * v for c, v in zip(case["cost"], x))
    for i, spec in case["convex"].items():
        total += marginal_sum(spec["breaks"], spec["slopes"], x[int(i)])
    return total + sum(w * abs(v - p) for w, v, p in zip(case["change_cost"], x, case["previous"]))


def reference(case):
    n = len(case["cost"])
    model = {
        "matrix": case["matrix"],
        "convex": {int(i): (s["breaks"], s["slopes"]) for i, s in case["convex"].items()},
    }
    matrix, rhs, cost, lower, upper, constant = linearised(
        model, case["rhs"], case["cost"], case["lower"], case["upper"]
    )
    for i, (w, p) in enumerate(zip(case["change_cost"], case["previous"])):
        if w == 0:
            continue
        # x_i - u + v = p_i, u, v >= 0, cost w (u + v).
        for row in matrix:
            row.extend([0, 0])
        matrix.append([1 if j == i else 0 for j in range(n)] + [0] * (len(matrix[0]) - n))
        matrix[-1][-2], matrix[-1][-1] = -1, 1
        rhs.append(p)
        cost.extend([w, w])
        lower.extend([0, 0])
        upper.extend([None, None])
    status, objective, raw = highs.solve(matrix, rhs, cost, lower, upper)
    expect = {"status": status, "objective": None}
    if status == "optimal":
        objective += constant
        x = highs.plan(matrix, rhs, cost, lower, upper)[:n]
        check = whole_objective(case, x)
        if check != objective:
            raise RuntimeError(f"{case['id']}: HiGHS {objective}, its plan costs {check}")
        expect = {"status": status, "objective": objective}
    return {**case, "expect": expect, "highs_status": raw}


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, "tests", "fixtures", "change")
    os.makedirs(out, exist_ok=True)
    rng = random.Random(SEED)
    cases = [reference(drawn(rng, k)) for k in range(CASES)]
    doc = {
        "fixture": "kernstep change price reference",
        "reference": {"solver": "HiGHS", "version": highs.version(), "interface": "highspy"},
        "generator": {
            "script": "scripts/change_reference.py",
            "seed": SEED,
            "method": "|x_i - p_i| linearised as u_i + v_i with x_i = p_i + u_i - v_i, "
                      "u_i, v_i >= 0 (Bertsimas and Tsitsiklis 1997, section 1.3); convex "
                      "costs as in scripts/convex_reference.py",
        },
        "cases": cases,
    }
    with open(os.path.join(out, "random_models.json"), "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    counts = {}
    for c in cases:
        key = (c["expect"]["status"], c["prices"])
        counts[key] = counts.get(key, 0) + 1
    print(f"random_models: {len(cases)} cases, {dict(sorted(counts.items()))}")


if __name__ == "__main__":
    main()
