"""``cellfuncs excel-setup``: the steps that make the pack's functions appear in Excel.

Excel reaches the functions through xlwings: its add-in (or its VBA module inside a
macro-enabled workbook) starts this Python and imports the module named by the setting
``UDF Modules``. xlwings reads settings from a workbook's ``xlwings.conf`` sheet first,
then from the user's config file, where its ribbon stores them. On Windows with Excel the
command installs the add-in and writes the setting; everywhere it prints the steps, and
elsewhere it says plainly that it cannot take them.

>>> "cellfuncs.sheet.functions" in steps()
True
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path
from typing import TextIO

MODULE = "cellfuncs.sheet.functions"
CONFIG_KEY = "UDF MODULES"  # the key as xlwings' VBA looks it up (keys are compared in upper case)
INTERPRETER_KEY = "INTERPRETER_WIN"


def user_config() -> Path:
    """xlwings' user config file on Windows: ``%USERPROFILE%\\.xlwings\\xlwings.conf``."""
    return Path.home() / ".xlwings" / "xlwings.conf"


def steps(python: str | None = None) -> str:
    """The set-up steps as text, naming the Python that Excel should call."""
    python = python or sys.executable
    return f"""\
Excel set-up for cellfuncs: the functions run as xlwings user-defined functions in desktop
Excel on Windows.

1. Install the pack into the Python that Excel will call (this one is {python}):
     "{python}" -m pip install <the cellfuncs project folder>
2. Close Excel and install xlwings' add-in:
     xlwings addin install
   It copies xlwings.xlam into Excel's XLSTART folder and, if the file does not exist yet,
   writes this Python as {INTERPRETER_KEY} into %USERPROFILE%\\.xlwings\\xlwings.conf.
3. Name the pack's function module in the setting UDF Modules, in either place:
   a. for every workbook: in Excel's xlwings ribbon tab set UDF Modules to {MODULE}
      (the ribbon stores it in %USERPROFILE%\\.xlwings\\xlwings.conf as the line
      "{CONFIG_KEY}","{MODULE}");
   b. for one workbook: add a sheet named xlwings.conf with "UDF Modules" in A1 and
      {MODULE} in B1; further settings go in the rows below (e.g. "Interpreter_Win" in
      A2, the path to python.exe in B2). This sheet overrides the ribbon for that workbook.
4. In Excel: File > Options > Trust Center > Trust Center Settings > Macro Settings, tick
   "Trust access to the VBA project object model": importing the functions writes VBA
   wrappers into the workbook.
5. Open the workbook and click Import Functions in the xlwings tab. The functions appear in
   Insert Function under the category "cellfuncs"; Ctrl+Alt+F9 recalculates every formula.

How a shipped workbook reaches the functions
- The design workbooks (workbooks/*.xlsx) hold the formulas and the values cellfuncs stored,
  but no macros: an .xlsx cannot keep the VBA wrappers.
- With the add-in (steps 1 to 5): open the workbook, Import Functions, then save it as a
  macro-enabled workbook (.xlsm) so the wrappers stay in it.
- Without the add-in: a macro-enabled copy carries xlwings' VBA module itself. Create one with
     xlwings quickstart NAME --standalone
  move the design workbook's sheets into NAME.xlsm, add the xlwings.conf sheet of step 3b,
  and run its macro ImportPythonUDFs once (step 4 applies here too).
- Either way Excel calls the Python of step 1, which needs cellfuncs installed.
- A function's error comes back as text ("#NUM! reason"): test it with LEFT(cell, 1) = "#".
"""


def set_config(path: Path, key: str, value: str) -> None:
    """Set ``"key","value"`` in an xlwings config file, keeping its other lines (keys compare
    case-insensitively, as xlwings reads them).

    >>> import tempfile
    >>> p = Path(tempfile.mkdtemp()) / "xlwings.conf"
    >>> _ = p.write_text('"INTERPRETER_WIN","C:\\\\py\\\\python.exe"\\n"udf modules","old"\\n')
    >>> set_config(p, CONFIG_KEY, MODULE)
    >>> print(p.read_text().strip())
    "INTERPRETER_WIN","C:\\py\\python.exe"
    "UDF MODULES","cellfuncs.sheet.functions"
    """
    lines = path.read_text(encoding="utf-8").splitlines() if path.exists() else []
    kept = [line for line in lines if line.strip() and _key(line) != key.upper()]
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text("\n".join(kept + [f'"{key}","{value}"']) + "\n", encoding="utf-8")


def read_config(path: Path) -> dict[str, str]:
    """The settings of an xlwings config file, keys in upper case."""
    if not path.exists():
        return {}
    settings = {}
    for line in path.read_text(encoding="utf-8").splitlines():
        parts = [p.strip().strip('"') for p in line.split('","', 1)]
        if len(parts) == 2:
            settings[parts[0].upper()] = parts[1]
    return settings


def _key(line: str) -> str:
    return line.split(",", 1)[0].strip().strip('"').upper()


def excel_version() -> str | None:
    """Excel's registered version (e.g. "Excel.Application.16") on Windows, else None."""
    if sys.platform != "win32":
        return None
    try:
        import winreg

        with winreg.OpenKey(winreg.HKEY_CLASSES_ROOT, r"Excel.Application\CurVer") as key:
            return str(winreg.QueryValue(key, None))
    except OSError:
        return None


def obstacle() -> str | None:
    """Why the steps cannot be taken on this machine, or None when they can."""
    if sys.platform != "win32":
        return (f"this is {sys.platform}, and xlwings' Excel add-in runs with desktop Excel on Windows "
                "(the pack registers its functions with xlwings only there)")
    if excel_version() is None:
        return "Excel was not found (no Excel.Application in the Windows registry)"
    try:
        import xlwings  # noqa: F401
    except ImportError:
        return "xlwings is not installed in this Python"
    return None


def perform(out: TextIO, config: Path | None = None) -> int:
    """Steps 2 and 3a: install the add-in and write UDF Modules; 0 when both succeed."""
    config = config or user_config()
    command = [sys.executable, "-m", "xlwings.cli", "addin", "install"]
    print("Running: " + " ".join(command), file=out)
    done = subprocess.run(command, capture_output=True, text=True)
    print((done.stdout + done.stderr).strip(), file=out)
    if done.returncode != 0:
        print(f"The add-in was not installed (exit {done.returncode}); follow steps 2 to 5 by hand.", file=out)
        return 1
    set_config(config, CONFIG_KEY, MODULE)
    print(f'Wrote "{CONFIG_KEY}","{MODULE}" to {config}', file=out)
    interpreter = read_config(config).get(INTERPRETER_KEY)
    if interpreter is None:
        set_config(config, INTERPRETER_KEY, sys.executable)
        print(f"Wrote {INTERPRETER_KEY} = {sys.executable}", file=out)
    elif os.path.normcase(interpreter) != os.path.normcase(sys.executable):
        print(f"Note: xlwings calls {interpreter}, not this Python; cellfuncs must be installed there "
              f"(or set Interpreter in the xlwings tab to {sys.executable}).", file=out)
    print("Steps 2 and 3a are done. Steps 4 and 5 are taken in Excel: trust access to the VBA project, "
          "then Import Functions.", file=out)
    return 0


def run(print_only: bool = False, out: TextIO | None = None) -> int:
    """Print the steps; take steps 2 and 3a where Excel is present unless ``print_only``."""
    out = out or sys.stdout
    print(steps(), file=out)
    if print_only:
        return 0
    reason = obstacle()
    if reason is not None:
        print(f"Cannot perform these steps here: {reason}. Nothing was changed; follow the steps above "
              "on a Windows machine with Excel.", file=out)
        return 0
    return perform(out)
