"""A fundamental equation of state a(T, rho), read from its data file, and the properties it gives.

Data files live in ``cellfuncs/data/equations/<substance>.toml``; their format is written down
once, in :mod:`cellfuncs.substances.helmholtz.schema`. Everything here is molar and SI:
T in K, rho in mol/m3, p in Pa, energies in J/mol.

>>> eq = equation("carbon-dioxide")
>>> round(float(eq.state(304.1282, 10624.9).p) / 1e6, 4)   # the critical point, rho_c = 467.6 kg/m3
7.3773
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

from ... import data
from . import schema
from .terms import DERIVATIVES, DensityTerms, IdealTerms, evaluate


class _Derivatives:
    """Expansivity and compressibility from (dp/dT)_rho and (dp/drho)_T, for State and Mechanical."""

    rho: np.ndarray
    dp_drho: np.ndarray
    dp_dT: np.ndarray

    @property
    def alpha(self) -> np.ndarray:
        """Cubic expansivity (1/v)(dv/dT)_p."""
        return self.dp_dT / (self.rho * self.dp_drho)

    @property
    def kappa(self) -> np.ndarray:
        """Isothermal compressibility -(1/v)(dv/dp)_T."""
        return 1.0 / (self.rho * self.dp_drho)


@dataclass(frozen=True)
class State(_Derivatives):
    """Molar properties at (T, rho); every field is an array of the broadcast shape."""

    T: np.ndarray  # K
    rho: np.ndarray  # mol/m3
    p: np.ndarray  # Pa
    u: np.ndarray  # J/mol, on the equation's own reference state
    h: np.ndarray  # J/mol
    s: np.ndarray  # J/(mol K)
    g: np.ndarray  # J/mol
    cv: np.ndarray  # J/(mol K)
    cp: np.ndarray  # J/(mol K)
    w: np.ndarray  # m/s
    dp_drho: np.ndarray  # (dp/drho)_T, Pa m3/mol
    dp_dT: np.ndarray  # (dp/dT)_rho, Pa/K
    g_density: np.ndarray  # J/mol: g - g_ideal_gas(T, rho) = RT (alphar + delta alphar_delta)

    @property
    def v(self) -> np.ndarray:
        return 1.0 / self.rho


@dataclass(frozen=True)
class Mechanical(_Derivatives):
    """The residual-only properties at (T, rho): pressure, its derivatives, the residual Gibbs energy."""

    p: np.ndarray  # Pa
    dp_drho: np.ndarray  # Pa m3/mol
    dp_dT: np.ndarray  # Pa/K
    g_density: np.ndarray  # J/mol: g - g_ideal_gas(T, rho) = RT (alphar + delta alphar_delta)
    rho: np.ndarray  # mol/m3


class Isotherm:
    """p and (dp/drho)_T at fixed temperatures (one per state, a 1-d array), density by density: what
    the density solver iterates on. This one asks the equation each time; an equation's own (below)
    keeps what depends on temperature alone."""

    def __init__(self, eq: "HelmholtzEquation", T: np.ndarray):
        self.eq, self.T = eq, T

    def pressure(self, rho: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return self.eq.pressure(self.T, rho)

    def take(self, keep: np.ndarray) -> "Isotherm":
        """The isotherms of the states where ``keep`` holds."""
        return Isotherm(self.eq, self.T[keep])


class _TermIsotherm(Isotherm):
    """An equation's isotherms with their terms' temperature factors computed once."""

    def __init__(self, eq: "HelmholtzEquation", T: np.ndarray, factors: tuple | None = None):
        super().__init__(eq, T)
        self._factors = eq._density_terms.factors(eq.Tc / T) if factors is None else factors
        self._rt = eq.R * T

    def pressure(self, rho: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        d, dd = self.eq._density_terms.derivatives(self._factors, rho / self.eq.rhoc)
        return rho * self._rt * (1.0 + d), self._rt * (1.0 + 2.0 * d + dd)

    def take(self, keep: np.ndarray) -> "Isotherm":
        F, tau = self._factors
        return _TermIsotherm(self.eq, self.T[keep], (F[keep], tau[keep]))


class HelmholtzEquation:
    """One published Helmholtz-energy equation: reducing constants, term families, range."""

    # temperatures (K) where the equation's temperature dependence is only piecewise smooth (a mapped
    # equation's spline knots): the phase-equilibrium table puts nodes there (saturation.py)
    knots: tuple[float, ...] = ()

    def __init__(self, key: str):
        raw = data.load(f"equations/{key}")
        spec = schema.read(key, raw)
        self.key = key
        self.title: str = spec.title
        self.reference: str = spec.reference
        self.uncertainty: str = spec.uncertainty
        self.constants = spec.constants
        self.Tc = spec.constants["reducing_temperature"].value
        self.rhoc = spec.constants["reducing_density"].value
        self.R = spec.constants["gas_constant"].value
        self.M = spec.constants["molar_mass"].value
        self.T_min = spec.constants["minimum_temperature"].value
        self.T_max = spec.constants["maximum_temperature"].value
        self.p_max = spec.constants["maximum_pressure"].value
        self._ideal: IdealTerms = spec.ideal
        self._residual = spec.residual
        self._density_terms = DensityTerms(spec.residual)

    # --- the reduced Helmholtz energy ----------------------------------------------------
    def reduced(self, T, rho) -> tuple[dict, dict]:
        """(alpha0, alphar) reduced derivatives at (T, rho), see :mod:`.terms`."""
        tau = self.Tc / np.asarray(T, dtype=float)
        delta = np.asarray(rho, dtype=float) / self.rhoc
        return evaluate((self._ideal,), tau, delta), evaluate(self._residual, tau, delta)

    def residual(self, T, rho, want=DERIVATIVES) -> dict:
        """The residual part alone (the derivatives named in ``want``): all that pressure, density
        solving and phase equilibrium need."""
        tau = self.Tc / np.asarray(T, dtype=float)
        delta = np.asarray(rho, dtype=float) / self.rhoc
        return evaluate(self._residual, tau, delta, want)

    def pressure(self, T, rho) -> tuple[np.ndarray, np.ndarray]:
        """p and (dp/drho)_T at (T, rho)."""
        T = np.asarray(T, dtype=float)
        rho = np.asarray(rho, dtype=float)
        r = self.residual(T, rho, ("d", "dd"))
        rt = self.R * T
        return rho * rt * (1.0 + r["d"]), rt * (1.0 + 2.0 * r["d"] + r["dd"])

    def isotherm(self, T: np.ndarray) -> Isotherm:
        """The isotherms at temperatures ``T`` (a 1-d array) for the density solver."""
        return _TermIsotherm(self, T)

    def mechanical(self, T, rho) -> Mechanical:
        """The properties that need no ideal-gas part: cheaper than :meth:`state`."""
        T = np.asarray(T, dtype=float)
        rho = np.asarray(rho, dtype=float)
        r = self.residual(T, rho, ("a", "d", "dd", "dt"))
        rt = self.R * T
        z = 1.0 + r["d"]
        return Mechanical(p=rho * rt * z, dp_drho=rt * (1.0 + 2.0 * r["d"] + r["dd"]),
                          dp_dT=rho * self.R * (1.0 + r["d"] - r["dt"]),
                          g_density=rt * (r["a"] + r["d"]), rho=rho)

    def state(self, T, rho) -> State:
        """Every property at (T, rho) from the equation's relations (e.g. Span 2000, Table 3.3)."""
        T = np.asarray(T, dtype=float)
        rho = np.asarray(rho, dtype=float)
        i, r = self.reduced(T, rho)
        R = self.R
        rt = R * T
        t_sum = i["t"] + r["t"]
        z = 1.0 + r["d"]
        stiff = 1.0 + 2.0 * r["d"] + r["dd"]  # (dp/drho)_T / (R T)
        cross = 1.0 + r["d"] - r["dt"]  # (dp/dT)_rho / (rho R)
        cv = -R * (i["tt"] + r["tt"])
        cp = cv + R * cross * cross / stiff
        with np.errstate(invalid="ignore"):
            w = np.sqrt(rt / self.M * (stiff + R * cross * cross / cv))
        return State(
            T=T,
            rho=rho,
            p=rho * rt * z,
            u=rt * t_sum,
            h=rt * (t_sum + z),
            s=R * (t_sum - i["a"] - r["a"]),
            g=rt * (i["a"] + r["a"] + z),
            cv=cv,
            cp=cp,
            w=w,
            dp_drho=rt * stiff,
            dp_dT=rho * R * cross,
            g_density=rt * (r["a"] + r["d"]),
        )


@lru_cache(maxsize=None)
def equation_keys() -> frozenset[str]:
    """The substance keys that have an equation data file."""
    folder = resources.files("cellfuncs.data").joinpath("equations")
    return frozenset(p.name[:-5] for p in folder.iterdir() if p.name.endswith(".toml"))


@lru_cache(maxsize=None)
def equation(key: str) -> HelmholtzEquation:
    """The equation of data file ``equations/<key>.toml`` (read once)."""
    return HelmholtzEquation(key)
