"""Built-in matrix and sequence functions: MMULT, MINVERSE, MDETERM, MUNIT, SEQUENCE.

>>> from cellfuncs.formula import compute
>>> compute("=MMULT({1,2;3,4}, {5;6})").tolist(), compute("=MDETERM({3,6;1,1})"), compute("=SEQUENCE(2, 2, 0, 5)").tolist()
([[17.0], [39.0]], -3.0, [[0.0, 5.0], [10.0, 15.0]])
"""

from __future__ import annotations

import numpy as np

from ..errors import CALC, NUM, VALUE, CellError
from .arrays import Value, as_array, as_value, shape_text
from .budget import charge
from .coerce import to_number
from .evaluate import builtin


def _matrix(v: Value, name: str) -> np.ndarray | CellError:
    """A float matrix of numbers only (a blank or text element is #VALUE!)."""
    if type(v) is CellError:
        return v
    a = as_array(v)
    out = np.empty(a.shape)
    for (i, j), x in np.ndenumerate(a):
        if type(x) is CellError:
            return x
        if type(x) is not float:
            return CellError(VALUE, f"{name} takes numbers only")
        out[i, j] = x
    return out


@builtin("MMULT", 2, arrays=(0, 1))
def mmult(a: Value, b: Value) -> Value:
    """The matrix product; the columns of ``a`` must match the rows of ``b``.

    >>> mmult(2.0, 3.0).tolist()
    [[6.0]]
    """
    x, y = _matrix(a, "MMULT"), _matrix(b, "MMULT")
    for m in (x, y):
        if type(m) is CellError:
            return m
    if x.shape[1] != y.shape[0]:
        return CellError(VALUE, f"MMULT of {shape_text(x.shape)} and {shape_text(y.shape)} matrices")
    over = charge((x.shape[0], y.shape[1]))  # a column times a row is a table: counted before it is built
    if over is not None:
        return over
    with np.errstate(all="ignore"):  # an overflow becomes #NUM! elements
        return as_value(x @ y)


def _square(v: Value, name: str) -> np.ndarray | CellError:
    m = _matrix(v, name)
    if type(m) is not CellError and m.shape[0] != m.shape[1]:
        return CellError(VALUE, f"{name} takes a square matrix, not {shape_text(m.shape)}")
    return m


@builtin("MDETERM", 1, arrays=(0,))
def mdeterm(a: Value) -> Value:
    """The determinant of a square matrix.

    >>> mdeterm(2.0)
    2.0
    """
    m = _square(a, "MDETERM")
    if type(m) is CellError:
        return m
    # at Excel's 15 significant digits: the LU factors' rounding (-3.0000000000000004 for
    # {3,6;1,1}) is below them
    return float(f"{np.linalg.det(m):.15g}")


@builtin("MINVERSE", 1, arrays=(0,))
def minverse(a: Value) -> Value:
    """The inverse of a square matrix; #NUM! when it is singular.

    >>> from cellfuncs.formula import compute
    >>> compute("=MINVERSE({4,-1;2,0})").tolist()
    [[0.0, 0.5], [-1.0, 2.0]]
    """
    m = _square(a, "MINVERSE")
    if type(m) is CellError:
        return m
    if abs(np.linalg.det(m)) < 1e-300:
        return CellError(NUM, "the matrix is singular")
    return as_value(np.linalg.inv(m))


@builtin("MUNIT", 1)
def munit(n: Value) -> Value:
    """The n x n identity matrix.

    >>> munit(2.0).tolist()
    [[1.0, 0.0], [0.0, 1.0]]
    """
    k = to_number(n)
    if type(k) is CellError:
        return k
    if k < 1:
        return CellError(VALUE, "MUNIT takes a size of at least 1")
    if k > 4096:
        return CellError(NUM, "MUNIT larger than 4096 x 4096 is not supported")
    return charge((int(k), int(k))) or as_value(np.eye(int(k)))


@builtin("SEQUENCE", 1, 4)
def sequence(rows: Value, columns: Value = 1.0, start: Value = 1.0, step: Value = 1.0) -> Value:
    """A rows x columns array counting from ``start`` by ``step``, row by row.

    >>> sequence(3.0).tolist()
    [[1.0], [2.0], [3.0]]
    """
    if any(type(v) is np.ndarray for v in (rows, columns, start, step)):
        return CellError(VALUE, "SEQUENCE takes single numbers (an array of arrays is not a value)")
    args = [to_number(1.0 if v is None else v) for v in (rows, columns, start, step)]
    for x in args:
        if type(x) is CellError:
            return x
    r, c, first, inc = int(args[0]), int(args[1]), args[2], args[3]
    if r < 0 or c < 0:
        return CellError(VALUE, "SEQUENCE needs at least one row and one column")
    if r == 0 or c == 0:  # an empty array is a calculation Excel cannot show
        return CellError(CALC, "SEQUENCE of no rows or no columns is an empty array")
    if r * c > 1_048_576:
        return CellError(NUM, "SEQUENCE would be larger than a sheet column")
    return charge((r, c)) or as_value(first + inc * np.arange(r * c, dtype=float).reshape(r, c))
