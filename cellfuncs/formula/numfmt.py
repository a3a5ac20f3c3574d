"""Excel number format codes as TEXT() applies them: sections (positive;negative;zero;text)
and conditions (``[<10]``), literals (``"text"``, ``\\c``, ``_x`` as a space), colours
(ignored), digit placeholders ``0 # ?`` with thousands separators and scaling commas,
percent, exponents, dates and times (``yyyy mm dd hh:mm:ss AM/PM``, elapsed ``[h]``), and
the General format's 11-character rule.

>>> apply_format(1234.5, '#,##0.00_);(#,##0.00)'), apply_format(-5.0, '0;(0)'), apply_format(45293.75, "dddd d mmm yyyy h:mm AM/PM")
('1,234.50 ', '(5)', 'Tuesday 2 Jan 2024 6:00 PM')
>>> apply_format(1 / 3, "General"), apply_format(123456789012.0, "General"), apply_format(5.0, '[<10]"small";"big"')
('0.333333333', '1.23457E+11', 'small')
"""

from __future__ import annotations

import re
from functools import lru_cache

from ..errors import VALUE, CellError
from .coerce import decimal_round
from .dates import LAST_SERIAL, ymd

_DAYS = ["Sunday", "Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday"]
_MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October",
           "November", "December"]
_TOKEN = re.compile(
    r'"[^"]*"|\\.|_.|\*.|\[[^\]]*\]|AM/PM|am/pm|A/P|a/p|[Ee][+-]|[yY]+|[mM]+|[dD]+|[hH]+|[sS]+|[0#?]|[.,%@/]|.',
    re.DOTALL)
_CONDITION = re.compile(r"\[(<=|>=|<>|<|>|=)(-?[0-9.]+)\]")


def general(x: float) -> str:
    """The General format in a cell: at most 11 characters besides the sign, else scientific
    notation with up to 6 significant digits."""
    if x == 0.0:
        return "0"
    a = abs(x)
    sign = "-" if x < 0 else ""
    if 1e-9 <= a < 1e11:
        whole = len(str(int(a))) if a >= 1 else 1
        decimals = max(0, 10 - whole)
        text = f"{decimal_round(a, decimals):f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
        digits = text.replace(".", "").lstrip("0")
        if a >= 1e-4 or len(digits) >= len(f"{a:.6g}".split("e")[0].replace(".", "").lstrip("0")):
            return sign + text
    mantissa, exp = f"{a:.5E}".split("E")
    mantissa = mantissa.rstrip("0").rstrip(".")
    return f"{sign}{mantissa}E{exp[0]}{abs(int(exp)):02d}"


def _sections(fmt: str) -> list[str]:
    out, current, quoted, bracket, escape = [], [], False, False, False
    for ch in fmt:
        if escape:
            current.append(ch)
            escape = False
            continue
        if ch == "\\" and not quoted:
            escape = True
        elif ch == '"':
            quoted = not quoted
        elif ch == "[" and not quoted:
            bracket = True
        elif ch == "]" and not quoted:
            bracket = False
        elif ch == ";" and not quoted and not bracket:
            out.append("".join(current))
            current = []
            continue
        current.append(ch)
    out.append("".join(current))
    return out


def _pick(x: float, sections: list[str]) -> tuple[str, float]:
    """The section for ``x`` and the value it shows (negative sections show the magnitude)."""
    conditions = [_CONDITION.search(s) for s in sections]
    if any(conditions):
        for s, c in zip(sections, conditions):
            if c is None:
                continue
            op, limit = c.group(1), float(c.group(2))
            if {"<": x < limit, ">": x > limit, "=": x == limit, "<=": x <= limit, ">=": x >= limit,
                    "<>": x != limit}[op]:
                return s, (abs(x) if x < 0 and limit <= 0 and op in ("<", "<=") else x)
        rest = [s for s, c in zip(sections, conditions) if c is None and "@" not in s]
        return (rest[0], abs(x) if x < 0 else x) if rest else (sections[-1], x)
    numeric = sections[:3]
    if len(numeric) == 1 or x > 0 or (x == 0 and len(numeric) == 2):
        return numeric[0], x
    if x < 0:
        return numeric[1], -x
    return numeric[2], x


def _is_date(tokens: list[str]) -> bool:
    return any(t[0] in "yYdDhHsS" or t[0] in "mM" or t.upper() in ("AM/PM", "A/P") or
               (t.startswith("[") and t[1:2].lower() in ("h", "m", "s")) for t in tokens if t)


def _literal(t: str) -> str | None:
    if t.startswith('"'):
        return t[1:-1]
    if t.startswith("\\"):
        return t[1:]
    if t.startswith("_"):
        return " "
    if t.startswith("*") or t.startswith("["):
        return ""
    return None


def _date(x: float, tokens: list[str]) -> str | CellError:
    if not 0.0 <= x < LAST_SERIAL + 1:
        return CellError(VALUE, "the number is not a date TEXT can format")
    seconds_total = round(x * 86400.0, 3)
    day = int(seconds_total // 86400)
    secs = seconds_total - day * 86400
    y, mo, d = ymd(float(day))
    ampm = any(t.upper() in ("AM/PM", "A/P") for t in tokens)
    sub = None
    for t in tokens:
        if re.fullmatch(r"\.0+", t or ""):
            sub = len(t) - 1
    whole_secs = int(secs) if sub else int(round(secs))
    hh, mi, ss = whole_secs // 3600, whole_secs // 60 % 60, whole_secs % 60
    out = []
    last_time = None  # "h" or "s": an m next to them is minutes
    for i, t in enumerate(tokens):
        lit = _literal(t)
        if t.startswith("[") and t[1:2].lower() in ("h", "m", "s"):
            unit = t[1].lower()
            total = {"h": seconds_total / 3600, "m": seconds_total / 60, "s": seconds_total}[unit]
            out.append(str(int(total)).rjust(len(t) - 2, "0"))
            last_time = unit
            continue
        if lit is not None:
            out.append(lit)
            continue
        u = t.lower()
        if u[0] == "y":
            out.append(f"{y % 100:02d}" if len(u) <= 2 else f"{y:04d}")
        elif u[0] == "m" and u not in ("am/pm",):
            after_s = any(tt and tt[0].lower() == "s" for tt in tokens[i + 1:i + 3])
            if len(u) <= 2 and (last_time == "h" or after_s):
                out.append(f"{mi:02d}" if len(u) == 2 else str(mi))
            else:
                out.append(str(mo) if len(u) == 1 else f"{mo:02d}" if len(u) == 2 else _MONTHS[mo - 1][:3]
                           if len(u) == 3 else _MONTHS[mo - 1] if len(u) == 4 else _MONTHS[mo - 1][0])
        elif u[0] == "d":
            weekday = _DAYS[(day - 1) % 7] if day else _DAYS[6]
            out.append(str(d) if len(u) == 1 else f"{d:02d}" if len(u) == 2 else weekday[:3] if len(u) == 3 else weekday)
        elif u[0] == "h":
            h = hh % 12 or 12 if ampm else hh
            out.append(f"{h:02d}" if len(u) >= 2 else str(h))
            last_time = "h"
        elif u[0] == "s":
            out.append(f"{ss:02d}" if len(u) >= 2 else str(ss))
            last_time = "s"
        elif u == "am/pm":
            out.append(("AM" if hh < 12 else "PM") if t.isupper() or t == "AM/PM" else ("am" if hh < 12 else "pm"))
        elif u == "a/p":
            out.append(("A" if hh < 12 else "P") if t[0].isupper() else ("a" if hh < 12 else "p"))
        elif re.fullmatch(r"\.0+", t):
            frac = secs - int(secs)
            out.append("." + f"{frac:.{sub}f}"[2:])
        elif t == ".":
            out.append(".")
        else:
            out.append(t)
    return "".join(out)


def _number(x: float, tokens: list[str]) -> str:
    # placeholders before and after the decimal point; scaling commas; percent
    point = next((i for i, t in enumerate(tokens) if t == "."), None)
    digit_idx = [i for i, t in enumerate(tokens) if t in ("0", "#", "?")]
    if not digit_idx:
        return "".join(_literal(t) if _literal(t) is not None else ("" if t == "," else t) for t in tokens)
    last_digit = digit_idx[-1]
    first_digit = digit_idx[0]
    int_places = [i for i in digit_idx if point is None or i < point]
    dec_places = [i for i in digit_idx if point is not None and i > point]
    grouping = any(t == "," and first_digit < i < (point if point is not None else last_digit + 1)
                   and any(j > i for j in int_places) for i, t in enumerate(tokens))
    scale_commas = 0
    end = point if point is not None and not dec_places else last_digit
    j = (point if point is not None and not dec_places else last_digit) + 1
    while j < len(tokens) and tokens[j] == ",":
        scale_commas += 1
        j += 1
    x = x / 1000.0**scale_commas * 100.0 ** tokens.count("%")
    d = decimal_round(x, len(dec_places))
    whole, _, frac = f"{abs(d):f}".partition(".")
    frac = frac.ljust(len(dec_places), "0")
    whole = whole.lstrip("0")
    # integer digits from the right into the placeholders, the extra ones at the first
    int_out = {}
    digits = list(whole)
    for k, i in enumerate(reversed(int_places)):
        if digits:
            int_out[i] = digits.pop()
        else:
            int_out[i] = {"0": "0", "#": "", "?": " "}[tokens[i]]
    if digits and int_places:
        int_out[int_places[0]] = "".join(digits) + int_out[int_places[0]]
    if grouping:
        plain = "".join(int_out[i] for i in int_places).strip()
        grouped = f"{int(plain):,}" if plain.isdigit() else plain
        int_out = {i: "" for i in int_places}
        if int_places:
            int_out[int_places[0]] = grouped
    dec_out = {}
    keep = len(frac.rstrip("0"))
    for k, i in enumerate(dec_places):
        ch = frac[k]
        if k >= keep and tokens[i] != "0":
            ch = "" if tokens[i] == "#" else " "
        dec_out[i] = ch
    out = []
    for i, t in enumerate(tokens):
        if i in int_out:
            out.append(int_out[i])
        elif i in dec_out:
            out.append(dec_out[i])
        elif t == ".":
            out.append(".")
        elif t == ",":
            continue
        else:
            lit = _literal(t)
            out.append(lit if lit is not None else t)
    sign = "-" if d < 0 else ""
    return sign + "".join(out)


@lru_cache(maxsize=512)
def _tokens(section: str) -> list[str]:
    return [m.group() for m in _TOKEN.finditer(section)]


def apply_format(x: float, fmt: str) -> str | CellError:
    """``x`` formatted with an Excel number format code."""
    if fmt == "":
        return ""
    sections = _sections(fmt)
    section, value = _pick(x, sections)
    tokens = [t for t in _tokens(section) if not _CONDITION.fullmatch(t)]
    if not tokens:
        return ""
    if len(tokens) == 1 and tokens[0].upper() == "GENERAL" or section.strip().upper() == "GENERAL":
        return general(value)
    if "".join(tokens).upper().replace(" ", "").find("GENERAL") >= 0:
        rest = section.upper().replace("GENERAL", "\x00")
        return "".join(general(value) if ch == "\x00" else ch for ch in rest.replace('"', ""))
    if any(t in ("E+", "E-", "e+", "e-") for t in tokens) or "/" in [t for t in tokens if not _is_date([t])] and not _is_date(tokens):
        return CellError(VALUE, f'the format "{fmt}" is not supported')
    if _is_date(tokens):
        return _date(value, _merge_fraction(tokens))
    return _number(value, tokens)


def _merge_fraction(tokens: list[str]) -> list[str]:
    """Join ".", "0", "0" after seconds into one ".00" token."""
    out: list[str] = []
    for t in tokens:
        if t == "0" and out and re.fullmatch(r"\.0*", out[-1]):
            out[-1] += "0"
        else:
            out.append(t)
    return out


