"""No copy-paste twins in the package: pylint's similarity checker (duplicate-code, R0801) over
cellfuncs/ finds no block of MIN_LINES or more lines that appears twice, docstrings, comments,
imports and signatures left out (Excel's argument dialog needs the sheet functions' docstring
argument blocks, which may repeat; DEVELOPERS.md says so)."""

from __future__ import annotations

import importlib.util
import os
import subprocess
import sys
from pathlib import Path

import pytest

MIN_LINES = 4
PACKAGE = Path(__file__).resolve().parents[1] / "cellfuncs"


def test_the_package_has_no_duplicate_code():
    if importlib.util.find_spec("pylint") is None:
        message = "pylint runs the duplicate-code check: pip install '.[test]'"
        if os.environ.get("CI") == "true":
            pytest.fail(message)
        pytest.skip(message)
    done = subprocess.run(
        [sys.executable, "-m", "pylint", "--disable=all", "--enable=duplicate-code", f"--min-similarity-lines={MIN_LINES}",
         "--ignore-docstrings=yes", "--ignore-comments=yes", "--ignore-imports=yes", "--ignore-signatures=yes",
         "--score=no", str(PACKAGE)], capture_output=True, text=True, timeout=300)
    assert done.returncode == 0 and "R0801" not in done.stdout, done.stdout[-4000:] + done.stderr[-2000:]
