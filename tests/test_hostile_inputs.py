"""Hostile arguments: every sheet function answers with a cell value and never raises.

A cell value is a finite number, a text, a CellError, or an array of those. Hypothesis throws at
each registered function random mixtures of floats (NaN, infinities, huge, negative), ints
(beyond a double's range too), booleans, blanks, texts (unit-like, phase-like and garbage),
error values, nested lists and numpy arrays of mixed objects, with too few or too many
arguments, and user-defined substances with extreme values, on the Python, cell (xlwings) and
formula-engine paths. The suite runs in strict mode (conftest.py), so an exception inside the
pack fails these tests rather than becoming an error value.
"""

from __future__ import annotations

import functools
import inspect
import math
import os
from typing import Mapping, NamedTuple

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from cellfuncs.errors import CODES, CellError
from cellfuncs.formula import SimpleContext, compute
from cellfuncs.sheet import FUNCTIONS
from cellfuncs.sheet.cells import CallError, as_array
from cellfuncs.sheet.functions import SUBSTANCE_INFO
from cellfuncs.substances.general.bounds import FIELDS
from cellfuncs.substances.general.definition import LINES
from cellfuncs.substances.general.definition import TEXTS as TEXT_FIELDS

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


_SHAPES = st.sampled_from([(), (0,), (1,), (3,), (1, 1), (2, 2), (1, 3), (3, 1), (2, 1, 2)])


@st.composite
def numpy_arrays(draw) -> np.ndarray:
    shape = draw(_SHAPES)
    size = int(np.prod(shape))
    if draw(st.booleans()):
        return np.array(draw(st.lists(FLOATS, min_size=size, max_size=size)), dtype=float).reshape(shape)
    return _object_array(draw(st.lists(SCALARS, min_size=size, max_size=size)), shape)


VALUES = st.recursive(st.one_of(SCALARS, numpy_arrays()),
                      lambda inner: st.lists(inner, max_size=3) | st.tuples(inner, inner), max_leaves=8)


def _nested(depth: int, leaf=300.0) -> list:
    for _ in range(depth):
        leaf = [leaf]
    return leaf


# nestings deeper than numpy broadcasts (32 dimensions) or than Python's stack, and arrays of up to 64 dimensions
DEEP = st.one_of(st.integers(30, 3000).map(_nested), st.integers(30, 64).map(lambda n: np.full((1,) * n, 300.0)))


def is_cell_value(value) -> bool:
    """A number (finite: never nan or inf), a text, an error value, or an array of those."""
    if isinstance(value, float):
        return math.isfinite(value)
    if isinstance(value, (str, CellError)):
        return True
    if isinstance(value, np.ndarray):
        return all(is_cell_value(v) for v in value.ravel())
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


# ---- every path, user-defined substances, finite cell values ---------------------------------------
# The test below draws, for every registered function, a substance (a name, or a user definition:
# in-bounds extremes that reach the physics, or real definitions with hostile fields) and arguments
# aimed at each parameter (numbers of every magnitude near the substance's own scales, and hostile
# values), and calls the function on all three paths: Python, the cell path that xlwings calls in
# Excel, and the formula engine. Strict mode is on (conftest.py): an exception inside the pack fails
# the test instead of becoming #VALUE! internal error. In CI (CI=true) it runs 20,000 examples in all,
# shared among the registered functions (870 each for 23); elsewhere 100 each.
CI = os.environ.get("CI") == "true"
EXAMPLES = -(-20000 // len(FUNCTIONS)) if CI else 100

REAL = ["propane", "carbon dioxide", "helium-4", "nitrogen", "ethanol", "R-1234yf", "acetic acid", "hydrogen",
        "sulfur hexafluoride", "isobutane"]


def _rows(name: str) -> dict:
    return {row[0]: (row[1], row[2] or None) for row in SUBSTANCE_INFO(name).tolist() if row[1] != ""}


DEFINITIONS = {name: _rows(name) for name in REAL}
LINE_KEYS = ("form", "Tc", "pc", "n", "t", "A", "B", "C", "T_min", "T_max", "Tt", "pt", "a", "b", "s", "T0", "p0",
             "c", "p_unit", "t_unit", "reference")
FIELD_NAMES = [*FIELDS, *TEXT_FIELDS, *(f"{line}.{key}" for line in LINES for key in LINE_KEYS),
               "colour", "", "Molar Mass", "BOIL.tc", "boil.", ".", "boil.n.t"]
UNITS = st.sampled_from([None, "", "-", "1", "K", "degC", "Pa", "kPa", "MPa", "bar", "g/mol", "kg/mol", "kJ/mol",
                         "J/mol", "kg/m3", "g/cm3", "J/(mol*K)", "kJ/(kg*K)", "**", "1/0", "furlong", "KK" * 30])
# up to 30,000 characters, made by a map so that hypothesis does not print them
LONG_TEXTS = st.tuples(st.sampled_from(["1", "[", "-", "1,", "é "]), st.integers(1, 30000)).map(lambda t: t[0] * t[1])
HUGE = st.sampled_from([10**400, -10**400, 2**1030, 1e308, -1e308, 5e-324, 1e-300, 1e300, 0, -0.0])
LIST_TEXTS = st.one_of(
    st.sampled_from(["[]", "[1]", "[1e308, -1e308]", "[nan]", "[inf, 1]", "[1,,2]", "[0x10]", "[1e400]", "[1_000]",
                     "[True, 2]", "(1, 2)", "[[1], [2]]", "[" + "1," * 13 + "1]"]),
    LONG_TEXTS.map(lambda text: "[" + text + "]"))


@functools.lru_cache(maxsize=None)
def _field_value(key: str):
    """Values for one field: hostile numbers and texts, and the edges of its bounds."""
    hostile = st.one_of(FLOATS, HUGE, TEXTS, LIST_TEXTS, st.none(), st.booleans(), ERRORS,
                        st.lists(FLOATS, max_size=14), st.lists(st.lists(FLOATS, max_size=2), max_size=2),
                        LONG_TEXTS, numpy_arrays())
    bound = FIELDS.get(key)
    if bound is None:
        return hostile
    edges = st.sampled_from([bound.low, bound.high, bound.low * (1 - 1e-9) - 1e-300, bound.high * (1 + 1e-9)])
    inside = st.floats(bound.low, bound.high)
    return st.one_of(hostile, edges, inside)


@functools.lru_cache(maxsize=None)
def _field_values(key: str):
    return st.lists(_field_value(key), max_size=3)


# the numbers of a definition drawn as one block of bytes (fractions of 0 to 1 in 16 bits, and 16 bits of
# choices): one draw is far cheaper than thirty, and hypothesis still varies and shrinks each of them
_BLOCK = st.binary(min_size=64, max_size=64)


def _fractions_and_bits(block: bytes) -> tuple:
    numbers = [int.from_bytes(block[i:i + 2], "big") for i in range(0, len(block), 2)]
    return iter([n / 65535 for n in numbers[1:]]), numbers[0]


def _spread(fraction: float, low: float, high: float, log: bool = False) -> float:
    if log:
        return 10.0 ** (np.log10(low) + fraction * (np.log10(high) - np.log10(low)))
    return low + fraction * (high - low)


@st.composite
def in_bounds_definitions(draw) -> dict:
    """A definition made from scratch inside the bounds, with lines that may or may not fit together."""
    f, bits = _fractions_and_bits(draw(_BLOCK))
    has = lambda bit: bool(bits >> bit & 1)  # noqa: E731
    tc = _spread(next(f), 1.0, 2000.0, log=True)
    pc = _spread(next(f), 1e5, 1e8, log=True)
    fields: dict = {"name": "hostile X", "molar_mass": _spread(next(f), 1.0, 1000.0, log=True),
                    "critical_temperature": tc, "critical_pressure": (pc, "Pa")}
    if has(0):
        fields["acentric_factor"] = _spread(next(f), -0.5, 2.0)
    if not has(0) or has(1):
        fields["normal_boiling_point"] = tc * _spread(next(f), 0.1, 0.999)
    tt = None
    if has(2):  # the lowest triple point the bounds take, or anywhere up to the critical point
        tt = fields["triple_point_temperature"] = tc * (0.1 if has(3) else _spread(next(f), 0.1, 0.999))
        if has(4):
            fields["triple_point_pressure"] = (_spread(next(f), 1e-10, pc, log=True), "Pa")
    for bit, key in ((5, "enthalpy_of_fusion"), (6, "solid_density"), (7, "liquid_heat_capacity")):
        if has(bit):
            fields[key] = _spread(next(f), FIELDS[key].low, FIELDS[key].high, log=True)
    if has(8):
        fields["liquid_density"] = _spread(next(f), 50.0, 5000.0, log=True)
        fields["liquid_density.temperature"] = tc * _spread(next(f), 0.05, 0.999)
    low = tt or 0.3 * tc
    if has(9) and has(10):
        terms = 1 + bits % 5
        fields.update({"boil.form": "ancillary", "boil.Tc": tc * _spread(next(f), 0.99, 1.01), "boil.pc": pc,
                       "boil.n": [_spread(next(f), -10, 10) for _ in range(terms)],
                       "boil.t": [0.5 + k * _spread(next(f), 0.1, 1.5) for k in range(1, terms + 1)],
                       "boil.T_min": low, "boil.T_max": tc})
    elif has(9):
        fields.update({"boil.form": "antoine", "boil.A": _spread(next(f), -5, 15), "boil.B": _spread(next(f), 0, 5000),
                       "boil.C": _spread(next(f), -100, 300), "boil.p_unit": ("Pa", "mmHg", "bar")[bits % 3],
                       "boil.t_unit": ("K", "degC")[bits % 2], "boil.T_min": low,
                       "boil.T_max": low + _spread(next(f), 0.01, 1.0) * (tc - low)})
    if tt and has(11):
        fields.update({"melt.form": "simon_glatzel", "melt.T0": tt, "melt.p0": _spread(next(f), 0.0, 1e6),
                       "melt.a": _spread(next(f), 1e6, 1e10, log=True), "melt.c": _spread(next(f), 1.0, 5.0),
                       "melt.T_min": tt, "melt.T_max": tt * _spread(next(f), 1.01, 5.0)})
    if tt and has(12):
        fields.update({"sublime.form": "ancillary_sublimation", "sublime.Tt": tt,
                       "sublime.pt": _spread(next(f), 1e-10, 1e8, log=True), "sublime.a": [_spread(next(f), -30, 0)],
                       "sublime.t": [1.0], "sublime.T_min": tt * _spread(next(f), 0.3, 0.99), "sublime.T_max": tt})
    return fields


@st.composite
def definitions(draw):
    """(a user-defined substance argument, its critical temperature and pressure for aiming the states)."""
    fields = dict(draw(_BASES))
    for _ in range(draw(st.integers(0, 3))):
        key = draw(_KEYS)
        action = draw(_ACTIONS)
        if action == "drop":
            fields.pop(key, None)
        elif action == "value":
            fields[key] = draw(_field_value(key))
        elif action == "pair":
            fields[key] = (draw(_field_value(key)), draw(UNITS))
        else:
            fields[key] = tuple(draw(_field_values(key)))
    scale = _scale(fields)
    form = draw(_FORMS)
    if form == "mapping":
        return fields, scale
    width = draw(st.integers(2, 4))  # field, value, unit, source
    rows = []
    for key, raw in fields.items():
        value, unit = raw if isinstance(raw, tuple) and len(raw) == 2 else (raw, None)
        rows.append([key, str(value) if isinstance(value, list) else value, unit, "source"][:width])
    return (_object_array([v for r in rows for v in r], (len(rows), width)) if form == "array" and rows else rows), scale


# strategies built once: hypothesis validates each new strategy object, which costs more than the draw
_BASES = st.one_of(in_bounds_definitions(), st.sampled_from(REAL).map(DEFINITIONS.get))
_KEYS = st.sampled_from(FIELD_NAMES)
_ACTIONS = st.sampled_from(("drop", "value", "pair", "tuple"))
_FORMS = st.sampled_from(("mapping", "rows", "array"))
_SUBSTANCE_KINDS = st.sampled_from(("name", "definition", "definition", "hostile"))
_NAMES = st.sampled_from(("water", *REAL, "WATER", "R-744"))
_HOSTILE_SUBSTANCES = VALUES | DEEP


def _scale(fields: dict) -> tuple[float, float]:
    def number(key, default):
        raw = fields.get(key, default)
        value = raw[0] if isinstance(raw, tuple) and raw else raw
        return float(value) if isinstance(value, float) and np.isfinite(value) and value > 0 else default
    return number("critical_temperature", 300.0), number("critical_pressure", 5e6)


_DEFINITIONS = definitions()


@st.composite
def substances(draw):
    choice = draw(_SUBSTANCE_KINDS)
    if choice == "name":
        return draw(_NAMES), (647.096, 22.064e6)
    if choice == "hostile":
        return draw(_HOSTILE_SUBSTANCES), (300.0, 1e5)
    return draw(_DEFINITIONS)


class Scaled(NamedTuple):
    """A number on the drawn substance's own scale: ``factor`` times its critical temperature or pressure."""

    quantity: str
    factor: float


def _resolve(value, scale: tuple[float, float]):
    if isinstance(value, Scaled):
        return value.factor * (scale[0] if value.quantity == "T" else scale[1])
    if isinstance(value, np.ndarray) and value.dtype == object:
        return _object_array([_resolve(v, scale) for v in value.ravel()], value.shape)
    return value


@functools.lru_cache(maxsize=None)
def _argument(parameter: str):
    """Values aimed at one parameter: numbers on the substance's own scales, words it takes, hostile values."""
    if parameter.endswith("unit"):
        aimed = st.sampled_from(WORDS[7:33] + [None])
    elif parameter.startswith(("temperature", "t_from", "t_to", "t_start", "t_end")):
        aimed = st.one_of(st.floats(0.05, 3.0), st.sampled_from((1.0, 0.1, 0.5))).map(lambda r: Scaled("T", r))
    elif parameter.startswith(("pressure", "p_from", "p_to")):
        aimed = st.one_of(st.floats(-12, 1.2).map(lambda e: Scaled("p", 10.0 ** e)), st.sampled_from(
            [Scaled("p", 1.0), 101325.0]))
    elif parameter.startswith("phase"):
        aimed = st.sampled_from(("", None, "liquid", "vapor", "gas", "solid", "supercritical fluid", "ice Ih"))
    elif parameter == "boundary":
        aimed = st.sampled_from(("boil", "melt", "sublime"))
    elif parameter == "which":
        aimed = st.sampled_from(("T", "P"))
    elif parameter == "points":
        aimed = st.sampled_from((2, 3, 40))
    elif parameter == "solid":
        aimed = st.sampled_from((None, "", "solid", "ice III"))
    else:  # field
        aimed = st.sampled_from((None, "molar_mass", "boil_model", "melt_range", "boil.n", "note_source"))
    arrays = st.lists(aimed, min_size=1, max_size=4).map(lambda items: _object_array(items, (len(items),)))
    grids = st.lists(aimed, min_size=4, max_size=4).map(lambda items: _object_array(items, (2, 2)))
    return st.one_of(*[aimed] * 6, arrays, grids, VALUES, DEEP)  # hostile values mostly in the tests above


def _finite_cell(value) -> bool:
    if type(value) is float:
        return math.isfinite(value)
    if type(value) is CellError:
        return value.code in CODES and bool(value.reason)
    return type(value) is str


def _python_value(value) -> bool:
    if isinstance(value, np.ndarray):  # numbers only (a float array), or an object array of cell values
        if value.dtype.kind == "f":
            return bool(np.isfinite(value).all())
        return value.dtype == object and all(_finite_cell(v) for v in value.ravel())
    return _finite_cell(value)


def _excel_value(value) -> bool:
    # what xlwings hands to Excel: numbers, texts (error values as their text) or 2-D lists of them
    if isinstance(value, list):
        return len(value) > 0 and all(isinstance(row, list) and len(row) == len(value[0]) > 0 for row in value) and \
            all(_excel_value(v) for row in value for v in row)
    return type(value) is str or type(value) is float and math.isfinite(value)


def _engine_argument(value):
    """A drawn argument as the formula engine holds it (scalars, 2-D object arrays), or _SKIP."""
    if isinstance(value, Mapping):  # a definition as sheet rows: a list of coefficients is typed as its text
        pairs = [(k, v if isinstance(v, tuple) and len(v) == 2 else (v, None)) for k, v in value.items()]
        value = [[k, str(v) if isinstance(v, (list, tuple)) else v, u] for k, (v, u) in pairs]
    if isinstance(value, (list, np.ndarray)) or isinstance(value, tuple) and not isinstance(value, CellError):
        try:
            array = as_array(list(value) if isinstance(value, tuple) else value)
        except CallError:  # nested beyond numpy's dimensions
            return _SKIP
        if array.ndim > 2 or array.size == 0:
            return _SKIP  # the engine never holds these
        array = array.reshape((1, -1) if array.ndim < 2 else array.shape).astype(object)
        for index, item in np.ndenumerate(array):
            item = _engine_argument(item)
            array[index] = "array" if item is _SKIP or isinstance(item, np.ndarray) else item
        return array
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        try:
            number = float(value)
        except OverflowError:
            return _SKIP
        return number if math.isfinite(number) else _SKIP  # the engine stores no non-finite number
    if value is None or isinstance(value, (str, CellError)):
        return value
    return str(value)


_SKIP = object()
_ARITIES = st.sampled_from(("all", "all", "all", "fewer", "more"))


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
@settings(max_examples=EXAMPLES, deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large, HealthCheck.filter_too_much])
@given(data=st.data())
def test_every_path_answers_with_finite_cell_values(name, data):
    entry = FUNCTIONS[name]
    parameters = list(inspect.signature(entry.call).parameters)
    substance, scale = data.draw(substances(), label="substance")
    args = [substance] + [_resolve(data.draw(_argument(p), label=p), scale) for p in parameters[1:]] if parameters \
        else []
    arity = data.draw(_ARITIES, label="arity")
    if arity == "fewer":
        args = args[: data.draw(st.integers(0, max(len(args) - 1, 0)))]
    elif arity == "more":
        args = args + data.draw(st.lists(VALUES, min_size=1, max_size=2))
    result = entry.call(*args)
    assert _python_value(result), repr(result)[:300]
    shown = entry.cell(*args)
    assert _excel_value(shown), repr(shown)[:300]
    engine_args = [_engine_argument(a) for a in args]
    if not any(a is _SKIP for a in engine_args):
        names = {f"v_{i}": a for i, a in enumerate(engine_args)}
        value = compute(f"={name}(" + ",".join(names) + ")", SimpleContext({name: entry.call}, names))
        cells = value.ravel() if isinstance(value, np.ndarray) else [value]
        assert (not isinstance(value, np.ndarray) or value.ndim == 2) and all(
            _finite_cell(v) or type(v) is bool or v is None for v in cells), repr(value)[:300]
