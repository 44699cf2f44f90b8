"""Building and loading sets: partial sets and their bounds, Hilbert bases, cache misses,
limits and Ctrl-C."""

from __future__ import annotations

import os
import signal
import threading

import numpy as np
import pytest

import kernstep
from conftest import EXAMPLES, HighsKept, table_variants, three_way


def test_a_loaded_set_equals_the_built_one(tables, tables_set, cache_dir):
    loaded = kernstep.TestSet.load(tables, cache_dir=cache_dir)
    assert loaded.kind == "graver" and loaded.coverage == "complete"
    assert len(loaded) == len(tables_set) == 19722  # reference: README, 3x3x4 tables
    assert loaded.source.startswith("loaded from the cache")
    np.testing.assert_array_equal(loaded.moves, tables_set.moves)


def test_a_missing_set_says_what_to_do(tables, tmp_path):
    with pytest.raises(kernstep.CacheMissError, match=r"TestSet\.build\(model, cache_dir") as err:
        kernstep.TestSet.load(tables, cache_dir=tmp_path)
    assert isinstance(err.value, kernstep.CacheError) and err.value.cache_dir == tmp_path


def test_a_norm_truncated_set_proves_what_its_bound_proves(tables, tmp_path):
    partial = kernstep.TestSet.build(tables, norm_limit=8, cache_dir=tmp_path, progress=False)
    assert partial.coverage == "norm_truncated" and partial.norm_limit == 8
    highs = HighsKept(tables.A, tables.lower, tables.upper)
    b, c, _ = table_variants(tables.A, 30, seed=41)
    statuses = set()
    for k in range(len(b)):
        result = partial.solve(b=b[k], c=c[k])
        # reference: HiGHS MILP via highspy
        optimum = highs.solve(b[k], c[k])
        statuses.add(result.status)
        if result.status == kernstep.Status.OPTIMAL:
            assert result.objective == optimum and result.claim == "bound_met"
        else:
            assert result.status == kernstep.Status.FEASIBLE
            assert result.objective >= optimum
            if result.bound is not None:
                assert result.bound <= optimum and result.gap == result.objective - result.bound
    assert kernstep.Status.OPTIMAL in statuses


def test_a_hilbert_basis_is_built_and_serves_no_solves(tmp_path):
    # x1 + x2 = x3 with every variable >= 0: the minimal solutions are (1, 0, 1) and (0, 1, 1).
    model = kernstep.Model([[1, 1, -1]], b=[0], c=[0, 0, 0], signs="+++")
    hilbert = kernstep.TestSet.build(model, kind="hilbert", cache_dir=tmp_path, progress=False)
    assert hilbert.kind == "hilbert"
    # reference: worked by hand (above)
    assert sorted(map(tuple, hilbert.moves.tolist())) == [(0, 1, 1), (1, 0, 1)]
    with pytest.raises(kernstep.UnsupportedError, match='build kind="graver"'):
        hilbert.solve()
    with pytest.raises(kernstep.ModelError, match='kind: "circuits" is no kind of set'):
        kernstep.TestSet.build(model, kind="circuits", cache_dir=tmp_path)


def test_a_memory_cap_stops_the_build_with_its_reason(tables, tmp_path):
    with pytest.raises(kernstep.BuildStoppedError, match="element or memory limit") as err:
        kernstep.TestSet.build(tables, max_memory=10_000, cache_dir=tmp_path, progress=False)
    assert err.value.reason == "element_limit"


def test_ctrl_c_stops_a_long_build_and_stores_nothing(tmp_path):
    # The 3x3x5 tables take minutes to build (README: 560 s or more).
    a = three_way(3, 3, 5)
    model = kernstep.Model(a, b=a.sum(axis=1), c=np.zeros(45, dtype=int), lower=0)
    seen = []
    timer = threading.Timer(1.0, os.kill, (os.getpid(), signal.SIGINT))
    timer.start()
    try:
        with pytest.raises(KeyboardInterrupt):
            kernstep.TestSet.build(model, cache_dir=tmp_path, progress=seen.append)
    finally:
        timer.cancel()
    assert seen and all(isinstance(p, kernstep.BuildProgress) for p in seen)
    assert seen[-1].stages == seen[0].stages and seen[-1].seconds >= seen[0].seconds
    with pytest.raises(kernstep.CacheMissError):
        kernstep.TestSet.load(model, cache_dir=tmp_path)


def test_a_budgeted_build_that_reaches_the_proven_bound_is_complete(tmp_path):
    # The matrix of examples/twisted_cubic.json: its Graver basis is small and quick.
    model = kernstep.Model.from_file(EXAMPLES / "twisted_cubic.json")
    testset = kernstep.TestSet.build(model, budget=60, cache_dir=tmp_path, progress=False)
    # reference: `kernstep build` of the same file reports 5 moves, complete
    assert testset.coverage == "complete" and len(testset) == 5
