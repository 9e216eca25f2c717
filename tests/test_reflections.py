"""Tests of gasdyn2d.patterns.reflections: reflections from walls and free boundaries, built on
the region graph, against the independent mpmath reference in wave_problem_reference.py.
"""

from __future__ import annotations


import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d import ureg
from gasdyn2d.errors import DetachedShockError, InvalidInputError, NoSolutionError
from gasdyn2d.relations.oblique_shocks import detachment_angles
from gasdyn2d.patterns.reflections import (free_boundary_reflection, reflection_transition,
                                           wall_reflection)
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing, turn_to_pressure

from wave_problem_reference import (
    DPS,
    _close,
    _f,
    _random_mach,
    _random_regular,
    _rng,
    free_boundary_reflection_reference,
    mach_bracket,
    mach_reflection,
    regular_reflection,
    theta_max,
    transition,
    wave,
)

# ============================================================ wall reflection


def test_regular_reflection_matches_reference_in_batch_and_one_by_one():
    M, theta = _random_regular(12)
    batch = wall_reflection(M, theta)
    assert list(batch.kind) == ["regular"] * 12
    for i in range(12):
        expected = regular_reflection(M[i], theta[i])
        single = wall_reflection(float(M[i]), float(theta[i]))
        assert single.kind == "regular"
        for result, j in ((batch, i), (single, ())):
            got = [np.asarray(getattr(result, k))[j] for k in
                   ("M2", "M3", "p3_p1", "reflected_angle_to_wall")]
            _close(got, expected)


def test_mach_reflection_matches_three_shock_reference():
    M, theta = _random_mach(5)
    batch = wall_reflection(M, theta)
    assert list(batch.kind) == ["mach"] * 5
    for i in range(5):
        bracket = mach_bracket(M[i], theta[i])
        assert bracket is not None
        M3, p3, angle, M4, slip = mach_reflection(M[i], theta[i], bracket=bracket)
        single = wall_reflection(float(M[i]), float(theta[i]))
        for result, j in ((batch, i), (single, ())):
            got = [np.asarray(getattr(result, k))[j] for k in
                   ("M3", "p3_p1", "reflected_angle_to_wall", "M4", "slip_angle_to_wall")]
            _close(got, [M3, p3, angle, M4, slip], rtol=1e-9)
            assert np.asarray(result.M4)[j] < 1.0  # strong-branch stem: subsonic behind it


def test_dual_domain_reports_both_solutions():
    # Hornung (1986), section 3: between the von Neumann and detachment conditions
    # both reflections are possible (the dual-solution domain).
    M = 4.0
    t = reflection_transition(M)
    theta = np.linspace(t.von_neumann.deflection, t.detachment.deflection, 6)[1:-1]
    r = wall_reflection(M, theta)
    assert list(r.kind) == ["regular"] * 4 and np.all(r.dual)
    assert np.all(np.isfinite(r.M4)) and np.all(r.M4 < 1.0)
    assert np.all(r.slip_angle_to_wall > 0)
    # the regular fields are those of the regular reflection, the mach_* those of the other
    for i, th in enumerate(theta):
        _close([r.M3[i], r.p3_p1[i]], regular_reflection(M, th)[1:3])
        bracket = mach_bracket(M, th)
        ref = mach_reflection(M, th, bracket=bracket)
        _close([r.mach_M3[i], r.mach_p3_p1[i], r.M4[i]], [ref[0], ref[1], ref[3]], rtol=1e-9)
    below = wall_reflection(M, 0.9 * t.von_neumann.deflection)
    assert below.kind == "regular" and not below.dual and np.isnan(below.M4)


def test_mach_stem_normal_at_von_neumann_condition():
    # at the von Neumann condition the stem is a normal shock: slip line along the wall
    t = reflection_transition(3.5)
    r = wall_reflection(3.5, t.von_neumann.deflection * (1 + 1e-9))
    assert r.dual
    assert abs(r.slip_angle_to_wall) < 1e-6
    # normal-shock M2 at M1 = 3.5, from the normal-shock relation (NACA Report 1135, eq. 96)
    g = 1.4
    M2_normal = np.sqrt((1 + 0.2 * 3.5**2) / (g * 3.5**2 - 0.2))
    assert abs(r.M4 - M2_normal) < 1e-5


def test_wall_reflection_broadcasts_and_accepts_quantities():
    M = np.array([[2.0], [3.0], [4.0]])
    theta = np.radians([4.0, 8.0])
    r = wall_reflection(M, theta)
    assert r.M3.shape == (3, 2) and r.kind.shape == (3, 2) and r.dual.shape == (3, 2)
    q = wall_reflection(3.0, 8.0 * ureg.deg)
    assert q.reflected_angle_to_wall.units == ureg.deg
    _close(q.reflected_angle_to_wall.m_as("rad"), r.reflected_angle_to_wall[1, 1])
    assert isinstance(wall_reflection(3.0, 0.1).M3, float)


def test_wall_reflection_zero_deflection_is_a_mach_wave_pair():
    # limit: no deflection, both waves are Mach waves and nothing changes (fact of the trade)
    r = wall_reflection(2.5, 0.0)
    assert r.kind == "regular"
    _close([r.M2, r.M3, r.p3_p1], [2.5, 2.5, 1.0])
    _close(r.reflected_angle_to_wall, np.arcsin(1 / 2.5))


def test_wall_reflection_errors():
    with pytest.raises(DetachedShockError, match=r"deflection must be at most the detachment"):
        wall_reflection(2.0, np.radians(30.0))
    with pytest.raises(InvalidInputError, match=r"M1 must be finite and >= 1"):
        wall_reflection(0.8, 0.1)
    # invented case at low Mach number, just beyond detachment of the reflected shock:
    # no regular reflection and no three-shock solution (the von Neumann paradox region)
    theta = reflection_transition(1.5).detachment.deflection + np.radians(0.5)
    with pytest.raises(NoSolutionError, match=r"reflected shock\s+would detach"):
        wall_reflection(1.5, theta)
    r = wall_reflection([1.5, 3.0], [theta, 0.1], errors="nan")
    assert list(r.kind) == ["none", "regular"] and np.isnan(r.M3[0]) and np.isfinite(r.M3[1])
    nan = wall_reflection([2.0, 2.0], [0.1, 1.0], errors="nan")
    assert np.isnan(nan.M2[1]) and np.isfinite(nan.M2[0])


@settings(max_examples=25, deadline=None)
@given(M=st.floats(1.5, 6.0), fraction=st.floats(0.02, 0.95))
def test_regular_reflection_properties(M, fraction):
    # facts of the trade: both shocks compress, and the stream slows at each shock
    theta = fraction * reflection_transition(M).detachment.deflection
    r = wall_reflection(M, theta)
    assert r.kind == "regular"
    assert r.p3_p1 > 1.0 and r.M3 < r.M2 < M
    # the reflected shock lies between its Mach line and the normal to region 2's flow
    assert np.arcsin(1 / r.M2) - theta <= r.reflected_angle_to_wall <= np.pi / 2 - theta


# ============================================================ transition conditions

# Computed in /work/shared/SOURCES.md (mpmath, from the criteria of Hornung 1986):
# incident wave angles [deg], (von Neumann, detachment).
SOURCES_MD_TRANSITION_COMPUTED = {
    2.5: (39.874, 40.323), 3.0: (37.359, 39.520), 4.0: (33.444, 39.232),
    5.0: (30.796, 39.331), 10.0: (25.240, 39.748),
}
# Shock-reflection literature (Hornung 1986; Ben-Dor 2007), values (from memory):
# 33.4° / 39.2° at M 4 and 30.9° / 39.3° at M 4.96.
LITERATURE_TRANSITION_FROM_MEMORY = {4.0: (33.4, 39.2), 4.96: (30.9, 39.3)}


@pytest.mark.parametrize("M", sorted(SOURCES_MD_TRANSITION_COMPUTED))
def test_transition_angles_against_sources_table(M):
    t = reflection_transition(M)
    vn, det = SOURCES_MD_TRANSITION_COMPUTED[M]
    assert abs(np.degrees(t.von_neumann.wave_angle) - vn) < 6e-4
    assert abs(np.degrees(t.detachment.wave_angle) - det) < 6e-4


@pytest.mark.parametrize("M", sorted(LITERATURE_TRANSITION_FROM_MEMORY))
def test_transition_angles_against_literature_from_memory(M):
    t = reflection_transition(M)
    vn, det = LITERATURE_TRANSITION_FROM_MEMORY[M]
    assert abs(np.degrees(t.von_neumann.wave_angle) - vn) < 0.1
    assert abs(np.degrees(t.detachment.wave_angle) - det) < 0.1


def test_transition_matches_mpmath_reference_in_batch_and_one_by_one():
    M = np.array([1.7, 2.1, 2.6, 3.3, 4.4, 6.0, 8.5])
    batch = reflection_transition(M)
    for i, m in enumerate(M):
        (th_det, b_det), vn = transition(m)
        single = reflection_transition(float(m))
        for result, j in ((batch, i), (single, ())):
            _close([np.asarray(result.detachment.deflection)[j],
                    np.asarray(result.detachment.wave_angle)[j]], [th_det, b_det], rtol=1e-9)
            if vn is None:
                assert np.isnan(np.asarray(result.von_neumann.deflection)[j])
            else:
                _close([np.asarray(result.von_neumann.deflection)[j],
                        np.asarray(result.von_neumann.wave_angle)[j]], vn, rtol=1e-9)


def test_criteria_meet_at_the_dual_domain_threshold():
    # /work/shared/SOURCES.md: the von Neumann condition exists only for M >= 2.20203
    # (γ = 1.4, computed), where it coincides with detachment.
    below, above = reflection_transition([2.2020, 2.2021]).von_neumann.wave_angle
    assert np.isnan(below) and np.isfinite(above)
    t = reflection_transition(2.2021)
    assert abs(t.von_neumann.wave_angle - t.detachment.wave_angle) < 1e-4
    wide = reflection_transition(np.linspace(2.21, 8.0, 30))
    assert np.all(wide.von_neumann.wave_angle < wide.detachment.wave_angle)


# ============================================================ free boundary


def test_free_boundary_reflection_matches_reference():
    rng = _rng("test_free_boundary_reflection_matches_reference")
    n = 10
    M = rng.uniform(1.5, 5.0, n)
    theta = rng.uniform(0.05, 0.8, n) * detachment_angles(M, 1.4)[0]
    batch = free_boundary_reflection(M, theta)
    for i in range(n):
        expected = free_boundary_reflection_reference(M[i], theta[i])
        single = free_boundary_reflection(float(M[i]), float(theta[i]))
        for result, j in ((batch, i), (single, ())):
            got = [np.asarray(getattr(result, k))[j] for k in
                   ("M2", "M3", "fan_deflection", "boundary_turn")]
            _close(got, expected)


def test_free_boundary_reflection_is_a_fan_turning_outward():
    r = free_boundary_reflection(2.0, 6.0 * ureg.deg)
    assert r.fan_deflection.units == ureg.deg
    assert r.fan_deflection.m > 0 and r.boundary_turn.m > 6.0
    # a weak shock reflects as a fan of nearly the same turn, so the edge turns by about
    # twice the deflection (linear theory; Liepmann & Roshko 1957, wave reflection from
    # a free boundary, from memory)
    weak = free_boundary_reflection(2.0, 0.2 * ureg.deg)
    assert abs(weak.boundary_turn.m - 0.4) < 2e-3


# ============================================================ per-case failure reasons


def test_wall_reflection_failure_reasons_per_case():
    # invented cases: solved at M 2.8; beyond detachment at M 1.8 and M 1.6 (below the
    # Mach number where the detachment and von Neumann criteria meet); a subsonic M1
    M = np.array([2.8, 1.8, 1.6, 0.8])
    theta = np.radians([10.0, 12.5, 14.0, 5.0])
    r = wall_reflection(M, theta, errors="nan")
    assert list(r.kind) == ["regular", "none", "none", "none"]
    assert r.failure[0] == ""
    with mp.workdps(DPS):  # M2 and θmax(M2) from the mpmath reference
        M2, _ = wave(_f(1.8), _f(np.radians(12.5)), mp.mpf(1.4))
        reach = float(mp.degrees(theta_max(M2, mp.mpf(1.4))))
    assert reach < 12.5
    assert r.failure[1].startswith(
        "no regular reflection (the reflected shock would detach: turning the flow behind "
        f"the incident shock (M2 = {float(M2):.6g}) back by 12.5° exceeds its maximum "
        f"deflection {reach:.6g}°) and no triple point with a weak reflected shock and a "
        "strong-branch Mach stem.")
    assert "strong-branch (subsonic) reflected shock exists" in r.failure[1]
    assert "branch='strong'" in r.failure[1]
    assert r.failure[2].endswith("A search with a strong-branch reflected shock found none "
                                 "either.")
    assert r.failure[3] == "M1 = 0.8 is not supersonic (M1 >= 1 needed)."
    with pytest.raises(NoSolutionError, match=(
            r"^wall_reflection has no solution at index \(1,\) \(2 of 3 cases\), for M1 = 1\.8, "
            r"deflection = 12\.5°: no regular reflection")):
        wall_reflection(M[:3], theta[:3])
    single = wall_reflection(1.8, np.radians(12.5), errors="nan")
    assert isinstance(single.failure, str) and single.failure == r.failure[1]
    # NaN in, NaN out: not a failure
    assert wall_reflection(np.nan, 0.1).failure == ""


def test_strong_reflected_triple_point_named_in_the_reason_exists():
    # the reason above claims a triple point with a strong reflected shock at M 1.8, 12.5°:
    # solve that pattern and check the slip-line conditions with the mpmath reference
    from gasdyn2d.patterns.graph import WavePattern
    M, theta = 1.8, np.radians(12.5)
    p = WavePattern(M)
    p.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    p.add_wave("reflected", upstream="2", downstream="3", family="left", branch="strong",
               guess=0.05)
    p.add_wave("stem", upstream="1", downstream="4", family="right", branch="strong",
               guess=-0.1)
    p.add_slip_line("3", "4")
    s = p.solve()
    with mp.workdps(DPS):
        g = mp.mpf(1.4)
        M2, p2 = wave(_f(M), _f(theta), g)
        M3, p3 = wave(M2, _f(s.wave("reflected").turn), g, strong=True)
        M4, p4 = wave(_f(M), _f(-s.wave("stem").turn), g, strong=True)
        assert float(p2 * p3) == pytest.approx(float(p4), rel=1e-10)
    assert float(M3) < 1.0 and float(M4) < 1.0  # both behind strong shocks
    assert s.region("3").direction == pytest.approx(s.region("4").direction, abs=1e-12)
    assert s.region("4").direction <= 0.0  # towards the wall, as a Mach stem's slip line


def test_shock_crossing_failure_names_the_detached_wave():
    # equal 12° wedges: the transmitted shocks turn the flow back by 12° each (axial slip
    # line); at M 1.6 that exceeds θmax behind the incident shock (mpmath reference)
    with mp.workdps(DPS):
        g = mp.mpf(1.4)
        for M1, detached in ((3.0, False), (1.6, True)):
            M3, _ = wave(_f(M1), _f(np.radians(12.0)), g)
            assert (theta_max(M3, g) < mp.radians(12)) == detached
    x = shock_crossing([3.0, 1.6], np.radians(12.0), np.radians(12.0), errors="nan")
    assert x.failure[0] == "" and np.isnan(x.p_p1[1])
    # equal wedges: both transmitted shocks need the same turn, and either is named
    assert x.failure[1].startswith(("wave 'transmitted below' detached",
                                    "wave 'transmitted above' detached"))
    with pytest.raises(NoSolutionError, match=(
            r"^shock_crossing has no solution at index \(1,\) \(1 of 2 cases\), for M1 = 1\.6, "
            r"deflection_upper = 12°, deflection_lower = 12°: wave 'transmitted (above|below)' "
            r"detached.*errors='nan'")):
        shock_crossing([3.0, 1.6], np.radians(12.0), np.radians(12.0))
    out = shock_crossing(2.0, [0.1, np.radians(25.0), -0.01], 0.1, errors="nan")
    assert out.failure[0] == ""
    assert out.failure[1].startswith("the upper shock detached: deflection_upper = 25° exceeds "
                                     "the detachment deflection θmax(M1 = 2) = 22.97")
    assert out.failure[2] == ("deflection_upper = -0.572958° is negative: the upper shock "
                              "needs a compression (>= 0).")


def test_merging_and_free_boundary_and_pressure_failures():
    m = merging_shocks([3.0, 1.5], np.radians(8.0), np.radians(8.0), errors="nan")
    M2 = float(free_boundary_reflection(1.5, np.radians(8.0)).M2)  # behind the first shock
    limit = np.degrees(detachment_angles(M2)[0])
    assert list(m.failure) == ["", (
        f"the second shock detached: deflection_second = 8° exceeds the detachment deflection "
        f"θmax(M2 = {M2:.6g}) = {limit:.6g}°, so no attached shock exists.")]
    f = free_boundary_reflection(np.array([[3.0], [1.3]]), np.radians([6.0, 40.0]),
                                 errors="nan")
    assert f.failure.shape == (2, 2) and f.failure[0, 0] == "" and f.failure[1, 0] == ""
    assert f.failure[0, 1].startswith("the shock detached: deflection = 40°")
    t = turn_to_pressure([2.0, 2.0, 2.0], [1.5, 5.0, -1.0], errors="nan")
    # normal-shock pressure at M 2: 1 + 2γ/(γ+1)(M² - 1) = 4.5 (NACA Report 1135, eq. 93)
    assert list(t.failure) == [
        "", "the wave cannot reach p2_p1 = 5: a single shock gives at most the normal-shock "
        "ratio 4.5 of M1 = 2.", "p2_p1 = -1 is not a finite pressure ratio > 0."]
    assert turn_to_pressure(2.0, 0.5).failure == ""


def test_detached_incident_shocks_name_the_wave_and_the_stream():
    with mp.workdps(DPS):  # M2 behind the first 8° shock at M 1.5 (mpmath reference)
        M2 = float(wave(_f(1.5), _f(np.radians(8.0)), mp.mpf(1.4))[0])
    with pytest.raises(DetachedShockError, match=(
            r"deflection_second must be at most the detachment deflection θmax\(M2\); got "
            r"0\.1396263402 rad \(8°\) at index \(1, 0\).*The second shock detaches there "
            rf"\(M1 = 1\.5, M2 = {M2:.6g}\)\.")):
        merging_shocks([[3.0], [1.5]], np.radians(8.0), np.radians(8.0))
    with pytest.raises(DetachedShockError, match=(
            r"deflection must be at most the detachment deflection θmax\(M1\); got 0\.5 rad "
            r"\(28\.6479°\); the limit there.*The incident shock detaches there \(M1 = 2\)\.")):
        wall_reflection(2.0, 0.5)  # a single case: no index in the message

