"""Ideal-gas isobaric heat capacity cp0(T) and its enthalpy and entropy integrals.

A substance's data file gives one ``[ideal_gas_cp]`` table (a user definition the same keys
as rows ``ideal_gas_cp.form``, ``ideal_gas_cp.a``, ...), in one of two forms:

  polynomial       cp0/R = a[0] + a[1] T + a[2] T^2 + ...  (T in K), the form of Poling,
                   Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th ed.
                   (2001), Appendix A, section C (printed there as a0, a1*1e3, a2*1e5, a3*1e8,
                   a4*1e11; the files hold the plain coefficients)
  planck_einstein  cp0/R = c0 + sum n_i u_i^2 e^u_i / (e^u_i - 1)^2, u_i = theta_i / T: the
                   rigid-rotor, harmonic-oscillator heat capacity (c0 = 4 for a nonlinear
                   molecule, 3.5 for a linear one; n_i the degeneracy of the vibration of
                   characteristic temperature theta_i = h c nu_i / k), the form of the
                   ideal-gas parts of the reference equations of state

Each table has its range T_min..T_max (K) and reference. The integrals are taken from
T_ref = 298.15 K: h0(T) - h0(T_ref) and the temperature part of s0(T) - s0(T_ref) (the
pressure part, -R ln(p/p0), is the caller's).

>>> n2 = {"form": "polynomial", "a": [3.539, -0.261e-3, 0.007e-5, 0.157e-8, -0.099e-11],
...       "T_min": 50.0, "T_max": 1000.0}
>>> round(float(cp0(n2, 298.15)), 2)  # J/(mol K)
29.11
>>> float(enthalpy(n2, 298.15)), float(entropy(n2, 298.15))
(0.0, 0.0)
"""

from __future__ import annotations

from typing import Any, Mapping

import numpy as np

from .constants import R
from .result import BAD_ARGUMENT, ModelError

T_REF = 298.15  # K, lower end of the enthalpy and entropy integrals
KEY = "ideal_gas_cp"  # the data table and the prefix of a user definition's rows

# form -> (its numbers, its lists, lists that must be as long as each other)
FORMS: dict[str, tuple[tuple[str, ...], tuple[str, ...], tuple[str, ...]]] = {
    "polynomial": ((), ("a",), ()),
    "planck_einstein": (("c0",), ("n", "theta"), ("n", "theta")),
}
TEXTS = ("form", "reference")


def validate(table: Mapping[str, Any]) -> None:
    """Raise ModelError naming the field when the table is not a complete table of a known form."""
    form = table.get("form")
    if form not in FORMS:
        raise ModelError(BAD_ARGUMENT, f"field '{KEY}.form' must be one of {', '.join(FORMS)}; got {form!r}")
    numbers, lists, paired = FORMS[form]
    numbers = numbers + ("T_min", "T_max")
    for key in numbers + lists:
        if key not in table:
            raise ModelError(BAD_ARGUMENT, f"field '{KEY}.{key}' is missing ({form} form)")
    for key, value in table.items():
        if key in TEXTS:
            continue
        if key not in numbers and key not in lists:
            raise ModelError(BAD_ARGUMENT, f"unknown field '{KEY}.{key}' ({form} form)")
        if (key in lists) != isinstance(value, list) or key in lists and not value:
            raise ModelError(BAD_ARGUMENT, f"field '{KEY}.{key}' must be "
                             + ("a list of numbers like [1.5, -2]" if key in lists else "a number"))
    if len({len(table[key]) for key in paired}) > 1:
        raise ModelError(BAD_ARGUMENT, f"fields {' and '.join(f'{KEY}.{k}' for k in paired)} must have as many numbers")
    if any(t <= 0 for t in table.get("theta", ())):
        raise ModelError(BAD_ARGUMENT, f"field '{KEY}.theta' must hold positive temperatures")
    if not 0 < table["T_min"] < table["T_max"]:
        raise ModelError(BAD_ARGUMENT, f"fields '{KEY}.T_min' and '{KEY}.T_max' must be 0 < T_min < T_max")


def in_range(table: Mapping[str, Any], T: Any) -> np.ndarray:
    """Where T lies inside the correlation's stated range."""
    T = np.asarray(T, float)
    return (T >= table["T_min"]) & (T <= table["T_max"])


def _einstein_terms(table: Mapping[str, Any], T: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per vibration (last axis): n, u = theta/T and 1/(e^u - 1), with e^u - 1 taken by expm1 for small u."""
    n = np.asarray(table["n"], float)
    u = np.asarray(table["theta"], float) / T[..., None]
    return n, u, 1.0 / np.expm1(u)


def cp0(table: Mapping[str, Any], T: Any) -> np.ndarray:
    """Ideal-gas isobaric heat capacity, J/(mol K), at T (K)."""
    T = np.asarray(T, float)
    if table["form"] == "polynomial":
        return R * np.polynomial.polynomial.polyval(T, np.asarray(table["a"], float))
    n, u, b = _einstein_terms(table, T)
    # u^2 e^u / (e^u - 1)^2 = u^2 b (1 + b)
    return R * (table["c0"] + np.sum(n * u * u * b * (1.0 + b), axis=-1))


def enthalpy(table: Mapping[str, Any], T: Any, T_ref: float = T_REF) -> np.ndarray:
    """h0(T) - h0(T_ref) = integral of cp0 dT, J/mol."""
    return _h(table, np.asarray(T, float)) - _h(table, np.asarray(T_ref, float))


def entropy(table: Mapping[str, Any], T: Any, T_ref: float = T_REF) -> np.ndarray:
    """Temperature part of s0(T) - s0(T_ref) = integral of cp0/T dT, J/(mol K)."""
    return _s(table, np.asarray(T, float)) - _s(table, np.asarray(T_ref, float))


def _h(table: Mapping[str, Any], T: np.ndarray) -> np.ndarray:
    """An antiderivative of cp0."""
    if table["form"] == "polynomial":
        a = np.asarray(table["a"], float)
        return R * np.polynomial.polynomial.polyval(T, np.concatenate(([0.0], a / np.arange(1, a.size + 1))))
    n, u, b = _einstein_terms(table, T)
    # d/dT [theta / (e^(theta/T) - 1)] = u^2 e^u / (e^u - 1)^2
    return R * (table["c0"] * T + np.sum(n * u * T[..., None] * b, axis=-1))


def _s(table: Mapping[str, Any], T: np.ndarray) -> np.ndarray:
    """An antiderivative of cp0 / T."""
    if table["form"] == "polynomial":
        a = np.asarray(table["a"], float)
        rest = np.concatenate(([0.0], a[1:] / np.arange(1, a.size)))
        return R * (a[0] * np.log(T) + np.polynomial.polynomial.polyval(T, rest))
    n, u, b = _einstein_terms(table, T)
    # d/dT [u / (e^u - 1) - ln(1 - e^-u)] = u^2 e^u / (e^u - 1)^2 / T
    return R * (table["c0"] * np.log(T) + np.sum(n * (u * b - np.log(-np.expm1(-u))), axis=-1))
