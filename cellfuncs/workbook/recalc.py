"""One workbook, start to end: open defensively, read, recalculate, compare, write.

>>> import os, tempfile
>>> path = os.path.join(tempfile.mkdtemp(), "bad.xlsx")
>>> _ = open(path, "wb").write(b"not a zip")
>>> recalc_file(path).refused
'not a zip package (.xlsx/.xlsm)'
"""

from __future__ import annotations

import gc
import os
from contextlib import contextmanager
from dataclasses import dataclass, field
from datetime import datetime
from typing import Callable, Iterator, NamedTuple

from ..errors import CellError
from ..formula.clock import fixed
from .engine import Recalc
from .limits import DEFAULTS, Limits
from .model import load
from .package import Package, Refused
from .report import differences
from .volatile import volatile_cells


@dataclass
class Outcome:
    path: str
    refused: str | None = None
    cells: int = 0
    errors: list[tuple[str, CellError]] = field(default_factory=list)
    differences: list[tuple[str, str, str]] = field(default_factory=list)
    written: str | None = None
    unwritten: str | None = None  # why the output could not be written (the input is untouched)


def pack_functions() -> dict[str, Callable]:
    """The pack's sheet functions by name, as the engine calls them."""
    from ..sheet import FUNCTIONS

    return {name: entry.call for name, entry in FUNCTIONS.items()}


def in_place_target(path: str, split_links: bool = False) -> str:
    """The file ``--in-place`` replaces for ``path``: the target of a symbolic link (replacing
    the link would leave the target as it was); refused if other hard links share it, since
    an atomic replace gives this name a new file and leaves them the old one."""
    target = os.path.realpath(path)
    try:
        links = os.stat(target).st_nlink
    except OSError:
        return target  # opening it reports why
    if links > 1 and not split_links:
        raise Refused(f"{links} hard links share this file; replacing it would leave the other names with the old "
                      "content (--split-hard-links replaces it anyway)")
    return target


def unwritable(error: OSError) -> str:
    """An output-side operating-system error in words."""
    reason = error.strerror or str(error) or type(error).__name__
    where = error.filename if isinstance(error.filename, str) else None
    return f"{reason} ({where})" if where else reason


class Volatility(NamedTuple):
    """How volatile functions behave: ``now`` pins NOW and TODAY, ``seed`` the random numbers
    of RAND and its kin (each workbook starts from it), and ``compared`` False leaves the
    cells that depend on them out of ``--check`` (see :mod:`.volatile`)."""

    now: datetime | None = None
    seed: int | None = None
    compared: bool = True


@contextmanager
def _no_collection_while_setting_up(active: bool) -> Iterator[Callable[[], None]]:
    """Yield ``done``, to be called once reading and set-up are over. Until then, with ``active``,
    the cyclic garbage collector is off: the reader and the engine make hundreds of thousands of
    objects that live to the end, and each automatic full collection would walk them all again.
    ``done`` freezes them out of later collections and turns the collector back on for evaluation,
    whose garbage is the formulas' doing. They stay frozen after the return: the process ends soon
    after (the collection Python runs at exit would walk them once more), or the next workbook's
    set-up unfreezes and collects them first. Process-wide, so for the command line's process only."""
    was_enabled = gc.isenabled()
    if not active:
        yield lambda: None
        return
    if gc.get_freeze_count():
        gc.unfreeze()
        gc.collect()

    def done() -> None:
        gc.freeze()
        if was_enabled:
            gc.enable()

    gc.disable()
    try:
        yield done
    finally:
        if was_enabled:
            gc.enable()


def recalc_file(path: str, dest: str | None = None, check: bool = False, tolerance: float = 1e-9,
                progress: Callable[[int, int], None] | None = None, limits: Limits = DEFAULTS,
                split_links: bool = False, volatility: Volatility | None = None,
                quiet_set_up: bool = False) -> Outcome:
    """Recalculate the workbook at ``path``; write it to ``dest`` if given (``dest == path``:
    in place, to the file :func:`in_place_target` names). ``quiet_set_up`` keeps the garbage
    collector out of reading and set-up (process-wide: see :func:`_no_collection_while_setting_up`).

    A refused file gives an Outcome with ``refused`` set and nothing written; an output the
    operating system would not take (disk full, read-only, a folder in the way) one with
    ``unwritten`` set. Other failures raise (the caller reports them as internal errors).
    """
    outcome = Outcome(path)
    pkg = None
    with _no_collection_while_setting_up(quiet_set_up) as set_up_done:
        try:
            if dest == path:
                dest = in_place_target(path, split_links)
            if dest is not None and os.path.isdir(dest):
                outcome.unwritten = "the destination is a folder"
                return outcome
            pkg = Package(path)
            book = load(pkg)
            pkg.validate(book.parsed)
            volatility = volatility or Volatility()
            engine = Recalc(book, pack_functions(), progress, limits)
            set_up_done()
            with fixed(volatility.now, volatility.seed):
                engine.run()
            outcome.cells = len(engine.cells)
            outcome.errors = list(engine.error_cells())
            if check:
                skipped = set() if volatility.compared else volatile_cells(engine)
                outcome.differences = differences(engine, book, tolerance, skipped)
            if dest is not None:
                from .writer import plan
                from .zipout import write_package

                replaced, removed, added = plan(pkg, book, engine)
                try:
                    write_package(pkg, dest, replaced, removed, added)
                except OSError as exc:
                    outcome.unwritten = unwritable(exc)
                else:
                    outcome.written = dest
        except Refused as exc:
            outcome.refused = str(exc)
        finally:
            if pkg is not None:
                pkg.close()
    return outcome
