"""IAPWS-IF97 region 3: water near and above the critical point, as a function of (rho, T).

Region 3 is given by the dimensionless Helmholtz energy (IAPWS R7-97(2012), eq. 28)

    phi(delta, tau) = n1 ln(delta) + sum_i n_i delta^I_i tau^J_i,   delta = rho/rho*, tau = T*/T,

so properties follow directly from (rho, T); states given by (T, p) need the density,
found by :func:`density` on a chosen branch. The validity range is T_MIN <= T <= T_MAX,
p from the B23 line up to P_MAX (below the critical temperature the saturation line splits
it into liquid and vapour); nothing here checks it, the water model decides where region 3
applies.

>>> p = pressure_rho(500.0, 650.0)
>>> round(float(p) / 1e6, 7)
25.5837018
>>> round(float(density(650.0, p, "liquid")), 9)
500.0
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np
from numpy.typing import ArrayLike

from cellfuncs.data import constant, table
from cellfuncs.numerics import solve_bracketed
from cellfuncs.substances.props import Props
from cellfuncs.substances.result import BAD_ARGUMENT, ModelError
from cellfuncs.substances.water.blocks import in_blocks

_DATA = "water/if97_region3"
_TABLE = table(_DATA, "region3")
_N1 = float(_TABLE["n1"])
_I = _TABLE["I"].astype(int)
_J = _TABLE["J"].astype(int)
_N = _TABLE["n"]
# eq. (28) reduces by the critical point and uses the gas constant of eq. (1)
RHO_STAR = constant("water/water", "critical_density").value  # kg/m3
T_STAR = constant("water/water", "critical_temperature").value  # K
R = constant("water/if97", "gas_constant").value  # J/(kg K)

# Validity range of region 3 (IAPWS R7-97(2012), section 4; the water model enforces it, not this module):
# from the region 1 boundary to the top of the B23 line, up to the highest pressure of regions 1 to 3.
T_MIN = constant("water/if97", "t_13").value  # K
T_MAX = constant("water/if97", "t_b23_max").value  # K
P_MAX = constant("water/if97", "p_max").value  # Pa

# Density span scanned by density(). Region 3 reaches from 113.6 kg/m3 (vapour at 623.15 K on
# the B23 line) to 762.4 kg/m3 (623.15 K, 100 MPa); the span adds margin on both sides and stays
# below 824 kg/m3, where the equation's 863 K isotherm turns over (near 320 MPa, far outside
# region 3). Above the critical temperature every isotherm rises monotonically across the span.
RHO_SCAN_MIN = 80.0  # kg/m3
RHO_SCAN_MAX = 800.0  # kg/m3
# Scan nodes: every 2 kg/m3 across the span, plus nodes at rho* +- 0.005 * 1.1**k kg/m3
# (k = 0..94, out to 39 kg/m3), so near rho* (where the roots of near-critical isotherms
# crowd together) each cell is narrower than a tenth of its distance from rho*. No node is in
# both sets; sorted rather than np.union1d, whose check for masked arrays imports numpy.ma (some
# 10 ms of every start).
_RHO_GRID = np.sort(np.concatenate([
    np.linspace(RHO_SCAN_MIN, RHO_SCAN_MAX, 361),
    RHO_STAR + np.outer([-1.0, 1.0], 0.005 * 1.1 ** np.arange(95)).ravel(),
]))
_BRANCHES = ("liquid", "vapour")
# Elements scanned at a time: a block's isotherms on the grid (64 x 551 nodes, about 280 kB a
# temporary) stay in cache, and a call's memory does not grow with its size beyond a few arrays.
_SCAN_BLOCK = 64
# Elements whose properties are summed at a time (each has one array of the 40 terms per sum).
_BLOCK = 512

# delta*phi_delta = sum_k c_k delta^k (k = 0..11) with c_0 = n1 and c_k = k * (sum of n tau^J over
# the terms with I = k). The table lists the terms by ascending I with every I from 0 to 11
# present, so each c_k sums one contiguous group starting at these indices.
_GROUP_STARTS = np.flatnonzero(np.diff(_I, prepend=-1))
_POWERS = _I[_GROUP_STARTS]
assert np.array_equal(_POWERS, np.arange(_I.max() + 1)), "region-3 table must list I = 0..11 in order"


def _reduced_pressure_coefficients(tau: np.ndarray) -> np.ndarray:
    """The c_k of delta*phi_delta at ``tau``, shape (..., 12).

    Summed with reduceat rather than a matrix product so every element adds its terms
    in the same order (scalar and array calls agree to the last bit).
    """
    group_sums = np.add.reduceat(_N * tau[..., None] ** _J, _GROUP_STARTS, axis=-1)
    return _POWERS * group_sums + np.where(_POWERS == 0, _N1, 0.0)


def _pressure(rho: np.ndarray, T: np.ndarray, coef: np.ndarray) -> np.ndarray:
    """p = rho R T delta*phi_delta, the polynomial evaluated by Horner's rule.

    ``coef`` has the shape of ``rho`` plus a trailing axis (broadcast against it).
    """
    delta = rho / RHO_STAR
    acc = coef[..., -1]
    for k in range(coef.shape[-1] - 2, -1, -1):
        acc = acc * delta + coef[..., k]
    return rho * R * T * acc


def pressure_rho(rho: ArrayLike, T: ArrayLike) -> np.ndarray:
    """Pressure in Pa at density ``rho`` (kg/m3) and temperature ``T`` (K), IF97 eq. (28).

    >>> round(float(pressure_rho(200.0, 650.0)) / 1e6, 7)
    22.2930643
    """
    rho, T = np.broadcast_arrays(np.asarray(rho, dtype=float), np.asarray(T, dtype=float))
    coef = _reduced_pressure_coefficients(T_STAR / T)
    return _pressure(rho, T, coef)


# The sums of the terms n delta^I tau^J each field of Props needs (Table 31's relations below): phi,
# delta*phi_delta ("d"), delta^2*phi_deltadelta ("dd"), tau*phi_tau ("t"), tau^2*phi_tautau ("tt")
# and delta*tau*phi_deltatau ("dt"); v = 1/rho needs none.
_NEEDS = {"v": (), "h": ("t", "d"), "s": ("t", "phi"), "g": ("t", "d", "phi"), "cp": ("tt", "d", "dt", "dd"),
          "alpha": ("d", "dt", "dd"), "kappa": ("d", "dd")}


def properties_rho(rho: ArrayLike, T: ArrayLike, fields: Iterable[str] | None = None) -> Props:
    """Specific properties (SI, per kg) at density ``rho`` (kg/m3) and temperature ``T`` (K).

    Uses the relations of IAPWS R7-97(2012), Table 31, with the Helmholtz derivatives
    written as delta*phi_delta, delta^2*phi_deltadelta, tau*phi_tau, tau^2*phi_tautau and
    delta*tau*phi_deltatau (each term n delta^I tau^J times I, I(I-1), J, J(J-1), I*J).
    ``fields`` names the Props fields to compute (None: all); the others are NaN.

    >>> pr = properties_rho(500.0, 750.0)
    >>> round(float(pr.h) / 1e3, 5), round(float(pr.cp) / 1e3, 8)
    (2258.68845, 6.34165359)
    """
    names = Props._fields if fields is None else tuple(name for name in Props._fields if name in fields)
    values = dict(zip(names, in_blocks(lambda r, t: _properties_block(r, t, names), rho, T, block=_BLOCK)))
    missing = np.broadcast_to(np.nan, np.broadcast_shapes(np.shape(rho), np.shape(T)))  # one read-only view for the rest
    return Props(**{name: values.get(name, missing) for name in Props._fields})


def _properties_block(rho: np.ndarray, T: np.ndarray, names: tuple[str, ...]) -> list[np.ndarray]:
    """The fields ``names`` of Props at one block of states, from only the sums they need."""
    needed = tuple(dict.fromkeys(key for name in names for key in _NEEDS[name]))
    sums = _helmholtz_sums(rho, T, needed) if needed else {}
    phi, d_phi_d, d2_phi_dd, t_phi_t, t2_phi_tt, dt_phi_dt = (sums.get(key) for key in ("phi", "d", "dd", "t", "tt", "dt"))

    def kappa() -> np.ndarray:
        return 1.0 / (rho * (R * T * (2.0 * d_phi_d + d2_phi_dd)))  # 1 / (rho (dp/drho)_T)

    formulas = {
        "v": lambda: 1.0 / rho,
        "h": lambda: R * T * (t_phi_t + d_phi_d),
        "s": lambda: R * (t_phi_t - phi),
        "g": lambda: formulas["h"]() - T * formulas["s"](),
        "cp": lambda: R * (-t2_phi_tt + (d_phi_d - dt_phi_dt) ** 2 / (2.0 * d_phi_d + d2_phi_dd)),
        "alpha": lambda: rho * R * (d_phi_d - dt_phi_dt) * kappa(),  # (dp/dT)_rho kappa
        "kappa": kappa,
    }
    return [formulas[name]() for name in names]


def _helmholtz_sums(rho: np.ndarray, T: np.ndarray, keys: tuple[str, ...]) -> dict[str, np.ndarray]:
    """The sums ``keys`` (see ``_NEEDS``) of eq. (28)'s terms and their derivatives at (rho, T)."""
    delta = rho / RHO_STAR
    terms = _N * delta[..., None] ** _I * (T_STAR / T)[..., None] ** _J
    sums = {
        "phi": lambda: _N1 * np.log(delta) + terms.sum(axis=-1),
        "d": lambda: _N1 + (_I * terms).sum(axis=-1),
        "dd": lambda: -_N1 + (_I * (_I - 1) * terms).sum(axis=-1),
        "t": lambda: (_J * terms).sum(axis=-1),
        "tt": lambda: (_J * (_J - 1) * terms).sum(axis=-1),
        "dt": lambda: (_I * _J * terms).sum(axis=-1),
    }
    return {key: sums[key]() for key in keys}


def density(T: ArrayLike, p: ArrayLike, branch: str) -> np.ndarray:
    """Density in kg/m3 of the region-3 state at ``T`` (K) and ``p`` (Pa) on ``branch``.

    Rule: the isotherm p(rho, T) is sampled on a fixed density grid spanning
    RHO_SCAN_MIN..RHO_SCAN_MAX (80..800 kg/m3, region 3 with margin). Each grid cell where
    p(rho, T) - p changes sign holds a root. The ``"liquid"`` branch takes the root of
    highest density, the ``"vapour"`` branch the root of lowest density, and the chosen
    cell is refined with :func:`cellfuncs.numerics.solve_bracketed`. Below the critical
    temperature the equation's van der Waals loop gives up to three roots (vapour-like,
    unstable, liquid-like); where only one root exists (always at T >= 647.096 K, where the
    isotherm rises monotonically) both branches return it. Elements with no root in the
    span come back NaN.

    The grid has 2 kg/m3 cells, narrowed near rho* = 322 kg/m3 to a tenth of their distance
    from it (down to 0.005 kg/m3), so the three roots stay in separate cells at the
    saturation pressure as close to the critical point as they exist. A metastable state
    next to its spinodal, with another root in the same cell, can be missed (below about
    300 Pa above the spinodal pressure); stable states are far from that.

    >>> round(float(density(645.0, 21.5e6, "vapour")), 3), round(float(density(645.0, 21.5e6, "liquid")), 3)
    (220.901, 419.593)
    """
    if branch not in _BRANCHES:
        raise ModelError(BAD_ARGUMENT, f"branch must be one of {_BRANCHES}, not {branch!r}")
    T, p = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(p, dtype=float))
    lo, hi = in_blocks(lambda t, q: _root_cell(t, q, branch), T, p, block=_SCAN_BLOCK)
    coef = _reduced_pressure_coefficients(T_STAR / T)
    return solve_bracketed(lambda rho: _pressure(rho, T, coef) - p, lo, hi, xtol=1e-15)


def _root_cell(T: np.ndarray, p: np.ndarray, branch: str) -> tuple[np.ndarray, np.ndarray]:
    """The ends of the grid cell holding the ``branch`` root at each (T, p) of a block; NaN where
    the isotherm does not cross p inside the grid."""
    coef = _reduced_pressure_coefficients(T_STAR / T)
    # residual on the grid: elements along the leading axis, grid nodes along the last
    above = _pressure(_RHO_GRID, T[..., None], coef[..., None, :]) >= p[..., None]
    crossing = above[..., 1:] != above[..., :-1]
    found = crossing.any(axis=-1)
    if branch == "liquid":
        cell = crossing.shape[-1] - 1 - np.argmax(crossing[..., ::-1], axis=-1)
    else:
        cell = np.argmax(crossing, axis=-1)
    return np.where(found, _RHO_GRID[cell], np.nan), np.where(found, _RHO_GRID[cell + 1], np.nan)
