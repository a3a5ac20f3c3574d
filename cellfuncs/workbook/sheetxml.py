"""One pass over a worksheet's XML: cell values, formulas, and where each element sits in the bytes.

The positions let the writer patch the sheet in place (a formula cell's value, a spill's
cells) and leave every other byte as it was. Positions come from the XML parser itself
(expat's byte index of each start and end tag), so odd spacing, attribute order or
namespace prefixes cannot mislead them.

>>> xml = (b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>'
...        b'<row r="1"><c r="A1"><v>2</v></c><c r="B1"><f>A1*2</f></c></row></sheetData></worksheet>')
>>> s = scan(xml, "sheet1.xml", [10])
>>> s.values, s.formulas[(1, 2)].text, xml[s.cells[(1, 2)].start:s.cells[(1, 2)].end(xml)]
({(1, 1): 2.0}, 'A1*2', b'<c r="B1"><f>A1*2</f></c>')
>>> print(scan(xml.replace(b"<v>2</v>", b"<v>NaN</v>"), "sheet1.xml", [10]).values[(1, 1)])
#NUM! the stored number NaN is not a finite number
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

from ..errors import CODES, NUM, CellError
from .package import Refused, parse_xml
from .refs import MAX_COL, MAX_ROW, area, cell

NAMESPACES = ("http://schemas.openxmlformats.org/spreadsheetml/2006/main", "http://purl.oclc.org/ooxml/spreadsheetml/main")
CELL_TYPES = ("b", "d", "e", "inlineStr", "n", "s", "str")  # the t attribute of a cell (ST_CellType)
MAX_FORMULAS = 1_000_000
MAX_CELLS = 5_000_000

_XSTRING = re.compile(r"_x([0-9A-Fa-f]{4})_")
_SURROGATE = re.compile("[\ud800-\udfff]")
_TAG_END = re.compile(rb"""<[^\s/>]+(?:\s+[^\s=/>]+\s*=\s*(?:"[^"]*"|'[^']*'))*\s*/?>""")


def xstring(text: str) -> str:
    """Stored text with its ``_xHHHH_`` escapes decoded (OOXML's ST_Xstring): Excel writes so
    the characters XML cannot hold (CHAR(1), a carriage return, which XML would read as a line
    feed) and ``_x005F_`` for an underscore that would otherwise start such an escape.

    >>> xstring("a_x0001_b"), xstring("_x005F_x0001_"), xstring("_x000d_") == chr(13)
    ('a\\x01b', '_x0001_', True)
    >>> xstring("_xD83D__xDE00_") == chr(0x1F600)  # beyond the BMP: its UTF-16 pair
    True
    """
    if "_x" not in text:
        return text
    out = _XSTRING.sub(lambda m: chr(int(m.group(1), 16)), text)
    if _SURROGATE.search(out):
        out = out.encode("utf-16-le", "surrogatepass").decode("utf-16-le", "replace")
    return out


def tag_end(data: bytes, start: int) -> int:
    """The offset just past the start tag that begins at ``start``.

    >>> tag_end(b'<a x="1>2"/><b/>', 0)  # a ">" inside a quoted value does not end the tag
    12
    """
    m = _TAG_END.match(data, start)
    if m is None:
        raise Refused("a start tag the scanner cannot delimit")
    return m.end()


def closing(data: bytes, start: int, pos: int) -> int:
    """Where the end tag of the element starting at ``start`` begins, given expat's byte
    index ``pos`` at its end event; ``start`` for a self-closing element (expat then
    reports the index just past ``/>``).

    >>> data = b"<r><a/><b></b></r>"
    >>> closing(data, 3, 7), closing(data, 7, 10)
    (3, 10)
    """
    if data[pos - 2:pos] == b"/>" and tag_end(data, start) == pos:
        return start
    return pos


@dataclass(slots=True)
class Span:
    """An element's bytes: ``start`` at its ``<``, ``close`` at its end tag's ``<``
    (equal to ``start`` for a self-closing element)."""

    start: int
    close: int = -1

    def end(self, data: bytes) -> int:
        if self.close == self.start:
            return tag_end(data, self.start)
        return data.index(b">", self.close) + 1

    @property
    def empty(self) -> bool:
        return self.close == self.start


@dataclass(slots=True)
class CellSpan(Span):
    formula: Span | None = None
    extra: list[Span] | None = None  # children other than f, v, is (kept as they are)


@dataclass(slots=True)
class RowSpan(Span):
    cells: list[tuple[int, int]] = field(default_factory=list)  # (column, start offset)


@dataclass(slots=True)
class FormulaXml:
    """A formula as stored: ``kind`` is "normal", "shared", "array" or "dataTable"."""

    text: str
    kind: str
    ref: str | None
    si: str | None
    cm: str | None
    cached: object  # the cell's cached value (None: none stored)


@dataclass
class SheetScan:
    part: str
    values: dict[tuple[int, int], object] = field(default_factory=dict)
    formulas: dict[tuple[int, int], FormulaXml] = field(default_factory=dict)
    cells: dict[tuple[int, int], CellSpan] = field(default_factory=dict)
    rows: dict[int, RowSpan] = field(default_factory=dict)
    sheet_data: Span | None = None
    dimension: tuple[int, str] | None = None  # (start offset, ref)
    not_finite: list[tuple[int, int]] = field(default_factory=list)  # value cells storing NaN, INF, 1e999, ...
    hidden_rows: set[int] = field(default_factory=set)
    filter_area: str | None = None  # the sheet's autoFilter range: its hidden rows are filtered out


class _Scanner:
    """A parser target building a :class:`SheetScan`; element positions come from expat."""

    def __init__(self, data: bytes, part: str, strings: list[str], budget: list[int], rich: dict[str, CellError]):
        self.bytes = data
        self.out = SheetScan(part)
        self.strings = strings
        self.rich = rich  # value-metadata index (vm) -> the error a rich value holds
        self.budget = budget  # [formula cells left]: shared by all sheets of a workbook
        self.cells_left = MAX_CELLS
        self.depth = 0
        self.data_depth = -1  # depth of <sheetData>
        self.row: RowSpan | None = None
        self.row_number = 0
        self.col = 0
        self.cell: CellSpan | None = None
        self.cell_key = (0, 0)
        self.cell_attrs: dict = {}
        self.text: list[str] | None = None
        self.value_text: str | None = None
        self.inline: list[str] | None = None
        self.phonetic = 0
        self.f_attrs: dict | None = None
        self.f_text = ""
        self.first = True
        self.filter_ref: str | None = None

    def bind(self, parser) -> None:
        self.expat = parser.parser

    def start(self, tag: str, attrib: dict) -> None:
        pos = self.expat.CurrentByteIndex
        self.depth += 1
        ns, _, local = tag[1:].partition("}")
        if self.first:
            self.first = False
            if ns not in NAMESPACES:
                raise Refused(f"{self.out.part}: not a worksheet")
        d = self.depth - self.data_depth
        if ns not in NAMESPACES:  # another vocabulary: kept as it is if it sits in a cell
            if self.data_depth >= 0 and d == 3 and self.cell is not None:
                self.cell.extra = (self.cell.extra or []) + [Span(pos)]
            return
        if self.data_depth < 0:
            if local == "sheetData" and self.depth == 2:
                self.data_depth = self.depth
                self.out.sheet_data = Span(pos)
            elif self.depth == 2:  # an autoFilter's range counts once a filterColumn shows it filters
                self.filter_ref = attrib.get("ref") if local == "autoFilter" else None
                if local == "dimension":
                    self._dimension(pos, attrib.get("ref", ""))
            elif local == "filterColumn" and self.depth == 3 and self.filter_ref:
                self.out.filter_area = self.filter_ref
        elif d == 1 and local == "row":
            r = attrib.get("r")
            if r is not None and not r.isdigit():
                raise Refused(f"{self.out.part}: row number {r[:20]!r} is not a number")
            self._row_start(pos, int(r) if r is not None else self.row_number + 1, attrib)
        elif d == 2 and local == "c":
            self._cell_start(pos, attrib)
        elif d == 3 and self.cell is not None:
            if local == "f":
                self.cell.formula = Span(pos)
                self.f_attrs = attrib
                self.text = []
            elif local == "v":
                self.text = []
            elif local == "is":
                self.inline = []
            else:
                self.cell.extra = (self.cell.extra or []) + [Span(pos)]
        elif self.inline is not None:
            if local == "rPh":
                self.phonetic += 1
            elif local == "t" and not self.phonetic:
                self.text = []

    def _row_start(self, pos: int, number: int, attrib: dict) -> None:
        """Row ``number`` starting at ``pos``, ``attrib`` its attributes."""
        if not 1 <= number <= MAX_ROW:
            raise Refused(f"{self.out.part}: row {number} is beyond Excel's {MAX_ROW} rows")
        self.row_number = number
        self.row = RowSpan(pos)
        self.out.rows[number] = self.row
        if attrib.get("hidden") in ("1", "true"):
            self.out.hidden_rows.add(number)
        self.col = 0

    def _dimension(self, pos: int, ref: str) -> None:
        if ref and area(ref) is None:
            raise Refused(f"{self.out.part}: used range {ref} is beyond Excel's limits")
        self.out.dimension = (pos, ref)

    def _cell_start(self, pos: int, attrib: dict) -> None:
        ref = attrib.get("r")
        if ref is not None:
            rc = cell(ref)
            if rc is None:
                raise Refused(f"{self.out.part}: cell reference {ref!r} is not a cell within Excel's limits")
            row, self.col = rc
        else:  # the reference is optional: the next column of the row
            row, self.col = self.row_number, self.col + 1
            if self.col > MAX_COL:
                raise Refused(f"{self.out.part}: a row runs beyond Excel's {MAX_COL} columns")
        self.cells_left -= 1
        if self.cells_left < 0:
            raise Refused(f"{self.out.part}: more than {MAX_CELLS:,} cells")
        self.cell = CellSpan(pos)
        self.cell_key = (row, self.col)
        self.cell_attrs = attrib
        self.value_text = None
        self.f_attrs = None
        if self.row is not None:
            self.row.cells.append((self.col, pos))

    def end(self, tag: str) -> None:
        pos = self.expat.CurrentByteIndex
        ns, _, local = tag[1:].partition("}")
        d = self.depth - self.data_depth
        self.depth -= 1
        if self.data_depth < 0:
            return
        data = self.bytes
        if ns not in NAMESPACES:
            if d == 3 and self.cell is not None and self.cell.extra:
                self.cell.extra[-1].close = closing(data, self.cell.extra[-1].start, pos)
            return
        if d == 0:
            self.out.sheet_data.close = closing(data, self.out.sheet_data.start, pos)
            self.data_depth = -1
        elif d == 1:
            if self.row is not None:
                self.row.close = closing(data, self.row.start, pos)
            self.row = None
        elif d == 2 and self.cell is not None:
            self.cell.close = closing(data, self.cell.start, pos)
            self._cell_end()
            self.cell = None
        elif d == 3 and self.cell is not None:
            if local == "f":
                self.cell.formula.close = closing(data, self.cell.formula.start, pos)
                self.f_text = xstring("".join(self.text))
                self.text = None
            elif local == "v":
                self.value_text = "".join(self.text)
                self.text = None
            elif local == "is":
                self.value_text = "".join(self.inline)
                self.inline = None
            elif self.cell.extra:
                self.cell.extra[-1].close = closing(data, self.cell.extra[-1].start, pos)
        elif self.inline is not None:
            if local == "rPh":
                self.phonetic -= 1
            elif local == "t" and self.text is not None:
                self.inline.append("".join(self.text))
                self.text = None

    def data(self, text: str) -> None:
        if self.text is not None:
            self.text.append(text)

    def _cell_end(self) -> None:
        key = self.cell_key
        out = self.out
        out.cells[key] = self.cell
        kind = self.cell_attrs.get("t", "n")
        if kind not in CELL_TYPES:
            raise Refused(f"{out.part}: cell type {kind[:20]!r} is not one of {', '.join(CELL_TYPES)}")
        value = self._value(kind, self.value_text)
        if kind == "e" and self.cell_attrs.get("vm") in self.rich:  # <v> holds #VALUE! in place of the error
            value = self.rich[self.cell_attrs["vm"]]
        if self.f_attrs is None:
            if value is not None:
                out.values[key] = value
                if type(value) is CellError and kind not in ("e", "s", "str", "inlineStr"):
                    out.not_finite.append(key)
            return
        f = self.f_attrs
        self.budget[0] -= 1
        if self.budget[0] < 0:
            raise Refused(f"more than {MAX_FORMULAS:,} formula cells")
        out.formulas[key] = FormulaXml(self.f_text, f.get("t", "normal"), f.get("ref"), f.get("si"),
                                       self.cell_attrs.get("cm"), value)

    def _value(self, kind: str, text: str | None) -> object:
        return stored_value(kind, text, self.strings, self.out.part)

    def close(self) -> SheetScan:
        return self.out


def scan(data: bytes, part: str, budget: list[int], strings: list[str] | None = None,
         rich: dict[str, CellError] | None = None) -> SheetScan:
    """Read worksheet ``part`` (UTF-8 bytes, see :meth:`.Package.utf8`): values, formulas and
    element positions.

    ``budget`` is a one-element list holding how many formula cells may still be read;
    ``rich`` the errors of the workbook's rich values by value-metadata index (a cell's ``vm``).
    """
    from .sheetfast import scan_fast  # the same scan from the bytes where the part allows it (built on this module)

    if (fast := scan_fast(data, part, budget, strings or [], rich or {})) is not None:
        return fast
    scanner = _Scanner(data, part, strings or [], budget, rich or {})
    return parse_xml(data, part, scanner)


def stored_value(kind: str, text: str | None, strings: list[str], part: str) -> object:
    """The value a cell stores, read by its type ``t`` (``s`` an index into ``strings``);
    ``part`` names the part in the refusals."""
    if text is None:
        return None
    if kind == "s":
        try:
            return strings[int(text)]
        except (ValueError, IndexError):
            raise Refused(f"{part}: shared string {text!r} does not exist") from None
    if kind in ("str", "inlineStr"):
        return xstring(text)
    if kind == "d":
        return text
    if kind == "b":
        return text.strip() in ("1", "true")
    if kind == "e":
        code = text.strip()
        return CellError(code if code in CODES else "#VALUE!")
    if not text.strip():
        return None
    try:
        x = float(text)
    except ValueError:
        raise Refused(f"{part}: cell value {text[:20]!r} is not a number") from None
    if not math.isfinite(x):  # NaN, INF or an exponent beyond a double: no cell holds such a number
        return CellError(NUM, f"the stored number {text.strip()[:20]} is not a finite number")
    return x
