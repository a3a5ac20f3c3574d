"""The fluid models of every catalogue substance but water: coverage of their stated range, equal
chemical potentials on every line, the lowest potential where STABLE_PHASE says, closure at the
triple point.

Criteria (each check names its own):
  1. coverage     no #NUM! where a fluid phase is stable on 0.5-1.5 Tc x 0.01-10 pc, through the
                  sheet functions; where a solid is stable (or below the triple point) a number or an
                  error saying why; SUBSTANCE_INFO's fluid range covers that grid
  2. consistency  |mu' - mu''| <= 1e-6 RT on every line of an equation-of-state substance, and the
                  phase with the lowest chemical potential is STABLE_PHASE's, melting lines above the
                  critical temperature included
  3. closure      H_sub = H_fus + H_vap at the triple point

The checks of 1-3 are thermodynamic identities and the acceptance grid, no outside value; the
checks beside a published value name it.
"""

from __future__ import annotations

import re

import numpy as np
import pytest

from cellfuncs.errors import CellError
from cellfuncs.sheet.functions import (CHEM_POTENTIAL, LATENT_HEAT, MASS_DENSITY, MELT_TEMP, MOLAR_VOLUME, STABLE_PHASE,
                                       SUBLIME_PRESSURE, SUBLIME_TEMP, SUBSTANCE_INFO)
from cellfuncs.substances import lookup, names
from cellfuncs.substances.base import LIQUID, SOLID, VAPOR
from cellfuncs.substances.constants import R
from cellfuncs.substances.helmholtz.substance import EquationSubstance
from cellfuncs.substances.lines import line_pressure
from cellfuncs.substances.result import NOT_AVAILABLE, OUT_OF_RANGE

SUBSTANCES = [name for name in names() if name != "water"]
FLUID_LABELS = {"liquid", "vapor", "gas", "supercritical fluid"}
# substances known to fail a check, with the reason (none at present)
GRID_GAPS: dict[str, str] = {}
RANGE_GAPS: dict[str, str] = {}


def _params(names_, gaps: dict[str, str]):
    return [pytest.param(n, marks=pytest.mark.xfail(reason=gaps[n], strict=True)) if n in gaps else n
            for n in names_]


def _equation_substances() -> list[str]:
    return [n for n in SUBSTANCES if isinstance(lookup(n), EquationSubstance)]


def _is_error(value) -> bool:
    return isinstance(value, CellError)


def _grid(sub):
    tc, pc = sub.critical
    T, p = np.meshgrid(np.linspace(0.5, 1.5, 21) * tc, np.geomspace(0.01, 10.0, 21) * pc, indexing="ij")
    return T, p


# --- 1. coverage -----------------------------------------------------------------------------------
@pytest.mark.parametrize("name", _params(SUBSTANCES, GRID_GAPS))
def test_coverage_no_error_where_a_fluid_is_stable(name):
    # criterion 1: the acceptance grid 0.5-1.5 Tc x 0.01-10 pc, blank phase, through the sheet functions
    sub = lookup(name)
    T, p = _grid(sub)
    labels = STABLE_PHASE(name, T, p)
    single = np.vectorize(lambda x: isinstance(x, str) and "+" not in x, otypes=[bool])(labels)
    phase = np.where(single, labels, "liquid").astype(object)  # a line's label is no phase: left out
    values = {"MASS_DENSITY": MASS_DENSITY(name, T, p), "MOLAR_VOLUME": MOLAR_VOLUME(name, T, p),
              "CHEM_POTENTIAL": CHEM_POTENTIAL(name, T, p, phase)}
    tt = sub.triple.temperature
    for index in np.ndindex(T.shape):
        label = labels[index]
        if _is_error(label):  # only below the triple point may the stable phase be unknown
            assert T[index] < tt and label.reason, (index, label)
            continue
        if not single[index]:
            continue
        for function, out in values.items():
            value = out[index]
            if label in FLUID_LABELS:
                assert isinstance(value, float), (function, T[index], p[index], label, value)
            else:  # a solid: its value or an error saying why
                assert isinstance(value, float) or (_is_error(value) and value.reason), (function, index, value)


def _range(text: str) -> tuple[float, float, float]:
    """(T_low, T_high, p_max) of a range text "A K to B K, up to P Pa..." (p_max inf when unstated)."""
    t = re.match(r"([0-9.e+-]+) K to ([0-9.e+-]+) K", text)
    q = re.search(r"up to ([0-9.e+-]+) Pa", text)
    return float(t.group(1)), float(t.group(2)), float(q.group(1)) if q else np.inf


@pytest.mark.parametrize("name", _params(SUBSTANCES, RANGE_GAPS))
def test_coverage_the_stated_range_covers_the_grid(name):
    # criterion 1: SUBSTANCE_INFO's ranges of the fluid hold 0.5-1.5 Tc (from the triple point up,
    # the solid's below) and up to 10 pc
    sub = lookup(name)
    tc, pc = sub.critical
    bottom = max(0.5 * tc, sub.triple.temperature) if np.isfinite(sub.triple.temperature) else 0.5 * tc
    boil = _range(SUBSTANCE_INFO(name, "boil_range"))
    assert boil[0] <= bottom * (1 + 1e-12)
    if isinstance(sub, EquationSubstance):
        low, high, p_max = _range(SUBSTANCE_INFO(name, "equation_range"))
        assert low <= bottom * (1 + 1e-12) and high >= 1.5 * tc and p_max >= 10.0 * pc
    else:
        p_max = float(re.search(r"to ([0-9.]+) MPa", SUBSTANCE_INFO(name, "vapor_range")).group(1)) * 1e6
        assert p_max >= 10.0 * pc


def test_coverage_an_equation_beyond_its_stated_temperature_says_so():
    # criterion 1: Tillner-Roth and Baehr (1994), J. Phys. Chem. Ref. Data 23, 657, state the R-134a
    # equation to 455 K (from memory of the paper); the grid's 1.5 Tc is 561 K
    assert "above 455 K an extrapolation" in SUBSTANCE_INFO("R-134a", "equation_range")
    assert isinstance(MASS_DENSITY("R-134a", 561.0, 4e7), float)


# --- 2. consistency on the lines -------------------------------------------------------------------
def _line_points(sub, boundary: str, n: int = 200) -> np.ndarray:
    lo, hi = {"boil": (sub.t_low, sub.tc), "melt": sub._melt_range, "sublime": sub._sub_range}[boundary] or (0, 0)
    if not hi > lo:
        return np.array([])
    T = np.linspace(lo, hi, n)
    return T[:-1] if boundary == "boil" else T  # the critical point is no two-phase state


@pytest.mark.parametrize("name", _equation_substances())
def test_consistency_equal_chemical_potentials_on_every_line(name):
    # criterion 2: |mu' - mu''| <= 1e-6 RT at 200 points along each line's range; a point without both
    # potentials is a solid without a density in the data or a state beyond the fluid's range
    sub = lookup(name)
    compared = 0
    for boundary in ("boil", "melt", "sublime"):
        T = _line_points(sub, boundary)
        if T.size == 0:
            continue
        p, phases = sub.line_pressure(boundary, T)
        assert p.problems is None, boundary
        low, high = sub.chem_potential(T, p.values, phases[0]), sub.chem_potential(T, p.values, phases[1])
        both = np.isfinite(low.values) & np.isfinite(high.values)
        gap = np.abs(high.values - low.values)[both] / (R * T[both])
        assert np.all(gap <= 1e-6), (boundary, T[both][np.argmax(gap)], gap.max())
        for result in (low, high):
            if result.problems is not None:
                for problem in result.problems[~both]:
                    if problem is None:
                        continue
                    no_solid = problem.kind == NOT_AVAILABLE and "solid" in problem.reason
                    beyond = problem.kind == OUT_OF_RANGE and re.search("above the (fluid's )?range", problem.reason)
                    assert no_solid or beyond, problem
        if boundary == "boil":
            assert both.all()
        compared += both.sum()
    assert compared >= 199


def _lowest_is_stable(sub, T, p, potentials: dict) -> int:
    """Assert that STABLE_PHASE names the phase with the lowest of the given potentials; the count."""
    labels = sub.stable_phase(T, p).values
    table = np.vstack([potentials[k] for k in ("solid", "fluid", "vapor")])
    finite = np.isfinite(table)
    usable = (finite.sum(axis=0) >= 2) & np.array([isinstance(x, str) and "+" not in x for x in labels])
    lowest = np.array(["solid", "fluid", "vapor"])[np.argmin(np.where(finite, table, np.inf), axis=0)]
    said = np.array(["solid" if x == "solid" else "vapor" if x in ("vapor", "gas") else "fluid"
                     for x in np.where(usable, labels, "")])
    wrong = usable & (lowest != said)
    assert not wrong.any(), (T[wrong][:3], p[wrong][:3], labels[wrong][:3], lowest[wrong][:3])
    return int(usable.sum())


@pytest.mark.parametrize("name", [n for n in _equation_substances() if np.isfinite(lookup(n).v_solid)])
def test_consistency_the_lowest_chemical_potential_is_the_stable_phase(name):
    # criterion 2: 0.3 % either side of the melting line in temperature (above the critical temperature
    # too) and 1 % either side of the boiling and sublimation lines in pressure. A phase the model does
    # not offer there (the fluid in the solid's region, vapour above its sublimation pressure) enters
    # with the equation's metastable potential.
    sub = lookup(name)
    nan = lambda x: np.full(np.shape(x), np.nan)  # noqa: E731
    compared = 0
    T = _line_points(sub, "melt", 120)[1:]
    if T.size:
        p_m, _ = sub.melt_pressure(T)
        for t in (T * 0.997, T * 1.003):
            p = p_m.values
            solid = sub.chem_potential(t, p, SOLID).values
            with np.errstate(invalid="ignore"):
                fluid = sub._mu_liquid(t, p)
            compared += _lowest_is_stable(sub, t, p, {"solid": solid, "fluid": fluid, "vapor": nan(t)})
        assert np.all(sub.latent_heat("melt", T).values[np.isfinite(sub.latent_heat("melt", T).values)] > 0)
    T = _line_points(sub, "boil", 60)[1:]
    p_b, _ = sub.boil_pressure(T), None
    for f in (0.99, 1.01):
        p = p_b.values * f
        compared += _lowest_is_stable(sub, T, p, {"solid": nan(T), "fluid": sub.chem_potential(T, p, LIQUID).values,
                                                  "vapor": sub.chem_potential(T, p, VAPOR).values})
    T = _line_points(sub, "sublime", 60)[:-1]
    if T.size:
        p_s = sub.sublime_pressure(T).values
        for f in (0.99, 1.01):
            p = p_s * f
            with np.errstate(invalid="ignore"):
                vapor = sub._mu_vapor(T, p)
            compared += _lowest_is_stable(sub, T, p, {"solid": sub.chem_potential(T, p, SOLID).values,
                                                      "fluid": nan(T), "vapor": vapor})
    assert compared >= 100


def test_consistency_the_solid_on_a_melting_line_above_the_critical_temperature():
    # criterion 2: hydrogen at 50 K and 85 K, neon at 46 K, sulfur hexafluoride at 340 K, nitrogen at
    # 250 K: on the melting line the solid's chemical potential is the fluid's, and the solid is the
    # denser phase (nitrogen's fluid at 250 K is denser than its solid at the triple point)
    for name, T in (("hydrogen", 50.0), ("hydrogen", 85.0), ("neon", 46.0), ("sulfur hexafluoride", 340.0),
                    ("nitrogen", 250.0)):
        sub = lookup(name)
        assert T > sub.tc
        p, _ = sub.melt_pressure(np.array(T))
        solid, fluid = (float(sub.chem_potential(T, p.values, phase).values) for phase in (SOLID, LIQUID))
        assert abs(solid - fluid) <= 1e-6 * R * T, (name, T, solid, fluid)
        assert float(sub.molar_volume(T, p.values, SOLID).values) < float(sub.molar_volume(T, p.values, LIQUID).values)
        assert float(sub.latent_heat("melt", np.array(T)).values) > 0


# --- 3. closure at the triple point ----------------------------------------------------------------
@pytest.mark.parametrize("name", [n for n in _equation_substances() if lookup(n)._sub_range is not None])
def test_closure_enthalpy_of_sublimation_is_fusion_plus_boiling_at_the_triple_point(name):
    # criterion 3: H_sub = H_fus + H_vap at the triple point (first law around the triple point)
    tt = lookup(name).triple.temperature
    heats = {b: LATENT_HEAT(name, b, tt) for b in ("sublime", "melt", "boil")}
    if not all(isinstance(h, float) for h in heats.values()):  # a solid without a density: no H_fus
        assert _is_error(heats["melt"])
        return
    assert heats["sublime"] == pytest.approx(heats["melt"] + heats["boil"], rel=1e-9)


def test_closure_the_published_sublimation_line_stands_away_from_the_triple_point():
    # criterion 3: carbon dioxide's sublimation line is Span and Wagner (1996), J. Phys. Chem. Ref. Data
    # 25, 1509, eq. (3.12), unchanged 5 % and more below the triple point; 194.686 K at 1 atm is the
    # paper's normal sublimation temperature (from memory of the paper). Within 5 % of the triple point
    # its slope is brought onto Clapeyron's for H_fus + H_vap: the published slope there is 2.0 % lower
    # (a fact of the data: the melting line, the solid density and the equation's enthalpy of boiling
    # ask for a 2 % steeper line)
    co2 = lookup("CO2")
    line = co2.definition.lines["sublime"]
    T = np.linspace(line["T_min"], 0.95 * co2.triple.temperature, 20)
    assert np.allclose(SUBLIME_PRESSURE("CO2", T), line_pressure(line, T) * co2._sub_scale, rtol=1e-13)
    assert SUBLIME_TEMP("CO2", 101325.0) == pytest.approx(194.686, abs=0.002)
    tt = np.array(co2.triple.temperature)
    published = float(co2._published_dlnp(tt))
    assert co2._sub_delta / (published + co2._sub_delta) == pytest.approx(0.020, abs=0.002)


@pytest.mark.parametrize("name", ["acetone", "benzene", "r-32"])
def test_the_solid_is_stable_at_the_melting_lines_top_pressure(name):
    # criterion: the lowest potential is STABLE_PHASE's answer, also where a melting line ends (its
    # top pressure, 100 MPa, typed exactly): 20 K below the melting temperature there is solid
    t_melt = MELT_TEMP(name, 100.0, "MPa", "K")
    assert STABLE_PHASE(name, t_melt - 20.0, 100.0, "K", "MPa") == "solid"
    mu_solid, mu_liquid = (CHEM_POTENTIAL(name, t_melt - 20.0, 100.0, phase, "K", "MPa") for phase in ("solid", "liquid"))
    assert not isinstance(mu_liquid, float) or mu_solid < mu_liquid
