"""A substance definition: flat fields in SI, each with its source.

Built-in substances come from data files (cellfuncs/data/substances/*.toml, in the
format of schema.py, which also keeps each constant's name, uncertainty and reference);
a user-defined substance comes from a mapping of field names to values (a sheet
range of field, value and optional unit). Both end up as the same flat fields,
so SUBSTANCE_INFO of a built-in substance can be pasted back as a definition.

>>> d = Definition.from_fields({"name": "demo oil X", "molar_mass": (0.1, "kg/mol"),
...                             "critical_temperature": (600, "K"), "critical_pressure": (3, "MPa"),
...                             "acentric_factor": 0.3})
>>> d.values["critical_pressure"]
3000000.0
"""

from __future__ import annotations

import math
import numbers
import reprlib
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from typing import Any, Mapping

from ... import units
from ...data import Constant
from ..helmholtz.schema import SchemaError
from ..result import BAD_ARGUMENT, ModelError, fmt
from . import bounds, schema
from .bounds import FIELDS
from .schema import IDEAL_GAS, LINE_LISTS, LINE_NUMBERS, LINE_TEXTS, LINES, OPTIONAL_LISTS

# field -> SI unit (the bounds, and the unit of a bare number, are in bounds.py); ".temperature"
# fields give the state of the value before them
NUMBERS: dict[str, str] = {key: bound.si for key, bound in FIELDS.items()}
TEXTS = schema.TEXTS + ("equation",)
REQUIRED = ("name",) + schema.CRITICAL
# line fields: "<line>.<key>", the ideal-gas heat capacity's "ideal_gas_cp.<key>": the forms' numbers
# and lists are in schema.py; numbers in K and Pa, lists of numbers written as [a, b, ...]


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
    # a data file's constants as it states them (name, SI value and unit, uncertainty, reference, memory
    # flag); a user definition has only its values
    constants: dict[str, Constant] = field(default_factory=dict)

    @classmethod
    def from_fields(cls, fields: Mapping[str, Any], sources: Mapping[str, str] | None = None) -> "Definition":
        """A definition from field -> value or (value, unit); raises ModelError naming a bad field.

        Every number is checked against its bounds (bounds.py) and the fields against each other.
        """
        d = cls(name="")
        for raw_key, raw in fields.items():
            if not isinstance(raw_key, str):
                raise ModelError(BAD_ARGUMENT, f"unknown field {_shown(raw_key)} in the substance definition")
            # field names are case-insensitive; a line's coefficient names (after the dot) are not
            head, dot, tail = raw_key.strip().partition(".")
            key = head.lower().replace(" ", "_") + dot + tail
            value, unit = _value_and_unit(key, raw)
            if key in TEXTS:
                _set_text(d, key, value)
            elif key.lower() in NUMBERS:
                key = key.lower()
                d.values[key] = _number(key, value, unit)
            elif key.split(".")[0] in LINES and "." in key:
                line, part = key.split(".", 1)
                d.lines.setdefault(line, {})[part] = _line_value(key, part, value)
            elif key.startswith(IDEAL_GAS + "."):
                part = key.split(".", 1)[1]
                d.ideal_gas[part] = _line_value(key, part, value)
            else:
                raise ModelError(BAD_ARGUMENT, f"unknown field {_shown(raw_key)} in the substance definition")
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


def _shown(value: Any, limit: int = 40) -> str:
    """A value as a message quotes it, cut short: a definition cell may hold a text of any length."""
    text = f"'{value}'" if isinstance(value, str) else reprlib.repr(value)  # any nesting
    return text if len(text) <= limit else text[:limit] + "..."


def _value_and_unit(key: str, raw: Any) -> tuple[Any, Any]:
    """A field's (value, unit): given as a pair, a one-item tuple (no unit) or a bare value."""
    if not isinstance(raw, tuple):
        return raw, None
    if len(raw) in (1, 2):
        return raw[0], raw[1] if len(raw) == 2 else None
    raise ModelError(BAD_ARGUMENT, f"field '{key}' must be a value or a (value, unit) pair; got {len(raw)} items")


def _text(key: str, value: Any) -> str:
    if value is not None and not isinstance(value, (str, numbers.Real)):
        raise ModelError(BAD_ARGUMENT, f"field '{key}' must be a text; got {_shown(value)}")
    text = "" if value is None else str(value).strip()
    limit = bounds.TEXTS[key.split(".")[-1]]
    if len(text) > limit:
        raise ModelError(BAD_ARGUMENT, f"field '{key}' is {len(text)} characters long; at most {limit} are taken")
    return text


def _set_text(d: Definition, key: str, value: Any) -> None:
    if key == "associating":
        d.associating = value is True or _text(key, value).upper() in ("TRUE", "1", "YES")
    elif key == "aliases":
        d.aliases = tuple(a.strip().lower() for a in _text(key, value).split(",") if a.strip())
    else:
        setattr(d, key, _text(key, value))


def _finite(key: str, value: Any) -> float:
    """The number a field holds (a number, or a text of one); raises ModelError naming the field."""
    wrong = ModelError(BAD_ARGUMENT, f"field '{key}' must be a number; got {_shown(value)}")
    if isinstance(value, str):
        try:
            number = float(value.strip())
        except ValueError:
            raise wrong from None
    elif isinstance(value, numbers.Real) and not isinstance(value, bool):  # numpy numbers too, not its bool_
        try:
            number = float(value)
        except OverflowError:  # an integer beyond a double's range
            number = math.inf
    else:
        raise wrong
    if not math.isfinite(number):
        raise ModelError(BAD_ARGUMENT, f"field '{key}' must be a finite number")
    return number


def _to_si(key: str, number: float, unit: str, si: str) -> float:
    if len(unit) > bounds.TEXTS["unit"]:
        raise ModelError(BAD_ARGUMENT, f"field '{key}': unknown unit {_shown(unit)}")
    try:
        return float(units.conversion_to(unit, si).to_si(number))
    except units.UnitError as exc:
        raise ModelError(BAD_ARGUMENT, f"field '{key}': {exc}") from None


def _number(key: str, value: Any, unit: Any) -> float:
    """A numeric field in SI, within its bounds; a number without a unit is read in the bound's bare unit."""
    bound = FIELDS[key]
    number = _finite(key, value)
    typed = "" if unit is None else str(unit).strip()
    bare = typed in ("", "-", "1")
    if bare:
        typed = bound.bare
    si = _to_si(key, number, typed, bound.si)
    low, high = (_to_si(key, limit, bound.bare, bound.si) for limit in (bound.low, bound.high))
    if not low <= si <= high:
        given = f"{fmt(number)} {typed}".strip()
        raise ModelError(BAD_ARGUMENT, f"field '{key}' = {given} is outside its bounds, {bound.shown()}"
                         + (f" (a number without a unit is read in {bound.bare})" if bare and bound.bare else ""))
    return si


def _line_value(key: str, part: str, value: Any) -> Any:
    """A line's or the ideal-gas table's value: its texts stay text, lists become lists of floats."""
    if part in LINE_TEXTS:
        return _text(key, value)
    if isinstance(value, (list, tuple)) or isinstance(value, str) and value.strip().startswith("["):
        return _number_list(key, value)
    return _finite(key, value)


def _number_list(key: str, value: Any) -> list[float]:
    """A line's list of coefficients: a list, or a text such as "[1.5, -2]" (read without evaluating it)."""
    wrong = ModelError(BAD_ARGUMENT, f"field '{key}' must be a list of numbers like [1.5, -2]")
    if isinstance(value, str):
        text = value.strip()
        if len(text) > bounds.LIST_TEXT:
            raise ModelError(BAD_ARGUMENT, f"field '{key}' is {len(text)} characters long; at most "
                                           f"{bounds.LIST_TEXT} are taken")
        if not text.endswith("]"):
            raise wrong
        inner = text[1:-1].strip()
        items: list[Any] = [item.strip() for item in inner.split(",")] if inner else []
    else:
        items = list(value)
    if len(items) > bounds.LINE_TERMS:
        raise ModelError(BAD_ARGUMENT, f"field '{key}' has {len(items)} terms; at most {bounds.LINE_TERMS} are taken")
    numbers = []
    for item in items:
        if isinstance(item, bool) or not isinstance(item, (int, float, str)):
            raise wrong
        try:
            number = float(item)
        except (ValueError, OverflowError):
            raise wrong from None
        if not math.isfinite(number):
            raise wrong
        numbers.append(number)
    return numbers


def _refuse(message: str) -> None:
    raise ModelError(BAD_ARGUMENT, message)


# how closely a definition that names an equation of state must give the equation's critical point
# and molar mass: the equation decides the fluid, so the definition's lines and limits must be its
EQUATION_AGREEMENT = 1e-3


def _check_against_equation(d: Definition) -> None:
    from ..helmholtz.equation import equation

    eq = equation(d.equation)
    p_crit = float(eq.pressure(eq.Tc, eq.rhoc)[0])
    for field, own in (("critical_temperature", eq.Tc), ("critical_pressure", p_crit), ("molar_mass", eq.M)):
        given = d.values.get(field)
        if given is not None and abs(given / own - 1.0) > EQUATION_AGREEMENT:
            _refuse(f"field '{field}': {given:.6g} disagrees with the equation of state '{d.equation}' "
                    f"({own:.6g} in SI units); remove the 'equation' row or give the equation's value")


def _validate(d: Definition) -> None:
    for key in REQUIRED:
        if key == "name" and not d.name:
            _refuse("the substance definition needs a 'name'")
        if key != "name" and key not in d.values:
            _refuse(f"the substance definition needs '{key}'")
    if d.equation:
        from ..helmholtz.equation import equation_keys

        if d.equation not in equation_keys():
            _refuse(f"field 'equation': no equation of state '{d.equation}'; known: {', '.join(sorted(equation_keys()))}")
    v = d.values
    if d.equation:
        _check_against_equation(d)
    if "acentric_factor" not in v and "normal_boiling_point" not in v:
        _refuse("the substance definition needs 'acentric_factor' or 'normal_boiling_point'")
    tc, pc = v["critical_temperature"], v["critical_pressure"]
    for key in ("triple_point_temperature", "normal_boiling_point", "normal_sublimation_point",
                "liquid_density.temperature", "solid_density.temperature", "liquid_heat_capacity.temperature",
                "saturated_vapor_density.temperature", "enthalpy_of_vaporization.temperature"):
        if key in v and v[key] >= tc:
            _refuse(f"field '{key}' ({fmt(v[key])} K) must be below the critical temperature ({fmt(tc)} K)")
    tt, pt = v.get("triple_point_temperature"), v.get("triple_point_pressure")
    if tt is not None and tt < bounds.MIN_TRIPLE_RATIO * tc:
        _refuse(f"field 'triple_point_temperature' ({fmt(tt)} K) is below {fmt(bounds.MIN_TRIPLE_RATIO)} times the "
                f"critical temperature ({fmt(tc)} K), lower than any real substance's")
    if pt is not None and tt is None:
        _refuse("field 'triple_point_pressure' needs 'triple_point_temperature'")
    if pt is not None and pt >= pc:
        _refuse("field 'triple_point_pressure' must be below the critical pressure")
    atm = units.conversion("atm", units.PRESSURE).to_si(1.0)  # the pressure of the normal points
    tb, ts = v.get("normal_boiling_point"), v.get("normal_sublimation_point")
    if tb is not None and ts is not None:
        _refuse("fields 'normal_boiling_point' and 'normal_sublimation_point' exclude each other: at 1 atm a "
                "substance boils or sublimes")
    if tb is not None and (pc <= atm or tt is not None and tb <= tt or pt is not None and pt >= atm):
        _refuse(f"field 'normal_boiling_point' ({fmt(tb)} K) needs the liquid at 1 atm: above the triple point, with "
                "the triple-point pressure below 1 atm and the critical pressure above it")
    if ts is not None and (tt is not None and ts >= tt or pt is not None and pt <= atm):
        _refuse(f"field 'normal_sublimation_point' ({fmt(ts)} K) must lie below the triple point, whose pressure "
                "must then be above 1 atm")
    for key in ("liquid_density", "saturated_vapor_density", "enthalpy_of_vaporization"):
        if key in v and f"{key}.temperature" not in v:
            _refuse(f"field '{key}' needs '{key}.temperature', the temperature it was measured at")
    for line, table in d.lines.items():
        _validate_line(line, table)
    if d.ideal_gas:
        from .. import ideal_gas

        ideal_gas.validate(d.ideal_gas)


def _validate_line(line: str, table: dict[str, Any]) -> None:
    """A line's form, and its coefficients as that form needs them; raises ModelError naming the field."""
    from ..lines import FORMS, PRESSURE_UNITS, TEMPERATURE_UNITS

    form = table.get("form")
    if form is None:
        _refuse(f"field '{line}.form' is missing for the {line} line")
    if form not in FORMS:
        _refuse(f"field '{line}.form': unknown form {_shown(form)}; known: {', '.join(FORMS)}")
    numbers = LINE_NUMBERS[form] + ("T_min", "T_max")
    lists = [key for pair in LINE_LISTS[form] for key in pair]
    for key in numbers + tuple(k for k in lists if k not in OPTIONAL_LISTS):
        if key not in table:
            _refuse(f"field '{line}.{key}' is missing for the {line} line ({form} form)")
    for key, value in table.items():
        if key in LINE_TEXTS:
            continue
        if key not in numbers and key not in lists:
            _refuse(f"unknown field {_shown(line + '.' + key)} for the {line} line ({form} form)")
        if (key in lists) != isinstance(value, list):
            _refuse(f"field '{line}.{key}' must be "
                    + ("a list of numbers like [1.5, -2]" if key in lists else "a number"))
        if key in numbers:
            low, high = bounds.LINE_NUMBERS[key]
            if not low <= value <= high:
                _refuse(f"field '{line}.{key}' = {fmt(value)} is outside its bounds, {fmt(low)} to {fmt(high)}")
    for first, second in LINE_LISTS[form]:
        if len(table.get(first, [])) != len(table.get(second, [])):
            _refuse(f"fields '{line}.{first}' and '{line}.{second}' must have as many numbers")
        low, high = bounds.LINE_EXPONENT
        if any(abs(x) > bounds.LINE_COEFFICIENT for x in table.get(first, [])):
            _refuse(f"field '{line}.{first}' holds a coefficient beyond +-{fmt(bounds.LINE_COEFFICIENT)}")
        if any(not low <= x <= high for x in table.get(second, [])):
            _refuse(f"field '{line}.{second}' holds an exponent outside {fmt(low)} to {fmt(high)}")
    if table["T_min"] >= table["T_max"]:
        _refuse(f"field '{line}.T_min' must be below '{line}.T_max'")
    for key, known in (("p_unit", PRESSURE_UNITS), ("t_unit", TEMPERATURE_UNITS)):
        if key in table and table[key] not in known:
            _refuse(f"field '{line}.{key}': unknown unit {_shown(table[key])}; known: {', '.join(known)}")


@lru_cache(maxsize=None)
def load_builtin(key: str) -> Definition:
    """The definition in cellfuncs/data/substances/<key>.toml, read through the format of schema.py."""
    file = f"{key}.toml"
    text = resources.files("cellfuncs.data").joinpath("substances", file).read_text(encoding="utf-8")
    data = schema.read(file, tomllib.loads(text))
    fields: dict[str, Any] = dict(data.texts, aliases=", ".join(data.texts["aliases"]))
    from ..helmholtz.equation import equation_keys

    if key in equation_keys():  # the substance's fluid comes from its equation of state
        fields["equation"] = key
    for name, c in data.constants.items():
        fields[name] = (c.value, c.unit)
        if name in data.temperatures:
            fields[f"{name}.temperature"] = (data.temperatures[name], "K")
    for prefix, table in [*data.lines.items(), (IDEAL_GAS, data.ideal_gas)]:
        fields.update({f"{prefix}.{part}": value for part, value in table.items()})
    try:
        d = Definition.from_fields(fields, data.sources)
    except ModelError as exc:  # a data file's slip, named with its file
        raise SchemaError(f"{file}: {exc.problem.reason}") from None
    d.constants = data.constants
    return d
