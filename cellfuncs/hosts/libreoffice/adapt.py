"""Calc's argument values to the pack's, and the pack's results to Calc's.

What Calc passes to an ``any`` argument: a number (float), a text, a range as a tuple of
row tuples (blank cells inside it as ''), None for an omitted argument, and 0.0 for a
reference to a single blank cell (an add-in cannot tell that from a typed 0). The pack's
engine passes a blank cell as None, which a text argument (substance, unit, phase word,
boundary, solid, field) reads as 'not given'; so a 0.0 there is taken as blank, as no
number is a valid text argument. A blank cell given for a number stays 0 in Calc.

A result goes back as a tuple of row tuples (numbers and texts); an error value as the
NaN that Calc reads as an error: its low 32 bits hold Calc's error number.
"""

from __future__ import annotations

import struct
from typing import Any

import numpy as np

from ...errors import CALC, DIV0, NA, NAME, NULL, NUM, REF, SPILL, VALUE, CellError

# Calc's error numbers (FormulaError in LibreOffice's formula/errorcodes.hxx, from memory of
# that header); Calc shows and exports them as the Excel codes. Calc has no #SPILL! or #CALC!:
# those become #VALUE! in Calc.
CALC_ERRORS = {NULL: 521, DIV0: 532, VALUE: 519, REF: 524, NAME: 525, NUM: 503, NA: 0x7FFF}
EXCEL_CODES = {number: code for code, number in CALC_ERRORS.items()}
_FALLBACK = {SPILL: VALUE, CALC: VALUE}

# arguments the pack reads as a single text or a name; every other argument is a number
TEXT_ARGUMENTS = frozenset({"substance", "boundary", "phase", "phase_from", "phase_to", "solid", "which", "field"})


def is_text_argument(name: str) -> bool:
    return name in TEXT_ARGUMENTS or name.endswith("unit")


def error_value(error: CellError) -> float:
    """The NaN that Calc reads as this error (quiet NaN, error number in the low bits)."""
    number = CALC_ERRORS[_FALLBACK.get(error.code, error.code)]
    return struct.unpack("<d", struct.pack("<Q", 0x7FF8000000000000 | number))[0]


def argument(value: Any, text: bool) -> Any:
    """One argument as Calc passed it, as the pack's functions take it."""
    if isinstance(value, tuple):
        return np.array([list(row) for row in value], dtype=object)
    if text and type(value) is float and value == 0.0:
        return None
    return value


def cell(value: Any) -> Any:
    """One result value as Calc takes it back from a function that returns one value."""
    if isinstance(value, CellError):
        return error_value(value)
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    return "" if value is None else str(value)


def result(value: Any) -> tuple[tuple[Any, ...], ...]:
    """A pack result as the rows Calc takes back (a single value as one row of one)."""
    if isinstance(value, np.ndarray):
        rows = value.reshape((1, -1)) if value.ndim < 2 else value
        return tuple(tuple(cell(v) for v in row) for row in rows.tolist())
    return ((cell(value),),)
