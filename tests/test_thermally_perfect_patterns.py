"""The region graph with a thermally perfect FlowState inflow, against the plain cores.

WavePattern takes the gas from its FlowState inflow; each region then carries its
temperature (the inflow's T times the ratios), every wave is the thermally perfect one
at its own upstream (M, T), and the Newton iteration differences the residuals (the
waves carry no closed-form derivatives in T). The checks rebuild each region wave by
wave with the plain cores of gasdyn2d.relations.thermally_perfect(_oblique), which are
themselves checked against mpmath in tests/test_thermally_perfect.py. All scenarios are
invented.
"""

import math

import numpy as np
import pytest

import gasdyn2d as gd
from gasdyn2d import AIR_THERMALLY_PERFECT, FlowState, WavePattern
from gasdyn2d.relations import thermally_perfect as tp
from gasdyn2d.relations import thermally_perfect_oblique as tpo

HOT = AIR_THERMALLY_PERFECT
RTOL = 1e-11  # the solve converges to rounding; each region is a few relations deep


def rel(a, b):
    return np.max(np.abs(np.asarray(a, dtype=float) / np.asarray(b, dtype=float) - 1.0))


def _duct(inflow, ramp_deg=12.0):
    """An invented hypersonic tunnel duct: a ramp shock reflecting from the flat roof."""
    duct = WavePattern(inflow)
    duct.add_wave("ramp shock", upstream="1", downstream="2", family="left",
                  turn=np.radians(ramp_deg))
    duct.add_wave("reflected", upstream="2", downstream="3", family="right")
    duct.add_wall("3", direction=0.0)
    return duct


def test_reflected_shock_region_by_region_against_the_plain_cores():
    M, T = 6.0, 230.0
    solution = _duct(FlowState(M, 2e3, T, gas=HOT)).solve()
    theta = math.radians(12.0)
    first = tpo.oblique_shock_from_deflection(M, T, theta, HOT)
    M2, T2 = float(first.M2), T * float(first.T2_T1)
    second = tpo.oblique_shock_from_deflection(M2, T2, theta, HOT)  # back to the wall
    r2, r3 = solution.region("2"), solution.region("3")
    assert rel(r2.M, first.M2) < RTOL and rel(r2.p_ratio, first.p2_p1) < RTOL
    assert rel(r3.M, second.M2) < RTOL and rel(r3.T_ratio, T2 / T * second.T2_T1) < RTOL
    assert rel(r3.p_ratio, first.p2_p1 * second.p2_p1) < RTOL
    assert rel(r3.p0_ratio, first.p02_p01 * second.p02_p01) < RTOL
    assert solution.wave("reflected").turn == pytest.approx(-theta, rel=1e-13)
    # a perfect gas at the frozen γ is a different answer (the silent wrong number)
    frozen = _duct(FlowState(M, 2e3, T)).solve()
    assert abs(frozen.region("3").T_ratio / r3.T_ratio - 1.0) > 1e-3


def test_every_region_keeps_the_stagnation_temperature():
    state = FlowState(7.0, 1.5e3, 260.0, gas=HOT)
    solution = _duct(state, 14.0).solve()
    for name in ("2", "3"):
        assert rel(solution.state(name).T0, state.T0) < 1e-12
        assert solution.state(name).gas is HOT
    assert solution.gamma == pytest.approx(float(HOT.gamma_at(260.0)), rel=1e-15)


def test_a_batch_solves_like_single_cases():
    M = np.array([4.0, 6.0, 9.0])
    T = np.array([220.0, 600.0, 1500.0])
    batch = _duct(FlowState(M, 2e3, T, gas=HOT)).solve()
    for i in range(3):
        one = _duct(FlowState(float(M[i]), 2e3, float(T[i]), gas=HOT)).solve()
        assert rel(batch.region("3").p_ratio[i], one.region("3").p_ratio) < 1e-13
        assert rel(batch.wave("reflected").turn[i], one.wave("reflected").turn) < 1e-13


def test_fans_pressures_and_isentropic_compressions_against_the_plain_cores():
    # an invented hot jet: its lip wave brings the stream to 30 kPa, an isentropic
    # compression and a fan of given turns follow
    M, T, p = 2.5, 900.0, 50e3
    jet = WavePattern(FlowState(M, p, T, gas=HOT))
    jet.add_wave("lip", upstream="1", downstream="2", family="left", pressure=30e3)
    jet.add_wave("ramp", upstream="2", downstream="3", family="left", turn=np.radians(6.0),
                 compression="isentropic")
    jet.add_wave("corner", upstream="3", downstream="4", family="left", turn=np.radians(-9.0))
    solution = jet.solve()
    lip = tp.fan_from_pressure_ratio(M, T, 30e3 / p, HOT)
    assert rel(-solution.wave("lip").turn, lip.turn) < RTOL
    assert rel(solution.region("2").M, lip.M2) < RTOL
    T2 = T * float(lip.T2_T1)
    ramp = tp.isentropic_compression_from_turn(float(lip.M2), T2, -math.radians(6.0), HOT)
    assert rel(solution.region("3").M, ramp.M2) < RTOL
    assert rel(solution.region("3").p_ratio, 30e3 / p * ramp.p2_p1) < RTOL
    assert solution.wave("ramp").kind == "compression"
    corner = tp.fan_from_turn(float(ramp.M2), T2 * float(ramp.T2_T1), math.radians(9.0), HOT)
    assert rel(solution.region("4").M, corner.M2) < RTOL
    assert solution.region("4").p0_ratio == pytest.approx(1.0, abs=1e-13)  # all isentropic


def test_crossing_shocks_meet_on_a_slip_line():
    # an invented intake throat: two shocks of opposite families cross; the waves leaving
    # the crossing are found so that both sides of the slip line share p and direction
    inflow = FlowState(8.0, 1e3, 240.0, gas=HOT)
    cross = WavePattern(inflow)
    cross.add_wave("upper", upstream="1", downstream="2", family="right", turn=np.radians(-8.0))
    cross.add_wave("lower", upstream="1", downstream="3", family="left", turn=np.radians(5.0))
    cross.add_wave("upper out", upstream="2", downstream="4", family="left")
    cross.add_wave("lower out", upstream="3", downstream="5", family="right")
    cross.add_slip_line("4", "5")
    solution = cross.solve()
    r4, r5 = solution.region("4"), solution.region("5")
    assert rel(r4.p_ratio, r5.p_ratio) < 1e-12
    assert r4.direction == pytest.approx(r5.direction, abs=1e-13)
    s2 = solution.state("2")
    again = tpo.turn_state(s2.M, s2.T, solution.wave("upper out").turn, HOT)
    assert rel(r4.M, again.M2) < RTOL and rel(r4.p_ratio / s2.p * 1e3, again.p2_p1) < RTOL


def test_failures_name_the_thermally_perfect_limit():
    state = FlowState(3.0, 2e3, 1200.0, gas=HOT)
    theta_max = gd.max_deflection(3.0, T1=1200.0, gas=HOT)[0]
    with pytest.raises(gd.DetachedShockError, match=f"θmax = {theta_max:.10g} rad"):
        _duct(state, 40.0).solve()
    batch = _duct(FlowState([1.5, 6.0], 2e3, 1200.0, gas=HOT), 25.0).solve(errors="nan")
    assert not batch.ok[0] and "detached" in batch.failure[0]
    assert batch.ok[1]


def test_polars_of_a_thermally_perfect_stream():
    from gasdyn2d.patterns.polars import pressure_deflection_polar

    state = FlowState(6.0, 2e3, 230.0, gas=HOT)
    polar = pressure_deflection_polar(state, n=41)
    theta_max = gd.max_deflection(6.0, T1=230.0, gas=HOT)[0]
    assert rel(polar.max_deflection, theta_max) < 1e-14
    assert rel(np.max(polar.shock_pressure_ratio), gd.normal_shock(6.0, T1=230.0, gas=HOT).p2_p1) < 1e-12
    fan = gd.expansion_fan(6.0, p2_p1=polar.expansion_pressure_ratio[-1], T1=230.0, gas=HOT)
    assert rel(polar.expansion_direction_right[-1], fan.deflection) < 1e-11


# ================================================================= figures (Agg)


def test_gas_model_comparison_figure():
    matplotlib = pytest.importorskip("matplotlib")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from gasdyn2d.plot import draw_gas_model_comparison

    machs = np.linspace(1.2, 12.0, 25)
    drawn = draw_gas_model_comparison(gd.ureg.Quantity(-23.15, "degC"), machs=machs,
                                      quantities=("T2_T1", "rho2_rho1", "p2_p1"), linewidth=1.1)
    assert drawn.function == "draw_gas_model_comparison" and len(drawn.axes) == 2
    assert len(drawn.lines) == 12 and drawn.legend is not None
    hot = drawn.lines["normal", "T2_T1", "thermally perfect"]
    np.testing.assert_allclose(hot.get_ydata(), gd.normal_shock(machs, T1=250.0,
                                                                gas=HOT).T2_T1, rtol=1e-15)
    assert hot.get_linewidth() == 1.1
    perfect = drawn.lines["normal", "T2_T1", "perfect"].get_ydata()
    assert np.all(hot.get_ydata()[machs > 4.0] < perfect[machs > 4.0])
    oblique = drawn.lines["oblique", "p2_p1", "perfect"].get_ydata()
    assert np.isnan(oblique[0]) and np.isfinite(oblique[-1])  # detached at M 1.2, 10°
    assert "T1 = 250 K" in drawn.axes[0].get_title()
    drawn.figure.canvas.draw()  # renders
    plt.close(drawn.figure)
    with pytest.raises(gd.InvalidInputError, match="gas must be a thermally perfect Gas"):
        draw_gas_model_comparison(250.0, gas=gd.AIR)
    with pytest.raises(gd.InvalidInputError, match="quantities must be one or more of"):
        draw_gas_model_comparison(250.0, quantities=("entropy",))


def test_pattern_polars_of_a_thermally_perfect_solution_draw():
    matplotlib = pytest.importorskip("matplotlib")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from gasdyn2d.plot import draw_pattern_polars

    solution = _duct(FlowState(6.0, 2e3, 230.0, gas=HOT)).solve()
    drawn = draw_pattern_polars(solution, ["1", "2"], marks=["2", "3"])
    assert len(drawn.shock_polars) == 2
    drawn.figure.canvas.draw()
    plt.close(drawn.figure)
    with pytest.raises(gd.InvalidInputError, match="gamma must be left out"):
        draw_pattern_polars(solution, ["1"], gamma=1.4)
