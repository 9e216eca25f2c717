"""Tests of the axisymmetric method of characteristics: unit processes and marchers.

Sources and exact solutions:
- Steady source flow from a point (conical flow in a cone, planar flow in a wedge): the
  flow is radial, θ = polar angle, and the Mach number follows from A/A* = (r/r*)² (round)
  or r/r* (planar), A ∝ r² or r (fact of the trade: one-dimensional flow along rays).
  NACA Report 1135, eq. 80 for A/A*, eq. 171 for ν, through the mpmath reference below.
- The compatibility relations along characteristics,
  d(θ - ν)/ds = -sin θ sin μ / y on a C+ and d(θ + ν)/ds = +sin θ sin μ / y on a C-
  (Zucrow & Hoffman 1977, Gas Dynamics Vol. 2, ch. 16, written per dy there; from memory),
  are checked here on the exact source flow by 40-digit finite differences.
- The axis limit of the source term, sin θ / y -> ∂θ/∂y = ½ cot μ ∂ν/∂x (derived in
  gasdyn2d.characteristics.unit_processes from the continuity equation on the axis), is
  checked on the same exact flow, where both equal 1/x.
- Facts of the trade: a uniform stream parallel to the axis has no source term (θ = 0),
  so its characteristics are straight Mach lines as in planar flow.
"""

import math

import mpmath as mp
import numpy as np
import pytest

from gasdyn2d.characteristics.channels import march_rows
from gasdyn2d.characteristics.fan_nets import march_fan_band
from gasdyn2d.characteristics.nozzles import minimum_length_contour
from gasdyn2d.characteristics.turning_regions import march_turning_region, trace_wall
from gasdyn2d.characteristics.unit_processes import (
    WallContour,
    check_geometry,
    cot_mach_angle_step,
    free_boundary_point,
    interior_point,
    node_record,
    symmetry_point,
    wall_point,
)
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.relations.expansion_fans import mach_from_prandtl_meyer_angle
from gasdyn2d.relations.isentropic import area_ratio, mach_angle_of

# ---------------------------------------------------------------- mpmath reference


def mp_nu(M, g=1.4):
    """ν(M) (NACA Report 1135, eq. 171)."""
    g = mp.mpf(g)
    k = mp.sqrt((g + 1) / (g - 1))
    z = mp.sqrt(M * M - 1)
    return k * mp.atan(z / k) - mp.atan(z)


def mp_source_mach(r, round_=True, g=1.4):
    """Supersonic Mach number of source flow at distance r (r* = 1): A/A* = r² or r."""
    g = mp.mpf(g)
    target = r * r if round_ else r

    def area(M):
        return (1 / M) * ((2 + (g - 1) * M * M) / (g + 1)) ** ((g + 1) / (2 * (g - 1)))

    return mp.findroot(lambda M: area(M) - target, 1 + 2 * mp.sqrt(target - 1))


def source_state(x, y, round_=True):
    """Exact (θ, ν) of source flow at (x, y), as floats (mpmath at 30 digits)."""
    with mp.workdps(30):
        r = mp.sqrt(mp.mpf(x) ** 2 + mp.mpf(y) ** 2)
        return float(mp.atan2(y, x)), float(mp_nu(mp_source_mach(r, round_)))


def source_state_array(x, y, round_=True):
    """Exact (θ, ν) of source flow on arrays, through the package's inverse of A/A*
    (checked against mpmath to ~1e-12 in test_isentropic; spot-checked here below)."""
    from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle
    from gasdyn2d.relations.isentropic import mach_from_area_ratio

    r = np.hypot(x, y)
    mach = mach_from_area_ratio(r * r if round_ else r)
    return np.arctan2(y, x), prandtl_meyer_angle(mach)


# ---------------------------------------------------------------- the equations


@pytest.mark.parametrize("family", [+1, -1])
def test_exact_source_flow_satisfies_the_compatibility_relations(family):
    # Along a C± of the exact round source flow, d(θ ∓ ν)/ds = ∓ sin θ sin μ / y
    # (the relations the unit processes integrate), by central differences at 40 digits.
    with mp.workdps(40):
        x, y = mp.mpf("1.7"), mp.mpf("0.45")

        def state(px, py):
            r = mp.sqrt(px * px + py * py)
            M = mp_source_mach(r)
            return mp.atan2(py, px), mp_nu(M), mp.asin(1 / M)

        theta, nu, mu = state(x, y)
        direction = theta + family * mu
        h = mp.mpf("1e-12")
        ahead = state(x + h * mp.cos(direction), y + h * mp.sin(direction))
        behind = state(x - h * mp.cos(direction), y - h * mp.sin(direction))
        invariant_slope = ((ahead[0] - family * ahead[1]) - (behind[0] - family * behind[1])) / (
            2 * h)
        source = -family * mp.sin(theta) * mp.sin(mu) / y
        assert float(abs(invariant_slope - source)) < 1e-18


def test_axis_limit_of_the_source_term_in_source_flow():
    # On the axis sin θ / y -> ∂θ/∂y and the continuity equation gives ∂θ/∂y = ½ cot μ ∂ν/∂x;
    # in round source flow both are 1/x (θ = atan(y/x)).
    with mp.workdps(40):
        x = mp.mpf("2.3")
        h = mp.mpf("1e-15")
        slope = mp.atan2(h, x) / h  # sin θ / y at y -> 0 (θ ≈ y/x)
        M = mp_source_mach(x)
        d_nu = (mp_nu(mp_source_mach(x + h)) - mp_nu(mp_source_mach(x - h))) / (2 * h)
        half_form = mp.sqrt(M * M - 1) * d_nu / 2
        assert float(abs(slope - 1 / x)) < 1e-25
        assert float(abs(half_form - 1 / x)) < 1e-20


# ---------------------------------------------------------------- unit processes


def test_geometry_switch_rejects_unknown_names():
    assert check_geometry("planar") is False and check_geometry("axisymmetric") is True
    with pytest.raises(InvalidInputError, match="geometry"):
        check_geometry("round")
    with pytest.raises(InvalidInputError, match="geometry"):
        interior_point(0, 0, 0, 0.4, 0, 1, 0, 0.4, geometry="axi")


def test_uniform_axial_stream_has_no_source_term():
    # Fact of the trade: θ = 0 everywhere, so the round net equals the planar one.
    nu = float(mp_nu(mp.mpf(2)))
    planar = interior_point(0.0, 0.5, 0.0, nu, 0.0, 1.5, 0.0, nu)
    round_ = interior_point(0.0, 0.5, 0.0, nu, 0.0, 1.5, 0.0, nu, geometry="axisymmetric")
    assert np.allclose(round_, planar, rtol=1e-14, atol=1e-15)
    # the axis point of the same stream keeps its state
    *_, nu3, t = symmetry_point(0.0, 1.0, 0.0, nu, geometry="axisymmetric", axis_slope=0.0)
    assert nu3 == pytest.approx(nu, rel=1e-14)


def _local_errors(process, spacings):
    errors = []
    for h in spacings:
        errors.append(process(h))
    orders = [math.log2(a / b) for a, b in zip(errors, errors[1:])]
    return errors, orders


def test_interior_point_local_error_is_third_order_in_source_flow():
    # One step in the exact round source flow: a second-order process leaves O(h³)
    def one_step(h):
        x1, y1, x2, y2 = 2.0, 0.3, 2.0, 0.3 + h
        (t1, n1), (t2, n2) = source_state(x1, y1), source_state(x2, y2)
        x3, y3, th3, nu3, tp, tm = interior_point(x1, y1, t1, n1, x2, y2, t2, n2,
                                                  geometry="axisymmetric")
        exact = source_state(float(x3), float(y3))
        return max(abs(th3 - exact[0]), abs(nu3 - exact[1]))

    errors, orders = _local_errors(one_step, [0.2, 0.1, 0.05, 0.025])
    assert all(o > 2.7 for o in orders), orders  # measured 2.8, 2.9, 2.9


def test_axis_point_local_error_is_third_order_with_the_axis_slope():
    # The C- to the axis with ∂θ/∂y at the new node (exact here: 1/x) is third order
    # locally; with the default sin θ2/y2 (∂θ/∂y at the arriving point) it is second.
    def one_step(h, exact_slope):
        t2, n2 = source_state(2.0, h)
        x3, *_ = symmetry_point(2.0, h, t2, n2, geometry="axisymmetric")
        slope = 1.0 / float(x3) if exact_slope else None
        x3, y3, th3, nu3, tm = symmetry_point(2.0, h, t2, n2, geometry="axisymmetric",
                                              axis_slope=slope)
        assert th3 == 0.0 and y3 == 0.0
        return abs(nu3 - source_state(float(x3), 0.0)[1])

    spacings = [0.1, 0.05, 0.025, 0.0125]
    _, orders = _local_errors(lambda h: one_step(h, True), spacings)
    assert all(o > 2.6 for o in orders) and orders[-1] > 2.9, orders  # 2.69, 2.86, 2.93
    _, orders = _local_errors(lambda h: one_step(h, False), spacings)
    assert all(1.9 < o < 2.3 for o in orders), orders
    with pytest.raises(InvalidInputError, match="y_axis"):
        symmetry_point(0.0, 1.0, 0.1, 0.3, y_axis=0.5, geometry="axisymmetric")


def test_wall_point_on_a_cone_in_source_flow():
    # A cone wall through the source is a streamline of the source flow: the wall node has
    # the wall angle, lies on the wall, and its ν matches the exact flow to O(h³).
    alpha = math.radians(12.0)
    wall = WallContour.straight(0.0, alpha)

    def one_step(h):
        x2 = 2.0
        y2 = x2 * math.tan(alpha) - h
        t2, n2 = source_state(x2, y2)
        x3, y3, th3, nu3, t = wall_point(x2, y2, t2, n2, wall, "upper",
                                         geometry="axisymmetric")
        assert th3 == pytest.approx(alpha, abs=1e-15)
        assert y3 == pytest.approx(math.tan(alpha) * x3, rel=1e-13)
        return abs(nu3 - source_state(float(x3), float(y3))[1])

    _, orders = _local_errors(one_step, [0.1, 0.05, 0.025])
    assert all(o > 2.7 for o in orders), orders


def test_free_boundary_point_keeps_the_boundary_pressure():
    # Constant-pressure boundary: ν fixed; the C+ invariant loses the source term on its way
    nu_b = 0.55
    x3, y3, th3, nu3, tp, ts = free_boundary_point(0.0, 0.8, 0.05, 0.5, -0.2, 1.0, 0.1, nu_b,
                                                   geometry="axisymmetric")
    assert nu3 == nu_b and tp > 0 and ts > 0
    planar = free_boundary_point(0.0, 0.8, 0.05, 0.5, -0.2, 1.0, 0.1, nu_b)
    assert th3 < planar[2]  # θ > 0 there: d(θ - ν)/ds < 0 along the C+


def test_cot_mach_angle_step_converges_from_far_guesses():
    # mpmath reference: z = √(M² - 1) of the flow with the given ν
    for M in (1.001, 1.2, 2.0, 4.0, 9.0):
        with mp.workdps(30):
            nu = float(mp_nu(mp.mpf(M)))
            z_exact = float(mp.sqrt(mp.mpf(M) ** 2 - 1))
        for start in (0.5, 2.0):
            z = z_exact * start
            for _ in range(6):
                z = cot_mach_angle_step(z, nu)
            assert float(z) == pytest.approx(z_exact, rel=1e-11)


# ---------------------------------------------------------------- marchers


def _cone_march(n, round_=True, length=4.0):
    alpha, x0 = math.radians(15.0), 1.5
    y = np.linspace(0.0, x0 * math.tan(alpha), n)
    theta, nu = source_state_array(np.full(n, x0), y, round_)
    nodes, row, reason, fold = march_rows(
        np.full(n, x0), y, theta, nu, None, WallContour.straight(0.0, alpha), 1.4,
        lambda r: np.min(r.x) > length, geometry="axisymmetric" if round_ else "planar")
    assert reason == "length"
    x, yy, th, nu_n = nodes.arrays()
    exact_theta, exact_nu = source_state_array(x, yy, round_)
    error = np.maximum(np.abs(th - exact_theta), np.abs(nu_n - exact_nu))
    middle = (np.arctan2(yy, x) > 0.25 * alpha) & (np.arctan2(yy, x) < 0.75 * alpha)
    return error.max(), error[middle].max()


def test_array_source_state_matches_the_mpmath_one():
    theta, nu = source_state_array(np.array([1.7, 3.0]), np.array([0.2, 0.5]))
    for k, (x, y) in enumerate([(1.7, 0.2), (3.0, 0.5)]):
        assert (theta[k], nu[k]) == pytest.approx(source_state(x, y), rel=1e-12)


def test_source_flow_in_a_cone_is_reproduced_at_second_order():
    # The exact round source flow (an axisymmetric solution with the source term everywhere)
    # marched from its own data line between the axis and a 15° cone. Errors against the
    # exact field fall at second order away from the axis; next to the axis (the limit of
    # the source term, ∂θ/∂y from θ/y a mesh spacing away) the order is measured 1.69, 1.75,
    # 1.79 for n = 11..81, rising towards 2.
    worst, middle = zip(*(_cone_march(n) for n in (11, 21, 41, 81)))  # spacing halves
    order_worst = [math.log2(a / b) for a, b in zip(worst, worst[1:])]
    order_middle = [math.log2(a / b) for a, b in zip(middle, middle[1:])]
    assert all(o > 1.65 for o in order_worst), order_worst  # measured 1.69, 1.75, 1.79
    assert order_worst == sorted(order_worst)  # rising towards 2 (1.82 from 81 to 161)
    assert all(o > 1.95 for o in order_middle[1:]), order_middle  # measured 1.99, 1.99
    assert worst[-1] < 2e-5  # measured 1.5e-5 rad at n = 81


def test_planar_source_flow_in_a_wedge_is_second_order():
    # The same march with the planar switch on the planar source flow (A ∝ r): order 2.0
    worst = [_cone_march(n, round_=False)[0] for n in (11, 21, 41)]
    orders = [math.log2(a / b) for a, b in zip(worst, worst[1:])]
    assert all(o > 1.95 for o in orders), orders  # measured 2.05, 2.03


def test_batched_fans_march_like_single_fans():
    # The round kernel marches candidate fans as a batch; each must equal its own march
    fan = np.radians(5.0) * (np.arange(1, 13) / 12) ** 4
    batch = march_fan_band(np.multiply.outer(fan, [1.0, 1.02]), np.multiply.outer(fan, [1.0, 1.02]),
                           0.0, 1.0, boundary="open", n_plus_lines=12, geometry="axisymmetric")
    for k, scale in enumerate((1.0, 1.02)):
        single = march_fan_band(fan * scale, fan * scale, 0.0, 1.0, boundary="open",
                                n_plus_lines=12, geometry="axisymmetric")
        assert np.allclose(batch.records[..., k], single.records, rtol=1e-12, atol=1e-14,
                           equal_nan=True)


def test_turning_region_reproduces_the_planar_simple_wave():
    # The turning-region march with the planar switch is a simple wave (every C+ straight,
    # one state); its wall streamline must be the planar cancellation contour to rounding.
    M, n = 2.4, 24
    wall_x, wall_y, band = minimum_length_contour(M, n)
    b = np.arange(n + 1)
    x, y, th, nu = band.x[b, n], band.y[b, n], band.theta[b, n], band.nu[b, n]
    x[0], y[0], th[0], nu[0] = 0.0, 1.0, band.theta[0, n], band.nu[0, n]
    line = np.array(node_record(x, y, th, nu, axis_slope=0.0))
    from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle

    region = march_turning_region(line, float(prandtl_meyer_angle(M)), 1.4,
                                  exit_length=float(area_ratio(M)) / float(mach_angle_of(M)),
                                  axisymmetric=False)
    wall, crossing, reach = trace_wall(region, line[:4, 0])
    assert reach <= 1.0
    assert np.allclose(wall[0, 1:], wall_x[1:], rtol=0, atol=1e-12)
    assert np.allclose(wall[1, 1:], wall_y[1:], rtol=0, atol=1e-12)
    assert mach_from_prandtl_meyer_angle(wall[3, -1]) == pytest.approx(M, rel=1e-12)
