"""The shock-point unit process of fitted shocks (gasdyn2d.characteristics.shock_points).

References: the oblique-shock relations (NACA Report 1135, eqs. 128-132 and 138), whose
exact straight shock must be reproduced when the flow behind it is uniform; the planar
compatibility relations in p and θ (Zucrow & Hoffman 1977, vol. 2, ch. 16, from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from gasdyn2d.characteristics.shock_points import compatibility_coefficient, shock_point
from gasdyn2d.relations.oblique_shocks import oblique_shock_ratios
from gasdyn2d.relations.theta_beta_mach import sonic_angles, wave_angle_from_deflection


@pytest.mark.parametrize("mach, turn_deg, gamma", [
    (2.0, 10.0, 1.4), (1.5, 5.0, 1.4), (5.0, 30.0, 1.4), (1.2, 3.0, 1.4), (1.05, 0.5, 1.4),
    (1.001, 0.001, 1.4), (3.0, 12.0, 1.3), (8.0, 20.0, 1.67)])
@pytest.mark.parametrize("family", [+1, -1])
def test_uniform_flow_behind_gives_the_straight_oblique_shock(mach, turn_deg, gamma, family):
    # A wedge's straight shock: uniform flow behind it, so the characteristic reaching the
    # shock carries exactly the state behind the oblique shock (NACA Report 1135, eq. 138)
    turn = math.radians(turn_deg)
    beta = wave_angle_from_deflection(mach, turn, gamma)
    behind = oblique_shock_ratios(mach, beta, gamma)
    theta_up, p_up = 0.07, 3.0e4  # invented upstream direction and pressure [rad, Pa]
    point = shock_point(mach, theta_up, p_up, behind.M2, theta_up + family * turn,
                        p_up * behind.p2_p1, family, gamma)
    assert point.wave_angle == pytest.approx(beta, rel=4e-15)
    assert point.direction == pytest.approx(theta_up + family * beta, rel=4e-15)
    assert point.theta == pytest.approx(theta_up + family * turn, abs=1e-15)
    assert point.p == pytest.approx(p_up * behind.p2_p1, rel=4e-15)
    assert point.mach == pytest.approx(behind.M2, rel=4e-15)
    assert not point.vanished and not point.subsonic


def test_compatibility_relation_holds_at_the_solution():
    # invented states behind a Mach 2.6 shock; the averaged C+ / C- relation must hold
    rng = np.random.default_rng(3)
    mach_b = rng.uniform(1.6, 2.2, 200)
    theta_b = rng.uniform(0.02, 0.25, 200)
    p_b = rng.uniform(1.2, 2.5, 200)
    for family in (+1, -1):
        point = shock_point(2.6, 0.0, 1.0, mach_b, family * theta_b, p_b, family)
        ok = ~(point.vanished | point.subsonic)
        b_mean = 0.5 * (compatibility_coefficient(mach_b) + compatibility_coefficient(point.mach))
        residual = family * (point.theta - family * theta_b) + b_mean * np.log(point.p / p_b)
        assert ok.sum() > 150
        assert np.max(np.abs(residual[ok])) < 1e-14


def test_an_expansion_behind_cancels_the_shock_to_a_mach_wave():
    # the characteristic asks for less than a Mach wave: the shock has vanished
    point = shock_point(2.0, 0.0, 1.0, 2.1, -0.01, 0.9, +1)
    assert point.vanished
    assert point.wave_angle == pytest.approx(math.asin(0.5), rel=1e-15)
    assert point.p == pytest.approx(1.0) and point.p0_ratio == pytest.approx(1.0)


def test_a_shock_too_strong_for_supersonic_flow_behind_is_flagged_not_invented():
    # beyond the sonic point of the weak branch no characteristic reaches the shock
    theta_sonic = sonic_angles(2.0, 1.4)[0]
    point = shock_point(np.array([2.0, 2.0]), 0.0, 1.0, 1.0, np.array([theta_sonic + 0.05, 0.05]),
                        np.array([4.0, 1.2]), +1)
    assert list(point.subsonic) == [True, False]
    assert np.isnan(point.wave_angle[0]) and np.isfinite(point.wave_angle[1])


def test_nan_in_gives_nan_out_and_shapes_broadcast():
    point = shock_point(np.array([[2.0], [np.nan]]), 0.0, 1.0, 1.8, np.array([0.05, 0.1]), 1.4, +1)
    assert point.wave_angle.shape == (2, 2)
    assert np.all(np.isnan(point.wave_angle[1])) and np.all(np.isfinite(point.wave_angle[0]))


def test_scalar_fast_path_matches_the_array_core():
    # Scalar form against the array core (same algorithm): invented states behind a Mach 2.4
    # shock, both families, including a vanished and a subsonic case
    rng = np.random.default_rng(11)
    cases = [(2.4, 0.01, 1.0, m, f * t, p, f) for m, t, p, f in zip(
        rng.uniform(1.5, 2.3, 40), rng.uniform(-0.02, 0.3, 40), rng.uniform(0.9, 3.0, 40),
        rng.choice([-1.0, 1.0], 40))]
    cases += [(2.4, 0.0, 1.0, 2.4, 0.0, 1.0, 1.0), (2.4, 0.0, 1.0, 1.01, 0.6, 9.0, -1.0)]
    for case in cases:
        scalar = shock_point(*case)
        array = shock_point(*(np.array([v]) for v in case))
        for got, expected in zip(scalar, array):
            assert np.allclose(got, expected[0], rtol=1e-13, atol=1e-15, equal_nan=True)


def test_guess_gives_the_same_shock_point():
    # A guess only narrows the first bracket: the answer is the same to a few ulp, whether
    # the guess is good, poor (the bracket misses: full bracket) or the root is a Mach wave
    # (invented states behind a Mach 2.4 shock)
    cases = [(2.4, 0.0, 1.0, 2.0, -0.08, 1.5, -1.0), (2.4, 0.0, 1.0, 2.1, 0.05, 1.3, 1.0),
             (2.4, 0.0, 1.0, 2.4, 0.0, 1.0, 1.0)]
    for case in cases:
        plain = shock_point(*case)
        for guess in (float(plain.wave_angle) + 2e-4, 0.9, 0.5):
            guessed = shock_point(*case, guess=guess)
            for got, expected in zip(guessed, plain):
                assert got == pytest.approx(expected, rel=1e-13, abs=1e-15)
