"""Ideal-gas heat capacities: every substance file has a table, and each table's cp0 at 298.15 K
agrees with a handbook value; the forms' integrals; the estimate for a definition without a table.

Handbook values are J/(mol K) at 298.15 K for the ideal gas (the gas at 1 bar, to the digits
printed). All were recalled from memory of the tables named, not read from a stored copy; the
tolerance is the stated accuracy of the file's correlation (spectroscopic statistical mechanics
about 1 %, reference equations' ideal parts 1 %, Joback's group contributions 7 %: Poling,
Prausnitz and O'Connell, 5th ed. (2001), report errors of a few per cent for the method, more for
rings; from memory).
"""

from __future__ import annotations

import re

import numpy as np
import pytest

from cellfuncs.sheet.functions import SUBSTANCE_INFO
from cellfuncs.substances import ideal_gas, lookup
from cellfuncs.substances.constants import R
from cellfuncs.substances import builtin_keys
from cellfuncs.substances.general.definition import load_builtin

CRC = "CRC Handbook of Chemistry and Physics, 97th ed. (2016), Standard Thermodynamic Properties of Chemical Substances (from memory)"
TRC = "TRC Thermodynamic Tables - Hydrocarbons / Non-hydrocarbons, ideal gas at 298.15 K (from memory)"
SWS = "Stull, Westrum and Sinke, The Chemical Thermodynamics of Organic Compounds (1969), ideal gas at 298.15 K (from memory)"
JANAF = "NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998) (from memory)"
ASHRAE = "ASHRAE Handbook - Fundamentals (2009), ch. 30, refrigerant vapour at low pressure, 25 degC (from memory)"

# key: (cp0 at 298.15 K, relative tolerance, source)
HANDBOOK = {
    "carbon-tetrachloride": (83.3, 0.01, CRC),
    "chloroform": (65.7, 0.01, CRC),
    "r-23": (51.0, 0.01, CRC),
    "r-22": (55.9, 0.01, CRC),
    "r-143a": (78.2, 0.02, TRC),
    "pyridine": (78.1, 0.07, CRC),
    "tetrahydrofuran": (76.3, 0.07, CRC),
    "1-4-dioxane": (94.1, 0.07, SWS),
    "p-xylene": (126.9, 0.07, TRC),
    "diethyl-ether": (112.5, 0.07, SWS),
    "1-butanol": (108.4, 0.07, TRC),
    "2-butanone": (101.7, 0.07, TRC),
    "ethylene-glycol": (78.0, 0.07, TRC),
    "r-152a": (67.9, 0.07, TRC),
    "r-134a": (85.9, 0.02, ASHRAE),
    "r-125": (95.0, 0.07, ASHRAE),
    "r-1234yf": (101.5, 0.02, ASHRAE),
    "r-1234ze-e": (99.4, 0.02, ASHRAE),
    "water": (33.6, 0.01, JANAF),
    "carbon-dioxide": (37.1, 0.01, JANAF),
    "nitrogen": (29.1, 0.01, JANAF),
    "methane": (35.7, 0.01, JANAF),
    "hydrogen": (28.8, 0.01, JANAF),
    "ammonia": (35.1, 0.02, JANAF),
    "ethanol": (65.6, 0.02, CRC),
    "propane": (73.6, 0.02, TRC),
    "benzene": (82.4, 0.02, TRC),
}


def _table(key: str) -> dict:
    return load_builtin(key).ideal_gas


def _atoms(formula: str) -> int:
    """Atoms in a formula such as "C2H5OH", "(CH3)2SO" or "O(CH2CH2)2O"."""
    def count(text: str) -> int:
        total = 0
        for group, times in re.findall(r"\(([^()]*)\)(\d*)", text):
            total += count(group) * int(times or 1)
        text = re.sub(r"\([^()]*\)\d*", "", text)
        return total + sum(int(n or 1) for _, n in re.findall(r"([A-Z][a-z]?)(\d*)", text))
    return count(formula)


@pytest.mark.parametrize("key", builtin_keys())
def test_every_substance_file_has_an_ideal_gas_heat_capacity_with_its_source(key):
    # the format requires the table with its reference and memory flag (substances/general/schema.py)
    ideal_gas.validate(_table(key))
    assert load_builtin(key).sources["ideal_gas_cp"].strip()


@pytest.mark.parametrize("key", builtin_keys())
def test_cp0_lies_between_a_rigid_molecule_and_all_vibrations_excited(key):
    # statistical mechanics: cp0/R is 5/2 for an atom, at least 7/2 for a molecule, and at most
    # 5/2 + 3(N - 1) (translation, rotation and every vibration at its classical limit); a fitted
    # polynomial may sit a little below the rigid molecule's (carbon monoxide's by 0.3 %), and normal
    # hydrogen's rotation is not yet classical at room temperature (28.84 J/(mol K), 0.9 % below 7R/2,
    # JANAF, from memory): 2 % is allowed
    d = load_builtin(key)
    formula = {"p-H2": "H2", "He": "He"}.get(d.formula, d.formula)
    n = _atoms(formula)
    cp = float(ideal_gas.cp0(d.ideal_gas, 298.15)) / R
    low = 2.5 if n == 1 else 3.5
    assert 0.98 * low <= cp <= 2.5 + 3 * (n - 1), (key, formula, n, cp)


@pytest.mark.parametrize("key", sorted(HANDBOOK))
def test_cp0_at_298_agrees_with_a_handbook(key):
    value, tolerance, source = HANDBOOK[key]
    if key == "water":
        table = None  # water's heat capacity is its formulation's: checked through the model
        cp = float(lookup("water").props(298.15, 100.0, 2, want=("cp",))[0].cp)
    else:
        table = _table(key)
        cp = float(ideal_gas.cp0(table, 298.15))
    assert cp == pytest.approx(value, rel=tolerance), source


def test_parahydrogen_cp0_is_the_rotational_sum_over_even_levels():
    # statistical mechanics of para-H2 (even rotational levels only, 2J + 1 each) with B0 = 59.322 cm-1
    # and D0 = 0.0471 cm-1 (Huber and Herzberg, Constants of Diatomic Molecules (1979), from memory):
    # the reference equation's ideal part must follow the rotational heat capacity's hump near 160 K
    table = _table("parahydrogen")
    c2 = 1.438777  # cm K
    for T in (50.0, 100.0, 150.0, 200.0, 298.15):
        J = np.arange(0, 16, 2.0)
        x = c2 * (59.322 * J * (J + 1) - 0.0471 * (J * (J + 1)) ** 2) / T
        w = (2 * J + 1) * np.exp(-x)
        mean, square = (w * x).sum() / w.sum(), (w * x * x).sum() / w.sum()
        assert float(ideal_gas.cp0(table, T)) == pytest.approx(R * (2.5 + square - mean**2), rel=2e-3)


def test_r134a_table_is_its_equation_of_states_ideal_part():
    sub = lookup("R-134a")
    T = np.array([200.0, 298.15, 400.0])
    ideal, _ = sub.equation.reduced(T, np.ones(3))
    assert ideal_gas.cp0(_table("r-134a"), T) == pytest.approx((1.0 - ideal["tt"]) * sub.equation.R, rel=2e-5)  # the equation's own R


@pytest.mark.parametrize("table", [
    {"form": "power", "c0": -0.63, "T_r": 374.18, "c": [7.29, 5.15], "t": [0.5, 0.75], "T_min": 170.0, "T_max": 455.0},
    {"form": "planck_einstein", "c0": 4.0, "n": [1.0, 2.0], "theta": [600.0, 1500.0], "T_min": 200.0, "T_max": 1000.0},
    {"form": "polynomial", "a": [3.5, 1e-3, -2e-7], "T_min": 200.0, "T_max": 1000.0},
])
def test_enthalpy_and_entropy_are_the_integrals_of_cp0(table):
    # the fundamental theorem of calculus, by Simpson's rule on a fine grid
    T = np.linspace(298.15, 450.0, 2001)
    cp = ideal_gas.cp0(table, T)
    step = T[1] - T[0]
    weights = np.ones(T.size)
    weights[1:-1:2], weights[2:-1:2] = 4.0, 2.0
    assert float(ideal_gas.enthalpy(table, 450.0)) == pytest.approx(step / 3 * np.sum(weights * cp), rel=1e-10)
    assert float(ideal_gas.entropy(table, 450.0)) == pytest.approx(step / 3 * np.sum(weights * cp / T), rel=1e-10)


def test_a_power_table_refuses_an_exponent_of_zero():
    from cellfuncs.substances.result import ModelError

    with pytest.raises(ModelError, match="must not hold 0 or -1"):
        ideal_gas.validate({"form": "power", "c0": 1.0, "T_r": 300.0, "c": [1.0], "t": [0.0], "T_min": 1.0, "T_max": 2.0})


def _rows(fields: dict) -> np.ndarray:
    """A definition range: (field, value, unit) rows."""
    return np.array([[k, *(v if isinstance(v, tuple) else (v, None))] for k, v in fields.items()], dtype=object)


def test_user_definition_without_a_table_gets_the_rowlinson_bondi_estimate():
    # n-hexane without its table: cpL = 195.6 J/(mol K) at 298.15 K (CRC Handbook, 97th ed., Standard
    # Thermodynamic Properties, from memory), Tc 507.6 K, omega 0.301 (Poling et al. 5th ed. Appendix A,
    # from memory); its ideal gas at 298.15 K is 143.1 J/(mol K) (TRC tables, from memory): the
    # corresponding-states estimate is within 5 %
    rows = {"name": "hexane without cp0", "molar_mass": (0.08618, "kg/mol"), "critical_temperature": (507.6, "K"),
            "critical_pressure": (3.025, "MPa"), "acentric_factor": 0.301, "normal_boiling_point": (341.88, "K"),
            "liquid_density": (654.8, "kg/m3"), "liquid_density.temperature": (298.15, "K"),
            "liquid_heat_capacity": (195.6, "J/(mol*K)"), "liquid_heat_capacity.temperature": (298.15, "K")}
    hexane = SUBSTANCE_INFO(_rows(rows), "ideal_gas_cp_model")
    assert "Rowlinson-Bondi" in hexane
    cp = float(hexane.split()[1])
    assert cp == pytest.approx(143.1, rel=0.05)


def test_an_associating_definition_gets_no_estimate():
    rows = {"name": "wet alcohol", "molar_mass": (0.04607, "kg/mol"), "critical_temperature": (513.9, "K"),
            "critical_pressure": (6.148, "MPa"), "acentric_factor": 0.649, "associating": "TRUE",
            "liquid_heat_capacity": (112.3, "J/(mol*K)"), "liquid_heat_capacity.temperature": (298.15, "K")}
    assert SUBSTANCE_INFO(_rows(rows), "ideal_gas_cp_model").startswith("none")
