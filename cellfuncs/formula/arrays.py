"""Array values and element-wise application with Excel's broadcasting.

An array value is a 2-D numpy object array (rows x columns) of scalar values. A
:class:`CellError` is a tuple, so arrays are always built by element assignment,
never by ``np.array(list_of_values)``, which would unpack the errors.

>>> a = object_array([[1.0, 2.0, 3.0]])
>>> b = object_array([[10.0], [20.0]])
>>> map_values(lambda x, y: x + y, a, b).tolist()
[[11.0, 12.0, 13.0], [21.0, 22.0, 23.0]]
"""

from __future__ import annotations

import functools
import math
from numbers import Real
from typing import Any, Callable, Sequence, Union

import numpy as np

from ..errors import CALC, DIV0, NA, NUM, VALUE, CellError
from .budget import charge
from .coerce import to_number
from .nodes import Scalar

Value = Union[Scalar, np.ndarray]

_NOT_FINITE = CellError(NUM, "the result is not a finite number")
_TOO_LARGE = CellError(NUM, "the result is too large")
_BEYOND = CellError(NA, "beyond the end of the shorter array")


def shape_text(shape: tuple[int, ...]) -> str:
    """Shape as people name it: ``2x3`` for 2 rows and 3 columns.

    >>> shape_text((2, 3))
    '2x3'
    """
    return "x".join(str(n) for n in shape)


def object_array(rows: Sequence[Sequence[Scalar]]) -> np.ndarray:
    """A 2-D object array holding ``rows`` (equal lengths) element by element.

    >>> object_array([[1.0, CellError("#N/A")]]).shape
    (1, 2)
    """
    out = np.empty((len(rows), len(rows[0])), dtype=object)
    for i, row in enumerate(rows):
        for j, v in enumerate(row):
            out[i, j] = v
    return out


def filled(shape: tuple[int, ...], value: Scalar) -> np.ndarray:
    """An object array of ``shape`` with every element ``value`` (errors included).

    >>> filled((1, 2), CellError("#N/A")).tolist()
    [[CellError(code='#N/A', reason=''), CellError(code='#N/A', reason='')]]
    """
    out = np.empty(shape, dtype=object)
    out.fill(value)
    return out


def as_array(v: Value) -> np.ndarray:
    """``v`` as a 2-D array: a scalar becomes 1x1.

    >>> as_array(5.0).shape
    (1, 1)
    """
    return v if type(v) is np.ndarray else filled((1, 1), v)


def first_error(values: np.ndarray) -> CellError | None:
    """The first error element in row-major order, if any.

    >>> first_error(object_array([[1.0, CellError("#DIV/0!")]])).code
    '#DIV/0!'
    """
    for v in values.flat:
        if type(v) is CellError:
            return v
    return None


def map_values(fn: Callable[..., Scalar], *values: Value) -> Value:
    """``fn`` applied to scalars, or element by element over arrays brought to a common
    shape as Excel pairs them: the most rows and the most columns of any; along an axis where
    an array has one row (or column) it repeats, a scalar everywhere; elsewhere a shorter
    array is padded with #N/A (Excel's stored values of IF(A1:A4>2, H1:H2, E1:E2),
    IFERROR(G4:G7/H4:H7, G12:G13) and DATE(A2:A6, B2:B4, C2:C3) end in #N/A).

    A result over the active work budget (see :mod:`.budget`) is that budget's error value.

    >>> map_values(max, object_array([[1.0, 5.0]]), 3.0).tolist()
    [[3.0, 5.0]]
    >>> map_values(lambda x, y: y, object_array([[1.0, 2.0, 3.0]]), object_array([[0.0, 9.0]]))[0].tolist()
    [0.0, 9.0, CellError(code='#N/A', reason='beyond the end of the shorter array')]
    """
    for v in values:
        if type(v) is np.ndarray:
            break
    else:  # all scalars: the common case, kept free of array work
        return fn(*values)
    arrays = [v for v in values if type(v) is np.ndarray]
    rows, cols = max(a.shape[0] for a in arrays), max(a.shape[1] for a in arrays)
    over = charge((rows, cols))  # a whole column against a whole row: refused before it is built
    if over is not None:
        return over
    fitted = [_fit(v, rows, cols) if type(v) is np.ndarray else as_array(v) for v in values]
    with np.errstate(all="ignore"):  # fn turns overflow into error values; numpy need not warn
        return np.frompyfunc(fn, len(fitted), 1)(*fitted)


def _fit(a: np.ndarray, rows: int, cols: int) -> np.ndarray:
    """``a`` padded with #N/A to ``rows`` x ``cols`` along each axis where it is shorter and
    not a single row or column (which numpy's broadcasting repeats)."""
    h, w = a.shape
    if h in (1, rows) and w in (1, cols):
        return a
    out = filled((1 if h == 1 else rows, 1 if w == 1 else cols), _BEYOND)
    out[:h, :w] = a
    return out


def elementwise(fn: Callable[..., Scalar]) -> Callable[..., Value]:
    """``fn`` on scalars turned into a function that also broadcasts over arrays.

    >>> elementwise(lambda s: s.upper())(object_array([["a", "b"]])).tolist()
    [['A', 'B']]
    """

    @functools.wraps(fn)
    def apply(*values: Value) -> Value:
        return map_values(fn, *values)

    apply.takes_values = True  # each argument a value: a legacy formula intersects a range given to it
    return apply


def numeric(fn: Callable[..., float | CellError]) -> Callable[..., Value]:
    """An element-wise function of numbers: arguments are coerced (first error wins),
    overflow and non-finite results become #NUM!.

    >>> half = numeric(lambda x: x / 2)
    >>> half("3"), half("x").code, half(object_array([[1.0, True]])).tolist()
    (1.5, '#VALUE!', [[0.5, 0.5]])
    """

    def scalar(*args: Scalar) -> Scalar:
        nums = []
        for a in args:
            if type(a) is not float:
                a = to_number(a)
                if type(a) is CellError:
                    return a
            nums.append(a)
        try:
            r = fn(*nums)
        except OverflowError:
            return _TOO_LARGE
        except ZeroDivisionError:
            return CellError(DIV0, "division by zero")
        except ValueError:  # a math domain error
            return _NOT_FINITE
        if type(r) is float and not math.isfinite(r):
            return _TOO_LARGE if r == r else _NOT_FINITE
        if type(r) is complex:  # a negative number to a fractional power: no real result
            return _NOT_FINITE
        return r

    return elementwise(functools.wraps(fn)(scalar))


def _element(v: Any) -> Scalar:
    return CellError(VALUE, "an array element is itself an array") if isinstance(v, np.ndarray) else as_value(v)


def as_value(v: Any) -> Value:
    """A function's result in the value contract: numpy scalars and ints become Python
    values, NaN and infinities #NUM!, 0-d arrays scalars, 1-D arrays a row, other
    arrays 2-D object arrays.

    >>> as_value(np.float64(2.5)), as_value(3), as_value(np.array(7.0))
    (2.5, 3.0, 7.0)
    >>> as_value(np.array([1.0, np.nan])).tolist()
    [[1.0, CellError(code='#NUM!', reason='the result is not a finite number')]]
    """
    t = type(v)
    if t is float:
        return v if math.isfinite(v) else _NOT_FINITE
    if t is str or t is bool or t is CellError or v is None:
        return v
    if isinstance(v, np.ndarray):
        return _as_array_value(v)
    if isinstance(v, np.generic):
        return as_value(v.item())
    if isinstance(v, Real):
        return as_value(float(v))
    return CellError(VALUE, f"a function returned an unsupported {t.__name__} value")


def _as_array_value(a: np.ndarray) -> Value:
    if a.ndim == 0:
        return _element(a[()])
    if a.ndim > 2:
        return CellError(VALUE, f"a function returned a {a.ndim}-D array")
    if a.size == 0:
        return CellError(CALC, "a function returned an empty array")
    a = a.reshape(1, -1) if a.ndim == 1 else a
    kind = a.dtype.kind
    if kind == "b" or kind in "US":
        return a.astype(object)
    if kind in "fiu":
        f = a.astype(float)
        out = f.astype(object)
        for i, j in zip(*np.nonzero(~np.isfinite(f))):
            out[i, j] = _NOT_FINITE
        return out
    if kind == "O":
        return np.frompyfunc(_element, 1, 1)(a)
    return CellError(VALUE, f"a function returned an array of unsupported type {a.dtype}")
