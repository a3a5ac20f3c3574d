"""One formula evaluated for a block of cells at once: a row, a column or a rectangle of
cells of one formula shape, each cell a *lane* of arrays of the block's shape.

The context gives a reference as the block of values the cells would each read (a float
array when they are all finite numbers, else an object array; a scalar for an anchored
cell). The operators and the built-ins of :data:`BATCHED` then compute every lane as the
cell alone would: lanes of finite numbers with numpy's arithmetic, which is IEEE arithmetic
as Python's float operators are, bit for bit; every other lane (text, booleans, blanks,
errors, a zero divisor, a result that is not finite) with the operator's or function's own
scalar rule, so that its value and its error's reason are a single cell's. Exponentials,
logarithms and powers apply Python's ``math`` functions lane by lane, since numpy's
vectorised ones may round the last bit differently.

A lane whose rule needs the formula's nodes rather than values (AND, OR, MIN or MAX meeting
an error, or no value to count) holds :data:`ALONE`, an error value: the caller evaluates
each cell whose lane is an error on its own, which gives it its exact value and reason. A
formula that is not computed by lanes (a reference operator, a built-in outside
:data:`BATCHED`, a function value) gives None: every cell alone.

>>> from cellfuncs.formula import SimpleContext, parse
>>> from cellfuncs.formula.arrays import object_array
>>> class Cells(SimpleContext):
...     def reference(self, sheet, ref):
...         return np.array([[1.0, 2.0], [3.0, 4.0]]) if ref == "A1" else object_array([["2", None], [True, 0.0]])
>>> evaluate_block(parse("=A1*1.8+32"), Cells(), (2, 2)).tolist()
[[33.8, 35.6], [37.4, 39.2]]
>>> [str(x) for x in evaluate_block(parse("=A1/B1"), Cells(), (2, 2)).flat]
['0.5', '#DIV/0! division by zero', '3.0', '#DIV/0! division by zero']
>>> evaluate_block(parse('=IF(A1>2, "big", B1&"")'), Cells(), (2, 2)).tolist()
[['2', ''], ['big', 'big']]
"""

from __future__ import annotations

import math
from itertools import repeat
from typing import Any, Callable

import numpy as np

from ..errors import VALUE, CellError, strict
from .arrays import Value, filled
from .coerce import to_bool, to_number
from .evaluate import BUILTINS, Context, call_function, is_reference
from .nodes import Binary, Call, Literal, Missing, Node, Ref, Scalar, Unary
from .operators import BINARY, UNARY

ALONE = CellError(VALUE, "a lane the cell's own evaluation computes")

_ARITHMETIC = {"+": np.add, "-": np.subtract, "*": np.multiply, "/": np.divide}
_COMPARISONS = {"=": np.equal, "<>": np.not_equal, "<": np.less, ">": np.greater, "<=": np.less_equal,
                ">=": np.greater_equal}
_REFERENCE_OPERATORS = (":", " ", ",")
_LARGEST_EXP = 709.0  # math.exp overflows just above 709.78: larger lanes go through the scalar rule


class Declined(Exception):
    """The formula, or a reference in it, is not evaluated as a block: each cell alone."""


def evaluate_block(node: Node, context: Context, shape: tuple[int, int]) -> Value | None:
    """The value of formula ``node`` for a block of ``shape`` cells: a scalar (the same for
    every cell), an array of ``shape`` (a float or boolean array when every lane is one), or
    None when the formula is to be evaluated cell by cell."""
    try:
        with np.errstate(all="ignore"):  # lanes that overflow or divide by zero are recomputed as scalars
            return _Lanes(context, shape).value(node)
    except (Declined, RecursionError):
        return None
    except Exception:  # a bug here: each cell's own evaluation still gives its value
        if strict():
            raise
        return None


class _Lanes:
    def __init__(self, context: Context, shape: tuple[int, int]):
        self.context, self.shape = context, shape

    def value(self, node: Node) -> Value:
        kind = type(node)
        if kind is Literal:
            return node.value
        if kind is Ref:
            return self._lanes(self.context.reference(node.sheet, node.ref))
        if kind is Binary:
            return self._binary(node)
        if kind is Unary:
            return self._unary(node)
        if kind is Call:
            return self._call(node)
        if kind is Missing:
            return None
        raise Declined

    def _lanes(self, v: Value) -> Value:
        if type(v) is np.ndarray and v.shape != self.shape:
            raise Declined  # an array other than one value per lane: not a value per cell
        return v

    def _binary(self, node: Binary) -> Value:
        if node.op in _REFERENCE_OPERATORS:
            raise Declined
        # a chain such as A1+A2+...+A300 is a left-leaning tree: walked in a loop, not by recursion
        spine = [node]
        while type(spine[-1].left) is Binary and spine[-1].left.op not in _REFERENCE_OPERATORS:
            spine.append(spine[-1].left)
        value = self.value(spine[-1].left)
        for b in reversed(spine):
            value = _operator(b.op, value, self.value(b.right))
        return value

    def _unary(self, node: Unary) -> Value:
        v = self.value(node.operand)
        if node.op == "+" or type(v) is not np.ndarray:
            return UNARY[node.op](v)
        x, ok = _numbers(v)
        r = -x if node.op == "-" else x / 100.0
        return _finish(UNARY[node.op], (v,), r, _failed(r, ok))

    def _call(self, node: Call) -> Value:
        spec = BUILTINS.get(node.name)
        if spec is None:
            fn = self.context.function(node.name)
            if fn is None:  # a defined name holding a function, or no such function: the cell says which
                raise Declined
            args = [_argument(self.value(a)) for a in node.args]
            result = call_function(node.name, fn, args)
            if (type(result) is np.ndarray) != any(type(a) is np.ndarray for a in args):
                raise Declined  # not a value per lane: the cells' own calls say what each shows
            return self._lanes(result)
        rule = BATCHED.get(node.name)
        count = len(node.args)
        if rule is None or count < spec.min_args or (spec.max_args is not None and count > spec.max_args):
            raise Declined  # the cell alone gives the error naming the arguments wanted
        if spec.left_out is not None and any(type(a) is Missing for a in node.args):
            raise Declined
        return rule(self, node.name, node.args)

    # ---- built-ins ---------------------------------------------------------------------
    def _branch(self, args: tuple[Node, ...], i: int) -> Value:
        """IF's branch ``i``: FALSE when left out, 0 when empty (``=IF(A1,,2)``)."""
        if i >= len(args):
            return False
        return 0.0 if type(args[i]) is Missing else self.value(args[i])

    def _if(self, name: str, args: tuple[Node, ...]) -> Value:
        test = self.value(args[0])
        if type(test) is not np.ndarray:
            t = to_bool(test)
            if type(t) is CellError:
                return t
            return self._branch(args, 1 if t else 2)
        truth, wrong = _truths(test)
        if not wrong and (truth.all() or not truth.any()):  # one branch for every lane: only it is evaluated
            return self._branch(args, 1 if truth.flat[0] else 2)
        picked = _where(truth, self._branch(args, 1), self._branch(args, 2))
        if wrong:
            picked = _objects(picked, self.shape)
            flat = picked.reshape(-1)
            for i, error in wrong.items():
                flat[i] = error
        return picked

    def _not(self, name: str, args: tuple[Node, ...]) -> Value:
        v = self.value(args[0])
        if type(v) is not np.ndarray or v.dtype == object:
            return _each(BUILTINS[name].fn, v)
        return ~v if v.dtype == bool else v == 0.0

    def _math(self, name: str, args: tuple[Node, ...]) -> Value:
        values = [self.value(a) for a in args]
        fn = BUILTINS[name].fn
        if all(type(v) is not np.ndarray for v in values) or name in _ROUNDING:
            return _each(fn, *values)
        numbers = [_numbers(v) for v in values]
        x = numbers[0][0]
        if name == "POWER":
            r, failed = _power(x, numbers[1][0])
        else:
            r, failed = _MATH[name](x)
        return _finish(fn, values, r, _failed(r, *(ok for _, ok in numbers), extra=failed))

    def _logical(self, name: str, args: tuple[Node, ...]) -> Value:
        """AND or OR lane by lane: a reference's number or logical value counts, its text and
        blanks are passed over; a value written in the formula converts (empty text passed over)."""
        every = name == "AND"
        result = np.full(self.shape, every)
        counted = np.zeros(self.shape, dtype=bool)
        alone = np.zeros(self.shape, dtype=bool)
        for node in args:
            truth, counts, failed = _logical_lanes(self.value(node), is_reference(node), self.shape)
            result = result & (truth | ~counts) if every else result | (truth & counts)
            counted |= counts
            alone |= failed
        return _stand_in(result, alone | ~counted)

    def _extreme(self, name: str, args: tuple[Node, ...]) -> Value:
        """MIN or MAX lane by lane: a reference's numbers count (its text, logical values and
        blanks are passed over), values written in the formula convert; no number at all is 0.
        Equal values keep the first, as Python's min and max do (0 before -0)."""
        smaller = name == "MIN"
        best = np.zeros(self.shape)
        have = np.zeros(self.shape, dtype=bool)
        alone = np.zeros(self.shape, dtype=bool)
        for node in args:
            v = self.value(node)
            if is_reference(node):
                x, ok = _plain_numbers(v)
                counts, failed = _mask(ok, self.shape), _unusual(v)
            else:
                x, ok = _numbers(v)
                counts, failed = True, ~_mask(ok, self.shape)
            take = counts & (~have | ((x < best) if smaller else (x > best)))
            best = np.where(take, x, best)
            have |= counts
            alone |= failed
        return _stand_in(best, alone)


_ROUNDING = frozenset({"ROUND", "ROUNDUP", "ROUNDDOWN"})  # Excel's decimal rule: each lane by the scalar


def _sqrt(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    failed = x < 0.0
    return np.sqrt(np.where(failed, 0.0, x)), failed  # IEEE square roots: correctly rounded, as math.sqrt


def _mapped(fn: Callable[[float], float], x: np.ndarray, good: np.ndarray) -> np.ndarray:
    """``fn`` (a function of :mod:`math`) on the ``good`` lanes of ``x``; 0 elsewhere."""
    out = np.zeros(x.shape)
    out[good] = list(map(fn, x[good].tolist()))
    return out


def _exp(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    failed = x > _LARGEST_EXP
    return _mapped(math.exp, x, ~failed), failed


def _logarithm(fn: Callable[[float], float]) -> Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]]:
    def apply(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        failed = ~(x > 0.0)
        return _mapped(fn, x, ~failed), failed

    return apply


_MATH = {"ABS": lambda x: (np.abs(x), None), "SQRT": _sqrt, "EXP": _exp, "LN": _logarithm(math.log),
         "LOG10": _logarithm(math.log10)}


def _pow(a: float, b: float) -> float:
    try:
        return math.pow(a, b)
    except (OverflowError, ValueError):  # the scalar rule names it
        return math.nan


def _power(x: Any, y: Any) -> tuple[np.ndarray, np.ndarray]:
    """``x ^ y`` by :func:`math.pow` lane by lane, flagging the lanes :func:`.operators.power` refuses
    (0 to a power not positive; a negative number to a fractional power is math.pow's domain error)."""
    x, y = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(y, dtype=float))
    failed = ~(np.isfinite(x) & np.isfinite(y)) | ((x == 0.0) & (y <= 0.0))
    r = np.zeros(x.shape)
    good = ~failed
    r[good] = list(map(_pow, x[good].tolist(), y[good].tolist()))
    return r, failed


def _operator(op: str, a: Value, b: Value) -> Value:
    if type(a) is not np.ndarray and type(b) is not np.ndarray:
        return BINARY[op](a, b)
    if op == "&":
        return _each(BINARY[op], a, b)
    if op in _COMPARISONS:
        x, okx = _plain_numbers(a)
        y, oky = _plain_numbers(b)
        r = _COMPARISONS[op](x, y)
        return _finish(BINARY[op], (a, b), r, _failed(None, okx, oky))
    x, okx = _numbers(a)
    y, oky = _numbers(b)
    if op == "^":
        r, failed = _power(x, y)
    else:
        r = _ARITHMETIC[op](x, y)  # a division by zero is not finite: the scalar rule names it
        failed = None
    return _finish(BINARY[op], (a, b), r, _failed(r, okx, oky, extra=failed))


# ---- lanes -----------------------------------------------------------------------------
def _numbers(v: Value) -> tuple[Any, Any]:
    """``v`` as numbers for arithmetic, each lane converted as an operator converts it, and
    which lanes are finite numbers so (None: all; False: none, for a scalar)."""
    if type(v) is np.ndarray:
        if v.dtype == float:
            return v, None
        if v.dtype == bool:
            return v.astype(float), None  # TRUE is 1, FALSE 0
        lanes = [x if type(x) is float else to_number(x) for x in v.ravel().tolist()]
        ok = [type(x) is float for x in lanes]
        numbers = np.array([x if k else 0.0 for x, k in zip(lanes, ok)], dtype=float).reshape(v.shape)
        finite = np.isfinite(numbers)
        ok_lanes = np.array(ok).reshape(v.shape) & finite
        return numbers, (None if ok_lanes.all() else ok_lanes)
    x = v if type(v) is float else to_number(v)
    return (x, None) if type(x) is float and math.isfinite(x) else (0.0, False)


def _plain_numbers(v: Value) -> tuple[Any, Any]:
    """The lanes of ``v`` that are finite numbers as they stand (booleans and text compare
    and count by other rules), as in :func:`_numbers`."""
    if type(v) is np.ndarray:
        if v.dtype == float:
            return v, None
        if v.dtype == bool:
            return np.zeros(v.shape), np.zeros(v.shape, dtype=bool)
        lanes = v.ravel().tolist()
        ok = np.array([type(x) is float for x in lanes]).reshape(v.shape)
        numbers = np.array([x if type(x) is float else 0.0 for x in lanes], dtype=float).reshape(v.shape)
        ok &= np.isfinite(numbers)
        return numbers, (None if ok.all() else ok)
    return (v, None) if type(v) is float and math.isfinite(v) else (0.0, False)


def _mask(ok: Any, shape: tuple[int, int]) -> np.ndarray:
    """The lanes flagged by ``ok`` (None: all) as a boolean array of ``shape``."""
    return np.ones(shape, dtype=bool) if ok is None else np.broadcast_to(ok, shape)


def _unusual(v: Value) -> Any:
    """Where ``v`` holds an error value or a number that is not finite."""
    if type(v) is not np.ndarray:
        return type(v) is CellError or (type(v) is float and not math.isfinite(v))
    if v.dtype != object:
        return False
    return np.array([type(x) is CellError or (type(x) is float and not math.isfinite(x))
                     for x in v.ravel().tolist()]).reshape(v.shape)


def _failed(r: Any, *oks: Any, extra: Any = None) -> Any:
    """The lanes to recompute by the scalar rule: a result not finite, an operand that was
    not a finite number (``oks``), or ``extra``; None when there are none."""
    failed = None if r is None else ~np.isfinite(r)
    for flag in (*(None if ok is None else np.logical_not(ok) for ok in oks), extra):
        if flag is not None:
            failed = flag if failed is None else failed | flag
    return failed


def _lane(v: Value, i: int) -> Scalar:
    """Lane ``i`` (row by row) of ``v`` as a scalar value."""
    if type(v) is not np.ndarray:
        return v
    x = v.flat[i]
    return x if v.dtype == object else x.item()


def _finish(fn: Callable[..., Scalar], args: tuple, r: np.ndarray, failed: Any) -> np.ndarray:
    """``r`` with the ``failed`` lanes replaced by ``fn`` on those lanes' operands."""
    if failed is None:
        return r
    failed = np.broadcast_to(failed, r.shape)
    if not failed.any():
        return r
    out = r.astype(object)
    flat = out.reshape(-1)
    for i in np.flatnonzero(failed).tolist():
        flat[i] = fn(*(_lane(a, i) for a in args))
    return out


def _each(fn: Callable[..., Scalar], *values: Value) -> Value:
    """``fn`` on every lane's scalars (on the scalars themselves when none is an array)."""
    shapes = [v.shape for v in values if type(v) is np.ndarray]
    if not shapes:
        return fn(*values)
    n = shapes[0][0] * shapes[0][1]
    lanes = [v.ravel().tolist() if type(v) is np.ndarray else repeat(v, n) for v in values]
    return np.fromiter(map(fn, *lanes), dtype=object, count=n).reshape(shapes[0])


def _argument(v: Value) -> Value:
    """A lane value as a pack function takes arrays: numbers as floats, anything else as objects."""
    return v.astype(object) if type(v) is np.ndarray and v.dtype == bool else v


def _truths(v: np.ndarray) -> tuple[np.ndarray, dict[int, CellError]]:
    """IF's test by lanes: TRUE or FALSE, and the lanes that are no logical value (their error)."""
    if v.dtype == bool:
        return v, {}
    if v.dtype == float:
        return v != 0.0, {}
    lanes = [x if type(x) is bool else to_bool(x) for x in v.ravel().tolist()]
    wrong = {i: x for i, x in enumerate(lanes) if type(x) is CellError}
    return np.array([x is True for x in lanes]).reshape(v.shape), wrong


def _kind(v: Value) -> str:
    if type(v) is np.ndarray:
        return v.dtype.kind if v.dtype == float or v.dtype == bool else "O"
    return "f" if type(v) is float else "b" if type(v) is bool else "O"


def _objects(v: Value, shape: tuple[int, int]) -> np.ndarray:
    if type(v) is not np.ndarray:
        return filled(shape, v)
    return v if v.dtype == object else v.astype(object)


def _where(truth: np.ndarray, yes: Value, no: Value) -> np.ndarray:
    """``yes`` where ``truth``, else ``no``, each lane keeping its type (a number stays a
    number, TRUE stays TRUE)."""
    kind = _kind(yes)
    if kind != "O" and kind == _kind(no):
        return np.where(truth, yes, no)
    return np.where(truth, _objects(yes, truth.shape), _objects(no, truth.shape))


def _logical_lane(x: Scalar, in_reference: bool) -> bool | None | CellError:
    """One lane of an AND or OR argument: its logical value, None when passed over, or an error."""
    if type(x) is bool:
        return x
    if type(x) is float:
        return x != 0.0
    if type(x) is CellError:
        return x
    if in_reference:
        return None  # text and blanks in a reference are passed over
    return None if x == "" else to_bool(x)


def _logical_lanes(v: Value, in_reference: bool, shape: tuple[int, int]) -> tuple[Any, Any, Any]:
    """(truth, counted, failed) of an AND or OR argument, lane by lane (one each for a scalar)."""
    if type(v) is np.ndarray and v.dtype != object:
        truth = v if v.dtype == bool else v != 0.0
        return truth, np.ones(shape, dtype=bool), np.zeros(shape, dtype=bool)
    flat = v.ravel().tolist() if type(v) is np.ndarray else [v]
    lanes = [_logical_lane(x, in_reference) for x in flat]
    found = (np.array([x is True for x in lanes]), np.array([type(x) is bool for x in lanes]),
             np.array([type(x) is CellError for x in lanes]))
    return tuple(a.reshape(shape) if type(v) is np.ndarray else a[0] for a in found)


def _stand_in(r: np.ndarray, alone: np.ndarray) -> np.ndarray:
    """``r`` with :data:`ALONE` in the lanes the cell's own evaluation is to compute."""
    if not alone.any():
        return r
    out = r.astype(object)
    out[alone] = filled((int(alone.sum()),), ALONE)
    return out


# The built-ins computed lane by lane (the others: each cell alone). Error-catching functions are
# left out: in one call a whole-call error would be caught where a single cell's call succeeds.
BATCHED: dict[str, Callable[[_Lanes, str, tuple[Node, ...]], Value]] = {
    "IF": _Lanes._if, "NOT": _Lanes._not, "AND": _Lanes._logical, "OR": _Lanes._logical,
    "MIN": _Lanes._extreme, "MAX": _Lanes._extreme,
    **{name: _Lanes._math for name in ("ABS", "SQRT", "EXP", "LN", "LOG10", "POWER", *_ROUNDING)},
}
