"""Built-in lookup functions: INDEX, MATCH, VLOOKUP, HLOOKUP, LOOKUP, XLOOKUP, XMATCH.

>>> from cellfuncs.formula import compute
>>> compute("=INDEX({1,2;3,4}, 2, 1)"), compute("=MATCH(25, {10,20,30})"), compute('=VLOOKUP("b", {"a",1;"B",2}, 2, FALSE)')
(3.0, 2.0, 2.0)
"""

from __future__ import annotations

import re
from functools import lru_cache

import numpy as np

from ..errors import NA, REF, VALUE, CellError
from .arrays import Value, as_array, map_values, shape_text
from .coerce import compare, to_bool, to_number, to_text
from .evaluate import Context, anchored, builtin, evaluate, reference_builtin
from .fn_reference import found_reference
from .nodes import Areas, Missing, Node, Ref, Scalar

_ABSENT = object()  # an argument left out, as opposed to an empty one (None)


def _shown(x: Scalar) -> str:
    return f'"{x}"' if type(x) is str else to_text(x)


def _position(v: Scalar, size: int, what: str) -> int | CellError:
    """A 1-based row or column number (0: all of them), truncated as Excel does."""
    x = to_number(v)
    if type(x) is CellError:
        return x
    if x < 0.0:
        return CellError(VALUE, f"{what} number {to_text(x)} is negative")
    n = int(x)
    if n > size:
        return CellError(REF, f"{what} {n} is beyond the {size} {what}s of the array")
    return n


def _take(a: np.ndarray, row: Scalar, column: Scalar, whole: bool) -> Value:
    r = _position(row, a.shape[0], "row")
    if type(r) is CellError:
        return r
    c = _position(column, a.shape[1], "column")
    if type(c) is CellError:
        return c
    if not whole and (r == 0 or c == 0):
        return CellError(VALUE, "INDEX takes whole rows or columns only with single row and column numbers")
    part = a[slice(None) if r == 0 else slice(r - 1, r), slice(None) if c == 0 else slice(c - 1, c)]
    return part[0, 0] if part.size == 1 else part


def index(array: Value, row: Value, column: Value = _ABSENT) -> Value:
    """The element at ``row``, ``column`` (1-based; 0 takes the whole row or column).

    With the column left out, a single row is indexed along its length.

    >>> from cellfuncs.formula import compute
    >>> compute("=INDEX({5,6,7}, 3)"), compute("=INDEX({1,2;3,4}, 0, 2)").tolist()
    (7.0, [[2.0], [4.0]])
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    if column is _ABSENT:
        row, column = (1.0, row) if a.shape[0] == 1 else (row, 0.0)
    if type(row) is np.ndarray or type(column) is np.ndarray:
        return map_values(lambda r, c: _take(a, r, c, whole=False), row, column)
    return _take(a, row, column, whole=True)


def _index_value(context: Context, *nodes: Node) -> Value:
    values = [None if type(n) is Missing else evaluate(n, context) for n in nodes[:3]]
    if len(nodes) == 4:
        n = evaluate(nodes[3], context)
        if type(n) is np.ndarray or to_number(n) != 1.0:
            return CellError(REF, "INDEX of an array has only area 1")
    return index(*values)


@reference_builtin("INDEX", 2, 4, value=_index_value, inside_first=True, arrays=(0,))
def index_reference(context: Context, array: Node, row: Node, column: Node | None = None,
                    area: Node | None = None) -> Ref | CellError | None:
    """INDEX of a reference is a reference (``A1:INDEX(B:B, 3)``, ``ROW(INDEX(…))``): the cell,
    or with 0 the whole row or column, of the reference. Of an array, or with arrays of row
    or column numbers, it is a value (None here). Of a union, ``area`` picks the area (the
    first by default)."""
    found = found_reference(context, array, several=True)
    if found is None or type(found) is CellError:
        return found
    parts = found.parts if type(found) is Areas else (found,)
    if area is not None and type(area) is not Missing:
        n = evaluate(area, context)
        n = CellError(VALUE, "INDEX takes one area number") if type(n) is np.ndarray else to_number(n)
        if type(n) is CellError:
            return n
        if not 1 <= int(n) <= len(parts):
            return CellError(REF, f"the reference has no area {int(n)}")
        found = parts[int(n) - 1]
    else:
        found = parts[0]
    bounds = getattr(context, "bounds", None)
    if bounds is None:  # no workbook: the values the context gives
        return None
    b = bounds(found.sheet, found.ref)
    if type(b) is CellError:
        return b
    r1, c1, r2, c2 = b
    h, w = r2 - r1 + 1, c2 - c1 + 1
    row_v = 0.0 if type(row) is Missing else evaluate(row, context)
    col_v = _ABSENT if column is None else (0.0 if type(column) is Missing else evaluate(column, context))
    if type(row_v) is np.ndarray or type(col_v) is np.ndarray:
        return None
    if col_v is _ABSENT:
        row_v, col_v = (1.0, row_v) if h == 1 else (row_v, 0.0)
    r = _position(row_v, h, "row")
    if type(r) is CellError:
        return r
    c = _position(col_v, w, "column")
    if type(c) is CellError:
        return c
    top, bottom = (r1, r2) if r == 0 else (r1 + r - 1, r1 + r - 1)
    left, right = (c1, c2) if c == 0 else (c1 + c - 1, c1 + c - 1)
    return anchored(found.sheet, top, left, bottom, right)


class Wildcard:
    """Excel's ``*`` and ``?`` wildcards (``~`` makes the next character literal), case-insensitive, with a regex's
    ``fullmatch`` and ``search``, in time linear in the pattern times the text: the parts
    between stars are found one after the other, left to right, which is all a star needs
    (one regex of several ``.*`` can take exponential time on a text that almost matches).

    >>> w = Wildcard("a*b?d*~*")
    >>> bool(w.fullmatch("AxxBcD*")), bool(w.fullmatch("abd*")), Wildcard("*a*a*a*a*a*a*a*a*a*b").fullmatch("a" * 60)
    (True, False, None)
    >>> Wildcard("b*d").search("abcde").start(), Wildcard("b*x").search("abcde")
    (1, None)
    """

    def __init__(self, pattern: str):
        pieces: list[list[str]] = [[]]  # the regex units between stars, each one character wide
        # "~" makes the next character literal, whatever it is ("~d" is "d"); a last "~"
        # stands for nothing (Excel's stored values: SEARCH("~","Hello") is 1)
        for part in re.split(r"(~.|~\Z|[*?])", pattern, flags=re.DOTALL):
            if part == "*":
                pieces.append([])
            elif part == "?":
                pieces[-1].append(".")
            elif part.startswith("~"):
                pieces[-1] += [re.escape(part[1:])] if len(part) > 1 else []
            else:
                pieces[-1] += [re.escape(ch) for ch in part]
        flags = re.IGNORECASE | re.DOTALL
        self.parts = [re.compile("".join(units), flags) for units in pieces]
        self.last = len(pieces[-1])

    def _rest(self, text: str, pos: int, anchored: bool) -> bool:
        """Whether the parts after the first follow from ``pos`` (the last at the end if anchored)."""
        middle, last = self.parts[1:-1], self.parts[-1]
        for part in middle:
            m = part.search(text, pos)
            if m is None:
                return False
            pos = m.end()
        if not anchored:
            return last.search(text, pos) is not None
        start = len(text) - self.last
        return start >= pos and last.fullmatch(text, start) is not None

    def fullmatch(self, text: str) -> bool | None:
        """True if the whole text matches, else None (as a regex's ``fullmatch`` is falsy)."""
        if len(self.parts) == 1:
            return True if self.parts[0].fullmatch(text) else None
        m = self.parts[0].match(text)
        return True if m is not None and self._rest(text, m.end(), anchored=True) else None

    def search(self, text: str, pos: int = 0) -> re.Match | None:
        """The leftmost match at or after ``pos``, as the match of its part before the first
        star (its ``start()`` is where the whole match starts), or None."""
        m = self.parts[0].search(text, pos)
        if m is None or len(self.parts) == 1:
            return m
        return m if self._rest(text, m.end(), anchored=False) else None


@lru_cache(maxsize=256)
def wildcard(pattern: str) -> Wildcard:
    """The :class:`Wildcard` of ``pattern`` (kept for reuse)."""
    return Wildcard(pattern)


def _find(x: Scalar, values: list, mode: int) -> float | CellError:
    """1-based position of ``x`` in ``values``: mode 0 exact (text wildcards allowed), 1 the
    largest value <= x of a rising list, -1 the smallest value >= x of a falling list."""
    if type(x) is CellError:
        return x
    if x is None:
        return CellError(NA, "the lookup value is blank")
    if mode == 0 and type(x) is str and any(ch in x for ch in "*?~"):
        regex = wildcard(x)
        found = next((i for i, v in enumerate(values) if type(v) is str and regex.fullmatch(v)), None)
    elif mode == 0:
        found = next((i for i, v in enumerate(values) if type(v) is type(x) and compare(v, x) == 0), None)
    else:
        found = _halving(x, values, mode)
    return CellError(NA, f"{_shown(x)} was not found") if found is None else float(found + 1)


def _halving(x: Scalar, values: list, mode: int) -> int | None:
    """Excel's approximate search: the position of the last value not after ``x`` in the
    order ``mode`` (1 rising, -1 falling), by halvings of the whole list. A halving looks at
    the middle value, or the first after it of the type of ``x`` (blanks, errors and other
    types are passed over, so LOOKUP(2, 1/(A:A="x"), B:B) finds the last match), and stops at
    a value equal to ``x``, moving on to the last of its equal neighbours. On sorted data this
    is the last value not after ``x``; on unsorted data it is what Excel's stored values show
    (LOOKUP("DOUBLE", {"DOUBLE","BLANK","STRING","REF","AREA (rows)"}) finds the first)."""
    def comparable(i: int) -> bool:
        return type(values[i]) is type(x)

    lo, hi, found = 0, len(values) - 1, None
    while lo <= hi:
        mid = (lo + hi) // 2
        j = next((i for i in range(mid, hi + 1) if comparable(i)), None)
        if j is None:
            hi = mid - 1
            continue
        order = compare(values[j], x) * mode
        if order == 0:
            while j + 1 < len(values) and comparable(j + 1) and compare(values[j + 1], x) == 0:
                j += 1
            return j
        if order < 0:
            found, lo = j, j + 1
        else:
            hi = mid - 1
    return found


@builtin("MATCH", 2, 3)
def match(lookup: Value, array: Value, match_type: Value = 1.0) -> Value:
    """Position of ``lookup`` in a single row or column; ``match_type`` 0 exact, 1 (default)
    largest value <= lookup in ascending data, -1 smallest value >= lookup in descending data.

    >>> from cellfuncs.formula import compute
    >>> compute('=MATCH("b*", {"a","B2","c"}, 0)'), compute("=MATCH(25, {30,20,10}, -1)")
    (2.0, 1.0)
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    if a.shape[0] != 1 and a.shape[1] != 1:
        return CellError(NA, f"MATCH needs a single row or column, not a {shape_text(a.shape)} array")
    if type(match_type) is np.ndarray:
        return CellError(VALUE, "MATCH takes one match type")
    t = to_number(match_type)
    if type(t) is CellError:
        return t
    values = list(a.flat)
    mode = (t > 0) - (t < 0)
    return map_values(lambda x: _find(x, values, mode), lookup)


@builtin("VLOOKUP", 3, 4)
def vlookup(lookup: Value, table: Value, column: Value, approximate: Value = True) -> Value:
    """The value in ``column`` (1-based) of the row whose first cell matches ``lookup``:
    exactly when ``approximate`` is FALSE, else the last row not above it (sorted data).

    >>> from cellfuncs.formula import compute
    >>> compute("=VLOOKUP(2.5, {1,10;2,20;3,30}, 2)"), compute("=VLOOKUP(5, {1,10}, 2, FALSE)").code
    (20.0, '#N/A')
    """
    if type(table) is CellError:
        return table
    a = as_array(table)
    if type(column) is np.ndarray or type(approximate) is np.ndarray:
        return CellError(VALUE, "VLOOKUP takes one column number and one match mode")
    c = to_number(column)
    if type(c) is CellError:
        return c
    if c < 1.0:
        return CellError(VALUE, f"column {to_text(c)} is before the first column")
    if int(c) > a.shape[1]:
        return CellError(REF, f"column {int(c)} is beyond the {a.shape[1]} columns of the table")
    approx = to_bool(approximate)
    if type(approx) is CellError:
        return approx
    first = list(a[:, 0])

    def one(x: Scalar) -> Scalar:
        r = _find(x, first, 1 if approx else 0)
        return r if type(r) is CellError else a[int(r) - 1, int(c) - 1]

    return map_values(one, lookup)


@builtin("HLOOKUP", 3, 4)
def hlookup(lookup: Value, table: Value, row: Value, approximate: Value = True) -> Value:
    """The value in ``row`` (1-based) of the column whose first cell matches ``lookup``
    (VLOOKUP across).

    >>> from cellfuncs.formula import compute
    >>> compute('=HLOOKUP("b", {"a","b";1,2}, 2, FALSE)')
    2.0
    """
    if type(table) is CellError:
        return table
    return vlookup(lookup, np.ascontiguousarray(as_array(table).T), row, approximate)


def _vector_and_result(a: np.ndarray) -> tuple[list, np.ndarray]:
    """LOOKUP's array form: search the first row of a wide array (the first column of a tall
    or square one) and return from the last."""
    if a.shape[1] > a.shape[0]:
        return list(a[0, :]), a[-1, :]
    return list(a[:, 0]), a[:, -1]


@builtin("LOOKUP", 2, 3, arrays=(1, 2))
def lookup(value: Value, vector: Value, result: Value = _ABSENT) -> Value:
    """The element of ``result`` (or of the array's last row or column) where the sorted
    ``vector`` holds the largest value not above ``value``.

    >>> from cellfuncs.formula import compute
    >>> compute('=LOOKUP(4.19, {4.14,4.19,5.17}, {"red","orange","yellow"})'), compute("=LOOKUP(0, {1,2})").code
    ('orange', '#N/A')
    """
    for v in (vector, result):
        if type(v) is CellError:
            return v
    a = as_array(vector)
    if result is _ABSENT:
        keys, out = _vector_and_result(a)
    else:
        keys, out = list(a.flat), as_array(result).ravel()

    def one(x: Scalar) -> Scalar:
        r = _find(x, keys, 1)
        if type(r) is CellError:
            return r
        i = int(r) - 1
        return out[i] if i < out.size else CellError(NA, "the result vector is shorter than the lookup vector")

    return map_values(one, value)


def _xfind(x: Scalar, values: list, match_mode: int, search_mode: int) -> int | CellError:
    """0-based index for XMATCH and XLOOKUP: match mode 0 exact, -1 exact or next smaller,
    1 exact or next larger, 2 wildcards, 3 a regular expression; search mode 1 first to last, -1 last to first, 2 and
    -2 binary searches of data sorted up or down. The next smaller or larger value may be of
    another type, in Excel's order of numbers, text and logical values."""
    if type(x) is CellError:
        return x
    order = range(len(values) - 1, -1, -1) if search_mode < 0 else range(len(values))
    if x is None:  # a blank lookup value finds a blank, else looks for 0
        found = next((i for i in order if values[i] is None), None)
        if found is not None:
            return found
        x = 0.0
    if abs(search_mode) == 2:
        return _binary_find(x, values, match_mode, search_mode < 0)
    if match_mode == 3:
        return _regex_find(x, values, order)
    regex = wildcard(x) if match_mode == 2 and type(x) is str else None
    best = None
    for i in order:
        v = values[i]
        if v is None or type(v) is CellError or (type(v) is not type(x) and match_mode not in (-1, 1)):
            continue
        if regex is not None:
            if type(v) is str and regex.fullmatch(v):
                return i
            continue
        c = compare(v, x)
        if c == 0 and type(v) is type(x):
            return i
        if match_mode == -1 and c < 0 and (best is None or compare(v, values[best]) > 0):
            best = i
        elif match_mode == 1 and c > 0 and (best is None or compare(v, values[best]) < 0):
            best = i
    return best if best is not None else CellError(NA, f"{_shown(x)} was not found")


def _regex_find(x: Scalar, values: list, order: range) -> int | CellError:
    """Match mode 3: the first text the pattern ``x`` (as text) finds a match in, as REGEXTEST."""
    from .fn_regex import regextest  # imported here: fn_regex builds on modules that import this one

    for i in order:
        if type(values[i]) is str:
            found = regextest(values[i], to_text(x))
            if found is not False:
                return i if found is True else found
    return CellError(NA, f"{_shown(x)} was not found")


def _binary_find(x: Scalar, values: list, match_mode: int, descending: bool) -> int | CellError:
    """A binary search as Excel's: it looks at the middle element whatever its type (unsorted
    data gives what the halvings find), lands on the first element not before ``x`` (the last,
    for data sorted down), and takes the element before it for the next smaller value."""
    if match_mode in (2, 3):
        return CellError(VALUE, "wildcards and patterns do not work with a binary search")
    n = len(values)
    while n and values[n - 1] is None:  # the blank end of a whole-column reference
        n -= 1
    index = list(range(n - 1, -1, -1)) if descending else list(range(n))
    lo, hi = 0, n
    while lo < hi:
        mid = (lo + hi) // 2
        if compare(values[index[mid]], x) == -1:
            lo = mid + 1
        else:
            hi = mid
    if lo < n and type(values[index[lo]]) is type(x) and compare(values[index[lo]], x) == 0:
        return index[lo]
    if match_mode == 1 and lo < n:
        return index[lo]
    if match_mode == -1 and lo > 0:
        return index[lo - 1]
    return CellError(NA, f"{_shown(x)} was not found")


def _modes(match_mode: Value, search_mode: Value) -> tuple[int, int] | CellError:
    out = []
    for v, allowed in ((match_mode, (-1, 0, 1, 2, 3)), (search_mode, (-2, -1, 1, 2))):
        if type(v) is np.ndarray:
            v = v[0, 0]
        n = to_number(0.0 if v is None else v)
        if type(n) is CellError:
            return n
        if int(n) not in allowed:
            return CellError(VALUE, f"the mode {to_text(n)} is not one of {allowed}")
        out.append(int(n))
    return out[0], out[1]


def _line(a: np.ndarray) -> list | CellError:
    if a.shape[0] != 1 and a.shape[1] != 1:
        return CellError(VALUE, f"the lookup array must be one row or column, not {shape_text(a.shape)}")
    return list(a.flat)


@builtin("XMATCH", 2, 4, arrays=(1,))
def xmatch(value: Value, array: Value, match_mode: Value = 0.0, search_mode: Value = 1.0) -> Value:
    """The 1-based position of ``value`` in a row or column (modes as XLOOKUP's).

    >>> from cellfuncs.formula import compute
    >>> compute('=XMATCH("Gra?e", {"Apple","Grape","Pear"}, 2)'), compute("=XMATCH(35, {10,20,30,40}, 1)")
    (2.0, 4.0)
    """
    if type(array) is CellError:
        return array
    values = _line(as_array(array))
    modes = _modes(match_mode, search_mode)
    for v in (values, modes):
        if type(v) is CellError:
            return v

    def one(x: Scalar) -> Scalar:
        i = _xfind(x, values, *modes)
        return i if type(i) is CellError else float(i + 1)

    return map_values(one, value)


@builtin("XLOOKUP", 3, 6, arrays=(1, 2))
def xlookup(value: Value, array: Value, results: Value, if_not_found: Value = _ABSENT,
            match_mode: Value = 0.0, search_mode: Value = 1.0) -> Value:
    """The row (or column) of ``results`` where ``array`` matches ``value``; ``if_not_found``
    instead of #N/A; match mode 0 exact, -1 or next smaller, 1 or next larger, 2 wildcards,
    3 a regular expression; search mode 1 first to last, -1 last to first, 2 and -2 binary.

    >>> from cellfuncs.formula import compute
    >>> compute('=XLOOKUP("b", {"a";"b"}, {1;2})'), compute('=XLOOKUP("z", {"a","b"}, {1,2}, "none")')
    (2.0, 'none')
    """
    for v in (array, results):
        if type(v) is CellError:
            return v
    a, r = as_array(array), as_array(results)
    keys = _line(a)
    modes = _modes(match_mode, search_mode)
    for v in (keys, modes):
        if type(v) is CellError:
            return v
    vertical = a.shape[1] == 1 and a.shape[0] > 1 or (a.shape == (1, 1) and r.shape[1] == 1)
    if (r.shape[0] if vertical else r.shape[1]) != len(keys):
        return CellError(VALUE, "XLOOKUP's lookup and return arrays differ in length")

    def one(x: Scalar) -> Value:
        i = _xfind(x, keys, *modes)
        if type(i) is CellError:
            if i is not x and if_not_found is not _ABSENT and if_not_found is not None:  # an error looked up stays
                return if_not_found
            return i
        part = r[i:i + 1, :] if vertical else r[:, i:i + 1]
        return part[0, 0] if part.size == 1 else part

    if type(value) is np.ndarray:
        return map_values(lambda x: _first(one(x)), value)
    return one(value)


def _first(v: Value) -> Scalar:
    return v[0, 0] if type(v) is np.ndarray else v
