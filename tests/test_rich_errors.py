"""#CALC! and #SPILL! written as Excel stores them: the cell's <v> holds #VALUE!, its vm points
through xl/metadata.xml (valueMetadata -> futureMetadata XLRICHVALUE) at a rich value of the
``_error`` structure in xl/richData/rdrichvalue.xml whose errorType is ERROR.TYPE's number less one.

Sources: Excel's own files in the reference folder (shared/excel-reference):
ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_FILTER_ERRORS.xlsx, whose E1
=FILTER(A1:A4,A1:A4>10) Excel stores as #VALUE! with vm="1" pointing at the rich value
<v>13</v><v>3</v> (errorType 13, #CALC!); ironcalc/xlsx_tests_calc_tests_INFORMATION_ERROR.TYPE.xlsx,
whose #SPILL! is errorType 8 in the same two-key structure. Expected errors otherwise from Excel's
documented behaviour: FILTER that finds nothing gives #CALC!, a spill onto a filled cell #SPILL!.
"""

from __future__ import annotations

import io
import shutil
import zipfile
from pathlib import Path
from xml.etree import ElementTree

import openpyxl
import pytest

from cellfuncs.errors import CALC, SPILL, CellError
from cellfuncs.workbook.model import load
from cellfuncs.workbook.package import Package
from test_recalc import cli, contents, one_sheet
from test_stored_values import _reference

FILTER_ERRORS = "ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_FILTER_ERRORS.xlsx"
RICH_PARTS = ("xl/metadata.xml", "xl/richData/rdrichvalue.xml", "xl/richData/rdrichvaluestructure.xml")


def _scan(path: Path):
    pkg = Package(str(path))
    try:
        return load(pkg).sheets[0].scan
    finally:
        pkg.close()


def _errors_book(tmp_path: Path) -> Path:
    # A1: FILTER finding nothing (#CALC!); C1: a spill of three rows onto C2's constant (#SPILL!);
    # E1/E2: a circular reference, which the engine gives as #CALC!
    path = one_sheet(tmp_path, {"A1": "=FILTER(B1:B3,B1:B3>10)", "B1": 1, "B2": 2, "B3": 3,
                                "C1": "=SEQUENCE(3)", "C2": 7, "E1": "=E2+1", "E2": "=E1+1"},
                     spills=("A1", "C1"))
    cli(str(path), "--in-place")
    return path


def test_calc_and_spill_come_back_as_themselves(tmp_path):
    path = _errors_book(tmp_path)
    scan = _scan(path)
    assert scan.formulas[(1, 1)].cached == CellError(CALC)
    assert scan.formulas[(1, 3)].cached == CellError(SPILL)
    assert scan.formulas[(1, 5)].cached == CellError(CALC)
    sheet = contents(path)["xl/worksheets/sheet1.xml"]
    # the <v> holds #VALUE!, as in Excel's E1 (FILTER_ERRORS); both #CALC! share one rich value
    assert sheet.count(b"<v>#VALUE!</v>") == 4 and sheet.count(b'vm="1"') == 3 and sheet.count(b'vm="2"') == 1
    assert cli(str(path), "--check")[0] == 0  # the file checks clean against itself, no rule of its own


def test_the_file_loads_and_its_parts_are_xml(tmp_path):
    path = _errors_book(tmp_path)
    ws = openpyxl.load_workbook(path, data_only=True)["S"]
    assert ws["A1"].value == "#VALUE!" and ws["C1"].value == "#VALUE!"  # what <v> holds
    parts = contents(path)
    for name, data in parts.items():
        if name.endswith((".xml", ".rels")):
            ElementTree.fromstring(data)
    types = parts["[Content_Types].xml"]
    assert b'PartName="/xl/richData/rdrichvalue.xml" ContentType="application/vnd.ms-excel.rdrichvalue+xml"' in types
    assert b"application/vnd.ms-excel.rdrichvaluestructure+xml" in types
    rels = parts["xl/_rels/workbook.xml.rels"]
    assert b"relationships/rdRichValue\"" in rels and b"relationships/rdRichValueStructure\"" in rels


def _shape(data: bytes, skip: set[str] = frozenset()) -> list:
    """Each element's local name and attributes (namespace declarations are not attributes),
    the text of those not in ``skip``."""
    out = []
    for el in ElementTree.fromstring(data).iter():
        local = el.tag.rpartition("}")[2]
        out.append((local, dict(el.attrib), None if local in skip else (el.text or "").strip()))
    return out


def test_the_parts_are_laid_out_as_excel_lays_them_out(tmp_path):
    excel = zipfile.ZipFile(_reference(FILTER_ERRORS))
    path = one_sheet(tmp_path, {"A1": 1, "A2": 2, "C1": "=FILTER(A1:A2,A1:A2>10)"}, spills=("C1",))
    cli(str(path), "--in-place")
    ours = contents(path)
    for name in ("xl/metadata.xml", "xl/richData/rdrichvaluestructure.xml"):
        assert _shape(ours[name]) == _shape(excel.read(name)), name
    # the rich value: the same errorType (13, #CALC!); Excel's subType 3 names the cause (an empty
    # array), the engine writes 0, the error without a stated cause (as Excel's typed-in #CALC!
    # in INFORMATION_ERROR.TYPE)
    excel_value, our_value = _shape(excel.read(RICH_PARTS[1])), _shape(ours[RICH_PARTS[1]])
    assert [e[:2] for e in our_value] == [e[:2] for e in excel_value] and our_value[2] == excel_value[2]
    assert excel_value[3][2] == "3" and our_value[3][2] == "0"
    cell = ours["xl/worksheets/sheet1.xml"]
    assert b'<c r="C1" t="e" cm="1" vm="1"><f t="array" ref="C1">' in cell  # E1 of FILTER_ERRORS, attribute for attribute


def _edited_copy(source: Path, target: Path, part: str, old: bytes, new: bytes) -> Path:
    with zipfile.ZipFile(source) as z, zipfile.ZipFile(target, "w", zipfile.ZIP_DEFLATED) as out:
        for info in z.infolist():
            data = z.read(info)
            if info.filename == part:
                assert old in data
                data = data.replace(old, new)
            out.writestr(info, data)
    return target


def test_an_excel_rich_value_is_reused_and_its_parts_stay_as_they_are(tmp_path):
    path = tmp_path / "filter.xlsx"
    shutil.copy(_reference(FILTER_ERRORS), path)
    before = contents(path)
    cli(str(path), "--in-place")
    after = contents(path)
    for name in RICH_PARTS:
        assert after[name] == before[name], name
    assert b'<c r="E1" t="e" cm="1" vm="1">' in after["xl/worksheets/sheet1.xml"]
    assert _scan(path).formulas[(1, 5)].cached == CellError(CALC)


def test_a_cell_whose_error_goes_away_loses_its_vm(tmp_path):
    # FILTER_ERRORS with A1 = 11 in place of 1: E1's FILTER(A1:A4,A1:A4>10) finds 11
    path = _edited_copy(_reference(FILTER_ERRORS), tmp_path / "found.xlsx", "xl/worksheets/sheet1.xml",
                        b'<c r="A1"><v>1</v></c>', b'<c r="A1"><v>11</v></c>')
    cli(str(path), "--in-place")
    sheet = contents(path)["xl/worksheets/sheet1.xml"]
    cell = sheet[sheet.index(b'<c r="E1"'):]
    cell = cell[:cell.index(b"</c>")]
    assert b"vm=" not in cell and b"<v>11</v>" in cell and b't="e"' not in cell
    assert _scan(path).formulas[(1, 5)].cached == 11.0


def test_rich_values_are_added_beside_those_a_file_has(tmp_path):
    # FILTER_ERRORS has a #CALC! rich value; a #SPILL! in a new cell adds a second one to its parts
    source = _reference(FILTER_ERRORS)
    path = _edited_copy(source, tmp_path / "spill.xlsx", "xl/worksheets/sheet1.xml",
                        b'<c r="G1"><v>3</v></c>',
                        b'<c r="G1" cm="1"><f t="array" ref="G1">_xlfn.SEQUENCE(2)</f><v>0</v></c>')
    cli(str(path), "--in-place")  # G1's two rows meet G2's 5
    parts = contents(path)
    assert b'<c r="G1" t="e" cm="1" vm="2">' in parts["xl/worksheets/sheet1.xml"]
    values = _shape(parts[RICH_PARTS[1]])
    assert values[0][1]["count"] == "2" and [v[2] for v in values[-3:]] == ["", "8", "0"]
    meta = parts["xl/metadata.xml"]
    assert b'<valueMetadata count="2"><bk><rc t="2" v="0"/></bk><bk><rc t="2" v="1"/></bk></valueMetadata>' in meta
    assert b'<futureMetadata name="XLRICHVALUE" count="2">' in meta
    scan = _scan(path)
    assert scan.formulas[(1, 7)].cached == CellError(SPILL) and scan.formulas[(1, 5)].cached == CellError(CALC)
    ElementTree.parse(io.BytesIO(meta))
    assert parts[RICH_PARTS[2]] == zipfile.ZipFile(source).read(RICH_PARTS[2])  # the structure Excel wrote serves


@pytest.mark.parametrize("code", [CALC, SPILL])
def test_value_xml_keeps_the_classic_code_in_v(code):
    from cellfuncs.workbook.writer import value_xml

    assert value_xml(CellError(code)) == (b"e", b"#VALUE!")  # the <v> of E1 in FILTER_ERRORS
