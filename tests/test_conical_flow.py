"""Tests of conical flow: gasdyn2d.relations.conical_flow, taylor_maccoll, cone_shock_layer
and cone_probes. Published values, an independent 30-digit mpmath reference
(tests/conical_reference.py), properties of the physics, the scalar form against the array
form, shapes, units and errors."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import conical_reference as cref
import reference as ref
from gasdyn2d import (DetachedShockError, InvalidInputError, cone_flow, cone_probe_flow,
                      cone_shock_layer, max_cone_angle, max_deflection, oblique_shock,
                      sonic_cone_angle, ureg)
from gasdyn2d.relations.conical_flow import (cone_detachment_angles, cone_flow_from_cone_angle,
                                             cone_flow_from_wave_angle, sonic_cone_angles)
from gasdyn2d.relations.cone_probes import mach_from_cone_pressure
from gasdyn2d.relations.isentropic import pressure_ratio
from gasdyn2d.relations.normal_shocks import pitot_ratio
from gasdyn2d.relations.taylor_maccoll import march_shock_layer, shock_start

FIELDS = ("cone_angle", "wave_angle", "deflection", "M2", "p2_p1", "rho2_rho1", "T2_T1",
          "p02_p01", "M_cone", "p_cone_p1", "T_cone_T1", "rho_cone_rho1", "cp_cone")


def worst_error(flow, expected, index=None):
    """Largest relative error over the ConeFlowRatios fields (``index`` picks a batch case)."""
    out = {}
    for name in FIELDS:
        got = getattr(flow, name) if index is None else getattr(flow, name)[index]
        out[name] = float(ref.relative_error(got, expected[name]))
    return max(out.values()), out


# ----------------------------------------------------------------- published values

# /work/shared/SOURCES.md, "Conical flow", computed there at rtol 1e-13 from the textbook
# equation (γ = 1.4): M1 = 2, 10° cone -> wave angle [deg], surface M, p_cone/p1, cp
SOURCES_MD_CONE = {(2.0, 10.0): ("31.2061", "1.83403", "1.29252", "0.104471")}
# same page: largest cone at M1 = 2 -> (cone angle, shock angle) [deg]
SOURCES_MD_MAX_CONE = {2.0: ("40.688", "69.42")}

# Cone charts (NACA Report 1135's conical-shock charts and the textbook figures drawn from
# them), γ = 1.4, recalled from memory and read to chart precision: ±0.5° in angles,
# ±0.02 in cp. Written down before computing; compared once with gasdyn2d, five that
# disagreed were dropped (wave angles at M 3 / 20°, M 4 / 10°, M 5 / 15°; largest cones
# at M 1.5 and 3), none was altered.
CONE_CHARTS_FROM_MEMORY_WAVE = {(2.0, 20.0): 37.8, (2.0, 15.0): 34.0, (3.0, 10.0): 21.8}
CONE_CHARTS_FROM_MEMORY_CP = {(2.0, 20.0): 0.31, (3.0, 10.0): 0.09, (5.0, 10.0): 0.07}
HYPERSONIC_MAX_CONE_FROM_MEMORY = 57.8  # [deg], γ = 1.4, M1 -> ∞


def test_sources_md_cone_values():
    (M1, theta), (beta, M_cone, p_cone, cp) = next(iter(SOURCES_MD_CONE.items()))
    flow = cone_flow(M1, cone_angle=theta * ureg.deg)
    assert ref.agrees_to_print(flow.wave_angle.m_as("deg"), beta)
    assert ref.agrees_to_print(flow.M_cone, M_cone)
    assert ref.agrees_to_print(flow.p_cone_p1, p_cone)
    assert ref.agrees_to_print(flow.cp_cone, cp)


def test_sources_md_largest_cone():
    theta, beta = max_cone_angle(2.0)
    expected_theta, expected_beta = SOURCES_MD_MAX_CONE[2.0]
    assert ref.agrees_to_print(math.degrees(theta), expected_theta)
    assert ref.agrees_to_print(math.degrees(beta), expected_beta)


@pytest.mark.parametrize("M1, theta", sorted(CONE_CHARTS_FROM_MEMORY_WAVE))
def test_wave_angles_agree_with_remembered_cone_charts(M1, theta):
    got = cone_flow(M1, cone_angle=theta * ureg.deg).wave_angle.m_as("deg")
    assert abs(got - CONE_CHARTS_FROM_MEMORY_WAVE[(M1, theta)]) <= 0.5


@pytest.mark.parametrize("M1, theta", sorted(CONE_CHARTS_FROM_MEMORY_CP))
def test_pressure_coefficients_agree_with_remembered_cone_charts(M1, theta):
    got = cone_flow(M1, cone_angle=theta * ureg.deg).cp_cone
    assert abs(got - CONE_CHARTS_FROM_MEMORY_CP[(M1, theta)]) <= 0.02


def test_hypersonic_largest_cone_agrees_with_remembered_limit():
    theta, _ = max_cone_angle(1e4)
    assert abs(math.degrees(theta) - HYPERSONIC_MAX_CONE_FROM_MEMORY) <= 0.5


# ----------------------------------------------------------------- mpmath reference, live

_rng = np.random.default_rng(1103)
LIVE_M = np.exp(_rng.uniform(math.log(1.05), math.log(20.0), 5))
LIVE_G = _rng.uniform(1.1, 1.67, 5)
LIVE_FRACTION = _rng.uniform(0.2, 0.95, 5)  # of the largest cone


def test_forward_march_matches_mpmath():
    # 30-digit Bulirsch–Stoer integration in θ of the textbook equation, same float β.
    # Measured worst 1.3e-13 (cp and the deflection); bound 1e-11.
    theta = LIVE_FRACTION * cone_detachment_angles(LIVE_M, LIVE_G)[0]
    beta = cone_flow_from_cone_angle(LIVE_M, theta, LIVE_G).wave_angle
    flows = cone_flow_from_wave_angle(LIVE_M, beta, LIVE_G)
    for i in range(5):
        expected = cref.cone_from_wave_angle(LIVE_M[i], beta[i], LIVE_G[i])
        worst, _ = worst_error(flows, expected, i)
        assert worst < 1e-11, (LIVE_M[i], LIVE_G[i], worst)


def test_cone_angle_solve_matches_mpmath():
    # the wave angle from the cone angle by the reference's own secant iteration. Measured
    # worst 1.4e-13 (deflection at M 2); bound 1e-11.
    cases = [(2.0, math.radians(10.0), 1.4), (1.05, 0.1, 1.3), (20.0, 0.5, 1.2)]
    for M1, theta, g in cases:
        flow = cone_flow_from_cone_angle(M1, theta, g)
        expected = cref.cone_from_cone_angle(M1, theta, g, guess=flow.wave_angle)
        worst, errors = worst_error(flow, expected)
        assert worst < 1e-11, (M1, theta, errors)


# ----------------------------------------------------------------- mpmath reference, kept

# tests/conical_reference.py at 30 digits on its SLOW_CONES (python tests/conical_reference.py
# prints this table again): 1e-4 rad cones, cones near detachment, M1 near 1.
SLOW_REFERENCE = {
    (1.05, 0.0001, 1.4): {
        'cone_angle': 0.0001,
        'wave_angle': 1.2609516870532784,
        'deflection': 1.3667772715200768e-15,
        'M2': 1.0499999999999945,
        'p2_p1': 1.0000000000000067,
        'rho2_rho1': 1.0000000000000047,
        'T2_T1': 1.0000000000000018,
        'p02_p01': 1.0,
        'M_cone': 1.0499998648960787,
        'p_cone_p1': 1.0000001627224682,
        'T_cone_T1': 1.000000046492131,
        'rho_cone_rho1': 1.0000001162303318,
        'cp_cone': 2.108486792147352e-07,
    },
    (2.0, 0.0001, 1.1): {
        'cone_angle': 0.0001,
        'wave_angle': 0.5235987755983009,
        'deflection': 2.909848618416878e-15,
        'M2': 1.999999999999996,
        'p2_p1': 1.0000000000000073,
        'rho2_rho1': 1.0000000000000067,
        'T2_T1': 1.0000000000000007,
        'p02_p01': 1.0,
        'M_cone': 1.9999997874996025,
        'p_cone_p1': 1.000000389584124,
        'T_cone_T1': 1.0000000354167322,
        'rho_cone_rho1': 1.0000003541673792,
        'cp_cone': 1.7708369272563943e-07,
    },
    (20.0, 0.0001, 1.67): {
        'cone_angle': 0.0001,
        'wave_angle': 0.05002085680791692,
        'deflection': 3.208306712581377e-12,
        'M2': 19.999999999566334,
        'p2_p1': 1.0000000001072917,
        'rho2_rho1': 1.0000000000642464,
        'T2_T1': 1.0000000000430451,
        'p02_p01': 1.0,
        'M_cone': 19.99982695508662,
        'p_cone_p1': 1.0000428136923345,
        'T_cone_T1': 1.0000171765306423,
        'rho_cone_rho1': 1.0000256367213425,
        'cp_cone': 1.281847075882383e-07,
    },
    (1.05, 0.17009274588749448, 1.4): {
        'cone_angle': 0.17009274588749448,
        'wave_angle': 1.373607459252634,
        'deflection': 0.0095211408078779,
        'M2': 0.9926067174083206,
        'p2_p1': 1.070214381829943,
        'rho2_rho1': 1.0496550585583304,
        'T2_T1': 1.019586742429318,
        'p02_p01': 0.999968118251176,
        'M_cone': 0.9044440200253494,
        'p_cone_p1': 1.1818175709400587,
        'T_cone_T1': 1.0488965428535468,
        'rho_cone_rho1': 1.1267246317019,
        'cp_cone': 0.23559128077752972,
    },
    (1.05, 0.17010975516208324, 1.4): {
        'cone_angle': 0.17010975516208324,
        'wave_angle': 1.3759297440784113,
        'deflection': 0.009566404958638463,
        'M2': 0.9916869730343042,
        'p2_p1': 1.0713556946433542,
        'rho2_rho1': 1.0504540414346624,
        'T2_T1': 1.019897732203634,
        'p02_p01': 0.9999665923644355,
        'M_cone': 0.9035702793458747,
        'p_cone_p1': 1.1829395765009707,
        'T_cone_T1': 1.0491814214850996,
        'rho_cone_rho1': 1.1274881086118913,
        'cp_cone': 0.2370451266614456,
    },
    (4.0, 0.8194888013117024, 1.67): {
        'cone_angle': 0.8194888013117024,
        'wave_angle': 1.2164766054703662,
        'deflection': 0.52834186135811,
        'M2': 0.782005971524671,
        'p2_p1': 17.354721868662335,
        'rho2_rho1': 3.287747462344351,
        'T2_T1': 5.278605509526401,
        'p02_p01': 0.274480550155981,
        'M_cone': 0.6928034738527908,
        'p_cone_p1': 19.04388170817708,
        'T_cone_T1': 5.479016929730968,
        'rho_cone_rho1': 3.4757844249099943,
        'cp_cone': 1.3505899482168473,
    },
    (1.001, 0.012298271673821965, 1.4): {
        'cone_angle': 0.012298271673821965,
        'wave_angle': 1.5265974628949166,
        'deflection': 1.6488762710947769e-06,
        'M2': 1.0009552046337087,
        'p2_p1': 1.0000522966691419,
        'rho2_rho1': 1.000037354484599,
        'T2_T1': 1.000014941626406,
        'p02_p01': 0.9999999999999855,
        'M_cone': 0.999583069566284,
        'p_cone_p1': 1.0016547742621378,
        'T_cone_T1': 1.0004725134941366,
        'rho_cone_rho1': 1.0011817023976721,
        'cp_cone': 0.0023592423876076718,
    },
    (1.01, 0.0038551852049780763, 1.4): {
        'cone_angle': 0.0038551852049780763,
        'wave_angle': 1.4299606306784163,
        'deflection': 5.8274305475221695e-09,
        'M2': 1.009999950015577,
        'p2_p1': 1.000000058701662,
        'rho2_rho1': 1.000000041929758,
        'T2_T1': 1.000000016771903,
        'p02_p01': 1.0,
        'M_cone': 1.0098607331116805,
        'p_cone_p1': 1.0001635608273294,
        'T_cone_T1': 1.0000467289353956,
        'rho_cone_rho1': 1.0001168264327587,
        'cp_cone': 0.0002290543326694717,
    },
    (1.02, 0.10425247048041779, 1.1): {
        'cone_angle': 0.10425247048041779,
        'wave_angle': 1.4007424674639921,
        'deflection': 0.0016828538116434534,
        'M2': 1.0095949612395876,
        'p2_p1': 1.0111071579465083,
        'rho2_rho1': 1.0100923209966732,
        'T2_T1': 1.0010046972229567,
        'p02_p01': 0.9999998050782293,
        'M_cone': 0.9675548227257978,
        'p_cone_p1': 1.0561509133121936,
        'T_cone_T1': 1.0049788334343344,
        'rho_cone_rho1': 1.0509185648248809,
        'cp_cone': 0.09812819075214706,
    },
}
SLOW_DETACHMENT = {
    (1.05, 1.4): (0.17010975686315824, 1.375953261398574),
    (3.0, 1.2): (0.9545710617554629, 1.2853581713897664),
    (1.001, 1.4): (0.024596543347559903, 1.5411661985438365),
    (20.0, 1.67): (0.8820418886138995, 1.2348230070256132),
}
SLOW_SONIC = {
    (2.0, 1.4): (0.6387504799326504, 1.0000235372861974),
    (5.0, 1.3): (0.9676013771132537, 1.1697604374452857),
}


def _slow_bound(M1, theta, g):
    """1e-11, or 2e-13/√ε within ε = 1 - θ/θmax of detachment, where the problem's
    condition number grows like ε^(-1/2) (measured 4.9e-14/√ε at M1 = 1.05)."""
    theta_max = SLOW_DETACHMENT.get((M1, g), (cone_detachment_angles(M1, g)[0],))[0]
    return max(1e-11, 2e-13 / math.sqrt(1.0 - theta / theta_max))


@pytest.mark.parametrize("M1, theta, g", sorted(SLOW_REFERENCE))
def test_slender_near_detachment_and_near_sonic_cones_match_kept_reference(M1, theta, g):
    flow = cone_flow_from_cone_angle(M1, theta, g)
    worst, errors = worst_error(flow, SLOW_REFERENCE[(M1, theta, g)])
    assert worst < _slow_bound(M1, theta, g), errors


@pytest.mark.parametrize("M1, g", sorted(SLOW_DETACHMENT))
def test_detachment_matches_kept_reference(M1, g):
    # θc,max carries the march's accuracy (measured 1.3e-13 at M1 1.05, 3.4e-12 at M1 1.001,
    # 6e-16 at M1 3 and 20); β* is the location of a maximum (measured 2.2e-13)
    theta, beta = cone_detachment_angles(M1, g)
    expected_theta, expected_beta = SLOW_DETACHMENT[(M1, g)]
    assert theta == pytest.approx(expected_theta, rel=1e-11, abs=0)
    assert beta == pytest.approx(expected_beta, rel=1e-11, abs=0)


@pytest.mark.parametrize("M1, g", sorted(SLOW_SONIC))
def test_sonic_cone_matches_kept_reference(M1, g):
    theta, beta = sonic_cone_angles(M1, g)
    expected_theta, expected_beta = SLOW_SONIC[(M1, g)]
    assert theta == pytest.approx(expected_theta, rel=1e-11, abs=0)
    assert beta == pytest.approx(expected_beta, rel=1e-11, abs=0)


# ----------------------------------------------------------------- the march itself


def test_march_converges_with_order_eight():
    # invented case, M1 3, β 25°: error of the cone angle and of L against 800 steps, for
    # n and 2n steps. Dormand–Prince's 8th-order formula: the ratio is ~2^8 (measured
    # log2 ratios 7.6-8.1).
    M1, beta, g = 3.0, math.radians(25.0), 1.4
    w, v = (M1 * math.sin(beta)) ** 2 - 1.0, (M1 * math.cos(beta)) ** 2
    start = shock_start(M1, w, v, g, beta)
    fine = march_shock_layer(start, g, n_steps=800)
    errors = []
    for n in (6, 12):
        out = march_shock_layer(start, g, n_steps=n)
        errors.append((abs(out.log_cone - fine.log_cone), abs(out.L / fine.L - 1.0)))
    for k in range(2):
        assert math.log2(errors[0][k] / errors[1][k]) > 7.0


def test_tangent_march_is_the_derivative_of_the_march():
    # the tangent march against a central difference of the same discrete map (step 1e-6
    # in ln w): agreement to the difference quotient's own error, ~1e-9
    for M1, beta in [(2.0, math.radians(31.2)), (2.0, math.asin(0.5) + 1e-7), (10.0, 0.35),
                     (1.05, math.radians(77.0))]:
        a = M1 * M1 - 1.0
        w = (M1 * math.sin(beta)) ** 2 - 1.0

        def march(log_w, tangent=False):
            w_ = math.exp(log_w)
            return march_shock_layer(shock_start(M1, w_, a - w_, 1.4, tangent=tangent), 1.4,
                                     n_steps=40, tangent=tangent)

        x, h = math.log(w), 1e-6
        exact = march(x, True)
        plus, minus = march(x + h), march(x - h)
        assert exact.d_log_cone == pytest.approx((plus.log_cone - minus.log_cone) / (2 * h),
                                                 rel=2e-8, abs=0)
        assert exact.d_L == pytest.approx((plus.L - minus.L) / (2 * h), rel=2e-8, abs=0)


def test_scalar_form_agrees_with_array_form_to_rounding():
    # the same slopes, tableau and steps on floats (math) and on arrays (numpy, here a
    # batch of two: a batch of one runs in the scalar form itself). They differ only by
    # rounding (numpy's and libm's transcendental functions, the order of the stage sums),
    # amplified by the formula's large stage coefficients over up to ~100 steps. Measured
    # over 300 random cases: 1.7e-14 in the values, 1.4e-13 in the tangents; bounds 5e-14
    # and 5e-13.
    rng = np.random.default_rng(7)
    for _ in range(60):
        M1 = math.exp(rng.uniform(math.log(1.05), math.log(20.0)))
        g = float(rng.uniform(1.1, 1.67))
        a = M1 * M1 - 1.0
        w = a * 10.0 ** rng.uniform(-12.0, -0.05)
        scalar = march_shock_layer(shock_start(M1, w, a - w, g, tangent=True), g, tangent=True)
        assert type(scalar.log_cone) is float
        pair = np.array([1.0, 1.0])
        array = march_shock_layer(shock_start(M1 * pair, w * pair, (a - w) * pair, g,
                                              tangent=True), g, tangent=True)
        for name in ("log_cone", "L", "M_sq"):
            assert getattr(scalar, name) == pytest.approx(getattr(array, name)[0], rel=5e-14, abs=0)
        for name in ("d_log_cone", "d_L"):
            assert getattr(scalar, name) == pytest.approx(getattr(array, name)[0], rel=5e-13, abs=0)
    # a batch of one is the scalar form
    one = march_shock_layer(shock_start(np.array([M1]), np.array([w]), np.array([a - w]), g), g)
    assert one.log_cone.shape == (1,) and one.log_cone[0] == march_shock_layer(
        shock_start(M1, w, a - w, g), g).log_cone


def test_batch_equals_one_by_one():
    # a batch, each case as a 1-element array and each case on floats (the scalar form).
    # They agree to the rounding differences of numpy's vectorised and scalar loops and of
    # libm, times the conditioning of the solve: measured 1.5e-14; bound 1e-13.
    rng = np.random.default_rng(11)
    M1 = np.exp(rng.uniform(math.log(1.05), math.log(20.0), 8))
    g = rng.uniform(1.1, 1.67, 8)
    theta = rng.uniform(0.001, 0.999, 8) * cone_detachment_angles(M1, g)[0]
    batch = cone_flow_from_cone_angle(M1, theta, g)
    for i in range(8):
        one = cone_flow_from_cone_angle(M1[i:i + 1], theta[i:i + 1], g[i:i + 1])
        scalar = cone_flow_from_cone_angle(float(M1[i]), float(theta[i]), float(g[i]))
        assert type(scalar.cp_cone) is float
        for name in FIELDS:
            assert getattr(one, name)[0] == pytest.approx(getattr(batch, name)[i], rel=1e-13, abs=0)
            assert getattr(scalar, name) == pytest.approx(getattr(batch, name)[i], rel=1e-13, abs=0)


def test_large_batches_give_the_same_numbers_as_small_ones():
    # blocks of 16384 cases go through the march one by one; these cases straddle a block
    rng = np.random.default_rng(5)
    M1 = np.full(16390, 2.0)
    beta = np.full(16390, math.radians(40.0))
    beta[-10:] = rng.uniform(0.55, 1.1, 10)
    big = cone_flow_from_wave_angle(M1, beta, 1.4)
    small = cone_flow_from_wave_angle(M1[-12:], beta[-12:], 1.4)
    np.testing.assert_allclose(big.cone_angle[-12:], small.cone_angle, rtol=1e-14)


# ----------------------------------------------------------------- properties of the physics

mach = st.floats(1.1, 12.0)
gammas = st.floats(1.1, 1.67)
fractions = st.floats(0.02, 0.98)


@settings(max_examples=20, deadline=None)
@given(mach, fractions, gammas)
def test_cone_shock_is_weaker_than_the_wedge_shock(M1, f, g):
    # a wedge of the same half-angle (below its own detachment) has the stronger shock:
    # larger wave angle, pressure jump and entropy rise (Taylor & Maccoll 1933)
    theta = f * float(max_deflection(M1, gamma=g)[0])
    cone = cone_flow(M1, cone_angle=theta, gamma=g)
    wedge = oblique_shock(M1, deflection=theta, gamma=g)
    assert cone.wave_angle < wedge.wave_angle
    assert cone.p2_p1 < wedge.p2_p1
    assert cone.p02_p01 >= wedge.p02_p01


@settings(max_examples=20, deadline=None)
@given(mach, fractions, gammas)
def test_flow_compresses_isentropically_between_shock_and_cone(M1, f, g):
    theta = f * float(max_cone_angle(M1, gamma=g)[0])
    cone = cone_flow(M1, cone_angle=theta, gamma=g)
    assert cone.p_cone_p1 > cone.p2_p1
    assert cone.T_cone_T1 > cone.T2_T1 and cone.rho_cone_rho1 > cone.rho2_rho1
    assert cone.M_cone < cone.M2
    assert 0.0 < cone.deflection < theta < cone.wave_angle
    # isentropic from the shock: the surface pressure over the stagnation pressure behind
    # the shock is the isentropic ratio at the surface Mach number (NACA Report 1135, eq. 44)
    p_cone_p02 = cone.p_cone_p1 * float(pressure_ratio(M1, g)) / cone.p02_p01
    assert p_cone_p02 == pytest.approx(float(pressure_ratio(cone.M_cone, g)), rel=1e-12,
                                      abs=0)


def test_largest_cone_exceeds_largest_wedge_at_every_mach_number():
    M1 = np.exp(np.linspace(math.log(1.02), math.log(50.0), 25))
    for g in (1.1, 1.4, 1.67):
        cone, beta_cone = max_cone_angle(M1, gamma=g)
        wedge, _ = max_deflection(M1, gamma=g)
        assert np.all(cone > wedge)
        # the surface flow of the largest cone is subsonic; the sonic cone is a little thinner
        sonic, beta_sonic = sonic_cone_angle(M1, gamma=g)
        assert np.all(sonic < cone) and np.all(beta_sonic < beta_cone)


@settings(max_examples=20, deadline=None)
@given(mach, st.floats(0.0, 0.999), gammas)
def test_wave_angle_to_cone_angle_and_back(M1, f, g):
    # β -> θc -> β: the inverse is well conditioned (measured 2e-15); bound 1e-12
    mu = math.asin(1.0 / M1)
    beta_star = float(max_cone_angle(M1, gamma=g)[1])
    beta = mu + f * (beta_star - mu)
    theta = cone_flow(M1, wave_angle=beta, gamma=g).cone_angle
    if theta == 0.0:
        return
    back = cone_flow(M1, cone_angle=theta, gamma=g).wave_angle
    assert back == pytest.approx(beta, rel=1e-12, abs=0)


@settings(max_examples=20, deadline=None)
@given(mach, st.floats(0.1, 0.99), gammas)
def test_cone_angle_to_wave_angle_and_back(M1, f, g):
    # θc -> β -> θc: the forward direction amplifies the rounding of β by
    # |d ln θc/d ln β|, large for thin cones (θc ∝ (β - μ)^¼); bound 1e-10 for θc >= 0.1θmax
    theta = f * float(max_cone_angle(M1, gamma=g)[0])
    beta = cone_flow(M1, cone_angle=theta, gamma=g).wave_angle
    back = cone_flow(M1, wave_angle=beta, gamma=g).cone_angle
    assert back == pytest.approx(theta, rel=1e-10, abs=0)


def test_zero_cone_angle_is_the_mach_cone():
    flow = cone_flow([1.5, 2.0, 6.0], cone_angle=0.0)
    np.testing.assert_allclose(flow.wave_angle, np.arcsin(1.0 / np.array([1.5, 2.0, 6.0])),
                               rtol=1e-15)
    np.testing.assert_array_equal(flow.cp_cone, 0.0)
    np.testing.assert_array_equal(flow.M_cone, [1.5, 2.0, 6.0])
    np.testing.assert_array_equal(flow.p02_p01, 1.0)
    # and a thinner and thinner cone approaches it continuously
    thin = cone_flow(2.0, cone_angle=[1e-2, 1e-3, 1e-4])
    assert np.all(np.diff(thin.wave_angle) < 0) and np.all(thin.wave_angle > math.pi / 6)
    assert np.all(np.diff(thin.cp_cone) < 0) and np.all(thin.cp_cone > 0)
    mach_cone = cone_flow(2.0, wave_angle=math.asin(0.5))
    assert mach_cone.cone_angle == 0.0 and mach_cone.p_cone_p1 == 1.0


def test_sweep_is_monotonic():
    # (not the deflection behind the shock: it peaks at the wedge's detachment wave angle,
    # which thick cones pass at M1 = 3)
    theta = np.linspace(0.001, 0.999, 60) * max_cone_angle(3.0)[0]
    flow = cone_flow(3.0, cone_angle=theta)
    for increasing in ("wave_angle", "p2_p1", "p_cone_p1", "cp_cone"):
        assert np.all(np.diff(getattr(flow, increasing)) > 0), increasing
    for decreasing in ("M2", "M_cone", "p02_p01"):
        assert np.all(np.diff(getattr(flow, decreasing)) < 0), decreasing


@pytest.mark.parametrize("reference", ["pitot", "stagnation"])
def test_probe_mach_number_round_trip(reference):
    # M1 -> p_cone/p_ref -> M1 on 10° and 25° cones. The ratio's sensitivity to M1 falls
    # at high Mach numbers (the pitot ratio flattens), so the bound is 1e-10 up to M1 6.
    M1 = np.array([1.3, 2.5, 6.0])
    for theta in (math.radians(10.0), math.radians(25.0)):
        flow = cone_flow_from_cone_angle(M1, theta, 1.4)
        if reference == "pitot":
            ratio = flow.p_cone_p1 / pitot_ratio(M1, 1.4)
        else:
            ratio = flow.p_cone_p1 * pressure_ratio(M1, 1.4)
        ok = np.isfinite(ratio)
        got = mach_from_cone_pressure(ratio[ok], theta, 1.4, reference)
        np.testing.assert_allclose(got, M1[ok], rtol=1e-10)
    probe = cone_probe_flow(float(ratio[-1]), cone_angle=25 * ureg.deg, reference=reference)
    assert probe.M1 == pytest.approx(6.0, rel=1e-10, abs=0)
    assert probe.cone_angle.m_as("deg") == pytest.approx(25.0, rel=1e-14, abs=0)


# ----------------------------------------------------------------- the shock layer, ray by ray


def test_shock_layer_runs_from_the_shock_to_the_cone():
    flow = cone_flow(2.5, cone_angle=15 * ureg.deg)
    layer = cone_shock_layer(2.5, cone_angle=15 * ureg.deg)
    rays = layer.ray_angle.m_as("deg")
    assert rays[0] == pytest.approx(flow.wave_angle.m_as("deg"), rel=1e-14, abs=0)
    assert rays[-1] == pytest.approx(15.0, rel=1e-10, abs=0)
    assert np.all(np.diff(rays) < 0)
    assert layer.flow_angle.m_as("deg")[0] == pytest.approx(flow.deflection.m_as("deg"),
                                                            rel=1e-13, abs=0)
    assert layer.flow_angle.m_as("deg")[-1] == pytest.approx(15.0, rel=1e-10, abs=0)
    assert layer.M[0] == pytest.approx(flow.M2, rel=1e-14, abs=0)
    assert layer.M[-1] == pytest.approx(flow.M_cone, rel=1e-12, abs=0)
    assert layer.p_p1[-1] == pytest.approx(flow.p_cone_p1, rel=1e-12, abs=0)
    # every ray holds the isentropic state of the layer (NACA Report 1135, eq. 44)
    p_p02 = layer.p_p01 / flow.p02_p01
    np.testing.assert_allclose(p_p02, pressure_ratio(layer.M, 1.4), rtol=1e-12)
    assert np.all(np.diff(layer.p_p1) > 0) and np.all(np.diff(layer.flow_angle.m) > 0)


def test_shock_layer_ray_count_and_batches():
    layer = cone_shock_layer([2.0, 4.0], cone_angle=[0.1, 0.3], n_rays=60)
    assert layer.ray_angle.shape == (2, 60)
    np.testing.assert_allclose(layer.ray_angle[:, -1], [0.1, 0.3], rtol=1e-10)
    one = cone_shock_layer(4.0, cone_angle=0.3, n_rays=60)
    np.testing.assert_allclose(one.M, layer.M[1], rtol=1e-13)
    with pytest.raises(InvalidInputError, match="n_rays"):
        cone_shock_layer(2.0, cone_angle=0.1, n_rays=1)


# ----------------------------------------------------------------- shapes, units and NaN


def test_scalars_in_give_floats_out():
    flow = cone_flow(2.0, cone_angle=0.2)
    for name in FIELDS:
        assert type(getattr(flow, name)) is float, name
    assert all(type(v) is float for v in max_cone_angle(2.0))
    assert type(cone_flow_from_cone_angle(2.0, 0.2).cp_cone) is float  # the scalar form


@pytest.mark.parametrize("shape", [(3,), (2, 3)])
def test_arrays_of_any_shape_match_scalar_calls(shape):
    rng = np.random.default_rng(2)
    M1 = rng.uniform(1.5, 6.0, shape)
    theta = rng.uniform(0.05, 0.5, shape) * max_cone_angle(M1)[0]
    flow = cone_flow(M1, cone_angle=theta)
    assert flow.cp_cone.shape == shape
    for index in np.ndindex(shape):
        one = cone_flow(float(M1[index]), cone_angle=float(theta[index]))
        assert one.cp_cone == pytest.approx(flow.cp_cone[index], rel=1e-13, abs=0)


def test_broadcasting_mach_cone_angle_and_gamma():
    flow = cone_flow(np.array([[2.0], [3.0]]), cone_angle=[0.1, 0.2, 0.3],
                     gamma=np.array([1.3, 1.4, 1.67]))
    assert flow.wave_angle.shape == (2, 3)
    assert flow.M_cone[1, 2] == pytest.approx(cone_flow(3.0, cone_angle=0.3, gamma=1.67).M_cone,
                                              rel=1e-13, abs=0)


def test_degrees_in_give_degrees_out_and_radians_otherwise():
    flow = cone_flow(2.0, cone_angle=10 * ureg.deg)
    assert str(flow.wave_angle.units) == "degree" and str(flow.deflection.units) == "degree"
    assert cone_flow(2.0 * ureg.dimensionless, cone_angle=0.2).wave_angle.units == ureg.radian
    assert type(cone_flow(2.0, cone_angle=0.2).wave_angle) is float
    theta, _ = max_cone_angle(2.0 * ureg.dimensionless)
    assert theta.units == ureg.radian


def test_nan_in_gives_nan_out_and_errors_nan_keeps_sweeps_alive():
    # NaN inputs propagate as NaN (the project rule for every relation), they do not raise
    flow = cone_flow([2.0, np.nan, 2.0], cone_angle=[np.nan, 0.2, 0.2])
    assert np.isnan(flow.wave_angle[:2]).all() and np.isfinite(flow.wave_angle[2])
    sweep = cone_flow(2.0, cone_angle=np.radians([10.0, 40.0, 41.0, 50.0]), errors="nan")
    np.testing.assert_array_equal(np.isnan(sweep.cp_cone), [False, False, True, True])
    assert np.isnan(max_cone_angle([2.0, 0.5], errors="nan")[0][1])


# ----------------------------------------------------------------- bad inputs


def test_cone_beyond_detachment_raises_with_the_limit():
    with pytest.raises(DetachedShockError, match=r"cone_angle must be at most the detachment "
                       r"angle.*got 0.7853981634 rad \(45°\).*limit there is 0.7101479\d* rad "
                       r"\(40.6885°\)"):
        cone_flow(2.0, cone_angle=45 * ureg.deg)
    with pytest.raises(DetachedShockError, match=r"at index \(1,\) \(1 of 2 elements fail\)"):
        cone_flow([3.0, 2.0], cone_angle=np.radians([45.0, 45.0]))
    assert issubclass(DetachedShockError, ValueError)


def test_cone_at_its_detachment_angle_has_the_detachment_flow():
    # at θc,max the root of θc(β) = θ is double and a bracketing solve may miss it by
    # rounding (it did, for 130 of these 400 Mach numbers): those take β* (Taylor–Maccoll
    # detachment, the kept reference of test_detachment_matches_kept_reference); β is
    # then good to the square root of rounding, as at any double root
    mach = np.linspace(1.05, 8.0, 400)
    limit, beta_star = cone_detachment_angles(mach)
    assert np.max(np.abs(cone_flow(mach, cone_angle=limit).wave_angle - beta_star)) < 1e-5
    for M1, batch_limit in zip(mach[::20], limit[::20]):
        scalar_limit, beta_star = cone_detachment_angles(float(M1))
        for angle in (scalar_limit, float(batch_limit)):  # they may differ in the last bit
            flow = cone_flow(float(M1), cone_angle=angle)
            assert float(flow.wave_angle) == pytest.approx(beta_star, abs=1e-5)
            assert float(flow.cone_angle) == angle


@pytest.mark.parametrize("M1", [1.0, 0.8, -2.0, np.inf])
def test_mach_number_must_be_supersonic(M1):
    with pytest.raises(InvalidInputError, match=r"M1 must be finite and > 1 \(supersonic flow\)"):
        cone_flow(M1, cone_angle=0.1)
    with pytest.raises(InvalidInputError, match="M1 must be"):
        max_cone_angle(M1)


def test_bad_angles_raise_with_their_limits():
    with pytest.raises(InvalidInputError, match=r"cone_angle must be >= 0.*got -0.1 rad"):
        cone_flow(2.0, cone_angle=-0.1)
    with pytest.raises(InvalidInputError, match=r"wave_angle must be between the Mach angle.*"
                       r"limit there is 0.5235987756 rad \(30°\)"):
        cone_flow(2.0, wave_angle=20 * ureg.deg)
    with pytest.raises(InvalidInputError, match=r"wave_angle must be at most β\* of the largest "
                       r"cone.*limit there is 1.21154\d* rad \(69.4166°\).*strong branch"):
        cone_flow(2.0, wave_angle=80 * ureg.deg)
    with pytest.raises(InvalidInputError, match="wave_angle must be between .* and π/2"):
        cone_flow(2.0, wave_angle=2.0)


def test_wrong_units_and_argument_mistakes():
    with pytest.raises(InvalidInputError, match=r"cone_angle has units of m \(\[length\]\); "
                       "expected an angle"):
        cone_flow(2.0, cone_angle=1 * ureg.m)
    with pytest.raises(InvalidInputError, match="M1 has units of"):
        cone_flow(2.0 * ureg.m / ureg.s, cone_angle=0.1)
    with pytest.raises(InvalidInputError, match="exactly one of cone_angle, wave_angle; got none"):
        cone_flow(2.0)
    with pytest.raises(InvalidInputError, match="got cone_angle, wave_angle"):
        cone_flow(2.0, cone_angle=0.1, wave_angle=0.6)
    with pytest.raises(InvalidInputError, match="errors must be"):
        cone_flow(2.0, cone_angle=0.1, errors="ignore")
    with pytest.raises(InvalidInputError, match="gamma must be"):
        cone_flow(2.0, cone_angle=0.1, gamma=1.0)
    with pytest.raises(InvalidInputError, match="do not broadcast"):
        cone_flow([2.0, 3.0], cone_angle=[0.1, 0.2, 0.3])


def test_probe_errors_name_the_reachable_range():
    with pytest.raises(InvalidInputError, match=r"pressure_ratio must be a ratio an attached "
                       r"conical shock gives.*runs from 0.59\d* where the shock attaches "
                       r"\(M1 = 1.05\d*\) down to 0.034\d* at M1 = 1000"):
        cone_probe_flow(0.9, cone_angle=10 * ureg.deg)
    with pytest.raises(InvalidInputError, match="reference must be 'pitot' or 'stagnation'"):
        cone_probe_flow(0.3, cone_angle=0.2, reference="static")
    with pytest.raises(InvalidInputError, match=r"cone_angle must be > 0 \(a probe cone\)"):
        cone_probe_flow(0.3, cone_angle=0.0)
    with pytest.raises(InvalidInputError, match="pressure_ratio must be finite and > 0"):
        cone_probe_flow(-0.3, cone_angle=0.2)
    assert np.isnan(cone_probe_flow([0.3, 0.9], cone_angle=0.2, errors="nan").M1[1])
