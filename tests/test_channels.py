"""Tests of the channel solver (method of characteristics between two walls).

Sources:
- Facts of the trade (Riemann invariants of planar homentropic flow): after the fan of a
  wall turn δ has fully reflected from a straight opposite wall, ν = ν1 + 2δ there; after
  two equal fans have fully crossed, θ = 0 and ν = ν1 + 2δ.
- The simple wave of a curved wall: its C- lines are straight; a C+ curve through it obeys
  an ordinary differential equation integrated here with scipy at 1e-13 (derived in the
  test, independent of the net).
- Envelope of the straight C- lines of a simple compression from a circular arc: its cusp,
  where the shock forms, is at a distance R sin μ1 · 2(M1² - 1)/((γ+1)M1²) from the arc's
  start along the first Mach line (derived here from the envelope condition).
- mpmath reference for ν(M) and its inverse (NACA Report 1135, eq. 171).
"""

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import cumulative_trapezoid, solve_ivp

from gasdyn2d import ureg
from gasdyn2d.characteristics.channels import channel_flow
from gasdyn2d.characteristics.unit_processes import WallContour
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.relations.expansion_fans import mach_from_prandtl_meyer_angle, prandtl_meyer_angle


def mp_nu(M, g=1.4):
    """ν(M) at 40 digits (NACA Report 1135, eq. 171)."""
    with mp.workdps(40):
        M, g = mp.mpf(M), mp.mpf(g)
        k = mp.sqrt((g + 1) / (g - 1))
        return k * mp.atan(mp.sqrt(M * M - 1) / k) - mp.atan(mp.sqrt(M * M - 1))


def mp_mach_from_nu(nu, g=1.4):
    with mp.workdps(40):
        s = mp.findroot(lambda s: mp_nu(mp.sqrt(1 + mp.exp(2 * s)), g) - mp.mpf(nu),
                        mp.log(mp.cbrt(3 * mp.mpf(nu) * (g + 1) / 2)))
        return float(mp.sqrt(1 + mp.exp(2 * s)))


STRAIGHT_FLOOR = WallContour.straight(0.0)


def test_fan_fully_reflected_from_a_straight_wall():
    # Invariants: downstream of the reflection, on the straight floor, ν = ν1 + 2δ.
    M1, delta, H = 2.2, math.radians(6.0), 1.0
    flow = channel_flow(M1, lower_wall=STRAIGHT_FLOOR,
                        upper_wall=WallContour.bend(H, 0.05, delta, 0.2), length=5.0,
                        n_points=41)
    cot = math.sqrt(M1**2 - 1)
    # tail of the fan reaches the floor before x ≈ 0.1 + 1.1·H·cot μ2; the wave reflected
    # back from the roof returns to the floor after x ≈ 0.05 + 3·H·cot μ1 (geometry)
    window = (flow.lower_wall_x > 0.12 + 1.2 * H * cot) & (flow.lower_wall_x < 2.5 * H * cot)
    assert np.count_nonzero(window) >= 10
    expected = mp_mach_from_nu(float(mp_nu(M1)) + 2 * delta)
    assert flow.lower_wall_mach[window] == pytest.approx(expected, rel=1e-12)


def test_two_fans_fully_crossed():
    # Invariants: two equal fans crossed -> θ = 0, ν = ν1 + 2δ on the centreline.
    M1, delta, H = 2.2, math.radians(8.0), 1.0
    flow = channel_flow(M1, lower_wall=WallContour.bend(0.0, 0.05, -delta, 0.2),
                        upper_wall=WallContour.bend(H, 0.05, delta, 0.2), length=2.4,
                        n_points=41)
    net = flow.net
    cot = math.sqrt(M1**2 - 1)
    centre = (np.abs(net.y - 0.5 * H) < 0.3 * H / 40) & (net.x > 0.2 + 0.7 * H * cot) \
        & (net.x < 1.3 * H * cot)
    assert np.count_nonzero(centre) >= 5
    assert np.all(np.abs(net.theta[centre]) < 1e-14)
    expected = mp_mach_from_nu(float(mp_nu(M1)) + 2 * delta)
    assert net.mach[centre] == pytest.approx(expected, rel=1e-12)


def _exact_plus_curve(M1, delta, R, H, x_start, y0, gamma=1.4):
    """Exact C+ curve from (0, y0) through the simple wave of a roof arc, as X(φ)."""
    nu1 = float(mp_nu(M1))
    mu1 = math.asin(1 / M1)

    def mu_of(phi):
        return math.asin(1 / float(mach_from_prandtl_meyer_angle(nu1 + phi, gamma)))

    def rhs(phi, s):
        M = float(mach_from_prandtl_meyer_angle(nu1 + phi, gamma))
        m = math.asin(1 / M)
        beta = phi + m
        d_alpha = 1 + (1 + 0.5 * (gamma - 1) * M * M) / (M * M - 1)  # d(θ - μ)/dφ
        cross = R * math.cos(phi) * math.sin(beta) - R * math.sin(phi) * math.cos(beta)
        return (s * d_alpha * math.cos(2 * m) - cross) / math.sin(2 * m)

    c, s = math.cos(mu1), math.sin(mu1)
    _, s0 = np.linalg.solve([[c, -c], [s, s]], [x_start, H - y0])  # meets the head line
    sol = solve_ivp(rhs, (0, delta), [s0], rtol=1e-13, atol=1e-15, dense_output=True)

    def X(phi):
        sv = sol.sol(phi)[0]
        alpha = phi - mu_of(phi)
        return (x_start + R * math.sin(phi) + sv * math.cos(alpha),
                H + R * (1 - math.cos(phi)) + sv * math.sin(alpha))

    return X


def test_simple_wave_positions_are_second_order():
    # Exact C+ curve through the simple wave of a roof arc (ODE above) against the net's
    # C+ line from the mid-height inlet node: error ≈ C h², h = inlet node spacing.
    M1, delta, R, H, xs = 2.2, math.radians(10.0), 0.2, 0.1, 0.05
    nu1 = float(mp_nu(M1))
    X = _exact_plus_curve(M1, delta, R, H, xs, H / 2)
    errors, spacings = [], []
    for n in (21, 41, 81, 161):
        flow = channel_flow(M1, lower_wall=STRAIGHT_FLOOR,
                            upper_wall=WallContour.bend(H, xs, delta, R), length=0.3, n_points=n)
        net = flow.net
        nu = prandtl_meyer_angle(net.mach)
        following = dict(map(tuple, net.plus_segments))
        k, worst = (n - 1) // 2, 0.0
        while k in following:
            k = following[k]
            if abs(net.theta[k] - nu[k] + nu1) > 1e-12:
                break  # left the simple wave (reached reflected waves)
            phi = net.theta[k]
            if 1e-14 < phi < delta - 1e-14:
                worst = max(worst, math.hypot(*(np.subtract(X(phi), (net.x[k], net.y[k])))))
        errors.append(worst)
        spacings.append(H / (n - 1))
    assert all(e <= 1.5 * h * h for e, h in zip(errors, spacings)), errors
    order = math.log(errors[0] / errors[-1]) / math.log(spacings[0] / spacings[-1])
    assert order > 1.7  # measured 1.86


def test_reflected_wall_positions_converge_at_second_order_on_a_smooth_roof():
    # Refinement study (self-convergence against n = 161): the floor position of each
    # reflected wave converges at second order when the roof is C² (a tanh-shaped turn,
    # invented). With straight-arc junctions (curvature jumps) the order drops to ~1.3-1.5.
    M1, delta, H = 2.2, math.radians(10.0), 0.1
    nu1 = float(mp_nu(M1))
    xx = np.linspace(0.0, 0.6, 12001)
    theta = delta * 0.5 * (1 + np.tanh((xx - 0.12) / 0.015))
    theta -= theta[0]
    roof = WallContour.through_points(xx, H + cumulative_trapezoid(np.tan(theta), xx, initial=0))

    def floor_positions(n):
        flow = channel_flow(M1, lower_wall=STRAIGHT_FLOOR, upper_wall=roof, length=0.5, n_points=n)
        phi = 0.5 * (prandtl_meyer_angle(flow.lower_wall_mach) - nu1)
        keep = (phi > 0.05 * delta) & (phi < 0.95 * delta)
        return phi[keep], flow.lower_wall_x[keep]

    phi_ref, x_ref = floor_positions(161)
    errors = []
    for n in (21, 41, 81):
        phi, x = floor_positions(n)
        errors.append(np.max(np.abs(x - np.interp(phi, phi_ref, x_ref))))
    assert errors[0] / errors[1] > 2.5 and errors[1] / errors[2] > 2.9, errors


def test_compression_forms_a_shock_at_the_envelope_cusp():
    # Envelope cusp of the simple compression from a roof arc turning down by δ (derived
    # closed form, see module docstring); the fold is found within two inlet spacings.
    M1, gamma, R, H, xs = 2.2, 1.4, 0.2, 0.1, 0.05
    mu1 = math.asin(1 / M1)
    t = R * math.sin(mu1) * 2 * (M1**2 - 1) / ((gamma + 1) * M1**2)
    cusp = (xs + t * math.cos(mu1), H - t * math.sin(mu1))
    distances = []
    for n in (41, 81, 161):
        flow = channel_flow(M1, lower_wall=STRAIGHT_FLOOR,
                            upper_wall=WallContour.bend(H, xs, math.radians(-6.0), R),
                            length=0.5, n_points=n)
        # the march now goes on through the shock with a fitted shock
        # (tests/test_channel_shocks.py); the fold is still reported where the net folded
        assert flow.stop_reason == "length"
        distances.append(math.hypot(flow.shock_x - cusp[0], flow.shock_y - cusp[1]))
        assert distances[-1] < 2.5 * (H / (n - 1)) * math.sqrt(M1**2 - 1)
        # the hand-over row (the net's last complete row) lies upstream of the fold
        assert flow.handover_x.min() <= flow.shock_x
    assert distances[0] > distances[1] > distances[2]


@pytest.mark.parametrize("turn_deg", [10.0, -10.0])
def test_sharp_corners_given_as_tiny_arcs(turn_deg):
    # Invented corners (radius 1e-5 m, far below the 3.3 mm inlet spacing): an outward
    # corner still gives the exact plateau ν1 + 2δ on the floor (invariants); an inward
    # corner is a compression corner: the net folds at once, at the corner, and the fitted
    # shock starts there (its reflections end in a Mach reflection: test_channel_shocks).
    M1, H, n = 2.2, 0.1, 31
    flow = channel_flow(M1, lower_wall=STRAIGHT_FLOOR,
                        upper_wall=WallContour.bend(H, 0.05, math.radians(turn_deg), 1e-5),
                        length=0.6, n_points=n)
    if turn_deg > 0:
        assert flow.stop_reason == "length"
        expected = mp_mach_from_nu(float(mp_nu(M1)) + 2 * math.radians(turn_deg))
        assert flow.lower_wall_mach.max() == pytest.approx(expected, rel=1e-12)
    else:
        assert flow.stop_reason == "mach_reflection"
        spacing = H / (n - 1)
        assert math.hypot(flow.shock_x - 0.05, flow.shock_y - H) < 3 * spacing
        assert math.hypot(flow.shocks[0].x[0] - 0.05, flow.shocks[0].y[0] - H) < 1e-4


def test_compression_to_sonic_speed_stops_cleanly():
    # Invented case: a weak stream (M 1.02) squeezed by a gentle 3° roof turn
    # (ν1 = 0.13°, so the roof's turn exceeds what the stream can take before M = 1)
    flow = channel_flow(1.02, lower_wall=STRAIGHT_FLOOR,
                        upper_wall=WallContour.bend(1.0, 0.1, math.radians(-3.0), 50.0),
                        length=10.0, n_points=21)
    assert flow.stop_reason == "sonic"
    assert np.all(np.isfinite(flow.net.mach)) and np.all(flow.net.mach >= 1.0)
    # reported at the slowest node of the last row, on the roof where the squeeze acts
    assert flow.shock_y == pytest.approx(float(flow.handover_y[-1]), abs=1e-12)
    assert flow.handover_mach.min() == pytest.approx(flow.handover_mach[-1], rel=1e-15)


def test_handover_row_spans_the_channel_and_walls_hold():
    roof = WallContour.bend(0.2, 0.1, math.radians(5.0), 0.5)
    floor = WallContour.bend(0.0, 0.3, math.radians(3.0), 0.5)  # floor turning up: compression
    flow = channel_flow(2.5, lower_wall=floor, upper_wall=roof, length=0.8, n_points=25)
    assert flow.handover_y[0] == pytest.approx(float(floor.height(flow.handover_x[0])), abs=1e-12)
    assert flow.handover_y[-1] == pytest.approx(float(roof.height(flow.handover_x[-1])), abs=1e-12)
    assert np.all(np.diff(flow.handover_y) > 0)
    assert flow.lower_wall_x.shape == flow.lower_wall_p_p0.shape == flow.lower_wall_mach.shape


@settings(max_examples=12, deadline=None)
@given(st.floats(1.4, 3.5), st.floats(1.0, 12.0), st.floats(-4.0, 12.0))
def test_net_properties(M1, roof_turn_deg, floor_turn_deg):
    # Properties: invariants carried along every segment; wall nodes on the walls with the
    # wall's angle; segments run downstream (facts of the trade)
    roof = WallContour.bend(0.1, 0.02, math.radians(roof_turn_deg), 0.3)
    floor = WallContour.bend(0.0, 0.05, -math.radians(floor_turn_deg), 0.3)
    flow = channel_flow(M1, lower_wall=floor, upper_wall=roof, length=0.4, n_points=15)
    net = flow.net
    nu = prandtl_meyer_angle(net.mach)
    families = ((net.plus_segments, net.theta - nu), (net.minus_segments, net.theta + nu))
    for seg, invariant in families:
        assert np.allclose(invariant[seg[:, 0]], invariant[seg[:, 1]], rtol=0, atol=1e-12)
        assert np.all(net.x[seg[:, 1]] > net.x[seg[:, 0]])
    for wall, xs, nodes in ((floor, flow.lower_wall_x, flow.lower_wall_nodes),
                            (roof, flow.upper_wall_x, flow.upper_wall_nodes)):
        assert np.array_equal(net.x[nodes], xs)
        assert np.allclose(net.y[nodes], wall.height(xs), rtol=0, atol=1e-12)
        # where a fitted shock starts at a short arc, taken as a corner at the arc's start,
        # the wall node there already carries the angle after the arc
        keep = ~np.isin(xs, [shock.x[0] for shock in flow.shocks])
        assert np.allclose(net.theta[nodes][keep], np.arctan(wall.slope(xs[keep])), rtol=0,
                           atol=1e-14)


def test_quantity_length():
    flow = channel_flow(2.0, lower_wall=STRAIGHT_FLOOR, upper_wall=WallContour.straight(0.1),
                        length=300 * ureg.mm, n_points=9)
    assert str(flow.lower_wall_x.units) == "millimeter"
    assert flow.lower_wall_x.magnitude.max() >= 300
    # a straight channel keeps the inlet state everywhere (exact)
    assert flow.net.mach == pytest.approx(2.0, rel=1e-13)


@pytest.mark.parametrize("kwargs, name", [
    (dict(M_inlet=1.0), "M_inlet"),
    (dict(M_inlet=[2.0, 3.0]), "M_inlet must be a single value"),
    (dict(lower_wall=WallContour(lambda x: np.nan * x, lambda x: 0.0 * x)), "lower_wall"),
    (dict(upper_wall=WallContour(lambda x: 0.1 + 0 * x, lambda x: np.nan * x)), "upper_wall"),
    (dict(length=float("nan")), "length"),
    (dict(geometry="round"), "geometry"),
    (dict(lower_wall=STRAIGHT_FLOOR, geometry="axisymmetric"), "axis"),
    (dict(length=-1.0), "length"),
    (dict(n_points=2), "n_points"),
    (dict(n_points=10.5), "n_points"),
    (dict(upper_wall=WallContour.straight(0.1, 0.1)), "upper_wall"),
    (dict(upper_wall=WallContour.straight(-0.1)), "upper_wall"),
    (dict(lower_wall=lambda x: 0 * x), "lower_wall"),
    (dict(gamma=0.9), "gamma"),
])
def test_bad_input_errors(kwargs, name):
    args = dict(M_inlet=2.0, lower_wall=STRAIGHT_FLOOR, upper_wall=WallContour.straight(0.1),
                length=1.0)
    args.update(kwargs)
    with pytest.raises(InvalidInputError, match=name):
        channel_flow(args.pop("M_inlet"), **args)


def test_walls_are_geometry_and_cannot_be_nan():
    with pytest.raises(InvalidInputError, match="y0"):
        WallContour.straight(float("nan"))
    with pytest.raises(InvalidInputError, match="finite"):
        WallContour.through_points([0, 1, 2], [0.1, float("nan"), 0.1])


def test_nan_flow_input_gives_a_nan_result():
    # Invented sweep case: NaN in gives NaN out for the flow inputs (not an error)
    for kwargs in (dict(M_inlet=float("nan")), dict(M_inlet=2.0, gamma=float("nan"))):
        args = dict(lower_wall=STRAIGHT_FLOOR, upper_wall=WallContour.straight(0.1),
                    length=1.0)
        flow = channel_flow(kwargs.pop("M_inlet"), **args, **kwargs)
        assert flow.stop_reason == "nan"
        assert math.isnan(flow.shock_x) and flow.lower_wall_p_p0.size == 0
        assert flow.net.x.size == 0


def test_one_length_unit_per_result_and_read_only_fields():
    # Issue 10: every length of one result, the net's too, in the caller's unit
    flow = channel_flow(2.0, lower_wall=STRAIGHT_FLOOR,
                        upper_wall=WallContour.bend(0.1, 0.05, math.radians(4.0), 0.2),
                        length=40 * ureg.cm, n_points=9)
    for value in (flow.lower_wall_x, flow.handover_y, flow.net.x, flow.net.y):
        assert str(value.units) == "centimeter"
    assert str(flow.net.theta.units) == "radian" and str(flow.handover_theta.units) == "radian"
    plain = channel_flow(2.0, lower_wall=STRAIGHT_FLOOR,
                         upper_wall=WallContour.bend(0.1, 0.05, math.radians(4.0), 0.2),
                         length=0.4, n_points=9)
    np.testing.assert_allclose(flow.net.x.m_as("m"), plain.net.x, rtol=1e-14)
    for value in (plain.lower_wall_x, plain.net.x, plain.net.plus_segments,
                  plain.lower_wall_nodes, plain.handover_mach):
        assert not value.flags.writeable
    assert not np.shares_memory(plain.net.x, plain.handover_x)
    assert not np.shares_memory(plain.lower_wall_x, plain.net.x)


def test_axisymmetric_channel_without_a_centre_body_keeps_a_uniform_stream():
    # A round duct of constant radius (lower_wall=None: the axis) carries the inlet state
    # unchanged (fact of the trade); the round unit processes march it
    flow = channel_flow(2.0, lower_wall=None, upper_wall=WallContour.straight(0.05),
                        length=0.3, n_points=11, geometry="axisymmetric")
    assert flow.stop_reason == "length"
    assert flow.net.mach == pytest.approx(2.0, rel=1e-12)
    assert np.all(flow.net.y >= 0.0)


def test_wall_heights_are_the_contours_at_the_wall_nodes():
    # invented: a 4° expansion bend in the roof of a Mach 2 channel 0.3 m high, over a 2°
    # compression bend in its floor; the wall nodes lie on the given contours
    lower = WallContour.bend(0.0, 0.4, np.radians(2.0), 0.4)
    upper = WallContour.bend(0.3, 0.3, np.radians(4.0), 0.3)
    channel = channel_flow(2.0, lower_wall=lower, upper_wall=upper, length=1.2, n_points=9)
    for x, y, wall in ((channel.lower_wall_x, channel.lower_wall_y, lower),
                       (channel.upper_wall_x, channel.upper_wall_y, upper)):
        assert x.shape == y.shape and x.size >= 3
        np.testing.assert_allclose(y, wall.height(x), rtol=1e-12, atol=1e-12)
    np.testing.assert_array_equal(channel.lower_wall_y, channel.net.y[channel.lower_wall_nodes])
    in_cm = channel_flow(2.0, lower_wall=lower, upper_wall=upper, length=120 * ureg.cm,
                         n_points=9)
    assert str(in_cm.upper_wall_y.units) == "centimeter"
    np.testing.assert_allclose(in_cm.upper_wall_y.m_as("m"), channel.upper_wall_y, rtol=1e-12)
