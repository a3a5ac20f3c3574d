"""Built-in lookup functions: INDEX, MATCH, VLOOKUP.

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
from .evaluate import builtin
from .nodes import Scalar

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


@builtin("INDEX", 2, 3)
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


class _Wildcard:
    """Excel's ``*`` and ``?`` wildcards (``~`` escapes), case-insensitive, matched in time linear
    in the pattern times the text: the parts between stars are found one after the other, left
    to right, which is all a star needs (one regex of several ``.*`` can take exponential time).

    >>> w = _Wildcard("a*b?d*~*")
    >>> w.matches("AxxBcD*"), w.matches("abd*"), _Wildcard("*a*a*a*a*a*a*a*a*a*b").matches("a" * 60)
    (True, False, False)
    """

    def __init__(self, pattern: str):
        pieces: list[list[str]] = [[]]  # the regex units between stars
        for part in re.split(r"(~[*?~]|[*?])", pattern):
            if part == "*":
                pieces.append([])
            elif part == "?":
                pieces[-1].append(".")
            elif part in _WILDCARD_LITERALS:
                pieces[-1].append(re.escape(_WILDCARD_LITERALS[part]))
            else:
                pieces[-1] += [re.escape(ch) for ch in part]
        flags = re.IGNORECASE | re.DOTALL
        self.parts = [re.compile("".join(units), flags) for units in pieces]
        self.last = len(pieces[-1])  # each unit is one character

    def matches(self, text: str) -> bool:
        first, *middle, last = self.parts if len(self.parts) > 1 else (self.parts[0], None)
        if last is None:
            return first.fullmatch(text) is not None
        m = first.match(text)
        if m is None:
            return False
        pos = m.end()
        for part in middle:
            m = part.search(text, pos)
            if m is None:
                return False
            pos = m.end()
        start = len(text) - self.last
        return start >= pos and last.fullmatch(text, start) is not None


_WILDCARD_LITERALS = {"~*": "*", "~?": "?", "~~": "~"}


@lru_cache(maxsize=256)
def _wildcard(pattern: str) -> _Wildcard:
    return _Wildcard(pattern)


def _find(x: Scalar, values: list, mode: int) -> float | CellError:
    """1-based position of ``x`` in ``values``: mode 0 exact (text wildcards allowed), 1 the
    largest value <= x of a rising list, -1 the smallest value >= x of a falling list."""
    if type(x) is CellError:
        return x
    if x is None:
        return CellError(NA, "the lookup value is blank")
    if mode == 0 and type(x) is str and any(ch in x for ch in "*?~"):
        regex = _wildcard(x)
        found = next((i for i, v in enumerate(values) if type(v) is str and regex.matches(v)), None)
    elif mode == 0:
        found = next((i for i, v in enumerate(values) if type(v) is type(x) and compare(v, x) == 0), None)
    else:
        # A scan that stops where the order breaks gives what Excel's binary search gives on
        # sorted data; values of another type than x are skipped, as there.
        found = None
        for i, v in enumerate(values):
            if type(v) is type(x):
                if compare(v, x) * mode > 0:
                    break
                found = i
    return CellError(NA, f"{_shown(x)} was not found") if found is None else float(found + 1)


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
