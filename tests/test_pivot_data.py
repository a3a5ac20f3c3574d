"""GETPIVOTDATA computed from a workbook's pivot cache.

The workbooks built here hold a pivot table written as raw parts (ECMA-376 Part 1, 18.10:
pivot table definition, cache definition, cache records). Their records are the twelve
cities of the Apache POI test workbook DataTableCities.xlsx (its pivot cache: city,
latitude, longitude, population), and the expected values are the cells Excel stored in
that workbook's pivot table (sheet "PivotTable", B5:E18), or, for the rules of Microsoft's
GETPIVOTDATA page ("Microsoft Support, GETPIVOTDATA function": several items of a field
in braces are added together; an item may come from a cell; a field or item the table does
not show, or a report filter that does not show the item, is #REF!; a date item is given as
its serial number, March 5, 1999 as 36224 or DATE(1999,3,5)), sums of those stored cells.

The reference workbooks themselves (../shared/excel-reference) are checked when present, as
in tests/test_conformance.py: the one GETPIVOTDATA cell Excel computed (POI's 54436.xlsx) and
every value line of two more pivot tables against the cells Excel wrote for them.
"""

from __future__ import annotations

import statistics
import zipfile
from pathlib import Path
from xml.sax.saxutils import escape, quoteattr

import pytest

from cellfuncs.errors import CellError
from cellfuncs.workbook import conformance
from cellfuncs.workbook.model import load
from cellfuncs.workbook.package import Package
from cellfuncs.workbook.pivots import MAX_CACHE_VALUES
from cellfuncs.workbook.recalc import recalc_file
from cellfuncs.workbook.refs import area
from reference_set import reference_workbook

MAIN = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'
RELS = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
PKG = 'xmlns="http://schemas.openxmlformats.org/package/2006/relationships"'
TYPES = "application/vnd.openxmlformats-"

# The cache of DataTableCities.xlsx (xl/pivotCache/pivotCacheRecords1.xml): city, latitude,
# longitude (as the cache stores them), population; in the cache's order
CITIES = [
    ("Shanghai, China", 31.23, 121.5, 24256800), ("Karachi, Pakistan", 24.86, 67.010000000000005, 23500000),
    ("Beijing, China", 39.93, 116.4, 21516000), ("São Paulo, Brazil", -23.53, -46.63, 21292900),
    ("Delhi, India", 28.67, 77.209999999999994, 16788000), ("Lagos, Nigeria", 6.45, 3.47, 16060000),
    ("Istanbul, Turkey", 41.1, 29.0, 14657000), ("Tokyo, Japan", 35.67, 139.80000000000001, 13298000),
    ("Mumbai, India", 18.96, 72.819999999999993, 12478000), ("Moscow, Russia", 55.75, 37.619999999999997, 12198000),
    ("Guangzhou, China", 23.12, 113.3, 12081000), ("Shenzhen, China", 22.55, 114.1, 10780000),
]
# The order the pivot table shows the cities in: its pivotField's items (xl/pivotTables/pivotTable1.xml)
SHOWN = [2, 4, 10, 6, 1, 5, 9, 8, 3, 0, 11, 7]
# Excel's stored values in DataTableCities.xlsx, sheet PivotTable: the Grand Total line (C18:E18)
# and the Tokyo line (C17:E17)
GRAND = {"Sum of Latitude": 304.76, "Sum of Longitude": 845.6000000000001, "Sum of Population": 198905700.0}
TOKYO = {"Sum of Latitude": 35.67, "Sum of Longitude": 139.8, "Sum of Population": 13298000.0}


def _country(k: int) -> str:
    return CITIES[k][0].split(", ")[1]


COUNTRIES = sorted({_country(k) for k in range(len(CITIES))})


def _cell(ref: str, value: object) -> str:
    if isinstance(value, str) and value.startswith("="):
        return f"<c r={quoteattr(ref)}><f>{escape(value[1:])}</f></c>"
    if isinstance(value, str):
        return f'<c r={quoteattr(ref)} t="inlineStr"><is><t>{escape(value)}</t></is></c>'
    return f"<c r={quoteattr(ref)}><v>{value!r}</v></c>"


def _sheet(cells: dict[str, object]) -> str:
    rows: dict[int, list[tuple[int, str]]] = {}
    for ref, value in cells.items():
        a = area(ref)
        rows.setdefault(a.r1, []).append((a.c1, _cell(ref, value)))
    body = "".join(f'<row r="{r}">{"".join(x for _, x in sorted(rows[r]))}</row>' for r in sorted(rows))
    return f"<worksheet {MAIN}><sheetData>{body}</sheetData></worksheet>"


def _rels(*targets: tuple[str, str]) -> str:
    """A relationships part: (type, target) pairs, numbered rId1, rId2, ..."""
    rels = "".join(f'<Relationship Id="rId{n}" Type="{RELS}/{kind}" Target="{target}"/>'
                   for n, (kind, target) in enumerate(targets, start=1))
    return f"<Relationships {PKG}>{rels}</Relationships>"


def _pivot_field(items: list[int] | None, axis: str | None = None, hidden: set[int] = frozenset(),
                 data: bool = False) -> str:
    attrs = (f' axis="{axis}"' if axis else "") + (' dataField="1"' if data else "")
    if items is None:
        return f"<pivotField{attrs}/>"
    listed = "".join(f'<item x="{x}"' + (' h="1"' if x in hidden else "") + "/>" for x in items)
    return f'<pivotField{attrs}><items>{listed}<item t="default"/></items></pivotField>'


def _lines(tag: str, shown: list[int], grand: bool = True) -> str:
    """An axis of one field listing pivotField items ``shown`` (then the grand total)."""
    lines = "".join(f'<i><x v="{v}"/></i>' for v in shown) + ('<i t="grand"><x/></i>' if grand else "")
    return f"<{tag}>{lines}</{tag}>"


def cities_book(tmp_path: Path, cells: dict[str, object], subtotal: str = "sum", hidden: set[int] = frozenset(),
                page: str | None = None, extra_field: str = "", extra_records: list[str] | None = None) -> Path:
    """A workbook whose pivot table at B5:E18 has the cities on the rows (in the reference
    workbook's order, the cities of ``hidden`` hidden), the country as a report filter
    showing ``page`` (None: all), and the sums (or ``subtotal``) of latitude, longitude and
    population as its data fields; ``cells`` are the sheet's other cells."""
    names = [c[0] for c in CITIES]
    shared = "".join(f"<s v={quoteattr(n)}/>" for n in names)
    countries = "".join(f"<s v={quoteattr(c)}/>" for c in COUNTRIES)
    fields = (f'<cacheField name="City"><sharedItems>{shared}</sharedItems></cacheField>'
              '<cacheField name="Latitude"><sharedItems/></cacheField><cacheField name="Longitude"><sharedItems/>'
              '</cacheField><cacheField name="Population"><sharedItems/></cacheField>'
              f'<cacheField name="Country"><sharedItems>{countries}</sharedItems></cacheField>{extra_field}')
    records = extra_records or [""] * len(CITIES)
    rows = "".join(f'<r><x v="{k}"/><n v="{lat!r}"/><n v="{lon!r}"/><n v="{pop}"/>'
                   f'<x v="{COUNTRIES.index(_country(k))}"/>{records[k]}</r>'
                   for k, (_, lat, lon, pop) in enumerate(CITIES))
    chosen = None if page is None else COUNTRIES.index(page)
    shown = [k for k in SHOWN if k not in hidden and (page is None or _country(k) == page)]
    extra_pivot = "<pivotField/>" if extra_field else ""
    pivot = (f'<pivotTableDefinition {MAIN} name="Cities" cacheId="1"><location ref="B5:E18" firstHeaderRow="0" '
             f'firstDataRow="1" firstDataCol="1"/><pivotFields>{_pivot_field(SHOWN, "axisRow", hidden)}'
             f'{_pivot_field(None, data=True)}{_pivot_field(None, data=True)}{_pivot_field(None, data=True)}'
             f'{_pivot_field(list(range(len(COUNTRIES))), "axisPage")}{extra_pivot}</pivotFields>'
             f'<rowFields><field x="0"/></rowFields>{_lines("rowItems", [SHOWN.index(k) for k in shown])}'
             '<colFields><field x="-2"/></colFields><colItems><i><x/></i><i i="1"><x v="1"/></i><i i="2"><x v="2"/></i>'
             '</colItems><pageFields><pageField fld="4"' + ("" if chosen is None else f' item="{chosen}"') +
             ' hier="-1"/></pageFields><dataFields>'
             + "".join(f'<dataField name="{"Sum" if subtotal == "sum" else subtotal} of {n}" fld="{f}" '
                       f'subtotal="{subtotal}"/>' for f, n in ((1, "Latitude"), (2, "Longitude"), (3, "Population")))
             + "</dataFields></pivotTableDefinition>")
    parts = {
        "[Content_Types].xml": '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
                               f'<Default Extension="rels" ContentType="{TYPES}package.relationships+xml"/>'
                               '<Default Extension="xml" ContentType="application/xml"/><Override '
                               'PartName="/xl/workbook.xml" '
                               f'ContentType="{TYPES}officedocument.spreadsheetml.sheet.main+xml"/></Types>',
        "_rels/.rels": _rels(("officeDocument", "xl/workbook.xml")),
        "xl/workbook.xml": f'<workbook {MAIN} xmlns:r="{RELS}"><sheets><sheet name="S" sheetId="1" r:id="rId1"/>'
                           '</sheets><pivotCaches><pivotCache cacheId="1" r:id="rId2"/></pivotCaches></workbook>',
        "xl/_rels/workbook.xml.rels": _rels(("worksheet", "worksheets/sheet1.xml"),
                                            ("pivotCacheDefinition", "pivotCache/pivotCacheDefinition1.xml")),
        "xl/worksheets/sheet1.xml": _sheet(cells),
        "xl/worksheets/_rels/sheet1.xml.rels": _rels(("pivotTable", "../pivotTables/pivotTable1.xml")),
        "xl/pivotTables/pivotTable1.xml": pivot,
        "xl/pivotTables/_rels/pivotTable1.xml.rels": _rels(("pivotCacheDefinition",
                                                            "../pivotCache/pivotCacheDefinition1.xml")),
        "xl/pivotCache/pivotCacheDefinition1.xml": f'<pivotCacheDefinition {MAIN} xmlns:r="{RELS}" r:id="rId1" '
                                                   f'recordCount="{len(CITIES)}"><cacheSource type="worksheet">'
                                                   '<worksheetSource name="BigCity"/></cacheSource>'
                                                   f'<cacheFields>{fields}</cacheFields></pivotCacheDefinition>',
        "xl/pivotCache/_rels/pivotCacheDefinition1.xml.rels": _rels(("pivotCacheRecords", "pivotCacheRecords1.xml")),
        "xl/pivotCache/pivotCacheRecords1.xml": f'<pivotCacheRecords {MAIN} count="{len(CITIES)}">{rows}'
                                                "</pivotCacheRecords>",
    }
    path = tmp_path / "pivot.xlsx"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for name, text in parts.items():
            z.writestr(name, text.encode("utf-8"))
    return path


def computed(path: Path) -> dict[str, object]:
    """Every formula cell's recalculated value, by A1 address."""
    _, engine = conformance.recalculated(path)
    return {engine.where(fi).split("!")[-1]: engine.result[fi] for fi in range(len(engine.cells))}


def code(v: object) -> str | None:
    return v.code if type(v) is CellError else None


def test_totals_and_lines_as_excel_stored_them(tmp_path):
    cells = {f"G{n}": f'=GETPIVOTDATA("{name}",$B$5)' for n, name in enumerate(GRAND, start=1)}
    cells |= {f"H{n}": f'=GETPIVOTDATA("{name}",$C$9,"City","Tokyo, Japan")' for n, name in enumerate(TOKYO, start=1)}
    got = computed(cities_book(tmp_path, cells))
    # Excel's stored Grand Total line, to the last digit: the records are added in the order
    # the table shows the cities (added in the cache's order the longitudes give 845.5999999999999)
    assert [got[f"G{n}"] for n in (1, 2, 3)] == list(GRAND.values())
    assert [got[f"H{n}"] for n in (1, 2, 3)] == pytest.approx(list(TOKYO.values()), rel=1e-15)


def test_names_of_the_data_field_and_items(tmp_path):
    cells = {"G1": '=GETPIVOTDATA("Population",B5)',  # the source field's name for "Sum of Population"
             "G2": '=GETPIVOTDATA("sum of population",E18,"city","TOKYO, JAPAN")',  # names ignore case
             "G3": '=GETPIVOTDATA("Sum of Population",B5,"City",{"Tokyo, Japan","Delhi, India"})',  # added together
             "G4": '=GETPIVOTDATA("Sum of Population",B5,"City",A20)', "A20": "Delhi, India",  # an item from a cell
             "G5": '=GETPIVOTDATA("Sum of Population",B5:Z99,"City","Delhi, India")'}  # a range meeting the table
    got = computed(cities_book(tmp_path, cells))
    assert got["G1"] == GRAND["Sum of Population"] and got["G2"] == TOKYO["Sum of Population"]
    # Excel's stored values: Tokyo (E17) 13,298,000 and Delhi (E7) 16,788,000
    assert got["G3"] == 13298000.0 + 16788000.0
    assert got["G4"] == got["G5"] == 16788000.0


def test_ref_where_the_table_shows_nothing(tmp_path):
    cells = {"G1": '=GETPIVOTDATA("Sum of Population",A1)',  # no pivot table there
             "G2": '=GETPIVOTDATA("Sum of Area",B5)',  # no such data field
             "G3": '=GETPIVOTDATA("Sum of Population",B5,"Mayor","x")',  # no such field
             "G4": '=GETPIVOTDATA("Sum of Population",B5,"City","Atlantis")',  # no such item
             "G5": '=GETPIVOTDATA("Sum of Population",B5,"Latitude",35.67)',  # a field not on an axis
             "G6": '=GETPIVOTDATA("Sum of Population",B5,"Country","Japan")',  # the filter shows all countries
             "G7": '=GETPIVOTDATA("Sum of Population",B5,"City")',  # a field without its item
             "G8": '=GETPIVOTDATA("Sum of Population",B5,"City","Lagos, Nigeria")'}  # hidden
    got = computed(cities_book(tmp_path, cells, hidden={5}))
    assert {ref: code(v) for ref, v in got.items()} == {f"G{n}": "#REF!" for n in range(1, 9)}


def test_hidden_items_and_report_filter(tmp_path):
    cells = {"G1": '=GETPIVOTDATA("Sum of Population",B5)',
             "G2": '=GETPIVOTDATA("Sum of Population",B5,"Country","China")',
             "G3": '=GETPIVOTDATA("Sum of Population",B5,"Country","India")',
             "G4": '=GETPIVOTDATA("Sum of Population",B5,"City","Tokyo, Japan")',
             "G5": '=GETPIVOTDATA("Sum of Population",B5,"City","Beijing, China","Country","China")'}
    got = computed(cities_book(tmp_path, cells, page="China", hidden={11}))
    # the Chinese cities' populations Excel stored (E10, E6, E8) less hidden Shenzhen (E16)
    assert got["G1"] == got["G2"] == 24256800.0 + 21516000.0 + 12081000.0
    assert code(got["G3"]) == code(got["G4"]) == "#REF!"  # India not shown; Tokyo not among the lines
    assert got["G5"] == 21516000.0


TWO = ',"City",{"Tokyo, Japan","Delhi, India"}'  # Excel's stored populations E17 and E7


@pytest.mark.parametrize("subtotal, pairs, expected", [
    ("count", "", 12.0), ("countNums", "", 12.0), ("max", "", 24256800.0), ("min", "", 10780000.0),
    ("average", "", 198905700.0 / 12), ("product", TWO, 13298000.0 * 16788000.0),
    # the definitions (sample and population) applied to Excel's stored populations
    ("stdDev", "", statistics.stdev(c[3] for c in CITIES)), ("stdDevp", "", statistics.pstdev(c[3] for c in CITIES)),
    ("var", "", statistics.variance(c[3] for c in CITIES)), ("varp", "", statistics.pvariance(c[3] for c in CITIES)),
    ("stdDev", ',"City","Tokyo, Japan"', CellError("#DIV/0!")),  # a sample of one
])
def test_summaries_the_data_field_names(tmp_path, subtotal, pairs, expected):
    got = computed(cities_book(tmp_path, {"G1": f'=GETPIVOTDATA("{subtotal} of Population",B5{pairs})'},
                               subtotal=subtotal))["G1"]
    if type(expected) is CellError:
        assert code(got) == expected.code
    else:
        assert got == pytest.approx(expected, rel=1e-13)


def test_date_items_by_serial_number(tmp_path):
    # Microsoft's page: the date March 5, 1999 is the item 36224 or DATE(1999,3,5)
    field = '<cacheField name="Day"><sharedItems><d v="1999-03-05T00:00:00"/><d v="1999-03-06T00:00:00"/>' \
            "</sharedItems></cacheField>"
    days = ['<x v="0"/>' if k == SHOWN[0] else '<x v="1"/>' for k in range(len(CITIES))]
    path = cities_book(tmp_path, {"G1": '=GETPIVOTDATA("Sum of Population",B5,"Day",36224)',
                                  "G2": '=GETPIVOTDATA("Sum of Population",B5,"Day",DATE(1999,3,5))'},
                       extra_field=field, extra_records=days)
    text = zipfile.ZipFile(path).read("xl/pivotTables/pivotTable1.xml").decode()
    text = text.replace("<pivotField/></pivotFields>", '<pivotField axis="axisPage"><items><item x="0"/><item x="1"/>'
                                                        '<item t="default"/></items></pivotField></pivotFields>')
    text = text.replace("</pageFields>", '<pageField fld="5" item="0" hier="-1"/></pageFields>')
    parts = {n: zipfile.ZipFile(path).read(n) for n in zipfile.ZipFile(path).namelist()}
    parts["xl/pivotTables/pivotTable1.xml"] = text.encode()
    with zipfile.ZipFile(path, "w") as z:
        for n, data in parts.items():
            z.writestr(n, data)
    got = computed(path)
    assert got["G1"] == got["G2"] == 21516000.0  # the first city shown, Beijing (E6)


def test_a_cache_over_the_limit_gives_its_error(tmp_path, monkeypatch):
    from cellfuncs.workbook import pivots

    monkeypatch.setattr(pivots, "MAX_CACHE_VALUES", 20)
    got = computed(cities_book(tmp_path, {"G1": '=GETPIVOTDATA("Sum of Population",B5)'}))
    assert code(got["G1"]) == "#NUM!" and "20" in got["G1"].reason
    assert MAX_CACHE_VALUES >= 4 * 2**20


# ---------------------------------------------------------------- the reference workbooks


def _reference(name: str) -> Path:
    return reference_workbook(name)


def test_reference_cell_54436():
    # poi/54436.xlsx, Sheet1!A14: =GETPIVOTDATA("Sum of Score",A8,"Category","Category 1"), Excel's value 3
    path = _reference("poi/test-data_spreadsheet_54436.xlsx")
    outcome = recalc_file(str(path), check=True)
    assert outcome.cells == 1 and outcome.differences == [] and not outcome.errors
    assert computed(path) == {"A14": 3.0}


def _stored(path: Path, sheet: str) -> tuple[object, dict[tuple[int, int], object]]:
    pkg = Package(str(path))
    try:
        book = load(pkg)
    finally:
        pkg.close()
    return book, book.sheet(sheet).scan.values


def test_reference_pivot_lines_of_three_row_fields():
    # ironcalc/example.xlsx, Sheet4, A3:B13: Cars, Make and Other on the rows, Sum of Year;
    # each line's stored value against GETPIVOTDATA with the items of that line
    book, values = _stored(_reference("ironcalc/bindings_nodejs_example.xlsx"), "Sheet4")
    table = book.pivots[0]
    lines = {4: [("Cars", "C6")], 5: [("Cars", "C6"), ("Make", "Citroen")],
             6: [("Cars", "C6"), ("Make", "Citroen"), ("Other", "A")], 7: [("Cars", "MB")],
             8: [("Cars", "MB"), ("Make", "Mercedes")], 9: [("Cars", "MB"), ("Make", "Mercedes"), ("Other", "B")],
             10: [("Cars", "R5")], 11: [("Cars", "R5"), ("Make", "Renault")],
             12: [("Cars", "R5"), ("Make", "Renault"), ("Other", "A")], 13: []}
    for row, pairs in lines.items():
        assert table.value("Sum of Year", pairs) == values[(row, 2)], row
    # no line shows a make across cars, nor Citroen's MB
    assert code(table.value("Sum of Year", [("Make", "Citroen")])) == "#REF!"
    assert code(table.value("Sum of Year", [("Cars", "MB"), ("Make", "Citroen")])) == "#REF!"


def test_reference_pivot_of_three_data_fields():
    # poi/DataTableCities.xlsx, sheet PivotTable, B5:E18: every stored value line by line
    book, values = _stored(_reference("poi/test-data_spreadsheet_DataTableCities.xlsx"), "PivotTable")
    table = book.pivots[0]
    for row in range(6, 19):
        city = values[(row, 2)]
        pairs = [] if city == "Grand Total" else [("City", city)]
        for col, name in zip((3, 4, 5), GRAND):
            assert table.value(name, pairs) == values[(row, col)], (row, col)
