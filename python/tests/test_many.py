"""solve_many: the rows of 2-D arrays solved in parallel equal one solve per row."""

from __future__ import annotations

import numpy as np
import pytest

import kernstep
from conftest import table_variants


def test_a_thousand_rows_equal_a_thousand_single_solves(tables, tables_set):
    b, c, u = table_variants(tables.A, 1000, seed=21)
    b[::97, 0] += 1  # some rows without a plan
    batch = tables_set.solve_many(B=b, C=c, U=u)
    assert batch.status.shape == (1000,) and batch.x.shape == (1000, 36)
    assert batch.objective.dtype == np.int64 and batch.x.dtype == np.int64
    assert (batch.status != kernstep.Status.OPTIMAL).any()
    for k in range(1000):
        # reference: TestSet.solve of the same numbers, one at a time
        single = tables_set.solve(b=b[k], c=c[k], upper=u[k])
        assert batch.status[k] == single.status, f"row {k}"
        assert batch.steps[k] == single.steps, f"row {k}"
        if single.status == kernstep.Status.OPTIMAL:
            assert batch.objective[k] == single.objective
            np.testing.assert_array_equal(batch.x[k], single.x)
        else:
            assert batch.objective[k] == 0 and not batch.x[k].any()


def test_thread_counts_give_the_same_answers(tables, tables_set):
    b, c, _ = table_variants(tables.A, 64, seed=22)
    one = tables_set.solve_many(B=b, C=c, threads=1)
    two = tables_set.solve_many(B=b, C=c, threads=2)
    for field in one._fields:
        np.testing.assert_array_equal(getattr(one, field), getattr(two, field))


def test_omitted_arrays_keep_the_models_numbers(tables, tables_set):
    _, c, _ = table_variants(tables.A, 5, seed=23)
    batch = tables_set.solve_many(C=c, L=0)
    for k in range(5):
        # reference: TestSet.solve with the model's right-hand side
        assert batch.objective[k] == tables_set.solve(c=c[k]).objective


def test_bad_tables_are_refused_naming_the_argument(tables, tables_set):
    b, c, _ = table_variants(tables.A, 4, seed=24)
    with pytest.raises(kernstep.ModelError, match="C: has 3 rows, B has 4"):
        tables_set.solve_many(B=b, C=c[:3])
    with pytest.raises(kernstep.ModelError, match="B: has 36 columns, the model has 33 rows"):
        tables_set.solve_many(B=c)
    with pytest.raises(kernstep.ModelError, match="give at least one of B, C, L and U"):
        tables_set.solve_many(B=b[0])
    with pytest.raises(kernstep.ModelError, match=r"B\[2, 5\]: 0\.5 is not an integer"):
        bad = b.astype(float)
        bad[2, 5] = 0.5
        tables_set.solve_many(B=bad)
    with pytest.raises(kernstep.ModelError, match=r"C\[1, 3\]: 4611686018427387905 is out"):
        big = c.copy()
        big[1, 3] = 2**62 + 1
        tables_set.solve_many(C=big)
    with pytest.raises(kernstep.ModelError, match="threads: must be at least 1"):
        tables_set.solve_many(B=b, threads=0)


def test_ctrl_c_stops_solve_many(tables, tables_set):
    import os
    import signal
    import threading

    # About ten seconds of solves on one thread; Ctrl-C after a fifth of a second.
    b, c, _ = table_variants(tables.A, 20000, seed=25)
    timer = threading.Timer(0.2, os.kill, (os.getpid(), signal.SIGINT))
    timer.start()
    try:
        with pytest.raises(KeyboardInterrupt):
            tables_set.solve_many(B=b, C=c, threads=1)
    finally:
        timer.cancel()
