"""Rules by which built-ins follow Excel where they once did not, each check with its source.

"Stored" names the workbook of the Excel reference folder (``shared/excel-reference``) whose
cached values show the rule (the sheets are scored in full by tests/test_conformance.py);
"Microsoft" a page of Microsoft's function reference; "from memory" what was recalled of it.
The checks compute formulas without a workbook, so they run where the folder is absent.
"""

from __future__ import annotations

import math

import pytest

from cellfuncs.errors import CellError
from cellfuncs.formula import SimpleContext, compute
from cellfuncs.formula.arrays import object_array

CASES = [
    # COUNTIF: "<>" matches every cell that is not empty, empty text included
    # (stored: ironcalc STATISTICAL_COUNTIF, Columns!E28 counts the two cells holding ="").
    ('=COUNTIF({1,"",#N/A,"a"}, "<>")', 4.0),
    ('=COUNTIF({1,"",#N/A,"a"}, "")', 1.0),
    # XLOOKUP/XMATCH, next smaller or larger: other types count, numbers < text < FALSE < TRUE
    # (stored: ironcalc LOOKUP_AND_REFERENCE_XLOOKUP, ReturnSmaller!E13 and ReturnLarger!E8).
    ('=XLOOKUP(FALSE, {2,5,TRUE,"ala"}, {"a","b","f","g"}, , -1)', "g"),
    ('=XLOOKUP(10, {2,5,TRUE,"ala"}, {"a","b","f","g"}, , 1)', "g"),
    # binary search: exact finds the first of equal keys, next smaller the last of the smaller
    # ones; -2 searches data sorted down (stored: XLOOKUP, MultipleElements!E6, E8, M4).
    ("=XLOOKUP(7, {5,6,7,7,7,8}, {1,2,3,4,5,6}, , 0, 2)", 3.0),
    ("=XLOOKUP(7.1, {5,6,7,7,7,8}, {1,2,3,4,5,6}, , -1, 2)", 5.0),
    ("=XLOOKUP(5, {9,7,5,5,5,2}, {1,2,3,4,5,6}, , 0, -2)", 5.0),
    # the halving looks at whatever type lies in the middle (stored: poi xlookup.xlsx, Sheet2!F2)
    ('=XLOOKUP(46523, {9700;"xyz";"xyz";160726;204100;510300}, {0.1;0.22;0.24;0.32;0.35;0.37}, 0, 1, 2)', 0.22),
    # match mode 3: a regular expression, as REGEXTEST (Microsoft, XMATCH; stored: XMATCH, D6 and D7)
    ('=XMATCH("[A-Z][a-z]+y", {"Albania";"Germany";"Italy"}, 3)', 2.0),
    ('=XMATCH("[A-Z][a-z]+y", {"Albania";"Germany";"Italy"}, 3, -1)', 3.0),
    # SUMIF/COUNTIF with an array of criteria: one result per criterion (stored: ironcalc
    # MATH_AND_TRIGONOMETRY_SUMIF_array, G18 and G28)
    ("=SUM(SUMIF({1,2,1}, {1;2}, {10,20,30}))", 60.0),
    ('=SUM(COUNTIF({1,5,9}, {">0",">4"}))', 5.0),
    # database functions: a field name written as a number or logical value reads as text;
    # a numeric field argument counts columns (stored: ironcalc DATABASE_DCOUNT_DCOUNTA_DGET_DPRODUCT,
    # DCOUNT_DCOUNTA!B56 to B67)
    ('=DSUM({"a",TRUE;1,5;2,7}, "true", {TRUE;">5"})', 7.0),
    ('=DSUM({"a",1;1,5;2,7}, "1", {1;5})', 5.0),
    ('=DCOUNT({"a",TRUE;1,5;2,7}, TRUE, {"a";">0"})', 2.0),
    # MIRR: no inflows give -1 (stored: ironcalc FINANCIAL_MIRR, 'Two Parameters'!E7); a finance
    # rate of -1 leaves the first flow undiscounted (E5); a negative ratio is #NUM! ('Three parameters'!F31)
    ("=MIRR({-5,-3}, 0.1, 0.2)", -1.0),
    ("=MIRR({-5,4}, -1, 0.2)", -0.2),
    # IRR finds the root above -1 where Newton's method from 0.1 leaves the domain
    # (stored: ironcalc FINANCIAL_IRR, General!L8 and 'Two Values'!C6)
    ("=IRR({-70,12,15})", -0.44350694133432755),
    ("=IRR({-5,1})", -0.8),
    # CUMPRINC at a high rate keeps the digits pmt - ipmt loses (stored: ironcalc
    # FINANCIAL_CUMPRINC_CUMIPMT, H5: Excel's value is the exact one)
    ("=CUMPRINC(0.7, 36, 8000, 2, 10, 1)", -0.0047565423422487076),
    # DB drops the fraction of the months (stored: ironcalc FINANCIAL_DB_DDB, G10)
    ("=DB(100, 10, 4, 3, 9.2222)", 16.5293754),
    # IPMT and PPMT take a period up to, not including, nper + 1 (stored: FINANCIAL_IPMT_PPMT, G17)
    ("=IPMT(0.1, 3.9, 3, 8000, 10, 1)", -26.866364667656377),
    # TAN, SIN, COS reduce the angle with the x87's 64-bit pi (stored: ironcalc docs_TAN, B8 and B2;
    # SIN(PI()) is 1.22514845490862E-16 from memory of Excel)
    ("=TAN(PI()/2)", 1.6324552277619072e16),
    ("=TAN(-3*PI()/2)", -5441517425873024.0),
    ("=SIN(PI())", 1.22514845490862e-16),
    ("=SEC(PI()/2 - 0.000000000001)", 999849864538.9548),
    # CSCH and SECH of huge numbers are 0 (stored: MATH_AND_TRIGONOMETRY_TRIGONOMETRIC, COTH_CSCH_SECH!C7, D7)
    ("=CSCH(9999999999999)", 0.0),
    ("=SECH(-9999999999999)", 0.0),
    # RIGHT of more characters than the text holds is the whole text (stored: poi
    # FormulaEvalTestData_Copy, EverythingTests!F1168); a blank count is 0 (stored: TEXT_STRING_HANDLING, F22)
    ('=RIGHT("a string", 10)', "a string"),
    ('=LEFT("abc", )', ""),
    # wildcards: "~" makes any next character literal, a last "~" stands for nothing
    # (stored: ironcalc TEXT_FIND_SEARCH, E29 to E31)
    ('=SEARCH("~d", "My dear")', 4.0),
    ('=SEARCH("~", "Hello")', 1.0),
    # the distributions read a cumulative flag written as text (stored: STATISTICAL_NORM_DIST, E48)
    ('=NORM.DIST(42, 40, 1.5, "TRUE")', 0.9087887802741321),
    # bounds Excel holds to (stored: STATISTICAL_BETADIST_BETAINV H69, STATISTICAL_BINOM D25 and
    # NEGBINOM.DIST!E33, STATISTICAL_POISSON D26, FINANCIAL_PMT F24)
    ("=BETA.INV(1, 1, 2)", "#NUM!"),
    ("=BINOM.INV(10, 1, 0.8)", "#NUM!"),
    ("=NEGBINOM.DIST(2, 10, 1, TRUE)", "#NUM!"),
    ("=POISSON.DIST(-0.000001, 5, TRUE)", "#NUM!"),
    ("=PMT(-1, 1, -100)", "#NUM!"),
    # EFFECT and NOMINAL refuse logical values (Microsoft: "if either argument is nonnumeric";
    # stored: FINANCIAL_NOMINAL_EFFECT, C20)
    ("=EFFECT(10, TRUE)", "#VALUE!"),
    # MODE refuses typed text, numeric text too (stored: poi FormulaEvalTestData_Copy, H936, K936)
    ('=MODE(1, "1", 2, 3)', "#VALUE!"),
    ('=MODE("1", 1, #DIV/0!, 2, 3)', "#VALUE!"),
    # IFERROR pairs arrays of different sizes, padding with #N/A (stored: LOGICAL_IFERROR, C49)
    ("=INDEX(IFERROR({1;0;0;0}/{1;0;1;0}, {5;6}), 4)", "#N/A"),
    ("=INDEX(IFERROR({1;0;0;0}/{1;0;1;0}, {5;6}), 2)", 6.0),
    # and IF likewise (stored: LOGICAL_IF_ARRAY, E8)
    ("=INDEX(IF({TRUE,FALSE}, {1,2,3,4}, {10,11,12,13}), 1, 2)", 11.0),
    ("=INDEX(IF({TRUE,FALSE}, {1,2,3,4}, {10,11,12,13}), 1, 3)", "#N/A"),
    # AND, OR and XOR pass over typed empty text (stored: LOGICAL_AND_OR_XOR, C52 to E53)
    ('=AND("", TRUE)', True),
    ('=OR("", FALSE)', False),
]


@pytest.mark.parametrize(("formula", "expected"), CASES)
def test_rule(formula: str, expected: object) -> None:
    got = compute(formula)
    if type(expected) is float:
        assert got == pytest.approx(expected, rel=1e-12, abs=1e-300), formula
    elif type(expected) is str and expected.startswith("#"):
        assert getattr(got, "code", got) == expected, formula
    else:
        assert got == expected, formula


def test_sumif_spills_one_result_per_criterion() -> None:
    """The brief's case (stored: MATH_AND_TRIGONOMETRY_SUMIF_array): a column of criteria
    gives a column of sums."""
    assert compute("=SUMIF({1,2,1},{1;2},{10,20,30})").tolist() == [[40.0], [20.0]]


def test_irr_guess_is_one_value() -> None:
    """A guess of -1 or below is #VALUE!, and so is referenced text; TRUE reads as 1
    (stored: FINANCIAL_IRR, General!N3, N5, N6 and N8)."""
    ctx = SimpleContext(names={"flows": object_array([[-70.0, 12.0, 15.0]]), "text": "Hello", "yes": True})
    assert compute("=IRR(flows, -1)", ctx).code == "#VALUE!"
    assert compute("=IRR(flows, text)", ctx).code == "#VALUE!"
    assert math.isclose(compute("=IRR(flows, yes)", ctx), -0.4435069413349362, rel_tol=1e-9)


def test_dated_flows_pair_by_position() -> None:
    """XIRR reads a blank flow as 0 and text as #VALUE!; XNPV refuses both, and a negative
    rate (stored: FINANCIAL_XIRR, R8, R20, R21, Q13, Q20)."""
    dates = object_array([[45292.0, 45323.0, 45353.0, 45386.0, 45782.0, 46179.0]])
    with_blank = object_array([[-20.0, 5.0, 5.0, None, None, 5.0]])
    with_zero = object_array([[-20.0, 5.0, 5.0, 0.0, 0.0, 5.0]])
    with_text = object_array([[-20.0, 5.0, 5.0, "hello", 0.0, 5.0]])
    ctx = SimpleContext(names={"d": dates, "b": with_blank, "z": with_zero, "t": with_text})
    assert compute("=XIRR(b, d)", ctx) == compute("=XIRR(z, d)", ctx)
    assert math.isclose(compute("=XIRR(z, d)", ctx), -0.2371315099298954, rel_tol=1e-7)
    assert compute("=XIRR(t, d)", ctx).code == "#VALUE!"
    assert compute("=XNPV(1, b, d)", ctx).code == "#NUM!"
    assert compute("=XNPV(-0.3, z, d)", ctx).code == "#NUM!"


@pytest.mark.parametrize("formula", ['=VALUE("1e999")', '="1e999"+0', '=ROUND("1e999",1)', '=ABS("-1e999")'])
def test_text_beyond_a_double_is_no_number(formula):
    # A cell holds doubles only (Excel's largest number is about 1.8e308, common practice); text that
    # parses beyond it is not a number, and no built-in stops the recalculation on it
    got = compute(formula)
    assert isinstance(got, CellError) and got.code == "#VALUE!", got
