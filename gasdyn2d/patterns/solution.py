"""Solved wave patterns: region states, waves, per-case status, geometry and tables.

:class:`PatternSolution` is what :meth:`gasdyn2d.patterns.graph.WavePattern.solve`
returns: one :class:`RegionSolution` per region (ratios to the inflow) and one
:class:`WaveSolution` per wave (type, turn, angles, directions of its lines in
the plane), with the per-case status, a printable table, plain arrays for
plotting, full :class:`~gasdyn2d.FlowState` objects when the inflow was one,
and the meeting points of straight wave lines placed from their start points.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import _numerics as nx
from ..boundary.results import ResultTable, unit_field
from ..relations.flow_state import FlowState

__all__ = ["PatternSolution", "RegionSolution", "WaveSolution", "WaveConnection",
           "PatternCondition", "MeetingPoint", "region_name"]


@dataclasses.dataclass(frozen=True, repr=False)
class RegionSolution(ResultTable):
    """The uniform state of one region, relative to the inflow region.

    For a single case every field is a float; for a batch, an array of the
    batch shape.
    """

    M: object = unit_field("")  #: Mach number
    p_ratio: object = unit_field("")  #: static pressure over the inflow static pressure
    T_ratio: object = unit_field("")  #: static temperature over the inflow temperature
    p0_ratio: object = unit_field("")  #: stagnation pressure over the inflow's
    direction: object = unit_field("rad")  #: flow direction, counterclockwise from x


@dataclasses.dataclass(frozen=True, repr=False)
class WaveSolution(ResultTable):
    """One wave of a solved pattern.

    ``wave_angle`` is the shock angle from the upstream flow (NaN for a fan);
    ``head_mach_angle`` and ``tail_mach_angle`` are the Mach angles of the
    upstream and downstream flows (the fan's first and last Mach lines, also
    given for shocks as the limits a weak shock lies between);
    ``head_line_direction`` and ``tail_line_direction`` are the directions of
    the wave's lines in the plane (for a shock both are the shock line).
    """

    kind: object = unit_field("")  #: "shock" or "fan" per case
    family: str = unit_field("")  #: "left" or "right"
    turn: object = unit_field("rad")  #: signed change of flow direction across the wave
    p_ratio: object = unit_field("")  #: downstream over upstream static pressure
    wave_angle: object = unit_field("rad")  #: shock angle from the upstream flow (NaN for fans)
    head_mach_angle: object = unit_field("rad")  #: Mach angle of the upstream flow
    tail_mach_angle: object = unit_field("rad")  #: Mach angle of the downstream flow
    head_line_direction: object = unit_field("rad")  #: plane direction of the shock or fan head
    tail_line_direction: object = unit_field("rad")  #: plane direction of the shock or fan tail


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

    upstream: str = unit_field("")  #: region upstream of the wave
    downstream: str = unit_field("")  #: region downstream of the wave
    family: str = unit_field("")  #: "left" or "right"
    branch: str = unit_field("")  #: "weak" or "strong" (used where the wave is a shock)
    given_by: str = unit_field("")  #: "turn", "direction", "pressure" or "unknown"
    start_x: object = unit_field("m")  #: start point, x (NaN where not placed)
    start_y: object = unit_field("m")  #: start point, y (NaN where not placed)
    start_source: str = unit_field("")  #: "given", "wall", "free boundary", "wave meeting" or ""


@dataclasses.dataclass(frozen=True, repr=False)
class PatternCondition(ResultTable):
    """A condition of the pattern: a wall, a free boundary or a slip line.

    ``value`` is the wall direction [rad] of a wall, the prescribed pressure
    (ratio to the inflow pressure) of a free boundary, NaN for a slip line.
    ``through_x``, ``through_y`` are the point given with ``through=`` (NaN
    if none).
    """

    kind: str = unit_field("")  #: "wall", "free boundary" or "slip line"
    regions: tuple = unit_field("")  #: one region, or the two regions of a slip line
    value: object = unit_field("")  #: wall direction [rad] or pressure ratio (NaN for a slip line)
    through_x: object = unit_field("m")  #: a point of a placed wall or free boundary (else NaN)
    through_y: object = unit_field("m")


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

    kind: str = unit_field("")  #: "wall", "free boundary" or "waves"
    incoming: tuple = unit_field("")  #: waves ending at the point
    outgoing: tuple = unit_field("")  #: waves starting at the point
    boundary_region: str = unit_field("")  #: region of the wall or free-boundary condition
    x: object = unit_field("m")
    y: object = unit_field("m")


class PatternSolution:
    """The solved wave pattern: region states, waves, and per-case status.

    Attributes
    ----------
    ok : bool or ndarray
        True where the case was solved.
    failure : str or ndarray of str
        Empty where solved; otherwise which wave detached, which pressure
        could not be reached, or that the iteration did not converge.
    iterations : int
        Newton iterations used (the largest over the batch).
    gamma : float or ndarray
        Ratio of specific heats of the gas, per case.

    Notes
    -----
    Geometry: a wave given a ``start`` point is placed as a straight line
    (a fan as its head and tail rays) through it, in the direction of
    :attr:`WaveSolution.head_line_direction`. Starts the pattern implies are
    added: where the wave that made a region's upstream region meets a wall
    or free boundary given with ``through=``, the wave leaving towards that
    condition starts (a reflection point); where exactly two placed waves
    lead from a common region to the two sides of a slip line (two shocks
    crossing or merging), both waves leaving towards the slip line start at
    their crossing point. A fan meets a boundary with its head ray. The
    triple point of a Mach reflection is not placed: its height depends on
    the flow downstream. :attr:`meeting_points` lists every point so found.
    """

    def __init__(self, *, inflow_name, inflow_state, links, conditions, regions, waves, ok,
                 failure, iterations, shape, gamma):
        put = object.__setattr__
        put(self, "_inflow_name", inflow_name)
        put(self, "_inflow_state", inflow_state)
        put(self, "_regions", dict(regions))
        put(self, "_waves", dict(waves))
        put(self, "_shape", shape)
        put(self, "ok", _read_only(ok.reshape(shape)) if shape else bool(ok.reshape(())))
        failure = failure.reshape(shape)
        put(self, "failure", str(failure) if not shape else _read_only(failure))
        put(self, "iterations", int(iterations))
        put(self, "gamma", gamma if type(gamma) is float else _read_only(gamma))
        put(self, "_links", {w.name: w for w in links})
        put(self, "_conditions", tuple(_condition_record(c) for c in conditions))
        starts, sources, meetings = _place_waves(self, conditions)
        put(self, "_starts", starts)
        put(self, "_sources", sources)
        put(self, "_meetings", meetings)

    def __setattr__(self, name, value):
        raise AttributeError(f"a PatternSolution is a snapshot of one solve and cannot be "
                             f"changed (tried to set {name!r}); solve the pattern again.")

    __delattr__ = __setattr__

    # -- how the pattern is connected
    @property
    def inflow_name(self) -> str:
        """Name of the inflow region."""
        return self._inflow_name

    @property
    def inflow_state(self):
        """The inflow :class:`~gasdyn2d.FlowState`, or None if the inflow was a Mach number."""
        return self._inflow_state

    def connection(self, name) -> WaveConnection:
        """Regions, family, branch, specification and start point of wave ``name``."""
        name = region_name(name, "name")
        w = self._links.get(name)
        if w is None:
            raise nx.InvalidInputError(
                f"no wave named {name!r}; the waves are {self.wave_names}.")
        x, y = self._starts.get(name, (np.nan, np.nan))
        return WaveConnection(w.upstream, w.downstream, "left" if w.sign > 0 else "right",
                              "strong" if w.strong else "weak", w.spec,
                              nx.scalar_or_array(x), nx.scalar_or_array(y),
                              self._sources.get(name, ""))

    def wave_start(self, name):
        """Start point ``(x, y)`` [m] of wave ``name`` (given or implied), or None."""
        name = region_name(name, "name")
        self.connection(name)  # checks the name
        point = self._starts.get(name)
        return None if point is None else tuple(nx.scalar_or_array(v) for v in point)

    @property
    def conditions(self) -> tuple:
        """The pattern's conditions, as :class:`PatternCondition` records, in the order added."""
        return self._conditions

    @property
    def slip_lines(self) -> list:
        """The region pairs ``(a, b)`` joined by slip lines."""
        return [c.regions for c in self._conditions if c.kind == "slip line"]

    @property
    def meeting_points(self) -> tuple:
        """Where placed waves meet walls, free boundaries and each other (:class:`MeetingPoint`)."""
        return self._meetings

    def made_by(self, region):
        """Name of the wave whose downstream region is ``region`` (None for the inflow)."""
        region = region_name(region, "region")
        self.region(region)  # checks the name
        return next((n for n, w in self._links.items() if w.downstream == region), None)

    def region_label_point(self, name):
        """A point [m] inside region ``name`` for its label, or None where geometry is missing.

        For a region made by a placed wave whose end is a meeting point: a
        quarter of the wave's length downstream of its middle, along the
        region's flow. For the inflow region: that far upstream of the middle
        of the first placed wave leaving it. The first case of a batch.
        """
        name = region_name(name, "name")
        maker = self.made_by(name)
        if maker is None:
            placed = [n for n in self._links if n in self._starts
                      and self._links[n].upstream == name]
            if not placed:
                return None
            segment = self._placed_segment(placed[0])
            if segment is None:
                return None
            (x0, y0), (x1, y1) = segment
            scale = -0.25 * np.hypot(x1 - x0, y1 - y0)
            mid = (0.5 * (x0 + x1), 0.5 * (y0 + y1))
        else:
            segment = self._placed_segment(maker)
            if segment is None:
                return None
            (x0, y0), (x1, y1) = segment
            scale = 0.25 * np.hypot(x1 - x0, y1 - y0)
            mid = (0.5 * (x0 + x1), 0.5 * (y0 + y1))
        d = _first(_radians(self.region(name).direction))
        point = (mid[0] + scale * np.cos(d), mid[1] + scale * np.sin(d))
        return None if not np.all(np.isfinite(point)) else tuple(float(v) for v in point)

    def _placed_segment(self, name):
        """(start, end) of a placed wave that ends at a meeting point, first case; or None."""
        if name not in self._starts:
            return None
        end = next((m for m in self._meetings if name in m.incoming), None)
        if end is None:
            return None
        start = tuple(_first(v) for v in self._starts[name])
        return start, (_first(end.x), _first(end.y))

    @property
    def region_names(self):
        """Names of the regions, inflow first, in solution order."""
        return list(self._regions)

    @property
    def wave_names(self):
        """Names of the waves in solution order."""
        return list(self._waves)

    def region(self, name) -> RegionSolution:
        """The state of region ``name`` (ratios to the inflow region)."""
        name = region_name(name, "name")
        try:
            return self._regions[name]
        except KeyError:
            raise nx.InvalidInputError(
                f"no region named {name!r}; the regions are {self.region_names}.") from None

    def wave(self, name) -> WaveSolution:
        """The solved wave ``name``."""
        name = region_name(name, "name")
        try:
            return self._waves[name]
        except KeyError:
            raise nx.InvalidInputError(
                f"no wave named {name!r}; the waves are {self.wave_names}.") from None

    def state(self, name) -> FlowState:
        """The full :class:`~gasdyn2d.FlowState` of region ``name``.

        Needs the pattern's inflow to have been a ``FlowState`` (which fixes
        pressure, temperature and the gas).
        """
        inflow = self._inflow_state
        if inflow is None:
            raise nx.InvalidInputError(
                "state() needs absolute inflow conditions: build the WavePattern from a "
                "FlowState, or use region(name) for ratios to the inflow.")
        r = self.region(name)
        direction = r.direction
        return FlowState(r.M, inflow.p * r.p_ratio, inflow.T * r.T_ratio, direction,
                         inflow.gas)

    def meeting_point(self, first, second, *, first_ray="head", second_ray="head"):
        """Where two straight wave lines meet, for waves placed with ``start``.

        Parameters
        ----------
        first, second : str or tuple
            A wave name (the wave must have a ``start`` point) or a line given
            as ``((x, y), direction)`` [m, rad], e.g. a wall.
        first_ray, second_ray : {"head", "tail"}
            Which line of a fan to use (a shock has one line).

        Returns
        -------
        (x, y) : tuple of float or ndarray [m]
            NaN where the lines are parallel.
        """
        (x1, y1), a1 = self._line(first, first_ray)
        (x2, y2), a2 = self._line(second, second_ray)
        c1, s1, c2, s2 = np.cos(a1), np.sin(a1), np.cos(a2), np.sin(a2)
        with np.errstate(divide="ignore", invalid="ignore"):
            den = c1 * s2 - s1 * c2
            t = ((x2 - x1) * s2 - (y2 - y1) * c2) / den
            t = np.where(np.abs(den) < 1e-14, np.nan, t)
        return nx.scalar_or_array(x1 + t * c1), nx.scalar_or_array(y1 + t * s1)

    def wave_segment(self, name, *, until=None, length=1.0, ray="head"):
        """End points of a placed wave line, for drawing.

        Parameters
        ----------
        name : str
            A wave added with ``start=(x, y)``.
        until : str or tuple, optional
            End the line where it meets this wave or line ``((x, y), direction)``
            (see :meth:`meeting_point`); otherwise it is ``length`` long.
        length : float, optional
            Length [m] of the line when ``until`` is not given.
        ray : {"head", "tail"}
            Which ray of a fan.

        Returns
        -------
        (x, y) : tuple of ndarray [m]
            Start and end coordinates, shape ``(2,) + batch shape``.
        """
        (x0, y0), direction = self._line(name, ray)
        if until is None:
            x1, y1 = x0 + length * np.cos(direction), y0 + length * np.sin(direction)
        else:
            x1, y1 = self.meeting_point(name, until, first_ray=ray)
        x0, y0, x1, y1 = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                               for v in (x0, y0, x1, y1)))
        return np.stack([x0, x1]), np.stack([y0, y1])

    def _line(self, item, ray):
        if isinstance(item, (str, int)) and not isinstance(item, bool):
            item = region_name(item, "wave")
            self.connection(item)  # checks the name
            start = self._starts.get(item)
            if start is None:
                raise nx.InvalidInputError(
                    f"wave {item!r} has no start point; give add_wave(..., start=(x, y)).")
            w = self.wave(item)
            return start, _radians(w.head_line_direction if ray == "head"
                                   else w.tail_line_direction)
        point, direction = item
        return point, nx.to_si(direction, "direction", "angle")[0]

    def arrays(self) -> dict:
        """Plain arrays for plotting and export (angles in radians).

        Keys are ``"region/<name>/<field>"`` and ``"wave/<name>/<field>"``
        (e.g. ``"region/3/M"``, ``"wave/reflected/head_line_direction"``).
        """
        out = {}
        for prefix, items in (("region", self._regions), ("wave", self._waves)):
            for name, result in items.items():
                for key, value in result.to_dict().items():
                    out[f"{prefix}/{name}/{key}"] = _radians(value)
        return out

    def __repr__(self) -> str:
        first = (0,) * len(self._shape)
        pick = (lambda v: np.asarray(_radians(v))[first] if np.ndim(_radians(v)) else
                _radians(v))
        n_cases = int(np.prod(self._shape)) if self._shape else 1
        n_ok = int(np.count_nonzero(self.ok)) if self._shape else int(self.ok)
        head = f"PatternSolution: {n_ok} of {n_cases} case(s) solved"
        if n_cases == 0:
            return (f"PatternSolution: an empty batch of shape {self._shape}; regions "
                    f"{self.region_names}, waves {self.wave_names}")
        if self._shape:
            head += "; values of the first case"
        width = max(len(name) for name in [*self._regions, *self._waves, "region"])
        lines = [head, f"  {'region':<{width}}        M    p/p_in   T/T_in  p0/p0_in"
                       "  direction [deg]"]
        for name, r in self._regions.items():
            lines.append(f"  {name:<{width}} {pick(r.M):8.5f} {pick(r.p_ratio):9.5f} "
                         f"{pick(r.T_ratio):8.5f} {pick(r.p0_ratio):9.6f} "
                         f"{_degrees(pick(r.direction)):10.4f}")
        lines.append(f"  {'wave':<{width}} family kind   turn [deg]  wave angle [deg]  p ratio")
        for name, w in self._waves.items():
            lines.append(f"  {name:<{width}} {w.family:<6} {str(pick(w.kind)):<6} "
                         f"{_degrees(pick(w.turn)):10.4f} {_degrees(pick(w.wave_angle)):17.4f}"
                         f" {pick(w.p_ratio):8.5f}")
        failures = np.atleast_1d(self.failure)
        bad = [f for f in failures.reshape(-1) if f]
        if bad:
            lines.append(f"  {len(bad)} failure(s); first: {bad[0]}")
        return "\n".join(lines)


def region_name(value, argument: str) -> str:
    """The one rule for region and wave names: text, or an integer taken as its decimal text
    (so that ``region=2`` and ``region("2")`` name the same region); anything else is refused."""
    if isinstance(value, str):
        return value
    if isinstance(value, (int, np.integer)) and not isinstance(value, (bool, np.bool_)):
        return str(int(value))
    raise nx.InvalidInputError(f"{argument} must be a name (a string, or an integer taken as "
                               f"its text); got {value!r} of type {type(value).__name__}.")


def _read_only(array):
    """A read-only copy of ``array`` (a snapshot no caller can change)."""
    array = np.array(array, copy=True)
    array.flags.writeable = False
    return array


def _condition_record(c):
    x, y = c.through if c.through is not None else (np.nan, np.nan)
    value = np.nan if c.value is None else nx.scalar_or_array(np.asarray(c.value, float))
    return PatternCondition(c.kind, tuple(c.regions), value, nx.scalar_or_array(x),
                            nx.scalar_or_array(y))


def _intersect(p1, a1, p2, a2):
    """Crossing point of the lines (p1, direction a1) and (p2, a2) [m, rad]; NaN if parallel."""
    (x1, y1), (x2, y2) = p1, p2
    c1, s1, c2, s2 = np.cos(a1), np.sin(a1), np.cos(a2), np.sin(a2)
    with np.errstate(divide="ignore", invalid="ignore"):
        den = c1 * s2 - s1 * c2
        t = ((x2 - x1) * s2 - (y2 - y1) * c2) / den
        t = np.where(np.abs(den) < 1e-14, np.nan, t)
    return x1 + t * c1, y1 + t * s1


def _chain(region, made_by):
    """Waves and regions from ``region`` back to the inflow: ([wave, ...], [region, ...])."""
    waves, regions = [], [region]
    while region in made_by:
        w = made_by[region]
        waves.append(w)
        region = w.upstream
        regions.append(region)
    return waves, regions


def _place_waves(solution, conditions):
    """Given and implied start points, their sources, and the meeting points."""
    links = solution._links
    made_by = {w.downstream: w for w in links.values()}
    starts = {n: w.start for n, w in links.items() if w.start is not None}
    sources = {n: "given" for n in starts}
    meetings, seen = [], set()

    def head(name):
        return _radians(solution.wave(name).head_line_direction)

    def meet(kind, incoming, outgoing, region, point):
        key = (kind, incoming, region)
        if key in seen:
            return
        seen.add(key)
        x, y = (nx.scalar_or_array(np.asarray(v, float)) for v in point)
        meetings.append(MeetingPoint(kind, incoming, outgoing, region, x, y))
        for name in outgoing:
            if name not in starts:
                starts[name] = point
                sources[name] = "wave meeting" if kind == "waves" else kind

    for w in links.values():
        parent = made_by.get(w.upstream)
        for c in conditions:
            if (c.kind == "slip line" or c.through is None or c.regions[0] != w.downstream
                    or parent is None or parent.name not in starts):
                continue
            line = c.value if c.kind == "wall" else _radians(
                solution.region(parent.upstream).direction)
            point = _intersect(starts[parent.name], head(parent.name), c.through, line)
            meet(c.kind, (parent.name,), (w.name,), c.regions[0], point)
        for c in conditions:
            if c.kind != "slip line" or w.downstream not in c.regions:
                continue
            a, b = c.regions
            if a not in made_by or b not in made_by:
                continue
            (wa, *in_a), regions_a = _chain(a, made_by)
            (wb, *in_b), regions_b = _chain(b, made_by)
            common = next(r for r in regions_a if r in regions_b)
            in_a = in_a[:regions_a.index(common) - 1]
            in_b = in_b[:regions_b.index(common) - 1]
            incoming = [v.name for v in in_a + in_b]
            if len(incoming) != 2 or not all(n in starts for n in incoming):
                continue
            point = _intersect(starts[incoming[0]], head(incoming[0]),
                               starts[incoming[1]], head(incoming[1]))
            meet("waves", tuple(incoming), (wa.name, wb.name), "", point)
    return starts, sources, tuple(meetings)


def _first(value):
    """The first case of a scalar or batch value, as a float."""
    array = np.asarray(value, dtype=float)
    return float(array.reshape(-1)[0]) if array.size else float("nan")


def _radians(value):
    """Plain radians from an angle Quantity; anything else unchanged."""
    return value.m_as("radian") if nx.is_quantity(value) else value


def _degrees(angle):
    """Degrees for the table, without a '-0.0000' for rounding-level negatives."""
    return float(np.round(np.degrees(angle), 9)) + 0.0
