"""Pivot tables as the file stores them, and the value GETPIVOTDATA reads from one.

A pivot table (``xl/pivotTables/pivotTableN.xml``) shows aggregates of the records of its
cache (``xl/pivotCache/pivotCacheDefinitionN.xml``: the fields and their shared items;
``pivotCacheRecordsN.xml``: one ``r`` per source row, each value an index ``x`` into the
field's shared items or the value itself). The cells Excel wrote into the sheet are plain
values; GETPIVOTDATA is computed here from the records, as ECMA-376 Part 1 (18.10) lays the
parts out:

- the pivot table is the one whose ``location`` meets the reference (the last one in the
  file when several do);
- ``data_field`` names a data field (``Sum of Score``) or its source field (``Score``);
- each field/item pair names a field on the rows, the columns or the report filter and one
  of its items (several given as an array are added together); an item is text (compared
  ignoring case, or with the item's caption), a number, a date's serial number or a logical;
- a combination must be shown: the row and column fields given must be those of a line the
  table lists (``rowItems``/``colItems``: an item's line, a subtotal, the grand total), a
  report-filter item must be the one the filter shows; otherwise, and for a field or item the
  table lacks, the result is #REF!, as Microsoft's GETPIVOTDATA page states;
- the value is the data field's ``subtotal`` (sum, count, average, max, min, product,
  countNums, stdDev, stdDevp, var, varp) over the records of the combination, the items the
  table hides and the report filter's left out; a combination without records is a blank
  cell, which GETPIVOTDATA gives as #REF!.

Grouped fields (dates by month), calculated fields and "show values as" are not computed:
their value is #VALUE! naming the reason. The cache parts are read by streaming; at most
:data:`MAX_CACHE_VALUES` values of one cache are kept (beyond that GETPIVOTDATA is #NUM!
naming the limit), and each evaluation charges the records it reads to the formula budget.

>>> from cellfuncs.workbook.package import parse_xml
>>> ns = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'
>>> cache = read_cache(f'<pivotCacheDefinition {ns}><cacheFields><cacheField name="Kind"><sharedItems>'
...     f'<s v="a"/><s v="b"/></sharedItems></cacheField><cacheField name="Qty"><sharedItems/></cacheField>'
...     f'</cacheFields></pivotCacheDefinition>'.encode(), "d",
...     f'<pivotCacheRecords {ns}><r><x v="0"/><n v="2"/></r><r><x v="1"/><n v="5"/></r>'
...     f'<r><x v="0"/><n v="4"/></r></pivotCacheRecords>'.encode(), "r")
>>> table = read_pivot(parse_xml(f'<pivotTableDefinition {ns} name="P"><location ref="A3:B6"/><pivotFields>'
...     f'<pivotField axis="axisRow"><items><item x="0"/><item x="1"/><item t="default"/></items></pivotField>'
...     f'<pivotField dataField="1"/></pivotFields><rowFields><field x="0"/></rowFields><rowItems><i><x/></i>'
...     f'<i><x v="1"/></i><i t="grand"><x/></i></rowItems><dataFields><dataField name="Sum of Qty" fld="1"/>'
...     f'</dataFields></pivotTableDefinition>'.encode(), "t"), 0, cache)
>>> table.value("Sum of Qty", []), table.value("qty", [("Kind", "A")]), table.value("Qty", [("Kind", "c")]).code
(11.0, 6.0, '#REF!')
"""

from __future__ import annotations

import datetime as dt
import itertools
import math
from array import array
from dataclasses import dataclass, field
from typing import Any, Iterable, Sequence
from xml.etree.ElementTree import Element

import numpy as np

from ..errors import CODES, DIV0, NUM, REF, VALUE, CellError
from ..formula.budget import charge
from ..formula.coerce import fold, format_number
from ..formula.dates import serial
from .package import parse_xml
from .refs import Area, area
from .sheetxml import NAMESPACES, xstring

MAX_CACHE_VALUES = 4_194_304  # values (shared items and record values) kept of one pivot cache
MAX_COMBINATIONS = 65_536  # item combinations one GETPIVOTDATA call may name (arrays of items)
NO_ITEM = 1048832  # an axis position without an item (MS-OI29500 2.1.766)
_CHUNK = 65_536  # records charged to the budget at a time
_VALUE_TAGS = frozenset("mnbesdx")
_SUBTOTALS = ("sum", "count", "average", "max", "min", "product", "countNums", "stdDev", "stdDevp", "var", "varp")
_DATA_ROW = "data"


def _local(tag: str) -> str:
    """The local name of an element of SpreadsheetML's namespace ('' for other namespaces)."""
    if tag.startswith("{"):
        ns, _, local = tag[1:].partition("}")
        return local if ns in NAMESPACES else ""
    return tag


def _flag(text: str | None, default: bool) -> bool:
    return default if text is None else text.lower() in ("1", "true")


def _index(text: str | None, default: int = 0) -> int:
    text = (text or "").strip()
    digits = text[1:] if text[:1] == "-" else text
    return int(text) if digits.isascii() and digits.isdigit() else default


@dataclass
class CacheField:
    """A field of the cache: its distinct values (the shared items first, then the values the
    records hold in place) and, per record, the index of its value among them."""

    name: str
    in_records: bool  # a database field (a calculated field has no values in the records)
    formula: bool = False
    grouped: bool = False
    items: list[object] = field(default_factory=list)
    codes: Any = None  # per record, an index into items (-1: an index the items lack)
    _seen: dict[tuple[str, object], int] = field(default_factory=dict)

    def add(self, kind: str, value: object, shared: bool) -> int:
        """The index of a value among the items: a shared item is appended as it comes (the
        records count them in order), a value held in place is appended once."""
        key = (kind, value)
        code = self._seen.get(key)
        if code is None or shared:
            code = len(self.items)
            self._seen.setdefault(key, code)
            self.items.append(value)
        return code


@dataclass
class Cache:
    """A pivot cache: its fields and how many records it holds."""

    fields: list[CacheField]
    records: int = 0
    refused: CellError | None = None  # why the records are not kept


def _value(kind: str, v: str | None) -> object:
    """A cache value from its element (``m`` missing, ``n`` number, ``b`` logical, ``e`` error,
    ``s`` text, ``d`` date and time) as a cell holds it: the date as its serial number."""
    if kind == "m":
        return None
    if kind == "n":
        try:
            x = float(v or "")
        except ValueError:
            return CellError(NUM, f"the cached number {v!r} is not a number")
        return x if math.isfinite(x) else CellError(NUM, f"the cached number {v} is not finite")
    if kind == "b":
        return _flag(v, False)
    if kind == "e":
        return CellError(v) if v in CODES else CellError(VALUE, f"the cached error {v}, held as #VALUE!")
    if kind == "d":
        try:
            when = dt.datetime.fromisoformat(v or "")
        except ValueError:
            return CellError(VALUE, f"the cached date {v!r} is not a date")
        seconds = when.hour * 3600 + when.minute * 60 + when.second + when.microsecond / 1e6
        return float(serial(when.year, when.month, when.day)) + seconds / 86400.0
    return xstring(v or "")


class _Reader:
    """A parser target for the cache definition (fields and shared items) and then the
    records, keeping at most :data:`MAX_CACHE_VALUES` values."""

    def __init__(self) -> None:
        self.fields: list[CacheField] = []
        self.stack: list[str] = []
        self.kept = 0
        self.refused: CellError | None = None
        self.columns: list[CacheField] = []  # the database fields, in the records' order
        self.position = 0
        self.records = 0

    def _keep(self) -> bool:
        self.kept += 1
        if self.kept > MAX_CACHE_VALUES and self.refused is None:
            self.refused = CellError(NUM, f"the pivot cache holds more than {MAX_CACHE_VALUES:,} values, the limit "
                                          f"of one pivot cache")
        return self.refused is None

    def start(self, tag: str, attrib: dict) -> None:
        local = _local(tag)
        parent = self.stack[-1] if self.stack else ""
        self.stack.append(local)
        if local == "cacheField" and parent == "cacheFields":
            self.fields.append(CacheField(xstring(attrib.get("name", "")), _flag(attrib.get("databaseField"), True),
                                          bool(attrib.get("formula"))))
        elif local == "fieldGroup" and parent == "cacheField" and self.fields:
            self.fields[-1].grouped = True
        elif local in _VALUE_TAGS and local != "x" and parent == "sharedItems" and self.fields and self._keep():
            self.fields[-1].add(local, _value(local, attrib.get("v")), shared=True)
        elif local == "r" and parent == "pivotCacheRecords":
            self.position = 0
            self.records += 1
        elif local in _VALUE_TAGS and parent == "r":
            self._record_value(local, attrib.get("v"))

    def _record_value(self, kind: str, v: str | None) -> None:
        n, self.position = self.position, self.position + 1
        if n >= len(self.columns) or not self._keep():
            return
        f = self.columns[n]
        if kind == "x":
            code = _index(v, -1)
            code = code if 0 <= code < len(f.items) else -1
        else:
            code = f.add(kind, _value(kind, v), shared=False)
        codes = f.codes
        if len(codes) < self.records - 1:  # the records before were short of values: theirs are missing
            codes.extend([-1] * (self.records - 1 - len(codes)))
        codes.append(code)

    def end(self, tag: str) -> None:
        self.stack.pop()

    def data(self, text: str) -> None:
        pass

    def close(self) -> None:
        return None

    def begin_records(self) -> None:
        self.stack = []
        self.columns = [f for f in self.fields if f.in_records]
        for f in self.columns:
            f.codes = array("i")


def read_cache(definition: bytes, definition_part: str, records: bytes | None, records_part: str) -> Cache:
    """The cache a definition part describes, with the records of its records part (None:
    the file keeps none). Dates become serial numbers of the date system in use."""
    reader = _Reader()
    parse_xml(definition, definition_part, reader)
    if records is not None:
        reader.begin_records()
        parse_xml(records, records_part, reader)
    cache = Cache(reader.fields, reader.records if records is not None else 0, reader.refused)
    for f in reader.columns:
        f.codes = np.frombuffer(f.codes, dtype=np.int32) if f.codes else np.zeros(0, dtype=np.int32)
        if len(f.codes) < cache.records:
            f.codes = np.concatenate([f.codes, np.full(cache.records - len(f.codes), -1, dtype=np.int32)])
        f._seen = {}
    return cache


@dataclass
class PivotItem:
    """An item of a pivot table's field, in the order the table shows them."""

    cache_index: int | None  # the shared item it shows (None: a subtotal or other special item)
    hidden: bool
    caption: str | None


@dataclass
class PivotField:
    """A pivot table's view of a cache field."""

    axis: str | None  # axisRow, axisCol, axisPage or None (not shown)
    name: str | None  # a name given in the table, in place of the cache field's
    items: list[PivotItem]
    subtotal_top: bool  # a subtotal on its item's first line (outline and compact forms)

    def cache_index(self, item: int) -> int | None:
        return self.items[item].cache_index if 0 <= item < len(self.items) else None


@dataclass
class DataField:
    """A data field of a pivot table: its name, its cache field and how it summarises."""

    name: str
    fld: int
    subtotal: str
    show_as: str


@dataclass
class PivotTable:
    """A pivot table: where it is, its cache, its fields on each axis and the lines it shows."""

    name: str
    sheet: int
    area: Area
    cache: Cache
    fields: list[PivotField]
    data_fields: list[DataField]
    row_fields: list[int]
    col_fields: list[int]
    pages: dict[int, int | None]  # report-filter field -> the cache item it shows (None: all)
    lines: dict[str, set[tuple[frozenset, int | None]] | None]  # per axis, the lines shown (None: not listed)

    def value(self, data_field: str, pairs: Sequence[tuple[str, object]]) -> object:
        """What the table shows of ``data_field`` for the field/item ``pairs`` (an item may be a
        list of items, added together); #REF! where it shows nothing."""
        if self.cache.refused is not None:
            return self.cache.refused
        d = self._data_field(data_field)
        if type(d) is CellError:
            return d
        wanted: dict[int, set[int]] = {}
        for name, item in pairs:
            f = self._field(name)
            if type(f) is CellError:
                return f
            found = self._items(f, item if type(item) is list else [item])
            if type(found) is CellError:
                return found
            wanted[f] = wanted[f] & found if f in wanted else found
        shown = self._shown(wanted, d)
        if shown is not None:
            return shown
        return self._aggregate(self.data_fields[d], wanted)

    def _data_field(self, text: str) -> int | CellError:
        key = fold(text)
        fields = self.cache.fields
        sources = [fields[d.fld].name if 0 <= d.fld < len(fields) else "" for d in self.data_fields]
        for names in ([d.name for d in self.data_fields], sources):  # its own name first, then its source's
            for n, name in enumerate(names):
                if name and fold(name) == key:
                    return n
        return CellError(REF, f"the pivot table {self.name} has no data field {text!r}")

    def _field(self, text: str) -> int | CellError:
        key = fold(text)
        for n, f in enumerate(self.fields):
            names = [f.name, self.cache.fields[n].name if n < len(self.cache.fields) else None]
            if any(x is not None and fold(x) == key for x in names):
                if f.axis is None:
                    return CellError(REF, f"the field {text!r} is not shown in the pivot table {self.name}")
                return n
        return CellError(REF, f"the pivot table {self.name} has no field {text!r}")

    def _items(self, f: int, items: Iterable[object]) -> set[int] | CellError:
        """The cache indices of the given items of field ``f`` that the table shows."""
        cache_items = self.cache.fields[f].items if f < len(self.cache.fields) else []
        out = set()
        for item in items:
            if type(item) is CellError:
                return item
            matched = [k for k, p in enumerate(self.fields[f].items) if p.cache_index is not None and not p.hidden
                       and p.cache_index < len(cache_items) and _matches(item, cache_items[p.cache_index], p.caption)]
            if not matched:
                return CellError(REF, f"the pivot table {self.name} shows no item {_shown_text(item)} of the field "
                                      f"{self.cache.fields[f].name!r}")
            out.update(self.fields[f].items[k].cache_index for k in matched)
        return out

    def _shown(self, wanted: dict[int, set[int]], d: int) -> CellError | None:
        """#REF! unless each combination of the wanted items is a line the table shows."""
        for f, items in wanted.items():
            if f in self.pages:
                if self.pages[f] is None or items != {self.pages[f]}:
                    return CellError(REF, f"the report filter of {self.cache.fields[f].name!r} does not show that item")
        for axis, fields in (("row", self.row_fields), ("col", self.col_fields)):
            lines = self.lines[axis]
            if lines is None:
                continue
            own = [f for f in wanted if f in fields]
            choices = [sorted(wanted[f]) for f in own]
            if math.prod(len(c) for c in choices) > MAX_COMBINATIONS:
                return CellError(NUM, f"the items name more than {MAX_COMBINATIONS:,} combinations")
            data = d if -2 in fields else None
            for combo in itertools.product(*choices):
                if (frozenset(zip(own, combo)), data) not in lines:
                    return CellError(REF, f"the pivot table {self.name} shows no such total")
        return None

    def _aggregate(self, data: DataField, wanted: dict[int, set[int]]) -> object:
        fields = self.cache.fields
        if not 0 <= data.fld < len(fields):
            return CellError(REF, f"the data field {data.name!r} names no cache field")
        source = fields[data.fld]
        if source.formula or not source.in_records:
            return CellError(VALUE, f"the data field {data.name!r} is a calculated field, which is not computed")
        if data.show_as not in ("", "normal"):
            return CellError(VALUE, f"the data field {data.name!r} shows its values as {data.show_as}, "
                                    f"which is not computed")
        if data.subtotal not in _SUBTOTALS:
            return CellError(VALUE, f"the data field {data.name!r} summarises by {data.subtotal!r}")
        used = set(wanted) | {f for f, p in enumerate(self.fields) if p.axis is not None} | {data.fld}
        for f in used:
            if f < len(fields) and fields[f].grouped:
                return CellError(VALUE, f"the field {fields[f].name!r} is grouped, which is not computed")
        n = self.cache.records
        for start in range(0, n, _CHUNK):
            over = charge((min(_CHUNK, n - start),))
            if over is not None:
                return over
        mask = np.ones(n, dtype=bool)
        for f, p in enumerate(self.fields):
            if p.axis is None or f >= len(fields) or fields[f].codes is None:
                continue
            codes = fields[f].codes
            hidden = [i.cache_index for i in p.items if i.hidden and i.cache_index is not None]
            if hidden:
                mask &= ~np.isin(codes, hidden)
            if self.pages.get(f) is not None:
                mask &= codes == self.pages[f]
            if f in wanted:
                mask &= np.isin(codes, sorted(wanted[f]))
        chosen = self._in_order(np.nonzero(mask)[0])
        picked = [source.items[c] if c >= 0 else None for c in source.codes[chosen].tolist()]
        if not picked:
            return CellError(REF, "the pivot table shows a blank cell for these items")
        return summarise(data.subtotal, picked)

    def _in_order(self, chosen: np.ndarray) -> np.ndarray:
        """The records in the order the table shows their items, row fields first, then column
        fields (records of one line in the cache's order): Excel adds them so, and a total's
        last digits depend on it (a grand total of twelve cities' longitudes, 845.6000000000001)."""
        keys = []
        for f in self.row_fields + self.col_fields:
            codes = self.cache.fields[f].codes if 0 <= f < len(self.cache.fields) else None
            if codes is None:
                continue
            place = np.full(len(self.cache.fields[f].items) + 1, len(self.fields[f].items), dtype=np.int64)
            for k, item in enumerate(self.fields[f].items):
                if item.cache_index is not None and 0 <= item.cache_index < len(place) - 1:
                    place[item.cache_index] = k
            keys.append(place[codes[chosen]])  # an unknown index (-1) sorts last
        return chosen[np.lexsort(keys[::-1])] if keys else chosen


def summarise(how: str, values: list[object]) -> object:
    """The data field's summary of the records' values: an error among them is the result;
    count counts every value, countNums and the rest only the numbers.

    >>> summarise("average", [1.0, "x", 4.0]), summarise("count", [1.0, "x", None]), summarise("stdDev", [2.0]).code
    (2.5, 2.0, '#DIV/0!')
    """
    for v in values:
        if type(v) is CellError:
            return v
    if how == "count":
        return float(sum(v is not None for v in values))
    numbers = [v for v in values if type(v) is float]
    if how == "countNums":
        return float(len(numbers))
    if how == "sum":
        return float(sum(numbers))
    if how in ("max", "min"):
        return (max if how == "max" else min)(numbers) if numbers else 0.0
    if how == "product":
        return math.prod(numbers) if numbers else 0.0
    least = 1 if how in ("average", "stdDevp", "varp") else 2
    if len(numbers) < least:
        return CellError(DIV0, f"{how} of {len(numbers)} number(s)")
    mean = sum(numbers) / len(numbers)
    if how == "average":
        return mean
    var = sum((x - mean) ** 2 for x in numbers) / (len(numbers) - (least == 2))
    return math.sqrt(var) if how.startswith("stdDev") else var


def _matches(item: object, value: object, caption: str | None) -> bool:
    """Whether a GETPIVOTDATA item names a cache value (shown with ``caption`` if given)."""
    t = type(item)
    if t is str:
        key = fold(item)
        if caption is not None and fold(caption) == key:
            return True
        if type(value) is str:
            return fold(value) == key
        if type(value) is float:
            return format_number(value) == item.strip()
        if type(value) is bool:
            return key == ("true" if value else "false")
        return value is None and key == "(blank)"
    if t is float or t is int:
        return type(value) is float and value == float(item)
    if t is bool:
        return type(value) is bool and value == item
    return False


def _shown_text(item: object) -> str:
    return repr(item) if type(item) is str else format_number(item) if type(item) is float else str(item)


def _children(el: Element, local: str) -> list[Element]:
    return [c for c in el if _local(c.tag) == local]


def _first(el: Element, local: str) -> Element | None:
    return next(iter(_children(el, local)), None)


def _axis_fields(root: Element, local: str) -> list[int]:
    block = _first(root, local)
    return [] if block is None else [_index(f.get("x"), -1) for f in _children(block, "field")]


def _lines(root: Element, local: str, axis: list[int], fields: list[PivotField]) -> set | None:
    """The lines an axis shows values on, each as (its fields' cache items, the data field
    or None when the data fields are not on this axis); None when the table does not list
    them (every combination then counts as shown)."""
    block = _first(root, local)
    if block is None:
        return None if axis else {(frozenset(), None)}
    data_here = -2 in axis
    out: set = set()
    previous: list[int] = []
    for line in _children(block, "i"):
        kind = line.get("t", _DATA_ROW)
        now = previous[:_index(line.get("r"))] + [_index(x.get("v")) for x in _children(line, "x")]
        previous = now
        depth = len(now) if kind != "grand" else 0
        if kind not in (_DATA_ROW, "default", "grand") or depth > len(axis):
            continue
        items, data = [], _index(line.get("i")) if data_here else None
        for place, v in enumerate(now[:depth]):
            f = axis[place]
            if f == -2:
                data = v
            elif v != NO_ITEM and 0 <= f < len(fields):
                items.append((f, fields[f].cache_index(v)))
        if kind == _DATA_ROW and depth < len(axis):  # an item's first line: its subtotal, if shown there
            outer = axis[depth - 1] if depth else -2
            deeper_data = data_here and axis.index(-2) >= depth
            if outer == -2 or deeper_data or not (0 <= outer < len(fields) and fields[outer].subtotal_top):
                continue
        out.add((frozenset(items), data))
    return out


def read_pivot(root: Element, sheet: int, cache: Cache) -> PivotTable | None:
    """The pivot table a pivot table part describes, over ``cache`` (None without a location)."""
    location = _first(root, "location")
    where = area(location.get("ref", "")) if location is not None else None
    if where is None:
        return None
    fields = []
    block = _first(root, "pivotFields")
    for el in _children(block, "pivotField") if block is not None else []:
        items_block = _first(el, "items")
        items = [PivotItem(_index(i.get("x")) if i.get("t", _DATA_ROW) == _DATA_ROW else None,
                           _flag(i.get("h"), False), i.get("n")) for i in
                 (_children(items_block, "item") if items_block is not None else [])]
        top = _flag(el.get("defaultSubtotal"), True) and _flag(el.get("subtotalTop"), True) and _flag(el.get("outline"),
                                                                                                       True)
        fields.append(PivotField(el.get("axis"), el.get("name"), items, top))
    fields = (fields + [PivotField(None, None, [], True) for _ in range(len(cache.fields) - len(fields))])[
        :len(cache.fields)]  # one per cache field, as the format requires
    data_fields = []
    block = _first(root, "dataFields")
    for el in _children(block, "dataField") if block is not None else []:
        data_fields.append(DataField(el.get("name", ""), _index(el.get("fld"), -1), el.get("subtotal", "sum"),
                                     el.get("showDataAs", "normal")))
    pages: dict[int, int | None] = {}
    block = _first(root, "pageFields")
    for el in _children(block, "pageField") if block is not None else []:
        f = _index(el.get("fld"), -1)
        if 0 <= f < len(fields):
            chosen = el.get("item")
            pages[f] = fields[f].cache_index(_index(chosen)) if chosen is not None else None
    rows, cols = _axis_fields(root, "rowFields"), _axis_fields(root, "colFields")
    lines = {"row": _lines(root, "rowItems", rows, fields), "col": _lines(root, "colItems", cols, fields)}
    return PivotTable(root.get("name", ""), sheet, Area(where.r1, where.c1, where.r2, where.c2), cache, fields,
                      data_fields, rows, cols, pages, lines)


def pivot_at(tables: Iterable[PivotTable], sheet: int, where: Area) -> PivotTable | None:
    """The pivot table a reference meets (the last in the file when it meets several)."""
    found = None
    for t in tables:
        if t.sheet == sheet and t.area.meets(where):
            found = t
    return found
