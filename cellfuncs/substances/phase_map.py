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
_VAPOR, _SUPER = np.int64(S_VAPOR), np.int64(S_SUPER)


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
    # abs() is np.absolute on arrays and a numpy scalar's own, cheaper, operation on a single value
    return abs(x - line) <= LINE_TOL * line


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
    # S_VAPOR below tc, else S_GAS below pc, else S_SUPER (a NaN temperature as above tc); S_LIQUID below the
    # boiling line: arithmetic on the comparisons, which a single value does without making arrays
    # (numpy integers: a single value's comparisons are numpy booleans, which mix slowly with Python ints)
    gas = p < pc
    cool = T < tc
    fluid = _SUPER - gas - cool * (_SUPER - _VAPOR - gas)
    state = S_LIQUID + (fluid - S_LIQUID) * np.logical_not(T < t_boil)  # "not below": a NaN too
    on_boil = sat & cool & near(T, t_boil)
    below = T < t_solid
    on_solid = near(T, t_solid)
    if not anywhere(on_boil | below | on_solid):  # one test for a state off the lines, above the solid
        return state
    if anywhere(on_boil):
        state = np.where(on_boil, boil_code, state)
    if anywhere(below):
        state = np.where(below, S_SOLID + solid, state)
    if anywhere(on_solid):
        state = np.where(on_solid, np.where(high, melt_code + solid, sublime_code), state)
        state = np.where(on_solid & high & (p <= pt * (1 + LINE_TOL)), sublime_code + 1, state)  # the triple point
    return state
