"""Tests of gasdyn2d.patterns.interactions: crossing and merging shocks and pressure
matching, built on the region graph, against the independent mpmath reference in
wave_problem_reference.py.
"""

from __future__ import annotations


import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d import ureg
from gasdyn2d.errors import DetachedShockError, InvalidInputError, NoSolutionError
from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle
from gasdyn2d.relations.oblique_shocks import detachment_angles
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing, turn_to_pressure

from wave_problem_reference import (
    _close,
    _rng,
    merging_shocks_reference,
    shock_crossing_reference,
    turn_to_pressure_reference,
)

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


