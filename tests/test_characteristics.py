"""Tests of the unit processes of the planar method of characteristics.

References used here:
- NACA Report 1135 (Ames Research Staff, 1953), eq. 171 for ν(M), Table II values
  as listed in /work/shared/SOURCES.md.
- An independent mpmath reference written below from the textbook formula.
- Facts of the trade: in planar homentropic flow θ - ν is constant along a C+
  and θ + ν along a C- (Riemann invariants); C± have directions θ ± μ.
"""

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d.characteristics.unit_processes import (
    CharacteristicNet,
    WallContour,
    cancellation_point,
    free_boundary_point,
    interior_point,
    mach_angle_from_nu,
    state_from_invariants,
    symmetry_point,
    wall_point,
)

# ---------------------------------------------------------------- mpmath reference


def mp_nu(M, g=1.4):
    """ν(M) at 40 digits (NACA Report 1135, eq. 171)."""
    with mp.workdps(40):
        M, g = mp.mpf(M), mp.mpf(g)
        k = mp.sqrt((g + 1) / (g - 1))
        z = mp.sqrt(M * M - 1)
        return k * mp.atan(z / k) - mp.atan(z)


def mp_mach_from_nu(nu, g=1.4):
    """Inverse of mp_nu by mpmath's root finder, in s = ln √(M² - 1) so that M > 1."""
    with mp.workdps(40):
        s = mp.findroot(lambda s: mp_nu(mp.sqrt(1 + mp.exp(2 * s)), g) - mp.mpf(nu),
                       mp.log(mp.cbrt(3 * mp.mpf(nu) * (g + 1) / 2)))
        return mp.sqrt(1 + mp.exp(2 * s))


# NACA Report 1135, Table II (values as in /work/shared/SOURCES.md): M, ν [deg], μ [deg]
NACA_1135_TABLE_II = [(1.5, 11.9052, 41.8103), (2.0, 26.3798, 30.0000),
                      (2.5, 39.1236, 23.5782), (3.0, 49.7573, 19.4712),
                      (5.0, 76.9202, 11.5370)]


@pytest.mark.parametrize("M, nu_deg, mu_deg", NACA_1135_TABLE_II)
def test_mach_angle_from_nu_against_naca_1135_table_ii(M, nu_deg, mu_deg):
    # NACA Report 1135, Table II: μ at the printed ν (6 significant figures)
    assert math.degrees(float(mach_angle_from_nu(math.radians(nu_deg)))) == pytest.approx(
        mu_deg, abs=2e-4)


@pytest.mark.parametrize("M", [1.05, 1.5, 2.2, 3.7, 6.0])
def test_interior_state_against_mpmath(M):
    # mpmath reference: the state of the new node follows from the two invariants
    nu1, nu2 = float(mp_nu(M)), float(mp_nu(M * 1.1))
    x3, y3, th3, nu3, tp, tm = interior_point(0.0, 0.0, -0.02, nu1, 0.0, 1.0, 0.05, nu2)
    expected_nu = 0.5 * ((0.05 + nu2) - (-0.02 - nu1))
    assert nu3 == pytest.approx(expected_nu, rel=1e-15)
    mach = float(mp_mach_from_nu(nu3))
    assert math.asin(1 / mach) == pytest.approx(float(mach_angle_from_nu(nu3)), rel=1e-12)


def test_interior_point_in_uniform_stream_is_exact():
    # Fact of the trade: in a uniform stream the characteristics are straight Mach lines
    # at ±μ, so the node from (0, 0) and (0, 1) lies at y = 1/2, x = cot(μ)/2.
    M = 2.5
    nu = float(mp_nu(M))
    mu = math.asin(1 / M)
    x3, y3, th3, nu3, tp, tm = interior_point(0.0, 0.0, 0.0, nu, 0.0, 1.0, 0.0, nu)
    assert x3 == pytest.approx(0.5 / math.tan(mu), rel=1e-13)
    assert y3 == pytest.approx(0.5, rel=1e-13)
    assert tp == pytest.approx(tm, rel=1e-13)
    assert tp == pytest.approx(0.5 / math.sin(mu), rel=1e-13)


def test_state_from_invariants_round_trip():
    theta, nu = state_from_invariants(0.7, -0.1)
    assert theta - nu == pytest.approx(-0.1, abs=1e-16)
    assert theta + nu == pytest.approx(0.7, abs=1e-16)


finite_states = st.tuples(st.floats(-0.3, 0.3), st.floats(0.05, 1.2))


@settings(max_examples=60, deadline=None)
@given(finite_states, finite_states, st.floats(0.2, 3.0))
def test_interior_point_keeps_invariants_and_lies_on_both_segments(s1, s2, gap):
    # Property (Riemann invariants, fact of the trade) and geometric consistency
    (th1, nu1), (th2, nu2) = s1, s2
    if not 0.0 < 0.5 * ((th2 + nu2) - (th1 - nu1)) < 2.0:
        return
    x3, y3, th3, nu3, tp, tm = interior_point(0.0, 0.0, th1, nu1, 0.0, gap, th2, nu2)
    assert th3 - nu3 == pytest.approx(th1 - nu1, abs=1e-15)
    assert th3 + nu3 == pytest.approx(th2 + nu2, abs=1e-15)
    mu1, mu2, mu3 = (float(mach_angle_from_nu(v)) for v in (nu1, nu2, nu3))
    a_plus = 0.5 * (th1 + mu1 + th3 + mu3)
    a_minus = 0.5 * (th2 - mu2 + th3 - mu3)
    assert x3 == pytest.approx(tp * math.cos(a_plus), abs=1e-12)
    assert y3 == pytest.approx(tp * math.sin(a_plus), abs=1e-12)
    assert x3 == pytest.approx(tm * math.cos(a_minus), abs=1e-12)
    assert y3 == pytest.approx(gap + tm * math.sin(a_minus), abs=1e-12)
    if a_plus > a_minus:  # 2 straight above 1 and the segments open downstream
        assert tp > 0 and tm > 0


@pytest.mark.parametrize("shape", [(5,), (3, 4), (2, 1, 3)])
def test_interior_point_vectorised_matches_scalar_calls(shape):
    rng = np.random.default_rng(1)  # invented states
    th1, th2 = rng.uniform(-0.2, 0.2, shape), rng.uniform(-0.2, 0.2, shape)
    nu1, nu2 = rng.uniform(0.3, 0.8, shape), rng.uniform(0.3, 0.8, shape)
    y2 = 1.0  # broadcast a scalar against the arrays
    out = interior_point(0.0, 0.0, th1, nu1, 0.0, y2, th2, nu2)
    for k in np.ndindex(shape):
        single = interior_point(0.0, 0.0, th1[k], nu1[k], 0.0, y2, th2[k], nu2[k])
        for a, b in zip(out, single):
            assert a[k] == pytest.approx(float(b), rel=1e-14, abs=1e-15)


def test_symmetry_point():
    # Symmetry line: θ = 0 there and θ + ν is carried down the C- (fact of the trade)
    x3, y3, th3, nu3, tm = symmetry_point(np.array([0.0, 1.0]), 2.0, 0.1, 0.5)
    assert np.all(th3 == 0.0) and np.all(y3 == 0.0)
    assert np.allclose(nu3, 0.6, rtol=0, atol=1e-16)
    a = 0.5 * ((0.1 - mach_angle_from_nu(0.5)) - mach_angle_from_nu(0.6))
    assert np.allclose(x3, np.array([0.0, 1.0]) - 2.0 / math.tan(a), rtol=1e-14)
    assert np.all(tm > 0)


@pytest.mark.parametrize("angle", [-0.2, 0.0, 0.15])
def test_wall_point_on_straight_inclined_wall_in_parallel_stream(angle):
    # A uniform stream parallel to a straight wall: the node keeps the state and lies
    # where the straight Mach line meets the wall (analytic line intersection).
    M = 2.0
    nu = float(mp_nu(M))
    mu = math.asin(1 / M)
    wall = WallContour.straight(0.0, angle)
    x2, y2 = 0.0, 1.0
    x3, y3, th3, nu3, t = wall_point(x2, y2, angle, nu, wall, "lower")
    assert th3 == pytest.approx(angle, abs=1e-15)
    assert nu3 == pytest.approx(nu, abs=1e-15)
    direction = angle - mu
    x_exact = y2 / (math.tan(angle) - math.tan(direction))
    assert x3 == pytest.approx(x_exact, rel=1e-13)
    assert y3 == pytest.approx(math.tan(angle) * x_exact, rel=1e-12, abs=1e-14)
    assert t > 0


@pytest.mark.parametrize("side", ["lower", "upper"])
def test_wall_point_on_curved_wall_converges(side):
    # Invented bend: the node must lie on the wall, have the wall's angle, keep the
    # arriving invariant, and lie on the averaged-direction segment from point 2.
    turn = 0.12 if side == "lower" else -0.12
    y_wall = 0.0 if side == "lower" else 2.0
    wall = WallContour.bend(y_wall, 0.3, turn, 1.5)
    nu2, th2 = 0.6, 0.01
    x3, y3, th3, nu3, t = wall_point(0.0, 1.0, th2, nu2, wall, side)
    assert y3 == pytest.approx(float(wall.height(x3)), abs=1e-13)
    assert th3 == pytest.approx(math.atan(float(wall.slope(x3))), abs=1e-14)
    sign = -1 if side == "lower" else 1
    assert th3 - sign * nu3 == pytest.approx(th2 - sign * nu2, abs=1e-15)
    direction = 0.5 * ((th2 + sign * float(mach_angle_from_nu(nu2)))
                       + (th3 + sign * float(mach_angle_from_nu(nu3))))
    assert (y3 - 1.0) == pytest.approx(math.tan(direction) * x3, abs=1e-12)


def test_free_boundary_point_turns_by_twice_the_incoming_change():
    # Constant-pressure boundary: ν fixed, θ3 = (θ1 - ν1) + ν_b (fact of the trade:
    # an expansion reflects as a compression)
    x3, y3, th3, nu3, tp, ts = free_boundary_point(0.0, 0.0, 0.0, 0.52, -0.5, 1.0, 0.04, 0.5)
    assert nu3 == 0.5
    assert th3 == pytest.approx(-0.02, abs=1e-16)
    assert tp > 0 and ts > 0
    assert (y3 - 1.0) == pytest.approx(math.tan(0.5 * (0.04 + th3)) * (x3 + 0.5), abs=1e-13)


def test_cancellation_point_keeps_state():
    x3, y3, th3, nu3, tp, ts = cancellation_point(0.0, 0.0, 0.1, 0.3, -1.0, 1.0, 0.2)
    assert th3 == 0.1 and nu3 == 0.3
    direction = 0.1 + float(mach_angle_from_nu(0.3))
    assert y3 == pytest.approx(math.tan(direction) * x3, abs=1e-13)


def test_wall_contours_are_smooth_and_consistent():
    # Invented geometry: a bend is continuous in height and slope, and straight after
    bend = WallContour.bend(0.5, 1.0, -0.2, 2.0)
    x_end = 1.0 + 2.0 * math.sin(0.2)
    for x in (1.0, x_end):
        before, after = float(bend.height(x - 1e-9)), float(bend.height(x + 1e-9))
        assert before == pytest.approx(after, abs=1e-8)
        assert float(bend.slope(x - 1e-9)) == pytest.approx(float(bend.slope(x + 1e-9)), abs=1e-7)
    assert float(bend.slope(10.0)) == pytest.approx(math.tan(-0.2), rel=1e-15)
    xs = np.linspace(0.0, 4.0, 9)
    spline = WallContour.through_points(xs, 0.1 * xs**2)
    assert np.allclose(spline.height(xs), 0.1 * xs**2, atol=1e-14)
    # numerical derivative of the height agrees with the slope
    x = np.linspace(0.5, 3.5, 7)
    assert np.allclose((spline.height(x + 1e-6) - spline.height(x - 1e-6)) / 2e-6,
                       spline.slope(x), atol=1e-6)


def test_characteristic_net_from_nodes():
    net = CharacteristicNet.from_nodes([0, 1], [0, 0], [0, 0], [float(mp_nu(2.0))] * 2,
                                       [[0, 1]], [])
    assert net.mach == pytest.approx([2.0, 2.0], rel=1e-13)
    # NACA Report 1135, Table II, M = 2.0: p/p0 = 0.127805
    assert net.p_p0 == pytest.approx([0.127805, 0.127805], rel=1e-5)
    assert net.minus_segments.shape == (0, 2)
    assert "CharacteristicNet" in repr(net)


@pytest.mark.parametrize("make, name", [
    (lambda: WallContour.bend(0.0, 0.0, 0.1, -1.0), "radius"),
    (lambda: WallContour.bend(0.0, 0.0, 2.0, 1.0), "turn"),
    (lambda: WallContour.through_points([0.0, 2.0, 1.0], [0.0, 0.0, 0.0]), "increasing"),
    (lambda: WallContour.through_points([0.0, 1.0], [0.0, 0.0]), "3 points"),
])
def test_wall_contour_bad_input(make, name):
    from gasdyn2d.errors import InvalidInputError

    with pytest.raises(InvalidInputError, match=name):
        make()


# ---------------------------------------------------------------- wall contours at the boundary
# Issue 9 items: contours pickle; a plain wall angle that was probably meant in degrees is
# caught; sizes and angles may be Quantities (facts of the trade for the expected values).


@pytest.mark.parametrize("make", [
    lambda: WallContour.straight(0.1, 0.05),
    lambda: WallContour.bend(0.2, 0.1, -0.08, 0.5),
    lambda: WallContour.through_points([0.0, 0.4, 1.0], [0.0, 0.02, 0.05]),
    lambda: WallContour.polyline([0.0, 0.5, 1.0], [0.0, 0.03, 0.0]),
])
def test_wall_contours_pickle_and_compare(make):
    import pickle

    wall = make()
    again = pickle.loads(pickle.dumps(wall))
    assert again == wall == make()
    x = np.linspace(-0.5, 1.5, 9)
    np.testing.assert_array_equal(again.height(x), wall.height(x))
    np.testing.assert_array_equal(again.slope(x), wall.slope(x))


def test_wall_angles_probably_in_degrees():
    from gasdyn2d.errors import InvalidInputError, ProbablyDegreesWarning

    with pytest.warns(ProbablyDegreesWarning), pytest.raises(InvalidInputError, match="degrees"):
        WallContour.straight(0.0, 10.0)
    with pytest.raises(InvalidInputError, match="degrees"):
        WallContour.straight(0.0, 3.0)  # 3 rad is no wall angle: 3° was meant
    with pytest.raises(InvalidInputError, match="degrees"):
        WallContour.bend(0.0, 0.0, 5.0, 1.0)
    with pytest.raises(InvalidInputError, match="angle"):
        WallContour.straight(0.0, "2 deg")


def test_wall_contours_take_quantities():
    from gasdyn2d import ureg

    wall = WallContour.straight(100 * ureg.mm, 3 * ureg.deg)
    assert float(wall.height(1.0)) == pytest.approx(0.1 + math.tan(math.radians(3.0)),
                                                    rel=1e-15)
    bend = WallContour.bend(10 * ureg.cm, 5 * ureg.cm, -6 * ureg.deg, 20 * ureg.cm)
    plain = WallContour.bend(0.1, 0.05, math.radians(-6.0), 0.2)
    x = np.linspace(0.0, 0.5, 11)
    np.testing.assert_allclose(bend.height(x), plain.height(x), rtol=1e-14)
    spline = WallContour.through_points([0, 100, 200] * ureg.mm, [0, 1, 4] * ureg.cm)
    assert float(spline.height(0.2)) == pytest.approx(0.04, rel=1e-14)


def test_polyline_contour_has_corners():
    ridge = WallContour.polyline([0.0, 0.4, 1.0], [0.0, 0.04, 0.0])
    assert ridge.corners_x == (0.4,)
    assert float(ridge.slope(0.2)) == pytest.approx(0.1, rel=1e-15)
    assert float(ridge.slope(0.7)) == pytest.approx(-0.04 / 0.6, rel=1e-15)
    assert float(ridge.height(1.5)) == pytest.approx(-0.5 * 0.04 / 0.6, rel=1e-14)
