"""What every substance model offers, and the quantities derived the same way for all.

A concrete model supplies its boundaries (pressure from temperature and back),
its phase classification and its single-phase properties ``props(T, p, phase)``.
Everything else here (volumes, expansivity, latent heat, flash fraction, ...) is
built from those, so each substance is one consistent model.

Arguments are SI numpy arrays (K, Pa) that broadcast; phases are integer codes
(see :data:`STABLE`, :data:`LIQUID`, ...). Methods return :class:`Result` objects.
"""

from __future__ import annotations

from itertools import repeat
from typing import NamedTuple

import numpy as np

from .line_ends import LINE_TOL, TYPED_P, onto_ends
from .props import Props
from ..numerics import anywhere, everywhere
from .result import (BAD_ARGUMENT, NOT_AVAILABLE, OUT_OF_RANGE, ModelError, Result, as_index, broadcast, empty_like,
                     filled, fmt, single)

# Phase codes. Solids count up from SOLID: SOLID + k is the substance's k-th solid.
STABLE = 0  # "the stable phase at this state"
LIQUID = 1
VAPOR = 2
FLUID = 3  # the one fluid phase above the critical temperature
SATURATED_LIQUID = 4  # liquid on the boiling line, at the given temperature or pressure
SATURATED_VAPOR = 5
SOLID = 10

BOUNDARIES = ("boil", "melt", "sublime")

_FLUID_WORDS = {
    "liquid": LIQUID,
    "vapor": VAPOR,
    "vapour": VAPOR,
    "gas": VAPOR,
    "fluid": FLUID,
    "supercritical fluid": FLUID,
    "supercritical": FLUID,
    "saturated liquid": SATURATED_LIQUID,
    "saturated vapor": SATURATED_VAPOR,
    "saturated vapour": SATURATED_VAPOR,
}


# a single element's selection, shared (read-only: the phase methods only read their selection)
_EVERY = np.array(True)
_EVERY.flags.writeable = False

_FIELD_NAMES = {"v": "the molar volume", "alpha": "the thermal expansivity", "kappa": "the compressibility",
                "g": "the chemical potential", "h": "the enthalpy"}


class Fields(dict):
    """A call's properties by field name, as the phase methods store them, and the fields it needs."""

    __slots__ = ("want",)

    def __init__(self, want: tuple[str, ...] | None = None):  # starts empty: dict's own __init__ has nothing to do
        self.want = want

    def wants(self, name: str) -> bool:
        return self.want is None or name in self.want


class FixedPoint(NamedTuple):
    temperature: float  # K
    pressure: float  # Pa


class InfoItem(NamedTuple):
    """One field of a substance's definition, as SUBSTANCE_INFO shows it."""

    value: float | str
    unit: str
    source: str


def boundary_code(word: str) -> str:
    """``"boil"``, ``"melt"`` or ``"sublime"`` from a case-insensitive word."""
    key = str(word).strip().lower()
    aliases = {"boiling": "boil", "vaporization": "boil", "vaporisation": "boil", "melting": "melt",
               "fusion": "melt", "freeze": "melt", "sublimation": "sublime"}
    key = aliases.get(key, key)
    if key not in BOUNDARIES:
        raise ModelError(BAD_ARGUMENT, f"unknown boundary '{word}'; use \"boil\", \"melt\" or \"sublime\"")
    return key


class Substance:
    """Base of the substance models. Subclasses set the attributes and the abstract methods."""

    name: str = ""
    aliases: tuple[str, ...] = ()
    molar_mass: float = float("nan")  # kg/mol
    critical: FixedPoint
    triple: FixedPoint
    solids: tuple[str, ...] = ("solid",)  # labels of the solid phases, SOLID + k
    _labels: np.ndarray  # STABLE_PHASE labels by state code (phase_map.state_table)
    _state_phase: np.ndarray  # the single phase code of each state, STABLE on a line

    # --- to be provided by each model -------------------------------------------------
    def boil_pressure(self, T: np.ndarray) -> Result:
        raise NotImplementedError

    def boil_temperature(self, p: np.ndarray) -> Result:
        raise NotImplementedError

    def melt_pressure(self, T: np.ndarray, solid: int | None = None) -> tuple[Result, np.ndarray]:
        """Melting pressure and the code of the solid on that branch (lowest branch by default)."""
        raise NotImplementedError

    def melt_temperature(self, p: np.ndarray) -> tuple[Result, np.ndarray]:
        """Melting temperature and the code of the solid on that branch."""
        raise NotImplementedError

    def sublime_pressure(self, T: np.ndarray) -> Result:
        raise NotImplementedError

    def sublime_temperature(self, p: np.ndarray) -> Result:
        raise NotImplementedError

    def _classify(self, T: np.ndarray, p: np.ndarray) -> Result:
        """State codes: indices into ``_labels`` (see phase_map.state_table)."""
        raise NotImplementedError

    def _phase_methods(self) -> dict:
        """Phase code -> method(t, q, sel, result, fields) filling the selected elements' properties."""
        raise NotImplementedError

    def _unmodelled(self, r: Result, phase: np.ndarray, blank: np.ndarray) -> None:
        """Flag phases the model names but cannot compute (water's high-pressure ices)."""

    def stable_phase(self, T: np.ndarray, p: np.ndarray) -> Result:
        """Labels (object array): one phase, or the phases of a line joined by " + "."""
        codes = self._classify(T, p)
        shape = codes.values.shape
        if codes.problems is None:  # every state has its label; a single one as a 0-d array holding it
            labels = self._labels[as_index(codes.values)]
            return Result(labels if type(labels) is np.ndarray else np.array(labels, dtype=object))
        labels = Result(np.full(shape, None, dtype=object), codes.problems)
        ok = codes.ok
        labels.values[ok] = self._labels[codes.values[ok].astype(int)]
        return labels

    def props(self, T, p, phase=STABLE, want: tuple[str, ...] | None = None) -> tuple[Props, Result]:
        """Molar properties of ``phase`` at (T, p); the Result carries the problems only.

        ``want`` names the fields the caller needs; a model may leave the others NaN
        when they cost extra work (None: all of them).
        """
        T, p, phase = broadcast(np.asarray(T, float), np.asarray(p, float), np.asarray(phase, int))
        r = Result(empty_like(T.shape))
        code = single(phase)  # the decisions below on a single value's scalar
        # the saturated codes are consecutive: one comparison pair finds both
        if anywhere((code >= SATURATED_LIQUID) & (code <= SATURATED_VAPOR)):
            T, p, phase = self._saturated(T, p, phase, r)
            code = single(phase)
        blank = code == STABLE
        if anywhere(blank):
            state = self._classify(T, p)
            values = single(state.values)
            nan = values != values  # a flagged state, left NaN: code 0 stands in, its problem says the rest
            codes = as_index(np.where(nan, 0, values) if anywhere(nan) else values)
            if state.problems is not None:
                r.adopt(np.where(blank, state.problems, None))
            state_phase = self._state_phase[codes]
            on_line = blank & (state_phase == STABLE)
            if anywhere(on_line):
                r.flag(on_line, NOT_AVAILABLE, lambda label: f"the state is on a line ({label}): give a phase",
                       self._labels[codes])
            code = state_phase if everywhere(blank) else np.where(blank, state_phase, code)
        # any fluid word above the critical temperature means the one fluid
        tc = self.critical.temperature
        t = single(T)
        hot = (code < SOLID) & (t >= tc)
        if anywhere(hot):
            code = np.where(hot, FLUID, code)
        cold_fluid = (code == FLUID) & (t < tc)
        if anywhere(cold_fluid):
            r.flag(cold_fluid, BAD_ARGUMENT, "{} K is below the critical temperature of "
                   + f"{self.name} ({tc:.6g} K): ask for liquid or vapor", T)
        self._unmodelled(r, code, blank)
        fields = Fields(want)  # filled by the phase methods through _put
        methods = self.__dict__.get("_methods")
        if methods is None:  # the model's table of bound methods, made once per model
            methods = self.__dict__["_methods"] = self._phase_methods()
        if r.problems is None and code.size == 1:
            # one phase for one element, unflagged: the usual single cell
            one = int(code) if code.ndim == 0 else int(code.flat[0])
        else:  # or one phase for every element, all still unflagged
            phase = np.broadcast_to(code, T.shape)
            one = int(phase.flat[0]) if phase.size and r.problems is None and (phase == phase.flat[0]).all() else None
        if one is not None and one in methods:
            # a single value stays 0-d: its arithmetic is numpy's on scalars, without arrays
            flat = T.ndim > 0
            methods[one](T.reshape(-1) if flat else T, p.reshape(-1) if flat else p,
                         filled(T.shape, True, bool) if flat else _EVERY, r, fields)
        elif one is None:
            ok = np.broadcast_to(r.ok, T.shape)
            for each in np.unique(phase[ok]):
                if int(each) in methods:
                    sel = (phase == each) & ok
                    methods[int(each)](T[sel], p[sel], sel, r, fields)
        return Props._make(map(fields.get, Props._fields, repeat(empty_like(T.shape)))), r

    def _saturated(self, T: np.ndarray, p: np.ndarray, phase: np.ndarray, r: Result):
        """(T, p, phase) with the saturated states put on the boiling line as liquid or vapour.

        A saturated state is given by its temperature or by its pressure (the other NaN); given both,
        they must lie on the line within what a typed value rounds away (line_ends.TYPED_P).
        """
        sat = (phase == SATURATED_LIQUID) | (phase == SATURATED_VAPOR)
        by_t, by_p = sat & ~np.isnan(T), sat & np.isnan(T) & ~np.isnan(p)
        r.flag(sat & np.isnan(T) & np.isnan(p), BAD_ARGUMENT,
               "a saturated state needs its temperature or its pressure")
        T, p = T.copy(), p.copy()
        if anywhere(by_t):
            T[by_t] = self.onto_line("boil", T[by_t])
            line = self.boil_pressure(T[by_t])
            self._report(r, by_t, line)
            given = p[by_t]
            off = ~np.isnan(given) & ~(np.abs(given - line.values) <= TYPED_P * line.values)
            sub = Result(np.full(given.shape, np.nan))
            sub.flag(off, OUT_OF_RANGE, lambda tt, qq, qs: f"{fmt(tt)} K and {fmt(qq)} Pa is not on the boiling "
                     f"line of {self.name} ({fmt(qs)} Pa at this temperature): give the temperature or the pressure "
                     "of a saturated state, not both", T[by_t], given, line.values)
            self._report(r, by_t, sub)
            p[by_t] = line.values
        if anywhere(by_p):
            p[by_p] = self.onto_line("boil", p[by_p], pressure=True)
            line = self.boil_temperature(p[by_p])
            self._report(r, by_p, line)
            T[by_p] = line.values
        phase = np.where(sat, np.where(phase == SATURATED_LIQUID, LIQUID, VAPOR), phase)
        return T, p, phase

    @staticmethod
    def _put(fields: dict, sel: np.ndarray, part, values: dict) -> None:
        """Store values of the elements ``part`` of the selection ``sel`` in the full-shape fields."""
        # every element (the usual single cell): take the arrays as they are, without indexing
        whole = everywhere(sel) and (part == slice(None) if type(part) is slice else everywhere(part))
        index = None
        for name, value in values.items():
            if whole and (value.size if isinstance(value, (np.ndarray, np.generic)) else np.size(value)) == sel.size:
                value = np.asarray(value, dtype=float)
                fields[name] = value if value.shape == sel.shape else value.reshape(sel.shape)
                continue
            if index is None:
                index = np.flatnonzero(sel)[part if type(part) is slice else np.reshape(part, -1)]  # a 0-d mask too
            if name not in fields:
                fields[name] = np.full(sel.shape, np.nan)
            fields[name].flat[index] = value if np.shape(value) == index.shape else np.broadcast_to(value, index.shape)

    @staticmethod
    def _report(r: Result, sel: np.ndarray, sub: Result) -> None:
        """Carry a selection's problems into the whole call's Result."""
        if sub.problems is not None:
            problems = np.full(sel.shape, None, dtype=object)
            problems[sel] = sub.problems
            r.adopt(problems)

    def info(self) -> dict[str, InfoItem]:
        """Every field SUBSTANCE_INFO can name: data, and for each quantity its model and range."""
        raise NotImplementedError

    def definition_rows(self) -> list[tuple]:
        """(field, value, unit, source) rows of the substance's data, as SUBSTANCE_INFO spills them."""
        return [(name, item.value, item.unit, item.source) for name, item in self.info().items()]

    # --- phase words ------------------------------------------------------------------
    def phase_code(self, word: str | None) -> int:
        """The code of a phase word (case-insensitive); blank means the stable phase."""
        if word is None or not str(word).strip():
            return STABLE
        key = " ".join(str(word).lower().split())
        if key in _FLUID_WORDS:
            return _FLUID_WORDS[key]
        lowered = [s.lower() for s in self.solids]
        if key == "solid":
            return SOLID
        if key in lowered:
            return SOLID + lowered.index(key)
        names = ", ".join(['"liquid"', '"vapor"', '"gas"', '"supercritical fluid"', '"saturated liquid"',
                           '"saturated vapor"', '"solid"'] + [f'"{s}"' for s in self.solids if s != "solid"])
        raise ModelError(BAD_ARGUMENT, f"unknown phase '{word}' for {self.name}; use one of {names}")

    # --- quantities derived from the above ---------------------------------------------
    def _one_property(self, T, p, phase, field: str) -> Result:
        props, result = self.props(T, p, phase, want=(field,))
        values = getattr(props, field)
        # a model leaves NaN where it has no formulation for the quantity (a solid's expansivity
        # without data, for one); say so rather than pass a NaN on
        missing = single(values) != single(values)
        if anywhere(missing):
            result.flag(missing, NOT_AVAILABLE, f"{_FIELD_NAMES[field]} is not modelled for this phase of {self.name}")
        result.fill(values)
        return result

    def molar_volume(self, T: np.ndarray, p: np.ndarray, phase: np.ndarray | int = STABLE) -> Result:
        return self._one_property(T, p, phase, "v")

    def expansivity(self, T: np.ndarray, p: np.ndarray, phase: np.ndarray | int = STABLE) -> Result:
        return self._one_property(T, p, phase, "alpha")

    def compressibility(self, T: np.ndarray, p: np.ndarray, phase: np.ndarray | int = STABLE) -> Result:
        return self._one_property(T, p, phase, "kappa")

    def chem_potential(self, T: np.ndarray, p: np.ndarray, phase: np.ndarray | int) -> Result:
        return self._one_property(T, p, phase, "g")

    def expansion_ratio(self, T1, p1, T2, p2, phase1=STABLE, phase2=STABLE) -> Result:
        """V(T2, p2) / V(T1, p1) on a molar basis."""
        v1 = self.molar_volume(T1, p1, phase1)
        v2 = self.molar_volume(T2, p2, phase2)
        out = Result.joined(v1, v2)
        out.fill(v2.values / v1.values)
        return out

    def line_pressure(self, boundary: str, T: np.ndarray, solid: int | None = None) -> tuple[Result, tuple]:
        """Pressure on a line at T, and the phase codes below and above it."""
        if boundary == "boil":
            return self.boil_pressure(T), (LIQUID, VAPOR)
        if boundary == "melt":
            p, solid_code = self.melt_pressure(T, solid)
            return p, (solid_code, LIQUID)
        return self.sublime_pressure(T), (SOLID, VAPOR)

    def line_temperature(self, boundary: str, p: np.ndarray) -> tuple[Result, tuple]:
        """Temperature on a line at p, and the phase codes below and above it."""
        if boundary == "boil":
            return self.boil_temperature(p), (LIQUID, VAPOR)
        if boundary == "melt":
            T, solid_code = self.melt_temperature(p)
            return T, (solid_code, LIQUID)
        return self.sublime_temperature(p), (SOLID, VAPOR)

    def _across(self, line: Result, T, p, phases, field: str) -> Result:
        """field(upper phase) - field(lower phase) at (T, p) on a line; for "v" the ratio."""
        low, low_result = self.props(T, p, phases[0])
        high, high_result = self.props(T, p, phases[1])
        out = Result.joined(line, low_result, high_result)
        a, b = getattr(low, field), getattr(high, field)
        out.fill(b / a if field == "v" else b - a)
        return out

    def onto_line(self, boundary: str, x: np.ndarray, pressure: bool = False) -> np.ndarray:
        """Temperatures (or pressures) ``x`` typed just past an end of the line that is the triple or the
        critical point (line_ends.TYPED_T and TYPED_P) moved onto that point; other ends stay as they are.
        A melting line's temperature ends are the model's to say: this one leaves them as typed."""
        triple, critical = (self.triple.pressure, self.critical.pressure) if pressure else \
            (self.triple.temperature, self.critical.temperature)
        if boundary == "boil":
            return onto_ends(x, triple, critical, relative=pressure)
        if boundary == "sublime":
            return onto_ends(x, None, triple, relative=pressure)
        return onto_ends(x, triple if pressure else None, None, relative=pressure)

    def latent_heat(self, boundary: str, T: np.ndarray) -> Result:
        """Enthalpy of melting, boiling or sublimation at T (J/mol), from the phases' own formulations."""
        T = self.onto_line(boundary, T)
        p, phases = self.line_pressure(boundary, T)
        return self._across(p, T, p.values, phases, "h")

    def phase_change_ratio(self, boundary: str, p: np.ndarray) -> Result:
        """Molar volume ratio across a line at p: V_liquid/V_solid, V_vapor/V_liquid or V_vapor/V_solid."""
        T, phases = self.line_temperature(boundary, p)
        return self._across(T, T.values, p, phases, "v")

    def saturation_margin(self, T: np.ndarray, p: np.ndarray, sign: float) -> Result:
        """sign * (T_boil(p) - T): subcooling for sign = +1, superheat for sign = -1."""
        t_boil = self.boil_temperature(p)
        values = sign * (t_boil.values - T)  # flagged elements stay NaN
        if values.shape != t_boil.values.shape:
            t_boil = Result.joined(t_boil, Result(np.full(np.shape(T), np.nan)))
        t_boil.values = np.asarray(values, dtype=float)
        return t_boil

    def flash_fraction(self, T1: np.ndarray, p1: np.ndarray, p2: np.ndarray) -> Result:
        """Vapour mass fraction after liquid at (T1, p1) is let down at constant enthalpy to p2.

        At or above the triple-point pressure the liquid-vapour split at the boiling temperature
        (0 when nothing flashes, the rest liquid); below it the solid-vapour split at the
        sublimation temperature (the rest solid: liquid carbon dioxide let down to 1 atm makes
        snow), the solid's enthalpy being the vapour's less the enthalpy of sublimation. For one
        substance the mass and mole fractions are equal. A let-down to a higher pressure is refused.
        """
        T1, p1, p2 = np.broadcast_arrays(np.asarray(T1, float), np.asarray(p1, float), np.asarray(p2, float))
        liquid, inlet = self.props(T1, p1, LIQUID, want=("h",))
        out = Result.joined(inlet)
        out.flag(p2 > p1, BAD_ARGUMENT, lambda a, b: f"the pressure after a let-down ({fmt(b)} Pa) must not be above "
                 f"the pressure before it ({fmt(a)} Pa)", p1, p2)
        self._no_enthalpy(out, liquid.h)
        pt = self.triple.pressure
        snow = p2 < pt * (1 - LINE_TOL) if np.isfinite(pt) else np.zeros(p2.shape, bool)
        x = np.full(p2.shape, np.nan)
        if anywhere(~snow):
            x[~snow] = self._split(out, ~snow, liquid.h, p2, "boil", LIQUID)
        if anywhere(snow):
            x[snow] = self._split(out, snow, liquid.h, p2, "sublime", SOLID)
        out.fill(np.clip(x, 0.0, 1.0))
        return out

    def _no_enthalpy(self, out: Result, h: np.ndarray) -> None:
        """Flag states whose enthalpy the model leaves NaN (a model without the heat capacity to give it)."""
        out.flag(np.isnan(h), NOT_AVAILABLE, f"the enthalpy of {self.name} is not modelled")

    def _split(self, out: Result, sel: np.ndarray, h_in: np.ndarray, p2: np.ndarray, boundary: str, dense: int
               ) -> np.ndarray:
        """(h_in - h_dense) / (h_vapour - h_dense) at the line's temperature at p2, for the selection."""
        q = p2[sel]
        t_line, _ = self.line_temperature(boundary, q)
        vapor, vapor_result = self.props(t_line.values, q, VAPOR, want=("h",))
        if dense == LIQUID:
            condensed, dense_result = self.props(t_line.values, q, LIQUID, want=("h",))
            h_dense = condensed.h
        else:
            heat = self.latent_heat("sublime", t_line.values)
            dense_result, h_dense = heat, vapor.h - heat.values
        self._report(out, sel, Result.joined(t_line, vapor_result, dense_result))
        return (h_in[sel] - h_dense) / (vapor.h - h_dense)
