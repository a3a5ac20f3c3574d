"""The water model: IAPWS formulations assembled into one substance.

Boundaries (these decide the stable phase):
  boiling      IAPWS-IF97 region 4 (273.16 K .. 647.096 K)
  melting      IAPWS R14-08 ice Ih, III, V, VI, VII lines (251.165 K .. 715 K, to 20.6 GPa)
  sublimation  IAPWS R14-08 ice Ih line (50 K .. 273.16 K)
Phases (these give volumes, enthalpies and chemical potentials):
  liquid       IF97 region 1 to 623.15 K, region 3 (liquid-like root) above;
               region 1 extended down to the ice Ih melting line and up to 210 MPa
  vapour       IF97 region 2, region 3 (vapour-like root) between the B23 line and
               saturation; region 2 extended down to 200 K at or below the sublimation pressure
  fluid        above 647.096 K: region 2 / region 3 (split by B23), region 2 to 1073.15 K,
               region 5 to 2273.15 K and 50 MPa
  ice Ih       IAPWS R10-06 (T <= 273.16 K, p <= 210 MPa, not above its melting line)
  ice III..VII labels only: solid-solid boundaries (including ice II) are not modelled;
               a solid above the ice Ih line's top pressure (208.566 MPa) is named after the
               melting-line segment whose pressure range holds it; no volume formulation.

Chemical potentials are molar Gibbs energies on the IAPWS-95 reference state
(internal energy and entropy of the saturated liquid at the triple point are zero),
which IF97 and R10-06 share.

>>> w = Water()
>>> round(float(w.boil_temperature(np.array(101325.0)).values), 4)
373.1243
>>> str(w.stable_phase(np.array(300.0), np.array(1e5)).values)
'liquid'
"""

from __future__ import annotations

import numpy as np

from ...data import constant, load
from ..base import FLUID, LIQUID, SOLID, VAPOR, FixedPoint, InfoItem, Substance
from ..phase_map import LINE_TOL, classify, state_table
from ..props import Props
from ..result import BAD_ARGUMENT, NOT_AVAILABLE, OUT_OF_RANGE, ModelError, Result, fmt
from . import ice_ih, ice_lines, if97, if97_region3, if97_saturation

_DATA = "water/water"
M = constant(_DATA, "molar_mass").value
TC = constant(_DATA, "critical_temperature").value
PC = constant(_DATA, "critical_pressure").value
TT = constant(_DATA, "triple_point_temperature").value
PT = constant(_DATA, "triple_point_pressure").value

# The lines' ends take the same slack: 0.01 degC converts to 273.15999999999997 K, and
# BOIL_PRESSURE at 647.096 K gives a hair above 22.064 MPa.
MELT_JOIN_TOL = 1e-6  # the R14-08 ice Ih and III lines meet at 251.165 K only to 1.5e-7 in T

REGION1_T_MAX = 623.15  # K, IF97 regions 1/3 and 2/3 split below the B23 line's start
REGION2_T_MIN = 200.0  # K, lowest temperature of the region 2 extension along the sublimation line
REGION3_T_MAX = 863.15  # K, top of the B23 line
REGION2_T_MAX = 1073.15  # K
REGION5_T_MAX = 2273.15  # K
P_MAX_FLUID = 100e6  # Pa, regions 1, 2 and 3
P_MAX_LIQUID = 210e6  # Pa, region 1 extended along the ice Ih melting line
P_MAX_REGION5 = 50e6  # Pa
ICE_IH_P_MAX = 210e6  # Pa, IAPWS R10-06 range
META_VAPOUR_P_MAX = constant(_DATA, "metastable_vapour_p_max").value
META_VAPOUR_MOISTURE = constant(_DATA, "metastable_vapour_moisture").value
SUPERHEAT_MARGIN = constant(_DATA, "superheated_liquid_margin").value
SUPERCOOL_MARGIN = constant(_DATA, "supercooled_liquid_margin").value

SOLIDS = tuple(f"ice {name}" for name in ice_lines.ICES)  # ice Ih, ice III, ice V, ice VI, ice VII
_IH_P_TOP = ice_lines.line_range("Ih")[1][1]  # 208.566 MPa, the ice Ih-III-liquid triple point
_MELT_P_TOP = ice_lines.line_range("VII")[1][1]
_SUB_T_MIN, _SUB_T_MAX = ice_lines.line_range("sublimation")[0]
_MELT_T_MIN = ice_lines.line_range("Ih")[0][0]  # 251.165 K
_MELT_T_MAX = ice_lines.line_range("VII")[0][1]  # 715 K
# the published end, below which the inverse gives NaN (the equation gives 2.6e-7 less at 50 K)
_SUB_P_MIN = ice_lines.line_range("sublimation")[1][0]
# below 632.4 MPa (ice V-VI-liquid) no melting line is warmer than 273.31 K
_MELT_T_NEAR = ice_lines.line_range("V")[0][1]
_MELT_P_NEAR = ice_lines.line_range("V")[1][1]

# messages of the range checks made on every call, formatted once
_ABOVE_ICE_VII = "{} Pa is above the top of the ice VII melting line (" + fmt(_MELT_P_TOP) + " Pa)"
_BELOW_SUBLIMATION = "{} Pa is below the sublimation line's range (" + fmt(_SUB_P_MIN) + " Pa at 50 K)"

_LABELS, _STATE_PHASE = state_table(SOLIDS)


def _lowest_branches() -> tuple[np.ndarray, np.ndarray]:
    """Temperature edges and, between them, the ice whose melting line has the lowest pressure.

    searchsorted(edges, T) indexes the second array; -1 (then SOLID - 1) marks no line.
    """
    edges, ices = [], []
    for k, ice in enumerate(ice_lines.ICES):
        (t_lo, t_hi), _ = ice_lines.line_range(ice)
        if not edges:
            edges.append(t_lo * (1 - LINE_TOL))
        if t_hi * (1 + LINE_TOL) > edges[-1]:  # ice III lies under ice Ih's range: never the lowest
            edges.append(t_hi * (1 + LINE_TOL))
            ices.append(k)
    return np.array(edges), np.array([-1] + ices + [-1])


_LOWEST_EDGES, _LOWEST_ICE = _lowest_branches()


def _molar(p: Props) -> Props:
    return Props(p.v * M, p.h * M, p.s * M, p.g * M, p.cp * M, p.alpha, p.kappa)


class Water(Substance):
    name = load(_DATA)["name"]
    molar_mass = M
    critical = FixedPoint(TC, PC)
    triple = FixedPoint(TT, PT)
    solids = SOLIDS

    # --- boundaries -------------------------------------------------------------------
    def boil_pressure(self, T: np.ndarray) -> Result:
        r = Result.like(T)
        r.flag(T < TT * (1 - LINE_TOL), OUT_OF_RANGE, "{} K is below the triple-point temperature of water (273.16 K)",
               T, see="sublime")
        r.flag(T > TC * (1 + LINE_TOL), OUT_OF_RANGE, "{} K is above the critical temperature of water (647.096 K): "
               "there is no liquid-vapour line above it", T)
        r.fill(if97_saturation.saturation_pressure(T))
        return r

    def boil_temperature(self, p: np.ndarray) -> Result:
        r = Result.like(p)
        r.flag(p < PT * (1 - LINE_TOL), OUT_OF_RANGE, "{} Pa is below the triple-point pressure of water (611.657 Pa)",
               p, see="sublime")
        r.flag(p > PC * (1 + LINE_TOL), OUT_OF_RANGE, "{} Pa is above the critical pressure of water (22.064 MPa): "
               "there is no liquid-vapour line above it", p)
        r.fill(if97_saturation.saturation_temperature(p))
        return r

    def melt_pressure(self, T: np.ndarray, solid: int | None = None) -> tuple[Result, np.ndarray]:
        r = Result.like(T)
        if solid is None:
            # the lowest melting pressure at T: the first line (in order of pressure) that reaches T
            codes = SOLID + _LOWEST_ICE[np.searchsorted(_LOWEST_EDGES, T)]
            r.flag(codes < SOLID, OUT_OF_RANGE, "{} K is outside the melting lines of water (251.165 K to 715 K)", T)
        else:
            ice = ice_lines.ICES[solid - SOLID]
            (t_lo, t_hi), _ = ice_lines.line_range(ice)
            codes = np.full(np.shape(T), solid)
            r.flag((T < t_lo * (1 - LINE_TOL)) | (T > t_hi * (1 + LINE_TOL)), OUT_OF_RANGE,
                   "{} K is outside the ice " + ice + f" melting line ({fmt(t_lo)} K to {fmt(t_hi)} K)", T)
        for code in np.unique(codes[np.broadcast_to(r.ok, np.shape(T))]):
            r.fill(ice_lines.melting_pressure(T, ice_lines.ICES[code - SOLID]), where=codes == code)
        return r, codes

    def melt_temperature(self, p: np.ndarray) -> tuple[Result, np.ndarray]:
        r = Result.like(p)
        r.flag(p < PT * (1 - LINE_TOL), OUT_OF_RANGE, "{} Pa is below the triple-point pressure of water (611.657 Pa)",
               p, see="sublime")
        r.flag(p > _MELT_P_TOP * (1 + LINE_TOL), OUT_OF_RANGE,
               _ABOVE_ICE_VII, p)
        inside = np.clip(p, PT, _MELT_P_TOP)  # the inverse gives NaN past the ends
        T, index = ice_lines.melting_temperature_any(np.where(np.broadcast_to(r.ok, np.shape(p)), inside, np.nan))
        r.fill(T)
        return r, SOLID + np.maximum(index, 0)

    def sublime_pressure(self, T: np.ndarray) -> Result:
        r = Result.like(T)
        r.flag(T > TT * (1 + LINE_TOL), OUT_OF_RANGE, "{} K is above the triple-point temperature of water (273.16 K)",
               T, see="boil")
        r.flag(T < _SUB_T_MIN * (1 - LINE_TOL), OUT_OF_RANGE, "{} K is below the sublimation line's range (50 K)", T)
        r.fill(ice_lines.sublimation_pressure(T))
        return r

    def sublime_temperature(self, p: np.ndarray) -> Result:
        r = Result.like(p)
        r.flag(p > PT * (1 + LINE_TOL), OUT_OF_RANGE, "{} Pa is above the triple-point pressure of water (611.657 Pa)",
               p, see="boil")
        r.flag(p < _SUB_P_MIN, OUT_OF_RANGE, _BELOW_SUBLIMATION, p)
        r.fill(ice_lines.sublimation_temperature(np.minimum(p, PT)))  # the inverse gives NaN past the end
        return r

    # --- stable phase -----------------------------------------------------------------
    def _classify(self, T: np.ndarray, p: np.ndarray) -> Result:
        """State codes (indices into _LABELS) from the boundary equations."""
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        r = Result(np.full(T.shape, -1.0))
        r.flag(T > REGION5_T_MAX, OUT_OF_RANGE,
               "{} K is above the highest temperature of the water formulations (2273.15 K)", T)
        r.flag(p > _MELT_P_TOP, OUT_OF_RANGE,
               _ABOVE_ICE_VII, p)
        r.flag((p < _SUB_P_MIN) & (T < TT), OUT_OF_RANGE,
               _BELOW_SUBLIMATION, p)
        high = p >= PT
        # the solid is stable below one line: melting above the triple-point pressure (a
        # single-valued T(p) there), sublimation below it
        t_solid = np.full(T.shape, -np.inf)
        ice = np.zeros(T.shape, dtype=int)
        melt = high & ((T <= _MELT_T_NEAR) | (p > _MELT_P_NEAR))  # elsewhere no melting line is near
        if melt.any():
            t_solid[melt], ice[melt] = ice_lines.melting_temperature_any(p[melt])
        sublime = ~high & (T <= TT * (1 + LINE_TOL)) & (p >= _SUB_P_MIN)
        if sublime.any():
            t_solid[sublime] = ice_lines.sublimation_temperature(p[sublime])
        # the liquid is stable below the boiling line; above the critical pressure below Tc
        t_boil = np.where(high, TC, -np.inf)
        sat = high & (p <= PC)
        if sat.any():
            t_boil[sat] = if97_saturation.saturation_temperature(p[sat])
        state = classify(T, p, t_solid=t_solid, solid=ice, t_boil=t_boil, sat=sat, high=high, pt=PT, tc=TC, pc=PC,
                         n_solids=len(SOLIDS))
        r.fill(state.astype(float))
        return r

    _labels, _state_phase = _LABELS, _STATE_PHASE

    # --- single-phase properties --------------------------------------------------------
    def _phase_methods(self) -> dict:
        return {LIQUID: self._liquid, VAPOR: self._vapor, FLUID: self._fluid, SOLID: self._ice}

    def _unmodelled(self, r: Result, phase: np.ndarray, blank: np.ndarray) -> None:
        if (phase > SOLID).any():
            r.flag((phase > SOLID) & ~blank, NOT_AVAILABLE,
                   lambda k: f"no volume formulation for {SOLIDS[k - SOLID]} (only ice Ih has one, IAPWS R10-06)",
                   phase)
            r.flag((phase > SOLID) & blank, NOT_AVAILABLE,
                   lambda k: f"the stable phase is {SOLIDS[k - SOLID]}, which has no volume formulation "
                   "(only ice Ih has one, IAPWS R10-06)", phase)

    def _liquid(self, t, q, sel, r: Result, fields) -> None:
        """Region 1 (region 3 above 623.15 K); named as a phase, also metastable: superheated up to
        SUPERHEAT_MARGIN above the saturation temperature, supercooled down to SUPERCOOL_MARGIN below
        the melting temperature."""
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(q > P_MAX_LIQUID, OUT_OF_RANGE, "liquid water at {} Pa is above the formulation's range (210 MPa)", q)
        sub.flag((t > REGION1_T_MAX) & (q > P_MAX_FLUID), OUT_OF_RANGE,
                 "liquid water above 623.15 K is covered to 100 MPa only; got {} Pa", q)
        warm = t >= TT
        p_sat = if97_saturation.saturation_pressure(np.clip(t, TT, TC))
        superheated = warm & (q < p_sat * (1 - LINE_TOL))
        if superheated.any():
            t_sat = np.full(t.shape, np.inf)
            t_sat[superheated] = if97_saturation.saturation_temperature(np.maximum(q[superheated], PT))
            sub.flag(superheated & ((t > t_sat + SUPERHEAT_MARGIN) | (t > REGION1_T_MAX)), OUT_OF_RANGE,
                     lambda tt, qq: f"liquid water at {fmt(tt)} K and {fmt(qq)} Pa is superheated by more than "
                     f"{fmt(SUPERHEAT_MARGIN)} K, the limit of the metastable liquid (IF97 region 1, saturation at "
                     f"{fmt(if97_saturation.saturation_temperature(max(qq, PT)))} K)", t, q)
        cold = t < TT
        sub.flag(cold & (q < PT), OUT_OF_RANGE, lambda tt, qq: f"liquid water at {fmt(tt)} K and {fmt(qq)} Pa is "
                 f"below the triple-point pressure ({fmt(PT)} Pa) as well as supercooled: outside the formulations",
                 t, q)
        if cold.any():
            t_melt = np.full(t.shape, -np.inf)
            t_melt[cold], _ = ice_lines.melting_temperature_any(np.maximum(q[cold], PT))
            sub.flag(cold & ((t < t_melt - SUPERCOOL_MARGIN) | (t < _MELT_T_MIN * (1 - MELT_JOIN_TOL))), OUT_OF_RANGE,
                     lambda tt, qq: f"liquid water at {fmt(tt)} K and {fmt(qq)} Pa is supercooled by more than "
                     f"{fmt(SUPERCOOL_MARGIN)} K below its melting temperature or below {fmt(_MELT_T_MIN)} K, the limit "
                     "of the metastable liquid (IF97 region 1 extended)", t, q)
        ok = np.equal(sub.problems, None) if sub.problems is not None else np.ones(t.shape, bool)
        low = ok & (t <= REGION1_T_MAX)
        if low.any():
            self._put_props(fields, sel, low, if97.region1(t[low], q[low]))
        near = ok & (t > REGION1_T_MAX)
        if near.any():
            self._put_region3(fields, sel, near, t, q, "liquid", sub)
        self._report(r, sel, sub)

    def _vapor(self, t, q, sel, r: Result, fields) -> None:
        """Region 2 (region 3 above B23); named as a phase, also supersaturated above the vapour
        pressure, by IF97's metastable-vapour equation, to the 5 % equilibrium moisture line."""
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(t < REGION2_T_MIN, OUT_OF_RANGE,
                 "water vapour below 200 K is outside the formulation (IF97 region 2 extended to 200 K); got {} K", t)
        cold = t < TT
        p_line = np.where(cold, ice_lines.sublimation_pressure(np.clip(t, REGION2_T_MIN, TT)),
                          if97_saturation.saturation_pressure(np.clip(t, TT, TC)))
        above = q > p_line * (1 + LINE_TOL)
        sub.flag(above & cold, OUT_OF_RANGE, lambda tt, qq: f"water vapour at {fmt(tt)} K and {fmt(qq)} Pa is above its "
                 "sublimation pressure: vapour supersaturated over ice is outside the formulations", t, q)
        sub.flag(above & ~cold & (q > META_VAPOUR_P_MAX), OUT_OF_RANGE,
                 lambda tt, qq: f"water vapour at {fmt(tt)} K and {fmt(qq)} Pa is above its vapour pressure: "
                 f"supersaturated vapour is covered to {fmt(META_VAPOUR_P_MAX)} Pa only (IF97's metastable-vapour "
                 "equation)", t, q)
        meta = above & ~cold & (q <= META_VAPOUR_P_MAX)
        meta_props = None
        if meta.any():
            tm, qm = t[meta], q[meta]
            meta_props = if97.region2_metastable(tm, qm)
            t_sat = if97_saturation.saturation_temperature(qm)
            h_liq, h_vap = if97.region1(t_sat, qm).h, if97.region2(t_sat, qm).h
            wet = np.zeros(t.shape, bool)
            wet[meta] = (meta_props.h - h_liq) / (h_vap - h_liq) < 1.0 - META_VAPOUR_MOISTURE
            sub.flag(wet, OUT_OF_RANGE, lambda tt, qq: f"water vapour at {fmt(tt)} K and {fmt(qq)} Pa is "
                     f"supersaturated beyond the {fmt(100 * META_VAPOUR_MOISTURE)} % equilibrium moisture line, where "
                     "IF97's metastable-vapour equation ends", t, q)
        ok = np.equal(sub.problems, None) if sub.problems is not None else np.ones(t.shape, bool)
        if meta_props is not None:
            keep = ok[meta]
            if keep.any():
                self._put_props(fields, sel, ok & meta, Props(*(np.asarray(f)[keep] for f in meta_props)))
            ok = ok & ~meta
        above_b23 = (t > REGION1_T_MAX) & (q > if97_saturation.b23_pressure(np.clip(t, REGION1_T_MAX, REGION3_T_MAX)))
        two = ok & ~above_b23
        if two.any():
            self._put_props(fields, sel, two, if97.region2(t[two], q[two]))
        three = ok & above_b23
        if three.any():
            self._put_region3(fields, sel, three, t, q, "vapour", sub)
        self._report(r, sel, sub)

    def _fluid(self, t, q, sel, r: Result, fields) -> None:
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(t > REGION5_T_MAX, OUT_OF_RANGE, "{} K is above the water formulations' range (2273.15 K)", t)
        sub.flag((t > REGION2_T_MAX) & (q > P_MAX_REGION5), OUT_OF_RANGE,
                 "above 1073.15 K water is covered to 50 MPa only (IF97 region 5); got {} Pa", q)
        sub.flag(q > P_MAX_FLUID, OUT_OF_RANGE, "{} Pa is above the water formulations' range for fluid (100 MPa)", q)
        ok = np.equal(sub.problems, None) if sub.problems is not None else np.ones(t.shape, bool)
        three = ok & (t <= REGION3_T_MAX) & (q > if97_saturation.b23_pressure(np.clip(t, REGION1_T_MAX, REGION3_T_MAX)))
        two = ok & ~three & (t <= REGION2_T_MAX)
        five = ok & (t > REGION2_T_MAX)
        if two.any():
            self._put_props(fields, sel, two, if97.region2(t[two], q[two]))
        if five.any():
            self._put_props(fields, sel, five, if97.region5(t[five], q[five]))
        if three.any():
            self._put_region3(fields, sel, three, t, q, "liquid", sub)
        self._report(r, sel, sub)

    def _ice(self, t, q, sel, r: Result, fields) -> None:
        sub = Result(np.full(t.shape, np.nan))
        sub.flag(t > TT * (1 + LINE_TOL), OUT_OF_RANGE, "ice Ih above 273.16 K is outside IAPWS R10-06; got {} K", t)
        sub.flag(q > ICE_IH_P_MAX, OUT_OF_RANGE, "ice Ih above 210 MPa is outside IAPWS R10-06; got {} Pa", q)
        melt = np.equal(sub.problems, None) if sub.problems is not None else np.ones(t.shape, bool)
        melt &= q > PT
        if melt.any():
            p_melt = np.full(t.shape, np.inf)
            p_melt[melt] = ice_lines.melting_pressure(np.clip(t[melt], _MELT_T_MIN, TT), "Ih")
            # the ice Ih line leans back: above it in pressure the ice has melted
            sub.flag(melt & (t >= _MELT_T_MIN) & (q > p_melt * (1 + LINE_TOL)), OUT_OF_RANGE,
                     lambda tt, qq: f"ice Ih at {fmt(tt)} K and {fmt(qq)} Pa is above its melting temperature", t, q)
        ok = np.equal(sub.problems, None) if sub.problems is not None else np.ones(t.shape, bool)
        if ok.any():
            self._put_props(fields, sel, ok, ice_ih.properties(t[ok], q[ok]))
        self._report(r, sel, sub)

    def _put_props(self, fields, sel, part, props: Props) -> None:
        self._put(fields, sel, part, _molar(props)._asdict())

    def _put_region3(self, fields, sel, part, t, q, branch: str, sub: Result) -> None:
        rho = if97_region3.density(t[part], q[part], branch)
        missing = np.zeros(t.shape, bool)
        missing[part] = np.isnan(rho)
        sub.flag(missing, OUT_OF_RANGE, "no " + branch + "-like density root of IF97 region 3 at {} K and {} Pa", t, q)
        good = part.copy()
        good[part] = ~np.isnan(rho)
        if good.any():
            self._put_props(fields, sel, good, if97_region3.properties_rho(rho[~np.isnan(rho)], t[good]))

    # --- description --------------------------------------------------------------------
    def info(self) -> dict[str, InfoItem]:
        items: dict[str, InfoItem] = {}
        for key, entry in load(_DATA)["constants"].items():
            items[key] = InfoItem(entry["value"], entry["unit"], entry["reference"])
        for key, (model, valid, source) in _MODELS.items():
            items[f"{key}_model"] = InfoItem(model, "", source)
            items[f"{key}_range"] = InfoItem(valid, "", source)
        return items


_MODELS = {
    "boil": ("IAPWS-IF97 region 4 saturation equation", "273.16 K to 647.096 K", "IAPWS R7-97(2012), eqs. 30-31"),
    "melt": ("IAPWS R14-08 melting-pressure equations of ice Ih, III, V, VI, VII",
             "251.165 K to 715 K, 611.657 Pa to 20.618 GPa", "IAPWS R14-08(2011), eqs. 1-5"),
    "sublime": ("IAPWS R14-08 sublimation-pressure equation of ice Ih", "50 K to 273.16 K", "IAPWS R14-08(2011), eq. 6"),
    "liquid": ("IAPWS-IF97 region 1 (region 3 above 623.15 K)",
               "melting line to 647.096 K, vapour pressure to 100 MPa (region 1 extended to 210 MPa); named "
               f"as a phase also metastable: superheated to {SUPERHEAT_MARGIN:g} K above saturation, supercooled "
               f"to {SUPERCOOL_MARGIN:g} K below the melting line (region 1 extended, not below the triple-point "
               "pressure)",
               "IAPWS R7-97(2012), sections 5 and 7"),
    "vapor": ("IAPWS-IF97 region 2 (region 3 between the B23 line and saturation); supersaturated vapour: "
              "IF97's metastable-vapour equation",
              "200 K to 647.096 K up to the vapour or sublimation pressure (region 2 extended below 273.15 K); "
              f"supersaturated above 273.16 K to the {100 * META_VAPOUR_MOISTURE:g} % equilibrium moisture line "
              f"and {META_VAPOUR_P_MAX / 1e6:g} MPa",
              "IAPWS R7-97(2012), sections 6 and 7 (metastable vapour: section 6.2)"),
    "fluid": ("IAPWS-IF97 regions 2, 3 and 5", "647.096 K to 1073.15 K up to 100 MPa; to 2273.15 K up to 50 MPa",
              "IAPWS R7-97(2012), sections 6, 7 and 9"),
    "solid": ("IAPWS R10-06 Gibbs function of ice Ih", "up to 273.16 K and 210 MPa, not above the melting line",
              "IAPWS R10-06(2009)"),
    "chem_potential": ("molar Gibbs energy, IAPWS-95 reference state: u = 0 and s = 0 for the saturated "
                       "liquid at the triple point", "", "IAPWS R6-95(2018); IAPWS R7-97(2012); IAPWS R10-06(2009)"),
}
