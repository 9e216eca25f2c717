"""Solved wave patterns: region states, waves, per-case status, geometry and tables.

:class:`PatternSolution` is what :meth:`gasdyn2d.region_graph.WavePattern.solve`
returns: one :class:`RegionSolution` per region (ratios to the inflow) and one
:class:`WaveSolution` per wave (type, turn, angles, directions of its lines in
the plane), with the per-case status, a printable table, plain arrays for
plotting, full :class:`~gasdyn2d.FlowState` objects when the inflow was one,
and the meeting points of straight wave lines placed from their start points.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from . import _numerics as nx
from ._display import ResultTable, unit_field
from .state import FlowState

__all__ = ["PatternSolution", "RegionSolution", "WaveSolution"]


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
    """

    def __init__(self, pattern, regions, waves, ok, failure, iterations, shape):
        self._pattern = pattern
        self._regions = regions
        self._waves = waves
        self._shape = shape
        self.ok = nx.scalar_or_array(ok.reshape(shape)) if shape else bool(ok.reshape(()))
        failure = failure.reshape(shape)
        self.failure = str(failure) if not shape else failure
        self.iterations = iterations

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
        try:
            return self._regions[name]
        except KeyError:
            raise nx.InvalidInputError(
                f"no region named {name!r}; the regions are {self.region_names}.") from None

    def wave(self, name) -> WaveSolution:
        """The solved wave ``name``."""
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
        inflow = self._pattern.inflow_state
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
        if isinstance(item, str):
            start = self._pattern._waves[item].start if item in self._pattern._waves else None
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


def _radians(value):
    """Plain radians from an angle Quantity; anything else unchanged."""
    return value.m_as("radian") if nx.is_quantity(value) else value


def _degrees(angle):
    """Degrees for the table, without a '-0.0000' for rounding-level negatives."""
    return float(np.round(np.degrees(angle), 9)) + 0.0
