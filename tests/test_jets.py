"""Tests of the planar under-expanded slot jet (method of characteristics).

Sources:
- Linear theory of the shock-cell length of a planar jet, L = 2h√(Mj² - 1) with h the
  full jet width (Prandtl, Phys. Z. 5, 1904; Pack, Q. J. Mech. Appl. Math. 3, 1950; as
  in /work/shared/SOURCES.md). Linear theory neglects terms of first order in the
  excess pressure ratio ε = pe/pa - 1, so the net may depart from it by O(ε).
- Facts of the trade (Riemann invariants): the boundary has ambient pressure, ν = ν(Mj);
  once the lip fan has crossed its mirror image (reflected from the centreline) the
  centreline has θ = 0 and ν = ν(Me) + 2(ν(Mj) - ν(Me)).
- mpmath reference for ν(M), the isentropic p/p0 and their inverses (NACA Report 1135,
  eqs. 44 and 171).
"""

import functools
import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d import ureg
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.characteristics.jets import linear_cell_length, underexpanded_slot_jet

# The checks here are written in slot half-heights: these jets take b = 1 m (the default,
# 0.01 m, is a laboratory size; its scaling is checked on its own).
underexpanded_slot_jet = functools.partial(underexpanded_slot_jet, slot_half_height=1.0)


def mp_nu(M, g=1.4):
    """ν(M) at 40 digits (NACA Report 1135, eq. 171)."""
    with mp.workdps(40):
        M, g = mp.mpf(M), mp.mpf(g)
        k = mp.sqrt((g + 1) / (g - 1))
        return k * mp.atan(mp.sqrt(M * M - 1) / k) - mp.atan(mp.sqrt(M * M - 1))


def mp_jet_mach(M_exit, ratio, g=1.4):
    """Fully expanded Mach number: p0/pa = (1 + (γ-1)Me²/2)^(γ/(γ-1)) · pe/pa (eq. 44)."""
    with mp.workdps(40):
        M, g, r = mp.mpf(M_exit), mp.mpf(g), mp.mpf(ratio)
        stag = (1 + (g - 1) / 2 * M * M) * r ** ((g - 1) / g)
        return float(mp.sqrt(2 * (stag - 1) / (g - 1)))


def test_linear_cell_length_formula():
    # Prandtl (1904) / Pack (1950): L = 2h√(M² - 1); h = 1, M = 2 gives 2√3
    assert float(linear_cell_length(2.0, 1.0)) == pytest.approx(2 * math.sqrt(3), rel=1e-15)
    assert linear_cell_length(np.array([1.5, 3.0]), 0.5) == pytest.approx(
        [math.sqrt(1.25), math.sqrt(8.0)], rel=1e-15)


@pytest.mark.parametrize("M_exit", [1.6, 2.0, 3.0])
def test_weak_jet_cell_length_against_linear_theory(M_exit):
    # Linear theory (Prandtl 1904 / Pack 1950). Tolerance: the departure is O(ε); we
    # require it below ε and to halve when ε halves (first order in ε), with the net
    # fine enough (n = 80) that discretisation is ~10x smaller than the smallest ε effect.
    departures = []
    for eps in (0.04, 0.02, 0.01):
        jet = underexpanded_slot_jet(M_exit, 1 + eps, n_characteristics=80)
        linear = float(linear_cell_length(mp_jet_mach(M_exit, 1 + eps), 2.0))  # h = 2b
        assert float(jet.cell_length_linear) == pytest.approx(linear, rel=1e-12)
        departure = float(jet.cell_length) / linear - 1
        assert 0 < departure < eps
        departures.append(departure)
    ratios = [a / b for a, b in zip(departures, departures[1:])]
    assert all(1.85 < r < 2.15 for r in ratios), ratios


def test_cell_length_refinement_is_first_order_in_the_fan_lines():
    # Refinement study (self-convergence): successive differences halve as n doubles,
    # the first-order error of representing the lip fan by n discrete lines.
    lengths = [float(underexpanded_slot_jet(2.0, 1.05, n_characteristics=n).cell_length)
               for n in (25, 50, 100, 200)]
    steps = np.diff(lengths)
    ratios = steps[:-1] / steps[1:]
    assert np.all((ratios > 1.8) & (ratios < 2.2)), ratios
    # Richardson estimate of the n → ∞ limit within 2e-4 relative of n = 200
    limit = lengths[-1] + steps[-1]
    assert abs(lengths[-1] / limit - 1) < 2e-4


def test_boundary_is_at_ambient_pressure_and_lip_turn():
    M_exit, ratio = 2.0, 1.5
    jet = underexpanded_slot_jet(M_exit, ratio, n_characteristics=40)
    M_jet = mp_jet_mach(M_exit, ratio)
    assert jet.mach_jet == pytest.approx(M_jet, rel=1e-12)
    assert jet.lip_turn == pytest.approx(float(mp_nu(M_jet) - mp_nu(M_exit)), rel=1e-12)
    net = jet.net
    on_boundary = jet.boundary_nodes
    assert np.array_equal(net.x[on_boundary], jet.boundary_x)
    assert np.array_equal(net.y[on_boundary], jet.boundary_y)
    assert net.mach[on_boundary] == pytest.approx(M_jet, rel=1e-12)
    assert jet.boundary_theta[0] == pytest.approx(jet.lip_turn, rel=1e-15)
    assert jet.boundary_y[0] == 1.0 and jet.boundary_x[0] == 0.0


def test_centreline_state_after_the_lip_fans_have_crossed():
    # Invariants: centreline nodes beyond the last reflected fan line have θ = 0 and
    # ν = ν(Me) + 2Δ, Δ = ν(Mj) - ν(Me) (two fans of turn Δ fully crossed)
    M_exit, ratio = 1.8, 1.3
    jet = underexpanded_slot_jet(M_exit, ratio, n_characteristics=30)
    net = jet.net
    delta = float(mp_nu(mp_jet_mach(M_exit, ratio)) - mp_nu(M_exit))
    axis = net.y == 0.0
    peak = np.max(net.mach[axis])
    nu_expected = float(mp_nu(M_exit)) + 2 * delta
    with mp.workdps(40):
        s = mp.findroot(lambda s: mp_nu(mp.sqrt(1 + mp.exp(2 * s))) - nu_expected, 0.5)
        M_expected = float(mp.sqrt(1 + mp.exp(2 * s)))
    assert peak == pytest.approx(M_expected, rel=1e-12)
    assert np.all(np.abs(net.theta[axis]) < 1e-15)


def test_first_shock_forms_at_a_fixed_fraction_of_the_cell():
    # Weak jets: the compressions reflected from the boundary are spread over a length ∝ ε
    # and converge at a rate ∝ ε, so they cross at a fraction of the cell independent of ε
    # (scaling argument; measured 0.755-0.775 of the linear cell length). The fold
    # converges with n (first order).
    fractions = []
    for eps in (0.05, 0.025):
        jet = underexpanded_slot_jet(2.0, 1 + eps, n_characteristics=60)
        assert jet.shock_formed
        fractions.append(float(jet.shock_x / jet.cell_length_linear))
    assert fractions[0] == pytest.approx(fractions[1], rel=0.02)
    assert 0.6 < fractions[0] < 0.95
    positions = [underexpanded_slot_jet(2.0, 1.05, n_characteristics=n).shock_x
                 for n in (25, 50, 100)]
    assert abs(positions[2] - positions[1]) < abs(positions[1] - positions[0])


def test_strongly_underexpanded_jet_runs_and_stops_at_the_shock():
    jet = underexpanded_slot_jet(1.5, 4.0, n_characteristics=40)
    assert jet.shock_formed
    assert np.all(np.isfinite(jet.net.mach))
    assert jet.net.x.max() < 2 * float(jet.cell_length_linear)
    # the net stops at the fold: nothing is marched far beyond it
    assert jet.boundary_x.max() > jet.shock_x * 0.5


def test_net_connectivity_carries_the_invariants():
    jet = underexpanded_slot_jet(2.2, 1.8, n_characteristics=20)
    net = jet.net
    from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle

    nu = prandtl_meyer_angle(net.mach)
    families = ((net.plus_segments, net.theta - nu), (net.minus_segments, net.theta + nu))
    for seg, invariant in families:
        assert seg.shape[0] > 100
        assert np.allclose(invariant[seg[:, 0]], invariant[seg[:, 1]], rtol=0, atol=1e-12)
        assert np.all(net.x[seg[:, 1]] >= net.x[seg[:, 0]])


def test_quantity_half_height_and_scaling():
    plain = underexpanded_slot_jet(1.6, 1.1, n_characteristics=20)
    scaled = underexpanded_slot_jet(1.6, 1.1, n_characteristics=20, slot_half_height=3 * ureg.mm)
    assert str(scaled.cell_length.units) == "millimeter"
    assert scaled.cell_length.magnitude == pytest.approx(3 * plain.cell_length, rel=1e-14)
    assert scaled.boundary_y.magnitude == pytest.approx(3 * plain.boundary_y, rel=1e-14)
    assert "SlotJet" in repr(scaled)


@pytest.mark.parametrize("args, kwargs, name", [
    ((2.0, 1.0), {}, "p_exit_p_ambient"),
    ((2.0, 0.7), {}, "p_exit_p_ambient"),
    ((0.8, 1.5), {}, "M_exit"),
    (([2.0, 3.0], 1.5), {}, "M_exit must be a single value"),
    ((2.0, 1.5), dict(slot_half_height=float("nan")), "slot_half_height"),
    ((2.0, 1.5), dict(n_cells=2.0), "n_cells"),
    ((2.0, 1.5), dict(slot_half_height=0.0), "slot_half_height"),
    ((2.0, 1.5), dict(n_characteristics=1), "n_characteristics"),
    ((2.0, 1.5), dict(n_cells=0), "n_cells"),
    ((2.0, 1.5), dict(gamma=1.0), "gamma"),
])
def test_bad_input_errors(args, kwargs, name):
    with pytest.raises(InvalidInputError, match=name):
        underexpanded_slot_jet(*args, **kwargs)


def test_nan_flow_input_gives_a_nan_jet():
    # NaN in gives NaN out for the flow inputs (a sweep survives); sizes are geometry
    for args in ((float("nan"), 1.5), (2.0, float("nan"))):
        jet = underexpanded_slot_jet(*args, n_characteristics=10)
        assert math.isnan(jet.mach_jet) and math.isnan(jet.cell_length)
        assert jet.boundary_x.size == 0 and jet.net.x.size == 0 and not jet.shock_formed


def test_default_slot_is_a_laboratory_size():
    # Issue 14: the default half-height is 0.01 m (a 20 mm slot), and lengths scale with it
    default = underexpanded_slot_jet.func(1.6, 1.1, n_characteristics=20)
    unit = underexpanded_slot_jet(1.6, 1.1, n_characteristics=20)
    assert default.cell_length_linear == pytest.approx(0.01 * unit.cell_length_linear,
                                                       rel=1e-14)
    assert default.boundary_y[0] == pytest.approx(0.01, rel=1e-15)


@settings(max_examples=10, deadline=None)
@given(st.floats(1.05, 4.0), st.floats(1.01, 6.0), st.floats(1.2, 1.67))
def test_jet_properties(M_exit, ratio, gamma):
    # Properties (facts of the trade): ambient pressure on the boundary, invariants on every
    # segment, boundary leaving the lip at the lip turn, nodes within the jet
    jet = underexpanded_slot_jet(M_exit, ratio, n_characteristics=12, gamma=gamma)
    net = jet.net
    from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle
    from gasdyn2d.relations.isentropic import pressure_ratio

    p_ambient_p0 = pressure_ratio(M_exit, gamma) / ratio
    assert net.p_p0[jet.boundary_nodes] == pytest.approx(p_ambient_p0, rel=1e-11)
    nu = prandtl_meyer_angle(net.mach, gamma)
    families = ((net.plus_segments, net.theta - nu), (net.minus_segments, net.theta + nu))
    for seg, invariant in families:
        assert np.allclose(invariant[seg[:, 0]], invariant[seg[:, 1]], rtol=0, atol=1e-11)
    assert np.all(net.y >= 0) and np.all(net.y <= jet.boundary_y.max() + 1e-12)
    assert jet.boundary_theta[0] == pytest.approx(jet.lip_turn, rel=1e-14)


# ---------------------------------------------------------------- round jets
# Sources: linear theory of a round jet (Prandtl 1904; Pack 1950): the Fourier-Bessel
# solution of the linearised potential with p = pa on the boundary r = R. Its shock-cell
# length is π D √(Mj² - 1)/j0,1 = 1.3064 D √(Mj² - 1) (j0,1 = 2.404826, the first zero of
# J0; Abramowitz & Stegun 1964, Table 9.5), and its boundary slope is proportional to
# Σ sin(j0,k ξ)/j0,k, ξ = x/(R√(Mj² - 1)): recomputed below with scipy's Bessel zeros.


def _linear_round_boundary_slope(xi, zeros=20000):
    """Σ sin(j_k ξ)/j_k with Lanczos factors (the series converges like a Fourier series)."""
    from scipy.special import jn_zeros

    j = jn_zeros(0, zeros)
    sigma = np.sinc(np.arange(1, zeros + 1) / (zeros + 1))
    return np.array([np.sum(sigma * np.sin(j * x) / j) for x in np.atleast_1d(xi)])


def test_round_widest_point_constant_from_the_bessel_series():
    from scipy.optimize import brentq

    from gasdyn2d.characteristics.jets import ROUND_JET_WIDEST_POINT

    root = brentq(lambda x: _linear_round_boundary_slope(x)[0], 1.3, 1.6, xtol=1e-12)
    assert root == pytest.approx(ROUND_JET_WIDEST_POINT, abs=2e-8)
    assert float(linear_cell_length(2.0, 2.0, "axisymmetric")) == pytest.approx(
        math.pi * 2.0 * math.sqrt(3.0) / 2.404825557695773, rel=1e-15)


def test_weak_round_jet_against_linear_theory():
    # The boundary angle along the first half-cell, normalised by the lip turn, follows the
    # linear theory's slope 2 Σ sin(j_k ξ)/j_k (to O(ε)); the widest point tends to
    # ξ = 1.43634 at first order in ε (measured 1.4399, 1.4379 at ε = 0.01, 0.005, n = 40).
    jet = underexpanded_slot_jet(2.0, 1.01, n_characteristics=40, geometry="axisymmetric")
    beta = math.sqrt(jet.mach_jet**2 - 1)
    xi = np.array([0.2, 0.5, 1.0, 1.3, 1.6])
    angle = np.interp(xi * beta, jet.boundary_x, jet.boundary_theta) / jet.lip_turn
    linear = 2 * _linear_round_boundary_slope(xi)
    assert np.allclose(angle, linear, atol=0.1), (angle, linear)
    assert np.allclose(angle[:3], linear[:3], atol=0.003)
    departures = []
    for eps in (0.02, 0.01, 0.005):
        weak = underexpanded_slot_jet(2.0, 1 + eps, n_characteristics=40,
                                      geometry="axisymmetric")
        assert weak.max_width_x_linear == pytest.approx(
            1.43634071 * math.sqrt(weak.mach_jet**2 - 1), rel=1e-8)
        departures.append(weak.max_width_x / weak.max_width_x_linear - 1)
    assert all(0 < d < eps for d, eps in zip(departures, (0.02, 0.01, 0.005)))
    ratios = [a / b for a, b in zip(departures, departures[1:])]
    assert all(1.7 < r < 2.3 for r in ratios), ratios  # first order in ε
    assert math.isnan(jet.cell_length)  # not symmetric about the widest point: no cell
    assert jet.cell_length_linear == pytest.approx(
        1.3064 * 2 * beta, rel=1e-4)  # Pack's round cell, D = 2R


def test_round_jet_first_shock_forms_near_the_lip_compressions():
    # A round boundary curves inward at once after the lip, sending compressions to the axis,
    # where they focus: the first fold (the start of the intercepting shock) converges under
    # refinement (measured x = 3.05, 2.85, 2.78, 2.73 for n = 10-80 at Me 2, pe/pa = 1.5),
    # well ahead of a planar jet's (8.2 half-heights here).
    shocks = [underexpanded_slot_jet(2.0, 1.5, n_characteristics=n, geometry="axisymmetric")
              for n in (10, 20, 40)]
    x = [float(s.shock_x) for s in shocks]
    assert all(s.shock_formed for s in shocks)
    assert abs(x[2] - x[1]) < abs(x[1] - x[0])
    assert 2.6 < x[2] < 3.0
    planar = underexpanded_slot_jet(2.0, 1.5, n_characteristics=40)
    assert planar.shock_x > 2 * x[2]


@settings(max_examples=6, deadline=None)
@given(st.floats(1.1, 3.0), st.floats(1.02, 4.0))
def test_round_jet_properties(M_exit, ratio):
    # Ambient pressure on the boundary; boundary leaving the lip at the lip turn; the net's
    # compatibility relations with the source term hold on every segment to O(h²).
    jet = underexpanded_slot_jet(M_exit, ratio, n_characteristics=12, geometry="axisymmetric")
    from gasdyn2d.relations.isentropic import pressure_ratio

    net = jet.net
    assert net.p_p0[jet.boundary_nodes] == pytest.approx(pressure_ratio(M_exit) / ratio,
                                                         rel=1e-11)
    assert jet.boundary_theta[0] == pytest.approx(jet.lip_turn, rel=1e-14)
    assert np.all(np.isfinite(net.mach)) and np.all(net.y >= 0)
    assert jet.geometry == "axisymmetric"
    with pytest.raises(InvalidInputError, match="geometry"):
        underexpanded_slot_jet(M_exit, ratio, geometry="annular")
