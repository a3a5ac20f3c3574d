"""Excel's date serial numbers and the date and time texts it reads.

In the 1900 date system (the default) day 1 is 1900-01-01. Excel keeps Lotus 1-2-3's
29 February 1900 as day 60, so from 1 March 1900 on the serial is the day count from
1899-12-30; day 0 reads as 1900-01-00. A workbook may use the 1904 date system instead
(day 0 is 1904-01-01, 1,462 days later): recalculation runs inside :func:`date_system`, and
:func:`serial`, :func:`ymd` and :func:`in_1900` follow it.

>>> serial(2024, 1, 2), serial(1900, 2, 29), serial(1900, 3, 1), ymd(45293.0), ymd(60.0)
(45293, 60, 61, (2024, 1, 2), (1900, 2, 29))
>>> parse_date_text("2024-01-02"), parse_date_text("1/2/2024 12:00"), parse_date_text("2-Jan-24"), parse_date_text("6:30 PM")
(45293.0, 45293.5, 45293.0, 0.7708333333333334)
"""

from __future__ import annotations

import datetime as dt
import re
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Iterator

LAST_SERIAL = 2958465  # 9999-12-31
_EPOCH = dt.date(1899, 12, 30)
_MONTHS = {m: i for i, m in enumerate(
    ["jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"], start=1)}


_1904_SHIFT = 1462  # 1904-01-01 is day 1462 of the 1900 system
_SHIFT: ContextVar[int] = ContextVar("date_shift", default=0)


@contextmanager
def date_system(is_1904: bool) -> Iterator[None]:
    """Serials count in the 1904 date system inside the block when ``is_1904``.

    >>> with date_system(True):
    ...     serial(2024, 1, 2), ymd(0.0)
    (43831, (1904, 1, 1))
    """
    token = _SHIFT.set(_1904_SHIFT if is_1904 else 0)
    try:
        yield
    finally:
        _SHIFT.reset(token)


def in_1900(x: float) -> float:
    """A serial of the date system in use as the 1900 system's serial (for weekdays)."""
    return x + _SHIFT.get()


def serial(year: int, month: int, day: int) -> int:
    """The serial of a calendar date (or of 29 February 1900, day 60)."""
    if (year, month, day) == (1900, 2, 29):
        return 60 - _SHIFT.get()
    n = (dt.date(year, month, day) - _EPOCH).days
    return (n - 1 if n <= 60 else n) - _SHIFT.get()  # before 1 March 1900 Excel counts one day less


def ymd(x: float) -> tuple[int, int, int]:
    """(year, month, day) of a serial 0 <= x <= LAST_SERIAL (the fraction, a time, ignored)."""
    n = int(x) + _SHIFT.get()
    if n == 60:
        return 1900, 2, 29
    if n == 0:
        return 1900, 1, 0
    d = _EPOCH + dt.timedelta(days=n + (1 if n < 60 else 0))
    return d.year, d.month, d.day


def date_serial(year: float, month: float, day: float) -> int | None:
    """DATE's arithmetic: years 0-1899 count from 1900, months and days beyond their ranges
    roll over; None when the result is before day 0 or after 9999-12-31."""
    y, m, d = int(year), int(month), int(day)
    if 0 <= y < 1900:
        y += 1900
    if not 1900 <= y <= 9999 + 1:
        return None
    months = y * 12 + (m - 1)
    y, m = divmod(months, 12)
    if not 1900 <= y <= 9999:
        return None
    out = serial(y, m + 1, 1) + d - 1
    return out if 0 <= out <= LAST_SERIAL - _SHIFT.get() else None


_TIME = r"(\d{1,2}):(\d{1,2})(?::(\d{1,2}(?:\.\d*)?))?\s*([AaPp][Mm])?"
_ISO = re.compile(r"(\d{4})-(\d{1,2})-(\d{1,2})\Z")
_SLASHED = re.compile(r"(\d{1,2})/(\d{1,2})(?:/(\d{1,4}))?\Z")
_NAMED_DMY = re.compile(r"(\d{1,2})[- ]([A-Za-z]{3,9})\.?(?:[- ,]+(\d{1,4}))?\Z")
_NAMED_MDY = re.compile(r"([A-Za-z]{3,9})\.?[- ](\d{1,2})(?:,?[- ](\d{1,4}))?\Z")
_NAMED_MY = re.compile(r"([A-Za-z]{3,9})\.?[- ](\d{4})\Z")
_TIME_ONLY = re.compile(_TIME + r"\Z")
_SPLIT = re.compile(r"(.*?)\s+(" + _TIME + r")\Z")


def _year(text: str | None) -> int | None:
    if text is None:
        return dt.date.today().year  # Excel fills in the current year
    y = int(text)
    if len(text) <= 2:
        y += 2000 if y < 30 else 1900  # Excel's two-digit year window
    return y


def _month(name: str) -> int | None:
    name = name.lower()
    m = _MONTHS.get(name[:3])
    full = dt.date(2000, m, 1).strftime("%B").lower() if m else ""
    return m if m and (len(name) == 3 or full.startswith(name)) else None


def _date_part(text: str) -> int | None:
    found = None
    if m := _ISO.match(text):
        found = int(m[1]), int(m[2]), int(m[3])
    elif m := _SLASHED.match(text):
        found = _year(m[3]), int(m[1]), int(m[2])
    elif m := _NAMED_DMY.match(text):
        month = _month(m[2])
        found = (_year(m[3]), month, int(m[1])) if month else None
    elif m := _NAMED_MDY.match(text):
        month = _month(m[1])
        found = (_year(m[3]), month, int(m[2])) if month else None
    elif m := _NAMED_MY.match(text):
        month = _month(m[1])
        found = (int(m[2]), month, 1) if month else None
    if found is None:
        return None
    y, mo, d = found
    if not (1900 <= y <= 9999 and 1 <= mo <= 12 and 1 <= d <= 31):
        return None
    if (y, mo, d) == (1900, 2, 29):
        return 60
    try:
        dt.date(y, mo, d)
    except ValueError:
        return None
    return serial(y, mo, d)


def _time_part(m: re.Match) -> float | None:
    h, mi = int(m[1]), int(m[2])
    s = float(m[3]) if m[3] else 0.0
    if m[4]:
        if not 1 <= h <= 12:
            return None
        h = h % 12 + (12 if m[4].lower() == "pm" else 0)
    if mi > 59 or s >= 60.0:
        return None
    return (h * 3600 + mi * 60 + s) / 86400.0


def parse_date_text(text: str) -> float | None:
    """The serial a date and/or time text stands for as Excel (en-US) reads it, else None."""
    text = text.strip()
    if m := _TIME_ONLY.match(text):
        return _time_part(m)
    time = 0.0
    if m := _SPLIT.match(text):
        t = _time_part(re.match(_TIME, m[2]))
        if t is None:
            return None
        text, time = m[1].strip(), t
    day = _date_part(text)
    return None if day is None else day + time
