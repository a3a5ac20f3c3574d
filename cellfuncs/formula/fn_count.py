"""Built-in counting and conditional aggregates: COUNT, COUNTA, COUNTBLANK, COUNTIF(S),
SUMIF(S), AVERAGEIF(S), MAXIFS, MINIFS, SUMPRODUCT.

A criterion is a value (equal to it; text case-insensitively, with ``*``/``?`` wildcards) or
text led by a comparison (``">=10"``, ``"<>x"``); ``""`` matches blanks and empty text, ``"="``
blanks only, ``"<>"`` everything not blank (empty text too: a formula giving ``""`` is not blank).

>>> from cellfuncs.formula import compute
>>> compute('=COUNTIF({1,5,"a",10}, ">=5")'), compute('=SUMIF({1,2,3}, "<>2")'), compute("=SUMPRODUCT({1,2},{3,4})")
(2.0, 4.0, 11.0)
>>> compute("=SUMIF({1,2,1},{1;2},{10,20,30})").tolist()  # one result per criterion
[[40.0], [20.0]]
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import Callable

import numpy as np

from ..errors import DIV0, VALUE, CellError, parse_error_text
from .arrays import Value, as_array, map_values, shape_text
from .coerce import compare, fold, to_number
from .evaluate import ALL_ARGUMENTS, Context, builtin, evaluate, intersect
from .fn_lookup import wildcard
from .nodes import Node, Ref, Name, Scalar

_OPERATOR = re.compile(r"(<=|>=|<>|=|<|>)?(.*)\Z", re.DOTALL)
_TESTS = {"=": lambda c: c == 0, "<>": lambda c: c != 0, "<": lambda c: c < 0, ">": lambda c: c > 0,
          "<=": lambda c: c <= 0, ">=": lambda c: c >= 0}


@lru_cache(maxsize=512)
def _text_criterion(text: str) -> Callable[[Scalar], bool]:
    op, rest = _OPERATOR.match(text).groups()
    if op is None and rest == "":
        return lambda x: x is None or x == ""
    op = op or "="
    if rest == "":
        return (lambda x: x is None) if op == "=" else (lambda x: x is not None) if op == "<>" else (lambda x: False)
    error = parse_error_text(rest)
    if error is not None:
        same_error = lambda x: type(x) is CellError and x.code == error.code  # noqa: E731
        return same_error if op == "=" else (lambda x: not same_error(x)) if op == "<>" else (lambda x: False)
    target = to_number(rest)
    if type(target) is float:
        test = _TESTS[op]
        equal = criterion(target)
        if op == "<>":  # Excel: only equal numbers are left out, numeric text is not
            return lambda x: not (type(x) is float and x == target)
        if op == "=":
            return equal
        return lambda x: type(x) is float and test(compare(x, target))
    if rest.upper() in ("TRUE", "FALSE"):
        b = rest.upper() == "TRUE"
        test = _TESTS[op]
        return lambda x: (type(x) is bool and test(compare(x, b))) if op != "<>" else not (type(x) is bool and x == b)
    if op in ("=", "<>") and any(ch in rest for ch in "*?~"):
        regex = wildcard(rest)
        if op == "=":
            return lambda x: type(x) is str and regex.fullmatch(x) is not None
        return lambda x: not (type(x) is str and regex.fullmatch(x) is not None)
    if op == "<>":
        folded = fold(rest)
        return lambda x: not (type(x) is str and fold(x) == folded)
    test = _TESTS[op]
    return lambda x: type(x) is str and test(compare(x, rest))


def criterion(c: Scalar) -> Callable[[Scalar], bool]:
    """A test of range elements for criterion ``c``.

    >>> criterion(">1")(2.0), criterion("a*")(" abc"), criterion("A?C")("abc"), criterion(3.0)(3.0)
    (True, False, True, True)
    """
    if type(c) is str:
        return _text_criterion(c)
    if c is None:
        c = 0.0
    if type(c) is float:
        return lambda x: (type(x) is float and x == c) or (type(x) is str and to_number(x) == c)
    if type(c) is CellError:
        return lambda x: type(x) is CellError and x.code == c.code
    return lambda x: type(x) is type(c) and x == c


def _scalar(v: Value) -> Scalar:
    return v[0, 0] if type(v) is np.ndarray else v


_WHOLE = re.compile(r"\$?[A-Z]{1,3}:\$?[A-Z]{1,3}\Z|\$?[0-9]+:\$?[0-9]+\Z")
_SHEET_CELLS = 1048576 * 16384


def _ranges(context: Context, nodes: tuple[Node, ...]) -> tuple[list[Value], int]:
    """The (range, criterion, ...) argument values, and how many blank cells whole-column or
    whole-row references stand for beyond the sheet's used range, which the engine leaves
    out of their values. A legacy formula intersects a criterion given as a range."""
    values, beyond = [], 0
    for k, node in enumerate(nodes):
        v = intersect(node, context) if k % 2 and getattr(context, "implicit", False) else evaluate(node, context)
        values.append(v)
        if type(node) is Ref and _WHOLE.match(node.ref) and type(v) is not CellError:
            a = as_array(v)
            first, second = node.ref.replace("$", "").split(":")
            if first.isdigit():
                full = (abs(int(second) - int(first)) + 1) * 16384
            else:
                full = (abs(_column(second) - _column(first)) + 1) * 1048576
            beyond = full - a.size
    return values, beyond


def _column(letters: str) -> int:
    n = 0
    for ch in letters:
        n = 26 * n + ord(ch) - 64
    return n


def _matches(pairs: list[tuple[Value, Scalar]], shape: tuple[int, int] | None = None) -> np.ndarray | CellError:
    """The positions where every (range, criterion) pair holds; ranges of one shape."""
    mask = None
    for rng, crit in pairs:
        if type(rng) is CellError:
            return rng
        a = as_array(rng)
        if shape is not None and a.shape != shape:
            return CellError(VALUE, f"ranges of shapes {shape_text(shape)} and {shape_text(a.shape)} do not match")
        shape = a.shape
        test = criterion(crit)
        m = np.frompyfunc(test, 1, 1)(a).astype(bool)
        mask = m if mask is None else mask & m
    return mask


def _each_criterion(fn: Callable[..., Value], criteria: list[Value]) -> Value:
    """``fn`` of scalar criteria; criteria given as arrays or ranges give one result per
    element (broadcast together), as Excel spills SUMIF(A1:A9, {"a";"b"}) into two cells."""
    if all(type(c) is not np.ndarray or c.size == 1 for c in criteria):
        return fn(*[_scalar(c) for c in criteria])
    return map_values(fn, *criteria)


def _fitted(values: Value, shape: tuple[int, int]) -> np.ndarray:
    """The range to aggregate, taken at the criteria range's shape from its top-left cell (as
    Excel does with a sum range of another size, as far as the values reach)."""
    a = as_array(values)
    out = np.empty(shape, dtype=object)
    out.fill(None)
    h, w = min(shape[0], a.shape[0]), min(shape[1], a.shape[1])
    out[:h, :w] = a[:h, :w]
    return out


def _numbers_where(values: np.ndarray, mask: np.ndarray) -> list[float] | CellError:
    out = []
    for x in values[mask]:
        if type(x) is CellError:
            return x
        if type(x) is float:
            out.append(x)
    return out


def _count_number(x: Scalar) -> float | None:
    return 1.0 if type(x) is float else None


def _count_direct(x: Scalar) -> float:
    return 1.0 if type(to_number(x)) is float and type(x) is not CellError else 0.0


@builtin("COUNT", 1, None, lazy=True)
def count(context: Context, *nodes: Node) -> float:
    """How many numbers: in ranges and arrays only numbers count (errors are skipped); typed
    arguments count when they convert to numbers.

    >>> from cellfuncs.formula import compute
    >>> compute('=COUNT({1,"2",TRUE,#N/A}, "3", TRUE, "x")')
    3.0
    """
    total = 0.0
    for node in nodes:
        v = evaluate(node, context)
        if type(v) is np.ndarray or type(node) in (Ref, Name):
            total += sum(1 for x in as_array(v).flat if type(x) is float)
        else:
            total += _count_direct(v)
    return total


@builtin("COUNTA", 1, None, lazy=True)
def counta(context: Context, *nodes: Node) -> float:
    """How many values are not blank (errors and empty text count).

    >>> from cellfuncs.formula import compute
    >>> compute('=COUNTA({1,"",#N/A}, 0)')
    4.0
    """
    total = 0.0
    for node in nodes:
        v = evaluate(node, context)
        if type(v) is np.ndarray or type(node) in (Ref, Name):
            total += sum(1 for x in as_array(v).flat if x is not None)
        else:
            total += 1.0
    return total


@builtin("COUNTBLANK", 1, lazy=True)
def countblank(context: Context, node: Node) -> float:
    """How many cells are blank or hold empty text.

    >>> from cellfuncs.formula import compute
    >>> compute('=COUNTBLANK({1,""})')
    1.0
    """
    (values,), beyond = _ranges(context, (node,))
    return float(sum(1 for x in as_array(values).flat if x is None or x == "") + beyond)


@builtin("COUNTIFS", 2, None, lazy=True)
def countifs(context: Context, *nodes: Node) -> Value:
    """How many positions meet every (range, criterion) pair (COUNTIF: one pair).

    >>> from cellfuncs.formula import compute
    >>> compute('=COUNTIFS({1,2,3}, ">1", {"a","b","a"}, "a")'), compute('=COUNTIF({"a","B","ab"}, "?")')
    (1.0, 2.0)
    """
    if len(nodes) % 2:
        return CellError(VALUE, "COUNTIFS takes pairs of a range and a criterion")
    args, beyond = _ranges(context, nodes)
    ranges = args[::2]

    def counted(*criteria: Scalar) -> Scalar:
        m = _matches(list(zip(ranges, criteria)))
        if type(m) is CellError:
            return m
        blank_counts = beyond and all(criterion(c)(None) for c in criteria)
        return float(m.sum()) + (beyond if blank_counts else 0)

    return _each_criterion(counted, args[1::2])


builtin("COUNTIF", 2, lazy=True)(countifs)


def _conditional(name: str, reduce: Callable[[list[float]], float | CellError], first_is_values: bool) -> None:
    if first_is_values:  # SUMIFS(values, range1, criterion1, ...)
        def fn(values: Value, *args: Value) -> Value:
            if len(args) % 2:
                return CellError(VALUE, f"{name} takes pairs of a range and a criterion")
            if type(values) is CellError:
                return values
            shape = as_array(values).shape

            def reduced(*criteria: Scalar) -> Scalar:
                m = _matches(list(zip(args[::2], criteria)), shape)
                if type(m) is CellError:
                    return m
                nums = _numbers_where(as_array(values), m)
                return nums if type(nums) is CellError else reduce(nums)

            return _each_criterion(reduced, list(args[1::2]))

        fn.takes_values = True  # a legacy formula intersects the criteria, not the ranges
        builtin(name, 3, None, arrays=(0, *range(1, 255, 2)))(fn)
    else:  # SUMIF(range, criterion, [values])
        def fn(rng: Value, crit: Value, values: Value = None) -> Value:
            if type(values) is CellError:
                return values
            summed = rng if values is None else values

            def reduced(c: Scalar) -> Scalar:
                m = _matches([(rng, c)])
                if type(m) is CellError:
                    return m
                nums = _numbers_where(_fitted(summed, m.shape), m)
                return nums if type(nums) is CellError else reduce(nums)

            return _each_criterion(reduced, [crit])

        fn.takes_values = True  # a legacy formula intersects the criterion, not the ranges
        builtin(name, 2, 3, arrays=(0, 2))(fn)
    fn.__doc__ = f"{name}: the {reduce.__name__} of the numbers where the criteria hold."


def _average(values: list[float]) -> float | CellError:
    return math.fsum(values) / len(values) if values else CellError(DIV0, "no numbers meet the criteria")


_conditional("SUMIF", math.fsum, False)
_conditional("AVERAGEIF", _average, False)
_conditional("SUMIFS", math.fsum, True)
_conditional("AVERAGEIFS", _average, True)
_conditional("MAXIFS", lambda v: max(v, default=0.0), True)
_conditional("MINIFS", lambda v: min(v, default=0.0), True)


@builtin("SUMPRODUCT", 1, None, arrays=ALL_ARGUMENTS)
def sumproduct(*arrays: Value) -> Value:
    """The sum of the element-wise products of equally shaped arrays; elements that are not
    numbers count as 0, errors propagate, and a single value that is text is #VALUE! (Excel's
    stored value for a one-cell range holding "4").

    >>> from cellfuncs.formula import compute
    >>> compute('=SUMPRODUCT({1,"x";3,4}, {2,2;2,TRUE})'), compute("=SUMPRODUCT({1,2},{1;2})").code
    (8.0, '#VALUE!')
    """
    shape, columns = None, []
    for v in arrays:
        if type(v) is CellError:
            return v
        a = as_array(v)
        if a.size == 1 and type(a.flat[0]) is str:
            return CellError(VALUE, "SUMPRODUCT of a single text value")
        if shape is not None and a.shape != shape:
            return CellError(VALUE, f"SUMPRODUCT's arrays of shapes {shape_text(shape)} and {shape_text(a.shape)} differ")
        shape = a.shape
        columns.append(a.ravel())
    total = np.ones(columns[0].size)
    for col in columns:
        for x in col:
            if type(x) is CellError:
                return x
        total *= np.array([x if type(x) is float else 0.0 for x in col])
    return math.fsum(total.tolist())
