"""Reliability of the wave-pattern floor: no silent wrong number, no ignored argument.

Regression tests for the reliability issue ("no silent wrong number anywhere"): an
ignored keyword, a solution live-linked to its pattern, integer region names, NaN
inputs taken for failures, failure reasons that were empty or wrong, an empty batch,
and a bad-input table over every public function of the floor (error class, the
argument named in the message, and under ``errors="nan"`` only the bad elements NaN
with the right reason). The physics checks use the mpmath reference in
``wave_problem_reference.py`` (NACA Report 1135 relations at 30-60 digits).
"""

from __future__ import annotations

import numpy as np
import pytest

from gasdyn2d import FlowState, Gas, ureg
from gasdyn2d.errors import (DetachedShockError, IllPosedProblemError, InvalidInputError,
                             NoSolutionError)
from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing, turn_to_pressure
from gasdyn2d.patterns.polars import pressure_deflection_polar
from gasdyn2d.patterns.reflections import (free_boundary_reflection, reflection_transition,
                                           wall_reflection)
from gasdyn2d.relations.oblique_shocks import detachment_angles

from wave_problem_reference import near_sonic_wedge, regular_reflection


def _duct(inflow, ramp=np.radians(6.0), **kwargs):
    """Invented scenario: a ramp shock reflecting from the roof of a test-section duct."""
    p = WavePattern(inflow, **kwargs)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    return p


def _wedge(M, wall):
    """One unknown shock from a wall turned by ``wall``."""
    p = WavePattern(M)
    p.add_wave("wedge shock", upstream="1", downstream="2", family="left")
    p.add_wall("2", direction=wall)
    return p


# ------------------------------------------------------------ ignored keywords


def test_flowstate_inflow_refuses_its_own_gas_and_direction_twice():
    # the keywords used to be ignored silently (M2 came out for γ = 1.4)
    rig = FlowState(2.0, 1e5, 300.0)
    for kwargs in ({"gamma": 1.1}, {"direction": 0.3}, {"gamma": 1.4, "direction": 0.0}):
        with pytest.raises(InvalidInputError, match=r"cannot be given with a FlowState inflow"):
            WavePattern(rig, **kwargs)
    # the gas of the state is the one used: γ = 1.1 through the FlowState gives γ = 1.1
    slow = FlowState(2.0, 1e5, 300.0, gas=Gas(gamma=1.1))
    a = _duct(slow).solve()
    b = _duct(2.0, gamma=1.1).solve()
    assert a.region("3").M == pytest.approx(b.region("3").M, rel=1e-14)
    assert a.gamma == pytest.approx(1.1)


# ------------------------------------------------------------ a solution is a snapshot


def test_solution_does_not_follow_later_changes_to_the_pattern():
    rig = FlowState(2.6, 20 * ureg.kPa, 180 * ureg.K)
    pattern = _duct(rig)
    solution = pattern.solve()
    before = solution.state("3").p.m_as("kPa")
    with pytest.raises(AttributeError):
        pattern.inflow_state = FlowState(2.6, 100 * ureg.kPa, 180 * ureg.K)
    pattern.add_wave("extra", upstream="3", downstream="4", family="left", turn=0.01)
    pattern.solve()
    assert solution.state("3").p.m_as("kPa") == before
    assert solution.region_names == ["1", "2", "3"]


def test_pattern_copies_the_arrays_it_is_given():
    M = np.array([2.2, 2.6])
    ramp = np.radians([5.0, 6.0])
    pattern = _duct(M, ramp)
    first = pattern.solve()
    M3 = np.array(first.region("3").M)
    M[:] = 4.0  # the caller reuses their arrays
    ramp[:] = 0.01
    np.testing.assert_array_equal(pattern.solve().region("3").M, M3)
    np.testing.assert_array_equal(first.region("3").M, M3)


def test_solution_fields_are_read_only_and_unshared():
    s = _duct(np.array([2.2, 2.6, 3.0])).solve()
    with pytest.raises(AttributeError):
        s.ok = False
    with pytest.raises(AttributeError):
        s.failure = "changed"
    with pytest.raises((AttributeError, TypeError)):
        s.region("3").M = 1.0  # frozen result
    arrays = [s.ok, s.failure, s.gamma]
    for name in s.region_names:
        r = s.region(name)
        arrays += [r.M, r.p_ratio, r.T_ratio, r.p0_ratio, r.direction]
    for name in s.wave_names:
        w = s.wave(name)
        arrays += [w.kind, w.turn, w.p_ratio, w.wave_angle, w.head_mach_angle,
                   w.tail_mach_angle, w.head_line_direction, w.tail_line_direction]
    for a in arrays:
        with pytest.raises(ValueError, match="read-only"):
            a[0] = a[1]
    for i, a in enumerate(arrays):
        for b in arrays[i + 1:]:
            assert not np.shares_memory(a, b)


# ------------------------------------------------------------ names


def test_integer_region_and_wave_names_are_their_text():
    p = WavePattern(2.0, name=1)
    p.add_wave(7, upstream=1, downstream=2, family="left", turn=0.1)
    p.add_wave("reflected", upstream=2, downstream=3, family="right")
    p.add_wall(3, 0.0)
    s = p.solve()
    assert s.region(2).M == s.region("2").M
    assert s.wave(7).turn == s.wave("7").turn
    assert s.made_by(3) == "reflected" and s.inflow_name == "1"
    for bad in (2.0, None, True, ("a",)):
        with pytest.raises(InvalidInputError, match=r"must be a name"):
            s.region(bad)
    with pytest.raises(InvalidInputError, match=r"downstream must be a name"):
        WavePattern(2.0).add_wave("a", upstream="1", downstream=2.5, family="left")


# ------------------------------------------------------------ NaN in, NaN out


def _wall_pattern(turn=0.1, wall=0.0, pressure=None):
    p = WavePattern(2.0)
    p.add_wave("a", upstream="1", downstream="2", family="left", turn=turn)
    p.add_wave("b", upstream="2", downstream="3", family="right")
    if pressure is None:
        p.add_wall("3", wall)
    else:
        p.add_free_boundary("3", pressure)
    return p


@pytest.mark.parametrize("solve", [
    lambda: turn_to_pressure(2.0, np.nan),
    lambda: turn_to_pressure(np.nan, 1.5),
    lambda: shock_crossing(2.0, np.nan, 0.1),
    lambda: free_boundary_reflection(2.0, np.nan),
    lambda: merging_shocks(2.5, 0.05, np.nan),
    lambda: wall_reflection(2.0, 0.1, gamma=np.nan),
    lambda: _wall_pattern(turn=np.nan).solve(),
    lambda: _wall_pattern(wall=np.nan).solve(),
    lambda: _wall_pattern(pressure=np.nan).solve(),
    lambda: WavePattern(2.0, direction=np.nan).add_wave(
        "a", upstream="1", downstream="2", family="left", turn=0.1).solve(),
], ids=["turn_to_pressure p", "turn_to_pressure M", "shock_crossing", "free boundary",
        "merging", "wall_reflection gamma", "pattern turn", "pattern wall",
        "pattern free boundary", "pattern direction"])
def test_nan_in_gives_nan_out_and_no_failure(solve):
    result = solve()
    assert result.failure == ""
    if hasattr(result, "region_names"):
        values = [result.region(n).M for n in result.region_names[1:]]
        assert result.ok is False
    else:
        values = [v for v in vars(result).values() if isinstance(v, float)]
    assert values and all(np.isnan(v) for v in values)


def test_nan_case_of_a_batch_leaves_the_others_alone():
    s = _wall_pattern(turn=np.array([0.1, np.nan, 0.15])).solve()
    assert list(np.isnan(s.region("3").M)) == [False, True, False]
    assert list(s.failure) == ["", "", ""] and list(s.ok) == [True, False, True]
    x = shock_crossing([2.0, 2.0], [0.1, np.nan], 0.1)
    assert np.isfinite(x.p_p1[0]) and np.isnan(x.p_p1[1]) and list(x.failure) == ["", ""]


# ------------------------------------------------------------ failure reasons


def test_invalid_inflow_and_gamma_are_reported_as_such():
    p = _duct(np.array([0.5, 2.0, 2.5]), gamma=np.array([1.4, 0.9, 1.4]))
    s = p.solve(errors="nan")
    assert s.failure[0].startswith("inflow Mach number = 0.5 is not")
    assert "supersonic" in s.failure[0]
    assert s.failure[1].startswith("gamma = 0.9 is not a finite ratio of specific heats > 1")
    assert s.failure[2] == "" and list(s.ok) == [False, False, True]
    with pytest.raises(InvalidInputError, match=r"inflow Mach number must be finite and >= 1"):
        p.solve()
    with pytest.raises(InvalidInputError, match=r"^gamma must be a finite ratio"):
        _duct(2.0, gamma=0.9).solve()


def test_given_turn_beyond_detachment_names_wave_turn_and_limit():
    theta_max = np.degrees(detachment_angles(2.0, 1.4)[0])  # 22.9735° (SOURCES.md, computed)
    with pytest.raises(DetachedShockError, match=(
            rf"wave 'a' detached: its turn 0\.5 rad \(28\.6479°\) exceeds the detachment "
            rf"deflection θmax = .* \({theta_max:.6g}°\) of its upstream region '1'")):
        _wall_pattern(turn=0.5).solve()
    s = _wall_pattern(turn=np.array([0.1, 0.5])).solve(errors="nan")
    assert s.failure[0] == "" and s.failure[1].startswith("wave 'a' detached: its turn")
    # a wave whose upstream state depends on an unknown stays a NoSolutionError
    with pytest.raises(NoSolutionError, match="wave 'reflected' detached"):
        _duct(1.6, np.radians(10.0)).solve()


def test_free_boundary_and_wave_pressures_are_validated():
    with pytest.raises(InvalidInputError, match=r"^pressure \(of the free boundary on '3'\) "
                                                r"must be finite and > 0; got -1\."):
        _wall_pattern(pressure=-1.0).solve()
    with pytest.raises(InvalidInputError, match=r"pressure \(of the free boundary"):
        _wall_pattern(pressure=0.0).solve()
    s = _wall_pattern(pressure=np.array([0.5, -1.0, np.nan])).solve(errors="nan")
    assert s.failure[0] == "" and s.failure[2] == ""
    assert s.failure[1] == "pressure (of the free boundary on '3') = -1 is not finite and > 0."
    assert np.isfinite(s.region("3").M[0]) and np.isnan(s.region("3").M[1:]).all()
    wave = WavePattern(2.0).add_wave("a", upstream="1", downstream="2", family="left",
                                     pressure=-2.0)
    with pytest.raises(InvalidInputError, match=r"^pressure \(of wave 'a'\) must be"):
        wave.solve()


def test_single_cases_are_not_reported_at_an_index():
    for call in (lambda: turn_to_pressure(0.8, 1.5), lambda: wall_reflection(0.8, 0.1),
                 lambda: shock_crossing(2.0, 0.1, 0.5), lambda: _wall_pattern(turn=0.5).solve(),
                 lambda: _duct(1.6, np.radians(10.0)).solve()):
        with pytest.raises(ValueError) as info:
            call()
        assert "index" not in str(info.value)


def test_empty_batch_gives_an_empty_solution():
    s = _duct(np.array([])).solve()
    assert s.region("3").M.shape == (0,) and s.ok.shape == (0,) and s.failure.shape == (0,)
    assert "empty batch" in repr(s)
    r = wall_reflection(np.array([]), 0.1)
    assert r.M3.shape == (0,) and r.kind.shape == (0,)
    assert turn_to_pressure(np.array([]), 1.5).M2.shape == (0,)
    assert shock_crossing(np.array([]), 0.1, 0.1).p_p1.shape == (0,)


# ------------------------------------------------------------ near-sonic streams


@pytest.mark.parametrize("excess", [1e-5, 1e-10])
def test_near_sonic_stream_through_the_region_graph(excess):
    # a wedge of half θmax in a stream just above Mach 1, its shock an unknown of the graph;
    # strength p2/p1 - 1 against the mpmath reference (NACA Report 1135, eqs. 93, 138)
    M = 1.0 + excess
    theta, strength = near_sonic_wedge(M, 0.5)
    s = _wedge(M, theta).solve()
    p = s.region("2").p_ratio
    assert s.ok and p != 1.0
    # p2/p1 is stored as a ratio: its strength is good to a few ulp of 1, plus the
    # conditioning of the shock solve (a few ulp of the strength)
    assert abs((p - 1.0) - strength) <= 8 * np.finfo(float).eps + 1e-12 * strength
    assert s.wave("wedge shock").turn == pytest.approx(theta, rel=1e-14)


# ------------------------------------------------------------ the bad-input table

BAD_INPUTS = [
    # (label, call, error class, text the message must contain)
    ("pattern inflow subsonic", lambda: _duct(0.5).solve(), InvalidInputError,
     "inflow Mach number"),
    ("pattern gamma", lambda: _duct(2.0, gamma=1.0).solve(), InvalidInputError, "gamma"),
    ("pattern FlowState + gamma", lambda: WavePattern(FlowState(2.0, 1e5, 300.0), gamma=1.3),
     InvalidInputError, "gamma"),
    ("pattern wave family", lambda: WavePattern(2.0).add_wave(
        "a", upstream="1", downstream="2", family="up"), InvalidInputError, "family"),
    ("pattern wave branch", lambda: WavePattern(2.0).add_wave(
        "a", upstream="1", downstream="2", family="left", branch="medium"),
     InvalidInputError, "branch"),
    ("pattern wave pressure", lambda: WavePattern(2.0).add_wave(
        "a", upstream="1", downstream="2", family="left", pressure=-1.0).solve(),
     InvalidInputError, "pressure"),
    ("pattern wave turn inf", lambda: _wall_pattern(turn=np.inf).solve(), InvalidInputError,
     "turn"),
    ("pattern wall direction inf", lambda: _wall_pattern(wall=np.inf).solve(),
     InvalidInputError, "direction"),
    ("pattern free boundary", lambda: _wall_pattern(pressure=-1.0).solve(),
     InvalidInputError, "pressure"),
    ("pattern region name", lambda: WavePattern(2.0, name=1.5), InvalidInputError, "name"),
    ("pattern through", lambda: WavePattern(2.0).add_wall("2", 0.0, through=0.5),
     InvalidInputError, "through"),
    ("pattern errors", lambda: _duct(2.0).solve(errors="ignore"), InvalidInputError,
     "errors"),
    ("pattern detached turn", lambda: _wall_pattern(turn=0.5).solve(), DetachedShockError,
     "turn"),
    ("pattern two waves into one region", lambda: WavePattern(2.0).add_wave(
        "a", upstream="1", downstream="2", family="left", turn=0.1).add_wave(
        "b", upstream="1", downstream="2", family="right", turn=-0.1).check(),
     IllPosedProblemError, "region '2'"),
    ("solution unknown region", lambda: _duct(2.0).solve().region("9"), InvalidInputError,
     "no region named '9'"),
    ("wall_reflection M1", lambda: wall_reflection(0.8, 0.1), InvalidInputError, "M1"),
    ("wall_reflection deflection", lambda: wall_reflection(2.0, -0.1), InvalidInputError,
     "deflection"),
    ("wall_reflection detached", lambda: wall_reflection(2.0, 0.5), DetachedShockError,
     "deflection"),
    ("wall_reflection gamma", lambda: wall_reflection(2.0, 0.1, gamma=0.5),
     InvalidInputError, "gamma"),
    ("reflection_transition M1", lambda: reflection_transition(0.5), InvalidInputError, "M1"),
    ("shock_crossing deflection_lower", lambda: shock_crossing(2.0, 0.1, 0.6),
     DetachedShockError, "deflection_lower"),
    ("merging_shocks deflection_first", lambda: merging_shocks(2.0, -0.1, 0.1),
     InvalidInputError, "deflection_first"),
    ("free_boundary_reflection M1", lambda: free_boundary_reflection(np.inf, 0.1),
     InvalidInputError, "M1"),
    ("turn_to_pressure p2_p1", lambda: turn_to_pressure(2.0, 0.0), InvalidInputError,
     "p2_p1"),
    ("turn_to_pressure unreachable", lambda: turn_to_pressure(2.0, 5.0), NoSolutionError,
     "p2_p1"),
    ("polar n None", lambda: pressure_deflection_polar(2.0, n=None), InvalidInputError,
     "n must be"),
    ("polar n float", lambda: pressure_deflection_polar(2.0, n=10.5), InvalidInputError,
     "n must be"),
    ("polar n bool", lambda: pressure_deflection_polar(2.0, n=True), InvalidInputError,
     "n must be"),
    ("polar min_pressure_ratio text", lambda: pressure_deflection_polar(
        2.0, min_pressure_ratio="0.1"), InvalidInputError, "min_pressure_ratio"),
    ("polar min_pressure_ratio range", lambda: pressure_deflection_polar(
        2.0, min_pressure_ratio=1.5), InvalidInputError, "min_pressure_ratio"),
    ("polar subsonic", lambda: pressure_deflection_polar(0.9), InvalidInputError, "M"),
    # not numbers: refused at the boundary, naming the argument and the type received
    ("pattern inflow text", lambda: WavePattern("2.5"), InvalidInputError, "inflow"),
    ("pattern gamma bool", lambda: WavePattern(2.0, gamma=True), InvalidInputError, "gamma"),
    ("pattern turn complex", lambda: WavePattern(2.0).add_wave(
        "a", upstream="1", downstream="2", family="left", turn=0.1j), InvalidInputError,
     "turn (of wave 'a')"),
    ("pattern wall text", lambda: WavePattern(2.0).add_wall("2", "0.1"), InvalidInputError,
     "direction"),
    ("pattern guess text", lambda: WavePattern(2.0).add_wave(
        "a", upstream="1", downstream="2", family="left", guess="0.1"), InvalidInputError,
     "guess"),
    ("pattern pressure unit", lambda: WavePattern(2.0).add_free_boundary(
        "2", 50 * ureg.kPa), InvalidInputError, "pressure"),
    ("wall_reflection M1 text", lambda: wall_reflection("2.5", 0.1), InvalidInputError, "M1"),
    ("wall_reflection M1 bool", lambda: wall_reflection(True, 0.1), InvalidInputError, "M1"),
    ("shock_crossing complex", lambda: shock_crossing(2.0, 0.1j, 0.1), InvalidInputError,
     "deflection_upper"),
    ("turn_to_pressure text", lambda: turn_to_pressure(2.0, "1.5"), InvalidInputError,
     "p2_p1"),
    ("reflection_transition unit", lambda: reflection_transition(2.0 * ureg.m),
     InvalidInputError, "M1"),
]


@pytest.mark.parametrize("label, call, error, text", BAD_INPUTS,
                         ids=[row[0] for row in BAD_INPUTS])
def test_bad_input_table(label, call, error, text):
    with pytest.raises(error) as info:
        call()
    assert isinstance(info.value, ValueError)  # every gasdyn2d error is a ValueError
    assert text in str(info.value)


SWEEPS = [
    # (label, sweep with one bad element in the middle, start of the reason)
    ("wall_reflection M1", lambda e: wall_reflection([2.5, 0.8, 3.0], 0.1, errors=e),
     "M1 = 0.8 is not supersonic"),
    ("wall_reflection detached", lambda e: wall_reflection(2.0, [0.1, 0.5, 0.2], errors=e),
     "the incident shock detached: deflection = 28.6479°"),
    ("shock_crossing", lambda e: shock_crossing(2.5, [0.1, -0.1, 0.1], 0.1, errors=e),
     "deflection_upper = -5.72958° is negative"),
    ("merging_shocks", lambda e: merging_shocks(2.5, 0.05, [0.05, 0.7, 0.05], errors=e),
     "the second shock detached"),
    ("free_boundary_reflection", lambda e: free_boundary_reflection(
        2.5, 0.1, gamma=[1.4, 1.0, 1.3], errors=e), "gamma = 1 is not a finite ratio"),
    ("turn_to_pressure", lambda e: turn_to_pressure(2.0, [1.5, 9.0, 0.5], errors=e),
     "the wave cannot reach p2_p1 = 9"),
    ("pattern inflow", lambda e: _duct(np.array([2.5, 0.5, 3.0])).solve(errors=e),
     "inflow Mach number = 0.5 is not"),
    ("pattern free boundary", lambda e: _wall_pattern(
        pressure=np.array([0.5, -1.0, 0.6])).solve(errors=e),
     "pressure (of the free boundary on '3') = -1"),
    ("pattern detached", lambda e: _wall_pattern(turn=np.array([0.1, 0.5, 0.15])).solve(
        errors=e), "wave 'a' detached: its turn 0.5 rad"),
]


@pytest.mark.parametrize("label, sweep, reason", SWEEPS, ids=[row[0] for row in SWEEPS])
def test_bad_element_of_a_sweep_is_nan_with_its_reason(label, sweep, reason):
    with pytest.raises(ValueError):
        sweep("raise")
    result = sweep("nan")
    assert result.failure[1].startswith(reason), result.failure[1]
    assert result.failure[0] == "" and result.failure[2] == ""
    if hasattr(result, "region_names"):
        fields = [result.region(n).M for n in result.region_names[1:]]
    else:
        fields = [v for v in vars(result).values()
                  if isinstance(v, np.ndarray) and v.dtype.kind == "f"]
    assert all(np.isnan(field[1]) for field in fields)
    # the good cases are solved (fields such as M4 are NaN by design in a regular case)
    assert any(np.all(np.isfinite(field[[0, 2]])) for field in fields)


def test_regular_reflection_unaffected_by_the_checks():
    # a plain case still agrees with the mpmath reference (guards the refactoring)
    r = wall_reflection(2.8, np.radians(10.0))
    np.testing.assert_allclose([r.M2, r.M3, r.p3_p1, r.reflected_angle_to_wall],
                               regular_reflection(2.8, np.radians(10.0)), rtol=1e-12)
