"""Built-in probability distributions and special functions: NORM, LOGNORM, EXPON, GAMMA,
BETA, BINOM, NEGBINOM and POISSON distributions with their inverses, ERF, ERFC, GAMMA,
GAMMALN, FISHER, FISHERINV, GAUSS, PHI, CONFIDENCE.NORM and CONFIDENCE.T, and the legacy
names of the Compatibility category (NORMDIST, BINOMDIST, ...).

The special functions come from scipy.special (imported on first use: ``cellfuncs eval``
starts without it). ``cumulative`` TRUE gives the distribution function, FALSE the density
(or probability mass).

>>> from cellfuncs.formula import compute
>>> round(compute("=NORM.DIST(42, 40, 1.5, TRUE)"), 9), round(compute("=BINOM.DIST(6, 10, 0.5, FALSE)"), 9)
(0.90878878, 0.205078125)
"""

from __future__ import annotations

import math
from typing import Callable

from ..errors import DIV0, NUM, CellError
from .arrays import Value, map_values, numeric
from .coerce import to_bool
from .evaluate import builtin
from .fn_securities import numbers


def _sp():
    import scipy.special  # lazy: a few tenths of a second to import

    return scipy.special


def _bad(name: str) -> CellError:
    return CellError(NUM, f"{name}: an argument is outside its range")


def _probability(p: float) -> bool:
    return 0.0 < p < 1.0


def norm_dist(x: float, mean: float, sd: float, cumulative: float) -> float | CellError:
    if sd <= 0.0:
        return _bad("NORM.DIST")
    z = (x - mean) / sd
    return float(_sp().ndtr(z)) if cumulative else math.exp(-0.5 * z * z) / (sd * math.sqrt(2.0 * math.pi))


def norm_inv(p: float, mean: float, sd: float) -> float | CellError:
    if sd <= 0.0 or not _probability(p):
        return _bad("NORM.INV")
    return mean + sd * float(_sp().ndtri(p))


def lognorm_dist(x: float, mean: float, sd: float, cumulative: float) -> float | CellError:
    if x <= 0.0 or sd <= 0.0:
        return _bad("LOGNORM.DIST")
    z = (math.log(x) - mean) / sd
    return float(_sp().ndtr(z)) if cumulative else math.exp(-0.5 * z * z) / (x * sd * math.sqrt(2.0 * math.pi))


def lognorm_inv(p: float, mean: float, sd: float) -> float | CellError:
    if sd <= 0.0 or not _probability(p):
        return _bad("LOGNORM.INV")
    return math.exp(mean + sd * float(_sp().ndtri(p)))


def expon_dist(x: float, rate: float, cumulative: float) -> float | CellError:
    if x < 0.0 or rate <= 0.0:
        return _bad("EXPON.DIST")
    return -math.expm1(-rate * x) if cumulative else rate * math.exp(-rate * x)


def gamma_dist(x: float, alpha: float, beta: float, cumulative: float) -> float | CellError:
    if x < 0.0 or alpha <= 0.0 or beta <= 0.0:
        return _bad("GAMMA.DIST")
    if cumulative:
        return float(_sp().gammainc(alpha, x / beta))
    if x == 0.0:
        return 0.0 if alpha > 1.0 else (1.0 / beta if alpha == 1.0 else CellError(NUM, "GAMMA.DIST density is infinite at 0"))
    return math.exp((alpha - 1.0) * math.log(x) - x / beta - alpha * math.log(beta) - math.lgamma(alpha))


def gamma_inv(p: float, alpha: float, beta: float) -> float | CellError:
    if not 0.0 <= p < 1.0 or alpha <= 0.0 or beta <= 0.0:
        return _bad("GAMMA.INV")
    return beta * float(_sp().gammaincinv(alpha, p))


def beta_dist(x: float, a: float, b: float, cumulative: float, lo: float = 0.0, hi: float = 1.0) -> float | CellError:
    if a <= 0.0 or b <= 0.0 or lo >= hi or not lo <= x <= hi:
        return _bad("BETA.DIST")
    t = (x - lo) / (hi - lo)
    if cumulative:
        return float(_sp().betainc(a, b, t))
    if (t == 0.0 and a < 1.0) or (t == 1.0 and b < 1.0):
        return _bad("BETA.DIST")
    log_b = math.lgamma(a) + math.lgamma(b) - math.lgamma(a + b)
    return t ** (a - 1.0) * (1.0 - t) ** (b - 1.0) / math.exp(log_b) / (hi - lo)


def beta_inv(p: float, a: float, b: float, lo: float = 0.0, hi: float = 1.0) -> float | CellError:
    if a <= 0.0 or b <= 0.0 or lo >= hi or not 0.0 < p < 1.0:  # Excel: #NUM! at p = 1 too
        return _bad("BETA.INV")
    return lo + (hi - lo) * float(_sp().betaincinv(a, b, p))


def _log_comb(n: int, k: int) -> float:
    return math.lgamma(n + 1) - math.lgamma(k + 1) - math.lgamma(n - k + 1)


def _binom_pmf(k: int, n: int, p: float) -> float:
    if p in (0.0, 1.0):
        return float(k == (n if p == 1.0 else 0))
    return math.exp(_log_comb(n, k) + k * math.log(p) + (n - k) * math.log1p(-p))


def _binom_cdf(k: int, n: int, p: float) -> float:
    if k >= n:
        return 1.0
    return float(_sp().bdtr(k, n, p)) if k >= 0 else 0.0


def binom_dist(k: float, n: float, p: float, cumulative: float) -> float | CellError:
    k, n = int(k), int(n)
    if not 0 <= k <= n or not 0.0 <= p <= 1.0:
        return _bad("BINOM.DIST")
    return _binom_cdf(k, n, p) if cumulative else _binom_pmf(k, n, p)


def binom_inv(n: float, p: float, alpha: float) -> float | CellError:
    """The smallest k whose cumulative probability reaches ``alpha`` (bisection)."""
    n = int(n)
    if n < 0 or not 0.0 <= p < 1.0 or not 0.0 < alpha < 1.0:  # Excel: #NUM! at p = 1 (a certain success)
        return _bad("BINOM.INV")
    lo, hi = 0, n
    while lo < hi:
        mid = (lo + hi) // 2
        if _binom_cdf(mid, n, p) >= alpha * (1.0 - 1e-15):
            hi = mid
        else:
            lo = mid + 1
    return float(lo)


def binom_dist_range(n: float, p: float, s: float, s2: float | None = None) -> float | CellError:
    n, s = int(n), int(s)
    s2 = s if s2 is None else int(s2)
    if not (0 <= s <= n and s <= s2 <= n and 0.0 <= p <= 1.0):
        return _bad("BINOM.DIST.RANGE")
    if s2 - s < 1000:
        return math.fsum(_binom_pmf(k, n, p) for k in range(s, s2 + 1))
    return _binom_cdf(s2, n, p) - _binom_cdf(s - 1, n, p)


def negbinom_dist(f: float, s: float, p: float, cumulative: float = 0.0) -> float | CellError:
    f, s = int(f), int(s)
    if f < 0 or s < 1 or not 0.0 < p < 1.0:  # Excel: #NUM! at p = 1 too
        return _bad("NEGBINOM.DIST")
    if cumulative:
        return float(_sp().nbdtr(f, s, p))
    return math.exp(_log_comb(f + s - 1, s - 1) + s * math.log(p) + f * math.log1p(-p))


def poisson_dist(x: float, mean: float, cumulative: float) -> float | CellError:
    k = int(x)
    if x < 0.0 or mean < 0.0:  # a negative x is refused before it is truncated to 0
        return _bad("POISSON.DIST")
    if cumulative:
        return float(_sp().pdtr(k, mean))
    return math.exp(k * math.log(mean) - mean - math.lgamma(k + 1)) if mean > 0 else float(k == 0)


def erf(lower: float, upper: float | None = None) -> float:
    if upper is None:
        return math.erf(lower)
    return math.erf(upper) - math.erf(lower)


def gamma(x: float) -> float | CellError:
    if x <= 0.0 and x == int(x):
        return _bad("GAMMA")
    try:
        return math.gamma(x)
    except OverflowError:
        return CellError(NUM, "GAMMA is too large")


def gammaln(x: float) -> float | CellError:
    return math.lgamma(x) if x > 0.0 else _bad("GAMMALN")


def fisher(x: float) -> float | CellError:
    return math.atanh(x) if -1.0 < x < 1.0 else _bad("FISHER")


def confidence_norm(alpha: float, sd: float, n: float) -> float | CellError:
    n = int(n)
    if not 0.0 < alpha < 1.0 or sd <= 0.0 or n < 1:
        return _bad("CONFIDENCE.NORM")
    return float(_sp().ndtri(1.0 - alpha / 2.0)) * sd / math.sqrt(n)


def confidence_t(alpha: float, sd: float, n: float) -> float | CellError:
    n = int(n)
    if not 0.0 < alpha < 1.0 or sd <= 0.0 or n < 1:
        return _bad("CONFIDENCE.T")
    if n == 1:
        return CellError(DIV0, "CONFIDENCE.T of one value")
    return float(_sp().stdtrit(n - 1, 1.0 - alpha / 2.0)) * sd / math.sqrt(n)


_TABLE = [
    # name, function, least and most arguments; the legacy names fix the cumulative flag
    ("NORM.DIST", norm_dist, 4, 4), ("NORMDIST", norm_dist, 4, 4),
    ("NORM.INV", norm_inv, 3, 3), ("NORMINV", norm_inv, 3, 3),
    ("NORM.S.DIST", lambda z, c: norm_dist(z, 0.0, 1.0, c), 2, 2), ("NORMSDIST", lambda z: norm_dist(z, 0.0, 1.0, 1.0), 1, 1),
    ("NORM.S.INV", lambda p: norm_inv(p, 0.0, 1.0), 1, 1), ("NORMSINV", lambda p: norm_inv(p, 0.0, 1.0), 1, 1),
    ("LOGNORM.DIST", lognorm_dist, 4, 4), ("LOGNORMDIST", lambda x, m, s: lognorm_dist(x, m, s, 1.0), 3, 3),
    ("LOGNORM.INV", lognorm_inv, 3, 3), ("LOGINV", lognorm_inv, 3, 3),
    ("EXPON.DIST", expon_dist, 3, 3), ("EXPONDIST", expon_dist, 3, 3),
    ("GAMMA.DIST", gamma_dist, 4, 4), ("GAMMADIST", gamma_dist, 4, 4),
    ("GAMMA.INV", gamma_inv, 3, 3), ("GAMMAINV", gamma_inv, 3, 3),
    ("BETA.DIST", beta_dist, 4, 6), ("BETADIST", lambda x, a, b, lo=0.0, hi=1.0: beta_dist(x, a, b, 1.0, lo, hi), 3, 5),
    ("BETA.INV", beta_inv, 3, 5), ("BETAINV", beta_inv, 3, 5),
    ("BINOM.DIST", binom_dist, 4, 4), ("BINOMDIST", binom_dist, 4, 4),
    ("BINOM.INV", binom_inv, 3, 3), ("CRITBINOM", binom_inv, 3, 3), ("BINOM.DIST.RANGE", binom_dist_range, 3, 4),
    ("NEGBINOM.DIST", negbinom_dist, 4, 4), ("NEGBINOMDIST", negbinom_dist, 3, 3),
    ("POISSON.DIST", poisson_dist, 3, 3), ("POISSON", poisson_dist, 3, 3),
    ("ERF", erf, 1, 2), ("ERF.PRECISE", math.erf, 1, 1), ("ERFC", math.erfc, 1, 1), ("ERFC.PRECISE", math.erfc, 1, 1),
    ("GAMMA", gamma, 1, 1), ("GAMMALN", gammaln, 1, 1), ("GAMMALN.PRECISE", gammaln, 1, 1),
    ("FISHER", fisher, 1, 1), ("FISHERINV", math.tanh, 1, 1),
    ("GAUSS", lambda z: norm_dist(z, 0.0, 1.0, 1.0) - 0.5, 1, 1), ("PHI", lambda x: norm_dist(x, 0.0, 1.0, 0.0), 1, 1),
    ("CONFIDENCE.NORM", confidence_norm, 3, 3), ("CONFIDENCE", confidence_norm, 3, 3), ("CONFIDENCE.T", confidence_t, 3, 3),
]

# The position of the cumulative flag, a logical value: text "TRUE" or "false" is read as one
# (Excel's stored values in the distribution sheets), where the other arguments take numbers.
_FLAG = {"NORM.DIST": 3, "NORMDIST": 3, "NORM.S.DIST": 1, "LOGNORM.DIST": 3, "EXPON.DIST": 2, "EXPONDIST": 2,
         "GAMMA.DIST": 3, "GAMMADIST": 3, "BETA.DIST": 3, "BINOM.DIST": 3, "BINOMDIST": 3, "NEGBINOM.DIST": 3,
         "POISSON.DIST": 2, "POISSON": 2}


def _with_flag(fn: Callable[..., Value], position: int) -> Callable[..., Value]:
    """``fn`` with its argument at ``position`` read as a logical value when it is text."""
    def call(*args: Value) -> Value:
        if len(args) > position:
            flag = map_values(lambda x: to_bool(x) if type(x) is str else x, args[position])
            args = (*args[:position], flag, *args[position + 1:])
        return fn(*args)

    call.takes_values = True  # as numeric's: a legacy formula intersects a range given to it
    return call


# The error functions refuse TRUE and FALSE (#VALUE!), as Excel's stored values show.
_NO_LOGICAL = {"ERF", "ERF.PRECISE", "ERFC", "ERFC.PRECISE"}

for _name, _fn, _lo, _hi in _TABLE:
    _checked = (numbers if _name in _NO_LOGICAL else numeric)(_fn)
    builtin(_name, _lo, _hi)(_with_flag(_checked, _FLAG[_name]) if _name in _FLAG else _checked)
