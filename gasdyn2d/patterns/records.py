"""The records of a solved wave pattern: regions, waves, connections, conditions, points.

Immutable result tables (:class:`~gasdyn2d.boundary.results.ResultTable`) that
:class:`~gasdyn2d.patterns.solution.PatternSolution` hands out, the one rule for
region and wave names, and the small text and HTML tables the solution and its
meeting points are shown as.
"""

from __future__ import annotations

import dataclasses
import html

import numpy as np

from ..boundary import ResultTable, unit_field
from ..boundary.types import FloatArray
from ..errors import InvalidInputError

__all__ = ["RegionSolution", "WaveSolution", "WaveConnection", "PatternCondition",
           "MeetingPoint", "MeetingPoints", "region_name", "text_table", "html_table",
           "first_case", "si_length", "magnitude"]


def region_name(value, argument: str) -> str:
    """The one rule for region and wave names: text, or an integer taken as its decimal
    text (so that ``region(2)`` and ``region("2")`` name the same region); anything
    else is refused with an :class:`~gasdyn2d.errors.InvalidInputError`."""
    if isinstance(value, str):
        return value
    if isinstance(value, (int, np.integer)) and not isinstance(value, (bool, np.bool_)):
        return str(int(value))
    raise InvalidInputError(f"{argument} must be a name (a string, or an integer taken as "
                            f"its text); got {value!r} of type {type(value).__name__}.")


# --------------------------------------------------------------------- result records


@dataclasses.dataclass(frozen=True, repr=False)
class RegionSolution(ResultTable):
    """The uniform state of one region, relative to the inflow region.

    For a single case every field is a float; for a batch, a read-only array
    of the batch shape (or the caller's container: Quantity, DataArray, Series).
    """

    M: FloatArray = unit_field("", "Mach number")
    p_ratio: FloatArray = unit_field("", "static pressure over the inflow static pressure")
    T_ratio: FloatArray = unit_field("", "static temperature over the inflow temperature")
    p0_ratio: FloatArray = unit_field("", "stagnation pressure over the inflow's")
    direction: FloatArray = unit_field("rad", "flow direction, counterclockwise from x")


@dataclasses.dataclass(frozen=True, repr=False)
class WaveSolution(ResultTable):
    """One wave of a solved pattern.

    ``kind`` is ``"shock"``, ``"fan"`` (an expansion), ``"compression"`` (an
    isentropic compression) or ``"none"`` (case not solved). ``wave_angle`` is
    the shock angle from the upstream flow (NaN for a simple wave);
    ``head_mach_angle`` and ``tail_mach_angle`` are the Mach angles of the
    upstream and downstream flows (a simple wave's first and last Mach lines,
    also given for shocks as the limits a weak shock lies between);
    ``head_line_direction`` and ``tail_line_direction`` are the directions of
    the wave's lines in the plane (for a shock both are the shock line).
    """

    kind: FloatArray = unit_field("", "shock, fan, compression or none", dtype=str)
    family: str = unit_field("", "left or right", dtype=str)
    turn: FloatArray = unit_field("rad", "signed change of flow direction across the wave")
    p_ratio: FloatArray = unit_field("", "downstream over upstream static pressure")
    wave_angle: FloatArray = unit_field("rad", "shock angle from the upstream flow")
    head_mach_angle: FloatArray = unit_field("rad", "Mach angle of the upstream flow")
    tail_mach_angle: FloatArray = unit_field("rad", "Mach angle of the downstream flow")
    head_line_direction: FloatArray = unit_field("rad", "plane direction of the head line")
    tail_line_direction: FloatArray = unit_field("rad", "plane direction of the tail line")


@dataclasses.dataclass(frozen=True, repr=False)
class WaveConnection(ResultTable):
    """Where a wave sits in its pattern: its regions, family, branch and start point.

    ``start_source`` says where the start point came from: ``"given"``
    (``add_wave(..., start=...)``), ``"wall"`` or ``"free boundary"`` (the
    point where the wave that made the upstream region meets a placed wall
    or free boundary), ``"wave meeting"`` (where two placed waves meet and
    a slip line leaves), or ``""`` (not placed; ``start_x``, ``start_y``
    NaN).
    """

    upstream: str = unit_field("", "region upstream of the wave", dtype=str)
    downstream: str = unit_field("", "region downstream of the wave", dtype=str)
    family: str = unit_field("", "left or right", dtype=str)
    branch: str = unit_field("", "weak or strong (where the wave is a shock)", dtype=str)
    compression: str = unit_field("", "shock or isentropic", dtype=str)
    given_by: str = unit_field("", "turn, direction, pressure or unknown", dtype=str)
    start_x: FloatArray = unit_field("m", "start point, x (NaN where not placed)")
    start_y: FloatArray = unit_field("m", "start point, y (NaN where not placed)")
    start_source: str = unit_field("", "given, wall, free boundary, wave meeting or ''",
                                   dtype=str)


@dataclasses.dataclass(frozen=True, repr=False)
class PatternCondition(ResultTable):
    """A condition of the pattern: a wall, a free boundary or a slip line.

    ``direction`` is a wall's direction (NaN otherwise); ``pressure_ratio``
    the prescribed pressure of a free boundary over the inflow pressure (NaN
    otherwise); ``through_x``, ``through_y`` the point given with
    ``through=`` (NaN if none).
    """

    kind: str = unit_field("", "wall, free boundary or slip line", dtype=str)
    regions: tuple = unit_field("", "one region, or the two of a slip line")
    direction: FloatArray = unit_field("rad", "wall direction (NaN for other conditions)")
    pressure_ratio: FloatArray = unit_field("", "free-boundary pressure over the inflow's")
    through_x: FloatArray = unit_field("m", "a point of a placed wall or free boundary, x")
    through_y: FloatArray = unit_field("m", "a point of a placed wall or free boundary, y")


@dataclasses.dataclass(frozen=True, repr=False)
class MeetingPoint(ResultTable):
    """Where placed waves meet a wall, a free boundary or each other.

    ``kind`` is ``"wall"``, ``"free boundary"`` or ``"waves"``;
    ``incoming`` are the waves that end there, ``outgoing`` those that
    start there (a reflected wave; the two waves either side of a slip
    line); ``boundary_region`` is the region whose condition the wall or
    free boundary is ("" for waves meeting). ``x``, ``y`` are NaN in cases
    where the lines are parallel or not solved.
    """

    kind: str = unit_field("", "wall, free boundary or waves", dtype=str)
    incoming: tuple = unit_field("", "waves ending at the point")
    outgoing: tuple = unit_field("", "waves starting at the point")
    boundary_region: str = unit_field("", "region of the wall or free-boundary condition",
                                      dtype=str)
    x: FloatArray = unit_field("m", "meeting point, x")
    y: FloatArray = unit_field("m", "meeting point, y")


class MeetingPoints(tuple):
    """The meeting points of a solution: a tuple of :class:`MeetingPoint` shown as a table.

    One row per point (the first case of a batch), in text and HTML; ``to_dataframe()``
    gives one row per point and case.
    """

    __slots__ = ()

    def _table(self):
        rows = []
        for m in self:
            x, y = first_case(si_length(m.x)), first_case(si_length(m.y))
            rows.append((m.kind, ", ".join(m.incoming), ", ".join(m.outgoing),
                         m.boundary_region, f"{x:.6g}", f"{y:.6g}"))
        return ("kind", "incoming", "outgoing", "boundary region", "x [m]", "y [m]"), rows

    def __repr__(self) -> str:
        if not self:
            return "MeetingPoints: none (no wave placed with start= meets a placed line)"
        head, rows = self._table()
        return "MeetingPoints (first case):\n" + text_table(head, rows)

    def _repr_html_(self) -> str:
        head, rows = self._table()
        return html_table("meeting points (first case)", head, rows)

    def to_dataframe(self):
        """One row per meeting point and case: kind, incoming, outgoing, region, x, y [m]."""
        import pandas as pd

        frames = []
        for i, m in enumerate(self):
            x = np.atleast_1d(si_length(m.x)).reshape(-1)
            y = np.atleast_1d(si_length(m.y)).reshape(-1)
            frames.append(pd.DataFrame({
                "point": i, "case": np.arange(x.size), "kind": m.kind,
                "incoming": ", ".join(m.incoming), "outgoing": ", ".join(m.outgoing),
                "boundary_region": m.boundary_region, "x [m]": x, "y [m]": y}))
        if not frames:
            return pd.DataFrame(columns=["point", "case", "kind", "incoming", "outgoing",
                                         "boundary_region", "x [m]", "y [m]"])
        return pd.concat(frames, ignore_index=True)


# --------------------------------------------------------------------- small helpers


def magnitude(value):
    """Plain numbers of a result field (Quantity magnitude, DataArray/Series values)."""
    value = getattr(value, "magnitude", value)
    kind = type(value).__module__.split(".")[0]
    if kind in ("xarray", "pandas"):
        value = value.to_numpy() if kind == "pandas" else value.values
        value = getattr(value, "magnitude", value)
    return value


def si_length(value):
    """Metres from a length result (a Quantity in the caller's unit, or plain metres)."""
    if hasattr(value, "units") and hasattr(value, "to"):
        return value.to("meter").magnitude
    return magnitude(value)


def first_case(value):
    """The first case of a scalar or batch value, as a float."""
    array = np.asarray(value, dtype=float)
    return float(array.reshape(-1)[0]) if array.size else float("nan")


def text_table(head, rows, indent=""):
    widths = [max([len(h)] + [len(r[i]) for r in rows]) for i, h in enumerate(head)]
    lines = [indent + "  ".join(f"{h:<{w}}" if i == 0 else f"{h:>{w}}"
                                for i, (h, w) in enumerate(zip(head, widths)))]
    for r in rows:
        lines.append(indent + "  ".join(f"{c:<{w}}" if i == 0 or not _numeric(c) else
                                        f"{c:>{w}}" for i, (c, w) in enumerate(zip(r, widths))))
    return "\n".join(lines)


def _numeric(text):
    try:
        float(text)
    except ValueError:
        return False
    return True


def html_table(caption, head, rows):
    esc = html.escape
    body = "".join("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in r) + "</tr>" for r in rows)
    heads = "".join(f"<th>{esc(h)}</th>" for h in head)
    return (f"<table><caption>{esc(caption)}</caption><thead><tr>{heads}</tr></thead>"
            f"<tbody>{body}</tbody></table>")
