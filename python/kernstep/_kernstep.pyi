"""Type stubs of the compiled module ``kernstep._kernstep``.

Arrays are C-contiguous ``int64``; infinite bounds are ``INT64_MIN`` (lower) and
``INT64_MAX`` (upper). The public API (``kernstep.Model``, ``kernstep.TestSet``, ...) wraps
these and accepts any integer input.
"""

from typing import Callable, Optional, Union
import os

import numpy as np
import numpy.typing as npt

#: Largest absolute value of a right-hand side, cost or bound: ``2**62``.
VALUE_LIMIT: int
#: Largest absolute value of a matrix entry: ``2**31 - 1``.
MATRIX_ENTRY_LIMIT: int

_Int64 = npt.NDArray[np.int64]
_Path = Union[str, os.PathLike[str]]

class _Model:
    """A validated model ``min c.x, A x = b, lower <= x <= upper, x integer``."""

    def __init__(self, a: _Int64, b: _Int64, c: _Int64, lower: _Int64, upper: _Int64,
                 signs: Optional[str] = None) -> None: ...
    @staticmethod
    def from_file(path: _Path) -> _Model: ...
    @property
    def a(self) -> _Int64: ...
    @property
    def b(self) -> _Int64: ...
    @property
    def c(self) -> _Int64: ...
    @property
    def lower(self) -> list[Optional[int]]: ...
    @property
    def upper(self) -> list[Optional[int]]: ...
    @property
    def variable_names(self) -> list[str]: ...
    @property
    def row_names(self) -> list[str]: ...
    @property
    def signs(self) -> Optional[str]: ...
    @property
    def origin(self) -> str: ...
    @property
    def shape(self) -> tuple[int, int]: ...
    @property
    def has_convex_costs(self) -> bool: ...

def analyze(model: _Model, subdet_limit: Optional[int] = None) -> str:
    """The analysis document (JSON) of the model's matrix."""

class _TestSet:
    """A test set prepared for the solves of one model's variants."""

    @staticmethod
    def build(model: _Model, kind: str = "graver", norm_limit: Optional[int] = None,
              budget: Optional[float] = None, max_memory: Optional[int] = None,
              cache_dir: Optional[_Path] = None,
              progress: Optional[Callable[[int, int, int, int, float], object]] = None,
              rebuild: bool = False) -> _TestSet: ...
    @staticmethod
    def load(model: _Model, cache_dir: Optional[_Path] = None) -> _TestSet: ...
    def solve(
        self, b: Optional[_Int64] = None, c: Optional[_Int64] = None,
        lower: Optional[_Int64] = None, upper: Optional[_Int64] = None,
        warm_start: Optional[_Int64] = None,
        strategy: str = "graver_best", max_steps: Optional[int] = None,
    ) -> tuple[int, str, Optional[_Int64], Optional[int], Optional[str], Optional[str],
               Optional[str], int, int, float]:
        """(status, outcome JSON, x, objective, claim, bound, gap, phase I steps, phase II
        steps, seconds)"""
    def solve_many(
        self, b: Optional[_Int64] = None, c: Optional[_Int64] = None,
        lower: Optional[_Int64] = None, upper: Optional[_Int64] = None,
        threads: Optional[int] = None, strategy: str = "graver_best",
        max_steps: Optional[int] = None,
    ) -> tuple[npt.NDArray[np.uint8], _Int64, _Int64, npt.NDArray[np.uint64]]:
        """(status codes, objectives, plans, steps)"""
    def trace(
        self, b: Optional[_Int64] = None, c: Optional[_Int64] = None,
        lower: Optional[_Int64] = None, upper: Optional[_Int64] = None,
        warm_start: Optional[_Int64] = None,
        strategy: str = "graver_best", max_steps: Optional[int] = None,
    ) -> str:
        """The trace document (JSON)."""
    @property
    def kind(self) -> str: ...
    @property
    def coverage(self) -> str: ...
    @property
    def norm_limit(self) -> Optional[int]: ...
    @property
    def source(self) -> str: ...
    @property
    def moves(self) -> _Int64: ...
