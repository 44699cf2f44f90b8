"""The exceptions of kernstep: one base class, one subclass per kind of failure.

Outcomes such as "infeasible" or "unbounded" are statuses of a :class:`kernstep.Result`, never
exceptions; an exception means bad input, an arithmetic limit, I/O, a damaged or missing cache
entry, or a build that stopped.
"""

from __future__ import annotations

from pathlib import Path

__all__ = [
    "KernstepError",
    "ModelError",
    "OutsideSetBoxError",
    "ArithmeticOverflowError",
    "FileError",
    "CacheError",
    "CacheMissError",
    "BuildStoppedError",
    "UnsupportedError",
    "RefutedError",
]


class KernstepError(Exception):
    """Base class of every exception kernstep raises."""


class ModelError(KernstepError, ValueError):
    """A bad input: a wrong dtype, shape, length or value.

    ``field`` names the argument and index (``"A[1, 2]"``, ``"lower[3]"``) and ``file`` the
    file or ``"<argument>"`` it came from, when known.
    """

    field: str | None = None
    file: str | None = None


class OutsideSetBoxError(ModelError):
    """A variant's range is wider than the box the test set was truncated to."""


class ArithmeticOverflowError(KernstepError, OverflowError):
    """An integer result does not fit the machine integers used at that step."""


class FileError(KernstepError, OSError):
    """Reading or writing a file failed."""


class CacheError(KernstepError):
    """The test-set cache refused an operation or found a damaged entry."""


class CacheMissError(CacheError):
    """No stored test set serves the model; build one with :meth:`kernstep.TestSet.build`.

    ``cache_dir`` is the directory searched.
    """

    cache_dir: Path | None = None


class BuildStoppedError(KernstepError):
    """A build stopped before it finished (a limit, or Ctrl-C).

    ``reason`` is ``"element_limit"``, ``"time_limit"`` or ``"cancelled"``. A saved state is
    resumed by the next build of the same set.
    """

    reason: str | None = None


class UnsupportedError(KernstepError):
    """The set or the solver cannot serve this request."""


class RefutedError(KernstepError):
    """The independent re-check refuted a solve's claim; the answer is withheld."""
