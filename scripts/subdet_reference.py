#!/usr/bin/env python3
"""Reference figures for tests/analyze_subdet.rs, computed independently with SymPy.

For seeded random small integer matrices this writes, per case: the rank, the full-row-rank
version's rows (the first maximal independent set of rows from the top, i.e. the pivot columns
of the transpose's reduced row echelon form), Delta = the largest absolute r x r minor of that
version over *all* column subsets (no reductions), the gcd of those minors, whether all nonzero
ones share one absolute value, total unimodularity by brute force over every square
submatrix, and the column numbers (up to sign, and up to rational multiples).

Usage: python3 scripts/subdet_reference.py   (rewrites tests/fixtures/subdet/*.json)
Only needed to regenerate the fixtures; the Rust tests read the JSON files.
"""

import itertools
import json
import math
import random
from fractions import Fraction
from pathlib import Path

import sympy

OUT = Path(__file__).resolve().parent.parent / "tests" / "fixtures" / "subdet"


def independent_rows(a):
    _, pivots = a.T.rref()
    return list(pivots)


def maximal_minors(b, n):
    r = b.rows
    for cols in itertools.combinations(range(n), r):
        yield abs(b.extract(list(range(r)), list(cols)).det())


def totally_unimodular(a):
    m, n = a.shape
    for k in range(1, min(m, n) + 1):
        for rows in itertools.combinations(range(m), k):
            for cols in itertools.combinations(range(n), k):
                if abs(a.extract(list(rows), list(cols)).det()) > 1:
                    return False
    return True


def column_numbers(a):
    up_to_sign, parallel = set(), set()
    for j in range(a.cols):
        col = [int(v) for v in a.col(j)]
        nonzero = [v for v in col if v != 0]
        if not nonzero:
            continue
        sign = 1 if nonzero[0] > 0 else -1
        up_to_sign.add(tuple(sign * v for v in col))
        parallel.add(tuple(Fraction(v, nonzero[0]) for v in col))
    return len(up_to_sign), len(parallel)


def case(rows):
    a = sympy.Matrix(rows)
    keep = independent_rows(a)
    b = a.extract(keep, list(range(a.cols)))
    minors = list(maximal_minors(b, a.cols))
    nonzero = [d for d in minors if d != 0]
    h, h_parallel = column_numbers(a)
    return {
        "matrix": rows,
        "rank": a.rank(),
        "independent_rows": keep,
        "delta": str(max(minors)),
        "minor_gcd": str(math.gcd(*[int(d) for d in minors])),
        "unimodular": len(set(nonzero)) == 1,
        "totally_unimodular": totally_unimodular(a),
        "column_number": h,
        "column_number_parallel": h_parallel,
    }


def random_rows(rng, m, n, lo, hi):
    return [[rng.randint(lo, hi) for _ in range(n)] for _ in range(m)]


def with_structure(rng, m, n, lo, hi):
    """Random rows plus a dependent row, a zero column and a scaled copy of a column."""
    rows = random_rows(rng, m, n, lo, hi)
    s, t = rng.randint(-2, 2), rng.randint(-2, 2)
    rows.insert(rng.randint(0, m), [s * x + t * y for x, y in zip(rows[0], rows[-1])])
    zero, src = rng.randrange(n), rng.randrange(n)
    factor = rng.choice([-3, -2, -1, 2, 3])
    for row in rows:
        row[zero] = 0
        row.append(factor * row[src])
    return rows


def write(name, seed, cases):
    doc = {
        "generator": "scripts/subdet_reference.py (SymPy %s)" % sympy.__version__,
        "seed": seed,
        "cases": cases,
    }
    (OUT / name).write_text(json.dumps(doc, indent=1) + "\n")


def main():
    OUT.mkdir(parents=True, exist_ok=True)
    rng = random.Random(20260101)
    small = [case(random_rows(rng, m, n, -4, 4)) for m, n in
             [(1, 3), (2, 3), (2, 5), (3, 4), (3, 6), (4, 5), (4, 7), (3, 7)] * 3]
    write("random_small.json", 20260101, small)
    rng = random.Random(20260102)
    units = [case(random_rows(rng, m, n, -1, 1)) for m, n in
             [(2, 3), (2, 4), (3, 4), (3, 5), (4, 5), (3, 6)] * 4]
    write("random_signed_unit.json", 20260102, units)
    rng = random.Random(20260103)
    structured = [case(with_structure(rng, m, n, -3, 3)) for m, n in
                  [(1, 3), (2, 3), (2, 4), (3, 4), (3, 5)] * 3]
    write("structured.json", 20260103, structured)


if __name__ == "__main__":
    main()
