"""Angles of an oblique shock in closed form: θ from β, the polar's slope, β from w, v or Mn1.

Plain core (floats and ndarrays, radians, no pint):

- :func:`deflection_from_wave_angle` — θ(M1, β), the θ-β-M relation read forward;
- :func:`deflection_slope_wv` — tan θ and its slope d tan θ/dw along the shock polar;
- :func:`wave_angle_from_wv` — β from w = M1² sin²β - 1 and v = M1² cos²β;
- :func:`wave_angle_from_normal_excess` — β from the stream M1 and w = Mn1² - 1;
- :func:`small_disturbance_shock` — (β, w) of a weak shock in the hypersonic
  small-disturbance limit, exact to rounding where :func:`tiny_hypersonic_turn` holds
  (M1 > 1e150, 0 < θ < 1e-100: there z = w/(M1² - 1) underflows and the θ-β-M solve
  of :mod:`gasdyn2d.relations.theta_beta_mach` hands the case to it).

In w and v the relation has no cancellation: w → 0 at the Mach wave, v → 0 at the
normal shock, and w + v = M1² - 1. Every plain core has a scalar form on the math
module right after it (same algorithm); the array form hands plain floats to it
(``nx.plain_scalars``). The inverse, β from θ, and the detachment and sonic points are
in :mod:`gasdyn2d.relations.theta_beta_mach`.

References
----------
Ames Research Staff (1953), NACA Report 1135, eq. 138 (θ-β-M).
"""

from __future__ import annotations

import math

import numpy as np

from .. import numerics as nx
from ..numerics import HUGE_MACH

__all__ = [
    "deflection_from_wave_angle",
    "deflection_slope_wv",
    "wave_angle_from_wv",
    "wave_angle_from_normal_excess",
    "small_disturbance_shock",
    "tiny_hypersonic_turn",
]

_MACH_WAVE_SLACK = 4e-15  # |M1² sin²β - 1| that rounding of sin β alone can produce at β = μ
_TINY_TURN = 1e-100  # with M1 > HUGE_MACH, θ below this is a small disturbance to 1e-200


def deflection_from_wave_angle(M1, beta, gamma=1.4):
    """Plain core: flow deflection θ [rad] behind a shock of wave angle β [rad].

    tan θ = 2 cot β (M1² sin²β - 1)/(M1²(γ + cos 2β) + 2)  (NACA Report 1135, eq. 138),
    evaluated as 2 (w/M1²) cos β/√(1/M1² + w/M1²) / ((γ-1) + 2/M1² + 2cos²β) with
    w/M1² = ((M1 sin β - 1)/M1)((M1 sin β + 1)/M1): no cancellation at the Mach wave
    and no M1² to overflow. Valid for μ <= β <= π/2; NaN outside. A wave angle a
    few ulp below μ (``asin(1/M1)`` rounded down) counts as the Mach wave, θ = 0.
    """
    if nx.plain_scalars(M1, beta, gamma):
        return _deflection_from_wave_angle_scalar(M1, beta, gamma)
    M1 = np.asarray(M1, dtype=float)
    beta = np.asarray(beta, dtype=float)
    with np.errstate(invalid="ignore", over="ignore"):
        ms = M1 * np.sin(beta)
        below_mach_wave = (ms - 1.0) * (ms + 1.0) < -_MACH_WAVE_SLACK
        inv_m = 1.0 / M1
        w_m2 = np.maximum(((ms - 1.0) * inv_m) * ((ms + 1.0) * inv_m), 0.0)  # w/M1²
        if nx.any_true(M1 == np.inf):  # the limit: w/M1² = sin²β
            w_m2 = np.where(M1 == np.inf, np.sin(beta) ** 2, w_m2)
        inv_m2 = inv_m * inv_m
        cb = np.cos(beta)
        tan_theta = 2.0 * w_m2 * cb / np.sqrt(inv_m2 + w_m2) / (
            (gamma - 1.0) + 2.0 * inv_m2 + 2.0 * cb * cb)
        return np.where(below_mach_wave | (cb < 0), np.nan, np.arctan(tan_theta))


def _deflection_from_wave_angle_scalar(M1, beta, gamma):
    """Scalar form of :func:`deflection_from_wave_angle`."""
    if not math.isfinite(beta):
        return math.nan
    ms = M1 * math.sin(beta)
    if (ms - 1.0) * (ms + 1.0) < -_MACH_WAVE_SLACK:
        return math.nan
    cb = math.cos(beta)
    if cb < 0:
        return math.nan
    inv_m = nx.fdiv(1.0, M1)
    w_m2 = ((ms - 1.0) * inv_m) * ((ms + 1.0) * inv_m)
    w_m2 = w_m2 if w_m2 > 0.0 or w_m2 != w_m2 else 0.0
    if M1 == math.inf:
        w_m2 = math.sin(beta) ** 2
    inv_m2 = inv_m * inv_m
    return math.atan(nx.fdiv(2.0 * w_m2 * cb, nx.fsqrt(inv_m2 + w_m2))
                     / ((gamma - 1.0) + 2.0 * inv_m2 + 2.0 * cb * cb))


def deflection_slope_wv(w, v, M1, gamma=1.4):
    """Plain core: (tan θ, d tan θ/dw) along the shock polar at w = M1² sin²β - 1, v = M1² cos²β.

    tan θ = 2w r/den with r = √(v/(1+w)), den = (γ-1)M1² + 2 + 2v (dv/dw = -1), so
    d tan θ/dw = 2[(r + w r') den + 2wr]/den², r' = -M1²/(2r(1+w)²). Written in w with v
    passed separately, it keeps its sign up to the normal shock (v → 0, where the
    slope → -∞); it is zero at detachment. Used for Newton polishing and for the
    pressure slope d ln(p2/p1)/dθ of :func:`gasdyn2d.relations.simple_waves.turn_state`.

    Parameters
    ----------
    w, v : float or ndarray
        Mn1² - 1 [-] and M1² cos²β [-] of the shock.
    M1, gamma : float or ndarray
        Upstream Mach number [-] and ratio of specific heats [-].

    Returns
    -------
    tan_theta, slope : float or ndarray
        tan θ [-] and d tan θ/dw [-].

    Examples
    --------
    >>> from gasdyn2d.relations.shock_angles import deflection_slope_wv
    >>> tan_theta, slope = deflection_slope_wv(0.0, 3.0, 2.0)  # M1 = 2, Mach wave
    >>> float(tan_theta), round(float(slope), 6)  # slope 2√(M1²-1)/((γ+1)M1²)
    (0.0, 0.360844)
    """
    if nx.plain_scalars(w, v, M1, gamma):
        return _deflection_slope_wv_scalar(w, v, M1, gamma)
    one_w = 1.0 + w
    r = np.sqrt(v / one_w)
    den = (gamma - 1.0) * M1 * M1 + 2.0 + 2.0 * v
    dr = -(M1 * M1) / (2.0 * r * one_w * one_w)
    return 2.0 * w * r / den, 2.0 * ((r + w * dr) * den + 2.0 * w * r) / (den * den)


def _deflection_slope_wv_scalar(w, v, M1, gamma):
    one_w = 1.0 + w
    r = nx.fsqrt(nx.fdiv(v, one_w))
    den = (gamma - 1.0) * M1 * M1 + 2.0 + 2.0 * v
    dr = nx.fdiv(-(M1 * M1), 2.0 * r * one_w * one_w)
    return (nx.fdiv(2.0 * w * r, den),
            nx.fdiv(2.0 * ((r + w * dr) * den + 2.0 * w * r), den * den))


def wave_angle_from_wv(w, v):
    """Plain core: β = atan2(√(1+w), √v) [rad] from w = M1² sin²β - 1 and v = M1² cos²β,
    accurate at both ends of the range (Mach wave and normal shock).

    Parameters
    ----------
    w, v : float or ndarray
        Mn1² - 1 [-] and M1² cos²β [-]; w + v = M1² - 1.

    Returns
    -------
    float or ndarray
        Wave angle β [rad].

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.shock_angles import wave_angle_from_wv
    >>> round(float(np.degrees(wave_angle_from_wv(0.0, 3.0))), 12)  # M1 = 2 Mach wave: μ = 30°
    30.0
    """
    if nx.plain_scalars(w, v):
        return _wave_angle_from_wv_scalar(w, v)
    return np.arctan2(np.sqrt(1.0 + w), np.sqrt(v))


def _wave_angle_from_wv_scalar(w, v):
    return math.atan2(nx.fsqrt(1.0 + w), nx.fsqrt(v))


def wave_angle_from_normal_excess(M1, w):
    """Plain core: β [rad] of the shock with Mn1² - 1 = w in a stream M1, for 0 <= w <= M1² - 1.

    :func:`wave_angle_from_wv` with v = M1² - 1 - w; where M1² overflows, β =
    atan2(r, √((1 - r)(1 + r))) with r = sin β = √(1 + w)/M1.

    Examples
    --------
    >>> from gasdyn2d.relations.shock_angles import wave_angle_from_normal_excess
    >>> float(wave_angle_from_normal_excess(1e200, 8.0))  # Mn1 = 3: sin β = 3e-200
    3e-200
    """
    if nx.plain_scalars(M1, w):
        return _wave_angle_from_normal_excess_scalar(M1, w)
    M1 = np.asarray(M1, dtype=float)
    w = np.asarray(w, dtype=float)
    with np.errstate(over="ignore", invalid="ignore"):
        a = (M1 - 1.0) * (M1 + 1.0)
        beta = wave_angle_from_wv(w, np.maximum(a - w, 0.0))
        huge = np.isinf(a) & np.isfinite(M1)
        if not nx.any_true(huge):
            return beta
        r = np.sqrt(1.0 + w) / M1
        return np.where(huge, np.arctan2(r, np.sqrt((1.0 - r) * (1.0 + r))), beta)


def _wave_angle_from_normal_excess_scalar(M1, w):
    a = (M1 - 1.0) * (M1 + 1.0)
    if math.isinf(a) and not math.isinf(M1):
        r = nx.fsqrt(1.0 + w) / M1
        return math.atan2(r, nx.fsqrt((1.0 - r) * (1.0 + r)))
    v = a - w
    return _wave_angle_from_wv_scalar(w, v if v > 0.0 or v != v else 0.0)


def tiny_hypersonic_turn(M1, theta, strong):
    """Plain core: where a weak shock is a small disturbance to rounding (M1 > 1e150 and
    0 < θ < 1e-100 [rad]): there z = w/(M1² - 1) underflows, and
    :func:`small_disturbance_shock` is exact.

    Returns a bool for plain floats; for arrays the mask, or None when no element is
    such a case (the usual answer, at the cost of one comparison). Always False (None)
    on the strong branch.
    """
    if nx.plain_scalars(M1, theta):
        return not strong and M1 > HUGE_MACH and 0.0 < theta < _TINY_TURN
    if strong:
        return None
    big = M1 > HUGE_MACH
    if not big.any():
        return None
    with np.errstate(invalid="ignore"):
        tiny = big & (theta < _TINY_TURN) & (theta > 0.0)
    return tiny if tiny.any() else None


def small_disturbance_shock(M1, theta, gamma):
    """Plain core: (β [rad], w = Mn1² - 1) of a weak shock with sin β = β, tan θ = θ and
    2/M1² negligible (all to < 1e-200 relative when M1 > 1e150, θ < 1e-100 [rad]).

    The θ-β-M relation (NACA Report 1135, eq. 138) becomes K = 2(B² - 1)/((γ+1)B) with
    K = M1 θ and B = M1 β = Mn1, whose positive root is B = [(γ+1)K + √((γ+1)²K² + 16)]/4,
    and w = B² - 1 = (γ+1)KB/2 (the hypersonic similarity law, here exact to rounding).

    Examples
    --------
    >>> from gasdyn2d.relations.shock_angles import small_disturbance_shock
    >>> beta, w = small_disturbance_shock(float("inf"), 1e-120, 1.4)
    >>> beta  # the limit (γ+1)θ/2
    1.2e-120
    """
    if nx.plain_scalars(M1, theta, gamma):
        return _small_disturbance_shock_scalar(M1, theta, gamma)
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        K = (gamma + 1.0) * M1 * theta  # (γ+1)K
        B = 0.25 * (K + np.hypot(K, 4.0))
        # β = B/M1, written so that M1 = inf gives the limit (γ+1)θ/2
        return 0.25 * (gamma + 1.0) * theta * (1.0 + np.hypot(1.0, 4.0 / K)), 0.5 * K * B


def _small_disturbance_shock_scalar(M1, theta, gamma):
    K = (gamma + 1.0) * M1 * theta
    B = 0.25 * (K + math.hypot(K, 4.0))
    return 0.25 * (gamma + 1.0) * theta * (1.0 + math.hypot(1.0, nx.fdiv(4.0, K))), 0.5 * K * B
