"""One workbook, start to end: open defensively, read, recalculate, compare, write.

>>> import os, tempfile
>>> path = os.path.join(tempfile.mkdtemp(), "bad.xlsx")
>>> _ = open(path, "wb").write(b"not a zip")
>>> recalc_file(path).refused
'not a zip package (.xlsx/.xlsm)'
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

from ..errors import CellError
from .engine import Recalc
from .model import load
from .package import Package, Refused
from .report import differences


@dataclass
class Outcome:
    path: str
    refused: str | None = None
    cells: int = 0
    errors: list[tuple[str, CellError]] = field(default_factory=list)
    differences: list[tuple[str, str, str]] = field(default_factory=list)
    written: str | None = None


def pack_functions() -> dict[str, Callable]:
    """The pack's sheet functions by name, as the engine calls them."""
    from ..sheet import FUNCTIONS

    return {name: entry.call for name, entry in FUNCTIONS.items()}


def recalc_file(path: str, dest: str | None = None, check: bool = False, tolerance: float = 1e-9,
                progress: Callable[[int, int], None] | None = None) -> Outcome:
    """Recalculate the workbook at ``path``; write it to ``dest`` (which may be ``path``) if given.

    A refused file gives an Outcome with ``refused`` set and nothing written. Other
    failures raise (the caller reports them as internal errors).
    """
    outcome = Outcome(path)
    pkg = None
    try:
        pkg = Package(path)
        book = load(pkg)
        pkg.validate(book.parsed)
        engine = Recalc(book, pack_functions(), progress)
        engine.run()
        outcome.cells = len(engine.cells)
        outcome.errors = list(engine.error_cells())
        if check:
            outcome.differences = differences(engine, book, tolerance)
        if dest is not None:
            from .writer import plan
            from .zipout import write_package

            replaced, removed, added = plan(pkg, book, engine)
            write_package(pkg, dest, replaced, removed, added)
            outcome.written = dest
    except Refused as exc:
        outcome.refused = str(exc)
    finally:
        if pkg is not None:
            pkg.close()
    return outcome
