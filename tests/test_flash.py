"""FLASH_FRACTION: an isenthalpic let-down with the models' own enthalpies, for every substance.

Textbook checks compute x = (h_in - h_f) / h_fg from the printed saturation tables named beside
them (values recalled from memory of the tables, as each says).
"""

from __future__ import annotations

import numpy as np
import pytest

from cellfuncs.errors import CellError
from cellfuncs.sheet.functions import FLASH_FRACTION, LATENT_HEAT
from cellfuncs.substances import lookup, names


def _error(value, code: str, text: str) -> bool:
    return isinstance(value, CellError) and value.code == code and text in value.reason


def test_r134a_flash_matches_a_saturation_table():
    # Cengel and Boles, Thermodynamics: An Engineering Approach, 7th ed. (2011), Tables
    # (from memory): saturated liquid at 20 degC h_f = 79.32 kJ/kg; at 0.10 MPa T_sat = -26.37 degC,
    # h_f = 17.28 kJ/kg, h_fg = 217.16 kJ/kg. Saturated liquid in (at its vapour pressure, 572.07 kPa)
    x = (79.32 - 17.28) / 217.16
    assert FLASH_FRACTION("R-134a", 20, 572.07, 100, "degC", "kPa") == pytest.approx(x, abs=0.004)


def test_water_flash_matches_a_steam_table():
    # Cengel and Boles, 7th ed. (2011), Tables A-4 and A-5 (from memory): saturated liquid at 170 degC
    # h_f = 719.08 kJ/kg (792.18 kPa); at 100 kPa h_f = 417.51 kJ/kg, h_fg = 2257.5 kJ/kg
    x = (719.08 - 417.51) / 2257.5
    assert FLASH_FRACTION("water", 170, 792.18, 100, "degC", "kPa") == pytest.approx(x, abs=0.001)


def test_ammonia_flash_from_condenser_to_atmospheric_pressure():
    # ASHRAE Handbook - Fundamentals (2009), ch. 30, ammonia saturation table (from memory): h_f = 322.4
    # kJ/kg at 30 degC, h_f = 30.5 kJ/kg and h_fg = 1369.5 kJ/kg at -33.33 degC (1 atm)
    x = (322.4 - 30.5) / 1369.5
    assert FLASH_FRACTION("ammonia", 30, 1.1672, 0.101325, "degC", "MPa") == pytest.approx(x, abs=0.01)


def test_liquid_co2_let_down_to_one_atmosphere_makes_snow():
    # low-pressure liquid CO2 (-20 degC, 20 bar) through a snow horn gives 40-50 % of its mass as dry-ice
    # snow (common practice, no source); below the triple-point pressure the rest of the let-down is solid
    vapour = FLASH_FRACTION("CO2", -20, 20, 1.01325, "degC", "bar")
    assert 0.40 <= 1.0 - vapour <= 0.50
    # from a cylinder at room temperature the yield is lower, about 30 % (common practice, no source)
    assert 0.25 <= 1.0 - FLASH_FRACTION("CO2", 20, 60, 1.01325, "degC", "bar") <= 0.35


def test_snow_fraction_is_the_enthalpy_balance_with_the_sublimation_enthalpy():
    co2 = lookup("CO2")
    T1, p1, p2 = 253.15, 2e6, 101325.0
    h_in = float(co2.props(T1, p1, 1, want=("h",))[0].h)
    t_sub = float(co2.sublime_temperature(np.array(p2)).values)
    h_v = float(co2.props(t_sub, p2, 2, want=("h",))[0].h)
    heat = float(co2.latent_heat("sublime", np.array(t_sub)).values)
    assert FLASH_FRACTION("CO2", T1, p1, p2) == pytest.approx((h_in - (h_v - heat)) / heat, rel=1e-12)


@pytest.mark.parametrize("name", ["water", "CO2", "R-134a", "R-22", "helium-4", "parahydrogen", "chloroform"])
def test_a_let_down_to_a_higher_pressure_is_an_error(name):
    sub = lookup(name)
    tt = sub.triple.temperature if np.isfinite(sub.triple.temperature) else 3.0
    t = 0.5 * (tt + sub.critical.temperature)
    p = float(sub.boil_pressure(np.array(t)).values)
    assert _error(FLASH_FRACTION(name, t, 1.5 * p, 2.0 * p), "#VALUE!", "must not be above")


def test_every_substance_flashes_from_its_boiling_line():
    # saturated liquid at 0.8 Tc let down to its vapour pressure at 0.6 Tc (above the lowest point of its
    # boiling line):
    # a fraction between 0 and 1 from the model's enthalpies, for every substance of the catalogue
    for name in names():
        sub = lookup(name)
        tc = sub.critical.temperature
        low = sub.triple.temperature if np.isfinite(sub.triple.temperature) else getattr(sub, "t_low", 0.0)
        t_hot, t_cold = 0.8 * tc, max(0.6 * tc, 1.05 * low)
        p_hot = float(sub.boil_pressure(np.array(t_hot)).values) * 1.01
        p_cold = float(sub.boil_pressure(np.array(t_cold)).values)
        x = FLASH_FRACTION(name, t_hot, p_hot, p_cold)
        assert isinstance(x, float) and 0.0 < x < 1.0, (name, x)


def test_nothing_flashes_from_a_subcooled_liquid():
    assert FLASH_FRACTION("R-134a", 0, 10, 5, "degC", "bar") == 0.0  # T_sat(5 bar) = 15.7 degC


def test_latent_heat_of_r22_boiling_matches_a_table():
    # ASHRAE Handbook - Fundamentals (2009), ch. 30, R-22 (from memory): h_fg = 233.8 kJ/kg at -40.8 degC
    # (1 atm); the corresponding-states fluid reproduces it within 2 %
    assert LATENT_HEAT("R-22", "boil", -40.81, "degC", "kJ/kg") == pytest.approx(233.8, rel=0.02)
