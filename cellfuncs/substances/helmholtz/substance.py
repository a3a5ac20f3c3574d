"""The model for substances with a fundamental equation of state (a data file in data/equations/).

It is the general model (general/model.py) with the fluid taken from the equation:

  boiling line   the equation's own phase equilibrium (saturation.py), tabulated on first use;
                 the data file's published vapour-pressure line is only its first guess
  liquid, vapour, the equation at the density of the named branch (density.py): the liquid-like
  fluid          and vapour-like roots below the critical temperature, metastable states out to
                 the spinodal, the single root above it; v, h, s, cp, alpha, kappa from the equation
  melting and    the published lines of the substance's data file, as in the general model; they
  sublimation    and the boiling line decide STABLE_PHASE as there
  solid          the data's solid density up to the triple point; above it, on the melting line, the
                 dense fluid's volume there times the triple point's ratio v_solid / v_liquid; its
                 chemical potential anchored to the fluid's on the melting line (the dense fluid's
                 above the critical temperature) and to the vapour's on the sublimation line, so the
                 potentials agree on both lines and the Clapeyron equation holds on each
  CHEM_POTENTIAL R T ln(rho R T/p0) + R T (alphar + delta alphar_delta): relative to the ideal gas at the same
                 temperature and p0 = 101.325 kPa, the general model's reference state
  LATENT_HEAT    boiling: h'' - h' from the equation; melting and sublimation: the Clapeyron
                 equation with the model's volumes and the lines' slopes; at the triple point
                 H_sub = H_fus + H_vap, the sublimation line's slope there being Clapeyron's for that
                 sum (general/model.py, where the sublimation line is set up)
  FLASH_FRACTION an isenthalpic let-down with the equation's enthalpies; below the triple-point
                 pressure the solid-vapour split at the sublimation temperature, the solid's
                 enthalpy being the vapour's less the enthalpy of sublimation

>>> from cellfuncs.substances import lookup
>>> co2 = lookup("CO2")
>>> round(float(co2.molar_volume(313.15, 10e6).values) * 1e6, 3)   # cm3/mol at 40 degC, 100 bar
70.011
"""

from __future__ import annotations

from functools import cached_property

import numpy as np

from ..base import FLUID, LIQUID, VAPOR, FixedPoint
from ..general.definition import Definition
from ..general.model import P0, P_MAX, GeneralSubstance
from ..line_ends import LINE_TOL
from ..result import BAD_ARGUMENT, OUT_OF_RANGE, ModelError, Result, fmt
from ...numerics import anywhere, everywhere
from . import density, saturation
from .equation import HelmholtzEquation


# An equation whose stated range ends below 1.5 Tc (R-134a's, at 455 K = 1.22 Tc) is used up to 1.5 Tc,
# as an extrapolation: there the residual part is small and smooth (R-134a's agrees with the mapped
# propane equation at 561 K to 2.5 % in density, as it does at 455 K, with smooth heat capacities)
_T_EXTRAPOLATED = 1.5  # times Tc
_CRITICAL_BAND = 3e-8  # relative: closer to the critical temperature the two branches count as one


class EquationSubstance(GeneralSubstance):
    """A substance whose fluid phases all come from one Helmholtz-energy equation of state."""

    def __init__(self, definition: Definition, equation: HelmholtzEquation):
        self.equation = equation
        super().__init__(definition)

    # --- the boiling line from the equation --------------------------------------------
    @cached_property
    def saturation(self) -> saturation.Saturation:
        """The equation's phase equilibrium, tabulated once (first use), from the published line's guesses.

        A user definition whose vapour-pressure line or liquid density is far from the equation's
        can leave Newton's method without a start; that is the definition's fault, said as such."""
        try:
            return saturation.Saturation(self.equation, self.t_low, self.boil_pressure_estimate,
                                         self.liquid_density_guess)
        except ArithmeticError:
            raise ModelError(BAD_ARGUMENT, f"the phase equilibrium of the equation of state '{self.equation.key}' "
                             "could not be started from this definition's vapour-pressure line and liquid density; "
                             "give the built-in substance's own lines and liquid density") from None

    def liquid_density_guess(self, T: np.ndarray) -> np.ndarray:
        """Saturated liquid density (mol/m3) to start the phase equilibrium from."""
        return 1.0 / self.liquid.saturated(T)

    def _p_boil(self, T: np.ndarray) -> np.ndarray:
        return self.saturation.pressure(T)

    def _t_boil(self, p: np.ndarray) -> np.ndarray:
        return self.saturation.temperature(p)

    def _setup_triple(self) -> None:
        # one equilibrium at the triple-point temperature (not the whole table: that waits for use)
        tt = self.definition.values.get("triple_point_temperature")
        self.has_triple = tt is not None
        if tt is None:
            self.triple = FixedPoint(np.nan, np.nan)
            return
        T = np.array([float(tt)])
        start = saturation.starting_densities(self.equation, T, self.boil_pressure_estimate(T),
                                              self.liquid_density_guess(T))
        p, self._rho_l_triple, _ = saturation.equilibrium(self.equation, T, *start)
        self.triple = FixedPoint(float(tt), float(p[0]))

    def _v_liquid_triple(self) -> float:
        return float(1.0 / self._rho_l_triple[0])

    @property
    def _p_top(self) -> float:
        return max(P_MAX, self.equation.p_max)

    @property
    def t_max(self) -> float:
        """The highest temperature of the fluid (K): the equation's, or 1.5 Tc as an extrapolation."""
        return max(self.equation.T_max, _T_EXTRAPOLATED * self.tc)

    def _latent_boil(self, T: np.ndarray) -> np.ndarray:
        return self.latent_heat("boil", T).values

    # --- densities on the equation's branches ------------------------------------------
    @cached_property
    def _delta_max(self) -> float:
        """Reduced density of the liquid at the lowest temperature and 1.5 times the equation's
        highest pressure: above every state of its range (p rises with T at constant density)."""
        eq = self.equation
        T = np.array(self.t_low)
        d_l = self.saturation.column("d_l", T)
        rho = density.solve(eq, T, np.array(1.5 * eq.p_max), d_l * 1.5, d_l, np.array(4.0 * d_l))
        return float(rho / eq.rhoc) if np.isfinite(rho) else float(4.0 * d_l)

    @cached_property
    def _fluid_starts(self) -> density.FluidStarts:
        """Starts for the single fluid: the equation's roots on a grid, solved on first use from the cubic
        equation's densities."""
        eq = self.equation
        return density.FluidStarts(eq, self.t_max, self.pc, 1.5 * self._p_top, self._delta_max,
                                   lambda T, p: 1.0 / (self.eos.volume(T, p, "vapor") * eq.rhoc))

    def _density(self, T: np.ndarray, p: np.ndarray, branch: int) -> np.ndarray:
        """Molar density on the liquid-like (LIQUID), vapour-like (VAPOR) branch below the critical
        temperature or the single root (FLUID) above it; NaN where the branch does not reach p."""
        eq, sat = self.equation, self.saturation
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        ideal = p / (eq.R * T * eq.rhoc)  # the ideal gas's reduced density
        top = np.array(self._delta_max)  # solve broadcasts it
        if branch != FLUID and anywhere(T > self.tc * (1.0 - _CRITICAL_BAND)):
            # a hair below the critical temperature the branches are not resolved (their densities
            # differ by less than 1e-3): the one fluid stands for both
            near = T > self.tc * (1.0 - _CRITICAL_BAND)
            return np.where(near, self._density(T, p, FLUID), self._density(np.where(near, self.t_low, T), p, branch))
        if branch == FLUID:
            guess = self._fluid_starts(T, p)
            return density.solve(eq, T, p, np.where(np.isfinite(guess), guess, ideal), ideal / 20.0, top)
        ps = sat.pressure(T)
        if branch == LIQUID:
            d_l, sl, p_sl, stiff_l = sat.columns(T, "d_l", "sl", "p_sl", "stiff_l")
            compressed = p >= ps
            # each start computed only where some state needs it (a single state: one of the two)
            with np.errstate(invalid="ignore", divide="ignore"):
                guess = d_l + (p - ps) / stiff_l if everywhere(compressed) else np.where(
                    compressed, d_l + (p - ps) / stiff_l,
                    sl + (d_l - sl) * np.sqrt(np.clip((p - p_sl) / (ps - p_sl), 0.0, 1.0)))
            return density.solve(eq, T, p, guess, sl, top)
        d_v, sv, p_sv = sat.columns(T, "d_v", "sv", "p_sv")
        # below the saturation pressure Z = 1 + b delta through the saturated vapour; above it the
        # isotherm's parabola towards its maximum, the spinodal
        below = p <= ps
        with np.errstate(invalid="ignore", divide="ignore"):
            b = (ps / (eq.R * T * eq.rhoc * d_v) - 1.0) / d_v
            virial = 2.0 * ideal / (1.0 + np.sqrt(np.maximum(1.0 + 4.0 * b * ideal, 0.0)))
            guess = virial if everywhere(below) else np.where(
                below, virial, sv - (sv - d_v) * np.sqrt(np.clip((p_sv - p) / (p_sv - ps), 0.0, 1.0)))
        cold = T < self.t_low  # gas below the triple point: low density, far from any spinodal
        if anywhere(cold):
            return density.solve(eq, T, p, np.where(cold, ideal, guess), 0.5 * ideal,
                                 np.where(cold, np.minimum(4.0 * ideal, sv), sv))
        return density.solve(eq, T, p, guess, 0.5 * ideal, sv)

    def _mu(self, T: np.ndarray, p: np.ndarray, rho: np.ndarray) -> np.ndarray:
        """Chemical potential relative to the ideal gas at T and P0."""
        with np.errstate(invalid="ignore"):
            return self._mu_at(T, rho, self.equation.mechanical(T, rho).g_density)

    def _mu_at(self, T, rho, g_density) -> np.ndarray:
        """mu - mu_ideal_gas(T, P0) from the density: RT ln(rho R T / P0) + (g - g_ideal_gas(T, rho)).
        Not RT ln(p/P0) + RT ln(phi), whose ln(p) and ln(Z) each carry the rounding of a liquid's
        pressure at low temperature (propane at its triple point: 0.3 % of 1.7e-4 Pa, 2 J/mol)."""
        return self.equation.R * T * np.log(rho * self.equation.R * T / P0) + g_density

    def _mu_vapor(self, T, p) -> np.ndarray:
        return self._mu(T, p, self._density(T, p, VAPOR))

    def _mu_liquid(self, T, p) -> np.ndarray:
        """The dense fluid's: the liquid below the critical temperature, the one fluid above it."""
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        rho = np.where(T < self.tc, self._density(T, p, LIQUID), self._density(T, p, FLUID))
        return self._mu(T, p, rho)

    def _melt_anchor(self, T: np.ndarray, p_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(chemical potential of the dense fluid, molar volume of the solid) on the melting line. The
        solid's volume is the dense fluid's there times the ratio v_solid / v_liquid of the triple
        point: the solid stays the denser phase, so the enthalpy of melting stays positive, as the line
        climbs to pressures where a solid of the triple point's volume would be the less dense phase
        (nitrogen's fluid at 2 GPa is 30 % denser than its solid at the triple point)."""
        T, p_m = np.broadcast_arrays(np.asarray(T, float), np.asarray(p_m, float))
        rho = np.where(T < self.tc, self._density(T, p_m, LIQUID), self._density(T, p_m, FLUID))
        return self._mu(T, p_m, rho), self.v_solid / (rho * self._v_liquid_triple())

    # --- fluid phases -------------------------------------------------------------------
    def _in_range(self, t: np.ndarray, q: np.ndarray) -> Result:
        eq = self.equation
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(q > eq.p_max * (1 + LINE_TOL), OUT_OF_RANGE, "{} Pa is above the range of the " + eq.title
                 + f" ({fmt(eq.p_max)} Pa)", q)
        sub.flag(t > self.t_max * (1 + LINE_TOL), OUT_OF_RANGE, "{} K is above the range of the " + eq.title
                 + f" ({fmt(self.t_max)} K)", t)
        return sub

    def _beyond(self, sub: Result, rho: np.ndarray, t, q, phase: str, column: str, ends: str) -> None:
        sub.flag(np.isnan(rho), OUT_OF_RANGE, lambda tt, qq: f"{phase} {self.name} at {fmt(tt)} K and {fmt(qq)} Pa "
                 f"is beyond its spinodal: the {phase} branch of the equation {ends} "
                 f"{fmt(self.saturation.column(column, tt))} Pa at this temperature", t, q)

    def _liquid(self, t, q, sel, r: Result, fields) -> None:
        sub = self._in_range(t, q)
        sub.flag(t < self.t_low * (1 - LINE_TOL), OUT_OF_RANGE, "liquid " + self.name + " at {} K is below the "
                 + self._low_name() + f" ({fmt(self.t_low)} K)", t)
        self._flag_frozen(sub, t, q)
        t_in = np.maximum(t, self.t_low)
        rho = self._density(t_in, q, LIQUID)
        self._beyond(sub, rho, t, q, "liquid", "p_sl", "reaches down to")
        self._store_state(fields, sel, r, sub, t_in, q, rho)

    def _vapor(self, t, q, sel, r: Result, fields) -> None:
        sub = self._in_range(t, q)
        cold = t < self.t_low
        if cold.any():
            if self._sub_range is None:
                sub.flag(cold, OUT_OF_RANGE, "{} K is below the " + self._low_name() + f" of {self.name}", t)
            else:
                lo = self._sub_range[0]
                sub.flag(cold & (t < lo), OUT_OF_RANGE, "{} K is below the sublimation line's range for "
                         + f"{self.name} ({fmt(lo)} K)", t)
                p_sub = self._p_sub(np.clip(t, lo, self.t_low))
                sub.flag(cold & (q > p_sub * (1 + LINE_TOL)), OUT_OF_RANGE, lambda tt, qq: f"{self.name} vapour at "
                         f"{fmt(tt)} K and {fmt(qq)} Pa is above its sublimation pressure: vapour supersaturated "
                         "over the solid is outside the model", t, q)
        rho = self._density(t, q, VAPOR)
        self._beyond(sub, rho, t, q, "vapour", "p_sv", "reaches up to")
        self._store_state(fields, sel, r, sub, t, q, rho)

    def _fluid(self, t, q, sel, r: Result, fields) -> None:
        sub = self._in_range(t, q)
        self._flag_frozen(sub, t, q, "fluid")
        rho = self._density(t, q, FLUID)
        sub.flag(np.isnan(rho), OUT_OF_RANGE, lambda tt, qq: f"the equation gives no density for {self.name} at "
                 f"{fmt(tt)} K and {fmt(qq)} Pa", t, q)
        self._store_state(fields, sel, r, sub, t, q, rho)

    def _store_state(self, fields, sel, r: Result, sub: Result, t, q, rho) -> None:
        """The wanted properties at (t, rho): the cheap mechanical ones unless caloric ones are asked for."""
        eq = self.equation
        values = {"v": 1.0 / rho}
        with np.errstate(invalid="ignore", divide="ignore"):
            if any(fields.wants(name) for name in ("h", "s", "cp")):
                state = eq.state(t, rho)
                values.update(h=state.h, s=state.s, cp=state.cp, alpha=state.alpha, kappa=state.kappa,
                              g=self._mu_at(t, rho, state.g_density))
            elif any(fields.wants(name) for name in ("alpha", "kappa", "g")):
                m = eq.mechanical(t, rho)
                values.update(alpha=m.alpha, kappa=m.kappa, g=self._mu_at(t, rho, m.g_density))
        self._store(fields, sel, r, sub, **values)

    # --- quantities from the equation's enthalpies ----------------------------------------
    def latent_heat(self, boundary: str, T: np.ndarray) -> Result:
        """Boiling: h'' - h' from the equation; melting and sublimation: Clapeyron (general model)."""
        if boundary != "boil":
            return super().latent_heat(boundary, T)
        T = self.onto_line(boundary, T)
        p, _ = self.line_pressure(boundary, T)
        out = Result.joined(p)
        with np.errstate(invalid="ignore"):
            out.fill(self._boiling_enthalpy(np.asarray(T, float), p.values))
        return out

    def _boiling_enthalpy(self, T: np.ndarray, p: np.ndarray) -> np.ndarray:
        """h'' - h' (J/mol) at T and its vapour pressure p from the residual part alone: the ideal-gas
        part is the same in both phases at one temperature, so a substance without an ideal-gas heat
        capacity has its enthalpy of boiling too."""
        eq = self.equation
        rho = np.concatenate([self._density(T, p, VAPOR).ravel(), self._density(T, p, LIQUID).ravel()])
        tt = np.concatenate([T.ravel(), T.ravel()])
        r = eq.residual(tt, rho, ("t", "d"))
        h = eq.R * tt * (r["t"] + r["d"])
        n = T.size
        return (h[:n] - h[n:]).reshape(T.shape)

    # --- what SUBSTANCE_INFO says ------------------------------------------------------------
    def _models(self) -> dict[str, tuple[str, str]]:
        models = super()._models()
        eq = self.equation
        span = f"{fmt(eq.T_min)} K to {fmt(self.t_max)} K, up to {fmt(eq.p_max)} Pa" + (
            f" (above {fmt(eq.T_max)} K an extrapolation of the equation)" if self.t_max > eq.T_max else "")
        cold = (f"; below {fmt(self.t_low)} K gas up to the sublimation pressure, down to {fmt(self._sub_range[0])} K "
                "(an extrapolation of the equation below its stated range)" if self._sub_range else "")
        models.update({
            "equation": (eq.title, span),
            "boil": (f"phase equilibrium of the {eq.title} (equal pressure and chemical potential)",
                     models["boil"][1]),
            "vapor": (eq.title, span + "; metastable vapour up to the spinodal" + cold),
            "liquid": (eq.title, span + "; metastable liquid down to the spinodal, not beyond the melting line"),
            "fluid": (eq.title, f"{fmt(self.tc)} K to {fmt(self.t_max)} K, up to {fmt(eq.p_max)} Pa, not beyond the "
                      "melting line"),
            "chem_potential": ("R T ln(p/p0) + the equation's residual Gibbs energy, relative to the ideal gas at the "
                               f"same temperature and {fmt(P0 / 1e3)} kPa; the solid's anchored to the fluid's on the melting "
                               "and sublimation lines", ""),
            "latent_heat": ("boiling: h'' - h' from the equation; melting and sublimation: Clapeyron equation with the "
                            "model's volumes and the lines' slopes", models["boil"][1]),
            "uncertainty": (eq.uncertainty, span),
        })
        if self.definition.equation:  # its own equation: the heat capacity is the equation's ideal part
            models["ideal_gas_cp"] = (f"ideal part of the {eq.title}", span)
        return models

    def _model_source(self, key: str) -> str:
        if key in ("equation", "boil", "vapor", "liquid", "fluid", "chem_potential", "uncertainty") or (
                key == "ideal_gas_cp" and self.definition.equation):
            return self.equation.reference
        if key == "latent_heat":
            return self.equation.reference + "; " + self.definition.sources.get("melt", "")
        return super()._model_source(key)
