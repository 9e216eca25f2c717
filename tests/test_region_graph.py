"""Tests of gasdyn2d.patterns.graph: stating, checking and solving wave patterns.

Independent checks here use facts of the trade that do not depend on the
graph's iteration: Riemann invariants across centred fans (ν ∓ θ constant
along the characteristics of the other family, so fan–fan interactions and a
fan's reflection from a straight wall are exact), the Prandtl–Meyer function
(NACA Report 1135, eq. 171, via gasdyn2d's plain core, itself checked against
mpmath in its own tests), and straight-line geometry.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d import FlowState, ureg
from gasdyn2d.errors import IllPosedProblemError, InvalidInputError, NoSolutionError
from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle
from gasdyn2d.relations.oblique_shocks import oblique_shock_ratios, wave_angle_from_deflection
from gasdyn2d.patterns.graph import WavePattern


def _duct(M, ramp, **kwargs):
    """Invented scenario: a ramp shock in a test-section duct reflecting from the roof."""
    p = WavePattern(M, **kwargs)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    return p


# ------------------------------------------------------------ exact fan interactions


@settings(max_examples=25, deadline=None)
@given(M=st.floats(1.2, 5.0), turn=st.floats(0.001, 0.3))
def test_fan_reflected_from_wall_turns_back_and_doubles_nu(M, turn):
    # Riemann invariants (fact of the trade): a fan of turn δ reflected from a straight
    # wall turns the flow back to the wall direction and raises ν by 2δ.
    p = WavePattern(M)
    p.add_wave("corner fan", upstream="1", downstream="2", family="right", turn=turn)
    p.add_wave("reflected", upstream="2", downstream="3", family="left")
    p.add_wall("3", direction=0.0)
    s = p.solve()
    assert s.wave("corner fan").kind == "fan" and s.wave("reflected").kind == "fan"
    assert abs(s.region("3").direction) < 1e-13
    nu1 = prandtl_meyer_angle(M)
    nu3 = prandtl_meyer_angle(s.region("3").M)
    assert abs((nu3 - nu1) - 2 * turn) < 1e-12 * max(1.0, nu3)
    np.testing.assert_allclose(s.wave("reflected").turn, -turn, rtol=1e-12)


def test_two_crossing_fans_are_path_independent():
    # Riemann invariants: the state after a left and a right fan does not depend on
    # their order, and ν rises by the sum of the turns
    M, a, b = 2.3, np.radians(7.0), np.radians(4.0)
    p = WavePattern(M)
    p.add_wave("left fan", upstream="1", downstream="2", family="left", turn=-a)
    p.add_wave("right fan", upstream="2", downstream="4", family="right", turn=b)
    p.add_wave("right first", upstream="1", downstream="3", family="right", turn=b)
    p.add_wave("left second", upstream="3", downstream="5", family="left", turn=-a)
    s = p.solve()
    for key in ("M", "p_ratio", "T_ratio", "direction"):
        np.testing.assert_allclose(getattr(s.region("4"), key), getattr(s.region("5"), key),
                                   rtol=1e-13, atol=1e-15)
    assert abs(prandtl_meyer_angle(s.region("4").M) - prandtl_meyer_angle(M) - (a + b)) < 1e-13
    assert s.region("4").p0_ratio == 1.0


# ------------------------------------------------------------ solving


def test_duct_reflection_against_hand_coupled_relations():
    # hand coupling: the reflected shock turns the flow back by the ramp angle
    M, ramp = 2.6, np.radians(6.0)
    s = _duct(M, ramp).solve()
    b1 = wave_angle_from_deflection(M, ramp)
    r1 = oblique_shock_ratios(M, b1)
    b2 = wave_angle_from_deflection(r1.M2, ramp)
    r2 = oblique_shock_ratios(r1.M2, b2)
    np.testing.assert_allclose([s.region("3").M, s.region("3").p_ratio],
                               [r2.M2, r1.p2_p1 * r2.p2_p1], rtol=1e-13)
    w = s.wave("reflected")
    assert w.kind == "shock" and w.family == "right"
    np.testing.assert_allclose(w.turn, -ramp, rtol=1e-13)
    np.testing.assert_allclose(w.head_line_direction, ramp - b2, rtol=1e-13)


def test_free_boundary_and_pressure_waves():
    # a fan at a free boundary and the same wave stated by its pressure agree
    M = np.array([1.8, 2.5, 3.5])
    a = WavePattern(M)
    a.add_wave("lip", upstream="1", downstream="2", family="right")
    a.add_free_boundary("2", pressure=0.6)
    b = WavePattern(M)
    b.add_wave("lip", upstream="1", downstream="2", family="right", pressure=0.6)
    sa, sb = a.solve(), b.solve()
    np.testing.assert_allclose(sa.region("2").p_ratio, 0.6, rtol=1e-13)
    np.testing.assert_allclose(sa.region("2").M, sb.region("2").M, rtol=1e-12)
    np.testing.assert_allclose(sa.wave("lip").turn, sb.wave("lip").turn, rtol=1e-11)
    assert list(sa.wave("lip").kind) == ["fan"] * 3


def test_direction_given_wave():
    s = WavePattern(3.0, direction=np.radians(2.0)).add_wave(
        "w", upstream="1", downstream="2", family="left", direction=np.radians(12.0)).solve()
    np.testing.assert_allclose(s.wave("w").turn, np.radians(10.0), rtol=1e-14)


def test_batches_broadcast_and_flowstate_inflow():
    M = np.array([[2.0], [3.0]])
    ramp = np.radians([3.0, 6.0, 9.0])
    s = _duct(M, ramp).solve()
    assert s.region("3").M.shape == (2, 3) and s.wave("reflected").kind.shape == (2, 3)
    assert s.ok.all()
    rig = FlowState(2.6, 20 * ureg.kPa, 180 * ureg.K)
    p = _duct(rig, 6 * ureg.deg)
    state = p.solve().state("3")
    assert isinstance(state, FlowState)
    single = _duct(2.6, np.radians(6.0)).solve()
    np.testing.assert_allclose(state.p.m_as("kPa"), 20 * single.region("3").p_ratio,
                               rtol=1e-13)
    with pytest.raises(InvalidInputError, match="FlowState"):
        single.state("3")


def test_gamma_array_and_repr_and_arrays():
    s = _duct(2.5, np.radians(5.0), gamma=np.array([1.3, 1.4, 5 / 3])).solve()
    assert s.region("3").M.shape == (3,)
    assert len(set(np.round(s.region("3").M, 8))) == 3
    text = repr(s)
    assert "ramp shock" in text and "3 of 3 case(s) solved" in text
    arrays = s.arrays()
    assert arrays["region/3/M"].shape == (3,) and "wave/reflected/turn" in arrays


def test_meeting_points_place_the_reflection():
    # geometry: a ramp shock from the origin reaches a roof at height 0.1 m
    M, ramp = 2.6, np.radians(6.0)
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    s = p.solve()
    x, y = s.meeting_point("ramp shock", ((0.0, 0.1), 0.0))
    beta = wave_angle_from_deflection(M, ramp)
    np.testing.assert_allclose([x, y], [0.1 / np.tan(beta), 0.1], rtol=1e-13)
    with pytest.raises(InvalidInputError, match="no start point"):
        s.meeting_point("reflected", ((0.0, 0.0), 0.0))


# ------------------------------------------------------------ failures per case


def test_detached_reflected_shock_per_case():
    # invented cases: a 10° ramp at M 1.6 cannot reflect regularly; at M 3 it can
    p = _duct(np.array([1.6, 3.0]), np.radians(10.0))
    with pytest.raises(NoSolutionError,
                       match=r"at index \(0,\) \(1 of 2 cases fail\): wave 'reflected' detached"):
        p.solve()
    s = p.solve(errors="nan")
    assert list(s.ok) == [False, True]
    assert "reflected" in s.failure[0] and s.failure[1] == ""
    assert np.isnan(s.region("3").M[0]) and np.isfinite(s.region("3").M[1])


def test_unreachable_pressure():
    p = WavePattern(2.0).add_wave("w", upstream="1", downstream="2", family="left",
                                  pressure=10.0)
    with pytest.raises(NoSolutionError, match="cannot be reached"):
        p.solve()


def test_nan_inflow_gives_nan_not_error():
    s = _duct(np.array([np.nan, 2.5]), np.radians(5.0)).solve()
    assert np.isnan(s.region("3").M[0]) and np.isfinite(s.region("3").M[1])


# ------------------------------------------------------------ well-posedness


def test_too_many_unknowns():
    p = WavePattern(2.0)
    p.add_wave("a", upstream="1", downstream="2", family="left")
    p.add_wave("b", upstream="2", downstream="3", family="right")
    p.add_wall("3", 0.0)
    with pytest.raises(IllPosedProblemError,
                       match=r"2 unknown wave turn\(s\) \('a', 'b'\) but 1 condition.*add 1"):
        p.check()


def test_too_many_conditions():
    p = _duct(2.0, 0.1).add_free_boundary("3", 2.0)
    with pytest.raises(IllPosedProblemError, match=r"1 unknown.*but 2 condition.*remove 1"):
        p.solve()


def test_unreachable_region_and_unknown_region():
    p = WavePattern(2.0).add_wave("a", upstream="7", downstream="8", family="left", turn=0.1)
    with pytest.raises(IllPosedProblemError, match=r"'a' \(from '7'\) cannot be reached"):
        p.check()
    q = WavePattern(2.0).add_wave("a", upstream="1", downstream="2", family="left")
    q.add_wall("9", 0.0)
    with pytest.raises(IllPosedProblemError, match=r"wall on '9' names region '9'"):
        q.check()


def test_region_reached_twice_and_structural_singularity():
    p = WavePattern(2.0)
    p.add_wave("a", upstream="1", downstream="2", family="left", turn=0.1)
    p.add_wave("b", upstream="1", downstream="2", family="right", turn=-0.1)
    with pytest.raises(IllPosedProblemError, match=r"region '2' is downstream of two waves"):
        p.check()
    q = WavePattern(2.0)
    q.add_wave("a", upstream="1", downstream="2", family="left", turn=0.1)
    q.add_wave("b", upstream="1", downstream="3", family="right")
    q.add_wall("2", 0.1)
    with pytest.raises(IllPosedProblemError, match=r"wall on '2' cannot be met"):
        q.check()


def test_bad_wave_arguments():
    p = WavePattern(2.0)
    with pytest.raises(InvalidInputError, match="family must be 'left' or 'right'"):
        p.add_wave("a", upstream="1", downstream="2", family="up")
    with pytest.raises(IllPosedProblemError, match="at most one of turn, direction"):
        p.add_wave("a", upstream="1", downstream="2", family="left", turn=0.1, pressure=2.0)
    p.add_wave("a", upstream="1", downstream="2", family="left", turn=0.1)
    with pytest.raises(IllPosedProblemError, match="already exists"):
        p.add_wave("a", upstream="2", downstream="3", family="left", turn=0.1)
    with pytest.raises(InvalidInputError, match="inflow Mach number must be finite and >= 1"):
        _duct(0.5, 0.1).solve()


def test_triple_point_with_strong_reflected_shock():
    # invented case below M1 = 2.2: wall_reflection finds no weak-reflected triple point,
    # but the pattern with a strong-branch reflected shock can be stated and solved
    from gasdyn2d import oblique_shock
    from gasdyn2d.patterns.reflections import reflection_transition, wall_reflection

    M, theta = 2.0, reflection_transition(2.0).detachment.deflection + np.radians(2.7)
    assert wall_reflection(M, theta, errors="nan").kind == "none"
    p = WavePattern(M)
    p.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    p.add_wave("reflected", upstream="2", downstream="3", family="left", branch="strong",
               guess=theta - np.radians(7.0))
    p.add_wave("stem", upstream="1", downstream="4", family="right", branch="strong",
               guess=-np.radians(7.0))
    p.add_slip_line("3", "4")
    s = p.solve()
    # hand coupling with the public one-wave relations
    incident = oblique_shock(M, deflection=theta)
    reflected = oblique_shock(incident.M2, deflection=s.wave("reflected").turn, branch="strong")
    stem = oblique_shock(M, deflection=-s.wave("stem").turn, branch="strong")
    np.testing.assert_allclose(incident.p2_p1 * reflected.p2_p1, stem.p2_p1, rtol=1e-12)
    np.testing.assert_allclose(-theta + s.wave("reflected").turn, s.wave("stem").turn,
                               rtol=1e-12)
    assert s.region("3").M < 1.0 and s.region("4").M < 1.0


@settings(max_examples=20, deadline=None)
@given(M=st.floats(1.5, 6.0), ramp=st.floats(0.01, 0.6))
def test_shock_regions_lose_stagnation_pressure(M, ramp):
    # second law (fact of the trade): p0 falls across each shock, never rises
    from gasdyn2d.relations.oblique_shocks import detachment_angles

    ramp = ramp * detachment_angles(M, 1.4)[0]
    s = _duct(M, ramp).solve(errors="nan")
    if s.ok:
        assert 1.0 > s.region("2").p0_ratio > s.region("3").p0_ratio > 0.0
        assert s.region("3").M < s.region("2").M < M


def test_errors_nan_for_invalid_inflow():
    s = _duct(np.array([0.5, 2.5]), 0.05).solve(errors="nan")
    assert np.isnan(s.region("3").M[0]) and np.isfinite(s.region("3").M[1])
    with pytest.raises(InvalidInputError, match="errors must be 'raise' or 'nan'"):
        _duct(2.5, 0.05).solve(errors="ignore")


def test_quantity_angles_come_back_as_quantities():
    s = _duct(2.6, 6 * ureg.deg).solve()
    assert s.wave("reflected").turn.units == ureg.deg
    np.testing.assert_allclose(s.wave("reflected").turn.m, -6.0, rtol=1e-13)
    assert s.region("3").direction.units == ureg.deg
    plain = _duct(2.6, np.radians(6.0)).solve()
    assert isinstance(plain.wave("reflected").turn, float)
    assert isinstance(s.arrays()["wave/reflected/turn"], float)  # arrays() are plain radians
    np.testing.assert_allclose(s.arrays()["wave/reflected/turn"], plain.wave("reflected").turn,
                               rtol=1e-13)


def test_wave_segments_for_drawing():
    M, ramp = 2.6, np.radians(6.0)
    p = WavePattern(np.array([M, M]))
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    s = p.solve()
    x, y = s.wave_segment("ramp shock", until=((0.0, 0.1), 0.0))
    beta = wave_angle_from_deflection(M, ramp)
    assert x.shape == (2, 2)
    np.testing.assert_allclose(x[1], 0.1 / np.tan(beta), rtol=1e-13)
    np.testing.assert_allclose(y[:, 0], [0.0, 0.1], atol=1e-15)
    x, y = s.wave_segment("ramp shock", length=2.0)
    np.testing.assert_allclose(np.hypot(x[1] - x[0], y[1] - y[0]), 2.0, rtol=1e-14)


# ------------------------------------------------------------ placed geometry and accessors
# Independent checks: the meeting points are found here by solving the 2×2 linear system of
# the two straight lines by hand (numpy.linalg.solve), with wave angles from the θ-β-M
# relation (gasdyn2d's plain core, checked against NACA Report 1135 in its own tests).


def _cross(p1, a1, p2, a2):
    """Crossing of two lines (point, direction) by hand: p1 + t u1 = p2 + s u2."""
    A = np.array([[np.cos(a1), -np.cos(a2)], [np.sin(a1), -np.sin(a2)]])
    t, _ = np.linalg.solve(A, np.subtract(p2, p1))
    return p1[0] + t * np.cos(a1), p1[1] + t * np.sin(a1)


def _placed_duct(M, ramp, height, *, through=True):
    """Invented: a ramp from the origin under a flat roof; the reflection hits the ramp."""
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0, through=(0.0, height) if through else None)
    p.add_wave("second reflection", upstream="3", downstream="4", family="left")
    p.add_wall("4", direction=ramp, through=(0.0, 0.0) if through else None)
    return p


def test_reflection_points_on_placed_walls():
    M, ramp, h = 2.6, np.radians(6.0), 0.1
    s = _placed_duct(M, ramp, h).solve()
    beta1 = wave_angle_from_deflection(M, ramp)
    x1, y1 = _cross((0.0, 0.0), beta1, (0.0, h), 0.0)
    assert (x1, y1) == pytest.approx((h / np.tan(beta1), h), rel=1e-14)
    link = s.connection("reflected")
    assert (link.upstream, link.downstream, link.family, link.branch, link.given_by,
            link.start_source) == ("2", "3", "right", "weak", "unknown", "wall")
    np.testing.assert_allclose([link.start_x, link.start_y], [x1, y1], rtol=1e-13)
    # the reflected shock leans back from region 2's flow (direction = ramp) by its wave angle
    M2 = s.region("2").M
    beta2 = wave_angle_from_deflection(M2, ramp)
    x2, y2 = _cross((x1, y1), ramp - beta2, (0.0, 0.0), ramp)
    np.testing.assert_allclose(s.wave_start("second reflection"), (x2, y2), rtol=1e-12)
    walls = [m for m in s.meeting_points if m.kind == "wall"]
    assert [(m.incoming, m.outgoing, m.boundary_region) for m in walls] == [
        (("ramp shock",), ("reflected",), "3"), (("reflected",), ("second reflection",), "4")]
    np.testing.assert_allclose([walls[1].x, walls[1].y], [x2, y2], rtol=1e-12)
    # meeting_point of the implied start agrees with the hand crossing too
    np.testing.assert_allclose(s.meeting_point("reflected", ((0.0, 0.0), ramp)), (x2, y2),
                               rtol=1e-12)
    assert s.connection("ramp shock").start_source == "given"


def test_unplaced_walls_place_nothing():
    s = _placed_duct(2.6, np.radians(6.0), 0.1, through=False).solve()
    assert s.meeting_points == ()
    assert s.wave_start("reflected") is None
    link = s.connection("reflected")
    assert link.start_source == "" and np.isnan(link.start_x) and np.isnan(link.start_y)


def test_reflection_points_batch_and_quantities():
    # invented batch of roof heights given as a Quantity point in centimetres
    M, ramp = np.array([2.2, 2.6, 3.4]), np.radians(5.0)
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
               start=(0.0 * ureg.m, 0.0 * ureg.m))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0, through=(0.0 * ureg.cm, 12.0 * ureg.cm))
    s = p.solve()
    x, y = s.wave_start("reflected")  # in the unit of the first length given (m here)
    beta = wave_angle_from_deflection(M, ramp)
    assert x.shape == (3,) and x.units == ureg.m
    np.testing.assert_allclose(x.m_as("m"), 0.12 / np.tan(beta), rtol=1e-13)
    np.testing.assert_allclose(y.m_as("m"), 0.12, rtol=1e-14)
    assert np.all(s.conditions[0].through_y.m_as("m") == pytest.approx(0.12, rel=1e-15))
    with pytest.raises(InvalidInputError, match=r"through must be a point \(x, y\) \[m\]"):
        WavePattern(2.0).add_wall("2", 0.0, through=0.5)


def test_crossing_point_of_two_placed_shocks():
    # invented: upper and lower wedge tips 1 m apart in a Mach 2.4 stream
    M, du, dl = 2.4, np.radians(8.0), np.radians(5.0)
    p = WavePattern(M)
    p.add_wave("upper shock", upstream="1", downstream="2", family="right", turn=-du,
               start=(0.0, 1.0))
    p.add_wave("lower shock", upstream="1", downstream="3", family="left", turn=dl,
               start=(0.0, 0.0))
    p.add_wave("through 2", upstream="2", downstream="4", family="left")
    p.add_wave("through 3", upstream="3", downstream="5", family="right")
    p.add_slip_line("4", "5")
    s = p.solve()
    bu, bl = wave_angle_from_deflection(M, du), wave_angle_from_deflection(M, dl)
    x = 1.0 / (np.tan(bu) + np.tan(bl))  # y = x tan βl = 1 - x tan βu
    (meeting,) = s.meeting_points
    assert meeting.kind == "waves" and meeting.boundary_region == ""
    assert meeting.incoming == ("upper shock", "lower shock")
    assert meeting.outgoing == ("through 2", "through 3")
    np.testing.assert_allclose([meeting.x, meeting.y], [x, x * np.tan(bl)], rtol=1e-13)
    for name in ("through 2", "through 3"):
        assert s.connection(name).start_source == "wave meeting"
        np.testing.assert_allclose(s.wave_start(name), (x, x * np.tan(bl)), rtol=1e-13)
    assert s.slip_lines == [("4", "5")]
    assert s.conditions[0].kind == "slip line" and np.isnan(s.conditions[0].direction)


def test_merging_point_of_two_shocks_from_successive_corners():
    # invented: a 6° corner at the origin and a further 7° one 0.5 m downstream
    M, d1, d2, L = 2.4, np.radians(6.0), np.radians(7.0), 0.5
    corner = (L, L * np.tan(d1))
    p = WavePattern(M)
    p.add_wave("first", upstream="1", downstream="2", family="left", turn=d1, start=(0.0, 0.0))
    p.add_wave("second", upstream="2", downstream="3", family="left", turn=d2, start=corner)
    p.add_wave("merged", upstream="1", downstream="4", family="left", guess=d1 + d2)
    p.add_wave("reflected", upstream="3", downstream="5", family="right")
    p.add_slip_line("4", "5")
    s = p.solve()
    b1 = wave_angle_from_deflection(M, d1)
    b2 = wave_angle_from_deflection(s.region("2").M, d2)
    point = _cross((0.0, 0.0), b1, corner, d1 + b2)
    (meeting,) = s.meeting_points
    assert set(meeting.incoming) == {"first", "second"}
    assert meeting.outgoing == ("merged", "reflected")
    np.testing.assert_allclose([meeting.x, meeting.y], point, rtol=1e-12)
    np.testing.assert_allclose(s.wave_start("merged"), point, rtol=1e-12)


def test_free_boundary_meeting_point():
    # invented: a 5° shock from the origin inside a jet whose edge runs along y = 0.2 m
    M, d = 2.2, np.radians(5.0)
    p = WavePattern(M)
    p.add_wave("shock", upstream="1", downstream="2", family="left", turn=d, start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_free_boundary("3", pressure=1.0, through=(-1.0, 0.2))
    s = p.solve()
    beta = wave_angle_from_deflection(M, d)
    (meeting,) = s.meeting_points
    assert meeting.kind == "free boundary" and meeting.boundary_region == "3"
    np.testing.assert_allclose([meeting.x, meeting.y], [0.2 / np.tan(beta), 0.2], rtol=1e-13)
    assert s.wave("reflected").kind == "fan"
    assert s.connection("reflected").start_source == "free boundary"


def test_triple_point_is_not_placed():
    # a Mach reflection's triple point height depends on the downstream flow: nothing placed
    M, theta = 2.8, np.radians(22.0)
    p = WavePattern(M)
    p.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta,
               start=(0.0, 1.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="left", guess=0.2)
    p.add_wave("stem", upstream="1", downstream="4", family="right", branch="strong",
               guess=-0.3)
    p.add_slip_line("3", "4")
    s = p.solve()
    assert s.meeting_points == () and s.wave_start("stem") is None
    assert s.connection("stem").branch == "strong"


def test_public_accessors():
    s = _duct(np.array([2.0, 3.0]), np.radians(5.0), gamma=np.array([1.4, 1.3])).solve()
    np.testing.assert_array_equal(s.gamma, [1.4, 1.3])
    assert s.inflow_name == "1" and s.inflow_state is None
    assert s.made_by("3") == "reflected" and s.made_by("1") is None
    (wall,) = s.conditions
    assert wall.kind == "wall" and wall.regions == ("3",) and np.all(wall.direction == 0.0)
    assert np.all(np.isnan(wall.pressure_ratio))
    assert np.all(np.isnan(wall.through_x))
    assert s.connection("ramp shock").given_by == "turn"
    with pytest.raises(InvalidInputError, match=r"no wave named 'roof'; the waves are "
                                                r"\['ramp shock', 'reflected'\]"):
        s.connection("roof")
    with pytest.raises(InvalidInputError, match="no region named '9'"):
        s.made_by("9")
    state = FlowState(2.5, 40e3, 230.0)
    s = _duct(state, np.radians(5.0)).solve()
    assert s.inflow_state is state and s.gamma == pytest.approx(1.4)


def test_region_label_points_lie_in_their_regions():
    M, ramp, h = 2.6, np.radians(6.0), 0.1
    s = _placed_duct(M, ramp, h).solve()
    beta1 = wave_angle_from_deflection(M, ramp)
    x, y = s.region_label_point("2")
    # region 2: above the ramp, below the roof, behind the ramp shock, ahead of the reflection
    assert x * np.tan(ramp) < y < h and y < x * np.tan(beta1)
    x1, y1 = s.wave_start("reflected")
    reflected = s.wave("reflected").head_line_direction
    assert (y - y1) * np.cos(reflected) - (x - x1) * np.sin(reflected) < 0
    x, y = s.region_label_point("1")
    assert 0.0 < y < h and y > x * np.tan(beta1)  # ahead of the ramp shock
    assert s.region_label_point("4") is None  # its wave ends nowhere the solution knows


@settings(max_examples=25, deadline=None)
@given(M=st.floats(2.5, 5.0), ramp_deg=st.floats(1.0, 7.0), height=st.floats(0.01, 10.0))
def test_reflection_points_lie_on_both_lines(M, ramp_deg, height):
    # property (straight-line geometry): each implied start lies on the placed wall and on
    # the line of the wave that meets it
    ramp = np.radians(ramp_deg)
    s = _placed_duct(M, ramp, height).solve()
    x1, y1 = s.wave_start("reflected")
    assert y1 == pytest.approx(height, rel=1e-13)
    assert np.arctan2(y1, x1) == pytest.approx(s.wave("ramp shock").head_line_direction,
                                               rel=1e-12)
    x2, y2 = s.wave_start("second reflection")
    assert y2 == pytest.approx(x2 * np.tan(ramp), rel=1e-10, abs=1e-12 * height)
    assert np.arctan2(y2 - y1, x2 - x1) == pytest.approx(
        s.wave("reflected").head_line_direction, rel=1e-10)


def test_meeting_points_are_nan_where_a_case_fails():
    # invented cases: a 10° ramp at M 1.6 cannot reflect regularly; at M 3 it can
    p = WavePattern(np.array([1.6, 3.0]))
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left",
               turn=np.radians(10.0), start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wave("again", upstream="3", downstream="4", family="left")
    p.add_wall("3", direction=0.0, through=(0.0, 1.0))
    p.add_wall("4", direction=np.radians(10.0), through=(0.0, 0.0))
    s = p.solve(errors="nan")
    first, second = s.meeting_points
    beta = wave_angle_from_deflection(3.0, np.radians(10.0))
    np.testing.assert_allclose(first.x, [np.nan, 1.0 / np.tan(beta)], rtol=1e-13)
    assert np.isnan(second.x[0]) and np.isfinite(second.x[1])


# ------------------------------------------------------------ display


def test_pattern_repr_shows_the_graph():
    p = _placed_duct(2.6, np.radians(6.0), 0.1)
    text = repr(p)
    assert text.startswith("WavePattern: 4 region(s), 3 wave(s), 2 unknown turn(s), "
                           "2 condition(s): well posed")
    assert "1 → 2  left   shock  turn 0.1047197551 rad (6°)" in text
    assert "reflected" in text and "unknown" in text and "wall on '3': direction" in text
    assert "  regions: 1, 2, 3, 4" in text
    assert "<table><caption>waves</caption>" in p._repr_html_()
    q = _duct(np.array([2.0, 3.0]), 6 * ureg.deg)
    assert ": well posed" in repr(q) and "shape (2,), 2 … 3" in repr(q)
    assert "turn 6 deg" in repr(q)
    q.add_wave("extra", upstream="3", downstream="4", family="left")
    assert "not well posed: the pattern has 2 unknown wave turn(s)" in repr(q)


def test_solution_html_and_meeting_point_table():
    p = WavePattern(np.array([2.6, 3.0]))
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left",
               turn=np.radians(6.0), start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", 0.0, through=(0.0, 0.1))
    s = p.solve()
    html = s._repr_html_()
    assert "<caption>regions</caption>" in html and "<caption>waves</caption>" in html
    assert "2 of 2 case(s) solved" in html
    table = s.meeting_points
    assert isinstance(table, tuple) and len(table) == 1
    text = repr(table)
    assert text.startswith("MeetingPoints (first case):") and "ramp shock" in text
    assert "<table>" in table._repr_html_()
    frame = table.to_dataframe()
    assert len(frame) == 2 and list(frame["y [m]"]) == pytest.approx([0.1, 0.1])
