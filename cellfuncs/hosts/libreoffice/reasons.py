"""ERROR_REASON(cell): the plain-language reason behind the error value a cell shows.

Calc keeps only an error's number, so the reason is found again: the cell's formula is
read back (Calc's API syntax, translated to Excel's), evaluated by the pack's own formula
engine with the document's current cell values, and the first error's reason is returned.
For a cell of an array formula it is that cell's element. A formula that uses functions the
pack's engine does not know gives that as its reason. No error: an empty text.
"""

from __future__ import annotations

import re
from typing import Any

import numpy as np

from ...errors import CellError
from ...formula import FormulaSyntaxError, compute
from ...sheet import FUNCTIONS
from .adapt import EXCEL_CODES
from .interface import PREFIX

# outside string literals: Calc's separators and sheet references ($Sheet2.A1, 'My sheet'.A1)
_STRING = re.compile(r'("(?:[^"]|"")*")')
_SHEET = re.compile(r"\$?('(?:[^']|'')+'|[A-Za-z_][\w]*)\.(?=\$?[A-Za-z]{1,3}\$?\d)")


def excel_formula(api_formula: str) -> str:
    """``=CELLFUNCS.FUNCTIONS.BOIL_TEMP("a;b";$Sheet2.A1)`` -> ``=BOIL_TEMP("a;b",'Sheet2'!A1)``."""
    text = api_formula[1:-1] if api_formula.startswith("{") else api_formula
    parts = _STRING.split(text)
    for i in range(0, len(parts), 2):  # even parts lie outside string literals
        part = re.sub(re.escape(PREFIX), "", parts[i], flags=re.IGNORECASE).replace(";", ",")
        parts[i] = _SHEET.sub(lambda m: (m.group(1) if m.group(1).startswith("'") else f"'{m.group(1)}'") + "!",
                              part)
    return "".join(parts)


class _Document:
    """The pack engine's context: pack functions, and cell values read from the document."""

    def __init__(self, document: Any, sheet: Any):
        self.document, self.sheet = document, sheet

    def function(self, name: str):
        entry = FUNCTIONS.get(name)
        return entry.call if entry else None

    def reference(self, sheet: str | None, ref: str) -> Any:
        where = self.sheet if sheet is None else self.document.getSheets().getByName(sheet)
        area = where.getCellRangeByName(ref.replace("$", ""))
        data = area.getDataArray()
        values = np.empty((len(data), len(data[0])), dtype=object)
        for r, row in enumerate(data):
            for c, value in enumerate(row):
                cell = area.getCellByPosition(c, r)
                number = cell.getError()
                if number:
                    values[r, c] = CellError(EXCEL_CODES.get(number, "#VALUE!"))
                elif cell.getType().value == "EMPTY":
                    values[r, c] = None
                else:
                    values[r, c] = value
        return values[0, 0] if values.shape == (1, 1) else values

    def name(self, text: str) -> Any:
        return CellError("#NAME?", f"ERROR_REASON does not read defined names ({text})")


def reason(document: Any, cell_range: Any) -> str:
    """The reason of the error ``cell_range``'s first cell shows ("" when it shows none)."""
    cell = cell_range.getCellByPosition(0, 0)
    if not cell.getError():
        return ""
    formula = cell.getFormula()
    if not formula.startswith(("=", "{=")):
        return ""
    context = _Document(document, cell.getSpreadsheet())
    try:
        value = compute(excel_formula(formula), context)
    except FormulaSyntaxError as exc:
        return f"the formula could not be read again: {exc}"
    if isinstance(value, np.ndarray):
        cursor = cell.getSpreadsheet().createCursorByRange(cell)
        cursor.collapseToCurrentArray()
        here, start = cell.getCellAddress(), cursor.getRangeAddress()
        r, c = here.Row - start.StartRow, here.Column - start.StartColumn
        value = value[r if value.shape[0] > 1 else 0, c if value.shape[1] > 1 else 0] if value.ndim == 2 else value
    if isinstance(value, CellError):
        return str(value)
    return ""
