"""The data-file format of a Helmholtz-energy equation of state, written down once.

One file per substance, ``cellfuncs/data/equations/<substance>.toml``, holds the equation as its
publication prints it::

    title = "Span and Wagner (1996) reference equation for carbon dioxide"
    reference = "R. Span, W. Wagner, J. Phys. Chem. Ref. Data 25, 1509 (1996), Tables 28, 31, 32"
    uncertainty = "density 0.03-0.05 % to 30 MPa and 523 K; ..."      # as the paper states it
    memory = true            # coefficients recalled from memory of the tables; the tests' check
                             # values (the paper's own) decide whether the copied coefficients ship

    [constants.reducing_temperature]     # Constant tables, as in the substance files: name, value,
    [constants.reducing_density]         # unit, uncertainty (optional), reference. The reducing
    [constants.gas_constant]             # density may be given in mol/m3, mol/dm3, mol/L or kg/m3.
    [constants.molar_mass]
    [constants.minimum_temperature]      # the range the publication states for the equation
    [constants.maximum_temperature]
    [constants.maximum_pressure]

    [ideal]                              # alpha0 = ln delta + a1 + a2 tau + a3 ln tau + families
    a1 = 8.37304456
    a2 = -3.70454304
    a3 = 2.5
    power = { n = [...], t = [...] }                 # n tau^t
    planck_einstein = { n = [...], theta = [...] }   # n ln(1 - exp(-theta tau))
    sinh = { n = [...], theta = [...] }              # n ln|sinh(theta tau)|   (GERG-2008)
    cosh = { n = [...], theta = [...] }              # -n ln cosh(theta tau)   (GERG-2008)
    planck_einstein_general = { n = [...], c = [...], d = [...], theta = [...] }   # n ln(c + d exp(theta tau))

    [residual]                                       # alphar: the sum of the families
    power = { n = [...], d = [...], t = [...] }
    exponential = { n = [...], d = [...], t = [...], l = [...], g = [...] }   # g defaults to 1
    gaussian = { n = [...], d = [...], t = [...], eta = [...], epsilon = [...], beta = [...], gamma = [...] }
    nonanalytic = { n = [...], a = [...], b = [...], beta = [...], A = [...], B = [...], C = [...], D = [...] }

Families that an equation does not use are left out. tau = T_reducing / T, delta = rho / rho_reducing.
Sign conventions are the publications': a Gaussian term's eta, beta enter as exp(-eta (delta - epsilon)^2
- beta (tau - gamma)^2) with positive printed values; the GERG cosh term is subtracted.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Mapping

import numpy as np

from ... import units
from ...data import Constant
from .terms import GaussianTerms, IdealTerms, NonanalyticTerms, PowerTerms

CONSTANTS = {
    "reducing_temperature": "K",
    "reducing_density": "mol/m3",
    "gas_constant": "J/(mol*K)",
    "molar_mass": "kg/mol",
    "minimum_temperature": "K",
    "maximum_temperature": "K",
    "maximum_pressure": "Pa",
}
TEXTS = ("title", "reference", "uncertainty")
IDEAL_LEAD = ("a1", "a2", "a3")
IDEAL_FAMILIES = {"power": ("t",), "planck_einstein": ("theta",), "sinh": ("theta",), "cosh": ("theta",),
                  "planck_einstein_general": ("c", "d", "theta")}
RESIDUAL_FAMILIES = ("power", "exponential", "gaussian", "nonanalytic")


class SchemaError(ValueError):
    """A data file that does not follow the format."""


@dataclass(frozen=True)
class Spec:
    title: str
    reference: str
    uncertainty: str
    memory: bool
    constants: dict[str, Constant]
    ideal: IdealTerms
    residual: tuple


def _constant(file: str, key: str, entry: Mapping[str, Any], molar_mass: float | None) -> Constant:
    si = CONSTANTS[key]
    try:
        value = float(entry["value"])
        unit = str(entry["unit"]).strip()
        reference = str(entry["reference"])
    except KeyError as exc:
        raise SchemaError(f"{file}: constant '{key}' lacks {exc}") from None
    if key == "reducing_density" and unit.replace(" ", "") in ("kg/m3", "kg/m**3"):
        if molar_mass is None:
            raise SchemaError(f"{file}: a reducing density in kg/m3 needs the molar mass")
        value, unit_si = value / molar_mass, si
    else:
        unit_si = si
        if unit != si:
            value = float(units.conversion_to(unit, si).to_si(value))
    unc = entry.get("uncertainty")
    return Constant(key=key, name=str(entry.get("name", key)), value=value, unit=unit_si,
                    uncertainty=None if unc is None else float(unc) * value / float(entry["value"]),
                    reference=reference, note=str(entry.get("note", "")))


def _family(file: str, family: str, table: Mapping[str, Any], columns: tuple[str, ...]) -> tuple[np.ndarray, ...]:
    n = np.asarray(table.get("n", []), dtype=float)
    cols = [np.asarray(table.get(c, []), dtype=float) for c in columns]
    for name, x in zip(columns, cols):
        if n.shape != x.shape:
            raise SchemaError(f"{file}: ideal.{family} has {n.size} n and {x.size} {name}")
    return (n, *cols)


def read(file: str, raw: Mapping[str, Any]) -> Spec:
    """The equation in data file ``file`` (already parsed TOML), checked against the format."""
    unknown = set(raw) - set(TEXTS) - {"memory", "constants", "ideal", "residual"}
    if unknown:
        raise SchemaError(f"{file}: unknown top-level keys {sorted(unknown)}")
    missing = [k for k in (*TEXTS, "constants", "ideal", "residual") if k not in raw]
    if missing:
        raise SchemaError(f"{file}: missing {missing}")
    given = raw["constants"]
    if set(given) != set(CONSTANTS):
        raise SchemaError(f"{file}: constants must be exactly {sorted(CONSTANTS)}; got {sorted(given)}")
    molar_mass = _constant(file, "molar_mass", given["molar_mass"], None).value
    constants = {k: _constant(file, k, given[k], molar_mass) for k in CONSTANTS}

    ideal_raw = raw["ideal"]
    unknown = set(ideal_raw) - set(IDEAL_LEAD) - set(IDEAL_FAMILIES)
    if unknown:
        raise SchemaError(f"{file}: unknown ideal-part keys {sorted(unknown)}")
    ideal = IdealTerms(
        *(float(ideal_raw.get(k, 0.0)) for k in IDEAL_LEAD),
        *(_family(file, fam, ideal_raw.get(fam, {}), cols) for fam, cols in IDEAL_FAMILIES.items()),
    )

    res_raw = raw["residual"]
    unknown = set(res_raw) - set(RESIDUAL_FAMILIES)
    if unknown:
        raise SchemaError(f"{file}: unknown residual families {sorted(unknown)}")
    builders = {
        "power": lambda t: PowerTerms.from_table(t, exponential=False),
        "exponential": lambda t: PowerTerms.from_table(t, exponential=True),
        "gaussian": GaussianTerms.from_table,
        "nonanalytic": NonanalyticTerms.from_table,
    }
    residual = []
    for family in RESIDUAL_FAMILIES:
        if family in res_raw:
            try:
                residual.append(builders[family](res_raw[family]))
            except (KeyError, ValueError) as exc:
                raise SchemaError(f"{file}: residual.{family}: {exc}") from None
    return Spec(title=str(raw["title"]), reference=str(raw["reference"]), uncertainty=str(raw["uncertainty"]),
                memory=bool(raw.get("memory", False)), constants=constants, ideal=ideal, residual=tuple(residual))
