"""The pieces of workbook recalculation on their own: references, formula shapes, the
dependency order, the comparison of --check and the progress bar.

All expected values are the engine's contract (as documented in cellfuncs/workbook/*.py)
or follow from A1 notation itself (column XFD is 16384, row 1048576 the last).
"""

from __future__ import annotations

import io

import pytest

from cellfuncs.errors import CellError
from cellfuncs.workbook.graph import components, cycle
from cellfuncs.workbook.refs import MAX_COL, MAX_ROW, Area, area, shifted
from cellfuncs.workbook.report import Progress, same, show
from cellfuncs.workbook.templates import Templates, shape


def test_areas_and_their_anchors():
    assert area("XFD1048576") == Area(MAX_ROW, MAX_COL, MAX_ROW, MAX_COL)
    assert area("A0") is None and area("XFE1") is None and area("A1048577") is None
    assert area("$C:$A") == Area(1, 1, MAX_ROW, 3, (True, True, True, True))
    assert area("3:2") == Area(2, 1, 3, MAX_COL, (False, True, False, True))


def test_shifting_moves_only_relative_parts():
    assert shifted(area("$A1:B$2"), 3, 2) == Area(2, 1, 4, 4, (True, True, False, False))  # corners put in order
    assert shifted(area("B:C"), 5, 1) == Area(1, 3, MAX_ROW, 4, (True, False, True, False))
    assert shifted(area("XFD1"), 0, 1) is None and shifted(area("A1"), 0, -1) is None


def test_one_shape_shares_one_template():
    t = Templates()
    first = t.get('=BOIL_TEMP("water",A2,"bar")+$C$1', 2, 2)
    assert t.get('=BOIL_TEMP("water",A3,"bar")+$C$1', 3, 2) is first
    assert t.get('=BOIL_TEMP("water",B7,"bar")+$C$1', 7, 3) is first  # one column to the right
    assert t.get('=BOIL_TEMP("water",A3,"bar")+$C$2', 3, 2) is not first  # another anchored cell
    assert first.batchable


def test_copies_along_rows_and_columns_are_one_shape_and_others_are_not():
    # a formula copied to another cell moves its relative parts by the same rows and columns
    # and keeps its $ parts (Microsoft's "Switch between relative, absolute, and mixed references";
    # the article's title from memory)
    t = Templates()
    first = t.get("=B1*1.01+$A$1+SUM(B:B)", 2, 2)
    assert t.get("=C1*1.01+$A$1+SUM(C:C)", 2, 3) is first  # the next cell of the row
    assert t.get("=C2*1.01+$A$1+SUM(C:C)", 3, 3) is first  # then down the column
    assert t.get("=AA2*1.01+$A$1+SUM(AA:AA)", 3, 27) is first
    assert t.get("=C2*1.01+$A$2+SUM(C:C)", 3, 3) is not first  # another anchored cell
    assert t.get("=C1*1.01+$A$1+SUM(C:C)", 3, 3) is not first  # the row did not move
    assert t.get("=c2*1.01+$A$1+SUM(C:C)", 3, 3) is first  # the letters' case is no part of a reference
    moved = t.get("=C3*1.01+$A$1+SUM(C:C)", 3, 3)
    assert moved.refs[0] == (None, area("C3")) and moved is not first


def test_text_inside_strings_and_quoted_sheet_names_is_no_reference():
    t = Templates()
    a = t.get("='A1 data'!B2", 1, 3)
    b = t.get("='A2 data'!B3", 2, 3)
    assert a is not b and [s for s, _ in b.refs] == ["A2 data"]
    assert shape('="B2"&B2', 1, 1)[1] == [("c", False, 1, False, 1)]


def test_shapes_that_cannot_be_evaluated_column_wise():
    t = Templates()
    assert not t.get("=SUM(A1:A3)", 1, 2).batchable  # a range: each cell sees its own
    assert not t.get("=IFERROR(A1,0)", 1, 2).batchable  # would catch a whole-column error
    assert not t.get("=Rate*A1", 1, 2).batchable  # a name may be a range
    assert t.get("=IF(A1>0,SQRT(A1),-1)", 1, 2).batchable


def test_unparsable_formulas_become_error_values():
    t = Templates()
    assert t.get("=A1 1", 1, 3).error.code == "#NAME?"  # a value after a value, no operator between
    assert t.get("='C:\\x\\[Book.xlsx]S'!A1", 1, 3).error.code == "#REF!"
    assert t.get("=Excel|'[Book1]Sheet1'!A1", 1, 3).error.code == "#REF!"


def test_components_come_after_what_they_need():
    adj = [[1, 2], [2], [], [3], [0]]
    order = [c for comp in components(adj) for c in comp]
    assert order.index(2) < order.index(1) < order.index(0) < order.index(4)
    assert [3] in components(adj)  # a cell needing itself is its own component
    assert cycle(adj, 3, {3}) == [3, 3]


def test_components_of_a_long_chain_need_no_recursion():
    n = 50_000
    adj = [[i + 1] for i in range(n - 1)] + [[]]
    assert [c[0] for c in components(adj)][:3] == [n - 1, n - 2, n - 3]


@pytest.mark.parametrize("cached, computed, equal", [
    (100.0, 100.0 * (1 + 1e-10), True),
    (100.0, 100.0 * (1 + 1e-8), False),
    (0.0, 0.0, True),
    ("liquid", "liquid", True),
    ("Liquid", "liquid", False),  # text compares exactly
    (CellError("#NUM!"), CellError("#NUM!", "reason"), True),  # errors by code
    (CellError("#NUM!"), CellError("#N/A"), False),
    (True, 1.0, False),
    (None, 0.0, False),  # no cached value
])
def test_check_comparison(cached, computed, equal):
    assert same(cached, computed, 1e-9) is equal


def test_values_shown_one_per_field():
    assert [show(v) for v in (1e20, 1.5, CellError("#N/A", "x"), "a\nb", False)] == ["1e+20", "1.5", "#N/A", "a\\nb",
                                                                                      "FALSE"]


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_progress_bar_only_on_a_terminal_and_never_in_ci(monkeypatch):
    monkeypatch.delenv("CI", raising=False)
    stream = _Terminal()
    bar = Progress(3, stream)
    bar.file(1, "b.xlsx")
    bar.update(50, 100)
    assert "2/3 b.xlsx 50/100 cells" in stream.getvalue()
    bar.clear()
    assert stream.getvalue().endswith("\r\x1b[K")
    monkeypatch.setenv("CI", "true")
    quiet = _Terminal()
    bar = Progress(3, quiet)
    bar.file(0, "a.xlsx")
    bar.update(1, 2)
    assert quiet.getvalue() == ""
    monkeypatch.delenv("CI")
    single = _Terminal()
    bar = Progress(1, single)
    bar.file(0, "short.xlsx")
    bar.update(1, 2)  # one file: only after a second
    assert single.getvalue() == ""
    not_terminal = io.StringIO()
    bar = Progress(5, not_terminal)
    bar.file(0, "a.xlsx")
    bar.update(1, 2)
    assert not_terminal.getvalue() == ""
