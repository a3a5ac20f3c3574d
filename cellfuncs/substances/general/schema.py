"""The data-file format of a substance, written down once.

One file per substance, ``cellfuncs/data/substances/<key>.toml``, holds its constants and published
lines as the publications print them (converted to SI where the publication uses other units)::

    name = "acetone"                     # lower case; the name SUBSTANCES() lists
    formula = "(CH3)2CO"
    designation = ""                     # a refrigerant number ("R-134a"), or empty
    aliases = ["propanone", "dimethyl ketone"]   # lower case, other than the name, formula, designation
    associating = false                  # a hydrogen-bonding fluid
    note = ""                            # what the file lacks and why (no acentric factor, no solid density)

    [constants.triple_point_pressure]    # one table per constant; the keys are those of UNITS below
    name = "triple-point pressure"
    value = 2.326
    unit = "Pa"                          # the key's SI unit, spelt exactly as UNITS names it
    uncertainty = 0.2                    # optional: positive, in the value's unit
    reference = "Lemmon and Span (2006), J. Chem. Eng. Data 51, 785, table of fluid constants"
    memory = true                        # recalled from memory of the table, not read from a copy
    note = ""                            # optional

    [constants.liquid_density]           # a constant measured at a state (AT_TEMPERATURE) gives it
    ...
    state = "liquid"                     # the phase, in words
    temperature = 298.15                 # K

    [lines.boil]                         # boil, melt or sublime, in a form LINE_FORMS allows for it
    form = "ancillary"                   # ln(p/pc) = (Tc/T) sum n_i (1 - T/Tc)^t_i (lines.py)
    Tc = 508.1                           # the form's numbers, LINE_NUMBERS: K and Pa
    pc = 4.70e6
    n = [-7.45514, 1.20200, -2.43926, -3.35590]   # the form's lists, LINE_LISTS: coefficient with exponent
    t = [1.0, 1.5, 3.0, 6.0]
    T_min = 241.0                        # the range the publication states, K
    T_max = 508.1
    reference = "..."
    memory = true
    note = ""                            # optional

    [ideal_gas_cp]                       # cp0(T) in a form of substances/ideal_gas.py, laid out like a line;
                                         # every file gives one (a user definition may leave it out)
    form = "polynomial"
    a = [5.126, 1.511e-3, 5.731e-5, -7.177e-8, 2.728e-11]
    T_min = 200.0
    T_max = 1000.0
    reference = "..."
    memory = true

An Antoine line names its units (``p_unit``, ``t_unit``, from lines.py's lists) and keeps its constants as
printed. :func:`read` checks a parsed file against this format and refuses anything else with a message
naming the file and the key; the bounds of each number, and how the fields agree with each other, are
checked when the definition is built from it (definition.py, bounds.py). Every file gives the constants of
REQUIRED_CONSTANTS; a constant's SI unit is its field's in bounds.py:

>>> UNITS["enthalpy_of_fusion"], UNITS["acentric_factor"], REQUIRED_CONSTANTS[-1]
('J/mol', '', 'liquid_density')

The reader keeps each constant whole (``cellfuncs.data.Constant``: name, value, unit, uncertainty, reference,
memory flag); its source text, which SUBSTANCE_INFO shows beside the value, states the uncertainty where the
file gives one.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Mapping, NoReturn

from ... import units
from ...data import Constant
from ..helmholtz.schema import SchemaError
from .bounds import FIELDS

# the texts at the top of a file (every file states each of them), with their types
TEXTS = ("name", "formula", "designation", "aliases", "note", "associating")
IDEAL_GAS = "ideal_gas_cp"  # the ideal-gas heat capacity, laid out like a line, its forms in ..ideal_gas
SECTIONS = ("constants", "lines", IDEAL_GAS)  # lines may be left out; every file has the other two
# constant key -> its SI unit, the one spelling a file writes it in (from the bounds, not retyped)
UNITS: dict[str, str] = {key: bound.si for key, bound in FIELDS.items() if "." not in key}
# the constants measured at a state, which give its temperature (a definition's "<key>.temperature")
AT_TEMPERATURE = tuple(key for key in UNITS if f"{key}.temperature" in FIELDS)
# every definition needs the molar mass and the critical point; a file gives its liquid density too
# (the liquid volume is anchored to it)
CRITICAL = ("molar_mass", "critical_temperature", "critical_pressure")
REQUIRED_CONSTANTS = CRITICAL + ("liquid_density",)
CONSTANT_KEYS = ("name", "value", "unit", "uncertainty", "reference", "memory", "note", "state", "temperature")
CONSTANT_REQUIRED = ("name", "value", "unit", "reference", "memory")

LINES = ("boil", "melt", "sublime")
# each line's forms (lines.py), each form's numbers, and its lists paired as coefficient and exponent;
# every line has its range T_min, T_max (K); numbers in K and Pa
LINE_FORMS = {"boil": ("ancillary", "antoine"), "melt": ("simon_glatzel", "ancillary_melting"),
              "sublime": ("ancillary_sublimation",)}
LINE_NUMBERS = {"ancillary": ("Tc", "pc"), "antoine": ("A", "B", "C"), "simon_glatzel": ("T0", "p0", "a", "c"),
                "ancillary_melting": ("Tt", "pt"), "ancillary_sublimation": ("Tt", "pt")}
LINE_LISTS = {"ancillary": (("n", "t"),), "antoine": (), "simon_glatzel": (),
              "ancillary_melting": (("a", "t"), ("b", "s")), "ancillary_sublimation": (("a", "t"),)}
OPTIONAL_LISTS = ("b", "s")
LINE_TEXTS = ("form", "reference", "p_unit", "t_unit")
# what a line's or the ideal-gas table's file gives beside its numbers: not fields of a definition
TABLE_REQUIRED = ("form", "reference", "memory")
TABLE_FILE_ONLY = ("memory", "note")


@dataclass(frozen=True)
class SubstanceFile:
    """A substance file as the format reads it: constants in SI with their sources, lines and texts."""

    texts: dict[str, Any]
    constants: dict[str, Constant]
    temperatures: dict[str, float]  # constant key -> the temperature it was measured at, K
    lines: dict[str, dict[str, Any]]  # without the file-only keys (memory, note)
    ideal_gas: dict[str, Any]
    sources: dict[str, str]  # constant or line key -> its reference, memory flag and stated uncertainty


def _refuse(file: str, message: str) -> NoReturn:
    raise SchemaError(f"{file}: {message}")


def _known(file: str, where: str, given: Mapping[str, Any], allowed: tuple[str, ...], required: tuple[str, ...]) -> None:
    """Refuse keys the format does not know and required keys that are missing, naming both lists."""
    unknown = [k for k in given if k not in allowed]
    if unknown:
        _refuse(file, f"unknown key '{unknown[0]}' in {where}; allowed: {', '.join(allowed)}")
    missing = [k for k in required if k not in given]
    if missing:
        _refuse(file, f"{where} lacks '{missing[0]}'")


def _number(file: str, where: str, value: Any) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        _refuse(file, f"{where} must be a finite number; got {value!r}")
    return float(value)


def _flag(file: str, where: str, value: Any) -> bool:
    if not isinstance(value, bool):
        _refuse(file, f"{where} must be true or false; got {value!r}")
    return value


def _check_unit(file: str, key: str, written: Any) -> None:
    """A file writes a constant's unit as UNITS spells it: one spelling per unit, so nothing is converted."""
    si = UNITS[key]
    if written == si:
        return
    try:  # units.py tells another spelling of the SI unit ("kg/mole", "1") from another unit
        same = isinstance(written, str) and units.conversion_to(written, si) == units.Conversion(1.0)
    except units.UnitError:
        same = False
    shown = f"{written!r}, {si!r} spelt otherwise" if same else repr(written)
    _refuse(file, f"constant '{key}' has unit {shown}; data files write {si!r}")


def _constant(file: str, key: str, entry: Any) -> tuple[Constant, float | None]:
    """A constant in SI and the temperature of the state it was measured at (None if it has none)."""
    where = f"constant '{key}'"
    if key not in UNITS:
        _refuse(file, f"unknown constant '{key}'; known: {', '.join(UNITS)}")
    if not isinstance(entry, Mapping):
        _refuse(file, f"{where} must be a table")
    _known(file, where, entry, CONSTANT_KEYS, CONSTANT_REQUIRED)
    for text in ("name", "reference", "state", "note"):
        if text in entry and not (isinstance(entry[text], str) and (entry[text].strip() or text == "note")):
            _refuse(file, f"{where}: '{text}' must be a text that is not blank")
    _flag(file, f"{where}: 'memory'", entry["memory"])
    _number(file, f"{where}: 'value'", entry["value"])
    _check_unit(file, key, entry["unit"])
    if "uncertainty" in entry and not _number(file, f"{where}: 'uncertainty'", entry["uncertainty"]) > 0:
        _refuse(file, f"{where}: 'uncertainty' must be positive, in the value's unit")
    if key not in AT_TEMPERATURE:
        if "state" in entry or "temperature" in entry:
            _refuse(file, f"{where} has no state; only {', '.join(AT_TEMPERATURE)} give 'state' and 'temperature'")
        return Constant.from_entry(key, entry), None
    _known(file, where, entry, CONSTANT_KEYS, ("state", "temperature"))
    return Constant.from_entry(key, entry), _number(file, f"{where}: 'temperature'", entry["temperature"])


def _table(file: str, where: str, table: Any, forms: tuple[str, ...]) -> dict[str, Any]:
    """A line's or the ideal-gas table's fields, without the file-only keys; the form's own keys are
    checked where the definition is built (definition.py for lines, ideal_gas.py)."""
    if not isinstance(table, Mapping):
        _refuse(file, f"{where} must be a table")
    missing = [k for k in TABLE_REQUIRED if k not in table]
    if missing:
        _refuse(file, f"{where} lacks '{missing[0]}'")
    if table["form"] not in forms:
        _refuse(file, f"{where}: form {table['form']!r} is not one of {', '.join(forms)}")
    _flag(file, f"{where}: 'memory'", table["memory"])
    return {k: v for k, v in table.items() if k not in TABLE_FILE_ONLY}


def _source(reference: str, memory: bool, recalled: str) -> str:
    return reference + (f" (recalled from memory{recalled})" if memory else "")


def read(file: str, raw: Mapping[str, Any]) -> SubstanceFile:
    """The substance in data file ``file`` (already parsed TOML), checked against the format."""
    from ..ideal_gas import FORMS as IDEAL_GAS_FORMS
    from ..result import fmt

    _known(file, "the file", raw, TEXTS + SECTIONS, TEXTS + ("constants", IDEAL_GAS))
    for key in TEXTS:
        value = raw[key]
        if key == "aliases":
            right = isinstance(value, list) and all(isinstance(a, str) for a in value)
        else:
            right = isinstance(value, bool) if key == "associating" else isinstance(value, str)
        if not right:
            _refuse(file, f"'{key}' must be " + {"aliases": "a list of texts", "associating": "true or false"}.get(
                key, "a text") + f"; got {value!r}")
    constants: dict[str, Constant] = {}
    temperatures: dict[str, float] = {}
    sources: dict[str, str] = {}
    for key, entry in raw["constants"].items():
        c, temperature = _constant(file, key, entry)
        constants[key] = c
        if temperature is not None:
            temperatures[key] = temperature
        sources[key] = _source(c.reference, c.memory, " of the table") + (
            "" if c.uncertainty is None else f"; uncertainty {fmt(c.uncertainty)} {c.unit}".rstrip())
    missing = [k for k in REQUIRED_CONSTANTS if k not in constants]
    if missing:
        _refuse(file, f"the constants lack '{missing[0]}'")
    lines: dict[str, dict[str, Any]] = {}
    for kind, table in raw.get("lines", {}).items():
        if kind not in LINES:
            _refuse(file, f"unknown line '{kind}'; known: {', '.join(LINES)}")
        lines[kind] = _table(file, f"line '{kind}'", table, LINE_FORMS[kind])
        sources[kind] = _source(table["reference"], table["memory"], "")
    ideal_gas = _table(file, f"'{IDEAL_GAS}'", raw[IDEAL_GAS], tuple(IDEAL_GAS_FORMS))
    sources[IDEAL_GAS] = _source(raw[IDEAL_GAS]["reference"], raw[IDEAL_GAS]["memory"], "")
    return SubstanceFile({k: raw[k] for k in TEXTS}, constants, temperatures, lines, ideal_gas, sources)
