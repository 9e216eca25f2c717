"""Tests for gasdyn2d.design.near_fields: the near field of a section (curved shocks, signatures).

References: shock-expansion theory (Liepmann & Roshko 1957, ch. 4), whose surface pressures
the method must reproduce exactly (gasdyn2d's own shock_expansion_loads, itself checked
against mpmath solutions of NACA Report 1135 in tests/test_section_loads.py); the
oblique-shock relations (NACA Report 1135, eqs. 128-132, 138); linearised supersonic theory
(Ackeret 1925, from memory: p/p∞ - 1 = γM²θ/√(M² - 1) carried along free-stream Mach
lines); the far-field decay of planar N-wave shocks as distance^(-1/2) (Whitham 1974,
Linear and Nonlinear Waves, ch. 9, from memory).
"""

import math

import numpy as np
import pint
import pytest

from gasdyn2d import DetachedShockError, InvalidInputError, oblique_shock, section_near_field
from gasdyn2d.design.section_loads import shock_expansion_loads
from gasdyn2d.design.sections import Section

ureg = pint.get_application_registry()


def _decay_exponent(shock, low, high):
    """Least-squares slope of ln(p2/p1 - 1) against ln|y| over low < |y| < high [chord]."""
    y, strength = np.abs(shock.y), shock.pressure_ratio - 1.0
    keep = (y > low) & (y < high)
    assert keep.sum() >= 10  # enough crossings for a fit
    return np.polyfit(np.log(y[keep]), np.log(strength[keep]), 1)[0]


# ------------------------------------------------------------- built-in check: the surface

@pytest.mark.parametrize("section, M, alpha_deg", [
    (Section.biconvex(0.05, n=32), 1.8, 2.0),  # invented fin
    (Section.biconvex(0.08, n=64), 3.0, -3.0),
    (Section.double_wedge(0.06, ridge=0.35), 2.2, 1.0),
    (Section.flat_plate(), 2.0, 6.0),
    (Section.from_points([(0, 0), (0.3, 0.03), (1, 0)], [(0, 0), (1, 0)]), 1.6, 4.0),
])
def test_surface_pressures_and_loads_equal_shock_expansion_theory(section, M, alpha_deg):
    # the simple wave carries each panel's state off the surface: on a convex section the
    # surface pressures are shock-expansion theory's (Liepmann & Roshko 1957, ch. 4)
    alpha = math.radians(alpha_deg)
    field = section_near_field(section, M, alpha, [2.0])
    loads = shock_expansion_loads(section, M, alpha)
    q = 0.7 * M * M
    assert np.max(np.abs((field.p_upper - 1.0) / q - loads.cp_upper)) < 1e-12
    assert np.max(np.abs((field.p_lower - 1.0) / q - loads.cp_lower)) < 1e-12
    assert field.cl == pytest.approx(loads.cl, abs=1e-12)
    assert field.cd == pytest.approx(loads.cd, abs=1e-12)
    # behind the last wave on each side: the wake pressure of the trailing-edge match
    for rows in (field.overpressure_above, field.overpressure_below):
        last = rows[0][np.isfinite(rows[0])][-1]
        assert last + 1.0 == pytest.approx(loads.wake_pressure_ratio, rel=1e-9)


# ------------------------------------------------------------- flat plate at incidence

def test_flat_plate_lower_shock_is_the_exact_oblique_shock_until_the_trailing_fan():
    M, alpha = 2.0, math.radians(5.0)
    field = section_near_field(Section.flat_plate(), M, alpha, [0.5, 3.0])
    exact = oblique_shock(M, deflection=alpha)  # NACA Report 1135, eq. 138
    lower = field.leading_shock_below
    # up to the first trailing-edge fan line that overtakes it the shock is straight
    first_fan = 2  # start point, then the fan's head (which carries the panel's state)
    assert np.all(lower.wave_angle[:first_fan] == pytest.approx(exact.wave_angle, rel=1e-12))
    assert np.all(lower.pressure_ratio[:first_fan] == pytest.approx(exact.p2_p1, rel=1e-12))
    slope = lower.y[1] / lower.x[1]
    assert slope == pytest.approx(-math.tan(exact.wave_angle), rel=1e-12)
    # the trailing-edge fan of the lower stream then weakens it (a fan overtaking a shock)
    assert np.all(np.diff(lower.pressure_ratio) <= 1e-12)
    assert lower.pressure_ratio[-1] < exact.p2_p1 - 0.01
    # at 0.5 chord below, the signature jumps by exactly the wedge shock's pressure
    row = field.overpressure_below[0]
    assert np.nanmax(row) == pytest.approx(exact.p2_p1 - 1.0, rel=1e-12)
    # upper side: a centred fan at the leading edge (no leading shock) and a trailing shock
    assert field.leading_shock_above.x.size == 0 and field.trailing_shock_below.x.size == 0
    trail = field.trailing_shock_above
    assert trail.x[0] == pytest.approx(math.cos(alpha)) and trail.y[0] == pytest.approx(
        -math.sin(alpha))
    assert np.all(np.diff(trail.pressure_ratio) <= 1e-12) and trail.pressure_ratio[-1] < \
        trail.pressure_ratio[0]
    above = field.overpressure_above[0]
    above = above[np.isfinite(above)]
    assert above.min() == pytest.approx(field.p_upper[0] - 1.0, rel=1e-12)  # the fan's tail


# ------------------------------------------------------------- biconvex: decay and N-wave

def test_leading_shock_weakens_along_itself_and_decays_as_distance_to_the_minus_half():
    # a 3 % biconvex section (invented), finely drawn so that lines reach 200 chords
    field = section_near_field(Section.biconvex(0.03, n=256), 2.0, 0.0, [1.0],
                               max_line_turn=math.radians(0.02))
    for shock in (field.leading_shock_below, field.leading_shock_above):
        assert np.all(np.diff(shock.pressure_ratio) <= 1e-12)  # a fan overtaking a shock
        assert shock.pressure_ratio[-1] < shock.pressure_ratio[0]
    # Whitham 1974, ch. 9 (from memory): planar N-wave shocks decay as r^(-1/2)
    assert _decay_exponent(field.leading_shock_below, 20.0, 200.0) == pytest.approx(-0.5,
                                                                                    abs=0.02)
    assert _decay_exponent(field.trailing_shock_below, 20.0, 200.0) == pytest.approx(-0.5,
                                                                                     abs=0.02)
    assert _decay_exponent(field.trailing_shock_below, 200.0, 2000.0) == pytest.approx(
        -0.5, abs=0.01)


def test_signature_at_ten_chords_is_an_n_wave():
    field = section_near_field(Section.biconvex(0.05, n=64), 2.0, 0.0, [10.0])
    x, dp = field.x_below[0], field.overpressure_below[0]
    x, dp = x[np.isfinite(x)], dp[np.isfinite(dp)]
    assert np.all(np.diff(x) >= 0.0)
    jumps = np.flatnonzero(np.diff(x) == 0.0)
    assert len(jumps) == 2  # a leading and a trailing shock
    front, back = jumps
    assert dp[front] == 0.0 and dp[front + 1] > 0.05  # leading compression from free stream
    inside = slice(front + 1, back + 1)
    assert np.all(np.diff(dp[inside]) <= 0.0)  # a steady expansion between the shocks
    fit = np.polyfit(x[inside], dp[inside], 1, full=True)
    spread = np.sum((dp[inside] - dp[inside].mean()) ** 2)
    assert 1.0 - fit[1][0] / spread > 0.99  # linear-ish, as in an N-wave
    assert dp[back] < -0.05 and abs(dp[back + 1]) < 0.05 * abs(dp[back])  # trailing shock
    # symmetric section at zero incidence: the same signature above
    assert np.allclose(field.overpressure_above, field.overpressure_below, equal_nan=True)


def test_thin_section_signature_matches_linear_theory_to_second_order():
    # Ackeret (1925, from memory): p/p∞ - 1 = γM²/√(M²-1) θ(ξ), ξ = x - √(M²-1) h on the
    # lower side, θ = α - dy/dx the surface's turn into the flow. The L1 gap between the
    # signatures (nonlinear steepening, shifted shocks) falls as the square of the thickness
    # while the signal falls as the thickness.
    M, h, alpha = 2.0, 0.5, 0.0
    root = math.sqrt(M * M - 1.0)
    gaps, signals = [], []
    for t in (0.02, 0.01):
        section = Section.biconvex(t, n=200)
        field = section_near_field(section, M, alpha, [h], max_line_turn=math.radians(0.02))
        x, dp = field.x_below[0], field.overpressure_below[0]
        ok = np.isfinite(x)
        grid = np.linspace(root * h - 0.2, root * h + 1.2, 20001)
        ours = np.interp(grid, x[ok], dp[ok], left=0.0)
        xi = grid - root * h
        panel = np.clip(np.searchsorted(section.lower[:, 0], xi) - 1, 0, 199)
        slopes = np.diff(section.lower[:, 1]) / np.diff(section.lower[:, 0])
        linear = np.where((xi > 0) & (xi < 1), 1.4 * M * M / root * (alpha - slopes[panel]), 0.0)
        step = grid[1] - grid[0]
        gaps.append(np.sum(np.abs(ours - linear)) * step)
        signals.append(np.sum(np.abs(linear)) * step)
    assert signals[0] / signals[1] == pytest.approx(2.0, rel=0.01)  # first order in t
    assert gaps[1] < 0.3 * signals[1]
    assert 3.0 < gaps[0] / gaps[1] < 5.0  # second order: halving t quarters the gap


@pytest.mark.parametrize("M, first_deg, second_deg", [
    (1.8, 5.0, 3.0), (2.0, 8.0, 4.0), (2.5, 10.0, 7.0), (3.0, 14.0, 6.0)])
def test_shock_after_a_whole_corner_fan_matches_the_region_graph_interaction(M, first_deg,
                                                                              second_deg):
    # a wedge shock overtaken by the fan of one corner (invented three-panel surface): once
    # the shock has absorbed the whole fan it must carry the state of the region graph's
    # exact wave-by-wave interaction (transmitted shock, reflected wave, slip line; the
    # oblique-shock and Prandtl-Meyer relations of NACA Report 1135, eqs. 138 and 171), and
    # the wave the method neglects is the graph's reflected wave
    from gasdyn2d import WavePattern

    x1, x2 = 0.3, 0.55
    y1 = x1 * math.tan(math.radians(first_deg))
    y2 = y1 + (x2 - x1) * math.tan(math.radians(second_deg))
    section = Section.from_points([(0, 0), (x1, y1), (x2, y2), (1, 0)], [(0, 0), (1, 0)])
    shock = section_near_field(section, M, 0.0, [1.0],
                               max_line_turn=math.radians(0.05)).leading_shock_above
    turn0, corner = section.upper_angles[0], np.diff(section.upper_angles)[0]
    pattern = WavePattern(M)
    pattern.add_wave("leading edge", upstream="1", downstream="2", family="left", turn=turn0)
    pattern.add_wave("corner fan", upstream="2", downstream="3", family="left", turn=corner)
    pattern.add_wave("transmitted", upstream="1", downstream="4", family="left",
                     guess=turn0 + corner)
    pattern.add_wave("reflected", upstream="3", downstream="5", family="right")
    pattern.add_slip_line("4", "5")
    exact = pattern.solve()
    p4 = float(exact.region("4").p_ratio)
    k = int(np.argmin(np.abs(shock.pressure_ratio - p4)))
    assert shock.pressure_ratio[k] == pytest.approx(p4, rel=1e-5)
    assert shock.wave_angle[k] == pytest.approx(float(exact.wave("transmitted").wave_angle),
                                                abs=2e-6)
    reflected = math.log(float(exact.region("5").p_ratio) / float(exact.region("3").p_ratio))
    incident = math.log(float(exact.region("3").p_ratio) / float(exact.region("2").p_ratio))
    assert shock.neglected_wave[k] == pytest.approx(reflected, rel=0.01)
    assert abs(reflected) < 0.005 * abs(incident)  # the neglected wave is small


def _pressure_integral(x, overpressure, start, end):
    """∫ (p/p∞ - 1) dx of one signature row from ``start`` to ``end``: free stream ahead of
    its first sample, its wake pressure behind its last one (linear between samples)."""
    ok = np.isfinite(x)
    x = np.r_[start, x[ok], end]
    dp = np.r_[0.0, overpressure[ok], overpressure[ok][-1]]
    return np.sum(0.5 * (dp[1:] + dp[:-1]) * np.diff(x))


def test_lift_is_the_vertical_momentum_flux_through_the_signature_lines():
    # momentum theorem (e.g. Liepmann & Roshko 1957, from memory): the lift per unit span is
    # the net vertical momentum flux through any lines below and above the section, to first
    # order ∫(p - p∞) dx below minus above, at every distance. The rest (ρv² terms, the
    # neglected reflected waves) is of second order: relative to the lift it at least halves
    # when the thickness and incidence are halved.
    M, heights = 1.7, [0.5, 2.0, 10.0]
    gaps = []
    for t, alpha_deg in ((0.02, 1.0), (0.01, 0.5)):  # an invented fin, and half of it
        field = section_near_field(Section.biconvex(t, n=128), M, math.radians(alpha_deg),
                                   heights)
        end = np.nanmax(np.r_[field.x_below.ravel(), field.x_above.ravel()]) + 1.0
        for k in range(len(heights)):
            net = (_pressure_integral(field.x_below[k], field.overpressure_below[k], -1.0, end)
                   - _pressure_integral(field.x_above[k], field.overpressure_above[k], -1.0,
                                        end))
            cl_from_signatures = net / (0.5 * 1.4 * M * M)
            gaps.append(abs(cl_from_signatures / field.cl - 1.0))
    gaps = np.reshape(gaps, (2, len(heights)))
    assert np.all(gaps[0] < 0.005) and np.all(gaps[1] < 0.001)
    assert np.all(gaps[0] > 1.8 * gaps[1])


def test_neglected_reflected_wave_is_a_small_second_order_fraction():
    # the reflected wave the method drops, measured at each shock point, against the
    # incident wave absorbed so far; it scales as the square of the strength
    ratios = []
    for t in (0.05, 0.025):
        shock = section_near_field(Section.biconvex(t, n=128), 2.0, 0.0, [1.0]) \
            .leading_shock_below
        incident = np.log(shock.pressure_ratio[0]) - (np.log(shock.pressure_ratio)
                                                      - shock.neglected_wave)
        keep = incident > 1e-9
        ratios.append(np.max(np.abs(shock.neglected_wave[keep]) / incident[keep]))
    assert ratios[0] < 0.005
    assert 3.0 < ratios[0] / ratios[1] < 5.5


# ------------------------------------------------------------- inputs, units, errors

def test_nan_in_gives_nan_out():
    fin = Section.biconvex(0.05, n=16)
    for args in ((math.nan, 0.02), (2.0, math.nan)):
        field = section_near_field(fin, *args, [1.0, 2.0])
        assert math.isnan(field.cl) and np.all(np.isnan(field.overpressure_below))
        assert field.overpressure_above.shape[0] == 2
    assert math.isnan(section_near_field(fin, 2.0, 0.0, [1.0], gamma=math.nan).cd)


def test_quantities_for_distances_chord_and_incidence():
    fin = Section.biconvex(0.05, n=16)
    plain = section_near_field(fin, 2.0, math.radians(2.0), [1.0, 5.0])
    scaled = section_near_field(fin, 2.0, 2.0 * ureg.deg, [0.3, 1.5] * ureg.m,
                                chord=300 * ureg.mm)
    assert str(scaled.x_below.units) == "millimeter"
    assert np.allclose(scaled.x_below.m_as("mm") / 300.0, plain.x_below, equal_nan=True)
    assert np.allclose(scaled.leading_shock_below.y.m_as("m") / 0.3,
                       plain.leading_shock_below.y)
    assert scaled.cl == pytest.approx(plain.cl, rel=1e-14)
    # without a chord every length is in chords (plain numbers), whatever the angle's unit
    in_chords = section_near_field(fin, 2.0, 2.0 * ureg.deg, [1.0, 5.0])
    assert isinstance(in_chords.x_below, np.ndarray)
    assert np.allclose(in_chords.x_below, plain.x_below, equal_nan=True)
    with pytest.raises(InvalidInputError, match="chord"):
        section_near_field(fin, 2.0, 0.0, 1.0 * ureg.m)


@pytest.mark.parametrize("kwargs, match", [
    ({"M1": 0.8}, "M1"),
    ({"distances": [1.0, -2.0]}, "distances"),
    ({"distances": [0.01]}, "clear the section"),
    ({"distances": [1.0, math.nan]}, "distances"),
    ({"gamma": 1.0}, "gamma"),
    ({"max_line_turn": 0.5}, "max_line_turn"),
    ({"M1": [2.0, 3.0]}, "M1"),
])
def test_bad_inputs_are_named(kwargs, match):
    args = {"section": Section.biconvex(0.05, n=16), "M1": 2.0, "alpha": 0.0,
            "distances": [1.0]}
    args.update(kwargs)
    with pytest.raises(InvalidInputError, match=match):
        section_near_field(**args)


def test_detached_leading_edge_and_concave_sections_are_refused():
    with pytest.raises(DetachedShockError, match="section_near_field"):
        section_near_field(Section.biconvex(0.05, n=16), 1.5, math.radians(14.0), [1.0])
    concave = Section.from_points([(0, 0), (0.5, 0.01), (0.7, 0.04), (1, 0)], [(0, 0), (1, 0)])
    with pytest.raises(InvalidInputError, match="convex"):
        section_near_field(concave, 2.0, 0.0, [1.0])
    with pytest.raises(InvalidInputError, match="Section"):
        section_near_field("biconvex", 2.0, 0.0, [1.0])


def test_result_is_read_only_and_displays():
    field = section_near_field(Section.biconvex(0.05, n=16), 2.0, 0.01, [1.0])
    with pytest.raises(ValueError):
        field.overpressure_below[0, 0] = 1.0
    text = repr(field)
    assert "overpressure_below" in text and "cl" in text


def test_pressure_signature_draws_one_line_per_distance_and_side():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from gasdyn2d.plot import draw_pressure_signature

    field = section_near_field(Section.biconvex(0.05, n=16), 2.0, 0.02, [1.0, 3.0],
                               chord=0.4 * ureg.m)
    drawn = draw_pressure_signature(field, sides=("below", "above"), linewidth=2.5)
    assert len(drawn.lines) == 4 and drawn.lines[("below", 1)].get_linewidth() == 2.5
    x_drawn, p_drawn = drawn.lines[("below", 0)].get_data()
    row = np.isfinite(field.overpressure_below[0])
    assert np.allclose(p_drawn, field.overpressure_below[0][row])
    assert np.allclose(x_drawn, field.x_below.m_as("m")[0][row])
    assert "[m]" in drawn.ax.get_xlabel()
    plt.close(drawn.figure)
    with pytest.raises(InvalidInputError, match="sides"):
        draw_pressure_signature(field, sides="left")
    with pytest.raises(InvalidInputError, match="field"):
        draw_pressure_signature(42)


def test_tables_and_datasets_name_their_axes():
    field = section_near_field(Section.biconvex(0.05, n=16), 2.0, 0.02, [1.0, 2.0, 4.0])
    dataset = field.to_xarray()
    assert dataset["overpressure_below"].dims == ("distance", "sample_below")
    assert dataset["p_upper"].dims == ("panel_upper",)
    assert dataset["x_above"].attrs["units"] == "chord"
    assert dataset["leading_shock_below.pressure_ratio"].size == field.leading_shock_below.x.size
    frame = field.leading_shock_below.to_dataframe()
    assert len(frame) == field.leading_shock_below.x.size


@pytest.mark.parametrize("alpha_deg", [-2.0, 0.5, 3.0])
def test_mirrored_section_at_opposite_incidence_swaps_the_sides(alpha_deg):
    # an invented cambered fin: reflecting the section in its chord and the incidence in the
    # flight direction reflects the whole field (a symmetry of the planar equations)
    fin = Section.from_points([(0, 0), (0.3, 0.035), (0.7, 0.03), (1, 0)],
                              [(0, 0), (0.4, -0.015), (1, 0)])
    alpha = math.radians(alpha_deg)
    field = section_near_field(fin, 2.3, alpha, [1.5, 6.0])
    mirror = section_near_field(fin.mirrored(), 2.3, -alpha, [1.5, 6.0])
    assert mirror.cl == pytest.approx(-field.cl, abs=1e-13)
    assert mirror.cd == pytest.approx(field.cd, rel=1e-12)
    assert np.allclose(mirror.overpressure_above, field.overpressure_below, equal_nan=True,
                       rtol=1e-12, atol=1e-14)
    assert np.allclose(mirror.x_below, field.x_above, equal_nan=True, rtol=1e-12)
    for ours, theirs in ((mirror.leading_shock_above, field.leading_shock_below),
                         (mirror.trailing_shock_below, field.trailing_shock_above)):
        assert np.allclose(ours.y, -theirs.y, rtol=1e-12, atol=1e-14)
        assert np.allclose(ours.pressure_ratio, theirs.pressure_ratio, rtol=1e-12)
