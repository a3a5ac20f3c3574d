"""Blocks: cells of one formula shape side by side (a row, a column or a rectangle of them)
evaluated as one when the formula acts cell by cell (the operators, the built-ins of
:data:`..formula.batch.BATCHED`, the pack's functions, which broadcast) and no cell of the
block reads another (:meth:`Blocks._pieces`); an element that comes out as an error is
evaluated again on its own, so its value and reason are exactly a single cell's.

:class:`Blocks` is the part of :class:`~.engine.Recalc` that groups the formula cells into
units and evaluates a block; :class:`BlockContext` is the formula engine's view from a block.
"""

from __future__ import annotations

from itertools import chain, product

import numpy as np

from ..errors import CellError
from ..formula import Value
from ..formula.batch import Declined, evaluate_block
from ..formula.budget import charge
from .contexts import Context
from .refs import Area, area, shifted
from .templates import Template

BATCH_CELLS = 65_536  # cells evaluated as one block at most: arrays far below the limit of one array
# How a block of cells of one shape is cut into units, coarsest first (see Blocks._pieces)
RECTANGLE, COLUMNS, ROWS, SINGLE = range(4)


class BlockContext(Context):
    """The view from the ``h`` x ``w`` cells of a block at once (its first cell ``dr``, ``dc``
    from its template's cell): a relative reference gives the block of values the cells would
    each see, as a float array when they are all finite numbers (see :mod:`..formula.batch`)."""

    h = w = 1

    def reference(self, sheet: str | None, ref: str) -> Value:
        if sheet is not None and sheet.startswith("["):
            raise Declined  # another workbook's values, which each cell reads through its link
        s = self.engine.sheet_number(sheet, self.sheet)
        if type(s) is CellError:
            return s
        a = area(ref)
        fixed_row, fixed_col = a.fixed[0], a.fixed[1]
        get = self.engine.values[s].get
        h, w = self.h, self.w
        if (fixed_row or h == 1) and (fixed_col or w == 1):  # one cell that every cell of the block reads
            return get((a.r1 if fixed_row else a.r1 + self.dr, a.c1 if fixed_col else a.c1 + self.dc))
        over = charge((h, w))
        if over is not None:
            return over
        rows = [a.r1] * h if fixed_row else range(a.r1 + self.dr, a.r1 + self.dr + h)
        cols = [a.c1] * w if fixed_col else range(a.c1 + self.dc, a.c1 + self.dc + w)
        cells = list(map(get, product(rows, cols)))
        if set(map(type, cells)) == {float}:
            numbers = np.array(cells).reshape(h, w)
            if np.isfinite(numbers).all():
                return numbers
        # fromiter keeps each value as it is (a CellError is not unpacked)
        return np.fromiter(cells, dtype=object, count=h * w).reshape(h, w)


def _partition(level: int, r1: int, c1: int, h: int, w: int) -> list[tuple[int, int, int, int]]:
    """The parts (first row, first column, rows, columns) of the h x w rectangle at (r1, c1)
    as partition ``level`` cuts it."""
    if level == RECTANGLE:
        return [(r1, c1, h, w)]
    if level == COLUMNS:
        return [(r1, c1 + j, h, 1) for j in range(w)]
    if level == ROWS:
        return [(r1 + i, c1, 1, w) for i in range(h)]
    return [(r, c, 1, 1) for r in range(r1, r1 + h) for c in range(c1, c1 + w)]


class Blocks:
    """Formula cells grouped into units, and a block of them evaluated at once (a part of
    :class:`~.engine.Recalc`)."""

    def _units(self, floors: dict[int, int]) -> tuple[list[tuple[int, ...]], list[int]]:
        """Formula cells grouped, each group's cells row by row: blocks of one batchable shape
        (see :meth:`_pieces`), else single cells; and the partition each group comes from.
        ``floors``: the coarsest partition a cell may still take (see :meth:`_graph`)."""
        cells = self.cells
        if not self.batched:
            return [(fi,) for fi in range(len(cells))], [SINGLE] * len(cells)
        units: list[tuple[int, ...]] = []
        levels: list[int] = []
        for s, cols in enumerate(self._columns):
            # runs down a column of one shape and floor, by (template, floor, first row, last row)
            runs: dict[tuple[int, int, int, int], list[tuple[int, list[int]]]] = {}

            def close(run: list[int], t: Template, floor: int, top: int, bottom: int, col: int) -> None:
                key = (id(t), floor, top, bottom)
                found = runs.get(key)
                if found is None:
                    runs[key] = [(col, run)]
                else:
                    found.append((col, run))

            for col, (rows, fis) in cols.items():
                run: list[int] | None = None
                t = top = last = floor = None
                for row, fi in zip(rows, fis):
                    fc = cells[fi]
                    here = floors.get(fi, RECTANGLE) if floors else RECTANGLE
                    if run is not None and fc.template is t and row == last + 1 and here == floor \
                            and fc.kind == "normal":
                        run.append(fi)
                        last = row
                        continue
                    if run is not None:
                        close(run, t, floor, top, last, col)
                    if fc.template.batchable and fc.kind == "normal" and here < SINGLE:
                        run, t, top, last, floor = [fi], fc.template, row, row, here
                    else:
                        run = None
                        units.append((fi,))
                        levels.append(SINGLE)
                if run is not None:
                    close(run, t, floor, top, last, col)
            for (_, floor, _, _), found in runs.items():
                found.sort(key=lambda entry: entry[0])
                begin = 0
                for k in range(1, len(found) + 1):  # side by side: one rectangle
                    if k == len(found) or found[k][0] != found[k - 1][0] + 1 or floor == COLUMNS:
                        self._pieces(s, floor, [run for _, run in found[begin:k]], units, levels)
                        begin = k
        return units, levels

    def _pieces(self, s: int, floor: int, columns: list[list[int]], units: list[tuple[int, ...]],
                levels: list[int]) -> None:
        """Cut a rectangle of cells of one shape (its columns side by side, each top to bottom)
        into units: the whole, else its columns, else its rows, else single cells, from ``floor``
        on, the first partition in which no part reads a cell of itself or off the sheet (such a
        part's cells depend on one another: evaluated at once, one would see another's old
        value). Parts larger than :data:`BATCH_CELLS` are cut into bands of rows."""
        h, w = len(columns[0]), len(columns)
        if h * w == 1:
            units.append((columns[0][0],))
            levels.append(SINGLE)
            return
        first = self.cells[columns[0][0]]
        r1, c1 = first.row, first.col
        level = floor
        while level < SINGLE:
            parts = _partition(level, r1, c1, h, w)
            if not any(ph * pw > 1 and self._reads_itself(s, first.template, Area(r, c, r + ph - 1, c + pw - 1))
                       for r, c, ph, pw in parts):
                break
            level += 1
        else:
            parts = _partition(SINGLE, r1, c1, h, w)
        for r, c, ph, pw in parts:
            band = max(1, BATCH_CELLS // pw)
            for top in range(r, r + ph, band):
                bottom = min(top + band, r + ph)  # row by row: the rows of the band's columns, zipped
                band_columns = (run[top - r1:bottom - r1] for run in columns[c - c1:c - c1 + pw])
                units.append(tuple(chain.from_iterable(zip(*band_columns))))
                levels.append(level)

    def _reads_itself(self, s: int, t: Template, block: Area) -> bool:
        """Whether a cell of ``block`` (cells of template ``t`` on sheet ``s``) reads a cell of the
        block, or a cell off the sheet."""
        dr, dc = block.r1 - t.row, block.c1 - t.col
        h, w = block.shape
        for name, a in t.refs:
            top, bottom = shifted(a, dr, dc), shifted(a, dr + h - 1, dc + w - 1)
            if top is None or bottom is None:
                return True
            sheets = self.sheet_numbers(name, s)
            read = Area(min(top.r1, bottom.r1), min(top.c1, bottom.c1), max(top.r2, bottom.r2), max(top.c2, bottom.c2))
            if type(sheets) is list and s in sheets and read.meets(block):
                return True
        return False

    def _group(self, members: tuple[int, ...]) -> None:
        """The cells of a block (row by row) evaluated at once; a cell whose value comes out as an
        error is evaluated again on its own, so that its value and reason are exactly a single cell's."""
        cells = self.cells
        first, last = cells[members[0]], cells[members[-1]]
        t = first.template
        shape = (last.row - first.row + 1, last.col - first.col + 1)
        ctx = self._block
        ctx.sheet, ctx.dr, ctx.dc, (ctx.h, ctx.w) = first.sheet, first.row - t.row, first.col - t.col, shape
        ctx.row, ctx.col = first.row, first.col
        self.budget.start(len(members))
        v = evaluate_block(t.ast, ctx, shape)
        if type(v) is np.ndarray and v.shape == shape:
            lanes = v.ravel().tolist()
        elif v is None or type(v) is CellError or type(v) is np.ndarray:  # every cell on its own
            for fi in members:
                self._cell(fi)
            return
        else:
            lanes = [v] * len(members)
        values, result = self.values[first.sheet], self.result
        keys = product(range(first.row, last.row + 1), range(first.col, last.col + 1))  # row by row, as members
        if type(v) is np.ndarray and v.dtype == float:  # numbers only: every lane stands as it is
            values.update(zip(keys, lanes))
            for fi, x in zip(members, lanes):
                result[fi] = x
            return
        for fi, key, x in zip(members, keys, lanes):
            if type(x) is CellError or type(x) is np.ndarray:
                self._cell(fi)  # exactly what the cell alone gives, reason included
            else:
                values[key] = result[fi] = 0.0 if x is None else x
