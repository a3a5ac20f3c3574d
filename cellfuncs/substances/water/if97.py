"""IAPWS-IF97 (IAPWS R7-97(2012)) regions 1, 2 and 5: water as a function of (T, p).

All three regions are fundamental equations for the dimensionless specific Gibbs
energy gamma(pi, tau) = g / (R T), with pi = p/p* and tau = T*/T. Each region only
supplies gamma and its first and second derivatives; one shared routine turns them
into :class:`~cellfuncs.substances.props.Props`. Inputs are in K and Pa, outputs
per kilogram in SI units; T and p broadcast against each other.

The functions do not check the validity ranges (the water model does); the limits
are the module constants below, read from ``cellfuncs/data/water/if97.toml``.

>>> round(float(region1(300.0, 3e6).v) * 1e3, 9)  # L/kg
1.00215168
"""

from __future__ import annotations

import threading
from collections.abc import Iterable
from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike

from cellfuncs.data import constant, table
from cellfuncs.substances.props import Props
from cellfuncs.substances.result import single
from cellfuncs.substances.water.blocks import in_blocks

_DATA = "water/if97"

R = constant(_DATA, "gas_constant").value  # J/(kg K)

T_MIN = constant(_DATA, "t_min").value  # 273.15 K, lowest T of regions 1 and 2
REGION1_T_MAX = constant(_DATA, "t_13").value  # 623.15 K, region 1 / region 3 boundary
REGION2_T_MAX = constant(_DATA, "t_25").value  # 1073.15 K
REGION5_T_MIN = REGION2_T_MAX  # 1073.15 K
REGION5_T_MAX = constant(_DATA, "t_max").value  # 2273.15 K
P_MAX = constant(_DATA, "p_max").value  # 100 MPa, regions 1 and 2
REGION5_P_MAX = constant(_DATA, "region5_p_max").value  # 50 MPa

# The derivatives a Gibbs function supplies, by name, with their orders in (x, y).
_ORDERS = {"g": (0, 0), "gx": (1, 0), "gxx": (2, 0), "gy": (0, 1), "gyy": (0, 2), "gxy": (1, 1)}
# Which of gamma's derivatives in (pi, tau) each field of Props needs (R7-97(2012), Table 3).
_NEEDS = {"v": ("pi",), "h": ("tau",), "s": ("g", "tau"), "g": ("g",), "cp": ("tautau",),
          "alpha": ("pi", "pitau"), "kappa": ("pi", "pipi")}
# Elements evaluated at a time: one block's powers and monomials (about 200 kB) stay in cache
# (measured on a 2-core machine: 512 about 1.3 times faster per element than 2048 and 4 times
# faster than 4096), and the memory a call needs does not grow with its size beyond its inputs
# and outputs.
_BLOCK = 512
# The series' derivative in (x, y) behind each derivative of gamma in (pi, tau): every region's
# series runs in x = pi (region 1: 7.1 - pi) and y = tau (shifted).
_SERIES_NAME = {"g": "g", "pi": "gx", "pipi": "gxx", "tau": "gy", "tautau": "gyy", "pitau": "gxy"}


def _falling(e: float, k: int) -> float:
    """e (e-1) ... (e-k+1): the factor d^k/dx^k x^e brings down."""
    out = 1.0
    for i in range(k):
        out *= e - i
    return out


def _derivatives_needed(fields: Iterable[str] | None) -> tuple[tuple[str, ...], tuple[str, ...], tuple[str, ...]]:
    """The derivatives of gamma in (pi, tau) that the Props ``fields`` need (None: every field), the
    series' derivatives behind them (``_SERIES_NAME``), and those of an ideal-gas part in tau alone."""
    # a call's fields come as a tuple (looked up as they are) or a set (sorted into one)
    return _derivatives_of(Props._fields if fields is None else fields if type(fields) is tuple
                           else tuple(sorted(fields)))


@lru_cache(maxsize=None)
def _derivatives_of(fields: tuple[str, ...]) -> tuple[tuple[str, ...], tuple[str, ...], tuple[str, ...]]:
    names = tuple(dict.fromkeys(d for name in sorted(fields) for d in _NEEDS[name]))
    return (names, tuple(_SERIES_NAME[n] for n in names),
            tuple(_SERIES_NAME[n] for n in names if n in ("g", "tau", "tautau")))


class _PowerSeries:
    """sum_i n_i x^I_i y^J_i and its derivatives up to second order, on whole arrays.

    Each derivative is again a sum of monomials x^a y^b; its own (nonzero) terms are gathered once
    here. A call computes only the derivatives it names, block by block: the distinct powers of x
    and of y once per block, the named derivatives' monomials by one product, and each derivative's
    pairwise sum (``_fold``). Every element goes through the same arithmetic
    in the same order whatever the array around it, so a scalar and the same value inside an array
    agree to the last bit, and a derivative does not depend on which others are asked for. Terms with
    a zero factor are dropped, which keeps x = 0 or y = 0 finite wherever the series is.
    """

    def __init__(self, I: np.ndarray, J: np.ndarray, n: np.ndarray):
        self._terms: dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}
        for name, (a, b) in _ORDERS.items():
            terms: dict[tuple[float, float], float] = {}
            for i, j, c in zip(I, J, n):
                coef = c * _falling(i, a) * _falling(j, b)
                if coef != 0.0:
                    terms[(i - a, j - b)] = terms.get((i - a, j - b), 0.0) + coef
            ex, ey = (np.array([k[axis] for k in terms], dtype=float) for axis in (0, 1))
            self._terms[name] = (ex, ey, np.array(list(terms.values())))
        self._plans: dict[tuple[str, ...], tuple] = {}
        self._work = threading.local()  # per thread: each request's buffer for one element (see _one)

    def _plan(self, names: tuple[str, ...]) -> tuple:
        """For the derivatives ``names``: the distinct powers of x and y, and which of them each
        monomial takes, with its coefficient; one row of monomials per term position, one column per
        derivative, each derivative as wide as the series' longest, padded with zero terms (x^0 y^0
        times 0: exactly 0 wherever x and y are). One width for every request keeps a derivative's sum
        the same whichever others are asked for with it. Last, for one element (``_one``), each
        monomial's own exponents of x and y and its coefficient, in the same order."""
        plan = self._plans.get(names)
        if plan is None:
            width = max(terms[2].size for terms in self._terms.values())
            # position-major: the fold adds whole rows of every derivative at once
            ex, ey, coefs = (np.stack([np.pad(self._terms[d][k], (0, width - self._terms[d][k].size))
                                       for d in names], axis=1).reshape(-1) for k in range(3))
            x_powers, ix = np.unique(ex, return_inverse=True)
            y_powers, iy = np.unique(ey, return_inverse=True)
            plan = self._plans[names] = (x_powers[:, None], y_powers[:, None], ix, iy, coefs[:, None],
                                         (width, len(names), -1), _fold_steps(width), x_powers[ix], y_powers[iy],
                                         coefs)
        return plan

    def __call__(self, x: np.ndarray, y: np.ndarray, names: tuple[str, ...]) -> dict[str, np.ndarray]:
        """The derivatives ``names`` (keys of ``_ORDERS``) at (x, y), broadcast against each other."""
        if not names:
            return {}
        if x.ndim == 0 and y.ndim == 0:
            return self._one(x, y, names)
        x_powers, y_powers, ix, iy, coefs, layout, steps = self._plan(names)[:7]

        def block(xb: np.ndarray, yb: np.ndarray) -> np.ndarray:
            # one row per monomial, one column per element
            terms = np.power(xb, x_powers).take(ix, axis=0)
            terms *= np.power(yb, y_powers).take(iy, axis=0)
            terms *= coefs
            return _fold(terms.reshape(layout), steps)

        return dict(zip(names, in_blocks(block, x, y, block=_BLOCK)))

    def _one(self, x: np.ndarray, y: np.ndarray, names: tuple[str, ...]) -> dict[str, np.ndarray]:
        """The derivatives at one element, as numpy scalars: a block's arithmetic (each monomial's powers
        as the block takes them, the same products, the same fold) on a work buffer of this thread, whose
        rows the fold adds through views made once rather than sliced on every call."""
        work = self._work.__dict__.get(names)
        if work is None:
            plan = self._plan(names)
            steps, k = plan[6], len(names)
            buffer = np.empty(plan[9].size)
            views = tuple((buffer[first.start * k:first.stop * k], buffer[second.start * k:second.stop * k])
                          for first, second in steps)
            work = self._work.__dict__[names] = (buffer, views, buffer[-k:], *plan[7:])
        buffer, views, last, x_exponents, y_exponents, coefs = work
        np.power(x, x_exponents, out=buffer)
        buffer *= np.power(y, y_exponents)
        buffer *= coefs
        for first, second in views:
            np.add(second, first, second)
        return dict(zip(names, last))  # iterating the row copies its values out


def _fold_steps(rows: int) -> tuple[tuple[slice, slice], ...]:
    """The rounds of :func:`_fold` for ``rows`` rows: in each, the rows to add and the rows they are
    added to (which then hold the sums)."""
    steps, start = [], 0
    while rows > 1:
        half = rows // 2
        steps.append((slice(start, start + half), slice(start + half, start + 2 * half)))
        start, rows = start + half, rows - half
    return tuple(steps)


def _fold(terms: np.ndarray, steps: tuple[tuple[slice, slice], ...]) -> np.ndarray:
    """Sums over the first axis of ``terms`` by halves: the first half's rows plus the second's, until
    one row is left (an odd row is carried to the next round); ``terms`` is overwritten.

    Each round stores its sums over the second half's rows, so the rows left (those sums, then the odd
    row) stay contiguous and a round is one addition (``steps``: :func:`_fold_steps`). Only element-wise
    additions in a pattern fixed by the number of rows (not a BLAS product or a reduction, whose order
    numpy may choose by shape), so every element adds its terms in the same order whatever the array
    around it and a scalar and the same value inside an array agree to the last bit; vectorised across
    the elements, and pairwise, which rounds less than one by one.
    """
    for first, second in steps:
        sums = terms[second]
        sums += terms[first]
    return terms[-1]


# Each field of Props from (T, p, pi, tau, RT) and gamma's derivatives d (IAPWS R7-97(2012), Tables 3, 12, 39)
_FORMULAS = {
    "v": lambda T, p, pi, tau, rt, d: rt * pi * d["pi"] / p,
    "h": lambda T, p, pi, tau, rt, d: rt * tau * d["tau"],
    "s": lambda T, p, pi, tau, rt, d: R * (tau * d["tau"] - d["g"]),
    "g": lambda T, p, pi, tau, rt, d: rt * d["g"],  # g = RT gamma is h - Ts without the cancellation
    "cp": lambda T, p, pi, tau, rt, d: -R * tau * tau * d["tautau"],
    "alpha": lambda T, p, pi, tau, rt, d: (1.0 - tau * d["pitau"] / d["pi"]) / T,
    "kappa": lambda T, p, pi, tau, rt, d: -pi * d["pipi"] / (d["pi"] * p),
}


_NAN = np.array(np.nan)
_NAN.flags.writeable = False


def _gibbs_props(T: np.ndarray, p: np.ndarray, pi: np.ndarray, tau: np.ndarray, d: dict[str, np.ndarray],
                 fields: Iterable[str] | None) -> Props:
    """Props from gamma = g/(RT) and its derivatives ``d`` in (pi, tau), keyed "g", "pi", "pipi", "tau",
    "tautau", "pitau"; fields not asked for are NaN."""
    rt = R * T
    if fields is None:
        return Props._make([np.asarray(_FORMULAS[name](T, p, pi, tau, rt, d)) for name in Props._fields])
    shape = T.shape if T.shape == p.shape else np.broadcast_shapes(T.shape, p.shape)
    # one read-only view for the rest (a single value: one read-only NaN, without the view's machinery)
    missing = np.broadcast_to(np.nan, shape) if shape else _NAN
    return Props._make([np.asarray(_FORMULAS[name](T, p, pi, tau, rt, d)) if name in fields else missing
                        for name in Props._fields])


def _reduced(T: ArrayLike, p: ArrayLike, t_star: float, p_star: float):
    # a single value as its numpy scalar: the same arithmetic without building a 0-d array per step
    T = single(np.asarray(T, dtype=float))
    p = single(np.asarray(p, dtype=float))
    return T, p, p / p_star, t_star / T


_R1 = table(_DATA, "region1")
_R1_SERIES = _PowerSeries(_R1["I"], _R1["J"], _R1["n"])
_R1_P = constant(_DATA, "region1_reducing_pressure").value
_R1_T = constant(_DATA, "region1_reducing_temperature").value
_R1_PI_SHIFT, _R1_TAU_SHIFT = _R1["pi_shift"], _R1["tau_shift"]


def region1(T: ArrayLike, p: ArrayLike, fields: Iterable[str] | None = None) -> Props:
    """Compressed liquid, IAPWS R7-97(2012) region 1, eq. (7) with Table 2.

    Valid for 273.15 K <= T <= 623.15 K and psat(T) <= p <= 100 MPa
    (``T_MIN``, ``REGION1_T_MAX``, ``P_MAX``); not checked here. ``fields`` names the
    Props fields to compute (None: all); the others are NaN.

    >>> r = region1(300.0, 3e6)
    >>> round(float(r.h), 3), round(float(r.cp), 4)
    (115331.273, 4173.0122)
    """
    T, p, pi, tau = _reduced(T, p, _R1_T, _R1_P)
    # gamma is a series in x = 7.1 - pi and y = tau - 1.222: d/dpi flips the sign
    names, series_names, _ = _derivatives_needed(fields)
    series = _R1_SERIES(_R1_PI_SHIFT - pi, tau - _R1_TAU_SHIFT, series_names)
    d = {n: (-series[x] if n in ("pi", "pitau") else series[x]) for n, x in zip(names, series_names)}
    return _gibbs_props(T, p, pi, tau, d, fields)


class _GasRegion:
    """A region whose gamma is ln(pi) + sum n0 tau^J0 (ideal gas) + a residual series.

    The residual series runs in pi and (tau - tau_shift).
    """

    def __init__(self, ideal: str, residual: str, reducing: str, ideal_changes: str | None = None):
        i0, ir = table(_DATA, ideal), table(_DATA, residual)
        n0 = i0["n0"].copy()
        if ideal_changes is not None:  # a variant that replaces some of another region's ideal-gas terms
            changes = table(_DATA, ideal_changes)
            for j0, value in zip(changes["J0"], changes["n0"]):
                n0[np.flatnonzero(i0["J0"] == j0)[0]] = value
        self._ideal = _PowerSeries(np.zeros_like(i0["J0"]), i0["J0"], n0)
        self._residual = _PowerSeries(ir["I"], ir["J"], ir["n"])
        self._tau_shift = ir.get("tau_shift", 0.0)
        self._p_star = constant(_DATA, f"{reducing}_reducing_pressure").value
        self._t_star = constant(_DATA, f"{reducing}_reducing_temperature").value

    def __call__(self, T: ArrayLike, p: ArrayLike, fields: Iterable[str] | None) -> Props:
        T, p, pi, tau = _reduced(T, p, self._t_star, self._p_star)
        names, series_names, ideal_names = _derivatives_needed(fields)
        r = self._residual(pi, tau - self._tau_shift, series_names)
        # the ideal-gas part is a series in tau alone: it adds to gamma and its tau derivatives only
        i = self._ideal(pi, tau, ideal_names)
        inv_pi = 1.0 / pi
        return _gibbs_props(T, p, pi, tau, {n: _GAS_COMBINED[n](r, i, pi, inv_pi) for n in names}, fields)


# gamma's derivatives in (pi, tau) of a gas region from its residual series r, its ideal-gas series i
# (tau alone) and the ideal gas's ln(pi), whose pi derivatives are 1/pi and -1/pi^2
_GAS_COMBINED = {
    "g": lambda r, i, pi, inv_pi: r["g"] + i["g"] + np.log(pi),
    "pi": lambda r, i, pi, inv_pi: r["gx"] + inv_pi,
    "pipi": lambda r, i, pi, inv_pi: r["gxx"] - inv_pi * inv_pi,
    "tau": lambda r, i, pi, inv_pi: r["gy"] + i["gy"],
    "tautau": lambda r, i, pi, inv_pi: r["gyy"] + i["gyy"],
    "pitau": lambda r, i, pi, inv_pi: r["gxy"],
}


_REGION2 = _GasRegion("region2_ideal", "region2_residual", "region2")
_REGION2_METASTABLE = _GasRegion("region2_ideal", "region2_metastable_residual", "region2",
                                 ideal_changes="region2_metastable_ideal")
_REGION5 = _GasRegion("region5_ideal", "region5_residual", "region5")


def region2(T: ArrayLike, p: ArrayLike, fields: Iterable[str] | None = None) -> Props:
    """Superheated vapour, IAPWS R7-97(2012) region 2, eqs. (15)-(17) with Tables 10 and 11.

    Valid for 0 < p and 273.15 K <= T <= 1073.15 K, with p <= psat(T) up to
    623.15 K, p <= pB23(T) from 623.15 K to 863.15 K and p <= 100 MPa above
    (``T_MIN``, ``REGION2_T_MAX``, ``P_MAX``); not checked here.

    >>> r = region2(700.0, 30e6)
    >>> round(float(r.v), 10), round(float(r.s), 4)
    (0.0054294662, 5175.403)
    """
    return _REGION2(T, p, fields)


def region2_metastable(T: ArrayLike, p: ArrayLike, fields: Iterable[str] | None = None) -> Props:
    """Metastable (supersaturated) vapour, IAPWS R7-97(2012) Sec. 6.2, eqs. (18)-(19) with Table 16.

    Valid from the saturated-vapour line to the 5 % equilibrium moisture line, from the triple-point
    pressure to 10 MPa; not checked here.

    >>> round(float(region2_metastable(450.0, 1e6).v), 9)
    0.19251654
    """
    return _REGION2_METASTABLE(T, p, fields)


def region5(T: ArrayLike, p: ArrayLike, fields: Iterable[str] | None = None) -> Props:
    """High-temperature steam, IAPWS R7-97(2012) region 5, eqs. (32)-(34) with Tables 37 and 38.

    Valid for 1073.15 K <= T <= 2273.15 K and 0 < p <= 50 MPa
    (``REGION5_T_MIN``, ``REGION5_T_MAX``, ``REGION5_P_MAX``); not checked here.

    >>> r = region5(1500.0, 0.5e6)
    >>> round(float(r.v), 8), round(float(r.h), 2)
    (1.3845509, 5219768.55)
    """
    return _REGION5(T, p, fields)
