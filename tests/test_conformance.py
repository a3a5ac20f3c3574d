"""The engine against workbooks Excel computed (../shared/excel-reference, see its README):
every score of the conformance runner stays at or above the floor recorded in
tests/data/conformance_floors.toml, so the score can only go up.

The folder is not part of the repository. Without it the test is skipped with the reason,
except under CI=true, where it fails.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest

from cellfuncs.workbook import conformance
from reference_set import reference_folder

FLOORS = Path(__file__).parent / "data" / "conformance_floors.toml"


@pytest.fixture(scope="module")
def report() -> conformance.Report:
    return conformance.run(reference_folder())


def _floors() -> dict[str, float]:
    data = tomllib.loads(FLOORS.read_text(encoding="utf-8"))
    out = {"all": data["all"], "workbook-average": data["workbook_average"]}
    out |= {f"source:{k}": v for k, v in data["source"].items()}
    out |= {f"category:{k}": v for k, v in data["category"].items()}
    return out


def test_scores_stay_at_or_above_their_floors(report):
    scores = report.scores()
    below = {k: (round(scores.get(k, 0.0), 2), floor) for k, floor in _floors().items() if scores.get(k, 0.0) < floor}
    assert not below, f"scores below their floors (score, floor): {below}"


def test_every_category_and_source_has_a_floor(report):
    assert set(report.scores()) <= set(_floors()), "record the new scores in tests/data/conformance_floors.toml"


def test_no_workbook_is_refused_or_fails(report):
    failed = [(w.file, text) for w in report.workbooks for text in w.causes if text.startswith("workbook ")]
    assert not failed
