"""Edge cases of the math and engineering built-ins where Excel's rules go beyond the plain
conversions: date text padded with spaces, logical values refused by the functions of the former
Analysis ToolPak, tiny quotients in FLOOR and CEILING, how GCD and LCM read their arguments,
places of DEC2BIN and its kin, BASE and DECIMAL, and the approximations behind Excel's Bessel
functions.

Each check names its source: a Microsoft function reference page ("Microsoft's <NAME> page",
from memory of those pages unless said otherwise) or "Excel's stored value in <workbook>",
a cell Excel computed in the reference workbooks (``../shared/excel-reference``).
"""

from __future__ import annotations

import math

import pytest

from cellfuncs.formula import SimpleContext, compute
from cellfuncs.formula.arrays import object_array

FLOOR_CEILING = "MATH_AND_TRIGONOMETRY_FLOOR_CEILING.xlsx"
GCD_LCM = "MATH_AND_TRIGONOMETRY_GCD_LCM.xlsx"
BESSEL = "ENGINEERING_BESSEL.xlsx"
NUMBER_SYSTEMS = "ENGINEERING_NUMBER_SYSTEMS.xlsx"
BASE_BOOK = "MATH_AND_TRIGONOMETRY_BASE.xlsx"
BASES = "xlcalculator BASES.xlsx"
MROUND_BOOK = "MATH_AND_TRIGONOMETRY_MROUND_TRUNC_INT.xlsx"
MOD_BOOK = "MATH_AND_TRIGONOMETRY_MOD_QUOTIENT.xlsx"
GESTEP_BOOK = "ENGINEERING_GESTEP_DELTA.xlsx"


def _cells(**cells):
    """A context whose names stand for cells and ranges: scalars, or lists of rows."""
    return SimpleContext(names={k: object_array(v) if isinstance(v, list) else v for k, v in cells.items()})


VALUES = [
    # (formula, expected, source); an expected str starting with "#" is an error code
    ('=FLOOR(" 2024-01-10 ", 1)', "#VALUE!", FLOOR_CEILING),
    ('=CEILING(10, " 2024-01-10 ")', "#VALUE!", FLOOR_CEILING),
    ('=FLOOR.MATH(" 2024-01-10 ", 1/0)', "#VALUE!", FLOOR_CEILING),  # the first argument's error first
    ('=FLOOR(-1E-12, " 10 ")', -10.0, FLOOR_CEILING),
    ('=CEILING("2024-01-10", 7)', 45304.0, FLOOR_CEILING),
    ("=FLOOR(-1E-12, 1)", -1.0, FLOOR_CEILING),
    ("=CEILING(1E-12, 7)", 7.0, FLOOR_CEILING),
    ("=CEILING(-1E-307, -0.1)", -0.1, FLOOR_CEILING),
    ("=FLOOR.PRECISE(-1E-12)", -1.0, FLOOR_CEILING),
    ("=ISO.CEILING(1E-12, -7)", 7.0, FLOOR_CEILING),
    ("=CEILING.MATH(1E-12, PI())", math.pi, FLOOR_CEILING),
    ("=FLOOR(-1E-12, TRUE)", -1.0, FLOOR_CEILING),  # FLOOR reads TRUE as 1
    ('=EXP(" 2024-01-10 ")', "#VALUE!", "MATH_AND_TRIGONOMETRY_EXP_SIGN.xlsx"),
    ('=INT(" 2024-01-10 ")', "#VALUE!", MROUND_BOOK),
    ('=TRUNC(" 2024-01-10 ", 7)', "#VALUE!", MROUND_BOOK),
    ('=MROUND(" 2024-01-10 ", 7)', "#VALUE!", MROUND_BOOK),
    ('=MROUND("2024-01-10", 7)', 45304.0, MROUND_BOOK),
    ("=MROUND(TRUE, 2)", "#VALUE!", MROUND_BOOK),
    ("=MROUND(2, FALSE)", "#VALUE!", MROUND_BOOK),
    ("=QUOTIENT(TRUE, TRUE)", "#VALUE!", MOD_BOOK),
    ("=MOD(TRUE, TRUE)", 0.0, MOD_BOOK),
    ("=MOD(5, 1E-10)", 9.999981783901343e-11, MOD_BOOK),
    ("=MOD(5, -1E-10)", -1.821609865774887e-16, MOD_BOOK),
    ("=MOD(10.0000000001, -0.1)", -0.09999999990000055, MOD_BOOK),
    ("=GESTEP(TRUE, 1)", "#VALUE!", GESTEP_BOOK),
    ("=DELTA(TRUE)", "#VALUE!", GESTEP_BOOK),
    # GCD and LCM
    ('=LCM({4,"8",12})', 24.0, GCD_LCM),
    ('=GCD({4,"2024-01-10",12})', 1.0, GCD_LCM),
    ('=LCM({4,"2024-01-10",12})', 543612.0, GCD_LCM),
    ('=GCD({4,"eight",12})', "#VALUE!", GCD_LCM),
    ("=LCM({4,TRUE,12})", "#VALUE!", GCD_LCM),
    ('=LCM(" 10 ", 3)', 30.0, GCD_LCM),
    ('=GCD(" 2024-01-10 ", 7)', "#VALUE!", GCD_LCM),
    ('=GCD("", 10)', "#VALUE!", GCD_LCM),
    ("=LCM(, 5)", "#N/A", GCD_LCM),
    ("=GCD(1E+100, 1E+50)", "#NUM!", GCD_LCM),
    ("=LCM(2^31-1, 2^30-1)", "#NUM!", GCD_LCM),
    ("=LCM(7.5, 4.5, 7.7)", 28.0, GCD_LCM),
    ("=GCD(24, 36)", 12.0, "Microsoft's GCD page"),
    ("=LCM(24, 36)", 72.0, "Microsoft's LCM page"),
    # Bessel functions: Excel's approximations, to the last bit
    ("=BESSELJ(0, 0)", 1.00000000283141, BESSEL),
    ("=BESSELJ(1, 1)", 0.4400505856771301, BESSEL),
    ("=BESSELJ(-1, 3)", -0.019563353982687996, BESSEL),
    ("=BESSELJ(1E-10, 5)", 2.6041666666666675e-54, BESSEL),
    ("=BESSELJ(100000, 5)", 0.001846551246313725, BESSEL),
    ("=BESSELJ(2, 30)", 3.650256266474097e-33, BESSEL),
    ("=BESSELY(1, 1)", -0.7812128209531197, BESSEL),
    ("=BESSELY(1E-10, 0)", -14.732516312945261, BESSEL),
    ("=BESSELY(1E-10, 1)", -6366197720.0, BESSEL),
    ("=BESSELY(2, 30)", -2.9132238172293094e30, BESSEL),
    ("=BESSELY(1.5, 12)", -422217415.9345024, BESSEL),
    ("=BESSELY(100000, 5)", 0.001719431947654535, BESSEL),
    ('=BESSELY("1", 2)', -1.6506826133039476, BESSEL),
    ("=BESSELJ(TRUE, 1)", "#VALUE!", BESSEL),
    ("=BESSELK(TRUE, 1)", "#VALUE!", BESSEL),
    ("=BESSELJ(1.9, 2)", 0.32992582866978504, "Microsoft's BESSELJ page: 0.329925829"),
    # places of the base conversions
    ("=DEC2BIN(2.7, 0)", "#NUM!", NUMBER_SYSTEMS),
    ('=DEC2BIN("E", 0)', "#NUM!", BASES),
    ('=DEC2BIN("E", 1)', "#VALUE!", BASES),
    ("=DEC2HEX(-25, 0)", "#NUM!", BASES),
    ("=DEC2OCT(-25, 1)", "7777777747", BASES),
    ("=DEC2BIN(0, 1)", "0", BASES),
    ("=BIN2HEX(1100011011, 0)", "#NUM!", NUMBER_SYSTEMS),
    ("=BIN2HEX(1100011011, 1)", "FFFFFFFF1B", NUMBER_SYSTEMS),
    ('=DEC2BIN("")', "#VALUE!", BASES),
    ('=HEX2BIN("")', "0", BASES),
    # BASE and DECIMAL
    ("=BASE(7, 2)", "111", "Microsoft's BASE page"),
    ("=BASE(100, 16)", "64", "Microsoft's BASE page"),
    ("=BASE(15, 2, 10)", "0000001111", "Microsoft's BASE page"),
    ("=BASE(16, 2, 8)", "00010000", "Microsoft's BASE page"),
    ("=BASE(16, 7, 20)", "00000000000000000022", BASE_BOOK),
    ("=BASE(12345678, 16, 2)", "BC614E", BASE_BOOK),
    ("=BASE(12.567, 2, 7)", "0001100", BASE_BOOK),
    ("=BASE(20, 10.9)", "20", BASE_BOOK),
    ("=BASE(123456789, 36)", "21I3V9", BASE_BOOK),
    ("=BASE(-1, 2)", "#NUM!", BASE_BOOK),
    ("=BASE(123, 1)", "#NUM!", BASE_BOOK),
    ("=BASE(123456789, 37)", "#NUM!", BASE_BOOK),
    ("=BASE(1, 2, 256)", "#NUM!", "Microsoft's BASE page: Min_length at most 255"),
    ('=DECIMAL("FF", 16)', 255.0, "Microsoft's DECIMAL page"),
    ("=DECIMAL(111, 2)", 7.0, "Microsoft's DECIMAL page"),
    ('=DECIMAL("zap", 36)', 45745.0, "Microsoft's DECIMAL page"),
    ('=DECIMAL("21I3V9", 36)', 123456789.0, BASE_BOOK),
    ('=DECIMAL("1100", 2)', 12.0, BASE_BOOK),
    ('=DECIMAL("20", 10.9)', 20.0, BASE_BOOK),
    ('=DECIMAL("12", 37)', "#NUM!", BASE_BOOK),
    ('=DECIMAL("12", 2)', "#NUM!", "a digit the radix lacks (Microsoft's DECIMAL page: #NUM! or #VALUE!)"),
    ("=DECIMAL(BASE(-1, 2), 2)", "#NUM!", BASE_BOOK),
]


@pytest.mark.parametrize("formula, expected, source", VALUES, ids=[v[0] for v in VALUES])
def test_values(formula, expected, source):
    got = compute(formula)
    if isinstance(expected, str) and expected.startswith("#"):
        assert getattr(got, "code", got) == expected, got
    elif isinstance(expected, float):
        assert isinstance(got, float) and math.isclose(got, expected, rel_tol=1e-15), got
    else:
        assert got == expected


def test_gcd_lcm_blank_cells():
    # Excel's stored values in GCD_LCM: a blank cell of a range is 0, a blank single cell is left
    # out, and with nothing but blank single cells there are no numbers
    ctx = _cells(g=[[None, 5.0]], a=None, b=5.0)
    assert compute("=LCM(g)", ctx) == 0.0 and compute("=GCD(g)", ctx) == 5.0
    assert compute("=LCM(a, b, a)", ctx) == 5.0 and compute("=GCD(a, b, a)", ctx) == 5.0
    assert compute("=LCM(a, a)", ctx).code == "#VALUE!" and compute("=GCD(a)", ctx).code == "#VALUE!"


def test_gcd_lcm_read_text_and_logicals_in_ranges():
    # Excel's stored values in GCD_LCM: text "8" in a referenced cell is 8; TRUE there is #VALUE!
    ctx = _cells(r=[["8", 2.0]], t=[[True, 2.0]], e=[["", 10.0]])
    assert compute("=LCM(r)", ctx) == 8.0 and compute("=GCD(r)", ctx) == 2.0
    assert compute("=LCM(t)", ctx).code == "#VALUE!"
    assert compute("=GCD(e)", ctx).code == "#VALUE!"


def test_places_blank_cell_is_zero():
    # Excel's stored value in NUMBER_SYSTEMS (DEC2BIN(2.7, <blank>)): a blank places is 0, so #NUM!,
    # where places left out gives the shortest form
    ctx = _cells(blank=None)
    assert compute("=DEC2BIN(12, blank)", ctx).code == "#NUM!"
    assert compute("=DEC2BIN(12)", ctx) == "1100"


def test_base_blank_min_length_is_zero():
    # Excel's stored value in BASE (BASE(123.45678, 16, <blank>))
    assert compute("=BASE(123.45678, 16, blank)", _cells(blank=None)) == "7B"


def test_functions_broadcast_over_arrays():
    # the element-wise rules hold element by element
    assert compute("=BASE({7,8}, 2)").tolist() == [["111", "1000"]]
    assert compute('=DECIMAL({"FF","zz"}, 16)').tolist()[0][0] == 255.0
    assert compute("=MROUND({10,TRUE}, 3)").tolist()[0][1].code == "#VALUE!"
