"""Built-in trigonometric and hyperbolic functions, RADIANS and DEGREES.

Arguments are radians. Excel refuses the arguments of the plain functions beyond 2^27 in
magnitude (where a double's spacing makes the angle meaningless) with #NUM!.

>>> from cellfuncs.formula import compute
>>> compute("=ROUND(SIN(PI()/6), 12)"), compute("=DEGREES(ATAN2(1, 1))"), compute("=COT(0)").code
(0.5, 45.0, '#DIV/0!')
"""

from __future__ import annotations

import math
from typing import Callable

from ..errors import DIV0, NUM, CellError
from .arrays import numeric
from .evaluate import builtin

_LARGEST_ANGLE = 2.0**27


def _periodic(fn: Callable[[float], float]) -> Callable[[float], float | CellError]:
    def checked(x: float) -> float | CellError:
        return fn(x) if abs(x) < _LARGEST_ANGLE else CellError(NUM, "the angle is too large")

    return checked


def _within(fn: Callable[[float], float], lo: float, hi: float, what: str) -> Callable[[float], float | CellError]:
    def checked(x: float) -> float | CellError:
        return fn(x) if lo <= x <= hi else CellError(NUM, f"{what} is outside its domain")

    return checked


def _reciprocal(fn: Callable[[float], float], name: str, periodic: bool) -> Callable[[float], float | CellError]:
    def checked(x: float) -> float | CellError:
        if periodic and abs(x) >= _LARGEST_ANGLE:
            return CellError(NUM, "the angle is too large")
        d = fn(x)
        return 1.0 / d if d != 0.0 else CellError(DIV0, f"{name} of 0")

    return checked


def _atanh(x: float) -> float | CellError:
    return math.atanh(x) if -1.0 < x < 1.0 else CellError(NUM, "ATANH takes numbers strictly between -1 and 1")


def _acoth(x: float) -> float | CellError:
    return math.atanh(1.0 / x) if abs(x) > 1.0 else CellError(NUM, "ACOTH takes numbers beyond -1 and 1")


def _acot(x: float) -> float:
    return math.pi / 2.0 - math.atan(x)


def _atan2(x: float, y: float) -> float | CellError:
    """Excel's argument order: ATAN2(x, y)."""
    if x == 0.0 and y == 0.0:
        return CellError(DIV0, "ATAN2 of the origin")
    return math.atan2(y, x)


_PLAIN: dict[str, Callable[[float], float | CellError]] = {
    "SIN": _periodic(math.sin),
    "COS": _periodic(math.cos),
    "TAN": _periodic(math.tan),
    "ASIN": _within(math.asin, -1.0, 1.0, "ASIN's argument"),
    "ACOS": _within(math.acos, -1.0, 1.0, "ACOS's argument"),
    "ATAN": math.atan,
    "ACOT": _acot,
    "SINH": math.sinh,
    "COSH": math.cosh,
    "TANH": math.tanh,
    "ASINH": math.asinh,
    "ACOSH": _within(math.acosh, 1.0, math.inf, "ACOSH's argument"),
    "ATANH": _atanh,
    "ACOTH": _acoth,
    "COT": _reciprocal(math.tan, "COT", True),
    "CSC": _reciprocal(math.sin, "CSC", True),
    "SEC": _reciprocal(math.cos, "SEC", True),
    "COTH": _reciprocal(math.tanh, "COTH", False),
    "CSCH": _reciprocal(math.sinh, "CSCH", False),
    "SECH": _reciprocal(math.cosh, "SECH", False),
    "RADIANS": math.radians,
    "DEGREES": math.degrees,
}

for _name, _fn in _PLAIN.items():
    builtin(_name, 1)(numeric(_fn))

builtin("ATAN2", 2)(numeric(_atan2))
