"""Single-cone external-compression spike intakes: conical shock, terminal shock, round cowl.

An axisymmetric intake with a conical centre-body (the spike) compresses the
stream through the spike's conical shock, then isentropically in the conical
flow behind it, and ends the supersonic compression with a terminal normal shock
at the entrance of a round cowl. This module gives the shock-on-lip geometry
(cowl lip on the conical shock at the design Mach number), the stagnation
pressure recovery and the captured mass flow at any Mach number with that
geometry fixed, and the spillage below design.

Plain core (floats and ndarrays, radians, no pint):

- :func:`spike_geometry` — lip position, entrance height and areas of the
  shock-on-lip layout;
- :func:`spike_capture` — mass-flow ratio, terminal-shock recovery and the Mach
  numbers ahead of the terminal shock, from the ray-by-ray conical flow.

Unit boundary: :func:`spike_intake` (result :class:`SpikeIntake`).

Coordinates: the spike tip is the origin, the axis runs along +x with the free
stream; lengths are in the unit of the cowl (lip) radius.
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numpy as np

from ..boundary import Call, ResultTable, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..relations.cone_shock_layer import shock_layer_rays
from ..relations.conical_flow import (check_cone_angle, check_cone_mach,
                                      cone_flow_from_cone_angle, reject_detached)
from ..relations.normal_shocks import normal_shock_ratios

__all__ = ["spike_intake", "SpikeIntake", "SpikeGeometry", "spike_geometry", "SpikeCapture",
           "spike_capture"]

#: Rays of the shock layer used for the capture integrals (trapezoidal rule in the mass
#: coordinate, second order: measured 3e-7 relative in the terminal recovery; the mass flow,
#: interpolated to 4th order on the lip ray, to 3e-12).
RAYS = 201


# ------------------------------------------------------------------ plain core


class SpikeGeometry(NamedTuple):
    """Plain-core result of :func:`spike_geometry` (lengths in cowl radii, angles in radians).

    ``lip_x`` is the lip's distance behind the spike tip; the entrance is the normal
    dropped from the lip onto the spike surface, of length ``entrance_height``, whose
    foot is ``spike_length`` behind the tip along the axis; ``entrance_area`` is the
    annulus that normal sweeps (a conical frustum) and ``capture_area`` π (cowl radius)².
    """

    lip_ray_angle: np.ndarray
    lip_x: np.ndarray
    entrance_height: np.ndarray
    spike_length: np.ndarray
    entrance_area: np.ndarray
    capture_area: np.ndarray


def spike_geometry(cone_angle, design_wave_angle, cowl_radius=1.0):
    """Plain core: the shock-on-lip layout of a single-cone spike intake.

    Parameters
    ----------
    cone_angle, design_wave_angle : float or ndarray
        Spike half-angle θc and its conical shock's half-angle at the design Mach
        number [rad].
    cowl_radius : float or ndarray
        Radius of the cowl lip [any length unit].

    Returns
    -------
    SpikeGeometry

    Notes
    -----
    The lip sits on the design shock: lip ray angle = β, lip_x = R/tan β. Its distance
    from the tip is ρ = R/sin β; the normal from the lip to the spike surface has
    length ρ sin(β - θc) and meets it ρ cos(β - θc) from the tip (so at
    ρ cos(β - θc) cos θc along the axis). The entrance annulus is the frustum swept
    by that normal: π (R + r_foot) × entrance height.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.design.spike_intakes import spike_geometry
    >>> geometry = spike_geometry(math.radians(20.0), math.radians(30.0))
    >>> round(float(geometry.lip_x), 6), round(float(geometry.entrance_height), 6)
    (1.732051, 0.347296)
    """
    theta, beta, R = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                           for v in (cone_angle, design_wave_angle, cowl_radius)))
    with np.errstate(invalid="ignore", divide="ignore"):
        distance = R / np.sin(beta)
        height = distance * np.sin(beta - theta)
        foot = distance * np.cos(beta - theta)  # along the spike surface
        spike_length = foot * np.cos(theta)
        entrance_area = np.pi * (R + foot * np.sin(theta)) * height
        return SpikeGeometry(beta, R / np.tan(beta), height, spike_length, entrance_area,
                             np.pi * R * R)


class SpikeCapture(NamedTuple):
    """Plain-core result of :func:`spike_capture` (ndarrays)."""

    mass_flow_ratio: np.ndarray
    terminal_recovery: np.ndarray
    terminal_mach_lip: np.ndarray
    terminal_mach_cone: np.ndarray
    shock_enters_cowl: np.ndarray


def _interpolate(x_nodes, y_nodes, x):
    """4-point Lagrange interpolation along the last axis (nodes ascending in x)."""
    n = x_nodes.shape[-1]
    k = np.sum(x_nodes <= x[..., None], axis=-1)  # x lies between nodes k-1 and k
    j0 = np.clip(k - 2, 0, n - 4)[..., None] + np.arange(4)
    xs = np.take_along_axis(x_nodes, j0, axis=-1)
    ys = np.take_along_axis(y_nodes, j0, axis=-1)
    out = np.zeros(x.shape)
    for i in range(4):
        weight = np.ones(x.shape)
        for j in range(4):
            if j != i:
                weight = weight * (x - xs[..., j]) / (xs[..., i] - xs[..., j])
        out = out + weight * ys[..., i]
    return out


def spike_capture(M1, wave_angle, lip_ray_angle, gamma=1.4, n_rays=RAYS):
    """Plain core: captured mass flow and terminal-shock recovery with the lip on a given ray.

    Parameters
    ----------
    M1, wave_angle : float or ndarray
        Free-stream Mach number [-] and the spike's conical-shock angle at it [rad].
    lip_ray_angle : float or ndarray
        Polar angle of the cowl lip seen from the spike tip [rad] (the design shock
        angle for a shock-on-lip layout).
    gamma : float or ndarray
        Ratio of specific heats [-].
    n_rays : int
        Rays of the shock layer in the integrals.

    Returns
    -------
    SpikeCapture

    Notes
    -----
    In conical flow the mass that crosses the sphere of radius ρ about the tip between
    the cone and the ray θ is π ρ² ρ_f |V_θ| sin θ: it all entered through the cone of
    rays θ, where the flow is the same along the ray (continuity; no quadrature). So
    with the lip on ray θL the captured stream tube over the geometric one (radius
    ρ sin θL) is

        mass-flow ratio = (ρ/ρ1)(V/V1) sin(θL - δ) / sin θL     on the lip ray,

    which is 1 with the lip on the shock (the normal mass flux is conserved across it)
    and below 1 when the shock stands ahead of the lip (spillage). Above design the
    shock enters the cowl: the whole stream tube is captured (ratio 1) and, as the
    reflected shock inside is not followed, the terminal shock is evaluated over the
    whole shock layer as at design.

    The terminal normal shock is taken across the entrance on the arc of radius ρ
    through the lip (on which the flow is the ray-by-ray conical flow); each stream
    tube crosses it normally at its local Mach number, and the recovery is the
    mass-weighted mean of its normal-shock stagnation-pressure ratios (NACA Report 1135,
    eq. 99; 1 where the local flow is already subsonic). Mass-weighted by the trapezoidal
    rule in the mass coordinate over ``n_rays`` rays.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_flow import cone_flow_from_cone_angle
    >>> from gasdyn2d.design.spike_intakes import spike_capture
    >>> beta = cone_flow_from_cone_angle(2.5, math.radians(20.0)).wave_angle
    >>> on_design = spike_capture(2.5, beta, beta)
    >>> round(float(on_design.mass_flow_ratio), 9), round(float(on_design.terminal_recovery), 4)
    (1.0, 0.7283)
    """
    M1, beta, lip, gamma = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                                 for v in (M1, wave_angle, lip_ray_angle, gamma)))
    rays = shock_layer_rays(M1, beta, gamma, n_rays)
    with np.errstate(invalid="ignore", divide="ignore"):
        g = gamma[..., None]
        theta, delta = rays.ray_angle[..., ::-1], rays.flow_angle[..., ::-1]  # cone first
        M = rays.M[..., ::-1]
        speed = M / M1[..., None] * np.sqrt(rays.T_T1[..., ::-1])  # V/V1
        mass = np.sin(theta) * rays.rho_rho1[..., ::-1] * speed * np.sin(theta - delta)
        w = np.maximum((M - 1.0) * (M + 1.0), 0.0)
        p0 = normal_shock_ratios(w, g).p02_p01
        inside = lip < beta  # the shock stands ahead of the lip: the lip ray is in the layer
        lip_at = np.where(inside, lip, beta)
        m_lip = np.where(inside, _interpolate(theta, mass, lip_at), mass[..., -1])
        p0_lip = np.where(inside, _interpolate(theta, p0, lip_at), p0[..., -1])
        M_lip = np.where(inside, _interpolate(theta, M, lip_at), M[..., -1])
        # trapezoids in the mass coordinate up to the lip ray
        below = theta <= lip_at[..., None]
        dm = np.diff(mass, axis=-1)
        pieces = 0.5 * dm * (p0[..., 1:] + p0[..., :-1])
        full = np.sum(np.where(below[..., 1:], pieces, 0.0), axis=-1)
        last = np.sum(below, axis=-1) - 1
        m_last = np.take_along_axis(mass, last[..., None], axis=-1)[..., 0]
        p0_last = np.take_along_axis(p0, last[..., None], axis=-1)[..., 0]
        partial = 0.5 * (m_lip - m_last) * (p0_lip + p0_last)
        terminal = (full + partial) / m_lip
        ratio = np.where(inside, m_lip / np.sin(lip) ** 2, 1.0)
        ratio = np.where(np.isnan(m_lip), np.nan, ratio)
    return SpikeCapture(ratio, terminal, M_lip, M[..., 0], ~inside & (lip > beta))


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class SpikeIntake(ResultTable):
    """Flow, losses and geometry of a single-cone external-compression spike intake.

    Angles are in radians (Quantities in the caller's angle unit when the cone angle
    was a Quantity); lengths in the unit of ``cowl_radius`` (Quantities when it was
    one); areas in that unit squared.
    """

    M: FloatArray = unit_field("", "free-stream Mach number")
    design_mach: FloatArray = unit_field("", "Mach number at which the shock meets the lip")
    cone_angle: FloatArray = unit_field("rad", "spike half-angle θc")
    wave_angle: FloatArray = unit_field("rad", "half-angle of the spike's conical shock at M")
    M2: FloatArray = unit_field("", "Mach number just behind the conical shock")
    M_cone: FloatArray = unit_field("", "Mach number on the spike surface (conical flow)")
    terminal_mach_lip: FloatArray = unit_field("", "Mach number ahead of the terminal shock, lip")
    terminal_mach_cone: FloatArray = unit_field(
        "", "Mach number ahead of the terminal shock, spike surface")
    conical_shock_recovery: FloatArray = unit_field("", "p0 ratio across the conical shock")
    terminal_recovery: FloatArray = unit_field(
        "", "mass-weighted p0 ratio across the terminal shock")
    recovery: FloatArray = unit_field("", "overall p0(entrance, subsonic)/p0(free stream)")
    mass_flow_ratio: FloatArray = unit_field(
        "", "captured over geometric-capture mass flow, <= 1")
    spillage: FloatArray = unit_field("", "1 - mass_flow_ratio")
    shock_enters_cowl: FloatArray = unit_field(
        "", "above design: the conical shock passes inside the lip", dtype=bool)
    lip_ray_angle: FloatArray = unit_field("rad", "polar angle of the lip from the spike tip")
    lip_x: FloatArray = unit_field("m", "lip position behind the spike tip")
    cowl_radius: FloatArray = unit_field("m", "lip radius (the geometric capture radius)")
    entrance_height: FloatArray = unit_field("m", "normal from the lip to the spike surface")
    spike_length: FloatArray = unit_field(
        "m", "tip to the foot of that normal, along the axis")
    entrance_area: FloatArray = unit_field("m²", "annulus swept by the entrance normal")
    capture_area: FloatArray = unit_field("m²", "π cowl_radius²")


def _spike_core(M, theta, design, radius, gamma, check):
    """Checked core of :func:`spike_intake` (arrays): the fields in order."""
    gamma = check.gamma(gamma)
    M = check_cone_mach(M, check, "M")
    design = check.at_least(design, "design_mach", 1.0, inclusive=False, what="supersonic flow")
    radius = check.positive(radius, "cowl_radius", "m", what="a lip radius")
    theta = check_cone_angle(theta, check)
    theta = check.reject(theta == 0.0, theta, "cone_angle", "> 0 (a spike)", unit_text="rad")
    M, theta, design, radius = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                                     for v in (M, theta, design, radius)))
    flow = _attached(M, theta, gamma, check)
    design_flow = _attached(design, theta, gamma, check)
    case_nan = np.isnan(flow.wave_angle) | np.isnan(design_flow.wave_angle) | np.isnan(radius)
    geometry = spike_geometry(theta, np.where(case_nan, np.nan, design_flow.wave_angle), radius)
    capture = spike_capture(M, flow.wave_angle, geometry.lip_ray_angle, gamma)
    nan = lambda v: np.where(case_nan, np.nan, v)  # noqa: E731
    return (nan(M), nan(design), nan(theta), nan(flow.wave_angle), nan(flow.M2),
            nan(flow.M_cone), nan(capture.terminal_mach_lip), nan(capture.terminal_mach_cone),
            nan(flow.p02_p01), nan(capture.terminal_recovery),
            nan(flow.p02_p01 * capture.terminal_recovery), nan(capture.mass_flow_ratio),
            nan(1.0 - capture.mass_flow_ratio), capture.shock_enters_cowl & ~case_nan,
            nan(geometry.lip_ray_angle), nan(geometry.lip_x), nan(radius),
            nan(geometry.entrance_height), nan(geometry.spike_length),
            nan(geometry.entrance_area), nan(geometry.capture_area))


def spike_intake(M: ArrayInput, cone_angle: ArrayInput, *, design_mach: ArrayInput = None,
                 cowl_radius: ArrayInput = 1.0, gamma: ArrayInput = 1.4,
                 errors: str = "raise") -> SpikeIntake:
    """Single-cone external-compression spike intake: recovery, capture and spillage.

    Parameters
    ----------
    M : float or array_like
        Free-stream Mach number [-], > 1.
    cone_angle : float, array_like or Quantity
        Spike (cone) half-angle [rad], > 0, with an attached shock at ``M`` and at
        ``design_mach``.
    design_mach : float or array_like, optional
        Mach number at which the conical shock meets the cowl lip; fixes the
        geometry. Default: ``M`` (on design).
    cowl_radius : float, array_like or Quantity, optional
        Lip radius [m]; every length scales with it. Default 1 (lengths in cowl radii).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for cases with invalid inputs instead of raising.

    Returns
    -------
    SpikeIntake

    Raises
    ------
    DetachedShockError
        The spike is too blunt for an attached shock at ``M`` or ``design_mach``
        (the message gives the largest cone angle there).
    InvalidInputError
        A subsonic Mach number, a cone angle <= 0, a non-positive cowl radius,
        gamma <= 1.

    Notes
    -----
    Conical shock and conical flow from :mod:`gasdyn2d.relations.conical_flow`;
    the lip stands on the design shock (:func:`spike_geometry`); capture and the
    terminal shock as in :func:`spike_capture`. Recovery = (p02/p01 of the conical
    shock) × (mass-weighted terminal recovery); the isentropic compression between
    shock and spike loses nothing.

    Inviscid, perfect gas, zero incidence: the spike's boundary layer (usually bled),
    shock–boundary-layer interaction at the terminal shock, the cowl's own shock,
    buzz and the subsonic diffuser decide how a real intake performs.

    Examples
    --------
    An invented ramjet demonstrator, the *Kelvray*: a 22° spike, cowl radius 0.15 m,
    shock on the lip at Mach 2.6, flown at 2.6 and at 2.2:

    >>> from gasdyn2d import ureg
    >>> from gasdyn2d.design.spike_intakes import spike_intake
    >>> kelvray = spike_intake([2.6, 2.2], 22 * ureg.deg, design_mach=2.6,
    ...                     cowl_radius=0.15 * ureg.m)
    >>> kelvray.recovery.round(4), kelvray.mass_flow_ratio.round(4)
    (array([0.6928, 0.8398]), array([1.    , 0.8919]))
    >>> lip, height = kelvray.lip_x[0].m_as("mm"), kelvray.entrance_height[0].m_as("mm")
    >>> round(float(lip), 1), round(float(height), 1)
    (224.8, 54.9)
    """
    call = Call(errors)
    call.take("M", M)
    call.take("cone_angle", cone_angle, "rad")
    call.take("design_mach", M if design_mach is None else design_mach)
    call.take("cowl_radius", cowl_radius, "m")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(SpikeIntake, _spike_core)


def _attached(M, theta, gamma, check):
    """Cone flow at M, with spikes beyond detachment reported (or NaN)."""
    flow = cone_flow_from_cone_angle(M, theta, gamma)
    failed = np.isnan(flow.wave_angle) & ~np.isnan(theta) & ~np.isnan(M) & ~np.isnan(gamma)
    if np.any(failed):
        theta = reject_detached(theta, M, gamma, failed, check)
        flow = cone_flow_from_cone_angle(M, theta, gamma)
    return flow
