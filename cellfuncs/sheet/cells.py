"""Cell values in and out: arguments to SI arrays, model results to cell values.

Whole-call failures (unknown substance, unknown unit, shapes that do not
broadcast) raise :class:`CallError`, which the function wrapper returns as one
error value; element failures stay per element so one bad cell never blanks
the rest of an array.
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Any, Mapping, NamedTuple

import numpy as np

from .. import units
from ..errors import NA, NUM, VALUE, CellError
from ..substances import Substance, define, lookup
from ..substances.result import BAD_ARGUMENT, NOT_AVAILABLE, OUT_OF_RANGE, ModelError, Problem, Result, fmt, indices

_CODES = {OUT_OF_RANGE: NUM, NOT_AVAILABLE: NA, BAD_ARGUMENT: VALUE}
_SEE = {"boil": "BOIL", "melt": "MELT", "sublime": "SUBLIME"}


class CallError(Exception):
    """A failure of the whole call, returned as a single error value."""

    def __init__(self, code: str, reason: str):
        super().__init__(reason)
        self.error = CellError(code, reason)


class Arg(NamedTuple):
    """A numeric argument in SI, with the error of each element that is not usable (or None)."""

    si: np.ndarray
    errors: np.ndarray | None


def cell_error(problem: Problem, direction: str = "") -> CellError:
    """The cell error for a model problem; ``direction`` ("TEMP"/"PRESSURE") names a function to try."""
    reason = problem.reason
    if problem.see and direction:
        reason += f"; use {_SEE[problem.see]}_{direction}"
    return CellError(_CODES[problem.kind], reason)


def model_call(fn, *args):
    """Call a model function, turning a whole-call ModelError into a CallError."""
    try:
        return fn(*args)
    except ModelError as exc:
        raise CallError(_CODES[exc.problem.kind], exc.problem.reason) from None


def _named(error: CellError, name: str) -> CellError:
    """An error value that came in as an argument: its code kept, its reason naming the argument."""
    return CellError(error.code, f"{name}: {error.reason or error.code}")


def substance(value: Any) -> Substance:
    """A substance from its name, or from a definition: a range of (field, value[, unit]) rows or a mapping."""
    if isinstance(value, CellError):
        raise CallError(*_named(value, "substance"))
    if isinstance(value, Mapping):
        return _defined(tuple((k, (_frozen(v[0]), v[1]) if isinstance(v, tuple) else (_frozen(v), None))
                              for k, v in value.items()))
    if isinstance(value, (list, tuple)):
        value = _as_array(value)
    if isinstance(value, np.ndarray):
        if value.ndim == 2 and value.shape[1] >= 2 and value.shape[0] >= 2:
            rows = tuple((row[0], (row[1], row[2] if len(row) > 2 else None)) for row in value.tolist()
                         if row[0] is not None and str(row[0]).strip())
            return _defined(rows)
        if value.size != 1:
            raise CallError(VALUE, "substance must be a name, or a definition range of (field, value[, unit]) rows")
        value = value.flat[0]
    if value is None or (isinstance(value, str) and not value.strip()):
        raise CallError(VALUE, "substance is blank")
    return model_call(lookup, value)


def _frozen(value: Any) -> Any:
    """A line's list of coefficients as a tuple: the definition cache needs hashable rows."""
    return tuple(np.ravel(value).tolist()) if isinstance(value, (list, np.ndarray)) else value


@lru_cache(maxsize=64)
def _defined(rows: tuple) -> Substance:
    # a sheet passes the same definition range on every call: build its model once
    for _, (value, unit) in rows:
        if isinstance(value, CellError):
            raise CallError(value.code, f"substance definition: {value.reason or value.code}")
    return model_call(define, dict(rows))


def text(value: Any, name: str, default: str | None = None) -> str | None:
    """A single text argument (unit, boundary, solid); blank gives ``default``."""
    if isinstance(value, np.ndarray):
        if value.size != 1:
            raise CallError(VALUE, f"{name} must be a single text, not a range")
        value = value.flat[0]
    if isinstance(value, CellError):
        raise CallError(*_named(value, name))
    if value is None or (isinstance(value, str) and not value.strip()):
        return default
    if not isinstance(value, str):
        raise CallError(VALUE, f"{name} must be text; got {value!r}")
    return value.strip()


def unit(value: Any, name: str, kind: units.Kind) -> units.Conversion:
    word = text(value, name)
    try:
        return units.conversion(word, kind)
    except units.UnitError as exc:
        raise CallError(VALUE, f"{name}: {exc}") from None
    except Exception:  # the unit parser fails on some garbage (e.g. "1/0", "**") with its own exceptions
        raise CallError(VALUE, f"{name}: unknown unit '{word}' for {kind.name}") from None


def _float(value: Any) -> float:
    """``float(value)``; an int too large for a float becomes an infinity (then reported as not finite)."""
    try:
        return float(value)
    except OverflowError:
        return math.inf if value > 0 else -math.inf


def _element(value: Any) -> np.ndarray:
    """A 0-d object array holding ``value`` as it is (numpy would unpack a CellError, a NamedTuple)."""
    array = np.empty((), dtype=object)
    array[()] = value
    return array


def _as_array(value: Any) -> np.ndarray:
    if isinstance(value, np.ndarray):
        return value
    if isinstance(value, (list, tuple)) and not isinstance(value, CellError):
        parts = [_as_array(item) for item in value]
        shapes = {part.shape for part in parts}
        if len(shapes) > 1:  # ragged nesting: each item is one (bad) element
            parts, shapes = [_element(item) for item in value], {()}
        array = np.empty((len(parts), *(shapes.pop() if shapes else ())), dtype=object)
        for index, part in enumerate(parts):
            array[index, ...] = part
        return array
    if isinstance(value, (float, int)) and not isinstance(value, bool):
        return np.array(_float(value))
    return _element(value)


def number(value: Any, name: str, unit_: units.Conversion, absolute: str = "") -> Arg:
    """A numeric argument converted to SI.

    ``absolute`` names the quantity ("temperature", "pressure") when values must be
    positive in SI (absolute temperature and pressure).
    """
    if type(value) is float or type(value) is int:  # the common scalar case, kept quick
        value = _float(value)
        if math.isfinite(value) and (not absolute or unit_.to_si(value) > 0):
            return Arg(np.array(unit_.to_si(value)), None)
    array = _as_array(value)
    if array.dtype.kind in "fiu":
        numbers = array.astype(float)
        bad = None
    else:
        numbers = np.full(array.shape, np.nan)
        bad = np.full(array.shape, None, dtype=object)
        for index, item in np.ndenumerate(array):
            if isinstance(item, bool) or isinstance(item, np.bool_):
                bad[index] = CellError(VALUE, f"{name} must be a number; got {str(item).upper()}")
            elif isinstance(item, (int, float, np.integer, np.floating)):
                numbers[index] = _float(item)
            elif isinstance(item, CellError):
                bad[index] = _named(item, name)
            elif item is None or (isinstance(item, str) and not item.strip()):
                bad[index] = CellError(VALUE, f"{name} is blank")
            else:
                bad[index] = CellError(VALUE, f"{name} must be a number; got {item!r}")
    si = unit_.to_si(numbers)
    with np.errstate(invalid="ignore"):
        nonfinite = ~np.isfinite(numbers) & (np.equal(bad, None) if bad is not None else True)
        negative = np.isfinite(si) & (si <= 0) if absolute else np.zeros(si.shape, bool)
    if nonfinite.any() or negative.any():
        if bad is None:
            bad = np.full(array.shape, None, dtype=object)
        for index in indices(nonfinite):
            bad[index] = CellError(NUM, f"{name} is not a finite number")
        for index in indices(negative):
            floor = "absolute zero (0 K)" if absolute == "temperature" else "zero absolute pressure"
            bad[index] = CellError(NUM, f"{name} {fmt(numbers[index])} is at or below {floor}")
    if bad is not None and np.equal(bad, None).all():
        bad = None
    if bad is not None:
        si = np.where(np.equal(bad, None), si, np.nan)
    return Arg(np.asarray(si, dtype=float), bad)


def integer_count(value: Any, name: str, low: int, high: int) -> int:
    if isinstance(value, np.ndarray) and value.size == 1:
        value = value.flat[0]
    if isinstance(value, CellError):
        raise CallError(*_named(value, name))
    numeric = isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, bool)
    if not numeric or not math.isfinite(_float(value)):
        raise CallError(VALUE, f"{name} must be a whole number from {low} to {high}")
    if value != int(value) or not low <= value <= high:
        raise CallError(NUM, f"{name} must be a whole number from {low} to {high}; got {fmt(_float(value))}")
    return int(value)


def phases(value: Any, name: str, sub: Substance) -> Arg:
    """Phase words to the substance's phase codes, element by element (blank = stable phase)."""
    if isinstance(value, (str, type(None))):
        return Arg(np.array(model_call(sub.phase_code, value)), None)
    array = _as_array(value)
    codes = np.zeros(array.shape, dtype=int)
    bad = None
    for index, item in np.ndenumerate(array):
        try:
            if isinstance(item, CellError):
                raise CallError(*_named(item, name))
            if item is not None and not isinstance(item, str):
                raise CallError(VALUE, f"{name} must be a phase word; got {item!r}")
            codes[index] = model_call(sub.phase_code, item)
        except CallError as exc:
            if bad is None:
                bad = np.full(array.shape, None, dtype=object)
            bad[index] = exc.error
    return Arg(codes, bad)


def shape_of(*args: Arg) -> tuple[int, ...]:
    """The broadcast shape of the arguments, or a CallError naming the shapes."""
    try:
        return np.broadcast_shapes(*(np.shape(a.si) for a in args))
    except ValueError:
        shapes = " and ".join("x".join(map(str, np.shape(a.si))) or "1x1" for a in args if np.ndim(a.si))
        raise CallError(VALUE, f"array shapes {shapes} do not match") from None


def result_cells(result: Result, args: tuple[Arg, ...], scale=None, direction: str = "") -> Any:
    """The cell value(s) of a model result.

    Argument errors come first (the first argument's), then the model's problems.
    ``scale`` converts SI values to the requested unit (a callable); text results pass as they are.
    A 0-d result is returned as a scalar.
    """
    shape = np.shape(result.values)
    if any(np.shape(arg.si) != shape for arg in args):
        shape = shape_of(*args, Arg(result.values, None))
    values = result.values if np.shape(result.values) == shape else np.broadcast_to(result.values, shape)
    if scale is not None:
        values = scale(values)
    errors = None
    for arg in args:
        if arg.errors is not None:
            errors = _first(errors, np.broadcast_to(arg.errors, shape))
    if result.problems is not None:
        problems = np.broadcast_to(result.problems, shape)
        converted = np.full(shape, None, dtype=object)
        for index in indices(~np.equal(problems, None)):
            converted[index] = cell_error(problems[index], direction)
        errors = _first(errors, converted)
    if errors is None:
        if shape == ():
            value = values[()]
            return value if isinstance(value, str) else float(value)
        return values if values is result.values else np.array(values)
    out = np.array(values, dtype=object)
    mask = ~np.equal(errors, None)
    out[mask] = errors[mask]
    if shape == ():
        value = out[()]
        return value if isinstance(value, (str, CellError)) else float(value)
    return out


def _first(errors: np.ndarray | None, more: np.ndarray) -> np.ndarray:
    if errors is None:
        return np.array(more, dtype=object)
    take = np.equal(errors, None)
    errors[take] = more[take]
    return errors


def from_si(conversion: units.Conversion, molar_mass: float):
    """SI values to the unit's values; mass-basis units of molar kinds divide by the molar mass."""
    if conversion.alternate:
        return lambda v: conversion.from_si(v / molar_mass)
    return conversion.from_si
