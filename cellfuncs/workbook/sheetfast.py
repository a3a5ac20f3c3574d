"""The worksheet scan of :mod:`.sheetxml` read from the bytes, for the parts simple enough for
that to be exact.

A parser target costs a Python call per element and per text: about 425,000 of them for a sheet
of 100,000 formulas. Here the work is split so that hardly any is left to Python per element:

1. expat checks the whole part with no handlers but the two refusing a DTD or an entity
   declaration, so well-formedness (tags, entities, characters, namespace prefixes) is
   checked at C speed;
2. the part without the content of ``<sheetData>`` (usually a few dozen elements) goes
   through the full parser target, which reads the dimension and the filter and places
   ``<sheetData>``;
3. the rows and cells are read from the bytes by compiled patterns and handed to the same
   target with the byte index expat would report (an element's ``<``; for an end tag its
   ``<``; for a self-closing element the byte past ``/>``); the commonest cell (``c`` with an
   optional ``f`` and ``v``) is read in one match, with no events.

Text and attribute values are decoded as a conforming parser does: line ends normalised first
(``\\r\\n`` and ``\\r`` to ``\\n``; in an attribute value every literal tab, line feed and
carriage return then becomes a space), then the predefined entities and character references
(``&#13;`` stays a carriage return). Attributes with a namespace prefix are left out, as none
of the scan's attributes has one.

The part is read so only when that is exact: UTF-8 (as :meth:`.Package.utf8` gives every part),
one ``<sheetData>`` whose name has no prefix and that the full parser finds where the pattern
did, and no comment, CDATA section, processing instruction, namespace declaration or prefixed
element inside it. Otherwise, and for any part expat finds malformed (so that the refusal is
the one the full parser meets first), :func:`scan_fast` returns None and the caller parses the
part in full.

>>> xml = (b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>'
...        b'<row r="1"><c r="A1" t="str"><f>"a&amp;b"</f><v>a&amp;b</v></c></row></sheetData></worksheet>')
>>> s = scan_fast(xml, "sheet1.xml", [10], [], {})
>>> s.formulas[(1, 1)].text, s.formulas[(1, 1)].cached, xml[s.cells[(1, 1)].start:s.cells[(1, 1)].end(xml)]
('"a&b"', 'a&b', b'<c r="A1" t="str"><f>"a&amp;b"</f><v>a&amp;b</v></c>')
>>> scan_fast(xml.replace(b"<row", b"<!-- a note --><row"), "sheet1.xml", [10], [], {}) is None
True
"""

from __future__ import annotations

import gc
import pyexpat
import re

from ..errors import CellError
from .package import ENTITY_REFUSAL, Refused, parse_xml
from .refs import MAX_COL, MAX_ROW, column_number
from . import sheetxml
from .sheetxml import CELL_TYPES, CellSpan, FormulaXml, SheetScan, Span, _Scanner, stored_value, xstring

# possessive repeats (*+): nothing they give back could let a match succeed, and none is tried again
_ATTRS = rb"""(?:\s+[^\s=/>]+\s*=\s*(?:"[^"]*+"|'[^']*+'))*+"""
_ATTR = re.compile(r"""([^\s=/>]+)\s*=\s*(?:"([^"]*)"|'([^']*)')""")
_TAG = re.compile(rb"<(/?)([A-Za-z_\x80-\xff][^\s/>]*+)(" + _ATTRS + rb")\s*(/?)>")
# a cell with an optional f and an optional v; groups: 1 its attributes, 2 "<f", 3 f's attributes,
# 4 f's text, 5 f's end tag, 6 "<v", 7 v's text, 8 the cell's end tag (no group matches: self-closing)
_CELL = re.compile(rb"<c(" + _ATTRS + rb")\s*(?:/>|>[^<]*+(?:(<f)(" + _ATTRS + rb")\s*(?:/>|>([^<]*+)(</)f\s*>)[^<]*+)?"
                   rb"(?:(<v)\s*(?:/>|>([^<]*+)</v\s*>)[^<]*+)?(</)c\s*>)")
# the cell as Excel and openpyxl write it: r first, then attributes each after one space, double
# quoted, unprefixed, with nothing to normalise; groups: 1 and 2 the reference's letters and digits,
# 3 the attributes past r, 4 "<f", 5 f's attributes, 6 f's text, 7 f's end tag, 8 "<v", 9 v's text
_PLAIN_ATTRS = rb'(?: [A-Za-z_][\w.-]*+="[^"&\t\n\r]*+")*+'
_PLAIN_CELL = re.compile(rb'<c r="([A-Z]{1,3})([1-9][0-9]{0,6})"(' + _PLAIN_ATTRS
                         + rb')(?: ?/>|>(?:(<f)(' + _PLAIN_ATTRS + rb')(?: ?/>|>([^<]*+)(</)f>))?'
                         rb'(?:(<v)(?: ?/>|>([^<]*+)</v>))?</c>)')
# a row's end and the next row's start, as Excel, LibreOffice and openpyxl write them; groups: 1 the next
# row's number, 2 its attributes past r (prefixed ones too: Excel's x14ac:dyDescent)
_NEXT_ROW = re.compile(rb'</row><row r="([1-9][0-9]{0,6})"((?: [A-Za-z_][\w.:-]*+="[^"&\t\n\r]*+")*+)>')
_SHEET_DATA = re.compile(rb"<sheetData(" + _ATTRS + rb")\s*>")
_DECLARED = re.compile(rb"""(?:\xef\xbb\xbf)?<\?xml\s[^>]*?\bencoding\s*=\s*["']([^"']*)""")
_INSIDE_REFUSED = (b"<!", b"<?", b"xmlns")  # comments, CDATA, PIs, namespace declarations
_UNUSUAL = re.compile(r"[&\t\n\r':]")
_QUOTED = re.compile(r'([^\s=/>]+)\s*=\s*"([^"]*)"')
_REF = re.compile(r"&(?:#x([0-9A-Fa-f]+)|#([0-9]+)|([a-z]+));")
_ENTITIES = {"lt": "<", "gt": ">", "amp": "&", "quot": '"', "apos": "'"}
_PLAIN_REF = re.compile(r"([A-Z]{1,3})([1-9][0-9]{0,6})\Z")
_COLUMNS: dict[str, int] = {}
_BYTE_COLUMNS: dict[bytes, int] = {}


def scan_fast(data: bytes, part: str, budget: list[int], strings: list[str],
              rich: dict[str, CellError]) -> SheetScan | None:
    """The :func:`.sheetxml.scan` of worksheet ``part``, read as described above; None when the
    part is not simple enough for that (nothing is then used up of ``budget``)."""
    found = _sheet_data(data)
    if found is None or not _well_formed(data, part):
        return None
    start, begin, end = found  # sheetData's "<", its content's first byte, its end tag's "<"
    left = budget[0]
    scanner = _FastScanner(data[:begin] + data[end:], part, strings, budget, rich)
    try:
        out = parse_xml(scanner.bytes, part, scanner)
    except Refused:  # the full parser says which refusal it meets first
        return None
    if scanner.main is None or out.sheet_data.start != start or out.sheet_data.close != begin:
        return None
    out.sheet_data.close = end
    if out.dimension is not None and out.dimension[0] >= begin:
        out.dimension = (out.dimension[0] + end - begin, out.dimension[1])
    collecting = gc.isenabled()
    gc.disable()  # every object made from here on is kept: a collection would only walk them, again and again
    try:
        read = scanner.content(data, begin, end)
    finally:
        if collecting:
            gc.enable()
    if not read:
        budget[0] = left
        return None
    return out


def _sheet_data(data: bytes) -> tuple[int, int, int] | None:
    """Where the one unprefixed ``<sheetData>`` starts, its content starts and its end tag
    starts, if its content holds nothing that needs the full parser."""
    declared = _DECLARED.match(data)
    if declared is not None and declared.group(1).lower() != b"utf-8":
        return None
    if data.count(b"sheetData") != 2:  # the start and end tags, nothing else of the name
        return None
    m = _SHEET_DATA.search(data)
    if m is None:
        return None
    end = data.find(b"</sheetData", m.end())
    if end < 0 or any(data.find(text, m.end(), end) >= 0 for text in _INSIDE_REFUSED):
        return None
    return m.start(), m.end(), end


def _well_formed(data: bytes, part: str) -> bool:
    """Whether ``data`` is well-formed to expat set up as the full parser sets it up (namespace
    processing), with no Python call per element; a DTD or entity declaration is refused as the
    full parser refuses it (it comes before the root element, so before any other refusal)."""

    def refuse(*_: object) -> None:
        raise Refused(f"{part}: {ENTITY_REFUSAL}")

    parser = pyexpat.ParserCreate(None, "}")
    parser.StartDoctypeDeclHandler = parser.EntityDeclHandler = refuse
    try:
        parser.Parse(data, False)
        parser.Parse(b"", True)
    except (pyexpat.ExpatError, LookupError, ValueError):
        return False
    return True


def _decoded(match: re.Match) -> str:
    hex_digits, digits, name = match.groups()
    if name is not None:
        return _ENTITIES[name]
    return chr(int(hex_digits, 16) if hex_digits is not None else int(digits))


def _text(raw: bytes) -> str:
    """Character data as the parser reports it: line ends normalised, references decoded."""
    text = raw.decode("utf-8")
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    return _REF.sub(_decoded, text) if "&" in text else text


def _value(text: str) -> str:
    """An attribute value as the parser reports it (no DTD: every attribute is CDATA)."""
    text = text.replace("\r\n", " ").replace("\r", " ").replace("\n", " ").replace("\t", " ")
    return _REF.sub(_decoded, text) if "&" in text else text


def _attributes(raw: bytes) -> dict[str, str]:
    """The unprefixed attributes of a start tag's attribute bytes."""
    if not raw:
        return {}
    text = raw.decode("utf-8")
    if _UNUSUAL.search(text) is None:  # no prefix, reference, single quote or white space to normalise
        return dict(_QUOTED.findall(text))
    return {name: _value(double or single) for name, double, single in _ATTR.findall(text) if ":" not in name}


def _plain_cell(ref: str) -> tuple[int, int] | None:
    """(row, column) of a reference written as Excel writes one (``B7``: capitals, no ``$``,
    no leading zero) within the sheet; None for any other, which the full rules read."""
    m = _PLAIN_REF.match(ref)
    if m is None:
        return None
    letters, digits = m.groups()
    col = _COLUMNS.get(letters)
    if col is None:
        col = _COLUMNS[letters] = column_number(letters)
    row = int(digits)
    return (row, col) if row <= MAX_ROW and col <= MAX_COL else None


class _ByteIndex:
    """Stands for the expat parser while the content is read: the byte index of the event."""

    __slots__ = ("CurrentByteIndex",)

    def __init__(self) -> None:
        self.CurrentByteIndex = 0


class _FastScanner(_Scanner):
    """The full parser target, reading the rows and cells from the bytes."""

    def __init__(self, data: bytes, part: str, strings: list[str], budget: list[int], rich: dict[str, CellError]):
        super().__init__(data, part, strings, budget, rich)
        self.main: str | None = None  # the namespace of sheetData, which its unprefixed content shares
        self.rests: dict[bytes, tuple[str, str | None, bool]] = {}  # a plain cell's t and cm past r, and if t is usual
        self.row_rests: dict[bytes, dict[str, str]] = {}  # a plain row's attributes past r, read
        self.f_rests: dict[bytes | None, tuple[str, str | None, str | None]] = {}  # a formula's t, ref and si

    def start(self, tag: str, attrib: dict) -> None:
        if self.depth == 1 and tag.endswith("}sheetData"):
            self.main = tag[1:tag.index("}")]
        super().start(tag, attrib)

    def content(self, data: bytes, begin: int, end: int) -> bool:
        """Read ``data[begin:end]``, the content of sheetData, into the scan; False at what the
        patterns do not read exactly (a prefixed element), the scan then being of no use."""
        index = self.expat = _ByteIndex()
        self.bytes = data
        self.depth = self.data_depth = 2
        prefix = "{" + self.main + "}"
        pos = begin
        while pos < end:
            if data[pos] != 0x3C:  # character data up to the next tag
                stop = data.find(b"<", pos, end)
                stop = end if stop < 0 else stop
                if self.text is not None:
                    self.data(_text(data[pos:stop]))
                pos = stop
                continue
            if self.depth - self.data_depth == 1 and data[pos + 1] == 0x63:  # "<c" where cells are
                read = self._plain_cells(data, pos, end)
                if read != pos:
                    pos = read
                    continue
                m = _CELL.match(data, pos, end)
                if m is not None:
                    self._cell(m)
                    pos = m.end()
                    continue
            m = _TAG.match(data, pos, end)
            if m is None or b":" in m.group(2):
                return False
            tag = prefix + m.group(2).decode("utf-8")
            index.CurrentByteIndex = pos
            if m.group(1):
                self.end(tag)
            else:
                self.start(tag, _attributes(m.group(3)))
                if m.group(4):
                    index.CurrentByteIndex = m.end()
                    self.end(tag)
            pos = m.end()
        return True

    def _plain_cells(self, data: bytes, pos: int, end: int) -> int:
        """The plain cells from ``pos`` on, one match of their pattern each and all of the rest
        here: the effect of :meth:`_cell_start` and :meth:`_cell_end` without their calls or an
        attribute dict per cell (the attributes past r repeat, so each distinct set is read once),
        and of the end and start events between one plain row and the next.
        Returns where the first cell not read starts: one beyond the limits, an error value (whose
        rich value the general rules look up) or any other cell."""
        out, rests, f_rests, strings, budget = self.out, self.rests, self.f_rests, self.strings, self.budget
        part = out.part
        cells, values, formulas = out.cells, out.values, out.formulas
        row_cells = self.row.cells if self.row is not None else None
        match, next_row = _PLAIN_CELL.match, _NEXT_ROW.match
        left, col = self.cells_left, self.col  # kept here, stored back on the way out
        try:
            while True:
                m = match(data, pos, end)
                if m is None:  # the row's end and the next row's start, or where the general rules go on
                    if row_cells is None or (n := next_row(data, pos, end)) is None:
                        break
                    row_attrs = self.row_rests.get(n.group(2))
                    if row_attrs is None:
                        row_attrs = self.row_rests[n.group(2)] = _attributes(n.group(2))
                    self.row.close = pos
                    self._row_start(pos + 6, int(n.group(1)), row_attrs)  # the "<" of "<row"
                    row_cells, col = self.row.cells, 0
                    pos = n.end()
                    continue
                letters, digits, rest, f, f_attrs, f_text, f_end, v, v_text = m.groups()
                c = _BYTE_COLUMNS.get(letters)
                if c is None:
                    c = _BYTE_COLUMNS[letters] = column_number(letters.decode("ascii"))
                row = int(digits)
                read = rests.get(rest)
                if read is None:
                    attrib = dict(_QUOTED.findall(rest.decode("utf-8")))
                    kind = attrib.get("t", "n")
                    read = rests[rest] = (kind, attrib.get("cm"), kind != "e" and kind in CELL_TYPES)
                kind, cm, usual = read
                if row > MAX_ROW or c > MAX_COL or left <= 0 or not usual:
                    break
                left -= 1
                col = c
                key = (row, c)
                stop = m.end()
                cell = cells[key] = CellSpan(pos, pos if data[stop - 2] == 0x2F else stop - 4)  # "/>" or "</c>"
                if row_cells is not None:
                    row_cells.append((c, pos))
                value = None
                if v is not None and kind != "n":
                    value = stored_value(kind, _text(v_text) if v_text else "", strings, part)
                elif v_text:  # a number as it is usually stored (no v, no text): read from the bytes
                    try:
                        value = float(v_text)
                    except ValueError:  # anything else (a reference, a non-ASCII digit): the general rules
                        pass
                    if value is None or value - value != 0.0:  # not read, or not finite (inf - inf is NaN)
                        value = stored_value(kind, _text(v_text), strings, part)
                pos = stop
                if f is None:
                    if value is not None:
                        values[key] = value
                        if type(value) is CellError and kind not in ("s", "str", "inlineStr"):
                            out.not_finite.append(key)
                    continue
                budget[0] -= 1
                if budget[0] < 0:
                    raise Refused(f"more than {sheetxml.MAX_FORMULAS:,} formula cells")  # the limit as it stands
                f = m.start(4)
                cell.formula = Span(f, m.start(7) if f_end else f)
                fa = f_rests.get(f_attrs)
                if fa is None:
                    given = dict(_QUOTED.findall(f_attrs.decode("utf-8"))) if f_attrs else {}
                    fa = f_rests[f_attrs] = (given.get("t", "normal"), given.get("ref"), given.get("si"))
                text = ""
                if f_text:
                    text = f_text.decode("utf-8")
                    if "&" in text or "\r" in text or "_x" in text:
                        text = xstring(_text(f_text))
                formulas[key] = FormulaXml(text, *fa, cm, value)
        finally:
            self.cells_left, self.col = left, col
        return pos

    def _cell(self, m: re.Match) -> None:
        """A whole cell from one match of the cell pattern: the events' effect without them."""
        attrs, f, f_attrs, f_text, f_end, v, v_text, end = m.groups()
        start = m.start()
        self._cell_start(start, _attributes(attrs))
        cell = self.cell
        cell.close = m.start(8) if end else start
        if f:
            f = m.start(2)
            cell.formula = Span(f, m.start(5) if f_end else f)
            self.f_attrs = _attributes(f_attrs)
            self.f_text = xstring(_text(f_text)) if f_text else ""
        if v:
            self.value_text = _text(v_text) if v_text else ""
        self._cell_end()
        self.cell = None

    def _cell_start(self, pos: int, attrib: dict) -> None:
        ref = attrib.get("r")
        rc = _plain_cell(ref) if ref is not None else None
        if rc is None or self.cells_left <= 0:  # any other reference, or the limit: the full rules
            super()._cell_start(pos, attrib)
            return
        self.cells_left -= 1
        self.col = rc[1]
        self.cell, self.cell_key, self.cell_attrs, self.value_text, self.f_attrs = CellSpan(pos), rc, attrib, None, None
        if self.row is not None:
            self.row.cells.append((rc[1], pos))
