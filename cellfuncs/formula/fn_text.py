"""Built-in text functions: CONCAT and TEXT.

>>> from cellfuncs.formula import compute
>>> compute('=CONCAT("T=", {1,2.5}, TRUE)'), compute('=TEXT(1234.567, "#,##0.00")')
('T=12.5TRUE', '1,234.57')
"""

from __future__ import annotations

import numpy as np

from ..errors import CellError
from .arrays import Value, elementwise
from .budget import text_error
from .coerce import format_number, to_number, to_text
from .evaluate import builtin
from .numfmt import apply_format, apply_text
from .nodes import Scalar


def texts(values: tuple[Value, ...]) -> list[str] | CellError:
    """Every element of the arguments as text, arrays row by row; the first error met instead.

    >>> texts((np.array([[1.0, 2.5]]), True, "a"))
    ['1', '2.5', 'TRUE', 'a']
    """
    parts = []
    for v in values:
        for x in v.flat if type(v) is np.ndarray else (v,):
            t = to_text(x)
            if type(t) is CellError:
                return t
            parts.append(t)
    return parts


@builtin("CONCAT", 1, None)
def concat(*values: Value) -> str | CellError:
    """All arguments as text joined, arrays element by element row by row.

    >>> concat("a", None, 2.0)
    'a2'
    """
    parts = texts(values)
    if type(parts) is CellError:
        return parts
    return text_error(sum(map(len, parts))) or "".join(parts)


def format_value(x: float, fmt: str) -> str | CellError:
    """``x`` in a number format (see :mod:`numfmt`): ``@`` alone writes the number as text,
    every other code goes through its sections; rounding is half away from zero.

    >>> format_value(0.1234, "0.0%"), format_value(12345.0, "0.00E+00"), format_value(-2.5, "0"), format_value(2.0, "@")
    ('12.3%', '1.23E+04', '-3', '2')
    """
    return format_number(x) if fmt == "@" else apply_format(x, fmt)


@builtin("TEXT", 2)
@elementwise
def text(value: Scalar, fmt: Scalar) -> str | CellError:
    """``value`` formatted as text; a text that is not a number, and TRUE or FALSE as text,
    take the code's text section (the fourth) or pass unchanged.

    >>> text("3", "0.00"), text("abc", "0"), text(True, "0"), text(False, ';;;"<"@">"')
    ('3.00', 'abc', 'TRUE', '<FALSE>')
    """
    if type(value) is CellError:
        return value
    fmt = to_text(fmt)
    if type(fmt) is CellError:
        return fmt
    if type(value) is bool:
        return apply_text(to_text(value), fmt)
    x = to_number(value)
    return apply_text(value, fmt) if type(x) is CellError else format_value(x, fmt)
