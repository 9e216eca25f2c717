"""Tests of gasdyn2d.design.spike_intakes: single-cone spike intakes.

References used here, independent of the code under test:
- a scipy reference written below from the textbook Taylor–Maccoll equation (solve_ivp,
  DOP853 at rtol 1e-12, dense output) and scipy.integrate.quad: the mass flux across the
  straight entrance normal and the mass-weighted terminal-shock recovery over the arc
  through the lip, by quadrature of the radial mass flux (no stream function);
- facts of the trade: mass is conserved; a vanishing spike is a pitot intake (one normal
  shock); a spike intake recovers more than a pitot intake at the same Mach number;
  below design the shock stands ahead of the lip and the intake spills, above design it
  enters the cowl.
"""

import math

import numpy as np
import pytest
from scipy.integrate import quad, solve_ivp

from gasdyn2d import DetachedShockError, InvalidInputError, cone_flow, normal_shock, ureg
from gasdyn2d.design.spike_intakes import spike_capture, spike_geometry, spike_intake

# ----------------------------------------------------------------- scipy reference


def _taylor_maccoll(theta, y, g):
    """dV_r/dθ = V_θ, dV_θ/dθ = [V_r V_θ² - a²(2V_r + V_θ cot θ)]/(a² - V_θ²); V/V_max."""
    vr, vt = y
    a2 = 0.5 * (g - 1.0) * (1.0 - vr * vr - vt * vt)
    return [vt, (vr * vt * vt - a2 * (2.0 * vr + vt / math.tan(theta))) / (a2 - vt * vt)]


def reference_layer(M1, beta, g=1.4):
    """Dense solution (V_r, V_θ)(θ) behind a shock of wave angle β, from the textbook
    oblique-shock relations (NACA Report 1135, eqs. 128-138) and the equation above."""
    mn1 = M1 * math.sin(beta)
    delta = math.atan(2.0 / math.tan(beta) * (mn1 * mn1 - 1.0)
                      / (M1 * M1 * (g + math.cos(2.0 * beta)) + 2.0))
    mn2 = math.sqrt((1.0 + 0.5 * (g - 1.0) * mn1 * mn1) / (g * mn1 * mn1 - 0.5 * (g - 1.0)))
    M2 = mn2 / math.sin(beta - delta)
    V = 1.0 / math.sqrt(1.0 + 2.0 / ((g - 1.0) * M2 * M2))
    y0 = [V * math.cos(beta - delta), -V * math.sin(beta - delta)]
    p0 = ((g + 1) * mn1**2 / ((g - 1) * mn1**2 + 2)) ** (g / (g - 1)) * (
        (g + 1) / (2 * g * mn1**2 - (g - 1))) ** (1 / (g - 1))  # eq. 99
    sol = solve_ivp(_taylor_maccoll, (beta, 1e-3), y0, method="DOP853", rtol=1e-12, atol=1e-14,
                    dense_output=True, args=(g,))
    V1 = 1.0 / math.sqrt(1.0 + 2.0 / ((g - 1.0) * M1 * M1))
    return sol.sol, V1, p0


def _state(layer, theta, g):
    """(ρ/ρ0, V_r, V_θ, M) on ray θ; ρ/ρ0 = (1 - V²)^(1/(γ-1)) with V in V_max units."""
    vr, vt = layer(theta)
    v2 = vr * vr + vt * vt
    return (1.0 - v2) ** (1.0 / (g - 1.0)), vr, vt, math.sqrt(2.0 / (g - 1.0) * v2 / (1.0 - v2))


def reference_capture(M1, theta_c, lip_ray, g=1.4):
    """(mass-flow ratio across the straight entrance normal, mass-weighted terminal recovery
    over the arc through the lip) by quadrature, for a lip on ray ``lip_ray`` inside the
    layer (or on the shock) at unit distance from the tip."""
    beta = cone_flow(M1, cone_angle=theta_c, gamma=g).wave_angle
    layer, V1, p0_shock = reference_layer(M1, beta, g)
    rho1 = (1.0 - V1 * V1) ** (1.0 / (g - 1.0))  # ρ1/ρ01
    # behind the shock ρ/ρ02 = (1 - V²)^(1/(γ-1)) and ρ02/ρ01 = p02/p01 (T0 is kept)
    # the normal from the lip (distance 1, ray lip_ray) to the cone surface, P(s) = L + s(F - L)
    L = np.array([math.cos(lip_ray), math.sin(lip_ray)])
    e = np.array([math.cos(theta_c), math.sin(theta_c)])
    F = (L @ e) * e
    normal = np.array([-(F - L)[1], (F - L)[0]]) / np.hypot(*(F - L))  # points downstream
    if normal[0] < 0:
        normal = -normal

    def flux(s):  # ρ V·n 2π y over the segment, V/V_max, ρ/ρ01
        P = L + s * (F - L)
        th = math.atan2(P[1], P[0])
        rho, vr, vt, _ = _state(layer, th, g)
        vx = vr * math.cos(th) - vt * math.sin(th)
        vy = vr * math.sin(th) + vt * math.cos(th)
        return p0_shock * rho * (vx * normal[0] + vy * normal[1]) * 2 * math.pi * P[1]

    length = float(np.hypot(*(F - L)))
    captured = quad(flux, 0.0, 1.0, epsabs=0, epsrel=1e-12, limit=200)[0] * length
    capture_ref = rho1 * V1 * math.pi * math.sin(lip_ray) ** 2

    def arc(th, weighted):  # radial mass flux on the arc of radius 1, with or without p0 loss
        rho, vr, _, M = _state(layer, th, g)
        loss = normal_shock(M, gamma=g).p02_p01 if (weighted and M > 1) else 1.0
        return loss * rho * vr * math.sin(th)

    top = min(lip_ray, beta)
    total = quad(arc, theta_c, top, args=(False,), epsabs=0, epsrel=1e-12, limit=200)[0]
    weighted = quad(arc, theta_c, top, args=(True,), epsabs=0, epsrel=1e-12, limit=200)[0]
    return captured / capture_ref, weighted / total


# ----------------------------------------------------------------- against the reference


@pytest.mark.parametrize("M, cone_deg, design", [(2.5, 20.0, 2.5), (2.2, 22.0, 2.6),
                                                  (3.0, 15.0, 3.5), (1.6, 25.0, 1.6)])
def test_capture_and_terminal_recovery_match_quadrature(M, cone_deg, design):
    # mass flow: gasdyn2d from the conical stream function on the lip ray, the reference by
    # quadrature across the straight entrance normal (mass conservation between the two
    # surfaces); measured agreement 1e-11. Terminal recovery: trapezoids on 201 rays against
    # adaptive quadrature; measured 3e-7 (second order in the ray spacing), bound 2e-6.
    theta_c = math.radians(cone_deg)
    intake = spike_intake(M, theta_c, design_mach=design)
    ratio, terminal = reference_capture(M, theta_c, intake.lip_ray_angle)
    assert intake.mass_flow_ratio == pytest.approx(ratio, rel=1e-9, abs=0)
    assert intake.terminal_recovery == pytest.approx(terminal, rel=2e-6, abs=0)
    assert intake.recovery == pytest.approx(intake.conical_shock_recovery * terminal, rel=2e-6,
                                            abs=0)


def test_more_rays_converge_with_second_order():
    flow = cone_flow(2.2, cone_angle=math.radians(22.0))
    lip = cone_flow(2.6, cone_angle=math.radians(22.0)).wave_angle
    values = [float(spike_capture(2.2, flow.wave_angle, lip, 1.4, n).terminal_recovery)
              for n in (51, 101, 201, 3201)]
    errors = [abs(v - values[-1]) for v in values[:-1]]
    assert 3.0 < errors[0] / errors[1] < 5.0 and 3.0 < errors[1] / errors[2] < 5.0


# ----------------------------------------------------------------- facts of the trade


def test_on_design_the_shock_meets_the_lip_and_everything_is_captured():
    intake = spike_intake([1.8, 2.5, 4.0], 18 * ureg.deg)
    np.testing.assert_allclose(intake.mass_flow_ratio, 1.0, rtol=1e-12)
    np.testing.assert_allclose(intake.spillage, 0.0, atol=1e-12)
    assert not intake.shock_enters_cowl.any()
    np.testing.assert_allclose(intake.lip_ray_angle.m, intake.wave_angle.m, rtol=1e-15)
    np.testing.assert_allclose(intake.terminal_mach_lip, intake.M2, rtol=1e-12)
    np.testing.assert_allclose(intake.terminal_mach_cone, intake.M_cone, rtol=1e-12)


def test_off_design_spills_below_and_swallows_the_shock_above():
    M = np.array([2.0, 2.2, 2.4, 2.6, 2.8, 3.0])
    intake = spike_intake(M, 20 * ureg.deg, design_mach=2.6)
    below, above = M < 2.6, M > 2.6
    assert np.all(intake.mass_flow_ratio[below] < 1.0)
    assert np.all(np.diff(intake.mass_flow_ratio[M <= 2.6]) > 0)  # spills less towards design
    np.testing.assert_array_equal(intake.mass_flow_ratio[above], 1.0)
    np.testing.assert_array_equal(intake.shock_enters_cowl, above)
    assert np.all(np.diff(intake.recovery) < 0)  # recovery falls with Mach number


def test_a_vanishing_spike_is_a_pitot_intake():
    # the conical shock fades to a Mach wave: one normal shock at M (NACA Report 1135, eq. 99)
    for M in (1.5, 2.0, 3.0):
        intake = spike_intake(M, 1e-4)
        assert intake.recovery == pytest.approx(normal_shock(M).p02_p01, rel=1e-6, abs=0)


def test_a_spike_recovers_more_than_a_pitot_intake():
    M = np.array([1.6, 2.0, 2.5, 3.0])
    intake = spike_intake(M, 15 * ureg.deg)
    assert np.all(intake.recovery > normal_shock(M).p02_p01)


def test_geometry_of_the_shock_on_lip_layout():
    theta, beta = math.radians(20.0), math.radians(30.0)
    geometry = spike_geometry(theta, beta, 2.0)
    assert float(geometry.lip_x) == pytest.approx(2.0 / math.tan(beta), rel=1e-15, abs=0)
    # the entrance normal: distance from the lip (lip_x, 2) to the line y = x tan θ
    lip = np.array([2.0 / math.tan(beta), 2.0])
    distance = abs(lip[1] * math.cos(theta) - lip[0] * math.sin(theta))
    assert float(geometry.entrance_height) == pytest.approx(distance, rel=1e-14, abs=0)
    foot = (lip @ np.array([math.cos(theta), math.sin(theta)]))
    assert float(geometry.spike_length) == pytest.approx(foot * math.cos(theta), rel=1e-14, abs=0)
    assert float(geometry.capture_area) == pytest.approx(4.0 * math.pi, rel=1e-15, abs=0)


# ----------------------------------------------------------------- units, shapes, errors


def test_lengths_follow_the_cowl_radius_unit():
    intake = spike_intake(2.4, 20 * ureg.deg, cowl_radius=150 * ureg.mm)
    assert str(intake.lip_x.units) == "millimeter"
    assert str(intake.capture_area.units) == "millimeter ** 2"
    assert intake.cowl_radius.m == pytest.approx(150.0)
    assert intake.cone_angle.m_as("deg") == pytest.approx(20.0)
    plain = spike_intake(2.4, math.radians(20.0), cowl_radius=0.15)
    assert type(plain.recovery) is float and type(plain.lip_x) is float
    assert plain.lip_x == pytest.approx(intake.lip_x.m_as("m"), rel=1e-14, abs=0)


def test_arrays_broadcast_and_match_scalar_calls():
    intake = spike_intake(np.array([[2.0], [3.0]]), np.radians([12.0, 18.0, 24.0]),
                          design_mach=2.5)
    assert intake.recovery.shape == (2, 3)
    one = spike_intake(3.0, math.radians(18.0), design_mach=2.5)
    assert intake.recovery[1, 1] == pytest.approx(one.recovery, rel=1e-13, abs=0)
    assert intake.mass_flow_ratio[1, 1] == pytest.approx(one.mass_flow_ratio, rel=1e-13, abs=0)


def test_bad_inputs_raise_with_their_limits():
    with pytest.raises(DetachedShockError, match=r"cone_angle must be at most the detachment "
                       r"angle.*limit there is .*\(40.6885°\)"):
        spike_intake(2.0, 45 * ureg.deg)
    with pytest.raises(DetachedShockError):
        spike_intake(3.0, 30 * ureg.deg, design_mach=1.3)  # too blunt at the design Mach number
    with pytest.raises(InvalidInputError, match="M must be finite and > 1"):
        spike_intake(0.9, 0.2)
    with pytest.raises(InvalidInputError, match="design_mach must be finite and > 1"):
        spike_intake(2.0, 0.2, design_mach=1.0)
    with pytest.raises(InvalidInputError, match=r"cone_angle must be > 0 \(a spike\)"):
        spike_intake(2.0, 0.0)
    with pytest.raises(InvalidInputError, match="cowl_radius must be finite and > 0"):
        spike_intake(2.0, 0.2, cowl_radius=0.0)
    with pytest.raises(InvalidInputError, match="cowl_radius has units of"):
        spike_intake(2.0, 0.2, cowl_radius=1 * ureg.s)
    nan = spike_intake([2.0, 2.0], np.radians([20.0, 45.0]), errors="nan")
    assert np.isfinite(nan.recovery[0]) and np.isnan(nan.recovery[1])
    assert np.isnan(nan.lip_x[1]) and not nan.shock_enters_cowl[1]
