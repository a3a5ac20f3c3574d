"""Substance models: phases, boundaries and the lookup of substances by name.

Names are case-insensitive: the common name, the formula, the ASHRAE 34
designation with or without its hyphen, and listed aliases.

>>> lookup("H2O").name
'water'
>>> lookup("r718").name
'water'
"""

from __future__ import annotations

from functools import lru_cache
from typing import Any, Mapping

from .base import Substance
from .result import BAD_ARGUMENT, ModelError


def _keys(substance: Substance, formula: str, designation: str, aliases) -> set[str]:
    keys = {substance.name, formula, *aliases}
    if designation:
        keys |= {designation, designation.replace("-", "")}
    return {" ".join(k.split()).lower() for k in keys if k}


@lru_cache(maxsize=None)
def _catalogue() -> tuple[dict[str, list[Substance]], tuple[Substance, ...]]:
    from .general.definition import builtin_keys, load_builtin
    from .general.model import GeneralSubstance
    from .water.model import Water

    table: dict[str, list[Substance]] = {}
    water = Water()
    every: list[Substance] = [water]
    for key in _keys(water, "H2O", "R-718", water.aliases):
        table.setdefault(key, []).append(water)
    for file_key in builtin_keys():
        d = load_builtin(file_key)
        substance = GeneralSubstance(d)
        every.append(substance)
        for key in _keys(substance, d.formula, d.designation, d.aliases):
            table.setdefault(key, []).append(substance)
    return table, tuple(every)


def names() -> list[str]:
    """The substances' names, one each, sorted."""
    return sorted(s.name for s in _catalogue()[1])


def lookup(name: str) -> Substance:
    """The substance called ``name``; an unknown or ambiguous name raises ModelError."""
    key = " ".join(str(name).split()).lower()
    found = _catalogue()[0].get(key)
    if not found:
        shown = str(name) if len(str(name)) <= 60 else str(name)[:60] + "..."  # a cell may hold any length
        raise ModelError(BAD_ARGUMENT, f"unknown substance '{shown}'; SUBSTANCES() lists the known names")
    if len(found) > 1:
        which = ", ".join(sorted(s.name for s in found))
        raise ModelError(BAD_ARGUMENT, f"'{name}' fits several substances ({which}); give the name")
    return found[0]


def define(fields: Mapping[str, Any]) -> Substance:
    """A user-defined substance from field -> value or (value, unit); see general/definition.py."""
    from .general.consistency import check, check_published
    from .general.definition import Definition
    from .general.model import GeneralSubstance

    return check(GeneralSubstance(check_published(Definition.from_fields(fields))))
