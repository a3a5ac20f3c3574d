"""Limits on user-defined substances and on what a sheet function may return.

- Every field of a definition within its stated bounds (cellfuncs/substances/general/bounds.py,
  the README's table), a bare number read in the unit of its bounds, the fields consistent with
  each other, and the lines usable over their whole extension: otherwise #VALUE! naming the field.
- Sheet functions never raise: an unexpected exception is ``#VALUE! internal error`` in normal use
  and is raised in strict mode (the suite's, conftest.py); a non-finite number is #NUM!.
- The cell paths (xlwings, the engine) take at most two dimensions; the Python API keeps numpy's.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from cellfuncs.errors import NUM, STRICT_VARIABLE, VALUE, CellError
from cellfuncs.formula import SimpleContext, compute
from cellfuncs.sheet import FUNCTIONS
from cellfuncs.sheet import registry
from cellfuncs.sheet.cells import cell_value
from cellfuncs.sheet.functions import (BOIL_PRESSURE, BOIL_TEMP, MASS_DENSITY, MELT_TEMP, MOLAR_VOLUME, STABLE_PHASE,
                                       SUPERHEAT)
from cellfuncs.substances import define
from cellfuncs.substances.general.bounds import FIELDS
from cellfuncs.substances.general.consistency import check, check_published
from cellfuncs.substances import builtin_keys
from cellfuncs.substances.general.definition import load_builtin
from cellfuncs.substances.general.model import GeneralSubstance
from cellfuncs.substances.constants import R
from cellfuncs.substances.result import ModelError

ROOT = Path(__file__).resolve().parents[1]
# an invented substance for the checks below
DEMO = {"name": "demo solvent Q", "molar_mass": (72.11, "g/mol"), "critical_temperature": (500.0, "K"),
        "critical_pressure": (5.0, "MPa"), "acentric_factor": 0.3}
# an Antoine line (Pa, K) through 10 Pa at 250 K and 1000 Pa at 300 K
ANTOINE = {"boil.form": "antoine", "boil.A": 13.0, "boil.B": 3000.0, "boil.C": 0.0, "boil.T_min": 250.0,
           "boil.T_max": 300.0}


def is_error(value, code, *words) -> bool:
    return isinstance(value, CellError) and value.code == code and all(w in value.reason for w in words)


def with_(**fields) -> dict:
    return {**DEMO, **{k.replace("__", "."): v for k, v in fields.items()}}


# ---- bounds -------------------------------------------------------------------------------------
def test_the_readme_states_every_bound_as_the_code_does():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    for key, bound in FIELDS.items():
        assert f"| `{key}` | {bound.shown()} |" in text, key


def test_every_built_in_substance_keeps_the_bounds_and_has_usable_lines():
    # the data files go through the same checks (load_builtin builds them from fields); their lines too
    for key in builtin_keys():
        check(GeneralSubstance(check_published(load_builtin(key))))


@pytest.mark.parametrize("fields, words", [
    (with_(critical_temperature=1e200), ("critical_temperature", "1 to 2000 K")),
    (with_(critical_temperature=10**400), ("critical_temperature", "finite")),
    (with_(critical_pressure=(0.5, "kPa")), ("critical_pressure", "outside its bounds")),
    (with_(acentric_factor=2.5), ("acentric_factor", "-0.5 to 2")),
    (with_(molar_mass=(72.11, "kg/mol")), ("molar_mass", "72.11 kg/mol", "1 to 1000 g/mol")),
    (with_(**ANTOINE, boil__A=-400.0), ("boil.A", "-50 to 50")),
    (with_(**ANTOINE, boil__C=1e6), ("boil.C",)),
    (with_(boil__form="ancillary", boil__Tc=500.0, boil__pc=5e6, boil__n="[" + "-1," * 15000 + "]", boil__t="[1]",
           boil__T_min=200.0, boil__T_max=500.0), ("boil.n", "at most 1000")),
    (with_(boil__form="ancillary", boil__Tc=500.0, boil__pc=5e6, boil__n="[" + "-" * 29998 + "1]", boil__t="[1]",
           boil__T_min=200.0, boil__T_max=500.0), ("boil.n", "at most 1000")),
    (with_(boil__form="ancillary", boil__Tc=500.0, boil__pc=5e6, boil__n=[-1.0] * 13, boil__t=[1.0] * 13,
           boil__T_min=200.0, boil__T_max=500.0), ("boil.n", "13 terms")),
    (with_(boil__form="ancillary", boil__Tc=500.0, boil__pc=5e6, boil__n="[0x" + "f" * 300 + "]", boil__t="[1]",
           boil__T_min=200.0, boil__T_max=500.0), ("boil.n", "list of numbers")),
    (with_(boil__form="ancillary", boil__Tc=500.0, boil__pc=5e6, boil__n=[-7.0], boil__t=[99.0],
           boil__T_min=200.0, boil__T_max=500.0), ("boil.t", "exponent")),
    (with_(name="x" * 101), ("name", "at most 100")),
    (with_(note="x" * 30000), ("note", "at most 2000")),
    (with_(critical_temperature=(500.0, "K", "extra")), ("critical_temperature", "(value, unit) pair")),
], ids=["tc-1e200", "tc-10**400", "pc-low", "omega-high", "molar-mass-kg", "antoine-a", "antoine-c", "list-text-long",
        "list-text-minus", "list-terms", "list-hex", "exponent", "name-long", "note-long", "three-tuple"])
def test_a_value_outside_its_bounds_names_the_field(fields, words):
    assert is_error(BOIL_TEMP(fields, 1e5), VALUE, *words)
    with pytest.raises(ModelError) as caught:
        define(fields)
    assert all(w in str(caught.value) for w in words)


def test_a_one_item_tuple_is_a_value_without_a_unit():
    assert BOIL_TEMP(with_(critical_temperature=(500.0,)), 1e5) == BOIL_TEMP(DEMO, 1e5)


# ---- numbers typed without their unit -----------------------------------------------------------
def test_a_bare_molar_mass_is_grams_per_mole():
    # the vapour at 400 K and 1 kPa is nearly ideal: rho = p M / (R T) (ideal-gas law, common practice)
    bare = with_(molar_mass=72.11)
    assert MASS_DENSITY(bare, 400.0, 1e3, "vapor") == MASS_DENSITY(DEMO, 400.0, 1e3, "vapor")
    assert MASS_DENSITY(bare, 400.0, 1e3, "vapor") == pytest.approx(1e3 * 72.11e-3 / (R * 400.0), rel=2e-3)
    # a molar mass meant in kg/mol is refused, not read as a 1000-times lighter gas
    assert is_error(BOIL_TEMP(with_(molar_mass=0.07211), 1e5), VALUE, "molar_mass", "read in g/mol")


def test_a_bare_critical_pressure_is_pascals_and_numbers_meant_in_other_units_are_refused():
    assert BOIL_TEMP(with_(critical_pressure=5e6), 1e5) == BOIL_TEMP(DEMO, 1e5)
    for meant in (5.0, 50.0, 5000.0, 725.0):  # MPa, bar, kPa, psi
        assert is_error(BOIL_TEMP(with_(critical_pressure=meant), 1e5), VALUE, "critical_pressure", "read in Pa")


def test_a_bare_enthalpy_of_fusion_is_kilojoules_per_mole():
    solid = dict(triple_point_temperature=150.0, solid_density=800.0, liquid_density=700.0,
                 liquid_density__temperature=298.15)
    typed = MELT_TEMP(with_(**solid, enthalpy_of_fusion=8.4), 1e7)
    assert typed == MELT_TEMP(with_(**solid, enthalpy_of_fusion=(8.4, "kJ/mol")), 1e7)
    assert isinstance(typed, float) and 0.0 < abs(typed - 150.0) < 2.0  # Clapeyron: a fraction of a kelvin per MPa
    assert is_error(MELT_TEMP(with_(**solid, enthalpy_of_fusion=8400), 1e7), VALUE, "enthalpy_of_fusion",
                    "read in kJ/mol")


# ---- consistency ----------------------------------------------------------------------------------
@pytest.mark.parametrize("fields, words", [
    (with_(triple_point_temperature=1.0, triple_point_pressure=1.0), ("triple_point_temperature", "0.1 times")),
    (with_(normal_boiling_point=300.0, normal_sublimation_point=200.0), ("exclude each other",)),
    (with_(normal_boiling_point=300.0, triple_point_temperature=310.0), ("normal_boiling_point", "above the triple")),
    (with_(normal_sublimation_point=200.0, triple_point_temperature=150.0), ("normal_sublimation_point",)),
    (with_(liquid_density=700.0), ("liquid_density.temperature",)),
    (with_(triple_point_pressure=10.0), ("triple_point_pressure", "needs 'triple_point_temperature'")),
    (with_(liquid_density__temperature=600.0, liquid_density=700.0), ("liquid_density.temperature", "below the crit")),
    ({k: v for k, v in DEMO.items() if k != "acentric_factor"} | {"normal_boiling_point": 499.0},
     ("normal_boiling_point", "acentric factor")),
    (with_(triple_point_temperature=150.0, solid_density=100.0, liquid_density=700.0,
           liquid_density__temperature=298.15), ("solid_density", "times the liquid's density")),
], ids=["triple-1-K", "boils-and-sublimes", "boils-below-triple", "sublimes-above-triple", "density-no-temperature",
        "pressure-no-triple", "density-above-critical", "boiling-point-near-critical", "solid-too-light"])
def test_fields_that_contradict_each_other_are_refused(fields, words):
    assert is_error(BOIL_TEMP(fields, 1e5), VALUE, *words)
    assert is_error(SUPERHEAT(fields, 400.0, 1e5), VALUE, *words)


def test_a_triple_point_pressure_typed_in_another_unit_is_refused():
    tt = 150.0
    line = BOIL_PRESSURE(DEMO, tt)  # the corresponding-states line at the triple point
    assert BOIL_TEMP(with_(triple_point_temperature=tt, triple_point_pressure=line), 1e5) == BOIL_TEMP(DEMO, 1e5)
    for slip in (1e3, 1e-3, 100.0):  # kPa or mPa read as Pa, hPa read as Pa
        assert is_error(BOIL_TEMP(with_(triple_point_temperature=tt, triple_point_pressure=line * slip), 1e5), VALUE,
                        "triple_point_pressure", "check its unit")


def test_a_boiling_line_that_turns_back_in_its_extension_is_refused():
    # the Antoine line alone is fine; with a triple-point pressure of 10 kPa at 100 K its continuation
    # below 250 K would have to fall from 10 kPa to 10 Pa as the temperature rises
    assert isinstance(BOIL_TEMP(with_(**ANTOINE), 1e5), float)
    turning = with_(**ANTOINE, triple_point_temperature=100.0, triple_point_pressure=1e4)
    for value in (BOIL_TEMP(turning, 1e5), BOIL_PRESSURE(turning, 300.0), STABLE_PHASE(turning, 200.0, 1e5)):
        assert is_error(value, VALUE, "boiling line over its whole extension", "not monotone", "boil.*")


def test_a_published_line_that_underflows_is_refused():
    # log10(p/Pa) = -400... and A = 0, B = 508: pressures of 1e-300 Pa and less, below any vapour pressure
    underflow = with_(**ANTOINE, boil__A=0.0, boil__B=508.0, boil__T_min=2.0, boil__T_max=3.0,
                      critical_temperature=3.2, critical_pressure=1e5, triple_point_temperature=1.6,
                      enthalpy_of_fusion=1.0)
    assert is_error(BOIL_TEMP(underflow, 1e5), VALUE, "published boiling line", "not a finite pressure above")


# ---- never raise, never a non-finite number ------------------------------------------------------------
def test_an_internal_failure_is_value_internal_error_and_raises_in_strict_mode(monkeypatch):
    def broken(self, p):
        raise ZeroDivisionError("float division by zero")

    monkeypatch.setattr(GeneralSubstance, "boil_temperature", broken)
    with pytest.raises(ZeroDivisionError):  # strict mode, as the suite runs: bugs fail loudly
        BOIL_TEMP("propane", 1e5)
    monkeypatch.delenv(STRICT_VARIABLE)
    expected = CellError(VALUE, "internal error: ZeroDivisionError: float division by zero (in BOIL_TEMP)")
    assert BOIL_TEMP("propane", 1e5) == expected
    assert FUNCTIONS["BOIL_TEMP"].cell("propane", [[1e5]]) == str(expected)
    assert compute('=BOIL_TEMP("propane", 100000)', SimpleContext({"BOIL_TEMP": BOIL_TEMP})) == expected


def test_a_wrong_number_of_arguments_is_a_plain_value_error():
    assert BOIL_TEMP("water") == CellError(VALUE, "BOIL_TEMP takes 2 to 4 arguments (substance, pressure, [p_unit], "
                                                  "[t_unit]); got 1")
    assert is_error(FUNCTIONS["SUBSTANCES"].call(1), VALUE, "SUBSTANCES takes 0 arguments")
    assert is_error(BOIL_TEMP("water", 1e5, units="Pa"), VALUE, "unexpected keyword")


def test_non_finite_numbers_become_num_with_a_reason():
    assert cell_value(float("inf")) == CellError(NUM, "the result is too large for a number (it overflows)")
    out = cell_value(np.array([[1.0, np.nan], [-np.inf, 2.0]]))
    assert out[0, 0] == 1.0 and out[1, 1] == 2.0
    assert is_error(out[0, 1], NUM, "not a number") and is_error(out[1, 0], NUM, "too large")
    assert cell_value(np.array([3, 4]))[1] == 4 and cell_value(np.int64(3)) == 3.0
    with pytest.raises(TypeError):  # anything else is a bug in the pack
        cell_value({"a": 1})
    # a molar volume beyond a double's range is #NUM!, not inf (the ideal gas at 5e-324 Pa)
    assert is_error(MOLAR_VOLUME("nitrogen", 300.0, 5e-324, "vapor"), NUM)


# ---- dimensions on the cell paths ----------------------------------------------------------------------
def test_three_dimensions_are_value_on_the_cell_paths_and_broadcast_in_python():
    assert np.shape(STABLE_PHASE("water", 300, [[[]]])) == (1, 1, 0)  # the Python API: numpy's broadcasting
    assert np.shape(STABLE_PHASE("water", [[[300.0]], [[400.0]]], 1e5)) == (2, 1, 1)
    cell = FUNCTIONS["STABLE_PHASE"].cell
    assert re.match(r"#VALUE! pressure has 3 dimensions", cell("water", 300, [[[]]]))
    assert re.match(r"#VALUE! temperature has 3 dimensions", cell("water", [[[300.0]]], 1e5))
    assert cell("water", [[300.0, 400.0]], [[1e5]]) == [["liquid", "vapor"]]
    assert cell("water", 300.0, 1e5) == "liquid"
    assert cell("water", [[300.0]], [[]]) == "#CALC! the result is an empty array"
    # the engine holds scalars and 2-D arrays only; a function's 3-D result there is #VALUE!
    cube = compute("=CUBE()", SimpleContext({"CUBE": lambda: np.zeros((2, 2, 2))}))
    assert cube.code == VALUE


def test_the_excel_decoration_wraps_the_cell_path():
    pytest.importorskip("xlwings")
    excel = registry._for_excel(FUNCTIONS["BOIL_TEMP"].call)
    assert excel("water", [[1.0, 2.0]], "atm", "degC")[0][0] == pytest.approx(99.974, abs=1e-3)
    assert excel("water", [[[1.0]]]).startswith("#VALUE! pressure has 3 dimensions")
    assert excel("water", [[1.0]], "furlong").startswith("#VALUE! p_unit")


def test_nestings_beyond_numpy_dimensions_are_value_errors():
    deep = 1e5
    for _ in range(3000):  # deeper than Python's stack
        deep = [deep]
    assert is_error(BOIL_TEMP("water", deep), VALUE, "nests lists more than 32 deep")
    assert is_error(BOIL_TEMP(deep, 1e5), VALUE, "nests lists more than 32 deep")
    assert FUNCTIONS["BOIL_TEMP"].cell("water", deep).startswith("#VALUE! an argument nests lists")
    assert is_error(BOIL_TEMP("water", np.full((1,) * 40, 1e5)), VALUE, "40 dimensions")
    assert is_error(BOIL_TEMP("water", 1e5, np.full((1,) * 40, "Pa")), VALUE, "40 dimensions")
    nested = (72.11,)
    for _ in range(100000):
        nested = (nested,)
    assert is_error(BOIL_TEMP(with_(molar_mass=nested), 1e5), VALUE, "molar_mass", "must be a number")
    assert np.shape(BOIL_TEMP("water", np.full((1,) * 32, 1e5))) == (1,) * 32  # numpy's own limit is kept
