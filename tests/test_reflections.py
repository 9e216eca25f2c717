"""Tests of gasdyn2d.reflections: the ready coupled problems, built on the region graph.

The independent reference at the top of this file is written from the
textbook wave relations, not from gasdyn2d's code: each coupled problem is
reduced by hand to a single equation in one unknown and solved with mpmath's
root finder at 30 digits (instead of the region graph's batched Newton
iteration in several unknowns). Relations: NACA Report 1135 (1953), θ-β-M
relation eq. 138, normal-shock pressure eq. 93 applied to M sin β,
Prandtl–Meyer function eq. 171, isentropic pressure ratio eq. 44,
maximum-deflection wave angle eq. 168 (equation numbers from memory, as in
/work/shared/SOURCES.md).
"""

from __future__ import annotations

import zlib

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d import ureg
from gasdyn2d.errors import DetachedShockError, InvalidInputError, NoSolutionError
from gasdyn2d.expansion import prandtl_meyer_angle
from gasdyn2d.oblique_shocks import detachment_angles
from gasdyn2d.reflections import (
    free_boundary_reflection,
    merging_shocks,
    reflection_transition,
    shock_crossing,
    turn_to_pressure,
    wall_reflection,
)

# ============================================================ independent reference
DPS = 30


def _f(x):
    return mp.mpf(float(x))


def theta_of_beta(M, b, g):
    """tan θ = 2 cot β (M² sin²β - 1)/(M²(γ + cos 2β) + 2) (NACA Report 1135, eq. 138)."""
    return mp.atan(2 / mp.tan(b) * (M**2 * mp.sin(b) ** 2 - 1) / (M**2 * (g + mp.cos(2 * b)) + 2))


def beta_star(M, g):
    """Wave angle at maximum deflection (NACA Report 1135, eq. 168)."""
    s2 = ((g + 1) * M**2 / 4 - 1 + mp.sqrt((g + 1) * ((g + 1) * M**4 / 16
                                                      + (g - 1) * M**2 / 2 + 1))) / (g * M**2)
    return mp.asin(mp.sqrt(s2))


def theta_max(M, g):
    return theta_of_beta(M, beta_star(M, g), g)


def beta_of_theta(M, theta, g, strong=False):
    """β on the weak (μ..β*) or strong (β*..π/2) branch, by bracketed root finding."""
    bs = beta_star(M, g)
    lo, hi = (bs, mp.pi / 2) if strong else (mp.asin(1 / M), bs)
    if theta == 0:
        return hi if strong else lo
    if theta > theta_of_beta(M, bs, g):
        raise ValueError("detached: no attached shock for this deflection")
    return mp.findroot(lambda b: theta_of_beta(M, b, g) - theta, (lo, hi), solver="anderson",
                       verify=False)


def shock(M, b, g):
    """(M2, p2/p1, θ) behind a shock of wave angle β (normal-shock relations on M sin β)."""
    mn = M * mp.sin(b)
    p = 1 + 2 * g / (g + 1) * (mn**2 - 1)
    mn2 = mp.sqrt((1 + (g - 1) / 2 * mn**2) / (g * mn**2 - (g - 1) / 2))
    th = theta_of_beta(M, b, g)
    return mn2 / mp.sin(b - th), p, th


def nu(M, g):
    """Prandtl–Meyer function (NACA Report 1135, eq. 171)."""
    k = mp.sqrt((g + 1) / (g - 1))
    z = mp.sqrt(M**2 - 1)
    return k * mp.atan(z / k) - mp.atan(z)


def mach_of_nu(v, g, start=2):
    return mp.findroot(lambda m: nu(m, g) - v, mp.mpf(start))


def p_over_p0(M, g):
    """Isentropic p/p0 (NACA Report 1135, eq. 44)."""
    return (1 + (g - 1) / 2 * M**2) ** (-g / (g - 1))


def wave(M, compression_turn, g, strong=False):
    """(M2, p2/p1) behind a shock (turn > 0) or a centred fan (turn < 0)."""
    if compression_turn > 0:
        M2, p, _ = shock(M, beta_of_theta(M, compression_turn, g, strong), g)
        return M2, p
    M2 = mach_of_nu(nu(M, g) - compression_turn, g, start=M)
    return M2, p_over_p0(M2, g) / p_over_p0(M, g)


def regular_reflection(M1, theta, g=1.4):
    """(M2, M3, p3/p1, reflected angle to wall) of a regular reflection."""
    with mp.workdps(DPS):
        M1, theta, g = _f(M1), _f(theta), _f(g)
        M2, p2, _ = shock(M1, beta_of_theta(M1, theta, g), g)
        br = beta_of_theta(M2, theta, g)
        M3, p3, _ = shock(M2, br, g)
        return float(M2), float(M3), float(p2 * p3), float(br - theta)


def mach_reflection(M1, theta, g=1.4, bracket=None):
    """(M3, p3/p1, reflected angle to wall, M4, slip angle to wall) by three-shock theory.

    One unknown: the stem wave angle βs on the strong branch of the free-stream
    polar; the reflected shock's wave angle follows from p3 = p4, and the root
    makes θ3 = θ4. ``bracket`` is (βs_low, βs_high) with a sign change.
    """
    with mp.workdps(DPS):
        M1, theta, g = _f(M1), _f(theta), _f(g)
        M2, p2, _ = shock(M1, beta_of_theta(M1, theta, g), g)

        def reflected(bs):
            _, p4, th4 = shock(M1, bs, g)
            mn = mp.sqrt(1 + (p4 / p2 - 1) * (g + 1) / (2 * g))
            br = mp.asin(mn / M2)
            return br, p4, th4

        def mismatch(bs):
            br, _, th4 = reflected(bs)
            return (-theta + theta_of_beta(M2, br, g)) + th4

        lo, hi = (_f(bracket[0]), _f(bracket[1]))
        bs = mp.findroot(mismatch, (lo, hi), solver="anderson", verify=False)
        br, p4, th4 = reflected(bs)
        M4, _, _ = shock(M1, bs, g)
        M3, _, _ = shock(M2, br, g)
        return float(M3), float(p4), float(br - theta), float(M4), float(th4)


def mach_reflection_float_mismatch(M1, theta, bs, g=1.4):
    """The same direction mismatch in floats, for locating a bracket by a scan."""
    with mp.workdps(20):
        M1, theta, g, bs = _f(M1), _f(theta), _f(g), _f(bs)
        M2, p2, _ = shock(M1, beta_of_theta(M1, theta, g), g)
        _, p4, th4 = shock(M1, bs, g)
        mn2 = 1 + (p4 / p2 - 1) * (g + 1) / (2 * g)
        if mn2 > M2**2 or M2 < 1:
            return None
        br = mp.asin(mp.sqrt(mn2) / M2)
        if br > beta_star(M2, g):
            return None  # reflected shock would be on its strong branch
        return float((-theta + theta_of_beta(M2, br, g)) + th4)


def shock_crossing_reference(M1, du, dl, g=1.4):
    """(slip direction, p/p1, M above, M below): one unknown, the slip direction φ."""
    with mp.workdps(DPS):
        M1, du, dl, g = _f(M1), _f(du), _f(dl), _f(g)
        M2, p2 = wave(M1, du, g)
        M3, p3 = wave(M1, dl, g)

        def gap(phi):
            _, p4 = wave(M2, phi + du, g)  # left-running: compression turn = direction change
            _, p5 = wave(M3, dl - phi, g)  # right-running: compression turn = -direction change
            return mp.log(p2 * p4) - mp.log(p3 * p5)

        phi = mp.findroot(gap, dl - du if dl != du else mp.mpf("1e-3"))
        M4, p4 = wave(M2, phi + du, g)
        M5, _ = wave(M3, dl - phi, g)
        return float(phi), float(p2 * p4), float(M4), float(M5)


def merging_shocks_reference(M1, d1, d2, g=1.4):
    """(slip direction, p/p1, merged wave angle, reflected direction change): unknown θm."""
    with mp.workdps(DPS):
        M1, d1, d2, g = _f(M1), _f(d1), _f(d2), _f(g)
        M2, p2 = wave(M1, d1, g)
        M3, p3 = wave(M2, d2, g)

        def gap(tm):
            _, p4 = wave(M1, tm, g)
            _, p5 = wave(M3, -(tm - d1 - d2), g)
            return mp.log(p4) - mp.log(p2 * p3 * p5)

        width = mp.mpf("0.01")  # the reflected wave is weak: θm is within 0.01 of δ1 + δ2
        hi = min(d1 + d2 + width, theta_max(M1, g) * (1 - mp.mpf("1e-12")))
        tm = mp.findroot(gap, (d1 + d2 - width, hi), solver="anderson", verify=False)
        _, p4 = wave(M1, tm, g)
        return float(tm), float(p4), float(beta_of_theta(M1, tm, g)), float(tm - d1 - d2)


def free_boundary_reflection_reference(M1, theta, g=1.4):
    """(M2, M3, fan deflection, boundary turn): the fan back to p1 is in closed form."""
    with mp.workdps(DPS):
        M1, theta, g = _f(M1), _f(theta), _f(g)
        M2, p2 = wave(M1, theta, g)
        # p3 = p1 with p03 = p02: p3/p03 = (p1/p2)(p2/p02)
        target = p_over_p0(M2, g) / p2
        M3 = mp.sqrt(2 / (g - 1) * (target ** (-(g - 1) / g) - 1))
        fan = nu(M3, g) - nu(M2, g)
        return float(M2), float(M3), float(fan), float(theta + fan)


def turn_to_pressure_reference(M1, p21, g=1.4):
    """(deflection, M2, wave angle or NaN): closed forms of the single wave."""
    with mp.workdps(DPS):
        M1, p21, g = _f(M1), _f(p21), _f(g)
        if p21 > 1:
            mn = mp.sqrt(1 + (p21 - 1) * (g + 1) / (2 * g))
            b = mp.asin(mn / M1)
            M2, _, th = shock(M1, b, g)
            return float(th), float(M2), float(b)
        target = p_over_p0(M1, g) * p21
        M2 = mp.sqrt(2 / (g - 1) * (target ** (-(g - 1) / g) - 1))
        return float(nu(M2, g) - nu(M1, g)), float(M2), float("nan")


def transition(M1, g=1.4):
    """(θ, β) at detachment and at the von Neumann condition (None if it does not exist)."""
    with mp.workdps(DPS):
        M1, g = _f(M1), _f(g)

        def det_gap(th):
            M2, _ = wave(M1, th, g)
            return theta_max(M2, g) - th

        s2 = ((g + 1) * M1**2 / 4 - (3 - g) / 4 + mp.sqrt((g + 1) * (
            (9 + g) / 16 - (3 - g) * M1**2 / 8 + (g + 1) * M1**4 / 16))) / (g * M1**2)
        th_sonic = theta_of_beta(M1, mp.asin(mp.sqrt(s2)), g)  # NACA Report 1135, eq. 167
        th_det = mp.findroot(det_gap, (mp.mpf("0.001"), th_sonic * (1 - mp.mpf("1e-9"))),
                             solver="illinois", verify=False)
        pn = 1 + 2 * g / (g + 1) * (M1**2 - 1)

        def vn_gap(th):
            M2, p2 = wave(M1, th, g)
            _, p3 = wave(M2, th, g)
            return mp.log(p2 * p3) - mp.log(pn)

        M2d, p2d = wave(M1, th_det, g)
        _, p3d, _ = shock(M2d, beta_star(M2d, g), g)
        vn = None
        if p2d * p3d >= pn:
            th_vn = mp.findroot(vn_gap, (mp.mpf("0.01"), th_det * (1 - mp.mpf("1e-12"))),
                                solver="illinois", verify=False)
            vn = (float(th_vn), float(beta_of_theta(M1, th_vn, g)))
        return (float(th_det), float(beta_of_theta(M1, th_det, g))), vn


def mach_bracket(M1, theta, g=1.4, samples=40):
    """Bracket of the stem wave angle: scan from the normal stem towards β*(M1)."""
    with mp.workdps(20):
        bs_star = float(beta_star(_f(M1), _f(g)))
    grid = np.linspace(np.pi / 2, bs_star, samples)
    values = [mach_reflection_float_mismatch(M1, theta, b, g) for b in grid]
    for a, b, fa, fb in zip(grid[:-1], grid[1:], values[:-1], values[1:]):
        if fa is not None and fb is not None and fa * fb <= 0:
            return b, a
    return None


# ============================================================ cases

RTOL = 1e-10  # agreement asked of every ready function against the reference


def _rng(label):
    """A generator of invented random cases, seeded per test so each runs alone alike."""
    return np.random.default_rng(zlib.crc32(label.encode()))


def _random_regular(n):
    """Invented random cases inside the regular-reflection domain (below detachment)."""
    rng = _rng("regular")
    M = rng.uniform(1.6, 5.0, n)
    theta_det = np.asarray(reflection_transition(M).detachment.deflection)
    return M, rng.uniform(0.05, 0.9, n) * theta_det


def _random_mach(n):
    """Invented random cases just beyond detachment, where only Mach reflection exists."""
    rng = _rng("mach")
    M = rng.uniform(2.6, 5.0, n)
    theta_det = np.asarray(reflection_transition(M).detachment.deflection)
    return M, theta_det + np.radians(rng.uniform(0.3, 2.0, n))


def _close(actual, expected, rtol=RTOL, atol=1e-14):
    np.testing.assert_allclose(actual, expected, rtol=rtol, atol=atol)


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


# ============================================================ shock crossing


def test_shock_crossing_matches_reference():
    rng = _rng("test_shock_crossing_matches_reference")
    n = 8
    M = rng.uniform(2.0, 5.0, n)
    tmax = detachment_angles(M, 1.4)[0]
    du = rng.uniform(0.05, 0.35, n) * tmax
    dl = rng.uniform(0.05, 0.35, n) * tmax
    batch = shock_crossing(M, du, dl)
    for i in range(n):
        expected = shock_crossing_reference(M[i], du[i], dl[i])
        single = shock_crossing(float(M[i]), float(du[i]), float(dl[i]))
        for result, j in ((batch, i), (single, ())):
            got = [np.asarray(getattr(result, k))[j] for k in
                   ("slip_direction", "p_p1", "M_above_slip", "M_below_slip")]
            _close(got, expected)
            assert np.asarray(result.transmitted_above_kind)[j] == "shock"


def test_equal_crossing_shocks_give_an_axial_slip_line():
    # symmetry (fact of the trade): equal wedges give a slip line parallel to the axis
    x = shock_crossing([2.0, 3.0, 6.0], np.radians(7.0), np.radians(7.0))
    assert np.all(np.abs(x.slip_direction) < 1e-14)
    _close(x.M_above_slip, x.M_below_slip, rtol=1e-13)
    _close(x.transmitted_above_turn, -x.transmitted_below_turn, rtol=1e-13)


def test_shock_crossing_mirror_symmetry_and_quantities():
    a = shock_crossing(3.0, 5.0 * ureg.deg, 11.0 * ureg.deg)
    b = shock_crossing(3.0, 11.0 * ureg.deg, 5.0 * ureg.deg)
    assert a.slip_direction.units == ureg.deg
    _close(a.slip_direction.m, -b.slip_direction.m, rtol=1e-12)
    _close(a.M_above_slip, b.M_below_slip, rtol=1e-12)
    assert a.slip_direction.m > 0  # the stronger lower wedge pushes the slip line up


def test_shock_crossing_errors():
    with pytest.raises(DetachedShockError, match="deflection_upper"):
        shock_crossing(2.0, np.radians(25.0), 0.1)
    out = shock_crossing(2.0, [0.1, np.radians(25.0)], 0.1, errors="nan")
    assert np.isfinite(out.p_p1[0]) and np.isnan(out.p_p1[1])


# ============================================================ merging shocks


def test_merging_shocks_match_reference():
    rng = _rng("test_merging_shocks_match_reference")
    n = 8
    M = rng.uniform(1.8, 5.0, n)
    d1 = np.radians(rng.uniform(2.0, 9.0, n))
    d2 = np.radians(rng.uniform(2.0, 9.0, n))
    batch = merging_shocks(M, d1, d2)
    for i in range(n):
        expected = merging_shocks_reference(M[i], d1[i], d2[i])
        single = merging_shocks(float(M[i]), float(d1[i]), float(d2[i]))
        for result, j in ((batch, i), (single, ())):
            got = [np.asarray(getattr(result, k))[j] for k in
                   ("slip_direction", "p_p1", "wave_angle", "reflected_turn")]
            _close(got[:3], expected[:3])
            # the reflected turn is a small difference of O(1) turns: absolute check
            assert abs(got[3] - expected[3]) < 1e-12
            kind = np.asarray(result.reflected_kind)[j]
            assert kind == ("fan" if expected[3] > 0 else "shock")


def test_merging_shocks_reflected_wave_is_weak():
    # the reflected wave is of third order in the corner turns, since the two routes
    # differ through the entropy jump, itself third order in shock strength (fact of
    # the trade; NACA Report 1135 gives the third-order entropy rise, from memory)
    m = merging_shocks(3.0, np.radians(5.0), np.radians(5.0))
    assert abs(m.reflected_turn) < 0.01 * np.radians(10.0)
    assert m.merged_turn > np.radians(9.9)
    turns = merging_shocks(3.0, np.radians([1.0, 2.0]), np.radians([1.0, 2.0])).reflected_turn
    order = np.log(turns[1] / turns[0]) / np.log(2.0)
    assert 2.8 < order < 3.6


def test_merging_shocks_second_corner_detached():
    with pytest.raises(DetachedShockError, match=r"deflection_second.*θmax\(M2\)"):
        merging_shocks(1.6, np.radians(8.0), np.radians(10.0))


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


# ============================================================ turn to pressure


def test_turn_to_pressure_matches_reference():
    rng = _rng("test_turn_to_pressure_matches_reference")
    n = 12
    M = rng.uniform(1.3, 6.0, n)
    p_normal = 1 + 2.8 / 2.4 * (M**2 - 1)
    p = np.where(np.arange(n) % 2 == 0, np.maximum(rng.uniform(0.3, 0.99, n) * p_normal, 1.05),
                 rng.uniform(0.05, 0.99, n))
    p = np.where(p > p_normal, 0.5 * (1 + p_normal), p)
    batch = turn_to_pressure(M, p)
    for i in range(n):
        deflection, M2, beta = turn_to_pressure_reference(M[i], p[i])
        single = turn_to_pressure(float(M[i]), float(p[i]))
        for result, j in ((batch, i), (single, ())):
            _close([np.asarray(result.deflection)[j], np.asarray(result.M2)[j]],
                   [deflection, M2])
            kind = np.asarray(result.kind)[j]
            assert kind == ("shock" if p[i] > 1 else "fan")
            if kind == "shock":
                _close(np.asarray(result.wave_angle)[j], beta)
            else:
                _close(np.asarray(result.fan_head_angle)[j], np.arcsin(1 / M[i]))
                _close(np.asarray(result.fan_tail_angle)[j], np.arcsin(1 / M2))


def test_turn_to_pressure_strong_branch_pressure():
    # a pressure above that at maximum deflection needs a strong-branch shock
    r = turn_to_pressure(2.0, 4.2)
    deflection, M2, beta = turn_to_pressure_reference(2.0, 4.2)
    assert r.kind == "shock" and r.M2 < 1.0
    _close([r.deflection, r.M2, r.wave_angle], [deflection, M2, beta])


def test_turn_to_pressure_unreachable_pressure():
    # normal-shock pressure ratio at M1 = 2 is 4.5 (NACA Report 1135, Table II)
    with pytest.raises(NoSolutionError, match=r"p2_p1 must be at most the normal-shock.*4\.5"):
        turn_to_pressure(2.0, 5.0)
    with pytest.raises(InvalidInputError, match="p2_p1 must be finite and > 0"):
        turn_to_pressure(2.0, -1.0)
    r = turn_to_pressure([2.0, 2.0], [5.0, 0.5], errors="nan")
    assert np.isnan(r.M2[0]) and np.isfinite(r.M2[1])


@settings(max_examples=30, deadline=None)
@given(M=st.floats(1.2, 8.0), log_p=st.floats(-3.0, 1.0))
def test_turn_to_pressure_round_trip(M, log_p):
    # the Prandtl–Meyer angle rises by the turn across a fan (fact of the trade)
    p = min(np.exp(log_p), 0.999 * (1 + 2.8 / 2.4 * (M**2 - 1)))
    r = turn_to_pressure(M, p)
    if r.kind == "fan":
        _close(prandtl_meyer_angle(r.M2) - prandtl_meyer_angle(M), r.deflection, rtol=1e-11)
