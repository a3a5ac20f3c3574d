"""Volatile built-ins (NOW, TODAY, RAND, RANDBETWEEN, RANDARRAY) and the options that make a
recalculation with them repeatable: ``--now`` and ``--seed`` pin them, ``--check
--ignore-volatile`` leaves the cells that depend on them out.

Expected values: 2 January 2024 is serial 45293 and 18:00 is 0.75 of a day (Microsoft
Support, "Date systems in Excel" and the NOW page, from memory); the ranges of RAND and
RANDBETWEEN are those of their Microsoft pages (from memory); the rest is the command's
contract, in small workbooks of our own.
"""

from __future__ import annotations

import datetime as dt

import openpyxl
import pytest

from cellfuncs.formula import compute
from cellfuncs.formula.clock import fixed
from test_recalc import cli, values


def test_now_and_today_read_the_pinned_clock():
    with fixed(dt.datetime(2024, 1, 2, 18)):
        assert compute("=NOW()") == 45293.75 and compute("=TODAY()") == 45293
        assert compute("=TEXT(NOW(), \"yyyy-mm-dd hh:mm\")") == "2024-01-02 18:00"


def test_random_functions_stay_in_their_ranges_and_repeat_from_a_seed():
    def draws():
        with fixed(seed=3):
            return [compute("=RAND()"), compute("=RANDBETWEEN(-2.5, 2.5)"), compute("=RANDARRAY(2, 2, 10, 20, TRUE)")]

    first, again = draws(), draws()
    assert 0 <= first[0] < 1 and first[1] in (-2, -1, 0, 1, 2)
    assert all(10 <= x <= 20 and x == int(x) for x in first[2].flat)
    assert first[:2] == again[:2] and first[2].tolist() == again[2].tolist()
    assert compute("=RANDBETWEEN(3, 1)").code == "#NUM!" and compute("=RANDARRAY(0)").code == "#VALUE!"


def test_recalc_pins_volatile_functions_and_check_can_leave_them_out(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    ws["A1"], ws["A2"], ws["A3"], ws["A4"] = "=NOW()", "=RAND()", "=A2*2", "=1+1"
    wb.save(tmp_path / "v.xlsx")
    pinned = ("--now", "2024-01-02T18:00", "--seed", "7")
    assert cli(str(tmp_path / "v.xlsx"), "--in-place", *pinned)[0] == 0
    assert values(tmp_path / "v.xlsx")["A1"].value == 45293.75
    assert cli(str(tmp_path / "v.xlsx"), "--check", *pinned)[0] == 0  # the same moment and seed: the same values
    code, out, _ = cli(str(tmp_path / "v.xlsx"), "--check")
    assert code == 1 and "S!A1" in out and "S!A3" in out and "S!A4" not in out
    assert cli(str(tmp_path / "v.xlsx"), "--check", "--ignore-volatile")[0] == 0
    with pytest.raises(SystemExit) as exit_:  # argparse's usage error
        cli(str(tmp_path / "v.xlsx"), "--check", "--now", "yesterday")
    assert exit_.value.code == 2
