"""``cellfuncs recalc``: recalculate workbooks without Excel.

Standard output carries the differences of ``--check``, one per line
(``file<TAB>Sheet!A1<TAB>cached<TAB>computed``); standard error the refused files, the
error cells with their reasons and a summary line. Exit status, the highest over all
files: 0 clean; 1 a difference (with --check) or an error cell (without it); 2 a usage
problem or a refused file; 3 an internal failure.
"""

from __future__ import annotations

import math
import os
import sys
import time
from typing import Sequence

from .package import MAX_MEMBERS, MAX_RATIO, MAX_TOTAL, RATIO_FLOOR
from .sheetxml import MAX_CELLS, MAX_FORMULAS

MAX_LISTED = 200  # error cells listed per file; the count covers them all

DESCRIPTION = (
    "Recalculate every formula of .xlsx/.xlsm workbooks with the pack's functions and the built-ins, in "
    "dependency order, and store the results as the cells' cached values: formulas, styles, charts and every "
    "other part stay as they are. Without --out or --in-place nothing is written (a dry run)."
)

LIMITS = f"""\
Refused files (exit 2, nothing written): not a zip; an OLE compound file (how Excel stores
an encrypted workbook); corrupt XML; XML with a DTD or an entity declaration; more than
{MAX_TOTAL // 2**20} MiB expanded in total; a member above {RATIO_FLOOR // 2**20} MiB compressed more than {MAX_RATIO}:1; more than
{MAX_MEMBERS:,} zip members; more than {MAX_FORMULAS:,} formula cells or {MAX_CELLS:,} cells; a cell or a used
range beyond Excel's limits (XFD1048576).

Values: a circular reference is #CALC! naming the loop; functions the engine lacks are
#NAME?; references to other workbooks and DDE links are #REF!; an array result spills as an
Excel 365 dynamic array (#SPILL! when cells are in the way). The calculation chain
(xl/calcChain.xml) is dropped; docProps/custom.xml records the engine (RecalcEngine,
RecalcEngineVersion). Error cells are listed on standard error, at most {MAX_LISTED} per file."""


def add_arguments(parser) -> None:
    """The options of ``cellfuncs recalc``."""
    parser.add_argument("workbooks", nargs="+", metavar="WORKBOOK", help=".xlsx or .xlsm files")
    where = parser.add_mutually_exclusive_group()
    where.add_argument("--out", metavar="DIR", help="write DIR/<same file name> (DIR is created if missing)")
    where.add_argument("--in-place", action="store_true", help="replace each input (atomically)")
    parser.add_argument("--check", action="store_true",
                        help="write nothing; compare the cached values with recalculated ones (exit 1 on a difference)")
    parser.add_argument("--tolerance", type=float, default=1e-9, metavar="REL",
                        help="relative tolerance of --check for numbers (default 1e-9)")


def _usage(message: str) -> int:
    print(f"cellfuncs recalc: {message}", file=sys.stderr)
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


def run(paths: Sequence[str], out: str | None = None, in_place: bool = False, check: bool = False,
        tolerance: float = 1e-9) -> int:
    """Recalculate ``paths``; print differences, errors and the summary; return the exit status."""
    from .recalc import recalc_file
    from .report import Progress

    started = time.perf_counter()
    if check and (out is not None or in_place):
        return _usage("--check never writes: leave out --out and --in-place")
    if not (tolerance >= 0.0 and math.isfinite(tolerance)):
        return _usage(f"--tolerance must be a finite number >= 0, not {tolerance}")
    dests = _destinations(paths, out, in_place)
    if isinstance(dests, str):
        return _usage(dests)
    if out is not None:
        os.makedirs(out, exist_ok=True)
    progress = Progress(len(paths))
    status = cells = errors = diffs = 0
    for index, (path, dest) in enumerate(zip(paths, dests)):
        progress.file(index, os.path.basename(path))
        try:
            outcome = recalc_file(path, dest, check, tolerance, progress.update)
        except Exception as exc:  # an internal failure: report it, go on with the next file
            progress.clear()
            print(f"recalc: {path}: internal error: {type(exc).__name__}: {exc}", file=sys.stderr)
            status = max(status, 3)
            continue
        progress.clear()
        if outcome.refused is not None:
            print(f"recalc: {path}: refused: {outcome.refused}", file=sys.stderr)
            status = max(status, 2)
            continue
        cells += outcome.cells
        errors += len(outcome.errors)
        diffs += len(outcome.differences)
        for where, cached, computed in outcome.differences:
            print(f"{path}\t{where}\t{cached}\t{computed}")
        for where, error in outcome.errors[:MAX_LISTED]:
            print(f"recalc: {path}: {where}: {error}", file=sys.stderr)
        if len(outcome.errors) > MAX_LISTED:
            print(f"recalc: {path}: ... and {len(outcome.errors) - MAX_LISTED} more error cells", file=sys.stderr)
        if (check and outcome.differences) or (not check and outcome.errors):
            status = max(status, 1)
    sys.stdout.flush()
    seconds = time.perf_counter() - started
    print(f"recalc: {len(paths)} files, {cells} cells, {errors} errors, {diffs} differences, {seconds:.2f} s",
          file=sys.stderr)
    return status
