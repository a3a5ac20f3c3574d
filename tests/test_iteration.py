"""Iterative calculation as the workbook sets it (Excel: File > Options > Formulas > Enable
iterative calculation, with its maximum iterations and maximum change; stored as calcPr
iterate, iterateCount, iterateDelta): a loop is evaluated again and again instead of being
#CALC!.

Expected values: the fixed point of the loop, worked by hand (A1 = (A2 + 10)/2 and
A2 = A1/2 give A1 = 20/3); a loop in a workbook that does not ask for iteration stays
#CALC! (Excel reports a circular reference; common practice).
"""

from __future__ import annotations

import openpyxl
import pytest

from cellfuncs.workbook.authoring import save
from test_recalc import cli, values


def _loop(tmp_path, iterate: bool, count: int = 100, delta: float = 1e-9):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    ws["A1"], ws["A2"], ws["B1"] = "=(A2+10)/2", "=A1/2", "=A1*3"
    wb.calculation.iterate, wb.calculation.iterateCount, wb.calculation.iterateDelta = iterate, count, delta
    path = tmp_path / "loop.xlsx"
    save(wb, path)
    cli(str(path), "--in-place")
    return values(path)


def test_a_loop_converges_when_the_workbook_iterates(tmp_path):
    got = _loop(tmp_path, True)
    assert got["A1"].value == pytest.approx(20 / 3, rel=1e-8) and got["A2"].value == pytest.approx(10 / 3, rel=1e-8)
    assert got["B1"].value == pytest.approx(20, rel=1e-8)  # a cell after the loop reads its last values


def test_the_maximum_count_stops_the_iteration(tmp_path):
    got = _loop(tmp_path, True, count=1)  # one sweep from empty cells: A1 = 5, A2 = 2.5
    assert got["A1"].value == 5 and got["A2"].value == 2.5


def test_a_loop_is_circular_without_iteration(tmp_path):
    got = _loop(tmp_path, False)
    # the engine's #CALC! is stored as #VALUE!, the form a cell's <v> holds it in (writer.FILE_ERRORS)
    assert got["A1"].value == "#VALUE!" and got["B1"].value == "#VALUE!"
    assert cli(str(tmp_path / "loop.xlsx"), "--check")[0] == 0  # and the file checks clean against itself
