"""Unit texts to SI conversions: parsed once by pint, then a multiply and an add.

The accepted units are data (``cellfuncs/data/units.txt``, pint's format); pint is
imported on the first unit text that is not plain SI, so formulas in SI start fast.

>>> round(conversion("degF", TEMPERATURE).to_si(212.0), 10)
373.15
>>> conversion("barg", PRESSURE).to_si(0.0)
101325.0
>>> conversion("degF", TEMPERATURE_DIFFERENCE).scale
0.5555555555555556
>>> conversion("m3/kg", MOLAR_VOLUME).alternate
True

Unit texts are read as engineers type them: without regard to case where that is unambiguous
("BARG", "kpa"), with the trade spellings of ``unit_spellings.txt`` ("bar(g)", "kg/cm2g"), and a
gauge unit may state the atmosphere it refers to, as a pressure or as an altitude in the standard
atmosphere ("barg@83kPa", "psig@1600m"):

>>> conversion("BAR(G)", PRESSURE).to_si(1.0)
201325.0
>>> round(conversion("barg@1500m", PRESSURE).offset)
84560
"""

from __future__ import annotations

import re
import math
from functools import lru_cache
from importlib import resources
from typing import NamedTuple


class Kind(NamedTuple):
    """A quantity kind: its SI unit and the dimensions that may express it.

    ``alternate`` names the other basis a kind may be given in (m3/kg for m3/mol,
    mol/m3 for kg/m3, J/kg for J/mol); the value on that basis is the SI value
    divided by the substance's molar mass.
    """

    name: str
    si: str
    dims: str
    alternate: str = ""


# dimensions as pint writes them, in a fixed order: see _dimension_text
TEMPERATURE = Kind("temperature", "K", "[temperature]")
TEMPERATURE_DIFFERENCE = Kind("temperature difference", "K", "[temperature]")
PRESSURE = Kind("pressure", "Pa", "[mass]/[length]/[time]^2")
MOLAR_VOLUME = Kind("molar volume", "m3/mol", "[length]^3/[substance]", "[length]^3/[mass]")
DENSITY = Kind("density", "kg/m3", "[mass]/[length]^3", "[substance]/[length]^3")
MOLAR_ENERGY = Kind("molar energy", "J/mol", "[mass]*[length]^2/[time]^2/[substance]", "[length]^2/[time]^2")
EXPANSIVITY = Kind("expansivity", "1/K", "1/[temperature]")
COMPRESSIBILITY = Kind("compressibility", "1/Pa", "[length]*[time]^2/[mass]")


_OFFSET_KINDS = (TEMPERATURE, PRESSURE)
_LENGTH = Kind("length", "m", "[length]")
KINDS = (TEMPERATURE, TEMPERATURE_DIFFERENCE, PRESSURE, MOLAR_VOLUME, DENSITY, MOLAR_ENERGY, EXPANSIVITY,
         COMPRESSIBILITY)


class UnitError(ValueError):
    """A unit text that is unknown or of the wrong kind."""


class Conversion(NamedTuple):
    """``si = value * scale + offset``; ``alternate`` marks a unit on the kind's other basis."""

    scale: float
    offset: float = 0.0
    alternate: bool = False

    def to_si(self, value):
        if self.offset:
            return value * self.scale + self.offset
        return value * self.scale if self.scale != 1.0 else value

    def from_si(self, value):
        if self.offset:
            return (value - self.offset) / self.scale
        return value / self.scale if self.scale != 1.0 else value


_POWER = re.compile(r"(?<=[A-Za-zµ])([23])(?![\d.])")
_SUPERSCRIPTS = str.maketrans({"²": "2", "³": "3", "°": "deg"})


def _preprocess(text: str) -> str:
    # "m3" and "cm²" as engineers write them; "°C" as degC
    return _POWER.sub(r"**\1", text.translate(_SUPERSCRIPTS))


def _data_text(name: str) -> str:
    return resources.files("cellfuncs").joinpath("data", name).read_text(encoding="utf-8")


def _definitions() -> list[list[str]]:
    """The definition lines of units.txt, each split at its ' = ' signs."""
    rows = []
    for line in _data_text("units.txt").splitlines():
        line = line.split("#", 1)[0].strip()
        if line:
            rows.append([part.strip() for part in line.split(" = ")])
    return rows


@lru_cache(maxsize=1)
def _spellings() -> tuple[frozenset[str], dict[str, dict[tuple[str, str], str]]]:
    """Every spelling units.txt defines, prefixed or not: the exact set, and by lower case the
    distinct (prefix, unit) pairs it could mean with one spelling of each."""
    prefixes: list[tuple[str, list[str]]] = [("", [""])]
    unit_names: list[tuple[str, list[str]]] = []
    for parts in _definitions():
        if parts[0].endswith("-"):
            prefixes.append((parts[0], [parts[0].rstrip("-")] + [p.rstrip("-") for p in parts[2:]]))
        else:
            unit_names.append((parts[0], [parts[0]] + parts[2:]))
    exact: set[str] = set()
    folded: dict[str, dict[tuple[str, str], str]] = {}
    for prefix, p_spellings in prefixes:
        for unit, u_spellings in unit_names:
            for ps in p_spellings:
                for us in u_spellings:
                    word = ps + us
                    exact.add(word)
                    # the shortest spelling names the pair in messages ("MPa", not "megapascal")
                    best = folded.setdefault(word.lower(), {})
                    if (prefix, unit) not in best or len(word) < len(best[(prefix, unit)]):
                        best[(prefix, unit)] = word
    # messages name each meaning: "MPa (mega-pascal)"
    for meanings in folded.values():
        for (prefix, unit), word in meanings.items():
            meanings[(prefix, unit)] = f"{word} ({prefix}{unit})"
    return frozenset(exact), folded


_WORD = re.compile(r"[A-Za-zµ_]+")


def _fold_case(text: str) -> str:
    """``text`` with each unknown word replaced by the one unit it spells without regard to case."""
    exact, folded = _spellings()

    def fix(match: re.Match) -> str:
        word = match.group(0)
        if word in exact:
            return word
        meanings = folded.get(word.lower())
        if not meanings:
            return word
        if len(meanings) > 1:
            names = " or ".join(sorted(meanings.values()))
            raise UnitError(f"'{word}' could be {names}; write the unit with its exact case")
        return next(iter(meanings.values())).split(" ")[0]

    return _WORD.sub(fix, text)


def _squeeze(text: str) -> str:
    return text.translate(_SUPERSCRIPTS).replace(" ", "").lower()


@lru_cache(maxsize=1)
def _plant_spellings() -> tuple[tuple[str, str], ...]:
    """unit_spellings.txt: (whole unit text of plant documents, the unit it means)."""
    rows = []
    for line in _data_text("unit_spellings.txt").splitlines():
        line = line.split("#", 1)[0].strip()
        if line:
            written, meant = (part.strip() for part in line.split("="))
            rows.append((written, meant))
    return tuple(rows)


@lru_cache(maxsize=1)
def _whole_spellings() -> dict[str, str]:
    return {_squeeze(written): meant for written, meant in _plant_spellings()}


_ABS_OR_GAUGE = re.compile(r"\s*\(\s*([agAG])\s*\)\s*$")


def _trade_spelling(text: str) -> str:
    """"bar(g)" -> "barg", "kg/cm2g" -> "atg": the spellings of plant documents as units.txt names them."""
    text = _ABS_OR_GAUGE.sub(lambda m: m.group(1).lower(), text)
    return _whole_spellings().get(_squeeze(text), text)


@lru_cache(maxsize=1)
def _registry():
    import pint

    path = resources.files("cellfuncs").joinpath("data", "units.txt")
    with resources.as_file(path) as file:
        return pint.UnitRegistry(str(file), preprocessors=[_preprocess], cache_folder=None)


def _dimension_text(registry, units) -> str:
    dims = registry.get_dimensionality(units)
    up = [f"{d}^{int(e)}" if e != 1 else d for d, e in sorted(dims.items()) if e > 0]
    down = [f"{d}^{int(-e)}" if e != -1 else d for d, e in sorted(dims.items()) if e < 0]
    text = "*".join(up) or "1"
    return text + "".join("/" + d for d in down)


def _canonical(dims: str) -> str:
    # the Kind constants are written for people; compare them in pint's order
    up, *down = dims.split("/")
    key = lambda d: d.split("^")[0]
    ups = sorted((u for u in up.split("*") if u != "1"), key=key)
    return ("*".join(ups) or "1") + "".join("/" + d for d in sorted(down, key=key))


@lru_cache(maxsize=1024)
def conversion(text: str | None, kind: Kind) -> Conversion:
    """The conversion of unit ``text`` to the SI unit of ``kind`` (cached).

    A blank text means the SI unit. Raises :class:`UnitError` with a plain
    message for an unknown unit or one of another kind.
    """
    if text is None or not str(text).strip() or str(text).strip() == kind.si:
        return Conversion(1.0)
    text = str(text).strip()
    known = _common_table().get(kind.name, {}).get(text)
    if known is not None:  # the usual units, without importing pint
        return Conversion(*known)
    if "@" in text:
        return _gauge_with_atmosphere(text, kind)
    return _parsed(text, kind)


def _parsed(text: str, kind: Kind) -> Conversion:
    """``conversion`` by pint, for any text units.txt and unit_spellings.txt define."""
    registry = _registry()
    try:
        units = registry.parse_units(_fold_case(_trade_spelling(text)))
    except UnitError:
        raise
    except Exception:  # pint's parser raises many kinds on garbage ("1/0", "**", "()")
        raise UnitError(f"unknown unit '{text}' for {kind.name}") from None
    dims = _dimension_text(registry, units)
    alternate = bool(kind.alternate) and dims == _canonical(kind.alternate)
    if dims != _canonical(kind.dims) and not alternate:
        raise UnitError(f"'{text}' is not a unit of {kind.name} (expected something like {kind.si})")
    scale, _ = registry.get_base_units(units)  # a temperature unit's step, as for a difference
    offset = 0.0
    if kind in _OFFSET_KINDS:  # scales with a shifted zero: Celsius, Fahrenheit, gauge pressures
        offset = float(registry.Quantity(0.0, units).to_base_units().magnitude)
    return Conversion(float(scale), offset, alternate)


_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$")


def _gauge_with_atmosphere(text: str, kind: Kind) -> Conversion:
    """"barg@83kPa", "psig @ 12.1 psia", "barg@1600m": a gauge unit and the atmosphere it refers to."""
    unit_text, _, reference = text.partition("@")
    gauge = conversion(unit_text, kind)
    if kind is not PRESSURE or gauge.offset == 0.0:
        raise UnitError(f"'{text}': an atmosphere after '@' belongs to a gauge pressure unit (barg, psig, kPag, "
                        "MPag, atg)")
    match = _NUMBER.match(reference)
    if not match or not match.group(2).strip():
        raise UnitError(f"'{text}': after '@' give the atmosphere as a pressure (83 kPa) or an altitude (1600 m)")
    value, ref_unit = float(match.group(1)), match.group(2).strip()
    try:
        altitude = conversion(ref_unit, _LENGTH)
    except UnitError:
        altitude = None
    if altitude is not None:
        atmosphere = standard_atmosphere(altitude.to_si(value))
    else:
        absolute = conversion(ref_unit, PRESSURE)
        if absolute.offset:
            raise UnitError(f"'{text}': the atmosphere after '@' is an absolute pressure, not '{ref_unit}'")
        atmosphere = absolute.to_si(value)
    if not (math.isfinite(atmosphere) and atmosphere > 0.0):
        raise UnitError(f"'{text}': the atmosphere must be a positive pressure")
    return Conversion(gauge.scale, atmosphere)


def standard_atmosphere(altitude: float) -> float:
    """Pressure in Pa of the ISO 2533 standard atmosphere at an altitude above sea level in m (troposphere).

    >>> standard_atmosphere(0.0)
    101325.0
    """
    from . import data

    c = {k: data.constant("atmosphere", k).value for k in (
        "sea_level_pressure", "sea_level_temperature", "lapse_rate", "standard_gravity", "air_molar_mass",
        "gas_constant", "lowest_altitude", "tropopause_altitude", "earth_radius")}
    r0 = c["earth_radius"]
    low, high = (r0 * h / (r0 - h) for h in (c["lowest_altitude"], c["tropopause_altitude"]))
    if not low <= altitude <= high:
        raise UnitError(f"an altitude of {altitude:g} m is outside the standard atmosphere's troposphere "
                        f"({low:.0f} m to {high:.0f} m)")
    altitude = r0 * altitude / (r0 + altitude)  # geopotential
    exponent = c["standard_gravity"] * c["air_molar_mass"] / (c["gas_constant"] * c["lapse_rate"])
    ratio = 1.0 - c["lapse_rate"] * altitude / c["sea_level_temperature"]
    return c["sea_level_pressure"] * ratio**exponent


def catalogue() -> dict[str, list[str]]:
    """The unit names units.txt defines, grouped by the quantity they measure (for ``cellfuncs units``)."""
    registry = _registry()
    groups: dict[str, list[str]] = {}
    dims_of = {_canonical(k.dims): k.name for k in KINDS if k is not TEMPERATURE_DIFFERENCE}
    names = {_canonical(d): name for d, name in (
        ("[length]", "length"), ("[mass]", "mass"), ("[time]", "time"), ("[substance]", "amount of substance"),
        ("[length]^3", "volume"), ("[mass]*[length]^2/[time]^2", "energy"), ("[mass]*[length]/[time]^2", "force"))}
    for parts in _definitions():
        if parts[0].endswith("-"):
            groups.setdefault("prefixes", []).append(f"{parts[0].rstrip('-')} ({', '.join(p.rstrip('-') for p in parts[2:])})")
            continue
        dims = _dimension_text(registry, registry.parse_units(parts[0]))
        group = dims_of.get(dims) or names.get(dims, dims)
        groups.setdefault(group, []).append(" = ".join([parts[0]] + parts[2:]))
    groups["plant spellings"] = [f"{written} = {meant}" for written, meant in _plant_spellings()]
    return groups


# The usual unit texts of each kind, converted once by pint from units.txt and stored in
# unit_table.toml, so that a formula in common units starts without importing pint; the table is
# generated (``python -m cellfuncs.units``) and a test keeps it equal to what pint computes.
_COMMON_COMPOUNDS = {
    MOLAR_VOLUME.name: ("m3/mol", "L/mol", "l/mol", "cm3/mol", "m3/kmol", "m3/kg", "L/kg", "cm3/g", "ft3/lb"),
    DENSITY.name: ("kg/m3", "g/cm3", "g/mL", "kg/L", "g/L", "lb/ft3", "lb/gal", "mol/L", "mol/m3", "kmol/m3"),
    MOLAR_ENERGY.name: ("J/mol", "kJ/mol", "kJ/kmol", "J/kg", "kJ/kg", "MJ/kg", "Btu/lb", "Btu/lbm", "cal/mol",
                        "kcal/mol", "cal/g", "kcal/kg"),
    EXPANSIVITY.name: ("1/K", "1/degC", "1/degF", "1/degR"),
    COMPRESSIBILITY.name: ("1/Pa", "1/kPa", "1/MPa", "1/GPa", "1/bar", "1/atm", "1/psi"),
}


def _common_texts() -> dict[str, list[str]]:
    """Every unit text the table holds: for temperature and pressure each spelling of a unit of that
    kind in units.txt (with the prefixes k, M, G, m for pressure), and the usual compound texts."""
    registry = _registry()
    single = {TEMPERATURE.name: [], TEMPERATURE_DIFFERENCE.name: [], PRESSURE.name: []}
    for parts in _definitions():
        if parts[0].endswith("-"):
            continue
        dims = _dimension_text(registry, registry.parse_units(parts[0]))
        spellings = [parts[0]] + parts[2:]
        if dims == _canonical(TEMPERATURE.dims):
            single[TEMPERATURE.name] += spellings
            single[TEMPERATURE_DIFFERENCE.name] += spellings
        elif dims == _canonical(PRESSURE.dims):
            short = [w for w in spellings if len(w) <= 5]
            single[PRESSURE.name] += spellings + [p + w for p in ("k", "M", "G", "m") for w in short
                                                  if w in ("Pa", "bar")]
    return {**single, **{k: list(v) for k, v in _COMMON_COMPOUNDS.items()}}


def common_table_text() -> str:
    """The contents of unit_table.toml, computed by pint from units.txt."""
    kinds = {k.name: k for k in KINDS}
    lines = ["# Generated by `python -m cellfuncs.units` from units.txt; do not edit (tests/test_units.py",
             "# checks it against pint). kind -> unit text -> [scale, offset, alternate basis]."]
    for name, texts in _common_texts().items():
        lines.append(f'\n["{name}"]')
        for text in dict.fromkeys(texts):
            c = _parsed(text, kinds[name])
            lines.append(f'"{text}" = [{c.scale!r}, {c.offset!r}, {str(c.alternate).lower()}]')
    return "\n".join(lines) + "\n"


@lru_cache(maxsize=1)
def _common_table() -> dict[str, dict[str, tuple[float, float, bool]]]:
    import tomllib

    return {kind: {text: tuple(v) for text, v in table.items()}
            for kind, table in tomllib.loads(_data_text("unit_table.toml")).items()}


@lru_cache(maxsize=256)
def conversion_to(text: str | None, si: str) -> Conversion:
    """The conversion of unit ``text`` to the coherent SI unit ``si`` (for data fields such as "J/(mol*K)").

    >>> conversion_to("kJ/(kg*K)", "J/(kg*K)").scale
    1000.0
    """
    known = {TEMPERATURE.si: TEMPERATURE, PRESSURE.si: PRESSURE}
    if si in known:
        return conversion(text, known[si])
    registry = _registry()
    dims = _dimension_text(registry, registry.parse_units(si)) if si else "1"
    return conversion(text, Kind(si or "dimensionless", si, dims))


if __name__ == "__main__":  # python -m cellfuncs.units > cellfuncs/data/unit_table.toml
    print(common_table_text(), end="")
