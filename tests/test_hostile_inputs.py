"""Hostile arguments: every sheet function answers with a cell value and never raises.

A cell value is a number, a text, a CellError, or an array of those. Hypothesis throws at
each registered function random mixtures of floats (NaN, infinities, huge, negative), ints
(beyond a double's range too), booleans, blanks, texts (unit-like, phase-like and garbage),
error values, nested lists and numpy arrays of mixed objects, with too few or too many
arguments.
"""

from __future__ import annotations

import inspect

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from cellfuncs.errors import CODES, CellError
from cellfuncs.sheet import FUNCTIONS

WORDS = [
    "water", "WATER", "h2o", "R-718", "steam", "",  " ",
    "K", "degC", "°C", "degF", "F", "R", "C", "Pa", "kPa", "MPa", "bar", "barg", "psig", "atm", "inHg",
    "m3/mol", "L/mol", "m3/kg", "kg/m3", "g/cm3", "mol/L", "J/mol", "kJ/kg", "1/K", "1/bar", "1/MPa",
    "liquid", "vapor", "vapour", "gas", "solid", "ice Ih", "ice III", "ice V", "ice VII", "supercritical fluid",
    "liquid + vapor", "boil", "melt", "sublime", "freeze", "T", "P", "t", "molar_mass", "melt_range",
    "1/0", "**", "()", "K**K", "Pa/0", "kPa kPa", "°", "²", "nan", "inf", "-1", "1e400", "#N/A", "None",
]
FLOATS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0.0, -0.0, 1.0, -1.0, 273.16, 611.657, 647.096, 22.064e6, 101325.0, 1e308, -1e308, 5e-324,
                     1e-40, 2e10, 300.0, 1e5, 2e4, 373.15, 250.0, 100.0]),
)
INTS = st.one_of(st.integers(min_value=-10**6, max_value=10**6), st.sampled_from([2, 3, 10000, 10001, 10**400, -10**400]))
ERRORS = st.builds(CellError, st.sampled_from(CODES), st.text(max_size=8))
TEXTS = st.one_of(st.sampled_from(WORDS), st.text(max_size=12))
SCALARS = st.one_of(FLOATS, INTS, st.booleans(), st.none(), TEXTS, ERRORS,
                    st.sampled_from([np.float64(300.0), np.int64(3), np.bool_(True), np.str_("liquid"), 1 + 2j]))


def _object_array(items: list, shape: tuple[int, ...]) -> np.ndarray:
    array = np.empty(len(items), dtype=object)
    array[:] = items  # element by element: a CellError stays one element
    return array.reshape(shape)


@st.composite
def numpy_arrays(draw) -> np.ndarray:
    shape = draw(st.sampled_from([(), (0,), (1,), (3,), (1, 1), (2, 2), (1, 3), (3, 1), (2, 1, 2)]))
    size = int(np.prod(shape))
    if draw(st.booleans()):
        return np.array(draw(st.lists(FLOATS, min_size=size, max_size=size)), dtype=float).reshape(shape)
    return _object_array(draw(st.lists(SCALARS, min_size=size, max_size=size)), shape)


VALUES = st.recursive(st.one_of(SCALARS, numpy_arrays()),
                      lambda inner: st.lists(inner, max_size=3) | st.tuples(inner, inner), max_leaves=8)


def is_cell_value(value) -> bool:
    if isinstance(value, (float, str, CellError)):
        return True
    if isinstance(value, np.ndarray):
        return all(isinstance(v, (float, str, CellError)) for v in value.ravel())
    return False


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_never_raises(name, data):
    function = FUNCTIONS[name]
    count = len(inspect.signature(function.call).parameters)
    substance = data.draw(st.one_of(st.just("water"), VALUES), label="substance")
    rest = data.draw(st.lists(VALUES, max_size=count + 1), label="arguments")
    result = function.call(substance, *rest)
    assert is_cell_value(result), repr(result)[:300]


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_never_raises_with_plausible_arguments(name, data):
    # mostly sensible values, so that the calls get past argument parsing into the physics
    function = FUNCTIONS[name]
    count = len(inspect.signature(function.call).parameters)
    plausible = st.one_of(FLOATS, st.sampled_from(WORDS[:50]), st.none(),
                          st.lists(FLOATS, min_size=1, max_size=4).map(np.array))
    rest = data.draw(st.lists(plausible, min_size=max(count - 1, 0), max_size=count), label="arguments")
    result = function.call("water", *rest)
    assert is_cell_value(result), repr(result)[:300]
