"""The set of properties every phase formulation returns, in SI per kilogram."""

from __future__ import annotations

from typing import NamedTuple

import numpy as np


class Props(NamedTuple):
    """Specific properties of one phase at (T, p); every field is an array.

    g is the specific Gibbs energy h - T s on the formulation's reference state.
    alpha is the cubic (volume) expansivity (1/v)(dv/dT)_p and kappa the isothermal
    compressibility -(1/v)(dv/dp)_T.
    """

    v: np.ndarray  # m3/kg
    h: np.ndarray  # J/kg
    s: np.ndarray  # J/(kg K)
    g: np.ndarray  # J/kg
    cp: np.ndarray  # J/(kg K)
    alpha: np.ndarray  # 1/K
    kappa: np.ndarray  # 1/Pa
