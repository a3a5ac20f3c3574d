"""IAPWS-95 for the fluid water beyond IF97's range, on IF97's reference state.

IF97 covers 273.15 K to 1073.15 K up to 100 MPa and 1073.15 K to 2273.15 K up to 50 MPa.
IAPWS-95 (IAPWS R6-95(2018), Sec. 6.3.1) is valid in the stable fluid from the melting line
to 1273 K up to 1000 MPa; the water model takes the fluid states of that range that IF97 does
not cover from it: the compressed liquid and the dense fluid above 100 MPa, and above
1073.15 K the fluid above 50 MPa. Its coefficients are the pack's copy in
``cellfuncs/data/equations/water.toml``, evaluated by :mod:`..helmholtz.equation`; the range
is read from the same file.

Reference state: both formulations set u = 0 and s = 0 for the saturated liquid at the
triple point, IF97 to within its fit. IAPWS-95's energies are shifted by the constants
:func:`shift` that make its h and s equal IF97 region 1's there, so the enthalpies, entropies
and chemical potentials the two give meet at their boundaries as the formulations do (the
shift is -1e-6 J/kg and -6e-5 J/(kg K); tests/test_water_iapws95.py measures the jumps at the
boundaries: density within 2.4e-4, enthalpy within 0.41 kJ/kg, Gibbs energy within 0.1 kJ/kg).

Density: every state taken from here lies above 50 MPa, far above the critical pressure.
Below the critical temperature the root is on the liquid branch, where the isotherm rises
and is convex (tests/test_water_iapws95.py checks it over the range), so Newton steps from
a density above every root of the range come down onto it without overshooting, never
entering the two-phase region, where IAPWS-95's isotherms swing through pressures of
1e20 Pa at the lowest temperatures. Above it the isotherm rises everywhere.

>>> round(float(density(300.0, 700.004704e6)), 3)   # kg/m3; IAPWS R6-95(2018), Table 7 (from memory)
1188.202
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike

from ... import units
from ...data import constant
from ..helmholtz import density as branch_density
from ..helmholtz.equation import HelmholtzEquation, equation
from ..props import Props
from . import if97

_KEY = "water"  # cellfuncs/data/equations/water.toml
_FILE = f"equations/{_KEY}"
_TRIPLE = "water/water"


def _si(key: str, si: str) -> float:
    """A constant of the equation's data file in SI, read without building the equation."""
    c = constant(_FILE, key)
    return float(units.conversion_to(c.unit, si).to_si(c.value))


T_MAX = _si("maximum_temperature", "K")  # 1273 K
P_MAX = _si("maximum_pressure", "Pa")  # 1000 MPa

# Reduced density above every liquid of the range: 1449 kg/m3, where the isotherm at the lowest
# temperature already stands at 2.6 GPa, well above the range's top pressure
_DELTA_TOP = 4.5
# below the ideal gas's density by this factor no root of a supercritical isotherm lies
_IDEAL_FACTOR = 20.0


@lru_cache(maxsize=None)
def _equation() -> HelmholtzEquation:
    return equation(_KEY)


def density(T: ArrayLike, p: ArrayLike) -> np.ndarray:
    """Density in kg/m3 at ``T`` (K) and ``p`` (Pa), for the dense states of the module docstring
    (p well above the critical pressure); NaN where no root is found."""
    eq = _equation()
    T, p = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(p, dtype=float))
    top = np.full(T.shape, _DELTA_TOP)
    # Newton from the top stays on the convex liquid branch below Tc; lo only closes the bracket
    ideal = p / (eq.R * T * eq.rhoc)
    lo = np.where(T < eq.Tc, 1.0, ideal / _IDEAL_FACTOR)
    return branch_density.solve(eq, T, p, top, lo, top) * eq.M


@lru_cache(maxsize=None)
def shift() -> tuple[float, float]:
    """(dh in J/kg, ds in J/(kg K)): added to IAPWS-95's h and s, they equal IF97 region 1's for the
    saturated liquid at the triple point."""
    eq = _equation()
    T = np.array(constant(_TRIPLE, "triple_point_temperature").value)
    p = np.array(constant(_TRIPLE, "triple_point_pressure").value)
    ref = if97.region1(T, p, ("v", "h", "s"))
    # the IF97 liquid density is within 1e-5 of IAPWS-95's: a bracket of 1e-3 holds the liquid root
    delta = 1.0 / (float(ref.v) * eq.M * eq.rhoc)
    rho = branch_density.solve(eq, T, p, np.array(delta), np.array(delta * (1 - 1e-3)), np.array(delta * (1 + 1e-3)))
    state = eq.state(T, rho)
    return float(ref.h - state.h / eq.M), float(ref.s - state.s / eq.M)


def properties_rho(rho: ArrayLike, T: ArrayLike) -> Props:
    """Specific properties (SI, per kg, IF97's reference state) at density ``rho`` (kg/m3) and ``T`` (K):
    every field from one evaluation of the equation. No range check here (the water model makes them)."""
    eq = _equation()
    rho, T = np.broadcast_arrays(np.asarray(rho, dtype=float), np.asarray(T, dtype=float))
    state = eq.state(T, rho / eq.M)
    dh, ds = shift()
    return Props(v=1.0 / rho, h=state.h / eq.M + dh, s=state.s / eq.M + ds, g=state.g / eq.M + dh - T * ds,
                 cp=state.cp / eq.M, alpha=state.alpha, kappa=state.kappa)
