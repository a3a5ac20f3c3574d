"""Element-wise results with plain-language problems, free of spreadsheet notions.

A model method computes a whole array at once and flags the elements it cannot
answer; the sheet layer later turns each problem kind into a cell error code.

>>> t = np.array([250.0, 300.0])
>>> r = Result.like(t)
>>> r.flag(t < 273.16, OUT_OF_RANGE, "{} K is below the triple point", t)
>>> r.fill(t * 2.0)
>>> float(r.values[1]), r.problem_at((0,)).reason
(600.0, '250 K is below the triple point')
"""

from __future__ import annotations

from typing import Any, Callable, NamedTuple

import numpy as np

from ..numerics import anywhere

# Problem kinds. The sheet layer maps them to #NUM!, #N/A and #VALUE!.
OUT_OF_RANGE = "out_of_range"  # a state outside the formulation's validity range
NOT_AVAILABLE = "not_available"  # no formulation or data for this quantity
BAD_ARGUMENT = "bad_argument"  # an argument that is not a valid choice


class Problem(NamedTuple):
    kind: str
    reason: str
    see: str = ""  # a boundary ("boil", "melt", "sublime") that answers the question instead


class ModelError(Exception):
    """A whole-call problem (unknown phase word, unknown boundary, ...)."""

    def __init__(self, kind: str, reason: str):
        super().__init__(reason)
        self.problem = Problem(kind, reason)


def fmt(x: Any) -> str:
    """A number as people write it in messages: 6 significant digits."""
    return f"{float(x):.6g}"


def empty_like(shape: tuple[int, ...], dtype: Any = float) -> np.ndarray:
    """An array of NaN (None for an object dtype) of ``shape``; a single value built directly."""
    if shape == () and dtype is float:  # the usual single cell, without the call to filled
        return np.array(np.nan)
    return filled(shape, np.nan if dtype is float else None, dtype)


def filled(shape: tuple[int, ...], value: Any, dtype: Any = float) -> np.ndarray:
    """``np.full(shape, value, dtype)``; a single value built directly (np.full costs five times as much)."""
    if shape == ():
        return np.array(value, dtype=dtype)
    return np.full(shape, value, dtype=dtype)


def single(a: np.ndarray) -> np.ndarray:
    """A 0-d array as its numpy scalar, other arrays as they are: the same numbers and the same
    comparisons, masks and indexing, each operation on one value without the array machinery
    (which costs ten times the arithmetic)."""
    return a[()] if a.ndim == 0 else a


def as_index(codes: np.ndarray) -> np.ndarray | int:
    """Integer codes stored as floats, as integers to index with; a single one as a Python int, which
    indexes a table as the 0-d array would and costs a tenth of ``astype``."""
    return int(codes) if codes.ndim == 0 else codes.astype(int)


def broadcast(*arrays: Any) -> tuple[np.ndarray, ...]:
    """The arrays broadcast against each other (float unless they are arrays already); arrays of one
    shape, single values among them, are returned as they are."""
    arrays = [a if type(a) is np.ndarray else np.asarray(a, dtype=float) for a in arrays]
    shape = arrays[0].shape
    for a in arrays:
        if a.shape != shape:
            return np.broadcast_arrays(*arrays)
    return tuple(arrays)


def indices(mask: np.ndarray):
    """Index tuples of the true elements of ``mask`` (a 0-d mask included)."""
    if mask.ndim == 0:
        return [()] if mask else []
    return zip(*np.nonzero(mask))


def _show(x: Any) -> Any:
    return fmt(x) if isinstance(x, (float, np.floating)) else x


class Result:
    """Values of an element-wise computation plus the problem of each flagged element.

    ``values`` is a float array (or object array for text results); flagged
    elements hold NaN (or None). ``problems`` is ``None`` until something is flagged,
    then an object array of :class:`Problem` or ``None``.
    """

    __slots__ = ("values", "problems")

    def __init__(self, values: np.ndarray, problems: np.ndarray | None = None):
        self.values = values
        self.problems = problems

    @classmethod
    def like(cls, template: np.ndarray, dtype: Any = float) -> "Result":
        shape = template.shape if type(template) is np.ndarray else np.shape(template)
        return cls(empty_like(shape, float if dtype is float else object))

    @property
    def ok(self) -> np.ndarray | np.bool_:
        """Mask of the elements not flagged so far (``np.True_`` when none are: a numpy boolean, which
        combines with a single value's numpy masks without converting a Python bool)."""
        if self.problems is None:
            return np.True_
        return np.equal(self.problems, None)

    def flag(self, mask: Any, kind: str, reason: str | Callable[..., str], *data: Any, see: str = "") -> None:
        """Flag the unflagged elements where ``mask`` holds.

        ``reason`` is a message or a format string filled, element by element, with
        the matching elements of ``data`` (arrays broadcast to the result's shape).
        """
        if not anywhere(mask):  # the usual case, kept cheap
            return
        mask = np.broadcast_to(mask, self.values.shape)
        if self.problems is None:
            self.problems = np.full(self.values.shape, None, dtype=object)
        else:
            mask = mask & np.equal(self.problems, None)
        arrays = [np.broadcast_to(d, self.values.shape) for d in data]
        cache: dict[tuple, Problem] = {}
        for idx in indices(mask):
            args = tuple(a[idx] for a in arrays)
            problem = cache.get(args)
            if problem is None:
                text = reason(*args) if callable(reason) else reason.format(*map(_show, args))
                problem = cache[args] = Problem(kind, text, see)
            self.problems[idx] = problem
        self.values[mask] = np.nan if self.values.dtype.kind == "f" else None

    def fill(self, values: Any, where: Any = True) -> None:
        """Store ``values`` into the unflagged elements (and where ``where`` holds)."""
        if self.problems is None and where is True:
            if type(values) is np.ndarray and values.shape == self.values.shape and values.dtype == self.values.dtype:
                self.values = values  # a fresh array of the model's: adopt it rather than copy
            else:
                self.values[...] = values
            return
        target = np.broadcast_to(where, self.values.shape) & np.broadcast_to(self.ok, self.values.shape)
        if target.all():
            self.values[...] = values
        else:
            self.values[target] = np.broadcast_to(values, self.values.shape)[target]

    def problem_at(self, index: tuple) -> Problem | None:
        return None if self.problems is None else self.problems[index]

    @classmethod
    def joined(cls, *results: "Result") -> "Result":
        """An empty float Result of the results' broadcast shape carrying their problems, first one wins."""
        shape = np.broadcast_shapes(*(np.shape(r.values) for r in results))
        out = cls(np.full(shape, np.nan))
        for r in results:
            if r.problems is not None:
                out.adopt(np.broadcast_to(r.problems, shape))
        return out

    def adopt(self, problems: np.ndarray) -> None:
        """Take over ``problems`` (an object array of this shape) for elements not flagged yet."""
        if self.problems is None:
            self.problems = problems.copy()
        else:
            take = np.equal(self.problems, None)
            self.problems[take] = problems[take]
        self.values[~np.equal(self.problems, None)] = np.nan if self.values.dtype.kind == "f" else None
