"""One source for every number: the data files.

Every number a message of the models or the sheet layer states is a value some data file holds (in the
unit the message uses, to the digits it prints), a value the call was given, a limit defined once at
module level, or one the substance derived from its data; and no module of the physics or the sheet
layer writes a data value again as a literal. The reference values are the data files themselves
(cellfuncs/data/**/*.toml, each naming its publication).
"""

from __future__ import annotations

import ast
import math
import re
import tomllib
from functools import cached_property
from importlib import import_module
from pathlib import Path

import numpy as np
import pytest

import cellfuncs
from cellfuncs.errors import CellError
from cellfuncs.sheet import functions
from cellfuncs.substances import lookup
from cellfuncs.substances.helmholtz.equation import equation, equation_keys

PACKAGE = Path(cellfuncs.__file__).parent
DATA = PACKAGE / "data"
# the code that states limits and formats messages: the physics and the sheet layer
SOURCES = sorted((PACKAGE / "substances").rglob("*.py")) + sorted((PACKAGE / "sheet").glob("*.py"))

# a number followed by the unit a message states it in, with that unit's factor to SI
_QUANTITY = re.compile(r"(?<![\w.+-])(-?\d+(?:\.\d*)?(?:e[+-]?\d+)?) ?(K|Pa|kPa|MPa|GPa|bar|%)(?![\w/*^(])")
_SCALE = {"K": 1.0, "Pa": 1.0, "kPa": 1e3, "MPa": 1e6, "GPa": 1e9, "bar": 1e5, "%": 0.01}
# numbers that are arithmetic, not facts: zero and one (0 K is absolute zero, 100 % the whole), small
# counts, halves and SI prefixes; they may stand anywhere in the code and in a message
_NOT_FACTS = {0.0, 0.5, 1.0, 2.0, 3.0, 4.0, 10.0, 100.0, 1e3, 1e6, 1e9}
# the bounds of a user's definition illustrate their extent by a substance no data file holds
# (bounds.py: helium-3's critical pressure, from memory of the CRC Handbook)
_ILLUSTRATIONS = {"0.115 MPa"}


def _numbers(content, out: list[float]) -> list[float]:
    """Every number in a parsed data file, however deep in its tables."""
    if isinstance(content, dict):
        for value in content.values():
            _numbers(value, out)
    elif isinstance(content, list):
        for value in content:
            _numbers(value, out)
    elif isinstance(content, (int, float)) and not isinstance(content, bool):
        out.append(float(content))
    return out


def _data_values() -> np.ndarray:
    # every data file but Excel's own function tables and units (facts of a spreadsheet, not of substances)
    values: list[float] = []
    for path in DATA.rglob("*.toml"):
        if "excel" not in path.parts:
            _numbers(tomllib.loads(path.read_text(encoding="utf-8")), values)
    for key in equation_keys():  # the equations' constants in SI, as the equations read them
        values += [c.value for c in equation(key).constants.values()]
    return np.array(sorted(set(values)), dtype=float)


def _module_limits() -> np.ndarray:
    """Module-level numbers of the physics and the sheet layer: limits defined in one place."""
    values = []
    for path in SOURCES:
        name = "cellfuncs." + ".".join(path.relative_to(PACKAGE).with_suffix("").parts)
        module = import_module(name.removesuffix(".__init__"))
        values += [float(v) for v in vars(module).values() if type(v) in (int, float)]
        values += [float(x) for v in vars(module).values() if isinstance(v, tuple)
                   for x in v if type(x) in (int, float)]
    return np.array(values, dtype=float)


def _stated(printed: str, unit: str, values: np.ndarray) -> bool:
    """Whether a value, in ``unit`` and rounded to the printed significant digits, reads ``printed``."""
    number = float(printed)
    if abs(number * _SCALE[unit]) in _NOT_FACTS or abs(number) in _NOT_FACTS:
        return True
    digits = len(re.sub(r"^[0.]+", "", printed.lstrip("-").split("e")[0].replace(".", "")) or "0")
    shown = values / _SCALE[unit]
    finite = shown[np.isfinite(shown) & (shown != 0)]
    return any(float(f"{v:.{digits}g}") == number for v in finite)


def _docstrings(tree: ast.AST) -> set[int]:
    nodes = [tree] + [n for n in ast.walk(tree) if isinstance(n, (ast.FunctionDef, ast.ClassDef))]
    return {id(n.body[0].value) for n in nodes if n.body and isinstance(n.body[0], ast.Expr)
            and isinstance(n.body[0].value, ast.Constant)}


def _literals():
    """(file, line, constant node) of every literal outside docstrings in the sources."""
    for path in SOURCES:
        tree = ast.parse(path.read_text(encoding="utf-8"))
        docs = _docstrings(tree)
        for node in ast.walk(tree):
            if isinstance(node, ast.Constant) and id(node) not in docs:
                yield path.relative_to(PACKAGE), node.lineno, node.value


def _significant(value: float) -> int:
    return len(repr(abs(float(value))).split("e")[0].replace(".", "").strip("0"))


def test_every_number_written_into_a_message_is_a_data_value():
    # message texts and the constant parts of f-strings: a quantity typed there is a second copy of a fact
    values = np.concatenate([_data_values(), _module_limits()])
    found = [(str(path), line, m.group(0)) for path, line, text in _literals() if isinstance(text, str)
             for m in _QUANTITY.finditer(text)]
    wrong = [item for item in found if item[2] not in _ILLUSTRATIONS
             and not _stated(*_QUANTITY.fullmatch(item[2]).groups(), values)]
    assert not wrong


def test_no_module_retypes_a_data_value():
    # a literal equal to a data value with four or more significant digits is a retyped constant
    # (647.096, 8.314462618, 101325, 273.15, a correlation's coefficient); rounder numbers (a factor
    # of 2, a 1e-6 step) coincide with data values by arithmetic, not by copying
    facts = {v for v in _data_values().tolist() if _significant(v) >= 4} - _NOT_FACTS
    copies = [(str(path), line, value) for path, line, value in _literals()
              if type(value) in (int, float) and float(value) in facts]
    assert len(facts) > 1500 and not copies


def test_the_checks_catch_a_retyped_value():
    values = _data_values()
    assert _stated("647.096", "K", values) and _stated("22.064", "MPa", values)  # water's critical point
    assert _stated("101.325", "kPa", values)  # the standard atmosphere
    assert not _stated("647.097", "K", values)  # a digit wrong
    assert not _stated("22.064", "kPa", values)  # the right digits in the wrong unit
    assert 0.45724 in set(values.tolist()) and 5.92714 in set(values.tolist())  # Peng-Robinson, Lee-Kesler


# hostile inputs (SI): beyond every range, on absolute zero, below it, tiny, huge, not finite
_T = [-5.0, 0.0, 1e-3, 2.0, 10.0, 60.0, 150.0, 250.0, 400.0, 700.0, 1500.0, 5000.0, 1e5, math.inf, math.nan]
_P = [-1.0, 0.0, 1e-30, 1.0, 1e3, 1e5, 5e6, 3e7, 2e8, 1e9, 1e10, 1e13, math.inf]
_SUBSTANCES = ("water", "CO2", "nitrogen", "ethanol", "toluene", "helium-4")


# the text after a number the model computed at the call's own state
_AT_THIS_STATE = " at this temperature"


def _derived(key: str, points: np.ndarray) -> np.ndarray:
    """What a substance derives: its stored limits, and its lines at data values, limits and arguments."""
    sub = lookup(key)
    values = [float(v) for v in vars(sub).values() if type(v) in (int, float)]
    values += [float(x) for v in vars(sub).values() if isinstance(v, tuple) for x in v if type(x) in (int, float)]
    limits = [name for name in dir(type(sub)) if isinstance(getattr(type(sub), name), (property, cached_property))]
    for name in limits:
        try:
            value = getattr(sub, name)
        except TypeError:  # a property of a line the substance does not have
            continue
        if type(value) in (int, float):
            values.append(float(value))
    T = points[(points > 0.5) & (points < 1e5)]
    p = points[(points > 1e-40) & (points < 1e13)]
    with np.errstate(all="ignore"):
        for line in ("boil", "sublime", "melt"):
            for method, x in ((f"{line}_pressure", T), (f"{line}_temperature", p)):
                result = getattr(sub, method)(x)
                result = result[0] if isinstance(result, tuple) else result
                values += np.ravel(result.values).tolist()
    return np.array(values, dtype=float)


@pytest.mark.parametrize("key", _SUBSTANCES)
def test_every_number_in_a_message_a_call_gives_is_a_data_value(key):
    calls = [("BOIL_PRESSURE", (key, t)) for t in _T] + [("BOIL_TEMP", (key, p)) for p in _P]
    calls += [("MELT_PRESSURE", (key, t)) for t in _T] + [("MELT_TEMP", (key, p)) for p in _P]
    calls += [("SUBLIME_PRESSURE", (key, t)) for t in _T] + [("SUBLIME_TEMP", (key, p)) for p in _P]
    calls += [(name, (key, t, p, phase)) for name in ("MOLAR_VOLUME", "CHEM_POTENTIAL") for t in _T for p in _P
              for phase in ("", "liquid", "vapor", "solid")]
    calls += [("STABLE_PHASE", (key, t, p)) for t in _T for p in _P]
    cells = [(args, getattr(functions, name)(*args)) for name, args in calls]
    # after the calls: the limits a model works out when first asked are then among its attributes
    stated = np.concatenate([_data_values(), _module_limits()])
    values = np.concatenate([stated, _derived(key, np.concatenate([stated, _T, _P]))])
    wrong, seen = [], 0
    for args, cell in cells:
        if not isinstance(cell, CellError):
            continue
        given = [abs(float(a)) for a in args[1:] if isinstance(a, float)]
        for m in _QUANTITY.finditer(cell.reason):
            seen += 1
            printed, unit = m.groups()
            if any(float(f"{g / _SCALE[unit]:.6g}") == abs(float(printed)) for g in given if math.isfinite(g)):
                continue  # the call's own argument, restated
            if cell.reason[m.end():].startswith(_AT_THIS_STATE):
                continue  # the model's answer at the call's state (a spinodal), not a limit
            if not _stated(printed, unit, values):
                wrong.append((args, cell.reason, m.group(0)))
    assert seen > 20 and not wrong
