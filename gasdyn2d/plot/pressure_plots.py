"""Surface pressure along a section by the exact, linear and second-order theories.

The pressure coefficient is constant on each flat panel (shock-expansion
theory is exact for a polygonal section in an inviscid perfect gas while the
waves stay attached), so each surface is drawn as steps over the panels.
"""

from __future__ import annotations

import numpy as np

from ..design.section_loads import linear_loads, second_order_loads, shock_expansion_loads
from ..design.sections import Section
from ._style import (CYCLE, WALL_COLOUR, WALL_FILL, Drawing, angle_unit_factor, apply_properties,
                     check_axes, legend_below, plain, reject, tidy)

__all__ = ["draw_surface_pressures"]

_THEORIES = {
    "shock-expansion": (shock_expansion_loads, "-"),
    "linear": (linear_loads, (0, (5, 2))),
    "second-order": (second_order_loads, (0, (1, 1.2))),
}


def draw_surface_pressures(section, M, alpha, *, theories=("shock-expansion", "linear",
                                                            "second-order"),
                           gamma=1.4, ax=None, section_ax=None, **line_properties):
    """Pressure coefficient on the upper and lower surfaces of a section, one line per theory.

    Parameters
    ----------
    section : Section
        The section (chord units).
    M : float
        Free-stream Mach number [-], > 1.
    alpha : float or Quantity
        Incidence [rad].
    theories : sequence of {"shock-expansion", "linear", "second-order"}
        Which theories to draw.
    gamma : float
        Ratio of specific heats [-].
    ax : matplotlib Axes, optional
        Where to draw the pressures. Without it, a new figure gets two rows:
        the pressures above, the section's outline below.
    section_ax : matplotlib Axes, optional
        Where to draw the section's outline when ``ax`` is given (default: no
        outline).
    **line_properties
        matplotlib properties applied to every pressure step line, e.g.
        ``linewidth=1.2``.

    Returns
    -------
    Drawing
        ``ax``; ``upper`` and ``lower`` {theory: StepPatch}; ``loads``
        {theory: SectionLoads}; ``outline`` (the outline's axes, or None);
        ``legend`` (under the axes: colour is the theory, full colour the
        upper surface and pale the lower).

    Raises
    ------
    InvalidInputError
        For a bad argument, naming it: ``section`` not a Section, an unknown
        theory, a Mach number or incidence the theories refuse, or a keyword
        that is not a line property.

    Notes
    -----
    The vertical axis is inverted (suction up), a convention of aerodynamics
    (common practice). Upper surfaces are solid-coloured steps, lower
    surfaces the same colour, lighter; the line style tells the theory.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.plot import draw_surface_pressures
    >>> drawn = draw_surface_pressures(Section.double_wedge(0.05), 2.0, np.radians(2.0))
    >>> sorted(drawn.upper), bool(drawn.ax.yaxis_inverted())
    (['linear', 'second-order', 'shock-expansion'], True)
    """
    if not isinstance(section, Section):
        raise reject("section", "a Section (e.g. Section.double_wedge(0.05))", section)
    check_axes(ax)
    check_axes(section_ax)
    if isinstance(theories, str):
        theories = (theories,)
    unknown = [t for t in theories if t not in _THEORIES]
    if unknown or not theories:
        raise reject("theories", "one or more of " + ", ".join(repr(t) for t in _THEORIES),
                     tuple(theories))
    if np.ndim(plain(M)) or np.ndim(plain(alpha)):
        raise reject("M and alpha", "single values (one case per figure)", (M, alpha))
    loads = {theory: _THEORIES[theory][0](section, M, alpha, gamma=gamma) for theory in theories}
    if ax is None:
        ax, section_ax = _pressure_and_outline_axes()
    drawn = {"upper": {}, "lower": {}, "loads": loads, "outline": None}
    edges = {"upper": section.upper[:, 0], "lower": section.lower[:, 0]}
    for i, theory in enumerate(theories):
        style = _THEORIES[theory][1]
        colour = CYCLE[i % len(CYCLE)]
        for surface, alpha_fill in (("upper", 1.0), ("lower", 0.45)):
            cp = np.asarray(getattr(loads[theory], f"cp_{surface}"), dtype=float)
            patch = ax.stairs(cp, edges[surface], color=colour, alpha=alpha_fill, lw=1.7,
                              ls=style, baseline=None, label=f"{theory}, {surface}",
                              gid=f"{theory}:{surface}")
            drawn[surface][theory] = patch
    apply_properties("draw_surface_pressures",
                     [*drawn["upper"].values(), *drawn["lower"].values()], line_properties)
    factor, unit = angle_unit_factor("deg")
    ax.set_title(f"M = {float(plain(M)):.3g}, α = {factor * float(plain(alpha)):.3g} {unit}",
                 fontsize="medium")
    ax.set_xlim(0.0, 1.0)
    ax.invert_yaxis()
    ax.set_xlabel("x / chord [-]")
    ax.set_ylabel("pressure coefficient cp [-]")
    tidy(ax)
    # one column per theory: its upper surface above its lower surface
    handles = [p for t in theories for p in (drawn["upper"][t], drawn["lower"][t])]
    legend = legend_below(ax, handles, [p.get_label() for p in handles],
                          columns=len(theories))
    if section_ax is not None:
        drawn["outline"] = _draw_outline(section_ax, section)
    return Drawing("draw_surface_pressures", ax, **drawn, legend=legend)


def _pressure_and_outline_axes():
    import matplotlib.pyplot as plt

    figure, (top, bottom) = plt.subplots(2, 1, figsize=(6.4, 5.6), height_ratios=[4.0, 1.0],
                                         layout="constrained")
    return top, bottom


def _draw_outline(ax, section):
    outline = np.vstack([section.upper, section.lower[::-1]])
    ax.fill(outline[:, 0], outline[:, 1], color=WALL_FILL, ec=WALL_COLOUR, lw=1.0,
            gid="section outline")
    ax.set_xlim(0.0, 1.0)
    ax.axis("off")
    ax.set_title("section (thickness exaggerated)", fontsize="x-small", loc="left")
    return ax
