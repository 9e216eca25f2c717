"""Tests of gasdyn2d.patterns.polars: the pressure–deflection polar of a stream.

Checks: the polar's extreme points against the closed-form maximum deflection
and the normal shock (values in /work/shared/SOURCES.md, computed; NACA
Report 1135, Table II, M = 2: p2/p1 = 4.5), every point against an mpmath
evaluation of the θ-β-M relation (NACA Report 1135, eq. 138), and the
expansion branch against the Prandtl–Meyer function (eq. 171).
"""

from __future__ import annotations

import mpmath as mp
import numpy as np
import pytest

from gasdyn2d import FlowState, ureg
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle
from gasdyn2d.patterns.polars import pressure_deflection_polar
from gasdyn2d.patterns.reflections import wall_reflection

# /work/shared/SOURCES.md, "Maximum deflection θmax" (computed), γ = 1.4
SOURCES_MD_MAX_DEFLECTION_DEG = {1.5: 12.1127, 2.0: 22.9735, 3.0: 34.0734, 5.0: 41.1177}


@pytest.mark.parametrize("M", sorted(SOURCES_MD_MAX_DEFLECTION_DEG))
def test_extreme_points(M):
    polar = pressure_deflection_polar(M)
    theta_max = SOURCES_MD_MAX_DEFLECTION_DEG[M]
    assert abs(np.degrees(np.max(polar.shock_direction)) - theta_max) < 6e-5
    assert abs(np.degrees(-np.min(polar.shock_direction)) - theta_max) < 6e-5
    assert abs(np.degrees(polar.max_deflection) - theta_max) < 6e-5
    # top of the polar: the normal shock, p2/p1 = 1 + 2γ(M² - 1)/(γ + 1) (NACA 1135, eq. 93)
    np.testing.assert_allclose(np.max(polar.shock_pressure_ratio), 1 + 2.8 / 2.4 * (M**2 - 1),
                               rtol=1e-14)
    # ends: the Mach waves, no pressure change
    np.testing.assert_allclose(polar.shock_pressure_ratio[[0, -1]], 1.0, atol=1e-14)


def test_points_against_mpmath_theta_beta_mach():
    polar = pressure_deflection_polar(2.7, n=31)
    with mp.workdps(30):
        M, g = mp.mpf(2.7), mp.mpf(1.4)
        for beta, theta, p in zip(polar.shock_wave_angle[::7], polar.shock_direction[::7],
                                  polar.shock_pressure_ratio[::7]):
            b = mp.mpf(float(beta))
            ref = mp.atan(2 / mp.tan(b) * (M**2 * mp.sin(b) ** 2 - 1)
                          / (M**2 * (g + mp.cos(2 * b)) + 2))
            assert abs(abs(theta) - float(ref)) < 1e-14
            assert abs(p - float(1 + 2 * g / (g + 1) * (M**2 * mp.sin(b) ** 2 - 1))) < 1e-13 * p


def test_branches_and_symmetry():
    polar = pressure_deflection_polar(3.0, n=51)
    d = polar.shock_direction
    np.testing.assert_allclose(d, -d[::-1], atol=1e-15)
    assert polar.shock_strong.sum() > 0 and (~polar.shock_strong).sum() > 0
    # strong-branch points lie above the weak ones at the same deflection
    assert np.min(polar.shock_pressure_ratio[polar.shock_strong]) >= np.max(
        polar.shock_pressure_ratio[~polar.shock_strong]) * (1 - 1e-12)


def test_expansion_branch():
    polar = pressure_deflection_polar(2.0, n=41, min_pressure_ratio=0.1)
    p = polar.expansion_pressure_ratio
    assert p[0] == 1.0 and abs(p[-1] - 0.1) < 1e-12 and np.all(np.diff(p) < 0)
    # ν rises by the turn: recover M from p isentropically and compare (fact of the trade)
    t0 = 1 + 0.2 * 4.0
    M = np.sqrt(5.0 * (t0 * p ** (-0.4 / 1.4) - 1))
    np.testing.assert_allclose(prandtl_meyer_angle(M) - prandtl_meyer_angle(2.0),
                               polar.expansion_direction_right, atol=1e-13)
    np.testing.assert_allclose(polar.expansion_direction_left, -polar.expansion_direction_right)


def test_polar_explains_a_regular_reflection():
    # the reflected polar of region 2 crosses the wall direction at p3/p1
    r = wall_reflection(3.0, np.radians(10.0))
    from gasdyn2d.relations.simple_waves import turn_state
    s2 = turn_state(3.0, np.radians(10.0))
    region2 = FlowState(s2.M2, s2.p2_p1, 1.0, direction=-np.radians(10.0))
    polar = pressure_deflection_polar(region2, n=4001)
    weak_left = (~polar.shock_strong) & (polar.shock_direction > region2.direction_si)
    p_at_wall = np.interp(0.0, polar.shock_direction[weak_left][::-1],
                          polar.shock_pressure_ratio[weak_left][::-1])
    np.testing.assert_allclose(p_at_wall * s2.p2_p1, r.p3_p1, rtol=1e-5)


def test_batch_quantities_and_errors():
    states = FlowState(np.array([2.0, 3.0]), 1e5, 300.0, direction=5 * ureg.deg)
    polar = pressure_deflection_polar(states, n=11)
    assert polar.shock_direction.shape == (2, 4 * 11 - 3)
    assert polar.shock_direction.units == ureg.deg
    assert polar.expansion_pressure_ratio.shape == (2, 11)
    with pytest.raises(InvalidInputError, match="n must be an integer >= 3"):
        pressure_deflection_polar(2.0, n=2)
    with pytest.raises(InvalidInputError, match="state.M must be finite and >= 1"):
        pressure_deflection_polar(0.9)
