"""The pieces of an Excel number format code: sections, tokens and the digit placeholders
that :mod:`numfmt`, :mod:`fracfmt` and :mod:`datefmt` fill.

A code has up to four sections (positive;negative;zero;text). Each section is a list of
tokens: literals (``"text"``, ``\\c``, ``_x`` as a space, plain characters such as ``$ - ( ) :``),
digit placeholders ``0 # ?``, the point, commas, ``%``, ``/``, exponents ``E+ E- e+ e-``,
``@``, ``General``, date and time codes (``y m d h s``, ``AM/PM``, ``A/P``) and bracketed
parts: conditions ``[<=100]``, elapsed times ``[h] [mm] [ss]``, currencies ``[$€-407]`` (the
symbol shows), colours and locales (ignored).

>>> [t.kind for t in tokenize('[Red][<=9]#,##0.0_)"x"')]
['skip', 'cond', 'digit', 'comma', 'digit', 'digit', 'digit', 'point', 'digit', 'lit', 'lit']
>>> fill_integer("????", "12345", True), fill_integer("00#", "", False)
(['12,', '3', '4', '5'], ['0', '0', ''])
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import NamedTuple


class Token(NamedTuple):
    kind: str  # lit skip cond elapsed digit fixed point comma percent slash exp at general date ampm
    text: str  # what a literal shows; the code itself for the others


_TOKEN = re.compile(
    r'"(?P<quoted>[^"]*)"?|\\(?P<escaped>.)|_(?P<pad>.)|\*(?P<fill>.)|\[(?P<bracket>[^\]]*)\]'
    r"|(?P<ampm>AM/PM|A/P)|(?P<general>General)|(?P<exp>E[+-])|(?P<date>Y+|M+|D+|H+|S+)"
    r"|(?P<digit>[0#?])|(?P<slash>/)(?P<fixed>[1-9][0-9]*)?|(?P<other>.)",
    re.DOTALL | re.IGNORECASE)
_CONDITION = re.compile(r"\s*(<=|>=|<>|<|>|=)\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*\Z")
_ELAPSED = re.compile(r"(?:h+|m+|s+)\Z", re.IGNORECASE)
_SINGLE = {".": "point", ",": "comma", "%": "percent", "@": "at"}
_PAD = {"0": "0", "#": "", "?": " "}


def _bracket(text: str) -> Token:
    if _CONDITION.match(text):
        return Token("cond", text)
    if _ELAPSED.match(text):
        return Token("elapsed", text.lower())
    if text.startswith("$"):  # [$€-407]: the currency symbol shows, the locale after "-" does not
        return Token("lit", text[1:].split("-", 1)[0])
    return Token("skip", text)  # colours, [Color10], [DBNum1] and the like change no character


def _token(m: re.Match) -> list[Token]:
    kind = m.lastgroup
    if kind == "fixed":  # "/8": a slash and a fixed denominator
        return [Token("slash", "/"), Token("fixed", m.group("fixed"))]
    if kind in ("quoted", "escaped"):
        return [Token("lit", m.group(kind))]
    if kind == "pad":
        return [Token("lit", " ")]  # _x leaves the width of x: one space in a text
    if kind == "fill":
        return [Token("skip", m.group())]  # *x repeats x to fill the cell: nothing in a text
    if kind == "bracket":
        return [_bracket(m.group("bracket"))]
    if kind == "other":
        ch = m.group()
        return [Token(_SINGLE.get(ch, "lit"), ch)]
    return [Token(kind, m.group())]


@lru_cache(maxsize=512)
def tokenize(section: str) -> tuple[Token, ...]:
    """The tokens of one section of a format code."""
    return tuple(t for m in _TOKEN.finditer(section) for t in _token(m))


def split_sections(fmt: str) -> list[str]:
    """The sections of a format code, split at the semicolons outside quotes and brackets."""
    out, current, quoted, bracket, escape = [], [], False, False, False
    for ch in fmt:
        if escape:
            escape = False
        elif ch == "\\" and not quoted:
            escape = True
        elif ch == '"':
            quoted = not quoted
        elif ch in "[]" and not quoted:
            bracket = ch == "["
        elif ch == ";" and not quoted and not bracket:
            out.append("".join(current))
            current = []
            continue
        current.append(ch)
    out.append("".join(current))
    return out


def condition(tokens: tuple[Token, ...]) -> tuple[str, float] | None:
    """The section's condition as (operator, limit), if it has one."""
    for t in tokens:
        if t.kind == "cond":
            m = _CONDITION.match(t.text)
            return m.group(1), float(m.group(2))
    return None


def literal(t: Token) -> str:
    """What a token that is not a placeholder shows."""
    return "" if t.kind in ("skip", "cond") else t.text


def fill_integer(places: str, digits: str, grouping: bool) -> list[str]:
    """The text of each integer placeholder (``places``, e.g. ``"#0?"``) for ``digits`` (no
    leading zeros; "" for zero): digits fill from the right, the first placeholder takes the
    extra ones, unfilled ``0`` shows 0, ``?`` a space, ``#`` nothing; with ``grouping`` a
    separator follows every third position from the right, a comma among digits and zeros,
    a space after a ``?`` space and nothing after an empty ``#``."""
    if not places:
        return []
    out = [""] * len(places)
    width = max(len(places), len(digits))
    for p in range(width, 0, -1):  # p: the position counted from the right
        k = len(places) - p
        kind = "0" if p <= len(digits) else places[k]
        text = digits[len(digits) - p] if p <= len(digits) else _PAD[kind]
        if grouping and p > 1 and (p - 1) % 3 == 0:
            text += {"0": ",", "?": " ", "#": ""}[kind]
        out[max(k, 0)] += text
    return out


def fill_decimals(places: str, digits: str) -> list[str]:
    """The text of each placeholder after the point for ``digits`` (as many as places):
    trailing zeros show as 0 under ``0``, a space under ``?`` and nothing under ``#``."""
    keep = len(digits.rstrip("0"))
    last_zero = places.rfind("0")  # a 0 placeholder keeps every digit before it
    return [d if k < keep or k <= last_zero else _PAD[places[k]] for k, d in enumerate(digits)]
