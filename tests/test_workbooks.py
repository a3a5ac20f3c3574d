"""The design workbooks (workbooks/*.xlsx): their script rebuilds them byte for byte, their
stored values pass ``cellfuncs recalc --check``, and changing an input moves the results
that depend on it.

Expected directions come from the physics of each sheet (a warmer header reading has more
superheat; a bigger room dilutes the same gas more; less warming gives a smaller pressure
rise; a map that starts at 200 °C shows no ice); the numbers compared are the pack's own
before and after the change.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import openpyxl
import pytest

from cellfuncs.workbook.recalc import recalc_file

ROOT = Path(__file__).resolve().parents[1]
FOLDER = ROOT / "workbooks"
NAMES = ["steam_service.xlsx", "cryogen_release.xlsx", "frost_and_pressure.xlsx", "phase_maps.xlsx"]


@pytest.fixture(scope="module")
def rebuilt(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("rebuilt")
    done = subprocess.run([sys.executable, str(FOLDER / "build.py"), "--out", str(out)], capture_output=True,
                          text=True, cwd=ROOT)
    assert done.returncode == 0, done.stdout + done.stderr
    return out


def test_the_script_builds_exactly_the_committed_workbooks():
    assert sorted(p.name for p in FOLDER.glob("*.xlsx")) == sorted(NAMES)


@pytest.mark.parametrize("name", NAMES)
def test_each_workbook_rebuilds_byte_for_byte(rebuilt, name):
    assert (rebuilt / name).read_bytes() == (FOLDER / name).read_bytes(), (
        f"workbooks/{name} differs from what workbooks/build.py makes: run python3 workbooks/build.py")


def test_recalc_check_passes_on_every_committed_workbook():
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "recalc", "--check", *(str(FOLDER / n) for n in NAMES)],
                          capture_output=True, text=True, cwd=ROOT)
    assert done.returncode == 0, done.stdout + done.stderr
    assert done.stdout == ""
    assert re.search(r"recalc: 4 files, \d+ cells, 0 errors, 0 differences", done.stderr), done.stderr


# ---- changing an input ---------------------------------------------------------------------------
def _sheet_part(z: zipfile.ZipFile, sheet: str) -> str:
    """The zip member of the worksheet named ``sheet`` (workbook.xml names it, its rels locate it)."""
    book = z.read("xl/workbook.xml").decode()
    rid = re.search(rf'<sheet [^>]*name="{re.escape(sheet)}"[^>]*r:id="([^"]+)"', book).group(1)
    rels = z.read("xl/_rels/workbook.xml.rels").decode()
    target = re.search(rf'<Relationship [^>]*Id="{rid}"[^>]*Target="([^"]+)"', rels) or re.search(
        rf'<Relationship [^>]*Target="([^"]+)"[^>]*Id="{rid}"', rels)
    return "xl/" + target.group(1).lstrip("/").removeprefix("xl/")


def changed_input(tmp_path: Path, name: str, sheet: str, cell: str, value: float) -> Path:
    """A copy of workbook ``name`` whose number input ``sheet!cell`` holds ``value``, recalculated."""
    path = tmp_path / name
    shutil.copy(FOLDER / name, path)
    with zipfile.ZipFile(path) as z:
        members = {i: z.read(i.filename) for i in z.infolist()}
        part = _sheet_part(z, sheet)
    info = next(i for i in members if i.filename == part)
    xml = members[info].decode()
    pattern = rf'(<c r="{cell}"(?: [^>]*)?>)<v>[^<]*</v>(</c>)'
    assert len(re.findall(pattern, xml)) == 1, f"{sheet}!{cell} is not a number input"
    members[info] = re.sub(pattern, rf"\g<1><v>{value!r}</v>\g<2>", xml).encode()
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for i, data in members.items():
            z.writestr(i, data)
    outcome = recalc_file(str(path), str(path))
    assert outcome.refused is None and not outcome.errors, outcome
    return path


def values(path: Path, sheet: str, *cells: str) -> list:
    ws = openpyxl.load_workbook(path, data_only=True)[sheet]
    return [ws[c].value for c in cells]


def test_steam_a_warmer_lp_header_reading_passes_its_check(tmp_path):
    sheet = "Steam service"
    before = values(FOLDER / "steam_service.xlsx", sheet, "G17", "H17", "I17", "G15")
    after = values(changed_input(tmp_path, "steam_service.xlsx", sheet, "E17", 160.0), sheet, "G17", "H17", "I17",
                   "G15")
    assert before[1:3] == ["liquid", "CHECK: liquid at this state, expected vapor"]
    assert after[1:3] == ["vapor", "ok"]
    assert after[0] == pytest.approx(before[0] + 10.0, rel=1e-12)  # superheat: T - Tsat(p), Tsat unchanged
    assert after[3] == before[3]  # other points stay as they were


def test_steam_a_lower_hp_header_pressure_moves_its_saturation_and_flash(tmp_path):
    sheet = "Steam service"
    before = values(FOLDER / "steam_service.xlsx", sheet, "E7", "G25", "H25")
    after = values(changed_input(tmp_path, "steam_service.xlsx", sheet, "C7", 30.0), sheet, "E7", "G25", "H25")
    assert after[0] < before[0] and after[1] < before[1] and after[2] < before[2]


def test_cryogen_a_longer_room_holds_more_oxygen_after_the_same_release(tmp_path):
    sheet = "Cryogen release"
    cells = ("E11", "F25", "F27", "E29", "J18")
    before = values(FOLDER / "cryogen_release.xlsx", sheet, *cells)
    after = values(changed_input(tmp_path, "cryogen_release.xlsx", sheet, "E8", 14.4), sheet, *cells)
    assert after[0] == pytest.approx(2 * before[0], rel=1e-12)  # room volume
    assert after[1] > before[1] and after[2] > before[2]  # oxygen after the nitrogen and the argon release
    assert after[3] == pytest.approx(2 * before[3], rel=1e-12)  # the largest safe release scales with the room
    assert after[4] == before[4]  # the gas released does not depend on the room


def test_frost_less_warming_gives_a_smaller_pressure_rise(tmp_path):
    sheet = "Frost and pressure"
    cells = ("E31", "E32", "E35", "E36", "E38")
    before = values(FOLDER / "frost_and_pressure.xlsx", sheet, *cells)
    after = values(changed_input(tmp_path, "frost_and_pressure.xlsx", sheet, "E30", 10.0), sheet, *cells)
    assert after[0] == 9.0 and before[0] == 19.0  # mean temperature
    assert after[1] != before[1]  # expansivity at the new mean temperature
    assert 0 < after[2] < before[2] and after[3] < before[3]
    assert before[4].startswith("EXCEEDS") and after[4].startswith("ok")


def test_phase_map_starting_at_200_c_shows_no_ice(tmp_path):
    sheet = "Water map"
    grid = [f"{col}{row}" for col in "BCDEF" for row in range(12, 30)]
    before = values(FOLDER / "phase_maps.xlsx", sheet, "B11", *grid)
    after = values(changed_input(tmp_path, "phase_maps.xlsx", sheet, "D6", 200.0), sheet, "B11", *grid)
    assert (before[0], after[0]) == (-60, 200)
    assert any(v.startswith("ice") for v in before[1:])
    assert set(after[1:]) == {"liquid", "vapor"}  # 200 to 280 °C: below the critical temperature, above any ice
