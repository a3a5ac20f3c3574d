"""Built-in CONVERT: a number from one unit of measure to another of the same group.

Excel's rule: units are case-sensitive symbols of Excel's unit table
(``cellfuncs/data/excel/convert_units.toml``); the units marked there take a decimal prefix
(``k``, ``m``, ``u``, ``da``, ...), bit and byte a binary one (``ki``, ``Mi``, ...) too, and an
area's or volume's prefix is squared or cubed with it. An unknown unit, a prefix the unit does not
take and units of different groups are #N/A; a number that is not numeric is #VALUE!.
Temperatures convert with their offsets.

Factors are exact fractions, so a result is the exact conversion rounded once.

>>> from cellfuncs.formula import compute
>>> compute('=CONVERT(1, "lbm", "kg")'), compute('=CONVERT(68, "F", "C")'), compute('=CONVERT(1, "Gibyte", "Mbit")')
(0.45359237, 20.0, 8589.934592)
>>> compute('=CONVERT(2.5, "ft", "sec")').code, compute('=CONVERT(1, "kft", "m")').code
('#N/A', '#N/A')
"""

from __future__ import annotations

import re
from dataclasses import dataclass, replace
from fractions import Fraction
from functools import lru_cache

from ..data import load
from ..errors import NA, NUM, VALUE, CellError
from .arrays import elementwise
from .coerce import to_number, to_text
from .evaluate import builtin
from .nodes import Scalar

_OPERAND = re.compile(r"\s*([0-9.]+(?:e[+-]?[0-9]+)?)(?:\^([0-9]+))?\s*\Z")


@dataclass(frozen=True)
class Unit:
    """A unit of CONVERT: its group, base units per unit and offset (kelvin = (x + offset) * factor)."""

    group: str
    factor: Fraction
    offset: Fraction = Fraction(0)
    prefixes: tuple[str, ...] = ()
    power: int = 1


def exact(expression: str) -> Fraction:
    """The exact value of decimals, each with an optional integer power, joined by * and /.

    >>> exact("231 * 0.0254^3 / 768") == Fraction("4.92892159375e-6"), exact("5 / 9")
    (True, Fraction(5, 9))
    """
    parts = re.split(r"([*/])", expression)
    value = _operand(parts[0])
    for op, operand in zip(parts[1::2], parts[2::2]):
        value = value * _operand(operand) if op == "*" else value / _operand(operand)
    return value


def _operand(text: str) -> Fraction:
    m = _OPERAND.match(text)
    if m is None:
        raise ValueError(f"not an exact factor: {text!r}")
    return Fraction(m.group(1)) ** int(m.group(2) or 1)


@lru_cache(maxsize=1)
def _table() -> tuple[dict[str, Unit], dict[str, dict[str, Fraction]]]:
    """Units by symbol and prefix multipliers by kind, read once from the data file."""
    data = load("excel/convert_units")
    units = {}
    for group, entries in data["groups"].items():
        for e in entries:
            unit = Unit(group, exact(e["factor"]), exact(e.get("offset", "0")),
                        tuple(e.get("prefixes", ())), e.get("power", 1))
            units.update(dict.fromkeys(e["symbols"], unit))
    base = {"decimal": 10, "binary": 2}
    prefixes = {kind: {p: Fraction(base[kind]) ** n for p, n in table.items()}
                for kind, table in data["prefixes"].items()}
    return units, prefixes


@lru_cache(maxsize=1024)
def unit(symbol: str) -> Unit | None:
    """The unit a symbol names, itself or a prefix on a unit that takes it; None when none.

    >>> unit("km").factor, unit("cm2").factor, unit("kibyte").factor, unit("Mft")
    (Fraction(1000, 1), Fraction(1, 10000), Fraction(8192, 1), None)
    """
    units, prefixes = _table()
    if symbol in units:
        return units[symbol]
    for kind, multipliers in prefixes.items():
        for prefix, multiplier in multipliers.items():
            named = units.get(symbol[len(prefix):]) if symbol.startswith(prefix) else None
            if named is not None and kind in named.prefixes:
                return replace(named, factor=named.factor * multiplier**named.power, prefixes=())
    return None


def _unit_of(v: Scalar) -> Unit | CellError:
    t = to_text(v)
    if type(t) is CellError:
        return t
    u = unit(t)
    return CellError(NA, f'"{t}" is not a unit of CONVERT') if u is None else u


@builtin("CONVERT", 3)
@elementwise
def _convert(number: Scalar, from_unit: Scalar, to_unit: Scalar) -> Scalar:
    """CONVERT(number, from_unit, to_unit): number in from_unit expressed in to_unit."""
    for v in (number, from_unit, to_unit):
        if type(v) is CellError:
            return v
    if type(number) is bool:  # Excel: a logical value is not a measurement
        return CellError(VALUE, "CONVERT needs a number, not a logical value")
    x = to_number(number)
    if type(x) is CellError:
        return x
    source, target = _unit_of(from_unit), _unit_of(to_unit)
    for u in (source, target):
        if type(u) is CellError:
            return u
    if source.group != target.group:
        return CellError(NA, f"{source.group} cannot be converted to {target.group}")
    in_base = (Fraction(x) + source.offset) * source.factor
    try:
        return float(in_base / target.factor - target.offset)
    except OverflowError:
        return CellError(NUM, "the converted number is too large")
