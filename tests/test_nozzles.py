"""Tests of the minimum-length nozzle designed by characteristics.

Sources:
- NACA Report 1135 (1953), eq. 80 (A/A*) and Table II values as listed in
  /work/shared/SOURCES.md; eq. 171 for ν(M).
- /work/shared/SOURCES.md, "Characteristics and jets": the largest wall angle
  is ν(Me)/2; Me 2.4 gives A/A* = 2.403100 and a length of about 8.087 throat
  half-heights (computed there).
- An independent mpmath reference (below) for ν and A/A*.
- Fact of the trade: the mass flow through any line across the nozzle equals
  the throat's, ρV/(ρ*V*) = 1/(A/A*)(M).
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
from gasdyn2d.characteristics.nozzles import minimum_length_nozzle

# The checks here are written in throat half-heights: these designs take h = 1 m (the
# default, 0.01 m, is a laboratory size; its scaling is checked on its own).
minimum_length_nozzle = functools.partial(minimum_length_nozzle, throat_half_height=1.0)


def mp_nu(M, g=1.4):
    """ν(M) at 40 digits (NACA Report 1135, eq. 171)."""
    with mp.workdps(40):
        M, g = mp.mpf(M), mp.mpf(g)
        k = mp.sqrt((g + 1) / (g - 1))
        return k * mp.atan(mp.sqrt(M * M - 1) / k) - mp.atan(mp.sqrt(M * M - 1))


def mp_area_ratio(M, g=1.4):
    """A/A* at 40 digits (NACA Report 1135, eq. 80)."""
    with mp.workdps(40):
        M, g = mp.mpf(M), mp.mpf(g)
        return (1 / M) * ((2 + (g - 1) * M * M) / (g + 1)) ** ((g + 1) / (2 * (g - 1)))


@pytest.mark.parametrize("M, gamma", [(1.5, 1.4), (2.8, 1.4), (4.0, 1.4), (2.5, 1.3)])
def test_max_wall_angle_is_half_the_exit_prandtl_meyer_angle(M, gamma):
    # SOURCES.md: the wall's largest angle is ν(Me)/2; ν from the mpmath reference
    nozzle = minimum_length_nozzle(M, n_characteristics=20, gamma=gamma)
    assert nozzle.max_wall_angle == pytest.approx(float(mp_nu(M, gamma)) / 2, rel=1e-13)
    # the contour really starts at that angle: the wall node at the corner
    wall = nozzle.net.x == 0.0
    assert np.max(nozzle.net.theta[wall]) == pytest.approx(nozzle.max_wall_angle, rel=1e-15)
    # and no wall segment is steeper
    slopes = np.diff(nozzle.wall_y) / np.diff(nozzle.wall_x)
    assert np.max(np.arctan(slopes)) <= nozzle.max_wall_angle


# NACA Report 1135, Table II (values as in /work/shared/SOURCES.md): M, A/A*
NACA_1135_AREA_RATIO = [(2.0, 1.68750), (2.5, 2.63672), (3.0, 4.23457)]


@pytest.mark.parametrize("M, published", NACA_1135_AREA_RATIO)
def test_area_ratio_against_naca_1135(M, published):
    nozzle = minimum_length_nozzle(M, n_characteristics=100)
    assert nozzle.area_ratio_isentropic == pytest.approx(published, rel=5e-6)
    # n = 100: relative error below 1e-3 (measured 2.6e-4 to 8.6e-4, see the refinement test)
    assert nozzle.area_ratio == pytest.approx(published, rel=1e-3)
    assert nozzle.area_ratio < nozzle.area_ratio_isentropic  # converges from below


def test_sources_md_mach_2_4_case():
    # SOURCES.md, "Characteristics and jets": Me 2.4, A/A* = 2.403100, length ≈ 8.087
    nozzle = minimum_length_nozzle(2.4, n_characteristics=200)
    assert nozzle.area_ratio_isentropic == pytest.approx(2.403100, rel=2e-7)
    assert nozzle.area_ratio == pytest.approx(2.403100, rel=3e-4)
    assert nozzle.length == pytest.approx(8.087, abs=2e-3)


def test_area_ratio_refinement_order():
    # Refinement study at Me 2.8 against the mpmath A/A*: the error falls as n^(-4/3)
    # (measured local orders 1.20 to 1.31; explained in the module Notes).
    exact = float(mp_area_ratio(2.8))
    counts = [10, 20, 50, 100, 200]
    errors = [abs(minimum_length_nozzle(2.8, n_characteristics=n).area_ratio - exact) / exact
              for n in counts]
    assert errors[0] == pytest.approx(1.31e-2, rel=0.02)  # measured values, regression guard
    assert errors[-1] == pytest.approx(2.93e-4, rel=0.02)
    orders = [math.log(e0 / e1) / math.log(n1 / n0)
              for e0, e1, n0, n1 in zip(errors, errors[1:], counts, counts[1:])]
    assert all(1.15 < p < 1.4 for p in orders), orders  # measured 1.20, 1.26, 1.30, 1.31
    assert orders == sorted(orders)  # tending up towards 4/3


@pytest.mark.parametrize("n", [10, 57])
def test_exit_flow_uniform_and_parallel(n):
    nozzle = minimum_length_nozzle(3.0, n_characteristics=n)
    net = nozzle.net
    exit_x = float(nozzle.length)
    # the last reflected line (from the centreline at M = Me) is uniform and parallel
    last = net.mach >= 3.0 * (1 - 1e-13)
    assert np.count_nonzero(last) >= 2
    assert np.all(np.abs(net.theta[last]) < 1e-14)
    assert net.mach[last] == pytest.approx(3.0, rel=1e-12)  # mpmath-grade inverse of ν
    assert net.x[last].max() == pytest.approx(exit_x, rel=1e-15)
    # the wall ends parallel to the axis
    end = np.isclose(net.x, exit_x) & np.isclose(net.y, float(nozzle.exit_half_height))
    assert np.all(np.abs(net.theta[end]) < 1e-14)


def test_mass_flow_through_each_reflected_line():
    # Fact of the trade: mass is conserved; through the C+ line from the centreline to the
    # wall it equals the throat's: ∫ (cos θ dy - sin θ dx)/(A/A*)(M) = h = 1.
    nozzle = minimum_length_nozzle(2.5, n_characteristics=80)
    net = nozzle.net
    from gasdyn2d.relations.isentropic import area_ratio

    flux_density = 1.0 / area_ratio(net.mach)
    i, j = net.plus_segments.T
    along_x = flux_density * np.cos(net.theta)
    along_y = flux_density * np.sin(net.theta)
    mean_flux = 0.5 * (along_x[i] + along_x[j])
    mean_flux_x = 0.5 * (along_y[i] + along_y[j])
    seg_flux = mean_flux * (net.y[j] - net.y[i]) - mean_flux_x * (net.x[j] - net.x[i])
    # group segments by C+ line: invariant θ - ν labels the line
    from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle

    label = np.round((net.theta - prandtl_meyer_angle(net.mach))[i], 9)
    totals = [seg_flux[label == value].sum() for value in np.unique(label)]
    assert len(totals) == 80
    assert np.max(np.abs(np.array(totals) - 1.0)) < 2e-3


def test_net_connectivity_carries_the_invariants():
    # Fact of the trade: θ - ν is constant along every C+ segment, θ + ν along every C-
    nozzle = minimum_length_nozzle(2.2, n_characteristics=30)
    net = nozzle.net
    from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle

    nu = prandtl_meyer_angle(net.mach)
    i, j = net.plus_segments.T
    assert np.allclose((net.theta - nu)[i], (net.theta - nu)[j], rtol=0, atol=1e-12)
    i, j = net.minus_segments.T
    assert np.allclose((net.theta + nu)[i], (net.theta + nu)[j], rtol=0, atol=1e-12)
    # every segment runs downstream
    for seg in (net.plus_segments, net.minus_segments):
        assert np.all(net.x[seg[:, 1]] >= net.x[seg[:, 0]])


@settings(max_examples=15, deadline=None)
@given(st.floats(1.1, 4.0), st.integers(10, 40), st.floats(1.15, 1.67))
def test_contour_properties(M, n, gamma):
    # Properties: the wall rises monotonically while straightening, and the area ratio
    # error stays within 0.25/n (bound set from a measured scan over M 1.1-5, γ 1.15-1.67;
    # coarser nets at M > 4 can overshoot A/A*)
    nozzle = minimum_length_nozzle(M, n_characteristics=n, gamma=gamma)
    assert np.all(np.diff(nozzle.wall_x) > 0)
    assert np.all(np.diff(nozzle.wall_y) >= 0)
    slopes = np.diff(nozzle.wall_y) / np.diff(nozzle.wall_x)
    assert np.all(np.diff(slopes) <= 1e-15)
    exact = float(mp_area_ratio(M, gamma))
    assert abs(nozzle.area_ratio / exact - 1) < 0.25 / n


def test_quantity_half_height_scales_lengths():
    plain = minimum_length_nozzle(2.8, n_characteristics=40)
    scaled = minimum_length_nozzle(2.8, n_characteristics=40, throat_half_height=12.5 * ureg.mm)
    assert str(scaled.length.units) == "millimeter"
    assert scaled.length.magnitude == pytest.approx(12.5 * plain.length, rel=1e-14)
    assert scaled.wall_y.magnitude == pytest.approx(12.5 * plain.wall_y, rel=1e-14)
    assert scaled.max_wall_angle.to("rad").magnitude == pytest.approx(plain.max_wall_angle)
    assert scaled.area_ratio == plain.area_ratio
    assert "MinimumLengthNozzle" in repr(scaled)


@pytest.mark.parametrize("kwargs, name", [
    (dict(M_exit=1.0), "M_exit"), (dict(M_exit=np.nan), "M_exit"),
    (dict(M_exit=2.0, n_characteristics=1), "n_characteristics"),
    (dict(M_exit=2.0, n_characteristics=10.0), "n_characteristics"),
    (dict(M_exit=2.0, n_characteristics=True), "n_characteristics"),
    (dict(M_exit=2.0, gamma=1.0), "gamma"),
    (dict(M_exit=2.0, throat_half_height=-1.0), "throat_half_height"),
    (dict(M_exit=2.0, throat_half_height=3 * ureg.s), "throat_half_height"),
    (dict(M_exit=[2.0, 3.0]), "M_exit must be a single value"),
])
def test_bad_input_errors(kwargs, name):
    with pytest.raises(InvalidInputError, match=name) as info:
        minimum_length_nozzle(**kwargs)
    assert isinstance(info.value, ValueError)


# ---------------------------------------------------------------- rounded throat
# Sources: Sauer (1947), NACA TM 1147 (number from memory), transonic throat solution
# (re-derived in the module);
# its mass deficit 1 - Cd -> (γ+1)/(90R²) for large R is derived in the module docstring
# from ρV/(ρ*a*) ≈ 1 - (γ+1)u'²/2 (fact of the trade: the mass flux peaks at M = 1).

from gasdyn2d.errors import NoSolutionError  # noqa: E402
from gasdyn2d.relations.isentropic import area_ratio as _area_ratio  # noqa: E402
from gasdyn2d.relations.expansion_fans import mach_from_prandtl_meyer_angle as _mach_of_nu  # noqa: E402
from gasdyn2d.characteristics.nozzles import (  # noqa: E402
    rounded_throat_nozzle,
    sauer_discharge_coefficient,
    sauer_start_line,
)

# The checks here are written in throat half-heights: these designs take h = 1 m (the
# default, 0.01 m, is a laboratory size; its scaling is checked on its own).
rounded_throat_nozzle = functools.partial(rounded_throat_nozzle, throat_half_height=1.0)


@pytest.mark.parametrize("R, tolerance", [(20.0, 0.01), (100.0, 0.002)])
def test_sauer_discharge_coefficient_large_radius_limit(R, tolerance):
    deficit = 1 - sauer_discharge_coefficient(R)
    assert deficit == pytest.approx(2.4 / (90 * R * R), rel=tolerance)


def _start_line_mass(R, n, gamma=1.4):
    x, y, theta, nu = sauer_start_line(R, n, gamma)
    flux = np.cos(theta) / _area_ratio(_mach_of_nu(nu, gamma), gamma)
    return float(np.sum(0.5 * (flux[1:] + flux[:-1]) * np.diff(y)))


@pytest.mark.parametrize("M, R", [(2.8, 2.0), (2.0, 5.0), (4.0, 3.0)])
def test_rounded_throat_mass_balance_converges_at_second_order(M, R):
    # The wall is a streamline: exit height · ρeVe = start-line mass flow (mass conservation),
    # i.e. area_ratio = m_start · A/A*(Me) with A/A* from the mpmath reference.
    exact_ratio = float(mp_area_ratio(M))
    # Measured error·n²: ≈ 0.2 at M 2.8, R 2; ≈ 1.2-1.8 at M 4, R 3 (second order).
    counts = (11, 21, 41)
    errors = []
    for n in counts:
        nozzle = rounded_throat_nozzle(M, throat_radius=R, n_points=n)
        errors.append(abs(nozzle.area_ratio / (_start_line_mass(R, n) * exact_ratio) - 1))
    assert all(e < 2.0 / n**2 for e, n in zip(errors, counts)), errors
    assert errors == sorted(errors, reverse=True)


def test_rounded_throat_contour_properties():
    M = 2.8
    sharp = minimum_length_nozzle(M, n_characteristics=100)
    previous_angle = sharp.max_wall_angle
    for R in (2.0, 5.0, 20.0):
        nozzle = rounded_throat_nozzle(M, throat_radius=R, n_points=21)
        # a gentler throat needs a smaller inflection angle and a longer contour
        assert nozzle.inflection_angle < previous_angle
        previous_angle = nozzle.inflection_angle
        assert nozzle.length > sharp.length
        # the arc is the given circle up to the inflection point
        on_arc = nozzle.wall_x <= nozzle.inflection_x
        xa, ya = nozzle.wall_x[on_arc], nozzle.wall_y[on_arc]
        assert np.allclose((ya - (1 + R)) ** 2 + xa**2, R * R, rtol=0, atol=1e-12)
        assert math.degrees(nozzle.inflection_angle) == pytest.approx(
            math.degrees(math.asin(float(nozzle.inflection_x) / R)), abs=1e-9)
        # the wall rises and straightens monotonically, ending parallel at the exit
        slopes = np.diff(nozzle.wall_y) / np.diff(nozzle.wall_x)
        assert np.all(np.diff(nozzle.wall_x) > 0) and np.all(slopes >= -1e-15)
        after = nozzle.wall_x[1:] > nozzle.inflection_x
        assert np.all(np.diff(slopes[after]) <= 1e-15)
        assert np.arctan(slopes[after][0]) < nozzle.inflection_angle
        exit_node = np.argmax(nozzle.net.x)
        assert abs(nozzle.net.theta[exit_node]) < 1e-15
        assert nozzle.net.mach[exit_node] == pytest.approx(M, rel=1e-12)
        # Cd from Sauer's throat: below 1, approaching 1 as R grows
        assert 0.99 < nozzle.discharge_coefficient < 1


def test_rounded_throat_quantities_and_errors():
    nozzle = rounded_throat_nozzle(2.5, throat_radius=30 * ureg.mm,
                                   throat_half_height=10 * ureg.mm, n_points=11)
    plain = rounded_throat_nozzle(2.5, throat_radius=3.0, n_points=11)
    assert str(nozzle.length.units) == "millimeter"
    assert nozzle.length.magnitude == pytest.approx(10 * plain.length, rel=1e-12)
    assert "RoundedThroatNozzle" in repr(nozzle)
    # plain numbers are metres, like the Quantities above; the default radius is 2h
    metres = rounded_throat_nozzle(2.5, throat_radius=0.03, throat_half_height=0.01, n_points=11)
    assert metres.length == pytest.approx(nozzle.length.to("m").magnitude, rel=1e-12)
    default = rounded_throat_nozzle(2.5, throat_half_height=0.01, n_points=11)
    assert default.throat_radius == pytest.approx(0.02, rel=1e-15)
    with pytest.raises(InvalidInputError, match="throat_radius"):
        rounded_throat_nozzle(2.5, throat_radius=1.5)
    with pytest.raises(InvalidInputError, match="n_points"):
        rounded_throat_nozzle(2.5, n_points=3)
    with pytest.raises(NoSolutionError, match="too low"):
        rounded_throat_nozzle(1.5, throat_radius=2.0)


# ---------------------------------------------------------------- the boundary (issues 9, 10, 14)


def test_default_throat_is_a_laboratory_size():
    # Issue 14: the default throat half-height is 0.01 m (a 20 mm throat); lengths scale
    default = minimum_length_nozzle.func(2.4, n_characteristics=20)
    unit = minimum_length_nozzle(2.4, n_characteristics=20)
    assert default.length == pytest.approx(0.01 * unit.length, rel=1e-14)
    assert default.area_ratio == unit.area_ratio
    rounded = rounded_throat_nozzle.func(2.4, n_points=11)
    assert rounded.throat_radius == pytest.approx(0.02, rel=1e-15)  # twice the half-height


def test_one_length_unit_per_nozzle_and_read_only_results():
    # Issue 10: the net comes back in the caller's unit too, not in metres
    nozzle = minimum_length_nozzle(2.4, n_characteristics=12, throat_half_height=8 * ureg.mm)
    assert str(nozzle.net.x.units) == str(nozzle.wall_x.units) == "millimeter"
    assert nozzle.net.y.magnitude.max() == pytest.approx(nozzle.exit_half_height.magnitude,
                                                         rel=1e-12)
    assert str(nozzle.net.theta.units) == "radian"
    plain = minimum_length_nozzle(2.4, n_characteristics=12)
    for value in (plain.wall_x, plain.net.x, plain.net.mach, plain.net.minus_segments,
                  plain.exit_plane.y, nozzle.wall_x.magnitude, nozzle.net.y.magnitude):
        assert not value.flags.writeable
    assert not np.shares_memory(plain.wall_y, plain.net.y)


def test_nan_design_input_is_refused_by_name():
    # A contour cannot be NaN (nothing to build): the design tools raise, naming the input
    with pytest.raises(InvalidInputError, match="M_exit.*NaN"):
        minimum_length_nozzle(float("nan"))
    with pytest.raises(InvalidInputError, match="gamma.*NaN"):
        rounded_throat_nozzle(2.0, gamma=float("nan"))
    with pytest.raises(InvalidInputError, match="throat_radius"):
        rounded_throat_nozzle(2.0, throat_radius=float("nan"))


def test_results_in_the_callers_own_registry():
    # A Quantity of the caller's own registry comes back in that registry (it adds to the
    # caller's Quantities), lengths and the performance sweep alike
    import pint

    own = pint.UnitRegistry()
    nozzle = minimum_length_nozzle(2.4, n_characteristics=12, throat_half_height=own("5 mm"),
                                   geometry="axisymmetric")
    assert isinstance(nozzle.length, own.Quantity) and isinstance(nozzle.net.x, own.Quantity)
    total = nozzle.length + own("1 cm")  # would raise across registries
    assert total.units == own.millimeter
    perf = nozzle.performance(p0=own("2 MPa"), T0=own("300 K"), p_ambient=own("0 Pa"))
    assert isinstance(perf.thrust, own.Quantity) and str(perf.exit_pressure.units) == "megapascal"
