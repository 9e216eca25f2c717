"""Supersonic nozzle contours designed by the method of characteristics, planar or round.

Unit boundary: :func:`minimum_length_nozzle` (sharp throat corner) and
:func:`rounded_throat_nozzle` (circular-arc throat), each with
``geometry="planar"`` (default) or ``"axisymmetric"``. The planar nets are
marched here (the corner fan by
:func:`gasdyn2d.characteristics.fan_nets.march_fan_band`); the round ones by
:mod:`gasdyn2d.characteristics.round_nozzles`. Every result has a
``performance(p0=..., T0=..., p_ambient=...)`` method
(:mod:`gasdyn2d.characteristics.performance`).
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary.results import ResultTable, unit_field
from .channels import march_rows
from .design_calls import DesignCall
from .fan_nets import band_segments, march_fan_band
from .performance import ExitPlane, NozzlePerformanceMixin
from .round_nozzles import (
    round_minimum_length_design,
    round_rounded_throat_design,
    sauer_round_discharge_coefficient,
    sauer_round_start_line,
)
from .unit_processes import (
    ROUND_LINE_LIMIT,
    CharacteristicNet,
    check_geometry,
    WallContour,
    cancellation_point,
    mach_angle_from_nu,
    symmetry_point,
)
from ..errors import NoSolutionError
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.isentropic import area_ratio as isentropic_area_ratio

__all__ = [
    "minimum_length_nozzle",
    "MinimumLengthNozzle",
    "minimum_length_contour",
    "rounded_throat_nozzle",
    "RoundedThroatNozzle",
    "sauer_start_line",
    "sauer_discharge_coefficient",
]


@dataclasses.dataclass(frozen=True, repr=False)
class MinimumLengthNozzle(NozzlePerformanceMixin, ResultTable):
    """Upper half of a minimum-length nozzle (the centreline or axis is y = 0).

    Lengths are in the unit of ``throat_half_height`` (a Quantity if it was
    one). A round nozzle's "half-heights" are radii and its area ratio is
    (exit radius / throat radius)². ``performance(p0=..., T0=..., p_ambient=...)``
    gives its mass flow, thrust and specific impulse.
    """

    mach_exit: float = unit_field("")  #: design exit Mach number
    n_characteristics: int = unit_field("")  #: lines in the corner fan
    wall_x: object = unit_field("m")  #: wall contour abscissae, throat corner first
    wall_y: object = unit_field("m")  #: wall contour ordinates
    length: object = unit_field("m")  #: throat-to-exit length along the axis
    exit_half_height: object = unit_field("m")  #: half-height of the exit
    area_ratio: float = unit_field("")  #: exit-to-throat area ratio of the contour
    area_ratio_isentropic: float = unit_field("")  #: A/A* of the design Mach number
    max_wall_angle: object = unit_field("rad")  #: largest wall angle (planar: the corner's, ν/2)
    net: CharacteristicNet | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)
    geometry: str = unit_field("", default="planar")  #: "planar" or "axisymmetric"
    #: wall angle at the throat corner: the turn of the corner fan (round: below max_wall_angle)
    corner_angle: object = unit_field("rad", default=None)
    #: the computed exit plane, for ``performance`` (SI)
    exit_plane: ExitPlane | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)


def minimum_length_contour(M_exit, n_characteristics, gamma=1.4):
    """Plain core: wall x, y, net band and fan of a minimum-length nozzle (throat half-height 1).

    Returns
    -------
    wall_x, wall_y : ndarray, shape (n + 1,)
        Wall nodes from the corner (0, 1) to the exit.
    band : _Band
        The marched net (see :func:`gasdyn2d.characteristics.unit_processes.march_fan_band`).
    """
    n = int(n_characteristics)
    theta_max = 0.5 * float(prandtl_meyer_angle(M_exit, gamma))
    fan = theta_max * np.arange(1, n + 1) / n  # common practice: equal steps, last = θmax
    band = march_fan_band(fan, fan, 0.0, 1.0, boundary="cancel", n_plus_lines=n, gamma=gamma)
    return band.x[:, n + 1], band.y[:, n + 1], band


def minimum_length_nozzle(M_exit, *, n_characteristics=50, gamma=1.4, throat_half_height=0.01,
                          geometry="planar"):
    """Contour of a minimum-length nozzle with a sharp throat corner, planar or round.

    A sonic stream at a straight throat of half-height h turns round the
    throat corner through a centred fan of ``n_characteristics`` lines (to
    the wall angle ν(M_exit)/2 in planar flow); the fan reflects from the
    centreline, and the contour is shaped so that every reflected line meets
    it without reflection, leaving a uniform, parallel stream at M_exit.

    Parameters
    ----------
    M_exit : float
        Design exit Mach number [-], > 1.
    n_characteristics : int, optional
        Lines in the corner fan (>= 2). The area-ratio error falls as n^(-4/3).
    gamma : float, optional
        Ratio of specific heats [-], > 1.
    throat_half_height : float or Quantity, optional
        Half-height h of the throat [m] (its radius, round); lengths scale
        with it. Default 0.01 m (a 20 mm throat, a laboratory size); every length of the
        result is in the unit given here (metres for a plain number).
    geometry : {"planar", "axisymmetric"}, optional
        Planar (default; per unit depth) or round (axisymmetric) nozzle.

    Returns
    -------
    MinimumLengthNozzle

    Raises
    ------
    InvalidInputError
        M_exit not above 1, a non-integer or too small n, gamma <= 1, a
        non-positive throat half-height, an unknown geometry, an array where
        one value is wanted, or NaN (a contour cannot be NaN).

    Notes
    -----
    Fan lines carry θ = ν = θmax·k/n (k = 1..n) at the corner, θmax = ν(M_exit)/2.
    Node (b, a) of C+ line b and C- line a has θ = θa - θb, ν = θa + θb
    exactly; its position comes from straight segments with averaged
    directions (second order). The wall node on C+ line b keeps that line's
    state; the wall between nodes is straight at the mean flow angle. The
    exit height converges to the isentropic A/A* at order 4/3 in 1/n
    (measured 1.20 to 1.33 for n = 10 to 400; from below once n >= 20 for
    M <= 5, while coarse nets at high M overshoot, +0.56 % at M 10 and
    +5.5 % at M 20 for n = 50): the first fan line stands
    for the whole near-sonic region up to θ1 = θmax/n, where M - 1 ∝ θ1^(2/3)
    and the area defect ∝ (M - 1)². At M 2.8 the relative error is 1.3e-2
    for n = 10 and 2.9e-4 for n = 200.
    The result is an inviscid contour: a real nozzle needs a boundary-layer
    displacement correction and a rounded throat.

    Round nozzles (``geometry="axisymmetric"``): the corner angle is found by
    a root-find on whole kernels (the fan's waves strengthen towards the
    axis: about 0.22 ν(M_exit) at Mach 2), the fan lines are clustered to the
    sonic end (ν ∝ (k/n)⁴), and the wall is the streamline through the marched
    flow between the last fan line and the uniform exit characteristic; it
    bends further out after the corner before straightening
    (``max_wall_angle`` > ``corner_angle``). The area ratio converges to the
    isentropic one at first order: -4.8e-4 (Mach 2) and -6.6e-4 (Mach 3)
    relative at n = 100. See :mod:`gasdyn2d.characteristics.round_nozzles`.

    References
    ----------
    Zucrow, M. J. & Hoffman, J. D. (1977), *Gas Dynamics*, Vol. 2, ch. 16 (chapter from memory).
    Ames Research Staff (1953), NACA Report 1135, eqs. 80 and 171.

    Examples
    --------
    Contour for a small blowdown tunnel at Mach 2.8 with a 20 mm high throat:

    >>> from gasdyn2d.characteristics.nozzles import minimum_length_nozzle
    >>> nozzle = minimum_length_nozzle(2.8, n_characteristics=100, throat_half_height=0.010)
    >>> round(nozzle.area_ratio, 3), round(nozzle.area_ratio_isentropic, 3)
    (3.498, 3.5)
    >>> round(float(nozzle.length), 4)   # metres
    0.1327

    A round nozzle of the same throat radius:

    >>> round_nozzle = minimum_length_nozzle(2.8, n_characteristics=100, throat_half_height=0.010,
    ...                                      geometry="axisymmetric")
    >>> round(round_nozzle.area_ratio, 3), round(float(round_nozzle.length), 4)
    (3.498, 0.0717)
    """
    call = DesignCall("minimum_length_nozzle")
    M, g, h = _design_inputs(call, M_exit, gamma, throat_half_height)
    round_ = check_geometry(geometry)
    n = line_count(call, n_characteristics, ROUND_LINE_LIMIT if round_ else 5000)
    if round_:
        return _round_minimum_length_nozzle(call, M, n, g, h)
    wall_x, wall_y, band = minimum_length_contour(M, n, g)
    net = _nozzle_net(band, n, h, g)
    exit_y = float(wall_y[-1])
    corner = 0.5 * float(prandtl_meyer_angle(M, g))
    return MinimumLengthNozzle(
        mach_exit=M,
        n_characteristics=n,
        wall_x=call.length(h * wall_x),
        wall_y=call.length(h * wall_y),
        length=call.length(h * float(wall_x[-1])),
        exit_half_height=call.length(h * exit_y),
        area_ratio=exit_y,
        area_ratio_isentropic=float(isentropic_area_ratio(M, g)),
        max_wall_angle=call.angle(corner),
        net=call.net(net),
        geometry="planar",
        corner_angle=call.angle(corner),
        exit_plane=ExitPlane.uniform("planar", h, h * exit_y, M, g),
    )


def _design_inputs(call, M_exit, gamma, throat_half_height):
    """M_exit, γ and the throat half-height [m] of a nozzle design, checked."""
    M = call.scalar("M_exit", M_exit)
    g = call.scalar("gamma", gamma)
    h = call.positive("throat_half_height", throat_half_height, "m")
    call.check(1.0 < g < np.inf, "gamma", g, "a finite ratio of specific heats > 1")
    call.check(1.0 < M < np.inf, "M_exit", M, "finite and > 1 (a supersonic exit)")
    return M, g, h


def line_count(call, n, limit):
    """An integer number of fan lines from 2 to ``limit`` (5000; 400 for the round nets,
    whose node records, seven per node and marched as a batch, grow as n²)."""
    return call.count("n_characteristics", n, 2, limit,
                      "Use 20-200 lines: the area-ratio error falls as n^(-4/3).")


def _round_minimum_length_nozzle(call, M, n, gamma, h):
    """The round minimum-length nozzle (unit boundary part; design in round_nozzles)."""
    design = round_minimum_length_design(M, n, gamma)
    wall_x, wall_y, wall_theta = design.wall[:3]
    x, y, theta, nu, plus, minus = design.net
    exit_r = float(wall_y[-1])
    return MinimumLengthNozzle(
        mach_exit=M, n_characteristics=n, wall_x=call.length(h * wall_x),
        wall_y=call.length(h * wall_y), length=call.length(h * float(wall_x[-1])),
        exit_half_height=call.length(h * exit_r),
        area_ratio=exit_r * exit_r, area_ratio_isentropic=float(isentropic_area_ratio(M, gamma)),
        max_wall_angle=call.angle(float(np.max(wall_theta))),
        net=call.net(CharacteristicNet.from_nodes(h * x, h * y, theta, nu, plus, minus, gamma)),
        geometry="axisymmetric", corner_angle=call.angle(design.corner_angle),
        exit_plane=ExitPlane.uniform("axisymmetric", h, h * exit_r, M, gamma),
    )


def _nozzle_net(band, n, h, gamma):
    """Corner, interior, centreline and wall nodes (the straight C+ tails end at the wall)."""
    valid = band.valid.copy()
    wall = np.zeros_like(valid)
    wall[:, n + 1] = True
    plus, minus, keep = band_segments(valid)
    flat_wall = wall[keep]
    minus = minus[~(flat_wall[minus[:, 0]] & flat_wall[minus[:, 1]])]  # the wall is no C-
    return CharacteristicNet.from_nodes(
        h * band.x[keep], h * band.y[keep], band.theta[keep], band.nu[keep], plus, minus, gamma)


# ------------------------------------------------------------- rounded throat


@dataclasses.dataclass(frozen=True, repr=False)
class RoundedThroatNozzle(NozzlePerformanceMixin, ResultTable):
    """Upper half of a nozzle with a circular-arc throat (centreline or axis y = 0).

    Lengths are in the unit of ``throat_half_height`` (a Quantity if it was
    one); a round nozzle's half-heights are radii. ``performance(...)`` gives
    its mass flow, thrust and specific impulse.
    """

    mach_exit: float = unit_field("")  #: design exit Mach number
    throat_radius: object = unit_field("m")  #: radius of the circular-arc throat wall
    wall_x: object = unit_field("m")  #: wall contour abscissae from the throat (x = 0)
    wall_y: object = unit_field("m")  #: wall contour ordinates
    inflection_x: object = unit_field("m")  #: where the arc ends and the straightening begins
    inflection_angle: object = unit_field("rad")  #: wall angle at the end of the arc
    length: object = unit_field("m")  #: throat-to-exit length
    exit_half_height: object = unit_field("m")
    area_ratio: float = unit_field("")  #: exit-to-throat area ratio of the contour
    area_ratio_isentropic: float = unit_field("")  #: A/A* of the design Mach number
    discharge_coefficient: float = unit_field("")  #: Sauer's throat mass flow over ρ*a*·A*
    net: CharacteristicNet | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)
    geometry: str = unit_field("", default="planar")  #: "planar" or "axisymmetric"
    #: largest wall angle (planar: at the arc's end; round: further on, the wall bends out)
    max_wall_angle: object = unit_field("rad", default=None)
    #: the computed exit plane, for ``performance`` (SI)
    exit_plane: ExitPlane | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)


_START_PERTURBATION = 0.02  # Sauer's axial velocity excess u/a* on the axis at the start line


def sauer_start_line(throat_radius, n_points, gamma=1.4, axis_excess=_START_PERTURBATION, *,
                     geometry="planar"):
    """Plain core: x, y, θ, ν [rad] on a straight start line just past a rounded throat.

    Throat half-height 1 at x = 0 (the narrowest section), wall radius of
    curvature ``throat_radius``.

    Notes
    -----
    Sauer's transonic solution for planar flow, in coordinates (ξ, y) with the
    sonic point of the axis at ξ = 0: u/a* = 1 + αξ + (γ+1)α²y²/2,
    v/a* = (γ+1)α²ξy + (γ+1)²α³y³/6, α = 1/√((γ+1)R). Its wall streamline is
    narrowest at ξ = -(γ+1)α/6, which is x = 0 here. The line stands at
    ξ0 = ``axis_excess``/α, where u/a* - 1 = ``axis_excess`` on the axis.

    References
    ----------
    Sauer, R. (1947), "General characteristics of the flow through nozzles at
    near critical speeds", NACA TM 1147 (number from memory; planar case; the coefficients and
    the throat shift are re-derived here from the transonic small-disturbance
    equation). Round throats (``geometry="axisymmetric"``, radius 1):
    :func:`gasdyn2d.characteristics.round_nozzles.sauer_round_start_line`.
    """
    if check_geometry(geometry):
        return sauer_round_start_line(throat_radius, n_points, gamma, axis_excess)
    alpha = 1.0 / np.sqrt((gamma + 1.0) * throat_radius)
    k = gamma + 1.0
    xi0 = axis_excess / alpha
    x_line = xi0 + k * alpha / 6.0  # the narrowest section is at ξ = -(γ+1)α/6
    y_wall = 1.0 + throat_radius - np.sqrt(throat_radius**2 - x_line * x_line)
    y = np.linspace(0.0, y_wall, n_points)
    u = alpha * xi0 + 0.5 * k * alpha**2 * y * y
    v = k * alpha**2 * xi0 * y + k * k * alpha**3 * y**3 / 6.0
    q2 = (1.0 + u) ** 2 + v * v  # (q/a*)²
    mach = np.sqrt(2.0 * q2 / (k - (gamma - 1.0) * q2))
    theta = np.arctan2(v, 1.0 + u)
    theta[-1] = np.arcsin(x_line / throat_radius)  # the wall's own angle at the last node
    return np.full(n_points, x_line), y, theta, prandtl_meyer_angle(mach, gamma)


def sauer_discharge_coefficient(throat_radius, gamma=1.4, n_points=2001, *, geometry="planar"):
    """Plain core: mass flow of Sauer's throat over ρ*a*·h (planar, R in half-heights).

    Integrates the mass flux of Sauer's transonic field across the narrowest
    section (trapezoidal rule, ``n_points``). For large R it tends to
    1 - (γ+1)/(90R²), from ρV/(ρ*a*) ≈ 1 - (γ+1)u'²/2 with u' = (3y² - 1)/(6R).

    Examples
    --------
    >>> from gasdyn2d.characteristics.nozzles import sauer_discharge_coefficient
    >>> round(sauer_discharge_coefficient(5.0), 6)
    0.998915

    A round throat (R in throat radii) tends to 1 - (γ+1)/(96R²) instead
    (:func:`gasdyn2d.characteristics.round_nozzles.sauer_round_discharge_coefficient`):

    >>> round(sauer_discharge_coefficient(5.0, geometry="axisymmetric"), 6)
    0.998976
    """
    if check_geometry(geometry):
        return sauer_round_discharge_coefficient(throat_radius, gamma, n_points)
    k = gamma + 1.0
    alpha = 1.0 / np.sqrt(k * throat_radius)
    xi = -k * alpha / 6.0
    y = np.linspace(0.0, 1.0, n_points)
    u = alpha * xi + 0.5 * k * alpha**2 * y * y
    v = k * alpha**2 * xi * y + k * k * alpha**3 * y**3 / 6.0
    q2 = (1.0 + u) ** 2 + v * v
    mach = np.sqrt(2.0 * q2 / (k - (gamma - 1.0) * q2))
    flux = np.cos(np.arctan2(v, 1.0 + u)) / isentropic_area_ratio(mach, gamma)
    return float(np.sum(0.5 * (flux[1:] + flux[:-1]) * np.diff(y)))


def rounded_throat_nozzle(M_exit, *, throat_radius=None, n_points=31, gamma=1.4,
                          throat_half_height=0.01, geometry="planar"):
    """Contour of a nozzle whose throat wall is a circular arc, by characteristics, planar or round.

    The wall leaves the throat on a circular arc of ``throat_radius`` and
    expands the stream until the C- characteristic from the arc's end reaches
    the centreline at exactly M_exit; beyond that line a straightening
    contour cancels every arriving C+ wave, leaving a uniform, parallel exit.

    Parameters
    ----------
    M_exit : float
        Design exit Mach number [-], > 1.
    throat_radius : float or Quantity, optional
        Radius of the throat arc [m], at least twice ``throat_half_height``
        (default: twice it).
    n_points : int, optional
        Nodes on the start line across the half-throat (>= 5).
    gamma : float, optional
        Ratio of specific heats [-].
    throat_half_height : float or Quantity, optional
        Throat half-height h [m] (the throat radius of a round nozzle).
        Default 0.01 m (a 20 mm throat, a laboratory size); every length of the
        result is in the unit given here (metres for a plain number).
    geometry : {"planar", "axisymmetric"}, optional
        Planar (default; per unit depth) or round nozzle.

    Returns
    -------
    RoundedThroatNozzle

    Notes
    -----
    Start line: Sauer's transonic solution at x0 where u/a* = 0.02 on the axis
    (it holds for R >> h; the wall angle there is x0/R). The kernel (start
    line, centreline, arc) is marched in rows; the arc's end A is where
    θ + ν on the wall, interpolated between wall nodes, reaches ν(M_exit). The
    C- from A to the centreline is built through the C+ lines of the kernel
    (each crossing has the exact state K- = ν(M_exit), K+ of that line), and
    the straightening wall takes each C+ from it without reflection. Mass
    balance: area_ratio = (start-line mass flow) · A/A*(M_exit) to the
    discretisation error, second order in 1/n_points (the wall is a
    streamline); the start line's mass flow differs from Sauer's throat
    value (``discharge_coefficient``, 1 - (γ+1)/(90R²) for large R) by the
    transonic approximation's own error, 1.5e-3 at R = 2 and 1.2e-5 at R = 20.

    Round nozzles: the start line is Sauer's axisymmetric solution
    (:func:`gasdyn2d.characteristics.round_nozzles.sauer_round_start_line`),
    the arc ends where the C- from it, carrying the source term, reaches the
    axis at ν(M_exit), and the wall beyond is the streamline through the
    marched flow up to the exit characteristic (it bends further out first:
    ``max_wall_angle`` exceeds ``inflection_angle``, which is then the arc's
    end rather than an inflection). The mass balance converges at second
    order (4.0e-4 at 41 points, Mach 2.8, R = 2).

    References
    ----------
    Sauer (1947), NACA TM 1147 (from memory); Zucrow & Hoffman (1977), *Gas Dynamics*,
    Vol. 2, ch. 16 (design of the straightening contour).

    Examples
    --------
    The small Mach 2.8 blowdown tunnel (throat 20 mm high, the default) with a
    rounded throat of radius 2h = 20 mm:

    >>> from gasdyn2d.characteristics.nozzles import rounded_throat_nozzle
    >>> nozzle = rounded_throat_nozzle(2.8, throat_radius=0.02, n_points=31)
    >>> round(nozzle.area_ratio / nozzle.area_ratio_isentropic, 3)   # the throat's mass deficit
    0.992
    >>> import numpy as np
    >>> round(float(np.degrees(nozzle.inflection_angle)), 2), round(float(nozzle.length), 4)
    (22.87, 0.1435)
    """
    call = DesignCall("rounded_throat_nozzle")
    M, g, h = _design_inputs(call, M_exit, gamma, throat_half_height)
    if throat_radius is None:
        R_over_h = 2.0
    else:
        R_over_h = call.positive("throat_radius", throat_radius, "m") / h
    call.check(R_over_h >= 2.0, "throat_radius / throat_half_height", R_over_h,
               ">= 2 (throat_radius at least twice throat_half_height: Sauer's transonic start "
               "line needs a gentle throat; tighter arcs fold the kernel)")
    n_points = call.count("n_points", n_points, 5, 2000)
    if check_geometry(geometry):
        return _round_rounded_throat_nozzle(call, M, R_over_h, n_points, g, h)
    wall_x, wall_y, x_a, theta_a, cd, net = _rounded_throat_design(M, R_over_h, n_points, g)
    return RoundedThroatNozzle(
        mach_exit=M, throat_radius=call.length(h * R_over_h), wall_x=call.length(h * wall_x),
        wall_y=call.length(h * wall_y), inflection_x=call.length(h * x_a),
        inflection_angle=call.angle(theta_a), length=call.length(h * wall_x[-1]),
        exit_half_height=call.length(h * wall_y[-1]),
        area_ratio=float(wall_y[-1]), area_ratio_isentropic=float(isentropic_area_ratio(M, g)),
        discharge_coefficient=cd,
        net=call.net(CharacteristicNet.from_nodes(h * net[0], h * net[1], *net[2:], g)),
        geometry="planar", max_wall_angle=call.angle(theta_a),
        exit_plane=ExitPlane.uniform("planar", h, h * float(wall_y[-1]), M, g, cd),
    )


def _round_rounded_throat_nozzle(call, M, R, n_points, gamma, h):
    """The round rounded-throat nozzle (unit boundary part; design in round_nozzles)."""
    design, x_a, theta_a, cd = round_rounded_throat_design(M, R, n_points, gamma)
    wall_x, wall_y, wall_theta = design.wall[:3]
    x, y, theta, nu, plus, minus = design.net
    exit_r = float(wall_y[-1])
    return RoundedThroatNozzle(
        mach_exit=M, throat_radius=call.length(h * R), wall_x=call.length(h * wall_x),
        wall_y=call.length(h * wall_y), inflection_x=call.length(h * x_a),
        inflection_angle=call.angle(theta_a), length=call.length(h * float(wall_x[-1])),
        exit_half_height=call.length(h * exit_r),
        area_ratio=exit_r * exit_r, area_ratio_isentropic=float(isentropic_area_ratio(M, gamma)),
        discharge_coefficient=cd,
        net=call.net(CharacteristicNet.from_nodes(h * x, h * y, theta, nu, plus, minus, gamma)),
        geometry="axisymmetric", max_wall_angle=call.angle(float(np.max(wall_theta))),
        exit_plane=ExitPlane.uniform("axisymmetric", h, h * exit_r, M, gamma, cd),
    )


def _rounded_throat_design(M, R, n, gamma):
    """Kernel march, arc end, last C- and straightening wall (throat half-height 1)."""
    nu_exit = float(prandtl_meyer_angle(M, gamma))
    x0, y0, th0, nu0 = sauer_start_line(R, n, gamma)
    discharge = sauer_discharge_coefficient(R, gamma)
    # the arc end cannot turn the wall beyond ν(M_exit)/2 (θ_A = (ν_exit + K+)/2, K+ <= 0),
    # so the kernel's wall may go straight after that angle
    arc = WallContour.bend(1.0, 0.0, 0.5 * nu_exit, R)
    nodes, _, reason, fold = march_rows(x0, y0, th0, nu0, None, arc, gamma,
                                        _past_exit_state(nu_exit))
    if reason != "length":
        raise NoSolutionError(
            f"the kernel of the rounded throat folded ({reason}) at x = {fold[0]:.6g}, "
            f"y = {fold[1]:.6g} throat half-heights before reaching M_exit on the axis; try a "
            "larger throat_radius or more n_points.")
    x, y, theta, nu = nodes.arrays()
    plus = np.concatenate(nodes.plus)
    minus = np.concatenate(nodes.minus)
    upper = np.array(nodes.upper)
    # arc end A: θ + ν on the wall reaches ν(M_exit) (K+ interpolated between wall nodes)
    k_minus_wall = theta[upper] + nu[upper]
    k = int(np.argmax(k_minus_wall >= nu_exit))
    if k == 0:
        raise NoSolutionError(
            f"M_exit = {M:g} is too low for a throat of radius {R:g} half-heights: the start "
            "line at the wall already has θ + ν above ν(M_exit), so the arc would have to end "
            "before it. Use a larger throat_radius (or minimum_length_nozzle).")
    x_a, theta_a, plus_a = _arc_end(x[upper[k - 1:k + 1]], (theta - nu)[upper[k - 1:k + 1]],
                                    arc, nu_exit)
    y_a = float(arc.height(x_a))
    line = _last_minus_line(x, y, theta - nu, plus, nodes.plus, x_a, y_a, theta_a, plus_a,
                            nu_exit, gamma)
    wall_x2, wall_y2 = _straightening_wall(line, x_a, y_a, theta_a, gamma)
    keep_wall = x[upper] < x_a
    wall_x = np.concatenate([[0.0], x[upper][keep_wall], [x_a], wall_x2])
    wall_y = np.concatenate([[1.0], y[upper][keep_wall], [y_a], wall_y2])
    net = _rounded_net(x, y, theta, nu, plus, minus, nu_exit, line, wall_x2, wall_y2, x_a, y_a)
    return wall_x, wall_y, x_a, theta_a, discharge, net


def _past_exit_state(nu_exit):
    """Stop once the whole row is past the axis point where ν = ν(M_exit)."""
    def stop(row):
        return row.lower_on_wall and row.nu[0] > nu_exit and row.theta[-1] + row.nu[-1] > nu_exit
    return stop


def _arc_end(wall_x, wall_plus, arc, nu_exit):
    """x on the arc where 2θ(x) - K+(x) = ν_exit, K+ linear between two wall nodes."""
    from scipy.optimize import brentq

    def residual(xq):
        w = (xq - wall_x[0]) / (wall_x[1] - wall_x[0])
        k_plus = wall_plus[0] + w * (wall_plus[1] - wall_plus[0])
        return 2.0 * np.arctan(float(arc.slope(xq))) - k_plus - nu_exit

    x_a = brentq(residual, wall_x[0], wall_x[1], xtol=1e-15, rtol=1e-15)
    theta_a = float(np.arctan(arc.slope(x_a)))
    return x_a, theta_a, 2.0 * theta_a - nu_exit


def _last_minus_line(x, y, k_plus, plus, plus_blocks, x_a, y_a, theta_a, plus_a, nu_exit, gamma):
    """Nodes of the C- from the arc end to the centreline, on the kernel's C+ lines."""
    line_id = np.arange(x.size)
    for block in plus_blocks:  # blocks are in marching order: predecessors come first
        line_id[block[:, 1]] = line_id[block[:, 0]]
    seg_line = line_id[plus[:, 0]]
    seg_k = k_plus[plus[:, 0]]
    crossing = np.unique(seg_line[(seg_k < plus_a) & (seg_k > -nu_exit)])
    order = np.argsort(-k_plus[crossing])  # K+ falls downstream
    px, py, pt, pn = [x_a], [y_a], [theta_a], [nu_exit - theta_a]
    for line in crossing[order]:
        segs = plus[seg_line == line]
        kp = k_plus[line]
        th3, nu3 = 0.5 * (nu_exit + kp), 0.5 * (nu_exit - kp)
        mu_prev, mu3 = mach_angle_from_nu(np.array([pn[-1], nu3]), gamma)
        direction = 0.5 * ((pt[-1] - mu_prev) + (th3 - mu3))
        xs, ys, t, s = _ray_meets_segments(px[-1], py[-1], direction, x[segs[:, 0]], y[segs[:, 0]],
                                           x[segs[:, 1]], y[segs[:, 1]])
        if xs is None:
            continue  # this C+ line ends before the C- reaches it
        px.append(xs), py.append(ys), pt.append(th3), pn.append(nu3)
    # the centreline point: θ = 0, ν = ν_exit
    b = symmetry_point(px[-1], py[-1], pt[-1], pn[-1], gamma)
    px.append(float(b[0])), py.append(0.0), pt.append(0.0), pn.append(nu_exit)
    return np.array(px), np.array(py), np.array(pt), np.array(pn)


def _ray_meets_segments(x0, y0, direction, xa, ya, xb, yb):
    """First crossing (t > 0) of a ray with any of the segments (a→b); None if none."""
    c, s = np.cos(direction), np.sin(direction)
    ex, ey = xb - xa, yb - ya
    det = ex * s - ey * c
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (ex * (ya - y0) - ey * (xa - x0)) / det
        r = (c * (ya - y0) - s * (xa - x0)) / det
    hit = (r >= 0) & (r <= 1) & (t > 0)
    if not np.any(hit):
        return None, None, None, None
    k = np.flatnonzero(hit)[np.argmin(t[hit])]
    return float(x0 + t[k] * c), float(y0 + t[k] * s), float(t[k]), float(r[k])


def _straightening_wall(line, x_a, y_a, theta_a, gamma):
    """Wall nodes that take each C+ from the last C- without reflection."""
    px, py, pt, pn = line
    wx, wy, wt = [x_a], [y_a], [theta_a]
    for k in range(1, px.size):
        r = cancellation_point(px[k], py[k], pt[k], pn[k], wx[-1], wy[-1], wt[-1], gamma)
        wx.append(float(r[0])), wy.append(float(r[1])), wt.append(float(r[2]))
    return np.array(wx[1:]), np.array(wy[1:])


def _rounded_net(x, y, theta, nu, plus, minus, nu_exit, line, wall_x2, wall_y2, x_a, y_a):
    """Kernel nodes up to the last C-, that line, and the straight C+ to the wall."""
    keep = theta + nu <= nu_exit + 1e-12
    new_index = np.cumsum(keep) - 1
    segs = [s[keep[s[:, 0]] & keep[s[:, 1]]] for s in (plus, minus)]
    plus_k, minus_k = (new_index[s] for s in segs)
    m = int(keep.sum())
    px, py, pt, pn = line
    n_line = px.size
    line_index = m + np.arange(n_line)
    wall_index = m + n_line + np.arange(wall_x2.size)
    all_x = np.concatenate([x[keep], px, wall_x2])
    all_y = np.concatenate([y[keep], py, wall_y2])
    all_t = np.concatenate([theta[keep], pt, pt[1:]])
    all_n = np.concatenate([nu[keep], pn, pn[1:]])
    minus_line = np.column_stack([line_index[:-1], line_index[1:]])
    plus_wall = np.column_stack([line_index[1:], wall_index])
    return (all_x, all_y, all_t, all_n, np.concatenate([plus_k, plus_wall]),
            np.concatenate([minus_k, minus_line]))
