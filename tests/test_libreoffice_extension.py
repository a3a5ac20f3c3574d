"""The pack's functions live in LibreOffice Calc through the extension `cellfuncs libreoffice` installs.

- The shipped IDL is the registry's, and the shipped type library is compiled from it.
- Installed into a private profile, LibreOffice recalculates the four design workbooks and
  every formula cell equals what `cellfuncs recalc` stores: 1e-12 relative (read through UNO,
  full doubles), 1e-300 absolute near zero, texts and error codes exactly.
- A workbook written by openpyxl with plain names computes: BOIL_TEMP, STABLE_PHASE, a
  PHASE_LINE spill; errors are true error values and ERROR_REASON gives their reason.
- Blank cells given for text arguments (units, phase words, the solid, the field) are 'not
  given' as in the pack's engine, in single cells and inside ranges (compared with recalc).
- Uninstalling removes the extension from the profile.

Without LibreOffice, its UNO bridge (python3-uno) or the SDK's unoidl-write these tests skip
saying so; with CI=true they fail instead (.ci/run installs them).
"""

from __future__ import annotations

import json
import math
import os
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import openpyxl
import pytest
from openpyxl.worksheet.formula import ArrayFormula

from cellfuncs.errors import CellError
from cellfuncs.hosts.libreoffice import adapt, extension, interface
from cellfuncs.sheet import FUNCTIONS

ROOT = Path(__file__).resolve().parents[1]
DESIGN = ["steam_service.xlsx", "cryogen_release.xlsx", "frost_and_pressure.xlsx", "phase_maps.xlsx"]
REL, ABS = 1e-12, 1e-300
UNOIDL_WRITE = "/usr/lib/libreoffice/sdk/bin/unoidl-write"
OFFICE_TYPES = ["/usr/lib/libreoffice/program/types.rdb", "/usr/lib/libreoffice/program/types/offapi.rdb"]


def _missing(what: str) -> None:
    if os.environ.get("CI") == "true":
        pytest.fail(f"{what} (.ci/run installs it)")
    pytest.skip(what)


# ---- the shipped interface ----------------------------------------------------------------
def test_shipped_idl_is_the_registrys():
    assert interface.IDL_FILE.read_text(encoding="utf-8") == interface.idl_text(), \
        "regenerate: python -c 'from cellfuncs.hosts.libreoffice import interface as i; " \
        "i.IDL_FILE.write_text(i.idl_text())' and compile it (DEVELOPERS.md)"
    for name in FUNCTIONS:
        assert f" {name}(" in interface.IDL_FILE.read_text()


def test_shipped_type_library_is_compiled_from_the_idl(tmp_path):
    # the SDK's unoidl-write is a shell script that needs the office on PATH, as every test here does
    if not os.access(UNOIDL_WRITE, os.X_OK) or shutil.which("soffice") is None:
        _missing("unoidl-write or soffice was not found: install libreoffice-dev and LibreOffice")
    out = tmp_path / "cellfuncs.rdb"
    done = subprocess.run([UNOIDL_WRITE, *OFFICE_TYPES, str(interface.IDL_FILE), str(out)], capture_output=True,
                          text=True)
    assert done.returncode == 0, done.stderr
    assert out.read_bytes() == interface.RDB_FILE.read_bytes(), "recompile cellfuncs.rdb from CellFuncs.idl"


# ---- the adapter, without LibreOffice ------------------------------------------------------
def test_error_values_carry_calcs_error_numbers():
    import struct

    for code, number in adapt.CALC_ERRORS.items():
        value = adapt.error_value(CellError(code, "a reason"))
        assert math.isnan(value) and struct.unpack("<Q", struct.pack("<d", value))[0] & 0xFFFFFFFF == number
    assert adapt.result(FUNCTIONS["BOIL_TEMP"].call("water", 1, "parsec"))[0][0] != 0  # a #VALUE! goes out as NaN


def test_a_zero_in_a_text_argument_is_blank_and_ranges_become_arrays():
    assert adapt.argument(0.0, text=True) is None and adapt.argument(0.0, text=False) == 0.0
    assert adapt.argument(((1.0, ""), (2.0, "x")), text=False).tolist() == [[1.0, ""], [2.0, "x"]]
    assert adapt.result(np.array([1.0, 2.0])) == ((1.0, 2.0),) and adapt.result("liquid") == (("liquid",),)
    for name in FUNCTIONS:  # every text argument the engine reads as 'not given' when blank is known
        for p in interface.parameters(name):
            if p.endswith("unit") or p.startswith("phase") or p in ("substance", "solid", "field", "boundary"):
                assert adapt.is_text_argument(p), (name, p)


# ---- inside LibreOffice ----------------------------------------------------------------------
@pytest.fixture(scope="module")
def office():
    try:
        return extension.find_office()
    except extension.Setup as exc:
        _missing(str(exc))


@pytest.fixture(scope="module")
def profile(office, tmp_path_factory):
    folder = tmp_path_factory.mktemp("lo-profile") / "profile"
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "libreoffice", "install", "--profile", str(folder)],
                          capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "installed in LibreOffice" in done.stdout
    return folder


def _plain_names_workbook(path: Path) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Plain"
    ws["A1"] = '=BOIL_TEMP("water",1,"atm","degC")'
    ws["A2"] = '=STABLE_PHASE("water",25,1,"degC","atm")'
    ws["A3"] = '=BOIL_TEMP("water",50,"Pa")'
    ws["A4"] = "=ERROR_REASON(A3)"
    ws["A5"] = "=IFERROR(A3,-1)"
    ws["A6"] = '=A2="liquid"'
    ws["C1"] = ArrayFormula("C1:D5", '=PHASE_LINE("water","boil",100,200,5,"degC","bar")')
    wb.save(path)


def _blank_cells_workbook(path: Path) -> None:
    """Blank cells (column Z is empty) in text arguments, alone and inside ranges."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Blanks"
    ws["A1"] = '=BOIL_TEMP("water",101325,Z1,Z2)'
    ws["A2"] = '=MASS_DENSITY("water",300,101325,Z1)'
    ws["A3"] = '=MELT_PRESSURE("water",260,"K",Z1,Z2)'
    ws["A4"] = '=INDEX(SUBSTANCE_INFO("water",Z1),1,1)'  # blank field: the whole definition
    ws["A5"] = '=STABLE_PHASE("water",300,101325,Z1,Z2)'
    ws["A6"] = '=SUBCOOLING("water",90,1,"degC",Z3)'
    ws["B1"], ws["B2"] = 1, 2
    ws["A7"] = ArrayFormula("A7:A9", '=BOIL_TEMP("water",B1:B3,"bar","degC")')  # B3 blank inside the range
    ws["A10"] = ArrayFormula("A10:A12", '=MOLAR_VOLUME("water",300,101325,C1:C3)')
    ws["C1"], ws["C2"] = "liquid", "vapor"
    wb.save(path)


@pytest.fixture(scope="module")
def computed(office, profile, tmp_path_factory):
    """Every workbook recalculated twice: by `cellfuncs recalc` (stored) and inside LibreOffice."""
    folder = tmp_path_factory.mktemp("lo-workbooks")
    inputs = folder / "in"
    inputs.mkdir()
    for name in DESIGN:
        shutil.copy(ROOT / "workbooks" / name, inputs / name)
    _plain_names_workbook(inputs / "plain_names.xlsx")
    _blank_cells_workbook(inputs / "blank_cells.xlsx")
    stored = folder / "stored"
    paths = sorted(inputs.glob("*.xlsx"))
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "recalc", *map(str, paths), "--out", str(stored)],
                          capture_output=True, text=True)
    assert done.returncode in (0, 1), done.stdout + done.stderr  # 1: some results are error values
    out = folder / "libreoffice.json"
    done = extension.run_office(office, ["recalc", str(profile), str(out), *map(str, paths)])
    assert done.returncode == 0, done.stdout + done.stderr
    results = json.loads(out.read_text())
    return {Path(p).name: (stored / Path(p).name, r) for p, r in results.items()}


def _theirs(kind: str, value):
    return adapt.EXCEL_CODES.get(value, f"Calc error {value}") if kind == "e" else value


def _equal(ours, theirs) -> bool:
    if isinstance(ours, (int, float)) and isinstance(theirs, (int, float)) and not isinstance(ours, bool):
        return abs(ours - theirs) <= max(REL * max(abs(ours), abs(theirs)), ABS)
    return ours == theirs


def _compare(stored: Path, cells: list) -> list:
    values = openpyxl.load_workbook(stored, data_only=True)
    return [(sheet, r, c, values[sheet].cell(r, c).value, _theirs(kind, v)) for sheet, r, c, kind, v in cells
            if not _equal(values[sheet].cell(r, c).value, _theirs(kind, v))]


@pytest.mark.parametrize("name", DESIGN)
def test_design_workbook_computes_in_libreoffice_as_recalc_stores(computed, name):
    stored, result = computed[name]
    formulas = [c for ws in openpyxl.load_workbook(stored).worksheets for row in ws.iter_rows() for c in row
                if isinstance(c.value, str) and c.value.startswith("=") or isinstance(c.value, ArrayFormula)]
    assert len(result["cells"]) >= len(formulas) > 30
    wrong = _compare(stored, result["cells"])
    assert not wrong, f"{len(wrong)} of {len(result['cells'])} cells differ, e.g. {wrong[:8]}"


def test_plain_names_compute_with_true_errors_and_their_reason(computed):
    stored, result = computed["plain_names.xlsx"]
    cells = {(r, c): _theirs(kind, v) for _, r, c, kind, v in result["cells"]}
    assert cells[(1, 1)] == pytest.approx(99.974, abs=5e-4)  # IAPWS-IF97 region 4: 99.974 degC at 1 atm
    assert cells[(2, 1)] == "liquid" and cells[(6, 1)] == 1.0  # the label compares equal to the text (TRUE)
    assert cells[(3, 1)] == "#NUM!" and cells[(5, 1)] == -1.0
    assert cells[(4, 1)].startswith("#NUM! 50 Pa is below the triple-point pressure of water")
    line = FUNCTIONS["PHASE_LINE"].call("water", "boil", 100, 200, 5, "degC", "bar")
    for i in range(5):
        assert cells[(1 + i, 3)] == line[i, 0] and cells[(1 + i, 4)] == pytest.approx(line[i, 1], rel=REL)
    # ERROR_REASON is LibreOffice's alone (the pack's engine keeps the reason in the error value)
    assert not _compare(stored, [c for c in result["cells"] if (c[1], c[2]) != (4, 1)])


def test_blank_cells_in_text_arguments_are_not_given_as_in_the_engine(computed):
    stored, result = computed["blank_cells.xlsx"]
    assert len(result["cells"]) == 12
    wrong = _compare(stored, result["cells"])
    assert not wrong, wrong
    values = openpyxl.load_workbook(stored, data_only=True)["Blanks"]
    assert values["A1"].value == pytest.approx(373.124, abs=1e-3) and values["A9"].value == "#VALUE!"


def test_uninstall_removes_the_extension(office, profile, tmp_path):
    def listed() -> bool:
        done = extension.run_office(office, ["list", str(profile)])
        assert done.returncode == 0, done.stderr
        return interface.EXTENSION_ID in done.stdout.split()

    assert listed()
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "libreoffice", "uninstall", "--profile", str(profile)],
                          capture_output=True, text=True, timeout=300)
    assert done.returncode == 0 and "removed" in done.stdout, done.stdout + done.stderr
    assert not listed()
