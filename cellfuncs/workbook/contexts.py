"""The formula engine's views of the workbook during recalculation: from a formula cell
(:class:`Context`) and from a defined name (:class:`NameContext`), each asking the
:class:`~.engine.Recalc` it belongs to for values, sheets and names."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Callable

import numpy as np

from ..errors import NA, NAME, REF, CellError
from ..formula import Binary, Ref, Value
from ..formula.budget import charge
from ..formula.evaluate import anchored, reference_of
from ..formula.nodes import Areas
from .external import linked_name, linked_values, split_link
from .formula_text import formula_at
from .refs import Area, address, area, shifted

if TYPE_CHECKING:
    from .engine import Recalc

_PREFIXES = ("_XLUDF.", "_XLFN.", "_XLWS.")
POSITIONAL = object()  # the value of a name that depends on the formula cell using it


class Context:
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
            found = reference_of(ast, NameContext(self.engine, s, None))
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


class NameContext(Context):
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
        if value is POSITIONAL:
            self.positional = True
            return CellError(NA, "a name whose value depends on the formula cell")  # never shown: see name_value
        return value
