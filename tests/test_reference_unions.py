"""The union operator (a comma inside parentheses), references to deleted cells
(``Sheet1!#REF!``), #N/A padding of arrays of unequal shapes, and loops of written references
that evaluation never closes.

Expected values: the examples of Microsoft's pages for AREAS (support.microsoft.com, "AREAS
function": =AREAS((B2:D4,E5,F6:I9)) is 3) and for INDEX's reference form (learn.microsoft.com,
WorksheetFunction.Index: "The first area selected or entered is numbered 1 ... If area_num is
omitted, INDEX uses area 1"; "Row_num, column_num, and area_num must point to a cell within
reference; otherwise, INDEX returns #REF!"), Office's note on ROWS of a union (MS-OI29500
2.1.1035: "Office returns #REF!, if array refers to the union of discontiguous ranges"), laid
out in small workbooks of our own; and the values Excel stored in the reference workbooks
(../shared/excel-reference/), skipped when that folder is absent (a failure under CI=true).
"""

from __future__ import annotations


import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName

from cellfuncs.errors import REF, CellError
from cellfuncs.formula import Binary, Literal, Ref, compute, parse
from cellfuncs.workbook import conformance
from reference_set import reference_folder
from test_recalc import cli, values
from test_references import _recalc

DATA = {"A1": 2, "A2": 5, "A3": 7, "B1": 1, "B2": 2, "B3": 3, "C5": 10, "B5": "text"}


def test_a_comma_inside_parentheses_is_a_union_and_between_arguments_separates_them():
    tree = parse("=SUM((A1,A3),B1)")
    assert len(tree.args) == 2 and tree.args[0] == Binary(",", Ref(None, "A1"), Ref(None, "A3"))
    assert parse("=(A1:B2,C5)") == Binary(",", Ref(None, "A1:B2"), Ref(None, "C5"))
    # the reference operators bind tighter than negation: range, then intersection, then union
    assert parse("=-(A1,B1)").operand.op == ","
    assert parse("=(A1:A2 B1,C1)").left.op == " "
    # a defined name may be a union written without parentheses (Excel's print areas are)
    assert parse("=Sheet1!$A$1:$B$2,Sheet1!$D$1").op == ","
    # between the arguments of a function called where it is written, a comma still separates
    assert len(parse("=LAMBDA(x,y,x+y)((A1,A2),3)").args) == 2


def test_a_sheet_qualified_ref_error_parses_as_ref():
    # Excel writes a reference whose cells were deleted as Sheet!#REF! (POI's 49783 and
    # customIndexedColors workbooks hold it in a defined name and in a formula)
    for text in ("='1'!#REF!", "=Sheet1!#REF!"):
        tree = parse(text)
        assert type(tree) is Literal and tree.value.code == REF
        assert compute(text).code == REF
    assert compute("=Sheet1!#REF!*2").code == REF


def test_functions_that_take_references_take_a_union(tmp_path):
    ws = _recalc(tmp_path, DATA | {
        "D1": "=SUM((A1,A3),B1)", "D2": "=RANK(A1,(B1,B2,B3),1)", "D3": "=AREAS((A1:B2,C5,A3))",
        "D4": "=LARGE((A1:A3,C5),2)", "D5": "=SMALL((A1:A3,B1:B3),2)", "D6": "=COUNT((A1:B3,C5,B5))",
        "D7": "=MAX((A1,C5))", "D8": "=ISREF((A1,B1))", "D9": "=SUM((A1,(B1,C5)))",
    })
    # a union is its areas' cells, so each value is the aggregate over all of them
    assert [ws[f"D{r}"].value for r in range(1, 10)] == [10, 2, 3, 7, 2, 7, 10, True, 13]


def test_index_picks_an_area_of_a_union(tmp_path):
    ws = _recalc(tmp_path, DATA | {
        "D1": "=INDEX((A1:B2,C5),1,1,2)", "D2": "=INDEX((A1:B2,C5),2,2)", "D3": "=INDEX((A1:B2,C5),1,1,3)",
        "D4": "=SUM(INDEX((A1:B3,C5),0,1,1))",
    })
    assert ws["D1"].value == 10 and ws["D2"].value == 2  # area 2; area 1 when left out
    assert ws["D3"].value == "#REF!"  # no third area
    assert ws["D4"].value == 14  # a whole column of area 1


def test_a_union_where_one_value_or_one_area_is_needed(tmp_path):
    ws = _recalc(tmp_path, DATA | {
        "D1": "=(A1,A3)+1", "D2": "=(A1,A2)", "D3": "=-(A1,A3)", "D4": "=ROWS((A1:A2,B1))",
        "D5": "=SUM((1,2))", "D6": "=(A1:A2,B1):C3",
    })
    # Excel: arithmetic on a union, and a union as the cell's value, are #VALUE!
    assert [ws[f"D{r}"].value for r in (1, 2, 3)] == ["#VALUE!"] * 3
    assert ws["D4"].value == "#REF!"  # MS-OI29500 2.1.1035
    assert ws["D5"].value == "#VALUE!"  # a union joins references, not values
    assert ws["D6"].value == "#REF!"


def test_a_defined_name_may_be_a_union(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    for ref, v in (DATA | {"D1": "=SUM(Both)", "D2": "=AREAS(Both)", "D3": "=INDEX(Both,1,1,2)"}).items():
        ws[ref] = v
    wb.defined_names["Both"] = DefinedName("Both", attr_text="S!$A$1:$A$3,S!$C$5")
    path = tmp_path / "names.xlsx"
    wb.save(path)
    code, _, err = cli(str(path), "--in-place")
    assert code == 0, err
    got = values(path)
    assert [got["D1"].value, got["D2"].value, got["D3"].value] == [24, 2, 10]


def test_a_union_moves_with_its_formula_and_orders_the_recalculation(tmp_path):
    # the cells a union names are evaluated before the formula reading them, wherever they are
    ws = _recalc(tmp_path, {"A1": 1, "A2": 2, "B1": "=A1*10", "B2": "=A2*10", "C1": "=SUM((A1,B1))",
                            "C2": "=SUM((A2,B2))", "E1": "=C1+C2"})
    assert [ws["C1"].value, ws["C2"].value, ws["E1"].value] == [11, 22, 33]


def test_arrays_of_unequal_shapes_pad_with_na():
    # Excel behaviour (from memory; the rule behind the #N/A Excel stored for DATE(A2:A6,B2:B4,C2:C3)
    # in IronCalc's DATE workbook, checked below): the most rows and columns of any array, a single
    # row or column repeated, a shorter array padded with #N/A
    na = "#N/A"
    v = compute("={1,2,3}+{10,20}")
    assert [x if type(x) is float else x.code for x in v.flat] == [11.0, 22.0, na]
    v = compute("={1;2;3}*{1,2}")  # a column against a row: a table, nothing padded
    assert v.shape == (3, 2) and all(type(x) is float for x in v.flat)
    v = compute("=IF({TRUE;FALSE;TRUE},{1;2},{5;6;7})")  # IF pairs its arrays by the same rule
    assert [x if type(x) is float else x.code for x in v.flat] == [1.0, 6.0, na]
    v = compute("=ROUND({1.25,2.5,3.75},{1,0})")
    assert [x if type(x) is float else x.code for x in v.flat] == [1.3, 3.0, na]
    assert isinstance(compute("={1,2}+#DIV/0!")[0, 0], CellError)


def test_a_reference_in_a_branch_never_evaluated_is_no_loop(tmp_path):
    # Excel computes =CHOOSE(2, B40, "Not a cycle") in B40 (IronCalc's CHOOSE workbook, checked
    # below); IF's branch not taken is read the same way (not checked against Excel)
    ws = _recalc(tmp_path, {"A1": 2, "B1": '=CHOOSE(2, B1, "not a cycle")', "B2": "=IF(A1>1, 5, B2)",
                            "B3": "=CHOOSE(1, B3, 1)", "C1": "=C2+1", "C2": "=IF(A1>1, 1, C1)",
                            "D1": "=D2+1", "D2": "=D1*2"})
    assert ws["B1"].value == "not a cycle" and ws["B2"].value == 5
    assert ws["C1"].value == 2 and ws["C2"].value == 1  # a loop of two cells that evaluation never closes
    # loops evaluation closes stay circular (Excel reports a circular reference; the file's
    # value is #VALUE! for #CALC!, as Excel stores it)
    assert ws["B3"].value == "#VALUE!" and ws["D1"].value == "#VALUE!" and ws["D2"].value == "#VALUE!"


@pytest.fixture(scope="module")
def folder():
    return reference_folder()


@pytest.mark.parametrize("name, cell", [
    ("poi/test-data_spreadsheet_61063.xlsx", "Tabelle1!A4"),  # =RANK(A1,(B1,B2,B3),1): 2
    ("poi/test-data_spreadsheet_49783.xlsx", "Sheet1!A2"),  # =sale_1*sale_2, names of Sheet1!#REF!: #REF!
    ("poi/test-data_spreadsheet_customIndexedColors.xlsx", "_TGK_HIDDEN!B1"),  # ='1'!#REF!: #REF!
    ("ironcalc/xlsx_tests_calc_tests_DATE_AND_TIME_DATE.xlsx", "Arrays!G1"),  # DATE of 5, 3 and 2 rows: #N/A x 3
    ("ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_CHOOSE.xlsx", "CHOOSE!B40"),  # "Not a cycle"
])
def test_reference_workbooks_reproduce_excels_values(folder, name, cell):
    score = conformance.score_workbook(folder / name, name.split("/")[0])
    wrong = [f for f in score.failed if cell in str(f)]
    assert not wrong, wrong
    assert score.tally.comparable == score.tally.reproduced, score.failed[:5]
