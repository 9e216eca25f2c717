"""The θ-β-M relation solved for the wave angle, and its detachment and sonic points.

Plain core (floats and ndarrays, radians, no pint):

- :func:`wave_angle_from_deflection` — β(M1, θ) on either branch: the
  trigonometric root of the θ-β-M cubic in z = w/(M1² - 1), polished by Newton
  steps in a cancellation-free variable (:func:`scaled_wv_from_deflection`,
  :func:`wv_from_deflection` give the solve's variables, and
  :func:`wave_angle_from_scaled_wv` the wave angle from them);
- :func:`detachment_angles` and :func:`sonic_angles` — (θ, β) at the maximum
  deflection and at a sonic downstream flow, in closed form.

Throughout, ``w = M1² sin²β - 1`` (the normal Mach number squared, less one)
and ``v = M1² cos²β`` are the variables in which the relation has no
cancellation: w → 0 at the Mach wave, v → 0 at the normal shock, and
w + v = M1² - 1. The solve works in z = w/(M1² - 1) and y = v/(M1² - 1) = 1 - z,
whose roots stay apart as M1 → 1 and which cannot overflow as M1 → ∞.

Every plain core has a scalar form on the math module right after it (same
algorithm); the array form hands plain floats to it (``nx.plain_scalars``).

θ from β in closed form, the slope of the polar, β from w, v or Mn1, and the
small-disturbance shock that replaces the solve for turns below 1e-100 at
M1 > 1e150 (where z underflows) are in :mod:`gasdyn2d.relations.shock_angles`;
the downstream ratios and the public functions
(:func:`~gasdyn2d.relations.oblique_shocks.oblique_shock`,
:func:`~gasdyn2d.relations.oblique_shocks.max_deflection`,
:func:`~gasdyn2d.relations.oblique_shocks.sonic_deflection`) in
:mod:`gasdyn2d.relations.oblique_shocks`, which also re-exports the plain cores of
this module under their old paths.

References
----------
Ames Research Staff (1953), NACA Report 1135, eqs. 138-150 (θ-β-M), 167 (sonic point),
168 (detachment).
Wolf, T. (1993), "Comment on approximate formula of weak oblique shock wave angle",
AIAA J. 31(7), 1363 (the trigonometric root).
"""

from __future__ import annotations

import math

import numpy as np

from .. import numerics as nx
from ..numerics import HUGE_MACH
from .shock_angles import small_disturbance_shock, tiny_hypersonic_turn

__all__ = [
    "wave_angle_from_deflection",
    "wv_from_deflection",
    "scaled_wv_from_deflection",
    "wave_angle_from_scaled_wv",
    "detachment_angles",
    "sonic_angles",
]

_DETACHMENT_SLACK = 4e-16  # tan θ this close above tan θmax is θmax itself (rounding of atan/tan)
_NEAR_DETACHMENT = 1e-3  # within this fraction of tan θmax, polish in the square-root variable
_NEWTON_STEPS = 1  # from the starts below one step reaches rounding (measured vs mpmath)
_SMALL_WEAK_ROOT = 1e-3  # weak z = w/(M1²-1) below which it comes from deflation
_SERIES_START = 1e-3  # |c w| below which the weak root starts from the small-deflection series


def _tan_deflection(w, v, M1, gamma, cm=None):
    """tan θ = 2w √(v/(1+w)) / ((γ-1)M1² + 2 + 2v)  (θ-β-M relation in w, v);
    ``cm`` = (γ-1)M1² + 2 may be passed in when the caller has it."""
    cm = (gamma - 1.0) * M1 * M1 + 2.0 if cm is None else cm
    return 2.0 * w * np.sqrt(v / (1.0 + w)) / (cm + 2.0 * v)


def _scales(M1, gamma):
    """(a, 1/a, ρ, c) for a = M1² - 1: ρ = M1²/a = 1 + 1/a and c = ((γ-1)M1² + 2)/a =
    (γ-1)ρ + 2/a, the constants of the θ-β-M relation in z = w/a, y = v/a. Finite
    for every M1 > 1 (1/a → 0 where M1² overflows; inf at M1 = 1)."""
    with np.errstate(over="ignore", divide="ignore"):
        a = (M1 - 1.0) * (M1 + 1.0)
        inv_a = 1.0 / a
    rho = 1.0 + inv_a
    return a, inv_a, rho, (gamma - 1.0) * rho + 2.0 * inv_a


def _scales_scalar(M1, gamma):
    """Scalar form of :func:`_scales`."""
    a = (M1 - 1.0) * (M1 + 1.0)
    inv_a = nx.fdiv(1.0, a)
    rho = 1.0 + inv_a
    return a, inv_a, rho, (gamma - 1.0) * rho + 2.0 * inv_a


def _tan_deflection_zy(z, y, inv_a, c):
    """tan θ = 2z √(y/(z + 1/a)) / (c + 2y): :func:`_tan_deflection` with w = a z,
    v = a y divided through by a (no M1², no overflow)."""
    return 2.0 * z * np.sqrt(y / (z + inv_a)) / (c + 2.0 * y)


def _tan_deflection_zy_scalar(z, y, inv_a, c):
    return 2.0 * z * nx.fsqrt(nx.fdiv(y, z + inv_a)) / (c + 2.0 * y)


def wave_angle_from_scaled_wv(z, y, a):
    """Plain core: β [rad] from z = w/a, y = v/a and a = M1² - 1 (see
    :func:`scaled_wv_from_deflection`).

    β = atan2(√(1 + a z), √(a y)), the form of
    :func:`~gasdyn2d.relations.shock_angles.wave_angle_from_wv` (so both
    give the same float), or atan2(√(z + 1/a), √y) where a z or a y overflows.

    Examples
    --------
    >>> from gasdyn2d.relations.theta_beta_mach import wave_angle_from_scaled_wv
    >>> import numpy as np
    >>> round(float(np.degrees(wave_angle_from_scaled_wv(0.0, 1.0, 3.0))), 12)  # M1 = 2: μ
    30.0
    """
    if nx.plain_scalars(z, y, a):
        return _wave_angle_from_scaled_wv_scalar(z, y, a)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        beta = np.arctan2(np.sqrt(1.0 + a * z), np.sqrt(a * y))
        huge = np.isinf(a)  # a z and a y (z, y <= 1) overflow only with a itself
        if not nx.any_true(huge):
            return beta
        return np.where(huge, np.arctan2(np.sqrt(z + 1.0 / a), np.sqrt(y)), beta)


def _wave_angle_from_scaled_wv_scalar(z, y, a):
    if math.isinf(a):
        return math.atan2(nx.fsqrt(z + nx.fdiv(1.0, a)), nx.fsqrt(y))
    return math.atan2(nx.fsqrt(1.0 + a * z), nx.fsqrt(a * y))


def _cubic_root(tan_theta, gamma, strong, inv_a):
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
    from tan θ, which the polishing step needs anyway. ``inv_a`` = 1/a is
    passed in (it stays finite where M1² would overflow, and is 0 at M1 = inf).
    """
    b3, Q, R = _cubic_coefficients(tan_theta, gamma, inv_a)
    return _trigonometric_root(b3, Q, R, strong)


def _cubic_coefficients(tan_theta, gamma, inv_a):
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


def _small_weak_root(tan_theta, gamma, inv_a):
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
    b3, Q, R = _cubic_coefficients(tan_theta, gamma, inv_a)
    z_strong = _trigonometric_root(b3, Q, R, True)
    z0 = _positive_quadratic_root(1.0, 3.0 * b3 + z_strong, -R / z_strong)
    return _positive_quadratic_root(3.0 * b3 + z0, Q, R)


def _positive_quadratic_root(A, B, C):
    """The larger root of A z² + B z + C = 0 when A C <= 0 (roots of opposite signs), as
    max(-sgn(B) X/(2A), -2C sgn(B)/X), X = √(B² - 4AC) + |B| (no cancellation; the root
    as hypot(B, 2√(-AC)), so that B² cannot underflow)."""
    X = np.hypot(B, 2.0 * np.sqrt(-A * C)) + np.abs(B)
    sign = np.copysign(1.0, B)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.fmax(-0.5 * sign * X / A, -2.0 * C * sign / X)  # fmax: 0/0 when C = B = 0


def _cubic_coefficients_scalar(tan_theta, gamma, inv_a):
    s2 = tan_theta * tan_theta / (1.0 + tan_theta * tan_theta)
    rho = 1.0 + inv_a
    gp = gamma + 1.0
    return (-(1.0 + gamma * rho * s2) / 3.0, gp * rho * (0.25 * gp * rho - inv_a) * s2,
            0.25 * gp * gp * rho * rho * s2 * inv_a)


def _trigonometric_root_scalar(b3, Q, R, strong):
    """Scalar form of :func:`_trigonometric_root` (the same half-angle tangent form)."""
    r2 = max(b3 * b3 - Q / 3.0, 0.0)
    r = math.sqrt(r2)
    q = 2.0 * b3 * b3 * b3 - b3 * Q + R
    cos_arg = nx.fclip(nx.fdiv(-0.5 * q, r2 * r), -1.0, 1.0)
    phi = math.acos(cos_arg) / 3.0 if cos_arg == cos_arg else math.nan
    t = math.tan(0.5 * phi if strong else 0.5 * phi - math.pi / 3.0)
    t2 = t * t
    return 2.0 * r * (1.0 - t2) / (1.0 + t2) - b3


def _positive_quadratic_root_scalar(A, B, C):
    X = math.hypot(B, 2.0 * nx.fsqrt(-A * C)) + abs(B)
    sign = math.copysign(1.0, B)
    first, second = nx.fdiv(-0.5 * sign * X, A), nx.fdiv(-2.0 * C * sign, X)
    if first != first:
        return second
    return first if second != second or first > second else second


def _weak_root_scalar(tan_theta, gamma, inv_a):
    """The weak root z of the cubic (:func:`_cubic_root`, :func:`_small_weak_root`)."""
    b3, Q, R = _cubic_coefficients_scalar(tan_theta, gamma, inv_a)
    z = _trigonometric_root_scalar(b3, Q, R, False)
    if not z < _SMALL_WEAK_ROOT:
        return z
    z_strong = _trigonometric_root_scalar(b3, Q, R, True)
    z0 = _positive_quadratic_root_scalar(1.0, 3.0 * b3 + z_strong, nx.fdiv(-R, z_strong))
    return _positive_quadratic_root_scalar(3.0 * b3 + z0, Q, R)


def detachment_angles(M1, gamma=1.4):
    """Plain core: (θmax, β at θmax) [rad] for M1 >= 1, in closed form.

    sin²β* = [(γ+1)M²/4 - 1 + √((γ+1)((γ+1)M⁴/16 + (γ-1)M²/2 + 1))]/(γM²)
    (NACA Report 1135, eq. 168), evaluated as y* = M² cos²β*/(M² - 1) =
    ((γ-1) + 2/M²)/(2(P + S)) with P = (3γ-1)/4 + 1/M² and S the root divided
    by M², which is free of cancellation as M → 1 and of overflow as M → ∞
    (θmax → asin(1/γ) there).
    """
    if nx.plain_scalars(M1, gamma):
        return _detachment_angles_scalar(M1, gamma)
    M1 = np.asarray(M1, dtype=float)
    a, inv_a, rho, c = _scales(M1, gamma)
    z, y = _detachment_zy(M1, gamma)
    with np.errstate(invalid="ignore"):
        return (np.arctan(_tan_deflection_zy(z, y, inv_a, c)), wave_angle_from_scaled_wv(z, y, a))


def _detachment_angles_scalar(M1, gamma):
    a, inv_a, rho, c = _scales_scalar(M1, gamma)
    z, y = _detachment_zy_scalar(M1, gamma)
    return (math.atan(_tan_deflection_zy_scalar(z, y, inv_a, c)),
            _wave_angle_from_scaled_wv_scalar(z, y, a))


def sonic_angles(M1, gamma=1.4):
    """Plain core: (θ, β) [rad] where the flow behind the shock is exactly sonic.

    sin²βs = [(γ+1)M²/4 - (3-γ)/4 + √((γ+1)((9+γ)/16 - (3-γ)M²/8 + (γ+1)M⁴/16))]/(γM²)
    (NACA Report 1135, eq. 167), in the same cancellation- and overflow-free form as
    :func:`detachment_angles` with P = (3γ-1)/4 + (3-γ)/(4M²).
    """
    if nx.plain_scalars(M1, gamma):
        return _sonic_angles_scalar(M1, gamma)
    M1 = np.asarray(M1, dtype=float)
    inv_m2 = _inverse_square(M1)
    big = (gamma + 1.0) * ((9.0 + gamma) / 16.0 * inv_m2 * inv_m2
                           - (3.0 - gamma) / 8.0 * inv_m2 + (gamma + 1.0) / 16.0)
    z, y = _zy_from_roots(gamma, inv_m2, 0.25 * (3.0 * gamma - 1.0)
                          + 0.25 * (3.0 - gamma) * inv_m2, np.sqrt(big))
    a, inv_a, rho, c = _scales(M1, gamma)
    with np.errstate(invalid="ignore"):
        return (np.arctan(_tan_deflection_zy(z, y, inv_a, c)), wave_angle_from_scaled_wv(z, y, a))


def _sonic_angles_scalar(M1, gamma):
    inv_m2 = nx.fdiv(1.0, M1 * M1)
    big = (gamma + 1.0) * ((9.0 + gamma) / 16.0 * inv_m2 * inv_m2
                           - (3.0 - gamma) / 8.0 * inv_m2 + (gamma + 1.0) / 16.0)
    z, y = _zy_from_roots(gamma, inv_m2, 0.25 * (3.0 * gamma - 1.0)
                          + 0.25 * (3.0 - gamma) * inv_m2, nx.fsqrt(big))
    a, inv_a, rho, c = _scales_scalar(M1, gamma)
    return (math.atan(_tan_deflection_zy_scalar(z, y, inv_a, c)),
            _wave_angle_from_scaled_wv_scalar(z, y, a))


def _inverse_square(M1):
    """1/M1², 0 (no overflow warning) where M1² overflows."""
    with np.errstate(over="ignore"):
        return 1.0 / (M1 * M1)


def _detachment_zy(M1, gamma, inv_m2=None):
    """(z*, y*) = (w*, v*)/(M1² - 1) at the detachment point (see :func:`detachment_angles`)."""
    inv_m2 = _inverse_square(M1) if inv_m2 is None else inv_m2
    big = (gamma + 1.0) * ((gamma + 1.0) / 16.0 + (0.5 * (gamma - 1.0) + inv_m2) * inv_m2)
    return _zy_from_roots(gamma, inv_m2, 0.25 * (3.0 * gamma - 1.0) + inv_m2, np.sqrt(big))


def _detachment_zy_scalar(M1, gamma):
    inv_m2 = nx.fdiv(1.0, M1 * M1)
    big = (gamma + 1.0) * ((gamma + 1.0) / 16.0 + (0.5 * (gamma - 1.0) + inv_m2) * inv_m2)
    return _zy_from_roots(gamma, inv_m2, 0.25 * (3.0 * gamma - 1.0) + inv_m2, nx.fsqrt(big))


def _zy_from_roots(gamma, inv_m2, P, S):
    y = ((gamma - 1.0) + 2.0 * inv_m2) / (2.0 * (P + S))
    return 1.0 - y, y


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


def _weak_start(z_cubic, a, inv_a, rho, tan_theta, gamma):
    """Start for the weak root: the cubic's, or near the Mach wave (where the cubic's
    weak and spurious roots merge) the inverted small-deflection series
    tan θ = k w (1 + c w + ...), k = 2√(M1²-1)/((γ+1)M1²), c = 2/((γ+1)M1²) - M1²/(2(M1²-1)),
    good to (c w)³ there; in z = w/a, z = tan θ (γ+1)ρ √(1/a)/2 to first order."""
    with np.errstate(over="ignore", invalid="ignore"):
        # c w = (2/((γ+1)M1²) - M1²/(2a)) a z = (2/((γ+1)ρ) - ρ a/2) z; the test
        # |c w| < 1e-3 is made on its square, so the √(1/a) is taken on that subset only
        k = 0.5 * tan_theta * (gamma + 1.0) * rho  # z_series = k √(1/a)
        c = 2.0 / ((gamma + 1.0) * rho) - 0.5 * rho * a
        small = (c * k) * (c * k) * inv_a < _SERIES_START * _SERIES_START
    if not small.any():
        return z_cubic
    z_series = k * np.sqrt(inv_a)
    cy = c * z_series
    return _put(z_cubic, small, z_series * (1.0 - cy + 2.0 * cy * cy))


def _strong_start(s_cubic, rho, c, tan_theta):
    """Start for the strong root in s = √y = M1 cos β/√(M1²-1): the cubic's, or near the
    normal shock (where 1 - z cancels) the inverted series tan θ = k s (1 + d s² + ...),
    k = 2/(√ρ c), d = 1/(2ρ) - 1 - 2/c (the series in M1 cos β of earlier versions, scaled)."""
    s_series = 0.5 * tan_theta * np.sqrt(rho) * c
    dy2 = (0.5 / rho - 1.0 - 2.0 / c) * s_series * s_series
    return _put(s_cubic, np.abs(dy2) < _SERIES_START, s_series * (1.0 - dy2))


def _newton_weak(z, target, inv_a, rho, c, z_star):
    """Polish the weak root in z = w/a, clamped to [0, z*]; ``target`` is tan θ.

    With f = tan θ = z q, q = 2√(y/(z + 1/a))/D, D = c + 2y, y = 1 - z, the slope in
    logarithmic form is df/dz = q + f (2/D - ρ/(2y(z + 1/a))), finite at z = 0.
    """
    for _ in range(_NEWTON_STEPS):
        zi = z + inv_a
        y = 1.0 - z
        inv_den = 1.0 / (c + 2.0 * y)
        q = 2.0 * np.sqrt(y / zi) * inv_den
        f = z * q
        df = q + f * (2.0 * inv_den - 0.5 * rho / (y * zi))
        z = np.clip(z - (f - target) / df, 0.0, z_star)
    return z


def _newton_strong(s, target, inv_a, c, s_star):
    """Polish the strong root in s = √y, clamped to [0, s*]; ``target`` is tan θ."""
    for _ in range(_NEWTON_STEPS):
        f, df = _tan_deflection_and_slope(s, inv_a, c, True)
        s = np.clip(s - (f - target) / df, 0.0, s_star)
    return s


def _newton_weak_scalar(z, target, inv_a, rho, c, z_star):
    for _ in range(_NEWTON_STEPS):
        zi = z + inv_a
        y = 1.0 - z
        inv_den = 1.0 / (c + 2.0 * y)
        q = 2.0 * nx.fsqrt(nx.fdiv(y, zi)) * inv_den
        f = z * q
        df = q + f * (2.0 * inv_den - nx.fdiv(0.5 * rho, y * zi))
        z = nx.fclip(z - nx.fdiv(f - target, df), 0.0, z_star)
    return z


def _newton_strong_scalar(s, target, inv_a, c, s_star):
    for _ in range(_NEWTON_STEPS):
        y = s * s
        z = 1.0 - y
        zi = z + inv_a
        den = c + 2.0 * y
        g = nx.fdiv(2.0 * z, math.sqrt(zi) * den)
        f = g * s
        df = g + f * s * (nx.fdiv(-2.0, z) + nx.fdiv(1.0, zi) - 4.0 / den)
        s = nx.fclip(s - nx.fdiv(f - target, df), 0.0, s_star)
    return s


def _tan_deflection_and_slope(x, inv_a, c, strong):
    """tan θ and d tan θ/dx along the polar, x = z = w/a (weak branch) or s = √(v/a) (strong).

    Weak: f = 2z √(y/(z + 1/a))/D, D = c + 2y, y = 1 - z; df/dz as in :func:`_newton_weak`.
    Strong: with y = s², z = 1 - s², f = 2zs/(√(z + 1/a) D), D = c + 2s², and
    d ln f/ds = -2s/z + 1/s + s/(z + 1/a) - 4s/D, so df/ds = f/s + f s (-2/z + 1/(z + 1/a) - 4/D).
    """
    if not strong:
        zi = x + inv_a
        y = 1.0 - x
        inv_den = 1.0 / (c + 2.0 * y)
        q = 2.0 * np.sqrt(y / zi) * inv_den
        f = x * q
        return f, q + f * (2.0 * inv_den - 0.5 * (1.0 + inv_a) / (y * zi))
    y = x * x
    z = 1.0 - y
    zi = z + inv_a
    den = c + 2.0 * y
    g = 2.0 * z / (np.sqrt(zi) * den)  # f/s
    f = g * x
    return f, g + f * x * (-2.0 / z + 1.0 / zi - 4.0 / den)


#: 1/(M1² - 1) at M1 = 1e150: the near-detachment polish's floor where M1² overflows (the
#: θ-β-M relation there is the M1 → ∞ one to rounding)
_SMALLEST_INV_A = 1e-300


def _polish_near_detachment(x, near, inv_a, c, target, x_star, tan_max, strong):
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
    ias, cs, ts, xs_star, tms = (np.broadcast_to(arr, x.shape)[near]
                                 for arr in (inv_a, c, target, x_star, tan_max))
    # where M1² overflowed (1/a = 0) the residual is 0·∞ at the bracket's end z = 0: take
    # 1/a = 1e-300 (M1 = 1e150), the same equation to rounding, finite there
    ias = np.maximum(ias, _SMALLEST_INV_A)
    goal = np.sqrt(np.maximum(tms - ts, 0.0))

    def residual(xx):
        f, df = _tan_deflection_and_slope(xx, ias, cs, strong)
        root = np.sqrt(np.maximum(tms - f, 0.0))
        return root - goal, -df / (2.0 * root)

    x = np.array(x, dtype=float, copy=True)
    start = np.where(np.isfinite(x[near]), np.clip(x[near], 0.0, xs_star), 0.5 * xs_star)
    x[near] = nx.safeguarded_newton(residual, start, np.zeros_like(xs_star), xs_star, max_iter=40)
    return x


def _tan_deflection_and_slope_scalar(x, inv_a, c, strong):
    """Scalar form of :func:`_tan_deflection_and_slope`."""
    if not strong:
        zi = x + inv_a
        y = 1.0 - x
        inv_den = 1.0 / (c + 2.0 * y)
        q = 2.0 * nx.fsqrt(nx.fdiv(y, zi)) * inv_den
        f = x * q
        return f, q + f * (2.0 * inv_den - nx.fdiv(0.5 * (1.0 + inv_a), y * zi))
    y = x * x
    z = 1.0 - y
    zi = z + inv_a
    den = c + 2.0 * y
    g = nx.fdiv(2.0 * z, nx.fsqrt(zi) * den)
    f = g * x
    return f, g + f * x * (nx.fdiv(-2.0, z) + nx.fdiv(1.0, zi) - 4.0 / den)


def _polish_near_detachment_scalar(x, inv_a, c, target, x_star, tan_max, strong):
    """Scalar form of :func:`_polish_near_detachment` (for one element that is near)."""
    inv_a = max(inv_a, _SMALLEST_INV_A)  # as in the array form: no 0·∞ at z = 0
    goal = math.sqrt(max(tan_max - target, 0.0))

    def residual(xx):
        f, df = _tan_deflection_and_slope_scalar(xx, inv_a, c, strong)
        root = nx.fsqrt(max(tan_max - f, 0.0) if f == f else f)
        return root - goal, nx.fdiv(-df, 2.0 * root)

    start = nx.fclip(x, 0.0, x_star) if math.isfinite(x) else 0.5 * x_star
    return nx.safeguarded_newton_scalar(residual, start, 0.0, x_star, max_iter=40)


def wave_angle_from_deflection(M1, theta, gamma=1.4, strong=False):
    """Plain core: wave angle β [rad] of the shock that turns a stream M1 by θ [rad].

    Closed-form root of the cubic in z = (M1² sin²β - 1)/(M1² - 1)
    (:func:`_cubic_root`, whose roots stay O(1) apart as M1 → 1; a small weak
    root by deflation, :func:`_small_weak_root`; series starts near the
    Mach wave and the normal shock) followed by one Newton step on tan θ(z)
    (weak branch) or tan θ(s), s = √(1 - z) (strong branch),
    clamped to the branch's side of the detachment point. Within 0.1 % of
    detachment (in tan θ) the root is re-solved in a square-root variable
    (:func:`_polish_near_detachment`), where Newton on tan θ itself stalls.
    Every step is written in z and 1/(M1² - 1), so no M1² overflows: M1 up to
    the float range and M1 = inf (the hypersonic limit) are solved too.
    Accuracy (tests/test_oblique_shocks.py, vs mpmath): a few ulp away from
    detachment; near it, within 32 ulp × |d ln β/d ln θ|, the conditioning of
    the problem, which grows like (θmax - θ)^(-1/2) (β is good to ~√ulp at
    θmax itself); θ(β) always reproduces θ to a few ulp. Near M1 = 1 the
    strength 2γw/(γ+1) = p2/p1 - 1 and β keep that accuracy down to
    M1 - 1 = 1e-12 (tested on both branches, 1.05 <= γ <= 1.67). Returns NaN for
    θ < 0, θ > θmax or M1 < 1.
    """
    if nx.plain_scalars(M1, theta, gamma):
        return _wave_angle_from_deflection_scalar(M1, theta, gamma, strong)
    M1, theta, gamma = nx.broadcast_cases(gamma, M1, theta)
    return nx.chunked(lambda m, t, g: _wave_angle_block(m, t, g, strong), M1, theta, gamma)


def _wave_angle_from_deflection_scalar(M1, theta, gamma, strong):
    """Scalar form of :func:`wave_angle_from_deflection`."""
    z, y, a, invalid = _scaled_wv_from_deflection_scalar(M1, theta, gamma, strong)
    if invalid:
        return math.nan
    if not strong and M1 > HUGE_MACH and tiny_hypersonic_turn(M1, theta, strong):
        return small_disturbance_shock(M1, theta, gamma)[0]
    return _wave_angle_from_scaled_wv_scalar(z, y, a)


def _wave_angle_block(M1, theta, gamma, strong):
    z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)
    beta = _put(wave_angle_from_scaled_wv(z, y, a), invalid, np.nan)
    tiny = tiny_hypersonic_turn(M1, theta, strong)
    if tiny is None:
        return beta
    return np.where(tiny, small_disturbance_shock(M1, theta, gamma)[0], beta)


def wv_from_deflection(M1, theta, gamma=1.4, strong=False):
    """Plain core: (w, v, invalid) of the shock that turns M1 by θ [rad].

    The solve behind :func:`wave_angle_from_deflection`, returned in the
    variables every downstream ratio needs without cancellation:
    w = M1² sin²β - 1 (the normal-shock variable of
    :func:`~gasdyn2d.relations.normal_shocks.normal_shock_ratios`) and v = M1² cos²β;
    ``invalid`` marks θ < 0, θ beyond detachment or M1 < 1. Arrays must
    already have equal shapes (γ may be a scalar). Where M1² overflows, w and v
    do too (inf): use :func:`scaled_wv_from_deflection` there.

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
    >>> from gasdyn2d.relations.shock_angles import wave_angle_from_wv
    >>> from gasdyn2d.relations.theta_beta_mach import wv_from_deflection
    >>> w, v, invalid = wv_from_deflection(np.array([2.0]), np.radians([10.0]))
    >>> np.degrees(wave_angle_from_wv(w, v)).round(4), invalid
    (array([39.3139]), array([False]))
    """
    if nx.plain_scalars(M1, theta, gamma):
        return _wv_from_deflection_scalar(M1, theta, gamma, strong)
    z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)
    with np.errstate(over="ignore", invalid="ignore"):
        return a * z, a * y, invalid


def _wv_from_deflection_scalar(M1, theta, gamma, strong):
    z, y, a, invalid = _scaled_wv_from_deflection_scalar(M1, theta, gamma, strong)
    return a * z, a * y, invalid


def scaled_wv_from_deflection(M1, theta, gamma=1.4, strong=False):
    """Plain core: (z, y, a, invalid), z = w/a, y = v/a, a = M1² - 1, of the shock that
    turns M1 by θ [rad]: :func:`wv_from_deflection` in the scaled variables of the solve.

    z = (M1² sin²β - 1)/(M1² - 1) and y = M1² cos²β/(M1² - 1) = 1 - z lie in [0, 1]
    for every M1 > 1 (on the weak branch z is the accurate one, on the strong branch
    y), so nothing overflows up to M1 = inf; β follows from
    :func:`wave_angle_from_scaled_wv`, p2/p1 - 1 = 2γ a z/(γ+1).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.theta_beta_mach import (scaled_wv_from_deflection,
    ...                                                wave_angle_from_scaled_wv)
    >>> z, y, a, invalid = scaled_wv_from_deflection(np.array([1e200]), np.array([0.3]))
    >>> np.degrees(wave_angle_from_scaled_wv(z, y, a)).round(4)  # the hypersonic limit
    array([20.814])
    """
    if nx.plain_scalars(M1, theta, gamma):
        return _scaled_wv_from_deflection_scalar(M1, theta, gamma, strong)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        a, inv_a, rho, c = _scales(M1, gamma)
        z_star, y_star = _detachment_zy(M1, gamma)
        tan_theta = np.tan(theta)
        tan_max = _tan_deflection_zy(z_star, y_star, inv_a, c)
        at_max = tan_theta >= tan_max  # the double root: Newton would crawl, take z*, y*
        # a few ulp of θ (< π/2) above θmax is θmax; in tan θ that slack is (1 + tan²θ)
        # times larger, which matters as θmax → 90° (γ → 1 at high M1)
        slack = (0.5 * np.pi * _DETACHMENT_SLACK) * (1.0 + tan_max * tan_max)
        # tan is periodic: θ beyond π/2 must be rejected before tan θ is compared
        invalid = (theta < 0) | (theta >= 0.5 * np.pi) | (tan_theta > tan_max + slack) | (M1 < 1)
        z = _cubic_root(tan_theta, gamma, strong, inv_a)
        near = ~at_max & (tan_max - tan_theta <= _NEAR_DETACHMENT * tan_max)
        if strong:
            s_star = np.sqrt(y_star)
            s_cubic = np.sqrt(np.maximum(1.0 - z, 0.0))
            s0 = np.clip(_strong_start(s_cubic, rho, c, tan_theta), 0.0, s_star)
            s = _newton_strong(s0, tan_theta, inv_a, c, s_star)
            s = _polish_near_detachment(s, near, inv_a, c, tan_theta, s_star, tan_max, True)
            s = _put(_put(s, at_max, s_star), theta == 0.0, 0.0)
            y = s * s
            return 1.0 - y, y, a, invalid
        small = z < _SMALL_WEAK_ROOT
        if small.any():
            z = np.array(z, dtype=float, copy=True)
            z[small] = _small_weak_root(*(np.broadcast_to(x, z.shape)[small]
                                          for x in (tan_theta, gamma, inv_a)))
        z0 = np.clip(_weak_start(z, a, inv_a, rho, tan_theta, gamma), 0.0, z_star)
        z = _newton_weak(z0, tan_theta, inv_a, rho, c, z_star)
        z = _polish_near_detachment(z, near, inv_a, c, tan_theta, z_star, tan_max, False)
        z = _put(_put(z, at_max, z_star), theta == 0.0, 0.0)
        return z, 1.0 - z, a, invalid


def _scaled_wv_from_deflection_scalar(M1, theta, gamma, strong):
    """Scalar form of :func:`scaled_wv_from_deflection`: the same cubic, starts, Newton
    step, clamps and near-detachment polish."""
    a, inv_a, rho, c = _scales_scalar(M1, gamma)
    if theta < 0.0 or theta >= 0.5 * math.pi or M1 < 1.0:
        return math.nan, math.nan, a, True
    z_star, y_star = _detachment_zy_scalar(M1, gamma)
    tan_theta = math.tan(theta) if theta == theta else math.nan
    tan_max = _tan_deflection_zy_scalar(z_star, y_star, inv_a, c)
    slack = (0.5 * math.pi * _DETACHMENT_SLACK) * (1.0 + tan_max * tan_max)
    if tan_theta > tan_max + slack:
        return math.nan, math.nan, a, True
    if theta == 0.0:
        return (1.0, 0.0, a, False) if strong else (0.0, 1.0, a, False)
    at_max = tan_theta >= tan_max
    near = not at_max and tan_max - tan_theta <= _NEAR_DETACHMENT * tan_max
    if strong:
        s_star = nx.fsqrt(y_star)
        if at_max:
            s = s_star
        else:
            b3, Q, R = _cubic_coefficients_scalar(tan_theta, gamma, inv_a)
            z = _trigonometric_root_scalar(b3, Q, R, True)
            s = nx.fsqrt(max(1.0 - z, 0.0) if z == z else z)
            s_series = 0.5 * tan_theta * math.sqrt(rho) * c  # _strong_start
            dy2 = (0.5 / rho - 1.0 - nx.fdiv(2.0, c)) * s_series * s_series
            if abs(dy2) < _SERIES_START:
                s = s_series * (1.0 - dy2)
            s = _newton_strong_scalar(nx.fclip(s, 0.0, s_star), tan_theta, inv_a, c, s_star)
            if near:
                s = _polish_near_detachment_scalar(s, inv_a, c, tan_theta, s_star, tan_max, True)
        y = s * s
        return 1.0 - y, y, a, False
    if at_max:
        return z_star, 1.0 - z_star, a, False
    z = _weak_root_scalar(tan_theta, gamma, inv_a)
    k = 0.5 * tan_theta * (gamma + 1.0) * rho  # _weak_start
    c_series = 2.0 / ((gamma + 1.0) * rho) - 0.5 * rho * a
    if (c_series * k) * (c_series * k) * inv_a < _SERIES_START * _SERIES_START:
        z_series = k * math.sqrt(inv_a)
        cy = c_series * z_series
        z = z_series * (1.0 - cy + 2.0 * cy * cy)
    z = _newton_weak_scalar(nx.fclip(z, 0.0, z_star), tan_theta, inv_a, rho, c, z_star)
    if near:
        z = _polish_near_detachment_scalar(z, inv_a, c, tan_theta, z_star, tan_max, False)
    return z, 1.0 - z, a, False

