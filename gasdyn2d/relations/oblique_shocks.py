"""Oblique shock waves: the θ-β-M relation, solved in closed form, and detachment.

Plain core (floats and ndarrays, radians, no pint):

- :func:`wave_angle_from_deflection` — β(M1, θ) on either branch: the
  trigonometric root of the θ-β-M cubic in sin²β, polished by Newton steps in a
  cancellation-free variable;
- :func:`deflection_from_wave_angle` — θ(M1, β);
- :func:`detachment_angles` and :func:`sonic_angles` — (θ, β) at the maximum
  deflection and at a sonic downstream flow, in closed form;
- :func:`oblique_shock_ratios` — every downstream ratio from (M1, β).

Unit boundary: :func:`oblique_shock`, :func:`max_deflection`,
:func:`sonic_deflection`.

Throughout, ``w = M1² sin²β - 1`` (the normal Mach number squared, less one)
and ``v = M1² cos²β`` are the variables in which the relation has no
cancellation: w → 0 at the Mach wave, v → 0 at the normal shock, and
w + v = M1² - 1.
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numpy as np

from .. import _numerics as nx
from .._display import ResultTable, unit_field
from ..errors import DetachedShockError, NoSolutionError
from .normal_shocks import normal_shock_ratios

__all__ = [
    "oblique_shock",
    "max_deflection",
    "sonic_deflection",
    "ObliqueShock",
    "ObliqueShockRatios",
    "wave_angle_from_deflection",
    "wv_from_deflection",
    "wave_angle_from_wv",
    "deflection_slope_wv",
    "deflection_from_wave_angle",
    "detachment_angles",
    "sonic_angles",
    "oblique_shock_ratios",
]

_DETACHMENT_SLACK = 4e-16  # tan θ this close above tan θmax is θmax itself (rounding of atan/tan)
_NEAR_DETACHMENT = 1e-3  # within this fraction of tan θmax, polish in the square-root variable
_NEWTON_STEPS = 1  # from the starts below one step reaches rounding (measured vs mpmath)
_SMALL_WEAK_ROOT = 1e-3  # weak z = w/(M1²-1) below which it comes from deflation
_SERIES_START = 1e-3  # |c w| below which the weak root starts from the small-deflection series
_MACH_WAVE_SLACK = 4e-15  # |M1² sin²β - 1| that rounding of sin β alone can produce at β = μ


# ------------------------------------------------------------------ plain core


def _tan_deflection(w, v, M1, gamma, cm=None):
    """tan θ = 2w √(v/(1+w)) / ((γ-1)M1² + 2 + 2v)  (θ-β-M relation in w, v);
    ``cm`` = (γ-1)M1² + 2 may be passed in when the caller has it."""
    cm = (gamma - 1.0) * M1 * M1 + 2.0 if cm is None else cm
    return 2.0 * w * np.sqrt(v / (1.0 + w)) / (cm + 2.0 * v)


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
    >>> from gasdyn2d.relations.oblique_shocks import wave_angle_from_wv
    >>> round(float(np.degrees(wave_angle_from_wv(0.0, 3.0))), 12)  # M1 = 2 Mach wave: μ = 30°
    30.0
    """
    return np.arctan2(np.sqrt(1.0 + w), np.sqrt(v))


def deflection_from_wave_angle(M1, beta, gamma=1.4):
    """Plain core: flow deflection θ [rad] behind a shock of wave angle β [rad].

    tan θ = 2 cot β (M1² sin²β - 1)/(M1²(γ + cos 2β) + 2)  (NACA Report 1135, eq. 138).
    Valid for μ <= β <= π/2; NaN outside. A wave angle a few ulp below μ
    (``asin(1/M1)`` rounded down) counts as the Mach wave, θ = 0.
    """
    M1 = np.asarray(M1, dtype=float)
    beta = np.asarray(beta, dtype=float)
    with np.errstate(invalid="ignore"):
        ms = M1 * np.sin(beta)
        w = (ms - 1.0) * (ms + 1.0)
        below_mach_wave = w < -_MACH_WAVE_SLACK
        w = np.maximum(w, 0.0)
        mc = M1 * np.cos(beta)
        theta = np.arctan(_tan_deflection(w, mc * mc, M1, gamma))
        return np.where(below_mach_wave | (mc < 0), np.nan, theta)


def _cubic_root(tan_theta, gamma, strong, a, inv_a):
    """Middle (weak) or largest (strong) real root z = w/(M1² - 1) of the θ-β-M cubic.

    In x = sin²β the cubic is x³ + b x² + c x + d = 0 with
    b = -(M²+2)/M² - γ sin²θ, c = (2M²+1)/M⁴ + [(γ+1)²/4 + (γ-1)/M²] sin²θ,
    d = -cos²θ/M⁴ (NACA Report 1135, eq. 150). With x = (1 + w)/M² and
    a = M² - 1 it becomes, in w = M² sin²β - 1,
    w³ - (a + γM²s²) w² + (γ+1)M²((γ+1)M²/4 - 1)s² w + (γ+1)²M⁴s²/4 = 0
    (s² = sin²θ; derived here, checked against eq. 150 in the tests), and with
    w = a z, dividing by a³ and writing ρ = M²/a = 1 + 1/a,
    z³ - (1 + γρs²) z² + (γ+1)ρ((γ+1)ρ/4 - 1/a)s² z + (γ+1)²ρ²s²/(4a) = 0.
    Its roots lie in [0, 1] (weak, strong) and below 0 (spurious), O(1) apart
    for every M1 > 1: as M1 → 1 the roots in sin²β (or in u = M² sin²β) crowd
    within O(M1 - 1) of 1 and the trigonometric root loses ~log10(1/(M1-1)³)
    digits, while in z it keeps them. Solved by the trigonometric method for
    three real roots (Wolf 1993 gives the equivalent form in tan β); sin²θ comes
    from tan θ, which the polishing step needs anyway. ``a`` = M1² - 1 and
    ``inv_a`` = 1/a are passed in (1/a stays finite where M1² would overflow).
    """
    b3, Q, R = _cubic_coefficients(tan_theta, gamma, a, inv_a)
    return _trigonometric_root(b3, Q, R, strong)


def _cubic_coefficients(tan_theta, gamma, a, inv_a):
    """(P/3, Q, R) of the monic cubic in z of :func:`_cubic_root`."""
    s2 = tan_theta * tan_theta / (1.0 + tan_theta * tan_theta)  # sin²θ
    rho = 1.0 + inv_a  # M1²/a
    gp = gamma + 1.0
    b3 = -(1.0 + gamma * rho * s2) / 3.0
    Q = gp * rho * (0.25 * gp * rho - inv_a) * s2
    R = 0.25 * gp * gp * rho * rho * s2 * inv_a
    return b3, Q, R


def _trigonometric_root(b3, Q, R, strong):
    """Middle or largest root of z³ + 3 b3 z² + Q z + R = 0 (three real roots)."""
    r2 = np.maximum(b3 * b3 - Q / 3.0, 0.0)  # -p/3 of the depressed cubic, ~1/9 near M1 = 1
    r = np.sqrt(r2)
    q = 2.0 * b3 * b3 * b3 - b3 * Q + R
    with np.errstate(divide="ignore", invalid="ignore"):
        cos_arg = np.clip(-0.5 * q / (r2 * r), -1.0, 1.0)
    phi = np.arccos(cos_arg) / 3.0
    # cos ψ = (1 - t²)/(1 + t²), t = tan(ψ/2): numpy vectorises tan but not cos in float64
    # (measured 1.2 ns against 7 ns per element); |ψ/2| <= π/3 keeps t finite
    t = np.tan(0.5 * phi if strong else 0.5 * phi - np.pi / 3.0)
    t2 = t * t
    return 2.0 * r * (1.0 - t2) / (1.0 + t2) - b3


def _small_weak_root(tan_theta, gamma, a, inv_a):
    """The weak root z of :func:`_cubic_root` where it is small (z < 1e-3).

    A small weak root lies close to the spurious one (they merge at θ = 0 as
    M1 → ∞), where the trigonometric middle root keeps only ~√ulp of z. The
    strong root z_S is well separated and accurate, so the other two are the
    roots of z² + B z + C with B = P + z_S and C = -R/z_S (Vieta); B carries an
    absolute error of an ulp of P. That start z0 is then finished exactly: the
    cubic is z²(P + z) + Q z + R = 0, a quadratic in z once P + z0 stands for
    P + z (a relative change of an ulp), whose positive root is taken in the
    cancellation-free form (:func:`_positive_quadratic_root`).
    """
    b3, Q, R = _cubic_coefficients(tan_theta, gamma, a, inv_a)
    z_strong = _trigonometric_root(b3, Q, R, True)
    z0 = _positive_quadratic_root(1.0, 3.0 * b3 + z_strong, -R / z_strong)
    return _positive_quadratic_root(3.0 * b3 + z0, Q, R)


def _positive_quadratic_root(A, B, C):
    """The larger root of A z² + B z + C = 0 when A C < 0 (roots of opposite signs), as
    max(-sgn(B) X/(2A), -2C sgn(B)/X), X = √(B² - 4AC) + |B| (no cancellation)."""
    X = np.sqrt(B * B - 4.0 * A * C) + np.abs(B)
    sign = np.copysign(1.0, B)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.maximum(-0.5 * sign * X / A, -2.0 * C * sign / X)


def detachment_angles(M1, gamma=1.4):
    """Plain core: (θmax, β at θmax) [rad] for M1 >= 1, in closed form.

    sin²β* = [(γ+1)M²/4 - 1 + √((γ+1)((γ+1)M⁴/16 + (γ-1)M²/2 + 1))]/(γM²)
    (NACA Report 1135, eq. 168), evaluated as v* = M² cos²β* =
    ((γ-1)M² + 2)(M² - 1)/(2(P + S)) with P = (3γ-1)M²/4 + 1 and S the root,
    which is free of cancellation as M → 1.
    """
    M1 = np.asarray(M1, dtype=float)
    w, v = _detachment_wv(M1, gamma)
    with np.errstate(invalid="ignore"):
        return np.arctan(_tan_deflection(w, v, M1, gamma)), wave_angle_from_wv(w, v)


def sonic_angles(M1, gamma=1.4):
    """Plain core: (θ, β) [rad] where the flow behind the shock is exactly sonic.

    sin²βs = [(γ+1)M²/4 - (3-γ)/4 + √((γ+1)((9+γ)/16 - (3-γ)M²/8 + (γ+1)M⁴/16))]/(γM²)
    (NACA Report 1135, eq. 167), in the same cancellation-free form as
    :func:`detachment_angles` with P = (3γ-1)M²/4 + (3-γ)/4.
    """
    M1 = np.asarray(M1, dtype=float)
    m2 = M1 * M1
    big = (gamma + 1.0) * ((9.0 + gamma) / 16.0 - (3.0 - gamma) * m2 / 8.0
                           + (gamma + 1.0) * m2 * m2 / 16.0)
    return _angles_from_v(M1, gamma, 0.25 * (3.0 * gamma - 1.0) * m2 + 0.25 * (3.0 - gamma),
                          np.sqrt(big))


def _detachment_wv(M1, gamma, m2=None, a=None):
    """(w*, v*) at the detachment point, cancellation-free (see :func:`detachment_angles`);
    ``m2`` = M1² and ``a`` = M1² - 1 may be passed in when the caller has them."""
    m2 = M1 * M1 if m2 is None else m2
    big = (gamma + 1.0) * ((gamma + 1.0) / 16.0 * m2 * m2 + 0.5 * (gamma - 1.0) * m2 + 1.0)
    return _wv_from_roots(M1, gamma, 0.25 * (3.0 * gamma - 1.0) * m2 + 1.0, np.sqrt(big), m2, a)


def _wv_from_roots(M1, gamma, P, S, m2=None, a=None):
    with np.errstate(invalid="ignore"):
        a = (M1 - 1.0) * (M1 + 1.0) if a is None else a
        m2 = M1 * M1 if m2 is None else m2
        v = ((gamma - 1.0) * m2 + 2.0) * a / (2.0 * (P + S))
        return a - v, v


def _angles_from_v(M1, gamma, P, S):
    w, v = _wv_from_roots(M1, gamma, P, S)
    with np.errstate(invalid="ignore"):
        return np.arctan(_tan_deflection(w, v, M1, gamma)), wave_angle_from_wv(w, v)


def _put(array, mask, values):
    """``array`` with ``values`` (array or scalar, broadcast like ``array``) where ``mask``.

    np.where costs ~3.6 ns per element against ~0.2 ns for a mask test, and these masks
    are almost always empty: assign into the (fresh) array only when one is not.
    """
    if not mask.any():
        return array
    array = np.array(array, dtype=float, copy=True)
    array[mask] = np.broadcast_to(values, array.shape)[mask]
    return array


def _weak_start(w_cubic, a, M1, tan_theta, gamma, m2):
    """Start for the weak root: the cubic's, or near the Mach wave (where the cubic's
    weak and spurious roots merge and it keeps only ~8 digits of w) the inverted
    small-deflection series tan θ = k w (1 + c w + ...), k = 2√(M1²-1)/((γ+1)M1²),
    c = 2/((γ+1)M1²) - M1²/(2(M1²-1)), good to (c w)³ there."""
    b = (gamma + 1.0) * m2
    y = tan_theta * b / (2.0 * np.sqrt(a))
    cy = (2.0 / b - 0.5 * m2 / a) * y
    small = np.abs(cy) < _SERIES_START
    if not small.any():
        return w_cubic
    return _put(w_cubic, small, y * (1.0 - cy + 2.0 * cy * cy))


def _strong_start(c_cubic, a, M1, tan_theta, gamma):
    """Start for the strong root in c = M1 cos β: the cubic's, or near the normal shock
    (where 1 - sin²β cancels) the inverted series tan θ = k c (1 + d c² + ...),
    k = 2(M1²-1)/(M1((γ-1)M1² + 2)), d = 1/(2M1²) - 1/(M1²-1) - 2/((γ-1)M1² + 2)."""
    cm = (gamma - 1.0) * M1 * M1 + 2.0
    y = tan_theta * M1 * cm / (2.0 * a)
    dy2 = (0.5 / (M1 * M1) - 1.0 / a - 2.0 / cm) * y * y
    return _put(c_cubic, np.abs(dy2) < _SERIES_START, y * (1.0 - dy2))


def _newton_weak(w, M1, target, gamma, w_star, m2, a, cm):
    """Polish the weak root in w, clamped to [0, w*]; ``target`` is tan θ.

    With f = tan θ = w q, q = 2√(v/(1+w))/den, den = (γ-1)M² + 2 + 2v, v = M² - 1 - w,
    the slope in logarithmic form is df/dw = q + f (2/den - M²/(2v(1+w))), finite at w = 0.
    """
    half_m2 = 0.5 * m2
    for _ in range(_NEWTON_STEPS):
        one_w = 1.0 + w
        v = a - w
        inv_den = 1.0 / (cm + 2.0 * v)
        q = 2.0 * np.sqrt(v / one_w) * inv_den
        f = w * q
        df = q + f * (2.0 * inv_den - half_m2 / (v * one_w))
        w = np.clip(w - (f - target) / df, 0.0, w_star)
    return w


def _newton_strong(c, M1, target, gamma, c_star):
    """Polish the strong root in c = M1 cos β = √v, clamped to [0, c*]; ``target`` is tan θ."""
    for _ in range(_NEWTON_STEPS):
        f, df = _tan_deflection_and_slope(c, M1, gamma, True)
        c = np.clip(c - (f - target) / df, 0.0, c_star)
    return c


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
    >>> from gasdyn2d.relations.oblique_shocks import deflection_slope_wv
    >>> tan_theta, slope = deflection_slope_wv(0.0, 3.0, 2.0)  # M1 = 2, Mach wave
    >>> float(tan_theta), round(float(slope), 6)  # slope 2√(M1²-1)/((γ+1)M1²)
    (0.0, 0.360844)
    """
    one_w = 1.0 + w
    r = np.sqrt(v / one_w)
    den = (gamma - 1.0) * M1 * M1 + 2.0 + 2.0 * v
    dr = -(M1 * M1) / (2.0 * r * one_w * one_w)
    return 2.0 * w * r / den, 2.0 * ((r + w * dr) * den + 2.0 * w * r) / (den * den)


def _tan_deflection_and_slope(x, M1, gamma, strong):
    """tan θ and d tan θ/dx along the polar, x = w (weak branch) or c = M1 cos β (strong)."""
    a = (M1 - 1.0) * (M1 + 1.0)
    if not strong:
        return deflection_slope_wv(x, a - x, M1, gamma)
    cm = (gamma - 1.0) * M1 * M1 + 2.0
    v = x * x
    w = a - v
    root = np.sqrt(M1 * M1 - v)
    den = cm + 2.0 * v
    f = 2.0 * w * x / (root * den)
    # d/dc of 2 w c / (root den), with dw/dc = -2c, droot/dc = -c/root, dden/dc = 4c
    df = 2.0 * ((-2.0 * v + w) * root * den - w * x * (-x / root * den + 4.0 * x * root)) / (
        (root * den) ** 2)
    return f, df


def _polish_near_detachment(x, near, M1, target, gamma, x_star, tan_max, strong):
    """Re-solve the elements within 0.1 % of detachment in the square-root variable.

    There tan θ(x) ≈ tan θmax - k²(x* - x)², so Newton on tan θ itself crawls (zero
    slope at x*) and the cubic's root has lost half its digits. The residual
    √(tan θmax - tan θ(x)) - √(tan θmax - tan θ) is instead nearly linear in x
    through x*, and a bracketed Newton iteration on it (bisection where a step
    leaves the bracket [0, x*]) converges to the conditioning limit. The loop
    runs over iterations, on the (usually empty) subset only.
    """
    if not np.any(near):
        return x
    M1s, ts, gs, xs_star, tms = (np.broadcast_to(arr, x.shape)[near]
                                 for arr in (M1, target, gamma, x_star, tan_max))
    goal = np.sqrt(np.maximum(tms - ts, 0.0))

    def residual(xx):
        f, df = _tan_deflection_and_slope(xx, M1s, gs, strong)
        root = np.sqrt(np.maximum(tms - f, 0.0))
        return root - goal, -df / (2.0 * root)

    x = np.array(x, dtype=float, copy=True)
    start = np.where(np.isfinite(x[near]), np.clip(x[near], 0.0, xs_star), 0.5 * xs_star)
    x[near] = nx.safeguarded_newton(residual, start, np.zeros_like(xs_star), xs_star, max_iter=40)
    return x


def wave_angle_from_deflection(M1, theta, gamma=1.4, strong=False):
    """Plain core: wave angle β [rad] of the shock that turns a stream M1 by θ [rad].

    Closed-form root of the cubic in z = (M1² sin²β - 1)/(M1² - 1)
    (:func:`_cubic_root`, whose roots stay O(1) apart as M1 → 1; a small weak
    root by deflation, :func:`_small_weak_root`; series starts near the
    Mach wave and the normal shock) followed by one Newton step on tan θ(w)
    (weak branch) or tan θ(M1 cos β) (strong branch),
    clamped to the branch's side of the detachment point. Within 0.1 % of
    detachment (in tan θ) the root is re-solved in a square-root variable
    (:func:`_polish_near_detachment`), where Newton on tan θ itself stalls.
    Accuracy (tests/test_oblique_shocks.py, vs mpmath): a few ulp away from
    detachment; near it, within 32 ulp × |d ln β/d ln θ|, the conditioning of
    the problem, which grows like (θmax - θ)^(-1/2) (β is good to ~√ulp at
    θmax itself); θ(β) always reproduces θ to a few ulp. Near M1 = 1 the
    strength 2γw/(γ+1) = p2/p1 - 1 and β keep that accuracy down to
    M1 - 1 = 1e-12 (tested on both branches, 1.05 <= γ <= 1.67). Returns NaN for
    θ < 0, θ > θmax or M1 < 1.
    """
    M1, theta, gamma = nx.broadcast_cases(gamma, M1, theta)
    return nx.chunked(lambda m, t, g: _wave_angle_block(m, t, g, strong), M1, theta, gamma)


def _wave_angle_block(M1, theta, gamma, strong):
    w, v, invalid = wv_from_deflection(M1, theta, gamma, strong)
    return _put(wave_angle_from_wv(w, v), invalid, np.nan)


def wv_from_deflection(M1, theta, gamma=1.4, strong=False):
    """Plain core: (w, v, invalid) of the shock that turns M1 by θ [rad].

    The solve behind :func:`wave_angle_from_deflection`, returned in the
    variables every downstream ratio needs without cancellation:
    w = M1² sin²β - 1 (the normal-shock variable of
    :func:`~gasdyn2d.relations.normal_shocks.normal_shock_ratios`) and v = M1² cos²β;
    ``invalid`` marks θ < 0, θ beyond detachment or M1 < 1. Arrays must
    already have equal shapes (γ may be a scalar).

    Parameters
    ----------
    M1, theta : ndarray
        Upstream Mach number [-] and flow deflection [rad], of equal shapes.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].
    strong : bool, optional
        Strong branch instead of weak.

    Returns
    -------
    w, v : ndarray
        M1² sin²β - 1 [-] and M1² cos²β [-].
    invalid : ndarray of bool
        Cases without an attached shock (their w, v are meaningless).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.oblique_shocks import wave_angle_from_wv, wv_from_deflection
    >>> w, v, invalid = wv_from_deflection(np.array([2.0]), np.radians([10.0]))
    >>> np.degrees(wave_angle_from_wv(w, v)).round(4), invalid
    (array([39.3139]), array([False]))
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        m2 = M1 * M1
        a = (M1 - 1.0) * (M1 + 1.0)
        cm = (gamma - 1.0) * m2 + 2.0
        w_star, v_star = _detachment_wv(M1, gamma, m2, a)
        tan_theta = np.tan(theta)
        tan_max = _tan_deflection(w_star, v_star, M1, gamma, cm)
        at_max = tan_theta >= tan_max  # the double root: Newton would crawl, take w*, v*
        # a few ulp of θ (< π/2) above θmax is θmax; in tan θ that slack is (1 + tan²θ)
        # times larger, which matters as θmax → 90° (γ → 1 at high M1)
        slack = (0.5 * np.pi * _DETACHMENT_SLACK) * (1.0 + tan_max * tan_max)
        # tan is periodic: θ beyond π/2 must be rejected before tan θ is compared
        invalid = (theta < 0) | (theta >= 0.5 * np.pi) | (tan_theta > tan_max + slack) | (M1 < 1)
        z = _cubic_root(tan_theta, gamma, strong, a, 1.0 / a)
        near = ~at_max & (tan_max - tan_theta <= _NEAR_DETACHMENT * tan_max)
        if strong:
            c_star = np.sqrt(v_star)
            c_cubic = np.sqrt(a * np.maximum(1.0 - z, 0.0))
            c0 = np.clip(_strong_start(c_cubic, a, M1, tan_theta, gamma), 0.0, c_star)
            c = _newton_strong(c0, M1, tan_theta, gamma, c_star)
            c = _polish_near_detachment(c, near, M1, tan_theta, gamma, c_star, tan_max, True)
            c = _put(_put(c, at_max, c_star), theta == 0.0, 0.0)
            v = c * c
            return a - v, v, invalid
        else:
            small = z < _SMALL_WEAK_ROOT
            if small.any():
                z = np.array(z, dtype=float, copy=True)
                z[small] = _small_weak_root(*(np.broadcast_to(x, z.shape)[small]
                                              for x in (tan_theta, gamma, a, 1.0 / a)))
            w0 = np.clip(_weak_start(a * z, a, M1, tan_theta, gamma, m2), 0.0, w_star)
            w = _newton_weak(w0, M1, tan_theta, gamma, w_star, m2, a, cm)
            w = _polish_near_detachment(w, near, M1, tan_theta, gamma, w_star, tan_max, False)
            w = _put(_put(w, at_max, w_star), theta == 0.0, 0.0)
            return w, a - w, invalid


def _shock_from_deflection(M1, theta, gamma, strong):
    """Plain core of ``oblique_shock(M1, deflection=θ)``: β and every ratio in one pass,
    the ratios taken straight from w = Mn1² - 1 (no sin β round trip). Returns a flat
    tuple (β, *ObliqueShockRatios without the deflection) so that
    :func:`_numerics.chunked` can block it."""
    w, v, invalid = wv_from_deflection(M1, theta, gamma, strong)
    with np.errstate(invalid="ignore", divide="ignore"):
        w = _put(w, invalid, np.nan)
        Mn1 = np.sqrt(1.0 + w)
        beta = np.arctan2(Mn1, np.sqrt(v))  # wave_angle_from_wv, reusing Mn1
        ratios = normal_shock_ratios(w, gamma)
        # the tangential velocity is conserved: M2² = Mn2² + M1² cos²β · T1/T2 (no trig)
        M2 = np.sqrt(ratios.M2 * ratios.M2 + v / ratios.T2_T1)
    return (beta, Mn1, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
            ratios.T2_T1, ratios.p02_p01, ratios.strength)


class ObliqueShockRatios(NamedTuple):
    """Plain-core result of :func:`oblique_shock_ratios` (ndarrays; angles in radians)."""

    deflection: np.ndarray
    Mn1: np.ndarray
    Mn2: np.ndarray
    M2: np.ndarray
    p2_p1: np.ndarray
    rho2_rho1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray
    strength: np.ndarray  #: (p2 - p1)/p1 = 2γ(Mn1² - 1)/(γ+1), without cancellation


def oblique_shock_ratios(M1, beta, gamma=1.4):
    """Plain core: every quantity behind an oblique shock of wave angle β [rad].

    The normal component obeys the normal-shock relations with Mn1 = M1 sin β
    (NACA Report 1135, eqs. 128-132); M2 = Mn2 / sin(β - θ).
    """
    M1, beta, gamma = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (M1, beta, gamma)))
    with np.errstate(invalid="ignore", divide="ignore"):
        ms = M1 * np.sin(beta)
        w = np.maximum((ms - 1.0) * (ms + 1.0), 0.0)
        ms = np.where(ms < 1.0, np.sqrt(1.0 + w), ms)  # a Mach wave rounded below Mn1 = 1
        theta = deflection_from_wave_angle(M1, beta, gamma)
        ratios = normal_shock_ratios(w, gamma)
        M2 = ratios.M2 / np.sin(beta - theta)
    return ObliqueShockRatios(theta, ms, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
                              ratios.T2_T1, ratios.p02_p01, ratios.strength)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class ObliqueShock(ResultTable):
    """Flow on both sides of a straight oblique shock.

    Angles are in radians (Quantities in the caller's angle unit when any input
    was a Quantity); ``deflection`` is the flow turn, ``wave_angle`` the angle
    between the shock and the upstream flow.
    """

    M1: object = unit_field("")  #: upstream Mach number
    deflection: object = unit_field("rad")  #: flow turn θ
    wave_angle: object = unit_field("rad")  #: shock angle β from the upstream flow
    Mn1: object = unit_field("")  #: upstream normal Mach number M1 sin β
    Mn2: object = unit_field("")  #: downstream normal Mach number M2 sin(β - θ)
    M2: object = unit_field("")  #: downstream Mach number
    p2_p1: object = unit_field("")  #: static pressure ratio
    rho2_rho1: object = unit_field("")  #: density ratio
    T2_T1: object = unit_field("")  #: static temperature ratio
    p02_p01: object = unit_field("")  #: stagnation pressure ratio, <= 1
    #: (p2 - p1)/p1, the shock strength, computed without cancellation
    strength: object = unit_field("")


def _check_deflection(theta, M1, gamma, errors):
    theta_max, _ = detachment_angles(M1, gamma)
    with np.errstate(invalid="ignore"):
        theta = nx.reject(theta < 0, theta, "deflection",
                          ">= 0 (a shock turns the flow into itself; for a turn away from the "
                          "wall use expansion_fan)", errors)
        return nx.reject(
            theta > theta_max, theta, "deflection",
            "at most the detachment deflection θmax(M1, γ)", errors, limit=theta_max,
            unit_text="rad", error_class=DetachedShockError,
            hint="Beyond θmax no attached shock exists: the shock stands off as a curved "
                 "bow wave. Lower the deflection or raise M1.",
        )


def _refuse_unexplained_nan(failed, M1, theta, gamma):
    """A NaN from the solve that no input check explains is a solver bug: raise, never
    return it silently (the consistency check behind "no silent wrong number")."""
    with np.errstate(invalid="ignore"):
        unexplained = failed & ~np.isnan(theta) & ~np.isnan(M1) & ~np.isnan(gamma)
    if nx.any_true(unexplained):
        i = tuple(np.argwhere(unexplained)[0]) if unexplained.ndim else ()
        g = np.broadcast_to(gamma, unexplained.shape)[i]
        raise NoSolutionError(
            f"internal error: the oblique-shock solve gave NaN for a valid case (M1 = "
            f"{M1[i]!r}, deflection = {theta[i]!r} rad, gamma = {g!r}). This is a bug in "
            "gasdyn2d; please report it with these values.")


def _wave_angle_from_input(name, value, M1, gamma, branch, errors):
    mu = np.arctan2(1.0, np.sqrt((M1 - 1.0) * (M1 + 1.0)))
    with np.errstate(invalid="ignore"):
        if name == "wave_angle":
            value = nx.clamp_to_limit(value, mu, "lower")  # asin(1/M1) may round below μ
            value = nx.reject(value < mu, value, "wave_angle",
                              "at least the Mach angle μ = asin(1/M1)", errors, limit=mu,
                              unit_text="rad")
            value = nx.reject(value > np.pi / 2, value, "wave_angle", "at most π/2 (90°)", errors)
            return value, value
        a = (M1 - 1.0) * (M1 + 1.0)
        if name == "Mn1":
            value = nx.clamp_to_limit(value, 1.0, "lower")
            value = nx.clamp_to_limit(value, M1, "upper")
            value = nx.reject((value < 1.0) | (value > M1), value, "Mn1",
                              "between 1 and M1 (the normal Mach number of a shock)", errors,
                              limit=M1)
            w = (value - 1.0) * (value + 1.0)
            return value, wave_angle_from_wv(w, np.maximum(a - w, 0.0))
        p_max = 1.0 + 2.0 * gamma / (gamma + 1.0) * (M1 - 1.0) * (M1 + 1.0)
        value = nx.clamp_to_limit(value, p_max, "upper")
        value = nx.reject((value < 1.0) | (value > p_max), value, "p2_p1",
                          "between 1 and the normal-shock pressure ratio at M1", errors,
                          limit=p_max)
        w = (value - 1.0) * (gamma + 1.0) / (2.0 * gamma)  # Mn1² - 1, from eq. 93
        return value, wave_angle_from_wv(w, np.maximum(a - w, 0.0))


def oblique_shock(M1, *, deflection=None, wave_angle=None, Mn1=None, p2_p1=None, branch="weak",
                  gamma=1.4, errors="raise"):
    """Oblique shock from the upstream Mach number and one of θ, β, Mn1 or p2/p1.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    deflection : float, array_like or Quantity, optional
        Flow deflection θ [rad], 0 <= θ <= θmax(M1, γ).
    wave_angle : float, array_like or Quantity, optional
        Shock angle β [rad] from the upstream flow, μ <= β <= π/2.
    Mn1 : float or array_like, optional
        Upstream normal Mach number [-], 1 <= Mn1 <= M1.
    p2_p1 : float or array_like, optional
        Static pressure ratio [-], between 1 and the normal-shock value.
    branch : {"weak", "strong"}, optional
        Root of the θ-β-M relation when ``deflection`` is given.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ObliqueShock

    Raises
    ------
    DetachedShockError
        ``deflection`` above θmax(M1, γ); the message gives θmax.
    InvalidInputError
        Any other input outside its range, gamma <= 1, several inputs.

    Notes
    -----
    From ``deflection`` the wave angle is the closed-form (trigonometric)
    root of the θ-β-M cubic in sin²β, then one Newton step in a
    cancellation-free variable: exact to rounding from the Mach wave (θ → 0)
    to close to detachment, with no iteration to convergence.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 138-150.
    Thompson, M. J. (1950), "A note on the calculation of oblique shock-wave
    characteristics", J. Aeronaut. Sci. 17(11), 744.
    Wolf, T. (1993), "Comment on approximate formula of weak oblique shock
    wave angle", AIAA J. 31(7), 1363.

    Examples
    --------
    >>> from gasdyn2d import oblique_shock, ureg
    >>> shock = oblique_shock(2.0, deflection=10 * ureg.deg)
    >>> round(shock.wave_angle.m_as("deg"), 4), round(shock.p2_p1, 5)
    (39.3139, 1.70658)
    >>> round(oblique_shock(2.0, deflection=10 * ureg.deg, branch="strong").wave_angle.m, 4)
    83.7001
    """
    nx.check_errors_mode(errors)
    nx.check_branch(branch, ("weak", "strong"))
    inputs = {"deflection": deflection, "wave_angle": wave_angle, "Mn1": Mn1, "p2_p1": p2_p1}
    name, value = nx.exactly_one(inputs, "oblique_shock")
    is_angle = name in ("deflection", "wave_angle")
    M1, unit_m = nx.to_si(M1, "M1", "dimensionless")
    value, unit_in = nx.to_si(value, name, "angle" if is_angle else "dimensionless")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    if gamma.ndim == 0:  # the usual case: keep γ a scalar, so its terms cost nothing per case
        gamma = nx.check_gamma(gamma, errors)
        M1, value = nx.broadcast(M1=M1, **{name: value})
    else:
        M1, value, gamma = nx.broadcast(M1=M1, **{name: value}, gamma=gamma)
        gamma = nx.check_gamma(gamma, errors)
    M1 = nx.check_mach_supersonic(M1, "M1", errors)
    if name == "deflection":
        # solve first, check only if something failed: the limits cost as much as the solve
        strong = branch == "strong"
        beta, *fields = nx.chunked(lambda m, t, g: _shock_from_deflection(m, t, g, strong),
                                   M1, value, gamma)
        ratios = ObliqueShockRatios(value, *fields)
        failed = np.isnan(beta)
        if np.any(failed) and np.any(failed & ~np.isnan(value) & ~np.isnan(M1) & ~np.isnan(gamma)):
            value = _check_deflection(value, M1, gamma, errors)  # raises, or NaNs the same cases
            _refuse_unexplained_nan(failed, M1, value, gamma)
    else:
        value, beta = _wave_angle_from_input(name, value, M1, gamma, branch, errors)
        ratios = nx.chunked(oblique_shock_ratios, M1, beta, gamma)
    theta = value if name == "deflection" else ratios.deflection
    angle_unit = nx.output_angle_unit(unit_in if is_angle else None, unit_m, unit_in)
    s = nx.scalar_or_array
    return ObliqueShock(
        M1=s(M1), deflection=nx.angle_out(s(theta), angle_unit),
        wave_angle=nx.angle_out(s(beta), angle_unit),
        Mn1=s(value if name == "Mn1" else ratios.Mn1), Mn2=s(ratios.Mn2), M2=s(ratios.M2),
        p2_p1=s(value if name == "p2_p1" else ratios.p2_p1), rho2_rho1=s(ratios.rho2_rho1),
        T2_T1=s(ratios.T2_T1), p02_p01=s(ratios.p02_p01),
        strength=s(value - 1.0 if name == "p2_p1" else ratios.strength),
    )


def _angle_pair(M1, gamma, errors, plain):
    nx.check_errors_mode(errors)
    M1, unit = nx.to_si(M1, "M1", "dimensionless")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    M1, gamma = nx.broadcast(M1=M1, gamma=gamma)
    gamma = nx.check_gamma(gamma, errors)
    M1 = nx.check_mach_supersonic(M1, "M1", errors)
    theta, beta = plain(M1, gamma)
    unit = nx.output_angle_unit(None, unit)
    return (nx.angle_out(nx.scalar_or_array(theta), unit),
            nx.angle_out(nx.scalar_or_array(beta), unit))


def max_deflection(M1, *, gamma=1.4, errors="raise"):
    """Detachment point: the largest deflection an attached shock can give, and its wave angle.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    deflection, wave_angle : float or ndarray
        θmax and β at θmax [rad].

    Notes
    -----
    Closed form (NACA Report 1135, eq. 168); θmax → asin(1/γ) as M1 → ∞.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 168.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import max_deflection
    >>> theta, beta = max_deflection(2.0)
    >>> round(float(np.degrees(theta)), 4), round(float(np.degrees(beta)), 3)
    (22.9735, 64.669)
    """
    return _angle_pair(M1, gamma, errors, detachment_angles)


def sonic_deflection(M1, *, gamma=1.4, errors="raise"):
    """Deflection and wave angle at which the flow behind the shock is exactly sonic.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    deflection, wave_angle : float or ndarray
        θ and β [rad] with M2 = 1; slightly below the detachment values.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 167.

    Examples
    --------
    >>> from gasdyn2d import sonic_deflection, oblique_shock
    >>> theta, beta = sonic_deflection(3.0)
    >>> round(oblique_shock(3.0, wave_angle=beta).M2, 12)
    1.0
    """
    return _angle_pair(M1, gamma, errors, sonic_angles)
