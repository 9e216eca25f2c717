"""Tests of gasdyn2d.plot.cone_plots: figures rendered with Agg to PNG, and what was drawn checked
against published values (SOURCES.md: the M 2, 10° cone; NACA Report 1135's detachment angle
of the wedge at M 2) and against the relations they draw."""

import math

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402

import reference as ref  # noqa: E402
from gasdyn2d import max_cone_angle, ureg  # noqa: E402
from gasdyn2d.design.spike_intakes import spike_intake  # noqa: E402
from gasdyn2d.plot import draw_cone_flow, draw_cone_pressures  # noqa: E402

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


def save_png(ax, tmp_path, name):
    path = tmp_path / f"{name}.png"
    ax.figure.savefig(path, dpi=60)
    assert path.read_bytes()[:8] == PNG_SIGNATURE


def test_cone_flow_drawing_of_the_sources_md_cone(tmp_path):
    # SOURCES.md, "Conical flow": M 2, 10° cone -> shock 31.2061°, surface M 1.83403
    drawn = draw_cone_flow(2.0, cone_angle=10 * ureg.deg, length=0.5, n_rays=9)
    x, y = drawn["shock"].get_xdata(), drawn["shock"].get_ydata()
    assert ref.agrees_to_print(math.degrees(math.atan2(y[1] - y[0], x[1] - x[0])), "31.2061")
    tip, top, _ = drawn["cone"].get_xy()[:3]
    assert math.degrees(math.atan2(top[1] - tip[1], top[0] - tip[0])) == pytest.approx(10.0)
    assert len(drawn["rays"].get_segments()) == 9
    mach = drawn["rays"].get_array()
    assert mach[0] == pytest.approx(drawn["flow"].M_cone, rel=1e-6, abs=0)  # the surface ray
    assert mach[-1] == pytest.approx(drawn["flow"].M2, rel=1e-6, abs=0)  # the ray behind the shock
    assert drawn["labels"]["surface"].get_text().split()[-1] == "1.834"
    assert drawn["colourbar"].ax.get_xlabel() == "Mach number [-]"
    save_png(drawn["ax"], tmp_path, "cone")


def test_spike_intake_drawing_marks_the_lip(tmp_path):
    kelvray = spike_intake(2.6, 22 * ureg.deg, cowl_radius=0.15)  # an invented intake, on design
    fig, ax = plt.subplots()
    drawn = draw_cone_flow(2.6, cone_angle=22 * ureg.deg, length=0.3,
                           lip=(kelvray.lip_x, kelvray.cowl_radius), colourbar=False, ax=ax)
    lip_x, lip_r = drawn["lip"].get_xdata()[0], drawn["lip"].get_ydata()[0]
    # on design the lip lies on the drawn shock
    shock = drawn["flow"].wave_angle.m_as("rad")
    assert math.atan2(lip_r, lip_x) == pytest.approx(shock, rel=1e-12, abs=0)
    assert drawn["colourbar"] is None and drawn["ax"] is ax
    save_png(ax, tmp_path, "spike")


def test_cone_and_wedge_pressures_end_at_their_detachment_angles(tmp_path):
    drawn = draw_cone_pressures([2.0, 3.0])
    cone_end = drawn["cones"][2.0].get_xdata()[-1]
    wedge_end = drawn["wedges"][2.0].get_xdata()[-1]
    # SOURCES.md: the wedge detaches at 22.9735° at M 2; the cone at 40.688°
    assert ref.agrees_to_print(wedge_end, "22.9735")
    assert ref.agrees_to_print(cone_end, "40.688")
    assert cone_end == pytest.approx(math.degrees(max_cone_angle(2.0)[0]), rel=1e-12,
                                     abs=0)
    # at every half-angle both can take, the cone's surface pressure is below the wedge's
    for M in (2.0, 3.0):
        cx, cy = drawn["cones"][M].get_data()
        wx, wy = drawn["wedges"][M].get_data()
        inside = (cx > 0) & (cx < wx[-1])
        assert np.all(cy[inside] < np.interp(cx[inside], wx, wy))
    assert drawn["ax"].get_xlabel() == "half-angle [deg]"
    save_png(drawn["ax"], tmp_path, "pressures")


def test_pressure_ratio_in_radians_and_bad_options():
    drawn = draw_cone_pressures(2.0, quantity="p_p1", angle_unit="rad")
    assert drawn["cones"][2.0].get_ydata()[0] == pytest.approx(1.0)
    assert drawn["ax"].get_xlabel() == "half-angle [rad]"
    with pytest.raises(ValueError, match="quantity must be"):
        draw_cone_pressures(2.0, quantity="cd")
    with pytest.raises(ValueError, match="n_rays must be >= 2"):
        draw_cone_flow(2.0, cone_angle=0.2, n_rays=1)
