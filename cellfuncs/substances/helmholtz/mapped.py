"""A substance's fluid mapped onto a reference equation of state (extended corresponding states).

A substance without its own fundamental equation borrows the residual Helmholtz energy of a
reference fluid's, evaluated at conformal temperature and density:

    alphar(tau, delta) = alphar_0(theta(T) tau, phi(T) delta),   tau = Tc / T,  delta = rho / rho_m

the method of extended corresponding states (Leach, Chappelear and Leland 1968, AIChE J. 14, 568;
Ely and Hanley 1981, Ind. Eng. Chem. Fundam. 20, 323), with the shape factors theta and phi found
from the substance's own saturation boundary, as Huber and Ely (1994), Int. J. Refrig. 17, 18,
describe for refrigerants (references from memory):

  * rho_m = pc / (Zc_0 R Tc), with Zc_0 the reference fluid's critical compressibility, puts the
    mapped critical point exactly on the substance's (Tc, pc) with theta = phi = 1 there;
  * at every temperature below 0.85 Tc the pair (theta, phi) is the one that makes the mapped
    equation's own phase equilibrium reproduce the substance's vapour pressure and saturated
    liquid density (the general model's lines: the published vapour-pressure equation and the
    anchored Rackett volume). A mapping of density by a factor at fixed temperature leaves phase
    equilibrium in place, so the mapped saturation is the reference's at T_0 = T Tc_0 / (Tc theta),
    scaled: p_sat = p_sat,0(T_0) rho_m T / (phi rho_c0 T_0), rho' = rho'_0(T_0) rho_m / (phi rho_c0).
    One monotone equation in T_0 per temperature, solved once when the substance is built;
  * from 0.85 Tc to Tc ln phi fades to zero (a quintic smoothstep), so the near-critical liquid
    follows the reference's scaling rather than the Rackett equation's, and the vapour pressure
    is still matched there through theta alone (a published line that ends off the critical
    pressure is brought onto it from 0.95 Tc);
  * ln theta and ln phi are cubic splines in s = ln(Tc/T); above Tc they continue from their
    value and slope at the critical point with a Gaussian damping of the slope term, so the
    equation's first derivatives (pressure, enthalpy, entropy) are continuous through the critical
    temperature (its second, the heat capacities, jump there) and it tends to plain
    two-parameter corresponding states well above it; below the lowest fitted temperature (the
    triple point) they continue linearly.

The ideal-gas part comes from the substance's own ideal-gas heat capacity (ideal_gas.py), relative
to the ideal gas at 298.15 K and 101.325 kPa; without one the caloric properties are NaN and the
enthalpy of boiling comes from the residual part alone (the ideal part cancels at one temperature).

Derivatives. With s = ln tau, L_u = 1 + d ln theta/ds, L_w = d ln phi/ds and the reference's
reduced derivatives (a, d, dd, t, tt, dt in the notation of terms.py) at (u, w) = (theta tau, phi delta):
  d = d_0, dd = dd_0, t = L_u t_0 + L_w d_0, dt = L_u dt_0 + L_w (d_0 + dd_0),
  tt = L_u' t_0 + L_w' d_0 + L_u^2 (t_0 + tt_0) + 2 L_u L_w dt_0 + L_w^2 (d_0 + dd_0) - t.
"""

from __future__ import annotations

from typing import Callable, Mapping

import numpy as np

from ...numerics import solve_bracketed
from .. import ideal_gas
from ..constants import P_STANDARD
from .equation import HelmholtzEquation
from .saturation import Saturation

REFERENCE_FLUID = "propane"  # long liquid range (Tr from 0.23), a reference equation to 1000 MPa
_BLEND_FROM = 0.85  # reduced temperature where ln phi starts to fade to zero at the critical point
_NODES = 128  # fitted temperatures, uniform in sqrt(1 - T/Tc)
_P_BLEND_FROM = 0.95  # reduced temperature from where a line's miss of the critical pressure is taken out
_T_MAX = 1000.0  # K, the lowest upper temperature limit of a mapped equation
_DAMPING = 0.3  # width in ln(Tc/T) of the shape factors' continuation above Tc (about 1.35 Tc)

# what each wanted derivative needs of the reference equation's
_NEEDS = {"a": ("a",), "d": ("d",), "dd": ("dd",), "t": ("t", "d"), "dt": ("dt", "d", "dd"),
          "tt": ("t", "tt", "d", "dd", "dt")}


def _smoothstep(tr: np.ndarray, start: float = _BLEND_FROM) -> np.ndarray:
    """0 below ``start``, 1 at Tr = 1, with zero slope and curvature at both ends."""
    y = np.clip((tr - start) / (1.0 - start), 0.0, 1.0)
    return y**3 * (10.0 - 15.0 * y + 6.0 * y * y)


class ShapeFactor:
    """f(s) = ln theta or ln phi against s = ln(Tc/T): a spline over the fitted range, a damped
    continuation above Tc (s < 0), a straight line below the lowest fitted temperature."""

    def __init__(self, s: np.ndarray, f: np.ndarray):
        from scipy.interpolate import CubicSpline  # built once per substance, on first use

        self._spline = CubicSpline(s, f)
        self._s_top = float(s[-1])
        self._at0 = [float(self._spline(0.0, k)) for k in range(2)]
        self._top = [float(self._spline(self._s_top, k)) for k in range(2)]

    def __call__(self, s: np.ndarray, order: int = 2) -> tuple[np.ndarray, ...]:
        """f, df/ds and d2f/ds2 at s, up to the derivative ``order`` (the density solver wants f alone)."""
        inside = np.clip(s, 0.0, self._s_top)
        zero = np.zeros(np.shape(s))
        f, f1, f2 = (self._spline(inside, k) if k <= order else zero for k in range(3))
        # above Tc: f0 + f1 y exp(-(y/y0)^2), y = s < 0: value and slope carried on, not the
        # curvature, which the near-critical fit makes large (ln theta'' about -25 at Tc for
        # methane: carried on, theta would fall to 0.76 by 1.2 Tc and densities be 30 % off)
        y = np.minimum(s, 0.0)
        c0, c1 = self._at0
        e = np.exp(-(y / _DAMPING) ** 2)
        de = -2.0 * y / _DAMPING**2 * e  # de/dy
        dde = (4.0 * y * y / _DAMPING**4 - 2.0 / _DAMPING**2) * e  # d2e/dy2
        hot, cold = s < 0.0, s > self._s_top
        f = np.where(cold, self._top[0] + self._top[1] * (s - self._s_top), np.where(hot, c0 + c1 * y * e, f))
        if order >= 1:
            f1 = np.where(cold, self._top[1], np.where(hot, c1 * (e + y * de), f1))
        if order >= 2:
            f2 = np.where(cold, 0.0, np.where(hot, c1 * (2.0 * de + y * dde), f2))
        return f, f1, f2


class MappedEquation(HelmholtzEquation):
    """The reference equation's residual part, mapped onto one substance by its shape factors."""

    def __init__(self, key: str, name: str, Tc: float, pc: float, molar_mass: float, T_low: float,
                 p_sat: Callable[[np.ndarray], np.ndarray], rho_sat: Callable[[np.ndarray], np.ndarray],
                 cp0: Mapping | None, reference: HelmholtzEquation, reference_saturation: Saturation):
        """p_sat(T) (Pa) and rho_sat(T) (mol/m3) are the substance's vapour pressure and saturated
        liquid density from T_low to Tc; cp0 its ideal-gas heat capacity table (or None).
        ArithmeticError where the reference's saturation cannot reproduce them."""
        ref = reference
        self.key, self._ref, self._ref_sat, self._cp0 = key, ref, reference_saturation, cp0 or None
        self.title = f"corresponding-states mapping of {name} onto the {ref.title}"
        self.reference = ("extended corresponding states with shape factors from the saturation boundary: Ely and "
                          "Hanley (1981), Ind. Eng. Chem. Fundam. 20, 323; Huber and Ely (1994), Int. J. Refrig. 17, "
                          f"18 (from memory); reference fluid: {ref.reference}")
        self.uncertainty = ("vapour pressure and saturated liquid density those of the substance's data (the "
                            "mapping reproduces them below 0.85 Tc); other states an estimate, typically 1-3 % in "
                            "density for nonpolar fluids, more for polar and hydrogen-bonding ones")
        self.R, self.M, self.Tc = ref.R, molar_mass, Tc
        zc0 = self._critical_pressure(ref) / (ref.rhoc * ref.R * ref.Tc)
        self.rhoc = pc / (zc0 * ref.R * Tc)  # rho_m: the mapped critical density
        # the reference's range carried over by corresponding states, and at least to 1000 K, so that
        # the low-boiling gases reach process temperatures (argon at 1000 K is propane at 2450 K: far
        # above its equation's 650 K, where the residual part is small and smooth); pressures to
        # 10 pc at least (the reference equation's own 1000 MPa scaled would reach gigapascals)
        self.T_min = T_low
        self.T_max = max(ref.T_max * Tc / ref.Tc, _T_MAX)
        self.p_max = max(10.0 * pc, 100e6)
        self._fit(T_low, pc, p_sat, rho_sat, reference_saturation)

    @staticmethod
    def _critical_pressure(ref: HelmholtzEquation) -> float:
        p, _ = ref.pressure(np.array(ref.Tc), np.array(ref.rhoc))
        return float(p)

    def _fit(self, T_low: float, pc: float, p_sat: Callable, rho_sat: Callable, ref_sat: Saturation) -> None:
        ref, Tc = self._ref, self.Tc
        z = np.linspace(np.sqrt(1.0 - T_low / Tc), 0.0, _NODES)[:-1]
        T = Tc * (1.0 - z * z)
        tr = T / Tc
        fade = 1.0 - _smoothstep(tr)
        target_p = np.log(p_sat(T) * ref.rhoc / (self.rhoc * T))
        target_rho = rho_sat(T) * ref.rhoc / self.rhoc  # the liquid density the reference must show, times phi

        def rho_ref(T0):
            return ref_sat.column("d_l", T0) * ref.rhoc

        def mapped_p(T0):
            # ln(p0/T0) - ln phi: increases with T0 (p0 rises, the liquid density falls)
            return np.log(ref_sat.pressure(T0) / T0) - fade * np.log(rho_ref(T0) / target_rho)

        # a published line may end at the critical temperature a little off the critical pressure
        # (n-octane's by 0.3 %), which the mapping reaches exactly: the difference is taken out
        # gradually from 0.95 Tc
        end_miss = float(np.log(p_sat(np.array(Tc)) / pc))
        target_p = target_p - _smoothstep(tr, _P_BLEND_FROM) * end_miss

        def mismatch(T0):
            return mapped_p(T0) - target_p

        T0 = solve_bracketed(mismatch, np.full(T.shape, ref_sat.T_low), np.full(T.shape, ref.Tc), xtol=1e-14)
        if not np.isfinite(T0).all():
            bad = T[~np.isfinite(T0)]
            raise ArithmeticError(f"{self.key}: the reference fluid's saturation does not reach the substance's "
                                  f"at {bad.min():.6g} to {bad.max():.6g} K")
        s = np.log(Tc / T)
        ln_theta = np.log(T * ref.Tc / (Tc * T0))
        ln_phi = fade * np.log(rho_ref(T0) / target_rho)
        s_all = np.concatenate([[0.0], s[::-1]])
        self._theta = ShapeFactor(s_all, np.concatenate([[0.0], ln_theta[::-1]]))
        self._phi = ShapeFactor(s_all, np.concatenate([[0.0], ln_phi[::-1]]))

    @property
    def caloric(self) -> bool:
        """Whether enthalpy, entropy and heat capacity are available (an ideal-gas heat capacity given)."""
        return self._cp0 is not None

    def saturated_liquid(self, T) -> np.ndarray:
        """The reference's saturated liquid density at T_0, mapped (mol/m3): the phase equilibrium's
        starting value, closer to the mapped equation's own near the critical point than any estimate."""
        theta, phi = self.shape_factors(T)
        T0 = np.minimum(np.asarray(T, dtype=float) * self._ref.Tc / (self.Tc * theta), self._ref.Tc)
        return self._ref_sat.column("d_l", T0) * self.rhoc / phi

    def shape_factors(self, T) -> tuple[np.ndarray, np.ndarray]:
        """(theta, phi) at T."""
        s = np.log(self.Tc / np.asarray(T, dtype=float))
        return np.exp(self._theta(s)[0]), np.exp(self._phi(s)[0])

    # --- the reduced Helmholtz energy ----------------------------------------------------
    def residual(self, T, rho, want=("a", "d", "dd", "t", "tt", "dt")) -> dict:
        T = np.asarray(T, dtype=float)
        s = np.log(self.Tc / T)
        order = 2 if "tt" in want else 1 if ("t" in want or "dt" in want) else 0
        lt, lt1, lt2 = self._theta(s, order)
        lp, lp1, lp2 = self._phi(s, order)
        u = np.exp(lt + s)  # theta tau
        w = np.exp(lp) * np.asarray(rho, dtype=float) / self.rhoc  # phi delta
        need = sorted({k for name in want for k in _NEEDS[name]})
        ref = self._ref
        r0 = ref.residual(ref.Tc / u, w * ref.rhoc, tuple(need))
        Lu, Lw = 1.0 + lt1, lp1
        out = {k: r0[k] for k in ("a", "d", "dd") if k in want}
        if "t" in want or "tt" in want:
            t = Lu * r0["t"] + Lw * r0["d"]
            if "t" in want:
                out["t"] = t
            if "tt" in want:
                out["tt"] = (lt2 * r0["t"] + lp2 * r0["d"] + Lu * Lu * (r0["t"] + r0["tt"])
                             + 2.0 * Lu * Lw * r0["dt"] + Lw * Lw * (r0["d"] + r0["dd"]) - t)
        if "dt" in want:
            out["dt"] = Lu * r0["dt"] + Lw * (r0["d"] + r0["dd"])
        return out

    def reduced(self, T, rho) -> tuple[dict, dict]:
        """(alpha0, alphar): the ideal part from the substance's ideal-gas heat capacity."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho, dtype=float))
        return self._ideal(T, rho), self.residual(T, rho)

    def _ideal(self, T: np.ndarray, rho: np.ndarray) -> dict:
        """alpha0 = h0/(RT) - s0/R - 1 + ln(rho R T / p0), tau alpha0_tau = h0/(RT) - 1 and
        tau^2 alpha0_tautau = 1 - cp0/R, h0 and s0 from 298.15 K and p0 = 101.325 kPa."""
        if self._cp0 is None:
            nan = np.full(T.shape, np.nan)
            return {"a": nan, "t": nan, "tt": nan}
        rt = self.R * T
        h = ideal_gas.enthalpy(self._cp0, T) / rt
        return {"a": h - ideal_gas.entropy(self._cp0, T) / self.R - 1.0 + np.log(rho * rt / P_STANDARD),
                "t": h - 1.0, "tt": 1.0 - ideal_gas.cp0(self._cp0, T) / self.R}
