"""The recalculated workbook: sheets patched in place, the calculation chain dropped,
dynamic-array metadata and the engine's name recorded; every other part untouched.

In a patched sheet only the cells that changed are rewritten: a formula cell keeps its
attributes (style), its formula and any extension, and gets its new cached value
(``<v>`` with ``t="str"``, ``"b"`` or ``"e"`` as needed). A spill is stored as Excel 365
stores a dynamic array: ``<f t="array" ref="A1:B10">`` in the anchor, whose ``cm`` points
at a cell-metadata record marking it dynamic (XLDAPR, ``fDynamic="1"``), and the values
in every cell of the range. Cells of an old, larger spill are emptied (their style stays).
An error the file format came without (#SPILL!, #CALC!) is stored as Excel stores it: ``<v>`` holds
#VALUE! and the cell's ``vm`` points through xl/metadata.xml at a rich value of the ``_error``
structure holding the true error; a cell whose error goes away loses its ``vm``.
A stored number that is not finite (``NaN``, ``INF``, ``1e999``) is read as #NUM! and
written as #NUM!, so that no reader meets it as a number.
"""

from __future__ import annotations

import posixpath
import re
from typing import Callable

from .. import __version__
from ..errors import DIV0, NA, NAME, NULL, NUM, REF, VALUE, CellError
from .engine import Recalc
from .model import RICH_DATA_NS, RICH_ERRORS, RICH_TYPE, Book, Rel, relationships, rels_part
from .package import Package, Refused
from .refs import Area, address, area
from .sheetxml import CellSpan, FormulaXml, SheetScan, tag_end
from .xmledit import Element, attr, elements, prefix, retag, splice, text

ENGINE = "cellfuncs"
PROPERTIES = (("RecalcEngine", ENGINE), ("RecalcEngineVersion", __version__))

_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/"
_METADATA_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheetMetadata+xml"
_CUSTOM_TYPE = "application/vnd.openxmlformats-officedocument.custom-properties+xml"
_CUSTOM_NS = b"http://schemas.openxmlformats.org/officeDocument/2006/custom-properties"
_VT_NS = b"http://schemas.openxmlformats.org/officeDocument/2006/docPropsVTypes"
_FMTID = b"{D5CDD505-2E9C-101B-9397-08002B2CF9AE}"
_MAIN_NS = b"http://schemas.openxmlformats.org/spreadsheetml/2006/main"
_XDA_NS = b"http://schemas.microsoft.com/office/spreadsheetml/2017/dynamicarray"
_XLDAPR_TYPE = (b'<%smetadataType name="XLDAPR" minSupportedVersion="120000" copy="1" pasteAll="1" pasteValues="1" '
                b'merge="1" splitFirst="1" rowColShift="1" clearFormats="1" clearComments="1" assign="1" coerce="1" '
                b'cellMeta="1"/>')
_XLDAPR_FUTURE = (b'<%sfutureMetadata name="XLDAPR" count="1"><%sbk><%sextLst><%sext uri="{bdbb8cdc-fa1e-496e-a857-'
                  b'3c3f30c029c3}"><xda:dynamicArrayProperties xmlns:xda="' + _XDA_NS + b'" fDynamic="1" fCollapsed="0"/>'
                  b'</%sext></%sextLst></%sbk></%sfutureMetadata>')
_XLRICHVALUE_TYPE = (b'<%smetadataType name="XLRICHVALUE" minSupportedVersion="120000" copy="1" pasteAll="1" '
                     b'pasteValues="1" merge="1" splitFirst="1" rowColShift="1" clearFormats="1" clearComments="1" '
                     b'assign="1" coerce="1"/>')
_RICH_NS = RICH_DATA_NS.encode()
_RVB = (b'<%%sbk><%%sextLst><%%sext uri="{3e2802c4-a4d2-4d8b-9148-e3be6c30e623}"><xlrd:rvb xmlns:xlrd="' + _RICH_NS +
        b'" i="%d"/></%%sext></%%sextLst></%%sbk>')
_RICH_REL = "http://schemas.microsoft.com/office/2017/06/relationships/"
# (relationship, file name, content type, root element, child element) of the two rich-data parts
_RICH_VALUES = ("rdRichValue", "rdrichvalue.xml", "application/vnd.ms-excel.rdrichvalue+xml", "rvData", "rv")
_RICH_STRUCTURES = ("rdRichValueStructure", "rdrichvaluestructure.xml",
                    "application/vnd.ms-excel.rdrichvaluestructure+xml", "rvStructures", "s")
# the structure Excel gives an error value (the reference workbooks: #CALC! and #SPILL! alike);
# subType 0 is the error without a stated cause
_ERROR_STRUCTURE = b'<%ss t="_error"><%sk n="errorType" t="i"/><%sk n="subType" t="i"/></%ss>'
_CELL_CHANGES = {b"t", b"cm", b"vm"}
# a cell's start tag as Excel, LibreOffice and openpyxl write it: r first, then attributes each after one space
_PLAIN_CELL = re.compile(rb'<((?:[A-Za-z_][\w.-]*:)?)c r="([^"<>]*)"((?: [A-Za-z_][\w.:-]*="[^"<>]*")*)[ \t\r\n]*/?>')
# The error values a cell's <v> may hold (Office's implementation notes on ECMA-376, MS-OI29500).
# Excel stores the later ones (#SPILL!, #CALC!) as #VALUE! there, the true error in a rich value
# the cell's vm points at; a file with another text in <v> is not one Excel need open.
FILE_ERRORS = (NULL, DIV0, VALUE, REF, NAME, NUM, NA, "#GETTING_DATA")


def value_xml(v: object) -> tuple[bytes | None, bytes]:
    """The ``t`` attribute (None for a number) and the ``<v>`` text of a cell value.

    >>> value_xml(2.0), value_xml(0.1), value_xml(True), value_xml("a&b"), value_xml(CellError("#NUM!", "x"))
    ((None, b'2'), (None, b'0.1'), (b'b', b'1'), (b'str', b'a&amp;b'), (b'e', b'#NUM!'))
    >>> value_xml(CellError("#SPILL!"))
    (b'e', b'#VALUE!')
    """
    if type(v) is not float:  # a number is the usual value: tested first
        if type(v) is bool:
            return b"b", b"1" if v else b"0"
        if type(v) is str:
            return b"str", text(v)
        if type(v) is CellError:
            return b"e", (v.code if v.code in FILE_ERRORS else VALUE).encode()
        v = 0.0 if v is None else float(v)
    if v.is_integer() and abs(v) < 1e15:
        return None, b"%d" % v
    return None, repr(v).encode()


def is_dynamic(engine: Recalc, fi: int) -> bool:
    """Whether formula cell ``fi`` is written as a dynamic array."""
    kind = engine.cells[fi].kind
    return kind != "legacy" and (kind == "dynamic" or fi in engine.spills or fi in engine.blocked)


class _SheetPatch:
    """The edits of one worksheet."""

    def __init__(self, data: bytes, scan: SheetScan, engine: Recalc, s: int, cm: bytes | None, rich: RichErrors):
        self.data, self.scan, self.engine, self.s, self.cm, self.rich = data, scan, engine, s, cm, rich
        sheet_data = scan.sheet_data
        if sheet_data is None:
            raise Refused(f"{scan.part}: no sheetData element")
        self.p = prefix(data, _as_element(sheet_data))
        self.edits: list[tuple[int, int, bytes]] = []
        self.new_cells: dict[int, list[tuple[int, bytes]]] = {}
        masters = {f.si: key for key, f in scan.formulas.items() if f.kind == "shared" and f.text}
        self.masters = masters
        at = engine.at[s]
        self.unshared = {scan.formulas[key].si for key in masters.values() if key in at and is_dynamic(engine, at[key])}
        self.bounds: Area | None = None
        self.touched: set[tuple[int, int]] = set()  # cells already rewritten
        self.tag_rests: dict[tuple, bytes] = {}  # a plain start tag's attributes past r, rewritten, by kind

    def build(self) -> bytes:
        engine, s, scan = self.engine, self.s, self.scan
        values = engine.values[s]
        self._formulas()
        for key in engine.claims[s]:
            self._write(key, scan.cells.get(key), values[key], b"", [])
        for key, fi in engine.at[s].items():
            old = engine.cells[fi].old_area
            if old is None or engine.cells[fi].kind == "legacy":
                continue
            for r in range(old.r1, old.r2 + 1):
                for c in range(old.c1, old.c2 + 1):
                    k = (r, c)
                    if k != key and k not in engine.claims[s] and k not in engine.at[s]:
                        self._clear(k)
        for key in scan.not_finite:  # read as #NUM!, so stored as #NUM!: no reader meets "NaN" as a number
            if key not in self.touched:
                self._write(key, scan.cells.get(key), scan.values[key], b"", [])
        self._insert_new_cells()
        self._dimension()
        return splice(self.data, self.edits)

    # -- cells ---------------------------------------------------------------------------
    def _write(self, key: tuple[int, int], span: CellSpan | None, value: object, f_bytes: bytes,
               extra_attrs: list) -> None:
        """Cell ``key`` (its element ``span``, None for a new cell) rewritten to hold ``value``
        (a new cell is queued for its row)."""
        self.touched.add(key)
        t, v = value_xml(value)
        add = [(b"t", t), *extra_attrs] if t else extra_attrs
        if type(value) is CellError and value.code not in FILE_ERRORS:
            add = [*add, (b"vm", self.rich.vm(value.code))]
        if span is None:
            p = self.p
            attrs = b"".join(b' %s="%s"' % kv for kv in add)
            body = b'<%sc r="%s"%s>%s<%sv>%s</%sv></%sc>' % (p, address(*key).encode(), attrs, f_bytes, p, v, p, p)
            self.new_cells.setdefault(key[0], []).append((key[1], body))
            self._extend(key)
            return
        data = self.data
        plain = _PLAIN_CELL.match(data, span.start)
        if plain is None:
            p = prefix(data, _as_element(span))
            tag = retag(data[span.start:tag_end(data, span.start)], _CELL_CHANGES, add, close=False)
        else:  # the start tag from its kind's template: r as written, the attributes past it worked out once
            p, ref, rest = plain.groups()
            tag = b'<%sc r="%s"%s' % (p, ref, self._tail(rest, add))
        extras = b"".join(data[e.start:e.end(data)] for e in span.extra) if span.extra else b""
        new = b"%s%s<%sv>%s</%sv>%s</%sc>" % (tag, f_bytes, p, v, p, extras, p)
        self.edits.append((span.start, span.end(data), new))

    def _tail(self, rest: bytes, add: list) -> bytes:
        """A plain start tag's attributes past r (``rest``) with ``add`` set, worked out once per kind."""
        k = (rest, *add)
        tail = self.tag_rests.get(k)
        if tail is None:
            tail = self.tag_rests[k] = retag(b"<c" + rest + b">", _CELL_CHANGES, add, close=False)[2:]
        return tail

    def _formulas(self) -> None:
        """Every formula cell of the sheet. The commonest, a plain start tag and a formula kept as
        it is, written here as :meth:`_write` writes it (the template of its kind, the formula's
        bytes, the new value), without the calls per cell; any other through :meth:`_formula`."""
        engine, scan, data, edits, tail = self.engine, self.scan, self.data, self.edits, self._tail
        result, formulas, cells, unshared = engine.result, scan.formulas, scan.cells, self.unshared
        kinds, spills, blocked = [fc.kind for fc in engine.cells], engine.spills, engine.blocked
        match, index = _PLAIN_CELL.match, data.index
        tails: dict[tuple[bytes, bytes | None], bytes] = {}  # the tail of each kind of start tag and t, at hand
        for key, fi in engine.at[self.s].items():
            span = cells[key]
            f = span.formula
            value = result[fi]
            fx = formulas[key]
            kind = kinds[fi]
            plain = None
            if (not span.extra and f.close != f.start and not (fx.kind == "shared" and fx.si in unshared)
                    and (type(value) is not CellError or value.code in FILE_ERRORS)
                    and (kind == "legacy" or (kind != "dynamic" and fi not in spills and fi not in blocked))):
                plain = match(data, span.start)  # not is_dynamic(), spelt out: this runs for every formula
            if plain is None:
                self._formula(key, fi)
                continue
            t, v = value_xml(value)
            p, ref, rest = plain.groups()  # not marked touched: only value cells are looked up there
            end = tails.get((rest, t))
            if end is None:
                end = tails[(rest, t)] = tail(rest, [(b"t", t)] if t else [])
            edits.append((span.start, index(b">", span.close) + 1,
                          b'<%sc r="%s"%s%s<%sv>%s</%sv></%sc>' % (p, ref, end, data[f.start:index(b">", f.close) + 1],
                                                                  p, v, p, p)))

    def _formula(self, key: tuple[int, int], fi: int) -> None:
        engine = self.engine
        fx = self.scan.formulas[key]
        span = self.scan.cells[key]
        if is_dynamic(engine, fi):
            spill = engine.spills.get(fi) or Area(key[0], key[1], key[0], key[1])
            f_bytes = self._f(key, span, fx, spill)
            self._write(key, span, engine.result[fi], f_bytes, [(b"cm", self.cm)] if self.cm else [])
            self._extend((spill.r2, spill.c2))
        elif fx.kind == "shared" and fx.si in self.unshared:
            self._write(key, span, engine.result[fi], self._f(key, span, fx, None), [])
        else:  # the formula as it is
            f = span.formula
            self._write(key, span, engine.result[fi], self.data[f.start:f.end(self.data)], [])

    def _f(self, key: tuple[int, int], span: CellSpan, fx: FormulaXml, spill: Area | None) -> bytes:
        """The formula element of a dynamic array (``spill`` its range) or of a shared formula's
        cell written on its own."""
        f = span.formula
        data = self.data
        if fx.kind == "shared":
            p = prefix(data, _as_element(f))
            formula = fx.text if fx.text else self._moved(key, fx)
            attrs = b' t="array" ref="%s"' % spill.text().encode() if spill is not None else b""
            return b"<%sf%s>%s</%sf>" % (p, attrs, text(formula), p)
        if f.empty or (fx.kind == "array" and fx.ref == spill.text()):
            return data[f.start:f.end(data)]
        start = tag_end(data, f.start)
        array = [(b"t", b"array"), (b"ref", spill.text().encode())]
        return retag(data[f.start:start], {b"t", b"ref", b"si"}, array, close=False) + data[start:f.end(data)]

    def _moved(self, key: tuple[int, int], fx: FormulaXml) -> str:
        """A shared formula's text as written in cell ``key`` (Excel stores it once, in its first cell)."""
        from openpyxl.formula.translate import Translator

        base = self.masters.get(fx.si)
        if base is None:
            return "#REF!"
        moved = Translator("=" + self.scan.formulas[base].text, origin=address(*base)).translate_formula(address(*key))
        return moved[1:]

    def _clear(self, key: tuple[int, int]) -> None:
        self.touched.add(key)
        span = self.scan.cells.get(key)
        if span is None:
            return
        start_tag = self.data[span.start:tag_end(self.data, span.start)]
        if span.extra:
            p = prefix(self.data, _as_element(span))
            extras = b"".join(self.data[e.start:e.end(self.data)] for e in span.extra)
            new = retag(start_tag, _CELL_CHANGES, [], close=False) + extras + b"</%sc>" % p
        else:
            new = retag(start_tag, _CELL_CHANGES, [], close=True)
        self.edits.append((span.start, span.end(self.data), new))

    # -- rows ----------------------------------------------------------------------------
    def _insert_new_cells(self) -> None:
        data, p = self.data, self.p
        rows = self.scan.rows
        ordered_rows = sorted(rows)
        new_rows: dict[int, list[bytes]] = {}
        for r, items in sorted(self.new_cells.items()):
            items.sort()
            row = rows.get(r)
            if row is None:
                at = self._row_position(ordered_rows, r)
                cells = b"".join(body for _, body in items)
                new_rows.setdefault(at, []).append(b'<%srow r="%d">%s</%srow>' % (p, r, cells, p))
                continue
            start = tag_end(data, row.start)
            row_tag = retag(data[row.start:start], {b"spans"}, [], close=False)  # spans is only a hint
            if row.empty:
                self.edits.append((row.start, start, row_tag + b"".join(b for _, b in items) + b"</%srow>" % p))
                continue
            self.edits.append((row.start, start, row_tag))
            groups: dict[int, list[bytes]] = {}
            for col, body in items:
                place = next((pos for c, pos in row.cells if c > col), row.close)
                groups.setdefault(place, []).append(body)
            self.edits += [(pos, pos, b"".join(bodies)) for pos, bodies in groups.items()]
        sheet_data = self.scan.sheet_data
        for at, bodies in new_rows.items():
            payload = b"".join(bodies)
            if at is None:  # <sheetData/>
                tag = data[sheet_data.start:tag_end(data, sheet_data.start)]
                self.edits.append((sheet_data.start, sheet_data.end(data),
                                   retag(tag, set(), [], close=False) + payload + b"</%ssheetData>" % p))
            else:
                self.edits.append((at, at, payload))

    def _row_position(self, ordered_rows: list[int], r: int) -> int | None:
        import bisect

        k = bisect.bisect_right(ordered_rows, r)
        if k < len(ordered_rows):
            return self.scan.rows[ordered_rows[k]].start
        sheet_data = self.scan.sheet_data
        return None if sheet_data.empty else sheet_data.close

    # -- the used range ------------------------------------------------------------------
    def _extend(self, key: tuple[int, int]) -> None:
        r, c = key
        b = self.bounds
        self.bounds = Area(r, c, r, c) if b is None else Area(min(b.r1, r), min(b.c1, c), max(b.r2, r), max(b.c2, c))

    def _dimension(self) -> None:
        if self.scan.dimension is None or self.bounds is None:
            return
        start, ref = self.scan.dimension
        old = area(ref) if ref else None
        b = self.bounds
        new = b if old is None else Area(min(old.r1, b.r1), min(old.c1, b.c1), max(old.r2, b.r2), max(old.c2, b.c2))
        if new[:4] == (old[:4] if old else None):
            return
        end = tag_end(self.data, start)
        self.edits.append((start, end, retag(self.data[start:end], {b"ref"}, [(b"ref", new.text().encode())])))


def _as_element(span) -> Element:
    return Element("", {}, 0, span.start, span.close)


# ---- package-level parts --------------------------------------------------------------
def _edit_children(data: bytes, part: str, drop: Callable[[Element], bool], add: list[bytes],
                   replace: dict[int, bytes] | None = None) -> bytes:
    """Children of the root element removed (``drop``), replaced (by start offset) or
    appended (``add``: templates with ``%s`` for the root's namespace prefix)."""
    els = elements(data, part)
    root = els[0]
    p = prefix(data, root)
    edits = []
    for e in els:
        if e.depth == 2 and replace and e.start in replace:
            edits.append((e.start, e.end(data), replace[e.start]))
        elif e.depth == 2 and drop(e):
            edits.append((e.start, e.end(data), b""))
    payload = b"".join(a.replace(b"%s", p) for a in add)
    if payload:
        if root.close == root.start:
            tag = data[root.start:root.end(data)]
            name = re.match(rb"<([^\s/>]+)", tag).group(1)
            edits.append((root.start, root.end(data), retag(tag, set(), [], close=False) + payload + b"</" + name + b">"))
        else:
            edits.append((root.close, root.close, payload))
    return splice(data, edits)


def _new_id(data: bytes, part: str) -> bytes:
    ids = {e.attrib.get("Id", "") for e in elements(data, part)}
    n = 1 + max((int(i[3:]) for i in ids if re.fullmatch(r"rId\d+", i)), default=0)
    return b"rId%d" % n


class PackageEdit:
    def __init__(self, pkg: Package, book: Book):
        self.pkg, self.book = pkg, book
        self.replaced: dict[str, bytes] = {}
        self.removed: set[str] = set()
        self.added: list[tuple[str, bytes]] = []
        self.content_drop: set[str] = set()
        self.content_add: list[tuple[str, str]] = []

    def current(self, name: str) -> bytes:
        return self.replaced.get(name) or self.pkg.utf8(name)

    def relate(self, source: str, kind: str, target_rel: str, drop_kinds: set[str] = frozenset()) -> None:
        """Add a relationship of ``source`` of type ``kind`` (a full URI, or the last step of one of
        the document relationships) and drop those of ``drop_kinds``."""
        name = rels_part(source)
        if name not in self.pkg and not any(n == name for n, _ in self.added):
            self.added.append((name, b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<Relationships '
                                     b'xmlns="http://schemas.openxmlformats.org/package/2006/relationships"/>'))
        data = self.take(name)
        add = []
        if kind:
            rid = _new_id(data, name)
            uri = kind if "://" in kind else _REL + kind
            add.append(b'<%%sRelationship Id="%s" Type="%s" Target="%s"/>' % (rid, attr(uri), attr(target_rel)))
        new = _edit_children(data, name, lambda e: e.attrib.get("Type", "").rsplit("/", 1)[-1] in drop_kinds, add)
        self.put(name, new)

    def take(self, name: str) -> bytes:
        for n, d in self.added:
            if n == name:
                return d
        return self.current(name)

    def put(self, name: str, data: bytes) -> None:
        for i, (n, _) in enumerate(self.added):
            if n == name:
                self.added[i] = (n, data)
                return
        if data != self.pkg.utf8(name):
            self.replaced[name] = data

    def content_types(self) -> None:
        name = "[Content_Types].xml"
        data = self.pkg.utf8(name)
        existing = {e.attrib.get("PartName", "") for e in elements(data, name) if e.local == "Override"}
        add = [b'<%%sOverride PartName="%s" ContentType="%s"/>' % (attr(p), attr(t))
               for p, t in self.content_add if p not in existing]
        new = _edit_children(data, name, lambda e: e.local == "Override" and e.attrib.get("PartName") in self.content_drop, add)
        self.put(name, new)


def _relative(source: str, target: str) -> str:
    return posixpath.relpath(target, posixpath.dirname(source) or ".")


def _children_of(els: list[Element], parent: Element, local: str) -> list[Element]:
    return [e for e in els if e.depth == parent.depth + 1 and e.local == local and parent.start < e.start < parent.close]


def _appended(data: bytes, part: str, parent: Element, payload: bytes, count: int) -> list[tuple[int, int, bytes]]:
    """The edits that append ``payload`` to a counted element and set its ``count``."""
    if parent.close == parent.start:
        raise Refused(f"{part}: an empty {parent.local} element")
    end = parent.inner(data)
    return [(parent.close, parent.close, payload),
            (parent.start, end, retag(data[parent.start:end], {b"count"}, [(b"count", b"%d" % count)]))]


def dynamic_record(edit: PackageEdit, book: Book) -> bytes:
    """The cm value of a dynamic-array cell, adding the record to xl/metadata.xml if needed."""
    if book.dynamic_cm is not None:
        return book.dynamic_cm.encode()
    part = book.metadata_part
    if part is None:
        _new_metadata(edit, book, _metadata_part(book), b'<metadataTypes count="1">' + _XLDAPR_TYPE % b"" +
                      b"</metadataTypes>" + _XLDAPR_FUTURE.replace(b"%s", b"") +
                      b'<cellMetadata count="1"><bk><rc t="1" v="0"/></bk></cellMetadata>')
        return b"1"
    data = edit.pkg.utf8(part)
    els = elements(data, part)
    root = els[0]
    p = prefix(data, root)
    top = {e.local: e for e in reversed(els) if e.depth == 2}
    if "futureMetadata" in top and any(e.attrib.get("name") == "XLDAPR" for e in els if e.depth == 2):
        raise Refused(f"{part}: an XLDAPR record this tool cannot reuse")
    edits = []
    n_types, type_edits = _metadata_type(data, part, els, _XLDAPR_TYPE % p)
    edits += type_edits
    later = [top[k].start for k in ("cellMetadata", "valueMetadata", "extLst") if k in top]
    at = min(later) if later else root.close
    edits.append((at, at, _XLDAPR_FUTURE.replace(b"%s", p)))
    record = b'<%sbk><%src t="%d" v="0"/></%sbk>' % (p, p, n_types + 1, p)
    cells = top.get("cellMetadata")
    if cells is not None:
        n_bk = len(_children_of(els, cells, "bk"))
        edits += _appended(data, part, cells, record, n_bk + 1)
    else:
        n_bk = 0
        later = [top[k].start for k in ("valueMetadata", "extLst") if k in top]
        at = min(later) if later else root.close
        edits.append((at, at, b'<%scellMetadata count="1">' % p + record + b"</%scellMetadata>" % p))
    edit.replaced[part] = splice(data, edits)
    return b"%d" % (n_bk + 1)


def _metadata_type(data: bytes, part: str, els: list[Element], template: bytes) -> tuple[int, list]:
    """(the number of metadata types before it, the edits) to add the metadata type ``template``
    (its prefix filled in) to a metadata part."""
    root = els[0]
    types = next((e for e in els if e.depth == 2 and e.local == "metadataTypes"), None)
    if types is None:
        at = root.inner(data)
        p = prefix(data, root)
        return 0, [(at, at, b'<%smetadataTypes count="1">' % p + template + b"</%smetadataTypes>" % p)]
    n_types = len(_children_of(els, types, "metadataType"))
    return n_types, _appended(data, part, types, template, n_types + 1)


class RichErrors:
    """The ``vm`` of each error written as a rich value: one the file has for that error, else
    one added (with its rich value) when the sheets are written."""

    def __init__(self, edit: PackageEdit, book: Book):
        self.edit, self.book = edit, book
        self.known: dict[str, bytes] = {}
        # highest first, so that of two records of one error the first is the one kept
        for vm, error in sorted(book.rich.items(), key=lambda kv: int(kv[0]), reverse=True):
            if not error.reason:  # an error the engine has a code for, not #VALUE! in place of another
                self.known[error.code] = vm.encode()
        self.part = book.metadata_part or _metadata_part(book)
        self.added: list[str] = []  # the codes that get a new rich value, in order
        self.first = 1  # the vm of the first one added
        if self.part in edit.pkg or any(n == self.part for n, _ in edit.added):
            data = edit.take(self.part)
            els = elements(data, self.part)
            block = next((e for e in els if e.depth == 2 and e.local == "valueMetadata"), None)
            self.first += 0 if block is None else len(_children_of(els, block, "bk"))

    def vm(self, code: str) -> bytes:
        vm = self.known.get(code)
        if vm is None:
            vm = self.known[code] = b"%d" % (self.first + len(self.added))
            self.added.append(code)
        return vm

    def write(self) -> None:
        """Add the rich values, their structure and the metadata records that point at them."""
        if not self.added:
            return
        types = [RICH_ERRORS.index(code) for code in self.added]
        edit, book = self.edit, self.book
        targets = {r.kind: r.target for r in relationships(edit.pkg, book.workbook_part) if not r.external}
        structure = self._part(targets, _RICH_STRUCTURES, [_ERROR_STRUCTURE], _error_structure)
        values = [b'<%%srv s="%d"><%%sv>%d</%%sv><%%sv>0</%%sv></%%srv>' % (structure, t) for t in types]
        self._metadata(self._part(targets, _RICH_VALUES, values, None))

    def _part(self, targets: dict[str, str], kind: tuple[str, str, str, str, str], children: list[bytes],
              find: Callable[[list[Element]], int | None] | None) -> int:
        """Append ``children`` to the rich-data part ``kind`` unless ``find`` finds there what
        they would add; the index of the first child appended (or of the one found)."""
        rel, name, content_type, root_name, child = kind
        edit = self.edit
        part = targets.get(rel)
        if part is None or part not in edit.pkg:
            part = posixpath.join(posixpath.dirname(self.book.workbook_part), "richData", name)
            if part in edit.pkg:
                raise Refused(f"{part} exists but the workbook does not use it")
            edit.added.append((part, b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<%s xmlns="%s" '
                               b'count="%d">%s</%s>' % (root_name.encode(), _RICH_NS, len(children),
                                                         b"".join(children).replace(b"%s", b""), root_name.encode())))
            edit.relate(self.book.workbook_part, _RICH_REL + rel, _relative(self.book.workbook_part, part))
            edit.content_add.append(("/" + part, content_type))
            return 0
        data = edit.current(part)
        els = elements(data, part)
        found = find(els) if find else None
        if found is not None:
            return found
        root = els[0]
        n = len(_children_of(els, root, child))
        payload = b"".join(children).replace(b"%s", prefix(data, root))
        edit.put(part, splice(data, _appended(data, part, root, payload, n + len(children))))
        return n

    def _metadata(self, first_value: int) -> None:
        edit, part = self.edit, self.part
        if not (part in edit.pkg or any(n == part for n, _ in edit.added)):
            _new_metadata(edit, self.book, part, b"")
        data = edit.take(part)
        els = elements(data, part)
        p = prefix(data, els[0])
        top = {e.local: e for e in reversed(els) if e.depth == 2}
        types = _children_of(els, top["metadataTypes"], "metadataType") if "metadataTypes" in top else []
        names = [e.attrib.get("name") for e in types]
        edits = []
        if RICH_TYPE in names:
            t = names.index(RICH_TYPE) + 1
        else:
            n_types, edits = _metadata_type(data, part, els, _XLRICHVALUE_TYPE % p)
            t = n_types + 1
        future = next((e for e in els if e.depth == 2 and e.local == "futureMetadata"
                       and e.attrib.get("name") == RICH_TYPE), None)
        n_future = 0 if future is None else len(_children_of(els, future, "bk"))
        blocks = b"".join(_RVB.replace(b"%%s", p) % (first_value + k) for k in range(len(self.added)))
        if future is None:
            later = [top[k].start for k in ("cellMetadata", "valueMetadata", "extLst") if k in top]
            at = min(later) if later else els[0].close
            edits.append((at, at, b'<%sfutureMetadata name="%s" count="%d">%s</%sfutureMetadata>'
                          % (p, RICH_TYPE.encode(), len(self.added), blocks, p)))
        else:
            edits += _appended(data, part, future, blocks, n_future + len(self.added))
        records = b"".join(b'<%sbk><%src t="%d" v="%d"/></%sbk>' % (p, p, t, n_future + k, p)
                           for k in range(len(self.added)))
        block = top.get("valueMetadata")
        if block is None:
            at = top["extLst"].start if "extLst" in top else els[0].close
            edits.append((at, at, b'<%svalueMetadata count="%d">%s</%svalueMetadata>' % (p, len(self.added), records, p)))
        else:
            edits += _appended(data, part, block, records, self.first - 1 + len(self.added))
        edit.put(part, splice(data, edits))


def _error_structure(els: list[Element]) -> int | None:
    """The index of a structure of the form an added error value takes, if the part has one."""
    root = els[0]
    for n, s in enumerate(_children_of(els, root, "s")):
        keys = [(k.attrib.get("n"), k.attrib.get("t")) for k in _children_of(els, s, "k")]
        if s.attrib.get("t") == "_error" and keys == [("errorType", "i"), ("subType", "i")]:
            return n
    return None


def _metadata_part(book: Book) -> str:
    """Where a workbook without one gets its metadata part."""
    return posixpath.join(posixpath.dirname(book.workbook_part), "metadata.xml")


def _new_metadata(edit: PackageEdit, book: Book, part: str, body: bytes) -> None:
    """Add the metadata part ``part`` holding ``body``, related from the workbook."""
    if part in edit.pkg:
        raise Refused(f"{part} exists but the workbook does not use it")
    edit.added.append((part, b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<metadata xmlns="' + _MAIN_NS +
                       b'" xmlns:xda="' + _XDA_NS + b'">' + body + b"</metadata>"))
    edit.relate(book.workbook_part, "sheetMetadata", _relative(book.workbook_part, part))
    edit.content_add.append(("/" + part, _METADATA_TYPE))


def _custom_properties(edit: PackageEdit) -> None:
    """Record the engine in the custom document properties."""
    root_rels: list[Rel] = relationships(edit.pkg, "")
    rel = next((r for r in root_rels if r.kind == "custom-properties" and not r.external), None)

    def prop(pid: int, name: str, value: str) -> bytes:
        return (b'<%%sproperty fmtid="%s" pid="%d" name="%s"><vt:lpwstr xmlns:vt="%s">%s</vt:lpwstr></%%sproperty>'
                % (_FMTID, pid, attr(name), _VT_NS, text(value)))

    if rel is None or rel.target not in edit.pkg:
        part = "docProps/custom.xml"
        if part in edit.pkg:
            raise Refused(f"{part} exists but the package does not use it")
        body = b"".join(prop(n + 2, name, value) for n, (name, value) in enumerate(PROPERTIES)).replace(b"%s", b"")
        edit.added.append((part, b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<Properties xmlns="' +
                           _CUSTOM_NS + b'" xmlns:vt="' + _VT_NS + b'">' + body + b"</Properties>"))
        edit.relate("", "custom-properties", part)
        edit.content_add.append(("/" + part, _CUSTOM_TYPE))
        return
    part = rel.target
    data = edit.pkg.utf8(part)
    els = [e for e in elements(data, part) if e.depth == 2 and e.local == "property"]
    p = prefix(data, elements(data, part)[0])
    by_name = {e.attrib.get("name"): e for e in els}
    pids = [int(e.attrib.get("pid", "1")) for e in els if e.attrib.get("pid", "").isdigit()]
    next_pid = max(pids + [1]) + 1
    replace, add = {}, []
    for name, value in PROPERTIES:
        old = by_name.get(name)
        if old is not None:
            replace[old.start] = prop(int(old.attrib.get("pid", "2")), name, value).replace(b"%s", p)
        else:
            add.append(prop(next_pid, name, value))
            next_pid += 1
    edit.put(part, _edit_children(data, part, lambda e: False, add, replace))


def plan(pkg: Package, book: Book, engine: Recalc) -> tuple[dict[str, bytes], set[str], list[tuple[str, bytes]]]:
    """The members to replace, remove and add for the recalculated workbook."""
    edit = PackageEdit(pkg, book)
    cm = None
    spilt = {*engine.spills, *engine.blocked}  # with the dynamic arrays stored, the only cells is_dynamic may take
    if any(fc.kind == "dynamic" for fc in engine.cells) or any(is_dynamic(engine, fi) for fi in spilt):
        cm = dynamic_record(edit, book)
    rich = RichErrors(edit, book)
    for sheet in book.sheets:
        if sheet.scan is None or not (engine.at[sheet.index] or engine.claims[sheet.index] or sheet.scan.not_finite):
            continue
        data = pkg.utf8(sheet.part)
        new = _SheetPatch(data, sheet.scan, engine, sheet.index, cm, rich).build()
        if new != data:
            edit.replaced[sheet.part] = new
    rich.write()
    wb_rels = relationships(pkg, book.workbook_part)
    chains = [r.target for r in wb_rels if r.kind == "calcChain" and not r.external]
    if chains:
        edit.removed |= {c for c in chains if c in pkg}
        edit.relate(book.workbook_part, "", "", drop_kinds={"calcChain"})
        edit.content_drop |= {"/" + c for c in chains}
    _custom_properties(edit)
    edit.content_types()
    replaced = {name: pkg.encoded(name, data) for name, data in edit.replaced.items()}  # UTF-16 parts stay UTF-16
    return replaced, edit.removed, edit.added
