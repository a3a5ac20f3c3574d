"""A1 references: cell addresses, areas with their ``$`` anchors, shifting them, and sheet
names as formulas write them.

Rows and columns are 1-based. A whole-column area (``A:C``) spans every row and a
whole-row area (``2:5``) every column; relative parts move when a formula is
filled to another cell, anchored (``$``) parts do not.

>>> area("$B$2:C4")
Area(r1=2, c1=2, r2=4, c2=3, fixed=(True, True, False, False))
>>> address(3, 28), shifted(area("B2"), 1, -1).text()
('AB3', 'A3')
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import NamedTuple

from ..formula.a1 import MAX_COL, MAX_ROW, column_letters, column_number

__all__ = ["MAX_COL", "MAX_ROW", "Area", "address", "area", "column_letters", "column_number", "quoted", "shifted"]

_CELL = r"(\$?)([A-Za-z]{1,3})(\$?)([0-9]{1,7})"
# a sheet's cells number in the millions, each read once: so a cell is read by its own pattern, not cached
_ONE_CELL = re.compile(r"\$?([A-Za-z]{1,3})\$?([0-9]{1,7})\Z")
_AREA = re.compile(
    rf"{_CELL}(?::{_CELL})?\Z|(\$?)([A-Za-z]{{1,3}}):(\$?)([A-Za-z]{{1,3}})\Z|(\$?)([0-9]{{1,7}}):(\$?)([0-9]{{1,7}})\Z"
)


class Area(NamedTuple):
    """Rows ``r1..r2`` and columns ``c1..c2`` (inclusive); ``fixed`` flags the ``$`` of
    (row 1, column 1, row 2, column 2)."""

    r1: int
    c1: int
    r2: int
    c2: int
    fixed: tuple[bool, bool, bool, bool] = (False, False, False, False)

    @property
    def single(self) -> bool:
        return self.r1 == self.r2 and self.c1 == self.c2

    @property
    def shape(self) -> tuple[int, int]:
        return self.r2 - self.r1 + 1, self.c2 - self.c1 + 1

    def text(self) -> str:
        """The area in A1 notation without anchors (``A1`` or ``A1:B3``)."""
        first = address(self.r1, self.c1)
        return first if self.single else f"{first}:{address(self.r2, self.c2)}"

    def contains(self, row: int, col: int) -> bool:
        return self.r1 <= row <= self.r2 and self.c1 <= col <= self.c2

    def meets(self, other: Area) -> bool:
        return self.r1 <= other.r2 and other.r1 <= self.r2 and self.c1 <= other.c2 and other.c1 <= self.c2


def address(row: int, col: int) -> str:
    """``A1`` notation of a cell."""
    return f"{column_letters(col)}{row}"


@lru_cache(maxsize=65536)
def area(ref: str) -> Area | None:
    """The area of ``ref`` (``A1``, ``$A$1:B3``, ``A:C``, ``2:5``), None if it is not one
    or lies beyond Excel's sheet (XFD1048576). Corners are put in order.

    >>> area("B3:A1"), area("XFE1")
    (Area(r1=1, c1=1, r2=3, c2=2, fixed=(False, False, False, False)), None)
    """
    m = _AREA.match(ref)
    if m is None:
        return None
    g = m.groups()
    if g[1]:  # cell or cell:cell
        r1, c1, fr1, fc1 = int(g[3]), column_number(g[1]), bool(g[2]), bool(g[0])
        if g[5]:
            r2, c2, fr2, fc2 = int(g[7]), column_number(g[5]), bool(g[6]), bool(g[4])
        else:
            r2, c2, fr2, fc2 = r1, c1, fr1, fc1
    elif g[9]:  # whole columns
        c1, c2, fc1, fc2 = column_number(g[9]), column_number(g[11]), bool(g[8]), bool(g[10])
        r1, r2, fr1, fr2 = 1, MAX_ROW, True, True
    else:  # whole rows
        r1, r2, fr1, fr2 = int(g[13]), int(g[15]), bool(g[12]), bool(g[14])
        c1, c2, fc1, fc2 = 1, MAX_COL, True, True
    if not (1 <= min(r1, r2) and max(r1, r2) <= MAX_ROW and 1 <= min(c1, c2) and max(c1, c2) <= MAX_COL):
        return None
    if r1 > r2:
        r1, r2, fr1, fr2 = r2, r1, fr2, fr1
    if c1 > c2:
        c1, c2, fc1, fc2 = c2, c1, fc2, fc1
    return Area(r1, c1, r2, c2, (fr1, fc1, fr2, fc2))


def shifted(a: Area, dr: int, dc: int) -> Area | None:
    """``a`` as seen from a cell ``dr`` rows and ``dc`` columns away: relative parts move,
    whole-column areas keep their rows and whole-row areas their columns. None when a
    corner leaves the sheet (Excel's #REF!).

    >>> shifted(area("A$1:B2"), 2, 1)
    Area(r1=1, c1=2, r2=4, c2=3, fixed=(True, False, False, False))
    >>> shifted(area("A1"), -1, 0) is None
    True
    """
    if not (dr or dc):
        return a
    fr1, fc1, fr2, fc2 = a.fixed
    whole_cols = a.r1 == 1 and a.r2 == MAX_ROW and fr1 and fr2
    whole_rows = a.c1 == 1 and a.c2 == MAX_COL and fc1 and fc2
    r1 = a.r1 if fr1 or whole_cols else a.r1 + dr
    r2 = a.r2 if fr2 or whole_cols else a.r2 + dr
    c1 = a.c1 if fc1 or whole_rows else a.c1 + dc
    c2 = a.c2 if fc2 or whole_rows else a.c2 + dc
    if min(r1, r2) < 1 or min(c1, c2) < 1 or max(r1, r2) > MAX_ROW or max(c1, c2) > MAX_COL:
        return None
    if r1 > r2:  # an anchored corner passed by a moving one: Excel puts the corners in order
        r1, r2, fr1, fr2 = r2, r1, fr2, fr1
    if c1 > c2:
        c1, c2, fc1, fc2 = c2, c1, fc2, fc1
    return Area(r1, c1, r2, c2, (fr1, fc1, fr2, fc2))


def cell(ref: str) -> tuple[int, int] | None:
    """(row, column) of a single-cell ``ref`` such as ``B3``, None otherwise.

    >>> cell("B3"), cell("B3:C4"), cell("$B$3:B3"), cell("XFE1")
    ((3, 2), None, (3, 2), None)
    """
    m = _ONE_CELL.match(ref)
    if m is None:  # a range, perhaps of one cell
        a = area(ref)
        return (a.r1, a.c1) if a is not None and a.single else None
    row, col = int(m.group(2)), column_number(m.group(1))
    return (row, col) if 1 <= row <= MAX_ROW and col <= MAX_COL else None


def quoted(sheet: str) -> str:
    """A sheet name as a formula writes it.

    >>> quoted("Data"), quoted("My data"), quoted("it's")
    ('Data', "'My data'", "'it''s'")
    """
    plain = sheet.replace("_", "").replace(".", "").isalnum() and not sheet[0].isdigit()
    return sheet if plain else "'" + sheet.replace("'", "''") + "'"
