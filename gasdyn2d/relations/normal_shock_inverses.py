"""The upstream Mach number of a normal shock from any downstream quantity (plain core).

The inverses of :mod:`gasdyn2d.relations.normal_shocks` (which re-exports them): M1 from
M2, p2/p1, ρ2/ρ1, T2/T1 in closed form, and from p02/p01 and the pitot ratio p02/p1 by
Halley steps in logarithms from explicit starts. A module of its own, below the public
``normal_shock``, because the thermally perfect shocks start from these inverses and
``normal_shock(..., gas=...)`` reaches the thermally perfect cores: kept together they
would be an import circle.
"""

from __future__ import annotations

import math

import numpy as np

from .. import numerics as nx

_EPS = float(np.finfo(float).eps)
_DENSITY_LIMIT_SLACK = 4.0 * _EPS  # rounding of a strong-shock limit (relative)

__all__ = [
    "mach_from_downstream_mach",
    "mach_from_density_jump",
    "mach_from_temperature_jump",
    "mach_from_stagnation_pressure_ratio",
    "mach_from_pitot_ratio",
    "mach_from_pressure_jump",
]

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
