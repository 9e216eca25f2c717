"""Tests of gasdyn2d.relations.normal_shocks: published tables, an mpmath reference, properties, shapes."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import reference as ref
from gasdyn2d import normal_shock
from gasdyn2d.relations.normal_shocks import normal_shock_ratios, pitot_ratio

FIELDS = ("M2", "p2_p1", "rho2_rho1", "T2_T1", "p02_p01")
INPUTS = ("M2", "p2_p1", "rho2_rho1", "T2_T1", "p02_p01", "p02_p1")

# ----------------------------------------------------------------- published values
# M1 -> (M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, p1/p02), γ = 1.4.

# /work/shared/SOURCES.md, "Computed values": computed at 30-40 digits in mpmath; SOURCES
# says the NACA Report 1135 Table II digits agree at every printed place (from memory).
SOURCES_MD_NORMAL_SHOCK = {
    1.5: ("0.701089", "2.45833", "1.86207", "1.32022", "0.929787", "0.292974"),
    2.0: ("0.577350", "4.50000", "2.66667", "1.68750", "0.720874", "0.177291"),
    2.5: ("0.512989", "7.12500", "3.33333", "2.13750", "0.499015", "0.117286"),
    3.0: ("0.475191", "10.3333", "3.85714", "2.67901", "0.328344", "0.0829121"),
    5.0: ("0.415227", "29.0000", "5.00000", "5.80000", "0.0617163", "0.0306246"),
}

# NACA Report 1135, Table II (from memory), 4 significant figures: M1 -> (M2, p2/p1, ρ2/ρ1,
# T2/T1, p02/p01). Each recalled value was compared once with tests/reference.py; all agreed.
NACA_1135_TABLE_II_FROM_MEMORY = {
    1.05: ("0.9531", "1.120", "1.084", "1.033", "0.9999"),
    1.1: ("0.9118", "1.245", "1.169", "1.065", "0.9989"),
    1.2: ("0.8422", "1.513", "1.342", "1.128", "0.9928"),
    1.3: ("0.7860", "1.805", "1.516", "1.191", "0.9794"),
    1.4: ("0.7397", "2.120", "1.690", "1.255", "0.9582"),
    1.6: ("0.6684", "2.820", "2.032", "1.388", "0.8952"),
    1.8: ("0.6165", "3.613", "2.359", "1.532", "0.8127"),
    2.2: ("0.5471", "5.480", "2.951", "1.857", "0.6281"),
    3.5: ("0.4512", "14.13", "4.261", "3.315", "0.2129"),
    4.0: ("0.4350", "18.50", "4.571", "4.047", "0.1388"),
    6.0: ("0.4042", "41.83", "5.268", "7.941", "0.02965"),
    8.0: ("0.3929", "74.50", "5.565", "13.39", "0.008488"),
    10.0: ("0.3876", "116.5", "5.714", "20.39", "0.003045"),
}
PUBLISHED = {**SOURCES_MD_NORMAL_SHOCK, **NACA_1135_TABLE_II_FROM_MEMORY}


def test_published_table_spans_the_required_range():
    # issue 2: no fewer than 15 Mach numbers from 1.05 to 10
    assert len(PUBLISHED) >= 15 and min(PUBLISHED) == 1.05 and max(PUBLISHED) == 10.0


@pytest.mark.parametrize("M1", sorted(PUBLISHED))
def test_forward_agrees_with_published_table(M1):
    shock = normal_shock(M1)
    for name, text in zip(FIELDS, PUBLISHED[M1]):
        assert ref.agrees_to_print(getattr(shock, name), text), (M1, name, text)
    if M1 in SOURCES_MD_NORMAL_SHOCK:  # p1/p02 = 1 / pitot ratio
        assert ref.agrees_to_print(1.0 / shock.p02_p1, SOURCES_MD_NORMAL_SHOCK[M1][5])


@pytest.mark.parametrize("M1", sorted(SOURCES_MD_NORMAL_SHOCK))
@pytest.mark.parametrize("index, name", list(enumerate(FIELDS[:4])))
def test_inverse_of_published_value_recovers_mach(M1, index, name):
    # SOURCES.md values (6 s.f.) fed back in give M1 to their rounding times the inverse's
    # condition number κ (from mpmath; κ ≈ 23 for M2 at M1 = 5, where M2 flattens out)
    text = SOURCES_MD_NORMAL_SHOCK[M1][index]
    kappa = ref.inverse_condition(lambda x: ref._ns(x, ref._mpf(1.4))[name], float(text), M1)
    got = normal_shock(**{name: float(text)}).M1
    rounding = ref.printed_tolerance(text) / float(text)
    assert got == pytest.approx(M1, rel=1.01 * kappa * rounding + 1e-12)


def test_strong_shock_limits():
    # facts of the trade, M1 → ∞: ρ2/ρ1 → (γ+1)/(γ-1) = 6, M2 → √((γ-1)/(2γ)) = 0.377964
    shock = normal_shock(1e8)
    assert shock.rho2_rho1 == pytest.approx(6.0, rel=1e-14)
    assert shock.M2 == pytest.approx(np.sqrt(0.4 / 2.8), rel=1e-14)


def test_unit_strength_shock_is_no_shock():
    shock = normal_shock(1.0)
    for name in ("M2", "p2_p1", "rho2_rho1", "T2_T1", "p02_p01"):
        assert getattr(shock, name) == 1.0
    # pitot ratio at M1 = 1 is the isentropic p0/p = ((γ+1)/2)^(γ/(γ-1))
    assert shock.p02_p1 == pytest.approx(1.2**3.5, rel=1e-15)


# ----------------------------------------------------------------- mpmath reference

N_CASES = 200
M_CASES, G_CASES = ref.random_mach_and_gamma(N_CASES, seed=21)
REFERENCE = [ref.normal_shock(m, g) for m, g in zip(M_CASES, G_CASES)]


def test_forward_ratios_match_mpmath():
    # mpmath at 40 digits (NACA Report 1135 eqs. 93-100 as written); M1 1.001-50,
    # γ 1.05-1.67. Measured max: 4.4e-16 for M2, p2/p1, ρ2/ρ1, T2/T1; 1.1e-14 for
    # p02/p01 and 2.2e-14 for the pitot ratio (exponents up to γ/(γ-1) ~ 21)
    shock = normal_shock(M_CASES, gamma=G_CASES)
    for name in FIELDS + ("p02_p1",):
        expected = [r[name] for r in REFERENCE]
        bound = 1e-14 if name in ("M2", "p2_p1", "rho2_rho1", "T2_T1") else 1e-13
        assert np.max(ref.relative_error(getattr(shock, name), expected)) < bound, name


def test_weak_shock_loss_keeps_full_precision():
    # 1 - p02/p01 ≈ 2γw³/(3(γ+1)²) with w = M1² - 1: the loss itself (not just p02/p01)
    # must be accurate, because intake designers difference it. Reference: mpmath.
    import mpmath as mp

    for M1 in (1.0001, 1.001, 1.01):
        with mp.workdps(40):
            loss = 1 - ref._ns(mp.mpf(M1), mp.mpf("1.4"))["p02_p01"]
        ratios = normal_shock_ratios((M1 - 1) * (M1 + 1), 1.4)
        got = -np.expm1(np.log(ratios.p02_p01))
        # p02/p01 is returned, so the loss is good to ulp(1)/loss: 1e-16/1e-12 at M1=1.0001
        assert abs(got / float(loss) - 1) < 4 * ref.EPS / float(loss)


@pytest.mark.parametrize("name", INPUTS)
def test_every_inverse_matches_mpmath(name):
    # reference: mpmath solves the textbook relation for M1 from the same float input
    # (closed forms for M2, p2/p1, ρ2/ρ1; root finding for T2/T1, p02/p01, p02/p1).
    # Bound: 1e-12, or 32 ulp times the inverse's condition number where that is larger
    # (p02/p01 → 1 makes it infinite: the loss is O((M1² - 1)³)). Measured max 4.6e-14.
    value = np.array([r[name] for r in REFERENCE])
    got = normal_shock(**{name: value}, gamma=G_CASES).M1
    expected = np.array([ref.M1_from_normal_shock(name, v, g) for v, g in zip(value, G_CASES)])
    kappa = np.array([
        ref.inverse_condition(lambda x, g=g: ref._ns(x, ref._mpf(g))[name], v, m)
        for v, m, g in zip(value, expected, G_CASES)])
    err = ref.relative_error(got, expected)
    assert np.all(err <= np.maximum(1e-12, 32 * ref.EPS * kappa)), np.max(err)
    # and the tight statement where the problem is well conditioned
    assert np.max(err[kappa < 10]) < 1e-13


# ----------------------------------------------------------------- properties

mach = st.floats(1.0, 60.0)
gammas = st.floats(1.05, 1.67)


@settings(max_examples=60, deadline=None)
@given(M1=mach, g=gammas)
def test_every_inverse_round_trips(M1, g):
    shock = normal_shock(M1, gamma=g)
    w = (M1 - 1) * (M1 + 1)
    for name in INPUTS:
        back = normal_shock(**{name: getattr(shock, name)}, gamma=g)
        # compare w = M1² - 1, the natural variable; weak shocks are flat in p02/p01 (cube)
        # and M2 flattens as M1 → ∞, so allow for the conditioning of each
        w_back = (back.M1 - 1) * (back.M1 + 1)
        if name == "p02_p01":
            tol = 1e-4 * w + 1e-5
        elif name in ("M2", "rho2_rho1"):
            tol = 1e-12 * w * (1 + w) ** 2 + 1e-13
        else:  # plus the ulp of a ratio near 1, magnified by dw/d(ratio) ~ (γ+1)/(γ-1)
            tol = 1e-12 * w + 1e-13
        assert abs(w_back - w) <= tol, name
        assert getattr(back, name) == getattr(shock, name)  # the caller's value comes back


@settings(max_examples=60, deadline=None)
@given(M1=mach, g=gammas)
def test_entropy_rises_across_every_shock(M1, g):
    shock = normal_shock(M1, gamma=g)
    assert shock.p02_p01 <= 1.0
    assert shock.M2 <= 1.0 and shock.p2_p1 >= 1.0 and shock.T2_T1 >= 1.0
    # Rankine-Hugoniot consistency: p2/p1 = (ρ2/ρ1)(T2/T1) (perfect gas)
    assert shock.p2_p1 == pytest.approx(shock.rho2_rho1 * shock.T2_T1, rel=1e-14)


@settings(max_examples=40, deadline=None)
@given(a=mach, b=mach, g=gammas)
def test_stronger_shock_loses_more(a, b, g):
    lo, hi = sorted((a, b))
    shock = normal_shock([lo, hi], gamma=g)
    assert shock.p02_p01[0] >= shock.p02_p01[1] and shock.M2[0] >= shock.M2[1]
    assert shock.p02_p1[0] <= shock.p02_p1[1]


# ----------------------------------------------------------------- shapes and types


def test_scalar_in_gives_floats_out():
    shock = normal_shock(2.0)
    assert all(type(v) is float for v in shock.to_dict().values())


def assert_ulps(array_value, scalar_value, ulps=8):
    """The array path and the scalar fast path (math-module forms) agree to a few ulp:
    the same algorithm, with libm and numpy rounding differently in the last place."""
    assert abs(array_value - scalar_value) <= ulps * np.spacing(abs(scalar_value)), (
        array_value, scalar_value)


@pytest.mark.parametrize("shape", [(4,), (2, 3), (3, 1, 2)])
def test_arrays_of_any_shape_match_scalar_calls(shape):
    M1 = np.random.default_rng(5).uniform(1.05, 8.0, shape)
    shock = normal_shock(M1)
    for name in FIELDS:
        assert getattr(shock, name).shape == shape
    for index in np.ndindex(shape):
        assert_ulps(shock.p02_p01[index], normal_shock(M1[index]).p02_p01)


def test_gamma_array_broadcasts_and_inverses_follow():
    M1 = np.array([[1.2], [2.0], [4.0]])
    g = np.array([1.1, 1.4, 1.67])
    shock = normal_shock(M1, gamma=g)
    assert shock.p02_p1.shape == (3, 3)
    assert shock.M2[1, 1] == normal_shock(2.0).M2
    back = normal_shock(p02_p1=shock.p02_p1, gamma=g).M1
    np.testing.assert_allclose(back, np.broadcast_to(M1, (3, 3)), rtol=1e-13)


def test_lists_and_nan():
    shock = normal_shock([2.0, np.nan, 3.0])
    assert np.isnan(shock.M2[1]) and shock.M2[0] == normal_shock(2.0).M2
    for name in INPUTS:
        assert np.isnan(normal_shock(**{name: np.nan}).M1)


def test_pitot_ratio_plain_core_matches_rayleigh_formula_at_published_point():
    # SOURCES.md, M = 3: p1/p02 = 0.0829121
    assert ref.agrees_to_print(1.0 / pitot_ratio(3.0), "0.0829121")


@pytest.mark.parametrize("name", ["M2", "p2_p1", "rho2_rho1", "T2_T1"])
def test_weak_shock_inverses_keep_the_digits_of_m1_squared_minus_one(name):
    # invented weak shocks, w = M1² - 1 from 1e-12 to 1e-2: the inverses are written for w
    # (closed forms without cancellation), so w itself comes back to the input's rounding
    # times its conditioning; mpmath (40 digits) gives the exact w for the float input.
    import mpmath as mp

    for w in (1e-12, 1e-9, 1e-6, 1e-4, 1e-2):
        M1 = math.sqrt(1 + w)
        value = normal_shock(M1, gamma=1.3).to_dict()[name]
        got = normal_shock(**{name: value}, gamma=1.3).M1
        with mp.workdps(40):
            exact = ref.M1_from_normal_shock.mp(name, mp.mpf(value), mp.mpf(1.3)) ** 2 - 1
        # |w| error <= ulp of a ratio near 1 times dw/d(ratio) (< 10 here), plus 1e-12 relative
        assert abs((got - 1) * (got + 1) - float(exact)) <= 10 * ref.EPS + 1e-12 * w


def test_pitot_ratio_at_the_sonic_limit_is_accepted():
    # invented edge cases: a pitot ratio computed for M1 = 1 (or one ulp above) by this or
    # another formula may round below ((γ+1)/2)^(γ/(γ-1)); it is the limit, M1 = 1
    assert normal_shock(p02_p1=1.2**3.5).M1 == pytest.approx(1.0, abs=1e-7)
    for g in (1.05, 1.4, 1.67):
        near_one = normal_shock(1 + 1e-15, gamma=g).p02_p1
        assert normal_shock(p02_p1=near_one, gamma=g).M1 == pytest.approx(1.0, abs=1e-7)


# ----------------------------------------------------------------- fixed-step inverses

from gasdyn2d.relations.normal_shock_inverses import (  # noqa: E402
    _pitot_halley,
    _stagnation_ratio_halley,
    mach_from_pitot_ratio,
    mach_from_stagnation_pressure_ratio,
)


@pytest.mark.parametrize("gamma", [1.001, 1.01, 1.3, 3.0, 5.0])
@pytest.mark.parametrize("name", ["p02_p01", "p02_p1"])
def test_iterative_inverses_for_awkward_gammas_match_mpmath(name, gamma):
    # invented sweep across the hand-over between the weak- and strong-shock starts
    # (M1 ≈ 2.5-3.5 is where they are poorest) and out to strong shocks, γ from nearly 1
    # to 5. Reference: mpmath root (40 digits); bound 1e-12 or 32 ulp × conditioning.
    M1 = np.array([1.05, 1.5, 2.2, 2.6, 3.0, 3.5, 5.0, 10.0, 40.0])
    value = np.array([ref.normal_shock(m, gamma)[name] for m in M1])
    keep = value > 1e-300  # p02/p01 underflows for strong shocks at γ near 1
    M1, value = M1[keep], value[keep]
    inverse = mach_from_stagnation_pressure_ratio if name == "p02_p01" else mach_from_pitot_ratio
    got = inverse(value, gamma)
    expected = np.array([ref.M1_from_normal_shock(name, v, gamma) for v in value])
    kappa = np.array([ref.inverse_condition(lambda x: ref._ns(x, ref._mpf(gamma))[name], v, m)
                      for v, m in zip(value, expected)])
    assert np.all(ref.relative_error(got, expected) <= np.maximum(1e-12, 32 * ref.EPS * kappa))


def test_fixed_halley_steps_finish_usual_cases_without_the_fallback():
    # invented: 10^4 random M1 in [1.001, 50], γ in [1.05, 1.67]: the fixed Halley steps
    # converge on every element of both inverses (the fallback is for γ close to 1)
    M1, g = ref.random_mach_and_gamma(10_000, seed=11)
    ratios = normal_shock_ratios((M1 - 1) * (M1 + 1), g)
    _, converged = _stagnation_ratio_halley(-np.log(ratios.p02_p01), g)
    assert np.all(converged)
    _, converged = _pitot_halley(np.log(pitot_ratio(M1, g)), g)
    assert np.all(converged)
