"""Shared fixtures: the repository's example files, the command line, generated models (the
3x3x4 tables, a 6 x 20 lanes scenario) and HiGHS as the reference MILP solver."""

from __future__ import annotations

import json
import os
import random
import subprocess
import sys
from pathlib import Path
from typing import Optional, Sequence

import numpy as np
import pytest

import kernstep

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "benches"))
import network_scenarios  # noqa: E402
EXAMPLES = ROOT / "examples"
SCENARIOS = EXAMPLES / "scenarios"


def cli_binary() -> Path:
    """The command line built from this checkout (`cargo build --release` at the root), or
    the one $KERNSTEP_CLI names."""
    path = Path(os.environ.get("KERNSTEP_CLI", ROOT / "target" / "release" / "kernstep"))
    if not path.is_file():
        pytest.fail(f"{path} is missing: run `cargo build --release` at {ROOT} first, or set "
                    "KERNSTEP_CLI to the kernstep binary")
    return path


def cli_json(*args: str) -> dict:
    """The JSON document of `kernstep ARGS --json` (exit 0 or 1: optimal or not)."""
    run = subprocess.run([str(cli_binary()), *args, "--json"], capture_output=True, text=True)
    assert run.returncode in (0, 1), run.stderr
    return json.loads(run.stdout)


def three_way(p: int, q: int, s: int) -> np.ndarray:
    """The p x q x s tables with all 2-margins (benches/completion.rs builds the same
    matrix): one row per line of cells along each of the three axes."""
    var = lambda i, j, k: (i * q + j) * s + k  # noqa: E731
    rows = []
    lines = ([[var(i, j, k) for k in range(s)] for i in range(p) for j in range(q)]
             + [[var(i, j, k) for j in range(q)] for i in range(p) for k in range(s)]
             + [[var(i, j, k) for i in range(p)] for j in range(q) for k in range(s)])
    for cells in lines:
        row = np.zeros(p * q * s, dtype=np.int64)
        row[cells] = 1
        rows.append(row)
    return np.array(rows)


def table_variants(a: np.ndarray, count: int, seed: int):
    """Feasible variants of the tables (the margins of a random table with entries 0..5),
    costs 1..9 and upper bounds at least the table's entries: (B, C, U)."""
    rng = np.random.default_rng(seed)
    n = a.shape[1]
    points = rng.integers(0, 6, size=(count, n))
    b = points @ a.T
    c = rng.integers(1, 10, size=(count, n))
    u = points + rng.integers(0, 4, size=(count, n))
    return b, c, u


def make_lanes(n_depots: int, n_zones: int, rng: random.Random) -> dict:
    """A feasible invented lanes scenario: the generator of benches/network_scenarios.py (a
    random plan first, then capacities and supplies around it), which the benchmarks share."""
    return network_scenarios.make_scenario(n_depots, n_zones, rng)


def highs_optimum(a: np.ndarray, b: Sequence[int], c: Sequence[int],
                  lower: Sequence[Optional[int]], upper: Sequence[Optional[int]]
                  ) -> Optional[int]:
    """The optimum of the integer program by HiGHS (highspy), `None` when infeasible."""
    return HighsKept(a, lower, upper).solve(b, c)


class HighsKept:
    """One HiGHS model kept alive; each solve changes only the numbers (bounds of the rows,
    costs, column bounds)."""

    def __init__(self, a: np.ndarray, lower, upper) -> None:
        import highspy

        self.highspy = highspy
        self.h = highspy.Highs()
        self.h.setOptionValue("output_flag", False)
        self.h.setOptionValue("threads", 1)
        self.h.setOptionValue("mip_rel_gap", 0.0)
        m, n = a.shape
        self.m, self.n = m, n
        lp = highspy.HighsLp()
        lp.num_col_, lp.num_row_ = n, m
        lp.col_cost_ = np.zeros(n)
        lp.col_lower_ = self._bounds(lower, -highspy.kHighsInf)
        lp.col_upper_ = self._bounds(upper, highspy.kHighsInf)
        lp.row_lower_ = lp.row_upper_ = np.zeros(m)
        csc = [(j, i, float(a[i, j])) for j in range(n) for i in range(m) if a[i, j]]
        lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
        lp.a_matrix_.start_ = np.searchsorted([e[0] for e in csc], np.arange(n + 1))
        lp.a_matrix_.index_ = np.array([e[1] for e in csc], dtype=np.int32)
        lp.a_matrix_.value_ = np.array([e[2] for e in csc])
        lp.integrality_ = [highspy.HighsVarType.kInteger] * n
        self.h.passModel(lp)
        self.cols = np.arange(n, dtype=np.int32)
        self.rows = np.arange(m, dtype=np.int32)

    @staticmethod
    def _bounds(values, infinite: float) -> np.ndarray:
        return np.array([infinite if v is None else float(v) for v in values])

    def solve(self, b, c, lower=None, upper=None) -> Optional[int]:
        """The optimum for these numbers; `None` when HiGHS proves the model infeasible."""
        h = self.h
        b = np.asarray(b, dtype=float)
        h.changeRowsBounds(self.m, self.rows, b, b)
        h.changeColsCost(self.n, self.cols, np.asarray(c, dtype=float))
        if lower is not None or upper is not None:
            inf = self.highspy.kHighsInf
            lo = self._bounds(lower, -inf) if lower is not None else None
            up = self._bounds(upper, inf) if upper is not None else None
            current = h.getLp()
            lo = lo if lo is not None else np.array(current.col_lower_)
            up = up if up is not None else np.array(current.col_upper_)
            h.changeColsBounds(self.n, self.cols, lo, up)
        h.run()
        status = h.getModelStatus()
        if status == self.highspy.HighsModelStatus.kInfeasible:
            return None
        assert status == self.highspy.HighsModelStatus.kOptimal, h.modelStatusToString(status)
        # highspy returns floats (and -0.0): round before comparing.
        return int(round(h.getInfo().objective_function_value))


@pytest.fixture(scope="session")
def cache_dir(tmp_path_factory) -> Path:
    """One cache for the session's builds."""
    return tmp_path_factory.mktemp("cache")


@pytest.fixture(scope="session")
def tables() -> kernstep.Model:
    """The 3x3x4 tables with all 2-margins, entries >= 0 (a model of arrays)."""
    a = three_way(3, 3, 4)
    return kernstep.Model(a, b=a @ np.ones(36, dtype=np.int64), c=np.arange(36) % 7,
                          lower=0)


@pytest.fixture(scope="session")
def tables_set(tables, cache_dir) -> kernstep.TestSet:
    """The Graver basis of the 3x3x4 tables (19,722 moves), built once per session."""
    return kernstep.TestSet.build(tables, cache_dir=cache_dir, progress=False)
