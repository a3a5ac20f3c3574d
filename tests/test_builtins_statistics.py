"""Excel's statistical built-ins of fn_ranks, fn_regression and fn_hypothesis, example by example.

Each case names its source: "from memory of Microsoft's NAME page" for the examples of
Microsoft's function reference (its data typed in as array constants; the expected values to
the digits the page prints), "reference workbook" for a case of the Excel-computed function
sheets (ironcalc's calc_tests STATISTICAL folder, values as Excel stored them), or "rule on
Microsoft's NAME page" for a case built here, with data of its own, to check a rule the page
states. tests/test_conformance.py scores the reference workbooks in full.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from cellfuncs.errors import CellError
from cellfuncs.formula import compute
from test_recalc import cli, one_sheet, values

NA, VALUE, NUM, DIV0, REF = "#N/A", "#VALUE!", "#NUM!", "#DIV/0!", "#REF!"
MS = "from memory of Microsoft's {} page"
RULE = "rule on Microsoft's {} page"
WORKBOOK = "reference workbook {}"
LIKE_WORKBOOK = "reference workbook {}'s rule, on data of our own"

PERCENTILE_DATA = "{1,2,3,6,6,6,7,8,9}"  # Microsoft's PERCENTILE.EXC and PERCENTRANK.EXC data
RANK_DATA = "{13,12,11,8,4,3,2,1,1,1}"  # Microsoft's PERCENTRANK.INC data
LOGEST_Y, LOGEST_X = "{33100,47300,69000,102000,150000,220000}", "{11,12,13,14,15,16}"  # LOGEST and GROWTH
COSTS = "{133890,135000,135790,137300,138130,139100,139900,141120,141890,143230,144000,145290}"  # TREND
MONTHS = "{1,2,3,4,5,6,7,8,9,10,11,12}"
TTEST_1, TTEST_2 = "{3,4,5,8,9,1,2,4,5}", "{6,19,3,2,14,4,5,17,1}"
ZTEST_DATA = "{3,6,7,8,6,5,4,2,1,9}"
FTEST_1, FTEST_2 = "{6,7,9,15,21}", "{20,28,31,38,40}"  # also FORECAST's data
CHI_ACTUAL, CHI_EXPECTED = "{58,35;11,25;10,23}", "{45.35,47.65;17.56,18.44;16.09,16.91}"

CASES = [
    # percentiles and quartiles
    ("=PERCENTILE.INC({1,3,2,4}, 0.3)", 1.9, MS.format("PERCENTILE.INC")),
    ("=PERCENTILE({1,3,2,4}, 0.3)", 1.9, MS.format("PERCENTILE")),
    (f"=PERCENTILE.EXC({PERCENTILE_DATA}, 0.25)", 2.5, MS.format("PERCENTILE.EXC")),
    (f"=PERCENTILE.EXC({PERCENTILE_DATA}, 0)", NUM, MS.format("PERCENTILE.EXC")),
    (f"=PERCENTILE.EXC({PERCENTILE_DATA}, 0.01)", NUM, MS.format("PERCENTILE.EXC")),
    (f"=PERCENTILE.EXC({PERCENTILE_DATA}, 2)", NUM, MS.format("PERCENTILE.EXC")),
    ("=PERCENTILE.INC({1,2,3}, 1.2)", NUM, RULE.format("PERCENTILE.INC")),  # k outside 0..1
    ("=PERCENTILE.INC({1,2,3}, {0,0.5,1})", [[1.0, 2.0, 3.0]], RULE.format("PERCENTILE.INC")),
    ("=QUARTILE.INC({1,2,4,7,8,9,10,12}, 1)", 3.5, MS.format("QUARTILE.INC")),
    ("=QUARTILE({1,2,4,7,8,9,10,12}, 1)", 3.5, MS.format("QUARTILE")),
    ("=QUARTILE.EXC({6,7,15,36,39,40,41,42,43,47,49}, 1)", 15.0, MS.format("QUARTILE.EXC")),
    ("=QUARTILE.EXC({6,7,15,36,39,40,41,42,43,47,49}, 3)", 43.0, MS.format("QUARTILE.EXC")),
    ("=QUARTILE.INC({1,2,3,4,5,6,7,8,9,10}, 1.3)", 3.25, WORKBOOK.format("PERCENTIL_QUARTIL")),  # quart truncated
    ("=QUARTILE.EXC({1,2,3,4,5,6,7,8,9,10}, 4)", NUM, WORKBOOK.format("PERCENTIL_QUARTIL")),
    # percent ranks: the share below x, cut (not rounded) to the significant digits
    (f"=PERCENTRANK.INC({RANK_DATA}, 2)", 0.333, MS.format("PERCENTRANK.INC")),
    (f"=PERCENTRANK.INC({RANK_DATA}, 4)", 0.555, MS.format("PERCENTRANK.INC")),
    (f"=PERCENTRANK.INC({RANK_DATA}, 8)", 0.666, MS.format("PERCENTRANK.INC")),
    (f"=PERCENTRANK.INC({RANK_DATA}, 5)", 0.583, MS.format("PERCENTRANK.INC")),
    (f"=PERCENTRANK({RANK_DATA}, 4)", 0.555, MS.format("PERCENTRANK")),
    (f"=PERCENTRANK.EXC({PERCENTILE_DATA}, 7)", 0.7, MS.format("PERCENTRANK.EXC")),
    (f"=PERCENTRANK.EXC({PERCENTILE_DATA}, 5.43)", 0.381, MS.format("PERCENTRANK.EXC")),
    (f"=PERCENTRANK.EXC({PERCENTILE_DATA}, 5.43, 1)", 0.3, MS.format("PERCENTRANK.EXC")),
    ("=PERCENTRANK.INC({12,-1,7.5,56,12,-4,3}, 40)", 0.939, WORKBOOK.format("PERCENTIL_QUARTIL")),  # after the ties
    ("=PERCENTRANK.INC({12,-1,7.5,56,12,-4,3}, 56.1)", NA, WORKBOOK.format("PERCENTIL_QUARTIL")),
    ("=PERCENTRANK.INC({1,2,3}, 2, 0)", NUM, RULE.format("PERCENTRANK.INC")),  # significance below 1
    # ranks
    ("=RANK.EQ(7, {7,3.5,3.5,1,2}, 1)", 5.0, MS.format("RANK.EQ")),
    ("=RANK.EQ(2, {7,3.5,3.5,1,2})", 4.0, MS.format("RANK.EQ")),
    ("=RANK.EQ(3.5, {7,3.5,3.5,1,2}, 1)", 3.0, MS.format("RANK.EQ")),
    ("=RANK(3.5, {7,3.5,3.5,1,2}, 1)", 3.0, MS.format("RANK")),
    ("=RANK(7, {7,3.5,3.5,1,2}, 1)", 5.0, MS.format("RANK")),
    ("=RANK.AVG(94, {89,88,92,101,94,97,95})", 4.0, MS.format("RANK.AVG")),
    ("=RANK.AVG(70, {65,70,66,65,72,37,89,70})", 3.5, WORKBOOK.format("RANK_EQ_RANK_AVG")),
    ("=RANK.EQ(70.5, {65,70,66,65,72,37,89,70})", NA, WORKBOOK.format("RANK_EQ_RANK_AVG")),
    # TRIMMEAN, MODE.MULT, FREQUENCY, PROB, PERMUTATIONA
    ("=TRIMMEAN({4,5,6,7,2,3,4,5,1,2,3}, 0.2)", 3.778, MS.format("TRIMMEAN")),
    ("=TRIMMEAN({12.4,5,7.3,-4,0,2.3,4.3,7,-2}, 0.4)", 3.4142857142857146, WORKBOOK.format("TRIMMEAN")),
    ("=TRIMMEAN({1,2,3}, 1)", NUM, MS.format("TRIMMEAN")),
    ("=MODE.MULT({1,2,3,4,3,2,1,2,3,5,6,1})", [[1.0], [2.0], [3.0]], MS.format("MODE.MULT")),
    ("=MODE.MULT({2,2,2,1,1,1,3,3})", [[2.0], [1.0]], WORKBOOK.format("MODE")),  # first appearance first
    ("=MODE.MULT({1,2,3,4})", NA, WORKBOOK.format("MODE")),
    ("=FREQUENCY({79,85,78,85,50,81,95,88,97}, {70,79,89})", [[1.0], [2.0], [4.0], [2.0]], MS.format("FREQUENCY")),
    ("=FREQUENCY({1,7,12,16,23}, {10,20,5})", [[1.0], [2.0], [1.0], [1.0]], LIKE_WORKBOOK.format("FREQUENCY")),
    ("=PROB({0,1,2,3}, {0.2,0.3,0.1,0.4}, 2)", 0.1, MS.format("PROB")),
    ("=PROB({0,1,2,3}, {0.2,0.3,0.1,0.4}, 1, 3)", 0.8, MS.format("PROB")),
    ("=PROB({0,1,2,3}, {0.2,0.3,0.1,0.3}, 1)", NUM, MS.format("PROB")),  # the probabilities add to 0.9
    ("=PROB({0,1,2,3}, {0.2,0.3,0.5}, 1)", NA, MS.format("PROB")),
    ("=PROB({1,2}, {0.5,0.5}, 3, 2)", 0.0, LIKE_WORKBOOK.format("PROB")),  # limits the wrong way round
    ("=PERMUTATIONA(3, 2)", 9.0, MS.format("PERMUTATIONA")),
    ("=PERMUTATIONA(2, 2)", 4.0, MS.format("PERMUTATIONA")),
    ("=PERMUTATIONA(12.7, 4.6)", 20736.0, WORKBOOK.format("PERMUT_PERMUTATIONA")),
    ("=PERMUTATIONA(-1, 2)", NUM, WORKBOOK.format("PERMUT_PERMUTATIONA")),
    # fits
    ("=LINEST({1,9,5,7}, {0,4,2,3})", [[2.0, 1.0]], MS.format("LINEST")),
    (f"=LOGEST({LOGEST_Y}, {LOGEST_X})", [[1.463275628, 495.3047702]], MS.format("LOGEST")),
    (f"=GROWTH({LOGEST_Y}, {LOGEST_X}, {{17,18}})", [[320196.7184, 468536.0542]], MS.format("GROWTH")),
    (f"=GROWTH({LOGEST_Y}, {LOGEST_X})", [[32618.20377, 47729.42261, 69841.30086, 102197.0734, 149542.4867,
                                           218821.8762]], MS.format("GROWTH")),
    (f"=TREND({COSTS}, {MONTHS}, {{13,14,15,16,17}})",
     [[146171.5152, 147189.6970, 148207.8788, 149226.0606, 150244.2424]], MS.format("TREND")),
    (f"=INDEX(TREND({COSTS}, {MONTHS}), 1)", 133953.3333, MS.format("TREND")),
    ("=TREND({0.2;0.31;0.4;0.51;0.7})", [[0.184], [0.304], [0.424], [0.544], [0.664]], WORKBOOK.format("TREND_GROWTH")),
    ("=TREND({1;2;3}, {1;2})", REF, WORKBOOK.format("TREND_GROWTH")),
    ('=GROWTH({1;2;"x"})', VALUE, WORKBOOK.format("TREND_GROWTH")),
    ("=LOGEST({1;-2;3})", NUM, RULE.format("LOGEST")),
    ("=FORECAST(30, {6,7,9,15,21}, {20,28,31,38,40})", 10.607253, MS.format("FORECAST")),
    ("=FORECAST.LINEAR(30, {6,7,9,15,21}, {20,28,31,38,40})", 10.607253, MS.format("FORECAST.LINEAR")),
    ("=FORECAST(1, {1,2}, {3,3})", DIV0, RULE.format("FORECAST")),  # the x's do not vary
    # tests
    (f"=T.TEST({TTEST_1}, {TTEST_2}, 2, 1)", 0.196016, MS.format("T.TEST")),
    (f"=TTEST({TTEST_1}, {TTEST_2}, 2, 1)", 0.196016, MS.format("TTEST")),
    (f"=T.TEST({TTEST_1}, {TTEST_2}, 3, 1)", NUM, RULE.format("T.TEST")),  # tails 1 or 2
    (f"=Z.TEST({ZTEST_DATA}, 4)", 0.090574, MS.format("Z.TEST")),
    (f"=2 * MIN(Z.TEST({ZTEST_DATA}, 4), 1 - Z.TEST({ZTEST_DATA}, 4))", 0.181148, MS.format("Z.TEST")),
    (f"=Z.TEST({ZTEST_DATA}, 6)", 0.863043, MS.format("Z.TEST")),
    (f"=ZTEST({ZTEST_DATA}, 4)", 0.090574, MS.format("ZTEST")),
    (f"=F.TEST({FTEST_1}, {FTEST_2})", 0.64831785, MS.format("F.TEST")),
    (f"=FTEST({FTEST_1}, {FTEST_2})", 0.64831785, MS.format("FTEST")),
    ("=F.TEST({1,2,3,4}, {5,6,7,2.4})", 0.5023992107800741, WORKBOOK.format("F_TEST")),
    (f"=CHISQ.TEST({CHI_ACTUAL}, {CHI_EXPECTED})", 0.0003082, MS.format("CHISQ.TEST")),
    (f"=CHITEST({CHI_ACTUAL}, {CHI_EXPECTED})", 0.0003082, MS.format("CHITEST")),
    ("=CHISQ.TEST({1;2;3;4}, {3;4;2;3})", 0.3666353840752714, WORKBOOK.format("CHISQ_TEST")),
    ("=CHISQ.TEST({1,2}, {1;2})", NA, RULE.format("CHISQ.TEST")),
    ("=STANDARDIZE(42, 40, 1.5)", 1.33333333, MS.format("STANDARDIZE")),
    ("=STANDARDIZE(1, 0, 0)", NUM, RULE.format("STANDARDIZE")),
    # Student's t
    ("=T.DIST(60, 1, TRUE)", 0.99469533, MS.format("T.DIST")),
    ("=T.DIST(8, 3, FALSE)", 0.00073691, MS.format("T.DIST")),
    ("=T.DIST.2T(1.959999998, 60)", 0.054645, MS.format("T.DIST.2T")),
    ("=T.DIST.RT(1.959999998, 60)", 0.027322, MS.format("T.DIST.RT")),
    ("=T.DIST.RT(-2, 5.2)", 0.9490302605850708, WORKBOOK.format("T_DIST")),  # negative x allowed
    ("=T.DIST.2T(-2, 5.2)", NUM, WORKBOOK.format("T_DIST")),
    ("=TDIST(1.959999998, 60, 2)", 0.054644930, MS.format("TDIST")),
    ("=T.INV(0.75, 2)", 0.8164966, MS.format("T.INV")),
    ("=T.INV.2T(0.546449, 60)", 0.606533, MS.format("T.INV.2T")),
    ("=TINV(0.05464, 60)", 1.96, MS.format("TINV")),
    # chi-square
    ("=CHISQ.DIST(0.5, 1, TRUE)", 0.52049988, MS.format("CHISQ.DIST")),
    ("=CHISQ.DIST(2, 3, FALSE)", 0.20755375, MS.format("CHISQ.DIST")),
    ("=CHISQ.DIST.RT(18.307, 10)", 0.0500006, MS.format("CHISQ.DIST.RT")),
    ("=CHIDIST(18.307, 10)", 0.050001, MS.format("CHIDIST")),
    ("=CHISQ.INV(0.93, 1)", 3.283020287, MS.format("CHISQ.INV")),
    ("=CHISQ.INV(0.6, 2)", 1.832581464, MS.format("CHISQ.INV")),
    ("=CHISQ.INV.RT(0.050001, 10)", 18.306973, MS.format("CHISQ.INV.RT")),
    ("=CHIINV(0.050001, 10)", 18.306973, MS.format("CHIINV")),
    ("=CHISQ.DIST(-1, 2, TRUE)", NUM, RULE.format("CHISQ.DIST")),
    # F
    ("=F.DIST(15.2069, 6, 4, TRUE)", 0.99, MS.format("F.DIST")),
    ("=F.DIST(15.2069, 6, 4, FALSE)", 0.0012238, MS.format("F.DIST")),
    ("=F.DIST.RT(15.2068649, 6, 4)", 0.01, MS.format("F.DIST.RT")),
    ("=FDIST(15.2068649, 6, 4)", 0.01, MS.format("FDIST")),
    ("=F.INV(0.01, 6, 4)", 0.10930991, MS.format("F.INV")),
    ("=F.INV.RT(0.01, 6, 4)", 15.206865, MS.format("F.INV.RT")),
    ("=FINV(0.01, 6, 4)", 15.206865, MS.format("FINV")),
    ("=F.DIST(1, 0, 4, TRUE)", NUM, RULE.format("F.DIST")),  # degrees of freedom below 1
]


def _digits(expected: float) -> float:
    """The tolerance of a value printed to its digits: half a unit of its last printed digit."""
    text = repr(expected)
    if "e" in text or "." not in text:
        return 1e-9 * max(1.0, abs(expected))
    return 0.5 * 10.0 ** -len(text.split(".")[1])


def _close(got, expected) -> bool:
    if type(expected) is str:
        return type(got) is CellError and got.code == expected
    if type(expected) is list:
        return type(got) is np.ndarray and got.shape == np.shape(expected) and all(
            _close(g, e) for g, e in zip(got.ravel(), np.ravel(expected)))
    return type(got) is float and math.isclose(got, expected, rel_tol=1e-9, abs_tol=_digits(expected))


@pytest.mark.parametrize("formula, expected, source", CASES)
def test_statistics(formula, expected, source):
    assert _close(compute(formula), expected), (formula, compute(formula), source)


def test_linest_statistics_block():
    # reference workbook LINEST_LOGEST (Excel's values): the five rows, #N/A past two columns
    got = compute("=LINEST({0.2;0.41;0.62;0.8;1.1}, {1.1;1.9;3.1;4.05;5}, , TRUE)")
    assert got.shape == (5, 2)
    excel = [0.21928887993553592, -0.03844530620467368, 0.013841437712295469, 0.04625298202423793,
             0.9881888982191901, 0.04361261091452368, 250.99831918087844, 3.0, 0.47741382050765524,
             0.00570617949234489]
    assert all(math.isclose(g, e, rel_tol=1e-12) for g, e in zip(got.ravel(), excel))
    wide = compute("=LINEST({1;2;4;3;5}, {1,0;2,1;3,0;4,1;5,1}, TRUE, TRUE)")
    assert wide.shape == (5, 3) and all(wide[i, 2].code == NA for i in (2, 3, 4))


def test_linest_without_constant_and_with_collinear_x():
    # rule on Microsoft's LINEST page: const FALSE gives b = 0 and seb #N/A; the Open XML notes
    # (MS-OI29500, LINEST): a collinear x is left out with m = 0 and se = 0, and df counts the rest
    got = compute("=LINEST({1;2;4;3}, {1;2;3;4}, FALSE, TRUE)")
    assert got[0, 1] == 0.0 and got[1, 1].code == NA and got[3, 1] == 3.0
    twice = compute("=LINEST({1;2;4;3}, {1,2;2,4;3,6;4,8}, TRUE, TRUE)")
    assert twice[0, 0] == 0.0 and twice[1, 0] == 0.0 and twice[3, 1] == 2.0
    assert math.isclose(twice[0, 1], compute("=SLOPE({1;2;4;3}, {1;2;3;4})"), rel_tol=1e-12)


def test_array_parameters_in_a_legacy_formula(tmp_path):
    # rule of Excel's array-class parameters (see formula.evaluate.builtin): in a plain formula an
    # expression written there is evaluated as an array, with no Ctrl+Shift+Enter
    cells = {"A1": 1.0, "A2": 2.0, "A3": 4.0, "B1": 1.0, "B2": 2.0, "B3": 3.0,
             "C1": "=FORECAST(4, A1:A3*2, B1:B3)", "C2": "=PERCENTILE.INC(A1:A3*2, 0.5)",
             "C3": "=T.TEST(A1:A3*2, B1:B3, 2, 2)", "C4": "=INDEX(FREQUENCY(A1:A3+0, B1:B3), 3)"}
    path = one_sheet(tmp_path, cells)
    cli(str(path), "--in-place")
    ws = values(path)
    assert math.isclose(ws["C1"].value, 2 * compute("=FORECAST(4, {1,2,4}, {1,2,3})"), rel_tol=1e-12)
    assert ws["C2"].value == 4.0 and ws["C4"].value == 0.0
    assert math.isclose(ws["C3"].value, compute("=T.TEST({2,4,8}, {1,2,3}, 2, 2)"), rel_tol=1e-12)
