"""Compile again the formulas of a loaded document that call pack functions by plain name.

Runs inside LibreOffice (UNO objects only, no ``uno`` import needed). Calc's API grammar
resolves an add-in function by its display name, which is the plain name, so setting a
formula's own text again turns an unknown ``boil_temp(...)`` into the add-in call.
"""

from __future__ import annotations

import re
from typing import Any


def _used_area(sheet: Any) -> Any:
    cursor = sheet.createCursor()
    cursor.gotoEndOfUsedArea(False)
    end = cursor.getRangeAddress()
    return sheet.getCellRangeByPosition(0, 0, end.EndColumn, end.EndRow)


def recompile(document: Any, plain_call: re.Pattern[str]) -> int:
    """Compile each matching formula again (an array formula over its whole range); the count."""
    count = 0
    automatic = document.isAutomaticCalculationEnabled()
    document.enableAutomaticCalculation(False)
    try:
        sheets = document.getSheets()
        for index in range(sheets.getCount()):
            sheet = sheets.getByIndex(index)
            arrays = set()
            for r, row in enumerate(_used_area(sheet).getFormulaArray()):
                for c, formula in enumerate(row):
                    if not formula.startswith(("=", "{=")) or not plain_call.search(formula):
                        continue
                    cell = sheet.getCellByPosition(c, r)
                    if formula.startswith("{"):
                        cursor = sheet.createCursorByRange(cell)
                        cursor.collapseToCurrentArray()
                        a = cursor.getRangeAddress()
                        key = (a.StartColumn, a.StartRow, a.EndColumn, a.EndRow)
                        if key not in arrays:
                            arrays.add(key)
                            cursor.setArrayFormula(formula[1:-1])
                            count += 1
                    else:
                        cell.setFormula(formula)
                        count += 1
    finally:
        document.enableAutomaticCalculation(automatic)
    if count:
        document.calculate()
        document.setModified(False)
    return count
