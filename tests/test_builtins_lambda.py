"""Functions as values: LAMBDA, LET, ISOMITTED and the helpers MAP, REDUCE, SCAN, BYROW,
BYCOL, MAKEARRAY.

Expected values are the examples of Microsoft's function reference pages ("Microsoft
Support, <NAME> function", from memory of those pages) unless marked otherwise; a defined
name holding a LAMBDA is checked in a small workbook of our own and against the values
Excel stored in the reference workbooks (IronCalc's LOGICAL_LAMBDA, LOGICAL_LET and yearly
calendar sheets), skipped when ../shared/excel-reference is absent (a failure under CI=true).
"""

from __future__ import annotations

import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName

from cellfuncs.errors import CALC, VALUE
from cellfuncs.formula import compute
from cellfuncs.workbook import conformance
from cellfuncs.workbook.authoring import save
from test_recalc import cli, values
from test_tables import _reference

EXAMPLES = [
    ("=LET(x, 1, x+1)", 2.0),  # LET page
    ('=LET(total, 5*4, tax, 0.1, total*(1+tax))', 22.0),
    ("=LAMBDA(x, x+1)(1)", 2.0),  # LAMBDA page
    ("=LAMBDA(temp, (5/9) * (temp-32))(104)", 40.0),  # LAMBDA page: Fahrenheit to Celsius
    ("=LET(hyp, LAMBDA(a, b, SQRT(a^2+b^2)), hyp(3, 4))", 5.0),  # a LET name called as a function
    ("=LAMBDA(x, y, IF(ISOMITTED(y), \"no y\", x+y))(1, )", "no y"),  # ISOMITTED page
    ("=LAMBDA(x, y, IF(ISOMITTED(y), \"no y\", x+y))(1, 2)", 3.0),
    ("=REDUCE(0, {1,2,3,4,5}, LAMBDA(a, b, a+b^2))", 55.0),  # REDUCE page: sum of squares
    ("=LET(f, LAMBDA(x, x*2), LET(x, 10, f(x) + x))", 30.0),  # inner names shadow outer ones
    ("=LET(x, 2, LAMBDA(y, x*y))(5)", 10.0),  # a function keeps the names it was made with
]


@pytest.mark.parametrize("formula, expected", EXAMPLES)
def test_documented_examples(formula, expected):
    assert compute(formula) == pytest.approx(expected) if type(expected) is float else compute(formula) == expected


def test_helpers_over_arrays():
    # MAP, SCAN, BYROW, BYCOL, MAKEARRAY pages (from memory): element-wise, running, per row/column
    assert compute("=MAP({1,2;3,4}, LAMBDA(a, IF(a>2, a*a, a)))").tolist() == [[1, 2], [9, 16]]
    assert compute('=SCAN("", {"a","b","c"}, LAMBDA(t, c, t&c))').tolist() == [["a", "ab", "abc"]]
    assert compute("=SCAN(1, {1,2,3}, LAMBDA(a, b, a*b))").tolist() == [[1, 2, 6]]
    assert compute("=BYROW({1,2;3,4}, LAMBDA(r, MAX(r)))").tolist() == [[2], [4]]
    assert compute("=BYCOL({1,2;3,4}, LAMBDA(c, SUM(c)))").tolist() == [[4, 6]]
    assert compute("=MAKEARRAY(3, 3, LAMBDA(r, c, r*c))").tolist() == [[1, 2, 3], [2, 4, 6], [3, 6, 9]]


def test_misuse_gives_excel_errors():
    assert compute("=LAMBDA(x, x+1)").code == CALC  # a function shown in a cell without a call
    assert compute("=LAMBDA(x, x+1)+1").code == CALC
    assert compute("=LAMBDA(x, x+1)(1, 2)").code == VALUE  # too many arguments
    assert compute("=LAMBDA(x, y, x+y)(1)").code == VALUE  # too few (y is not optional)
    assert compute("=BYROW({1,2;3,4}, LAMBDA(r, r*2))").code == CALC  # no arrays of arrays
    assert compute("=LET(x, 1, y)").code == "#NAME?"
    assert compute("=LET(1, 2, 3)").code == VALUE


def test_a_defined_name_holding_a_lambda_is_called_from_cells(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    ws["A1"], ws["A2"] = 212.0, 32.0
    ws["B1"], ws["B2"] = "=ToCelsius(A1)", "=ToCelsius(A2)+Offset1"
    ws["C1"] = "=LET(r, A1:A2, ROWS(r) + SUM(r))"  # a LET name bound to a reference
    # as Excel writes them: the file prefixes _xlfn. and _xlpm.
    wb.defined_names["ToCelsius"] = DefinedName("ToCelsius", attr_text="_xlfn.LAMBDA(_xlpm.f, (_xlpm.f-32)*5/9)")
    wb.defined_names["Offset1"] = DefinedName("Offset1", attr_text="S!$A$2/32")
    path = tmp_path / "lambda.xlsx"
    save(wb, path)
    assert cli(str(path), "--in-place")[0] == 0
    got = values(path)
    assert got["B1"].value == pytest.approx(100.0) and got["B2"].value == pytest.approx(1.0)
    assert got["C1"].value == 246


@pytest.mark.parametrize("name", [
    "ironcalc/xlsx_tests_calc_tests_LOGICAL_LAMBDA.xlsx",
    "ironcalc/xlsx_tests_calc_tests_LOGICAL_LET.xlsx",
    "ironcalc/xlsx_tests_calc_tests_INFORMATION_ISOMITTED.xlsx",
    "ironcalc/xlsx_tests_templates_yearly_calendar.xlsx",
])
def test_reference_workbooks_of_lambdas(name):
    score = conformance.score_workbook(_reference(name), name.split("/")[0])
    assert not score.failed, score.failed[:5]
