"""Shock-fitted space marching of a channel, planar or round: shocks as discontinuities.

Where the characteristic net of :func:`gasdyn2d.characteristics.channels.channel_flow`
folds (characteristics of one family cross: a shock forms), the channel is marched
instead by this inverse (space-)marching scheme with fitted shocks. Plain core only:
:func:`march_fitted_channel`; its shocks come back as :class:`FittedShock` results.

Method
------
The channel is marched in x, station by station. At each station the cross-section
is split into zones by the two walls and the fitted shocks; each zone holds nodes
spaced evenly between its two boundaries (as many as keep the spacing at most the
target spacing h = local height/(n - 1), at least its two boundary nodes). A shock
point appears twice, once on each side. The variables are p, θ and the stagnation
pressure p0 of the streamline (the entropy), with M from p/p0 on the streamline.

A new node's state comes from tracing its C+, its C- and its streamline back to the
previous station and interpolating there (in each zone, quadratic through the three
nearest nodes, limited to the range of the two either side; a trace that leaves the
zone between the stations meets the zone's boundary path, and the state there is
interpolated along that path). Along C± the planar compatibility
relations in p and θ hold in rotational flow as they stand,

    dθ + B dp/p = 0 along C+,   dθ - B dp/p = 0 along C-,   B = √(M² - 1)/(γM²),

and p0 is constant along a streamline (Zucrow and Hoffman, 1977, vol. 2, ch. 16:
the inverse marching method and the rotational compatibility relations; chapter
from memory). The entropy enters through M(p, p0) on each streamline. In round flow
(``geometry="axisymmetric"``, y the radius) the relations gain the source terms
Q± dx, Q± = sin θ sin μ / (y cos(θ ± μ)), taken at the midpoint of each trace
(:func:`_source_terms`). Slopes and
coefficients are taken at the new node's estimate in a predictor and averaged
between the foot and the node in a corrector.

Wall node: the wall fixes θ; the characteristic arriving from the flow (C- at the
lower wall, C+ at the upper) fixes p; p0 is carried along the wall streamline.

Shock point (:func:`gasdyn2d.characteristics.shock_points.shock_point`): the
upstream state is that of the upstream side's node (computed like an interior node
of the zone ahead); the oblique-shock relations and the characteristic of the
shock's own family traced back into the zone behind give the wave angle and the
state behind; p0 behind is p0 ahead times p02/p01. The shock is moved along the
mean of its old and new directions.

Where shocks start: at the start of each compressive stretch of a wall (the lower
wall turning up, the upper turning down). A stretch shorter than a step (a corner,
a short arc) gets the oblique shock of its whole turn at once; a longer one a Mach
wave of zero strength, which the compression waves from the wall then strengthen
from behind. For a gradual compression, which would stay isentropic until its
characteristics cross, the fitted shock replaces the isentropic compression: the
entropy it produces is of third order in the turn (the oblique-shock entropy rise
for a turn δ is O(δ³)), so the error is of that order.

Reflection from a wall: where a shock reaches a wall the station is placed there;
the reflected shock (the other family) turns the flow behind the incident shock back
parallel to the wall (regular reflection, by the oblique-shock relations for that
deflection, weak branch). Where that deflection exceeds the detachment angle, only
a Mach reflection exists: the march stops (``"mach_reflection"``).

Crossings: two shocks of opposite families that meet cross; the transmitted shocks
and the slip line between them match pressure and direction (oblique-shock
relations); the slip line is carried on as a zone boundary with one p and θ on
both sides (C+ from below, C- from above) and p0 jumping across it. A shock that
meets a slip line passes through it; the weak wave this reflects from the slip
line is not fitted (the slip line's unit process sends it into the flow). The
events are in :mod:`gasdyn2d.characteristics.fitted_events`.

Merging: a shock that overtakes another of its family merges with it; the merged
shock joins the state ahead of the front one to the state behind the rear one, and
its shock point makes them consistent (the weak reflected wave and slip line of the
exact merging, third order in the turns, are not fitted; the merged shock matches the
exact one of :func:`gasdyn2d.patterns.interactions.merging_shocks` to 2e-8).

The axis of a round flow: a shock converging on it strengthens (its turn is spread over
a shrinking circumference). Where it reaches the axis with a turn that an attached shock
can still reverse, it reflects regularly (the Mach disc that theory puts there is then
smaller than the mesh resolves); where the strengthened shock has passed detachment, or
turns the flow behind it subsonic within two mesh spacings of the axis, the march stops
with ``"mach_reflection"``. Near that transition the outcome depends on how close to the
axis the mesh resolves the strengthening: refine.

Where it stops (``"shock_crossing"``): a crossing or a refraction beyond detachment
(no regular solution), or two slip lines meeting; flow compressed to M = 1, or a
shock so strong the flow behind it is subsonic (``"sonic"``); a slip line reaching a
wall or a jet's boundary (``"slip_line"``: the wall would have to carry two streams).

Accuracy: the averaged-coefficient rule is second order; the limited interpolation
at the feet keeps smooth regions close to that, but centred fans, the strengthening
of weak shocks and steep compressions converge at first order or a little better;
piecewise-uniform flows are exact (see the tests and ``docs/characteristics.md``).

Not modelled: boundary layers, shock/boundary-layer interaction and separation
(which a real shock reflection in a duct often causes), real-gas effects.
"""

from __future__ import annotations

import dataclasses
import math
from typing import NamedTuple

import numpy as np

from ..boundary.results import ResultTable, unit_field
from ..relations.isentropic import pressure_ratio
from .fitted_events import (
    CFL_NUMBER,
    Station,
    cfl_step,
    cross_shocks,
    flow_properties,
    insert_shocks,
    merge_shocks,
    reflect_from_wall,
    refract_through_slip_line,
    wave_angle_of_jump,
    zone_layout,
    zone_node_count,
)
from .shock_points import shock_point

__all__ = ["FittedShock", "FittedMarch", "march_fitted_channel", "compressive_stretches"]

_PASSES = 2  # predictor + one corrector
_MAX_STATIONS = 100_000
_LOOKAHEAD = 1.5  # a shock hitting a wall within this many steps lands a station on the wall

# node kinds
_INTERIOR, _LOWER_WALL, _UPPER_WALL, _AHEAD, _BEHIND, _SLIP = 0, 1, 2, 3, 4, 5


@dataclasses.dataclass(frozen=True, repr=False)
class FittedShock(ResultTable):
    """One fitted shock of a channel march: its points from where it starts to where it ends.

    A shock that reflects from a wall ends there; its reflection is the next entry.
    """

    family: int = unit_field("", "+1: runs like a C+ (up the channel), -1: like a C-", dtype=int)
    x: np.ndarray = unit_field("m", "shock points, in streamwise order")
    y: np.ndarray = unit_field("m")
    wave_angle: np.ndarray = unit_field("rad", "β between the upstream flow and the shock")
    p2_p1: np.ndarray = unit_field("", "static pressure ratio across the shock")
    end: str = unit_field("", "where it ends: 'wall', 'length' or the stop reason", dtype=str)


class FittedMarch(NamedTuple):
    """Plain-core result of :func:`march_fitted_channel` (SI, radians)."""

    station_x: np.ndarray  #: x of each station [m]
    y: list  #: per station: node heights [m], lower to upper wall (shock points twice)
    p_p0: list  #: per station: static pressure over the inlet stagnation pressure
    theta: list  #: per station: flow direction [rad]
    p0_p0_inlet: list  #: per station: stagnation pressure over the inlet's
    mach: list  #: per station: Mach number
    shocks: list  #: (family, x, y, wave_angle, p2_p1, end) per fitted shock
    reason: str  #: "length", "mach_reflection", "shock_crossing" or "sonic"
    stop_position: tuple  #: (x, y) where the march stopped short (NaN at "length")


def _kinds(counts, shocks):
    """Node kinds: interior, wall nodes, the sides of each shock (ahead, behind, in the
    order of the shocks) and of each slip line (below, above)."""
    zone, _, start, stop = zone_layout(counts)
    kind = np.zeros(zone.size, dtype=np.intp)
    kind[start[0]] = _LOWER_WALL
    kind[stop[-1]] = _UPPER_WALL
    ahead, behind = [], []
    for i, shock in enumerate(shocks):
        below, above = stop[i], start[i + 1]
        if not shock.is_shock:
            kind[below], kind[above] = _SLIP, _SLIP
            continue
        up, down = (below, above) if shock.family < 0 else (above, below)
        kind[up], kind[down] = _AHEAD, _BEHIND
        ahead.append(up)
        behind.append(down)
    return kind, np.array(ahead, dtype=np.intp), np.array(behind, dtype=np.intp)


def compressive_stretches(wall, length, side, samples=20001):
    """Where stretches of compressive turning of a wall begin and end [m], in [0, length].

    ``side`` is "lower" (compressive where the wall turns up) or "upper" (where it
    turns down). The wall angle is sampled at ``samples`` points; a stretch starts
    at the last sample before the turning begins (a Mach wave inserted a little
    early carries nothing until the turn reaches it) and ends at the first sample
    after it. Returns an array of shape (k, 2).
    """
    x = np.linspace(0.0, length, samples)
    angle = np.arctan(np.asarray(wall.slope(x), dtype=float))
    turn = np.diff(angle) * (1.0 if side == "lower" else -1.0)
    compressive = np.concatenate([[False], turn > 1e-12, [False]])
    begins = np.flatnonzero(compressive[1:] & ~compressive[:-1])
    ends = np.flatnonzero(compressive[:-1] & ~compressive[1:])
    return np.column_stack([x[begins], x[ends]]).reshape(-1, 2)


def march_fitted_channel(M, gamma, lower_wall, upper_wall, length, n, start=None,
                         geometry="planar"):
    """Plain core: march a planar channel with fitted shocks from a uniform inlet at x = 0.

    Parameters
    ----------
    M, gamma : float
        Inlet Mach number (> 1, flow along x) and ratio of specific heats.
    lower_wall, upper_wall : WallContour
        The walls (the centreline of a symmetric channel is a straight lower wall).
    length : float
        Where the march ends [m].
    n : int
        Nodes across the inlet; the target spacing is the local height / (n - 1).
    start : Station, optional
        A first station other than the uniform inlet (a jet's). ``upper_wall`` may then
        be a :class:`~gasdyn2d.characteristics.fitted_jets.FreeBoundary`.
    geometry : {"planar", "axisymmetric"}, optional
        Planar (default) or round about y = 0 (then the lower wall is the axis, y = 0,
        and the compatibility relations carry the axisymmetric source term).

    Returns
    -------
    FittedMarch

    References
    ----------
    Zucrow, M. J. and Hoffman, J. D., 1977, *Gas Dynamics*, vol. 2, Wiley, ch. 16
    (inverse marching, rotational compatibility relations, shock points; chapter from
    memory).

    Examples
    --------
    A made-up Mach 2.2 duct whose roof turns down 6° at a sharp corner: the corner's
    shock reflects regularly from the floor.

    >>> import math
    >>> from gasdyn2d.characteristics.walls import WallContour
    >>> from gasdyn2d.characteristics.fitted_shocks import march_fitted_channel
    >>> march = march_fitted_channel(2.2, 1.4, WallContour.straight(0.0),
    ...                              WallContour.bend(0.1, 0.05, math.radians(-6.0), 1e-4),
    ...                              0.3, 21)
    >>> march.reason, [shock[0] for shock in march.shocks]
    ('length', [-1, 1])
    >>> round(math.degrees(march.shocks[0][3][0]), 4)  # β of the 6° shock at Mach 2.2
    31.9809
    """
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        return _march(M, gamma, lower_wall, upper_wall, length, n, start,
                      geometry == "axisymmetric")


def _march(M, gamma, lower_wall, upper_wall, length, n, start=None, round_=False):
    """:func:`march_fitted_channel` inside one floating-point error state; ``start`` is a
    first station other than the uniform inlet, and ``upper_wall`` may be a
    :class:`~gasdyn2d.characteristics.fitted_jets.FreeBoundary` (a jet)."""
    free = getattr(upper_wall, "is_free", False)
    if start is None:
        p_inlet = float(pressure_ratio(M, gamma))
        y0 = np.linspace(float(lower_wall.height(0.0)), float(upper_wall.height(0.0)), n)
        start = Station(0.0, [n], y0, np.full(n, math.log(p_inlet)), np.zeros(n),
                        np.zeros(n), [])
    station = start
    sides = ((lower_wall, "lower"),) if free else ((lower_wall, "lower"), (upper_wall, "upper"))
    starts = sorted(_corner_or_stretch(wall, a, b, side) for wall, side in sides
                    for a, b in compressive_stretches(wall, length, side))
    out = _Recorder(gamma)
    finished = []
    reason, where = "length", (math.nan, math.nan)
    walls = (lower_wall, upper_wall)
    station = insert_shocks(station, starts, walls, n, gamma)
    if isinstance(station, tuple):
        reason, where = station[1]
        station = start
    out.add(station)
    for _ in range(_MAX_STATIONS):
        if station.x >= length * (1.0 - 1e-14) or reason != "length":
            break
        if free and upper_wall.cells_done():
            reason = "cells"
            break
        dx, hit, meet = _step_length(station, walls, length, starts, n, gamma)
        if not dx > 0.0:  # every event checks for subsonic flow; this is a last guard
            raise RuntimeError(f"fitted channel march: step {dx!r} at x = {station.x!r}")
        crawl = _crawling(station, walls, n, gamma)
        if crawl is not None:  # M → 1: the Mach lines stand across the stream
            reason, where = "sonic", crawl
            break
        if meet is not None:
            reason, where = meet
            break
        new, status = _advance(station, dx, hit, walls, n, gamma, round_)
        if status != "ok":
            reason, where = status
            break
        for shock, ratio, beta in zip([s for s in new.shocks if s.is_shock],
                                      *_shock_strengths(new, gamma)):
            shock.record(new.x, beta, ratio)
        if hit is not None and hit[0] in ("cross", "refract", "merge"):
            handle = {"cross": cross_shocks, "refract": refract_through_slip_line,
                      "merge": merge_shocks}[hit[0]]
            new, status = handle(new, hit[1], hit[2], gamma, finished)
            if status != "ok":
                reason, where = status
                out.add(new)
                break
        elif hit is not None:
            for wall_hit in hit[1]:
                if wall_hit[1] == 1 and free:  # a shock reaching a jet's boundary ends there
                    new, status = upper_wall.end_shock(new, wall_hit[0], finished)
                else:
                    new, status = reflect_from_wall(new, wall_hit, walls, gamma, finished)
                if status != "ok":
                    break
            if status != "ok":
                reason, where = status
                out.add(new)
                break
        inserted = insert_shocks(new, starts, walls, n, gamma)
        if isinstance(inserted, tuple):
            reason, where = inserted[1]
            out.add(new)
            break
        new = inserted
        if free:
            new = upper_wall.follow(new, n, gamma)
        out.add(new)
        station = new
    if round_ and reason == "sonic" and _near_axis(where, walls, n):
        # a round shock converging on the axis strengthens until the flow behind it is
        # subsonic, within a mesh spacing or two of the axis: a Mach reflection (a Mach disc)
        reason = "mach_reflection"
    for shock in finished + list(station.shocks):
        if shock not in finished and reason != "length":
            shock.end = reason
    shocks = [(s.family,) + tuple(np.array(v) for v in zip(*s.path)) + (s.end,)
              for s in finished + [s for s in station.shocks if s not in finished]
              if s.is_shock]
    return FittedMarch(np.array(out.x), out.y, out.p, out.th, out.p0, out.mach, shocks,
                       reason, where)


def _near_axis(where, walls, n):
    """Whether a stop at ``where`` lies within two target spacings of the axis (a lower wall
    at y = 0)."""
    x, y = where
    low = float(walls[0].height(x))
    return low == 0.0 and y <= 2.0 * float(walls[1].height(x) - low) / (n - 1)


def _corner_or_stretch(wall, start, end, side):
    """(start, side, end) of a compressive stretch; a polyline's corner inside it is the
    stretch itself (start = end = the corner)."""
    for corner in getattr(wall, "corners_x", ()):
        if start <= corner <= end:
            return (float(corner), side, float(corner))
    return (float(start), side, float(end))


class _Recorder:
    """Stations as they are marched, in output form."""

    def __init__(self, gamma):
        self.gamma = gamma
        self.x, self.y, self.p, self.th, self.p0, self.mach = [], [], [], [], [], []

    def add(self, station):
        self.x.append(station.x)
        self.y.append(station.y.copy())
        self.p.append(np.exp(station.lp))
        self.th.append(station.th.copy())
        self.p0.append(np.exp(station.lp0))
        self.mach.append(flow_properties(station.lp, station.lp0, self.gamma)[0])


def _crawling(station, walls, n, gamma):
    """Where the march can no longer advance (the flow at M = 1 to within 1e-6, or a
    characteristic turned across the stream: a CFL step below 1e-3 of the spacing), or
    None."""
    _, mu, _ = flow_properties(station.lp, station.lp0, gamma)
    spread = np.tan(station.th + mu) - np.tan(station.th - mu)
    h = float(walls[1].height(station.x) - walls[0].height(station.x)) / (n - 1)
    if float(np.max(spread)) * 1e-3 * h < 2.0 * h * CFL_NUMBER:
        return None
    k = int(np.argmax(spread))
    return (station.x, float(station.y[k]))


def _shock_strengths(station, gamma):
    """Pressure ratio and wave angle of each shock of a station (not of slip lines), from
    its two sides."""
    _, ahead, behind = _kinds(station.counts, station.shocks)
    if ahead.size == 0:
        return [], []
    ratio = np.exp(station.lp[behind] - station.lp[ahead])
    mach = flow_properties(station.lp[ahead], station.lp0[ahead], gamma)[0]
    beta = wave_angle_of_jump(mach, np.maximum(ratio, 1.0), gamma)
    return list(ratio), list(beta)


def _step_length(station, walls, length, starts, n, gamma):
    """The next step: CFL length, cut to land on the channel end, a shock's wall hit or
    a shock's start; or (reason, point) where the march must stop: two interfaces meeting
    without a carried event, or a slip line reaching a wall."""
    x = station.x
    height = float(walls[1].height(x) - walls[0].height(x))
    h = height / (n - 1)
    _, mu, _ = flow_properties(station.lp, station.lp0, gamma)
    dx_cfl = cfl_step(station.th, mu, h)
    limit = length - x
    corners = [c for wall in walls for c in getattr(wall, "corners_x", ())]
    for x_mark in [start[0] for start in starts] + corners:
        if x + 1e-12 * max(1.0, abs(x)) < x_mark:  # land on shock starts and wall corners
            limit = min(limit, x_mark - x)
    dx = min(dx_cfl, limit)
    reach = min(_LOOKAHEAD * dx_cfl, limit)
    shocks = station.shocks
    hit, found = None, []
    if shocks:
        for k, wall_index, family in ((0, 0, -1), (len(shocks) - 1, 1, +1)):
            shock = shocks[k]
            if shock.family not in (family, 0):
                continue
            d = _wall_hit(shock, walls[wall_index], x, reach, wall_index)
            if d is not None and shock.family == 0:  # a slip line cannot end on a wall
                if d <= dx:
                    return dx, None, ("slip_line", (x + d, shock.y + d * math.tan(
                        shock.direction)))
            elif d is not None:
                found.append((d, k, wall_index))
    if found:  # the first wall hit, and any other at the same x (a symmetric channel)
        first = min(d for d, _, _ in found)
        dx = first
        hit = ("walls", [(k, w) for d, k, w in found if d <= first * (1.0 + 1e-9)])
    meets = []  # neighbouring shocks or slip lines meeting within reach
    for i in range(len(shocks) - 1):
        gap = shocks[i + 1].y - shocks[i].y
        closing = math.tan(shocks[i].direction) - math.tan(shocks[i + 1].direction)
        if closing > 0.0 and gap <= closing * reach:
            meets.append((gap / closing, i))
    if not meets:
        return dx, hit, None
    d, i = min(meets)
    near = {j: dj for dj, j in meets if dj <= d + 1e-6 * dx_cfl}
    below, above = shocks[i].family, shocks[i + 1].family
    if below > 0 and above < 0:
        event = ("cross", i, 1)  # two shocks cross
    elif below > 0 and above == 0 and i + 1 in near and shocks[i + 2].family < 0:
        event = ("cross", i, 2)  # ... on a slip line
    elif below == 0 and above < 0 and i - 1 in near and shocks[i - 1].family > 0:
        event = ("cross", i - 1, 2)
    elif (below > 0 and above == 0) or (below == 0 and above < 0):
        event = ("refract", i, 1)  # a shock passes through a slip line
    elif below == above != 0:  # one shock overtaking another of its family: they merge
        event = ("merge", i, 1)
    else:  # two slip lines, or a slip line overtaking a shock: not carried on
        if d <= dx:
            return dx, None, ("shock_crossing",
                              (x + d, shocks[i].y + d * math.tan(shocks[i].direction)))
        return dx, hit, None
    if d < dx or hit is None:
        dx, hit = d, event  # land a station where they meet
    return dx, hit, None


def _wall_hit(shock, wall, x, reach, wall_index):
    """Distance along x in (0, reach] at which the straight continuation of a shock meets
    a wall, or None."""
    sign = 1.0 if wall_index == 0 else -1.0  # gap > 0 while the shock is inside

    def gap(d):
        return sign * (shock.y + d * math.tan(shock.direction) - float(wall.height(x + d)))

    if gap(reach) > 0.0:
        return None
    low, high = 0.0, reach
    for _ in range(60):  # bisection: the wall may be curved
        mid = 0.5 * (low + high)
        if gap(mid) > 0.0:
            low = mid
        else:
            high = mid
    return high if high > 1e-12 * max(1.0, abs(x)) else None


def _advance(old, dx, hit, walls, n, gamma, round_=False):
    """March one step: the new station's nodes by predictor and corrector."""
    x = old.x + dx
    free = getattr(walls[1], "is_free", False)
    y_low, y_up = float(walls[0].height(x)), float(walls[1].height(x))
    th_low, th_up = (_wall_angle(w, x, dx) for w in walls)
    h = (y_up - y_low) / (n - 1)
    shocks = old.shocks
    shock_y_old = np.array([s.y for s in shocks])
    dir_old = np.array([s.direction for s in shocks])
    shock_y = shock_y_old + dx * np.tan(dir_old)
    def pin(positions):
        """Shocks at a wall hit on the wall; two crossing shocks at one point."""
        if hit is not None and hit[0] in ("cross", "refract", "merge"):
            i, span = hit[1], hit[2]
            positions[i:i + span + 1] = 0.5 * (positions[i] + positions[i + span])
        elif hit is not None:
            for k, wall_index in hit[1]:
                positions[k] = y_low if wall_index == 0 else y_up
        return positions

    shock_y = pin(shock_y)
    bounds = np.concatenate([[y_low], shock_y, [y_up]])
    if np.any(np.diff(bounds) < -1e-12 * max(h, 1e-300)):
        k = int(np.argmin(np.diff(bounds)))
        return None, ("shock_crossing", (x, float(bounds[k])))
    bounds = np.maximum.accumulate(bounds)
    thick = np.diff(bounds)
    counts = zone_node_count(thick, h)
    zone, eta, start, stop = zone_layout(counts)
    kind, ahead, behind = _kinds(counts, shocks)
    is_shock = np.array([s.is_shock for s in shocks], dtype=bool)
    sid = np.flatnonzero(is_shock)  # shocks among the interfaces (the rest: slip lines)
    slip = np.flatnonzero(~is_shock)
    family = np.array([shocks[i].family for i in sid], dtype=float)
    slip_low, slip_high = stop[slip], start[slip + 1]
    y = bounds[zone] + eta * thick[zone]
    xi = 2.0 * zone + eta
    lp, th, lp0 = (np.interp(xi, old.xi, v) for v in (old.lp, old.th, old.lp0))
    if sid.size:
        # Predictor state behind each shock: the previous station's node one step into the
        # zone behind. Behind a weak shock the state right at the shock is (nearly) the one
        # ahead, whose own-family characteristic runs along the shock and never meets the
        # compression behind it (an unstable fixed point); starting from the neighbour's
        # slope the trace reaches into the zone behind, where the compression is.
        _, old_ahead, old_behind = _kinds(old.counts, shocks)
        inward = old_behind + np.where(old_behind > old_ahead, 1, -1)
        lp[behind], th[behind], lp0[behind] = old.lp[inward], old.th[inward], old.lp0[inward]
    own_lo = np.zeros(zone.size, bool)
    own_lo[start] = True
    own_hi = np.zeros(zone.size, bool)
    own_hi[stop] = True
    geometry = (zone, own_lo, own_hi, start, stop, dx)
    feet_slopes = None
    new_dir = dir_old
    beta_guess = np.array([shocks[i].wave_angle for i in sid])
    interior = (kind == _INTERIOR) | (kind == _AHEAD)
    for _ in range(_PASSES):
        _, mu, b = flow_properties(lp, lp0, gamma)
        slopes = np.tan(np.array([th + mu, th - mu, th]))
        if feet_slopes is not None:
            slopes = 0.5 * (slopes + feet_slopes)
        new = (y, lp, th, lp0)
        all_lp, all_th, all_lp0, span = _foot(old, new, slopes, geometry)  # rows: a, b, s
        (lpa, lpb, _), (tha, thb, ths), (lp0a, lp0b, lp0s) = all_lp, all_th, all_lp0
        _, mu_ab, b_ab = flow_properties(all_lp[:2], all_lp0[:2], gamma)
        (mua, mub), (ba, bb) = mu_ab, b_ab
        feet_slopes = np.tan(np.array([tha + mua, thb - mub, ths]))
        bp, bm = 0.5 * (ba + b), 0.5 * (bb + b)
        if round_:  # the source term, folded into the feet's θ (see _source_terms)
            tha, thb = _source_terms(tha, thb, mua, mub, th, mu, y, slopes, dx * span)
        rp, rm = tha + bp * lpa, thb - bm * lpb
        lp_new = np.where(interior, (rp - rm) / (bp + bm), lp)
        th_new = np.where(interior, rp - bp * lp_new, th)
        i0, i1 = start[0], stop[-1]
        th_new[i0], lp_new[i0] = th_low, lpb[i0] + (th_low - thb[i0]) / bm[i0]
        if free:  # a jet's boundary: the ambient pressure, θ from the C+ arriving
            lp_new[i1] = walls[1].log_pressure
            th_new[i1] = tha[i1] + walls[1].turn_to_ambient(lpa[i1], lp0a[i1], lp0[i1], gamma)
            y_up = walls[1].position(dx, th_new[i1])
        else:
            th_new[i1], lp_new[i1] = th_up, lpa[i1] - (th_up - tha[i1]) / bp[i1]
        lp0_new = np.where(kind == _BEHIND, lp0, lp0s)
        lp0_new[i0], lp0_new[i1] = old.lp0[old.start[0]], old.lp0[old.stop[-1]]  # wall streamlines
        if slip.size:  # a slip line: one p and θ on both sides, C+ from below, C- from above
            b_low, b_high = bp[slip_low], bm[slip_high]
            r_low, r_high = rp[slip_low], rm[slip_high]
            lp_new[slip_low] = lp_new[slip_high] = (r_low - r_high) / (b_low + b_high)
            th_new[slip_low] = th_new[slip_high] = r_low - b_low * lp_new[slip_low]
        if shocks:
            new_dir = dir_old.copy()
            if slip.size:
                new_dir[slip] = th_new[slip_low]
        if sid.size:
            own = np.where(family > 0, 1, 0)  # behind a +1 shock its C+ arrives: foot a
            foot_lp = np.where(own == 1, lpa[behind], lpb[behind])
            foot_th = np.where(own == 1, tha[behind], thb[behind])
            foot_lp0 = np.where(own == 1, lp0a[behind], lp0b[behind])
            m_up = flow_properties(lp_new[ahead], lp0_new[ahead], gamma)[0]
            m_b = flow_properties(foot_lp, foot_lp0, gamma)[0]
            point = _shock_points(m_up, th_new[ahead], np.exp(lp_new[ahead]), m_b, foot_th,
                                  np.exp(foot_lp), family, gamma, guesses=beta_guess)
            beta_guess = point.wave_angle
            if np.any(point.subsonic) or not np.all(np.isfinite(point.wave_angle)):
                k = int(np.argmax(point.subsonic | ~np.isfinite(point.wave_angle)))
                return None, ("sonic", (x, float(shock_y[sid[k]])))
            lp_new[behind] = np.log(point.p)
            th_new[behind] = point.theta
            lp0_new[behind] = lp0_new[ahead] + np.log(point.p0_ratio)
            new_dir[sid] = np.asarray(point.direction, dtype=float)
        if shocks or free:
            shock_y = pin(shock_y_old + dx * 0.5 * (np.tan(dir_old) + np.tan(new_dir)))
            bounds = np.maximum.accumulate(np.concatenate([[y_low], shock_y, [y_up]]))
            thick = np.diff(bounds)
            y = bounds[zone] + eta * thick[zone]
        lp, th, lp0 = lp_new, th_new, lp0_new
    mach = flow_properties(lp, lp0, gamma)[0]
    if not np.all(mach > 1.0):
        k = int(np.argmin(np.where(np.isnan(mach), -np.inf, mach)))
        return None, ("sonic", (x, float(y[k])))
    for shock, y_s, direction in zip(shocks, shock_y, new_dir):
        shock.y, shock.direction = float(y_s), float(direction)
    return Station(x, counts, y, lp, th, lp0, list(shocks)), "ok"


def _source_terms(tha, thb, mua, mub, th, mu, y, slopes, lengths):
    """The feet's θ with the axisymmetric source term of each C± integrated to the node.

    Along C+: dθ + B dp/p + Q+ dx = 0, along C-: dθ - B dp/p - Q- dx = 0, with
    Q± = sin θ sin μ / (y cos(θ ± μ)) (the rotational p-θ form; Zucrow and Hoffman 1977,
    vol. 2, ch. 16, from memory; the same terms as the homentropic
    :mod:`~gasdyn2d.characteristics.unit_processes`). So the planar relations hold with
    θa - Q+ dx and θb + Q- dx in place of the feet's θ. Q is taken at the midpoint of the
    trace (θ, μ and y averaged between foot and node: second order), where y > 0 unless
    both ends lie on the axis; there the C+ is not used (the axis node takes its C-).
    ``lengths`` (rows C+, C-) is each trace's length in x: the step, or less where the
    trace meets its zone's boundary path.
    """
    terms = []
    for theta_foot, mu_foot, slope, dx, sign in ((tha, mua, slopes[0], lengths[0], 1.0),
                                                 (thb, mub, slopes[1], lengths[1], -1.0)):
        y_mid = 0.5 * (y + np.maximum(y - dx * slope, 0.0))
        t, m = 0.5 * (theta_foot + th), 0.5 * (mu_foot + mu)
        q = np.sin(t) * np.sin(m) / (np.where(y_mid > 0.0, y_mid, 1.0) * np.cos(t + sign * m))
        terms.append(np.where(y_mid > 0.0, q, 0.0) * dx)
    return tha - terms[0], thb + terms[1]


def _shock_points(*states, guesses):
    """:func:`shock_point` for each shock of a station (its scalar form: a few shocks),
    bracketed first around each shock's wave angle of the step before."""
    *arrays, gamma = states
    points = [shock_point(*(float(v) for v in values), float(gamma), guess=float(guess))
              for *values, guess in zip(*arrays, guesses)]
    return type(points[0])(*(np.array(v) for v in zip(*points)))


def _wall_angle(wall, x, dx):
    """The wall's angle at x [rad]; at a corner the angle just upstream of it (the turn
    acts on the next step)."""
    if any(abs(x - c) <= 1e-12 * max(1.0, abs(c)) for c in getattr(wall, "corners_x", ())):
        x = x - 1e-9 * dx
    return float(np.arctan(wall.slope(x)))


def _interpolate(old, zone, eta):
    """(ln p, θ, ln p0) at relative positions η of zones of the previous station.

    Quadratic through the three nearest nodes of the zone (nodes are evenly spaced in a
    zone), limited to the range of the two nodes either side (no new extrema: a steep
    compression about to meet a shock would otherwise overshoot); linear in a zone of two
    nodes. Linear interpolation alone adds an O(h) numerical diffusion over a march.
    """
    counts = old.counts[zone]
    u = eta * (counts - 1)  # position in node spacings from the zone's first node
    lost = ~np.isfinite(u)  # a NaN foot (a subsonic estimate): NaN out, caught by the step
    u = np.where(lost, 0.0, u)
    centre = np.clip(np.rint(u), 1, counts - 2)  # middle node of the three-point stencil
    two = counts < 3
    centre = np.where(two, 0, centre).astype(np.intp)
    r = u - centre
    base = old.start[zone] + centre
    left = old.start[zone] + np.minimum(np.floor(u), counts - 2).astype(np.intp)
    values = []
    for v in (old.lp, old.th, old.lp0):
        middle = v[base]
        after = v[np.minimum(base + 1, v.size - 1)]
        before = v[np.maximum(base - 1, 0)]
        quadratic = middle + 0.5 * r * (after - before) + 0.5 * r * r * (after - 2.0 * middle
                                                                           + before)
        low, high = v[left], v[left + 1]
        limited = np.minimum(np.maximum(quadratic, np.minimum(low, high)), np.maximum(low, high))
        values.append(np.where(lost, np.nan, np.where(two, middle + r * (after - middle),
                                                      limited)))
    return values


def _foot(old, new, slope, geometry):
    """State (ln p, θ, ln p0) where lines of ``slope`` through the new nodes meet the
    previous station, or, where they leave their zone first, the zone's boundary path.

    ``slope`` has shape (k, n): k families of lines at once (C+, C-, streamline); each
    returned array has that shape. The last one is the length of each trace as a fraction
    of the step (1, or less where the trace meets its zone's boundary path).
    """
    zone, own_lo, own_hi, start, stop, dx = geometry
    y, lp, th, lp0 = new
    y_foot = y - dx * slope
    lo_old, hi_old = old.y[old.start[zone]], old.y[old.stop[zone]]
    thick = hi_old - lo_old
    below = (y_foot < lo_old) & ~own_lo
    above = (y_foot > hi_old) & ~own_hi
    eta = np.where(thick > 0.0, (y_foot - lo_old) / np.where(thick > 0.0, thick, 1.0), 0.5)
    values = _interpolate(old, zone, np.minimum(np.maximum(eta, 0.0), 1.0))
    span = np.ones_like(slope)
    n = y.size
    for mask, new_index, old_index in ((below, start, old.start), (above, stop, old.stop)):
        if not mask.any():
            continue
        k = np.flatnonzero(mask)
        node = k % n
        z = zone[node]
        edge_new, edge_old = y[new_index[z]], old.y[old_index[z]]
        t = (y[node] - edge_new) / (dx * slope.ravel()[k] - (edge_new - edge_old))
        t = np.where(t >= 0.0, np.minimum(t, 1.0), np.where(t < 0.0, 0.0, 1.0))  # NaN: 1
        for value, now, before in zip(values, (lp, th, lp0), (old.lp, old.th, old.lp0)):
            value.ravel()[k] = (1.0 - t) * now[new_index[z]] + t * before[old_index[z]]
        span.ravel()[k] = t
    return (*values, span)
