"""Thermally perfect gas (vibrational excitation): oblique shocks and one simple wave.

Plain core only (floats and ndarrays, SI units, radians, no pint); invalid elements
come out as NaN. The gas is a :class:`~gasdyn2d.relations.gas.Gas` with a
``vibrational_temperature``; the upstream static temperature T1 [K] fixes the state.

- :func:`oblique_shock_from_wave_angle`, :func:`oblique_shock_from_deflection` (weak
  and strong branches), :func:`detachment_angles`, :func:`sonic_angles`;
- :func:`turn_state`: the simple-wave primitive (shock for a positive turn, centred
  fan for a negative one) of :mod:`gasdyn2d.relations.simple_waves` for this gas.

The state variable is that of the normal shock, τ = T2/T1 - 1 of the normal component
(:mod:`gasdyn2d.relations.thermally_perfect_shocks`, which gives the jump in closed
form for a given τ). The deflection is a closed form of τ too (the normal component at
the same T1, the tangential velocity conserved): tan θ = (1 - ε) √(m(μ1 - m))/(μ1 -
(1 - ε) m) with m = u_n1²/(R T1) and μ1 = u1²/(R T1). From a deflection, τ starts
from the closed-form perfect-gas solution, taken twice: at γ(T1), then at the
effective γ of that jump's mean heat capacity (:func:`_start_from_perfect_gas`), and
is finished by three Newton steps (in √(τ_normal - τ) on the strong branch, where
tan θ has a square-root end at the normal shock). Newton's own error estimate
(:func:`_converged`) accepts an element; the few that are not accepted (about 1 %
of random cases: near detachment, beyond the perfect gas's detachment, or detached)
are re-solved by a bracketed iteration on √(tan θmax - tan θ(τ)), which is nearly
linear through the detachment point. Detachment (d tan θ/dτ = 0) and the sonic point
(M2 = 1) are bracketed Newton solves in τ.

Model limits: see :mod:`gasdyn2d.relations.gas` (no dissociation, vibrational
equilibrium behind the shock assumed). A curved or detached shock is not modelled.
Results are for preliminary design.

References
----------
Ames Research Staff (1953), *Equations, Tables, and Charts for Compressible
Flow*, NACA Report 1135, oblique-shock eqs. 127-150 (the geometry of the normal and
tangential components) and imperfect-gas section (from memory).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from .shock_angles import deflection_slope_wv as _perfect_gas_slope
from .theta_beta_mach import detachment_angles as _perfect_gas_detachment
from .theta_beta_mach import sonic_angles as _perfect_gas_sonic
from .theta_beta_mach import wv_from_deflection as _perfect_gas_wv
from .wave_state import WaveState
from .thermally_perfect import fan_from_turn
from .thermally_perfect_shocks import (
    UpstreamState,
    entropy_rise,
    jump_strength,
    mean_heat_capacity,
    normal_jump,
    perfect_gas_jump,
    shock_jump,
    upstream_state,
)

__all__ = [
    "ObliqueShockRatios",
    "oblique_shock_from_wave_angle",
    "oblique_shock_from_deflection",
    "detachment_angles",
    "sonic_angles",
    "turn_state",
]

_NEWTON_STEPS = 3  # Newton steps on tan θ(τ) from the two-pass perfect-gas start
_SECOND_PASS_STEPS = 3  # Newton steps in w of the weak branch's second perfect-gas pass


def _bracketed_tau(residual, start, lo, hi, increasing):
    with np.errstate(all="ignore"):
        lo, hi = np.broadcast_arrays(lo, hi)
        return nx.safeguarded_newton(residual, np.clip(start, lo, hi), lo, hi,
                                     increasing=increasing)


class ObliqueShockRatios(NamedTuple):
    """Plain-core result of the oblique-shock functions (ndarrays; angles in radians)."""

    wave_angle: np.ndarray  #: β from the upstream flow [rad]
    deflection: np.ndarray  #: flow turn θ [rad]
    Mn1: np.ndarray  #: upstream normal Mach number M1 sin β
    Mn2: np.ndarray  #: downstream normal Mach number
    M2: np.ndarray  #: downstream Mach number
    p2_p1: np.ndarray  #: static pressure ratio
    rho2_rho1: np.ndarray  #: density ratio
    T2_T1: np.ndarray  #: static temperature ratio
    p02_p01: np.ndarray  #: stagnation pressure ratio
    gamma2: np.ndarray  #: ratio of specific heats behind the shock
    strength: np.ndarray  #: (p2 - p1)/p1, without cancellation
    gamma1: np.ndarray  #: ratio of specific heats ahead of the shock


def _oblique_ratios(tau, j, up, mu1, vm=None):
    """Every field at τ for a stream of u1²/(R T1) = μ1 (the normal component has m = j.m).

    tan θ = (1 - ε) √(m(μ1 - m))/(μ1 - (1 - ε) m): the tangential velocity is conserved and
    the normal one falls by ε; M2² = (ε² m + μ1 - m)/(γ2 t) in units of a2. ``vm`` =
    u_t²/(R T1) = μ1 - m may be given when the caller has it without cancellation.
    """
    g1 = up.c1 / (up.c1 - 1.0)
    g2 = j.c2 / (j.c2 - 1.0)
    vm = np.maximum(mu1 - j.m, 0.0) if vm is None else vm  # u_t²/(R T1)
    theta = np.arctan(j.delta * np.sqrt(j.m * vm) / (mu1 - j.delta * j.m))
    return ObliqueShockRatios(
        np.arctan2(np.sqrt(j.m), np.sqrt(vm)), theta, np.sqrt(j.m / g1),
        j.eps * np.sqrt(j.m / (g2 * j.t)), np.sqrt((j.eps * j.eps * j.m + vm) / (g2 * j.t)),
        j.t / j.eps, j.BS / (2.0 * j.t), j.t, np.exp(-entropy_rise(j, tau, up)), g2,
        jump_strength(tau, j), g1 + 0.0 * theta)


def _stream(M1, T1, gas):
    M1, T1 = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(T1, dtype=float))
    up = upstream_state(T1, gas)
    return M1, T1, up, up.c1 / (up.c1 - 1.0) * M1 * M1  # μ1 = γ1 M1²


def oblique_shock_from_wave_angle(M1, T1, beta, gas):
    """Plain core: every quantity behind an oblique shock of wave angle β [rad].

    The normal component M1 sin β obeys the normal shock of
    :func:`~gasdyn2d.relations.thermally_perfect_shocks.normal_shock_ratios` at the same T1;
    NaN for β outside [μ, π/2] or M1 < 1.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_oblique import oblique_shock_from_wave_angle
    >>> shock = oblique_shock_from_wave_angle(3.0, 300.0, 0.7, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(shock.deflection)), 4), round(float(shock.p2_p1), 5)
    (22.0151, 4.19955)
    """
    M1, T1, beta = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (M1, T1, beta)))
    return nx.chunked(lambda m, t, b: _wave_angle_block(m, t, b, gas), M1, T1, beta)


def _wave_angle_block(M1, T1, beta, gas):
    M1, T1, up, mu1 = _stream(M1, T1, gas)
    with np.errstate(all="ignore"):
        ms = M1 * np.sin(beta)
        w = (ms - 1.0) * (ms + 1.0)
        invalid = (w < -1e-15 * M1 * M1) | (beta > 0.5 * np.pi) | ~(M1 >= 1.0)
        w = np.maximum(w, 0.0)
        tau = normal_jump(w, up)
        j = shock_jump(tau, up, derivatives=False)
        # the normal component's m is γ1(1 + w) exactly: keep it (no round trip through τ)
        j = j._replace(m=up.c1 / (up.c1 - 1.0) * (1.0 + w))
        mc = M1 * np.cos(beta)
        vm = up.c1 / (up.c1 - 1.0) * mc * mc  # the tangential part, exact near β = 90°
        out = _oblique_ratios(tau, j, up, j.m + vm, vm)
    out = out._replace(wave_angle=beta.copy())
    return ObliqueShockRatios(*(np.where(invalid, np.nan, v) for v in out))


def _polar(tau, up, mu1):
    """(tan θ, d tan θ/dτ, jump) along the shock polar of a stream μ1 = u1²/(R T1)."""
    j = shock_jump(tau, up)
    vm = mu1 - j.m
    r = np.sqrt(j.m * vm)
    D = mu1 - j.delta * j.m
    f = j.delta * r / D
    ddelta = -j.deps
    df = (ddelta * r / D + j.delta * j.dm * (mu1 - 2.0 * j.m) / (2.0 * D * r)
          + f * (ddelta * j.m + j.delta * j.dm) / D)
    return f, df, j


def _start_from_perfect_gas(M1, theta, up, strong):
    """Start for τ from the perfect-gas θ-β-M solution, in two passes.

    First at γ(T1), with one fixed-point step of the normal shock at its normal Mach
    number; then again at the effective γe = c̄/(c̄ - 1) of that τ and the Mach number
    M1 √(γ1/γe) (same u1²/(R T1)): for a given wave angle the thermally perfect shock is
    exactly that perfect-gas shock when c̄ is the mean heat capacity of its own jump, so
    the second pass is good to the change of c̄ between the two (measured: median 7e-5,
    worst 1.4e-2 in τ over M1 1.05-10, T1 200-3000 K). NaN where the perfect gas detaches.
    On the weak branch the second pass is Newton steps from the first
    (:func:`_weak_second_pass`). Returns τ and u_t²/(R T1) of that start.
    """
    g1 = up.c1 / (up.c1 - 1.0)
    w, v, invalid = _perfect_gas_wv(M1, theta, g1, strong)
    w = np.where(invalid, np.nan, w)
    cbar = mean_heat_capacity(normal_jump(w, up, fixed_steps=1, newton_steps=0), up)[0]
    g_e = cbar / (cbar - 1.0)
    if strong:
        w, v, invalid = _perfect_gas_wv(M1 * np.sqrt(g1 / g_e), theta, g_e, strong)
    else:
        w, v, invalid = _weak_second_pass(M1, theta, w, v, g1, g_e)
    mu = np.where(invalid, np.nan, g_e * (1.0 + w))  # u_n1²/(R T1)
    return perfect_gas_jump(cbar, mu / g1 - 1.0, up), g_e * v  # and u_t²/(R T1)


def _weak_second_pass(M1, theta, w, v, g1, g_e):
    """The second pass of :func:`_start_from_perfect_gas` on the weak branch, cheaply.

    The first pass's wave angle, in the variables of the second pass's stream
    (M1² → M1² γ1/γe: w_e = (1 + w)γ1/γe - 1, v_e = v γ1/γe), is taken as the start of
    :data:`_SECOND_PASS_STEPS` Newton steps on the perfect-gas tan θ(w) at γe (kept inside
    the polar), instead of a second full θ-β-M solve: the same start to rounding
    where the full solve converges (measured: the final τ agrees to 3e-15 over 2·10⁵
    random cases, with the same 2.4 % sent to the bracketed iteration), at a third of its
    cost.
    """
    r = g1 / g_e
    M_e = M1 * np.sqrt(r)
    w, v = (1.0 + w) * r - 1.0, v * r
    target = np.tan(theta)
    for _ in range(_SECOND_PASS_STEPS):
        f, df = _perfect_gas_slope(w, v, M_e, g_e)
        step = np.clip((f - target) / df, -0.5 * w, 0.5 * v)  # never off the weak polar
        w, v = w - step, v + step
    return w, v, np.isnan(w)


def _converged(step, previous, x):
    """Newton's own error estimate: after steps s_(k-1), s_k the error is about
    s_k³/s_(k-1)² (quadratic convergence); accept below 1e-14 relative. Near detachment
    (a double root) Newton converges only linearly, s_k ≈ s_(k-1)/2, and is refused,
    unless the step itself is at rounding level (below 1e-13 relative)."""
    size = np.abs(step)
    return (size <= 1e-13 * np.abs(x)) | (size ** 3 <= 1e-14 * np.abs(x) * previous * previous)


def _detachment_tau(up, mu1, tau_n, start):
    """τ* where d tan θ/dτ = 0: bracketed Newton in [0, τ_normal], the second derivative
    by a central difference of the (closed-form) first (relative step 1e-6)."""
    def residual(tau):
        h = 1e-6 * np.maximum(tau, 1e-3)
        df = _polar(tau, up, mu1)[1]
        curvature = (_polar(tau + h, up, mu1)[1] - _polar(tau - h, up, mu1)[1]) / (2.0 * h)
        return df, curvature

    return _bracketed_tau(residual, start, np.zeros_like(tau_n), tau_n, False)


def _detachment_start(M1, up):
    g1 = up.c1 / (up.c1 - 1.0)
    _, beta = _perfect_gas_detachment(M1, g1)
    ms = M1 * np.sin(beta)
    w = (ms - 1.0) * (ms + 1.0)
    return normal_jump(w, up, newton_steps=0)


def _normal_tau(M1, up):
    return normal_jump(np.maximum((M1 - 1.0) * (M1 + 1.0), 0.0), up)


def _bracketed_deflection(M1, target, up, mu1, strong):
    """τ for tan θ = ``target`` on one branch, robust up to detachment (the subset path).

    Returns τ and a detached flag. On √(f* - f(τ)), f = tan θ, the double root at the
    detachment point τ* becomes a simple one; the weak branch is solved in τ ∈ [0, τ*],
    the strong one in y = √(τ_normal - τ) ∈ [0, √(τ_normal - τ*)], where the normal-shock
    end (f ∝ y) is regular.
    """
    tau_n = _normal_tau(M1, up)
    tau_star = _detachment_tau(up, mu1, tau_n, np.minimum(_detachment_start(M1, up), tau_n))
    f_star = _polar(tau_star, up, mu1)[0]
    slack = 4.0 * np.finfo(float).eps * (1.0 + f_star * f_star)
    detached = target > f_star + slack
    goal = np.sqrt(np.maximum(f_star - target, 0.0))

    if not strong:
        def residual(tau):
            f, df, _ = _polar(tau, up, mu1)
            root = np.sqrt(np.maximum(f_star - f, 0.0))
            return goal - root, df / (2.0 * root)  # increasing in τ

        tau = _bracketed_tau(residual, 0.5 * tau_star, np.zeros_like(tau_star), tau_star, True)
    else:
        y_star = np.sqrt(np.maximum(tau_n - tau_star, 0.0))

        def residual(y):
            f, df, _ = _polar(tau_n - y * y, up, mu1)
            root = np.sqrt(np.maximum(f_star - f, 0.0))
            return goal - root, -2.0 * y * df / (2.0 * root)  # increasing in y

        y = _bracketed_tau(residual, 0.5 * y_star, np.zeros_like(y_star), y_star, True)
        tau = tau_n - y * y
    at_max = target >= f_star
    tau = np.where(at_max, tau_star, tau)
    return np.where(detached, np.nan, tau), detached


def _deflection_block(M1, T1, theta, gas, strong):
    M1, T1, up, mu1 = _stream(M1, T1, gas)
    with np.errstate(all="ignore"):
        target = np.tan(theta)
        invalid = ~(theta >= 0.0) | ~(theta < 0.5 * np.pi) | ~(M1 >= 1.0)
        start, vm = _start_from_perfect_gas(M1, theta, up, strong)
        step = np.full_like(target, np.nan)  # no previous step: no error estimate yet
        if strong:
            tau_n = _normal_tau(M1, up)
            # near the normal shock τ_n - τ ≈ τ_n u_t²/u1² is the better start for y²
            y = np.sqrt(np.where(tau_n - start > 0.1 * tau_n * vm / mu1, tau_n - start,
                                 tau_n * vm / mu1))
            for _ in range(_NEWTON_STEPS):
                f, df, _ = _polar(tau_n - y * y, up, mu1)
                # the step in y, written as the step in τ (2y dy) for the convergence test
                previous, step = step, (f - target) / df
                y = np.maximum(y + 0.5 * step / y, 0.5 * y)  # never past the normal shock
            tau = np.where(theta == 0.0, tau_n, tau_n - y * y)
            good = (_converged(step, previous, tau) & (df < 0.0)) | (theta == 0.0)
        else:
            tau = start
            for _ in range(_NEWTON_STEPS):
                f, df, _ = _polar(tau, up, mu1)
                previous, step = step, (f - target) / df
                tau = np.maximum(tau - step, 0.5 * tau)  # never past the Mach wave
            good = (_converged(step, previous, tau) & (df > 0.0)) | (theta == 0.0)
            tau = np.where(theta == 0.0, 0.0, tau)
        retry = ~good & ~invalid & ~np.isnan(target + M1 + T1)
        if nx.any_true(retry):
            sub = UpstreamState(*(np.broadcast_to(a, M1.shape)[retry] if isinstance(a, np.ndarray)
                              else a for a in up))
            tau = np.array(tau, copy=True)
            tau[retry], _ = _bracketed_deflection(M1[retry], target[retry], sub, mu1[retry],
                                                  strong)
        tau = np.where(invalid, np.nan, tau)
        j = shock_jump(tau, up, derivatives=False)
        out = _oblique_ratios(tau, j, up, mu1)
    return out._replace(deflection=np.where(np.isnan(tau), np.nan, theta))


def oblique_shock_from_deflection(M1, T1, theta, gas, strong=False):
    """Plain core: the weak (or strong) oblique shock that turns a stream (M1, T1) by θ [rad].

    Three Newton steps on tan θ(τ) from the perfect-gas solution at γ(T1); elements that
    do not converge onto the branch asked for (near detachment, or detached) are
    re-solved by the bracketed iteration of the module docs. NaN for θ < 0, θ beyond
    detachment or M1 < 1.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_oblique import oblique_shock_from_deflection
    >>> shock = oblique_shock_from_deflection(5.0, 300.0, 0.5, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(shock.wave_angle)), 4), round(float(shock.p2_p1), 4)
    (39.9462, 11.9818)
    """
    M1, T1, theta = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (M1, T1, theta)))
    return nx.chunked(lambda m, t, th: _deflection_block(m, t, th, gas, strong), M1, T1, theta)


def _angles(M1, tau, up, mu1):
    j = shock_jump(tau, up, derivatives=False)
    out = _oblique_ratios(tau, j, up, mu1)
    return out.deflection, out.wave_angle


def detachment_angles(M1, T1, gas):
    """Plain core: (θmax, β at θmax) [rad] for a stream (M1 >= 1, T1 [K]).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_oblique import detachment_angles
    >>> theta, beta = detachment_angles(5.0, 300.0, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(theta)), 4), round(float(np.degrees(beta)), 4)  # 41.1177 if perfect
    (43.169, 67.8524)
    """
    M1, T1 = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(T1, dtype=float))
    return nx.chunked(lambda m, t: _detachment_block(m, t, gas), M1, T1)


def _detachment_block(M1, T1, gas):
    M1, T1, up, mu1 = _stream(M1, T1, gas)
    with np.errstate(all="ignore"):
        tau_n = _normal_tau(M1, up)
        tau = _detachment_tau(up, mu1, tau_n, np.minimum(_detachment_start(M1, up), tau_n))
        return _angles(M1, np.where(M1 >= 1.0, tau, np.nan), up, mu1)


def sonic_angles(M1, T1, gas):
    """Plain core: (θ, β) [rad] where the flow behind the shock is exactly sonic.

    M2² = (ε² m + μ1 - m)/(γ2 t) = 1, by a bracketed Newton iteration in τ.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_oblique import sonic_angles
    >>> theta, beta = sonic_angles(5.0, 300.0, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(theta)), 4), round(float(np.degrees(beta)), 4)
    (43.1617, 67.4057)
    """
    M1, T1, up, mu1 = _stream(M1, T1, gas)

    def residual(tau):
        j = shock_jump(tau, up)
        g2 = j.c2 / (j.c2 - 1.0)
        N = j.eps * j.eps * j.m + mu1 - j.m
        dN = 2.0 * j.eps * j.deps * j.m + (j.eps * j.eps - 1.0) * j.dm
        gt = g2 * j.t
        dgt = -j.dc2 / ((j.c2 - 1.0) ** 2) * j.t + g2
        return N / gt - 1.0, dN / gt - N * dgt / (gt * gt)

    with np.errstate(all="ignore"):
        g1 = up.c1 / (up.c1 - 1.0)
        _, beta = _perfect_gas_sonic(M1, g1)
        ms = M1 * np.sin(beta)
        w = (ms - 1.0) * (ms + 1.0)
        tau_n = _normal_tau(M1, up)
        start = np.minimum(normal_jump(w, up, newton_steps=0), tau_n)
        tau = _bracketed_tau(residual, start, np.zeros_like(tau_n), tau_n, False)
        return _angles(M1, np.where(M1 > 1.0, tau, np.nan), up, mu1)


# ------------------------------------------------------------------ one simple wave


def turn_state(M1, T1, turn, gas, strong=False):
    """Plain core: state behind the wave that turns a stream (M1, T1 [K]) by ``turn`` [rad].

    The thermally perfect counterpart of :func:`gasdyn2d.relations.simple_waves.turn_state`:
    an oblique shock for turn > 0 (``strong`` picks the branch), a centred fan of
    deflection -turn for turn <= 0. ``dlnp_dturn`` is d ln(p2/p1)/d(turn):
    (d ln p/dτ)/(dθ/dτ) along the shock polar, γ2 M2²/√(M2² - 1) through the fan
    (d ln p = -γM²/√(M² - 1) dν holds for any gas, with the local γ). Each branch is
    computed on its own subset of the cases.

    Returns
    -------
    WaveState
        M2, p2/p1, T2/T1, p02/p01, wave angle (NaN for a fan), is_shock, d ln p/d turn,
        and the ``detached``/``vacuum`` flags; NaN fields where the wave does not exist.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_oblique import turn_state
    >>> state = turn_state(2.0, 1500.0, np.radians([10.0, -10.0]), AIR_THERMALLY_PERFECT)
    >>> np.round(state.p2_p1, 5)  # [1.70658, 0.54797] for the perfect gas
    array([1.65141, 0.57103])
    """
    M1, T1, turn = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (M1, T1, turn)))
    shape = M1.shape
    nan = np.full(shape, np.nan)
    M2, p, T, p0, beta, slope = (nan.copy() for _ in range(6))
    with np.errstate(all="ignore"):
        is_shock = turn > 0.0
        detached = np.zeros(shape, dtype=bool)
        if nx.any_true(is_shock):
            m, t, th = M1[is_shock], T1[is_shock], turn[is_shock]
            shock = oblique_shock_from_deflection(m, t, th, gas, strong)
            up = upstream_state(t, gas)
            mu1 = up.c1 / (up.c1 - 1.0) * m * m
            tau = shock.T2_T1 - 1.0
            f, df, j = _polar(tau, up, mu1)
            dlnp = 1.0 / j.t - j.deps / j.eps
            dtheta = np.abs(df) / (1.0 + f * f) * (-1.0 if strong else 1.0)
            M2[is_shock], p[is_shock], T[is_shock] = shock.M2, shock.p2_p1, shock.T2_T1
            p0[is_shock], beta[is_shock] = shock.p02_p01, shock.wave_angle
            slope[is_shock] = dlnp / dtheta
            detached[is_shock] = np.isnan(shock.wave_angle) & (m >= 1.0) & np.isfinite(t)
        is_fan = ~is_shock & ~np.isnan(turn)
        if nx.any_true(is_fan):
            m, t = M1[is_fan], T1[is_fan]
            fan = fan_from_turn(m, t, -turn[is_fan], gas)
            M2[is_fan] = np.where(turn[is_fan] == 0.0, m, np.maximum(fan.M2, m))
            p[is_fan], T[is_fan] = fan.p2_p1, fan.T2_T1
            p0[is_fan] = np.where(np.isnan(fan.M2), np.nan, 1.0)
            mf = M2[is_fan]
            slope[is_fan] = np.where(mf == 1.0, np.inf,
                                     fan.gamma2 * mf * mf / np.sqrt((mf - 1.0) * (mf + 1.0)))
        vacuum = is_fan & np.isnan(M2) & np.isfinite(M1) & np.isfinite(T1) & (M1 >= 1.0)
    return WaveState(M2, p, T, p0, beta, is_shock, slope, detached, vacuum)
