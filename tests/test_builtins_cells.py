"""Built-ins about cells rather than their values: ADDRESS, FORMULATEXT, ISFORMULA, ISREF.

ADDRESS's expected texts are the examples of Microsoft's ADDRESS page (from memory of that
page); the others are checked in a small workbook of our own and against the values Excel
stored in IronCalc's FORMULATEXT and ISREF/ISFORMULA sheets, skipped when
../shared/excel-reference is absent (a failure under CI=true).
"""

from __future__ import annotations

import pytest

from cellfuncs.formula import compute
from cellfuncs.workbook import conformance
from test_recalc import cli, one_sheet, values
from test_tables import _reference


@pytest.mark.parametrize("formula, expected", [
    ("=ADDRESS(2,3)", "$C$2"), ("=ADDRESS(2,3,2)", "C$2"), ("=ADDRESS(2,3,2,FALSE)", "R2C[3]"),
    ('=ADDRESS(2,3,1,FALSE,"[Book1]Sheet1")', "[Book1]Sheet1!R2C3"),
    ('=ADDRESS(2,3,1,FALSE,"EXCEL SHEET")', "'EXCEL SHEET'!R2C3"),
    ("=ADDRESS(1,16384,4)", "XFD1"), ('=ADDRESS(5,1,3,TRUE,"Data")', "Data!$A5"),
])
def test_address_examples(formula, expected):
    assert compute(formula) == expected


def test_address_refuses_cells_off_the_sheet():
    assert compute("=ADDRESS(0,1)").code == "#VALUE!" and compute("=ADDRESS(1,16385)").code == "#VALUE!"
    assert compute("=ADDRESS(1,1,5)").code == "#VALUE!"


def test_formula_text_and_references_in_a_workbook(tmp_path):
    cells = {"A1": 2.0, "A2": "=A1*_xlfn.CONCAT(\"_xlfn.\",1)", "B1": "=FORMULATEXT(A2)", "B2": "=FORMULATEXT(A1)",
             "B3": "=ISFORMULA(A2)", "B4": "=ISFORMULA(A1)", "B5": "=ISREF(A1)", "B6": "=ISREF(1)",
             "B7": "=ISREF(OFFSET(A1,1,0))", "C1": "=FORMULATEXT(C1)", "C2": "=ROW(C2)+ROWS(C1:C3)"}
    path = one_sheet(tmp_path, cells)
    cli(str(path), "--in-place")
    ws = values(path)
    # the prefix of a newer function is left out as Excel's formula bar shows it; a string keeps it
    assert ws["B1"].value == '=A1*CONCAT("_xlfn.",1)' and ws["B2"].value == "#N/A"
    assert [ws[f"B{r}"].value for r in range(3, 8)] == [True, False, True, False, True]
    assert ws["C1"].value == "=FORMULATEXT(C1)" and ws["C2"].value == 5  # neither is a circular reference


@pytest.mark.parametrize("name", [
    "ironcalc/xlsx_tests_calc_tests_INFORMATION_FORMULATEXT.xlsx",
    "ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_ADDRESS.xlsx",
])
def test_reference_workbooks(name):
    score = conformance.score_workbook(_reference(name), name.split("/")[0])
    assert not score.failed, score.failed[:5]


def test_the_spill_operator_needs_a_workbook():
    # tests/test_references.py checks ANCHORARRAY( (the file's spelling of A1#) in workbooks
    assert compute("=SUM(ANCHORARRAY(A1))").code == "#REF!"


def test_the_implicit_intersection_operator(tmp_path):
    # =@A1:A3 (written SINGLE( in the file) in row 2 is A2 (Microsoft Support, "Implicit
    # intersection operator: @", from memory); of an array, its first element
    path = one_sheet(tmp_path, {"A1": 1.0, "A2": 2.0, "A3": 3.0, "B2": "=_xlfn.SINGLE(A1:A3)*10",
                                "B3": "=_xlfn.SINGLE({5,6})"}, spills=("B2", "B3"))
    cli(str(path), "--in-place")
    got = values(path)
    assert got["B2"].value == 20 and got["B3"].value == 5
