"""Excel's operators on values, element-wise over arrays.

>>> BINARY["+"]("3", 1.0), BINARY["&"](1.5, True), BINARY["="]("a", "A")
(4.0, '1.5TRUE', True)
>>> print(BINARY["/"](1.0, 0.0))
#DIV/0! division by zero
"""

from __future__ import annotations

import math
import operator
from typing import Callable

from ..errors import DIV0, NUM, CellError
from .arrays import Value, elementwise, numeric
from .budget import text_error
from .coerce import compare, to_text
from .nodes import Scalar


def _divide(a: float, b: float) -> float | CellError:
    return a / b if b != 0.0 else CellError(DIV0, "division by zero")


def power(a: float, b: float) -> float | CellError:
    """``a ^ b`` with Excel's errors (also the POWER function).

    >>> power(2.0, 10.0), power(0.0, 0.0).code, power(-8.0, 1 / 3).code
    (1024.0, '#NUM!', '#NUM!')
    """
    if a == 0.0 and b <= 0.0:
        return CellError(NUM, "0^0 is undefined") if b == 0.0 else CellError(DIV0, "0 raised to a negative power")
    if a < 0.0 and not b.is_integer():
        return CellError(NUM, "a negative number raised to a fractional power")
    return math.pow(a, b)


def _comparison(test: Callable[[int, int], bool]) -> Callable[..., Value]:
    def scalar(a: Scalar, b: Scalar) -> Scalar:
        c = compare(a, b)
        return c if type(c) is CellError else test(c, 0)

    return elementwise(scalar)


@elementwise
def _concat(a: Scalar, b: Scalar) -> Scalar:
    a, b = to_text(a), to_text(b)
    if type(a) is CellError:
        return a
    if type(b) is CellError:
        return b
    return text_error(len(a) + len(b)) or a + b


BINARY: dict[str, Callable[[Value, Value], Value]] = {
    "+": numeric(operator.add),
    "-": numeric(operator.sub),
    "*": numeric(operator.mul),
    "/": numeric(_divide),
    "^": numeric(power),
    "&": _concat,
    "=": _comparison(operator.eq),
    "<>": _comparison(operator.ne),
    "<": _comparison(operator.lt),
    ">": _comparison(operator.gt),
    "<=": _comparison(operator.le),
    ">=": _comparison(operator.ge),
}

UNARY: dict[str, Callable[[Value], Value]] = {
    "-": numeric(operator.neg),
    "%": numeric(lambda x: x / 100.0),
    "+": lambda v: v,  # Excel's prefix plus changes nothing, not even text
}
