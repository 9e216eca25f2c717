"""gasdyn2d: steady two-dimensional supersonic flow of a perfect gas."""

from .errors import (
    DetachedShockError,
    GasDynamicsError,
    IllPosedProblemError,
    InvalidInputError,
    NoSolutionError,
    ProbablyDegreesWarning,
)
from .relations.gas import AIR, AIR_THERMALLY_PERFECT, Gas
from .relations.isentropic import IsentropicFlow, isentropic_flow
from .relations.expansion_fans import ExpansionFan, expansion_fan, mach_from_prandtl_meyer, prandtl_meyer
from .relations.normal_shocks import NormalShock, normal_shock
from .relations.oblique_shocks import ObliqueShock, max_deflection, oblique_shock, sonic_deflection
from .relations.flow_state import FlowState
from .patterns.graph import WavePattern
from .patterns.solution import (
    MeetingPoint,
    PatternCondition,
    PatternSolution,
    RegionSolution,
    WaveConnection,
    WaveSolution,
)
from .patterns.reflections import (
    FreeBoundaryReflection,
    ReflectionTransition,
    TransitionCondition,
    WallReflection,
    free_boundary_reflection,
    reflection_transition,
    wall_reflection,
)
from .patterns.interactions import (
    MergingShocks,
    PressureMatchingWave,
    ShockCrossing,
    merging_shocks,
    shock_crossing,
    turn_to_pressure,
)
from .patterns.polars import PressureDeflectionPolar, pressure_deflection_polar
from .design.sections import Section
from .characteristics.unit_processes import CharacteristicNet, WallContour
from .characteristics.nozzles import MinimumLengthNozzle, RoundedThroatNozzle, minimum_length_nozzle, rounded_throat_nozzle
from .characteristics.channels import ChannelFlow, channel_flow
from .characteristics.jets import SlotJet, underexpanded_slot_jet
from .characteristics.jet_cells import SlotJetCells, slot_jet_cells
from .characteristics.conical_nozzles import ConicalNozzle, conical_nozzle
from .characteristics.performance import NozzlePerformance
from .design.section_loads import SectionLoads, linear_loads, second_order_loads, shock_expansion_loads
from .design.intakes import RampIntake, ramp_intake
from .design.intake_design import ContractionLimits, OptimalRamps, contraction_limits, optimal_ramps
from .relations.conical_flow import ConeFlow, cone_flow, max_cone_angle, sonic_cone_angle
from .relations.cone_shock_layer import ConeShockLayer, cone_shock_layer
from .relations.cone_probes import cone_probe_flow
from .design.spike_intakes import SpikeIntake, spike_intake
from .design.cone_loads import ConeCylinderForebody, ConeWaveDrag, cone_cylinder_forebody, cone_wave_drag
from .design.near_fields import NearFieldShock, SectionNearField, section_near_field


def __getattr__(name):
    """``gasdyn2d.ureg``: pint's application registry, for writing ``10 * ureg.deg``
    (looked up when first asked for, so that ``import gasdyn2d`` does not import pint)."""
    if name == "ureg":
        from .boundary.units import application_registry

        return application_registry()
    raise AttributeError(f"module 'gasdyn2d' has no attribute {name!r}")


__all__ = [
    "AIR", "AIR_THERMALLY_PERFECT", "Gas", "FlowState", "ureg",
    "isentropic_flow", "IsentropicFlow",
    "normal_shock", "NormalShock",
    "oblique_shock", "ObliqueShock", "max_deflection", "sonic_deflection",
    "prandtl_meyer", "mach_from_prandtl_meyer", "expansion_fan", "ExpansionFan",
    "WavePattern", "PatternSolution", "RegionSolution", "WaveSolution", "WaveConnection",
    "PatternCondition", "MeetingPoint",
    "wall_reflection", "WallReflection", "reflection_transition", "ReflectionTransition",
    "TransitionCondition", "shock_crossing", "ShockCrossing", "merging_shocks", "MergingShocks",
    "free_boundary_reflection", "FreeBoundaryReflection", "turn_to_pressure",
    "PressureMatchingWave", "pressure_deflection_polar", "PressureDeflectionPolar",
    "minimum_length_nozzle", "MinimumLengthNozzle", "rounded_throat_nozzle",
    "RoundedThroatNozzle", "channel_flow", "ChannelFlow", "underexpanded_slot_jet", "SlotJet",
    "slot_jet_cells", "SlotJetCells",
    "WallContour", "CharacteristicNet",
    "conical_nozzle", "ConicalNozzle", "NozzlePerformance",
    "Section", "SectionLoads", "shock_expansion_loads", "linear_loads", "second_order_loads",
    "ramp_intake", "RampIntake", "optimal_ramps", "OptimalRamps", "contraction_limits",
    "ContractionLimits",
    "GasDynamicsError", "InvalidInputError", "DetachedShockError", "NoSolutionError",
    "IllPosedProblemError", "ProbablyDegreesWarning",
    "cone_flow", "ConeFlow", "max_cone_angle", "sonic_cone_angle", "cone_shock_layer",
    "ConeShockLayer", "cone_probe_flow", "spike_intake", "SpikeIntake", "cone_wave_drag",
    "ConeWaveDrag", "cone_cylinder_forebody", "ConeCylinderForebody",
    "section_near_field", "SectionNearField", "NearFieldShock",
]
__version__ = "0.1.0"
