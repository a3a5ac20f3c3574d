"""Messages as the user reads them: in the units typed, naming the right call, short enough for Excel."""

from __future__ import annotations

import numpy as np

from cellfuncs.errors import NA, CellError
from cellfuncs.sheet.functions import BOIL_PRESSURE, BOIL_TEMP, LATENT_HEAT, MASS_DENSITY, SUBSTANCE_INFO, SUBSTANCES
from cellfuncs.sheet.registry import EXCEL_TEXT_LIMIT, FUNCTIONS


def reason(value) -> str:
    assert isinstance(value, CellError), value
    return value.reason


def test_messages_speak_the_units_typed():
    # water's critical point 22.064 MPa (IAPWS-95) is 219.627 barg over the standard atmosphere
    assert reason(BOIL_TEMP("water", 300, "barg", "degC")).startswith(
        "300 barg is above the critical pressure of water (219.627 barg)")
    # carbon dioxide's critical temperature 304.128 K (Span and Wagner 1996) is 30.978 degC
    assert reason(BOIL_PRESSURE("CO2", 40, "degC", "bar")).startswith(
        "40 degC is above the critical temperature of carbon dioxide (30.978 degC)")
    # gauge units with the site's barometer: 1 Pa absolute is -0.8349 barg at 1600 m (ISO 2533: 83.49 kPa)
    assert reason(BOIL_TEMP("water", -0.83489, "barg@1600m")).startswith("-0.83489 barg@1600m is below the "
                                                                         "triple-point pressure")
    # SI stays SI
    assert reason(BOIL_TEMP("water", 1, "Pa")).startswith("1 Pa is below the triple-point pressure of water "
                                                          "(611.657 Pa)")


def test_an_error_from_a_nested_call_is_passed_on_as_it_is():
    inner = BOIL_TEMP("SF6", 1, "atm")  # below sulfur hexafluoride's triple point, 2.3 atm
    outer = LATENT_HEAT("SF6", "boil", inner, "K", "kJ/kg")
    assert outer == inner and reason(outer).startswith("1 atm is below the triple-point pressure")
    bare = BOIL_TEMP("water", CellError(NA))
    assert bare == CellError(NA, "pressure is #N/A")


def test_no_text_on_the_excel_path_is_longer_than_excel_takes():
    names = [str(v) for v in np.asarray(SUBSTANCES(), dtype=object).ravel()]
    cell = FUNCTIONS["SUBSTANCE_INFO"].cell
    cut = 0
    for name in names:
        full = [v for v in np.asarray(SUBSTANCE_INFO(name), dtype=object).ravel() if isinstance(v, str)]
        shown = [v for row in cell(name) for v in row if isinstance(v, str)]
        assert len(full) == len(shown) and all(len(v) <= EXCEL_TEXT_LIMIT for v in shown)
        for whole, part in zip(full, shown):
            assert whole == part or (part.endswith("…") and whole.startswith(part[:-1]))
            cut += whole != part
    assert cut > 0  # the data do hold longer notes: the Python function keeps them whole
    long_error = FUNCTIONS["MASS_DENSITY"].cell("water", 25, 1, "x" * 400, "degC", "atm")
    assert long_error.startswith("#VALUE! ") and len(long_error) <= EXCEL_TEXT_LIMIT
    assert len(reason(MASS_DENSITY("water", 25, 1, "x" * 400, "degC", "atm"))) > EXCEL_TEXT_LIMIT
