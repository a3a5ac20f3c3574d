"""Checks of the group-a substance data files (cryogens, CO2 and light hydrocarbons).

Every value in these files is transcribed from memory of the publication its
``reference`` names; these tests check each file's own consistency: the
vapour-pressure line against the file's normal boiling point, triple point and
critical point, the melting and sublimation lines against the triple point,
and that each line rises smoothly over its stated range.
"""

from __future__ import annotations

import math
import tomllib
from importlib import resources

import numpy as np
import pytest

from cellfuncs.data import constant
from cellfuncs.substances.lines import FORMS, line_pressure

KEYS = [
    "nitrogen", "oxygen", "argon", "neon", "helium-4", "hydrogen", "carbon-monoxide", "carbon-dioxide",
    "methane", "ethane", "ethylene", "propane", "propylene", "n-butane",
]

# Helium-4 has no solid in equilibrium with its vapour (schema: omit triple-point, fusion and solid fields).
NO_TRIPLE_POINT = {"helium-4"}
# Carbon dioxide sublimes at 1 atm: it has a normal sublimation point instead of a normal boiling point.
SUBLIMES_AT_1_ATM = {"carbon-dioxide"}
# Propylene: no triple-point pressure was recalled with a publication to cite (see the file's note).
NO_TRIPLE_POINT_PRESSURE = {"propylene"}

UNITS = {
    "molar_mass": "kg/mol",
    "critical_temperature": "K",
    "critical_pressure": "Pa",
    "critical_density": "kg/m3",
    "acentric_factor": "",
    "triple_point_temperature": "K",
    "triple_point_pressure": "Pa",
    "normal_boiling_point": "K",
    "normal_sublimation_point": "K",
    "enthalpy_of_fusion": "J/mol",
    "liquid_density": "kg/m3",
    "solid_density": "kg/m3",
    "liquid_heat_capacity": "J/(mol*K)",
}
REQUIRED = ["molar_mass", "critical_temperature", "critical_pressure", "critical_density", "acentric_factor"]
WITH_STATE = {"liquid_density", "solid_density", "liquid_heat_capacity"}

LINE_KEYS = {
    "ancillary": ("Tc", "pc", "n", "t"),
    "antoine": ("A", "B", "C", "p_unit", "t_unit"),
    "simon_glatzel": ("T0", "p0", "a", "c"),
    "ancillary_melting": ("Tt", "pt", "a", "t"),
    "ancillary_sublimation": ("Tt", "pt", "a", "t"),
}
LINE_FORMS = {"boil": {"ancillary", "antoine"}, "melt": {"simon_glatzel", "ancillary_melting"},
              "sublime": {"ancillary_sublimation"}}

P_ATM = 101325.0


def _read(key: str) -> dict:
    text = resources.files("cellfuncs.data").joinpath(f"substances/{key}.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


DATA = {key: _read(key) for key in KEYS}


def _value(key: str, name: str) -> float:
    return float(DATA[key]["constants"][name]["value"])


def _line(key: str, kind: str) -> dict:
    line = DATA[key].get("lines", {}).get(kind)
    if line is None:
        pytest.skip(f"{key}: no {kind} line given (the model's documented fallback applies)")
    return line


def _in_range(line: dict, T: float) -> bool:
    return line["T_min"] <= T <= line["T_max"]


@pytest.mark.parametrize("key", KEYS)
def test_file_parses_with_schema_fields(key):
    data = DATA[key]
    assert isinstance(data["name"], str) and data["name"] == data["name"].lower()
    assert isinstance(data["formula"], str) and data["formula"]
    assert isinstance(data["designation"], str)
    assert isinstance(data["aliases"], list) and all(a == a.lower() for a in data["aliases"])
    assert data["associating"] is False  # none of group a hydrogen-bonds
    assert isinstance(data.get("note", ""), str)
    constants = data["constants"]
    for name in REQUIRED:
        assert name in constants, f"{key}: missing {name}"
    for name in ("enthalpy_of_fusion", "triple_point_temperature"):
        assert (name in constants) == (key not in NO_TRIPLE_POINT), f"{key}: {name}"
    has_pt = key not in NO_TRIPLE_POINT | NO_TRIPLE_POINT_PRESSURE
    assert ("triple_point_pressure" in constants) == has_pt, key
    assert "liquid_density" in constants
    assert ("normal_sublimation_point" if key in SUBLIMES_AT_1_ATM else "normal_boiling_point") in constants
    for name, entry in constants.items():
        assert entry["unit"] == UNITS[name], f"{key}.{name}: unit {entry['unit']!r}"
        assert isinstance(entry["value"], float | int) and math.isfinite(entry["value"])
        assert entry["reference"].strip() and entry["memory"] is True
        if name in WITH_STATE:
            assert entry["state"] and entry["temperature"] > 0
        if name != "acentric_factor":
            assert entry["value"] > 0
        assert constant(f"substances/{key}", name).value == entry["value"]  # readable by cellfuncs.data


@pytest.mark.parametrize("key", KEYS)
def test_lines_have_form_keys_range_and_source(key):
    for kind, line in DATA[key].get("lines", {}).items():
        assert line["form"] in LINE_FORMS[kind] and line["form"] in FORMS
        for name in LINE_KEYS[line["form"]]:
            assert name in line, f"{key}.{kind}: missing {name}"
        for coefficients, exponents in (("n", "t"), ("a", "t"), ("b", "s")):
            if exponents in line and coefficients in line:
                assert len(line[coefficients]) == len(line[exponents])
        assert line["T_min"] < line["T_max"]
        assert line["reference"].strip() and line["memory"] is True


@pytest.mark.parametrize("key", KEYS)
def test_line_reducing_values_match_file_constants(key):
    lines = DATA[key].get("lines", {})
    for line in lines.values():
        if "Tc" in line:
            assert line["Tc"] == _value(key, "critical_temperature")
            assert line["pc"] == _value(key, "critical_pressure")
        if "Tt" in line:
            assert line["Tt"] == _value(key, "triple_point_temperature")
            assert line["pt"] == _value(key, "triple_point_pressure")


@pytest.mark.parametrize("key", [k for k in KEYS if k not in SUBLIMES_AT_1_ATM])
def test_vapour_pressure_gives_normal_boiling_point(key):
    from scipy.optimize import brentq

    line = _line(key, "boil")
    Tb = _value(key, "normal_boiling_point")
    assert _in_range(line, Tb)
    T = brentq(lambda T: float(line_pressure(line, T)) - P_ATM, line["T_min"], line["T_max"], xtol=1e-9)
    assert abs(T - Tb) < 0.5, f"{key}: {T:.3f} K vs {Tb} K"


# Carbon monoxide: the handbook Antoine line (Reid et al. 1987) gives 15.10 kPa at 68.16 K, 2.2 % below the
# 15.45 kPa of Lemmon and Span (2006); kept as published and recorded here as a known deviation.
_TRIPLE_KEYS = [pytest.param(k, marks=pytest.mark.xfail(strict=True, reason="Antoine line 2.2 % low at Tt"))
                if k == "carbon-monoxide" else k for k in KEYS]


@pytest.mark.parametrize("key", _TRIPLE_KEYS)
def test_vapour_pressure_gives_triple_point_pressure(key):
    line = _line(key, "boil")
    if key in NO_TRIPLE_POINT:
        pytest.skip(f"{key}: no triple point with the vapour")
    if key in NO_TRIPLE_POINT_PRESSURE:
        pytest.skip(f"{key}: no published triple-point pressure recalled")
    Tt = _value(key, "triple_point_temperature")
    if not _in_range(line, Tt):
        pytest.skip(f"{key}: the vapour-pressure line ({line['T_min']}-{line['T_max']} K) does not reach Tt = {Tt} K")
    p = float(line_pressure(line, Tt))
    pt = _value(key, "triple_point_pressure")
    assert p == pytest.approx(pt, rel=0.02), f"{key}: {p:.6g} Pa vs {pt} Pa"


@pytest.mark.parametrize("key", KEYS)
def test_vapour_pressure_gives_critical_pressure(key):
    line = _line(key, "boil")
    Tc = _value(key, "critical_temperature")
    if not _in_range(line, Tc):
        pytest.skip(f"{key}: the vapour-pressure line ({line['T_min']}-{line['T_max']} K) does not reach Tc = {Tc} K")
    assert float(line_pressure(line, Tc)) == pytest.approx(_value(key, "critical_pressure"), rel=0.02)


# Carbon monoxide: at 0.7 Tc the Antoine line gives omega = 0.062 against 0.0497 of Lemmon and Span (2006).
_OMEGA_KEYS = [pytest.param(k, marks=pytest.mark.xfail(strict=True, reason="Antoine line gives omega 0.062"))
               if k == "carbon-monoxide" else k for k in KEYS]


@pytest.mark.parametrize("key", _OMEGA_KEYS)
def test_vapour_pressure_agrees_with_acentric_factor(key):
    # Pitzer's definition: omega = -log10(p_sat(0.7 Tc) / pc) - 1.
    line = _line(key, "boil")
    Tc = _value(key, "critical_temperature")
    if not _in_range(line, 0.7 * Tc):
        pytest.skip(f"{key}: the vapour-pressure line does not reach 0.7 Tc = {0.7 * Tc:.2f} K")
    omega = -math.log10(float(line_pressure(line, 0.7 * Tc)) / _value(key, "critical_pressure")) - 1.0
    assert omega == pytest.approx(_value(key, "acentric_factor"), abs=0.01)


@pytest.mark.parametrize("kind", ["boil", "melt", "sublime"])
@pytest.mark.parametrize("key", KEYS)
def test_line_increases_continuously_over_its_range(key, kind):
    line = _line(key, kind)

    def largest_step(n):
        p = line_pressure(line, np.linspace(line["T_min"], line["T_max"], n))
        assert np.all(np.isfinite(p)) and np.all(p > 0)
        steps = np.diff(p)
        assert np.all(steps > 0), f"{key}.{kind} not increasing"
        return steps.max()

    # A jump in the line would not shrink as the grid is refined; a continuous line's steps halve.
    assert largest_step(4001) < 0.6 * largest_step(2001)


@pytest.mark.parametrize("key", KEYS)
def test_melting_line_passes_through_triple_point(key):
    line = _line(key, "melt")
    Tt = _value(key, "triple_point_temperature")
    assert float(line_pressure(line, Tt)) == pytest.approx(_value(key, "triple_point_pressure"), rel=0.01)


@pytest.mark.parametrize("key", KEYS)
def test_sublimation_line_meets_triple_point_pressure(key):
    line = _line(key, "sublime")
    Tt = _value(key, "triple_point_temperature")
    assert float(line_pressure(line, Tt)) == pytest.approx(_value(key, "triple_point_pressure"), rel=0.02)


def test_carbon_dioxide_sublimation_line_gives_normal_sublimation_point():
    from scipy.optimize import brentq

    line = DATA["carbon-dioxide"]["lines"]["sublime"]
    T = brentq(lambda T: float(line_pressure(line, T)) - P_ATM, line["T_min"], line["T_max"], xtol=1e-9)
    # 194.686 K: Span and Wagner (1996), sublimation temperature at 0.101325 MPa (from memory of the paper)
    assert abs(T - _value("carbon-dioxide", "normal_sublimation_point")) < 0.5
