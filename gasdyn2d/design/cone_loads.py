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
import math
from typing import NamedTuple

import numpy as np

from ..boundary import Call, ResultTable, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..numerics import nan_where_nan
from ..relations.conical_flow import (check_cone_angle, check_cone_mach,
                                      cone_flow_from_cone_angle, reject_detached)
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

    M: FloatArray = unit_field("", "free-stream Mach number")
    cone_angle: FloatArray = unit_field("rad", "cone half-angle θc")
    drag_coefficient: FloatArray = unit_field(
        "", "pressure drag over (q1 × base area) = cp_cone")
    slender_body_drag_coefficient: FloatArray = unit_field("", "linearised estimate")
    p_cone_p1: FloatArray = unit_field("", "surface pressure over free-stream static pressure")
    M_cone: FloatArray = unit_field("", "surface Mach number")


@dataclasses.dataclass(frozen=True, repr=False)
class ConeCylinderForebody(ResultTable):
    """A conical nose on a cylinder of the same diameter, at zero incidence.

    Lengths in the unit of ``body_diameter`` (Quantities when it was one); ``drag``
    is a force when ``free_stream_pressure`` was given (NaN otherwise).
    """

    M: FloatArray = unit_field("", "free-stream Mach number")
    cone_angle: FloatArray = unit_field("rad", "nose half-angle θc")
    body_diameter: FloatArray = unit_field("m", "cylinder (and nose base) diameter")
    nose_length: FloatArray = unit_field("m", "tip to shoulder")
    fineness_ratio: FloatArray = unit_field("", "nose length over body diameter")
    drag_coefficient: FloatArray = unit_field(
        "", "forebody wave drag over (q1 × cross-section)")
    drag: FloatArray = unit_field("N", "forebody wave drag (needs the free-stream pressure)")
    cp_cone: FloatArray = unit_field("", "pressure coefficient on the nose")
    M_cone: FloatArray = unit_field("", "Mach number on the nose")
    shoulder_mach: FloatArray = unit_field("", "Mach number just behind the shoulder")
    shoulder_cp: FloatArray = unit_field("", "pressure coefficient just behind the shoulder")


def _checked_cone(M, theta, gamma, check):
    """Checked M, θc, γ and the cone flow (detached cones reported, or NaN)."""
    gamma = check.gamma(gamma)
    M = check_cone_mach(M, check, "M")
    theta = check_cone_angle(theta, check)
    flow = cone_flow_from_cone_angle(M, theta, gamma)
    beta = flow.wave_angle
    if type(beta) is float:
        failed = beta != beta and not (theta != theta or M != M or gamma != gamma)
        failed_any = failed
    else:
        with np.errstate(invalid="ignore"):
            failed = np.isnan(beta) & ~np.isnan(theta) & ~np.isnan(M) & ~np.isnan(gamma)
        failed_any = bool(failed.any())
    if failed_any:
        theta = reject_detached(theta, M, gamma, failed, check)
        flow = cone_flow_from_cone_angle(M, theta, gamma)
    return M, theta, gamma, flow


def _drag_core(M, theta, gamma, check):
    M, theta, gamma, flow = _checked_cone(M, theta, gamma, check)
    slender = nan_where_nan(flow.cp_cone, slender_cone_drag(M, theta))
    return (M, theta, flow.cp_cone, slender, flow.p_cone_p1, flow.M_cone)


def cone_wave_drag(M: ArrayInput, cone_angle: ArrayInput, *, gamma: ArrayInput = 1.4,
                   errors: str = "raise") -> ConeWaveDrag:
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
    call = Call(errors)
    call.take("M", M)
    call.take("cone_angle", cone_angle, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ConeWaveDrag, _drag_core)


def _forebody_core(M, theta, diameter, pressure, gamma, check):
    M, theta, gamma, flow = _checked_cone(M, theta, gamma, check)
    diameter = check.positive(diameter, "body_diameter", "m", what="a diameter")
    pressure = check.positive(pressure, "free_stream_pressure", "Pa", what="a pressure")
    theta = check.reject(theta == 0.0, theta, "cone_angle", "> 0 (a nose cone)", unit_text="rad")
    with np.errstate(invalid="ignore", divide="ignore"):
        length = 0.5 * diameter / np.tan(theta)
        area = 0.25 * np.pi * diameter * diameter
        drag = flow.cp_cone * 0.5 * gamma * pressure * M * M * area
        shoulder = shoulder_expansion(M, flow.M_cone, flow.p_cone_p1, theta, gamma)
        fineness = length / diameter
    return (M, theta, diameter, length, fineness, flow.cp_cone, drag, flow.cp_cone,
            flow.M_cone, shoulder.M, shoulder.cp)


def cone_cylinder_forebody(M: ArrayInput, cone_angle: ArrayInput, *,
                           body_diameter: ArrayInput = 1.0,
                           free_stream_pressure: ArrayInput = None, gamma: ArrayInput = 1.4,
                           errors: str = "raise") -> ConeCylinderForebody:
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
    call = Call(errors)
    call.take("M", M)
    call.take("cone_angle", cone_angle, "rad")
    call.take("body_diameter", body_diameter, "m")
    # without a free-stream pressure the drag force is NaN (a coefficient needs none)
    call.take("free_stream_pressure",
              math.nan if free_stream_pressure is None else free_stream_pressure, "Pa")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ConeCylinderForebody, _forebody_core)
