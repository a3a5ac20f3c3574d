"""Built-in logical functions: IF, IFS, IFERROR, IFNA, ISERROR, AND, OR, XOR, NOT, SWITCH, TRUE, FALSE.

>>> from cellfuncs.formula import compute
>>> compute('=IF(1>2, 1/0, "no")'), compute('=IFERROR(1/0, -1)'), compute('=AND(TRUE, 1, OR(FALSE))')
('no', -1.0, False)
"""

from __future__ import annotations

import numpy as np

from ..errors import NA, VALUE, CellError
from .arrays import Value, elementwise, first_error, map_values
from .coerce import compare, to_bool
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
    >>> compute('=IFERROR(1/{1,0,2}, "-")').tolist(), compute('=IFERROR(1/{1;0;0}, {7;8})').tolist()
    ([[1.0, '-', 0.5]], [[1.0], [8.0], [CellError(code='#N/A', reason='beyond the end of the shorter array')]])
    """
    v = evaluate(value, context)
    if type(v) is CellError:
        return _argument(fallback, context)
    if type(v) is np.ndarray and first_error(v) is not None:
        return map_values(lambda x, g: g if type(x) is CellError else x, v, _argument(fallback, context))
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


def _typed_logical(v: Scalar) -> bool | CellError | None:
    """A typed argument as a logical value; empty text is passed over, as Excel's stored
    values show (AND("", TRUE) is TRUE, OR("", FALSE) FALSE)."""
    return None if v == "" else to_bool(v)


def _logicals(context: Context, nodes: tuple[Node, ...], name: str) -> list | CellError:
    values = collect(context, nodes, _typed_logical, _logical_element)
    if type(values) is list:
        values = [v for v in values if v is not None]
    if type(values) is list and not values:
        return CellError(VALUE, f"{name} found no logical values")
    if type(values) is CellError and values.code == VALUE:
        # an error value among the arguments wins over text that is not TRUE or FALSE:
        # AND(TRUE, "0", #REF!) is #REF! in Excel
        for node in nodes:
            v = evaluate(node, context)
            found = v if type(v) is CellError else first_error(v) if type(v) is np.ndarray else None
            if found is not None and found.code != VALUE:
                return found
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


@builtin("XOR", 1, None, lazy=True)
def xor(context: Context, *nodes: Node) -> bool | CellError:
    """TRUE when an odd number of the logical arguments are TRUE.

    >>> from cellfuncs.formula import compute
    >>> compute('=XOR(TRUE, {1,0})'), compute('=XOR(1, 1)')
    (False, False)
    """
    values = _logicals(context, nodes, "XOR")
    return values if type(values) is CellError else sum(values) % 2 == 1


@builtin("IFNA", 2, lazy=True)
def ifna(context: Context, value: Node, fallback: Node) -> Value:
    """``value``, with each #N/A (element) replaced by ``fallback``; other errors stay.

    >>> from cellfuncs.formula import compute
    >>> compute('=IFNA(NA(), 0)'), compute('=IFNA(1/0, 0)').code
    (0.0, '#DIV/0!')
    """
    v = evaluate(value, context)
    is_na = lambda x: type(x) is CellError and x.code == NA  # noqa: E731
    if is_na(v):
        return _argument(fallback, context)
    if type(v) is np.ndarray and any(is_na(x) for x in v.flat):
        return map_values(lambda x, f: f if is_na(x) else x, v, _argument(fallback, context))
    return v


@builtin("IFS", 2, None, lazy=True)
def ifs(context: Context, *nodes: Node) -> Value:
    """The value after the first TRUE test of ``test1, value1, test2, value2, ...``; #N/A when
    none is TRUE.

    >>> from cellfuncs.formula import compute
    >>> compute('=IFS(1>2, "a", 2>1, "b")'), compute('=IFS(FALSE, 1)').code
    ('b', '#N/A')
    """
    if len(nodes) % 2:
        return CellError(VALUE, "IFS takes pairs of a test and a value")
    for test, then in zip(nodes[::2], nodes[1::2]):
        t = evaluate(test, context)
        if type(t) is np.ndarray:
            t = t[0, 0]
        t = to_bool(t)
        if type(t) is CellError:
            return t
        if t:
            return _argument(then, context)
    return CellError(NA, "no test of IFS is TRUE")


@builtin("SWITCH", 3, None, lazy=True)
def switch(context: Context, expression: Node, *nodes: Node) -> Value:
    """The result paired with the first value equal to ``expression``, else the default (an
    odd last argument), else #N/A.

    >>> from cellfuncs.formula import compute
    >>> compute('=SWITCH(2, 1, "one", 2, "two")'), compute('=SWITCH("x", "y", 1, 0)')
    ('two', 0.0)
    """
    x = evaluate(expression, context)
    if type(x) is CellError:
        return x
    if type(x) is np.ndarray:
        x = x[0, 0]
    for value, result in zip(nodes[::2], nodes[1::2]):
        v = evaluate(value, context)
        if type(v) is np.ndarray:
            v = v[0, 0]
        if type(v) is CellError:
            return v
        if type(v) is type(x) and compare(x, v) == 0:
            return _argument(result, context)
    if len(nodes) % 2:
        return _argument(nodes[-1], context)
    return CellError(NA, "SWITCH found no matching value")


builtin("TRUE", 0)(lambda: True)
builtin("FALSE", 0)(lambda: False)
