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
from typing import NamedTuple

from ..errors import NAME, REF, CellError
from ..formula import BUILTINS, Array, Call, FormulaSyntaxError, Name, Node, Ref, parse, walk
from ..formula.batch import BATCHED
from ..formula.nodes import children
from ..formula.budget import MAX_FORMULA_TEXT
from .refs import MAX_COL, MAX_ROW, Area, area, column_letters, column_number

# A bracket ends at the next "[" too: a text of many unclosed "[" is then scanned once, not once per "["
_OPAQUE = re.compile(r'"(?:[^"]|"")*"|\'(?:[^\']|\'\')*\'|\[[^\[\]]*\]')
_BEFORE = r"(?<![A-Za-z0-9_.$\\])"
_AFTER = r"(?![A-Za-z0-9_.(!\[\\])"
_REFLIKE = re.compile(
    rf"{_BEFORE}(\$?)([A-Za-z]{{1,3}})(\$?)([0-9]{{1,7}}){_AFTER}"
    rf"|{_BEFORE}(\$?)([A-Za-z]{{1,3}}):(\$?)([A-Za-z]{{1,3}}){_AFTER}"
    rf"|{_BEFORE}(\$?)([0-9]{{1,7}}):(\$?)([0-9]{{1,7}}){_AFTER}"
)
# a reference token's first part, and its last part (each with its "$"): a cell's column and row, a range's ends
_PART = re.compile(r"(\$?)([A-Za-z]+|[0-9]+)(.*)\Z", re.S)
_PART_END = re.compile(r"(\$?)([A-Za-z]+|[0-9]+)\Z")
_EXTERNAL = re.compile(r"'[^'\[]*\[[^\[\]]*\](?:[^']|'')*'!|\[[^\[\]]*\][^'!\s(),+\-*/&=<>^;\[]*!")

# Texts longer than this cannot parse (Excel's limit, with room for the file format's function prefixes)
_LONGEST = 2 * MAX_FORMULA_TEXT


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


class Shape(NamedTuple):
    """A text's shape at its cell: ``key`` (the text with each reference written relative to
    the cell), the references as :func:`shape` lists them, and how to write the text of the
    same shape at another cell: ``form`` takes (:meth:`str.format`) the columns of the relative
    parts, at the offsets ``cols``, and gives the text in that column, which takes the rows, at
    the offsets ``rows``; ``reach`` bounds the offsets (rows low, high, columns low, high);
    ``in_columns`` keeps the text in each column it was written in (cells come down columns)."""

    key: str
    items: list[tuple]
    form: str
    cols: tuple[int, ...]
    rows: tuple[int, ...]
    reach: tuple[int, int, int, int]
    in_columns: dict[int, str]

    def text_at(self, row: int, col: int) -> str | None:
        """The text of this shape in cell (row, col); None where a reference would leave the sheet."""
        low_row, high_row, low_col, high_col = self.reach
        if row + low_row < 1 or row + high_row > MAX_ROW or col + low_col < 1 or col + high_col > MAX_COL:
            return None
        in_column = self.in_columns.get(col)
        if in_column is None:
            in_column = self.in_columns[col] = self.form.format(*map(column_letters, map(col.__add__, self.cols)))
        return in_column.format(*map(row.__add__, self.rows))


def _form(token: str, item: tuple) -> list[str | tuple[bool, int]]:
    """``token`` (a reference of ``item``'s kind, as written) in pieces: text as written (an
    anchored part among it), and (column?, offset) for each relative part."""
    kind, f1, n1, f2, n2 = item
    dollar1, first, rest = _PART.match(token).groups()
    dollar2, second = _PART_END.search(rest).groups()
    between = rest[: len(rest) - len(dollar2) - len(second)]
    if kind == "c":  # letters then digits
        parts = [(f2, first, True, n2), (f1, second, False, n1)]
    else:
        parts = [(f1, first, kind == "C", n1), (f2, second, kind == "C", n2)]
    (fixed1, text1, *move1), (fixed2, text2, *move2) = parts
    return [dollar1, text1 if fixed1 else tuple(move1), between, dollar2, text2 if fixed2 else tuple(move2)]


def _escaped(text: str) -> str:
    """``text`` as literal text of a form, which is formatted twice (columns, then rows)."""
    return text.replace("{", "{{{{").replace("}", "}}}}")


def shape(text: str, row: int, col: int) -> Shape:
    """The text with its references written relative to (row, col), and those references.

    >>> shape('=A1+"B2"+$C$3', 2, 2)[0] == shape('=B2+"B2"+$C$3', 3, 3)[0]
    True
    >>> shape('=A1+"B2"+$C$3+{1}', 2, 2).text_at(3, 3)
    '=B2+"B2"+$C$3+{1}'
    """
    pieces, items, form = [], [], []
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
            form += [_escaped(plain[last:s]), *_form(plain[s:e], rel)]
            last = e
        pieces.append(plain[last:])
        pieces.append(text[start:end])
        form += [_escaped(plain[last:]), _escaped(text[start:end])]
        pos = end
    cols = [piece[1] for piece in form if type(piece) is tuple and piece[0]]
    rows = [piece[1] for piece in form if type(piece) is tuple and not piece[0]]
    fields = [0, 0]  # the next row's field, the next column's
    for k, piece in enumerate(form):
        if type(piece) is tuple:  # a row's field is written so that the columns' formatting leaves it
            form[k] = ("{%d}" if piece[0] else "{{%d}}") % fields[piece[0]]
            fields[piece[0]] += 1
    reach = (min(rows or [0]), max(rows or [0]), min(cols or [0]), max(cols or [0]))
    return Shape("".join(pieces), items, "".join(form), tuple(cols), tuple(rows), reach, {})


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
        if isinstance(n, Call) and n.name in BUILTINS and n.name not in BATCHED:
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
    """Templates by shape, built on first sight.

    A text is first compared with the text that the last shape seen in its column, and the
    last shape seen (the cell before it in its row, as cells come row by row), would have in
    its cell: a column or row of relative copies, and every cell of an Excel shared formula
    (which all come with their first cell's text), are then known without reading their
    references again. A text equal to that has that shape: the two differ only in relative
    parts, moved by the cell's offset, which the pattern reads alike (a part that would leave
    the sheet gives no text to compare).
    """

    def __init__(self) -> None:
        self.by_shape: dict[str, Template | None] = {}  # None: the shape cannot be trusted
        self._last_in_col: dict[int, Shape] = {}
        self._last: Shape | None = None

    def get(self, text: str, row: int, col: int) -> Template:
        if len(text) > _LONGEST:  # refused by the parser: not worth a shape
            return build(text, row, col)
        for seen in (self._last_in_col.get(col), self._last):
            if seen is not None and seen.text_at(row, col) == text:  # so its shape is seen's
                self._last = self._last_in_col[col] = seen
                template = self.by_shape[seen.key]
                return build(text, row, col) if template is None else template
        found = self._last = self._last_in_col[col] = shape(text, row, col)
        template = self.by_shape.get(found.key, False)
        if template is False:
            template = build(text, row, col)
            trusted = template.error is None and _ast_items(template) == found.items
            self.by_shape[found.key] = template if trusted else None
            return template
        if template is None:
            return build(text, row, col)
        return template
