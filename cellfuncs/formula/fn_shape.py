"""Built-in functions that reshape arrays: HSTACK, VSTACK, TOCOL, TOROW, WRAPROWS, WRAPCOLS,
TAKE, DROP, EXPAND, CHOOSEROWS, CHOOSECOLS.

A scalar argument counts as a 1x1 array; a part a result has no value for is #N/A (or the
``pad_with`` value given); an empty result is #CALC!, as Excel shows it.

>>> from cellfuncs.formula import compute
>>> compute("=HSTACK({1;2}, 3)").tolist()
[[1.0, 3.0], [2.0, CellError(code='#N/A', reason='HSTACK: the array is shorter than the others')]]
>>> compute("=TAKE(SEQUENCE(5), -2)").tolist(), compute("=WRAPROWS(SEQUENCE(1, 4), 2)").tolist()
([[4.0], [5.0]], [[1.0, 2.0], [3.0, 4.0]])
"""

from __future__ import annotations

import numpy as np

from ..errors import CALC, NA, NUM, VALUE, CellError
from .arrays import Value, as_array, filled, shape_text
from .budget import charge
from .coerce import to_bool, to_number
from .evaluate import ALL_ARGUMENTS, builtin
from .nodes import Scalar

_MAX_ROWS, _MAX_COLUMNS = 1_048_576, 16_384  # a sheet's size


def single(v: Value, what: str) -> Scalar:
    """An argument that must be one value: a 1x1 array is its element, a larger one #VALUE!."""
    if type(v) is not np.ndarray:
        return v
    if v.shape == (1, 1):
        return v[0, 0]
    return CellError(VALUE, f"{what} must be a single value")


def whole(v: Value, what: str) -> int | CellError:
    """An argument as a whole number, truncated toward zero as Excel does."""
    x = single(v, what)
    x = x if type(x) is CellError else to_number(x)
    return x if type(x) is CellError else int(x)


def flag(v: Value, what: str) -> bool | CellError:
    """A TRUE/FALSE argument (blank or left out: FALSE)."""
    x = single(v, what)
    return x if type(x) is CellError else to_bool(x)


def built(shape: tuple[int, int], fill: Scalar) -> np.ndarray | CellError:
    """A new result array of ``shape`` filled with ``fill``, charged to the work budget first;
    an empty shape is #CALC!, one of more cells than a sheet column #NUM! (as SEQUENCE's), so
    that a few characters (``EXPAND(1,1E6,1E4)``) never ask for a huge array."""
    if shape[0] < 1 or shape[1] < 1:
        return CellError(CALC, "the result would be empty")
    if shape[0] * shape[1] > _MAX_ROWS:
        return CellError(NUM, f"the {shape_text(shape)} result would be larger than a sheet column")
    return charge(shape) or filled(shape, fill)


def padding(pad_with: Value, name: str, why: str) -> Scalar:
    """The value of the cells a result has no value for: ``pad_with`` (an array's first
    element), else #N/A."""
    if pad_with is None:
        return CellError(NA, f"{name}: {why}")
    return pad_with[0, 0] if type(pad_with) is np.ndarray else pad_with


def _stack(name: str, values: tuple[Value, ...], axis: int) -> Value:
    """The arrays side by side (axis 1) or one below the other (axis 0), the shorter padded with #N/A."""
    arrays = [as_array(v) for v in values]
    across = 1 - axis
    shape = [0, 0]
    shape[axis] = sum(a.shape[axis] for a in arrays)
    shape[across] = max(a.shape[across] for a in arrays)
    short = "shorter" if axis == 1 else "narrower"
    out = built((shape[0], shape[1]), CellError(NA, f"{name}: the array is {short} than the others"))
    if type(out) is CellError:
        return out
    at = 0
    for a in arrays:
        if axis == 1:
            out[:a.shape[0], at:at + a.shape[1]] = a
        else:
            out[at:at + a.shape[0], :a.shape[1]] = a
        at += a.shape[axis]
    return out


@builtin("HSTACK", 1, None, arrays=ALL_ARGUMENTS)
def hstack(*arrays: Value) -> Value:
    """The arrays side by side, left to right; rows a shorter array lacks are #N/A.

    >>> from cellfuncs.formula import compute
    >>> compute('=HSTACK({"a","b"}, {"c"})').tolist()
    [['a', 'b', 'c']]
    """
    return _stack("HSTACK", arrays, 1)


@builtin("VSTACK", 1, None, arrays=ALL_ARGUMENTS)
def vstack(*arrays: Value) -> Value:
    """The arrays one below the other, top to bottom; columns a narrower array lacks are #N/A.

    >>> from cellfuncs.formula import compute
    >>> compute("=VSTACK({1,2}, {3,4})").tolist()
    [[1.0, 2.0], [3.0, 4.0]]
    """
    return _stack("VSTACK", arrays, 0)


_KEPT = {0: lambda x: True, 1: lambda x: x is not None, 2: lambda x: type(x) is not CellError,
         3: lambda x: x is not None and type(x) is not CellError}


def _flattened(name: str, array: Value, ignore: Value, scan_by_column: Value) -> list | CellError:
    """The elements row by row (column by column with ``scan_by_column``), without blanks
    (``ignore`` 1), errors (2) or both (3)."""
    how = 0 if ignore is None else whole(ignore, f"{name}'s ignore")
    by_column = flag(scan_by_column, f"{name}'s scan_by_column")
    for x in (how, by_column):
        if type(x) is CellError:
            return x
    if how not in _KEPT:
        return CellError(VALUE, f"{name}'s ignore must be 0, 1, 2 or 3, not {how}")
    a = as_array(array)
    kept = _KEPT[how]
    return [x for x in (a.T if by_column else a).flat if kept(x)]


def _line(name: str, array: Value, ignore: Value, scan_by_column: Value, shape) -> Value:
    items = _flattened(name, array, ignore, scan_by_column)
    if type(items) is CellError:
        return items
    out = built(shape(len(items)), None)
    if type(out) is not CellError:
        out.flat[:] = items
    return out


@builtin("TOCOL", 1, 3, arrays=(0,))
def tocol(array: Value, ignore: Value = None, scan_by_column: Value = None) -> Value:
    """The array as one column, read row by row (column by column with ``scan_by_column``);
    ``ignore`` 1 leaves out blanks, 2 errors, 3 both.

    >>> from cellfuncs.formula import compute
    >>> compute("=TOCOL({1,2;3,4})").tolist(), compute("=TOCOL({1,2;3,4}, 0, TRUE)").tolist()
    ([[1.0], [2.0], [3.0], [4.0]], [[1.0], [3.0], [2.0], [4.0]])
    """
    return _line("TOCOL", array, ignore, scan_by_column, lambda n: (n, 1))


@builtin("TOROW", 1, 3, arrays=(0,))
def torow(array: Value, ignore: Value = None, scan_by_column: Value = None) -> Value:
    """The array as one row (TOCOL across).

    >>> from cellfuncs.formula import compute
    >>> compute("=TOROW({1,2;3,4})").tolist()
    [[1.0, 2.0, 3.0, 4.0]]
    """
    return _line("TOROW", array, ignore, scan_by_column, lambda n: (1, n))


def _wrap(name: str, vector: Value, count: Value, pad_with: Value, across: bool) -> Value:
    """A row or column cut into rows (``across``) or columns of ``count`` elements."""
    if type(vector) is CellError:
        return vector
    a = as_array(vector)
    if a.shape[0] != 1 and a.shape[1] != 1:
        return CellError(VALUE, f"{name} takes one row or one column, not a {a.shape[0]}x{a.shape[1]} array")
    n = whole(count, f"{name}'s wrap_count")
    if type(n) is CellError:
        return n
    if n < 1:
        return CellError(NUM, f"{name}'s wrap_count must be at least 1")
    pad = padding(pad_with, name, "past the end of the vector")
    lines = -(-a.size // n)
    out = built((lines, n), pad)
    if type(out) is CellError:
        return out
    out.flat[:a.size] = list(a.flat)
    return out if across else np.ascontiguousarray(out.T)


@builtin("WRAPROWS", 2, 3, arrays=(0,))
def wraprows(vector: Value, wrap_count: Value, pad_with: Value = None) -> Value:
    """A row or column as rows of ``wrap_count`` elements; the last padded with #N/A or ``pad_with``.

    >>> from cellfuncs.formula import compute
    >>> compute('=WRAPROWS({1,2,3}, 2, "-")').tolist()
    [[1.0, 2.0], [3.0, '-']]
    """
    return _wrap("WRAPROWS", vector, wrap_count, pad_with, True)


@builtin("WRAPCOLS", 2, 3, arrays=(0,))
def wrapcols(vector: Value, wrap_count: Value, pad_with: Value = None) -> Value:
    """A row or column as columns of ``wrap_count`` elements (WRAPROWS down).

    >>> from cellfuncs.formula import compute
    >>> compute("=WRAPCOLS({1,2,3,4}, 2)").tolist()
    [[1.0, 3.0], [2.0, 4.0]]
    """
    return _wrap("WRAPCOLS", vector, wrap_count, pad_with, False)


def _counts(name: str, rows: Value, columns: Value) -> tuple[int | None, int | None] | CellError:
    """TAKE's and DROP's numbers of rows and columns (None: left out)."""
    out = []
    for v, what in ((rows, "rows"), (columns, "columns")):
        n = None if v is None else whole(v, f"{name}'s {what}")
        if type(n) is CellError:
            return n
        out.append(n)
    return out[0], out[1]


def _taken(size: int, n: int | None) -> slice:
    if n is None:
        return slice(None)
    return slice(0, n) if n >= 0 else slice(max(size + n, 0), size)


def _dropped(size: int, n: int | None) -> slice:
    if n is None:
        return slice(None)
    return slice(n, size) if n >= 0 else slice(0, max(size + n, 0))


def _cut(name: str, array: Value, rows: Value, columns: Value, part) -> Value:
    if type(array) is CellError:
        return array
    a = as_array(array)
    counts = _counts(name, rows, columns)
    if type(counts) is CellError:
        return counts
    out = a[part(a.shape[0], counts[0]), part(a.shape[1], counts[1])]
    if out.size == 0:
        return CellError(CALC, f"{name} leaves no rows or columns")
    return charge(out.shape) or np.ascontiguousarray(out)


@builtin("TAKE", 2, 3, arrays=(0,))
def take(array: Value, rows: Value, columns: Value = None) -> Value:
    """The first ``rows`` rows and ``columns`` columns (negative: the last); left out, all of them.

    >>> from cellfuncs.formula import compute
    >>> compute("=TAKE({1,2,3;4,5,6}, 1, -2)").tolist(), compute("=TAKE({1,2}, 0)").code
    ([[2.0, 3.0]], '#CALC!')
    """
    return _cut("TAKE", array, rows, columns, _taken)


@builtin("DROP", 2, 3, arrays=(0,))
def drop(array: Value, rows: Value, columns: Value = None) -> Value:
    """The array without its first ``rows`` rows and ``columns`` columns (negative: the last).

    >>> from cellfuncs.formula import compute
    >>> compute("=DROP({1,2,3;4,5,6}, 1, 1)").tolist(), compute("=DROP({1;2}, -2)").code
    ([[5.0, 6.0]], '#CALC!')
    """
    return _cut("DROP", array, rows, columns, _dropped)


def _target(v: Value, have: int, what: str, most: int) -> int | CellError:
    """EXPAND's number of rows or columns: at least the array's own, at most the sheet's."""
    n = have if v is None else whole(v, f"EXPAND's {what}")
    if type(n) is CellError:
        return n
    if n < have:
        return CellError(VALUE, f"EXPAND's {what} ({n}) is fewer than the array's {have}")
    if n > most:
        return CellError(NUM, f"EXPAND's {what} ({n}) is more than a sheet holds")
    return n


@builtin("EXPAND", 2, 4, arrays=(0,))
def expand(array: Value, rows: Value, columns: Value = None, pad_with: Value = None) -> Value:
    """The array grown to ``rows`` x ``columns`` (left out: as it is), new cells #N/A or ``pad_with``.

    >>> from cellfuncs.formula import compute
    >>> compute('=EXPAND({1,2}, 2, 3, "")').tolist()
    [[1.0, 2.0, ''], ['', '', '']]
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    r = _target(rows, a.shape[0], "rows", _MAX_ROWS)
    c = _target(columns, a.shape[1], "columns", _MAX_COLUMNS)
    for n in (r, c):
        if type(n) is CellError:
            return n
    out = built((r, c), padding(pad_with, "EXPAND", "beyond the array"))
    if type(out) is not CellError:
        out[:a.shape[0], :a.shape[1]] = a
    return out


def _positions(name: str, numbers: tuple[Value, ...], size: int, what: str) -> list[int] | CellError:
    """CHOOSEROWS' and CHOOSECOLS' 1-based numbers (negative: from the end) as 0-based indexes."""
    out = []
    for v in numbers:
        for x in as_array(v).flat:
            n = whole(x, f"{name}'s {what} number")
            if type(n) is CellError:
                return n
            if n == 0 or abs(n) > size:
                return CellError(VALUE, f"{name}: the array has no {what} {n}")
            out.append(n - 1 if n > 0 else size + n)
    return out


def _choose(name: str, array: Value, numbers: tuple[Value, ...], axis: int) -> Value:
    if type(array) is CellError:
        return array
    a = as_array(array)
    picked = _positions(name, numbers, a.shape[axis], "row" if axis == 0 else "column")
    if type(picked) is CellError:
        return picked
    shape = (len(picked), a.shape[1]) if axis == 0 else (a.shape[0], len(picked))
    return charge(shape) or np.ascontiguousarray(a[picked, :] if axis == 0 else a[:, picked])


@builtin("CHOOSEROWS", 2, None, arrays=ALL_ARGUMENTS)
def chooserows(array: Value, *row_nums: Value) -> Value:
    """The rows numbered ``row_nums`` (negative: from the end), in that order, repeats allowed.

    >>> from cellfuncs.formula import compute
    >>> compute("=CHOOSEROWS({1;2;3}, -1, 1)").tolist()
    [[3.0], [1.0]]
    """
    return _choose("CHOOSEROWS", array, row_nums, 0)


@builtin("CHOOSECOLS", 2, None, arrays=ALL_ARGUMENTS)
def choosecols(array: Value, *col_nums: Value) -> Value:
    """The columns numbered ``col_nums`` (negative: from the end), in that order, repeats allowed.

    >>> from cellfuncs.formula import compute
    >>> compute("=CHOOSECOLS({1,2,3}, 3, 3)").tolist()
    [[3.0, 3.0]]
    """
    return _choose("CHOOSECOLS", array, col_nums, 1)
