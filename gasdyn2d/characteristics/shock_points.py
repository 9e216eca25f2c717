"""The shock point: where a fitted shock meets the characteristic that reaches it from behind.

A shock carried through a characteristic net as a discontinuity is fixed, point by
point, by two things: the oblique-shock relations between the known upstream state
and the unknown state just behind, and the one compatibility relation that reaches
the point from the downstream side, along the characteristic of the shock's own
family (for a weak shock the downstream characteristics of that family run into the
shock from behind, as M2 sin(β - θ) < 1). The wave angle β is the one unknown.

The compatibility relation is taken in pressure and flow direction, which holds in
rotational (non-homentropic) planar flow as it stands:

    along C+ :  dθ + B dp/p = 0,      along C- :  dθ - B dp/p = 0,
    B = √(M² - 1) / (γ M²)

(Zucrow and Hoffman, 1977, vol. 2, ch. 16, the compatibility relations in p and θ,
and the shock point of a fitted shock; chapter from memory). B is
averaged between the point the characteristic comes from and the shock point (the
averaged-coefficient rule of the other unit processes: second order along the
segment).

Sign convention (the one of the unit processes): θ is the flow direction from the
x axis, counter-clockwise positive. A shock of family +1 runs like a C+ (up and to
the right, as from a compression on a lower wall): it turns the flow counter-
clockwise by δ(β) and lies at θ_up + β. A shock of family -1 runs like a C- and turns
the flow clockwise, lying at θ_up - β.

Plain core only (SI, radians, pressures in any one unit): :func:`shock_point`.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..relations.oblique_shocks import oblique_shock_ratios
from ..relations.theta_beta_mach import sonic_angles

__all__ = ["ShockPoint", "shock_point", "compatibility_coefficient"]

_ITERATIONS = 80  # Illinois steps at most; the bracket closes to a few ulp in ~10
_GUESS_WIDTH = 1e-3  # half-width [rad] of the wider bracket around a guess
_RESIDUAL_FLOOR = 1e-15  # [rad]: a scalar solve stops there (β to ~1e-15 rad, F' ~ 1)


class ShockPoint(NamedTuple):
    """Plain-core result of :func:`shock_point` (floats or ndarrays; angles in radians)."""

    wave_angle: np.ndarray  #: β between the upstream flow and the shock [rad]
    direction: np.ndarray  #: the shock's direction from the x axis, θ_up ± β [rad]
    mach: np.ndarray  #: Mach number just behind
    theta: np.ndarray  #: flow direction just behind [rad]
    p: np.ndarray  #: static pressure just behind, in the unit of ``p_up``
    p0_ratio: np.ndarray  #: stagnation-pressure ratio across the shock, p02/p01
    vanished: np.ndarray  #: True where the shock has weakened to a Mach wave (β = μ_up)
    subsonic: np.ndarray  #: True where the shock would leave the flow behind it subsonic


def compatibility_coefficient(mach, gamma=1.4):
    """B = √(M² - 1)/(γM²), the coefficient of dp/p in the planar compatibility relations.

    Zero, not NaN, at M = 1 rounded from below (the end of a shock's supersonic branch).
    """
    mach = np.asarray(mach, dtype=float)
    with np.errstate(invalid="ignore"):
        excess = np.where(mach > 1.0 - 1e-12, np.maximum((mach - 1.0) * (mach + 1.0), 0.0),
                          np.nan)
    return np.sqrt(excess) / (gamma * mach * mach)


def shock_point(mach_up, theta_up, p_up, mach_behind, theta_behind, p_behind, family,
                gamma=1.4, *, guess=None):
    """Plain core: the state just behind a shock point, and the shock's angle there.

    Parameters
    ----------
    mach_up, theta_up, p_up : float or array_like
        State just upstream of the shock point: Mach number, flow direction [rad],
        static pressure (any unit; ``p`` comes back in the same one).
    mach_behind, theta_behind, p_behind : float or array_like
        State at the point, downstream of the shock, from which the characteristic of
        the shock's own family reaches the shock point.
    family : {+1, -1} or array_like
        +1 for a shock running like a C+ (turning the flow counter-clockwise), -1 for
        one running like a C-.
    gamma : float, optional
        Ratio of specific heats.
    guess : float, optional
        A wave angle near the answer [rad] (say, the shock's angle one step before in a
        march). Scalar calls only: the root is first bracketed within 1e-6 rad of it,
        and then within 1e-3 rad (from the nearer end of the first), which saves most of
        the steps; the answer is the same (to a few ulp).

    Returns
    -------
    ShockPoint
        β, the shock direction, M, θ, p just behind, p02/p01 and two flags. Where the
        characteristic asks for less than a Mach wave (the shock has been cancelled
        by an expansion) ``vanished`` is True and the Mach wave (β = μ_up, no jump)
        is returned; where it asks for a shock so strong that the flow behind it is
        subsonic (where characteristics end), ``subsonic`` is True and the state is NaN.

    Notes
    -----
    Solves F(β) = s [θ2(β) - θ_b] + B̄ ln(p2(β)/p_b) = 0 for β on the supersonic
    part of the weak branch, [μ_up, β_s] (β_s the wave angle that leaves M2 = 1), with
    θ2 = θ_up + s δ(β), p2 = p_up p2/p1(β), B̄ = ½(B(M_b) + B(M2(β))) and s the family.
    F rises with β on that branch (δ and p2 both do), so a bracketing Illinois
    iteration converges from any state, to a few ulp in β.

    References
    ----------
    Zucrow, M. J. and Hoffman, J. D., 1977, *Gas Dynamics*, vol. 2, Wiley, ch. 16
    (chapter from memory).

    Examples
    --------
    A shock from a 10° wedge at Mach 2, found from the uniform flow behind it:

    >>> import math
    >>> from gasdyn2d.characteristics.shock_points import shock_point
    >>> from gasdyn2d.relations.oblique_shocks import oblique_shock_ratios
    >>> behind = oblique_shock_ratios(2.0, math.radians(39.31393))
    >>> point = shock_point(2.0, 0.0, 1.0, behind.M2, behind.deflection, behind.p2_p1, +1)
    >>> round(math.degrees(float(point.wave_angle)), 4)
    39.3139
    """
    if nx.plain_scalars(mach_up, theta_up, p_up, mach_behind, theta_behind, p_behind, family,
                        gamma):
        return _shock_point_scalar(mach_up, theta_up, p_up, mach_behind, theta_behind, p_behind,
                                   family, gamma, guess)
    arrays = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (
        mach_up, theta_up, p_up, mach_behind, theta_behind, p_behind, family, gamma)))
    mach_up, theta_up, p_up, mach_behind, theta_behind, p_behind, family, gamma = arrays
    b_behind = compatibility_coefficient(mach_behind, gamma)
    log_p_behind = np.log(p_behind / p_up)

    def residual(beta):
        ratios = oblique_shock_ratios(mach_up, beta, gamma)
        b_mean = 0.5 * (b_behind + compatibility_coefficient(ratios.M2, gamma))
        value = ratios.deflection - family * (theta_behind - theta_up) + b_mean * (
            np.log1p(ratios.strength) - log_p_behind)
        return value, ratios

    with np.errstate(invalid="ignore", divide="ignore"):
        low = np.arcsin(1.0 / mach_up)
        high = np.array(sonic_angles(mach_up, gamma)[1], dtype=float) + 0.0 * low
        f_low, _ = residual(low)
        f_high, _ = residual(high)
        vanished = f_low >= 0.0
        subsonic = f_high < 0.0
        beta = _illinois(residual, low, high, f_low, f_high,
                         active=~(vanished | subsonic | np.isnan(f_low + f_high)))
        beta = np.where(vanished, low, np.where(subsonic, np.nan, beta))
        ratios = residual(beta)[1]
    theta = theta_up + family * ratios.deflection
    result = ShockPoint(beta, theta_up + family * beta, ratios.M2, theta,
                        p_up * (1.0 + ratios.strength), ratios.p02_p01, vanished, subsonic)
    if result.wave_angle.ndim == 0:
        return ShockPoint(*(v[()] for v in result))
    return result


def _compatibility_coefficient_scalar(mach, gamma):
    """Scalar form of :func:`compatibility_coefficient`."""
    if not mach > 1.0 - 1e-12:
        return math.nan
    return math.sqrt(max((mach - 1.0) * (mach + 1.0), 0.0)) / (gamma * mach * mach)


def _shock_point_scalar(mach_up, theta_up, p_up, mach_behind, theta_behind, p_behind, family,
                        gamma, guess=None):
    """Scalar form of :func:`shock_point` (same residual, same Illinois steps; the march of
    fitted shocks calls it once per shock per step, where numpy's per-call cost dominates)."""
    nan = math.nan
    if not (mach_up > 1.0 and p_up > 0.0 and p_behind > 0.0) or math.isnan(
            mach_behind + theta_behind + theta_up + family + gamma):
        return ShockPoint(nan, nan, nan, nan, nan, nan, False, False)
    b_behind = _compatibility_coefficient_scalar(mach_behind, gamma)
    log_p_behind = math.log(p_behind / p_up)
    turn_behind = family * (theta_behind - theta_up)

    def residual(beta):
        ratios = oblique_shock_ratios(mach_up, beta, gamma)
        b_mean = 0.5 * (b_behind + _compatibility_coefficient_scalar(ratios.M2, gamma))
        return ratios.deflection - turn_behind + b_mean * (
            math.log1p(ratios.strength) - log_p_behind), ratios

    low = math.asin(1.0 / mach_up)
    high = float(sonic_angles(mach_up, gamma)[1])
    for width in ((_GUESS_WIDTH * 1e-3, _GUESS_WIDTH) if guess is not None else ()):
        if not (low < guess - width and guess + width < high):
            break
        # F rises with β: a bracket around the guess also rules out both flags
        f_below, f_above = residual(guess - width)[0], residual(guess + width)[0]
        if f_below < 0.0 <= f_above:
            return _bracketed_scalar(residual, guess - width, guess + width, f_below, f_above,
                                     mach_up, theta_up, p_up, family, gamma)
        # the root lies beyond the narrow bracket on the side the residual points to
        guess = guess + (width if f_above < 0.0 else -width)
    f_low, f_high = residual(low)[0], residual(high)[0]
    vanished, subsonic = f_low >= 0.0, f_high < 0.0
    if math.isnan(f_low + f_high):
        return ShockPoint(nan, nan, nan, nan, nan, nan, False, False)
    if subsonic and not vanished:
        return ShockPoint(nan, nan, nan, nan, nan, nan, False, True)
    if not vanished:
        return _bracketed_scalar(residual, low, high, f_low, f_high, mach_up, theta_up, p_up,
                                 family, gamma)
    return _scalar_point_at(low, mach_up, theta_up, p_up, family, gamma, vanished=True)


def _scalar_point_at(beta, mach_up, theta_up, p_up, family, gamma, vanished=False):
    """The scalar shock point of wave angle ``beta`` (state behind from the oblique-shock
    relations)."""
    ratios = oblique_shock_ratios(mach_up, beta, gamma)
    return ShockPoint(beta, theta_up + family * beta, ratios.M2,
                      theta_up + family * ratios.deflection, p_up * (1.0 + ratios.strength),
                      ratios.p02_p01, vanished, False)


def _bracketed_scalar(residual, low, high, f_low, f_high, mach_up, theta_up, p_up, family,
                      gamma):
    """Illinois steps on a bracket of the scalar residual, and the shock point at the root."""
    beta, side = 0.5 * (low + high), 0
    for _ in range(_ITERATIONS):
        guess = (low * f_high - high * f_low) / (f_high - f_low)
        if not low < guess < high:
            guess = 0.5 * (low + high)
        f_guess = residual(guess)[0]
        beta = guess
        if f_guess < 0.0:
            low, f_low = guess, f_guess
            if side < 0:
                f_high *= 0.5
            side = -1
        else:
            high, f_high = guess, f_guess
            if side > 0:
                f_low *= 0.5
            side = 1
        if high - low <= 4.0 * math.ulp(high) or abs(f_guess) <= _RESIDUAL_FLOOR:
            break
    return _scalar_point_at(beta, mach_up, theta_up, p_up, family, gamma)


def _illinois(residual, low, high, f_low, f_high, active):
    """Bracketed root of an increasing ``residual`` on [low, high] where ``active``."""
    beta = np.where(active, 0.5 * (low + high), np.nan)
    side = np.zeros(beta.shape)
    for _ in range(_ITERATIONS):
        if not active.any():
            break
        with np.errstate(invalid="ignore", divide="ignore"):
            guess = (low * f_high - high * f_low) / (f_high - f_low)
        guess = np.where(np.isfinite(guess) & (guess > low) & (guess < high), guess,
                         0.5 * (low + high))
        f_guess = residual(guess)[0]
        beta = np.where(active, guess, beta)
        below = active & (f_guess < 0.0)
        above = active & (f_guess >= 0.0)
        low, f_low = np.where(below, guess, low), np.where(below, f_guess, f_low)
        high, f_high = np.where(above, guess, high), np.where(above, f_guess, f_high)
        # Illinois: halve the stale end's residual when the same end moves twice
        f_high = np.where(below & (side < 0), 0.5 * f_high, f_high)
        f_low = np.where(above & (side > 0), 0.5 * f_low, f_low)
        side = np.where(below, -1.0, np.where(above, 1.0, side))
        active = active & (high - low > 4.0 * np.spacing(high)) & (f_guess != 0.0)
    return beta
