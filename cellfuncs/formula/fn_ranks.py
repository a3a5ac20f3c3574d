"""Built-in order statistics: PERCENTILE.INC (PERCENTILE), PERCENTILE.EXC, QUARTILE.INC
(QUARTILE), QUARTILE.EXC, PERCENTRANK.INC (PERCENTRANK), PERCENTRANK.EXC, RANK.EQ (RANK),
RANK.AVG, TRIMMEAN, MODE.MULT, FREQUENCY and PROB; and PERMUTATIONA, the count of ordered
selections with repetition.

The data arguments are gathered as SUM gathers them (numbers in ranges and arrays; text,
logical values and blanks there skipped; an error there is the result); a position or a
value looked up (PERCENTILE's k, RANK's number) may be an array, giving an array.

>>> from cellfuncs.formula import compute
>>> compute("=PERCENTILE.INC({1,2,3,4}, 0.3)"), compute("=RANK.AVG(3, {1,3,3,5})"), compute("=TRIMMEAN({1,2,3,4,100}, 0.4)")
(1.9, 2.5, 3.0)
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np

from ..errors import NA, NUM, CellError
from .arrays import Value, as_value, numeric
from .budget import charge
from .coerce import to_number
from .evaluate import ALL_ARGUMENTS, Context, builtin, collect, evaluate
from .fn_stats import _pairs
from .nodes import Node


def _numbers(context: Context, nodes: tuple[Node, ...]) -> list[float] | CellError:
    return collect(context, nodes, to_number, lambda x: x if type(x) is float else None)


def _sorted(context: Context, node: Node, name: str) -> list[float] | CellError:
    values = _numbers(context, (node,))
    if type(values) is CellError:
        return values
    return sorted(values) if values else CellError(NUM, f"{name} of no numbers")


def _at(values: list[float], rank: float) -> float:
    """The value at 0-based ``rank`` of sorted ``values``, interpolating between neighbours."""
    i = int(rank)
    frac = rank - i
    return values[i] if frac == 0.0 else values[i] + frac * (values[i + 1] - values[i])


def _inclusive(p: float, n: int) -> float | None:
    return p * (n - 1) if 0.0 <= p <= 1.0 else None


def _exclusive(p: float, n: int) -> float | None:
    rank = p * (n + 1)
    return rank - 1.0 if 1.0 <= rank <= n else None


def _register_percentile(name: str, rank_of: Callable[[float, int], float | None], scale: float = 1.0,
                         whole: bool = False) -> None:
    """``name(array, k)``: the value at fraction ``k / scale`` of the sorted numbers, between
    neighbours by straight interpolation; with ``whole`` (the quartiles) ``k`` is truncated to
    an integer first. The inclusive forms put the fraction p at position p(n-1) from 0, the
    exclusive ones at p(n+1) from 1 (#NUM! outside 1..n).

    >>> from cellfuncs.formula import compute
    >>> compute("=PERCENTILE.EXC({1,2,3,6,6,6,7,8,9}, 0.25)"), compute("=QUARTILE.INC({1,2,4,7,8,9,10,12}, 1)")
    (2.5, 3.5)
    """

    def value_at(values: list[float], k: float) -> float | CellError:
        rank = rank_of((math.trunc(k) if whole else k) / scale, len(values))
        if rank is None:
            return CellError(NUM, f"{name}'s k = {k:g} is outside its range for {len(values)} numbers")
        return _at(values, rank)

    @builtin(name, 2, lazy=True, arrays=(0,))
    def percentile(context: Context, array: Node, k: Node) -> Value:
        values = _sorted(context, array, name)
        if type(values) is CellError:
            return values
        return numeric(lambda p: value_at(values, p))(evaluate(k, context))

    percentile.__doc__ = f"{name}(array, k): the value at that position of the sorted numbers."


for _name in ("PERCENTILE.INC", "PERCENTILE"):
    _register_percentile(_name, _inclusive)
_register_percentile("PERCENTILE.EXC", _exclusive)
for _name in ("QUARTILE.INC", "QUARTILE"):
    _register_percentile(_name, _inclusive, 4.0, True)
_register_percentile("QUARTILE.EXC", _exclusive, 4.0, True)


def _truncated(x: float, digits: int) -> float:
    """``x`` cut (not rounded) to ``digits`` decimals, as PERCENTRANK reports it; the product is
    rounded first so that 0.29 (0.28999999999999998 in binary) stays 0.29."""
    scale = 10.0 ** digits
    return math.floor(round(x * scale, 6)) / scale


def _position(values: list[float], x: float) -> float | None:
    """The 0-based position of ``x`` among sorted ``values``, interpolated between the last
    value below it and the next; None outside their span."""
    if not values[0] <= x <= values[-1]:
        return None
    below = sum(1 for v in values if v < x)
    if below == len(values) or values[below] == x:
        return float(below)
    lo, hi = values[below - 1], values[below]
    return below - 1 + (x - lo) / (hi - lo)


def _register_percentrank(name: str, inclusive: bool) -> None:
    """``name(array, x, [significance])``: the position of x among the sorted numbers (from 0,
    interpolated between neighbours) over n-1 (inclusive), or that position plus 1 over n+1
    (exclusive), cut to ``significance`` digits (3); #N/A outside the numbers' span.

    >>> from cellfuncs.formula import compute
    >>> compute("=PERCENTRANK.INC({13,12,11,8,4,3,2,1,1,1}, 5)"), compute("=PERCENTRANK.EXC({1,2,3,6,6,6,7,8,9}, 7)")
    (0.583, 0.7)
    """

    def rank(values: list[float], x: float, digits: int) -> float | CellError:
        at = _position(values, x)
        if at is None:
            return CellError(NA, f"{name}: {x:g} is outside the numbers' span")
        n = len(values)
        if inclusive:
            share = at / (n - 1) if n > 1 else 1.0
        else:
            share = (at + 1.0) / (n + 1)
        return _truncated(share, digits)

    @builtin(name, 2, 3, lazy=True, arrays=(0,))
    def percentrank(context: Context, array: Node, x: Node, significance: Node | None = None) -> Value:
        values = _sorted(context, array, name)
        if type(values) is CellError:
            return values
        digits = 3.0 if significance is None else to_number(evaluate(significance, context))
        if type(digits) is CellError:
            return digits
        if digits < 1.0:
            return CellError(NUM, f"{name} needs a significance of at least 1 digit")
        return numeric(lambda v: rank(values, v, int(digits)))(evaluate(x, context))

    percentrank.__doc__ = f"{name}(array, x, [significance]): the share of the numbers below x."


_register_percentrank("PERCENTRANK.INC", True)
_register_percentrank("PERCENTRANK", True)
_register_percentrank("PERCENTRANK.EXC", False)


def _register_rank(name: str, average: bool) -> None:
    """``name(number, ref, [order])``: 1 plus how many numbers come before it (order 0 or
    omitted: the larger first); with ``average``, tied numbers share the mean of their places.

    >>> from cellfuncs.formula import compute
    >>> compute("=RANK.EQ(3.5, {7,3.5,3.5,1,2}, 1)"), compute("=RANK.AVG(3.5, {7,3.5,3.5,1,2}, 1)")
    (3.0, 3.5)
    """

    def rank(values: list[float], x: float, ascending: bool) -> float | CellError:
        ahead = sum(1 for v in values if (v < x if ascending else v > x))
        ties = sum(1 for v in values if v == x)
        if not ties:
            return CellError(NA, f"{name}: {x:g} is not among the numbers")
        return ahead + (ties + 1) / 2.0 if average else ahead + 1.0

    @builtin(name, 2, 3, lazy=True, arrays=(1,))
    def ranked(context: Context, number: Node, ref: Node, order: Node | None = None) -> Value:
        values = _numbers(context, (ref,))
        if type(values) is CellError:
            return values
        ascending = 0.0 if order is None else to_number(evaluate(order, context))
        if type(ascending) is CellError:
            return ascending
        return numeric(lambda x: rank(values, x, ascending != 0.0))(evaluate(number, context))

    ranked.__doc__ = f"{name}(number, ref, [order]): the number's place among the numbers (order 0: largest first)."


_register_rank("RANK.EQ", False)
_register_rank("RANK", False)
_register_rank("RANK.AVG", True)


@builtin("TRIMMEAN", 2, lazy=True, arrays=(0,))
def trimmean(context: Context, array: Node, percent: Node) -> Value:
    """The mean without the fraction ``percent`` of the numbers, half from each end; the count
    left out is rounded down to an even number.

    >>> from cellfuncs.formula import compute
    >>> compute("=TRIMMEAN({4,5,6,7,2,3,4,5,1,2,3}, 0.2)")
    3.7777777777777777
    """
    values = _sorted(context, array, "TRIMMEAN")
    if type(values) is CellError:
        return values
    p = to_number(evaluate(percent, context))
    if type(p) is CellError:
        return p
    if not 0.0 <= p < 1.0:
        return CellError(NUM, "TRIMMEAN needs 0 <= percent < 1")
    cut = int(len(values) * p) // 2
    kept = values[cut:len(values) - cut]
    return math.fsum(kept) / len(kept)


@builtin("MODE.MULT", 1, 254, lazy=True, arrays=ALL_ARGUMENTS)
def mode_mult(context: Context, *nodes: Node) -> Value:
    """A column of the most frequent numbers, in the order they first appear; #N/A when no
    number repeats.

    >>> from cellfuncs.formula import compute
    >>> compute("=MODE.MULT({1,2,3,4,3,2,1,2,3,5,6,1})").tolist()
    [[1.0], [2.0], [3.0]]
    """
    values = _numbers(context, nodes)
    if type(values) is CellError:
        return values
    counts: dict[float, int] = {}
    for v in values:
        counts[v] = counts.get(v, 0) + 1
    best = max(counts.values(), default=0)
    if best < 2:
        return CellError(NA, "no number repeats")
    modes = [[v] for v, c in counts.items() if c == best]  # dicts keep first appearance
    return charge((len(modes), 1)) or as_value(np.array(modes))


@builtin("FREQUENCY", 2, lazy=True, arrays=(0, 1))
def frequency(context: Context, data: Node, bins: Node) -> Value:
    """A column counting the numbers up to each bin (above the one before it, bins taken in
    their sorted order but reported in their own), and a last row for those above every bin.

    >>> from cellfuncs.formula import compute
    >>> compute("=FREQUENCY({79,85,78,85,50,81,95,88,97}, {70,79,89})").tolist()
    [[1.0], [2.0], [4.0], [2.0]]
    """
    values = _numbers(context, (data,))
    if type(values) is CellError:
        return values
    edges = _numbers(context, (bins,))
    if type(edges) is CellError:
        return edges
    counts = [0.0] * (len(edges) + 1)
    order = sorted(range(len(edges)), key=edges.__getitem__)
    for v in values:
        slot = next((i for i in order if v <= edges[i]), len(edges))
        counts[slot] += 1.0
    return charge((len(counts), 1)) or as_value(np.array(counts).reshape(-1, 1))


def _prob(xs, ps, lower: float, upper: float | None = None) -> float:
    upper = lower if upper is None else upper
    return math.fsum(p for x, p in zip(xs, ps) if lower <= x <= upper)


@builtin("PROB", 3, 4, arrays=(0, 1))
def prob(x_range: Value, prob_range: Value, lower: Value, upper: Value = None) -> Value:
    """The probability that a value lies from ``lower`` to ``upper`` (omitted: equals
    ``lower``), given the values and their probabilities, which must be in (0, 1] and add to 1.

    >>> from cellfuncs.formula import compute
    >>> compute("=PROB({0,1,2,3}, {0.2,0.3,0.1,0.4}, 1, 3)")
    0.8
    """
    p = _pairs(x_range, prob_range)
    if type(p) is CellError:
        return p
    xs, ps = p
    if any(not 0.0 < q <= 1.0 for q in ps):
        return CellError(NUM, "PROB's probabilities must be above 0 and at most 1")
    if abs(math.fsum(ps) - 1.0) > 1e-12:
        return CellError(NUM, "PROB's probabilities do not add up to 1")
    if upper is None:
        return numeric(lambda lo: _prob(xs, ps, lo))(lower)
    return numeric(lambda lo, hi: _prob(xs, ps, lo, hi))(lower, upper)


@builtin("PERMUTATIONA", 2)
@numeric
def permutationa(n: float, k: float) -> float | CellError:
    """Ordered selections of ``k`` out of ``n`` with repetition: n^k (both truncated).

    >>> permutationa(3.0, 2.0)
    9.0
    """
    n, k = math.trunc(n), math.trunc(k)
    if n < 0 or k < 0:
        return CellError(NUM, "PERMUTATIONA needs n >= 0 and k >= 0")
    return float(n) ** k
