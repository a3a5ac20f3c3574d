"""A substance definition: flat fields in SI, each with its source.

Built-in substances come from data files (cellfuncs/data/substances/*.toml); a
user-defined substance comes from a mapping of field names to values (a sheet
range of field, value and optional unit). Both end up as the same flat fields,
so SUBSTANCE_INFO of a built-in substance can be pasted back as a definition.

>>> d = Definition.from_fields({"name": "demo oil X", "molar_mass": (0.1, "kg/mol"),
...                             "critical_temperature": (600, "K"), "critical_pressure": (3, "MPa"),
...                             "acentric_factor": 0.3})
>>> d.values["critical_pressure"]
3000000.0
"""

from __future__ import annotations

import ast
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from typing import Any, Mapping

from ... import units
from ..result import BAD_ARGUMENT, ModelError

# field -> SI unit; ".temperature" fields give the state of the value before them
NUMBERS: dict[str, str] = {
    "molar_mass": "kg/mol",
    "critical_temperature": "K",
    "critical_pressure": "Pa",
    "critical_density": "kg/m3",
    "acentric_factor": "",
    "triple_point_temperature": "K",
    "triple_point_pressure": "Pa",
    "normal_boiling_point": "K",
    "normal_sublimation_point": "K",
    "enthalpy_of_fusion": "J/mol",
    "liquid_density": "kg/m3",
    "liquid_density.temperature": "K",
    "solid_density": "kg/m3",
    "solid_density.temperature": "K",
    "liquid_heat_capacity": "J/(mol*K)",
    "liquid_heat_capacity.temperature": "K",
}
TEXTS = ("name", "formula", "designation", "aliases", "note", "associating", "equation")
REQUIRED = ("name", "molar_mass", "critical_temperature", "critical_pressure")
LINES = ("boil", "melt", "sublime")
# line fields: "<line>.<key>"; numbers in K and Pa, lists of numbers written as [a, b, ...]
LINE_TEXTS = ("form", "reference", "p_unit", "t_unit")
# each form's numbers, and its lists paired as coefficient and exponent (see lines.py); every line has
# its range T_min, T_max
LINE_NUMBERS = {"ancillary": ("Tc", "pc"), "antoine": ("A", "B", "C"), "simon_glatzel": ("T0", "p0", "a", "c"),
                "ancillary_melting": ("Tt", "pt"), "ancillary_sublimation": ("Tt", "pt")}
LINE_LISTS = {"ancillary": (("n", "t"),), "antoine": (), "simon_glatzel": (),
              "ancillary_melting": (("a", "t"), ("b", "s")), "ancillary_sublimation": (("a", "t"),)}
OPTIONAL_LISTS = ("b", "s")
# the ideal-gas heat capacity: rows "ideal_gas_cp.<key>" like a line's, its forms in ..ideal_gas
IDEAL_GAS = "ideal_gas_cp"


@dataclass
class Definition:
    name: str
    formula: str = ""
    designation: str = ""
    aliases: tuple[str, ...] = ()
    associating: bool = False
    note: str = ""
    equation: str = ""  # key of a shipped equation of state (data/equations/<key>.toml) for the fluid
    values: dict[str, float] = field(default_factory=dict)
    lines: dict[str, dict[str, Any]] = field(default_factory=dict)
    ideal_gas: dict[str, Any] = field(default_factory=dict)
    sources: dict[str, str] = field(default_factory=dict)

    @classmethod
    def from_fields(cls, fields: Mapping[str, Any], sources: Mapping[str, str] | None = None) -> "Definition":
        """A definition from field -> value or (value, unit); raises ModelError naming a bad field."""
        d = cls(name="")
        for raw_key, raw in fields.items():
            # field names are case-insensitive; a line's coefficient names (after the dot) are not
            head, dot, tail = str(raw_key).strip().partition(".")
            key = head.lower().replace(" ", "_") + dot + tail
            value, unit = raw if isinstance(raw, tuple) else (raw, None)
            if key in TEXTS:
                _set_text(d, key, value)
            elif key.lower() in NUMBERS:
                key = key.lower()
                d.values[key] = _number(key, value, unit, NUMBERS[key])
            elif key.split(".")[0] in LINES and "." in key:
                line, part = key.split(".", 1)
                d.lines.setdefault(line, {})[part] = _line_value(key, part, value)
            elif key.startswith(IDEAL_GAS + "."):
                part = key.split(".", 1)[1]
                d.ideal_gas[part] = _line_value(key, part, value)
            else:
                raise ModelError(BAD_ARGUMENT, f"unknown field '{raw_key}' in the substance definition")
        d.sources = dict(sources or {})
        _validate(d)
        return d

    def fields(self) -> list[tuple[str, Any, str]]:
        """(field, value, unit) rows, in the order a person reads them; pasted back they give this definition."""
        rows: list[tuple[str, Any, str]] = [("name", self.name, ""), ("formula", self.formula, ""),
                                            ("designation", self.designation, ""),
                                            ("aliases", ", ".join(self.aliases), ""),
                                            ("associating", "TRUE" if self.associating else "FALSE", "")]
        if self.note:
            rows.append(("note", self.note, ""))
        if self.equation:
            rows.append(("equation", self.equation, ""))
        rows += [(k, self.values[k], NUMBERS[k]) for k in NUMBERS if k in self.values]
        tables = [(line, self.lines.get(line, {})) for line in LINES] + [(IDEAL_GAS, self.ideal_gas)]
        for prefix, table in tables:
            for part, value in table.items():
                shown = "[" + ", ".join(repr(float(v)) for v in value) + "]" if isinstance(value, list) else value
                rows.append((f"{prefix}.{part}", shown, ""))
        return rows


def _set_text(d: Definition, key: str, value: Any) -> None:
    if key == "associating":
        d.associating = value is True or str(value).strip().upper() in ("TRUE", "1", "YES")
    elif key == "aliases":
        d.aliases = tuple(a.strip().lower() for a in str(value or "").split(",") if a.strip())
    else:
        setattr(d, key, "" if value is None else str(value).strip())


def _number(key: str, value: Any, unit: Any, si: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        try:
            value = float(str(value).strip())
        except ValueError:
            raise ModelError(BAD_ARGUMENT, f"field '{key}' must be a number; got {value!r}") from None
    if value != value or value in (float("inf"), float("-inf")):
        raise ModelError(BAD_ARGUMENT, f"field '{key}' must be a finite number")
    if unit is None or str(unit).strip() in ("", "-", "1", si):
        return float(value)
    try:
        return float(units.conversion_to(str(unit), si).to_si(float(value)))
    except units.UnitError as exc:
        raise ModelError(BAD_ARGUMENT, f"field '{key}': {exc}") from None


def _line_value(key: str, part: str, value: Any) -> Any:
    """A line's or the ideal-gas table's value: its texts stay text, lists become lists of floats."""
    if part in LINE_TEXTS:
        return str(value).strip()
    if isinstance(value, (list, tuple)) or isinstance(value, str) and value.strip().startswith("["):
        try:
            items = ast.literal_eval(value.strip()) if isinstance(value, str) else value
            return [float(v) for v in items]
        except (ValueError, SyntaxError, TypeError):
            raise ModelError(BAD_ARGUMENT, f"field '{key}' must be a list of numbers like [1.5, -2]") from None
    return _number(key, value, None, "")


def _validate(d: Definition) -> None:
    for key in REQUIRED:
        if key == "name" and not d.name:
            raise ModelError(BAD_ARGUMENT, "the substance definition needs a 'name'")
        if key != "name" and key not in d.values:
            raise ModelError(BAD_ARGUMENT, f"the substance definition needs '{key}'")
    if d.equation:
        from ..helmholtz.equation import equation_keys

        if d.equation not in equation_keys():
            raise ModelError(BAD_ARGUMENT, f"field 'equation': no equation of state '{d.equation}'; known: "
                                           f"{', '.join(sorted(equation_keys()))}")
    v = d.values
    if "acentric_factor" not in v and "normal_boiling_point" not in v:
        raise ModelError(BAD_ARGUMENT, "the substance definition needs 'acentric_factor' or 'normal_boiling_point'")
    for key, number in v.items():
        if key != "acentric_factor" and number <= 0:
            raise ModelError(BAD_ARGUMENT, f"field '{key}' must be positive; got {number:g}")
    tc = v["critical_temperature"]
    for key in ("triple_point_temperature", "normal_boiling_point", "normal_sublimation_point"):
        if key in v and v[key] >= tc:
            raise ModelError(BAD_ARGUMENT, f"field '{key}' ({v[key]:g} K) must be below the critical temperature "
                                           f"({tc:g} K)")
    if "triple_point_pressure" in v and v["triple_point_pressure"] >= v["critical_pressure"]:
        raise ModelError(BAD_ARGUMENT, "field 'triple_point_pressure' must be below the critical pressure")
    for line, table in d.lines.items():
        _validate_line(line, table)
    if d.ideal_gas:
        from .. import ideal_gas

        ideal_gas.validate(d.ideal_gas)


def _validate_line(line: str, table: dict[str, Any]) -> None:
    """A line's form, and its coefficients as that form needs them; raises ModelError naming the field."""
    from ..lines import _PRESSURE_UNITS, _TEMPERATURE_OFFSETS, FORMS

    form = table.get("form")
    if form is None:
        raise ModelError(BAD_ARGUMENT, f"field '{line}.form' is missing for the {line} line")
    if form not in FORMS:
        raise ModelError(BAD_ARGUMENT, f"field '{line}.form': unknown form '{form}'; known: {', '.join(FORMS)}")
    numbers = LINE_NUMBERS[form] + ("T_min", "T_max")
    lists = [key for pair in LINE_LISTS[form] for key in pair]
    for key in numbers + tuple(k for k in lists if k not in OPTIONAL_LISTS):
        if key not in table:
            raise ModelError(BAD_ARGUMENT, f"field '{line}.{key}' is missing for the {line} line ({form} form)")
    for key, value in table.items():
        if key in LINE_TEXTS:
            continue
        if key not in numbers and key not in lists:
            raise ModelError(BAD_ARGUMENT, f"unknown field '{line}.{key}' for the {line} line ({form} form)")
        if (key in lists) != isinstance(value, list):
            raise ModelError(BAD_ARGUMENT, f"field '{line}.{key}' must be "
                             + ("a list of numbers like [1.5, -2]" if key in lists else "a number"))
    for first, second in LINE_LISTS[form]:
        if len(table.get(first, [])) != len(table.get(second, [])):
            raise ModelError(BAD_ARGUMENT, f"fields '{line}.{first}' and '{line}.{second}' must have as many numbers")
    if table["T_min"] >= table["T_max"]:
        raise ModelError(BAD_ARGUMENT, f"field '{line}.T_min' must be below '{line}.T_max'")
    for key, known in (("p_unit", _PRESSURE_UNITS), ("t_unit", _TEMPERATURE_OFFSETS)):
        if key in table and table[key] not in known:
            raise ModelError(BAD_ARGUMENT, f"field '{line}.{key}': unknown unit '{table[key]}'; "
                                           f"known: {', '.join(known)}")


@lru_cache(maxsize=None)
def builtin_keys() -> tuple[str, ...]:
    folder = resources.files("cellfuncs.data").joinpath("substances")
    return tuple(sorted(p.name[:-5] for p in folder.iterdir() if p.name.endswith(".toml")))


@lru_cache(maxsize=None)
def load_builtin(key: str) -> Definition:
    """The definition in cellfuncs/data/substances/<key>.toml."""
    text = resources.files("cellfuncs.data").joinpath("substances", f"{key}.toml").read_text(encoding="utf-8")
    data = tomllib.loads(text)
    fields: dict[str, Any] = {k: data[k] for k in TEXTS if k in data}
    from ..helmholtz.equation import equation_keys

    if key in equation_keys():  # the substance's fluid comes from its equation of state
        fields["equation"] = key
    if "aliases" in fields:
        fields["aliases"] = ", ".join(fields["aliases"])
    sources: dict[str, str] = {}
    for key_, entry in data.get("constants", {}).items():
        # data files write each unit exactly as NUMBERS names it, so a misspelt unit is an error, not a conversion
        if key_ in NUMBERS and entry.get("unit") != NUMBERS[key_]:
            raise ModelError(BAD_ARGUMENT, f"{key}.toml: constant '{key_}' has unit {entry.get('unit')!r}; "
                                           f"data files write {NUMBERS[key_]!r}")
        fields[key_] = (entry["value"], entry.get("unit"))
        sources[key_] = entry.get("reference", "") + (" (recalled from memory of the table)" if entry.get("memory") else "")
        for state in ("temperature",):
            if state in entry:
                fields[f"{key_}.{state}"] = (entry[state], "K")
    for line, table in data.get("lines", {}).items():
        for part, value in table.items():
            if part in ("memory", "note"):
                continue
            fields[f"{line}.{part}"] = value
        sources[line] = table.get("reference", "") + (" (recalled from memory)" if table.get("memory") else "")
    table = data.get(IDEAL_GAS, {})
    for part, value in table.items():
        if part not in ("memory", "note"):
            fields[f"{IDEAL_GAS}.{part}"] = value
    if table:
        sources[IDEAL_GAS] = table.get("reference", "") + (" (recalled from memory)" if table.get("memory") else "")
    return Definition.from_fields(fields, sources)
