"""Whole-process recalculation against LibreOffice Calc, measured side by side in one run.

    python3 benchmarks/against_libreoffice.py            # 10,000 and 100,000 formula cells
    python3 benchmarks/against_libreoffice.py --quick    # one repeat

The layout: a row per operating point, inputs in A (pressure, kPa) and B (temperature, degC), and
four formula cells: the boiling temperature at A, the stable phase at (B, A), and two arithmetic
cells on them. Ours is ``cellfuncs recalc --out`` on the pack's functions; LibreOffice loads,
fully recalculates (its own user profile set to recalculate every OOXML file on load) and saves
the same sheet written with an Antoine equation and IF in place of the pack's functions, which
LibreOffice does not have. Both are whole processes, start-up included, each run once beforehand
untimed: LibreOffice makes its profile, Python compiles the modules into a bytecode cache in the
run's folder, as an installed package has them compiled (the cache is used even where the
environment sets PYTHONDONTWRITEBYTECODE, under which every start would compile every module
again). Target: ratio ours/LibreOffice <= 1.0 (the aim is 0.5).
Without ``soffice`` on PATH only our figures are printed.
"""

from __future__ import annotations

import argparse
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("OPENPYXL_LXML", "False")
from openpyxl import Workbook  # noqa: E402

from cellfuncs.hosts.libreoffice.extension import recalculating_profile  # noqa: E402

TARGET = 1.0  # ours / LibreOffice, whole process
SIZES = (10_000, 100_000)  # formula cells
OURS = ('=BOIL_TEMP("water",A{r},"kPa","degC")', '=STABLE_PHASE("water",B{r},A{r},"degC","kPa")',
        "=C{r}*1.8+32", "=B{r}-C{r}")
# water's Antoine equation in mmHg and degC (1 kPa = 7.50062 mmHg), a common textbook stand-in
THEIRS = ("=1730.63/(8.07131-LOG10(A{r}*7.50062))-233.426", '=IF(B{r}>C{r},"vapor","liquid")',
          "=C{r}*1.8+32", "=B{r}-C{r}")


def build(path: Path, cells: int, formulas: tuple[str, ...]) -> None:
    wb = Workbook()
    ws = wb.active
    for r in range(1, cells // len(formulas) + 1):
        ws.cell(r, 1, 50.0 + (r % 400) * 2.5)  # 50 to 1047.5 kPa
        ws.cell(r, 2, 20.0 + (r % 170))  # 20 to 189 degC
        for c, text in enumerate(formulas, start=3):
            ws.cell(r, c, text.format(r=r))
    wb.save(path)


def _seconds(command: list[str], env: dict[str, str] | None = None) -> float:
    start = time.perf_counter()
    done = subprocess.run(command, capture_output=True, text=True, env=env)
    seconds = time.perf_counter() - start
    if done.returncode not in (0, 1):
        raise RuntimeError(f"{command[:4]} failed: {(done.stdout + done.stderr).strip()[-500:]}")
    return seconds


def _libreoffice(soffice: str, profile: Path) -> list[str]:
    return [soffice, "--headless", "--norestore", f"-env:UserInstallation={profile.as_uri()}", "--convert-to", "xlsx"]


def _ours(work: Path) -> dict[str, str]:
    """The environment of our processes: the bytecode cache in ``work``, written on the first run."""
    env = dict(os.environ, PYTHONPYCACHEPREFIX=str(work / "bytecode"))
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    return env


def _recalc(workbook: Path, out: Path) -> list[str]:
    return [sys.executable, "-m", "cellfuncs", "recalc", str(workbook), "--out", str(out)]


def main(repeat: int) -> None:
    soffice = shutil.which("soffice")
    with tempfile.TemporaryDirectory() as folder:
        work = Path(folder)
        profile, env = work / "profile", _ours(work)
        warm = work / "warm.xlsx"
        build(warm, 8, OURS)
        _seconds(_recalc(warm, work / "warm"), env)  # compiles the modules into the cache
        if soffice:
            recalculating_profile(profile)
            build(warm, 8, THEIRS)
            _seconds(_libreoffice(soffice, profile) + ["--outdir", str(work / "warm"), str(warm)])  # makes the profile
        print(f"Whole-process recalculation against LibreOffice (target: ratio <= {TARGET:.1f}; median of {repeat})")
        for cells in SIZES:
            ours_in, theirs_in = work / f"ours{cells}.xlsx", work / f"theirs{cells}.xlsx"
            build(ours_in, cells, OURS)
            build(theirs_in, cells, THEIRS)
            ours = statistics.median(_seconds(_recalc(ours_in, work / "out"), env) for _ in range(repeat))
            line = f"  {cells:>7,} formula cells: cellfuncs recalc {ours:6.2f} s"
            if soffice:
                theirs = statistics.median(_seconds(_libreoffice(soffice, profile) + [
                    "--outdir", str(work / "lo"), str(theirs_in)]) for _ in range(repeat))
                ratio = ours / theirs
                line += (f", LibreOffice {theirs:6.2f} s, ratio {ratio:.2f}  "
                         f"{'ok' if ratio <= TARGET else 'OVER TARGET'}")
            else:
                line += ", LibreOffice: soffice not on PATH, no comparison"
            print(line)


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="one repeat")
    main(1 if parser.parse_args().quick else 3)
