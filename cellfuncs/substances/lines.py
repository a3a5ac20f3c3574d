"""Published equation forms for vapour-pressure, melting and sublimation lines.

A line is described by a data-file table naming its ``form`` and coefficients
(see the substance data files); :func:`line_pressure` evaluates it, vectorised.

>>> co2 = {"form": "ancillary", "Tc": 304.1282, "pc": 7.3773e6,
...        "n": [-7.0602087, 1.9391218, -1.6463597, -3.2995634], "t": [1.0, 1.5, 2.0, 4.0]}
>>> round(float(line_pressure(co2, 273.15)) / 1e6, 4)
3.485
"""

from __future__ import annotations

from typing import Any, Mapping

import numpy as np

from .. import units

# the units a published Antoine line is written in (its p_unit and t_unit); units.py converts them
PRESSURE_UNITS = ("Pa", "kPa", "MPa", "bar", "mmHg", "torr", "atm")
TEMPERATURE_UNITS = ("K", "degC")


def _ancillary(line, T):
    # ln(p/pc) = (Tc/T) sum n_i (1 - T/Tc)^t_i
    tau = np.maximum(1.0 - T / line["Tc"], 0.0)  # the line ends at the critical point
    total = (np.asarray(line["n"]) * tau[..., None] ** np.asarray(line["t"])).sum(axis=-1)
    return line["pc"] * np.exp(line["Tc"] / T * total)


def _antoine(line, T):
    # log10(p / p_unit) = A - B / (T_in_unit + C)
    t = units.conversion(line.get("t_unit", "K"), units.TEMPERATURE).from_si(T)
    scale = units.conversion(line.get("p_unit", "Pa"), units.PRESSURE).scale
    return scale * 10.0 ** (line["A"] - line["B"] / (t + line["C"]))


def _simon_glatzel(line, T):
    # p = p0 + a ((T/T0)^c - 1)
    return line["p0"] + line["a"] * ((T / line["T0"]) ** line["c"] - 1.0)


def _ancillary_melting(line, T):
    # p/pt = 1 + sum a_i ((T/Tt)^t_i - 1) + sum b_j (T/Tt - 1)^s_j
    theta = T / line["Tt"]
    total = 1.0 + sum(a * (theta**t - 1.0) for a, t in zip(line["a"], line["t"]))
    total = total + sum(b * (theta - 1.0) ** s for b, s in zip(line.get("b", ()), line.get("s", ())))
    return line["pt"] * total


def _ancillary_sublimation(line, T):
    # ln(p/pt) = (Tt/T) sum a_i (1 - T/Tt)^t_i
    x = np.maximum(1.0 - T / line["Tt"], 0.0)  # the line ends at the triple point
    total = sum(a * x**t for a, t in zip(line["a"], line["t"]))
    return line["pt"] * np.exp(line["Tt"] / T * total)


FORMS = {
    "ancillary": _ancillary,
    "antoine": _antoine,
    "simon_glatzel": _simon_glatzel,
    "ancillary_melting": _ancillary_melting,
    "ancillary_sublimation": _ancillary_sublimation,
}


def line_pressure(line: Mapping[str, Any], T: Any) -> np.ndarray:
    """Pressure (Pa) on a line described by a data table, at temperatures T (K); no range checks."""
    return np.asarray(FORMS[line["form"]](line, np.asarray(T, dtype=float)), dtype=float)
