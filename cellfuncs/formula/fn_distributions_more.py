"""Built-in distributions and statistics beyond :mod:`.fn_distributions`: HYPGEOM.DIST
(HYPGEOMDIST), WEIBULL.DIST (WEIBULL) and SKEW.P.

``cumulative`` TRUE gives the distribution function, FALSE the density (or probability mass).

>>> from cellfuncs.formula import compute
>>> round(compute("=HYPGEOM.DIST(1, 4, 8, 20, TRUE)"), 4), round(compute("=WEIBULL.DIST(105, 20, 100, TRUE)"), 6)
(0.4654, 0.929581)
"""

from __future__ import annotations

import math
import statistics

from ..errors import DIV0, NUM, CellError
from .arrays import numeric
from .coerce import to_number
from .evaluate import Context, builtin, collect
from .nodes import Node


def hypgeom_dist(sample_s: float, number_sample: float, population_s: float, number_pop: float,
                 cumulative: float) -> float | CellError:
    """The probability of ``sample_s`` successes (or at most that many) in ``number_sample``
    draws without replacement from ``number_pop`` items of which ``population_s`` are
    successes; every argument truncated, a count outside what is possible #NUM!.

    >>> round(hypgeom_dist(1.0, 4.0, 8.0, 20.0, 0.0), 10)
    0.3632610939
    """
    x, n, k, total = int(sample_s), int(number_sample), int(population_s), int(number_pop)
    if not (0 < n <= total and 0 < k <= total and max(0, n - total + k) <= x <= min(n, k)):
        return CellError(NUM, "HYPGEOM.DIST: a count is outside what the sample and population allow")
    from scipy.stats import hypergeom  # lazy: scipy.stats takes a while to import

    law = hypergeom(total, k, n)
    return float(law.cdf(x) if cumulative else law.pmf(x))


def weibull_dist(x: float, alpha: float, beta: float, cumulative: float) -> float | CellError:
    """The Weibull distribution of shape ``alpha`` and scale ``beta``: x < 0 or a shape or
    scale that is not positive is #NUM!.

    >>> round(weibull_dist(105.0, 20.0, 100.0, 0.0), 9)
    0.035588864
    """
    if x < 0.0 or alpha <= 0.0 or beta <= 0.0:
        return CellError(NUM, "WEIBULL.DIST needs x >= 0 and a positive shape and scale")
    z = (x / beta) ** alpha
    if cumulative:
        return -math.expm1(-z)
    if x == 0.0 and alpha < 1.0:
        return CellError(NUM, "WEIBULL.DIST density is infinite at 0")
    return alpha / beta * (x / beta) ** (alpha - 1.0) * math.exp(-z)


builtin("HYPGEOM.DIST", 5)(numeric(hypgeom_dist))
builtin("HYPGEOMDIST", 4)(numeric(lambda x, n, k, total: hypgeom_dist(x, n, k, total, 0.0)))
for _name in ("WEIBULL.DIST", "WEIBULL"):
    builtin(_name, 4)(numeric(weibull_dist))


def _number(x):
    return x if type(x) is float else None


@builtin("SKEW.P", 1, 255, lazy=True)
def skew_p(context: Context, *nodes: Node) -> float | CellError:
    """The skewness of a population: the mean of the cubed deviations over the cube of the
    population standard deviation; numbers gathered as SKEW gathers them.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=SKEW.P({3,4,5,2,3,4,5,6,4,7})"), 6)
    0.303193
    """
    values = collect(context, nodes, to_number, _number)
    if type(values) is CellError:
        return values
    s = statistics.pstdev(values) if values else 0.0
    if s == 0.0:
        return CellError(DIV0, "SKEW.P needs numbers that are not all equal")
    m = statistics.fmean(values)
    return math.fsum(((x - m) / s) ** 3 for x in values) / len(values)
