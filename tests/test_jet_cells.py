"""Tests of the shock cells of slot and round jets, marched with fitted shocks.

Sources:
- Linear theory of the shock-cell length of a planar jet, L = 2h√(Mj² - 1) with h the
  full jet width, and its cells all alike (Prandtl, Phys. Z. 5, 1904; Pack, Q. J. Mech.
  Appl. Math. 3, 1950; as in /work/shared/SOURCES.md). It neglects terms of first order
  in ε = pe/pa - 1, so the computed cells may depart from it by O(ε).
- mpmath references (tests/reference.py) for ν(M) and the isentropic p/p0 (NACA Report
  1135, eqs. 44 and 171) and for the normal-shock pressure ratio (eq. 128).
- The region graph's regular reflection (gasdyn2d.patterns.reflections.wall_reflection,
  itself checked against NACA Report 1135) for the lip shock's reflection from the
  centreline, and its detachment angle (NACA Report 1135, eq. 168) for the Mach disc.
"""

import functools
import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

import reference as ref

from gasdyn2d import ureg
from gasdyn2d.characteristics.jet_cells import slot_jet_cells
from gasdyn2d.characteristics.jets import underexpanded_slot_jet
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.patterns.reflections import wall_reflection
from gasdyn2d.relations.oblique_shocks import max_deflection, oblique_shock

slot_jet_cells = functools.partial(slot_jet_cells, slot_half_height=1.0)


def jet_mach(M_exit, ratio, g=1.4):
    """Fully expanded Mach number, p0/pa = (p0/pe)(pe/pa) (mpmath reference,
    tests/reference.py; NACA Report 1135, eq. 44)."""
    return ref.M_from_p_p0(ref.p_p0(M_exit, g) / ratio, g)


@pytest.mark.parametrize("eps", [0.005, 0.01, 0.02, 0.05])
def test_weak_jet_cells_against_linear_theory(eps):
    # Prandtl (1904), Pack (1950): L = 2h√(Mj² - 1); computed, not extrapolated, cells
    # depart from it at first order in ε (measured 0.51ε to 0.54ε at Me = 2, n = 81; 0.65ε
    # at ε = 0.005, where the departure is about one marching step)
    jet = slot_jet_cells(2.0, 1.0 + eps, n_points=81, n_cells=2)
    assert jet.stop_reason == "cells"
    linear = float(jet.cell_length_linear)
    assert linear == pytest.approx(4.0 * math.sqrt(jet_mach(2.0, 1 + eps) ** 2 - 1),
                                   rel=1e-12)
    first, second = (float(c) for c in jet.cell_lengths)
    assert 0.3 * eps < first / linear - 1.0 < 0.7 * eps
    # linear theory's cells are all alike; the second computed cell is the first's to 0.3 %
    assert second == pytest.approx(first, rel=3e-3)


def test_weak_jet_departure_from_linear_theory_is_first_order():
    # Prandtl (1904), Pack (1950): the departure falls in proportion to ε
    departures = [float(slot_jet_cells(2.0, 1.0 + eps, n_points=81).cell_lengths[0])
                  / float(slot_jet_cells(2.0, 1.0 + eps, n_points=81).cell_length_linear) - 1.0
                  for eps in (0.02, 0.04)]
    assert departures[1] / departures[0] == pytest.approx(2.0, rel=0.2)


def test_first_cell_agrees_with_characteristic_net_widest_point():
    # the characteristic net (second order, independent of the march) puts the widest point
    # at half the cell in planar linear theory; the march's widest point and cell agree
    net = underexpanded_slot_jet(2.0, 1.05, n_characteristics=120, slot_half_height=1.0)
    jet = slot_jet_cells(2.0, 1.05, n_points=81)
    assert float(jet.widest_x[0]) == pytest.approx(float(net.max_width_x), rel=2e-3)
    assert float(jet.cell_lengths[0]) == pytest.approx(2.0 * float(net.max_width_x), rel=2e-3)


@pytest.mark.parametrize("ratio, strongest", [(1.5, 1.3), (3.0, 2.2)])
def test_first_shock_starts_where_the_characteristic_net_folds(ratio, strongest):
    # the characteristic net of underexpanded_slot_jet (second order, its fold converged to
    # 1e-3 of a half-height under refinement) says where the compression reflected from the
    # boundary first folds; the march starts a shock there, which gathers the compression
    # (measured p2/p1 up to 1.352 and 2.338 at n = 81, 1.362 and 2.335 at n = 161)
    net = underexpanded_slot_jet(2.0, ratio, n_characteristics=80, slot_half_height=1.0)
    jet = slot_jet_cells(2.0, ratio, n_points=81)
    assert float(jet.shock_forms_x) == float(net.shock_x)
    first = jet.shocks[0]
    assert abs(float(first.x[0]) - float(net.shock_x)) < 0.05  # the next station
    assert float(np.max(first.p2_p1)) > strongest
    assert jet.stop_reason == "cells"


def test_lip_fan_start_is_the_exact_simple_wave():
    # Prandtl–Meyer (NACA Report 1135, eq. 171): the boundary leaves the lip turned by
    # ν(Mj) - ν(Me); where the lip fan has crossed its mirror image the centreline has
    # ν = ν(Me) + 2(ν(Mj) - ν(Me)) (Riemann invariants, a fact of the trade)
    M, ratio = 2.0, 1.3
    jet = slot_jet_cells(M, ratio, n_points=161, n_cells=1)
    turn = ref.nu(jet_mach(M, ratio), 1.4) - ref.nu(M, 1.4)
    assert float(jet.lip_turn) == pytest.approx(turn, rel=1e-12)
    assert float(jet.boundary_theta[0]) == pytest.approx(turn, rel=1e-12)
    p_expected = ref.p_p0(ref.M_from_nu(ref.nu(M, 1.4) + 2.0 * turn, 1.4), 1.4)
    assert float(np.min(jet.centreline_p_p0)) == pytest.approx(p_expected, rel=5e-3)


def test_overexpanded_lip_shock_and_its_reflection():
    # normal-shock pressure ratio, NACA Report 1135, eq. 128: the lip shock brings the exit
    # flow to ambient pressure; its reflection from the centreline is the region graph's
    # regular reflection (wall_reflection), as the flow between is uniform
    M, ratio = 2.0, 0.8
    jet = slot_jet_cells(M, ratio, n_points=41, n_cells=2)
    assert jet.stop_reason == "cells"
    lip, reflected = jet.shocks[0], jet.shocks[1]
    assert (lip.family, lip.end, reflected.family, reflected.end) == (-1, "wall", 1,
                                                                     "free boundary")
    with mp.workdps(30):
        mn = mp.sqrt(1 + (1 / mp.mpf(ratio) - 1) * mp.mpf(2.4) / mp.mpf(2.8))
        beta = float(mp.asin(mn / M))
    assert float(lip.p2_p1[0]) == pytest.approx(1 / ratio, rel=1e-12)
    assert float(lip.wave_angle[0]) == pytest.approx(beta, rel=1e-12)
    deflection = float(oblique_shock(M, wave_angle=beta).deflection)
    assert float(-jet.lip_turn) == pytest.approx(deflection, rel=1e-12)
    exact = wall_reflection(M, deflection)
    assert str(exact.kind) == "regular"
    assert float(reflected.p2_p1[0]) * float(lip.p2_p1[0]) == pytest.approx(
        float(exact.p3_p1), rel=1e-9)
    first, second = (float(c) for c in jet.cell_lengths)
    assert second == pytest.approx(first, rel=3e-3)  # alike cells, as in linear theory


@pytest.mark.parametrize("ratio", [0.5, 0.3])
def test_mach_disc_stops_the_march(ratio):
    # detachment (NACA Report 1135, eq. 168): where the flow behind the lip shock cannot be
    # turned back parallel to the centreline by an attached shock, only a Mach reflection
    # (a Mach disc) exists; the march stops there with that reason
    M = 2.0
    jet = slot_jet_cells(M, ratio, n_points=21)
    deflection = -float(jet.lip_turn)
    behind = float(oblique_shock(M, deflection=deflection).M2)
    assert deflection > float(max_deflection(behind)[0])
    assert jet.stop_reason == "mach_disc"
    assert float(jet.stop_y) == 0.0 and float(jet.stop_x) > 0.0
    assert jet.cell_lengths.size == 0


def test_lip_shock_beyond_detachment_stops_at_the_lip():
    # NACA Report 1135, eq. 128: pa/pe = 4 at Mach 2 needs Mn1 = 1.89, a wave angle of 70.9°,
    # beyond the sonic point of the shock polar (eq. 168's neighbour): subsonic behind it
    jet = slot_jet_cells(2.0, 0.25, n_points=21)
    assert jet.stop_reason == "sonic"
    assert (float(jet.stop_x), float(jet.stop_y)) == (0.0, 1.0)


def test_lengths_take_the_slot_unit():
    plain = slot_jet_cells(2.0, 1.1, n_points=21)
    scaled = slot_jet_cells(2.0, 1.1, n_points=21, slot_half_height=3 * ureg.mm)
    assert scaled.cell_lengths.units == ureg.mm
    np.testing.assert_allclose(scaled.cell_lengths.magnitude, 3 * plain.cell_lengths,
                               rtol=1e-12)
    assert scaled.boundary_theta.units == ureg.rad


@pytest.mark.parametrize("args, name", [
    ((2.0, 1.0), "p_exit_p_ambient"),
    ((2.0, -0.5), "p_exit_p_ambient"),
    ((2.0, 0.2), r"p_exit_p_ambient must be above 0\.2419.*fully expanded jet is supersonic"),
    ((1.0, 1.2), "M_exit"),
    ((2.0, 1.2, {"n_cells": 0}), "n_cells"),
    ((2.0, 1.2, {"n_points": 3}), "n_points"),
    ((2.0, 1.2, {"gamma": 1.0}), "gamma"),
    ((2.0, 1.2, {"geometry": "annular"}), "geometry"),
    ((2.0, 1.2, {"slot_half_height": -1.0}), "slot_half_height"),
])
def test_bad_inputs_name_the_argument(args, name):
    *values, = args
    kwargs = values.pop() if isinstance(values[-1], dict) else {}
    with pytest.raises(InvalidInputError, match=name):
        slot_jet_cells(*values, **kwargs)


def test_nan_in_gives_nan_out():
    jet = slot_jet_cells(float("nan"), 1.2)
    assert jet.stop_reason == "nan"
    assert jet.cell_lengths.size == 0 and math.isnan(float(jet.cell_length_linear))


# ------------------------------------------------------------------ round jets
# Linear theory of a round jet (Pack 1950's Fourier–Bessel solution): the boundary slope is
# proportional to Σ sin(j_k ξ)/j_k, ξ = x/(R√(Mj² - 1)), j_k the zeros of J0; its roots,
# computed here (gasdyn2d.characteristics.jets.ROUND_JET_NARROWEST_POINTS), put the widest
# points at ξ = 1.43634, 4.00000 and the narrowest at 2.44713, 5.30401: not multiples of one
# cell, the Bessel modes not being harmonics.


def test_round_jet_boundary_extrema_against_linear_theory():
    # ε = pe/pa - 1 = 0.02: the computed narrowest and widest points depart from linear
    # theory at first order in ε; the march converges at first order in 1/n (its lip fan is
    # captured), so the departure is Richardson-extrapolated from n = 81 and 161 (measured
    # 0.22ε and 0.29ε for the first two narrowest points, 0.25ε and 0.23ε for the widest)
    eps = 0.02
    jets = [slot_jet_cells(2.0, 1.0 + eps, n_points=n, geometry="axisymmetric")
            for n in (81, 161)]
    assert all(jet.stop_reason == "cells" for jet in jets)
    for field in ("narrowest_x", "widest_x"):
        coarse, fine = (np.asarray(getattr(jet, field))[:2] for jet in jets)
        linear = np.asarray(getattr(jets[1], field + "_linear"))[:2]
        departure = ((2.0 * fine - coarse) / linear - 1.0) / eps
        assert np.all((0.1 < departure) & (departure < 0.4)), (field, departure)
    scale = math.sqrt(jet_mach(2.0, 1 + eps) ** 2 - 1)
    assert float(jets[1].narrowest_x_linear[0]) == pytest.approx(2.44712834 * scale, rel=1e-12)
    assert float(jets[1].cell_length_linear) == pytest.approx(
        2 * math.pi * scale / 2.404825557695773, rel=1e-12)  # Pack (1950), πD√(Mj²-1)/j0


def test_round_jet_widest_point_agrees_with_the_round_characteristic_net():
    # the round characteristic net of underexpanded_slot_jet (a different method, its own
    # tests against linear theory) against the march, extrapolated from n = 81 and 161
    # (measured 3e-4)
    net = underexpanded_slot_jet(2.0, 1.02, n_characteristics=100, slot_half_height=1.0,
                                 geometry="axisymmetric")
    coarse, fine = (float(slot_jet_cells(2.0, 1.02, n_points=n, geometry="axisymmetric")
                          .widest_x[0]) for n in (81, 161))
    assert 2.0 * fine - coarse == pytest.approx(float(net.max_width_x), rel=1e-3)


def _mass_flux(jet, gamma=1.4):
    """Mass flux through every station [p0 = T0 = R = 1], 2πy-weighted for a round jet."""
    net, out = jet.net, []
    for x in np.unique(net.x):
        k = net.x == x
        y, mach, theta, p = net.y[k], net.mach[k], net.theta[k], net.p_p0[k]
        temperature = 1.0 / (1.0 + 0.5 * (gamma - 1.0) * mach**2)
        rho_u = p / temperature * mach * np.sqrt(gamma * temperature) * np.cos(theta)
        weight = 2.0 * np.pi * y if jet.geometry == "axisymmetric" else 1.0
        out.append(np.trapezoid(rho_u * weight, y))
    return np.array(out)


@pytest.mark.parametrize("geometry, ratio, n, limit", [
    ("planar", 1.05, 81, 2e-4),  # measured 9.5e-5 (4.4e-5 at n = 161)
    ("axisymmetric", 1.05, 81, 4e-4),  # measured 1.8e-4 (8e-5 at n = 161)
    ("planar", 0.8, 81, 3e-3),  # lip shock fitted, fan at the boundary captured: 1.2e-3
    ("planar", 3.0, 81, 1.5e-2),  # strong: 6.7e-3 (5.2e-3 at n = 161)
])
def test_mass_flux_through_every_station_is_the_exit_flux(geometry, ratio, n, limit):
    # conservation of mass (a fact of the trade) through the stations of the march; the
    # inverse marching scheme is not conservative, so the error is the method's
    jet = slot_jet_cells(2.0, ratio, n_points=n, geometry=geometry)
    flux = _mass_flux(jet)
    assert np.max(np.abs(flux / flux[0] - 1.0)) < limit


@pytest.mark.parametrize("ratio", [3.0, 0.8])
def test_round_jet_mach_disc_stops_the_march(ratio):
    # a strongly under-expanded round jet's barrel shock, and an over-expanded one's conical
    # lip shock, strengthen as they converge on the axis (a fact of axisymmetric flow) until
    # the flow behind them would be subsonic or their turn passes detachment: the march
    # stops at the Mach disc, at an x that converges with n
    stops = [slot_jet_cells(2.0, ratio, n_points=n, geometry="axisymmetric") for n in (81, 161)]
    assert all(jet.stop_reason == "mach_disc" for jet in stops)
    assert float(stops[1].stop_x) == pytest.approx(float(stops[0].stop_x), rel=0.02)
    shock = stops[1].shocks[-1]
    assert shock.family == -1 and shock.p2_p1[-1] > shock.p2_p1[0]


@settings(max_examples=30, deadline=None)
@given(M=st.floats(1.05, 3.5), log_ratio=st.floats(math.log(0.25), math.log(6.0)),
       round_=st.booleans())
def test_any_jet_ends_with_a_stated_reason(M, log_ratio, round_):
    # over the practical range the march ends with cells or a stated reason, never an
    # exception or a crawl; cells are finite and positive
    ratio = math.exp(log_ratio)
    sonic_limit = ref.p_p0(M, 1.4) / 0.5282817877171742  # p*/p0 at γ = 1.4
    assume(ratio > sonic_limit * (1 + 1e-9) and abs(ratio - 1.0) > 1e-6)
    jet = slot_jet_cells(M, ratio, n_points=11, geometry="axisymmetric" if round_ else "planar")
    assert jet.stop_reason in ("cells", "mach_disc", "sonic", "shock_crossing", "slip_line")
    if jet.stop_reason == "cells":
        assert jet.cell_lengths.size == 2 and np.all(jet.cell_lengths > 0.0)


def test_a_slip_line_reaching_the_centreline_stops_the_march():
    # on a coarse mesh the strong Mach 3 jet's shocks cross off the centreline, and the slip
    # line they leave runs down to it: a wall cannot carry two streams, so the march stops
    # there with its own reason (finer meshes reflect the shocks regularly instead)
    jet = slot_jet_cells(3.0, 5.0, n_points=11)
    assert jet.stop_reason == "slip_line"
    assert float(jet.stop_y) == pytest.approx(0.0, abs=1e-12)
    assert any(shock.end == "crossing" for shock in jet.shocks)


def test_a_lip_shock_turning_the_flow_subsonic_is_not_called_a_mach_disc():
    # a round over-expanded jet at pe/pa = 0.3 (Mach 2): the lip shock nearly detaches and
    # the flow behind it turns subsonic a step from the lip, far from the axis: "sonic"
    jet = slot_jet_cells(2.0, 0.3, geometry="axisymmetric")
    assert jet.stop_reason == "sonic"
    assert float(jet.stop_y) > 0.9 and float(jet.stop_x) < 0.05


def test_round_jet_linear_extrema_against_an_independent_reference():
    # the tabulated widest and narrowest points of linear theory (jets.ROUND_JET_*_POINTS)
    # against an independent mpmath evaluation of Σ sin(j_k ξ)/j_k (tests/round_jet_reference.py:
    # McMahon's expansion summed in closed form by Clausen functions): the sum changes sign
    # across each tabulated root, + to - at the widest points and - to + at the narrowest
    # (at ξ = 4, 8, 12, 16 by a jump of exactly ±1, the step of the twice-focused lip wave)
    from round_jet_reference import boundary_slope_sum
    from gasdyn2d.characteristics.jets import ROUND_JET_NARROWEST_POINTS, ROUND_JET_WIDEST_POINTS
    for roots, sign in ((ROUND_JET_WIDEST_POINTS, 1.0), (ROUND_JET_NARROWEST_POINTS, -1.0)):
        for xi in roots:
            step = 1e-9 if xi == round(xi) else 2e-8  # the table's 8 decimals
            before, after = boundary_slope_sum(xi - step), boundary_slope_sum(xi + step)
            assert sign * before > 0.0 > sign * after, (xi, before, after)
            if xi == round(xi):
                assert after - before == pytest.approx(-sign, abs=1e-6)
