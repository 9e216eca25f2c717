"""Tests of gasdyn2d.plot: every figure rendered with Agg to PNG, and what was drawn checked.

Reference values are independent of the plotted code paths: the oblique-shock
wave angle from scipy's brentq on the θ-β-M relation, Mach angles from
μ = asin(1/M), and published values from NACA Report 1135 and the section
theories in /work/shared/SOURCES.md.
"""

import subprocess
import sys

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
from scipy.optimize import brentq  # noqa: E402

from gasdyn2d.errors import InvalidInputError  # noqa: E402
from gasdyn2d.characteristics.jets import underexpanded_slot_jet  # noqa: E402
from gasdyn2d.characteristics.nozzles import minimum_length_nozzle  # noqa: E402
from gasdyn2d.plot import (PALETTE, WAVE_STYLES, Drawing, draw_characteristic_net,  # noqa: E402
                           draw_pattern_polars, draw_polars, draw_surface_pressures,
                           draw_wave_pattern, tour_figure)
from gasdyn2d.patterns.graph import WavePattern  # noqa: E402
from gasdyn2d.design.sections import Section  # noqa: E402

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


def save_png(ax, tmp_path, name):
    path = tmp_path / f"{name}.png"
    ax.figure.savefig(path, dpi=60)
    assert path.read_bytes()[:8] == PNG_SIGNATURE
    return path


def weak_wave_angle(M, theta, g=1.4):
    """Independent reference: weak-branch β by brentq on the θ-β-M relation.

    NACA Report 1135, eq. 138 (the θ-β-M relation).
    """
    def residual(beta):
        return (2 / np.tan(beta) * (M**2 * np.sin(beta)**2 - 1)
                / (M**2 * (g + np.cos(2 * beta)) + 2)) - np.tan(theta)
    mu = np.arcsin(1 / M)
    grid = np.linspace(mu + 1e-9, np.pi / 2, 2001)
    vals = 2 / np.tan(grid) * (M**2 * np.sin(grid)**2 - 1) / (M**2 * (g + np.cos(2 * grid)) + 2)
    top = grid[np.argmax(vals)]
    return brentq(residual, mu + 1e-12, top, xtol=1e-15)


# ------------------------------------------------------------------ packaging


def test_importing_the_core_does_not_import_matplotlib():
    code = "import sys, gasdyn2d; assert 'matplotlib' not in sys.modules, 'matplotlib imported'"
    subprocess.run([sys.executable, "-c", code], check=True)


def test_plot_without_matplotlib_names_the_extra():
    code = ("import sys; sys.modules['matplotlib'] = None\n"
            "try:\n    import gasdyn2d.plot\nexcept ImportError as e:\n    print(e)\n")
    out = subprocess.run([sys.executable, "-c", code], check=True, capture_output=True,
                         text=True).stdout
    assert "gasdyn2d[plot]" in out and "matplotlib" in out


def test_palette_is_okabe_ito():
    # Okabe & Ito (2008), Color Universal Design: the eight colours (hex values from memory)
    assert PALETTE["vermillion"] == "#D55E00" and PALETTE["blue"] == "#0072B2"
    assert len(set(PALETTE.values())) == 8


# ------------------------------------------------------------------ polars


def test_polar_of_mach_2_reaches_published_extremes(tmp_path):
    drawn = draw_polars(2.0, n=301)
    (shock,) = drawn["shock_polars"]
    x, y = shock.get_data()
    # NACA Report 1135, Table II, M = 2.0: normal-shock p2/p1 = 4.5000
    assert np.max(y) == pytest.approx(4.5, rel=1e-12)
    # SOURCES.md (computed), M = 2: θmax = 22.9735°
    assert np.max(x) == pytest.approx(22.9735, abs=1e-3)
    assert np.min(x) == pytest.approx(-22.9735, abs=1e-3)
    assert len(drawn["expansion_branches"]) == 2
    for branch in drawn["expansion_branches"]:
        bx, by = branch.get_data()
        assert by[0] == pytest.approx(1.0) and by[-1] == pytest.approx(0.2)
        assert branch.get_linestyle() != "-"
    ax = drawn["ax"]
    assert ax.get_xlabel() == "flow direction [deg]"
    assert "pressure" in ax.get_ylabel() and "[-]" in ax.get_ylabel()
    save_png(ax, tmp_path, "polar")


def test_polars_in_radians_and_several_streams(tmp_path):
    drawn = draw_polars([2.0, 3.0, 1.5], angle_unit="rad", labels=["a", "b", "c"])
    assert len(drawn["shock_polars"]) == 3 and len(drawn["expansion_branches"]) == 6
    assert drawn["ax"].get_xlabel() == "flow direction [rad]"
    colours = {line.get_color() for line in drawn["shock_polars"]}
    assert len(colours) == 3
    x, _ = drawn["shock_polars"][0].get_data()
    assert np.max(x) == pytest.approx(np.radians(22.9735), abs=2e-5)  # SOURCES.md, θmax M = 2
    with pytest.raises(ValueError, match="angle_unit"):
        draw_polars(2.0, angle_unit="grad")
    save_png(drawn["ax"], tmp_path, "polars_rad")


def test_polars_of_quantity_states_and_awkward_inputs(tmp_path):
    from gasdyn2d import FlowState, ureg

    # invented: a Mach 2 stream at 50 kPa, 5° up, and a Mach 3 one at 20 kPa
    streams = [FlowState(2.0, 50 * ureg.kPa, 220 * ureg.K, 5 * ureg.deg),
               FlowState(3.0, 20e3, 220.0)]
    drawn = draw_polars(streams, marks=[(5 * ureg.deg, 1.0)], log_pressure=True)
    x, y = drawn["shock_polars"][0].get_data()
    assert np.max(y) == pytest.approx(4.5)  # NACA Report 1135, Table II, M = 2: p2/p1 = 4.5
    assert x[np.argmax(y)] == pytest.approx(5.0, abs=0.05)  # the top sits on the stream direction
    x3, y3 = drawn["shock_polars"][1].get_data()
    # NACA Report 1135, Table II, M = 3: p2/p1 = 10.333, scaled by 20/50 kPa
    assert np.max(y3) == pytest.approx(10.3333 * 0.4, rel=1e-5)
    mx, my = drawn["marks"][0].get_data()
    assert (mx[0], my[0]) == pytest.approx((5.0, 1.0))
    assert drawn["ax"].get_yscale() == "log"
    save_png(drawn["ax"], tmp_path, "quantity_polars")
    assert len(draw_polars(np.array([2.0, 2.5]))["shock_polars"]) == 2
    assert len(draw_polars(np.float64(2.0))["shock_polars"]) == 1
    with pytest.raises(ValueError, match="at least one"):
        draw_polars([])
    with pytest.raises(ValueError, match="batch FlowState"):
        draw_polars(FlowState(np.array([2.0, 3.0]), 1e5, 300.0))


def crossing_pattern(upper_deg=8.0, lower_deg=5.0, M=2.4):
    """Invented edge case: two wedge shocks crossing in a Mach 2.4 test section."""
    p = WavePattern(M)
    p.add_wave("upper shock", upstream="1", downstream="2", family="right",
               turn=np.radians(-upper_deg), start=(0.0, 1.0))
    p.add_wave("lower shock", upstream="1", downstream="3", family="left",
               turn=np.radians(lower_deg), start=(0.0, 0.0))
    p.add_wave("through 2", upstream="2", downstream="4", family="left")
    p.add_wave("through 3", upstream="3", downstream="5", family="right")
    p.add_slip_line("4", "5")
    return p.solve()


def _pressure_on_weak_branch(line, x_mark):
    """Lowest pressure where a drawn shock polar crosses the direction x_mark (weak branch)."""
    x, y = line.get_data()
    cross = np.nonzero((x[:-1] - x_mark) * (x[1:] - x_mark) <= 0)[0]
    t = (x_mark - x[cross]) / (x[cross + 1] - x[cross])
    return float(np.min(y[cross] + t * (y[cross + 1] - y[cross])))


def test_marked_slip_line_state_lies_on_both_polars(tmp_path):
    solution = crossing_pattern()
    drawn = draw_pattern_polars(solution, ["2", "3"], marks=["4"], n=2001)
    (mark,) = drawn["marks"]
    xm, ym = (float(v[0]) for v in mark.get_data())
    for line in drawn["shock_polars"]:
        # the polar of each side, at the mark's direction, passes through the mark
        assert _pressure_on_weak_branch(line, xm) == pytest.approx(ym, rel=2e-4)
    assert drawn["mark_texts"][0].get_text() == "4"
    assert "region 2" in drawn["ax"].get_ylabel()
    save_png(drawn["ax"], tmp_path, "crossing_polars")


def test_pattern_polars_relative_to_inflow():
    solution = crossing_pattern()
    drawn = draw_pattern_polars(solution, ["1"], marks=["2", "3"])
    assert drawn["ax"].get_ylabel() == "static pressure / inflow pressure [-]"
    for mark, region in zip(drawn["marks"], ("2", "3")):
        x, y = mark.get_data()
        assert y[0] == pytest.approx(float(solution.region(region).p_ratio), rel=1e-12)
        assert x[0] == pytest.approx(np.degrees(float(solution.region(region).direction)))


# ------------------------------------------------------------------ wave patterns


RAMP = np.radians(6.0)


def duct_reflection(ramp=RAMP, M=2.6):
    """Invented: a 6° ramp in a unit-height Mach 2.6 duct; the shock reflects from the roof."""
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    walls = [([-0.5, 0.0, 5.0], [0.0, 0.0, 5.0 * np.tan(ramp)]), ([-0.5, 5.0], [1.0, 1.0])]
    return p.solve(), walls


def test_duct_reflection_geometry(tmp_path):
    solution, walls = duct_reflection()
    drawn = draw_wave_pattern(solution, walls=walls)
    assert sorted(drawn["shocks"]) == ["ramp shock", "reflected"]
    assert drawn["fans"] == {} and drawn["slip_lines"] == {}
    # the ramp shock meets the roof y = 1 at x = 1/tan β, β the weak wave angle of (2.6, 6°)
    beta = weak_wave_angle(2.6, RAMP)
    x, y = drawn["shocks"]["ramp shock"].get_data()
    assert (x[1], y[1]) == pytest.approx((1.0 / np.tan(beta), 1.0), rel=1e-9)
    # the reflected shock leaves the roof at its own weak angle to the region-2 stream
    # and ends on the ramp surface y = x tan(6°)
    beta_r = weak_wave_angle(float(solution.region("2").M), RAMP)
    rx, ry = drawn["shocks"]["reflected"].get_data()
    assert np.arctan2(ry[1] - ry[0], rx[1] - rx[0]) == pytest.approx(-(beta_r - RAMP), rel=1e-9)
    assert ry[1] == pytest.approx(rx[1] * np.tan(RAMP), abs=1e-12)
    ax = drawn["ax"]
    assert ax.get_xlim() == pytest.approx((-0.5, 5.0))
    assert ax.get_xlabel() == "x [m]" and ax.get_ylabel() == "y [m]"
    assert len(drawn["walls"]) == 2
    labels = {k: t.get_text() for k, t in drawn["labels"].items()}
    assert labels["3"] == f"3\nM {float(solution.region('3').M):.3f}"
    # region labels sit in their regions: region 2 between the two shocks
    lx, ly = drawn["labels"]["2"].get_position()
    assert lx > ly / np.tan(beta) and ly < 1.0
    save_png(ax, tmp_path, "duct_reflection")


def test_crossing_has_four_shocks_and_a_dashed_slip_line(tmp_path):
    solution = crossing_pattern()
    walls = [([-0.5, 0.0, 4.0], [1.0, 1.0, 1.0 - 4.0 * np.tan(np.radians(8.0))]),
             ([-0.5, 0.0, 4.0], [0.0, 0.0, 4.0 * np.tan(np.radians(5.0))])]
    drawn = draw_wave_pattern(solution, walls=walls)
    assert len(drawn["shocks"]) == 4 and len(drawn["fans"]) == 0
    (slip,) = drawn["slip_lines"].values()
    assert slip.get_linestyle() == "--"
    # the incident shocks end where they cross; the slip line starts there
    ux, uy = drawn["shocks"]["upper shock"].get_data()
    lx, ly = drawn["shocks"]["lower shock"].get_data()
    assert (ux[1], uy[1]) == pytest.approx((lx[1], ly[1]), abs=1e-12)
    sx, sy = slip.get_data()
    assert (sx[0], sy[0]) == pytest.approx((ux[1], uy[1]), abs=1e-12)
    direction = np.arctan2(sy[1] - sy[0], sx[1] - sx[0])
    assert direction == pytest.approx(float(solution.region("4").direction), abs=1e-12)
    # crossing point from the two wave angles (independent brentq reference)
    bu, bl = weak_wave_angle(2.4, np.radians(8.0)), weak_wave_angle(2.4, np.radians(5.0))
    x_cross = 1.0 / (np.tan(bu) + np.tan(bl))
    assert ux[1] == pytest.approx(x_cross, rel=1e-9)
    save_png(drawn["ax"], tmp_path, "crossing")


def test_expansion_corner_fans_run_from_head_to_tail_mach_line(tmp_path):
    """Invented edge case: a 10° expansion corner at Mach 2 in a duct; it reflects as a fan."""
    p = WavePattern(2.0)
    p.add_wave("corner fan", upstream="1", downstream="2", family="left",
               turn=np.radians(-10.0), start=(0.0, 0.0))
    p.add_wave("reflected fan", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    solution = p.solve()
    down = -4.0 * np.tan(np.radians(10.0))
    walls = [([-1.0, 0.0, 4.0], [0.0, 0.0, down]), ([-1.0, 4.0], [1.0, 1.0])]
    drawn = draw_wave_pattern(solution, walls=walls, n_fan_rays=6)
    assert len(drawn["fans"]) == 2 and len(drawn["shocks"]) == 0
    segments = drawn["fans"]["corner fan"].get_segments()
    assert len(segments) == 6
    head, tail = segments[0], segments[-1]
    angle = lambda s: np.arctan2(s[1, 1] - s[0, 1], s[1, 0] - s[0, 0])  # noqa: E731
    # head: Mach angle of M = 2, asin(1/2) = 30° (fact of the trade)
    assert angle(head) == pytest.approx(np.radians(30.0), rel=1e-12)
    M2 = float(solution.region("2").M)
    assert angle(tail) == pytest.approx(np.arcsin(1.0 / M2) - np.radians(10.0), rel=1e-12)
    # every ray of the corner fan ends on the roof
    assert all(s[1, 1] == pytest.approx(1.0) for s in segments)
    widths = drawn["fans"]["corner fan"].get_linewidths()
    assert widths[0] > widths[1]  # head and tail drawn heavier than the inner rays
    save_png(drawn["ax"], tmp_path, "corner_fans")


def test_wave_pattern_errors_and_batch_case(tmp_path):
    p = WavePattern(np.array([2.2, 2.6, 3.0]))
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=RAMP)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    solution = p.solve()
    walls = [([-0.5, 0.0, 5.0], [0.0, 0.0, 5.0 * np.tan(RAMP)]), ([-0.5, 5.0], [1.0, 1.0])]
    with pytest.raises(ValueError, match="no start point"):
        draw_wave_pattern(solution, walls=walls)
    drawn = draw_wave_pattern(solution, walls=walls, starts={"ramp shock": (0.0, 0.0)},
                              case=(2,))
    x, _ = drawn["shocks"]["ramp shock"].get_data()
    assert x[1] == pytest.approx(1.0 / np.tan(weak_wave_angle(3.0, RAMP)), rel=1e-9)
    with pytest.raises(ValueError, match="n_fan_rays"):
        draw_wave_pattern(solution, walls=walls, n_fan_rays=1)
    # invented edge case: a batch where one case detaches (Mach 1.3 cannot turn 6° twice)
    q = WavePattern(np.array([1.3, 2.6]))
    q.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=RAMP,
               start=(0.0, 0.0))
    q.add_wave("reflected", upstream="2", downstream="3", family="right")
    q.add_wall("3", direction=0.0)
    partly = q.solve(errors="nan")
    assert list(partly.ok) == [False, True]
    with pytest.raises(InvalidInputError, match="solution must be solved for the case drawn"):
        draw_wave_pattern(partly, walls=walls, case=(0,))
    assert len(draw_wave_pattern(partly, walls=walls, case=(1,))["shocks"]) == 2
    save_png(drawn["ax"], tmp_path, "batch_case")


# ------------------------------------------------------------------ characteristic nets


def test_nozzle_net(tmp_path):
    nozzle = minimum_length_nozzle(2.4, n_characteristics=12)
    drawn = draw_characteristic_net(nozzle)
    net = nozzle.net
    assert len(drawn["plus_lines"].get_segments()) == len(net.plus_segments)
    assert len(drawn["minus_lines"].get_segments()) == len(net.minus_segments)
    colours = drawn["plus_lines"].get_array()
    assert np.nanmin(colours) >= 1.0 and np.nanmax(colours) == pytest.approx(2.4, rel=1e-9)
    (wall,) = drawn.walls
    (centreline,) = drawn.centrelines  # a symmetry line, not a wall
    assert centreline.get_linestyle() != wall.get_linestyle()
    wx, wy = wall.get_data()
    assert wx[-1] == pytest.approx(float(nozzle.length)) and wy[-1] == pytest.approx(
        float(nozzle.exit_half_height))
    assert list(centreline.get_ydata()) == [0.0, 0.0]
    bar = drawn["colourbar"]
    assert bar.orientation == "vertical"  # beside the axes, clear of the x label
    assert bar.ax.get_ylabel() == "Mach number [-]"
    assert bar.vmin == pytest.approx(float(np.min(net.mach))) and bar.vmax == pytest.approx(2.4)
    ax = drawn["ax"]
    assert ax.get_xlim()[1] >= float(nozzle.length) and ax.get_xlabel() == "x [m]"
    save_png(ax, tmp_path, "nozzle_net")


def test_jet_net_boundary_dashed_and_shock_marked(tmp_path):
    jet = underexpanded_slot_jet(1.5, 2.0, n_characteristics=10)
    drawn = draw_characteristic_net(jet, colourbar=False)
    (boundary,) = drawn["boundaries"]
    assert boundary.get_linestyle() == "--"
    bx, by = boundary.get_data()
    assert np.array_equal(bx, np.asarray(jet.boundary_x))
    assert drawn["colourbar"] is None
    if jet.shock_formed:
        assert drawn["shock"].get_xdata()[0] == pytest.approx(float(jet.shock_x))
    save_png(drawn["ax"], tmp_path, "jet_net")


def test_rounded_throat_and_channel_nets(tmp_path):
    from gasdyn2d.characteristics.channels import channel_flow
    from gasdyn2d.characteristics.unit_processes import WallContour
    from gasdyn2d.characteristics.nozzles import rounded_throat_nozzle

    nozzle = rounded_throat_nozzle(2.0, n_points=9)
    drawn = draw_characteristic_net(nozzle)
    wx, wy = drawn["walls"][0].get_data()
    assert wx[-1] == pytest.approx(float(nozzle.length)) and wy[-1] == pytest.approx(
        float(nozzle.exit_half_height))
    save_png(drawn["ax"], tmp_path, "rounded_throat_net")
    # invented edge case: a 4° expansion bend in the roof of a Mach 2 channel of unit height
    lower, upper = WallContour.straight(0.0), WallContour.bend(1.0, 0.5, np.radians(4.0), 0.5)
    channel = channel_flow(2.0, lower_wall=lower, upper_wall=upper, length=3.0, n_points=9)
    drawn = draw_characteristic_net(channel, walls=[lower, upper])
    assert len(drawn["walls"]) == 2
    ux, uy = drawn["walls"][1].get_data()
    assert uy == pytest.approx(upper.height(ux))
    assert ux[-1] == pytest.approx(float(np.max(channel.net.x)))
    assert len(drawn["plus_lines"].get_segments()) == len(channel.net.plus_segments)
    save_png(drawn["ax"], tmp_path, "channel_net")


def test_net_needs_a_net():
    with pytest.raises(InvalidInputError, match="result must be .* characteristic net"):
        draw_characteristic_net(object())


# ------------------------------------------------------------------ section pressures


def test_flat_plate_pressures_match_ackeret(tmp_path):
    alpha = np.radians(3.0)
    drawn = draw_surface_pressures(Section.flat_plate(), 2.0, alpha)
    # Ackeret (1925), SOURCES.md: cp = 2θ/√(M²-1), θ = -α upper, +α lower
    cp = 2 * alpha / np.sqrt(3.0)
    upper = drawn["upper"]["linear"].get_data()
    lower = drawn["lower"]["linear"].get_data()
    assert upper.values == pytest.approx([-cp], rel=1e-12)
    assert lower.values == pytest.approx([cp], rel=1e-12)
    assert list(upper.edges) == [0.0, 1.0]
    # Busemann second order: cp = C1 θ + C2 θ², C2(M = 2) = 1.46667 (SOURCES.md)
    second = drawn["upper"]["second-order"].get_data().values[0]
    assert second == pytest.approx(-cp + 1.46667 * alpha**2, rel=1e-5)
    ax = drawn["ax"]
    assert ax.yaxis_inverted() and ax.get_xlim() == (0.0, 1.0)
    assert ax.get_xlabel() == "x / chord [-]" and "cp" in ax.get_ylabel()
    outline = drawn["outline"]
    assert outline is not None and outline is not ax
    (patch,) = outline.patches
    assert patch.get_gid() == "section outline"
    save_png(ax, tmp_path, "flat_plate")


def test_double_wedge_steps_and_theory_choice(tmp_path):
    section = Section.double_wedge(0.06, ridge=0.4)
    _, ax = plt.subplots()
    drawn = draw_surface_pressures(section, 2.5, 0.0, theories=("shock-expansion",), ax=ax)
    steps = drawn["upper"]["shock-expansion"].get_data()
    assert list(steps.edges) == pytest.approx([0.0, 0.4, 1.0])
    # oblique shock on the front face: p2/p1 from the loads equals the NACA 1135 eq. 128 form
    theta = np.arctan(0.03 / 0.4)
    beta = weak_wave_angle(2.5, theta)
    p2 = 1 + 2 * 1.4 / 2.4 * (2.5**2 * np.sin(beta)**2 - 1)
    assert steps.values[0] == pytest.approx((p2 - 1) / (0.7 * 2.5**2), rel=1e-9)
    assert steps.values[1] < 0  # expansion at the ridge
    assert set(drawn["upper"]) == {"shock-expansion"} and drawn["outline"] is None
    with pytest.raises(ValueError, match="theories"):
        draw_surface_pressures(section, 2.5, 0.0, theories=("panel",))
    save_png(drawn["ax"], tmp_path, "double_wedge")


# ------------------------------------------------------------------ tour


def test_tour_figure_saves_a_png(tmp_path):
    path = tmp_path / "tour.png"
    figure = tour_figure(path)
    assert path.read_bytes()[:8] == PNG_SIGNATURE
    left, right = figure.axes[:2]
    assert len(left.lines) >= 3 and right.get_xlabel() == "x [m]"


# ------------------------------------------------------------------ properties

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=15, deadline=None)
@given(M=st.floats(1.8, 4.0), ramp_deg=st.floats(1.0, 9.0), height=st.floats(0.05, 2.0))
def test_duct_lines_end_on_their_walls(M, ramp_deg, height):
    """Property: the ramp shock ends on the roof and the reflection on the ramp, at any scale."""
    ramp = np.radians(ramp_deg)
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    solution = p.solve(errors="nan")
    if not solution.ok:
        return  # the reflection detaches: nothing regular to draw
    length = 60.0 * height
    walls = [([-height, 0.0, length], [0.0, 0.0, length * np.tan(ramp)]),
             ([-height, length], [height, height])]
    drawn = draw_wave_pattern(solution, walls=walls)
    (x0, y0, x1, y1), = drawn["lines"]["ramp shock"]
    assert y1 == pytest.approx(height, rel=1e-9)
    assert x1 == pytest.approx(height / np.tan(weak_wave_angle(M, ramp)), rel=1e-8)
    (_, _, rx, ry), = drawn["lines"]["reflected"]
    assert ry == pytest.approx(rx * np.tan(ramp), rel=1e-9, abs=1e-12 * height)
    plt.close("all")


def test_free_boundary_reflects_a_shock_as_a_fan(tmp_path):
    """Invented edge case: a 5° shock inside a Mach 2 jet meets the jet edge at y = 1."""
    p = WavePattern(2.0)
    p.add_wave("shock", upstream="1", downstream="2", family="left", turn=np.radians(5.0),
               start=(0.0, 0.0))
    p.add_wave("edge fan", upstream="2", downstream="3", family="right")
    p.add_free_boundary("3", 1.0)  # back to the jet's own pressure
    solution = p.solve()
    edge = ([-0.5, 4.0], [1.0, 1.0])
    drawn = draw_wave_pattern(solution, walls=[([-0.5, 4.0], [0.0, 0.0])],
                              free_boundaries=[edge])
    assert len(drawn["shocks"]) == 1 and len(drawn["fans"]) == 1
    (boundary,) = drawn["free_boundaries"]
    assert boundary.get_color() == WAVE_STYLES["free boundary"]["color"]
    # the shock ends on the jet edge, where the fan starts
    x, y = drawn["shocks"]["shock"].get_data()
    assert y[1] == pytest.approx(1.0)
    fan = drawn["fans"]["edge fan"].get_segments()
    assert all(s[0] == pytest.approx([x[1], y[1]]) for s in fan)
    save_png(drawn["ax"], tmp_path, "free_boundary")


# ------------------------------------------------------------------ public accessors only


def test_plot_package_reads_no_private_solution_attributes():
    # the drawings use PatternSolution's public accessors (connection, slip_lines, gamma, ...)
    import pathlib

    import gasdyn2d.plot as plot_package
    for path in pathlib.Path(plot_package.__file__).parent.glob("*.py"):
        text = path.read_text()
        for private in ("._pattern", "._waves", "._conditions", "._regions", "._links"):
            assert private not in text, f"{path.name} reads {private}"


def test_reflection_placed_by_the_solution_is_drawn_from_the_wall_point(tmp_path):
    # invented: the 6° ramp duct, the roof given to the pattern with through=(0, 1)
    p = WavePattern(2.6)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=RAMP,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0, through=(0.0, 1.0))
    solution = p.solve()
    walls = [([-0.5, 0.0, 5.0], [0.0, 0.0, 5.0 * np.tan(RAMP)]), ([-0.5, 5.0], [1.0, 1.0])]
    drawn = draw_wave_pattern(solution, walls=walls)
    beta = weak_wave_angle(2.6, RAMP)
    rx, ry = drawn["shocks"]["reflected"].get_data()
    assert (rx[0], ry[0]) == pytest.approx((1.0 / np.tan(beta), 1.0), rel=1e-9)
    # the label of region 2 is the solution's own point, inside region 2
    assert drawn["labels"]["2"].get_position() == pytest.approx(
        solution.region_label_point("2"), rel=1e-12)
    lx, ly = drawn["labels"]["2"].get_position()
    assert lx * np.tan(RAMP) < ly < min(1.0, lx * np.tan(beta))
    save_png(drawn["ax"], tmp_path, "duct_reflection_placed")


def test_crossing_waves_start_at_the_crossing_point():
    solution = crossing_pattern()  # wedge tips at (0, 1) and (0, 0)
    bu, bl = weak_wave_angle(2.4, np.radians(8.0)), weak_wave_angle(2.4, np.radians(5.0))
    x = 1.0 / (np.tan(bu) + np.tan(bl))  # y = x tan βl = 1 - x tan βu
    drawn = draw_wave_pattern(solution, extent=(-0.5, 6.0, -0.1, 1.1))
    for name in ("through 2", "through 3"):
        sx, sy = drawn["shocks"][name].get_data()
        assert (sx[0], sy[0]) == pytest.approx((x, x * np.tan(bl)), rel=1e-9)


def test_pattern_polars_use_the_solution_gamma():
    # invented: a γ = 1.3 stream; the drawn free-stream polar reaches θmax(M, 1.3)
    from scipy.optimize import minimize_scalar

    M, g = 2.4, 1.3
    p = WavePattern(M, gamma=g)
    p.add_wave("wedge", upstream="1", downstream="2", family="left", turn=np.radians(8.0))
    solution = p.solve()

    def minus_theta(beta):  # θ-β-M relation, NACA Report 1135, eq. 138
        return -np.arctan(2 / np.tan(beta) * (M**2 * np.sin(beta)**2 - 1)
                          / (M**2 * (g + np.cos(2 * beta)) + 2))
    best = minimize_scalar(minus_theta, bounds=(np.arcsin(1 / M), np.pi / 2), method="bounded",
                           options={"xatol": 1e-12})
    theta_max = np.degrees(-best.fun)
    drawn = draw_pattern_polars(solution, ["1"], marks=["2"], n=4001)
    x, _ = drawn["shock_polars"][0].get_data()
    assert np.max(x) == pytest.approx(theta_max, rel=1e-4)
    old = draw_pattern_polars(solution, ["1"], gamma=1.4, n=4001)  # the keyword still works
    assert np.max(old["shock_polars"][0].get_data()[0]) < theta_max - 0.1


def test_channel_net_draws_its_own_walls(tmp_path):
    from gasdyn2d.characteristics.channels import channel_flow
    from gasdyn2d.characteristics.unit_processes import WallContour

    # invented: a 4° expansion bend in the roof of a Mach 2 channel of unit height
    lower, upper = WallContour.straight(0.0), WallContour.bend(1.0, 0.5, np.radians(4.0), 0.5)
    channel = channel_flow(2.0, lower_wall=lower, upper_wall=upper, length=3.0, n_points=9)
    drawn = draw_characteristic_net(channel)
    assert len(drawn["walls"]) == 2
    for line, wall, nodes_x in zip(drawn["walls"], (lower, upper),
                                   (channel.lower_wall_x, channel.upper_wall_x)):
        wx, wy = line.get_data()
        assert wy == pytest.approx(wall.height(wx), abs=1e-12)  # on the contour
        np.testing.assert_array_equal(wx, nodes_x)  # through the wall nodes of the march
        assert wx[-1] >= 3.0  # the march reached the channel length
    save_png(drawn["ax"], tmp_path, "channel_net_own_walls")


def test_fitted_channel_draws_its_shocks_and_stations(tmp_path):
    from gasdyn2d.characteristics.channels import channel_flow
    from gasdyn2d.characteristics.unit_processes import WallContour

    # invented: a Mach 2.4 duct 50 mm high whose roof turns 8° into the flow over a 10 mm arc
    lower = WallContour.straight(0.0)
    upper = WallContour.bend(0.05, 0.1, np.radians(-8.0), 0.01)
    channel = channel_flow(2.4, lower_wall=lower, upper_wall=upper, length=0.6, n_points=21)
    assert channel.shocks  # the net folded: the channel was marched with fitted shocks
    drawn = draw_characteristic_net(channel, length_unit="mm")
    assert drawn["plus_lines"] is None and drawn["station_lines"] is not None
    assert len(drawn["shocks"]) == len(channel.shocks)
    for line, shock in zip(drawn["shocks"], channel.shocks):
        sx, sy = line.get_data()
        np.testing.assert_allclose(sx, 1e3 * np.asarray(shock.x))  # metres, drawn in mm
        np.testing.assert_allclose(sy, 1e3 * np.asarray(shock.y))
        assert line.get_color() == WAVE_STYLES["shock"]["color"]
    assert drawn["shock"] is None  # no "shock forms" marker beside the drawn shocks
    assert "shock" in [t.get_text() for t in drawn["legend"].get_texts()]
    save_png(drawn["ax"], tmp_path, "fitted_channel")


# ------------------------------------------------------------------ issue 14: rendered checks
# Each figure is rendered with Agg to PNG; the bounding boxes of what was drawn are then
# read from the renderer in display pixels.


def rendered(drawing, tmp_path, name):
    """Save the drawing's figure as PNG at its own dpi and return the renderer of that draw
    (window extents are then in the pixels of the saved picture)."""
    path = tmp_path / f"{name}.png"
    drawing.figure.savefig(path, dpi="figure")
    assert path.read_bytes()[:8] == PNG_SIGNATURE
    return drawing.figure.canvas.get_renderer()


def overlap(a, b):
    """True when two display bounding boxes share area (touching edges do not count)."""
    return a.x0 < b.x1 - 0.5 and b.x0 < a.x1 - 0.5 and a.y0 < b.y1 - 0.5 and b.y0 < a.y1 - 0.5


def merging_ramps(M=2.2):
    """Invented: a two-ramp intake off design; the ramp shocks meet ahead of the cowl."""
    first, second = np.radians(7.0), np.radians(8.0)
    corner = (0.30 * np.cos(first), 0.30 * np.sin(first))
    p = WavePattern(M)
    p.add_wave("first ramp shock", upstream="1", downstream="2", family="left", turn=first,
               start=(0.0, 0.0))
    p.add_wave("second ramp shock", upstream="2", downstream="3", family="left", turn=second,
               start=corner)
    p.add_wave("merged shock", upstream="1", downstream="4", family="left")
    p.add_wave("reflected wave", upstream="3", downstream="5", family="right")
    p.add_slip_line("4", "5")
    ramp = ([-0.05, 0.0, corner[0], corner[0] + 0.4 * np.cos(first + second)],
            [0.0, 0.0, corner[1], corner[1] + 0.4 * np.sin(first + second)])
    return p.solve(), ramp


def test_drawings_have_a_short_repr_and_roles(tmp_path):
    solution, walls = duct_reflection()
    drawn = draw_wave_pattern(solution, walls=walls)
    assert isinstance(drawn, Drawing) and drawn.function == "draw_wave_pattern"
    text = repr(drawn)
    assert text.startswith("<Drawing of draw_wave_pattern:") and "\n" not in text
    assert len(text) < 160 and "shocks ×2" in text
    assert drawn.shocks is drawn["shocks"] and drawn.figure is drawn.ax.figure
    with pytest.raises(KeyError, match="roles"):
        drawn["colourbar"]
    pressures = draw_surface_pressures(Section.double_wedge(0.05), 2.0, np.radians(2.0))
    assert len(repr(pressures)) < 160  # the loads are not printed in full


def test_keyword_arguments_reach_the_artists():
    polars = draw_polars([2.0, 3.0], linewidth=3.5, alpha=0.4)
    assert all(line.get_linewidth() == 3.5 and line.get_alpha() == 0.4
               for line in polars.shock_polars + polars.expansion_branches)
    solution, walls = duct_reflection()
    pattern = draw_wave_pattern(solution, walls=walls, alpha=0.5, zorder=7)
    assert all(s.get_alpha() == 0.5 and s.get_zorder() == 7 for s in pattern.shocks.values())
    assert all(w.get_alpha() is None for w in pattern.walls)  # walls keep the house style
    net = draw_characteristic_net(minimum_length_nozzle(2.0, n_characteristics=6),
                                  linewidths=0.3, cmap="viridis")
    assert net.plus_lines.get_linewidths()[0] == 0.3
    assert net.minus_lines.get_cmap().name == "viridis"
    cp = draw_surface_pressures(Section.flat_plate(), 2.0, np.radians(2.0), linewidth=2.5)
    assert all(p.get_linewidth() == 2.5 for p in cp.upper.values())
    with pytest.raises(InvalidInputError, match="'colour_of_shock'"):
        draw_polars(2.0, colour_of_shock="red")


def _pattern_with_failed_case():
    q = WavePattern(np.array([1.3, 2.6]))  # invented: Mach 1.3 cannot turn 6° twice
    q.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=RAMP,
               start=(0.0, 0.0))
    q.add_wave("reflected", upstream="2", downstream="3", family="right")
    q.add_wall("3", direction=0.0)
    return q.solve(errors="nan")


@pytest.mark.parametrize("call, argument", [
    (lambda: draw_wave_pattern(None), "solution"),
    (lambda: draw_wave_pattern(duct_reflection()[0], walls=[([0.0], [1.0])]), "walls"),
    (lambda: draw_wave_pattern(duct_reflection()[0], walls=[(0.0, 1.0, 2.0)]), "walls"),
    (lambda: draw_wave_pattern(duct_reflection()[0], extent=(1.0, 0.0, 0.0, 1.0)), "extent"),
    (lambda: draw_wave_pattern(duct_reflection()[0], extent=(0.0, 1.0)), "extent"),
    (lambda: draw_wave_pattern(duct_reflection()[0], walls=duct_reflection()[1],
                               length_unit="furlong"), "length_unit"),
    (lambda: draw_wave_pattern(duct_reflection()[0], walls=duct_reflection()[1],
                               n_fan_rays=1.5), "n_fan_rays"),
    (lambda: draw_wave_pattern(_pattern_with_failed_case(), walls=duct_reflection()[1],
                               case=(5,)), "case"),
    (lambda: draw_wave_pattern(duct_reflection()[0], walls=duct_reflection()[1],
                               slip_lines=[("1", "9")]), "slip_lines"),
    (lambda: draw_wave_pattern(duct_reflection()[0], ax="axes"), "ax"),
    (lambda: draw_polars(0.8), "streams"),
    (lambda: draw_polars("fast"), "streams"),
    (lambda: draw_polars([2.0, 3.0], labels=["only one"]), "labels"),
    (lambda: draw_polars(2.0, marks=[(0.1, 1.2)], mark_labels=["a", "b"]), "mark_labels"),
    (lambda: draw_polars(2.0, marks=[0.1]), "marks"),
    (lambda: draw_polars(2.0, n=2), "n"),
    (lambda: draw_polars(2.0, min_pressure_ratio=1.5), "min_pressure_ratio"),
    (lambda: draw_pattern_polars(None, ["1"]), "solution"),
    (lambda: draw_pattern_polars(duct_reflection()[0], []), "regions"),
    (lambda: draw_pattern_polars(_pattern_with_failed_case(), ["1"], case=(3,)), "case"),
    (lambda: draw_characteristic_net(minimum_length_nozzle(2.0, n_characteristics=6),
                                     mach_range=(2.0, 1.0)), "mach_range"),
    (lambda: draw_characteristic_net(minimum_length_nozzle(2.0, n_characteristics=6),
                                     length_unit=3), "length_unit"),
    (lambda: draw_characteristic_net(minimum_length_nozzle(2.0, n_characteristics=6),
                                     walls=[("x", "y")]), "walls"),
    (lambda: draw_surface_pressures("double wedge", 2.0, 0.0), "section"),
    (lambda: draw_surface_pressures(Section.flat_plate(), 2.0, 0.0, theories=()), "theories"),
    (lambda: draw_surface_pressures(Section.flat_plate(), [2.0, 3.0], 0.0), "M and alpha"),
    (lambda: tour_figure("unused.png", dpi=0), "dpi"),
])
def test_argument_errors_name_the_argument(call, argument):
    with pytest.raises(InvalidInputError) as error:
        call()
    assert str(error.value).startswith(f"{argument} must be"), str(error.value)


def test_length_unit_scales_the_data(tmp_path):
    solution, walls = duct_reflection()
    metres = draw_wave_pattern(solution, walls=walls)
    millimetres = draw_wave_pattern(solution, walls=walls, length_unit="mm")
    x_m, y_m = metres.shocks["ramp shock"].get_data()
    x_mm, y_mm = millimetres.shocks["ramp shock"].get_data()
    # the ramp shock meets the roof 1 m up at x = 1/tan β (brentq reference), drawn in mm
    assert x_mm[1] == pytest.approx(1000.0 / np.tan(weak_wave_angle(2.6, RAMP)), rel=1e-9)
    assert np.allclose(x_mm, 1000.0 * x_m) and np.allclose(y_mm, 1000.0 * y_m)
    assert np.allclose(millimetres.walls[1].get_ydata(), 1000.0)
    assert millimetres.ax.get_xlim() == pytest.approx((-500.0, 5000.0))
    assert millimetres.ax.get_xlabel() == "x [mm]"
    assert millimetres.lines["reflected"][0][2] == pytest.approx(
        1000.0 * metres.lines["reflected"][0][2])
    label_m = np.array(metres.labels["2"].get_position())
    assert np.allclose(millimetres.labels["2"].get_position(), 1000.0 * label_m)
    nozzle = minimum_length_nozzle(2.4, n_characteristics=8, throat_half_height=0.01)
    net = draw_characteristic_net(nozzle, length_unit="mm")
    wx, wy = net.walls[0].get_data()
    # the contour ends at the nozzle's length and exit half-height, here in millimetres
    assert wx[-1] == pytest.approx(1000.0 * float(nozzle.length), rel=1e-12)
    assert wy[-1] == pytest.approx(1000.0 * float(nozzle.exit_half_height), rel=1e-12)
    segments = np.concatenate(net.plus_lines.get_segments())
    assert segments[:, 0].max() == pytest.approx(1000.0 * float(np.max(nozzle.net.x)))
    save_png(net.ax, tmp_path, "nozzle_mm")


@pytest.mark.parametrize("figure", ["polars", "pattern", "jet", "pressures", "nozzle"])
def test_legends_and_colour_bars_stay_clear_of_the_data_and_labels(figure, tmp_path):
    if figure == "polars":
        drawn = draw_pattern_polars(crossing_pattern(), ["2", "3"], marks=["4", "5"])
    elif figure == "pattern":
        drawn = draw_wave_pattern(*merging_ramps()[:1], walls=[merging_ramps()[1]])
    elif figure == "jet":
        drawn = draw_characteristic_net(underexpanded_slot_jet(1.5, 2.0, n_characteristics=10))
        assert drawn.shock is not None  # this jet folds: its marker must not enter the key inside
    elif figure == "pressures":
        drawn = draw_surface_pressures(Section.double_wedge(0.045, ridge=0.4), 3.2,
                                       np.radians(4.0))
    else:
        drawn = draw_characteristic_net(minimum_length_nozzle(2.4, n_characteristics=12))
    renderer = rendered(drawn, tmp_path, figure)
    data_area = drawn.ax.get_window_extent(renderer)
    legend = drawn.legend.get_window_extent(renderer)
    assert not overlap(legend, data_area), (legend, data_area)
    for label in (drawn.ax.xaxis.label, drawn.ax.yaxis.label, drawn.ax.title):
        if label.get_text():
            assert not overlap(legend, label.get_window_extent(renderer))
    for tick in drawn.ax.get_xticklabels():
        if tick.get_text():
            assert not overlap(legend, tick.get_window_extent(renderer))
    figure_box = drawn.figure.bbox
    assert legend.x0 >= figure_box.x0 - 1 and legend.y0 >= figure_box.y0 - 1  # not cut off
    bar = getattr(drawn, "colourbar", None)
    if bar is not None:
        bar_box = bar.ax.get_tightbbox(renderer)
        assert not overlap(bar_box, data_area)
        assert not overlap(bar_box, drawn.ax.xaxis.label.get_window_extent(renderer))
        assert not overlap(bar_box, legend)


def test_coincident_polar_marks_share_one_label(tmp_path):
    # regions 4 and 5 either side of the slip line have one direction and one pressure
    solution = crossing_pattern()
    drawn = draw_pattern_polars(solution, ["2", "3"], marks=["2", "3", "4", "5"])
    texts = [t.get_text() for t in drawn.mark_texts]
    assert texts == ["2", "3", "4, 5"]
    assert len(drawn.marks) == 4
    renderer = rendered(drawn, tmp_path, "coincident_marks")
    boxes = [t.get_window_extent(renderer) for t in drawn.mark_texts]
    assert not any(overlap(a, b) for i, a in enumerate(boxes) for b in boxes[i + 1:])
    apart = draw_polars(2.0, marks=[(0.0, 1.0), (np.radians(10.0), 2.0)], mark_labels=["a", "b"])
    assert [t.get_text() for t in apart.mark_texts] == ["a", "b"]


def test_one_style_per_line_type_with_a_key():
    p = WavePattern(2.0)  # invented: a 5° shock in a Mach 2 jet whose edge runs along y = 1
    p.add_wave("shock", upstream="1", downstream="2", family="left", turn=np.radians(5.0),
               start=(0.0, 0.0))
    p.add_wave("edge fan", upstream="2", downstream="3", family="right")
    p.add_free_boundary("3", 1.0, through=(0.0, 1.0))
    pattern = draw_wave_pattern(p.solve(), walls=[([-0.5, 4.0], [0.0, 0.0])],
                                extent=(-0.5, 4.0, -0.1, 1.3))
    jet = draw_characteristic_net(underexpanded_slot_jet(1.5, 2.0, n_characteristics=10))
    for a, b in ((pattern.free_boundaries[0], jet.boundaries[0]), (pattern.walls[0], jet.walls[0])):
        assert (a.get_color(), a.get_linestyle(), a.get_linewidth()) == (
            b.get_color(), b.get_linestyle(), b.get_linewidth())
    centreline = jet.centrelines[0]
    assert centreline.get_color() == WAVE_STYLES["centreline"]["color"]
    assert centreline.get_linewidth() < jet.walls[0].get_linewidth()
    assert [t.get_text() for t in pattern.legend.get_texts()] == [
        "shock", "expansion fan", "wall", "free boundary"]
    assert [t.get_text() for t in jet.legend.get_texts()] == [
        "wall", "centreline", "free boundary", "shock forms here"]
    shock_key = pattern.legend.get_lines()[0]
    assert shock_key.get_color() == pattern.shocks["shock"].get_color()
    crossing = draw_wave_pattern(crossing_pattern(), extent=(-0.5, 6.0, -0.1, 1.1))
    (slip,) = crossing.slip_lines.values()
    assert slip.get_linestyle() == "--" and slip.get_color() == WAVE_STYLES["slip line"]["color"]
    assert "slip line" in [t.get_text() for t in crossing.legend.get_texts()]


def test_free_boundary_drawn_from_the_solution(tmp_path):
    # invented: the Mach 2 jet above, its edge given to the pattern through (0, 1)
    p = WavePattern(2.0)
    p.add_wave("shock", upstream="1", downstream="2", family="left", turn=np.radians(5.0),
               start=(0.0, 0.0))
    p.add_wave("edge fan", upstream="2", downstream="3", family="right")
    p.add_free_boundary("3", 1.0, through=(0.0, 1.0))
    solution = p.solve()
    drawn = draw_wave_pattern(solution, walls=[([-0.5, 4.0], [0.0, 0.0])],
                              extent=(-0.5, 4.0, -0.1, 1.3))
    (edge,) = drawn.free_boundaries
    x, y = edge.get_data()
    (meeting,) = [m for m in solution.meeting_points if m.kind == "free boundary"]
    beta = weak_wave_angle(2.0, np.radians(5.0))  # brentq reference
    # the edge runs along the undisturbed jet (y = 1) to where the shock meets it ...
    assert (x[1], y[1]) == pytest.approx((1.0 / np.tan(beta), 1.0), rel=1e-9)
    assert (x[1], y[1]) == pytest.approx((float(meeting.x), float(meeting.y)), rel=1e-12)
    assert y[0] == pytest.approx(1.0) and x[0] == pytest.approx(-0.5)
    # ... then bends to the flow direction behind the fan, back at the jet pressure
    bend = np.arctan2(y[2] - y[1], x[2] - x[1])
    assert bend == pytest.approx(float(solution.region("3").direction), rel=1e-12)
    assert bend > 0.0  # a compression inside the jet pushes its edge outwards
    sx, sy = drawn.shocks["shock"].get_data()
    assert (sx[1], sy[1]) == pytest.approx((x[1], y[1]), rel=1e-9)  # the shock ends on it
    assert draw_wave_pattern(solution, walls=[([-0.5, 4.0], [0.0, 0.0])],
                             free_boundaries=()).free_boundaries == []
    save_png(drawn.ax, tmp_path, "jet_edge_from_solution")


def test_merged_ramp_shocks_end_at_their_meeting_point(tmp_path):
    solution, ramp = merging_ramps()
    drawn = draw_wave_pattern(solution, walls=[ramp], extent=(-0.05, 0.8, -0.02, 0.6))
    (meeting,) = [m for m in solution.meeting_points if m.kind == "waves"]
    point = (float(meeting.x), float(meeting.y))
    # the meeting point from the two wave angles (independent brentq reference)
    b1 = weak_wave_angle(2.2, np.radians(7.0))
    M2 = float(solution.region("2").M)
    b2 = np.radians(7.0) + weak_wave_angle(M2, np.radians(8.0))
    cx, cy = 0.30 * np.cos(np.radians(7.0)), 0.30 * np.sin(np.radians(7.0))
    x = (cy - cx * np.tan(b2)) / (np.tan(b1) - np.tan(b2))
    assert point == pytest.approx((x, x * np.tan(b1)), rel=1e-9)
    for name in ("first ramp shock", "second ramp shock"):  # end there, not past it
        ex, ey = drawn.shocks[name].get_data()
        assert (ex[1], ey[1]) == pytest.approx(point, rel=1e-9)
    for name in ("merged shock", "reflected wave"):
        segments = drawn.lines[name]
        assert all((s[0], s[1]) == pytest.approx(point, rel=1e-9) for s in segments)
    (slip,) = drawn.slip_lines.values()
    assert (slip.get_xdata()[0], slip.get_ydata()[0]) == pytest.approx(point, rel=1e-9)
    merged = solution.wave("merged shock")
    assert str(merged.kind) == "shock" and float(merged.turn) > np.radians(14.0)
    save_png(drawn.ax, tmp_path, "merged_ramp_shocks")


@pytest.mark.parametrize("length, height", [(10.0, 1.0), (3.0, 1.5)])
def test_new_figures_are_sized_to_their_data(length, height, tmp_path):
    p = WavePattern(2.6)  # invented ducts of different proportions
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=RAMP,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    walls = [([-0.5, 0.0, length], [0.0, 0.0, length * np.tan(RAMP)]),
             ([-0.5, length], [height, height])]
    drawn = draw_wave_pattern(p.solve(errors="nan"), walls=walls)
    renderer = rendered(drawn, tmp_path, f"sized_{length}")
    used = drawn.ax.get_tightbbox(renderer)  # the axes with its labels and key
    box = drawn.figure.bbox
    # no empty bands: the drawing and its labels fill most of the figure both ways
    assert used.width / box.width > 0.85 and used.height / box.height > 0.8


def test_same_family_shocks_never_run_past_each_other():
    # invented: the two ramps of merging_ramps() at Mach 2.2, without the merged shock
    # (29° of turn in one shock would detach at Mach 2.2): the lines end where they meet
    first, second = np.radians(7.0), np.radians(8.0)
    corner = (0.30 * np.cos(first), 0.30 * np.sin(first))
    p = WavePattern(2.2)
    p.add_wave("first ramp shock", upstream="1", downstream="2", family="left", turn=first,
               start=(0.0, 0.0))
    p.add_wave("second ramp shock", upstream="2", downstream="3", family="left", turn=second,
               start=corner)
    solution = p.solve()
    drawn = draw_wave_pattern(solution, extent=(-0.05, 0.8, -0.02, 0.6))
    point = solution.meeting_point("first ramp shock", "second ramp shock")
    for name in ("first ramp shock", "second ramp shock"):
        x, y = drawn.shocks[name].get_data()
        assert (x[1], y[1]) == pytest.approx(point, rel=1e-9)
