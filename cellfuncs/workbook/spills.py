"""Spills: where an array result lands. A dynamic array spills over the cells right and
below its formula unless one of them holds a value, a formula or another spill
(``#SPILL!``); a legacy array formula ({=...}) fills its stored range. :class:`Spills` is
the part of :class:`~.engine.Recalc` that stores a formula cell's value so."""

from __future__ import annotations

import numpy as np

from ..errors import NA, SPILL, CellError
from ..formula import Value
from .limits import option
from .refs import MAX_COL, MAX_ROW, Area, area
from .sheetxml import FormulaXml


def _legacy_fill(value: Value, shape: tuple[int, int]) -> np.ndarray:
    """The values an {=array} formula shows in its range: a single row or column repeats,
    places beyond the result are #N/A."""
    h, w = shape
    out = np.empty(shape, dtype=object)
    if type(value) is not np.ndarray:
        out.fill(value)
        return out
    vh, vw = value.shape
    for i in range(h):
        for j in range(w):
            ii, jj = (0 if vh == 1 else i), (0 if vw == 1 else j)
            out[i, j] = value[ii, jj] if ii < vh and jj < vw else CellError(NA, "beyond the array formula's result")
    return out


def stored_range(f: FormulaXml, row: int, col: int) -> Area:
    """The range an array formula's cell stores (its own cell if the range does not start there)."""
    a = area(f.ref) if f.ref else None
    return a if a is not None and a.r1 == row and a.c1 == col else Area(row, col, row, col)


class Spills:
    """A formula cell's value stored: in its cell, spilled, or filling its array range (a part
    of :class:`~.engine.Recalc`)."""

    def _grow(self, s: int, a: Area) -> None:
        ext = self.extent[s]
        ext[0], ext[1] = max(ext[0], a.r2), max(ext[1], a.c2)

    def _store(self, fi: int, v: Value) -> None:
        fc = self.cells[fi]
        if type(v) is np.ndarray and v.size == 1:
            v = v[0, 0]
        if fc.kind == "legacy":
            a = fc.old_area
            filled = _legacy_fill(v, a.shape)
            self._place(fi, a, filled)
            return
        if type(v) is np.ndarray:
            self._spill(fi, v)
            return
        self.values[fc.sheet][(fc.row, fc.col)] = self.result[fi] = 0.0 if v is None else v

    def _spill(self, fi: int, v: np.ndarray) -> None:
        fc = self.cells[fi]
        h, w = v.shape
        a = Area(fc.row, fc.col, fc.row + h - 1, fc.col + w - 1)
        blocker = None
        if a.r2 > MAX_ROW or a.c2 > MAX_COL:
            blocker = "overwrite the edge of the sheet"
        elif h * w > self.spill_left:
            blocker = (f"bring the spilled cells of the workbook over the limit of {self.limits.spill_cells:,} "
                       f"({option('spill_cells')})")
        else:
            s = fc.sheet
            constants, formulas, claims, legacy = self.constants[s], self.at[s], self.claims[s], self.legacy[s]
            for r in range(a.r1, a.r2 + 1):
                for c in range(a.c1, a.c2 + 1):
                    key = (r, c)
                    if (key in constants or key in claims or (key in formulas and formulas[key] != fi)
                            or (legacy and legacy.at(r, c) is not None)):
                        blocker = "overwrite " + self.where(fi, r, c)
                        break
                if blocker:
                    break
        if blocker:
            error = CellError(SPILL, f"the {h}x{w} result would {blocker}")
            self.blocked.add(fi)
            self.values[fc.sheet][(fc.row, fc.col)] = self.result[fi] = error
            return
        self.spill_left -= h * w
        self._place(fi, a, v)

    def _place(self, fi: int, a: Area, v: np.ndarray) -> None:
        fc = self.cells[fi]
        values, claims = self.values[fc.sheet], self.claims[fc.sheet]
        for i, row in enumerate(v.tolist()):
            for j, x in enumerate(row):
                key = (a.r1 + i, a.c1 + j)
                values[key] = 0.0 if x is None else x
                claims[key] = fi
        del claims[(fc.row, fc.col)]
        self.result[fi] = values[(fc.row, fc.col)]
        self.spills[fi] = a
        self._grow(fc.sheet, a)
