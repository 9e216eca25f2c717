"""Supersonic flow through a planar channel with turning walls, by characteristics.

Unit boundary: :func:`channel_flow`. Walls are
:class:`gasdyn2d.characteristics.unit_processes.WallContour` objects (straight, circular
bends, or splines through points).
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary.results import ResultTable, unit_field
from .design_calls import DesignCall, frozen_array
from .fitted_shocks import FittedShock, march_fitted_channel
from .unit_processes import (
    CharacteristicNet,
    WallContour,
    axis_node_axisymmetric,
    interior_point_given_mach_angles,
    interior_nodes_stacked,
    wall_node_axisymmetric,
    check_geometry,
    mach_angle_from_nu,
    symmetry_point,
    wall_point,
)
from ..errors import InvalidInputError
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle, prandtl_meyer_angle


__all__ = ["channel_flow", "ChannelFlow"]

_MAX_ROWS = 200_000


@dataclasses.dataclass(frozen=True, repr=False)
class ChannelFlow(ResultTable):
    """Nodes of a channel flow, wall distributions, fitted shocks and how the march ended.

    Where no shock forms, ``net`` is the characteristic net. Where characteristics
    of one family cross (at ``shock_x``, ``shock_y``) the channel (planar or round) is
    marched again from the inlet with fitted shocks (:mod:`gasdyn2d.characteristics.fitted_shocks`):
    ``net`` then holds the nodes of its marching stations (x = const lines, lower to
    upper wall, a shock point twice, once on each side) without characteristic
    segments, and ``shocks`` the fitted shocks.

    ``stop_reason`` is ``"length"`` (the march reached ``length``),
    ``"mach_reflection"`` (a shock reached a wall at a turn beyond detachment, where
    only a Mach reflection exists, or a shock converging on the axis of a round duct
    grew that strong), ``"shock_crossing"`` (fitted shocks met beyond
    detachment, where no regular crossing exists; regular crossings are carried on,
    with their slip line, and a shock overtaking another of its family merges with it),
    ``"sonic"`` (a compression, or a shock, slowed the stream to M <= 1), ``"slip_line"``
    (a slip line reached a wall) or
    ``"nan"`` (a flow input was NaN: no nodes, NaN values); ``stop_x``, ``stop_y``
    is where the march stopped short. The last complete row of the characteristic
    net before the fold (``handover_*``), a line across the channel from the lower
    to the upper wall, is where the net ended.

    Pressures (``lower_wall_p_p0``, ``upper_wall_p_p0``, ``net.p_p0``) are static
    pressure over the *inlet* stagnation pressure, so the losses through shocks show.
    """

    mach_inlet: float = unit_field("")  #: uniform Mach number at the inlet x = 0
    #: "length", "mach_reflection", "shock_crossing", "sonic", "slip_line" or "nan"
    stop_reason: str = unit_field("")
    shock_x: float = unit_field("m")  #: where the net folds or the stream reaches M = 1 (else NaN)
    shock_y: float = unit_field("m")
    lower_wall_x: np.ndarray = unit_field("m")  #: lower wall nodes, in streamwise order
    lower_wall_mach: np.ndarray = unit_field("")
    lower_wall_p_p0: np.ndarray = unit_field("")  #: wall static over inlet stagnation pressure
    upper_wall_x: np.ndarray = unit_field("m")
    upper_wall_mach: np.ndarray = unit_field("")
    upper_wall_p_p0: np.ndarray = unit_field("")
    lower_wall_nodes: np.ndarray = unit_field("")  #: indices of the lower wall nodes in ``net``
    upper_wall_nodes: np.ndarray = unit_field("")  #: indices of the upper wall nodes in ``net``
    handover_x: np.ndarray = unit_field("m")  #: last complete row of nodes, lower to upper wall
    handover_y: np.ndarray = unit_field("m")
    handover_mach: np.ndarray = unit_field("")
    handover_theta: np.ndarray = unit_field("rad")
    net: CharacteristicNet | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)
    #: lower wall height at ``lower_wall_x`` (the wall nodes; the contour, not a fit)
    lower_wall_y: np.ndarray = unit_field("m", default=None)
    #: upper wall height at ``upper_wall_x``
    upper_wall_y: np.ndarray = unit_field("m", default=None)
    #: the fitted shocks (:class:`~gasdyn2d.characteristics.fitted_shocks.FittedShock`), in
    #: the order they start; a reflection from a wall starts a new entry
    shocks: tuple = dataclasses.field(default=(), metadata={"unit": ""}, repr=False)
    stop_x: float = unit_field("m", default=float("nan"))  #: where the march stopped short
    stop_y: float = unit_field("m", default=float("nan"))


def channel_flow(M_inlet, *, lower_wall, upper_wall, length, n_points=41, gamma=1.4,
                 geometry="planar"):
    """March a uniform supersonic stream down a channel with given walls, planar or round.

    Parameters
    ----------
    M_inlet : float
        Mach number of the uniform stream crossing x = 0 parallel to the x
        axis [-], > 1. NaN gives a result of NaN (``stop_reason`` "nan").
    lower_wall, upper_wall : WallContour
        Wall contours y(x) [m]; both must be parallel to the x axis at x = 0
        and the upper above the lower. Give sharp corners as short arcs
        (:meth:`WallContour.bend` with a small radius): a corner is resolved
        over one mesh spacing. ``lower_wall=None`` is the centreline of a
        symmetric channel (planar) or the axis of a round duct.
    length : float or Quantity
        Channel length to march [m]; every length of the result is in its
        unit (metres for a plain number).
    n_points : int, optional
        Nodes on the inlet line (>= 3); rows alternate n_points and
        n_points - 1 nodes.
    gamma : float, optional
        Ratio of specific heats [-].
    geometry : {"planar", "axisymmetric"}, optional
        Planar (per unit depth) or round: y is then the radius, and a lower
        wall is a centre body (y > 0).

    Returns
    -------
    ChannelFlow

    Raises
    ------
    InvalidInputError
        M_inlet not above 1, walls not parallel to the stream at the inlet,
        crossing there or NaN (a wall is geometry), bad ``length``,
        ``n_points`` or ``geometry``, an array where one value is wanted.

    Notes
    -----
    Rows of nodes are marched downstream: each pair of neighbours gives a new
    interior node (its C+ from the lower one, its C- from the upper one), and
    every other row gains a node on each wall, where the wall angle fixes θ
    and the arriving invariant fixes ν. Node states are exact functions of the
    invariants; positions are second-order accurate. In uniform regions (a
    fan fully reflected, two fans fully crossed) the state is therefore exact
    to rounding, e.g. ν = ν1 + 2δ on a straight wall after the fan of a turn δ
    on the opposite wall has reflected from it.

    When two characteristics of one family cross (a compression steepening into
    a shock, at ``shock_x``, ``shock_y``), the channel is marched again from
    the inlet with fitted shocks
    (:func:`gasdyn2d.characteristics.fitted_shocks.march_fitted_channel`: an
    inverse marching scheme, p, θ and the streamline's stagnation pressure
    traced back along C+, C- and the streamline; shock points from the
    oblique-shock relations and the characteristic arriving from behind;
    regular reflections from the walls; crossings of two shocks, with the slip
    line between the transmitted shocks carried on; shocks of one family that meet
    merge). It ends at ``length``, or where a reflection would have to be a Mach
    reflection (``"mach_reflection"``; in a round duct, wherever a shock reaches the
    axis), shocks cross beyond detachment (``"shock_crossing"``) or the flow becomes
    subsonic (``"sonic"``); ``stop_x``, ``stop_y`` say where. In a round duct the
    compatibility relations carry the axisymmetric source term. Pressures are
    static over the *inlet* stagnation pressure, so losses through shocks show.
    Boundary layers, and their interaction with the shocks (thickening,
    separation), are not modelled.

    References
    ----------
    Zucrow, M. J. & Hoffman, J. D. (1977), *Gas Dynamics*, Vol. 2, ch. 16 (chapter from memory).

    Examples
    --------
    A made-up Mach 2.2 test-section diffuser whose roof turns up by 6° over
    a 0.2 m arc, floor straight:

    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import WallContour
    >>> from gasdyn2d.characteristics.channels import channel_flow
    >>> flow = channel_flow(2.2, lower_wall=WallContour.straight(0.0),
    ...                     upper_wall=WallContour.bend(0.1, 0.05, np.radians(6.0), 0.2),
    ...                     length=0.5, n_points=31)
    >>> flow.stop_reason
    'length'
    >>> round(float(flow.lower_wall_mach.max()), 4)   # after the fan has reflected: ν1 + 12°
    2.7051

    With the roof turning down by 6° at a corner instead, the corner's shock
    reflects from the floor, and the floor pressure behind it is the exact
    regular reflection's (p3/p01 = 0.18337):

    >>> corner = channel_flow(2.2, lower_wall=WallContour.straight(0.0),
    ...                       upper_wall=WallContour.bend(0.1, 0.05, np.radians(-6.0), 1e-4),
    ...                       length=0.3, n_points=21)
    >>> corner.stop_reason, [shock.end for shock in corner.shocks]
    ('length', ['wall', 'length'])
    >>> round(float(np.interp(0.25, corner.lower_wall_x, corner.lower_wall_p_p0)), 5)
    0.18337
    """
    call = DesignCall("channel_flow")
    M = call.scalar("M_inlet", M_inlet, nan="record")
    g = call.scalar("gamma", gamma, nan="record")
    L = call.positive("length", length, "m")
    call.check(1.0 < g < np.inf, "gamma", g, "a finite ratio of specific heats > 1")
    call.check(1.0 < M < np.inf, "M_inlet", M, "finite and > 1")
    n = call.count("n_points", n_points, 3, 20_000)
    axisymmetric = check_geometry(geometry)
    y_low = _inlet_height("lower_wall", lower_wall, axisymmetric)
    y_up = _inlet_height("upper_wall", upper_wall, axisymmetric)
    if not y_up > y_low:
        raise InvalidInputError(
            f"upper_wall must lie above lower_wall at x = 0; got heights {y_up:g} m and "
            f"{y_low:g} m{' (the centreline or axis)' if lower_wall is None else ''}.")
    if call.nan_inputs:
        return _nan_channel(call, M)
    march = _march_channel(M, g, lower_wall, upper_wall, L, n, y_low, y_up,
                           "axisymmetric" if axisymmetric else "planar")
    if march[2] == "shock":
        floor = WallContour.straight(0.0) if lower_wall is None else lower_wall
        fitted = march_fitted_channel(M, g, floor, upper_wall, L, n,
                                      geometry="axisymmetric" if axisymmetric else "planar")
        return _fitted_result(march, fitted, M, g, call)
    return _channel_result(march, M, g, call)


def _inlet_height(name, wall, axisymmetric):
    """Height [m] of a wall at the inlet x = 0 (0 for the centreline or axis, ``None``)."""
    if wall is None and name == "lower_wall":
        return 0.0
    if not isinstance(wall, WallContour):
        raise InvalidInputError(f"{name} must be a WallContour"
                                + (" or None (the centreline or axis)" if name == "lower_wall"
                                   else "") + f"; got {type(wall).__name__}.")
    height, slope = float(wall.height(0.0)), float(wall.slope(0.0))
    if not (np.isfinite(height) and np.isfinite(slope)):
        raise InvalidInputError(
            f"{name} must have a finite height and slope at the inlet x = 0; got height "
            f"{height!r} m and slope {slope!r}. A wall is geometry: it cannot be NaN.")
    if abs(slope) > 1e-9:
        raise InvalidInputError(
            f"{name} must be parallel to the inflow at x = 0; its slope there is "
            f"{slope:.6g} (limit 1e-9). Start the wall straight, or move x = 0.")
    if axisymmetric and name == "lower_wall" and not height > 0.0:
        raise InvalidInputError(
            f"lower_wall must lie above the axis (y > 0) in an axisymmetric channel; got "
            f"height {height:g} m at x = 0. Give lower_wall=None for a round duct without "
            "a centre body.")
    return height


@dataclasses.dataclass
class _Row:
    x: np.ndarray
    y: np.ndarray
    theta: np.ndarray
    nu: np.ndarray
    mu: np.ndarray
    index: np.ndarray  # global node numbers
    lower_on_wall: bool
    upper_on_wall: bool
    z: np.ndarray | None = None  # cot μ, axisymmetric rows only
    s: np.ndarray | None = None  # sin θ / y (∂θ/∂y on the axis), axisymmetric rows only


class _Nodes:
    """Growing store of nodes and segments (appended row by row)."""

    def __init__(self):
        self.parts = []  # (x, y, theta, nu)
        self.count = 0
        self.plus, self.minus = [], []
        self.lower, self.upper = [], []  # global indices of wall nodes

    def add(self, x, y, theta, nu, *more):
        """Append nodes (x, y, θ, ν and, for axisymmetric rows, the rest of their records)."""
        index = np.arange(self.count, self.count + len(x))
        self.parts.append((x, y, theta, nu) + more)
        self.count += len(x)
        return index

    def arrays(self):
        return [np.concatenate([p[k] for p in self.parts]) for k in range(4)]

    def records(self):
        """All node records (axisymmetric rows: x, y, θ, ν, z, μ, s), shape (7, count)."""
        return np.array([np.concatenate([p[k] for p in self.parts])
                         for k in range(len(self.parts[0]))])


def _march_channel(M, gamma, lower_wall, upper_wall, length, n, y_low, y_up, geometry):
    nu0 = float(prandtl_meyer_angle(M, gamma))
    y = np.linspace(y_low, y_up, n)
    return march_rows(np.zeros(n), y, np.zeros(n), np.full(n, nu0), lower_wall, upper_wall,
                      gamma, lambda row: np.min(row.x) > length, geometry)


def march_rows(x, y, theta, nu, lower_wall, upper_wall, gamma, stop, geometry="planar"):
    """Plain core: march rows of nodes downstream from an initial data line.

    ``x, y, theta, nu`` give the initial line from the lower to the upper
    boundary (both end nodes on the boundaries). ``lower_wall`` is a
    WallContour or None for the symmetry line y = 0 (the axis, in
    axisymmetric flow); ``stop(row)`` is asked before every step. Returns
    (nodes, last row, stop reason, fold position).

    With ``geometry="axisymmetric"`` y is the radius and the axisymmetric
    unit processes march the rows; a node on the axis takes ∂θ/∂y, the limit
    of sin θ / y there, from the first interior node of its own row.
    """
    nodes = _Nodes()
    axisymmetric = check_geometry(geometry)
    if axisymmetric:
        x, y, theta, nu = (np.asarray(v, dtype=float) for v in (x, y, theta, nu))
        mu = mach_angle_from_nu(nu, gamma)
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.sin(theta) / y
        if y[0] == 0.0:  # on the axis: ∂θ/∂y from the next node of the line
            ratio[0] = ratio[1]
        z = 1.0 / np.tan(mu)
        row = _Row(x, y, theta, nu, mu, nodes.add(x, y, theta, nu, z, mu, ratio), True, True,
                   z, ratio)
    else:
        row = _Row(x, y, theta, nu, mach_angle_from_nu(nu, gamma), nodes.add(x, y, theta, nu),
                   True, True)
    nodes.lower.append(row.index[0])
    nodes.upper.append(row.index[-1])
    reason, fold = "length", (np.nan, np.nan)
    advance = _next_row_axisymmetric if axisymmetric else _next_row
    for _ in range(_MAX_ROWS):
        if stop(row):
            break
        with np.errstate(all="ignore"):  # folded or sonic nodes are caught by the checks
            new, status, where = advance(row, lower_wall, upper_wall, gamma)
        if status != "ok":
            reason, fold = status, where
            break
        more = (new.z, new.mu, new.s) if axisymmetric else ()
        new.index = nodes.add(new.x, new.y, new.theta, new.nu, *more)
        _connect(nodes, row, new)
        row = new
    return nodes, row, reason, fold


def _next_row(row, lower_wall, upper_wall, gamma):
    """Interior nodes from neighbouring pairs, plus wall nodes on alternate rows."""
    x3, y3, th3, nu3, tp, tm, mu3 = interior_point_given_mach_angles(
        row.x[:-1], row.y[:-1], row.theta[:-1], row.nu[:-1], row.mu[:-1],
        row.x[1:], row.y[1:], row.theta[1:], row.nu[1:], row.mu[1:], gamma)
    parts = [(x3, y3, th3, nu3)]
    checks = [tp, tm]
    if not row.lower_on_wall and lower_wall is None:
        w = symmetry_point(row.x[0], row.y[0], row.theta[0], row.nu[0], gamma)
        parts.insert(0, tuple(np.atleast_1d(v) for v in w[:4]))
        checks.append(np.atleast_1d(w[4]))
    elif not row.lower_on_wall:
        w = wall_point(row.x[0], row.y[0], row.theta[0], row.nu[0], lower_wall, "lower", gamma)
        parts.insert(0, tuple(np.atleast_1d(v) for v in w[:4]))
        checks.append(np.atleast_1d(w[4]))
    if not row.upper_on_wall:
        w = wall_point(row.x[-1], row.y[-1], row.theta[-1], row.nu[-1], upper_wall, "upper", gamma)
        parts.append(tuple(np.atleast_1d(v) for v in w[:4]))
        checks.append(np.atleast_1d(w[4]))
    x, y, theta, nu = (np.concatenate([p[k] for p in parts]) for k in range(4))
    if np.any(~(nu > 0.0)):  # the stream has been compressed to M = 1
        k = int(np.argmin(row.nu))  # the slowest upstream node, within one cell of it
        return None, "sonic", (float(row.x[k]), float(row.y[k]))
    folded = np.concatenate([~(c > 0) for c in checks[:2]])
    walls_folded = [~(c > 0) for c in checks[2:]]
    if np.any(folded) or any(np.any(w) for w in walls_folded):
        return None, "shock", _fold_position(row, folded, walls_folded)
    new = _Row(x, y, theta, nu, mach_angle_from_nu(nu, gamma), None,
               not row.lower_on_wall, not row.upper_on_wall)
    return new, "ok", None


def _next_row_axisymmetric(row, lower_wall, upper_wall, gamma):
    """:func:`_next_row` with the axisymmetric unit processes (node records carry cot μ)."""
    records = np.array([row.x, row.y, row.theta, row.nu, row.z, row.mu, row.s])
    upstream = np.stack([records[:, :-1], records[:, 1:]], axis=1)  # (7, 2, m): C+ row 0
    interior, t_plus, t_minus = interior_nodes_stacked(upstream, gamma)
    parts = [interior]
    checks = [t_plus, t_minus]
    if not row.lower_on_wall:
        if lower_wall is None:  # the axis: ∂θ/∂y from the first interior node of this row
            slope = interior[6][:1]
            node, t_char = axis_node_axisymmetric(records[:, :1], slope, gamma)
        else:
            node, t_char = wall_node_axisymmetric(records[:, :1], lower_wall, "lower", gamma)
        parts.insert(0, node)
        checks.append(np.atleast_1d(t_char))
    if not row.upper_on_wall:
        node, t_char = wall_node_axisymmetric(records[:, -1:], upper_wall, "upper", gamma)
        parts.append(node)
        checks.append(np.atleast_1d(t_char))
    x, y, theta, nu, z, mu, ratio = (np.concatenate([np.atleast_1d(p[k]) for p in parts])
                                     for k in range(7))
    if np.any(~(nu > 0.0)):  # the stream has been compressed to M = 1
        k = int(np.argmin(row.nu))
        return None, "sonic", (float(row.x[k]), float(row.y[k]))
    folded = np.concatenate([~(c > 0) for c in checks[:2]])
    walls_folded = [~(c > 0) for c in checks[2:]]
    if np.any(folded) or any(np.any(w) for w in walls_folded):
        return None, "shock", _fold_position(row, folded, walls_folded)
    new = _Row(x, y, theta, nu, mu, None, not row.lower_on_wall, not row.upper_on_wall, z, ratio)
    return new, "ok", None


def _fold_position(row, folded, walls_folded):
    """Midpoint of the upstream pair whose new node folded (first in streamwise order)."""
    m = row.x.size - 1
    pair = np.concatenate([np.flatnonzero(folded[:m]), np.flatnonzero(folded[m:])])
    xs = [0.5 * (row.x[k] + row.x[k + 1]) for k in pair]
    ys = [0.5 * (row.y[k] + row.y[k + 1]) for k in pair]
    ends = ([0] if not row.lower_on_wall else []) + ([m] if not row.upper_on_wall else [])
    for end, bad in zip(ends, walls_folded):
        if np.any(bad):
            xs.append(row.x[end])
            ys.append(row.y[end])
    k = int(np.argmin(xs))
    return float(xs[k]), float(ys[k])


def _connect(nodes, row, new):
    """C+ and C- segments from ``row`` to ``new``; wall nodes recorded in order."""
    offset = 0 if row.lower_on_wall else 1
    interior = new.index[offset:offset + row.x.size - 1]
    nodes.plus.append(np.column_stack([row.index[:-1], interior]))
    nodes.minus.append(np.column_stack([row.index[1:], interior]))
    if not row.lower_on_wall:
        nodes.minus.append(np.array([[row.index[0], new.index[0]]]))
        nodes.lower.append(new.index[0])
    if not row.upper_on_wall:
        nodes.plus.append(np.array([[row.index[-1], new.index[-1]]]))
        nodes.upper.append(new.index[-1])


def _channel_result(march, M, gamma, call):
    nodes, row, reason, fold = march
    x, y, theta, nu = nodes.arrays()
    net = CharacteristicNet.from_nodes(
        x, y, theta, nu, np.concatenate(nodes.plus + [np.empty((0, 2), np.intp)]),
        np.concatenate(nodes.minus + [np.empty((0, 2), np.intp)]), gamma)
    lower, upper = np.array(nodes.lower), np.array(nodes.upper)
    row_mach = mach_from_prandtl_meyer_angle(row.nu, gamma)
    return ChannelFlow(
        mach_inlet=M, stop_reason=reason,
        shock_x=call.length(fold[0]), shock_y=call.length(fold[1]),
        lower_wall_x=call.length(x[lower]), lower_wall_mach=frozen_array(net.mach[lower]),
        lower_wall_p_p0=frozen_array(net.p_p0[lower]),
        upper_wall_x=call.length(x[upper]), upper_wall_mach=frozen_array(net.mach[upper]),
        upper_wall_p_p0=frozen_array(net.p_p0[upper]),
        lower_wall_nodes=frozen_array(lower, np.intp),
        upper_wall_nodes=frozen_array(upper, np.intp),
        handover_x=call.length(row.x), handover_y=call.length(row.y),
        handover_mach=frozen_array(row_mach), handover_theta=call.angle(row.theta),
        net=call.net(net), lower_wall_y=call.length(y[lower]),
        upper_wall_y=call.length(y[upper]), stop_x=call.length(fold[0]),
        stop_y=call.length(fold[1]),
    )


def _fitted_result(march, fitted, M, gamma, call):
    """The result of a planar channel marched with fitted shocks; the characteristic net's
    fold and last row are kept as where the shock formed and where the net ended."""
    _, row, _, fold = march
    counts = np.array([y.size for y in fitted.y], dtype=np.intp)
    x = np.repeat(fitted.station_x, counts)
    y, mach, theta, p_p0 = (np.concatenate(v) for v in (fitted.y, fitted.mach, fitted.theta,
                                                        fitted.p_p0))
    upper = np.cumsum(counts) - 1
    lower = upper - counts + 1
    no_segments = np.empty((0, 2), np.intp)
    net = CharacteristicNet(x, y, mach, theta, p_p0, no_segments, no_segments)
    shocks = tuple(FittedShock(family=int(f), x=call.length(sx), y=call.length(sy),
                               wave_angle=call.angle(beta), p2_p1=frozen_array(ratio), end=end)
                   for f, sx, sy, beta, ratio, end in fitted.shocks)
    row_mach = mach_from_prandtl_meyer_angle(row.nu, gamma)
    return ChannelFlow(
        mach_inlet=M, stop_reason=fitted.reason,
        shock_x=call.length(fold[0]), shock_y=call.length(fold[1]),
        lower_wall_x=call.length(x[lower]), lower_wall_mach=frozen_array(mach[lower]),
        lower_wall_p_p0=frozen_array(p_p0[lower]),
        upper_wall_x=call.length(x[upper]), upper_wall_mach=frozen_array(mach[upper]),
        upper_wall_p_p0=frozen_array(p_p0[upper]),
        lower_wall_nodes=frozen_array(lower, np.intp),
        upper_wall_nodes=frozen_array(upper, np.intp),
        handover_x=call.length(row.x), handover_y=call.length(row.y),
        handover_mach=frozen_array(row_mach), handover_theta=call.angle(row.theta),
        net=call.net(net), lower_wall_y=call.length(y[lower]),
        upper_wall_y=call.length(y[upper]), shocks=shocks,
        stop_x=call.length(fitted.stop_position[0]), stop_y=call.length(fitted.stop_position[1]),
    )


def _nan_channel(call, M):
    """The result of a channel whose flow input was NaN: NaN values, no nodes."""
    empty, nowhere = np.empty(0), np.empty(0, dtype=np.intp)
    net = CharacteristicNet(empty, empty, empty, empty, empty, np.empty((0, 2), np.intp),
                            np.empty((0, 2), np.intp))
    return ChannelFlow(
        mach_inlet=M, stop_reason="nan", shock_x=call.length(np.nan),
        shock_y=call.length(np.nan), lower_wall_x=call.length(empty),
        lower_wall_mach=frozen_array(empty), lower_wall_p_p0=frozen_array(empty),
        upper_wall_x=call.length(empty), upper_wall_mach=frozen_array(empty),
        upper_wall_p_p0=frozen_array(empty), lower_wall_nodes=frozen_array(nowhere, np.intp),
        upper_wall_nodes=frozen_array(nowhere, np.intp), handover_x=call.length(empty),
        handover_y=call.length(empty), handover_mach=frozen_array(empty),
        handover_theta=call.angle(empty), net=call.net(net), lower_wall_y=call.length(empty),
        upper_wall_y=call.length(empty), stop_x=call.length(np.nan), stop_y=call.length(np.nan))
