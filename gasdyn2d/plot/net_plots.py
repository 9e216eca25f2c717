"""Characteristic nets of nozzles, channels and jets, coloured by Mach number.

Draws the two families of Mach lines of a
:class:`~gasdyn2d.characteristics.unit_processes.CharacteristicNet` as line segments
coloured by the mean Mach number of their end nodes, with the walls (a
nozzle's contour, a channel's walls), the centreline of a symmetric nozzle or
jet, and a jet's constant-pressure boundary, each in the house style of its
kind (the same as in :func:`~gasdyn2d.plot.draw_wave_pattern`).
"""

from __future__ import annotations

import numpy as np

from ._style import (MACH_COLOURMAP, SHOCK_FORMS_STYLE, WAVE_STYLES, Drawing, apply_properties,
                     axes_or_new, check_axes, figure_size_for, key_handles, legend_below,
                     length_unit_factor, plain, polyline, reject, tidy)

__all__ = ["draw_characteristic_net"]


def _outline(result, walls, x_end):
    """(walls, centrelines, free boundaries): lists of (x, y) polylines [m] for the result."""
    solid, centre, free = [], [], []
    for wall in walls or ():
        if hasattr(wall, "height"):  # a WallContour: sample it over the marched length
            x = np.linspace(0.0, x_end, 200)
            solid.append((x, np.asarray(wall.height(x), dtype=float)))
        else:
            solid.append(polyline("walls", wall))
    if walls is None and getattr(result, "lower_wall_y", None) is not None:  # a channel
        for side in ("lower", "upper"):
            solid.append((plain(getattr(result, f"{side}_wall_x")),
                          plain(getattr(result, f"{side}_wall_y"))))
    if hasattr(result, "wall_x"):  # a nozzle: contour from the throat corner, centreline
        x, y = plain(result.wall_x), plain(result.wall_y)
        solid.append((np.concatenate([[x[0]], x]), np.concatenate([[y[0]], y])))
        centre.append((np.array([0.0, x[-1]]), np.zeros(2)))
    if hasattr(result, "boundary_x"):  # a jet: lip, free boundary, centreline
        x, y = plain(result.boundary_x), plain(result.boundary_y)
        free.append((x, y))
        solid.append((np.array([x[0] - 0.15 * (x[-1] - x[0]), x[0]]), np.array([y[0], y[0]])))
        centre.append((np.array([x[0], x[-1]]), np.zeros(2)))
    return solid, centre, free


def _mach_colourbar(ax, lines):
    """A Mach-number colour bar on the right of the axes, clear of the x label."""
    bar = ax.figure.colorbar(lines, ax=ax, location="right", shrink=0.85, aspect=18,
                             pad=0.02)
    bar.set_label("Mach number [-]")
    return bar


def draw_characteristic_net(result, *, walls=None, ax=None, colourbar=True, length_unit="m",
                            mach_range=None, legend=True, **line_properties):
    """Draw a characteristic net with its walls, Mach lines coloured by Mach number.

    Parameters
    ----------
    result : MinimumLengthNozzle, ChannelFlow, SlotJet or CharacteristicNet
        Anything with a ``net`` (or a net itself). A nozzle's wall contour and
        centreline and a jet's boundary are drawn from the result's fields.
    walls : sequence, optional
        Extra walls: :class:`~gasdyn2d.characteristics.unit_processes.WallContour` objects
        (sampled over the net's length) or (x, y) polylines [m]. A
        :class:`~gasdyn2d.characteristics.channels.ChannelFlow` draws its own two walls
        through its wall nodes (``lower_wall_x``, ``lower_wall_y``, ...) when
        ``walls`` is not given; given walls replace them (pass the contours
        for a smooth outline between nodes).
    ax : matplotlib Axes, optional
        Where to draw (default: a new figure sized to the net).
    colourbar : bool
        Add a colour bar of the Mach number (on the right of the axes).
    length_unit : {"m", "cm", "mm", "km", "in", "ft"}
        Unit of the axes: the net (computed in metres) is drawn in it.
    mach_range : (low, high), optional
        Limits of the colour scale (default: the net's range).
    legend : bool
        Add the key of the lines drawn (wall, centreline, free boundary, the
        marker where a shock forms) under the axes.
    **line_properties
        matplotlib LineCollection properties applied to both families of Mach
        lines, e.g. ``linewidths=0.5``, ``alpha=0.8`` or ``cmap="viridis"``.

    Returns
    -------
    Drawing
        ``ax``; ``plus_lines`` and ``minus_lines`` (LineCollections of the C+
        and C- families, or None); ``station_lines`` (for a channel marched with
        fitted shocks, whose nodes lie on marching stations x = const rather than
        on characteristics: the stations coloured by Mach number; else None);
        ``shocks`` (Line2D of each fitted shock, in the shock style);
        ``walls``, ``centrelines`` and ``boundaries`` (lists
        of Line2D; a jet's boundary is a free boundary of fixed pressure, drawn
        as in :func:`~gasdyn2d.plot.draw_wave_pattern`); ``colourbar`` (or
        None); ``shock`` (a marker where the net folds when no fitted shock is
        drawn, or None); ``legend`` (or None).

    Raises
    ------
    InvalidInputError
        If ``result`` has no characteristic net, ``walls`` are malformed,
        ``mach_range`` is not two increasing numbers, ``length_unit`` is
        unknown, or a keyword is not a line property.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d.characteristics.nozzles import minimum_length_nozzle
    >>> from gasdyn2d.plot import draw_characteristic_net
    >>> drawn = draw_characteristic_net(minimum_length_nozzle(2.0, n_characteristics=8))
    >>> drawn
    <Drawing of draw_characteristic_net: plus_lines, minus_lines, walls ×1, centrelines ×1, boundaries ×0, colourbar, shocks ×0, legend>
    >>> drawn.colourbar.ax.get_ylabel()
    'Mach number [-]'
    """
    from matplotlib.collections import LineCollection
    from matplotlib.colors import Normalize

    check_axes(ax)
    net = getattr(result, "net", result)
    if net is None or not hasattr(net, "plus_segments"):
        raise reject("result", "a nozzle, channel or jet result with a characteristic net "
                     f"(a {type(result).__name__} has none)", result)
    scale, unit_text = length_unit_factor(length_unit)
    x, y, mach = plain(net.x), plain(net.y), np.asarray(net.mach, dtype=float)
    if mach_range is None:
        low, high = np.nanmin(mach), np.nanmax(mach)
    else:
        try:
            low, high = (float(v) for v in mach_range)
        except (TypeError, ValueError):
            raise reject("mach_range", "two numbers (low, high)", mach_range) from None
        if not high > low:
            raise reject("mach_range", "(low, high) with high > low", mach_range)
    norm = Normalize(vmin=low, vmax=high if high > low else low + 1e-9)
    solid, centre, free = _outline(result, walls, float(np.nanmax(x)) if x.size else 1.0)
    if ax is None:
        xs = np.concatenate([x] + [p[0] for p in solid + centre + free])
        ys = np.concatenate([y] + [p[1] for p in solid + centre + free])
        ax = axes_or_new(None, figsize=figure_size_for(np.ptp(xs), np.ptp(ys),
                                                       colourbar=colourbar))
    drawn = {"walls": [], "centrelines": [], "boundaries": [], "colourbar": None,
             "shock": None, "plus_lines": None, "minus_lines": None, "station_lines": None,
             "shocks": []}
    families = [("plus_lines", net.plus_segments, 0.9), ("minus_lines", net.minus_segments, 0.6)]
    if not any(len(segments) for _, segments, _ in families) and x.size:
        families = [("station_lines", _station_segments(x, y), 1.2)]  # a shock-fitted march
    for key, segments, width in families:
        segments = np.asarray(segments, dtype=np.intp).reshape(-1, 2)
        points = scale * np.stack([np.column_stack([x[segments[:, k]], y[segments[:, k]]])
                                   for k in (0, 1)], axis=1)
        lines = LineCollection(points, cmap=MACH_COLOURMAP, norm=norm, linewidths=width,
                               gid=key)
        lines.set_array(0.5 * (mach[segments[:, 0]] + mach[segments[:, 1]]))
        ax.add_collection(lines)
        drawn[key] = lines
    mach_lines = [drawn[key] for key, _, _ in families]
    apply_properties("draw_characteristic_net", mach_lines, line_properties)
    for shock in getattr(result, "shocks", ()):
        (line,) = ax.plot(scale * plain(shock.x), scale * plain(shock.y), gid="shock", zorder=4,
                          **WAVE_STYLES["shock"])
        drawn["shocks"].append(line)
    for role, key, polylines in (("wall", "walls", solid), ("centreline", "centrelines", centre),
                                 ("free boundary", "boundaries", free)):
        for px, py in polylines:
            (line,) = ax.plot(scale * px, scale * py, gid=role, **WAVE_STYLES[role])
            drawn[key].append(line)
    shock_x = float(plain(getattr(result, "shock_x", np.nan)))
    if np.isfinite(shock_x) and not drawn["shocks"]:
        shock_y = float(plain(result.shock_y))
        (drawn["shock"],) = ax.plot([scale * shock_x], [scale * shock_y], gid="shock forms",
                                    zorder=5, **SHOCK_FORMS_STYLE)
    if colourbar:
        drawn["colourbar"] = _mach_colourbar(ax, mach_lines[0])
    ax.autoscale_view()
    ax.set_aspect("equal")
    ax.set_xlabel(f"x [{unit_text}]")
    ax.set_ylabel(f"y [{unit_text}]")
    tidy(ax, grid=False)
    roles = [role for role, present in (
        ("wall", drawn["walls"]), ("centreline", drawn["centrelines"]),
        ("free boundary", drawn["boundaries"]), ("shock", drawn["shocks"]),
        ("shock forms", drawn["shock"] is not None and not drawn["shocks"]))
        if present]
    key = legend_below(ax, *key_handles(roles)) if legend else None
    return Drawing("draw_characteristic_net", ax, plus_lines=drawn.pop("plus_lines"),
                   minus_lines=drawn.pop("minus_lines"), **drawn, legend=key)


def _station_segments(x, y):
    """Segments joining neighbouring nodes of each marching station of a shock-fitted march
    (its nodes run station by station, lower to upper wall, a shock point twice)."""
    i = np.flatnonzero((x[1:] == x[:-1]) & (y[1:] > y[:-1]))
    return np.column_stack([i, i + 1])
