"""Excel number format codes as TEXT() applies them: up to four sections
(positive;negative;zero;text) or conditional ones (``[<=9999999]``), colours and locales
(ignored), currencies (``[$€-407]``), literals (``"text"``, ``\\c``, ``_x`` as a space, ``*x``
dropped), digit placeholders ``0 # ?`` with thousands separators and scaling commas, percent,
scientific notation, fractions (:mod:`fracfmt`), dates and times (:mod:`datefmt`), ``@`` and
the General format's 11-character rule.

A section for negative numbers shows the magnitude; a single section puts a minus sign
before everything, unless the number rounds to zero in it.

>>> apply_format(1234.5, '#,##0.00_);(#,##0.00)'), apply_format(-5.0, '0;(0)'), apply_format(45293.75, "dddd d mmm yyyy h:mm AM/PM")
('1,234.50 ', '(5)', 'Tuesday 2 Jan 2024 6:00 PM')
>>> apply_format(1 / 3, "General"), apply_format(123456789012.0, "General"), apply_format(5.0, '[<10]"small";"big"')
('0.333333333', '1.23457E+11', 'small')
>>> apply_format(123456.789, "##0.0E+0"), apply_format(-0.2, "0"), apply_format(1.75, "# ?/?")
('123.5E+3', '0', '1 3/4')
>>> apply_text("ab", ';;;"<"@">"'), apply_text("ab", "0.00")
('<ab>', 'ab')
"""

from __future__ import annotations

import math
from decimal import ROUND_HALF_UP, Decimal
from functools import lru_cache
from typing import NamedTuple

from ..errors import NUM, VALUE, CellError
from .coerce import decimal_round, format_number
from .datefmt import is_valid_date, render_date
from .fmtcode import Token, condition, fill_decimals, fill_integer, literal, split_sections, tokenize
from .fracfmt import is_fraction, render_fraction


class Section(NamedTuple):
    tokens: tuple[Token, ...]
    condition: tuple[str, float] | None
    kind: str  # general, number, scientific, fraction, date or literal


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


def _kind(tokens: tuple[Token, ...]) -> str | None:
    """What a section shows; None for a section Excel refuses (date codes mixed with digits)."""
    kinds = {t.kind for t in tokens}
    if "general" in kinds:
        return "general"
    if kinds & {"date", "ampm", "elapsed"}:
        return "date" if is_valid_date(tokens) else None
    if "digit" not in kinds:
        return "literal"
    if is_fraction(tokens):
        return "fraction"
    exp = next((i for i, t in enumerate(tokens) if t.kind == "exp"), None)
    if exp is not None and any(t.kind == "digit" for t in tokens[exp:]):
        return "scientific"
    return "number"


@lru_cache(maxsize=512)
def parse(fmt: str) -> tuple[Section, ...] | CellError:
    """The sections of a format code, or #VALUE! for a code Excel does not accept."""
    texts = split_sections(fmt)
    if len(texts) > 4:
        return CellError(VALUE, f'the format "{fmt}" has more than four sections')
    sections = []
    for text in texts:
        tokens = tokenize(text)
        kind = _kind(tokens)
        if kind is None:
            return CellError(VALUE, f'the format "{fmt}" mixes date codes and digit placeholders')
        sections.append(Section(tokens, condition(tokens), kind))
    return tuple(sections)


def _holds(x: float, cond: tuple[str, float]) -> bool:
    op, limit = cond
    return {"<": x < limit, ">": x > limit, "=": x == limit, "<=": x <= limit, ">=": x >= limit, "<>": x != limit}[op]


def _pick_conditional(x: float, numeric: tuple[Section, ...]) -> tuple[Section | None, float]:
    """The first section whose condition holds (a condition for negative numbers shows the
    magnitude), else the first without a condition (showing the magnitude); None when no
    section applies, and the number shows in General."""
    for s in numeric:
        if s.condition and _holds(x, s.condition):
            op, limit = s.condition
            return s, (-x if x < 0 and limit <= 0 and op in ("<", "<=") else x)
    rest = [s for s in numeric if s.condition is None]
    return (rest[0], abs(x)) if rest else (None, x)


def _pick(x: float, sections: tuple[Section, ...]) -> tuple[Section | None, float]:
    """The section for ``x`` and the value it shows: negative only where a minus sign leads."""
    numeric = sections[:3]  # a fourth section is for text
    if any(s.condition for s in numeric[:2]):
        return _pick_conditional(x, numeric)
    if len(numeric) == 1 or x > 0 or (x == 0 and len(numeric) == 2):
        return numeric[0], x
    if x < 0:
        return numeric[1], -x
    return numeric[2], 0.0


def _commas(tokens: tuple[Token, ...], ints: list[int], out: list[str]) -> tuple[bool, int]:
    """(thousands separators?, scaling by 1000s): a comma between integer placeholders
    groups, one after the placeholders divides by 1000, one before all of them is text."""
    grouping, scale, seen_digit = False, 0, False
    for i, t in enumerate(tokens):
        seen_digit = seen_digit or t.kind == "digit"
        if t.kind != "comma" or not seen_digit:
            continue
        out[i] = ""
        if any(j > i for j in ints):
            grouping = True
        else:
            scale += 1
    return grouping, scale


def _split(tokens: tuple[Token, ...], end: int) -> tuple[list[int], list[int]]:
    """The placeholders before ``end`` on either side of the first point."""
    point = next((i for i, t in enumerate(tokens[:end]) if t.kind == "point"), end)
    digits = [i for i, t in enumerate(tokens[:end]) if t.kind == "digit"]
    return [i for i in digits if i < point], [i for i in digits if i > point]


def _places(tokens: tuple[Token, ...], indices: list[int]) -> str:
    return "".join(tokens[i].text for i in indices)


def _put(out: list[str], indices: list[int], texts: list[str]) -> None:
    for i, text in zip(indices, texts):
        out[i] = text


def _digits(d: Decimal, decimals: int) -> tuple[str, str]:
    """The integer digits (none for zero) and ``decimals`` decimal digits of ``d``."""
    whole, _, frac = f"{d:f}".partition(".")
    return whole.lstrip("0"), frac.ljust(decimals, "0")


def _number(tokens: tuple[Token, ...], x: float) -> str | CellError:
    """``x`` in a section of digit placeholders, rounded half away from zero at its decimals."""
    ints, decs = _split(tokens, len(tokens))
    out = [literal(t) for t in tokens]
    grouping, scale = _commas(tokens, ints, out)
    v = abs(x) / 1000.0**scale * 100.0 ** sum(t.kind == "percent" for t in tokens)
    if not math.isfinite(v):
        return CellError(NUM, "the number is too large to format")
    d = decimal_round(v, len(decs))
    whole, frac = _digits(d, len(decs))
    _put(out, ints, fill_integer(_places(tokens, ints), whole, grouping))
    if not ints and whole:  # no placeholder before the point: the digits show there anyway
        point = next(i for i, t in enumerate(tokens) if t.kind == "point")
        out[point] = whole + "."
    _put(out, decs, fill_decimals(_places(tokens, decs), frac))
    return ("-" if x < 0 and d else "") + "".join(out)


def _mantissa(v: float, whole_places: int, decimals: int) -> tuple[Decimal, int]:
    """(mantissa rounded to ``decimals``, exponent): with several placeholders before the
    point the exponent is a multiple of their number (##0.0E+0 is engineering notation)."""
    if v == 0.0:
        return Decimal(0), 0
    d = Decimal(f"{v:.15g}")
    step = Decimal(1).scaleb(-decimals)
    limit = 10**whole_places
    for e10 in (d.adjusted(), d.adjusted() + 1):  # the second when rounding carried a digit
        exp = e10 + 1 if whole_places == 0 else e10 // whole_places * whole_places
        m = d.scaleb(-exp).quantize(step, rounding=ROUND_HALF_UP)
        if m < limit:
            break
    return m, exp


def _scientific(tokens: tuple[Token, ...], x: float) -> str:
    """``x`` in a section with an exponent; ``%`` shows without scaling and commas outside
    the mantissa's integer placeholders are dropped (as Excel's stored values have it)."""
    e = next(i for i, t in enumerate(tokens) if t.kind == "exp")
    ints, decs = _split(tokens, e)
    out = [literal(t) if t.kind != "comma" else "" for t in tokens]
    grouping, _ = _commas(tokens[:e], ints, out)
    m, exp = _mantissa(abs(x), len(ints), len(decs))
    whole, frac = _digits(m, len(decs))
    places = _places(tokens, ints) if m else "0" * len(ints)  # zero shows 0 under every placeholder
    _put(out, ints, fill_integer(places, whole, grouping))
    _put(out, decs, fill_decimals(_places(tokens, decs), frac))
    exps = [i for i in range(e + 1, len(tokens)) if tokens[i].kind == "digit"]
    _put(out, exps, fill_integer(_places(tokens, exps), str(abs(exp)), False))
    out[e] = tokens[e].text[0]
    sign = "-" if exp < 0 else "+" if tokens[e].text[1] == "+" else ""
    out[exps[0]] = sign + out[exps[0]]  # the sign goes with the digits, after any text
    return ("-" if x < 0 and m else "") + "".join(out)


def _literal(tokens: tuple[Token, ...], x: float) -> str:
    """A section without placeholders: its text, General's digits for ``General`` and the
    number as text for ``@``."""
    shown = {"general": general(abs(x)), "at": format_number(abs(x))}
    return ("-" if x < 0 else "") + "".join(shown.get(t.kind, literal(t)) for t in tokens)


def _render(section: Section, x: float) -> str | CellError:
    if section.kind == "number":
        return _number(section.tokens, x)
    if section.kind == "scientific":
        return _scientific(section.tokens, x)
    if section.kind == "fraction":
        return render_fraction(section.tokens, x)
    if section.kind == "date":
        return render_date(section.tokens, x)
    return _literal(section.tokens, x)


def apply_format(x: float, fmt: str) -> str | CellError:
    """``x`` formatted with an Excel number format code."""
    if fmt == "":
        return ""
    sections = parse(fmt)
    if type(sections) is CellError:
        return sections
    section, value = _pick(x, sections)
    return general(value) if section is None else _render(section, value)


def apply_text(text: str, fmt: str) -> str | CellError:
    """A text formatted with an Excel number format code: the fourth section (or a lone
    section with ``@``) shows it at each ``@``; other codes leave it unchanged."""
    sections = parse(fmt)
    if type(sections) is CellError:
        return sections
    if len(sections) == 4:
        section = sections[3]
    elif len(sections) == 1 and any(t.kind == "at" for t in sections[0].tokens):
        section = sections[0]
    else:
        return text
    return "".join(text if t.kind == "at" else literal(t) for t in section.tokens)
