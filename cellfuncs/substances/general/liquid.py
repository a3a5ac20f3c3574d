"""Liquid molar volume: saturated liquid by the Rackett equation, compressed by the Tait equation.

Saturated liquid: Rackett (1970), J. Chem. Eng. Data 15, 514, in the Spencer and
Danner (1972) form V_s = (R Tc / pc) Z_RA^(1 + (1 - Tr)^(2/7)); Z_RA is solved
from one measured liquid density when the data have one (Spencer and Danner's
use), else Yamada and Gunn's (1973) Z_RA = 0.29056 - 0.08775 omega.
Compressed liquid: the Tait form of Thomson, Brobst and Hankinson (1982),
AIChE J. 28, 671 (the COSTALD-Tait correlation):
V = V_s (1 - C ln((B + p) / (B + p_sat))).

>>> liq = LiquidVolume(126.192, 3.3958e6, 0.0372, z_ra=0.2897)
>>> round(float(liq.saturated(77.355)) * 1e6, 2)  # nitrogen at its normal boiling point, cm3/mol
34.8
"""

from __future__ import annotations

import numpy as np

from ...data import load
from ..constants import R

_TAIT = load("correlations")["tables"]["costald_tait"]
_Z_RA = load("correlations")["tables"]["yamada_gunn"]["z_ra"]


class LiquidVolume:
    def __init__(self, Tc: float, pc: float, omega: float, z_ra: float | None = None):
        self.Tc, self.pc, self.omega = Tc, pc, omega
        self.z_ra = _Z_RA[0] + _Z_RA[1] * omega if z_ra is None else z_ra
        t = _TAIT
        self.C = t["j"] + t["k"] * omega
        self._e = np.exp(t["f"] + t["g"] * omega + t["h"] * omega**2)

    @classmethod
    def anchored(cls, Tc: float, pc: float, omega: float, T: float, v: float) -> "LiquidVolume":
        """Z_RA solved so the saturated volume at T equals the measured molar volume v."""
        exponent = 1.0 + (1.0 - min(T / Tc, 1.0)) ** (2.0 / 7.0)
        z_ra = (v * pc / (R * Tc)) ** (1.0 / exponent)
        return cls(Tc, pc, omega, z_ra)

    def saturated(self, T) -> np.ndarray:
        tr = np.minimum(np.asarray(T, float) / self.Tc, 1.0)
        return R * self.Tc / self.pc * self.z_ra ** (1.0 + (1.0 - tr) ** (2.0 / 7.0))

    def _B(self, T) -> np.ndarray:
        tau = np.maximum(1.0 - np.asarray(T, float) / self.Tc, 0.0)
        t = _TAIT
        return self.pc * (-1.0 + t["a"] * tau ** (1 / 3) + t["b"] * tau ** (2 / 3) + t["d"] * tau + self._e * tau ** (4 / 3))

    def holds(self, T, p_sat) -> np.ndarray:
        """Where the Tait form applies: B + p_sat > 0.

        B tends to -pc at the critical point and its tau^(1/3) term is negative, so B + p_sat
        turns negative within about 2 % of Tc; above that, compression would swell the liquid.
        """
        return self._B(T) + np.asarray(p_sat, float) > 0.0

    def volume(self, T, p, p_sat) -> np.ndarray:
        """Molar volume at (T, p) for a liquid whose saturation pressure at T is p_sat."""
        B = self._B(T)
        return self.saturated(T) * (1.0 - self.C * np.log((B + p) / (B + p_sat)))

    def compressibility(self, T, p, p_sat) -> np.ndarray:
        """-(1/V)(dV/dp)_T from the Tait form."""
        B = self._B(T)
        return self.saturated(T) * self.C / ((B + p) * self.volume(T, p, p_sat))

    def integral(self, T, p, p_sat) -> np.ndarray:
        """The integral of V dp from p_sat to p (J/mol): the liquid's chemical potential rise."""
        B = self._B(T)
        dp = p - p_sat
        return self.saturated(T) * (dp - self.C * ((B + p) * np.log((B + p) / (B + p_sat)) - dp))
