"""Conservation across every shock of every coupled solution, from the returned states.

Facts of the trade, independent of how the solver works: across a straight shock the
mass flux, both components of the momentum flux and the total enthalpy are the same
on both sides (the Rankine–Hugoniot conditions, NACA Report 1135, eqs. 85-88 in
normal and tangential components, equation numbers from memory), and the stagnation
pressure never rises across any wave (second law); across a centred fan it is
unchanged. Each check takes the states a solution returns (Mach number, pressure and
temperature ratios, flow direction) and the shock's line direction, rebuilds the
velocity vectors (R = 1, inflow p = T = 1) and compares the fluxes, so any error in a
wave relation, in the coupling or in the packaging of a state shows up.

Every ready function is run on a random batch (invented cases) and its returned
fields are compared with the solution of the region graph its docstring states,
whose states are then checked: the ready result is a state of a solution that
conserves.
"""

from __future__ import annotations

import numpy as np
import pytest

from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing, turn_to_pressure
from gasdyn2d.patterns.reflections import (free_boundary_reflection, reflection_transition,
                                           wall_reflection)
from gasdyn2d.relations.oblique_shocks import detachment_angles

from wave_problem_reference import _rng

RTOL = 1e-12  # fluxes are O(1) sums of O(1) terms: a few ulp each


def _state(region, g):
    """(p, rho, u, v, h0) of a region with R = 1 and the inflow at p = T = 1."""
    p, T = np.asarray(region.p_ratio), np.asarray(region.T_ratio)
    speed = np.asarray(region.M) * np.sqrt(g * T)
    d = np.asarray(region.direction)
    return p, p / T, speed * np.cos(d), speed * np.sin(d), g / (g - 1) * T + 0.5 * speed**2


def assert_conserved(solution, rtol=RTOL):
    """Rankine–Hugoniot across every shock, p0 never rising across any wave."""
    g = np.asarray(solution.gamma)
    checked = 0
    for name in solution.wave_names:
        link = solution.connection(name)
        wave = solution.wave(name)
        up, down = solution.region(link.upstream), solution.region(link.downstream)
        ok = np.asarray(solution.ok)
        p0_up, p0_down = np.asarray(up.p0_ratio), np.asarray(down.p0_ratio)
        assert np.all(p0_down[ok] <= p0_up[ok] * (1 + 4e-16)), name  # second law
        shock = ok & (np.asarray(wave.kind) == "shock")
        fan = ok & (np.asarray(wave.kind) == "fan")
        np.testing.assert_allclose(p0_down[fan], p0_up[fan], rtol=1e-14)
        if not shock.any():
            continue
        p1, r1, u1, v1, h1 = (np.broadcast_to(a, shock.shape)[shock] for a in _state(up, g))
        p2, r2, u2, v2, h2 = (np.broadcast_to(a, shock.shape)[shock] for a in _state(down, g))
        phi = np.broadcast_to(wave.head_line_direction, shock.shape)[shock]
        nx_, ny_ = -np.sin(phi), np.cos(phi)  # unit normal to the shock line
        tx, ty = np.cos(phi), np.sin(phi)
        vn1, vn2 = u1 * nx_ + v1 * ny_, u2 * nx_ + v2 * ny_
        vt1, vt2 = u1 * tx + v1 * ty, u2 * tx + v2 * ty
        mass1, mass2 = r1 * vn1, r2 * vn2
        scale = np.abs(mass1) * (np.abs(vn1) + np.abs(vt1)) + p1
        np.testing.assert_allclose(mass2, mass1, rtol=rtol, err_msg=f"{name}: mass")
        np.testing.assert_allclose(p2 + mass2 * vn2, p1 + mass1 * vn1, rtol=rtol,
                                   err_msg=f"{name}: normal momentum")
        tangential = np.abs(mass2 * vt2 - mass1 * vt1) / scale  # vt may be near zero
        assert np.all(tangential <= rtol), (name, "tangential momentum", tangential.max())
        np.testing.assert_allclose(h2, h1, rtol=rtol, err_msg=f"{name}: energy")
        assert np.all(p2 > p1), name  # (p0 falls, by the third power of a weak shock)
        checked += int(shock.sum())
    return checked


def _same(result_value, solution_value, rtol=1e-13):
    np.testing.assert_allclose(np.asarray(result_value, dtype=float),
                               np.asarray(solution_value, dtype=float), rtol=rtol, atol=1e-14)


# ------------------------------------------------------------ ready functions


def test_wall_reflection_regular_conserves():
    rng = _rng("conservation regular")
    M = rng.uniform(1.6, 6.0, 24)
    detachment = np.asarray(reflection_transition(M).detachment.deflection)
    theta = rng.uniform(0.02, 0.95, 24) * detachment
    r = wall_reflection(M, theta)
    assert np.all(r.kind == "regular")
    p = WavePattern(M)  # the graph stated in wall_reflection's Notes
    p.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    p.add_wave("reflected", upstream="2", downstream="3", family="left")
    p.add_wall("3", direction=0.0)
    s = p.solve()
    _same(r.M2, s.region("2").M)
    _same(r.M3, s.region("3").M)
    _same(r.p3_p1, s.region("3").p_ratio)
    _same(r.reflected_angle_to_wall, s.wave("reflected").head_line_direction)
    assert assert_conserved(s) == 48


def test_wall_reflection_mach_conserves():
    rng = _rng("conservation mach")
    M = rng.uniform(2.6, 5.0, 12)
    theta = (np.asarray(reflection_transition(M).detachment.deflection)
             + np.radians(rng.uniform(0.2, 2.0, 12)))
    r = wall_reflection(M, theta)
    assert np.all(r.kind == "mach")
    p = WavePattern(M)  # three-shock theory, as stated in wall_reflection's Notes
    p.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    p.add_wave("reflected", upstream="2", downstream="3", family="left",
               guess=np.asarray(r.mach_reflected_angle_to_wall) * 0 + theta)
    p.add_wave("stem", upstream="1", downstream="4", family="right", branch="strong",
               guess=-np.asarray(r.slip_angle_to_wall))
    p.add_slip_line("3", "4")
    s = p.solve()
    _same(r.mach_M3, s.region("3").M, rtol=1e-11)
    _same(r.mach_p3_p1, s.region("3").p_ratio, rtol=1e-11)
    _same(r.M4, s.region("4").M, rtol=1e-11)
    _same(r.slip_angle_to_wall, -np.asarray(s.region("4").direction), rtol=1e-9)
    assert assert_conserved(s) == 36
    assert np.all(np.asarray(s.region("4").M) < 1.0)  # subsonic behind the stem


def test_reflection_transition_states_conserve():
    # at each returned condition, the regular reflection there conserves, and at the von
    # Neumann condition p3 equals the normal-shock pressure p2/p1 = 1 + 2γ(M² - 1)/(γ + 1)
    # (NACA Report 1135, eq. 93)
    M = _rng("conservation transition").uniform(2.3, 6.0, 10)
    t = reflection_transition(M)
    for theta in (np.asarray(t.von_neumann.deflection),
                  np.asarray(t.detachment.deflection) * (1 - 1e-9)):
        p = WavePattern(M)
        p.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
        p.add_wave("reflected", upstream="2", downstream="3", family="left")
        p.add_wall("3", direction=0.0)
        s = p.solve()
        assert assert_conserved(s) == 20
        _same(t.detachment.wave_angle if theta[0] != t.von_neumann.deflection[0]
              else t.von_neumann.wave_angle,
              -np.asarray(s.wave("incident").head_line_direction), rtol=1e-9)
    np.testing.assert_allclose(wall_reflection(M, t.von_neumann.deflection).p3_p1,
                               1 + 2.8 / 2.4 * (M**2 - 1), rtol=1e-9)


def test_shock_crossing_conserves():
    rng = _rng("conservation crossing")
    M = rng.uniform(1.8, 5.0, 20)
    tmax = detachment_angles(M, 1.4)[0]
    du, dl = rng.uniform(0.02, 0.4, (2, 20)) * tmax
    x = shock_crossing(M, du, dl)
    p = WavePattern(M)  # the graph in shock_crossing's Notes
    p.add_wave("upper shock", upstream="1", downstream="2", family="right", turn=-du)
    p.add_wave("lower shock", upstream="1", downstream="3", family="left", turn=dl)
    p.add_wave("transmitted above", upstream="2", downstream="4", family="left", guess=dl)
    p.add_wave("transmitted below", upstream="3", downstream="5", family="right", guess=-du)
    p.add_slip_line("4", "5")
    s = p.solve()
    _same(x.slip_direction, s.region("4").direction)
    _same(x.p_p1, s.region("5").p_ratio)
    _same(x.M_above_slip, s.region("4").M)
    _same(x.M_below_slip, s.region("5").M)
    _same(x.transmitted_below_wave_angle, s.wave("transmitted below").wave_angle)
    assert assert_conserved(s) == 80


def test_merging_shocks_conserve():
    rng = _rng("conservation merging")
    M = rng.uniform(1.8, 5.0, 16)
    d1, d2 = np.radians(rng.uniform(1.0, 8.0, (2, 16)))
    m = merging_shocks(M, d1, d2)
    p = WavePattern(M)
    p.add_wave("first", upstream="1", downstream="2", family="left", turn=d1)
    p.add_wave("second", upstream="2", downstream="3", family="left", turn=d2)
    p.add_wave("merged", upstream="1", downstream="4", family="left", guess=d1 + d2)
    p.add_wave("reflected", upstream="3", downstream="5", family="right")
    p.add_slip_line("4", "5")
    s = p.solve()
    _same(m.slip_direction, s.region("5").direction)
    _same(m.p_p1, s.region("4").p_ratio)
    _same(m.wave_angle, s.wave("merged").wave_angle)
    _same(m.reflected_turn, s.wave("reflected").turn, rtol=1e-9)
    assert assert_conserved(s) >= 48


def test_free_boundary_reflection_conserves():
    rng = _rng("conservation free boundary")
    M = rng.uniform(1.5, 5.0, 16)
    theta = rng.uniform(0.05, 0.8, 16) * detachment_angles(M, 1.4)[0]
    f = free_boundary_reflection(M, theta, gamma=1.3)
    p = WavePattern(M, gamma=1.3)
    p.add_wave("shock", upstream="1", downstream="2", family="left", turn=theta)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_free_boundary("3", pressure=1.0)
    s = p.solve()
    _same(f.M3, s.region("3").M)
    _same(f.boundary_turn, s.region("3").direction)
    assert assert_conserved(s) == 16
    assert np.all(np.asarray(s.wave("reflected").kind) == "fan")


def test_turn_to_pressure_conserves():
    rng = _rng("conservation pressure")
    M = rng.uniform(1.3, 6.0, 20)
    p_normal = 1 + 2.8 / 2.4 * (M**2 - 1)
    ratio = np.where(np.arange(20) % 2 == 0, rng.uniform(1.05, 0.95 * p_normal),
                     rng.uniform(0.1, 0.95, 20))
    t = turn_to_pressure(M, ratio)
    p = WavePattern(M)
    p.add_wave("lip wave", upstream="1", downstream="2", family="left", pressure=ratio)
    s = p.solve()
    _same(t.M2, s.region("2").M)
    _same(t.deflection, np.abs(s.wave("lip wave").turn))
    assert assert_conserved(s) == 10


# ------------------------------------------------------------ patterns of the user's own


@pytest.mark.parametrize("gamma", [1.4, 1.25])
def test_random_patterns_conserve(gamma):
    # invented: a ramp intake's two shocks reflecting between ramp and cowl, and a jet edge
    rng = _rng(f"conservation patterns {gamma}")
    n = 16
    M = rng.uniform(2.5, 5.0, n)
    ramp1, ramp2 = np.radians(rng.uniform(2.0, 6.0, (2, n)))
    p = WavePattern(M, gamma=gamma)
    p.add_wave("first ramp", upstream="1", downstream="2", family="left", turn=ramp1)
    p.add_wave("second ramp", upstream="2", downstream="3", family="left", turn=ramp2)
    p.add_wave("cowl reflection", upstream="3", downstream="4", family="right")
    p.add_wall("4", direction=0.0)
    p.add_wave("ramp reflection", upstream="4", downstream="5", family="left")
    p.add_wall("5", direction=ramp1 + ramp2)
    p.add_wave("lip", upstream="1", downstream="6", family="right", pressure=0.5)
    s = p.solve()
    assert np.all(s.ok)
    assert assert_conserved(s) == 4 * n
