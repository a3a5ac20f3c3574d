"""Ice Ih Gibbs function (IAPWS R10-06) and the melting/sublimation lines (IAPWS R14-08)."""

from __future__ import annotations

from decimal import Decimal

import numpy as np
import pytest

from cellfuncs.substances.result import ModelError
from cellfuncs.substances.water import ice_ih, ice_lines
from cellfuncs.substances.water.ice_ih import properties
from cellfuncs.substances.water.ice_lines import (
    ICES,
    line_range,
    melting_pressure,
    melting_temperature,
    melting_temperature_any,
    sublimation_pressure,
    sublimation_temperature,
)


def printed(text: str):
    """The value of a printed check value, to half a unit in its last printed digit."""
    return pytest.approx(float(text), abs=0.5 * 10.0 ** Decimal(text).as_tuple().exponent)


# --- IAPWS R10-06(2009), Table 6: check values of the Gibbs function and properties ----
# (from memory of R10-06 Table 6). Keys: derivatives of g(T, p) in SI per kg, rho in kg/m3,
# f = g - p g_p and u = g - T g_T - p g_p in J/kg, beta = alpha / kappa in Pa/K.
R10_TABLE6 = {
    (273.16, 611.657): {
        "g": "0.611784135",
        "g_p": "0.109085812737e-2",
        "g_T": "0.122069433940e4",
        "g_pp": "-0.128495941571e-12",
        "g_TT": "-0.767602985875e1",
        "g_Tp": "0.174387964700e-6",
        "h": "-0.333444253966e6",
        "f": "-0.55446875e-1",
        "u": "-0.333444921197e6",
        "s": "-0.122069433940e4",
        "cp": "0.209678431622e4",
        "rho": "0.916709492200e3",
        "alpha": "0.159863102566e-3",
        "beta": "0.135714764659e7",
        "kappa": "0.117793449348e-9",
    },
    (273.152519, 101325.0): {
        "g": "0.10134274069e3",
        "g_p": "0.109084388214e-2",
        "g_T": "0.122076932550e4",
        "g_pp": "-0.128485364928e-12",
        "g_TT": "-0.767598233365e1",
        "g_Tp": "0.174362219972e-6",
        "h": "-0.333354873637e6",
        "f": "-0.918701567e1",
        "u": "-0.333465403393e6",
        "s": "-0.122076932550e4",
        "cp": "0.209671391024e4",
        "rho": "0.916721463419e3",
        "alpha": "0.159841589458e-3",
        "beta": "0.135705899321e7",
        "kappa": "0.117785291765e-9",
    },
    (100.0, 100e6): {
        "g": "-0.222296513088e6",
        "g_p": "0.106193389260e-2",
        "g_T": "0.261195122589e4",
        "g_pp": "-0.941807981761e-13",
        "g_TT": "-0.866333195517e1",
        "g_Tp": "0.274505162488e-7",
        "h": "-0.483491635676e6",
        "f": "-0.328489902347e6",
        "u": "-0.589685024936e6",
        "s": "-0.261195122589e4",
        "cp": "0.866333195517e3",
        "rho": "0.941678203297e3",
        "alpha": "0.258495528207e-4",
        "beta": "0.291466166994e6",
        "kappa": "0.886880048115e-10",
    },
}


def _gibbs_quantities(T: float, p: float) -> dict[str, float]:
    r = properties(T, p)
    values = {
        "g": r.g,
        "g_p": r.v,
        "g_T": -r.s,
        "g_pp": -r.kappa * r.v,
        "g_TT": -r.cp / T,
        "g_Tp": r.alpha * r.v,
        "h": r.h,
        "f": r.g - p * r.v,
        "u": r.h - p * r.v,
        "s": r.s,
        "cp": r.cp,
        "rho": 1.0 / r.v,
        "alpha": r.alpha,
        "beta": r.alpha / r.kappa,
        "kappa": r.kappa,
    }
    return {k: float(v) for k, v in values.items()}


@pytest.mark.parametrize(
    "state, quantity",
    [(state, q) for state, row in R10_TABLE6.items() for q in row],
    ids=lambda x: str(x),
)
def test_r10_table6_check_values(state, quantity):
    assert _gibbs_quantities(*state)[quantity] == printed(R10_TABLE6[state][quantity])


def test_a_long_array_runs_in_blocks_and_each_state_keeps_its_own_numbers():
    # R10-06 Table 6's states (from memory of R10-06 Table 6) at the edges of the blocks the Gibbs
    # function is evaluated in: their printed density there, the scalar calls' numbers to the last bit
    rng = np.random.default_rng(6)
    n = 2 * ice_ih._BLOCK + 37
    T, p = rng.uniform(50.0, 273.0, n), rng.uniform(1e3, 200e6, n)
    edges = [ice_ih._BLOCK - 1, ice_ih._BLOCK, n - 1]
    for k, (t, q) in zip(edges, R10_TABLE6):
        T[k], p[k] = t, q
    whole = properties(T, p)
    for k, row in zip(edges, R10_TABLE6.values()):
        assert 1.0 / whole.v[k] == printed(row["rho"])
    for k in [0, *edges, *rng.integers(0, n, 5)]:
        assert [f[k] for f in whole] == list(properties(T[k], p[k]))


def test_ice_ih_validity_constants():
    assert (ice_ih.T_MAX, ice_ih.P_MAX) == (273.16, 210e6)  # IAPWS R10-06(2009), section 1


def test_ice_ih_broadcasts_and_matches_scalars():
    T = np.linspace(20.0, 273.16, 7)
    p = np.array([[611.657], [1e5], [50e6], [210e6]])
    grid = properties(T, p)
    assert grid.v.shape == (4, 7)
    for i, j in np.ndindex(4, 7):
        one = properties(T[j], p[i, 0])
        for field, values in zip(one._fields, grid):
            assert np.ndim(getattr(one, field)) == 0
            assert getattr(one, field) == pytest.approx(values[i, j], rel=1e-14, abs=0.0)


# --- IAPWS R14-08(2011), Table 3: check values of the lines (from memory of R14-08 Table 3) ---
@pytest.mark.parametrize(
    "ice, T, p_MPa",
    [
        ("Ih", 260.0, "138.268"),
        ("III", 254.0, "268.685"),
        ("V", 265.0, "479.640"),
        ("VI", 320.0, "1356.76"),
        ("VII", 550.0, "6308.71"),
    ],
)
def test_r14_melting_check_values(ice, T, p_MPa):
    assert float(melting_pressure(T, ice)) / 1e6 == printed(p_MPa)


def test_r14_sublimation_check_value():
    # R14-08 Table 3 (from memory): 230 K -> 8.94735e-6 MPa
    assert float(sublimation_pressure(230.0)) == printed("8.94735")


# --- Round trips, ranges, continuity -----------------------------------------------------
def _line_functions(line: str):
    if line == "sublimation":
        return sublimation_pressure, sublimation_temperature
    return (lambda T: melting_pressure(T, line)), (lambda p: melting_temperature(p, line))


@pytest.mark.parametrize("line", [*ICES, "sublimation"])
def test_round_trip_across_range(line):
    (T_lo, T_hi), (p_lo, p_hi) = line_range(line)
    pressure, temperature = _line_functions(line)
    T = np.linspace(T_lo, T_hi, 2001)
    p = pressure(T)
    back = temperature(p)
    inside = (p >= p_lo) & (p <= p_hi)
    assert np.all(np.abs(back[inside] / T[inside] - 1.0) < 1e-9)
    # a line's own pressure at the far end of its range may fall just past the listed
    # (published triple-point) pressure; only those end points are outside, and NaN
    assert inside.sum() >= T.size - 1
    assert np.all(np.isnan(back[~inside]))
    assert np.all(np.minimum(np.abs(p[~inside] / p_lo - 1), np.abs(p[~inside] / p_hi - 1)) < 1e-5)


@pytest.mark.parametrize("line", [*ICES, "sublimation"])
def test_every_pressure_of_the_range_has_a_temperature(line):
    (T_lo, T_hi), (p_lo, p_hi) = line_range(line)
    pressure, temperature = _line_functions(line)
    p = np.geomspace(p_lo, p_hi, 1001)
    T = temperature(p)
    assert np.all(np.isfinite(T))
    assert np.all(np.abs(pressure(T) / p - 1.0) < 1e-8)
    assert np.all((T > T_lo - 0.05) & (T < T_hi + 0.05))
    out = temperature(np.array([p_lo * (1 - 1e-9), p_hi * (1 + 1e-9), np.nan]))
    assert np.all(np.isnan(out))


def test_unconverged_newton_fallback(monkeypatch):
    # one Newton step from the table leaves most elements unconverged: they are bracketed in the
    # tabulated interval, and the round trip holds as with the usual steps
    monkeypatch.setattr(ice_lines._LINES["VI"].inverse, "steps", 1)
    T = np.linspace(280.0, 350.0, 11)
    assert melting_temperature(melting_pressure(T, "VI"), "VI") == pytest.approx(T, rel=1e-12)


# Measured gaps (relative, lower-pressure line minus higher one over the latter):
# Ih/III +2.71e-6, III/V +4.49e-8, V/VI -1.03e-6, VI/VII +1.02e-6.
@pytest.mark.parametrize(
    "lower, upper, T",
    [("Ih", "III", 251.165), ("III", "V", 256.164), ("V", "VI", 273.31), ("VI", "VII", 355.0)],
)
def test_continuity_at_triple_points(lower, upper, T):
    # triple points of IAPWS R14-08(2011), section 3 (from memory)
    gap = float(melting_pressure(T, lower)) / float(melting_pressure(T, upper)) - 1.0
    assert abs(gap) < 1e-3
    # the higher line is anchored at this triple point: its pressure there is the shared one
    assert float(melting_pressure(T, upper)) == pytest.approx(line_range(upper)[1][0], rel=1e-15)
    assert line_range(lower)[1][1] == line_range(upper)[1][0]
    assert T in line_range(lower)[0] and T in line_range(upper)[0]


def test_ih_melting_and_sublimation_meet_at_the_triple_point():
    # IAPWS R14-08(2011), section 2: 273.16 K, 611.657 Pa
    assert float(melting_pressure(273.16, "Ih")) == pytest.approx(611.657, rel=1e-15)
    assert float(sublimation_pressure(273.16)) == pytest.approx(611.657, rel=1e-15)
    assert float(melting_temperature(611.657, "Ih")) == pytest.approx(273.16, rel=1e-14)
    assert float(sublimation_temperature(611.657)) == pytest.approx(273.16, rel=1e-14)


def test_clapeyron_slope_of_ih_melting_line():
    dT = 1e-3
    slope = float(melting_pressure(273.16 - dT, "Ih") - melting_pressure(273.16 + dT, "Ih")) / (-2 * dT)
    # common practice: the ice melting line near the triple point falls by about 13.5 MPa/K
    assert slope == pytest.approx(-13.5e6, rel=0.05)
    # Clapeyron with ice Ih from R10-06 and liquid water at the triple point from IAPWS-95
    # (R6-95: u = s = 0 by definition; density 999.793 kg/m3, from memory): dp/dT = dh / (T dv)
    T, p, v_liquid = 273.16, 611.657, 1.0 / 999.793
    ice = properties(T, p)
    clapeyron = float((p * v_liquid - ice.h) / (T * (v_liquid - ice.v)))
    assert slope == pytest.approx(clapeyron, rel=1e-3)


# --- Melting temperature on whichever line covers p ------------------------------------
def test_melting_temperature_any_segments():
    tops = [line_range(ice)[1][1] for ice in ICES]
    p = np.array([611.657, 1e5, *tops, 208.567e6, 1e9, 5e9])
    T, index = melting_temperature_any(p)
    assert index.tolist() == [0, 0, 0, 1, 2, 3, 4, 1, 3, 4]
    for ice_index, ice in enumerate(ICES):
        on = index == ice_index
        assert np.array_equal(T[on], melting_temperature(p[on], ice))
    assert T[0] == pytest.approx(273.16, rel=1e-14)


def test_melting_temperature_any_outside():
    top = line_range("VII")[1][1]
    T, index = melting_temperature_any(np.array([[611.0, np.nan], [top * (1 + 1e-12), -1.0]]))
    assert T.shape == index.shape == (2, 2)
    assert np.all(np.isnan(T)) and np.all(index == -1)


def test_unknown_lines_raise():
    with pytest.raises(ModelError):
        melting_pressure(260.0, "II")
    with pytest.raises(ModelError):
        melting_temperature(1e8, "sublimation")
    with pytest.raises(ModelError):
        line_range("XI")


# --- Scalars and arrays give the same numbers -------------------------------------------
def _assert_scalar_matches_array(func, x):
    many = func(x)
    for i, xi in enumerate(x):
        one = func(np.float64(xi))
        assert np.ndim(one) == 0
        assert float(one) == pytest.approx(many[i], rel=1e-14, abs=0.0, nan_ok=True)


@pytest.mark.parametrize("ice", ICES)
def test_melting_scalar_vs_array(ice):
    (T_lo, T_hi), (p_lo, p_hi) = line_range(ice)
    _assert_scalar_matches_array(lambda T: melting_pressure(T, ice), np.linspace(T_lo, T_hi, 41))
    p = np.concatenate([np.linspace(p_lo, p_hi, 41), [p_lo / 2, p_hi * 2]])
    _assert_scalar_matches_array(lambda q: melting_temperature(q, ice), p)


def test_sublimation_scalar_vs_array():
    (T_lo, T_hi), (p_lo, p_hi) = line_range("sublimation")
    _assert_scalar_matches_array(sublimation_pressure, np.linspace(T_lo, T_hi, 41))
    _assert_scalar_matches_array(sublimation_temperature, np.concatenate([np.geomspace(p_lo, p_hi, 41), [1e3]]))


def test_melting_temperature_any_scalar_vs_array():
    p = np.concatenate([np.geomspace(611.657, line_range("VII")[1][1], 201), [100.0, 3e10]])
    T, index = melting_temperature_any(p)
    for i, pi in enumerate(p):
        T1, k1 = melting_temperature_any(pi)
        assert np.ndim(T1) == np.ndim(k1) == 0
        assert int(k1) == index[i]
        assert float(T1) == pytest.approx(T[i], rel=1e-14, abs=0.0, nan_ok=True)
