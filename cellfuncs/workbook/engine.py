"""Recalculation: every formula cell evaluated in dependency order, spills placed.

:class:`Recalc` drives it: it reads the workbook's cells, names and sheets, and runs the
passes. Its parts live beside it: the dependency graph and its loops (:mod:`.graph`),
blocks of cells evaluated at once (:mod:`.blocks`), spills and array formula ranges
(:mod:`.spills`), and the formula engine's views of the workbook (:mod:`.contexts`).

Decisions:

- A circular reference gives ``#CALC!`` in every cell of the loop, with a reason naming
  it (``circular reference: Sheet1!A1 -> Sheet1!B1 -> Sheet1!A1``); cells that use
  those cells get the error in turn. A loop of the references written in the formulas is
  first evaluated on demand, each cell waiting for the cells of the loop it reads: only a
  cell that reads itself, directly or through others, is circular (Excel computes
  ``=CHOOSE(2, B40, "x")`` in B40, which never reads B40).
- A formula whose result is an array spills (Excel 365 dynamic arrays) unless a cell of
  the spill range holds a value or a formula or another spill: then ``#SPILL!``.
  A legacy array formula ({=...}) fills its stored range, as Excel does.
- A formula whose value is a blank cell shows 0, as in Excel.
- References to whole columns or rows are cut to the sheet's used range.
- A defined name is evaluated once per sheet that uses it, in dependency order like a
  formula (its own node of the graph), and remembered: a name used twice by another name
  costs nothing more, and a chain of names a thousand deep needs no recursion.
- Work is counted before it is done (see :mod:`.limits`): declared array ranges and the
  dependencies between formulas while reading (over a limit: :class:`Refused`), each
  array a formula builds while evaluating (over a limit: that cell's error value).

>>> from cellfuncs.workbook.model import Book, Sheet
>>> from cellfuncs.workbook.sheetxml import FormulaXml, SheetScan
>>> scan = SheetScan("s", values={(1, 1): 2.0}, formulas={(1, 2): FormulaXml("A1*3", "normal", None, None, None, None)})
>>> r = Recalc(Book("wb", [Sheet("S", 0, "s", scan)], {}, None, None), {})
>>> r.run(); r.values[0][(1, 2)]
6.0
"""

from __future__ import annotations

from dataclasses import dataclass
from operator import itemgetter
from typing import Any, Callable, Iterator, Mapping

import numpy as np

from ..errors import REF, CellError
from ..formula import Call, Value, value_of, walk
from ..formula.budget import active, charge
from ..formula.dates import date_system
from .areas import AreaIndex, Overlap
from .blocks import BlockContext, Blocks
from .contexts import POSITIONAL, Context, NameContext
from .graph import Dependencies, Graph
from .limits import DEFAULTS, Limits, option
from .model import Book, Sheet
from .package import Refused
from .refs import MAX_COL, MAX_ROW, Area, address, area, quoted
from .spills import Spills, stored_range
from .tables import Tables
from .templates import Template, Templates, build

MAX_PASSES = 4
KEPT_BLOCK_CELLS = 4_194_304  # ranges read are kept for reuse up to this many cells (32 MiB of references)


@dataclass(slots=True)
class FormulaCell:
    sheet: int
    row: int
    col: int
    template: Template
    kind: str  # "normal", "dynamic" (an Excel 365 dynamic array) or "legacy" (an {=array} formula)
    old_area: Area | None  # the stored range of an array formula


_UNSET = object()


class Recalc(Dependencies, Blocks, Spills):
    """Recalculation of one workbook: :meth:`run` fills :attr:`values` (per sheet,
    (row, column) -> value), :attr:`result` (per formula cell) and :attr:`spills`."""

    batched = True  # False: every formula cell evaluated on its own (what the blocks must equal)

    def __init__(self, book: Book, functions: Mapping[str, Callable[..., Any]],
                 progress: Callable[[int, int], None] | None = None, limits: Limits = DEFAULTS):
        self.book = book
        self.functions = dict(functions)
        self.progress = progress
        self.limits = limits
        self.budget = limits.budget()
        self._sheet_numbers = {s.name.lower(): s.index for s in book.sheets if s.scan is not None}
        self._sheet_names = {s.name.lower() for s in book.sheets}
        self.templates = Templates()
        self.tables = Tables(book.tables)
        self._subtotal_cells: list[set[tuple[int, int]]] | None = None
        # references found while evaluating, by formula cell: (sheet, area corners); kept across passes
        self.found: dict[int, set[tuple[int, tuple[int, int, int, int]]]] = {}
        self.found_new = False
        self.current: int | None = None  # the formula cell being evaluated
        # while a loop of the graph is resolved (see _resolve): per sheet, its cells not evaluated yet
        self.pending: dict[int, dict[tuple[int, int], int]] = {}
        self._waiting: list[int] = []  # the loop's cells being evaluated, each waiting for the next
        self._circular = False
        self._name_templates: dict = {}
        self.name_values: dict[tuple[tuple[int | None, str], int], Value] = {}  # (name, sheet using it) -> value
        n = len(book.sheets)
        self.cells: list[FormulaCell] = []
        self.shared_firsts: dict[int, dict[str, tuple[int, int]]] = {}  # sheet -> si -> first cell
        self.at: list[dict[tuple[int, int], int]] = [{} for _ in range(n)]
        self.constants: list[dict] = [{} for _ in range(n)]
        self.stored: list[dict] = [{} for _ in range(n)]  # cached values inside stored array ranges
        self.legacy: list[AreaIndex] = [AreaIndex() for _ in range(n)]  # {=array} formula ranges: never spilled into
        self.legacy_cells = 0
        self._load()
        self._columns = self._column_index()
        # the cells' extent of each sheet, before spills: fixed once read, and every pass starts from it
        self._loaded_extent: list[tuple[int, int]] = []
        for constants, formulas in zip(self.constants, self.at):
            keys = (*constants, *formulas)  # the largest (row, column) has the last row
            self._loaded_extent.append((max(keys, default=(1, 1))[0], max(map(itemgetter(1), keys), default=1)))
        self.values: list[dict] = []
        self.result: list[Value] = []
        self.spills: dict[int, Area] = {}
        self.blocked: set[int] = set()  # formula cells whose spill was blocked (#SPILL!)

    # ---- reading -------------------------------------------------------------------
    def _load(self) -> None:
        dynamic = self.book.dynamic_cm
        declared = [0]  # cells of the stored array ranges so far, over all sheets
        cells, template_of, tables = self.cells, self.templates.get, self.tables
        for sheet in self.book.sheets:
            scan = sheet.scan
            if scan is None:
                continue
            s = sheet.index
            at, stored, constants = self.at[s], self.stored[s], self.constants[s]
            arrays = self._array_ranges(sheet, declared)
            masters = self.shared_firsts[s] = {
                f.si: key for key, f in scan.formulas.items() if f.kind == "shared" and f.text and f.si is not None}
            for key, f in scan.formulas.items():
                kind, text = f.kind, f.text
                if kind == "normal" and text:  # the commonest cell, a plain formula of its own, first
                    if tables.mentioned(text):
                        text = tables.translate(text, s, *key)
                    at[key] = len(cells)
                    cells.append(FormulaCell(s, key[0], key[1], template_of(text, *key), kind, None))
                    continue
                base = key
                if kind != "normal":
                    if kind == "dataTable":  # what-if tables are Excel's own machinery: the cached values stand
                        if f.cached is not None:
                            constants[key] = f.cached
                        continue
                    if kind == "shared" and not text:  # the other cells take the first cell's text, moved
                        base = masters.get(f.si)
                        text = scan.formulas[base].text if base is not None else None
                elif not text and arrays.at(*key) not in (None, key):
                    stored[key] = f.cached  # Excel's <f ca="1"/> in a volatile array's range
                    continue
                if text is None:
                    template = Template(None, CellError(REF, "a shared formula whose first cell is missing"),
                                        *key, (), (), False)
                else:
                    if tables.mentioned(text):
                        text = tables.translate(text, s, *base)
                    template = template_of(text, *base)
                old = None
                if kind == "array":
                    old = stored_range(f, *key)
                    kind = "dynamic" if dynamic is not None and f.cm == dynamic else "legacy"
                    if kind == "legacy":
                        self.legacy[s].add(old, key)
                        self.legacy_cells += old.shape[0] * old.shape[1]
                else:
                    kind = "normal"
                at[key] = len(cells)
                cells.append(FormulaCell(s, key[0], key[1], template, kind, old))
            self.legacy[s].freeze()
            if not arrays:  # no stored array ranges: every value cell that holds no formula is a constant
                constants.update(scan.values)
                for key in constants.keys() & at.keys():  # a cell written twice, as a value and as a formula
                    del constants[key]
                continue
            for key, v in scan.values.items():
                if arrays.at(*key) is not None:
                    stored[key] = v
                elif key not in at:
                    constants[key] = v

    def _array_ranges(self, sheet: Sheet, declared: list[int]) -> AreaIndex:
        """The stored ranges of a sheet's array formulas (item: the anchor cell), counted against
        the limit before any cell of them is visited; refused if two overlap."""
        arrays = AreaIndex()
        for (row, col), f in sheet.scan.formulas.items():
            if f.kind != "array":
                continue
            a = stored_range(f, row, col)
            h, w = a.shape
            declared[0] += h * w
            if declared[0] > self.limits.spill_cells:
                raise Refused(f"{quoted(sheet.name)}!{address(row, col)}: the array formula's range {a.text()} "
                              f"({h * w:,} cells) brings the array ranges of the workbook to {declared[0]:,} cells, "
                              f"over the limit of {self.limits.spill_cells:,} ({option('spill_cells')})")
            arrays.add(a, (row, col))
        try:
            arrays.freeze()
        except Overlap as exc:
            first, second = (f"{quoted(sheet.name)}!{address(*anchor)}" for anchor in exc.args)
            raise Refused(f"the array formulas at {first} and {second} have overlapping ranges") from None
        return arrays

    def _column_index(self) -> list[dict[int, tuple[list[int], list[int]]]]:
        index: list[dict] = [{} for _ in self.book.sheets]
        for cols, at in zip(index, self.at):  # a sheet's formula cells, in the order of self.cells
            for (row, col), fi in at.items():
                entry = cols.get(col)
                if entry is None:
                    entry = cols[col] = ([], [])
                entry[0].append(row)
                entry[1].append(fi)
        for cols in index:
            for col, (rows, fis) in cols.items():
                if rows != sorted(rows):  # cells come in the sheet's order: their rows are usually in order
                    order = sorted(range(len(rows)), key=rows.__getitem__)
                    cols[col] = ([rows[k] for k in order], [fis[k] for k in order])
        return index

    # ---- names and sheets ------------------------------------------------------------
    def sheet_number(self, name: str | None, current: int) -> int | CellError:
        if name is None:
            return current
        s = self._sheet_numbers.get(name.lower())
        if s is not None:
            return s
        if name.startswith("["):
            return CellError(REF, f"{quoted(name)}! is an external reference (another workbook)")
        if name.lower() in self._sheet_names:
            return CellError(REF, f"sheet {name} has no cells (a chart sheet)")
        return CellError(REF, f"there is no sheet named {name}")

    def sheet_numbers(self, name: str | None, current: int) -> list[int] | CellError:
        """The sheets a reference's sheet part names: one, or for ``First:Last`` (a 3-D
        reference) every worksheet from the one to the other in workbook order."""
        if name is None or ":" not in name:
            s = self.sheet_number(name, current)
            return s if type(s) is CellError else [s]
        ends = [self.sheet_number(end, current) for end in name.split(":", 1)]
        for e in ends:
            if type(e) is CellError:
                return e
        lo, hi = min(ends), max(ends)
        return [s for s in self._sheet_numbers.values() if lo <= s <= hi]

    def resolve_name(self, sheet: int, text: str) -> tuple[int | None, str] | None:
        names = self.book.names
        if "!" in text:
            where, _, local = text.rpartition("!")
            where = where[1:-1].replace("''", "'") if where.startswith("'") else where
            s = self._sheet_numbers.get(where.lower())
            local = local.upper()
            if s is not None and (s, local) in names:
                return s, local
            return (None, local) if (None, local) in names else None
        key = text.upper()
        if (sheet, key) in names:
            return sheet, key
        return (None, key) if (None, key) in names else None

    def name_template(self, key: tuple[int | None, str]) -> Template:
        t = self._name_templates.get(key)
        if t is None:
            text = self.book.names[key]
            if self.tables.mentioned(text):
                text = self.tables.translate(text, key[0] or 0, None, None)
            t = self._name_templates[key] = build(text, 1, 1)
        return t

    def name_value(self, key: tuple[int | None, str], sheet: int, cell: tuple[int, int] | None = None) -> Value:
        """The value of a defined name seen from ``sheet`` (by formula ``cell``), remembered for
        the pass. The graph evaluates every name before the formulas that use it, so for a
        formula this is a look-up; only a name whose value depends on the cell (ROW()) is
        evaluated again for each cell that uses it (without a cell: :data:`POSITIONAL`)."""
        value = self.name_values.get((key, sheet), _UNSET)
        if value is _UNSET:
            value = self.name_values[(key, sheet)] = self._name(key, sheet, None)
        if value is POSITIONAL and cell is not None:
            return self._name(key, sheet, cell)
        return value

    def _name(self, key: tuple[int | None, str], sheet: int, cell: tuple[int, int] | None) -> Value:
        t = self.name_template(key)
        if t.ast is None:
            return t.error
        ctx = NameContext(self, sheet, cell)
        value = value_of(t.ast, ctx, may_be_function=True)
        return POSITIONAL if ctx.positional and cell is None else value

    # ---- values ----------------------------------------------------------------------
    def block(self, s: int, a: Area) -> np.ndarray | CellError:
        """The values of area ``a`` of sheet ``s`` as a 2-D object array (whole columns
        and rows cut to the used range), or the budget's error value.

        Blocks are kept for the pass: every formula cell inside an area is evaluated before
        any formula reading the area (the dependency order), so its values no longer change.
        Each use is charged to the budget all the same (the formula goes through its cells),
        and the blocks kept hold at most :data:`KEPT_BLOCK_CELLS` cells in all.
        """
        r2, c2 = self.clipped(s, a)
        h, w = r2 - a.r1 + 1, c2 - a.c1 + 1
        over = charge((h, w))
        if over is not None:
            return over
        key = (s, a.r1, a.c1, r2, c2)
        out = self._blocks.get(key)
        if out is None:
            out = self._read_block(s, a.r1, a.c1, r2, c2)
            if self._kept + h * w <= KEPT_BLOCK_CELLS:
                self._blocks[key] = out
                self._kept += h * w
        return out

    def clipped(self, s: int, a: Area) -> tuple[int, int]:
        """The last row and column of area ``a``, whole columns and rows cut to the used range."""
        r2, c2 = a.r2, a.c2
        if r2 == MAX_ROW or c2 == MAX_COL:
            rows, cols = self.extent[s]
            r2, c2 = min(r2, max(rows, a.r1)), min(c2, max(cols, a.c1))
        return r2, c2

    def hidden_rows(self, s: int, filtered_only: bool) -> set[int]:
        """The hidden rows of sheet ``s``; with ``filtered_only`` only those inside a filter's
        range (the sheet's or a table's), which are the rows a filter hides."""
        scan = self.book.sheets[s].scan
        if not filtered_only or not scan.hidden_rows:
            return scan.hidden_rows
        spans = [(t.area.r1, t.area.r2) for t in self.book.tables if t.sheet == s and t.filtered]
        sheet_filter = area(scan.filter_area) if scan.filter_area else None
        if sheet_filter is not None:
            spans.append((sheet_filter.r1, sheet_filter.r2))
        return {r for r in scan.hidden_rows if any(r1 <= r <= r2 for r1, r2 in spans)}

    def subtotal_cells(self) -> list[set[tuple[int, int]]]:
        """Per sheet, the cells whose formulas call SUBTOTAL or AGGREGATE (found on first use)."""
        if self._subtotal_cells is None:
            calls: dict[int, bool] = {}
            self._subtotal_cells = [set() for _ in self.book.sheets]
            for fc in self.cells:
                t = fc.template
                found = calls.get(id(t))
                if found is None:
                    found = calls[id(t)] = t.ast is not None and any(
                        type(n) is Call and n.name in ("SUBTOTAL", "AGGREGATE") for n in walk(t.ast))
                if found:
                    self._subtotal_cells[fc.sheet].add((fc.row, fc.col))
        return self._subtotal_cells

    def _read_block(self, s: int, r1: int, c1: int, r2: int, c2: int) -> np.ndarray:
        a = Area(r1, c1, r2, c2)
        get = self.values[s].get
        h, w = r2 - a.r1 + 1, c2 - a.c1 + 1
        columns = range(a.c1, c2 + 1)
        # fromiter keeps each value as it is (a CellError is not unpacked) at a fifth of the cost of a loop
        cells = (get((r, c)) for r in range(a.r1, r2 + 1) for c in columns)
        return np.fromiter(cells, dtype=object, count=h * w).reshape(h, w)

    # ---- the dependency graph --------------------------------------------------------
    # ---- evaluation --------------------------------------------------------------------
    def run(self) -> None:
        """Evaluate every formula; repeat while spills land, or references found while evaluating
        read formula cells, where the order did not expect them."""
        assumed = {fi: fc.old_area for fi, fc in enumerate(self.cells) if fc.old_area is not None}
        graph = self._graph(assumed)
        for _ in range(MAX_PASSES):
            self.found_new = False
            self._evaluate(graph, assumed)
            actual = dict(self.spills)
            if actual == assumed and not self.found_new:
                return
            assumed = actual
            again = self._graph(assumed)
            if again == graph:  # the same order constraints: the results stand
                return
            graph = again

    def _reset(self, assumed: dict[int, Area]) -> None:
        self.values = [dict(c) for c in self.constants]
        self._blocks: dict[tuple[int, int, int, int, int], np.ndarray] = {}
        self._kept = 0  # cells of the blocks kept
        self.claims: list[dict[tuple[int, int], int]] = [{} for _ in self.book.sheets]
        self.result = [None] * len(self.cells)
        self.spills = {}
        self.blocked = set()
        self.name_values = {}
        self.spill_left = self.limits.spill_cells - self.legacy_cells  # the stored {=array} ranges are filled anyway
        self.budget.restart()
        self.extent = [list(e) for e in self._loaded_extent]
        for fi, a in assumed.items():  # whole-column references reach spills not placed yet
            self._grow(self.cells[fi].sheet, a)

    def _evaluate(self, graph: Graph, assumed: dict[int, Area]) -> None:
        self._graph_used = graph  # the order the results come from (see :attr:`graph`)
        self._reset(assumed)
        self._context = Context(self)
        self._block = BlockContext(self)
        units, adj = graph.units, graph.adj
        done, total, step = 0, len(self.cells), 0
        with active(self.budget), date_system(self.book.date1904):
            for comp in graph.comps:
                if len(comp) > 1 or comp[0] in adj[comp[0]]:
                    self._loop(graph, comp)
                    done += sum(1 for u in comp if u < len(units))
                    continue
                if comp[0] >= len(units):
                    extra = graph.extras[comp[0] - len(units)]
                    if extra[0] == "name":  # a range needs no evaluation: it only orders
                        self.budget.start()
                        self.name_value(extra[1], extra[2])
                    continue
                members = units[comp[0]]
                if len(members) == 1:
                    self._cell(members[0])
                else:
                    self._group(members)
                done += len(members)
                if self.progress is not None and done >= step:
                    self.progress(done, total)
                    step = done + 2000

    def _sort_key(self, fi: int) -> tuple[int, int, int]:
        fc = self.cells[fi]
        return fc.sheet, fc.row, fc.col

    def where(self, fi: int, row: int | None = None, col: int | None = None) -> str:
        """``Sheet!A1`` of formula cell ``fi`` (or of another cell of its sheet)."""
        fc = self.cells[fi]
        return f"{quoted(self.book.sheets[fc.sheet].name)}!{address(row or fc.row, col or fc.col)}"

    def _cell(self, fi: int) -> None:
        fc = self.cells[fi]
        t = fc.template
        if t.ast is None:
            self._store(fi, t.error)
            return
        ctx = self._context
        ctx.sheet, ctx.dr, ctx.dc, ctx.row, ctx.col = fc.sheet, fc.row - t.row, fc.col - t.col, fc.row, fc.col
        self.budget.start()
        self.current = fi
        ctx.implicit = legacy = fc.kind == "normal"  # a plain formula: Excel's legacy evaluation
        value = value_of(t.ast, ctx, legacy)
        ctx.implicit = False
        self.current = None
        self._store(fi, value)

    # ---- results -----------------------------------------------------------------------
    def error_cells(self) -> Iterator[tuple[str, CellError]]:
        """(``Sheet!A1``, error) of every formula or spill cell holding an error, sheet by sheet."""
        found, spills = [], self.spills
        for fi, v in enumerate(self.result):
            if fi not in spills:
                if type(v) is CellError:
                    fc = self.cells[fi]
                    found.append((fc.sheet, fc.row, fc.col, fi, v))
                continue
            fc, a = self.cells[fi], spills[fi]
            values = self.values[fc.sheet]
            for r in range(a.r1, a.r2 + 1):
                for c in range(a.c1, a.c2 + 1):
                    x = values.get((r, c))
                    if type(x) is CellError:
                        found.append((fc.sheet, r, c, fi, x))
        for s, r, c, fi, x in sorted(found, key=lambda e: e[:3]):
            yield self.where(fi, r, c), x
