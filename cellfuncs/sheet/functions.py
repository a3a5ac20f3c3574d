"""The sheet functions: thin adapters from cell arguments to the substance models.

Each function takes numbers, ranges (2-D arrays) or array constants for its
numeric and phase arguments, which broadcast like numpy; unit arguments are
single texts and default to SI. A failure comes back as a :class:`CellError`
value (an Excel error code and a reason), element by element.

Results are engineering estimates. Pressure equipment, relief and cryogenic
systems are designed to the local codes and checked by a licensed professional.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from .. import units
from ..errors import NA, VALUE, CellError
from ..substances import names
from ..substances.base import SATURATED_LIQUID, SATURATED_VAPOR, SOLID, Substance, boundary_code
from ..numerics import anywhere
from ..substances.result import Result, single
from . import cells
from .cells import Arg, CallError, model_call
from .registry import sheet_function

_T, _P = units.TEMPERATURE, units.PRESSURE


def _temperature(sub: Substance, value: Any, t_unit: Any, name: str = "temperature") -> Arg:
    return cells.number(value, name, cells.unit(t_unit, "t_unit", _T), absolute="temperature", said=(_T, t_unit))


def _pressure(sub: Substance, value: Any, p_unit: Any, name: str = "pressure") -> Arg:
    return cells.number(value, name, cells.unit(p_unit, "p_unit", _P), absolute="pressure", said=(_P, p_unit))


def _out(sub: Substance, result: Result, args: tuple[Arg, ...], unit_text: Any, unit_name: str, kind: units.Kind,
         direction: str = "") -> Any:
    conversion = cells.unit(unit_text, unit_name, kind)
    return cells.result_cells(result, args, cells.from_si(conversion, sub.molar_mass), direction,
                              (kind, unit_text))


def _line(sub: Substance, boundary: str, which: str, x: Arg, solid: int | None = None) -> Result:
    """The model's line function: ``which`` is "T" (temperature from pressure) or "P"."""
    if boundary == "melt":
        result, _ = (sub.melt_temperature(x.si) if which == "T" else sub.melt_pressure(x.si, solid))
        return result
    return getattr(sub, _LINE_METHODS[(boundary, which)])(x.si)


_LINE_METHODS = {("boil", "T"): "boil_temperature", ("boil", "P"): "boil_pressure",
                 ("sublime", "T"): "sublime_temperature", ("sublime", "P"): "sublime_pressure"}


def _solid(sub: Substance, value: Any) -> int | None:
    word = cells.text(value, "solid")
    if word is None:
        return None
    code = model_call(sub.phase_code, word)
    if code < SOLID:
        raise CallError(VALUE, f"solid must name a solid phase of {sub.name}; got '{word}'")
    return code


def _temperature_from_pressure(boundary: str, substance, pressure, p_unit, t_unit) -> Any:
    sub = cells.substance(substance)
    p = _pressure(sub, pressure, p_unit)
    return _out(sub, _line(sub, boundary, "T", p), (p,), t_unit, "t_unit", _T, "TEMP")


def _pressure_from_temperature(boundary: str, substance, temperature, t_unit, p_unit, solid=None) -> Any:
    sub = cells.substance(substance)
    t = _temperature(sub, temperature, t_unit)
    return _out(sub, _line(sub, boundary, "P", t, _solid(sub, solid)), (t,), p_unit, "p_unit", _P, "PRESSURE")


@sheet_function
def BOIL_TEMP(substance, pressure, p_unit=None, t_unit=None):
    """Boiling (liquid-vapour saturation) temperature at a pressure.

    Arguments:
    substance: name of the substance, e.g. "water"
    pressure: absolute pressure (or gauge with a gauge unit)
    p_unit: unit of pressure, default Pa
    t_unit: unit of the result, default K

    >>> round(BOIL_TEMP("water", 1, "atm", "degC"), 3)
    99.974
    """
    return _temperature_from_pressure("boil", substance, pressure, p_unit, t_unit)


@sheet_function
def BOIL_PRESSURE(substance, temperature, t_unit=None, p_unit=None):
    """Vapour pressure over the liquid at a temperature.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    t_unit: unit of temperature, default K
    p_unit: unit of the result, default Pa

    >>> round(BOIL_PRESSURE("water", 100, "degC", "kPa"), 4)
    101.418
    """
    return _pressure_from_temperature("boil", substance, temperature, t_unit, p_unit)


@sheet_function
def MELT_TEMP(substance, pressure, p_unit=None, t_unit=None):
    """Melting (solid-liquid) temperature at a pressure.

    Arguments:
    substance: name of the substance, e.g. "water"
    pressure: absolute pressure
    p_unit: unit of pressure, default Pa
    t_unit: unit of the result, default K

    >>> round(MELT_TEMP("water", 100, "MPa", "degC"), 2)
    -8.94
    """
    return _temperature_from_pressure("melt", substance, pressure, p_unit, t_unit)


@sheet_function
def MELT_PRESSURE(substance, temperature, t_unit=None, p_unit=None, solid=None):
    """Melting pressure at a temperature: the lowest branch, or the one of the named solid.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    t_unit: unit of temperature, default K
    p_unit: unit of the result, default Pa
    solid: for water "ice Ih", "ice III", "ice V", "ice VI" or "ice VII"; blank for the lowest branch

    >>> round(MELT_PRESSURE("water", 260, "K", "MPa"), 1)
    138.3
    >>> round(MELT_PRESSURE("water", 255, "K", "MPa", "ice III"), 1)
    301.3
    """
    return _pressure_from_temperature("melt", substance, temperature, t_unit, p_unit, solid)


@sheet_function
def SUBLIME_TEMP(substance, pressure, p_unit=None, t_unit=None):
    """Sublimation (solid-vapour) temperature at a pressure below the triple point.

    Arguments:
    substance: name of the substance, e.g. "water"
    pressure: absolute pressure
    p_unit: unit of pressure, default Pa
    t_unit: unit of the result, default K

    >>> round(SUBLIME_TEMP("water", 100, "Pa", "degC"), 2)
    -20.33
    """
    return _temperature_from_pressure("sublime", substance, pressure, p_unit, t_unit)


@sheet_function
def SUBLIME_PRESSURE(substance, temperature, t_unit=None, p_unit=None):
    """Sublimation pressure (vapour pressure over the solid) at a temperature.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    t_unit: unit of temperature, default K
    p_unit: unit of the result, default Pa

    >>> round(SUBLIME_PRESSURE("water", -20, "degC"), 2)
    103.24
    """
    return _pressure_from_temperature("sublime", substance, temperature, t_unit, p_unit)


def _state(substance, temperature, pressure, t_unit, p_unit) -> tuple[Substance, Arg, Arg]:
    sub = cells.substance(substance)
    return sub, _temperature(sub, temperature, t_unit), _pressure(sub, pressure, p_unit)


@sheet_function
def STABLE_PHASE(substance, temperature, pressure, t_unit=None, p_unit=None):
    """The phase with the lowest chemical potential at (T, p); on a line, the coexisting phases.

    Labels: "liquid", "vapor" (below Tc), "gas" (T >= Tc, p < pc), "supercritical
    fluid" (T >= Tc, p >= pc; the critical point itself), for water "ice Ih" to
    "ice VII", otherwise "solid". On a line (|T - T_line(p)| <= 1e-9 T_line) the
    phases are joined with " + " (solid, liquid, vapor). Water's solid-solid
    boundaries (ice II included) are not modelled: above 208.566 MPa a solid is
    named after the melting-line segment whose pressure range holds it.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa

    >>> STABLE_PHASE("water", 25, 1, "degC", "atm")
    'liquid'
    >>> STABLE_PHASE("water", 273.16, 611.657)
    'ice Ih + liquid + vapor'
    """
    sub, t, p = _state(substance, temperature, pressure, t_unit, p_unit)
    cells.shape_of(t, p)
    return cells.result_cells(sub.stable_phase(t.si, p.si), (t, p))


def _phase_state(sub: Substance, temperature, pressure, phase, t_unit, p_unit,
                 names: tuple[str, str, str] = ("temperature", "pressure", "phase")) -> tuple[Arg, Arg, Arg]:
    """Temperature, pressure and phase of a state: a saturated phase needs only one of the two."""
    ph = cells.phases(phase, names[2], sub)
    t, p = _temperature(sub, temperature, t_unit, names[0]), _pressure(sub, pressure, p_unit, names[1])
    code = single(ph.si)  # a single cell's code as a scalar: its comparisons without the array machinery
    saturated = (code == SATURATED_LIQUID) | (code == SATURATED_VAPOR)
    if anywhere(saturated):
        t, p = cells.blank_allowed(t, saturated, names[0]), cells.blank_allowed(p, saturated, names[1])
    cells.shape_of(t, p, ph)
    return t, p, ph


def _phase_property(method: str, kind: units.Kind, unit_name: str, substance, temperature, pressure, phase,
                    t_unit, p_unit, out_unit, convert=None) -> Any:
    sub = cells.substance(substance)
    t, p, ph = _phase_state(sub, temperature, pressure, phase, t_unit, p_unit)
    result = getattr(sub, method)(t.si, p.si, ph.si)
    if convert is not None:
        result.fill(convert(result.values))
    return _out(sub, result, (t, p, ph), out_unit, unit_name, kind)


@sheet_function
def MOLAR_VOLUME(substance, temperature, pressure, phase=None, t_unit=None, p_unit=None, v_unit=None):
    """Molar volume of a phase at (T, p); blank phase means the stable phase.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    phase: "liquid", "vapor", "solid", a STABLE_PHASE label, "saturated liquid" (T or p blank), ..., or blank
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa
    v_unit: unit of the result, default m3/mol (also L/mol, cm3/mol, m3/kg)

    >>> round(MOLAR_VOLUME("water", 25, 1, "", "degC", "atm", "cm3/mol"), 3)
    18.069
    """
    return _phase_property("molar_volume", units.MOLAR_VOLUME, "v_unit", substance, temperature, pressure, phase,
                           t_unit, p_unit, v_unit)


@sheet_function
def MASS_DENSITY(substance, temperature, pressure, phase=None, t_unit=None, p_unit=None, rho_unit=None):
    """Mass density of a phase at (T, p); blank phase means the stable phase.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    phase: "liquid", "vapor", "solid", a STABLE_PHASE label, "saturated vapor" (T or p blank), ..., or blank
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa
    rho_unit: unit of the result, default kg/m3 (also g/cm3, lb/ft3, mol/L)

    >>> round(MASS_DENSITY("water", 0, 1, "ice Ih", "degC", "atm"), 2)
    916.72
    """
    sub = cells.substance(substance)
    return _phase_property("molar_volume", units.DENSITY, "rho_unit", substance, temperature, pressure, phase,
                           t_unit, p_unit, rho_unit, convert=lambda v: sub.molar_mass / v)


@sheet_function
def THERMAL_EXPANSIVITY(substance, temperature, pressure, phase=None, t_unit=None, p_unit=None, result_unit=None):
    """Cubic thermal expansivity (1/V)(dV/dT) at constant pressure.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    phase: a phase word or blank for the stable phase
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa
    result_unit: unit of the result, default 1/K

    >>> round(THERMAL_EXPANSIVITY("water", 25, 1, "", "degC", "bar") * 1e6, 1)
    256.9
    """
    return _phase_property("expansivity", units.EXPANSIVITY, "result_unit", substance, temperature, pressure, phase,
                           t_unit, p_unit, result_unit)


@sheet_function
def ISOTHERMAL_COMPRESSIBILITY(substance, temperature, pressure, phase=None, t_unit=None, p_unit=None,
                               result_unit=None):
    """Isothermal compressibility -(1/V)(dV/dp) at constant temperature.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    phase: a phase word or blank for the stable phase
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa
    result_unit: unit of the result, default 1/Pa (also 1/bar, 1/MPa)

    >>> round(ISOTHERMAL_COMPRESSIBILITY("water", 25, 1, "", "degC", "bar", "1/MPa"), 6)
    0.000452
    """
    return _phase_property("compressibility", units.COMPRESSIBILITY, "result_unit", substance, temperature,
                           pressure, phase, t_unit, p_unit, result_unit)


@sheet_function
def CHEM_POTENTIAL(substance, temperature, pressure, phase, t_unit=None, p_unit=None, mu_unit=None):
    """Chemical potential (molar Gibbs energy) of a phase on the substance's reference state.

    For water the reference is IAPWS-95's: internal energy and entropy of the
    saturated liquid at the triple point are zero.

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    phase: the phase ("liquid", "vapor", "ice Ih", ...)
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa
    mu_unit: unit of the result, default J/mol (also kJ/mol, J/kg, kJ/kg)

    >>> round(CHEM_POTENTIAL("water", 273.16, 611.657, "liquid"), 3)
    0.011
    """
    if phase is None or (isinstance(phase, str) and not phase.strip()):
        return CellError(VALUE, "phase is blank: CHEM_POTENTIAL needs the phase")
    return _phase_property("chem_potential", units.MOLAR_ENERGY, "mu_unit", substance, temperature, pressure, phase,
                           t_unit, p_unit, mu_unit)


@sheet_function
def EXPANSION_RATIO(substance, t_from, p_from, t_to, p_to, phase_from=None, phase_to=None, t_unit=None, p_unit=None):
    """Volume ratio V_to / V_from (molar basis) between two states, e.g. liquid to room-condition gas.

    Arguments:
    substance: name of the substance, e.g. "water"
    t_from: temperature of the starting state
    p_from: pressure of the starting state
    t_to: temperature of the final state
    p_to: pressure of the final state
    phase_from: phase of the starting state, blank for the stable phase
    phase_to: phase of the final state, blank for the stable phase
    t_unit: unit of both temperatures, default K
    p_unit: unit of both pressures, default Pa

    >>> round(EXPANSION_RATIO("water", 20, 1, 90, 1, "", "", "degC", "atm"), 4)
    1.0341
    """
    sub = cells.substance(substance)
    t1, p1, ph1 = _phase_state(sub, t_from, p_from, phase_from, t_unit, p_unit, ("t_from", "p_from", "phase_from"))
    t2, p2, ph2 = _phase_state(sub, t_to, p_to, phase_to, t_unit, p_unit, ("t_to", "p_to", "phase_to"))
    args = (t1, p1, t2, p2, ph1, ph2)
    cells.shape_of(*args)
    return cells.result_cells(sub.expansion_ratio(t1.si, p1.si, t2.si, p2.si, ph1.si, ph2.si), args)


def _boundary(value: Any) -> str:
    return model_call(boundary_code, cells.text(value, "boundary", ""))


@sheet_function
def PHASE_CHANGE_RATIO(substance, boundary, pressure, p_unit=None):
    """Volume ratio across a line at a pressure: "melt" V_liquid/V_solid, "boil" V_vapor/V_liquid, "sublime" V_vapor/V_solid.

    Arguments:
    substance: name of the substance, e.g. "water"
    boundary: "boil", "melt" or "sublime"
    pressure: absolute pressure on the line
    p_unit: unit of pressure, default Pa

    >>> round(PHASE_CHANGE_RATIO("water", "melt", 1, "atm"), 4)
    0.9169
    """
    sub = cells.substance(substance)
    kind = _boundary(boundary)
    p = _pressure(sub, pressure, p_unit)
    return cells.result_cells(sub.phase_change_ratio(kind, p.si), (p,))


@sheet_function
def LATENT_HEAT(substance, boundary, temperature, t_unit=None, h_unit=None):
    """Enthalpy of melting, boiling or sublimation at a temperature on that line.

    Arguments:
    substance: name of the substance, e.g. "water"
    boundary: "boil", "melt" or "sublime"
    temperature: temperature on the line
    t_unit: unit of temperature, default K
    h_unit: unit of the result, default J/mol (also kJ/mol, J/kg, kJ/kg)

    >>> round(LATENT_HEAT("water", "boil", 100, "degC", "kJ/kg"), 1)
    2256.5
    """
    sub = cells.substance(substance)
    kind = _boundary(boundary)
    t = _temperature(sub, temperature, t_unit)
    return _out(sub, sub.latent_heat(kind, t.si), (t,), h_unit, "h_unit", units.MOLAR_ENERGY)


@sheet_function
def FLASH_FRACTION(substance, t_from, p_from, p_to, t_unit=None, p_unit=None):
    """Vapour mass fraction after liquid at (t_from, p_from) is let down adiabatically to saturation at p_to.

    0 when nothing flashes (the liquid stays below its boiling point at p_to); the rest is liquid, or
    solid below the triple-point pressure (liquid CO2 let down to 1 atm: the rest is snow). A p_to above
    p_from is #VALUE!.

    Arguments:
    substance: name of the substance, e.g. "water"
    t_from: temperature of the liquid before the let-down
    p_from: pressure of the liquid before the let-down
    p_to: pressure after the let-down
    t_unit: unit of temperature, default K
    p_unit: unit of both pressures, default Pa

    >>> round(FLASH_FRACTION("water", 170, 10, 1, "degC", "bar"), 4)
    0.1337
    """
    sub = cells.substance(substance)
    t1 = _temperature(sub, t_from, t_unit, "t_from")
    p1, p2 = _pressure(sub, p_from, p_unit, "p_from"), _pressure(sub, p_to, p_unit, "p_to")
    cells.shape_of(t1, p1, p2)
    return cells.result_cells(sub.flash_fraction(t1.si, p1.si, p2.si), (t1, p1, p2))


def _margin(sign: float, substance, temperature, pressure, t_unit, p_unit) -> Any:
    sub, t, p = _state(substance, temperature, pressure, t_unit, p_unit)
    cells.shape_of(t, p)
    step = cells.unit(t_unit, "t_unit", units.TEMPERATURE_DIFFERENCE)  # a difference: no offset
    return cells.result_cells(sub.saturation_margin(t.si, p.si, sign), (t, p), step.from_si, "TEMP")


@sheet_function
def SUBCOOLING(substance, temperature, pressure, t_unit=None, p_unit=None):
    """Subcooling Tsat(p) - T, as a temperature difference in t_unit (negative when superheated).

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    t_unit: unit of temperature (and of the difference), default K
    p_unit: unit of pressure, default Pa

    >>> round(SUBCOOLING("water", 90, 1, "degC", "atm"), 3)
    9.974
    """
    return _margin(1.0, substance, temperature, pressure, t_unit, p_unit)


@sheet_function
def SUPERHEAT(substance, temperature, pressure, t_unit=None, p_unit=None):
    """Superheat T - Tsat(p), as a temperature difference in t_unit (negative when subcooled).

    Arguments:
    substance: name of the substance, e.g. "water"
    temperature: temperature
    pressure: absolute pressure
    t_unit: unit of temperature (and of the difference), default K
    p_unit: unit of pressure, default Pa

    >>> round(SUPERHEAT("water", 250, 10, "degC", "barg"), 2)
    65.88
    """
    return _margin(-1.0, substance, temperature, pressure, t_unit, p_unit)


def _fixed_point(point, substance, which, unit_text) -> Any:
    sub = cells.substance(substance)
    key = (cells.text(which, "which", "") or "").upper()
    if key not in ("T", "P"):
        raise CallError(VALUE, f"which must be \"T\" or \"P\"; got '{which}'")
    fixed = getattr(sub, point)
    if not np.isfinite(fixed.temperature):
        return CellError(NA, f"{sub.name} has no {point} point in its data")
    if key == "T":
        return float(cells.unit(unit_text, "unit", _T).from_si(fixed.temperature))
    return float(cells.unit(unit_text, "unit", _P).from_si(fixed.pressure))


@sheet_function
def TRIPLE_POINT(substance, which, unit=None):
    """Triple-point temperature ("T") or pressure ("P") of the substance (solid, liquid and vapour).

    Arguments:
    substance: name of the substance, e.g. "water"
    which: "T" or "P"
    unit: unit of the result, default K or Pa

    >>> TRIPLE_POINT("water", "P")
    611.657
    """
    return _fixed_point("triple", substance, which, unit)


@sheet_function
def CRITICAL_POINT(substance, which, unit=None):
    """Critical temperature ("T") or pressure ("P") of the substance.

    Arguments:
    substance: name of the substance, e.g. "water"
    which: "T" or "P"
    unit: unit of the result, default K or Pa

    >>> CRITICAL_POINT("water", "P", "MPa")
    22.064
    """
    return _fixed_point("critical", substance, which, unit)


@sheet_function
def PHASE_LINE(substance, boundary, t_start, t_end, points, t_unit=None, p_unit=None, solid=None):
    """A points x 2 spill of (T, p) along "boil", "melt" or "sublime", T evenly spaced, both ends included.

    A row outside the line's range holds its error in the p cell. The melting branch
    is MELT_PRESSURE's: the lowest, or the named solid's.

    Arguments:
    substance: name of the substance, e.g. "water"
    boundary: "boil", "melt" or "sublime"
    t_start: first temperature
    t_end: last temperature
    points: number of rows, 2 to 10000
    t_unit: unit of temperature, default K
    p_unit: unit of pressure, default Pa
    solid: for the melting line, the solid's branch (water: "ice III", ...)

    >>> PHASE_LINE("water", "boil", 100, 200, 2, "degC", "bar").round(4).tolist()
    [[100.0, 1.0142], [200.0, 15.5467]]
    """
    sub = cells.substance(substance)
    kind = _boundary(boundary)
    count = cells.integer_count(points, "points", 2, 10000)
    conversion = cells.unit(t_unit, "t_unit", _T)
    ends = [cells.number(v, name, conversion, absolute="temperature") for v, name in ((t_start, "t_start"), (t_end, "t_end"))]
    for end in ends:
        if end.si.size != 1:  # a one-cell range is a single number
            raise CallError(VALUE, "t_start and t_end must be single numbers")
        if end.errors is not None:
            raise CallError(end.errors.flat[0].code, end.errors.flat[0].reason)
    t_display = np.linspace(conversion.from_si(ends[0].si.item()), conversion.from_si(ends[1].si.item()), count)
    t = Arg(conversion.to_si(t_display), None)
    pressures = _out(sub, _line(sub, kind, "P", t, _solid(sub, solid)), (t,), p_unit, "p_unit", _P, "PRESSURE")
    table = np.empty((count, 2), dtype=object if pressures.dtype == object else float)
    table[:, 0] = t_display
    table[:, 1] = pressures
    return table


@sheet_function
def SUBSTANCES():
    """The names of the substances the pack knows, as a column.

    >>> "water" in SUBSTANCES().ravel()
    True
    """
    return np.array(names(), dtype=object).reshape(-1, 1)


@sheet_function
def SUBSTANCE_INFO(substance, field=None):
    """A field of the substance's definition: data, the model behind a quantity, its range and source.

    With no field, spills the definition as rows of (field, value, unit, source); for
    substances other than water those rows, pasted into a sheet, serve as a user-defined
    substance argument. Any field with "_source" appended gives that field's source.

    Arguments:
    substance: name of the substance, e.g. "water"
    field: e.g. "molar_mass", "critical_density", "boil_model", "melt_range", "liquid_model", "molar_mass_source"

    >>> SUBSTANCE_INFO("water", "critical_density")
    322.0
    >>> SUBSTANCE_INFO("water", "boil_model")
    'IAPWS-IF97 region 4 saturation equation'
    """
    sub = cells.substance(substance)
    key = cells.text(field, "field")
    if key is None:
        return np.array([list(row) for row in sub.definition_rows()], dtype=object)
    info = sub.info()
    folded = {k.lower(): k for k in info}  # a line's coefficients keep their case ("boil.Tc", "boil.T_min")
    name = key.lower().replace(" ", "_")
    if name in folded:
        return info[folded[name]].value
    if name.endswith("_source") and name[: -len("_source")] in folded:
        return info[folded[name[: -len("_source")]]].source or CellError(NA, f"no source recorded for '{key[:-7]}'")
    return CellError(NA, f"unknown field '{key}' for {sub.name}; SUBSTANCE_INFO(\"{sub.name}\") lists the fields")
