"""Saturated vapours of polar and hydrogen-bonding substances as the corresponding-states mapping
onto propane gives them (substances/helmholtz/mapped.py), measured against published values.

The mapping's two shape factors reproduce the vapour pressure and the saturated liquid density;
the saturated vapour then has propane's compressibility factor at the conformal temperature, which
is too high for a polar vapour (its second virial coefficient is more negative), so the vapour
density comes out low and the enthalpy of boiling, (h'' - h') = T (v'' - v') dp/dT, high by about
the same fraction. These tests record how far, so that a change to the mapping shows in them.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from cellfuncs.sheet.functions import BOIL_PRESSURE, LATENT_HEAT, MASS_DENSITY
from cellfuncs.substances import lookup
from cellfuncs.substances.base import LIQUID, VAPOR
from cellfuncs.substances.general.definition import load_builtin
from cellfuncs.substances.general.model import GeneralSubstance
from cellfuncs.substances.helmholtz.corresponding import MappedSubstance


def _saturation(sub, T: np.ndarray) -> tuple[np.ndarray, ...]:
    p = sub.boil_pressure(T).values
    liquid, vapour = sub.props(T, p * (1 + 1e-9), LIQUID)[0], sub.props(T, p * (1 - 1e-9), VAPOR)[0]
    return p, 1.0 / liquid.v, 1.0 / vapour.v, vapour.h - liquid.h


def test_ammonia_mapped_from_its_data_against_its_reference_equation() -> None:
    # Ammonia's data file (published vapour-pressure line, liquid density) mapped onto propane as if
    # it had no equation, against the Tillner-Roth et al. (1993) equation (checked against its
    # saturation tables in tests/test_equation_ammonia.py). Measured at 240, 273.15, 313.15, 350 K:
    # vapour pressure +0.14, +0.11, +0.02, +0.00 %; liquid density 0.00, -0.15, -0.34, -0.53 %;
    # saturated vapour -1.05, -2.41, -4.89, -8.16 %; enthalpy of boiling +1.22, +2.54, +5.20, +9.47 %
    definition = dataclasses.replace(load_builtin("ammonia"), equation="")
    mapped = MappedSubstance(definition, GeneralSubstance(definition))
    T = np.array([240.0, 273.15, 313.15, 350.0])
    p, rho_l, rho_v, h_fg = (m / r - 1.0 for m, r in zip(_saturation(mapped, T), _saturation(lookup("ammonia"), T)))
    assert np.abs(p).max() < 2e-3
    assert np.abs(rho_l).max() < 6e-3
    assert np.all((rho_v < 0.0) & (rho_v > -0.09)) and np.all(np.diff(rho_v) < 0.0)  # lower as it grows denser
    assert np.all((h_fg > 0.0) & (h_fg < 0.10))


# substance, degC, saturated vapour density (kg/m3) or None, enthalpy of boiling, its unit, and the
# measured deviations of the mapping (vapour, enthalpy of boiling), with the source of the values:
HANDBOOK = [
    # ASHRAE Handbook - Fundamentals, refrigerant tables, at 0 degC (from memory of the tables)
    ("R-32", 0.0, 21.96, 315.3, "kJ/kg", (-0.046, 0.056)),
    ("R-22", 0.0, 21.23, 205.0, "kJ/kg", (-0.010, 0.011)),
    # CRC Handbook of Chemistry and Physics, enthalpy of vaporization at the normal boiling point
    # (from memory of the table)
    ("methanol", 64.55, None, 35.21, "kJ/mol", (None, 0.039)),
    ("ethanol", 78.29, None, 38.56, "kJ/mol", (None, 0.025)),
    ("acetone", 56.05, None, 29.10, "kJ/mol", (None, 0.023)),
    ("sulfur dioxide", -10.05, None, 24.94, "kJ/mol", (None, 0.006)),
]


@pytest.mark.parametrize(("name", "t", "rho_v", "h_fg", "unit", "measured"), HANDBOOK, ids=[r[0] for r in HANDBOOK])
def test_saturated_vapour_and_enthalpy_of_boiling_against_handbooks(name, t, rho_v, h_fg, unit, measured) -> None:
    # each within 1 % (absolute) of its measured deviation: the mapping's, not the handbook's,
    # uncertainty is what these record
    if rho_v is not None:
        p = BOIL_PRESSURE(name, t, "degC", "kPa")
        assert MASS_DENSITY(name, t, p, "vapor", "degC", "kPa") / rho_v - 1.0 == pytest.approx(measured[0], abs=0.01)
    assert LATENT_HEAT(name, "boil", t, "degC", unit) / h_fg - 1.0 == pytest.approx(measured[1], abs=0.01)
