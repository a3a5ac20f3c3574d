"""The stable phase from the lines: one decision shared by every substance model.

A model supplies, element by element, the temperature of the line below which
its solid is stable (melting above the triple-point pressure, sublimation below
it) and of the boiling line; this module turns them into state codes, which
index a label table ("liquid", "ice Ih + liquid", ...).

>>> labels, phases = state_table(("solid",))
>>> labels[classify(np.array(300.0), np.array(1e5), t_solid=np.array(-np.inf), solid=np.array(0),
...                 t_boil=np.array(350.0), sat=np.array(True), high=np.array(True), pt=1e3, tc=500.0, pc=5e6)]
'liquid'
"""

from __future__ import annotations

import numpy as np

from .base import FLUID, LIQUID, SOLID, STABLE, VAPOR
from .line_ends import LINE_TOL
from ..numerics import anywhere


S_LIQUID, S_VAPOR, S_GAS, S_SUPER, S_SOLID = 0, 1, 2, 3, 4


def state_table(solids: tuple[str, ...]) -> tuple[np.ndarray, np.ndarray]:
    """Labels by state code, and the single phase code of each state (STABLE on a line).

    Codes: liquid, vapor, gas, supercritical fluid, the solids, "liquid + vapor",
    "<solid> + liquid" for each solid, "<first solid> + vapor", the triple point.
    """
    n = len(solids)
    labels = (["liquid", "vapor", "gas", "supercritical fluid"] + list(solids) + ["liquid + vapor"]
              + [f"{s} + liquid" for s in solids] + [f"{solids[0]} + vapor", f"{solids[0]} + liquid + vapor"])
    phases = [LIQUID, VAPOR, FLUID, FLUID] + [SOLID + k for k in range(n)] + [STABLE] * (n + 3)
    return np.array(labels, dtype=object), np.array(phases)


def near(x: np.ndarray, line: np.ndarray) -> np.ndarray:
    return np.abs(x - line) <= LINE_TOL * line


def classify(T, p, *, t_solid, solid, t_boil, sat, high, pt: float, tc: float, pc: float,
             n_solids: int = 1) -> np.ndarray:
    """State codes for (T, p).

    t_solid: the solid is stable below this temperature (-inf where no solid line applies);
    solid: index of that solid; t_boil: the liquid is stable below this temperature
    (-inf where there is no liquid); sat: where t_boil is a real boiling line (not the
    critical temperature standing in above pc); high: p at or above the triple-point pressure.
    """
    boil_code = S_SOLID + n_solids
    melt_code = boil_code + 1
    sublime_code = melt_code + n_solids
    fluid = np.where(T < tc, S_VAPOR, np.where(p < pc, S_GAS, S_SUPER))
    state = np.where(T < t_boil, S_LIQUID, fluid)
    on_boil = sat & (T < tc) & near(T, t_boil)
    if anywhere(on_boil):
        state[on_boil] = boil_code
    below = T < t_solid
    if anywhere(below):
        state[below] = S_SOLID + solid[below]
    on_solid = near(T, t_solid)
    if anywhere(on_solid):
        state[on_solid] = np.where(high, melt_code + solid, sublime_code)[on_solid]
        state[on_solid & high & (p <= pt * (1 + LINE_TOL))] = sublime_code + 1  # the triple point
    return state
