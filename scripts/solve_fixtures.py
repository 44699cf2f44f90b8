#!/usr/bin/env python3
"""Writes tests/fixtures/solve/*.json: integer-program variants with HiGHS reference optima.

Usage: python3 scripts/solve_fixtures.py [output directory]   (needs `pip install highspy`)

Each file holds one constraint matrix (small enough for its Graver basis to be computed in
seconds), its family, the reference solver and version, and variants (rhs, cost, lower, upper;
null bounds are infinite) with the status and optimal objective HiGHS reports for
min cost.x, A x = rhs, lower <= x <= upper, x integer. Every variant also names how it was
built (`kind`): feasible, box-infeasible (no integer point in the box), parity (A x = rhs has a
rational but no integer solution), balance (no rational solution either) or unbounded.
The scenarios are invented. The output is deterministic (fixed seeds).
"""

import itertools
import json
import os
import random
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import fixtures_highs as highs  # noqa: E402


def variant(matrix, kind, rhs, cost, lower, upper):
    status, objective, raw = highs.solve(matrix, rhs, cost, lower, upper)
    expected = {"feasible": "optimal", "unbounded": "unbounded"}.get(kind, "infeasible")
    if status != expected:
        raise RuntimeError(f"{kind} variant came back {status} ({raw})")
    if kind == "parity":
        assert highs.lp_feasible(matrix, rhs, lower, upper)
        assert not highs.in_column_lattice(matrix, rhs)
    if kind == "box-infeasible":
        assert highs.in_column_lattice(matrix, rhs)
    return {
        "kind": kind,
        "rhs": rhs,
        "cost": cost,
        "lower": lower,
        "upper": upper,
        "expect": {"status": status, "objective": objective},
        "highs_status": raw,
    }


# ---- capacitated lanes: depots x shops, supplies and demands as equalities ----------------

def lanes_matrix(p, q):
    rows = [[1 if k // q == i else 0 for k in range(p * q)] for i in range(p)]
    rows += [[1 if k % q == j else 0 for k in range(p * q)] for j in range(q)]
    return rows


def lanes_variants(p, q, rng, count):
    a = lanes_matrix(p, q)
    n = p * q
    out = []
    for v in range(count):
        plan = [rng.randint(0, 5) for _ in range(n)]
        rhs = [sum(r * x for r, x in zip(row, plan)) for row in a]
        cost = [rng.randint(1, 9) for _ in range(n)]
        lower = [0] * n
        upper = [x + rng.randint(0, 3) for x in plan]
        kind = "feasible"
        if v % 10 == 7:
            kind = "box-infeasible"
            upper = [max(0, x - 2) for x in plan]
        elif v % 10 == 8:
            kind = "balance"
            rhs[0] += 1
        elif v % 10 == 9:
            kind = "unbounded"
            # Lanes (0,0), (0,1), (1,0), (1,1) are free and the 4-cycle through them is cheap.
            for k in (0, 1, q, q + 1):
                lower[k], upper[k] = None, None
            cost[0], cost[q + 1], cost[1], cost[q] = 1, 1, 5, 5
        elif v % 5 == 3:
            upper = [None] * n
        out.append(variant(a, kind, rhs, cost, lower, upper))
    names = [f"lane_{i + 1}_{j + 1}" for i in range(p) for j in range(q)]
    desc = (f"{p} depots ship to {q} shops; rows 1..{p} fix each depot's supply, rows "
            f"{p + 1}..{p + q} each shop's demand; lane capacities are upper bounds")
    return a, names, desc, out


# ---- three-way 3x3x3 tables with all two-way margins fixed ---------------------------------

def table_matrix():
    cells = list(itertools.product(range(3), repeat=3))
    rows = []
    for fixed in ((0, 1), (0, 2), (1, 2)):
        for key in itertools.product(range(3), repeat=2):
            rows.append([1 if (c[fixed[0]], c[fixed[1]]) == key else 0 for c in cells])
    return rows, cells


def basic_table_move(cells):
    """The degree-8 move +-1 on the cube {0,1}^3, sign (-1)^(i+j+k)."""
    return [(-1) ** sum(c) if max(c) <= 1 else 0 for c in cells]


def table_variants(rng, count):
    a, cells = table_matrix()
    n = len(cells)
    move = basic_table_move(cells)
    out = []
    for v in range(count):
        table = [rng.randint(0, 3) for _ in range(n)]
        rhs = [sum(r * x for r, x in zip(row, table)) for row in a]
        cost = [rng.randint(-3, 6) for _ in range(n)]
        lower = [0] * n
        upper = [x + rng.randint(0, 2) for x in table]
        kind = "feasible"
        if v % 10 == 4:
            kind = "box-infeasible"
            # Every cell below its seed value: the bounds cannot carry the seed's total.
            upper = [max(0, x - 1) for x in table]
        elif v % 10 == 9:
            kind = "unbounded"
            for k, m in enumerate(move):
                if m != 0:
                    lower[k], upper[k] = None, None
                    cost[k] = -m
        out.append(variant(a, kind, rhs, cost, lower, upper))
    names = [f"cell_{i + 1}{j + 1}{k + 1}" for i, j, k in cells]
    desc = ("3x3x3 contingency table x_ijk; the 27 rows fix all line sums (the three two-way "
            "margins); cell bounds from a seed table")
    return a, names, desc, out


# ---- small dense matrices with mixed signs ---------------------------------------------------

def rank(matrix):
    m = [list(map(int, r)) for r in matrix]
    r = 0
    for c in range(len(m[0])):
        pivot = next((i for i in range(r, len(m)) if m[i][c] != 0), None)
        if pivot is None:
            continue
        m[r], m[pivot] = m[pivot], m[r]
        for i in range(len(m)):
            if i != r and m[i][c] != 0:
                m[i] = [m[r][c] * x - m[i][c] * y for x, y in zip(m[i], m[r])]
        r += 1
    return r


def dense_matrix(rng, even_row):
    while True:
        a = [[rng.randint(-2, 2) for _ in range(6)] for _ in range(3)]
        if even_row:
            a[0] = [2 * rng.randint(-1, 1) for _ in range(6)]
        if rank(a) == 3 and all(any(row[j] for row in a) for j in range(6)):
            return a


def short_kernel_vector(a, support):
    for g in itertools.product(range(-2, 3), repeat=len(support)):
        if any(g):
            full = [0] * 6
            for k, v in zip(support, g):
                full[k] = v
            if all(sum(r * x for r, x in zip(row, full)) == 0 for row in a):
                return full
    return None


def dense_variants(a, rng, count):
    n = 6
    out = []
    for v in range(count):
        lower = [rng.randint(-3, 0) for _ in range(n)]
        upper = [lo + rng.randint(1, 5) for lo in lower]
        point = [rng.randint(lo, hi) for lo, hi in zip(lower, upper)]
        rhs = [sum(r * x for r, x in zip(row, point)) for row in a]
        cost = [rng.randint(-5, 5) for _ in range(n)]
        kind = "feasible"
        if v % 6 == 2:
            kind = "box-infeasible"
            shift = max(abs(x) for x in a[0]) * (n + 9)
            rhs[0] += shift if sum(a[0]) >= 0 else -shift
            if not highs.in_column_lattice(a, rhs):
                rhs[0] -= 1
            if not highs.in_column_lattice(a, rhs):
                rhs[0] += 2
        elif v % 6 == 4:
            kind = "parity"
            lower, upper = [-30] * n, [30] * n
            rhs[0] += 1
            if highs.in_column_lattice(a, rhs):
                kind = "feasible"
        elif v % 6 == 5:
            support = sorted(rng.sample(range(n), 5))
            g = short_kernel_vector(a, support)
            if g is not None:
                kind = "unbounded"
                for k in support:
                    lower[k], upper[k] = None, None
                cost = [c if gi == 0 else -gi * rng.randint(1, 2) for c, gi in zip(cost, g)]
                if sum(c * gi for c, gi in zip(cost, g)) >= 0:
                    kind, cost = "feasible", [rng.randint(-5, 5) for _ in range(n)]
        out.append(variant(a, kind, rhs, cost, lower, upper))
    return out


# ---- truckloads: units on a lane travel in trucks of capacity C ------------------------------

def truck_matrix(capacity):
    lanes = lanes_matrix(2, 3)
    e = 6
    rows = [row + [0] * (2 * e) for row in lanes]
    for k in range(e):
        row = [0] * (3 * e)
        row[k], row[e + k], row[2 * e + k] = 1, 1, -capacity
        rows.append(row)
    return rows


def truck_variants(capacity, rng, count):
    a = truck_matrix(capacity)
    out = []
    for v in range(count):
        units = [rng.randint(0, 7) for _ in range(6)]
        supply = [sum(units[0:3]), sum(units[3:6])]
        demand = [units[j] + units[3 + j] for j in range(3)]
        rhs = supply + demand + [0] * 6
        cost = [rng.randint(0, 2) for _ in range(6)] + [0] * 6 + [rng.randint(5, 20) for _ in range(6)]
        max_trucks = [-(-u // capacity) + rng.randint(0, 2) for u in units]
        lower = [0] * 18
        upper = [u + rng.randint(0, 4) for u in units] + [None] * 6 + max_trucks
        kind = "feasible"
        if v % 8 == 5:
            kind = "box-infeasible"
            upper[12:] = [max(0, -(-u // capacity) - 1) for u in units]
            upper[:6] = [None] * 6
            if sum(units) == 0:
                rhs[0], rhs[3] = rhs[0] + 1, rhs[3] + 1
        out.append(variant(a, kind, rhs, cost, lower, upper))
    names = ([f"units_{i + 1}_{j + 1}" for i in range(2) for j in range(3)]
             + [f"spare_{i + 1}_{j + 1}" for i in range(2) for j in range(3)]
             + [f"trucks_{i + 1}_{j + 1}" for i in range(2) for j in range(3)])
    desc = (f"2 mills ship to 3 yards in trucks of {capacity} units; rows 1..5 fix supplies "
            f"and demands, row 5+e says units_e + spare_e = {capacity} trucks_e; cost per unit "
            "and per truck")
    return a, names, desc, out


def write(directory, name, family, seed, matrix, names, description, variants):
    for i, v in enumerate(variants):
        v["id"] = f"{name}/{i:03d}"
    document = {
        "fixture": "kernstep solve reference",
        "name": name,
        "family": family,
        "description": description,
        "reference": {"solver": "HiGHS", "version": highs.version(), "interface": "highspy"},
        "generator": {"script": "scripts/solve_fixtures.py", "seed": seed},
        "variables": names,
        "matrix": matrix,
        "variants": [dict(id=v.pop("id"), **v) for v in variants],
    }
    path = os.path.join(directory, f"{name}.json")
    with open(path, "w") as out:
        json.dump(document, out, indent=1)
        out.write("\n")
    return len(variants)


def main():
    directory = sys.argv[1] if len(sys.argv) > 1 else os.path.join(
        os.path.dirname(os.path.abspath(__file__)), "..", "tests", "fixtures", "solve")
    os.makedirs(directory, exist_ok=True)
    counts = {}
    for p, q, seed in ((3, 3, 11), (3, 4, 12)):
        a, names, desc, vs = lanes_variants(p, q, random.Random(seed), 40)
        counts[f"lanes_{p}x{q}"] = write(directory, f"lanes_{p}x{q}", "lanes", seed, a, names, desc, vs)
    a, names, desc, vs = table_variants(random.Random(21), 40)
    counts["tables_3x3x3"] = write(directory, "tables_3x3x3", "tables", 21, a, names, desc, vs)
    for index, seed in enumerate((31, 32, 33, 34, 35)):
        rng = random.Random(seed)
        a = dense_matrix(rng, even_row=index < 3)
        name = f"dense_3x6_{chr(ord('a') + index)}"
        desc = "3x6 matrix with entries in -2..2 and mixed-sign boxes" + (
            "; row 1 is even, so odd rhs entries there have no integer solution" if index < 3 else "")
        counts[name] = write(directory, name, "dense", seed, a, [f"x{j + 1}" for j in range(6)],
                             desc, dense_variants(a, rng, 12))
    for capacity, seed in ((2, 41), (3, 42)):
        a, names, desc, vs = truck_variants(capacity, random.Random(seed), 24)
        name = f"truckloads_2x3_c{capacity}"
        counts[name] = write(directory, name, "truckloads", seed, a, names, desc, vs)
    for name, count in counts.items():
        print(f"{name}: {count} variants")
    print(f"total: {sum(counts.values())} variants in {len(counts)} files")


if __name__ == "__main__":
    main()
