"""Built-in functions that sort and select rows of arrays: SORT, SORTBY, UNIQUE, FILTER.

Sorting follows Excel's order: numbers, then text (ignoring case), then logical values, then
errors (by their ERROR.TYPE number), blanks last whichever the direction; rows that tie keep
their order.

>>> from cellfuncs.formula import compute
>>> compute('=SORT({3;"b";TRUE;1;"A"})').tolist()
[[1.0], [3.0], ['A'], ['b'], [True]]
>>> compute("=UNIQUE({1;2;1})").tolist(), compute("=FILTER({1;2;3}, {1;2;3}>1)").tolist()
([[1.0], [2.0]], [[2.0], [3.0]])
"""

from __future__ import annotations

from functools import cmp_to_key

import numpy as np

from ..errors import CALC, CODES, VALUE, CellError
from .arrays import Value, as_array, shape_text
from .budget import charge
from .coerce import compare, fold, to_bool
from .evaluate import ALL_ARGUMENTS, builtin
from .fn_shape import flag, whole
from .nodes import Scalar


def _ordered(a: Scalar, b: Scalar) -> int:
    """-1, 0 or 1 as ``a`` sorts before, with or after ``b`` (neither blank): lookups' order
    of values, errors after every value."""
    a_error, b_error = type(a) is CellError, type(b) is CellError
    if a_error or b_error:
        if not (a_error and b_error):
            return 1 if a_error else -1
        i, j = CODES.index(a.code), CODES.index(b.code)
        return (i > j) - (i < j)
    return compare(a, b)


def _key_order(a: Scalar, b: Scalar, descending: bool) -> int:
    """The order of two sort keys; blanks go last in either direction."""
    if a is None or b is None:
        return (a is None) - (b is None)
    c = _ordered(a, b)
    return -c if descending else c


def _sorted(count: int, keys: list[tuple[np.ndarray, bool]]) -> list[int]:
    """The positions 0..count-1 in the order of their keys (each a vector and a direction)."""

    def order(i: int, j: int) -> int:
        for vector, descending in keys:
            c = _key_order(vector[i], vector[j], descending)
            if c:
                return c
        return 0

    return sorted(range(count), key=cmp_to_key(order))  # stable: ties keep their order


def _direction(v: Scalar, what: str) -> bool | CellError:
    """A sort order, 1 ascending or -1 descending, as whether it is descending."""
    n = whole(1.0 if v is None else v, what)
    if type(n) is CellError:
        return n
    if n not in (1, -1):
        return CellError(VALUE, f"{what} must be 1 or -1, not {n}")
    return n == -1


def _arranged(a: np.ndarray, order: list[int], by_col: bool) -> Value:
    return charge(a.shape) or np.ascontiguousarray(a[:, order] if by_col else a[order, :])


def _sort_keys(a: np.ndarray, sort_index: Value, sort_order: Value, by_col: bool):
    """SORT's keys: the rows (columns) ``sort_index`` of ``a`` with their directions."""
    indexes = list(as_array(1.0 if sort_index is None else sort_index).flat)
    orders = list(as_array(1.0 if sort_order is None else sort_order).flat)
    if len(orders) == 1:
        orders *= len(indexes)
    if len(orders) != len(indexes):
        return CellError(VALUE, "SORT needs as many sort orders as sort indexes")
    lines = a.T if not by_col else a
    keys = []
    for index, order in zip(indexes, orders):
        n = whole(index, "SORT's sort_index")
        descending = _direction(order, "SORT's sort_order")
        for x in (n, descending):
            if type(x) is CellError:
                return x
        if not 1 <= n <= lines.shape[0]:
            return CellError(VALUE, f"SORT's sort_index {n} is outside the array's {lines.shape[0]} "
                                    f"{'rows' if by_col else 'columns'}")
        keys.append((lines[n - 1], descending))
    return keys


@builtin("SORT", 1, 4, arrays=ALL_ARGUMENTS)
def sort(array: Value, sort_index: Value = None, sort_order: Value = None, by_col: Value = None) -> Value:
    """The rows of ``array`` (its columns with ``by_col``) sorted by column (row) ``sort_index``,
    ascending (``sort_order`` 1) or descending (-1); several indexes sort by each in turn.

    >>> from cellfuncs.formula import compute
    >>> compute("=SORT({1,9;2,7;3,8}, 2, -1)").tolist()
    [[1.0, 9.0], [3.0, 8.0], [2.0, 7.0]]
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    across = flag(by_col, "SORT's by_col")
    if type(across) is CellError:
        return across
    keys = _sort_keys(a, sort_index, sort_order, across)
    if type(keys) is CellError:
        return keys
    return _arranged(a, _sorted(a.shape[1] if across else a.shape[0], keys), across)


def _by_keys(a: np.ndarray, pairs: tuple[Value, ...]):
    """SORTBY's keys and whether they sort columns: each by_array one column as tall as
    ``a`` (or all of them one row as wide), with its direction."""
    keys, across = [], None
    for at in range(0, len(pairs), 2):
        by = pairs[at]
        if type(by) is CellError:
            return by
        b = as_array(by)
        wide = b.shape != (a.shape[0], 1) and b.shape == (1, a.shape[1])
        if not wide and b.shape != (a.shape[0], 1) or across not in (None, wide):
            return CellError(VALUE, f"SORTBY's by_array ({shape_text(b.shape)}) must be one column as tall "
                                    f"or one row as wide as the array ({shape_text(a.shape)})")
        across = wide
        descending = _direction(pairs[at + 1] if at + 1 < len(pairs) else None, "SORTBY's sort_order")
        if type(descending) is CellError:
            return descending
        keys.append((b.ravel(), descending))
    return keys, across


@builtin("SORTBY", 2, None, arrays=ALL_ARGUMENTS)
def sortby(array: Value, *by_arrays_and_orders: Value) -> Value:
    """The rows of ``array`` sorted by the values of ``by_array1`` (a column as tall), in
    ``sort_order1`` (1 or -1), ties by ``by_array2``...; by rows as wide, its columns.

    >>> from cellfuncs.formula import compute
    >>> compute('=SORTBY({"a";"b";"c"}, {3;1;2})').tolist()
    [['b'], ['c'], ['a']]
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    found = _by_keys(a, by_arrays_and_orders)
    if type(found) is CellError:
        return found
    keys, across = found
    return _arranged(a, _sorted(a.shape[1] if across else a.shape[0], keys), across)


def _same(x: Scalar) -> tuple:
    """What makes two values the same for UNIQUE: type and value, text ignoring case."""
    if type(x) is str:
        return str, fold(x)
    if type(x) is CellError:
        return CellError, x.code
    return type(x), x


@builtin("UNIQUE", 1, 3, arrays=(0,))
def unique(array: Value, by_col: Value = None, exactly_once: Value = None) -> Value:
    """The distinct rows of ``array`` (columns with ``by_col``) in their first order; with
    ``exactly_once``, only those that occur once. Text is compared ignoring case.

    >>> from cellfuncs.formula import compute
    >>> compute('=UNIQUE({"a";"A";"b"})').tolist(), compute('=UNIQUE({"a";"A";"b"}, FALSE, TRUE)').tolist()
    ([['a'], ['b']], [['b']])
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    across, once = flag(by_col, "UNIQUE's by_col"), flag(exactly_once, "UNIQUE's exactly_once")
    for x in (across, once):
        if type(x) is CellError:
            return x
    lines = a.T if across else a
    seen: dict[tuple, list[int]] = {}
    for i, line in enumerate(lines):
        seen.setdefault(tuple(_same(x) for x in line), []).append(i)
    kept = [at[0] for at in seen.values() if not once or len(at) == 1]
    if not kept:
        return CellError(CALC, "UNIQUE: no value occurs exactly once")
    return _arranged(a, kept, across)


def _included(include: Value, a: np.ndarray) -> tuple[list[bool], bool] | CellError:
    """FILTER's choice of rows (a column as tall as the array) or columns (a row as wide)."""
    if type(include) is CellError:
        return include
    b = as_array(include)
    if b.shape == (a.shape[0], 1):
        across = False
    elif b.shape == (1, a.shape[1]):
        across = True
    else:
        return CellError(VALUE, f"FILTER's include ({shape_text(b.shape)}) must be one column as tall "
                                f"or one row as wide as the array ({shape_text(a.shape)})")
    chosen = []
    for x in b.flat:
        if type(x) is str:  # text is neither TRUE nor FALSE here, even "TRUE"
            return CellError(VALUE, "FILTER's include holds text")
        keep = to_bool(x)
        if type(keep) is CellError:
            return keep
        chosen.append(keep)
    return chosen, across


@builtin("FILTER", 2, 3, arrays=ALL_ARGUMENTS)
def filter_(array: Value, include: Value, if_empty: Value = None) -> Value:
    """The rows of ``array`` where ``include`` (a column as tall) is TRUE or a number other than
    0, or the columns where a row as wide is; none: ``if_empty``, else #CALC!.

    >>> from cellfuncs.formula import compute
    >>> compute('=FILTER({1,2,3}, {TRUE,FALSE,TRUE})').tolist(), compute('=FILTER({1;2}, {0;0}, "none")')
    ([[1.0, 3.0]], 'none')
    """
    if type(array) is CellError:
        return array
    a = as_array(array)
    found = _included(include, a)
    if type(found) is CellError:
        return found
    chosen, across = found
    kept = [i for i, keep in enumerate(chosen) if keep]
    if not kept:
        return CellError(CALC, "FILTER found nothing") if if_empty is None else if_empty
    return _arranged(a, kept, across)
