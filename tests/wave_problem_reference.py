"""Independent mpmath reference for the ready coupled wave problems (not a test file).

Written from the textbook wave relations, not from gasdyn2d's code: each coupled
problem is reduced by hand to a single equation in one unknown and solved with
mpmath's root finder at 30 digits (instead of the region graph's batched Newton
iteration in several unknowns). Relations: NACA Report 1135 (1953), θ-β-M relation
eq. 138, normal-shock pressure eq. 93 applied to M sin β, Prandtl–Meyer function
eq. 171, isentropic pressure ratio eq. 44, maximum-deflection wave angle eq. 168
(equation numbers from memory, as in /work/shared/SOURCES.md). Used by
tests/test_reflections.py and tests/test_wave_interactions.py.
"""

from __future__ import annotations

import zlib

import mpmath as mp
import numpy as np

from gasdyn2d.patterns.reflections import reflection_transition

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


def near_sonic_wedge(M1, fraction, g=1.4, digits=60):
    """(θ, p2/p1 - 1) of the weak shock turning M1 by ``fraction`` of θmax(M1), for M1
    just above 1: θ is rounded to a float first (the value a caller passes), then the
    strength 2γ(M1² sin²β - 1)/(γ + 1) (NACA Report 1135, eq. 93 on M1 sin β) is solved
    at ``digits`` digits, where the θ-β-M relation keeps every digit as M1 -> 1."""
    with mp.workdps(digits):
        M1, g = _f(M1), _f(g)
        theta = float(_f(fraction) * theta_max(M1, g))
        b = beta_of_theta(M1, _f(theta), g)
        return theta, float(2 * g / (g + 1) * (M1**2 * mp.sin(b) ** 2 - 1))
