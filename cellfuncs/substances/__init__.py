"""Substance models: phases, boundaries and the lookup of substances by name.

>>> lookup("H2O").name
'water'
>>> names()
['water']
"""

from __future__ import annotations

from functools import lru_cache

from .base import Substance
from .result import BAD_ARGUMENT, ModelError


@lru_cache(maxsize=None)
def _catalogue() -> dict[str, Substance]:
    from .water.model import Water

    table: dict[str, Substance] = {}
    for substance in (Water(),):
        for alias in substance.aliases:
            table[alias.lower()] = substance
    return table


def names() -> list[str]:
    """The substances' names, one each."""
    return sorted({s.name for s in _catalogue().values()})


def lookup(name: str) -> Substance:
    """The substance called ``name`` (case-insensitive; common name, formula or refrigerant number)."""
    key = " ".join(str(name).split()).lower()
    try:
        return _catalogue()[key]
    except KeyError:
        raise ModelError(BAD_ARGUMENT, f"unknown substance '{name}'; SUBSTANCES() lists the known names") from None
