"""Built-in financial functions of annuities, cash flows and depreciation: PV, FV, PMT, NPER,
IPMT, PPMT, RATE, NPV, IRR, MIRR, EFFECT, NOMINAL, SLN, SYD, DDB, DB.

Sign convention as in Excel: money paid out is negative. ``type`` 1 means payments at the
start of each period, 0 (default) at the end. RATE iterates (Newton's method) to a relative
change below 1e-12 and gives #NUM! when it does not converge in 100 steps; IRR follows Excel's
own iteration (see ``irr``), whose early stop decides the last digits that an NPV at its result
shows.

>>> from cellfuncs.formula import compute
>>> round(compute("=PMT(0.08/12, 10, 10000)"), 2), round(compute("=FV(0.06/12, 10, -200, -500, 1)"), 2)
(-1037.03, 2581.4)
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np

from ..errors import DIV0, NUM, VALUE, CellError
from .arrays import Value, elementwise, numeric
from .coerce import to_number
from .evaluate import Context, builtin, collect, evaluate
from .nodes import Node, Scalar


def _growth(r: float, n: float) -> float:
    return (1.0 + r) ** n


def fv(r: float, n: float, pmt: float, pv: float = 0.0, type_: float = 0.0) -> float:
    """Future value of an annuity.

    >>> round(fv(0.06 / 12, 10.0, -200.0, -500.0, 1.0), 2)
    2581.4
    """
    if r == 0.0:
        return -(pv + pmt * n)
    g = _growth(r, n)
    return -(pv * g + pmt * (1.0 + r * (type_ != 0.0)) * (g - 1.0) / r)


def pv(r: float, n: float, pmt: float, fv_: float = 0.0, type_: float = 0.0) -> float:
    """Present value of an annuity.

    >>> round(pv(0.08 / 12, 12.0 * 20, 500.0), 2)
    -59777.15
    """
    if r == 0.0:
        return -(fv_ + pmt * n)
    g = _growth(r, n)
    return -(fv_ + pmt * (1.0 + r * (type_ != 0.0)) * (g - 1.0) / r) / g


def pmt(r: float, n: float, pv_: float, fv_: float = 0.0, type_: float = 0.0) -> float | CellError:
    """The payment per period.

    >>> round(pmt(0.08 / 12, 10.0, 10000.0), 2)
    -1037.03
    """
    if n == 0.0:
        return CellError(NUM, "PMT over 0 periods")
    if r <= -1.0:  # Excel's stored values: #NUM! at rates -1 and -3
        return CellError(NUM, "PMT at a rate of -1 or below")
    if r == 0.0:
        return -(pv_ + fv_) / n
    g = _growth(r, n)
    return -(r * (pv_ * g + fv_)) / ((1.0 + r * (type_ != 0.0)) * (g - 1.0))


def nper(r: float, payment: float, pv_: float, fv_: float = 0.0, type_: float = 0.0) -> float | CellError:
    """The number of periods.

    >>> round(nper(0.12 / 12, -100.0, -1000.0, 10000.0, 1.0), 6)
    59.673866
    """
    if r == 0.0:
        return -(pv_ + fv_) / payment if payment != 0.0 else CellError(NUM, "NPER with no payment and no interest")
    p = payment * (1.0 + r * (type_ != 0.0))
    num, den = p - fv_ * r, p + pv_ * r
    if den == 0.0 or num / den <= 0.0 or r <= -1.0:
        return CellError(NUM, "NPER has no solution for these values")
    return math.log(num / den) / math.log(1.0 + r)


def ipmt(r: float, per: float, n: float, pv_: float, fv_: float = 0.0, type_: float = 0.0) -> float | CellError:
    """The interest part of payment ``per``.

    >>> round(ipmt(0.1 / 12, 1.0, 3.0 * 12, 8000.0), 2)
    -66.67
    """
    if not 1.0 <= per < n + 1.0:  # Excel's stored values: period 3.9 of 3 has a value, 4 not
        return CellError(NUM, "the period is outside 1 to the number of periods")
    p = pmt(r, n, pv_, fv_, type_)
    if type(p) is CellError:
        return p
    start = type_ != 0.0
    if per == 1.0:
        return 0.0 if start else -pv_ * r
    if start:
        return (fv(r, per - 2.0, p, pv_, 1.0) - p) * r
    return fv(r, per - 1.0, p, pv_, 0.0) * r


def ppmt(r: float, per: float, n: float, pv_: float, fv_: float = 0.0, type_: float = 0.0) -> float | CellError:
    """The principal part of payment ``per``.

    >>> round(ppmt(0.1 / 12, 1.0, 2.0 * 12, 2000.0), 2)
    -75.62
    """
    p, i = pmt(r, n, pv_, fv_, type_), ipmt(r, per, n, pv_, fv_, type_)
    for x in (p, i):
        if type(x) is CellError:
            return x
    if r == 0.0:
        return p - i
    # The principal parts grow by (1 + r) a period from the first one after interest, which
    # is pmt + pv*r written without its cancellation (at high rates the two nearly cancel,
    # and Excel's stored CUMPRINC values keep the digits that p - i loses).
    first = -r * (pv_ + fv_) / (_growth(r, n) - 1.0)
    if type_ != 0.0:
        return p if per == 1.0 else first * _growth(r, per - 2.0)
    return first * _growth(r, per - 1.0)


def _newton(f: Callable[[float], float], guess: float, what: str) -> float | CellError:
    x = guess
    for _ in range(100):
        y = f(x)
        h = 1e-7 * max(1.0, abs(x))
        d = (f(x + h) - f(x - h)) / (2.0 * h)
        if d == 0.0 or not math.isfinite(d) or not math.isfinite(y):
            return CellError(NUM, f"{what} did not converge")
        step = y / d
        x -= step
        if x <= -1.0:
            return CellError(NUM, f"{what} did not converge")
        if abs(step) <= 1e-12 * max(1.0, abs(x)):
            return x
    return CellError(NUM, f"{what} did not converge in 100 steps")


def rate(n: float, payment: float, pv_: float, fv_: float = 0.0, type_: float = 0.0, guess: float = 0.1) -> float | CellError:
    """The interest rate per period of an annuity.

    >>> round(rate(4.0 * 12, -200.0, 8000.0), 8)
    0.00770147
    """
    def balance(r: float) -> float:
        if abs(r) < 1e-12:
            return pv_ + payment * n + fv_
        g = _growth(r, n)
        return pv_ * g + payment * (1.0 + r * (type_ != 0.0)) * (g - 1.0) / r + fv_

    return _newton(balance, guess, "RATE")


for _name, _fn, _lo, _hi in (("FV", fv, 3, 5), ("PV", pv, 3, 5), ("PMT", pmt, 3, 5), ("NPER", nper, 3, 5),
                             ("IPMT", ipmt, 4, 6), ("PPMT", ppmt, 4, 6), ("RATE", rate, 3, 6)):
    builtin(_name, _lo, _hi)(numeric(_fn))


def _flows(context: Context, nodes: tuple[Node, ...]) -> list[float] | CellError:
    return collect(context, nodes, to_number, lambda x: x if type(x) is float else None)


def _npv(r: float, values: list[float], first: int = 1) -> float:
    return math.fsum(v / (1.0 + r) ** (i + first) for i, v in enumerate(values))


@builtin("NPV", 2, 255, lazy=True)
def npv(context: Context, rate_: Node, *nodes: Node) -> float | CellError:
    """Net present value of flows at the ends of periods 1, 2, ...

    >>> from cellfuncs.formula import compute
    >>> round(compute("=NPV(0.1, -10000, 3000, 4200, 6800)"), 2)
    1188.44
    """
    r = _flows(context, (rate_,))
    values = _flows(context, nodes)
    for x in (r, values):
        if type(x) is CellError:
            return x
    if r[0] == -1.0:
        return CellError(DIV0, "NPV at a rate of -1")
    return _npv(r[0], values)


def _single_number(context: Context, node: Node) -> float | CellError:
    """A rate or guess argument: one value (a reference's first cell) as a number, so a
    blank is 0, a logical value 0 or 1 and text #VALUE!, even when referenced."""
    v = evaluate(node, context)
    return to_number(v[0, 0] if type(v) is np.ndarray else v)


@builtin("IRR", 1, 2, lazy=True)
def irr(context: Context, values: Node, guess: Node | None = None) -> float | CellError:
    """The internal rate of return of flows at periods 0, 1, 2, ...: Excel's secant iteration
    from ``guess`` (0.1), else Newton's method, else the root above -1 nearest the guess; a guess
    of -1 or below is #VALUE!.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=IRR({-70000,12000,15000,18000,21000,26000})"), 6), round(compute("=IRR({-70,12,15})"), 6)
    (0.086631, -0.443507)
    """
    flows = _flows(context, (values,))
    g = 0.1 if guess is None or evaluate(guess, context) is None else _single_number(context, guess)
    for x in (flows, g):
        if type(x) is CellError:
            return x
    if g <= -1.0:
        return CellError(VALUE, "IRR's guess must be above -1")
    if not (any(v > 0 for v in flows) and any(v < 0 for v in flows)):
        return CellError(NUM, "IRR needs a positive and a negative flow")
    secant = _discount_secant(flows, g)
    if secant is not None:
        return secant
    f = lambda r: _npv(r, flows, 0)  # noqa: E731
    found = _newton(f, g, "IRR")
    if type(found) is CellError:
        root = _bracketed_root(f, g)
        return found if root is None else root
    return found


def _discounted(flows: list[float], x: float) -> float:
    total, factor = 0.0, 1.0
    for v in flows:
        total += v * factor
        factor *= x
    return total


# Excel's IRR: "accurate within 0.00001 percent" (Microsoft's IRR page), the step in the discount
# factor below which it stops; the first step and the steps allowed are read off Excel's stored
# IRR values, which this iteration reproduces to the last bit (tests/test_excel_irr.py).
_SECANT_FIRST_STEP = 1e-3
_SECANT_TOLERANCE = 1e-7
_SECANT_STEPS = 50


def _discount_secant(flows: list[float], guess: float) -> float | None:
    """The secant method on the flows' value as a polynomial in the discount factor
    x = 1/(1 + rate), from x(guess) and x(guess) - 0.001, stopping at the first step below 1e-7
    in x: the last digits of Excel's IRR are those of this early stop. None where it fails
    (no convergence, a flat secant, a factor of 0 or below, i.e. a rate of -1 or below)."""
    a = 1.0 / (1.0 + guess)
    b = a - _SECANT_FIRST_STEP
    fa, fb = _discounted(flows, a), _discounted(flows, b)
    for _ in range(_SECANT_STEPS):
        if fa == fb or not (math.isfinite(fa) and math.isfinite(fb)):
            return None
        a, fa, b = b, fb, b - fb * (b - a) / (fb - fa)
        if not math.isfinite(b) or b <= 0.0:
            return None
        try:
            fb = _discounted(flows, b)
        except OverflowError:
            return None
        if abs(b - a) < _SECANT_TOLERANCE:
            return 1.0 / b - 1.0
    return None


# Rates where IRR looks for a change of sign when Newton's method fails: dense near -1, where
# the flows' present values grow without bound, and spread out above 1.
_IRR_GRID = sorted({-1.0 + 2.0 ** -k for k in range(1, 41)} | {i / 100.0 for i in range(-49, 101)}
                   | {2.0 ** k for k in range(1, 21)})


def _bracketed_root(f: Callable[[float], float], guess: float) -> float | None:
    """The root above -1 nearest ``guess`` between two grid rates where ``f`` changes sign,
    halved down to the last bit (None if ``f`` changes sign nowhere)."""
    points = []
    for r in _IRR_GRID:
        try:
            y = f(r)
        except (OverflowError, ZeroDivisionError):
            continue
        if math.isfinite(y):
            points.append((r, y))
    brackets = [(a, b) for (a, fa), (b, fb) in zip(points, points[1:]) if (fa < 0.0) != (fb < 0.0)]
    if not brackets:
        return None
    lo, hi = min(brackets, key=lambda ab: abs((ab[0] + ab[1]) / 2.0 - guess))
    negative_at_lo = f(lo) < 0.0
    while True:
        mid = (lo + hi) / 2.0
        if mid in (lo, hi):
            return mid
        if (f(mid) < 0.0) == negative_at_lo:
            lo = mid
        else:
            hi = mid


@builtin("MIRR", 3, lazy=True)
def mirr(context: Context, values: Node, finance: Node, reinvest: Node) -> float | CellError:
    """Modified internal rate of return: the rate that grows the present value of the outflows
    (financed at ``finance``) into the value of the inflows at the end (reinvested at
    ``reinvest``). No inflows give -1; no outflows #DIV/0!; a negative ratio #NUM!.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=MIRR({-120000,39000,30000,21000,37000,46000}, 0.1, 0.12)"), 6), compute("=MIRR({-5,-3}, 0.1, 0.2)")
    (0.126094, -1.0)
    """
    flows = _flows(context, (values,))
    fr, rr = _single_number(context, finance), _single_number(context, reinvest)
    for x in (flows, fr, rr):
        if type(x) is CellError:
            return x
    n = len(flows)
    if n < 2:
        return CellError(DIV0, "MIRR needs two flows or more")
    try:
        # The first flow is not discounted: a finance rate of -1 only fails on later outflows.
        outflows = math.fsum(v / (1.0 + fr) ** i for i, v in enumerate(flows) if v < 0)
        inflows = math.fsum(v * (1.0 + rr) ** (n - 1 - i) for i, v in enumerate(flows) if v > 0)
    except ZeroDivisionError:
        return CellError(DIV0, "MIRR: an outflow discounted at a finance rate of -1")
    except OverflowError:
        return CellError(NUM, "MIRR: the result is too large")
    if outflows == 0.0:
        return CellError(DIV0, "MIRR needs a negative flow")
    ratio = -inflows / outflows
    if ratio < 0.0 or not math.isfinite(ratio):
        return CellError(NUM, "MIRR: the flows' values at the two rates give no real rate")
    return ratio ** (1.0 / (n - 1)) - 1.0


def _rates(fn: Callable[..., float | CellError]) -> Callable[..., Value]:
    """EFFECT's and NOMINAL's arguments: numbers, where TRUE or FALSE is #VALUE! (Excel's
    stored values; Microsoft: "if either argument is nonnumeric", #VALUE!)."""
    scalar = numeric(fn)

    def checked(*args: Scalar) -> Value:
        if any(type(a) is bool for a in args):
            return CellError(VALUE, "a rate or a number of periods is a logical value")
        return scalar(*args)

    checked.__doc__ = fn.__doc__
    return elementwise(checked)


@builtin("EFFECT", 2)
@_rates
def effect(nominal: float, periods: float) -> float | CellError:
    """The effective annual rate of a nominal rate compounded ``periods`` times a year.

    >>> round(effect(0.0525, 4.0), 8)
    0.05354267
    """
    p = int(periods)
    if nominal <= 0.0 or p < 1:
        return CellError(NUM, "EFFECT needs a positive rate and at least one period")
    return (1.0 + nominal / p) ** p - 1.0


@builtin("NOMINAL", 2)
@_rates
def nominal(effective: float, periods: float) -> float | CellError:
    """The nominal annual rate of an effective rate.

    >>> round(nominal(0.053543, 4.0), 8)
    0.05250032
    """
    p = int(periods)
    if effective <= 0.0 or p < 1:
        return CellError(NUM, "NOMINAL needs a positive rate and at least one period")
    return p * ((1.0 + effective) ** (1.0 / p) - 1.0)


@builtin("SLN", 3)
@numeric
def sln(cost: float, salvage: float, life: float) -> float | CellError:
    """Straight-line depreciation per period.

    >>> sln(30000.0, 7500.0, 10.0)
    2250.0
    """
    return (cost - salvage) / life if life != 0.0 else CellError(DIV0, "SLN over a life of 0")


@builtin("SYD", 4)
@numeric
def syd(cost: float, salvage: float, life: float, per: float) -> float | CellError:
    """Sum-of-years'-digits depreciation of period ``per``.

    >>> syd(30000.0, 7500.0, 10.0, 1.0)
    4090.909090909091
    """
    if life <= 0.0 or not 0.0 < per <= life:
        return CellError(NUM, "SYD needs 0 < period <= life")
    return (cost - salvage) * (life - per + 1.0) * 2.0 / (life * (life + 1.0))


@builtin("DDB", 4, 5)
@numeric
def ddb(cost: float, salvage: float, life: float, period: float, factor: float = 2.0) -> float | CellError:
    """Declining-balance depreciation (default double) of ``period``, never below ``salvage``.

    >>> round(ddb(2400.0, 300.0, 10.0 * 365, 1.0), 2), ddb(2400.0, 300.0, 10.0, 1.0)
    (1.32, 480.0)
    """
    if cost < 0.0 or salvage < 0.0 or life <= 0.0 or period <= 0.0 or factor <= 0.0 or period > life:
        return CellError(NUM, "DDB needs positive arguments and period <= life")
    before = cost * (1.0 - min(factor / life, 1.0)) ** (period - 1.0)  # the book value at the period's start
    return min(before * min(factor / life, 1.0), max(before - salvage, 0.0))


@builtin("DB", 4, 5)
@numeric
def db(cost: float, salvage: float, life: float, period: float, month: float = 12.0) -> float | CellError:
    """Fixed-declining-balance depreciation (the rate rounded to three decimals) of ``period``;
    ``month`` is the number of whole months in the first year (Excel drops a fraction).

    >>> round(db(1000000.0, 100000.0, 6.0, 1.0, 7.0), 2), round(db(1000000.0, 100000.0, 6.0, 7.0, 7.0), 2)
    (186083.33, 15845.1)
    >>> round(db(100.0, 10.0, 4.0, 3.0, 9.2222), 7)
    16.5293754
    """
    month = float(math.trunc(month))
    if cost < 0.0 or salvage < 0.0 or life <= 0.0 or period <= 0.0 or not 1.0 <= month <= 12.0:
        return CellError(NUM, "DB needs positive arguments and 1 to 12 months")
    if period > life + 1.0 or (period > life and month == 12.0):
        return CellError(NUM, "DB's period is beyond the life")
    if period > 100_000:
        return CellError(NUM, "DB beyond 100000 periods is not supported")
    if cost == 0.0:
        return 0.0
    r = round(1.0 - (salvage / cost) ** (1.0 / life), 3)
    total = cost * r * month / 12.0
    if int(period) == 1:
        return total
    dep = total
    for p in range(2, int(period) + 1):
        dep = (cost - total) * r * ((12.0 - month) / 12.0 if p == int(life) + 1 else 1.0)
        total += dep
    return dep
