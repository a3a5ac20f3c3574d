"""The substance data files, every one of the catalogue: their format, their published lines against
their own fixed points, the model against second publications, the melting lines the solid data give,
and the ideal-gas heat capacities.

The reference values of the line checks (normal boiling point, triple point, critical point) are the
constants of the same data file, each naming its source there (handbook table or reference-equation
paper, mostly recalled from memory, marked ``memory = true``). A line and the fixed points beside it
come from different publications (or different tables of one), so agreement between them is the
check that the coefficients were recalled right. Tolerances are the project's data checks: 0.5 K on
the normal boiling point, 2 % (5 % for associating fluids) on the triple-point pressure, 2 % on the
critical pressure, 1 % where a melting line meets the triple point. No value was tuned to pass; the
known misses are listed with what was measured.

What a file holds and lacks is read from the file: the tables below are facts about the substances
(which fluids associate, which has no triple point, which sublime at 1 atm), not lists of which
constants a file happens to have. A constant a file lacks is checked through what the model does
instead (a triple-point pressure from the vapour-pressure line, a melting temperature independent of
pressure), and the file's note says why it is missing where the model cannot say it.
"""

from __future__ import annotations

import math
import re
import tomllib
from functools import lru_cache
from importlib import resources

import numpy as np
import pytest

from cellfuncs.data import constant
from cellfuncs.errors import CellError
from cellfuncs.substances.constants import R
from cellfuncs.sheet.functions import (BOIL_PRESSURE, BOIL_TEMP, CRITICAL_POINT, MASS_DENSITY, MELT_TEMP, SUBSTANCE_INFO,
                                       TRIPLE_POINT)
from cellfuncs.substances import ideal_gas
from cellfuncs.substances import builtin_keys
from cellfuncs.substances.general import schema
from cellfuncs.substances.general.definition import Definition, load_builtin
from cellfuncs.substances.general.model import GeneralSubstance
from cellfuncs.substances.helmholtz.schema import SchemaError
from cellfuncs.substances.lines import line_pressure
from cellfuncs.substances.result import ModelError

KEYS = builtin_keys()
P_ATM = 101325.0  # Pa, the standard atmosphere (exact), definition of the normal boiling point

# Hydrogen-bonding (associating) fluids: the alcohols, the glycol, acetic acid and ammonia (common practice).
ASSOCIATING = {"1-butanol", "2-propanol", "acetic-acid", "ammonia", "ethanol", "ethylene-glycol", "methanol"}
# Helium-4 has no solid in equilibrium with its vapour: no triple point, fusion or solid data.
NO_TRIPLE_POINT = {"helium-4"}
# Carbon dioxide and sulfur hexafluoride sublime at 1 atm: a normal sublimation point instead.
SUBLIMES_AT_1_ATM = {"carbon-dioxide", "sulfur-hexafluoride"}
# Quantum fluids and argon have an acentric factor at or below zero (their reference equations' values).
NONPOSITIVE_ACENTRIC = {"argon", "helium-4", "hydrogen", "neon", "parahydrogen"}
# Handbook vapour-pressure lines reduced by the handbook's own critical point, which differs from the
# reference-equation critical point of the file's constants by a fraction of a kelvin or per cent.
LINE_OWN_CRITICAL_POINT = {"acetone", "benzene", "n-heptane", "n-hexane", "n-octane", "p-xylene"}


@lru_cache(maxsize=None)
def _file(key: str) -> dict:
    text = resources.files("cellfuncs.data").joinpath("substances", f"{key}.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


def _value(key: str, name: str) -> float | None:
    entry = _file(key)["constants"].get(name)
    return None if entry is None else float(entry["value"])


def _line(key: str, kind: str) -> dict | None:
    return _file(key).get("lines", {}).get(kind)


def _associating(key: str) -> bool:
    """The file's own flag (checked against ASSOCIATING in test_file_has_its_texts)."""
    return _file(key)["associating"]


def _need_line(key: str, kind: str) -> dict:
    line = _line(key, kind)
    if line is None:
        pytest.skip(f"{key}: no published {kind} line in the file (the model's documented fallback applies)")
    return line


def _in_range(line: dict, T: float) -> bool:
    return line["T_min"] - 1e-9 <= T <= line["T_max"] + 1e-9


def _known_miss(keys: dict[str, str]) -> list:
    return [pytest.param(k, marks=pytest.mark.xfail(strict=True, reason=keys[k])) if k in keys else k for k in KEYS]


# --- format --------------------------------------------------------------------------------------

@pytest.mark.parametrize("key", KEYS)
def test_file_follows_the_format(key):
    # the format of cellfuncs/substances/general/schema.py: read raises SchemaError naming what it refuses
    read = schema.read(f"{key}.toml", _file(key))
    d = load_builtin(key)
    assert d.constants == read.constants and d.sources == read.sources
    for name, c in d.constants.items():
        assert c.name.strip() and c.reference.strip() and isinstance(c.memory, bool), name
        # every value is recalled from a published table, or its reference says where it was read
        assert c.memory or re.search("read from a (stored )?copy", c.reference), name
        # a file writes each constant in its SI unit, so the definition's value is the file's number
        assert c.unit == schema.UNITS[name] and d.values[name] == c.value == _value(key, name), name
        assert constant(f"substances/{key}", name) == c  # cellfuncs.data reads it alike
        if name == "acentric_factor":
            assert (c.value <= 0) == (key in NONPOSITIVE_ACENTRIC)
        else:
            assert c.value > 0, name
        if c.uncertainty is not None:
            # positive and in the value's unit: the catalogue's relative uncertainties span 1.4e-5 (carbon
            # dioxide's triple-point temperature) to 0.35 (estimated enthalpies of fusion); one written in
            # kPa or MPa beside a value in Pa would fall below
            assert 1e-6 < c.uncertainty / abs(c.value) < 0.5, name
            assert f"uncertainty {c.uncertainty:g}" in d.sources[name]  # SUBSTANCE_INFO's source column shows it
    for kind, line in _file(key).get("lines", {}).items():
        assert line["memory"] is True and line["reference"].strip(), kind


@pytest.mark.parametrize("key", KEYS)
def test_file_has_its_texts(key):
    d = _file(key)  # the types are the format's; these are facts about the substance
    assert d["name"] and d["name"] == d["name"].lower() and d["formula"]
    assert d["associating"] == (key in ASSOCIATING)
    assert all(a == a.lower() and a not in (d["name"], d["formula"].lower(), d["designation"].lower())
               for a in d["aliases"])


@pytest.mark.parametrize("key", KEYS)
def test_file_has_the_constants_its_substance_needs(key):
    d = _file(key)
    constants, note = d["constants"], d["note"].lower()
    # the reader takes the acentric factor from the normal boiling point where a file gives none, and the
    # note says so; a file that gives one gives the critical density too (the model itself uses neither)
    assert "acentric_factor" in constants or "normal_boiling_point" in constants
    if "acentric_factor" in constants:
        assert "critical_density" in constants
    else:
        assert "acentric factor follows from the normal boiling point" in note
    assert ("triple_point_temperature" in constants) == (key not in NO_TRIPLE_POINT)
    # the Clapeyron melting line needs both an enthalpy of fusion and a solid density
    if "solid_density" in constants:
        assert "enthalpy_of_fusion" in constants
    # with an enthalpy of fusion and no published melting line a solid density gives the Clapeyron line,
    # or the note says that none was recalled (the melting temperature is then independent of pressure)
    if "enthalpy_of_fusion" in constants and _line(key, "melt") is None:
        assert "solid_density" in constants or "no solid density recalled" in note
    assert ("normal_boiling_point" in constants) != ("normal_sublimation_point" in constants)
    assert ("normal_sublimation_point" in constants) == (key in SUBLIMES_AT_1_ATM)
    if _associating(key):
        assert "boil" in d.get("lines", {}), "associating fluids need a published vapour-pressure equation"


@pytest.mark.parametrize("key", KEYS)
def test_file_loads_as_builtin_definition(key):
    d = load_builtin(key)
    assert d.name == _file(key)["name"]
    assert set(d.lines) == set(_file(key).get("lines", {}))
    assert bool(d.ideal_gas) == ("ideal_gas_cp" in _file(key))
    # the rows SUBSTANCE_INFO spills paste back as the same definition
    again = Definition.from_fields({f: (v, u) if u else v for f, v, u in d.fields()})
    assert again.values == d.values and again.lines == d.lines and again.ideal_gas == d.ideal_gas


# each slip in propane's file, and the start of the plain message the format refuses it with
SLIPS = [
    ('designation = "R-290"', 'designation = "R-290"\nsynonym = "x"', "propane.toml: unknown key 'synonym' in the file"),
    ('[constants.molar_mass]', '[constants.molar_weight]', "propane.toml: unknown constant 'molar_weight'"),
    ('value = 0.04409562', 'value = 0.04409562\nsigma = 1e-6',
     "propane.toml: unknown key 'sigma' in constant 'molar_mass'"),
    ('unit = "kg/mol"', 'unit = "kg/mole"',
     "propane.toml: constant 'molar_mass' has unit 'kg/mole', 'kg/mol' spelt otherwise; data files write 'kg/mol'"),
    ('unit = ""', 'unit = "1"', "propane.toml: constant 'acentric_factor' has unit '1', '' spelt otherwise"),
    ('unit = ""', 'unit = "-"', "propane.toml: constant 'acentric_factor' has unit '-'; data files write ''"),
    ('unit = "kg/mol"', 'unit = "g/mol"', "propane.toml: constant 'molar_mass' has unit 'g/mol'; data files write"),
    ('uncertainty = 2.0', 'uncertainty = -2.0', "propane.toml: constant 'liquid_density': 'uncertainty' must be "
                                                "positive, in the value's unit"),
    ('uncertainty = 2.0', 'uncertainty = "2 kg/m3"', "propane.toml: constant 'liquid_density': 'uncertainty' must be "
                                                     "a finite number"),
    ('memory = true', 'memory = "yes"', "propane.toml: constant 'molar_mass': 'memory' must be true or false"),
    ('\nmemory = true', '', "propane.toml: constant 'molar_mass' lacks 'memory'"),
    ('value = 369.89\nunit = "K"', 'value = 369.89\nunit = "K"\ntemperature = 300.0\nstate = "gas"',
     "propane.toml: constant 'critical_temperature' has no state"),
    ('state = "solid"\n', '', "propane.toml: constant 'solid_density' lacks 'state'"),
    ('[lines.boil]', '[lines.boiling]', "propane.toml: unknown line 'boiling'; known: boil, melt, sublime"),
    ('form = "ancillary"', 'form = "simon_glatzel"', "propane.toml: line 'boil': form 'simon_glatzel' is not one of"),
    ('T_min = 85.525', 'T_min = 85.525\nT_mn = 85.525', "propane.toml: unknown field 'boil.T_mn' for the boil line"),
    ('T_min = 50.0', 'T_min = 50.0\nT_low = 50.0', "propane.toml: unknown field 'ideal_gas_cp.T_low'"),
]


@pytest.mark.parametrize("right, wrong, message", SLIPS)
def test_the_format_refuses_a_slip_with_a_plain_message(monkeypatch, right, wrong, message):
    from types import SimpleNamespace

    from cellfuncs.substances.general import definition

    text = resources.files("cellfuncs.data").joinpath("substances", "propane.toml").read_text(encoding="utf-8")
    assert right in text
    slipped = text.replace(right, wrong, 1)
    file = SimpleNamespace(read_text=lambda encoding: slipped)
    monkeypatch.setattr(definition, "resources", SimpleNamespace(files=lambda package: SimpleNamespace(
        joinpath=lambda *parts: file)))
    load_builtin.cache_clear()
    try:
        with pytest.raises(SchemaError) as refused:
            load_builtin("propane")
        assert str(refused.value).startswith(message)
    finally:
        load_builtin.cache_clear()


@pytest.mark.parametrize("key", KEYS)
def test_line_reducing_values_match_file_constants(key):
    for line in _file(key).get("lines", {}).values():
        if "Tc" in line:
            tc, pc = _value(key, "critical_temperature"), _value(key, "critical_pressure")
            if key in LINE_OWN_CRITICAL_POINT:
                assert abs(line["Tc"] - tc) < 1.0 and line["pc"] == pytest.approx(pc, rel=0.006)
                assert (line["Tc"], line["pc"]) != (tc, pc)
            else:
                assert (line["Tc"], line["pc"]) == (tc, pc)
        if "Tt" in line:
            assert line["Tt"] == _value(key, "triple_point_temperature")
            assert line["pt"] == _value(key, "triple_point_pressure")


# --- the published lines against the file's own fixed points -------------------------------------

@pytest.mark.parametrize("key", _known_miss({
    "acetonitrile": "the Antoine constants as published give 1 atm at 354.25 K, 0.55 K below the listed normal "
                    "boiling point 354.80 K; not tuned"}))
def test_vapour_pressure_gives_normal_boiling_point(key):
    from scipy.optimize import brentq

    line, tb = _need_line(key, "boil"), _value(key, "normal_boiling_point")
    if tb is None:
        pytest.skip(f"{key}: no normal boiling point, the substance sublimes at 1 atm")
    assert _in_range(line, tb)
    T = brentq(lambda T: float(line_pressure(line, T)) - P_ATM, line["T_min"], line["T_max"], xtol=1e-9)
    # measured for the refrigerants, solvents and parahydrogen added last: within 0.004 K, carbon
    # tetrachloride 0.073 K, chloroform 0.034 K
    assert abs(T - tb) < 0.5, f"{key}: {T:.3f} K vs {tb} K"


# Published lines whose value at the triple point misses the file's triple-point pressure by more than
# the bound. Both numbers are as recalled; which one is off is not known, so the miss is recorded, not hidden.
TRIPLE_MISSES = {
    "carbon-monoxide": "the handbook Antoine line (Reid et al. 1987) gives 15.10 kPa at 68.16 K, 2.2 % below the "
                       "15.45 kPa of Lemmon and Span (2006)",
    "isobutane": "Buecker-Wagner ancillary gives 0.0219 Pa against the EOS triple-point pressure 0.02289 Pa (-4.3 %)",
    "n-pentane": "Poling Wagner equation, extrapolated below its fitted range, gives 0.0713 Pa against 0.0763 Pa (-6.5 %)",
    "n-hexane": "Poling Wagner equation, extrapolated below its fitted range, gives 1.18 Pa against 1.277 Pa (-7.4 %)",
}


@pytest.mark.parametrize("key", _known_miss(TRIPLE_MISSES))
def test_vapour_pressure_gives_triple_point_pressure(key):
    line, tt, pt = _need_line(key, "boil"), _value(key, "triple_point_temperature"), _value(key, "triple_point_pressure")
    if pt is None:
        pytest.skip(f"{key}: no triple-point pressure in the file")
    if not _in_range(line, tt):
        pytest.skip(f"{key}: the line ({line['T_min']}-{line['T_max']} K) does not reach Tt = {tt} K")
    bound = 0.05 if _associating(key) else 0.02
    # measured for the refrigerants and parahydrogen added last: R-1234ze(E) -0.62 %, the others within 0.07 %
    assert float(line_pressure(line, tt)) == pytest.approx(pt, rel=bound)


@pytest.mark.parametrize("key", [k for k in KEYS if k not in NO_TRIPLE_POINT])
def test_the_triple_point_lies_on_the_boiling_line_and_a_missing_pressure_is_said_to_be_missing(key):
    # The model's triple point is where its vapour-pressure line meets the triple-point temperature
    # (tests/test_substances.py compares that pressure with the file's, where the file has one). Where
    # no triple-point pressure was recalled with a publication to cite, SUBSTANCE_INFO says there is none.
    name, tt, pt = _name(key), _value(key, "triple_point_temperature"), _value(key, "triple_point_pressure")
    assert TRIPLE_POINT(name, "T") == tt
    assert TRIPLE_POINT(name, "P") == pytest.approx(BOIL_PRESSURE(name, tt), rel=1e-12)
    stated = SUBSTANCE_INFO(name, "triple_point_pressure")
    assert isinstance(stated, CellError) if pt is None else stated == pt


@pytest.mark.parametrize("key", KEYS)
def test_vapour_pressure_gives_critical_pressure(key):
    line, tc, pc = _need_line(key, "boil"), _value(key, "critical_temperature"), _value(key, "critical_pressure")
    # A handbook line may end at its own Tc a fraction of a kelvin from the file's EOS value: it reaches
    # the critical point when it ends within 1 K (and 1 %) of it, and is evaluated at the nearer of the two.
    if line["T_max"] < max(tc - 1.0, 0.99 * tc):
        pytest.skip(f"{key}: the line ends below the critical point")
    # a line reduced by the file's own critical point meets it exactly (the ancillary form gives pc at tau = 0)
    own = (line.get("Tc"), line.get("pc")) == (tc, pc) and line["T_max"] >= tc
    assert float(line_pressure(line, min(tc, line["T_max"]))) == pytest.approx(pc, rel=1e-9 if own else 0.02)


# Pitzer's acentric factor from the line at 0.7 Tc against the file's value: 0.005; measured within
# 0.002 except ethanol (-0.0057) and acetonitrile (-0.0076), whose handbook lines are held to 0.01
# (the refrigerants and parahydrogen added last: within 0.0006).
OMEGA_TOLERANCE = {"ethanol": 0.01, "acetonitrile": 0.01}


@pytest.mark.parametrize("key", _known_miss({"carbon-monoxide": "the Antoine line gives omega = 0.062 at 0.7 Tc "
                                                                "against 0.0497 of Lemmon and Span (2006)"}))
def test_vapour_pressure_agrees_with_acentric_factor(key):
    line, tc, pc = _need_line(key, "boil"), _value(key, "critical_temperature"), _value(key, "critical_pressure")
    if not _in_range(line, 0.7 * tc):
        pytest.skip(f"{key}: the line does not reach 0.7 Tc = {0.7 * tc:.2f} K")
    omega = -math.log10(float(line_pressure(line, 0.7 * tc)) / pc) - 1.0
    assert omega == pytest.approx(_value(key, "acentric_factor"), abs=OMEGA_TOLERANCE.get(key, 0.005))


def _name(key: str) -> str:
    return _file(key)["name"]


LINES = [(key, kind) for key in KEYS for kind in ("boil", "melt", "sublime") if _line(key, kind) is not None]


@pytest.mark.parametrize("key, kind", LINES)
def test_line_is_increasing_and_continuous(key, kind):
    line = _line(key, kind)
    grid = {n: line_pressure(line, np.linspace(line["T_min"], line["T_max"], n)) for n in (1001, 10001)}
    assert np.all(np.isfinite(grid[10001])) and np.all(grid[10001] > 0)
    # in p and, for the lines that span decades, in ln p: a jump would not shrink with the grid, a
    # continuous line's largest step shrinks about tenfold (a melting line rises from the triple-point
    # pressure by megapascals per kelvin, so in ln p its first step dominates: it is compared in p only)
    for scale in (lambda p: p,) + ((np.log,) if kind != "melt" else ()):
        coarse, fine = np.diff(scale(grid[1001])), np.diff(scale(grid[10001]))
        assert np.all(coarse > 0) and np.all(fine > 0)
        assert fine.max() < 0.2 * coarse.max()


@pytest.mark.parametrize("key", KEYS)
def test_melting_line_passes_through_triple_point(key):
    line = _need_line(key, "melt")
    tt = _value(key, "triple_point_temperature")
    assert float(line_pressure(line, tt)) == pytest.approx(_value(key, "triple_point_pressure"), rel=0.01)


@pytest.mark.parametrize("key", KEYS)
def test_sublimation_line_meets_triple_point_pressure(key):
    line = _need_line(key, "sublime")
    tt = _value(key, "triple_point_temperature")
    assert float(line_pressure(line, tt)) == pytest.approx(_value(key, "triple_point_pressure"), rel=0.02)


def test_carbon_dioxide_sublimation_line_gives_normal_sublimation_point():
    from scipy.optimize import brentq

    line = _line("carbon-dioxide", "sublime")
    T = brentq(lambda T: float(line_pressure(line, T)) - P_ATM, line["T_min"], line["T_max"], xtol=1e-9)
    # 194.686 K: Span and Wagner (1996), sublimation temperature at 0.101325 MPa (from memory of the paper)
    assert abs(T - _value("carbon-dioxide", "normal_sublimation_point")) < 0.5


# --- the model against other publications ------------------------------------------------------
# The substances added last (refrigerants, solvents, parahydrogen) against a second publication's normal
# boiling point, critical point, triple point and liquid density, named beside each value.
# (substance, value, source). "memory": recalled from that publication; "read": read from a stored copy of it.

CRC_REFRIGERANTS = "CRC Handbook of Chemistry and Physics, 97th ed. (2016), Properties of Refrigerants (from memory)"
POLING = "Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th ed. (2001), Appendix A (from memory)"
MERCK = "The Merck Index, 15th ed. (2013) (from memory)"
RIDDICK = "Riddick, Bunger and Sakano, Organic Solvents, 4th ed. (1986) (from memory)"
CRC = "CRC Handbook of Chemistry and Physics, 97th ed. (2016), Physical Constants of Organic Compounds (from memory)"
NBS_H2 = ("McCarty, Hord and Roder, Selected Properties of Hydrogen, NBS Monograph 168 (1981), parahydrogen "
          "(from memory)")
DUPONT_R23 = ("DuPont Technical Information T-23, Thermodynamic Properties of HFC-23 (Hou and Martin's data), read "
              "from a stored copy")
ECHA_R123 = "ECHA registration dossier of HCFC-123, physical and chemical properties, read from a stored copy"

C = 273.15  # K at 0 degC

BOILING = [  # normal boiling point, K; 0.5 K
    ("R-22", C - 40.7, CRC_REFRIGERANTS),
    ("R-1234ze(E)", C - 19.0, "Honeywell, Solstice ze technical data (from memory)"),
    ("R-1234yf", C - 29.4, "Honeywell, Solstice yf technical data (from memory)"),
    ("R-152a", C - 24.0, CRC_REFRIGERANTS),
    ("R-125", C - 48.1, CRC_REFRIGERANTS),
    ("R-143a", 225.90, "J. Chem. Eng. Data 41, 1477 (1996), vapour pressures of 1,1,1-trifluoroethane, abstract: "
                       "(225.90 +/- 0.01) K, read from a stored copy"),
    ("R-245fa", C + 15.3, "Honeywell, Enovate 245fa technical data (from memory; the same 15.3 degC read from a "
                          "stored copy of a supplier's page)"),
    ("R-1233zd(E)", C + 18.3, "Honeywell, Solstice zd technical data (from memory)"),
    ("R-23", C - 82.03, DUPONT_R23),
    ("R-123", C + 27.8, CRC_REFRIGERANTS),
    ("R-227ea", C - 16.4, "chemeurope.com encyclopedia, 1,1,1,2,3,3,3-heptafluoropropane, read from a stored copy"),
    ("parahydrogen", 20.268, NBS_H2),
    ("tetrahydrofuran", C + 66.0, MERCK),
    ("chloroform", 334.3, POLING),
    ("N,N-dimethylformamide", C + 153.0, MERCK),
    ("dimethyl sulfoxide", C + 189.0, MERCK),
    ("N-methyl-2-pyrrolidone", C + 202.0, MERCK),
    ("methyl tert-butyl ether", C + 55.0, CRC),
    ("1,4-dioxane", C + 101.5, CRC),
    ("2-butanone", 352.79, POLING),
    ("1-butanol", 390.81, POLING),
    ("pyridine", 388.41, POLING),
    ("carbon tetrachloride", C + 76.8, CRC),
]

CRITICAL = [  # critical temperature, K (0.5 %) and pressure, Pa (2 %)
    ("R-22", C + 96.2, 4.990e6, CRC_REFRIGERANTS + "; pc: " + POLING),
    ("R-1234ze(E)", 382.52, 3.6363e6, "McLinden, Thol and Lemmon (2010), International Refrigeration and Air "
                                      "Conditioning Conference, Purdue, the earlier R-1234ze(E) equation (from memory)"),
    ("R-152a", C + 113.3, 4.52e6, CRC_REFRIGERANTS + "; pc: " + POLING),
    ("R-143a", C + 72.7, 3.776e6, CRC_REFRIGERANTS + "; pc: Zhang, Sato and Watanabe (1995), J. Chem. Eng. Data "
                                  "40, 887, abstract: (3.776 +/- 0.005) MPa, read from a stored copy"),
    ("R-23", 299.07, 4.836e6, DUPONT_R23),
    ("R-123", C + 183.7, 3.6655e6, CRC_REFRIGERANTS + "; pc: Piao, Sato and Watanabe (1991), J. Chem. Eng. Data, "
                                   "PVT and vapor pressure of HCFC-123, abstract: (3.6655 +/- 0.0030) MPa, read "
                                   "from a stored copy"),
    ("R-245fa", C + 154.0, None, "supplier's page for HFC-245fa, 154 degC, read from a stored copy"),
    ("parahydrogen", 32.938, 1.2838e6, NBS_H2),
    ("tetrahydrofuran", 540.2, 51.9e5, POLING),
    ("chloroform", 536.4, 54.7e5, POLING),
    ("methyl tert-butyl ether", 497.1, 34.3e5, POLING),
    ("1,4-dioxane", 587.0, 52.1e5, POLING),
    ("2-butanone", 536.7, 4.207e6, "CRC Handbook of Chemistry and Physics, 97th ed. (2016), Critical Constants of "
                                   "Organic Compounds (from memory)"),
    ("1-butanol", 563.05, 44.23e5, POLING),
    ("pyridine", 620.0, 56.3e5, POLING),
    ("carbon tetrachloride", 556.4, 45.6e5, POLING),
]

TRIPLE = [  # triple-point (or melting) temperature, K: 1 K; triple-point pressure, Pa: 2 % where given
    ("R-22", C - 157.4, None, CRC_REFRIGERANTS),
    ("R-125", C - 100.6, None, CRC_REFRIGERANTS),
    ("R-143a", C - 111.8, None, CRC_REFRIGERANTS),
    ("R-23", C - 155.2, None, "National Academies Press, Spacecraft Maximum Allowable Concentrations vol. 4 (9815), "
                              "HFC-23 chapter, melting point, read from a stored copy"),
    ("R-123", C - 107.0, None, ECHA_R123 + " (melting point from Kirk-Othmer, 1991)"),
    ("parahydrogen", 13.803, 7042.0, NBS_H2),
    ("tetrahydrofuran", C - 108.5, None, MERCK),
    ("chloroform", C - 63.5, None, MERCK),
    ("N,N-dimethylformamide", C - 61.0, None, MERCK),
    ("dimethyl sulfoxide", C + 18.5, None, MERCK),
    ("N-methyl-2-pyrrolidone", C - 24.0, None, MERCK),
    ("methyl tert-butyl ether", C - 108.6, None, CRC),
    ("1,4-dioxane", C + 11.8, None, MERCK),
    ("2-butanone", 186.48, None, POLING),
    ("1-butanol", 183.85, None, POLING),
    ("pyridine", 231.53, None, POLING),
    ("carbon tetrachloride", 250.33, None, POLING),
]

# (substance, T in K, pressure: "sat" saturated liquid, "atm" 1 atm, or Pa, density kg/m3, source); 2 %
DENSITIES = [
    ("R-22", 233.15, "sat", 1407.0, "ASHRAE Handbook - Fundamentals (2009), R-22 table at -40 degC (from memory)"),
    ("R-1234ze(E)", 273.15, "sat", 1240.0, "ASHRAE Handbook - Fundamentals (2017), R-1234ze(E) table at 0 degC "
                                           "(from memory)"),
    ("R-152a", 249.127, "sat", 1011.0, "ASHRAE Handbook - Fundamentals (2009), R-152a at the normal boiling point "
                                       "(from memory)"),
    ("R-125", 225.06, "sat", 1514.0, "ASHRAE Handbook - Fundamentals (2009), R-125 at the normal boiling point "
                                     "(from memory)"),
    ("R-245fa", 273.15, 1e5, 1404.1, "Wikipedia, Pentafluoropropane: liquid at 1 bar and 0 degC, read from a "
                                     "stored copy"),
    ("R-123", 290.0, "sat", 1481.2, ECHA_R123 + " (Maezawa et al. 1990, saturated liquid, 290 K)"),
    ("R-123", 300.0, "sat", 1456.0, ECHA_R123 + " (Maezawa et al. 1990, saturated liquid, 300 K)"),
    ("R-227ea", 257.15, "sat", 1460.0, "chemeurope.com encyclopedia, 1,1,1,2,3,3,3-heptafluoropropane, 1.46 g/cm3 "
                                       "at -16 degC, read from a stored copy"),
    ("R-227ea", 298.15, "sat", 1409.0, "ChemicalBook, 1,1,1,2,3,3,3-heptafluoropropane (CAS 431-89-0), density "
                                       "1.409 g/cm3 (taken as at 25 degC), read from a stored copy"),
    ("parahydrogen", 13.8033, "sat", 77.0, NBS_H2 + ", triple-point liquid (at the data's 13.8033 K)"),
    ("tetrahydrofuran", 293.15, "atm", 889.2, RIDDICK),
    ("chloroform", 293.15, "atm", 1483.2, RIDDICK),
    ("N,N-dimethylformamide", 293.15, "atm", 948.7, RIDDICK),
    ("dimethyl sulfoxide", 293.15, "atm", 1100.4, RIDDICK),
    ("N-methyl-2-pyrrolidone", 293.15, "atm", 1033.0, "BASF, NMP technical data, 1.033 g/cm3 at 20 degC "
                                                      "(from memory)"),
    ("methyl tert-butyl ether", 298.15, "atm", 735.3, CRC),
    ("1,4-dioxane", 298.15, "atm", 1027.9, RIDDICK),
    ("2-butanone", 293.15, "atm", 805.0, RIDDICK),
    ("1-butanol", 298.15, "atm", 805.7, RIDDICK),
    ("pyridine", 298.15, "atm", 978.2, RIDDICK),
    ("carbon tetrachloride", 298.15, "atm", 1584.4, RIDDICK),
]

# measured deviations beyond the bounds, recorded rather than hidden
DEVIATIONS: dict[tuple[str, str], str] = {
    ("R-227ea", "density"): "the model gives 1570.7 kg/m3 at -16 degC, +7.6 % over the encyclopedia's 1.46 g/cm3; "
                            "that figure disagrees with the 1.409 g/cm3 near 25 degC of the data (FM-200 technical "
                            "data) and of another stored page, which with any liquid's expansion implies about "
                            "1.55 g/cm3 at -16 degC: the encyclopedia value is doubtful, and neither is tuned",
}


# the density rows the deviations above are about (a substance may have other rows that pass)
DEVIATING_ROWS = {("R-227ea", 257.15)}


def _marked(rows, quantity):
    def deviates(row):
        return (row[0], quantity) in DEVIATIONS and (quantity != "density" or (row[0], row[1]) in DEVIATING_ROWS)

    return [pytest.param(*row, marks=pytest.mark.xfail(strict=True, reason=DEVIATIONS[(row[0], quantity)]))
            if deviates(row) else row for row in rows]


@pytest.mark.parametrize("name, tb, source", _marked(BOILING, "boil"), ids=[r[0] for r in BOILING])
def test_normal_boiling_point_matches_another_publication(name, tb, source):
    assert BOIL_TEMP(name, P_ATM) == pytest.approx(tb, abs=0.5)


@pytest.mark.parametrize("name, tc, pc, source", _marked(CRITICAL, "critical"), ids=[r[0] for r in CRITICAL])
def test_critical_point_matches_another_publication(name, tc, pc, source):
    assert CRITICAL_POINT(name, "T") == pytest.approx(tc, rel=0.005)
    if pc is not None:
        assert CRITICAL_POINT(name, "P") == pytest.approx(pc, rel=0.02)


@pytest.mark.parametrize("name, tt, pt, source", _marked(TRIPLE, "triple"), ids=[r[0] for r in TRIPLE])
def test_triple_point_matches_another_publication(name, tt, pt, source):
    assert TRIPLE_POINT(name, "T") == pytest.approx(tt, abs=1.0)
    if pt is not None:
        assert TRIPLE_POINT(name, "P") == pytest.approx(pt, rel=0.02)


@pytest.mark.parametrize("name, T, p, rho, source", _marked(DENSITIES, "density"),
                         ids=[f"{r[0]}-{r[1]}" for r in DENSITIES])
def test_liquid_density_matches_another_publication(name, T, p, rho, source):
    pressure = BOIL_PRESSURE(name, T) * (1 + 1e-12) if p == "sat" else P_ATM if p == "atm" else p
    assert MASS_DENSITY(name, T, pressure, "liquid") == pytest.approx(rho, rel=0.02)


def test_every_substance_on_a_corresponding_states_boiling_line_has_an_independent_boiling_point():
    # Without a published vapour-pressure line the boiling line is Lee-Kesler's through the file's own
    # normal boiling point, which nothing else then checks: a second publication's value must.
    names = [SUBSTANCE_INFO(row[0], "name") for row in BOILING]
    assert len(set(names)) == len(names) == len(BOILING)
    assert {_name(k) for k in KEYS if _line(k, "boil") is None and _value(k, "normal_boiling_point")} <= set(names)
    assert not any(isinstance(SUBSTANCE_INFO(row[0], "name"), CellError) for rows in (BOILING, CRITICAL, TRIPLE,
                                                                                      DENSITIES) for row in rows)


# --- melting lines from the solid data ------------------------------------------------------------

@pytest.mark.parametrize("key", [k for k in KEYS if k not in NO_TRIPLE_POINT])
def test_melting_line_follows_clapeyron_where_no_line_is_published(key):
    model, constants = SUBSTANCE_INFO(_name(key), "melt_model"), _file(key)["constants"]
    missing = [n for n in ("enthalpy_of_fusion", "solid_density") if n not in constants]
    if _line(key, "melt") is not None:
        assert model.startswith("published")
    elif missing:
        # the model names the data it lacks (tests/test_substances.py checks the message of MELT_PRESSURE)
        assert "independent of pressure" in model and "no " + " and ".join(missing) in model
        assert MELT_TEMP(_name(key), 100, "MPa") == _value(key, "triple_point_temperature")
    else:
        assert model.startswith("Clapeyron")
        assert MELT_TEMP(_name(key), 100, "MPa") > _value(key, "triple_point_temperature") + 5.0


def _rise(name: str, p_mpa: float) -> float:
    """Melting-temperature rise from 0.1 MPa to p_mpa, K."""
    return MELT_TEMP(name, p_mpa, "MPa") - MELT_TEMP(name, 0.1, "MPa")


# CRC Handbook of Chemistry and Physics, table "Influence of Pressure on Freezing Points" (after Isaacs
# (1981) and Merrill (1977, 1982)), freezing points at 0.1 and 100 MPa (read from a copy of the table):
# benzene 5.5 and 33.4 degC, acetic acid 16.6 and 37 degC: independent of the data, whose solid densities
# are crystal or handbook values. Measured: benzene +32.6 K (+17 %), acetic acid +24.8 K (+22 %), from a
# Clapeyron line of constant slope dp/dlnT where the real line flattens with pressure; 25 %.
@pytest.mark.parametrize("name, rise", [("benzene", 33.4 - 5.5), ("acetic acid", 37.0 - 16.6)])
def test_clapeyron_melting_line_against_handbook_freezing_points_at_100_MPa(name, rise):
    assert _rise(name, 100) == pytest.approx(rise, rel=0.25)


# The same table: cyclohexane 6.6 and 32.5 degC, dichloromethane -95.1 and -83 degC, ethanol -114.1 and
# -108 degC. Their solid densities are derived from these points (see the data files), so this checks
# the construction, not the data: to the 0.1 K the table rounds to (measured within 0.05 K).
@pytest.mark.parametrize("name, rise", [("cyclohexane", 32.5 - 6.6), ("dichloromethane", -83.0 + 95.1),
                                        ("ethanol", -108.0 + 114.1)])
def test_melting_lines_built_from_handbook_freezing_points_reproduce_them(name, rise):
    assert _rise(name, 100) == pytest.approx(rise, abs=0.1)


def test_ethylene_melting_line_against_its_reference_equation():
    # Smukala, Span and Wagner (2000), J. Phys. Chem. Ref. Data 29, 1053, melting equation
    # p/pt = 1 + 2947001.84 ((T/Tt)^2.045 - 1) + 6.82693421 ((T/Tt)^1.089 - 1), Tt = 103.989 K,
    # pt = 122.65 Pa (from memory of the paper; recall uncertain, which is why the data file does not use
    # it): 117.2 K at 100 MPa, a rise of 13.2 K. The Clapeyron line on the crystal density of van Nes and
    # Vos (1978) measured +19.3 K (+46 %); 60 %.
    from scipy.optimize import brentq

    def p_melt(T):
        theta = T / 103.989
        return 122.65 * (1 + 2947001.84 * (theta**2.045 - 1) + 6.82693421 * (theta**1.089 - 1))

    rise = brentq(lambda T: p_melt(T) - 100e6, 103.989, 200.0) - 103.989
    assert rise == pytest.approx(13.2, abs=0.05)
    assert _rise("ethylene", 100) == pytest.approx(rise, rel=0.6)


# The estimate most of the new solid densities use, 1.12 times the liquid density at the triple point
# (Goodman, Wilding, Oscarson and Rowley 2004, from memory), tried on the substances whose melting is
# known: the rise to 50 MPa of the Clapeyron line built on it, over the published line's. Measured: argon
# 0.95, nitrogen 1.66, carbon dioxide 0.48, methane 1.23, ethane 1.06, isobutane 0.75, methanol 1.41,
# n-butane 1.60. So an estimated line is good to about a factor of two (the data files say so); it is
# worse for plastic crystals (cyclohexane 5.7 by the handbook freezing point, hence its derived density).
ESTIMATE_RATIO = 1.12


def _with_estimated_solid(key: str) -> GeneralSubstance:
    d = load_builtin(key)
    rows = {f: (v, u) if u else v for f, v, u in d.fields() if not f.startswith("melt.") and f != "solid_density"}
    plain = GeneralSubstance(Definition.from_fields(rows))
    (tt, pt), mass = plain.triple, d.values["molar_mass"]
    rows["solid_density"] = (ESTIMATE_RATIO * mass / float(plain.liquid.volume(tt, pt, pt)), "kg/m3")
    return GeneralSubstance(Definition.from_fields(rows))


@pytest.mark.parametrize("key", ["argon", "nitrogen", "carbon-dioxide", "methane", "ethane", "isobutane", "methanol",
                                 "n-butane"])
def test_the_solid_density_estimate_against_published_melting_lines(key):
    def rise(substance):
        result, _ = substance.melt_temperature(np.array([substance.triple.pressure, 50e6]))
        return float(np.diff(result.values)[0])

    ratio = rise(_with_estimated_solid(key)) / rise(GeneralSubstance(load_builtin(key)))
    assert 0.4 < ratio < 2.0


# --- ideal-gas heat capacity ----------------------------------------------------------------------

# cp0 at 298.15 K, J/(mol K), from tables independent of the correlations (from memory of the tables):
# NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998) for the simple molecules; the ideal-gas Cp of
# the CRC Handbook's "Thermodynamic Properties of Organic Compounds" / TRC Thermodynamic Tables for the
# organics. Poling et al. state their polynomials to about 1 % (0.4 % measured at worst, benzene and
# carbon monoxide); the harmonic-oscillator terms measured within 0.2 %.
JANAF_298 = {"nitrogen": 29.124, "oxygen": 29.376, "carbon-monoxide": 29.142, "carbon-dioxide": 37.129,
             "hydrogen": 28.836, "methane": 35.639, "ammonia": 35.652, "hydrogen-sulfide": 34.192,
             "chlorine": 33.949, "sulfur-dioxide": 39.842, "nitrous-oxide": 38.617, "sulfur-hexafluoride": 97.0,
             "argon": 20.786, "neon": 20.786, "helium-4": 20.786}
TRC_298 = {"ethane": 52.49, "ethylene": 42.90, "propane": 73.60, "propylene": 64.32, "n-butane": 98.49,
           "isobutane": 96.65, "n-pentane": 120.07, "n-hexane": 143.09, "n-heptane": 165.98, "n-octane": 188.87,
           "cyclohexane": 106.27, "benzene": 82.44, "toluene": 103.64, "methanol": 44.06, "ethanol": 65.21,
           "2-propanol": 89.32, "acetone": 74.52, "acetic-acid": 63.44, "ethyl-acetate": 113.64,
           "dichloromethane": 51.0, "acetonitrile": 52.2, "r-32": 42.9}


def test_every_substance_with_a_correlation_has_an_independent_check_value():
    # every file has a table (tests/test_ideal_gas_cp.py); those of the newer correlations are checked
    # there against their own handbook values
    assert set(JANAF_298) | set(TRC_298) <= {key for key in KEYS if "ideal_gas_cp" in _file(key)}


@pytest.mark.parametrize("key, cp", sorted({**JANAF_298, **TRC_298}.items()))
def test_ideal_gas_heat_capacity_at_298_K(key, cp):
    table = load_builtin(key).ideal_gas
    assert ideal_gas.in_range(table, 298.15)
    assert float(ideal_gas.cp0(table, 298.15)) == pytest.approx(cp, rel=0.01)


# NIST-JANAF Thermochemical Tables (Chase 1998), H(1000 K) - H(298.15 K) in kJ/mol and S(1000 K),
# S(298.15 K) in J/(mol K) (from memory of the tables): nitrogen 21.463, 228.170, 191.609; carbon
# dioxide 33.397, 269.299, 213.795; methane 38.179, 247.549, 186.251. Poling's 1 %.
@pytest.mark.parametrize("key, dh, s1000, s298", [("nitrogen", 21.463, 228.170, 191.609),
                                                  ("carbon-dioxide", 33.397, 269.299, 213.795),
                                                  ("methane", 38.179, 247.549, 186.251)])
def test_ideal_gas_enthalpy_and_entropy_to_1000_K(key, dh, s1000, s298):
    table = load_builtin(key).ideal_gas
    assert float(ideal_gas.enthalpy(table, 1000.0)) / 1e3 == pytest.approx(dh, rel=0.01)
    assert float(ideal_gas.entropy(table, 1000.0)) == pytest.approx(s1000 - s298, rel=0.01)


@pytest.mark.parametrize("key", ["propane", "sulfur-dioxide", "sulfur-hexafluoride"])
def test_ideal_gas_integrals_are_the_integrals_of_cp0(key):
    # consistency of the closed forms (polynomial and Planck-Einstein) with a quadrature of cp0
    from scipy.integrate import quad

    table = load_builtin(key).ideal_gas
    T = np.array([150.0, 298.15, 600.0, 1000.0])
    h = [quad(lambda t: float(ideal_gas.cp0(table, t)), 298.15, x)[0] for x in T]
    s = [quad(lambda t: float(ideal_gas.cp0(table, t)) / t, 298.15, x)[0] for x in T]
    assert ideal_gas.enthalpy(table, T) == pytest.approx(h, rel=1e-10, abs=1e-9)
    assert ideal_gas.entropy(table, T) == pytest.approx(s, rel=1e-10, abs=1e-12)
    # a scalar goes the same way as the array
    assert float(ideal_gas.cp0(table, T[2])) == ideal_gas.cp0(table, T)[2]


@pytest.mark.parametrize("rows, message", [
    ({"ideal_gas_cp.form": "nasa"}, "ideal_gas_cp.form"),
    ({"ideal_gas_cp.form": "polynomial", "ideal_gas_cp.T_min": 50, "ideal_gas_cp.T_max": 1000}, "ideal_gas_cp.a"),
    ({"ideal_gas_cp.form": "polynomial", "ideal_gas_cp.a": "[3.5, x]", "ideal_gas_cp.T_min": 50,
      "ideal_gas_cp.T_max": 1000}, "list of numbers"),
    ({"ideal_gas_cp.form": "planck_einstein", "ideal_gas_cp.c0": 4, "ideal_gas_cp.n": "[1, 1]",
      "ideal_gas_cp.theta": "[900]", "ideal_gas_cp.T_min": 50, "ideal_gas_cp.T_max": 1000}, "as many numbers"),
    ({"ideal_gas_cp.form": "polynomial", "ideal_gas_cp.a": "[3.5]", "ideal_gas_cp.T_min": 500,
      "ideal_gas_cp.T_max": 100}, "T_min"),
])
def test_user_defined_ideal_gas_rows_are_checked(rows, message):
    base = {"name": "solvent K-7", "molar_mass": (0.142, "kg/mol"), "critical_temperature": 617,
            "critical_pressure": (2.11, "MPa"), "acentric_factor": 0.49}
    with pytest.raises(ModelError, match=message):
        Definition.from_fields({**base, **rows})


def test_user_defined_ideal_gas_rows_are_kept():
    d = Definition.from_fields({"name": "solvent K-7", "molar_mass": (0.142, "kg/mol"), "critical_temperature": 617,
                                "critical_pressure": (2.11, "MPa"), "acentric_factor": 0.49,
                                "ideal_gas_cp.form": "polynomial", "ideal_gas_cp.a": "[4.0, 0.01]",
                                "ideal_gas_cp.T_min": 200, "ideal_gas_cp.T_max": 1000})
    assert d.ideal_gas["a"] == [4.0, 0.01]
    assert float(ideal_gas.cp0(d.ideal_gas, 300.0)) == pytest.approx(R * 7.0)
