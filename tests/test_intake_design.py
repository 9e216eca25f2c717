"""Tests of gasdyn2d.design.intake_design: optimum ramps and the starting limits of internal contraction.

Independent references:
- Oswatitsch (1944), NACA TM 1140 (1947): at the recovery optimum the oblique shocks have
  equal normal Mach numbers and the terminal normal shock is slightly weaker; the values at
  M 3 with two ramps were computed for /work/shared/SOURCES.md;
- a reference written here with mpmath from the normal-shock relations on the normal
  component (NACA Report 1135, eqs. 93-99, 128-138), and a one-dimensional scipy optimum;
- Kantrowitz & Donaldson (1945), NACA ACR L5D20 (from memory): the contraction a normal shock
  at the entrance can swallow; NACA Report 1135, Table II for A/A*.
"""

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import optimize

from gasdyn2d import ureg
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.design.intake_design import contraction_limits, equal_strength_normal_mach, optimal_ramps
from gasdyn2d.design.intakes import ramp_intake

mp.mp.dps = 30
G = mp.mpf("1.4")


def ref_normal_shock(mn, g=G):
    """(Mn2, p02/p01) behind a normal shock of upstream Mach mn (NACA Report 1135, eqs. 96, 99)."""
    m2 = mp.mpf(mn) ** 2
    p = 1 + 2 * g / (g + 1) * (m2 - 1)
    rho = (g + 1) * m2 / ((g - 1) * m2 + 2)
    return mp.sqrt(((g - 1) * m2 + 2) / (2 * g * m2 - (g - 1))), rho ** (g / (g - 1)) * p ** (
        -1 / (g - 1))


def ref_stage(M, mn, g=G):
    """Mach behind an oblique shock with normal Mach mn: M2 = Mn2 / sin(β - θ)."""
    M, mn = mp.mpf(M), mp.mpf(mn)
    beta = mp.asin(mn / M)
    theta = mp.atan(2 * mp.cot(beta) * (mn**2 - 1) / (M**2 * (g + mp.cos(2 * beta)) + 2))
    mn2, p0 = ref_normal_shock(mn, g)
    return mn2 / mp.sin(beta - theta), p0, theta


def ref_recovery(M, normal_machs, g=G):
    mach, total = mp.mpf(M), mp.mpf(1)
    for mn in normal_machs:
        mach, p0, _ = ref_stage(mach, mn, g)
        total *= p0
    return total * ref_normal_shock(mach, g)[1], mach


def ref_equal_oblique_optimum(M, n):
    """Oswatitsch's condition imposed: n oblique shocks of one normal Mach m; best m by scipy."""
    def loss(m):
        mach = mp.mpf(M)
        for _ in range(n):  # a shock too strong for its stage: outside the search
            if not (isinstance(mach, mp.mpf) and mach > m):
                return 1e3
            mach = ref_stage(mach, m)[0]
        if not (isinstance(mach, mp.mpf) and mach > 1):
            return 1e3
        return -float(mp.log(ref_recovery(M, [m] * n)[0]))
    lo, hi = 1.0, float(M)  # bisect for the strongest m that keeps every stage supersonic
    for _ in range(50):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if loss(mid) < 1e3 else (lo, mid)
    res = optimize.minimize_scalar(loss, bounds=(1.0 + 1e-9, lo), method="bounded",
                                   options={"xatol": 1e-10})
    return res.x, math.exp(-res.fun)


# Oswatitsch optimum at M 3 with two ramps, computed values in SOURCES.md (6 s.f.)
SOURCES_OSWATITSCH_M3_TWO_RAMPS = {"recovery": 0.743652, "oblique_mn": 1.59936,
                                   "terminal_m": 1.50727, "equal_rule_recovery": 0.742157}


def test_optimum_matches_sources_at_mach_3_two_ramps():
    best = optimal_ramps(3.0, 2)
    ref = SOURCES_OSWATITSCH_M3_TWO_RAMPS
    assert best.recovery == pytest.approx(ref["recovery"], abs=6e-7)
    assert best.normal_mach[0] == pytest.approx(ref["oblique_mn"], abs=6e-6)
    assert best.normal_mach[1] == pytest.approx(ref["oblique_mn"], abs=6e-6)
    assert best.normal_mach[2] == pytest.approx(ref["terminal_m"], abs=6e-6)
    assert best.equal_strength_recovery == pytest.approx(ref["equal_rule_recovery"], abs=6e-7)


@pytest.mark.parametrize("M, n", [(1.8, 1), (2.5, 2), (3.0, 3), (4.0, 2), (5.0, 4), (6.0, 3)])
def test_optimiser_finds_the_oswatitsch_condition(M, n):
    # Oswatitsch (NACA TM 1140): equal oblique normal Mach numbers, a weaker terminal shock.
    best = optimal_ramps(M, n)
    oblique = np.asarray(best.normal_mach[:-1])
    assert np.ptp(oblique) < 2e-6 * oblique.mean()
    assert best.normal_mach[-1] < oblique.min()
    # the 1-D optimum with the condition imposed, computed independently with mpmath + scipy
    m_ref, recovery_ref = ref_equal_oblique_optimum(M, n)
    assert oblique.mean() == pytest.approx(m_ref, rel=1e-6)
    assert best.recovery == pytest.approx(recovery_ref, rel=1e-11)
    assert best.recovery >= best.equal_strength_recovery


def test_recovery_of_optimum_against_reference_and_ramp_intake():
    best = optimal_ramps(3.5, 3)
    recovery, _ = ref_recovery(3.5, list(best.normal_mach[:-1]))
    assert best.recovery == pytest.approx(float(recovery), rel=1e-12)
    # the turns fed back through ramp_intake give the same train
    intake = ramp_intake(3.5, best.deflections)
    assert intake.recovery == pytest.approx(best.recovery, rel=1e-12)
    np.testing.assert_allclose(intake.normal_mach, best.normal_mach, rtol=1e-12)


def test_equal_strength_rule_makes_every_shock_equal():
    rule = equal_strength_normal_mach(np.array([2.0, 3.0, 5.0]), 3)
    for M, m in zip([2.0, 3.0, 5.0], rule):
        recovery, last = ref_recovery(M, [m] * 3)
        assert float(last) == pytest.approx(m, rel=1e-13)
    best = optimal_ramps(3.0, 3)
    intake = ramp_intake(3.0, best.equal_strength_deflections)
    np.testing.assert_allclose(intake.normal_mach, best.equal_strength_normal_mach, rtol=1e-12)


def test_optimum_is_a_local_maximum_of_ramp_intake():
    best = optimal_ramps(2.8, 2)
    rng = np.random.default_rng(7)  # invented perturbations of the optimum turns
    turns = best.deflections + rng.normal(scale=math.radians(0.5), size=(50, 2))
    assert np.all(ramp_intake(2.8, turns).recovery <= best.recovery + 1e-15)


def test_shapes_and_quantities():
    best = optimal_ramps(np.array([[2.0, 3.0], [4.0, 5.0]]), 2)
    assert best.deflections.shape == (2, 2, 2)
    assert best.normal_mach.shape == (2, 2, 3)
    single = optimal_ramps(4.0, 2)
    assert best.recovery[1, 0] == pytest.approx(single.recovery, rel=1e-12)
    assert isinstance(single.recovery, float)
    q = optimal_ramps(3.0 * ureg.dimensionless, 1)
    plain = optimal_ramps(3.0, 1)
    assert q.recovery == pytest.approx(plain.recovery, rel=1e-14)
    assert q.deflections.units == ureg.radian
    assert q.deflections.m == pytest.approx(plain.deflections, rel=1e-14)
    assert ramp_intake(3.0, q.deflections).recovery == pytest.approx(plain.recovery, rel=1e-12)


@pytest.mark.parametrize("M, n, error", [(0.9, 2, "M must be"), (3.0, 0, "n_ramps"),
                                         (3.0, 2.5, "n_ramps"), (3.0, True, "n_ramps")])
def test_bad_inputs(M, n, error):
    with pytest.raises(InvalidInputError, match=error):
        optimal_ramps(M, n)


def test_errors_nan():
    best = optimal_ramps([0.5, 3.0], 2, errors="nan")
    assert np.isnan(best.recovery[0]) and np.isfinite(best.recovery[1])


@settings(max_examples=12, deadline=None)
@given(M=st.floats(1.3, 7.0), n=st.integers(1, 3))
def test_more_ramps_at_the_optimum_never_worse(M, n):
    fewer, more = optimal_ramps(M, n), optimal_ramps(M, n + 1)
    assert 0.0 < fewer.recovery <= more.recovery + 1e-13 <= 1.0 + 1e-13
    assert fewer.recovery >= fewer.equal_strength_recovery - 1e-13


# ------------------------------------------------------------- starting limits


def ref_kantrowitz(M, g=G):
    """A*2/A at a normal shock in the entrance: 1/(A/A*)(M2), M2 behind the shock (mpmath)."""
    m2, _ = ref_normal_shock(M, g)
    area = (1 / m2) * ((2 / (g + 1)) * (1 + (g - 1) / 2 * m2**2)) ** ((g + 1) / (2 * (g - 1)))
    return 1 / area


@pytest.mark.parametrize("M", [1.05, 1.5, 2.0, 3.0, 5.0, 10.0])
def test_kantrowitz_limit_against_reference(M):
    limits = contraction_limits(M)
    assert limits.self_starting == pytest.approx(float(ref_kantrowitz(mp.mpf(M))), rel=1e-13)
    assert limits.isentropic < limits.self_starting < 1.0


def test_kantrowitz_limit_end_points():
    # Fact of the trade: no contraction at M = 1; the limit tends to ~0.6 for γ = 1.4 as M → ∞
    # (from memory), exactly 1/(A/A*) at M2 = √((γ-1)/(2γ)) behind an infinitely strong shock.
    limits = contraction_limits([1.0, 1e8])
    assert limits.self_starting[0] == pytest.approx(1.0, rel=1e-15)
    m2 = mp.sqrt((G - 1) / (2 * G))
    area = (1 / m2) * ((2 / (G + 1)) * (1 + (G - 1) / 2 * m2**2)) ** ((G + 1) / (2 * (G - 1)))
    assert limits.self_starting[1] == pytest.approx(float(1 / area), rel=1e-9)
    assert limits.self_starting[1] == pytest.approx(0.6, abs=0.001)


def test_isentropic_limit_matches_naca_1135():
    # NACA Report 1135, Table II, A/A* at M 2.0 and 3.0 (via SOURCES.md)
    limits = contraction_limits(np.array([2.0, 3.0]))
    np.testing.assert_allclose(limits.isentropic, [1 / 1.68750, 1 / 4.23457], rtol=3e-6)


def test_contraction_limits_bad_input_and_nan():
    with pytest.raises(InvalidInputError, match="entrance_mach"):
        contraction_limits(0.7)
    limits = contraction_limits([0.7, 2.0], errors="nan")
    assert np.isnan(limits.self_starting[0]) and np.isfinite(limits.self_starting[1])


def test_mixed_compression_chain():
    # Invented mixed-compression intake: one 8° external ramp at M 3, then internal contraction.
    external = ramp_intake(3.0, [math.radians(8.0)], terminal="none")
    limits = contraction_limits(external.stage_mach[-1])
    ref = ref_kantrowitz(mp.mpf(external.stage_mach[-1]))
    assert limits.self_starting == pytest.approx(float(ref), rel=1e-13)


# ------------------------------------------------------- the boundary (issues 9, 10)


@pytest.mark.parametrize("n", ["2", True, 2.5, None])
def test_ramp_count_of_the_wrong_type_is_invalid_input(n):
    # Regression: a string or bool count was not an InvalidInputError naming n_ramps.
    with pytest.raises(InvalidInputError, match="n_ramps"):
        optimal_ramps(3.0, n)


def test_contraction_limits_keep_labels_and_refuse_bad_types():
    pd = pytest.importorskip("pandas")
    xr = pytest.importorskip("xarray")
    index = pd.Index([1.5, 2.0, 3.0], name="entrance")
    limits = contraction_limits(pd.Series([1.5, 2.0, 3.0], index=index))
    plain = contraction_limits(np.array([1.5, 2.0, 3.0]))
    assert limits.self_starting.index.equals(index)
    np.testing.assert_array_equal(limits.self_starting.to_numpy(), plain.self_starting)
    labelled = contraction_limits(xr.DataArray([2.0, 3.0], dims="station"))
    assert labelled.isentropic.dims == ("station",)
    assert labelled.to_xarray()["self_starting"].dims == ("station",)
    with pytest.raises(InvalidInputError, match="entrance_mach"):
        contraction_limits("2.0")
    with pytest.raises(InvalidInputError, match="gamma"):
        contraction_limits(2.0, gamma=True)


def test_optimal_ramps_per_ramp_fields_are_labelled():
    xr = pytest.importorskip("xarray")
    best = optimal_ramps(xr.DataArray([2.5, 3.0], dims="design"), 2)
    assert best.deflections.dims == ("design", "ramp")
    assert best.normal_mach.dims == ("design", "shock")
    one = optimal_ramps(3.0, 2)
    np.testing.assert_allclose(best.deflections.values[1], one.deflections, rtol=1e-12)
    assert not one.deflections.flags.writeable
