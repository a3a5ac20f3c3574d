"""Built-in hypothesis tests and the distributions of their statistics: T.TEST (TTEST), F.TEST
(FTEST), Z.TEST (ZTEST), CHISQ.TEST (CHITEST), STANDARDIZE; Student's t (T.DIST, T.DIST.2T,
T.DIST.RT, T.INV, T.INV.2T, TDIST, TINV), chi-square (CHISQ.DIST, CHISQ.DIST.RT, CHISQ.INV,
CHISQ.INV.RT, CHIDIST, CHIINV) and F (F.DIST, F.DIST.RT, F.INV, F.INV.RT, FDIST, FINV).

Degrees of freedom are truncated to integers. The tests take the numbers of their arrays as
SUM does (text and logical values in ranges skipped); the paired t-test and CHISQ.TEST take
the positions where both arrays hold numbers. The distribution functions come from
scipy.special (imported on first use).

>>> from cellfuncs.formula import compute
>>> round(compute("=T.DIST.2T(1.959999998, 60)"), 8), round(compute("=CHISQ.DIST.RT(18.307, 10)"), 7)
(0.05464493, 0.0500006)
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import DIV0, NA, NUM, CellError
from .arrays import Value, as_array, numeric
from .coerce import to_number
from .evaluate import builtin
from .fn_stats import _pairs


def _sp():
    import scipy.special  # lazy: a few tenths of a second to import

    return scipy.special


def _bad(name: str) -> CellError:
    return CellError(NUM, f"{name}: an argument is outside its range")


# ---- Student's t ----------------------------------------------------------------------------
def _t_cdf(x: float, df: int) -> float:
    return float(_sp().stdtr(df, x))


def t_dist(x: float, df: float, cumulative: float) -> float | CellError:
    """Student's t: its distribution function (``cumulative``) or density.

    >>> round(t_dist(60.0, 1.0, 1.0), 8), round(t_dist(8.0, 3.0, 0.0), 8)
    (0.99469533, 0.00073691)
    """
    df = math.trunc(df)
    if df < 1:
        return _bad("T.DIST")
    if cumulative:
        return _t_cdf(x, df)
    log_c = math.lgamma((df + 1) / 2.0) - math.lgamma(df / 2.0) - 0.5 * math.log(df * math.pi)
    return math.exp(log_c - (df + 1) / 2.0 * math.log1p(x * x / df))


def t_dist_rt(x: float, df: float) -> float | CellError:
    df = math.trunc(df)
    return _t_cdf(-x, df) if df >= 1 else _bad("T.DIST.RT")


def t_tails(x: float, df: float, tails: float) -> float | CellError:
    """The probability beyond ``x`` (at least 0) in one tail or both."""
    df, tails = math.trunc(df), math.trunc(tails)
    if df < 1 or x < 0.0 or tails not in (1, 2):
        return _bad("T.DIST.2T" if tails == 2 else "TDIST")
    return tails * _t_cdf(-x, df)


def t_inv(p: float, df: float) -> float | CellError:
    df = math.trunc(df)
    if df < 1 or not 0.0 < p < 1.0:
        return _bad("T.INV")
    return float(_sp().stdtrit(df, p))


def t_inv_2t(p: float, df: float) -> float | CellError:
    df = math.trunc(df)
    if df < 1 or not 0.0 < p <= 1.0:
        return _bad("T.INV.2T")
    return -float(_sp().stdtrit(df, p / 2.0))


# ---- chi-square ------------------------------------------------------------------------------
def _degrees(df: float) -> int | None:
    df = math.trunc(df)
    return df if 1 <= df <= 1e10 else None


def chisq_dist(x: float, df: float, cumulative: float) -> float | CellError:
    """The chi-square distribution function (``cumulative``) or density.

    >>> round(chisq_dist(0.5, 1.0, 1.0), 8), round(chisq_dist(2.0, 3.0, 0.0), 8)
    (0.52049988, 0.20755375)
    """
    k = _degrees(df)
    if k is None or x < 0.0:
        return _bad("CHISQ.DIST")
    if cumulative:
        return float(_sp().chdtr(k, x))
    if x == 0.0:
        return 0.0 if k > 2 else 0.5 if k == 2 else _bad("CHISQ.DIST")
    half = k / 2.0
    return math.exp((half - 1.0) * math.log(x) - x / 2.0 - half * math.log(2.0) - math.lgamma(half))


def chisq_dist_rt(x: float, df: float) -> float | CellError:
    k = _degrees(df)
    if k is None or x < 0.0:
        return _bad("CHISQ.DIST.RT")
    return float(_sp().chdtrc(k, x))


def chisq_inv(p: float, df: float) -> float | CellError:
    k = _degrees(df)
    if k is None or not 0.0 <= p < 1.0:
        return _bad("CHISQ.INV")
    return 2.0 * float(_sp().gammaincinv(k / 2.0, p))


def chisq_inv_rt(p: float, df: float) -> float | CellError:
    k = _degrees(df)
    if k is None or not 0.0 < p <= 1.0:
        return _bad("CHISQ.INV.RT")
    return 2.0 * float(_sp().gammainccinv(k / 2.0, p))


# ---- F ---------------------------------------------------------------------------------------
def f_dist(x: float, d1: float, d2: float, cumulative: float) -> float | CellError:
    """The F distribution function (``cumulative``) or density.

    >>> round(f_dist(15.2069, 6.0, 4.0, 1.0), 6), round(f_dist(15.2069, 6.0, 4.0, 0.0), 7)
    (0.99, 0.0012238)
    """
    a, b = _degrees(d1), _degrees(d2)
    if a is None or b is None or x < 0.0:
        return _bad("F.DIST")
    if cumulative:
        return float(_sp().fdtr(a, b, x))
    if x == 0.0:
        return 0.0 if a > 2 else 1.0 if a == 2 else _bad("F.DIST")
    log_beta = math.lgamma(a / 2.0) + math.lgamma(b / 2.0) - math.lgamma((a + b) / 2.0)
    log_density = (a / 2.0 * math.log(a / b) + (a / 2.0 - 1.0) * math.log(x)
                   - (a + b) / 2.0 * math.log1p(a * x / b) - log_beta)
    return math.exp(log_density)


def f_dist_rt(x: float, d1: float, d2: float) -> float | CellError:
    a, b = _degrees(d1), _degrees(d2)
    if a is None or b is None or x < 0.0:
        return _bad("F.DIST.RT")
    return float(_sp().fdtrc(a, b, x))


def f_inv(p: float, d1: float, d2: float) -> float | CellError:
    a, b = _degrees(d1), _degrees(d2)
    if a is None or b is None or not 0.0 <= p < 1.0:
        return _bad("F.INV")
    return float(_sp().fdtri(a, b, p))


def f_inv_rt(p: float, d1: float, d2: float) -> float | CellError:
    """From the upper tail directly (1 - p would lose the digits of a small p): F exceeds f
    with probability I(d2 / (d2 + d1 f); d2/2, d1/2)."""
    a, b = _degrees(d1), _degrees(d2)
    if a is None or b is None or not 0.0 < p <= 1.0:
        return _bad("F.INV.RT")
    w = float(_sp().betaincinv(b / 2.0, a / 2.0, p))
    return b * (1.0 - w) / (a * w)


def standardize(x: float, mean: float, sd: float) -> float | CellError:
    """(x - mean) / sd, for a positive sd.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=STANDARDIZE(42, 40, 1.5)"), 8)
    1.33333333
    """
    return (x - mean) / sd if sd > 0.0 else _bad("STANDARDIZE")


_TABLE = [
    # name, function, least and most arguments
    ("T.DIST", t_dist, 3, 3), ("T.DIST.2T", lambda x, df: t_tails(x, df, 2.0), 2, 2),
    ("T.DIST.RT", t_dist_rt, 2, 2), ("TDIST", t_tails, 3, 3),
    ("T.INV", t_inv, 2, 2), ("T.INV.2T", t_inv_2t, 2, 2), ("TINV", t_inv_2t, 2, 2),
    ("CHISQ.DIST", chisq_dist, 3, 3), ("CHISQ.DIST.RT", chisq_dist_rt, 2, 2), ("CHIDIST", chisq_dist_rt, 2, 2),
    ("CHISQ.INV", chisq_inv, 2, 2), ("CHISQ.INV.RT", chisq_inv_rt, 2, 2), ("CHIINV", chisq_inv_rt, 2, 2),
    ("F.DIST", f_dist, 4, 4), ("F.DIST.RT", f_dist_rt, 3, 3), ("FDIST", f_dist_rt, 3, 3),
    ("F.INV", f_inv, 3, 3), ("F.INV.RT", f_inv_rt, 3, 3), ("FINV", f_inv_rt, 3, 3),
    ("STANDARDIZE", standardize, 3, 3),
]

for _name, _fn, _lo, _hi in _TABLE:
    builtin(_name, _lo, _hi)(numeric(_fn))


# ---- the tests -------------------------------------------------------------------------------
def _sample(v: Value) -> np.ndarray | CellError:
    """The numbers of an array argument (an error in it is the result)."""
    if type(v) is CellError:
        return v
    out = []
    for x in as_array(v).flat:
        if type(x) is CellError:
            return x
        if type(x) is float:
            out.append(x)
    return np.array(out)


def _whole(v: Value) -> int | CellError:
    x = to_number(as_array(v)[0, 0])
    return x if type(x) is CellError else math.trunc(x)


def _t_statistic(a: np.ndarray, b: np.ndarray, kind: int) -> tuple[float, float] | CellError:
    """The t statistic and its degrees of freedom: paired (1), equal variances (2), Welch (3)."""
    if kind == 1:
        d = a - b
        if d.size < 2:
            return CellError(DIV0, "T.TEST needs at least two pairs")
        return float(d.mean()) / math.sqrt(float(d.var(ddof=1)) / d.size), d.size - 1.0
    n1, n2 = a.size, b.size
    if n1 < 2 or n2 < 2:
        return CellError(DIV0, "T.TEST needs at least two numbers in each array")
    v1, v2 = float(a.var(ddof=1)), float(b.var(ddof=1))
    diff = float(a.mean()) - float(b.mean())
    if kind == 2:
        pooled = ((n1 - 1) * v1 + (n2 - 1) * v2) / (n1 + n2 - 2)
        return diff / math.sqrt(pooled * (1.0 / n1 + 1.0 / n2)), n1 + n2 - 2.0
    s1, s2 = v1 / n1, v2 / n2
    return diff / math.sqrt(s1 + s2), (s1 + s2) ** 2 / (s1 * s1 / (n1 - 1) + s2 * s2 / (n2 - 1))


@builtin("T.TEST", 4, arrays=(0, 1))
def t_test(array1: Value, array2: Value, tails: Value, kind: Value) -> Value:
    """The probability of Student's t-test: ``tails`` 1 or 2; ``kind`` 1 paired, 2 two samples
    of equal variance, 3 two samples of unequal variance (Welch's degrees of freedom).

    >>> from cellfuncs.formula import compute
    >>> round(compute("=T.TEST({3,4,5,8,9,1,2,4,5}, {6,19,3,2,14,4,5,17,1}, 2, 1)"), 6)
    0.196016
    """
    t, k = _whole(tails), _whole(kind)
    for v in (t, k):
        if type(v) is CellError:
            return v
    if t not in (1, 2) or k not in (1, 2, 3):
        return CellError(NUM, "T.TEST takes tails 1 or 2 and type 1, 2 or 3")
    samples = _pairs(array1, array2) if k == 1 else (_sample(array1), _sample(array2))
    if type(samples) is CellError:
        return samples
    for s in samples:
        if type(s) is CellError:
            return s
    found = _t_statistic(*samples, k)
    if type(found) is CellError:
        return found
    stat, df = found
    if not math.isfinite(stat):
        return CellError(DIV0, "T.TEST: the numbers do not vary")
    return t * float(_sp().stdtr(df, -abs(stat)))


@builtin("F.TEST", 2, arrays=(0, 1))
def f_test(array1: Value, array2: Value) -> Value:
    """The two-tailed probability that the two arrays' variances do not differ.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=F.TEST({6,7,9,15,21}, {20,28,31,38,40})"), 8)
    0.64831785
    """
    a, b = _sample(array1), _sample(array2)
    for s in (a, b):
        if type(s) is CellError:
            return s
    if a.size < 2 or b.size < 2:
        return CellError(DIV0, "F.TEST needs at least two numbers in each array")
    v1, v2 = float(a.var(ddof=1)), float(b.var(ddof=1))
    if v1 == 0.0 or v2 == 0.0:
        return CellError(DIV0, "F.TEST: the numbers of an array do not vary")
    below = float(_sp().fdtr(a.size - 1, b.size - 1, v1 / v2))
    return 2.0 * min(below, 1.0 - below)


@builtin("Z.TEST", 2, 3, arrays=(0,))
def z_test(array: Value, x: Value, sigma: Value = None) -> Value:
    """The one-tailed probability of the z-test: how likely a mean at least the array's is
    when the population's mean is ``x``; ``sigma`` omitted: the sample's standard deviation.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=Z.TEST({3,6,7,8,6,5,4,2,1,9}, 4)"), 6)
    0.090574
    """
    a = _sample(array)
    if type(a) is CellError:
        return a
    if a.size == 0:
        return CellError(NA, "Z.TEST of no numbers")
    if sigma is None and a.size < 2:
        return CellError(DIV0, "Z.TEST needs two numbers to estimate sigma")
    mean = float(a.mean())
    sample_sd = float(a.std(ddof=1)) if sigma is None else None

    def p_value(mu: float, s: float | None = None) -> float | CellError:
        s = sample_sd if s is None else s
        if s <= 0.0:
            return CellError(NUM if sigma is not None else DIV0, "Z.TEST needs a positive sigma")
        return 1.0 - float(_sp().ndtr((mean - mu) / (s / math.sqrt(a.size))))

    return numeric(p_value)(x) if sigma is None else numeric(p_value)(x, sigma)


def _chisq_degrees(shape: tuple[int, int]) -> int:
    rows, cols = shape
    return (rows - 1) * (cols - 1) if rows > 1 and cols > 1 else rows * cols - 1


@builtin("CHISQ.TEST", 2, arrays=(0, 1))
def chisq_test(actual: Value, expected: Value) -> Value:
    """The probability of the chi-square test of independence: the statistic sum((A-E)^2/E) with
    (rows-1)(columns-1) degrees of freedom (one row or column: the count less one).

    >>> from cellfuncs.formula import compute
    >>> round(compute("=CHISQ.TEST({58,35;11,25;10,23}, {45.35,47.65;17.56,18.44;16.09,16.91})"), 7)
    0.0003082
    """
    shape = as_array(actual).shape if type(actual) is not CellError else None
    if shape is not None and type(expected) is not CellError and as_array(expected).shape != shape:
        return CellError(NA, "CHISQ.TEST's arrays differ in shape")
    p = _pairs(actual, expected)
    if type(p) is CellError:
        return p
    df = _chisq_degrees(shape)
    a, e = p
    if df < 1:
        return CellError(NA, "CHISQ.TEST needs more than one value")
    if (e <= 0.0).any():
        return CellError(DIV0 if (e == 0.0).any() else NUM, "CHISQ.TEST needs positive expected values")
    return float(_sp().chdtrc(df, float(np.sum((a - e) ** 2 / e))))


# the legacy names of the Compatibility category
builtin("TTEST", 4, arrays=(0, 1))(t_test)
builtin("FTEST", 2, arrays=(0, 1))(f_test)
builtin("CHITEST", 2, arrays=(0, 1))(chisq_test)
builtin("ZTEST", 2, 3, arrays=(0,))(z_test)
