"""Reviewed data files: substance constants and formulation coefficients.

Every file under this folder is TOML that a person can read and check against
the publication it names. Constants are tables with ``value``, ``unit``,
``uncertainty`` and ``reference`` (the astropy.constants pattern); coefficient
tables carry their ``reference`` beside the arrays.

>>> tc = constant("water/water", "critical_temperature")
>>> tc.value, tc.unit
(647.096, 'K')
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from typing import Any

import numpy as np


@dataclass(frozen=True)
class Constant:
    """A published value with its unit, standard uncertainty and source.

    ``memory`` marks a value recalled from memory of the table its reference names, rather than read
    from a copy of it.
    """

    key: str
    name: str
    value: float
    unit: str
    uncertainty: float | None
    reference: str
    note: str = ""
    memory: bool = False

    @classmethod
    def from_entry(cls, key: str, entry: dict[str, Any]) -> "Constant":
        """The constant a data file's ``[constants.<key>]`` table states, in the table's own unit."""
        uncertainty = entry.get("uncertainty")
        return cls(key=key, name=entry["name"], value=float(entry["value"]), unit=entry["unit"],
                   uncertainty=None if uncertainty is None else float(uncertainty), reference=entry["reference"],
                   note=entry.get("note", ""), memory=entry.get("memory", False))


@lru_cache(maxsize=None)
def load(name: str) -> dict[str, Any]:
    """Parsed contents of ``cellfuncs/data/<name>.toml`` (cached)."""
    text = resources.files("cellfuncs.data").joinpath(f"{name}.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


@lru_cache(maxsize=None)
def constant(name: str, key: str) -> Constant:
    """The constant ``key`` of data file ``name``."""
    return Constant.from_entry(key, load(name)["constants"][key])


@lru_cache(maxsize=None)
def table(name: str, key: str) -> dict[str, Any]:
    """Coefficient table ``key`` of data file ``name``; list columns become numpy arrays."""
    entry = load(name)["tables"][key]
    return {k: (np.asarray(v, dtype=float) if isinstance(v, list) else v) for k, v in entry.items()}
