"""Channels marched through fitted shocks (gasdyn2d.characteristics.fitted_shocks, channel_flow).

Sources:
- The exact regular reflection of an oblique shock from a wall
  (:func:`gasdyn2d.patterns.reflections.wall_reflection`, itself checked against
  NACA Report 1135 and published reflection data in tests/test_reflections.py).
- The oblique-shock relations (NACA Report 1135, eqs. 128-132, 138) and the detachment
  angle (eq. 168), through gasdyn2d.relations.
- Conservation of mass, momentum and energy across any cross-section of a steady duct
  flow (facts of the trade): the fluxes through every station must equal the inlet's
  (x-momentum less the x-force of the wall pressure in between).
- The envelope cusp of a circular-arc compression (derived in tests/test_channels.py):
  where a shock of zero strength starts to strengthen.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from gasdyn2d.characteristics.channels import channel_flow
from gasdyn2d.characteristics.fitted_shocks import march_fitted_channel
from gasdyn2d.characteristics.unit_processes import WallContour
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing
from gasdyn2d.patterns.reflections import wall_reflection
from gasdyn2d.relations.isentropic import pressure_ratio
from gasdyn2d.relations.conical_flow import cone_flow
from gasdyn2d.relations.oblique_shocks import oblique_shock, oblique_shock_ratios
from gasdyn2d.relations.theta_beta_mach import detachment_angles, wave_angle_from_deflection

FLOOR = WallContour.straight(0.0)
M1, TURN, HEIGHT = 2.2, math.radians(6.0), 0.1  # invented test-section duct


def _roof(radius, turn=-TURN):
    """Invented roof: turns down into the flow by 6° (or ``turn``) over an arc starting at
    x = 0.05 m."""
    return WallContour.bend(HEIGHT, 0.05, turn, radius)


def _exact_floor_pressure():
    """p3/p01 behind the regular reflection of the 6° shock (p over the inlet p0)."""
    return float(wall_reflection(M1, TURN).p3_p1) * float(pressure_ratio(M1))


def _floor_after_first_reflection(flow):
    """Floor pressure half-way between the first and second shock feet on the floor."""
    first, second = flow.shocks[0].x[-1], flow.shocks[2].x[-1]
    middle = first + 0.5 * (second - first)
    return float(np.interp(middle, flow.lower_wall_x, flow.lower_wall_p_p0)), first


def test_corner_shock_reflects_exactly():
    # A roof arc shorter than one marching step is a corner: its shock is the exact
    # oblique shock and the reflection the exact regular reflection, to rounding, at
    # every resolution (measured: 1e-15). The march reaches the end of the duct.
    exact = _exact_floor_pressure()
    beta = wave_angle_from_deflection(M1, TURN)  # NACA Report 1135, eq. 138
    for n in (21, 41):
        flow = channel_flow(M1, lower_wall=FLOOR, upper_wall=_roof(0.01), length=0.5, n_points=n)
        assert flow.stop_reason == "length" and flow.net.x.max() == pytest.approx(0.5)
        assert flow.shocks[0].family == -1 and flow.shocks[1].family == +1
        assert flow.shocks[0].end == "wall" and flow.shocks[-1].end == "length"
        assert flow.shocks[0].wave_angle == pytest.approx(beta, rel=1e-12)
        assert flow.shocks[0].p2_p1 == pytest.approx(oblique_shock_ratios(M1, beta).p2_p1,
                                                     rel=1e-12)
        value, _ = _floor_after_first_reflection(flow)
        assert value == pytest.approx(exact, rel=1e-12)


def test_resolved_arc_reflection_within_half_a_percent_and_converging():
    # A short arc the mesh resolves (radius 0.1 m: 10 mm of arc, 1-4 steps): its shock is
    # fitted from a Mach wave of zero strength that the compression strengthens. The floor
    # pressure behind the reflected shock against the exact regular reflection of the 6°
    # shock (the arc's near-isentropic compression makes a little less entropy than the
    # corner's shock: a true difference of O(δ³)). Refinement study n = 21, 41, 81 (161):
    # floor pressure error vs wall_reflection 6.3e-6, -2.8e-6, -2.0e-7 (-8.1e-8);
    # self-convergence: successive differences 1.7e-6, 4.8e-7 (2.1e-8), order 1.8 (4.5).
    # The foot of the incident shock on the floor moves by 1.3, 0.7 (0.4) mm: first order,
    # the weak shock's strengthening being smeared over a cell or two.
    exact = _exact_floor_pressure()
    values, feet = [], []
    for n in (21, 41, 81):
        flow = channel_flow(M1, lower_wall=FLOOR, upper_wall=_roof(0.1), length=0.5, n_points=n)
        assert flow.stop_reason == "length"
        value, foot = _floor_after_first_reflection(flow)
        values.append(value)
        feet.append(foot)
    errors = np.abs(np.array(values) / exact - 1.0)
    assert errors[1] < 5e-3  # the requirement at a moderate resolution (n = 41)
    assert errors[0] > errors[1] > errors[2]
    differences = np.abs(np.diff(values))
    order = math.log(differences[0] / differences[1]) / math.log(2.0)
    assert order > 1.5  # measured 1.8
    steps = np.abs(np.diff(feet))
    assert steps[1] < steps[0]  # the shock's foot converges


def test_mach_reflection_stops_the_march_where_no_regular_reflection_exists():
    # A 10° corner at Mach 2.2 (invented): each regular reflection slows the stream; the
    # oblique-shock relations give the Mach number ahead of each reflection, and the
    # march must stop at the first wall where 10° exceeds the detachment angle
    # (NACA Report 1135, eq. 168).
    turn = math.radians(10.0)
    roof = WallContour.bend(HEIGHT, 0.05, -turn, 1e-5)
    flow = channel_flow(M1, lower_wall=FLOOR, upper_wall=roof, length=0.6, n_points=31)
    mach, regular = M1, 0
    while turn <= detachment_angles(mach)[0]:
        mach = float(oblique_shock_ratios(mach, wave_angle_from_deflection(mach, turn)).M2)
        regular += 1
    # the corner's shock and the regular reflections before the failing one
    assert flow.stop_reason == "mach_reflection"
    assert len(flow.shocks) == regular
    assert all(s.end == "wall" for s in flow.shocks[:-1])
    last = flow.shocks[-1]
    assert last.end == "mach_reflection"  # the shock that reached the wall and stopped it
    wall = FLOOR if last.family < 0 else roof
    assert flow.stop_x == pytest.approx(last.x[-1])
    assert flow.stop_y == pytest.approx(float(wall.height(flow.stop_x)), abs=1e-12)


def _fluxes(flow, walls=None, gamma=1.4):
    """Mass, x-momentum and energy fluxes through every station (trapezoid in y), in units
    of the inlet stagnation state (p0 = 1, T0 = 1, R = 1); the x-momentum less the
    x-force of the walls' pressure upstream of the station (roof minus floor)."""
    floor, roof = walls if walls is not None else (FLOOR, _roof_for_fluxes)
    net = flow.net
    rows = []
    for x in np.unique(net.x):
        k = net.x == x
        y, mach, theta, p = net.y[k], net.mach[k], net.theta[k], net.p_p0[k]
        temperature = 1.0 / (1.0 + 0.5 * (gamma - 1.0) * mach**2)
        rho = p / temperature
        u = mach * np.sqrt(gamma * temperature) * np.cos(theta)
        h0 = gamma / (gamma - 1.0)  # cp T0
        rows.append((x, np.trapezoid(rho * u, y), np.trapezoid(p + rho * u * u, y),
                     np.trapezoid(rho * u * h0 * np.ones_like(y), y)))
    rows = np.array(rows)
    for wall, wall_x, wall_p, sign in ((roof, flow.upper_wall_x, flow.upper_wall_p_p0, 1.0),
                                       (floor, flow.lower_wall_x, flow.lower_wall_p_p0, -1.0)):
        slope = np.asarray(wall.slope(wall_x)) + 0.0 * wall_x
        force = np.concatenate([[0.0], np.cumsum(
            0.5 * np.diff(wall_x) * (wall_p[1:] * slope[1:] + wall_p[:-1] * slope[:-1]))])
        rows[:, 2] -= sign * np.interp(rows[:, 0], wall_x, force)
    return rows


_roof_for_fluxes = WallContour.polyline([0.0, 0.06, 0.16, 0.5], [HEIGHT, HEIGHT, HEIGHT - 0.007,
                                                                  HEIGHT - 0.0035])


def test_fluxes_through_cross_sections_agree_with_the_inlet():
    # Invented duct with shocks and fans: the roof turns down 4° at a corner (a shock that
    # reflects from the floor and the roof), then back up past level at a second corner
    # (an expansion fan that overtakes and weakens the shock and its reflections). Mass,
    # x-momentum and energy fluxes through every station against the inlet's. Measured
    # max relative deviation at n = 41 / 81 / 161: mass 1.8e-3 / 9.5e-4 / 4.9e-4,
    # x-momentum 1.5e-3 / 8.0e-4 / 4.7e-4 (first order: the fan of a corner, a singular
    # point the interpolation smears; through the corner shock itself mass is kept to 1e-16 and
    # momentum to 7e-5, the trapezoid rule across the wall-pressure jump at the corner);
    # energy as mass, since T0 is uniform by construction.
    flows = [channel_flow(M1, lower_wall=FLOOR, upper_wall=_roof_for_fluxes, length=0.5,
                          n_points=n) for n in (41, 81)]
    deviations = []
    for flow in flows:
        assert flow.stop_reason == "length" and len(flow.shocks) >= 3
        rows = _fluxes(flow)
        deviations.append(np.max(np.abs(rows[:, 1:] / rows[0, 1:] - 1.0), axis=0))
    assert np.all(deviations[1] < 1.5e-3)
    assert np.all(deviations[1] < 0.7 * deviations[0])  # the method's error: first order in h
    # the corner's shock meets no wave: straight, its wave angle constant (exact); its
    # reflection is crossed by the fan and bent (measured: β from 32.6° to 29.9° at n = 41)
    first, reflected = flows[0].shocks[:2]
    assert np.ptp(first.wave_angle) < 1e-9
    assert reflected.wave_angle[0] - reflected.wave_angle[-1] > math.radians(2.0)


def test_shock_forms_where_the_net_folded():
    # The characteristic net still finds the fold (the envelope cusp of the arc's
    # compression, tests/test_channels.py); the fitted shock starts at the arc as a Mach
    # wave, runs along the head characteristic and passes the cusp with (nearly) zero
    # strength, strengthening beyond it. Measured at the cusp for n = 21, 41, 81, 161:
    # position error 3.4e-4, 1.7e-4, 7.9e-5, 3.5e-5 m (first order; a tenth of the inlet
    # spacing at n = 41); p2/p1 1.099, 1.068, 1.042, 1.026 (the strengthening starts a
    # few cells early).
    R, xs = 0.2, 0.05
    mu1 = math.asin(1 / M1)
    t = R * math.sin(mu1) * 2 * (M1**2 - 1) / (2.4 * M1**2)
    cusp = (xs + t * math.cos(mu1), HEIGHT - t * math.sin(mu1))
    flow = channel_flow(M1, lower_wall=FLOOR, upper_wall=WallContour.bend(HEIGHT, xs, -TURN, R),
                        length=0.5, n_points=41)
    shock = flow.shocks[0]
    assert flow.stop_reason == "length"
    assert shock.x[0] == pytest.approx(xs, abs=1e-4)
    assert math.hypot(flow.shock_x - cusp[0], flow.shock_y - cusp[1]) < 0.01
    assert float(np.interp(cusp[0], shock.x, shock.y)) == pytest.approx(cusp[1], abs=2.5e-4)
    assert float(np.interp(cusp[0], shock.x, shock.p2_p1)) < 1.08
    assert shock.p2_p1[-1] > 1.3  # nearly the full 6° shock (p2/p1 = 1.42) at the floor


def test_round_duct_shock_converging_on_the_axis_ends_in_a_mach_reflection():
    # Invented round duct (radius 0.1 m) whose wall turns 4° inward at a corner: the conical
    # shock strengthens as it converges on the axis (a fact of axisymmetric flow: the same
    # turn is spread over a shrinking circumference) until the flow behind it turns
    # subsonic; the march stops with a Mach reflection near the axis, at an x that
    # converges as the mesh is refined (0.20819, 0.20710, 0.20668 m at n = 21, 41, 81)
    stops = []
    for n in (41, 81):
        flow = channel_flow(M1, lower_wall=None, upper_wall=_roof(1e-4, turn=math.radians(-4.0)),
                            length=0.5, n_points=n, geometry="axisymmetric")
        assert flow.stop_reason == "mach_reflection"
        assert float(flow.stop_y) < 2.0 * 0.1 / (n - 1)  # within two spacings of the axis
        shock = flow.shocks[0]
        assert shock.p2_p1[0] == pytest.approx(float(oblique_shock(
            M1, deflection=math.radians(4.0)).p2_p1), rel=1e-12)  # NACA Report 1135, eq. 128
        assert np.all(np.diff(shock.p2_p1[2:]) > 0.0) and shock.p2_p1[-1] > 2.0
        stops.append(float(flow.stop_x))
    assert stops[1] == pytest.approx(stops[0], abs=6e-4)


def test_round_duct_centre_body_cone_approaches_taylor_maccoll():
    # A 10° cone centre body (tip on the axis at x = 0.05 m) in a Mach 2 stream, marched by
    # the round fitted march (plain core; channel_flow takes centre bodies above the axis).
    # The shock starts as the wedge's and relaxes to the conical one: surface pressure and
    # wave angle approach Taylor–Maccoll (gasdyn2d.relations.conical_flow.cone_flow, checked
    # against NACA Report 1135 charts in tests/test_conical_flow.py). Measured surface
    # pressure error at x = 0.9 m: 3.4e-5, 2.1e-4, 1.0e-4, 8.7e-5 for n = 41 ... 321, and
    # 3.1e-4, 6.5e-4, 2.9e-4, 9.6e-5 at x = 0.5 m; wave angle at the end 0.014° off at 161.
    M, cone = 2.0, math.radians(10.0)
    exact = cone_flow(M, cone_angle=cone)
    p_cone = float(exact.p_cone_p1) * float(pressure_ratio(M))
    body = WallContour.polyline([0.0, 0.05, 2.05], [0.0, 0.0, 2.0 * math.tan(cone)])
    march = march_fitted_channel(M, 1.4, body, WallContour.straight(0.6), 1.0, 161,
                                 geometry="axisymmetric")
    assert march.reason == "length"
    wall_p = np.array([p[0] for p in march.p_p0])
    assert float(np.interp(0.9, march.station_x, wall_p)) == pytest.approx(p_cone, rel=5e-4)
    assert float(np.interp(0.5, march.station_x, wall_p)) == pytest.approx(p_cone, rel=1e-3)
    family, x, y, beta, ratio, end = march.shocks[0]
    assert family == 1 and end == "length"
    assert float(beta[-1]) == pytest.approx(float(exact.wave_angle), abs=math.radians(0.05))


@pytest.mark.parametrize("lower_deg, upper_deg", [(4.0, 4.0), (3.0, 5.0)])
def test_crossing_shocks_match_the_exact_crossing(lower_deg, upper_deg):
    # Invented duct: floor and roof turn into the flow at sharp corners at x = 0.05 m. The
    # two straight corner shocks (NACA Report 1135, eq. 138) cross where the lines meet;
    # behind the crossing, the transmitted shocks and the slip line are those of the exact
    # crossing of two shocks in a uniform stream (gasdyn2d.patterns.interactions.
    # shock_crossing, itself checked in tests/test_wave_interactions.py): slip-line
    # direction and pressure to 1e-9, transmitted wave angles to 1e-9.
    lower, upper = math.radians(lower_deg), math.radians(upper_deg)
    b_low, b_up = (float(wave_angle_from_deflection(M1, t)) for t in (lower, upper))
    x_cross = 0.05 + HEIGHT / (math.tan(b_low) + math.tan(b_up))
    flow = channel_flow(M1, lower_wall=WallContour.bend(0.0, 0.05, lower, 1e-5),
                        upper_wall=WallContour.bend(HEIGHT, 0.05, -upper, 1e-5), length=0.5,
                        n_points=41)
    first = flow.shocks[:2]
    assert [s.family for s in first] == [1, -1] and all(s.end == "crossing" for s in first)
    assert first[0].x[-1] == pytest.approx(x_cross, abs=1e-9)
    assert first[0].y[-1] == pytest.approx(math.tan(b_low) * (x_cross - 0.05), abs=1e-9)
    exact = shock_crossing(M1, upper, lower)
    transmitted = [s for s in flow.shocks if s.x[0] == first[0].x[-1]]
    assert sorted(float(s.wave_angle[0]) for s in transmitted) == pytest.approx(
        sorted([float(exact.transmitted_above_wave_angle),
                float(exact.transmitted_below_wave_angle)]), rel=1e-9)
    net = flow.net
    behind = (net.x == first[0].x[-1]) & (np.abs(net.y - first[0].y[-1]) < 1e-12)
    slip = behind & (np.abs(net.theta - float(exact.slip_direction)) < 1e-9)
    assert np.count_nonzero(slip) == 4  # regions 4 and 5, two nodes each
    assert net.p_p0[slip] == pytest.approx(float(exact.p_p1) * float(pressure_ratio(M1)),
                                           rel=1e-9)
    # the march goes on (reflections, shocks through the slip line) until a crossing at
    # M ≈ 1.2, where 4° exceeds the detachment angle: no regular crossing exists
    assert flow.stop_reason == "shock_crossing" and flow.stop_x > 0.3


def test_a_shock_overtaking_another_merges_into_the_exact_merged_shock():
    # Invented roof with two 4° compression corners 30 mm apart: the second, steeper shock
    # catches the first and they go on as one. One step on, the merged shock is the exact
    # merging of the region graph (gasdyn2d.patterns.interactions.merging_shocks: merged
    # shock, weak reflected wave and slip line; checked in tests/test_wave_interactions.py):
    # its pressure ratio and wave angle to 1e-7 (measured 1.7e-8 and 2e-9)
    roof = WallContour.polyline([0.0, 0.05, 0.08, 0.5],
                                [HEIGHT, HEIGHT, HEIGHT - 0.03 * math.tan(math.radians(4.0)),
                                 HEIGHT - 0.03 * math.tan(math.radians(4.0))
                                 - 0.42 * math.tan(math.radians(8.0))])
    flow = channel_flow(M1, lower_wall=FLOOR, upper_wall=roof, length=0.5, n_points=41)
    first, second, merged = flow.shocks[:3]
    assert (first.end, second.end, merged.family) == ("merged", "merged", -1)
    assert merged.x[0] == first.x[-1] == second.x[-1]
    exact = merging_shocks(M1, math.radians(4.0), math.radians(4.0))
    assert merged.p2_p1[1] == pytest.approx(float(exact.p_p1), rel=1e-7)
    assert float(merged.wave_angle[1]) == pytest.approx(float(exact.wave_angle), rel=1e-7)
    # the merged 8° shock then reflects from the floor, and its reflection from the roof,
    # at M ≈ 1.5, would need a turn beyond detachment: a Mach reflection
    assert flow.stop_reason == "mach_reflection"


def test_fluxes_through_a_duct_with_crossing_shocks():
    # Invented duct: floor and roof turn 3° into the flow at corners at x = 0.05 m; the
    # two shocks cross, reflect and pass through the slip lines (18 shock entries by
    # 0.5 m). Conservation through every station (facts of the trade): the flow is
    # piecewise uniform, so mass is kept to rounding (measured 8e-16 / 1e-15 at n = 41 /
    # 81); x-momentum less the walls' pressure force agrees within 5.5e-4 / 3.0e-4, the
    # error of the trapezoid rule across the wall-pressure jump at each reflection (one
    # wall interval wide: first order in the step).
    turn = math.radians(3.0)
    floor = WallContour.polyline([0.0, 0.05, 0.5], [0.0, 0.0, 0.45 * math.tan(turn)])
    roof = WallContour.polyline([0.0, 0.05, 0.5], [HEIGHT, HEIGHT, HEIGHT - 0.45 * math.tan(turn)])
    deviations = []
    for n in (41, 81):
        flow = channel_flow(M1, lower_wall=floor, upper_wall=roof, length=0.5, n_points=n)
        assert flow.stop_reason == "length" and len(flow.shocks) > 10
        rows = _fluxes(flow, walls=(floor, roof))
        deviations.append(np.max(np.abs(rows[:, 1:] / rows[0, 1:] - 1.0), axis=0))
    assert deviations[0][0] < 1e-12 and deviations[1][0] < 1e-12  # mass
    assert deviations[1][1] < 1e-3 and deviations[1][1] < 0.7 * deviations[0][1]  # momentum


def test_a_squeeze_to_sonic_speed_stops_cleanly():
    # Invented weak duct (found by a fuzz of random ducts): Mach 1.40, floor turning up 4.3°
    # at a corner, roof turning down 8.1° over a long arc; the flow is compressed towards
    # M = 1 and the march must stop with "sonic", every node recorded supersonic and finite
    flow = channel_flow(1.4015182161049373,
                        lower_wall=WallContour.bend(0.0, 0.0444, math.radians(4.277), 4.2e-4),
                        upper_wall=WallContour.bend(HEIGHT, 0.1689, math.radians(-8.144), 0.373),
                        length=0.6, n_points=29)
    assert flow.stop_reason == "sonic"
    assert np.all(np.isfinite(flow.net.mach)) and np.all(flow.net.mach >= 1.0)
    assert math.isfinite(flow.stop_x)


def test_a_march_crawling_at_sonic_speed_stops():
    # Invented duct (found by a fuzz of random ducts): Mach 2.05, a 5.8° roof compression over
    # a long arc and a 1.6° floor corner slow the stream to M ≈ 1 near x = 0.52 m, where the
    # Mach lines stand across the stream and the steps shrink towards zero: the march must
    # stop there with "sonic" (it crawled on before), every node supersonic and finite
    flow = channel_flow(2.0513903740044785,
                        lower_wall=WallContour.bend(0.0, 0.15497, math.radians(1.568), 4.7456e-4),
                        upper_wall=WallContour.bend(HEIGHT, 0.16871, math.radians(-5.7955), 0.9586),
                        length=0.6, n_points=20)
    assert flow.stop_reason == "sonic" and 0.4 < flow.stop_x < 0.6
    assert np.all(np.isfinite(flow.net.mach)) and np.all(flow.net.mach >= 1.0)
