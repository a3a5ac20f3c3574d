"""Built-in conversions between decimal, binary, octal and hexadecimal: DEC2BIN, DEC2OCT,
DEC2HEX, BIN2DEC, BIN2OCT, BIN2HEX, OCT2DEC, OCT2BIN, OCT2HEX, HEX2DEC, HEX2BIN, HEX2OCT;
and BASE and DECIMAL, between whole numbers and text in any radix from 2 to 36.

Excel's rule: a binary, octal or hexadecimal number has at most 10 digits, and a
10-digit one whose top bit is set is negative (two's complement), so binary spans -512 to
511, octal -2^29 to 2^29-1, hexadecimal -2^39 to 2^39-1. Negative results are always 10
digits; ``places`` pads other results with zeros. ``places``, when given (a blank cell is 0),
must be 1 to 10 and is checked before the number: ``DEC2BIN("E", 0)`` is #NUM!, ``DEC2BIN("E",
1)`` #VALUE!, ``DEC2BIN(-1, 0)`` #NUM! though a negative result ignores ``places``. A decimal
number is converted as :func:`.fn_math.argument_number` says, with no logical values (these
came from the Analysis ToolPak): a blank cell is 0, "" is #VALUE!.

>>> from cellfuncs.formula import compute
>>> compute("=DEC2BIN(9, 4)"), compute("=DEC2HEX(-54)"), compute('=HEX2DEC("FFFFFFFF5B")'), compute('=BIN2OCT("1110")')
('1001', 'FFFFFFFFCA', -165.0, '16')
>>> compute("=BASE(15, 2, 10)"), compute('=DECIMAL("zap", 36)')
('0000001111', 45745.0)
"""

from __future__ import annotations

from ..errors import NUM, VALUE, CellError
from .arrays import elementwise, numeric
from .coerce import to_number, to_text
from .evaluate import builtin
from .fn_math import argument_number
from .nodes import Scalar

DIGITS = 10
_BASES = {"BIN": 2, "OCT": 8, "DEC": 10, "HEX": 16}
_VALID = {2: set("01"), 8: set("01234567"), 16: set("0123456789ABCDEF")}


def _parse(v: Scalar, base: int) -> int | CellError:
    """The integer a 10-digit binary, octal or hexadecimal text (or number) stands for."""
    if type(v) is bool:
        return CellError(VALUE, "a logical value is not a number in another base")
    if base == 10:
        x = argument_number(v)
        return x if type(x) is CellError else int(x)
    t = to_text(v)
    if type(t) is CellError:
        return t
    t = t.strip().upper()
    if len(t) > DIGITS:
        return CellError(NUM, f"{t} has more than {DIGITS} digits")
    if not set(t) <= _VALID[base]:
        return CellError(NUM, f'"{t}" is not a base-{base} number')
    if not t:
        return 0
    n = int(t, base)
    return n - base**DIGITS if len(t) == DIGITS and n >= base**DIGITS // 2 else n


_OMITTED = object()  # places left out, where a blank cell given as places is 0


def _places(places: Scalar | object) -> int | None | CellError:
    if places is _OMITTED:
        return None
    if type(places) is bool:
        return CellError(VALUE, "places must be a number")
    k = to_number(places)
    if type(k) is CellError:
        return k
    if not 1 <= k < DIGITS + 1:
        return CellError(NUM, f"places must be 1 to {DIGITS}")
    return int(k)


def _format(n: int, base: int, k: int | None) -> str | CellError:
    span = base**DIGITS
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

    def convert(number: Scalar, places: Scalar | object = _OMITTED) -> Scalar:
        if type(number) is CellError:
            return number
        k = _places(places)
        if type(k) is CellError:
            return k
        n = _parse(number, b_in)
        if type(n) is CellError:
            return n
        if b_out == 10:
            return float(n)
        return _format(n, b_out, k)

    convert.__doc__ = f"{source}2{target}(number{', [places]' if b_out != 10 else ''}): base {b_in} to base {b_out}."
    builtin(f"{source}2{target}", 1, 1 if b_out == 10 else 2)(elementwise(convert))


for _s in _BASES:
    for _t in _BASES:
        if _s != _t:
            _converter(_s, _t)


_ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ"
_MAX_LENGTH = 255


def _radix(r: float) -> int | CellError:
    return int(r) if 2 <= r < 37 else CellError(NUM, "the radix must be 2 to 36")


def _base(number: float, radix: float, min_length: float = 0.0) -> str | CellError:
    """``number`` (truncated, 0 to 2^53) written in ``radix`` (2 to 36, digits 0-9 then A-Z),
    padded with zeros to ``min_length`` (0 to 255).

    >>> _base(7.0, 2.0), _base(100.0, 16.0), _base(12.567, 2.0, 7.0), _base(-1.0, 2.0).code
    ('111', '64', '0001100', '#NUM!')
    """
    r = _radix(radix)
    if type(r) is CellError:
        return r
    if not 0 <= number < 2.0**53:
        return CellError(NUM, "BASE takes numbers from 0 to 2^53")
    if not 0 <= min_length < _MAX_LENGTH + 1:
        return CellError(NUM, f"BASE's minimum length must be 0 to {_MAX_LENGTH}")
    n, digits = int(number), []
    while n:
        n, d = divmod(n, r)
        digits.append(_ALPHABET[d])
    return "".join(reversed(digits)).rjust(int(min_length), "0") or "0"


builtin("BASE", 2, 3)(numeric(_base))


@builtin("DECIMAL", 2)
@elementwise
def decimal(text: Scalar, radix: Scalar) -> float | CellError:
    """The number ``text`` (any case, up to 255 characters; a number is read as its text)
    writes in ``radix`` (2 to 36); a character that is no digit of the radix is #NUM!.

    >>> decimal("FF", 16.0), decimal(111.0, 2.0), decimal("zap", 36.0), decimal("12", 2.0).code
    (255.0, 7.0, 45745.0, '#NUM!')
    """
    t = to_text(text)
    if type(t) is CellError:
        return t
    r = argument_number(radix)
    if type(r) is CellError:
        return r
    r = _radix(r)
    if type(r) is CellError:
        return r
    if len(t) > _MAX_LENGTH:
        return CellError(VALUE, f"DECIMAL takes text of up to {_MAX_LENGTH} characters")
    if not set(t.upper()) <= set(_ALPHABET[:r]):
        return CellError(NUM, f'"{t}" is not a base-{r} number')
    try:
        return float(int(t, r)) if t else 0.0
    except OverflowError:  # 255 digits can pass 1.8E308
        return CellError(NUM, "the number is too large")
