"""Evaluation of a syntax tree against a context that resolves references, names and pack functions.

Built-in functions live in :data:`BUILTINS` (name -> :class:`Builtin`); the context
supplies everything that depends on a workbook or on the function pack.

>>> compute("=ROUND(SQRT(2)*10, 3)")
14.142
>>> print(compute("=A1+1"))
#REF! A1 is a cell reference, but the formula has no workbook
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable, Iterable, Mapping, Protocol

import numpy as np

from ..errors import CALC, DIV0, NAME, NULL, NUM, REF, VALUE, CellError, internal_error, strict
from .a1 import column_letters
from .arrays import Value, as_value, filled, object_array
from .budget import charge
from .lambdas import OMITTED, Lambda, param_key
from .nodes import Areas, Array, Binary, Call, Invoke, Literal, Missing, Name, Node, Ref, Scalar, Unary
from .operators import BINARY, UNARY
from .parser import parse
from .registry import Registry


class Context(Protocol):
    """What the evaluator asks of its caller.

    ``reference`` and ``name`` return values in the value contract: a scalar (float,
    bool, str, CellError, None for blank) or a 2-D object array of scalars, which the
    engine does not modify.
    """

    def function(self, name: str) -> Callable[..., Any] | None:
        """The pack function called ``name`` (upper case), or None if there is none."""

    def reference(self, sheet: str | None, ref: str) -> Value:
        """The value of a cell or range such as ``A1`` or ``$A$1:B3`` (sheet None: the formula's own)."""

    def name(self, text: str) -> Value:
        """The value of a defined name as written in the formula (``Rate``, ``Sheet1!Rate``)."""


class SimpleContext:
    """A context for formulas without a workbook: pack functions and named values only.

    Names are matched case-insensitively; every cell reference gives #REF!.

    >>> ctx = SimpleContext({"twice": lambda x: 2 * x}, {"rate": 0.5})
    >>> compute("=TWICE(Rate)", ctx)
    1.0
    """

    def __init__(self, functions: Mapping[str, Callable[..., Any]] | None = None, names: Mapping[str, Value] | None = None):
        self.functions = {k.upper(): f for k, f in (functions or {}).items()}
        self.names = {k.upper(): v for k, v in (names or {}).items()}

    def function(self, name: str) -> Callable[..., Any] | None:
        return self.functions.get(name)

    def reference(self, sheet: str | None, ref: str) -> Value:
        where = f"{sheet}!{ref}" if sheet else ref
        kind = "cell" if ":" not in ref else "range"
        return CellError(REF, f"{where} is a {kind} reference, but the formula has no workbook")

    def name(self, text: str) -> Value:
        value = self.names.get(text.upper(), _UNSET)
        return CellError(NAME, f"unknown name {text}") if value is _UNSET else value


_UNSET = object()


@dataclass(frozen=True, slots=True)
class Builtin:
    """A built-in function: ``fn`` takes evaluated values (None for a missing argument),
    or, when ``lazy``, the context followed by the unevaluated argument nodes.

    A function that can return a reference (INDIRECT, OFFSET, INDEX) also has ``reference``:
    called as a lazy function, it returns the :class:`Ref` (anchored, so it moves with no
    formula) or :class:`Name` it stands for, an error, or None when the call gives a value
    rather than a reference (INDEX of an array); ``fn`` then gives that value."""

    fn: Callable[..., Value]
    min_args: int
    max_args: int | None  # None: any number
    lazy: bool = False
    reference: Callable[..., Node | CellError | None] | None = None
    takes_values: bool = False  # every parameter a single value (see :func:`intersect`)
    arrays: frozenset[int] = frozenset()  # array-class parameters (see :func:`in_array_mode`)
    place_only: bool = False  # reads where a reference argument is, not its cells (ROW, FORMULATEXT)
    left_out: CellError | None = None  # what a left-out argument is, where not a blank (MROUND(,5))




def _load_builtins() -> None:
    from . import load_builtins  # the package lists the built-in modules

    load_builtins()


BUILTINS: dict[str, Builtin] = Registry(_load_builtins)  # filled on first need (see registry.py)
ALL_ARGUMENTS = frozenset(range(255))  # Excel's most arguments


def builtin(name: str, min_args: int, max_args: int | None = -1, lazy: bool = False,
            arrays: Iterable[int] = (), place_only: bool = False, left_out: CellError | None = None) -> Callable:
    """Register the decorated function as built-in ``name`` (``max_args`` defaults to ``min_args``).
    ``arrays`` holds the positions (from 0) of its array-class parameters, ``ALL_ARGUMENTS``
    for all: a legacy formula evaluates what is written there as an array (SUMPRODUCT,
    LOOKUP's vectors, INDEX's array), where elsewhere it intersects ranges with its cell.
    ``place_only``: a reference written as an argument is not read (ROW(A1) in A1 is no loop).
    ``left_out``: the error a left-out argument gives (a blank cell it refers to stays blank).

    >>> @builtin("HALF", 1)
    ... def _half(x):
    ...     return x / 2
    >>> compute("=HALF(3)")
    1.5
    >>> del BUILTINS["HALF"]
    """

    def register(fn: Callable[..., Value]) -> Callable[..., Value]:
        BUILTINS[name] = Builtin(fn, min_args, min_args if max_args == -1 else max_args, lazy,
                                 takes_values=getattr(fn, "takes_values", False), arrays=frozenset(arrays),
                                 place_only=place_only, left_out=left_out)
        return fn

    return register


def reference_builtin(name: str, min_args: int, max_args: int, value: Callable[..., Value] | None = None,
                      inside_first: bool = False, arrays: Iterable[int] = ()) -> Callable:
    """Register the decorated lazy function as the reference form of built-in ``name``;
    ``value`` (lazy too) gives the value when the reference form returns None. With
    ``inside_first`` the reference lies inside the first argument's (INDEX), so when that is
    written as a reference the recalculation order already holds its cells."""

    def register(fn: Callable[..., Node | CellError | None]) -> Callable:
        def evaluated(context: Context, *nodes: Node) -> Value:
            found = fn(context, *nodes)
            if found is None:
                return value(context, *nodes) if value is not None else CellError(VALUE, f"{name} needs a reference")
            if type(found) is CellError:
                return found
            if inside_first and type(found) is Ref and type(nodes[0]) in (Ref, Name):
                return context.reference(found.sheet, found.ref)
            return dereference(found, context)

        BUILTINS[name] = Builtin(evaluated, min_args, max_args, True, fn, arrays=frozenset(arrays))
        return fn

    return register


def reference_of(node: Node, context: Context) -> Ref | Areas | Name | CellError | None:
    """The reference an argument stands for: a reference as written, a defined name, the
    reference a function returns (``OFFSET(A1,1,0)``), a range between two of them
    (``A1:INDEX(B:B,3)``) or a union of several (``(A1:B2,C5)``, :class:`Areas`); None for an
    argument that gives a value."""
    kind = type(node)
    if kind is Name:
        bound = _bound(node.text, context)
        if bound is _UNSET:
            return node
        return bound if type(bound) is Ref or type(bound) is Areas else None
    if kind is Ref:
        return node
    if kind is Call:
        spec = BUILTINS.get(node.name)
        if spec is None or spec.reference is None:
            return None
        count = len(node.args)
        if count < spec.min_args or (spec.max_args is not None and count > spec.max_args):
            return _arity_error(node.name, spec, count)
        return spec.reference(context, *node.args)
    if kind is Binary and node.op == ":":
        return _range_between(node, context)
    if kind is Binary and node.op == " ":
        return _intersection(node, context)
    if kind is Binary and node.op == ",":
        return _union(node, context)
    return None


def _union_sides(node: Binary) -> list[Node]:
    """The references a chain of union operators joins, in the order written (walked in a
    loop: ``(A1,A2,...,A300)`` is a left-leaning tree)."""
    sides = []
    while type(node) is Binary and node.op == ",":
        sides.append(node.right)
        node = node.left
    sides.append(node)
    return sides[::-1]


def _union(node: Binary, context: Context) -> Areas | CellError:
    """``left,right``: every area of both references, each anchored, in the order written;
    areas on one sheet, as the range operator's."""
    parts: list[Ref] = []
    bounds = getattr(context, "bounds", None)
    for side in _union_sides(node):
        found = reference_of(side, context)
        if type(found) is Name:
            found = _name_reference(found, context)
        if found is None:
            return CellError(VALUE, "the union operator ',' joins references, not values")
        if type(found) is CellError:
            return found
        if type(found) is Areas:
            parts += found.parts
            continue
        if bounds is None:
            return CellError(REF, "the formula has no workbook")
        b = bounds(found.sheet, found.ref)
        if type(b) is CellError:
            return b
        parts.append(anchored(found.sheet, *b))
    if len({p.sheet for p in parts} - {None}) > 1:
        return CellError(VALUE, "the union operator ',' joins references on one sheet")
    return Areas(tuple(parts))


def _union_value(node: Binary, context: Context) -> Value:
    found = _union(node, context)
    if type(found) is CellError:
        return found
    written = all(type(side) is Ref or type(side) is Name for side in _union_sides(node))
    return areas_value(found, context, written)


def areas_value(found: Areas, context: Context, written: bool = False) -> Value:
    """The cells of every area of a union as one column, area after area, each row by row:
    what SUM, COUNT, LARGE or RANK go through. ``written``: every area is written in the
    formula, so the recalculation order already holds its cells (else they are read as found,
    see :func:`dereference`)."""
    columns = []
    for part in found.parts:
        v = context.reference(part.sheet, part.ref) if written else dereference(part, context)
        if type(v) is np.ndarray:
            columns.append(v.reshape(-1, 1))
        elif type(v) is CellError and ":" in part.ref:  # not a cell's value: the range cannot be read
            return v
        else:
            columns.append(filled((1, 1), v))
    over = charge((sum(len(c) for c in columns), 1))
    return over if over is not None else np.vstack(columns)


def _several(what: str) -> CellError:
    return CellError(REF, f"{what} takes a reference of one area, not a union of several")


def _range_between(node: Binary, context: Context) -> Ref | CellError:
    """``left:right``: the smallest area holding both references (on one sheet)."""
    corners = _corners(node, context, "the range operator ':'")
    if type(corners) is CellError:
        return corners
    sheet, (r1, c1, r2, c2), (s1, t1, s2, t2) = corners
    return anchored(sheet, min(r1, s1), min(c1, t1), max(r2, s2), max(c2, t2))


def _intersection(node: Binary, context: Context) -> Ref | CellError:
    """``left right`` (a space): the cells both references hold; #NULL! when none."""
    corners = _corners(node, context, "the intersection operator (a space)")
    if type(corners) is CellError:
        return corners
    sheet, (r1, c1, r2, c2), (s1, t1, s2, t2) = corners
    top, left, bottom, right = max(r1, s1), max(c1, t1), min(r2, s2), min(c2, t2)
    if top > bottom or left > right:
        return CellError(NULL, "the references of the intersection operator (a space) have no cell in common")
    return anchored(sheet, top, left, bottom, right)


def _corners(node: Binary, context: Context, what: str) -> tuple | CellError:
    """The sheet and the corners (first row, first column, last row, last column) of the two
    references an operator joins."""
    ends = []
    for side in (node.left, node.right):
        found = reference_of(side, context)
        if type(found) is Name:
            found = _name_reference(found, context)
        if found is None:
            return CellError(VALUE, f"{what} joins references, not values")
        if type(found) is CellError:
            return found
        if type(found) is Areas:
            return _several(what)
        ends.append(found)
    bounds = getattr(context, "bounds", None)
    if bounds is None:
        return CellError(REF, "the formula has no workbook")
    (left, right), sheets = ends, {e.sheet for e in ends} - {None}
    if len(sheets) > 1:
        return CellError(VALUE, f"{what} joins references on one sheet")
    corners = [bounds(e.sheet, e.ref) for e in ends]
    for c in corners:
        if type(c) is CellError:
            return c
    return next(iter(sheets), None), corners[0], corners[1]


def _name_reference(name: Name, context: Context) -> Ref | CellError | None:
    find = getattr(context, "name_reference", None)
    return find(name.text) if find is not None else None


def anchored(sheet: str | None, r1: int, c1: int, r2: int, c2: int) -> Ref:
    """The reference to rows r1..r2 and columns c1..c2, every part anchored (``$A$1:$B$2``)."""
    first = f"${column_letters(c1)}${r1}"
    return Ref(sheet, first if (r1, c1) == (r2, c2) else f"{first}:${column_letters(c2)}${r2}")


def dereference(found: Ref | Areas | Name, context: Context) -> Value:
    """The values a reference found while evaluating stands for; the workbook context is told
    (``read_found``) so that its recalculation order can take the cells into account."""
    if type(found) is Name:
        return context.name(found.text)
    if type(found) is Areas:
        return areas_value(found, context)
    read = getattr(context, "read_found", None)
    return read(found.sheet, found.ref) if read is not None else context.reference(found.sheet, found.ref)


def _arity_error(name: str, spec: Builtin, count: int) -> CellError:
    lo, hi = spec.min_args, spec.max_args
    if hi is None:
        wanted = f"at least {lo}"
    elif lo == hi:
        wanted = str(lo)
    else:
        wanted = f"{lo} to {hi}"
    plural = "" if wanted in ("1", "at least 1") else "s"
    return CellError(VALUE, f"{name} takes {wanted} argument{plural}, got {count}")


def _call(node: Call, context: Context) -> Value:
    spec = BUILTINS.get(node.name)
    if spec is None:
        bound = _bound(node.name, context)
        if bound is not _UNSET:
            return call_lambda(bound, node.args, context)
        fn = context.function(node.name)
        if fn is None:
            named = context.name(node.name)
            if type(named) is Lambda:
                return call_lambda(named, node.args, context)
            return CellError(NAME, f"unknown function {node.name}")
        return call_function(node.name, fn, [evaluate(a, context) for a in node.args])
    count = len(node.args)
    if count < spec.min_args or (spec.max_args is not None and count > spec.max_args):
        return _arity_error(node.name, spec, count)
    try:
        implicit = getattr(context, "implicit", False)
        if spec.lazy:  # it evaluates its own arguments: with array-class ones, all as arrays
            if implicit and spec.arrays:
                result = in_array_mode(context, spec.fn, context, *node.args)
            else:
                result = spec.fn(context, *node.args)
        else:
            if spec.left_out is not None and any(type(a) is Missing for a in node.args):
                return spec.left_out
            if not implicit:
                args = [evaluate(a, context) for a in node.args]
            else:
                args = [in_array_mode(context, evaluate, a, context) if i in spec.arrays
                        else _operand(a, context) if spec.takes_values else evaluate(a, context)
                        for i, a in enumerate(node.args)]
            for a in args:
                if type(a) is Lambda:
                    return _uncalled()
            result = spec.fn(*args)
    except ZeroDivisionError:  # arithmetic a built-in did not guard: still a cell value, never a crash
        return CellError(DIV0, f"{node.name}: division by zero")
    except (OverflowError, ValueError):
        return CellError(NUM, f"{node.name}: the result is not a finite number")
    # a negative number to a fractional power that a built-in did not guard: no real result
    return CellError(NUM, f"{node.name}: the result is not a real number") if type(result) is complex else result


def call_function(name: str, fn: Callable[..., Any], args: list[Value]) -> Value:
    """Pack function ``fn`` called with evaluated arguments: its work charged, its result in
    the value contract, an exception in it the cell's error value (raised under the strict switch)."""
    over = _charge_call(args)
    if over is not None:
        return over
    try:
        result = fn(*args)
    except Exception as exc:  # a bug: the cell shows it instead of stopping the recalculation
        if strict():
            raise
        return internal_error(exc, name)
    if isinstance(result, np.ndarray) and result.ndim:
        over = charge(result.shape)
        if over is not None:
            return over
    return as_value(result)


def _charge_call(args: list) -> CellError | None:
    """The work a pack function's arguments imply: they broadcast like numpy, so a column
    against a row is a table, charged before the function builds it."""
    shapes = [a.shape for a in args if type(a) is np.ndarray]
    if not shapes:
        return None
    try:
        shape = np.broadcast_shapes(*shapes)
    except ValueError:  # the function reports shapes that do not match
        return None
    return charge(shape)


def _binary(node: Binary, context: Context) -> Value:
    if node.op == ":" or node.op == " ":
        found = _range_between(node, context) if node.op == ":" else _intersection(node, context)
        return found if type(found) is CellError else dereference(found, context)
    if node.op == ",":
        return _union_value(node, context)
    # a chain such as A1+A2+...+A300 is a left-leaning tree: walked in a loop, not by recursion
    spine = [node]
    while type(spine[-1].left) is Binary and spine[-1].left.op not in (":", " ", ","):
        spine.append(spine[-1].left)
    value = _operand(spine[-1].left, context)
    for b in reversed(spine):
        # both sides even after an error on the left: an array on the right still shapes the result
        right = _operand(b.right, context)
        if type(value) is Lambda or type(right) is Lambda:
            return _uncalled()
        value = BINARY[b.op](value, right)
    return value


# ---- functions as values (see formula.lambdas) ---------------------------------------------
def _uncalled() -> CellError:
    return CellError(CALC, "a function (LAMBDA) is used as a value without being called")


def _bound(text: str, context: Context) -> Any:
    """What a LET or a call bound to ``text`` in the scope being evaluated, else _UNSET."""
    scope = getattr(context, "scope", None)
    return _UNSET if not scope else scope.get(param_key(text), _UNSET)


def _name(node: Name, context: Context) -> Value:
    bound = _bound(node.text, context)
    if bound is _UNSET:
        return context.name(node.text)
    if type(bound) is Ref or type(bound) is Areas:
        return dereference(bound, context)
    return None if bound is OMITTED else bound


def bind(node: Node, context: Context) -> Any:
    """What a LET name or a parameter is bound to: the reference (anchored where the formula
    sits) when ``node`` is written as one, so ROW, OFFSET and SUM's reference rules still
    apply through the name; otherwise the value. A missing argument is OMITTED."""
    if type(node) is Missing:
        return OMITTED
    if is_reference(node):
        found = reference_of(node, context)
        if type(found) is Name:
            found = _name_reference(found, context)
        if type(found) is CellError or type(found) is Areas:  # a union's areas are anchored already
            return found
        bounds = getattr(context, "bounds", None)
        if type(found) is Ref and bounds is not None:
            b = bounds(found.sheet, found.ref)
            if type(b) is not CellError:
                return anchored(found.sheet, *b)
    return evaluate(node, context)


def with_scope(context: Context, scope: Mapping[str, Any], node: Node,
               how: Callable[[Node, Context], Any] | None = None) -> Any:
    """``how(node, context)`` (by default its value) with ``scope`` as the names bound."""
    saved = getattr(context, "scope", None)
    context.scope = scope
    try:
        return (how or evaluate)(node, context)
    finally:
        context.scope = saved


def apply_lambda(fn: Any, values: list[Any]) -> Value:
    """Call function value ``fn`` with its arguments already bound (see :func:`bind`)."""
    if type(fn) is CellError:
        return fn
    if type(fn) is not Lambda:
        return CellError(VALUE, "only a function (LAMBDA) can be called")
    if len(values) > len(fn.params):
        return CellError(VALUE, f"the function takes {len(fn.params)} arguments, not {len(values)}")
    if any(p not in fn.optional for p in fn.params[len(values):]):
        return CellError(VALUE, f"the function takes {len(fn.params)} arguments, not {len(values)}")
    scope = dict(fn.scope)
    scope.update(zip(fn.params, values + [OMITTED] * (len(fn.params) - len(values))))
    return with_scope(fn.home, scope, fn.body)


def call_lambda(fn: Any, args: tuple[Node, ...], context: Context) -> Value:
    """Call function value ``fn`` with the arguments written in the calling formula."""
    return apply_lambda(fn, [bind(a, context) for a in args])


def _invoke(node: Invoke, context: Context) -> Value:
    return call_lambda(evaluate(node.callee, context), node.args, context)


def _operand(node: Node, context: Context) -> Value:
    """An operand or a single-value argument: in a legacy formula a reference is intersected;
    a union of several areas has no single value (#VALUE!, as in Excel)."""
    if type(node) is Binary and node.op == ",":
        return _no_value(node, context)
    if getattr(context, "implicit", False) and is_reference(node):
        return intersect(node, context)
    return evaluate(node, context)


def in_array_mode(context: Context, fn: Callable[..., Value], *args: Any) -> Value:
    """``fn(*args)`` with the legacy formula's implicit intersection suspended: an array-class
    parameter evaluates what is written in it as an array, as an array formula would
    (``=SUMPRODUCT((A1:A9>0)*B1:B9)`` needs no Ctrl+Shift+Enter in Excel)."""
    context.implicit = False
    try:
        return fn(*args)
    finally:
        context.implicit = True


def intersect(node: Node, context: Context) -> Value:
    """Excel's implicit intersection, which a legacy (not array, not dynamic) formula applies
    where a single value is expected: a reference to a column gives its cell in the formula's
    row, a row its cell in the formula's column, a rectangle the cell in both (#VALUE! where
    the formula's row or column misses it). Anything that is not a reference is evaluated as
    it is (a defined name holding an array stays an array).

    >>> print(intersect(parse("=A1:A3"), SimpleContext()))
    #VALUE! implicit intersection needs a workbook
    """
    found = reference_of(node, context)
    if type(found) is Name:
        found = _name_reference(found, context)
    if found is None:
        return evaluate(node, context)
    if type(found) is CellError:
        return found
    if type(found) is Areas:
        return _no_value(node, context)
    bounds, position = getattr(context, "bounds", None), getattr(context, "position", None)
    if bounds is None or position is None:
        return CellError(VALUE, "implicit intersection needs a workbook")
    b = bounds(found.sheet, found.ref)
    if type(b) is CellError:
        return b
    r1, c1, r2, c2 = b
    row, col = position()
    if r1 != r2:
        if not r1 <= row <= r2:
            return CellError(VALUE, "the formula's row is outside the range it intersects (implicit intersection)")
        r1 = row
    if c1 != c2:
        if not c1 <= col <= c2:
            return CellError(VALUE, "the formula's column is outside the range it intersects (implicit intersection)")
        c1 = col
    target = anchored(found.sheet, r1, c1, r1, c1)
    if type(node) is Ref or type(node) is Name:  # written in the formula: the order already holds its cells
        return context.reference(target.sheet, target.ref)
    return dereference(target, context)


def _no_value(node: Node, context: Context) -> CellError:
    """Where a single value is needed: a union's own error, else #VALUE!."""
    found = _union(node, context) if type(node) is Binary and node.op == "," else None
    return found if type(found) is CellError else CellError(VALUE, "a union of several areas has no single value")


def implicit_value(node: Node, context: Context) -> Value:
    """The value of a legacy formula's cell: implicit intersection of a reference, and of an
    array result its top-left element, as Excel shows a formula that is not an array formula."""
    v = intersect(node, context) if is_reference(node) else evaluate(node, context)
    if type(v) is np.ndarray and v.size:
        return v[0, 0]
    return v


_EVALUATORS: dict[type, Callable[[Any, Context], Value]] = {
    Literal: lambda n, c: n.value,
    Binary: _binary,
    Call: _call,
    Ref: lambda n, c: c.reference(n.sheet, n.ref),
    Unary: lambda n, c: UNARY[n.op](_operand(n.operand, c)),
    Name: _name,
    Array: lambda n, c: object_array(n.rows),
    Missing: lambda n, c: None,
    Invoke: _invoke,
}


def evaluate(node: Node, context: Context) -> Value:
    """The value of a parsed formula: a scalar or a 2-D object array; errors are values.

    >>> evaluate(parse("={1,2}*10"), SimpleContext()).tolist()
    [[10.0, 20.0]]
    """
    return _EVALUATORS[type(node)](node, context)


def value_of(node: Node, context: Context, legacy: bool = False, may_be_function: bool = False) -> Value:
    """:func:`evaluate` (with ``legacy``, :func:`implicit_value`), with a tree too deep for
    Python's recursion (the parser accepts 200 levels; some functions take five frames a
    level) giving an error value, not an exception. A function value (LAMBDA) not called is
    #CALC!, and a union of several areas #VALUE!, unless ``may_be_function`` (a defined name
    may hold either).

    >>> print(value_of(parse("=" + "SUM(" * 199 + "1" + ")" * 199), SimpleContext()))
    #VALUE! the formula nests functions too deeply to evaluate
    >>> print(value_of(parse("=LAMBDA(x, x+1)"), SimpleContext()))
    #CALC! a function (LAMBDA) is used as a value without being called
    """
    if type(node) is Binary and node.op == "," and not may_be_function:
        return _no_value(node, context)
    try:
        v = implicit_value(node, context) if legacy else evaluate(node, context)
    except RecursionError:
        return CellError(VALUE, "the formula nests functions too deeply to evaluate")
    return _uncalled() if type(v) is Lambda and not may_be_function else v


def compute(formula: str, context: Context | None = None) -> Value:
    """Parse (cached) and evaluate ``formula``; without a context, a :class:`SimpleContext`.

    >>> compute('="x"&1/4'), compute("=-2^2")
    ('x0.25', 4.0)
    """
    return value_of(parse(formula), SimpleContext() if context is None else context)


def is_reference(node: Node) -> bool:
    """Whether an argument is written as a reference (so an aggregate takes only the numbers
    of its cells): a reference, a defined name, a reference function or a range operator."""
    kind = type(node)
    if kind is Ref or kind is Name:
        return True
    if kind is Call:
        spec = BUILTINS.get(node.name)
        return spec is not None and spec.reference is not None
    return kind is Binary and (node.op == ":" or node.op == " " or node.op == ",")


def collect(
    context: Context,
    nodes: tuple[Node, ...],
    direct: Callable[[Scalar], Any],
    in_range: Callable[[Scalar], Any],
) -> list | CellError:
    """Argument values of an aggregate (SUM, AND, ...) as Excel gathers them.

    An argument typed as a value goes through ``direct`` (a conversion that may return a
    CellError); the elements of a reference, name or array go through ``in_range``, which
    returns None to skip an element. The first error, in argument order, is returned.

    >>> from cellfuncs.formula.coerce import to_number
    >>> ctx = SimpleContext(names={"r": object_array([[1.0, "x", True]])})
    >>> keep = lambda x: x if type(x) is float else None
    >>> collect(ctx, (parse("=r"), parse('="2"')), to_number, keep)
    [1.0, 2.0]
    """
    out = []
    for node in nodes:
        v = evaluate(node, context)
        if type(v) is np.ndarray or is_reference(node):
            for x in v.flat if type(v) is np.ndarray else (v,):
                if type(x) is CellError:
                    return x
                y = in_range(x)
                if y is not None:
                    out.append(y)
        else:
            y = direct(v)
            if type(y) is CellError:
                return y
            out.append(y)
    return out
