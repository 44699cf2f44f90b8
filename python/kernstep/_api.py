"""Models, test sets and certified solves: the Python face of the compiled module."""

from __future__ import annotations

import datetime
import enum
import json
import os
import sys
import time
from dataclasses import dataclass, field
from typing import Any, Callable, NamedTuple, Optional, Sequence, Union

import numpy as np

from . import _kernstep
from ._arrays import bad, bounds, integers

PathLike = Union[str, "os.PathLike[str]"]


class Status(enum.IntEnum):
    """How a solve ended; the codes of :attr:`Batch.status` are these values."""

    #: Optimal, with a certificate (see :attr:`Result.claim`).
    OPTIMAL = 0
    #: A plan no move of a norm-truncated set improves, not proven optimal (see
    #: :attr:`Result.bound` and :attr:`Result.gap`).
    FEASIBLE = 1
    #: No plan exists, with a proof (in :attr:`Result.outcome`).
    INFEASIBLE = 2
    #: The cost falls without limit along a ray (in :attr:`Result.outcome`).
    UNBOUNDED = 3
    #: A partial set found no feasible plan: nothing is proven either way.
    UNKNOWN = 4
    #: The step limit stopped the solve.
    STEP_LIMIT = 5
    #: The solve was interrupted.
    CANCELLED = 6

    def __str__(self) -> str:
        return self.name


def _signs(signs: Any, n: int) -> Optional[str]:
    """A sign pattern as the compiled module takes it: ``+``, ``-`` or ``f`` per variable."""
    if signs is None or isinstance(signs, str):
        return signs
    symbols = {1: "+", -1: "-", 0: "f"}
    out = []
    for i, s in enumerate(signs):
        if isinstance(s, str) and len(s) == 1:
            out.append(s)
        elif not isinstance(s, bool) and isinstance(s, (int, np.integer)) and int(s) in symbols:
            out.append(symbols[int(s)])
        else:
            raise bad(f"signs[{i}]", f"{s!r} is no sign; use 1 (>= 0), -1 (<= 0), 0 (free) "
                                     "or '+', '-', 'f'")
    return "".join(out)


class Model:
    """An integer model ``min c.x, A x = b, lower <= x <= upper, x integer``.

    ``A`` is a 2-D array of any integer dtype (integral floats and scipy.sparse matrices are
    accepted), ``b`` has one entry per row and ``c`` one per variable. ``lower`` and ``upper``
    are scalars or one bound per variable; ``None`` (the default, as in model files),
    ``None`` entries and ``-inf``/``inf`` mean unbounded. ``signs`` (``"++f-"``, or
    ``1``/``-1``/``0`` per variable) is the sign pattern a Hilbert basis is built for.

    Matrix entries must lie within ``2**31 - 1`` and every other number within ``2**62``;
    anything else raises :class:`kernstep.ModelError` naming the argument and index.
    """

    __slots__ = ("_inner",)
    _inner: _kernstep._Model

    def __init__(self, A: Any, b: Any, c: Any, lower: Any = None, upper: Any = None,
                 signs: Union[str, Sequence[int], None] = None) -> None:
        a = integers(A, "A", 2)
        m, n = a.shape
        self._inner = _kernstep._Model(
            a,
            integers(b, "b", 1),
            integers(c, "c", 1),
            bounds(lower, "lower", "lower", (n,)),
            bounds(upper, "upper", "upper", (n,)),
            _signs(signs, n),
        )

    @classmethod
    def from_file(cls, path: PathLike) -> "Model":
        """The model in a file the command line reads: JSON, TOML or MPS (also ``.gz``), or
        a transport scenario, compiled into its model."""
        model = cls.__new__(cls)
        model._inner = _kernstep._Model.from_file(os.fspath(path))
        return model

    @property
    def A(self) -> np.ndarray:
        """The constraint matrix (int64, rows x variables)."""
        return self._inner.a

    @property
    def b(self) -> np.ndarray:
        """The right-hand side (int64)."""
        return self._inner.b

    @property
    def c(self) -> np.ndarray:
        """The linear cost (int64)."""
        return self._inner.c

    @property
    def lower(self) -> list[Optional[int]]:
        """The lower bounds, ``None`` where unbounded."""
        return self._inner.lower

    @property
    def upper(self) -> list[Optional[int]]:
        """The upper bounds, ``None`` where unbounded."""
        return self._inner.upper

    @property
    def variable_names(self) -> list[str]:
        """The variable names (``x1``, ``x2``, ... for a model of arrays)."""
        return self._inner.variable_names

    @property
    def row_names(self) -> list[str]:
        """The row names (``r1``, ``r2``, ... for a model of arrays)."""
        return self._inner.row_names

    @property
    def signs(self) -> Optional[str]:
        """The sign pattern given, if any."""
        return self._inner.signs

    @property
    def origin(self) -> str:
        """The file the model was read from, or ``"<arrays>"``."""
        return self._inner.origin

    @property
    def has_convex_costs(self) -> bool:
        """Whether the model (read from a file) adds piecewise-linear convex costs to ``c``;
        variants change ``c`` and keep them."""
        return self._inner.has_convex_costs

    @property
    def shape(self) -> tuple[int, int]:
        """``(rows, variables)``."""
        return self._inner.shape

    def __repr__(self) -> str:
        m, n = self.shape
        return f"<kernstep.Model {m} rows x {n} variables from {self.origin}>"


def analyze(model: Model, subdet_limit: Optional[int] = None) -> dict[str, Any]:
    """The figures of ``model``'s matrix, as ``kernstep analyze --json`` prints them: size,
    rank, kernel dimension, the largest minor, column numbers, unimodularity, the Graver norm
    bounds, the norm limit of a build, the proximity bound, whether it is a network.

    ``subdet_limit`` caps the column subsets enumerated for the largest minor (beyond it the
    minor is an upper bound, labelled as such).
    """
    return json.loads(_kernstep.analyze(model._inner, subdet_limit))


@dataclass(frozen=True)
class Result:
    """One certified solve."""

    #: How the solve ended.
    status: Status
    #: The point reached (``None`` when ``A x = b`` has no integer solution).
    x: Optional[np.ndarray]
    #: The plan's cost, for an optimal (or :attr:`Status.FEASIBLE`) plan.
    objective: Optional[int]
    #: What proves an optimal plan: ``"test_set"``, ``"bound_met"`` or ``"potentials"``.
    claim: Optional[str]
    #: A proven lower bound on the cost of any plan (partial sets only).
    bound: Optional[int]
    #: ``objective - bound`` for a plan that is not proven optimal.
    gap: Optional[int]
    #: Augmenting steps in phase I (towards the box).
    steps_feasibility: int
    #: Augmenting steps in phase II (down the cost).
    steps_cost: int
    #: Seconds of the augmentation.
    seconds: float
    #: The outcome as the command line's ``--json`` documents give it: ``{"tag": ...}`` plus
    #: its proof (multipliers, the cut's rows, the ray).
    outcome: dict[str, Any] = field(repr=False)

    @property
    def steps(self) -> int:
        """Augmenting steps over both phases."""
        return self.steps_feasibility + self.steps_cost

    @property
    def optimal(self) -> bool:
        """Whether the plan is proven optimal."""
        return self.status == Status.OPTIMAL


class Batch(NamedTuple):
    """The answers of :meth:`TestSet.solve_many`, one entry (or row) per variant."""

    #: :class:`Status` codes (uint8).
    status: np.ndarray
    #: The plans' costs (int64; 0 where the status has no plan).
    objective: np.ndarray
    #: The plans (int64, variants x variables; zeros where the status has no plan).
    x: np.ndarray
    #: Augmenting steps over both phases (uint64).
    steps: np.ndarray


class BuildProgress(NamedTuple):
    """A snapshot of a running build, passed to a ``progress`` callable."""

    #: The stage being worked on (0 is the projected start set).
    stage: int
    #: Number of stages.
    stages: int
    #: The norm level of the sums being processed.
    level: int
    #: Members of the working set.
    elements: int
    #: Seconds since the build started.
    seconds: float


class Trace(list):
    """The augmenting steps of one solve, one dict per step (``step``, ``phase``,
    ``move_index``, ``sign``, ``length``, ``direction``, ``before``, ``after``, ``gain``),
    with the whole replayable document (the layout of ``kernstep trace --json``) in
    :attr:`document`. As in that document, ``length``, ``before``, ``after`` and ``gain``
    are decimal strings (exact beyond 2**53); :attr:`start` and :attr:`x` are integer
    arrays."""

    def __init__(self, document: dict[str, Any]) -> None:
        super().__init__(document["steps"])
        #: The trace document: instance, start, steps, final point, outcome, re-check.
        self.document = document

    @property
    def start(self) -> Optional[np.ndarray]:
        """The start point."""
        start = self.document["start"]
        return None if start is None else np.array(start, dtype=np.int64)

    @property
    def x(self) -> Optional[np.ndarray]:
        """The final point."""
        x = self.document["x"]
        return None if x is None else np.array(x, dtype=np.int64)

    @property
    def outcome(self) -> dict[str, Any]:
        """How the solve ended (``{"tag": ...}``)."""
        return self.document["outcome"]

    def to_frame(self) -> Any:
        """The steps as a pandas DataFrame (needs pandas; kernstep does not depend on it)."""
        try:
            import pandas
        except ImportError as missing:
            raise ImportError("Trace.to_frame needs pandas: pip install pandas") from missing
        return pandas.DataFrame.from_records(list(self))


def _seconds(budget: Union[float, datetime.timedelta, None]) -> Optional[float]:
    if isinstance(budget, datetime.timedelta):
        return budget.total_seconds()
    return None if budget is None else float(budget)


def _progress_printer() -> Callable[..., None]:
    """Prints a build's progress to ``sys.stderr`` at most every two seconds."""
    last = [0.0]

    def report(stage: int, stages: int, level: int, elements: int, seconds: float) -> None:
        now = time.monotonic()
        if now - last[0] >= 2.0:
            last[0] = now
            print(f"kernstep: building, stage {stage}/{stages}, norm level {level}, "
                  f"{elements:,} moves in the working set, {seconds:.1f} s",
                  file=sys.stderr, flush=True)

    return report


class TestSet:
    """A test set of lattice moves for a model's matrix, prepared for solving its variants.

    Make one with :meth:`build` (computes the set, stores it in the cache) or :meth:`load`
    (reads it from the cache). A network matrix needs no stored set: its Graver basis is the
    set of its cycles, which the network solver walks directly.
    """

    __slots__ = ("_inner", "_model")
    __test__ = False  # not a pytest test class
    _inner: _kernstep._TestSet
    _model: Model

    def __init__(self) -> None:
        raise TypeError("use TestSet.build(model) or TestSet.load(model)")

    @classmethod
    def _of(cls, inner: "_kernstep._TestSet", model: Model) -> "TestSet":
        testset = cls.__new__(cls)
        testset._inner = inner
        testset._model = model
        return testset

    @classmethod
    def build(cls, model: Model, kind: str = "graver", norm_limit: Optional[int] = None,
              budget: Union[float, datetime.timedelta, None] = None,
              max_memory: Optional[int] = None, cache_dir: Optional[PathLike] = None,
              progress: Union[bool, Callable[[BuildProgress], Any]] = True,
              rebuild: bool = False) -> "TestSet":
        """Builds the test set of ``model``'s matrix and stores it in the cache.

        ``kind`` is ``"graver"`` (the test set solves use) or ``"hilbert"`` (the Hilbert
        basis of the kernel restricted to the model's ``signs``; it serves no solves).
        ``norm_limit`` truncates the set to moves of at most that ℓ1 norm (default: the
        proven bound, which loses nothing); ``budget`` (seconds or a timedelta) deepens the
        norm limit level by level and keeps the largest that finishes in time.
        ``max_memory`` (bytes) caps the working set (default: 75% of the memory available).
        ``cache_dir`` defaults to ``$KERNSTEP_CACHE_DIR`` or the platform's cache directory.
        A valid stored set is reused unless ``rebuild``. ``progress`` prints a line to
        stderr every two seconds (``True``), or calls a function with a
        :class:`BuildProgress`.

        The GIL is released while building; Ctrl-C stops the build (the state saved last is
        resumed by the next build) and raises ``KeyboardInterrupt``. A limit that stops it
        raises :class:`kernstep.BuildStoppedError`.
        """
        if progress is True:
            report: Optional[Callable[..., None]] = _progress_printer()
        elif callable(progress):
            def report(*values: Any) -> None:
                progress(BuildProgress(*values))
        elif progress is False or progress is None:
            report = None
        else:
            raise bad("progress", f"{progress!r} is neither a bool nor a function")
        inner = _kernstep._TestSet.build(
            model._inner, kind, norm_limit, _seconds(budget), max_memory,
            None if cache_dir is None else os.fspath(cache_dir), report, rebuild)
        return cls._of(inner, model)

    @classmethod
    def load(cls, model: Model, cache_dir: Optional[PathLike] = None) -> "TestSet":
        """The stored test set that serves ``model`` (the command line's choice: the
        complete set, else one truncated to a box holding the model's, else the largest
        norm-truncated one). Raises :class:`kernstep.CacheMissError` when there is none."""
        inner = _kernstep._TestSet.load(model._inner,
                                        None if cache_dir is None else os.fspath(cache_dir))
        return cls._of(inner, model)

    def _numbers(self, b: Any, c: Any, lower: Any, upper: Any) -> tuple[Any, Any, Any, Any]:
        n = self._model.shape[1]
        return (
            None if b is None else integers(b, "b", 1),
            None if c is None else integers(c, "c", 1),
            None if lower is None else bounds(lower, "lower", "lower", (n,)),
            None if upper is None else bounds(upper, "upper", "upper", (n,)),
        )

    @staticmethod
    def _warm(warm_start: Union["Result", Any, None]) -> Optional[np.ndarray]:
        if warm_start is None:
            return None
        if isinstance(warm_start, Result):
            if warm_start.x is None:
                raise bad("warm_start", "the previous solve has no point to start from")
            return warm_start.x
        return integers(warm_start, "warm_start", 1)

    def solve(self, b: Any = None, c: Any = None, lower: Any = None, upper: Any = None,
              warm_start: Union[Result, Any, None] = None, strategy: str = "graver_best",
              max_steps: Optional[int] = None) -> Result:
        """Re-optimises the model with the numbers given (the model's for those omitted).

        ``lower``/``upper`` take scalars, arrays or sequences (``None``/``inf`` entries are
        unbounded). ``warm_start`` is a previous :class:`Result` or plan ``x``: the solve
        starts from it plus a particular solution of ``A z = b - A x``. ``strategy`` picks
        each step: ``"graver_best"`` (the largest improvement), ``"first"`` (the first
        improving move) or ``"steepest"`` (the largest improvement per unit ℓ1 norm); every
        one ends at a certified optimum. ``max_steps`` caps the augmenting steps (default one
        million). The answer is certified: the status
        claims only what a certificate backs, re-checked independently.
        """
        b, c, lower, upper = self._numbers(b, c, lower, upper)
        (status, outcome, x, objective, claim, bound, gap, feasibility, cost,
         seconds) = self._inner.solve(b, c, lower, upper, self._warm(warm_start), strategy,
                                      max_steps)
        return Result(
            status=Status(status), x=x, objective=objective, claim=claim,
            bound=None if bound is None else int(bound), gap=None if gap is None else int(gap),
            steps_feasibility=feasibility, steps_cost=cost, seconds=seconds,
            outcome=json.loads(outcome))

    def solve_many(self, B: Any = None, C: Any = None, L: Any = None, U: Any = None,
                   threads: Optional[int] = None, strategy: str = "graver_best",
                   max_steps: Optional[int] = None) -> Batch:
        """Solves many variants in parallel without the GIL: row ``k`` of ``B`` (variants x
        rows), ``C``, ``L`` and ``U`` (variants x variables) is variant ``k``; an omitted
        array keeps the model's numbers. ``threads`` defaults to one per core; ``strategy``
        and ``max_steps`` are those of :meth:`solve`. Each answer
        equals :meth:`solve` of the same numbers; a variant that raises (say, a value out
        of range) raises for the whole call, naming its row. Ctrl-C stops the solves and
        raises ``KeyboardInterrupt``.
        """
        n = self._model.shape[1]
        tables = [a for a in (B, C, L, U) if a is not None and np.ndim(a) == 2]
        if not tables:
            raise bad("B", "give at least one of B, C, L and U as a 2-D array, one variant "
                           "per row (a single variant: TestSet.solve, or reshape(1, -1))")
        k = int(np.shape(tables[0])[0])
        arrays = (
            None if B is None else integers(B, "B", 2),
            None if C is None else integers(C, "C", 2),
            None if L is None else bounds(L, "L", "lower", (k, n)),
            None if U is None else bounds(U, "U", "upper", (k, n)),
        )
        status, objective, x, steps = self._inner.solve_many(*arrays, threads, strategy,
                                                             max_steps)
        return Batch(status=status, objective=objective, x=x, steps=steps)

    def trace(self, b: Any = None, c: Any = None, lower: Any = None, upper: Any = None,
              warm_start: Union[Result, Any, None] = None, strategy: str = "graver_best",
              max_steps: Optional[int] = None) -> Trace:
        """Solves as :meth:`solve` does, recording every augmenting step; see :class:`Trace`
        (``Trace.to_frame()`` gives a pandas DataFrame when pandas is installed)."""
        b, c, lower, upper = self._numbers(b, c, lower, upper)
        document = self._inner.trace(b, c, lower, upper, self._warm(warm_start), strategy,
                                     max_steps)
        return Trace(json.loads(document))

    @property
    def model(self) -> Model:
        """The model the set serves."""
        return self._model

    @property
    def kind(self) -> str:
        """``"graver"``, ``"hilbert"`` or ``"cycles"`` (a network's implicit Graver basis)."""
        return self._inner.kind

    @property
    def coverage(self) -> str:
        """``"complete"``, ``"box"`` (truncated to a box) or ``"norm_truncated"``."""
        return self._inner.coverage

    @property
    def norm_limit(self) -> Optional[int]:
        """The ℓ1 norm limit of a norm-truncated set."""
        return self._inner.norm_limit

    @property
    def source(self) -> str:
        """Where the set came from, in words."""
        return self._inner.source

    @property
    def moves(self) -> np.ndarray:
        """The moves, one per row (each stands for itself and its negation; empty for a
        network's implicit cycles)."""
        return self._inner.moves

    def __len__(self) -> int:
        return int(self._inner.moves.shape[0])

    def __repr__(self) -> str:
        return (f"<kernstep.TestSet {self.kind}, {len(self)} moves, {self.coverage}, "
                f"{self.source}>")
