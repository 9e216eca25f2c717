"""Tests of gasdyn2d.relations.simple_waves: the signed-turn simple-wave primitive and its inverse."""

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import reference as ref
from gasdyn2d import expansion_fan, oblique_shock
from gasdyn2d.relations.expansion_fans import max_prandtl_meyer_angle, prandtl_meyer_angle
from gasdyn2d.relations.oblique_shocks import detachment_angles
from gasdyn2d.relations.simple_waves import turn_for_pressure_ratio, turn_state

mach = st.floats(1.05, 30.0)
gammas = st.floats(1.05, 1.67)


def test_published_shock_and_fan_through_one_primitive():
    # SOURCES.md, "Oblique shocks", M1 = 2, θ = 10°: p2/p1 = 1.70658, M2 = 1.64052, β = 39.3139°
    state = turn_state(2.0, np.radians([10.0, -(49.7573 - 26.3798)]))
    assert ref.agrees_to_print(state.p2_p1[0], "1.70658")
    assert ref.agrees_to_print(state.M2[0], "1.64052")
    assert ref.agrees_to_print(math.degrees(state.wave_angle[0]), "39.3139")
    # SOURCES.md, "Computed values": turning M 2 away by ν(3) - ν(2) gives M 3 (to the
    # 6 figures of ν) and p2/p1 = 0.0272237/0.127805
    assert state.M2[1] == pytest.approx(3.0, abs=2e-5)
    assert state.p2_p1[1] == pytest.approx(0.0272237 / 0.127805, rel=2e-5)
    assert list(state.is_shock) == [True, False]
    assert state.p02_p01[1] == 1.0 and np.isnan(state.wave_angle[1])


@settings(max_examples=50, deadline=None)
@given(M1=mach, f=st.floats(0.0, 1.0), g=gammas, strong=st.booleans())
def test_positive_turn_is_the_oblique_shock(M1, f, g, strong):
    theta = f * float(detachment_angles(M1, g)[0])
    state = turn_state(M1, theta, g, strong=strong)
    if theta == 0.0:
        assert not state.is_shock  # zero turn is the (empty) fan
        assert state.M2 == M1 and state.p2_p1 == 1.0
        return
    shock = oblique_shock(M1, deflection=theta, gamma=g, branch="strong" if strong else "weak")
    assert state.is_shock and not state.detached
    for name in ("M2", "p2_p1", "T2_T1", "p02_p01"):
        assert getattr(state, name) == pytest.approx(getattr(shock, name), rel=1e-12), name
    # plain floats take turn_state's scalar form (math module), the public function the
    # array form (numpy): the same algorithm, equal to a few ulp × the conditioning
    assert state.wave_angle == pytest.approx(shock.wave_angle, rel=1e-12)
    # the pressure slope has the branch's sign, up to and including detachment; at the
    # top of the polar (strong branch, θ -> 0) the slope itself tends to -0.0
    assert np.signbit(state.dlnp_dturn) if strong else (state.dlnp_dturn > 0)


@settings(max_examples=50, deadline=None)
@given(M1=mach, f=st.floats(0.0, 0.99), g=gammas)
def test_negative_turn_is_the_expansion_fan(M1, f, g):
    turn = f * (float(max_prandtl_meyer_angle(g)) - prandtl_meyer_angle(M1, g))
    state = turn_state(M1, -turn, g)
    fan = expansion_fan(M1, deflection=turn, gamma=g) if turn < 2 * math.pi else None
    assert not state.is_shock and not state.vacuum and state.p02_p01 == 1.0
    assert state.M2 >= M1 and state.p2_p1 <= 1.0
    if fan is not None:
        assert state.M2 == pytest.approx(fan.M2, rel=1e-15)
        assert state.p2_p1 == pytest.approx(fan.p2_p1, rel=1e-14)
        assert state.T2_T1 == pytest.approx(fan.T2_T1, rel=1e-14)


def test_flags_beyond_the_limits():
    # invented edge cases: beyond θmax the shock detaches, beyond ν_max - ν1 the fan passes vacuum
    theta_max = float(detachment_angles(2.0, 1.4)[0])
    room = float(max_prandtl_meyer_angle(1.4)) - prandtl_meyer_angle(2.0, 1.4)
    state = turn_state(2.0, [theta_max * 1.01, -room * 1.01, 0.1, -0.1])
    assert list(state.detached) == [True, False, False, False]
    assert list(state.vacuum) == [False, True, False, False]
    assert np.isnan(state.p2_p1[0]) and np.isnan(state.p2_p1[1])
    assert np.all(np.isfinite(state.p2_p1[2:]))


def test_pressure_slope_is_continuous_through_zero_turn():
    # linear (Ackeret) theory: d ln p/dθ = γM²/√(M²-1) at θ = 0 on both sides
    # (SOURCES.md, "Loads on sections": Cp = 2θ/√(M²-1), i.e. dp/p = γM²dθ/√(M²-1))
    M1, g = np.array([1.2, 2.0, 5.0]), np.array([1.4, 1.3, 1.67])
    expected = g * M1**2 / np.sqrt(M1**2 - 1)
    for turn in (1e-9, -1e-9):
        state = turn_state(M1, turn, g)
        np.testing.assert_allclose(state.dlnp_dturn, expected, rtol=1e-7)


@settings(max_examples=60, deadline=None)
@given(M1=mach, f=st.floats(0.02, 0.9), g=gammas, strong=st.booleans(),
       sign=st.sampled_from([1, -1]))
def test_pressure_slope_matches_a_finite_difference(M1, f, g, strong, sign):
    if sign > 0:
        turn = f * float(detachment_angles(M1, g)[0])
    else:
        turn = -f * 0.5 * (float(max_prandtl_meyer_angle(g)) - prandtl_meyer_angle(M1, g))
    h = 1e-6 * abs(turn)
    states = turn_state(M1, np.array([turn - h, turn, turn + h]), g, strong=strong)
    log_p = np.log(states.p2_p1)
    central = (log_p[2] - log_p[0]) / (2 * h)
    # central difference: truncation O(h²) relative, and rounding of ln p over 2h, absolute
    rounding = 8 * ref.EPS * (1 + np.max(np.abs(log_p))) / h
    assert states.dlnp_dturn[1] == pytest.approx(central, rel=2e-5, abs=rounding)


def test_pressure_slope_matches_mpmath_derivative():
    # reference: mpmath derivative of ln p2/p1 along both branches of the shock polar and
    # along the fan
    # (40 digits, tests/reference.py). Measured agreement ~1e-14.
    rng = np.random.default_rng(51)
    M1 = rng.uniform(1.2, 10.0, 12)
    g = rng.uniform(1.1, 1.67, 12)
    theta = rng.uniform(0.05, 0.9, 12) * detachment_angles(M1, g)[0]
    got_shock = turn_state(M1, theta, g).dlnp_dturn
    got_strong = turn_state(M1, theta, g, strong=True).dlnp_dturn
    got_fan = turn_state(M1, -theta, g).dlnp_dturn
    with mp.workdps(40):
        for i in range(12):
            m, gg, t = mp.mpf(float(M1[i])), mp.mpf(float(g[i])), mp.mpf(float(theta[i]))

            def ln_p_shock(x):
                beta = ref.wave_angle.mp(m, x, gg)
                return mp.log(ref._ns(m * mp.sin(beta), gg)["p2_p1"])

            def ln_p_strong(x):
                beta = ref.wave_angle.mp(m, x, gg, True)
                return mp.log(ref._ns(m * mp.sin(beta), gg)["p2_p1"])

            def ln_p_fan(x):
                M2 = ref.M_from_nu.mp(ref._nu(m, gg) + x, gg)
                return mp.log(ref.fan_p2_p1.mp(m, M2, gg))

            assert got_shock[i] == pytest.approx(float(mp.diff(ln_p_shock, t)), rel=1e-11)
            assert got_fan[i] == pytest.approx(float(-mp.diff(ln_p_fan, t)), rel=1e-11)
            assert got_strong[i] == pytest.approx(float(mp.diff(ln_p_strong, t)), rel=1e-11)


@settings(max_examples=60, deadline=None)
@given(M1=mach, f=st.floats(-0.9, 0.9), g=gammas)
def test_turn_for_pressure_ratio_inverts_turn_state(M1, f, g):
    if f >= 0:
        turn = f * float(detachment_angles(M1, g)[0])
    else:
        turn = f * (float(max_prandtl_meyer_angle(g)) - prandtl_meyer_angle(M1, g))
    p = turn_state(M1, turn, g).p2_p1
    back = turn_for_pressure_ratio(M1, p, g)
    assert back == pytest.approx(turn, rel=1e-8, abs=1e-12)


def test_turn_for_pressure_ratio_above_the_normal_shock_is_nan():
    assert np.isnan(turn_for_pressure_ratio(2.0, 4.6))
    assert turn_for_pressure_ratio(2.0, 1.0) == 0.0


def test_broadcasting_and_shapes():
    M1 = np.array([[1.5], [2.5], [4.0]])
    turn = np.radians([-10.0, -1.0, 0.0, 1.0, 5.0])
    g = np.array([1.3, 1.4, 1.4, 1.4, 1.67])
    state = turn_state(M1, turn, g)
    for name in state._fields:
        assert np.shape(getattr(state, name)) == (3, 5), name
    one = turn_state(2.5, turn[4], 1.67)
    assert state.p2_p1[1, 4] == one.p2_p1
    assert turn_for_pressure_ratio(M1, state.p2_p1, g).shape == (3, 5)


def test_nan_in_nan_out():
    state = turn_state([2.0, np.nan, 2.0], [0.1, 0.1, np.nan])
    assert np.isfinite(state.p2_p1[0]) and np.isnan(state.p2_p1[1]) and np.isnan(state.p2_p1[2])
    assert not state.vacuum[2] and not state.detached[2]
