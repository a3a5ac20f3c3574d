"""Ice Ih from the Gibbs function of IAPWS R10-06(2009).

Coefficients live in ``cellfuncs/data/water/ice_ih.toml``. The entropy constant
is the release's "IAPWS-95" s0, so g, h and s share the IAPWS-95 reference state
(u = s = 0 for liquid water at the triple point) and can be compared with the
liquid and vapour formulations directly.

Validity (R10-06, section 1): 0 < T <= 273.16 K and 0 < p <= 210 MPa; the
stable ice Ih region lies inside that, below the melting and sublimation lines.
No range checks are made here: callers decide what to do outside.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from cellfuncs.data import constant, table
from cellfuncs.substances.props import Props
from cellfuncs.substances.water.blocks import in_blocks

_DATA = "water/ice_ih"
T_MAX: float = constant(_DATA, "max_temperature").value  # K
P_MAX: float = constant(_DATA, "max_pressure").value  # Pa

_TT = constant(_DATA, "triple_point_temperature").value
_PT = constant(_DATA, "triple_point_pressure").value
_PI0 = constant(_DATA, "normal_pressure").value / _PT

_COEF = table(_DATA, "gibbs")
_G0 = _COEF["g0"]  # g00..g04, J/kg
_S0 = float(_COEF["s0"])
_T12 = _COEF["t"][:, 0] + 1j * _COEF["t"][:, 1]  # t1, t2
_R1 = complex(*_COEF["r1"])
_R2 = _COEF["r2"][:, 0] + 1j * _COEF["r2"][:, 1]  # r20, r21, r22
# Elements evaluated at a time: a call's complex temporaries (a dozen per element and k) stay bounded.
_BLOCK = 512


def _pressure_series(c: np.ndarray, x: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """sum c_k x^k and its first two derivatives in x, by Horner's rule."""
    f = np.zeros_like(x, dtype=c.dtype) + c[-1]
    df = np.zeros_like(f)
    d2f = np.zeros_like(f)
    for ck in c[-2::-1]:
        d2f = d2f * x + 2.0 * df
        df = df * x + f
        f = f * x + ck
    return f, df, d2f


def properties(T: ArrayLike, p: ArrayLike) -> Props:
    """Specific properties of ice Ih at temperature ``T`` (K) and pressure ``p`` (Pa).

    Returns :class:`Props` (per kg, SI) from g and its derivatives:
    v = g_p, h = g - T g_T, s = -g_T, cp = -T g_TT, alpha = g_Tp / g_p,
    kappa = -g_pp / g_p.

    >>> ice = properties(273.16, 611.657)
    >>> round(float(1.0 / ice.v), 6), round(float(ice.cp), 4)
    (916.709492, 2096.7843)
    """
    return Props(*in_blocks(_properties_block, T, p, block=_BLOCK))


def _properties_block(T: np.ndarray, p: np.ndarray) -> Props:
    """The properties at one block of states."""
    tau = (T / _TT)[..., np.newaxis]  # trailing axis runs over k = 1, 2
    dpi = p / _PT - _PI0

    g0, g0_p, g0_pp = _pressure_series(_G0, dpi)
    r2, r2_p, r2_pp = _pressure_series(_R2, dpi)
    r = np.stack(np.broadcast_arrays(_R1, r2), axis=-1)

    t = _T12
    ln_minus = np.log(t - tau)
    ln_plus = np.log(t + tau)
    # the bracket of g and its tau derivatives, per k
    q = (t - tau) * ln_minus + (t + tau) * ln_plus - 2.0 * t * np.log(t) - tau**2 / t
    q_tau = -ln_minus + ln_plus - 2.0 * tau / t
    q_tautau = 1.0 / (t - tau) + 1.0 / (t + tau) - 2.0 / t

    g = g0.real - _S0 * T + _TT * np.sum(r * q, axis=-1).real
    g_T = -_S0 + np.sum(r * q_tau, axis=-1).real
    g_TT = np.sum(r * q_tautau, axis=-1).real / _TT
    # only r2 depends on pressure; d(pi)/dp = 1/pt
    g_p = (g0_p.real + _TT * (r2_p * q[..., 1]).real) / _PT
    g_pp = (g0_pp.real + _TT * (r2_pp * q[..., 1]).real) / _PT**2
    g_Tp = (r2_p * q_tau[..., 1]).real / _PT

    return Props(
        v=g_p,
        h=g - T * g_T,
        s=-g_T,
        g=g,
        cp=-T * g_TT,
        alpha=g_Tp / g_p,
        kappa=-g_pp / g_p,
    )
