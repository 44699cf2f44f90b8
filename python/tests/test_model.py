"""Models from arrays of every integer dtype, lists and scipy.sparse matrices; bad input
refused with the argument and index named; models from the files the command line reads."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse

import kernstep
from conftest import EXAMPLES, SCENARIOS, cli_json

# The lane plan of examples/lane_plan.toml (README and lib.rs docs).
A = np.array([[1, 1, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1]])
B = [7, 5, 6]
C = [4, 6, 5, 3]
UPPER = [5, None, 4, None]


def lane_plan(**changes) -> kernstep.Model:
    arguments = dict(A=A, b=B, c=C, lower=0, upper=UPPER)
    arguments.update(changes)
    return kernstep.Model(**arguments)


def plan_of(model: kernstep.Model) -> tuple:
    result = kernstep.TestSet.load(model).solve()
    return result.status, result.objective, result.x.tolist()


# reference: worked by hand in src/lib.rs (x = (t, 7 - t, 5 - t, t - 1), cost 64 - 4t, t = 5)
HAND = (kernstep.Status.OPTIMAL, 44, [5, 2, 0, 4])


@pytest.mark.parametrize("dtype", [np.int8, np.int16, np.int32, np.int64, np.uint8,
                                   np.uint16, np.uint32, np.uint64, np.float32, np.float64])
def test_every_integer_dtype_and_integral_floats_give_the_same_model(dtype):
    model = lane_plan(A=A.astype(dtype), b=np.array(B, dtype=dtype), c=np.array(C, dtype=dtype))
    assert model.A.dtype == np.int64 and model.b.dtype == np.int64
    assert plan_of(model) == HAND


def test_lists_booleans_and_python_ints_are_integers():
    assert plan_of(lane_plan(A=A.astype(bool), b=list(B), c=tuple(C))) == HAND
    big = np.array(B, dtype=object)
    assert plan_of(lane_plan(b=big)) == HAND


@pytest.mark.parametrize("form", [scipy.sparse.csr_matrix, scipy.sparse.csc_matrix,
                                  scipy.sparse.coo_matrix, scipy.sparse.csr_array])
def test_sparse_matrices_equal_dense(form):
    model = lane_plan(A=form(A))
    np.testing.assert_array_equal(model.A, A)
    assert plan_of(model) == HAND


def test_bounds_take_scalars_none_entries_and_infinities():
    with_inf = lane_plan(lower=np.zeros(4), upper=np.array([5, np.inf, 4, np.inf]))
    assert with_inf.upper == [5, None, 4, None] and with_inf.lower == [0, 0, 0, 0]
    assert plan_of(with_inf) == HAND
    free = lane_plan(lower=None, upper=None)
    assert free.lower == [None] * 4 and free.upper == [None] * 4


def test_a_float_that_is_not_integral_is_refused_with_its_index():
    with pytest.raises(kernstep.ModelError, match=r"A\[1, 2\]: 0\.5 is not an integer") as err:
        lane_plan(A=np.array([[1, 1, 0, 0], [1, 0, 0.5, 0], [0, 1, 0, 1]]))
    assert err.value.field == "A[1, 2]"
    with pytest.raises(kernstep.ModelError, match=r"b\[2\]: nan is not an integer"):
        lane_plan(b=[7.0, 5.0, float("nan")])
    with pytest.raises(kernstep.ModelError, match=r"lower\[1\]"):
        lane_plan(lower=[0, 0.25, 0, 0])


def test_wrong_dtypes_shapes_and_lengths_are_refused_naming_the_argument():
    with pytest.raises(kernstep.ModelError, match="A: has dtype <U1; pass integers"):
        lane_plan(A=np.array([["1"]]))
    with pytest.raises(kernstep.ModelError, match=r"A: expected a 2-D array, got one of shape \(4,\)"):
        lane_plan(A=np.array([1, 1, 0, 0]))
    with pytest.raises(kernstep.ModelError, match="b: has 2 entries, the model has 3 rows"):
        lane_plan(b=[7, 5])
    with pytest.raises(kernstep.ModelError, match="c: has 5 entries, the model has 4 variables"):
        lane_plan(c=[1, 2, 3, 4, 5])
    with pytest.raises(kernstep.ModelError, match=r"upper: has shape \(3,\), expected \(4,\)"):
        lane_plan(upper=[1, 2, 3])
    with pytest.raises(kernstep.ModelError, match=r"A: has shape \(0, 4\)"):
        lane_plan(A=np.zeros((0, 4), dtype=int), b=[])
    # A ModelError is a ValueError too, for callers that catch those.
    with pytest.raises(ValueError):
        lane_plan(c=[1j, 2, 3, 4])


def test_values_beyond_the_library_range_are_refused_never_wrapped():
    with pytest.raises(kernstep.ModelError, match=r"A\[0, 1\]: 2147483648 is out of range"):
        lane_plan(A=np.array([[1, 2**31, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1]]))
    with pytest.raises(kernstep.ModelError, match=r"b\[1\]: 4611686018427387905 is out of range"):
        lane_plan(b=[7, 2**62 + 1, 6])
    with pytest.raises(kernstep.ModelError, match=r"b\[0\]: 18446744073709551615 does not fit int64"):
        lane_plan(b=np.array([2**64 - 1, 5, 6], dtype=np.uint64))
    with pytest.raises(kernstep.ModelError, match=r"c\[3\]: 36893488147419103232 does not fit"):
        lane_plan(c=[4, 6, 5, 2**65])
    with pytest.raises(kernstep.ModelError, match=r"upper\[2\]: 4611686018427387905 is out of"):
        lane_plan(upper=[5, None, 2**62 + 1, None])
    # The largest finite bound the library takes is accepted.
    assert lane_plan(upper=[5, None, 2**62, None]).upper[2] == 2**62


def test_crossed_bounds_and_bad_signs_are_refused():
    with pytest.raises(kernstep.ModelError, match=r"lower\[2\]: 6 is above upper\[2\] = 4"):
        lane_plan(lower=[0, 0, 6, 0])
    with pytest.raises(kernstep.ModelError, match=r"signs\[1\]: 'x' is no sign"):
        lane_plan(signs="+x++")
    with pytest.raises(kernstep.ModelError, match="signs: has 3 entries, the model has 4"):
        lane_plan(signs=[1, 1, 0])
    assert lane_plan(signs=[1, -1, 0, 1]).signs == "+-f+"


def test_model_files_read_as_the_command_line_reads_them():
    model = kernstep.Model.from_file(EXAMPLES / "lane_plan.toml")
    assert model.variable_names[0] == "brackwater_north"
    assert model.shape == (3, 4) and model.upper == UPPER
    assert plan_of(model) == HAND
    scenario = kernstep.Model.from_file(SCENARIOS / "brackle_lanes.toml")
    assert scenario.shape[1] > 0 and scenario.origin.endswith("brackle_lanes.toml")
    # reference: examples/scenarios/corran_quarries.toml has lane surcharges (convex costs)
    assert kernstep.Model.from_file(SCENARIOS / "corran_quarries.toml").has_convex_costs
    assert not scenario.has_convex_costs and not model.has_convex_costs


def test_a_bad_file_raises_with_the_file_and_field(tmp_path):
    bad = tmp_path / "bad.json"
    bad.write_text('{"matrix": [[1, 2.5]], "rhs": [1]}')
    with pytest.raises(kernstep.ModelError, match=r"bad\.json: matrix\[0\]\[1\]") as err:
        kernstep.Model.from_file(bad)
    assert err.value.file.endswith("bad.json") and err.value.field == "matrix[0][1]"
    with pytest.raises(kernstep.FileError):
        kernstep.Model.from_file(tmp_path / "missing.toml")


@pytest.mark.parametrize("name", ["transport_3x3.json", "twisted_cubic.json", "lane_plan.toml"])
def test_analyze_equals_the_command_line(name):
    path = EXAMPLES / name
    figures = kernstep.analyze(kernstep.Model.from_file(path))
    # reference: `kernstep analyze FILE --json` on the same file
    assert figures == cli_json("analyze", str(path))


@pytest.mark.parametrize("upper", [
    np.array([5.0, np.inf, 4.0, np.inf]),
    np.array([5, 2**62, 4, 2**62]),
    np.array([5, None, 4, None], dtype=object),
])
def test_bounds_of_every_common_form_agree(upper):
    model = lane_plan(upper=upper)
    expected = [5, None, 4, None] if upper.dtype != np.int64 else [5, 2**62, 4, 2**62]
    assert model.upper == expected
    assert plan_of(model) == HAND


@pytest.mark.parametrize("upper, field, message", [
    (np.array([5.0, np.inf, 4.5, np.inf]), "upper[2]", "4.5 is not an integer"),
    (np.array([5.0, np.nan, 4.0, np.inf]), "upper[1]", "nan is not an integer"),
    (np.array([5.0, -np.inf, 4.0, np.inf]), "upper[1]", "-inf is not an integer"),
    (np.array([5, 2**62 + 1, 4, 0]), "upper[1]", "4611686018427387905 is out of range"),
    (np.array([5, None, 2**62 + 1, None], dtype=object), "upper[2]", "is out of range"),
    (np.array([5, None, 0.5, None], dtype=object), "upper[2]", "0.5 is not an integer"),
])
def test_bad_bounds_of_every_form_are_named(upper, field, message):
    with pytest.raises(kernstep.ModelError, match=message) as err:
        lane_plan(upper=upper)
    assert err.value.field == field
