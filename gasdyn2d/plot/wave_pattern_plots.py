"""The wave diagram of a solved region graph, placed in its geometry.

A :class:`~gasdyn2d.patterns.graph.WavePattern` knows the states and the line
directions of its waves, and where waves start when they were given a
``start`` point. This module places every wave as straight lines in the
plane: a wave without a start begins where the wave that made its upstream
region ends; every line runs until it meets a wall, another wave's line or
the edge of the drawing. Free boundaries the pattern places (``add_free_boundary(...,
through=(x, y))``) are drawn from the solution: straight along the flow that
bounds them, bending where a wave meets them to the flow after its reflection.
"""

from __future__ import annotations

import numpy as np

from ..errors import InvalidInputError
from ..patterns.solution import PatternSolution
from ._style import (WAVE_STYLES, Drawing, apply_properties, axes_or_new, check_axes,
                     check_count, figure_size_for, key_handles, legend_below,
                     length_unit_factor, plain, polyline, reject, tidy)

__all__ = ["draw_wave_pattern"]

_TINY = 1e-9  # relative length below which a crossing is the line's own start point


# --------------------------------------------------------------- geometry core


def _pattern_waves(solution, case):
    """(name, upstream, downstream, start) per wave, in solution order.

    ``start`` is the solution's start point for the case (given, or implied
    by a placed wall, free boundary or wave meeting), or None.
    """
    out = []
    for name in solution.wave_names:
        link = solution.connection(name)
        start = (_pick(link.start_x, case), _pick(link.start_y, case))
        placed = link.start_source != "" and np.all(np.isfinite(start))
        out.append((name, link.upstream, link.downstream,
                    tuple(float(v) for v in start) if placed else None, link.family))
    return out


def _segments_of(polyline):
    x, y = (np.asarray(v, dtype=float) for v in polyline)
    return np.column_stack([x[:-1], y[:-1], x[1:], y[1:]])


def _ray_length(x0, y0, direction, segments, reach):
    """Distance along the ray from (x0, y0) to the first segment it crosses (or ``reach``)."""
    if len(segments) == 0:
        return reach
    c, s = np.cos(direction), np.sin(direction)
    ax_, ay, bx, by = segments.T
    ex, ey = bx - ax_, by - ay
    with np.errstate(divide="ignore", invalid="ignore"):
        den = c * ey - s * ex
        t = ((ax_ - x0) * ey - (ay - y0) * ex) / den  # along the ray
        u = ((ax_ - x0) * s - (ay - y0) * c) / den  # along the segment, 0..1
    ok = (np.abs(den) > 1e-14) & (t > _TINY * reach) & (u >= -1e-12) & (u <= 1 + 1e-12)
    return float(min(reach, np.min(t[ok]))) if np.any(ok) else reach


def _box_segments(extent):
    x0, x1, y0, y1 = extent
    return _segments_of(([x0, x1, x1, x0, x0], [y0, y0, y1, y1, y0]))


def _wave_directions(wave, n_fan_rays):
    """Plane directions of a wave's lines: one for a shock, head … tail for a fan."""
    head, tail = float(wave["head"]), float(wave["tail"])
    if wave["kind"] == "shock":
        return [head]
    return list(np.linspace(head, tail, n_fan_rays))


def place_waves(waves, wall_segments, extent, *, stop_at_waves=True, n_fan_rays=5,
                passes=3):
    """Start and end points of every wave line.

    Parameters
    ----------
    waves : list of dict
        In solution order, each with ``name``, ``upstream``, ``downstream``,
        ``start`` ((x, y) or None), ``kind`` ("shock" or "fan"), ``family``
        ("left" or "right") and ``head``, ``tail`` plane directions [rad].
    wall_segments : ndarray, shape (k, 4)
        Wall segments (x0, y0, x1, y1) [m].
    extent : (xmin, xmax, ymin, ymax)
        The drawing's edges [m].

    Returns
    -------
    dict
        name -> list of (x0, y0, x1, y1), one per line of the wave.

    Notes
    -----
    A wave's line is not stopped by the wave that made its upstream region
    or by the waves leaving its downstream region when they run in the other
    family (a reflection starts on its incident wave). Two shocks of one
    family do stop each other: a shock cannot run through a shock of its own
    family (a second ramp shock overtaking the first), the two merge where
    they meet, so both lines end at that point.
    """
    reach = 2.0 * np.hypot(extent[1] - extent[0], extent[3] - extent[2])
    fixed = np.vstack([wall_segments.reshape(-1, 4), _box_segments(extent)])
    made_by = {w["downstream"]: w["name"] for w in waves}
    by_name = {w["name"]: w for w in waves}
    children = {w["name"]: {v["name"] for v in waves if v["upstream"] == w["downstream"]}
                for w in waves}
    lines = {}
    for _ in range(passes):  # lines clip each other: repeat until the ends settle
        new = {}
        for w in waves:
            start = w["start"]
            if start is None:
                parent = made_by.get(w["upstream"])
                if parent is None or parent not in new:
                    raise InvalidInputError(
                        f"wave {w['name']!r} has no start point and its upstream region "
                        f"{w['upstream']!r} is not made by a placed wave: give it "
                        "add_wave(..., start=(x, y)) or pass starts={name: (x, y)}.")
                ends = np.asarray(new[parent])[:, 2:]
                start = tuple(ends.mean(axis=0))
            related = {w["name"], made_by.get(w["upstream"])} | children[w["name"]]
            merging = {k for k in related if k in by_name and k != w["name"]
                       and _same_family_shocks(w, by_name[k])}
            others = [np.asarray(v) for k, v in lines.items()
                      if k not in related or k in merging]
            blocking = np.vstack([fixed] + others) if stop_at_waves and others else fixed
            x0, y0 = float(start[0]), float(start[1])
            segs = []
            for direction in _wave_directions(w, n_fan_rays):
                t = _ray_length(x0, y0, direction, blocking, reach)
                segs.append((x0, y0, float(x0 + t * np.cos(direction)),
                             float(y0 + t * np.sin(direction))))
            new[w["name"]] = segs
        if new == lines:
            break
        lines = new
    return lines


def _same_family_shocks(a, b):
    return a["kind"] == b["kind"] == "shock" and a.get("family") == b.get("family")


# --------------------------------------------------------------- drawing


def _solution_waves(solution, starts, case):
    waves = []
    for name, up, down, start, family in _pattern_waves(solution, case):
        w = solution.wave(name)
        kind = _pick(w.kind, case)
        given = starts.get(name)
        if given is not None:
            given = tuple(float(v) for v in plain(given))
        waves.append({"name": name, "upstream": up, "downstream": down, "family": family,
                      "start": given if given is not None else start, "kind": str(kind),
                      "head": _pick(plain(w.head_line_direction), case),
                      "tail": _pick(plain(w.tail_line_direction), case)})
    return waves


def _pick(value, case):
    array = np.asarray(value)
    if array.ndim == 0:
        return array[()]
    index = tuple(case) if case is not None else (0,) * array.ndim
    try:
        return array[index]
    except (IndexError, TypeError, ValueError):
        raise reject("case", f"an index tuple into the batch of shape {array.shape}",
                     case) from None


def _free_boundary_anchors(solution, case):
    """(through point, direction before, bend point or None, direction after) per placed
    free boundary of the pattern [m, rad], from its conditions and meeting points."""
    anchors = []
    for condition in solution.conditions:
        if condition.kind != "free boundary":
            continue
        through = (float(_pick(plain(condition.through_x), case)),
                   float(_pick(plain(condition.through_y), case)))
        if not np.all(np.isfinite(through)):
            continue
        region = condition.regions[0]
        after = float(_pick(plain(solution.region(region).direction), case))
        meeting = next((m for m in solution.meeting_points
                        if m.kind == "free boundary" and m.boundary_region == region), None)
        if meeting is None:
            anchors.append((through, after, None, after))
            continue
        bend = (float(_pick(plain(meeting.x), case)), float(_pick(plain(meeting.y), case)))
        upstream = solution.connection(meeting.incoming[0]).upstream
        before = float(_pick(plain(solution.region(upstream).direction), case))
        anchors.append((through, before, bend if np.all(np.isfinite(bend)) else None, after))
    return anchors


def _free_boundary_lines(anchors, extent):
    """Polylines of the placed free boundaries, from edge to edge of the drawing [m]."""
    box = _box_segments(extent)
    reach = 2.0 * np.hypot(extent[1] - extent[0], extent[3] - extent[2])
    lines = []
    for through, before, bend, after in anchors:
        x0, y0 = through
        back = _ray_length(x0, y0, before + np.pi, box, reach)
        first = (x0 - back * np.cos(before), y0 - back * np.sin(before))
        corner = bend if bend is not None else through
        onward = _ray_length(corner[0], corner[1], after, box, reach)
        last = (corner[0] + onward * np.cos(after), corner[1] + onward * np.sin(after))
        points = [first, corner, last] if bend is not None else [first, last]
        lines.append((np.array([p[0] for p in points]), np.array([p[1] for p in points])))
    return lines


def _default_extent(walls, waves, anchors):
    points = [np.column_stack([np.asarray(x, float), np.asarray(y, float)]) for x, y in walls]
    points += [np.asarray([w["start"]], float) for w in waves if w["start"] is not None]
    for through, _, bend, _ in anchors:
        points.append(np.asarray([through] + ([bend] if bend is not None else []), float))
    if not points:
        raise reject("walls", "given (or extent=, or wave start points)", walls)
    allp = np.vstack(points)
    (x0, y0), (x1, y1) = allp.min(axis=0), allp.max(axis=0)
    size = max(x1 - x0, y1 - y0, 1e-12)
    if not walls:
        return (x0 - 0.2 * size, x1 + 2.0 * size, y0 - 1.0 * size, y1 + 1.0 * size)
    return (x0, x1, y0 - 0.02 * size, y1 + 0.02 * size)


def _checked_extent(extent):
    try:
        x0, x1, y0, y1 = (float(plain(v)) for v in extent)
    except (TypeError, ValueError):
        raise reject("extent", "(xmin, xmax, ymin, ymax)", extent) from None
    if not (x1 > x0 and y1 > y0 and np.all(np.isfinite([x0, x1, y0, y1]))):
        raise reject("extent", "(xmin, xmax, ymin, ymax) with xmax > xmin and ymax > ymin",
                     extent)
    return (x0, x1, y0, y1)


def _label_points(lines, waves, solution, case, extent):
    """A point inside each region: just downstream of the wave that makes it."""
    span = np.hypot(extent[1] - extent[0], extent[3] - extent[2])
    points = {}
    for w in waves:
        seg = np.asarray(lines[w["name"]][-1])  # a fan's tail line, a shock's only line
        mid = 0.5 * (seg[:2] + seg[2:])
        d = float(_pick(plain(solution.region(w["downstream"]).direction), case))
        length = np.hypot(*(seg[2:] - seg[:2]))
        step = 0.22 * min(length, 0.5 * span)
        points[w["downstream"]] = mid + step * np.array([np.cos(d), np.sin(d)])
    inflow = solution.region_names[0]
    first = np.asarray(lines[waves[0]["name"]][0])
    d = float(_pick(plain(solution.region(inflow).direction), case))
    points[inflow] = first[:2] + 0.5 * (first[2:] - first[:2]) - 0.12 * span * np.array(
        [np.cos(d), np.sin(d)])
    x0, x1, y0, y1 = extent
    return {k: (float(np.clip(p[0], x0, x1)), float(np.clip(p[1], y0, y1)))
            for k, p in points.items()}


def _solution_label_points(solution, points, extent):
    """The solution's own label points (where its geometry places them) inside the drawing."""
    x0, x1, y0, y1 = extent
    out = {}
    for region in points:
        p = solution.region_label_point(region)
        if p is not None and x0 <= p[0] <= x1 and y0 <= p[1] <= y1:
            out[region] = p
    return out


def _slip_line_segments(solution, slip_lines, waves, lines, fixed, extent, case):
    made_by = {w["downstream"]: w for w in waves}
    reach = 2.0 * np.hypot(extent[1] - extent[0], extent[3] - extent[2])
    out = {}
    for pair in slip_lines:
        a, b = pair
        maker = made_by.get(a) or made_by.get(b)
        if maker is None:
            raise reject("slip_lines", "pairs of regions of which one is made by a wave (the "
                         "slip line starts where that wave starts)", pair)
        x0, y0 = np.asarray(lines[maker["name"]][0][:2])
        d = float(_pick(plain(solution.region(a).direction), case))
        t = _ray_length(x0, y0, d, fixed, reach)
        out[(a, b)] = (x0, y0, x0 + t * np.cos(d), y0 + t * np.sin(d))
    return out


def draw_wave_pattern(solution, *, walls=(), free_boundaries=None, starts=None, slip_lines=None,
                      extent=None, label_positions=None, case=None, stop_at_waves=True,
                      n_fan_rays=5, length_unit="m", legend=True, ax=None, **line_properties):
    """Draw a solved wave pattern: walls, shocks, fans, slip lines, free boundaries, Mach numbers.

    Parameters
    ----------
    solution : PatternSolution
        From :meth:`gasdyn2d.patterns.graph.WavePattern.solve`; waves placed with
        ``add_wave(..., start=(x, y))`` keep their start points, and so do
        waves the solution places itself (a reflection from a wall given
        with ``add_wall(..., through=(x, y))``, the waves leaving a crossing;
        see :attr:`PatternSolution.meeting_points`).
    walls : sequence of (x, y) arrays, optional
        Solid walls as polylines [m] (numbers in metres or length Quantities);
        wave lines end where they meet one.
    free_boundaries : sequence of (x, y) arrays, optional
        Constant-pressure boundaries (a jet's edge) as polylines [m]. By default
        they come from the solution: each free boundary given to the pattern
        with ``add_free_boundary(..., through=(x, y))`` is drawn along the flow
        that bounds it and bends where a wave meets it. Pass ``()`` to draw none.
        Wave lines end on them too.
    starts : dict, optional
        Start points {wave name: (x, y)} [m] overriding or adding to the
        pattern's. A wave with no start begins at the end of the wave that
        made its upstream region (the mean end point of a fan's lines).
    slip_lines : sequence of (region_a, region_b), optional
        Slip lines to draw (default: the pattern's own); each starts where
        the wave that made ``region_a`` starts and follows its flow direction.
    extent : (xmin, xmax, ymin, ymax), optional
        Edges of the drawing [m] (default: the walls' bounding box).
    label_positions : dict, optional
        {region name: (x, y)} [m] for region labels placed by hand (otherwise
        :meth:`PatternSolution.region_label_point` where the solution's
        geometry gives one, else a point just downstream of the drawn wave
        that makes the region).
    case : tuple of int, optional
        Which case of a batch solution to draw (default: the first).
    stop_at_waves : bool
        End each line where it meets another wave's line (True) or only at
        walls and the edges (False).
    n_fan_rays : int
        Lines drawn per fan, head and tail included (>= 2).
    length_unit : {"m", "cm", "mm", "km", "in", "ft"}
        Unit of the axes: the geometry (given in metres) is drawn in it.
    legend : bool
        Add the key of the line types drawn (shock, expansion fan, slip line,
        wall, free boundary) under the axes.
    ax : matplotlib Axes, optional
        Where to draw (default: a new figure sized to the drawing's extent).
    **line_properties
        matplotlib properties applied to every wave line (shocks, fan rays
        and slip lines), e.g. ``alpha=0.7`` or ``zorder=4``.

    Returns
    -------
    Drawing
        ``ax``; ``shocks`` {name: Line2D}; ``fans`` {name: LineCollection};
        ``slip_lines`` {(a, b): Line2D}; ``walls`` and ``free_boundaries``
        (lists of Line2D); ``labels`` {region: Text}; ``lines`` {name: [(x0, y0,
        x1, y1), …]} in ``length_unit``; ``legend`` (or None).

    Raises
    ------
    InvalidInputError
        For a bad argument, naming it: ``solution`` not a solved pattern (or
        the case not solved), malformed ``walls``, ``free_boundaries``,
        ``extent``, ``starts`` or ``slip_lines``, ``case`` outside the
        batch, ``n_fan_rays`` below 2, an unknown ``length_unit``, or a
        keyword that is not a line property.

    Notes
    -----
    Lines are straight: exact for the uniform regions of a region graph,
    while a real fan's lines curve where they cross other waves, and a shock
    bends where it crosses a fan.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> from gasdyn2d.patterns.graph import WavePattern
    >>> from gasdyn2d.plot import draw_wave_pattern
    >>> duct = WavePattern(2.6)
    >>> _ = duct.add_wave("ramp shock", upstream="1", downstream="2", family="left",
    ...                   turn=np.radians(6.0), start=(0.0, 0.0))
    >>> _ = duct.add_wave("reflected", upstream="2", downstream="3", family="right")
    >>> _ = duct.add_wall("3", direction=0.0)
    >>> walls = [([-0.5, 0.0, 4.0], [0.0, 0.0, 4.0 * np.tan(np.radians(6.0))]),
    ...          ([-0.5, 4.0], [1.0, 1.0])]
    >>> drawn = draw_wave_pattern(duct.solve(), walls=walls, length_unit="mm")
    >>> drawn
    <Drawing of draw_wave_pattern: shocks ×2, fans ×0, slip_lines ×0, walls ×2, free_boundaries ×0, labels ×3, lines ×2, legend>
    >>> round(drawn.shocks["ramp shock"].get_xdata()[1])   # where it meets the roof [mm]
    1942
    """
    from matplotlib.collections import LineCollection

    if not isinstance(solution, PatternSolution):
        raise reject("solution", "a PatternSolution (from WavePattern.solve())", solution)
    check_axes(ax)
    n_fan_rays = check_count("n_fan_rays", n_fan_rays, 2)
    scale, unit_text = length_unit_factor(length_unit)
    if not _pick(solution.ok, case):
        raise reject("solution", "solved for the case drawn (it failed: "
                     f"{_pick(solution.failure, case)})", case if case is not None else "case 0")
    walls = [polyline("walls", w) for w in walls]
    waves = _solution_waves(solution, dict(starts or {}), case)
    anchors = _free_boundary_anchors(solution, case) if free_boundaries is None else []
    extent = (_default_extent(walls + [polyline("free_boundaries", f) for f in
                                       (free_boundaries or ())], waves, anchors)
              if extent is None else _checked_extent(extent))
    if free_boundaries is None:
        free_boundaries = _free_boundary_lines(anchors, extent)
    else:
        free_boundaries = [polyline("free_boundaries", f) for f in free_boundaries]
    edges = walls + free_boundaries
    wall_segments = (np.vstack([_segments_of(w) for w in edges]) if edges
                     else np.empty((0, 4)))
    lines = place_waves(waves, wall_segments, extent, stop_at_waves=stop_at_waves,
                        n_fan_rays=n_fan_rays)
    fixed = np.vstack([wall_segments, _box_segments(extent)])
    slips = _slip_line_segments(solution, solution.slip_lines if slip_lines is None
                                else slip_lines, waves, lines, fixed, extent, case)
    if ax is None:
        ax = axes_or_new(None, figsize=figure_size_for(extent[1] - extent[0],
                                                       extent[3] - extent[2]))

    drawn = {"shocks": {}, "fans": {}, "slip_lines": {}, "walls": [], "free_boundaries": []}
    for x, y in walls:
        (line,) = ax.plot(scale * x, scale * y, solid_capstyle="butt", gid="wall",
                          **WAVE_STYLES["wall"])
        drawn["walls"].append(line)
    for x, y in free_boundaries:
        (line,) = ax.plot(scale * x, scale * y, gid="free boundary",
                          **WAVE_STYLES["free boundary"])
        drawn["free_boundaries"].append(line)
    for w in waves:
        segs = scale * np.asarray(lines[w["name"]])
        if w["kind"] == "shock":
            (line,) = ax.plot(segs[0, [0, 2]], segs[0, [1, 3]], gid=f"shock:{w['name']}",
                              **WAVE_STYLES["shock"])
            drawn["shocks"][w["name"]] = line
        else:
            style = WAVE_STYLES["expansion fan"]
            widths = np.full(len(segs), 0.6 * style["linewidth"])
            widths[[0, -1]] = 1.4 * style["linewidth"]
            fan = LineCollection(segs.reshape(-1, 2, 2), colors=style["color"],
                                 linewidths=widths, gid=f"fan:{w['name']}")
            ax.add_collection(fan)
            drawn["fans"][w["name"]] = fan
    for pair, (x0, y0, x1, y1) in slips.items():
        (line,) = ax.plot(scale * np.array([x0, x1]), scale * np.array([y0, y1]),
                          gid=f"slip:{pair[0]}|{pair[1]}", **WAVE_STYLES["slip line"])
        drawn["slip_lines"][pair] = line
    apply_properties("draw_wave_pattern", [*drawn["shocks"].values(), *drawn["fans"].values(),
                                           *drawn["slip_lines"].values()], line_properties)
    points = _label_points(lines, waves, solution, case, extent)
    if case is None or not np.shape(solution.ok):
        points.update(_solution_label_points(solution, points, extent))
    points.update({k: tuple(float(v) for v in plain(p))
                   for k, p in (label_positions or {}).items()})
    labels = {}
    for region, (x, y) in points.items():
        M = float(_pick(solution.region(region).M, case))
        labels[region] = ax.text(
            scale * x, scale * y, f"{region}\nM {M:.3f}", ha="center", va="center",
            fontsize="small", zorder=6,
            bbox={"boxstyle": "round,pad=0.25", "fc": "white", "ec": "#BBBBBB", "lw": 0.6})
    ax.set_xlim(scale * extent[0], scale * extent[1])
    ax.set_ylim(scale * extent[2], scale * extent[3])
    ax.set_aspect("equal")
    ax.set_xlabel(f"x [{unit_text}]")
    ax.set_ylabel(f"y [{unit_text}]")
    tidy(ax, grid=False)
    roles = [role for role, present in (
        ("shock", drawn["shocks"]), ("expansion fan", drawn["fans"]),
        ("slip line", drawn["slip_lines"]), ("wall", drawn["walls"]),
        ("free boundary", drawn["free_boundaries"])) if present]
    key = legend_below(ax, *key_handles(roles), columns=min(len(roles), 5)) if legend else None
    drawn_lines = {name: [tuple(scale * v for v in seg) for seg in segs]
                   for name, segs in lines.items()}
    return Drawing("draw_wave_pattern", ax, **drawn, labels=labels, lines=drawn_lines,
                   legend=key)
