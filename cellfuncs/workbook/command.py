"""``cellfuncs recalc``: recalculate workbooks without Excel.

Standard output carries the differences of ``--check``, one per line
(``file<TAB>Sheet!A1<TAB>cached<TAB>computed``); standard error the refused files, the
error cells with their reasons and a summary line. Every text from a workbook is printed
with its control characters escaped, so no cell can start a line of its own. The exit
status is the highest over all files (see :data:`EXIT_CODES`).
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time
from datetime import datetime
from typing import TYPE_CHECKING, Callable, Iterator, Sequence

from ..formula.budget import MAX_FORMULA_TEXT, MAX_TEXT
from .limits import DEFAULTS, FIELDS, Limits, option
from .package import MAX_MEMBERS, MAX_RATIO, MAX_TOTAL, RATIO_FLOOR
from .report import escaped
from .sheetxml import MAX_CELLS, MAX_FORMULAS

if TYPE_CHECKING:
    from .recalc import Outcome, Volatility

MAX_LISTED = 200  # error cells listed per file; the count covers them all

EXIT_CODES = {
    0: "every file recalculated without an error cell (with --check: without a difference)",
    1: "an error cell (with --check: a cached value that differs from the recalculated one)",
    2: "a usage problem, or a refused file (nothing written for it)",
    3: "an internal failure (a bug; the file is left as it was)",
    4: "an output could not be written (disk full, read-only file system, no permission, --out\n"
       "     under a file, a folder where the output goes); the input is left as it was",
}

DESCRIPTION = (
    "Recalculate every formula of .xlsx/.xlsm workbooks with the pack's functions and the built-ins, in "
    "dependency order, and store the results as the cells' cached values: formulas, styles, charts and every "
    "other part stay as they are. Without --out or --in-place nothing is written (a dry run)."
)

LIMIT_HELP = {
    "array_cells": "cells of one array a formula builds: a range it reads (whole columns and rows cut to the "
                   "used range), the result of an operator or function over arrays (a column against a row is "
                   "a table), a spill; over it the cell is #NUM! naming the limit",
    "formula_work": "cells of all the arrays one formula (or defined name) builds while it is evaluated; "
                    "over it the cell is #NUM! naming the limit",
    "workbook_work": "cells of all the arrays all the formulas of one workbook build; past it the formulas "
                     "still to come are #NUM! naming the limit",
    "spill_cells": "cells the array formulas and spills of one workbook cover: stored array-formula ranges "
                   "beyond it refuse the file, a spill that would pass it is #SPILL!",
    "dependencies": "dependencies between the formulas, names and ranges of one workbook (each counted "
                    "before it is followed); beyond it the file is refused",
}

LIMITS = f"""\
Refused files (exit 2, nothing written): not a regular file (a named pipe or a device);
not a zip, or a damaged zip directory; an OLE compound file (how Excel stores an encrypted
workbook); corrupt XML; XML with a DTD or an entity declaration; a part that is edited in an
encoding other than UTF-8 or UTF-16 (UTF-16 parts are written back in UTF-16); more than
{MAX_TOTAL // 2**20} MiB expanded in total; a member above {RATIO_FLOOR // 2**20} MiB compressed more than {MAX_RATIO}:1; more than
{MAX_MEMBERS:,} zip members; more than {MAX_FORMULAS:,} formula cells or {MAX_CELLS:,} cells; a cell or a used
range beyond Excel's limits (XFD1048576); array formulas whose stored ranges overlap or cover
more than --max-spill-cells; more dependencies than --max-dependencies; with --in-place, a
file with other hard links (unless --split-hard-links). --in-place writes through a symbolic
link to its target.

Limits on the work one workbook may ask for, counted before the work is done (the options
above raise them): {DEFAULTS.array_cells:,} cells per array, {DEFAULTS.formula_work:,} array cells per formula,
{DEFAULTS.workbook_work:,} per workbook, {DEFAULTS.spill_cells:,} spilled cells per workbook,
{DEFAULTS.dependencies:,} dependencies per workbook. Texts
longer than {MAX_TEXT:,} characters and formulas longer than {MAX_FORMULA_TEXT:,} are errors (Excel's limits);
stored numbers that are not finite (NaN, INF, 1e999) are #NUM!.

Values: a circular reference is #CALC! naming the loop; functions the engine lacks are
#NAME?; references to other workbooks and DDE links are #REF!; an array result spills as an
Excel 365 dynamic array (#SPILL! when cells are in the way). The calculation chain
(xl/calcChain.xml) is dropped; docProps/custom.xml records the engine (RecalcEngine,
RecalcEngineVersion). Error cells are listed on standard error, at most {MAX_LISTED} per file.
Temporary files (.NAME.cellfuncs-HOST-PID-XXXX.tmp beside the output) of runs that were
killed are removed by the next run writing the same file.

Exit status (the highest over all files):
""" + "\n".join(f"  {code}  {text}" for code, text in EXIT_CODES.items())


def _count(text: str) -> int:
    """A limit given on the command line: a whole number of at least 1 (1_000_000 and 1e6 accepted)."""
    try:
        value = float(text.replace("_", "").replace(",", ""))
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not (math.isfinite(value) and value >= 1 and value == int(value)):
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of at least 1")
    return int(value)


def _shard(text: str) -> tuple[int, int]:
    """--shard K/N: whole numbers with 1 <= K <= N."""
    k, slash, n = text.partition("/")
    try:
        share, shares = int(k), int(n)
    except ValueError:
        share = shares = 0
    if not slash or not 1 <= share <= shares:
        raise argparse.ArgumentTypeError(f"{text!r} is not K/N with 1 <= K <= N (for example 2/4)")
    return share, shares


WORKBOOK_SUFFIXES = (".xlsx", ".xlsm")


def workbook_list(paths: Sequence[str], shard: tuple[int, int] | None = None) -> list[str]:
    """The files a command line names: files as given, folders as their workbooks in all subfolders
    (sorted by path, Excel's lock files ``~$…`` left out); with ``shard`` (K, N) every N-th from the K-th.
    The order is fixed by the names alone, so N machines given the same list share it without overlap."""
    files: list[str] = []
    for path in paths:
        if not os.path.isdir(path):
            files.append(path)
            continue
        found = []
        for folder, _, names in os.walk(path):
            found += [os.path.join(folder, name) for name in names
                      if name.lower().endswith(WORKBOOK_SUFFIXES) and not name.startswith("~$")]
        files += sorted(found)
    if shard is not None:
        share, shares = shard
        files = files[share - 1::shares]
    return files


def add_arguments(parser) -> None:
    """The options of ``cellfuncs recalc``."""
    parser.add_argument("workbooks", nargs="+", metavar="WORKBOOK",
                        help=".xlsx or .xlsm files, or folders (their workbooks, in all subfolders, by name)")
    where = parser.add_mutually_exclusive_group()
    where.add_argument("--out", metavar="DIR", help="write DIR/<same file name> (DIR is created if missing)")
    where.add_argument("--in-place", action="store_true", help="replace each input (atomically)")
    parser.add_argument("--check", action="store_true",
                        help="write nothing; compare the cached values with recalculated ones (exit 1 on a difference)")
    parser.add_argument("--tolerance", type=float, default=1e-9, metavar="REL",
                        help="relative tolerance of --check for numbers (default 1e-9)")
    parser.add_argument("--split-hard-links", action="store_true",
                        help="with --in-place, replace a file that other hard links share too (they keep the old "
                             "content)")
    parser.add_argument("--jobs", type=_count, default=None, metavar="N",
                        help="recalculate N workbooks at a time, each in its own process (default: one per core)")
    parser.add_argument("--shard", type=_shard, default=None, metavar="K/N",
                        help="take only the K-th of N equal shares of the workbooks (every N-th, from the K-th), "
                             "so that N machines share a list")
    volatile = parser.add_argument_group("volatile functions (NOW, TODAY, RAND, RANDBETWEEN, RANDARRAY)")
    volatile.add_argument("--now", type=_moment, default=None, metavar="YYYY-MM-DDTHH:MM",
                          help="the moment NOW and TODAY report (default: the clock), for results that repeat")
    volatile.add_argument("--seed", type=int, default=None, metavar="N",
                          help="start the random numbers of every workbook from N (default: fresh each run)")
    volatile.add_argument("--ignore-volatile", action="store_true",
                          help="with --check, leave out the cells that depend on a volatile function")
    limits = parser.add_argument_group("limits on the work a workbook may ask for")
    for name in FIELDS:
        default = getattr(DEFAULTS, name)
        limits.add_argument(option(name), dest=name, type=_count, default=default, metavar="N",
                            help=f"{LIMIT_HELP[name]} (default {default:,})")


def _moment(text: str) -> datetime:
    try:
        return datetime.fromisoformat(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a date and time such as 2024-01-02T08:30") from None


def volatility_of(args: argparse.Namespace) -> Volatility:
    """How the command line asks volatile functions to behave."""
    from .recalc import Volatility  # pylint: disable=import-outside-toplevel

    return Volatility(args.now, args.seed, not args.ignore_volatile)


def limits_of(args: argparse.Namespace) -> Limits:
    """The limits the command line asks for."""
    return Limits(**{name: getattr(args, name) for name in FIELDS})


def _usage(message: str) -> int:
    print(f"cellfuncs recalc: {escaped(message)}", file=sys.stderr)
    return 2


def _destinations(paths: Sequence[str], out: str | None, in_place: bool) -> list[str | None] | str:
    """Where each workbook goes, or the usage problem."""
    seen: dict[str, str] = {}
    for path in paths:
        name = os.path.normcase(os.path.basename(os.path.abspath(path)))
        if name in seen:
            return f"{seen[name]} and {path} have the same file name"
        seen[name] = path
    if in_place:
        targets: dict[str, str] = {}
        for path in paths:
            target = os.path.realpath(path)
            if target in targets:
                return f"{targets[target]} and {path} are the same file"
            targets[target] = path
        return list(paths)
    if out is None:
        return [None] * len(paths)
    if os.path.exists(out) and not os.path.isdir(out):
        return f"--out {out} is not a folder"
    dests = [os.path.join(out, os.path.basename(os.path.abspath(p))) for p in paths]
    inputs = {os.path.realpath(p) for p in paths}
    for dest in dests:
        if os.path.realpath(dest) in inputs:
            return f"the output {dest} would overwrite an input; use --in-place to replace inputs"
    return dests


def _recalc_one(job: tuple, progress: Callable[[int, int], None] | None = None
                ) -> tuple[Outcome | None, str | None]:
    """One workbook, in this process or a worker: its outcome, or the text of an internal failure
    (a bug: reported, and the run goes on with the next file)."""
    from .recalc import recalc_file

    path, dest, check, tolerance, limits, split_links, volatility = job
    try:
        return recalc_file(path, dest, check, tolerance, progress, limits, split_links, volatility,
                           quiet_set_up=True), None
    except Exception as exc:
        return None, f"{type(exc).__name__}: {exc}"


def _outcomes(jobs: list[tuple], workers: int, progress) -> Iterator[tuple[Outcome | None, str | None]]:
    """The outcomes in the order of the list. One worker: in this process, with the progress bar
    counting cells; more: a pool of processes (temporary files carry the process id, so workers never
    share one), the bar counting files as they finish."""
    if workers == 1:
        for index, job in enumerate(jobs):
            progress.file(index, os.path.basename(job[0]))
            yield _recalc_one(job, progress.update)
            progress.clear()
        return
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(max_workers=workers) as pool:
        for index, result in enumerate(pool.map(_recalc_one, jobs)):
            progress.file(index, os.path.basename(jobs[index][0]))
            progress.update(0, 0)
            yield result
        progress.clear()


def run(paths: Sequence[str], out: str | None = None, in_place: bool = False, check: bool = False,
        tolerance: float = 1e-9, limits: Limits = DEFAULTS, split_links: bool = False, jobs: int | None = None,
        shard: tuple[int, int] | None = None, volatility: Volatility | None = None) -> int:
    """Recalculate ``paths`` (files or folders; ``shard`` (K, N) keeps the K-th of N shares) with ``jobs``
    processes (default: one per core); print differences, errors and the summary; return the exit status."""
    from .recalc import unwritable
    from .report import Progress

    started = time.perf_counter()
    if check and (out is not None or in_place):
        return _usage("--check never writes: leave out --out and --in-place")
    if not (tolerance >= 0.0 and math.isfinite(tolerance)):
        return _usage(f"--tolerance must be a finite number >= 0, not {tolerance}")
    paths = workbook_list(paths, shard)
    dests = _destinations(paths, out, in_place)
    if isinstance(dests, str):
        return _usage(dests)
    if out is not None:
        try:
            os.makedirs(out, exist_ok=True)
        except OSError as exc:
            print(f"cellfuncs recalc: cannot create the folder {escaped(out)}: {escaped(unwritable(exc))}",
                  file=sys.stderr)
            return 4
    workers = max(1, min(jobs or os.cpu_count() or 1, len(paths)))
    progress = Progress(len(paths))
    status = cells = errors = diffs = 0
    work = [(path, dest, check, tolerance, limits, split_links, volatility) for path, dest in zip(paths, dests)]
    for path, (outcome, failure) in zip(paths, _outcomes(work, workers, progress)):
        shown = escaped(path)
        if outcome is None:
            print(f"recalc: {shown}: internal error: {escaped(failure)}", file=sys.stderr)
            status = max(status, 3)
            continue
        if outcome.refused is not None:
            print(f"recalc: {shown}: refused: {escaped(outcome.refused)}", file=sys.stderr)
            status = max(status, 2)
            continue
        cells += outcome.cells
        errors += len(outcome.errors)
        diffs += len(outcome.differences)
        for where, cached, computed in outcome.differences:  # show() has escaped the values
            print(f"{shown}\t{escaped(where)}\t{cached}\t{computed}")
        for where, error in outcome.errors[:MAX_LISTED]:
            print(f"recalc: {shown}: {escaped(where)}: {escaped(str(error))}", file=sys.stderr)
        if len(outcome.errors) > MAX_LISTED:
            print(f"recalc: {shown}: ... and {len(outcome.errors) - MAX_LISTED} more error cells", file=sys.stderr)
        if (check and outcome.differences) or (not check and outcome.errors):
            status = max(status, 1)
        if outcome.unwritten is not None:
            print(f"recalc: {shown}: not written: {escaped(outcome.unwritten)}", file=sys.stderr)
            status = max(status, 4)
    sys.stdout.flush()
    seconds = time.perf_counter() - started
    dry = "" if check or out is not None or in_place else "; nothing written (a dry run: --out DIR or --in-place writes)"
    print(f"recalc: {len(paths)} files, {cells} cells, {errors} errors, {diffs} differences, {seconds:.2f} s{dry}",
          file=sys.stderr)
    return status
