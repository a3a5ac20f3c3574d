"""Built-in Bessel functions of integer order: BESSELJ, BESSELY (first and second kind) and
BESSELI, BESSELK (the modified ones).

Excel's rules: the order ``n`` is truncated to a whole number and must be 0 or more; BESSELY
and BESSELK need x > 0 (their functions are infinite at 0 and complex below).

Excel's modified functions are the polynomial approximations of Abramowitz and Stegun,
Handbook of Mathematical Functions (1964), 9.8.1-9.8.8 (errors up to about 2e-7): the
reference workbooks' cached values agree with them to the last bit, and differ from the exact
functions by up to 1e-7 relative. So I0, I1, K0 and K1 are those polynomials here; K of a
higher order follows by the upward recurrence K(n+1) = K(n-1) + (2n/x) K(n), and I of a higher
order is the exact ratio I(n)/I(0) times the polynomial I0 (what Miller's downward recurrence
normalised by I0 gives). J and Y are the exact functions of scipy.special, which Excel's agree
with to about 1e-8.

>>> from cellfuncs.formula import compute
>>> compute("=BESSELI(1, 0)"), compute("=BESSELI(1, 1)")  # A&S 9.8.1 and 9.8.3 at x = 1
(1.2660658480342601, 0.5651590975819435)
>>> round(compute("=BESSELJ(1.9, 2)"), 9), round(compute("=BESSELK(1.5, 1)"), 9)
(0.329925728, 0.277387804)
>>> compute("=BESSELY(0, 1)").code, compute("=BESSELI(1, -1)").code
('#NUM!', '#NUM!')
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import NUM, CellError
from .arrays import numeric
from .evaluate import builtin

# Abramowitz and Stegun 9.8.1-9.8.8: coefficients of rising powers of the variable each names
_I0_SMALL = (1.0, 3.5156229, 3.0899424, 1.2067492, 0.2659732, 0.0360768, 0.0045813)  # in (x/3.75)^2
_I1_SMALL = (0.5, 0.87890594, 0.51498869, 0.15084934, 0.02658733, 0.00301532, 0.00032411)  # I1/x, (x/3.75)^2
_I0_LARGE = (0.39894228, 0.01328592, 0.00225319, -0.00157565, 0.00916281, -0.02057706, 0.02635537, -0.01647633,
             0.00392377)  # sqrt(x) exp(-x) I0, in 3.75/x
_I1_LARGE = (0.39894228, -0.03988024, -0.00362018, 0.00163801, -0.01031555, 0.02282967, -0.02895312, 0.01787654,
             -0.00420059)  # sqrt(x) exp(-x) I1, in 3.75/x
_K0_SMALL = (-0.57721566, 0.42278420, 0.23069756, 0.03488590, 0.00262698, 0.00010750, 0.00000740)  # (x/2)^2
_K1_SMALL = (1.0, 0.15443144, -0.67278579, -0.18156897, -0.01919402, -0.00110404, -0.00004686)  # x K1, (x/2)^2
_K0_LARGE = (1.25331414, -0.07832358, 0.02189568, -0.01062446, 0.00587872, -0.00251540, 0.00053208)  # in 2/x
_K1_LARGE = (1.25331414, 0.23498619, -0.03655620, 0.01504268, -0.00780353, 0.00325614, -0.00068245)  # in 2/x


def _poly(coefficients: tuple[float, ...], t: float) -> float:
    total = 0.0
    for c in reversed(coefficients):
        total = total * t + c
    return total


def _i0(x: float) -> float:
    a = abs(x)
    if a < 3.75:
        return _poly(_I0_SMALL, (x / 3.75) ** 2)
    return math.exp(a) / math.sqrt(a) * _poly(_I0_LARGE, 3.75 / a)


def _i1(x: float) -> float:
    a = abs(x)
    if a < 3.75:
        return x * _poly(_I1_SMALL, (x / 3.75) ** 2)
    return math.copysign(math.exp(a) / math.sqrt(a) * _poly(_I1_LARGE, 3.75 / a), x)


def _k0(x: float) -> float:
    if x <= 2.0:
        return -math.log(x / 2.0) * _i0(x) + _poly(_K0_SMALL, (x / 2.0) ** 2)
    return math.exp(-x) / math.sqrt(x) * _poly(_K0_LARGE, 2.0 / x)


def _k1(x: float) -> float:
    if x <= 2.0:
        return math.log(x / 2.0) * _i1(x) + _poly(_K1_SMALL, (x / 2.0) ** 2) / x
    return math.exp(-x) / math.sqrt(x) * _poly(_K1_LARGE, 2.0 / x)


def _besseli(n: int, x: float) -> float:
    if n == 0:
        return _i0(x)
    if n == 1:
        return _i1(x)
    import scipy.special  # lazy: a few tenths of a second to import

    return float(scipy.special.ive(n, x) / scipy.special.i0e(x)) * _i0(x)  # the exp(|x|) scales cancel


def _besselk(n: int, x: float) -> float:
    low, high = _k0(x), _k1(x)
    for k in range(1, n):
        low, high = high, low + 2.0 * k / x * high
    return low if n == 0 else high


def _exact(name: str):
    def value(n: int, x: float) -> float:
        import scipy.special

        return float(getattr(scipy.special, name)(n, x))

    return value


# name: (value of (order, x), whether x must be positive)
_KINDS = {"BESSELJ": (_exact("jv"), False), "BESSELY": (_exact("yn"), True), "BESSELI": (_besseli, False),
          "BESSELK": (_besselk, True)}


def _bessel(name: str):
    function, positive = _KINDS[name]

    def value(x: float, n: float) -> float | CellError:
        order = math.trunc(n)
        if order < 0:
            return CellError(NUM, f"{name}: the order must be 0 or more, not {order}")
        if positive and x <= 0.0:
            return CellError(NUM, f"{name}: x must be above 0")
        with np.errstate(all="ignore"):
            return function(order, x)

    return value


for _name in _KINDS:
    builtin(_name, 2)(numeric(_bessel(_name)))
