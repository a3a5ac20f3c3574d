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


_WATER = "water"  # the one substance with its own model; every other key names a data file


def _keys(name: str, formula: str, designation: str, aliases) -> set[str]:
    keys = {name, formula, *aliases}
    if designation:
        keys |= {designation, designation.replace("-", "")}
    return {" ".join(k.split()).lower() for k in keys if k}


def builtin_keys() -> tuple[str, ...]:
    """The keys of the data files of cellfuncs/data/substances, sorted."""
    from importlib import resources

    folder = resources.files("cellfuncs.data").joinpath("substances")
    return tuple(sorted(p.name[:-5] for p in folder.iterdir() if p.name.endswith(".toml")))


@lru_cache(maxsize=None)
def _index() -> tuple[dict[str, list[str]], dict[str, str]]:
    """(lower-case name -> substance keys, key -> substance name), read from the data files' headers
    alone, so that finding a substance builds only its own model."""
    import tomllib
    from importlib import resources

    table: dict[str, list[str]] = {}
    titles = {}
    data = resources.files("cellfuncs.data")
    files = {_WATER: data.joinpath("water", "water.toml")}
    files.update({key: data.joinpath("substances", f"{key}.toml") for key in builtin_keys()})
    for key, path in files.items():
        # the top-level keys (name, formula, designation, aliases) stand before the first table
        head = tomllib.loads(path.read_text(encoding="utf-8").split("\n[", 1)[0])
        titles[key] = head["name"]
        for name in _keys(head["name"], head.get("formula", ""), head.get("designation", ""), head.get("aliases", ())):
            table.setdefault(name, []).append(key)
    return table, titles


@lru_cache(maxsize=None)
def _build(key: str) -> Substance:
    """The model of substance ``key`` (built once, on first use)."""
    if key == _WATER:
        from .water.model import Water

        return Water()
    from .general.definition import load_builtin

    return _model(load_builtin(key))


def _model(definition) -> Substance:
    """The model of a definition: its equation of state's when it names one, else the reference
    fluid's equation mapped onto the general model's lines (helmholtz/corresponding.py)."""
    from .general.model import GeneralSubstance
    from .helmholtz.corresponding import MappedSubstance
    from .helmholtz.equation import equation
    from .helmholtz.substance import EquationSubstance

    if definition.equation:
        return EquationSubstance(definition, equation(definition.equation))
    return MappedSubstance(definition, GeneralSubstance(definition))


def names() -> list[str]:
    """The substances' names, one each, sorted."""
    return sorted(_index()[1].values())


def _normal(name: str) -> str:
    return " ".join(str(name).split()).lower()


@lru_cache(maxsize=1)
def _mixtures() -> dict[str, tuple[str, str]]:
    """Lower-case mixture names (with and without a designation's hyphen) -> (name, components)."""
    from ..data import load

    table = {}
    for name, entry in load("mixtures")["mixtures"].items():
        for key in (name, name.replace("-", ""), *entry.get("aliases", ())):
            table[_normal(key)] = (name, entry["components"])
    return table


class UnknownSubstance(ModelError):
    """A name that is no substance of the catalogue (the sheet layer says where the names are listed)."""


def lookup(name: str) -> Substance:
    """The substance called ``name``; an unknown or ambiguous name raises ModelError.

    >>> lookup("R-410A")
    Traceback (most recent call last):
    ...
    cellfuncs.substances.result.ModelError: 'R-410A' is a mixture (R-32/R-125, 50/50 % by mass); this pack models pure substances
    """
    # a sheet names its substance as text in every call: a name's model is found once
    return _named(name) if type(name) is str else _named.__wrapped__(name)


@lru_cache(maxsize=256)
def _named(name: str) -> Substance:
    key = _normal(name)
    found = _index()[0].get(key)
    if not found:
        mixture = _mixtures().get(key)
        if mixture is not None:
            raise ModelError(BAD_ARGUMENT, f"'{name}' is a mixture ({mixture[1]}); this pack models pure substances")
        shown = str(name) if len(str(name)) <= 60 else str(name)[:60] + "..."  # a cell may hold any length
        raise UnknownSubstance(BAD_ARGUMENT, f"unknown substance '{shown}'")
    if len(found) > 1:
        which = ", ".join(sorted(_index()[1][k] for k in found))
        raise ModelError(BAD_ARGUMENT, f"'{name}' fits several substances ({which}); give the name")
    return _build(found[0])


def define(fields: Mapping[str, Any]) -> Substance:
    """A user-defined substance from field -> value or (value, unit); see general/definition.py."""
    from .general.consistency import check, check_published
    from .general.definition import Definition
    from .general.model import GeneralSubstance

    definition = check_published(Definition.from_fields(fields))
    if not definition.equation:
        check(GeneralSubstance(definition))  # its lines first: the mapped equation reproduces them
    return check(_model(definition))
