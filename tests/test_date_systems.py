"""The 1904 date system: a workbook that counts dates from 1904-01-01 (Excel's setting
"Use 1904 date system", stored as workbookPr date1904) gets serials, weekdays and date
texts in that system.

Expected values: 1 January 1904 was a Friday and day 0 of that system, 2 January 2024 is
day 45,293 of the 1900 system and 1,462 days fewer in the 1904 one (Microsoft Support,
"Date systems in Excel", from memory); and the values Excel stored in POI's date-format
workbooks, which use the 1904 system (skipped when ../shared/excel-reference is absent, a
failure under CI=true).
"""

from __future__ import annotations

import openpyxl
import pytest
from openpyxl.utils.datetime import CALENDAR_MAC_1904

from cellfuncs.workbook import conformance
from cellfuncs.workbook.authoring import save
from test_recalc import cli, values
from test_tables import _reference


def test_a_1904_workbook_counts_from_1904(tmp_path):
    wb = openpyxl.Workbook()
    wb.epoch = CALENDAR_MAC_1904
    ws = wb.active
    ws.title = "S"
    ws["A1"], ws["A2"], ws["A3"] = "=DATE(2024,1,2)", "=YEAR(0)&\"-\"&MONTH(0)&\"-\"&DAY(0)", "=WEEKDAY(0)"
    ws["A4"], ws["A5"] = '=TEXT(0,"dddd d mmm yyyy")', '=DATEVALUE("2024-01-02")'
    ws["A6"] = "=DATE(1902,1,1)"  # before the system's first day
    path = tmp_path / "mac.xlsx"
    save(wb, path)
    cli(str(path), "--in-place")
    got = values(path)
    assert got["A1"].value == 45293 - 1462 and got["A5"].value == 45293 - 1462
    assert got["A2"].value == "1904-1-1" and got["A3"].value == 6  # Friday, counted from Sunday 1
    assert got["A4"].value == "Friday 1 Jan 1904" and got["A6"].value == "#NUM!"


@pytest.mark.parametrize("name", ["poi/test-data_spreadsheet_DateFormatTests.xlsx",
                                  "poi/test-data_spreadsheet_DateFormatNumberTests.xlsx"])
def test_reference_workbooks_in_the_1904_system(name):
    score = conformance.score_workbook(_reference(name), name.split("/")[0])
    assert not score.failed, score.failed[:5]
