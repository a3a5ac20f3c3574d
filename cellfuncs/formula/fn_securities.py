"""Built-in functions of securities and day counts: DAYS360, YEARFRAC, the coupon functions
(COUPPCD, COUPNCD, COUPNUM, COUPDAYBS, COUPDAYS, COUPDAYSNC), ACCRINT, ACCRINTM, PRICE, YIELD,
DURATION, MDURATION, the odd-period bonds (ODDFPRICE, ODDFYIELD, ODDLPRICE, ODDLYIELD), the
Treasury bills (TBILLPRICE, TBILLYIELD, TBILLEQ) and the discounted securities (DISC, INTRATE,
RECEIVED, PRICEDISC, YIELDDISC, PRICEMAT, YIELDMAT).

Dates are serial numbers truncated to whole days. ``basis`` is Excel's day-count basis:
0 (default) US 30/360, 1 actual/actual, 2 actual/360, 3 actual/365, 4 European 30/360; one
day count (:func:`day_count`) serves every function. Coupons fall every ``12/frequency``
months back from maturity (frequency 1, 2 or 4), on maturity's day of the month, or on
month ends when maturity is a month's last day. A bad basis or frequency, or a settlement
not before maturity, is #NUM!.

>>> from cellfuncs.formula import compute
>>> compute("=DAYS360(DATE(2011,1,30), DATE(2011,12,31))"), compute("=COUPNUM(DATE(2011,1,25), DATE(2011,11,15), 2, 1)")
(330.0, 2.0)
"""

from __future__ import annotations

import calendar
import functools
import math
from typing import Callable, NamedTuple

from ..errors import NUM, VALUE, CellError
from .arrays import elementwise, numeric
from .coerce import to_bool
from .dates import LAST_SERIAL, serial, ymd
from .evaluate import builtin
from .fn_finance import _newton
from .nodes import Scalar


# --- arguments -----------------------------------------------------------------------------

_LOGICAL = CellError(VALUE, "this function's arguments cannot be TRUE or FALSE")


def numbers(fn: Callable[..., float | CellError]) -> Callable[..., object]:
    """:func:`numeric` for the functions that refuse TRUE and FALSE (#VALUE!) where others
    read them as 1 and 0: the securities, EOMONTH and the error functions (Excel's stored
    values)."""
    scalar = numeric(fn)

    @functools.wraps(fn)
    def checked(*args: Scalar) -> Scalar:
        return _LOGICAL if any(type(a) is bool for a in args) else scalar(*args)

    return elementwise(checked)


def _date(x: float) -> int | CellError:
    """A date argument as a whole serial (Excel drops the time of day)."""
    if not 0.0 <= x < LAST_SERIAL + 1:
        return CellError(NUM, f"{x:g} is not a date serial number")
    return int(x)


def _basis(x: float) -> int | CellError:
    b = int(x)
    return b if 0 <= b <= 4 else CellError(NUM, f"basis {x:g} is not 0 to 4")


def _frequency(x: float) -> int | CellError:
    f = int(x)
    return f if f in (1, 2, 4) else CellError(NUM, f"frequency {x:g} is not 1, 2 or 4")


def _first_error(*values: object) -> CellError | None:
    for v in values:
        if type(v) is CellError:
            return v
    return None


class _Bond(NamedTuple):
    settlement: int
    maturity: int
    frequency: int
    basis: int


def _bond(settlement: float, maturity: float, frequency: float, basis: float) -> _Bond | CellError:
    """The arguments every coupon function shares, checked as Excel checks them."""
    args = _date(settlement), _date(maturity), _frequency(frequency), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    if args[0] >= args[1]:
        return CellError(NUM, "the settlement is not before maturity")
    return _Bond(*args)


def _span(start: float, end: float, basis: float) -> tuple[int, int, int] | CellError:
    """Two dates (start before end) and a basis, checked."""
    args = _date(start), _date(end), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    if args[0] >= args[1]:
        return CellError(NUM, "the settlement is not before maturity")
    return args


# --- day counts ----------------------------------------------------------------------------

def _month_end(y: int, m: int, d: int) -> bool:
    return d == calendar.monthrange(y, m)[1]


def days_360(start: int, end: int, european: bool = False, nasd: bool = True, end_30: bool = False) -> int:
    """30/360 days from ``start`` to ``end`` (start <= end).

    European: days 31 count as 30. US: a start on a month's last day counts as the 30th,
    an end on the 31st as the 30th when the start is (then) the 30th. ``nasd`` (the bases of
    YEARFRAC and the coupon functions) also moves an end on February's last day to the 30th
    when the start is too; ``end_30`` reads every end on the 31st as the 30th.

    >>> days_360(serial(2024, 2, 29), serial(2025, 2, 28)), days_360(serial(2024, 2, 29), serial(2025, 2, 28), nasd=False)
    (360, 358)
    """
    y1, m1, d1 = ymd(start)
    y2, m2, d2 = ymd(end)
    if european:
        d1, d2 = min(d1, 30), min(d2, 30)
    else:
        start_end = _month_end(y1, m1, d1)
        if nasd and start_end and m1 == 2 and m2 == 2 and _month_end(y2, m2, d2):
            d2 = 30
        if start_end:
            d1 = 30
        if d2 == 31 and (d1 >= 30 or end_30):
            d2 = 30
    return (y2 - y1) * 360 + (m2 - m1) * 30 + d2 - d1


def day_count(start: int, end: int, basis: int, end_30: bool = False) -> int:
    """Days from ``start`` to ``end`` under ``basis`` (negative when end is earlier).

    >>> day_count(serial(2024, 1, 31), serial(2024, 3, 1), 0), day_count(serial(2024, 3, 1), serial(2024, 1, 31), 1)
    (31, -30)
    """
    if start > end:
        return -day_count(end, start, basis, end_30)
    if basis == 0:
        return days_360(start, end, end_30=end_30)
    if basis == 4:
        return days_360(start, end, european=True)
    return end - start


def _year_length(start: int, end: int) -> float:
    """Actual/actual's year: 365 or 366 within a year (366 when a 29 February is inside),
    else the average length of the calendar years spanned."""
    (y1, m1, d1), (y2, m2, d2) = ymd(start), ymd(end)
    if y1 == y2 or (y2 == y1 + 1 and (m1, d1) >= (m2, d2)):
        if y1 == y2:
            return 366.0 if calendar.isleap(y1) else 365.0
        leap_days = [serial(y, 2, 29) for y in (y1, y2) if calendar.isleap(y)]
        return 366.0 if any(start <= x <= end for x in leap_days) else 365.0
    return (serial(y2 + 1, 1, 1) - serial(y1, 1, 1)) / (y2 - y1 + 1)


def year_fraction(start: int, end: int, basis: int) -> float:
    """The years from ``start`` to ``end`` (start <= end) under ``basis``, as YEARFRAC.

    >>> year_fraction(serial(2012, 1, 1), serial(2012, 7, 30), 0)
    0.5805555555555556
    """
    if basis == 1:
        return (end - start) / _year_length(start, end)
    return day_count(start, end, basis) / (365.0 if basis == 3 else 360.0)


@builtin("DAYS360", 2, 3)
@elementwise
def days360(start: Scalar, end: Scalar, method: Scalar = None) -> float | CellError:
    """Days between two dates in a year of twelve 30-day months: the US method (default),
    or the European one when ``method`` is TRUE.

    >>> from cellfuncs.formula import compute
    >>> compute("=DAYS360(DATE(2024,2,29), DATE(2025,2,28))"), compute("=DAYS360(DATE(2011,1,30), DATE(2011,12,31), TRUE)")
    (358.0, 330.0)
    """
    european = to_bool(method)
    if type(european) is CellError:
        return european
    return _days360(start, end, 1.0 if european else 0.0)


@numeric
def _days360(start: float, end: float, european: float) -> float | CellError:
    # DAYS360 reads a date to the nearest second, so 23:59:59.9 is the next day
    a, b = _date(start + 0.5 / 86400.0), _date(end + 0.5 / 86400.0)
    err = _first_error(a, b)
    if err is not None:
        return err
    lo, hi = min(a, b), max(a, b)
    n = days_360(lo, hi, european=bool(european), nasd=False)
    return float(n if a <= b else -n)


@builtin("YEARFRAC", 2, 3)
@numeric
def yearfrac(start: float, end: float, basis: float = 0.0) -> float | CellError:
    """The fraction of a year between two dates (in either order) under ``basis``.

    >>> yearfrac(40909.0, 41120.0, 0.0), round(yearfrac(40909.0, 41120.0, 1.0), 9)
    (0.5805555555555556, 0.576502732)
    """
    args = _date(start), _date(end), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    a, b, basis_ = args
    return year_fraction(min(a, b), max(a, b), basis_)


# --- coupon schedules ----------------------------------------------------------------------

class Schedule(NamedTuple):
    """Coupon dates every ``step`` months back from ``anchor`` (date 0), on month ends when
    ``anchor`` is a month's last day."""

    anchor: int
    step: int

    @classmethod
    def every(cls, anchor: int, frequency: int) -> Schedule:
        return cls(anchor, 12 // frequency)

    def date(self, k: int) -> int:
        """The coupon date ``k`` periods before the anchor (after it when k < 0)."""
        y, m, d = ymd(self.anchor)
        months = y * 12 + m - 1 - k * self.step
        y2, m2 = divmod(months, 12)
        last = calendar.monthrange(y2, m2 + 1)[1]
        return serial(y2, m2 + 1, last if _month_end(y, m, d) else min(d, last))

    def index(self, x: int, strict: bool = False) -> int:
        """The smallest k whose date is on or before ``x`` (before it if ``strict``)."""
        (ya, ma, _), (yx, mx, _) = ymd(self.anchor), ymd(x)
        k = max(((ya - yx) * 12 + ma - mx) // self.step, -1)
        while not self._before(self.date(k), x, strict):
            k += 1
        while self._before(self.date(k - 1), x, strict):
            k -= 1
        return k

    @staticmethod
    def _before(date: int, x: int, strict: bool) -> bool:
        return date < x if strict else date <= x


def period_days(start: int, end: int, basis: int, frequency: int) -> float:
    """The normal length in days of the coupon period from ``start`` to ``end``."""
    if basis == 1:
        return float(end - start)
    return (365.0 if basis == 3 else 360.0) / frequency


class _Coupon(NamedTuple):
    previous: int
    next: int
    count: int  # coupons from next to maturity, both included
    accrued: int  # days from previous to settlement
    days: float  # the period's normal length
    remaining: int  # days from settlement to next

    def lead(self) -> float:
        """The fraction of a period to the next coupon, as the prices count it: the period
        less the days accrued (COUPDAYSNC may count otherwise)."""
        return 1.0 - self.accrued / self.days


def _coupon(bond: _Bond) -> _Coupon:
    schedule = Schedule.every(bond.maturity, bond.frequency)
    k = schedule.index(bond.settlement)
    pcd, ncd = schedule.date(k), schedule.date(k - 1)
    e = period_days(pcd, ncd, bond.basis, bond.frequency)
    accrued = day_count(pcd, bond.settlement, bond.basis)
    remaining = day_count(bond.settlement, ncd, bond.basis) if bond.basis in (1, 2, 3) else e - accrued
    return _Coupon(pcd, ncd, k, accrued, e, remaining)


def _coupon_function(name: str, part: Callable[[_Coupon], float], rule: str) -> None:
    def fn(settlement: float, maturity: float, frequency: float, basis: float = 0.0) -> float | CellError:
        bond = _bond(settlement, maturity, frequency, basis)
        return bond if type(bond) is CellError else float(part(_coupon(bond)))

    fn.__name__ = fn.__qualname__ = name.lower()
    fn.__doc__ = f"{name}(settlement, maturity, frequency, [basis]): {rule}"
    builtin(name, 3, 4)(numbers(fn))


_coupon_function("COUPPCD", lambda c: c.previous, "the coupon date on or before settlement.")
_coupon_function("COUPNCD", lambda c: c.next, "the first coupon date after settlement.")
_coupon_function("COUPNUM", lambda c: c.count, "the number of coupons from settlement to maturity.")
_coupon_function("COUPDAYBS", lambda c: c.accrued, "days from the previous coupon to settlement.")
_coupon_function("COUPDAYS", lambda c: c.days, "days in the coupon period of settlement.")
_coupon_function("COUPDAYSNC", lambda c: c.remaining, "days from settlement to the next coupon.")


# --- accrued interest ----------------------------------------------------------------------

class _Odd(NamedTuple):
    """An odd first coupon period: coupons every ``schedule.step`` months up to ``first``."""

    schedule: Schedule
    basis: int
    frequency: int

    def length(self, k: int) -> float:
        """Normal length of the quasi-coupon period ending at date ``k``."""
        return period_days(self.schedule.date(k + 1), self.schedule.date(k), self.basis, self.frequency)

    def after(self, x: int, end_30: bool = False) -> float:
        """Coupon periods still to run from ``x`` to the first coupon, measured from the
        start of the last period (so a date before it adds its actual days)."""
        last = self.schedule.date(1)
        return 1.0 + day_count(x, last, self.basis, end_30) / self.length(0)

    def issue_after(self, issue: int) -> tuple[float, int]:
        """Periods from the issue to the first coupon (a partial one counted by its days),
        and the number of coupon dates from the issue on, the first excluded."""
        if issue >= self.schedule.date(1):
            return self.after(issue), 0
        k = self.schedule.index(issue)
        start, end = self.schedule.date(k), self.schedule.date(k - 1)
        if start == issue:
            return float(k), k
        return day_count(issue, end, self.basis) / self.length(k - 1) + (k - 1), k - 1

    def since(self, issue: int, settlement: int) -> float:
        """Periods from the issue to a settlement after the first coupon: whole periods
        count 1, the settlement's period its days, all over the last period's length."""
        k = self.schedule.index(issue)
        end_k = self.schedule.index(settlement, strict=True)
        total, start = 0.0, issue
        for j in range(k, end_k, -1):
            begin, end = self.schedule.date(j), self.schedule.date(j - 1)
            total += 1.0 if start == begin else day_count(start, end, self.basis) / self.length(0)
            start = end
        return total + day_count(start, settlement, self.basis) / self.length(0)


def accrued_periods(issue: int, first: int, settlement: int, frequency: int, basis: int, from_issue: bool) -> float:
    """Coupon periods of interest accrued by ``settlement``, as Excel's ACCRINT counts them.

    Before the first coupon: the periods from the issue to the first coupon less those
    still to run after settlement; with ``from_issue`` False all but one of the issue's
    whole periods are dropped. After it: the periods since the issue, or with
    ``from_issue`` False the days since the issue over the last period's length.
    """
    odd = _Odd(Schedule.every(first, frequency), basis, frequency)
    if settlement > first:
        if from_issue:
            return odd.since(issue, settlement)
        return day_count(issue, settlement, basis) / odd.length(0)
    periods, whole = odd.issue_after(issue)
    periods -= odd.after(settlement, end_30=True)
    return periods if from_issue else periods - max(0, whole - 1)


@builtin("ACCRINT", 6, 8)
@elementwise
def accrint(issue: Scalar, first: Scalar, settlement: Scalar, rate: Scalar, par: Scalar, frequency: Scalar,
            basis: Scalar = None, calc_method: Scalar = None) -> float | CellError:
    """Accrued interest of a security paying periodic interest: par x rate / frequency for
    each coupon period accrued, from the issue (``calc_method`` TRUE, the default) or from the
    first interest date.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=ACCRINT(DATE(2008,3,1), DATE(2008,8,31), DATE(2008,5,1), 0.1, 1000, 2, 0)"), 6)
    16.666667
    """
    from_issue = True if calc_method is None else to_bool(calc_method)
    if type(from_issue) is CellError:
        return from_issue
    return _accrint(issue, first, settlement, rate, par, frequency, basis, 1.0 if from_issue else 0.0)


@numbers
def _accrint(issue: float, first: float, settlement: float, rate: float, par: float, frequency: float,
             basis: float, from_issue: float) -> float | CellError:
    args = _date(issue), _date(first), _date(settlement), _frequency(frequency), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    i, fi, s, f, b = args
    if rate <= 0.0 or par <= 0.0:
        return CellError(NUM, "ACCRINT needs a positive rate and par")
    if i >= s:
        return CellError(NUM, "the issue is not before settlement")
    return par * rate / f * accrued_periods(i, fi, s, f, b, bool(from_issue))


@builtin("ACCRINTM", 4, 5)
@numbers
def accrintm(issue: float, settlement: float, rate: float, par: float, basis: float = 0.0) -> float | CellError:
    """Accrued interest of a security paying at maturity: par x rate x the years from issue
    to settlement.

    >>> round(accrintm(39539.0, 39614.0, 0.1, 1000.0, 3.0), 6)
    20.547945
    """
    span = _span(issue, settlement, basis)
    if type(span) is CellError:
        return span
    if rate <= 0.0 or par <= 0.0:
        return CellError(NUM, "ACCRINTM needs a positive rate and par")
    return par * rate * year_fraction(*span)


# --- coupon bonds --------------------------------------------------------------------------

def _discounted(c: _Coupon, coupon: float, redemption: float, y: float, frequency: int) -> float:
    """The price of the remaining flows: each coupon and the redemption discounted from its
    date, less the interest accrued since the previous coupon."""
    first = c.lead()
    if c.count == 1:
        return (redemption + coupon) / (1.0 + first * y / frequency) - coupon * c.accrued / c.days
    v = 1.0 + y / frequency
    flows = math.fsum(coupon / v ** (k + first) for k in range(c.count))
    return redemption / v ** (c.count - 1 + first) + flows - coupon * c.accrued / c.days


def _bond_price(bond: _Bond, rate: float, y: float, redemption: float) -> float:
    return _discounted(_coupon(bond), 100.0 * rate / bond.frequency, redemption, y, bond.frequency)


@builtin("PRICE", 6, 7)
@numbers
def price(settlement: float, maturity: float, rate: float, yld: float, redemption: float, frequency: float,
          basis: float = 0.0) -> float | CellError:
    """The price per 100 face value of a bond paying periodic interest, at yield ``yld``.

    >>> round(price(39493.0, 43054.0, 0.0575, 0.065, 100.0, 2.0, 0.0), 6)
    94.634362
    """
    bond = _bond(settlement, maturity, frequency, basis)
    if type(bond) is CellError:
        return bond
    if rate < 0.0 or yld < 0.0 or redemption <= 0.0:
        return CellError(NUM, "PRICE needs rate and yield >= 0 and a positive redemption")
    return _bond_price(bond, rate, yld, redemption)


@builtin("YIELD", 6, 7)
@numbers
def yield_(settlement: float, maturity: float, rate: float, pr: float, redemption: float, frequency: float,
           basis: float = 0.0) -> float | CellError:
    """The yield of a bond paying periodic interest bought at ``pr`` (the yield at which
    PRICE gives ``pr``; in the last coupon period, solved directly).

    >>> round(yield_(39493.0, 42689.0, 0.0575, 95.04287, 100.0, 2.0, 0.0), 6)
    0.065
    """
    bond = _bond(settlement, maturity, frequency, basis)
    if type(bond) is CellError:
        return bond
    if rate < 0.0 or pr <= 0.0 or redemption <= 0.0:
        return CellError(NUM, "YIELD needs rate >= 0 and a positive price and redemption")
    c = _coupon(bond)
    coupon = 100.0 * rate / bond.frequency
    if c.count == 1:
        paid = pr + coupon * c.accrued / c.days
        return (redemption + coupon - paid) / paid * bond.frequency / c.lead()
    return _newton(lambda y: _discounted(c, coupon, redemption, y, bond.frequency) - pr, 0.1, "YIELD")


def _duration(bond: _Bond, coupon: float, y: float) -> float:
    """Macaulay duration in years: the flows' times weighted by their present values."""
    c = _coupon(bond)
    v = 1.0 + y / bond.frequency
    times = [k + c.lead() for k in range(c.count)]
    flows = [100.0 * coupon / bond.frequency] * c.count
    flows[-1] += 100.0
    values = [cf / v ** t for cf, t in zip(flows, times)]
    return math.fsum(t * pv for t, pv in zip(times, values)) / math.fsum(values) / bond.frequency


def _duration_function(name: str, modified: bool) -> None:
    def fn(settlement: float, maturity: float, coupon: float, yld: float, frequency: float,
           basis: float = 0.0) -> float | CellError:
        bond = _bond(settlement, maturity, frequency, basis)
        if type(bond) is CellError:
            return bond
        if coupon < 0.0 or yld < 0.0:
            return CellError(NUM, f"{name} needs coupon and yield >= 0")
        d = _duration(bond, coupon, yld)
        return d / (1.0 + yld / bond.frequency) if modified else d

    fn.__name__ = fn.__qualname__ = name.lower()
    kind = "modified (divided by 1 + yield/frequency)" if modified else "Macaulay"
    fn.__doc__ = f"{name}(settlement, maturity, coupon, yld, frequency, [basis]): the {kind} duration in years."
    builtin(name, 5, 6)(numbers(fn))


_duration_function("DURATION", False)
_duration_function("MDURATION", True)


# --- odd first and last periods ------------------------------------------------------------

class _Piece(NamedTuple):
    """One quasi-coupon period of an odd period, in periods (days over its normal length):
    the days it counts, those accrued by settlement, those left after settlement."""

    counted: float
    accrued: float
    left: float


def _pieces(schedule: Schedule, ks: range, start: int, end: int, settlement: int, basis: int,
            frequency: int, actual: bool = False) -> list[_Piece]:
    """The odd period ``start`` to ``end`` cut into the quasi-coupon periods ending at the
    schedule's dates ``ks``. A whole quasi period counts as one period, whatever its days
    (actual/360 has more days in a half year than its normal 180). ``actual``: a quasi
    period's normal length is its actual days under every actual-day basis (1, 2 and 3), as
    Excel's stored ODDLPRICE values at bases 2 and 3 show."""
    out = []
    for k in ks:
        begin, finish = schedule.date(k + 1), schedule.date(k)
        lo, hi = max(begin, start), min(finish, end)
        if actual and basis in (1, 2, 3):
            length = float(finish - begin)
        else:
            length = period_days(begin, finish, basis, frequency)

        def periods(a: int, b: int) -> float:
            return 1.0 if (a, b) == (begin, finish) else day_count(a, b, basis) / length

        accrued = periods(lo, min(hi, settlement)) if settlement > lo else 0.0
        left = periods(max(lo, settlement), hi) if settlement < hi else 0.0
        out.append(_Piece(periods(lo, hi), accrued, left))
    return out


class _OddFirst(NamedTuple):
    settlement: int
    maturity: int
    issue: int
    first: int
    frequency: int
    basis: int

    def price(self, rate: float, y: float, redemption: float) -> float:
        """Microsoft's ODDFPRICE: the odd coupon (the days of its quasi periods) paid at the
        first coupon, the regular ones after it and the redemption, discounted from
        settlement, less the interest accrued."""
        f = self.frequency
        schedule = Schedule.every(self.first, f)
        k_issue, k_settle = schedule.index(self.issue), schedule.index(self.settlement)
        odd = _pieces(schedule, range(k_issue - 1, -1, -1), self.issue, self.first, self.settlement, self.basis, f)
        start, end = schedule.date(k_settle), schedule.date(k_settle - 1)
        length = period_days(start, end, self.basis, f)
        lead = (k_settle - 1) + day_count(self.settlement, end, self.basis) / length
        regular = Schedule.every(self.maturity, f).index(self.first)
        c = 100.0 * rate / f
        v = 1.0 + y / f
        coupons = math.fsum(c / v ** (k + lead) for k in range(1, regular + 1))
        odd_coupon = c * math.fsum(p.counted for p in odd) / v ** lead
        return redemption / v ** (regular + lead) + odd_coupon + coupons - c * math.fsum(p.accrued for p in odd)


def _odd_first(settlement: float, maturity: float, issue: float, first: float, frequency: float,
               basis: float) -> _OddFirst | CellError:
    args = _date(settlement), _date(maturity), _date(issue), _date(first), _frequency(frequency), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    s, m, i, fc = args[:4]
    if not i < s < fc < m:
        return CellError(NUM, "the dates are not issue < settlement < first coupon < maturity")
    return _OddFirst(*args)


@builtin("ODDFPRICE", 8, 9)
@numbers
def oddfprice(settlement: float, maturity: float, issue: float, first_coupon: float, rate: float, yld: float,
              redemption: float, frequency: float, basis: float = 0.0) -> float | CellError:
    """The price per 100 face value of a bond with an odd (short or long) first period.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=ODDFPRICE(DATE(2008,11,11), DATE(2021,3,1), DATE(2008,10,15), DATE(2009,3,1), 0.0785, 0.0625, 100, 2, 1)"), 6)
    113.597717
    """
    bond = _odd_first(settlement, maturity, issue, first_coupon, frequency, basis)
    if type(bond) is CellError:
        return bond
    if rate < 0.0 or yld < 0.0 or redemption <= 0.0:
        return CellError(NUM, "ODDFPRICE needs rate and yield >= 0 and a positive redemption")
    return bond.price(rate, yld, redemption)


@builtin("ODDFYIELD", 8, 9)
@numbers
def oddfyield(settlement: float, maturity: float, issue: float, first_coupon: float, rate: float, pr: float,
              redemption: float, frequency: float, basis: float = 0.0) -> float | CellError:
    """The yield of a bond with an odd first period bought at ``pr`` (the yield at which
    ODDFPRICE gives ``pr``).

    >>> from cellfuncs.formula import compute
    >>> round(compute("=ODDFYIELD(DATE(2008,11,11), DATE(2021,3,1), DATE(2008,10,15), DATE(2009,3,1), 0.0575, 84.5, 100, 2, 0)"), 4)
    0.0772
    """
    bond = _odd_first(settlement, maturity, issue, first_coupon, frequency, basis)
    if type(bond) is CellError:
        return bond
    if rate < 0.0 or pr <= 0.0 or redemption <= 0.0:
        return CellError(NUM, "ODDFYIELD needs rate >= 0 and a positive price and redemption")
    return _newton(lambda y: bond.price(rate, y, redemption) - pr, 0.1, "ODDFYIELD")


class _OddLast(NamedTuple):
    settlement: int
    maturity: int
    last: int
    frequency: int
    basis: int

    def sums(self) -> tuple[float, float, float]:
        """The odd last period's quasi periods: days counted, accrued and left, in periods."""
        schedule = Schedule.every(self.last, self.frequency)
        n = -schedule.index(self.maturity, strict=True) + 1
        pieces = _pieces(schedule, range(-1, -n - 1, -1), self.last, self.maturity, self.settlement,
                         self.basis, self.frequency, actual=True)
        return tuple(math.fsum(column) for column in zip(*pieces))

    def price(self, rate: float, y: float, redemption: float) -> float:
        """Microsoft's ODDLPRICE: the redemption and the odd last coupon discounted at simple
        interest over the days left, less the interest accrued."""
        counted, accrued, left = self.sums()
        c = 100.0 * rate / self.frequency
        return (redemption + c * counted) / (1.0 + left * y / self.frequency) - c * accrued

    def yield_(self, rate: float, pr: float, redemption: float) -> float:
        counted, accrued, left = self.sums()
        c = 100.0 * rate / self.frequency
        paid = pr + c * accrued
        return (redemption + c * counted - paid) / paid * self.frequency / left


def _odd_last(settlement: float, maturity: float, last: float, frequency: float,
              basis: float) -> _OddLast | CellError:
    args = _date(settlement), _date(maturity), _date(last), _frequency(frequency), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    s, m, li = args[:3]
    if not li < s < m:
        return CellError(NUM, "the dates are not last interest < settlement < maturity")
    return _OddLast(*args)


@builtin("ODDLPRICE", 7, 8)
@numbers
def oddlprice(settlement: float, maturity: float, last_interest: float, rate: float, yld: float,
              redemption: float, frequency: float, basis: float = 0.0) -> float | CellError:
    """The price per 100 face value of a bond with an odd last period.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=ODDLPRICE(DATE(2008,2,7), DATE(2008,6,15), DATE(2007,10,15), 0.0375, 0.0405, 100, 2, 0)"), 6)
    99.878286
    """
    bond = _odd_last(settlement, maturity, last_interest, frequency, basis)
    if type(bond) is CellError:
        return bond
    if rate < 0.0 or yld < 0.0 or redemption <= 0.0:
        return CellError(NUM, "ODDLPRICE needs rate and yield >= 0 and a positive redemption")
    return bond.price(rate, yld, redemption)


@builtin("ODDLYIELD", 7, 8)
@numbers
def oddlyield(settlement: float, maturity: float, last_interest: float, rate: float, pr: float,
              redemption: float, frequency: float, basis: float = 0.0) -> float | CellError:
    """The yield of a bond with an odd last period bought at ``pr``.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=ODDLYIELD(DATE(2008,4,20), DATE(2008,6,15), DATE(2007,12,24), 0.0375, 99.875, 100, 2, 0)"), 6)
    0.045192
    """
    bond = _odd_last(settlement, maturity, last_interest, frequency, basis)
    if type(bond) is CellError:
        return bond
    if rate < 0.0 or pr <= 0.0 or redemption <= 0.0:
        return CellError(NUM, "ODDLYIELD needs rate >= 0 and a positive price and redemption")
    return bond.yield_(rate, pr, redemption)


# --- Treasury bills and discounted securities ----------------------------------------------

def _bill_days(settlement: float, maturity: float) -> int | CellError:
    """Days from settlement to a maturity at most a year later."""
    s, m = _date(settlement), _date(maturity)
    err = _first_error(s, m)
    if err is not None:
        return err
    if not s < m <= Schedule(s, -12).date(1):
        return CellError(NUM, "a Treasury bill matures after settlement and within a year")
    return m - s


@builtin("TBILLPRICE", 3)
@numbers
def tbillprice(settlement: float, maturity: float, discount: float) -> float | CellError:
    """The price per 100 face value of a Treasury bill: 100 x (1 - discount x days/360).

    >>> round(tbillprice(39538.0, 39600.0, 0.09), 4)
    98.45
    """
    dsm = _bill_days(settlement, maturity)
    if type(dsm) is CellError:
        return dsm
    price_ = 100.0 * (1.0 - discount * dsm / 360.0)
    if discount <= 0.0 or price_ <= 0.0:
        return CellError(NUM, "TBILLPRICE needs a positive discount and price")
    return price_


@builtin("TBILLYIELD", 3)
@numbers
def tbillyield(settlement: float, maturity: float, pr: float) -> float | CellError:
    """The yield of a Treasury bill bought at ``pr``: (100 - pr) / pr x 360/days.

    >>> round(tbillyield(39538.0, 39600.0, 98.45), 6)
    0.091417
    """
    dsm = _bill_days(settlement, maturity)
    if type(dsm) is CellError:
        return dsm
    if pr <= 0.0:
        return CellError(NUM, "TBILLYIELD needs a positive price")
    return (100.0 - pr) / pr * 360.0 / dsm


@builtin("TBILLEQ", 3)
@numbers
def tbilleq(settlement: float, maturity: float, discount: float) -> float | CellError:
    """The bond-equivalent yield of a Treasury bill: 365 x rate / (360 - rate x days) up to
    half a year; beyond, the yield compounding once at the half year.

    >>> round(tbilleq(39538.0, 39600.0, 0.0914), 6)
    0.094151
    """
    dsm = _bill_days(settlement, maturity)
    if type(dsm) is CellError:
        return dsm
    if discount <= 0.0:
        return CellError(NUM, "TBILLEQ needs a positive discount")
    if dsm <= 182:
        return 365.0 * discount / (360.0 - discount * dsm)
    price_ = 1.0 - discount * dsm / 360.0
    t = dsm / max(dsm, 365.0)  # a bill running a whole leap year counts it as the year
    return (-t + math.sqrt(t * t - (2.0 * t - 1.0) * (1.0 - 1.0 / price_))) / (t - 0.5)


def _discounted_security(name: str, rule: str, fn: Callable[[float, float, float], float],
                         positive: tuple[int, ...]) -> None:
    """Register ``name``(settlement, maturity, a, b, [basis]) = fn(a, b, years), with
    the arguments at ``positive`` required above 0."""

    def security(settlement: float, maturity: float, a: float, b: float, basis: float = 0.0) -> float | CellError:
        span = _span(settlement, maturity, basis)
        if type(span) is CellError:
            return span
        if any((a, b)[i] <= 0.0 for i in positive):
            return CellError(NUM, f"{name} needs positive amounts")
        return fn(a, b, year_fraction(*span))

    security.__name__ = security.__qualname__ = name.lower()
    security.__doc__ = f"{name}(settlement, maturity, ..., [basis]): {rule}"
    builtin(name, 4, 5)(numbers(security))


_discounted_security("DISC", "the discount rate: (redemption - pr) / redemption / years.",
                     lambda pr, red, t: (red - pr) / red / t, (0, 1))
_discounted_security("INTRATE", "the interest rate: (redemption - investment) / investment / years.",
                     lambda inv, red, t: (red - inv) / inv / t, (0, 1))
_discounted_security("RECEIVED", "the amount received at maturity: investment / (1 - discount x years).",
                     lambda inv, d, t: inv / (1.0 - d * t), (0, 1))
_discounted_security("PRICEDISC", "the price per 100 of a discounted security: redemption x (1 - discount x years).",
                     lambda d, red, t: red - d * red * t, (0, 1))
_discounted_security("YIELDDISC", "the yield of a discounted security: (redemption / pr - 1) / years.",
                     lambda pr, red, t: (red / pr - 1.0) / t, (0, 1))


def _at_maturity(issue: int, settlement: int, maturity: int, basis: int) -> tuple[float, float, float]:
    """Years from issue to maturity, issue to settlement, settlement to maturity."""
    return (year_fraction(issue, maturity, basis), year_fraction(issue, settlement, basis),
            year_fraction(settlement, maturity, basis))


def _maturity_args(settlement: float, maturity: float, issue: float, basis: float) -> tuple[int, ...] | CellError:
    args = _date(settlement), _date(maturity), _date(issue), _basis(basis)
    err = _first_error(*args)
    if err is not None:
        return err
    if not args[2] <= args[0] < args[1]:
        return CellError(NUM, "the dates are not issue <= settlement < maturity")
    return args


@builtin("PRICEMAT", 5, 6)
@numbers
def pricemat(settlement: float, maturity: float, issue: float, rate: float, yld: float,
             basis: float = 0.0) -> float | CellError:
    """The price per 100 of a security paying interest at maturity: its value at maturity
    discounted at simple interest, less the interest accrued since issue.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=PRICEMAT(DATE(2008,2,15), DATE(2008,4,13), DATE(2007,11,11), 0.061, 0.061, 0)"), 6)
    99.984499
    """
    args = _maturity_args(settlement, maturity, issue, basis)
    if type(args) is CellError:
        return args
    if rate < 0.0 or yld < 0.0:
        return CellError(NUM, "PRICEMAT needs rate and yield >= 0")
    s, m, i, b = args
    whole, accrued, left = _at_maturity(i, s, m, b)
    return 100.0 * (1.0 + whole * rate) / (1.0 + left * yld) - 100.0 * accrued * rate


@builtin("YIELDMAT", 5, 6)
@numbers
def yieldmat(settlement: float, maturity: float, issue: float, rate: float, pr: float,
             basis: float = 0.0) -> float | CellError:
    """The yield of a security paying interest at maturity bought at ``pr``.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=YIELDMAT(DATE(2008,3,15), DATE(2008,11,3), DATE(2007,11,8), 0.0625, 100.0123, 0)"), 6)
    0.060954
    """
    args = _maturity_args(settlement, maturity, issue, basis)
    if type(args) is CellError:
        return args
    if rate < 0.0 or pr <= 0.0:
        return CellError(NUM, "YIELDMAT needs rate >= 0 and a positive price")
    s, m, i, b = args
    whole, accrued, left = _at_maturity(i, s, m, b)
    paid = pr / 100.0 + accrued * rate
    return (1.0 + whole * rate - paid) / paid / left
