"""IAPWS-IF97 (IAPWS R7-97(2012)) region 4 and the B23 boundary, both directions.

Region 4 is the saturation line, a quadratic (eq. 29) in beta = (p/p*)^(1/4) and
theta = T/T* + n9/(T/T* - n10); solving it for either variable gives the explicit
eqs. (30) and (31), which are therefore exact inverses of each other. B23 separates
regions 2 and 3 above 623.15 K and is a quadratic p(T) (eqs. 5 and 6).

Inputs in K and Pa, vectorised; no range checks here (the water model does them),
the published limits are the module constants below.

>>> round(float(saturation_pressure(373.15)) / 1e3, 3)  # kPa
101.418
"""

from __future__ import annotations

from functools import wraps
from typing import Callable

import numpy as np
from numpy.typing import ArrayLike

from cellfuncs.data import constant, table

_DATA = "water/if97"

SATURATION_T_MIN = constant(_DATA, "t_min").value  # 273.15 K
SATURATION_T_MAX = constant("water/water", "critical_temperature").value  # 647.096 K
SATURATION_P_MIN = constant(_DATA, "saturation_p_min").value  # 611.213 Pa
SATURATION_P_MAX = constant("water/water", "critical_pressure").value  # 22.064 MPa
B23_T_MIN = constant(_DATA, "t_13").value  # 623.15 K
B23_T_MAX = constant(_DATA, "t_b23_max").value  # 863.15 K
B23_P_MIN = constant(_DATA, "p_b23_min").value  # 16.5291643 MPa
B23_P_MAX = constant(_DATA, "p_max").value  # 100 MPa

_P_STAR = constant(_DATA, "region4_reducing_pressure").value  # 1 MPa, also for B23
_T_STAR = constant(_DATA, "region4_reducing_temperature").value  # 1 K, also for B23
_N4 = tuple(table(_DATA, "region4")["n"])
_NB = tuple(table(_DATA, "b23")["n"])


def _once_per_stored_value(line: Callable[[np.ndarray], np.ndarray]) -> Callable[[ArrayLike], np.ndarray]:
    """``line`` evaluated once per value an array stores: a pressure typed once and broadcast against a
    column of temperatures is one value however many elements it fills (numpy gives such a view stride 0),
    and the line's arithmetic per element is the same either way."""

    @wraps(line)
    def once(x: ArrayLike) -> np.ndarray:
        if type(x) is np.float64:  # a single value as its numpy scalar (the models' own): answered as one
            return line(x)
        x = np.asarray(x, dtype=float)
        if x.ndim == 0:  # a single value: the line's arithmetic on its numpy scalar, without 0-d arrays
            return np.asarray(line(x[()]))
        if x.size == 0 or 0 not in x.strides:
            return line(x)
        stored = x[tuple(slice(None) if stride else slice(0, 1) for stride in x.strides)]
        return np.array(np.broadcast_to(line(stored), x.shape))

    return once


@_once_per_stored_value
def saturation_pressure(T: ArrayLike) -> np.ndarray:
    """Saturation pressure in Pa at temperature ``T`` in K, IAPWS R7-97(2012) eq. (30).

    Valid from 273.15 K to the critical point 647.096 K (``SATURATION_T_MIN``,
    ``SATURATION_T_MAX``); the release also allows its use down to the triple point
    at 273.16 K, which lies inside that range. Not checked here.

    >>> round(float(saturation_pressure(500.0)), 2)
    2638897.76
    """
    n1, n2, n3, n4, n5, n6, n7, n8, n9, n10 = _N4
    t = T / _T_STAR  # an array or a numpy scalar (see _once_per_stored_value)
    theta = t + n9 / (t - n10)
    a = (theta + n1) * theta + n2
    b = (n3 * theta + n4) * theta + n5
    c = (n6 * theta + n7) * theta + n8
    return (2.0 * c / (-b + np.sqrt(b * b - 4.0 * a * c))) ** 4 * _P_STAR


@_once_per_stored_value
def saturation_temperature(p: ArrayLike) -> np.ndarray:
    """Saturation temperature in K at pressure ``p`` in Pa, IAPWS R7-97(2012) eq. (31).

    Valid from 611.213 Pa to the critical pressure 22.064 MPa
    (``SATURATION_P_MIN``, ``SATURATION_P_MAX``); not checked here. It inverts
    :func:`saturation_pressure` exactly, up to rounding.

    >>> round(float(saturation_temperature(1e6)), 6)
    453.035632
    """
    n1, n2, n3, n4, n5, n6, n7, n8, n9, n10 = _N4
    beta = np.sqrt(np.sqrt(p / _P_STAR))
    e = (beta + n3) * beta + n6
    f = (n1 * beta + n4) * beta + n7
    g = (n2 * beta + n5) * beta + n8
    d = 2.0 * g / (-f - np.sqrt(f * f - 4.0 * e * g))
    return (n10 + d - np.sqrt((n10 + d) ** 2 - 4.0 * (n9 + n10 * d))) / 2.0 * _T_STAR


def b23_pressure(T: ArrayLike) -> np.ndarray:
    """Pressure in Pa of the region 2/3 boundary at ``T`` in K, IAPWS R7-97(2012) eq. (5).

    Valid from 623.15 K to 863.15 K (``B23_T_MIN``, ``B23_T_MAX``); not checked here.

    >>> round(float(b23_pressure(623.15)) / 1e6, 7)
    16.5291643
    """
    n1, n2, n3, _, _ = _NB
    theta = np.asarray(T, dtype=float) / _T_STAR
    return np.asarray(((n3 * theta + n2) * theta + n1) * _P_STAR)


def b23_temperature(p: ArrayLike) -> np.ndarray:
    """Temperature in K of the region 2/3 boundary at ``p`` in Pa, IAPWS R7-97(2012) eq. (6).

    Valid from 16.5291643 MPa to 100 MPa (``B23_P_MIN``, ``B23_P_MAX``); not checked here.

    >>> round(float(b23_temperature(16.5291643e6)), 6)
    623.15
    """
    _, _, n3, n4, n5 = _NB
    pi = np.asarray(p, dtype=float) / _P_STAR
    return np.asarray((n4 + np.sqrt((pi - n5) / n3)) * _T_STAR)
