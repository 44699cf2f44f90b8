"""Turning what a caller passes (numpy arrays of any integer dtype, integral floats, lists,
scipy.sparse matrices) into the C-contiguous ``int64`` arrays of the compiled module.

Every refusal is a :class:`kernstep.ModelError` naming the argument and the index. Infinite
bounds become ``INT64_MIN`` (lower) and ``INT64_MAX`` (upper), values no model holds.
"""

from __future__ import annotations

import sys
from typing import Any, Literal, Optional

import numpy as np

from ._kernstep import VALUE_LIMIT
from .errors import ModelError

INT64_MIN = int(np.iinfo(np.int64).min)
INT64_MAX = int(np.iinfo(np.int64).max)

Side = Literal["lower", "upper"]


def bad(field: str, message: str) -> ModelError:
    """A :class:`ModelError` for ``field`` of the arguments."""
    error = ModelError(f"<argument>: {field}: {message}")
    error.field = field
    error.file = "<argument>"
    return error


def _index(name: str, flat: int, shape: tuple[int, ...]) -> str:
    """``name[i]`` or ``name[i, j]`` for the flat position ``flat`` of an array of ``shape``."""
    where = np.unravel_index(flat, shape) if shape else ()
    return f"{name}[{', '.join(str(int(i)) for i in where)}]"


def _is_sparse(value: Any) -> bool:
    """Whether ``value`` is a scipy.sparse matrix or array (scipy is never imported here)."""
    sparse = sys.modules.get("scipy.sparse")
    return sparse is not None and bool(sparse.issparse(value))


def _from_objects(array: np.ndarray, name: str) -> np.ndarray:
    """An object array of Python integers (too large for int64 or mixed) as int64."""
    out = np.empty(array.shape, dtype=np.int64)
    for flat, value in enumerate(array.reshape(-1)):
        if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
            if isinstance(value, (float, np.floating)) and float(value).is_integer():
                value = int(value)
            else:
                raise bad(_index(name, flat, array.shape), f"{value!r} is not an integer")
        if not INT64_MIN <= int(value) <= INT64_MAX:
            raise bad(_index(name, flat, array.shape), f"{value} does not fit int64")
        out.reshape(-1)[flat] = int(value)
    return out


def _from_floats(array: np.ndarray, name: str) -> np.ndarray:
    """A float array whose entries are all integral and within int64, as int64."""
    flat = array.reshape(-1)
    wrong = np.flatnonzero(~np.isfinite(flat) | (flat != np.floor(flat)))
    if wrong.size:
        k = int(wrong[0])
        raise bad(_index(name, k, array.shape), f"{float(flat[k])!r} is not an integer")
    beyond = np.flatnonzero(np.abs(flat) >= 2.0**63)
    if beyond.size:
        k = int(beyond[0])
        raise bad(_index(name, k, array.shape), f"{float(flat[k])!r} does not fit int64")
    return array.astype(np.int64)


def integers(value: Any, name: str, ndim: int) -> np.ndarray:
    """``value`` as a C-contiguous int64 array of ``ndim`` dimensions.

    Integer and boolean dtypes convert when every value fits int64; floats only when every
    entry is integral (``2.0``, not ``2.5``, ``nan`` or ``inf``); scipy.sparse matrices are
    densified. Anything else (strings, complex numbers, dates) is refused.
    """
    if type(value) is np.ndarray and value.dtype == np.int64 and value.ndim == ndim:
        return np.ascontiguousarray(value)
    if _is_sparse(value):
        value = value.toarray()
    array = np.asarray(value)
    if array.ndim != ndim:
        raise bad(name, f"expected a {ndim}-D array, got one of shape {array.shape}")
    kind = array.dtype.kind
    if kind in "bi":
        out = array.astype(np.int64, copy=False)
    elif kind == "u":
        beyond = np.flatnonzero(array.reshape(-1) > INT64_MAX)
        if beyond.size:
            k = int(beyond[0])
            raise bad(_index(name, k, array.shape), f"{array.reshape(-1)[k]} does not fit int64")
        out = array.astype(np.int64)
    elif kind == "f":
        out = _from_floats(array, name)
    elif kind == "O":
        # numpy infers the dtype of the Python values at C speed: int64 when they are all
        # integers that fit, float64 when some are floats; anything else takes the slow
        # path, which names the first bad entry.
        inferred = np.array(array.tolist()) if array.size else array.astype(np.int64)
        if inferred.shape == array.shape and inferred.dtype.kind in "bif":
            return integers(inferred, name, ndim)
        out = _from_objects(array, name)
    else:
        raise bad(name, f"has dtype {array.dtype}; pass integers (any integer dtype)")
    return np.ascontiguousarray(out)


def bounds(value: Any, name: str, side: Side, shape: tuple[int, ...]) -> np.ndarray:
    """Bounds of ``shape`` as int64 with infinite entries as the sentinel of ``side``.

    ``value`` may be a scalar (the same bound everywhere), an array or a sequence; ``None``
    entries and ``-inf`` (lower) or ``+inf`` (upper) are infinite bounds. Finite bounds must
    lie within ``2**62``.
    """
    fast = _plain_bounds(value, side, shape)
    if fast is not None:
        return fast
    if _is_sparse(value):
        value = value.toarray()
    array = np.asarray(value, dtype=object if _has_none(value) else None)
    if array.ndim == 0:
        array = np.full(shape, array.item(), dtype=object if array.item() is None else array.dtype)
    if array.shape != shape:
        raise bad(name, f"has shape {array.shape}, expected {shape}")
    if array.dtype.kind in "biu":
        # No infinite entries: integers only, each within the range.
        values = integers(array, name, len(shape))
        infinite = None
    else:
        flat = array.reshape(-1)
        infinity = -np.inf if side == "lower" else np.inf
        infinite = np.equal(flat, infinity)
        if array.dtype.kind == "O":
            infinite |= np.equal(flat, np.array(None, dtype=object))
        finite = np.where(infinite, 0, flat).reshape(shape)
        values = integers(finite, name, len(shape))
    flat_values = values.reshape(-1)
    beyond = np.flatnonzero((flat_values > VALUE_LIMIT) | (flat_values < -VALUE_LIMIT))
    if infinite is not None:
        beyond = beyond[~infinite[beyond]]
    if beyond.size:
        k = int(beyond[0])
        raise bad(_index(name, k, shape), f"{flat_values[k]} is out of range (|v| <= 2**62)")
    if infinite is not None and infinite.any():
        values = values.copy()
        values.reshape(-1)[infinite] = INT64_MIN if side == "lower" else INT64_MAX
    return values


def _plain_bounds(value: Any, side: Side, shape: tuple[int, ...]) -> Optional[np.ndarray]:
    """The common cases of :func:`bounds` in a few array operations: an int64 array within
    the range, a float array of integral values within the range and infinities of ``side``,
    or an object array of integers and ``None`` (other objects take the general path). ``None`` for anything else (including every bad input, which the general path
    then names)."""
    if type(value) is not np.ndarray or value.shape != shape or value.size == 0:
        return None
    if value.dtype == np.int64:
        if value.max() > VALUE_LIMIT or value.min() < -VALUE_LIMIT:
            return None
        return np.ascontiguousarray(value)
    infinity = -np.inf if side == "lower" else np.inf
    sentinel = INT64_MIN if side == "lower" else INT64_MAX
    if value.dtype == object:
        items = value.reshape(-1).tolist()
        unbounded = [v is None for v in items]
        filled = np.array([0 if v is None else v for v in items])
        if filled.dtype != np.int64 or filled.max() > VALUE_LIMIT or filled.min() < -VALUE_LIMIT:
            return None
        filled[np.array(unbounded)] = sentinel
        return filled.reshape(shape)
    if value.dtype != np.float64:
        return None
    infinite = value == infinity
    finite = np.where(infinite, 0.0, value)
    if not (np.abs(finite).max() <= VALUE_LIMIT and (finite == np.floor(finite)).all()):
        return None
    out = finite.astype(np.int64)
    out[infinite] = sentinel
    return out


def _has_none(value: Any) -> bool:
    """Whether a (nested) list or tuple holds ``None``."""
    if value is None:
        return True
    if isinstance(value, (list, tuple)):
        return any(_has_none(v) for v in value)
    return False
