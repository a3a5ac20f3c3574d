"""Built-in Roman numeral functions: ROMAN and ARABIC.

>>> from cellfuncs.formula import compute
>>> compute("=ROMAN(1999)"), compute("=ROMAN(1999, 4)"), compute('=ARABIC("mcmxcix")')
('MCMXCIX', 'MIM', 1999.0)
"""

from __future__ import annotations

from ..errors import VALUE, CellError
from .arrays import elementwise
from .coerce import to_number, to_text
from .evaluate import builtin
from .nodes import Scalar

_NUMERALS = {"I": 1, "V": 5, "X": 10, "L": 50, "C": 100, "D": 500, "M": 1000}

# Excel's forms: 0 classic; each further form (up to 4, "simplified") admits subtractive pairs
# of a smaller numeral before a larger one (documented with the example ROMAN(499, 0..4)).
_PAIRS_ADDED = ("IV IX XL XC CD CM", "VL VC LD LM", "IL IC XD XM", "VD VM", "ID IM")


def _symbols(form: int) -> list[tuple[str, int]]:
    pairs = " ".join(_PAIRS_ADDED[: form + 1]).split()
    symbols = [(p, _NUMERALS[p[1]] - _NUMERALS[p[0]]) for p in pairs] + list(_NUMERALS.items())
    return sorted(symbols, key=lambda s: -s[1])


_BY_FORM = [_symbols(form) for form in range(5)]


def _form(v: Scalar) -> int | CellError:
    if type(v) is bool:  # TRUE: classic, FALSE: simplified
        return 0 if v else 4
    x = to_number(v)
    if type(x) is CellError:
        return x
    if not 0.0 <= x < 5.0:
        return CellError(VALUE, f"ROMAN's form is 0 to 4, not {to_text(x)}")
    return int(x)


@builtin("ROMAN", 1, 2)
@elementwise
def roman(number: Scalar, form: Scalar = 0.0) -> str | CellError:
    """``number`` (0 to 3999, truncated) in Roman numerals; ``form`` 0 (classic) to 4 (simplified),
    TRUE as 0 and FALSE as 4; 0 gives empty text.

    >>> roman(499.0), roman(499.0, 1.0), roman(499.0, 2.0), roman(499.0, 3.0), roman(499.0, False)
    ('CDXCIX', 'LDVLIV', 'XDIX', 'VDIV', 'ID')
    """
    x = to_number(number)
    if type(x) is CellError:
        return x
    f = _form(0.0 if form is None else form)
    if type(f) is CellError:
        return f
    if not 0.0 <= x < 4000.0:
        return CellError(VALUE, f"ROMAN takes 0 to 3999, not {to_text(x)}")
    n, out = int(x), []
    for text, value in _BY_FORM[f]:
        while n >= value:
            out.append(text)
            n -= value
    return "".join(out)


@builtin("ARABIC", 1)
@elementwise
def arabic(text: Scalar) -> float | CellError:
    """The number a Roman numeral stands for (any case, surrounding spaces ignored, a leading
    minus allowed; a smaller numeral before a larger one is subtracted); empty text is 0.

    >>> arabic(" mcmxcix "), arabic("-IC"), arabic(""), arabic("MMXXIV"), arabic("ABC").code
    (1999.0, -99.0, 0.0, 2024.0, '#VALUE!')
    """
    if type(text) is CellError:
        return text
    if type(text) is not str and text is not None:
        return CellError(VALUE, "ARABIC takes text")
    s = (text or "").strip().upper()
    if len(s) > 255:
        return CellError(VALUE, "ARABIC takes at most 255 characters")
    sign = 1.0
    if s.startswith("-"):
        sign, s = -1.0, s[1:]
    values = [_NUMERALS.get(ch) for ch in s]
    if None in values:
        return CellError(VALUE, f'"{text}" is not a Roman numeral')
    total = 0
    for i, v in enumerate(values):
        total += -v if i + 1 < len(values) and v < values[i + 1] else v
    return sign * total
