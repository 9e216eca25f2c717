"""Conical (and planar wedge) nozzles: a circular-arc throat and a straight divergent wall.

Unit boundary: :func:`conical_nozzle`. The contour is geometry; the flow
through it is marched by characteristics from Sauer's transonic start line
(:func:`~gasdyn2d.characteristics.nozzles.sauer_start_line`) to the exit
plane, whose computed profile feeds ``performance(...)``. The divergence
factor of the straight wall is Malina's closed form.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary.results import ResultTable, unit_field
from ..errors import InvalidInputError
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.isentropic import area_ratio as isentropic_area_ratio
from ..relations.isentropic import mach_from_area_ratio, pressure_ratio
from .channels import march_rows
from .design_calls import DesignCall
from .nozzles import sauer_discharge_coefficient, sauer_start_line
from .performance import ExitPlane, NozzlePerformanceMixin
from .unit_processes import CharacteristicNet, WallContour, check_geometry

__all__ = [
    "conical_nozzle",
    "ConicalNozzle",
    "malina_divergence_factor",
    "exit_plane_of_rows",
    "source_flow_exit_profile",
]

#: label of the exit flow used when the characteristics fold before the exit
SOURCE_FLOW_MODEL = "conical source flow (characteristics folded before the exit)"


def malina_divergence_factor(half_angle, geometry="axisymmetric"):
    """Plain core: the momentum divergence factor of a conical (or wedge) source flow.

    λ = (1 + cos α)/2 for a cone of half-angle α, sin α/α for a planar wedge:
    the axial momentum of a uniform source flow across the spherical (or
    cylindrical) cap through the lip, over its total momentum.

    References
    ----------
    Malina, F. J. (1940), Characteristics of the rocket motor unit based on
    the theory of perfect gases, *Journal of the Franklin Institute* 230,
    433-454 (details from memory); /work/shared/SOURCES.md.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.characteristics.conical_nozzles import malina_divergence_factor
    >>> round(float(malina_divergence_factor(np.radians(15.0))), 6)
    0.982963
    >>> round(float(malina_divergence_factor(np.radians(15.0), "planar")), 6)
    0.988616
    """
    alpha = np.asarray(half_angle, dtype=float)
    if check_geometry(geometry):
        return 0.5 * (1.0 + np.cos(alpha))
    safe = np.where(alpha == 0.0, 1.0, alpha)
    return np.where(alpha == 0.0, 1.0, np.sin(safe) / safe)


@dataclasses.dataclass(frozen=True, repr=False)
class ConicalNozzle(NozzlePerformanceMixin, ResultTable):
    """Upper half of a conical (round) or wedge (planar) nozzle, and its computed flow.

    Lengths are in the unit of ``throat_half_height`` (radius of a round
    throat); ``performance(p0=..., T0=..., p_ambient=...)`` integrates the
    marched exit plane.
    """

    mach_exit: float = unit_field("")  #: design Mach number: the exit area is A*·A/A*(M_exit)
    half_angle: object = unit_field("rad")  #: half-angle of the cone or wedge
    throat_radius_of_curvature: object = unit_field("m")  #: radius of the throat arc
    wall_x: object = unit_field("m")  #: contour abscissae from the throat (x = 0)
    wall_y: object = unit_field("m")  #: contour ordinates
    tangent_x: object = unit_field("m")  #: where the arc meets the straight wall
    length: object = unit_field("m")  #: throat-to-exit length
    exit_half_height: object = unit_field("m")  #: exit half-height or radius
    area_ratio: float = unit_field("")  #: exit-to-throat area ratio (A/A* of M_exit)
    divergence_factor: float = unit_field("")  #: Malina: (1 + cos α)/2 round, sin α/α planar
    discharge_coefficient: float = unit_field("")  #: Sauer's throat mass flow over ρ*a*·A*
    exit_mach_axis: float = unit_field("")  #: Mach number on the axis at the exit
    exit_mach_wall: float = unit_field("")  #: Mach number at the lip
    geometry: str = unit_field("")  #: "axisymmetric" or "planar"
    shock_formed: bool = unit_field("")  #: the characteristics folded (a shock) before the exit
    shock_x: object = unit_field("m")  #: where they first folded (NaN if not)
    shock_y: object = unit_field("m")
    exit_flow: str = unit_field("")  #: "characteristics", or the source-flow model after a fold
    net: CharacteristicNet | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)
    exit_plane: ExitPlane | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)


def conical_nozzle(M_exit, half_angle, *, geometry="axisymmetric", throat_radius_of_curvature=None,
                   throat_half_height=0.01, gamma=1.4, n_points=31):
    """A conical nozzle (or planar wedge nozzle): throat arc, straight wall, computed exit flow.

    Parameters
    ----------
    M_exit : float
        Design exit Mach number [-], > 1: the exit area is the isentropic
        A/A*(M_exit) times the throat area.
    half_angle : float or Quantity
        Half-angle α of the divergent cone or wedge [rad], 0 < α < 45°.
    geometry : {"axisymmetric", "planar"}, optional
        A round cone (default) or a planar wedge (per unit depth).
    throat_radius_of_curvature : float or Quantity, optional
        Radius R of the circular arc joining the throat to the straight wall
        [m], at least twice ``throat_half_height`` (Sauer's transonic start
        needs a gentle throat); default twice it.
    throat_half_height : float or Quantity, optional
        Throat half-height h, or the throat radius of a round nozzle [m].
        Default 0.01 m (a 20 mm throat, a laboratory size); every length of the
        result is in the unit given here (metres for a plain number).
    gamma : float, optional
        Ratio of specific heats [-].
    n_points : int, optional
        Nodes on the transonic start line of the march (5 to 400).

    Returns
    -------
    ConicalNozzle

    Raises
    ------
    InvalidInputError
        Bad M_exit, half_angle, radius or n_points, or an exit inside the arc.

    Notes
    -----
    Contour: y = h + R - √(R² - x²) up to x_t = R sin α, then straight at α to
    the exit height h·√(A/A*) (round) or h·A/A* (planar); length
    x_t + (y_exit - y_t)/tan α. The divergence factor is Malina's,
    λ = (1 + cos α)/2 (round) or sin α/α (planar), exact for the source flow
    the straight wall would carry. The flow is marched from Sauer's start line
    along the arc and the straight wall to the exit plane x = L, where the
    computed profile (Mach number and flow angle from the axis to the lip) is
    kept: the axis runs faster than the wall, and ``performance(...)``
    integrates the real profile (its divergence factor is the momentum
    average over that plane, near Malina's when the exit is far from the
    throat). Where the arc's curvature ends, weak compression waves start and
    may steepen into a shock (an internal shock, found converged under
    refinement: 15°, Mach 3, R = 2 folds near the axis at x ≈ 3.9 of an exit at
    4.5). The method stops there (``shock_formed``, ``shock_x``, ``shock_y``),
    and the exit plane is then the conical source flow instead: the flow from
    the cone's virtual apex, M from A/A* = (cap area)/A* across the flat exit
    plane (``exit_flow`` says which; the thrust of that model is Malina's,
    λ ṁ V + (p - pa) A_exit). Shock fitting (a later issue) will carry the
    computed flow past the shock.

    References
    ----------
    Malina (1940), *J. Franklin Inst.* 230 (divergence factor, from memory);
    Sauer (1947), NACA TM 1147 (transonic start, from memory).

    Examples
    --------
    A made-up 15° cone for a Mach 3 test rig with a 10 mm throat radius and a
    40 mm throat arc:

    >>> import numpy as np
    >>> from gasdyn2d.characteristics.conical_nozzles import conical_nozzle
    >>> cone = conical_nozzle(3.0, np.radians(15.0), throat_half_height=0.010,
    ...                       throat_radius_of_curvature=0.040)
    >>> round(cone.divergence_factor, 5), round(float(cone.length), 4), cone.shock_formed
    (0.98296, 0.0447, False)
    >>> perf = cone.performance(p0=2.0e6, T0=300.0, p_ambient=0.0)   # vacuum
    >>> round(perf.divergence_factor, 4), round(perf.thrust_coefficient, 4)
    (0.9834, 1.5409)

    With a 20 mm arc an internal shock forms 41 mm downstream, before the exit:

    >>> tight = conical_nozzle(3.0, np.radians(15.0), throat_half_height=0.010,
    ...                        throat_radius_of_curvature=0.020)
    >>> tight.shock_formed, round(float(tight.shock_x) * 1e3, 1), tight.exit_flow[:19]
    (True, 41.2, 'conical source flow')
    """
    call = DesignCall("conical_nozzle")
    M = call.scalar("M_exit", M_exit)
    alpha = call.scalar("half_angle", half_angle, "rad")
    g = call.scalar("gamma", gamma)
    h = call.positive("throat_half_height", throat_half_height, "m")
    if throat_radius_of_curvature is None:
        R_over_h = 2.0
    else:
        R_over_h = call.positive("throat_radius_of_curvature", throat_radius_of_curvature,
                                 "m") / h
    round_ = check_geometry(geometry)
    call.check(1.0 < g < np.inf, "gamma", g, "a finite ratio of specific heats > 1")
    call.check(1.0 < M < np.inf, "M_exit", M, "finite and > 1 (a supersonic exit)")
    call.check(0.0 < alpha < np.pi / 4, "half_angle", alpha,
               "between 0 and 45° (0.785398 rad)", "rad")
    call.check(R_over_h >= 2.0, "throat_radius_of_curvature / throat_half_height", R_over_h,
               ">= 2 (Sauer's transonic start needs a gentle throat)")
    n_points = call.count("n_points", n_points, 5, 400)
    design = conical_design(M, alpha, R_over_h, n_points, g, round_)
    fold = design["fold"]
    wall_x, wall_y = design["wall"]
    x, y, theta, nu, plus, minus = design["net"]
    profile = design["exit"]
    geometry_name = "axisymmetric" if round_ else "planar"
    mach_profile = mach_from_prandtl_meyer_angle(profile[2], g)
    model = "characteristics" if fold is None else SOURCE_FLOW_MODEL
    plane = ExitPlane(geometry_name, h, h * profile[0], mach_profile, profile[1],
                      float(pressure_ratio(mach_profile[-1], g)), design["discharge"], g, model)
    return ConicalNozzle(
        mach_exit=M, half_angle=call.angle(alpha),
        throat_radius_of_curvature=call.length(h * R_over_h), wall_x=call.length(h * wall_x),
        wall_y=call.length(h * wall_y), tangent_x=call.length(h * design["tangent_x"]),
        length=call.length(h * float(wall_x[-1])),
        exit_half_height=call.length(h * float(wall_y[-1])),
        area_ratio=design["area_ratio"],
        divergence_factor=float(malina_divergence_factor(alpha, geometry_name)),
        discharge_coefficient=design["discharge"], exit_mach_axis=float(mach_profile[0]),
        exit_mach_wall=float(mach_profile[-1]), geometry=geometry_name,
        shock_formed=fold is not None,
        shock_x=call.length(h * (np.nan if fold is None else fold[0])),
        shock_y=call.length(h * (np.nan if fold is None else fold[1])), exit_flow=model,
        net=call.net(CharacteristicNet.from_nodes(h * x, h * y, theta, nu, plus, minus, g)),
        exit_plane=plane,
    )


def conical_design(M, alpha, R, n_points, gamma, round_):
    """Plain core: contour, marched net and exit profile of a conical nozzle (throat size 1)."""
    ratio = float(isentropic_area_ratio(M, gamma))
    exit_size = np.sqrt(ratio) if round_ else ratio
    x_t, y_t = R * np.sin(alpha), 1.0 + R * (1.0 - np.cos(alpha))
    if not exit_size > y_t:
        raise InvalidInputError(
            f"the exit ({exit_size:.6g} throat sizes for M_exit = {M:g}) lies inside the throat "
            f"arc, which reaches {y_t:.6g} at the half-angle; use a smaller half_angle or "
            "throat_radius_of_curvature, or a higher M_exit.")
    length = x_t + (exit_size - y_t) / np.tan(alpha)
    geometry = "axisymmetric" if round_ else "planar"
    x0, y0, th0, nu0 = sauer_start_line(R, n_points, gamma, geometry=geometry)
    if not th0[-1] < alpha:
        raise InvalidInputError(
            f"half_angle = {alpha:.6g} rad is below the wall angle at the transonic start line "
            f"({th0[-1]:.6g} rad); use a larger half_angle or throat_radius_of_curvature.")
    wall = WallContour.bend(1.0, 0.0, alpha, R)
    nodes, _, reason, fold = march_rows(x0, y0, th0, nu0, None, wall, gamma,
                                        lambda row: np.min(row.x) > length, geometry=geometry)
    if reason == "length":
        fold = None
        profile = exit_plane_of_rows(nodes, length, exit_size, alpha)
    else:  # a shock before the exit: the method ends there; the exit takes the source flow
        profile = source_flow_exit_profile(length, exit_size, alpha, gamma, round_)
    arc_x = np.linspace(0.0, x_t, 33)
    wall_x = np.concatenate([arc_x, [length]])
    wall_y = np.concatenate([wall.height(arc_x), [exit_size]])
    x, y, theta, nu = nodes.arrays()
    keep = x <= length
    index = np.full(x.size, -1, dtype=np.intp)
    index[keep] = np.arange(np.count_nonzero(keep))
    segments = []
    for blocks in (nodes.plus, nodes.minus):
        pairs = index[np.concatenate(blocks)]
        segments.append(pairs[np.all(pairs >= 0, axis=1)])
    discharge = sauer_discharge_coefficient(R, gamma, geometry=geometry)
    return {"wall": (wall_x, wall_y), "tangent_x": x_t, "area_ratio": float(
        exit_size**2 if round_ else exit_size), "exit": profile, "discharge": discharge,
        "fold": fold,
        "net": (x[keep], y[keep], theta[keep], nu[keep], segments[0], segments[1])}


def exit_plane_of_rows(nodes, x_exit, lip_height, lip_angle):
    """Plain core: (y, θ, ν) across the plane x = ``x_exit`` of a row-marched net, axis to lip.

    Every C+ line alive at the plane crosses it once: the states are
    interpolated linearly along the crossing segments (second order). The
    axis point takes ν interpolated between the axis nodes around the plane;
    the lip (the wall's point at the plane, height ``lip_height``, angle
    ``lip_angle``) takes ν interpolated between the wall nodes around it.
    """
    x, y, theta, nu = nodes.arrays()
    plus = np.concatenate(nodes.plus)
    a, b = plus[:, 0], plus[:, 1]
    crossing = (x[a] <= x_exit) & (x[b] > x_exit)
    a, b = a[crossing], b[crossing]
    w = (x_exit - x[a]) / (x[b] - x[a])
    ys = y[a] + w * (y[b] - y[a])
    ths = theta[a] + w * (theta[b] - theta[a])
    nus = nu[a] + w * (nu[b] - nu[a])
    axis = np.flatnonzero(y == 0.0)
    upper = np.array(nodes.upper)
    axis_nu = np.interp(x_exit, x[axis], nu[axis])
    wall_nu = np.interp(x_exit, x[upper], nu[upper])
    order = np.argsort(ys)
    inside = (ys[order] > 0.0) & (ys[order] < lip_height)
    y_plane = np.concatenate([[0.0], ys[order][inside], [lip_height]])
    theta_plane = np.concatenate([[0.0], ths[order][inside], [lip_angle]])
    nu_plane = np.concatenate([[axis_nu], nus[order][inside], [wall_nu]])
    return y_plane, theta_plane, nu_plane


def source_flow_exit_profile(x_exit, exit_size, half_angle, gamma=1.4, round_=True,
                             n_points=201):
    """Plain core: (y, θ, ν) of the conical (or wedge) source flow across the plane x = ``x_exit``.

    The flow radiates from the apex of the straight wall, x_apex = x_exit -
    exit_size/tan α, with the throat's mass flow: at distance r the cap of
    the cone carries it through the area 2πr²(1 - cos α) (round, throat
    radius 1) or 2rα (planar, throat half-height 1), so A/A* is that area
    over π or 2, and M follows on the supersonic branch.
    """
    apex_distance = exit_size / np.tan(half_angle)
    y = np.linspace(0.0, exit_size, n_points)
    r = np.hypot(apex_distance, y)
    if round_:
        ratio = 2.0 * r * r * (1.0 - np.cos(half_angle))
    else:
        ratio = r * half_angle
    mach = mach_from_area_ratio(ratio, gamma)
    return y, np.arctan2(y, apex_distance), prandtl_meyer_angle(mach, gamma)
