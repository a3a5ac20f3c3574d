"""Excel's conversions between scalar values, its comparison order and its number-to-text rule.

A scalar value is a float, bool, str, :class:`CellError` or None (a blank cell or a
missing argument). Conversions return a :class:`CellError` instead of raising.

>>> to_number("3") + 1, to_text(2.0), to_bool("true")
(4.0, '2', True)
>>> to_number("abc")
CellError(code='#VALUE!', reason='text "abc" is not a number')
"""

from __future__ import annotations

import re
from decimal import ROUND_HALF_UP, Context, Decimal
from numbers import Real

from ..errors import VALUE, CellError
from .nodes import Scalar

# Numeric text Excel accepts in arithmetic: optional thousands commas, exponent, trailing %.
# ASCII digits only: Python's float() would also take "inf", "nan", "1_0" and other scripts' digits.
_NUMERIC_TEXT = re.compile(
    r"\s*([+-]?(?:[0-9]{1,3}(?:,[0-9]{3})+(?:\.[0-9]*)?|[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)\s*(%?)\s*\Z"
)

# Type order of Excel comparisons: numbers < text < booleans.
_RANK = {float: 0, str: 1, bool: 2}
_BLANK_AS = {float: 0.0, str: "", bool: False}
_INF = float("inf")
_WIDE = Context(prec=1000)  # room for 1e308 written with 400 decimals


def _quote(text: str) -> str:
    return f'"{text}"' if len(text) <= 40 else f'"{text[:37]}..."'


def to_number(v: Scalar) -> float | CellError:
    """``v`` as a number: TRUE is 1, blank is 0, numeric text is parsed, other text is #VALUE!.

    >>> to_number(True), to_number(None), to_number(" 1,250.5 "), to_number("5%")
    (1.0, 0.0, 1250.5, 0.05)
    >>> to_number("$5"), to_number("($1,000)"), to_number("2024-01-02"), to_number("12:00")
    (5.0, -1000.0, 45293.0, 0.5)
    >>> print(to_number("1e999"))
    #VALUE! text "1e999" is a number beyond the largest a cell holds
    """
    t = type(v)
    if t is float:
        return v
    if t is bool:
        return 1.0 if v else 0.0
    if v is None:
        return 0.0
    if t is str:
        m = _NUMERIC_TEXT.match(v)
        if m is None:
            return _other_number_text(v)
        x = float(m.group(1).replace(",", ""))
        if x in (_INF, -_INF):  # "1e999": beyond a double, so no number a cell can hold
            return CellError(VALUE, f"text {_quote(v)} is a number beyond the largest a cell holds")
        return x / 100.0 if m.group(2) else x
    if t is CellError:
        return v
    if isinstance(v, Real):  # ints or numpy numbers a caller let through
        return float(v)
    raise TypeError(f"not a cell value: {v!r}")


# Currency and accounting forms Excel (en-US) also reads: "$5", "-$5", "$-5", "(5)", "($1,000)".
_MONEY = re.compile(r"\s*(\(?)\s*([+-]?)\s*\$?\s*([+-]?)([0-9][0-9,]*\.?[0-9]*|\.[0-9]+)\s*(\)?)\s*\Z")


def _other_number_text(v: str) -> float | CellError:
    """Currency amounts, dates and times in text, as numbers (a date as its serial)."""
    m = _MONEY.match(v)
    if m and "$" in v or (m and m.group(1) and m.group(5)):
        paren, sign1, sign2, digits, close = m.groups()
        if bool(paren) == bool(close) and not (sign1 and sign2) and _NUMERIC_TEXT.match(digits):
            x = float(digits.replace(",", ""))
            return -x if paren or "-" in (sign1, sign2) else x
    from .dates import parse_date_text

    x = parse_date_text(v)
    if x is not None and v != v.strip():  # Excel reads " 10 " as 10 but not " 2024-01-10 " as a date
        return CellError(VALUE, f"a date in text {_quote(v)} is not a number with spaces around it")
    return x if x is not None else CellError(VALUE, f"text {_quote(v)} is not a number")


def to_text(v: Scalar) -> str | CellError:
    """``v`` as text, numbers by :func:`format_number`.

    >>> to_text(1.5), to_text(False), to_text(None)
    ('1.5', 'FALSE', '')
    """
    t = type(v)
    if t is str or t is CellError:
        return v
    if t is bool:
        return "TRUE" if v else "FALSE"
    if v is None:
        return ""
    return format_number(float(v))


def to_bool(v: Scalar) -> bool | CellError:
    """``v`` as a logical value: numbers are TRUE unless 0; only "TRUE"/"FALSE" text converts.

    >>> to_bool(2.0), to_bool(None), to_bool("yes").code
    (True, False, '#VALUE!')
    """
    t = type(v)
    if t is bool or t is CellError:
        return v
    if v is None:
        return False
    if t is str:
        word = v.strip().upper()
        if word in ("TRUE", "FALSE"):
            return word == "TRUE"
        return CellError(VALUE, f"text {_quote(v)} is not TRUE or FALSE")
    return float(v) != 0.0


def compare(a: Scalar, b: Scalar) -> int | CellError:
    """-1, 0 or 1 as ``a`` sorts before, equal to or after ``b`` in Excel's order.

    Text compares case-insensitively; a blank takes the other side's type (0, "" or FALSE);
    the first error, if any, is returned.

    >>> compare("abc", "ABC"), compare(5.0, "1"), compare(True, "zzz"), compare(None, 0.0)
    (0, -1, 1, 0)
    """
    if type(a) is CellError:
        return a
    if type(b) is CellError:
        return b
    if a is None:
        a = _BLANK_AS.get(type(b), 0.0)
    if b is None:
        b = _BLANK_AS.get(type(a), 0.0)
    ra, rb = _RANK.get(type(a), 0), _RANK.get(type(b), 0)
    if ra != rb:
        return -1 if ra < rb else 1
    if ra == 1:
        a, b = fold(a), fold(b)
    return (a > b) - (a < b)


def fold(text: str) -> str:
    """``text`` as Excel compares it, ignoring case: letter by letter, so "ß" stays apart
    from "ss" (Python's casefold would join them).

    >>> fold("Straße") == fold("STRASSE"), fold("ABC") == fold("abc")
    (False, True)
    """
    return text.lower()


def format_number(x: float, smallest: int = -9) -> str:
    """A number as Excel's general format writes it into text: up to 15 significant digits,
    no trailing zeros, scientific notation from 1E+15 up and below 1E``smallest`` (-9; the
    complex-number functions write down to 1E-18 in full).

    >>> format_number(1.5), format_number(2.0), format_number(1e20), format_number(1 / 3)
    ('1.5', '2', '1E+20', '0.333333333333333')
    >>> format_number(-123456789012345678.0), format_number(1e-10)
    ('-1.23456789012346E+17', '1E-10')
    """
    if x != x or x in (float("inf"), float("-inf")):
        return "#NUM!"
    mantissa, exp_text = f"{x:.14e}".split("e")
    digits = mantissa.lstrip("-").replace(".", "").rstrip("0")
    if not digits:
        return "0"
    sign = "-" if x < 0 else ""
    exp = int(exp_text)
    if smallest <= exp < 15:
        if exp >= 0:
            whole, frac = digits[: exp + 1].ljust(exp + 1, "0"), digits[exp + 1 :]
        else:
            whole, frac = "0", "0" * (-exp - 1) + digits
        return sign + whole + ("." + frac if frac else "")
    lead = digits[0] + ("." + digits[1:] if len(digits) > 1 else "")
    return f"{sign}{lead}E{'+' if exp >= 0 else '-'}{abs(exp):02d}"


def decimal_round(x: float, digits: int, rounding: str = ROUND_HALF_UP) -> Decimal:
    """``x``, taken at its 15 significant digits as Excel shows it, rounded to ``digits``
    decimals (negative: tens, hundreds...) with a :mod:`decimal` rounding mode.

    Working on the decimal digits makes 2.675 round to 2.68 as in Excel, where the
    binary value (2.67499999...) would round down.

    >>> decimal_round(2.675, 2), decimal_round(-2.5, 0), decimal_round(1234.5, -2)
    (Decimal('2.68'), Decimal('-3'), Decimal('1.2E+3'))
    """
    digits = max(-400, min(400, digits))  # beyond this every double rounds to 0 or stays as is
    return Decimal(f"{x:.15g}").quantize(Decimal(1).scaleb(-digits), rounding=rounding, context=_WIDE)
