"""IRR against the values Excel stored in the reference workbook of IRR cases
(ironcalc/xlsx_tests_calc_tests_FINANCIAL_IRR.xlsx, sheet General): Excel stops its iteration
early, so its IRR carries the last digits of that stop and an NPV at it is a residual of
1e-11 or so; the engine's IRR reproduces those digits, so the NPV residuals match too."""

from __future__ import annotations

import openpyxl
import pytest

from cellfuncs.formula import compute
from reference_set import reference_workbook

WORKBOOK = "ironcalc/xlsx_tests_calc_tests_FINANCIAL_IRR.xlsx"
# Rows of sheet General whose flows are in A:F, IRR(A:F) in L, NPV(L, A:F) in M and, where given,
# IRR(A:F, I) in N: Excel's stored values are the checks.
ROWS = (2, 3, 4, 8, 9, 13, 22)


@pytest.fixture(scope="module")
def general():
    book = openpyxl.load_workbook(reference_workbook(WORKBOOK), data_only=True)
    return book["General"]


def _flows(sheet, row: int) -> str:
    values = [sheet.cell(row, column).value for column in range(1, 7)]
    return ",".join(repr(float(v)) for v in values if type(v) in (int, float))


@pytest.mark.parametrize("row", ROWS)
def test_irr_is_excels_to_the_last_bit(general, row):
    flows = _flows(general, row)
    assert compute(f"=IRR({{{flows}}})") == general.cell(row, 12).value  # Excel's stored L{row}
    guess, with_guess = general.cell(row, 9).value, general.cell(row, 14).value
    if type(guess) in (int, float) and type(with_guess) is float:
        # Excel's stored N{row}; from a guess of -0.9 (row 4) the last secant step rounds a bit apart
        assert compute(f"=IRR({{{flows}}}, {guess!r})") == pytest.approx(with_guess, rel=1e-14, abs=0)


@pytest.mark.parametrize("row", (2, 3, 4, 8))
def test_npv_at_excels_irr_is_excels_residual(general, row):
    flows, stored = _flows(general, row), general.cell(row, 13).value  # Excel's stored M{row}
    got = compute(f"=NPV(IRR({{{flows}}}), {flows})")
    assert abs(stored) > 1e-12 and got == pytest.approx(stored, rel=0, abs=1e-12)
