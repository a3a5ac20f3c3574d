"""Built-in functions writing values as text: VALUETOTEXT, ARRAYTOTEXT, DOLLAR and FIXED.

VALUETOTEXT and ARRAYTOTEXT write each value as a cell shows it in the General format's text
(numbers by :func:`.format_number`, TRUE and FALSE, an error's code, a blank as nothing); the
strict format (1) puts text in double quotes and ARRAYTOTEXT's array in braces, columns
separated by commas and rows by semicolons. DOLLAR and FIXED round and format a number
through :func:`.numfmt.apply_format`, as TEXT would.

>>> from cellfuncs.formula import compute
>>> compute('=ARRAYTOTEXT({1,"a";TRUE,2.5}, 1)'), compute('=VALUETOTEXT("x", 1)')
('{1,"a";TRUE,2.5}', '"x"')
>>> compute("=DOLLAR(-1234.567, -2)"), compute("=FIXED(1234.567, 1)"), compute("=FIXED(-1234.567, -1, TRUE)")
('($1,200)', '1,234.6', '-1230')
"""

from __future__ import annotations

import numpy as np

from ..errors import VALUE, CellError
from .arrays import Value, as_array, elementwise, map_values
from .budget import text_error
from .coerce import decimal_round, format_number, to_bool
from .evaluate import builtin
from .fn_math import argument_number
from .fn_workdays import each_a_value
from .nodes import Scalar
from .numfmt import apply_format

MOST_DECIMALS = 127  # Excel's limit for DOLLAR's and FIXED's decimals


def shown(v: Scalar, strict: bool) -> str:
    """A value as VALUETOTEXT and ARRAYTOTEXT write it; ``strict`` quotes text.

    >>> shown(2.0, False), shown('a"b', True), shown(None, True), shown(CellError("#N/A"), True)
    ('2', '"a""b"', '', '#N/A')
    """
    t = type(v)
    if t is str:
        return '"' + v.replace('"', '""') + '"' if strict else v
    if t is bool:
        return "TRUE" if v else "FALSE"
    if t is CellError:
        return v.code
    return "" if v is None else format_number(v)


def _strictness(fmt: Scalar) -> bool | CellError:
    """The format argument: 0 (or omitted) concise, 1 strict, anything else #VALUE!."""
    if type(fmt) is CellError:
        return fmt
    if type(fmt) is np.ndarray:
        return CellError(VALUE, "the format is a single number")
    x = argument_number(fmt)
    if type(x) is CellError:
        return x
    if x not in (0.0, 1.0):
        return CellError(VALUE, "the format must be 0 (concise) or 1 (strict)")
    return x == 1.0


@builtin("VALUETOTEXT", 1, 2)
@elementwise
def valuetotext(value: Scalar, fmt: Scalar = None) -> Scalar:
    """Any value as text, an error value as its code; format 1 puts text in quotes.

    >>> valuetotext(True), valuetotext(7.123456e-09), valuetotext("a", 2.0).code
    ('TRUE', '0.000000007123456', '#VALUE!')
    """
    strict = _strictness(fmt)
    return strict if type(strict) is CellError else shown(value, strict)


@builtin("ARRAYTOTEXT", 1, 2, arrays=(0,))
def arraytotext(array: Value, fmt: Value = None) -> Value:
    """An array's values as one text: concise (0) joined by ", ", strict (1) in braces, a
    comma between columns and a semicolon between rows, text quoted.

    >>> from cellfuncs.formula.arrays import object_array
    >>> arraytotext(5.0), arraytotext(object_array([["a", None]]), 0.0)
    ('5', 'a, ')
    """
    strict = _strictness(fmt)
    if type(strict) is CellError:
        return strict
    rows = [[shown(v, strict) for v in row] for row in as_array(array)]
    if strict:
        text = "{" + ";".join(",".join(row) for row in rows) + "}"
    else:
        text = ", ".join(s for row in rows for s in row)
    return text_error(len(text)) or text


def _decimals(v: Scalar) -> int | CellError:
    x = argument_number(v)
    if type(x) is CellError:
        return x
    if x > MOST_DECIMALS:
        return CellError(VALUE, f"at most {MOST_DECIMALS} decimals")
    return int(x)


def _rounded(number: Scalar, decimals: Scalar, pattern: str) -> Scalar:
    """``number`` rounded to ``decimals`` (negative: to tens, hundreds...) and formatted with
    ``pattern``, in which "0" stands for the integer digits and their decimals."""
    x, d = argument_number(number), _decimals(decimals)
    for v in (x, d):
        if type(v) is CellError:
            return v
    digits = "0." + "0" * d if d > 0 else "0"
    return apply_format(float(decimal_round(x, d)), pattern.replace("0", digits))


@builtin("DOLLAR", 1, 2)
@each_a_value
def dollar(number: Value, decimals: Value = 2.0) -> Value:
    """A number as currency text: rounded to ``decimals`` (2 by default; negative rounds to
    the left of the point), thousands separated, a negative amount in parentheses.

    >>> dollar(-0.123, 4.0), dollar(99.888)
    ('($0.1230)', '$99.89')
    """
    return map_values(lambda x, d: _rounded(x, d, "$#,##0;($#,##0)"), number, 2.0 if decimals is None else decimals)


@builtin("FIXED", 1, 3)
@each_a_value
def fixed(number: Value, decimals: Value = 2.0, no_commas: Value = False) -> Value:
    """A number as text rounded to ``decimals`` (2 by default; negative rounds to the left of
    the point), with thousands separators unless ``no_commas`` is TRUE.

    >>> fixed(44.332), fixed(1234.567, -1.0)
    ('44.33', '1,230')
    """

    def one(x: Scalar, d: Scalar, plain: Scalar) -> Scalar:
        plain = to_bool(plain)
        if type(plain) is CellError:
            return plain
        return _rounded(x, d, "0" if plain else "#,##0")

    return map_values(one, number, 2.0 if decimals is None else decimals, no_commas)

