"""Melting lines of ices Ih, III, V, VI, VII and the sublimation line of ice Ih.

Equations of IAPWS R14-08(2011); their coefficients, anchoring triple points and
ranges live in ``cellfuncs/data/water/ice_lines.toml``. Pressures from
temperatures are explicit. Temperatures from pressures come from a table of the
line made at import and Newton steps (:class:`cellfuncs.numerics.MonotoneInverse`,
which brackets the few elements Newton leaves unconverged), so a scalar call costs
a few evaluations of the line.

The explicit functions make no range checks (the ranges are in :func:`line_range`);
the inverse functions return NaN for pressures outside a line's range.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from cellfuncs.data import table
from cellfuncs.numerics import MonotoneInverse
from cellfuncs.substances.result import BAD_ARGUMENT, ModelError

ICES = ("Ih", "III", "V", "VI", "VII")  # in order of increasing melting pressure
SUBLIMATION = "sublimation"

_DATA = "water/ice_lines"
# Two neighbouring lines meet at their triple point only to a few parts in 1e6 of
# pressure, so a pressure inside a line's published range can have its root just
# past the end of the temperature range (ice V at 632.4 MPa: 0.03 K past 273.31 K).
_SEARCH_MARGIN_K = 0.1
_NODES = 2049  # tabulated points per line


class _Line:
    """One R14-08 equation: p(T) explicit, T(p) by a table and Newton steps."""

    def __init__(self, key: str):
        d = table(_DATA, key)
        self.form: str = d["form"]
        self.T_n = float(d["T_n"])
        self.p_n = float(d["p_n"])
        self.terms = tuple(zip(d["a"].tolist(), d["b"].tolist()))
        self.T_range = (float(d["T_range"][0]), float(d["T_range"][1]))
        self.p_range = (float(d["p_range"][0]), float(d["p_range"][1]))
        # every line is monotone in its reduced pressure
        self.inverse = MonotoneInverse(self.reduced, self.T_range[0] - _SEARCH_MARGIN_K,
                                       self.T_range[1] + _SEARCH_MARGIN_K, points=_NODES)

    def reduced(self, T: np.ndarray) -> np.ndarray:
        """p/p_n ("linear" form) or ln(p/p_n) (the two log forms) at ``T``."""
        ln_theta = np.log(np.asarray(T, dtype=float) / self.T_n)
        if self.form == "sublimation":
            return sum(a * np.exp((b - 1.0) * ln_theta) for a, b in self.terms)
        # 1 - theta^b via expm1 keeps the digits near the anchoring triple point
        s = sum(-a * np.expm1(b * ln_theta) for a, b in self.terms)
        return 1.0 + s if self.form == "linear" else s

    def pressure(self, T: ArrayLike) -> np.ndarray:
        y = self.reduced(T)
        return self.p_n * (y if self.form == "linear" else np.exp(y))

    def temperature(self, p: ArrayLike) -> np.ndarray:
        p = np.asarray(p, dtype=float)
        inside = (p >= self.p_range[0]) & (p <= self.p_range[1])
        p_in = np.where(inside, p, self.p_range[0])
        y = p_in / self.p_n if self.form == "linear" else np.log(p_in / self.p_n)
        return np.where(inside, self.inverse(y), np.nan)


_LINES = {key: _Line(key) for key in (*ICES, SUBLIMATION)}


def _melting_line(ice: str) -> _Line:
    if ice not in ICES:
        raise ModelError(BAD_ARGUMENT, f"unknown ice {ice!r}; expected one of {', '.join(ICES)}")
    return _LINES[ice]


def melting_pressure(T: ArrayLike, ice: str) -> np.ndarray:
    """Melting pressure (Pa) of ``ice`` (one of :data:`ICES`) at temperature ``T`` (K).

    Valid over the temperature range of :func:`line_range`; not checked here.

    >>> round(float(melting_pressure(260.0, "Ih")) / 1e6, 3)
    138.268
    """
    return _melting_line(ice).pressure(T)


def melting_temperature(p: ArrayLike, ice: str) -> np.ndarray:
    """Melting temperature (K) of ``ice`` at pressure ``p`` (Pa); NaN outside the line's pressure range.

    Near a triple point the root may lie up to 0.1 K past the line's temperature
    range, where neighbouring equations disagree by a few parts in 1e6 in pressure.

    >>> round(float(melting_temperature(479.640244e6, "V")), 6)
    265.0
    """
    return _melting_line(ice).temperature(p)


def sublimation_pressure(T: ArrayLike) -> np.ndarray:
    """Sublimation pressure (Pa) of ice Ih at temperature ``T`` (K), valid 50 K to 273.16 K (not checked).

    >>> round(float(sublimation_pressure(230.0)), 5)
    8.94735
    """
    return _LINES[SUBLIMATION].pressure(T)


def sublimation_temperature(p: ArrayLike) -> np.ndarray:
    """Sublimation temperature (K) of ice Ih at pressure ``p`` (Pa); NaN outside the line's range.

    >>> round(float(sublimation_temperature(611.657)), 6), bool(np.isnan(sublimation_temperature(700.0)))
    (273.16, True)
    """
    return _LINES[SUBLIMATION].temperature(p)


def line_range(line: str) -> tuple[tuple[float, float], tuple[float, float]]:
    """((T_lo, T_hi), (p_lo, p_hi)) in K and Pa of a melting line (one of :data:`ICES`) or ``"sublimation"``.

    >>> line_range("III")
    ((251.165, 256.164), (208566000.0, 350100000.0))
    """
    if line not in _LINES:
        raise ModelError(BAD_ARGUMENT, f"unknown line {line!r}; expected one of {', '.join(_LINES)}")
    return _LINES[line].T_range, _LINES[line].p_range


def melting_temperature_any(p: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Melting temperature (K) at pressure ``p`` (Pa) on the line that covers ``p``, and its index in :data:`ICES`.

    The segments follow each other in pressure: Ih from the triple point
    611.657 Pa up to its upper pressure, then III, V, VI and VII; a shared end
    pressure belongs to the lower-pressure segment. Outside 611.657 Pa to the
    top of the ice VII line the temperature is NaN and the index -1.

    >>> T, i = melting_temperature_any([1e5, 300e6, 1e9])
    >>> np.round(T, 3).tolist(), [ICES[k] for k in i]
    ([273.153, 254.964, 300.243], ['Ih', 'III', 'VI'])
    """
    p = np.asarray(p, dtype=float)
    T = np.full(p.shape, np.nan)
    index = np.full(p.shape, -1)
    below = p < _LINES[ICES[0]].p_range[0]
    for k, ice in enumerate(ICES):
        top = _LINES[ice].p_range[1]
        segment = ~below & (p <= top)
        if segment.any():
            T[segment] = _LINES[ice].temperature(p[segment])
            index[segment] = k
        below = below | segment
    return T, index
