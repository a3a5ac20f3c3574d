"""The README's promises: its set-up commands are what CI runs, and its main command runs clean."""

from __future__ import annotations

import re
import shlex
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _commands() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    return re.findall(r"```sh\n(.+?)\n```", text, flags=re.S)[:2]


def test_ci_runs_the_readme_test_command():
    test_command = _commands()[1]
    assert test_command in (ROOT / ".ci" / "run").read_text(encoding="utf-8")


VENV = ["python3 -m venv .venv", ". .venv/bin/activate"]


def test_readme_commands_work_in_a_fresh_virtual_environment():
    for command in _commands():
        assert "\n" not in command
        assert command.split(" && ")[:2] == VENV


def test_readme_main_command_is_one_line_install_then_cellfuncs():
    *setup, install, run = _commands()[0].split(" && ")
    assert setup == VENV
    assert install == "python3 -m pip install ."
    assert shlex.split(run)[:2] == ["cellfuncs", "recalc"]


def test_readme_main_command_recalculates_a_design_workbook_cleanly():
    run = shlex.split(_commands()[0].split(" && ")[-1])
    done = subprocess.run([sys.executable, "-m", "cellfuncs", *run[1:]], capture_output=True, text=True, cwd=ROOT)
    assert done.returncode == 0, done.stdout + done.stderr
    assert re.search(r"^recalc: 1 files, \d+ cells, 0 errors, 0 differences, ", done.stderr, flags=re.M), done.stderr


def test_readme_lists_exactly_the_registered_built_ins():
    from cellfuncs.formula.catalog import builtin_list

    text = (ROOT / "README.md").read_text(encoding="utf-8")
    listed = re.search(r"<!-- builtins: generated -->\n(.*?)<!-- /builtins -->", text, flags=re.S)
    assert listed and listed.group(1) == builtin_list(), "regenerate it: python -m cellfuncs.formula.catalog"


def test_readme_table_of_sheet_functions_is_the_registry():
    from cellfuncs.sheet.catalog import function_table

    text = (ROOT / "README.md").read_text(encoding="utf-8")
    listed = re.search(r"<!-- sheet functions: generated -->\n(.*?)<!-- /sheet functions -->", text, flags=re.S)
    assert listed and listed.group(1) == function_table(), "regenerate it: python -m cellfuncs.sheet.catalog"
