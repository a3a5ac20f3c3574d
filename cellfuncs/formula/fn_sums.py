"""Built-in sums over pairs of arrays and series: SUMX2MY2, SUMX2PY2, SUMXMY2, SERIESSUM and
MULTINOMIAL.

The pair sums take two arrays of as many values (their shapes may differ: the values pair in
row-by-row order) and skip a pair where either value is not a number; an error in either wins,
and no pair of numbers at all is #DIV/0!.

>>> from cellfuncs.formula import compute
>>> compute("=SUMX2MY2({2,3,9,1,8,7,5}, {6,5,11,7,5,4,4})"), compute("=SERIESSUM(2, 0, 1, {1,2,3})")
(-55.0, 17.0)
>>> compute("=MULTINOMIAL(2, 3, 4)")
1260.0
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np

from ..errors import DIV0, NA, NUM, VALUE, CellError
from .arrays import Value, as_array, map_values
from .evaluate import Context, builtin, collect
from .fn_math import argument_number
from .fn_workdays import each_a_value
from .nodes import Node, Scalar
from .operators import power

MOST_FACTORIAL = 170  # 171! is beyond the largest double


def _pair_sum(name: str, term: Callable[[float, float], float]) -> None:
    def pair_sum(xs: Value, ys: Value) -> float | CellError:
        for v in (xs, ys):
            if type(v) is CellError:
                return v
        a, b = as_array(xs).ravel(), as_array(ys).ravel()
        if a.size != b.size:
            return CellError(NA, f"{name}: the two arrays have different numbers of values")
        terms = []
        for x, y in zip(a, b):
            if type(x) is CellError or type(y) is CellError:
                return x if type(x) is CellError else y
            if type(x) is float and type(y) is float:
                terms.append(term(x, y))
        return math.fsum(terms) if terms else CellError(DIV0, f"{name}: no pair of numbers")

    pair_sum.__doc__ = f"{name}(array_x, array_y): the sum over the pairs of numbers."
    builtin(name, 2, arrays=(0, 1))(pair_sum)


_pair_sum("SUMX2MY2", lambda x, y: x * x - y * y)
_pair_sum("SUMX2PY2", lambda x, y: x * x + y * y)
_pair_sum("SUMXMY2", lambda x, y: (x - y) * (x - y))


def _coefficient(c: Scalar) -> float | CellError:
    """A coefficient of SERIESSUM: a number (a blank one 0); text or a logical value is #VALUE!."""
    if type(c) is float or type(c) is CellError:
        return c
    if c is None:
        return 0.0
    return CellError(VALUE, "SERIESSUM's coefficients must be numbers")


def _series(x: Scalar, n: Scalar, m: Scalar, coefficients: np.ndarray) -> Scalar:
    args = [argument_number(v, logicals=False) for v in (x, n, m)]
    for a in args:
        if type(a) is CellError:
            return a
    x, n, m = args
    terms = []
    for i, c in enumerate(coefficients.flat):
        c = _coefficient(c)
        if type(c) is CellError:
            return c
        p = power(x, n + i * m)
        if type(p) is CellError:
            return p
        terms.append(c * p)
    total = math.fsum(terms)
    return total if math.isfinite(total) else CellError(NUM, "SERIESSUM is too large")


@builtin("SERIESSUM", 4, arrays=(3,))
@each_a_value
def seriessum(x: Value, n: Value, m: Value, coefficients: Value) -> Value:
    """The power series a1*x^n + a2*x^(n+m) + a3*x^(n+2m) + ..., one term per coefficient;
    x, n and m take no logical values, and 0^0 is #NUM! as in the ^ operator.

    >>> print(seriessum(0.0, 0.0, 2.0, 1.0))
    #NUM! 0^0 is undefined
    """
    if type(coefficients) is CellError:
        return coefficients
    table = as_array(coefficients)
    return map_values(lambda a, b, c: _series(a, b, c, table), x, n, m)


def _multinomial_term(v: Scalar) -> float | CellError:
    """A value MULTINOMIAL takes: a number (truncated), from a range or typed; logical values
    and text are #VALUE! wherever they are."""
    if type(v) is bool:
        return CellError(VALUE, "MULTINOMIAL takes numbers, not logical values")
    x = argument_number(v)
    if type(x) is CellError:
        return x
    return CellError(NUM, "MULTINOMIAL of a negative number") if x < 0.0 else float(int(x))


def _range_term(v: Scalar) -> float | CellError | None:
    return None if v is None else _multinomial_term(v)


@builtin("MULTINOMIAL", 1, 255, lazy=True)
def multinomial(context: Context, *nodes: Node) -> float | CellError:
    """(n1+n2+...)! / (n1! n2! ...), each number truncated; a negative one is #NUM!, a logical
    value or text #VALUE! (blank cells are skipped).

    >>> from cellfuncs.formula import compute
    >>> compute("=MULTINOMIAL({1,0,3})"), compute("=MULTINOMIAL(TRUE, 1)").code
    (4.0, '#VALUE!')
    """
    values = collect(context, nodes, _multinomial_term, _range_term)
    if type(values) is CellError:
        return values
    for v in values:
        if type(v) is CellError:
            return v
    counts = [int(v) for v in values]
    if sum(counts) > MOST_FACTORIAL:
        return CellError(NUM, "MULTINOMIAL is too large")
    result, total = 1, 0
    for k in counts:  # a product of binomial coefficients: exact, no factorial overflows
        total += k
        result *= math.comb(total, k)
    return float(result)
