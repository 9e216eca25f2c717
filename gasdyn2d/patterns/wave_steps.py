"""One wave of a pattern's solve: the state behind it and the derivatives it carries.

Plain core of :mod:`gasdyn2d.patterns.solver`: floats for one case (the ``math``
module and the scalar forms of the relations) or flat arrays for a batch. A region
is carried as its :class:`RegionValues` and the derivatives of its Mach number, log
pressure and direction with respect to the pattern's unknown turns
(:class:`RegionState`); :func:`through_wave` maps them across one wave with the
closed-form partial derivatives of :func:`wave_partials`.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.isentropic import mach_after_isentropic_pressure_change
from ..relations.oblique_shocks import detachment_angles, oblique_shock_ratios
from ..relations.simple_waves import (WaveState, isentropic_turn_state,
                                      turn_for_pressure_ratio, turn_state)

__all__ = ["RegionValues", "RegionState", "through_wave", "wave_partials", "wave_state",
           "pressure_wave", "log_of", "exp_of", "sqrt_of", "structural_zero", "scalar_state",
           "take_cases", "take_state"]

_NAN = math.nan


class RegionValues(NamedTuple):
    """A region's state relative to the inflow: M, ln p, direction [rad], ln T, ln p0."""

    M: object
    lnp: object
    direction: object
    lnT: object
    lnp0: object


class RegionState(NamedTuple):
    values: RegionValues
    dM: list  # derivatives per unknown (0.0 where structurally zero)
    dlnp: list
    dd: list


# ------------------------------------------------------------------ scalar-or-array math


def log_of(x):
    if type(x) is float:
        return math.log(x) if x > 0.0 else (-math.inf if x == 0.0 else _NAN)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.log(x)


def exp_of(x):
    if type(x) is float:
        try:
            return math.exp(x)
        except OverflowError:
            return math.inf
    with np.errstate(over="ignore"):
        return np.exp(x)


def sqrt_of(x):
    if type(x) is float:
        return math.sqrt(x) if x >= 0.0 else _NAN
    with np.errstate(invalid="ignore"):
        return np.sqrt(x)


def structural_zero(v) -> bool:
    """A derivative that is structurally zero (nothing upstream depends on the unknown)."""
    return type(v) is float and v == 0.0


def scalar_state(state):
    """A WaveState of Python floats and bools (the scalar path works on plain floats)."""
    if type(state.M2) is float:
        return state
    return WaveState(*(bool(v) if np.asarray(v).dtype == bool else float(v) for v in state))


def take_cases(value, idx):
    return value[idx] if isinstance(value, np.ndarray) else value


def take_state(state, idx):
    return WaveState(*(f[idx] for f in state))


# ------------------------------------------------------------------ one wave


def wave_partials(M1, t, gamma, state, *, isentropic=False, need_mach=True):
    """Partial derivatives of one wave: (∂M2/∂M1, ∂M2/∂t, ∂ln(p2/p1)/∂M1, ∂ln(p2/p1)/∂t).

    ``t`` is the compression-positive turn [rad] and ``state`` the wave's
    :class:`~gasdyn2d.relations.simple_waves.WaveState` (its ``dlnp_dturn`` is
    ∂ln(p2/p1)/∂t). Closed forms, floats or arrays:

    - centred simple wave (ν2 = ν1 - t): ∂M2/∂t = -1/ν'(M2), ∂M2/∂M1 = ν'(M1)/ν'(M2),
      ∂ln p/∂M1 = Λ'(M2) ∂M2/∂M1 - Λ'(M1), with ν'(M) = √(M²-1)/(M(1 + (γ-1)M²/2))
      and Λ'(M) = -γM/(1 + (γ-1)M²/2) (NACA Report 1135, eqs. 44 and 171);
    - oblique shock: implicit differentiation of tan θ = 2w√(v/(1+w))/((γ-1)M1² + 2 + 2v)
      (eq. 138 in w = M1² sin²β - 1, v = M1² - 1 - w) at fixed θ gives ∂w/∂M1, and
      M2² = Mn2²(w) + v T1/T2(w) (eqs. 94-96 with the tangential velocity conserved)
      gives ∂M2 from ∂w and ∂M1.

    ``need_mach=False`` skips the ∂/∂M1 terms (returned as 0.0) for a wave whose
    upstream Mach number depends on no unknown.
    """
    h = 0.5 * (gamma - 1.0)
    M2 = state.M2
    Lt = state.dlnp_dturn

    def simple_wave():
        nu2p = sqrt_of((M2 - 1.0) * (M2 + 1.0)) / (M2 * (1.0 + h * M2 * M2))
        Ft = -1.0 / nu2p
        if not need_mach:
            return 0.0, Ft, 0.0
        nu1p = sqrt_of((M1 - 1.0) * (M1 + 1.0)) / (M1 * (1.0 + h * M1 * M1))
        FM = nu1p / nu2p
        LM = -gamma * M2 / (1.0 + h * M2 * M2) * FM + gamma * M1 / (1.0 + h * M1 * M1)
        return FM, Ft, LM

    def shock():
        k = 2.0 * gamma / (gamma + 1.0)
        p = state.p2_p1
        w = (p - 1.0) / k
        u = 1.0 + w
        v = (M1 - 1.0) * (M1 + 1.0) - w
        dw_dt = Lt * p / k  # from ∂ln p/∂t = k/(1 + k w) ∂w/∂t
        # the Mach number behind: M2² = Mn2² + v T1/T2, each a function of w (u = 1 + w)
        ratio_den = (gamma - 1.0) * u + 2.0
        A = (gamma + 1.0) * u / ratio_den  # ρ2/ρ1
        tau = A / p  # T1/T2
        dtau = (2.0 * (gamma + 1.0) / (ratio_den * ratio_den) * p - A * k) / (p * p)
        dMn2sq = -(h * h + gamma) / ((gamma * u - h) ** 2)
        dM2sq_dw = dMn2sq - tau + v * dtau
        Ft = dM2sq_dw * dw_dt / (2.0 * M2)
        if not need_mach:
            return 0.0, Ft, 0.0
        # ∂w/∂M1 at fixed θ: -g_M/g_w, g = tan θ(w, M1), g_w = sec²θ / (∂w/∂θ)
        tan_t = math.tan(t) if type(t) is float else np.tan(t)
        g_w = (1.0 + tan_t * tan_t) / dw_dt
        r = sqrt_of(v / u)
        den = (gamma - 1.0) * M1 * M1 + 2.0 + 2.0 * v
        g_M = 2.0 * w * (M1 * den / (r * u) - 2.0 * r * M1 * (gamma + 1.0)) / (den * den)
        dw_dM = -g_M / g_w
        FM = (dM2sq_dw * dw_dM + 2.0 * M1 * tau) / (2.0 * M2)
        return FM, Ft, k / p * dw_dM

    if isentropic:
        FM, Ft, LM = simple_wave()
    elif type(M2) is float:
        FM, Ft, LM = shock() if state.is_shock else simple_wave()
    else:
        shocks = state.is_shock
        with np.errstate(all="ignore"):
            if shocks.all():
                FM, Ft, LM = shock()
            elif not shocks.any():
                FM, Ft, LM = simple_wave()
            else:
                FM, Ft, LM = (np.where(shocks, a, b) for a, b in zip(shock(), simple_wave()))
    return FM, Ft, LM, Lt


def wave_state(M1, t, gamma, link):
    if link.compression == "isentropic":
        return isentropic_turn_state(M1, t, gamma)
    return turn_state(M1, t, gamma, strong=link.strong)


def pressure_wave(M1, log_ratio, gamma, link):
    """(compression-positive turn, state) of the wave that reaches a given pressure."""
    ratio = exp_of(log_ratio)
    if link.compression == "isentropic":
        M2 = mach_after_isentropic_pressure_change(M1, ratio, gamma)
        t = prandtl_meyer_angle(M1, gamma) - prandtl_meyer_angle(M2, gamma)
        if type(M1) is float:
            t = float(t)
        return t, isentropic_turn_state(M1, t, gamma)
    t = turn_for_pressure_ratio(M1, ratio, gamma)
    # above the pressure at maximum deflection, only the strong branch reaches it
    _, beta_star = detachment_angles(M1, gamma)
    with np.errstate(invalid="ignore"):
        strong = ratio > oblique_shock_ratios(M1, beta_star, gamma).p2_p1
    if type(M1) is float:
        return float(t), turn_state(M1, float(t), gamma, strong=bool(strong))
    if not strong.any():
        return t, turn_state(M1, t, gamma)
    weak = turn_state(M1, t, gamma)
    both = turn_state(M1[strong], t[strong], take_cases(gamma, strong), strong=True)
    fields = [np.array(f, copy=True) for f in weak]
    for f, s in zip(fields, both):
        f[strong] = s
    return t, WaveState(*fields)


def through_wave(link, up, x, case, j):
    """The region behind wave ``link`` from region ``up``: (turn, state, _Region)."""
    M1, lnp1, d1 = up.values.M, up.values.lnp, up.values.direction
    gamma = case["g"]
    sign = link.sign
    k = len(up.dM)
    scalar = type(M1) is float
    if link.given == "pressure":
        target = log_of(case["w:" + link.name])
        t, state = pressure_wave(M1, target - lnp1, gamma, link)
        dt = None  # from the pressure condition below
    else:
        if link.given == "turn":
            turn = case["w:" + link.name]
            dturn = [0.0] * k
        elif link.given == "direction":
            turn = case["w:" + link.name] - d1
            dturn = [0.0 if structural_zero(d) else -d for d in up.dd]
        else:
            turn = x[j]
            dturn = [0.0] * k
            dturn[j] = 1.0
        t = sign * turn
        state = wave_state(M1, t, gamma, link)
        dt = [0.0 if structural_zero(d) else sign * d for d in dturn]
    if scalar:
        state = scalar_state(state)
    need = not all(structural_zero(d) for d in up.dM)
    track = need or (dt is None and not all(structural_zero(d) for d in up.dlnp)) or (
        dt is not None and not all(structural_zero(d) for d in dt))
    if link.given == "pressure":
        turn = sign * t
        lnp2 = target if scalar else np.where(np.isnan(state.p2_p1), np.nan, target)
        if scalar and state.p2_p1 != state.p2_p1:
            lnp2 = _NAN
    else:
        lnp2 = lnp1 + log_of(state.p2_p1)
    values = RegionValues(state.M2, lnp2, d1 + turn, up.values.lnT + log_of(state.T2_T1),
                          up.values.lnp0 + log_of(state.p02_p01))
    if not track:
        zeros = [0.0] * k
        return turn, state, RegionState(values, zeros, list(zeros), list(zeros))
    FM, Ft, LM, Lt = wave_partials(M1, t, gamma, state,
                                   isentropic=link.compression == "isentropic", need_mach=need)
    if dt is None:  # the pressure is held: ln p1 + L(M1, t) = target, so dt = -(dl + L_M dm)/L_t
        dt = [0.0 if structural_zero(dl) and structural_zero(dm)
              else -_sum3(dl, LM, dm, 0.0, 0.0) / Lt
              for dl, dm in zip(up.dlnp, up.dM)]
        dlnp = [0.0] * k
    else:
        dlnp = [_sum3(dl, LM, dm, Lt, dti) for dl, dm, dti in zip(up.dlnp, up.dM, dt)]
    dM = [_sum3(0.0, FM, dm, Ft, dti) for dm, dti in zip(up.dM, dt)]
    dd = [dd_ if structural_zero(dti) else dd_ + sign * dti for dd_, dti in zip(up.dd, dt)]
    return turn, state, RegionState(values, dM, dlnp, dd)


def _sum3(a, L, dm, Lt, dt):
    """a + L·dm + Lt·dt, skipping structural zeros."""
    out = a
    if not structural_zero(dm):
        out = out + L * dm
    if not structural_zero(dt):
        out = out + Lt * dt
    return out
