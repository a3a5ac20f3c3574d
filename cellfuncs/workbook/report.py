"""What a recalculation tells its user: differences from the cached values, value texts,
and a progress bar on a terminal.

>>> same(1.0, 1.0 + 1e-12, 1e-9), same("a", "A", 1e-9), same(None, 0.0, 1e-9)
(True, False, False)
>>> show(2.0), show(0.1), show(True), show("a\\tb"), show(None)
('2', '0.1', 'TRUE', 'a\\\\tb', '(none)')
>>> print(escaped("one\\nrecalc: forged\\x1b[2K\\u2028"))
one\\nrecalc: forged\\x1b[2K\\u2028
"""

from __future__ import annotations

import os
import re
import sys
import time
from typing import TextIO

from ..errors import CellError
from .engine import Recalc
from .model import Book
from .refs import Area


def same(cached: object, computed: object, rel: float, absolute: float = 0.0) -> bool:
    """Whether a cached value matches the computed one, the one rule of ``recalc --check`` and
    of the conformance runner: numbers within ``rel`` relative (the caller's choice: ``--check``'s
    ``--tolerance``, the runner's 1e-9 or 1e-7 for functions Excel solves by iteration) or
    within ``absolute`` (0 for ``--check``; the runner's 1e-12, for results that are 0 but for
    rounding), text exactly, errors by code (#CALC! and #SPILL! are read from the rich values
    Excel, and this engine, store them in); a missing cached value never matches.

    >>> same(CellError("#VALUE!"), CellError("#CALC!"), 1e-9), same(CellError("#CALC!"), CellError("#CALC!", "x"), 1e-9)
    (False, True)
    >>> same(0.0, 1e-13, 1e-9), same(0.0, 1e-13, 1e-9, absolute=1e-12)
    (False, True)
    """
    if cached is None:
        return False
    if computed is None:
        computed = 0.0
    tc, tv = type(cached), type(computed)
    if tc is float and tv is float:
        diff = abs(cached - computed)
        return diff <= absolute or diff <= rel * max(abs(cached), abs(computed))
    if tc is CellError and tv is CellError:
        return cached.code == computed.code
    return tc is tv and cached == computed


# Control characters (C0, DEL, C1) and the Unicode line and paragraph separators: a text from a
# workbook shown with one of them could end its line and write one of its own (a forged summary)
_UNSAFE = re.compile("[\\\\\x00-\x1f\x7f-\x9f\u2028\u2029]")
_NAMED = {"\\": "\\\\", "\n": "\\n", "\r": "\\r", "\t": "\\t"}


def escaped(text: str) -> str:
    """``text`` safe to print on one line: backslashes doubled, control characters and line
    separators written as escapes (``\\n``, ``\\x1b``, ``\\u2028``)."""
    return _UNSAFE.sub(_escape, text)


def _escape(m: re.Match) -> str:
    ch = m.group()
    return _NAMED.get(ch) or ("\\x%02x" % ord(ch) if ord(ch) < 256 else "\\u%04x" % ord(ch))


def show(v: object) -> str:
    """A value as one field of a tab-separated line."""
    if v is None:
        return "(none)"
    if type(v) is bool:
        return "TRUE" if v else "FALSE"
    if type(v) is CellError:
        return v.code
    if type(v) is float:
        return "%d" % v if v.is_integer() and abs(v) < 1e15 else repr(v)
    return escaped(str(v))


def _shape(a: Area | None) -> str:
    h, w = a.shape if a is not None else (1, 1)
    return f"{h}x{w}"


def differences(engine: Recalc, book: Book, rel: float, skipped: set[int] = frozenset()) -> list[tuple[str, str, str]]:
    """(``Sheet!A1``, cached, computed) of every cell whose cached value differs from the
    recalculated one (formula cells in ``skipped`` left out); a spill that changed size is
    one line for its anchor."""
    out = []
    order = sorted((fi for fi in range(len(engine.cells)) if fi not in skipped),
                   key=lambda fi: (engine.cells[fi].sheet, engine.cells[fi].row, engine.cells[fi].col))
    for fi in order:
        fc = engine.cells[fi]
        scan = book.sheets[fc.sheet].scan
        old, new = fc.old_area, engine.spills.get(fi)
        if _shape(old) != _shape(new):
            out.append((engine.where(fi), f"spill {_shape(old)}", f"spill {_shape(new)}"))
            continue
        cached = scan.formulas[(fc.row, fc.col)].cached
        if not same(cached, engine.result[fi], rel):
            out.append((engine.where(fi), show(cached), show(engine.result[fi])))
        if new is None:
            continue
        stored, values = engine.stored[fc.sheet], engine.values[fc.sheet]
        for r in range(new.r1, new.r2 + 1):
            for c in range(new.c1, new.c2 + 1):
                if (r, c) != (fc.row, fc.col) and not same(stored.get((r, c)), values.get((r, c)), rel):
                    out.append((engine.where(fi, r, c), show(stored.get((r, c))), show(values.get((r, c)))))
    return out


class Progress:
    """A one-line progress bar on standard error: only on a terminal, never when the
    environment variable CI is set, and only for several files or a run past one second."""

    WIDTH = 30

    def __init__(self, files: int, stream: TextIO | None = None):
        self.stream = stream or sys.stderr
        self.enabled = self.stream.isatty() and not os.environ.get("CI")
        self.files = files
        self.started = time.monotonic()
        self.last = 0.0
        self.shown = False
        self.index, self.name = 0, ""

    def file(self, index: int, name: str) -> None:
        """A new file begins: the next update draws at once."""
        self.index, self.name = index, name
        self.last = 0.0

    def update(self, done: int, total: int) -> None:
        if not self.enabled:
            return
        now = time.monotonic()
        if (self.files < 2 and now - self.started < 1.0) or now - self.last < 0.1:
            return
        self.last = now
        part = done / total if total else 0.0
        filled = int(self.WIDTH * (self.index + part) / self.files)
        cells = f" {done}/{total} cells" if total else ""
        self.stream.write(f"\r[{'#' * filled:<{self.WIDTH}}] {self.index + 1}/{self.files} {escaped(self.name)}{cells}\x1b[K")
        self.stream.flush()
        self.shown = True

    def clear(self) -> None:
        if self.shown:
            self.stream.write("\r\x1b[K")
            self.stream.flush()
            self.shown = False
