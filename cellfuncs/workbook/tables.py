"""Excel tables (list objects) and the structured references that name their parts.

A table is a rectangle of a sheet with a header row, data rows and perhaps a totals row,
and named columns. Formulas refer to its parts by name: ``Sales[Amount]`` (the data of a
column), ``Sales[[#This Row],[Amount]]`` (the cell of that column in the formula's row;
Excel shows it as ``[@Amount]``), ``Sales[[#Headers],[A]:[C]]``, ``Sales[#Totals]``,
``Sales`` alone (all its data). Since a table's place is fixed for a recalculation, each
structured reference is rewritten as the A1 reference it stands for before the formula
is parsed; the formula text in the file is left as it is.

The specifier grammar and the meaning of each item follow Excel's documentation of
structured references ("Using structured references with Excel tables"): the special
items ``#All``, ``#Data``, ``#Headers``, ``#Totals`` and ``#This Row``; a column, or a
range of columns ``[First]:[Last]``; ``'`` escapes the next character of a column name
(``[``, ``]``, ``#``, ``'``). A part the table lacks (headers of a table shown without
them, totals of one without a totals row) is ``#REF!``; ``#This Row`` outside the
table's data rows is ``#VALUE!``.

>>> t = Table("Sales", 0, "Data", Area(1, 1, 5, 3), 1, 1, ("Item", "Qty", "Price"))
>>> tables = Tables([t])
>>> tables.translate("=SUM(Sales[Qty])", 0, 9, 9)
'=SUM(Data!$B$2:$B$4)'
>>> tables.translate("=Sales[[#This Row],[Qty]]*Sales[@Price]", 0, 3, 5)
'=Data!$B3*Data!$C3'
>>> tables.translate('=SUM(sales[[#Headers],[#Data],[Qty]:[Price]])&"Sales[Qty]"', 0, 9, 9)
'=SUM(Data!$B$1:$C$4)&"Sales[Qty]"'
>>> tables.translate("=Sales[@Qty]", 0, 9, 9), tables.translate("=Sales", 0, 9, 9)
('=#VALUE!', '=Data!$A$2:$C$4')
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Iterable
from xml.etree.ElementTree import Element

from .refs import Area, area, column_letters

_ITEMS = ("#all", "#data", "#headers", "#totals", "#this row")
_NAME_CHAR = re.compile(r"[\w.\\?]")


def _quoted(sheet: str) -> str:
    plain = sheet.replace("_", "").replace(".", "").isalnum() and not sheet[0].isdigit()
    return sheet if plain else "'" + sheet.replace("'", "''") + "'"


@dataclass(frozen=True)
class Table:
    """A table: its name, sheet (index and name), whole area (headers and totals included),
    header and totals row counts, column names left to right, and whether a filter is set
    on it (its hidden rows are then rows filtered out)."""

    name: str
    sheet: int
    sheet_name: str
    area: Area
    header_rows: int
    totals_rows: int
    columns: tuple[str, ...]
    filtered: bool = False

    def rows(self, items: set[str], row: int | None) -> tuple[int, int] | str:
        """First and last row of the special items, or the error code."""
        a = self.area
        data = (a.r1 + self.header_rows, a.r2 - self.totals_rows)
        if "#this row" in items:
            if len(items) > 1:
                return "#REF!"
            if row is None or not data[0] <= row <= data[1]:
                return "#VALUE!"
            return row, row
        if not items or items == {"#data"}:
            return data
        if "#all" in items:
            return a.r1, a.r2
        spans = []
        if "#headers" in items:
            if not self.header_rows:
                return "#REF!"
            spans.append((a.r1, a.r1 + self.header_rows - 1))
        if "#data" in items:
            spans.append(data)
        if "#totals" in items:
            if not self.totals_rows:
                return "#REF!"
            spans.append((a.r2 - self.totals_rows + 1, a.r2))
        if "#headers" in items and "#totals" in items and "#data" not in items:
            return "#REF!"  # not one rectangle
        return spans[0][0], spans[-1][1]

    def column(self, name: str) -> int | None:
        lowered = name.lower()
        for k, c in enumerate(self.columns):
            if c.lower() == lowered:
                return self.area.c1 + k
        return None


def read_table(root: Element, sheet: int, sheet_name: str) -> Table | None:
    """The table a table part describes (None if it has no usable name or area)."""
    ns = root.tag[:root.tag.index("}") + 1] if root.tag.startswith("{") else ""
    name = root.get("displayName") or root.get("name")
    a = area(root.get("ref", ""))
    if not name or a is None:
        return None
    columns = tuple(c.get("name", "") for block in root.findall(f"{ns}tableColumns")
                    for c in block.findall(f"{ns}tableColumn"))
    return Table(name, sheet, sheet_name, Area(a.r1, a.c1, a.r2, a.c2), _count(root.get("headerRowCount"), 1),
                 _count(root.get("totalsRowCount"), 0), columns, root.find(f"{ns}autoFilter/{ns}filterColumn") is not None)


def _count(text: str | None, default: int) -> int:
    return int(text) if text is not None and text.isdigit() else default


def _unescape(text: str) -> str:
    return re.sub(r"'(.)", r"\1", text, flags=re.DOTALL)  # spaces belong to a column's name


def _pieces(body: str) -> list[str] | None:
    """The bracketed pieces of a specifier body such as ``[#Headers],[A]:[B]`` (each piece's
    text without its brackets; ``:`` kept as its own piece); None if it is not that form."""
    out, i, n = [], 0, len(body)
    while i < n:
        ch = body[i]
        if ch in " ,":
            i += 1
        elif ch == ":":
            out.append(":")
            i += 1
        elif ch == "[":
            j = i + 1
            while j < n and body[j] != "]":
                j += 2 if body[j] == "'" else 1
            if j >= n:
                return None
            out.append(body[i + 1:j])
            i = j + 1
        else:
            return None
    return out


class Tables:
    """The tables of a workbook, found by name (case-insensitive) or by a cell inside one."""

    def __init__(self, tables: Iterable[Table]):
        self.by_name = {t.name.upper(): t for t in tables}
        names = sorted(self.by_name, key=len, reverse=True)
        self._mention = re.compile("|".join(re.escape(n) for n in names), re.IGNORECASE) if names else None

    def __bool__(self) -> bool:
        return bool(self.by_name)

    def at(self, sheet: int, row: int, col: int) -> Table | None:
        for t in self.by_name.values():
            if t.sheet == sheet and t.area.contains(row, col):
                return t
        return None

    def mentioned(self, text: str) -> bool:
        """Whether ``text`` may hold a structured reference (a quick test before :meth:`translate`)."""
        return self._mention is not None and ("[" in text or self._mention.search(text) is not None)

    def translate(self, text: str, sheet: int, row: int | None, col: int | None) -> str:
        """``text`` with every structured reference written as the A1 reference (or error
        value) it stands for, seen from the formula cell (``row`` None: from a defined name)."""
        out, i, n = [], 0, len(text)
        while i < n:
            ch = text[i]
            if ch in "\"'":  # a text constant or a quoted sheet name: copied as it is
                j = i + 1
                while j < n and not (text[j] == ch and (j + 1 >= n or text[j + 1] != ch)):
                    j += 2 if text[j] == ch else 1
                out.append(text[i:j + 1])
                i = j + 1
                continue
            if _NAME_CHAR.match(ch) and not (i and (_NAME_CHAR.match(text[i - 1]) or text[i - 1] in "$!]")):
                j = i
                while j < n and _NAME_CHAR.match(text[j]):
                    j += 1
                table = self.by_name.get(text[i:j].upper())
                following = text[j] if j < n else ""
                if table is not None and following == "[":
                    end = _bracket_end(text, j)
                    if end is not None:
                        out.append(self._resolve(table, text[j + 1:end], row))
                        i = end + 1
                        continue
                elif table is not None and following not in ("(", "!"):
                    out.append(self._resolve(table, "", row))
                    i = j
                    continue
                out.append(text[i:j])
                i = j
                continue
            if ch == "[" and not (i and (_NAME_CHAR.match(text[i - 1]) or text[i - 1] == "]")):
                end = _bracket_end(text, i)
                if end is not None:  # a structured reference without its table's name, or [n] of a link
                    own = self.at(sheet, row, col) if row is not None and col is not None else None
                    inner = text[i + 1:end]
                    linked = inner.isdigit()
                    out.append(self._resolve(own, inner, row) if own is not None and not linked else text[i:end + 1])
                    i = end + 1
                    continue
            out.append(ch)
            i += 1
        return "".join(out)

    def _resolve(self, table: Table, spec: str, row: int | None) -> str:
        body = spec
        items: set[str] = set()
        columns: list[str] = []
        if body.startswith("@"):  # Excel's shorthand for [#This Row], on screen only
            items.add("#this row")
            body = body[1:]
            if body and not body.startswith("["):
                body = f"[{body}]"
        if body and not body.startswith("["):
            body = f"[{body}]"
        pieces = _pieces(body)
        if pieces is None:
            return "#REF!"
        ranged = False
        for piece in pieces:
            if piece == ":":
                ranged = True
                continue
            word = _unescape(piece)
            if word.strip().lower() in _ITEMS:
                items.add(word.strip().lower())
            else:
                columns.append(word)
        if len(columns) > 2 or (ranged and len(columns) != 2):
            return "#REF!"
        if columns:
            found = [table.column(c) for c in columns]
            if None in found:
                return "#REF!"
            c1, c2 = min(found), max(found)
        else:
            c1, c2 = table.area.c1, table.area.c2
        rows = table.rows(items, row)
        if isinstance(rows, str):
            return rows
        r1, r2 = rows
        sheet = _quoted(table.sheet_name) + "!"
        if "#this row" in items:  # relative row: a filled formula keeps pointing at its own row
            first, last = f"${column_letters(c1)}{r1}", f"${column_letters(c2)}{r2}"
        else:
            first, last = f"${column_letters(c1)}${r1}", f"${column_letters(c2)}${r2}"
        return sheet + first if (r1, c1) == (r2, c2) else f"{sheet}{first}:{last}"


def _bracket_end(text: str, start: int) -> int | None:
    """The index of the ``]`` closing the ``[`` at ``start`` (nested brackets and ``'`` escapes)."""
    depth, i, n = 0, start, len(text)
    while i < n:
        ch = text[i]
        if ch == "'":
            i += 2
            continue
        if ch == "[":
            depth += 1
        elif ch == "]":
            depth -= 1
            if depth == 0:
                return i
        i += 1
    return None
