"""Built-in SUBTOTAL: an aggregate over ranges that leaves out other subtotals.

``SUBTOTAL(function_num, ref1, ...)`` applies AVERAGE (1), COUNT (2), COUNTA (3), MAX (4),
MIN (5), PRODUCT (6), STDEV (7), STDEVP (8), SUM (9), VAR (10) or VARP (11) to the cells of
its references, leaving out cells that are themselves SUBTOTAL or AGGREGATE formulas (so
a column of subtotals and a grand total do not count twice). Codes 101-111 also leave out
hidden rows. The arguments must be references. Excel's documentation of SUBTOTAL gives
these rules.

The reduction is the named built-in itself, run on the references' values with the left-out
cells blank, so SUBTOTAL(9, …) and SUM agree on every value they are given.

>>> from cellfuncs.formula import compute
>>> compute("=SUBTOTAL(9, {1,2})").code
'#VALUE!'
"""

from __future__ import annotations

from typing import Any, Callable

import numpy as np

from ..errors import VALUE, CellError
from .arrays import Value, as_array
from .coerce import to_number
from .evaluate import BUILTINS, Context, builtin, evaluate
from .fn_reference import found_reference
from .nodes import Name, Node, Ref

SUBTOTAL_FUNCTIONS = ("AVERAGE", "COUNT", "COUNTA", "MAX", "MIN", "PRODUCT", "STDEV", "STDEVP", "SUM", "VAR", "VARP")


class _Given:
    """A context that answers the names ``\\x00k`` with given values and passes the rest on."""

    def __init__(self, outer: Context, values: list[Value]):
        self.outer, self.values = outer, values

    def function(self, name: str) -> Callable[..., Any] | None:
        return self.outer.function(name)

    def reference(self, sheet: str | None, ref: str) -> Value:
        return self.outer.reference(sheet, ref)

    def name(self, text: str) -> Value:
        return self.values[int(text[1:])]


def reduce_as(name: str, context: Context, values: list[Value]) -> Value:
    """Built-in ``name`` applied to ``values`` as if each were a range argument."""
    given = _Given(context, values)
    return BUILTINS[name].fn(given, *(Name(f"\x00{k}") for k in range(len(values))))


def kept(context: Context, node: Node, ref: Ref, hidden: bool) -> Value:
    """The values of argument ``node`` (reference ``ref``) with the cells a subtotal leaves out blank."""
    v = evaluate(node, context)
    left_out = getattr(context, "left_out", None)
    mask = left_out(ref.sheet, ref.ref, hidden) if left_out is not None else None
    if mask is None or not mask.any():
        return v
    out = as_array(v).copy()
    out[mask[:out.shape[0], :out.shape[1]]] = None
    return out


@builtin("SUBTOTAL", 2, 255, lazy=True)
def subtotal(context: Context, code_node: Node, *nodes: Node) -> Value:
    given = evaluate(code_node, context)
    if type(given) is np.ndarray:
        return CellError(VALUE, "SUBTOTAL takes one function number")
    code = to_number(given)
    if type(code) is CellError:
        return code
    number = int(code)
    hidden = number > 100
    base = number - 100 if hidden else number
    if not 1 <= base <= len(SUBTOTAL_FUNCTIONS):
        return CellError(VALUE, f"SUBTOTAL's function number {code:g} is not 1-11 or 101-111")
    values = []
    for node in nodes:
        ref = found_reference(context, node)
        if type(ref) is CellError:
            return ref
        if ref is None:
            return CellError(VALUE, "SUBTOTAL takes references to cells")
        values.append(kept(context, node, ref, hidden))
    return reduce_as(SUBTOTAL_FUNCTIONS[base - 1], context, values)
