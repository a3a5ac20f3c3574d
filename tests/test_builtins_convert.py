"""CONVERT: Microsoft's documented examples, exact unit definitions and Excel's prefix rules.

Microsoft's examples are from memory of Microsoft's CONVERT page; the exact definitions name
their standard; values marked "Excel's stored value" are the ones Excel computed in the
ENGINEERING_CONVERT reference workbook (tests/test_conformance.py scores all of its cells).
"""

from __future__ import annotations

import pytest

from cellfuncs.formula import compute


def approx(x: float):
    return pytest.approx(x, rel=1e-15)


DOCUMENTED = [
    # from memory of Microsoft's CONVERT page
    ('=CONVERT(1, "lbm", "kg")', 0.45359237),
    ('=CONVERT(68, "F", "C")', 20.0),
    ('=CONVERT(CONVERT(100, "ft", "m"), "ft", "m")', 9.290304),  # 100 square feet in square meters
]

EXACT = [
    # NIST SP 811 (2008) Appendix B: international foot, inch, pound, standard gravity
    ('=CONVERT(1, "ft", "m")', 0.3048),
    ('=CONVERT(1, "in", "cm")', 2.54),
    ('=CONVERT(1, "mi", "ft")', 5280.0),
    ('=CONVERT(1, "lbf", "N")', 4.4482216152605),
    ('=CONVERT(1, "grain", "mg")', 64.79891),
    ('=CONVERT(1, "survey_mi", "m")', 5280 * 1200 / 3937),  # US survey foot 1200/3937 m
    ('=CONVERT(1, "gal", "l")', 3.785411784),  # US gallon 231 in3
    ('=CONVERT(1, "gal", "tsp")', 768.0),
    ('=CONVERT(1, "bushel", "in3")', 2150.42),
    ('=CONVERT(1, "uk_acre", "ft2")', 43560.0),
    ('=CONVERT(1, "cal", "J")', 4.1868),  # IT calorie
    ('=CONVERT(1, "c", "J")', 4.184),  # thermochemical calorie
    ('=CONVERT(1, "BTU", "J")', 1055.05585262),  # IT Btu
    ('=CONVERT(1, "HP", "W")', 745.69987158227022),  # 550 ft lbf/s
    ('=CONVERT(1, "PS", "W")', 735.49875),  # 75 kgf m/s
    ('=CONVERT(1, "atm", "Pa")', 101325.0),  # standard atmosphere
    ('=CONVERT(760, "Torr", "atm")', 1.0),
    ('=CONVERT(1, "psi", "Pa")', 6894.757293168361),
    # UK Weights and Measures Act 1985: imperial gallon 4.54609 l
    ('=CONVERT(1, "uk_gal", "l")', 4.54609),
    ('=CONVERT(8, "uk_pt", "uk_gal")', 1.0),
    # IAU: light-year = c x Julian year (365.25 d)
    ('=CONVERT(1, "ly", "m")', 9460730472580800.0),
    ('=CONVERT(1, "yr", "day")', 365.25),
    # NIST SP 811: knot = 1852 m/h
    ('=CONVERT(1, "kn", "m/h")', 1852.0),
    # SI Brochure: 0 degC = 273.15 K; Fahrenheit, Rankine and Reaumur scales
    ('=CONVERT(0, "C", "K")', 273.15),
    ('=CONVERT(212, "fah", "cel")', 100.0),
    ('=CONVERT(491.67, "Rank", "C")', 0.0),
    ('=CONVERT(80, "Reau", "C")', 100.0),
    ('=CONVERT(-40, "C", "F")', -40.0),
]

EXCEL_VALUES = [
    # Excel's stored values, where Excel keeps older or rounded definitions
    ('=CONVERT(1, "u", "g")', 1.660538782e-24),  # CODATA 2006
    ('=CONVERT(1, "eV", "J")', 1.602176487e-19),  # CODATA 2006
    ('=CONVERT(1, "mmHg", "Pa")', 133.322),
    ('=CONVERT(1, "pc", "m")', 3.0856775812815532e16),
    ('=CONVERT(1, "Mpc", "m")', 3.085677581281553e22),
    ('=CONVERT(0.004, "Mmph", "m/s")', 1788.16),  # mph takes a prefix in Excel
    ('=CONVERT(0.0002, "Muk_pt", "m3")', 0.11365225),
    ('=CONVERT(12, "MK", "K")', 12e6),
]

PREFIXES = [
    ('=CONVERT(1, "km", "m")', 1000.0),
    ('=CONVERT(1, "dam", "m")', 10.0),
    ('=CONVERT(1, "em", "m")', 10.0),  # "e" is deka too, as Microsoft's prefix table lists
    ('=CONVERT(1, "m", "um")', 1e6),
    ('=CONVERT(1, "ms", "s")', 1e-3),
    ('=CONVERT(1, "kibyte", "byte")', 1024.0),
    ('=CONVERT(1, "Gibyte", "bit")', 8 * 2.0**30),
    ('=CONVERT(1, "Yibit", "bit")', 2.0**80),
    ('=CONVERT(1, "kbyte", "bit")', 8000.0),
    ('=CONVERT(1, "cm2", "m2")', 1e-4),  # the prefix is squared with the unit
    ('=CONVERT(1, "dm^3", "l")', 1.0),  # and cubed
    ('=CONVERT(1, "km/h", "m/s")', 1 / 3.6),
    ('=CONVERT(1, "kWh", "J")', 3.6e6),
    ('=CONVERT(1, "mL", "m3")', 1e-6),
]


@pytest.mark.parametrize("formula, expected", DOCUMENTED + EXACT + EXCEL_VALUES + PREFIXES)
def test_convert(formula, expected):
    assert compute(formula) == approx(expected)


NOT_AVAILABLE = [
    '=CONVERT(2.5, "ft", "sec")',  # from memory of Microsoft's CONVERT page: different groups
    '=CONVERT(1, "kft", "m")',  # a unit that takes no prefix
    '=CONVERT(1, "kim", "m")',  # binary prefixes are for bit and byte only
    '=CONVERT(1, "Km", "m")',  # units and prefixes are case-sensitive
    '=CONVERT(1, "LBM", "kg")',
    '=CONVERT(1, "Mly2", "m2")',  # Excel's stored value: ly takes a prefix, ly2 does not
    '=CONVERT(1, "MC", "K")',
    '=CONVERT(1, "m", "")',
    '=CONVERT(1, "furlong", "m")',
]


@pytest.mark.parametrize("formula", NOT_AVAILABLE)
def test_unknown_units_and_different_groups_are_na(formula):
    assert compute(formula).code == "#N/A"


def test_number_must_be_numeric():
    assert compute('=CONVERT("abc", "m", "ft")').code == "#VALUE!"  # Microsoft's CONVERT page
    assert compute('=CONVERT(TRUE, "m", "ft")').code == "#VALUE!"  # engine contract
    assert compute('=CONVERT("2", "m", "cm")') == approx(200.0)  # engine contract: numeric text converts
    assert compute('=CONVERT(1/0, "m", "ft")').code == "#DIV/0!"


def test_arrays_and_overflow():
    assert compute('=CONVERT({1,2}, "m", {"cm","mm"})').tolist() == [[100.0, 2000.0]]
    assert compute('=CONVERT(1E308, "Ym", "m")').code == "#NUM!"  # engine contract
