"""Tests of gasdyn2d.design.intakes: ramp shock trains, shock-on-lip geometry, spillage, separation flag.

References used here, all independent of the code under test:
- an mpmath reference written below from the textbook relations (θ-β-M solved for β by
  root finding, normal-shock relations on the normal component), at 30 digits;
- published values: NACA Report 1135 (Table II and the oblique-shock relations), as
  recomputed in /work/shared/SOURCES.md;
- facts of the trade: mass is conserved through the shock system; a zero turn is a Mach wave.
"""

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d import ureg
from gasdyn2d.errors import DetachedShockError, InvalidInputError
from gasdyn2d.design.intakes import (
    incipient_separation_pressure_ratio,
    lip_streamline_capture,
    ramp_intake,
    ramp_shock_train,
    shock_on_lip_geometry,
)

mp.mp.dps = 30
G = mp.mpf("1.4")


# ------------------------------------------------------------- mpmath reference


def ref_detachment_wave_angle(M, g=G):
    """sin²β* at θmax (NACA Report 1135, eq. 168, as in SOURCES.md)."""
    M = mp.mpf(M)
    root = mp.sqrt((g + 1) * ((g + 1) * M**4 / 16 + (g - 1) * M**2 / 2 + 1))
    return mp.asin(mp.sqrt(((g + 1) * M**2 / 4 - 1 + root) / (g * M**2)))


def ref_deflection(M, beta, g=G):
    """tan θ = 2 cot β (M² sin²β - 1)/(M²(γ + cos 2β) + 2) (NACA Report 1135, eq. 138)."""
    return mp.atan(2 * mp.cot(beta) * (M**2 * mp.sin(beta) ** 2 - 1)
                   / (M**2 * (g + mp.cos(2 * beta)) + 2))


def ref_weak_wave_angle(M, theta, g=G):
    """Weak-branch β by bisection-type root finding between μ and β* (mpmath)."""
    M, theta = mp.mpf(M), mp.mpf(theta)
    mu = mp.asin(1 / M)
    if theta == 0:
        return mu
    top = ref_detachment_wave_angle(M, g)
    return mp.findroot(lambda b: ref_deflection(M, b, g) - theta, (mu, top), solver="anderson")


def ref_normal_shock(mn, g=G):
    """(Mn2, p2/p1, p02/p01) for upstream normal Mach number mn (NACA Report 1135, eqs. 93-99)."""
    m2 = mn * mn
    p = 1 + 2 * g / (g + 1) * (m2 - 1)
    mn2 = mp.sqrt(((g - 1) * m2 + 2) / (2 * g * m2 - (g - 1)))
    rho = (g + 1) * m2 / ((g - 1) * m2 + 2)
    p0 = rho ** (g / (g - 1)) * p ** (-1 / (g - 1))
    return mn2, p, p0


def ref_train(M, thetas, g=G, terminal=True):
    """Hand-coupled shock train: returns dict of stage Machs, wave angles, p0 ratios, recovery."""
    M = mp.mpf(M)
    machs, betas, p0s, ps = [M], [], [], []
    for theta in thetas:
        beta = ref_weak_wave_angle(machs[-1], theta, g)
        mn2, p, p0 = ref_normal_shock(machs[-1] * mp.sin(beta), g)
        machs.append(mn2 / mp.sin(beta - ref_deflection(machs[-1], beta, g)))
        betas.append(beta)
        p0s.append(p0)
        ps.append(p)
    if terminal:
        mn2, p, p0 = ref_normal_shock(machs[-1], g)
        p0s.append(p0)
        ps.append(p)
    return {"mach": machs, "beta": betas, "p0": p0s, "p": ps, "recovery": mp.fprod(p0s),
            "terminal_mach": mn2 if terminal else None}


def ref_mass_flux(M, g=G):
    """ρV per unit stagnation pressure at fixed T0: M (1 + (γ-1)M²/2)^(-(γ+1)/(2(γ-1)))."""
    return M * (1 + (g - 1) / 2 * M**2) ** (-(g + 1) / (2 * (g - 1)))


def rel(a, b):
    return abs(float(a) - float(b)) / abs(float(b))


# ------------------------------------------------------------- published values

# NACA Report 1135, oblique-shock relations; values recomputed in SOURCES.md (6 s.f.):
# (M1, θ °, β °, M2, p02/p01)
SOURCES_OBLIQUE_WEAK = [
    (1.5, 5.0, 47.8893, 1.32530, 0.998497),
    (2.0, 10.0, 39.3139, 1.64052, 0.984644),
    (3.0, 20.0, 37.7636, 1.99413, 0.796018),
    (5.0, 30.0, 42.3443, 2.13564, 0.238779),
]

# NACA Report 1135, Table II, normal shock p02/p01 (as in SOURCES.md)
NACA_1135_TABLE_II_RECOVERY = [(1.5, 0.929787), (2.0, 0.720874), (3.0, 0.328344), (5.0, 0.0617163)]


@pytest.mark.parametrize("M1, theta_deg, beta_deg, M2, p0", SOURCES_OBLIQUE_WEAK)
def test_single_ramp_matches_oblique_shock_table(M1, theta_deg, beta_deg, M2, p0):
    # SOURCES.md oblique-shock table (NACA Report 1135 relations), 6 s.f.
    intake = ramp_intake(M1, [math.radians(theta_deg)], terminal="none")
    assert math.degrees(intake.wave_angles[0]) == pytest.approx(beta_deg, abs=6e-5)
    assert intake.stage_mach[0] == pytest.approx(M2, rel=5e-6)
    assert intake.recovery == pytest.approx(p0, rel=5e-6)


@pytest.mark.parametrize("M, p0", NACA_1135_TABLE_II_RECOVERY)
def test_zero_turn_ramp_is_a_mach_wave_then_normal_shock(M, p0):
    # NACA Report 1135, Table II: a zero-turn ramp is a Mach wave (fact of the trade), so the
    # recovery is the normal shock's at the free-stream Mach number.
    intake = ramp_intake(M, [0.0])
    assert intake.recovery == pytest.approx(p0, rel=5e-6)
    assert math.sin(intake.wave_angles[0]) == pytest.approx(1.0 / M, rel=1e-14)
    assert intake.stage_mach[0] == pytest.approx(M, rel=1e-14)


# ------------------------------------------------------------- mpmath reference checks

# Invented ramp sets spanning one to four ramps and M 1.6 to 6.
REFERENCE_CASES = [
    (1.6, [6.0]),
    (2.0, [10.0]),
    (2.5, [8.0, 9.0]),
    (3.0, [7.0, 8.0, 9.0]),
    (4.0, [6.0, 7.0, 8.0, 9.0]),
    (6.0, [12.0, 14.0]),
    (2.2, [0.0, 11.0]),
    (3.0, [1e-7, 20.0]),
]


@pytest.mark.parametrize("M, degrees", REFERENCE_CASES)
def test_shock_train_against_mpmath_reference(M, degrees):
    thetas = [mp.radians(d) for d in degrees]
    ref = ref_train(M, thetas)
    intake = ramp_intake(M, np.radians(degrees))
    assert rel(intake.recovery, ref["recovery"]) < 1e-12
    assert rel(intake.terminal_mach, ref["terminal_mach"]) < 1e-12
    for k in range(len(degrees)):
        assert rel(intake.stage_mach[k], ref["mach"][k + 1]) < 1e-12
        assert rel(intake.wave_angles[k], ref["beta"][k]) < 1e-12
        assert rel(intake.stagnation_pressure_ratios[k], ref["p0"][k]) < 1e-12
        assert rel(intake.pressure_ratios[k], ref["p"][k]) < 1e-12
    assert rel(intake.static_pressure_rise, mp.fprod(ref["p"])) < 1e-12


def test_gamma_other_than_air_against_reference():
    # Invented case: a γ = 1.3 gas, two ramps at M 3.5; mpmath reference with γ = 1.3.
    g = mp.mpf("1.3")
    ref = ref_train(3.5, [mp.radians(9), mp.radians(10)], g=g)
    intake = ramp_intake(3.5, np.radians([9.0, 10.0]), gamma=1.3)
    assert rel(intake.recovery, ref["recovery"]) < 1e-12


# ------------------------------------------------------------- geometry by hand


def _shock_lines_by_hand(intake, M):
    """Corners from the reported ramp lengths; shock angles from the mpmath reference."""
    theta = np.asarray(intake.deflections, dtype=float)
    ref = ref_train(M, [mp.mpf(t) for t in theta], terminal=False)
    delta = np.cumsum(theta)
    corners = [np.zeros(2)]
    for k in range(len(theta) - 1):
        corners.append(corners[-1] + intake.ramp_lengths[k] * np.array(
            [math.cos(delta[k]), math.sin(delta[k])]))
    sigmas = [float((delta[k] - theta[k]) + ref["beta"][k]) for k in range(len(theta))]
    return corners, sigmas, ref


@pytest.mark.parametrize("M, degrees", [(2.5, [8.0, 9.0]), (3.0, [7.0, 8.0, 9.0]),
                                        (4.0, [6.0, 7.0, 8.0, 9.0])])
def test_every_ramp_shock_passes_through_the_lip(M, degrees):
    intake = ramp_intake(M, np.radians(degrees), first_ramp_length=0.25)
    corners, sigmas, _ = _shock_lines_by_hand(intake, M)
    lip = np.array([intake.lip_x, intake.lip_y])
    scale = np.hypot(*lip)
    for corner, sigma in zip(corners, sigmas):
        normal = np.array([-math.sin(sigma), math.cos(sigma)])
        assert abs(np.dot(lip - corner, normal)) < 1e-12 * scale
    # shocks 1 and 2 intersected by hand (numpy.linalg.solve on the two lines)
    a = np.array([[math.cos(sigmas[0]), -math.cos(sigmas[1])],
                  [math.sin(sigmas[0]), -math.sin(sigmas[1])]])
    t, _ = np.linalg.solve(a, corners[1] - corners[0])
    assert intake.lip_x == pytest.approx(t * math.cos(sigmas[0]), rel=1e-12)
    assert intake.lip_y == pytest.approx(t * math.sin(sigmas[0]), rel=1e-12)
    assert intake.ramp_lengths[0] == 0.25
    assert np.all(np.asarray(intake.ramp_lengths) > 0)


def test_single_ramp_lip_sits_on_the_shock_above_the_ramp_end():
    # Convention of the module: the last ramp ends at the normal dropped from the lip.
    intake = ramp_intake(2.0, [math.radians(10.0)], first_ramp_length=2.0)
    beta = float(ref_weak_wave_angle(2.0, mp.radians(10)))
    assert math.atan2(intake.lip_y, intake.lip_x) == pytest.approx(beta, rel=1e-12)  # on shock
    end = 2.0 * np.array([math.cos(math.radians(10)), math.sin(math.radians(10))])
    along = np.dot(np.array([intake.lip_x, intake.lip_y]) - end, end / 2.0)
    assert abs(along) < 1e-14  # the lip is normal to the ramp at its end
    assert intake.entrance_height == pytest.approx(2.0 * math.tan(beta - math.radians(10)),
                                                   rel=1e-12)


@pytest.mark.parametrize("M, degrees", [(2.5, [8.0, 9.0]), (3.0, [7.0, 8.0, 9.0]), (2.0, [10.0])])
def test_design_capture_conserves_mass_through_the_entrance(M, degrees):
    # Fact of the trade (continuity): at design the free-stream tube of height lip_y passes
    # through the entrance height behind the last ramp shock: lip_y = (ρV)n/(ρV)∞ · entrance.
    intake = ramp_intake(M, np.radians(degrees))
    ref = ref_train(M, [mp.radians(d) for d in degrees], terminal=False)
    flux = ref_mass_flux(ref["mach"][-1]) * mp.fprod(ref["p0"]) / ref_mass_flux(mp.mpf(M))
    assert intake.lip_y == pytest.approx(float(flux) * intake.entrance_height, rel=1e-12)
    assert intake.mass_flow_ratio == 1.0
    assert not np.any(intake.shock_enters_cowl)
    assert np.allclose(intake.shock_lead, 0.0, atol=1e-12)


# ------------------------------------------------------------- off design


@pytest.mark.parametrize("M", [1.9, 2.1, 2.3, 2.45])
def test_spillage_below_design_conserves_mass(M):
    # Continuity below design: the captured free-stream height h equals (ρV)n/(ρV)∞ times the
    # lip's normal distance from the last ramp (the tube behind the last shock is uniform).
    degrees, design = [8.0, 9.0], 2.5
    intake = ramp_intake(M, np.radians(degrees), design_mach=design)
    ref = ref_train(M, [mp.radians(d) for d in degrees], terminal=False)
    flux = float(ref_mass_flux(ref["mach"][-1]) * mp.fprod(ref["p0"]) / ref_mass_flux(mp.mpf(M)))
    captured = intake.mass_flow_ratio * intake.lip_y
    assert captured == pytest.approx(flux * intake.entrance_height, rel=1e-11)
    assert 0.0 < intake.mass_flow_ratio < 1.0
    assert np.all(np.asarray(intake.shock_lead) > 0)  # shocks ahead of the lip
    assert not np.any(intake.shock_enters_cowl)


def test_spillage_falls_monotonically_to_one_at_design():
    M = np.linspace(1.9, 2.5, 25)
    ratio = ramp_intake(M, np.radians([8.0, 9.0]), design_mach=2.5).mass_flow_ratio
    assert np.all(np.diff(ratio) > 0)
    assert ratio[-1] == 1.0
    near = ramp_intake(2.5 - 1e-7, np.radians([8.0, 9.0]), design_mach=2.5).mass_flow_ratio
    assert near == pytest.approx(1.0, abs=1e-6)


def test_above_design_shocks_enter_the_cowl():
    intake = ramp_intake([2.6, 3.0, 4.0], np.radians([8.0, 9.0]), design_mach=2.5)
    assert np.all(intake.shock_enters_cowl)
    assert np.all(np.asarray(intake.shock_lead) < 0)
    assert np.all(intake.mass_flow_ratio == 1.0)


def test_below_design_shock_merger_lies_above_the_lip_streamline():
    # Check of the model's assumption (straight shocks crossed one by one): below design the
    # crossing of shocks 1 and 2 is higher than where the lip streamline meets shock 1.
    theta = np.radians([8.0, 9.0])
    geometry = shock_on_lip_geometry(theta, ramp_shock_train(2.5, theta).wave_angle)
    for M in (1.9, 2.2, 2.4):
        beta = ramp_shock_train(M, theta).wave_angle
        capture = lip_streamline_capture(geometry, beta)
        s1, s2 = beta[0], theta[0] + beta[1]
        a = np.array([[math.cos(s1), -math.cos(s2)], [math.sin(s1), -math.sin(s2)]])
        t, _ = np.linalg.solve(a, [geometry.corner_x[1], geometry.corner_y[1]])
        assert t * math.sin(s1) > capture.captured_height


# ------------------------------------------------------------- separation flag


def test_korkegi_criterion_values():
    # Korkegi (1975), AIAA J. 13(4): 1 + 0.3 M² below M 4.5, 0.17 M^2.5 above (from memory).
    assert incipient_separation_pressure_ratio(2.0) == pytest.approx(2.2, rel=1e-15)
    assert incipient_separation_pressure_ratio(6.0) == pytest.approx(0.17 * 6.0**2.5, rel=1e-15)
    below, above = incipient_separation_pressure_ratio([4.5 - 1e-9, 4.5])
    assert above == pytest.approx(below, rel=0.04)  # the two fits nearly meet (from memory)


def test_separation_risk_flags_the_strong_terminal_shock_only():
    # Invented intake: gentle ramps at M 2.5; the terminal shock at M ~1.83 has p2/p1 ~3.75,
    # above Korkegi's ~2.0 there, the 8° and 9° ramp shocks (~1.66) below ~2.9 and ~2.4.
    intake = ramp_intake(2.5, np.radians([8.0, 9.0]))
    assert list(intake.separation_risk) == [False, False, True]
    np.testing.assert_allclose(intake.separation_pressure_ratios,
                               1 + 0.3 * np.array([2.5, *intake.stage_mach]) ** 2, rtol=1e-15)
    strong = ramp_intake(4.0, np.radians([25.0]), terminal="none")
    assert list(strong.separation_risk) == [True, False]


# ------------------------------------------------------------- shapes and units


def test_scalar_in_scalar_out():
    intake = ramp_intake(2.5, np.radians([8.0, 9.0]))
    assert isinstance(intake.recovery, float)
    assert isinstance(intake.mass_flow_ratio, float)
    assert np.shape(intake.stage_mach) == (2,)
    assert np.shape(intake.normal_mach) == (3,)


def test_arrays_broadcast_over_mach_and_ramp_sets():
    M = np.array([[2.2], [2.6], [3.0], [3.4]])  # (4, 1)
    ramps = np.radians([[6.0, 7.0], [8.0, 9.0], [10.0, 4.0]])  # (3, 2): three ramp sets
    intake = ramp_intake(M, ramps)
    assert intake.recovery.shape == (4, 3)
    assert intake.stage_mach.shape == (4, 3, 2)
    assert intake.normal_mach.shape == (4, 3, 3)
    for i in range(4):
        for j in range(3):
            single = ramp_intake(float(M[i, 0]), ramps[j])
            assert intake.recovery[i, j] == pytest.approx(single.recovery, rel=1e-15)
            assert intake.lip_y[i, j] == pytest.approx(single.lip_y, rel=1e-14)
    flat = ramp_intake(np.linspace(2.0, 3.0, 5), np.radians([8.0, 9.0]), gamma=[1.3, 1.4, 1.4,
                                                                            1.4, 1.67])
    assert flat.recovery.shape == (5,)
    sized = ramp_intake(2.5, np.radians([8.0, 9.0]), first_ramp_length=[0.1, 0.2, 0.4])
    np.testing.assert_allclose(sized.lip_x / sized.lip_x[0], [1.0, 2.0, 4.0], rtol=1e-14)


def test_quantities_in_quantities_out():
    plain = ramp_intake(2.5, np.radians([8.0, 9.0]), first_ramp_length=0.3)
    q = ramp_intake(2.5, [8.0, 9.0] * ureg.deg, first_ramp_length=300 * ureg.mm)
    listed = ramp_intake(2.5, [8.0 * ureg.deg, 0.15707963267948966 * ureg.rad],
                         first_ramp_length=0.3)
    assert q.deflections.units == ureg.deg
    assert q.lip_x.units == ureg.mm
    assert q.lip_x.m_as("m") == pytest.approx(plain.lip_x, rel=1e-14)
    assert q.recovery == pytest.approx(plain.recovery, rel=1e-15)
    assert listed.recovery == pytest.approx(plain.recovery, rel=1e-14)
    assert listed.ramp_lengths.units == ureg.m  # angles were Quantities, so lengths carry SI
    frame = q.to_dataframe()
    assert "recovery" in frame.columns


def test_nan_input_gives_nan_output():
    intake = ramp_intake([2.5, np.nan], np.radians([8.0, 9.0]))
    assert np.isnan(intake.recovery[1]) and np.isfinite(intake.recovery[0])
    assert np.isnan(intake.mass_flow_ratio[1])


# ------------------------------------------------------------- bad inputs


def test_detached_second_ramp_names_the_stage():
    # Invented case: at M 2.0 a 10° first ramp leaves M ~1.64, where θmax ~16.4°; 18° detaches.
    with pytest.raises(DetachedShockError, match=r"deflections\[1\].*ramp 2.*M = 1.64"):
        ramp_intake(2.0, np.radians([10.0, 18.0]))


def test_detachment_message_gives_value_limit_and_count():
    # SOURCES.md: θmax at M 2 is 22.9735°; at M 2 and 3 only the M 2 case detaches at 23°.
    with pytest.raises(DetachedShockError) as info:
        ramp_intake([3.0, 2.0], [math.radians(23.0)])
    message = str(info.value)
    assert "deflections[0]" in message and "ramp 1" in message
    assert "(23°)" in message and "index (1,)" in message and "1 of 2" in message
    assert "22.97" in message  # the limit, in degrees beside radians
    assert "errors='nan'" in message


def test_detached_only_at_design_mach_is_reported_as_such():
    with pytest.raises(DetachedShockError, match="design_mach"):
        ramp_intake(3.0, np.radians([10.0, 18.0]), design_mach=2.0)


def test_subsonic_stage_names_the_ramp():
    # Invented: 22.9° at M 2 is between the sonic and detachment deflections, so M2 < 1.
    with pytest.raises(DetachedShockError, match="subsonic"):
        ramp_intake(2.0, np.radians([22.9, 2.0]))


@pytest.mark.parametrize("kwargs, match", [
    ({"M": 0.8}, "M must be"),
    ({"M": 1.0}, "M must be"),
    ({"deflections": [0.1, -0.05]}, r"deflections\[1\] must be >= 0"),
    ({"design_mach": 0.9}, "design_mach"),
    ({"first_ramp_length": -1.0}, "first_ramp_length"),
    ({"gamma": 1.0}, "gamma"),
    ({"terminal": "oblique"}, "terminal"),
    ({"errors": "ignore"}, "errors"),
    ({"first_ramp_length": 2 * ureg.s}, "first_ramp_length"),
    ({"deflections": []}, "at least one ramp"),
    ({"M": [2.0, 3.0, 4.0], "deflections": np.full((2, 2), 0.1)}, r"deflections\[0\] \(2,\)"),
    ({"deflections": [0.1, 0.0, 0.0]}, r"deflections\[2\] must be > 0 when deflections\[1\] is 0"),
])
def test_bad_inputs_raise_clear_errors(kwargs, match):
    args = {"M": 2.5, "deflections": np.radians([8.0, 9.0])}
    args.update(kwargs)
    M, deflections = args.pop("M"), args.pop("deflections")
    with pytest.raises(InvalidInputError, match=match):
        ramp_intake(M, deflections, **args)


def test_errors_nan_blanks_only_the_bad_cases():
    intake = ramp_intake([0.5, 2.0, 3.0], np.radians([10.0, 18.0]), errors="nan")
    assert np.isnan(intake.recovery[0]) and np.isnan(intake.recovery[1])
    assert np.isfinite(intake.recovery[2])
    assert np.all(np.isnan(intake.stage_mach[1]))
    negative = ramp_intake(2.5, np.radians([[8.0, 9.0], [8.0, -1.0]]), errors="nan")
    assert np.isfinite(negative.recovery[0]) and np.isnan(negative.recovery[1])


def test_probably_degrees_warning_for_plain_degrees():
    from gasdyn2d.errors import ProbablyDegreesWarning

    with pytest.warns(ProbablyDegreesWarning):
        ramp_intake(2.5, [8.0, 9.0], errors="nan")


# ------------------------------------------------------------- properties


@settings(max_examples=40, deadline=None)
@given(M=st.floats(1.2, 8.0), fractions=st.lists(st.floats(0.01, 0.9), min_size=1, max_size=4))
def test_recovery_never_exceeds_one_and_entropy_rises(M, fractions):
    # Second law (fact of the trade): every shock loses stagnation pressure.
    thetas, mach = [], M
    for f in fractions:  # each ramp a fraction of the detachment turn at its own stage
        theta = f * float(ramp_shock_train(mach, [0.0]).detachment_deflection[0]) * 0.9
        mach = float(ramp_shock_train(mach, [theta]).mach[-1])
        if not mach > 1.0:
            break
        thetas.append(theta)
    if not thetas:
        return
    intake = ramp_intake(M, thetas)
    assert 0.0 < intake.recovery <= 1.0
    assert np.all(np.asarray(intake.stagnation_pressure_ratios) <= 1.0)
    assert intake.terminal_mach < 1.0
    assert np.all(np.asarray(intake.ramp_lengths) > 0)


@settings(max_examples=25, deadline=None)
@given(design=st.floats(1.8, 5.0), drop=st.floats(0.02, 0.3))
def test_mass_flow_ratio_below_one_below_design(design, drop):
    thetas = np.radians([5.0, 6.0])
    intake = ramp_intake(design * (1 - drop), thetas, design_mach=design, errors="nan")
    if np.isnan(intake.recovery):
        return  # a ramp detached at the lower Mach number
    assert 0.0 < intake.mass_flow_ratio < 1.0


@settings(max_examples=30, deadline=None)
@given(M=st.floats(1.5, 6.0), fractions=st.lists(st.floats(0.05, 0.6), min_size=2, max_size=4),
       length=st.floats(0.01, 100.0))
def test_geometry_focuses_every_shock_on_the_lip_and_conserves_mass(M, fractions, length):
    # Shock lines intersected by hand (a point-to-line distance), and continuity at design.
    thetas, mach = [], M
    for f in fractions:
        theta = f * float(ramp_shock_train(mach, [0.0]).detachment_deflection[0])
        mach = float(ramp_shock_train(mach, [theta]).mach[-1])
        if not mach > 1.05:
            break
        thetas.append(theta)
    if len(thetas) < 2:
        return
    intake = ramp_intake(M, thetas, first_ramp_length=length)
    delta = np.cumsum(thetas)
    corner = np.zeros(2)
    lip = np.array([intake.lip_x, intake.lip_y])
    for k, theta in enumerate(thetas):
        sigma = delta[k] - theta + intake.wave_angles[k]
        normal = np.array([-math.sin(sigma), math.cos(sigma)])
        assert abs(np.dot(lip - corner, normal)) < 1e-11 * np.hypot(*lip)
        corner = corner + intake.ramp_lengths[k] * np.array([math.cos(delta[k]),
                                                              math.sin(delta[k])])
    # continuity with float relations written here: ρV ∝ p0 M (1 + 0.2 M²)^-3 at fixed T0
    flux = lambda m: m * (1 + 0.2 * m * m) ** -3.0  # noqa: E731
    ratio = np.prod(intake.stagnation_pressure_ratios[:-1]) * flux(intake.stage_mach[-1]) / flux(M)
    assert intake.lip_y == pytest.approx(ratio * intake.entrance_height, rel=1e-10)
    assert np.all(np.asarray(intake.ramp_lengths) > 0)


# ------------------------------------------------------- merged ramp shocks (issue 14)
# Invented two- and three-ramp layouts; the merged-shock state is checked against
# gasdyn2d.merging_shocks called directly (the region-graph solution of the merger, itself
# tested against an independent reference in test_wave_interactions.py).


def _merging_reference(M_up, first, second):
    from gasdyn2d import merging_shocks
    return merging_shocks(M_up, first, second)


@pytest.mark.parametrize("M", [2.0, 2.2, 2.4])
def test_below_design_ramp_shocks_merge_ahead_of_the_lip_with_the_merging_state(M):
    theta = np.radians([8.0, 9.0])
    intake = ramp_intake(M, theta, design_mach=2.5)
    assert intake.merges.tolist() == [True]
    x, y = float(intake.merge_x[0]), float(intake.merge_y[0])
    assert x < intake.lip_x and y > intake.lip_y  # ahead of the cowl, in the spilled flow
    # the meeting point lies on both ramp shocks (geometry)
    for k, angle in ((0, intake.wave_angles[0]), (1, theta[0] + intake.wave_angles[1])):
        cx, cy = intake.corner_x[k], intake.corner_y[k]
        assert math.atan2(y - cy, x - cx) == pytest.approx(angle, rel=1e-12)
    ref = _merging_reference(M, theta[0], theta[1])
    assert intake.merged_wave_angle[0] == pytest.approx(ref.wave_angle, rel=1e-13)
    assert intake.merged_turn[0] == pytest.approx(ref.merged_turn, rel=1e-13)
    assert intake.merged_mach[0] == pytest.approx(ref.M_above_slip, rel=1e-13)
    assert intake.merged_pressure_ratio[0] == pytest.approx(ref.p_p1, rel=1e-13)
    assert intake.slip_direction[0] == pytest.approx(ref.slip_direction, rel=1e-13)
    assert intake.reflected_kind[0] == ref.reflected_kind
    assert intake.reflected_turn[0] == pytest.approx(ref.reflected_turn, rel=1e-10, abs=1e-15)
    # the merged shock is stronger than either ramp shock and loses more than the two in turn
    # (the entropy rise of one shock of the summed turn exceeds that of two weaker ones)
    assert intake.merged_pressure_ratio[0] == pytest.approx(np.prod(intake.pressure_ratios[:2]),
                                                            rel=0.02)
    assert intake.merged_recovery[0] < np.prod(intake.stagnation_pressure_ratios[:2])
    assert not intake.slip_line_enters_cowl[0] and not intake.reflected_enters_cowl[0]


def test_merging_of_the_second_pair_is_solved_in_the_frame_of_its_upstream_flow():
    theta = np.radians([6.0, 7.0, 8.0])
    intake = ramp_intake(2.4, theta, design_mach=3.0)
    assert intake.merges.tolist() == [True, True]
    ref = _merging_reference(intake.stage_mach[0], theta[1], theta[2])
    assert intake.merged_wave_angle[1] == pytest.approx(theta[0] + ref.wave_angle, rel=1e-13)
    assert intake.slip_direction[1] == pytest.approx(theta[0] + ref.slip_direction, rel=1e-13)
    assert intake.merged_pressure_ratio[1] == pytest.approx(
        intake.pressure_ratios[0] * ref.p_p1, rel=1e-13)


def test_on_design_nothing_merges_and_above_design_the_merger_enters_the_cowl():
    intake = ramp_intake([2.5, 2.8], np.radians([8.0, 9.0]), design_mach=2.5)
    assert intake.merges.tolist() == [[False], [True]]
    assert np.isnan(intake.merge_x[0, 0]) and intake.reflected_kind[0, 0] == ""
    # above design the shocks meet below the lip: what leaves the merger enters the intake
    assert intake.merge_y[1, 0] < intake.lip_y[1]
    assert intake.slip_line_enters_cowl[1, 0] and intake.reflected_enters_cowl[1, 0]


def test_one_ramp_has_no_pairs():
    intake = ramp_intake([2.2, 2.5], np.radians([10.0]), design_mach=2.5)
    assert intake.merges.shape == (2, 0) and intake.merge_x.shape == (2, 0)


# ------------------------------------------------------- isentropic compression stage


def ref_nu(M, g=G):
    """Prandtl–Meyer function (NACA Report 1135, eq. 171), mpmath."""
    M = mp.mpf(M)
    k = mp.sqrt((g + 1) / (g - 1))
    return k * mp.atan(mp.sqrt(M**2 - 1) / k) - mp.atan(mp.sqrt(M**2 - 1))


def ref_mach_from_nu(nu, g=G):
    return mp.findroot(lambda m: ref_nu(m, g) - nu, (mp.mpf("1.000001"), mp.mpf(50)),
                       solver="anderson")


@pytest.mark.parametrize("M, degrees", [(2.5, [8.0, 9.0]), (3.0, [6.0, 8.0, 7.0])])
def test_isentropic_stage_keeps_stagnation_pressure_against_mpmath(M, degrees):
    stages = ["shock"] + ["isentropic"] * (len(degrees) - 1)
    intake = ramp_intake(M, np.radians(degrees), stages=stages)
    assert np.all(intake.stagnation_pressure_ratios[1:-1] == 1.0)  # recovery 1 through it
    ref = ref_train(M, [mp.radians(degrees[0])], terminal=False)
    mach = ref["mach"][-1]
    for k, d in enumerate(degrees[1:], start=1):
        down = ref_mach_from_nu(ref_nu(mach) - mp.radians(d))
        p = ((1 + (G - 1) / 2 * mach**2) / (1 + (G - 1) / 2 * down**2)) ** (G / (G - 1))
        assert intake.stage_mach[k] == pytest.approx(float(down), rel=1e-12)
        assert intake.pressure_ratios[k] == pytest.approx(float(p), rel=1e-12)
        mach = down
    assert intake.recovery == pytest.approx(float(ref["p0"][0] * ref_normal_shock(mach)[2]),
                                            rel=1e-12)
    assert not np.any(intake.separation_risk[1:-1])  # no shock to separate at


@settings(max_examples=25, deadline=None)
@given(M=st.floats(2.0, 4.0), first=st.floats(3.0, 9.0), second=st.floats(2.0, 9.0))
def test_recovery_rises_when_a_shock_stage_becomes_isentropic(M, first, second):
    # Fact of the trade: the isentropic stage loses no stagnation pressure, where the shock
    # of the same turn loses some; it also leaves a slightly lower Mach number (the shock
    # turns the flow with less pressure rise for its loss), so the later shocks are weaker
    # too. Invented two-ramp layouts, drawn at random.
    theta = np.radians([first, second])
    shock = ramp_intake(M, theta, errors="nan")
    iso = ramp_intake(M, theta, stages=["shock", "isentropic"], errors="nan")
    if np.isnan(shock.recovery):
        return
    assert iso.recovery > shock.recovery
    assert iso.stagnation_pressure_ratios[1] == 1.0 > shock.stagnation_pressure_ratios[1]


@pytest.mark.parametrize("M, degrees", [(2.5, [8.0, 9.0]), (3.0, [6.0, 8.0, 7.0]),
                                        (3.0, [6.0, 8.0, 4.0])])
def test_isentropic_design_focuses_on_the_lip_and_conserves_mass(M, degrees):
    from gasdyn2d.design.intake_waves import isentropic_ramp_contour
    stages = ["shock", "isentropic"] + ["shock"] * (len(degrees) - 2)
    intake = ramp_intake(M, np.radians(degrees), stages=stages)
    theta = np.radians(degrees)
    # every characteristic through the lip: the first from the stage start, the last
    # from the end of the curved wall (geometry of the centred wave)
    for corner, direction, mach in (("corner", intake.ramp_angles[0], intake.stage_mach[0]),
                                    ("compression_end", intake.ramp_angles[1],
                                     intake.stage_mach[1])):
        x, y = getattr(intake, f"{corner}_x")[1], getattr(intake, f"{corner}_y")[1]
        angle = math.atan2(intake.lip_y - y, intake.lip_x - x)
        assert angle == pytest.approx(direction + math.asin(1 / mach), rel=1e-12)
    x, y = isentropic_ramp_contour(intake.corner_x[1], intake.corner_y[1], intake.lip_x,
                                   intake.lip_y, intake.ramp_angles[0], intake.stage_mach[0],
                                   theta[1], n_points=4001)
    assert x[-1] == pytest.approx(intake.compression_end_x[1], rel=1e-12)
    assert y[-1] == pytest.approx(intake.compression_end_y[1], rel=1e-12)
    arc = np.sum(np.hypot(np.diff(x), np.diff(y)))
    straight = math.hypot(intake.corner_x[2] - x[-1], intake.corner_y[2] - y[-1]) \
        if len(degrees) > 2 else None
    if straight is not None:  # the polyline's chord error is O(h²) ~ 1e-8 here
        assert intake.ramp_lengths[1] == pytest.approx(arc + straight, rel=1e-7)
    # continuity at design (fact of the trade), as for the all-shock intake
    ref_p0 = np.prod(intake.stagnation_pressure_ratios[:-1])
    flux = float(ref_mass_flux(mp.mpf(float(intake.stage_mach[-1]))) * ref_p0
                 / ref_mass_flux(mp.mpf(M)))
    assert intake.lip_y == pytest.approx(flux * intake.entrance_height, rel=1e-11)
    assert not np.any(intake.compression_coalesces) and intake.mass_flow_ratio == 1.0


def test_isentropic_stage_off_design_flags_where_characteristics_cross_ahead():
    theta = np.radians([8.0, 9.0])
    intake = ramp_intake([2.3, 2.5], theta, design_mach=2.5, stages=["shock", "isentropic"])
    assert intake.compression_coalesces.tolist() == [[False, True], [False, False]]
    x, y = intake.coalescence_x[0, 1], intake.coalescence_y[0, 1]
    assert x < intake.lip_x[0]
    assert np.isnan(intake.coalescence_x[1, 1])
    assert not intake.merges.any()  # a compression fan beside a shock is no shock merger
    assert np.isfinite(y)


def test_stage_kinds_are_checked():
    with pytest.raises(InvalidInputError, match=r"stages\[1\] must be 'shock' or 'isentropic'"):
        ramp_intake(2.5, np.radians([8.0, 9.0]), stages=["shock", "fan"])
    with pytest.raises(InvalidInputError, match=r"stages\[0\] must be 'shock'"):
        ramp_intake(2.5, np.radians([8.0, 9.0]), stages=["isentropic", "shock"])
    with pytest.raises(InvalidInputError, match="one kind per ramp"):
        ramp_intake(2.5, np.radians([8.0, 9.0]), stages=["shock"])
    with pytest.raises(DetachedShockError, match="M = 1"):
        ramp_intake(1.5, np.radians([2.0, 30.0]), stages=["shock", "isentropic"])


# ------------------------------------------------------- the boundary (issues 9, 10)


def test_results_are_read_only_and_share_no_memory():
    intake = ramp_intake(np.array([2.2, 2.5]), np.radians([8.0, 9.0]), design_mach=2.5)
    arrays = [np.asarray(v) for v in intake.to_dict().values() if isinstance(v, np.ndarray)]
    for i, first in enumerate(arrays):
        assert not first.flags.writeable
        for second in arrays[i + 1:]:
            assert not np.shares_memory(first, second)


@pytest.mark.parametrize("kwargs, words", [
    ({"M": "2.5"}, ["M", "string"]),
    ({"M": True}, ["M", "bool"]),
    ({"deflections": [0.1, 0.1 + 0.02j]}, ["deflections", "complex"]),
    ({"deflections": "0.1"}, ["deflections", "string"]),
    ({"design_mach": False}, ["design_mach", "bool"]),
    ({"first_ramp_length": "1 m"}, ["first_ramp_length", "string"]),
    ({"gamma": 1.4 + 0j}, ["gamma", "complex"]),
])
def test_bad_types_are_refused_naming_the_argument(kwargs, words):
    args = {"M": 2.5, "deflections": np.radians([8.0, 9.0])}
    args.update(kwargs)
    M, deflections = args.pop("M"), args.pop("deflections")
    with pytest.raises(InvalidInputError) as info:
        ramp_intake(M, deflections, **args)
    for word in words:
        assert word in str(info.value)


def test_labelled_and_lazy_inputs():
    xr = pytest.importorskip("xarray")
    pd = pytest.importorskip("pandas")
    dask_array = pytest.importorskip("dask.array")
    theta = np.radians([8.0, 9.0])
    machs = np.array([2.2, 2.5, 2.8])
    plain = ramp_intake(machs, theta, design_mach=2.5)
    M = xr.DataArray(machs, dims="flight_mach", coords={"flight_mach": machs})
    labelled = ramp_intake(M, theta, design_mach=2.5)
    assert labelled.recovery.dims == ("flight_mach",)
    assert labelled.stage_mach.dims == ("flight_mach", "ramp")
    assert labelled.merge_x.dims == ("flight_mach", "ramp_pair")
    np.testing.assert_array_equal(labelled.merge_x.values, plain.merge_x)
    # ramps given as a DataArray with a "ramp" dimension, broadcast against the Mach numbers
    sets = xr.DataArray(np.radians([[8.0, 9.0], [7.0, 10.0]]), dims=("layout", "ramp"))
    grid = ramp_intake(M, sets, design_mach=2.5)
    assert grid.recovery.dims == ("flight_mach", "layout")
    assert grid.recovery.values[0, 1] == ramp_intake(2.2, np.radians([7.0, 10.0]),
                                                     design_mach=2.5).recovery
    series = ramp_intake(pd.Series(machs, index=pd.Index(["a", "b", "c"])), theta, design_mach=2.5)
    assert list(series.recovery.index) == ["a", "b", "c"]
    assert isinstance(series.stage_mach, pd.DataFrame)
    lazy = ramp_intake(dask_array.from_array(machs, chunks=2), theta, design_mach=2.5)
    assert type(lazy.recovery).__module__.startswith("dask")
    np.testing.assert_array_equal(lazy.recovery.compute(), plain.recovery)
    np.testing.assert_array_equal(lazy.reflected_kind.compute(), plain.reflected_kind)
    assert plain.to_xarray()["merge_x"].dims == ("case", "ramp_pair")


def test_quantity_of_a_second_registry():
    import pint
    own = pint.UnitRegistry()
    intake = ramp_intake(2.5, own.Quantity([8.0, 9.0], "deg"),
                         first_ramp_length=own.Quantity(120.0, "mm"))
    plain = ramp_intake(2.5, np.radians([8.0, 9.0]), first_ramp_length=0.12)
    assert intake.lip_x._REGISTRY is own and intake.lip_x.units == own.mm
    assert intake.lip_x.m_as("m") == pytest.approx(plain.lip_x, rel=1e-14)
    assert intake.merged_wave_angle.units == own.deg
