"""Build the design workbooks, deterministically, and store the pack's results in them.

    python3 workbooks/build.py                 # rebuild every workbook in workbooks/
    python3 workbooks/build.py --out DIR NAME  # rebuild NAME (e.g. steam_service.xlsx) into DIR

Each workbook is one scenario module beside this script (steam_service.py, cryogen_release.py,
frost_and_pressure.py, phase_maps.py), laid out with the kit of sheet_kit.py. It is written with
openpyxl (fixed document properties and zip member timestamps, so the same script gives the same
bytes), then recalculated with ``cellfuncs.workbook.recalc`` so the file carries cached values that
any reader shows. The scenarios, places and tags are invented.

Design: what a person reads sits in ordinary cells, one formula per cell; errors that a
sheet expects are caught with IFERROR and a plain message, so the committed workbooks
hold no error values. PHASE_LINE spills are used where a chart needs a line of points.
"""

from __future__ import annotations

import argparse
import datetime
import io
import os
import sys
import zipfile
from pathlib import Path
from typing import Callable

# openpyxl serialises XML with lxml when it is installed and with the standard library
# otherwise, and the two differ in bytes; the standard library's is the one every machine has
os.environ["OPENPYXL_LXML"] = "False"

from openpyxl import Workbook  # noqa: E402  (after the setting above)
from openpyxl.workbook.properties import CalcProperties  # noqa: E402
from openpyxl.writer.excel import ExcelWriter  # noqa: E402

import cryogen_release  # noqa: E402  (the scenario modules beside this script)
import frost_and_pressure  # noqa: E402
import phase_maps  # noqa: E402
import steam_service  # noqa: E402
from cellfuncs.workbook.authoring import mark_spills, spills_of  # noqa: E402

HERE = Path(__file__).resolve().parent
STAMP = datetime.datetime(2025, 1, 6, 9, 0, 0)  # every workbook's created/modified time and zip member time
CREATOR = "cellfuncs design workbooks (workbooks/build.py)"

BOOKS: dict[str, Callable[[], Workbook]] = {
    "steam_service.xlsx": steam_service.workbook,
    "cryogen_release.xlsx": cryogen_release.workbook,
    "frost_and_pressure.xlsx": frost_and_pressure.workbook,
    "phase_maps.xlsx": phase_maps.workbook,
}


# ---- writing ---------------------------------------------------------------------------------------
def save(wb: Workbook, path: Path) -> None:
    """Write ``wb`` to ``path`` with fixed properties and fixed zip member times."""
    wb.properties.creator = wb.properties.lastModifiedBy = CREATOR
    wb.properties.created = wb.properties.modified = STAMP
    # calcId: the calculation-engine number current Excel writes, so that it shows the stored values on opening
    # rather than recalculating at once (our reading of the file format; not verified with Excel)
    wb.calculation = CalcProperties(calcId=191029, fullCalcOnLoad=False)
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w", zipfile.ZIP_DEFLATED) as archive:
        ExcelWriter(wb, archive).save()  # openpyxl's save_workbook would stamp the current time
    with zipfile.ZipFile(buffer) as built, zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as out:
        for info in built.infolist():
            fixed = zipfile.ZipInfo(info.filename, date_time=STAMP.timetuple()[:6])
            fixed.compress_type = zipfile.ZIP_DEFLATED
            fixed.external_attr = 0o600 << 16
            out.writestr(fixed, built.read(info.filename))
    mark_spills(path, spills_of(wb))  # the PHASE_LINE cells, recorded as Excel records a spilling formula


def build(names: list[str] | None = None, folder: Path = HERE) -> list[Path]:
    """Build the named workbooks (all by default) into ``folder`` and recalculate them in place."""
    from cellfuncs.workbook.recalc import recalc_file

    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for name in names or list(BOOKS):
        path = folder / name
        save(BOOKS[name](), path)
        outcome = recalc_file(str(path), str(path))
        if outcome.refused or outcome.errors:
            raise RuntimeError(f"{name}: {outcome.refused or outcome.errors[:5]}")
        paths.append(path)
    return paths


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Build the design workbooks and store their cached values.")
    parser.add_argument("names", nargs="*", metavar="NAME", help="any of " + ", ".join(BOOKS) + " (default: all)")
    parser.add_argument("--out", type=Path, default=HERE, help="folder to write to (default: workbooks/)")
    args = parser.parse_args(argv)
    unknown = [n for n in args.names if n not in BOOKS]
    if unknown:
        parser.error(f"unknown workbook {unknown[0]}; choose from {', '.join(BOOKS)}")
    for path in build(args.names or None, args.out):
        print(path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
