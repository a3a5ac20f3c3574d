"""IAPWS-IF97 regions 1, 2, 4, 5 and B23 against the release's verification values.

Check values are the computer-program verification tables of IAPWS R7-97(2012),
written here from memory of those tables (named beside each row) with their
printed digits; a value must match to half a unit of its last printed digit.
"""

from __future__ import annotations

import numpy as np
import pytest

from cellfuncs.substances.props import Props
from cellfuncs.substances.water import if97, if97_saturation
from cellfuncs.substances.water.if97 import region1, region2, region2_metastable, region5
from cellfuncs.substances.water.if97_saturation import (
    b23_pressure,
    b23_temperature,
    saturation_pressure,
    saturation_temperature,
)


def assert_printed(value: float, printed: str) -> None:
    """``value`` rounds to the printed number ``printed`` (e.g. "0.100215168e-2")."""
    mantissa, _, exponent = printed.partition("e")
    digits = len(mantissa.split(".")[1])
    half_unit = 0.5 * 10.0 ** (int(exponent or 0) - digits)
    assert abs(value - float(printed)) <= half_unit * (1 + 1e-9), (value, printed)


def speed_of_sound(props, T):
    """w^2 = (dp/drho)_s = v / kappa_s, kappa_s = kappa - T v alpha^2 / cp (exact identity)."""
    return np.sqrt(props.v / (props.kappa - T * props.v * props.alpha**2 / props.cp))


# (T in K, p in MPa), then v in m3/kg, h, u in kJ/kg, s, cp in kJ/(kg K), w in m/s.
GIBBS_TABLES = [
    # IAPWS R7-97(2012), Table 5, region 1 (from memory of Table 5)
    (region1, 300.0, 3.0, "0.100215168e-2", "0.115331273e3", "0.112324818e3", "0.392294792", "0.417301218e1", "0.150773921e4"),
    (region1, 300.0, 80.0, "0.971180894e-3", "0.184142828e3", "0.106448356e3", "0.368563852", "0.401008987e1", "0.163469054e4"),
    (region1, 500.0, 3.0, "0.120241800e-2", "0.975542239e3", "0.971934985e3", "0.258041912e1", "0.465580682e1", "0.124071337e4"),
    # IAPWS R7-97(2012), Table 15, region 2 (from memory of Table 15)
    (region2, 300.0, 0.0035, "0.394913866e2", "0.254991145e4", "0.241169160e4", "0.852238967e1", "0.191300162e1", "0.427920172e3"),
    (region2, 700.0, 0.0035, "0.923015898e2", "0.333568375e4", "0.301262819e4", "0.101749996e2", "0.208141274e1", "0.644289068e3"),
    (region2, 700.0, 30.0, "0.542946619e-2", "0.263149474e4", "0.246861076e4", "0.517540298e1", "0.103505092e2", "0.480386523e3"),
    # IAPWS R7-97(2012), Table 18, metastable-vapour equation (from memory of Table 18)
    (region2_metastable, 450.0, 1.0, "0.192516540", "0.276881115e4", "0.257629461e4", "0.656660377e1", "0.276349265e1", "0.498408101e3"),
    (region2_metastable, 440.0, 1.0, "0.186212297", "0.274015123e4", "0.255393894e4", "0.650218759e1", "0.298166443e1", "0.489363295e3"),
    (region2_metastable, 450.0, 1.5, "0.121685206", "0.272134539e4", "0.253881758e4", "0.629170440e1", "0.362795578e1", "0.481941819e3"),
    # IAPWS R7-97(2012), Table 42, region 5 (from memory of Table 42)
    (region5, 1500.0, 0.5, "0.138455090e1", "0.521976855e4", "0.452749310e4", "0.965408875e1", "0.261609445e1", "0.917068690e3"),
    (region5, 1500.0, 30.0, "0.230761299e-1", "0.516723514e4", "0.447495124e4", "0.772970133e1", "0.272724317e1", "0.928548002e3"),
    (region5, 2000.0, 30.0, "0.311385219e-1", "0.657122604e4", "0.563707038e4", "0.853640523e1", "0.288569882e1", "0.106736948e4"),
]


@pytest.mark.parametrize("region, T, p_mpa, v, h, u, s, cp, w", GIBBS_TABLES)
def test_gibbs_regions_verification_tables(region, T, p_mpa, v, h, u, s, cp, w):
    p = p_mpa * 1e6
    r = region(T, p)
    assert_printed(float(r.v), v)
    assert_printed(float(r.h) / 1e3, h)
    assert_printed(float(r.h - p * r.v) / 1e3, u)
    assert_printed(float(r.s) / 1e3, s)
    assert_printed(float(r.cp) / 1e3, cp)
    assert_printed(float(speed_of_sound(r, T)), w)


@pytest.mark.parametrize(
    "T, p_mpa",
    [
        (300.0, "0.353658941e-2"),  # IAPWS R7-97(2012), Table 35 (from memory of Table 35)
        (500.0, "0.263889776e1"),  # IAPWS R7-97(2012), Table 35 (from memory of Table 35)
        (600.0, "0.123443146e2"),  # IAPWS R7-97(2012), Table 35 (from memory of Table 35)
    ],
)
def test_saturation_pressure_table35(T, p_mpa):
    assert_printed(float(saturation_pressure(T)) / 1e6, p_mpa)


@pytest.mark.parametrize(
    "p_mpa, T",
    [
        (0.1, "0.372755919e3"),  # IAPWS R7-97(2012), Table 36 (from memory of Table 36)
        (1.0, "0.453035632e3"),  # IAPWS R7-97(2012), Table 36 (from memory of Table 36)
        (10.0, "0.584149488e3"),  # IAPWS R7-97(2012), Table 36 (from memory of Table 36)
    ],
)
def test_saturation_temperature_table36(p_mpa, T):
    assert_printed(float(saturation_temperature(p_mpa * 1e6)), T)


def test_b23_check_pair():
    # IAPWS R7-97(2012), section 4.1: T = 0.623150000e3 K <-> p = 0.165291643e2 MPa
    # (from memory of the B23 consistency values)
    assert_printed(float(b23_pressure(623.15)) / 1e6, "0.165291643e2")
    assert_printed(float(b23_temperature(16.5291643e6)), "0.623150000e3")


def test_published_range_limits():
    # IAPWS R7-97(2012), section 4 (from memory of the range statements)
    assert (if97.T_MIN, if97.REGION1_T_MAX, if97.REGION2_T_MAX) == (273.15, 623.15, 1073.15)
    assert (if97.REGION5_T_MIN, if97.REGION5_T_MAX) == (1073.15, 2273.15)
    assert (if97.P_MAX, if97.REGION5_P_MAX) == (100e6, 50e6)
    s = if97_saturation
    assert (s.SATURATION_T_MIN, s.SATURATION_T_MAX) == (273.15, 647.096)
    assert (s.SATURATION_P_MIN, s.SATURATION_P_MAX) == (611.213, 22.064e6)
    assert (s.B23_T_MIN, s.B23_T_MAX, s.B23_P_MAX) == (623.15, 863.15, 100e6)
    # the stated lower pressure limit is eq. (30) at 273.15 K to the printed digits
    assert_printed(float(saturation_pressure(273.15)), "611.213")
    assert_printed(float(b23_pressure(863.15)) / 1e6, "100.0")


rng = np.random.default_rng(97)
# (function, T range, p range) spanning each region's validity range
GIBBS_RANGES = [
    (region1, (273.15, 623.15), (611.213, 100e6)),
    (region2, (273.15, 1073.15), (1.0, 100e6)),
    (region5, (1073.15, 2273.15), (1.0, 50e6)),
]


@pytest.mark.parametrize("region, t_range, p_range", GIBBS_RANGES)
def test_scalar_and_array_agree(region, t_range, p_range):
    T = rng.uniform(*t_range, 64)
    p = np.exp(rng.uniform(*np.log(p_range), 64))
    flat = region(T, p)
    grid = region(T[:8, None], p[None, :5])
    for k in range(T.size):
        single = region(T[k], p[k])
        for name, a, b in zip(single._fields, flat, single):
            assert np.shape(b) == ()
            np.testing.assert_allclose(a[k], b, rtol=1e-14, atol=0, err_msg=name)
    for i in range(8):
        for j in range(5):
            np.testing.assert_allclose(np.array(grid)[:, i, j], np.array(region(T[i], p[j])), rtol=1e-14, atol=0)


@pytest.mark.parametrize("region, t_range, p_range", GIBBS_RANGES + [(region2_metastable, (300.0, 600.0), (1e3, 1e7))])
def test_each_element_of_a_long_array_is_its_scalar_to_the_last_bit(region, t_range, p_range):
    # the series run in blocks: elements in the first, a middle and the ragged last block, at the
    # blocks' edges, are the scalar call's numbers exactly, and a field asked for alone is the
    # same as among all seven (the others come back NaN)
    n = 2 * if97._BLOCK + 37
    T = rng.uniform(*t_range, n)
    p = np.exp(rng.uniform(*np.log(p_range), n))
    whole = region(T, p)
    for k in [0, 1, if97._BLOCK - 1, if97._BLOCK, 2 * if97._BLOCK, n - 1, *rng.integers(0, n, 10)]:
        single = region(T[k], p[k])
        for name, a, b in zip(single._fields, whole, single):
            assert a[k] == b, (name, k)
    for name in Props._fields:
        alone = region(T, p, (name,))
        np.testing.assert_array_equal(getattr(alone, name), getattr(whole, name))
        assert all(np.isnan(getattr(alone, other)).all() for other in Props._fields if other != name)


@pytest.mark.parametrize(
    "func, lo, hi",
    [
        (saturation_pressure, 273.15, 647.096),
        (saturation_temperature, 611.213, 22.064e6),
        (b23_pressure, 623.15, 863.15),
        (b23_temperature, 16.5291643e6, 100e6),
    ],
)
def test_boundaries_scalar_and_array_agree(func, lo, hi):
    x = rng.uniform(lo, hi, 50)
    many = func(x)
    assert many.shape == x.shape and func(x.reshape(5, 10)).shape == (5, 10)
    for k in range(x.size):
        np.testing.assert_allclose(many[k], func(x[k]), rtol=1e-14, atol=0)


@pytest.mark.parametrize("func, x", [(saturation_pressure, 373.15), (saturation_temperature, 101325.0)])
def test_a_value_broadcast_over_an_array_is_its_scalar_everywhere(func, x):
    # a pressure typed once against a column of temperatures reaches the line as a broadcast view
    column = np.broadcast_to(np.array([[x], [x / 2]]), (2, 300))
    many = func(column)
    assert many.shape == (2, 300) and many.flags.writeable
    assert (many[0] == func(x)).all() and (many[1] == func(x / 2)).all()
    assert func(np.broadcast_to(x, (0, 3))).shape == (0, 3)


def test_saturation_equations_are_inverse():
    # IAPWS R7-97(2012), section 8.1: eqs. (30) and (31) are consistent with each other
    T = np.linspace(273.16, 647.09, 20001)
    np.testing.assert_allclose(saturation_temperature(saturation_pressure(T)), T, rtol=1e-9, atol=0)
    p = np.geomspace(611.657, 22.06e6, 20001)
    np.testing.assert_allclose(saturation_pressure(saturation_temperature(p)), p, rtol=1e-9, atol=0)


def test_b23_equations_are_inverse():
    T = np.linspace(623.15, 863.15, 1001)
    np.testing.assert_allclose(b23_temperature(b23_pressure(T)), T, rtol=1e-9, atol=0)


# states inside each region where no property passes through zero
DERIVATIVE_STATES = [
    (region1, 300.0, 3e6),
    (region1, 500.0, 80e6),
    (region1, 600.0, 20e6),
    (region2, 300.0, 3.5e3),
    (region2, 700.0, 30e6),
    (region2, 1000.0, 90e6),
    (region5, 1500.0, 0.5e6),
    (region5, 2000.0, 30e6),
]


@pytest.mark.parametrize("region, T, p", DERIVATIVE_STATES)
def test_derivatives_match_finite_differences(region, T, p):
    dT, dp = 1e-5 * T, 1e-5 * p
    r = region(T, p)
    hot, cold = region(T + dT, p), region(T - dT, p)
    high, low = region(T, p + dp), region(T, p - dp)
    np.testing.assert_allclose(r.alpha, (hot.v - cold.v) / (2 * dT) / r.v, rtol=1e-6)
    np.testing.assert_allclose(r.kappa, -(high.v - low.v) / (2 * dp) / r.v, rtol=1e-6)
    # the Gibbs-energy relations tie the other fields together too
    np.testing.assert_allclose(r.s, -(hot.g - cold.g) / (2 * dT), rtol=1e-6)
    np.testing.assert_allclose(r.v, (high.g - low.g) / (2 * dp), rtol=1e-6)
    np.testing.assert_allclose(r.cp, (hot.h - cold.h) / (2 * dT), rtol=1e-6)


@pytest.mark.parametrize("region, t_range, p_range", GIBBS_RANGES)
def test_gibbs_energy_is_h_minus_ts(region, t_range, p_range):
    T = rng.uniform(*t_range, 200)
    p = np.exp(rng.uniform(*np.log(p_range), 200))
    r = region(T, p)
    np.testing.assert_allclose(r.g, r.h - T * r.s, rtol=0, atol=1e-13 * np.max(np.abs(r.h) + T * np.abs(r.s)))
