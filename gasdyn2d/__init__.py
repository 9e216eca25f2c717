"""gasdyn2d: steady two-dimensional supersonic flow of a perfect gas."""

from .errors import (
    DetachedShockError,
    GasDynamicsError,
    IllPosedProblemError,
    InvalidInputError,
    NoSolutionError,
    ProbablyDegreesWarning,
)
from .gas import AIR, Gas
from .isentropic import IsentropicFlow, isentropic_flow
from .expansion import ExpansionFan, expansion_fan, mach_from_prandtl_meyer, prandtl_meyer
from .normal_shocks import NormalShock, normal_shock
from .oblique_shocks import ObliqueShock, max_deflection, oblique_shock, sonic_deflection
from .state import FlowState
from .sections import Section
from .section_loads import SectionLoads, linear_loads, second_order_loads, shock_expansion_loads
from .intakes import RampIntake, ramp_intake
from .intake_design import ContractionLimits, OptimalRamps, contraction_limits, optimal_ramps

#: pint's application registry, for writing ``10 * ureg.deg``.
from ._numerics import ureg as _ureg

ureg = _ureg()

__all__ = [
    "AIR", "Gas", "FlowState", "ureg",
    "isentropic_flow", "IsentropicFlow",
    "normal_shock", "NormalShock",
    "oblique_shock", "ObliqueShock", "max_deflection", "sonic_deflection",
    "prandtl_meyer", "mach_from_prandtl_meyer", "expansion_fan", "ExpansionFan",
    "Section", "SectionLoads", "shock_expansion_loads", "linear_loads", "second_order_loads",
    "ramp_intake", "RampIntake", "optimal_ramps", "OptimalRamps", "contraction_limits",
    "ContractionLimits",
    "GasDynamicsError", "InvalidInputError", "DetachedShockError", "NoSolutionError",
    "IllPosedProblemError", "ProbablyDegreesWarning",
]
__version__ = "0.1.0"
