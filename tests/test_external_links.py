"""References to other workbooks read the values Excel stored when it last updated the link
(Excel shows them as long as the other workbook is not opened; common practice).

Checked against the values Excel stored in POI's external-reference workbooks (a cell,
a workbook-level and a sheet-level defined name of the other workbook, ``[0]`` for the
workbook itself) and IronCalc's link sheet (a link Excel could not refresh shows #REF!),
skipped when ../shared/excel-reference is absent (a failure under CI=true).
"""

from __future__ import annotations

import pytest

from cellfuncs.workbook import conformance
from test_tables import _reference


@pytest.mark.parametrize("name", [
    "poi/test-data_spreadsheet_ref-56737.xlsx",
    "poi/test-data_spreadsheet_ref2-56737.xlsx",
    "poi/test-data_spreadsheet_56737.xlsx",
    "ironcalc/xlsx_tests_link_test.xlsx",
])
def test_linked_values_are_the_stored_ones(name):
    score = conformance.score_workbook(_reference(name), name.split("/")[0])
    linked = [f for f in score.failed if "[" in f[1]]
    assert not linked, linked[:5]
    assert score.tally.comparable > 0
