"""The bounds every field of a substance definition must keep, stated once.

A user-defined substance is typed by hand into a sheet, so each number is checked
against the range real pure substances span (with room to spare) before the model
is built: a value outside it is a typing or unit slip, and the model's equations
would otherwise overflow or give nonsense far from any substance they were fitted
to. Messages and the README's table are made from this table.

A number typed without its unit is read in ``bare``, the unit handbooks list the
quantity in, or in SI where the bounds make a number in any other common unit fall
outside and be refused (a critical pressure typed as 3.37 meaning MPa is 3.37 Pa,
below 100 kPa, and is refused rather than read wrongly).

>>> FIELDS["molar_mass"].bare, FIELDS["molar_mass"].low, FIELDS["molar_mass"].high
('g/mol', 1.0, 1000.0)
>>> FIELDS["critical_pressure"].shown()
'100000 to 1e+08 Pa'
"""

from __future__ import annotations

from typing import NamedTuple

from ..result import fmt


class Bound(NamedTuple):
    """A numeric field: its stored SI unit, the unit of a bare number, and its range in that unit."""

    si: str
    bare: str
    low: float
    high: float
    why: str  # what the range spans, for the README's table

    def shown(self) -> str:
        return f"{fmt(self.low)} to {fmt(self.high)}" + (f" {self.bare}" if self.bare else "")


# The real substances behind the ranges are recalled from memory of the usual handbook tables
# (CRC Handbook; Poling, Prausnitz and O'Connell, 5th ed., Appendix A) and stated with each.
_T = (1.0, 2000.0)
FIELDS: dict[str, Bound] = {
    "molar_mass": Bound("kg/mol", "g/mol", 1.0, 1000.0, "hydrogen 2.016 g/mol to heavy oils"),
    "critical_temperature": Bound("K", "K", *_T, "helium-3 3.3 K to heavy organics near 900 K"),
    "critical_pressure": Bound("Pa", "Pa", 1e5, 1e8, "helium-3 0.115 MPa to water 22.06 MPa, with room"),
    "critical_density": Bound("kg/m3", "kg/m3", 20.0, 3000.0, "hydrogen 31 kg/m3 to heavy halides"),
    "acentric_factor": Bound("", "", -0.5, 2.0, "helium -0.39 to long-chain alcohols and acids"),
    "triple_point_temperature": Bound("K", "K", *_T, "hydrogen 13.8 K upwards"),
    "triple_point_pressure": Bound("Pa", "Pa", 1e-10, 1e8, "propane 1.7e-4 Pa to carbon dioxide 0.52 MPa"),
    "normal_boiling_point": Bound("K", "K", *_T, "helium-4 4.2 K upwards"),
    "normal_sublimation_point": Bound("K", "K", *_T, "carbon dioxide 194.7 K, sulfur hexafluoride 209.35 K"),
    "enthalpy_of_fusion": Bound("J/mol", "kJ/mol", 0.05, 100.0, "hydrogen 0.117 kJ/mol to long alkanes"),
    "liquid_density": Bound("kg/m3", "kg/m3", 50.0, 5000.0, "liquid hydrogen 71 kg/m3 to dense halides"),
    "liquid_density.temperature": Bound("K", "K", *_T, "the liquid's temperature, below the critical"),
    "solid_density": Bound("kg/m3", "kg/m3", 50.0, 5000.0, "solid hydrogen 86 kg/m3 upwards"),
    "solid_density.temperature": Bound("K", "K", *_T, "the solid's temperature, below the critical"),
    "liquid_heat_capacity": Bound("J/(mol*K)", "J/(mol*K)", 5.0, 1000.0, "liquid helium to heavy organics"),
    "liquid_heat_capacity.temperature": Bound("K", "K", *_T, "the liquid's temperature, below the critical"),
    "saturated_vapor_density": Bound("kg/m3", "kg/m3", 1e-10, 2000.0,
                                     "propane at its triple point, 1e-8 kg/m3, to near-critical halides"),
    "saturated_vapor_density.temperature": Bound("K", "K", *_T, "the vapour's temperature, below the critical"),
    "enthalpy_of_vaporization": Bound("J/mol", "kJ/mol", 0.05, 200.0, "helium 0.08 kJ/mol to heavy organics"),
    "enthalpy_of_vaporization.temperature": Bound("K", "K", *_T, "the boiling temperature, below the critical"),
}

# the lowest triple-point temperature of a real substance relative to its critical temperature is
# about 0.23 (propane, 85.5 K / 369.9 K); far below it the vapour-pressure estimate underflows
MIN_TRIPLE_RATIO = 0.1
# the data's triple-point pressure and the model's boiling line at the triple-point temperature
# agree within a factor of 6.1 for the built-in substances (methanol's corresponding-states
# estimate; the others within 1.7): a larger factor is a unit slip (kPa, bar typed as Pa)
TRIPLE_PRESSURE_FACTOR = 30.0

# the solid's density over the liquid's at the triple point: water's ice 0.92 (it floats), the built-in
# substances from 1.09 (hydrogen) to 1.37 (sulfur hexafluoride); further off is a slip in one of them
SOLID_TO_LIQUID = (0.8, 1.6)

# line coefficients (lines.py's forms), in K and Pa, or in the line's own p_unit and t_unit (Antoine)
LINE_NUMBERS: dict[str, tuple[float, float]] = {
    "Tc": _T, "Tt": _T, "T0": _T, "T_min": _T, "T_max": _T,
    "pc": (FIELDS["critical_pressure"].low, FIELDS["critical_pressure"].high),
    "pt": (FIELDS["triple_point_pressure"].low, FIELDS["triple_point_pressure"].high),
    "p0": (0.0, 1e9),
    "A": (-50.0, 50.0), "B": (0.0, 1e5), "C": (-1000.0, 1000.0),  # log10(p) = A - B/(T + C)
    "a": (-1e13, 1e13), "c": (0.01, 100.0),  # Simon-Glatzel p = p0 + a((T/T0)^c - 1)
}
# coefficient lists (n, a, b) and exponent lists (t, s): how large, and how many terms
LINE_COEFFICIENT = 1e12
LINE_EXPONENT = (0.0, 30.0)
LINE_TERMS = 12
LIST_TEXT = 1000  # characters of a list typed as text, "[1.5, -2]"

TEXTS: dict[str, int] = {"name": 100, "formula": 100, "designation": 100, "aliases": 500, "note": 2000,
                         "associating": 10, "reference": 2000, "form": 40, "p_unit": 10, "t_unit": 10,
                         "unit": 40, "equation": 100}
