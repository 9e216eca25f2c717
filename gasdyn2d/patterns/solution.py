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

import html
import math
from types import MappingProxyType

from typing import Any

import numpy as np

from ..boundary import Call, result_fields
from ..boundary.results import FieldInfo, pint_unit
from ..errors import InvalidInputError
from ..relations.flow_state import FlowState
from ..relations.isentropic import mach_angle_of
from .placement import intersect, place_waves, shaped
from .records import (MeetingPoint, MeetingPoints, PatternCondition, RegionSolution,
                      WaveConnection, WaveSolution, first_case, html_table, magnitude,
                      region_name, si_length, text_table)

__all__ = ["PatternSolution", "RegionSolution", "WaveSolution", "WaveConnection",
           "PatternCondition", "MeetingPoint", "MeetingPoints", "region_name"]


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
        Ratio of specific heats of the gas, per case; for a thermally perfect inflow gas,
        γ at the inflow temperature (each region's own is ``state(name).gamma``).

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

    # set once by the constructor (the instance refuses every later assignment)
    ok: Any
    failure: Any
    iterations: int
    gamma: Any
    _plan: Any
    _shape: tuple
    _si: Any
    _call: Any
    _inflow_si: Any
    _inflow_state: Any
    _regions: Any
    _waves: Any
    _starts: Any
    _connections: Any
    _conditions: tuple
    _meetings: Any

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
        starts, sources, meetings = place_waves(plan, si, points, shape)
        put(self, "_starts", MappingProxyType(starts))
        connections = {}
        for link in plan.order:
            x, y = starts.get(link.name, (np.nan, np.nan))
            fields = pack.many((("start_x", "m"), ("start_y", "m")), (x, y))
            connections[link.name] = WaveConnection(  # type: ignore[call-arg]  # *fields: 2
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
                               (direction, pressure, shaped(tx, shape), shaped(ty, shape)))
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

    __delattr__ = __setattr__  # type: ignore[assignment]  # refuses deletions the same way

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
        x, y = intersect(p1, a1, p2, a2)
        return tuple(_Packer(self._call, self._shape).many((("x", "m"), ("y", "m")), (
            shaped(x, self._shape), shaped(y, self._shape))))

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
            x1, y1 = intersect((x0, y0), direction, other, other_ray)
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
        d = first_case(self._si["regions"][name][4])
        point = (0.5 * (x0 + x1) + scale * np.cos(d), 0.5 * (y0 + y1) + scale * np.sin(d))
        return None if not np.all(np.isfinite(point)) else tuple(float(v) for v in point)

    def _placed_segment(self, name):
        """(start, end) of a placed wave that ends at a meeting point, first case; or None."""
        if name not in self._starts:
            return None
        end = next((m for m in self._meetings if name in m.incoming), None)
        if end is None:
            return None
        start = tuple(first_case(v) for v in self._starts[name])
        return start, (first_case(si_length(end.x)), first_case(si_length(end.y)))

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
                stacked = np.stack([np.reshape(magnitude(v), self._shape) for v in values],
                                   axis=-1) if values else np.empty(self._shape + (0,))
                var = field.name if field.name.startswith(prefix) else prefix + field.name
                attrs = {"long_name": field.description}
                if unit:
                    attrs["units"] = unit
                data[var] = xr.Variable(dims + (kind,), stacked, attrs=attrs)
        data["wave_family"] = xr.Variable(("wave",), [w.family for w in self._waves.values()])
        for name in ("ok", "failure", "gamma"):
            data[name] = xr.Variable(dims, np.reshape(magnitude(getattr(self, name)),
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
        ok = np.asarray(magnitude(self.ok))
        n_ok = int(np.count_nonzero(ok))
        head = f"PatternSolution: {n_ok} of {n_cases} case(s) solved"
        if self._shape and n_cases:
            head += "; values of the first case"
        return head, n_cases

    def _region_rows(self):
        pick = lambda v: first_case(v)  # noqa: E731
        return [(name, f"{pick(r[0]):.5f}", f"{pick(r[1]):.5f}", f"{pick(r[2]):.5f}",
                 f"{pick(r[3]):.6f}", f"{_degrees(pick(r[4])):.4f}")
                for name, r in self._si["regions"].items()]

    def _wave_rows(self):
        rows = []
        for name, w in self._si["waves"].items():
            kind = np.asarray(w[0]).reshape(-1)
            rows.append((name, self._waves[name].family, str(kind[0]) if kind.size else "",
                         f"{_degrees(first_case(w[1])):.4f}", f"{_degrees(first_case(w[3])):.4f}",
                         f"{first_case(w[2]):.5f}"))
        return rows

    _REGION_HEAD = ("region", "M", "p/p_in", "T/T_in", "p0/p0_in", "direction [deg]")
    _WAVE_HEAD = ("wave", "family", "kind", "turn [deg]", "wave angle [deg]", "p ratio")

    def _failures(self):
        failures = np.atleast_1d(np.asarray(magnitude(self.failure)))
        return [f for f in failures.reshape(-1) if f]

    def __repr__(self) -> str:
        head, n_cases = self._summary()
        if n_cases == 0:
            return (f"PatternSolution: an empty batch of shape {self._shape}; regions "
                    f"{self.region_names}, waves {self.wave_names}")
        lines = [head, text_table(self._REGION_HEAD, self._region_rows(), indent="  "),
                 text_table(self._WAVE_HEAD, self._wave_rows(), indent="  ")]
        bad = self._failures()
        if bad:
            lines.append(f"  {len(bad)} failure(s); first: {bad[0]}")
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        head, n_cases = self._summary()
        if n_cases == 0:
            return f"<p>{html.escape(repr(self))}</p>"
        parts = [f"<div><p><b>{html.escape(head)}</b></p>",
                 html_table("regions", self._REGION_HEAD, self._region_rows()),
                 html_table("waves", self._WAVE_HEAD, self._wave_rows())]
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
    conditions = [np.nan if c.kind == "slip line" else shaped(case[f"c:{i}"], shape)
                  for i, c in enumerate(plan.conditions)]
    return {"regions": regions, "waves": waves, "conditions": conditions,
            "gamma": shaped(_inflow_gamma(plan, case), shape)}


def _inflow_gamma(plan, case):
    """γ of the inflow: the gas's constant value, or γ(T_in) for a thermally perfect gas."""
    if plan.gas is None:
        return case["g"]
    value = plan.gas.gamma_at(case["T_in"])
    return float(value) if type(case["T_in"]) is float else value


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
            "gamma": float(_inflow_gamma(plan, case))}


# --------------------------------------------------------------------- small helpers


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
    return np.reshape(np.asarray(magnitude(value)), -1)


def _plain(value):
    return value if isinstance(value, (float, str)) else np.asarray(value)


def _degrees(angle):
    """Degrees for the table, without a '-0.0000' for rounding-level negatives."""
    return float(np.round(np.degrees(angle), 9)) + 0.0
