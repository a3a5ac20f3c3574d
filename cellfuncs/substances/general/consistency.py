"""Checks of a model built from a user's definition: lines that the model can invert and trust.

Fields within their bounds (definition.py) can still combine into lines that fall where they
should rise, or that underflow: a published vapour-pressure equation whose Lee-Kesler
continuation to the triple or critical point turns back, an Antoine equation that gives zero
pressure. The model inverts each line by a table (numerics.MonotoneInverse), which needs it
strictly monotone, so a definition whose line is not is refused, naming the fields to look at.
The lines are sampled where the model's own inverse tables sample them (4097 points), so a
line that passes is one the tables can invert.

>>> from . import definition
>>> from .model import GeneralSubstance
>>> fields = {"name": "demo oil X", "molar_mass": 100.0, "critical_temperature": 600.0,
...           "critical_pressure": (3, "MPa"), "acentric_factor": 0.3}
>>> check(GeneralSubstance(check_published(definition.Definition.from_fields(fields)))).name
'demo oil X'
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ..lines import line_pressure
from ..result import BAD_ARGUMENT, ModelError, fmt
from . import bounds
from .bounds import FIELDS

if TYPE_CHECKING:
    from .definition import Definition
    from .model import GeneralSubstance

_POINTS = 4097  # as many as the model's inverse tables (numerics.MonotoneInverse)


_FLOOR = FIELDS["triple_point_pressure"].low  # no vapour pressure of a liquid is lower


def check_published(d: "Definition") -> "Definition":
    """``d`` when its published boiling line is usable where the model uses it, between the triple (or the
    line's lowest) and the critical temperature: the model matches its continuation to the line's ends, so
    this comes before the model is built."""
    boil = d.lines.get("boil")
    if boil is None:
        return d
    tc, tt = d.values["critical_temperature"], d.values.get("triple_point_temperature", 0.0)
    lo, hi = max(boil["T_min"], tt), min(boil["T_max"], tc)
    if lo >= hi:
        _refuse(f"the published boiling line's range (boil.T_min to boil.T_max) does not overlap the liquid's, "
                f"up to the critical temperature {fmt(tc)} K" + (f" from the triple point {fmt(tt)} K" if tt else ""))
    with np.errstate(all="ignore"):
        _monotone("the published boiling line", "boil.*", np.linspace(lo, hi, _POINTS),
                  lambda T: line_pressure(boil, T), rising=True, floor=_FLOOR)
    return d


def check(sub: "GeneralSubstance") -> "GeneralSubstance":
    """``sub`` when its lines are usable; else ModelError naming the fields behind the fault."""
    with np.errstate(all="ignore"):
        _acentric(sub)
        boil = sub.definition.lines.get("boil")
        floor = _FLOOR
        u = np.linspace(1.0 / sub.tc, 1.0 / sub.t_low, _POINTS)  # the boiling table's nodes, in 1/T
        fields = "boil.*, " if boil is not None else ""
        _monotone("the boiling line over its whole extension (published part and its Lee-Kesler continuation "
                  "to the triple and critical points)", fields + "critical_pressure, acentric_factor or "
                  "normal_boiling_point, triple_point_pressure", (1.0 / u)[::-1],
                  lambda T: sub.boil_pressure(T).values, rising=True, floor=floor)
        _triple_pressure(sub)
        _solid_density(sub)
        if sub._melt_range is not None and np.isfinite(sub._melt_slope if sub._melt_slope is not None else 0.0):
            _monotone("the melting line", "melt.* or enthalpy_of_fusion and solid_density",
                      np.linspace(*sub._melt_range, _POINTS), lambda T: sub.melt_pressure(T)[0].values, rising=None)
        if sub._sub_range is not None:
            _monotone("the sublimation line", "sublime.* or enthalpy_of_fusion", np.linspace(*sub._sub_range, _POINTS),
                      lambda T: sub.sublime_pressure(T).values, rising=True)
    return sub


def _refuse(message: str) -> None:
    raise ModelError(BAD_ARGUMENT, message)


def _acentric(sub: "GeneralSubstance") -> None:
    """The acentric factor the boiling line uses, when solved from the normal boiling point, within its bounds."""
    bound = FIELDS["acentric_factor"]
    omega = sub._omega_line
    if "normal_boiling_point" in sub.definition.values and not bound.low <= omega <= bound.high:
        _refuse(f"field 'normal_boiling_point' ({fmt(sub.definition.values['normal_boiling_point'])} K) gives an "
                f"acentric factor of {fmt(omega)} by the Lee-Kesler equation, outside {bound.shown()}: check it "
                "against critical_temperature and critical_pressure")


def _monotone(what: str, fields: str, T: np.ndarray, pressure, rising: bool | None, floor: float = 0.0) -> None:
    """Refuse unless ``pressure(T)`` is finite, above ``floor`` and strictly monotone (``rising`` None: either way)."""
    p = np.asarray(pressure(T), dtype=float)
    bad = ~(np.isfinite(p) & (p > floor))
    if bad.any():
        at = int(np.argmax(bad))
        _refuse(f"{what} gives {fmt(p[at])} Pa at {fmt(T[at])} K, not a finite pressure above {fmt(floor)} Pa; "
                f"check {fields}")
    step = np.diff(p)
    if rising is None:
        rising = bool(step[0] > 0)
    wrong = step <= 0 if rising else step >= 0
    if wrong.any():
        i = int(np.argmax(wrong))
        _refuse(f"{what} is not monotone: it {'falls' if rising else 'rises'} from {fmt(p[i])} Pa at {fmt(T[i])} K to "
                f"{fmt(p[i + 1])} Pa at {fmt(T[i + 1])} K; check {fields}")


def _solid_density(sub: "GeneralSubstance") -> None:
    """The solid's density near the liquid's at the triple point (the melting line's slope rests on both)."""
    if not (sub.has_triple and np.isfinite(sub.v_solid)):
        return
    tt, pt = sub.triple
    ratio = float(sub.liquid.volume(tt, pt, pt)) / sub.v_solid
    low, high = bounds.SOLID_TO_LIQUID
    if not low <= ratio <= high:
        _refuse(f"field 'solid_density' is {fmt(ratio)} times the liquid's density at the triple point, outside "
                f"{fmt(low)} to {fmt(high)} (real solids are a little denser than their liquid, ice a little less): "
                "check solid_density and liquid_density")


def _triple_pressure(sub: "GeneralSubstance") -> None:
    """The data's triple-point pressure near the model's boiling line there: far off, it was typed in another unit."""
    pt = sub.definition.values.get("triple_point_pressure")
    if pt is None:
        return
    model = sub.triple.pressure
    factor = bounds.TRIPLE_PRESSURE_FACTOR
    if not model / factor <= pt <= model * factor:
        _refuse(f"field 'triple_point_pressure' ({fmt(pt)} Pa) is {fmt(pt / model)} times the boiling line's "
                f"pressure at the triple-point temperature ({fmt(model)} Pa), more than a factor of {fmt(factor)} off: "
                "check its unit (a number without a unit is read in Pa) and the boiling-line data")
