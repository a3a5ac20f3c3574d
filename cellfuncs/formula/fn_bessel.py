"""Built-in Bessel functions of integer order: BESSELJ, BESSELY (first and second kind) and
BESSELI, BESSELK (the modified ones).

Excel's rules: the order ``n`` is truncated to a whole number and must be 0 or more; BESSELY
and BESSELK need x > 0 (their functions are infinite at 0 and complex below).

Excel's values are those of classic approximations, not of the exact functions, and are matched
here to a few units in the last place (BESSELJ to the last bit):

- I0, I1, K0, K1 are the polynomials of Abramowitz and Stegun, Handbook of Mathematical
  Functions (1964), 9.8.1-9.8.8 (errors up to about 2e-7); K of a higher order follows by the
  upward recurrence K(n+1) = K(n-1) + (2n/x) K(n), and I of a higher order is the exact ratio
  I(n)/I(0) times the polynomial I0 (what Miller's downward recurrence normalised by I0 gives).
- J0, J1, Y0, Y1 are rational approximations below x = 8 and above it the asymptotic form
  sqrt(2/(pi x)) (P cos(x - phase) - (8/x) Q sin(x - phase)) (Y: P sin + (8/x) Q cos), P and Q
  polynomials in (8/x)^2, in the form of Numerical Recipes (Press et al., 1992, section 6.5),
  with 10-digit constants (2/pi as 0.636619772, pi/4 as 0.785398164): BESSELJ(0, 0) is
  1.00000000283141, BESSELY(1E-10, 1) is -6366197720. The reference workbooks' values show two
  departures, kept: J0's P has -0.1098628267E-2 where Y0's has -0.1098628627E-2, and J1's P
  repeats its y^2 coefficient (1 + y (c1 + y (c2 + y (c2 + y (c3 + y c4)))), where Y1's has
  c2 once); without them BESSELJ(10, 1) would differ by 1e-5 relative. The values agree with
  the exact functions to about 1e-8 (J1 near x = 10: 1e-5).
- J of a higher order: the upward recurrence from J0 and J1 when |x| > n, else Miller's
  downward recurrence from order 2((n + int(sqrt(40 n)))/2), normalised by J0 + 2 (J2 + J4 +
  ...); Y of a higher order: the upward recurrence from Y0 and Y1.

Logical values are #VALUE! (an Analysis ToolPak rule, :func:`.fn_math.toolpak`).

>>> from cellfuncs.formula import compute
>>> compute("=BESSELI(1, 0)"), compute("=BESSELI(1, 1)")  # A&S 9.8.1 and 9.8.3 at x = 1
(1.2660658480342601, 0.5651590975819435)
>>> round(compute("=BESSELJ(1.9, 2)"), 9), round(compute("=BESSELK(1.5, 1)"), 9)  # Microsoft's examples
(0.329925829, 0.277387804)
>>> compute("=BESSELJ(0, 0)"), compute("=BESSELY(1E-10, 1)"), compute("=BESSELJ(TRUE, 1)").code
(1.00000000283141, -6366197720.0, '#VALUE!')
>>> compute("=BESSELY(0, 1)").code, compute("=BESSELI(1, -1)").code
('#NUM!', '#NUM!')
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import NUM, CellError
from .evaluate import builtin
from .fn_math import toolpak

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


_TWO_OVER_PI = 0.636619772  # the 10-digit constants Excel's values show
_QUARTER_PI = 0.785398164
_THREE_QUARTER_PI = 2.356194491

# rational approximations below x = 8, numerator over denominator, in rising powers of x^2
_J0_NUM = (57568490574.0, -13362590354.0, 651619640.7, -11214424.18, 77392.33017, -184.9052456)
_J0_DEN = (57568490411.0, 1029532985.0, 9494680.718, 59272.64853, 267.8532712, 1.0)
_J1_NUM = (72362614232.0, -7895059235.0, 242396853.1, -2972611.439, 15704.48260, -30.16036606)  # J1/x
_J1_DEN = (144725228442.0, 2300535178.0, 18583304.74, 99447.43394, 376.9991397, 1.0)
_Y0_NUM = (-2957821389.0, 7062834065.0, -512359803.6, 10879881.29, -86327.92757, 228.4622733)
_Y0_DEN = (40076544269.0, 745249964.8, 7189466.438, 47447.26470, 226.1030244, 1.0)
_Y1_NUM = (-0.4900604943e13, 0.1275274390e13, -0.5153438139e11, 0.7349264551e9, -0.4237922726e7,
           0.8511937935e4)  # Y1/x
_Y1_DEN = (0.2499580570e14, 0.4244419664e12, 0.3733650367e10, 0.2245904002e8, 0.1020426050e6,
           0.3549632885e3, 1.0)
# the asymptotic form's P and Q above x = 8, in rising powers of (8/x)^2 (Q also times 8/x)
_J0_P = (1.0, -0.1098628267e-2, 0.2734510407e-4, -0.2073370639e-5, 0.2093887211e-6)
_Y0_P = (1.0, -0.1098628627e-2, 0.2734510407e-4, -0.2073370639e-5, 0.2093887211e-6)
_J0_Q = (-0.1562499995e-1, 0.1430488765e-3, -0.6911147651e-5, 0.7621095161e-6, -0.934935152e-7)
_Y0_Q = (-0.1562499995e-1, 0.1430488765e-3, -0.6911147651e-5, 0.7621095161e-6, -0.934945152e-7)
_J1_P = (1.0, 0.183105e-2, -0.3516396496e-4, -0.3516396496e-4, 0.2457520174e-5, -0.240337019e-6)
_Y1_P = (1.0, 0.183105e-2, -0.3516396496e-4, 0.2457520174e-5, -0.240337019e-6)
_ONE_Q = (0.04687499995, -0.2002690873e-3, 0.8449199096e-5, -0.88228987e-6, 0.105787412e-6)

_MILLER_SPAN = 40.0  # Miller's recurrence starts sqrt(40 n) orders above n
_HUGE, _SHRINK = 1e10, 1e-10  # its values are multiplied by _SHRINK whenever they pass _HUGE


def _asymptotic(x: float, phase: float, p: tuple[float, ...], q: tuple[float, ...], second: bool) -> float:
    z = 8.0 / x
    y = z * z
    c, s = math.cos(x - phase), math.sin(x - phase)
    big, small = (s, c) if second else (c, -s)
    return math.sqrt(_TWO_OVER_PI / x) * (big * _poly(p, y) + small * z * _poly(q, y))


def _j0(x: float) -> float:
    a = abs(x)
    if a < 8.0:
        return _poly(_J0_NUM, x * x) / _poly(_J0_DEN, x * x)
    return _asymptotic(a, _QUARTER_PI, _J0_P, _J0_Q, False)


def _j1(x: float) -> float:
    a = abs(x)
    if a < 8.0:
        return x * _poly(_J1_NUM, x * x) / _poly(_J1_DEN, x * x)
    value = _asymptotic(a, _THREE_QUARTER_PI, _J1_P, _ONE_Q, False)
    return -value if x < 0.0 else value


def _y0(x: float) -> float:
    if x < 8.0:
        return _poly(_Y0_NUM, x * x) / _poly(_Y0_DEN, x * x) + _TWO_OVER_PI * _j0(x) * math.log(x)
    return _asymptotic(x, _QUARTER_PI, _Y0_P, _Y0_Q, True)


def _y1(x: float) -> float:
    if x < 8.0:
        rational = x * _poly(_Y1_NUM, x * x) / _poly(_Y1_DEN, x * x)
        return rational + _TWO_OVER_PI * (_j1(x) * math.log(x) - 1.0 / x)
    return _asymptotic(x, _THREE_QUARTER_PI, _Y1_P, _ONE_Q, True)


def _upward(n: int, x: float, low: float, high: float) -> float:
    """Order ``n`` from orders 0 and 1 by f(k+1) = (2k/x) f(k) - f(k-1) (stable for Y, and for
    J while x > n)."""
    two_over_x = 2.0 / x  # k * (2/x), not 2k/x: the last bit as Excel has it
    for k in range(1, n):
        low, high = high, k * two_over_x * high - low
    return low if n == 0 else high


def _miller(n: int, x: float) -> float:
    """J of order ``n`` >= 2 at 0 < x <= n: the downward recurrence from a high even order,
    normalised by the sum J0 + 2 (J2 + J4 + ...) = 1."""
    above, current, result, even_sum = 0.0, 1.0, 0.0, 0.0
    two_over_x = 2.0 / x
    for k in range(2 * ((n + int(math.sqrt(_MILLER_SPAN * n))) // 2), 0, -1):
        above, current = current, k * two_over_x * current - above
        if abs(current) > _HUGE:
            above, current, result, even_sum = (v * _SHRINK for v in (above, current, result, even_sum))
        if k % 2 == 1:  # current is of order k - 1, even
            even_sum += current
        if k == n:
            result = above
    return result / (2.0 * even_sum - current)


def _besselj(n: int, x: float) -> float:
    if n < 2:
        return _j0(x) if n == 0 else _j1(x)
    a = abs(x)
    if a == 0.0:
        return 0.0
    value = _upward(n, a, _j0(a), _j1(a)) if a > n else _miller(n, a)
    return -value if x < 0.0 and n % 2 else value


def _bessely(n: int, x: float) -> float:
    return _upward(n, x, _y0(x), _y1(x))


# name: (value of (order, x), whether x must be positive)
_KINDS = {"BESSELJ": (_besselj, False), "BESSELY": (_bessely, True), "BESSELI": (_besseli, False),
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
    builtin(_name, 2)(toolpak(_bessel(_name)))
