"""Cell values in and out: arguments to SI arrays, model results to cell values.

Whole-call failures (unknown substance, unknown unit, shapes that do not
broadcast) raise :class:`CallError`, which the function wrapper returns as one
error value; element failures stay per element so one bad cell never blanks
the rest of an array.
"""

from __future__ import annotations

import math
import re
import reprlib
from functools import lru_cache, partial
from typing import Any, Mapping, NamedTuple

import numpy as np

from .. import units
from ..errors import NA, NUM, VALUE, CellError
from ..substances import Substance, UnknownSubstance, define, lookup
from ..substances.result import BAD_ARGUMENT, NOT_AVAILABLE, OUT_OF_RANGE, ModelError, Problem, Result, fmt, indices

_CODES = {OUT_OF_RANGE: NUM, NOT_AVAILABLE: NA, BAD_ARGUMENT: VALUE}
_SEE = {"boil": "BOIL", "melt": "MELT", "sublime": "SUBLIME"}


class CallError(Exception):
    """A failure of the whole call, returned as a single error value."""

    def __init__(self, code: str, reason: str):
        super().__init__(reason)
        self.error = CellError(code, reason)


class Arg(NamedTuple):
    """A numeric argument in SI, with the error of each element that is not usable (or None), and the unit
    the caller stated it in (a kind and the caller's text), in which messages about it speak."""

    si: np.ndarray
    errors: np.ndarray | None
    said: tuple[units.Kind, Any] | None = None


# The scalar path builds its Arg in one C call (a NamedTuple's own constructor is Python code)
_ARG = partial(tuple.__new__, Arg)


# Model messages quote temperatures and pressures in SI, as "<number> K" or "<number> Pa" (kPa, MPa, GPa);
# the sheet layer restates them in the units the caller typed.
_QUOTED = re.compile(r"(?<![\w.])(-?\d+(?:\.\d*)?(?:e[+-]?\d+)?) (K|Pa|kPa|MPa|GPa)(?![\w/*^(])")
_QUOTED_UNITS = {name: (kind, units.conversion(name, kind).scale) for name, kind in (
    ("K", units.TEMPERATURE), ("Pa", units.PRESSURE), ("kPa", units.PRESSURE), ("MPa", units.PRESSURE),
    ("GPa", units.PRESSURE))}


def restated(reason: str, said: Mapping[units.Kind, str]) -> str:
    """A model's message with its temperatures and pressures in the caller's units (``said``: kind -> text).

    >>> restated("3.01013e+07 Pa is above the critical pressure (22.064 MPa)", {units.PRESSURE: "barg"})
    '300 barg is above the critical pressure (219.627 barg)'
    """
    def one(match: re.Match) -> str:
        kind, scale = _QUOTED_UNITS[match.group(2)]
        text = said.get(kind)
        if text is None:
            return match.group(0)
        return f"{fmt(units.conversion(text, kind).from_si(float(match.group(1)) * scale))} {text}"

    return _QUOTED.sub(one, reason) if said else reason


def cell_error(problem: Problem, direction: str = "", said: Mapping[units.Kind, str] | None = None) -> CellError:
    """The cell error for a model problem; ``direction`` ("TEMP"/"PRESSURE") names a function to try, ``said``
    the units the caller typed (see :func:`restated`)."""
    reason = restated(problem.reason, said) if said else problem.reason
    if problem.see and direction:
        reason += f"; use {_SEE[problem.see]}_{direction}"
    return CellError(_CODES[problem.kind], reason)


def model_call(fn, *args):
    """Call a model function, turning a whole-call ModelError into a CallError."""
    try:
        return fn(*args)
    except ModelError as exc:
        raise CallError(_CODES[exc.problem.kind], exc.problem.reason) from None


def shown(value: Any) -> str:
    """A value as a message quotes it: cut short, whatever its length or nesting."""
    return reprlib.repr(value)


def _named(error: CellError, name: str) -> CellError:
    """An error value that came in as an argument: passed on as it is, as Excel does (its reason speaks of
    the call that made it); a bare code says which argument brought it."""
    return error if error.reason else CellError(error.code, f"{name} is {error.code}")


def substance(value: Any) -> Substance:
    """A substance from its name, or from a definition: a range of (field, value[, unit]) rows or a mapping."""
    if type(value) is str and value.strip():  # a name: the usual case, kept quick
        return _by_name(value)
    if isinstance(value, CellError):
        raise CallError(*_named(value, "substance"))
    if isinstance(value, Mapping):
        return _defined(_hashable(tuple((k, _pair(k, v)) for k, v in value.items())))
    if isinstance(value, (list, tuple, np.ndarray)):
        value = as_array(value)
        if value.ndim == 2 and value.shape[1] >= 2 and value.shape[0] >= 2:
            rows = tuple((row[0], (_frozen(row[1]), row[2] if len(row) > 2 else None)) for row in value.tolist()
                         if row[0] is not None and str(row[0]).strip())
            return _defined(_hashable(rows))
        if value.size != 1:
            raise CallError(VALUE, "substance must be a name, or a definition range of (field, value[, unit]) rows")
        value = value.flat[0]
    if value is None or (isinstance(value, str) and not value.strip()):
        raise CallError(VALUE, "substance is blank")
    return _by_name(value)


def _by_name(value: Any) -> Substance:
    try:
        return lookup(value)
    except UnknownSubstance as exc:
        raise CallError(VALUE, f"{exc.problem.reason}; SUBSTANCES() lists the known names") from None
    except ModelError as exc:
        raise CallError(_CODES[exc.problem.kind], exc.problem.reason) from None


def _pair(key: Any, value: Any) -> tuple[Any, Any]:
    """A mapping's value as (value, unit): given as a pair, a one-item tuple (no unit) or a bare value."""
    if isinstance(value, tuple) and not isinstance(value, CellError):
        if len(value) not in (1, 2):
            raise CallError(VALUE, f"substance definition: field '{str(key)[:40]}' must be a value or a (value, unit) "
                                   f"pair; got {len(value)} items")
        return _frozen(value[0]), value[1] if len(value) == 2 else None
    return _frozen(value), None


def _frozen(value: Any) -> Any:
    """A line's list of coefficients as a flat tuple: the definition cache needs hashable rows."""
    if not isinstance(value, (list, np.ndarray)):
        return value
    flat, pending = [], [value]
    while pending:  # nested lists without recursion: a definition cell may hold any nesting
        item = pending.pop()
        if isinstance(item, np.ndarray):
            item = item.tolist() if item.ndim else item.item()
        if isinstance(item, list):
            pending.extend(reversed(item))
        else:
            flat.append(item)
    return tuple(flat)


def _hashable(rows: tuple) -> tuple:
    try:
        hash(rows)
    except (TypeError, RecursionError):  # a list, a dict, or tuples nested past Python's stack
        raise CallError(VALUE, "substance definition: every field and value must be a number, a text or a "
                               "list of numbers") from None
    return rows


@lru_cache(maxsize=64)
def _defined(rows: tuple) -> Substance:
    # a sheet passes the same definition range on every call: build its model once
    for _, pair in rows:
        for value in pair:
            if isinstance(value, CellError):
                raise CallError(value.code, f"substance definition: {value.reason or value.code}")
    return model_call(define, dict(rows))


def text(value: Any, name: str, default: str | None = None) -> str | None:
    """A single text argument (unit, boundary, solid); blank gives ``default``."""
    if type(value) is str:  # the usual case, kept quick
        return value.strip() or default
    if value is None:
        return default
    if isinstance(value, (list, tuple, np.ndarray)) and not isinstance(value, CellError):
        value = as_array(value)
        if value.size != 1:
            raise CallError(VALUE, f"{name} must be a single text, not a range")
        value = value.flat[0]
    if isinstance(value, CellError):
        raise CallError(*_named(value, name))
    if value is None or (isinstance(value, str) and not value.strip()):
        return default
    if not isinstance(value, str):
        raise CallError(VALUE, f"{name} must be text; got {shown(value)}")
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


MAX_DIMENSIONS = 32  # numpy broadcasts at most 32 dimensions


def as_array(value: Any, depth: int = 0) -> np.ndarray:
    """An argument as a numpy array: nested lists become an object array (a ragged list: one element each)."""
    if isinstance(value, np.ndarray):
        if value.ndim > MAX_DIMENSIONS:
            raise CallError(VALUE, f"an argument has {value.ndim} dimensions; at most {MAX_DIMENSIONS} are taken")
        return value
    if isinstance(value, (list, tuple)) and not isinstance(value, CellError):
        if depth >= MAX_DIMENSIONS:  # checked while descending: a deeper nesting would exhaust the stack
            raise CallError(VALUE, f"an argument nests lists more than {MAX_DIMENSIONS} deep")
        parts = [as_array(item, depth + 1) for item in value]
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


def number(value: Any, name: str, unit_: units.Conversion, absolute: str = "",
           said: tuple[units.Kind, Any] | None = None) -> Arg:
    """A numeric argument converted to SI.

    ``absolute`` names the quantity ("temperature", "pressure") when values must be
    positive in SI (absolute temperature and pressure); ``said`` is the unit as the caller
    gave it (kind, text), for the messages.
    """
    if type(value) is float or type(value) is int:  # the common scalar case, kept quick
        value = value if type(value) is float else _float(value)
        si = unit_.to_si(value)
        if math.isfinite(value) and (not absolute or si > 0):
            return _ARG((np.array(si), None, said))
    array = as_array(value)
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
                bad[index] = _blank(name)
            else:
                bad[index] = CellError(VALUE, f"{name} must be a number; got {shown(item)}")
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
    return Arg(np.asarray(si, dtype=float), bad, said)


def _blank(name: str) -> CellError:
    return CellError(VALUE, f"{name} is blank")


def blank_allowed(arg: Arg, allowed: np.ndarray, name: str) -> Arg:
    """``arg`` with its blank elements accepted (as NaN) where ``allowed`` holds: a quantity the model
    fills in (the pressure of a saturated state given by its temperature, for one)."""
    if arg.errors is None:
        return arg
    errors = np.array(np.broadcast_to(arg.errors, np.broadcast_shapes(arg.errors.shape, np.shape(allowed))))
    blank = _blank(name)
    errors[np.asarray(np.frompyfunc(blank.__eq__, 1, 1)(errors), dtype=bool) & allowed] = None
    return Arg(arg.si, None if np.equal(errors, None).all() else errors, arg.said)


def integer_count(value: Any, name: str, low: int, high: int) -> int:
    if isinstance(value, np.ndarray) and as_array(value).size == 1:
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
    array = as_array(value)
    codes = np.zeros(array.shape, dtype=int)
    bad = None
    for index, item in np.ndenumerate(array):
        try:
            if isinstance(item, CellError):
                raise CallError(*_named(item, name))
            if item is not None and not isinstance(item, str):
                raise CallError(VALUE, f"{name} must be a phase word; got {shown(item)}")
            codes[index] = model_call(sub.phase_code, item)
        except CallError as exc:
            if bad is None:
                bad = np.full(array.shape, None, dtype=object)
            bad[index] = exc.error
    return Arg(codes, bad)


def shape_of(*args: Arg) -> tuple[int, ...]:
    """The broadcast shape of the arguments, or a CallError naming the shapes."""
    shape = _shape(args[0].si)
    for a in args:
        if _shape(a.si) != shape:
            break
    else:  # one shape (single cells, or ranges alike): nothing to broadcast
        return shape
    try:
        return np.broadcast_shapes(*(np.shape(a.si) for a in args))
    except ValueError:
        shapes = " and ".join("x".join(map(str, np.shape(a.si))) or "1x1" for a in args if np.ndim(a.si))
        raise CallError(VALUE, f"array shapes {shapes} do not match") from None


def result_cells(result: Result, args: tuple[Arg, ...], scale=None, direction: str = "",
                 said: tuple[units.Kind, Any] | None = None) -> Any:
    """The cell value(s) of a model result.

    Argument errors come first (the first argument's), then the model's problems, whose messages speak
    the units of the arguments (and ``said``, the result's unit).
    ``scale`` converts SI values to the requested unit (a callable); text results pass as they are.
    A 0-d result is returned as a scalar.
    """
    values = result.values
    shape = _shape(values)
    errors = None
    for arg in args:
        if _shape(arg.si) != shape:
            shape = shape_of(*args, Arg(values, None))
            values = values if _shape(values) == shape else np.broadcast_to(values, shape)
            break
    for arg in args:
        if arg.errors is not None:
            errors = _first(errors, np.broadcast_to(arg.errors, shape))
    if errors is None and result.problems is None and shape == ():  # a single cell's value, as a scalar
        value = values[()]
        if isinstance(value, str):
            return value
        return float(value if scale is None else scale(value))
    if scale is not None:
        values = scale(values)
    if result.problems is not None:
        problems = np.broadcast_to(result.problems, shape)
        converted = np.full(shape, None, dtype=object)
        voice = _voice(args, said)
        for index in indices(~np.equal(problems, None)):
            converted[index] = cell_error(problems[index], direction, voice)
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


def _shape(value: Any) -> tuple[int, ...]:
    """The shape of an argument's or a result's values (an array's own attribute: np.shape costs more)."""
    return value.shape if type(value) is np.ndarray else np.shape(value)


def _voice(args: tuple[Arg, ...], said: tuple[units.Kind, Any] | None) -> dict[units.Kind, str]:
    """The units the caller typed, by kind: the arguments' first, then the result's."""
    voice: dict[units.Kind, str] = {}
    for pair in [a.said for a in args] + [said]:
        if pair is not None and isinstance(pair[1], str) and pair[1].strip() and pair[0] not in voice:
            voice[pair[0]] = pair[1].strip()
    return voice


def cell_value(value: Any) -> Any:
    """A sheet function's result in the cell contract: a float, a text, a CellError, or an array of them.

    A number that is not finite becomes #NUM! with the reason, so no cell ever shows nan or inf;
    integers and numpy numbers become floats. Any other value is a bug in the pack (TypeError).

    >>> cell_value(float("inf"))
    CellError(code='#NUM!', reason='the result is too large for a number (it overflows)')
    """
    kind = type(value)
    if kind is float:
        return value if math.isfinite(value) else _not_finite(value)
    if kind is str or kind is CellError:
        return value
    if kind is np.ndarray:
        if value.dtype.kind in "iu":
            value = value.astype(float)
        if value.dtype.kind == "f":
            finite = np.isfinite(value)
            if finite.all():
                return value
            out = value.astype(object)
            for index in indices(~finite):
                out[index] = _not_finite(value[index])
            return out
        if value.dtype.kind in "OU":
            out = value if value.dtype == object else value.astype(object)
            kinds = _TYPE_OF(out)  # the elements' types, in one pass: texts and errors pass as they are
            floats = kinds == float
            odd = ~(floats | (kinds == str) | (kinds == CellError))
            bad = np.zeros(out.shape, bool)
            if floats.any():
                bad[floats] = ~np.isfinite(out[floats].astype(float))
            if bad.any() or odd.any():
                out = out.copy() if out is value else out
                for index in indices(bad | odd):
                    out[index] = _scalar_value(out[index])
            return out
    return _scalar_value(value)


_TYPE_OF = np.frompyfunc(type, 1, 1)


def _scalar_value(value: Any) -> Any:
    if isinstance(value, (str, CellError)):
        return value
    if isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, (bool, np.bool_)):
        number = _float(value)
        return number if math.isfinite(number) else _not_finite(number)
    raise TypeError(f"a sheet function returned a {type(value).__name__}, not a cell value")


def _not_finite(number: float) -> CellError:
    if number != number:
        return CellError(NUM, "the result is not a number: the model gives none for this state")
    return CellError(NUM, "the result is too large for a number (it overflows)")


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
