"""Hostile and broken workbooks for ``cellfuncs recalc``, built from their XML, and how the
tests run the command on them.

Each builder writes one small .xlsx that stands for a way a file can ask for far more work
than its size suggests, or break the package format, and returns its path. The packages are
written part by part (not through openpyxl) so that a part can be given any encoding and any
attribute Excel would never write.
"""

from __future__ import annotations

import os
import struct
import zipfile
from pathlib import Path
from xml.sax.saxutils import escape

# How the tests run ``cellfuncs recalc`` on them: a process of its own under an address-space
# limit; the timeout only catches a hang.
ADDRESS_SPACE = 2**30
WATCHDOG = 300  # seconds; a run normally takes well under two
# Thread pools of the numerical libraries reserve address space per core; one thread each keeps
# the limit about the engine's work on any machine.
ENV = dict(os.environ, CI="1", OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1", MKL_NUM_THREADS="1")


def limit_memory() -> None:
    """``preexec_fn`` of the runs: the address-space limit."""
    import resource  # POSIX only, as the limit is

    resource.setrlimit(resource.RLIMIT_AS, (ADDRESS_SPACE, ADDRESS_SPACE))

MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
DOC_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"
DECLARATION = '<?xml version="1.0" encoding="{}" standalone="yes"?>\n'


def _cell(ref: str, value: object) -> str:
    """A cell; a key such as ``B1:C1`` is a legacy array formula over that range (the key's
    first cell holds it), which is evaluated whole, without implicit intersection."""
    if ":" in ref:
        return f'<c r="{ref.split(":")[0]}"><f t="array" ref="{ref}">{escape(value[1:])}</f></c>'
    if isinstance(value, str) and value.startswith("="):
        return f'<c r="{ref}"><f>{escape(value[1:])}</f></c>'
    if isinstance(value, str):
        return f'<c r="{ref}" t="str"><v>{escape(value)}</v></c>'
    return f'<c r="{ref}"><v>{value}</v></c>'


def sheet_xml(cells: dict[str, object] | str) -> str:
    """A worksheet holding ``cells`` (A1 reference -> number, text or "=formula"), or the
    raw ``<sheetData>`` content when ``cells`` is a string."""
    if isinstance(cells, str):
        data = cells
    else:
        rows: dict[int, list[str]] = {}
        for ref, value in cells.items():
            row = int("".join(ch for ch in ref.split(":")[0] if ch.isdigit()))
            rows.setdefault(row, []).append(_cell(ref, value))
        data = "".join(f'<row r="{r}">{"".join(cs)}</row>' for r, cs in sorted(rows.items()))
    return f'<worksheet xmlns="{MAIN}"><sheetData>{data}</sheetData></worksheet>'


def encoded(xml: str, codec: str) -> bytes:
    """``xml`` with its declaration in ``codec``: UTF-16 in either byte order with its byte-order
    mark (the XML standard requires one), any other codec as Python names it."""
    if codec.upper().startswith("UTF-16"):
        order = "utf-16-be" if codec.upper().endswith("BE") else "utf-16-le"
        bom = b"\xfe\xff" if order == "utf-16-be" else b"\xff\xfe"
        return bom + (DECLARATION.format("UTF-16") + xml).encode(order)
    return (DECLARATION.format(codec) + xml).encode(codec)


def write(path: Path, cells: dict[str, object] | str, names: dict[str, str] | None = None,
          encodings: dict[str, str] | None = None, calc_chain: bool = False) -> Path:
    """A one-sheet workbook (sheet "S"); ``encodings`` maps part names to the codec that
    part is written in (default UTF-8), with a byte-order mark for UTF-16."""
    defined = "".join(f'<definedName name="{n}">{escape(t)}</definedName>' for n, t in (names or {}).items())
    parts = {
        "[Content_Types].xml": (
            '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
            '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
            '<Default Extension="xml" ContentType="application/xml"/>'
            '<Override PartName="/xl/workbook.xml" '
            'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>'
            '<Override PartName="/xl/worksheets/sheet1.xml" '
            'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>'
            + ('<Override PartName="/xl/calcChain.xml" '
               'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.calcChain+xml"/>'
               if calc_chain else "") + "</Types>"),
        "_rels/.rels": (f'<Relationships xmlns="{PKG_REL}"><Relationship Id="rId1" Type="{DOC_REL}/officeDocument" '
                        'Target="xl/workbook.xml"/></Relationships>'),
        "xl/workbook.xml": (f'<workbook xmlns="{MAIN}" xmlns:r="{DOC_REL}"><sheets><sheet name="S" sheetId="1" '
                            f'r:id="rId1"/></sheets>' + (f"<definedNames>{defined}</definedNames>" if defined else "")
                            + "</workbook>"),
        "xl/_rels/workbook.xml.rels": (
            f'<Relationships xmlns="{PKG_REL}"><Relationship Id="rId1" Type="{DOC_REL}/worksheet" '
            'Target="worksheets/sheet1.xml"/>'
            + (f'<Relationship Id="rId2" Type="{DOC_REL}/calcChain" Target="calcChain.xml"/>' if calc_chain else "")
            + "</Relationships>"),
        "xl/worksheets/sheet1.xml": sheet_xml(cells),
    }
    if calc_chain:
        parts["xl/calcChain.xml"] = f'<calcChain xmlns="{MAIN}"><c r="A1" i="1"/></calcChain>'
    encodings = encodings or {}
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for name, xml in parts.items():
            z.writestr(name, encoded(xml, encodings.get(name, "UTF-8")))
    return path


# ---- work bombs --------------------------------------------------------------------------
def array_range_bomb(folder: Path) -> Path:
    """One legacy array formula declaring the whole sheet as its range: 17 billion cells."""
    return write(folder / "array_range.xlsx", '<row r="1"><c r="A1"><f t="array" ref="A1:XFD1048576">1</f>'
                                              "<v>1</v></c></row>")


def dynamic_range_bomb(folder: Path) -> Path:
    """A spill whose stored range is the whole sheet (a dynamic array's old range)."""
    path = write(folder / "dynamic_range.xlsx", '<row r="1"><c r="A1" cm="1"><f t="array" ref="A1:XFD1048576">'
                                                "{1,2}</f><v>1</v></c></row>")
    return path


def broadcast_bomb(folder: Path) -> Path:
    """A whole column times a whole row: 100,000 x 16,384 elements from three stored cells."""
    return write(folder / "broadcast.xlsx", {"C5:C5": "=SUM(A:A+1:1)", "A100000": 1, "XFD1": 2, "D5": "=6*7"})


def function_broadcast_bomb(folder: Path) -> Path:
    """A pack function given a whole column and a whole row."""
    return write(folder / "function_broadcast.xlsx",
                 {"A5:A5": '=SUM(MASS_DENSITY("water",B:B,2:2))', "B100000": 300, "XFD2": 1e5, "D5": "=6*7"})


def range_read_bomb(folder: Path) -> Path:
    """A range that stops one short of the sheet's edges, so it is not cut to the used range."""
    return write(folder / "range_read.xlsx", {"A1": "=SUM(B2:XFC1048575)", "B2": 1, "A2": "=6*7"})


def builtin_bombs(folder: Path) -> Path:
    """Built-ins asked for more than a cell or the budget holds: a text substituted into
    itself, texts joined past a cell's length, a column times a row by MMULT, a huge identity
    matrix; and a large but allowed SEQUENCE."""
    return write(folder / "builtins.xlsx", {
        "A1": '=REPT("x",30000)', "C1": "=A1", "C2": "=A1",
        "B1": '=SUBSTITUTE(A1,"x",A1)', "B2": '=TEXTJOIN(",",TRUE,C1:C2)',
        "B3": "=SUM(MMULT(SEQUENCE(100000),SEQUENCE(1,16384)))", "B4": "=SUM(MUNIT(4096))",
        "B5": "=SUM(SEQUENCE(1000,1000))"})


def many_column_sums(folder: Path) -> Path:
    """A thousand formulas each summing a whole column that one far cell makes a million rows
    long: each within the limits of one formula, together a billion cells."""
    cells: dict[str, object] = {f"B{r}": "=SUM(A:A)" for r in range(1, 1001)}
    cells["A1048576"] = 1
    return write(folder / "many_sums.xlsx", cells)


def text_doubling_bomb(folder: Path) -> Path:
    """Each cell joins the previous one to itself: 2^60 characters by the end."""
    cells: dict[str, object] = {"A1": '="xxxxxxxx"'}
    for r in range(2, 62):
        cells[f"A{r}"] = f"=A{r - 1}&A{r - 1}"
    cells["B1"] = "=6*7"
    return write(folder / "text_doubling.xlsx", cells)


def name_fan_out(folder: Path, levels: int = 41) -> Path:
    """fan_k = fan_{k+1} + fan_{k+1}: evaluated naively, 2^41 name evaluations."""
    names = {f"fan_{k}": f"fan_{k + 1}+fan_{k + 1}" for k in range(1, levels)}
    names[f"fan_{levels}"] = "S!$B$1"
    return write(folder / "name_fan_out.xlsx", {"A1": "=fan_1", "B1": 1}, names)


def name_chain(folder: Path, length: int = 1000) -> Path:
    """chain_1 = chain_2 + 1, ..., chain_1000 = S!B1: a thousand names deep."""
    names = {f"chain_{k}": f"chain_{k + 1}+1" for k in range(1, length)}
    names[f"chain_{length}"] = "S!$B$1"
    return write(folder / "name_chain.xlsx", {"A1": "=chain_1", "B1": 1}, names)


def cell_chain(folder: Path, length: int = 3000) -> Path:
    """A3000 = A2999 + 1, ..., A1 = 1, written bottom-up so the file order is the reverse
    of the evaluation order."""
    cells: dict[str, object] = {f"A{r}": f"=A{r - 1}+1" for r in range(length, 1, -1)}
    cells["A1"] = 1
    cells["B1"] = f"=A{length}"
    return write(folder / "cell_chain.xlsx", cells)


def deep_nesting(folder: Path) -> Path:
    """Deep formulas: 96 nested functions (Excel allows 64), 99 negations, and 199 nested SUMs,
    which the parser accepts but which are deeper than the evaluator's recursion goes."""
    return write(folder / "deep_nesting.xlsx", {"A1": "=" + "SUM(IFERROR(" * 48 + "1" + ",0))" * 48,
                                                "A2": "=" + "-(" * 99 + "1" + ")" * 99,
                                                "A3": "=" + "SUM(" * 199 + "1" + ")" * 199})


def long_formula(folder: Path) -> Path:
    """A formula text of a million characters."""
    return write(folder / "long_formula.xlsx", {"A1": "=" + "+".join(["1"] * 500_000), "A2": "=2*3"})


# ---- values and texts ------------------------------------------------------------------
def non_finite_values(folder: Path) -> Path:
    """Stored numbers Excel never writes: NaN, infinities and an overflowing exponent."""
    return write(folder / "non_finite.xlsx", '<row r="1"><c r="A1"><v>NaN</v></c><c r="A2"><v>1e999</v></c>'
                                             '<c r="A3"><v>-INF</v></c><c r="A4"><v>2</v></c>'
                                             '<c r="B1"><f>A1*2</f><v>NaN</v></c><c r="B2"><f>A2+1</f></c>'
                                             '<c r="B3"><f>A4*2</f></c></row>')


def forged_summary(folder: Path) -> Path:
    """An error reason carrying line breaks, trying to forge the summary line."""
    forged = "\u2028x\nrecalc: 1 files, 0 cells, 0 errors, 0 differences, 0.01 s\r"
    return write(folder / "forged.xlsx", {"A1": f'=BOIL_TEMP("{forged}",1)'})


# ---- encodings ---------------------------------------------------------------------------
def utf16_parts(folder: Path) -> Path:
    """Every XML part in UTF-16 (allowed by the package format), with a calculation chain so
    the relationships and content types are edited on writing."""
    every = ["[Content_Types].xml", "_rels/.rels", "xl/workbook.xml", "xl/_rels/workbook.xml.rels",
             "xl/worksheets/sheet1.xml", "xl/calcChain.xml"]
    return write(folder / "utf16.xlsx", {"A1": 2, "A2": "=A1*21", "A3": "=\"caf\u00e9 \"&A2", "B1:C1": "={1,2}"},
                 encodings={name: "UTF-16" for name in every}, calc_chain=True)


def utf16_rels_only(folder: Path) -> Path:
    """Only ``_rels/.rels`` in UTF-16 (big-endian), which gains a relationship on writing."""
    return write(folder / "utf16_rels.xlsx", {"A1": "=6*7"}, encodings={"_rels/.rels": "UTF-16-BE"})


def latin1_part(folder: Path) -> Path:
    """A part in an encoding the package format does not allow."""
    return write(folder / "latin1.xlsx", {"A1": "=6*7", "A2": "d\u00e9j\u00e0"},
                 encodings={"xl/worksheets/sheet1.xml": "ISO-8859-1"})


# ---- zip structure ------------------------------------------------------------------------
CENTRAL_FIELDS = {  # offset in a central directory header: (name, struct format)
    4: ("version made by", "<H"), 6: ("version needed", "<H"), 8: ("flags", "<H"), 10: ("method", "<H"),
    16: ("crc", "<I"), 20: ("compressed size", "<I"), 24: ("size", "<I"), 28: ("name length", "<H"),
    30: ("extra length", "<H"), 32: ("comment length", "<H"), 34: ("disk", "<H"), 42: ("header offset", "<I"),
}
LOCAL_FIELDS = {4: ("version needed", "<H"), 6: ("flags", "<H"), 8: ("method", "<H"), 14: ("crc", "<I"),
                18: ("compressed size", "<I"), 22: ("size", "<I"), 26: ("name length", "<H"),
                28: ("extra length", "<H")}
END_FIELDS = {8: ("entries on disk", "<H"), 10: ("entries", "<H"), 12: ("directory size", "<I"),
              16: ("directory offset", "<I"), 20: ("comment length", "<H")}


def zip_field_mutants(folder: Path, base: Path) -> list[tuple[str, Path]]:
    """Copies of ``base`` with one field of a zip header set to a hostile value: every field of
    every central directory header, of the first local header and of the end record, each to
    0, to all ones and to a large value."""
    data = base.read_bytes()
    out = []
    headers = []
    pos = data.find(b"PK\x01\x02")
    while pos != -1:
        headers.append(("central", pos, CENTRAL_FIELDS))
        pos = data.find(b"PK\x01\x02", pos + 4)
    headers.append(("local", data.find(b"PK\x03\x04"), LOCAL_FIELDS))
    headers.append(("end", data.rfind(b"PK\x05\x06"), END_FIELDS))
    for n, (kind, start, fields) in enumerate(headers):
        for offset, (field, fmt) in fields.items():
            size = struct.calcsize(fmt)
            for label, value in (("zero", 0), ("ones", 2 ** (8 * size) - 1), ("large", 2 ** (8 * size - 2) + 7)):
                mutant = bytearray(data)
                mutant[start + offset:start + offset + size] = struct.pack(fmt, value)
                path = folder / f"zip_{kind}{n}_{field.replace(' ', '_')}_{label}.xlsx"
                path.write_bytes(bytes(mutant))
                out.append((f"{kind} header {n}: {field} = {label}", path))
    return out


def byte_mutants(folder: Path, base: Path, count: int, seed: int = 11) -> list[Path]:
    """Copies of ``base`` with a few random bytes overwritten (a fixed seed: the same files each run)."""
    import random

    rng = random.Random(seed)
    data = base.read_bytes()
    out = []
    for n in range(count):
        mutant = bytearray(data)
        for _ in range(rng.randint(1, 4)):
            mutant[rng.randrange(len(mutant))] = rng.randrange(256)
        path = folder / f"bytes_{n}.xlsx"
        path.write_bytes(bytes(mutant))
        out.append(path)
    return out


def part_mutants(folder: Path, base: Path, count: int, seed: int = 12,
                 parts_read: tuple[str, ...] = ("[Content_Types].xml", "_rels/.rels", "xl/workbook.xml",
                                                "xl/_rels/workbook.xml.rels", "xl/worksheets/sheet1.xml",
                                                "xl/sharedStrings.xml")) -> list[Path]:
    """Copies of ``base`` with one of the parts recalculation reads changed and the zip
    rewritten around it (valid checksums, so the reader gets to the XML): a few bytes
    overwritten, a stretch deleted or repeated, or an attribute value replaced by one Excel
    never writes. (Parts it does not read are copied byte for byte, broken or not.)"""
    import random

    rng = random.Random(seed)
    with zipfile.ZipFile(base) as z:
        parts = {name: z.read(name) for name in z.namelist()}
    names = sorted(parts)
    targets = [name for name in names if name in parts_read]
    hostile = [b"-1", b"0", b"A0", b"XFD1048577", b"1e999", b"NaN", b"", b"&#10;", b"\xc3\xa9", b"99999999999999999999"]
    out = []
    for n in range(count):
        name = rng.choice(targets)
        data = bytearray(parts[name])
        how = rng.randrange(4)
        if how == 0:
            for _ in range(rng.randint(1, 3)):
                data[rng.randrange(len(data))] = rng.choice(b'<>/="\' x0-9A:#&;')
        elif how == 1:
            start = rng.randrange(len(data))
            del data[start:start + rng.randint(1, 40)]
        elif how == 2:
            start = rng.randrange(len(data))
            data[start:start] = data[start:start + rng.randint(1, 60)]
        else:
            quotes = [i for i, b in enumerate(data) if b == ord('"')]
            if len(quotes) >= 2:
                k = rng.randrange(len(quotes) // 2) * 2
                data[quotes[k] + 1:quotes[k + 1]] = rng.choice(hostile)
        path = folder / f"part_{n}.xlsx"
        with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
            for other in names:
                z.writestr(other, bytes(data) if other == name else parts[other])
        out.append(path)
    return out
