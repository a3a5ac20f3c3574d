"""Constants the substance models share, each read once from its data file.

>>> round(R, 9)
8.314462618
>>> P_STANDARD
101325.0
"""

from __future__ import annotations

from ..data import constant

# J/(mol K): N_A k, exact since the 2019 SI (CODATA 2018 prints 8.314 462 618...)
R = constant("physical", "avogadro_constant").value * constant("physical", "boltzmann_constant").value
# Pa: the standard atmosphere, the reference pressure of CHEM_POTENTIAL and of the published lines' "atm"
P_STANDARD = constant("atmosphere", "sea_level_pressure").value
# K: the standard temperature, lower end of the ideal-gas enthalpy and entropy integrals
T_STANDARD = constant("correlations", "reference_temperature").value
