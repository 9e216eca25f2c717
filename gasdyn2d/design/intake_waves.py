"""Waves of a ramp intake beyond single oblique shocks: isentropic compression ramps and
ramp shocks that merge ahead of the cowl (plain core: floats and ndarrays, radians, SI).

**Isentropic compression stage.** A concave ramp that turns the flow by θ through a
Prandtl–Meyer compression focused on the cowl lip at the design Mach number: every
characteristic of the compression is a straight line through the lip (a centred simple
wave, centred on the lip). Across it ν falls by θ and the stagnation pressure is kept. In a
centred simple wave the velocity component normal to each ray is the speed of sound, so
the mass flow between the centre and a streamline is ρ a r on every ray, and the wall (a
streamline) lies at the distance

    r(M) = r0 [(1 + (γ-1)M²/2) / (1 + (γ-1)M0²/2)]^((γ+1)/(2(γ-1)))

from the lip on the ray at σ = δ + μ(M) (δ the local flow direction). With z = √(M²-1)
its arc length is ∫ r (γ+1) M / (2(1 + (γ-1)M²/2)) dz, smooth down to M = 1.

Off design the wall stays as built and the characteristics no longer meet at the lip:
below the design Mach number they cross ahead of it and the compression steepens into a
shock there (the envelope of the characteristics). The model is exact where the
characteristics do not cross ahead of the cowl; :func:`first_coalescence` finds where
they first do, so that the intake can flag it.

**Merging ramp shocks.** Off design two shocks of successive ramps (the same family)
meet at a point, merge into one stronger shock and send back a weak wave and a slip line
(:func:`gasdyn2d.merging_shocks`). :func:`wave_meeting_points` finds where two
straight waves from the ramp corners meet.

References
----------
Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley, §4.10-4.12
(simple waves, centred compressions and the forming of a shock).
Ames Research Staff (1953), NACA Report 1135, eq. 171 (Prandtl–Meyer function).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from ..relations.expansion_fans import mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from ..relations.isentropic import mach_angle_of

__all__ = [
    "isentropic_radius_ratio",
    "isentropic_arc_length",
    "isentropic_ramp_contour",
    "first_coalescence",
    "wave_meeting_points",
    "Coalescence",
    "MeetingPoints",
]

#: Gauss–Legendre nodes of the arc-length quadrature in z = √(M²-1) (the integrand is
#: smooth and slowly varying: 16 nodes reach rounding for the turns of an intake ramp).
_ARC_NODES, _ARC_WEIGHTS = np.polynomial.legendre.leggauss(16)
#: Characteristics sampled per stage when looking for their first crossing off design.
ENVELOPE_NODES = 65


def isentropic_radius_ratio(M_from, M_to, gamma=1.4):
    """Plain core: r(M_to)/r(M_from), the distance of a streamline from the centre of a
    centred simple wave, ρ a r = const: [(1 + hM_to²)/(1 + hM_from²)]^((γ+1)/(2(γ-1))),
    h = (γ-1)/2 (< 1 through a compression).

    Examples
    --------
    >>> from gasdyn2d.design.intake_waves import isentropic_radius_ratio
    >>> round(float(isentropic_radius_ratio(2.0, 1.6)), 6)
    0.592704
    """
    h = 0.5 * (np.asarray(gamma, dtype=float) - 1.0)
    exponent = (gamma + 1.0) / (2.0 * (gamma - 1.0))
    return ((1.0 + h * M_to * M_to) / (1.0 + h * M_from * M_from)) ** exponent


def isentropic_arc_length(r_start, M_start, M_end, gamma=1.4):
    """Plain core: length of the wall of a centred compression from M_start to M_end.

    ``r_start`` is the wall's distance from the centre (the lip) at M_start. The
    integrand r (γ+1) M / (2(1 + hM²)) in z = √(M²-1) is smooth; 16-point
    Gauss–Legendre quadrature (vectorised over cases).
    """
    r_start, M_start, M_end = np.broadcast_arrays(*(np.asarray(a, dtype=float)
                                                    for a in (r_start, M_start, M_end)))
    gamma = np.asarray(gamma, dtype=float)
    with np.errstate(invalid="ignore"):
        z0 = np.sqrt((M_start - 1.0) * (M_start + 1.0))
        z1 = np.sqrt((M_end - 1.0) * (M_end + 1.0))
        half, mid = 0.5 * (z0 - z1), 0.5 * (z0 + z1)
        z = mid[..., None] + half[..., None] * _ARC_NODES
        M = np.sqrt(1.0 + z * z)
        g = gamma[..., None] if gamma.ndim else gamma
        r = r_start[..., None] * isentropic_radius_ratio(M_start[..., None], M, g)
        integrand = r * (g + 1.0) * M / (2.0 * (1.0 + 0.5 * (g - 1.0) * M * M))
        return half * np.sum(integrand * _ARC_WEIGHTS, axis=-1)


def _unit(angle):
    return np.cos(angle), np.sin(angle)


def isentropic_ramp_contour(start_x, start_y, focus_x, focus_y, upstream_direction, M_start,
                            turn, gamma=1.4, n_points=33):
    """Plain core: points of the wall of a compression focused on (focus_x, focus_y).

    Parameters
    ----------
    start_x, start_y : float or ndarray
        Where the compression starts on the wall [m] (on the characteristic through the focus).
    focus_x, focus_y : float or ndarray
        The focus of the characteristics (the cowl lip at the design Mach number) [m].
    upstream_direction : float or ndarray
        Flow direction ahead of the compression [rad] from the free stream.
    M_start, turn : float or ndarray
        Mach number ahead of the compression [-] and its turn θ > 0 [rad].
    gamma : float, optional
        Ratio of specific heats [-].
    n_points : int, optional
        Points from start to end, equally spaced in turn.

    Returns
    -------
    x, y : ndarray
        Shape (..., n_points) [m]; NaN where the compression would reach M <= 1.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intake_waves import isentropic_ramp_contour
    >>> lip = np.cos(np.arcsin(0.4)), 0.4  # on the Mach line of M = 2.5 from (0, 0)
    >>> x, y = isentropic_ramp_contour(0.0, 0.0, *lip, 0.0, 2.5, np.radians(10.0), n_points=3)
    >>> np.round(x, 4) + 0.0, np.round(y, 4) + 0.0
    (array([0.    , 0.2651, 0.4574]), array([0.    , 0.0109, 0.0358]))
    """
    fraction = np.linspace(0.0, 1.0, int(n_points))
    args = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (
        start_x, start_y, focus_x, focus_y, upstream_direction, M_start, turn)))
    sx, sy, fx, fy, direction, M0, theta = (a[..., None] for a in args)
    with np.errstate(invalid="ignore"):
        nu = prandtl_meyer_angle(M0, gamma) - theta * fraction
        M = mach_from_prandtl_meyer_angle(nu, gamma)
        r = np.hypot(fx - sx, fy - sy) * isentropic_radius_ratio(M0, M, gamma)
        ex, ey = _unit(direction + theta * fraction + mach_angle_of(M))
        return fx - r * ex, fy - r * ey


class Coalescence(NamedTuple):
    """Plain-core result of :func:`first_coalescence` (ndarrays)."""

    x: np.ndarray  #: where neighbouring characteristics first cross [m]: the shock forms there
    y: np.ndarray
    distance: np.ndarray  #: from the wall along that characteristic [m] (the smallest)


def first_coalescence(start_x, start_y, focus_x, focus_y, upstream_direction, M_design, M_start,
                      turn, gamma=1.4, n_nodes=ENVELOPE_NODES):
    """Plain core: where the characteristics of a focused compression first cross off design.

    The wall is the one built for the upstream Mach number ``M_design`` (focused on
    the focus); the flow meets it at ``M_start``. Characteristic from the wall point
    W(δ) at σ(δ) = δ + μ(M(δ)); neighbouring ones meet on the envelope at distance
    t = -(W'·n)/σ' along it (n the unit normal, ' = d/dδ), with, from the closed forms
    of the centred wave, W' = -r'e(σd) - r σd' n(σd), d ln r/dδ = -(γ+1)M²/(2√(M²-1))
    and σ' = (γ+1)M²/(2(M²-1)). At the design Mach number t = r and every envelope
    point is the focus. The shock forms where the characteristics cross first, the
    envelope point nearest the wall (smallest t > 0) of ``n_nodes`` characteristics
    equally spaced in turn; that point is returned. Below the design Mach number it
    lies ahead of the focus and above it (outside a stream tube that ends at the
    focus), above design ahead of the focus and below it.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intake_waves import first_coalescence
    >>> lip = np.cos(np.arcsin(0.4)), 0.4  # on the Mach line of M = 2.5 from (0, 0)
    >>> on = first_coalescence(0.0, 0.0, *lip, 0.0, 2.5, 2.5, np.radians(10.0))
    >>> bool(np.isclose(on.x, lip[0], rtol=1e-12) and np.isclose(on.y, lip[1], rtol=1e-12))
    True
    >>> below = first_coalescence(0.0, 0.0, *lip, 0.0, 2.5, 2.3, np.radians(10.0))
    >>> bool(below.x < lip[0] and below.y > lip[1])
    True
    """
    fraction = np.linspace(0.0, 1.0, int(n_nodes))
    args = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (
        start_x, start_y, focus_x, focus_y, upstream_direction, M_design, M_start, turn)))
    sx, sy, fx, fy, direction, Md0, M0, theta = (a[..., None] for a in args)
    with np.errstate(invalid="ignore", divide="ignore"):
        delta = direction + theta * fraction
        Md = mach_from_prandtl_meyer_angle(prandtl_meyer_angle(Md0, gamma) - theta * fraction, gamma)
        M = mach_from_prandtl_meyer_angle(prandtl_meyer_angle(M0, gamma) - theta * fraction, gamma)
        r = np.hypot(fx - sx, fy - sy) * isentropic_radius_ratio(Md0, Md, gamma)
        sigma_d = delta + mach_angle_of(Md)
        ex, ey = _unit(sigma_d)
        nx_, ny_ = -ey, ex
        md2, m2 = Md * Md, M * M
        dr = -r * (gamma + 1.0) * md2 / (2.0 * np.sqrt(md2 - 1.0))
        dsigma_d = (gamma + 1.0) * md2 / (2.0 * (md2 - 1.0))
        wx, wy = fx - r * ex, fy - r * ey  # the wall point
        dwx, dwy = -dr * ex - r * dsigma_d * nx_, -dr * ey - r * dsigma_d * ny_
        sigma = delta + mach_angle_of(M)
        cx, cy = _unit(sigma)
        t = (dwx * cy - dwy * cx) / ((gamma + 1.0) * m2 / (2.0 * (m2 - 1.0)))
        px, py = wx + t * cx, wy + t * cy
        t_ok = np.where(t > 0.0, t, np.inf)
        first = np.argmin(t_ok, axis=-1)[..., None]
        pick = lambda a: np.take_along_axis(a, first, axis=-1)[..., 0]  # noqa: E731
        none = ~np.isfinite(pick(t_ok))
        return Coalescence(*(np.where(none, np.nan, pick(a)) for a in (px, py, t)))


class MeetingPoints(NamedTuple):
    """Plain-core result of :func:`wave_meeting_points` (ndarrays)."""

    x: np.ndarray  #: where the two waves meet [m]
    y: np.ndarray
    along_first: np.ndarray  #: distance from the first wave's start [m] (> 0 downstream)
    along_second: np.ndarray  #: distance from the second wave's start [m]


def wave_meeting_points(x1, y1, angle1, x2, y2, angle2):
    """Plain core: where the straight waves from (x1, y1) at ``angle1`` and from (x2, y2) at
    ``angle2`` [rad, from the free stream] meet (NaN for parallel waves).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intake_waves import wave_meeting_points
    >>> p = wave_meeting_points(0.0, 0.0, np.pi / 4, 1.0, 0.0, np.pi / 2)
    >>> round(float(p.x), 12), round(float(p.y), 12), round(float(p.along_second), 12)
    (1.0, 1.0, 1.0)
    """
    ux, uy = _unit(np.asarray(angle1, dtype=float))
    vx, vy = _unit(np.asarray(angle2, dtype=float))
    with np.errstate(invalid="ignore", divide="ignore"):
        cross = ux * vy - uy * vx
        dx, dy = np.asarray(x2, dtype=float) - x1, np.asarray(y2, dtype=float) - y1
        t1 = (dx * vy - dy * vx) / cross
        t2 = (dx * uy - dy * ux) / cross
    return MeetingPoints(x1 + t1 * ux, y1 + t1 * uy, t1, t2)
