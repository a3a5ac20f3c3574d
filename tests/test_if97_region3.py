"""IF97 region 3: verification values, density branches, saturation consistency, derivatives."""

import numpy as np
import pytest

from cellfuncs.data import table
from cellfuncs.substances.result import ModelError
from cellfuncs.substances.water import if97_region3 as r3

TC = 647.096  # K, IAPWS R7-97(2012) eq. (3)
PC = 22.064e6  # Pa, IAPWS R7-97(2012) eq. (4)
RHOC = 322.0  # kg/m3, IAPWS R7-97(2012) eq. (5)
M = 0.018015268  # kg/mol, IAPWS R6-95(2018) section 2
P_B23_TABLE = 16.5291643e6  # Pa at 623.15 K, IAPWS R7-97(2012) section 4 check value (from memory)

# IAPWS R7-97(2012), Table 34 (from memory): coefficients n1..n10 of the saturation equation.
N_SAT = [
    0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.12020824702470e5,
    -0.32325550322333e7, 0.14915108613530e2, -0.48232657361591e4, 0.40511340542057e6,
    -0.23855557567849, 0.65017534844798e3,
]


def psat(T):
    """Saturation pressure in Pa, IAPWS R7-97(2012) eq. (30) with T* = 1 K, p* = 1 MPa."""
    n = N_SAT
    theta = T + n[8] / (T - n[9])
    a = theta**2 + n[0] * theta + n[1]
    b = n[2] * theta**2 + n[3] * theta + n[4]
    c = n[5] * theta**2 + n[6] * theta + n[7]
    return (2.0 * c / (-b + np.sqrt(b * b - 4.0 * a * c))) ** 4 * 1e6


def p_b23(T):
    """B23 boundary pressure in Pa, IAPWS R7-97(2012) eq. (5) (n1..n3 from memory of Table 1)."""
    return (0.34805185628969e3 - 0.11671859879975e1 * T + 0.10192970039326e-2 * T**2) * 1e6


def assert_printed(value, printed, digits=9):
    """``value`` rounds to ``printed`` at ``digits`` significant digits (half a unit, 1e-12 slack)."""
    unit = 10.0 ** (np.floor(np.log10(abs(printed))) - (digits - 1))
    assert abs(float(value) - printed) <= 0.5 * unit * (1 + 1e-12) + 1e-12 * abs(printed), (value, printed)


def test_auxiliary_equations():
    # IAPWS R7-97(2012), Table 35 (from memory): psat at 300, 500, 600 K in MPa
    assert_printed(psat(300.0) / 1e6, 0.353658941e-2)
    assert_printed(psat(500.0) / 1e6, 0.263889776e1)
    assert_printed(psat(600.0) / 1e6, 0.123443146e2)
    assert_printed(p_b23(623.15), P_B23_TABLE)


# IAPWS R7-97(2012), Table 33 (from memory): T/K, rho/(kg/m3), p/MPa, h/(kJ/kg), u/(kJ/kg),
# s/(kJ/(kg K)), cp/(kJ/(kg K)), w/(m/s), all printed to 9 significant digits.
TABLE_33 = [
    (650.0, 500.0, 0.255837018e2, 0.186343019e4, 0.181226279e4, 0.405427273e1, 0.138935717e2, 0.502005554e3),
    (650.0, 200.0, 0.222930643e2, 0.237512401e4, 0.226365868e4, 0.485438792e1, 0.446579342e2, 0.383444594e3),
    (750.0, 500.0, 0.783095639e2, 0.225868845e4, 0.210206932e4, 0.446971906e1, 0.634165359e1, 0.760696041e3),
]


@pytest.mark.parametrize("T, rho, p, h, u, s, cp, w", TABLE_33)
def test_table_33(T, rho, p, h, u, s, cp, w):
    pr = r3.properties_rho(rho, T)
    p_calc = r3.pressure_rho(rho, T)
    assert_printed(p_calc / 1e6, p)
    assert_printed(pr.h / 1e3, h)
    assert_printed((pr.h - p_calc / rho) / 1e3, u)
    assert_printed(pr.s / 1e3, s)
    assert_printed(pr.cp / 1e3, cp)
    assert pr.g == pytest.approx(pr.h - T * pr.s, rel=1e-15)
    assert pr.v == 1.0 / rho
    # speed of sound from Props: cv = cp - T v alpha^2 / kappa, w^2 = (cp / cv) / (rho kappa)
    cv = pr.cp - T * pr.v * pr.alpha**2 / pr.kappa
    assert_printed(np.sqrt(pr.cp / cv / (rho * pr.kappa)), w)


def test_critical_point_reproduced():
    # IAPWS R7-97(2012) section 5.1 (from memory): region 3 meets the critical point
    # (Tc, pc, rhoc) of eqs. (3)-(5), where (dp/drho)_T vanishes.
    assert r3.pressure_rho(RHOC, TC) == pytest.approx(PC, rel=1e-9)
    assert abs(1.0 / (RHOC * r3.properties_rho(RHOC, TC).kappa)) < 1e-3  # Pa m3/kg


def test_data_file():
    tab = table("water/if97_region3", "region3")
    assert tab["reference"] == "IAPWS R7-97(2012), Table 30"
    assert len(tab["I"]) == len(tab["J"]) == len(tab["n"]) == 39  # terms 2..40; n1 separate
    assert (r3.RHO_STAR, r3.T_STAR, r3.R) == (322.0, 647.096, 461.526)
    assert (r3.T_MIN, r3.T_MAX, r3.P_MAX) == (623.15, 863.15, 100e6)


def test_span_brackets_region_3():
    # every region-3 state has its root inside the scanned span: below the B23 pressure at
    # the low end, above P_MAX at the high end, for the whole temperature range
    T = np.linspace(r3.T_MIN, r3.T_MAX, 481)
    assert np.all(r3.pressure_rho(r3.RHO_SCAN_MIN, T) < p_b23(T))
    assert np.all(r3.pressure_rho(r3.RHO_SCAN_MAX, T) > r3.P_MAX)


@pytest.mark.parametrize("T", np.r_[647.1, 647.11, 647.2, 647.5, 648.0, 650.0, np.linspace(660.0, 863.0, 30)])
def test_monotone_above_critical_temperature(T):
    rho = np.linspace(r3.RHO_SCAN_MIN, r3.RHO_SCAN_MAX, 14401)
    assert np.all(r3.properties_rho(rho, T).kappa > 0)  # (dp/drho)_T > 0 across the span
    p = np.linspace(p_b23(T), r3.P_MAX, 41)
    residual = r3.pressure_rho(rho, T) - p[:, None]
    crossings = np.count_nonzero(np.diff(np.sign(residual), axis=-1), axis=-1)
    assert np.all(crossings == 1)
    liquid = r3.density(T, p, "liquid")
    np.testing.assert_array_equal(liquid, r3.density(T, p, "vapour"))
    np.testing.assert_allclose(r3.pressure_rho(liquid, T), p, rtol=1e-12)


def _polynomial_roots(T, p):
    """All real densities in the span with p(rho, T) = p, from the table's coefficients directly."""
    tab = table("water/if97_region3", "region3")
    tau = TC / T
    # p / (rhoc R T) = n1 delta + sum n I delta^(I+1) tau^J: a polynomial in delta
    c = np.zeros(13)
    c[1] = tab["n1"]
    np.add.at(c, tab["I"].astype(int) + 1, tab["n"] * tab["I"] * tau ** tab["J"])
    c[0] -= p / (RHOC * 461.526 * T)
    roots = np.polynomial.polynomial.polyroots(c)
    roots = roots[np.abs(roots.imag) < 1e-7].real * RHOC
    return np.sort(roots[(roots > r3.RHO_SCAN_MIN) & (roots < r3.RHO_SCAN_MAX)])


def _round_trip_states():
    """(T, rho) over region 3 and around it with p <= P_MAX, apart from near-double roots.

    Below Tc, states with another root of p(rho, T) = p within one 2 kg/m3 scan cell (next
    to a spinodal) are left out: density() documents that it may miss those.
    """
    near_tc = [646.0, 646.9, 647.0, 647.09, 647.095, 647.097, 647.1, 647.2, 648.0]
    near_rhoc = [318.0, 320.0, 321.0, 321.5, 322.0, 322.5, 323.0, 324.0, 326.0]
    T = np.r_[np.linspace(r3.T_MIN, r3.T_MAX, 97), near_tc]
    rho = np.r_[np.linspace(100.0, 780.0, 137), near_rhoc]
    T, rho = (x.ravel() for x in np.meshgrid(T, rho))
    p = r3.pressure_rho(rho, T)
    keep = (p <= r3.P_MAX) & (r3.properties_rho(rho, T).kappa > 0)
    for i in np.flatnonzero(keep & (T < TC)):
        gaps = np.abs(_polynomial_roots(T[i], p[i]) - rho[i])
        keep[i] = np.sort(gaps)[1:].min(initial=np.inf) > 2.0
    return T[keep], rho[keep], p[keep]


def test_density_round_trip():
    T, rho, p = _round_trip_states()
    liquid = (T < TC) & (rho > RHOC)
    vapour = (T < TC) & (rho < RHOC)
    supercritical = T >= TC
    assert liquid.sum() > 500 and vapour.sum() > 300 and supercritical.sum() > 5000
    np.testing.assert_allclose(r3.density(T[liquid], p[liquid], "liquid"), rho[liquid], rtol=1e-9)
    np.testing.assert_allclose(r3.density(T[vapour], p[vapour], "vapour"), rho[vapour], rtol=1e-9)
    for branch in ("liquid", "vapour"):
        found = r3.density(T[supercritical], p[supercritical], branch)
        np.testing.assert_allclose(found, rho[supercritical], rtol=1e-9)


@pytest.mark.parametrize("dT", [24.0, 5.0, 1.0, 0.1, 0.01, 1e-3, 1e-4])
def test_branches_at_saturation_pick_outer_roots(dT):
    T = TC - dT
    roots = _polynomial_roots(T, psat(T))
    assert len(roots) == 3  # vapour-like, unstable, liquid-like
    assert r3.density(T, psat(T), "liquid") == pytest.approx(roots[-1], rel=1e-6)
    assert r3.density(T, psat(T), "vapour") == pytest.approx(roots[0], rel=1e-6)


def saturation_gibbs_difference(T):
    """|g(liquid root) - g(vapour root)| in J/kg at psat(T) of IF97 eq. (30)."""
    p = psat(T)
    g_liquid = r3.properties_rho(r3.density(T, p, "liquid"), T).g
    g_vapour = r3.properties_rho(r3.density(T, p, "vapour"), T).g
    return abs(g_liquid - g_vapour)


@pytest.mark.parametrize("T", [630.0, 640.0, 645.0])
def test_saturation_consistency(T):
    # IAPWS R7-97(2012) section 5 (from memory): region 3 is consistent with eq. (30)
    assert r3.density(T, psat(T), "liquid") > RHOC > r3.density(T, psat(T), "vapour")
    assert saturation_gibbs_difference(T) < 2.0 / M  # 2 J/mol


def test_scalar_and_array_agree():
    T = np.array([650.0, 650.0, 750.0, 630.0, 645.0, 647.1, 700.0, 640.0])
    p = np.array([25.6e6, 22.3e6, 78.3e6, psat(630.0), 21.5e6, 22.07e6, 1e9, 1e6])
    for branch in ("liquid", "vapour"):
        array = r3.density(T, p, branch)
        scalar = np.array([r3.density(t, q, branch) for t, q in zip(T, p)])
        assert np.shape(r3.density(T[0], p[0], branch)) == ()
        np.testing.assert_allclose(array, scalar, rtol=1e-14)
        rho = np.where(np.isnan(array), 400.0, array)
        one_by_one = [r3.pressure_rho(x, t) for x, t in zip(rho, T)]
        np.testing.assert_allclose(r3.pressure_rho(rho, T), one_by_one, rtol=1e-14)
        props = r3.properties_rho(rho, T)
        for i in range(len(T)):
            one = r3.properties_rho(rho[i], T[i])
            np.testing.assert_allclose([f[i] for f in props], list(one), rtol=1e-14)
    grid = r3.density(T.reshape(2, 4), p.reshape(2, 4), "liquid")
    np.testing.assert_array_equal(grid.ravel(), r3.density(T, p, "liquid"))


def test_no_root_gives_nan_and_bad_branch_raises():
    assert np.isnan(r3.density(700.0, 1e9, "liquid"))  # above p(RHO_SCAN_MAX)
    assert np.isnan(r3.density(700.0, 1e6, "vapour"))  # below p(RHO_SCAN_MIN)
    assert np.isnan(r3.density(np.nan, 20e6, "liquid"))
    with pytest.raises(ModelError):
        r3.density(700.0, 30e6, "gas")


@pytest.mark.parametrize(
    "T, p, branch",
    [(650.0, 25.5837018e6, "liquid"), (650.0, 22.2930643e6, "vapour"), (750.0, 78.3095639e6, "liquid"),
     (630.0, 25e6, "liquid"), (640.0, 19e6, "vapour"), (647.5, 22.2e6, "liquid"), (850.0, 95e6, "vapour")],
)
def test_alpha_kappa_match_numerical_derivatives(T, p, branch):
    rho = r3.density(T, p, branch)
    pr = r3.properties_rho(rho, T)

    def derivative(f, x, h):
        # central differences at h and h/2 combined by Richardson extrapolation (error ~ h^4)
        d1 = (f(x + h) - f(x - h)) / (2 * h)
        d2 = (f(x + h / 2) - f(x - h / 2)) / h
        return (4 * d2 - d1) / 3

    # alpha = (1/v)(dv/dT)_p = -(1/rho)(drho/dT)_p ; kappa = (1/rho)(drho/dp)_T
    alpha = -derivative(lambda t: r3.density(t, p, branch), T, 1e-3) / rho
    kappa = derivative(lambda q: r3.density(T, q, branch), p, 1e-6 * p) / rho
    assert pr.alpha == pytest.approx(alpha, rel=1e-7)
    assert pr.kappa == pytest.approx(kappa, rel=1e-7)


def test_long_arrays_run_in_blocks_and_each_state_keeps_its_own_numbers():
    # Table 33's states (from memory of IAPWS R7-97(2012), Table 33) at the edges of the blocks the
    # scan for density and the Helmholtz sums run in: their printed digits there, the scalar calls'
    # numbers to the last bit, and a field asked for alone the same as among all seven
    rng = np.random.default_rng(33)
    n = 2 * r3._BLOCK + 37
    edges = [0, r3._BLOCK - 1, r3._BLOCK, n - 1]
    rho, T = rng.uniform(100.0, 750.0, n), rng.uniform(650.0, 860.0, n)
    for k, (t, density, p, h, *_) in zip(edges, TABLE_33):
        rho[k], T[k] = density, t
    whole = r3.properties_rho(rho, T)
    for k, (t, density, p, h, *_) in zip(edges, TABLE_33):
        assert_printed(whole.h[k] / 1e3, h)
    for k in edges + list(rng.integers(0, n, 5)):
        assert [f[k] for f in whole] == list(r3.properties_rho(rho[k], T[k]))
    for name in whole._fields:
        alone = r3.properties_rho(rho, T, (name,))
        np.testing.assert_array_equal(getattr(alone, name), getattr(whole, name))
        assert all(np.isnan(getattr(alone, other)).all() for other in whole._fields if other != name)
    m = 2 * r3._SCAN_BLOCK + 5
    T, p = rng.uniform(650.0, 860.0, m), rng.uniform(25e6, 95e6, m)
    for k, (t, density, p_printed, *_) in zip([0, r3._SCAN_BLOCK - 1, r3._SCAN_BLOCK, m - 1], TABLE_33):
        T[k], p[k] = t, p_printed * 1e6
    for branch in ("liquid", "vapour"):
        rho = r3.density(T, p, branch)
        for k, (t, density, *_) in zip([0, r3._SCAN_BLOCK - 1, r3._SCAN_BLOCK, m - 1], TABLE_33):
            assert rho[k] == pytest.approx(density, rel=1e-7)  # p printed to 9 digits, near-critical at 650 K
        for k in [0, r3._SCAN_BLOCK - 1, r3._SCAN_BLOCK, r3._SCAN_BLOCK + 1, m - 1]:
            assert rho[k] == r3.density(T[k], p[k], branch)
