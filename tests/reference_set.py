"""The Excel reference workbooks (../shared/excel-reference, or $CELLFUNCS_EXCEL_REFERENCE) for the
tests that compare with them: a test skips where the folder is absent, and fails under CI=true,
whose machines always have it."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from cellfuncs.workbook.conformance import default_folder


def _absent(reason: str) -> None:
    if os.environ.get("CI") == "true":
        pytest.fail(reason)
    pytest.skip(reason)


def reference_folder() -> Path:
    """The folder of the reference workbooks (with its manifest)."""
    folder = default_folder()
    if folder is None or not (folder / "manifest.tsv").is_file():
        _absent("the Excel reference workbooks are absent (shared/excel-reference beside the project or a parent, "
                "or $CELLFUNCS_EXCEL_REFERENCE)")
    return folder


def reference_workbook(name: str) -> Path:
    """One reference workbook, by its path inside the folder (e.g. ``ironcalc/<file>.xlsx``)."""
    path = reference_folder() / name
    if not path.is_file():
        _absent(f"the Excel reference workbook {name} is not in {path.parent}")
    return path
