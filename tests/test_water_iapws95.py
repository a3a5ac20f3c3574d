"""Water beyond IF97's range: IAPWS-95 for the fluid above IF97's pressures, bounded by the ices' melting lines.

IF97 (IAPWS R7-97(2012), section 2) covers 273.15 K to 1073.15 K up to 100 MPa and 1073.15 K to
2273.15 K up to 50 MPa; IAPWS-95 (IAPWS R6-95(2018), section 6.3.1) the stable fluid from the melting
line to 1273 K up to 1000 MPa (both from memory of the releases). The checks: IAPWS-95's own check
values at high pressure through the sheet functions, the ices' melting lines (IAPWS R14-08(2011)) as
the liquid's bounds, and the jumps where IF97 hands over to IAPWS-95.
"""

from __future__ import annotations

import numpy as np
import pytest

from cellfuncs.errors import NA, NUM, CellError
from cellfuncs.sheet.functions import (
    CHEM_POTENTIAL,
    ISOTHERMAL_COMPRESSIBILITY,
    MASS_DENSITY,
    MELT_PRESSURE,
    MOLAR_VOLUME,
    STABLE_PHASE,
    SUBSTANCE_INFO,
    THERMAL_EXPANSIVITY,
)
from cellfuncs.substances.base import STABLE
from cellfuncs.substances.helmholtz.equation import equation
from cellfuncs.substances.water import iapws95
from cellfuncs.substances.water import model as water_model

W = "water"
M = 0.018015268  # kg/mol, IAPWS R6-95(2018), section 2 (from memory)
TC = 647.096  # K, IAPWS R6-95(2018), eq. (1) (from memory)


def printed(text: str) -> tuple[float, float]:
    """A printed number and half a unit in its last digit."""
    mantissa, _, exponent = text.lower().partition("e")
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    return float(text), 0.5 * 10.0 ** (int(exponent or 0) - decimals)


def is_error(value, code: str, *words: str) -> bool:
    return isinstance(value, CellError) and value.code == code and all(w in value.reason for w in words)


# --- IAPWS R6-95(2018), Table 7: the single-phase check values above IF97's pressures ------------------
# (T / K, rho / (kg/m3), p / MPa, s / (kJ/(kg K))), from memory of Table 7; every row lies above 100 MPa,
# so the water model takes it from IAPWS-95 (500 K and 300 K: liquid; 900 K: fluid)
TABLE_7 = [
    ("300", "1188.202", "0.700004704e3", "0.132609616"),
    ("500", "1084.564", "0.700000405e3", "2.03237509"),
    ("900", "870.7690", "0.700000006e3", "4.17223802"),
]


@pytest.mark.parametrize("T, rho, p, s", TABLE_7)
def test_table_7_high_pressure_states(T, rho, p, s):
    T, (rho, rho_tol), (p, _), (s, s_tol) = float(T), printed(rho), printed(p), printed(s)
    # the printed pressure has 9 digits: its rounding moves the density by less than 1e-9 relative
    assert abs(MASS_DENSITY(W, T, p, "", "K", "MPa") - rho) <= rho_tol
    props, result = water_model.Water().props(np.array(T), np.array(p * 1e6), STABLE)
    assert result.problems is None
    # on IF97's reference state: the entropy less the shift is IAPWS-95's own
    _, ds = iapws95.shift()
    assert abs((float(props.s) / M - ds) / 1e3 - s) <= s_tol


def test_expansivity_and_compressibility_are_the_volumes_own_derivatives():
    # 300 K, 700 MPa (a Table 7 state): the derivatives the sheet gives agree with the volume's differences
    T, p = 300.0, 700e6
    alpha = (np.log(MOLAR_VOLUME(W, T + 0.01, p)) - np.log(MOLAR_VOLUME(W, T - 0.01, p))) / 0.02
    kappa = -(np.log(MOLAR_VOLUME(W, T, p + 1e4)) - np.log(MOLAR_VOLUME(W, T, p - 1e4))) / 2e4
    assert THERMAL_EXPANSIVITY(W, T, p) == pytest.approx(alpha, rel=1e-6)
    assert ISOTHERMAL_COMPRESSIBILITY(W, T, p) == pytest.approx(kappa, rel=1e-6)
    assert isinstance(CHEM_POTENTIAL(W, T, p, "liquid"), float)


# --- the range: IAPWS-95's limits, read from its data file -------------------------------------------

def test_the_limits_are_the_equation_file_values():
    eq = equation("water")
    assert water_model.IAPWS95_T_MAX == eq.T_max == 1273.0  # IAPWS R6-95(2018), section 6.3.1 (from memory)
    assert water_model.IAPWS95_P_MAX == eq.p_max == 1000e6


@pytest.mark.parametrize("formula, words", [
    ((25, 500, "liquid", "degC", "MPa"), None),  # was refused above 210 MPa
    ((900, 100, "", "degC", "MPa"), None),  # was refused above 50 MPa over 800 degC
    ((300, 1500, "", "degC", "bar"), None),  # liquid below 623.15 K above 100 MPa
    ((640, 150, "liquid", "K", "MPa"), None),  # liquid above 623.15 K above 100 MPa
    ((25, 1001, "liquid", "degC", "MPa"), "above the formulations' range (1000 MPa, IAPWS-95)"),
    ((700, 1001, "", "K", "MPa"), "for fluid (1000 MPa, IAPWS-95)"),
    ((1300, 60, "", "K", "MPa"), "above 1273 K water is covered to 50 MPa only"),
])
def test_states_beyond_if97(formula, words):
    value = MASS_DENSITY(W, *formula)
    if words is None:
        assert isinstance(value, float) and np.isfinite(value)
    else:
        assert is_error(value, NUM, words)


def test_region_5_keeps_the_low_pressures_above_1073_k():
    # IF97 region 5 to 50 MPa, as before, up to 2273.15 K; IAPWS-95 stops at 1273 K
    assert isinstance(MASS_DENSITY(W, 2000, 40e6), float)
    assert is_error(MASS_DENSITY(W, 2000, 60e6), NUM, "50 MPa only")


# --- the liquid's bounds: the melting lines of IAPWS R14-08(2011) ---------------------------------------
# Table 3 check values (from memory of R14-08 Table 3): T / K and p / MPa on each ice's melting line

R14_08 = [("ice Ih", 260.0, "138.268"), ("ice III", 254.0, "268.685"), ("ice V", 265.0, "479.640"),
          ("ice VI", 320.0, "1356.76"), ("ice VII", 550.0, "6308.71")]


@pytest.mark.parametrize("solid, T, p_MPa", R14_08)
def test_the_melting_lines_bound_the_liquid(solid, T, p_MPa):
    p, tol = printed(p_MPa)
    assert abs(MELT_PRESSURE(W, T, "K", "MPa", solid) - p) <= tol
    p_line = MELT_PRESSURE(W, T, "K", "Pa", solid)
    assert STABLE_PHASE(W, T, p_line) == f"{solid} + liquid"
    assert STABLE_PHASE(W, T * (1 + 1e-6), p_line) == "liquid"
    assert STABLE_PHASE(W, T * (1 - 1e-6), p_line) == solid
    warm, cold = MASS_DENSITY(W, T * (1 + 1e-6), p_line, "liquid"), MASS_DENSITY(W, T * (1 - 1e-4), p_line, "liquid")
    if p_line > water_model.IAPWS95_P_MAX:  # ice VI at 320 K, ice VII: above IAPWS-95's range
        assert is_error(warm, NUM, "1000 MPa")
    elif p_line > water_model.P_MAX_FLUID:  # IAPWS-95 from the melting line up, not below it
        assert isinstance(warm, float) and 1000 < warm < 1300
        assert is_error(cold, NUM, "below its melting temperature", "IAPWS-95")


@pytest.mark.parametrize("T, p, solid", [(250.0, 300e6, "ice III"), (260.0, 500e6, "ice V"),
                                         (290.0, 900e6, "ice VI"), (400.0, 5e9, "ice VII")])
def test_the_stable_ice_above_the_ice_ih_range_is_named(T, p, solid):
    assert STABLE_PHASE(W, T, p) == solid
    assert is_error(MASS_DENSITY(W, T, p), NA, f"the stable phase is {solid}", "no volume formulation")


def test_the_chemical_potentials_of_ice_ih_and_the_liquid_meet_on_the_line_above_100_mpa():
    # IAPWS R10-06 ice Ih against IAPWS-95 liquid on the R14-08 ice Ih line from 208.6 MPa down to 100 MPa:
    # measured at most 0.0088 J/mol (near 252.2 K)
    T = np.linspace(251.166, 264.2, 60)
    p = MELT_PRESSURE(W, T)
    assert (p > water_model.P_MAX_FLUID).all()
    gap = CHEM_POTENTIAL(W, T, p, "liquid") - CHEM_POTENTIAL(W, T, p, "ice Ih")
    assert np.abs(gap.astype(float)).max() < 0.01


# --- where IF97 hands over to IAPWS-95 --------------------------------------------------------------
# IF97 was fitted to IAPWS-95 within tolerances on the specific volume of 0.05 % and on the Gibbs
# energy of 0.2 kJ/kg (from memory of Wagner et al., J. Eng. Gas Turbines Power 122, 150 (2000), the
# tables of permitted deviations and of the consistency at region boundaries; not read from a
# stored copy). A state just past a boundary differs from the state on it by the two formulations'
# difference alone.

def _jumps(T_on, p_on, T_past, p_past) -> dict[str, float]:
    w = water_model.Water()
    a, ra = w.props(T_on, p_on, STABLE)
    b, rb = w.props(T_past, p_past, STABLE)
    assert ra.problems is None and rb.problems is None
    return {"v": np.abs(b.v / a.v - 1).max(), "h": np.abs(b.h - a.h).max() / M,
            "s": np.abs(b.s - a.s).max() / M, "g": np.abs(b.g - a.g).max() / M}


BOUNDARIES = {
    # 100 MPa from 273.15 K to 1073.15 K (IF97 regions 1, 3, 2 below): measured v 2.4e-4 (near 1000 K),
    # h 0.41 kJ/kg, s 0.43 J/(kg K), g 58 J/kg
    "100 MPa": (np.linspace(273.15, 1073.15, 401), 100e6, 1, (2.5e-4, 450.0, 0.45, 60.0)),
    # 50 MPa from 1073.15 K to 1273 K (IF97 region 5 below): measured v 6.4e-5, h 0.26 kJ/kg,
    # s 0.15 J/(kg K), g 97 J/kg
    "50 MPa": (np.linspace(1073.15 + 1e-9, 1273.0, 101), 50e6, 1, (7e-5, 270.0, 0.16, 100.0)),
    # 1073.15 K from 50 MPa to 100 MPa (IF97 region 2 below): measured v 1.9e-4, h 0.17 kJ/kg,
    # s 0.14 J/(kg K), g 40 J/kg
    "1073.15 K": (1073.15, np.linspace(50e6 * (1 + 1e-9), 100e6, 51), 0, (2e-4, 180.0, 0.15, 45.0)),
}


@pytest.mark.parametrize("name", BOUNDARIES)
def test_the_jump_at_the_if97_boundary_is_within_if97s_tolerance(name):
    T, p, across, measured = BOUNDARIES[name]
    T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
    past = (T, np.nextafter(p, np.inf)) if across else (np.nextafter(T, np.inf), p)
    jump = _jumps(T, p, *past)
    assert jump["v"] < 5e-4 and jump["g"] < 200.0  # IF97's tolerances, as above
    # and no more than measured: a change to either formulation shows here
    assert all(jump[k] < bound for k, bound in zip(("v", "h", "s", "g"), measured)), jump
    assert jump["v"] > 1e-6  # the states past the boundary are IAPWS-95's indeed


def test_the_reference_shift_is_tiny():
    # both formulations put u = 0 and s = 0 for the saturated liquid at the triple point (IAPWS R6-95(2018),
    # section 6; IAPWS R7-97(2012), section 5.1; from memory): IF97 region 1 meets it to a few 1e-5 J/(kg K)
    # measured dh = -9.5e-7 J/kg, ds = -6.2e-5 J/(kg K)
    dh, ds = iapws95.shift()
    assert abs(dh) < 1e-5 and abs(ds) < 1e-4


# --- the density solver's premise: Newton from the top comes down the convex liquid branch ---------------

def test_the_isotherms_rise_and_are_convex_above_100_mpa_below_the_critical_temperature():
    eq = equation("water")
    for T in np.linspace(251.165, TC, 25):
        rho = iapws95.density(np.array(T), np.array(100e6)) / eq.M
        d = np.linspace(float(rho) / eq.rhoc, iapws95._DELTA_TOP, 400)
        p, slope = eq.pressure(np.full(d.shape, T), d * eq.rhoc)
        assert (slope > 0).all() and (np.diff(slope) > 0).all(), T
        assert p[-1] > 2 * water_model.IAPWS95_P_MAX


def test_a_scalar_and_the_same_state_inside_an_array_agree():
    T = np.array([300.0, 500.0, 900.0, 640.0, 1200.0, 300.0])
    p = np.array([700e6, 2e8, 6e8, 1.5e8, 8e7, 1e5])  # the last one IF97's
    array = MOLAR_VOLUME(W, T, p)
    for k in range(T.size):
        assert array[k] == MOLAR_VOLUME(W, T[k], p[k])


def test_substance_info_names_the_formulation_behind_each_range():
    assert "IAPWS-95 above 100 MPa" in SUBSTANCE_INFO(W, "liquid_model")
    liquid = SUBSTANCE_INFO(W, "liquid_range")
    assert "IAPWS-95: above 100 MPa to 1000 MPa" in liquid and "ice Ih, III, V and VI" in liquid
    assert "IAPWS-95" in SUBSTANCE_INFO(W, "fluid_model")
    assert "to 1273 K" in SUBSTANCE_INFO(W, "fluid_range")
