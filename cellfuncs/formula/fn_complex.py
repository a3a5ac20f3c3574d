"""Built-in complex-number functions: COMPLEX, IMREAL, IMAGINARY, IMABS, IMARGUMENT,
IMCONJUGATE, IMSUM, IMSUB, IMPRODUCT, IMDIV, IMPOWER, IMSQRT, IMEXP, IMLN, IMLOG10, IMLOG2
and the trigonometric and hyperbolic IM functions.

Complex numbers are texts such as ``"3+4i"``, ``"-2.5j"`` or ``"i"`` (a number is its real
part); results are written the same way, each part in the General format, with the
inputs' suffix (i or j).

>>> from cellfuncs.formula import compute
>>> compute('=IMSUM("3+4i", "5-3i")'), compute('=IMPRODUCT("1+2i", "30+50i")'), compute('=IMABS("5+12i")')
('8+i', '-70+110i', 13.0)
"""

from __future__ import annotations

import cmath
import math
import re
from typing import Callable

import numpy as np

from ..errors import DIV0, NUM, VALUE, CellError
from .arrays import Value, elementwise
from .coerce import format_number, to_number, to_text
from .evaluate import builtin
from .nodes import Scalar

_NUMBER = r"(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_COMPLEX = re.compile(rf"([+-]?{_NUMBER})?(?:([+-])({_NUMBER})?([ij]))?\Z|([+-]?)({_NUMBER})?([ij])\Z")


def parse_complex(v: Scalar) -> tuple[complex, str] | CellError:
    """The complex number of a text (or number) and its suffix ("" when it has none).

    >>> parse_complex("3-4j"), parse_complex("-i"), parse_complex(2.0), parse_complex("1+2k").code
    (((3-4j), 'j'), (-1j, 'i'), ((2+0j), ''), '#NUM!')
    """
    if type(v) is CellError:
        return v
    if type(v) is bool:
        return CellError(VALUE, "a logical value is not a complex number")
    if type(v) is float:
        return complex(v, 0.0), ""
    t = to_text(v)
    if t == "":
        return complex(0.0, 0.0), ""
    m = _COMPLEX.match(t)
    if m is None or not t:
        return CellError(NUM, f'"{t}" is not a complex number')
    if m.group(7):  # imaginary only: "4i", "-i"
        im = float(m.group(6)) if m.group(6) else 1.0
        return complex(0.0, -im if m.group(5) == "-" else im), m.group(7)
    re_part = float(m.group(1)) if m.group(1) is not None else 0.0  # "-i": no real part
    if m.group(4) is None:
        return complex(re_part, 0.0), ""
    im = float(m.group(3)) if m.group(3) else 1.0
    return complex(re_part, -im if m.group(2) == "-" else im), m.group(4)


def format_complex(z: complex, suffix: str = "i") -> str | CellError:
    """A complex number as Excel writes it.

    >>> format_complex(complex(8, 1)), format_complex(complex(0, -2.5), "j"), format_complex(complex(3, 0))
    ('8+i', '-2.5j', '3')
    """
    re_part, im = z.real, z.imag
    if not (math.isfinite(re_part) and math.isfinite(im)):
        return CellError(NUM, "the complex result is too large")
    re_part = 0.0 if abs(re_part) < 1e-300 else re_part
    if im == 0.0:
        return _part(re_part)
    im_text = {1.0: "", -1.0: "-"}.get(im, _part(im)) + (suffix or "i")
    if re_part == 0.0:
        return im_text
    return _part(re_part) + ("" if im_text.startswith("-") else "+") + im_text


def _part(x: float) -> str:
    """One part of a complex result: the general format, but in full down to 1E-18 (Excel's
    stored COMPLEX values: 1E-16 is "0.0000000000000001", 1E-20 stays "1E-20")."""
    return format_number(x, smallest=-18)


def _suffix(suffixes: list[str]) -> str | CellError:
    used = {s for s in suffixes if s}
    if len(used) > 1:
        return CellError(VALUE, "the complex numbers mix the suffixes i and j")
    return used.pop() if used else "i"


def _unary(name: str, fn: Callable[[complex], complex | float | CellError], text: bool = True) -> None:
    def scalar(v: Scalar) -> Scalar:
        parsed = parse_complex(v)
        if type(parsed) is CellError:
            return parsed
        z, s = parsed
        try:
            r = fn(z)
        except (ValueError, ZeroDivisionError, OverflowError):
            return CellError(NUM, f"{name} is undefined here")
        if type(r) is CellError or not text:
            return r
        return format_complex(r, s or "i")

    scalar.__doc__ = f"{name}(inumber)."
    builtin(name, 1)(elementwise(scalar))


def _argument(z: complex) -> float | CellError:
    return cmath.phase(z) if z != 0 else CellError(DIV0, "IMARGUMENT of 0")


def _log(base: float) -> Callable[[complex], complex | CellError]:
    def fn(z: complex) -> complex | CellError:
        return cmath.log(z) / math.log(base) if z != 0 else CellError(NUM, "the logarithm of 0")

    return fn


def _reciprocal(fn: Callable[[complex], complex]) -> Callable[[complex], complex | CellError]:
    def inv(z: complex) -> complex | CellError:
        d = fn(z)
        return 1 / d if d != 0 else CellError(NUM, "division by 0")

    return inv


_unary("IMREAL", lambda z: z.real, text=False)
_unary("IMAGINARY", lambda z: z.imag, text=False)
_unary("IMABS", abs, text=False)
_unary("IMARGUMENT", _argument, text=False)
_unary("IMCONJUGATE", lambda z: z.conjugate())
_unary("IMSQRT", cmath.sqrt)
_unary("IMEXP", cmath.exp)
_unary("IMLN", _log(math.e))
_unary("IMLOG10", _log(10.0))
_unary("IMLOG2", _log(2.0))
_unary("IMSIN", cmath.sin)
_unary("IMCOS", cmath.cos)
_unary("IMTAN", cmath.tan)
_unary("IMSINH", cmath.sinh)
_unary("IMCOSH", cmath.cosh)
_unary("IMSEC", _reciprocal(cmath.cos))
_unary("IMSECH", _reciprocal(cmath.cosh))
_unary("IMCSC", _reciprocal(cmath.sin))
_unary("IMCSCH", _reciprocal(cmath.sinh))
_unary("IMCOT", _reciprocal(cmath.tan))


@builtin("COMPLEX", 2, 3)
@elementwise
def complex_(real: Scalar, imaginary: Scalar, suffix: Scalar = "i") -> Scalar:
    """The complex number ``real + imaginary*i`` as text (suffix "i" or "j").

    >>> complex_(3.0, 4.0), complex_(0.0, 1.0, "j"), complex_(1.0, 1.0, "k").code
    ('3+4i', 'j', '#VALUE!')
    """
    parts = [to_number(real), to_number(imaginary)]
    for x in parts:
        if type(x) is CellError:
            return x
    s = "i" if suffix is None else to_text(suffix)
    if s not in ("i", "j", ""):
        return CellError(VALUE, 'the suffix must be "i" or "j"')
    return format_complex(complex(*parts), s or "i")


def _numbers(values: tuple[Value, ...]) -> list[tuple[complex, str]] | CellError:
    out = []
    for v in values:
        for x in v.flat if type(v) is np.ndarray else (v,):
            if type(v) is np.ndarray and x is None:
                continue
            parsed = parse_complex(x)
            if type(parsed) is CellError:
                return parsed
            out.append(parsed)
    return out


def _many(name: str, reduce: Callable[[list[complex]], complex]) -> None:
    def fn(*values: Value) -> Scalar:
        items = _numbers(values)
        if type(items) is CellError:
            return items
        s = _suffix([s for _, s in items])
        return s if type(s) is CellError else format_complex(reduce([z for z, _ in items]), s)

    fn.__doc__ = f"{name}(inumber1, ...)."
    builtin(name, 1, 255)(fn)


_many("IMSUM", lambda zs: sum(zs, complex(0.0, 0.0)))
_many("IMPRODUCT", lambda zs: math.prod(zs, start=complex(1.0, 0.0)))


def _binary(name: str, fn: Callable[[complex, complex], complex | CellError]) -> None:
    def scalar(a: Scalar, b: Scalar) -> Scalar:
        pa, pb = parse_complex(a), parse_complex(b)
        for p in (pa, pb):
            if type(p) is CellError:
                return p
        s = _suffix([pa[1], pb[1]])
        if type(s) is CellError:
            return s
        try:
            r = fn(pa[0], pb[0])
        except (ValueError, ZeroDivisionError, OverflowError):
            return CellError(NUM, f"{name} is undefined here")
        return r if type(r) is CellError else format_complex(r, s)

    scalar.__doc__ = f"{name}(inumber1, inumber2)."
    builtin(name, 2)(elementwise(scalar))


_binary("IMSUB", lambda a, b: a - b)
_binary("IMDIV", lambda a, b: a / b if b != 0 else CellError(NUM, "IMDIV by 0"))


@builtin("IMPOWER", 2)
@elementwise
def impower(z: Scalar, n: Scalar) -> Scalar:
    """``z`` raised to the real power ``n``.

    >>> impower("2+3i", 3.0)
    '-46+9.00000000000001i'
    """
    parsed, k = parse_complex(z), to_number(n)
    for x in (parsed, k):
        if type(x) is CellError:
            return x
    w, s = parsed
    if w == 0:
        return "0" if k > 0 else CellError(NUM, "0 raised to a power that is not positive")
    r, phi = abs(w) ** k, cmath.phase(w) * k
    return format_complex(complex(r * math.cos(phi), r * math.sin(phi)), s or "i")
