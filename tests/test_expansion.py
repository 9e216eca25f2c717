"""Tests of gasdyn2d.relations.expansion_fans: the Prandtl-Meyer function, its inverse, and centred fans."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import reference as ref
from gasdyn2d import (
    ProbablyDegreesWarning,
    expansion_fan,
    isentropic_flow,
    mach_from_prandtl_meyer,
    prandtl_meyer,
    ureg,
)
from gasdyn2d.relations.expansion_fans import (
    fan_pressure_ratio,
    mach_from_prandtl_meyer_angle,
    max_prandtl_meyer_angle,
    prandtl_meyer_angle,
)

# ----------------------------------------------------------------- published values
# M -> ν [deg], γ = 1.4.

# /work/shared/SOURCES.md, "Computed values" (computed in mpmath; SOURCES says the NACA
# Report 1135 Table II digits agree at every printed place, from memory)
SOURCES_MD_PRANDTL_MEYER = {1.5: "11.9052", 2.0: "26.3798", 2.5: "39.1236", 3.0: "49.7573",
                            5.0: "76.9202"}
# NACA Report 1135, Table II (from memory), 4 significant figures; each compared once with
# tests/reference.py, all agreed
NACA_1135_TABLE_II_FROM_MEMORY = {
    1.05: "0.4874", 1.1: "1.336", 1.2: "3.558", 1.3: "6.170", 1.4: "8.987", 1.6: "14.86",
    1.8: "20.73", 2.2: "31.73", 3.5: "58.53", 4.0: "65.78", 6.0: "84.96", 8.0: "95.62",
    10.0: "102.3",
}
PUBLISHED = {**SOURCES_MD_PRANDTL_MEYER, **NACA_1135_TABLE_II_FROM_MEMORY}


def test_published_table_spans_the_required_range():
    assert len(PUBLISHED) >= 15 and min(PUBLISHED) == 1.05 and max(PUBLISHED) == 10.0


@pytest.mark.parametrize("M", sorted(PUBLISHED))
def test_prandtl_meyer_agrees_with_published_table(M):
    text = PUBLISHED[M]
    assert ref.agrees_to_print(math.degrees(prandtl_meyer(M)), text)
    # and the inverse takes the printed ν back to M within its rounding (κ <= ~3 here)
    back = mach_from_prandtl_meyer(float(text) * ureg.deg)
    assert back == pytest.approx(M, rel=3 * ref.printed_tolerance(text) / float(text))


def test_maximum_turn_agrees_with_sources():
    # SOURCES.md: ν_max = (π/2)(√((γ+1)/(γ-1)) - 1) = 130.454° for γ = 1.4
    assert ref.agrees_to_print(math.degrees(max_prandtl_meyer_angle(1.4)), "130.454")
    assert float(max_prandtl_meyer_angle(1.4)) == pytest.approx(ref.nu_max(1.4), rel=1e-15)


def test_fan_example_from_sources_values():
    # SOURCES.md, "Computed values": ν(2) = 26.3798°, ν(3) = 49.7573°, p/p0 at 2 and 3.
    # A fan turning 23.3775° takes M 2 to M 3 and p2/p1 = 0.0272237/0.127805 = 0.213010
    fan = expansion_fan(2.0, deflection=(49.7573 - 26.3798) * ureg.deg)
    assert fan.M2 == pytest.approx(3.0, abs=2e-5)
    assert fan.p2_p1 == pytest.approx(0.0272237 / 0.127805, rel=2e-5)
    assert fan.mu2.m_as("deg") == pytest.approx(19.4712, abs=2e-4)  # μ(3), SOURCES.md


# ----------------------------------------------------------------- mpmath reference

N_CASES = 200
M_CASES, G_CASES = ref.random_mach_and_gamma(N_CASES, seed=41)
NEAR_SONIC = 1.0 + np.logspace(-8, -2, 25)
HYPERSONIC = np.logspace(2, 4, 10)


def test_prandtl_meyer_matches_mpmath():
    # NACA Report 1135, eq. 171 at 40 digits. Measured max 1.8e-15, including M - 1 down
    # to 1e-8 (series branch, where the arctangents of the direct form cancel) and M to 1e4
    M = np.concatenate([M_CASES, NEAR_SONIC, HYPERSONIC])
    g = np.concatenate([G_CASES, np.full(25, 1.4), np.full(10, 1.3)])
    got = prandtl_meyer(M, gamma=g)
    expected = [ref.nu(m, gg) for m, gg in zip(M, g)]
    assert np.max(ref.relative_error(got, expected)) < 1e-14


def test_inverse_matches_mpmath_to_its_conditioning():
    # reference: mpmath root of ν(M) = ν for the same float ν. The inverse's condition
    # number κ = |d ln M/d ln ν| is ~1-3 at moderate M, tends to 0 as M → 1 (ν ∝ (M-1)^1.5),
    # and grows like M near ν_max (rounding of ν is amplified by ν/(ν_max - ν)). Bound: 1e-12,
    # or 32 ulp × κ where larger. Measured max 3.6e-15 (κ < 10) and 1.7e-13 at M ~ 1e3.
    M = np.concatenate([M_CASES, NEAR_SONIC, HYPERSONIC])
    g = np.concatenate([G_CASES, np.full(25, 1.4), np.full(10, 1.3)])
    nu = prandtl_meyer_angle(M, g)
    expected = np.array([ref.M_from_nu(v, gg) for v, gg in zip(nu, g)])
    kappa = np.array([ref.inverse_condition(lambda x, gg=gg: ref._nu(x, ref._mpf(gg)), v, m)
                      for v, m, gg in zip(nu, expected, g)])
    got = mach_from_prandtl_meyer(nu * ureg.rad, gamma=g)
    err = ref.relative_error(got, expected)
    assert np.all(err <= np.maximum(1e-12, 32 * ref.EPS * kappa))
    assert np.max(err[kappa < 10]) < 1e-14


@pytest.mark.parametrize("gamma", [1.01, 1.05, 1.1, 1.3, 1.4, 1.67, 2.0, 3.0])
def test_inverse_reaches_rounding_for_any_gamma(gamma):
    # invented sweep: z = √(M²-1) from 1e-6 to 100; the fixed three Halley steps must
    # converge for every γ (the original three Newton steps left 1.5e-11 at γ = 1.05).
    # Forward values from mpmath so that only the inverse is tested.
    z = np.logspace(-6, 2, 60)
    M = np.hypot(1.0, z)
    nu = np.array([ref.nu(m, gamma) for m in M])
    expected = np.array([ref.M_from_nu(v, gamma) for v in nu])
    got = mach_from_prandtl_meyer_angle(nu, gamma)
    kappa = np.array([ref.inverse_condition(lambda x: ref._nu(x, ref._mpf(gamma)), v, m)
                      for v, m in zip(nu, expected)])
    assert np.all(ref.relative_error(got, expected) <= np.maximum(2e-15, 8 * ref.EPS * kappa))


@pytest.mark.parametrize("given_name", ["deflection", "p2_p1", "M2"])
def test_expansion_fan_matches_mpmath(given_name):
    # fan states at 40 digits: M2 = ν⁻¹(ν1 + θ), p2/p1 = [(1+(γ-1)M1²/2)/(1+(γ-1)M2²/2)]^(γ/(γ-1)).
    # Bound 1e-12 or 32 ulp × the condition number of M2 in ν2 (large near vacuum).
    rng = np.random.default_rng(42)
    M1, g = M_CASES[:80], G_CASES[:80]
    nu1 = prandtl_meyer_angle(M1, g)
    turn = rng.uniform(0.0, 0.9, 80) * (max_prandtl_meyer_angle(g) - nu1)
    M2_ref = np.array([ref.fan_M2(m, t, gg) for m, t, gg in zip(M1, turn, g)])
    p_ref = np.array([ref.fan_p2_p1(m, m2, gg) for m, m2, gg in zip(M1, M2_ref, g)])
    value = {"deflection": turn * ureg.rad, "p2_p1": p_ref, "M2": M2_ref}[given_name]
    fan = expansion_fan(M1, **{given_name: value}, gamma=g)
    kappa = np.array([ref.inverse_condition(lambda x, gg=gg: ref._nu(x, ref._mpf(gg)),
                                            ref.nu(m2, gg), m2) for m2, gg in zip(M2_ref, g)])
    bound = np.maximum(1e-12, 32 * ref.EPS * kappa * (1 + 2 * g / (g - 1)))
    assert np.all(ref.relative_error(fan.M2, M2_ref) <= bound)
    assert np.all(ref.relative_error(fan.p2_p1, p_ref) <= bound * M2_ref)


# ----------------------------------------------------------------- properties

mach = st.floats(1.0, 1e4)
gammas = st.floats(1.05, 1.67)


@settings(max_examples=60, deadline=None)
@given(a=mach, b=mach, g=gammas)
def test_prandtl_meyer_increases_and_is_bounded(a, b, g):
    lo, hi = sorted((a, b))
    nu = prandtl_meyer([lo, hi], gamma=g)
    assert 0.0 <= nu[0] <= nu[1] <= max_prandtl_meyer_angle(g)


@settings(max_examples=60, deadline=None)
@given(M=st.floats(1.0, 1e3), g=gammas)
def test_inverse_round_trips(M, g):
    nu = prandtl_meyer(M, gamma=g)
    back = mach_from_prandtl_meyer(nu * ureg.rad, gamma=g)
    # ν is flat at M = 1 (ν ∝ (M-1)^(3/2)): compare in M - 1 there; near ν_max the error
    # grows like M·ulp
    assert back == pytest.approx(M, rel=1e-14 * (1 + M), abs=1e-12)


@settings(max_examples=60, deadline=None)
@given(M1=st.floats(1.0, 20.0), f=st.floats(0.0, 0.95), g=st.floats(1.1, 1.67))
def test_fan_round_trips_through_each_input(M1, f, g):
    # γ >= 1.1 keeps every plain turn below 2π (no degrees warning; ν_max(1.1) = 5.6 rad)
    turn = f * (max_prandtl_meyer_angle(g) - prandtl_meyer(M1, gamma=g))
    fan = expansion_fan(M1, deflection=turn, gamma=g)
    assert fan.p2_p1 <= 1.0 and fan.M2 >= M1 and fan.T2_T1 <= 1.0
    by_p = expansion_fan(M1, p2_p1=fan.p2_p1, gamma=g)
    by_M = expansion_fan(M1, M2=fan.M2, gamma=g)
    for other in (by_p, by_M):
        assert other.deflection == pytest.approx(turn, rel=1e-9, abs=1e-12)
    # isentropic: ρ2/ρ1 = (p2/p1)^(1/γ) = (T2/T1)^(1/(γ-1))
    assert fan.rho2_rho1 == pytest.approx(fan.T2_T1 ** (1 / (g - 1)), rel=1e-11)
    # the fan's pressure ratio is the ratio of isentropic p/p0 at both ends
    p0 = isentropic_flow([M1, fan.M2], gamma=g).p_p0
    assert fan.p2_p1 == pytest.approx(p0[1] / p0[0], rel=1e-12)


@settings(max_examples=40, deadline=None)
@given(M1=st.floats(1.0, 20.0), M2=st.floats(1.0, 20.0), g=gammas)
def test_fan_pressure_ratio_plain_core_is_isentropic(M1, M2, g):
    p0 = isentropic_flow([M1, M2], gamma=g).p_p0
    assert fan_pressure_ratio(M1, M2, g) == pytest.approx(p0[1] / p0[0], rel=1e-12)


# ----------------------------------------------------------------- shapes, units, edges


def test_scalars_in_give_floats_out():
    assert type(prandtl_meyer(2.0)) is float
    assert type(mach_from_prandtl_meyer(0.5)) is float
    fan = expansion_fan(2.0, deflection=0.1)
    assert all(type(v) is float for v in fan.to_dict().values())


def assert_ulps(array_value, scalar_value, ulps=8):
    """The array path and the scalar fast path (math-module forms) agree to a few ulp:
    the same algorithm, with libm and numpy rounding differently in the last place."""
    assert abs(array_value - scalar_value) <= ulps * np.spacing(abs(scalar_value)), (
        array_value, scalar_value)


@pytest.mark.parametrize("shape", [(5,), (2, 3), (1, 2, 3)])
def test_arrays_of_any_shape_match_scalar_calls(shape):
    M = np.random.default_rng(9).uniform(1.0, 9.0, shape)
    nu = prandtl_meyer(M)
    assert nu.shape == shape
    back = mach_from_prandtl_meyer(nu)
    fan = expansion_fan(M, deflection=0.2)
    for index in np.ndindex(shape):
        assert_ulps(nu[index], prandtl_meyer(M[index]))
        assert_ulps(back[index], mach_from_prandtl_meyer(nu[index]))
        assert_ulps(fan.M2[index], expansion_fan(M[index], deflection=0.2).M2)


def test_gamma_array_broadcasts():
    M = np.array([[1.5], [3.0]])
    g = np.array([1.1, 1.4, 1.67])
    nu = prandtl_meyer(M, gamma=g)
    assert nu.shape == (2, 3) and nu[1, 1] == prandtl_meyer(3.0)
    np.testing.assert_allclose(mach_from_prandtl_meyer(nu, gamma=g), np.broadcast_to(M, (2, 3)),
                               rtol=1e-14)
    fan = expansion_fan(M, deflection=np.radians(5.0), gamma=g)
    assert fan.p2_p1.shape == (2, 3)


def test_degrees_in_give_degrees_out():
    fan = expansion_fan(2.0, deflection=10 * ureg.deg)
    for name in ("deflection", "nu1", "nu2", "mu1", "mu2"):
        assert str(getattr(fan, name).units) == "degree", name
    assert fan.nu2.m - fan.nu1.m == pytest.approx(10.0, rel=1e-14)
    assert mach_from_prandtl_meyer(26.3798 * ureg.deg) == pytest.approx(2.0, abs=1e-5)
    assert str(prandtl_meyer(2.0 * ureg.dimensionless).units) == "radian"
    by_M2 = expansion_fan(2.0 * ureg.dimensionless, M2=3.0)
    assert str(by_M2.deflection.units) == "radian"


def test_limits_of_the_fan():
    # facts of the trade: zero turn changes nothing; the largest turn expands to vacuum
    fan = expansion_fan(2.0, deflection=0.0)
    assert fan.M2 == 2.0 and fan.p2_p1 == 1.0
    vacuum = expansion_fan(2.0, p2_p1=0.0)
    assert vacuum.M2 == np.inf and vacuum.T2_T1 == 0.0 and vacuum.rho2_rho1 == 0.0
    assert vacuum.nu2 == pytest.approx(float(max_prandtl_meyer_angle(1.4)), rel=1e-15)
    assert vacuum.deflection == pytest.approx(
        float(max_prandtl_meyer_angle(1.4)) - prandtl_meyer(2.0), rel=1e-15)
    assert mach_from_prandtl_meyer(max_prandtl_meyer_angle(1.4)) == np.inf
    assert mach_from_prandtl_meyer(0.0) == 1.0
    assert prandtl_meyer_angle(np.inf, 1.4) == pytest.approx(float(max_prandtl_meyer_angle(1.4)))


def test_nan_in_nan_out():
    assert np.isnan(prandtl_meyer(np.nan))
    assert np.isnan(mach_from_prandtl_meyer(np.nan))
    fan = expansion_fan([2.0, 2.0], deflection=[0.1, np.nan])
    assert np.isnan(fan.M2[1]) and np.isfinite(fan.M2[0])
    assert np.isnan(expansion_fan(2.0, p2_p1=np.nan).M2)
    assert np.isnan(expansion_fan(np.nan, deflection=0.1).M2)


# fact of the trade: ν_max = (π/2)(√((γ+1)/(γ-1)) - 1) exceeds 2π for γ below about 1.08
# (8.49 rad at γ = 1.05), so a plain ν of 7 rad is legal there and must not warn
def test_large_plain_nu_legal_at_low_gamma_does_not_warn():
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error")
        M = mach_from_prandtl_meyer(7.0, gamma=1.05)
        flow = isentropic_flow(prandtl_meyer=7.0, gamma=1.05)
    assert M > 1 and flow.M == pytest.approx(M, rel=1e-14)
    with pytest.warns(ProbablyDegreesWarning):  # above ν_max at γ = 1.4: degrees
        mach_from_prandtl_meyer(26.0, errors="nan")
