"""Built-in conversions between decimal, binary, octal and hexadecimal: DEC2BIN, DEC2OCT,
DEC2HEX, BIN2DEC, BIN2OCT, BIN2HEX, OCT2DEC, OCT2BIN, OCT2HEX, HEX2DEC, HEX2BIN, HEX2OCT.

Excel's rule: a binary, octal or hexadecimal number has at most 10 digits, and a
10-digit one whose top bit is set is negative (two's complement), so binary spans -512 to
511, octal -2^29 to 2^29-1, hexadecimal -2^39 to 2^39-1. Negative results are always 10
digits; ``places`` pads other results with zeros.

>>> from cellfuncs.formula import compute
>>> compute("=DEC2BIN(9, 4)"), compute("=DEC2HEX(-54)"), compute('=HEX2DEC("FFFFFFFF5B")'), compute('=BIN2OCT("1110")')
('1001', 'FFFFFFFFCA', -165.0, '16')
"""

from __future__ import annotations

from ..errors import NUM, VALUE, CellError
from .arrays import elementwise
from .coerce import to_number, to_text
from .evaluate import builtin
from .nodes import Scalar

DIGITS = 10
_BASES = {"BIN": 2, "OCT": 8, "DEC": 10, "HEX": 16}
_VALID = {2: set("01"), 8: set("01234567"), 16: set("0123456789ABCDEF")}


def _parse(v: Scalar, base: int) -> int | CellError:
    """The integer a 10-digit binary, octal or hexadecimal text (or number) stands for."""
    if type(v) is bool:
        return CellError(VALUE, "a logical value is not a number in another base")
    if type(v) is float and base == 10:
        return int(v)
    t = to_text(v)
    if type(t) is CellError:
        return t
    t = t.strip().upper()
    if base == 10:
        x = to_number(t or 0.0)
        return x if type(x) is CellError else int(x)
    if len(t) > DIGITS:
        return CellError(NUM, f"{t} has more than {DIGITS} digits")
    if not set(t) <= _VALID[base]:
        return CellError(NUM, f'"{t}" is not a base-{base} number')
    if not t:
        return 0
    n = int(t, base)
    return n - base**DIGITS if len(t) == DIGITS and n >= base**DIGITS // 2 else n


def _places(places: Scalar) -> int | None | CellError:
    if places is None:
        return None
    if type(places) is bool:
        return CellError(VALUE, "places must be a number")
    k = to_number(places)
    if type(k) is CellError:
        return k
    if not 0 <= k < DIGITS + 1:
        return CellError(NUM, f"places must be 0 to {DIGITS}")
    return int(k)


def _format(n: int, base: int, places: Scalar) -> str | CellError:
    span = base**DIGITS
    k = _places(places)
    if type(k) is CellError:
        return k
    if not -span // 2 <= n < span // 2:
        return CellError(NUM, f"{n} is outside the range of {DIGITS} base-{base} digits")
    if n < 0:
        return {2: "{:b}", 8: "{:o}", 16: "{:X}"}[base].format(n + span)  # always 10 digits
    text = {2: "{:b}", 8: "{:o}", 16: "{:X}"}[base].format(n)
    if k is None:
        return text
    if k < len(text):
        return CellError(NUM, f"{text} needs more than {k} places")
    return text.rjust(k, "0")


def _converter(source: str, target: str) -> None:
    b_in, b_out = _BASES[source], _BASES[target]

    def convert(number: Scalar, places: Scalar = None) -> Scalar:
        if type(number) is CellError:
            return number
        if type(places) is CellError:
            return places
        n = _parse(number, b_in)
        if type(n) is CellError:
            return n
        if b_out == 10:
            return float(n)
        return _format(n, b_out, places)

    convert.__doc__ = f"{source}2{target}(number{', [places]' if b_out != 10 else ''}): base {b_in} to base {b_out}."
    builtin(f"{source}2{target}", 1, 1 if b_out == 10 else 2)(elementwise(convert))


for _s in _BASES:
    for _t in _BASES:
        if _s != _t:
            _converter(_s, _t)
