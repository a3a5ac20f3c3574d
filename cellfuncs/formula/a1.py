"""Column letters and numbers of A1 notation, and the size of Excel's sheet (the formula
engine and the workbook layer both use them).

>>> column_number("XFD"), column_letters(28)
(16384, 'AB')
"""

from __future__ import annotations

from functools import lru_cache

MAX_ROW = 1048576
MAX_COL = 16384


@lru_cache(maxsize=20000)
def column_number(letters: str) -> int:
    """``A`` is 1, ``AA`` 27 (cached: a workbook names few columns, each in many references)."""
    n = 0
    for ch in letters.upper():
        n = 26 * n + ord(ch) - 64
    return n


@lru_cache(maxsize=20000)
def column_letters(n: int) -> str:
    """The letters of column ``n``."""
    out = ""
    while n:
        n, rest = divmod(n - 1, 26)
        out = chr(65 + rest) + out
    return out
