"""Workbook recalculation speed: ``cellfuncs recalc`` against the ``formulas`` library.

    python3 benchmarks/recalc.py            # also run by benchmarks/run.py
    python3 benchmarks/recalc.py --quick    # one repeat

The workbook: 1,250 rows of inputs (pressure in bar, temperature in degC), four columns of
the pack's functions on them (BOIL_TEMP, BOIL_PRESSURE, STABLE_PHASE, MASS_DENSITY: 5,000
calls) and four columns of arithmetic on their results (5,000 cells). ``formulas`` (the
benchmark-only extra, ``pip install ".[bench]"``) loads, calculates and writes the same
workbook with trivial stand-ins for the pack's functions, so its figures are a lower bound
of what it would take with the real ones. Each side runs in a fresh process; target: ours
at least TARGET (30) times faster end to end.
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROWS = 1250
TARGET = 30  # times faster than formulas, whole process
COLUMNS = (  # column: formula of row {r}
    ("C", '=BOIL_TEMP("water",A{r},"bar","degC")'),
    ("D", '=BOIL_PRESSURE("water",B{r},"degC","bar")'),
    ("E", '=STABLE_PHASE("water",B{r},A{r},"degC","bar")'),
    ("F", '=MASS_DENSITY("water",B{r},A{r},"","degC","bar","kg/m3")'),
    ("G", "=C{r}*1.8+32"),
    ("H", "=D{r}*100"),
    ("I", '=IF(E{r}="liquid",F{r}/1000,0)'),
    ("J", "=B{r}-C{r}"),
)

OURS = """
import json, sys, time
t0 = time.perf_counter()
from cellfuncs.workbook.engine import Recalc
from cellfuncs.workbook.model import load
from cellfuncs.workbook.package import Package
from cellfuncs.workbook.recalc import pack_functions
from cellfuncs.workbook.writer import plan
from cellfuncs.workbook.zipout import write_package
functions = pack_functions()
t1 = time.perf_counter()
pkg = Package(sys.argv[1]); book = load(pkg); pkg.validate(book.parsed)
t2 = time.perf_counter()
engine = Recalc(book, functions); engine.run()
t3 = time.perf_counter()
write_package(pkg, sys.argv[2], *plan(pkg, book, engine))
t4 = time.perf_counter()
print(json.dumps({"import": t1 - t0, "load": t2 - t1, "evaluate": t3 - t2, "save": t4 - t3, "cells": len(engine.cells)}))
"""

THEIRS = """
import json, sys, time
t0 = time.perf_counter()
import formulas
formulas.ExcelModel  # the package imports lazily
functions = formulas.get_functions()
t1 = time.perf_counter()
for name in ("BOIL_TEMP", "BOIL_PRESSURE", "MASS_DENSITY"):
    functions[name] = lambda *args: 1.0  # trivial stand-ins for the pack's functions
functions["STABLE_PHASE"] = lambda *args: "liquid"
model = formulas.ExcelModel().loads(sys.argv[1]).finish()
t2 = time.perf_counter()
model.calculate()
t3 = time.perf_counter()
model.write(dirpath=sys.argv[2])
t4 = time.perf_counter()
print(json.dumps({"import": t1 - t0, "load": t2 - t1, "evaluate": t3 - t2, "save": t4 - t3}))
"""


def build(path: Path, rows: int = ROWS) -> int:
    """Write the benchmark workbook; return its number of formula cells."""
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Data"
    ws.append(["p (bar)", "T (degC)", "Tsat (degC)", "psat (bar)", "phase", "rho (kg/m3)", "Tsat (degF)",
               "psat (kPa)", "rho (g/cm3)", "T - Tsat (K)"])
    for r in range(2, rows + 2):
        ws.cell(r, 1, 1.0 + (r % 50) * 0.4)
        ws.cell(r, 2, 10.0 + (r % 97) * 3.0)
        for column, formula in COLUMNS:
            ws[f"{column}{r}"] = formula.format(r=r)
    wb.save(path)
    return rows * len(COLUMNS)


def _run(command: list[str]) -> tuple[float, str]:
    start = time.perf_counter()
    done = subprocess.run(command, capture_output=True, text=True)
    seconds = time.perf_counter() - start
    if done.returncode not in (0, 1):
        raise RuntimeError(f"{command[:4]} failed: {done.stderr.strip()[-500:]}")
    return seconds, done.stdout


def _phases(script: str, path: Path, out: Path) -> dict:
    return json.loads(_run([sys.executable, "-c", script, str(path), str(out)])[1].strip().splitlines()[-1])


def main(repeat: int = 3) -> None:
    with tempfile.TemporaryDirectory() as folder:
        work = Path(folder)
        path = work / "bench.xlsx"
        cells = build(path)
        ours = statistics.median(
            _run([sys.executable, "-m", "cellfuncs", "recalc", str(path), "--out", str(work / "ours")])[0]
            for _ in range(repeat))
        phases = _phases(OURS, path, work / "ours_phases.xlsx")
        print(f"Workbook recalculation, {cells:,} formula cells (target: ours >= {TARGET}x faster than formulas)")
        print(f"  cellfuncs recalc --out, whole process  {ours:8.2f} s   {cells / ours:10,.0f} cells/s")
        print("    import {import:.2f} s, load {load:.2f} s, evaluate {evaluate:.2f} s, save {save:.2f} s".format(**phases))
        try:
            import formulas  # noqa: F401
        except ImportError:
            print("  formulas: not installed (pip install '.[bench]'); no comparison")
            return
        (work / "theirs").mkdir()
        start = time.perf_counter()
        theirs = _phases(THEIRS, path, work / "theirs")
        whole = time.perf_counter() - start
        print(f"  formulas load + calculate + write        {whole:8.2f} s   {cells / whole:10,.0f} cells/s")
        print("    import {import:.2f} s, load {load:.2f} s, evaluate {evaluate:.2f} s, save {save:.2f} s".format(**theirs))
        ratio = whole / ours
        print(f"  ratio {ratio:.1f}x  {'ok' if ratio >= TARGET else 'UNDER TARGET'}")


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="one repeat")
    main(1 if parser.parse_args().quick else 3)
