"""The worksheet scan read from the bytes (cellfuncs/workbook/sheetfast.py) against the full
parser target (cellfuncs/workbook/sheetxml.py, expat through defusedxml): the same SheetScan
field by field, spans included, the same refusals, the same formula budget left.

The oracles: the XML 1.0 recommendation (W3C, fifth edition) for what a conforming parser
reports (section 2.11, end-of-line handling; 3.3.3, attribute-value normalisation; 4.1 and
4.6, character references and the predefined entities, these two section numbers from
memory), checked through expat itself, which the full parser is; and the worksheets of the
Excel reference set (../shared/excel-reference, see its README.md), every one of them read
both ways. Without that folder its test is skipped with the reason, except under CI=true,
where it fails.
"""

from __future__ import annotations

import dataclasses

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cellfuncs.errors import CellError
from cellfuncs.workbook import model, sheetfast, sheetxml
from cellfuncs.workbook.package import Package, Refused
from reference_set import reference_folder

FAST = sheetfast.scan_fast
MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
PART = "xl/worksheets/sheet1.xml"
STRINGS = ["zero", "one"]


def _full(data: bytes, part: str, budget: list[int], strings: list[str] | None, rich: dict | None):
    """The full parser target alone (the fast path switched off for this call)."""
    saved = sheetfast.scan_fast
    sheetfast.scan_fast = lambda *_: None
    try:
        return sheetxml.scan(data, part, budget, strings, rich)
    finally:
        sheetfast.scan_fast = saved


def _fast(data: bytes, part: str, budget: list[int], strings: list[str] | None, rich: dict | None):
    return FAST(data, part, budget, strings or [], rich or {})


def _outcome(read, data: bytes, part: str, left: int, strings, rich):
    """(the scan or the refusal's text, the formula budget left)."""
    budget = [left]
    try:
        return read(data, part, budget, strings, rich), budget[0]
    except Refused as exc:
        return f"refused: {exc}", budget[0]


def _fields(outcome) -> dict:
    """What is compared: every field of the scan (or the refusal) and the budget left."""
    found, left = outcome
    if not isinstance(found, sheetxml.SheetScan):
        return {"refusal": found, "budget": left}
    out = {"budget": left}
    for f in dataclasses.fields(found):
        value = getattr(found, f.name)
        out[f.name] = sorted(value) if isinstance(value, set) else repr(value)  # repr: True and 1.0 differ
    return out


def both(data: bytes, left: int = 1000, strings: list[str] | None = None, rich: dict | None = None,
         part: str = PART) -> bool:
    """Read ``data`` both ways and assert they agree field by field (or refuse alike); whether the
    fast path read it (or refused it) itself."""
    full = _outcome(_full, data, part, left, strings, rich)
    fast = _outcome(_fast, data, part, left, strings, rich)
    if fast[0] is None:  # not taken: nothing may be used up of the budget, and scan() gives the full parser's
        assert fast[1] == left
        assert _fields(_outcome(sheetxml.scan, data, part, left, strings, rich)) == _fields(full)
        return False
    assert _fields(fast) == _fields(full)
    return True


def sheet(rows: bytes, head: bytes = b"", tail: bytes = b"", root: bytes = b"") -> bytes:
    return (b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<worksheet xmlns="' + MAIN.encode() + b'"' + root
            + b">" + head + b"<sheetData>" + rows + b"</sheetData>" + tail + b"</worksheet>")


def scanned(data: bytes, **kw) -> sheetxml.SheetScan:
    assert both(data, **kw), "the fast path was expected to take this part"
    return FAST(data, PART, [1000], kw.get("strings") or [], kw.get("rich") or {})


# --- what a conforming parser reports (XML 1.0, fifth edition) --------------------------------


def test_predefined_entities_and_character_references_are_decoded():
    # XML 1.0 section 4.6: lt gt amp quot apos; section 4.1: decimal and hexadecimal references
    s = scanned(sheet(b'<row r="1"><c r="A1" t="str"><f>"&lt;&gt;&amp;&quot;&apos;&#65;&#x42;&#x1F600;"</f>'
                      b"<v>&#x263A;&amp;</v></c></row>"))
    assert s.formulas[(1, 1)].text == '"<>&"\'AB\U0001F600"'
    assert s.formulas[(1, 1)].cached == "\u263a&"


def test_line_ends_in_text_are_normalised_but_a_character_reference_is_kept():
    # XML 1.0 section 2.11: \r\n and a lone \r become \n before parsing; &#13; is a reference, kept
    s = scanned(sheet(b'<row r="1"><c r="A1" t="str"><f>1+\r\n2+\r3&#13;</f><v>a\r\nb</v></c></row>'))
    assert s.formulas[(1, 1)].text == "1+\n2+\n3\r" and s.formulas[(1, 1)].cached == "a\nb"


def test_attribute_values_are_normalised():
    # XML 1.0 section 3.3.3: each literal tab, line feed and carriage return (after 2.11) becomes a space;
    # references to them are kept; a ">" inside a quoted value is text
    s = scanned(sheet(b'<row r="1"><c r="A1" cm="a\tb\r\nc\rd&#10;e&#9;&gt;>"><f>1</f></c></row>'))
    assert s.formulas[(1, 1)].cm == "a b c d\ne\t>>"


def test_single_quotes_odd_spacing_and_text_between_elements():
    assert both(sheet(b"<row r='1' >\n  <c  r = 'A1'   t='s' ><v >1</v ></c >\n  <c r=\"B1\"\t>"
               b"<f t='shared' ref='B1:B2' si='0' >A1</f\n><v>2</v></c></row>"
               b"<row r='2'>x<c r='B2'>y<f t='shared' si='0'/>z</c>w</row>"),
         strings=STRINGS)
    s = scanned(sheet(b"<row r='1'><c r='A1' t='s'><v>1</v></c></row>"), strings=STRINGS)
    assert s.values == {(1, 1): "one"}


def test_cells_without_references_and_self_closing_elements():
    rows = (b'<row><c><v>1</v></c><c t="str"><v>x</v></c><c/></row><row r="5"/><row r="7" hidden="1">'
            b'<c r="C7" s="1"/><c><f/><v/></c><c><f></f><v></v></c></row>'
            b'<row><c r="B9"><v>2</v></c><c><v>3</v></c></row>')
    s = scanned(sheet(rows))
    # a cell's reference does not move the row: the cell after B9 is C8, in the eighth row element
    assert s.values == {(1, 1): 1.0, (1, 2): "x", (9, 2): 2.0, (8, 3): 3.0} and s.hidden_rows == {7}
    assert set(s.formulas) == {(7, 4), (7, 5)}


def test_inline_strings_with_rich_text_and_phonetic_runs():
    # the phonetic run (rPh) is left out of the text; xml:space is an attribute with a prefix
    rows = (b'<row r="1"><c r="A1" t="inlineStr"><is><r><rPr><b/><sz val="11"/></rPr><t>Bold</t></r>'
            b'<r><t xml:space="preserve"> plain&amp;</t></r><rPh sb="0" eb="1"><t>\xe3\x81\xb5\xe3\x82\x8a</t></rPh>'
            b'<phoneticPr fontId="1"/></is></c><c r="B1" t="inlineStr"><is><t>a\r\nb</t></is></c></row>')
    s = scanned(sheet(rows))
    assert s.values == {(1, 1): "Bold plain&", (1, 2): "a\nb"}


def test_other_children_of_a_cell_in_the_main_namespace_keep_their_spans():
    data = sheet(b'<row r="1"><c r="A1"><v>1</v><extLst><ext uri="{X}"><a/></ext></extLst></c>'
                 b'<c r="B1"><v>2</v><f>A1</f></c><c r="C1"><v>1</v><v>2</v></c></row>')
    s = scanned(data)
    extra = s.cells[(1, 1)].extra
    assert len(extra) == 1 and data[extra[0].start:extra[0].end(data)].startswith(b"<extLst>")


def test_xstring_escapes_and_rich_value_errors_as_the_full_parser_reads_them():
    rows = (b'<row r="1"><c r="A1" t="str"><f>"_x000D__x005F_x0001_"</f><v>_x0001_</v></c>'
            b'<c r="B1" t="e" vm="1"><v>#VALUE!</v></c><c r="C1" t="e"><f>1/0</f><v>#DIV/0!</v></c></row>')
    assert both(sheet(rows), rich={"1": CellError("#SPILL!", "a rich value")})


def test_references_excel_does_not_write_follow_the_full_rules():
    assert both(sheet(b'<row r="1"><c r="a1"><v>1</v></c><c r="$B$1"><v>2</v></c><c r="C01"><v>3</v></c>'
               b'<c r="XFD1048576"><v>4</v></c></row>'))


def test_numbers_errors_and_types():
    rows = (b'<row r="1"><c r="A1"><v> 1e999 </v></c><c r="B1"><v>NaN</v></c><c r="C1" t="b"><v>1</v></c>'
            b'<c r="D1" t="e"><v>#N/A</v></c><c r="E1" t="d"><v>2024-01-01</v></c><c r="F1"><v> </v></c></row>')
    s = scanned(sheet(rows))
    assert s.not_finite == [(1, 1), (1, 2)] and s.values[(1, 3)] is True


def test_outside_sheet_data_dimension_and_filter_are_read_by_the_full_target():
    head = b'<sheetPr><outlinePr summaryBelow="1"/></sheetPr><dimension ref="A1:C3"/>'
    tail = b'<autoFilter ref="A1:C3"><filterColumn colId="0"/></autoFilter><mergeCells count="0"/>'
    s = scanned(sheet(b'<row r="1"><c r="A1"><v>1</v></c></row>', head, tail))
    assert s.filter_area == "A1:C3" and s.dimension[1] == "A1:C3"
    late = scanned(sheet(b'<row r="1"><c r="A1"><v>1</v></c></row>', b"", b'<dimension ref="A1"/>'))
    data = sheet(b'<row r="1"><c r="A1"><v>1</v></c></row>', b"", b'<dimension ref="A1"/>')
    assert data[late.dimension[0]:].startswith(b"<dimension")
    assert data[late.sheet_data.close:].startswith(b"</sheetData>")


def test_multibyte_text_a_byte_order_mark_and_a_prefix_declared_on_the_root():
    assert both(b"\xef\xbb\xbf" + sheet(b'<row r="1"><c r="A1" t="str" x14:q="1"><f>"\xc3\xa9\xf0\x9f\x98\x80"</f></c></row>',
                                 root=b' xmlns:x14="urn:x"'))
    assert both(sheet(b"", b"", b"").replace(b"<sheetData></sheetData>", b"<sheetData/>")) is False


# pieces of a worksheet's content, each well-formed, joined at random (they need not make sense)
_SPACE = st.sampled_from([b"", b" ", b"\r\n", b"\t", b"\n  "])
_TEXT = st.sampled_from([b"", b"1", b"2.5", b" 1e999", b"x&amp;y", b"a\r\nb\rc", b"&#13;&#x9;", b"_x000D__x005F_",
                         b"\xc3\xa9", b"#N/A", b"0"])
_ODD = (b"x\ty\r\nz&#10;", b"&quot;1&quot;", b"0", b"s")  # now and then a value no cell holds


def _values(*values: bytes) -> st.SearchStrategy[bytes]:
    return st.sampled_from(values * 8 + _ODD)


@st.composite
def _attribute(draw, names: dict[bytes, st.SearchStrategy[bytes]]) -> bytes:
    name = draw(st.sampled_from(sorted(names)))
    quote = draw(st.sampled_from([b'"', b"'"]))
    return b" " + name + draw(_SPACE) + b"=" + draw(_SPACE) + quote + draw(names[name]) + quote


def _tag(name: bytes, names: dict[bytes, st.SearchStrategy[bytes]], inner) -> st.SearchStrategy[bytes]:
    attrs = st.lists(_attribute(names), max_size=3, unique_by=lambda a: a.split(b"=")[0].strip())
    return st.builds(lambda a, sp, body: b"<" + name + b"".join(a) + sp + (b">" + body + b"</" + name + sp + b">"
                                                                          if body is not None else b"/>"),
                     attrs, _SPACE, st.one_of(inner, inner, inner, st.none()))


_RUN = st.sampled_from([b"<t>a</t>", b'<r><rPr><b/></rPr><t xml:space="preserve"> b </t></r>',
                        b'<rPh sb="0" eb="1"><t>p</t></rPh>', b'<phoneticPr fontId="1"/>'])
_CHILD = st.one_of(_tag(b"f", {b"t": _values(b"shared", b"array", b"normal"), b"ref": _values(b"A1:B2", b"C3"),
                                 b"si": _values(b"0", b"1"), b"aca": _values(b"1")}, _TEXT),
                   _tag(b"v", {b"q": _values()}, _TEXT),
                   _tag(b"is", {b"q": _values()}, st.lists(_RUN, max_size=3).map(b"".join)),
                   st.just(b'<extLst><ext uri="u"/></extLst>'), _TEXT)
_CELLS = _tag(b"c", {b"r": _values(b"A1", b"B2", b"a3", b"$C$4", b"A01", b"XFD9", b"AA10"),
                     b"t": _values(b"s", b"str", b"inlineStr", b"e", b"b", b"n", b"d"), b"s": _values(b"1"),
                     b"cm": _values(b"1"), b"vm": _values(b"1"), b"x14:q": _values()},
              st.lists(_CHILD, max_size=4).map(b"".join))
_TEXT_CELLS = st.builds(lambda sp, f, v: b"<c t='str'" + sp + b">" + f + b"<v>" + v + b"</v></c>", _SPACE,
                       st.sampled_from([b"", b"<f>T(1)</f>", b"<f/>"]), _TEXT)
_ROWS = _tag(b"row", {b"r": _values(b"1", b"2", b"3", b"9", b"10"), b"hidden": _values(b"1", b"true", b"0"),
                      b"spans": _values(b"1:3"), b"x14ac:dyDescent": _values(b"0.25")},
             st.lists(_CELLS | _TEXT_CELLS | _SPACE, max_size=5).map(b"".join))


@settings(max_examples=300, deadline=None)
@given(st.lists(_ROWS, max_size=6), st.sampled_from([1000, 2]))
def test_random_contents_read_the_same_both_ways(rows, left):
    both(sheet(b"".join(rows), root=b' xmlns:x14="urn:x" xmlns:x14ac="urn:y"'), left, STRINGS,
         {"1": CellError("#SPILL!")})


# --- parts the fast path leaves to the full parser --------------------------------------------


@pytest.mark.parametrize("rows", [
    b'<row r="1"><c r="A1"><v>1</v><x14:foo/></c></row>',  # a prefixed element
    b'<row r="1" xmlns:q="urn:q"><c r="A1"><v>1</v><q:foo/></c></row>',  # a namespace declared inside
    b'<row r="1"><c r="A1" xmlns="urn:other"><v>1</v></c></row>',  # another default namespace
    b'<row r="1"><c r="A1"><v>1</v></c><!-- a note --></row>',
    b'<row r="1"><c r="A1" t="str"><v><![CDATA[a<b]]></v></c></row>',
    b'<row r="1"><?pi x?><c r="A1"><v>1</v></c></row>',
])
def test_what_the_patterns_do_not_read_goes_to_the_full_parser(rows):
    assert both(sheet(rows, root=b' xmlns:x14="urn:x"')) is False


def test_a_late_fallback_uses_up_no_budget():
    data = sheet(b'<row r="1"><c r="A1"><f>1</f></c><c r="B1"><f>2</f></c><c r="C1"><v>1</v><x14:a/></c></row>',
                 root=b' xmlns:x14="urn:x"')
    assert both(data, left=5) is False


def test_prefixed_main_namespace_and_other_encodings_go_to_the_full_parser():
    prefixed = (b'<x:worksheet xmlns:x="' + MAIN.encode() + b'"><x:sheetData><x:row r="1"><x:c r="A1"><x:v>1</x:v>'
                b"</x:c></x:row></x:sheetData></x:worksheet>")
    assert both(prefixed) is False
    assert both(sheet(b'<row r="1"><c r="A1"><v>1</v></c></row>').replace(b"UTF-8", b"ISO-8859-1")) is False
    assert both(sheet(b'<row r="1"><c r="A1"><v>1</v></c></row>').decode().encode("utf-16")) is False
    assert both(sheet(b'<row r="1"><c r="A1"><v>1</v></c></row>', b'<x sheetData="1"/>')) is False


# --- refusals --------------------------------------------------------------------------------


def test_a_dtd_is_refused_before_anything_else():
    bomb = (b'<?xml version="1.0"?><!DOCTYPE worksheet [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;">]>'
            + sheet(b'<row r="1"><c r="A1" t="str"><v>&b;</v></c></row>').split(b"?>", 1)[1])
    assert both(bomb)  # refused by the fast path itself, with the full parser's words
    with pytest.raises(Refused, match="DTD or entity declaration"):
        sheetxml.scan(bomb, PART, [10])


@pytest.mark.parametrize("rows", [
    b'<row r="1"><c r="A1"><v>1</v></row>',  # mismatched tag
    b'<row r="1"><c r="A1"><v>&nope;</v></c></row>',  # undefined entity
    b'<row r="1"><c r="A1"><v>&#0;</v></c></row>',  # no such character
    b'<row r="1"><c r="A1" t="str"><v>\xff</v></c></row>',  # not UTF-8
    b'<row r="1"><c r="A1" q:x="1"><v>1</v></c></row>',  # unbound prefix
    b'<row r="1"><c r="A1" r="B1"><v>1</v></c></row>',  # an attribute twice
    b'<row r="x"><c r="A1"><v>1</v></c></row><row><c></row>',  # the row number is met before the bad tag
])
def test_malformed_xml_is_refused_as_the_full_parser_refuses_it(rows):
    assert both(sheet(rows)) is False  # left to the full parser, which says what it meets first
    with pytest.raises(Refused):
        sheetxml.scan(sheet(rows), PART, [10])


@pytest.mark.parametrize("rows", [
    b'<row r="x"><c r="A1"><v>1</v></c></row>',
    b'<row r="1048577"/>',
    b'<row r="1"><c r="XFE1"><v>1</v></c></row>',
    b'<row r="1"><c r="A1" t="q"><v>1</v></c></row>',
    b'<row r="1"><c r="A1" t="s"><v>7</v></c></row>',
    b'<row r="1"><c r="A1"><v>one</v></c></row>',
    b'<row r="1"><c r="A1"><f>1</f></c><c r="B1"><f>1</f></c><c r="C1"><f>1</f></c></row>',
])
def test_content_refusals_are_the_full_parsers(rows):
    assert both(sheet(rows), left=2, strings=STRINGS)
    with pytest.raises(Refused):
        sheetxml.scan(sheet(rows), PART, [2], STRINGS)


def test_the_column_and_cell_limits(monkeypatch):
    wide = sheet(b'<row r="1"><c r="XFC1"/><c/><c/></row>')
    assert both(wide)
    with pytest.raises(Refused, match="columns"):
        sheetxml.scan(wide, PART, [10])
    monkeypatch.setattr(sheetxml, "MAX_CELLS", 2)
    many = sheet(b'<row r="1"><c r="A1"/><c r="B1"/><c/></row>')
    assert both(many)
    with pytest.raises(Refused, match="more than 2 cells"):
        sheetxml.scan(many, PART, [10])


# --- the Excel reference set ------------------------------------------------------------------


def test_every_reference_worksheet_reads_the_same_both_ways(monkeypatch):
    folder = reference_folder()
    taken = []  # whether the fast path read it, for each worksheet with cells (an empty <sheetData/> has no content)

    def compare(data, part, budget, strings=None, rich=None):
        fast = both(data, budget[0], strings, rich, part)
        if b"<sheetData/>" not in data:
            taken.append(fast)
        return sheetxml.scan(data, part, budget, strings, rich)

    monkeypatch.setattr(model, "scan", compare)
    files = sorted(folder.glob("*/*.xls[xm]"))
    assert len(files) >= 400
    for path in files:
        pkg = Package(str(path))
        try:
            model.load(pkg)
        finally:
            pkg.close()
    # Excel writes nothing the patterns leave to the full parser: 737 of 737 worksheets with cells were read so
    assert len(taken) > 400 and sum(taken) / len(taken) > 0.95, (sum(taken), len(taken))
