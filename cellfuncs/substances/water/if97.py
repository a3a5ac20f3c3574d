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

import numpy as np
from numpy.typing import ArrayLike

from cellfuncs.data import constant, table
from cellfuncs.substances.props import Props

_DATA = "water/if97"

R = constant(_DATA, "gas_constant").value  # J/(kg K)

T_MIN = constant(_DATA, "t_min").value  # 273.15 K, lowest T of regions 1 and 2
REGION1_T_MAX = constant(_DATA, "t_13").value  # 623.15 K, region 1 / region 3 boundary
REGION2_T_MAX = constant(_DATA, "t_25").value  # 1073.15 K
REGION5_T_MIN = REGION2_T_MAX  # 1073.15 K
REGION5_T_MAX = constant(_DATA, "t_max").value  # 2273.15 K
P_MAX = constant(_DATA, "p_max").value  # 100 MPa, regions 1 and 2
REGION5_P_MAX = constant(_DATA, "region5_p_max").value  # 50 MPa

# Derivative orders (in x, in y) of the six quantities a Gibbs function must supply:
# gamma, gamma_pi, gamma_pipi, gamma_tau, gamma_tautau, gamma_pitau.
_ORDERS = ((0, 0), (1, 0), (2, 0), (0, 1), (0, 2), (1, 1))


def _falling(e: float, k: int) -> float:
    """e (e-1) ... (e-k+1): the factor d^k/dx^k x^e brings down."""
    out = 1.0
    for i in range(k):
        out *= e - i
    return out


class _PowerSeries:
    """sum_i n_i x^I_i y^J_i with its derivatives up to second order, on whole arrays.

    Every derivative is again a sum of monomials x^a y^b. All monomials needed by
    the six derivatives are gathered once here, so a call computes each distinct
    power of x and of y once, forms the monomials with one product and reduces
    them with one coefficient matrix. Terms with a zero factor are dropped, which
    keeps x = 0 or y = 0 finite wherever the series is.
    """

    def __init__(self, I: np.ndarray, J: np.ndarray, n: np.ndarray):
        rows: dict[tuple[float, float], int] = {}
        entries = []
        for d, (a, b) in enumerate(_ORDERS):
            for i, j, c in zip(I, J, n):
                coef = c * _falling(i, a) * _falling(j, b)
                if coef != 0.0:
                    row = rows.setdefault((i - a, j - b), len(rows))
                    entries.append((row, d, coef))
        coefs = np.zeros((len(_ORDERS), len(rows)))
        for row, d, coef in entries:
            coefs[d, row] += coef
        ex, ey = np.array(list(rows)).T
        self._x_powers, self._ix = np.unique(ex, return_inverse=True)
        self._y_powers, self._iy = np.unique(ey, return_inverse=True)
        self._coefs = coefs

    def __call__(self, x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, ...]:
        """The six derivatives in the order of ``_ORDERS``."""
        xp = np.power(x[..., None], self._x_powers)
        yp = np.power(y[..., None], self._y_powers)
        monomials = xp.take(self._ix, axis=-1) * yp.take(self._iy, axis=-1)
        # A row-wise sum over a C-ordered array (not a BLAS product, whose kernels
        # differ between vector and matrix shapes) adds in the same order for a 0-d
        # input and for any array, so scalars and arrays agree to the last bit.
        sums = np.multiply(monomials[..., None, :], self._coefs, order="C").sum(axis=-1)
        return sums[..., 0], sums[..., 1], sums[..., 2], sums[..., 3], sums[..., 4], sums[..., 5]


def _gibbs_props(
    T: np.ndarray,
    p: np.ndarray,
    pi: np.ndarray,
    tau: np.ndarray,
    g: np.ndarray,
    g_pi: np.ndarray,
    g_pipi: np.ndarray,
    g_tau: np.ndarray,
    g_tautau: np.ndarray,
    g_pitau: np.ndarray,
) -> Props:
    """Props from gamma = g/(RT) and its derivatives (IAPWS R7-97(2012), Tables 3, 12, 39)."""
    rt = R * T
    v = rt * pi * g_pi / p
    h = rt * tau * g_tau
    s = R * (tau * g_tau - g)
    cp = -R * tau * tau * g_tautau
    alpha = (1.0 - tau * g_pitau / g_pi) / T
    kappa = -pi * g_pipi / (g_pi * p)
    # g = RT gamma is h - Ts without the cancellation of the difference
    return Props(*(np.asarray(q) for q in (v, h, s, rt * g, cp, alpha, kappa)))


def _reduced(T: ArrayLike, p: ArrayLike, t_star: float, p_star: float):
    T = np.asarray(T, dtype=float)
    p = np.asarray(p, dtype=float)
    return T, p, p / p_star, t_star / T


_R1 = table(_DATA, "region1")
_R1_SERIES = _PowerSeries(_R1["I"], _R1["J"], _R1["n"])
_R1_P = constant(_DATA, "region1_reducing_pressure").value
_R1_T = constant(_DATA, "region1_reducing_temperature").value


def region1(T: ArrayLike, p: ArrayLike) -> Props:
    """Compressed liquid, IAPWS R7-97(2012) region 1, eq. (7) with Table 2.

    Valid for 273.15 K <= T <= 623.15 K and psat(T) <= p <= 100 MPa
    (``T_MIN``, ``REGION1_T_MAX``, ``P_MAX``); not checked here.

    >>> r = region1(300.0, 3e6)
    >>> round(float(r.h), 3), round(float(r.cp), 4)
    (115331.273, 4173.0122)
    """
    T, p, pi, tau = _reduced(T, p, _R1_T, _R1_P)
    # gamma is a series in (7.1 - pi) and (tau - 1.222): d/dpi flips the sign
    g, gx, gxx, gy, gyy, gxy = _R1_SERIES(_R1["pi_shift"] - pi, tau - _R1["tau_shift"])
    return _gibbs_props(T, p, pi, tau, g, -gx, gxx, gy, gyy, -gxy)


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

    def __call__(self, T: ArrayLike, p: ArrayLike) -> Props:
        T, p, pi, tau = _reduced(T, p, self._t_star, self._p_star)
        g0, _, _, g0t, g0tt, _ = self._ideal(pi, tau)
        g, gp, gpp, gt, gtt, gpt = self._residual(pi, tau - self._tau_shift)
        inv_pi = 1.0 / pi
        return _gibbs_props(
            T, p, pi, tau, g + g0 + np.log(pi), gp + inv_pi, gpp - inv_pi * inv_pi, gt + g0t, gtt + g0tt, gpt
        )


_REGION2 = _GasRegion("region2_ideal", "region2_residual", "region2")
_REGION2_METASTABLE = _GasRegion("region2_ideal", "region2_metastable_residual", "region2",
                                 ideal_changes="region2_metastable_ideal")
_REGION5 = _GasRegion("region5_ideal", "region5_residual", "region5")


def region2(T: ArrayLike, p: ArrayLike) -> Props:
    """Superheated vapour, IAPWS R7-97(2012) region 2, eqs. (15)-(17) with Tables 10 and 11.

    Valid for 0 < p and 273.15 K <= T <= 1073.15 K, with p <= psat(T) up to
    623.15 K, p <= pB23(T) from 623.15 K to 863.15 K and p <= 100 MPa above
    (``T_MIN``, ``REGION2_T_MAX``, ``P_MAX``); not checked here.

    >>> r = region2(700.0, 30e6)
    >>> round(float(r.v), 10), round(float(r.s), 4)
    (0.0054294662, 5175.403)
    """
    return _REGION2(T, p)


def region2_metastable(T: ArrayLike, p: ArrayLike) -> Props:
    """Metastable (supersaturated) vapour, IAPWS R7-97(2012) Sec. 6.2, eqs. (18)-(19) with Table 16.

    Valid from the saturated-vapour line to the 5 % equilibrium moisture line, from the triple-point
    pressure to 10 MPa; not checked here.

    >>> round(float(region2_metastable(450.0, 1e6).v), 9)
    0.19251654
    """
    return _REGION2_METASTABLE(T, p)


def region5(T: ArrayLike, p: ArrayLike) -> Props:
    """High-temperature steam, IAPWS R7-97(2012) region 5, eqs. (32)-(34) with Tables 37 and 38.

    Valid for 1073.15 K <= T <= 2273.15 K and 0 < p <= 50 MPa
    (``REGION5_T_MIN``, ``REGION5_T_MAX``, ``REGION5_P_MAX``); not checked here.

    >>> r = region5(1500.0, 0.5e6)
    >>> round(float(r.v), 8), round(float(r.h), 2)
    (1.3845509, 5219768.55)
    """
    return _REGION5(T, p)
