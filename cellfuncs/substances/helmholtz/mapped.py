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
    triple point, or where a substance without one has data) they continue linearly.

Two corrections go beyond the two shape factors:

  * a volume translation (Peneloux, Rauzy and Freze (1982), Fluid Phase Equilib. 8, 7, from memory):
    the mapping at rho_e = 1 / (1/rho + c(T)), its residual energy less ln(1 + c rho). A shift of volume
    at fixed temperature leaves the phase equilibrium (p_sat) and the critical pressure in place and
    moves the critical density from the plain mapping's rho_m onto the substance's; c rho_c = k(T) rises
    by a smoothstep from 0.5 Tc to its value at Tc (rho_c/rho_m - 1, at most +-0.1) and fades above Tc
    as exp(-(s/0.2)^4). The shape factor phi is fitted to the translated liquid density. Derivatives,
    with F(s, x) = A(s, y) + y - x, x = ln delta, y = ln delta_e, q = 1/(1 + k delta):
    y_x = q, y_xx = -q (1 - q), y_s = -k_s delta q, y_ss = -k_ss delta q + y_s^2, y_sx = y_s q;
  * for a substance whose file gives a saturated-vapour density or enthalpy of vaporization, a polar
    term added to the reference's residual energy (PolarTerm), its coefficient fitted to that datum;
    the mapping is then that of the reference with the term, whose phase equilibrium is tabulated.

The ideal-gas part comes from the substance's own ideal-gas heat capacity (ideal_gas.py), relative
to the ideal gas at 298.15 K and 101.325 kPa; without one the caloric properties are NaN and the
enthalpy of boiling comes from the residual part alone (the ideal part cancels at one temperature).

Derivatives. With s = ln tau, L_u = 1 + d ln theta/ds, L_w = d ln phi/ds and the reference's
reduced derivatives (a, d, dd, t, tt, dt in the notation of terms.py) at (u, w) = (theta tau, phi delta):
  d = d_0, dd = dd_0, t = L_u t_0 + L_w d_0, dt = L_u dt_0 + L_w (d_0 + dd_0),
  tt = L_u' t_0 + L_w' d_0 + L_u^2 (t_0 + tt_0) + 2 L_u L_w dt_0 + L_w^2 (d_0 + dd_0) - t.
"""

from __future__ import annotations

from typing import Callable, Mapping, NamedTuple

import numpy as np

from ...numerics import solve_bracketed
from .. import ideal_gas
from ..constants import P_STANDARD
from .equation import HelmholtzEquation, Isotherm
from .saturation import Saturation, equilibrium

_BLEND_FROM = 0.85  # reduced temperature where ln phi starts to fade to zero at the critical point
_NODES = 128  # fitted temperatures, uniform in sqrt(1 - T/Tc)
_P_BLEND_FROM = 0.95  # reduced temperature from where a line's miss of the critical pressure is taken out
_T_MAX = 1000.0  # K, the lowest upper temperature limit of a mapped equation
_DAMPING = 0.3  # width in ln(Tc/T) of the shape factors' continuation above Tc (about 1.35 Tc)
_TRANSLATION_DAMPING = 0.3  # width in ln(Tc/T) of the volume translation's fade above Tc (gone by 1.5 Tc)
_POLAR_DENSITY_POWER = 2.0  # the polar term's exp(-delta^l)
_POLAR_CAP = 2.0  # the polar term's tau^m levels off beyond this tau (Tr = 0.5), where the vapour is thin
_TRANSLATION_LIMIT = 0.1  # the largest volume translation at Tc, times the critical density
_TRANSLATION_FROM = 0.5  # reduced temperature from which the volume translation sets in
_POLAR_FADE = 0.8  # reference reduced temperature from which the polar term fades to zero at its Tc
_POLAR_EXPONENT = {False: 6.0, True: 8.0}  # tau's power in the polar term: polar, hydrogen-bonding
_POLAR_START = -0.05  # the polar coefficient's second trial value (the first is 0, the plain mapping)
_POLAR_TOLERANCE = 1e-6  # the fitted datum reproduced to this, relative
_POLAR_ITERATIONS = 12
_CONFORMAL_ROOM = 0.9  # the reference's table with the polar term ends this far below the conformal T_min

# what each wanted derivative needs of the reference equation's
_NEEDS = {"a": ("a",), "d": ("d",), "dd": ("dd",), "t": ("t", "d"), "dt": ("dt", "d", "dd"),
          "tt": ("t", "tt", "d", "dd", "dt")}
# what each needs of the untranslated mapping's (the volume translation's chain rule)
_TRANSLATED_NEEDS = {"a": ("a",), "d": ("d",), "dd": ("d", "dd"), "t": ("t", "d"), "dt": ("dt", "d", "dd"),
                     "tt": ("t", "tt", "d", "dd", "dt")}


class VapourDatum(NamedTuple):
    """A published saturated-vapour value that the polar term is fitted to: the vapour's density
    (mol/m3) or the enthalpy of boiling (J/mol) at T (K), whichever is given (rho first)."""

    T: float
    rho: float | None
    h: float | None
    associating: bool  # a hydrogen-bonding substance (the polar term's exponent)


def _smoothstep(tr: np.ndarray, start: float = _BLEND_FROM) -> np.ndarray:
    """0 below ``start``, 1 at Tr = 1, with zero slope and curvature at both ends."""
    y = np.clip((tr - start) / (1.0 - start), 0.0, 1.0)
    return y**3 * (10.0 - 15.0 * y + 6.0 * y * y)


def _smoothstep_in_s(s: np.ndarray, start: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The smoothstep of Tr = exp(-s) and its first two derivatives with respect to s."""
    tr = np.exp(-s)
    y = np.clip((tr - start) / (1.0 - start), 0.0, 1.0)
    dy = -tr / (1.0 - start)  # dy/ds inside the step; the step's own slope and curvature vanish outside
    step_y = 30.0 * y * y * (1.0 - y) ** 2
    step_yy = 60.0 * y * (1.0 - y) * (1.0 - 2.0 * y)
    return _smoothstep(tr, start), step_y * dy, step_yy * dy * dy - step_y * dy


class PolarTerm:
    """c F(tau) tau^m delta exp(-delta^2), added to the reference fluid's residual energy for a polar
    substance (evaluated at the reference's tau and delta, as the rest of its residual energy is).

    At low density it is a second virial coefficient, B rho_c = c F tau^m: the temperature dependence
    of the polar contribution in Tsonopoulos's correlation, B pc/(R Tc) = ... + a/Tr^6 - b/Tr^8
    (Tsonopoulos (1974), AIChE J. 20, 263, from memory), m = 6 for a polar substance and 8 for a
    hydrogen-bonding one; the exp(-delta^2) confines it to the vapour, the liquid being set by the
    shape factor phi. F = 1 - smoothstep from _POLAR_FADE to Tr = 1 fades it to zero, with its slope
    and curvature, at the critical temperature and leaves it zero above: the critical point of the
    reference, and so the mapped (Tc, pc), are those of the plain mapping."""

    def __init__(self, c: float, m: float):
        self.c, self.m = float(c), float(m)

    def add(self, tau: np.ndarray, delta: np.ndarray, out: dict) -> None:
        S, S1, S2 = _smoothstep_in_s(np.log(tau), _POLAR_FADE)
        m = self.m
        q = (tau / _POLAR_CAP) ** m
        sigma = q / (1.0 + q)
        P = self.c * tau**m / (1.0 + q)  # c tau^m levelled off below Tr = 1/_POLAR_CAP; s-derivatives:
        P1 = P * m * (1.0 - sigma)
        P2 = P * m * m * (1.0 - sigma) * (1.0 - 2.0 * sigma)
        g = (1.0 - S) * P  # times the fade F = 1 - S
        g1 = (1.0 - S) * P1 - S1 * P
        g2 = (1.0 - S) * P2 - 2.0 * S1 * P1 - S2 * P
        l, dl = _POLAR_DENSITY_POWER, delta**_POLAR_DENSITY_POWER
        h = delta * np.exp(-dl)
        hd = h * (1.0 - l * dl)  # delta dh/ddelta
        hdd = h * l * dl * (l * dl - 1.0 - l)  # delta^2 d2h/ddelta2
        for name, value in (("a", g * h), ("d", g * hd), ("dd", g * hdd), ("t", g1 * h), ("tt", (g2 - g1) * h),
                            ("dt", g1 * hd)):
            if name in out:
                out[name] = out[name] + value


class _WithPolarTerm(HelmholtzEquation):
    """The reference equation with a polar term added to its residual part (its ideal part unused)."""

    def __init__(self, reference: HelmholtzEquation, term: PolarTerm):
        self._plain, self._term = reference, term
        self.key, self.title, self.reference = reference.key, reference.title, reference.reference
        self.R, self.M, self.Tc, self.rhoc = reference.R, reference.M, reference.Tc, reference.rhoc
        self.T_min, self.T_max, self.p_max = reference.T_min, reference.T_max, reference.p_max

    def isotherm(self, T: np.ndarray) -> Isotherm:
        return Isotherm(self, T)

    def residual(self, T, rho, want=("a", "d", "dd", "t", "tt", "dt")) -> dict:
        out = self._plain.residual(T, rho, want)
        tau, delta = np.broadcast_arrays(self.Tc / np.asarray(T, dtype=float), np.asarray(rho, dtype=float) / self.rhoc)
        self._term.add(tau, delta, out)
        return out


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
                 cp0: Mapping | None, reference: HelmholtzEquation, reference_saturation: Saturation,
                 critical_density: float | None = None, vapour: VapourDatum | None = None,
                 T_min: float | None = None):
        """p_sat(T) (Pa) and rho_sat(T) (mol/m3) are the substance's vapour pressure and saturated
        liquid density from T_low to Tc; cp0 its ideal-gas heat capacity table (or None);
        critical_density (mol/m3) the substance's, reached by the volume translation; vapour a
        saturated-vapour datum that the polar term is fitted to; T_min the lowest temperature of the
        equation's range, below T_low (the shape factors continued) or T_low itself.
        ArithmeticError where the reference's saturation cannot reproduce them."""
        ref = reference
        self.key, self._ref, self._ref_sat, self._cp0 = key, ref, reference_saturation, cp0 or None
        self.polar = 0.0  # the polar term's coefficient c
        self.title = f"corresponding-states mapping of {name} onto the {ref.title}"
        self.reference = ("extended corresponding states with shape factors from the saturation boundary: Ely and "
                          "Hanley (1981), Ind. Eng. Chem. Fundam. 20, 323; Huber and Ely (1994), Int. J. Refrig. 17, "
                          f"18 (from memory); reference fluid: {ref.reference}")
        self.uncertainty = ("vapour pressure and saturated liquid density those of the substance's data (the "
                            "mapping reproduces them below 0.85 Tc); other states an estimate, typically 1-3 % in "
                            "density for nonpolar fluids, more for polar and hydrogen-bonding ones without a "
                            "saturated-vapour datum")
        self.R, self.M, self.Tc = ref.R, molar_mass, Tc
        zc0 = self._critical_pressure(ref) / (ref.rhoc * ref.R * ref.Tc)
        self._rho_m = pc / (zc0 * ref.R * Tc)  # rho_m: the critical density of the plain mapping
        self.rhoc = critical_density or self._rho_m  # the equation's critical density, after the translation
        # the translation at Tc, c rho_c; a larger one than _TRANSLATION_LIMIT, growing with T, would
        # outgrow the compressed liquid's expansion (negative expansivity at a few pc near Tc)
        self._kappa = float(np.clip(self.rhoc / self._rho_m - 1.0, -_TRANSLATION_LIMIT, _TRANSLATION_LIMIT))
        self.rhoc = self._rho_m * (1.0 + self._kappa)
        # the reference's range carried over by corresponding states, and at least to 1000 K, so that
        # the low-boiling gases reach process temperatures (argon at 1000 K is propane at 2450 K: far
        # above its equation's 650 K, where the residual part is small and smooth); pressures to
        # 10 pc at least (the reference equation's own 1000 MPa scaled would reach gigapascals)
        self.fitted_from = T_low  # the lowest temperature whose saturation the shape factors reproduce
        self.T_min = T_low if T_min is None else min(T_min, T_low)
        self.T_max = max(ref.T_max * Tc / ref.Tc, _T_MAX)
        self.p_max = max(10.0 * pc, 100e6)
        if vapour is None:
            self._fit(T_low, pc, p_sat, rho_sat, reference_saturation)
        else:
            self._fit_polar(vapour, lambda: self._fit(T_low, pc, p_sat, rho_sat, self._ref_sat))

    @staticmethod
    def _critical_pressure(ref: HelmholtzEquation) -> float:
        p, _ = ref.pressure(np.array(ref.Tc), np.array(ref.rhoc))
        return float(p)

    def _fit(self, T_low: float, pc: float, p_sat: Callable, rho_sat: Callable, ref_sat: Saturation) -> None:
        ref, Tc = self._ref, self.Tc
        z = np.linspace(np.sqrt(1.0 - T_low / Tc), 0.0, _NODES)[:-1]
        T = Tc * (1.0 - z * z)
        self.knots = tuple(T)  # the shape factors' spline knots
        tr = T / Tc
        fade = 1.0 - _smoothstep(tr)
        target_p = np.log(p_sat(T) * ref.rhoc / (self._rho_m * T))
        # the liquid density the reference must show, times phi: the substance's, translated
        target_rho = self._untranslated(T, rho_sat(T)) * ref.rhoc / self._rho_m

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

    def _fit_polar(self, vapour: VapourDatum, fit: Callable[[], None]) -> None:
        """The polar term's coefficient that makes the mapping reproduce the saturated-vapour datum,
        by the secant method (the datum's logarithm is close to linear in it), the shape factors
        fitted again for each trial value on the reference's own phase equilibrium with the term."""
        plain, plain_sat = self._ref, self._ref_sat
        exponent = _POLAR_EXPONENT[vapour.associating]
        T = np.array([vapour.T])
        T0_low = [plain_sat.T_low]

        def miss(c: float) -> float:
            # each trial's phase equilibrium starts from the last one's (the term changes it gradually)
            last = self._ref_sat
            self._ref = _WithPolarTerm(plain, PolarTerm(c, exponent)) if c else plain
            self._ref_sat = Saturation(self._ref, T0_low[0], last.pressure,
                                       lambda T0: last.column("d_l", T0) * plain.rhoc) if c else plain_sat
            fit()
            _, rho_l, rho_v = equilibrium(self, T, self.saturated_liquid(T) / self.rhoc,
                                          self._ref_sat.column("d_v", self._conformal(T)) * self._rho_m
                                          / (self.shape_factors(T)[1] * self.rhoc))
            if vapour.rho is not None:
                return float(np.log(rho_v[0] / vapour.rho))
            r = self.residual(np.concatenate([T, T]), np.concatenate([rho_l, rho_v]), ("d", "t"))
            h = self.R * vapour.T * (r["t"][1] + r["d"][1] - r["t"][0] - r["d"][0])
            return float(np.log(h / vapour.h))

        c0, c1 = 0.0, _POLAR_START
        f0 = miss(c0)
        # the reference's phase equilibrium with the term is wanted down to the conformal triple point
        # only, with room for theta to change (below it the term, tau^m, grows without need)
        T0_low[0] = max(plain_sat.T_low, _CONFORMAL_ROOM * float(self._conformal(np.array(self.T_min))))
        f1 = miss(c1)
        for _ in range(_POLAR_ITERATIONS):
            if abs(f1) < _POLAR_TOLERANCE:
                self.polar = c1
                return
            c0, c1, f0 = c1, c1 - f1 * (c1 - c0) / (f1 - f0), f1
            f1 = miss(c1)
        raise ArithmeticError(f"{self.key}: no polar term reproduces the saturated vapour at {vapour.T:.6g} K")

    def _conformal(self, T) -> np.ndarray:
        """The reference's temperature T_0 conformal with T."""
        theta, _ = self.shape_factors(T)
        return np.minimum(np.asarray(T, dtype=float) * self._ref.Tc / (self.Tc * theta), self._ref.Tc)

    def _translation(self, s: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """k = c(T) rho_c and its first two derivatives with respect to s = ln(Tc/T): the smoothstep
        from _BLEND_FROM up to Tc, exp(-(s/s0)^4) above it (value 1, slope and curvature 0 at Tc)."""
        step, step1, step2 = _smoothstep_in_s(s, _TRANSLATION_FROM)
        y = np.minimum(s, 0.0) / _TRANSLATION_DAMPING
        e = np.exp(-(y**4))
        hot = s < 0.0
        return (self._kappa * np.where(hot, e, step),
                self._kappa * np.where(hot, -4.0 * y**3 * e / _TRANSLATION_DAMPING, step1),
                self._kappa * np.where(hot, (16.0 * y**6 - 12.0 * y * y) * e / _TRANSLATION_DAMPING**2, step2))

    def _untranslated(self, T, rho) -> np.ndarray:
        """The density of the untranslated mapping, 1 / (1/rho + c(T)), at a density of the equation."""
        k, _, _ = self._translation(np.log(self.Tc / np.asarray(T, dtype=float)))
        return rho / (1.0 + k * rho / self.rhoc)

    @property
    def caloric(self) -> bool:
        """Whether enthalpy, entropy and heat capacity are available (an ideal-gas heat capacity given)."""
        return self._cp0 is not None

    def vapour_pressure(self, T) -> np.ndarray:
        """The mapped equation's own vapour pressure (Pa): the reference's at T_0, scaled (module docstring)."""
        T = np.asarray(T, dtype=float)
        T0 = self._conformal(T)
        _, phi = self.shape_factors(T)
        return self._ref_sat.pressure(T0) * self._rho_m * T / (phi * self._ref.rhoc * T0)

    def saturated_liquid(self, T) -> np.ndarray:
        """The reference's saturated liquid density at T_0, mapped (mol/m3): the phase equilibrium's
        starting value, closer to the mapped equation's own near the critical point than any estimate."""
        _, phi = self.shape_factors(T)
        rho = self._ref_sat.column("d_l", self._conformal(T)) * self._rho_m / phi
        k, _, _ = self._translation(np.log(self.Tc / np.asarray(T, dtype=float)))
        return rho / (1.0 - k * rho / self.rhoc)

    def shape_factors(self, T) -> tuple[np.ndarray, np.ndarray]:
        """(theta, phi) at T."""
        s = np.log(self.Tc / np.asarray(T, dtype=float))
        return np.exp(self._theta(s)[0]), np.exp(self._phi(s)[0])

    # --- the reduced Helmholtz energy ----------------------------------------------------
    def isotherm(self, T: np.ndarray) -> Isotherm:
        return Isotherm(self, T)

    def residual(self, T, rho, want=("a", "d", "dd", "t", "tt", "dt")) -> dict:
        T, rho = np.asarray(T, dtype=float), np.asarray(rho, dtype=float)
        s = np.log(self.Tc / T)
        if self._kappa == 0.0:
            return self._conformal_residual(s, rho, want)
        # F(s, x) = A(s, y) + y - x: A the untranslated energy at y = ln(rho_e / rho_m), x = ln delta;
        # y_x = q, y_xx = -q (1 - q), y_s = -k_s delta q, y_ss = -k_ss delta q + y_s^2, y_sx = y_s q
        k, k1, k2 = self._translation(s)
        kd = k * rho / self.rhoc
        q = 1.0 / (1.0 + kd)
        r = self._conformal_residual(s, rho * q, sorted({n for name in want for n in _TRANSLATED_NEEDS[name]}))
        out = {}
        if "a" in want:
            out["a"] = r["a"] - np.log1p(kd)
        if want == ("a",):  # the energy alone (the derivative tests difference it)
            return out
        ys = -k1 * (rho / self.rhoc) * q
        lift = r["d"] + 1.0  # A_y + 1
        if "d" in want:
            out["d"] = lift * q - 1.0
        if "dd" in want:
            out["dd"] = (r["dd"] + r["d"]) * q * q - lift * q * (1.0 - q) - (lift * q - 1.0)
        if "t" in want or "tt" in want:
            t = r["t"] + lift * ys
            if "t" in want:
                out["t"] = t
            if "tt" in want:
                yss = -k2 * (rho / self.rhoc) * q + ys * ys
                out["tt"] = (r["tt"] + r["t"] + 2.0 * r["dt"] * ys + (r["dd"] + r["d"]) * ys * ys + lift * yss - t)
        if "dt" in want:
            out["dt"] = r["dt"] * q + (r["dd"] + r["d"]) * ys * q + lift * ys * q
        return out

    def _conformal_residual(self, s: np.ndarray, rho: np.ndarray, want) -> dict:
        """The reference's residual energy at the conformal state, with the shape factors' chain rule."""
        order = 2 if "tt" in want else 1 if ("t" in want or "dt" in want) else 0
        lt, lt1, lt2 = self._theta(s, order)
        lp, lp1, lp2 = self._phi(s, order)
        u = np.exp(lt + s)  # theta tau
        w = np.exp(lp) * rho / self._rho_m  # phi delta
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
