"""Built-in date and time functions on Excel's serial numbers (1900 date system): DATE, TIME,
YEAR, MONTH, DAY, HOUR, MINUTE, SECOND, WEEKDAY, EDATE, EOMONTH, DAYS, DATEVALUE, TIMEVALUE.

>>> from cellfuncs.formula import compute
>>> compute("=DATE(2024, 14, 1)"), compute('=YEAR("2024-03-05")'), compute("=TIME(18, 30, 0)")
(45689.0, 2024.0, 0.7708333333333334)
"""

from __future__ import annotations

import calendar
import math

from ..errors import NUM, VALUE, CellError
from .arrays import elementwise, numeric
from .coerce import to_text
from .dates import LAST_SERIAL, date_serial, in_1900, parse_date_text, serial, ymd
from .evaluate import builtin
from .fn_securities import numbers
from .nodes import Scalar


def _day(x: float) -> float | CellError:
    if not 0.0 <= x < LAST_SERIAL + 1:
        return CellError(NUM, f"{to_text(x)} is not a date serial number (0 to {LAST_SERIAL})")
    return x


@builtin("DATE", 3)
@numeric
def date(year: float, month: float, day: float) -> float | CellError:
    """The serial of a date; months and days beyond their ranges roll over, years below 1900
    count from 1900.

    >>> date(2008.0, 1.0, 1.0), date(108.0, 1.0, 2.0), date(2008.0, 1.0, 0.0)
    (39448.0, 39449.0, 39447.0)
    """
    n = date_serial(year, month, day)
    return float(n) if n is not None else CellError(NUM, "the date is outside 1900-01-00 to 9999-12-31")


@builtin("TIME", 3)
@numeric
def time(hour: float, minute: float, second: float) -> float | CellError:
    """The fraction of a day of a time (whole days dropped).

    >>> time(12.0, 0.0, 0.0), time(27.0, 0.0, 0.0)
    (0.5, 0.125)
    """
    total = int(hour) * 3600 + int(minute) * 60 + int(second)
    if total < 0 or int(hour) > 32767 or int(minute) > 32767 or int(second) > 32767:
        return CellError(NUM, "TIME of a negative or too large time")
    return (total % 86400) / 86400.0


def _part(name: str, index: int) -> None:
    def part(x: float) -> float | CellError:
        x = _day(x)
        return x if type(x) is CellError else float(ymd(x)[index])

    part.__doc__ = f"{name}(serial): the {name.lower()} of a date."
    builtin(name, 1)(numeric(part))


_part("YEAR", 0)
_part("MONTH", 1)
_part("DAY", 2)


def _seconds(x: float) -> int:
    """The time of day of a serial in whole seconds, rounded to the nearest as Excel shows it."""
    return int(round((x - math.floor(x)) * 86400.0)) % 86400 if x - math.floor(x) < 1 - 0.5 / 86400 else 0


def _clock(name: str, fn) -> None:
    def part(x: float) -> float | CellError:
        x = _day(x)
        return x if type(x) is CellError else float(fn(_seconds(x)))

    part.__doc__ = f"{name}(serial): the {name.lower()} of a time."
    builtin(name, 1)(numeric(part))


_clock("HOUR", lambda s: s // 3600)
_clock("MINUTE", lambda s: s // 60 % 60)
_clock("SECOND", lambda s: s % 60)

# WEEKDAY's return types: the weekday numbered 1 (or 0) from the named first day.
# Serial 1 (1900-01-01) counts as a Sunday, as in Excel.
_FIRST_DAY = {1: (0, 1), 2: (1, 1), 3: (1, 0), 11: (1, 1), 12: (2, 1), 13: (3, 1), 14: (4, 1), 15: (5, 1),
              16: (6, 1), 17: (0, 1)}


@builtin("WEEKDAY", 1, 2)
@numeric
def weekday(x: float, kind: float = 1.0) -> float | CellError:
    """The day of the week: type 1 (default) Sunday 1 to Saturday 7, 2 Monday 1 to Sunday 7,
    3 Monday 0 to Sunday 6, 11 to 17 weeks starting Monday to Sunday, numbered from 1.

    >>> weekday(45293.0), weekday(45293.0, 2.0), weekday(45293.0, 3.0)
    (3.0, 2.0, 1.0)
    """
    x = _day(x)
    if type(x) is CellError:
        return x
    spec = _FIRST_DAY.get(int(kind))
    if spec is None:
        return CellError(NUM, f"WEEKDAY has no return type {to_text(kind)}")
    first, base = spec
    sunday_based = (int(in_1900(x)) - 1) % 7  # 0 Sunday ... 6 Saturday
    return float((sunday_based - first) % 7 + base)


def _months_later(x: float, months: float, end: bool) -> float | CellError:
    x = _day(x)
    if type(x) is CellError:
        return x
    y, m, d = ymd(x)
    if d == 0:  # day 0 is 1899-12-31 for month arithmetic, but no month later it is day 0 itself
        if int(months) == 0 and not end:
            return 0.0
        y, m, d = 1899, 12, 31
    total = y * 12 + (m - 1) + int(months)
    y, m = divmod(total, 12)
    m += 1
    if not 1900 <= y <= 9999:
        return CellError(NUM, "the date is outside 1900 to 9999")
    last = calendar.monthrange(y, m)[1]
    return float(serial(y, m, last if end else min(d, last)))


@builtin("EDATE", 2)
@numeric
def edate(start: float, months: float) -> float | CellError:
    """The same day ``months`` later (the month's last day where it is shorter).

    >>> edate(45322.0, 1.0)
    45351.0
    """
    return _months_later(start, months, False)


@builtin("EOMONTH", 2)
@numbers
def eomonth(start: float, months: float) -> float | CellError:
    """The last day of the month ``months`` later; TRUE or FALSE for either is #VALUE!.

    >>> eomonth(45293.0, 0.0), eomonth(45293.0, -1.0)
    (45322.0, 45291.0)
    """
    return _months_later(start, months, True)


@builtin("DAYS", 2)
@numeric
def days(end: float, start: float) -> float | CellError:
    """Whole days from ``start`` to ``end``.

    >>> days(45322.0, 45293.5)
    29.0
    """
    for x in (end, start):
        if type(_day(x)) is CellError:
            return _day(x)
    return float(int(end) - int(start))


def _text_serial(name: str, whole: bool):
    @elementwise
    def fn(v: Scalar) -> Scalar:
        if type(v) is CellError:
            return v
        if type(v) is not str:
            return CellError(VALUE, f"{name} takes text")
        x = parse_date_text(v)
        if x is None:
            return CellError(VALUE, f'"{v}" is not a date or time')
        return float(math.floor(x)) if whole else x - math.floor(x)

    fn.__doc__ = f"{name}(text): the {'date' if whole else 'time'} a text stands for, as a serial."
    builtin(name, 1)(fn)


_text_serial("DATEVALUE", True)
_text_serial("TIMEVALUE", False)
