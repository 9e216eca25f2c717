"""Tests of gasdyn2d.numerics (the bracketed Newton solver) and of the boundary's checks
(gasdyn2d.boundary.checks) on floats and arrays."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import reference as ref
from gasdyn2d import numerics as nx
from gasdyn2d.boundary import Call
from gasdyn2d.boundary.checks import Check, clamp_to_limit
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.relations.area_ratio import _area_root_and_slopes, _area_ratio_start, area_ratio


class CountingResidual:
    """The signed-root A/A* residual of the isentropic inverse, counting its evaluations."""

    def __init__(self, A, gamma):
        self.gamma = np.broadcast_to(gamma, np.shape(A))
        self.target = np.sqrt(np.log(A))
        self.calls = 0

    def __call__(self, M):
        self.calls += 1
        root, slope, _ = _area_root_and_slopes(M, self.gamma)
        return root - self.target, slope


def _solve_area(M, gamma=1.4, start_factor=1.05):
    A = area_ratio(M, gamma)
    residual = CountingResidual(A, gamma)
    # a deliberately poorer start than the library's, so that Newton has work to do
    start = _area_ratio_start(np.log(A), np.broadcast_to(gamma, A.shape), True) * start_factor
    got = nx.safeguarded_newton(residual, start, np.ones_like(A), np.full_like(A, 1e3))
    return got, residual.calls


def test_newton_stops_within_a_few_ulp_instead_of_running_to_the_cap():
    # invented cases: before the stopping rules were added, 10^4 random M in [1.05, 5]
    # took 54 residual evaluations (elements flipping at rounding level, or a last
    # Newton step landing on the bracket end and turning into bisections); the median
    # element needs 6. Accuracy: the mpmath root (tests/reference.py) on a sample.
    rng = np.random.default_rng(20261201)
    M = rng.uniform(1.05, 5.0, 10_000)
    got, calls = _solve_area(M)
    assert calls <= 9
    A = area_ratio(M, 1.4)
    sample = slice(0, 40)
    expected = [ref.M_from_A_Astar(a, 1.4) for a in A[sample]]
    assert np.max(ref.relative_error(got[sample], expected)) < 4e-15


@pytest.mark.parametrize("M", [1.2963, 1.3733, 2.2807125678877203])
def test_newton_cases_that_used_to_hit_the_cap(M):
    # invented cases measured to run to the 60-iteration cap with the old 4e-16 step rule
    got, calls = _solve_area(np.array([M]))
    assert calls <= 8
    assert got[0] == pytest.approx(ref.M_from_A_Astar(area_ratio(M, 1.4), 1.4), rel=4e-15)


def test_newton_stops_on_a_residual_that_flips_at_rounding_level():
    # invented: f(x) = x - 1/3 plus ±1 ulp of noise that never lets the step settle
    calls = []

    def noisy(x):
        calls.append(1)
        noise = np.where(len(calls) % 2 == 0, 1.0, -1.0) * 4 * ref.EPS
        return (x - 1.0 / 3.0) + noise, np.ones_like(x)

    got = nx.safeguarded_newton(noisy, np.full(5, 0.9), np.zeros(5), np.ones(5))
    assert len(calls) < 12
    np.testing.assert_allclose(got, 1.0 / 3.0, rtol=1e-14)


def test_newton_does_not_stop_on_a_zero_step_from_an_infinite_slope():
    # invented: the residual's slope is infinite at the bracket end (as for a square-root
    # variable at a fold); a step f/inf = 0 is not convergence, bisection must continue
    def residual(x):
        with np.errstate(divide="ignore"):
            slope = np.where(x == 1.0, np.inf, 1.0)
        return x - 0.25, slope

    got = nx.safeguarded_newton(residual, np.array([1.0]), np.array([0.0]), np.array([1.0]))
    assert got[0] == pytest.approx(0.25, rel=1e-15)


def test_newton_nan_residual_gives_nan_and_others_are_unaffected():
    # invented: element 1 has an undefined residual
    def residual(x):
        f = x * x - 2.0
        f = np.where(np.arange(3) == 1, np.nan, f)
        return f, 2.0 * x

    got = nx.safeguarded_newton(residual, np.full(3, 1.5), np.ones(3), np.full(3, 2.0))
    assert np.isnan(got[1])
    np.testing.assert_allclose(got[[0, 2]], math.sqrt(2.0), rtol=4 * ref.EPS)  # √2 (fact)


def test_newton_keeps_the_input_shape():
    got = nx.safeguarded_newton(lambda x: (x * x - 2.0, 2.0 * x), np.full((2, 3), 1.5),
                                np.ones((2, 3)), np.full((2, 3), 2.0))
    assert got.shape == (2, 3)
    np.testing.assert_allclose(got, math.sqrt(2.0), rtol=4 * ref.EPS)


@settings(max_examples=40, deadline=None)
@given(root=st.floats(1e-6, 1e6), start=st.floats(0.0, 1.0))
def test_newton_finds_any_root_in_the_bracket(root, start):
    # property: a monotonic residual with its root inside the bracket is always found
    lower, upper = root / 3.0, root * 7.0
    x0 = lower + start * (upper - lower)
    got = nx.safeguarded_newton(lambda x: (np.log(x / root), 1.0 / x), np.array([x0]),
                                np.array([lower]), np.array([upper]))
    assert got[0] == pytest.approx(root, rel=1e-14)


# ----------------------------------------------------------------- the checks on floats

RAISE, NAN = Check(False), Check(True)


def test_in_range_floats_pass_the_checks_unchanged():
    assert RAISE.gamma(1.4) == 1.4
    assert RAISE.supersonic_mach(2.0, "M") == 2.0
    assert RAISE.at_least(0.0, "x", 0.0) == 0.0


@pytest.mark.parametrize("value", [0.5, math.inf, -1.0])
def test_out_of_range_floats_are_still_rejected(value):
    with pytest.raises(InvalidInputError, match="M must be"):
        RAISE.supersonic_mach(value, "M")
    assert math.isnan(NAN.supersonic_mach(value, "M"))


@pytest.mark.parametrize("gamma", [1.0, 0.5, math.inf])
def test_bad_gamma_floats_are_rejected(gamma):
    with pytest.raises(InvalidInputError, match="gamma"):
        RAISE.gamma(gamma)


def test_nan_passes_every_check_as_nan():
    assert math.isnan(RAISE.gamma(math.nan))
    assert math.isnan(RAISE.supersonic_mach(math.nan, "M"))
    assert np.isnan(RAISE.supersonic_mach(np.array([math.nan, 2.0]), "M")[0])


def test_clamp_to_limit_scalar_and_array_agree():
    below = 1.0 - 2 * ref.EPS  # invented: a Mach number two ulp below 1
    assert clamp_to_limit(below, 1.0, "lower") == 1.0
    assert clamp_to_limit(0.9, 1.0, "lower") == 0.9
    np.testing.assert_array_equal(
        clamp_to_limit(np.array([below, 0.9, 2.0]), 1.0, "lower"), [1.0, 0.9, 2.0])


def test_the_boundary_never_writes_through_to_the_callers_array():
    a = np.array([2.0, 3.0])
    shock = __import__("gasdyn2d").oblique_shock(a, deflection=np.array([0.1, 0.1]))
    assert not np.shares_memory(shock.M1, a) and a[0] == 2.0


def test_shapes_that_do_not_fit_are_named():
    call = Call("raise")
    call.take("a", np.zeros(2))
    call.take("b", np.zeros(3))
    with pytest.raises(InvalidInputError, match=r"a \(2,\), b \(3,\)"):
        call.prepare()


def test_any_true():
    assert nx.any_true(np.array(True)) and not nx.any_true(np.array(False))
    assert nx.any_true(np.array([False, True])) and not nx.any_true(np.zeros(3, bool))


# invented edge case: an unknown near zero (a slip direction, an angle) converges to an
# absolute tolerance, and a residual known to increase skips the evaluation at ``lower``
def test_safeguarded_newton_absolute_tolerance_and_known_direction():
    root = np.array([1e-18, -3e-12, 0.2])
    calls = {"n": 0}

    def residual(x):
        calls["n"] += 1
        return np.sinh(x - root), np.cosh(x - root)  # increasing, root at ``root``

    start = np.array([1e-3, 1e-3, 0.25])
    lower, upper = np.full(3, -1.0), np.full(3, 1.0)
    plain = nx.safeguarded_newton(residual, start, lower, upper)
    n_plain = calls["n"]
    calls["n"] = 0
    known = nx.safeguarded_newton(residual, start, lower, upper, atol=1e-15, increasing=True)
    assert np.all(np.abs(known - root) <= 1e-15)
    assert np.all(np.abs(plain - root) <= 1e-15)
    assert calls["n"] < n_plain  # no evaluation at ``lower``, and no chase below 1e-15
