"""`cellfuncs eval`: each formula stands on its own, and formulas pasted from documents work.

The expected values are the pack's own (checked against IF97 elsewhere); what these tests check is
the command's contract: one result per formula, the exit code summarising them.
"""

from __future__ import annotations

import json

from cellfuncs.cli import main


def _records(capsys) -> list[dict]:
    return json.loads(capsys.readouterr().out)


def test_a_formula_that_does_not_parse_spoils_no_other(capsys):
    status = main(["eval", "--json", "=1+1", "=1+", "=2*3"])
    records = _records(capsys)
    assert status == 2  # a formula did not parse
    assert [r["value"] for r in records[::2]] == [2.0, 6.0]
    assert records[1]["error"]["code"] == "#VALUE!" and "does not parse" in records[1]["error"]["reason"]


def test_an_error_value_gives_exit_1_and_the_rest_still_computes(capsys):
    status = main(["eval", "--json", '=BOIL_TEMP("water", 1, "Pa")', "=1+1"])
    records = _records(capsys)
    assert status == 1
    assert records[0]["error"]["code"] == "#NUM!" and records[1]["value"] == 2.0


def test_typographic_quotes_read_as_plain_quotes(capsys):
    # word processors turn "water" into \u201cwater\u201d
    assert main(["eval", "--json", "=BOIL_TEMP(\u201cwater\u201d, 1, \u201catm\u201d)", '=BOIL_TEMP("water", 1, "atm")']) == 0
    first, second = _records(capsys)
    assert first["value"] == second["value"]


def _modules_after(*argv: str) -> set[str]:
    """The modules a fresh `cellfuncs` process has imported when it finishes ``argv``."""
    import subprocess
    import sys

    code = ("import runpy, sys\nsys.argv = ['cellfuncs', *sys.argv[1:]]\n"
            "try:\n    runpy.run_module('cellfuncs', run_name='__main__')\nexcept SystemExit:\n    pass\n"
            "print(' '.join(sys.modules), file=sys.stderr)")
    done = subprocess.run([sys.executable, "-c", code, *argv], capture_output=True, text=True)
    return set(done.stderr.split())


def test_a_formula_of_the_pack_s_functions_starts_without_what_it_does_not_need():
    # the built-ins' modules, the workbook engine, openpyxl beyond its tokenizer, pint and scipy are
    # imported only by the formulas that need them
    loaded = _modules_after("eval", '=BOIL_TEMP("water", 1, "atm", "degC")')
    assert "cellfuncs.substances.water.model" in loaded
    unneeded = {m for m in loaded if m.split(".")[0] in ("openpyxl", "pint", "scipy") or m == "numpy.ma"
                or m.startswith(("cellfuncs.formula.fn_", "cellfuncs.workbook"))}
    assert not unneeded
    # the other substances are not built to answer "water"
    assert not any(m.startswith("cellfuncs.substances.general.model") for m in loaded)
    assert "cellfuncs.formula.fn_math" in _modules_after("eval", "=ROUND(2.5, 0)")


def test_the_built_ins_load_on_first_need_and_every_one_has_an_excel_name():
    # a name that is none of Excel's functions is no built-in without loading them (registry.py)
    from cellfuncs.formula import BUILTINS
    from cellfuncs.formula.registry import excel_function_names

    assert set(BUILTINS) <= excel_function_names()
    assert main(["eval", "--json", "=ROUND(BOIL_TEMP(\"water\", 1, \"atm\"), 1)"]) == 0


def test_recalc_s_options_are_there_when_it_is_the_command(capsys):
    import pytest

    with pytest.raises(SystemExit):
        main(["recalc", "--help"])
    assert "--max-array-cells" in capsys.readouterr().out
