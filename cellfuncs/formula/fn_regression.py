"""Built-in least-squares fits: LINEST, LOGEST, TREND, GROWTH, FORECAST.LINEAR (FORECAST).

LINEST fits y = m1*x1 + ... + mk*xk + b; LOGEST fits y = b * m1^x1 * ... * mk^xk (a linear fit of
ln y); TREND and GROWTH give the fitted values at new x's. The known y's and x's hold numbers
only (#VALUE! otherwise). A known_y's column takes each column of known_x's as a variable, a
row each row; one variable may have any shape equal to known_y's; without known_x's the
variable is 1, 2, 3, ... An x variable that adds nothing to the others (collinear, or constant
beside the constant b) is left out of the fit, with coefficient 0 and standard error 0.

>>> from cellfuncs.formula import compute
>>> compute("=LINEST({1,9,5,7}, {0,4,2,3})").tolist(), compute("=TREND({1,2,3}, , {4;5})").tolist()
([[2.0, 1.0]], [[4.0], [5.0]])
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from ..errors import NA, NUM, REF, CellError
from .arrays import Value, as_array, as_value, filled, numeric
from .budget import charge
from .coerce import to_bool
from .evaluate import builtin
from .fn_matrix import _matrix
from .fn_stats import _intercept, _pairs, _slope

# a variable whose part independent of the earlier ones (and of the constant) is below this
# share of its size is taken as collinear, as Excel leaves such a variable out
_COLLINEAR = 1e-12


class _Data(NamedTuple):
    y: np.ndarray  # the n known y's
    x: np.ndarray  # n x k: a column per variable
    by_rows: bool  # the variables are rows of known_x's (known_y's is a row)


class _Fit(NamedTuple):
    m: np.ndarray  # a coefficient per variable, 0 for one left out
    b: float
    se: np.ndarray  # their standard errors
    se_b: float | None  # None: b is 0 by request, it has no error
    ssresid: float
    ssreg: float
    df: int
    used: int  # the variables in the fit


def _flag(v: Value, default: bool) -> bool | CellError:
    if v is None:
        return default
    return to_bool(as_array(v)[0, 0])


def _data(known_y: Value, known_x: Value, name: str) -> _Data | CellError:
    y = _matrix(known_y, name)
    if type(y) is CellError:
        return y
    if known_x is None:
        return _Data(y.ravel(), np.arange(1.0, y.size + 1.0).reshape(-1, 1), y.shape[0] == 1)
    x = _matrix(known_x, name)
    if type(x) is CellError:
        return x
    if x.shape == y.shape:
        return _Data(y.ravel(), x.reshape(-1, 1), y.shape[0] == 1)
    if y.shape[1] == 1 and x.shape[0] == y.shape[0]:
        return _Data(y.ravel(), x, False)
    if y.shape[0] == 1 and x.shape[1] == y.shape[1]:
        return _Data(y.ravel(), x.T, True)
    return CellError(REF, f"{name}'s known_y's and known_x's do not match in size")


def _independent(x: np.ndarray) -> list[int]:
    """The columns of ``x`` that are not combinations of the columns before them (Gram-Schmidt)."""
    kept, basis = [], []
    for j in range(x.shape[1]):
        v = x[:, j].copy()
        size = float(np.linalg.norm(v))
        for q in basis:
            v -= (q @ v) * q
        rest = float(np.linalg.norm(v))
        if size > 0.0 and rest > _COLLINEAR * size:
            kept.append(j)
            basis.append(v / rest)
    return kept


def _fit(d: _Data, const: bool) -> _Fit:
    n, k = d.x.shape
    x_mean = d.x.mean(axis=0) if const else np.zeros(k)
    y_mean = float(d.y.mean()) if const else 0.0
    xc, yc = d.x - x_mean, d.y - y_mean  # centred with a constant: the constant is then y's mean
    kept = _independent(xc)
    m, inverse = _solve(xc, yc, kept)
    df = n - len(kept) - (1 if const else 0)
    resid = yc - xc @ m
    ssresid = float(resid @ resid)
    variance = ssresid / df if df > 0 else math.nan
    se = np.zeros(k)
    se[kept] = np.sqrt(variance * np.diag(inverse))
    se_b = None
    if const:
        xm = x_mean[kept]
        se_b = math.sqrt(variance * (1.0 / n + float(xm @ inverse @ xm)))
    b = y_mean - float(x_mean @ m)
    return _Fit(m, b, se, se_b, ssresid, float(yc @ yc) - ssresid, df, len(kept))


def _solve(x: np.ndarray, y: np.ndarray, kept: list[int]) -> tuple[np.ndarray, np.ndarray]:
    """The least-squares coefficients of the columns ``kept`` (0 for the others) and (X'X)^-1
    of those columns, by QR."""
    m = np.zeros(x.shape[1])
    if not kept:
        return m, np.zeros((0, 0))
    q, r = np.linalg.qr(x[:, kept])
    m[kept] = np.linalg.solve(r, q.T @ y)
    m[kept] += np.linalg.solve(r, q.T @ (y - x @ m))  # one refinement step: the last digits right
    r_inv = np.linalg.inv(r)
    return m, r_inv @ r_inv.T


def _statistics(f: _Fit, row: np.ndarray) -> np.ndarray:
    """LINEST's five rows: coefficients, standard errors, r2 and sey, F and df, ssreg and
    ssresid; #N/A beyond the second column of the last three."""
    out = filled((5, row.shape[1]), CellError(NA, "LINEST gives two statistics in this row"))
    out[0] = [float(v) for v in row[0]]
    out[1, :-1] = [float(v) for v in f.se[::-1]]
    out[1, -1] = CellError(NA, "b is 0 by request: it has no standard error") if f.se_b is None else f.se_b
    sey = math.sqrt(f.ssresid / f.df) if f.df > 0 else math.nan
    total = f.ssreg + f.ssresid
    r2 = f.ssreg / total if total else math.nan
    f_stat = (f.ssreg / f.used) / (f.ssresid / f.df) if f.used and f.df > 0 and f.ssresid else math.nan
    out[2, :2] = r2, sey
    out[3, :2] = f_stat, float(f.df)
    out[4, :2] = f.ssreg, f.ssresid
    for (i, j), v in np.ndenumerate(out):
        if type(v) is float and not math.isfinite(v):
            out[i, j] = CellError(NUM, "this statistic is not defined for the data")
    return out


def _fitted(known_y: Value, known_x: Value, const: Value, name: str, log: bool) -> tuple[_Data, _Fit] | CellError:
    """The data and their fit (of ln y with ``log``)."""
    d = _data(known_y, known_x, name)
    if type(d) is CellError:
        return d
    with_b = _flag(const, True)
    if type(with_b) is CellError:
        return with_b
    if log:
        if (d.y <= 0.0).any():
            return CellError(NUM, f"{name} needs positive known_y's")
        d = d._replace(y=np.log(d.y))
    over = charge((d.x.shape[1], d.x.shape[1]))  # the triangular factor of the fit
    return over or (d, _fit(d, with_b))


def _estimate(known_y: Value, known_x: Value, const: Value, stats: Value, name: str, log: bool) -> Value:
    found = _fitted(known_y, known_x, const, name, log)
    if type(found) is CellError:
        return found
    fit = found[1]
    with_stats = _flag(stats, False)
    if type(with_stats) is CellError:
        return with_stats
    row = np.append(fit.m[::-1], fit.b).reshape(1, -1)
    if log:
        row = np.exp(row)
    over = charge((5 if with_stats else 1, row.shape[1]))
    if over is not None:
        return over
    return _statistics(fit, row) if with_stats else as_value(row)


@builtin("LINEST", 1, 4, arrays=(0, 1))
def linest(known_y: Value, known_x: Value = None, const: Value = None, stats: Value = None) -> Value:
    """The least-squares line's coefficients {mk, ..., m1, b}; with ``stats`` also their
    standard errors, r2 and sey, F and df, ssreg and ssresid; ``const`` FALSE forces b = 0.

    >>> from cellfuncs.formula import compute
    >>> [round(v, 6) for v in compute("=LINEST({1,2,4}, {1,2,3}, TRUE, TRUE)")[:, 0]]
    [1.5, 0.288675, 0.964286, 27.0, 4.5]
    """
    return _estimate(known_y, known_x, const, stats, "LINEST", False)


@builtin("LOGEST", 1, 4, arrays=(0, 1))
def logest(known_y: Value, known_x: Value = None, const: Value = None, stats: Value = None) -> Value:
    """The exponential curve's factors {mk, ..., m1, b} of y = b * m1^x1 * ... (LINEST of ln y,
    the coefficients raised to e; the statistics are those of the fit of ln y).

    >>> from cellfuncs.formula import compute
    >>> [round(v, 6) for v in compute("=LOGEST({2,4,8}, {1,2,3})").ravel()]
    [2.0, 1.0]
    """
    return _estimate(known_y, known_x, const, stats, "LOGEST", True)


def _new_points(new_x: Value, d: _Data, name: str) -> np.ndarray | CellError:
    """The new x's as rows of variables (n x k), or for one variable as given."""
    if new_x is None:
        return d.x
    x = _matrix(new_x, name)
    if type(x) is CellError or d.x.shape[1] == 1:
        return x
    x = x.T if d.by_rows else x
    if x.shape[1] != d.x.shape[1]:
        return CellError(REF, f"{name}'s new_x's do not have the {d.x.shape[1]} variables of known_x's")
    return x


def _predict(known_y: Value, known_x: Value, new_x: Value, const: Value, name: str, log: bool) -> Value:
    found = _fitted(known_y, known_x, const, name, log)
    if type(found) is CellError:
        return found
    d, fit = found
    x = _new_points(new_x, d, name)
    if type(x) is CellError:
        return x
    if d.x.shape[1] == 1:  # one variable: the new x's keep their shape
        y = fit.b + fit.m[0] * (x if new_x is not None else x.reshape(as_array(known_y).shape))
    else:
        y = x @ fit.m + fit.b
        y = y.reshape(1, -1) if d.by_rows else y.reshape(-1, 1)
    over = charge(y.shape)
    if over is not None:
        return over
    with np.errstate(all="ignore"):
        return as_value(np.exp(y) if log else y)


@builtin("TREND", 1, 4, arrays=(0, 1, 2))
def trend(known_y: Value, known_x: Value = None, new_x: Value = None, const: Value = None) -> Value:
    """The least-squares line's values at ``new_x`` (omitted: at the known x's).

    >>> from cellfuncs.formula import compute
    >>> compute("=TREND({1,9,5,7}, {0,4,2,3}, {5,6})").tolist()
    [[11.0, 13.0]]
    """
    return _predict(known_y, known_x, new_x, const, "TREND", False)


@builtin("GROWTH", 1, 4, arrays=(0, 1, 2))
def growth(known_y: Value, known_x: Value = None, new_x: Value = None, const: Value = None) -> Value:
    """The fitted exponential curve's values at ``new_x`` (omitted: at the known x's).

    >>> from cellfuncs.formula import compute
    >>> [round(v, 9) for v in compute("=GROWTH({2,4,8}, {1,2,3}, {4,5})").ravel()]
    [16.0, 32.0]
    """
    return _predict(known_y, known_x, new_x, const, "GROWTH", True)


def _forecast(x: Value, known_y: Value, known_x: Value) -> Value:
    """The least-squares line of the (y, x) pairs of numbers at ``x``.

    >>> from cellfuncs.formula import compute
    >>> round(compute("=FORECAST.LINEAR(30, {6,7,9,15,21}, {20,28,31,38,40})"), 6)
    10.607253
    """
    p = _pairs(known_y, known_x)
    if type(p) is CellError:
        return p
    slope = _slope(*p)
    if type(slope) is CellError:
        return slope
    b = _intercept(*p)
    return numeric(lambda v: b + slope * v)(x)


for _name in ("FORECAST.LINEAR", "FORECAST"):
    builtin(_name, 3, arrays=(1, 2))(_forecast)
