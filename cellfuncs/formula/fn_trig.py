"""Built-in trigonometric and hyperbolic functions, RADIANS and DEGREES.

Arguments are radians. Excel refuses the arguments of the plain functions beyond 2^27 in
magnitude (where a double's spacing makes the angle meaningless) with #NUM!.

>>> from cellfuncs.formula import compute
>>> compute("=ROUND(SIN(PI()/6), 12)"), compute("=DEGREES(ATAN2(1, 1))"), compute("=COT(0)").code
(0.5, 45.0, '#DIV/0!')
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Callable

from ..errors import DIV0, NUM, CellError
from .arrays import numeric
from .evaluate import builtin

_LARGEST_ANGLE = 2.0**27


def _periodic(fn: Callable[[float], float]) -> Callable[[float], float | CellError]:
    def checked(x: float) -> float | CellError:
        return fn(x) if abs(x) < _LARGEST_ANGLE else CellError(NUM, "the angle is too large")

    return checked


# Excel's SIN, COS and TAN reduce the angle by multiples of pi/2 with pi to 64 bits, the x87
# FPU's constant, not the exact pi: so TAN(PI()/2) is 1.6324552277619072E+16 and SIN(PI())
# 1.22514845490862E-16 there (Excel's stored values in the TAN sheets), where the exact
# reduction gives 1.633123935319537E+16 and 1.2246467991473532E-16.
_HALF_PI_X87 = Fraction(0xC90FDAA22168C235, 2**63)


def _reduced(x: float) -> tuple[float, int]:
    """``x`` as ``r + k * pi/2`` with Excel's pi: the angle ``r`` (to a double, from the exact
    difference) and the quadrant ``k`` modulo 4."""
    k = round(Fraction(x) / _HALF_PI_X87)
    return float(Fraction(x) - k * _HALF_PI_X87), k % 4


def _sin(x: float) -> float:
    r, k = _reduced(x)
    return (math.sin(r), math.cos(r), -math.sin(r), -math.cos(r))[k]


def _cos(x: float) -> float:
    r, k = _reduced(x)
    return (math.cos(r), -math.sin(r), -math.cos(r), math.sin(r))[k]


def _tan(x: float) -> float:
    r, k = _reduced(x)
    return math.tan(r) if k % 2 == 0 else -1.0 / math.tan(r)


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


def _sinh(x: float) -> float:
    """SINH for CSCH: beyond a double's range it is infinite, so that CSCH is 0 as in Excel."""
    return math.sinh(x) if abs(x) < 710.0 else math.copysign(math.inf, x)


def _cosh(x: float) -> float:
    return math.cosh(x) if abs(x) < 710.0 else math.inf


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
    "SIN": _periodic(_sin),
    "COS": _periodic(_cos),
    "TAN": _periodic(_tan),
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
    "COT": _reciprocal(_tan, "COT", True),
    "CSC": _reciprocal(_sin, "CSC", True),
    "SEC": _reciprocal(_cos, "SEC", True),
    "COTH": _reciprocal(math.tanh, "COTH", False),
    "CSCH": _reciprocal(_sinh, "CSCH", False),
    "SECH": _reciprocal(_cosh, "SECH", False),
    "RADIANS": math.radians,
    "DEGREES": math.degrees,
}

for _name, _fn in _PLAIN.items():
    builtin(_name, 1)(numeric(_fn))

builtin("ATAN2", 2)(numeric(_atan2))
