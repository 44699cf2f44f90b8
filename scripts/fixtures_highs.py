"""HiGHS as the reference solver for the solve fixtures, plus exact integer helpers.

Only general-purpose tools are used: HiGHS through its Python interface `highspy` for the
integer programs, and exact Python integers for lattice membership (Hermite normal form of the
column lattice, computed by integer column operations).
"""

import highspy

INF = highspy.kHighsInf


def _highs():
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.setOptionValue("mip_rel_gap", 0.0)
    h.setOptionValue("mip_abs_gap", 0.0)
    return h


def version():
    """The HiGHS version string, for example '1.16.0'."""
    return _highs().version()


def _model(matrix, rhs, cost, lower, upper, integer):
    rows, cols = len(matrix), len(matrix[0])
    lp = highspy.HighsLp()
    lp.num_col_ = cols
    lp.num_row_ = rows
    lp.col_cost_ = [float(c) for c in cost]
    lp.col_lower_ = [-INF if v is None else float(v) for v in lower]
    lp.col_upper_ = [INF if v is None else float(v) for v in upper]
    lp.row_lower_ = [float(v) for v in rhs]
    lp.row_upper_ = [float(v) for v in rhs]
    start, index, value = [0], [], []
    for j in range(cols):
        for i in range(rows):
            if matrix[i][j] != 0:
                index.append(i)
                value.append(float(matrix[i][j]))
        start.append(len(index))
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.start_ = start
    lp.a_matrix_.index_ = index
    lp.a_matrix_.value_ = value
    if integer:
        lp.integrality_ = [highspy.HighsVarType.kInteger] * cols
    return lp


def _run(matrix, rhs, cost, lower, upper, integer):
    h = _highs()
    h.passModel(_model(matrix, rhs, cost, lower, upper, integer))
    h.run()
    return h, h.getModelStatus()


def solve(matrix, rhs, cost, lower, upper):
    """Solves min cost.x, A x = rhs, lower <= x <= upper, x integer.

    Returns (status, objective, raw): status is 'optimal', 'infeasible' or 'unbounded',
    objective an int (rounded, -0.0 folded to 0) or None, raw HiGHS's own model status name.
    When HiGHS answers 'unbounded or infeasible', a zero-cost run decides: an integer program
    with a feasible point and an unbounded LP relaxation is unbounded (Meyer 1974: rational
    data).
    """
    h, status = _run(matrix, rhs, cost, lower, upper, True)
    raw = h.modelStatusToString(status)
    kind = highspy.HighsModelStatus
    if status == kind.kOptimal:
        value = round(h.getInfo().objective_function_value)
        return "optimal", int(value) + 0, raw
    if status == kind.kInfeasible:
        return "infeasible", None, raw
    if status in (kind.kUnbounded, kind.kUnboundedOrInfeasible):
        _, feasible = _run(matrix, rhs, [0] * len(cost), lower, upper, True)
        if feasible == kind.kOptimal:
            return "unbounded", None, raw
        return "infeasible", None, raw
    raise RuntimeError(f"HiGHS ended with {raw}")


def plan(matrix, rhs, cost, lower, upper):
    """An optimal integer plan of min cost.x, A x = rhs, lower <= x <= upper (rounded)."""
    h, status = _run(matrix, rhs, cost, lower, upper, True)
    if status != highspy.HighsModelStatus.kOptimal:
        raise RuntimeError(f"HiGHS ended with {h.modelStatusToString(status)}")
    return [int(round(v)) + 0 for v in h.getSolution().col_value]


def lp_feasible(matrix, rhs, lower, upper):
    """True when the LP relaxation (rational x in the box) is feasible."""
    _, status = _run(matrix, rhs, [0] * len(matrix[0]), lower, upper, False)
    return status == highspy.HighsModelStatus.kOptimal


def column_hnf(matrix):
    """A lower-triangular basis of the lattice spanned by the columns (exact integers).

    Returns a list of basis columns, column k having its first nonzero in row pivot[k], with
    the pivots increasing.
    """
    cols = [list(c) for c in zip(*matrix)]
    basis = []
    for row in range(len(matrix)):
        active = [c for c in cols if c[row] != 0]
        rest = [c for c in cols if c[row] == 0]
        while len(active) > 1:
            active.sort(key=lambda c: abs(c[row]))
            pivot = active[0]
            reduced = []
            for c in active[1:]:
                q = c[row] // pivot[row]
                r = [a - q * b for a, b in zip(c, pivot)]
                (reduced if r[row] != 0 else rest).append(r)
            active = [pivot] + reduced
        if active:
            basis.append((row, active[0]))
        cols = rest
    return basis


def in_column_lattice(matrix, rhs):
    """True when A z = rhs has an integer solution z."""
    residual = list(rhs)
    for row, column in column_hnf(matrix):
        if residual[row] % column[row] != 0:
            return False
        q = residual[row] // column[row]
        residual = [a - q * b for a, b in zip(residual, column)]
    return all(v == 0 for v in residual)
