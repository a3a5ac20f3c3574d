"""A cell's formula as Excel shows it in the formula bar (FORMULATEXT, ISFORMULA): the text
the file stores, with the file-format prefixes of newer functions and of LAMBDA parameters
left out, a shared formula's other cells moved from its first cell, and a leading ``=``.

>>> shown("_xlfn.CONCAT(A1, \\"_xlfn.\\")")
'=CONCAT(A1, "_xlfn.")'
"""

from __future__ import annotations

import re
from typing import Mapping

from .refs import address
from .sheetxml import SheetScan

_STRING_OR_PREFIX = re.compile(r'("(?:[^"]|"")*")|_xl(?:fn|ws|udf|pm|op)\.', re.IGNORECASE)


def shown(text: str) -> str:
    """``text`` as the formula bar shows it (prefixes outside strings removed, ``=`` first)."""
    return "=" + _STRING_OR_PREFIX.sub(lambda m: m.group(1) or "", text)


def formula_at(scan: SheetScan, firsts: Mapping[str, tuple[int, int]], row: int, col: int) -> str | None:
    """The formula of the cell at (row, col) as the formula bar shows it; None if it holds
    none (a value, an empty cell, a cell inside another cell's array formula). ``firsts``:
    the first cell of each shared formula, by its ``si``."""
    f = scan.formulas.get((row, col))
    if f is None or f.kind == "dataTable":
        return None
    if f.kind != "shared" or f.text:
        return shown(f.text) if f.text else None
    first = firsts.get(f.si)
    if first is None:
        return None
    # imported here: openpyxl's package import loads its whole workbook model (about 50 ms), which a
    # recalculation needs only for the shared formulas FORMULATEXT shows
    from openpyxl.formula.translate import Translator  # pylint: disable=import-outside-toplevel

    moved = Translator("=" + scan.formulas[first].text, origin=address(*first)).translate_formula(address(row, col))
    return shown(moved[1:])
