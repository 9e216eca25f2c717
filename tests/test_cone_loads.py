"""Tests of gasdyn2d.design.cone_loads: wave drag of cones and cone-cylinder forebodies.

Independent checks: SOURCES.md's computed cone values; linearised slender-cone theory
(von Kármán & Moore 1932, formula from memory), which the exact result must approach as
the cone gets thinner; the Prandtl–Meyer expansion of gasdyn2d's own expansion_fan (a
separately tested relation) at the shoulder; the force from its definition.
"""

import math

import numpy as np
import pytest

import reference as ref
from gasdyn2d import DetachedShockError, InvalidInputError, cone_flow, expansion_fan, ureg
from gasdyn2d.design.cone_loads import (cone_cylinder_forebody, cone_wave_drag, shoulder_expansion,
                                        slender_cone_drag)


def test_drag_coefficient_is_the_surface_pressure_coefficient():
    # SOURCES.md, "Conical flow": M1 2, 10° cone, cp 0.104471 (computed there at rtol 1e-13)
    drag = cone_wave_drag(2.0, 10 * ureg.deg)
    assert ref.agrees_to_print(drag.drag_coefficient, "0.104471")
    flows = cone_flow([1.5, 3.0, 6.0], cone_angle=[0.1, 0.3, 0.5])
    np.testing.assert_array_equal(cone_wave_drag([1.5, 3.0, 6.0], [0.1, 0.3, 0.5]).drag_coefficient,
                                  flows.cp_cone)


@pytest.mark.parametrize("M", [1.5, 2.0, 4.0])
def test_thin_cones_approach_slender_body_theory(M):
    # the relative difference is of the order of the next term, (M θ)² ln(2/(θ B)): measured
    # 1.1e-5, 2.7e-5, 1.2e-4 at θ 1e-3 (M 1.5, 2, 4), 1.7e-3 and 7.1e-3 at θ 1e-2 (M 2, 4);
    # bound 2 (M θ)² ln(2/(θ B)), B = √(M² - 1)
    B = math.sqrt(M * M - 1.0)
    for theta in (1e-3, 3e-3, 1e-2):
        drag = cone_wave_drag(M, theta)
        diff = abs(drag.drag_coefficient / drag.slender_body_drag_coefficient - 1.0)
        assert diff < 2.0 * (M * theta) ** 2 * math.log(2.0 / (theta * B))
        assert drag.slender_body_drag_coefficient == pytest.approx(
            float(slender_cone_drag(M, theta)), rel=1e-15, abs=0)


def test_shoulder_is_a_prandtl_meyer_turn_by_the_cone_angle():
    for M, theta in [(2.0, 0.15), (3.0, 0.3), (6.0, 0.5)]:
        nose = cone_cylinder_forebody(M, theta)
        fan = expansion_fan(nose.M_cone, deflection=theta)
        assert nose.shoulder_mach == pytest.approx(fan.M2, rel=1e-12, abs=0)
        p_shoulder = cone_flow(M, cone_angle=theta).p_cone_p1 * fan.p2_p1
        expected = 2 * (p_shoulder - 1) / (1.4 * M * M)
        assert nose.shoulder_cp == pytest.approx(expected, rel=1e-11, abs=0)
        assert nose.shoulder_cp < 0 < nose.cp_cone


def test_forebody_geometry_and_force():
    nose = cone_cylinder_forebody(2.5, 15 * ureg.deg, body_diameter=150 * ureg.mm,
                                  free_stream_pressure=20 * ureg.kPa)
    assert str(nose.nose_length.units) == "millimeter"
    assert nose.nose_length.m == pytest.approx(75.0 / math.tan(math.radians(15.0)), rel=1e-14,
                                             abs=0)
    assert nose.fineness_ratio == pytest.approx(0.5 / math.tan(math.radians(15.0)),
                                                 rel=1e-14, abs=0)
    # force = (p_cone - p1) × cross-section, from its definition
    flow = cone_flow(2.5, cone_angle=15 * ureg.deg)
    expected = (flow.p_cone_p1 - 1.0) * 20e3 * math.pi * 0.075**2
    assert nose.drag.m_as("N") == pytest.approx(expected, rel=1e-12, abs=0)
    plain = cone_cylinder_forebody(2.5, math.radians(15.0))
    assert type(plain.drag) is float and math.isnan(plain.drag)  # no pressure given
    assert plain.nose_length == pytest.approx(nose.nose_length.m_as("m") / 0.15, rel=1e-14, abs=0)


def test_subsonic_nose_surface_has_no_shoulder_fan():
    theta_max = cone_flow(2.0, cone_angle=0.70).cone_angle  # near the 40.69° detachment
    nose = cone_cylinder_forebody(2.0, theta_max)
    assert nose.M_cone < 1 and math.isnan(nose.shoulder_mach)
    after = shoulder_expansion(2.0, [0.9, 1.5], [2.0, 1.2], 0.3)
    assert np.isnan(after.M[0]) and np.isfinite(after.M[1])


def test_bad_inputs():
    with pytest.raises(DetachedShockError, match="cone_angle must be at most the detachment"):
        cone_wave_drag(2.0, 45 * ureg.deg)
    with pytest.raises(InvalidInputError, match="M must be finite and > 1"):
        cone_wave_drag(1.0, 0.1)
    with pytest.raises(InvalidInputError, match=r"cone_angle must be > 0 \(a nose cone\)"):
        cone_cylinder_forebody(2.0, 0.0)
    with pytest.raises(InvalidInputError, match="free_stream_pressure must be finite and > 0"):
        cone_cylinder_forebody(2.0, 0.2, free_stream_pressure=-1.0)
    with pytest.raises(InvalidInputError, match="free_stream_pressure has units of"):
        cone_cylinder_forebody(2.0, 0.2, free_stream_pressure=1 * ureg.m)
    with pytest.raises(InvalidInputError, match="body_diameter must be finite and > 0"):
        cone_cylinder_forebody(2.0, 0.2, body_diameter=0.0)
    sweep = cone_wave_drag(2.0, np.radians([10.0, 45.0]), errors="nan")
    assert np.isfinite(sweep.drag_coefficient[0]) and np.isnan(sweep.drag_coefficient[1])
