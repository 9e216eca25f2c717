"""The near field of a supersonic section: curved leading and trailing shocks and the
pressure signature at given distances below and above it.

Unit boundary: :func:`section_near_field`; result :class:`SectionNearField` (with one
:class:`NearFieldShock` per shock). The field is the classical field of shock-expansion
theory with the reflected waves neglected:

- on each side the surface expansion is a simple wave: its characteristics of the
  outgoing family (C+ above the section, C- below) leave the surface as straight lines,
  each carrying the surface's pressure and direction, so the surface pressures are
  shock-expansion theory's (:func:`~gasdyn2d.design.section_loads.shock_expansion_loads`)
  exactly, a built-in check;
- those lines run into the leading-edge shock from behind; each crossing is a shock point
  (:func:`~gasdyn2d.characteristics.shock_points.shock_point`: upstream the free stream,
  the arriving characteristic the line's state), which weakens and turns the shock; the
  shock runs straight from crossing to crossing along the mean of its directions there;
- at the trailing edge the two surface streams turn to the common pressure and direction
  of the wake slip line (the match of shock-expansion theory); where a stream is
  compressed a trailing shock starts, marched through the lines still ahead of it with
  the same shock point (upstream the line's state, the arriving characteristic the
  uniform wake); where a stream expands, its trailing-edge fan adds lines that overtake
  the leading shock in turn.

Waves reflected from the shocks back towards the surface, and the entropy gradient
behind the curved shocks, are neglected (see :func:`section_near_field`, Notes).

References
----------
Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley, ch. 4 and 9
(shock-expansion theory, simple waves and their interaction with shocks).
Whitham, G. B. (1974), Linear and Nonlinear Waves, Wiley, ch. 9 (far-field decay of
planar N-waves; from memory).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..boundary import is_quantity
from ..boundary.results import ResultTable, optional_xarray, result_fields, unit_field
from ..characteristics.design_calls import DesignCall, frozen_array
from ..characteristics.shock_points import shock_point
from ..errors import DetachedShockError, InvalidInputError, NoSolutionError
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from ..relations.isentropic import pressure_ratio
from ..relations.oblique_shocks import oblique_shock_ratios
from ..relations.theta_beta_mach import wave_angle_from_deflection
from .section_forces import panel_coefficients, panel_geometry
from .section_loads import shock_expansion_loads
from .sections import Section

__all__ = ["NearFieldShock", "SectionNearField", "section_near_field", "DEFAULT_LINE_TURN"]

#: Default largest turn between neighbouring characteristics of one fan [rad] (0.25°).
DEFAULT_LINE_TURN = math.radians(0.25)
_CONVEX_TOLERANCE = 1e-12  # [rad]: a corner turning into the flow by more is refused
_PAD = 0.5  # [chord]: free stream ahead of / wake behind each signature
_CLEARANCE = 1e-9  # [chord]: how far a signature line must clear the section


@dataclasses.dataclass(frozen=True, repr=False)
class NearFieldShock(ResultTable):
    """One shock of a section's near field, at its start and at every crossing with a
    characteristic (wind axes: x along the flight direction, y up; lengths in chords or in
    the chord's unit). Empty arrays when the shock does not exist (a fan on that side)."""

    x: object = unit_field("", "[length] shock points along the flight direction")
    y: object = unit_field("", "[length] shock points, up (< 0 below the section)")
    wave_angle: object = unit_field("rad", "β between the flow ahead and the shock")
    direction: object = unit_field("rad", "shock direction from the flight direction")
    pressure_ratio: np.ndarray = unit_field("", "p2/p1 across the shock")
    upstream_pressure: np.ndarray = unit_field("", "p1/p∞ just ahead of the shock")
    neglected_wave: np.ndarray = unit_field(
        "", "ln(p behind the shock point / p carried by the arriving characteristic): the "
        "strength of the reflected wave the method neglects")


@dataclasses.dataclass(frozen=True, repr=False)
class SectionNearField(ResultTable):
    """Field around a planar section at incidence: shocks, surface pressures, signatures.

    Wind axes with the origin at the leading edge: x along the flight direction
    (downstream), y up. Lengths are in chords, or with ``chord`` given in its unit.
    Signatures are sampled at the characteristics crossing the line y = -h (below) or
    y = +h (above) and at both sides of each shock (two samples at one x); between
    samples p varies linearly. Rows are padded at the end with NaN to a common length.
    """

    M: float = unit_field("", "free-stream Mach number")
    alpha: object = unit_field("rad", "incidence of the chord, > 0 nose up")
    gamma: float = unit_field("", "ratio of specific heats")
    distances: object = unit_field("", "[length] heights h of the signatures below and above")
    x_upper: np.ndarray = unit_field("", "mid-chord of each upper panel [chord]")
    p_upper: np.ndarray = unit_field("", "p/p∞ on each upper panel")
    x_lower: np.ndarray = unit_field("", "mid-chord of each lower panel [chord]")
    p_lower: np.ndarray = unit_field("", "p/p∞ on each lower panel")
    cl: float = unit_field("", "lift coefficient from the surface pressures")
    cd: float = unit_field("", "wave-drag coefficient from the surface pressures")
    slip_direction: object = unit_field("rad", "wake slip line from the flight direction")
    wake_pressure_ratio: float = unit_field("", "p/p∞ on the wake slip line")
    leading_shock_above: NearFieldShock = unit_field("", "leading-edge shock, upper side")
    trailing_shock_above: NearFieldShock = unit_field("", "trailing-edge shock, upper side")
    leading_shock_below: NearFieldShock = unit_field("", "leading-edge shock, lower side")
    trailing_shock_below: NearFieldShock = unit_field("", "trailing-edge shock, lower side")
    x_above: object = unit_field("", "[length] signature abscissae above, one row per distance")
    overpressure_above: np.ndarray = unit_field("", "p/p∞ - 1 above, one row per distance")
    x_below: object = unit_field("", "[length] signature abscissae below, one row per distance")
    overpressure_below: np.ndarray = unit_field("", "p/p∞ - 1 below, one row per distance")
    length_unit: str = unit_field("", "unit of the plain-number lengths: 'chord' or 'm'",
                                  dtype=str)

    def to_xarray(self):
        """An ``xarray.Dataset`` with named dimensions: ``distance``, ``sample_below``,
        ``sample_above``, ``panel_upper``, ``panel_lower``, and one ``<shock>_point`` per
        shock (its fields as ``<shock>.<field>``); each variable's unit in its ``units``
        attribute ("chord" for lengths in chords). Needs xarray."""
        xr = optional_xarray()
        variables = {}
        for info in result_fields(type(self)):
            value = getattr(self, info.name)
            if isinstance(value, NearFieldShock):
                for inner in result_fields(NearFieldShock):
                    variables[f"{info.name}.{inner.name}"] = _data_array(
                        xr, getattr(value, inner.name), (f"{info.name}_point",), inner,
                        self.length_unit)
                continue
            variables[info.name] = _data_array(xr, value, _DIMENSIONS.get(info.name, ()), info,
                                               self.length_unit)
        return xr.Dataset(variables)


_DIMENSIONS = {"distances": ("distance",), "x_upper": ("panel_upper",),
               "p_upper": ("panel_upper",), "x_lower": ("panel_lower",),
               "p_lower": ("panel_lower",), "x_above": ("distance", "sample_above"),
               "overpressure_above": ("distance", "sample_above"),
               "x_below": ("distance", "sample_below"),
               "overpressure_below": ("distance", "sample_below")}


def _data_array(xr, value, dims, info, length_unit):
    """One field as a DataArray with its description (and unit, for plain numbers)."""
    attrs = {"long_name": info.description}
    if hasattr(value, "units"):  # a Quantity: its magnitude, its unit as pint spells it
        attrs["units"] = str(value.units)
        value = np.asarray(value.magnitude)
    elif info.description.startswith("[length]"):
        attrs["units"] = "m" if length_unit == "m" else "chord"
    elif info.pint_unit:
        attrs["units"] = info.pint_unit
    return xr.DataArray(value, dims=dims if np.ndim(value) else (), attrs=attrs)


# ------------------------------------------------------------------ one side's simple wave


class _Lines:
    """The straight characteristics of one side (side frame: the side looks up)."""

    def __init__(self, x0, y0, theta, mach, p):
        self.x0, self.y0, self.theta, self.mach, self.p = x0, y0, theta, mach, p
        self.angle = theta + np.arcsin(1.0 / mach)  # θ + μ: a C+ of the side frame
        self.cot = 1.0 / np.tan(self.angle)

    def x_at(self, h):
        return self.x0 + (h - self.y0) * self.cot


def _fan_turns(start, end, max_turn):
    """Directions of the lines of a fan turning from ``start`` to ``end`` (head to tail)."""
    count = max(1, int(math.ceil(abs(end - start) / max_turn)))
    return start + (end - start) * np.arange(count + 1) / count


def _side_flow(points, theta, M, gamma, slip, max_turn):
    """Surface states and lines of one side, in its frame (the side looks up).

    ``points`` (n+1, 2) the surface in the side frame, ``theta`` (n,) the panel directions,
    ``slip`` the wake slip direction in the side frame. Returns a dict.
    """
    nu_inf = float(prandtl_meyer_angle(M, gamma))
    first = float(theta[0])
    side = {"lead": None, "trail": None}
    if first > 0.0:  # leading-edge shock: turns the free stream by θ0
        beta = float(wave_angle_from_deflection(M, first, gamma))
        behind = oblique_shock_ratios(M, beta, gamma)
        mach0 = float(behind.M2)
        p_total = float(behind.p2_p1) / float(pressure_ratio(mach0, gamma))  # p0 behind / p∞
        side["lead"] = beta
    else:  # a centred fan, or no wave at all (θ0 = 0): p0 of the free stream
        mach0 = float(mach_from_prandtl_meyer_angle(nu_inf - first, gamma))
        p_total = 1.0 / float(pressure_ratio(M, gamma))
    invariant = first + float(prandtl_meyer_angle(mach0, gamma))  # θ + ν along the C-

    def states(directions):
        mach = mach_from_prandtl_meyer_angle(invariant - directions, gamma)
        return mach, p_total * pressure_ratio(mach, gamma)

    side["mach"], side["p"] = states(np.asarray(theta, dtype=float))
    origins, directions = [], []
    if first < 0.0:
        fan = _fan_turns(0.0, first, max_turn)
        origins.append(np.repeat(points[:1], len(fan), axis=0))
        directions.append(fan)
    for k in range(1, len(theta)):
        if theta[k] != theta[k - 1]:
            fan = _fan_turns(float(theta[k - 1]), float(theta[k]), max_turn)
            origins.append(np.repeat(points[k:k + 1], len(fan), axis=0))
            directions.append(fan)
    last_mach, last_p = float(side["mach"][-1]), float(side["p"][-1])
    turn = slip - float(theta[-1])
    if turn > 0.0:  # the stream is compressed at the trailing edge: a trailing shock
        beta = float(wave_angle_from_deflection(last_mach, turn, gamma))
        behind = oblique_shock_ratios(last_mach, beta, gamma)
        side["trail"] = (float(theta[-1]) + beta, float(behind.M2), last_p * float(behind.p2_p1))
        side["wake_p"] = side["trail"][2]
    elif turn < 0.0:  # expanded: a trailing-edge fan of more lines
        fan = _fan_turns(float(theta[-1]), slip, max_turn)
        origins.append(np.repeat(points[-1:], len(fan), axis=0))
        directions.append(fan)
        side["wake_p"] = float(states(np.array([slip]))[1][0])
    else:
        side["wake_p"] = last_p
    if directions:
        xy, th = np.concatenate(origins), np.concatenate(directions)
    else:
        xy, th = np.empty((0, 2)), np.empty(0)
    mach, p = states(th)
    side["lines"] = _Lines(xy[:, 0], xy[:, 1], th, mach, p)
    return side


def _crossings(start, start_direction, lines, order, directions):
    """March a shock from ``start`` across the lines ``order`` (in that order): each
    segment runs along the mean of the shock's directions at its two ends. Returns the
    crossing points (x, y), NaN from the first line the shock does not reach."""
    px, py = start
    previous = start_direction
    xs = np.full(len(order), np.nan)
    ys = np.full(len(order), np.nan)
    for n, j in enumerate(order):
        d = 0.5 * (previous + directions[n])
        a = lines.angle[j]
        det = math.sin(d - a)
        rx, ry = lines.x0[j] - px, lines.y0[j] - py
        if det == 0.0 or not math.isfinite(det):
            break
        s = (ry * math.cos(a) - rx * math.sin(a)) / det
        t = (math.cos(d) * ry - math.sin(d) * rx) / det
        if not (s >= 0.0 and t >= -1e-12):
            break
        px, py = px + s * math.cos(d), py + s * math.sin(d)
        xs[n], ys[n] = px, py
        previous = directions[n]
    return xs, ys


def _march_shocks(side, M, gamma, trailing_edge):
    """Both shocks of one side: crossings, ownership of the lines, traces (side frame)."""
    lines = side["lines"]
    n = len(lines.theta)
    index = np.arange(n)
    height_lead = np.full(n, np.inf)
    height_trail = np.full(n, np.inf)
    lead = trail = None
    if side["lead"] is not None:
        point = shock_point(M, 0.0, 1.0, lines.mach, lines.theta, lines.p, 1, gamma)
        xs, ys = _crossings((0.0, 0.0), side["lead"], lines, index, point.direction)
        height_lead = np.where(np.isfinite(ys), ys, np.inf)
        lead = (point, xs, ys)
    if side["trail"] is not None:
        direction0, mach_w, p_w = side["trail"]
        slip = side["slip"]
        point = shock_point(lines.mach, lines.theta, lines.p, mach_w, slip, p_w, 1, gamma)
        order = index[::-1]
        xs, ys = _crossings(trailing_edge, direction0, lines, order, point.direction[order])
        height_trail[order] = np.where(np.isfinite(ys), ys, np.inf)
        trail = (point, xs[::-1], ys[::-1])
    owned_lead = np.cumprod(height_lead < height_trail).astype(bool)
    owned_trail = np.cumprod((height_trail < height_lead)[::-1])[::-1].astype(bool)
    traces = {"lead": None, "trail": None}
    if lead is not None:
        point, xs, ys = lead
        keep = owned_lead
        beta0 = side["lead"]
        start = oblique_shock_ratios(M, beta0, gamma)
        traces["lead"] = dict(
            x=np.r_[0.0, xs[keep]], y=np.r_[0.0, ys[keep]],
            wave_angle=np.r_[beta0, point.wave_angle[keep]],
            direction=np.r_[beta0, point.direction[keep]],
            pressure_ratio=np.r_[start.p2_p1, point.p[keep]],
            upstream_pressure=np.ones(1 + keep.sum()),
            neglected_wave=np.r_[0.0, np.log(point.p[keep] / lines.p[keep])])
    if trail is not None:
        point, xs, ys = trail
        keep = owned_trail[::-1]
        order = index[::-1][keep]
        direction0, mach_w, p_w = side["trail"]
        theta_n, p_n = float(side["theta"][-1]), float(side["p"][-1])
        behind = p_w / p_n
        traces["trail"] = dict(
            x=np.r_[trailing_edge[0], xs[order]], y=np.r_[trailing_edge[1], ys[order]],
            wave_angle=np.r_[direction0 - theta_n, point.wave_angle[order]],
            direction=np.r_[direction0, point.direction[order]],
            pressure_ratio=np.r_[behind, point.p[order] / lines.p[order]],
            upstream_pressure=np.r_[p_n, lines.p[order]],
            neglected_wave=np.r_[0.0, np.log(point.p[order] / p_w)])
    alive_from = np.where(owned_lead, height_lead, np.where(owned_trail, height_trail, np.inf))
    return traces, alive_from


def _along(trace, h, name):
    """A trace's value at height h: linear between its points, constant beyond the last."""
    return float(np.interp(h, trace["y"], trace[name]))


def _shock_x(trace, h):
    y, x = trace["y"], trace["x"]
    if h <= y[-1]:
        return float(np.interp(h, y, x))
    return float(x[-1] + (h - y[-1]) / math.tan(trace["direction"][-1]))


def _signature(side, traces, alive_from, h, width):
    """(x, p/p∞ - 1) along y = h of one side, padded with NaN to ``width`` samples."""
    lines = side["lines"]
    alive = alive_from > h
    xs, ps = [], []
    lead, trail = traces["lead"], traces["trail"]
    if lead is not None:
        x_shock = _shock_x(lead, h)
        p_behind = _along(lead, h, "pressure_ratio")
        xs += [x_shock - _PAD, x_shock, x_shock]
        ps += [0.0, 0.0, p_behind - 1.0]
    line_x = lines.x_at(h)[alive]
    line_p = lines.p[alive] - 1.0
    if lead is None:
        x_first = float(line_x[0]) if line_x.size else (
            _shock_x(trail, h) if trail is not None else 0.0)
        xs.append(x_first - _PAD)
        ps.append(0.0)
    xs += list(line_x)
    ps += list(line_p)
    if trail is not None:
        x_shock = _shock_x(trail, h)
        p_up = _along(trail, h, "upstream_pressure")
        p_behind = p_up * _along(trail, h, "pressure_ratio")
        xs += [x_shock, x_shock]
        ps += [p_up - 1.0, p_behind - 1.0]
    xs.append(xs[-1] + _PAD)
    ps.append(side["wake_p"] - 1.0)
    out_x, out_p = np.full(width, np.nan), np.full(width, np.nan)
    out_x[:len(xs)], out_p[:len(ps)] = xs, ps
    return out_x, out_p


# ------------------------------------------------------------------ the public call


def _check_convex(section):
    for name, angles, sign in (("upper", section.upper_angles, 1.0),
                               ("lower", section.lower_angles, -1.0)):
        turns = sign * np.diff(angles)
        if np.any(turns > _CONVEX_TOLERANCE):
            k = int(np.argmax(turns > _CONVEX_TOLERANCE)) + 1
            raise InvalidInputError(
                f"section must be convex for section_near_field: the {name} surface turns into "
                f"the flow by {math.degrees(float(turns[k - 1])):.6g}° at its corner at x = "
                f"{getattr(section, name)[k, 0]:.6g} (limit {_CONVEX_TOLERANCE:g} rad). A "
                "concave corner starts a second shock that would have to be fitted and merged "
                "with the leading one, which this method does not do; use "
                "shock_expansion_loads for the surface pressures of such a section.")


def section_near_field(section, M1, alpha, distances, *, chord=None, gamma=1.4,
                       max_line_turn=DEFAULT_LINE_TURN):
    """The field around a convex section at incidence: curved shocks and pressure signatures.

    Parameters
    ----------
    section : Section
        A convex section (no corner turning into the flow), chord units.
    M1 : float
        Free-stream Mach number [-], > 1 (NaN gives a result of NaN).
    alpha : float or Quantity
        Incidence of the chord [rad], > 0 nose up (NaN gives a result of NaN); the
        leading-edge shock must stay attached.
    distances : float, array_like or Quantity
        Heights h of the signatures [chord, or the unit of ``chord``], each measured from
        the leading edge across the flight direction, the same on both sides; each must
        clear the section on both sides.
    chord : float or Quantity, optional
        The chord [m]. Without it every length (``distances`` in; shock points,
        signature abscissae out) is in chords; with it, they are lengths in its unit.
    gamma : float, optional
        Ratio of specific heats [-], > 1.
    max_line_turn : float or Quantity, optional
        Largest turn between neighbouring characteristics of one fan [rad] (a corner's
        centred fan is drawn with as many lines as it needs for this; default 0.25°).

    Returns
    -------
    SectionNearField

    Raises
    ------
    DetachedShockError
        The leading-edge shock detaches or leaves subsonic flow behind it.
    NoSolutionError
        A surface expands to vacuum, or the streams cannot be matched at the trailing edge.
    InvalidInputError
        Bad input, naming it: M1 <= 1, a concave section, a distance that does not clear
        the section, a Quantity of the wrong kind, an array where one value is needed.

    Notes
    -----
    Wind axes, origin at the leading edge. Each side is marched in its own frame (the
    lower side mirrored in the flight direction, so both look "up"). On a side the
    leading edge is an oblique shock (turn θ0 = δ - α > 0 into the flow) or a centred
    fan; behind it the flow is a simple wave with θ + ν constant along the crossing
    characteristics, so every line from the surface, at direction θ + μ, carries
    the surface state of its corner: the surface pressure is shock-expansion theory's.
    A corner's centred fan is drawn as lines at most ``max_line_turn`` apart. The
    leading shock meets line j at a shock point: upstream the free stream, the
    characteristic arriving from behind carries line j's (θ, p), and with
    dθ - B dp/p = 0 along it (B = √(M² - 1)/(γM²)) the shock's angle there follows
    (:func:`~gasdyn2d.characteristics.shock_points.shock_point`). From crossing to
    crossing the shock is straight, along the mean of its two directions. At the
    trailing edge the two streams turn to the slip line's direction and pressure (the
    match of :func:`~gasdyn2d.design.section_loads.shock_expansion_loads`); a compressed
    stream starts a trailing shock, marched back through the lines ahead of it (upstream
    the line's state, behind the uniform wake); an expanded one adds a fan of lines. A
    line belongs to the shock that reaches it first.

    The approximation: the waves reflected from the shocks back towards the surface are
    neglected, and with them the entropy (vorticity) gradient behind the curved shocks
    and the change they would make to the surface pressures (third order in the
    surface turn angles, as in shock-expansion theory). Each shock point measures the
    wave it neglects: ``NearFieldShock.neglected_wave``, ln(p behind the shock point / p on
    the arriving line), which is the strength of the reflected wave: it matches the
    reflected wave of the region graph's exact interaction of a wedge shock with a whole
    corner fan to 1 %, and is 0.1 % of the incident wave on a 5 % biconvex section at
    Mach 2 (falling as the square of the thickness; 14 % on a 10 % section at Mach 1.5,
    near detachment). Far from the section the
    shocks and lines form an N-wave whose shocks decay as distance^(-1/2) (Whitham
    1974, ch. 9, from memory), which the march reproduces as the lines run out.

    Inviscid, planar, perfect gas; no boundary layer (which thickens the section and
    smears the trailing-edge waves), no 3-D relief of a finite span, no detached shocks.
    Preliminary design only.

    References
    ----------
    Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley, ch. 4 and 9.
    Zucrow, M. J. and Hoffman, J. D. (1977), Gas Dynamics, vol. 2, Wiley, ch. 16 (the
    shock point of a fitted shock; chapter from memory).
    Whitham, G. B. (1974), Linear and Nonlinear Waves, Wiley, ch. 9 (from memory).

    Examples
    --------
    The fin of a made-up target drone, 5 % biconvex, at Mach 1.8 and 2°:

    >>> import numpy as np
    >>> from gasdyn2d import Section, section_near_field
    >>> fin = Section.biconvex(0.05, n=32)
    >>> field = section_near_field(fin, 1.8, np.radians(2.0), [1.0, 5.0])
    >>> round(float(field.cl), 5)
    0.09428
    >>> np.round(np.nanmax(field.overpressure_below, axis=1), 4)
    array([0.3341, 0.1826])
    """
    if not isinstance(section, Section):
        raise InvalidInputError(
            f"section must be a gasdyn2d Section (see Section.biconvex); got "
            f"{type(section).__name__}.")
    call = DesignCall("section_near_field")
    M = call.scalar("M1", M1, nan="record")
    a = call.scalar("alpha", alpha, "rad", nan="record")
    g = call.scalar("gamma", gamma, nan="record")
    call.check(1.0 < g < np.inf, "gamma", g, "a finite ratio of specific heats > 1")
    call.check(1.0 < M < np.inf, "M1", M, "finite and > 1 (supersonic flight)")
    scale = 1.0
    if chord is not None:
        scale = call.positive("chord", chord, "m", what="the section's chord")
        length = call.length
    else:
        if is_quantity(distances) and not distances.dimensionless:
            raise InvalidInputError(
                f"distances is a length ({distances.units:~}) but chord is not given: give "
                "chord= (a length) too, or give distances in chords as plain numbers.")
        length = _chord_units
    heights = call.call.take("distances", distances, "m" if chord is not None else "")
    heights = np.atleast_1d(np.asarray(heights, dtype=float))
    if heights.ndim != 1 or heights.size == 0:
        raise InvalidInputError(
            f"distances must be one value or a 1-d list of heights; got shape {heights.shape}.")
    if not np.all(np.isfinite(heights)) or np.any(heights <= 0.0):
        bad = heights[~(np.isfinite(heights) & (heights > 0.0))][0]
        raise InvalidInputError(f"distances must be finite and > 0; got {bad!r} "
                                f"(first of {heights.size}).")
    heights = heights / scale
    turn = call.scalar("max_line_turn", max_line_turn, "rad")
    call.check(1e-5 <= turn <= 0.1, "max_line_turn", turn,
               "from 1e-5 to 0.1 rad (about 0.0006° to 5.7°)", "rad")
    _check_convex(section)
    if call.nan_inputs:
        return _nan_result(section, M, a, g, heights, scale, call, length, chord is not None)
    cos_a, sin_a = math.cos(a), math.sin(a)
    rotate = np.array([[cos_a, -sin_a], [sin_a, cos_a]])  # body -> wind axes, (x, y) rows
    upper = section.upper @ rotate
    lower = section.lower @ rotate * np.array([1.0, -1.0])  # mirrored: looks up
    needed = max(float(upper[:, 1].max()), float(lower[:, 1].max())) + _CLEARANCE
    if np.any(heights <= needed):
        raise InvalidInputError(
            f"distances must clear the section on both sides: each height must exceed "
            f"{needed * scale:.6g} (the section's largest excursion from the leading edge "
            f"across the flight direction); got {heights.min() * scale:.6g}.")
    try:
        loads = shock_expansion_loads(section, M, a, gamma=g)
    except DetachedShockError as exc:
        raise DetachedShockError(f"section_near_field: {exc}") from None
    if loads.wake_unmatched:
        raise NoSolutionError(
            f"section_near_field: the two streams cannot be matched at the trailing edge "
            f"(M1 = {M:g}, alpha = {a!r} rad): no common pressure and direction with attached "
            "trailing-edge waves. Reduce the incidence.")
    slip = float(loads.slip_direction)
    sides = {}
    for name, points, theta, slip_side in (
            ("above", upper, section.upper_angles - a, slip),
            ("below", lower, a - section.lower_angles, -slip)):
        side = _side_flow(points, theta, M, g, slip_side, turn)
        side["theta"], side["slip"] = theta, slip_side
        traces, alive_from = _march_shocks(side, M, g, (points[-1, 0], points[-1, 1]))
        sides[name] = (side, traces, alive_from)
    return _package(section, M, a, g, heights, scale, call, length, sides, slip,
                    float(loads.wake_pressure_ratio), chord is not None)


def _chord_units(value):
    """A length in chords: a float or a read-only array, never a Quantity."""
    if np.ndim(value) == 0 and not isinstance(value, np.ndarray):
        return float(value)
    return frozen_array(value)


def _shock_result(trace, mirror, scale, call, length):
    if trace is None:
        empty = np.empty(0)
        return NearFieldShock(length(empty), length(empty), call.angle(empty),
                           call.angle(empty), frozen_array(empty), frozen_array(empty),
                           frozen_array(empty))
    sign = -1.0 if mirror else 1.0
    return NearFieldShock(length(scale * trace["x"]), length(sign * scale * trace["y"]),
                       call.angle(trace["wave_angle"]), call.angle(sign * trace["direction"]),
                       frozen_array(trace["pressure_ratio"]),
                       frozen_array(trace["upstream_pressure"]),
                       frozen_array(trace["neglected_wave"]))


def _package(section, M, a, g, heights, scale, call, length, sides, slip, p_wake, chord_given):
    geometry = panel_geometry(section)
    p_up, p_lo = sides["above"][0]["p"], sides["below"][0]["p"]
    q = 0.5 * g * M * M
    cl, cd, _, _ = panel_coefficients(geometry, ((p_up - 1.0) / q)[None],
                                      ((p_lo - 1.0) / q)[None], np.array([a]), True)
    signatures = {}
    for name, (side, traces, alive_from) in sides.items():
        width = len(side["lines"].theta) + 8
        rows = [_signature(side, traces, alive_from, h, width) for h in heights]
        xs = np.array([r[0] for r in rows]) * scale
        signatures[name] = (xs, np.array([r[1] for r in rows]))
    up, lo = sides["above"][1], sides["below"][1]
    return SectionNearField(
        M=M, alpha=call.angle(a), gamma=g, distances=length(heights * scale),
        x_upper=frozen_array(geometry.x_upper), p_upper=frozen_array(p_up),
        x_lower=frozen_array(geometry.x_lower), p_lower=frozen_array(p_lo),
        cl=float(cl[0]), cd=float(cd[0]), slip_direction=call.angle(slip),
        wake_pressure_ratio=p_wake,
        leading_shock_above=_shock_result(up["lead"], False, scale, call, length),
        trailing_shock_above=_shock_result(up["trail"], False, scale, call, length),
        leading_shock_below=_shock_result(lo["lead"], True, scale, call, length),
        trailing_shock_below=_shock_result(lo["trail"], True, scale, call, length),
        x_above=length(signatures["above"][0]),
        overpressure_above=frozen_array(signatures["above"][1]),
        x_below=length(signatures["below"][0]),
        overpressure_below=frozen_array(signatures["below"][1]),
        length_unit="m" if chord_given else "chord")


def _nan_result(section, M, a, g, heights, scale, call, length, chord_given):
    nan_shock = _shock_result(None, False, scale, call, length)
    rows = np.full((heights.size, 2), np.nan)
    n_up, n_lo = section.n_panels
    geometry = panel_geometry(section)
    return SectionNearField(
        M=M, alpha=call.angle(a), gamma=g, distances=length(heights * scale),
        x_upper=frozen_array(geometry.x_upper), p_upper=frozen_array(np.full(n_up, np.nan)),
        x_lower=frozen_array(geometry.x_lower), p_lower=frozen_array(np.full(n_lo, np.nan)),
        cl=math.nan, cd=math.nan, slip_direction=call.angle(math.nan),
        wake_pressure_ratio=math.nan, leading_shock_above=nan_shock,
        trailing_shock_above=nan_shock, leading_shock_below=nan_shock,
        trailing_shock_below=nan_shock, x_above=length(rows),
        overpressure_above=frozen_array(rows), x_below=length(rows),
        overpressure_below=frozen_array(rows), length_unit="m" if chord_given else "chord")
