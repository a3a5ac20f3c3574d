"""Built-in working-day and date-difference functions: WORKDAY, WORKDAY.INTL, NETWORKDAYS,
NETWORKDAYS.INTL and DATEDIF, on serial dates of the workbook's date system.

A weekend is a weekend number (1 or omitted Saturday and Sunday, 2 to 7 the two days from
Sunday-Monday to Friday-Saturday, 11 to 17 one day from Sunday to Saturday) or a text of seven
0s and 1s from Monday to Sunday, 1 for a day off. Holidays are a range or array of dates
(blank cells skipped, text read as a date); days off that fall on the weekend count once.

>>> from cellfuncs.formula import compute
>>> compute("=WORKDAY(DATE(2008,10,1), 151, {39778,39786,39834})"), compute("=NETWORKDAYS(DATE(2012,10,1), DATE(2013,3,1))")
(39938.0, 110.0)
>>> compute('=DATEDIF("2001-06-01", "2002-08-15", "YD")')
75.0
"""

from __future__ import annotations

import calendar
from bisect import bisect_left, bisect_right
from typing import Callable

import numpy as np

from ..errors import NUM, VALUE, CellError
from .arrays import Value, map_values
from .coerce import to_text
from .dates import LAST_SERIAL, in_1900, serial, ymd
from .evaluate import builtin
from .fn_math import argument_number
from .nodes import Scalar

WEEK = 7
_SATURDAY_SUNDAY = (False,) * 5 + (True, True)


def each_a_value(fn: Callable[..., Value]) -> Callable[..., Value]:
    """Mark a built-in whose parameters, but its array-class ones, each take one value: a
    legacy formula intersects a range written there with its cell (see :func:`.intersect`)."""
    fn.takes_values = True
    return fn


def _date(v: Scalar) -> int | CellError:
    """A date argument as a whole serial: logical values and text that is no date are #VALUE!,
    a serial before day 0 or after 9999-12-31 #NUM!."""
    x = argument_number(v, logicals=False)
    if type(x) is CellError:
        return x
    if x < 0.0 or in_1900(x) >= LAST_SERIAL + 1:
        return CellError(NUM, f"{to_text(x)} is not a date serial number")
    return int(x)


def _weekday(day: int) -> int:
    """0 for Monday to 6 for Sunday (serial 1 of the 1900 system a Sunday, as in Excel)."""
    return (int(in_1900(day)) - 2) % WEEK


def weekend_days(code: Scalar, all_off_allowed: bool) -> tuple[bool, ...] | CellError:
    """The days off from Monday to Sunday a weekend argument names (None: Saturday and Sunday).

    >>> weekend_days(2.0, False), weekend_days("0000011", False)[5:]
    ((True, False, False, False, False, False, True), (True, True))
    >>> weekend_days(0.0, False).code, weekend_days("1111111", False).code, weekend_days("11", True).code
    ('#NUM!', '#VALUE!', '#VALUE!')
    """
    if code is None:
        return _SATURDAY_SUNDAY
    if type(code) is CellError:
        return code
    if type(code) is str:
        if len(code) != WEEK or set(code) - {"0", "1"}:
            return CellError(VALUE, f'the weekend text "{code}" is not seven 0s and 1s')
        if code == "1" * WEEK and not all_off_allowed:
            return CellError(VALUE, "a weekend of seven days leaves no working day")
        return tuple(c == "1" for c in code)
    x = argument_number(code, logicals=False)
    if type(x) is CellError:
        return x
    if x in (1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0):
        off = {(int(x) + 4) % WEEK, (int(x) + 5) % WEEK}
    elif x in (11.0, 12.0, 13.0, 14.0, 15.0, 16.0, 17.0):
        off = {(int(x) - 12) % WEEK}
    else:
        return CellError(NUM, f"{to_text(x)} is not a weekend number (1 to 7, 11 to 17)")
    return tuple(d in off for d in range(WEEK))


def _holidays(v: Value) -> list[int] | CellError:
    """The sorted distinct holiday serials of a range or array."""
    found = set()
    for x in (v.flat if type(v) is np.ndarray else (v,)):
        if x is None:
            continue
        day = _date(x)
        if type(day) is CellError:
            return day
        found.add(day)
    return sorted(found)


def _in_range(day: int) -> bool:
    return 0 <= day and in_1900(day) <= LAST_SERIAL


def _workday(start: int, days: int, off: tuple[bool, ...], holidays: list[int]) -> float | CellError:
    """The date ``days`` working days after (before, when negative) ``start``."""
    step = 1 if days > 0 else -1
    left, day, per_week = abs(days), start, off.count(False)
    while left:
        ahead = sorted((day + step, day + WEEK * step))
        if left > per_week and bisect_left(holidays, ahead[0]) == bisect_right(holidays, ahead[1]):
            day, left = day + WEEK * step, left - per_week  # a whole week holds no holiday
        else:
            day += step
            if not off[_weekday(day)] and not _is_holiday(day, holidays):
                left -= 1
        if not _in_range(day):
            return CellError(NUM, "the working day falls outside the dates Excel knows")
    return float(day)


def _is_holiday(day: int, holidays: list[int]) -> bool:
    i = bisect_left(holidays, day)
    return i < len(holidays) and holidays[i] == day


def _networkdays(start: int, end: int, off: tuple[bool, ...], holidays: list[int]) -> float:
    """The working days from ``start`` to ``end`` counted with both ends; negative backwards."""
    sign = 1.0 if start <= end else -1.0
    first, last = min(start, end), max(start, end)
    weeks, rest = divmod(last - first + 1, WEEK)
    count = weeks * off.count(False)
    count += sum(1 for d in range(last - rest + 1, last + 1) if not off[_weekday(d)])
    lo, hi = bisect_left(holidays, first), bisect_right(holidays, last)
    count -= sum(1 for d in holidays[lo:hi] if not off[_weekday(d)])
    return sign * count


def _dated(fn, *values: Scalar) -> Scalar:
    """``fn`` of the date arguments as whole serials, the first invalid one's error instead."""
    days = [_date(v) for v in values]
    for d in days:
        if type(d) is CellError:
            return d
    return fn(*days)


def _whole(v: Scalar) -> int | CellError:
    x = argument_number(v, logicals=False)
    return x if type(x) is CellError else int(x)


def _workday_call(start: Value, days: Value, weekend: Value, holidays: Value, all_off: bool) -> Value:
    listed = _holidays(holidays)
    if type(listed) is CellError:
        return listed

    def one(s: Scalar, n: Scalar, w: Scalar) -> Scalar:
        off = weekend_days(w, all_off)
        if type(off) is CellError:
            return off
        count = _whole(n)
        if type(count) is CellError:
            return count
        return _dated(lambda d: _workday(d, count, off, listed), s)

    return map_values(one, start, days, weekend)


def _networkdays_call(start: Value, end: Value, weekend: Value, holidays: Value) -> Value:
    listed = _holidays(holidays)
    if type(listed) is CellError:
        return listed

    def one(s: Scalar, e: Scalar, w: Scalar) -> Scalar:
        off = weekend_days(w, True)
        if type(off) is CellError:
            return off
        return _dated(lambda a, b: _networkdays(a, b, off, listed), s, e)

    return map_values(one, start, end, weekend)


@builtin("WORKDAY", 2, 3, arrays=(2,))
@each_a_value
def workday(start: Value, days: Value, holidays: Value = None) -> Value:
    """The date ``days`` working days (Monday to Friday, not a holiday) from ``start``; 0 days
    is ``start`` itself.

    >>> workday(40575.0, 5.0)
    40582.0
    """
    return _workday_call(start, days, None, holidays, False)


@builtin("WORKDAY.INTL", 2, 4, arrays=(3,))
@each_a_value
def workday_intl(start: Value, days: Value, weekend: Value = None, holidays: Value = None) -> Value:
    """WORKDAY with the days off a weekend number or text names.

    >>> workday_intl(40909.0, 30.0, 17.0), workday_intl(40909.0, 30.0, 0.0).code
    (40944.0, '#NUM!')
    """
    return _workday_call(start, days, weekend, holidays, False)


@builtin("NETWORKDAYS", 2, 3, arrays=(2,))
@each_a_value
def networkdays(start: Value, end: Value, holidays: Value = None) -> Value:
    """The working days (Monday to Friday, not a holiday) from ``start`` to ``end``, both
    counted; negative when ``start`` is later.

    >>> networkdays(38776.0, 38748.0)
    -21.0
    """
    return _networkdays_call(start, end, None, holidays)


@builtin("NETWORKDAYS.INTL", 2, 4, arrays=(3,))
@each_a_value
def networkdays_intl(start: Value, end: Value, weekend: Value = None, holidays: Value = None) -> Value:
    """NETWORKDAYS with the days off a weekend number or text names (seven days off: 0).

    >>> networkdays_intl(38718.0, 38749.0, "0010001", 38719.0), networkdays_intl(38718.0, 38749.0, "1111111")
    (21.0, 0.0)
    """
    return _networkdays_call(start, end, weekend, holidays)


def _rolled(year: int, month: int, day: int) -> int:
    """DATE(year, month, day) for a day past the month's end: it rolls into the next month."""
    year, month = (year - 1, 12) if month == 0 else (year, month)
    last = calendar.monthrange(year, month)[1]
    return serial(year, month, min(day, last)) + max(0, day - last)


def _months(start: tuple[int, int, int], end: tuple[int, int, int]) -> int:
    """Whole months from ``start`` to ``end`` (a month ends on its day number or later)."""
    (sy, sm, sd), (ey, em, ed) = start, end
    return (ey - sy) * 12 + em - sm - (1 if ed < sd else 0)


def _calendar(day: int) -> tuple[int, int, int]:
    y, m, d = ymd(float(day))
    return (1899, 12, 31) if d == 0 else (y, m, d)  # day 0 is 1899-12-31 for calendar arithmetic


def _difference(start: int, end: int, unit: str) -> float | CellError:
    s, e = _calendar(start), _calendar(end)
    if unit == "D":
        return float(end - start)
    if unit == "M":
        return float(_months(s, e))
    if unit == "Y":
        return float(_months(s, e) // 12)
    if unit == "YM":
        return float(_months(s, e) % 12)
    if unit == "MD":  # Excel counts from the start's day number in the month before the end's
        return float(e[2] - s[2] if e[2] >= s[2] else end - _rolled(e[0], e[1] - 1, s[2]))
    if unit == "YD":
        year = e[0] if (e[1], e[2]) >= (s[1], s[2]) else e[0] - 1
        return float(end - _rolled(year, s[1], s[2]))
    return CellError(NUM, f'DATEDIF has no unit "{unit}" (Y, M, D, MD, YM or YD)')


@builtin("DATEDIF", 3)
@each_a_value
def datedif(start: Value, end: Value, unit: Value) -> Value:
    """Whole years ("Y"), months ("M") or days ("D") from ``start`` to ``end``; "YM" the
    months and "MD" the days left over, "YD" the days as if both were in one year; a start
    after the end is #NUM!.

    >>> datedif(40544.0, 40908.0, "md"), datedif(40574.0, 40603.0, "MD")
    (30.0, -2.0)
    """

    def one(s: Scalar, e: Scalar, u: Scalar) -> Scalar:
        u = to_text(u)
        if type(u) is CellError:
            return u

        def between(a: int, b: int) -> float | CellError:
            return CellError(NUM, "DATEDIF's start is after its end") if a > b else _difference(a, b, u.upper())

        return _dated(between, s, e)

    return map_values(one, start, end, unit)
