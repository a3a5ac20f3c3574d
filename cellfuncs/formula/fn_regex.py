"""Built-in regular-expression functions: REGEXTEST, REGEXEXTRACT, REGEXREPLACE.

Excel's patterns are PCRE2's; they run here on the ``regex`` package (Python's ``re``
syntax plus Unicode properties ``\\p{Lu}``, atomic groups and possessive quantifiers, and a
time limit, which ``re`` lacks: a pattern that backtracks without end, such as ``(x+x+)+y``,
would otherwise hang the recalculation). PCRE2's spellings it lacks are translated: named
groups ``(?<name>...)`` and ``(?'name'...)``, back references ``\\k<name>``, the anchors
``\\z`` (the very end) and ``\\Z`` (the end or before a final newline). Replacements use
PCRE2's ``$1``, ``${1}``, ``${name}`` and ``$$``. A pattern that does not compile, or one
match that takes longer than :data:`TIME_LIMIT`, is #VALUE!.

>>> from cellfuncs.formula import compute
>>> compute('=REGEXTEST("Sherlock", "^[A-Z]")'), compute('=REGEXEXTRACT("10 apples, 12 pears", "[0-9]+", 1)').tolist()
(True, [['10', '12']])
>>> compute('=REGEXREPLACE("JamesBond", "([A-Z][a-z]+)([A-Z][a-z]+)", "$2, $1 $2")')
'Bond, James Bond'
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import Any, Callable

import numpy as np

from ..errors import NA, VALUE, CellError
from .arrays import Value, as_array, elementwise, map_values
from .budget import charge, text_error
from .coerce import to_number, to_text
from .evaluate import builtin
from .fn_shape import whole
from .fn_strings import zero_or_one
from .nodes import Scalar

_ESCAPES = {"z": r"\Z", "Z": r"(?=\n?\Z)"}  # PCRE2's end anchors in re's spelling
_NAMED_REFERENCE = re.compile(r"\\k(?:<(\w+)>|\{(\w+)\}|'(\w+)')")
_NAMED_GROUP = re.compile(r"\(\?(?:<(?![=!])(\w+)>|'(\w+)')")


def python_pattern(pattern: str) -> str:
    """A PCRE2 pattern in the spelling of Python's ``re``.

    >>> python_pattern(r"(?<year>\\d{4})-\\k<year>\\z"), python_pattern(r"[\\z]\\\\z(?<=a)")
    ('(?P<year>\\\\d{4})-(?P=year)\\\\Z', '[\\\\z]\\\\\\\\z(?<=a)')
    """
    out, i, in_class = [], 0, False
    while i < len(pattern):
        ch = pattern[i]
        if ch == "\\" and i + 1 < len(pattern):
            ref = None if in_class else _NAMED_REFERENCE.match(pattern, i)
            if ref:
                out.append(f"(?P={ref.group(1) or ref.group(2) or ref.group(3)})")
                i = ref.end()
                continue
            nxt = pattern[i + 1]
            out.append(_ESCAPES[nxt] if nxt in _ESCAPES and not in_class else ch + nxt)
            i += 2
            continue
        group = None if in_class else _NAMED_GROUP.match(pattern, i)
        if group:
            out.append(f"(?P<{group.group(1) or group.group(2)}>")
            i = group.end()
            continue
        if ch == "[" and not in_class:
            in_class = True
            out.append(pattern[i:i + 2] if pattern[i + 1:i + 2] == "]" else ch)  # "[]...]" holds a "]"
            i += 2 if pattern[i + 1:i + 2] == "]" else 1
            continue
        in_class = in_class and ch != "]"
        out.append(ch)
        i += 1
    return "".join(out)


TIME_LIMIT = 0.25  # seconds one match may take
_TOO_SLOW = CellError(VALUE, f"the pattern takes longer than {TIME_LIMIT} s to match (it backtracks without end)")


@lru_cache(maxsize=256)
def _compiled(pattern: str, ignore_case: bool) -> Any:
    # imported here so that only workbooks with patterns pay for it
    import regex  # pylint: disable=import-outside-toplevel

    try:
        return regex.compile(python_pattern(pattern), regex.IGNORECASE if ignore_case else 0)
    except (regex.error, RecursionError) as exc:
        return CellError(VALUE, f"the pattern does not compile: {exc}")


def _first(pattern: Any, t: str) -> Any:
    """The first match (None if none), or the error when matching takes too long."""
    try:
        return pattern.search(t, timeout=TIME_LIMIT)
    except TimeoutError:
        return _TOO_SLOW


def _every(pattern: Any, t: str) -> list | CellError:
    try:
        return list(pattern.finditer(t, timeout=TIME_LIMIT))
    except TimeoutError:
        return _TOO_SLOW


def _regex(pattern: Scalar, case_sensitivity: Scalar) -> Any:
    """The compiled pattern; ``case_sensitivity`` 0 (default) matches case, 1 ignores it."""
    p = to_text(pattern)
    if type(p) is CellError:
        return p
    fold = zero_or_one(case_sensitivity, "case_sensitivity")
    return fold if type(fold) is CellError else _compiled(p, bool(fold))


def _searched(text: Scalar, pattern: Scalar, case_sensitivity: Scalar) -> tuple[str, Any] | CellError:
    t = to_text(text)
    if type(t) is CellError:
        return t
    regex = _regex(pattern, case_sensitivity)
    return regex if type(regex) is CellError else (t, regex)


@builtin("REGEXTEST", 2, 3)
@elementwise
def regextest(text: Scalar, pattern: Scalar, case_sensitivity: Scalar = None) -> Scalar:
    """TRUE when ``pattern`` matches some part of ``text``.

    >>> regextest("Mr. Holmes", "[0-9]+"), regextest("abc", "B", 1.0)
    (False, True)
    """
    found = _searched(text, pattern, case_sensitivity)
    if type(found) is CellError:
        return found
    first = _first(found[1], found[0])
    return first if first is _TOO_SLOW else first is not None


def _row(texts: list[str]) -> Value:
    """Texts as a one-row array (one text as itself)."""
    if len(texts) == 1:
        return texts[0]
    out = charge((1, len(texts))) or np.empty((1, len(texts)), dtype=object)
    if type(out) is not CellError:
        out.flat[:] = texts
    return out


def _extracted(text: Scalar, pattern: Scalar, mode: Scalar, case_sensitivity: Scalar) -> Value:
    found = _searched(text, pattern, case_sensitivity)
    if type(found) is CellError:
        return found
    t, regex = found
    how = whole(0.0 if mode is None else mode, "REGEXEXTRACT's return_mode")
    if type(how) is CellError:
        return how
    if how not in (0, 1, 2):
        return CellError(VALUE, f"REGEXEXTRACT's return_mode must be 0, 1 or 2, not {how}")
    first = _first(regex, t)
    if first is None or first is _TOO_SLOW:
        return first or CellError(NA, "the pattern matches no part of the text")
    if how == 0:
        return first.group()
    if how == 1:
        every = _every(regex, t)
        return every if type(every) is CellError else _row([m.group() for m in every])
    if not regex.groups:
        return CellError(NA, "the pattern has no capturing groups")
    return _row([g or "" for g in first.groups()])


@builtin("REGEXEXTRACT", 2, 4)
def regexextract(text: Value, pattern: Value, return_mode: Value = None, case_sensitivity: Value = None) -> Value:
    """The part of ``text`` the pattern matches first (``return_mode`` 0), every match as a row
    (1) or the capturing groups of the first match as a row (2); #N/A when nothing matches.
    Over an array of texts, each gives its first value.

    >>> regexextract("O my Luve red rose", r"O my (\\w+) red (\\w+)", 2.0).tolist()
    [['Luve', 'rose']]
    """
    args = (text, pattern, return_mode, case_sensitivity)
    if not any(type(v) is np.ndarray for v in args):
        return _extracted(*args)
    return map_values(lambda *xs: as_array(_extracted(*xs))[0, 0], *args)


def _substitution(replacement: str, regex: Any) -> Callable[[Any], str] | CellError:
    """PCRE2's replacement text as a function of the match: ``$n``, ``${n}``, ``${name}``,
    ``$name`` insert a group (an unmatched one as nothing), ``$$`` a dollar sign."""
    parts: list[str | int] = []
    for piece in re.split(r"(\$(?:\$|\d+|\{\w+\}|[A-Za-z_]\w*)?)", replacement):
        if not piece.startswith("$"):
            parts.append(piece)
            continue
        name = piece[1:].strip("{}")
        if name == "$":
            parts.append("$")
        elif not name:
            return CellError(VALUE, "a $ in the replacement names no group")
        else:
            group = int(name) if name.isdigit() else regex.groupindex.get(name)
            if group is None or group > regex.groups:
                return CellError(VALUE, f"the replacement names group {name}, which the pattern lacks")
            parts.append(group)
    return lambda m: "".join(p if type(p) is str else (m.group(p) or "") for p in parts)


def _replaced(t: str, regex: Any, insert: Callable[[Any], str], occurrence: int) -> str | CellError:
    """``t`` with every match replaced (``occurrence`` 0) or only the n-th (negative: from the
    end); the length is counted as it grows, so a result no cell holds is never built."""
    matches = _every(regex, t)
    if type(matches) is CellError:
        return matches
    if occurrence:
        at = occurrence - 1 if occurrence > 0 else occurrence
        matches = matches[at:at + 1 or None] if -len(matches) <= at < len(matches) else []
    pieces, end, size = [], 0, len(t)
    for m in matches:
        piece = insert(m)
        size += len(piece) - (m.end() - m.start())
        over = text_error(size)
        if over is not None:
            return over
        pieces += [t[end:m.start()], piece]
        end = m.end()
    return "".join(pieces) + t[end:]


@builtin("REGEXREPLACE", 3, 5)
@elementwise
def regexreplace(text: Scalar, pattern: Scalar, replacement: Scalar, occurrence: Scalar = None,
                 case_sensitivity: Scalar = None) -> Scalar:
    """``text`` with the matches of ``pattern`` replaced: all (``occurrence`` 0, the default) or
    the n-th only (negative: counted from the end).

    >>> regexreplace("a1b22c", "[0-9]+", "#"), regexreplace("a1b22c", "[0-9]+", "#", -1.0)
    ('a#b#c', 'a1b#c')
    """
    found = _searched(text, pattern, case_sensitivity)
    if type(found) is CellError:
        return found
    t, regex = found
    new = to_text(replacement)
    n = to_number(0.0 if occurrence is None else occurrence)
    for x in (new, n):
        if type(x) is CellError:
            return x
    insert = _substitution(new, regex)
    if type(insert) is CellError:
        return insert
    return _replaced(t, regex, insert, int(n))
