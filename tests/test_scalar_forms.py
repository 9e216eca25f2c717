"""The scalar fast forms (math module) against the array forms (numpy) of every relation
plain core, on random inputs across the domain (issue 10, item 2).

Both forms run the same algorithm; they differ only where libm and numpy round an
elementary function differently (each within an ulp or two). The bound is therefore a
few ulp times the sensitivity of the algorithm's own steps to such a rounding, stated
per family below: 4 ulp for direct formulas; 4 ulp × (1 + |ln r|) where a result r is
exp of a logarithm (an ulp of ln r is |ln r| ulp of r); and, for inverses and solves,
that times the conditioning |d ln x/d ln y| of the problem itself. NaN must come out
exactly where the array form gives NaN, and every scalar result is a Python float.
"""

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d.relations import expansion_fans as fans
from gasdyn2d.relations import isentropic as isen
from gasdyn2d.relations import normal_shocks as ns
from gasdyn2d.relations import oblique_shocks as obl
from gasdyn2d.relations import simple_waves as waves

ULP = float(np.finfo(float).eps)
EXAMPLES = 150

gammas = st.floats(1.05, 1.67)
machs = st.one_of(st.floats(0.0, 6.0).map(lambda x: 10.0**x),  # 1 to 1e6
                  st.floats(-12.0, -1.0).map(lambda x: 1.0 + 10.0**x),  # near sonic
                  st.floats(6.0, 300.0).map(lambda x: 10.0**x),  # huge
                  st.sampled_from([1.0, math.inf, math.nan]))
fractions = st.one_of(st.floats(0.0, 1.0), st.floats(-12.0, -1.0).map(lambda x: 10.0**x),
                      st.floats(-12.0, -3.0).map(lambda x: 1.0 - 10.0**x),
                      st.sampled_from([0.0, 1.0, 1.001, -0.1, math.nan]))


def array_form(func, *args, **kwargs):
    """The same plain core on one-element arrays (γ stays a float, as callers pass it)."""
    with np.errstate(all="ignore"):
        out = func(*(np.array([a], dtype=float) for a in args), **kwargs)
    return out


def first(value):
    return float(np.asarray(value).reshape(-1)[0])


def assert_agree(scalar, array, ulps, what=""):
    assert type(scalar) in (float, bool), (what, type(scalar))
    array = first(array)
    if math.isnan(array) or math.isnan(scalar):
        assert math.isnan(array) and math.isnan(scalar), (what, scalar, array)
    elif array == 0.0 or math.isinf(array):
        assert scalar == array or abs(scalar - array) <= ulps * ULP * 1e-300, (what, scalar, array)
    else:
        assert abs(scalar / array - 1.0) <= ulps * ULP, (what, scalar, array,
                                                        abs(scalar / array - 1.0) / ULP)


def log_factor(value):
    value = abs(first(value))
    return 1.0 + abs(math.log(value)) if 0.0 < value < math.inf else 1.0


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas)
def test_isentropic_ratios(M, g):
    for plain in (isen.temperature_ratio, isen.pressure_ratio, isen.density_ratio,
                  isen.area_ratio, isen.log_stagnation_temperature_ratio):
        array = array_form(lambda m: plain(m, g), M)
        assert_agree(plain(M, g), array, 4 * log_factor(array), plain.__name__)
    assert_agree(isen.mach_angle_of(M), array_form(isen.mach_angle_of, M), 4, "μ")
    assert_agree(fans.prandtl_meyer_angle(M, g),
                 array_form(lambda m: fans.prandtl_meyer_angle(m, g), M), 4, "ν")


@settings(max_examples=EXAMPLES, deadline=None)
@given(r=st.one_of(st.floats(0.0, 1.0), st.floats(-320.0, 0.0).map(lambda x: 10.0**x),
                   st.sampled_from([0.0, 1.0, 1.5, -1.0, math.nan])), g=gammas)
def test_isentropic_inverses(r, g):
    # |d ln M/d ln r| is 1/2 to (γ-1)/(2γ) × T0/(T0 - T): large only as r → 1 (M → 0)
    kappa = 1.0 / max(1.0 - r, 1e-300) if r == r else 1.0
    for plain in (isen.mach_from_temperature_ratio, isen.mach_from_pressure_ratio,
                  isen.mach_from_density_ratio):
        array = array_form(lambda x: plain(x, g), r)
        assert_agree(plain(r, g), array, 4 * log_factor(r) * max(1.0, kappa), plain.__name__)
    M1 = 1.0 + 10.0 * r
    array = array_form(lambda m, p: isen.mach_after_isentropic_pressure_change(m, p, g), M1, r)
    assert_agree(isen.mach_after_isentropic_pressure_change(M1, r, g), array,
                 4 * log_factor(r) * max(1.0, kappa), "after Δp")


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas, supersonic=st.booleans())
def test_area_ratio_inverse_both_branches(M, g, supersonic):
    A = float(isen.area_ratio(M, g)) if M == M else math.nan
    if not supersonic and A == A:
        M = 1.0 / M if M > 0 else M  # a subsonic Mach number of the same family
        A = float(isen.area_ratio(M, g))
    # conditioning |d ln M/d ln A| = (1 + (γ-1)M²/2)/|M² - 1|, infinite at M = 1
    kappa = (1.0 + 0.5 * (g - 1.0) * M * M) / max(abs((M - 1.0) * (M + 1.0)), 1e-300) \
        if 0.0 < M < 1e150 else 1.0
    array = array_form(lambda a: isen.mach_from_area_ratio(a, g, supersonic), A)
    assert_agree(isen.mach_from_area_ratio(A, g, supersonic), array,
                 16 * log_factor(A) * max(1.0, min(kappa, 1e8)), "M(A/A*)")


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas, fraction=fractions)
def test_prandtl_meyer_inverse_and_fans(M, g, fraction):
    nu_max = float(fans.max_prandtl_meyer_angle(g))
    assert_agree(fans.max_prandtl_meyer_angle(g), array_form(fans.max_prandtl_meyer_angle, g), 4)
    nu = fraction * nu_max
    array = array_form(lambda x: fans.mach_from_prandtl_meyer_angle(x, g), nu)
    # conditioning ν√(M²-1)(1 + (γ-1)M²/2)/M² grows like M near ν_max
    M_nu = first(array)
    kappa = M_nu if math.isfinite(M_nu) else 1.0
    assert_agree(fans.mach_from_prandtl_meyer_angle(nu, g), array, 8 * max(1.0, kappa), "M(ν)")
    M2 = M * (1.0 + abs(fraction)) if fraction == fraction else M
    array = array_form(lambda a, b: fans.fan_pressure_ratio(a, b, g), M, M2)
    # the ratio is exp((γ/(γ-1)) Δ ln T0/T): each logarithm L carries ~|L| ulp (absolute),
    # their difference twice that, times γ/(γ-1) in the exponent
    log_ratio = float(isen.log_stagnation_temperature_ratio(M2, g))
    bound = 4 * g / (g - 1.0) * max(1.0, abs(log_ratio)) * log_factor(array)
    assert_agree(fans.fan_pressure_ratio(M, M2, g), array, bound, "fan p2/p1")


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas)
def test_normal_shock_ratios_and_inverses(M, g):
    w = ns.mach_squared_minus_one(M)
    assert_agree(w, array_form(ns.mach_squared_minus_one, M), 1)
    scalar = ns.normal_shock_ratios(w, g)
    assert type(scalar) is ns.NormalShockRatios
    array = array_form(lambda x: ns.normal_shock_ratios(x, g), w)
    # p02/p01 and p02/p1 are exp of logarithms divided by γ - 1: (γ+1)/(γ-1) × their ulp
    exponent = (g + 1.0) / (g - 1.0) * log_factor(scalar.p2_p1)
    for name, value in scalar._asdict().items():
        factor = exponent if name == "p02_p01" else 1.0
        assert_agree(value, getattr(array, name), 4 * factor * log_factor(getattr(array, name)),
                     name)
    pitot = array_form(lambda m: ns.pitot_ratio(m, g), M)
    assert_agree(ns.pitot_ratio(M, g), pitot, 4 * exponent * log_factor(pitot), "pitot")
    if not M >= 1.0:
        return
    # each inverse from the forward value, bound 8 ulp × its conditioning |d ln M1/d ln r|
    # (x log factor of the Halley residual for p02/p01 and p02/p1)
    for plain, value in [(ns.mach_from_downstream_mach, scalar.M2),
                         (ns.mach_from_density_jump, scalar.rho2_rho1),
                         (ns.mach_from_temperature_jump, scalar.T2_T1),
                         (ns.mach_from_stagnation_pressure_ratio, scalar.p02_p01),
                         (ns.mach_from_pitot_ratio, first(pitot))]:
        array = array_form(lambda x: plain(x, g), value)
        assert_agree(plain(value, g), array, 8 * _shock_inverse_condition(plain, M, g, value),
                     plain.__name__)


def _shock_inverse_condition(plain, M, g, value):
    """|d ln M1/d ln r| of each normal-shock inverse (NACA Report 1135, eqs. 93-100
    differentiated), times the logarithm factor where the inverse works on ln r."""
    w = (M - 1.0) * (M + 1.0)
    if not 0.0 < w < 1e300:
        return 1.0
    gp, gm = g + 1.0, g - 1.0
    dlnM_dw = 1.0 / (2.0 * (1.0 + w))
    if plain is ns.mach_from_downstream_mach:  # ln M2 = ½[ln(gm w + gp) - ln(2γw + gp)]
        dlnr_dw = 0.5 * (gm / (gm * w + gp) - 2 * g / (2 * g * w + gp))
    elif plain is ns.mach_from_density_jump:  # ρ2/ρ1 = gp(1+w)/(gm w + gp)
        dlnr_dw = 1.0 / (1.0 + w) - gm / (gm * w + gp)
    elif plain is ns.mach_from_temperature_jump:
        dlnr_dw = 2 * g / (2 * g * w + gp) - 1.0 / (1.0 + w) + gm / (gm * w + gp)
    elif plain is ns.mach_from_stagnation_pressure_ratio:
        dlnr_dw = -2 * g * w * w / ((1 + w) * (gm * w + gp) * (gp + 2 * g * w))
    else:
        dlnr_dw = 2.0 * (g / gm - 2 * g * (1 + w) / (gm * (2 * g * (1 + w) - gm))) * dlnM_dw
    kappa = abs(dlnM_dw / dlnr_dw) if dlnr_dw else 1e300
    return max(1.0, kappa) * log_factor(value) * gp / gm


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas, fraction=fractions, strong=st.booleans())
def test_oblique_solve_both_branches(M, g, fraction, strong):
    theta_max = float(obl.detachment_angles(M, g)[0]) if M == M else math.nan
    for plain in (obl.detachment_angles, obl.sonic_angles):
        for s, a in zip(plain(M, g), array_form(lambda m: plain(m, g), M)):
            assert_agree(s, a, 4, plain.__name__)
    theta = fraction * theta_max
    # near detachment the solve is conditioned like (θmax - θ)^(-1/2) (see
    # wave_angle_from_deflection); the ratios add their log factors
    kappa = 1.0 / math.sqrt(max(1.0 - fraction, 1e-16)) if 0.999 < fraction <= 1.0 else 1.0
    array = array_form(lambda m, t: obl.wave_angle_from_deflection(m, t, g, strong), M, theta)
    assert_agree(obl.wave_angle_from_deflection(M, theta, g, strong), array, 8 * kappa, "β")
    scalar = obl._shock_from_deflection(M, theta, g, strong)
    array = array_form(lambda m, t: obl._shock_from_deflection(m, t, g, strong), M, theta)
    for k, (s, a) in enumerate(zip(scalar, array)):
        assert_agree(s, a, 16 * kappa * log_factor(a), f"shock field {k}")
    z, y, a, invalid = obl.scaled_wv_from_deflection(M, theta, g, strong)
    za, ya, aa, invalid_a = array_form(
        lambda m, t: obl.scaled_wv_from_deflection(m, t, g, strong), M, theta)
    assert bool(invalid) == bool(invalid_a[0])
    if not invalid:
        assert_agree(z if not strong else y, (za if not strong else ya), 16 * kappa, "z, y")


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas, position=st.floats(0.0, 1.0))
def test_oblique_ratios_from_wave_angle(M, g, position):
    mu = float(isen.mach_angle_of(M)) if M >= 1.0 else 0.0
    beta = mu + position * (0.5 * math.pi - mu)
    # θ(β) near the Mach wave is conditioned like β/(β - μ) (θ ∝ β - μ)
    kappa = beta / max(beta - mu, 1e-300) if beta == beta else 1.0
    assert_agree(obl.deflection_from_wave_angle(M, beta, g),
                 array_form(lambda m, b: obl.deflection_from_wave_angle(m, b, g), M, beta),
                 8 * kappa, "θ(β)")
    scalar = obl.oblique_shock_ratios(M, beta, g)
    assert type(scalar) is obl.ObliqueShockRatios
    array = array_form(lambda m, b: obl.oblique_shock_ratios(m, b, g), M, beta)
    for name, value in scalar._asdict().items():
        assert_agree(value, getattr(array, name), 16 * kappa * log_factor(getattr(array, name)),
                     name)


@settings(max_examples=EXAMPLES, deadline=None)
@given(M=machs, g=gammas, fraction=fractions, strong=st.booleans(),
       expansion=st.floats(0.0, 1.0), p=st.floats(0.01, 30.0))
def test_turn_state_and_turn_for_pressure_ratio(M, g, fraction, strong, expansion, p):
    theta_max = float(obl.detachment_angles(M, g)[0]) if M == M else math.nan
    kappa = 1.0 / max(1.0 - fraction, 1e-16) if 0.999 < fraction <= 1.0 else 1.0
    nu_room = float(fans.max_prandtl_meyer_angle(g) - fans.prandtl_meyer_angle(M, g)) \
        if M >= 1.0 else 1.0
    for turn in (fraction * theta_max, -expansion * 1.1 * nu_room):
        scalar = waves.turn_state(M, turn, g, strong)
        assert type(scalar) is waves.WaveState
        array = array_form(lambda m, t: waves.turn_state(m, t, g, strong), M, turn)
        for name, value in scalar._asdict().items():
            a = getattr(array, name)
            if name in ("is_shock", "detached", "vacuum"):
                assert bool(value) == bool(a[0]), name
            else:  # the pressure slope is infinite at detachment: conditioned like 1/(θmax - θ)
                M_fan = first(array.M2)
                fan_kappa = M_fan if math.isfinite(M_fan) else 1.0
                assert_agree(value, a, 32 * kappa * max(1.0, fan_kappa) * log_factor(a), name)
    array = array_form(lambda m, x: waves.turn_for_pressure_ratio(m, x, g), M, p)
    # the turn near zero (p2/p1 → 1) and at the Mach wave is ill-conditioned in w
    assert_agree(waves.turn_for_pressure_ratio(M, p, g), array,
                 64 * (1.0 + 1.0 / max(abs(p - 1.0), 1e-12)), "turn(p2/p1)")


def test_np_float64_and_int_take_the_scalar_form():
    # np.float64 is a float subclass and ints are exact: both take the fast form and give
    # a Python float; a 0-d array or a bool does not
    assert type(isen.pressure_ratio(np.float64(2.0), 1.4)) is float
    assert type(isen.pressure_ratio(2, 1.4)) is float
    assert type(obl.wave_angle_from_deflection(2, np.float64(0.1))) is float
    assert type(isen.pressure_ratio(np.array(2.0), 1.4)) is not float
