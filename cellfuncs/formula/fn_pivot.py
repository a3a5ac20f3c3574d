"""GETPIVOTDATA: the value a pivot table shows, asked of the evaluation context.

The context answers ``pivot_table(sheet, ref)`` with the pivot table the reference meets
(None: none), an object whose ``value(data_field, pairs)`` computes what the table shows
(see :mod:`cellfuncs.workbook.pivots`); a context without a workbook has no pivot tables.

>>> compute('=GETPIVOTDATA("Sales", A3)').code
'#REF!'
"""

from __future__ import annotations

import numpy as np

from ..errors import REF, CellError
from .arrays import Value
from .coerce import to_text
from .evaluate import Context, builtin, compute, evaluate  # noqa: F401  (compute: doctests)
from .fn_reference import found_reference
from .nodes import Node, Scalar


def _scalar(v: Value) -> Scalar:
    """A value argument as one value: an array's first element, a blank as empty text."""
    if type(v) is np.ndarray:
        v = v.flat[0] if v.size else None
    return "" if v is None else v


def _items(v: Value) -> object:
    """An item argument: one value, or the list of an array's values (items added together)."""
    if type(v) is np.ndarray:
        return [_scalar(x) for x in v.flat]
    return _scalar(v)


@builtin("GETPIVOTDATA", 2, 254, lazy=True)
def getpivotdata(context: Context, data_field: Node, pivot_table: Node, *pairs: Node) -> Value:
    """The value a pivot table shows for ``data_field`` and the field/item pairs (up to 126);
    #REF! when ``pivot_table`` is not in a pivot table, or the pairs name a field, item or
    total the table does not show.

    >>> compute('=GETPIVOTDATA("Sales", A3, "Month")').code
    '#REF!'
    """
    name = to_text(_scalar(evaluate(data_field, context)))
    if type(name) is CellError:
        return name
    found = found_reference(context, pivot_table)
    if type(found) is CellError:
        return found
    if found is None:
        return CellError(REF, "the second argument must be a reference into a pivot table")
    if len(pairs) % 2:
        return CellError(REF, "a field is given without its item")
    asked = []
    for field_node, item_node in zip(pairs[::2], pairs[1::2]):
        field = to_text(_scalar(evaluate(field_node, context)))
        if type(field) is CellError:
            return field
        item = _items(evaluate(item_node, context))
        if type(item) is CellError:
            return item
        asked.append((field, item))
    find = getattr(context, "pivot_table", None)
    table = find(found.sheet, found.ref) if find is not None else None
    if type(table) is CellError:
        return table
    if table is None:
        return CellError(REF, f"{found.ref} is not in a pivot table")
    return table.value(name, asked)
