"""Ramp intake geometry: shock-on-lip at the design Mach number, and the stream tube it
captures at any Mach number.

Plain core (floats and ndarrays, radians, no pint):

- :func:`shock_on_lip_geometry` — ramp corners, ramp lengths and the cowl lip at which
  every ramp wave meets the lip at the design Mach number;
- :func:`lip_streamline_capture` — with that geometry fixed, where each wave crosses the
  lip height and the captured free-stream height, for any Mach number (spillage).

Coordinates: the first ramp's leading edge is the origin, the free stream runs
along +x, and the ramps turn the flow towards +y (the cowl side). Ramp k's
surface is inclined at the ramp angle δk = θ1 + ... + θk to the free stream.
The waves come from :mod:`gasdyn2d.design.ramp_trains`; the unit boundary is
:func:`~gasdyn2d.design.intakes.ramp_intake`, whose module re-exports these plain
cores under their old paths.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from ..relations.isentropic import mach_angle_of
from .intake_waves import isentropic_arc_length, isentropic_radius_ratio
from .ramp_trains import isentropic_stage_flags

__all__ = [
    "IntakeGeometry",
    "shock_on_lip_geometry",
    "LipCapture",
    "lip_streamline_capture",
]


def _direction(angle):
    return np.cos(angle), np.sin(angle)


def _line_parameter(px, py, ux, uy, qx, qy, vx, vy):
    """t such that P + t·u lies on the line through Q with direction v."""
    return ((qx - px) * vy - (qy - py) * vx) / (ux * vy - uy * vx)


class IntakeGeometry(NamedTuple):
    """Plain-core result of :func:`shock_on_lip_geometry` (lengths in the unit of
    ``first_ramp_length``; per-ramp arrays on the last axis).

    ``corner_x``, ``corner_y`` are the n ramp starts (the leading edge first);
    ``ramp_lengths`` run along each ramp surface (an isentropic stage's curved
    wall included), the last one to the entrance plane (the normal dropped from
    the lip onto the last ramp); ``entrance_height`` is the length of that
    normal. ``compression_end_x``, ``compression_end_y`` are where each stage's
    compression ends on the wall: its start for a shock stage, the end of the
    curved wall for an isentropic one (from there the ramp is straight).
    """

    ramp_angle: np.ndarray
    corner_x: np.ndarray
    corner_y: np.ndarray
    ramp_lengths: np.ndarray
    lip_x: np.ndarray
    lip_y: np.ndarray
    entrance_height: np.ndarray
    compression_end_x: np.ndarray
    compression_end_y: np.ndarray


def shock_on_lip_geometry(deflections, wave_angles, first_ramp_length=1.0, *, stage_mach=None,
                          isentropic=None, gamma=1.4):
    """Plain core: ramp lengths and lip position at which every ramp wave meets the lip.

    Parameters
    ----------
    deflections, wave_angles : ndarray
        Turn of each ramp and wave angle of its shock (for an isentropic stage, the
        Mach angle of its first characteristic) relative to its upstream flow [rad]
        at the design Mach number, ramps on the last axis.
    first_ramp_length : float or ndarray
        Length of the first ramp along its surface [any length unit].
    stage_mach : ndarray, optional
        Mach numbers of the train at design (n + 1 entries, free stream first;
        :attr:`ShockTrain.mach`): needed for isentropic stages only.
    isentropic : sequence of bool, optional
        Per ramp: an isentropic compression focused on the lip. The first stage must
        be a shock (it sizes the intake from the leading edge); NaN otherwise.
    gamma : float or ndarray, optional
        Ratio of specific heats [-] (isentropic stages only).

    Returns
    -------
    IntakeGeometry

    Notes
    -----
    Wave k starts at the corner C(k-1) at the angle σk = δ(k-1) + βk to the
    free stream. The lip is where waves 1 and 2 cross; each later corner C(k)
    is where ramp k's surface meets the line drawn back from the lip at σ(k+1).
    The last ramp ends at the entrance plane, the normal from the lip to its
    surface (where the terminal shock stands); that also places the lip of a
    single-ramp intake, on the shock above the ramp's end. Because σ(k+1) > σk always (a shock is
    slower than the Mach waves behind it), every length comes out positive,
    unless two ramps in a row have zero turn (parallel Mach waves: NaN).

    An isentropic stage k is a centred compression centred on the lip: its wall
    runs from C(k-1) (on its first characteristic through the lip) to the point
    at distance r(M(k)) = |lip - C(k-1)| · [(1 + hM(k)²)/(1 + hM(k-1)²)]^((γ+1)/(2(γ-1)))
    from the lip on the last characteristic, σ = δk + μ(M(k))
    (:mod:`gasdyn2d.design.intake_waves`); then the ramp is straight at δk.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intake_geometry import shock_on_lip_geometry
    >>> geometry = shock_on_lip_geometry(np.radians([10.0]), np.radians([39.3139]))
    >>> round(float(geometry.lip_x), 6), round(float(geometry.lip_y), 6)
    (0.887306, 0.726611)
    """
    theta = np.atleast_1d(np.asarray(deflections, dtype=float))
    beta = np.atleast_1d(np.asarray(wave_angles, dtype=float))
    theta, beta = np.broadcast_arrays(theta, beta)
    length = np.asarray(first_ramp_length, dtype=float)
    shape = np.broadcast_shapes(theta.shape[:-1], length.shape)
    n = theta.shape[-1]
    iso = isentropic_stage_flags(isentropic, n)
    theta = np.broadcast_to(theta, shape + (n,))
    beta = np.broadcast_to(beta, shape + (n,))
    length = np.broadcast_to(length, shape)
    delta = np.cumsum(theta, axis=-1)
    upstream_delta = delta - theta
    sigma = upstream_delta + beta
    if iso.any():
        mach = np.broadcast_to(np.asarray(stage_mach, dtype=float), shape + (n + 1,))
    with np.errstate(invalid="ignore", divide="ignore"):
        cx1, cy1 = length * np.cos(delta[..., 0]), length * np.sin(delta[..., 0])
        if n == 1:  # the lip stands on the shock, normal to the ramp at its end
            height = length * np.tan(beta[..., 0] - theta[..., 0])
            lip_x = cx1 - height * np.sin(delta[..., 0])
            lip_y = cy1 + height * np.cos(delta[..., 0])
        else:
            ux, uy = _direction(sigma[..., 0])
            vx, vy = _direction(sigma[..., 1])
            t = _line_parameter(0.0, 0.0, ux, uy, cx1, cy1, vx, vy)
            lip_x, lip_y = t * ux, t * uy
        if iso[0]:  # a first isentropic stage cannot be sized from the leading edge
            lip_x, lip_y = lip_x * np.nan, lip_y * np.nan
        zero = np.zeros(shape)
        starts_x, starts_y, ends_x, ends_y, lengths = [zero], [zero], [zero], [zero], [length]
        straight = length  # the straight part of the ramp before the next corner
        for k in range(1, n):
            px = ends_x[-1] + straight * np.cos(delta[..., k - 1])
            py = ends_y[-1] + straight * np.sin(delta[..., k - 1])
            starts_x.append(px)
            starts_y.append(py)
            arc = 0.0
            if iso[k]:
                r0 = np.hypot(lip_x - px, lip_y - py)
                r_end = r0 * isentropic_radius_ratio(mach[..., k], mach[..., k + 1], gamma)
                tail = delta[..., k] + mach_angle_of(mach[..., k + 1])
                px, py = lip_x - r_end * np.cos(tail), lip_y - r_end * np.sin(tail)
                arc = isentropic_arc_length(r0, mach[..., k], mach[..., k + 1], gamma)
            ends_x.append(px)
            ends_y.append(py)
            rx, ry = _direction(delta[..., k])
            if k < n - 1:
                vx, vy = _direction(sigma[..., k + 1])
                straight = _line_parameter(px, py, rx, ry, lip_x, lip_y, vx, vy)
            else:  # to the foot of the normal from the lip: the entrance plane
                straight = (lip_x - px) * rx + (lip_y - py) * ry
            lengths.append(arc + straight)
        last = delta[..., -1]
        entrance = (lip_y - ends_y[-1]) * np.cos(last) - (lip_x - ends_x[-1]) * np.sin(last)
    stack = lambda arrays: np.stack(np.broadcast_arrays(*arrays), axis=-1)  # noqa: E731
    return IntakeGeometry(delta, stack(starts_x), stack(starts_y), stack(lengths), lip_x, lip_y,
                          entrance, stack(ends_x), stack(ends_y))


class LipCapture(NamedTuple):
    """Plain-core result of :func:`lip_streamline_capture`.

    ``shock_lead`` is, per ramp shock, how far ahead of the lip (along x) the
    shock crosses the lip's height: > 0 ahead of the lip (spilling), < 0
    inside the cowl. ``captured_height`` is the free-stream height of the
    streamline that reaches the lip.
    """

    shock_lead: np.ndarray
    captured_height: np.ndarray


def lip_streamline_capture(geometry, wave_angles):
    """Plain core: shock positions relative to the lip and the captured stream tube.

    Parameters
    ----------
    geometry : IntakeGeometry
        Fixed geometry (from :func:`shock_on_lip_geometry` at the design Mach number).
    wave_angles : ndarray
        Wave angles of the ramp shocks [rad] at the Mach number of interest,
        ramps on the last axis, broadcasting with the geometry's batch axes.

    Returns
    -------
    LipCapture

    Notes
    -----
    The shocks are straight lines from the fixed corners at σk = δ(k-1) + βk.
    The streamline that reaches the lip is traced upstream: behind shock k the
    flow is uniform and parallel to ramp k, so the trace is straight until it
    meets shock k, where it turns to the direction of ramp k - 1; ahead of
    shock 1 it is horizontal at the captured height. A shock that lies behind
    the lip (inside the cowl) is not crossed. Below design, neighbouring
    shocks cross each other above the lip streamline (the tests check this for
    typical layouts), so the streamline meets each shock on its own; the merged
    shock above it and the weak wave the merger sends back are neglected
    (common practice for preliminary spillage estimates).
    """
    beta = np.asarray(wave_angles, dtype=float)
    n = beta.shape[-1]
    sigma = geometry.ramp_angle - np.diff(geometry.ramp_angle, axis=-1, prepend=0.0) + beta
    shape = np.broadcast_shapes(sigma.shape[:-1], geometry.lip_x.shape)
    lip_x = np.broadcast_to(geometry.lip_x, shape)
    lip_y = np.broadcast_to(geometry.lip_y, shape)
    sigma = np.broadcast_to(sigma, shape + (n,))
    delta = np.broadcast_to(geometry.ramp_angle, shape + (n,))
    cx = np.broadcast_to(geometry.corner_x, shape + (n,))
    cy = np.broadcast_to(geometry.corner_y, shape + (n,))
    with np.errstate(invalid="ignore", divide="ignore"):
        lead = lip_x[..., None] - (cx + (lip_y[..., None] - cy) / np.tan(sigma))
        px, py = lip_x, lip_y
        for k in range(n - 1, -1, -1):
            ux, uy = _direction(delta[..., k])
            vx, vy = _direction(sigma[..., k])
            back = -_line_parameter(px, py, ux, uy, cx[..., k], cy[..., k], vx, vy)
            back = np.maximum(back, 0.0)  # a shock inside the cowl is not crossed
            px, py = px - back * ux, py - back * uy
    return LipCapture(lead, py)

