"""Built-in functions of functions: LAMBDA, LET, ISOMITTED and the helpers that call a function
over an array (MAP, REDUCE, SCAN, BYROW, BYCOL, MAKEARRAY). See ``formula.lambdas``.

A helper's function must give one value for each call: an array there is #CALC!, as in
Excel, which has no arrays of arrays.

>>> compute("=LET(x, 2, y, x*10, x+y)"), compute("=LAMBDA(x, y, SQRT(x*x+y*y))(3, 4)")
(22.0, 5.0)
>>> compute("=MAP({1,2,3}, LAMBDA(v, v*v))").tolist()
[[1.0, 4.0, 9.0]]
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..errors import CALC, NA, VALUE, CellError
from .arrays import Value, as_array, as_value
from .budget import charge
from .coerce import to_number
from .evaluate import Context, apply_lambda, bind, builtin, compute, evaluate, with_scope  # noqa: F401  (compute: doctests)
from .lambdas import OMITTED, Lambda, is_optional, param_key
from .nodes import Missing, Name, Node


def _names(nodes: tuple[Node, ...], what: str) -> list[str] | CellError:
    out = []
    for n in nodes:
        if type(n) is not Name:
            return CellError(VALUE, f"{what} must be names")
        out.append(n.text)
    return out


@builtin("LAMBDA", 1, 254, lazy=True)
def lambda_(context: Context, *nodes: Node) -> Value:
    """A function of the named parameters whose value is the last argument; called as
    ``LAMBDA(x, x+1)(5)``, through a LET name or a defined name. A parameter written
    ``_xlop.name`` in the file may be left out (ISOMITTED tells).

    >>> compute("=LAMBDA(x, x+1)(5)")
    6.0
    """
    names = _names(nodes[:-1], "LAMBDA's parameters")
    if type(names) is CellError:
        return names
    keys = tuple(param_key(t) for t in names)
    if len(set(keys)) < len(keys):
        return CellError(VALUE, "LAMBDA's parameters must have different names")
    optional = frozenset(k for k, t in zip(keys, names) if is_optional(t))
    return Lambda(keys, optional, nodes[-1], dict(getattr(context, "scope", None) or {}), context)


@builtin("LET", 3, 253, lazy=True)
def let(context: Context, *nodes: Node) -> Value:
    """Names bound to values (each may use the ones before), then the calculation that uses
    them: ``LET(name1, value1, [name2, value2, …], calculation)``.

    >>> compute("=LET(x, 5, x*x)")
    25.0
    """
    if len(nodes) % 2 == 0:
        return CellError(VALUE, "LET takes pairs of a name and a value, then the calculation")
    names = _names(nodes[:-1:2], "LET's names")
    if type(names) is CellError:
        return names
    scope = dict(getattr(context, "scope", None) or {})
    for text, node in zip(names, nodes[1:-1:2]):
        if type(node) is Missing:
            return CellError(VALUE, f"LET's name {text} has no value")
        scope[param_key(text)] = with_scope(context, dict(scope), node, bind)
    return with_scope(context, scope, nodes[-1])


@builtin("ISOMITTED", 1, lazy=True)
def isomitted(context: Context, node: Node) -> Value:
    """TRUE when the call left out this parameter of the LAMBDA.

    >>> compute("=LAMBDA(x, y, IF(ISOMITTED(y), x, x+y))(1, )")
    1.0
    """
    scope = getattr(context, "scope", None) or {}
    return type(node) is Name and scope.get(param_key(node.text)) is OMITTED


# ---- helpers that call a function over an array ------------------------------------------
def _function(context: Context, node: Node, takes: int, name: str) -> Lambda | CellError:
    fn = evaluate(node, context)
    if type(fn) is CellError:
        return fn
    if type(fn) is not Lambda:
        return CellError(VALUE, f"{name} takes a function (LAMBDA) as its last argument")
    if len(fn.params) < takes or len(fn.params) - len(fn.optional) > takes:
        return CellError(VALUE, f"{name}'s function must take {takes} parameters")
    return fn


_NESTED = CellError(CALC, "the function gives an array where one value belongs (no arrays of arrays)")


def _one(fn: Lambda, values: list[Any]) -> Value:
    """One call's value; :data:`_NESTED` (the whole helper's result) for an array."""
    v = apply_lambda(fn, values)
    if type(v) is np.ndarray:
        return v[0, 0] if v.size == 1 else _NESTED
    return v


def _filled(shape: tuple[int, int], results: list[Value]) -> Value:
    for v in results:
        if v is _NESTED:
            return v
    out = np.empty(len(results), dtype=object)
    out[:] = results
    return as_value(out.reshape(shape))


@builtin("MAP", 2, 254, lazy=True)
def map_(context: Context, *nodes: Node) -> Value:
    """The function applied to the elements of the arrays at the same position; a one-cell
    array stands for every position, a position some array lacks is #N/A.

    >>> compute("=MAP({1,2;3,4}, {10,20;30,40}, LAMBDA(a, b, a+b))").tolist()
    [[11.0, 22.0], [33.0, 44.0]]
    """
    fn = _function(context, nodes[-1], len(nodes) - 1, "MAP")
    if type(fn) is CellError:
        return fn
    arrays = [as_array(evaluate(n, context)) for n in nodes[:-1]]
    rows, cols = max(a.shape[0] for a in arrays), max(a.shape[1] for a in arrays)
    over = charge((rows, cols))
    if over is not None:
        return over
    return _filled((rows, cols), [_one(fn, [_at(a, r, c) for a in arrays]) for r in range(rows) for c in range(cols)])


def _at(a: np.ndarray, r: int, c: int) -> Value:
    if a.shape == (1, 1):
        return a[0, 0]
    return a[r, c] if r < a.shape[0] and c < a.shape[1] else CellError(NA, "the arrays differ in size")


def _accumulate(context: Context, initial: Node, array: Node, function: Node, name: str) -> tuple | CellError:
    fn = _function(context, function, 2, name)
    if type(fn) is CellError:
        return fn
    start = OMITTED if type(initial) is Missing else evaluate(initial, context)
    values = as_array(evaluate(array, context))
    over = charge(values.shape)
    if over is not None:
        return over
    acc, steps = (None if start is OMITTED else start), []
    for v in values.flat:  # row by row, as Excel walks an array
        acc = _one(fn, [acc, v])
        if acc is _NESTED:
            return acc
        steps.append(acc)
    return acc, steps, values.shape


@builtin("REDUCE", 3, lazy=True)
def reduce_(context: Context, initial: Node, array: Node, function: Node) -> Value:
    """The accumulator after the function (accumulator, element) has taken every element of
    the array in turn, row by row, starting from the initial value.

    >>> compute("=REDUCE(0, {1,2,3}, LAMBDA(a, v, a+v))")
    6.0
    """
    done = _accumulate(context, initial, array, function, "REDUCE")
    return done if type(done) is CellError else done[0]


@builtin("SCAN", 3, lazy=True)
def scan(context: Context, initial: Node, array: Node, function: Node) -> Value:
    """Like REDUCE, the array of the accumulator's values after each element.

    >>> compute("=SCAN(0, {1,2,3}, LAMBDA(a, v, a+v))").tolist()
    [[1.0, 3.0, 6.0]]
    """
    done = _accumulate(context, initial, array, function, "SCAN")
    if type(done) is CellError:
        return done
    _, steps, shape = done
    return _filled(shape, steps)


def _by(context: Context, array: Node, function: Node, axis: int, name: str) -> Value:
    """The function of each row (axis 0) or column (axis 1) of the array."""
    fn = _function(context, function, 1, name)
    if type(fn) is CellError:
        return fn
    values = as_array(evaluate(array, context))
    parts = [values[i:i + 1, :] for i in range(values.shape[0])] if axis == 0 else \
        [values[:, j:j + 1] for j in range(values.shape[1])]
    return _filled((len(parts), 1) if axis == 0 else (1, len(parts)), [_one(fn, [p]) for p in parts])


@builtin("BYROW", 2, lazy=True)
def byrow(context: Context, array: Node, function: Node) -> Value:
    """The function applied to each row of the array (a one-row array), as a column.

    >>> compute("=BYROW({1,2;3,4}, LAMBDA(r, SUM(r)))").tolist()
    [[3.0], [7.0]]
    """
    return _by(context, array, function, 0, "BYROW")


@builtin("BYCOL", 2, lazy=True)
def bycol(context: Context, array: Node, function: Node) -> Value:
    """The function applied to each column of the array (a one-column array), as a row.

    >>> compute("=BYCOL({1,2;3,4}, LAMBDA(c, MAX(c)))").tolist()
    [[3.0, 4.0]]
    """
    return _by(context, array, function, 1, "BYCOL")


@builtin("MAKEARRAY", 3, lazy=True)
def makearray(context: Context, rows: Node, cols: Node, function: Node) -> Value:
    """A rows x columns array whose element is the function of its row and column numbers
    (from 1).

    >>> compute("=MAKEARRAY(2, 3, LAMBDA(r, c, r*c))").tolist()
    [[1.0, 2.0, 3.0], [2.0, 4.0, 6.0]]
    """
    size = [to_number(evaluate(n, context)) for n in (rows, cols)]
    for x in size:
        if type(x) is CellError:
            return x
    r, c = (int(x) for x in size)
    if r < 1 or c < 1:
        return CellError(VALUE, "MAKEARRAY needs at least one row and one column")
    fn = _function(context, function, 2, "MAKEARRAY")
    if type(fn) is CellError:
        return fn
    over = charge((r, c))
    if over is not None:
        return over
    return _filled((r, c), [_one(fn, [float(i + 1), float(j + 1)]) for i in range(r) for j in range(c)])
