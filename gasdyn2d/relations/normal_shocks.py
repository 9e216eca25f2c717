"""Normal shock waves in a perfect gas.

Plain core (floats and ndarrays, no pint): :func:`normal_shock_ratios` computes
every ratio from ``w = M1² - 1`` (so that weak shocks keep full precision), and
the inverses :func:`mach_from_downstream_mach`, :func:`mach_from_density_jump`,
:func:`mach_from_temperature_jump`, :func:`mach_from_stagnation_pressure_ratio`,
:func:`mach_from_pitot_ratio`. Unit boundary: :func:`normal_shock`.

Each plain core has a scalar form on the math module right after it (the same
algorithm, floats in and out); the array form hands plain floats to it. Huge
Mach numbers (up to 1e300 and inf) give the limits, without overflow warnings.
"""

from __future__ import annotations

import dataclasses
import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..boundary import SCALAR_CHECKS, Call, ResultTable, clamp_to_limit, one_of, unit_field
from ..boundary.checks import ROUNDING_SLACK
from ..boundary.types import ArrayInput, FloatArray
from ..numerics import nan_where_nan
from .gas import Gas, gas_of_call

__all__ = [
    "normal_shock",
    "NormalShock",
    "NormalShockRatios",
    "normal_shock_ratios",
    "mach_from_downstream_mach",
    "mach_from_density_jump",
    "mach_from_temperature_jump",
    "mach_from_stagnation_pressure_ratio",
    "mach_from_pitot_ratio",
    "pitot_ratio",
    "mach_from_pressure_jump",
    "lowest_downstream_mach",
    "mach_squared_minus_one",
    "normal_shock_state",
]

_HUGE_W = 1e300  # above this M1² - 1 the ratios switch to their forms in 1/w (no overflow)
_HUGE_MACH = 1e150  # above this M² may overflow
_EPS = float(np.finfo(float).eps)
_DENSITY_LIMIT_SLACK = 4.0 * _EPS  # rounding of a strong-shock limit (relative)


def mach_squared_minus_one(M):
    """Plain core: w = M² - 1 = (M - 1)(M + 1) [-], exact near M = 1, inf (no warning)
    once M² overflows; the argument of :func:`normal_shock_ratios`.

    Examples
    --------
    >>> from gasdyn2d.relations.normal_shocks import mach_squared_minus_one
    >>> float(mach_squared_minus_one(1e200))
    inf
    """
    if nx.plain_scalars(M):
        return _mach_squared_minus_one_scalar(M)
    M = np.asarray(M, dtype=float)
    with np.errstate(over="ignore"):
        return (M - 1.0) * (M + 1.0)


def _mach_squared_minus_one_scalar(M):
    return (M - 1.0) * (M + 1.0)

class NormalShockRatios(NamedTuple):
    """Plain-core result of :func:`normal_shock_ratios` (all ndarrays, dimensionless)."""

    M2: np.ndarray
    p2_p1: np.ndarray
    rho2_rho1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray
    strength: np.ndarray  #: (p2 - p1)/p1 = 2γw/(γ+1), without the cancellation of p2/p1 - 1


def normal_shock_ratios(w, gamma=1.4):
    """Plain core: ratios across a normal shock with upstream normal Mach number √(1 + w).

    ``w = M1² - 1 >= 0`` is the natural variable: every jump is proportional to
    it, so weak shocks lose no digits (NACA Report 1135, eqs. 93-100, rewritten).
    Above w = 1e300 (and at w = inf) ρ2/ρ1 - 1 = 2/((γ-1) + (γ+1)/w) and
    M2² = ((γ-1) + (γ+1)/w)/(2γ + (γ+1)/w), the limits of a strong shock; the
    ratios that grow like w overflow to inf only where they exceed the float range.
    """
    if nx.plain_scalars(w, gamma):
        return _normal_shock_ratios_scalar(w, gamma)
    w = np.asarray(w, dtype=float)
    if nx.any_true(w > _HUGE_W):
        return _normal_shock_ratios_huge(w, gamma)
    gp, gm = gamma + 1.0, gamma - 1.0
    p_jump = 2.0 * gamma / gp * w  # p2/p1 - 1, eq. 93
    p2_p1 = 1.0 + p_jump
    den = gm * w + gp
    rho_jump = 2.0 * w / den  # ρ2/ρ1 - 1, from eq. 94
    rho2_rho1 = 1.0 + rho_jump
    T2_T1 = p2_p1 / rho2_rho1
    M2 = np.sqrt(den / (gp * p2_p1))  # eq. 96: 2γw + γ + 1 = (γ+1) p2/p1
    # eq. 99: p02/p01 = (ρ2/ρ1)^(γ/(γ-1)) (p2/p1)^(-1/(γ-1)), in logs to keep 1 - O(w³)
    log_p0 = (gamma * np.log1p(rho_jump) - np.log1p(p_jump)) / gm
    p02_p01 = np.exp(log_p0)
    return NormalShockRatios(M2, p2_p1, rho2_rho1, T2_T1, p02_p01, p_jump)


def _normal_shock_ratios_scalar(w, gamma):
    """Scalar form of :func:`normal_shock_ratios` (a NormalShockRatios of floats)."""
    gp, gm = gamma + 1.0, gamma - 1.0
    p_jump = 2.0 * gamma / gp * w
    p2_p1 = 1.0 + p_jump
    if w > _HUGE_W:  # the forms in 1/w (_normal_shock_ratios_huge)
        iw = 1.0 / w
        rho2_rho1 = 1.0 + 2.0 / (gm + gp * iw)
        M2 = math.sqrt((gm + gp * iw) / (2.0 * gamma + gp * iw))
        log_p = math.log(2.0 * gamma / gp) + math.log(w) + math.log1p(gp / (2.0 * gamma) * iw)
        p02_p01 = nx.fexp((gamma * math.log(rho2_rho1) - log_p) / gm)
        return NormalShockRatios(M2, p2_p1, rho2_rho1, p2_p1 / rho2_rho1, p02_p01, p_jump)
    den = gm * w + gp
    rho_jump = nx.fdiv(2.0 * w, den)
    rho2_rho1 = 1.0 + rho_jump
    M2 = nx.fsqrt(nx.fdiv(den, gp * p2_p1))
    log_p0 = nx.fdiv(gamma * nx.flog1p(rho_jump) - nx.flog1p(p_jump), gm)
    return NormalShockRatios(M2, p2_p1, rho2_rho1, nx.fdiv(p2_p1, rho2_rho1), nx.fexp(log_p0),
                             p_jump)

def _normal_shock_ratios_huge(w, gamma):
    """:func:`normal_shock_ratios` for arrays with some w > 1e300, in the forms in 1/w."""
    huge = w > _HUGE_W
    usual = normal_shock_ratios(np.where(huge, 1.0, w), gamma)
    gp, gm = gamma + 1.0, gamma - 1.0
    with np.errstate(over="ignore"):
        iw = 1.0 / np.where(huge, w, 1.0)
        p_jump = 2.0 * gamma / gp * w
        rho2_rho1 = 1.0 + 2.0 / (gm + gp * iw)
        T2_T1 = (1.0 + p_jump) / rho2_rho1
        M2 = np.sqrt((gm + gp * iw) / (2.0 * gamma + gp * iw))
        # eq. 99 in logs: ln(p02/p01) = [γ ln(ρ2/ρ1) - ln(p2/p1)]/(γ-1), p2/p1 = 1 + 2γw/(γ+1)
        log_p = (np.log(2.0 * gamma / gp) + np.log(np.where(huge, w, 1.0))
                 + np.log1p(gp / (2.0 * gamma) * iw))
        p02_p01 = np.exp((gamma * np.log(rho2_rho1) - log_p) / gm)
    pick = lambda far, near: np.where(huge, far, near)  # noqa: E731
    return NormalShockRatios(pick(M2, usual.M2), pick(1.0 + p_jump, usual.p2_p1),
                             pick(rho2_rho1, usual.rho2_rho1), pick(T2_T1, usual.T2_T1),
                             pick(p02_p01, usual.p02_p01), pick(p_jump, usual.strength))


def pitot_ratio(M1, gamma=1.4):
    """Plain core: p02/p1 behind a normal shock (Rayleigh pitot formula, NACA Report 1135, eq. 100)."""
    if nx.plain_scalars(M1, gamma):
        return _pitot_ratio_scalar(M1, gamma)
    M1 = np.asarray(M1, dtype=float)
    if nx.any_true(M1 > _HUGE_MACH):
        # ln(p02/p1) = 2 ln M1 + [γ ln((γ+1)/2) + ln(γ+1) - ln(2γ - (γ-1)/M1²)]/(γ-1),
        # the same formula without M1² (which may overflow); inf where p02/p1 does
        with np.errstate(over="ignore"):
            im2 = (1.0 / M1) / M1
            gp, gm = gamma + 1.0, gamma - 1.0
            far = np.exp(2.0 * np.log(M1) + (gamma * np.log(0.5 * gp) + np.log(gp)
                                             - np.log(2.0 * gamma - gm * im2)) / gm)
            return np.where(M1 > _HUGE_MACH, far, pitot_ratio(np.where(M1 > _HUGE_MACH, 2.0, M1),
                                                              gamma))
    m2 = M1 * M1
    return np.exp(gamma / (gamma - 1.0) * np.log(0.5 * (gamma + 1.0) * m2)
                  + 1.0 / (gamma - 1.0) * np.log((gamma + 1.0) / (2.0 * gamma * m2 - gamma + 1.0)))


def _pitot_ratio_scalar(M1, gamma):
    gp, gm = gamma + 1.0, gamma - 1.0
    if M1 > _HUGE_MACH:
        im2 = (1.0 / M1) / M1
        return nx.fexp(2.0 * math.log(M1) + (gamma * math.log(0.5 * gp) + math.log(gp)
                                             - math.log(2.0 * gamma - gm * im2)) / gm)
    m2 = M1 * M1
    return nx.fexp(nx.fdiv(gamma, gm) * nx.flog(0.5 * gp * m2)
                   + nx.fdiv(1.0, gm) * nx.flog(nx.fdiv(gp, 2.0 * gamma * m2 - gamma + 1.0)))

def normal_shock_state(M1, gamma=1.4):
    """Plain core: (M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, p02/p1, strength) behind a normal shock
    of upstream Mach number M1 >= 1, in one call.

    The array form is :func:`normal_shock_ratios` of w = M1² - 1 and :func:`pitot_ratio`;
    the scalar form runs the same formulas in the same order (for 1 <= M1 < 1e150, the
    other cases through those functions), without building intermediate tuples.

    Examples
    --------
    >>> from gasdyn2d.relations.normal_shocks import normal_shock_state
    >>> [round(x, 6) for x in normal_shock_state(2.0)]
    [0.57735, 4.5, 2.666667, 1.6875, 0.720874, 5.640441, 3.5]
    """
    if type(M1) is float and type(gamma) is float and 1.0 <= M1 < _HUGE_MACH and gamma > 1.0:
        gp, gm = gamma + 1.0, gamma - 1.0
        w = (M1 - 1.0) * (M1 + 1.0)  # mach_squared_minus_one
        p_jump = 2.0 * gamma / gp * w  # _normal_shock_ratios_scalar, eq. 93
        p2_p1 = 1.0 + p_jump
        den = gm * w + gp
        rho_jump = 2.0 * w / den
        rho2_rho1 = 1.0 + rho_jump
        m2 = M1 * M1  # _pitot_ratio_scalar, eq. 100
        pitot = math.exp(gamma / gm * math.log(0.5 * gp * m2)
                         + 1.0 / gm * math.log(gp / (2.0 * gamma * m2 - gamma + 1.0)))
        return (math.sqrt(den / (gp * p2_p1)), p2_p1, rho2_rho1, p2_p1 / rho2_rho1,
                math.exp((gamma * math.log1p(rho_jump) - math.log1p(p_jump)) / gm), pitot,
                p_jump)
    r = normal_shock_ratios(mach_squared_minus_one(M1), gamma)
    return (r.M2, r.p2_p1, r.rho2_rho1, r.T2_T1, r.p02_p01, pitot_ratio(M1, gamma), r.strength)


def mach_from_downstream_mach(M2, gamma=1.4):
    """M1 from M2 in (√((γ-1)/(2γ)), 1]: M1² - 1 = (γ+1)(1 - M2²)/(2γM2² - (γ-1)).

    Written for M1² - 1 (NACA Report 1135, eq. 96 inverted) so that weak shocks keep
    their digits. The lower limit itself (within 4 ulp) is the M1 → ∞ limit: inf.
    """
    if nx.plain_scalars(M2, gamma):
        return _mach_from_downstream_mach_scalar(M2, gamma)
    M2 = np.asarray(M2, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        w = (gamma + 1.0) * (1.0 - M2) * (1.0 + M2) / (2.0 * gamma * M2 * M2 - (gamma - 1.0))
        M1 = np.sqrt(1.0 + w)
        # M2 → √((γ-1)/(2γ)) only as M1 → ∞: that value, to rounding, is M1 = inf
        low = np.sqrt((gamma - 1.0) / (2.0 * gamma))
        at_limit = M2 <= low * (1.0 + _DENSITY_LIMIT_SLACK)
        if not nx.any_true(at_limit):
            return M1
        return np.where(at_limit, np.where(M2 >= low * (1.0 - _DENSITY_LIMIT_SLACK), np.inf,
                                           np.nan), M1)


def _mach_from_downstream_mach_scalar(M2, gamma):
    w = nx.fdiv((gamma + 1.0) * (1.0 - M2) * (1.0 + M2), 2.0 * gamma * M2 * M2 - (gamma - 1.0))
    low = math.sqrt((gamma - 1.0) / (2.0 * gamma))
    if M2 <= low * (1.0 + _DENSITY_LIMIT_SLACK):
        return math.inf if M2 >= low * (1.0 - _DENSITY_LIMIT_SLACK) else math.nan
    return nx.fsqrt(1.0 + w)

def mach_from_density_jump(rho2_rho1, gamma=1.4):
    """M1 from ρ2/ρ1 in [1, (γ+1)/(γ-1)]: M1² - 1 = (γ+1)(r - 1)/((γ+1) - (γ-1)r).

    The density ratio reaches (γ+1)/(γ-1) only as M1 → ∞, so the limit itself gives
    M1 = inf and anything above it NaN. "The limit" is (γ+1)/(γ-1) to within its
    rounding, 4 ulp × (γ+1)/(γ-1) relative (γ itself is rounded: at γ = 1.4 the float
    (γ+1)/(γ-1) is 6.000000000000001, and 6.0 would otherwise give M1 = 1.6e8).
    """
    if nx.plain_scalars(rho2_rho1, gamma):
        return _mach_from_density_jump_scalar(rho2_rho1, gamma)
    r = np.asarray(rho2_rho1, dtype=float)
    gp, gm = gamma + 1.0, gamma - 1.0
    limit = gp / gm
    slack = _DENSITY_LIMIT_SLACK * limit  # × (γ+1)/(γ-1): γ itself is rounded
    with np.errstate(divide="ignore", invalid="ignore"):
        M1 = np.sqrt(1.0 + gp * (r - 1.0) / (gp - gm * r))
        at_limit = r >= limit * (1.0 - slack)
        if not nx.any_true(at_limit):
            return M1
        return np.where(r > limit * (1.0 + slack), np.nan, np.where(at_limit, np.inf, M1))


def _mach_from_density_jump_scalar(r, gamma):
    gp, gm = gamma + 1.0, gamma - 1.0
    limit = gp / gm
    slack = _DENSITY_LIMIT_SLACK * limit
    if r > limit * (1.0 + slack):
        return math.nan
    if r >= limit * (1.0 - slack):
        return math.inf
    return nx.fsqrt(1.0 + nx.fdiv(gp * (r - 1.0), gp - gm * r))

def mach_from_temperature_jump(T2_T1, gamma=1.4):
    """M1 from T2/T1 >= 1: the positive root w = M1² - 1 of a quadratic, without cancellation.

    With t = T2/T1 - 1: 2γ(γ-1)w² + [2(γ²-1) - (γ+1)²t]w - (γ+1)²t = 0 (eqs. 93-95
    combined); the root is taken in whichever of its two algebraic forms avoids the
    difference of nearly equal terms.
    """
    if nx.plain_scalars(T2_T1, gamma):
        return _mach_from_temperature_jump_scalar(T2_T1, gamma)
    t = np.asarray(T2_T1, dtype=float) - 1.0
    gp = gamma + 1.0
    a = 2.0 * gamma * (gamma - 1.0)
    b = 2.0 * gp * (gamma - 1.0) - gp * gp * t
    c = -gp * gp * t
    with np.errstate(divide="ignore", invalid="ignore"):
        # √(b² - 4ac) as hypot(b, 2(γ+1)√(a t)) (c = -(γ+1)² t): no overflow of b² at huge t
        root = np.hypot(b, 2.0 * gp * np.sqrt(a * t))
        w = np.where(b > 0.0, -2.0 * c / (b + root), (root - b) / (2.0 * a))
        return np.sqrt(1.0 + w)


def _mach_from_temperature_jump_scalar(T2_T1, gamma):
    t = T2_T1 - 1.0
    gp = gamma + 1.0
    a = 2.0 * gamma * (gamma - 1.0)
    b = 2.0 * gp * (gamma - 1.0) - gp * gp * t
    c = -gp * gp * t
    root = math.hypot(b, 2.0 * gp * nx.fsqrt(a * t))
    w = nx.fdiv(-2.0 * c, b + root) if b > 0.0 else nx.fdiv(root - b, 2.0 * a)
    return nx.fsqrt(1.0 + w)

_SHOCK_HALLEY_STEPS = 4  # p02/p01 (measured: every start converges to rounding within 4 steps)
_PITOT_HALLEY_STEPS = 3  # p02/p1: its start is closer (measured on 10^5 random cases)
_HUGE_LOG_W = 200.0  # ln w beyond which w³ may overflow: the recovery's forms in 1/w
_SHOCK_ACCEPT_STEP = 1e-8  # a larger last step (in ln w or ln M1) may mean the fallback


def _log_recovery_and_slopes(log_w, gamma):
    """L = ln(p02/p01) at w = e^u, with dL/du and the curvature ratio (d²L/du²)/(dL/du).

    From eq. 99: dL/dw = -2γw²/((1 + w)((γ-1)w + γ+1)(γ+1 + 2γw)) (no cancellation),
    so dL/du = w dL/dw and its logarithmic derivative is
    3 - w/(1+w) - (γ-1)w/((γ-1)w + γ+1) - 2γw/(γ+1 + 2γw).
    """
    w = np.exp(log_w)
    gp, gm = gamma + 1.0, gamma - 1.0
    a, b, c = 1.0 + w, gm * w + gp, gp + 2.0 * gamma * w
    # ln(p02/p01) = [γ ln((γ+1)(1+w)/((γ-1)w+γ+1)) - ln(1 + 2γw/(γ+1))]/(γ-1), eq. 99
    value = (gamma * np.log1p(2.0 * w / b) - np.log1p(2.0 * gamma / gp * w)) / gm
    slope = -2.0 * gamma * w ** 3 / (a * b * c)
    curvature = 3.0 - w / a - gm * w / b - 2.0 * gamma * w / c
    huge = log_w > _HUGE_LOG_W
    if nx.any_true(huge):  # the same in 1/w, where w (or w³) would overflow
        iw = np.exp(-log_w)
        a, b, c = 1.0 + iw, gm + gp * iw, gp * iw + 2.0 * gamma
        far = (gamma * np.log1p(2.0 / b) - log_w - np.log(2.0 * gamma / gp)
               - np.log1p(gp / (2.0 * gamma) * iw)) / gm
        value = np.where(huge, far, value)
        slope = np.where(huge, -2.0 * gamma / (a * b * c), slope)
        curvature = np.where(huge, 3.0 - 1.0 / a - gm / b - 2.0 * gamma / c, curvature)
    return value, slope, curvature


def _log_recovery_and_slopes_scalar(log_w, gamma):
    """Scalar form of :func:`_log_recovery_and_slopes`."""
    gp, gm = gamma + 1.0, gamma - 1.0
    if log_w > _HUGE_LOG_W:
        iw = math.exp(-log_w)
        a, b, c = 1.0 + iw, gm + gp * iw, gp * iw + 2.0 * gamma
        value = (gamma * math.log1p(2.0 / b) - log_w - math.log(2.0 * gamma / gp)
                 - math.log1p(gp / (2.0 * gamma) * iw)) / gm
        return value, -2.0 * gamma / (a * b * c), 3.0 - 1.0 / a - gm / b - 2.0 * gamma / c
    w = nx.fexp(log_w)
    a, b, c = 1.0 + w, gm * w + gp, gp + 2.0 * gamma * w
    value = (gamma * nx.flog1p(nx.fdiv(2.0 * w, b)) - nx.flog1p(2.0 * gamma / gp * w)) / gm
    slope = nx.fdiv(-2.0 * gamma * w * w * w, a * b * c)
    curvature = 3.0 - nx.fdiv(w, a) - nx.fdiv(gm * w, b) - nx.fdiv(2.0 * gamma * w, c)
    return value, slope, curvature

def _halley_in_log(func, x, target, steps, noise):
    """A fixed number of Halley steps on func(x) = target.

    Returns x and a convergence flag: the last step was below 1e-8, or the residual
    before it was already within ``noise`` (the rounding error of ``func``'s value),
    where no algorithm can do better than the problem's conditioning allows.
    """
    for _ in range(steps):
        value, slope, curvature = func(x)
        miss = value - target
        newton = miss / slope
        step = newton / np.maximum(1.0 - 0.5 * newton * curvature, 0.5)  # bounded correction
        x = x - step
    return x, (np.abs(step) <= _SHOCK_ACCEPT_STEP) | (np.abs(miss) <= noise)


def _halley_in_log_scalar(func, x, target, steps, noise):
    """Scalar form of :func:`_halley_in_log`."""
    for _ in range(steps):
        value, slope, curvature = func(x)
        miss = value - target
        newton = nx.fdiv(miss, slope)
        correction = 1.0 - 0.5 * newton * curvature
        step = newton / (correction if correction >= 0.5 or correction != correction else 0.5)
        x = x - step
    return x, abs(step) <= _SHOCK_ACCEPT_STEP or abs(miss) <= noise

def _stagnation_ratio_start(loss, gamma):
    """ln w from the loss -ln(p02/p01): the weak- or strong-shock estimate that fits better.

    Weak: loss ≈ 2γw³(1 - 3γw/(γ+1))/(3(γ+1)²), inverted to first order. Strong:
    p02/p01 ≈ C M1^(-2/(γ-1)) with C from eq. 99 as M1 → ∞. The one with the smaller
    residual is kept: within a factor 5 in w (measured, 1.01 <= γ <= 5), which four
    Halley steps take to rounding.
    """
    gp, gm = gamma + 1.0, gamma - 1.0
    weak = (1.5 * gp * gp / gamma * loss) ** (1.0 / 3.0)
    weak = np.log(weak * (1.0 + gamma / gp * weak))  # next term: dL/dw ∝ w²(1 - 4γw/(γ+1))
    log_c = (gamma * np.log(gp / gm) - np.log(gp / (2.0 * gamma))) / gm
    strong = np.log(np.maximum(np.expm1((log_c + loss) * gm), 1e-300))
    miss_weak = np.abs(_log_recovery_and_slopes(weak, gamma)[0] + loss)
    miss_strong = np.abs(_log_recovery_and_slopes(strong, gamma)[0] + loss)
    return np.where(miss_strong < miss_weak, strong, weak)


def _stagnation_ratio_start_scalar(loss, gamma):
    """Scalar form of :func:`_stagnation_ratio_start`."""
    gp, gm = gamma + 1.0, gamma - 1.0
    weak = (1.5 * gp * gp / gamma * loss) ** (1.0 / 3.0) if loss >= 0.0 else math.nan
    weak = nx.flog(weak * (1.0 + gamma / gp * weak))
    log_c = (gamma * math.log(gp / gm) - math.log(gp / (2.0 * gamma))) / gm
    strong = math.log(max(nx.fexpm1((log_c + loss) * gm), 1e-300))
    miss_weak = abs(_log_recovery_and_slopes_scalar(weak, gamma)[0] + loss)
    miss_strong = abs(_log_recovery_and_slopes_scalar(strong, gamma)[0] + loss)
    return strong if miss_strong < miss_weak else weak

def _rounding_of_log_ratio(log_ratio, gamma):
    """Rounding error of ln(p02/p01) or ln(p02/p1) as evaluated here: a few ulp of its
    terms, which carry the factors γ/(γ-1) and 1/(γ-1) (measured, with margin)."""
    return 8.0 * np.finfo(float).eps * (gamma + 1.0) / (gamma - 1.0) * (1.0 + np.abs(log_ratio))


def _stagnation_ratio_halley(loss, gamma):
    """Fixed-cost part of :func:`mach_from_stagnation_pressure_ratio` (1-d blocks): ln w, flag."""
    return _halley_in_log(lambda u: _log_recovery_and_slopes(u, gamma),
                          _stagnation_ratio_start(loss, gamma), -loss, _SHOCK_HALLEY_STEPS,
                          _rounding_of_log_ratio(loss, gamma))


def mach_from_stagnation_pressure_ratio(p02_p01, gamma=1.4):
    """M1 from p02/p01 in (0, 1]: Halley steps in u = ln(M1² - 1) from an explicit start.

    Near p02/p01 = 1 the loss is ≈ 2γ w³ / (3(γ+1)²) with w = M1² - 1, so the
    inverse is cube-root sensitive there: a relative error ε in 1 - p02/p01
    gives ε/3 in w. Starting value: the weak-shock estimate or the strong-shock
    asymptote, whichever has the smaller residual; then four Halley steps (a fixed
    cost). Elements whose last step is still above 1e-8 are finished by the
    bracketed :func:`~gasdyn2d.numerics.safeguarded_newton`.
    """
    if nx.plain_scalars(p02_p01, gamma):
        return _mach_from_stagnation_pressure_ratio_scalar(p02_p01, gamma)
    r = np.asarray(p02_p01, dtype=float)
    r, gamma = np.broadcast_arrays(r, np.asarray(gamma, dtype=float))
    with np.errstate(all="ignore"):
        loss = -np.log(r)
        log_w, converged = nx.chunked(_stagnation_ratio_halley, loss, gamma)
        retry = ~converged & (r > 0.0) & (r < 1.0) & (gamma > 1.0)
        if np.any(retry):
            log_w = np.array(log_w, dtype=float, copy=True)
            lo, g = loss[retry], gamma[retry]

            def residual(u):
                value, slope, _ = _log_recovery_and_slopes(u, g)
                return value + lo, slope

            log_w[retry] = nx.safeguarded_newton(
                residual, _stagnation_ratio_start(lo, g), np.full_like(lo, -300.0),
                np.full_like(lo, 1500.0))
        M1 = np.sqrt(1.0 + np.exp(log_w))
    M1 = np.where(r == 1.0, 1.0, M1)
    M1 = np.where(r == 0.0, np.inf, M1)  # no recovery at all: the M1 → ∞ limit
    return np.where((r > 1.0) | (r < 0.0), np.nan, M1)


def _mach_from_stagnation_pressure_ratio_scalar(r, gamma):
    """Scalar form; the rare bracketed fallback runs on the array form (one element)."""
    if not (0.0 < r < 1.0):
        return 1.0 if r == 1.0 else (math.inf if r == 0.0 else math.nan)
    loss = -math.log(r)
    log_w, converged = _halley_in_log_scalar(
        lambda u: _log_recovery_and_slopes_scalar(u, gamma),
        _stagnation_ratio_start_scalar(loss, gamma), -loss, _SHOCK_HALLEY_STEPS,
        8.0 * _EPS * (gamma + 1.0) / (gamma - 1.0) * (1.0 + loss))
    if not converged and gamma > 1.0:
        return float(mach_from_stagnation_pressure_ratio(np.array([r]), gamma)[0])
    return nx.fsqrt(1.0 + nx.fexp(log_w))

def _log_pitot_and_slopes(log_M, gamma):
    """ln(p02/p1) at M1 = e^x (eq. 100), its slope d/dx and curvature ratio.

    Slope: 2γ/(γ-1) - 4γm/((γ-1)(2γm - γ + 1)) with m = M1², rising from 2γ/(γ+1)
    at M1 = 1 to 2 as M1 → ∞; its derivative is 8γm/(2γm - γ + 1)².
    """
    gp, gm = gamma + 1.0, gamma - 1.0
    im2 = np.exp(-2.0 * log_M)  # 1/M1², so that no M1² can overflow
    d = 2.0 * gamma - gm * im2  # (2γM1² - (γ-1))/M1²
    value = 2.0 * log_M + (gamma * np.log(0.5 * gp) + np.log(gp / d)) / gm
    slope = 2.0 * gamma / gm - 4.0 * gamma / (gm * d)
    return value, slope, 8.0 * gamma * im2 / (d * d) / slope


def _log_pitot_and_slopes_scalar(log_M, gamma):
    """Scalar form of :func:`_log_pitot_and_slopes`."""
    gp, gm = gamma + 1.0, gamma - 1.0
    im2 = nx.fexp(-2.0 * log_M)
    d = 2.0 * gamma - gm * im2
    value = 2.0 * log_M + (gamma * math.log(0.5 * gp) + nx.flog(nx.fdiv(gp, d))) / gm
    slope = 2.0 * gamma / gm - nx.fdiv(4.0 * gamma, gm * d)
    return value, slope, nx.fdiv(nx.fdiv(8.0 * gamma * im2, d * d), slope)

def _pitot_start(target, gamma):
    """ln M1 from ln(p02/p1): the smaller of the tangent at M1 = 1 and the M1 → ∞ asymptote.

    ln(p02/p1) is convex in ln M1 with slope rising from 2γ/(γ+1) to 2, so both
    lines lie below it and the smaller root is the closer one.
    """
    gp, gm = gamma + 1.0, gamma - 1.0
    at_sonic = gamma / gm * np.log(0.5 * gp)
    tangent = (target - at_sonic) * gp / (2.0 * gamma)
    asymptote = 0.5 * (target - at_sonic - np.log(gp / (2.0 * gamma)) / gm)
    return np.maximum(np.minimum(tangent, asymptote), 0.0)


def _pitot_start_scalar(target, gamma):
    gp, gm = gamma + 1.0, gamma - 1.0
    at_sonic = gamma / gm * math.log(0.5 * gp)
    tangent = (target - at_sonic) * gp / (2.0 * gamma)
    asymptote = 0.5 * (target - at_sonic - math.log(gp / (2.0 * gamma)) / gm)
    smaller = tangent if tangent < asymptote or asymptote != asymptote else asymptote
    return smaller if smaller > 0.0 or smaller != smaller else 0.0

def _pitot_halley(target, gamma):
    """Fixed-cost part of :func:`mach_from_pitot_ratio` (1-d blocks): ln M1, convergence flag."""
    return _halley_in_log(lambda x: _log_pitot_and_slopes(x, gamma),
                          _pitot_start(target, gamma), target, _PITOT_HALLEY_STEPS,
                          _rounding_of_log_ratio(target, gamma))


def mach_from_pitot_ratio(p02_p1, gamma=1.4):
    """M1 from the pitot ratio p02/p1 >= ((γ+1)/2)^(γ/(γ-1)) (its value at M1 = 1).

    Halley steps on ln(p02/p1) against ln M1; the function is smooth, increasing
    and convex, with slope 2γ/(γ+1) at M1 = 1 and 2 for strong shocks, so its
    tangent there and its asymptote give the start (:func:`_pitot_start`). Three
    steps, a fixed cost; elements whose last step is still above 1e-8 are
    finished by the bracketed :func:`~gasdyn2d.numerics.safeguarded_newton`.
    """
    if nx.plain_scalars(p02_p1, gamma):
        return _mach_from_pitot_ratio_scalar(p02_p1, gamma)
    r = np.asarray(p02_p1, dtype=float)
    r, gamma = np.broadcast_arrays(r, np.asarray(gamma, dtype=float))
    with np.errstate(all="ignore"):
        target = np.log(r)
        log_M, converged = nx.chunked(_pitot_halley, target, gamma)
        retry = ~converged & np.isfinite(target) & (gamma > 1.0)
        if np.any(retry):
            log_M = np.array(log_M, dtype=float, copy=True)
            t, g = target[retry], gamma[retry]

            def residual(x):
                value, slope, _ = _log_pitot_and_slopes(x, g)
                return value - t, slope

            log_M[retry] = nx.safeguarded_newton(residual, _pitot_start(t, g),
                                                 np.zeros_like(t), np.full_like(t, 700.0))
    return np.where(r == np.inf, np.inf, np.exp(log_M))


def _mach_from_pitot_ratio_scalar(r, gamma):
    """Scalar form; the rare bracketed fallback runs on the array form (one element)."""
    if r == math.inf:
        return math.inf
    target = nx.flog(r)
    log_M, converged = _halley_in_log_scalar(
        lambda x: _log_pitot_and_slopes_scalar(x, gamma), _pitot_start_scalar(target, gamma),
        target, _PITOT_HALLEY_STEPS,
        8.0 * _EPS * (gamma + 1.0) / (gamma - 1.0) * (1.0 + abs(target)))
    if not converged and abs(target) < math.inf and gamma > 1.0:
        return float(mach_from_pitot_ratio(np.array([r]), gamma)[0])
    return nx.fexp(log_M)


def mach_from_pressure_jump(p2_p1, gamma=1.4):
    """M1 from p2/p1 >= 1: M1² - 1 = (p2/p1 - 1)(γ+1)/(2γ) (NACA Report 1135, eq. 93 inverted)."""
    if nx.plain_scalars(p2_p1, gamma):
        return nx.fsqrt(1.0 + (p2_p1 - 1.0) * (gamma + 1.0) / (2.0 * gamma))
    with np.errstate(invalid="ignore"):
        return np.sqrt(1.0 + (np.asarray(p2_p1, dtype=float) - 1.0) * (gamma + 1.0) / (2.0 * gamma))


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class NormalShock(ResultTable):
    """Flow on both sides of a normal shock (all fields dimensionless)."""

    M1: FloatArray = unit_field("", "upstream Mach number")
    M2: FloatArray = unit_field("", "downstream Mach number")
    p2_p1: FloatArray = unit_field("", "static pressure ratio")
    rho2_rho1: FloatArray = unit_field("", "density ratio")
    T2_T1: FloatArray = unit_field("", "static temperature ratio")
    p02_p01: FloatArray = unit_field("", "stagnation pressure ratio (recovery), <= 1")
    p02_p1: FloatArray = unit_field(
        "", "pitot ratio: stagnation pressure behind over static pressure ahead")
    strength: FloatArray = unit_field(
        "", "(p2 - p1)/p1, the shock strength, computed without cancellation")
    gamma1: FloatArray = unit_field("", "ratio of specific heats ahead of the shock")
    gamma2: FloatArray = unit_field("", "ratio of specific heats behind the shock")


def _checked_upstream_mach(name, value, gamma, check):
    """(the checked input, the upstream Mach number it gives)."""
    if name == "M1":
        value = check.supersonic_mach(value, "M1")
        return value, value
    if name == "M2":
        low = lowest_downstream_mach(gamma)
        value = check.within(value, "M2", low, 1.0,
                             "in (√((γ-1)/(2γ)), 1], the range behind a normal shock",
                             lower_open=True, limit=low)
        return value, mach_from_downstream_mach(value, gamma)
    if name == "p2_p1":
        value = check.within(value, "p2_p1", 1.0, math.inf, "finite and >= 1 (a shock compresses)",
                             upper_open=True)
        return value, mach_from_pressure_jump(value, gamma)
    if name == "rho2_rho1":
        high = (gamma + 1.0) / (gamma - 1.0)
        value = check.within(value, "rho2_rho1", 1.0, high,
                             "in [1, (γ+1)/(γ-1)) (the strong-shock density limit, reached "
                             "only as M1 → ∞)", upper_open=True, limit=high)
        return value, mach_from_density_jump(value, gamma)
    if name == "T2_T1":
        value = check.within(value, "T2_T1", 1.0, math.inf,
                             "finite and >= 1 (a shock heats the gas)", upper_open=True)
        return value, mach_from_temperature_jump(value, gamma)
    if name == "p02_p01":
        value = check.within(value, "p02_p01", 0.0, 1.0, "in (0, 1] (entropy rises across a shock)",
                             lower_open=True)
        return value, mach_from_stagnation_pressure_ratio(value, gamma)
    low = pitot_ratio(1.0, gamma)
    # the pitot ratio near M1 = 1 carries ~γ/(γ-1) ulp from its exponent: that close below
    # the limit is the limit
    clamped = clamp_to_limit(value, low, "lower",
                             slack=ROUNDING_SLACK * (1.0 + gamma / (gamma - 1.0)))
    clamped = check.within(clamped, "p02_p1", low, math.inf,
                           "finite and >= ((γ+1)/2)^(γ/(γ-1)), its value at M1 = 1",
                           upper_open=True, limit=low)
    return nan_where_nan(clamped, value), mach_from_pitot_ratio(clamped, gamma)


def lowest_downstream_mach(gamma=1.4):
    """√((γ-1)/(2γ)): the Mach number behind a normal shock as M1 → ∞."""
    if type(gamma) is float:
        return math.sqrt((gamma - 1.0) / (2.0 * gamma))
    return np.sqrt((gamma - 1.0) / (2.0 * gamma))


def _normal_shock_core(value, gamma, check, *, name):
    """Checked core of :func:`normal_shock` (floats or arrays): the fields in order."""
    gamma = check.gamma(gamma)
    value, M1 = _checked_upstream_mach(name, value, gamma, check)
    M1 = nan_where_nan(gamma, M1)
    fields = list(normal_shock_state(M1, gamma))
    if name != "M1":
        fields[_STATE_INDEX[name]] = value  # the caller's exact value, not a round trip
        if name == "p2_p1":
            fields[6] = value - 1.0
    return (M1, *fields, gamma, gamma)


_STATE_INDEX = {"M2": 0, "p2_p1": 1, "rho2_rho1": 2, "T2_T1": 3, "p02_p01": 4, "p02_p1": 5}


def normal_shock(M1: ArrayInput = None, *, M2: ArrayInput = None, p2_p1: ArrayInput = None,
                 rho2_rho1: ArrayInput = None, T2_T1: ArrayInput = None,
                 p02_p01: ArrayInput = None, p02_p1: ArrayInput = None, T1: ArrayInput = None,
                 gamma: ArrayInput = None, gas: Gas = None,
                 errors: str = "raise") -> NormalShock:
    """Normal shock from its upstream Mach number or from any one downstream ratio.

    Parameters
    ----------
    M1 : float or array_like, optional
        Upstream Mach number [-], >= 1.
    M2 : float or array_like, optional
        Downstream Mach number [-], in (√((γ-1)/(2γ)), 1].
    p2_p1, rho2_rho1, T2_T1 : float or array_like, optional
        Static pressure, density or temperature ratio [-], >= 1
        (ρ2/ρ1 below (γ+1)/(γ-1)).
    p02_p01 : float or array_like, optional
        Stagnation-pressure ratio [-], in (0, 1].
    p02_p1 : float or array_like, optional
        Pitot ratio [-]: stagnation pressure behind over static pressure ahead.
    T1 : float, array_like or Quantity, optional
        Static temperature ahead of the shock [K], > 0: required for a thermally perfect
        ``gas`` (offset units such as °C are converted); with a perfect gas it is checked
        and broadcast but does not change the ratios.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T1`` and no ``gamma``.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    NormalShock
        ``gamma1`` and ``gamma2`` are γ at the temperatures ahead of and behind the
        shock (both ``gamma`` for a perfect gas).

    Raises
    ------
    InvalidInputError
        No or several inputs, a value outside its range, gamma <= 1, a thermally perfect
        gas without ``T1`` (or with ``gamma``), a non-positive ``T1``.

    Notes
    -----
    With w = M1² - 1: p2/p1 = 1 + 2γw/(γ+1), ρ2/ρ1 = 1 + 2w/((γ-1)w + γ+1),
    M2² = ((γ-1)w + γ+1)/(2γw + γ+1). Inverses are closed forms except from
    p02/p01 and p02/p1, which use four Halley steps from explicit starts
    (:func:`mach_from_stagnation_pressure_ratio`, :func:`mach_from_pitot_ratio`).

    For a thermally perfect gas (:mod:`~gasdyn2d.relations.thermally_perfect_shocks`) the
    same three laws hold with h(T) of the gas: they are solved for τ = T2/T1 - 1 by
    fixed-point and Newton steps from the perfect gas at γ(T1), and the inverses by
    bracketed Newton iterations in τ (the inverse from T2/T1 is closed form).

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 93-100 (and its imperfect-gas
    section for the thermally perfect gas, from memory).

    Examples
    --------
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT, normal_shock
    >>> shock = normal_shock(2.0)
    >>> round(shock.M2, 6), round(shock.p02_p01, 6)
    (0.57735, 0.720874)
    >>> round(normal_shock(p2_p1=4.5).M1, 12)
    2.0
    >>> hot = normal_shock(10.0, T1=250.0, gas=AIR_THERMALLY_PERFECT)
    >>> round(hot.T2_T1, 4), round(hot.gamma2, 4)  # 20.3875 and 1.4 for γ = 1.4
    (17.2163, 1.2891)
    """
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(M1) is float and type(gamma) is float and 1.0 <= M1 < math.inf
            and 1.0 < gamma < math.inf and M2 is None and p2_p1 is None and rho2_rho1 is None
            and T2_T1 is None and p02_p01 is None and p02_p1 is None and T1 is None
            and gas is None and errors in SCALAR_CHECKS):
        # the scalar fast lane: valid plain floats, for which the general path's checked
        # core returns exactly these fields; anything else takes the general path
        return NormalShock.from_fields((M1, *normal_shock_state(M1, gamma), gamma, gamma))
    name, value = one_of("normal_shock", M1=M1, M2=M2, p2_p1=p2_p1, rho2_rho1=rho2_rho1,
                         T2_T1=T2_T1, p02_p01=p02_p01, p02_p1=p02_p1)
    gamma, hot = gas_of_call("normal_shock", gamma, gas, T1, "T1",
                             "upstream static temperature")
    call = Call(errors)
    call.take(name, value)
    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T1 is None:
            return call.run(NormalShock, _normal_shock_core, name=name)
    from .thermally_perfect_calls import hot_normal_shock_core, perfect_with_temperature

    call.take("T1", T1, "K")
    if hot is None:  # a perfect gas: T1 checked and broadcast, the ratios do not depend on it
        return call.run(NormalShock, perfect_with_temperature(_normal_shock_core, "T1"),
                        name=name)
    return call.run(NormalShock, hot_normal_shock_core, name=name, gas=hot)
