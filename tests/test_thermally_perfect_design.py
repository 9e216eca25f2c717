"""Section loads, ramp intakes and merging shocks with a thermally perfect gas.

Each check rebuilds the design tool's numbers from the thermally perfect plain cores and
public relations directly (themselves checked against mpmath in
tests/test_thermally_perfect.py and tests/test_thermally_perfect_calls.py): the panel
pressures of shock-expansion theory wave by wave at the local temperature, the ramp shock
train and its terminal shock stage by stage. All scenarios are invented.
"""

import math

import numpy as np
import pytest

import gasdyn2d as gd
from gasdyn2d import AIR_THERMALLY_PERFECT, FlowState, Gas, InvalidInputError
from gasdyn2d.design.intakes import ramp_intake, ramp_shock_train
from gasdyn2d.design.section_loads import linear_loads, second_order_loads, shock_expansion_loads
from gasdyn2d.design.sections import Section
from gasdyn2d.relations import thermally_perfect_oblique as tpo

HOT = AIR_THERMALLY_PERFECT
FROZEN = Gas(1.4, 287.05, vibrational_temperature=1e9)
RTOL = 1e-12


def rel(a, b):
    return np.max(np.abs(np.asarray(a, dtype=float) / np.asarray(b, dtype=float) - 1.0))


# ================================================================= section loads


def test_flat_plate_panels_are_the_thermally_perfect_shock_and_fan():
    # an invented hypersonic glider's flat control surface: M 8 at 240 K, 5° incidence
    M, T, alpha = 8.0, 240.0, math.radians(5.0)
    loads = shock_expansion_loads(Section.flat_plate(), M, alpha, T=T, gas=HOT)
    q = 0.5 * float(HOT.gamma_at(T)) * M * M  # ρV²/2 in units of p∞
    shock = gd.oblique_shock(M, deflection=alpha, T1=T, gas=HOT)
    fan = gd.expansion_fan(M, deflection=alpha, T1=T, gas=HOT)
    assert rel(loads.cp_lower[0], (shock.p2_p1 - 1.0) / q) < RTOL
    assert rel(loads.cp_upper[0], (fan.p2_p1 - 1.0) / q) < RTOL
    cn = loads.cp_lower[0] - loads.cp_upper[0]
    assert rel(loads.cl, cn * math.cos(alpha)) < RTOL and rel(loads.cd, cn * math.sin(alpha)) < RTOL
    # the wake: both streams turned to one direction reach one pressure
    phi = loads.slip_direction + alpha  # from the chord; both panels leave along it
    upper = tpo.turn_state(fan.M2, T * fan.T2_T1, phi, HOT)
    lower = tpo.turn_state(shock.M2, T * shock.T2_T1, -phi, HOT)
    assert rel(fan.p2_p1 * upper.p2_p1, loads.wake_pressure_ratio) < 1e-9
    assert rel(shock.p2_p1 * lower.p2_p1, loads.wake_pressure_ratio) < 1e-9


def test_runs_of_fans_are_one_wave_at_the_stagnation_temperature():
    # an invented ogive-like fin: a leading-edge shock then three expansion corners
    points = [(0.0, 0.0), (0.25, 0.04), (0.5, 0.055), (0.75, 0.045), (1.0, 0.0)]
    section = Section.from_points(points, [(0.0, 0.0), (1.0, 0.0)])
    M, T = 6.0, 600.0
    loads = shock_expansion_loads(section, M, 0.0, T=T, gas=HOT)
    angles = np.arctan2(np.diff([p[1] for p in points]), np.diff([p[0] for p in points]))
    p, m, t = 1.0, M, T
    q = 0.5 * float(HOT.gamma_at(T)) * M * M
    first = gd.oblique_shock(m, deflection=angles[0], T1=t, gas=HOT)
    p, m, t = first.p2_p1, first.M2, t * first.T2_T1
    assert rel(loads.cp_upper[0], (p - 1.0) / q) < RTOL
    for k in range(1, 4):  # each corner as its own fan, chained: the same as one run
        fan = gd.expansion_fan(m, deflection=angles[k - 1] - angles[k], T1=t, gas=HOT)
        p, m, t = p * fan.p2_p1, fan.M2, t * fan.T2_T1
        assert rel(loads.cp_upper[k], (p - 1.0) / q) < 1e-11, k


def test_loads_take_a_flow_state_and_equal_the_keyword_form():
    section = Section.double_wedge(0.06)
    state = FlowState([6.0, 9.0], 1.5e3, [230.0, 260.0], gas=HOT)
    by_state = shock_expansion_loads(section, state, math.radians(4.0))
    by_keywords = shock_expansion_loads(section, [6.0, 9.0], math.radians(4.0),
                                        T=[230.0, 260.0], gas=HOT)
    for name in ("cl", "cd", "cm_le", "slip_direction"):
        np.testing.assert_array_equal(getattr(by_state, name), getattr(by_keywords, name))
    with pytest.raises(InvalidInputError, match="got a FlowState and T"):
        shock_expansion_loads(section, state, 0.1, T=300.0)


def test_loads_with_frozen_vibration_are_the_perfect_gas_loads():
    section = Section.double_wedge(0.05)
    alpha = np.radians([0.0, 3.0, 6.0])
    hot = shock_expansion_loads(section, 4.0, alpha, T=300.0, gas=FROZEN)
    perfect = shock_expansion_loads(section, 4.0, alpha)
    for name in ("cl", "cd", "cm_le", "cp_upper", "cp_lower", "slip_direction"):
        np.testing.assert_allclose(getattr(hot, name), getattr(perfect, name), rtol=1e-12,
                                   atol=1e-15)
    # and a temperature with the perfect gas changes nothing
    np.testing.assert_array_equal(shock_expansion_loads(section, 4.0, alpha, T=700.0).cl,
                                  perfect.cl)


def test_hot_loads_differ_from_the_frozen_gamma_loads():
    # an invented heated rig at M 6 and 1500 K, 15° incidence: vibration is excited behind
    # the shocks, and lift and drag fall by about 3 % from the frozen γ = 1.4 values (the
    # size of the error the guard against the frozen γ prevents)
    section = Section.double_wedge(0.05)
    hot = shock_expansion_loads(section, 6.0, math.radians(15.0), T=1500.0, gas=HOT)
    frozen = shock_expansion_loads(section, 6.0, math.radians(15.0))
    assert -0.035 < hot.cl / frozen.cl - 1.0 < -0.02
    assert -0.035 < hot.cd / frozen.cd - 1.0 < -0.02


def test_linear_and_second_order_loads_with_a_thermally_perfect_gas():
    section = Section.flat_plate()
    hot = linear_loads(section, 3.0, 0.05, T=1500.0, gas=HOT)
    assert hot.cl == linear_loads(section, 3.0, 0.05).cl  # the linear cp needs no γ
    with pytest.raises(InvalidInputError, match="gas is a thermally perfect Gas.*"
                                                "second_order_loads does not support"):
        second_order_loads(section, 3.0, 0.05, T=1500.0, gas=HOT)


def test_detached_and_missing_temperature_messages():
    with pytest.raises(gd.DetachedShockError, match="thermally perfect gas.*θmax = 0.40275"):
        shock_expansion_loads(Section.flat_plate(), 2.0, math.radians(30.0), T=300.0, gas=HOT)
    loads = shock_expansion_loads(Section.flat_plate(), [2.0, 6.0], math.radians(30.0),
                                  T=300.0, gas=HOT, errors="nan")
    assert loads.detached.tolist() == [True, False] and np.isnan(loads.cl[0])
    with pytest.raises(InvalidInputError, match="shock_expansion_loads needs the free-stream "
                                                "static temperature T="):
        shock_expansion_loads(Section.flat_plate(), 6.0, 0.05, gas=HOT)


# ================================================================= intakes


def test_ramp_train_and_terminal_shock_stage_by_stage():
    # an invented scramjet forebody: two ramps at M 6 and 230 K, on design
    M, T = 6.0, 230.0
    turns = np.radians([7.0, 8.0])
    intake = ramp_intake(FlowState(M, 2e3, T, gas=HOT), turns)
    m, t, recovery = M, T, 1.0
    for k in range(2):
        shock = gd.oblique_shock(m, deflection=turns[k], T1=t, gas=HOT)
        assert rel(intake.wave_angles[k], shock.wave_angle) < RTOL
        assert rel(intake.pressure_ratios[k], shock.p2_p1) < RTOL
        m, t, recovery = shock.M2, t * shock.T2_T1, recovery * shock.p02_p01
    terminal = gd.normal_shock(m, T1=t, gas=HOT)
    assert rel(intake.terminal_mach, terminal.M2) < RTOL
    assert rel(intake.recovery, recovery * terminal.p02_p01) < RTOL
    assert intake.mass_flow_ratio == pytest.approx(1.0, abs=1e-12)  # on design
    train = ramp_shock_train(M, turns, T=T, gas=HOT)
    assert rel(train.temperature_ratio[-1], t / T) < RTOL


def test_off_design_intake_merges_its_shocks_with_the_thermally_perfect_gas():
    # above design the ramp shocks meet below the lip: the merger is solved at the stage
    # temperatures (merging_shocks with T1 and gas)
    turns = np.radians([8.0, 9.0])
    intake = ramp_intake(7.0, turns, T=230.0, gas=HOT, design_mach=6.0)
    assert intake.merges[0]
    merged = gd.merging_shocks(7.0, turns[0], turns[1], T1=230.0, gas=HOT)
    assert rel(intake.merged_mach[0], merged.M_above_slip) < RTOL
    assert rel(intake.merged_wave_angle[0], merged.wave_angle) < RTOL
    below = ramp_intake(5.0, turns, T=230.0, gas=HOT, design_mach=6.0)
    assert 0.0 < below.mass_flow_ratio < 1.0  # spillage below design


def test_merging_shocks_region_by_region():
    M, T = 8.0, 250.0
    d1, d2 = math.radians(6.0), math.radians(7.0)
    merged = gd.merging_shocks(M, d1, d2, T1=T, gas=HOT)
    direct = tpo.oblique_shock_from_deflection(M, T, merged.merged_turn, HOT)
    assert rel(merged.wave_angle, direct.wave_angle) < 1e-12
    assert rel(merged.p_p1, direct.p2_p1) < 1e-12
    frozen = gd.merging_shocks(M, d1, d2, T1=T, gas=FROZEN)
    perfect = gd.merging_shocks(M, d1, d2)
    assert rel(frozen.slip_direction, perfect.slip_direction) < 1e-11
    with pytest.raises(gd.DetachedShockError, match="deflection_second"):
        gd.merging_shocks(2.0, math.radians(15.0), math.radians(15.0), T1=T, gas=HOT)


def test_intake_bad_input():
    turns = np.radians([8.0, 9.0])
    with pytest.raises(InvalidInputError, match="'isentropic' stage does not support a "
                                                "thermally perfect gas"):
        ramp_intake(6.0, turns, T=230.0, gas=HOT, stages=["shock", "isentropic"])
    with pytest.raises(InvalidInputError, match="ramp_intake needs the free-stream static "
                                                "temperature T="):
        ramp_intake(6.0, turns, gas=HOT)
    with pytest.raises(InvalidInputError, match="T must be finite and > 0 K"):
        ramp_intake(6.0, turns, T=-1.0, gas=HOT)
    out = ramp_intake([6.0, 6.0], turns, T=[230.0, np.nan], gas=HOT)
    assert np.isfinite(out.recovery[0]) and np.isnan(out.recovery[1])  # NaN in, NaN out
    perfect = ramp_intake(6.0, turns)
    assert ramp_intake(6.0, turns, T=500.0).recovery == perfect.recovery
    assert rel(ramp_intake(6.0, turns, T=500.0, gas=FROZEN).recovery, perfect.recovery) < 1e-12
