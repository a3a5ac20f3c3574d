"""Cell error values: an Excel error code plus a plain-language reason.

An error is a value, not an exception: functions return :class:`CellError`
elements inside their results, formulas propagate them, and IFERROR catches them.

>>> e = CellError(NUM, "50 Pa is below the triple-point pressure of water")
>>> str(e)
'#NUM! 50 Pa is below the triple-point pressure of water'
>>> parse_error_text("#N/A") == CellError(NA, "")
True
"""

from __future__ import annotations

from typing import NamedTuple

NULL = "#NULL!"
DIV0 = "#DIV/0!"
VALUE = "#VALUE!"
REF = "#REF!"
NAME = "#NAME?"
NUM = "#NUM!"
NA = "#N/A"
SPILL = "#SPILL!"
CALC = "#CALC!"

CODES = (NULL, DIV0, VALUE, REF, NAME, NUM, NA, SPILL, CALC)


class CellError(NamedTuple):
    """An error value as a cell holds it; ``reason`` is for people, ``code`` for Excel."""

    code: str
    reason: str = ""

    def __str__(self) -> str:
        return f"{self.code} {self.reason}" if self.reason else self.code


def parse_error_text(text: str) -> CellError | None:
    """The error a cell text such as ``"#NUM! reason"`` stands for, else ``None``."""
    for code in CODES:
        if text == code or text.startswith(code + " "):
            return CellError(code, text[len(code) + 1 :])
    return None
