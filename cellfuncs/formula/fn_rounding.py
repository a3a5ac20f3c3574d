"""Built-in rounding to multiples and integers: FLOOR, CEILING and their .MATH and .PRECISE
forms, ISO.CEILING, MROUND, INT, TRUNC, EVEN, ODD.

Excel divides by the multiple, takes the quotient at 15 significant digits (so 7.1/0.1,
70.99999999999999 in binary, counts as 71) and multiplies back: ``FLOOR(7.1, 0.1)`` is
``71*0.1``, 7.1000000000000005, as Excel stores it. The digits are the quotient's own: a tiny
quotient stays what it is, so ``CEILING(1E-12, 1)`` is 1 and ``FLOOR(-1E-12, 1)`` is -1.

Arguments are converted as :func:`.fn_math.argument_number` says: TRUE is 1, date text with
spaces around it is #VALUE!; MROUND, from the Analysis ToolPak, takes no logical values.

>>> from cellfuncs.formula import compute
>>> compute("=FLOOR(-2.5, 2)"), compute("=CEILING(-2.5, 2)"), compute("=FLOOR.MATH(-2.5, 2, 1)")
(-4.0, -2.0, -2.0)
"""

from __future__ import annotations

import math
from decimal import ROUND_DOWN
from typing import Callable

from ..errors import DIV0, NA, NUM, CellError
from .arrays import numeric
from .coerce import decimal_round
from .evaluate import builtin
from .fn_math import toolpak


def _quotient(x: float, step: float) -> float:
    q = x / step
    r = round(q)
    return float(r) if abs(q - r) <= 1e-12 * abs(q) else q


def _multiple(x: float, step: float, rounding: Callable[[float], float]) -> float:
    return rounding(_quotient(x, step)) * step


@builtin("FLOOR", 2)
@numeric
def floor(x: float, step: float) -> float | CellError:
    """``x`` rounded toward minus infinity (both negative: toward zero) to a multiple of ``step``.

    >>> floor(2.5, 2.0), floor(-2.5, -2.0), floor(7.1, 0.1), floor(1.0, 0.0).code, floor(1.0, -1.0).code
    (2.0, -2.0, 7.1000000000000005, '#DIV/0!', '#NUM!')
    """
    if step == 0.0:
        return 0.0 if x == 0.0 else CellError(DIV0, "FLOOR to a multiple of 0")
    if x > 0.0 and step < 0.0:
        return CellError(NUM, "FLOOR of a positive number to a negative multiple")
    return _multiple(x, step, math.floor)


@builtin("CEILING", 2)
@numeric
def ceiling(x: float, step: float) -> float | CellError:
    """``x`` rounded toward plus infinity (both negative: away from zero) to a multiple of ``step``;
    a multiple of 0 gives 0.

    >>> ceiling(2.5, 2.0), ceiling(-2.5, -2.0), ceiling(10.0, 0.0), ceiling(1.0, -1.0).code
    (4.0, -4.0, 0.0, '#NUM!')
    """
    if step == 0.0:
        return 0.0
    if x > 0.0 and step < 0.0:
        return CellError(NUM, "CEILING of a positive number to a negative multiple")
    return _multiple(x, step, math.ceil)


def _math_form(name: str, up: bool) -> None:
    """CEILING.MATH / FLOOR.MATH: the multiple's sign is ignored; a nonzero ``mode`` turns the
    rounding of negative numbers toward the other direction (away from / toward zero)."""

    def fn(x: float, step: float = 1.0, mode: float = 0.0) -> float:
        step = abs(step)
        if step == 0.0:
            return 0.0
        toward_plus = up if x >= 0.0 or mode == 0.0 else not up
        return _multiple(x, step, math.ceil if toward_plus else math.floor)

    fn.__doc__ = f"{name}(number, [significance], [mode]): {'up' if up else 'down'} to a multiple."
    builtin(name, 1, 3)(numeric(fn))


_math_form("CEILING.MATH", True)
_math_form("FLOOR.MATH", False)


def _precise_form(name: str, up: bool) -> None:
    """CEILING.PRECISE, ISO.CEILING, FLOOR.PRECISE: toward plus (minus) infinity whatever the
    signs; the multiple's sign is ignored."""

    def fn(x: float, step: float = 1.0) -> float:
        step = abs(step)
        return 0.0 if step == 0.0 else _multiple(x, step, math.ceil if up else math.floor)

    fn.__doc__ = f"{name}(number, [significance]): {'up' if up else 'down'} to a multiple."
    builtin(name, 1, 2)(numeric(fn))


_precise_form("CEILING.PRECISE", True)
_precise_form("ISO.CEILING", True)
_precise_form("FLOOR.PRECISE", False)


@builtin("MROUND", 2, left_out=CellError(NA, "MROUND: an argument is left out"))
@toolpak
def mround(x: float, step: float) -> float | CellError:
    """``x`` rounded to the nearest multiple of ``step`` (halves away from zero); signs must agree;
    a left-out argument is #N/A, a blank cell 0.

    >>> mround(10.0, 3.0), mround(-10.0, -3.0), mround(1.3, 0.2), mround(5.0, -2.0).code
    (9.0, -9.0, 1.4000000000000001, '#NUM!')
    """
    if step == 0.0:
        return 0.0
    if (x > 0.0 and step < 0.0) or (x < 0.0 and step > 0.0):
        return CellError(NUM, "MROUND's number and multiple have different signs")
    q = _quotient(x, step)
    return math.floor(q + 0.5) * step


@builtin("INT", 1)
@numeric
def int_(x: float) -> float:
    """``x`` rounded down to an integer.

    >>> int_(-2.5), int_(2.9)
    (-3.0, 2.0)
    """
    return float(math.floor(x))


@builtin("TRUNC", 1, 2)
@numeric
def trunc(x: float, digits: float = 0.0) -> float:
    """``x`` cut to ``digits`` decimals (negative: tens, hundreds...), toward zero.

    >>> trunc(-8.97), trunc(3.14159, 2.0), trunc(1234.5, -2.0)
    (-8.0, 3.14, 1200.0)
    """
    return float(decimal_round(x, int(digits), ROUND_DOWN))


def _to_parity(x: float, odd: bool) -> float:
    n = math.ceil(abs(x) - 1e-15 * abs(x))
    if n % 2 != odd:
        n += 1
    return math.copysign(float(n), x) if x != 0.0 else (1.0 if odd else 0.0)


@builtin("EVEN", 1)
@numeric
def even(x: float) -> float:
    """``x`` rounded away from zero to an even integer.

    >>> even(1.5), even(-1.0), even(2.0), even(0.0)
    (2.0, -2.0, 2.0, 0.0)
    """
    return _to_parity(x, False)


@builtin("ODD", 1)
@numeric
def odd(x: float) -> float:
    """``x`` rounded away from zero to an odd integer.

    >>> odd(1.5), odd(-2.0), odd(0.0)
    (3.0, -3.0, 1.0)
    """
    return _to_parity(x, True)
