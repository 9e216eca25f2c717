"""Legal but extreme inputs (issue 9): huge Mach numbers (1e5 to 1e300 and inf) in every
relation plain core, and the strong-shock limits of the normal-shock inverses.

Each value is checked against tests/reference.py (mpmath at 40 digits, whose float
conversion rounds a result beyond the float range to inf and one below it to 0 or a
subnormal): a representable result must agree to the bound given, one that is not must
come out as its float limit (inf or 0), never NaN, and nothing may warn.
"""

import math

import numpy as np
import pytest

import reference as ref
from gasdyn2d.relations import expansion_fans as fans
from gasdyn2d.relations import isentropic as isen
from gasdyn2d.relations import normal_shocks as ns
from gasdyn2d.relations import oblique_shocks as obl

pytestmark = pytest.mark.filterwarnings("error")  # no overflow or invalid-value warnings

HUGE = [1e5, 1e20, 1e100, 1e160, 1e300]
GAMMAS = [1.4, 1.67, 1.05]
TINY = np.finfo(float).tiny  # below it a float is subnormal: fewer digits


def assert_close(got, expected, rel, what=""):
    """``got`` equals the reference to ``rel`` where the reference is a normal float,
    to ``rel`` plus one subnormal step where it is subnormal, and exactly where it is
    0 or inf (the float limits)."""
    got = float(got)
    assert not math.isnan(got), what
    if expected == 0.0 or math.isinf(expected):
        assert got == expected, (what, got, expected)
    elif abs(expected) < TINY:
        assert abs(got - expected) <= rel * abs(expected) + 2 * 5e-324 * 2**20, (what, got)
    else:
        assert abs(got / expected - 1.0) <= rel, (what, got, expected, abs(got / expected - 1))


def _log_bound(value):
    # exp of a logarithm L carries ~ulp(L) relative: 8 ulp × (1 + |L|) (measured < 2 ulp × |L|)
    return 8 * ref.EPS * (1.0 + abs(math.log(value))) if 0.0 < value < math.inf else 8 * ref.EPS


@pytest.mark.parametrize("M", HUGE)
@pytest.mark.parametrize("g", GAMMAS)
def test_isentropic_ratios_at_huge_mach(M, g):
    cases = [(isen.temperature_ratio, ref.T_T0), (isen.pressure_ratio, ref.p_p0),
             (isen.density_ratio, ref.rho_rho0), (isen.area_ratio, ref.A_Astar)]
    for plain, reference in cases:
        expected = reference(M, g)
        assert_close(plain(M, g), expected, _log_bound(expected), plain.__name__)
    assert_close(isen.mach_angle_of(M), ref.mach_angle(M), 4 * ref.EPS, "μ")
    assert_close(fans.prandtl_meyer_angle(M, g), ref.nu(M, g), 4 * ref.EPS, "ν")


@pytest.mark.parametrize("M", HUGE)
@pytest.mark.parametrize("g", GAMMAS)
def test_isentropic_inverses_at_huge_mach(M, g):
    # from the reference's own (rounded) ratio (|d ln M/d ln r| is 1/2 for T/T0, (γ-1)/(2γ)
    # for p/p0, (γ-1)/2 for ρ/ρ0); a ratio rounded to 0 is M = inf
    for inverse, forward in [(isen.mach_from_temperature_ratio, ref.T_T0),
                             (isen.mach_from_pressure_ratio, ref.p_p0),
                             (isen.mach_from_density_ratio, ref.rho_rho0)]:
        r = forward(M, g)
        got = float(inverse(r, g))
        if r == 0.0:
            assert got == math.inf, inverse.__name__
        elif r < TINY:  # a subnormal ratio keeps only r/5e-324 steps: ~(5e-324/r) relative
            assert got == pytest.approx(M, rel=5e-324 / r), inverse.__name__
        else:  # the closed forms go through ln r: ulp(ln r) = eps |ln r| (not the problem's)
            assert got == pytest.approx(M, rel=_log_bound(r)), inverse.__name__
    A = ref.A_Astar(M, g)
    if A < math.inf:
        # the area ratio's exponent (γ+1)/(2(γ-1)) amplifies: bound 8 ulp × (1 + ln A)
        assert float(isen.mach_from_area_ratio(A, g)) == pytest.approx(M, rel=_log_bound(A))
    assert float(isen.mach_after_isentropic_pressure_change(M, 0.5, g)) == pytest.approx(
        ref.M_from_p_p0(0.5 * ref.p_p0.mp(M, g), g) if ref.p_p0(M, g) > 0 else
        M * 0.5 ** (-(g - 1) / (2 * g)), rel=1e-13)


def test_isentropic_limits_at_infinite_mach():
    # M = inf gives the limits: T/T0 = p/p0 = ρ/ρ0 = 0, A/A* = inf, μ = 0, ν = ν_max
    for g in GAMMAS:
        assert float(isen.temperature_ratio(np.inf, g)) == 0.0
        assert float(isen.pressure_ratio(np.inf, g)) == 0.0
        assert float(isen.density_ratio(np.inf, g)) == 0.0
        assert float(isen.area_ratio(np.inf, g)) == math.inf
        assert float(isen.mach_angle_of(np.inf)) == 0.0
        assert float(fans.prandtl_meyer_angle(np.inf, g)) == pytest.approx(ref.nu_max(g),
                                                                          rel=4 * ref.EPS)
        assert float(isen.mach_from_area_ratio(np.inf, g)) == math.inf


def test_huge_and_ordinary_elements_mix():
    # a huge element must not change its neighbours (the huge forms apply elementwise)
    M = np.array([2.0, 1e200, np.inf, np.nan, 3.0])
    for plain in (isen.temperature_ratio, isen.pressure_ratio, isen.area_ratio,
                  fans.prandtl_meyer_angle):
        mixed = plain(M, 1.4)
        np.testing.assert_array_equal(mixed[[0, 4]], plain(M[[0, 4]], 1.4))
        assert np.isnan(mixed[3]) and not np.isnan(mixed[[0, 1, 2, 4]]).any()
    assert np.isnan(isen.mach_angle_of(M)[3])


@pytest.mark.parametrize("M", HUGE + [math.inf])
@pytest.mark.parametrize("g", GAMMAS)
def test_fan_pressure_ratio_at_huge_mach(M, g):
    # p2/p1 = (T2/T1)^(γ/(γ-1)) between M and 2M (NACA Report 1135, eq. 44 twice)
    expected = 1.0 if math.isinf(M) else ref.fan_p2_p1(M, 2.0 * M, g)
    assert_close(fans.fan_pressure_ratio(M, 2.0 * M, g), expected, 16 * ref.EPS)
    assert float(fans.fan_pressure_ratio(M, M, g)) == 1.0
    assert float(fans.fan_pressure_ratio(2.0, M, g)) == pytest.approx(
        ref.fan_p2_p1(2.0, M, g) if math.isfinite(M) else 0.0, rel=_log_bound(1e-300), abs=0)


@pytest.mark.parametrize("M", HUGE)
@pytest.mark.parametrize("g", GAMMAS)
def test_normal_shock_at_huge_mach(M, g):
    expected = ref.normal_shock(M, g)
    ratios = ns.normal_shock_ratios(ns.mach_squared_minus_one(M), g)
    for name in ("M2", "p2_p1", "rho2_rho1", "T2_T1", "strength"):
        assert_close(getattr(ratios, name), expected[name], 8 * ref.EPS, name)
    assert_close(ratios.p02_p01, expected["p02_p01"], _log_bound(expected["p02_p01"]), "p02")
    assert_close(ns.pitot_ratio(M, g), expected["p02_p1"], _log_bound(expected["p02_p1"]))
    # inverses, from the representable ratios: M2 and ρ2/ρ1 reach their limits within
    # rounding once M1 > ~1e8, where M1 = inf is all the float input can say
    for inverse, name in [(ns.mach_from_temperature_jump, "T2_T1"),
                          (ns.mach_from_pitot_ratio, "p02_p1"),
                          (ns.mach_from_stagnation_pressure_ratio, "p02_p01")]:
        r = expected[name]
        got = float(inverse(r, g))
        if r in (0.0, math.inf):
            assert got == math.inf, name
        elif TINY <= r:
            # ln(p02/p01) ~ -(2/(γ-1)) ln M1: the inverse loses (γ-1)/2 × ulp(ln r) at most
            assert got == pytest.approx(M, rel=_log_bound(r) * max(1.0, 2.0 / (g - 1))), name


@pytest.mark.parametrize("g", GAMMAS)
def test_strong_shock_limits_of_the_inverses(g):
    # ρ2/ρ1 → (γ+1)/(γ-1), M2 → √((γ-1)/(2γ)), p02/p01 → 0 only as M1 → ∞ (NACA Report
    # 1135, eqs. 94, 96, 99): those values give M1 = inf, beyond them NaN. Before, ρ2/ρ1 =
    # 6.0 at γ = 1.4 gave M1 = 1.6e8.
    limit = (g + 1.0) / (g - 1.0)
    assert float(ns.mach_from_density_jump(limit, g)) == math.inf
    nominal = {1.4: 6.0, 1.05: 41.0}.get(g)  # the exact value written by a caller
    if nominal is not None:
        assert float(ns.mach_from_density_jump(nominal, g)) == math.inf
    assert np.isnan(ns.mach_from_density_jump(limit * (1 + 1e-12), g))
    assert float(ns.mach_from_density_jump(limit * (1 - 1e-9), g)) == pytest.approx(
        ref.M1_from_normal_shock("rho2_rho1", limit * (1 - 1e-9), g), rel=1e-6)
    low = math.sqrt((g - 1.0) / (2.0 * g))
    assert float(ns.mach_from_downstream_mach(low, g)) == math.inf
    assert np.isnan(ns.mach_from_downstream_mach(low * (1 - 1e-12), g))
    assert float(ns.mach_from_stagnation_pressure_ratio(0.0, g)) == math.inf
    infinite = ns.normal_shock_ratios(math.inf, g)
    assert float(infinite.rho2_rho1) == pytest.approx(limit, rel=2 * ref.EPS)
    assert float(infinite.M2) == pytest.approx(low, rel=2 * ref.EPS)
    assert float(infinite.p2_p1) == math.inf and float(infinite.p02_p01) == 0.0


def _reference_shock(M, theta, g, strong):
    """(β, p2/p1 - 1) from tests/reference.py at 120 digits: near the Mach wave of a huge
    M1, w = M1² sin²β - 1 is a difference at the (M1 θ)²-th digit, beyond 40."""
    import mpmath as mp

    with mp.workdps(120):
        beta, strength = ref.wave_angle_and_strength.mp(mp.mpf(M), mp.mpf(theta), mp.mpf(g),
                                                       strong)
        return float(beta), float(strength)


@pytest.mark.parametrize("M", HUGE)
@pytest.mark.parametrize("g", [1.4, 1.67])
def test_oblique_shock_at_huge_mach(M, g):
    theta_max, beta_star = ref.detachment(M, g)
    got_max, got_star = obl.detachment_angles(M, g)
    assert float(got_max) == pytest.approx(theta_max, rel=4 * ref.EPS)
    assert float(got_star) == pytest.approx(beta_star, rel=4 * ref.EPS)
    theta_s, beta_s = ref.sonic(M, g)
    assert float(obl.sonic_angles(M, g)[0]) == pytest.approx(theta_s, rel=4 * ref.EPS)
    assert float(obl.sonic_angles(M, g)[1]) == pytest.approx(beta_s, rel=4 * ref.EPS)
    for theta in (0.5 * theta_max, 1e-3, 1e-90 if M > 1e100 else 1e-30):
        for strong in (False, True):
            beta, strength = _reference_shock(M, theta, g, strong)
            bound = 32 * ref.EPS * max(1.0, ref.wave_angle_condition(M, theta, g, strong))
            got = obl.wave_angle_from_deflection(M, theta, g, strong)
            assert float(got) == pytest.approx(beta, rel=bound), (theta, strong)
            fields = obl._shock_from_deflection(np.array([M]), np.array([theta]), g, strong)
            assert_close(fields[0][0], beta, bound, "β")
            assert_close(fields[-1][0], strength, max(bound, 8 * ref.EPS), "strength")
            shock = ref.oblique_shock(M, beta, g)
            assert_close(fields[3][0], shock["M2"], 1e-12, "M2")
            assert_close(fields[5][0], shock["rho2_rho1"], 1e-12, "ρ2/ρ1")


@pytest.mark.parametrize("M", [1e160, 1e300])
def test_tiny_deflection_at_huge_mach_is_the_small_disturbance_shock(M):
    # θ < 1e-100 at M1 > 1e150: z = w/(M1² - 1) underflows; the hypersonic similarity form
    # (exact to rounding there) takes over. Reference: the mpmath solve of eq. 138.
    import mpmath as mp

    for theta in (1e-200, 1e-150, 1e-120):
        with mp.workdps(60):
            # eq. 138 in w = M1² sin²β - 1 (as in reference.strength_condition), solved for w
            # by mpmath's root finder from the small-disturbance estimate; the bisection in
            # β of reference.wave_angle cannot resolve w ~ 1e-40 next to β ~ 1e-160
            m, t, g = mp.mpf(M), mp.tan(mp.mpf(theta)), mp.mpf(1.4)
            f = lambda w: 2 * w * mp.sqrt((m**2 - 1 - w) / (1 + w)) / (  # noqa: E731
                (g - 1) * m**2 + 2 + 2 * (m**2 - 1 - w)) - t
            w0 = 1.2 * m * t * (1 + 1.2 * m * t)  # within a factor 2 of the root
            w = w0 * mp.exp(mp.findroot(lambda u: f(w0 * mp.exp(u)) / t, 0))  # scaled
            beta, strength = float(mp.asin(mp.sqrt((1 + w)) / m)), float(2 * g / (g + 1) * w)
        assert float(obl.wave_angle_from_deflection(M, theta)) == pytest.approx(beta, rel=1e-14)
        fields = obl._shock_from_deflection(np.array([M]), np.array([theta]), 1.4, False)
        assert_close(fields[-1][0], strength, 1e-14, "strength")


def test_oblique_limits_at_infinite_mach():
    # M1 = inf: the hypersonic limit, equal to the float to M1 = 1e300 (terms in 1/M1²)
    for theta in (0.3, 1e-3, 1e-150):
        for strong in (False, True):
            limit = obl.wave_angle_from_deflection(np.inf, theta, 1.4, strong)
            assert float(limit) == float(obl.wave_angle_from_deflection(1e300, theta, 1.4, strong))
    theta_max = obl.detachment_angles(np.inf, 1.4)[0]
    assert theta_max == pytest.approx(math.asin(1 / 1.4), rel=4 * ref.EPS)
    ratios = obl.oblique_shock_ratios(np.inf, 0.4, 1.4)
    assert not np.isnan(ratios.deflection) and float(ratios.rho2_rho1) == pytest.approx(6.0)


@pytest.mark.parametrize("M1", [1e155, 1e200, np.inf])
@pytest.mark.parametrize("fraction", [0.99999, 0.9999999, 1.0 - 1e-9])
def test_near_detachment_where_the_mach_number_squared_overflows(M1, fraction):
    # found by the scalar-form property test: with 1/(M1² - 1) = 0 the near-detachment
    # polish met 0·∞ at its bracket's end and returned β ~ 1e-6 rad (a silent wrong number);
    # there the relation is the M1 → ∞ one, so β must equal that at M1 = 1e150 and θ(β)
    # must give θ back (NACA Report 1135, eq. 138, invented edge case)
    from gasdyn2d.relations.oblique_shocks import (deflection_from_wave_angle,
                                                   detachment_angles, wave_angle_from_deflection)
    gamma = 1.1875
    theta = float(detachment_angles(M1, gamma)[0]) * fraction
    for beta in (wave_angle_from_deflection(M1, theta, gamma),
                 float(wave_angle_from_deflection(np.array([M1]), np.array([theta]), gamma)[0])):
        limit = float(wave_angle_from_deflection(1e150, theta, gamma))
        assert beta == pytest.approx(limit, rel=1e-9)
        back = float(deflection_from_wave_angle(np.array([M1]), np.array([beta]), gamma)[0])
        assert back == pytest.approx(theta, rel=1e-9)
