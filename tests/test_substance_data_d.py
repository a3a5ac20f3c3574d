"""Substance data files of group d (refrigerants, solvents, parahydrogen): the schema, each published line
against the file's own fixed points, and the model against values from other publications.

The files' values are recalled from memory of the publication each `reference` names (`memory = true`), or
were read from a stored copy of a publication, which the reference then says (`memory = false`). Two kinds
of checks follow:

- consistency: a file's vapour-pressure equation against the same file's normal boiling point, triple-point
  pressure, critical pressure and acentric factor (they come from different tables or papers, so agreement
  checks that the coefficients were recalled right);
- independent values: the model (through the sheet functions) against a second publication's normal boiling
  point, critical point, triple point and liquid density, named beside each value.

Where a check misses its bound it is marked xfail(strict=True) with the measured deviation; no bound is
widened and no value tuned.
"""

from __future__ import annotations

import math
import tomllib
from functools import lru_cache
from importlib import resources

import numpy as np
import pytest

from cellfuncs.errors import CellError
from cellfuncs.sheet.functions import BOIL_PRESSURE, BOIL_TEMP, CRITICAL_POINT, MASS_DENSITY, SUBSTANCE_INFO, TRIPLE_POINT
from cellfuncs.substances.lines import FORMS, line_pressure

KEYS = ["r-22", "r-1234ze-e", "r-152a", "r-125", "r-143a", "r-245fa", "r-1233zd-e", "r-23", "r-123", "r-227ea",
        "parahydrogen", "tetrahydrofuran", "chloroform", "n-n-dimethylformamide", "dimethyl-sulfoxide",
        "n-methyl-2-pyrrolidone", "methyl-tert-butyl-ether", "1-4-dioxane", "2-butanone", "1-butanol", "pyridine",
        "carbon-tetrachloride"]
ASSOCIATING = {"1-butanol"}

# constant -> unit as these files write it (dimensionless "1", molar heat capacity "J/(mol*K)")
UNITS = {
    "molar_mass": "kg/mol", "critical_temperature": "K", "critical_pressure": "Pa", "critical_density": "kg/m3",
    "acentric_factor": "1", "triple_point_temperature": "K", "triple_point_pressure": "Pa",
    "normal_boiling_point": "K", "enthalpy_of_fusion": "J/mol", "liquid_density": "kg/m3", "solid_density": "kg/m3",
    "liquid_heat_capacity": "J/(mol*K)",
}
REQUIRED = ("molar_mass", "critical_temperature", "critical_pressure", "triple_point_temperature",
            "normal_boiling_point", "liquid_density")
WITH_STATE = ("liquid_density", "solid_density", "liquid_heat_capacity")
ATM = 101325.0  # Pa, the standard atmosphere (exact)


@lru_cache(maxsize=None)
def _file(key: str) -> dict:
    text = resources.files("cellfuncs.data").joinpath("substances", f"{key}.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


def _value(key: str, name: str) -> float | None:
    entry = _file(key)["constants"].get(name)
    return None if entry is None else float(entry["value"])


def _boil(key: str) -> dict:
    line = _file(key).get("lines", {}).get("boil")
    if line is None:
        pytest.skip(f"{key}: no published vapour-pressure line in the file (Lee-Kesler through the normal boiling "
                    "point applies)")
    return line


def _in_range(line: dict, T: float) -> bool:
    return line["T_min"] - 1e-9 <= T <= line["T_max"] + 1e-9


def test_the_group_is_in_the_catalogue():
    from cellfuncs.substances.general.definition import builtin_keys

    assert len(set(KEYS)) == 22 and set(KEYS) <= set(builtin_keys())


# --- schema ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("key", KEYS)
def test_file_has_required_fields_with_their_units_and_sources(key):
    d = _file(key)
    assert d["name"] and d["name"] == d["name"].lower()
    assert isinstance(d["formula"], str) and d["formula"]
    assert isinstance(d["designation"], str)
    assert d["associating"] is (key in ASSOCIATING)
    assert isinstance(d["note"], str)
    aliases = d["aliases"]
    assert all(a == a.lower() for a in aliases)
    assert not {d["name"], d["formula"].lower(), d["designation"].lower()} & set(aliases)
    constants = d["constants"]
    for name in REQUIRED:
        assert name in constants, name
    assert "acentric_factor" in constants or "normal_boiling_point" in constants
    for name, entry in constants.items():
        assert entry["unit"] == UNITS[name], name
        assert entry["name"] and entry["reference"], name
        assert isinstance(entry["value"], (int, float)) and math.isfinite(entry["value"]), name
        if name != "acentric_factor":
            assert entry["value"] > 0, name
        # recalled from a published table, or read from a stored copy of a publication, which the reference says
        assert entry["memory"] is True or (entry["memory"] is False and "read from a stored copy" in entry["reference"])
        if name in WITH_STATE:
            assert entry["state"] and entry["temperature"] > 0, name
    if "solid_density" in constants:
        assert "enthalpy_of_fusion" in constants  # the Clapeyron melting line needs both
    for kind, line in d.get("lines", {}).items():
        assert kind == "boil" and line["form"] in ("ancillary", "antoine") and line["form"] in FORMS
        assert line["T_min"] < line["T_max"] and line["reference"] and line["memory"] is True
        if line["form"] == "ancillary":
            assert line["Tc"] == _value(key, "critical_temperature") and line["pc"] == _value(key, "critical_pressure")
            assert len(line["n"]) == len(line["t"])
    if key in ASSOCIATING:
        assert "boil" in d.get("lines", {}), "an associating fluid needs a published vapour-pressure equation"


@pytest.mark.parametrize("key", KEYS)
def test_file_loads_as_a_builtin_definition(key):
    from cellfuncs.substances.general.definition import load_builtin

    d = load_builtin(key)
    assert d.name == _file(key)["name"]
    for name in _file(key)["constants"]:
        assert d.values[name] == pytest.approx(_value(key, name), rel=1e-12), name  # every unit is the SI one


# --- each published line against its own file -----------------------------------------------------------


@pytest.mark.parametrize("key", KEYS)
def test_boil_line_gives_the_normal_boiling_point(key):
    from scipy.optimize import brentq

    line, tb = _boil(key), _value(key, "normal_boiling_point")
    assert _in_range(line, tb)
    t = brentq(lambda T: float(line_pressure(line, T)) - ATM, line["T_min"], line["T_max"], xtol=1e-9)
    assert abs(t - tb) <= 0.5  # measured: within 0.004 K, carbon tetrachloride 0.073 K, chloroform 0.034 K


@pytest.mark.parametrize("key", KEYS)
def test_boil_line_gives_the_triple_point_pressure(key):
    line, tt, pt = _boil(key), _value(key, "triple_point_temperature"), _value(key, "triple_point_pressure")
    if pt is None:
        pytest.skip(f"{key}: no triple-point pressure in the file")
    assert _in_range(line, tt)
    bound = 0.05 if key in ASSOCIATING else 0.02
    # measured: R-1234ze(E) -0.62 %, the others within 0.07 %
    assert float(line_pressure(line, tt)) == pytest.approx(pt, rel=bound)


@pytest.mark.parametrize("key", KEYS)
def test_boil_line_gives_the_critical_pressure_and_the_acentric_factor(key):
    line, tc, pc = _boil(key), _value(key, "critical_temperature"), _value(key, "critical_pressure")
    if line["T_max"] < tc:
        pytest.skip(f"{key}: the line ({line['T_min']}-{line['T_max']} K) stops below the critical point")
    assert float(line_pressure(line, tc)) == pytest.approx(pc, rel=1e-9)
    # Pitzer's definition: omega = -log10(p_sat(0.7 Tc) / pc) - 1; measured within 0.0006
    omega = -np.log10(float(line_pressure(line, 0.7 * tc)) / pc) - 1.0
    assert omega == pytest.approx(_value(key, "acentric_factor"), abs=0.005)


@pytest.mark.parametrize("key", KEYS)
def test_boil_line_rises_continuously_over_its_range(key):
    line = _boil(key)

    def steps(n):
        ln_p = np.log(line_pressure(line, np.linspace(line["T_min"], line["T_max"], n)))
        assert np.all(np.isfinite(ln_p))
        return np.diff(ln_p)

    coarse, fine = steps(201), steps(2001)
    assert np.all(coarse > 0) and np.all(fine > 0)
    assert fine.max() < 0.2 * coarse.max()  # a jump would not shrink with the grid


# --- the model against other publications ---------------------------------------------------------------
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
    ("parahydrogen", "density"): "the model gives 78.99 kg/m3 for the triple-point liquid, +2.6 % over NBS "
                                 "Monograph 168's 77.0 kg/m3: the Rackett equation anchored at the normal boiling "
                                 "point (70.85 kg/m3) overstates the expansion of a quantum liquid 6.5 K below it",
}


# the density rows the deviations above are about (a substance may have other rows that pass)
DEVIATING_ROWS = {("R-227ea", 257.15), ("parahydrogen", 13.8033)}


def _marked(rows, quantity):
    def deviates(row):
        return (row[0], quantity) in DEVIATIONS and (quantity != "density" or (row[0], row[1]) in DEVIATING_ROWS)

    return [pytest.param(*row, marks=pytest.mark.xfail(strict=True, reason=DEVIATIONS[(row[0], quantity)]))
            if deviates(row) else row for row in rows]


@pytest.mark.parametrize("name, tb, source", _marked(BOILING, "boil"), ids=[r[0] for r in BOILING])
def test_normal_boiling_point_matches_another_publication(name, tb, source):
    assert BOIL_TEMP(name, ATM) == pytest.approx(tb, abs=0.5)


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
    pressure = BOIL_PRESSURE(name, T) * (1 + 1e-12) if p == "sat" else ATM if p == "atm" else p
    assert MASS_DENSITY(name, T, pressure, "liquid") == pytest.approx(rho, rel=0.02)


def test_every_new_substance_has_an_independent_boiling_point():
    names = {SUBSTANCE_INFO(row[0], "name") for row in BOILING}
    assert names == {_file(key)["name"] for key in KEYS}
    assert not any(isinstance(SUBSTANCE_INFO(row[0], "name"), CellError) for rows in (CRITICAL, TRIPLE, DENSITIES)
                   for row in rows)
