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

from ..relations import thermally_perfect as tp
from ..relations import thermally_perfect_oblique as tpo
from ..relations import thermally_perfect_shocks as tps
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.isentropic import mach_after_isentropic_pressure_change
from ..relations.oblique_shocks import (detachment_angles, oblique_shock_ratios,
                                        wave_angle_from_normal_excess)
from ..relations.simple_waves import (WaveState, isentropic_turn_state,
                                      turn_for_pressure_ratio, turn_state)

__all__ = ["RegionValues", "RegionState", "through_wave", "wave_partials", "wave_state",
           "pressure_wave", "log_of", "exp_of", "sqrt_of", "structural_zero", "scalar_state",
           "take_cases", "take_state", "hot_wave_state", "hot_pressure_wave"]

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


# ------------------------------------------------------------------ thermally perfect gas
# A region's state is (M, T); T = T_in·exp(lnT). No derivatives are carried: the solver
# differences the residuals instead (the waves' partial derivatives in T have no closed form).


def _hot_simple_wave(M1, T1, t, gas):
    """WaveState of the centred simple wave of compression-positive turn t (ν2 = ν1 - t)."""
    wave = tp.isentropic_compression_from_turn(M1, T1, -t, gas)
    with np.errstate(invalid="ignore", divide="ignore"):
        M2 = np.where(t == 0.0, M1, wave.M2)
        lost = np.isnan(M2) & np.isfinite(t) & np.isfinite(M1) & np.isfinite(T1) & (M1 >= 1.0)
        slope = wave.gamma2 * M2 * M2 / np.sqrt((M2 - 1.0) * (M2 + 1.0))
        shape = np.shape(M2)
        state = WaveState(M2, np.where(t == 0.0, 1.0, wave.p2_p1),
                          np.where(t == 0.0, 1.0, wave.T2_T1),
                          np.where(np.isnan(M2), np.nan, np.ones(shape)), np.full(shape, np.nan),
                          np.zeros(shape, dtype=bool), slope, lost & (t > 0.0),
                          lost & (t < 0.0))
    return scalar_state(state) if type(M1) is float else state


def hot_wave_state(M1, T1, t, gas, link):
    """:func:`wave_state` for a thermally perfect gas: the wave from a region (M1, T1 [K])."""
    if link.compression == "isentropic":
        return _hot_simple_wave(M1, T1, t, gas)
    state = tpo.turn_state(M1, T1, t, gas, strong=link.strong)
    return scalar_state(state) if type(M1) is float else state


def hot_pressure_wave(M1, T1, log_ratio, gas, link):
    """:func:`pressure_wave` for a thermally perfect gas: (compression-positive turn, state).

    A shock: the pressure fixes its normal Mach number (the thermally perfect normal-shock
    inverse at T1), hence β and θ, on the strong branch above the detachment pressure.
    A fan or isentropic compression: p2/p0 = (p2/p1)(p1/p0) at the stream's T0 gives M2
    (the isentropic inverse), the turn is ν(M1) - ν(M2).
    """
    ratio = exp_of(log_ratio)
    M1a, T1a, ratio_a = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                               for v in (M1, T1, ratio)))
    with np.errstate(invalid="ignore", divide="ignore"):
        if link.compression == "isentropic":
            shock = np.zeros(M1a.shape, dtype=bool)
        else:
            shock = ratio_a >= 1.0
        t = np.full(M1a.shape, np.nan)
        strong = np.zeros(M1a.shape, dtype=bool)
        if shock.any():
            m, T, P = M1a[shock], T1a[shock], ratio_a[shock]
            Mn1 = np.minimum(tps.mach_from_pressure_jump(P, T, gas), m)
            beta = wave_angle_from_normal_excess(m, (Mn1 - 1.0) * (Mn1 + 1.0))
            t[shock] = tpo.oblique_shock_from_wave_angle(m, T, beta, gas).deflection
            strong[shock] = beta > tpo.detachment_angles(m, T, gas)[1]
        simple = ~shock
        if simple.any():
            m, T = M1a[simple], T1a[simple]
            T0 = tp.stagnation_temperature(m, T, gas)
            p1_p0 = tp.isentropic_ratios(m, T0, gas).p_p0
            M2 = tp.mach_from_pressure_ratio(ratio_a[simple] * p1_p0, T0, gas)
            M2 = np.where(ratio_a[simple] == 1.0, m, M2)
            t[simple] = tp.prandtl_meyer_angle(m, T0, gas) - tp.prandtl_meyer_angle(M2, T0, gas)
    if type(M1) is float:
        return float(t[()]), hot_wave_state(M1, T1, float(t[()]), gas,
                                           _Branch(link.compression, bool(strong[()])))
    state = hot_wave_state(M1a, T1a, t, gas, link)
    if strong.any():
        fields = [np.array(f, copy=True) for f in state]
        hard = hot_wave_state(M1a[strong], T1a[strong], t[strong], gas,
                              _Branch(link.compression, True))
        for f, h in zip(fields, hard):
            f[strong] = h
        state = WaveState(*fields)
    return t, state


class _Branch(NamedTuple):
    """The two attributes of a wave link that :func:`hot_wave_state` reads."""

    compression: str
    strong: bool


def through_wave(link, up, x, case, j, gas=None):
    """The region behind wave ``link`` from region ``up``: (turn, state, _Region).

    ``gas``: a thermally perfect :class:`~gasdyn2d.Gas` (the region temperature is then
    T_in·exp(lnT), ``case["T_in"]`` the inflow's), for which no derivatives are carried.
    """
    M1, lnp1, d1 = up.values.M, up.values.lnp, up.values.direction
    gamma = case["g"]
    sign = link.sign
    k = len(up.dM)
    scalar = type(M1) is float
    if gas is not None:
        return _hot_through_wave(link, up, x, case, j, gas)
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


def _hot_through_wave(link, up, x, case, j, gas):
    """:func:`through_wave` for a thermally perfect gas (values only; zero derivatives)."""
    M1, lnp1, d1 = up.values.M, up.values.lnp, up.values.direction
    T1 = case["T_in"] * exp_of(up.values.lnT)
    scalar = type(M1) is float
    if link.given == "pressure":
        target = log_of(case["w:" + link.name])
        t, state = hot_pressure_wave(M1, T1, target - lnp1, gas, link)
        turn = link.sign * t
        if scalar:
            lnp2 = target if state.p2_p1 == state.p2_p1 else _NAN
        else:
            lnp2 = np.where(np.isnan(state.p2_p1), np.nan, target)
    else:
        if link.given == "turn":
            turn = case["w:" + link.name]
        elif link.given == "direction":
            turn = case["w:" + link.name] - d1
        else:
            turn = x[j]
        state = hot_wave_state(M1, T1, link.sign * turn, gas, link)
        lnp2 = lnp1 + log_of(state.p2_p1)
    values = RegionValues(state.M2, lnp2, d1 + turn, up.values.lnT + log_of(state.T2_T1),
                          up.values.lnp0 + log_of(state.p02_p01))
    zeros = [0.0] * len(up.dM)
    return turn, state, RegionState(values, zeros, list(zeros), list(zeros))


def _sum3(a, L, dm, Lt, dt):
    """a + L·dm + Lt·dt, skipping structural zeros."""
    out = a
    if not structural_zero(dm):
        out = out + L * dm
    if not structural_zero(dt):
        out = out + Lt * dt
    return out
