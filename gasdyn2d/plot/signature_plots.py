"""Pressure signatures of a section's near field against distance along the flight direction.

Draws the rows of a :class:`~gasdyn2d.design.near_fields.SectionNearField`: one line of
p/p∞ - 1 per distance, on one side of the section or on both.
"""

from __future__ import annotations

import numpy as np

from ..design.near_fields import SectionNearField
from ._style import CYCLE, Drawing, apply_properties, axes_or_new, check_axes, legend_below, reject, tidy

__all__ = ["draw_pressure_signature"]

_SIDES = {"below": ("x_below", "overpressure_below", "-"),
          "above": ("x_above", "overpressure_above", (0, (5, 2)))}


def _magnitude_and_unit(value, plain_unit):
    if hasattr(value, "units"):
        return np.asarray(value.magnitude, dtype=float), f"{value.units:~P}"
    return np.asarray(value, dtype=float), plain_unit


def draw_pressure_signature(field, ax=None, *, sides=("below",), **line_properties):
    """p/p∞ - 1 against distance along the flight direction, one line per distance.

    Parameters
    ----------
    field : SectionNearField
        The result of :func:`~gasdyn2d.design.near_fields.section_near_field`.
    ax : matplotlib Axes, optional
        Where to draw (default: new axes on a new figure).
    sides : sequence of {"below", "above"}
        Which signatures to draw: below the section (full lines, the default), above it
        (dashed), or both.
    **line_properties
        matplotlib properties applied to every signature line, e.g. ``linewidth=1.2``.

    Returns
    -------
    Drawing
        ``ax``; ``lines`` {(side, distance index): Line2D}; ``legend`` (under the axes:
        colour is the distance, the line style the side).

    Raises
    ------
    InvalidInputError
        ``field`` not a SectionNearField, an unknown side, ``ax`` not an Axes, or a keyword
        that is not a line property.

    Notes
    -----
    The signature is drawn as sampled: straight between the characteristics that cross
    the line y = ∓h, and vertical at the shocks (two samples at one x).

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d import Section, section_near_field
    >>> from gasdyn2d.plot import draw_pressure_signature
    >>> field = section_near_field(Section.biconvex(0.04, n=16), 2.0, 0.0, [1.0, 4.0])
    >>> drawn = draw_pressure_signature(field, sides=("below", "above"))
    >>> len(drawn.lines)
    4
    """
    if not isinstance(field, SectionNearField):
        raise reject("field", "a SectionNearField (from section_near_field)", field)
    check_axes(ax)
    if isinstance(sides, str):
        sides = (sides,)
    unknown = [s for s in sides if s not in _SIDES]
    if unknown or not sides:
        raise reject("sides", "one or both of 'below', 'above'", tuple(sides))
    ax = axes_or_new(ax)
    distances, unit = _magnitude_and_unit(field.distances, field.length_unit)
    lines = {}
    for side in sides:
        x_name, p_name, style = _SIDES[side]
        xs, _ = _magnitude_and_unit(getattr(field, x_name), field.length_unit)
        rows = np.asarray(getattr(field, p_name), dtype=float)
        for k, h in enumerate(np.atleast_1d(distances)):
            keep = np.isfinite(xs[k]) & np.isfinite(rows[k])
            label = f"h = {h:.4g} {unit}, {side}"
            (line,) = ax.plot(xs[k][keep], rows[k][keep], color=CYCLE[k % len(CYCLE)],
                              ls=style, lw=1.5, label=label, gid=f"{side}:{k}")
            lines[(side, k)] = line
    apply_properties("draw_pressure_signature", lines.values(), line_properties)
    ax.axhline(0.0, color="#8C8C8C", lw=0.8, zorder=0)
    ax.set_xlabel(f"x along the flight direction [{unit}]")
    ax.set_ylabel("p/p∞ - 1 [-]")
    ax.set_title(f"pressure signature, M = {field.M:.3g}", fontsize="medium")
    tidy(ax)
    legend = legend_below(ax, list(lines.values()), [v.get_label() for v in lines.values()],
                          columns=min(len(lines), 3))
    return Drawing("draw_pressure_signature", ax, lines=lines, legend=legend)
