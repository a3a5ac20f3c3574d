"""Built-in functions about cells rather than their values: ADDRESS, FORMULATEXT, ISFORMULA,
ISREF.

FORMULATEXT and ISFORMULA ask the context for a cell's formula (``formula_text(sheet, ref)``,
as the formula bar shows it); a context without a workbook has none.

>>> compute("=ADDRESS(2, 3)"), compute('=ADDRESS(2, 3, 4, FALSE, "My sheet")'), compute("=ISREF(1)")
('$C$2', "'My sheet'!R[2]C[3]", False)
"""

from __future__ import annotations

import re

from ..errors import NA, VALUE, CellError
from .a1 import MAX_COL, MAX_ROW, column_letters
from .arrays import Value, elementwise
from .coerce import to_bool, to_number, to_text
from .evaluate import Context, builtin, compute  # noqa: F401  (compute: doctests)
from .fn_reference import found_reference, required_reference
from .nodes import Node, Scalar

# A sheet name ADDRESS writes without quotes, after a workbook's name in brackets or not
# (Excel's stored value for "[Book1]Sheet1" is [Book1]Sheet1!$C2)
_PLAIN_SHEET = re.compile(r"(?:\[[^\]']+\])?[A-Za-z_][A-Za-z0-9_.]*\Z")


@builtin("ADDRESS", 2, 5)
@elementwise
def address(row: Scalar, col: Scalar, abs_num: Scalar = 1.0, a1: Scalar = True, sheet: Scalar = None) -> Scalar:
    """The text of a cell reference from its row and column numbers: ``abs_num`` 1 absolute
    ($A$1), 2 absolute row (A$1), 3 absolute column ($A1), 4 relative (A1); ``a1`` FALSE
    gives R1C1 style; ``sheet_text`` is put in front.

    >>> compute("=ADDRESS(2, 3, 2)"), compute("=ADDRESS(2, 3, 1, FALSE)")
    ('C$2', 'R2C3')
    """
    parts = [to_number(v) for v in (row, col, 1.0 if abs_num is None else abs_num)]
    style = to_bool(True if a1 is None else a1)
    name = None if sheet is None else to_text(sheet)
    for v in (*parts, style, name):
        if type(v) is CellError:
            return v
    r, c, kind = (int(v) for v in parts)
    if not (1 <= r <= MAX_ROW and 1 <= c <= MAX_COL) or kind not in (1, 2, 3, 4):
        return CellError(VALUE, "ADDRESS takes a row 1-1048576, a column 1-16384 and abs_num 1-4")
    row_fixed, col_fixed = kind in (1, 2), kind in (1, 3)
    if style:
        text = f"{'$' if col_fixed else ''}{column_letters(c)}{'$' if row_fixed else ''}{r}"
    else:
        text = f"R{r if row_fixed else f'[{r}]'}C{c if col_fixed else f'[{c}]'}"
    if name is None:
        return text
    if _PLAIN_SHEET.match(name) or not name:
        return f"{name}!{text}"
    return "'" + name.replace("'", "''") + "'!" + text


def _formula(context: Context, node: Node) -> str | None | CellError:
    found = required_reference(context, node)
    if type(found) is CellError:
        return found
    text = getattr(context, "formula_text", None)
    return CellError(NA, "the formula has no workbook") if text is None else text(found.sheet, found.ref)


@builtin("FORMULATEXT", 1, lazy=True, place_only=True)
def formulatext(context: Context, node: Node) -> Value:
    """The formula of the first cell of a reference as text, as the formula bar shows it;
    #N/A for a cell without a formula.

    >>> compute("=FORMULATEXT(A1)").code
    '#N/A'
    """
    text = _formula(context, node)
    if text is None:
        return CellError(NA, "the cell holds no formula")
    return text


@builtin("ISFORMULA", 1, lazy=True, place_only=True)
def isformula(context: Context, node: Node) -> Value:
    """TRUE when the first cell of a reference holds a formula.

    >>> compute("=ISFORMULA(1)").code
    '#VALUE!'
    """
    text = _formula(context, node)
    if type(text) is CellError and text.code != NA:
        return text
    return type(text) is str


@builtin("ISREF", 1, lazy=True, place_only=True)
def isref(context: Context, node: Node) -> Value:
    """TRUE when the argument is a reference (written as one, a defined name standing for
    one, or a function's reference such as OFFSET's).

    >>> compute("=ISREF(A1)"), compute('=ISREF("A1")')
    (True, False)
    """
    found = found_reference(context, node, several=True)
    return found is not None and type(found) is not CellError
