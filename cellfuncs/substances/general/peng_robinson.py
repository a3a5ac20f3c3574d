"""The Peng-Robinson cubic equation of state, vectorised.

Peng and Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59; the alpha function's
kappa for omega > 0.49 from Robinson and Peng (1978), GPA Research Report RR-28.

>>> pr = PengRobinson(126.192, 3.3958e6, 0.0372)
>>> round(float(pr.volume(273.15, 101325.0, "vapor")) * 1e3, 3)  # nitrogen at 0 degC, 1 atm, L/mol
22.397
"""

from __future__ import annotations

import numpy as np

from ...data import load
from ..constants import R

_SQRT2 = np.sqrt(2.0)
_COEFFICIENTS = load("correlations")["tables"]["peng_robinson"]


class PengRobinson:
    """The equation for one substance from its critical point and acentric factor."""

    def __init__(self, Tc: float, pc: float, omega: float):
        self.Tc, self.pc, self.omega = Tc, pc, omega
        c = _COEFFICIENTS
        self.ac = c["omega_a"] * R**2 * Tc**2 / pc
        self.b = c["omega_b"] * R * Tc / pc
        if omega <= c["omega_split"]:
            k0, k1, k2 = c["kappa"]
            self.kappa = k0 + k1 * omega + k2 * omega**2
        else:
            k0, k1, k2, k3 = c["kappa_heavy"]
            self.kappa = k0 + k1 * omega + k2 * omega**2 + k3 * omega**3

    def _a(self, T):
        root = 1.0 + self.kappa * (1.0 - np.sqrt(T / self.Tc))
        a = self.ac * root**2
        da_dT = -self.ac * self.kappa * root / np.sqrt(T * self.Tc)
        return a, da_dT

    def compressibility(self, T, p, root: str) -> np.ndarray:
        """Z of the vapour-like ("vapor": largest) or liquid-like ("liquid": smallest real) root."""
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        a, _ = self._a(T)
        A = a * p / (R * T) ** 2
        B = self.b * p / (R * T)
        # Z^3 + c2 Z^2 + c1 Z + c0 = 0
        c2 = B - 1.0
        c1 = A - 3.0 * B**2 - 2.0 * B
        c0 = -(A * B - B**2 - B**3)
        q = (3.0 * c1 - c2**2) / 9.0
        r = (9.0 * c2 * c1 - 27.0 * c0 - 2.0 * c2**3) / 54.0
        disc = q**3 + r**2
        with np.errstate(invalid="ignore"):
            sq = np.sqrt(np.maximum(disc, 0.0))
            one = np.cbrt(r + sq) + np.cbrt(r - sq) - c2 / 3.0
            theta = np.arccos(np.clip(r / np.sqrt(np.maximum(-q**3, 1e-300)), -1.0, 1.0))
            k = 0.0 if root == "vapor" else 1.0
            three = 2.0 * np.sqrt(np.maximum(-q, 0.0)) * np.cos((theta + 2.0 * np.pi * k) / 3.0) - c2 / 3.0
        z = np.where(disc > 0, one, three)
        for _ in range(2):  # Newton steps polish the closed form's rounding
            f = ((z + c2) * z + c1) * z + c0
            df = (3.0 * z + 2.0 * c2) * z + c1
            z = z - np.where(df != 0, f / df, 0.0)
        return z

    def volume(self, T, p, root: str) -> np.ndarray:
        return self.compressibility(T, p, root) * R * np.asarray(T, float) / np.asarray(p, float)

    def ln_fugacity_coefficient(self, T, p, z) -> np.ndarray:
        a, _ = self._a(np.asarray(T, float))
        A = a * p / (R * T) ** 2
        B = self.b * p / (R * T)
        return z - 1.0 - np.log(z - B) - A / (2.0 * _SQRT2 * B) * np.log((z + (1 + _SQRT2) * B) / (z + (1 - _SQRT2) * B))

    def departure_enthalpy(self, T, p, z) -> np.ndarray:
        """h - h_ideal_gas at (T, p) on the root z: R T (z - 1) + (T a' - a) / (2 sqrt2 b) ln((z + (1 + sqrt2) B) / (z + (1 - sqrt2) B))."""
        a, da_dT = self._a(np.asarray(T, float))
        B = self.b * p / (R * T)
        return R * T * (z - 1.0) + (T * da_dT - a) / (2.0 * _SQRT2 * self.b) * np.log(
            (z + (1 + _SQRT2) * B) / (z + (1 - _SQRT2) * B))

    def derivatives(self, T, v) -> tuple[np.ndarray, np.ndarray]:
        """(dp/dv)_T and (dp/dT)_v at molar volume v."""
        a, da_dT = self._a(np.asarray(T, float))
        b = self.b
        w = v * v + 2.0 * b * v - b * b
        dp_dv = -R * T / (v - b) ** 2 + 2.0 * a * (v + b) / w**2
        dp_dT = R / (v - b) - da_dT / w
        return dp_dv, dp_dT
