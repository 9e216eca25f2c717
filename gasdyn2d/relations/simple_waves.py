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

from .wave_state import WaveState  # re-exported here

__all__ = ["WaveState", "turn_state", "isentropic_turn_state", "turn_for_pressure_ratio"]


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
    """:func:`turn_state` on one block of equal-shape arrays (γ may be a scalar).

    Only the branch each case needs is computed: the shock relations where
    turn > 0, the fan relations elsewhere; a block of one kind (the usual case in
    a coupled solve) runs one branch on the whole block without gathering.
    """
    is_shock = turn > 0.0
    n_shock = int(np.count_nonzero(is_shock))
    if n_shock == is_shock.size:
        return _shock_branch(M1, turn, gamma, strong)
    if n_shock == 0:
        return _simple_wave_branch(M1, turn, gamma, compression=False)
    fan = ~is_shock
    pick = (lambda a, m: a) if np.ndim(gamma) == 0 else (lambda a, m: a[m])  # noqa: E731
    shock = _shock_branch(M1[is_shock], turn[is_shock], pick(gamma, is_shock), strong)
    expansion = _simple_wave_branch(M1[fan], turn[fan], pick(gamma, fan), compression=False)
    out = []
    for a, b in zip(shock, expansion):
        field = np.empty(M1.shape, dtype=np.result_type(a, b))
        field[is_shock] = a
        field[fan] = b
        out.append(field)
    return tuple(out)


def _shock_branch(M1, theta, gamma, strong):
    """WaveState fields of oblique shocks of deflection θ > 0 (equal-shape arrays)."""
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # the shock, in the cancellation-free variables z = w/(M1² - 1), y = 1 - z
        # (w = Mn1² - 1, v = M1² cos²β): exact down to M1 - 1 = 1e-12
        z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)
        detached = invalid & (M1 >= 1.0)
        if invalid.any():
            z = np.where(invalid, np.nan, z)
        w, v = a * z, a * y
        beta = wave_angle_from_scaled_wv(z, y, a)
        shock = normal_shock_ratios(w, gamma)
        M2 = shock.M2 / np.sin(beta - theta)
        slope = _shock_log_pressure_slope(M1, w, v, gamma, strong)
        is_shock = np.ones(M1.shape, dtype=bool)
        return (M2, shock.p2_p1, shock.T2_T1, shock.p02_p01, beta, is_shock, slope, detached,
                np.zeros(M1.shape, dtype=bool))


def _simple_wave_branch(M1, turn, gamma, compression):
    """WaveState fields of centred simple waves: ν2 = ν1 - turn (equal-shape arrays).

    An expansion fan for turn <= 0; with ``compression`` also an isentropic
    (Prandtl–Meyer) compression for turn > 0, which cannot slow the flow below
    sonic (ν2 < 0 is flagged ``detached``: no simple compression turns that far).
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        nu1 = prandtl_meyer_angle(M1, gamma)
        M2 = mach_from_prandtl_meyer_angle(nu1 - turn, gamma)
        # a fan never slows the flow, a compression never speeds it up: no rounding of
        # the inverse may say otherwise
        if compression:
            M2 = np.where(turn > 0.0, np.minimum(M2, M1), np.maximum(M2, M1))
        else:
            M2 = np.maximum(M2, M1)
        M2 = np.where(turn == 0.0, M1, M2)
        finite = np.isfinite(turn) & np.isfinite(M1) & (M1 >= 1.0)
        lost = np.isnan(M2) & finite
        vacuum = lost & (turn < 0.0)
        choked = lost & (turn > 0.0)
        p = fan_pressure_ratio(M1, M2, gamma)
        with np.errstate(over="ignore"):
            T = (1.0 + 0.5 * (gamma - 1.0) * M1**2) / (1.0 + 0.5 * (gamma - 1.0) * M2**2)
            slope = gamma * M2**2 / np.sqrt((M2 - 1.0) * (M2 + 1.0))
        slope = np.where(M2 == 1.0, np.inf, slope)
        huge = M2 > HUGE_MACH  # M2 >= M1: M² may overflow; isentropic T ∝ p^((γ-1)/γ)
        if nx.any_true(huge):
            T = np.where(huge, p ** ((gamma - 1.0) / gamma), T)
            slope = np.where(huge, gamma * M2 / np.sqrt(1.0 - 1.0 / M2 / M2), slope)
        shape = M1.shape
        return (M2, p, T, np.where(np.isnan(M1 + turn), np.nan, np.ones(shape)),
                np.full(shape, np.nan), np.zeros(shape, dtype=bool), slope, choked, vacuum)


def isentropic_turn_state(M1, turn, gamma=1.4):
    """State behind the centred simple wave that turns a stream M1 by ``turn`` [rad].

    Like :func:`turn_state`, but a compression (turn > 0) is isentropic: a
    Prandtl–Meyer compression, ν2 = ν1 - turn, instead of an oblique shock.
    Exact while its characteristics do not meet (they converge and would
    coalesce into a shock some distance from the wall). A compression past
    ν2 = 0 (to below sonic speed) has no simple-wave solution: ``detached`` is
    set and the fields are NaN. Negative turns are the same fans as
    :func:`turn_state`.

    Parameters
    ----------
    M1, turn, gamma : float or ndarray
        Upstream Mach number (>= 1), signed turn [rad], ratio of specific heats.

    Returns
    -------
    WaveState
        ``is_shock`` False everywhere, ``p02_p01`` = 1, ``wave_angle`` NaN.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 171 (the Prandtl–Meyer function).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.simple_waves import isentropic_turn_state
    >>> state = isentropic_turn_state(2.0, np.radians([10.0, -10.0]))
    >>> np.round(state.M2, 5), np.round(state.p2_p1, 5)
    (array([1.65142, 2.38489]), array([1.7052 , 0.54797]))
    """
    M1, turn, gamma = nx.broadcast_cases(gamma, M1, turn)
    return WaveState(*nx.chunked(
        lambda m, t, g: _simple_wave_branch(m, t, g, compression=True), M1, turn, gamma))


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
    vacuum = (M_fan != M_fan and math.isfinite(turn) and math.isfinite(M1) and M1 >= 1.0
              and turn < 0.0)
    h = 0.5 * (gamma - 1.0)
    p_fan = fan_pressure_ratio(M1, M_fan, gamma)
    if M_fan > HUGE_MACH:  # as in the array form: no M² where it may overflow
        T_fan = p_fan ** ((gamma - 1.0) / gamma)
        slope = gamma * M_fan / math.sqrt(1.0 - 1.0 / M_fan / M_fan)
    else:
        T_fan = (1.0 + h * (M1 * M1)) / (1.0 + h * (M_fan * M_fan))
        slope = math.inf if M_fan == 1.0 else (
            gamma * (M_fan * M_fan) / nx.fsqrt((M_fan - 1.0) * (M_fan + 1.0)))
    recovery = math.nan if M1 != M1 or turn != turn else 1.0
    return WaveState(M_fan, p_fan, T_fan, recovery, math.nan, False, slope, False, vacuum)

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
