"""Values as a workbook stores them: the ``_xHHHH_`` escapes of stored text (read and written),
the errors Excel keeps in rich values (a cell's ``vm``), and the error values the engine writes.

Small workbooks are built here from raw XML parts; the checks against Excel's own files read the
reference set (../shared/excel-reference, see its README) and are skipped without it (failing
under CI=true), as in tests/test_conformance.py.
"""

from __future__ import annotations

import zipfile
from pathlib import Path

import openpyxl

from cellfuncs.errors import CALC, NA, SPILL, VALUE, CellError
from cellfuncs.formula import compute
from cellfuncs.workbook import conformance
from cellfuncs.workbook.model import Book, load
from cellfuncs.workbook.package import Package
from cellfuncs.workbook.recalc import recalc_file
from reference_set import reference_workbook

MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
RICH = "http://schemas.microsoft.com/office/spreadsheetml/2017/richdata"
REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
RICH_REL = "http://schemas.microsoft.com/office/2017/06/relationships"
HEAD = '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'


def _package(path: Path, sheet_data: str, extra: dict[str, str] | None = None, rels: str = "") -> Path:
    """A workbook of one sheet "S" holding ``sheet_data``; ``extra`` parts under xl/ and their
    workbook relationships ``rels`` beside the sheet's and the shared strings'."""
    extra = extra or {}
    overrides = "".join(f'<Override PartName="/xl/{name}" ContentType="application/xml"/>' for name in extra)
    parts = {
        "[Content_Types].xml": HEAD + '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
        '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
        '<Default Extension="xml" ContentType="application/xml"/>'
        '<Override PartName="/xl/workbook.xml" '
        'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>'
        '<Override PartName="/xl/worksheets/sheet1.xml" '
        'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>' + overrides + "</Types>",
        "_rels/.rels": HEAD + '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
        f'<Relationship Id="rId1" Type="{REL}/officeDocument" Target="xl/workbook.xml"/></Relationships>',
        "xl/workbook.xml": HEAD + f'<workbook xmlns="{MAIN}" xmlns:r="{REL}"><sheets>'
        '<sheet name="S" sheetId="1" r:id="rId1"/></sheets></workbook>',
        "xl/_rels/workbook.xml.rels": HEAD + '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/'
        f'relationships"><Relationship Id="rId1" Type="{REL}/worksheet" Target="worksheets/sheet1.xml"/>{rels}'
        "</Relationships>",
        "xl/worksheets/sheet1.xml": HEAD + f'<worksheet xmlns="{MAIN}"><sheetData>{sheet_data}</sheetData></worksheet>',
    } | {f"xl/{name}": HEAD + text for name, text in extra.items()}
    with zipfile.ZipFile(path, "w") as z:
        for name, text in parts.items():
            z.writestr(name, text)
    return path


def _book(path: Path) -> Book:
    pkg = Package(str(path))
    try:
        return load(pkg)
    finally:
        pkg.close()


def _reference(name: str) -> Path:
    return reference_workbook(name)


# -- _xHHHH_ escapes ---------------------------------------------------------------------------
# ECMA-376 Part 1, ST_Xstring (22.9.2.19, section number from memory): a character XML cannot
# hold is written _xHHHH_ (its UTF-16 code unit in hex); a literal "_xHHHH_" has its underscore
# written _x005F_. Formula text (ST_Formula) is an ST_Xstring too (from memory of the schema).

def test_escapes_are_decoded_in_shared_inline_and_formula_strings(tmp_path):
    shared = (f'<sst xmlns="{MAIN}" count="2" uniqueCount="2"><si><t>a_x0001_b</t></si>'
              '<si><r><t>_x005F_x0041_</t></r><r><t>!</t></r></si></sst>')
    data = ('<row r="1"><c r="A1" t="s"><v>0</v></c><c r="B1" t="s"><v>1</v></c>'
            '<c r="C1" t="inlineStr"><is><t>x_x000D_y</t></is></c>'
            '<c r="D1" t="str"><f>CHAR(2)</f><v>_x0002_</v></c></row>')
    rels = f'<Relationship Id="rId2" Type="{REL}/sharedStrings" Target="sharedStrings.xml"/>'
    scan = _book(_package(tmp_path / "b.xlsx", data, {"sharedStrings.xml": shared}, rels)).sheets[0].scan
    assert scan.values[(1, 1)] == "a\x01b"
    assert scan.values[(1, 2)] == "_x0041_!"  # the escaped underscore: the text itself, not "A"
    assert scan.values[(1, 3)] == "x\ry"  # a carriage return, which XML itself would read as a line feed
    assert scan.formulas[(1, 4)].cached == "\x02"


def test_excel_stores_char_1_to_31_as_escapes():
    # ironcalc/xlsx_tests_calc_tests_TEXT_CHAR.xlsx: Excel's cached values of CHAR(1)...CHAR(31)
    # in B1:B31 (CHAR(9) and CHAR(10) stored as themselves, the others as _x0001_ ... _x001F_)
    scan = _book(_reference("ironcalc/xlsx_tests_calc_tests_TEXT_CHAR.xlsx")).sheets[0].scan
    assert [scan.formulas[(n, 2)].cached for n in range(1, 32)] == [chr(n) for n in range(1, 32)]


def test_written_text_reads_back_the_same(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    formulas = {"A1": "=CHAR(1)", "A2": "=CHAR(13)", "A3": '="_x"&"0041_"', "A4": '="tab"&CHAR(9)&"x"&CHAR(31)',
                "A5": '="_x"&"005F_"&CHAR(10)'}
    for ref, formula in formulas.items():
        ws[ref] = formula
    source, out = tmp_path / "in.xlsx", tmp_path / "out.xlsx"
    wb.save(source)
    outcome = recalc_file(str(source), str(out))
    assert outcome.written == str(out)
    with zipfile.ZipFile(out) as z:
        xml = z.read("xl/worksheets/sheet1.xml").decode()
    assert "<v>_x0001_</v>" in xml and "<v>_x000D_</v>" in xml and "<v>_x005F_x0041_</v>" in xml
    scan = _book(out).sheets[0].scan
    expected = ["\x01", "\r", "_x0041_", "tab\tx\x1f", "_x005F_\n"]
    assert [scan.formulas[(r, 1)].cached for r in range(1, 6)] == expected


# -- errors kept in rich values -----------------------------------------------------------------

def _rich_parts(error_types: list[int]) -> tuple[dict[str, str], str]:
    """metadata.xml and the rich-value parts for one _error value per entry of ``error_types``
    (value metadata 1, 2, ... in that order), laid out as the reference workbooks lay them out."""
    n = len(error_types)
    future = "".join(f'<bk><extLst><ext uri="{{3e2802c4-a4d2-4d8b-9148-e3be6c30e623}}"><xlrd:rvb i="{i}"/></ext>'
                     "</extLst></bk>" for i in range(n))
    value_md = "".join(f'<bk><rc t="2" v="{i}"/></bk>' for i in range(n))
    metadata = (f'<metadata xmlns="{MAIN}" xmlns:xlrd="{RICH}"><metadataTypes count="2"><metadataType name="XLDAPR"/>'
                f'<metadataType name="XLRICHVALUE"/></metadataTypes><futureMetadata name="XLRICHVALUE" count="{n}">'
                f'{future}</futureMetadata><valueMetadata count="{n}">{value_md}</valueMetadata></metadata>')
    values = f'<rvData xmlns="{RICH}" count="{n}">' + "".join(
        f'<rv s="1"><v>3</v><v>{t}</v></rv>' for t in error_types) + "</rvData>"
    # a structure before the error's, and the error's keys in another order: read by name
    structures = (f'<rvStructures xmlns="{RICH}" count="2"><s t="_other"><k n="errorType" t="i"/></s>'
                  '<s t="_error"><k n="subType" t="i"/><k n="errorType" t="i"/></s></rvStructures>')
    parts = {"metadata.xml": metadata, "richData/rdrichvalue.xml": values, "richData/rdrichvaluestructure.xml": structures}
    rels = (f'<Relationship Id="rId3" Type="{REL}/sheetMetadata" Target="metadata.xml"/>'
            f'<Relationship Id="rId4" Type="{RICH_REL}/rdRichValue" Target="richData/rdrichvalue.xml"/>'
            f'<Relationship Id="rId5" Type="{RICH_REL}/rdRichValueStructure" Target="richData/rdrichvaluestructure.xml"/>')
    return parts, rels


def test_a_rich_value_gives_the_true_error(tmp_path):
    # errorType is ERROR.TYPE's number less one: 13 #CALC! and 8 #SPILL! as the reference
    # workbook INFORMATION_ERROR.TYPE stores them (checked below); 10 is #BLOCKED!, an error the
    # engine has no code for, so it stays #VALUE! naming it
    parts, rels = _rich_parts([13, 8, 10])
    data = ('<row r="1"><c r="A1" t="e" vm="1"><v>#VALUE!</v></c><c r="B1" t="e" vm="2"><f>X()</f><v>#VALUE!</v></c>'
            '<c r="C1" t="e" vm="3"><v>#VALUE!</v></c><c r="D1" t="e"><v>#VALUE!</v></c>'
            '<c r="E1" t="e" vm="9"><v>#N/A</v></c></row>')
    scan = _book(_package(tmp_path / "r.xlsx", data, parts, rels)).sheets[0].scan
    assert scan.values[(1, 1)] == CellError(CALC)
    assert scan.formulas[(1, 2)].cached == CellError(SPILL)
    assert scan.values[(1, 3)].code == VALUE and "#BLOCKED!" in scan.values[(1, 3)].reason
    assert scan.values[(1, 4)] == CellError(VALUE)  # no vm: the error <v> holds
    assert scan.values[(1, 5)] == CellError(NA)  # a vm no record has


def test_excel_rich_errors_read_as_excel_shows_them():
    # ironcalc/xlsx_tests_calc_tests_INFORMATION_ERROR.TYPE.xlsx: A8 and A14 store #VALUE! with
    # vm 1 and 2; Excel's ERROR.TYPE beside them (B8, B14) gives 14 (#CALC!) and 9 (#SPILL!)
    scan = _book(_reference("ironcalc/xlsx_tests_calc_tests_INFORMATION_ERROR.TYPE.xlsx")).sheets[0].scan
    assert scan.values[(8, 1)] == CellError(CALC) and scan.formulas[(8, 2)].cached == 14.0
    assert scan.values[(14, 1)] == CellError(SPILL) and scan.formulas[(14, 2)].cached == 9.0
    # ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_DROP_TAKE.xlsx: =DROP(A2:A8,-7) in C2,
    # which Excel shows as #CALC! (its cached <v> is #VALUE!)
    drop = _book(_reference("ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_DROP_TAKE.xlsx")).sheets[0].scan
    assert drop.formulas[(2, 3)].cached == CellError(CALC)


def test_later_errors_are_written_as_excel_stores_them(tmp_path):
    # MS-OI29500 (Office's notes on ECMA-376) lists the error values Office reads from a file:
    # #DIV/0! #NAME? #VALUE! #NULL! #NUM! #REF! #N/A #GETTING_DATA; Excel itself stores #CALC!
    # and #SPILL! as #VALUE! in <v> (reference workbooks above)
    wb = openpyxl.Workbook()
    ws = wb.active
    ws["A1"], ws["B1"], ws["C1"] = "=SEQUENCE(0)", "=1/0", "=C1"
    source, out = tmp_path / "in.xlsx", tmp_path / "out.xlsx"
    wb.save(source)
    recalc_file(str(source), str(out))
    with zipfile.ZipFile(out) as z:
        xml = z.read("xl/worksheets/sheet1.xml").decode()
    assert "#CALC!" not in xml and "#SPILL!" not in xml
    written = openpyxl.load_workbook(out, data_only=True).active
    assert [written[c].value for c in ("A1", "B1", "C1")] == ["#VALUE!", "#DIV/0!", "#VALUE!"]


# -- arguments Excel's stored values settle ------------------------------------------------------

def test_left_out_and_blank_arguments():
    # ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_MROUND_TRUNC_INT.xlsx, sheet MROUND:
    # =MROUND(,B34) and =MROUND(A36, ) are #N/A (C34, C36), =MROUND(A35,B35) with A35 blank is 0 (C35)
    assert compute("=MROUND(,5)").code == NA and compute("=MROUND(5,)").code == NA
    # poi/test-data_spreadsheet_56688_1.xlsx: =EDATE(DATE_CELL,INCREMENT) of two blank cells is 0 (B2);
    # day 0 no month later (whole workbook in the last test)
    assert compute("=EDATE(0,0)") == 0.0
    # ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_SEQUENCE.xlsx: SEQUENCE(0,0) (C16) and
    # SEQUENCE(0.3) (E18) are #CALC!, SEQUENCE(-1) (C18) is #VALUE!
    assert compute("=SEQUENCE(0,0)").code == CALC and compute("=SEQUENCE(0.3)").code == CALC
    assert compute("=SEQUENCE(-1)").code == VALUE


def test_reference_workbooks_of_these_functions_are_reproduced():
    folder = _reference("manifest.tsv").parent
    names = ("ironcalc/xlsx_tests_calc_tests_TEXT_CHAR.xlsx", "ironcalc/xlsx_tests_calc_tests_INFORMATION_ERROR.TYPE.xlsx",
             "ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_DROP_TAKE.xlsx",
             "ironcalc/xlsx_tests_calc_tests_LOOKUP_AND_REFERENCE_FILTER_ERRORS.xlsx",
             "ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_MROUND_TRUNC_INT.xlsx",
             "ironcalc/xlsx_tests_calc_tests_MATH_AND_TRIGONOMETRY_SEQUENCE.xlsx", "poi/test-data_spreadsheet_56688_1.xlsx")
    total = conformance.run(folder, only=names).total()
    assert total.reproduced == total.comparable > 300
