"""kernstep: test sets of lattice moves, computed once, for fast certified re-optimisation of
integer models ``min c.x, A x = b, lower <= x <= upper, x integer``.

Build the test set of a model's matrix once (:meth:`TestSet.build`, kept in the cache), then
re-optimise any variant of the numbers (:meth:`TestSet.solve`, :meth:`TestSet.solve_many`)
in microseconds, each answer certified.

>>> import numpy as np, kernstep
>>> A = np.array([[1, 1, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1]])
>>> model = kernstep.Model(A, b=[7, 5, 6], c=[4, 6, 5, 3], lower=0, upper=[5, None, 4, None])
>>> result = kernstep.TestSet.load(model).solve()   # a network: no stored set needed
>>> result.status, result.objective, result.x.tolist()
(<Status.OPTIMAL: 0>, 44, [5, 2, 0, 4])
"""

from ._api import (
    Batch,
    BuildProgress,
    Model,
    Result,
    Status,
    TestSet,
    Trace,
    analyze,
)
from .errors import (
    ArithmeticOverflowError,
    BuildStoppedError,
    CacheError,
    CacheMissError,
    FileError,
    KernstepError,
    ModelError,
    OutsideSetBoxError,
    RefutedError,
    UnsupportedError,
)

__all__ = [
    "ArithmeticOverflowError",
    "Batch",
    "BuildProgress",
    "BuildStoppedError",
    "CacheError",
    "CacheMissError",
    "FileError",
    "KernstepError",
    "Model",
    "ModelError",
    "OutsideSetBoxError",
    "RefutedError",
    "Result",
    "Status",
    "TestSet",
    "Trace",
    "UnsupportedError",
    "analyze",
]
