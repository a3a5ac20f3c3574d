"""Built-in TRIMRANGE: a range (or array) without the blank rows and columns at its edges.

A reference gives a reference (``SUM(TRIMRANGE(A:A))`` adds the used cells, ``ROWS`` counts
them), an array an array. Blank means an empty cell; a formula giving "" is not blank.

>>> from cellfuncs.formula import compute
>>> compute("=TRIMRANGE({1,2;3,4})").tolist(), compute("=TRIMRANGE(A1:B2)").code
([[1.0, 2.0], [3.0, 4.0]], '#VALUE!')
"""

from __future__ import annotations

import numpy as np

from ..errors import REF, VALUE, CellError
from .arrays import Value, as_array
from .coerce import to_number
from .evaluate import Context, anchored, dereference, evaluate, reference_builtin
from .fn_reference import found_reference
from .nodes import Missing, Node, Ref

LEADING, TRAILING = 1, 2  # the bits of trim_rows and trim_cols (3: both, the default)


def _mode(context: Context, node: Node | None) -> int | CellError:
    if node is None or type(node) is Missing:
        return LEADING | TRAILING
    v = evaluate(node, context)
    x = CellError(VALUE, "TRIMRANGE's trim modes are single numbers") if type(v) is np.ndarray else to_number(v)
    if type(x) is CellError:
        return x
    if x not in (0.0, 1.0, 2.0, 3.0):
        return CellError(VALUE, "a TRIMRANGE trim mode is 0, 1, 2 or 3")
    return int(x)


def kept(values: np.ndarray, rows: int, cols: int) -> tuple[int, int, int, int] | CellError:
    """First row, first column, last row, last column (from 0) of ``values`` once the blank
    rows and columns at the edges the modes name are left out.

    >>> kept(np.array([[None, None], [None, 1.0], [None, None]], dtype=object), 3, 1)
    (1, 1, 1, 1)
    """
    filled = np.frompyfunc(lambda v: v is not None, 1, 1)(values).astype(bool)
    used_rows, used_cols = np.flatnonzero(filled.any(axis=1)), np.flatnonzero(filled.any(axis=0))
    if not used_rows.size:
        return CellError(REF, "TRIMRANGE of a range with no value leaves nothing")
    h, w = values.shape
    return (int(used_rows[0]) if rows & LEADING else 0, int(used_cols[0]) if cols & LEADING else 0,
            int(used_rows[-1]) if rows & TRAILING else h - 1, int(used_cols[-1]) if cols & TRAILING else w - 1)


def _modes(context: Context, nodes: tuple[Node, ...]) -> tuple[int, int] | CellError:
    rows, cols = (_mode(context, n) for n in (*nodes, None, None)[:2])
    for m in (rows, cols):
        if type(m) is CellError:
            return m
    return rows, cols


def _array_form(context: Context, node: Node, *modes: Node) -> Value:
    """TRIMRANGE of an argument that gives values rather than a reference."""
    v = evaluate(node, context)
    how = _modes(context, modes)
    if type(v) is CellError or type(how) is CellError:
        return v if type(v) is CellError else how
    values = as_array(v)
    edges = kept(values, *how)
    if type(edges) is CellError:
        return edges
    r1, c1, r2, c2 = edges
    return values[r1:r2 + 1, c1:c2 + 1]


@reference_builtin("TRIMRANGE", 1, 3, value=_array_form, inside_first=True)
def trimrange(context: Context, node: Node, *modes: Node) -> Ref | CellError | None:
    """The reference without its blank edge rows and columns: ``trim_rows`` and ``trim_cols``
    0 keep them, 1 trim the leading ones, 2 the trailing ones, 3 (default) both.

    >>> from cellfuncs.formula import compute
    >>> compute("=TRIMRANGE({1,2}, 4)").code
    '#VALUE!'
    """
    found = found_reference(context, node)
    if found is None or type(found) is CellError:
        return found
    how = _modes(context, modes)
    bounds = getattr(context, "bounds", None)
    if type(how) is CellError or bounds is None:
        return how if type(how) is CellError else CellError(VALUE, "the formula has no workbook")
    b = bounds(found.sheet, found.ref)
    if type(b) is CellError:
        return b
    values = dereference(found, context)  # whole columns and rows come cut to the used range
    if type(values) is CellError:
        return values
    edges = kept(as_array(values), *how)
    if type(edges) is CellError:
        return edges
    top, left, bottom, right = edges
    r1, c1, r2, c2 = b
    rows, cols = how
    return anchored(found.sheet, r1 + top, c1 + left, r1 + bottom if rows & TRAILING else r2,
                    c1 + right if cols & TRAILING else c2)
