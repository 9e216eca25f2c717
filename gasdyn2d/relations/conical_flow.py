"""Conical flow: the attached shock and surface flow of a cone at zero incidence.

The round counterpart of the wedge shock. A straight conical shock of wave
angle β stands on a cone of half-angle θc < β; behind it the flow keeps
compressing isentropically towards the surface (Taylor & Maccoll 1933), so the
shock is weaker than a wedge's of the same half-angle and the surface pressure
is higher than the pressure just behind the shock.

Unit boundary: :func:`cone_flow` (result :class:`ConeFlow`),
:func:`max_cone_angle`, :func:`sonic_cone_angle`; and the checks the other cone
tools share (:func:`check_cone_mach`, :func:`check_cone_angle`,
:func:`reject_detached`, the checked core :func:`cone_core`).

The plain core is in :mod:`gasdyn2d.relations.conical_shocks` and is re-exported here
under the paths it always had (``gasdyn2d.relations.conical_flow.<name>``):
:func:`~gasdyn2d.relations.conical_shocks.cone_flow_from_wave_angle`,
:func:`~gasdyn2d.relations.conical_shocks.cone_flow_from_cone_angle`,
:func:`~gasdyn2d.relations.conical_shocks.cone_detachment_angles`,
:func:`~gasdyn2d.relations.conical_shocks.sonic_cone_angles` and
:class:`~gasdyn2d.relations.conical_shocks.ConeFlowRatios`. The march itself is in
:mod:`gasdyn2d.relations.taylor_maccoll`; the flow on every ray between shock
and cone in :mod:`gasdyn2d.relations.cone_shock_layer`; conical probes in
:mod:`gasdyn2d.relations.cone_probes`.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..boundary import SCALAR_CHECKS, Call, ResultTable, clamp_to_limit, one_of, unit_field
from ..boundary.checks import format_value
from ..boundary.results import FieldInfo
from ..boundary.types import ArrayInput, FloatArray
from ..boundary.units import TWO_PI
from ..errors import DetachedShockError, NoSolutionError
from ..numerics import nan_where_nan
from .conical_shocks import (
    ConeFlowRatios,
    cone_detachment_angles,
    cone_flow_from_cone_angle,
    cone_flow_from_wave_angle,
    sonic_cone_angles,
)
from .prandtl_meyer_function import mach_angle_of
from .theta_beta_mach import detachment_angles

__all__ = [
    "cone_flow",
    "ConeFlow",
    "max_cone_angle",
    "sonic_cone_angle",
    "ConeFlowRatios",
    "cone_flow_from_wave_angle",
    "cone_flow_from_cone_angle",
    "cone_detachment_angles",
    "sonic_cone_angles",
    "check_cone_mach",
    "check_cone_angle",
    "reject_detached",
    "cone_core",
]


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class ConeFlow(ResultTable):
    """Flow over a cone at zero incidence with an attached conical shock.

    Angles are in radians (Quantities in the caller's angle unit when any input
    was a Quantity). "Behind the shock" fields describe the flow just downstream
    of the shock; "cone" fields the flow on the surface, reached by isentropic
    compression from there.
    """

    M1: FloatArray = unit_field("", "upstream Mach number")
    cone_angle: FloatArray = unit_field("rad", "cone half-angle θc")
    wave_angle: FloatArray = unit_field("rad", "half-angle β of the conical shock")
    deflection: FloatArray = unit_field("rad", "flow turn just behind the shock")
    M2: FloatArray = unit_field("", "Mach number just behind the shock")
    p2_p1: FloatArray = unit_field("", "static pressure ratio across the shock")
    rho2_rho1: FloatArray = unit_field("", "density ratio across the shock")
    T2_T1: FloatArray = unit_field("", "static temperature ratio across the shock")
    p02_p01: FloatArray = unit_field("", "stagnation pressure ratio across the shock, <= 1")
    M_cone: FloatArray = unit_field("", "Mach number on the cone surface")
    p_cone_p1: FloatArray = unit_field("", "surface pressure over free-stream static pressure")
    T_cone_T1: FloatArray = unit_field("", "surface temperature over free-stream static")
    rho_cone_rho1: FloatArray = unit_field("", "surface density over free-stream density")
    cp_cone: FloatArray = unit_field(
        "", "surface pressure coefficient (p_cone - p1)/(γ p1 M1²/2)")


_STRONG_BRANCH_MARGIN = math.radians(3.0)  # wave angles this far below the wedge's β* are weak


def check_cone_mach(M1, check, name="M1"):
    """Checked M1 > 1 (a cone needs a supersonic free stream; M1 = 1 has no conical shock)."""
    return check.at_least(M1, name, 1.0, inclusive=False, what="supersonic flow")


def check_cone_angle(theta, check):
    """Checked cone half-angle: 0 <= θc < π/2 [rad] (detachment is checked after the solve,
    by :func:`reject_detached`, where it costs nothing for the attached cases)."""
    theta = check.at_least(theta, "cone_angle", 0.0, allow_inf=True, unit_text="rad",
                           what="a cone half-angle")
    return check.within(theta, "cone_angle", -math.inf, 0.5 * math.pi, "below π/2 (90°)",
                        upper_open=True, limit=0.5 * math.pi, unit_text="rad")


def reject_detached(theta, M1, gamma, failed, check):
    """Explain failed cone-angle solves (``failed``: a bool or bool array aligned with θc):
    a cone beyond its detachment angle raises :class:`DetachedShockError` with the limit
    (or NaN under errors="nan"); a failure below it is a solver bug, never a silent NaN."""
    scalar = type(theta) is float
    theta_a = np.atleast_1d(np.asarray(theta, dtype=float))
    failed_a = np.broadcast_to(failed, theta_a.shape)
    idx = np.flatnonzero(failed_a.reshape(-1))
    limit = np.full(theta_a.size, np.nan)
    M1_f = np.broadcast_to(M1, theta_a.shape).reshape(-1)[idx]
    g_f = np.broadcast_to(gamma, theta_a.shape).reshape(-1)[idx]
    limit[idx] = cone_detachment_angles(M1_f, g_f)[0]
    limit = limit.reshape(theta_a.shape)
    with np.errstate(invalid="ignore"):
        # at the detachment angle itself (to rounding, either side: θc,max is computed to
        # the last bit only for a given batch), the root of θc(β) = θ is double and may be
        # missed: those cases take the detachment solution (see cone_core)
        beyond = failed_a & (theta_a > limit * (1.0 + DETACHMENT_EDGE))
        unexplained = (failed_a & ~beyond & ~np.isnan(theta_a)
                       & (theta_a < limit * (1.0 - DETACHMENT_EDGE)))
    if scalar:
        checked = check.reject(bool(beyond[0]), theta, "cone_angle",
                               "at most the detachment angle θc,max(M1, γ) of the cone",
                               limit=float(limit[0]), unit_text="rad",
                               error_class=DetachedShockError, hint=_DETACHED_HINT)
    else:
        checked = check.reject(beyond, theta_a.reshape(np.shape(theta)), "cone_angle",
                               "at most the detachment angle θc,max(M1, γ) of the cone",
                               limit=limit.reshape(np.shape(theta)), unit_text="rad",
                               error_class=DetachedShockError, hint=_DETACHED_HINT)
    if unexplained.any():
        first = int(np.flatnonzero(unexplained.reshape(-1))[0])
        raise NoSolutionError(
            f"internal error: the conical-shock solve found no attached shock for cone_angle = "
            f"{format_value(theta_a.reshape(-1)[first], 'rad')} although it is below the "
            f"detachment angle {format_value(limit.reshape(-1)[first], 'rad')}. This is a bug "
            "in gasdyn2d; please report it with these values.")
    return checked


_DETACHED_HINT = ("Beyond it no attached conical shock exists: a curved bow shock stands off "
                  "the tip. Lower the cone angle or raise M1.")


def _check_wave_angle(beta, M1, gamma, check):
    mu = mach_angle_of(M1)
    beta = clamp_to_limit(beta, mu, "lower")  # asin(1/M1) may round below μ
    beta = check.within(beta, "wave_angle", mu, 0.5 * math.pi,
                        "between the Mach angle μ = asin(1/M1) and π/2 (90°)", limit=mu,
                        unit_text="rad")
    _, beta_wedge = detachment_angles(M1, gamma)
    if type(beta) is float:
        if not beta > beta_wedge - _STRONG_BRANCH_MARGIN:
            return beta
        limit = float(cone_detachment_angles(np.array([M1]), np.array([gamma]))[1][0])
        bad = beta > limit
    else:
        candidates = np.broadcast_to(beta > beta_wedge - _STRONG_BRANCH_MARGIN, np.shape(beta))
        if not candidates.any():
            return beta
        limit = np.full(np.shape(beta), np.inf)
        limit[candidates] = cone_detachment_angles(np.broadcast_to(M1, limit.shape)[candidates],
                                                   np.broadcast_to(gamma, limit.shape)[candidates])[1]
        with np.errstate(invalid="ignore"):
            bad = beta > limit
    return check.reject(
        bad, beta, "wave_angle", "at most β* of the largest cone (the weak branch of conical "
        "flow)", limit=limit, unit_text="rad",
        hint="Steeper conical shocks (the strong branch, subsonic behind a nearly normal shock) "
             "are not attached-cone flows and are not computed.")


def cone_core(M1, value, gamma, check, *, name):
    """Checked core of :func:`cone_flow` (floats or arrays): the fields in order; public for
    the other cone tools (the shock layer, probes), which start from the same checked flow."""
    gamma = check.gamma(gamma)
    M1 = check_cone_mach(M1, check)
    if name == "wave_angle":
        value = _check_wave_angle(value, M1, gamma, check)
        return (M1, *cone_flow_from_wave_angle(M1, value, gamma))
    value = check_cone_angle(value, check)
    fields = cone_flow_from_cone_angle(M1, value, gamma)
    beta = fields.wave_angle
    if type(beta) is float:
        failed = beta != beta and not (value != value or M1 != M1 or gamma != gamma)
    else:
        with np.errstate(invalid="ignore"):
            failed = np.isnan(beta) & ~np.isnan(value) & ~np.isnan(M1) & ~np.isnan(gamma)
    if failed if type(beta) is float else failed.any():
        value = reject_detached(value, M1, gamma, failed, check)
        fields = _at_detachment(cone_flow_from_cone_angle(M1, value, gamma), M1, value, gamma)
    return (M1, nan_where_nan(fields.wave_angle, value), *fields[1:])


#: a cone angle within this relative distance below θc,max is taken as at detachment
DETACHMENT_EDGE = 1e-9


def _at_detachment(fields, M1, value, gamma):
    """``fields`` with the unsolved cases at the detachment angle (to rounding: the double
    root of θc(β) = θ that a bracketing solve can miss) replaced by the detachment flow;
    their ``cone_angle`` stays the one given (θc,max to within 1e-9)."""
    with np.errstate(invalid="ignore"):
        edge = np.isnan(np.asarray(fields.wave_angle, dtype=float)) & ~np.isnan(value) \
            & ~np.isnan(M1) & ~np.isnan(gamma)
    if not np.any(edge):
        return fields
    if type(fields.wave_angle) is float:
        beta_star = cone_detachment_angles(M1, gamma)[1]
        return cone_flow_from_wave_angle(M1, beta_star, gamma)._replace(cone_angle=value)
    shape = np.shape(fields.wave_angle)
    mach, g = (np.broadcast_to(v, shape)[edge] for v in (M1, gamma))
    at_edge = cone_flow_from_wave_angle(mach, cone_detachment_angles(mach, g)[1], g)
    out = [np.array(np.broadcast_to(f, shape), dtype=float) for f in fields]
    for field, edge_value in zip(out, at_edge):
        field[edge] = edge_value
    out[0][edge] = np.broadcast_to(value, shape)[edge]  # the cone angle given
    return type(fields)(*out)


def cone_flow(M1: ArrayInput, *, cone_angle: ArrayInput = None, wave_angle: ArrayInput = None,
              gamma: ArrayInput = 1.4, errors: str = "raise") -> ConeFlow:
    """Conical shock and surface flow of a cone at zero incidence (Taylor–Maccoll).

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], > 1.
    cone_angle : float, array_like or Quantity, optional
        Cone half-angle θc [rad], 0 <= θc <= θc,max(M1, γ).
    wave_angle : float, array_like or Quantity, optional
        Half-angle β of the conical shock [rad], μ <= β <= β*(M1, γ) (the weak branch).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ConeFlow

    Raises
    ------
    DetachedShockError
        ``cone_angle`` above the detachment angle θc,max(M1, γ); the message gives it.
    InvalidInputError
        M1 <= 1, a negative cone angle, a wave angle outside [μ, β*], gamma <= 1,
        both or neither angle given, an angle with units other than an angle.

    Notes
    -----
    Between a straight conical shock and the cone the flow is isentropic and
    depends on the polar angle only (Taylor & Maccoll 1933); gasdyn2d marches it
    for all cases at once with a fixed-step 8th-order Runge–Kutta formula in a
    variable that ends exactly on the surface
    (:mod:`gasdyn2d.relations.taylor_maccoll`). From ``cone_angle`` the wave angle
    is found on the whole batch by a Newton step with an exact derivative and secant
    steps inside a bracket.
    Accuracy against a 30-digit reference: ~1e-11 relative or better in every
    field for M1 1.05-20, γ 1.1-1.67 and cone angles from 1e-4 rad to within 1e-4
    (relative) of detachment; nearer detachment the error grows like
    (1 - θc/θc,max)^(-1/2), the conditioning of the problem. Zero cone angle
    gives the Mach cone.

    References
    ----------
    Taylor, G. I. & Maccoll, J. W. (1933), Proc. R. Soc. Lond. A 139, 278-311.
    Ames Research Staff (1953), NACA Report 1135 (oblique-shock relations,
    eqs. 128-150, and cone charts).

    Examples
    --------
    >>> from gasdyn2d import cone_flow, ureg
    >>> flow = cone_flow(2.0, cone_angle=10 * ureg.deg)
    >>> round(flow.wave_angle.m_as("deg"), 4), round(flow.M_cone, 5), round(flow.cp_cone, 6)
    (31.2061, 1.83403, 0.104471)
    >>> round(cone_flow(2.0, wave_angle=flow.wave_angle).cone_angle.m_as("deg"), 9)
    10.0
    """
    name, value = one_of("cone_flow", cone_angle=cone_angle, wave_angle=wave_angle)
    check = SCALAR_CHECKS.get(errors)
    if (type(M1) is float and type(value) is float and type(gamma) is float
            and check is not None and abs(value) <= TWO_PI):
        return ConeFlow.from_fields(cone_core(M1, value, gamma, check, name=name))
    call = Call(errors)
    call.take("M1", M1)
    call.take(name, value, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ConeFlow, cone_core, name=name)


_ANGLE_PAIR = (FieldInfo("cone_angle", "rad", np.dtype(float), "cone half-angle θc", "rad"),
               FieldInfo("wave_angle", "rad", np.dtype(float), "shock half-angle β", "rad"))


def _angle_pair(M1, gamma, errors, plain):
    def core(M1, gamma, check):
        gamma = check.gamma(gamma)
        return plain(check_cone_mach(M1, check), gamma)

    if type(M1) is float and type(gamma) is float and errors in SCALAR_CHECKS:
        return core(M1, gamma, SCALAR_CHECKS[errors])
    call = Call(errors)
    call.take("M1", M1)
    call.take("gamma", gamma, keep_scalar=True)
    theta, beta = call.evaluate(_ANGLE_PAIR, core)
    return theta, beta


def max_cone_angle(M1: ArrayInput, *, gamma: ArrayInput = 1.4,
                   errors: str = "raise") -> tuple[FloatArray, FloatArray]:
    """Detachment: the largest cone half-angle with an attached shock, and its wave angle.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], > 1.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    cone_angle, wave_angle : float or ndarray
        θc,max and β* [rad]. θc,max exceeds the wedge's θmax at every Mach number.

    Notes
    -----
    The maximum of θc(β), where dθc/dβ = 0, found on the exact derivative of the
    march (:func:`cone_detachment_angles`); no closed form exists.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import max_cone_angle
    >>> theta, beta = max_cone_angle(2.0)
    >>> round(float(np.degrees(theta)), 3), round(float(np.degrees(beta)), 2)
    (40.688, 69.42)
    """
    return _angle_pair(M1, gamma, errors, cone_detachment_angles)


def sonic_cone_angle(M1: ArrayInput, *, gamma: ArrayInput = 1.4,
                     errors: str = "raise") -> tuple[FloatArray, FloatArray]:
    """The cone half-angle (and wave angle) at which the surface flow becomes sonic.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], > 1.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    cone_angle, wave_angle : float or ndarray
        θc and β [rad] with M_cone = 1, slightly below the detachment values:
        thicker cones up to detachment have a subsonic surface flow.

    Examples
    --------
    >>> from gasdyn2d import sonic_cone_angle, cone_flow
    >>> theta, beta = sonic_cone_angle(3.0)
    >>> round(cone_flow(3.0, cone_angle=theta).M_cone, 9)
    1.0
    """
    return _angle_pair(M1, gamma, errors, sonic_cone_angles)
