"""Built-in text manipulation: LEFT, RIGHT, MID, LEN, UPPER, LOWER, PROPER, TRIM, CLEAN,
SUBSTITUTE, REPLACE, REPT, FIND, SEARCH, EXACT, CHAR, CODE, UNICHAR, UNICODE,
CONCATENATE, TEXTJOIN, T, VALUE, TEXTBEFORE, TEXTAFTER, TEXTSPLIT.

Arguments are converted to text as Excel does (numbers in the General format, TRUE as
"TRUE"); character codes are those of Windows code page 1252, as Excel for Windows uses.

>>> from cellfuncs.formula import compute
>>> compute('=LEFT("steam", 2)&MID("steam", 3, 2)'), compute('=SUBSTITUTE("a-b-c", "-", "+", 2)')
('stea', 'a-b+c')
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

import numpy as np

from ..errors import NA, VALUE, CellError
from .arrays import Value, as_array, elementwise, map_values
from .budget import MAX_TEXT  # the most characters a cell holds
from .coerce import fold, to_bool, to_number, to_text
from .evaluate import builtin
from .fn_lookup import wildcard
from .fn_shape import built, flag, padding, single
from .fn_text import texts
from .nodes import Scalar



def _count(v: Scalar, what: str, least: float = 0.0) -> int | CellError:
    x = to_number(v)
    if type(x) is CellError:
        return x
    if x < least:
        return CellError(VALUE, f"{what} {to_text(x)} is below {to_text(least)}")
    return int(min(x, 2.0**31))


def _texts(*values: Scalar) -> list[str] | CellError:
    out = []
    for v in values:
        t = to_text(v)
        if type(t) is CellError:
            return t
        out.append(t)
    return out


def _text_function(name: str, min_args: int, max_args: int):
    """Register ``fn(text, *numbers)`` element-wise: the text converted first, errors first."""

    def register(fn):
        def scalar(text: Scalar, *rest: Scalar) -> Scalar:
            t = to_text(text)
            if type(t) is CellError:
                return t
            for r in rest:
                if type(r) is CellError:
                    return r
            return fn(t, *rest)

        scalar.__doc__ = fn.__doc__
        builtin(name, min_args, max_args)(elementwise(scalar))
        return fn

    return register


@_text_function("LEFT", 1, 2)
def left(text: str, n: Scalar = 1.0) -> str | CellError:
    """The first ``n`` characters (default 1; a blank count is 0).

    >>> left("abc", 2.0), left("12345", 3.0), left("abc", None)
    ('ab', '123', '')
    """
    k = _count(n, "LEFT's count")
    return k if type(k) is CellError else text[:k]


@_text_function("RIGHT", 1, 2)
def right(text: str, n: Scalar = 1.0) -> str | CellError:
    """The last ``n`` characters (default 1; a blank count is 0).

    >>> right("abc", 2.0), right("abc", 0.0), right("abc", 5.0)
    ('bc', '', 'abc')
    """
    k = _count(n, "RIGHT's count")
    if type(k) is CellError:
        return k
    return text[max(len(text) - k, 0):] if k else ""


@_text_function("MID", 3, 3)
def mid(text: str, start: Scalar, n: Scalar) -> str | CellError:
    """``n`` characters from position ``start`` (1-based).

    >>> mid("phase", 2.0, 3.0), mid("phase", 9.0, 3.0)
    ('has', '')
    """
    s = _count(start, "MID's start", 1.0)
    if type(s) is CellError:
        return s
    k = _count(n, "MID's count")
    return k if type(k) is CellError else text[s - 1:s - 1 + k]


@_text_function("LEN", 1, 1)
def len_(text: str) -> float:
    """The number of characters.

    >>> len_("water")
    5.0
    """
    return float(len(text))


builtin("UPPER", 1)(elementwise(lambda v: t.upper() if type(t := to_text(v)) is str else t))
builtin("LOWER", 1)(elementwise(lambda v: t.lower() if type(t := to_text(v)) is str else t))


@_text_function("PROPER", 1, 1)
def proper(text: str) -> str:
    """Each run of letters with its first letter capitalised, the rest in lower case.

    >>> proper("this is a TITLE, 2-way")
    'This Is A Title, 2-Way'
    """
    return re.sub(r"[^\W\d_]+", lambda m: m.group().capitalize(), text)


@_text_function("TRIM", 1, 1)
def trim(text: str) -> str:
    """Spaces removed at both ends and runs of spaces inside cut to one (other white space stays).

    >>> trim("  a   b  ")
    'a b'
    """
    return re.sub(" +", " ", text.strip(" "))


@_text_function("CLEAN", 1, 1)
def clean(text: str) -> str:
    """The text without the control characters 0 to 31.

    >>> clean("a\\x07b\\n")
    'ab'
    """
    return re.sub("[\x00-\x1f]", "", text)


@builtin("SUBSTITUTE", 3, 4)
@elementwise
def substitute(text: Scalar, old: Scalar, new: Scalar, instance: Scalar = None) -> Scalar:
    """``text`` with ``old`` replaced by ``new``: every occurrence, or only the ``instance``-th.

    >>> substitute("aaa", "a", "b"), substitute("aaa", "a", "b", 2.0), substitute("abc", "", "x")
    ('bbb', 'aba', 'abc')
    """
    parts = _texts(text, old, new)
    if type(parts) is CellError:
        return parts
    t, o, n = parts
    if instance is None:
        if not o:
            return t
        if len(t) + t.count(o) * (len(n) - len(o)) > MAX_TEXT:  # counted before the text is built
            return CellError(VALUE, f"the text is longer than {MAX_TEXT} characters")
        return t.replace(o, n)
    k = _count(instance, "SUBSTITUTE's instance", 1.0)
    if type(k) is CellError or not o:
        return k if type(k) is CellError else t
    pos = -1
    for _ in range(k):
        pos = t.find(o, pos + 1)
        if pos < 0:
            return t
    return t[:pos] + n + t[pos + len(o):]


@builtin("REPLACE", 4)
@elementwise
def replace(text: Scalar, start: Scalar, n: Scalar, new: Scalar) -> Scalar:
    """``text`` with ``n`` characters from position ``start`` replaced by ``new``.

    >>> replace("abcdef", 2.0, 3.0, "X")
    'aXef'
    """
    parts = _texts(text, new)
    if type(parts) is CellError:
        return parts
    s = _count(start, "REPLACE's start", 1.0)
    if type(s) is CellError:
        return s
    k = _count(n, "REPLACE's count")
    if type(k) is CellError:
        return k
    t, w = parts
    return t[:s - 1] + w + t[s - 1 + k:]


@builtin("REPT", 2)
@elementwise
def rept(text: Scalar, n: Scalar) -> Scalar:
    """``text`` repeated ``n`` times (at most 32767 characters in all).

    >>> rept("ab", 3.0), rept("x", -1.0).code
    ('ababab', '#VALUE!')
    """
    t = to_text(text)
    if type(t) is CellError:
        return t
    k = _count(n, "REPT's count")
    if type(k) is CellError:
        return k
    if len(t) * k > MAX_TEXT:
        return CellError(VALUE, f"REPT's result would be longer than {MAX_TEXT} characters")
    return t * k


def _finder(name: str, ignore_case: bool):
    @elementwise
    def find(needle: Scalar, haystack: Scalar, start: Scalar = 1.0) -> Scalar:
        parts = _texts(needle, haystack)
        if type(parts) is CellError:
            return parts
        s = _count(1.0 if start is None else start, f"{name}'s start", 1.0)
        if type(s) is CellError:
            return s
        n, h = parts
        if s > len(h) + (1 if n == "" else 0):
            return CellError(VALUE, f"{name}'s start is beyond the text")
        if ignore_case:
            m = wildcard(n).search(h, s - 1) if any(ch in n for ch in "*?~") else None
            pos = m.start() if m else fold(h).find(fold(n), s - 1) if not any(ch in n for ch in "*?~") else -1
        else:
            pos = h.find(n, s - 1)
        return float(pos + 1) if pos >= 0 else CellError(VALUE, f'"{n}" was not found')

    find.__doc__ = f"{name}(find_text, within_text, [start]): the 1-based position of find_text."
    builtin(name, 2, 3)(find)


_finder("FIND", False)  # case-sensitive, no wildcards
_finder("SEARCH", True)  # case-insensitive, * and ? wildcards


@builtin("EXACT", 2)
@elementwise
def exact(a: Scalar, b: Scalar) -> Scalar:
    """TRUE when the two texts are equal, case included.

    >>> exact("Water", "water"), exact(1.0, "1")
    (False, True)
    """
    parts = _texts(a, b)
    return parts if type(parts) is CellError else parts[0] == parts[1]


def _cp1252(code: int) -> str:
    try:
        return bytes([code]).decode("cp1252")
    except UnicodeDecodeError:  # the five codes cp1252 leaves undefined
        return chr(code)


_CODES = {_cp1252(i): float(i) for i in range(1, 256)}


@builtin("CHAR", 1)
@elementwise
def char(v: Scalar) -> Scalar:
    """The character of code 1 to 255 (Windows code page 1252).

    >>> char(65.0), char(128.0), char(0.0).code
    ('A', '€', '#VALUE!')
    """
    k = _count(v, "CHAR's code", 1.0)
    if type(k) is CellError:
        return k
    return _cp1252(k) if k <= 255 else CellError(VALUE, f"CHAR takes codes 1 to 255, not {k}")


@builtin("CODE", 1)
@elementwise
def code(v: Scalar) -> Scalar:
    """The code (Windows code page 1252) of the first character.

    >>> code("Abc"), code("€"), code("").code
    (65.0, 128.0, '#VALUE!')
    """
    t = to_text(v)
    if type(t) is CellError:
        return t
    if not t:
        return CellError(VALUE, "CODE of empty text")
    return _CODES.get(t[0], 63.0)  # characters outside the code page read as "?"


@builtin("UNICHAR", 1)
@elementwise
def unichar(v: Scalar) -> Scalar:
    """The Unicode character of a code point.

    >>> unichar(8364.0)
    '€'
    """
    k = _count(v, "UNICHAR's code", 1.0)
    if type(k) is CellError:
        return k
    if k > 0x10FFFF or 0xD800 <= k <= 0xDFFF:
        return CellError(VALUE, f"{k} is not a Unicode character")
    return chr(k)


@builtin("UNICODE", 1)
@elementwise
def unicode(v: Scalar) -> Scalar:
    """The Unicode code point of the first character.

    >>> unicode("€")
    8364.0
    """
    t = to_text(v)
    if type(t) is CellError:
        return t
    return float(ord(t[0])) if t else CellError(VALUE, "UNICODE of empty text")


@builtin("CONCATENATE", 1, None)
@elementwise
def concatenate(*values: Scalar) -> Scalar:
    """The arguments as text joined (arrays element by element).

    >>> concatenate("T=", 1.5, True)
    'T=1.5TRUE'
    """
    parts = _texts(*values)
    if type(parts) is CellError:
        return parts
    if sum(map(len, parts)) > MAX_TEXT:  # counted before the text is built
        return CellError(VALUE, f"the text is longer than {MAX_TEXT} characters")
    return "".join(parts)


@builtin("TEXTJOIN", 3, None)
def textjoin(delimiter: Value, ignore_empty: Value, *values: Value) -> Scalar:
    """The values (arrays row by row) joined with ``delimiter``; empty ones left out when
    ``ignore_empty`` is TRUE.

    >>> textjoin(", ", True, "a", None, "b")
    'a, b'
    """
    if type(delimiter) is np.ndarray:
        delimiter = delimiter[0, 0]
    d = to_text(delimiter)
    skip = to_bool(ignore_empty[0, 0] if type(ignore_empty) is np.ndarray else ignore_empty)
    for x in (d, skip):
        if type(x) is CellError:
            return x
    parts = texts(values)
    if type(parts) is CellError:
        return parts
    parts = [t for t in parts if t or not skip]
    if sum(map(len, parts)) + len(d) * max(len(parts) - 1, 0) > MAX_TEXT:  # counted before the text is built
        return CellError(VALUE, f"the text is longer than {MAX_TEXT} characters")
    return d.join(parts)


@builtin("T", 1, arrays=(0,))  # a legacy formula takes a range's first cell, not its intersection
@elementwise
def t(v: Scalar) -> Scalar:
    """Text as itself, an error as itself, anything else as empty text. A range given in a
    legacy formula is not intersected: its first cell counts (Excel's stored values).

    >>> t("a"), t(1.0)
    ('a', '')
    """
    return v if type(v) in (str, CellError) else ""


@builtin("VALUE", 1)
@elementwise
def value(v: Scalar) -> Scalar:
    """Text that reads as a number, as the number.

    >>> value(" 1,250 "), value("x").code
    (1250.0, '#VALUE!')
    """
    if type(v) is bool:
        return CellError(VALUE, "VALUE takes text or a number")
    return to_number(v)


def zero_or_one(v: Scalar, what: str) -> int | CellError:
    """A 0-or-1 argument (match mode, match end); left out or blank: 0."""
    x = to_number(v)
    if type(x) is CellError:
        return x
    if x not in (0.0, 1.0):
        return CellError(VALUE, f"{what} must be 0 or 1, not {to_text(x)}")
    return int(x)


def _delimiters(v: Value) -> list[str] | None | CellError:
    """A delimiter argument (one text or an array of them) as texts; None when not given."""
    if v is None:
        return None
    out = []
    for x in (v.flat if type(v) is np.ndarray else (v,)):
        t = to_text(x)
        if type(t) is CellError:
            return t
        out.append(t)
    return out


@lru_cache(maxsize=256)
def _delimiter_regex(delimiters: tuple[str, ...], fold: bool) -> re.Pattern:
    """A regex finding any of the delimiters, the longest where several start at one place."""
    alternatives = "|".join(re.escape(d) for d in sorted(delimiters, key=len, reverse=True))
    return re.compile(alternatives, re.IGNORECASE if fold else 0)


_ABSENT = object()  # an argument not written, as opposed to an empty one (None)


def _instance(v: Scalar) -> int | CellError:
    """TEXTBEFORE's and TEXTAFTER's instance number, rounded down as Excel does (-1.2 is -2)."""
    x = to_number(v)
    return x if type(x) is CellError else math.floor(x)


def _delimiter_at(text: str, delimiters: list[str], n: Scalar, mode: Scalar,
                  end: Scalar) -> tuple[int, int] | None | CellError:
    """Where the ``n``-th delimiter (negative: counted from the end) starts and ends in ``text``;
    with ``end`` 1 the text's end (its start, counting from the end) is one more delimiter."""
    explicit = n is not _ABSENT and n is not None
    k = _instance(n) if explicit else 1
    fold, at_end = zero_or_one(mode, "the match mode"), zero_or_one(end, "match_end")
    for x in (k, fold, at_end):
        if type(x) is CellError:
            return x
    if k == 0:
        return CellError(VALUE, "the instance number must not be 0")
    if explicit and abs(k) > len(text) - min(map(len, delimiters)) + 1:  # more instances than places for one
        return CellError(VALUE, f"instance {k} is beyond the length of the text")
    found = [m.span() for m in _delimiter_regex(tuple(delimiters), bool(fold)).finditer(text)]
    if at_end:
        found = found + [(len(text), len(text))] if k > 0 else [(0, 0)] + found
    if k > len(found) or -k > len(found):
        return None
    return found[k - 1] if k > 0 else found[k]


def _text_around(name: str, after: bool) -> None:
    def fn(text: Value, delimiter: Value, instance_num: Value = _ABSENT, match_mode: Value = None,
           match_end: Value = None, if_not_found: Value = _ABSENT) -> Value:
        delimiters = _delimiters(delimiter) or [""]
        if type(delimiters) is CellError:
            return delimiters

        def one(t: Scalar, n: Scalar, mode: Scalar, end: Scalar, fallback: Scalar) -> Scalar:
            t = to_text(t)
            if type(t) is CellError:
                return t
            span = _delimiter_at(t, delimiters, n, mode, end)
            if span is None:
                if fallback is _ABSENT:
                    return CellError(NA, f"{name}: the delimiter was not found")
                return "" if fallback is None else fallback
            if type(span) is CellError:
                return span
            return t[span[1]:] if after else t[:span[0]]

        return map_values(one, text, instance_num, match_mode, match_end, if_not_found)

    fn.__doc__ = (f"{name}(text, delimiter, [instance_num], [match_mode], [match_end], [if_not_found]): the text "
                  f"{'after' if after else 'before'} the instance_num-th delimiter (negative: from the end).")
    fn.takes_values = True  # each argument but the delimiters one value
    builtin(name, 2, 6, arrays=(1,))(fn)


_text_around("TEXTBEFORE", False)
_text_around("TEXTAFTER", True)


def _pieces(text: str, delimiters: list[str] | None, fold: bool, ignore_empty: bool) -> list[str]:
    if delimiters is None:
        return [text]
    parts = _delimiter_regex(tuple(delimiters), fold).split(text)
    return [p for p in parts if p] if ignore_empty else parts


def _split_table(text: Scalar, columns: list[str] | None, rows: list[str] | None, fold: bool,
                 ignore_empty: bool, pad: Scalar) -> Value:
    """One text split into rows at ``rows`` and each row into columns at ``columns``."""
    t = to_text(text)
    if type(t) is CellError:
        return t
    table = [_pieces(line, columns, fold, ignore_empty) for line in _pieces(t, rows, fold, ignore_empty)]
    table = [line for line in table if line]
    out = built((len(table), max(map(len, table), default=0)), pad)
    if type(out) is CellError:
        return out
    for i, line in enumerate(table):
        out[i, :len(line)] = line
    return out


@builtin("TEXTSPLIT", 2, 6, arrays=(1, 2))
def textsplit(text: Value, col_delimiter: Value, row_delimiter: Value = None, ignore_empty: Value = None,
              match_mode: Value = None, pad_with: Value = None) -> Value:
    """The text split into columns at ``col_delimiter`` and into rows at ``row_delimiter`` (a
    text or an array of them, at least one given, none empty); ``ignore_empty`` drops empty
    pieces, ``match_mode`` 1 ignores case, short rows are padded with #N/A or ``pad_with``.
    Of an array of texts, each gives its first piece.

    >>> from cellfuncs.formula import compute
    >>> compute('=TEXTSPLIT("a,b;c", ",", ";")').tolist()
    [['a', 'b'], ['c', CellError(code='#N/A', reason='TEXTSPLIT: the row is shorter than the others')]]
    """
    columns, rows = _delimiters(col_delimiter), _delimiters(row_delimiter)
    ignore = flag(ignore_empty, "TEXTSPLIT's ignore_empty")
    fold = zero_or_one(single(match_mode, "the match mode"), "the match mode")
    for x in (columns, rows, ignore, fold):
        if type(x) is CellError:
            return x
    if columns is None and rows is None:
        return CellError(VALUE, "TEXTSPLIT needs a column or a row delimiter")
    if "" in (columns or []) + (rows or []):
        return CellError(VALUE, "TEXTSPLIT's delimiters must not be empty")
    pad = padding(pad_with, "TEXTSPLIT", "the row is shorter than the others")
    if type(text) is np.ndarray:
        return map_values(lambda t: as_array(_split_table(t, columns, rows, bool(fold), ignore, pad))[0, 0], text)
    return _split_table(text, columns, rows, bool(fold), ignore, pad)
