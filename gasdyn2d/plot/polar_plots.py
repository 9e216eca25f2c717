"""Pressure–deflection polars of one or several streams, with solution points marked.

In the plane of flow direction and static pressure every state one wave can
reach from a stream lies on its polar: the shock polar above the stream's own
point and the two expansion branches below it. A wall is a vertical line, a
free boundary a horizontal one, and regions joined by a slip line meet where
two polars cross — which is what :func:`draw_pattern_polars` marks.
"""

from __future__ import annotations

import numpy as np

from ..patterns.polars import pressure_deflection_polar
from ..patterns.solution import PatternSolution
from ..relations.flow_state import FlowState
from ..relations.gas import Gas
from ._style import (CYCLE, PALETTE, Drawing, angle_unit_factor, apply_properties, axes_or_new,
                     check_axes, check_count, legend_below, plain, reject, tidy)

__all__ = ["draw_polars", "draw_pattern_polars"]


#: Marks closer than this fraction of the axis spans share one label.
COINCIDENT = 0.012


def _as_state(stream):
    if isinstance(stream, FlowState):
        if stream.shape:
            raise reject("streams", "single FlowStates or Mach numbers (one polar per stream; "
                         f"a batch FlowState of shape {stream.shape} is several)", stream)
        return stream
    try:
        M = float(plain(stream))
    except (TypeError, ValueError):
        raise reject("streams", "FlowStates or Mach numbers", stream) from None
    if not M > 1.0:
        raise reject("streams", "supersonic: a Mach number above 1", stream)
    return FlowState(M, 1.0, 1.0)


def _labels(name, labels, count):
    if labels is None:
        return None
    labels = list(labels)
    if len(labels) != count:
        raise reject(name, f"one label per item ({count})", labels)
    return [str(label) for label in labels]


def draw_polars(streams, *, labels=None, marks=(), mark_labels=None, ax=None,
                angle_unit="deg", n=201, min_pressure_ratio=0.2, log_pressure=False,
                **line_properties):
    """Draw the pressure–deflection polars of one or several streams.

    Parameters
    ----------
    streams : FlowState, float or sequence of them
        Streams whose polars to draw; a plain Mach number is a stream along x.
        Pressures are plotted relative to the first stream's static pressure.
    labels : sequence of str, optional
        Legend entry per stream (default ``"M = …"``).
    marks : sequence of (direction, pressure_ratio), optional
        Points to mark, e.g. solved region states: direction [rad] and static
        pressure over the first stream's.
    mark_labels : sequence of str, optional
        Text beside each mark.
    ax : matplotlib Axes, optional
        Where to draw (default: new figure).
    angle_unit : {"deg", "rad"}
        Unit of the horizontal axis.
    n : int
        Points per polar branch (see :func:`gasdyn2d.patterns.polars.pressure_deflection_polar`).
    min_pressure_ratio : float
        Lowest pressure ratio of the expansion branches, relative to each stream.
    log_pressure : bool
        Logarithmic pressure axis (useful when polars of very different
        pressure are shown together).
    **line_properties
        matplotlib Line2D properties applied to every polar line (e.g.
        ``linewidth=1``, ``alpha=0.6``, ``zorder=3``).

    Returns
    -------
    Drawing
        ``ax``; ``shock_polars`` and ``expansion_branches`` (lists of Line2D,
        one shock polar and two branches per stream); ``marks`` (one Line2D per
        mark); ``mark_texts`` (one Text per group of coincident marks, their
        labels joined: ``"4, 5"``); ``legend`` (under the axes, outside the
        data).

    Raises
    ------
    InvalidInputError
        For a bad argument, naming it: no stream, a subsonic or batch stream,
        labels that do not match the streams or marks, an unknown
        ``angle_unit``, ``n`` below 3, ``min_pressure_ratio`` outside (0, 1),
        or a keyword that is not a line property.

    Notes
    -----
    Shock polar from the θ-β-M relation and the oblique-shock pressure ratio
    (NACA Report 1135, eqs. 128 and 138); expansion branches from the
    isentropic centred fan (eq. 171 for ν).

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d.plot import draw_polars
    >>> drawn = draw_polars([2.0, 3.0])
    >>> drawn
    <Drawing of draw_polars: shock_polars ×2, expansion_branches ×4, marks ×0, mark_texts ×0, legend>
    >>> drawn.ax.get_xlabel()
    'flow direction [deg]'
    """
    check_axes(ax)
    factor, unit_text = angle_unit_factor(angle_unit)
    check_count("n", n, 3)
    if not 0.0 < float(min_pressure_ratio) < 1.0:
        raise reject("min_pressure_ratio", "between 0 and 1 (exclusive)", min_pressure_ratio)
    if isinstance(streams, (FlowState, int, float, np.floating)) or np.ndim(streams) == 0:
        streams = [streams]
    states = [_as_state(s) for s in streams]
    if not states:
        raise reject("streams", "at least one FlowState or Mach number", streams)
    labels = _labels("labels", labels, len(states))
    points = _mark_points(marks, factor)
    mark_labels = _labels("mark_labels", mark_labels, len(points))
    ax = axes_or_new(ax)
    reference_p = float(states[0].p_si)
    shock_lines, branches = [], []
    for i, state in enumerate(states):
        colour = CYCLE[i % len(CYCLE)]
        polar = pressure_deflection_polar(state, n=n, min_pressure_ratio=min_pressure_ratio)
        scale = float(state.p_si) / reference_p
        label = labels[i] if labels is not None else f"M = {float(state.M_si):.3g}"
        (line,) = ax.plot(factor * plain(polar.shock_direction),
                          scale * plain(polar.shock_pressure_ratio), color=colour, lw=1.8,
                          label=label, gid=f"shock polar {i}")
        shock_lines.append(line)
        for side, direction in (("left", polar.expansion_direction_left),
                                ("right", polar.expansion_direction_right)):
            (branch,) = ax.plot(factor * plain(direction),
                                scale * plain(polar.expansion_pressure_ratio), color=colour,
                                lw=1.2, ls=(0, (1, 1.5)), gid=f"expansion branch {i} {side}")
            branches.append(branch)
    apply_properties("draw_polars", shock_lines + branches, line_properties)
    if log_pressure:
        ax.set_yscale("log")
    drawn_marks, texts = _draw_marks(ax, points, mark_labels)
    ax.set_xlabel(f"flow direction [{unit_text}]")
    ax.set_ylabel("static pressure / first stream's [-]")
    tidy(ax)
    legend = _polar_legend(ax, shock_lines)
    return Drawing("draw_polars", ax, shock_polars=shock_lines, expansion_branches=branches,
                   marks=drawn_marks, mark_texts=texts, legend=legend)


def _polar_legend(ax, shock_lines):
    """Streams by colour, and the line styles: shock polar solid, expansion branches dotted."""
    from matplotlib.lines import Line2D

    handles = list(shock_lines)
    labels = [line.get_label() for line in shock_lines]
    handles += [Line2D([], [], color="#555555", lw=1.8),
                Line2D([], [], color="#555555", lw=1.2, ls=(0, (1, 1.5)))]
    labels += ["shock polar", "expansion branches"]
    return legend_below(ax, handles, labels, columns=2 if len(handles) > 3 else len(handles))


def _mark_points(marks, factor):
    points = []
    for mark in marks:
        try:
            direction, pressure = mark
            points.append((factor * float(plain(direction)), float(plain(pressure))))
        except (TypeError, ValueError):
            raise reject("marks", "(direction, pressure ratio) pairs", mark) from None
    return points


def _coincident_groups(points, ax):
    """Indices of the marks grouped where they sit on top of each other in the figure."""
    (x0, x1), (y0, y1) = ax.get_xlim(), ax.get_ylim()
    log = ax.get_yscale() == "log"
    groups = []
    for k, (x, y) in enumerate(points):
        for group in groups:
            gx, gy = points[group[0]]
            dy = (np.log(y / gy) / np.log(y1 / y0)) if log else (y - gy) / (y1 - y0)
            if abs(x - gx) <= COINCIDENT * abs(x1 - x0) and abs(dy) <= COINCIDENT:
                group.append(k)
                break
        else:
            groups.append([k])
    return groups


def _draw_marks(ax, points, mark_labels):
    drawn, texts = [], []
    for k, (x, y) in enumerate(points):
        (point,) = ax.plot([x], [y], ls="none", marker="o", ms=7, mfc="white",
                           mec=PALETTE["black"], mew=1.6, zorder=5, gid=f"mark {k}")
        drawn.append(point)
    if mark_labels is not None:
        for group in _coincident_groups(points, ax):
            x, y = points[group[0]]
            text = ", ".join(mark_labels[k] for k in group)
            texts.append(ax.annotate(text, (x, y), xytext=(6, 6), textcoords="offset points",
                                     fontsize="small", zorder=6,
                                     bbox={"boxstyle": "round,pad=0.15", "fc": "white",
                                           "ec": "none", "alpha": 0.85}))
    return drawn, texts


def draw_pattern_polars(solution, regions, *, marks=(), gamma=None, case=None, ax=None,
                        angle_unit="deg", n=201, min_pressure_ratio=0.2, **line_properties):
    """Polars of regions of a solved wave pattern, with region states marked.

    Parameters
    ----------
    solution : PatternSolution
        From :meth:`gasdyn2d.patterns.graph.WavePattern.solve`.
    regions : sequence of str
        Regions whose polars to draw (e.g. the two sides of a wave crossing).
    marks : sequence of str
        Regions whose states to mark (e.g. the pair joined by the slip line).
    gamma : float, optional
        Ratio of specific heats [-] overriding the solution's own
        (:attr:`PatternSolution.gamma`, the default; kept for old calls). Not for a
        thermally perfect inflow gas, whose polars are drawn with the gas at each
        region's temperature.
    case : tuple of int, optional
        Which case of a batch solution to draw (default: the first).
    ax, angle_unit, n, min_pressure_ratio, **line_properties
        As in :func:`draw_polars`.

    Returns
    -------
    Drawing
        As :func:`draw_polars`. Pressures are relative to the first region drawn.

    Raises
    ------
    InvalidInputError
        If ``solution`` is not a solved pattern, a region is unknown, ``case``
        is outside the batch, or for the arguments of :func:`draw_polars`.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> from gasdyn2d.patterns.graph import WavePattern
    >>> from gasdyn2d.plot import draw_pattern_polars
    >>> duct = WavePattern(2.6)
    >>> _ = duct.add_wave("ramp shock", upstream="1", downstream="2", family="left",
    ...                   turn=np.radians(6.0))
    >>> _ = duct.add_wave("reflected", upstream="2", downstream="3", family="right")
    >>> _ = duct.add_wall("3", direction=0.0)
    >>> drawn = draw_pattern_polars(duct.solve(), ["1", "2"], marks=["2", "3"])
    >>> len(drawn.shock_polars), len(drawn.marks)
    (2, 2)
    """
    if not isinstance(solution, PatternSolution):
        raise reject("solution", "a PatternSolution (from WavePattern.solve())", solution)
    if isinstance(regions, str):
        regions = [regions]
    if isinstance(marks, str):
        marks = [marks]
    inflow = solution.inflow_state
    hot = inflow is not None and inflow.gas.is_thermally_perfect
    if hot and gamma is not None:
        raise reject("gamma", "left out for a thermally perfect inflow gas (its γ varies with "
                     "temperature; the polars use the gas itself)", gamma)
    gas = inflow.gas if hot else Gas(gamma=_pick(solution.gamma if gamma is None else gamma,
                                                 case))
    T_in = _pick(inflow.T_si, case) if hot else 1.0  # a thermally perfect gas needs T itself
    states, labels = [], []
    for name in regions:
        r = solution.region(name)
        M, p, T, d = (_pick(v, case) for v in (r.M, r.p_ratio, r.T_ratio, r.direction))
        states.append(FlowState(M, p, T * T_in, d, gas))
        labels.append(f"region {name}: M = {M:.3f}")
    # draw_polars scales to the first stream: express marks relative to it too
    first_p = states[0].p_si if states else 1.0
    points = []
    for name in marks:
        r = solution.region(name)
        points.append((_pick(r.direction, case), _pick(r.p_ratio, case) / float(first_p)))
    if not states:
        raise reject("regions", "at least one region name", regions)
    drawn = draw_polars(states, labels=labels, marks=points, mark_labels=[str(m) for m in marks],
                        ax=ax, angle_unit=angle_unit, n=n, min_pressure_ratio=min_pressure_ratio,
                        **line_properties)
    drawn.function = "draw_pattern_polars"
    if regions[0] != solution.region_names[0]:
        drawn.ax.set_ylabel(f"static pressure / region {regions[0]}'s [-]")
    else:
        drawn.ax.set_ylabel("static pressure / inflow pressure [-]")
    return drawn


def _pick(value, case):
    array = plain(value)
    if array.ndim == 0:
        return float(array)
    index = case if case is not None else (0,) * array.ndim
    try:
        return float(array[tuple(index)])
    except (IndexError, TypeError, ValueError):
        raise reject("case", f"an index tuple into the batch of shape {array.shape}",
                     case) from None
