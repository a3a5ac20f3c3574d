"""Cell error values: an Excel error code plus a plain-language reason.

An error is a value, not an exception: functions return :class:`CellError`
elements inside their results, formulas propagate them, and IFERROR catches them.

>>> e = CellError(NUM, "50 Pa is below the triple-point pressure of water")
>>> str(e)
'#NUM! 50 Pa is below the triple-point pressure of water'
>>> parse_error_text("#N/A") == CellError(NA, "")
True

An exception inside the pack is a bug. Where a cell is computed it becomes
``#VALUE! internal error: ...`` so that one bad cell never stops a sheet, except
under the strict switch (the environment variable CELLFUNCS_STRICT=1, which the
test suite sets), where it is raised so that the bug fails loudly.
"""

from __future__ import annotations

import os
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


STRICT_VARIABLE = "CELLFUNCS_STRICT"
_REASON_LENGTH = 200  # an exception's text can be as long as the input that caused it


def strict() -> bool:
    """Whether unexpected exceptions are raised rather than returned as ``#VALUE! internal error``."""
    return os.environ.get(STRICT_VARIABLE, "").strip() not in ("", "0")


def internal_error(exc: BaseException, where: str) -> CellError:
    """The error value shown for an unexpected exception raised in ``where`` (outside strict mode).

    >>> str(internal_error(ZeroDivisionError("float division by zero"), "BOIL_TEMP"))
    '#VALUE! internal error: ZeroDivisionError: float division by zero (in BOIL_TEMP)'
    """
    text = f"{type(exc).__name__}: {exc}"
    if len(text) > _REASON_LENGTH:
        text = text[:_REASON_LENGTH] + "..."
    return CellError(VALUE, f"internal error: {text} (in {where})")
