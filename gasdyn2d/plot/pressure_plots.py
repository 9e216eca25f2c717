"""Surface pressure along a section by the exact, linear and second-order theories.

The pressure coefficient is constant on each flat panel (shock-expansion
theory is exact for a polygonal section in an inviscid perfect gas while the
waves stay attached), so each surface is drawn as steps over the panels.
"""

from __future__ import annotations

import numpy as np

from ..design.section_loads import linear_loads, loads_function, second_order_loads, shock_expansion_loads
from ._style import CYCLE, angle_unit_factor, plain, tidy

__all__ = ["draw_surface_pressures"]

_THEORIES = {
    "shock-expansion": (shock_expansion_loads, "-"),
    "linear": (linear_loads, (0, (5, 2))),
    "second-order": (second_order_loads, (0, (1, 1.2))),
}


def draw_surface_pressures(section, M, alpha, *, theories=("shock-expansion", "linear",
                                                            "second-order"),
                           gamma=1.4, ax=None, section_ax=None):
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

    Returns
    -------
    dict
        ``"ax"``; ``"upper"`` and ``"lower"`` {theory: StepPatch}; ``"loads"``
        {theory: SectionLoads}; ``"outline"`` (the outline's axes, or None).

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
    >>> sorted(drawn["upper"]), bool(drawn["ax"].yaxis_inverted())
    (['linear', 'second-order', 'shock-expansion'], True)
    """
    if ax is None:
        ax, section_ax = _pressure_and_outline_axes()
    for theory in theories:
        loads_function(theory, name="theories")  # InvalidInputError naming the argument
    drawn = {"ax": ax, "upper": {}, "lower": {}, "loads": {}, "outline": None}
    edges = {"upper": section.upper[:, 0], "lower": section.lower[:, 0]}
    for i, theory in enumerate(theories):
        solver, style = _THEORIES[theory]
        loads = solver(section, M, alpha, gamma=gamma)
        drawn["loads"][theory] = loads
        colour = CYCLE[i % len(CYCLE)]
        for surface, alpha_fill in (("upper", 1.0), ("lower", 0.55)):
            cp = np.asarray(getattr(loads, f"cp_{surface}"), dtype=float)
            patch = ax.stairs(cp, edges[surface], color=colour, alpha=alpha_fill, lw=1.7,
                              ls=style, baseline=None, label=f"{theory}, {surface}",
                              gid=f"{theory}:{surface}")
            drawn[surface][theory] = patch
    factor, unit = angle_unit_factor("deg")
    ax.set_title(f"M = {float(plain(M)):.3g}, α = {factor * float(plain(alpha)):.3g} {unit}",
                 fontsize="medium")
    ax.set_xlim(0.0, 1.0)
    ax.invert_yaxis()
    ax.set_xlabel("x / chord [-]")
    ax.set_ylabel("pressure coefficient cp [-]")
    ax.legend(frameon=False, fontsize="x-small", ncols=2)
    tidy(ax)
    if section_ax is not None:
        drawn["outline"] = _draw_outline(section_ax, section)
    return drawn


def _pressure_and_outline_axes():
    import matplotlib.pyplot as plt

    figure, (top, bottom) = plt.subplots(2, 1, figsize=(6.4, 5.0), height_ratios=[4.0, 1.0],
                                         layout="constrained")
    return top, bottom


def _draw_outline(ax, section):
    outline = np.vstack([section.upper, section.lower[::-1]])
    ax.fill(outline[:, 0], outline[:, 1], color="#D9D9D9", ec="#4D4D4D", lw=1.0,
            gid="section outline")
    ax.set_xlim(0.0, 1.0)
    ax.axis("off")
    ax.set_title("section (thickness exaggerated)", fontsize="x-small", loc="left")
    return ax
