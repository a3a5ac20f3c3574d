"""``cellfuncs recalc``: the limits on work are options, name themselves when reached, and the
output side fails with its own exit status; ``--help`` lists every limit and exit code.

Expected texts are the command's contract (cellfuncs/workbook/command.py, limits.py).
"""

from __future__ import annotations

import contextlib
import errno
import io
import os
import re
import subprocess
import sys
from pathlib import Path

import openpyxl
import pytest

from cellfuncs.cli import main
from cellfuncs.workbook.limits import DEFAULTS, FIELDS, option
from test_recalc import one_sheet as book  # the same one-sheet workbook the recalc tests build


def cli(*args: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["recalc", *args])
    return code, out.getvalue(), err.getvalue()


def value(path: Path, ref: str) -> object:
    return openpyxl.load_workbook(path, data_only=True).active[ref].value


# ---- each limit: reached, named, raised -------------------------------------------------
def test_a_range_over_the_array_limit_is_an_error_naming_it_until_raised(tmp_path):
    cells: dict[str, object] = {f"A{r}": 1.0 for r in range(1, 101)}
    cells["C1"] = "=SUM(A1:B100)"  # 200 cells
    path = book(tmp_path, cells)
    code, _, err = cli(str(path), "--in-place", "--max-array-cells", "199")
    assert code == 1 and value(path, "C1") == "#NUM!"
    assert "S!C1: #NUM! the 100x2 array would have 200 cells, over the limit of 199 cells per array " \
           "(--max-array-cells)" in err
    assert cli(str(path), "--in-place", "--max-array-cells", "200")[0] == 0 and value(path, "C1") == 100


def test_the_work_of_one_formula_is_counted_over_all_its_arrays(tmp_path):
    cells: dict[str, object] = {f"A{r}": float(r) for r in range(1, 11)}
    cells["C1"] = "=SUM(A1:A10*2+A1:A10)"  # reads 10 twice, builds 10 twice: 40 cells (as a spill: no intersection)
    cells["C2"] = "=A1*2"
    path = book(tmp_path, cells, spills=("C1",))
    code, _, err = cli(str(path), "--in-place", "--max-formula-work", "39")
    assert code == 1 and value(path, "C1") == "#NUM!" and value(path, "C2") == 2
    assert "the formula would build more than 39 array cells in all, the limit per formula (--max-formula-work)" in err
    assert cli(str(path), "--in-place", "--max-formula-work", "40")[0] == 0 and value(path, "C1") == 165


def test_the_work_of_all_formulas_of_a_workbook_is_counted(tmp_path):
    cells: dict[str, object] = {f"A{r}": 1.0 for r in range(1, 11)}
    cells.update({f"C{r}": "=SUM(A1:A10)" for r in range(1, 6)})  # 10 cells each
    path = book(tmp_path, cells)
    code, _, err = cli(str(path), "--in-place", "--max-workbook-work", "30")
    assert code == 1 and [value(path, f"C{r}") for r in range(1, 6)] == [10, 10, 10, "#NUM!", "#NUM!"]
    assert "S!C4: #NUM! the formulas of the workbook would build more than 30 array cells in all, the limit per " \
           "workbook (--max-workbook-work)" in err
    assert cli(str(path), "--in-place", "--max-workbook-work", "50")[0] == 0 and value(path, "C5") == 10


def test_spilled_cells_of_a_workbook_are_counted(tmp_path):
    path = book(tmp_path, {"A1": "={1,2;3,4}", "D1": "={1,2,3}"}, spills=("A1", "D1"))
    code, _, err = cli(str(path), "--in-place", "--max-spill-cells", "6")
    assert code == 1
    assert "S!D1: #SPILL! the 1x3 result would bring the spilled cells of the workbook over the limit of 6 " \
           "(--max-spill-cells)" in err
    assert value(path, "A1") == 1 and value(path, "B2") == 4
    assert cli(str(path), "--in-place", "--max-spill-cells", "7")[0] == 0 and value(path, "F1") == 3


def test_stored_array_ranges_beyond_the_spill_limit_refuse_the_file(tmp_path):
    path = book(tmp_path, {"A1": 1.0})
    wb = openpyxl.load_workbook(path)
    from openpyxl.worksheet.formula import ArrayFormula

    wb.active["B1"] = ArrayFormula("B1:B10", "=A1*2")
    wb.save(path)
    code, _, err = cli(str(path), "--check", "--max-spill-cells", "9")
    assert code == 2 and "refused: S!B1: the array formula's range B1:B10 (10 cells) brings the array ranges of " \
                          "the workbook to 10 cells, over the limit of 9 (--max-spill-cells)" in err
    assert cli(str(path), "--check", "--max-spill-cells", "10")[0] in (0, 1)


def test_dependencies_beyond_the_limit_refuse_the_file(tmp_path):
    path = book(tmp_path, {"A1": 1.0, "A2": "=A1+1", "A3": "=A2+1", "A4": "=SUM(A1:A3)"})
    code, _, err = cli(str(path), "--check", "--max-dependencies", "3")
    assert code == 2 and "over the limit of 3 (--max-dependencies)" in err
    assert cli(str(path), "--check", "--max-dependencies", "5")[0] in (0, 1)


@pytest.mark.parametrize("text", ["0", "-5", "1.5", "many", "inf"])
def test_a_limit_is_a_whole_number_of_at_least_one(text):
    with pytest.raises(SystemExit) as stop, contextlib.redirect_stderr(io.StringIO()):
        main(["recalc", "x.xlsx", "--max-array-cells", text])
    assert stop.value.code == 2


# ---- the output side ------------------------------------------------------------------
def test_out_under_a_file_is_its_own_exit_status(tmp_path):
    path = book(tmp_path, {"A1": "=1+1"})
    (tmp_path / "a file").write_text("x")
    code, _, err = cli(str(path), "--out", str(tmp_path / "a file" / "sub"))
    assert code == 4 and "cannot create the folder" in err and "Not a directory" in err


def test_a_folder_where_the_output_goes_is_its_own_exit_status(tmp_path):
    path = book(tmp_path, {"A1": "=1+1"})
    (tmp_path / "out" / "book.xlsx").mkdir(parents=True)
    code, _, err = cli(str(path), "--out", str(tmp_path / "out"))
    assert code == 4 and f"recalc: {path}: not written: the destination is a folder" in err


@pytest.mark.parametrize("failure, words", [(errno.ENOSPC, "No space left on device"),
                                            (errno.EROFS, "Read-only file system"),
                                            (errno.EACCES, "Permission denied")])
def test_operating_system_errors_of_the_output_are_named_and_leave_the_input(tmp_path, monkeypatch, failure, words):
    from cellfuncs.workbook import zipout

    path = book(tmp_path, {"A1": "=1+1"})
    before = path.read_bytes()

    def refuse(*args, **kwargs):
        raise OSError(failure, os.strerror(failure), str(path))

    monkeypatch.setattr(zipout.os, "fsync", refuse)
    code, _, err = cli(str(path), "--in-place")
    assert code == 4 and f"recalc: {path}: not written: {words} ({path})" in err
    assert path.read_bytes() == before and [p.name for p in tmp_path.iterdir()] == ["book.xlsx"]


def test_an_output_failure_does_not_stop_the_other_files(tmp_path):
    first, second = book(tmp_path, {"A1": "=1+1"}, "first.xlsx"), book(tmp_path, {"A1": "=2+2"}, "second.xlsx")
    (tmp_path / "out" / "first.xlsx").mkdir(parents=True)
    code, _, err = cli(str(first), str(second), "--out", str(tmp_path / "out"))
    assert code == 4 and value(tmp_path / "out" / "second.xlsx", "A1") == 4


def test_two_links_to_one_file_are_one_file_for_in_place(tmp_path):
    path = book(tmp_path, {"A1": "=1+1"})
    (tmp_path / "link.xlsx").symlink_to(path)
    (tmp_path / "other").mkdir()
    (tmp_path / "other" / "again.xlsx").symlink_to(path)
    code, _, err = cli(str(path), str(tmp_path / "other" / "again.xlsx"), "--in-place")
    assert code == 2 and "are the same file" in err


# ---- --help --------------------------------------------------------------------------------
def test_help_lists_every_exit_code_and_every_limit():
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "recalc", "--help"], capture_output=True, text=True)
    assert done.returncode == 0
    text = " ".join(done.stdout.split())
    for code in range(5):
        assert re.search(rf"(?:^| ){code} (?:every|an|a usage)", text), code
    for name in FIELDS:
        assert f"{option(name)} N" in text and f"(default {getattr(DEFAULTS, name):,})" in text
    assert "32,767 characters" in text and "8,192" in text and "--split-hard-links" in text
    top = subprocess.run([sys.executable, "-m", "cellfuncs", "--help"], capture_output=True, text=True).stdout
    assert "4 an output that could not be written" in " ".join(top.split())


# ---- defined names ---------------------------------------------------------------------
def _engine(path: Path, functions: dict):
    from cellfuncs.workbook.engine import Recalc
    from cellfuncs.workbook.model import load
    from cellfuncs.workbook.package import Package

    pkg = Package(str(path))
    try:
        engine = Recalc(load(pkg), functions)
        engine.run()
    finally:
        pkg.close()
    return engine


def _named_book(tmp_path: Path, cells: dict[str, object], names: dict[str, str]) -> Path:
    from openpyxl.workbook.defined_name import DefinedName

    path = book(tmp_path, cells)
    wb = openpyxl.load_workbook(path)
    for name, text in names.items():
        wb.defined_names[name] = DefinedName(name, attr_text=text)
    wb.save(path)
    return path


def test_a_name_is_evaluated_once_however_many_cells_and_names_use_it(tmp_path):
    calls = []

    def tick() -> float:
        calls.append(1)
        return 2.0

    cells = {f"A{r}": "=Twice+Base" for r in range(1, 51)}
    path = _named_book(tmp_path, cells, {"Base": "TICK()", "Twice": "Base+Base"})
    engine = _engine(path, {"TICK": tick})
    assert [engine.values[0][(r, 1)] for r in (1, 50)] == [6.0, 6.0]
    assert len(calls) == 1


def test_a_name_using_the_cells_position_has_a_value_per_cell(tmp_path):
    path = _named_book(tmp_path, {"A5": "=Here", "B7": "=Here*10", "C2": "=Deeper"},
                       {"Here": "ROW()", "Deeper": "Here+COLUMN()"})
    engine = _engine(path, {})
    assert (engine.values[0][(5, 1)], engine.values[0][(7, 2)], engine.values[0][(2, 3)]) == (5.0, 70.0, 5.0)


def test_names_in_a_loop_name_it(tmp_path):
    path = _named_book(tmp_path, {"A1": "=Ping"}, {"Ping": "Pong+1", "Pong": "Ping*2"})
    code, _, err = cli(str(path), "--check")
    assert code == 1 and "circular reference: the name P" in err and "-> the name P" in err
