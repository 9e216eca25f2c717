"""Method of characteristics, planar and axisymmetric: unit processes on the Riemann invariants.

In steady, homentropic and irrotational supersonic flow of a perfect gas the
flow direction θ and the Prandtl–Meyer angle ν obey two compatibility
relations along the characteristics (μ = asin(1/M), s the arc length along
the line, y the distance from the axis or centreline):

    along a C+ characteristic, dy/dx = tan(θ + μ):   d(θ - ν) = -δ (sin θ sin μ / y) ds
    along a C- characteristic, dy/dx = tan(θ - μ):   d(θ + ν) = +δ (sin θ sin μ / y) ds

with δ = 0 in planar flow and δ = 1 in axisymmetric flow (y the radius). The
``geometry`` switch of every unit process chooses δ.

Planar flow (δ = 0): θ - ν and θ + ν are constant along their lines (the plus
and minus invariants), so every unit process finds the *state* of a new node
exactly (to rounding) from the invariants it receives; only its *position* is
approximated, by straight characteristic segments whose direction is the
average of the directions at their two ends (the averaged-coefficient, or
trapezoidal, corrector). That makes node positions second-order accurate in
the mesh spacing. Where the state of the new node depends on its position (a
point on a prescribed curved wall) the predictor-corrector is iterated.

Axisymmetric flow (δ = 1): the same equations with the source term
Q = sin θ sin μ / y. Each segment's source term is taken at its mean state
and mean radius (the averaged-property rule, second order like the averaged
directions; a mean of the two end values would not do, since Q ∝ 1/y varies
strongly on a long segment running towards the axis). State and position now
depend on each other: an Euler predictor (directions and source term at the
upstream points) is followed by ``AXISYMMETRIC_CORRECTORS`` correctors
(Heun's scheme), each solving for the new θ with the source term linear in it
(the stiff part near the axis, where Q ∝ θ/y). The planar arithmetic is not
touched by the switch: the source term is skipped, not multiplied by zero, so
planar results are bit for bit those of a planar-only code.

On the axis (y = 0, θ = 0) the source term is 0/0. By L'Hôpital's rule
sin θ / y → ∂θ/∂y there, and the continuity equation on the axis,
∂(ρu)/∂x + 2ρu ∂θ/∂y = 0 (the axisymmetric term v/y → ∂v/∂y doubles the
planar one), turns this into

    Q_axis = sin μ ∂θ/∂y = ½ cos μ ∂ν/∂x,

half of what the planar term cos μ ∂ν/∂x would be. On the C- that ends on
the axis, sin θ / y is smooth (θ is odd in y) and is integrated by the
trapezoidal rule, its axis value ∂θ/∂y taken as θ/y at the node above on the
same row of the net (second order). In a conical source flow both forms give
∂θ/∂y = 1/x exactly (the tests check it).

Sources: the compatibility relations are those of Zucrow & Hoffman (1977),
*Gas Dynamics* Vol. 2, ch. 16, written there per unit dy as
d(θ ± ν) = ±dy/(y(cot θ ∓ √(M²-1))) (from memory); the per-length form above
follows with dy = sin(θ ∓ μ) ds. Both the sign and the axis limit were
verified here: the exact conical source flow satisfies the relations, and is
reproduced by the axisymmetric march at second order (tests).

All functions here are the plain core: floats or ndarrays, radians, no pint.
They broadcast like ufuncs, so a whole characteristic line (or a diagonal of
a characteristic net) is processed in one call.

Naming: point 1 is the upstream neighbour on the C+ through the new point
(below it), point 2 the upstream neighbour on the C- through it (above it).
Each process also returns the signed lengths ``t_plus`` / ``t_minus`` /
``t_stream`` travelled from the upstream points along the straight segments;
a length <= 0 means characteristics of one family have crossed (the net has
folded: a shock has formed there) and the node is not valid.

Node state: the processes work on (x, y, θ, ν), and the axisymmetric ones on
the record ``(x, y, θ, ν, z, μ, s)`` of :func:`node_record` (z = cot μ =
√(M² - 1), s = sin θ / y, on the axis its limit ∂θ/∂y). Rotational flow
would add one field to the
record (the entropy, or the stagnation-pressure ratio, carried along the
streamline as a third characteristic) and its term to the two compatibility
relations; the geometry stays an explicit argument.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary.results import ResultTable, unit_field
from ..errors import InvalidInputError
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle
from ..relations.isentropic import mach_angle_of, pressure_ratio
from .walls import WallContour

__all__ = [
    "GEOMETRIES",
    "check_geometry",
    "node_record",
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
#: trapezoidal correctors after the Euler predictor of an axisymmetric process. One (Heun's
#: scheme) makes the local error O(h³), second order; a second changes a nozzle's corner
#: angle by 4e-6 at n = 40 (O(h²), shrinking 4x per doubling) and costs half as much again
AXISYMMETRIC_CORRECTORS = 1

#: the geometry switch of every unit process, marcher and design tool
GEOMETRIES = ("planar", "axisymmetric")
#: most fan lines of a round nozzle or jet: their nets hold seven fields per node, and a
#: round nozzle's kernel is marched for seven candidate corner angles at once (60 MB at 400)
ROUND_LINE_LIMIT = 400


def check_geometry(geometry):
    """True for ``"axisymmetric"``, False for ``"planar"``; InvalidInputError otherwise."""
    if isinstance(geometry, str) and geometry in GEOMETRIES:
        return geometry == "axisymmetric"
    raise InvalidInputError(
        f"geometry must be 'planar' or 'axisymmetric'; got {geometry!r}. A planar flow is "
        "two-dimensional (per unit depth); an axisymmetric one is round, y the radius.")


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


def ray_line_intersection(x1, y1, angle1, x2, y2, angle2):
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


# ------------------------------------------------------------ axisymmetric source term


def _nu_of_cot_mu(z, gamma):
    """ν [rad] from z = cot μ = √(M² - 1), arctangent form (NACA Report 1135, eq. 171).

    Near M = 1 the two arctangents cancel to an absolute error of a few ulp times z;
    the Newton step below only needs the difference to a target, so that is enough.
    """
    root_k = np.sqrt((gamma - 1.0) / (gamma + 1.0))
    return np.arctan(root_k * z) / root_k - np.arctan(z)


def cot_mach_angle_step(z, nu, gamma=1.4):
    """Plain core: one Newton step towards z = cot μ = √(M² - 1) of the flow of ν = ``nu``.

    Newton's method on ln ν(z) = ln ν in ln z, nearly linear from M = 1 (where
    ν ∝ z³) to M → ∞: from a guess 8 % off one step leaves 2e-3, two 2e-6,
    three 1e-12, anywhere from z = 0.05 to 10; from a neighbour's value
    (the usual start) two steps reach rounding. The axisymmetric marchers take
    one step per corrector pass instead of the full inverse of ν (their state
    moves a little per pass); the published Mach numbers come from
    :func:`mach_from_prandtl_meyer_angle` at the end.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import cot_mach_angle_step
    >>> nu = np.radians(26.379760813416457)    # M = 2: z = √3
    >>> z = 1.6
    >>> for _ in range(4):
    ...     z = cot_mach_angle_step(z, nu)
    >>> round(float(z) ** 2, 12)
    3.0
    """
    z = np.asarray(z, dtype=float)
    z2 = z * z
    one_z2 = 1.0 + z2
    nu_z = _nu_of_cot_mu(z, gamma)
    # d ln ν / d ln z = z (dν/dz) / ν; the step in ln z is kept within ±1 (a far guess)
    log_slope = z * z2 / (one_z2 * (1.0 + 0.5 * (gamma - 1.0) * one_z2) * nu_z)
    return z * np.exp(np.minimum(np.maximum(np.log(nu / nu_z) / log_slope, -1.0), 1.0))


#: the fields of an axisymmetric node record, in order
RECORD_FIELDS = ("x", "y", "theta", "nu", "cot_mu", "mu", "sin_theta_over_y")


def node_record(x, y, theta, nu, gamma=1.4, axis_slope=None):
    """Plain core: the node record (x, y, θ, ν, z, μ, s) of the axisymmetric processes.

    z = cot μ = √(M² - 1), μ the Mach angle [rad], s = sin θ / y [1/m]; on the
    axis (y = 0) s is the limit ∂θ/∂y, ``axis_slope`` [rad/m] (NaN if not
    given). Lengths [m], angles [rad].
    """
    x, y, theta, nu = (np.asarray(v, dtype=float) for v in (x, y, theta, nu))
    mach = mach_from_prandtl_meyer_angle(nu, gamma)
    with np.errstate(invalid="ignore", divide="ignore"):
        z = np.sqrt((mach - 1.0) * (mach + 1.0))
        ratio = np.sin(theta) / y
    ratio = np.where(y == 0.0, np.nan if axis_slope is None else axis_slope, ratio)
    return x, y, theta, nu, z, mach_angle_of(mach), ratio


def _sin_ratio(angle):
    """sin(a)/a, 1 at a = 0."""
    sine = np.sin(angle)
    return np.divide(sine, angle, out=np.ones_like(sine), where=angle != 0.0)


_PLUS_MINUS = np.array([1.0, -1.0])  # stacked C+ (row 0) and C- (row 1) quantities


def _interior_axisymmetric(p1, p2, gamma, correctors=AXISYMMETRIC_CORRECTORS):
    """Interior node from records ``p1`` (on its C+) and ``p2`` (on its C-), with the source term.

    Per pass, the segments are straight (directions of the ends averaged) and
    the state solves the two compatibility relations with the source term of
    each segment taken at its mean state and radius (the averaged-property
    rule; ȳ vanishes only if both ends are on the axis, so the rule stays
    bounded on long segments running towards the axis, where the mean of two
    end values ∝ 1/y does not) and linear in the unknown θ3:

        θ3 - ν3 = θ1 - ν1 - a+ (θ1 + θ3),   θ3 + ν3 = θ2 + ν2 + a- (θ2 + θ3),
        a± = ½ t± sin μ̄ sin(θ̄)/(θ̄ ȳ)  (sin θ̄/θ̄ from the previous pass),

    which keeps the pass stable where the source term is stiff (Q ∝ θ/y near
    the axis). A C+ leaving the axis (y1 = 0) takes instead the trapezoid of
    sin θ / y, ½(s1 + sin θ3 / y3) with s1 = ∂θ/∂y of the axis node, exact when
    θ is proportional to y with a slope linear along the segment (near the
    axis, where θ is odd in y); the mean state there would take ∂θ/∂y at the
    far end only. Returns the record of the new node and (t_plus, t_minus).
    """
    return interior_nodes_stacked(np.stack([np.asarray(p1, dtype=float), np.asarray(p2, dtype=float)],
                                      axis=1), gamma, correctors)


def interior_nodes_stacked(upstream, gamma, correctors=AXISYMMETRIC_CORRECTORS):
    """:func:`_interior_axisymmetric` on the records of points 1 and 2 stacked, shape (7, 2, ...).

    The C+ quantities are row 0 and the C- ones row 1 of every stacked array,
    so one numpy call serves both characteristics (the marchers gather both
    upstream points with one index).
    """
    x_up, y_up, th_up, nu_up, z_up, mu_up, s_up = upstream
    th1, th2 = th_up
    signs = _PLUS_MINUS.reshape((2,) + (1,) * (th_up.ndim - 1))
    direction_up = th_up + signs * mu_up
    k_minus, k_plus = th2 + nu_up[1], th1 - nu_up[0]
    half_sum, half_difference = 0.5 * (k_minus + k_plus), 0.5 * (k_minus - k_plus)
    dx, dy = x_up[1] - x_up[0], y_up[1] - y_up[0]
    from_axis = y_up == 0.0  # a C+ leaving the axis (row 0 only)
    any_from_axis = bool(from_axis.any())
    # Euler predictor: upstream directions, source term at the upstream state
    directions, th3, mu3, z3 = direction_up, th_up, mu_up, 0.5 * (z_up[0] + z_up[1])
    for step in range(correctors + 1):
        cosine, sine = np.cos(directions), np.sin(directions)
        det = sine[0] * cosine[1] - cosine[0] * sine[1]  # sin(angle+ - angle-)
        t = (cosine[::-1] * dy - sine[::-1] * dx) / det  # (t_plus, t_minus)
        y3 = y_up[0] + t[0] * sine[0]
        # source term of each segment, Q̄ t = c + a θ3 (linear in the unknown θ3)
        t_sin_mu = t * np.sin(0.5 * (mu_up + mu3))
        a = t_sin_mu * _sin_ratio(0.5 * (th_up + th3)) / (y_up + y3)
        c = a * th_up
        if any_from_axis:  # trapezoid of sin θ / y, exact for θ = f(x)·y near the axis
            a = np.where(from_axis, 0.5 * t_sin_mu * _sin_ratio(th3) / y3, a)
            c = np.where(from_axis, 0.5 * t_sin_mu * s_up, c)
        th3 = (half_sum + 0.5 * (c[1] - c[0])) / (1.0 - 0.5 * (a[1] - a[0]))
        nu3 = half_difference + 0.5 * (c[1] + c[0] + (a[1] + a[0]) * th3)
        z3 = cot_mach_angle_step(z3, nu3, gamma)
        mu3 = np.arctan2(1.0, z3)
        if step == correctors:
            break
        directions = 0.5 * (direction_up + (th3 + signs * mu3))
    x3 = x_up[0] + t[0] * cosine[0]
    return (x3, y3, th3, nu3, z3, mu3, np.sin(th3) / y3), t[0], t[1]


def axis_node_axisymmetric(p2, axis_slope, gamma, correctors=AXISYMMETRIC_CORRECTORS):
    """Node on the axis reached by the C- from record ``p2``; ``axis_slope`` = ∂θ/∂y there.

    θ3 = 0 and ν3 = (θ + ν)2 + ½(sin θ2 / y2 + ∂θ/∂y) sin μ̄ t: the trapezoidal
    rule on sin θ / y, which is smooth up to the axis (θ is odd in y) and
    tends to ∂θ/∂y there. Returns the record of the new node and t_minus.
    """
    x2, y2, th2, nu2, z2, mu2, s2 = p2
    minus2 = th2 - mu2
    k_minus = th2 + nu2
    slope_mean = 0.5 * (s2 + axis_slope)
    direction, mu3, z3 = minus2, mu2, z2
    for step in range(correctors + 1):
        t_minus = -y2 / np.sin(direction)
        nu3 = k_minus + slope_mean * np.sin(0.5 * (mu2 + mu3)) * t_minus
        z3 = cot_mach_angle_step(z3, nu3, gamma)
        if step == 0:
            z3 = cot_mach_angle_step(z3, nu3, gamma)
        mu3 = np.arctan2(1.0, z3)
        if step == correctors:
            break
        direction = 0.5 * (minus2 - mu3)
    x3 = x2 + t_minus * np.cos(direction)
    zero = 0.0 * x3
    return (x3, zero, zero, nu3, z3, mu3, axis_slope + zero), t_minus


def free_boundary_node_axisymmetric(p1, xb, yb, thetab, nu_boundary, gamma,
                                correctors=AXISYMMETRIC_CORRECTORS):
    """Constant-pressure boundary node from the C+ of record ``p1`` and the boundary
    streamline from (xb, yb) at ``thetab``. Returns the record, t_plus and t_stream."""
    x1, y1, th1, nu1, z1, mu1, _ = p1
    plus1, k_plus = th1 + mu1, th1 - nu1
    nu3 = np.asarray(nu_boundary, dtype=float) + 0.0 * xb
    mach3 = mach_from_prandtl_meyer_angle(nu3, gamma)
    z3 = np.sqrt((mach3 - 1.0) * (mach3 + 1.0))
    mu3 = np.arctan2(1.0, z3)
    x3, y3, t_plus, t_stream = ray_line_intersection(x1, y1, plus1, xb, yb, thetab)
    th3 = th1
    for step in range(correctors + 1):
        mean_th = 0.5 * (th1 + th3)
        a_plus = (0.5 * t_plus) * np.sin(0.5 * (mu1 + mu3)) * _sin_ratio(mean_th) / (
            0.5 * (y1 + y3))
        # ν fixed by the boundary pressure: θ3 = θ1 - ν1 - ½ k+ t+ (θ1 + θ3) + ν3
        th3 = (k_plus - a_plus * th1 + nu3) / (1.0 + a_plus)
        if step == correctors:
            break
        x3, y3, t_plus, t_stream = ray_line_intersection(x1, y1, 0.5 * (plus1 + (th3 + mu3)),
                                              xb, yb, 0.5 * (thetab + th3))
    return (x3, y3, th3, nu3, z3, mu3, np.sin(th3) / y3), t_plus, t_stream


def wall_node_axisymmetric(p2, wall, side, gamma):
    """Node on a prescribed wall reached by the C- (lower) or C+ (upper) from record ``p2``.

    The planar iteration of :func:`wall_point` with the source term of the
    arriving segment (averaged property). Returns the record and the signed length.
    """
    x2, y2, th2, nu2, z2, mu2, _ = p2
    sign = -1.0 if side == "lower" else 1.0
    invariant = th2 - sign * nu2
    upstream_direction = th2 + sign * mu2
    direction, mu3, z3 = upstream_direction, mu2, np.asarray(z2, dtype=float)
    x3 = np.asarray(x2, dtype=float)
    for step in range(_WALL_ITERATIONS):
        x_new = _line_meets_wall(x2, y2, direction, wall, x3)
        y3 = wall.height(x_new)
        theta3 = np.arctan(wall.slope(x_new))
        t_char = np.hypot(x_new - x2, y3 - y2) * np.sign(x_new - x2)
        theta_mean = 0.5 * (th2 + theta3)
        source = np.sin(theta_mean) * np.sin(0.5 * (mu2 + mu3)) / (0.5 * (y2 + y3))
        # along a C- (lower) dK-/ds = +Q, along a C+ (upper) dK+/ds = -Q
        nu3 = sign * (theta3 - (invariant - sign * source * t_char))
        z3 = cot_mach_angle_step(z3, nu3, gamma)
        if step == 0:
            z3 = cot_mach_angle_step(z3, nu3, gamma)
        mu3 = np.arctan2(1.0, z3)
        direction = 0.5 * (upstream_direction + (theta3 + sign * mu3))
        settled = np.all(np.abs(x_new - x3) <= 1e-15 * (1.0 + np.abs(x_new)))
        x3 = x_new
        if settled and step >= AXISYMMETRIC_CORRECTORS:
            break
    return (x3, y3, theta3, nu3, z3, mu3, np.sin(theta3) / y3), t_char


def interior_point(x1, y1, theta1, nu1, x2, y2, theta2, nu2, gamma=1.4, *, geometry="planar",
                   axis_slope=None):
    """Plain core: new interior node from point 1 (on its C+) and point 2 (on its C-).

    Parameters
    ----------
    x1, y1, theta1, nu1 : float or ndarray
        Position [m] and state [rad] of the upstream point on the C+ (below).
    x2, y2, theta2, nu2 : float or ndarray
        Position [m] and state [rad] of the upstream point on the C- (above).
    gamma : float, optional
        Ratio of specific heats [-].
    geometry : {"planar", "axisymmetric"}, optional
        Planar flow, or axisymmetric flow with y the radius.
    axis_slope : float or ndarray, optional
        Axisymmetric flow with point 1 on the axis (y1 = 0): ∂θ/∂y there
        [rad/m], the limit of sin θ / y (see :func:`symmetry_point`).

    Returns
    -------
    x3, y3, theta3, nu3, t_plus, t_minus
        Position [m] and state [rad] of the new node, and the signed lengths
        [m] of the C+ segment 1→3 and the C- segment 2→3 (<= 0: folded net).

    Notes
    -----
    Planar: θ3 - ν3 = θ1 - ν1 and θ3 + ν3 = θ2 + ν2 exactly; the segments are
    straight with directions ((θ+μ)1 + (θ+μ)3)/2 and ((θ-μ)2 + (θ-μ)3)/2.
    Axisymmetric: θ3 - ν3 = θ1 - ν1 - Q̄+ t_plus and
    θ3 + ν3 = θ2 + ν2 + Q̄- t_minus, with Q̄ = sin θ̄ sin μ̄ / ȳ of each segment
    (the averaged-property rule: the mean state and radius of its ends),
    after an Euler predictor (upstream directions and source) and
    ``AXISYMMETRIC_CORRECTORS`` correctors; each pass solves for θ3 with the
    source term linear in it (the stiff part near the axis, where Q ∝ θ/y).

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

    In a round stream along the axis the same points give the same node
    (θ = 0 everywhere: no source term):

    >>> x3, y3, *_ = interior_point(0.0, 0.5, 0.0, nu, 0.0, 1.5, 0.0, nu,
    ...                             geometry="axisymmetric")
    >>> round(float(x3), 12), round(float(y3), 12)
    (0.866025403784, 1.0)
    """
    if check_geometry(geometry):
        node, t_plus, t_minus = _interior_axisymmetric(
            node_record(x1, y1, theta1, nu1, gamma, axis_slope=axis_slope),
            node_record(x2, y2, theta2, nu2, gamma), gamma)
        return node[0], node[1], node[2], node[3], t_plus, t_minus
    mu1 = mach_angle_from_nu(nu1, gamma)
    mu2 = mach_angle_from_nu(nu2, gamma)
    return interior_point_given_mach_angles(x1, y1, theta1, nu1, mu1, x2, y2, theta2, nu2, mu2, gamma)[:6]


def interior_point_given_mach_angles(x1, y1, theta1, nu1, mu1, x2, y2, theta2, nu2, mu2, gamma):
    """:func:`interior_point` given the upstream Mach angles; also returns μ3."""
    theta3 = 0.5 * ((theta2 + nu2) + (theta1 - nu1))
    nu3 = 0.5 * ((theta2 + nu2) - (theta1 - nu1))
    mu3 = mach_angle_from_nu(nu3, gamma)
    plus_direction = 0.5 * ((theta1 + mu1) + (theta3 + mu3))
    minus_direction = 0.5 * ((theta2 - mu2) + (theta3 - mu3))
    x3, y3, t_plus, t_minus = ray_line_intersection(x1, y1, plus_direction, x2, y2, minus_direction)
    return x3, y3, theta3, nu3, t_plus, t_minus, mu3


def symmetry_point(x2, y2, theta2, nu2, gamma=1.4, y_axis=0.0, *, geometry="planar",
                   axis_slope=None):
    """Plain core: node on a symmetry line y = ``y_axis`` below point 2, reached by its C-.

    With ``geometry="axisymmetric"`` the symmetry line is the axis (``y_axis``
    must be 0) and the C- gathers the source term on its way, by the
    trapezoidal rule on sin θ / y, whose limit on the axis is ∂θ/∂y; that is
    ``axis_slope`` [rad/m] (default sin θ2 / y2, first order; the marchers pass
    θ/y of the node above the new one on its row, second order).

    Returns
    -------
    x3, y3, theta3, nu3, t_minus
        θ3 = 0; ν3 = θ2 + ν2 exactly in planar flow, plus
        ½(sin θ2 / y2 + ∂θ/∂y) sin μ̄ t_minus in axisymmetric flow;
        ``t_minus`` is the signed C- length.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.characteristics.unit_processes import symmetry_point
    >>> x3, y3, th3, nu3, t = symmetry_point(0.0, 1.0, 0.1, 0.3)
    >>> float(th3), round(float(nu3), 15)
    (0.0, 0.4)

    On the axis of a round stream the flow leaving the axis (θ2 > 0) expands
    further: the source term adds to ν.

    >>> *_, nu3, t = symmetry_point(0.0, 1.0, 0.1, 0.3, geometry="axisymmetric")
    >>> bool(nu3 > 0.4)
    True
    """
    if check_geometry(geometry):
        if not np.all(np.asarray(y_axis) == 0.0):
            raise InvalidInputError(
                f"y_axis must be 0 in axisymmetric flow (the symmetry line is the axis); "
                f"got {y_axis!r}.")
        p2 = node_record(x2, y2, theta2, nu2, gamma)
        slope = np.sin(np.asarray(theta2, dtype=float)) / y2 if axis_slope is None else axis_slope
        node, t_minus = axis_node_axisymmetric(p2, slope, gamma)
        return node[0], node[1], node[2], node[3], t_minus
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
    x3, y3, t_plus, t_stream = ray_line_intersection(x1, y1, plus_direction, xb, yb, stream_direction)
    return x3, y3, theta3, nu3, t_plus, t_stream


def free_boundary_point(x1, y1, theta1, nu1, xb, yb, thetab, nu_boundary, gamma=1.4, *,
                        geometry="planar"):
    """Plain core: node on an upper constant-pressure boundary, reached by the C+ from point 1.

    Parameters
    ----------
    x1, y1, theta1, nu1 : float or ndarray
        Upstream point on the C+ (below the boundary).
    xb, yb, thetab : float or ndarray
        Previous node on the boundary streamline and its flow angle [rad].
    nu_boundary : float or ndarray
        Prandtl–Meyer angle [rad] fixed by the boundary pressure.
    geometry : {"planar", "axisymmetric"}, optional

    Returns
    -------
    x3, y3, theta3, nu3, t_plus, t_stream

    Notes
    -----
    ν3 = ν_boundary and θ3 = (θ1 - ν1) + ν_boundary exactly in planar flow
    (axisymmetric: the C+ invariant first loses Q̄ t_plus). The
    boundary segment has direction (θb + θ3)/2, the C+ segment
    ((θ+μ)1 + (θ+μ)3)/2. An expansion arriving at the boundary leaves as a
    compression of equal strength (the boundary turns the flow by twice the
    incoming change).

    Examples
    --------
    >>> from gasdyn2d.characteristics.unit_processes import free_boundary_point
    >>> *_, th3, nu3, tp, ts = free_boundary_point(0.0, 0.0, 0.0, 0.5, -1.0, 1.0, 0.1, 0.45)
    >>> round(float(th3), 15), float(nu3)
    (-0.05, 0.45)
    """
    if check_geometry(geometry):
        p1 = node_record(x1, y1, theta1, nu1, gamma)
        node, t_plus, t_stream = free_boundary_node_axisymmetric(p1, xb, yb, thetab, nu_boundary,
                                                             gamma)
        return node[0], node[1], node[2], node[3], t_plus, t_stream
    nu3 = np.asarray(nu_boundary, dtype=float) + 0.0 * xb
    theta3 = (theta1 - nu1) + nu3
    mu3 = mach_angle_from_nu(nu3, gamma)
    plus_direction = 0.5 * ((theta1 + mach_angle_from_nu(nu1, gamma)) + (theta3 + mu3))
    stream_direction = 0.5 * (thetab + theta3)
    x3, y3, t_plus, t_stream = ray_line_intersection(x1, y1, plus_direction, xb, yb, stream_direction)
    return x3, y3, theta3, nu3, t_plus, t_stream


def wall_point(x2, y2, theta2, nu2, wall, side="lower", gamma=1.4, *, geometry="planar"):
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
    geometry : {"planar", "axisymmetric"}, optional
        Axisymmetric: y is the radius (a lower wall is an inner body, y > 0)
        and the arriving invariant gathers the source term.

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
    if check_geometry(geometry):
        node, t_char = wall_node_axisymmetric(node_record(x2, y2, theta2, nu2, gamma), wall, side,
                                          gamma)
        return node[0], node[1], node[2], node[3], t_char
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
