"""Fractions in Excel number formats: ``# ?/?``, ``# ??/??``, fixed denominators such as
``# ?/8`` or ``?/100``, and improper fractions when no placeholder precedes the numerator.

The numerator is the run of placeholders nearest before the slash, the denominator the run
(or the number) right after it; any placeholders before the numerator show the whole part.

>>> from .fmtcode import tokenize
>>> [render_fraction(tokenize(f), x) for f, x in [("# ?/?", 1.5), ("# ??/??", 0.3333), ("?/8", 2.3), ("# ?/?", -3.0)]]
['1 1/2', '  1/3 ', '18/8', '-3    ']
"""

from __future__ import annotations

from decimal import ROUND_HALF_UP, Decimal
from fractions import Fraction
from typing import NamedTuple

from .fmtcode import Token, fill_integer, literal


class _Layout(NamedTuple):
    whole: list[int]  # token indices of the whole part's placeholders
    numerator: list[int]
    denominator: list[int]  # the placeholders after the slash, or the one fixed-number token


def _slash(tokens: tuple[Token, ...]) -> int | None:
    """The fraction's slash: one with a placeholder somewhere before it and, past any
    literals, a placeholder or a fixed denominator after it."""
    seen_digit = False
    for i, t in enumerate(tokens):
        if t.kind == "slash" and seen_digit and _first_digit(tokens, i + 1) is not None:
            return i
        seen_digit = seen_digit or t.kind == "digit"
    return None


def _first_digit(tokens: tuple[Token, ...], start: int) -> int | None:
    for j in range(start, len(tokens)):
        if tokens[j].kind in ("digit", "fixed"):
            return j
        if tokens[j].kind != "lit":
            return None
    return None


def is_fraction(tokens: tuple[Token, ...]) -> bool:
    """Whether a section shows a fraction: a slash with placeholders before and after it."""
    return _slash(tokens) is not None


def _layout(tokens: tuple[Token, ...]) -> _Layout:
    slash = _slash(tokens)
    first = j = _first_digit(tokens, slash + 1)
    if tokens[j].kind == "fixed":
        denominator = [j]
    else:
        while j < len(tokens) and tokens[j].kind == "digit":
            j += 1
        denominator = list(range(first, j))
    end = max(i for i in range(slash) if tokens[i].kind == "digit")
    start = end
    while start > 0 and tokens[start - 1].kind == "digit":
        start -= 1
    whole = [i for i in range(start) if tokens[i].kind == "digit"]
    return _Layout(whole, list(range(start, end + 1)), denominator)


def _places(tokens: tuple[Token, ...], indices: list[int]) -> str:
    return "".join(tokens[i].text for i in indices)


def _approximate(part: Decimal, tokens: tuple[Token, ...], layout: _Layout) -> tuple[int, int]:
    """(numerator, denominator) nearest to ``part``: over the fixed denominator, or the
    closest fraction whose denominator has no more digits than its placeholders."""
    first = tokens[layout.denominator[0]]
    if first.kind == "fixed":
        den = int(first.text)
        return int((part * den).to_integral_value(rounding=ROUND_HALF_UP)), den
    f = Fraction(part).limit_denominator(10 ** len(layout.denominator) - 1)
    return f.numerator, f.denominator


def _denominator(places: str, den: int) -> str:
    """A denominator aligned to the left of its placeholders: unfilled ``0`` places pad with
    zeros before it, ``?`` places with spaces after it."""
    digits = str(den)
    spare = places[: max(0, len(places) - len(digits))]
    return "0" * spare.count("0") + digits + " " * spare.count("?")


def render_fraction(tokens: tuple[Token, ...], x: float) -> str:
    """``x`` in a fraction section; a minus sign leads when ``x`` is negative and not shown as 0."""
    layout = _layout(tokens)
    v = Decimal(f"{abs(x):.15g}")
    whole = int(v) if layout.whole else 0
    num, den = _approximate(v - whole, tokens, layout)
    if layout.whole and num == den:  # the fraction rounded up to one
        whole, num = whole + 1, 0
    out = [literal(t) for t in tokens]
    num_places = _places(tokens, layout.numerator)
    shown = num != 0 or not layout.whole or "0" in num_places
    if shown:
        _fill_fraction(tokens, layout, out, num, den)
    else:
        _blank_fraction(tokens, layout, out)
    _fill_whole(tokens, layout, out, whole, num)
    sign = "-" if x < 0 and (whole or num) else ""
    return sign + "".join(out)


def _fill_fraction(tokens: tuple[Token, ...], layout: _Layout, out: list[str], num: int, den: int) -> None:
    for i, text in zip(layout.numerator, fill_integer(_places(tokens, layout.numerator), str(num), False)):
        out[i] = text
    first = layout.denominator[0]
    out[first] = str(den) if tokens[first].kind == "fixed" else _denominator(_places(tokens, layout.denominator), den)
    for i in layout.denominator[1:]:
        out[i] = ""


def _blank_fraction(tokens: tuple[Token, ...], layout: _Layout, out: list[str]) -> None:
    """A zero fraction after a whole number: its text (from after the whole part to the end
    of the denominator) gives way to as many spaces when a ``?`` holds a place in the
    section, else to nothing."""
    start = layout.whole[-1] + 1
    end = layout.denominator[-1] + 1
    width = sum(len(out[i]) if tokens[i].kind not in ("digit", "fixed") else len(tokens[i].text)
                for i in range(start, end))
    places = _places(tokens, layout.whole + layout.numerator + layout.denominator)
    for i in range(start, end):
        out[i] = ""
    out[start] = " " * width if "?" in places else ""


def _fill_whole(tokens: tuple[Token, ...], layout: _Layout, out: list[str], whole: int, num: int) -> None:
    """The whole part: no digit for a zero before a fraction (a lone 0 when the fraction
    shows 0 too, where ``?`` shows 0); the text between the whole part and the numerator
    goes when no digit shows (as spaces if a ``?`` holds the place)."""
    if not layout.whole:
        return
    places = _places(tokens, layout.whole)
    if num == 0 and whole == 0 and "0" in _places(tokens, layout.numerator):
        places = places.replace("?", "0")
        digits = ""
    else:
        digits = str(whole) if whole or num == 0 else ""
    texts = fill_integer(places, digits, False)
    for i, text in zip(layout.whole, texts):
        out[i] = text
    if any(ch.isdigit() for ch in "".join(texts)):
        return
    spaces = "?" in places or "?" in _places(tokens, layout.numerator)
    for i in range(layout.whole[-1] + 1, layout.numerator[0]):
        out[i] = " " * len(out[i]) if spaces else ""
