"""Recalculation: every formula cell evaluated in dependency order, spills placed.

Cells of one formula shape side by side (a row, a column or a rectangle of them) are
evaluated as one block when the formula acts cell by cell (the operators, the built-ins of
:data:`..formula.batch.BATCHED`, the pack's functions, which broadcast) and no cell of the
block reads another (:meth:`Recalc._pieces`); an element that comes out as an error is
evaluated again on its own, so its value and reason are exactly a single cell's.

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

import bisect
import math
from dataclasses import dataclass
from typing import Any, Callable, Iterator, Mapping, NamedTuple

import numpy as np

from ..errors import CALC, NA, NAME, REF, SPILL, CellError
from ..formula import Binary, Call, Ref, Value, value_of, walk
from ..formula.batch import Declined, evaluate_block
from ..formula.evaluate import anchored, reference_of
from ..formula.nodes import Areas
from ..formula.budget import active, charge
from ..formula.dates import date_system
from .areas import AreaIndex, Overlap
from .external import linked_name, linked_values, split_link
from .formula_text import formula_at
from .graph import components, cycle
from .limits import DEFAULTS, Limits, option
from .model import Book, Sheet
from .package import Refused
from .refs import MAX_COL, MAX_ROW, Area, address, area, shifted
from .sheetxml import FormulaXml
from .tables import Tables
from .templates import Template, Templates, build

MAX_PASSES = 4
RESOLVED_LOOP_CELLS = 1000  # larger loops of written references are taken as circular without a try
RESOLVED_DEPTH = 40  # cells of a loop waiting for one another at once; deeper is taken as circular
KEPT_BLOCK_CELLS = 4_194_304  # ranges read are kept for reuse up to this many cells (32 MiB of references)
BATCH_CELLS = 65_536  # cells evaluated as one block at most: arrays far below the limit of one array
# How a block of cells of one shape is cut into units, coarsest first (see Recalc._pieces)
_RECTANGLE, _COLUMNS, _ROWS, _SINGLE = range(4)
_PREFIXES = ("_XLUDF.", "_XLFN.", "_XLWS.")


@dataclass(slots=True)
class FormulaCell:
    sheet: int
    row: int
    col: int
    template: Template
    kind: str  # "normal", "dynamic" (an Excel 365 dynamic array) or "legacy" (an {=array} formula)
    old_area: Area | None  # the stored range of an array formula


class Graph(NamedTuple):
    """The dependency graph. Nodes: the units (formula cells evaluated together, a column
    group, or alone), then ``extras[k]`` as node ``len(units) + k``: a defined name seen from
    a sheet, ``("name", key, sheet)``, or a range that formulas read, ``("area", sheet, (r1, c1,
    r2, c2))``, which stands between the formulas that read it and those inside it, so a range read by a
    thousand formulas costs a thousand edges and not a thousand times its contents."""

    units: list[tuple[int, ...]]
    extras: list[tuple]
    adj: list[list[int]]  # what each node needs
    comps: list[list[int]]  # strongly connected components, dependencies first


class _Links:
    """The dependency count of one graph build, against its limit."""

    def __init__(self, limit: int, engine: Recalc, graph: Graph):
        self.left, self.limit = limit, limit
        self.engine, self.graph = engine, graph
        self.owner = 0  # the node whose references are being followed

    def spend(self, n: int) -> None:
        self.left -= n
        if self.left < 0:
            who = self.engine.node_text(self.graph, self.owner)
            raise Refused(f"{who}: its references bring the dependencies between formulas over the limit of "
                          f"{self.limit:,} ({option('dependencies')})")


_UNSET = object()
_POSITIONAL = object()  # the value of a name that depends on the formula cell using it


def quoted(sheet: str) -> str:
    """A sheet name as a formula writes it.

    >>> quoted("Data"), quoted("My data"), quoted("it's")
    ('Data', "'My data'", "'it''s'")
    """
    plain = sheet.replace("_", "").replace(".", "").isalnum() and not sheet[0].isdigit()
    return sheet if plain else "'" + sheet.replace("'", "''") + "'"


class _Context:
    """The formula engine's view of the workbook from one cell (``dr``, ``dc``: the cell's
    offset from its template's cell)."""

    def __init__(self, engine: Recalc):
        self.engine = engine
        self.functions = engine.functions
        self.sheet = 0
        self.dr = 0
        self.dc = 0
        self.row = self.col = 1  # the formula cell
        self.implicit = False  # a legacy formula's implicit intersection (see formula.evaluate.intersect)

    def function(self, name: str) -> Callable[..., Any] | None:
        fn = self.functions.get(name)
        if fn is None:
            for prefix in _PREFIXES:
                if name.startswith(prefix):
                    return self.function(name[len(prefix):])
        return fn

    def _area(self, sheet: str | None, ref: str) -> tuple[int, Area] | CellError:
        s = self.engine.sheet_number(sheet, self.sheet)
        if type(s) is CellError:
            return s
        a = area(ref)
        if self.dr or self.dc:
            a = shifted(a, self.dr, self.dc)
            if a is None:
                return CellError(REF, f"{ref} moved by {self.dr} rows and {self.dc} columns is off the sheet")
        return s, a

    def position(self) -> tuple[int, int]:
        """The formula cell's row and column (for ROW() and COLUMN())."""
        return self.row, self.col

    def sheet_position(self, name: str | None) -> int | None:
        """The 1-based position of sheet ``name`` in the workbook (None: the formula's own
        sheet), chart sheets counted; None if there is no such sheet."""
        if name is None:
            return self.sheet + 1
        sheet = self.engine.book.sheet(name)
        return None if sheet is None else sheet.index + 1

    def sheet_count(self) -> int:
        return len(self.engine.book.sheets)

    def bounds(self, sheet: str | None, ref: str) -> tuple[int, int, int, int] | CellError:
        """First row, first column, last row, last column of a reference (for ROW, ROWS, ...)."""
        if sheet is not None and sheet.startswith("[") and split_link(sheet) is not None:
            a = area(ref)  # a reference into another workbook: where it points, not moved
            return (a.r1, a.c1, a.r2, a.c2) if a is not None else CellError(REF, f"{ref} is not a reference")
        found = self._area(sheet, ref)
        if type(found) is CellError:
            return found
        a = found[1]
        return a.r1, a.c1, a.r2, a.c2

    def read_found(self, sheet: str | None, ref: str) -> Value:
        """The values of a reference found while evaluating (INDIRECT, OFFSET, A1:INDEX(…)),
        which the dependency order may not have seen: the engine notes it (see :meth:`Recalc.found_read`)."""
        found = self._area(sheet, ref)
        if type(found) is CellError:
            return found
        self.engine.found_read(*found)
        return self.reference(sheet, ref)

    def spill_reference(self, sheet: str | None, ref: str) -> Ref | CellError:
        """The range the formula in a reference's first cell spilled over (``A1#``, written
        ``ANCHORARRAY(A1)`` in the file): the order evaluates that formula first."""
        found = self._area(sheet, ref)
        if type(found) is CellError:
            return found
        s, a = found
        fi = self.engine.at[s].get((a.r1, a.c1))
        spilled = None
        if fi is not None:  # a legacy array formula's range counts as its spill
            fc = self.engine.cells[fi]
            spilled = fc.old_area if fc.kind == "legacy" else self.engine.spills.get(fi)
        if spilled is None:
            return CellError(REF, f"{address(a.r1, a.c1)} holds no spilled array (the # operator)")
        return anchored(self.engine.book.sheets[s].name, spilled.r1, spilled.c1, spilled.r2, spilled.c2)

    def formula_text(self, sheet: str | None, ref: str) -> str | None | CellError:
        """The formula of a reference's first cell as the formula bar shows it (FORMULATEXT,
        ISFORMULA); None if it holds none."""
        found = self._area(sheet, ref)
        if type(found) is CellError:
            return found
        s, a = found
        return formula_at(self.engine.book.sheets[s].scan, self.engine.shared_firsts.get(s, {}), a.r1, a.c1)

    def pivot_table(self, sheet: str | None, ref: str) -> object:
        """The pivot table a reference meets (GETPIVOTDATA); None if it meets none."""
        found = self._area(sheet, ref)
        return found if type(found) is CellError else self.engine.book.pivot_at(*found)

    def name_reference(self, text: str) -> Ref | Areas | CellError | None:
        """The reference a defined name stands for when it is one reference (``=Data!$A$1:$A$9``)
        or a union of references (``=Data!$A$1:$A$9,Data!$C$1``)."""
        key = self.engine.resolve_name(self.sheet, text)
        if key is None:
            return None
        ast = self.engine.name_template(key).ast
        s = key[0] if key[0] is not None else self.sheet
        sheet = self.engine.book.sheets[s].name
        if type(ast) is Binary and ast.op == ",":
            found = reference_of(ast, _NameContext(self.engine, s, None))
            if type(found) is not Areas:
                return found
            return Areas(tuple(Ref(p.sheet or sheet, p.ref) for p in found.parts))
        if type(ast) is not Ref:
            return None
        return Ref(ast.sheet or sheet, ast.ref)

    def left_out(self, sheet: str | None, ref: str, hidden: bool) -> np.ndarray | None:
        """The cells of a reference that SUBTOTAL leaves out (True): SUBTOTAL and AGGREGATE
        formulas, rows filtered out, and with ``hidden`` every hidden row; None when there
        are none."""
        found = self._area(sheet, ref)
        if type(found) is CellError:
            return None
        s, a = found
        subtotals = self.engine.subtotal_cells()[s]
        rows = self.engine.hidden_rows(s, filtered_only=not hidden)
        if not subtotals and not rows:
            return None
        r2, c2 = self.engine.clipped(s, a)
        mask = np.zeros((r2 - a.r1 + 1, c2 - a.c1 + 1), dtype=bool)
        for r, c in subtotals:
            if a.r1 <= r <= r2 and a.c1 <= c <= c2:
                mask[r - a.r1, c - a.c1] = True
        for r in rows:
            if a.r1 <= r <= r2:
                mask[r - a.r1, :] = True
        return mask

    def reference(self, sheet: str | None, ref: str) -> Value:
        if sheet is not None and ":" in sheet:
            return self._across(sheet, ref)
        if sheet is not None and sheet.startswith("["):
            linked = split_link(sheet)
            if linked is not None:
                n, name = linked
                return self.reference(name, ref) if n == 0 else linked_values(self.engine.book.links, n, name, ref)
        found = self._area(sheet, ref)
        if type(found) is CellError:
            return found
        s, a = found
        if self.engine.pending:
            self.engine.wait_for(s, a)
        values = self.engine.values[s]
        if a.r1 == a.r2 and a.c1 == a.c2:
            return values.get((a.r1, a.c1))
        return self.engine.block(s, a)

    def _across(self, span: str, ref: str) -> Value:
        """A 3-D reference (``Jan:Dec!B4``): the area on each sheet of the span, stacked one
        below the other, so that SUM, COUNT, AVERAGE and the like take every sheet's cells."""
        sheets = self.engine.sheet_numbers(span, self.sheet)
        if type(sheets) is CellError:
            return sheets
        parts = []
        for s in sorted(sheets):
            v = self.reference(self.engine.book.sheets[s].name, ref)
            if type(v) is CellError:
                return v
            parts.append(v if type(v) is np.ndarray else np.array([[v]], dtype=object))
        width = max(p.shape[1] for p in parts)
        over = charge((sum(p.shape[0] for p in parts), width))
        if over is not None:
            return over
        padded = [p if p.shape[1] == width else np.hstack([p, np.full((p.shape[0], width - p.shape[1]), None)])
                  for p in parts]
        return np.vstack(padded)

    def name(self, text: str) -> Value:
        engine = self.engine
        key = engine.resolve_name(self.sheet, text)
        if key is None:
            linked = split_link(text) if text.startswith("[") else None
            if linked is not None:  # [1]!Rate: a name of another workbook; [0]!Rate: of this one
                n, name = linked
                return self.name(name.lstrip("!")) if n == 0 else linked_name(engine.book.links, n, name.lstrip("!"))
            if "|" in text:
                return CellError(REF, "a DDE link (another program's data) is not supported")
            if "[" in text:
                return CellError(REF, f"{text} is an external reference (another workbook)")
            return CellError(NAME, f"unknown name {text}")
        return self.named(key)

    def named(self, key: tuple[int | None, str]) -> Value:
        """The value of the defined name ``key`` as this formula cell sees it."""
        return self.engine.name_value(key, self.sheet, (self.row, self.col))


class _NameContext(_Context):
    """The view from a defined name: its references as written (no offset). A name that
    asks for the formula cell's position (ROW(), COLUMN()), or uses a name that does, has a
    value per cell: evaluated without a cell it only records that (``positional``)."""

    def __init__(self, engine: Recalc, sheet: int, cell: tuple[int, int] | None):
        super().__init__(engine)
        self.sheet, self.cell = sheet, cell
        if cell is not None:
            self.row, self.col = cell
        self.positional = False

    def position(self) -> tuple[int, int]:
        self.positional = True
        return super().position()

    def named(self, key: tuple[int | None, str]) -> Value:
        value = self.engine.name_value(key, self.sheet, self.cell)
        if value is _POSITIONAL:
            self.positional = True
            return CellError(NA, "a name whose value depends on the formula cell")  # never shown: see name_value
        return value


class _Block(_Context):
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
        cells = [get((r, c)) for r in rows for c in cols]
        if all(type(x) is float for x in cells):
            numbers = np.array(cells).reshape(h, w)
            if np.isfinite(numbers).all():
                return numbers
        # fromiter keeps each value as it is (a CellError is not unpacked)
        return np.fromiter(cells, dtype=object, count=h * w).reshape(h, w)


def _partition(level: int, r1: int, c1: int, h: int, w: int) -> list[tuple[int, int, int, int]]:
    """The parts (first row, first column, rows, columns) of the h x w rectangle at (r1, c1)
    as partition ``level`` cuts it."""
    if level == _RECTANGLE:
        return [(r1, c1, h, w)]
    if level == _COLUMNS:
        return [(r1, c1 + j, h, 1) for j in range(w)]
    if level == _ROWS:
        return [(r1 + i, c1, 1, w) for i in range(h)]
    return [(r, c, 1, 1) for r in range(r1, r1 + h) for c in range(c1, c1 + w)]


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


def _stored_range(f: FormulaXml, row: int, col: int) -> Area:
    """The range an array formula's cell stores (its own cell if the range does not start there)."""
    a = area(f.ref) if f.ref else None
    return a if a is not None and a.r1 == row and a.c1 == col else Area(row, col, row, col)


class Recalc:
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
            keys = (*constants, *formulas)
            self._loaded_extent.append((max((k[0] for k in keys), default=1), max((k[1] for k in keys), default=1)))
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
                kind = f.kind
                text, base = f.text, key
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
                    old = _stored_range(f, *key)
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
                constants.update((key, v) for key, v in scan.values.items() if key not in at)
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
            a = _stored_range(f, row, col)
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
        for fi, fc in enumerate(self.cells):
            cols = index[fc.sheet]
            entry = cols.get(fc.col)
            if entry is None:
                entry = cols[fc.col] = ([], [])
            entry[0].append(fc.row)
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
        evaluated again for each cell that uses it (without a cell: :data:`_POSITIONAL`)."""
        value = self.name_values.get((key, sheet), _UNSET)
        if value is _UNSET:
            value = self.name_values[(key, sheet)] = self._name(key, sheet, None)
        if value is _POSITIONAL and cell is not None:
            return self._name(key, sheet, cell)
        return value

    def _name(self, key: tuple[int | None, str], sheet: int, cell: tuple[int, int] | None) -> Value:
        t = self.name_template(key)
        if t.ast is None:
            return t.error
        ctx = _NameContext(self, sheet, cell)
        value = value_of(t.ast, ctx, may_be_function=True)
        return _POSITIONAL if ctx.positional and cell is None else value

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

    def found_read(self, s: int, a: Area) -> None:
        """Note that the formula cell being evaluated read area ``a`` of sheet ``s`` through a
        reference found while evaluating. If the area holds formula cells the order did not
        put first, the next pass orders them (see :meth:`run`)."""
        if self.current is None:
            return
        key = (s, a[:4])
        seen = self.found.setdefault(self.current, set())
        if key in seen:
            return
        seen.add(key)
        if self._has_formulas(s, a):
            self.found_new = True

    def _has_formulas(self, s: int, a: Area) -> bool:
        for c, (rows, _) in self._columns[s].items():
            if a.c1 <= c <= a.c2 and bisect.bisect_left(rows, a.r1) < bisect.bisect_right(rows, a.r2):
                return True
        return False

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
    def _units(self, floors: dict[int, int]) -> tuple[list[tuple[int, ...]], list[int]]:
        """Formula cells grouped, each group's cells row by row: blocks of one batchable shape
        (see :meth:`_pieces`), else single cells; and the partition each group comes from.
        ``floors``: the coarsest partition a cell may still take (see :meth:`_graph`)."""
        cells = self.cells
        if not self.batched:
            return [(fi,) for fi in range(len(cells))], [_SINGLE] * len(cells)
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
                    here = floors.get(fi, _RECTANGLE) if floors else _RECTANGLE
                    if run is not None and fc.template is t and row == last + 1 and here == floor \
                            and fc.kind == "normal":
                        run.append(fi)
                        last = row
                        continue
                    if run is not None:
                        close(run, t, floor, top, last, col)
                    if fc.template.batchable and fc.kind == "normal" and here < _SINGLE:
                        run, t, top, last, floor = [fi], fc.template, row, row, here
                    else:
                        run = None
                        units.append((fi,))
                        levels.append(_SINGLE)
                if run is not None:
                    close(run, t, floor, top, last, col)
            for (_, floor, _, _), found in runs.items():
                found.sort(key=lambda entry: entry[0])
                begin = 0
                for k in range(1, len(found) + 1):  # side by side: one rectangle
                    if k == len(found) or found[k][0] != found[k - 1][0] + 1 or floor == _COLUMNS:
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
            levels.append(_SINGLE)
            return
        first = self.cells[columns[0][0]]
        r1, c1 = first.row, first.col
        level = floor
        while level < _SINGLE:
            parts = _partition(level, r1, c1, h, w)
            if not any(ph * pw > 1 and self._reads_itself(s, first.template, Area(r, c, r + ph - 1, c + pw - 1))
                       for r, c, ph, pw in parts):
                break
            level += 1
        else:
            parts = _partition(_SINGLE, r1, c1, h, w)
        for r, c, ph, pw in parts:
            band = max(1, BATCH_CELLS // pw)
            for top in range(r, r + ph, band):
                units.append(tuple(columns[c - c1 + j][i - r1] for i in range(top, min(top + band, r + ph))
                                   for j in range(pw)))
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

    def _targets(self, unit: tuple[int, ...]) -> Iterator[tuple[int, Area]]:
        """(sheet, area) of every reference of a unit (a block: from its first cell to its last)."""
        first, last = self.cells[unit[0]], self.cells[unit[-1]]
        t = first.template
        for name, a in t.refs:
            sheets = self.sheet_numbers(name, first.sheet)
            if type(sheets) is CellError:
                continue
            top = shifted(a, first.row - t.row, first.col - t.col)
            bottom = shifted(a, last.row - t.row, last.col - t.col) if len(unit) > 1 else top
            if top is None or bottom is None:
                continue
            for s in sorted(sheets):
                yield s, Area(top.r1, top.c1, max(top.r2, bottom.r2), max(top.c2, bottom.c2))

    def _graph(self, assumed: dict[int, Area]) -> Graph:
        """The dependency graph (see :class:`Graph`), components in evaluation order."""
        spills = [AreaIndex() for _ in self.book.sheets]
        for fi, a in assumed.items():
            spills[self.cells[fi].sheet].add(a, fi)
        for index in spills:
            index.freeze()  # stored ranges were checked on reading; placed spills never overlap
        floors: dict[int, int] = {}
        while True:
            units, levels = self._units(floors)
            unit_of = [0] * len(self.cells)
            for u, members in enumerate(units):
                for fi in members:
                    unit_of[fi] = u
            graph = Graph(units, [], [], [])
            node_of: dict[tuple, int] = {}
            links = _Links(self.limits.dependencies, self, graph)

            def node(extra: tuple) -> int:
                n = node_of.get(extra)
                if n is None:
                    n = node_of[extra] = len(units) + len(graph.extras)
                    graph.extras.append(extra)
                return n

            def refer(s: int, a: Area, needs: set[int]) -> None:
                """What a reference to area ``a`` of sheet ``s`` needs."""
                if a.single:
                    self._formulas_in(s, a, unit_of, needs, links)
                    anchor = spills[s].at(a.r1, a.c1)
                    if anchor is not None:
                        needs.add(unit_of[anchor])
                else:
                    links.spend(1)
                    needs.add(node(("area", s, a[:4])))

            def refer_names(names: tuple[str, ...], sheet: int, needs: set[int]) -> None:
                for text in names:
                    key = self.resolve_name(sheet, text)
                    if key is not None:
                        links.spend(1)
                        needs.add(node(("name", key, sheet)))

            for u, members in enumerate(units):
                needs: set[int] = set()
                links.owner = u
                for s, a in self._targets(members):
                    refer(s, a, needs)
                for fi in members:
                    for s, corners in self.found.get(fi, ()):
                        refer(s, Area(*corners), needs)
                fc = self.cells[members[0]]
                refer_names(fc.template.names, fc.sheet, needs)
                graph.adj.append(sorted(needs))
            for k, extra in enumerate(graph.extras):  # grows while it runs: names and ranges met on the way
                needs = set()
                links.owner = len(units) + k
                if extra[0] == "area":
                    _, s, corners = extra
                    a = Area(*corners)
                    self._formulas_in(s, a, unit_of, needs, links)
                    for anchor in spills[s].meeting(a):
                        links.spend(1)
                        needs.add(unit_of[anchor])
                else:
                    _, key, sheet = extra
                    t = self.name_template(key)
                    for ref_sheet, a in t.refs:
                        sheets = self.sheet_numbers(ref_sheet, sheet)
                        for s in sheets if type(sheets) is list else ():
                            refer(s, a, needs)
                    refer_names(t.names, sheet, needs)
                graph.adj.append(sorted(needs))
            graph.comps.extend(components(graph.adj))
            looped = [u for comp in graph.comps if len(comp) > 1 or comp[0] in graph.adj[comp[0]]
                      for u in comp if u < len(units) and len(units[u]) > 1]
            if not looped:
                return graph
            for u in looped:  # a block evaluated at once cannot be part of a loop: cut it finer
                for fi in units[u]:
                    floors[fi] = max(floors.get(fi, _RECTANGLE), levels[u] + 1)

    def _formulas_in(self, s: int, a: Area, unit_of: list[int], needs: set[int], links: _Links) -> None:
        """Add the units of the formula cells in area ``a`` of sheet ``s``."""
        cols = self._columns[s]
        if a.c2 - a.c1 + 1 <= len(cols):
            candidates = (cols[c] for c in range(a.c1, a.c2 + 1) if c in cols)
        else:
            candidates = (v for c, v in cols.items() if a.c1 <= c <= a.c2)
        for rows, fis in candidates:
            lo, hi = bisect.bisect_left(rows, a.r1), bisect.bisect_right(rows, a.r2)
            links.spend(hi - lo)  # counted before they are visited
            needs.update(map(unit_of.__getitem__, fis[lo:hi]))

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

    def _grow(self, s: int, a: Area) -> None:
        ext = self.extent[s]
        ext[0], ext[1] = max(ext[0], a.r2), max(ext[1], a.c2)

    @property
    def graph(self) -> tuple[list[tuple[int, ...]], list[list[int]], list[list[int]]]:
        """(units, the units each needs, components) of the last pass, for tools that trace
        results back: what a unit needs through ranges and names is listed as the units
        behind them, so every node of this view is a unit. Blocks evaluated at once are
        traced cell by cell: each formula cell is a unit of its own."""
        graph = self._graph_used
        if any(len(members) > 1 for members in graph.units):
            batched, self.batched = self.batched, False  # the same order constraints, between single cells
            try:
                graph = self._graph(dict(self.spills))
            finally:
                self.batched = batched
        n = len(graph.units)
        needs = []
        for u in range(n):
            found, seen, todo = set(), set(), list(graph.adj[u])
            while todo:
                v = todo.pop()
                if v < n:
                    found.add(v)
                elif v not in seen:
                    seen.add(v)
                    todo += graph.adj[v]
            needs.append(sorted(found))
        comps = [[u for u in comp if u < n] for comp in graph.comps]
        return graph.units, needs, [comp for comp in comps if comp]

    def _evaluate(self, graph: Graph, assumed: dict[int, Area]) -> None:
        self._graph_used = graph  # the order the results come from (see :attr:`graph`)
        self._reset(assumed)
        self._context = _Context(self)
        self._block = _Block(self)
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

    def _iterate(self, graph: Graph, comp: list[int]) -> None:
        """Excel's iterative calculation, as the workbook asks for it: the loop's cells are
        evaluated in turn, in sheet order, from their stored values, until none changes by
        more than the maximum change or the maximum count is reached."""
        count, delta = self.book.iteration
        units = graph.units
        cells = sorted((fi for u in comp if u < len(units) for fi in units[u]), key=self._sort_key)
        names = [(extra[1], extra[2]) for u in comp if u >= len(units)
                 for extra in (graph.extras[u - len(units)],) if extra[0] == "name"]
        for fi in cells:
            fc = self.cells[fi]
            cached = self.book.sheets[fc.sheet].scan.formulas[(fc.row, fc.col)].cached
            self.values[fc.sheet][(fc.row, fc.col)] = cached if type(cached) is float else 0.0
        for _ in range(count):
            for key in names:  # the loop's names and ranges read the values of this sweep
                self.name_values.pop(key, None)
            self._blocks.clear()
            self._kept = 0
            change = 0.0
            for fi in cells:
                fc = self.cells[fi]
                before = self.values[fc.sheet].get((fc.row, fc.col))
                self._cell(fi)
                after = self.values[fc.sheet].get((fc.row, fc.col))
                if type(before) is float and type(after) is float:
                    change = max(change, abs(after - before))
                elif before != after:
                    change = math.inf
            if change <= delta:
                return

    def _loop(self, graph: Graph, comp: list[int]) -> None:
        """Every cell of a loop holds #CALC! naming it; so does every name on it (unless the
        workbook asks for iterative calculation: :meth:`_iterate`)."""
        if self.book.iteration is not None:
            self._iterate(graph, comp)
            return
        if self._resolve(graph, comp):
            return
        self._blocks.clear()  # ranges read while resolving it may hold values the loop's errors replace
        self._kept = 0
        units = graph.units
        members = set(comp)
        shared = None
        for u in sorted(comp, key=lambda u: self._node_key(graph, u)):
            if u >= len(units) and graph.extras[u - len(units)][0] == "area":
                continue
            if shared is None or len(comp) <= 200:  # beyond that, one loop names them all
                path = [v for v in cycle(graph.adj, u, members)
                        if v < len(units) or graph.extras[v - len(units)][0] == "name"]
                shared = "circular reference: " + " -> ".join(self.node_text(graph, v) for v in path)
            if u < len(units):
                self._store(units[u][0], CellError(CALC, shared))
            else:
                _, key, sheet = graph.extras[u - len(units)]
                self.name_values[(key, sheet)] = CellError(CALC, shared)

    def _resolve(self, graph: Graph, comp: list[int]) -> bool:
        """Evaluate a loop of plain formula cells on demand, in sheet order, a cell reading a cell of
        the loop that is not evaluated yet evaluating it first (:meth:`wait_for`). True when every cell
        got its value so; False when one read a cell still being evaluated (a real circular
        reference), or the loop holds names, array formulas or too many cells to try."""
        units = graph.units
        if any(u >= len(units) and graph.extras[u - len(units)][0] == "name" for u in comp):
            return False
        cells = sorted((fi for u in comp if u < len(units) for fi in units[u]), key=self._sort_key)
        if len(cells) > RESOLVED_LOOP_CELLS or any(self.cells[fi].kind != "normal" for fi in cells):
            return False
        for fi in cells:
            fc = self.cells[fi]
            self.pending.setdefault(fc.sheet, {})[(fc.row, fc.col)] = fi
        self._circular = False
        try:
            for fi in cells:
                fc = self.cells[fi]
                if (fc.row, fc.col) in self.pending[fc.sheet]:
                    self._evaluate_waited(fi)
        finally:
            self.pending = {}
        return not self._circular

    def wait_for(self, s: int, a: Area) -> None:
        """Before a formula reads area ``a`` of sheet ``s`` while a loop is resolved: the loop's cells
        there that are not evaluated yet, evaluated first."""
        pending = self.pending.get(s)
        if not pending:
            return
        if a.single:
            fi = pending.get((a.r1, a.c1))
            waited = [] if fi is None else [fi]
        else:
            waited = [fi for (r, c), fi in pending.items() if a.contains(r, c)]
        for fi in waited:
            self._evaluate_waited(fi)

    def _evaluate_waited(self, fi: int) -> None:
        """Formula cell ``fi`` of the loop being resolved, evaluated in the middle of another's
        evaluation (whose context, cell and budget are put back after)."""
        if self._circular:
            return
        if fi in self._waiting or len(self._waiting) >= RESOLVED_DEPTH:
            self._circular = True
            return
        fc = self.cells[fi]
        saved = self._context, self.current, self.budget.left
        self._context = _Context(self)
        self._waiting.append(fi)
        try:
            self._cell(fi)
        finally:
            self._waiting.pop()
            self._context, self.current, self.budget.left = saved
            self.pending[fc.sheet].pop((fc.row, fc.col), None)

    def _node_key(self, graph: Graph, u: int) -> tuple:
        """Cells in sheet order, then names, then ranges."""
        if u < len(graph.units):
            return (0,) + self._sort_key(graph.units[u][0])
        extra = graph.extras[u - len(graph.units)]
        return (1, extra[1][1], extra[2]) if extra[0] == "name" else (2, extra[1], extra[2])

    def node_text(self, graph: Graph, u: int) -> str:
        """A graph node as people name it: ``Sheet!A1``, ``the name Rate`` or ``Sheet!A1:B9``."""
        if u < len(graph.units):
            return self.where(graph.units[u][0])
        extra = graph.extras[u - len(graph.units)]
        if extra[0] == "name":
            return f"the name {extra[1][1]}"
        return f"{quoted(self.book.sheets[extra[1]].name)}!{Area(*extra[2]).text()}"

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
        keys = [(r, c) for r in range(first.row, last.row + 1) for c in range(first.col, last.col + 1)]
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

    # ---- results -----------------------------------------------------------------------
    def error_cells(self) -> Iterator[tuple[str, CellError]]:
        """(``Sheet!A1``, error) of every formula or spill cell holding an error, sheet by sheet."""
        found = []
        for fi, v in enumerate(self.result):
            fc = self.cells[fi]
            a = self.spills.get(fi)
            if a is None:
                if type(v) is CellError:
                    found.append((fc.sheet, fc.row, fc.col, fi, v))
                continue
            values = self.values[fc.sheet]
            for r in range(a.r1, a.r2 + 1):
                for c in range(a.c1, a.c2 + 1):
                    x = values.get((r, c))
                    if type(x) is CellError:
                        found.append((fc.sheet, r, c, fi, x))
        for s, r, c, fi, x in sorted(found, key=lambda e: e[:3]):
            yield self.where(fi, r, c), x
