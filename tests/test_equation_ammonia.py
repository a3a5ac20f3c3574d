"""Ammonia from the Tillner-Roth, Harms-Watzenberg and Baehr (1993) equation of state: the equation's
model the catalogue builds from it and its reach; the equation's own check values (critical
point, triple point, saturation rows) are tables of tests/test_equation_data.py.

The coefficients (cellfuncs/data/equations/ammonia.toml) and the check values below were both recalled
from memory, independently of each other; no stored copy of the paper or of its tables was found.
The values come from the saturation tables computed with this equation (the IIR reference state,
h' = 200 kJ/kg and s' = 1 kJ/(kg K) for the saturated liquid at 0 degC, is built into the
equation's ideal part, so those printed digits check its constants a1 and a2 to a few parts in 1e6).

Recalled values that the equation does not reproduce, and that are left out as recall errors
because the firm rows agree with it to every printed digit: the vapour pressure at 40 degC (recalled
1.5549 MPa, the equation gives 1.55542 with both densities at that temperature as recalled), the
densities at 20 degC (recalled 610.28 and 6.7015 kg/m3; 610.199 and 6.7025), the vapour densities at
the triple point (0.0637; 0.06409, where the ideal gas gives 0.0638) and at -20 degC (1.6037; 1.6033).
The equation was not fitted with the critical conditions as constraints: at its reducing point
(405.40 K, 225 kg/m3) it gives 11.339 MPa with (dp/drho)_T = -4e-4 RT; its own critical point, where
(dp/drho)_T has a double zero, is at 405.50 K (measured), 2.5e-4 from the printed Tc.
"""

from __future__ import annotations

import numpy as np
import pytest

from cellfuncs.errors import NUM, CellError
from cellfuncs.sheet.functions import BOIL_TEMP, LATENT_HEAT, MASS_DENSITY, SUBSTANCE_INFO
from cellfuncs.substances import lookup
from cellfuncs.substances.helmholtz.equation import equation
from cellfuncs.substances.helmholtz.mapped import MappedEquation

def test_normal_boiling_point() -> None:
    # 239.823 K (Tillner-Roth et al. 1993, from memory, as in the substance file): the equation
    # boils at 239.8236 K at 101.325 kPa, 0.6 mK above, a little more than half a unit of the
    # recalled digits
    assert BOIL_TEMP("ammonia", 101.325, "kPa", "K") == pytest.approx(239.823, abs=1e-3)


@pytest.mark.parametrize(("t", "h_fg"), [(-33.33, 1369.5), (0.0, 1262.2)])
def test_enthalpy_of_boiling(t: float, h_fg: float) -> None:
    # ASHRAE Handbook - Fundamentals, refrigerant tables for R-717 (from memory): h'' - h' at the
    # normal boiling point and at 0 degC, to the printed 0.1 kJ/kg (the first at -33.33 degC, so
    # half a unit of that temperature, 0.02 kJ/kg, is added)
    assert LATENT_HEAT("ammonia", "boil", t, "degC", "kJ/kg") == pytest.approx(h_fg, abs=0.07)


def test_ideal_gas_heat_capacity() -> None:
    # NIST-JANAF Thermochemical Tables, 4th ed. (1998): cp0 of NH3 at 298.15 K is 35.652 J/(mol K)
    # (from memory of the table, as in tests/test_substance_data.py); 0.1 %, the spread between
    # ideal-gas tabulations (common practice); measured 35.640
    cp = float(equation("ammonia").state(298.15, 1e-6).cp)
    assert cp == pytest.approx(35.652, rel=1e-3)


def test_the_catalogue_builds_ammonia_from_its_equation() -> None:
    sub = lookup("ammonia")
    assert sub.equation is equation("ammonia") and not isinstance(sub.equation, MappedEquation)
    assert "Tillner-Roth" in SUBSTANCE_INFO("ammonia", "boil_model")
    # the saturated vapour at 0 degC through the sheet function: 3.4567 kg/m3 (the table above),
    # where propane's equation mapped onto ammonia's lines gave 3.37
    assert MASS_DENSITY("ammonia", 0, 429.38, "vapor", "degC", "kPa") == pytest.approx(3.4567, abs=1e-3)


def test_fluid_range_is_the_equations() -> None:
    # 195.495-700 K (the paper's range, from memory; its 1000 MPa is beyond the substance file's
    # melting line, which ends at 100 MPa): compressed liquid near the triple point, gas, and fluid at
    # 700 K have densities; above 700 K is outside
    T = np.array([200.0, 400.0, 700.0])
    rho = MASS_DENSITY("ammonia", T, np.array([100.0, 0.1, 100.0]), "", "K", "MPa")
    assert all(isinstance(r, float) and np.isfinite(r) for r in np.ravel(rho))
    beyond = MASS_DENSITY("ammonia", 701.0, 1.0, "", "K", "MPa")
    assert isinstance(beyond, CellError) and beyond.code == NUM and "700 K" in beyond.reason
