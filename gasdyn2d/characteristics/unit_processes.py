"""Planar method of characteristics: unit processes on the two Riemann invariants.

In steady, planar, homentropic and irrotational supersonic flow of a perfect gas
the flow direction θ and the Prandtl–Meyer angle ν obey two compatibility
relations that integrate exactly:

    along a C+ characteristic, dy/dx = tan(θ + μ):   θ - ν = const  (plus invariant)
    along a C- characteristic, dy/dx = tan(θ - μ):   θ + ν = const  (minus invariant)

with μ = asin(1/M) the Mach angle. Every unit process below therefore finds
the *state* of a new node exactly (to rounding) from the invariants it
receives; only its *position* is approximated, by straight characteristic
segments whose direction is the average of the directions at their two ends
(the averaged-coefficient, or trapezoidal, corrector). That makes node
positions second-order accurate in the mesh spacing. Where the state of the new
node depends on its position (a point on a prescribed curved wall) the
predictor-corrector is iterated.

All functions here are the plain core: floats or ndarrays, radians, no pint.
They broadcast like ufuncs, so a whole characteristic line (or a diagonal of
a characteristic net) is processed in one call.

Naming: point 1 is the upstream neighbour on the C+ through the new point
(below it), point 2 the upstream neighbour on the C- through it (above it).
Each process also returns the signed lengths ``t_plus`` / ``t_minus`` /
``t_stream`` travelled from the upstream points along the straight segments;
a length <= 0 means characteristics of one family have crossed (the net has
folded: a shock has formed there) and the node is not valid.
"""

from __future__ import annotations

import dataclasses
import numbers

import numpy as np

from .. import _numerics as nx
from ..boundary.results import ResultTable, unit_field
from ..errors import InvalidInputError
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle
from ..relations.isentropic import mach_angle_of, pressure_ratio

__all__ = [
    "mach_angle_from_nu",
    "state_from_invariants",
    "interior_point",
    "symmetry_point",
    "wall_point",
    "free_boundary_point",
    "cancellation_point",
    "WallContour",
    "CharacteristicNet",
]

_WALL_ITERATIONS = 6  # predictor + correctors, stopping once the node no longer moves


def check_design_input(value, name, ok, requirement, unit_text=""):
    """Raise InvalidInputError unless the scalar ``value`` is finite and ``ok`` (NaN fails too).

    For the design tools, which compute one case: unlike the vectorised
    relations they have no ``errors="nan"`` mode.
    """
    if not (bool(ok) and np.isfinite(value)):
        raise InvalidInputError(f"{name} must be {requirement}; got "
                                f"{nx.format_value(value, unit_text)}.")


def check_line_count(n):
    """An integer number of fan lines from 2 to 5000."""
    if isinstance(n, bool) or not isinstance(n, numbers.Integral) or n < 2:
        raise InvalidInputError(
            f"n_characteristics must be an integer >= 2; got {n!r}. Use 20-200 lines: "
            "the area-ratio error falls as n^(-4/3).")
    if n > 5000:
        raise InvalidInputError(f"n_characteristics must be <= 5000; got {n}.")
    return int(n)


def mach_angle_from_nu(nu, gamma=1.4):
    """Plain core: Mach angle μ [rad] of the flow whose Prandtl–Meyer angle is ``nu`` [rad].

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import mach_angle_from_nu
    >>> round(float(np.degrees(mach_angle_from_nu(np.radians(26.379760813416457)))), 9)
    30.0
    """
    return mach_angle_of(mach_from_prandtl_meyer_angle(nu, gamma))


def state_from_invariants(minus_invariant, plus_invariant):
    """Plain core: (θ, ν) [rad] from θ + ν (carried on a C-) and θ - ν (carried on a C+).

    Notes
    -----
    θ = (K- + K+)/2 and ν = (K- - K+)/2 with K- = θ + ν, K+ = θ - ν.

    Examples
    --------
    >>> from gasdyn2d.characteristics.unit_processes import state_from_invariants
    >>> state_from_invariants(0.5, -0.3)
    (0.1, 0.4)
    """
    theta = 0.5 * (np.asarray(minus_invariant) + plus_invariant)
    nu = 0.5 * (np.asarray(minus_invariant) - plus_invariant)
    return _plain(theta), _plain(nu)


def _plain(value):
    value = np.asarray(value, dtype=float)
    return float(value) if value.ndim == 0 else value


def _intersect(x1, y1, angle1, x2, y2, angle2):
    """Intersection of the ray from (x1, y1) at ``angle1`` with the line through
    (x2, y2) at ``angle2``; returns (x, y, t1, t2), the signed lengths along each."""
    c1, s1 = np.cos(angle1), np.sin(angle1)
    c2, s2 = np.cos(angle2), np.sin(angle2)
    dx, dy = x2 - x1, y2 - y1
    with np.errstate(divide="ignore", invalid="ignore"):
        det = s1 * c2 - c1 * s2  # sin(angle1 - angle2)
        t1 = (c2 * dy - s2 * dx) / det
        t2 = (c1 * dy - s1 * dx) / det
    return x1 + t1 * c1, y1 + t1 * s1, t1, t2


def interior_point(x1, y1, theta1, nu1, x2, y2, theta2, nu2, gamma=1.4):
    """Plain core: new interior node from point 1 (on its C+) and point 2 (on its C-).

    Parameters
    ----------
    x1, y1, theta1, nu1 : float or ndarray
        Position [m] and state [rad] of the upstream point on the C+ (below).
    x2, y2, theta2, nu2 : float or ndarray
        Position [m] and state [rad] of the upstream point on the C- (above).
    gamma : float, optional
        Ratio of specific heats [-].

    Returns
    -------
    x3, y3, theta3, nu3, t_plus, t_minus
        Position [m] and state [rad] of the new node, and the signed lengths
        [m] of the C+ segment 1→3 and the C- segment 2→3 (<= 0: folded net).

    Notes
    -----
    θ3 - ν3 = θ1 - ν1 and θ3 + ν3 = θ2 + ν2 exactly; the segments are straight
    with directions ((θ+μ)1 + (θ+μ)3)/2 and ((θ-μ)2 + (θ-μ)3)/2.

    References
    ----------
    Zucrow, M. J. & Hoffman, J. D. (1977), *Gas Dynamics*, Vol. 2, ch. 16 (chapter from memory)
    (unit processes of the method of characteristics, averaged-coefficient
    predictor-corrector).

    Examples
    --------
    Two points of a uniform Mach 2 stream give a node of the same state:

    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import interior_point
    >>> nu = np.radians(26.379760813416457)
    >>> x3, y3, th3, nu3, tp, tm = interior_point(0.0, 0.0, 0.0, nu, 0.0, 1.0, 0.0, nu)
    >>> round(float(x3), 12), round(float(y3), 12)   # √3/2, 1/2 for μ = 30°
    (0.866025403784, 0.5)
    """
    mu1 = mach_angle_from_nu(nu1, gamma)
    mu2 = mach_angle_from_nu(nu2, gamma)
    return _interior(x1, y1, theta1, nu1, mu1, x2, y2, theta2, nu2, mu2, gamma)[:6]


def _interior(x1, y1, theta1, nu1, mu1, x2, y2, theta2, nu2, mu2, gamma):
    """:func:`interior_point` given the upstream Mach angles; also returns μ3."""
    theta3 = 0.5 * ((theta2 + nu2) + (theta1 - nu1))
    nu3 = 0.5 * ((theta2 + nu2) - (theta1 - nu1))
    mu3 = mach_angle_from_nu(nu3, gamma)
    plus_direction = 0.5 * ((theta1 + mu1) + (theta3 + mu3))
    minus_direction = 0.5 * ((theta2 - mu2) + (theta3 - mu3))
    x3, y3, t_plus, t_minus = _intersect(x1, y1, plus_direction, x2, y2, minus_direction)
    return x3, y3, theta3, nu3, t_plus, t_minus, mu3


def symmetry_point(x2, y2, theta2, nu2, gamma=1.4, y_axis=0.0):
    """Plain core: node on a symmetry line y = ``y_axis`` below point 2, reached by its C-.

    Returns
    -------
    x3, y3, theta3, nu3, t_minus
        θ3 = 0 and ν3 = θ2 + ν2 exactly; ``t_minus`` is the signed C- length.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import symmetry_point
    >>> x3, y3, th3, nu3, t = symmetry_point(0.0, 1.0, 0.1, 0.3)
    >>> float(th3), round(float(nu3), 15)
    (0.0, 0.4)
    """
    theta3 = np.zeros_like(np.asarray(theta2 + nu2, dtype=float))
    nu3 = theta2 + nu2
    direction = 0.5 * ((theta2 - mach_angle_from_nu(nu2, gamma)) - mach_angle_from_nu(nu3, gamma))
    t_minus = (y_axis - y2) / np.sin(direction)
    x3 = x2 + t_minus * np.cos(direction)
    return x3, y_axis + 0.0 * x3, theta3, nu3, t_minus


def cancellation_point(x1, y1, theta1, nu1, xb, yb, thetab, gamma=1.4):
    """Plain core: wall node that turns the flow so that the C+ from point 1 is not reflected.

    The wall is the streamline from the previous boundary node (xb, yb) with
    flow angle ``thetab``; the new node keeps the state of point 1 (the flow
    between them is uniform, the C+ is straight), which is how a minimum-length
    nozzle contour cancels the waves of its corner fan.

    Returns
    -------
    x3, y3, theta3, nu3, t_plus, t_stream
    """
    theta3 = np.asarray(theta1, dtype=float) + 0.0 * xb
    nu3 = np.asarray(nu1, dtype=float) + 0.0 * xb
    plus_direction = theta1 + mach_angle_from_nu(nu1, gamma)
    stream_direction = 0.5 * (thetab + theta3)
    x3, y3, t_plus, t_stream = _intersect(x1, y1, plus_direction, xb, yb, stream_direction)
    return x3, y3, theta3, nu3, t_plus, t_stream


def free_boundary_point(x1, y1, theta1, nu1, xb, yb, thetab, nu_boundary, gamma=1.4):
    """Plain core: node on an upper constant-pressure boundary, reached by the C+ from point 1.

    Parameters
    ----------
    x1, y1, theta1, nu1 : float or ndarray
        Upstream point on the C+ (below the boundary).
    xb, yb, thetab : float or ndarray
        Previous node on the boundary streamline and its flow angle [rad].
    nu_boundary : float or ndarray
        Prandtl–Meyer angle [rad] fixed by the boundary pressure.

    Returns
    -------
    x3, y3, theta3, nu3, t_plus, t_stream

    Notes
    -----
    ν3 = ν_boundary and θ3 = (θ1 - ν1) + ν_boundary exactly. The boundary
    segment has direction (θb + θ3)/2, the C+ segment ((θ+μ)1 + (θ+μ)3)/2.
    An expansion arriving at the boundary leaves as a compression of equal
    strength (the boundary turns the flow by twice the incoming change).

    Examples
    --------
    >>> from gasdyn2d.characteristics.unit_processes import free_boundary_point
    >>> *_, th3, nu3, tp, ts = free_boundary_point(0.0, 0.0, 0.0, 0.5, -1.0, 1.0, 0.1, 0.45)
    >>> round(float(th3), 15), float(nu3)
    (-0.05, 0.45)
    """
    nu3 = np.asarray(nu_boundary, dtype=float) + 0.0 * xb
    theta3 = (theta1 - nu1) + nu3
    mu3 = mach_angle_from_nu(nu3, gamma)
    plus_direction = 0.5 * ((theta1 + mach_angle_from_nu(nu1, gamma)) + (theta3 + mu3))
    stream_direction = 0.5 * (thetab + theta3)
    x3, y3, t_plus, t_stream = _intersect(x1, y1, plus_direction, xb, yb, stream_direction)
    return x3, y3, theta3, nu3, t_plus, t_stream


@dataclasses.dataclass(frozen=True)
class WallContour:
    """A wall y(x) with its slope, given as a smooth curve through points or as a bend.

    Build one with :meth:`straight`, :meth:`bend` (straight, circular arc,
    straight: a smooth turn) or :meth:`through_points` (cubic spline).
    ``height(x)`` [m] and ``slope(x)`` [-] are vectorised; beyond the last
    point the wall continues straight.
    """

    height: object  #: callable x -> y [m]
    slope: object  #: callable x -> dy/dx [-]

    @classmethod
    def straight(cls, y0, angle=0.0):
        """Straight wall through (0, ``y0``) at ``angle`` [rad] to the x axis."""
        tangent = np.tan(angle)
        return cls(lambda x: y0 + tangent * np.asarray(x, dtype=float),
                   lambda x: tangent + 0.0 * np.asarray(x, dtype=float))

    @classmethod
    def bend(cls, y0, x_start, turn, radius):
        """Wall at height ``y0`` up to ``x_start``, then a circular arc of ``radius`` [m]
        turning it by ``turn`` [rad] (> 0 turns the wall towards +y), then straight.

        Examples
        --------
        >>> import numpy as np
        >>> from gasdyn2d.characteristics.unit_processes import WallContour
        >>> wall = WallContour.bend(1.0, 2.0, np.radians(10.0), 5.0)
        >>> round(float(np.degrees(np.arctan(wall.slope(100.0)))), 10)
        10.0
        """
        if not (np.isfinite(radius) and radius > 0):
            raise InvalidInputError(f"radius must be finite and > 0; got {radius!r} m.")
        if not (np.isfinite(turn) and abs(turn) < 0.5 * np.pi):
            raise InvalidInputError(
                f"turn must be finite and smaller than π/2 in size; got {turn!r} rad.")
        sign = 1.0 if turn >= 0 else -1.0
        turn = abs(turn)
        x_end = x_start + radius * np.sin(turn)
        y_end = y0 + sign * radius * (1.0 - np.cos(turn))

        def height(x):
            x = np.asarray(x, dtype=float)
            s = np.clip(x - x_start, 0.0, x_end - x_start)
            arc = y0 + sign * (radius - np.sqrt(np.maximum(radius**2 - s * s, 0.0)))
            after = y_end + sign * np.tan(turn) * (x - x_end)
            return np.where(x <= x_end, arc, after)

        def slope(x):
            x = np.asarray(x, dtype=float)
            s = np.clip(x - x_start, 0.0, x_end - x_start)
            with np.errstate(invalid="ignore", divide="ignore"):
                arc = sign * s / np.sqrt(np.maximum(radius**2 - s * s, 0.0))
            return np.where(x <= x_end, arc, sign * np.tan(turn))

        return cls(height, slope)

    @classmethod
    def through_points(cls, x, y):
        """Cubic spline through points (``x`` increasing) [m]; straight beyond the ends."""
        from scipy.interpolate import CubicSpline

        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        if x.ndim != 1 or x.shape != y.shape or x.size < 3 or not np.all(np.diff(x) > 0):
            raise InvalidInputError(
                "x and y must be 1-D arrays of the same length (>= 3 points) with x strictly "
                f"increasing; got shapes {x.shape} and {y.shape}.")
        if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
            raise InvalidInputError("x and y of a wall contour must be finite.")
        spline = CubicSpline(x, y, bc_type="natural")
        derivative = spline.derivative()
        x_lo, x_hi = x[0], x[-1]

        def height(xq):
            xq = np.asarray(xq, dtype=float)
            xc = np.clip(xq, x_lo, x_hi)
            return spline(xc) + derivative(xc) * (xq - xc)

        return cls(height, lambda xq: derivative(np.clip(np.asarray(xq, dtype=float), x_lo, x_hi)))


def wall_point(x2, y2, theta2, nu2, wall, side="lower", gamma=1.4):
    """Plain core: node on a prescribed wall reached by a characteristic from point 2.

    Parameters
    ----------
    x2, y2, theta2, nu2 : float or ndarray
        Upstream interior point. On a ``"lower"`` wall its C- arrives (the
        invariant θ + ν is kept); on an ``"upper"`` wall its C+ (θ - ν kept).
    wall : WallContour
        The wall; its flow angle is atan(dy/dx) at the node.
    side : {"lower", "upper"}
    gamma : float, optional

    Returns
    -------
    x3, y3, theta3, nu3, t_char
        ``t_char`` is the signed length along the arriving characteristic.

    Notes
    -----
    The node position and the wall angle there depend on each other: a
    predictor along the direction at point 2, then correctors with the
    direction averaged between point 2 and the node, each solving the
    line-wall intersection by Newton's method.

    Examples
    --------
    A straight wall keeps the stream's state and only moves the node:

    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import WallContour, wall_point
    >>> nu = np.radians(26.379760813416457)
    >>> x3, y3, th, nu3, t = wall_point(0.0, 1.0, 0.0, nu, WallContour.straight(0.0))
    >>> round(float(x3), 12), float(th)
    (1.732050807569, 0.0)
    """
    sign = -1.0 if side == "lower" else 1.0
    invariant = theta2 - sign * nu2  # θ + ν on a C- (lower), θ - ν on a C+ (upper)
    mu2 = mach_angle_from_nu(nu2, gamma)
    direction = theta2 + sign * mu2
    x3 = np.asarray(x2, dtype=float)
    for _ in range(_WALL_ITERATIONS):
        x_new = _line_meets_wall(x2, y2, direction, wall, x3)
        theta3 = np.arctan(wall.slope(x_new))
        nu3 = sign * (theta3 - invariant)
        mu3 = mach_angle_from_nu(nu3, gamma)
        direction = 0.5 * ((theta2 + sign * mu2) + (theta3 + sign * mu3))
        settled = np.all(np.abs(x_new - x3) <= 1e-15 * (1.0 + np.abs(x_new)))
        x3 = x_new
        if settled:
            break
    y3 = wall.height(x3)
    t_char = np.hypot(x3 - x2, y3 - y2) * np.sign(x3 - x2)
    return x3, y3, theta3, nu3, t_char


def _line_meets_wall(x0, y0, direction, wall, x_guess, iterations=8):
    """x where the straight line from (x0, y0) at ``direction`` crosses the wall (Newton)."""
    tangent = np.tan(direction)
    x = np.asarray(x_guess, dtype=float)
    straight_x = x0 + (wall.height(x0) - y0) / (tangent - wall.slope(x0))
    x = np.where(x == x0, straight_x, x)
    for _ in range(iterations):
        residual = wall.height(x) - (y0 + tangent * (x - x0))
        step = residual / (wall.slope(x) - tangent)
        x = x - step
        if np.all(np.abs(step) <= 1e-16 * (1.0 + np.abs(x))):
            break
    return x


@dataclasses.dataclass(frozen=True, repr=False)
class CharacteristicNet(ResultTable):
    """Nodes of a characteristic net and how the two families join them, for plotting.

    Draw the C+ family with ``plot(x[plus_segments].T, y[plus_segments].T)``
    and the C- family likewise with ``minus_segments``.
    """

    x: np.ndarray = unit_field("m")  #: node abscissae
    y: np.ndarray = unit_field("m")  #: node ordinates
    mach: np.ndarray = unit_field("")  #: Mach number at each node
    theta: np.ndarray = unit_field("rad")  #: flow direction at each node
    p_p0: np.ndarray = unit_field("")  #: static-to-stagnation pressure ratio at each node
    plus_segments: np.ndarray = unit_field("")  #: (k, 2) node indices joined by C+ segments
    minus_segments: np.ndarray = unit_field("")  #: (k, 2) node indices joined by C- segments

    @classmethod
    def from_nodes(cls, x, y, theta, nu, plus_segments, minus_segments, gamma=1.4):
        """Build from node positions and (θ, ν) [rad]; Mach number and p/p0 follow."""
        mach = mach_from_prandtl_meyer_angle(nu, gamma)
        return cls(np.asarray(x, float), np.asarray(y, float), mach, np.asarray(theta, float),
                   pressure_ratio(mach, gamma),
                   np.asarray(plus_segments, dtype=np.intp).reshape(-1, 2),
                   np.asarray(minus_segments, dtype=np.intp).reshape(-1, 2))



# ----------------------------------------------------------- nets of a centred fan


@dataclasses.dataclass
class _Band:
    """Node arrays [b, a] of a net grown from a centred fan (see :func:`march_fan_band`)."""

    x: np.ndarray
    y: np.ndarray
    theta: np.ndarray
    nu: np.ndarray
    valid: np.ndarray
    boundary_index: object
    fold: tuple | None  # (x, y, b, a) of the first folded cell, or None


def march_fan_band(fan_theta, fan_nu, corner_x, corner_y, *, boundary, n_plus_lines,
                   nu_boundary=None, gamma=1.4, x_stop=np.inf):
    """Plain core: march the net of a centred fan at an upper corner over a symmetry line.

    The n lines of the fan leave the corner as C- characteristics (label a =
    1..n), reflect from the symmetry line y = 0 as C+ characteristics (label
    b = 1, 2, ...) and meet the upper boundary. Node (b, a) is where C+ line b
    crosses C- line a; it lies on the symmetry line when a = b and on the
    upper boundary when a = boundary_index(b).

    Parameters
    ----------
    fan_theta, fan_nu : ndarray, shape (n,)
        Flow angle and Prandtl–Meyer angle [rad] on each fan line at the corner.
    corner_x, corner_y : float
        Position of the corner [m].
    boundary : {"cancel", "pressure"}
        ``"cancel"``: a wall that turns each arriving C+ away without
        reflection (minimum-length nozzle contour); boundary nodes at a = n + 1.
        ``"pressure"``: a constant-pressure free boundary with Prandtl–Meyer
        angle ``nu_boundary``; each C+ reflects as a new C- of label b + n.
    n_plus_lines : int
        Number of C+ lines to march.
    gamma : float, optional
        Ratio of specific heats [-].
    x_stop : float, optional
        Stop after the first diagonal lying wholly beyond ``x_stop`` [m].

    Returns
    -------
    _Band
        Arrays indexed [b, a] (``valid`` marks computed nodes) and the first
        fold (same-family crossing, where a shock forms), or None.

    Notes
    -----
    The invariants are labels of the lines: C- line a carries K-_a = θ + ν
    (the fan's value for a <= n), C+ line b carries K+_b = -K-_b (reflection
    from the symmetry line, θ = 0), and a C- reflected from the boundary
    carries K-_(b+n) = K+_b + 2ν_boundary (constant pressure) or, at a
    cancelling wall, nothing new. So every node state, θ = (K-_a + K+_b)/2 and
    ν = (K-_a - K+_b)/2, is known before the march, exactly; and with it every
    Mach angle, in one vectorised call. The march then only places the nodes,
    exactly as :func:`interior_point`, :func:`symmetry_point`,
    :func:`cancellation_point` and :func:`free_boundary_point` do (straight
    segments at the averaged directions), one diagonal a + b = s at a time:
    nodes of a diagonal depend only on earlier diagonals.
    """
    n = len(fan_theta)
    if boundary == "cancel":
        def boundary_index(b):
            return np.full_like(np.asarray(b), n + 1)
    else:
        def boundary_index(b):
            return np.asarray(b) + n
    shape = (n_plus_lines + 1, int(boundary_index(n_plus_lines)) + 1)
    theta, nu = _band_states(np.asarray(fan_theta, float), np.asarray(fan_nu, float), shape,
                             boundary, nu_boundary)
    with np.errstate(invalid="ignore"):
        mu = mach_angle_from_nu(nu, gamma)
    plus_dir, minus_dir = theta + mu, theta - mu
    x, y = np.full(shape, np.nan), np.full(shape, np.nan)
    valid = np.zeros(shape, dtype=bool)
    lip = np.arange(1, n + 1) if boundary != "cancel" else np.arange(1, n + 2)
    x[0, lip], y[0, lip], valid[0, lip] = corner_x, corner_y, True
    b_all = np.arange(1, n_plus_lines + 1)
    top = boundary_index(b_all)
    fold = None
    for s in range(2, int(top[-1]) + n_plus_lines + 1):
        a_all = s - b_all
        keep = (a_all >= b_all) & (a_all <= top)
        b, a = b_all[keep], a_all[keep]
        if b.size == 0:
            continue
        x3, y3, ok = _place_diagonal(b, a, top[keep], boundary, x, y, theta, plus_dir, minus_dir)
        if not np.all(ok):
            bad = np.flatnonzero(~ok)
            first = bad[np.argmin(np.where(np.isnan(x3[bad]), np.inf, x3[bad]))]
            i, j = b[first], a[first]
            upstream = (i, j - 1) if j > i else (i - 1, j)
            fold = (float(x[upstream]), float(y[upstream]), int(i), int(j))
            break
        x[b, a], y[b, a] = x3, y3
        valid[b, a] = True
        if np.min(x3) > x_stop:
            break
    return _Band(x, y, theta, nu, valid, boundary_index, fold)


def _band_states(fan_theta, fan_nu, shape, boundary, nu_boundary):
    """θ, ν [rad] of every node (b, a) of the band from the invariants its lines carry."""
    n = fan_theta.size
    n_b, n_a = shape
    minus = np.full(n_a, np.nan)  # K-_a
    minus[1:n + 1] = fan_theta + fan_nu
    if boundary == "cancel":
        minus[n + 1:] = minus[n]  # the cancelling wall reflects nothing
    else:
        for start in range(n + 1, n_a, n):  # K-_(b+n) = K+_b + 2ν_b = 2ν_b - K-_b
            stop = min(start + n, n_a)
            minus[start:stop] = 2.0 * nu_boundary - minus[start - n:stop - n]
    plus = -minus[:n_b]  # K+_b = -K-_b (reflection from the symmetry line)
    plus[0] = fan_theta[0] - fan_nu[0]  # row 0 is the corner: the fan's own K+
    theta = 0.5 * (minus[None, :] + plus[:, None])
    nu = 0.5 * (minus[None, :] - plus[:, None])
    return theta, nu


def _place_diagonal(b, a, top, boundary, x, y, theta, plus_dir, minus_dir):
    """Positions of the nodes (b, a) of one diagonal; ``ok`` is False where the net folds."""
    x3, y3 = np.empty(b.size), np.empty(b.size)
    ok = np.ones(b.size, dtype=bool)
    on_axis, on_top = a == b, a == top
    inner = ~on_axis & ~on_top
    i, j = b[inner], a[inner]  # from (b, a-1) along the C+ and (b-1, a) along the C-
    x3[inner], y3[inner], t_plus, t_minus = _intersect(
        x[i, j - 1], y[i, j - 1], 0.5 * (plus_dir[i, j - 1] + plus_dir[i, j]),
        x[i - 1, j], y[i - 1, j], 0.5 * (minus_dir[i - 1, j] + minus_dir[i, j]))
    ok[inner] = (t_plus > 0) & (t_minus > 0)
    if np.any(on_axis):
        i = b[on_axis]
        direction = 0.5 * (minus_dir[i - 1, i] + minus_dir[i, i])
        t_minus = -y[i - 1, i] / np.sin(direction)
        x3[on_axis] = x[i - 1, i] + t_minus * np.cos(direction)
        y3[on_axis] = 0.0
        ok[on_axis] = t_minus > 0
    if np.any(on_top):
        i, j = b[on_top], a[on_top]
        previous = top[on_top] if boundary == "cancel" else j - 1
        x3[on_top], y3[on_top], t_plus, t_stream = _intersect(
            x[i, j - 1], y[i, j - 1], 0.5 * (plus_dir[i, j - 1] + plus_dir[i, j]),
            x[i - 1, previous], y[i - 1, previous], 0.5 * (theta[i - 1, previous] + theta[i, j]))
        ok[on_top] = (t_plus > 0) & (t_stream >= 0)
    return x3, y3, ok & np.isfinite(x3) & np.isfinite(y3)


def band_segments(valid, skip=None):
    """(C+ pairs, C- pairs) of flat node indices joining valid neighbours of a band.

    Along a C+ line b >= 1 the neighbours are (b, a) → (b, a+1) over valid nodes
    (nodes marked in ``skip`` are jumped over; row b = 0 is the corner, where the
    fan lines start, not a C+); along a C- line a they are (b, a) → (b+1, a).
    """
    keep = valid & ~(skip if skip is not None else np.zeros_like(valid))
    index = np.full(valid.shape, -1, dtype=np.intp)
    index[keep] = np.arange(np.count_nonzero(keep))
    plus = []
    for row in index[1:]:
        row = row[row >= 0]
        plus.append(np.column_stack([row[:-1], row[1:]]))
    minus = np.column_stack([index[:-1].ravel(), index[1:].ravel()])
    minus = minus[(minus >= 0).all(axis=1)]
    return np.concatenate(plus + [np.empty((0, 2), np.intp)]), minus, keep
