"""Cones at zero incidence: the conical shock over its cone, and surface pressures.

:func:`draw_cone_flow` draws the meridian half-plane of a cone in the style of
:func:`~gasdyn2d.plot.draw_wave_pattern`: the body as a wall, the conical shock
as a straight line, the rays of the shock layer coloured by Mach number, the
regions labelled with their Mach numbers, and optionally the cowl lip of a spike
intake. :func:`draw_cone_pressures` draws the surface pressure against the
half-angle for cones beside wedges, up to their detachment angles.
"""

from __future__ import annotations

import numpy as np

from ..relations.cone_shock_layer import shock_layer_rays
from ..relations.conical_flow import cone_detachment_angles, cone_flow
from ..relations.oblique_shocks import (detachment_angles, oblique_shock_ratios,
                                        wave_angle_from_deflection)
from ._style import (CYCLE, MACH_COLOURMAP, Drawing, SHOCK_COLOUR, SLIP_COLOUR, WALL_COLOUR, WALL_FILL,
                     angle_unit_factor, axes_or_new, plain, tidy)

__all__ = ["draw_cone_flow", "draw_cone_pressures"]

_LABEL_BOX = {"boxstyle": "round,pad=0.25", "fc": "white", "ec": "#BBBBBB", "lw": 0.6}


def draw_cone_flow(M1, *, cone_angle=None, wave_angle=None, gamma=1.4, length=1.0, n_rays=12,
                   lip=None, colourbar=True, length_unit="m", ax=None):
    """Draw a cone, its conical shock and the shock layer's rays coloured by Mach number.

    Parameters
    ----------
    M1 : float
        Free-stream Mach number [-].
    cone_angle, wave_angle : float or Quantity
        Exactly one, as in :func:`~gasdyn2d.relations.conical_flow.cone_flow` [rad].
    gamma : float
        Ratio of specific heats [-].
    length : float or Quantity
        Length of the cone along the axis [m]; the drawing extends 15 % beyond it.
    n_rays : int
        Rays of the shock layer drawn (>= 2), evenly spaced in angle.
    lip : (x, r), optional
        A cowl lip to mark [m] (a spike intake's ``lip_x`` and ``cowl_radius``); the
        cowl is drawn from it downstream.
    colourbar : bool
        Add a Mach-number colour bar.
    length_unit : str
        Unit text of the axis labels.
    ax : matplotlib Axes, optional

    Returns
    -------
    dict
        ``"ax"``, ``"flow"`` (the ConeFlow), ``"cone"`` (the body's Polygon),
        ``"shock"`` (Line2D), ``"rays"`` (LineCollection), ``"axis"`` (Line2D, the
        symmetry axis), ``"labels"`` {region: Text} for "free stream",
        "behind shock" and "surface", ``"lip"`` (Line2D or None), ``"colourbar"``.

    Notes
    -----
    The meridian half-plane: the axis along x, the cone surface at θc, the shock at
    β; every line is a ray from the tip, as the flow is conical. Each drawn ray
    carries the Mach number of the conical flow on it (interpolated in angle between
    the march's nodes).

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d import ureg
    >>> from gasdyn2d.plot import draw_cone_flow
    >>> import math
    >>> drawn = draw_cone_flow(2.0, cone_angle=10 * ureg.deg)
    >>> x, y = drawn["shock"].get_xdata()[1], drawn["shock"].get_ydata()[1]
    >>> round(math.degrees(math.atan2(y, x)), 4), drawn["labels"]["surface"].get_text().split()
    (31.2061, ['surface', 'M', '1.834'])
    """
    from matplotlib.collections import LineCollection
    from matplotlib.colors import Normalize
    from matplotlib.patches import Polygon

    if n_rays < 2:
        raise ValueError(f"n_rays must be >= 2; got {n_rays!r}.")
    ax = axes_or_new(ax)
    flow = cone_flow(M1, cone_angle=cone_angle, wave_angle=wave_angle, gamma=gamma)
    theta, beta = float(plain(flow.cone_angle)), float(plain(flow.wave_angle))
    L = float(plain(length))
    rays = shock_layer_rays(float(plain(M1)), beta, float(plain(gamma)), 201)
    angles = np.linspace(theta, beta, n_rays)
    mach = np.interp(angles, rays.ray_angle[::-1], rays.M[::-1])
    reach = L / np.cos(angles)
    segments = np.stack([np.zeros((n_rays, 2)),
                         np.column_stack([reach * np.cos(angles), reach * np.sin(angles)])], 1)
    norm = Normalize(vmin=float(np.min(rays.M)), vmax=max(float(np.max(rays.M)), float(plain(M1))))
    lines = LineCollection(segments, cmap=MACH_COLOURMAP, norm=norm, linewidths=0.9,
                           gid="shock-layer rays")
    lines.set_array(mach)
    ax.add_collection(lines)
    cone = Polygon([[0.0, 0.0], [L, L * np.tan(theta)], [L, 0.0]], closed=True, fc=WALL_FILL,
                   ec=WALL_COLOUR, lw=2.0, gid="cone")
    ax.add_patch(cone)
    x_end = 1.15 * L
    (axis,) = ax.plot([-0.15 * L, x_end], [0.0, 0.0], color=SLIP_COLOUR, lw=0.8, ls="-.",
                      gid="axis")
    (shock,) = ax.plot([0.0, x_end], [0.0, x_end * np.tan(beta)], color=SHOCK_COLOUR, lw=1.8,
                       gid="shock")
    drawn = {"ax": ax, "flow": flow, "cone": cone, "shock": shock, "rays": lines, "axis": axis,
             "labels": {}, "lip": None, "colourbar": None}
    if lip is not None:
        lx, lr = float(plain(lip[0])), float(plain(lip[1]))
        (drawn["lip"],) = ax.plot([lx, x_end], [lr, lr], color=WALL_COLOUR, lw=2.0, marker="o",
                                  markevery=[0], ms=3, gid="cowl")
    places = {
        "free stream": (0.35 * L, 0.35 * L * np.tan(beta) + 0.12 * L, float(plain(M1))),
        "behind shock": (0.85 * L, 0.85 * L * np.tan(0.8 * beta + 0.2 * theta), flow.M2),
        "surface": (0.75 * L, 0.75 * L * np.tan(theta) + 0.02 * L, flow.M_cone),
    }
    for name, (x, y, M) in places.items():
        drawn["labels"][name] = ax.text(x, y, f"{name}\nM {float(M):.3f}", ha="center",
                                        va="bottom" if name == "surface" else "center",
                                        fontsize="small", bbox=_LABEL_BOX)
    if colourbar:
        bar = ax.figure.colorbar(lines, ax=ax, orientation="horizontal", shrink=0.6, aspect=35,
                                 pad=0.12)
        bar.set_label("Mach number [-]")
        drawn["colourbar"] = bar
    ax.set_xlim(-0.15 * L, x_end)
    ax.set_ylim(-0.05 * L, max(x_end * np.tan(beta), 0.2 * L) * 1.05)
    ax.set_aspect("equal")
    ax.set_xlabel(f"x [{length_unit}]")
    ax.set_ylabel(f"r [{length_unit}]")
    tidy(ax, grid=False)
    return Drawing("draw_cone_flow", **drawn)


def draw_cone_pressures(M1, *, gamma=1.4, quantity="cp", angle_unit="deg", n_points=80, ax=None):
    """Surface pressure against half-angle for cones, beside wedges, up to detachment.

    Parameters
    ----------
    M1 : float or sequence of float
        Free-stream Mach numbers [-], one pair of curves each.
    gamma : float
        Ratio of specific heats [-].
    quantity : {"cp", "p_p1"}
        Pressure coefficient on free-stream dynamic pressure, or p/p1.
    angle_unit : {"deg", "rad"}
        Unit of the horizontal axis.
    n_points : int
        Points per curve.
    ax : matplotlib Axes, optional

    Returns
    -------
    dict
        ``"ax"``; ``"cones"`` and ``"wedges"`` {M1: Line2D} (cones solid, wedges
        dashed in the same colour); ``"detachment"`` {M1: (cone, wedge) marker
        Line2Ds} at the largest half-angles.

    Notes
    -----
    The wedge's surface pressure is the pressure just behind its oblique shock
    (NACA Report 1135, eqs. 128-150); the cone's comes from the conical flow and is
    lower at the same half-angle (a weaker shock, then an isentropic compression), but
    the cone stays attached to larger half-angles.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d.plot import draw_cone_pressures
    >>> drawn = draw_cone_pressures([2.0, 3.0])
    >>> sorted(drawn["cones"]), drawn["ax"].get_ylabel()
    ([2.0, 3.0], 'pressure coefficient cp [-]')
    """
    if quantity not in ("cp", "p_p1"):
        raise ValueError(f"quantity must be 'cp' or 'p_p1'; got {quantity!r}.")
    factor, unit = angle_unit_factor(angle_unit)
    ax = axes_or_new(ax)
    drawn = {"ax": ax, "cones": {}, "wedges": {}, "detachment": {}}
    for i, M in enumerate(np.atleast_1d(np.asarray(plain(M1), dtype=float))):
        M = float(M)
        colour = CYCLE[i % len(CYCLE)]
        cone_max, _ = cone_detachment_angles(M, gamma)
        wedge_max, _ = detachment_angles(M, gamma)
        cones = np.linspace(0.0, cone_max, n_points)
        flow = cone_flow(M, cone_angle=cones, gamma=gamma)
        cone_p = flow.cp_cone if quantity == "cp" else flow.p_cone_p1
        wedges = np.linspace(0.0, float(wedge_max), n_points)
        beta = wave_angle_from_deflection(np.full(n_points, M), wedges, gamma)
        wedge_p2 = oblique_shock_ratios(np.full(n_points, M), beta, gamma).p2_p1
        wedge_p = 2.0 * (wedge_p2 - 1.0) / (gamma * M * M) if quantity == "cp" else wedge_p2
        (c_line,) = ax.plot(factor * cones, cone_p, color=colour, lw=1.8, label=f"cone, M {M:g}",
                            gid=f"cone:{M:g}")
        (w_line,) = ax.plot(factor * wedges, wedge_p, color=colour, lw=1.4, ls="--",
                            label=f"wedge, M {M:g}", gid=f"wedge:{M:g}")
        marks = tuple(ax.plot([factor * x], [y[-1]], marker="o", ms=4, color=colour, ls="none",
                              gid=f"detachment:{kind}:{M:g}")[0]
                      for kind, x, y in (("cone", cone_max, cone_p), ("wedge", wedge_max, wedge_p)))
        drawn["cones"][M], drawn["wedges"][M], drawn["detachment"][M] = c_line, w_line, marks
    ax.set_xlabel(f"half-angle [{unit}]")
    ax.set_ylabel("pressure coefficient cp [-]" if quantity == "cp"
                  else "surface pressure p/p1 [-]")
    ax.set_title("cone (solid) and wedge (dashed) surface pressure; dots: detachment",
                 fontsize="small")
    ax.legend(frameon=False, fontsize="x-small", ncols=2)
    tidy(ax)
    return Drawing("draw_cone_pressures", **drawn)
