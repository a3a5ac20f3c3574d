"""The workbook as read: sheets in order, their cells and formulas, defined names,
shared strings and the dynamic-array cell metadata.

>>> part_of("xl/workbook.xml", "worksheets/sheet1.xml"), part_of("xl/workbook.xml", "/xl/a.xml")
('xl/worksheets/sheet1.xml', 'xl/a.xml')
>>> rels_part("xl/workbook.xml")
'xl/_rels/workbook.xml.rels'
"""

from __future__ import annotations

import posixpath
from dataclasses import dataclass, field
from typing import Iterator, NamedTuple
from xml.etree.ElementTree import Element

from ..errors import CALC, CODES, DIV0, NA, NAME, NULL, NUM, REF, SPILL, VALUE, CellError
from .external import ExternalBook, read_link
from .package import Package, Refused
from .pivots import Cache, PivotTable, pivot_at, read_cache, read_pivot
from .refs import Area
from .sheetxml import MAX_FORMULAS, NAMESPACES, SheetScan, scan, xstring
from .tables import Table, read_table
from .structure import CONTENT_TYPES, check_content_types, check_defined_name, check_relationship, check_sheet

PACKAGE_RELS = "http://schemas.openxmlformats.org/package/2006/relationships"
DOC_RELS = ("http://schemas.openxmlformats.org/officeDocument/2006/relationships",
            "http://purl.oclc.org/ooxml/officeDocument/relationships")
DYNAMIC_ARRAY_NS = "http://schemas.microsoft.com/office/spreadsheetml/2017/dynamicarray"
DYNAMIC_TYPE = "XLDAPR"
RICH_DATA_NS = "http://schemas.microsoft.com/office/spreadsheetml/2017/richdata"
RICH_TYPE = "XLRICHVALUE"
RICH_PARTS = ("rdRichValue", "rdRichValueStructure")  # the workbook's relationships to the rich values and structures
# A rich error value's errorType is its ERROR.TYPE number less one (the reference workbooks
# store 8 for #SPILL! and 13 for #CALC!). Excel keeps #VALUE! in the cell's <v> for the errors
# that came after the seven of the file format; those the engine has no code for stay #VALUE!.
RICH_ERRORS = (NULL, DIV0, VALUE, REF, NAME, NUM, NA, "#GETTING_DATA", SPILL, "#CONNECT!", "#BLOCKED!",
               "#UNKNOWN!", "#FIELD!", CALC, "#BUSY!")


_REL_IDS = tuple(f"{{{ns}}}id" for ns in DOC_RELS)


class Rel(NamedTuple):
    id: str
    kind: str  # the last path step of the relationship type, e.g. "worksheet"
    target: str  # the part name inside the package, or the URL of an external target
    external: bool


def part_of(source: str, target: str) -> str:
    """The package part a relationship target of ``source`` names."""
    if target.startswith("/"):
        return target.lstrip("/")
    return posixpath.normpath(posixpath.join(posixpath.dirname(source), target))


def rels_part(part: str) -> str:
    """The relationships part of ``part``."""
    folder, name = posixpath.split(part)
    return posixpath.join(folder, "_rels", name + ".rels")


def relationships(pkg: Package, part: str) -> list[Rel]:
    """The relationships of ``part`` (none when it has no relationships part)."""
    name = rels_part(part)
    if name not in pkg:
        return []
    out = []
    seen: set[str] = set()
    for el in pkg.xml(name):
        if el.tag != f"{{{PACKAGE_RELS}}}Relationship":
            continue
        check_relationship(el, name, seen)
        external = el.get("TargetMode") == "External"
        target = el.get("Target", "")
        out.append(Rel(el.get("Id", ""), el.get("Type", "").rsplit("/", 1)[-1], target if external else part_of(part, target),
                       external))
    return out


@dataclass
class Sheet:
    name: str
    index: int  # position in the workbook (a sheet-scoped name's localSheetId)
    part: str | None  # None for chart sheets and others without cells
    scan: SheetScan | None


@dataclass
class Book:
    workbook_part: str
    sheets: list[Sheet]
    names: dict[tuple[int | None, str], str]  # (sheet index or None, upper-case name) -> formula text
    metadata_part: str | None
    dynamic_cm: str | None  # the cm value that marks a dynamic array, if the file has one
    parsed: set[str] = field(default_factory=set)  # parts read here (the rest are only validated)
    tables: list[Table] = field(default_factory=list)
    date1904: bool = False  # the workbook counts dates from 1904-01-01 (Excel's Mac date system)
    iteration: tuple[int, float] | None = None  # iterative calculation: (maximum count, maximum change)
    links: list[ExternalBook | None] = field(default_factory=list)  # [1], [2], ... of external references
    pivots: list[PivotTable] = field(default_factory=list)
    rich: dict[str, CellError] = field(default_factory=dict)  # value-metadata index (vm) -> its rich error

    def pivot_at(self, sheet: int, where: Area) -> PivotTable | None:
        """The pivot table an area of a sheet meets (GETPIVOTDATA's second argument)."""
        return pivot_at(self.pivots, sheet, where)

    def sheet(self, name: str) -> Sheet | None:
        lowered = name.lower()
        for s in self.sheets:
            if s.name.lower() == lowered:
                return s
        return None


def _main(local: str) -> tuple[str, ...]:
    return tuple(f"{{{ns}}}{local}" for ns in NAMESPACES)


def _children(el: Element, local: str) -> list[Element]:
    tags = _main(local)
    return [c for c in el if c.tag in tags]


def shared_strings(root: Element) -> list[str]:
    """The texts of a shared-strings part: plain or rich text, phonetic runs left out.

    >>> from cellfuncs.workbook.package import parse_xml
    >>> ns = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'
    >>> shared_strings(parse_xml(f'<sst {ns}><si><t>a</t></si><si><r><t>b</t></r><r><t>c</t></r>'
    ...                          f'<rPh sb="0" eb="1"><t>x</t></rPh></si></sst>'.encode(), "s"))
    ['a', 'bc']
    """
    t_tags, r_tags = _main("t"), _main("r")
    out = []
    for si in root:
        parts = []
        for child in si:
            if child.tag in t_tags:
                parts.append(child.text or "")
            elif child.tag in r_tags:
                parts += [(t.text or "") for t in child if t.tag in t_tags]
        out.append(xstring("".join(parts)))
    return out


def dynamic_cm(root: Element) -> str | None:
    """The cell-metadata index (a cell's ``cm``) whose record says "dynamic array"
    (a futureMetadata XLDAPR block with ``fDynamic="1"``), or None.

    >>> from cellfuncs.workbook.package import parse_xml
    >>> xml = (b'<metadata xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:xda="'
    ...        + DYNAMIC_ARRAY_NS.encode() + b'"><metadataTypes count="1"><metadataType name="XLDAPR"/>'
    ...        b'</metadataTypes><futureMetadata name="XLDAPR" count="1"><bk><extLst><ext uri="x">'
    ...        b'<xda:dynamicArrayProperties fDynamic="1" fCollapsed="0"/></ext></extLst></bk></futureMetadata>'
    ...        b'<cellMetadata count="1"><bk><rc t="1" v="0"/></bk></cellMetadata></metadata>')
    >>> dynamic_cm(parse_xml(xml, "m"))
    '1'
    """
    dynamic_blocks = []
    for future in _children(root, "futureMetadata"):
        if future.get("name") == DYNAMIC_TYPE:
            for bk in _children(future, "bk"):
                props = bk.find(f".//{{{DYNAMIC_ARRAY_NS}}}dynamicArrayProperties")
                dynamic_blocks.append(props is not None and props.get("fDynamic") in ("1", "true"))
    for n, v in _records(root, "cellMetadata", DYNAMIC_TYPE):
        if 0 <= v < len(dynamic_blocks) and dynamic_blocks[v]:
            return str(n)
    return None


def _records(root: Element, blocks: str, kind: str) -> Iterator[tuple[int, int]]:
    """(block number counted from 1, index into the futureMetadata of ``kind``) of each record
    of the ``blocks`` (cellMetadata or valueMetadata) that is of metadata type ``kind``."""
    types = [t.get("name") for block in _children(root, "metadataTypes") for t in _children(block, "metadataType")]
    for block in _children(root, blocks):
        for n, bk in enumerate(_children(block, "bk"), start=1):
            for rc in _children(bk, "rc"):
                t = _integer(rc.get("t"), 0)
                if 1 <= t <= len(types) and types[t - 1] == kind:
                    yield n, _integer(rc.get("v"), -1)


def _rich(local: str) -> str:
    return f"{{{RICH_DATA_NS}}}{local}"


def rich_errors(metadata: Element, values: Element | None, structures: Element | None) -> dict[str, CellError]:
    """The error each value-metadata index (a cell's ``vm``, counted from 1) stands for, where it
    points through a futureMetadata XLRICHVALUE block at a rich value of the ``_error`` structure.

    >>> from cellfuncs.workbook.package import parse_xml
    >>> main, rd = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"', f'xmlns="{RICH_DATA_NS}"'
    >>> meta = parse_xml(f'<metadata {main} xmlns:x="{RICH_DATA_NS}"><metadataTypes count="1"><metadataType '
    ...                  f'name="XLRICHVALUE"/></metadataTypes><futureMetadata name="XLRICHVALUE" count="1"><bk><extLst>'
    ...                  f'<ext uri="u"><x:rvb i="0"/></ext></extLst></bk></futureMetadata><valueMetadata count="1">'
    ...                  f'<bk><rc t="1" v="0"/></bk></valueMetadata></metadata>'.encode(), "m")
    >>> rv = parse_xml(f'<rvData {rd} count="1"><rv s="0"><v>13</v><v>3</v></rv></rvData>'.encode(), "v")
    >>> rs = parse_xml(f'<rvStructures {rd} count="1"><s t="_error"><k n="errorType" t="i"/><k n="subType" t="i"/>'
    ...                f'</s></rvStructures>'.encode(), "s")
    >>> rich_errors(meta, rv, rs)
    {'1': CellError(code='#CALC!', reason='')}
    """
    if values is None or structures is None:
        return {}
    # per structure, where its errorType sits among a rich value's fields (None: not an error)
    places = []
    for s in structures:
        if s.tag == _rich("s"):
            names = [k.get("n") for k in s if k.tag == _rich("k")]
            places.append(names.index("errorType") if s.get("t") == "_error" and "errorType" in names else None)
    codes: list[CellError | None] = []
    for rv in values:
        if rv.tag == _rich("rv"):
            s = _integer(rv.get("s"), -1)
            place = places[s] if 0 <= s < len(places) else None
            fields = [(v.text or "").strip() for v in rv if v.tag == _rich("v")]
            codes.append(None if place is None or place >= len(fields) else _rich_error(_integer(fields[place], -1)))
    future = []  # per futureMetadata XLRICHVALUE block, the rich value it points at
    for block in _children(metadata, "futureMetadata"):
        if block.get("name") == RICH_TYPE:
            for bk in _children(block, "bk"):
                rvb = bk.find(f".//{_rich('rvb')}")
                future.append(-1 if rvb is None else _integer(rvb.get("i"), -1))
    out = {}
    for n, v in _records(metadata, "valueMetadata", RICH_TYPE):
        i = future[v] if 0 <= v < len(future) else -1
        if 0 <= i < len(codes) and codes[i] is not None:
            out[str(n)] = codes[i]
    return out


def _rich_error(number: int) -> CellError:
    code = RICH_ERRORS[number] if 0 <= number < len(RICH_ERRORS) else None
    if code in CODES:
        return CellError(code)
    return CellError(VALUE, f"the stored error {code or f'of type {number}'}, which this engine holds as #VALUE!")


def _integer(text: str | None, missing: int) -> int:
    return int(text) if text is not None and text.isdigit() else missing


def load(pkg: Package) -> Book:
    """Read every part recalculation needs; refuse what is not a workbook."""
    if CONTENT_TYPES not in pkg:
        raise Refused("no [Content_Types].xml: not an Office Open XML package")
    docs = [r for r in relationships(pkg, "") if r.kind == "officeDocument" and not r.external]
    if not docs or docs[0].target not in pkg:
        raise Refused("no workbook part in the package")
    wb_part = docs[0].target
    check_content_types(pkg.xml(CONTENT_TYPES), wb_part)
    root = pkg.xml(wb_part)
    if root.tag not in _main("workbook"):
        raise Refused(f"{wb_part}: not a workbook")
    rels = {r.id: r for r in relationships(pkg, wb_part)}
    parsed = {"_rels/.rels", CONTENT_TYPES, wb_part, rels_part(wb_part)}
    strings: list[str] = []
    metadata_part = None
    cm = None
    rich: dict[str, CellError] = {}
    parts = {r.kind: r.target for r in rels.values() if not r.external and r.target in pkg}
    if "sharedStrings" in parts:
        strings = shared_strings(pkg.xml(parts["sharedStrings"]))
        parsed.add(parts["sharedStrings"])
    if "sheetMetadata" in parts:
        metadata_part = parts["sheetMetadata"]
        metadata = pkg.xml(metadata_part)
        cm = dynamic_cm(metadata)
        rich_parts = [parts.get(kind) for kind in RICH_PARTS]
        rich = rich_errors(metadata, *(pkg.xml(part) if part else None for part in rich_parts))
        parsed.update([metadata_part] + [part for part in rich_parts if part])
    budget = [MAX_FORMULAS]
    sheets = []
    tables: list[Table] = []
    sheet_names: set[str] = set()
    sheet_ids: set[str] = set()
    for block in _children(root, "sheets"):
        for n, el in enumerate(_children(block, "sheet")):
            check_sheet(el, sheet_names, sheet_ids)
            rid = _rel_id(el)
            rel = rels.get(rid)
            if rel is None:  # Excel could not open it either: nothing says where the sheet is
                raise Refused(f"sheet {el.get('name')!r}: relationship {rid!r} missing from {rels_part(wb_part)}")
            part = rel.target if rel is not None and rel.kind == "worksheet" and not rel.external else None
            if part is not None and part not in pkg:
                raise Refused(f"sheet {el.get('name')!r}: part {part} missing")
            sheet_scan = scan(pkg.utf8(part), part, budget, strings, rich) if part else None
            if part:
                parsed.add(part)
                tables += _tables(pkg, part, n, el.get("name", ""), parsed)
            sheets.append(Sheet(el.get("name", f"Sheet{n + 1}"), n, part, sheet_scan))
    names: dict[tuple[int | None, str], str] = {}
    for block in _children(root, "definedNames"):
        for el in _children(block, "definedName"):
            check_defined_name(el, len(sheets))
            scope = el.get("localSheetId")
            key = (int(scope) if scope is not None and scope.isdigit() else None, el.get("name", "").upper())
            names[key] = (el.text or "").strip()
    date1904 = any(_flag(el, "date1904") for el in _children(root, "workbookPr"))
    return Book(wb_part, sheets, names, metadata_part, cm, parsed, tables, date1904, _iteration(root),
                _links(pkg, root, rels, parsed), _pivots(pkg, sheets, parsed, date1904), rich)


def _rel_id(el: Element) -> str | None:
    """The relationship id (``r:id``) an element points through."""
    return next((v for k, v in el.attrib.items() if k in _REL_IDS), None)


def _links(pkg: Package, root: Element, rels: dict[str, Rel], parsed: set[str]) -> list[ExternalBook | None]:
    """The other workbooks' stored values, in the order formulas number them ([1], [2], ...)."""
    out: list[ExternalBook | None] = []
    for block in _children(root, "externalReferences"):
        for el in _children(block, "externalReference"):
            rid = _rel_id(el)
            rel = rels.get(rid)
            if rel is None or rel.external or rel.target not in pkg:
                out.append(None)
                continue
            out.append(read_link(pkg.xml(rel.target), rel.target))
            parsed.add(rel.target)
    return out


def _flag(el: Element, name: str) -> bool:
    return el.get(name, "").lower() in ("1", "true")


def _iteration(root: Element) -> tuple[int, float] | None:
    """The workbook's iterative-calculation setting (File > Options > Formulas: enable
    iterative calculation, maximum iterations, maximum change; the file's defaults 100 and
    0.001), None when it is off."""
    for el in _children(root, "calcPr"):
        if _flag(el, "iterate"):
            try:
                count, delta = int(el.get("iterateCount", "100")), float(el.get("iterateDelta", "0.001"))
            except ValueError:
                raise Refused(f"calcPr: iterateCount {el.get('iterateCount')!r} or iterateDelta "
                              f"{el.get('iterateDelta')!r} is not a number") from None
            return max(1, min(count, 32767)), abs(delta)
    return None


def _tables(pkg: Package, part: str, sheet: int, sheet_name: str, parsed: set[str]) -> list[Table]:
    """The tables (list objects) placed on a worksheet, from its table parts."""
    out = []
    for rel in relationships(pkg, part):
        if rel.kind == "table" and not rel.external and rel.target in pkg:
            table = read_table(pkg.xml(rel.target), sheet, sheet_name)
            parsed.add(rel.target)
            parsed.add(rels_part(part))
            if table is not None:
                out.append(table)
    return out


def _target(pkg: Package, part: str, kind: str) -> str | None:
    """The part that ``part``'s first relationship of ``kind`` inside the package points at."""
    return next((r.target for r in relationships(pkg, part) if r.kind == kind and not r.external and r.target in pkg),
                None)


def _pivots(pkg: Package, sheets: list[Sheet], parsed: set[str], date1904: bool) -> list[PivotTable]:
    """The pivot tables placed on the worksheets, each over its cache (read once for all the
    tables that share it; its dates as serials of the workbook's date system)."""
    from ..formula.dates import date_system

    caches: dict[str, Cache] = {}
    out = []
    with date_system(date1904):
        for sheet in sheets:
            rels = relationships(pkg, sheet.part) if sheet.part else []
            for rel in rels:
                definition = _target(pkg, rel.target, "pivotCacheDefinition") \
                    if rel.kind == "pivotTable" and not rel.external and rel.target in pkg else None
                if definition is None:
                    continue
                if definition not in caches:
                    records = _target(pkg, definition, "pivotCacheRecords")
                    caches[definition] = read_cache(pkg.read(definition), definition,
                                                    pkg.read(records) if records else None, records or "")
                    parsed.update([definition, rels_part(definition)] + ([records] if records else []))
                table = read_pivot(pkg.xml(rel.target), sheet.index, caches[definition])
                parsed.update([rel.target, rels_part(rel.target)])
                if table is not None:
                    out.append(table)
    return out
