"""The water model: IAPWS formulations assembled into one substance.

Boundaries (these decide the stable phase):
  boiling      IAPWS-IF97 region 4 (273.16 K .. 647.096 K)
  melting      IAPWS R14-08 ice Ih, III, V, VI, VII lines (251.165 K .. 715 K, to 20.6 GPa)
  sublimation  IAPWS R14-08 ice Ih line (50 K .. 273.16 K)
Phases (these give volumes, enthalpies and chemical potentials):
  liquid       IF97 region 1 to 623.15 K, region 3 (liquid-like root) above, to 100 MPa;
               region 1 extended below 273.15 K down to the ice Ih melting line (to 100 MPa);
               above 100 MPa IAPWS-95 (iapws95.py) to 1000 MPa, bounded by the melting lines
               of ice Ih, III, V and VI
  vapour       IF97 region 2, region 3 (vapour-like root) between the B23 line and
               saturation; region 2 extended down to 200 K at or below the sublimation pressure
  fluid        above 647.096 K: region 2 / region 3 (split by B23), region 2 to 1073.15 K,
               region 5 to 2273.15 K and 50 MPa; IAPWS-95 above them (above 100 MPa to
               1073.15 K, above 50 MPa to 1273 K) up to 1000 MPa
  ice Ih       IAPWS R10-06 (T <= 273.16 K, p <= 210 MPa, not above its melting line)
  ice III..VII labels only: solid-solid boundaries (including ice II) are not modelled;
               a solid above the ice Ih line's top pressure (208.566 MPa) is named after the
               melting-line segment whose pressure range holds it; no volume formulation.

Chemical potentials are molar Gibbs energies on the IAPWS-95 reference state
(internal energy and entropy of the saturated liquid at the triple point are zero),
which IF97 and R10-06 share; IAPWS-95 itself is shifted onto IF97's realisation of it
(iapws95.shift: its h and s equal IF97 region 1's at the triple point).

>>> w = Water()
>>> round(float(w.boil_temperature(np.array(101325.0)).values), 4)
373.1243
>>> str(w.stable_phase(np.array(300.0), np.array(1e5)).values)
'liquid'
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ...data import constant, load
from ..base import FLUID, LIQUID, SOLID, VAPOR, FixedPoint, InfoItem, Substance
from ..line_ends import LINE_TOL, clamp
from ..phase_map import classify, state_table
from ..props import Props
from ...numerics import anywhere, everywhere
from ..result import NOT_AVAILABLE, OUT_OF_RANGE, Result, broadcast, empty_like, filled, fmt, single
from . import iapws95, ice_ih, ice_lines, if97, if97_region3, if97_saturation

_DATA = "water/water"
M = constant(_DATA, "molar_mass").value
TC = constant(_DATA, "critical_temperature").value
PC = constant(_DATA, "critical_pressure").value
TT = constant(_DATA, "triple_point_temperature").value
PT = constant(_DATA, "triple_point_pressure").value

# The lines' ends take the same slack: 0.01 degC converts to 273.15999999999997 K, and
# BOIL_PRESSURE at 647.096 K gives a hair above 22.064 MPa.
MELT_JOIN_TOL = 1e-6  # the R14-08 ice Ih and III lines meet at 251.165 K only to 1.5e-7 in T

# Limits, each read once from the data file of the formulation it bounds
REGION1_T_MAX = if97.REGION1_T_MAX  # regions 1/3 and 2/3 split here, where the B23 line starts
B23_T_MAX = if97_saturation.B23_T_MAX  # top of the B23 line, the highest temperature of region 3
REGION2_T_MAX = if97.REGION2_T_MAX
REGION5_T_MAX = if97.REGION5_T_MAX  # the highest temperature of the water formulations
P_MAX_FLUID = if97.P_MAX  # regions 1, 2 and 3
P_MAX_REGION5 = if97.REGION5_P_MAX
ICE_IH_T_MAX = ice_ih.T_MAX
ICE_IH_P_MAX = ice_ih.P_MAX
# IAPWS-95 takes the fluid beyond IF97's pressures, within its own validated range
IAPWS95_T_MAX = iapws95.T_MAX
IAPWS95_P_MAX = iapws95.P_MAX
REGION2_T_MIN = constant(_DATA, "region2_extension_t_min").value  # along the sublimation line
META_VAPOUR_P_MAX = constant(_DATA, "metastable_vapour_p_max").value
META_VAPOUR_MOISTURE = constant(_DATA, "metastable_vapour_moisture").value
SUPERHEAT_MARGIN = constant(_DATA, "superheated_liquid_margin").value
SUPERCOOL_MARGIN = constant(_DATA, "supercooled_liquid_margin").value

SOLIDS = tuple(f"ice {name}" for name in ice_lines.ICES)  # ice Ih, ice III, ice V, ice VI, ice VII
_MELT_P_TOP = ice_lines.line_range("VII")[1][1]
_SUB_T_MIN = ice_lines.line_range("sublimation")[0][0]
_MELT_T_MIN = ice_lines.line_range("Ih")[0][0]  # the ice Ih-III-liquid triple point
_MELT_T_MAX = ice_lines.line_range("VII")[0][1]
# the published end, below which the inverse gives NaN (the equation gives 2.6e-7 less at its lowest T)
_SUB_P_MIN = ice_lines.line_range("sublimation")[1][0]
# below the ice V-VI-liquid triple point no melting line is warmer than that point
_MELT_T_NEAR = ice_lines.line_range("V")[0][1]
_MELT_P_NEAR = ice_lines.line_range("V")[1][1]


def _k(T: float) -> str:
    return fmt(T) + " K"


def _pa(p: float) -> str:
    return fmt(p) + " Pa"


def _mpa(p: float) -> str:
    return fmt(p / 1e6) + " MPa"


def _gpa(p: float) -> str:
    return fmt(p / 1e9) + " GPa"


# Every message the model gives, formatted once from the limits above; "{}" takes the element's values.
MESSAGES = {
    "below_triple_t": "{} K is below the triple-point temperature of water (" + _k(TT) + ")",
    "above_triple_t": "{} K is above the triple-point temperature of water (" + _k(TT) + ")",
    "below_triple_p": "{} Pa is below the triple-point pressure of water (" + _pa(PT) + ")",
    "above_triple_p": "{} Pa is above the triple-point pressure of water (" + _pa(PT) + ")",
    "above_critical_t": "{} K is above the critical temperature of water (" + _k(TC) + "): there is no "
                        "liquid-vapour line above it",
    "above_critical_p": "{} Pa is above the critical pressure of water (" + _mpa(PC) + "): there is no "
                        "liquid-vapour line above it",
    "outside_melting": "{} K is outside the melting lines of water (" + _k(_MELT_T_MIN) + " to " + _k(_MELT_T_MAX)
                       + ")",
    **{f"outside_melting_{ice}": "{} K is outside the ice " + ice + " melting line (" + _k(t_lo) + " to " + _k(t_hi)
       + ")" for ice in ice_lines.ICES for (t_lo, t_hi) in [ice_lines.line_range(ice)[0]]},
    "above_ice_vii": "{} Pa is above the top of the ice VII melting line (" + _pa(_MELT_P_TOP) + ")",
    "below_sublimation_t": "{} K is below the sublimation line's range (" + _k(_SUB_T_MIN) + ")",
    "below_sublimation_p": "{} Pa is below the sublimation line's range (" + _pa(_SUB_P_MIN) + " at "
                           + _k(_SUB_T_MIN) + ")",
    "above_formulations_t": "{} K is above the highest temperature of the water formulations ("
                            + _k(REGION5_T_MAX) + ")",
    "liquid_above_p": "liquid water at {} Pa is above the formulations' range (" + _mpa(IAPWS95_P_MAX)
                      + ", IAPWS-95)",
    "dense_liquid_below_melting": "liquid water at {} K and {} Pa is below its melting temperature ({} K): above "
                                  + _mpa(P_MAX_FLUID) + " the liquid is taken from IAPWS-95, which holds from the "
                                  "melting line up",
    "superheated_liquid": "liquid water at {} K and {} Pa is superheated by more than " + _k(SUPERHEAT_MARGIN)
                          + ", the limit of the metastable liquid (IF97 region 1, saturation at {} K)",
    "supercooled_below_triple_p": "liquid water at {} K and {} Pa is below the triple-point pressure ("
                                  + _pa(PT) + ") as well as supercooled: outside the formulations",
    "supercooled_liquid": "liquid water at {} K and {} Pa is supercooled by more than " + _k(SUPERCOOL_MARGIN)
                          + " below its melting temperature or below " + _k(_MELT_T_MIN) + ", the limit of the "
                          "metastable liquid (IF97 region 1 extended)",
    "cold_vapour": "water vapour below " + _k(REGION2_T_MIN) + " is outside the formulation (IF97 region 2 "
                   "extended to " + _k(REGION2_T_MIN) + "); got {} K",
    "vapour_over_ice": "water vapour at {} K and {} Pa is above its sublimation pressure: vapour supersaturated "
                       "over ice is outside the formulations",
    "supersaturated_above_p": "water vapour at {} K and {} Pa is above its vapour pressure: supersaturated vapour "
                              "is covered to " + _pa(META_VAPOUR_P_MAX) + " only (IF97's metastable-vapour "
                              "equation)",
    "supersaturated_too_wet": "water vapour at {} K and {} Pa is supersaturated beyond the "
                              + fmt(100 * META_VAPOUR_MOISTURE) + " % equilibrium moisture line, where IF97's "
                              "metastable-vapour equation ends",
    "fluid_hot": "{} K is above the water formulations' range (" + _k(REGION5_T_MAX) + ")",
    "fluid_region5_above_p": "above " + _k(IAPWS95_T_MAX) + " water is covered to " + _mpa(P_MAX_REGION5)
                             + " only (IF97 region 5); got {} Pa",
    "fluid_above_p": "{} Pa is above the water formulations' range for fluid (" + _mpa(IAPWS95_P_MAX)
                     + ", IAPWS-95)",
    "ice_hot": "ice Ih above " + _k(ICE_IH_T_MAX) + " is outside IAPWS R10-06; got {} K",
    "ice_above_p": "ice Ih above " + _mpa(ICE_IH_P_MAX) + " is outside IAPWS R10-06; got {} Pa",
    "ice_melted": "ice Ih at {} K and {} Pa is above its melting temperature",
    **{f"no_region3_root_{branch}": "no " + branch + "-like density root of IF97 region 3 at {} K and {} Pa"
       for branch in ("liquid", "vapour")},
    "no_iapws95_root": "no density root of IAPWS-95 at {} K and {} Pa",
    **{f"no_volume_{solid}": "no volume formulation for " + solid + " (only ice Ih has one, IAPWS R10-06)"
       for solid in SOLIDS[1:]},
    **{f"stable_without_volume_{solid}": "the stable phase is " + solid + ", which has no volume formulation "
       "(only ice Ih has one, IAPWS R10-06)" for solid in SOLIDS[1:]},
}

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


_PER_KG = ("v", "h", "s", "g", "cp")  # the fields a molar mass turns into molar ones


def _where(a: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """The elements of ``a`` where ``mask`` holds: ``a`` itself, not a copy, when it holds everywhere."""
    return a if everywhere(mask) else a[mask]


def _molar(props: Props, fields) -> dict[str, np.ndarray]:
    """The fields the call wants, molar."""
    return {name: getattr(props, name) * M if per_kg else getattr(props, name) for name, per_kg in _wanted(fields.want)}


@lru_cache(maxsize=None)
def _wanted(want: tuple[str, ...] | None) -> tuple[tuple[str, bool], ...]:
    """The Props fields a call wants (None: all), each with whether a molar mass turns it into a molar one."""
    return tuple((name, name in _PER_KG) for name in Props._fields if want is None or name in want)


class Water(Substance):
    name = load(_DATA)["name"]
    molar_mass = M
    critical = FixedPoint(TC, PC)
    triple = FixedPoint(TT, PT)
    solids = SOLIDS

    # --- boundaries -------------------------------------------------------------------
    def boil_pressure(self, T: np.ndarray) -> Result:
        T = self.onto_line("boil", T)
        r = Result.like(T)
        t = single(T)
        low, high = t < TT * (1 - LINE_TOL), t > TC * (1 + LINE_TOL)
        if anywhere(low | high):  # one test for a temperature on the line
            r.flag(low, OUT_OF_RANGE, MESSAGES["below_triple_t"], T, see="sublime")
            r.flag(high, OUT_OF_RANGE, MESSAGES["above_critical_t"], T)
        r.fill(if97_saturation.saturation_pressure(t))
        return r

    def boil_temperature(self, p: np.ndarray) -> Result:
        p = self.onto_line("boil", p, pressure=True)
        r = Result.like(p)
        q = single(p)
        low, high = q < PT * (1 - LINE_TOL), q > PC * (1 + LINE_TOL)
        if anywhere(low | high):  # one test for a pressure on the line
            r.flag(low, OUT_OF_RANGE, MESSAGES["below_triple_p"], p, see="sublime")
            r.flag(high, OUT_OF_RANGE, MESSAGES["above_critical_p"], p)
        r.fill(if97_saturation.saturation_temperature(q))
        return r

    def melt_pressure(self, T: np.ndarray, solid: int | None = None) -> tuple[Result, np.ndarray]:
        r = Result.like(T)
        if solid is None:
            # the lowest melting pressure at T: the first line (in order of pressure) that reaches T
            codes = SOLID + _LOWEST_ICE[np.searchsorted(_LOWEST_EDGES, T)]
            r.flag(codes < SOLID, OUT_OF_RANGE, MESSAGES["outside_melting"], T)
        else:
            ice = ice_lines.ICES[solid - SOLID]
            (t_lo, t_hi), _ = ice_lines.line_range(ice)
            codes = np.full(np.shape(T), solid)
            r.flag((T < t_lo * (1 - LINE_TOL)) | (T > t_hi * (1 + LINE_TOL)), OUT_OF_RANGE,
                   MESSAGES[f"outside_melting_{ice}"], T)
        for code in np.unique(codes[np.broadcast_to(r.ok, np.shape(T))]):
            r.fill(ice_lines.melting_pressure(T, ice_lines.ICES[code - SOLID]), where=codes == code)
        return r, codes

    def melt_temperature(self, p: np.ndarray) -> tuple[Result, np.ndarray]:
        p = self.onto_line("melt", p, pressure=True)
        r = Result.like(p)
        r.flag(p < PT * (1 - LINE_TOL), OUT_OF_RANGE, MESSAGES["below_triple_p"], p, see="sublime")
        r.flag(p > _MELT_P_TOP * (1 + LINE_TOL), OUT_OF_RANGE, MESSAGES["above_ice_vii"], p)
        inside = clamp(p, PT, _MELT_P_TOP)  # the inverse gives NaN past the ends
        T, index = ice_lines.melting_temperature_any(np.where(np.broadcast_to(r.ok, np.shape(p)), inside, np.nan))
        r.fill(T)
        return r, SOLID + np.maximum(index, 0)

    def sublime_pressure(self, T: np.ndarray) -> Result:
        T = self.onto_line("sublime", T)
        r = Result.like(T)
        r.flag(T > TT * (1 + LINE_TOL), OUT_OF_RANGE, MESSAGES["above_triple_t"], T, see="boil")
        r.flag(T < _SUB_T_MIN * (1 - LINE_TOL), OUT_OF_RANGE, MESSAGES["below_sublimation_t"], T)
        r.fill(ice_lines.sublimation_pressure(T))
        return r

    def sublime_temperature(self, p: np.ndarray) -> Result:
        p = self.onto_line("sublime", p, pressure=True)
        r = Result.like(p)
        r.flag(p > PT * (1 + LINE_TOL), OUT_OF_RANGE, MESSAGES["above_triple_p"], p, see="boil")
        r.flag(p < _SUB_P_MIN, OUT_OF_RANGE, MESSAGES["below_sublimation_p"], p)
        r.fill(ice_lines.sublimation_temperature(np.minimum(p, PT)))  # the inverse gives NaN past the end
        return r

    # --- stable phase -----------------------------------------------------------------
    def _classify(self, T: np.ndarray, p: np.ndarray) -> Result:
        """State codes (indices into _LABELS) from the boundary equations."""
        T, p = broadcast(np.asarray(T, float), np.asarray(p, float))
        T, p = single(T), single(p)
        r = Result(filled(T.shape, -1.0))
        cold = T < TT
        if anywhere((T > REGION5_T_MAX) | (p > _MELT_P_TOP) | ((p < _SUB_P_MIN) & cold)):  # one test when none is
            r.flag(T > REGION5_T_MAX, OUT_OF_RANGE, MESSAGES["above_formulations_t"], T)
            r.flag(p > _MELT_P_TOP, OUT_OF_RANGE, MESSAGES["above_ice_vii"], p)
            r.flag((p < _SUB_P_MIN) & cold, OUT_OF_RANGE, MESSAGES["below_sublimation_p"], p)
        high = p >= PT
        # the solid is stable below one line: melting above the triple-point pressure (a
        # single-valued T(p) there), sublimation below it; no line applies (-inf) elsewhere
        melt = high & ((T <= _MELT_T_NEAR) | (p > _MELT_P_NEAR))  # elsewhere no melting line is near
        sublime = np.logical_not(high) & (T <= TT * (1 + LINE_TOL)) & (p >= _SUB_P_MIN)
        t_solid, ice = -np.inf, 0
        if anywhere(melt | sublime):
            t_solid, ice = filled(T.shape, -np.inf), filled(T.shape, 0, int)
            if anywhere(melt):
                t_solid[melt], ice[melt] = ice_lines.melting_temperature_any(p[melt])
            if anywhere(sublime):
                t_solid[sublime] = ice_lines.sublimation_temperature(p[sublime])
            t_solid, ice = single(t_solid), single(ice)
        # the liquid is stable below the boiling line; above the critical pressure below Tc
        sat = high & (p <= PC)
        if everywhere(sat):
            t_boil = single(if97_saturation.saturation_temperature(p))
        else:
            t_boil = np.where(high, TC, -np.inf)
            if anywhere(sat):
                t_boil[sat] = if97_saturation.saturation_temperature(p[sat])
        state = classify(T, p, t_solid=t_solid, solid=ice, t_boil=t_boil, sat=sat, high=high, pt=PT,
                         tc=TC, pc=PC, n_solids=len(SOLIDS))
        r.fill(state)  # integer codes stored as floats (NaN where flagged)
        return r

    _labels, _state_phase = _LABELS, _STATE_PHASE

    # --- single-phase properties --------------------------------------------------------
    def _phase_methods(self) -> dict:
        return {LIQUID: self._liquid, VAPOR: self._vapor, FLUID: self._fluid, SOLID: self._ice}

    def _unmodelled(self, r: Result, phase: np.ndarray, blank: np.ndarray) -> None:
        if anywhere(phase > SOLID):
            r.flag((phase > SOLID) & ~blank, NOT_AVAILABLE,
                   lambda k: MESSAGES[f"no_volume_{SOLIDS[k - SOLID]}"], phase)
            r.flag((phase > SOLID) & blank, NOT_AVAILABLE,
                   lambda k: MESSAGES[f"stable_without_volume_{SOLIDS[k - SOLID]}"], phase)

    def _liquid(self, t, q, sel, r: Result, fields) -> None:
        """Region 1 (region 3 above REGION1_T_MAX) to P_MAX_FLUID, IAPWS-95 above; named as a phase, also
        metastable: superheated up to SUPERHEAT_MARGIN above the saturation temperature, supercooled down
        to SUPERCOOL_MARGIN below the melting temperature (region 1 extended, not IAPWS-95: its range
        ends at the melting line)."""
        t, q = single(t), single(q)
        sub = Result(empty_like(t.shape))
        dense = q > P_MAX_FLUID
        in_if97 = np.logical_not(dense)
        p_sat = single(if97_saturation.saturation_pressure(clamp(t, TT, TC)))
        superheated = (t >= TT) & (q < p_sat * (1 - LINE_TOL))
        cold = (t < TT) & in_if97
        if anywhere(dense | superheated | cold):  # one test for the usual compressed liquid within IF97
            self._liquid_limits(t, q, dense, superheated, cold, sub)
        ok = sub.ok
        in_if97 = ok & in_if97
        low = in_if97 & (t <= REGION1_T_MAX)
        if anywhere(low):
            self._put_props(fields, sel, low, if97.region1(_where(t, low), _where(q, low), fields.want))
        if not everywhere(low):  # near the critical point region 3, above IF97's pressures IAPWS-95
            near = in_if97 & (t > REGION1_T_MAX)
            if anywhere(near):
                self._put_region3(fields, sel, near, t, q, "liquid", sub)
            if anywhere(ok & dense):
                self._put_iapws95(fields, sel, ok & dense, t, q, sub)
        self._report(r, sel, sub)

    @staticmethod
    def _liquid_limits(t, q, dense, superheated, cold, sub: Result) -> None:
        """Flag the liquid states beyond the formulations: above IAPWS-95's pressure or below the melting
        line above IF97's, superheated or supercooled past the metastable liquid's margins."""
        sub.flag(q > IAPWS95_P_MAX, OUT_OF_RANGE, MESSAGES["liquid_above_p"], q)
        if anywhere(dense):
            t_melt = np.full(t.shape, -np.inf)
            t_melt[dense], _ = ice_lines.melting_temperature_any(np.minimum(q[dense], _MELT_P_TOP))
            # with the joins' slack: the line taken at a triple point's pressure may be the colder neighbour's
            sub.flag(dense & (t < t_melt * (1 - MELT_JOIN_TOL)), OUT_OF_RANGE, MESSAGES["dense_liquid_below_melting"],
                     t, q, t_melt)
        if anywhere(superheated):
            t_sat = np.full(t.shape, np.inf)
            t_sat[superheated] = if97_saturation.saturation_temperature(np.maximum(q[superheated], PT))
            sub.flag(superheated & ((t > t_sat + SUPERHEAT_MARGIN) | (t > REGION1_T_MAX)), OUT_OF_RANGE,
                     MESSAGES["superheated_liquid"], t, q, t_sat)
        if anywhere(cold):
            sub.flag(cold & (q < PT), OUT_OF_RANGE, MESSAGES["supercooled_below_triple_p"], t, q)
            t_melt = np.full(t.shape, -np.inf)
            t_melt[cold], _ = ice_lines.melting_temperature_any(np.maximum(q[cold], PT))
            sub.flag(cold & ((t < t_melt - SUPERCOOL_MARGIN) | (t < _MELT_T_MIN * (1 - MELT_JOIN_TOL))), OUT_OF_RANGE,
                     MESSAGES["supercooled_liquid"], t, q)

    def _vapor(self, t, q, sel, r: Result, fields) -> None:
        """Region 2 (region 3 above B23); named as a phase, also supersaturated above the vapour
        pressure, by IF97's metastable-vapour equation, to the 5 % equilibrium moisture line."""
        t, q = single(t), single(q)
        sub = Result(empty_like(t.shape))
        sub.flag(t < REGION2_T_MIN, OUT_OF_RANGE, MESSAGES["cold_vapour"], t)
        cold = t < TT
        # the vapour's line: sublimation below the triple point, boiling above (only the one needed)
        if not anywhere(cold):
            p_line = single(if97_saturation.saturation_pressure(clamp(t, TT, TC)))
        elif everywhere(cold):
            p_line = single(ice_lines.sublimation_pressure(clamp(t, REGION2_T_MIN, TT)))
        else:
            p_line = np.where(cold, ice_lines.sublimation_pressure(clamp(t, REGION2_T_MIN, TT)),
                              if97_saturation.saturation_pressure(clamp(t, TT, TC)))
        above = q > p_line * (1 + LINE_TOL)
        meta_props = None
        if anywhere(above):
            sub.flag(above & cold, OUT_OF_RANGE, MESSAGES["vapour_over_ice"], t, q)
            sub.flag(above & ~cold & (q > META_VAPOUR_P_MAX), OUT_OF_RANGE, MESSAGES["supersaturated_above_p"], t, q)
            meta = above & ~cold & (q <= META_VAPOUR_P_MAX)
            if anywhere(meta):
                meta_props = self._metastable(t, q, meta, fields, sub)
        ok = sub.ok
        if meta_props is not None:
            keep = np.broadcast_to(ok, t.shape)[meta]
            if anywhere(keep):
                self._put_props(fields, sel, ok & meta, Props(*(np.asarray(f)[keep] for f in meta_props)))
            ok = ok & ~meta
        above_b23 = t > REGION1_T_MAX  # region 3 only above region 1's top, where the B23 line starts
        if anywhere(above_b23):
            above_b23 = above_b23 & (q > if97_saturation.b23_pressure(clamp(t, REGION1_T_MAX, B23_T_MAX)))
        two = ok & np.logical_not(above_b23)
        if anywhere(two):
            self._put_props(fields, sel, two, if97.region2(_where(t, two), _where(q, two), fields.want))
        three = ok & above_b23
        if anywhere(three):
            self._put_region3(fields, sel, three, t, q, "vapour", sub)
        self._report(r, sel, sub)

    @staticmethod
    def _metastable(t, q, meta, fields, sub: Result) -> Props:
        """IF97's metastable-vapour properties of the elements ``meta``; those wetter than its equilibrium
        moisture line are flagged."""
        tm, qm = t[meta], q[meta]
        # the enthalpy decides how wet the state is, whatever the call wants
        meta_props = if97.region2_metastable(tm, qm, None if fields.want is None else {*fields.want, "h"})
        t_sat = if97_saturation.saturation_temperature(qm)
        h_liq, h_vap = if97.region1(t_sat, qm, ("h",)).h, if97.region2(t_sat, qm, ("h",)).h
        wet = np.zeros(t.shape, bool)
        wet[meta] = (meta_props.h - h_liq) / (h_vap - h_liq) < 1.0 - META_VAPOUR_MOISTURE
        sub.flag(wet, OUT_OF_RANGE, MESSAGES["supersaturated_too_wet"], t, q)
        return meta_props

    def _fluid(self, t, q, sel, r: Result, fields) -> None:
        t, q = single(t), single(q)
        sub = Result(empty_like(t.shape))
        sub.flag(t > REGION5_T_MAX, OUT_OF_RANGE, MESSAGES["fluid_hot"], t)
        sub.flag((t > IAPWS95_T_MAX) & (q > P_MAX_REGION5), OUT_OF_RANGE, MESSAGES["fluid_region5_above_p"], q)
        sub.flag(q > IAPWS95_P_MAX, OUT_OF_RANGE, MESSAGES["fluid_above_p"], q)
        ok = sub.ok
        # beyond IF97's pressures (region 5's above REGION2_T_MAX) the fluid is IAPWS-95's
        dense = q > np.where(t > REGION2_T_MAX, P_MAX_REGION5, P_MAX_FLUID)
        ok, dense = ok & ~dense, ok & dense
        three = ok & (t <= B23_T_MAX) & (q > if97_saturation.b23_pressure(clamp(t, REGION1_T_MAX, B23_T_MAX)))
        two = ok & ~three & (t <= REGION2_T_MAX)
        five = ok & (t > REGION2_T_MAX)
        if anywhere(two):
            self._put_props(fields, sel, two, if97.region2(_where(t, two), _where(q, two), fields.want))
        if anywhere(five):
            self._put_props(fields, sel, five, if97.region5(_where(t, five), _where(q, five), fields.want))
        if anywhere(three):
            self._put_region3(fields, sel, three, t, q, "liquid", sub)
        if anywhere(dense):
            self._put_iapws95(fields, sel, dense, t, q, sub)
        self._report(r, sel, sub)

    def _ice(self, t, q, sel, r: Result, fields) -> None:
        t, q = single(t), single(q)
        sub = Result(empty_like(t.shape))
        sub.flag(t > ICE_IH_T_MAX * (1 + LINE_TOL), OUT_OF_RANGE, MESSAGES["ice_hot"], t)
        sub.flag(q > ICE_IH_P_MAX, OUT_OF_RANGE, MESSAGES["ice_above_p"], q)
        melt = sub.ok
        melt &= q > PT
        if anywhere(melt):
            p_melt = np.full(t.shape, np.inf)
            p_melt[melt] = ice_lines.melting_pressure(clamp(t[melt], _MELT_T_MIN, TT), "Ih")
            # the ice Ih line leans back: above it in pressure the ice has melted
            sub.flag(melt & (t >= _MELT_T_MIN) & (q > p_melt * (1 + LINE_TOL)), OUT_OF_RANGE,
                     MESSAGES["ice_melted"], t, q)
        ok = np.broadcast_to(sub.ok, t.shape)  # a mask to index with
        if anywhere(ok):
            self._put_props(fields, sel, ok, ice_ih.properties(t[ok], q[ok]))
        self._report(r, sel, sub)

    def _put_props(self, fields, sel, part, props: Props) -> None:
        self._put(fields, sel, part, _molar(props, fields))

    def _put_region3(self, fields, sel, part, t, q, branch: str, sub: Result) -> None:
        self._put_at_density(fields, sel, part, t, q, if97_region3.density(t[part], q[part], branch),
                             if97_region3.properties_rho, MESSAGES[f"no_region3_root_{branch}"], sub)

    def _put_iapws95(self, fields, sel, part, t, q, sub: Result) -> None:
        self._put_at_density(fields, sel, part, t, q, iapws95.density(t[part], q[part]), iapws95.properties_rho,
                             MESSAGES["no_iapws95_root"], sub)

    def _put_at_density(self, fields, sel, part, t, q, rho: np.ndarray, at_density, message: str,
                        sub: Result) -> None:
        """The properties of a formulation in (rho, T) at the density roots ``rho`` of the elements in
        ``part``; an element without a root (NaN) is flagged with ``message``."""
        missing = np.zeros(t.shape, bool)
        missing[part] = np.isnan(rho)
        sub.flag(missing, OUT_OF_RANGE, message, t, q)
        good = np.array(part)  # a mask of one value may be a numpy bool, which takes no assignment
        good[part] = ~np.isnan(rho)
        if anywhere(good):
            self._put_props(fields, sel, good, at_density(rho[~np.isnan(rho)], t[good]))

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
    "boil": ("IAPWS-IF97 region 4 saturation equation", _k(TT) + " to " + _k(TC), "IAPWS R7-97(2012), eqs. 30-31"),
    "melt": ("IAPWS R14-08 melting-pressure equations of ice Ih, III, V, VI, VII",
             _k(_MELT_T_MIN) + " to " + _k(_MELT_T_MAX) + ", " + _pa(PT) + " to " + _gpa(_MELT_P_TOP),
             "IAPWS R14-08(2011), eqs. 1-5"),
    "sublime": ("IAPWS R14-08 sublimation-pressure equation of ice Ih", _k(_SUB_T_MIN) + " to " + _k(TT),
                "IAPWS R14-08(2011), eq. 6"),
    "liquid": ("IAPWS-IF97 region 1 (region 3 above " + _k(REGION1_T_MAX) + ") to " + _mpa(P_MAX_FLUID)
               + "; IAPWS-95 above " + _mpa(P_MAX_FLUID),
               "IF97: melting line to " + _k(TC) + ", vapour pressure to " + _mpa(P_MAX_FLUID) + " (region 1 extended "
               "below " + _k(if97.T_MIN) + " down to the melting line); IAPWS-95: above " + _mpa(P_MAX_FLUID) + " to "
               + _mpa(IAPWS95_P_MAX) + ", from the melting lines of ice Ih, III, V and VI; named as a phase also "
               "metastable: superheated to " + _k(SUPERHEAT_MARGIN) + " above saturation, supercooled to "
               + _k(SUPERCOOL_MARGIN) + " below the melting line (region 1 extended, to " + _mpa(P_MAX_FLUID)
               + ", not below the triple-point pressure)",
               "IAPWS R7-97(2012), sections 5 and 7; IAPWS R6-95(2018), section 6.3.1"),
    "vapor": ("IAPWS-IF97 region 2 (region 3 between the B23 line and saturation); supersaturated vapour: "
              "IF97's metastable-vapour equation",
              _k(REGION2_T_MIN) + " to " + _k(TC) + " up to the vapour or sublimation pressure (region 2 extended "
              "below " + _k(if97.T_MIN) + "); supersaturated above " + _k(TT) + " to the "
              + fmt(100 * META_VAPOUR_MOISTURE) + " % equilibrium moisture line and " + _mpa(META_VAPOUR_P_MAX),
              "IAPWS R7-97(2012), sections 6 and 7 (metastable vapour: section 6.2)"),
    "fluid": ("IAPWS-IF97 regions 2, 3 and 5; IAPWS-95 at the pressures above them",
              "IF97: " + _k(TC) + " to " + _k(REGION2_T_MAX) + " up to " + _mpa(P_MAX_FLUID) + ", to "
              + _k(REGION5_T_MAX) + " up to " + _mpa(P_MAX_REGION5) + "; IAPWS-95: from there up to "
              + _mpa(IAPWS95_P_MAX) + ", to " + _k(IAPWS95_T_MAX),
              "IAPWS R7-97(2012), sections 6, 7 and 9; IAPWS R6-95(2018), section 6.3.1"),
    "solid": ("IAPWS R10-06 Gibbs function of ice Ih",
              "up to " + _k(ICE_IH_T_MAX) + " and " + _mpa(ICE_IH_P_MAX) + ", not above the melting line",
              "IAPWS R10-06(2009)"),
    "chem_potential": ("molar Gibbs energy, IAPWS-95 reference state: u = 0 and s = 0 for the saturated "
                       "liquid at the triple point; IAPWS-95's own values shifted to meet IF97 region 1's there",
                       "", "IAPWS R6-95(2018); IAPWS R7-97(2012); IAPWS R10-06(2009)"),
}
