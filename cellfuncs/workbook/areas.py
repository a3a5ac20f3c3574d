"""Areas of a sheet that must not overlap (array-formula ranges, spills), found by a cell or by an
area they meet, without a set of their cells: a range declared as the whole sheet costs one
entry per column, not 17 billion.

>>> index = AreaIndex()
>>> index.add(Area(2, 2, 4, 3), "B2:C4"); index.add(Area(6, 3, 6, 3), "C6")
>>> index.freeze()
>>> index.at(3, 3), index.at(5, 3), sorted(index.meeting(Area(1, 3, 6, 3)))
('B2:C4', None, ['B2:C4', 'C6'])
"""

from __future__ import annotations

import bisect
from typing import Any, Iterator

from .refs import Area


class Overlap(Exception):
    """Two areas of an index share a cell; ``args`` are their items."""


class AreaIndex:
    """Per column, the row spans of the areas that cover it, sorted (after :meth:`freeze`)."""

    def __init__(self) -> None:
        self._columns: dict[int, list[tuple[int, int, Any]]] = {}
        self._starts: dict[int, list[int]] = {}
        self._ends: dict[int, list[int]] = {}

    def add(self, a: Area, item: Any) -> None:
        for c in range(a.c1, a.c2 + 1):
            self._columns.setdefault(c, []).append((a.r1, a.r2, item))

    def freeze(self) -> None:
        """Sort the spans; raise :class:`Overlap` if two areas share a cell."""
        for c, spans in self._columns.items():
            spans.sort(key=lambda span: span[0])
            for (_, end, first), (start, _, second) in zip(spans, spans[1:]):
                if start <= end:
                    raise Overlap(first, second)
            self._starts[c] = [span[0] for span in spans]
            self._ends[c] = [span[1] for span in spans]

    def __bool__(self) -> bool:
        return bool(self._columns)

    def at(self, row: int, col: int) -> Any:
        """The item of the area holding the cell, or None."""
        starts = self._starts.get(col)
        if not starts:
            return None
        k = bisect.bisect_right(starts, row) - 1
        if k >= 0 and row <= self._ends[col][k]:
            return self._columns[col][k][2]
        return None

    def meeting(self, a: Area) -> Iterator[Any]:
        """The items of the areas that share a cell with ``a`` (an item once per column it meets)."""
        if a.c2 - a.c1 + 1 <= len(self._starts):
            columns = (c for c in range(a.c1, a.c2 + 1) if c in self._starts)
        else:
            columns = (c for c in self._starts if a.c1 <= c <= a.c2)
        for c in columns:
            spans = self._columns[c]
            lo = bisect.bisect_left(self._ends[c], a.r1)
            hi = bisect.bisect_right(self._starts[c], a.r2)
            for k in range(lo, hi):
                yield spans[k][2]
