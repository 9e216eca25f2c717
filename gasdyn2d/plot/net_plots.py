"""Characteristic nets of nozzles, channels and jets, coloured by Mach number.

Draws the two families of Mach lines of a
:class:`~gasdyn2d.characteristics.unit_processes.CharacteristicNet` as line segments
coloured by the mean Mach number of their end nodes, with the walls (a
nozzle's contour and centreline, a channel's walls) or a jet's constant-pressure
boundary.
"""

from __future__ import annotations

import numpy as np

from ._style import MACH_COLOURMAP, PALETTE, WALL_COLOUR, axes_or_new, plain, tidy

__all__ = ["draw_characteristic_net"]


def _outline(result, walls, x_end):
    """(walls, boundaries) as lists of (x, y) polylines [m] for the result's kind."""
    solid, free = [], []
    for wall in walls or ():
        if hasattr(wall, "height"):  # a WallContour: sample it over the marched length
            x = np.linspace(0.0, x_end, 200)
            solid.append((x, np.asarray(wall.height(x), dtype=float)))
        else:
            solid.append((plain(wall[0]), plain(wall[1])))
    if walls is None and getattr(result, "lower_wall_y", None) is not None:  # a channel
        for side in ("lower", "upper"):
            solid.append((plain(getattr(result, f"{side}_wall_x")),
                          plain(getattr(result, f"{side}_wall_y"))))
    if hasattr(result, "wall_x"):  # a nozzle: contour from the throat corner, centreline
        x, y = plain(result.wall_x), plain(result.wall_y)
        solid.append((np.concatenate([[x[0]], x]), np.concatenate([[y[0]], y])))
        solid.append((np.array([0.0, x[-1]]), np.zeros(2)))
    if hasattr(result, "boundary_x"):  # a jet: lip, free boundary, centreline
        x, y = plain(result.boundary_x), plain(result.boundary_y)
        free.append((x, y))
        solid.append((np.array([x[0] - 0.15 * (x[-1] - x[0]), x[0]]), np.array([y[0], y[0]])))
        solid.append((np.array([x[0], x[-1]]), np.zeros(2)))
    return solid, free


def _mach_colourbar(ax, lines, x, y):
    """A Mach-number colour bar: below a long, flat net, beside a tall one."""
    wide = np.ptp(x) > 2.5 * np.ptp(y) if x.size else False
    bar = ax.figure.colorbar(lines, ax=ax, orientation="horizontal" if wide else "vertical",
                             shrink=0.6, aspect=35 if wide else 20, pad=0.02)
    bar.set_label("Mach number [-]")
    return bar


def draw_characteristic_net(result, *, walls=None, ax=None, colourbar=True, length_unit="m",
                            mach_range=None):
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
    colourbar : bool
        Add a colour bar of the Mach number.
    length_unit : str
        Unit text of the axis labels.
    mach_range : (low, high), optional
        Limits of the colour scale (default: the net's range).

    Returns
    -------
    dict
        ``"ax"``; ``"plus_lines"`` and ``"minus_lines"`` (LineCollections of
        the C+ and C- families); ``"walls"`` and ``"boundaries"`` (lists of
        Line2D; a jet boundary is dashed, a free boundary of fixed pressure);
        ``"colourbar"`` (or None); ``"shock"`` (a marker where the net folds,
        or None).

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d.characteristics.nozzles import minimum_length_nozzle
    >>> from gasdyn2d.plot import draw_characteristic_net
    >>> drawn = draw_characteristic_net(minimum_length_nozzle(2.0, n_characteristics=8))
    >>> len(drawn["walls"]), drawn["colourbar"].ax.get_xlabel()
    (2, 'Mach number [-]')
    """
    from matplotlib.collections import LineCollection
    from matplotlib.colors import Normalize

    ax = axes_or_new(ax)
    net = getattr(result, "net", result)
    if net is None or not hasattr(net, "plus_segments"):
        raise ValueError(f"{type(result).__name__} has no characteristic net to draw.")
    x, y, mach = plain(net.x), plain(net.y), np.asarray(net.mach, dtype=float)
    low, high = mach_range if mach_range is not None else (np.nanmin(mach), np.nanmax(mach))
    norm = Normalize(vmin=low, vmax=high if high > low else low + 1e-9)
    drawn = {"ax": ax, "walls": [], "boundaries": [], "colourbar": None, "shock": None}
    for key, segments, width in (("plus_lines", net.plus_segments, 0.9),
                                 ("minus_lines", net.minus_segments, 0.6)):
        segments = np.asarray(segments, dtype=np.intp).reshape(-1, 2)
        points = np.stack([np.column_stack([x[segments[:, k]], y[segments[:, k]]])
                           for k in (0, 1)], axis=1)
        lines = LineCollection(points, cmap=MACH_COLOURMAP, norm=norm, linewidths=width,
                               gid=key)
        lines.set_array(0.5 * (mach[segments[:, 0]] + mach[segments[:, 1]]))
        ax.add_collection(lines)
        drawn[key] = lines
    solid, free = _outline(result, walls, float(np.nanmax(x)) if x.size else 1.0)
    for wx, wy in solid:
        (line,) = ax.plot(wx, wy, color=WALL_COLOUR, lw=2.0, gid="wall")
        drawn["walls"].append(line)
    for bx, by in free:
        (line,) = ax.plot(bx, by, color=PALETTE["vermillion"], lw=1.6, ls="--",
                          gid="jet boundary")
        drawn["boundaries"].append(line)
    shock_x = float(plain(getattr(result, "shock_x", np.nan)))
    if np.isfinite(shock_x):
        shock_y = float(plain(result.shock_y))
        (drawn["shock"],) = ax.plot([shock_x], [shock_y], marker="*", ms=11, ls="none",
                                    color=PALETTE["vermillion"], mec="black", mew=0.6,
                                    gid="shock forms", label="shock forms")
        ax.legend(frameon=False, fontsize="small", loc="lower right")
    if colourbar:
        drawn["colourbar"] = _mach_colourbar(ax, drawn["plus_lines"], x, y)
    ax.autoscale_view()
    ax.set_aspect("equal")
    ax.set_xlabel(f"x [{length_unit}]")
    ax.set_ylabel(f"y [{length_unit}]")
    tidy(ax, grid=False)
    return drawn
