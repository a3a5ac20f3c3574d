"""A formula is evaluated as the file records it: a plain formula as a legacy formula
(implicit intersection; an array result shows its top-left element), an array formula over
its stated range, a formula marked as a dynamic array as a spill. Recalculation never
changes the kind of a formula.

Expected values follow Excel's documented implicit intersection ("Implicit intersection
operator: @", Microsoft Support: a range given where one value is expected yields the cell
in the formula's row or column, #VALUE! if there is none), in small workbooks of our own,
and the values Excel stored in the reference workbooks (POI's intersection and IronCalc's
ROW/COLUMN sheets), skipped when ../shared/excel-reference is absent (a failure under CI=true).
"""

from __future__ import annotations

import re
import zipfile
from pathlib import Path

import openpyxl
import pytest
from openpyxl.worksheet.formula import ArrayFormula

from cellfuncs.workbook import conformance
from cellfuncs.workbook.authoring import mark_spills, save, spill
from cellfuncs.workbook.package import Refused
from cellfuncs.workbook.recalc import recalc_file
from test_recalc import cli, one_sheet, sheet, values
from test_tables import _reference


def test_a_plain_formula_intersects_a_range_with_its_row(tmp_path):
    cells = {"A1": 1.0, "A2": 2.0, "A3": 3.0, "B2": "=A1:A3*10", "B5": "=A1:A3*10", "C1": 5.0, "D1": 7.0,
             "C3": "=ABS(-A1:A3)", "D2": "=SUM(A1:A3*10)", "E2": "=A:A", "F9": "=C1:D1+1", "E9": "={4,5,6}",
             "G1": "=ROW(A5:A9)"}
    path = one_sheet(tmp_path, cells)
    code, _, err = cli(str(path), "--in-place")
    ws = values(path)
    assert ws["B2"].value == 20  # the row-2 cell of A1:A3, times 10
    assert ws["B3"].value is None and ws["B4"].value is None  # nothing spilled below
    assert ws["B5"].value == "#VALUE!"  # row 5 misses A1:A3
    assert ws["C3"].value == 3 and ws["D2"].value == 20 and ws["E2"].value == 2
    assert ws["F9"].value == "#VALUE!"  # column F misses C1:D1
    assert ws["E9"].value == 4 and ws["F9"].value == "#VALUE!" and ws["G1"].value == 5  # top-left element
    xml = sheet(path)
    assert '<c r="B2"><f>A1:A3*10</f>' in xml and "cm=" not in xml and 't="array"' not in xml  # kinds unchanged
    assert code == 1 and "S!B5: #VALUE!" in err


def test_array_class_parameters_take_arrays_in_a_plain_formula(tmp_path):
    # Excel evaluates what is written in an array-class parameter as an array even in a plain
    # formula: SUMPRODUCT's arguments, INDEX's array, LOOKUP's vectors (the non-Ctrl+Shift+Enter
    # idioms =SUMPRODUCT((A1:A3>1)*1), =LOOKUP(2,1/(...),...) and =INDEX(expr,0) are common
    # practice, from memory); a value-class or reference-class one intersects (SUM, IF)
    cells = {"A1": 1.0, "A2": 2.0, "A3": 3.0, "B1": 4.0, "B2": 5.0, "B3": 6.0,
             "C2": "=SUMPRODUCT(A1:A3*B1:B3)", "D2": "=SUM(A1:A3*B1:B3)", "E2": "=SUMPRODUCT((A1:A3>1)*1)",
             "F2": "=INDEX(A1:A3*10,3)", "G2": "=LOOKUP(2,1/(A1:A3>1),B1:B3)", "H2": "=SUM(IF(A1:A3>1,1,0))",
             "I2": "=MMULT(TRANSPOSE(A1:A3),B1:B3*1)"}
    path = one_sheet(tmp_path, cells)
    assert cli(str(path), "--in-place")[0] == 0
    ws = values(path)
    got = {k: ws[k].value for k in ("C2", "D2", "E2", "F2", "G2", "H2", "I2")}
    assert got == {"C2": 32, "D2": 10, "E2": 2, "F2": 30, "G2": 6, "H2": 1, "I2": 32}


def test_an_array_formula_fills_its_stated_range(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    for r in (1, 2, 3):
        ws[f"A{r}"] = float(r)
    ws["B1"] = ArrayFormula("B1:B3", "=A1:A3*10")
    ws["C1"] = ArrayFormula("C1:C4", "=A1:A3*10")  # one row more than the result: #N/A there, as in Excel
    path = tmp_path / "cse.xlsx"
    wb.save(path)
    assert cli(str(path), "--in-place")[0] == 1
    ws = values(path)
    assert [ws[f"B{r}"].value for r in (1, 2, 3)] == [10, 20, 30]
    assert [ws[f"C{r}"].value for r in (1, 2, 3, 4)] == [10, 20, 30, "#N/A"]
    assert "cm=" not in sheet(path)


def test_a_spilling_formula_written_with_the_helper_spills(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    for r in (1, 2, 3):
        ws[f"A{r}"] = float(r)
    spill(ws, "B1", "=A1:A3*10")
    ws["C2"] = "=A1:A3*10"  # the same text, plain: one value
    save(wb, tmp_path / "spill.xlsx")
    xml = sheet(tmp_path / "spill.xlsx")
    assert '<c r="B1" cm="1"><f t="array" ref="B1">A1:A3*10</f>' in xml  # as Excel records a dynamic array
    assert cli(str(tmp_path / "spill.xlsx"), "--in-place")[0] == 0
    got = values(tmp_path / "spill.xlsx")
    assert [got[f"B{r}"].value for r in (1, 2, 3)] == [10, 20, 30] and got["C2"].value == 20 and got["C3"].value is None
    assert '<f t="array" ref="B1:B3">' in sheet(tmp_path / "spill.xlsx")


def test_marking_a_cell_without_a_formula_is_refused(tmp_path):
    path = one_sheet(tmp_path, {"A1": 1.0})
    with pytest.raises(Refused, match="holds no formula"):
        mark_spills(path, {"S": ["A1"]})
    with pytest.raises(Refused, match="no worksheet named"):
        mark_spills(path, {"Nowhere": ["A1"]})


@pytest.mark.parametrize("name", [
    "poi/test-data_spreadsheet_Intersection-52111-xssf.xlsx",
    "ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_ROW_COLUM.xlsx",
    "poi/test-data_spreadsheet_0-www-crossref-org.lib.rivier.edu_education-files_suffix-generator.xlsm",
])
def test_legacy_formulas_of_reference_workbooks(name):
    score = conformance.score_workbook(_reference(name), name.split("/")[0])
    spills = [f for f in score.failed if "#SPILL!" in str(f[3])]
    assert not spills, spills[:5]


# a formula element with its text; an empty <f ca="1"/> is Excel's mark on the other cells
# of a volatile array, not a formula of its own, and is rewritten with the array's values
_CELL_F = re.compile(rb'<c r="([A-Z]+[0-9]+)"([^>]*)>\s*<f((?:\s[^>]*)?)(?<!/)>')
_ATTR = re.compile(rb'\s([a-zA-Z]+)="([^"]*)"')


def _kinds(path) -> dict[tuple[str, bytes], tuple]:
    """Every formula cell of every worksheet: its kind as the file records it (the <f>
    element's t, si and, but for a dynamic array whose spill may change size, ref; whether
    the cell carries cell metadata cm)."""
    out = {}
    with zipfile.ZipFile(path) as z:
        for name in z.namelist():
            if not name.startswith("xl/worksheets/") or not name.endswith(".xml"):
                continue
            data = z.read(name)
            for m in _CELL_F.finditer(data):
                cell, f = dict(_ATTR.findall(m.group(2))), dict(_ATTR.findall(m.group(3)))
                dynamic = b"cm" in cell
                out[(name, m.group(1))] = (f.get(b"t"), f.get(b"si"), None if dynamic else f.get(b"ref"), dynamic)
    return out


def test_no_reference_workbook_changes_the_kind_of_a_formula(tmp_path):
    folder = _reference("manifest.tsv").parent
    names = [line.split("\t")[0] for line in (folder / "manifest.tsv").read_text(encoding="utf-8").splitlines()[1:]]
    changed, refused = [], []
    for name in names:
        out = tmp_path / Path(name).name
        outcome = recalc_file(str(folder / name), str(out))
        if outcome.refused is not None or outcome.written is None:
            refused.append((name, outcome.refused or outcome.unwritten))
            continue
        before, after = _kinds(folder / name), _kinds(out)
        changed += [(name, key, before[key], after.get(key)) for key in before if after.get(key) != before[key]]
        out.unlink()
    assert not refused, refused[:5]
    assert not changed, changed[:5]
