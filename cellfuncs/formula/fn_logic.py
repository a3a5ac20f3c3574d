"""Built-in logical functions: IF, IFERROR, ISERROR, AND, OR, NOT.

>>> from cellfuncs.formula import compute
>>> compute('=IF(1>2, 1/0, "no")'), compute('=IFERROR(1/0, -1)'), compute('=AND(TRUE, 1, OR(FALSE))')
('no', -1.0, False)
"""

from __future__ import annotations

import numpy as np

from ..errors import VALUE, CellError
from .arrays import Value, elementwise, first_error, map_values
from .coerce import to_bool
from .evaluate import Context, builtin, collect, evaluate
from .nodes import Missing, Node, Scalar


def _argument(node: Node, context: Context) -> Value:
    """A branch value: an empty argument counts as 0, as in ``=IF(TRUE,)``."""
    return 0.0 if type(node) is Missing else evaluate(node, context)


def _pick(test: Scalar, then: Scalar, otherwise: Scalar) -> Scalar:
    test = to_bool(test)
    if type(test) is CellError:
        return test
    return then if test else otherwise


@builtin("IF", 2, 3, lazy=True)
def if_(context: Context, test: Node, then: Node, otherwise: Node | None = None) -> Value:
    """``then`` or ``otherwise`` (FALSE when left out); only the chosen branch is evaluated
    unless the test is an array, which picks element by element.

    >>> from cellfuncs.formula import compute
    >>> compute('=IF({TRUE,FALSE}, "y", "n")').tolist()
    [['y', 'n']]
    """
    t = evaluate(test, context)
    if type(t) is not np.ndarray:
        t = to_bool(t)
        if type(t) is CellError:
            return t
        if t:
            return _argument(then, context)
        return False if otherwise is None else _argument(otherwise, context)
    no = False if otherwise is None else _argument(otherwise, context)
    return map_values(_pick, t, _argument(then, context), no)


@builtin("IFERROR", 2, lazy=True)
def iferror(context: Context, value: Node, fallback: Node) -> Value:
    """``value``, with each error (element) replaced by ``fallback``, evaluated only when needed.

    >>> from cellfuncs.formula import compute
    >>> compute('=IFERROR(1/{1,0,2}, "-")').tolist()
    [[1.0, '-', 0.5]]
    """
    v = evaluate(value, context)
    if type(v) is CellError:
        return _argument(fallback, context)
    if type(v) is np.ndarray and first_error(v) is not None:
        return map_values(lambda x, f: f if type(x) is CellError else x, v, _argument(fallback, context))
    return v


@builtin("ISERROR", 1)
@elementwise
def iserror(v: Scalar) -> bool:
    """TRUE for an error value.

    >>> from cellfuncs.formula import compute
    >>> compute("=ISERROR(#N/A)"), compute("=ISERROR(1)")
    (True, False)
    """
    return type(v) is CellError


def _logical_element(x: Scalar) -> bool | None:
    """A logical value from a range: numbers and booleans count, text and blanks are skipped."""
    t = type(x)
    if t is bool:
        return x
    return x != 0.0 if t is float else None


def _logicals(context: Context, nodes: tuple[Node, ...], name: str) -> list | CellError:
    values = collect(context, nodes, to_bool, _logical_element)
    if type(values) is list and not values:
        return CellError(VALUE, f"{name} found no logical values")
    return values


@builtin("AND", 1, None, lazy=True)
def and_(context: Context, *nodes: Node) -> bool | CellError:
    """TRUE when every logical argument is TRUE; text in ranges is ignored.

    >>> from cellfuncs.formula import compute
    >>> compute('=AND({1,"x",TRUE})'), compute('=AND(1, 0)')
    (True, False)
    """
    values = _logicals(context, nodes, "AND")
    return values if type(values) is CellError else all(values)


@builtin("OR", 1, None, lazy=True)
def or_(context: Context, *nodes: Node) -> bool | CellError:
    """TRUE when any logical argument is TRUE.

    >>> from cellfuncs.formula import compute
    >>> compute('=OR(FALSE, 2)'), compute('=OR({"x"})').code
    (True, '#VALUE!')
    """
    values = _logicals(context, nodes, "OR")
    return values if type(values) is CellError else any(values)


@builtin("NOT", 1)
@elementwise
def not_(v: Scalar) -> bool | CellError:
    """The opposite logical value.

    >>> from cellfuncs.formula import compute
    >>> compute("=NOT(0)"), compute("=NOT({TRUE,FALSE})").tolist()
    (True, [[False, True]])
    """
    b = to_bool(v)
    return b if type(b) is CellError else not b
