"""One simple wave, shock or fan, chosen by the sign of its turn (plain core).

The region graph, the section loads and the intake tools all need the same
primitive: "turn this stream by a signed angle and tell me the state behind the
wave". A positive ``turn`` turns the flow into itself (a compression: an
oblique shock of deflection ``turn``); a negative one turns it away (a
centred Prandtl–Meyer fan of deflection ``-turn``). Which way is "into itself"
in the plane depends on the wave's family; that mapping lives with the graph.

Everything here is plain numpy: floats or ndarrays in radians, no pint.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from .expansion_fans import fan_pressure_ratio, mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from .. import numerics as nx
from .normal_shocks import normal_shock_ratios
from .isentropic import HUGE_MACH, mach_after_isentropic_pressure_change
from .oblique_shocks import (
    deflection_from_wave_angle,
    deflection_slope_wv,
    scaled_wv_from_deflection,
    wave_angle_from_scaled_wv,
    wave_angle_from_wv,
)

__all__ = ["WaveState", "turn_state", "turn_for_pressure_ratio"]


class WaveState(NamedTuple):
    """State behind one simple wave (plain ndarrays; angles in radians).

    ``wave_angle`` is the shock angle β from the upstream flow (NaN for a fan);
    ``dlnp_dturn`` is d ln(p2/p1)/d(turn), continuous through turn = 0 where
    both sides equal γM1²/√(M1² - 1); ``detached`` marks compressions beyond
    θmax and ``vacuum`` expansions beyond ν_max.
    """

    M2: np.ndarray
    p2_p1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray
    wave_angle: np.ndarray
    is_shock: np.ndarray
    dlnp_dturn: np.ndarray
    detached: np.ndarray
    vacuum: np.ndarray


def _shock_log_pressure_slope(M1, w, v, gamma, strong=False):
    """d ln(p2/p1)/dθ along the shock polar, from dp/dw and dθ/dw (w = M1² sin²β - 1,
    v = M1² cos²β).

    θ rises with w on the weak branch and falls on the strong one, so the sign is
    the branch's (> 0 weak, < 0 strong); only the magnitude is taken from dθ/dw,
    whose sign rounding can flip at detachment, where the slope is infinite.
    """
    f, df = deflection_slope_wv(w, v, M1, gamma)
    dtheta_dw = np.abs(df) / (1.0 + f * f) * (-1.0 if strong else 1.0)
    p = 1.0 + 2.0 * gamma / (gamma + 1.0) * w
    return 2.0 * gamma / (gamma + 1.0) / p / dtheta_dw


def turn_state(M1, turn, gamma=1.4, strong=False):
    """State behind the wave that turns a stream M1 by ``turn`` [rad] (> 0 shock, < 0 fan).

    Parameters
    ----------
    M1, turn, gamma : float or ndarray
        Upstream Mach number (>= 1), signed turn [rad], ratio of specific heats.
    strong : bool, optional
        Strong-branch shock for positive turns.

    Returns
    -------
    WaveState
        NaN fields where the shock would detach or the fan pass vacuum (flagged).

    Examples
    --------
    >>> from gasdyn2d.relations.simple_waves import turn_state
    >>> import numpy as np
    >>> state = turn_state(2.0, np.radians([10.0, -10.0]))
    >>> np.round(state.p2_p1, 5)
    array([1.70658, 0.54797])
    """
    if nx.plain_scalars(M1, turn, gamma):
        return _turn_state_scalar(M1, turn, gamma, strong)
    M1, turn, gamma = nx.broadcast_cases(gamma, M1, turn)
    return WaveState(*nx.chunked(lambda m, t, g: _turn_state_block(m, t, g, strong),
                                 M1, turn, gamma))


def _turn_state_block(M1, turn, gamma, strong):
    """:func:`turn_state` on one block of equal-shape arrays (γ may be a scalar)."""
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        is_shock = turn > 0.0
        # the shock, in the cancellation-free variables w = Mn1² - 1 and v = M1² cos²β
        theta = np.where(is_shock, turn, 0.0)
        z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)
        detached = is_shock & invalid & (M1 >= 1.0)
        z = np.where(invalid, np.nan, z)
        w, v = a * z, a * y
        beta = wave_angle_from_scaled_wv(z, y, a)
        shock = normal_shock_ratios(w, gamma)
        shock_M2 = shock.M2 / np.sin(beta - theta)
        shock_slope = _shock_log_pressure_slope(M1, w, v, gamma, strong)

        nu1 = prandtl_meyer_angle(M1, gamma)
        nu2 = nu1 - np.where(is_shock, 0.0, turn)
        M_fan = mach_from_prandtl_meyer_angle(nu2, gamma)
        # a fan never slows the flow: no rounding of the inverse may give M2 < M1
        M_fan = np.where(turn == 0.0, M1, np.maximum(M_fan, M1))
        vacuum = np.isnan(M_fan) & ~is_shock & np.isfinite(turn) & np.isfinite(M1)
        p_fan = fan_pressure_ratio(M1, M_fan, gamma)
        T_fan = (1.0 + 0.5 * (gamma - 1.0) * M1**2) / (1.0 + 0.5 * (gamma - 1.0) * M_fan**2)
        fan_slope = gamma * M_fan**2 / np.sqrt((M_fan - 1.0) * (M_fan + 1.0))
        fan_slope = np.where(M_fan == 1.0, np.inf, fan_slope)
        huge = M_fan > HUGE_MACH  # M_fan >= M1: M² may overflow; isentropic T ∝ p^((γ-1)/γ)
        if nx.any_true(huge):
            T_fan = np.where(huge, p_fan ** ((gamma - 1.0) / gamma), T_fan)
            fan_slope = np.where(huge, gamma * M_fan / np.sqrt(1.0 - 1.0 / M_fan / M_fan),
                                 fan_slope)

        pick = lambda a, b: np.where(is_shock, a, b)  # noqa: E731
        return (pick(shock_M2, M_fan), pick(shock.p2_p1, p_fan), pick(shock.T2_T1, T_fan),
                pick(shock.p02_p01, 1.0 + 0.0 * M1), pick(beta, np.nan), is_shock,
                pick(shock_slope, fan_slope), detached, vacuum)


def _turn_state_scalar(M1, turn, gamma, strong):
    """Scalar form of :func:`turn_state`: the same steps, for the one wave the sign of the
    turn picks (a WaveState of floats). A division by zero or a domain error on the math
    module (numpy would give ±inf or NaN there and carry on) hands the case to the array
    form, so both forms agree everywhere."""
    try:
        if turn > 0.0:
            return _shock_state_scalar(M1, turn, gamma, strong)
        return _fan_state_scalar(M1, turn, gamma)
    except (ZeroDivisionError, ValueError, OverflowError):
        state = turn_state(np.array([M1], dtype=float), np.array([turn], dtype=float), gamma,
                           strong)
        return WaveState(*(field[0].item() for field in state))


def _shock_state_scalar(M1, theta, gamma, strong):
    z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)
    if invalid:
        z = math.nan
    w, v = a * z, a * y
    beta = wave_angle_from_scaled_wv(z, y, a)
    shock = normal_shock_ratios(w, gamma)
    f, df = deflection_slope_wv(w, v, M1, gamma)
    dtheta_dw = abs(df) / (1.0 + f * f) * (-1.0 if strong else 1.0)  # _shock_log_pressure_slope
    p = 1.0 + 2.0 * gamma / (gamma + 1.0) * w
    slope = 2.0 * gamma / (gamma + 1.0) / p / dtheta_dw
    return WaveState(shock.M2 / math.sin(beta - theta), shock.p2_p1, shock.T2_T1,
                     shock.p02_p01, beta, True, slope, invalid and M1 >= 1.0, False)


def _fan_state_scalar(M1, turn, gamma):
    nu2 = prandtl_meyer_angle(M1, gamma) - turn
    M_fan = mach_from_prandtl_meyer_angle(nu2, gamma)
    if turn == 0.0:
        M_fan = M1
    elif M_fan == M_fan and M1 == M1:
        M_fan = max(M_fan, M1)
    elif M1 != M1:
        M_fan = math.nan
    vacuum = M_fan != M_fan and math.isfinite(turn) and math.isfinite(M1)
    h = 0.5 * (gamma - 1.0)
    p_fan = fan_pressure_ratio(M1, M_fan, gamma)
    if M_fan > HUGE_MACH:  # as in the array form: no M² where it may overflow
        T_fan = p_fan ** ((gamma - 1.0) / gamma)
        slope = gamma * M_fan / math.sqrt(1.0 - 1.0 / M_fan / M_fan)
    else:
        T_fan = (1.0 + h * (M1 * M1)) / (1.0 + h * (M_fan * M_fan))
        slope = math.inf if M_fan == 1.0 else (
            gamma * (M_fan * M_fan) / nx.fsqrt((M_fan - 1.0) * (M_fan + 1.0)))
    return WaveState(M_fan, p_fan, T_fan, 1.0 + 0.0 * M1, math.nan, False, slope, False,
                     vacuum)

def turn_for_pressure_ratio(M1, p2_p1, gamma=1.4):
    """Signed turn [rad] of the single wave that takes a stream M1 to pressure ratio p2/p1.

    Above 1 a shock: the pressure fixes the shock's normal
    Mach number, so the turn is unique (closed form); below 1 a fan (closed
    form through the isentropic inverse). NaN above the normal-shock pressure.

    Examples
    --------
    >>> from gasdyn2d.relations.simple_waves import turn_for_pressure_ratio
    >>> import numpy as np
    >>> np.round(np.degrees(turn_for_pressure_ratio(2.0, [1.70658, 0.54797])), 3)
    array([ 10., -10.])
    """
    if nx.plain_scalars(M1, p2_p1, gamma):
        return _turn_for_pressure_ratio_scalar(M1, p2_p1, gamma)
    M1, p, gamma = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (M1, p2_p1, gamma)))
    with np.errstate(invalid="ignore", divide="ignore"):
        # the pressure fixes the normal Mach number, w = Mn1² - 1 (NACA Report 1135, eq. 93)
        w = (p - 1.0) * (gamma + 1.0) / (2.0 * gamma)
        beta = wave_angle_from_wv(w, (M1 - 1.0) * (M1 + 1.0) - w)
        theta = deflection_from_wave_angle(M1, beta, gamma)
        M2 = mach_after_isentropic_pressure_change(M1, p, gamma)
        fan = prandtl_meyer_angle(M1, gamma) - prandtl_meyer_angle(M2, gamma)
        return np.where(p >= 1.0, theta, fan)





def _turn_for_pressure_ratio_scalar(M1, p, gamma):
    w = (p - 1.0) * (gamma + 1.0) / (2.0 * gamma)
    if p >= 1.0:
        beta = wave_angle_from_wv(w, (M1 - 1.0) * (M1 + 1.0) - w)
        return deflection_from_wave_angle(M1, beta, gamma)
    M2 = mach_after_isentropic_pressure_change(M1, p, gamma)
    return prandtl_meyer_angle(M1, gamma) - prandtl_meyer_angle(M2, gamma)
