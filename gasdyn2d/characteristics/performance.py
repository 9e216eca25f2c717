"""What a nozzle delivers: mass flow, thrust, thrust coefficient and specific impulse.

Every nozzle result of this package (minimum-length, rounded-throat, conical;
planar or round) carries the flow on its exit plane as computed by its
characteristic net, and a ``performance(p0=..., T0=..., p_ambient=...)`` method
returning a :class:`NozzlePerformance`. The exit-plane integrals are taken once
per nozzle; the quantities then follow in closed form for any stagnation
state and ambient pressure, so an altitude sweep is one vectorised call.

Plain core: :func:`choked_mass_flow_parameter`, :func:`ideal_thrust_coefficient`,
:func:`exit_plane_integrals`, :class:`ExitPlane`. Unit boundary:
:func:`nozzle_performance` (called by the results' ``performance`` methods).

Planar nozzles are per unit depth (a throat of half-height h has the area 2h
per metre of depth: mass flow in kg/(s·m), thrust in N/m); round nozzles are
in absolute units (throat area π r*², kg/s, N).
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary import Call
from ..boundary.results import ResultTable, result_fields, unit_field
from ..errors import InvalidInputError
from ..relations.gas import AIR, Gas, refuse_thermally_perfect
from ..relations.isentropic import mach_from_area_ratio, pressure_ratio, temperature_ratio

__all__ = [
    "NozzlePerformance",
    "ExitPlane",
    "nozzle_performance",
    "choked_mass_flow_parameter",
    "ideal_thrust_coefficient",
    "exit_plane_integrals",
    "SUMMERFIELD_PRESSURE_RATIO",
    "STANDARD_GRAVITY",
]

#: g0 [m/s²], the standard acceleration of gravity (a defined constant; CGPM 1901)
STANDARD_GRAVITY = 9.80665
#: Summerfield criterion (an estimate): an over-expanded nozzle flow separates from the wall
#: where the wall pressure falls below about 0.25-0.4 of the ambient pressure (Summerfield,
#: Foster & Swan 1954, from memory); the upper end is taken, flagging separation early
SUMMERFIELD_PRESSURE_RATIO = 0.4
#: |p_exit/p_ambient - 1| below this counts as matched (common practice: a label, not physics)
MATCHED_TOLERANCE = 1e-3


def choked_mass_flow_parameter(gamma=1.4):
    """Plain core: ṁ √(R T0) / (p0 A*) = √γ (2/(γ+1))^((γ+1)/(2(γ-1))) of a choked throat.

    The mass flow of a sonic throat of area A* is
    ṁ = p0 A* √(γ/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1))) (Sutton, *Rocket
    Propulsion Elements*, the choked-flow relation; /work/shared/SOURCES.md).

    Examples
    --------
    >>> from gasdyn2d.characteristics.performance import choked_mass_flow_parameter
    >>> round(float(choked_mass_flow_parameter(1.4)), 9)   # √1.4 (5/6)^3
    0.684731456

    """
    gamma = np.asarray(gamma, dtype=float)
    return np.sqrt(gamma) * (2.0 / (gamma + 1.0)) ** ((gamma + 1.0) / (2.0 * (gamma - 1.0)))


def ideal_thrust_coefficient(area_ratio, p_ambient_p0, gamma=1.4):
    """Plain core: the 1-D ideal thrust coefficient CF of a nozzle of exit-to-throat area ratio ε.

    CF = √(2γ²/(γ-1) (2/(γ+1))^((γ+1)/(γ-1)) (1 - (pe/p0)^((γ-1)/γ))) + (pe - pa)/p0 · ε,

    with pe/p0 the isentropic pressure ratio of the supersonic Mach number of
    the area ratio ε. Uniform, parallel exit flow; pa/p0 may be an array.

    References
    ----------
    Sutton, G. P. & Biblarz, O., *Rocket Propulsion Elements*, the ideal
    thrust coefficient (equation number from memory: 3-30);
    /work/shared/SOURCES.md, "Nozzle performance".

    Examples
    --------
    Mach 2 exit (A/A* = 1.6875), matched and in vacuum:

    >>> from gasdyn2d.characteristics.performance import ideal_thrust_coefficient
    >>> from gasdyn2d.relations.isentropic import pressure_ratio
    >>> round(float(ideal_thrust_coefficient(1.6875, pressure_ratio(2.0))), 6)
    1.207753
    >>> round(float(ideal_thrust_coefficient(1.6875, 0.0)), 6)
    1.423423
    """
    gamma = float(gamma)
    p_exit = pressure_ratio(mach_from_area_ratio(np.asarray(area_ratio, dtype=float), gamma),
                            gamma)
    g1 = gamma - 1.0
    momentum = np.sqrt(2.0 * gamma * gamma / g1 * (2.0 / (gamma + 1.0)) ** ((gamma + 1.0) / g1)
                       * (1.0 - p_exit ** (g1 / gamma)))
    return momentum + (p_exit - np.asarray(p_ambient_p0, dtype=float)) * area_ratio


@dataclasses.dataclass(frozen=True)
class ExitPlane:
    """Plain core: the computed flow across a nozzle's exit plane (SI, from the axis up).

    ``y`` is the distance from the axis or centreline [m], from 0 to the lip;
    ``mach`` and ``theta`` [rad] the flow there. Planar planes stand for both
    halves per metre of depth.
    """

    geometry: str  #: "planar" or "axisymmetric"
    throat_size: float  #: throat half-height or radius [m]
    y: np.ndarray  #: distance from the axis [m], increasing, 0 .. lip
    mach: np.ndarray  #: Mach number across the plane
    theta: np.ndarray  #: flow angle across the plane [rad]
    wall_p_p0: float  #: static over stagnation pressure at the lip (the wall's last point)
    discharge_coefficient: float  #: throat mass flow over that of a uniform sonic throat
    gamma: float  #: ratio of specific heats the net was computed with
    #: where the profile comes from: "characteristics" (the computed net) or a named model
    model: str = "characteristics"

    def __post_init__(self):
        for name in ("y", "mach", "theta"):  # read-only copies: the plane is immutable
            array = np.array(getattr(self, name), dtype=float)
            array.flags.writeable = False
            object.__setattr__(self, name, array)

    @classmethod
    def uniform(cls, geometry, throat_size, exit_size, mach, gamma, discharge_coefficient=1.0):
        """A uniform, parallel exit at ``mach`` from the axis to ``exit_size`` [m]."""
        y = np.array([0.0, exit_size])
        return cls(geometry, throat_size, y, np.full(2, float(mach)), np.zeros(2),
                   float(pressure_ratio(mach, gamma)), discharge_coefficient, gamma)

    def area(self, size):
        """Area [m² or m²/m] of a throat or exit of half-height or radius ``size`` [m]."""
        return np.pi * size * size if self.geometry == "axisymmetric" else 2.0 * size


def exit_plane_integrals(plane):
    """Plain core: the exit-plane integrals, per unit p0 and throat area.

    Returns a dict with ``mass`` = ∫ρu dA / (p0 A* √(γ/(R T0))),
    ``force`` = ∫(ρu² + p) dA / (p0 A*), ``axial_momentum`` = ∫ρu² dA /(p0 A*),
    ``momentum`` = ∫ρuV dA / (p0 A*), ``pressure`` = ∫p dA / (p0 A_exit), and
    ``area_ratio`` = A_exit/A*. Trapezoidal rule in y (second order; exact
    for a uniform exit), dA = 2π y dy (round) or 2 dy (planar, both halves).
    """
    gamma = plane.gamma
    y, mach, theta = plane.y, plane.mach, plane.theta
    p = pressure_ratio(mach, gamma)
    tau = temperature_ratio(mach, gamma)
    cos = np.cos(theta)
    mass_flux = mach * tau ** ((gamma + 1.0) / (2.0 * (gamma - 1.0))) * cos  # ρu/(p0√(γ/RT0))
    axial = gamma * p * mach * mach * cos * cos  # ρu²/p0
    along = gamma * p * mach * mach * cos  # ρuV/p0
    weight = 2.0 * np.pi * y if plane.geometry == "axisymmetric" else np.full_like(y, 2.0)

    def integral(f):
        g = f * weight
        return float(np.sum(0.5 * (g[1:] + g[:-1]) * np.diff(y)))

    throat = plane.area(plane.throat_size)
    exit_area = plane.area(float(y[-1]))
    return {"mass": integral(mass_flux) / throat, "force": integral(axial + p) / throat,
            "axial_momentum": integral(axial) / throat, "momentum": integral(along) / throat,
            "pressure": integral(p) / exit_area, "area_ratio": exit_area / throat}


@dataclasses.dataclass(frozen=True, repr=False)
class NozzlePerformance(ResultTable):
    """What a nozzle delivers at given stagnation and ambient pressures.

    Round nozzles in absolute units; planar ones per metre of depth (mass flow
    [kg/(s·m)], thrust [N/m]: the units shown below are the round ones). All
    fields broadcast over p0, T0 and p_ambient.
    """

    p_ambient: object = unit_field("Pa")  #: ambient pressure
    thrust: object = unit_field("N")  #: F = ∫(ρu² + p - pa) dA over the computed exit plane
    thrust_coefficient: object = unit_field("")  #: CF = F/(p0 A*)
    specific_impulse: object = unit_field("s")  #: F/(ṁ g0)
    effective_exhaust_velocity: object = unit_field("m/s")  #: F/ṁ
    mass_flow: object = unit_field("kg/s")  #: choked throat: Cd p0 A* √(γ/(R T0)) (2/(γ+1))^…
    mass_flow_exit_plane: object = unit_field("kg/s")  #: ∫ρu dA over the computed exit plane
    exit_pressure: object = unit_field("Pa")  #: area-mean static pressure on the exit plane
    exit_wall_pressure: object = unit_field("Pa")  #: static pressure at the lip
    #: "under-expanded", "over-expanded" or "matched"
    expansion_state: object = unit_field("", dtype=str)
    #: Summerfield estimate: wall p < 0.4 ambient
    separation_likely: object = unit_field("", dtype=bool)
    thrust_coefficient_ideal: object = unit_field("")  #: 1-D CF at the same area ratio (Sutton)
    divergence_factor: float = unit_field("")  #: ∫ρu² dA / ∫ρuV dA on the exit plane
    area_ratio: float = unit_field("")  #: exit-to-throat area ratio of the contour
    geometry: str = unit_field("")  #: "planar" (per unit depth) or "axisymmetric"
    #: "characteristics" (the exit plane of the computed net) or the model used instead
    exit_flow: str = unit_field("", default="characteristics")


def nozzle_performance(plane, *, p0, T0, p_ambient, gas=AIR, errors="raise"):
    """Performance of a nozzle whose exit plane is ``plane`` (unit boundary).

    Parameters
    ----------
    plane : ExitPlane
        The computed exit plane (a nozzle result's ``exit_plane``).
    p0 : float, ndarray or Quantity
        Stagnation pressure [Pa] (any pressure unit as a Quantity), > 0.
    T0 : float, ndarray or Quantity
        Stagnation temperature [K], > 0.
    p_ambient : float, ndarray or Quantity
        Ambient pressure [Pa], >= 0 (0: vacuum).
    gas : Gas, optional
        The gas; its γ must be the one the nozzle was designed with.
    errors : {"raise", "nan"}, optional

    Returns
    -------
    NozzlePerformance
        Quantities if any input was one (pressures in the unit of ``p0``, or
        of ``p_ambient`` if only it was a Quantity), plain SI otherwise.

    Notes
    -----
    F(pa) = p0 A* ∫(p/p0)(1 + γM² cos²θ) dÂ - pa A_exit over the exit plane of
    the net; ṁ = Cd p0 A* √(γ/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1))) at the throat
    (Cd from the transonic throat solution, 1 for a uniform sonic throat);
    Isp = F/(ṁ g0). The divergence factor is the momentum-averaged cos θ of
    the exit plane, ∫ρu² dA / ∫ρuV dA (1 for a uniform parallel exit; for a
    conical source flow it is Malina's (1 + cos α)/2 on the spherical cap
    through the lip, and nearly so on the flat plane). Separation is flagged
    where the wall pressure at the lip falls below
    ``SUMMERFIELD_PRESSURE_RATIO`` of ambient: Summerfield's criterion, an
    estimate of where an over-expanded nozzle's flow leaves the wall (the
    computed thrust assumes a full-flowing nozzle and is wrong there).

    References
    ----------
    Sutton & Biblarz, *Rocket Propulsion Elements* (thrust, thrust
    coefficient, choked mass flow; from memory); Summerfield, M., Foster, C.
    R. & Swan, W. C. (1954), Flow separation in overexpanded supersonic
    exhaust nozzles, *Jet Propulsion* 24, 319-321 (details from memory).
    """
    if not isinstance(gas, Gas):
        raise InvalidInputError(f"gas must be a gasdyn2d Gas (such as AIR); got {gas!r}.")
    refuse_thermally_perfect(gas, "gas", "nozzle performance (the method of characteristics)",
                             "The characteristics tools need a perfect gas: give "
                             "Gas(gamma=..., R=...).")
    if abs(gas.gamma - plane.gamma) > 1e-12 * plane.gamma:
        raise InvalidInputError(
            f"gas.gamma = {gas.gamma:g} differs from the gamma = {plane.gamma:g} the nozzle was "
            f"designed with; pass gas=Gas(gamma={plane.gamma:g}, R=...) or redesign the nozzle.")
    call = Call(errors)
    call.take("p0", p0, "Pa")
    call.take("T0", T0, "K")
    call.take("p_ambient", p_ambient, "Pa")
    integrals = exit_plane_integrals(plane)
    fields = _case_fields(plane.geometry)
    values = call.evaluate(fields, _checked_performance_core, plane=plane, integrals=integrals,
                           gas=gas)
    return NozzlePerformance(
        *values, divergence_factor=integrals["axial_momentum"] / integrals["momentum"],
        area_ratio=integrals["area_ratio"], geometry=plane.geometry, exit_flow=plane.model)


#: the fields of a NozzlePerformance that broadcast with p0, T0 and p_ambient
_CASE_FIELD_COUNT = 12
_PER_DEPTH = {"N": "N/m", "kg/s": "kg/(s·m)"}
_PER_DEPTH_PINT = {"N": "N/m", "kg/s": "kg/(s*m)"}


def _case_fields(geometry):
    """The case fields of a NozzlePerformance; planar ones per metre of depth."""
    fields = result_fields(NozzlePerformance)[:_CASE_FIELD_COUNT]
    if geometry != "planar":
        return fields
    return tuple(f._replace(unit=_PER_DEPTH.get(f.unit, f.unit),
                            pint_unit=_PER_DEPTH_PINT.get(f.unit, f.pint_unit)) for f in fields)



def _checked_performance_core(p0, T0, pa, check, *, plane, integrals, gas):
    """Checked core: the case fields for p0 [Pa], T0 [K], pa [Pa] (floats or arrays)."""
    p0 = check.positive(p0, "p0", "Pa")
    T0 = check.positive(T0, "T0", "K")
    pa = check.at_least(pa, "p_ambient", 0.0, what="0 is vacuum", unit_text="Pa")
    p0, T0, pa = (np.asarray(v, dtype=float) for v in (p0, T0, pa))  # 0-d for one case
    core = _performance_core(plane, integrals, p0, T0, pa, gas)
    return tuple(core[f.name] for f in result_fields(NozzlePerformance)[:_CASE_FIELD_COUNT])


def _performance_core(plane, integrals, p0, T0, pa, gas):
    """Plain-core performance fields (SI) for broadcast arrays p0, T0, pa."""
    gamma = plane.gamma
    throat = plane.area(plane.throat_size)
    exit_area = integrals["area_ratio"] * throat
    flow_scale = p0 * throat * np.sqrt(gamma / (gas.R * T0))
    # choked throat: ṁ = Cd p0 A* √(γ/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1)))
    mass_flow = plane.discharge_coefficient * (2.0 / (gamma + 1.0)) ** (
        (gamma + 1.0) / (2.0 * (gamma - 1.0))) * flow_scale
    thrust = p0 * throat * integrals["force"] - pa * exit_area
    exit_pressure = p0 * integrals["pressure"]
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = exit_pressure / pa
        state = np.where(np.abs(ratio - 1.0) <= MATCHED_TOLERANCE, "matched",
                         np.where(ratio > 1.0, "under-expanded", "over-expanded"))
        separated = plane.wall_p_p0 * p0 < SUMMERFIELD_PRESSURE_RATIO * pa
        state = np.where(np.isnan(ratio), "", state)
        velocity = thrust / mass_flow
    return {
        "p_ambient": pa, "thrust": thrust, "thrust_coefficient": thrust / (p0 * throat),
        "specific_impulse": velocity / STANDARD_GRAVITY,
        "effective_exhaust_velocity": velocity, "mass_flow": mass_flow,
        "mass_flow_exit_plane": integrals["mass"] * flow_scale,
        "exit_pressure": exit_pressure, "exit_wall_pressure": plane.wall_p_p0 * p0,
        "expansion_state": state, "separation_likely": separated,
        "thrust_coefficient_ideal": ideal_thrust_coefficient(integrals["area_ratio"], pa / p0,
                                                             gamma),
    }


class NozzlePerformanceMixin:
    """Gives a nozzle result with an ``exit_plane`` field its ``performance`` method."""

    def performance(self, *, p0, T0, p_ambient, gas=AIR, errors="raise"):
        """Mass flow, thrust, thrust coefficient and specific impulse of this nozzle.

        See :func:`gasdyn2d.characteristics.performance.nozzle_performance`: p0
        [Pa] and T0 [K] are the stagnation state, p_ambient [Pa] the ambient
        pressure (arrays broadcast: an altitude sweep in one call; Quantities
        in any unit), ``gas`` the perfect gas of the design's γ.

        Returns
        -------
        NozzlePerformance
        """
        return nozzle_performance(self.exit_plane, p0=p0, T0=T0, p_ambient=p_ambient, gas=gas,
                                  errors=errors)
