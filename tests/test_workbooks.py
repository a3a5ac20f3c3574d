"""The design workbooks (workbooks/*.xlsx): their script rebuilds them byte for byte but for
the last digits of a number (which numpy releases may move), their stored values pass
``cellfuncs recalc --check``, and changing an input moves the results that depend on it.

Expected directions come from the physics of each sheet (a warmer header reading has more
superheat; a bigger room dilutes the same gas more; less warming gives a smaller pressure
rise; a map that starts at 200 °C shows no ice); the numbers compared are the pack's own
before and after the change.
"""

from __future__ import annotations

import math
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


_NUMBER = re.compile(rb"<v>(-?[0-9][0-9.eE+-]*)</v>")


def _numbers_apart(made: bytes, kept: bytes) -> list[tuple[bytes, bytes]]:
    """The stored numbers of two parts that differ by more than floating-point noise, or the
    whole parts when they differ elsewhere. Solvers and numpy's vectorised functions may move
    the last one or two digits from one numpy release to the next; a number that moves more
    is a change."""
    if _NUMBER.sub(b"", made) != _NUMBER.sub(b"", kept):
        return [(made, kept)]
    return [(a, b) for a, b in zip(_NUMBER.findall(made), _NUMBER.findall(kept))
            if not math.isclose(float(a), float(b), rel_tol=1e-12, abs_tol=1e-300)]


@pytest.mark.parametrize("name", NAMES)
def test_each_workbook_rebuilds_byte_for_byte(rebuilt, name):
    made, kept = zipfile.ZipFile(rebuilt / name), zipfile.ZipFile(FOLDER / name)
    assert made.namelist() == kept.namelist()
    apart = {m: _numbers_apart(made.read(m), kept.read(m)) for m in made.namelist()}
    apart = {m: d[:3] for m, d in apart.items() if d}
    assert not apart, f"workbooks/{name} differs from what workbooks/build.py makes: run python3 workbooks/build.py"


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
    assert after[4] == pytest.approx(before[4], rel=1e-12)  # the gas released does not depend on the room


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


# ---- legibility: what a reader sees on screen and on paper ---------------------------------------
# Widths in column-width units (the width of "0" in the workbook's font), estimated per character
# for a proportional sans font (common practice: narrow i, l, punctuation; wide m, w, capitals).
_NARROW, _SLIM, _WIDE = set("il.,:;|!'`"), set("fjrtI()[]- /"), set("mwMW@%")


def _text_width(text: str, size: float, bold: bool) -> float:
    units = sum(0.45 if c in _NARROW else 0.65 if c in _SLIM else 1.4 if c in _WIDE else
                1.15 if c.isupper() else 1.0 for c in text)
    return units * size / 11 * (1.08 if bold else 1.0)


def _books():
    for name in NAMES:
        path = FOLDER / name
        yield name, openpyxl.load_workbook(path), openpyxl.load_workbook(path, data_only=True)


def _span(ws, cell) -> tuple[float, float]:
    """(width in units, height in points) of the cell or the merged range it starts."""
    from openpyxl.utils import get_column_letter

    first_col = last_col = cell.column
    first_row = last_row = cell.row
    for merged in ws.merged_cells.ranges:
        if merged.min_row == cell.row and merged.min_col == cell.column:
            last_col, last_row = merged.max_col, merged.max_row
    width = sum(ws.column_dimensions[get_column_letter(c)].width or 8.43 for c in range(first_col, last_col + 1))
    height = sum(ws.row_dimensions[r].height or 15.0 for r in range(first_row, last_row + 1))
    return width, height


def test_no_text_is_wider_than_its_cell():
    too_wide = []
    for name, _, values in _books():
        for ws in values.worksheets:
            for row in ws.iter_rows():
                for cell in row:
                    if not isinstance(cell.value, str) or not cell.value:
                        continue
                    font = cell.font
                    need = _text_width(cell.value, font.sz or 11, bool(font.b))
                    width, height = _span(ws, cell)
                    if cell.alignment.wrap_text:  # wrapped: the row must be tall enough for its lines
                        lines = math.ceil(need / (width * 0.95))
                        if lines * (font.sz or 11) * 1.2 > height + 1:
                            too_wide.append((name, ws.title, cell.coordinate, cell.value[:40], "rows"))
                    elif need > width:
                        too_wide.append((name, ws.title, cell.coordinate, cell.value[:40], round(need / width, 2)))
    assert not too_wide, too_wide


def test_no_font_is_below_8_points_and_nothing_shrinks_to_fit():
    small = []
    for name, formulas, _ in _books():
        for ws in formulas.worksheets:
            for row in ws.iter_rows():
                for cell in row:
                    if cell.value is not None and ((cell.font.sz or 11) < 8 or cell.alignment.shrink_to_fit):
                        small.append((name, ws.title, cell.coordinate))
            for rules in ws.conditional_formatting:
                for rule in rules.rules:
                    if rule.dxf is not None and rule.dxf.font is not None and (rule.dxf.font.sz or 11) < 8:
                        small.append((name, ws.title, str(rules.sqref)))
    assert not small, small


def test_every_sheet_prints_one_page_wide_at_a_readable_scale():
    kit = _kit_module()
    for name, formulas, _ in _books():
        for ws in formulas.worksheets:
            setup = ws.page_setup
            assert ws.sheet_properties.pageSetUpPr.fitToPage, (name, ws.title)
            assert (setup.fitToWidth, setup.fitToHeight) == (1, 0), (name, ws.title)
            area = ws.print_area
            last = ws.max_column
            if area:  # the printed part of a sheet whose data continue beyond it
                from openpyxl.utils import column_index_from_string

                last = column_index_from_string(area.split(":")[-1].lstrip("$").rstrip("0123456789").replace("$", ""))
            from openpyxl.utils import get_column_letter

            width = sum(ws.column_dimensions[get_column_letter(c)].width or 8.43 for c in range(1, last + 1))
            orientation, scale = kit.print_scale(width, last)
            assert setup.orientation == orientation and scale >= 60, (name, ws.title, scale)


def _kit_module():
    sys.path.insert(0, str(FOLDER))
    try:
        import sheet_kit
    finally:
        sys.path.pop(0)
    return sheet_kit


def test_every_legend_entry_is_a_phase_name():
    from cellfuncs.substances import lookup

    for ws in openpyxl.load_workbook(FOLDER / "phase_maps.xlsx").worksheets:
        if not ws.title.endswith("map"):
            continue
        labels = set(lookup(ws["D5"].value)._labels) | {"no data"}
        start = next(r for r in range(1, ws.max_row + 1) if str(ws.cell(r, 1).value or "").startswith("Legend"))
        entries = [ws.cell(r, 1).value for r in range(start + 1, ws.max_row + 1) if ws.cell(r, 1).value]
        assert len(entries) >= 6, ws.title
        for entry in entries:
            names = [n.strip() for n in entry.split(",")]
            assert entry == "phase + phase (on a line)" or all(n in labels for n in names), (ws.title, entry)


def test_chart_series_have_pairwise_distinct_colours():
    with zipfile.ZipFile(FOLDER / "phase_maps.xlsx") as z:
        charts = [n for n in z.namelist() if n.startswith("xl/charts/chart")]
        assert len(charts) == 2
        for chart in charts:
            xml = z.read(chart).decode()
            series = re.findall(r"<(?:c:)?ser>.*?</(?:c:)?ser>", xml, flags=re.S)
            colours = [re.search(r'srgbClr val="([0-9A-Fa-f]{6})"', s).group(1).upper() for s in series]
            assert len(colours) == len(series) >= 5 and len(set(colours)) == len(colours), (chart, colours)


def test_text_results_keep_their_distance_from_the_numbers_beside_them():
    # a text result right of a number (the phase beside a margin, "146.7gas") is indented or centred
    for name, formulas, values in _books():
        for ws, vs in zip(formulas.worksheets, values.worksheets):
            for row in vs.iter_rows(min_col=2):
                for cell in row:
                    left = vs.cell(cell.row, cell.column - 1).value
                    if isinstance(cell.value, str) and isinstance(left, (int, float)) and not isinstance(left, bool):
                        align = ws[cell.coordinate].alignment
                        assert align.indent >= 1 or align.horizontal in ("center", "right"), (
                            name, ws.title, cell.coordinate, cell.value)
