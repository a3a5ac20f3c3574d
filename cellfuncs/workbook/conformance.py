"""Conformance with Excel: recalculate workbooks Excel computed and score the cells reproduced.

``python -m cellfuncs.workbook.conformance [FOLDER] [--workbooks] [--top N]`` recalculates,
in memory, every workbook listed in ``FOLDER/manifest.tsv`` (default: the
``shared/excel-reference`` folder found beside the project or one of its parents, or the
folder the environment variable ``CELLFUNCS_EXCEL_REFERENCE`` names) and compares each
formula cell with the value Excel cached there. Nothing is written.

Rules of the comparison (those of the folder's README):

- workbooks whose manifest says ``excel_computed`` False are left out;
- cells calling a volatile function (see ``cellfuncs/data/excel/functions.toml``), directly
  or through a defined name, and every cell depending on one, are left out, as are cells
  without a cached value;
- numbers agree within 1e-9 relative or 1e-12 absolute (1e-7 relative in cells calling a
  function Excel solves by iteration: IRR, XIRR, RATE, YIELD ...), text and booleans exactly, error
  values by code; every cell of an array formula's stored range is compared.

Output (stable: tools and people compare runs by it), tab-separated lines, each led by
its kind; shares are percentages with two decimals:

- ``conformance`` FOLDER, workbooks scored, workbooks left out, volatile cells left out, seconds
- ``score`` WHAT, reproduced, comparable, percent; WHAT is ``all``, ``source:<folder>``
  and ``workbook-average`` (each workbook weighted equally; its count column holds the
  number of workbooks)
- ``category`` NAME, reproduced, comparable, percent: cells calling a function of the
  category (Excel's own grouping; ``(none)``: operators and references only)
- ``function`` NAME, reproduced, comparable, percent: cells calling the function, most cells
  not reproduced first
- ``missing`` NAME, cells: Excel functions the engine lacks, by the comparable cells
  calling them that differ
- ``cause`` cells, TEXT: why cells differ, one cause per cell, the largest first; a cell
  whose own formula is fine but which reads a cell that differs is ``reads a cell that differs``
- ``workbook`` FILE, reproduced, comparable, percent (with ``--workbooks`` only)

``--floors`` prints the headline scores in the format of ``tests/data/conformance_floors.toml``
instead, which ``tests/test_conformance.py`` holds the engine to.

A cell counts for every function its formula calls (a defined name's functions excluded).
"""

from __future__ import annotations

import argparse
import csv
import math
import os
import re
import sys
import time
from collections import Counter, defaultdict
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Iterable, Iterator

from ..errors import CellError
from ..formula import BUILTINS
from .engine import Recalc
from .model import Book, load
from .package import Package, Refused
from .recalc import pack_functions
from .report import same
from .volatile import functions_called, volatile_cells

REL_TOLERANCE = 1e-9
# Functions Excel solves by iteration, stopping near 1e-7 relative: their cells compare at that.
ITERATIVE = frozenset({"IRR", "XIRR", "RATE", "YIELD", "ODDFYIELD", "ODDLYIELD", "YIELDDISC", "YIELDMAT"})
ITERATIVE_TOLERANCE = 1e-7
ABS_TOLERANCE = 1e-12
NO_FUNCTION = "(none)"


@lru_cache(maxsize=1)
def _function_table() -> tuple[dict[str, str], frozenset[str]]:
    from ..data import load as load_data

    data = load_data("excel/functions")
    category = {name: cat for cat, names in data["categories"].items() for name in names}
    return category, frozenset(data["volatile"])


def category_of(name: str) -> str:
    """Excel's category of a function (upper case), ``Other`` for names Excel does not list.

    >>> category_of("SUM"), category_of("XLOOKUP"), category_of("BOIL_TEMP")
    ('Math & Trig', 'Lookup & Reference', 'Other')
    """
    return _function_table()[0].get(name, "Other")


def default_folder() -> Path | None:
    """The reference folder: ``$CELLFUNCS_EXCEL_REFERENCE``, else ``shared/excel-reference``
    beside the project folder or one of its parents."""
    named = os.environ.get("CELLFUNCS_EXCEL_REFERENCE")
    if named:
        return Path(named)
    for parent in Path(__file__).resolve().parents[2:]:
        candidate = parent / "shared" / "excel-reference"
        if (candidate / "manifest.tsv").is_file():
            return candidate
    return None


@dataclass
class Tally:
    reproduced: int = 0
    comparable: int = 0

    def add(self, ok: bool) -> None:
        self.comparable += 1
        self.reproduced += ok

    def merge(self, other: Tally) -> None:
        self.reproduced += other.reproduced
        self.comparable += other.comparable

    @property
    def percent(self) -> float:
        return 100.0 * self.reproduced / self.comparable if self.comparable else 100.0


@dataclass
class WorkbookScore:
    file: str
    source: str
    tally: Tally = field(default_factory=Tally)
    functions: dict[str, Tally] = field(default_factory=lambda: defaultdict(Tally))
    missing: Counter = field(default_factory=Counter)
    causes: Counter = field(default_factory=Counter)
    volatile: int = 0
    failed: list[tuple[str, str, object, object]] = field(default_factory=list)  # (cell, formula, Excel's, ours)


def _normalised(reason: str) -> str:
    """A reason with its particulars (quoted texts, numbers, addresses) blanked, so alike
    failures count as one cause."""
    reason = re.sub(r"'(?:[^']|'')*'|\"(?:[^\"]|\"\")*\"", "…", reason)
    reason = re.sub(r"\b\$?[A-Z]{1,3}\$?[0-9]+(?::\$?[A-Z]{1,3}\$?[0-9]+)?\b", "<ref>", reason)
    reason = re.sub(r"\b[0-9][0-9.,]*\b", "N", reason)
    return reason[:120]


def _cause(engine: Recalc, fi: int, cached: object, computed: object, functions: list[str],
           missing: list[str], upstream: bool) -> str:
    t = engine.cells[fi].template
    if t.ast is None:
        return f"formula not understood: {_normalised(t.error.reason)}"
    if missing:
        name = missing[0]
        return f"missing built-in {name}" if category_of(name) != "Other" else f"unknown function {name}"
    if upstream:
        return "reads a cell that differs"
    shown = ", ".join(functions) if functions else "operators"
    if type(computed) is CellError:
        return f"engine gives {computed.code} ({_normalised(computed.reason)})"
    if type(cached) is CellError:
        return f"Excel gives {cached.code}, the engine a value: {shown}"
    if type(cached) is not type(computed if computed is not None else 0.0):
        return f"value of another type: {shown}"
    return f"different value: {shown}"


def _compared(engine: Recalc, fi: int) -> Iterator[tuple[object, object]]:
    """(cached, computed) for every cell formula cell ``fi`` covers (its stored array range)."""
    fc = engine.cells[fi]
    scan = engine.book.sheets[fc.sheet].scan
    cached = scan.formulas[(fc.row, fc.col)].cached
    yield cached, engine.result[fi]
    a = fc.old_area
    if a is None:
        return
    stored, values = engine.stored[fc.sheet], engine.values[fc.sheet]
    for r in range(a.r1, a.r2 + 1):
        for c in range(a.c1, a.c2 + 1):
            if (r, c) != (fc.row, fc.col):
                yield stored.get((r, c)), values.get((r, c))


_FAILED_KEPT = 200  # cells listed per workbook by --cells


def recalculated(path: Path) -> tuple[Book, Recalc]:
    """The workbook at ``path`` read, checked and recalculated in memory (nothing is written)."""
    pkg = Package(str(path))
    try:
        book = load(pkg)
        pkg.validate(book.parsed)
        engine = Recalc(book, pack_functions())
        engine.run()
    finally:
        pkg.close()
    return book, engine


def score_workbook(path: Path, source: str) -> WorkbookScore:
    """Recalculate one workbook and score its comparable cells; a refusal or an internal
    failure scores the cells the manifest lists as not reproduced (the caller's job)."""
    category, volatile = _function_table()
    score = WorkbookScore(path.name, source)
    book, engine = recalculated(path)
    known = set(BUILTINS) | set(engine.functions)
    units, adj, _ = engine.graph
    unit_of = {fi: u for u, members in enumerate(units) for fi in members}
    texts = {}
    calls: dict[int, list[str]] = {}
    for fi, fc in enumerate(engine.cells):
        f = book.sheets[fc.sheet].scan.formulas[(fc.row, fc.col)]
        texts[fi] = f.text
        calls[fi] = functions_called(engine, fi, f.text)
    left_out = {unit_of[fi] for fi in volatile_cells(engine, volatile)}
    results: dict[int, list[tuple[object, object, bool]]] = {}
    differs_units = set()
    for fi in range(len(engine.cells)):
        if unit_of[fi] in left_out:
            score.volatile += sum(1 for cached, _ in _compared(engine, fi) if cached is not None)
            continue
        rel = ITERATIVE_TOLERANCE if ITERATIVE.intersection(calls[fi]) else REL_TOLERANCE
        rows = [(c, v, same(c, v, rel, ABS_TOLERANCE)) for c, v in _compared(engine, fi)
                if c is not None]
        results[fi] = rows
        if any(not ok for _, _, ok in rows):
            differs_units.add(unit_of[fi])
    for fi, rows in results.items():
        functions = calls[fi]
        missing = [n for n in functions if n not in known]
        upstream = any(v in differs_units for v in adj[unit_of[fi]])
        for cached, computed, ok in rows:
            score.tally.add(ok)
            for name in functions or [NO_FUNCTION]:
                score.functions[name].add(ok)
            if not ok:
                for name in missing:
                    if name in category:
                        score.missing[name] += 1
                score.causes[_cause(engine, fi, cached, computed, functions, missing, upstream)] += 1
                if len(score.failed) < _FAILED_KEPT:
                    score.failed.append((engine.where(fi), texts[fi] or "", cached, computed))
    return score


@dataclass
class Report:
    folder: Path
    workbooks: list[WorkbookScore]
    left_out: list[str]
    seconds: float

    def total(self, source: str | None = None) -> Tally:
        out = Tally()
        for w in self.workbooks:
            if source is None or w.source == source:
                out.merge(w.tally)
        return out

    def sources(self) -> list[str]:
        return sorted({w.source for w in self.workbooks})

    def workbook_average(self) -> float:
        scored = [w.tally.percent for w in self.workbooks if w.tally.comparable]
        return sum(scored) / len(scored) if scored else 100.0

    def functions(self) -> dict[str, Tally]:
        out: dict[str, Tally] = defaultdict(Tally)
        for w in self.workbooks:
            for name, t in w.functions.items():
                out[name].merge(t)
        return out

    def categories(self) -> dict[str, Tally]:
        """Cells per category: a cell counts once for each category its functions belong to."""
        out: dict[str, Tally] = defaultdict(Tally)
        for w in self.workbooks:
            for name, t in w.functions.items():
                out[NO_FUNCTION if name == NO_FUNCTION else category_of(name)].merge(t)
        return out

    def scores(self) -> dict[str, float]:
        """The headline percentages by key: ``all``, ``source:<name>``, ``workbook-average``,
        ``category:<name>`` (what the floors file records)."""
        out = {"all": self.total().percent, "workbook-average": self.workbook_average()}
        out |= {f"source:{s}": self.total(s).percent for s in self.sources()}
        out |= {f"category:{c}": t.percent for c, t in self.categories().items()}
        return out

    def floors(self) -> str:
        """The scores as the floors file records them (rounded down to 0.01)."""
        down = {k: math.floor(v * 100.0) / 100.0 for k, v in self.scores().items()}
        out = [_FLOORS_HEADER, f"all = {down['all']}", f"workbook_average = {down['workbook-average']}", "", "[source]"]
        out += [f"{k[7:]} = {v}" for k, v in sorted(down.items()) if k.startswith("source:")]
        out += ["", "[category]"]
        out += [f'"{k[9:]}" = {v}' for k, v in sorted(down.items()) if k.startswith("category:")]
        return "\n".join(out) + "\n"

    def lines(self, top: int = 40, per_workbook: bool = False, cells: bool = False) -> Iterator[str]:
        volatile = sum(w.volatile for w in self.workbooks)
        yield "\t".join(["conformance", str(self.folder), f"{len(self.workbooks)} workbooks",
                         f"{len(self.left_out)} left out", f"{volatile} volatile cells left out",
                         f"{self.seconds:.1f} s"])
        yield _row("score", "all", self.total())
        for s in self.sources():
            yield _row("score", f"source:{s}", self.total(s))
        scored = sum(1 for w in self.workbooks if w.tally.comparable)
        yield f"score\tworkbook-average\t-\t{scored}\t{self.workbook_average():.2f}"
        for name, t in sorted(self.categories().items()):
            yield _row("category", name, t)
        for name, t in sorted(self.functions().items(), key=lambda kv: (kv[1].reproduced - kv[1].comparable, kv[0])):
            yield _row("function", name, t)
        missing, causes = Counter(), Counter()
        for w in self.workbooks:
            missing.update(w.missing)
            causes.update(w.causes)
        for name, n in sorted(missing.items(), key=lambda kv: (-kv[1], kv[0]))[:top]:
            yield f"missing\t{name}\t{n}"
        for text, n in sorted(causes.items(), key=lambda kv: (-kv[1], kv[0]))[:top]:
            yield f"cause\t{n}\t{text}"
        if per_workbook:
            for w in sorted(self.workbooks, key=lambda w: (w.source, w.file)):
                yield _row("workbook", f"{w.source}/{w.file}", w.tally)
        if cells:
            for w in sorted(self.workbooks, key=lambda w: (w.source, w.file)):
                for where, formula, cached, computed in w.failed[:top]:
                    yield f"cell\t{w.source}/{w.file}\t{where}\t={formula}\t{cached!s}\t{computed!s}"[:400]


_FLOORS_HEADER = """\
# Conformance floors: the least share (percent) of comparable cells the engine reproduces in the
# Excel reference workbooks (python -m cellfuncs.workbook.conformance --floors prints this file
# from a run). Raise the floors when the engine improves; never lower one.
"""


def _row(kind: str, what: str, t: Tally) -> str:
    return f"{kind}\t{what}\t{t.reproduced}\t{t.comparable}\t{t.percent:.2f}"


def manifest(folder: Path) -> list[dict[str, str]]:
    """The rows of ``folder/manifest.tsv``."""
    with open(folder / "manifest.tsv", newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f, delimiter="\t"))


def run(folder: Path, only: Iterable[str] | None = None) -> Report:
    """Score every workbook Excel computed in ``folder`` (or those whose file names contain
    one of ``only``)."""
    started = time.perf_counter()
    scores, left_out = [], []
    wanted = list(only or [])
    for entry in manifest(folder):
        file = entry["file"]
        if entry["excel_computed"] != "True":
            left_out.append(file)
            continue
        if wanted and not any(w in file for w in wanted):
            continue
        source = file.split("/", 1)[0]
        try:
            scores.append(score_workbook(folder / file, source))
        except Exception as exc:  # a refusal or an internal failure: its cells are not reproduced
            failed = WorkbookScore(Path(file).name, source)
            n = int(entry.get("formula_cells") or 0)
            failed.tally = Tally(0, n)
            kind = "refused" if isinstance(exc, Refused) else f"internal error {type(exc).__name__}"
            failed.causes[f"workbook {kind}: {_normalised(str(exc))}"] = n
            scores.append(failed)
    return Report(folder, scores, left_out, time.perf_counter() - started)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m cellfuncs.workbook.conformance",
                                     description="Score the engine against workbooks Excel computed.")
    parser.add_argument("folder", nargs="?", help="the reference folder (with manifest.tsv)")
    parser.add_argument("--workbooks", action="store_true", help="also list each workbook's score")
    parser.add_argument("--top", type=int, default=40, metavar="N", help="missing built-ins and causes listed (40)")
    parser.add_argument("--only", action="append", metavar="TEXT", help="score only files whose name contains TEXT")
    parser.add_argument("--cells", action="store_true", help="also list up to N cells each workbook gets wrong")
    parser.add_argument("--floors", action="store_true", help="print the scores as tests/data/conformance_floors.toml")
    args = parser.parse_args(argv)
    folder = Path(args.folder) if args.folder else default_folder()
    if folder is None or not (folder / "manifest.tsv").is_file():
        print("conformance: no reference folder (give one, or set CELLFUNCS_EXCEL_REFERENCE)", file=sys.stderr)
        return 2
    report = run(folder, args.only)
    if args.floors:
        print(report.floors(), end="")
        return 0
    for line in report.lines(args.top, args.workbooks, args.cells):
        print(line)
    return 0


if __name__ == "__main__":
    sys.exit(main())
