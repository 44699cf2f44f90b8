"""One solve: statuses, certificates, warm starts, limits and the errors of a bad variant."""

from __future__ import annotations

import numpy as np
import pytest

import kernstep
from conftest import table_variants


def test_a_warm_start_reaches_the_same_optimum(tables, tables_set):
    b, c, _ = table_variants(tables.A, 2, seed=31)
    yesterday = tables_set.solve(b=b[0], c=c[0])
    cold = tables_set.solve(b=b[1], c=c[1])
    # reference: the cold solve of the same numbers
    warm = tables_set.solve(b=b[1], c=c[1], warm_start=yesterday)
    assert warm.objective == cold.objective
    assert tables_set.solve(b=b[1], c=c[1], warm_start=yesterday.x).objective == cold.objective


def test_a_warm_start_of_another_model_is_refused(tables_set):
    with pytest.raises(kernstep.ModelError, match="warm_start: has 4 entries"):
        tables_set.solve(warm_start=[1, 2, 3, 4])


def test_the_step_limit_is_a_status_not_an_error(tables, tables_set):
    b, c, _ = table_variants(tables.A, 1, seed=32)
    result = tables_set.solve(b=b[0], c=c[0], max_steps=0)
    assert result.status == kernstep.Status.STEP_LIMIT and result.objective is None
    assert result.outcome == {"tag": "step_limit"}


def test_empty_range_and_no_integer_solution_are_proven_infeasible(tmp_path):
    model = kernstep.Model([[2, 2, 1]], b=[4], c=[1, 1, 1], lower=0, upper=[5, 5, 0])
    testset = kernstep.TestSet.build(model, cache_dir=tmp_path, progress=False)
    assert testset.solve().status == kernstep.Status.OPTIMAL
    # reference: by hand, 2 x1 + 2 x2 is even, so 3 has no integer solution once x3 = 0
    odd = testset.solve(b=[3], upper=[5, 5, None])
    assert odd.status == kernstep.Status.OPTIMAL and odd.objective == 2
    odd = testset.solve(b=[3])
    assert odd.status == kernstep.Status.INFEASIBLE
    assert odd.outcome["tag"] == "no_lattice_point_in_box"
    crossed = testset.solve(lower=[0, 3, 0], upper=[5, 2, 0])
    assert crossed.status == kernstep.Status.INFEASIBLE
    assert crossed.outcome == {"tag": "empty_range", "variable": "x2"}
    even = kernstep.TestSet.build(kernstep.Model([[2, 2]], b=[4], c=[1, 1]), cache_dir=tmp_path,
                                  progress=False)
    no_solution = even.solve(b=[3])
    assert no_solution.status == kernstep.Status.INFEASIBLE and no_solution.x is None
    assert no_solution.outcome == {"tag": "no_integer_solution", "multipliers": ["1/2"]}


def test_unbounded_plans_carry_their_ray(tmp_path):
    # x1 - x2 = 0 with x free and cost -1 on both: the cost falls along (1, 1) forever.
    model = kernstep.Model([[1, -1, 0], [0, 1, -1]], b=[0, 0], c=[-1, -1, -1])
    testset = kernstep.TestSet.build(model, cache_dir=tmp_path, progress=False)
    result = testset.solve()
    assert result.status == kernstep.Status.UNBOUNDED and result.objective is None
    assert result.outcome["tag"] == "unbounded"
    direction = np.array(result.outcome["direction"])
    # reference: by hand, the kernel of A is spanned by (1, 1, 1)
    assert abs(direction).tolist() == [1, 1, 1]


def test_every_strategy_reaches_the_same_certified_optimum(tables, tables_set):
    b, c, _ = table_variants(tables.A, 20, seed=33)
    # reference: the default Graver-best steps
    best = tables_set.solve_many(B=b, C=c)
    for strategy in ("first", "steepest"):
        other = tables_set.solve_many(B=b, C=c, strategy=strategy)
        np.testing.assert_array_equal(other.objective, best.objective)
        assert (other.status == kernstep.Status.OPTIMAL).all()
    with pytest.raises(kernstep.ModelError, match='strategy: "fastest" is no strategy'):
        tables_set.solve(strategy="fastest")


def test_a_trace_replays_and_becomes_a_frame_with_pandas(tables, tables_set):
    b, c, _ = table_variants(tables.A, 1, seed=34)
    trace = tables_set.trace(b=b[0], c=c[0])
    # reference: TestSet.solve of the same numbers
    assert trace.x.tolist() == tables_set.solve(b=b[0], c=c[0]).x.tolist()
    point = trace.start
    for step in trace:
        point = point + int(step["length"]) * np.array(step["direction"])
        assert int(step["before"]) - int(step["after"]) == int(step["gain"]) > 0
    np.testing.assert_array_equal(point, trace.x)
    try:
        import pandas  # noqa: F401
    except ImportError:
        with pytest.raises(ImportError, match="pip install pandas"):
            trace.to_frame()
    else:
        frame = trace.to_frame()
        assert len(frame) == len(trace) and "direction" in frame.columns
