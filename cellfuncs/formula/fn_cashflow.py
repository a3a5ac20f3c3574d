"""Built-in financial functions of dated cash flows, loan totals, depreciation and quotes:
XNPV, XIRR, CUMIPMT, CUMPRINC, VDB, PDURATION, RRI, ISPMT, FVSCHEDULE, DOLLARDE, DOLLARFR.

Conventions as in :mod:`.fn_finance` (money paid out is negative; ``type`` 1 means payments
at the start of each period). XNPV and XIRR discount each flow by its date's distance in
days from the first flow over a 365-day year.

>>> from cellfuncs.formula import compute
>>> round(compute("=CUMIPMT(0.09/12, 30*12, 125000, 13, 24, 0)"), 4), compute("=DOLLARDE(1.02, 16)")
(-11135.2321, 1.125)
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import DIV0, NUM, VALUE, CellError
from .arrays import numeric
from .coerce import to_number
from .evaluate import Context, builtin, collect, evaluate
from .fn_finance import _bracketed_root, _flows, _newton, ipmt, ppmt
from .fn_securities import numbers
from .nodes import Node


# --- dated cash flows ----------------------------------------------------------------------

def _dated(context: Context, values: Node, dates: Node, blank: float | CellError,
           other: CellError) -> tuple[list[float], list[int]] | CellError:
    """Flows and their whole-day dates, as many of each, no date before the first. A blank
    flow is ``blank``, text or a logical value among the flows ``other``."""
    flows, days = _cells(context, values, blank, other), _flows(context, (dates,))
    for x in (flows, days):
        if type(x) is CellError:
            return x
    if len(flows) != len(days) or not flows:
        return CellError(NUM, "the values and the dates differ in number")
    whole = [int(d) for d in days]
    if any(d < 0 for d in whole) or any(d < whole[0] for d in whole):
        return CellError(NUM, "a date is before the first date")
    return flows, whole


def _cells(context: Context, node: Node, blank: float | CellError, other: CellError) -> list[float] | CellError:
    """Every element of the flows, none skipped (their dates pair with them by position)."""
    v = evaluate(node, context)
    out = []
    for x in (v.flat if type(v) is np.ndarray else (v,)):
        y = x if type(x) in (float, CellError) else blank if x is None else other
        if type(y) is CellError:
            return y
        out.append(y)
    return out


def _xnpv(r: float, flows: list[float], days: list[int]) -> float:
    return math.fsum(v / (1.0 + r) ** ((d - days[0]) / 365.0) for v, d in zip(flows, days))


@builtin("XNPV", 3, lazy=True)
def xnpv(context: Context, rate: Node, values: Node, dates: Node) -> float | CellError:
    """Net present value of flows on given dates: each discounted by (1 + rate) to the power
    of its days after the first date over 365; a negative rate, a blank or text among the
    flows is #NUM!.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=XNPV(0.09, {-10000,2750,4250,3250,2750}, {39448,39508,39751,39859,39904})"), 2)
    2086.65
    """
    r = to_number(evaluate(rate, context))
    not_number = CellError(NUM, "XNPV's values must be numbers")
    found = _dated(context, values, dates, not_number, not_number)
    for x in (r, found):
        if type(x) is CellError:
            return x
    if r < 0.0:  # Excel's stored values: #NUM! at -0.3 and -0.4
        return CellError(NUM, "XNPV at a negative rate")
    return _xnpv(r, *found)


@builtin("XIRR", 2, 3, lazy=True)
def xirr(context: Context, values: Node, dates: Node, guess: Node | None = None) -> float | CellError:
    """The internal rate of return of flows on given dates: the rate at which XNPV is 0
    (Newton's method from ``guess``, else the root above -1 nearest it); a blank flow is 0,
    text or a logical value among the flows #VALUE!.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=XIRR({-10000,2750,4250,3250,2750}, {39448,39508,39751,39859,39904}, 0.1)"), 6)
    0.373363
    """
    found = _dated(context, values, dates, 0.0, CellError(VALUE, "XIRR's values must be numbers"))
    g = 0.1 if guess is None else to_number(evaluate(guess, context))
    for x in (found, g):
        if type(x) is CellError:
            return x
    flows, days = found
    if not (any(v > 0 for v in flows) and any(v < 0 for v in flows)):
        return CellError(NUM, "XIRR needs a positive and a negative flow")
    f = lambda r: _xnpv(r, flows, days)  # noqa: E731
    found = _newton(f, g, "XIRR")
    if type(found) is CellError:
        root = _bracketed_root(f, g)
        return found if root is None else root
    return found


# --- loan totals ---------------------------------------------------------------------------

def _cumulative(part, rate: float, nper: float, pv: float, start: float, end: float,
                type_: float) -> float | CellError:
    """The sum of ``part`` (IPMT or PPMT) over the whole payments from ``start`` to ``end``
    (a fractional start rounds up, a fractional end down, as in Excel)."""
    if rate <= 0.0 or nper <= 0.0 or pv <= 0.0:
        return CellError(NUM, "needs a positive rate, number of periods and present value")
    if not 1.0 <= start <= end <= nper or type_ not in (0.0, 1.0):
        return CellError(NUM, "needs 1 <= start <= end <= periods and type 0 or 1")
    total = 0.0
    for per in range(math.ceil(start), math.floor(end) + 1):
        x = part(rate, float(per), nper, pv, 0.0, type_)
        if type(x) is CellError:
            return x
        total += x
    return total


@builtin("CUMIPMT", 6)
@numbers
def cumipmt(rate: float, nper: float, pv: float, start: float, end: float, type_: float) -> float | CellError:
    """The interest paid on a loan from payment ``start`` to ``end``.

    >>> round(cumipmt(0.09 / 12, 360.0, 125000.0, 1.0, 1.0, 0.0), 2)
    -937.5
    """
    return _cumulative(ipmt, rate, nper, pv, start, end, type_)


@builtin("CUMPRINC", 6)
@numbers
def cumprinc(rate: float, nper: float, pv: float, start: float, end: float, type_: float) -> float | CellError:
    """The principal repaid on a loan from payment ``start`` to ``end``.

    >>> round(cumprinc(0.09 / 12, 360.0, 125000.0, 13.0, 24.0, 0.0), 4)
    -934.1071
    """
    return _cumulative(ppmt, rate, nper, pv, start, end, type_)


@builtin("ISPMT", 4)
@numeric
def ispmt(rate: float, per: float, nper: float, pv: float) -> float | CellError:
    """The interest of period ``per`` of a loan repaid in even principal payments.

    >>> round(ispmt(0.1 / 12, 1.0, 36.0, 8000000.0), 2)
    -64814.81
    """
    if nper == 0.0:
        return CellError(DIV0, "ISPMT over 0 periods")
    return pv * rate * (per / nper - 1.0)


# --- depreciation --------------------------------------------------------------------------

def _declining(cost: float, salvage: float, life: float, factor: float, no_switch: bool,
               offset: float) -> list[tuple[float, float, float]]:
    """Each period's (first, last, depreciation per unit of time): declining balance at
    factor/life (pro rata in a partial period), never below salvage, switching to straight
    line over the rest of the life once that is larger. The periods start at ``offset`` (a
    partial first period before it), so a fractional start period is a period boundary, as
    Excel's stored values show: VDB(1, 0, 14, 3.5, 4.5, 1.25) is the straight line from 3.5."""
    edges = [0.0] + [offset + k for k in range(0 if offset > 0.0 else 1, math.ceil(life - offset))] + [life]
    out, book, straight = [], cost, None
    for first, last in zip(edges, edges[1:]):
        length = last - first
        if straight is None:
            d = min(book * min(factor / life, 1.0) * length, max(book - salvage, 0.0)) / length
            sl = (book - salvage) / (life - first)
            if not no_switch and sl > d:
                straight = sl
        out.append((first, last, d if straight is None else straight))
        book -= out[-1][2] * length
    return out


@builtin("VDB", 5, 7)
@numeric
def vdb(cost: float, salvage: float, life: float, start: float, end: float, factor: float = 2.0,
        no_switch: float = 0.0) -> float | CellError:
    """Declining-balance depreciation from ``start`` to ``end`` (parts of periods pro rata),
    switching to straight line when that is larger unless ``no_switch``; a fractional start
    begins a period.

    >>> round(vdb(2400.0, 300.0, 10.0 * 365, 0.0, 1.0), 2), round(vdb(2400.0, 300.0, 10.0, 0.0, 0.875, 1.5), 2)
    (1.32, 315.0)
    """
    if cost < 0.0 or salvage < 0.0 or life <= 0.0 or factor <= 0.0 or not 0.0 <= start <= end <= life:
        return CellError(NUM, "VDB needs positive arguments and 0 <= start <= end <= life")
    if life > 100_000:
        return CellError(NUM, "VDB beyond 100000 periods is not supported")
    periods = _declining(cost, salvage, life, factor, bool(no_switch), start - math.floor(start))
    return math.fsum(d * max(0.0, min(end, last) - max(start, first)) for first, last, d in periods)


# --- growth --------------------------------------------------------------------------------

@builtin("PDURATION", 3)
@numeric
def pduration(rate: float, pv: float, fv: float) -> float | CellError:
    """The periods an investment takes to grow from ``pv`` to ``fv`` at ``rate`` per period.

    >>> round(pduration(0.025, 2000.0, 2200.0), 6)
    3.859866
    """
    if rate <= 0.0 or pv <= 0.0 or fv <= 0.0:
        return CellError(NUM, "PDURATION needs positive arguments")
    return (math.log(fv) - math.log(pv)) / math.log1p(rate)


@builtin("RRI", 3)
@numeric
def rri(nper: float, pv: float, fv: float) -> float | CellError:
    """The rate per period that grows ``pv`` to ``fv`` in ``nper`` periods.

    >>> round(rri(96.0, 10000.0, 11000.0), 7)
    0.0009933
    """
    if nper <= 0.0 or pv == 0.0:
        return CellError(NUM, "RRI needs positive periods and a present value")
    return (fv / pv) ** (1.0 / nper) - 1.0


@builtin("FVSCHEDULE", 2, lazy=True)
def fvschedule(context: Context, principal: Node, schedule: Node) -> float | CellError:
    """The future value of ``principal`` compounded at each rate of ``schedule`` in turn.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=FVSCHEDULE(1, {0.09,0.11,0.1})"), 5)
    1.33089
    """
    p = to_number(evaluate(principal, context))
    rates = collect(context, (schedule,), to_number, _rate_of)
    for x in (p, rates):
        if type(x) is CellError:
            return x
    return p * math.prod(1.0 + r for r in rates)


def _rate_of(x: object) -> float | CellError:
    """A schedule's element: a blank is 0, text or a logical value #VALUE!."""
    if x is None:
        return 0.0
    if type(x) is float:
        return x
    return CellError(VALUE, "FVSCHEDULE's rates must be numbers")


# --- fractional quotes ---------------------------------------------------------------------

def _quote(dollar: float, fraction: float, to_decimal: bool) -> float | CellError:
    f = float(int(fraction))
    if f < 0.0:
        return CellError(NUM, "the fraction's denominator is negative")
    if f == 0.0:
        return CellError(DIV0, "the fraction's denominator is 0")
    whole = math.trunc(dollar)
    scale = 10.0 ** math.ceil(math.log10(f))
    part = dollar - whole
    return whole + (part * scale / f if to_decimal else part * f / scale)


@builtin("DOLLARDE", 2)
@numbers
def dollarde(dollar: float, fraction: float) -> float | CellError:
    """A price quoted in fractions (1.02 with ``fraction`` 16: 1 and 2/16) as a decimal.

    >>> round(dollarde(1.02, 16.0), 10), round(dollarde(1.1, 32.0), 10)
    (1.125, 1.3125)
    """
    return _quote(dollar, fraction, True)


@builtin("DOLLARFR", 2)
@numbers
def dollarfr(dollar: float, fraction: float) -> float | CellError:
    """A decimal price as a quote in fractions of ``fraction`` (1.125 with 16: 1.02).

    >>> round(dollarfr(1.125, 16.0), 10), round(dollarfr(1.125, 32.0), 10)
    (1.02, 1.04)
    """
    return _quote(dollar, fraction, False)

