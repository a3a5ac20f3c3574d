"""Built-in math functions: SUM, AVERAGE, MIN, MAX, ROUND, ROUNDUP, ROUNDDOWN, ABS, SQRT, EXP,
LN, LOG10, POWER, PI; and the argument rules the math and engineering functions share.

Aggregates take the numbers of ranges and arrays only (text, blanks and booleans there
are skipped, as in Excel) but convert values typed as arguments.

Two rules of Excel's stored values go beyond plain conversion (:func:`argument_number`): a date
or time in text is a number only without spaces around it (``" 10 "`` is 10, ``" 2024-01-10 "``
is #VALUE!), and the functions that came from the Analysis ToolPak (GCD, LCM, MROUND, QUOTIENT,
the Bessel functions, DELTA, ...) take no logical values, where FLOOR or MOD read TRUE as 1.

>>> from cellfuncs.formula import compute
>>> compute('=SUM({1,"2",TRUE}, "2", TRUE)'), compute("=ROUND(-2.5, 0)")
(4.0, -3.0)
"""

from __future__ import annotations

import functools
import math
from decimal import ROUND_DOWN, ROUND_HALF_UP, ROUND_UP
from typing import Callable

from ..errors import DIV0, NUM, VALUE, CellError
from .arrays import Value, elementwise, numeric
from .coerce import decimal_round, to_number
from .evaluate import Context, builtin, collect
from .nodes import Node, Scalar
from .operators import power


def argument_number(v: Scalar, logicals: bool = True) -> float | CellError:
    """``v`` as a number argument: :func:`to_number` (date or time text with spaces around it
    is #VALUE!, as Excel's values of EXP, INT, FLOOR, GCD... of ``" 2024-01-10 "`` show), and
    TRUE and FALSE are #VALUE! when ``logicals`` is False.

    >>> argument_number(" 10 "), argument_number("2024-01-10"), argument_number(" 2024-01-10 ").code
    (10.0, 45301.0, '#VALUE!')
    >>> argument_number(True), argument_number(True, logicals=False).code
    (1.0, '#VALUE!')
    """
    t = type(v)
    if t is bool and not logicals:
        return CellError(VALUE, "a logical value is not a number here")
    return to_number(v)


def toolpak(fn: Callable[..., float | CellError]) -> Callable[..., Value]:
    """:func:`numeric` for a function of the former Analysis ToolPak: TRUE and FALSE are
    #VALUE! rather than 1 and 0 (the first error, in argument order, wins).

    >>> twice = toolpak(lambda x: 2 * x)
    >>> twice("4"), twice(True).code, twice(" 2024-01-10 ").code
    (8.0, '#VALUE!', '#VALUE!')
    """
    computed = numeric(fn)

    def scalar(*args: Scalar) -> Scalar:
        numbers = []
        for a in args:
            x = argument_number(a, logicals=False)
            if type(x) is CellError:
                return x
            numbers.append(x)
        return computed(*numbers)

    return elementwise(functools.wraps(fn)(scalar))


def _number_element(x: Scalar) -> float | None:
    return x if type(x) is float else None


def _numbers(context: Context, nodes: tuple[Node, ...]) -> list[float] | CellError:
    return collect(context, nodes, to_number, _number_element)


def _aggregate(name: str, reduce: Callable[[list[float]], float | CellError]) -> None:
    @builtin(name, 1, None, lazy=True)
    def aggregate(context: Context, *nodes: Node) -> float | CellError:
        values = _numbers(context, nodes)
        if type(values) is CellError:
            return values
        try:
            return reduce(values)
        except OverflowError:
            return CellError(NUM, f"the {name} is too large")


def _average(values: list[float]) -> float | CellError:
    if not values:
        return CellError(DIV0, "AVERAGE of no numbers")
    return math.fsum(values) / len(values)


# MIN and MAX of no numbers are 0 (Excel behaviour)
_aggregate("SUM", math.fsum)
_aggregate("AVERAGE", _average)
_aggregate("MIN", lambda v: min(v, default=0.0))
_aggregate("MAX", lambda v: max(v, default=0.0))


def _rounding(name: str, mode: str) -> None:
    # Excel truncates the digit count and rounds the decimal digits it shows
    builtin(name, 2)(numeric(lambda x, digits: float(decimal_round(x, int(digits), mode))))


_rounding("ROUND", ROUND_HALF_UP)  # half away from zero
_rounding("ROUNDUP", ROUND_UP)  # away from zero
_rounding("ROUNDDOWN", ROUND_DOWN)  # toward zero


def _sqrt(x: float) -> float | CellError:
    return math.sqrt(x) if x >= 0.0 else CellError(NUM, "square root of a negative number")


def _log(fn: Callable[[float], float]) -> Callable[[float], float | CellError]:
    return lambda x: fn(x) if x > 0.0 else CellError(NUM, "logarithm of a number that is not positive")


builtin("ABS", 1)(numeric(abs))
builtin("SQRT", 1)(numeric(_sqrt))
builtin("EXP", 1)(numeric(math.exp))
builtin("LN", 1)(numeric(_log(math.log)))
builtin("LOG10", 1)(numeric(_log(math.log10)))
builtin("POWER", 2)(numeric(power))
builtin("PI", 0)(lambda: math.pi)
