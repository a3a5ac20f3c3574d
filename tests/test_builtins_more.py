"""The built-ins of fn_sums, fn_distributions_more, fn_workdays, fn_value_text, fn_trimrange and
fn_hyperlink: MULTINOMIAL, SERIESSUM, SUMX2MY2, SUMX2PY2, SUMXMY2, HYPGEOM.DIST, HYPGEOMDIST,
WEIBULL.DIST, WEIBULL, SKEW.P, WORKDAY, WORKDAY.INTL, NETWORKDAYS, NETWORKDAYS.INTL, DATEDIF,
ARRAYTOTEXT, VALUETOTEXT, DOLLAR, FIXED, TRIMRANGE and HYPERLINK.

Each case names its source: "MS NAME" is an example of Microsoft Support's NAME function page
(from memory of that page; a text date of the page is written here as yyyy-mm-dd), "MS NAME:
<rule>" a case of a rule that page states, "workbook
NAME" a value Excel stored in that reference workbook of ../shared/excel-reference, and the
workbooks themselves are scored at the end (skipped when the folder is absent, a failure under
CI=true).
"""

from __future__ import annotations

import math

import pytest

from cellfuncs.formula import compute
from cellfuncs.formula.dates import date_system
from cellfuncs.workbook import conformance
from test_recalc import cli, one_sheet, values
from test_tables import _reference

NUMBERS = [
    ("=MULTINOMIAL(2, 3, 4)", 1260.0, "MS MULTINOMIAL"),
    ("=MULTINOMIAL({2,5,7})", 72072.0, "workbook MULTINOMIAL"),
    ("=MULTINOMIAL(1.7, 1.2, 3.4, 2.3)", 420.0, "workbook MULTINOMIAL: each number truncated"),
    ("=SUMX2MY2({2,3,9,1,8,7,5}, {6,5,11,7,5,4,4})", -55.0, "MS SUMX2MY2"),
    ("=SUMX2PY2({2,3,9,1,8,7,5}, {6,5,11,7,5,4,4})", 521.0, "MS SUMX2PY2"),
    ("=SUMXMY2({2,3,9,1,8,7,5}, {6,5,11,7,5,4,4})", 79.0, "MS SUMXMY2"),
    ("=SUMX2MY2({1;3;3}, {1,2,3})", 5.0, "workbook SUMX2MY2_SUMX2PY2_SUMXMY2: shapes may differ"),
    ('=SUMXMY2({1,"a",3}, {2,5,TRUE})', 1.0, "MS SUMXMY2: a pair with text or a logical value is skipped"),
    ("=SERIESSUM(PI()/4, 0, 2, {1,-0.5,0.041666667,-0.001388889})", 0.707103215, "MS SERIESSUM"),
    ("=SERIESSUM(0.5, 1, 2, {2,2,2})", 1.3125, "workbook SERIESSUM"),
    ("=SERIESSUM(-1, 0, 2, {1,2,3})", 6.0, "workbook SERIESSUM"),
    ("=HYPGEOM.DIST(1, 4, 8, 20, TRUE)", 0.4654, "MS HYPGEOM.DIST"),
    ("=HYPGEOM.DIST(1, 4, 8, 20, FALSE)", 0.3633, "MS HYPGEOM.DIST"),
    ("=HYPGEOM.DIST(1.8, 4.2, 8.2, 22, TRUE)", 0.5349282296650714, "workbook HYPERGEOM_DIST"),
    ("=HYPGEOM.DIST(1.8, 4.2, 8.2, 18.34, FALSE)", 0.31372549019607815, "workbook HYPERGEOM_DIST"),
    ("=HYPGEOMDIST(1, 4, 8, 20)", 0.363261, "MS HYPGEOMDIST"),
    ("=WEIBULL.DIST(105, 20, 100, TRUE)", 0.929581, "MS WEIBULL.DIST"),
    ("=WEIBULL.DIST(105, 20, 100, FALSE)", 0.035589, "MS WEIBULL.DIST"),
    ("=WEIBULL(105, 20, 100, TRUE)", 0.929581, "MS WEIBULL"),
    ("=WEIBULL.DIST(0.8, 1, 9, TRUE)", 0.08505277126996899, "workbook WEIBULL_DIST"),
    ("=WEIBULL.DIST(0.4, 1, 9, FALSE)", 0.10628097101144768, "workbook WEIBULL_DIST"),
    ("=SKEW.P({3,4,5,2,3,4,5,6,4,7})", 0.303193, "MS SKEW.P"),
    ("=WORKDAY(DATE(2008,10,1), 151)", 39933.0, "MS WORKDAY"),
    ('=WORKDAY(DATE(2008,10,1), 151, {"2008-11-26","2008-12-04","2009-01-21"})', 39938.0, "MS WORKDAY"),
    ("=WORKDAY(DATE(2011,2,1), 5)", 40582.0, "workbook 50755_workday_formula_example"),
    ("=WORKDAY.INTL(DATE(2012,1,1), 90, 11)", 41013.0, "MS WORKDAY.INTL"),
    ("=WORKDAY.INTL(DATE(2012,1,1), 30, 17)", 40944.0, "MS WORKDAY.INTL"),
    ("=WORKDAY(DATE(2024,1,8), -5)", 45292.0, "MS WORKDAY: negative days count back"),
    ("=NETWORKDAYS(DATE(2012,10,1), DATE(2013,3,1))", 110.0, "MS NETWORKDAYS"),
    ("=NETWORKDAYS(DATE(2012,10,1), DATE(2013,3,1), DATE(2012,11,22))", 109.0, "MS NETWORKDAYS"),
    ('=NETWORKDAYS(DATE(2012,10,1), DATE(2013,3,1), {"2012-11-22","2012-12-04","2013-01-21"})', 107.0, "MS NETWORKDAYS"),
    ("=NETWORKDAYS.INTL(DATE(2006,1,1), DATE(2006,1,31))", 22.0, "MS NETWORKDAYS.INTL"),
    ("=NETWORKDAYS.INTL(DATE(2006,2,28), DATE(2006,1,31))", -21.0, "MS NETWORKDAYS.INTL"),
    ('=NETWORKDAYS.INTL(DATE(2006,1,1), DATE(2006,2,1), 7, {"2006-01-02","2006-01-16"})', 22.0, "MS NETWORKDAYS.INTL"),
    ('=NETWORKDAYS.INTL(DATE(2006,1,1), DATE(2006,2,1), "0010001", {"2006-01-02","2006-01-16"})', 20.0,
     "MS NETWORKDAYS.INTL"),
    ('=NETWORKDAYS.INTL(DATE(2006,1,1), DATE(2006,2,1), "1111111")', 0.0, "MS NETWORKDAYS.INTL: 1111111 gives 0"),
    ('=DATEDIF("2001-01-01", "2003-01-01", "Y")', 2.0, "MS DATEDIF"),
    ('=DATEDIF("2001-06-01", "2002-08-15", "D")', 440.0, "MS DATEDIF"),
    ('=DATEDIF("2001-06-01", "2002-08-15", "YD")', 75.0, "MS DATEDIF"),
    ('=DATEDIF("2001-06-01", "2002-08-15", "MD")', 14.0, "MS DATEDIF"),
    ('=DATEDIF(DATE(2011,1,1), DATE(2011,12,31), "M")', 11.0, "workbook DATEDIF"),
    ('=DATEDIF(DATE(2011,1,1), DATE(2011,12,31), "md")', 30.0, "workbook DATEDIF (the unit in any case)"),
    ('=DATEDIF(DATE(2011,1,1), DATE(2011,12,31), "YM")', 11.0, "workbook DATEDIF"),
]


@pytest.mark.parametrize("formula, expected, source", NUMBERS)
def test_numbers(formula, expected, source):
    got = compute(formula)
    tolerance = 1e-9 if source.startswith("workbook") else 2e-4  # Microsoft's pages round their results
    assert isinstance(got, float) and math.isclose(got, expected, rel_tol=tolerance), (got, source)


TEXTS = [
    ("=DOLLAR(1234.567, 2)", "$1,234.57", "MS DOLLAR"),
    ("=DOLLAR(1234.567, -2)", "$1,200", "MS DOLLAR"),
    ("=DOLLAR(-1234.567, -2)", "($1,200)", "MS DOLLAR"),
    ("=DOLLAR(-0.123, 4)", "($0.1230)", "MS DOLLAR"),
    ("=DOLLAR(99.888)", "$99.89", "MS DOLLAR"),
    ("=DOLLAR(0)", "$0.00", "workbook FormulaEvalTestData_Copy"),
    ("=FIXED(1234.567, 1)", "1,234.6", "MS FIXED"),
    ("=FIXED(1234.567, -1)", "1,230", "MS FIXED"),
    ("=FIXED(-1234.567, -1, TRUE)", "-1230", "MS FIXED"),
    ("=FIXED(44.332)", "44.33", "MS FIXED"),
    ('=VALUETOTEXT("Hello")', "Hello", "MS VALUETOTEXT"),
    ('=VALUETOTEXT("Hello", 1)', '"Hello"', "MS VALUETOTEXT"),
    ("=VALUETOTEXT(1234.01234)", "1234.01234", "MS VALUETOTEXT"),
    ("=VALUETOTEXT(TRUE)", "TRUE", "workbook TEXT_T_VALUE_VALUETOTEXT"),
    ("=VALUETOTEXT(1/0)", "#DIV/0!", "workbook TEXT_T_VALUE_VALUETOTEXT: an error as its text"),
    ("=VALUETOTEXT(0.000000007123456)", "0.000000007123456", "workbook TEXT_T_VALUE_VALUETOTEXT"),
    ('=ARRAYTOTEXT({TRUE,"Seattle";1234.01234,"Hello"})', "TRUE, Seattle, 1234.01234, Hello", "MS ARRAYTOTEXT"),
    ('=ARRAYTOTEXT({TRUE,"Seattle";1234.01234,"Hello"}, 1)', '{TRUE,"Seattle";1234.01234,"Hello"}', "MS ARRAYTOTEXT"),
    ('=HYPERLINK("http://example.microsoft.com/report/budget report.xlsx", "Click for report")', "Click for report",
     "MS HYPERLINK"),
    ('=HYPERLINK("http://poi.apache.org")', "http://poi.apache.org", "workbook FormulaEvalTestData_Copy"),
]


@pytest.mark.parametrize("formula, expected, source", TEXTS)
def test_texts(formula, expected, source):
    assert compute(formula) == expected, source


ERRORS = [
    ("=MULTINOMIAL(-1, 2, 3)", "#NUM!", "workbook MULTINOMIAL"),
    ("=MULTINOMIAL({TRUE,1,2})", "#VALUE!", "workbook MULTINOMIAL"),
    ("=MULTINOMIAL(TRUE, 1, 2)", "#VALUE!", "workbook MULTINOMIAL"),
    ("=SUMX2MY2({1,2}, {1,2,3})", "#N/A", "MS SUMX2MY2: arrays of different sizes"),
    ('=SUMX2PY2({"a"}, {1})', "#DIV/0!", "workbook FormulaEvalTestData_Copy: no pair of numbers"),
    ("=SERIESSUM(0, 0, 2, {1,2,3})", "#NUM!", "workbook SERIESSUM"),
    ("=SERIESSUM(TRUE, 0, 1, {1,2})", "#VALUE!", "workbook SERIESSUM"),
    ("=HYPGEOM.DIST(5, 4, 8, 20, TRUE)", "#NUM!", "MS HYPGEOM.DIST: more successes than draws"),
    ("=WEIBULL.DIST(-1, 20, 100, TRUE)", "#NUM!", "MS WEIBULL.DIST"),
    ("=WEIBULL.DIST(1, 0, 100, TRUE)", "#NUM!", "MS WEIBULL.DIST"),
    ("=SKEW.P({1,1,1})", "#DIV/0!", "MS SKEW.P: no deviation"),
    ("=WORKDAY.INTL(DATE(2012,1,1), 30, 0)", "#NUM!", "MS WORKDAY.INTL"),
    ('=WORKDAY.INTL(DATE(2012,1,1), 30, "1111111")', "#VALUE!", "MS WORKDAY.INTL"),
    ('=WORKDAY.INTL(DATE(2012,1,1), 30, "011")', "#VALUE!", "MS WORKDAY.INTL"),
    ("=WORKDAY(DATE(9999,12,30), 5)", "#NUM!", "MS WORKDAY: past the last date"),
    ('=WORKDAY("soon", 5)', "#VALUE!", "MS WORKDAY: not a date"),
    ('=DATEDIF(DATE(2012,1,1), DATE(2011,1,1), "D")', "#NUM!", "MS DATEDIF: start after end"),
    ('=DATEDIF(DATE(2011,1,1), DATE(2012,1,1), "W")', "#NUM!", "MS DATEDIF: no such unit"),
    ("=VALUETOTEXT(1, 2)", "#VALUE!", "MS VALUETOTEXT: format 0 or 1"),
    ("=ARRAYTOTEXT({1,2}, 3)", "#VALUE!", "MS ARRAYTOTEXT: format 0 or 1"),
    ("=FIXED(1, 128)", "#VALUE!", "MS FIXED: at most 127 decimals"),
    ('=DOLLAR("x")', "#VALUE!", "workbook FormulaEvalTestData_Copy"),
    ('=HYPERLINK("x", 1/0)', "#DIV/0!", "MS HYPERLINK: an error in the friendly name shows"),
]


@pytest.mark.parametrize("formula, code, source", ERRORS)
def test_errors(formula, code, source):
    got = compute(formula)
    assert getattr(got, "code", None) == code, (got, source)


def test_multinomial_of_a_sum_beyond_the_largest_factorial_is_num_error():
    # engine contract: 171! is beyond the largest double, as for FACT
    assert compute("=MULTINOMIAL(100, 71)").code == "#NUM!" and compute("=MULTINOMIAL(100, 70)") > 1e48


def test_working_days_follow_the_1904_date_system():
    # 1 February 2011 (a Tuesday) and five working days later, 8 February, are 1,462 days
    # fewer in the 1904 system (Microsoft Support, "Date systems in Excel")
    with date_system(True):
        assert compute("=WORKDAY(DATE(2011,2,1), 5)") == 40582.0 - 1462
        assert compute("=NETWORKDAYS(DATE(2011,2,1), DATE(2011,2,8))") == 6.0


def test_trimrange_references_in_a_workbook(tmp_path):
    # MS TRIMRANGE: the blank rows and columns at the edges are left out; trim_rows and
    # trim_cols 0 keep them, 1 trims the leading ones, 2 the trailing ones
    cells = {"B3": 1.0, "C5": 2.0, "B9": 3.0, "E1": "=ROWS(TRIMRANGE(A1:D20))", "E2": "=COLUMNS(TRIMRANGE(A1:D20))",
             "E3": "=SUM(TRIMRANGE(B:B))", "E4": "=ROWS(TRIMRANGE(A1:D20, 1, 0))", "E5": "=ROWS(TRIMRANGE(A1:D20, 2))",
             "E6": "=ROW(TRIMRANGE(A1:D20))", "E7": "=ISREF(TRIMRANGE(A1:D20))", "E8": "=ROWS(TRIMRANGE(F1:G5))"}
    path = one_sheet(tmp_path, cells)
    cli(str(path), "--in-place")
    ws = values(path)
    assert [ws[f"E{r}"].value for r in range(1, 8)] == [7, 2, 4, 18, 9, 3, True]
    assert ws["E8"].value == "#REF!"  # engine contract: nothing left of an empty range


def test_hyperlink_of_a_blank_cell_shows_zero(tmp_path):
    # workbook link_test: a friendly name that is a blank cell shows 0
    path = one_sheet(tmp_path, {"A1": '=HYPERLINK("https://"&B1, B1)'})
    cli(str(path), "--in-place")
    assert values(path)["A1"].value == 0


@pytest.mark.parametrize("name", [
    "ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_MULTINOMIAL.xlsx",
    "ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_SUMX2MY2_SUMX2PY2_SUMXMY2.xlsx",
    "ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_SERIESSUM.xlsx",
    "ironcalc/xlsx_tests_calc_tests_STATISTICAL_HYPERGEOM_DIST.xlsx",
    "ironcalc/xlsx_tests_calc_tests_STATISTICAL_WEIBULL_DIST.xlsx",
    "ironcalc/xlsx_tests_calc_tests_STATISTICAL_MEADIAN_KURT_SKEW_HARMEAN.xlsx",
    "ironcalc/xlsx_tests_calc_tests_TEXT_ARRAYTOTEXT.xlsx",
    "ironcalc/xlsx_tests_calc_tests_TEXT_DOLLARs.xlsx",
    "ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_TRIMRANGE.xlsx",
    "ironcalc/xlsx_tests_link_test.xlsx",
    "poi/test-data_spreadsheet_50755_workday_formula_example.xlsx",
    "poi/test-data_spreadsheet_59106.xlsx",
    "xlcalculator/xlcalculator__tests_resources_DATEDIF.xlsx",
])
def test_reference_workbooks(name):
    score = conformance.score_workbook(_reference(name), name.split("/")[0])
    assert not score.failed, score.failed[:5]


def test_valuetotext_cells_of_the_reference_workbook():
    # the sheet's other failures are VALUE's reading of en-GB texts ("23€", day-first dates)
    name = "ironcalc/xlsx_tests_calc_tests_TEXT_T_VALUE_VALUETOTEXT.xlsx"
    score = conformance.score_workbook(_reference(name), "ironcalc")
    assert {f[0] for f in score.failed} <= {"Sheet1!I3", "Sheet1!I5", "Sheet1!C9", "Sheet1!C15"}, score.failed[:5]
