"""Optima equal to HiGHS on random variants: the 3x3x4 tables (a set of 19,722 moves) and
lanes scenarios (network matrices, solved along their cycles)."""

from __future__ import annotations

import json
import random

import numpy as np
import pytest

import kernstep
from conftest import SCENARIOS, HighsKept, make_lanes, table_variants


def test_tables_equal_highs_on_random_variants(tables, tables_set):
    a = tables.A
    highs = HighsKept(a, tables.lower, tables.upper)
    b, c, u = table_variants(a, 150, seed=7)
    for k in range(len(b)):
        upper = u[k] if k % 2 else None
        result = tables_set.solve(b=b[k], c=c[k], upper=upper)
        # reference: HiGHS MILP via highspy, the model kept alive, only the numbers changed
        expected = highs.solve(b[k], c[k], upper=tables.upper if upper is None else upper)
        assert result.status == kernstep.Status.OPTIMAL and result.claim == "test_set"
        assert result.objective == expected, f"variant {k}"
        assert (a @ result.x == b[k]).all() and (result.x >= 0).all()
        assert int(c[k] @ result.x) == result.objective


def test_tables_infeasible_exactly_when_highs_says_so(tables, tables_set):
    a = tables.A
    highs = HighsKept(a, tables.lower, tables.upper)
    b, c, _ = table_variants(a, 40, seed=8)
    rng = np.random.default_rng(9)
    for k in range(len(b)):
        b[k, rng.integers(0, a.shape[0])] += rng.integers(1, 3)
        result = tables_set.solve(b=b[k], c=c[k])
        # reference: HiGHS MILP via highspy
        expected = highs.solve(b[k], c[k])
        if expected is None:
            assert result.status == kernstep.Status.INFEASIBLE, f"variant {k}"
            assert result.outcome["tag"] in ("no_integer_solution", "no_lattice_point_in_box")
        else:
            assert result.status == kernstep.Status.OPTIMAL
            assert result.objective == expected, f"variant {k}"


def lanes_variants(model: kernstep.Model, count: int, seed: int):
    """Feasible variants of a lanes model: the rows of a random flow inside the capacities,
    random costs, and every third variant with capacities cut to that flow plus a little."""
    rng = np.random.default_rng(seed)
    n = model.shape[1]
    hi = np.array([25 if v is None else v for v in model.upper])
    for k in range(count):
        x = rng.integers(0, hi + 1)
        upper = None
        if k % 3 == 0:
            upper = [None if v is None else int(x[j] + rng.integers(0, 3))
                     for j, v in enumerate(model.upper)]
        yield model.A @ x, rng.integers(0, 30, size=n), upper


@pytest.mark.parametrize("scenario", ["brackle_lanes", "lanes_6x20"])
def test_lanes_equal_highs_on_random_variants(scenario, tmp_path):
    if scenario == "lanes_6x20":
        path = tmp_path / "lanes_6x20.json"
        path.write_text(json.dumps(make_lanes(6, 20, random.Random(20261202))))
    else:
        path = SCENARIOS / f"{scenario}.toml"
    model = kernstep.Model.from_file(path)
    testset = kernstep.TestSet.load(model, cache_dir=tmp_path)
    assert testset.kind == "cycles"
    highs = HighsKept(model.A, model.lower, model.upper)
    for k, (b, c, upper) in enumerate(lanes_variants(model, 100, seed=11)):
        result = testset.solve(b=b, c=c, upper=upper)
        # reference: HiGHS MILP via highspy, the model kept alive, only the numbers changed
        expected = highs.solve(b, c, upper=model.upper if upper is None else upper)
        assert result.status == kernstep.Status.OPTIMAL and result.claim == "potentials"
        assert result.objective == expected, f"variant {k}"
