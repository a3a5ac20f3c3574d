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
"""

from __future__ import annotations

import re
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
    registry = _registry()
    try:
        units = registry.parse_units(text)
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
