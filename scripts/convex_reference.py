#!/usr/bin/env python3
"""Writes tests/fixtures/convex/depot_stores.json: HiGHS optima for variants of a model file
with piecewise-linear convex costs (examples/depot_stores.toml).

Usage: python3 scripts/convex_reference.py [output directory]   (needs `pip install highspy`)

The model file is read here a second time, from the schema in the README ("Model files"),
independently of the Rust code. A variable's convex cost (increasing breaks b_1 < ... < b_K,
nondecreasing slopes s_0 <= ... <= s_K, marginal cost s_0 below b_1, s_k between b_k and
b_(k+1), s_K above b_K, zero at 0) is the convex function

    p(x) = s_0 x + sum_k (s_k - s_(k-1)) (max(0, x - b_k) - max(0, -b_k)),

so min c.x + sum p_i(x_i) is written as a MILP the textbook way for convex piecewise-linear
costs (Wolsey, "Integer Programming", 1998; Bertsimas and Tsitsiklis, "Introduction to
Linear Optimization", 1997, section 1.3): s_0 joins the linear cost, and each break b_k gets
a nonnegative integer overflow variable o_k >= x - b_k (as x - o_k + t_k = b_k with an
integer slack t_k >= 0) with cost s_k - s_(k-1) >= 0, which the minimisation holds at
max(0, x - b_k); no binary variables are needed because the cost is convex. The constant
-sum_k (s_k - s_(k-1)) max(0, -b_k) is added to HiGHS's objective. As a check of the
linearisation, the optimum is compared with p evaluated at HiGHS's plan by summing the
marginal costs unit by unit from 0.

The variants (rhs, costs, bounds; one infeasible, one unbounded, one whose linear costs alone
would be unbounded but whose surcharges are not) are invented and drawn with a fixed seed;
the output is deterministic.
"""

import json
import os
import random
import sys
import tomllib

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import fixtures_highs as highs  # noqa: E402

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
MODEL = "examples/depot_stores.toml"
SEED = 20261203


def bound(value, infinite):
    """A bound of a model file: an integer, or the string `infinite` for none."""
    return None if value == infinite else value


def load(path):
    with open(path, "rb") as f:
        m = tomllib.load(f)
    n = len(m["matrix"][0])
    names = m["names"]["variables"]
    convex = {
        names.index(name): (spec["breaks"], spec["slopes"])
        for name, spec in m.get("convex_cost", {}).items()
    }
    return {
        "matrix": m["matrix"],
        "rhs": m["rhs"],
        "cost": m.get("cost", [0] * n),
        "lower": [bound(v, "-inf") for v in m["lower"]],
        "upper": [bound(v, "inf") for v in m["upper"]],
        "variables": names,
        "convex": convex,
    }


def marginal_sum(breaks, slopes, x):
    """p(x) from the marginal costs alone: the slope on each unit interval between 0 and x."""
    def slope(t):  # the marginal cost on (t, t + 1)
        return slopes[sum(1 for b in breaks if b <= t)]
    if x >= 0:
        return sum(slope(t) for t in range(x))
    return -sum(slope(t) for t in range(x, 0))


def linearised(model, rhs, cost, lower, upper):
    """The MILP of the module docstring: matrix, rhs, cost, bounds and the constant."""
    n = len(cost)
    matrix = [list(row) for row in model["matrix"]]
    rhs, cost, lower, upper = list(rhs), list(cost), list(lower), list(upper)
    constant = 0
    for i, (breaks, slopes) in sorted(model["convex"].items()):
        cost[i] += slopes[0]
        for k, b in enumerate(breaks):
            rise = slopes[k + 1] - slopes[k]
            constant -= rise * max(0, -b)
            # x_i - o + t = b with o, t >= 0 integer: o >= x_i - b.
            for row in matrix:
                row.extend([0, 0])
            matrix.append([1 if j == i else 0 for j in range(n)] + [0] * (len(matrix[0]) - n))
            matrix[-1][-2], matrix[-1][-1] = -1, 1
            rhs.append(b)
            cost.extend([rise, 0])
            lower.extend([0, 0])
            upper.extend([None, None])
    return matrix, rhs, cost, lower, upper, constant


def reference(model, variant):
    numbers = {key: variant.get(key, model[key]) for key in ("rhs", "cost", "lower", "upper")}
    matrix, rhs, cost, lower, upper, constant = linearised(model, **numbers)
    status, objective, raw = highs.solve(matrix, rhs, cost, lower, upper)
    if status == "optimal":
        objective += constant
        x = highs.plan(matrix, rhs, cost, lower, upper)[: len(numbers["cost"])]
        check = sum(c * v for c, v in zip(numbers["cost"], x)) + sum(
            marginal_sum(b, s, x[i]) for i, (b, s) in model["convex"].items()
        )
        if check != objective:
            raise RuntimeError(f"{variant['id']}: HiGHS {objective}, its plan costs {check}")
    return {**variant, "expect": {"status": status, "objective": objective}, "highs_status": raw}


def drawn(model, rng, k):
    """A feasible variant: a random plan inside random bounds, the rhs it meets, new costs."""
    lower = list(model["lower"])
    upper = list(model["upper"])
    for i in (6, 7):
        lower[i] = -rng.randint(0, 10)
        upper[i] = rng.randint(0, 10)
    if rng.random() < 0.5:
        upper[rng.randint(0, 5)] = rng.randint(3, 12)
    plan = [
        rng.randint(lower[i] if lower[i] is not None else 0, upper[i] if upper[i] is not None else 14)
        for i in range(len(lower))
    ]
    rhs = [sum(a * v for a, v in zip(row, plan)) for row in model["matrix"]]
    cost = [c + rng.randint(-3, 3) for c in model["cost"]]
    return {"id": f"drawn_{k:02d}", "rhs": rhs, "cost": cost, "lower": lower, "upper": upper}


def variants(model):
    rng = random.Random(SEED)
    out = [{"id": "as_written"}]
    out += [drawn(model, rng, k) for k in range(15)]
    out += [
        # Demand far beyond what the depots and their stores can give.
        {"id": "short_supply", "rhs": [5, 5, 20, 20, 20]},
        # Heavy demand North: alder_north runs past its surcharge break.
        {"id": "north_rush", "rhs": [22, 20, 26, 6, 4], "upper": [None, None, None, 6, 12, None, 10, 10]},
        # Negative lane costs on the surcharged lanes: the surcharge caps how far they go.
        {"id": "paid_to_carry", "cost": [-4, 7, 6, 8, -2, 5, 0, 0]},
        # alder_east and kestle_north may go negative (returns): the cycle +alder_north
        # -kestle_north +kestle_east -alder_east costs 4 - 11 + 3 - 6 = -10 per unit with the
        # linear costs alone, but 4 + 5 - 11 + 3 + 6 - 6 = 1 once both surcharges apply.
        {"id": "returns_bounded", "lower": [0, None, 0, None, 0, 0, -6, -8], "upper": [None] * 6 + [10, 10],
         "cost": [4, 6, 6, 11, 3, 5, 0, 0]},
        # The same with dearer returns: 4 + 5 - 12 + 3 + 6 - 9 = -3 per unit for ever.
        {"id": "returns_unbounded", "lower": [0, None, 0, None, 0, 0, -6, -8], "upper": [None] * 6 + [10, 10],
         "cost": [4, 9, 6, 12, 3, 5, 0, 0]},
    ]
    return out


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, "tests", "fixtures", "convex")
    os.makedirs(out, exist_ok=True)
    model = load(os.path.join(ROOT, MODEL))
    cases = [reference(model, v) for v in variants(model)]
    doc = {
        "fixture": "kernstep convex costs reference",
        "model": MODEL,
        "reference": {"solver": "HiGHS", "version": highs.version(), "interface": "highspy"},
        "generator": {
            "script": "scripts/convex_reference.py",
            "seed": SEED,
            "method": "convex piecewise-linear costs linearised with one integer overflow "
                      "variable o >= x - b per break, cost s_k - s_(k-1) "
                      "(Wolsey 1998; Bertsimas and Tsitsiklis 1997, section 1.3)",
        },
        "variables": model["variables"],
        "variants": cases,
    }
    with open(os.path.join(out, "depot_stores.json"), "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    counts = {}
    for c in cases:
        counts[c["expect"]["status"]] = counts.get(c["expect"]["status"], 0) + 1
    print(f"depot_stores: {len(cases)} variants, {counts}")


if __name__ == "__main__":
    main()
