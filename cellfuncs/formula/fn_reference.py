"""Built-in functions about references and array shapes: ROW, COLUMN, ROWS, COLUMNS, AREAS,
SHEET, SHEETS, INDIRECT, OFFSET, CHOOSE, TRANSPOSE.

ROW and COLUMN need the reference itself, not its values: the evaluation context answers
``bounds(sheet, ref)`` (first row, first column, last row, last column) and ``position()``
(the formula's own cell). A context without a workbook has neither: #VALUE!. INDIRECT and
OFFSET return references (see :func:`.reference_builtin`), so ``ROW(OFFSET(A1,2,0))`` and
``SUM(INDIRECT("B2"):INDIRECT("B6"))`` work as in Excel.

>>> from cellfuncs.formula import compute
>>> compute("=ROWS({1,2;3,4;5,6})"), compute("=CHOOSE(2, \\"a\\", \\"b\\")"), compute("=TRANSPOSE({1,2})").tolist()
(3.0, 'b', [[1.0], [2.0]])
"""

from __future__ import annotations

import re

import numpy as np

from ..errors import NA, REF, VALUE, CellError
from .a1 import MAX_COL, MAX_ROW
from .arrays import Value, as_array, map_values
from .coerce import to_bool, to_number, to_text
from .evaluate import (Context, anchored, builtin, evaluate, implicit_value, intersect, is_reference,
                       reference_builtin, reference_of)
from .nodes import Areas, Missing, Name, Node, Ref
from .parser import FormulaSyntaxError, parse

_R1C1 = re.compile(r"R(\[-?\d+\]|\d+)?C(\[-?\d+\]|\d+)?\Z")


def found_reference(context: Context, node: Node, several: bool = False) -> Ref | Areas | CellError | None:
    """The reference an argument is written as or evaluates to (a defined name that is one
    reference included); None when it gives a value. A union of several areas is #REF!, as
    Excel gives for ROWS of one (MS-OI29500 2.1.1035), unless the caller takes ``several``."""
    found = reference_of(node, context)
    if type(found) is Name:
        find = getattr(context, "name_reference", None)
        found = find(found.text) if find is not None else None
    if type(found) is Areas and not several:
        return CellError(REF, "the argument must be a reference of one area, not a union of several")
    return found


def required_reference(context: Context, node: Node) -> Ref | CellError:
    """:func:`found_reference`, with an argument that gives a value an error."""
    found = found_reference(context, node)
    return CellError(VALUE, "the argument must be a reference") if found is None else found


def _bounds(context: Context, node: Node) -> tuple[int, int, int, int] | CellError:
    found = required_reference(context, node)
    if type(found) is CellError:
        return found
    bounds = getattr(context, "bounds", None)
    if bounds is None:
        return CellError(VALUE, "the formula has no workbook")
    return bounds(found.sheet, found.ref)


def _here(context: Context) -> tuple[int, int] | CellError:
    position = getattr(context, "position", None)
    return position() if position is not None else CellError(VALUE, "the formula has no cell")


def _numbering(name: str, axis: int) -> None:
    def fn(context: Context, node: Node | None = None) -> Value:
        if node is None or type(node) is Missing:
            here = _here(context)
            return here if type(here) is CellError else float(here[axis])
        b = _bounds(context, node)
        if type(b) is CellError:
            return b
        first, last = b[axis], b[axis + 2]
        if first == last:
            return float(first)
        out = np.empty((last - first + 1, 1) if axis == 0 else (1, last - first + 1), dtype=object)
        out.flat[:] = [float(i) for i in range(first, last + 1)]
        return out

    fn.__doc__ = f"{name}([reference]): the {name.lower()} number(s) of a reference, or of the formula's cell."
    builtin(name, 0, 1, lazy=True, place_only=True)(fn)


_numbering("ROW", 0)
_numbering("COLUMN", 1)


def _size(name: str, axis: int) -> None:
    def fn(context: Context, node: Node) -> Value:
        if found_reference(context, node) is not None:
            b = _bounds(context, node)
            return b if type(b) is CellError else float(b[axis + 2] - b[axis] + 1)
        v = evaluate(node, context)
        if type(v) is CellError:
            return v
        return float(as_array(v).shape[axis])

    fn.__doc__ = f"{name}(array): how many {name.lower()} a reference or array has."
    builtin(name, 1, lazy=True, place_only=True)(fn)


_size("ROWS", 0)
_size("COLUMNS", 1)


@builtin("AREAS", 1, lazy=True, place_only=True)
def areas(context: Context, node: Node) -> Value:
    """How many areas a reference has: 1, or as many as a union joins.

    >>> from cellfuncs.formula import compute
    >>> compute("=AREAS(1)").code
    '#VALUE!'
    """
    found = found_reference(context, node, several=True)
    if found is None:
        return CellError(VALUE, "AREAS takes a reference")
    if type(found) is CellError:
        return found
    return float(len(found.parts)) if type(found) is Areas else 1.0


@builtin("SHEET", 0, 1, lazy=True, place_only=True)
def sheet(context: Context, node: Node | None = None) -> Value:
    """The position of a sheet in the workbook (1 for the first): of the formula's own sheet,
    of a reference's sheet, or of the sheet a text names (#N/A if none does).

    >>> from cellfuncs.formula import compute
    >>> compute("=SHEET()").code
    '#VALUE!'
    """
    position = getattr(context, "sheet_position", None)
    if position is None:
        return CellError(VALUE, "the formula has no workbook")
    if node is None or type(node) is Missing:
        found = position(None)
    elif (ref := found_reference(context, node)) is not None:
        found = ref if type(ref) is CellError else position(ref.sheet)
        if type(found) is CellError:
            return found
    else:
        v = evaluate(node, context)
        if type(v) is CellError:
            return v
        found = position(v) if type(v) is str else None
    return CellError(NA, "SHEET takes a reference or the name of a sheet") if found is None else float(found)


@builtin("SHEETS", 0, 1, lazy=True, place_only=True)
def sheets(context: Context, node: Node | None = None) -> Value:
    """How many sheets a reference spans (1), or without one how many the workbook has."""
    count = getattr(context, "sheet_count", None)
    if count is None:
        return CellError(VALUE, "the formula has no workbook")
    if node is None or type(node) is Missing:
        return float(count())
    ref = found_reference(context, node)
    if ref is not None:
        return ref if type(ref) is CellError else 1.0
    v = evaluate(node, context)
    return v if type(v) is CellError else CellError(VALUE, "SHEETS takes a reference")


def _anchored_text(ref: str) -> str:
    """An A1 reference with every row and column anchored, so it moves with no formula."""
    return re.sub(r"(?<![\d$])(\d+)", r"$\1", re.sub(r"(?<![A-Z$])([A-Z]{1,3})", r"$\1", ref))


def _r1c1(text: str, context: Context) -> str | CellError:
    """An R1C1 reference (``R2C3``, ``R[-1]C``, ``R1C1:R2C2``) as A1, relative parts counted
    from the formula's cell."""
    here = getattr(context, "position", None)
    row, col = here() if here is not None else (1, 1)
    corners = []
    for part in text.upper().split(":"):
        m = _R1C1.match(part)
        if m is None or len(corners) == 2:
            return CellError(REF, f"{text} is not an R1C1 reference")
        r = row if m.group(1) is None else (row + int(m.group(1)[1:-1]) if m.group(1)[0] == "[" else int(m.group(1)))
        c = col if m.group(2) is None else (col + int(m.group(2)[1:-1]) if m.group(2)[0] == "[" else int(m.group(2)))
        if not (1 <= r <= MAX_ROW and 1 <= c <= MAX_COL):
            return CellError(REF, f"{text} is off the sheet")
        corners.append((r, c))
    (r1, c1), (r2, c2) = corners[0], corners[-1]
    return anchored(None, min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2)).ref


@reference_builtin("INDIRECT", 1, 2)
def indirect(context: Context, text_node: Node, style_node: Node | None = None) -> Ref | CellError:
    """The reference a text names: ``"B2"``, ``"'Data sheet'!A1:C3"``, a defined name, or with
    FALSE as the second argument an R1C1 reference (``"R[-1]C"``).

    >>> from cellfuncs.formula import compute
    >>> compute('=INDIRECT("A1")').code, compute('=INDIRECT("1+1")').code
    ('#REF!', '#REF!')
    """
    text = evaluate(text_node, context)
    if type(text) is CellError:
        return text
    if type(text) is np.ndarray:
        return CellError(VALUE, "INDIRECT takes one text")
    if type(text) is not str:
        text = to_text(text)
    a1 = True
    if style_node is not None and type(style_node) is not Missing:
        style = evaluate(style_node, context)
        style = CellError(VALUE, "INDIRECT's style is one value") if type(style) is np.ndarray else to_bool(style)
        if type(style) is CellError:
            return style
        a1 = style
    written = text.strip()
    sheet, local = None, written
    if "!" in written:
        sheet, _, local = written.rpartition("!")
        if sheet.startswith("'") and sheet.endswith("'") and len(sheet) > 1:
            sheet = sheet[1:-1].replace("''", "'")
    if not a1:
        local = _r1c1(local, context)
        if type(local) is CellError:
            return local
        return Ref(sheet, local)
    try:
        node = parse("=" + ((_quote(sheet) + "!") if sheet else "") + local) if written else None
    except FormulaSyntaxError:
        node = None
    if type(node) is Ref:
        return Ref(node.sheet, _anchored_text(node.ref))
    if type(node) is Name:  # a defined name counts when it is a reference
        find = getattr(context, "name_reference", None)
        found = find(node.text) if find is not None else None
        if found is not None:
            return found
    return CellError(REF, f"{text!r} does not name a reference")


def _quote(sheet: str) -> str:
    return "'" + sheet.replace("'", "''") + "'"


@builtin("SINGLE", 1, lazy=True)
def single(context: Context, node: Node) -> Value:
    """The implicit intersection operator ``@`` (the file writes ``SINGLE(...)``): of a
    reference the cell in the formula's row or column, of an array its first element.

    >>> from cellfuncs.formula import compute
    >>> compute("=SINGLE({7,8,9})")
    7.0
    """
    return implicit_value(node, context)


@reference_builtin("ANCHORARRAY", 1, 1)
def anchorarray(context: Context, anchor: Node) -> Ref | CellError:
    """The spill operator ``A1#`` (the file writes ``ANCHORARRAY(A1)``): the whole range the
    formula in the cell spilled over; #REF! where it holds no spilled array.

    >>> from cellfuncs.formula import compute
    >>> compute("=SUM(ANCHORARRAY(A1))").code
    '#REF!'
    """
    found = required_reference(context, anchor)
    if type(found) is CellError:
        return found
    spilled = getattr(context, "spill_reference", None)
    return CellError(REF, "the formula has no workbook") if spilled is None else spilled(found.sheet, found.ref)


@reference_builtin("OFFSET", 3, 5)
def offset(context: Context, base: Node, rows: Node, cols: Node, height: Node | None = None,
           width: Node | None = None) -> Ref | CellError:
    """The reference ``rows`` down and ``cols`` right of a reference, ``height`` rows by
    ``width`` columns (by default the base's size), each truncated (a size under 1 is 1);
    off the sheet it is #REF!.

    >>> from cellfuncs.formula import compute
    >>> compute("=OFFSET({1,2},1,1)").code
    '#VALUE!'
    """
    found = found_reference(context, base)
    if found is None:
        return CellError(VALUE, "OFFSET's first argument must be a reference")
    if type(found) is CellError:
        return found
    bounds = getattr(context, "bounds", None)
    if bounds is None:
        return CellError(VALUE, "the formula has no workbook")
    b = bounds(found.sheet, found.ref)
    if type(b) is CellError:
        return b
    r1, c1, r2, c2 = b
    numbers = []
    for node, default in ((rows, 0.0), (cols, 0.0), (height, float(r2 - r1 + 1)), (width, float(c2 - c1 + 1))):
        if node is None or type(node) is Missing:
            numbers.append(default)
            continue
        # a legacy formula intersects a range given as a number (Excel's stored values)
        legacy = getattr(context, "implicit", False) and is_reference(node)
        v = intersect(node, context) if legacy else evaluate(node, context)
        if type(v) is np.ndarray:
            return CellError(VALUE, "OFFSET takes single numbers for its offsets and size")
        x = to_number(v)
        if type(x) is CellError:
            return x
        # a size between 0 and 1 is one row or column (Excel's stored value for a width of 0.9)
        numbers.append(1.0 if len(numbers) >= 2 and 0.0 < x < 1.0 else float(int(x)))
    down, right, h, w = (int(x) for x in numbers)
    if h == 0 or w == 0:
        return CellError(REF, "OFFSET's height and width must not be 0")
    top, left = r1 + down, c1 + right
    bottom, last = top + h - 1 if h > 0 else top, left + w - 1 if w > 0 else left
    if h < 0:
        top, bottom = top + h + 1, top
    if w < 0:
        left, last = left + w + 1, left
    if top < 1 or left < 1 or bottom > MAX_ROW or last > MAX_COL:
        return CellError(REF, "OFFSET's result is off the sheet")
    return anchored(found.sheet, top, left, bottom, last)


def _choose_value(context: Context, index: Node, *options: Node) -> Value:
    """CHOOSE's value: the ``index``-th option (1-based, truncated); only the chosen one is
    evaluated; an array of indexes chooses for each.

    >>> from cellfuncs.formula import compute
    >>> compute("=CHOOSE(2.9, 10, 20, 30)"), compute("=CHOOSE(4, 1, 2)").code
    (20.0, '#VALUE!')
    """
    i = evaluate(index, context)

    def pick(x) -> Value:
        chosen = _chosen(x, options)
        if type(chosen) is CellError:
            return chosen
        return 0.0 if type(chosen) is Missing else evaluate(chosen, context)

    if type(i) is np.ndarray:
        return map_values(lambda x: _scalar(pick(x)), i)
    return pick(i)


def _chosen(x: object, options: tuple[Node, ...]) -> Node | CellError:
    n = to_number(x)
    if type(n) is CellError:
        return n
    k = int(n)
    if not 1 <= k <= len(options):
        return CellError(VALUE, f"CHOOSE has no option {k}")
    return options[k - 1]


@reference_builtin("CHOOSE", 2, 255, value=_choose_value)
def choose(context: Context, index: Node, *options: Node) -> Ref | CellError | None:
    """CHOOSE of options written as references is the chosen reference, as in Excel
    (``SUM(A1:CHOOSE(2, B1, B9))``, ``CHOOSE(1, A1, B1):C3``); else its value (None here)."""
    i = evaluate(index, context)
    if type(i) is np.ndarray:
        return None
    chosen = _chosen(i, options)
    return chosen if type(chosen) is CellError else found_reference(context, chosen, several=True)


def _scalar(v: Value):
    return v[0, 0] if type(v) is np.ndarray else v


@builtin("TRANSPOSE", 1, arrays=(0,))
def transpose(array: Value) -> Value:
    """Rows as columns.

    >>> transpose(5.0)
    5.0
    """
    if type(array) is not np.ndarray:
        return array
    return np.ascontiguousarray(array.T)
