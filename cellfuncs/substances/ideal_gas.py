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
  power            cp0/R = c0 + sum c_i (T/T_r)^t_i (T_r a reducing temperature, exponents
                   neither 0 nor -1): the ideal part of a reference equation written as
                   powers of tau = Tc/T (Tillner-Roth and Baehr's for R-134a), restated in T

A definition without a table, but with a liquid heat capacity cpL at a temperature T_L, gets the
generalised estimate of :func:`estimate`: the Rowlinson-Bondi corresponding-states equation

  (cpL - cp0)/R = 1.586 + 0.49/(1 - Tr) + omega [4.2775 + 6.3 (1 - Tr)^(1/3)/Tr + 0.4355/(1 - Tr)]

(as printed in Poling, Prausnitz and O'Connell, 5th ed. (2001), eq. 6-6.5; from memory) at
Tr = T_L/Tc, solved for cp0 and taken as constant: a few per cent for nonpolar liquids, rough for
polar ones, and wrong for hydrogen-bonded ones (ethanol's would come out a quarter of the true
value), which therefore get none.

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

from ..data import load
from .constants import T_STANDARD, R
from .result import BAD_ARGUMENT, ModelError

T_REF = T_STANDARD  # K, lower end of the enthalpy and entropy integrals
KEY = "ideal_gas_cp"  # the data table and the prefix of a user definition's rows

# form -> (its numbers, its lists, lists that must be as long as each other)
FORMS: dict[str, tuple[tuple[str, ...], tuple[str, ...], tuple[str, ...]]] = {
    "polynomial": ((), ("a",), ()),
    "planck_einstein": (("c0",), ("n", "theta"), ("n", "theta")),
    "power": (("c0", "T_r"), ("c", "t"), ("c", "t")),
}
TEXTS = ("form", "reference")


ESTIMATE_SOURCE = ("Rowlinson-Bondi equation, Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, "
                   "5th ed. (2001), eq. 6-6.5, from the liquid heat capacity (a generalised estimate, constant)")


def estimate(Tc: float, omega: float, cp_liquid: float | None, T_liquid: float | None) -> dict[str, Any] | None:
    """A constant cp0 table from a liquid heat capacity (J/(mol K)) at T_liquid (K); None without one."""
    if cp_liquid is None or T_liquid is None:
        return None
    tr = T_liquid / Tc
    c0, c1, c2, c3, c4 = load("correlations")["tables"]["rowlinson_bondi"]["c"]
    gap = c0 + c1 / (1.0 - tr) + omega * (c2 + c3 * (1.0 - tr) ** (1.0 / 3.0) / tr + c4 / (1.0 - tr))
    cp = cp_liquid / R - gap
    if cp < 2.5:  # below a monatomic gas's: the liquid heat capacity and the method disagree
        return None
    return {"form": "polynomial", "a": [cp], "T_min": T_liquid, "T_max": Tc, "reference": ESTIMATE_SOURCE}


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
    if any(t <= 0 for t in table.get("theta", ())) or table.get("T_r", 1.0) <= 0:
        raise ModelError(BAD_ARGUMENT, f"field '{KEY}.{'T_r' if 'T_r' in table else 'theta'}' must hold positive "
                         "temperatures")
    if any(t in (0.0, -1.0) for t in table.get("t", ())):
        raise ModelError(BAD_ARGUMENT, f"field '{KEY}.t' must not hold 0 or -1 (the c0 term and a logarithm)")
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


def _power_terms(table: Mapping[str, Any], T: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per term (last axis): c, t and x = T/T_r."""
    return np.asarray(table["c"], float), np.asarray(table["t"], float), (T / table["T_r"])[..., None]


def cp0(table: Mapping[str, Any], T: Any) -> np.ndarray:
    """Ideal-gas isobaric heat capacity, J/(mol K), at T (K)."""
    T = np.asarray(T, float)
    if table["form"] == "polynomial":
        return R * np.polynomial.polynomial.polyval(T, np.asarray(table["a"], float))
    if table["form"] == "power":
        c, t, x = _power_terms(table, T)
        return R * (table["c0"] + np.sum(c * x**t, axis=-1))
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
    if table["form"] == "power":
        c, t, x = _power_terms(table, T)
        return R * (table["c0"] * T + table["T_r"] * np.sum(c * x ** (t + 1.0) / (t + 1.0), axis=-1))
    n, u, b = _einstein_terms(table, T)
    # d/dT [theta / (e^(theta/T) - 1)] = u^2 e^u / (e^u - 1)^2
    return R * (table["c0"] * T + np.sum(n * u * T[..., None] * b, axis=-1))


def _s(table: Mapping[str, Any], T: np.ndarray) -> np.ndarray:
    """An antiderivative of cp0 / T."""
    if table["form"] == "polynomial":
        a = np.asarray(table["a"], float)
        rest = np.concatenate(([0.0], a[1:] / np.arange(1, a.size)))
        return R * (a[0] * np.log(T) + np.polynomial.polynomial.polyval(T, rest))
    if table["form"] == "power":
        c, t, x = _power_terms(table, T)
        return R * (table["c0"] * np.log(T) + np.sum(c * x**t / t, axis=-1))
    n, u, b = _einstein_terms(table, T)
    # d/dT [u / (e^u - 1) - ln(1 - e^-u)] = u^2 e^u / (e^u - 1)^2 / T
    return R * (table["c0"] * np.log(T) + np.sum(n * (u * b - np.log(-np.expm1(-u))), axis=-1))
