"""Writing spilling formulas from openpyxl the way Excel records them.

A formula a workbook stores plainly (``<f>…</f>``) is a legacy formula: Excel, and
``cellfuncs recalc``, evaluate it to one value (implicit intersection). A formula meant to
spill its array over the cells below and to the right (PHASE_LINE, a function of a row of
temperatures and a column of pressures) must be recorded as a dynamic array: an array
formula anchored in its cell whose cell metadata says "dynamic" (the XLDAPR record Excel
365 writes). openpyxl writes neither, so write such formulas with :func:`spill` and save
with :func:`save`, or mark the cells of a saved file with :func:`mark_spills`::

    from openpyxl import Workbook
    from cellfuncs.workbook.authoring import save, spill

    wb = Workbook()
    ws = wb.active
    spill(ws, "A1", '=PHASE_LINE("water","boil",300,400,5)')
    save(wb, "lines.xlsx")   # then: cellfuncs recalc lines.xlsx --in-place

The spill's extent is found when the workbook is recalculated (by ``cellfuncs recalc`` or
by Excel), which stores the values in every cell of it.
"""

from __future__ import annotations

import os
import weakref
from typing import Iterable, Mapping

from .model import load
from .package import Package, Refused
from .refs import cell
from .sheetxml import tag_end
from .writer import PackageEdit, dynamic_record
from .xmledit import retag, splice
from .zipout import write_package

_SPILLS: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()  # openpyxl workbook -> {sheet title: [cells]}


def spill(ws, ref: str, formula: str) -> None:
    """Put ``formula`` into cell ``ref`` of openpyxl worksheet ``ws`` as a spilling formula
    (recorded for :func:`save`)."""
    ws[ref] = formula
    _SPILLS.setdefault(ws.parent, {}).setdefault(ws.title, []).append(ref.replace("$", "").upper())


def spills_of(wb) -> dict[str, list[str]]:
    """The cells :func:`spill` recorded for openpyxl workbook ``wb``, by sheet title."""
    return {title: list(cells) for title, cells in _SPILLS.get(wb, {}).items()}


def save(wb, path: str | os.PathLike) -> None:
    """Save openpyxl workbook ``wb`` to ``path`` with its :func:`spill` cells marked as spilling."""
    wb.save(path)
    mark_spills(path, spills_of(wb))


def mark_spills(path: str | os.PathLike, cells: Mapping[str, Iterable[str]]) -> None:
    """Mark formula cells of the saved workbook at ``path`` (sheet name -> cells such as
    ``"A1"``) as dynamic arrays, in place. A cell without a formula is an error."""
    wanted = {sheet: list(refs) for sheet, refs in cells.items() if refs}
    if not wanted:
        return
    pkg = Package(str(path))
    try:
        book = load(pkg)
        edit = PackageEdit(pkg, book)
        cm = dynamic_record(edit, book)
        for title, refs in wanted.items():
            sheet = book.sheet(title)
            if sheet is None or sheet.scan is None:
                raise Refused(f"there is no worksheet named {title!r}")
            data = edit.current(sheet.part)
            edits = []
            for ref in refs:
                key = cell(ref)
                span = sheet.scan.cells.get(key) if key else None
                if span is None or span.formula is None or span.formula.empty:
                    raise Refused(f"{title}!{ref} holds no formula")
                if sheet.scan.formulas[key].kind == "shared":
                    raise Refused(f"{title}!{ref} holds a shared formula; write it into the cell itself")
                head_end = tag_end(data, span.start)
                edits.append((span.start, head_end, retag(data[span.start:head_end], {b"cm"}, [(b"cm", cm)], close=False)))
                f = span.formula
                f_end = tag_end(data, f.start)
                array = [(b"t", b"array"), (b"ref", ref.encode())]
                edits.append((f.start, f_end, retag(data[f.start:f_end], {b"t", b"ref", b"si"}, array)))
            edit.replaced[sheet.part] = splice(data, edits)
        edit.content_types()
        replaced = {name: pkg.encoded(name, data) for name, data in edit.replaced.items()}
        write_package(pkg, str(path), replaced, edit.removed, edit.added)
    finally:
        pkg.close()
