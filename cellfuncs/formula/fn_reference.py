"""Built-in functions about references and array shapes: ROW, COLUMN, ROWS, COLUMNS,
SHEET, SHEETS, CHOOSE, TRANSPOSE.

ROW and COLUMN need the reference itself, not its values: the evaluation context answers
``bounds(sheet, ref)`` (first row, first column, last row, last column) and ``position()``
(the formula's own cell). A context without a workbook has neither: #VALUE!.

>>> from cellfuncs.formula import compute
>>> compute("=ROWS({1,2;3,4;5,6})"), compute("=CHOOSE(2, \\"a\\", \\"b\\")"), compute("=TRANSPOSE({1,2})").tolist()
(3.0, 'b', [[1.0], [2.0]])
"""

from __future__ import annotations

import numpy as np

from ..errors import NA, VALUE, CellError
from .arrays import Value, as_array, map_values
from .coerce import to_number
from .evaluate import Context, builtin, evaluate
from .nodes import Missing, Node, Ref


def _bounds(context: Context, node: Node) -> tuple[int, int, int, int] | CellError:
    if type(node) is not Ref:
        return CellError(VALUE, "the argument must be a reference")
    bounds = getattr(context, "bounds", None)
    if bounds is None:
        return CellError(VALUE, "the formula has no workbook")
    return bounds(node.sheet, node.ref)


def _here(context: Context) -> tuple[int, int] | CellError:
    position = getattr(context, "position", None)
    return position() if position is not None else CellError(VALUE, "the formula has no cell")


def _numbering(name: str, axis: int) -> None:
    def fn(context: Context, node: Node | None = None) -> Value:
        if node is None or type(node) is Missing:
            here = _here(context)
            return here if type(here) is CellError else float(here[axis])
        b = _bounds(context, node)
        if type(b) is CellError:
            return b
        first, last = b[axis], b[axis + 2]
        if first == last:
            return float(first)
        out = np.empty((last - first + 1, 1) if axis == 0 else (1, last - first + 1), dtype=object)
        out.flat[:] = [float(i) for i in range(first, last + 1)]
        return out

    fn.__doc__ = f"{name}([reference]): the {name.lower()} number(s) of a reference, or of the formula's cell."
    builtin(name, 0, 1, lazy=True)(fn)


_numbering("ROW", 0)
_numbering("COLUMN", 1)


def _size(name: str, axis: int) -> None:
    def fn(context: Context, node: Node) -> Value:
        if type(node) is Ref:
            b = _bounds(context, node)
            return b if type(b) is CellError else float(b[axis + 2] - b[axis] + 1)
        v = evaluate(node, context)
        if type(v) is CellError:
            return v
        return float(as_array(v).shape[axis])

    fn.__doc__ = f"{name}(array): how many {name.lower()} a reference or array has."
    builtin(name, 1, lazy=True)(fn)


_size("ROWS", 0)
_size("COLUMNS", 1)


@builtin("SHEET", 0, 1, lazy=True)
def sheet(context: Context, node: Node | None = None) -> Value:
    """The position of a sheet in the workbook (1 for the first): of the formula's own sheet,
    of a reference's sheet, or of the sheet a text names (#N/A if none does).

    >>> from cellfuncs.formula import compute
    >>> compute("=SHEET()").code
    '#VALUE!'
    """
    position = getattr(context, "sheet_position", None)
    if position is None:
        return CellError(VALUE, "the formula has no workbook")
    if node is None or type(node) is Missing:
        found = position(None)
    elif type(node) is Ref:
        found = position(node.sheet)
    else:
        v = evaluate(node, context)
        if type(v) is CellError:
            return v
        found = position(v) if type(v) is str else None
    return CellError(NA, "SHEET takes a reference or the name of a sheet") if found is None else float(found)


@builtin("SHEETS", 0, 1, lazy=True)
def sheets(context: Context, node: Node | None = None) -> Value:
    """How many sheets a reference spans (1), or without one how many the workbook has."""
    count = getattr(context, "sheet_count", None)
    if count is None:
        return CellError(VALUE, "the formula has no workbook")
    if node is None or type(node) is Missing:
        return float(count())
    if type(node) is Ref:
        return 1.0
    v = evaluate(node, context)
    return v if type(v) is CellError else CellError(VALUE, "SHEETS takes a reference")


@builtin("CHOOSE", 2, 255, lazy=True)
def choose(context: Context, index: Node, *options: Node) -> Value:
    """The ``index``-th option (1-based, truncated); only the chosen one is evaluated.

    >>> from cellfuncs.formula import compute
    >>> compute("=CHOOSE(2.9, 10, 20, 30)"), compute("=CHOOSE(4, 1, 2)").code
    (20.0, '#VALUE!')
    """
    i = evaluate(index, context)

    def pick(x) -> Value:
        n = to_number(x)
        if type(n) is CellError:
            return n
        k = int(n)
        if not 1 <= k <= len(options):
            return CellError(VALUE, f"CHOOSE has no option {k}")
        chosen = options[k - 1]
        return 0.0 if type(chosen) is Missing else evaluate(chosen, context)

    if type(i) is np.ndarray:
        return map_values(lambda x: _scalar(pick(x)), i)
    return pick(i)


def _scalar(v: Value):
    return v[0, 0] if type(v) is np.ndarray else v


@builtin("TRANSPOSE", 1)
def transpose(array: Value) -> Value:
    """Rows as columns.

    >>> transpose(5.0)
    5.0
    """
    if type(array) is not np.ndarray:
        return array
    return np.ascontiguousarray(array.T)
