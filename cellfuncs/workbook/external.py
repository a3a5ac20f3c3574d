"""The values Excel keeps of other workbooks a workbook refers to (its external links).

A formula such as ``=[1]Prices!B4`` or ``=[1]!Rate`` reads another workbook, which is not
opened: Excel shows the value it stored when it last updated the link, in the link's part
(``xl/externalLinks/externalLinkN.xml``: the other workbook's sheet names, the cells it
read, its defined names), and so does recalculation here. ``[n]`` counts the workbook's
``externalReference`` elements from 1; ``[0]`` is the workbook itself.

>>> from cellfuncs.workbook.package import parse_xml
>>> link = read_link(parse_xml(b'<externalLink xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
...     b'<externalBook><sheetNames><sheetName val="Prices"/></sheetNames><definedNames>'
...     b'<definedName name="Rate" refersTo="=Prices!$B$4"/></definedNames><sheetDataSet>'
...     b'<sheetData sheetId="0"><row r="4"><cell r="B4"><v>0.25</v></cell></row></sheetData>'
...     b'</sheetDataSet></externalBook></externalLink>', "link.xml"), "link.xml")
>>> link.value("prices", 4, 2), link.names["RATE"]
(0.25, '=Prices!$B$4')
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from xml.etree.ElementTree import Element

import numpy as np

from ..errors import REF, CellError
from ..formula import Literal, Ref, Value, parse
from ..formula.budget import charge
from .refs import area
from .sheetxml import NAMESPACES, stored_value

_LINK = re.compile(r"\[(\d+)\](.*)\Z", re.DOTALL)


@dataclass
class ExternalBook:
    """What a link stored of another workbook: cell values by sheet (lower-case name) and
    cell, and its defined names (upper-case) with the formulas they stand for."""

    sheets: list[str] = field(default_factory=list)
    cells: dict[str, dict[tuple[int, int], object]] = field(default_factory=dict)
    names: dict[str, str] = field(default_factory=dict)
    failed: set[str] = field(default_factory=set)  # sheets Excel could not read when it last updated the link

    def value(self, sheet: str, row: int, col: int) -> object:
        """The stored value of a cell (None: the link stored none, which Excel shows as 0)."""
        return self.cells.get(sheet.lower(), {}).get((row, col))


def _local(el: Element) -> str:
    tag = el.tag
    return tag.rsplit("}", 1)[-1] if tag.startswith("{") and tag.split("}", 1)[0][1:] in NAMESPACES else ""


def _each(el: Element, local: str) -> list[Element]:
    return [c for c in el if _local(c) == local]


def read_link(root: Element, part: str) -> ExternalBook | None:
    """The other workbook a link part describes, None for other kinds of link (DDE, OLE)."""
    book = next(iter(_each(root, "externalBook")), None)
    if book is None:
        return None
    out = ExternalBook()
    for block in _each(book, "sheetNames"):
        out.sheets += [el.get("val", "") for el in _each(block, "sheetName")]
    for block in _each(book, "definedNames"):
        for el in _each(block, "definedName"):
            out.names[el.get("name", "").upper()] = el.get("refersTo", "")
    for block in _each(book, "sheetDataSet"):
        for data in _each(block, "sheetData"):
            sheet_id = data.get("sheetId", "")
            if not sheet_id.isdigit() or int(sheet_id) >= len(out.sheets):
                continue
            cells = out.cells.setdefault(out.sheets[int(sheet_id)].lower(), {})
            if data.get("refreshError", "").lower() in ("1", "true"):
                out.failed.add(out.sheets[int(sheet_id)].lower())
            for row in _each(data, "row"):
                for cell in _each(row, "cell"):
                    where = area(cell.get("r", ""))
                    v = next(iter(_each(cell, "v")), None)
                    if where is not None and where.single and v is not None:
                        cells[(where.r1, where.c1)] = stored_value(cell.get("t", "n"), v.text, [], part)
    return out


def split_link(text: str) -> tuple[int, str] | None:
    """``[n]rest`` as (n, rest): ``[1]Prices`` is (1, "Prices"); None for other texts."""
    m = _LINK.match(text)
    return (int(m.group(1)), m.group(2)) if m else None


def _book(links: list[ExternalBook | None], n: int) -> ExternalBook | CellError:
    link = links[n - 1] if 0 < n <= len(links) else None
    return CellError(REF, f"[{n}] is a link to another workbook whose values the file does not keep") \
        if link is None else link


def linked_values(links: list[ExternalBook | None], n: int, sheet: str, ref: str) -> Value:
    """The stored values of ``ref`` on ``sheet`` of the workbook of link ``n``: a value, or an
    array cut to the cells the link stored (an empty cell is None, shown as 0)."""
    link = _book(links, n)
    if type(link) is CellError:
        return link
    a = area(ref)
    if a is None:
        return CellError(REF, f"[{n}]{sheet}!{ref} is not a reference")
    if sheet.lower() in link.failed:
        return CellError(REF, f"Excel could not read sheet {sheet} of the other workbook [{n}] when it last updated the link")
    if a.single:
        return link.value(sheet, a.r1, a.c1)
    cells = link.cells.get(sheet.lower(), {})
    r2 = max(a.r1, min(a.r2, max((r for r, _ in cells), default=a.r1)))
    c2 = max(a.c1, min(a.c2, max((c for _, c in cells), default=a.c1)))
    over = charge((r2 - a.r1 + 1, c2 - a.c1 + 1))
    if over is not None:
        return over
    out = np.empty((r2 - a.r1 + 1, c2 - a.c1 + 1), dtype=object)
    for (r, c), v in cells.items():
        if a.r1 <= r <= r2 and a.c1 <= c <= c2:
            out[r - a.r1, c - a.c1] = v
    return out


def linked_name(links: list[ExternalBook | None], n: int, name: str) -> Value:
    """The value of defined name ``name`` of the workbook of link ``n`` (``Sheet!Name`` for a
    name of one sheet), through the cells the link stored."""
    link = _book(links, n)
    if type(link) is CellError:
        return link
    formula = link.names.get(name.rpartition("!")[2].upper())
    if formula is None:
        return CellError(REF, f"the other workbook [{n}] has no name {name} the file keeps")
    try:
        ast = parse(formula if formula.startswith("=") else "=" + formula)
    except ValueError:
        return CellError(REF, f"the name {name} of the other workbook [{n}] is not understood")
    if type(ast) is Literal:
        return ast.value
    if type(ast) is Ref and ast.sheet is not None:
        return linked_values(links, n, ast.sheet, ast.ref.replace("$", ""))
    return CellError(REF, f"the name {name} of the other workbook [{n}] is not a reference or a constant")
