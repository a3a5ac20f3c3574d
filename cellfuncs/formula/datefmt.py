"""Dates and times in Excel number formats, on the 1900 date system's serials (see
:mod:`dates`): ``d dd ddd dddd``, ``m mm mmm mmmm mmmmm``, ``yy yyyy``, ``h hh``, ``m mm`` as
minutes (after an hour or a second, or before a second), ``s ss`` with fractions
``ss.000``, ``AM/PM`` and ``A/P``, and elapsed times ``[h] [mm] [ss]``.

The time is rounded to the precision shown (whole seconds, or the decimals of ``ss.00``)
before it is split, so 59.6 seconds show as the next minute.

>>> from .fmtcode import tokenize
>>> codes = [("dddd d mmmm yyyy", 60.0), ("h:mm:ss.00 AM/PM", 0.75001), ("[h]:mm", -1.5)]
>>> [render_date(tokenize(f), x) for f, x in codes]
['Wednesday 29 February 1900', '6:00:00.86 PM', '-36:00']
"""

from __future__ import annotations

from decimal import ROUND_HALF_UP, Decimal

from ..errors import VALUE, CellError
from .dates import LAST_SERIAL, in_1900, ymd
from .fmtcode import Token, literal

_DAYS = ["Sunday", "Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday"]
_MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October",
           "November", "December"]
_TIME_UNITS = ("h", "s")  # an m next to these means minutes


def _unit(t: Token) -> str | None:
    return t.text[0].lower() if t.kind in ("date", "elapsed") else None


def _subseconds(tokens: tuple[Token, ...]) -> dict[int, int]:
    """Each point followed by 0 placeholders (fractions of a second): its index and how many."""
    out = {}
    for i, t in enumerate(tokens):
        if t.kind == "point":
            n = 0
            while i + 1 + n < len(tokens) and tokens[i + 1 + n].text == "0":
                n += 1
            if n:
                out[i] = n
    return out


def is_valid_date(tokens: tuple[Token, ...]) -> bool:
    """A date or time section admits no digit placeholder but the 0s of fractional seconds."""
    fractions = _subseconds(tokens)
    allowed = {i + 1 + k for i, n in fractions.items() for k in range(n)}
    return all(t.kind != "digit" or i in allowed for i, t in enumerate(tokens))


def _roles(tokens: tuple[Token, ...]) -> list[str | None]:
    """What each date token shows: y, mo (month), d, h, mi (minutes) or s."""
    units = [_unit(t) for t in tokens]
    roles: list[str | None] = []
    for i, u in enumerate(units):
        if u != "m" or tokens[i].kind == "elapsed":
            roles.append("mi" if u == "m" else u)
            continue
        before = next((v for v in reversed(units[:i]) if v), None)
        after = next((v for v in units[i + 1:] if v), None)
        minutes = len(tokens[i].text) <= 2 and (before in _TIME_UNITS or after == "s")
        roles.append("mi" if minutes else "mo")
    return roles


class _Clock:
    """A serial split into day, hours, minutes, seconds and fraction of a second, rounded
    to ``decimals`` of a second."""

    def __init__(self, x: float, decimals: int):
        scale = 10**decimals
        ticks = int((Decimal(repr(abs(x))) * 86400 * scale).quantize(Decimal(1), rounding=ROUND_HALF_UP))
        self.seconds, self.ticks = divmod(ticks, scale)
        self.decimals = decimals
        self.day = self.seconds // 86400
        rest = self.seconds % 86400
        self.h, self.mi, self.s = rest // 3600, rest // 60 % 60, rest % 60

    def total(self, unit: str) -> int:
        return self.seconds // {"h": 3600, "m": 60, "s": 1}[unit]


def _two(n: int, width: int) -> str:
    return str(n).zfill(min(width, 2))


def _date_part(role: str, text: str, clock: _Clock) -> str:
    n = len(text)
    y, mo, d = ymd(float(clock.day))
    if role == "y":
        return f"{y % 100:02d}" if n <= 2 else f"{y:04d}"
    if role == "mo":
        name = _MONTHS[mo - 1]
        return _two(mo, n) if n <= 2 else name[:3] if n == 3 else name[0] if n == 5 else name
    weekday = _DAYS[(int(in_1900(clock.day)) + 6) % 7]  # serial 1 of the 1900 system (1 January 1900) is a Sunday
    return _two(d, n) if n <= 2 else weekday[:3] if n == 3 else weekday


def _time_part(role: str, t: Token, clock: _Clock, elapsed: set[str], twelve: bool) -> str:
    unit = "m" if role == "mi" else role
    if unit in elapsed:  # with [h] in the code every h shows the hours elapsed, and so on
        return str(clock.total(unit)).zfill(len(t.text))
    if role == "h":
        return _two(clock.h % 12 or 12 if twelve else clock.h, len(t.text))
    return _two(clock.mi if role == "mi" else clock.s, len(t.text))


def _ampm(t: Token, clock: _Clock) -> str:
    pm = clock.h >= 12
    if len(t.text) > 3:
        return "PM" if pm else "AM"
    letter = "P" if pm else "A"
    return letter if t.text[0].isupper() else letter.lower()


def render_date(tokens: tuple[Token, ...], x: float) -> str | CellError:
    """``x`` (a serial; negative only for elapsed times) in a date or time section."""
    elapsed = {t.text[0] for t in tokens if t.kind == "elapsed"}
    if x < 0 and not elapsed:
        return CellError(VALUE, "a negative number is not a date or a time")
    if abs(x) >= LAST_SERIAL + 1:  # Excel shows no date or time past 31 December 9999
        return CellError(VALUE, "the number is after 31 December 9999")
    fractions = _subseconds(tokens)
    clock = _Clock(x, min(3, max(fractions.values(), default=0)))
    roles = _roles(tokens)
    if any(r in ("y", "mo", "d") for r in roles) and clock.day > LAST_SERIAL:
        return CellError(VALUE, "the time rounds past 31 December 9999")
    twelve = any(t.kind == "ampm" for t in tokens)
    out = []
    for i, (t, role) in enumerate(zip(tokens, roles)):
        if role in ("y", "mo", "d"):
            out.append(_date_part(role, t.text, clock))
        elif role:
            out.append(_time_part(role, t, clock, elapsed, twelve))
        elif t.kind == "ampm":
            out.append(_ampm(t, clock))
        elif i in fractions:
            out.append("." + str(clock.ticks).zfill(clock.decimals)[:fractions[i]].ljust(fractions[i], "0"))
        elif t.kind == "digit":
            out.append("")  # a 0 of the fraction of a second, shown with its point
        else:
            out.append(literal(t))
    return ("-" if x < 0 else "") + "".join(out)
