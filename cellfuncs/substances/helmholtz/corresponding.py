"""The model of a substance without its own equation of state: its fluid mapped onto the reference
fluid's equation (mapped.py), its lines and solid as in the general model.

The general model of the same definition is built first: its vapour-pressure line (the published
equation, continued by Lee and Kesler's) and its saturated liquid volume (the anchored Rackett
equation) are what the mapping reproduces.

>>> from cellfuncs.substances import lookup
>>> butane = lookup("n-butane")
>>> butane.equation.title.split(" onto ")[0]
'corresponding-states mapping of n-butane'
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..general.definition import Definition
from ..general.model import GeneralSubstance
from ..result import BAD_ARGUMENT, ModelError
from .mapped import REFERENCE_FLUID, MappedEquation, VapourDatum
from .saturation import Saturation
from .substance import EquationSubstance

# The reference fluid's phase equilibrium is tabulated for the mapping down to this temperature,
# 25 K below propane's triple point (an extrapolation of its equation, smooth there): the alcohols'
# shape factor theta reaches 1.4, so their triple points (ethanol 0.31 Tc) map below propane's own.
_REFERENCE_T_LOW = 60.0  # K


# Quantum fluids stay with the general model: their reduced properties depart from a classical
# reference's as their de Boer parameter grows, which shows as a markedly negative acentric
# factor (helium-4 -0.39, hydrogen -0.22; neon, -0.04, still maps well).
_QUANTUM_OMEGA = -0.1


def applies(estimate: GeneralSubstance) -> bool:
    """Whether a substance's fluid is mapped onto the reference fluid (not a quantum fluid)."""
    return estimate.omega > _QUANTUM_OMEGA


@lru_cache(maxsize=1)
def _reference() -> tuple[EquationSubstance, Saturation]:
    from .. import lookup

    ref = lookup(REFERENCE_FLUID)
    return ref, Saturation(ref.equation, _REFERENCE_T_LOW, ref.boil_pressure_estimate, ref.liquid_density_guess)


def _vapour_datum(definition: Definition, molar_mass: float) -> VapourDatum | None:
    """The definition's saturated-vapour density or else its enthalpy of vaporization, if it has one."""
    values, associating = definition.values, definition.associating
    if "saturated_vapor_density" in values:
        return VapourDatum(values["saturated_vapor_density.temperature"], values["saturated_vapor_density"] / molar_mass,
                           None, associating)
    if "enthalpy_of_vaporization" in values:
        return VapourDatum(values["enthalpy_of_vaporization.temperature"], None, values["enthalpy_of_vaporization"],
                           associating)
    return None


class MappedSubstance(EquationSubstance):
    """An EquationSubstance whose equation is the reference fluid's, mapped by shape factors."""

    equation: MappedEquation

    def __init__(self, definition: Definition, estimate: GeneralSubstance):
        reference, table = _reference()
        values, M = definition.values, estimate.molar_mass
        rho_c = values.get("critical_density")
        try:
            equation = MappedEquation(
                definition.name, estimate.name, estimate.tc, estimate.pc, M, estimate.t_low,
                estimate.boil_pressure_estimate, lambda T: 1.0 / estimate.liquid.saturated(T), estimate.ideal_gas,
                reference.equation, table, None if rho_c is None else rho_c / M, _vapour_datum(definition, M))
        except ArithmeticError as e:
            raise ModelError(BAD_ARGUMENT, f"{e}: the definition's vapour-pressure line and liquid density are "
                             f"beyond what corresponding states with {REFERENCE_FLUID} can represent; check boil.*, "
                             "liquid_density and the critical point") from None
        super().__init__(definition, equation)

    def liquid_density_guess(self, T: np.ndarray) -> np.ndarray:
        return self.equation.saturated_liquid(T)

    def _models(self) -> dict[str, tuple[str, str]]:
        models = super()._models()
        line = GeneralSubstance._models(self)["boil"][0]
        models["boil"] = (f"{line}, reproduced by the mapped equation's phase equilibrium",
                          models["boil"][1])
        return models
