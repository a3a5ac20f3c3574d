"""Built-in integer, combinatorial and bitwise functions: GCD, LCM, MOD, QUOTIENT, SIGN,
FACT, FACTDOUBLE, COMBIN, COMBINA, PERMUT, BITAND, BITOR, BITXOR, BITLSHIFT, BITRSHIFT,
DELTA, GESTEP; and PRODUCT, SUMSQ, LOG, SQRTPI, LARGE, SMALL.

Arguments are converted as :func:`.fn_math.argument_number` says; GCD, LCM, QUOTIENT,
FACTDOUBLE, SQRTPI, DELTA and GESTEP, from the Analysis ToolPak, take no logical values
(``QUOTIENT(TRUE, TRUE)`` is #VALUE! where ``MOD(TRUE, TRUE)`` is 0).

>>> from cellfuncs.formula import compute
>>> compute("=GCD(24, 36)"), compute("=MOD(-3, 2)"), compute("=COMBIN(8, 2)"), compute("=BITXOR(5, 3)")
(12.0, 1.0, 28.0, 6.0)
"""

from __future__ import annotations

import math
from functools import reduce

import numpy as np

from ..errors import DIV0, NA, NUM, VALUE, CellError
from .arrays import numeric
from .coerce import to_number
from .evaluate import Context, builtin, collect, evaluate
from .fn_math import argument_number, toolpak
from .nodes import Missing, Node, Scalar

_BIT_LIMIT = 2.0**48  # Excel's bitwise functions take 0 <= n < 2^48


def _whole_numbers(context: Context, nodes: tuple[Node, ...], name: str) -> list[int] | CellError:
    """GCD's and LCM's numbers as Excel's stored values show it reads them: every value, in a
    range or an array too, is converted (text "8" is 8, "eight" or "" is #VALUE!, TRUE is
    #VALUE!); a blank cell of a range is 0, a blank single cell is left out, a left-out
    argument is #N/A; with no numbers at all, #VALUE!."""
    values = []
    for node in nodes:
        if type(node) is Missing:
            return CellError(NA, f"{name}: an argument is left out")
        v = evaluate(node, context)
        if type(v) is np.ndarray:
            items = [0.0 if x is None else x for x in v.flat]
        else:
            items = [] if v is None else [v]
        for x in items:
            n = argument_number(x, logicals=False)
            if type(n) is CellError:
                return n
            values.append(n)
    if not values:
        return CellError(VALUE, f"{name} has no numbers")
    if any(x < 0.0 for x in values):
        return CellError(NUM, f"{name} takes no negative numbers")
    if any(x >= 2.0**53 for x in values):
        return CellError(NUM, f"{name} takes numbers below 2^53")
    return [int(x) for x in values]


@builtin("GCD", 1, 255, lazy=True)
def gcd(context: Context, *nodes: Node) -> float | CellError:
    """The greatest common divisor (numbers truncated; read as :func:`_whole_numbers` says).

    >>> from cellfuncs.formula import compute
    >>> compute("=GCD(5, 2)"), compute("=GCD(7.9, 1)"), compute("=GCD(0, 0)"), compute('=GCD({4,"8",12})')
    (1.0, 1.0, 0.0, 4.0)
    >>> compute("=GCD(TRUE, 2)").code, compute("=GCD(, 2)").code
    ('#VALUE!', '#N/A')
    """
    values = _whole_numbers(context, nodes, "GCD")
    return values if type(values) is CellError else float(reduce(math.gcd, values, 0))


@builtin("LCM", 1, 255, lazy=True)
def lcm(context: Context, *nodes: Node) -> float | CellError:
    """The least common multiple (numbers truncated; read as :func:`_whole_numbers` says); 0
    when any number is 0.

    >>> from cellfuncs.formula import compute
    >>> compute("=LCM(24, 36)"), compute("=LCM(5, 0)"), compute('=LCM({4,"8",12})')
    (72.0, 0.0, 24.0)
    """
    values = _whole_numbers(context, nodes, "LCM")
    if type(values) is CellError:
        return values
    out = reduce(math.lcm, values, 1)
    return float(out) if out < 2**53 else CellError(NUM, "the least common multiple is too large")


@builtin("MOD", 2)
@numeric
def mod(x: float, d: float) -> float | CellError:
    """The remainder of ``x / d`` with the sign of ``d``: the exact remainder of the two
    doubles, plus ``d`` when their signs differ (Excel's stored values to the last bit, where
    ``x - d*INT(x/d)`` rounds ``MOD(5, 1E-10)`` to 0).

    >>> mod(3.0, 2.0), mod(-3.0, 2.0), mod(3.0, -2.0), mod(1.0, 0.0).code
    (1.0, 1.0, -1.0, '#DIV/0!')
    >>> mod(5.0, 1e-10), mod(5.0, -1e-10)
    (9.999981783901343e-11, -1.821609865774887e-16)
    """
    if d == 0.0:
        return CellError(DIV0, "MOD by 0")
    r = math.fmod(x, d)
    return r + d if r != 0.0 and (r < 0.0) != (d < 0.0) else r + 0.0  # + 0.0: fmod(-4, 2) is -0.0


@builtin("QUOTIENT", 2)
@toolpak
def quotient(x: float, d: float) -> float | CellError:
    """The integer part of ``x / d`` (toward zero).

    >>> quotient(-10.0, 3.0)
    -3.0
    """
    return float(math.trunc(x / d)) if d != 0.0 else CellError(DIV0, "QUOTIENT by 0")


builtin("SIGN", 1)(numeric(lambda x: float((x > 0) - (x < 0))))
builtin("SQRTPI", 1)(toolpak(lambda x: math.sqrt(x * math.pi) if x >= 0 else CellError(NUM, "SQRTPI of a negative number")))


@builtin("LOG", 1, 2)
@numeric
def log(x: float, base: float = 10.0) -> float | CellError:
    """The logarithm of ``x`` to ``base`` (default 10).

    >>> log(8.0, 2.0), log(86.0, math.e) == math.log(86.0)
    (3.0, True)
    """
    if x <= 0.0 or base <= 0.0:
        return CellError(NUM, "LOG of a number that is not positive")
    if base == 1.0:
        return CellError(DIV0, "LOG to base 1")
    return math.log(x) / math.log(base)


def _factorial(n: float, step: int) -> float | CellError:
    if n < 0.0:
        return CellError(NUM, "the factorial of a negative number")
    k = int(n)
    if k > 170 * step:
        return CellError(NUM, "the factorial is too large")
    out = 1.0
    for i in range(k, 0, -step):
        out *= i
    return out if math.isfinite(out) else CellError(NUM, "the factorial is too large")


builtin("FACT", 1)(numeric(lambda n: _factorial(n, 1)))
builtin("FACTDOUBLE", 1)(toolpak(lambda n: _factorial(n, 2)))


@builtin("COMBIN", 2)
@numeric
def combin(n: float, k: float) -> float | CellError:
    """Combinations of ``k`` out of ``n`` (both truncated).

    >>> combin(8.0, 2.0)
    28.0
    """
    n, k = int(n), int(k)
    if n < 0 or k < 0 or k > n:
        return CellError(NUM, "COMBIN needs 0 <= k <= n")
    return _exact_or_large(lambda: math.comb(n, k), math.lgamma(n + 1) - math.lgamma(k + 1) - math.lgamma(n - k + 1))


@builtin("COMBINA", 2)
@numeric
def combina(n: float, k: float) -> float | CellError:
    """Combinations with repetitions.

    >>> combina(4.0, 3.0)
    20.0
    """
    n, k = int(n), int(k)
    if n < 0 or k < 0 or (n == 0 and k > 0):
        return CellError(NUM, "COMBINA needs n >= 0 and k >= 0")
    if n == 0:
        return 1.0
    return _exact_or_large(lambda: math.comb(n + k - 1, k), math.lgamma(n + k) - math.lgamma(k + 1) - math.lgamma(n))


@builtin("PERMUT", 2)
@numeric
def permut(n: float, k: float) -> float | CellError:
    """Permutations of ``k`` out of ``n``.

    >>> permut(100.0, 3.0)
    970200.0
    """
    n, k = int(n), int(k)
    if n < 0 or k < 0 or k > n:
        return CellError(NUM, "PERMUT needs 0 <= k <= n")
    return _exact_or_large(lambda: math.perm(n, k), math.lgamma(n + 1) - math.lgamma(n - k + 1))


def _exact_or_large(exact, log_value: float) -> float | CellError:
    """An exact integer count when it is small enough to compute quickly, else from its logarithm."""
    if log_value > 709.0:
        return CellError(NUM, "the count is too large")
    if log_value < 80.0:
        return float(exact())
    return math.exp(log_value)


def _bits(name: str, fn) -> None:
    def op(a: float, b: float) -> float | CellError:
        if not (0.0 <= a < _BIT_LIMIT and 0.0 <= b < _BIT_LIMIT) or a != int(a) or b != int(b):
            return CellError(NUM, f"{name} takes whole numbers from 0 to 2^48-1")
        return float(fn(int(a), int(b)))

    builtin(name, 2)(numeric(op))


_bits("BITAND", lambda a, b: a & b)
_bits("BITOR", lambda a, b: a | b)
_bits("BITXOR", lambda a, b: a ^ b)


def _shift(name: str, left: bool) -> None:
    def op(a: float, s: float) -> float | CellError:
        if not 0.0 <= a < _BIT_LIMIT or a != int(a) or abs(s) > 53:
            return CellError(NUM, f"{name} takes a whole number from 0 to 2^48-1 and a shift up to 53")
        k = int(s) if left else -int(s)
        out = int(a) << k if k >= 0 else int(a) >> -k
        return float(out) if out < _BIT_LIMIT else CellError(NUM, f"{name}'s result is 2^48 or more")

    builtin(name, 2)(numeric(op))


_shift("BITLSHIFT", True)
_shift("BITRSHIFT", False)

builtin("DELTA", 1, 2)(toolpak(lambda a, b=0.0: 1.0 if a == b else 0.0))
builtin("GESTEP", 1, 2)(toolpak(lambda a, b=0.0: 1.0 if a >= b else 0.0))


def _aggregate(name: str, fn) -> None:
    @builtin(name, 1, 255, lazy=True)
    def aggregate(context: Context, *nodes: Node) -> float | CellError:
        values = collect(context, nodes, to_number, lambda x: x if type(x) is float else None)
        if type(values) is CellError:
            return values
        r = fn(values)
        return r if type(r) is CellError or math.isfinite(r) else CellError(NUM, f"the {name} is too large")


_aggregate("PRODUCT", lambda v: math.prod(v) if v else 0.0)
_aggregate("SUMSQ", lambda v: math.fsum(x * x for x in v))


def _kth(name: str, largest: bool) -> None:
    @builtin(name, 2, lazy=True)
    def kth(context: Context, array: Node, k: Node) -> Scalar:
        values = collect(context, (array,), to_number, lambda x: x if type(x) is float else None)
        if type(values) is CellError:
            return values
        n = collect(context, (k,), to_number, to_number)
        if type(n) is CellError:
            return n
        if len(n) != 1:
            return CellError(NUM, f"{name} takes one position")
        i = math.ceil(n[0])
        if not 1 <= i <= len(values):
            return CellError(NUM, f"{name} position {i} is outside the {len(values)} numbers")
        return sorted(values, reverse=largest)[i - 1]


_kth("LARGE", True)
_kth("SMALL", False)
