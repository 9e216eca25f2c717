"""Pressure–deflection polars of one or several streams, with solution points marked.

In the plane of flow direction and static pressure every state one wave can
reach from a stream lies on its polar: the shock polar above the stream's own
point and the two expansion branches below it. A wall is a vertical line, a
free boundary a horizontal one, and regions joined by a slip line meet where
two polars cross — which is what :func:`draw_pattern_polars` marks.
"""

from __future__ import annotations

import numpy as np

from ..relations.gas import Gas
from ..patterns.polars import pressure_deflection_polar
from ..relations.flow_state import FlowState
from ._style import CYCLE, PALETTE, angle_unit_factor, axes_or_new, plain, tidy

__all__ = ["draw_polars", "draw_pattern_polars"]


def _as_state(stream):
    if isinstance(stream, FlowState):
        if stream.shape:
            raise ValueError(f"draw_polars draws one polar per stream; got a batch FlowState of "
                             f"shape {stream.shape}: pass a list of single states instead.")
        return stream
    M = float(plain(stream))
    return FlowState(M, 1.0, 1.0)


def draw_polars(streams, *, labels=None, marks=(), mark_labels=None, ax=None,
                angle_unit="deg", n=201, min_pressure_ratio=0.2, log_pressure=False):
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

    Returns
    -------
    dict
        ``"ax"``; ``"shock_polars"`` and ``"expansion_branches"`` (lists of
        Line2D, one shock polar and two branches per stream); ``"marks"``
        (one Line2D per mark) and ``"mark_texts"``.

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
    >>> len(drawn["shock_polars"]), drawn["ax"].get_xlabel()
    (2, 'flow direction [deg]')
    """
    ax = axes_or_new(ax)
    factor, unit_text = angle_unit_factor(angle_unit)
    if isinstance(streams, (FlowState, int, float, np.floating)) or np.ndim(streams) == 0:
        streams = [streams]
    states = [_as_state(s) for s in streams]
    if not states:
        raise ValueError("streams must hold at least one FlowState or Mach number; got none.")
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
    drawn_marks, texts = _draw_marks(ax, marks, mark_labels, factor)
    if log_pressure:
        ax.set_yscale("log")
    ax.set_xlabel(f"flow direction [{unit_text}]")
    ax.set_ylabel("static pressure / first stream's [-]")
    ax.legend(frameon=False, fontsize="small")
    tidy(ax)
    return {"ax": ax, "shock_polars": shock_lines, "expansion_branches": branches,
            "marks": drawn_marks, "mark_texts": texts}


def _draw_marks(ax, marks, mark_labels, factor):
    drawn, texts = [], []
    for k, (direction, pressure) in enumerate(marks):
        x, y = factor * float(plain(direction)), float(pressure)
        (point,) = ax.plot([x], [y], ls="none", marker="o", ms=7, mfc="white",
                           mec=PALETTE["black"], mew=1.6, zorder=5, gid=f"mark {k}")
        drawn.append(point)
        if mark_labels is not None:
            texts.append(ax.annotate(mark_labels[k], (x, y), xytext=(6, 6),
                                     textcoords="offset points", fontsize="small"))
    return drawn, texts


def draw_pattern_polars(solution, regions, *, marks=(), gamma=None, case=None, ax=None,
                        angle_unit="deg", n=201, min_pressure_ratio=0.2):
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
        (:attr:`PatternSolution.gamma`, the default; kept for old calls).
    case : tuple of int, optional
        Which case of a batch solution to draw (default: the first).
    ax, angle_unit, n, min_pressure_ratio
        As in :func:`draw_polars`.

    Returns
    -------
    dict
        As :func:`draw_polars`. Pressures are relative to the pattern's inflow.

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
    >>> len(drawn["shock_polars"]), len(drawn["marks"])
    (2, 2)
    """
    gas = Gas(gamma=_pick(solution.gamma if gamma is None else gamma, case))
    states, labels = [], []
    for name in regions:
        r = solution.region(name)
        M, p, T, d = (_pick(v, case) for v in (r.M, r.p_ratio, r.T_ratio, r.direction))
        states.append(FlowState(M, p, T, d, gas))
        labels.append(f"region {name}: M = {M:.3f}")
    # draw_polars scales to the first stream: express marks relative to it too
    first_p = states[0].p_si if states else 1.0
    points = []
    for name in marks:
        r = solution.region(name)
        points.append((_pick(r.direction, case), _pick(r.p_ratio, case) / float(first_p)))
    drawn = draw_polars(states, labels=labels, marks=points, mark_labels=[str(m) for m in marks],
                        ax=ax, angle_unit=angle_unit, n=n, min_pressure_ratio=min_pressure_ratio)
    if regions and regions[0] != solution.region_names[0]:
        drawn["ax"].set_ylabel(f"static pressure / region {regions[0]}'s [-]")
    else:
        drawn["ax"].set_ylabel("static pressure / inflow pressure [-]")
    return drawn


def _pick(value, case):
    array = plain(value)
    if array.ndim == 0:
        return float(array)
    index = case if case is not None else (0,) * array.ndim
    return float(array[index])
