"""``cellfuncs recalc``: workbooks built here with openpyxl, recalculated, read back.

Expected values come from calling the pack's functions directly (the engine must store
what the functions return), from the arithmetic of the formula itself, or are the
engine's contract (error codes, reasons, the file layout of spills) as stated in
cellfuncs/workbook/*.py and the README. "Excel behaviour (common practice)" marks what
Excel is commonly known to do.
"""

from __future__ import annotations

import contextlib
import gc
import io
import os
import re
import subprocess
import sys
import zipfile
from pathlib import Path

import numpy as np
import openpyxl
import pytest
from openpyxl.chart import BarChart, Reference
from openpyxl.comments import Comment
from openpyxl.styles import Font, PatternFill
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula

import cellfuncs
from cellfuncs.cli import main
from cellfuncs.workbook import package as package_module
from cellfuncs.workbook import sheetxml
from cellfuncs.workbook.authoring import mark_spills, save, spill
from cellfuncs.workbook.package import Package

PRESSURES = [1.0, 2.0, 5.0, 10.0, 20.0]  # bar


# ---- helpers -----------------------------------------------------------------------------
def cli(*args: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["recalc", *args])
    return code, out.getvalue(), err.getvalue()


def contents(path: Path) -> dict[str, bytes]:
    with zipfile.ZipFile(path) as z:
        return {name: z.read(name) for name in z.namelist()}


def stored(path: Path) -> dict[str, tuple[int, int, bytes]]:
    """Each member as stored: (CRC, compression method, compressed bytes)."""
    pkg = Package(str(path))
    try:
        return {i.filename: (i.CRC, i.compress_type, pkg.raw(i)) for i in pkg.infos}
    finally:
        pkg.close()


def rewrite(path: Path, change: dict[str, bytes | None]) -> None:
    """Replace (bytes), remove (None) or add members of the zip at ``path``."""
    old = contents(path)
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for name, data in old.items():
            if name in change:
                data = change[name]
            if data is not None:
                z.writestr(name, data)
        for name, data in change.items():
            if name not in old and data is not None:
                z.writestr(name, data)


def sheet(path: Path, n: int = 1) -> str:
    return contents(path)[f"xl/worksheets/sheet{n}.xml"].decode()


def values(path: Path, sheet_name: str | None = None) -> openpyxl.worksheet.worksheet.Worksheet:
    wb = openpyxl.load_workbook(path, data_only=True)
    return wb[sheet_name] if sheet_name else wb.active


def one_sheet(tmp_path: Path, cells: dict[str, object], name: str = "book.xlsx", spills: tuple[str, ...] = ()) -> Path:
    """A workbook of one sheet "S"; the formulas of ``spills`` are written as spilling formulas
    (dynamic arrays, with cellfuncs.workbook.authoring), the others as plain (legacy) formulas."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    for ref, value in cells.items():
        if ref in spills:
            spill(ws, ref, value)
        else:
            ws[ref] = value
    path = tmp_path / name
    save(wb, path)
    return path


def plant(tmp_path: Path) -> Path:
    """A workbook with styles, a merged cell, a comment, number formats, column widths, a
    chart, defined names (workbook and sheet scope) and a second, untouched sheet."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Plant"
    ws["A1"], ws["B1"], ws["C1"], ws["D1"] = "Pressure (bar)", "Boiling (degC)", "Phase", "Margin (K)"
    ws["A1"].font = Font(bold=True)
    ws["A1"].comment = Comment("gauge readings converted to bar", "tester")
    ws["C1"].fill = PatternFill("solid", fgColor="FFFF00")
    ws.column_dimensions["A"].width = 18
    ws.merge_cells("H1:I1")
    ws["H1"] = "Merged title"
    ws["F1"], ws["F2"] = 120.0, 150.0
    for i, p in enumerate(PRESSURES, start=2):
        ws.cell(i, 1, p)
        ws.cell(i, 2, f'=BOIL_TEMP("water",A{i},"bar","degC")').number_format = "0.00"
        ws.cell(i, 3, f'=STABLE_PHASE("water",Temp,A{i},"degC","bar")')
        ws.cell(i, 4, f"=Limit-B{i}")
    ws["B8"] = "=SUM(B2:B6)"
    ws["B9"] = "=Inputs!B2*2"
    ws["B10"] = '=IFERROR(BOIL_TEMP("water",-5,"bar"),"no")'
    ws["B11"] = "=SUM({1,2;3,4})"
    wb.defined_names["Temp"] = DefinedName("Temp", attr_text="Plant!$F$1")
    ws.defined_names["Limit"] = DefinedName("Limit", attr_text="Plant!$F$2")
    chart = BarChart()
    chart.add_data(Reference(ws, min_col=2, min_row=1, max_row=6), titles_from_data=True)
    ws.add_chart(chart, "H3")
    notes = wb.create_sheet("Inputs")
    notes["A1"], notes["B1"], notes["A2"], notes["B2"] = "item", "value", "design margin", 7.5
    path = tmp_path / "plant.xlsx"
    wb.save(path)
    return path


# ---- round trip --------------------------------------------------------------------------
def test_round_trip_keeps_formulas_styles_chart_and_untouched_parts_byte_identical(tmp_path):
    src = plant(tmp_path)
    code, out, err = cli(str(src), "--out", str(tmp_path / "out"))
    assert code == 0, err
    dst = tmp_path / "out" / "plant.xlsx"
    before, after = stored(src), stored(dst)
    changed = {"xl/worksheets/sheet1.xml", "[Content_Types].xml", "_rels/.rels"}
    assert set(after) == set(before) | {"docProps/custom.xml"}
    for name in set(before) - changed:  # styles, chart, drawing, comments, the Inputs sheet, workbook.xml ...
        assert after[name] == before[name], name
    assert any("chart" in n for n in before) and any("comments" in n for n in before)
    original, recalculated = openpyxl.load_workbook(src), openpyxl.load_workbook(dst)
    for name in ("Plant", "Inputs"):
        assert [[c.value for c in row] for row in original[name].iter_rows()] == \
               [[c.value for c in row] for row in recalculated[name].iter_rows()]
    ws = recalculated["Plant"]
    assert ws["A1"].font.bold and ws["B2"].number_format == "0.00" and ws["C1"].fill.fgColor.rgb == "00FFFF00"
    assert ws.column_dimensions["A"].width == 18 and "H1:I1" in {str(m) for m in ws.merged_cells.ranges}
    assert ws["A1"].comment.text == "gauge readings converted to bar"
    assert len(ws._charts) == 1
    custom = contents(dst)["docProps/custom.xml"].decode()
    assert 'name="RecalcEngine"' in custom and f">{cellfuncs.__version__}<" in custom


def test_the_command_lines_quiet_set_up_changes_no_result_and_restores_the_collector(tmp_path):
    # the engine's contract (cellfuncs/workbook/recalc.py): keeping the garbage collector out of
    # reading and set-up is for speed alone, and the collector runs again afterwards
    from cellfuncs.workbook.recalc import recalc_file

    src = plant(tmp_path)
    assert gc.isenabled()
    try:
        for quiet in (False, True, True):  # twice: the second unfreezes what the first left frozen
            recalc_file(str(src), str(tmp_path / f"{quiet}.xlsx"), quiet_set_up=quiet)
            assert gc.isenabled()
        assert gc.get_freeze_count() > 0  # what the last workbook made stays frozen for the process's end
    finally:
        gc.unfreeze()
    assert contents(tmp_path / "True.xlsx") == contents(tmp_path / "False.xlsx")


def test_cached_values_are_the_computed_values(tmp_path):
    src = plant(tmp_path)
    assert cli(str(src), "--out", str(tmp_path / "out"))[0] == 0
    ws = values(tmp_path / "out" / "plant.xlsx", "Plant")
    boil = [cellfuncs.BOIL_TEMP("water", p, "bar", "degC") for p in PRESSURES]
    for i, p in enumerate(PRESSURES, start=2):
        assert ws.cell(i, 2).value == boil[i - 2]
        assert ws.cell(i, 3).value == cellfuncs.STABLE_PHASE("water", 120.0, p, "degC", "bar")
        assert ws.cell(i, 4).value == 150.0 - boil[i - 2]
    assert ws["B8"].value == pytest.approx(sum(boil), rel=1e-15)
    assert ws["B9"].value == 15.0  # Inputs!B2 * 2
    assert ws["B10"].value == "no"
    assert ws["B11"].value == 10.0


def test_check_passes_on_a_fresh_result_and_lists_a_tampered_cell(tmp_path):
    src = plant(tmp_path)
    code, out, err = cli(str(src), "--check")
    assert code == 1  # openpyxl stores no cached values: every formula cell differs
    assert f"{src}\tPlant!B2\t(none)\t" in out
    cli(str(src), "--out", str(tmp_path / "out"))
    dst = tmp_path / "out" / "plant.xlsx"
    code, out, err = cli(str(dst), "--check")
    assert (code, out) == (0, "")
    assert re.search(r"recalc: 1 files, 19 cells, 0 errors, 0 differences, [0-9.]+ s\n\Z", err)
    xml = sheet(dst)
    tampered = re.sub(r'(<c r="B3"[^>]*>.*?<v>)[^<]*(</v>)', r"\g<1>99.5\2", xml, count=1)
    assert tampered != xml
    rewrite(dst, {"xl/worksheets/sheet1.xml": tampered.encode()})
    code, out, err = cli(str(dst), "--check", "--tolerance", "1e-6")
    expected = cellfuncs.BOIL_TEMP("water", 2.0, "bar", "degC")
    assert code == 1
    assert out == f"{dst}\tPlant!B3\t99.5\t{expected!r}\n"
    assert "1 differences" in err


def test_check_tolerance_is_relative(tmp_path):
    path = one_sheet(tmp_path, {"A1": 3.0, "B1": "=A1*2"})
    cli(str(path), "--in-place")
    xml = sheet(path).replace("<v>6</v>", "<v>6.000001</v>")
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    assert cli(str(path), "--check")[0] == 1
    assert cli(str(path), "--check", "--tolerance", "1e-6")[0] == 0  # |6.000001 - 6| <= 1e-6 * 6.000001


def test_a_dry_run_writes_nothing(tmp_path):
    src = plant(tmp_path)
    before = {p: (p.stat().st_mtime_ns, p.read_bytes()) for p in tmp_path.iterdir()}
    code, out, err = cli(str(src))
    assert code == 0 and out == ""
    assert {p: (p.stat().st_mtime_ns, p.read_bytes()) for p in tmp_path.iterdir()} == before


def test_in_place_replaces_the_input(tmp_path):
    src = plant(tmp_path)
    assert cli(str(src), "--in-place")[0] == 0
    assert values(src, "Plant")["B11"].value == 10.0
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plant.xlsx"]  # no temporary file left


def test_the_calculation_chain_is_dropped(tmp_path):
    path = one_sheet(tmp_path, {"A1": 1.0, "B1": "=A1+1"})
    files = contents(path)
    types = files["[Content_Types].xml"].replace(
        b"</Types>", b'<Override PartName="/xl/calcChain.xml" ContentType="application/vnd.openxmlformats-'
                     b'officedocument.spreadsheetml.calcChain+xml"/></Types>')
    rels = files["xl/_rels/workbook.xml.rels"].replace(
        b"</Relationships>", b'<Relationship Id="rId99" Type="http://schemas.openxmlformats.org/officeDocument/2006/'
                             b'relationships/calcChain" Target="calcChain.xml"/></Relationships>')
    chain = b'<calcChain xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><c r="B1" i="1"/></calcChain>'
    rewrite(path, {"[Content_Types].xml": types, "xl/_rels/workbook.xml.rels": rels, "xl/calcChain.xml": chain})
    assert cli(str(path), "--in-place")[0] == 0
    files = contents(path)
    assert "xl/calcChain.xml" not in files
    assert b"calcChain" not in files["[Content_Types].xml"] and b"calcChain" not in files["xl/_rels/workbook.xml.rels"]
    assert values(path)["B1"].value == 2.0


def test_full_calc_on_load_is_never_set(tmp_path):
    path = one_sheet(tmp_path, {"A1": 1.0, "B1": "=A1+1"})
    workbook = contents(path)["xl/workbook.xml"].replace(b' fullCalcOnLoad="1"', b"")
    rewrite(path, {"xl/workbook.xml": workbook})
    assert cli(str(path), "--in-place")[0] == 0
    assert contents(path)["xl/workbook.xml"] == workbook


def test_existing_custom_properties_are_kept_and_the_engine_added(tmp_path):
    wb = openpyxl.Workbook()
    wb.active["A1"] = "=1+1"
    from openpyxl.packaging.custom import StringProperty

    wb.custom_doc_props.append(StringProperty(name="Project", value="Boiler 7"))
    path = tmp_path / "custom.xlsx"
    wb.save(path)
    assert cli(str(path), "--in-place")[0] == 0
    custom = contents(path)["docProps/custom.xml"].decode()
    assert "Boiler 7" in custom and 'name="RecalcEngine"' in custom and 'name="RecalcEngineVersion"' in custom
    props = {p.name: p.value for p in openpyxl.load_workbook(path).custom_doc_props}
    assert props == {"Project": "Boiler 7", "RecalcEngine": "cellfuncs", "RecalcEngineVersion": cellfuncs.__version__}
    assert cli(str(path), "--in-place")[0] == 0  # a second run updates, never duplicates
    assert contents(path)["docProps/custom.xml"].decode().count("RecalcEngine\"") == 1


# ---- refusals ----------------------------------------------------------------------------
def _refused(tmp_path: Path, path: Path, reason: str) -> None:
    before = path.read_bytes()
    code, out, err = cli(str(path), "--out", str(tmp_path / "out"))
    assert code == 2, err
    assert re.search(f"refused: .*{reason}", err), err
    assert not (tmp_path / "out").exists() or list((tmp_path / "out").iterdir()) == []
    code, _, err = cli(str(path), "--in-place")
    assert code == 2 and path.read_bytes() == before
    assert sorted(p.name for p in path.parent.iterdir() if p.name.startswith(".")) == []


def test_refuses_a_file_that_is_not_a_zip(tmp_path):
    path = tmp_path / "text.xlsx"
    path.write_text("just text")
    _refused(tmp_path, path, "not a zip")


def test_refuses_an_encrypted_workbook_by_its_ole_signature(tmp_path):
    path = tmp_path / "secret.xlsx"
    path.write_bytes(b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + bytes(4096))  # OLE compound file header
    _refused(tmp_path, path, "encrypted")


def test_refuses_corrupt_xml(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    rewrite(path, {"xl/worksheets/sheet1.xml": sheet(path).replace("</sheetData>", "").encode()})
    _refused(tmp_path, path, "sheet1.xml: corrupt XML")


def test_refuses_corrupt_xml_in_a_part_it_does_not_otherwise_read(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    rewrite(path, {"xl/styles.xml": b"<styleSheet><unclosed></styleSheet>"})
    _refused(tmp_path, path, "styles.xml: corrupt XML")


@pytest.mark.parametrize("part", ["xl/workbook.xml", "xl/worksheets/sheet1.xml", "xl/theme/theme1.xml"])
def test_refuses_an_entity_bomb(tmp_path, part):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    bomb = (b'<?xml version="1.0"?><!DOCTYPE lolz [<!ENTITY lol "lol"><!ENTITY lol2 "&lol;&lol;&lol;&lol;">]>'
            b"<lolz>&lol2;</lolz>")
    rewrite(path, {part: bomb})
    _refused(tmp_path, path, "entity declaration")


def test_refuses_a_highly_compressed_member(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    rewrite(path, {"xl/media/padding.bin": bytes(4 * 2**20)})  # 4 MiB of zeros deflate about 1000:1
    _refused(tmp_path, path, "compression ratio .* above 100:1")


def test_refuses_too_much_expanded_data(tmp_path, monkeypatch):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    rewrite(path, {"xl/media/image.bin": os.urandom(300_000)})
    monkeypatch.setattr(package_module, "MAX_TOTAL", 200_000)  # the real limit, 200 MiB, takes long to build
    _refused(tmp_path, path, "expands to")


def test_refuses_a_used_range_beyond_excel(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    rewrite(path, {"xl/worksheets/sheet1.xml": re.sub(r'<dimension ref="[^"]*"', '<dimension ref="A1:XFE1"',
                                                      sheet(path)).encode()})
    _refused(tmp_path, path, "beyond Excel's limits")


def test_refuses_a_cell_beyond_excel(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1+1"})
    rewrite(path, {"xl/worksheets/sheet1.xml": sheet(path).replace('r="A1"', 'r="A1048577"').encode()})
    _refused(tmp_path, path, "not a cell within Excel's limits")


def test_refuses_too_many_formula_cells(tmp_path, monkeypatch):
    path = one_sheet(tmp_path, {f"A{i}": "=1" for i in range(1, 12)})
    monkeypatch.setattr(sheetxml, "MAX_FORMULAS", 10)
    monkeypatch.setattr("cellfuncs.workbook.model.MAX_FORMULAS", 10)
    _refused(tmp_path, path, "more than 10 formula cells")


def test_refusal_of_one_file_does_not_stop_the_others(tmp_path):
    good = one_sheet(tmp_path, {"A1": "=2*3"}, "good.xlsx")
    bad = tmp_path / "bad.xlsx"
    bad.write_text("nope")
    code, out, err = cli(str(bad), str(good), "--out", str(tmp_path / "out"))
    assert code == 2
    assert sorted(p.name for p in (tmp_path / "out").iterdir()) == ["good.xlsx"]
    assert values(tmp_path / "out" / "good.xlsx")["A1"].value == 6.0
    assert "recalc: 2 files, 1 cells, 0 errors, 0 differences" in err


# ---- command-line contract -------------------------------------------------------------
def test_two_inputs_with_the_same_file_name_are_refused_before_writing(tmp_path):
    (tmp_path / "a").mkdir()
    (tmp_path / "b").mkdir()
    first = one_sheet(tmp_path / "a", {"A1": "=1"}, "same.xlsx")
    one_sheet(tmp_path / "b", {"A1": "=1"}, "same.xlsx")
    code, _, err = cli(str(first), str(tmp_path / "b" / "same.xlsx"), "--out", str(tmp_path / "out"))
    assert code == 2 and "same file name" in err
    assert not (tmp_path / "out").exists()


def test_an_output_equal_to_an_input_is_refused(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1"})
    before = path.read_bytes()
    code, _, err = cli(str(path), "--out", str(tmp_path))
    assert code == 2 and "would overwrite an input" in err
    assert path.read_bytes() == before


@pytest.mark.parametrize("extra", [["--out", "x"], ["--in-place"]])
def test_check_never_writes(tmp_path, extra):
    path = one_sheet(tmp_path, {"A1": "=1"})
    assert cli(str(path), "--check", *extra)[0] == 2


def test_out_and_in_place_exclude_each_other(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1"})
    with pytest.raises(SystemExit) as stop, contextlib.redirect_stderr(io.StringIO()):
        main(["recalc", str(path), "--out", "x", "--in-place"])
    assert stop.value.code == 2


def test_help_states_the_limits():
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "recalc", "--help"], capture_output=True, text=True)
    assert done.returncode == 0
    text = " ".join(done.stdout.split())
    assert "200 MiB" in text and "100:1" in text and "1 MiB" in text and "1,000,000 formula cells" in text


def test_whole_process_run_and_exit_status_for_error_cells(tmp_path):
    path = one_sheet(tmp_path, {"A1": '=BOIL_TEMP("water",-1,"bar")', "A2": "=A1*2"})
    env = dict(os.environ, CI="1")
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "recalc", str(path)], capture_output=True, text=True,
                          env=env)
    assert done.returncode == 1  # an error cell, without --check
    lines = done.stderr.splitlines()
    assert lines[0].startswith(f"recalc: {path}: S!A1: #NUM! ")
    assert lines[1].startswith(f"recalc: {path}: S!A2: #NUM! ")
    assert re.fullmatch(r"recalc: 1 files, 2 cells, 2 errors, 0 differences, [0-9.]+ s; nothing written \(.*\)",
                        lines[-1])


# ---- interrupted writes ----------------------------------------------------------------
def test_an_interrupted_replace_leaves_the_old_file(tmp_path, monkeypatch):
    path = plant(tmp_path)
    before = path.read_bytes()

    def fail(*args):
        raise KeyboardInterrupt

    monkeypatch.setattr(os, "replace", fail)
    with pytest.raises(KeyboardInterrupt), contextlib.redirect_stderr(io.StringIO()):
        main(["recalc", str(path), "--in-place"])
    assert path.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["plant.xlsx"]


def test_a_failure_midway_through_writing_leaves_the_old_file(tmp_path, monkeypatch):
    from cellfuncs.workbook import zipout

    path = plant(tmp_path)
    before = path.read_bytes()
    calls = []

    def deflate_then_fail(data):
        calls.append(1)
        if len(calls) > 1:
            raise OSError("disk full")
        return b"x"

    monkeypatch.setattr(zipout, "_deflate", deflate_then_fail)
    code, _, err = cli(str(path), "--in-place")
    assert code == 4 and f"recalc: {path}: not written: disk full" in err  # an output error, not an internal one
    assert path.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["plant.xlsx"]


# ---- values: errors, names, references ---------------------------------------------------
def test_errors_propagate_and_iferror_catches_them(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1/0", "A2": "=A1+1", "A3": '=IFERROR(A2,"caught")', "A4": "=ISERROR(A2)",
                                "A5": '=IFERROR(BOIL_TEMP("water",-3,"bar"),-1)'})
    code, _, err = cli(str(path), "--in-place")
    assert code == 1
    ws = values(path)
    assert (ws["A1"].value, ws["A2"].value, ws["A3"].value, ws["A4"].value, ws["A5"].value) == \
           ("#DIV/0!", "#DIV/0!", "caught", True, -1)
    assert "S!A1: #DIV/0! division by zero" in err and "S!A2: #DIV/0! division by zero" in err
    assert 't="e"' in sheet(path) and "<v>#DIV/0!</v>" in sheet(path)


def test_an_unknown_built_in_is_name_error_naming_it(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=CUBEVALUE(1,B1:B2,C1:C2)", "A2": "=_xlfn.CUBEVALUE(1,B1:B2,C1:C2)"})
    code, _, err = cli(str(path))
    assert code == 1
    assert "S!A1: #NAME? unknown function CUBEVALUE" in err and "S!A2: #NAME? unknown function CUBEVALUE" in err


def test_pack_functions_with_file_format_prefixes(tmp_path):
    path = one_sheet(tmp_path, {"A1": '=_xludf.BOIL_TEMP("water",1,"atm","degC")',
                                "A2": '=_xlfn.BOIL_TEMP("water",1,"atm","degC")'})
    assert cli(str(path), "--in-place")[0] == 0
    expected = cellfuncs.BOIL_TEMP("water", 1, "atm", "degC")
    assert values(path)["A1"].value == expected and values(path)["A2"].value == expected


def test_circular_references_are_calc_errors_naming_the_loop(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=B1+1", "B1": "=C1*2", "C1": "=A1", "D1": "=A1+5", "E1": "=E1"})
    code, _, err = cli(str(path), "--in-place")
    assert code == 1
    assert "S!A1: #CALC! circular reference: S!A1 -> S!B1 -> S!C1 -> S!A1" in err
    assert "S!C1: #CALC! circular reference: S!C1 -> S!A1 -> S!B1 -> S!C1" in err
    assert "S!E1: #CALC! circular reference: S!E1 -> S!E1" in err
    assert "S!D1: #CALC! circular reference: S!A1" in err  # a cell using the loop gets its error
    ws = values(path)
    # the file's <v> holds #VALUE! for #CALC!, as Excel stores it (MS-OI29500 lists the error values Office reads)
    assert [ws[c].value for c in ("A1", "B1", "C1", "D1", "E1")] == ["#VALUE!"] * 5


def test_links_the_file_keeps_no_values_of_are_ref_errors(tmp_path):
    # tests/test_external_links.py checks links with stored values
    path = one_sheet(tmp_path, {"A1": "=[1]Sheet1!A1+1", "A2": "='[2]Other data'!B2", "A3": "=SUM([1]Sheet1!A1:A3)",
                                "A4": "=NoSheet!A1", "A5": "=[Book2.xlsx]Sheet1!A1"})
    code, _, err = cli(str(path), "--in-place")
    assert code == 1
    ws = values(path)
    assert [ws[c].value for c in ("A1", "A2", "A3", "A4", "A5")] == ["#REF!"] * 5
    assert "S!A1: #REF! [1] is a link to another workbook whose values the file does not keep" in err
    assert "S!A4: #REF! there is no sheet named NoSheet" in err
    assert "S!A5: #REF! [Book2.xlsx]Sheet1!A1 is an external reference (another workbook)" in err


def test_defined_names_in_both_scopes_and_cross_sheet_ranges(tmp_path):
    wb = openpyxl.Workbook()
    a = wb.active
    a.title = "A"
    b = wb.create_sheet("B data")
    for i in range(1, 4):
        b.cell(i, 1, float(i))
    a["A1"] = "=SUM(Numbers)"
    a["A2"] = "=Factor*2"
    a["A3"] = "=SUM('B data'!A1:A3)"
    a["A4"] = "='B data'!Factor"
    b["B1"] = "=Factor"
    a["B1"], b["C1"] = 10.0, 100.0
    wb.defined_names["Numbers"] = DefinedName("Numbers", attr_text="'B data'!$A$1:$A$3")
    a.defined_names["Factor"] = DefinedName("Factor", attr_text="A!$B$1")
    b.defined_names["Factor"] = DefinedName("Factor", attr_text="'B data'!$C$1")
    path = tmp_path / "names.xlsx"
    wb.save(path)
    assert cli(str(path), "--in-place")[0] == 0
    wa, wb_ = values(path, "A"), values(path, "B data")
    assert (wa["A1"].value, wa["A2"].value, wa["A3"].value, wa["A4"].value) == (6.0, 20.0, 6.0, 100.0)
    assert wb_["B1"].value == 100.0  # the sheet's own Factor wins over the other sheet's


def test_a_column_with_one_bad_input_gives_that_cell_its_own_error(tmp_path):
    cells: dict[str, object] = {}
    for i in range(1, 21):
        cells[f"A{i}"] = float(i)
        cells[f"B{i}"] = f'=BOIL_TEMP("water",A{i},"bar","degC")'
    cells["A7"] = "seven"
    path = one_sheet(tmp_path, cells)
    code, _, err = cli(str(path), "--in-place")
    assert code == 1
    ws = values(path)
    for i in range(1, 21):
        expected = cellfuncs.BOIL_TEMP("water", "seven" if i == 7 else float(i), "bar", "degC")
        got = ws[f"B{i}"].value
        assert got == (expected.code if i == 7 else expected)
    assert err.count("#VALUE!") == 1 and "S!B7: #VALUE!" in err


def test_a_filled_down_chain_is_evaluated_in_order(tmp_path):
    cells: dict[str, object] = {"A1": 1.0}
    cells.update({f"A{i}": f"=A{i - 1}*2" for i in range(2, 31)})
    path = one_sheet(tmp_path, cells)
    assert cli(str(path), "--in-place")[0] == 0
    assert values(path)["A30"].value == 2.0 ** 29


def test_shared_formulas_as_excel_stores_them(tmp_path):
    path = one_sheet(tmp_path, {"A1": 1.0, "A2": 2.0, "A3": 3.0, "B1": "=A1*10"})
    xml = sheet(path).replace("<f>A1*10</f>", '<f t="shared" ref="B1:B3" si="0">A1*10</f>')
    xml = xml.replace('<c r="A2" t="n"><v>2</v></c>', '<c r="A2" t="n"><v>2</v></c><c r="B2"><f t="shared" si="0"/></c>')
    xml = xml.replace('<c r="A3" t="n"><v>3</v></c>', '<c r="A3" t="n"><v>3</v></c><c r="B3"><f t="shared" si="0"/></c>')
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    assert cli(str(path), "--in-place")[0] == 0
    ws = values(path)
    assert [ws[f"B{i}"].value for i in (1, 2, 3)] == [10.0, 20.0, 30.0]
    assert '<f t="shared" si="0"/>' in sheet(path)  # the formula storage is kept


def test_volatile_markers_inside_a_legacy_array_range_are_cells_of_the_array(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    for i in range(1, 4):
        ws.cell(i, 1, float(i))
    ws["C1"] = ArrayFormula("C1:C3", "=A1:A3*2")
    path = tmp_path / "marked.xlsx"
    wb.save(path)
    # Excel writes <f ca="1"/> into the other cells of a volatile array formula's range
    xml = sheet(path)
    for r in (2, 3):
        xml = xml.replace(f'<c r="A{r}" t="n"><v>{r}</v></c>', f'<c r="A{r}" t="n"><v>{r}</v></c><c r="C{r}"><f ca="1"/></c>')
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    code, _, err = cli(str(path), "--in-place")
    assert code == 0, err
    assert [values(path)[f"C{i}"].value for i in range(1, 4)] == [2.0, 4.0, 6.0]


def test_legacy_array_formula_fills_its_range(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    for i in range(1, 4):
        ws.cell(i, 1, float(i))
    ws["C1"] = ArrayFormula("C1:C4", "=A1:A3*2")
    path = tmp_path / "legacy.xlsx"
    wb.save(path)
    code, _, err = cli(str(path), "--in-place")
    ws = values(path)
    # Excel behaviour (common practice): places beyond the result of an {=array} formula show #N/A
    assert [ws[f"C{i}"].value for i in range(1, 5)] == [2.0, 4.0, 6.0, "#N/A"]
    xml = sheet(path)
    assert '<f t="array" ref="C1:C4">' in xml and 'cm="' not in xml


# ---- spills ------------------------------------------------------------------------------
def test_a_spill_is_stored_as_a_dynamic_array(tmp_path):
    path = one_sheet(tmp_path, {"A1": '=PHASE_LINE("water","boil",300,400,3)', "D1": "=A3*2", "D2": "=SUM(B1:B3)"},
                     spills=("A1",))
    assert cli(str(path), "--in-place")[0] == 0
    xml = sheet(path)
    m = re.search(r'<c r="A1"([^>]*)><f t="array" ref="A1:B3">PHASE_LINE\(', xml)
    assert m and re.search(r'cm="(\d+)"', m.group(1))
    cm = int(re.search(r'cm="(\d+)"', m.group(1)).group(1))
    files = contents(path)
    meta = files["xl/metadata.xml"].decode()
    assert '<metadataType name="XLDAPR"' in meta and 'fDynamic="1"' in meta and '<futureMetadata name="XLDAPR"' in meta
    assert meta.count("<bk><rc ") == cm == 1
    assert 'PartName="/xl/metadata.xml"' in files["[Content_Types].xml"].decode()
    assert "relationships/sheetMetadata" in files["xl/_rels/workbook.xml.rels"].decode()
    expected = cellfuncs.PHASE_LINE("water", "boil", 300, 400, 3)
    ws = values(path)
    assert [[ws.cell(r, c).value for c in (1, 2)] for r in (1, 2, 3)] == expected.tolist()
    assert ws["D1"].value == 800.0  # a reference into the spill waits for its anchor
    assert ws["D2"].value == pytest.approx(expected[:, 1].sum(), rel=1e-15)
    assert cli(str(path), "--check")[0] == 0
    assert cli(str(path), "--in-place")[0] == 0
    assert contents(path)["xl/metadata.xml"].decode().count("<bk><rc ") == 1  # the record is reused


def test_an_array_constant_spills(tmp_path):
    path = one_sheet(tmp_path, {"A1": "={1,2;3,4}*10"}, spills=("A1",))
    assert cli(str(path), "--in-place")[0] == 0
    ws = values(path)
    assert [[ws.cell(r, c).value for c in (1, 2)] for r in (1, 2)] == [[10, 20], [30, 40]]
    assert '<f t="array" ref="A1:B2">' in sheet(path)


def test_a_blocked_spill_is_a_spill_error(tmp_path):
    path = one_sheet(tmp_path, {"A1": '=PHASE_LINE("water","boil",300,400,3)', "B2": "in the way"}, spills=("A1",))
    code, _, err = cli(str(path), "--in-place")
    assert code == 1
    assert "S!A1: #SPILL! the 3x2 result would overwrite S!B2" in err
    ws = values(path)
    assert ws["A1"].value == "#VALUE!" and ws["B2"].value == "in the way" and ws["A2"].value is None  # #SPILL! in <v>


def test_a_spill_that_shrinks_clears_its_old_cells(tmp_path):
    path = one_sheet(tmp_path, {"D1": 5.0, "A1": '=PHASE_LINE("water","boil",300,400,D1)', "F1": "=SUM(A:A)"},
                     spills=("A1",))
    assert cli(str(path), "--in-place")[0] == 0
    assert values(path)["F1"].value == pytest.approx(300 + 325 + 350 + 375 + 400, rel=1e-15)
    assert '<f t="array" ref="A1:B5">' in sheet(path)
    xml = sheet(path).replace('<c r="D1" t="n"><v>5</v></c>', '<c r="D1" t="n"><v>3</v></c>')
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    code, out, _ = cli(str(path), "--check")
    assert code == 1 and f"{path}\tS!A1\tspill 5x2\tspill 3x2\n" in out
    cli(str(path), "--in-place")
    xml = sheet(path)
    assert '<f t="array" ref="A1:B3">' in xml
    ws = values(path)
    assert ws["A3"].value == 400.0 and ws["A4"].value is None and ws["B5"].value is None
    assert ws["F1"].value == pytest.approx(300 + 350 + 400, rel=1e-15)
    assert cli(str(path), "--check")[0] == 0


def test_a_thousand_row_spill(tmp_path):
    path = one_sheet(tmp_path, {"D1": '=PHASE_LINE("water","boil",280,640,1000)', "G1": "=D1000+E1000"}, spills=("D1",))
    assert cli(str(path), "--in-place")[0] == 0
    assert '<f t="array" ref="D1:E1000">' in sheet(path)
    expected = cellfuncs.PHASE_LINE("water", "boil", 280, 640, 1000)
    ws = values(path)
    got = np.array([[ws.cell(r, c).value for c in (4, 5)] for r in range(1, 1001)], dtype=float)
    assert np.array_equal(got, expected)
    assert ws["G1"].value == expected[-1, 0] + expected[-1, 1]
    assert re.search(r'<dimension ref="D1:G1000"', sheet(path))


def test_a_hundred_by_hundred_grid(tmp_path):
    temps = np.linspace(-20.0, 400.0, 100)  # degC
    pressures = np.geomspace(0.001, 500.0, 100)  # bar
    wb = openpyxl.Workbook()
    ws = wb.active
    for j, t in enumerate(temps):
        ws.cell(1, j + 2, float(t))
    for i, p in enumerate(pressures):
        ws.cell(i + 2, 1, float(p))
    spill(ws, "B2", '=STABLE_PHASE("water",B1:CW1,A2:A101,"degC","bar")')
    path = tmp_path / "grid.xlsx"
    save(wb, path)
    assert cli(str(path), "--in-place")[0] == 0
    assert '<f t="array" ref="B2:CW101">' in sheet(path)
    expected = cellfuncs.STABLE_PHASE("water", temps.reshape(1, -1), pressures.reshape(-1, 1), "degC", "bar")
    ws = values(path)
    got = [[ws.cell(r, c).value for c in range(2, 102)] for r in range(2, 102)]
    assert got == expected.tolist()
    assert cli(str(path), "--check")[0] == 0


# ---- files as other programs write them ------------------------------------------------------
def test_a_sheet_written_with_a_namespace_prefix(tmp_path):
    path = one_sheet(tmp_path, {"A1": 2.0, "A2": '=PHASE_LINE("water","boil",300,400,A1)', "C1": "=A1*3"}, spills=("A2",))
    xml = sheet(path)
    xml = re.sub(r"<(/?)(\w+)", r"<\1x:\2", xml).replace('xmlns="', 'xmlns:x="')
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    assert cli(str(path), "--in-place")[0] == 0
    out = sheet(path)
    assert '<x:c r="A2" cm="1"><x:f t="array" ref="A2:B3">' in out and '<x:row r="3"><x:c r="A3">' in out
    ws = values(path)
    assert (ws["C1"].value, ws["A3"].value) == (6.0, 400.0)


def test_cell_tags_written_in_every_form_xml_allows_keep_their_attributes_as_written(tmp_path):
    # XML 1.0 section 3.1: attributes in any order, each after any whitespace, in either quotes;
    # ECMA-376 Part 1, 18.3.1.4: a cell's t says the type of its value, so only t changes with it
    # (both section numbers from memory)
    path = one_sheet(tmp_path, {"A1": 2.0, "B1": "=A1*3", "C1": '=A1&"x"', "D1": "=A1>1", "E1": "=A1/0"})
    xml = (sheet(path).replace('<c r="B1">', "<c\n\tr='B1'  s=\"0\" >").replace('<c r="C1">', '<c s="0" r="C1" t="n">')
           .replace('<c r="D1">', '<c r="D1" s="0" t="n">').replace('<c r="E1">', '<c r="E1" t="str">'))
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    assert cli(str(path), "--in-place")[0] == 1  # E1 is an error cell
    out = sheet(path)
    assert "<c\n\tr='B1'  s=\"0\"><f>A1*3</f><v>6</v></c>" in out
    assert '<c s="0" r="C1" t="str"><f>A1&amp;"x"</f><v>2x</v></c>' in out
    assert '<c r="D1" s="0" t="b"><f>A1&gt;1</f><v>1</v></c>' in out
    assert '<c r="E1" t="e"><f>A1/0</f><v>#DIV/0!</v></c>' in out


def test_spill_cells_go_into_empty_rows_and_styled_cells(tmp_path):
    path = one_sheet(tmp_path, {"A1": '=PHASE_LINE("water","boil",300,400,4)', "D4": "beyond"}, spills=("A1",))
    xml = sheet(path).replace('<row r="4">', '<row r="2" spans="1:2"/><row r="3" spans="5:5"><c r="B3" s="0"/>'
                                             '<c r="E3" t="n"><v>7</v></c></row><row r="4">')
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode()})
    assert cli(str(path), "--in-place")[0] == 0
    out = sheet(path)
    assert '<row r="2"><c r="A2"><v>' in out  # a self-closing row opened; spans (a hint) dropped
    assert re.search(r'<row r="3"><c r="A3"><v>[^<]*</v></c><c r="B3" s="0"><v>[^<]*</v></c><c r="E3" t="n">', out)
    expected = cellfuncs.PHASE_LINE("water", "boil", 300, 400, 4)
    ws = values(path)
    assert [[ws.cell(r, c).value for c in (1, 2)] for r in range(1, 5)] == expected.tolist()
    assert ws["E3"].value == 7 and ws["D4"].value == "beyond"


def test_cells_without_references_and_other_value_types(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=B1&C1", "A2": "=IF(D1,E1,0)", "A3": "=ISERROR(F1)", "A4": "=G1"})
    xml = sheet(path).replace('<row r="1">', '<row r="1" spans="1:7">')
    xml = re.sub(r'(<c r="A1">.*?</c>)', r'\1<c t="s"><v>0</v></c><c t="inlineStr"><is><r><t>in</t></r><r><t>line</t>'
                 r'</r><rPh sb="0" eb="1"><t>x</t></rPh></is></c><c t="b"><v>1</v></c><c><v>2.5e3</v></c><c t="e"><v>#N/A</v></c>'
                 r'<c t="str"><v>text</v></c>', xml, count=1)
    sst = (b'<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="1" uniqueCount="1"><si>'
           b'<r><t>rich </t></r><r><t>text</t></r></si></sst>')
    types = contents(path)["[Content_Types].xml"].replace(
        b"</Types>", b'<Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-'
                     b'officedocument.spreadsheetml.sharedStrings+xml"/></Types>')
    rels = contents(path)["xl/_rels/workbook.xml.rels"].replace(
        b"</Relationships>", b'<Relationship Id="rId50" Type="http://schemas.openxmlformats.org/officeDocument/2006/'
                             b'relationships/sharedStrings" Target="sharedStrings.xml"/></Relationships>')
    rewrite(path, {"xl/worksheets/sheet1.xml": xml.encode(), "xl/sharedStrings.xml": sst, "[Content_Types].xml": types,
                   "xl/_rels/workbook.xml.rels": rels})
    assert cli(str(path), "--in-place")[0] == 0
    ws = values(path)
    assert [ws[f"A{i}"].value for i in range(1, 5)] == ["rich textinline", 2500, True, "text"]


def test_text_results_are_escaped(tmp_path):
    path = one_sheet(tmp_path, {"A1": 'ab<c>&"d"', "B1": '=A1&" 25 °C"'})
    assert cli(str(path), "--in-place")[0] == 0
    assert values(path)["B1"].value == 'ab<c>&"d" 25 °C'


def test_sheet_names_that_need_quotes(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "it's here"
    ws["A1"] = "=B1"
    ws["B1"] = "=A1"
    ws["C1"] = "='it''s here'!D1*2"
    ws["D1"] = 4.0
    path = tmp_path / "quotes.xlsx"
    wb.save(path)
    code, _, err = cli(str(path), "--in-place")
    assert code == 1
    assert "'it''s here'!A1: #CALC! circular reference: 'it''s here'!A1 -> 'it''s here'!B1 -> 'it''s here'!A1" in err
    assert values(path)["C1"].value == 8.0


def test_a_loop_between_a_column_group_and_a_cell_is_not_a_circular_reference(tmp_path):
    # A1 and A2 share one shape; A1 needs B1, which needs A2: no cell needs itself
    path = one_sheet(tmp_path, {"A1": "=B1+1", "A2": "=B2+1", "B1": "=A2*10", "B2": 5.0})
    assert cli(str(path), "--in-place")[0] == 0
    ws = values(path)
    assert (ws["A1"].value, ws["A2"].value, ws["B1"].value) == (61.0, 6.0, 60.0)


def test_a_formula_above_what_it_needs(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=A2*2", "A2": "=A3+1", "A3": "=Later!A1", "B1": "=SUM(A1:A3)"})
    wb = openpyxl.load_workbook(path)
    wb.create_sheet("Later")["A1"] = "=10/4"
    wb.save(path)
    assert cli(str(path), "--in-place")[0] == 0
    ws = values(path)
    assert [ws[c].value for c in ("A1", "A2", "A3", "B1")] == [7.0, 3.5, 2.5, 13.0]


def test_a_batched_if_matches_cell_by_cell_evaluation(tmp_path):
    cells: dict[str, object] = {}
    inputs = [5.0, -1.0, 0.0, 12.0, 600.0, 1.0]  # bar; -1 and 0 are not pressures, 600 is above the critical point
    for i, p in enumerate(inputs, start=1):
        cells[f"A{i}"] = p
        cells[f"B{i}"] = f'=IF(A{i}>0,BOIL_TEMP("water",A{i},"bar","degC"),"none")'
    path = one_sheet(tmp_path, cells)
    cli(str(path), "--in-place")
    ws = values(path)
    for i, p in enumerate(inputs, start=1):
        expected = cellfuncs.BOIL_TEMP("water", p, "bar", "degC") if p > 0 else "none"
        assert ws[f"B{i}"].value == (expected.code if isinstance(expected, cellfuncs.CellError) else expected)


def test_names_holding_constants_and_arrays(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws["A1"] = "=Half*4"
    ws["A2"] = "=SUM(Triple)"
    ws["A3"] = "=Missing+1"
    wb.defined_names["Half"] = DefinedName("Half", attr_text="0.5")
    wb.defined_names["Triple"] = DefinedName("Triple", attr_text="{1,2,3}")
    path = tmp_path / "names.xlsx"
    wb.save(path)
    code, _, err = cli(str(path), "--in-place")
    assert code == 1 and "#NAME? unknown name Missing" in err
    ws = values(path)
    assert (ws["A1"].value, ws["A2"].value) == (2.0, 6.0)


def test_an_xlsm_keeps_its_macros_byte_identical(tmp_path):
    path = one_sheet(tmp_path, {"A1": "=1+1"}, "macro.xlsm")
    rewrite(path, {"xl/vbaProject.bin": os.urandom(5000)})
    before = stored(path)["xl/vbaProject.bin"]
    assert cli(str(path), "--in-place")[0] == 0
    assert stored(path)["xl/vbaProject.bin"] == before


def test_existing_cell_metadata_gets_a_dynamic_array_record(tmp_path):
    path = one_sheet(tmp_path, {"A1": "={1;2}"})
    meta = (b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<metadata xmlns="http://schemas.openxmlformats.org'
            b'/spreadsheetml/2006/main"><metadataTypes count="1"><metadataType name="XLMDX" minSupportedVersion="120000"/>'
            b'</metadataTypes><cellMetadata count="1"><bk><rc t="1" v="0"/></bk></cellMetadata></metadata>')
    types = contents(path)["[Content_Types].xml"].replace(
        b"</Types>", b'<Override PartName="/xl/metadata.xml" ContentType="application/vnd.openxmlformats-officedocument.'
                     b'spreadsheetml.sheetMetadata+xml"/></Types>')
    rels = contents(path)["xl/_rels/workbook.xml.rels"].replace(
        b"</Relationships>", b'<Relationship Id="rId9" Type="http://schemas.openxmlformats.org/officeDocument/2006/'
                             b'relationships/sheetMetadata" Target="metadata.xml"/></Relationships>')
    rewrite(path, {"xl/metadata.xml": meta, "[Content_Types].xml": types, "xl/_rels/workbook.xml.rels": rels})
    mark_spills(path, {"S": ["A1"]})  # the record is added to the metadata the workbook has
    assert cli(str(path), "--in-place")[0] == 0
    from cellfuncs.workbook.model import dynamic_cm
    from cellfuncs.workbook.package import parse_xml

    new = contents(path)["xl/metadata.xml"]
    assert dynamic_cm(parse_xml(new, "m")) == "2"
    assert b'<metadataTypes count="2">' in new and b'<cellMetadata count="2">' in new
    assert '<c r="A1" cm="2"><f t="array" ref="A1:A2">' in sheet(path)
    assert contents(path)["[Content_Types].xml"].count(b"/xl/metadata.xml") == 1
    assert [values(path)[c].value for c in ("A1", "A2")] == [1, 2]


# ---- many workbooks: folders, --jobs, --shard ---------------------------------------------
SHIPPED = Path(__file__).resolve().parents[1] / "workbooks"


def test_a_dry_run_says_nothing_was_written_and_how_to_write(tmp_path):
    code, _, err = cli(str(plant(tmp_path)))
    assert code == 0 and "nothing written" in err.splitlines()[-1] and "--out DIR or --in-place" in err


def test_a_folder_stands_for_its_workbooks_in_all_subfolders_by_name(tmp_path):
    from cellfuncs.workbook.command import workbook_list

    for name in ("b/two.xlsx", "a/one.xlsm", "three.XLSX", "a/~$one.xlsm", "notes.txt"):
        (tmp_path / name).parent.mkdir(exist_ok=True)
        (tmp_path / name).write_bytes(b"")
    assert workbook_list([str(tmp_path)]) == [str(tmp_path / n) for n in ("a/one.xlsm", "b/two.xlsx", "three.XLSX")]


@pytest.mark.parametrize("shares", [1, 2, 3, 7])
def test_shards_cover_the_list_once(shares):
    from cellfuncs.workbook.command import workbook_list

    files = [f"book{k}.xlsx" for k in range(10)]
    parts = [workbook_list(files, (k, shares)) for k in range(1, shares + 1)]
    assert sorted(sum(parts, [])) == sorted(files)
    assert max(map(len, parts)) - min(map(len, parts)) <= 1  # equal shares


@pytest.mark.parametrize("text", ["0/2", "3/2", "2", "a/b", "1/0"])
def test_a_shard_outside_one_to_n_is_a_usage_error(text):
    with pytest.raises(SystemExit) as stop, contextlib.redirect_stderr(io.StringIO()):
        main(["recalc", "x.xlsx", "--shard", text])
    assert stop.value.code == 2


def test_parallel_jobs_write_what_one_job_writes(tmp_path):
    """The shipped workbooks recalculated by two processes and by one: the same files, the same report."""
    runs = {}
    for jobs in ("1", "2"):
        out = tmp_path / jobs
        code, stdout, err = cli(str(SHIPPED), "--out", str(out), "--jobs", jobs)
        runs[jobs] = (code, stdout, err.splitlines()[:-1], {p.name: stored(p) for p in sorted(out.iterdir())})
        assert err.splitlines()[-1].startswith("recalc: 4 files, ")
    assert runs["1"] == runs["2"]
    assert not [p for p in tmp_path.rglob("*.tmp")]
