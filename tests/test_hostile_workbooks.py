"""``cellfuncs recalc`` against hostile and broken workbooks (built by tests/hostile_workbooks.py).

Each run is a separate process under a 1 GiB address-space limit: it must end with exit 0,
1 or 2 (never an internal error, never out of memory) and every file it writes must open
with openpyxl. The limit on work is the engine's own counting (cellfuncs/workbook/limits.py);
the timeout only catches a hang. Expected texts and values are the engine's contract as
stated in cellfuncs/workbook/*.py and ``cellfuncs recalc --help``, or the arithmetic of
the formulas themselves.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import warnings
import zipfile
from pathlib import Path

import openpyxl
import pytest

import hostile_workbooks as hw
from hostile_workbooks import ENV, WATCHDOG, limit_memory


def recalc(*args: str | Path) -> tuple[int, str, str]:
    """``cellfuncs recalc ARGS`` in a process of its own, under the memory limit."""
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "recalc", *map(str, args)], capture_output=True,
                          text=True, env=ENV, preexec_fn=limit_memory, timeout=WATCHDOG)
    assert done.returncode in (0, 1, 2), done.stderr[-3000:]
    assert "internal error" not in done.stderr and "MemoryError" not in done.stderr, done.stderr[-3000:]
    return done.returncode, done.stdout, done.stderr


def opened(path: Path, data_only: bool = True) -> openpyxl.Workbook:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # openpyxl warns about parts it does not know
        return openpyxl.load_workbook(path, data_only=data_only)


def written(out: Path) -> list[Path]:
    """Every file in ``out``, each of which must open with openpyxl (temporary files included)."""
    files = sorted(out.iterdir()) if out.exists() else []
    for path in files:
        opened(path)
    return files


def one(tmp_path: Path, build, *options: str) -> tuple[int, str, openpyxl.worksheet.worksheet.Worksheet | None]:
    """Recalculate the workbook ``build`` makes into tmp_path/out; its sheet when written."""
    path = build(tmp_path)
    out = tmp_path / "out"
    code, _, err = recalc(path, "--out", out, *options)
    files = written(out)
    return code, err, opened(files[0]).active if files else None


# ---- the work a file implies -------------------------------------------------------------
@pytest.mark.parametrize("build", [hw.array_range_bomb, hw.dynamic_range_bomb])
def test_an_array_range_over_the_whole_sheet_is_refused_naming_the_limit_and_the_cell(tmp_path, build):
    code, err, sheet = one(tmp_path, build)
    assert code == 2 and sheet is None
    assert re.search(r"refused: S!A1: the array formula's range A1:XFD1048576 \(17,179,869,184 cells\) .*over the "
                     r"limit of 1,048,576 \(--max-spill-cells\)", err), err


@pytest.mark.parametrize("build", [hw.broadcast_bomb, hw.function_broadcast_bomb])
def test_a_whole_column_against_a_whole_row_is_that_cells_error_and_the_rest_is_computed(tmp_path, build):
    code, err, sheet = one(tmp_path, build)
    assert code == 1
    assert re.search(r"S!(C5|A5): #NUM! the 100000x16384 array would have 1,638,400,000 cells, over the limit of "
                     r"1,048,576 cells per array \(--max-array-cells\)", err), err
    assert sheet["D5"].value == 42  # =6*7


def test_a_range_one_short_of_the_sheet_edges_is_not_read_cell_by_cell(tmp_path):
    code, err, sheet = one(tmp_path, hw.range_read_bomb)
    assert code == 1 and "S!A1: #NUM! the 1048574x16382 array would have 17,177,739,268 cells" in err
    assert sheet["A1"].value == "#NUM!" and sheet["A2"].value == 42


def test_built_ins_asked_for_too_much_are_errors_counted_before_the_work(tmp_path):
    code, err, sheet = one(tmp_path, hw.builtin_bombs)
    assert code == 1
    assert [sheet[f"B{r}"].value for r in range(1, 5)] == ["#VALUE!"] * 2 + ["#NUM!"] * 2
    assert "S!B3: #NUM! the 100000x16384 array would have 1,638,400,000 cells" in err
    assert "S!B4: #NUM! the 4096x4096 array would have 16,777,216 cells" in err
    assert sheet["B5"].value == 500_000_500_000  # the sum of 1 .. 10^6
    assert len(sheet["A1"].value) == 30_000


def test_many_formulas_within_their_limits_are_bounded_together(tmp_path):
    # the workbook limit lowered from its default (256 such sums) to keep the test short
    code, err, sheet = one(tmp_path, hw.many_column_sums, "--max-workbook-work", "4200000")
    assert code == 1
    assert [sheet[f"B{r}"].value for r in range(1, 6)] == [1, 1, 1, 1, "#NUM!"]
    assert "S!B5: #NUM! the formulas of the workbook would build more than 4,200,000 array cells in all, the limit " \
           "per workbook (--max-workbook-work)" in err
    assert sheet["B1000"].value == "#NUM!"


def test_doubling_a_text_stops_at_the_characters_a_cell_holds(tmp_path):
    code, err, sheet = one(tmp_path, hw.text_doubling_bomb)
    assert code == 1
    # 8 * 2^11 = 16,384 characters fit; the next doubling, 32,768, does not (Excel's cell limit 32,767)
    assert len(sheet["A12"].value) == 16_384
    assert "S!A13: #VALUE! the text would have 32,768 characters; a cell holds at most 32,767" in err
    assert sheet["A61"].value == "#VALUE!" and sheet["B1"].value == 42


def test_a_name_fan_out_is_evaluated_once_per_name(tmp_path):
    code, err, sheet = one(tmp_path, hw.name_fan_out)
    assert code == 0, err
    assert sheet["A1"].value == 2.0**40  # fan_1 = 2^40 * fan_41, fan_41 = B1 = 1


def test_a_thousand_names_deep_need_no_recursion(tmp_path):
    code, err, sheet = one(tmp_path, hw.name_chain)
    assert code == 0, err
    assert sheet["A1"].value == 1000  # chain_1000 = 1, each name above adds 1


def test_a_long_chain_of_cells_written_in_reverse(tmp_path):
    code, err, sheet = one(tmp_path, hw.cell_chain)
    assert code == 0, err
    assert sheet["B1"].value == 3000


def test_deep_formulas_are_values_or_a_clean_error(tmp_path):
    code, err, sheet = one(tmp_path, hw.deep_nesting)
    assert code == 1
    assert (sheet["A1"].value, sheet["A2"].value) == (1, -1)  # 99 negations of 1
    assert "S!A3: #VALUE! the formula nests functions too deeply to evaluate" in err


def test_a_formula_of_a_million_characters_is_not_parsed(tmp_path):
    code, err, sheet = one(tmp_path, hw.long_formula)
    assert code == 1 and "the formula has 999,999 characters; Excel's limit is 8,192" in err
    assert sheet["A2"].value == 6


# ---- values and texts ----------------------------------------------------------------------
def test_stored_numbers_that_are_not_finite_are_errors(tmp_path):
    code, err, sheet = one(tmp_path, hw.non_finite_values)
    assert code == 1
    assert [sheet[c].value for c in ("B1", "B2", "B3")] == ["#NUM!", "#NUM!", 4]
    assert [sheet[c].value for c in ("A1", "A2", "A3", "A4")] == ["#NUM!", "#NUM!", "#NUM!", 2]  # stored as read
    assert "S!B2: #NUM! the stored number 1e999 is not a finite number" in err
    code, out, _ = recalc(hw.non_finite_values(tmp_path), "--check")
    assert "nan" not in out.lower() and "inf" not in out.lower()  # B1's stored NaN is an error, as computed


def test_a_cell_text_cannot_forge_the_summary_line(tmp_path):
    code, err, _ = one(tmp_path, hw.forged_summary)
    assert code == 1
    lines = err.splitlines()
    assert len(lines) == 2 and lines[0].startswith(f"recalc: {tmp_path / 'forged.xlsx'}: S!A1: #VALUE! ")
    assert "\\u2028x\\nrecalc: 1 files, 0 cells" in lines[0]
    assert re.fullmatch(r"recalc: 1 files, 1 cells, 1 errors, 0 differences, [0-9.]+ s", lines[1])


# ---- encodings ------------------------------------------------------------------------------
def test_utf16_parts_are_edited_and_written_in_utf16(tmp_path):
    code, err, sheet = one(tmp_path, hw.utf16_parts)
    assert code == 0, err
    assert (sheet["A2"].value, sheet["A3"].value, sheet["B1"].value, sheet["C1"].value) == (42, "café 42", 1, 2)
    with zipfile.ZipFile(tmp_path / "out" / "utf16.xlsx") as z:
        for name in ("[Content_Types].xml", "_rels/.rels", "xl/_rels/workbook.xml.rels", "xl/worksheets/sheet1.xml"):
            data = z.read(name)
            assert data.startswith(b"\xff\xfe") and 'encoding="UTF-16"' in data.decode("utf-16"), name
        assert "xl/calcChain.xml" not in z.namelist()
        assert "calcChain" not in z.read("xl/_rels/workbook.xml.rels").decode("utf-16")


def test_big_endian_relationships_stay_big_endian(tmp_path):
    code, err, sheet = one(tmp_path, hw.utf16_rels_only)
    assert code == 0 and sheet["A1"].value == 42
    with zipfile.ZipFile(tmp_path / "out" / "utf16_rels.xlsx") as z:
        rels = z.read("_rels/.rels")
    assert rels.startswith(b"\xfe\xff") and "custom-properties" in rels.decode("utf-16")


def test_an_encoding_the_package_format_does_not_allow_is_refused(tmp_path):
    code, err, sheet = one(tmp_path, hw.latin1_part)
    assert code == 2 and sheet is None
    assert "encoded in ISO-8859-1; the package format allows only UTF-8 and UTF-16" in err


# ---- the package ----------------------------------------------------------------------------
def _base(folder: Path) -> Path:
    return hw.write(folder / "base.xlsx", {"A1": 2, "A2": "=A1*21", "F1": "={1,2;3,4}", "C1": '="t"&A1',
                                           "D1": "=SUM(A:A)"}, names={"N": "S!$A$1"}, calc_chain=True)


def test_every_zip_header_field_and_random_bytes_mutated(tmp_path):
    base = _base(tmp_path)
    mutants = [path for _, path in hw.zip_field_mutants(tmp_path, base)] + hw.byte_mutants(tmp_path, base, 300)
    out = tmp_path / "out"
    code, _, err = recalc(*mutants, "--out", out)
    refusals = err.count(": refused: ")
    files = written(out)
    assert refusals + len(files) == len(mutants)  # each either refused or written, and what is written opens
    assert "a damaged zip directory (NotImplementedError: zip file version" in err  # the "version needed" field
    assert refusals > len(mutants) // 2 and files


def test_mutated_parts_that_recalculation_reads(tmp_path):
    base = _base(tmp_path)
    mutants = hw.part_mutants(tmp_path, base, 1000)
    out = tmp_path / "out"
    code, _, err = recalc(*mutants, "--out", out)
    files = written(out)
    assert err.count(": refused: ") + len(files) == len(mutants) and len(files) > 100


def test_a_named_pipe_is_refused_without_waiting_for_a_writer(tmp_path):
    fifo = tmp_path / "pipe.xlsx"
    os.mkfifo(fifo)
    code, _, err = recalc(fifo, "--out", tmp_path / "out")
    assert code == 2 and "refused: not a regular file but a named pipe" in err


def test_a_device_is_refused_without_reading_it():
    code, _, err = recalc("/dev/zero")
    assert code == 2 and "refused: not a regular file but a character device" in err


# ---- in place -----------------------------------------------------------------------------
def test_in_place_writes_through_a_symbolic_link_to_its_target(tmp_path):
    target = _base(tmp_path)
    link = tmp_path / "link.xlsx"
    link.symlink_to(target)
    code, _, err = recalc(link, "--in-place")
    assert code == 0, err
    assert link.is_symlink() and os.readlink(link) == str(target)
    assert opened(target).active["A2"].value == 42
    assert sorted(p.name for p in tmp_path.iterdir()) == ["base.xlsx", "link.xlsx"]


def test_in_place_refuses_a_file_with_other_hard_links_unless_told(tmp_path):
    path = _base(tmp_path)
    other = tmp_path / "other.xlsx"
    os.link(path, other)
    before = path.read_bytes()
    code, _, err = recalc(path, "--in-place")
    assert code == 2 and "refused: 2 hard links share this file" in err and "--split-hard-links" in err
    assert path.read_bytes() == before == other.read_bytes()
    code, _, err = recalc(path, "--in-place", "--split-hard-links")
    assert code == 0, err
    assert opened(path).active["A2"].value == 42 and other.read_bytes() == before


def test_temporary_files_of_finished_processes_are_removed_and_others_kept(tmp_path):
    from cellfuncs.workbook.zipout import temporary_prefix

    path = _base(tmp_path)
    out = tmp_path / "out"
    out.mkdir()
    gone = subprocess.Popen([sys.executable, "-c", "pass"])
    gone.wait()
    mine = temporary_prefix("base.xlsx")  # this test's own process: alive
    stale = out / (mine.replace(f"-{os.getpid()}-", f"-{gone.pid}-") + "abc123.tmp")
    alive = out / (mine + "def456.tmp")
    elsewhere = out / (mine.replace(".cellfuncs-", ".cellfuncs-otherhost").replace(f"-{os.getpid()}-", f"-{gone.pid}-")
                       + "ghi789.tmp")
    for p in (stale, alive, elsewhere):
        p.write_bytes(b"left by a killed run")
    code, _, err = recalc(path, "--out", out)
    assert code == 0, err
    assert sorted(p.name for p in out.iterdir()) == sorted([alive.name, elsewhere.name, "base.xlsx"])
    opened(out / "base.xlsx")
