"""The model for substances described by critical data and published lines.

Lines (these decide the stable phase):
  boiling      the published vapour-pressure equation within its range; outside it, and
               for substances without one, the Lee-Kesler corresponding-states equation
               (Lee and Kesler 1975, AIChE J. 21, 510) with the acentric factor solved
               from the normal boiling point, matched to the published line at its ends,
               running to the critical point above it and to the data's triple-point
               pressure below it
  melting      the published equation (Simon-Glatzel or a reference-equation ancillary),
               shifted by the small difference between its triple-point pressure and the
               model's; else the Clapeyron equation integrated from the triple point with
               the enthalpy of fusion and the two phases' volumes (estimate, to the fluid's highest
               pressure: 100 MPa here, the equation's for an equation of state)
  sublimation  the published equation scaled to the model's triple-point pressure, its slope at the
               triple point brought onto the Clapeyron slope of H_sub = H_fus + H_vap(T_t) by a
               correction fading out 5 % below it; else the Clausius-Clapeyron equation integrated
               from the triple point with that H_sub (estimate, from T_t/2 to T_t): the triple point
               closes (see _triple_sublimation)
Phases:
  vapour, gas and supercritical fluid: Peng-Robinson (see peng_robinson.py)
  liquid: Rackett saturated volume with the COSTALD-Tait compression (see liquid.py); the
          compressed liquid only where the Tait form holds, up to a few per cent below Tc
  solid: constant molar volume from the solid density (no expansivity or compressibility); an
         equation-of-state substance scales it along its melting line (helmholtz/substance.py)
Enthalpy (FLASH_FRACTION): the ideal gas's from the data's ideal-gas heat capacity (or the estimate
  of ideal_gas.estimate from the liquid heat capacity) plus the Peng-Robinson departure; the
  liquid's the saturated vapour's less the Clapeyron enthalpy of boiling, compressed by
  (v - T v alpha) dp; NaN (FLASH_FRACTION #N/A) without either heat capacity
Chemical potential (one consistent model; CHEM_POTENTIAL's reference state is the ideal
gas at the same temperature and 101.325 kPa):
  mu_vapour(T, p) = R T ln(phi p / p0)                       (Peng-Robinson fugacity)
  mu_liquid(T, p) = mu_vapour(T, p_boil(T)) + integral of V_liquid dp from p_boil(T)
  mu_solid(T, p)  = mu_vapour(T, p_sub(T)) + V_s (p - p_sub(T))   below the triple point
                  = mu_liquid(T, p_melt(T)) + V_s (p - p_melt(T)) above it
so the phase with the lowest chemical potential is the one the lines name, and the
potentials are equal on each line.
"""

from __future__ import annotations

from functools import cached_property
from typing import Callable

import numpy as np

from ...data import load
from ...numerics import MonotoneInverse, anywhere, everywhere
from ..base import FLUID, LIQUID, SOLID, VAPOR, FixedPoint, InfoItem, Substance
from ..constants import P_STANDARD, R
from .. import ideal_gas
from ..lines import line_pressure
from ..line_ends import LINE_TOL, clamp, onto_ends
from ..phase_map import classify, state_table
from ..result import NOT_AVAILABLE, OUT_OF_RANGE, Result, broadcast, fmt
from .definition import Definition
from .liquid import LiquidVolume
from .peng_robinson import PengRobinson

P0 = P_STANDARD  # Pa, the pressure of the chemical potential's reference state
P_MAX = 100e6  # Pa, highest pressure the liquid and fluid estimates are used at
SUB_FADE = 0.05  # a published sublimation line's correction at the triple point fades out 5 % below it
_LABELS, _STATE_PHASE = state_table(("solid",))
_NO_TRIPLE = "the data give no triple point (triple_point_temperature)"
_NO_CP0 = ("the data give no ideal-gas heat capacity (ideal_gas_cp.* rows) and no liquid heat capacity to estimate it "
           "from (the estimate is not made for an associating substance)")


_LEE_KESLER = load("correlations")["tables"]["lee_kesler"]


def _lee_kesler_terms(tr):
    """f0 and f1 of Lee and Kesler (1975): ln(p/pc) = f0 + omega f1."""
    ln_tr = np.log(tr)
    f0, f1 = ((a + b / tr + c * ln_tr + d * tr**6) for a, b, c, d in (_LEE_KESLER["f0"], _LEE_KESLER["f1"]))
    return f0, f1


# the rounded coefficients leave f0 = 7e-6 and f1 = 7e-5 at Tr = 1; taken off, the line ends at pc
_F0_CRITICAL, _F1_CRITICAL = _lee_kesler_terms(1.0)


def _lee_kesler(tr: np.ndarray, omega: float) -> np.ndarray:
    """ln(p/pc) by Lee and Kesler (1975), exactly zero at the critical point."""
    f0, f1 = _lee_kesler_terms(tr)
    return (f0 - _F0_CRITICAL) + omega * (f1 - _F1_CRITICAL)


def _derivative(f, T: np.ndarray, lo: float, hi: float) -> np.ndarray:
    """df/dT by second-order differences: central inside [lo, hi], one-sided at its ends."""
    T = np.asarray(T, float)
    h = 1e-6 * T
    up, down = T + h <= hi, T - h >= lo
    at = lambda k: f(np.clip(T + k * h, lo, hi))  # noqa: E731 - clipped: no NaN from the unused side
    central = (at(1) - at(-1)) / (2.0 * h)
    forward = (-3.0 * at(0) + 4.0 * at(1) - at(2)) / (2.0 * h)
    backward = (3.0 * at(0) - 4.0 * at(-1) + at(-2)) / (2.0 * h)
    return np.where(up & down, central, np.where(up, forward, backward))


def _where_on(mask: np.ndarray, f: Callable[[np.ndarray], np.ndarray], x: np.ndarray, fill: float) -> np.ndarray:
    """f(x) where ``mask`` holds, ``fill`` elsewhere (x of the mask's shape). Where it holds everywhere f
    takes x whole: a single value stays a single value, whose arithmetic numpy does without its array
    machinery (a one-element array's costs four times as much)."""
    if everywhere(mask):
        return np.array(f(x), dtype=float)
    out = np.full(np.shape(mask), fill)
    if anywhere(mask):
        out[mask] = f(x[mask])
    return out


def _in_u(inverse: MonotoneInverse, y: np.ndarray) -> np.ndarray:
    """1/T on a line from ln p, by a table in u = 1/T. The table's ends are f(1/(1/T)), which may lie
    an ulp inside the line's ends: the line's own end pressures are clipped onto them."""
    return inverse(clamp(y, inverse.y[0], inverse.y[-1]))


_METHOD_SOURCES = {
    "boil": "Lee and Kesler (1975), AIChE J. 21, 510",
    "melt": "Clapeyron equation with the data's enthalpy of fusion and the phases' volumes",
    "sublime": "Clausius-Clapeyron equation with H_fus + H_vap at the triple point",
    "vapor": "Peng and Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59",
    "liquid": "Rackett (1970), J. Chem. Eng. Data 15, 514; Spencer and Danner (1972), J. Chem. Eng. Data 17, 236; "
              "Thomson, Brobst and Hankinson (1982), AIChE J. 28, 671",
    "solid": "the data's solid density",
    "chem_potential": "the construction in cellfuncs/substances/general/model.py (module docstring)",
}


class GeneralSubstance(Substance):
    solids = ("solid",)

    def __init__(self, definition: Definition):
        d = self.definition = definition
        v = d.values
        self.name = d.name
        self.molar_mass = v["molar_mass"]
        self.tc, self.pc = v["critical_temperature"], v["critical_pressure"]
        self.critical = FixedPoint(self.tc, self.pc)
        tb = v.get("normal_boiling_point")
        omega_tb = None
        if tb is not None:  # the acentric factor that puts the corresponding-states line through Tb
            tr = np.array(tb / self.tc)
            f0 = _lee_kesler(tr, 0.0)
            omega_tb = float((np.log(P0 / self.pc) - f0) / (_lee_kesler(tr, 1.0) - f0))
        self.omega = v.get("acentric_factor", omega_tb)
        self._omega_line = omega_tb if omega_tb is not None else self.omega
        self.eos = PengRobinson(self.tc, self.pc, self.omega)
        self.ideal_gas = d.ideal_gas or (None if d.associating else ideal_gas.estimate(
            self.tc, self.omega, v.get("liquid_heat_capacity"), v.get("liquid_heat_capacity.temperature")))
        rho_l, t_l = v.get("liquid_density"), v.get("liquid_density.temperature")
        self.liquid = (LiquidVolume.anchored(self.tc, self.pc, self.omega, t_l, self.molar_mass / rho_l)
                       if rho_l and t_l and t_l < self.tc else LiquidVolume(self.tc, self.pc, self.omega))
        self.v_solid = self.molar_mass / v["solid_density"] if "solid_density" in v else np.nan
        self._setup_boil()
        self._setup_triple()
        self._setup_melt()
        self._setup_sublime()

    # --- set-up of the lines ------------------------------------------------------------
    def _setup_boil(self) -> None:
        self._boil = self.definition.lines.get("boil")
        tt = self.definition.values.get("triple_point_temperature")
        if self._boil is not None:
            lo = max(self._boil.get("T_min", 0.0), tt or 0.0)
            hi = min(self._boil.get("T_max", self.tc), self.tc)
            self._boil_range = (lo, hi)
            # where the line stops short of the triple point, the data's triple-point pressure is
            # the other end to match (ranges are quoted in whole kelvins: a shorter gap is rounding)
            pt = self.definition.values.get("triple_point_pressure")
            at_lo = self._published_ratio(lo, +1.0)
            at_tt = float(np.log(pt / self._corresponding(np.array(tt)))) if tt and pt and lo - tt > 1.0 else at_lo[0]
            self._below = self._continuation(lo, tt or lo, at_lo, at_tt)
            self._above = self._continuation(hi, self.tc, self._published_ratio(hi, -1.0), 0.0)
        self.t_low = tt if tt else (self._boil.get("T_min") if self._boil else 0.3 * self.tc)

    def _published_ratio(self, T: float, inward: float) -> tuple[float, float]:
        """ln(p_published / p_corresponding) at an end T of the published line and its slope, by a
        one-sided second-order difference into the line's range (``inward`` = +1 above T, -1 below)."""
        h = inward * 1e-4 * T
        ratio = [float(np.log(line_pressure(self._boil, T + k * h) / self._corresponding(np.array(T + k * h))))
                 for k in (0, 1, 2)]
        return ratio[0], (-3.0 * ratio[0] + 4.0 * ratio[1] - ratio[2]) / (2.0 * h)

    def _continuation(self, end: float, far: float, at_end: tuple[float, float], at_far: float) -> tuple[float, ...]:
        """(end, d, m, c) of ln(p / p_corresponding) = d + m x + c x^2, x = T - end, past a published
        end: the published line's value and slope at the end (no kink for the fluid's equation to
        ring on) and the ratio ``at_far`` at the far end (the triple or the critical point).
        Where that bends the line back (a published line ending a fraction of a kelvin below a
        critical temperature it does not share), the ratio goes straight to ``at_far`` instead."""
        d, m = at_end
        span = far - end
        if not span:
            return end, d, m, 0.0
        c = (at_far - d - m * span) / (span * span)
        T = end + np.linspace(0.0, span, 64)
        x = T - end
        if np.all(np.diff(np.log(self._corresponding(T)) + m * x + c * x * x) * np.sign(span) > 0.0):
            return end, d, m, c
        return end, d, (at_far - d) / span, 0.0

    def boil_pressure_estimate(self, T: np.ndarray) -> np.ndarray:
        """This model's vapour pressure (Pa), from the triple point to the critical point, as an array."""
        return GeneralSubstance._p_boil(self, T)

    def _corresponding(self, T: np.ndarray) -> np.ndarray:
        return self.pc * np.exp(_lee_kesler(T / self.tc, self._omega_line))

    def _p_boil(self, T: np.ndarray) -> np.ndarray:
        T = np.asarray(T, float)
        if self._boil is None:
            return self._corresponding(T)
        lo, hi = self._boil_range
        if np.all((T >= lo) & (T <= hi)):  # the usual case: the published line alone
            return line_pressure(self._boil, T)
        # continue past the published ends by corresponding states, matched in value and slope at
        # the ends, reaching the critical pressure at the critical temperature above the top and
        # the data's triple-point pressure at the triple point below the bottom
        cs = self._corresponding(T)
        published = line_pressure(self._boil, np.clip(T, lo, hi))

        def continued(end, d, m, c):
            x = T - end
            return cs * np.exp(d + m * x + c * x * x)

        return np.where(T < lo, continued(*self._below), np.where(T > hi, continued(*self._above), published))

    @cached_property
    def _p_low(self) -> float:
        """Pressure at the low end of the boiling line (the triple point where there is one)."""
        return float(self._p_boil(np.array(self.t_low)))

    @cached_property
    def _p_high(self) -> float:
        """Pressure at the top of the boiling line: the critical pressure, or a published line's own
        where its critical point differs slightly from the data's."""
        return float(self._p_boil(np.array(self.tc)))

    @cached_property
    def _boil_inverse(self) -> MonotoneInverse:
        # ln p is nearly linear in 1/T (Clausius-Clapeyron): the table's best variable
        return MonotoneInverse(lambda u: np.log(self._p_boil(1.0 / u)), 1.0 / self.tc, 1.0 / self.t_low)

    def _t_boil(self, p: np.ndarray) -> np.ndarray:
        return 1.0 / _in_u(self._boil_inverse, np.log(np.asarray(p, float)))

    def _setup_triple(self) -> None:
        tt = self.definition.values.get("triple_point_temperature")
        self.has_triple = tt is not None
        self.triple = FixedPoint(tt, float(self._p_boil(np.array(tt)))) if tt else FixedPoint(np.nan, np.nan)

    def _latent_boil(self, T: np.ndarray) -> np.ndarray:
        """Clapeyron: T (V_vapour - V_liquid) dp/dT on the model's own boiling line."""
        T = np.asarray(T, float)
        p = self._p_boil(T)
        step = 1e-4 * T
        slope = (self._p_boil(np.minimum(T + step, self.tc)) - self._p_boil(T - step)) / (np.minimum(T + step, self.tc) - T + step)
        dv = self.eos.volume(T, p, "vapor") - self.liquid.volume(T, p, p)
        return T * dv * slope

    def _setup_melt(self) -> None:
        v = self.definition.values
        self._melt = self.definition.lines.get("melt")
        self._melt_slope = None  # dp/dlnT of the Clapeyron estimate
        if self._melt is not None:
            t0 = self.triple.temperature if self.has_triple else self._melt.get("T_min")
            self._melt_shift = float(self.triple.pressure - line_pressure(self._melt, t0)) if self.has_triple else 0.0
            self._melt_range = (t0, self._melt.get("T_max", 10.0 * t0))
        elif self.has_triple and "enthalpy_of_fusion" in v and np.isfinite(self.v_solid):
            tt, pt = self.triple
            dv = self._v_liquid_triple() - self.v_solid
            self._melt_slope = v["enthalpy_of_fusion"] / dv
            t_top = tt * np.exp((self._p_top - pt) / self._melt_slope)
            self._melt_range = (min(tt, t_top), max(tt, t_top))
        elif self.has_triple:
            # without the solid's density the melting temperature is taken as independent of
            # pressure (in reality it rises by about 0.1-0.3 K/MPa), up to the fluid's highest pressure
            self._melt_slope = np.inf
            self._melt_range = (self.triple.temperature, self.triple.temperature)
        else:
            self._melt_range = None

    @property
    def _p_top(self) -> float:
        """The highest pressure of the fluid phases (Pa), where an estimated melting line stops: the
        line bounds the fluid, which must not end below it."""
        return P_MAX

    def _v_liquid_triple(self) -> float:
        """Molar volume of the liquid at the triple point (for the Clapeyron melting line)."""
        tt, pt = self.triple
        return float(self.liquid.volume(tt, pt, pt))

    def _p_melt(self, T: np.ndarray) -> np.ndarray:
        if self._melt is not None:
            return line_pressure(self._melt, T) + self._melt_shift
        tt, pt = self.triple
        return pt + self._melt_slope * np.log(np.asarray(T, float) / tt)

    def _t_melt(self, p: np.ndarray) -> np.ndarray:
        if self._melt is None:
            tt, pt = self.triple
            return tt * np.exp((np.asarray(p, float) - pt) / self._melt_slope)
        return self._melt_inverse(p)

    @cached_property
    def _melt_inverse(self) -> MonotoneInverse:
        return MonotoneInverse(self._p_melt, *self._melt_range)

    def _setup_sublime(self) -> None:
        v = self.definition.values
        self._sub = self.definition.lines.get("sublime")
        if not self.has_triple:
            self._sub_range = None
            return
        tt, pt = self.triple
        if self._sub is not None:
            self._sub_scale = float(pt / line_pressure(self._sub, tt))
            self._sub_range = (self._sub.get("T_min", 0.5 * tt), tt)
        elif "enthalpy_of_fusion" in v:
            self._sub_range = (0.5 * tt, tt)
        else:
            self._sub_range = None

    # The triple point closes: H_sub = H_fus + H_vap there, H_fus being the model's own enthalpy of
    # melting (Clapeyron on its melting line; the data's enthalpy of fusion where the solid's volume
    # is not known) and H_vap its enthalpy of boiling. The sublimation line's slope at the triple
    # point is the Clapeyron slope of that sum, dp/dT = H_sub / (T (v_vapour - v_solid)):
    #   estimate        ln(p/pt) = -(H_sub / (R dZ)) (1/T - 1/Tt), dZ = pt (v_vapour - v_solid) / (R Tt)
    #                   at the triple point (the vapour's non-ideality and the solid's volume there)
    #   published line  ln p = ln(scale p_published) + d (T - Tt) w(T): d brings the slope at the triple
    #                   point onto Clapeyron's; w, 1 at the triple point with zero slope and curvature,
    #                   fades to 0 at SUB_FADE Tt below it (a quintic smoothstep), where the published
    #                   line takes over unchanged. d Tt is how far the published slope disagrees with the
    #                   other lines and the volumes at the triple point (carbon dioxide: -2.1 %).
    # Since the solid's potential is anchored to the fluid's on both lines, the Clapeyron equation holds
    # on each, and LATENT_HEAT("sublime") = LATENT_HEAT("melt") + LATENT_HEAT("boil") at the triple point.
    def _triple_sublimation(self) -> tuple[float, float]:
        """(H_fus + H_vap, v_vapour - v_solid) at the triple point, J/mol and m3/mol."""
        tt, pt = self.triple
        T = np.array(tt)
        v_vapour = float(self.props(T, pt, VAPOR, want=("v",))[0].v)
        v_solid = self.v_solid if np.isfinite(self.v_solid) else 0.0  # not known: its small share left out
        fusion = float(self._clapeyron_fusion(T))
        if not np.isfinite(fusion):
            fusion = self.definition.values.get("enthalpy_of_fusion", np.nan)
        return fusion + float(self._latent_boil(T)), v_vapour - v_solid

    def _clapeyron_fusion(self, T: np.ndarray) -> np.ndarray:
        """T (v_liquid - v_solid) dp/dT at the triple point T (NaN without the solid's volume)."""
        p = self._p_melt(T) if self._melt_slope != np.inf else np.full(np.shape(T), np.nan)
        liquid, _ = self.props(T, p, LIQUID, want=("v",))
        with np.errstate(invalid="ignore"):
            return T * (liquid.v - self.v_solid) * self._line_slope("melt", T)

    @cached_property
    def _sub_enthalpy(self) -> float:
        """H_sub / dZ of the estimated line (J/mol)."""
        tt, pt = self.triple
        heat, dv = self._triple_sublimation()
        return heat / (pt * dv / (R * tt))

    @cached_property
    def _sub_delta(self) -> float:
        """d (1/K): the change of d ln p/dT that puts the published line's slope onto Clapeyron's."""
        tt, pt = self.triple
        heat, dv = self._triple_sublimation()
        delta = heat / (tt * dv * pt) - float(self._published_dlnp(np.array(tt)))
        return delta if np.isfinite(delta) else 0.0

    def _published_dlnp(self, T: np.ndarray) -> np.ndarray:
        return _derivative(lambda x: np.log(line_pressure(self._sub, x)), T, *self._sub_range)

    def _sub_fade(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """w(T) and dw/dT of the published line's correction."""
        tt = self.triple.temperature
        y = np.clip((tt - T) / (SUB_FADE * tt), 0.0, 1.0)
        w = 1.0 - y**3 * (10.0 - 15.0 * y + 6.0 * y * y)
        return w, 30.0 * y * y * (1.0 - y) ** 2 / (SUB_FADE * tt)

    def _p_sub(self, T: np.ndarray) -> np.ndarray:
        T = np.asarray(T, float)
        tt, pt = self.triple
        if self._sub is not None:
            w, _ = self._sub_fade(T)
            return line_pressure(self._sub, T) * self._sub_scale * np.exp(self._sub_delta * (T - tt) * w)
        return pt * np.exp(-self._sub_enthalpy / R * (1.0 / T - 1.0 / tt))

    def _sub_dlnp(self, T: np.ndarray) -> np.ndarray:
        """d ln p / dT of the model's sublimation line."""
        if self._sub is None:
            return self._sub_enthalpy / (R * T * T)
        w, dw = self._sub_fade(T)
        return self._published_dlnp(T) + self._sub_delta * (w + (T - self.triple.temperature) * dw)

    def _t_sub(self, p: np.ndarray) -> np.ndarray:
        tt, pt = self.triple
        if self._sub is None:
            return 1.0 / (1.0 / tt - R / self._sub_enthalpy * np.log(np.asarray(p, float) / pt))
        return 1.0 / _in_u(self._sub_inverse, np.log(np.asarray(p, float)))

    @cached_property
    def _sub_inverse(self) -> MonotoneInverse:
        lo, hi = self._sub_range
        return MonotoneInverse(lambda u: np.log(self._p_sub(1.0 / u)), 1.0 / hi, 1.0 / lo)

    # --- boundaries -------------------------------------------------------------------
    def _missing(self, r: Result, line: str, why: str) -> None:
        r.flag(True, NOT_AVAILABLE, f"{self.name} has no {line} line: {why}")

    def _lacking(self) -> str:
        """The data a Clapeyron melting line needs that the definition lacks, by field name."""
        return " and ".join(k for k in ("enthalpy_of_fusion", "solid_density") if k not in self.definition.values)

    def boil_pressure(self, T: np.ndarray) -> Result:
        T = self.onto_line("boil", T)
        r = Result.like(T)
        r.flag(T < self.t_low * (1 - LINE_TOL), OUT_OF_RANGE,
               "{} K is below the " + self._low_name() + f" of {self.name} ({fmt(self.t_low)} K)", T,
               see="sublime" if self.has_triple else "")
        r.flag(T > self.tc * (1 + LINE_TOL), OUT_OF_RANGE, "{} K is above the critical temperature of "
               + f"{self.name} ({fmt(self.tc)} K): there is no liquid-vapour line above it", T)
        r.fill(self._p_boil(np.clip(T, self.t_low, self.tc)))
        return r

    def _low_name(self) -> str:
        return "triple-point temperature" if self.has_triple else "lowest temperature of the vapour-pressure line"

    def boil_temperature(self, p: np.ndarray) -> Result:
        p_low = self._p_low
        p = self.onto_line("boil", p, pressure=True)
        r = Result.like(p)
        # the messages are written only for a value flagged (their numbers' formatting costs a call more
        # than the line)
        r.flag(p < p_low * (1 - LINE_TOL), OUT_OF_RANGE, lambda pp: f"{fmt(pp)} Pa is below the " + (
            "triple-point pressure" if self.has_triple else "lowest pressure of the vapour-pressure line")
               + f" of {self.name} ({fmt(p_low)} Pa)", p, see="sublime" if self.has_triple else "")
        r.flag(p > self._p_high * (1 + LINE_TOL), OUT_OF_RANGE, lambda pp: f"{fmt(pp)} Pa is above the top of the "
               f"boiling line of {self.name} ({fmt(self._p_high)} Pa at the critical temperature)", p)
        r.fill(self._t_boil(clamp(p, p_low, self._p_high)))
        return r

    def melt_pressure(self, T: np.ndarray, solid: int | None = None) -> tuple[Result, np.ndarray]:
        r = Result.like(T)
        if self._melt_range is None:
            self._missing(r, "melting", _NO_TRIPLE + " and no melting equation")
            return r, SOLID
        if self._melt_slope == np.inf:
            self._missing(r, "melting-pressure", f"without {self._lacking()} in its data its melting temperature is "
                          f"taken as independent of pressure ({fmt(self.triple.temperature)} K); use MELT_TEMP")
            return r, SOLID
        lo, hi = self._melt_range
        T = self.onto_line("melt", T)
        r.flag((T < lo * (1 - LINE_TOL)) | (T > hi * (1 + LINE_TOL)), OUT_OF_RANGE,
               "{} K is outside the melting line of " + f"{self.name} ({fmt(lo)} K to {fmt(hi)} K)", T)
        r.fill(self._p_melt(np.clip(T, lo, hi)))
        return r, SOLID

    @cached_property
    def _melt_p_range(self) -> tuple[float, float]:
        """Pressures at the ends of the melting line (fixed per substance: computed once)."""
        if self._melt_slope == np.inf:
            return self.triple.pressure, self._p_top
        lo, hi = self._melt_range
        a, b = float(self._p_melt(np.array(lo))), float(self._p_melt(np.array(hi)))
        return min(a, b), max(a, b)

    def melt_temperature(self, p: np.ndarray) -> tuple[Result, np.ndarray]:
        r = Result.like(p)
        if self._melt_range is None:
            self._missing(r, "melting", _NO_TRIPLE + " and no melting equation")
            return r, SOLID
        p_lo, p_hi = self._melt_p_range
        p = self.onto_line("melt", p, pressure=True)
        r.flag(p < p_lo * (1 - LINE_TOL), OUT_OF_RANGE, "{} Pa is below the melting line of "
               + f"{self.name} (from {fmt(p_lo)} Pa)", p, see="sublime" if self.has_triple else "")
        r.flag(p > p_hi * (1 + LINE_TOL), OUT_OF_RANGE, "{} Pa is above the melting line's range for "
               + f"{self.name} ({fmt(p_hi)} Pa)", p)
        r.fill(self._t_melt(np.clip(p, p_lo, p_hi)))
        return r, SOLID

    def sublime_pressure(self, T: np.ndarray) -> Result:
        r = Result.like(T)
        if self._sub_range is None:
            self._missing(r, "solid-vapour", self._no_sublimation_reason())
            return r
        lo, hi = self._sub_range
        T = self.onto_line("sublime", T)
        r.flag(T > hi * (1 + LINE_TOL), OUT_OF_RANGE, "{} K is above the triple-point temperature of "
               + f"{self.name} ({fmt(hi)} K)", T, see="boil")
        r.flag(T < lo * (1 - LINE_TOL), OUT_OF_RANGE, "{} K is below the sublimation line's range for "
               + f"{self.name} ({fmt(lo)} K)", T)
        r.fill(self._p_sub(np.clip(T, lo, hi)))
        return r

    @cached_property
    def _p_sub_low(self) -> float:
        """Pressure at the low end of the sublimation line."""
        return float(self._p_sub(np.array(self._sub_range[0])))

    def _no_sublimation_reason(self) -> str:
        if not self.has_triple:
            return _NO_TRIPLE + ": helium, liquid down to 0 K at low pressure, has none"
        return "the data lack a sublimation equation and the enthalpy of fusion"

    def sublime_temperature(self, p: np.ndarray) -> Result:
        r = Result.like(p)
        if self._sub_range is None:
            self._missing(r, "solid-vapour", self._no_sublimation_reason())
            return r
        lo = self._sub_range[0]
        p_lo, p_hi = self._p_sub_low, self.triple.pressure
        p = self.onto_line("sublime", p, pressure=True)
        r.flag(p > p_hi * (1 + LINE_TOL), OUT_OF_RANGE, "{} Pa is above the triple-point pressure of "
               + f"{self.name} ({fmt(p_hi)} Pa)", p, see="boil")
        r.flag(p < p_lo * (1 - LINE_TOL), OUT_OF_RANGE, "{} Pa is below the sublimation line's range for "
               + f"{self.name} ({fmt(p_lo)} Pa at {fmt(lo)} K)", p)
        r.fill(self._t_sub(np.clip(p, p_lo, p_hi)))
        return r

    # --- stable phase -----------------------------------------------------------------
    def _classify(self, T: np.ndarray, p: np.ndarray) -> Result:
        T, p = broadcast(np.asarray(T, float), np.asarray(p, float))
        r = Result(np.full(T.shape, -1.0))
        high = p >= self.triple.pressure if self.has_triple else np.ones(T.shape, bool)
        t_solid = np.full(T.shape, -np.inf)
        if self._melt_range is not None:
            p_lo, p_hi = self._melt_p_range
            r.flag(high & (p > p_hi * (1 + LINE_TOL)), OUT_OF_RANGE, "{} Pa is above the melting line's range for "
                   + f"{self.name} ({fmt(p_hi)} Pa)", p)
            # up to the same tolerance as the flag above: a pressure typed at the line's end (100 MPa)
            # is on the line, not in a gap where no solid is known
            melt = high & (p >= p_lo) & (p <= p_hi * (1 + LINE_TOL))
            t_solid = _where_on(melt, lambda q: self._t_melt(np.minimum(q, p_hi)), p, -np.inf)
        # (with a triple point there is always a melting line: published, Clapeyron or pressure-independent)
        if self._sub_range is not None:
            p_lo = self._p_sub_low
            # below the line's lowest pressure the vapour is stable wherever the line is known
            r.flag(~high & (p < p_lo) & (T < self._sub_range[0]), OUT_OF_RANGE,
                   "{} Pa is below the sublimation line's range for " + f"{self.name} ({fmt(p_lo)} Pa)", p)
            sub = ~high & (p >= p_lo)
            if anywhere(sub):
                t_solid[sub] = self._t_sub(p[sub])
        elif self.has_triple:
            r.flag(~high & (T < self.triple.temperature), NOT_AVAILABLE,
                   f"{self.name} has no solid-vapour line: {self._no_sublimation_reason()}")
        if not self.has_triple:
            r.flag(T < self.t_low, OUT_OF_RANGE, "{} K is below the lowest temperature of the vapour-pressure line of "
                   + f"{self.name} ({fmt(self.t_low)} K)", T)
        p_low = self._p_low
        liquid = high & (p >= p_low)
        sat = liquid & (p <= self._p_high)
        t_boil = _where_on(sat, self._t_boil, p, self.tc)  # above the line's top pressure: the critical temperature
        if not everywhere(liquid):
            t_boil = np.where(liquid, t_boil, -np.inf)
        state = classify(T, p, t_solid=t_solid, solid=np.zeros(T.shape, int), t_boil=t_boil, sat=sat, high=high,
                         pt=self.triple.pressure if self.has_triple else -np.inf, tc=self.tc, pc=self.pc)
        r.fill(state.astype(float))
        return r

    _labels, _state_phase = _LABELS, _STATE_PHASE

    # --- single-phase properties --------------------------------------------------------
    def _mu_vapor(self, T, p) -> np.ndarray:
        z = self.eos.compressibility(T, p, "vapor")
        return R * T * (np.log(p / P0) + self.eos.ln_fugacity_coefficient(T, p, z))

    def _mu_liquid(self, T, p) -> np.ndarray:
        p_sat = self._p_boil(T)
        return self._mu_vapor(T, p_sat) + self.liquid.integral(T, p, p_sat)

    def _phase_methods(self) -> dict:
        return {LIQUID: self._liquid, VAPOR: self._vapor, FLUID: self._fluid, SOLID: self._solid}

    def _store(self, fields, sel, r: Result, sub: Result, **values) -> None:
        if sub.problems is None:
            self._put(fields, sel, slice(None), values)
            return
        ok = np.equal(sub.problems, None)
        self._put(fields, sel, ok, {name: np.broadcast_to(v, ok.shape)[ok] for name, v in values.items()})
        self._report(r, sel, sub)

    def _liquid(self, t, q, sel, r: Result, fields) -> None:
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(q > P_MAX, OUT_OF_RANGE, "{} Pa is above the liquid estimate's range (" + fmt(P_MAX) + " Pa)", q)
        sub.flag(t < self.t_low * (1 - LINE_TOL), OUT_OF_RANGE, "liquid " + self.name + " at {} K is below the "
                 + self._low_name() + f" ({fmt(self.t_low)} K)", t)
        t_in = np.clip(t, self.t_low, self.tc)
        p_sat = self._p_boil(t_in)
        sub.flag(q < p_sat * (1 - LINE_TOL), OUT_OF_RANGE, lambda tt, qq: f"liquid {self.name} at {fmt(tt)} K and "
                 f"{fmt(qq)} Pa is below its vapour pressure: superheated liquid is outside the model", t, q)
        self._flag_frozen(sub, t, q)
        volume = self.liquid.volume(t_in, q, p_sat)
        step = 1e-3
        t_up, t_down = np.minimum(t_in + step, self.tc), t_in - step
        p_up = self._p_boil(t_up)
        v_up = self.liquid.volume(t_up, q, np.minimum(p_up, q))
        v_down = self.liquid.volume(t_down, q, np.minimum(self._p_boil(t_down), q))
        alpha = (v_up - v_down) / ((t_up - t_down) * volume)
        # near the critical point the Tait compression fails (its B + p_sat turns negative within
        # about 2 % of Tc, and before that the compression term outgrows the expansion, so alpha
        # turns negative): the saturated liquid's volume and chemical potential stand, a
        # compressed liquid and the derivatives do not
        tait = self.liquid.holds(t_up, p_up) & (volume > 0.0) & (alpha > 0.0)
        sub.flag(~tait & (q > p_sat * (1 + LINE_TOL)), OUT_OF_RANGE, lambda tt, qq: f"compressed liquid {self.name} "
                 f"at {fmt(tt)} K and {fmt(qq)} Pa is too near its critical temperature ({fmt(self.tc)} K) for the "
                 "Tait compression estimate", t, q)
        values = dict(v=volume, alpha=np.where(tait, alpha, np.nan),
                      kappa=np.where(tait, self.liquid.compressibility(t_in, q, p_sat), np.nan))
        if fields.wants("g"):  # the chemical potential needs the vapour's fugacity: only when asked
            values["g"] = self._mu_liquid(t_in, q)
        if fields.wants("h"):
            # the saturated vapour's less the Clapeyron enthalpy of boiling, then compressed:
            # dh = (v - T v alpha) dp, with the volume and expansivity at the state
            h_sat = self._h_gas(t_in, p_sat, self.eos.compressibility(t_in, p_sat, "vapor")) - self._latent_boil(t_in)
            values["h"] = h_sat + volume * (1.0 - t_in * np.where(tait, alpha, 0.0)) * (q - p_sat)
        self._store(fields, sel, r, sub, **values)

    def _flag_frozen(self, sub: Result, t: np.ndarray, q: np.ndarray, word: str = "liquid") -> None:
        """Flag fluid states below the melting temperature at their pressure (the solid's region)."""
        if self._melt_range is not None:
            p_lo, p_hi = self._melt_p_range
            frozen = (q >= p_lo) & (q <= p_hi)
            if anywhere(frozen):
                t_m = _where_on(frozen, self._t_melt, q, -np.inf)
                sub.flag(t < t_m * (1 - LINE_TOL), OUT_OF_RANGE, lambda tt, qq: f"{word} {self.name} at {fmt(tt)} K "
                         f"and {fmt(qq)} Pa is below its melting temperature", t, q)

    def _gas(self, t, q, sel, r, fields, sub: Result) -> None:
        z = self.eos.compressibility(t, q, "vapor")
        volume = z * R * t / q
        values = dict(v=volume)
        if fields.wants("alpha") or fields.wants("kappa"):
            dp_dv, dp_dT = self.eos.derivatives(t, volume)
            values.update(kappa=-1.0 / (volume * dp_dv), alpha=-dp_dT / (volume * dp_dv))
        if fields.wants("g"):
            values["g"] = R * t * (np.log(q / P0) + self.eos.ln_fugacity_coefficient(t, q, z))
        if fields.wants("h"):
            values["h"] = self._h_gas(t, q, z)
        self._store(fields, sel, r, sub, **values)

    def _h_gas(self, T, p, z) -> np.ndarray:
        """Ideal-gas enthalpy (from 298.15 K) plus the Peng-Robinson departure; NaN without a heat capacity."""
        if self.ideal_gas is None:
            return np.full(np.shape(T), np.nan)
        return ideal_gas.enthalpy(self.ideal_gas, T) + self.eos.departure_enthalpy(T, p, z)

    def _vapor(self, t, q, sel, r: Result, fields) -> None:
        sub = Result(np.full(t.shape, np.nan))
        cold = t < self.t_low
        if self._sub_range is not None:
            sub.flag(t < self._sub_range[0], OUT_OF_RANGE, "{} K is below the sublimation line's range for "
                     + f"{self.name} ({fmt(self._sub_range[0])} K)", t)
            p_line = self._p_boil(np.clip(t, self.t_low, self.tc))
            if cold.any():
                p_line = np.where(cold, self._p_sub(np.clip(t, *self._sub_range)), p_line)
        else:
            sub.flag(cold, OUT_OF_RANGE, "{} K is below the " + self._low_name() + f" of {self.name}", t)
            p_line = self._p_boil(np.clip(t, self.t_low, self.tc))
        sub.flag(q > p_line * (1 + LINE_TOL), OUT_OF_RANGE, lambda tt, qq: f"{self.name} vapour at {fmt(tt)} K and "
                 f"{fmt(qq)} Pa is above its saturation pressure: supersaturated vapour is outside the model", t, q)
        self._gas(t, q, sel, r, fields, sub)

    def _fluid(self, t, q, sel, r: Result, fields) -> None:
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(q > P_MAX, OUT_OF_RANGE, "{} Pa is above the fluid estimate's range (" + fmt(P_MAX) + " Pa)", q)
        self._gas(t, q, sel, r, fields, sub)

    def _solid(self, t, q, sel, r: Result, fields) -> None:
        sub = Result(np.full(t.shape, np.nan))
        if not np.isfinite(self.v_solid):
            sub.flag(True, NOT_AVAILABLE, f"{self.name} has no solid density in its data")
        elif not self.has_triple or self._melt_range is None and self._sub_range is None:
            sub.flag(True, NOT_AVAILABLE, f"{self.name}'s solid is not modelled (no triple point or lines)")
        if sub.problems is not None:
            self._store(fields, sel, r, sub)
            return
        tt = self.triple.temperature
        below = t <= tt
        if self._sub_range is not None:
            sub.flag(below & (t < self._sub_range[0]), OUT_OF_RANGE, "{} K is below the sublimation line's range for "
                     + f"{self.name}", t)
        elif below.any():
            sub.flag(below, NOT_AVAILABLE, f"{self.name} has no solid-vapour line: {self._no_sublimation_reason()}")
        if self._melt_range is None:
            sub.flag(~below, NOT_AVAILABLE, f"{self.name} has no melting line")
        else:
            lo, hi = self._melt_range
            sub.flag(~below & (t > hi), OUT_OF_RANGE, "solid " + self.name + " at {} K is above its melting line's "
                     "range", t)
            p_m = self._p_melt(np.clip(t, lo, hi))
            sub.flag(~below & (q < p_m * (1 - LINE_TOL)), OUT_OF_RANGE, lambda tt_, qq: f"solid {self.name} at "
                     f"{fmt(tt_)} K and {fmt(qq)} Pa is above its melting temperature", t, q)
            # the solid's potential is the fluid's on the melting line: none where that is beyond the fluid
            sub.flag(~below & (p_m > self._p_top * (1 + LINE_TOL)), OUT_OF_RANGE, lambda tt_, pp: f"solid "
                     f"{self.name} at {fmt(tt_)} K: its melting pressure ({fmt(pp)} Pa), where its chemical potential "
                     f"is the fluid's, is above the fluid's range ({fmt(self._p_top)} Pa)", t, p_m)
        g = np.full(t.shape, np.nan)
        v = np.full(t.shape, self.v_solid)
        if below.any() and self._sub_range is not None:
            p_s = self._p_sub(np.clip(t[below], *self._sub_range))
            g[below] = self._mu_vapor(t[below], p_s) + self.v_solid * (q[below] - p_s)
        if (~below).any() and self._melt_range is not None:
            p_m = self._p_melt(np.clip(t[~below], *self._melt_range))
            mu_m, v[~below] = self._melt_anchor(t[~below], p_m)
            g[~below] = mu_m + v[~below] * (q[~below] - p_m)
        self._store(fields, sel, r, sub, v=v, g=g)

    def _melt_anchor(self, T: np.ndarray, p_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(chemical potential of the liquid, molar volume of the solid) at T on the melting line p_m:
        here the data's constant solid volume."""
        return self._mu_liquid(T, p_m), np.full(np.shape(T), self.v_solid)

    # --- quantities this model derives by the Clapeyron equation ------------------------
    def onto_line(self, boundary: str, x: np.ndarray, pressure: bool = False) -> np.ndarray:
        """Temperatures (or pressures) ``x`` typed just past an end of the line that is the triple or the
        critical point (see TYPED_T and TYPED_P) moved onto that point; other ends stay as they are."""
        triple = (self.triple.pressure if pressure else self.triple.temperature) if self.has_triple else None
        if boundary == "boil":
            low, high = triple, (self._p_high if pressure else self.tc)
        elif boundary == "sublime":
            low, high = None, triple
        elif pressure:
            low, high = self._melt_p_range[0], None  # a melting line's pressure rises from the triple point
        elif self._melt_range is not None and self._melt_range[1] == triple:
            low, high = None, triple  # a melting line that leans back (water's) ends at the triple point
        else:
            low, high = triple, None
        return onto_ends(x, low, high, relative=pressure)

    def latent_heat(self, boundary: str, T: np.ndarray) -> Result:
        """T * dV * dp/dT on the line, with the model's own volumes and line slope."""
        T = self.onto_line(boundary, T)
        p, phases = self.line_pressure(boundary, T)
        low, low_result = self.props(T, p.values, phases[0], want=("v",))
        high, high_result = self.props(T, p.values, phases[1], want=("v",))
        out = Result.joined(p, low_result, high_result)
        with np.errstate(invalid="ignore"):
            out.fill(T * (high.v - low.v) * self._line_slope(boundary, np.asarray(T, float)))
        return out

    def _line_slope(self, boundary: str, T: np.ndarray) -> np.ndarray:
        """dp/dT of the model's own line at T: exact for the Clapeyron estimates, else by a
        second-order difference inside the line's range."""
        if boundary == "boil":
            return _derivative(self._p_boil, T, self.t_low, self.tc)
        missing = self._sub_range is None if boundary == "sublime" else self._melt is None and self._melt_slope is None
        if missing:  # no such line (helium-4 has no triple point): line_pressure has said why
            return np.full(np.shape(T), np.nan)
        if boundary == "melt":
            if self._melt is None:  # p = pt + slope ln(T/Tt)
                return self._melt_slope / T
            return _derivative(self._p_melt, T, *self._melt_range)
        T = np.clip(T, *self._sub_range)
        return self._p_sub(T) * self._sub_dlnp(T)

    def _no_enthalpy(self, out: Result, h: np.ndarray) -> None:
        out.flag(np.isnan(h), NOT_AVAILABLE, f"the enthalpy of {self.name} is not modelled: {_NO_CP0}")

    def info(self) -> dict[str, InfoItem]:
        d = self.definition
        items: dict[str, InfoItem] = {}
        for name, value, unit in d.fields():
            line = name.split(".")[0]
            items[name] = InfoItem(value, unit, d.sources.get(name, d.sources.get(line, "")))
        for key, (model, valid) in self._models().items():
            source = self._model_source(key)
            items[f"{key}_model"] = InfoItem(model, "", source)
            items[f"{key}_range"] = InfoItem(valid, "", source)
        return items

    def _model_source(self, key: str) -> str:
        """The publications behind a quantity's model (the line's own source first)."""
        d = self.definition
        line = {"boil": self._boil, "melt": self._melt, "sublime": self._sub}.get(key)
        if line is not None:
            return d.sources.get(key, "") + ("; continued by " + _METHOD_SOURCES["boil"] if key == "boil" else "")
        if key == "ideal_gas_cp":
            return d.sources.get(key, "") if d.ideal_gas else ideal_gas.ESTIMATE_SOURCE if self.ideal_gas else ""
        if key == "melt" and self._melt_slope == np.inf:
            return "the data's triple-point temperature (without a solid density there is no Clapeyron slope)"
        return _METHOD_SOURCES.get(key, "")

    def definition_rows(self) -> list[tuple]:
        """The definition's own fields only, so that the rows paste back as a user definition."""
        d = self.definition
        return [(name, value, unit, d.sources.get(name, d.sources.get(name.split(".")[0], "")))
                for name, value, unit in d.fields()]

    def _models(self) -> dict[str, tuple[str, str]]:
        boil = ("published " + self._boil["form"] + " equation" + (", corresponding states (Lee-Kesler) outside "
                f"{fmt(self._boil_range[0])} K to {fmt(self._boil_range[1])} K" if self._boil_range != (self.t_low, self.tc) else "")
                if self._boil is not None else "corresponding states (Lee-Kesler) through the normal boiling point")
        melt = ("published " + self._melt["form"] + " equation" if self._melt is not None else
                f"triple-point temperature, taken as independent of pressure to {fmt(self._p_top)} Pa (estimate; no {self._lacking()}; "
                "real melting temperatures rise by about 0.1-0.3 K per MPa)"
                if self._melt_slope == np.inf else
                "Clapeyron equation from the triple point (estimate)" if self._melt_range else "none")
        sub = ("published " + self._sub["form"] + " equation" if self._sub is not None else
               "Clausius-Clapeyron from the triple point (estimate)" if self._sub_range else "none")
        rng = lambda r_: f"{fmt(r_[0])} K to {fmt(r_[1])} K" if r_ else ""
        ig = self.ideal_gas
        cp0 = (("none: " + _NO_CP0, "") if ig is None else
               (f"the data's {ig['form']} correlation", rng((ig["T_min"], ig["T_max"])))
               if self.definition.ideal_gas else
               (f"constant {fmt(ig['a'][0] * R)} J/(mol K), estimated from the liquid heat capacity (Rowlinson-Bondi)",
                "the same value at every temperature"))
        return {
            "ideal_gas_cp": cp0,
            "boil": (boil, f"{fmt(self.t_low)} K to {fmt(self.tc)} K"),
            "melt": (melt, rng(self._melt_range)),
            "sublime": (sub, rng(self._sub_range)),
            "vapor": ("Peng-Robinson equation of state", f"to {fmt(P_MAX / 1e6)} MPa"),
            "liquid": ("Rackett saturated volume with COSTALD-Tait compression",
                       f"triple point to critical, to {fmt(P_MAX / 1e6)} MPa; compressed liquid to a few per cent "
                       "below Tc"),
            "solid": ("constant molar volume from the solid density", ""),
            "chem_potential": ("molar Gibbs energy relative to the ideal gas at the same temperature and "
                               f"{fmt(P0 / 1e3)} kPa", ""),
        }
