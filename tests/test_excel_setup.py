"""``cellfuncs excel-setup``: the printed steps, the refusal off Windows, and the Windows path
with Excel and the add-in installer stood in for (this machine has neither).

The setting names are xlwings' own: its VBA looks up "UDF MODULES" and "INTERPRETER_WIN"
in the workbook's xlwings.conf sheet, then in %USERPROFILE%\\.xlwings\\xlwings.conf.
"""

from __future__ import annotations

import contextlib
import io
import subprocess
import sys

import pytest

from cellfuncs import excel_setup
from cellfuncs.cli import main


def _cli(*args: str) -> tuple[int, str]:
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        code = main(["excel-setup", *args])
    return code, out.getvalue()


def test_steps_name_the_add_in_the_setting_and_both_places_it_is_read_from():
    code, text = _cli("--print-only")
    assert code == 0
    for needed in ("xlwings addin install", "UDF Modules", "cellfuncs.sheet.functions", "xlwings ribbon tab",
                   "sheet named xlwings.conf", r"%USERPROFILE%\.xlwings\xlwings.conf",
                   '"UDF MODULES","cellfuncs.sheet.functions"', "Import Functions",
                   "Trust access to the VBA project object model", sys.executable):
        assert needed in text, needed


def test_steps_say_how_a_shipped_workbook_reaches_the_functions():
    _, text = _cli("--print-only")
    assert "How a shipped workbook reaches the functions" in text
    assert ".xlsm" in text and "xlwings quickstart NAME --standalone" in text and "ImportPythonUDFs" in text
    assert "Cannot perform" not in text  # --print-only only prints


@pytest.mark.skipif(sys.platform == "win32", reason="the non-Windows path")
def test_off_windows_it_prints_the_steps_says_it_cannot_take_them_and_exits_0(tmp_path, monkeypatch):
    monkeypatch.setattr(excel_setup, "user_config", lambda: tmp_path / "xlwings.conf")
    monkeypatch.setattr(subprocess, "run", lambda *a, **k: pytest.fail("nothing may run off Windows"))
    code, text = _cli()
    assert code == 0
    assert "1. Install the pack" in text
    assert f"Cannot perform these steps here: this is {sys.platform}" in text
    assert "Nothing was changed" in text
    assert not (tmp_path / "xlwings.conf").exists()


def test_as_a_command_it_exits_0_off_windows():
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "excel-setup"], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    assert "cellfuncs.sheet.functions" in done.stdout


def test_windows_without_excel_changes_nothing(monkeypatch):
    monkeypatch.setattr(excel_setup.sys, "platform", "win32")
    monkeypatch.setattr(excel_setup, "excel_version", lambda: None)
    assert "Excel was not found" in excel_setup.obstacle()


class _Installer:
    """Stands in for ``python -m xlwings.cli addin install``."""

    def __init__(self, returncode: int):
        self.returncode, self.commands = returncode, []

    def __call__(self, command, **kwargs):
        self.commands.append(command)
        return subprocess.CompletedProcess(command, self.returncode, "Successfully installed the xlwings add-in!", "")


def test_windows_with_excel_installs_the_add_in_and_writes_the_setting(tmp_path, monkeypatch):
    config = tmp_path / ".xlwings" / "xlwings.conf"
    config.parent.mkdir()
    config.write_text('"INTERPRETER_WIN","C:\\other\\python.exe"\n"UDF MODULES","old_module"\n"SHOW CONSOLE","False"\n')
    installer = _Installer(0)
    monkeypatch.setattr(excel_setup.sys, "platform", "win32")
    monkeypatch.setattr(excel_setup, "excel_version", lambda: "Excel.Application.16")
    monkeypatch.setattr(excel_setup, "user_config", lambda: config)
    monkeypatch.setattr(excel_setup.subprocess, "run", installer)
    out = io.StringIO()
    assert excel_setup.run(out=out) == 0
    assert installer.commands == [[sys.executable, "-m", "xlwings.cli", "addin", "install"]]
    settings = excel_setup.read_config(config)
    assert settings == {"INTERPRETER_WIN": "C:\\other\\python.exe", "SHOW CONSOLE": "False",
                        "UDF MODULES": "cellfuncs.sheet.functions"}
    text = out.getvalue()
    assert "Steps 2 and 3a are done" in text
    assert "C:\\other\\python.exe, not this Python" in text  # the interpreter is the user's to change


def test_windows_with_excel_writes_the_interpreter_when_none_is_set(tmp_path, monkeypatch):
    config = tmp_path / "xlwings.conf"
    monkeypatch.setattr(excel_setup.sys, "platform", "win32")
    monkeypatch.setattr(excel_setup, "excel_version", lambda: "Excel.Application.16")
    monkeypatch.setattr(excel_setup, "user_config", lambda: config)
    monkeypatch.setattr(excel_setup.subprocess, "run", _Installer(0))
    assert excel_setup.run(out=io.StringIO()) == 0
    assert excel_setup.read_config(config) == {"UDF MODULES": "cellfuncs.sheet.functions",
                                               "INTERPRETER_WIN": sys.executable}


def test_a_failed_add_in_install_is_reported_and_writes_nothing(tmp_path, monkeypatch):
    config = tmp_path / "xlwings.conf"
    monkeypatch.setattr(excel_setup.sys, "platform", "win32")
    monkeypatch.setattr(excel_setup, "excel_version", lambda: "Excel.Application.16")
    monkeypatch.setattr(excel_setup, "user_config", lambda: config)
    monkeypatch.setattr(excel_setup.subprocess, "run", _Installer(1))
    out = io.StringIO()
    assert excel_setup.run(out=out) == 1
    assert "was not installed" in out.getvalue()
    assert not config.exists()
