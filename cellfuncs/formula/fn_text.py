"""Built-in text functions: CONCAT and TEXT.

>>> from cellfuncs.formula import compute
>>> compute('=CONCAT("T=", {1,2.5}, TRUE)'), compute('=TEXT(1234.567, "#,##0.00")')
('T=12.5TRUE', '1,234.57')
"""

from __future__ import annotations

import math
import re
from decimal import Decimal
from functools import lru_cache
from typing import NamedTuple

import numpy as np

from ..errors import NUM, VALUE, CellError
from .arrays import Value, elementwise
from .budget import text_error
from .coerce import decimal_round, format_number, to_number, to_text
from .evaluate import builtin
from .numfmt import apply_format, general
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


class _NumberFormat(NamedTuple):
    grouping: bool  # "#,##0": thousands separators
    whole_digits: int  # zeros before the point: minimum digits shown
    decimals: int
    suffix: str  # "", "%" or an exponent such as "E+00"


_FORMAT = re.compile(r"(#,##)?(0+)(?:\.(0+))?(%|[Ee][+-]0+)?\Z")


@lru_cache(maxsize=256)
def _number_format(fmt: str) -> _NumberFormat | None:
    m = _FORMAT.match(fmt)
    if m is None:
        return None
    return _NumberFormat(bool(m.group(1)), len(m.group(2)), len(m.group(3) or ""), m.group(4) or "")


def _fixed(x: float, f: _NumberFormat) -> str:
    d = decimal_round(x, f.decimals)
    whole, _, frac = f"{abs(d):f}".partition(".")
    whole = f"{int(whole):,}" if f.grouping else whole.rjust(f.whole_digits, "0")
    return ("-" if d < 0 else "") + whole + ("." + frac if frac else "")


def _scientific(x: float, f: _NumberFormat) -> str:
    d = Decimal(f"{x:.15g}")
    exp = d.adjusted() - (f.whole_digits - 1) if x != 0.0 else 0
    if abs(decimal_round(float(d.scaleb(-exp)), f.decimals)) >= 10**f.whole_digits:
        exp += 1  # rounding the mantissa carried into a new digit, e.g. 9.999 -> 10.00
    mantissa = _fixed(float(d.scaleb(-exp)), f._replace(grouping=False))
    sign = "-" if exp < 0 else "+" if f.suffix[1] == "+" else ""
    return f"{mantissa}{f.suffix[0]}{sign}{str(abs(exp)).rjust(len(f.suffix) - 2, '0')}"


def format_value(x: float, fmt: str) -> str | CellError:
    """``x`` in a number format: General, @, digit patterns such as ``0``, ``0.00``,
    ``#,##0``, ``0.0%`` and ``0.00E+00``, and the other codes :mod:`numfmt` reads (sections,
    conditions, literals, dates and times); rounding is half away from zero.

    >>> format_value(0.1234, "0.0%"), format_value(12345.0, "0.00E+00"), format_value(-2.5, "0")
    ('12.3%', '1.23E+04', '-3')
    """
    if fmt == "@":
        return format_number(x)
    if fmt.upper() == "GENERAL":
        return general(x)
    f = _number_format(fmt)
    if f is None:  # sections, literals, dates and times
        return apply_format(x, fmt)
    if f.suffix == "%":
        percent = x * 100.0
        return _fixed(percent, f) + "%" if math.isfinite(percent) else CellError(NUM, "the percentage is too large")
    return _scientific(x, f) if f.suffix else _fixed(x, f)


@builtin("TEXT", 2)
@elementwise
def text(value: Scalar, fmt: Scalar) -> str | CellError:
    """``value`` formatted as text; text that is not a number passes unchanged.

    >>> text("3", "0.00"), text("abc", "0"), text(True, "0")
    ('3.00', 'abc', 'TRUE')
    """
    if type(value) is CellError:
        return value
    fmt = to_text(fmt)
    if type(fmt) is CellError:
        return fmt
    if type(value) is bool:
        return to_text(value)
    x = to_number(value)
    return value if type(x) is CellError else format_value(x, fmt)
