"""Built-in descriptive statistics: MEDIAN, MODE.SNGL (MODE), STDEV.S (STDEV), STDEV.P (STDEVP),
VAR.S (VAR), VAR.P (VARP), AVERAGEA, STDEVA, STDEVPA, VARA, VARPA, MAXA, MINA, DEVSQ, AVEDEV,
GEOMEAN, HARMEAN, KURT, SKEW, COVARIANCE.S, COVARIANCE.P (COVAR), CORREL, PEARSON, RSQ,
SLOPE, INTERCEPT, STEYX.

As SUM: numbers in ranges and arrays (text, blanks and logical values there skipped),
typed arguments converted; the A-forms count text in ranges as 0 and TRUE as 1.

>>> from cellfuncs.formula import compute
>>> compute("=MEDIAN(1, 2, 3, 4)"), compute("=VAR.S({1,2,3,4})"), compute("=SLOPE({2,3,9,1,8,7,5}, {6,5,11,7,5,4,4})")
(2.5, 1.6666666666666667, 0.3055555555555556)
"""

from __future__ import annotations

import math
import statistics
from collections import Counter
from typing import Callable

import numpy as np

from ..errors import DIV0, NA, NUM, VALUE, CellError
from .arrays import Value, as_array
from .coerce import to_number
from .evaluate import Context, builtin, collect, evaluate, is_reference
from .nodes import Node


def _plain(x):
    return x if type(x) is float else None


def _a_form(x):
    """The A-functions' view of a range element: text 0, TRUE 1, FALSE 0, blank skipped."""
    if x is None:
        return None
    if type(x) is bool:
        return 1.0 if x else 0.0
    return x if type(x) is float else 0.0


def _register(name: str, fn: Callable[[list[float]], float | CellError], in_range=_plain) -> None:
    @builtin(name, 1, 255, lazy=True)
    def stat(context: Context, *nodes: Node) -> float | CellError:
        values = collect(context, nodes, to_number, in_range)
        if type(values) is CellError:
            return values
        try:
            return fn(values)
        except (statistics.StatisticsError, ZeroDivisionError):
            return CellError(DIV0, f"{name} needs more numbers")
        except (ValueError, OverflowError):
            return CellError(NUM, f"{name} is not defined for these numbers")


def _at_least(n: int, fn: Callable[[list[float]], float]) -> Callable[[list[float]], float | CellError]:
    def checked(v: list[float]) -> float | CellError:
        return fn(v) if len(v) >= n else CellError(DIV0, f"needs at least {n} numbers")

    return checked


def _median(v: list[float]) -> float | CellError:
    return statistics.median(v) if v else CellError(NUM, "MEDIAN of no numbers")


def _mode(v: list[float]) -> float | CellError:
    counts = Counter(v)
    best = max(counts.values(), default=0)
    if best < 2:
        return CellError(NA, "no number repeats")
    return next(x for x in v if counts[x] == best)  # the first of the most frequent


def _positive(fn: Callable[[list[float]], float]) -> Callable[[list[float]], float | CellError]:
    def checked(v: list[float]) -> float | CellError:
        if not v or any(x <= 0.0 for x in v):
            return CellError(NUM, "needs positive numbers")
        return fn(v)

    return checked


def _kurt(v: list[float]) -> float | CellError:
    n = len(v)
    s = statistics.stdev(v) if n > 1 else 0.0
    if n < 4 or s == 0.0:
        return CellError(DIV0, "KURT needs four numbers that are not all equal")
    m = statistics.fmean(v)
    k = math.fsum(((x - m) / s) ** 4 for x in v)
    return n * (n + 1) / ((n - 1) * (n - 2) * (n - 3)) * k - 3 * (n - 1) ** 2 / ((n - 2) * (n - 3))


def _skew(v: list[float]) -> float | CellError:
    n = len(v)
    s = statistics.stdev(v) if n > 1 else 0.0
    if n < 3 or s == 0.0:
        return CellError(DIV0, "SKEW needs three numbers that are not all equal")
    m = statistics.fmean(v)
    return n / ((n - 1) * (n - 2)) * math.fsum(((x - m) / s) ** 3 for x in v)


def _devsq(v: list[float]) -> float | CellError:
    if not v:
        return CellError(NUM, "DEVSQ of no numbers")
    m = statistics.fmean(v)
    return math.fsum((x - m) ** 2 for x in v)


def _avedev(v: list[float]) -> float | CellError:
    if not v:
        return CellError(NUM, "AVEDEV of no numbers")
    m = statistics.fmean(v)
    return math.fsum(abs(x - m) for x in v) / len(v)


_register("MEDIAN", _median)


def _register_mode(name: str) -> None:
    @builtin(name, 1, 255, lazy=True)
    def mode(context: Context, *nodes: Node) -> float | CellError:
        """The most frequent number (the first of them), as SUM gathers numbers except that
        typed text, numeric text too, and a reference to a single blank cell are #VALUE!
        (Excel's stored values)."""
        for node in nodes:
            if is_reference(node) and evaluate(node, context) is None:
                return CellError(VALUE, f"{name} of a reference to a blank cell")
        values = collect(context, nodes, _typed_number, _plain)
        return values if type(values) is CellError else _mode(values)


def _typed_number(x):
    return CellError(VALUE, f'typed text "{x}" is not a number here') if type(x) is str else to_number(x)


for _name in ("MODE.SNGL", "MODE"):
    _register_mode(_name)
for _name in ("STDEV.S", "STDEV"):
    _register(_name, _at_least(2, statistics.stdev))
for _name in ("STDEV.P", "STDEVP"):
    _register(_name, _at_least(1, statistics.pstdev))
for _name in ("VAR.S", "VAR"):
    _register(_name, _at_least(2, statistics.variance))
for _name in ("VAR.P", "VARP"):
    _register(_name, _at_least(1, statistics.pvariance))
_register("AVERAGEA", _at_least(1, statistics.fmean), _a_form)
_register("STDEVA", _at_least(2, statistics.stdev), _a_form)
_register("STDEVPA", _at_least(1, statistics.pstdev), _a_form)
_register("VARA", _at_least(2, statistics.variance), _a_form)
_register("VARPA", _at_least(1, statistics.pvariance), _a_form)
_register("MAXA", lambda v: max(v, default=0.0), _a_form)
_register("MINA", lambda v: min(v, default=0.0), _a_form)
_register("DEVSQ", _devsq)
_register("AVEDEV", _avedev)
_register("GEOMEAN", _positive(lambda v: math.exp(math.fsum(math.log(x) for x in v) / len(v))))
_register("HARMEAN", _positive(lambda v: len(v) / math.fsum(1.0 / x for x in v)))
_register("KURT", _kurt)
_register("SKEW", _skew)


def _pairs(ys: Value, xs: Value) -> tuple[np.ndarray, np.ndarray] | CellError:
    """The (y, x) pairs where both are numbers; the arrays must have as many elements."""
    for v in (ys, xs):
        if type(v) is CellError:
            return v
    a, b = as_array(ys).ravel(), as_array(xs).ravel()
    if a.size != b.size:
        return CellError(NA, "the two arrays have different numbers of elements")
    keep = [(y, x) for y, x in zip(a, b) if type(y) is float and type(x) is float]
    for y, x in zip(a, b):
        for e in (y, x):
            if type(e) is CellError:
                return e
    if not keep:
        return CellError(DIV0, "no pairs of numbers")
    return np.array([p[0] for p in keep]), np.array([p[1] for p in keep])


def _paired(name: str, fn: Callable[[np.ndarray, np.ndarray], float | CellError], least: int = 1) -> None:
    def pair_stat(ys: Value, xs: Value) -> float | CellError:
        p = _pairs(ys, xs)
        if type(p) is CellError:
            return p
        y, x = p
        if y.size < least:
            return CellError(DIV0, f"{name} needs at least {least} pairs of numbers")
        with np.errstate(all="ignore"):
            r = fn(y, x)
        return r if type(r) is CellError or math.isfinite(r) else CellError(DIV0, f"{name} is undefined here")

    pair_stat.__doc__ = f"{name}(array1, array2)."
    builtin(name, 2, arrays=(0, 1))(pair_stat)  # array-class: SLOPE(A1:A5*2, B1:B5) in a plain formula


def _cov(y, x, ddof):
    return float(np.sum((y - y.mean()) * (x - x.mean())) / (y.size - ddof))


def _correl(y, x):
    dy, dx = y - y.mean(), x - x.mean()
    den = math.sqrt(float(np.sum(dy * dy) * np.sum(dx * dx)))
    return float(np.sum(dy * dx)) / den if den else CellError(DIV0, "a variance is 0")


def _slope(y, x):
    dx = x - x.mean()
    den = float(np.sum(dx * dx))
    return float(np.sum((y - y.mean()) * dx)) / den if den else CellError(DIV0, "the x values do not vary")


def _intercept(y, x):
    b = _slope(y, x)
    return b if type(b) is CellError else float(y.mean()) - b * float(x.mean())


def _steyx(y, x):
    b = _slope(y, x)
    if type(b) is CellError:
        return b
    resid = (y - y.mean()) - b * (x - x.mean())
    return math.sqrt(float(np.sum(resid * resid)) / (y.size - 2))


_paired("COVARIANCE.S", lambda y, x: _cov(y, x, 1), 2)
_paired("COVARIANCE.P", lambda y, x: _cov(y, x, 0))
_paired("COVAR", lambda y, x: _cov(y, x, 0))
_paired("CORREL", _correl, 2)
_paired("PEARSON", _correl, 2)
_paired("RSQ", lambda y, x: c * c if type(c := _correl(y, x)) is float else c, 2)
_paired("SLOPE", _slope, 2)
_paired("INTERCEPT", _intercept, 2)
_paired("STEYX", _steyx, 3)
