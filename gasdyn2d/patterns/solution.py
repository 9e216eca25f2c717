"""Solved wave patterns: region states, waves, per-case status, geometry and tables.

:class:`PatternSolution` is what :meth:`gasdyn2d.patterns.graph.WavePattern.solve`
returns: one :class:`RegionSolution` per region (ratios to the inflow) and one
:class:`WaveSolution` per wave (kind, turn, angles, directions of its lines in
the plane), with the per-case status, printable and HTML tables, a pandas
DataFrame and an xarray Dataset of every field, full
:class:`~gasdyn2d.FlowState` objects when the inflow was one, and the meeting
points of straight wave lines placed from their start points.

A solution is a snapshot of one solve: it keeps copies of everything it needs,
refuses attribute assignment, and its arrays are read-only and share no memory
with each other, with the pattern or with the caller's inputs.
"""

from __future__ import annotations

import dataclasses
import html
import math
from types import MappingProxyType

import numpy as np

from ..boundary import Call, ResultTable, result_fields, unit_field
from ..boundary.results import FieldInfo, pint_unit
from ..boundary.types import FloatArray
from ..errors import InvalidInputError
from ..relations.flow_state import FlowState
from ..relations.isentropic import mach_angle_of

__all__ = ["PatternSolution", "RegionSolution", "WaveSolution", "WaveConnection",
           "PatternCondition", "MeetingPoint", "MeetingPoints", "region_name"]


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
            x, y = _first(_si_length(m.x)), _first(_si_length(m.y))
            rows.append((m.kind, ", ".join(m.incoming), ", ".join(m.outgoing),
                         m.boundary_region, f"{x:.6g}", f"{y:.6g}"))
        return ("kind", "incoming", "outgoing", "boundary region", "x [m]", "y [m]"), rows

    def __repr__(self) -> str:
        if not self:
            return "MeetingPoints: none (no wave placed with start= meets a placed line)"
        head, rows = self._table()
        return "MeetingPoints (first case):\n" + _text_table(head, rows)

    def _repr_html_(self) -> str:
        head, rows = self._table()
        return _html_table("meeting points (first case)", head, rows)

    def to_dataframe(self):
        """One row per meeting point and case: kind, incoming, outgoing, region, x, y [m]."""
        import pandas as pd

        frames = []
        for i, m in enumerate(self):
            x = np.atleast_1d(_si_length(m.x)).reshape(-1)
            y = np.atleast_1d(_si_length(m.y)).reshape(-1)
            frames.append(pd.DataFrame({
                "point": i, "case": np.arange(x.size), "kind": m.kind,
                "incoming": ", ".join(m.incoming), "outgoing": ", ".join(m.outgoing),
                "boundary_region": m.boundary_region, "x [m]": x, "y [m]": y}))
        if not frames:
            return pd.DataFrame(columns=["point", "case", "kind", "incoming", "outgoing",
                                         "boundary_region", "x [m]", "y [m]"])
        return pd.concat(frames, ignore_index=True)


# --------------------------------------------------------------------- the solution


class PatternSolution:
    """The solved wave pattern: region states, waves, and per-case status.

    Attributes
    ----------
    ok : bool or ndarray
        True where the case was solved (False where it failed or had a NaN input).
    failure : str or ndarray of str
        Empty where solved or where an input was NaN; otherwise the reason: an
        invalid input (under ``errors="nan"``), which wave detached, which
        pressure could not be reached, or that the iteration did not converge.
    iterations : int
        Newton iterations used (the largest over the batch).
    gamma : float or ndarray
        Ratio of specific heats of the gas, per case.

    Notes
    -----
    A snapshot: the solution keeps copies of the pattern's structure and of the
    values it was solved for, so adding waves to the pattern or solving it again
    does not change it; its attributes cannot be reassigned, and its arrays are
    read-only and share no memory (with each other, the pattern or the inputs).

    Values come back in the containers and units the pattern was given: angles
    in the unit of the first angle given as a Quantity, lengths in that of the
    first length; DataArray dimensions and coordinates and Series indexes are
    kept. :meth:`arrays`, :meth:`wave_segment` and :meth:`region_label_point`
    are plain SI (radians, metres) for drawing.

    Geometry: a wave given a ``start`` point is placed as a straight line
    (a simple wave as its head and tail rays) through it, in the direction of
    :attr:`WaveSolution.head_line_direction`. Starts the pattern implies are
    added: where the wave that made a region's upstream region meets a wall
    or free boundary given with ``through=``, the wave leaving towards that
    condition starts (a reflection point); where exactly two placed waves
    lead from a common region to the two sides of a slip line (two shocks
    crossing or merging), both waves leaving towards the slip line start at
    their crossing point. A fan meets a boundary with its head ray. The
    triple point of a Mach reflection is not placed: its height depends on the
    flow downstream. :attr:`meeting_points` lists every point so found.
    """

    __slots__ = ("_plan", "_call", "_shape", "_regions", "_waves", "_connections",
                 "_conditions", "_meetings", "_si", "_starts", "_inflow_state",
                 "_inflow_si", "ok", "failure", "iterations", "gamma")

    @classmethod
    def from_solver(cls, raw, plan, call: Call, shape, *, case, points, inflow_state=None,
                    inflow_si=None):
        """The solution of a :class:`~gasdyn2d.patterns.solver.RawSolution`.

        ``call`` is the :class:`~gasdyn2d.boundary.Call` that took the pattern's
        values for this solve (it packages the results in the caller's units and
        labels; the solution owns it); ``case`` the solver's case values (SI,
        pressures as ratios); ``points`` the SI coordinates of the given start and
        through points, by key (``"start:<wave>:x"``, ...).
        """
        self = object.__new__(cls)
        put = object.__setattr__
        ok = np.asarray(raw.ok, dtype=bool).reshape(shape)
        si = _si_fields(raw, plan, ok, shape, case)
        put(self, "_plan", plan)
        put(self, "_call", call)
        put(self, "_shape", shape)
        put(self, "_si", si)
        put(self, "_inflow_state", inflow_state)
        put(self, "_inflow_si", MappingProxyType(dict(inflow_si or {})))
        pack = _Packer(call, shape)
        regions = {}
        for name in si["regions"]:
            values = si["regions"][name]
            regions[name] = RegionSolution.from_fields(pack(RegionSolution, values))
        waves = {}
        for link in plan.order:
            values = si["waves"][link.name]
            fields = pack(WaveSolution, values, skip=("family",))
            fields.insert(1, link.family)
            waves[link.name] = WaveSolution.from_fields(fields)
        put(self, "_regions", MappingProxyType(regions))
        put(self, "_waves", MappingProxyType(waves))
        put(self, "ok", pack.one("ok", ok, "", bool))
        put(self, "failure", pack.one("failure", np.asarray(raw.failure).reshape(shape), "",
                                      str))
        put(self, "iterations", int(raw.iterations))
        put(self, "gamma", pack.one("gamma", si["gamma"], ""))
        starts, sources, meetings = _place_waves(plan, si, points, shape)
        put(self, "_starts", MappingProxyType(starts))
        connections = {}
        for link in plan.order:
            x, y = starts.get(link.name, (np.nan, np.nan))
            fields = pack.many((("start_x", "m"), ("start_y", "m")), (x, y))
            connections[link.name] = WaveConnection(
                link.upstream, link.downstream, link.family, link.branch, link.compression,
                link.given, *fields, sources.get(link.name, ""))
        put(self, "_connections", MappingProxyType(connections))
        conditions = []
        for i, c in enumerate(plan.conditions):
            nan = np.full(shape, np.nan) if shape else np.nan
            value = si["conditions"][i]
            direction = value if c.kind == "wall" else nan
            pressure = value if c.kind == "free boundary" else nan
            tx = points.get(f"through:{i}:x", np.nan)
            ty = points.get(f"through:{i}:y", np.nan)
            fields = pack.many((("direction", "rad"), ("pressure_ratio", ""),
                                ("through_x", "m"), ("through_y", "m")),
                               (direction, pressure, _shaped(tx, shape), _shaped(ty, shape)))
            conditions.append(PatternCondition(c.kind, tuple(c.regions), *fields))
        put(self, "_conditions", tuple(conditions))
        put(self, "_meetings", MeetingPoints(
            MeetingPoint(kind, incoming, outgoing, region,
                         *pack.many((("x", "m"), ("y", "m")), (x, y)))
            for kind, incoming, outgoing, region, x, y in meetings))
        return self

    def __setattr__(self, name, value):
        raise AttributeError(f"a PatternSolution is a snapshot of one solve and cannot be "
                             f"changed (tried to set {name!r}); solve the pattern again.")

    __delattr__ = __setattr__

    # -- how the pattern is connected
    @property
    def inflow_name(self) -> str:
        """Name of the inflow region."""
        return self._plan.inflow

    @property
    def inflow_state(self):
        """The inflow :class:`~gasdyn2d.FlowState`, or None if the inflow was a Mach number."""
        return self._inflow_state

    @property
    def shape(self) -> tuple:
        """The case shape (``()`` for a single case)."""
        return self._shape

    def connection(self, name) -> WaveConnection:
        """Regions, family, branch, compression, specification and start point of wave ``name``."""
        name = region_name(name, "name")
        found = self._connections.get(name)
        if found is None:
            raise InvalidInputError(f"no wave named {name!r}; the waves are {self.wave_names}.")
        return found

    def wave_start(self, name):
        """Start point ``(x, y)`` of wave ``name`` (given or implied), or None."""
        link = self.connection(name)
        if link.start_source == "":
            return None
        return link.start_x, link.start_y

    @property
    def conditions(self) -> tuple:
        """The pattern's conditions, as :class:`PatternCondition` records, in the order added."""
        return self._conditions

    @property
    def slip_lines(self) -> list:
        """The region pairs ``(a, b)`` joined by slip lines."""
        return [c.regions for c in self._conditions if c.kind == "slip line"]

    @property
    def meeting_points(self) -> MeetingPoints:
        """Where placed waves meet walls, free boundaries and each other (a table of
        :class:`MeetingPoint`)."""
        return self._meetings

    def made_by(self, region):
        """Name of the wave whose downstream region is ``region`` (None for the inflow)."""
        region = region_name(region, "region")
        self.region(region)  # checks the name
        return next((w.name for w in self._plan.order if w.downstream == region), None)

    @property
    def region_names(self) -> list:
        """Names of the regions, inflow first, in solution order."""
        return list(self._regions)

    @property
    def wave_names(self) -> list:
        """Names of the waves in solution order."""
        return list(self._waves)

    def region(self, name) -> RegionSolution:
        """The state of region ``name`` (ratios to the inflow region)."""
        name = region_name(name, "name")
        found = self._regions.get(name)
        if found is None:
            raise InvalidInputError(
                f"no region named {name!r}; the regions are {self.region_names}.")
        return found

    def wave(self, name) -> WaveSolution:
        """The solved wave ``name``."""
        name = region_name(name, "name")
        found = self._waves.get(name)
        if found is None:
            raise InvalidInputError(f"no wave named {name!r}; the waves are {self.wave_names}.")
        return found

    def state(self, name) -> FlowState:
        """The full :class:`~gasdyn2d.FlowState` of region ``name``.

        Needs the pattern's inflow to have been a ``FlowState`` (which fixes
        pressure, temperature and the gas). Pressure and temperature come back
        in the inflow's units (offset temperature units included).
        """
        if self._inflow_state is None:
            raise InvalidInputError(
                "state() needs absolute inflow conditions: build the WavePattern from a "
                "FlowState, or use region(name) for ratios to the inflow.")
        name = region_name(name, "name")
        self.region(name)  # checks the name
        r = self._si["regions"][name]
        pack = _Packer(self._call, self._shape)
        p = np.reshape(self._inflow_si["p_in"], self._shape) * r[1]
        T = np.reshape(self._inflow_si["T_in"], self._shape) * r[2]
        M, p, T, d = pack.many((("M", ""), ("p", "Pa"), ("T", "K"), ("direction", "rad")),
                               (r[0], p, T, r[4]))
        return FlowState(M, p, T, d, self._inflow_state.gas)

    def meeting_point(self, first, second, *, first_ray="head", second_ray="head"):
        """Where two straight wave lines meet, for waves placed with ``start``.

        Parameters
        ----------
        first, second : str or tuple
            A wave name (the wave must have a start point) or a line given
            as ``((x, y), direction)`` [m, rad], e.g. a wall.
        first_ray, second_ray : {"head", "tail"}
            Which line of a simple wave to use (a shock has one line).

        Returns
        -------
        (x, y)
            In the pattern's length unit (plain metres if none was a Quantity);
            NaN where the lines are parallel.
        """
        p1, a1 = self._line(first, first_ray)
        p2, a2 = self._line(second, second_ray)
        x, y = _intersect(p1, a1, p2, a2)
        return tuple(_Packer(self._call, self._shape).many((("x", "m"), ("y", "m")), (
            _shaped(x, self._shape), _shaped(y, self._shape))))

    def wave_segment(self, name, *, until=None, length=1.0, ray="head"):
        """End points of a placed wave line, for drawing (plain metres).

        Parameters
        ----------
        name : str
            A wave with a start point (given or implied).
        until : str or tuple, optional
            End the line where it meets this wave or line ``((x, y), direction)``
            (see :meth:`meeting_point`); otherwise it is ``length`` long.
        length : float, optional
            Length [m] of the line when ``until`` is not given.
        ray : {"head", "tail"}
            Which ray of a simple wave.

        Returns
        -------
        (x, y) : tuple of ndarray [m]
            Start and end coordinates, shape ``(2,) + batch shape``.
        """
        (x0, y0), direction = self._line(name, ray)
        if until is None:
            x1, y1 = x0 + length * np.cos(direction), y0 + length * np.sin(direction)
        else:
            other, other_ray = self._line(until, "head")
            x1, y1 = _intersect((x0, y0), direction, other, other_ray)
        x0, y0, x1, y1 = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                               for v in (x0, y0, x1, y1)))
        return np.stack([x0, x1]), np.stack([y0, y1])

    def _line(self, item, ray):
        """((x, y), direction) in SI of a wave name or a given line."""
        if isinstance(item, (str, int, np.integer)) and not isinstance(item, bool):
            name = region_name(item, "wave")
            self.connection(name)  # checks the name
            start = self._starts.get(name)
            if start is None:
                raise InvalidInputError(
                    f"wave {name!r} has no start point; give add_wave(..., start=(x, y)).")
            wave = self._si["waves"][name]
            return start, wave[6] if ray == "head" else wave[7]
        try:
            (x, y), direction = item
        except (TypeError, ValueError):
            raise InvalidInputError(f"a line must be a wave name or ((x, y), direction); "
                                    f"got {item!r}.") from None
        call = Call()
        call.take("x", x, "m")
        call.take("y", y, "m")
        call.take("direction", direction, "rad")
        x, y, direction = call.prepare()
        return (x, y), direction

    def region_label_point(self, name):
        """A point [m] inside region ``name`` for its label, or None where geometry is missing.

        For a region made by a placed wave whose end is a meeting point: a
        quarter of the wave's length downstream of its middle, along the
        region's flow. For the inflow region: that far upstream of the middle
        of the first placed wave leaving it. The first case of a batch; plain
        floats.
        """
        name = region_name(name, "name")
        maker = self.made_by(name)
        if maker is None:
            placed = [w.name for w in self._plan.order
                      if w.name in self._starts and w.upstream == name]
            segment = self._placed_segment(placed[0]) if placed else None
            sign = -1.0
        else:
            segment = self._placed_segment(maker)
            sign = 1.0
        if segment is None:
            return None
        (x0, y0), (x1, y1) = segment
        scale = sign * 0.25 * np.hypot(x1 - x0, y1 - y0)
        d = _first(self._si["regions"][name][4])
        point = (0.5 * (x0 + x1) + scale * np.cos(d), 0.5 * (y0 + y1) + scale * np.sin(d))
        return None if not np.all(np.isfinite(point)) else tuple(float(v) for v in point)

    def _placed_segment(self, name):
        """(start, end) of a placed wave that ends at a meeting point, first case; or None."""
        if name not in self._starts:
            return None
        end = next((m for m in self._meetings if name in m.incoming), None)
        if end is None:
            return None
        start = tuple(_first(v) for v in self._starts[name])
        return start, (_first(_si_length(end.x)), _first(_si_length(end.y)))

    # -- tables
    def arrays(self) -> dict:
        """Plain arrays for plotting and export (angles in radians, SI).

        Keys are ``"region/<name>/<field>"`` and ``"wave/<name>/<field>"``
        (e.g. ``"region/3/M"``, ``"wave/reflected/head_line_direction"``).
        """
        out = {}
        for kind, result_type, items in (("region", RegionSolution, self._si["regions"]),
                                         ("wave", WaveSolution, self._si["waves"])):
            names = [f.name for f in result_fields(result_type) if f.name != "family"]
            for name, values in items.items():
                for key, value in zip(names, values):
                    out[f"{kind}/{name}/{key}"] = _plain(value)
                if kind == "wave":
                    out[f"wave/{name}/family"] = self._waves[name].family
        return out

    def _columns(self):
        """(column name, flat values) for every case field, units in the names."""
        columns = [("ok", _flat(self.ok)), ("failure", _flat(self.failure)),
                   ("gamma", _flat(self.gamma))]
        for kind, items in (("region", self._regions), ("wave", self._waves)):
            for name, result in items.items():
                for field in result_fields(type(result)):
                    if field.name == "family":
                        continue
                    value = getattr(result, field.name)
                    unit = _unit_label(value, field.unit)
                    label = f"{kind}/{name}/{field.name}" + (f" [{unit}]" if unit else "")
                    columns.append((label, _flat(value)))
        return columns

    def to_dataframe(self):
        """One row per case, one column per region and wave field (and ``ok``, ``failure``,
        ``gamma``), named ``"region/<name>/<field> [unit]"`` and ``"wave/<name>/<field>"``.

        The index is the inputs' (a Series index, or the DataArray dimensions as a
        MultiIndex) where they had one. Needs pandas.
        """
        import pandas as pd

        return pd.DataFrame(dict(self._columns()), index=self._index())

    def _index(self):
        first = self._regions[self._plan.inflow].M
        kind = type(first).__module__.split(".")[0]
        if kind == "pandas":
            return first.index
        if kind == "xarray" and first.ndim:
            return first.to_series().index
        return None

    def to_xarray(self):
        """An ``xarray.Dataset``: region fields over (case dims, ``region``), wave fields
        (prefixed ``wave_``) over (case dims, ``wave``), and ``ok``, ``failure``, ``gamma``.

        Case dimensions are the inputs' (with their coordinates) when they were
        DataArrays, else ``case`` (one dimension) or ``case_0``, ``case_1``, ...
        Units are in each variable's ``units`` attribute. Needs xarray.
        """
        import xarray as xr

        dims, coords = self._case_dims()
        data = {}
        for kind, result_type, items, prefix in (
                ("region", RegionSolution, self._regions, ""),
                ("wave", WaveSolution, self._waves, "wave_")):
            names = list(items)
            for field in result_fields(result_type):
                if field.name == "family":
                    continue
                values = [getattr(items[n], field.name) for n in names]
                unit = _unit_label(values[0], field.unit) if values else field.unit
                stacked = np.stack([np.reshape(_magnitude(v), self._shape) for v in values],
                                   axis=-1) if values else np.empty(self._shape + (0,))
                var = field.name if field.name.startswith(prefix) else prefix + field.name
                attrs = {"long_name": field.description}
                if unit:
                    attrs["units"] = unit
                data[var] = xr.Variable(dims + (kind,), stacked, attrs=attrs)
        data["wave_family"] = xr.Variable(("wave",), [w.family for w in self._waves.values()])
        for name in ("ok", "failure", "gamma"):
            data[name] = xr.Variable(dims, np.reshape(_magnitude(getattr(self, name)),
                                                      self._shape))
        coords = dict(coords, region=list(self._regions), wave=list(self._waves))
        return xr.Dataset(data, coords=coords)

    def _case_dims(self):
        first = self._regions[self._plan.inflow].M
        if type(first).__module__.split(".")[0] == "xarray":
            return tuple(first.dims), {k: v for k, v in first.coords.items()}
        if type(first).__module__.split(".")[0] == "pandas":
            return (first.index.name or "case",), {first.index.name or "case": first.index}
        n = len(self._shape)
        return (("case",) if n == 1 else tuple(f"case_{i}" for i in range(n))), {}

    # -- display
    def _summary(self):
        n_cases = int(np.prod(self._shape)) if self._shape else 1
        ok = np.asarray(_magnitude(self.ok))
        n_ok = int(np.count_nonzero(ok))
        head = f"PatternSolution: {n_ok} of {n_cases} case(s) solved"
        if self._shape and n_cases:
            head += "; values of the first case"
        return head, n_cases

    def _region_rows(self):
        pick = lambda v: _first(v)  # noqa: E731
        return [(name, f"{pick(r[0]):.5f}", f"{pick(r[1]):.5f}", f"{pick(r[2]):.5f}",
                 f"{pick(r[3]):.6f}", f"{_degrees(pick(r[4])):.4f}")
                for name, r in self._si["regions"].items()]

    def _wave_rows(self):
        rows = []
        for name, w in self._si["waves"].items():
            kind = np.asarray(w[0]).reshape(-1)
            rows.append((name, self._waves[name].family, str(kind[0]) if kind.size else "",
                         f"{_degrees(_first(w[1])):.4f}", f"{_degrees(_first(w[3])):.4f}",
                         f"{_first(w[2]):.5f}"))
        return rows

    _REGION_HEAD = ("region", "M", "p/p_in", "T/T_in", "p0/p0_in", "direction [deg]")
    _WAVE_HEAD = ("wave", "family", "kind", "turn [deg]", "wave angle [deg]", "p ratio")

    def _failures(self):
        failures = np.atleast_1d(np.asarray(_magnitude(self.failure)))
        return [f for f in failures.reshape(-1) if f]

    def __repr__(self) -> str:
        head, n_cases = self._summary()
        if n_cases == 0:
            return (f"PatternSolution: an empty batch of shape {self._shape}; regions "
                    f"{self.region_names}, waves {self.wave_names}")
        lines = [head, _text_table(self._REGION_HEAD, self._region_rows(), indent="  "),
                 _text_table(self._WAVE_HEAD, self._wave_rows(), indent="  ")]
        bad = self._failures()
        if bad:
            lines.append(f"  {len(bad)} failure(s); first: {bad[0]}")
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        head, n_cases = self._summary()
        if n_cases == 0:
            return f"<p>{html.escape(repr(self))}</p>"
        parts = [f"<div><p><b>{html.escape(head)}</b></p>",
                 _html_table("regions", self._REGION_HEAD, self._region_rows()),
                 _html_table("waves", self._WAVE_HEAD, self._wave_rows())]
        bad = self._failures()
        if bad:
            parts.append(f"<p>{len(bad)} failure(s); first: {html.escape(bad[0])}</p>")
        return "".join(parts) + "</div>"


# --------------------------------------------------------------------- packaging


class _Packer:
    """Packages SI values of the case shape through the solve's boundary call."""

    def __init__(self, call, shape):
        self.call = call
        self.shape = shape

    def __call__(self, result_type, values, skip=()):
        infos = tuple(f for f in result_fields(result_type) if f.name not in skip)
        return list(self._evaluate(infos, values))

    def many(self, names_units, values):
        infos = tuple(FieldInfo(n, u, np.dtype(float), "", pint_unit(u)) for n, u in names_units)
        return list(self._evaluate(infos, values))

    def one(self, name, value, unit, dtype=float):
        info = FieldInfo(name, unit, np.dtype(dtype), "", pint_unit(unit))
        return self._evaluate((info,), (value,))[0]

    def _evaluate(self, infos, values):
        if self.call.scalar:
            values = tuple(_scalar(v) for v in values)
        else:
            values = tuple(np.reshape(v, self.shape) if np.ndim(v) else v for v in values)
        return self.call.evaluate(infos, lambda *args, **kwargs: values)


def _scalar(value):
    if type(value) in (float, str, bool):
        return value
    array = np.asarray(value)
    if array.dtype.kind == "b":
        return bool(array)
    if array.dtype.kind in "US":
        return str(array)
    return float(array)


def _si_fields(raw, plan, ok, shape, case):
    """SI values of every field, NaN where a case is not solved, in the case shape."""
    if not shape:
        return _si_fields_one(raw, plan, bool(ok), case)

    def out(v):
        v = np.where(ok, np.reshape(v, shape), np.nan)
        return float(v) if not shape else v

    regions = {}
    for name, r in raw.regions.items():
        regions[name] = (out(r.M), out(np.exp(r.lnp)), out(np.exp(r.lnT)), out(np.exp(r.lnp0)),
                         out(r.direction))
    waves = {}
    for link in plan.order:
        turn, s = raw.waves[link.name]
        up, down = raw.regions[link.upstream], raw.regions[link.downstream]
        with np.errstate(invalid="ignore"):
            mu_up, mu_dn = mach_angle_of(up.M), mach_angle_of(down.M)
            shock = np.asarray(s.is_shock) & np.reshape(ok, np.shape(s.is_shock))
            turn_kind = "fan"
            if link.compression == "isentropic":
                turn_kind = np.where(np.asarray(turn) * link.sign > 0, "compression", "fan")
            kind = np.where(np.reshape(ok, np.shape(shock)), np.where(shock, "shock", turn_kind),
                            "none")
            head = up.direction + link.sign * np.where(shock, s.wave_angle, mu_up)
            tail = np.where(shock, head, down.direction + link.sign * mu_dn)
        kind = np.reshape(kind, shape)
        waves[link.name] = (str(kind) if not shape else kind, out(turn + 0 * up.M),
                            out(s.p2_p1), out(s.wave_angle), out(mu_up), out(mu_dn), out(head),
                            out(tail))
    # the WaveSolution order: kind, turn, p_ratio, wave_angle, head mu, tail mu, head, tail
    conditions = [np.nan if c.kind == "slip line" else _shaped(case[f"c:{i}"], shape)
                  for i, c in enumerate(plan.conditions)]
    return {"regions": regions, "waves": waves, "conditions": conditions,
            "gamma": _shaped(case["g"], shape)}


def _si_fields_one(raw, plan, ok, case):
    """The scalar form of :func:`_si_fields` (one case, Python floats and math)."""
    nan = math.nan

    def out(v):
        return float(v) if ok else nan

    def mu(M):
        return math.asin(1.0 / M) if M >= 1.0 else nan

    regions = {name: (out(r.M), out(math.exp(r.lnp)), out(math.exp(r.lnT)),
                      out(math.exp(r.lnp0)), out(r.direction))
               for name, r in raw.regions.items()}
    waves = {}
    for link in plan.order:
        turn, s = raw.waves[link.name]
        up, down = raw.regions[link.upstream], raw.regions[link.downstream]
        mu_up, mu_dn = mu(up.M), mu(down.M)
        if not ok:
            kind = "none"
        elif s.is_shock:
            kind = "shock"
        else:
            kind = ("compression" if link.compression == "isentropic"
                    and turn * link.sign > 0 else "fan")
        head = up.direction + link.sign * (s.wave_angle if s.is_shock else mu_up)
        tail = head if s.is_shock else down.direction + link.sign * mu_dn
        waves[link.name] = (kind, out(turn), out(s.p2_p1), out(s.wave_angle), out(mu_up),
                            out(mu_dn), out(head), out(tail))
    conditions = [nan if c.kind == "slip line" else float(case[f"c:{i}"])
                  for i, c in enumerate(plan.conditions)]
    return {"regions": regions, "waves": waves, "conditions": conditions,
            "gamma": float(case["g"])}


def _shaped(value, shape):
    """A float for one case; else ``value`` (flat, of the cases' size, or a scalar) in the
    case shape."""
    if type(value) is float and not shape:
        return value
    array = np.asarray(value, dtype=float)
    if not shape:
        return float(array.reshape(-1)[0])
    if array.ndim and array.size == int(np.prod(shape)):
        return array.reshape(shape)
    return np.broadcast_to(array, shape)


# --------------------------------------------------------------------- geometry


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


def _place_waves(plan, si, points, shape):
    """Given and implied start points [m], their sources, and the meeting points."""
    links = {w.name: w for w in plan.order}
    made_by = {w.downstream: w for w in plan.order}
    starts = {}
    for name in links:
        if f"start:{name}:x" in points:
            starts[name] = (_shaped(points[f"start:{name}:x"], shape),
                            _shaped(points[f"start:{name}:y"], shape))
    sources = {n: "given" for n in starts}
    meetings, seen = [], set()

    def head(name):
        return si["waves"][name][6]

    def meet(kind, incoming, outgoing, region, point):
        key = (kind, incoming, region)
        if key in seen:
            return
        seen.add(key)
        point = tuple(_shaped(v, shape) for v in point)
        meetings.append((kind, incoming, outgoing, region, *point))
        for name in outgoing:
            if name not in starts:
                starts[name] = point
                sources[name] = "wave meeting" if kind == "waves" else kind

    for w in plan.order:
        parent = made_by.get(w.upstream)
        for i, c in enumerate(plan.conditions):
            if (c.kind == "slip line" or f"through:{i}:x" not in points
                    or c.regions[0] != w.downstream or parent is None
                    or parent.name not in starts):
                continue
            line = (si["conditions"][i] if c.kind == "wall"
                    else si["regions"][parent.upstream][4])
            through = (points[f"through:{i}:x"], points[f"through:{i}:y"])
            point = _intersect(starts[parent.name], head(parent.name),
                               tuple(_shaped(v, shape) for v in through), line)
            meet(c.kind, (parent.name,), (w.name,), c.regions[0], point)
        for c in plan.conditions:
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
    return starts, sources, meetings


# --------------------------------------------------------------------- small helpers


def _magnitude(value):
    """Plain numbers of a result field (Quantity magnitude, DataArray/Series values)."""
    value = getattr(value, "magnitude", value)
    kind = type(value).__module__.split(".")[0]
    if kind in ("xarray", "pandas"):
        value = value.to_numpy() if kind == "pandas" else value.values
        value = getattr(value, "magnitude", value)
    return value


def _unit_label(value, unit_text):
    """The unit a result field came back in, as a column label ("" for plain numbers)."""
    if type(value).__module__.split(".")[0] == "xarray":
        units = getattr(value.data, "units", None)  # pint-xarray keeps it in the data
        if units is None:
            return value.attrs.get("units", unit_text)
    else:
        units = getattr(value, "units", None)
    return f"{units:~P}" if units is not None else unit_text


def _flat(value):
    return np.reshape(np.asarray(_magnitude(value)), -1)


def _plain(value):
    return value if isinstance(value, (float, str)) else np.asarray(value)


def _si_length(value):
    """Metres from a length result (a Quantity in the caller's unit, or plain metres)."""
    if hasattr(value, "units") and hasattr(value, "to"):
        return value.to("meter").magnitude
    return _magnitude(value)


def _first(value):
    """The first case of a scalar or batch value, as a float."""
    array = np.asarray(value, dtype=float)
    return float(array.reshape(-1)[0]) if array.size else float("nan")


def _degrees(angle):
    """Degrees for the table, without a '-0.0000' for rounding-level negatives."""
    return float(np.round(np.degrees(angle), 9)) + 0.0


def _text_table(head, rows, indent=""):
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


def _html_table(caption, head, rows):
    esc = html.escape
    body = "".join("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in r) + "</tr>" for r in rows)
    heads = "".join(f"<th>{esc(h)}</th>" for h in head)
    return (f"<table><caption>{esc(caption)}</caption><thead><tr>{heads}</tr></thead>"
            f"<tbody>{body}</tbody></table>")
