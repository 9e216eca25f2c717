"""Wave drag of cones and cone-cylinder forebodies at zero incidence.

The pressure on a cone at zero incidence is uniform (conical flow), so its wave
(pressure) drag on the base area is simply the surface pressure coefficient. On a
cone-cylinder the cylinder is parallel to the stream and adds no pressure drag,
but the flow turns through the cone angle at the shoulder, where the pressure
drops below the free-stream value before recovering downstream.

Plain core (floats and ndarrays, radians, no pint):

- :func:`slender_cone_drag` — the linearised slender-body estimate;
- :func:`shoulder_expansion` — Mach number and pressure coefficient just behind
  the cone-cylinder shoulder.

Unit boundary: :func:`cone_wave_drag` (result :class:`ConeWaveDrag`) and
:func:`cone_cylinder_forebody` (result :class:`ConeCylinderForebody`).
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numpy as np

from .. import _numerics as nx
from .._display import ResultTable, unit_field
from ..relations.conical_flow import _check_cone_angle, _reject_detached, cone_flow_from_cone_angle
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from ..relations.isentropic import pressure_ratio

__all__ = ["cone_wave_drag", "ConeWaveDrag", "cone_cylinder_forebody", "ConeCylinderForebody",
           "slender_cone_drag", "ShoulderExpansion", "shoulder_expansion"]


# ------------------------------------------------------------------ plain core


def slender_cone_drag(M1, cone_angle):
    """Plain core: linearised (slender-body) wave-drag coefficient of a cone on its base area.

    cp = θc² [2 ln(2/(θc √(M1² - 1))) - 1], the surface pressure coefficient of the
    linearised conical flow (von Kármán & Moore 1932; form from memory).

    Parameters
    ----------
    M1 : float or ndarray
        Free-stream Mach number [-], > 1.
    cone_angle : float or ndarray
        Cone half-angle θc [rad].

    Returns
    -------
    float or ndarray
        Drag coefficient [-]; good for θc √(M1² - 1) ≪ 1 (the exact value exceeds it,
        by ~1 % at M1 2 and θc 0.03 rad, ~9 % at θc 0.1 rad).

    Examples
    --------
    >>> from gasdyn2d.design.cone_loads import slender_cone_drag
    >>> round(float(slender_cone_drag(2.0, 0.01)), 8)
    0.0008498
    """
    M1, theta = np.asarray(M1, dtype=float), np.asarray(cone_angle, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return theta * theta * (2.0 * np.log(2.0 / (theta * np.sqrt((M1 - 1.0) * (M1 + 1.0))))
                                - 1.0)


class ShoulderExpansion(NamedTuple):
    """Plain-core result of :func:`shoulder_expansion` (ndarrays)."""

    M: np.ndarray
    p_p1: np.ndarray
    cp: np.ndarray


def shoulder_expansion(M1, M_cone, p_cone_p1, cone_angle, gamma=1.4):
    """Plain core: the flow just behind the shoulder of a cone-cylinder.

    Parameters
    ----------
    M1 : float or ndarray
        Free-stream Mach number [-].
    M_cone, p_cone_p1 : float or ndarray
        Surface Mach number and pressure ratio of the cone [-].
    cone_angle : float or ndarray
        Cone half-angle [rad]: the turn at the shoulder.
    gamma : float or ndarray
        Ratio of specific heats [-].

    Returns
    -------
    ShoulderExpansion
        Mach number, p/p1 and pressure coefficient on the cylinder just behind the
        shoulder; NaN where the cone's surface flow is subsonic.

    Notes
    -----
    Close to the corner the expansion is planar: a Prandtl–Meyer turn by θc from the
    cone's surface state, ν(M) = ν(M_cone) + θc (NACA Report 1135, eq. 171), isentropic
    (eq. 44). Downstream the cylinder pressure recovers towards p1 as the axisymmetric
    waves spread, which this local estimate does not follow (common practice for
    preliminary loads).

    Examples
    --------
    >>> from gasdyn2d.design.cone_loads import shoulder_expansion
    >>> after = shoulder_expansion(2.0, 1.83403, 1.29252, 0.174533)
    >>> round(float(after.M), 3), bool(after.cp < 0)
    (2.199, True)
    """
    M1, M_cone, p_cone, theta = (np.asarray(v, dtype=float)
                                 for v in (M1, M_cone, p_cone_p1, cone_angle))
    with np.errstate(invalid="ignore"):
        supersonic = M_cone >= 1.0
        nu = prandtl_meyer_angle(np.where(supersonic, M_cone, np.nan), gamma) + theta
        M = mach_from_prandtl_meyer_angle(nu, gamma)
        p = p_cone * pressure_ratio(M, gamma) / pressure_ratio(M_cone, gamma)
        cp = 2.0 * (p - 1.0) / (gamma * M1 * M1)
    return ShoulderExpansion(M, p, cp)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class ConeWaveDrag(ResultTable):
    """Wave (pressure) drag of a cone at zero incidence, on its base area."""

    M: object = unit_field("")  #: free-stream Mach number
    cone_angle: object = unit_field("rad")  #: cone half-angle θc
    drag_coefficient: object = unit_field("")  #: pressure drag over (q1 × base area) = cp_cone
    slender_body_drag_coefficient: object = unit_field("")  #: linearised estimate
    p_cone_p1: object = unit_field("")  #: surface pressure over free-stream static pressure
    M_cone: object = unit_field("")  #: surface Mach number


@dataclasses.dataclass(frozen=True, repr=False)
class ConeCylinderForebody(ResultTable):
    """A conical nose on a cylinder of the same diameter, at zero incidence.

    Lengths in the unit of ``body_diameter`` (Quantities when it was one); ``drag``
    is a force when ``free_stream_pressure`` was given (NaN otherwise).
    """

    M: object = unit_field("")  #: free-stream Mach number
    cone_angle: object = unit_field("rad")  #: nose half-angle θc
    body_diameter: object = unit_field("m")  #: cylinder (and nose base) diameter
    nose_length: object = unit_field("m")  #: tip to shoulder
    fineness_ratio: object = unit_field("")  #: nose length over body diameter
    drag_coefficient: object = unit_field("")  #: forebody wave drag over (q1 × cross-section)
    drag: object = unit_field("N")  #: forebody wave drag (needs the free-stream pressure)
    cp_cone: object = unit_field("")  #: pressure coefficient on the nose
    M_cone: object = unit_field("")  #: Mach number on the nose
    shoulder_mach: object = unit_field("")  #: Mach number just behind the shoulder
    shoulder_cp: object = unit_field("")  #: pressure coefficient just behind the shoulder


def _cone_inputs(M, cone_angle, gamma, errors, **others):
    """Convert, broadcast and check M, θc, γ (and other named arrays); the cone flow too."""
    nx.check_errors_mode(errors)
    M, unit_m = nx.to_si(M, "M", "dimensionless")
    theta, unit_theta = nx.to_si(cone_angle, "cone_angle", "angle")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    arrays = nx.broadcast(M=M, cone_angle=theta, gamma=gamma, **others)
    M, theta, gamma, rest = arrays[0], arrays[1], arrays[2], arrays[3:]
    gamma = nx.check_gamma(gamma, errors)
    M = nx.check_finite_at_least(M, "M", 1.0, errors, what="supersonic flow", inclusive=False)
    theta = _check_cone_angle(theta, errors)
    flow = cone_flow_from_cone_angle(M, theta, gamma)
    failed = np.isnan(flow.wave_angle) & ~np.isnan(theta) & ~np.isnan(M) & ~np.isnan(gamma)
    if np.any(failed):
        theta = _reject_detached(theta, M, gamma, failed, errors)
        flow = cone_flow_from_cone_angle(M, theta, gamma)
    return M, theta, gamma, rest, flow, unit_m, unit_theta


def cone_wave_drag(M, cone_angle, *, gamma=1.4, errors="raise"):
    """Wave (pressure) drag coefficient of a cone at zero incidence, on its base area.

    Parameters
    ----------
    M : float or array_like
        Free-stream Mach number [-], > 1.
    cone_angle : float, array_like or Quantity
        Cone half-angle [rad], 0 <= θc <= θc,max(M, γ).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ConeWaveDrag

    Notes
    -----
    The axial component of the uniform surface pressure over the lateral area is
    (p_cone - p1) × base area, so C_D = cp_cone (Taylor & Maccoll 1933; conical flow
    from :func:`~gasdyn2d.relations.conical_flow.cone_flow`). Base drag and skin
    friction are not included. The slender-body estimate
    (:func:`slender_cone_drag`) is given beside it.

    Examples
    --------
    The nose of an invented sounding rocket, the *Tesmor*, a 12° cone at Mach 3 (the
    slender-body estimate is poor at M1 θc = 0.63):

    >>> from gasdyn2d import ureg
    >>> from gasdyn2d.design.cone_loads import cone_wave_drag
    >>> tesmor = cone_wave_drag(3.0, 12 * ureg.deg)
    >>> round(tesmor.drag_coefficient, 4), round(tesmor.slender_body_drag_coefficient, 4)
    (0.1186, 0.0629)
    """
    M, theta, gamma, _, flow, unit_m, unit_theta = _cone_inputs(M, cone_angle, gamma, errors)
    s = nx.scalar_or_array
    return ConeWaveDrag(
        M=s(M), cone_angle=nx.angle_out(s(theta), nx.output_angle_unit(unit_theta, unit_m)),
        drag_coefficient=s(flow.cp_cone), slender_body_drag_coefficient=s(
            np.where(np.isnan(flow.cp_cone), np.nan, slender_cone_drag(M, theta))),
        p_cone_p1=s(flow.p_cone_p1), M_cone=s(flow.M_cone))


def cone_cylinder_forebody(M, cone_angle, *, body_diameter=1.0, free_stream_pressure=None,
                           gamma=1.4, errors="raise"):
    """Nose geometry, wave drag and shoulder expansion of a cone-cylinder forebody.

    Parameters
    ----------
    M : float or array_like
        Free-stream Mach number [-], > 1.
    cone_angle : float, array_like or Quantity
        Nose half-angle [rad], 0 < θc <= θc,max(M, γ).
    body_diameter : float, array_like or Quantity, optional
        Cylinder diameter [m] (default 1: lengths in diameters).
    free_stream_pressure : float, array_like or Quantity, optional
        Free-stream static pressure p1 [Pa]; gives ``drag`` as a force.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ConeCylinderForebody

    Notes
    -----
    Nose length d/(2 tan θc). The cylinder adds no pressure drag at zero incidence,
    so the forebody's wave-drag coefficient on the cross-section π d²/4 is the cone's,
    and the force is C_D (γ/2) p1 M² π d²/4. The shoulder is a Prandtl–Meyer turn by
    θc from the cone's surface state (:func:`shoulder_expansion`); a nose whose surface
    flow is subsonic (just below detachment) has no such expansion fan (NaN).

    Examples
    --------
    The *Tesmor*'s 12° nose on its 0.2 m body at Mach 3, where p1 = 12 kPa:

    >>> from gasdyn2d import ureg
    >>> from gasdyn2d.design.cone_loads import cone_cylinder_forebody
    >>> tesmor = cone_cylinder_forebody(3.0, 12 * ureg.deg, body_diameter=0.2 * ureg.m,
    ...                               free_stream_pressure=12 * ureg.kPa)
    >>> round(tesmor.nose_length.m_as("m"), 4), round(tesmor.drag.m_as("N"), 1)
    (0.4705, 281.7)
    >>> round(tesmor.shoulder_mach, 3), round(tesmor.shoulder_cp, 4)
    (3.236, -0.0473)
    """
    diameter, unit_length = nx.to_si(body_diameter, "body_diameter", "length")
    pressure, unit_p = nx.to_si(np.nan if free_stream_pressure is None else free_stream_pressure,
                                "free_stream_pressure", "pressure")
    M, theta, gamma, (diameter, pressure), flow, unit_m, unit_theta = _cone_inputs(
        M, cone_angle, gamma, errors, body_diameter=diameter, free_stream_pressure=pressure)
    diameter = nx.check_finite_at_least(diameter, "body_diameter", 0.0, errors,
                                        what="a diameter", inclusive=False)
    if free_stream_pressure is not None:
        pressure = nx.check_finite_at_least(pressure, "free_stream_pressure", 0.0, errors,
                                            what="a pressure", inclusive=False)
    with np.errstate(invalid="ignore"):
        theta = nx.reject(theta == 0, theta, "cone_angle", "> 0 (a nose cone)", errors,
                          unit_text="rad")
        length = 0.5 * diameter / np.tan(theta)
        area = 0.25 * np.pi * diameter * diameter
        drag = flow.cp_cone * 0.5 * gamma * pressure * M * M * area
        shoulder = shoulder_expansion(M, flow.M_cone, flow.p_cone_p1, theta, gamma)
    s = nx.scalar_or_array
    angle_unit = nx.output_angle_unit(unit_theta, unit_m, unit_length, unit_p)
    if unit_length is None and (unit_theta is not None or unit_m is not None or unit_p is not None):
        unit_length = nx.ureg().meter
    size = lambda v: nx.quantity_out(s(v), "meter", unit_length)  # noqa: E731
    force_unit = None if unit_length is None and unit_p is None else nx.ureg().newton
    return ConeCylinderForebody(
        M=s(M), cone_angle=nx.angle_out(s(theta), angle_unit), body_diameter=size(diameter),
        nose_length=size(length), fineness_ratio=s(length / diameter),
        drag_coefficient=s(flow.cp_cone), drag=nx.quantity_out(s(drag), "newton", force_unit),
        cp_cone=s(flow.cp_cone), M_cone=s(flow.M_cone), shoulder_mach=s(shoulder.M),
        shoulder_cp=s(shoulder.cp))
