"""Unit texts: every unit the pack accepts converts to SI by the right factor.

Factors are those of NIST SP 811 (2008), Appendix B.8 (from memory of Appendix B.8). Where
Appendix B prints an exact factor (in bold) or the factor follows exactly from exact
definitions (pound = 0.453 592 37 kg, foot = 0.3048 m, inch = 0.0254 m, standard gravity
9.806 65 m/s2, standard atmosphere 101 325 Pa), the check is to the last bit of a double; where
Appendix B prints a rounded factor, the check is to half a unit in its last printed digit.
"""

from __future__ import annotations

import pytest

from cellfuncs import units
from cellfuncs.errors import VALUE, CellError
from cellfuncs.sheet.functions import BOIL_TEMP, MOLAR_VOLUME, SUBCOOLING
from cellfuncs.units import (
    COMPRESSIBILITY,
    DENSITY,
    EXPANSIVITY,
    MOLAR_ENERGY,
    MOLAR_VOLUME as MOLAR_VOLUME_KIND,
    PRESSURE,
    TEMPERATURE,
    TEMPERATURE_DIFFERENCE,
    UnitError,
    conversion,
)

EXACT = 1e-15  # relative: the factor is exact, only the last bit of a double may differ
LB, FT, INCH, G_N = 0.45359237, 0.3048, 0.0254, 9.80665  # NIST SP 811 (2008), App. B.8, exact
ATM = 101325.0  # Pa, standard atmosphere, NIST SP 811 (2008), App. B.8, exact


def printed(value: float, digits: int) -> float:
    """Relative tolerance of half a unit in the last of ``digits`` significant printed digits."""
    return 0.5 * 10.0 ** (1 - digits)


# --- temperature ------------------------------------------------------------------------------

# (unit, value in that unit, kelvin). T/K = t/degC + 273.15; T/K = (t/degF + 459.67)/1.8;
# T/K = (T/degR)/1.8 -- NIST SP 811 (2008), App. B.8 and sec. 4.2.1.1, exact.
TEMPERATURES = [
    ("K", 300.0, 300.0),
    ("degC", 0.0, 273.15),
    ("degC", 100.0, 373.15),
    ("C", -40.0, 233.15),
    ("°C", 25.0, 298.15),
    ("degF", 32.0, 273.15),
    ("degF", 212.0, 373.15),
    ("F", -40.0, 233.15),
    ("°F", 0.0, 459.67 / 1.8),
    ("degR", 491.67, 273.15),
    ("R", 0.0, 0.0),
    ("R", 180.0, 100.0),
]


@pytest.mark.parametrize("text, value, kelvin", TEMPERATURES)
def test_temperature_units(text, value, kelvin):
    c = conversion(text, TEMPERATURE)
    assert c.to_si(value) == pytest.approx(kelvin, rel=EXACT, abs=1e-12)
    assert c.from_si(kelvin) == pytest.approx(value, rel=1e-14, abs=1e-12)


@pytest.mark.parametrize("text, step", [("K", 1.0), ("degC", 1.0), ("C", 1.0), ("°C", 1.0),
                                        ("degF", 5 / 9), ("F", 5 / 9), ("°F", 5 / 9), ("degR", 5 / 9), ("R", 5 / 9)])
def test_temperature_differences_have_no_offset(text, step):
    # a temperature difference of 1 degF is 5/9 K (NIST SP 811 (2008), sec. 4.2.1.1, exact)
    c = conversion(text, TEMPERATURE_DIFFERENCE)
    assert c.offset == 0.0
    assert c.to_si(1.0) == pytest.approx(step, rel=EXACT)
    assert c.from_si(1.0) == pytest.approx(1 / step, rel=EXACT)


def test_a_difference_in_degf_is_1_8_times_the_kelvin_value():
    in_k = SUBCOOLING("water", 363.15, 1, "K", "atm")
    assert SUBCOOLING("water", 194, 1, "degF", "atm") == pytest.approx(1.8 * in_k, rel=1e-12)
    assert SUBCOOLING("water", 90, 1, "degC", "atm") == pytest.approx(in_k, rel=1e-12)


# --- pressure ---------------------------------------------------------------------------------

# (unit, Pa per unit, relative tolerance); NIST SP 811 (2008), App. B.8 (from memory of App. B.8)
PRESSURES = [
    ("Pa", 1.0, EXACT),
    ("kPa", 1e3, EXACT),
    ("MPa", 1e6, EXACT),
    ("bar", 1e5, EXACT),  # bar = 1.0 E+05 Pa, exact
    ("bara", 1e5, EXACT),  # absolute bar, as bar
    ("mbar", 1e2, EXACT),  # millibar = 1.0 E+02 Pa, exact
    ("atm", ATM, EXACT),  # atmosphere, standard = 1.013 25 E+05 Pa, exact
    ("psi", LB * G_N / INCH**2, EXACT),  # pound-force per square inch, exact from lb, g_n, in
    ("psi", 6.894757e3, printed(6.894757e3, 7)),  # App. B.8 prints 6.894 757 E+03
    ("psia", LB * G_N / INCH**2, EXACT),  # absolute psi, as psi
    ("kgf/cm2", 9.80665e4, EXACT),  # kilogram-force per square centimeter = 9.806 65 E+04 Pa, exact
    ("torr", ATM / 760, EXACT),  # torr = 101 325/760 Pa, exact
    ("torr", 1.333224e2, printed(1.333224e2, 7)),  # App. B.8 prints 1.333 224 E+02
    ("mmHg", 13595.1 * G_N * 1e-3, EXACT),  # conventional: 13.5951 g/cm3 x g_n x 1 mm, exact
    ("mmHg", 1.333224e2, printed(1.333224e2, 7)),  # App. B.8 prints 1.333 224 E+02
    ("inHg", 3.386389e3, printed(3.386389e3, 7)),  # inch of mercury, conventional: 3.386 389 E+03
]


@pytest.mark.parametrize("text, factor, rel", PRESSURES)
def test_pressure_units(text, factor, rel):
    c = conversion(text, PRESSURE)
    assert c.offset == 0.0
    assert c.to_si(1.0) == pytest.approx(factor, rel=rel)
    assert c.from_si(factor) == pytest.approx(1.0, rel=rel)


def test_inch_and_millimetre_of_mercury_agree():
    # 1 inHg = 25.4 mmHg (both conventional, exact); the pack's inHg is App. B.8's rounded 3.386 389 E+03
    ratio = conversion("inHg", PRESSURE).scale / conversion("mmHg", PRESSURE).scale
    assert ratio == pytest.approx(25.4, rel=printed(3.386389e3, 7))


# gauge pressures are relative to the standard atmosphere, 101.325 kPa (common practice in plant
# work; the atmosphere's value is exact, NIST SP 811 (2008), App. B.8)
@pytest.mark.parametrize("text, step", [("barg", 1e5), ("kPag", 1e3), ("MPag", 1e6), ("psig", LB * G_N / INCH**2)])
def test_gauge_pressures_add_one_standard_atmosphere(text, step):
    c = conversion(text, PRESSURE)
    assert c.to_si(0.0) == ATM
    assert c.to_si(2.0) == pytest.approx(2.0 * step + ATM, rel=EXACT)
    assert c.from_si(ATM) == 0.0


def test_gauge_units_reach_the_physics():
    # 0 barg is one standard atmosphere
    assert BOIL_TEMP("water", 0, "barg") == BOIL_TEMP("water", 1, "atm")
    assert BOIL_TEMP("water", 0, "psig") == BOIL_TEMP("water", ATM)


# --- the other kinds --------------------------------------------------------------------------

# (kind, unit, SI per unit, on the other basis). Exact: litre = 1.0 E-03 m3 (App. B.8);
# g/cm3 = 1.0 E+03 kg/m3; lb/ft3 = 0.453 592 37 / 0.3048**3 kg/m3 (App. B.8 prints 1.601 846 E+01).
OTHERS = [
    (MOLAR_VOLUME_KIND, "m3/mol", 1.0, False),
    (MOLAR_VOLUME_KIND, "L/mol", 1e-3, False),
    (MOLAR_VOLUME_KIND, "cm3/mol", 1e-6, False),
    (MOLAR_VOLUME_KIND, "m3/kg", 1.0, True),
    (DENSITY, "kg/m3", 1.0, False),
    (DENSITY, "g/cm3", 1e3, False),
    (DENSITY, "lb/ft3", LB / FT**3, False),
    (DENSITY, "mol/L", 1e3, True),
    (MOLAR_ENERGY, "J/mol", 1.0, False),
    (MOLAR_ENERGY, "kJ/mol", 1e3, False),
    (MOLAR_ENERGY, "J/kg", 1.0, True),
    (MOLAR_ENERGY, "kJ/kg", 1e3, True),
    (EXPANSIVITY, "1/K", 1.0, False),
    (EXPANSIVITY, "1/degC", 1.0, False),
    (EXPANSIVITY, "1/degF", 1.8, False),
    (COMPRESSIBILITY, "1/Pa", 1.0, False),
    (COMPRESSIBILITY, "1/bar", 1e-5, False),
    (COMPRESSIBILITY, "1/MPa", 1e-6, False),
]


@pytest.mark.parametrize("kind, text, factor, alternate", OTHERS)
def test_other_units(kind, text, factor, alternate):
    c = conversion(text, kind)
    assert c.to_si(1.0) == pytest.approx(factor, rel=EXACT)
    assert c.offset == 0.0
    assert c.alternate is alternate


def test_lb_per_cubic_foot_matches_the_printed_factor():
    # NIST SP 811 (2008), App. B.8: pound per cubic foot = 1.601 846 E+01 kg/m3
    assert conversion("lb/ft3", DENSITY).scale == pytest.approx(1.601846e1, rel=printed(1.601846e1, 7))


def test_mass_basis_units_divide_by_the_molar_mass():
    # m3/kg = (m3/mol) / M; M = 0.018015268 kg/mol (IAPWS R6-95(2018), section 2)
    per_mol = MOLAR_VOLUME("water", 300, 1e5)
    assert MOLAR_VOLUME("water", 300, 1e5, "", "K", "Pa", "m3/kg") == pytest.approx(per_mol / 0.018015268, rel=1e-14)


# --- blanks, errors, caching ------------------------------------------------------------------


@pytest.mark.parametrize("blank", [None, "", "   "])
def test_blank_means_si(blank):
    assert conversion(blank, PRESSURE) == units.Conversion(1.0)
    assert conversion(blank, TEMPERATURE) == units.Conversion(1.0)


@pytest.mark.parametrize("text", ["furlong", "kPa kPa kPa x", "2", "degX", "Pa**Pa"])
def test_unknown_unit(text):
    with pytest.raises(UnitError, match="unknown unit|is not a unit"):
        conversion(text, PRESSURE)


@pytest.mark.parametrize("text, kind", [("kPa", TEMPERATURE), ("K", PRESSURE), ("C", PRESSURE),
                                        ("J/mol", DENSITY), ("m3/mol", MOLAR_ENERGY), ("1/K", COMPRESSIBILITY)])
def test_unit_of_the_wrong_kind(text, kind):
    with pytest.raises(UnitError, match=f"is not a unit of {kind.name}"):
        conversion(text, kind)


def test_unit_errors_in_a_cell_name_the_argument():
    error = BOIL_TEMP("water", 1, "degC")
    assert isinstance(error, CellError) and error.code == VALUE and error.reason.startswith("p_unit:")
    error = BOIL_TEMP("water", 1, "atm", "furlong")
    assert isinstance(error, CellError) and error.code == VALUE and "t_unit" in error.reason


@pytest.mark.parametrize("text", ["1/0", "**", "()"])
def test_garbage_unit_text_in_a_cell_is_a_value_error(text):
    error = BOIL_TEMP("water", 1, text)
    assert isinstance(error, CellError) and error.code == VALUE and "p_unit" in error.reason


@pytest.mark.parametrize("text", ["1/0", "**", "()"])
def test_garbage_unit_text_raises_unit_error(text):
    with pytest.raises(UnitError):
        conversion(text, PRESSURE)


def test_parsing_is_cached():
    first = conversion("kPag", PRESSURE)
    assert conversion("kPag", PRESSURE) is first
    assert conversion("degF", TEMPERATURE) is conversion("degF", TEMPERATURE)


# --- unit texts as engineers type them ---------------------------------------------------------

@pytest.mark.parametrize("typed, meant", [
    ("Bar", "bar"), ("BARG", "barg"), ("kpa", "kPa"), ("KPA", "kPa"), ("PSIG", "psig"), ("Psia", "psia"),
    ("DEGC", "degC"), ("degf", "degF"), ("mmhg", "mmHg"), ("ATM", "atm"), ("kj/kg", "kJ/kg"),
])
def test_case_does_not_matter_where_it_is_unambiguous(typed, meant):
    kind = TEMPERATURE if "deg" in meant else MOLAR_ENERGY if "J" in meant else PRESSURE
    assert conversion(typed, kind) == conversion(meant, kind)


@pytest.mark.parametrize("typed, candidates", [("mpa", ("MPa", "mPa")), ("MBAR", ("Mbar", "mbar"))])
def test_an_ambiguous_case_lists_the_candidates(typed, candidates):
    with pytest.raises(UnitError) as info:
        conversion(typed, PRESSURE)
    for candidate in candidates:
        assert candidate in str(info.value)


# technical atmosphere 1 kgf/cm2 = 9.806 65 E+04 Pa, exact; conventional water columns 1000 kg/m3 x g_n:
# mmH2O 9.806 65 Pa exact, inH2O 2.490 889 E+02 Pa -- NIST SP 811 (2008), App. B.8 (from memory of App. B.8).
# "kg/cm2" on plant gauges and data sheets means kgf/cm2 (common practice).
@pytest.mark.parametrize("text, factor, offset", [
    ("bar(g)", 1e5, ATM), ("bar (a)", 1e5, 0.0), ("psi(g)", LB * G_N / INCH**2, ATM), ("kPa(g)", 1e3, ATM),
    ("kg/cm2", G_N * 1e4, 0.0), ("kg/cm²", G_N * 1e4, 0.0), ("kg/cm2g", G_N * 1e4, ATM), ("kgf/cm2g", G_N * 1e4, ATM),
    ("kg/cm2(g)", G_N * 1e4, ATM), ("KGF/CM2A", G_N * 1e4, 0.0), ("mmH2O", G_N, 0.0), ("inH2O", 249.0889, 0.0),
])
def test_plant_spellings_of_pressure(text, factor, offset):
    c = conversion(text, PRESSURE)
    assert c.scale == pytest.approx(factor, rel=printed(249.0889, 7) if "in" in text else EXACT)
    assert c.offset == offset


# US gallon = 231 in3 = 3.785 411 784 E-03 m3, exact; Btu (IT) = 1.055 055 852 62 E+03 J, exact
# (NIST SP 811 (2008), App. B.8, from memory of App. B.8)
def test_trade_units_of_density_and_energy():
    assert conversion("lb/gal", DENSITY).scale == pytest.approx(LB / 3.785411784e-3, rel=EXACT)
    btu_per_lb = conversion("BTU/lbm", MOLAR_ENERGY)
    assert btu_per_lb.alternate and btu_per_lb.scale == pytest.approx(1055.05585262 / LB, rel=EXACT)


# --- the site's atmosphere for gauge units -----------------------------------------------------

def test_a_gauge_unit_may_state_its_atmosphere_as_a_pressure():
    assert conversion("barg@83kPa", PRESSURE).to_si(10.0) == pytest.approx(10e5 + 83e3, rel=EXACT)
    assert conversion("psig @ 12.1 psia", PRESSURE).offset == pytest.approx(12.1 * LB * G_N / INCH**2, rel=EXACT)
    # the same number in gauge units is a different absolute pressure, and so a different boiling point
    assert BOIL_TEMP("water", 10, "barg@83kPa") < BOIL_TEMP("water", 10, "barg")


# U.S. Standard Atmosphere 1976, Table I, pressures at geometric altitudes (identical to ISO 2533:1975
# below 11 km); from memory of the table's five printed digits.
@pytest.mark.parametrize("altitude, pascal", [(0, 101325.0), (1000, 89876.0), (2000, 79501.0), (5000, 54048.0),
                                              (11000, 22700.0)])
def test_a_gauge_unit_may_state_its_atmosphere_as_an_altitude(altitude, pascal):
    assert conversion(f"barg@{altitude}m", PRESSURE).offset == pytest.approx(pascal, rel=printed(pascal, 5))
    assert units.standard_atmosphere(float(altitude)) == pytest.approx(pascal, rel=printed(pascal, 5))


def test_altitude_in_feet():
    assert conversion("psig@5000ft", PRESSURE).offset == pytest.approx(units.standard_atmosphere(5000 * FT), rel=EXACT)


@pytest.mark.parametrize("text, words", [
    ("bara@83kPa", "gauge pressure unit"), ("barg@", "after '@'"), ("barg@5psig", "absolute pressure"),
    ("barg@20000m", "outside the standard atmosphere"), ("barg@-3kPa", "positive"),
])
def test_bad_atmospheres_say_why(text, words):
    with pytest.raises(UnitError, match=words):
        conversion(text, PRESSURE)


def test_units_command_lists_every_quantity(capsys):
    from cellfuncs.cli import main

    assert main(["units"]) == 0
    out = capsys.readouterr().out
    for heading in ("temperature:", "pressure:", "plant spellings:", "barg@1600m"):
        assert heading in out


# --- the usual units without pint ----------------------------------------------------------------

def test_the_common_unit_table_is_what_pint_computes_from_units_txt():
    from importlib import resources

    stored = resources.files("cellfuncs").joinpath("data", "unit_table.toml").read_text(encoding="utf-8")
    assert stored == units.common_table_text(), "regenerate: python -m cellfuncs.units > cellfuncs/data/unit_table.toml"


def test_a_formula_in_common_units_does_not_import_pint():
    import subprocess
    import sys

    code = ("import sys; from cellfuncs.sheet.functions import BOIL_TEMP, MASS_DENSITY; "
            "BOIL_TEMP('water', 1, 'atm', 'degC'); MASS_DENSITY('water', 20, 5, '', 'degC', 'barg', 'kg/m3'); "
            "print('pint' in sys.modules)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert done.stdout.strip() == "False", done.stdout + done.stderr


def test_the_molar_gas_constant_is_the_product_of_the_defining_constants():
    """CODATA 2018 (Tiesinga et al. 2021, Rev. Mod. Phys. 93, 025010) prints R = 8.314 462 618... J/(mol K),
    exact; the pack derives it from N_A and k of the SI Brochure's Table 1 rather than typing it."""
    from cellfuncs.substances.constants import R

    assert R == pytest.approx(8.314462618, abs=5e-10)
