"""Tests of gasdyn2d.patterns.solver: the exact Jacobian, the single-case float path, and
isentropic compressions.

Independent checks: central finite differences of the wave relations for the
closed-form partial derivatives; the Prandtl–Meyer function (NACA Report 1135,
eq. 171) and the isentropic relations (eq. 44) for isentropic compressions, through
the Riemann invariant of a simple wave (ν + θ or ν − θ constant along the other
family's characteristics, a fact of the trade); the mpmath reference for the shocks.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d.errors import DetachedShockError, NoSolutionError
from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.patterns.solver import wave_partials
from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle
from gasdyn2d.relations.oblique_shocks import detachment_angles
from gasdyn2d.relations.simple_waves import isentropic_turn_state, turn_state

from wave_problem_reference import _close, mp, nu, p_over_p0, mach_of_nu


# ------------------------------------------------------------ the exact Jacobian


def _fd(func, x, h):
    return (func(x + h) - func(x - h)) / (2 * h)


@settings(max_examples=40, deadline=None)
@given(M=st.floats(1.3, 6.0), fraction=st.floats(0.05, 0.9), g=st.floats(1.1, 1.67),
       kind=st.sampled_from(["weak", "strong", "fan", "isentropic"]))
def test_wave_partials_match_central_differences(M, fraction, g, kind):
    # the four closed-form partials against central differences of the relation itself
    theta_max = float(detachment_angles(M, g)[0])
    isentropic = kind == "isentropic"
    if kind == "fan":
        t = -fraction * 0.5
    elif isentropic:
        t = fraction * float(prandtl_meyer_angle(M, g))
    else:
        t = fraction * theta_max
    strong = kind == "strong"

    def state(m, turn):
        if isentropic:
            return isentropic_turn_state(np.array([m]), np.array([turn]), g)
        return turn_state(np.array([m]), np.array([turn]), g, strong=strong)

    s = state(M, t)
    FM, Ft, LM, Lt = (float(np.asarray(v).reshape(-1)[0]) for v in
                      wave_partials(np.array([M]), np.array([t]), g, s, isentropic=isentropic))
    h = 1e-6
    lnp = lambda m, turn: math.log(float(state(m, turn).p2_p1[0]))  # noqa: E731
    M2 = lambda m, turn: float(state(m, turn).M2[0])  # noqa: E731
    expected = [_fd(lambda m: M2(m, t), M, h), _fd(lambda x: M2(M, x), t, h),
                _fd(lambda m: lnp(m, t), M, h), _fd(lambda x: lnp(M, x), t, h)]
    np.testing.assert_allclose([FM, Ft, LM, Lt], expected, rtol=2e-5, atol=1e-7)


@pytest.mark.parametrize("condition", ["free boundary", "wall"])
def test_analytic_jacobian_through_a_chain_of_waves(condition):
    # an unknown shock whose downstream state feeds given fans (free-boundary residual) or
    # a pressure-given wave (wall residual): the Jacobian needs every partial, the ∂/∂M1
    # terms and the turn of a wave that holds its pressure included. The condition is
    # taken from the same chain with a known shock turn, which the solve must recover
    # (an invented jet edge and ramp).
    M = np.array([2.2, 3.0, 4.0])
    turn = np.radians([4.0, 7.0, 9.0])

    def chain(shock_turn=None):
        p = WavePattern(M)
        p.add_wave("shock", upstream="1", downstream="2", family="left", turn=shock_turn)
        if condition == "free boundary":
            p.add_wave("corner fan", upstream="2", downstream="3", family="left", turn=-0.1)
            p.add_wave("edge", upstream="3", downstream="4", family="right", turn=0.05)
        else:
            p.add_wave("lip", upstream="2", downstream="3", family="right", pressure=3.0)
            p.add_wave("edge", upstream="3", downstream="4", family="left", turn=-0.05)
        return p

    known = chain(turn).solve().region("4")
    p = chain()
    if condition == "free boundary":
        p.add_free_boundary("4", pressure=known.p_ratio)
    else:
        p.add_wall("4", direction=known.direction)
    s = p.solve()
    np.testing.assert_allclose(s.wave("shock").turn, turn, rtol=1e-12)
    assert s.iterations <= 8  # quadratic convergence from a zero start


# ------------------------------------------------------------ one case on floats


@settings(max_examples=20, deadline=None)
@given(M=st.floats(1.8, 5.0), ramp=st.floats(0.02, 0.5), g=st.floats(1.15, 1.67))
def test_single_case_matches_a_batch_of_one(M, ramp, g):
    # the float path and the array path run the same iteration: a few ulp apart
    ramp *= float(detachment_angles(M, g)[0]) * 0.9

    def pattern(m):
        p = WavePattern(m, gamma=g)
        p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp)
        p.add_wave("reflected", upstream="2", downstream="3", family="right")
        p.add_wall("3", direction=0.0)
        p.add_wave("lip", upstream="1", downstream="4", family="right", pressure=0.6)
        p.add_wave("edge", upstream="4", downstream="5", family="left")
        p.add_free_boundary("5", pressure=0.5)
        return p

    single = pattern(M).solve(errors="nan")
    batch = pattern(np.array([M])).solve(errors="nan")
    assert bool(single.ok) == bool(batch.ok[0])
    if single.ok:
        for name in ("3", "5"):
            for field in ("M", "p_ratio", "T_ratio", "direction"):
                a = getattr(single.region(name), field)
                b = getattr(batch.region(name), field)[0]
                assert a == pytest.approx(b, rel=1e-13, abs=1e-15), (name, field)
    else:
        assert single.failure == batch.failure[0]


def test_single_case_failure_has_the_batch_message():
    # the float path hands a failing case to the batch form, which explains it
    p = WavePattern(1.6)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=np.radians(10))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", 0.0)
    with pytest.raises(NoSolutionError, match=r"^no solution: wave 'reflected' detached"):
        p.solve()
    assert p.solve(errors="nan").failure.startswith("wave 'reflected' detached")


# ------------------------------------------------------------ isentropic compressions


@settings(max_examples=25, deadline=None)
@given(M=st.floats(1.5, 5.0), fraction=st.floats(0.01, 0.9), g=st.floats(1.1, 1.67))
def test_isentropic_compression_keeps_the_riemann_invariant(M, fraction, g):
    # a left-running simple compression of turn δ: ν2 = ν1 - δ, p0 unchanged (facts of the
    # trade); the same stream expanded back by δ returns to M1
    turn = fraction * float(prandtl_meyer_angle(M, g))
    p = WavePattern(M, gamma=g)
    p.add_wave("ramp", upstream="1", downstream="2", family="left", turn=turn,
               compression="isentropic")
    p.add_wave("back", upstream="2", downstream="3", family="left", turn=-turn)
    s = p.solve()
    assert s.wave("ramp").kind == "compression" and s.wave("back").kind == "fan"
    nu1, nu2 = prandtl_meyer_angle(M, g), prandtl_meyer_angle(s.region("2").M, g)
    assert nu1 - nu2 == pytest.approx(turn, rel=1e-12, abs=1e-14)
    assert s.region("2").p0_ratio == 1.0 and s.region("3").p0_ratio == 1.0
    assert s.region("3").M == pytest.approx(M, rel=1e-12)
    assert s.region("2").p_ratio > 1.0


def test_isentropic_compression_against_mpmath():
    # invented ramp: Mach 3 turned by 12° isentropically; M2 from ν(M2) = ν(3) - 12° and
    # p2/p1 from the isentropic relation (NACA Report 1135, eqs. 44 and 171), 30 digits
    with mp.workdps(30):
        g, M = mp.mpf(1.4), mp.mpf(3)
        M2 = mach_of_nu(nu(M, g) - mp.radians(12), g, start=2)
        p21 = p_over_p0(M2, g) / p_over_p0(M, g)
    p = WavePattern(3.0)
    p.add_wave("ramp", upstream="1", downstream="2", family="left", compression="isentropic")
    p.add_wall("2", direction=np.radians(12.0))  # the turn is found by the solver
    s = p.solve()
    _close([s.region("2").M, s.region("2").p_ratio], [float(M2), float(p21)], rtol=1e-13)
    # the shock that turns as far loses stagnation pressure and compresses less
    shock = WavePattern(3.0).add_wave("ramp", upstream="1", downstream="2", family="left",
                                      turn=np.radians(12.0)).solve()
    assert shock.region("2").p_ratio < s.region("2").p_ratio
    assert shock.region("2").p0_ratio < 1.0


def test_isentropic_compression_by_pressure_and_its_limits():
    # given by pressure: the turn that reaches it isentropically
    p = WavePattern(2.5)
    p.add_wave("lip", upstream="1", downstream="2", family="right", pressure=2.0,
               compression="isentropic")
    s = p.solve()
    assert s.region("2").p_ratio == pytest.approx(2.0, rel=1e-14)
    assert s.wave("lip").kind == "compression" and s.region("2").p0_ratio == 1.0
    assert prandtl_meyer_angle(2.5) - prandtl_meyer_angle(s.region("2").M) == pytest.approx(
        -s.wave("lip").turn, rel=1e-12)
    # beyond ν1 no simple compression exists (the flow would turn subsonic)
    nu1 = float(prandtl_meyer_angle(2.0))
    q = WavePattern(2.0).add_wave("ramp", upstream="1", downstream="2", family="left",
                                  turn=nu1 * 1.1, compression="isentropic")
    with pytest.raises(DetachedShockError, match=r"wave 'ramp' detached: its turn .* exceeds "
                                                 r"the Prandtl–Meyer angle ν"):
        q.solve()
    r = WavePattern(2.0).add_wave("ramp", upstream="1", downstream="2", family="left",
                                  compression="isentropic")
    r.add_wall("2", direction=nu1 * 1.2)
    assert "cannot compress isentropically" in r.solve(errors="nan").failure
    assert "isentropic" in repr(r)
