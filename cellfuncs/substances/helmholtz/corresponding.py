"""The model of a substance without its own equation of state: its fluid mapped onto a reference
fluid's equation (mapped.py), its lines and solid as in the general model.

The general model of the same definition is built first: its vapour-pressure line (the published
equation, continued by Lee and Kesler's) and its saturated liquid volume (the anchored Rackett
equation) are what the mapping reproduces.

The reference fluid is propane for a classical fluid and parahydrogen for a quantum fluid (acentric
factor below -0.1: helium-4, -0.39): their reduced properties depart from a classical reference's as
their de Boer parameter grows, and a quantum reference shares that departure in part. A quantum fluid
may have no triple point (helium-4 stays liquid down to 0 K at its vapour pressure); its range then
reaches down to the reference's triple point in reduced temperature (parahydrogen's 0.419 Tc:
helium-4's 2.177 K, a fraction of a millikelvin above its lambda point), below the published
vapour-pressure line with the shape factors continued: the vapour pressure there is the mapping's own
prediction, not the general model's Lee-Kesler continuation.

>>> from cellfuncs.substances import lookup
>>> butane = lookup("n-butane")
>>> butane.equation.title.split(" onto ")[0]
'corresponding-states mapping of n-butane'
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from ..general.definition import Definition
from ..general.model import GeneralSubstance
from ..result import BAD_ARGUMENT, ModelError, fmt
from ...numerics import anywhere
from .mapped import MappedEquation, VapourDatum
from .saturation import Saturation
from .substance import EquationSubstance

CLASSICAL_REFERENCE = "propane"  # long liquid range (Tr from 0.23), a reference equation to 1000 MPa
QUANTUM_REFERENCE = "parahydrogen"  # one nuclear-spin species; liquid from 0.419 Tc, equation to 1000 K
# A quantum fluid's departure from classical corresponding states shows as a markedly negative
# acentric factor (helium-4 -0.39, hydrogen -0.22; neon, -0.04, still maps well onto propane).
_QUANTUM_OMEGA = -0.1
# The reference fluid's phase equilibrium is tabulated for the mapping from its triple point, propane's
# from 25 K below it (an extrapolation of its equation, smooth there): the alcohols' shape factor theta
# reaches 1.4, so their triple points (ethanol 0.31 Tc) map below propane's own.
_REFERENCE_T_LOW = {CLASSICAL_REFERENCE: 60.0}  # K
_ROUND = 1e4  # 1/K: the lowest temperature of a quantum fluid without a triple point, rounded up to 0.1 mK


def reference_fluid(estimate: GeneralSubstance) -> str:
    """The reference fluid a substance's fluid is mapped onto: the quantum one for a quantum fluid."""
    return QUANTUM_REFERENCE if estimate.omega <= _QUANTUM_OMEGA else CLASSICAL_REFERENCE


@lru_cache(maxsize=2)
def _reference(key: str) -> tuple[EquationSubstance, Saturation]:
    from .. import lookup

    ref = lookup(key)
    return ref, Saturation(ref.equation, _REFERENCE_T_LOW.get(key, ref.t_low), ref.boil_pressure_estimate,
                           ref.liquid_density_guess)


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
        key = reference_fluid(estimate)
        reference, table = _reference(key)
        values, M = definition.values, estimate.molar_mass
        rho_c = values.get("critical_density")
        # a quantum fluid without a triple point: down to the reference's in reduced temperature, rounded
        # up to 0.1 mK, so that the range as SUBSTANCE_INFO prints it is the range itself
        lowest = (math.ceil(reference.t_low * estimate.tc / reference.tc * _ROUND) / _ROUND
                  if key == QUANTUM_REFERENCE and not estimate.has_triple else None)
        try:
            equation = MappedEquation(
                definition.name, estimate.name, estimate.tc, estimate.pc, M, estimate.t_low,
                estimate.boil_pressure_estimate, lambda T: 1.0 / estimate.liquid.saturated(T), estimate.ideal_gas,
                reference.equation, table, None if rho_c is None else rho_c / M, _vapour_datum(definition, M),
                lowest)
        except ArithmeticError as e:
            raise ModelError(BAD_ARGUMENT, f"{e}: the definition's vapour-pressure line and liquid density are "
                             f"beyond what corresponding states with {key} can represent; check boil.*, "
                             "liquid_density and the critical point") from None
        # the quantum reference's range carried over by corresponding states (parahydrogen's 1000 K is
        # helium-4's 158 K), stated because the mapping serves gases to 1000 K
        self._carried = ((reference.equation.T_max, reference.equation.T_max * estimate.tc / reference.tc)
                         if key == QUANTUM_REFERENCE else None)
        super().__init__(definition, equation)

    def _setup_boil(self) -> None:
        super()._setup_boil()
        self.t_low = min(self.t_low, self.equation.T_min)

    def boil_pressure_estimate(self, T: np.ndarray) -> np.ndarray:
        """The general model's vapour pressure; below the data (a quantum fluid without a triple
        point) the mapping's own."""
        published = super().boil_pressure_estimate(T)
        eq = self.equation
        T = np.asarray(T, dtype=float)
        below = (T >= eq.T_min) & (T < eq.fitted_from)
        if not anywhere(below):
            return published
        return np.where(below, eq.vapour_pressure(np.clip(T, eq.T_min, eq.fitted_from)), published)

    def liquid_density_guess(self, T: np.ndarray) -> np.ndarray:
        return self.equation.saturated_liquid(T)

    def _models(self) -> dict[str, tuple[str, str]]:
        models = super()._models()
        eq = self.equation
        line = GeneralSubstance._models(self)["boil"][0]
        below = (f"; below {fmt(eq.fitted_from)} K the mapping's own prediction (its shape factors continued, "
                 "the liquid density an extrapolation of the data's)"
                 if eq.T_min < eq.fitted_from else "")
        models["boil"] = (f"{line}, reproduced by the mapped equation's phase equilibrium{below}", models["boil"][1])
        if self._carried is not None and self._carried[1] < eq.T_max:
            title, span = models["equation"]
            models["equation"] = (title, f"{span}; above {fmt(self._carried[1])} K (the reference equation's "
                                  f"{fmt(self._carried[0])} K in corresponding states) an extrapolation of it")
        return models
