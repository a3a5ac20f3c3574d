"""Formula texts to shared syntax trees: one parse per formula *shape*.

A column filled with ``=BOIL_TEMP("water",A2,"bar")``, ``=BOIL_TEMP("water",A3,"bar")``, ...
has one shape: the text with each reference written relative to its cell. Cells of one
shape share one tree (a :class:`Template`) and are evaluated with their offset from the
template's cell, which is also how Excel's shared formulas are stored.

The shape is found by a quick pattern over the text (strings and quoted sheet names
left alone); the first text of a shape is parsed, and the shape is trusted only if the
parser found exactly the references the pattern found. Otherwise each such cell gets
its own parse.

>>> t = Templates()
>>> a, b = t.get("=A2*2", 2, 2), t.get("=A3*2", 3, 2)
>>> a is b, (a.row, a.col), a.batchable
(True, (2, 2), True)
>>> print(t.get("=[Book2.xlsx]Sheet1!A1", 1, 1).error)
#REF! [Book2.xlsx]Sheet1!A1 is an external reference (another workbook)
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..errors import NAME, REF, CellError
from ..formula import BUILTINS, Array, Call, FormulaSyntaxError, Name, Node, Ref, parse, walk
from ..formula.nodes import children
from ..formula.budget import MAX_FORMULA_TEXT
from .refs import MAX_COL, MAX_ROW, Area, area, column_number

# A bracket ends at the next "[" too: a text of many unclosed "[" is then scanned once, not once per "["
_OPAQUE = re.compile(r'"(?:[^"]|"")*"|\'(?:[^\']|\'\')*\'|\[[^\[\]]*\]')
_BEFORE = r"(?<![A-Za-z0-9_.$\\])"
_AFTER = r"(?![A-Za-z0-9_.(!\[\\])"
_REFLIKE = re.compile(
    rf"{_BEFORE}(\$?)([A-Za-z]{{1,3}})(\$?)([0-9]{{1,7}}){_AFTER}"
    rf"|{_BEFORE}(\$?)([A-Za-z]{{1,3}}):(\$?)([A-Za-z]{{1,3}}){_AFTER}"
    rf"|{_BEFORE}(\$?)([0-9]{{1,7}}):(\$?)([0-9]{{1,7}}){_AFTER}"
)
_EXTERNAL = re.compile(r"'[^'\[]*\[[^\[\]]*\](?:[^']|'')*'!|\[[^\[\]]*\][^'!\s(),+\-*/&=<>^;\[]*!")

# Texts longer than this cannot parse (Excel's limit, with room for the file format's function prefixes)
_LONGEST = 2 * MAX_FORMULA_TEXT

# Built-ins that act element by element on every argument, so a column of cells may be
# evaluated as one call on whole columns. Error-catching functions are left out: in one
# call a whole-call error would be caught where a single cell's call would have succeeded.
ELEMENTWISE = frozenset({"IF", "NOT", "ABS", "SQRT", "EXP", "LN", "LOG10", "POWER", "ROUND", "ROUNDUP", "ROUNDDOWN"})


@dataclass(frozen=True, slots=True)
class Template:
    """A parsed formula and the cell its relative references are relative to.

    ``error`` is the cell value of a formula that cannot be parsed; ``refs`` lists
    (sheet or None, area) of every reference and ``names`` the defined names used.
    """

    ast: Node | None
    error: CellError | None
    row: int
    col: int
    refs: tuple[tuple[str | None, Area], ...]
    names: tuple[str, ...]
    batchable: bool


def _items(text: str) -> list[tuple]:
    """The reference-like tokens of ``text`` outside strings, as (kind, $, number, $, number)."""
    out = []
    for m in _REFLIKE.finditer(text):
        g = m.groups()
        if g[1]:
            col, row = column_number(g[1]), int(g[3])
            if col <= MAX_COL and 1 <= row <= MAX_ROW:
                out.append((m.start(), m.end(), ("c", bool(g[2]), row, bool(g[0]), col)))
        elif g[5]:
            c1, c2 = column_number(g[5]), column_number(g[7])
            if max(c1, c2) <= MAX_COL:
                out.append((m.start(), m.end(), ("C", bool(g[4]), c1, bool(g[6]), c2)))
        else:
            r1, r2 = int(g[9]), int(g[11])
            if 1 <= min(r1, r2) and max(r1, r2) <= MAX_ROW:
                out.append((m.start(), m.end(), ("R", bool(g[8]), r1, bool(g[10]), r2)))
    return out


def _relative(item: tuple, row: int, col: int) -> tuple:
    kind, f1, n1, f2, n2 = item
    if kind == "c":  # (row $, row, column $, column)
        return kind, f1, n1 if f1 else n1 - row, f2, n2 if f2 else n2 - col
    base = col if kind == "C" else row
    return kind, f1, n1 if f1 else n1 - base, f2, n2 if f2 else n2 - base


def shape(text: str, row: int, col: int) -> tuple[str, list[tuple]]:
    """The text with its references written relative to (row, col), and those references.

    >>> shape('=A1+"B2"+$C$3', 2, 2)[0] == shape('=B2+"B2"+$C$3', 3, 3)[0]
    True
    """
    pieces, items = [], []
    pos = 0
    spans = [(m.start(), m.end()) for m in _OPAQUE.finditer(text)] + [(len(text), len(text))]
    for start, end in spans:
        plain = text[pos:start]
        last = 0
        for s, e, item in _items(plain):
            rel = _relative(item, row, col)
            items.append(rel)
            pieces.append(plain[last:s])
            pieces.append("\x00%s%d,%d%d,%d\x00" % (rel[0], rel[1], rel[2], rel[3], rel[4]))
            last = e
        pieces.append(plain[last:])
        pieces.append(text[start:end])
        pos = end
    return "".join(pieces), items


def _unparsed(text: str, exc: FormulaSyntaxError) -> CellError:
    plain = _OPAQUE.sub(lambda m: m.group() if m.group()[0] in "'[" else '""', text)
    if _EXTERNAL.search(plain):
        ref = _EXTERNAL.search(text)
        where = text[ref.start():].split(",")[0].split(")")[0] if ref else text
        return CellError(REF, f"{where} is an external reference (another workbook)")
    if "|" in plain:
        return CellError(REF, "a DDE link (another program's data) is not supported")
    return CellError(NAME, f"the formula cannot be evaluated: {exc}")


def _batchable(ast: Node, refs: tuple) -> bool:
    for n in walk(ast):
        if isinstance(n, (Name, Array)):
            return False
        if isinstance(n, Call) and n.name in BUILTINS and n.name not in ELEMENTWISE:
            return False
    return all(a.single and (sheet is None or ":" not in sheet) for sheet, a in refs)  # no 3-D references


def _read_refs(ast: Node) -> list[Ref]:
    """The references whose cells the formula reads: all but those written straight into a
    function that asks only where they are (ROW, ROWS, FORMULATEXT, ...)."""
    out, stack = [], [ast]
    while stack:
        n = stack.pop()
        if isinstance(n, Ref):
            out.append(n)
            continue
        kids = children(n)
        if isinstance(n, Call) and n.name in BUILTINS and BUILTINS[n.name].place_only:
            kids = tuple(k for k in kids if not isinstance(k, Ref))
        stack += reversed(kids)
    return out


def build(text: str, row: int, col: int) -> Template:
    """Parse ``text`` as the formula of the cell at (row, col)."""
    try:
        ast = parse(text)
    except FormulaSyntaxError as exc:
        if len(text) > _LONGEST:
            return Template(None, CellError(NAME, f"the formula cannot be evaluated: {exc}"), row, col, (), (), False)
        return Template(None, _unparsed(text, exc), row, col, (), (), False)
    refs = tuple((n.sheet, area(n.ref)) for n in _read_refs(ast))
    # a call of a function the registry lacks may be a defined name holding a LAMBDA
    names = tuple(n.text for n in walk(ast) if isinstance(n, Name)) + tuple(
        n.name for n in walk(ast) if isinstance(n, Call) and n.name not in BUILTINS)
    return Template(ast, None, row, col, refs, names, _batchable(ast, refs))


def _ast_items(template: Template) -> list[tuple]:
    out = []
    for n in walk(template.ast):
        if isinstance(n, Ref):
            out += [_relative(item, template.row, template.col) for _, _, item in _items(n.ref)]
    return out


class Templates:
    """Templates by shape, built on first sight."""

    def __init__(self) -> None:
        self.by_shape: dict[str, Template | None] = {}  # None: the shape cannot be trusted

    def get(self, text: str, row: int, col: int) -> Template:
        if len(text) > _LONGEST:  # refused by the parser: not worth a shape
            return build(text, row, col)
        key, items = shape(text, row, col)
        template = self.by_shape.get(key, False)
        if template is False:
            template = build(text, row, col)
            trusted = template.error is None and _ast_items(template) == items
            self.by_shape[key] = template if trusted else None
            return template
        if template is None:
            return build(text, row, col)
        return template
