"""Thermally perfect gas (vibrational excitation): the shock jump and normal shocks.

Plain core only (floats and ndarrays, SI units, radians, no pint); invalid elements
come out as NaN. The gas is a :class:`~gasdyn2d.relations.gas.Gas` with a
``vibrational_temperature``; the upstream static temperature T1 [K] fixes the state.
Isentropic flow and fans are in :mod:`gasdyn2d.relations.thermally_perfect`, oblique
shocks and the simple-wave primitive in :mod:`gasdyn2d.relations.thermally_perfect_oblique`.

- :func:`normal_shock_ratios` (M1, T1) → M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, γ2;
  :func:`pitot_ratio`; the inverses :func:`mach_from_temperature_jump` (closed form),
  :func:`mach_from_pressure_jump`, :func:`mach_from_density_jump`,
  :func:`mach_from_downstream_mach`, :func:`mach_from_stagnation_pressure_ratio`,
  :func:`mach_from_pitot_ratio`;
- the jump in its state variable τ, the building blocks of both shock modules:
  :func:`upstream_state`, :func:`mean_heat_capacity`, :func:`shock_jump`,
  :func:`perfect_gas_jump`, :func:`normal_jump`, :func:`entropy_rise`,
  :func:`upstream_mach`.

State variable: τ = T2/T1 - 1
-----------------------------
Mass and momentum do not involve the gas model; the energy equation does only through
h(T2) - h(T1) = c̄ R (T2 - T1), where c̄ is the mean of cp/R between T1 and T2 — a
closed-form divided difference of the enthalpy, free of cancellation as T2 → T1.
For a given τ the three laws are then those of a perfect gas with cp = c̄R, so every
quantity is a closed form of τ:

    ε = ρ1/ρ2 = 2t/(B + S),  1 - ε = 4(c̄ - 1)τ/(2 + B + S),
    B = (2c̄ - 1)τ,  S = √(B² + 4t),  t = 1 + τ,
    u1²/(R T1) = c̄ (2 + B + S)/(2 (c̄ - 1)(1 + ε))

(the quadratic ε² + Bε - t = 0 of mass, momentum and energy, in forms without a
difference of nearly equal terms). τ is to the shock what w = M1² - 1 is to the
perfect-gas shock: every jump is proportional to it, weak shocks keep their
digits, and the inverse from T2/T1 is closed form. From M1 the solution
satisfies τ = P(c̄(τ)) - 1, P the perfect-gas T2/T1 at cp = c̄R and the same u1²/(RT1);
two such fixed-point steps from the perfect gas at γ(T1) (which contract by 0.06
or better) and two Newton steps on τ - P(c̄(τ)) + 1 reach rounding (measured:
<= 2e-15 in T2/T1 for 1.01 <= M1 <= 20, 200 <= T1 <= 3000 K). The other inputs
are found by bracketed Newton iterations in τ on closed-form residuals.

Model limits: see :mod:`gasdyn2d.relations.gas` (no dissociation, vibrational
equilibrium behind the shock assumed; a real shock relaxes to this state over a
distance). Results are for preliminary design.

References
----------
Ames Research Staff (1953), *Equations, Tables, and Charts for Compressible
Flow*, NACA Report 1135, normal-shock eqs. 93-100 (structure of the jump
conditions) and imperfect-gas section (from memory).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from .gas import oscillator_terms
from .normal_shock_inverses import mach_from_downstream_mach as _perfect_gas_from_downstream_mach
from .normal_shock_inverses import mach_from_pitot_ratio as _perfect_gas_from_pitot_ratio
from .normal_shock_inverses import mach_from_stagnation_pressure_ratio as _perfect_gas_from_recovery
from .thermally_perfect import gas_constants, kelvin, stagnation_temperature

__all__ = [
    "NormalShockRatios",
    "normal_shock_ratios",
    "pitot_ratio",
    "mach_from_temperature_jump",
    "mach_from_pressure_jump",
    "mach_from_density_jump",
    "mach_from_downstream_mach",
    "mach_from_stagnation_pressure_ratio",
    "mach_from_pitot_ratio",
    "UpstreamState",
    "upstream_state",
    "mean_heat_capacity",
    "ShockJump",
    "shock_jump",
    "perfect_gas_jump",
    "normal_jump",
    "entropy_rise",
    "upstream_mach",
    "jump_strength",
    "log_stagnation_over_static",
    "normal_shock_and_pitot",
]

_FIXED_STEPS = 2  # fixed-point steps τ ← P(c̄(τ)) - 1 before Newton (contraction <= 0.06)
_NEWTON_STEPS = 2  # then Newton: <= 2e-15 in T2/T1 (measured, module docs)
_TINY_TAU = 1e-6  # below this τ, d c̄/dτ (a cancelling divided difference) is left out
_TAU_MAX = 1e9  # upper bracket of τ where no closer bound exists (T2 up to 10^9 T1)


# ------------------------------------------------------------------ the jump in τ


class UpstreamState(NamedTuple):
    """Plain-core result of :func:`upstream_state`: the gas terms at T1, computed once."""

    x1: np.ndarray  #: θv/T1
    E1: np.ndarray  #: e^(-x1)
    om1: np.ndarray  #: 1 - E1
    c1: np.ndarray  #: cp(T1)/R
    sv1: np.ndarray  #: vibrational entropy at T1, per R
    x1_om1: np.ndarray  #: x1/(1 - E1)
    cf: float  #: frozen cp/R
    theta: float  #: θv [K]
    gas: object  #: the Gas


def upstream_state(T1, gas):
    """Plain core: the oscillator terms at the upstream temperature T1 [K] (NaN where
    T1 is not positive and finite), shared by every evaluation of the jump.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import upstream_state
    >>> round(float(upstream_state(300.0, AIR_THERMALLY_PERFECT).c1), 6)  # cp/R at 300 K
    3.503913
    """
    cf, theta = gas_constants(gas)
    x1, E1, om1 = oscillator_terms(kelvin(T1), theta)
    with np.errstate(all="ignore"):
        c1 = cf + x1 * x1 * E1 / (om1 * om1)
        sv1 = x1 * E1 / om1 - np.log(om1)
        x1_om1 = x1 / om1
    return UpstreamState(x1, E1, om1, c1, sv1, x1_om1, cf, theta, gas)


def mean_heat_capacity(tau, upstream):
    """Plain core: (c̄, x2, E2, 1 - E2) for T2 = T1 (1 + τ), c̄ the mean of cp/R over [T1, T2].

    c̄ = c_f + x1 x2 (E2 - E1)/(Δx (1 - E1)(1 - E2)) with E2 - E1 = E2 (1 - e^(-Δx)),
    Δx = x1 - x2 > 0: nothing cancels as τ → 0 (c̄ → cp(T1)/R) and nothing overflows at
    low temperature (where E1, E2 underflow to their limit 0).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import (mean_heat_capacity,
    ...                                                          upstream_state)
    >>> up = upstream_state(300.0, AIR_THERMALLY_PERFECT)
    >>> round(float(mean_heat_capacity(0.0, up)[0]), 6), round(float(mean_heat_capacity(4.0, up)[0]), 6)
    (3.503913, 3.881773)
    """
    up = upstream
    x2 = up.x1 / (1.0 + tau)
    dx = np.maximum(up.x1 - x2, 1e-300)
    minus_x2 = -x2
    E2 = np.exp(minus_x2)
    om2 = -np.expm1(minus_x2)
    cbar = up.cf + up.x1_om1 * x2 * E2 * np.expm1(-dx) / (-dx * om2)
    return cbar, x2, E2, om2


class ShockJump(NamedTuple):
    """Plain-core result of :func:`shock_jump` (ndarrays); the ``d*`` fields are
    τ-derivatives (None unless asked for)."""

    t: np.ndarray  #: T2/T1
    cbar: np.ndarray  #: mean cp/R over [T1, T2]
    c2: np.ndarray  #: cp(T2)/R
    eps: np.ndarray  #: ε = ρ1/ρ2
    delta: np.ndarray  #: 1 - ε
    m: np.ndarray  #: u_n1²/(R T1), the upstream normal velocity
    x2: np.ndarray  #: θv/T2
    E2: np.ndarray  #: e^(-x2)
    om2: np.ndarray  #: 1 - E2
    BS: np.ndarray  #: B + S (module docs)
    deps: object = None  #: dε/dτ
    dm: object = None  #: dm/dτ
    dc2: object = None  #: dc2/dτ


def shock_jump(tau, upstream, derivatives=True):
    """Plain core: everything across a shock of temperature ratio T2/T1 = 1 + τ, in closed form.

    Parameters
    ----------
    tau : float or ndarray
        T2/T1 - 1 [-], >= 0.
    upstream : UpstreamState
        From :func:`upstream_state`.
    derivatives : bool, optional
        Also dε/dτ, dm/dτ and dc2/dτ (for Newton iterations).

    Returns
    -------
    ShockJump

    Notes
    -----
    ε and 1 - ε from the quadratic ε² + Bε - t = 0 of mass, momentum and energy at the
    mean heat capacity c̄ (module docs); m = c̄(2 + B + S)/(2(c̄ - 1)(1 + ε)).
    dc̄/dτ = (c2 - c̄)/τ (the derivative of a mean over [T1, T2]) is left out below
    τ = 1e-6, where it cancels; it only slows Newton there, never moves the root.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import shock_jump, upstream_state
    >>> jump = shock_jump(16.216280783120464, upstream_state(250.0, AIR_THERMALLY_PERFECT))
    >>> round(float(1.0 / jump.eps), 5)  # ρ2/ρ1 of the M1 = 10 shock (SOURCES.md: 7.03312)
    7.03312
    """
    cbar, x2, E2, om2 = mean_heat_capacity(tau, upstream)
    cf = upstream.cf
    t = 1.0 + tau
    cm = cbar - 1.0
    tc = cbar + cm
    B = tc * tau
    S = np.sqrt(B * B + 4.0 * t)
    BS = B + S
    q = 2.0 + BS
    eps = 2.0 * t / BS
    one_eps = 1.0 + eps
    m = cbar * q / (2.0 * cm * one_eps)
    c2 = cf + x2 * x2 * E2 / (om2 * om2)
    jump = ShockJump(t, cbar, c2, eps, 4.0 * cm * tau / q, m, x2, E2, om2, BS)
    if not derivatives:
        return jump
    # B' = 2(c2 - c̄) + 2c̄ - 1, since τ dc̄/dτ = c2 - c̄
    diff = c2 - cbar
    dcbar = diff / np.maximum(tau, _TINY_TAU)
    dB = 2.0 * diff + tc
    dBS = dB + (B * dB + 2.0) / S
    deps = (2.0 - eps * dBS) / BS  # from ε (B + S) = 2t
    dm = m * (-dcbar / (cbar * cm) + dBS / q - deps / one_eps)
    dc2 = -(c2 - cf) * (2.0 - x2 * (1.0 + E2) / om2) / t  # T1 dc/dT at T2
    return jump._replace(deps=deps, dm=dm, dc2=dc2)


def perfect_gas_jump(cbar, w, upstream):
    """Plain core: τ = T2/T1 - 1 of the perfect gas with cp = c̄R and the same u1²/(R T1).

    With μ = u1²/(R T1) = γ1(1 + w), w = Mn1² - 1:
    τ = 2(μ + 1)[c1 w (c̄ - 1) + c̄ - c1]/((c1 - 1)(2c̄ - 1)² μ), which keeps its digits
    as w → 0 (c̄ - c1 = O(τ)). At c̄ = c̄(τ) itself this is the thermally perfect shock.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import perfect_gas_jump, upstream_state
    >>> up = upstream_state(250.0, AIR_THERMALLY_PERFECT)
    >>> round(float(perfect_gas_jump(up.c1, 99.0, up)) + 1.0, 3)  # T2/T1 at M1 = 10, γ(T1)
    20.382
    """
    c1 = upstream.c1
    mu = c1 / (c1 - 1.0) * (1.0 + w)
    tc = 2.0 * cbar - 1.0
    return 2.0 * (mu + 1.0) * (c1 * w * (cbar - 1.0) + cbar - c1) / ((c1 - 1.0) * tc * tc * mu)


def normal_jump(w, upstream, fixed_steps=_FIXED_STEPS, newton_steps=_NEWTON_STEPS):
    """Plain core: τ = T2/T1 - 1 of the normal shock with upstream Mach number √(1 + w), w >= 0.

    From the perfect gas at γ(T1), ``fixed_steps`` steps τ ← :func:`perfect_gas_jump`(c̄(τ))
    and ``newton_steps`` Newton steps on G(τ) = perfect_gas_jump(c̄(τ)) - τ, whose slope
    G' = (dτ/dc̄)(dc̄/dτ) - 1 < -1 never vanishes. In the form used, τ = k N/(2c̄ - 1)²,
    N = (a + 1)c̄ - (a + c1), a = c1 w, k = 2(μ + 1)/((c1 - 1)μ), and
    dτ/dc̄ = k(a + 1)/(2c̄ - 1)² - 4τ/(2c̄ - 1). The defaults reach rounding (module docs);
    fewer steps give a start for other solvers.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import normal_jump, upstream_state
    >>> round(float(normal_jump(99.0, upstream_state(250.0, AIR_THERMALLY_PERFECT))) + 1.0, 4)
    17.2163
    """
    c1 = upstream.c1
    mu = c1 / (c1 - 1.0) * (1.0 + w)  # γ1 M1²
    k = 2.0 * (mu + 1.0) / ((c1 - 1.0) * mu)
    a = c1 * w
    a1, a0 = a + 1.0, a + c1
    ka1 = k * a1
    with np.errstate(all="ignore"):
        tc = 2.0 * c1 - 1.0
        tau = k * a * (c1 - 1.0) / (tc * tc)  # the perfect gas at γ(T1)
        for _ in range(fixed_steps):
            cbar = mean_heat_capacity(tau, upstream)[0]
            tc = 2.0 * cbar - 1.0
            tau = k * (a1 * cbar - a0) / (tc * tc)
        for _ in range(newton_steps):
            cbar, x2, E2, om2 = mean_heat_capacity(tau, upstream)
            c2 = upstream.cf + x2 * x2 * E2 / (om2 * om2)
            inv_tc = 1.0 / (2.0 * cbar - 1.0)
            target = k * (a1 * cbar - a0) * inv_tc * inv_tc
            dtau_dc = (ka1 * inv_tc - 4.0 * target) * inv_tc
            slope = dtau_dc * (c2 - cbar) / np.maximum(tau, _TINY_TAU) - 1.0
            tau = tau - (target - tau) / slope
    return np.maximum(tau, 0.0)


def entropy_rise(jump, tau, upstream):
    """Plain core: (s2 - s1)/R [-] across the jump: (φ(T2) - φ(T1))/R - ln(p2/p1)
    = (c_f - 1) ln(1 + τ) + ln ε + s_v(T2) - s_v(T1).

    For weak shocks it is O(τ³) and a difference of O(τ) terms: its absolute error is a
    few ulp, so p02/p01 = exp(-rise) is exact to rounding but 1 - p02/p01 is not.
    """
    sv2 = jump.x2 * jump.E2 / jump.om2 - np.log(jump.om2)
    return (upstream.cf - 1.0) * np.log1p(tau) + np.log(jump.eps) + sv2 - upstream.sv1


def upstream_mach(jump, upstream):
    """Plain core: the upstream (normal) Mach number of a jump, √(m/γ1)."""
    return np.sqrt(jump.m * (upstream.c1 - 1.0) / upstream.c1)


# ------------------------------------------------------------------ normal shock


class NormalShockRatios(NamedTuple):
    """Plain-core result of :func:`normal_shock_ratios` (ndarrays, dimensionless)."""

    M2: np.ndarray  #: downstream Mach number
    p2_p1: np.ndarray  #: static pressure ratio
    rho2_rho1: np.ndarray  #: density ratio
    T2_T1: np.ndarray  #: static temperature ratio
    p02_p01: np.ndarray  #: stagnation pressure ratio, exp(-(s2 - s1)/R)
    gamma2: np.ndarray  #: ratio of specific heats behind the shock
    strength: np.ndarray  #: (p2 - p1)/p1 = (τ + 1 - ε)/ε, without cancellation
    gamma1: np.ndarray  #: ratio of specific heats ahead of the shock


def jump_strength(tau, jump):
    """Plain core: the shock strength (p2 - p1)/p1 [-] of a jump, without cancellation.

    p2/p1 = t/ε with t = 1 + τ, so p2/p1 - 1 = (τ + (1 - ε))/ε: a sum of the two
    small quantities that the jump carries to full precision.
    """
    return (tau + jump.delta) / jump.eps


def _normal_block(M1, T1, gas):
    up = upstream_state(T1, gas)
    with np.errstate(all="ignore"):
        w = np.maximum((M1 - 1.0) * (M1 + 1.0), 0.0)
        tau = normal_jump(w, up)
        j = shock_jump(tau, up, derivatives=False)
        gamma2 = j.c2 / (j.c2 - 1.0)
        gamma1 = up.c1 / (up.c1 - 1.0)
        mu = gamma1 * (1.0 + w)
        M2 = j.eps * np.sqrt(mu / (gamma2 * j.t))
        invalid = ~(M1 >= 1.0)
        out = NormalShockRatios(M2, j.t / j.eps, j.BS / (2.0 * j.t), j.t,
                                np.exp(-entropy_rise(j, tau, up)), gamma2,
                                jump_strength(tau, j), np.broadcast_to(gamma1, M2.shape))
    if nx.any_true(invalid):
        out = NormalShockRatios(*(np.where(invalid, np.nan, v) for v in out))
    return out


def _normal_block_with_pitot(M1, T1, gas):
    ratios = _normal_block(M1, T1, gas)
    with np.errstate(all="ignore"):
        pitot = ratios.p02_p01 * np.exp(log_stagnation_over_static(M1, T1,
                                                                  upstream_state(T1, gas)))
    return (*ratios, pitot)


def normal_shock_and_pitot(M1, T1, gas):
    """Plain core: (:class:`NormalShockRatios`, pitot ratio p02/p1) in one pass over cache-sized
    blocks (what :func:`~gasdyn2d.normal_shock` needs; cheaper than the two calls apart).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import normal_shock_and_pitot
    >>> shock, pitot = normal_shock_and_pitot(3.0, 300.0, AIR_THERMALLY_PERFECT)
    >>> round(float(pitot), 5)
    12.10044
    """
    M1, T1 = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(T1, dtype=float))
    *fields, pitot = nx.chunked(lambda m, t: _normal_block_with_pitot(m, t, gas), M1, T1)
    return NormalShockRatios(*fields), pitot


def normal_shock_ratios(M1, T1, gas):
    """Plain core: ratios across a normal shock in a thermally perfect gas.

    Parameters
    ----------
    M1 : float or ndarray
        Upstream Mach number [-], >= 1 (NaN results below).
    T1 : float or ndarray
        Upstream static temperature [K], > 0.
    gas : Gas
        A thermally perfect gas.

    Returns
    -------
    NormalShockRatios
        M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, γ behind the shock, the strength
        (p2 - p1)/p1 and γ ahead of it.

    Notes
    -----
    Mass, momentum and energy with the same h(T), solved for τ = T2/T1 - 1 (module
    docs): <= 2e-15 relative in T2/T1 against mpmath, the other ratios to a few ulp
    more (tests/test_thermally_perfect.py).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import normal_shock_ratios
    >>> shock = normal_shock_ratios(10.0, 250.0, AIR_THERMALLY_PERFECT)
    >>> round(float(shock.T2_T1), 4), round(float(shock.p2_p1), 3)  # 20.3875, 116.5 if perfect
    (17.2163, 121.084)
    """
    M1, T1 = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(T1, dtype=float))
    return nx.chunked(lambda m, t: _normal_block(m, t, gas), M1, T1)


def log_stagnation_over_static(M1, T1, up):
    """Plain core: ln(p01/p1) = (φ(T01) - φ(T1))/R [-] of a stream (M1, T1 [K]) whose gas
    terms at T1 are ``up`` (:func:`upstream_state`); T01 from the energy equation."""
    T0 = stagnation_temperature(M1, T1, up.gas)
    x0, E0, om0 = oscillator_terms(T0, up.theta)
    return up.cf * np.log(T0 / T1) + x0 * E0 / om0 - np.log(om0) - up.sv1


def pitot_ratio(M1, T1, gas):
    """Plain core: p02/p1, the stagnation pressure behind a normal shock over the static ahead.

    p02/p1 = (p01/p1)(p02/p01), p01/p1 = exp((φ(T0) - φ(T1))/R) with T0 from the energy
    equation (the total enthalpy is the same on both sides).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import pitot_ratio
    >>> round(float(pitot_ratio(3.0, 300.0, AIR_THERMALLY_PERFECT)), 5)  # 12.06096 if perfect
    12.10044
    """
    M1, T1 = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(T1, dtype=float))
    up = upstream_state(T1, gas)
    shock = normal_shock_ratios(M1, T1, gas)
    with np.errstate(all="ignore"):
        return shock.p02_p01 * np.exp(log_stagnation_over_static(M1, T1, up))


# ------------------------------------------------------------------ normal-shock inverses


def _bracketed_tau(residual, start, lo, hi, increasing):
    with np.errstate(all="ignore"):
        lo, hi = np.broadcast_arrays(lo, hi)
        return nx.safeguarded_newton(residual, np.clip(start, lo, hi), lo, hi,
                                     increasing=increasing)


def _inverse(value, T1, gas, residual_of, start_of, bounds_of, increasing, valid_of):
    """M1 from one downstream quantity: τ by a bracketed Newton iteration, then M1(τ)."""
    value, T1 = np.broadcast_arrays(np.asarray(value, dtype=float), np.asarray(T1, dtype=float))
    up = upstream_state(T1, gas)
    with np.errstate(all="ignore"):
        valid = valid_of(value, up)
        lo, hi = bounds_of(value, up)
        tau = _bracketed_tau(lambda x: residual_of(x, value, up), start_of(value, up), lo, hi,
                             increasing)
        M1 = upstream_mach(shock_jump(tau, up, derivatives=False), up)
    return np.where(valid, M1, np.nan)


def mach_from_temperature_jump(T2_T1, T1, gas):
    """Plain core: M1 from T2/T1 >= 1, in closed form (τ fixes c̄, hence ε and u1²).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import mach_from_temperature_jump
    >>> round(float(mach_from_temperature_jump(17.216280783120464, 250.0,
    ...                                        AIR_THERMALLY_PERFECT)), 12)
    10.0
    """
    r, T1 = np.broadcast_arrays(np.asarray(T2_T1, dtype=float), np.asarray(T1, dtype=float))
    up = upstream_state(T1, gas)
    with np.errstate(all="ignore"):
        M1 = upstream_mach(shock_jump(r - 1.0, up, derivatives=False), up)
    return np.where((r >= 1.0) & (r < np.inf), M1, np.nan)


def mach_from_pressure_jump(p2_p1, T1, gas):
    """Plain core: M1 from p2/p1 >= 1.

    With P = p2/p1: τ = (P² - 1)/((2c̄ - 1)P + 1), c̄ = c̄(τ); c1 <= c̄ <= c_f + 1 brackets τ.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import mach_from_pressure_jump
    >>> round(float(mach_from_pressure_jump(121.08408662438184, 250.0,
    ...                                     AIR_THERMALLY_PERFECT)), 12)
    10.0
    """
    def tau_at(cbar, P):
        return (P - 1.0) * (P + 1.0) / ((2.0 * cbar - 1.0) * P + 1.0)

    def residual(tau, P, up):
        j = shock_jump(tau, up)
        dcbar = (j.c2 - j.cbar) / np.maximum(tau, _TINY_TAU)
        den = (2.0 * j.cbar - 1.0) * P + 1.0
        return tau_at(j.cbar, P) - tau, -tau_at(j.cbar, P) * 2.0 * P * dcbar / den - 1.0

    return _inverse(p2_p1, T1, gas, residual, lambda P, up: tau_at(up.c1, P),
                    lambda P, up: (tau_at(up.cf + 1.0, P), tau_at(up.c1, P)), False,
                    lambda P, up: (P >= 1.0) & (P < np.inf))


def mach_from_density_jump(rho2_rho1, T1, gas):
    """Plain core: M1 from ρ2/ρ1 in [1, 2c_f + 1) (8 for air: the fully excited limit).

    With r = ρ2/ρ1 the root of H(τ) = r² - 1 - τ r (2c̄(τ) - 1 - r), unique since the
    product grows with τ wherever it is positive; c1 <= c̄ <= c_f + 1 brackets τ.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import mach_from_density_jump
    >>> round(float(mach_from_density_jump(7.033115232594113, 250.0,
    ...                                    AIR_THERMALLY_PERFECT)), 11)
    10.0
    """
    def tau_at(cbar, r):
        return (r - 1.0) * (r + 1.0) / (r * (2.0 * cbar - 1.0 - r))

    def residual(tau, r, up):
        j = shock_jump(tau, up)
        dcbar = (j.c2 - j.cbar) / np.maximum(tau, _TINY_TAU)
        gap = 2.0 * j.cbar - 1.0 - r
        return (r - 1.0) * (r + 1.0) - tau * r * gap, -r * gap - 2.0 * tau * r * dcbar

    def bounds(r, up):
        hi = tau_at(up.c1, r)
        return tau_at(up.cf + 1.0, r), np.where((hi > 0.0) & (hi < _TAU_MAX), hi, _TAU_MAX)

    return _inverse(rho2_rho1, T1, gas, residual, lambda r, up: bounds(r, up)[0], bounds, False,
                    lambda r, up: (r >= 1.0) & (r < 2.0 * up.cf + 1.0))


def _downstream_mach_squared(j, up):
    """(M2², dM2²/dτ) behind a normal shock at τ: M2² = ε² m/(γ2 t)."""
    g2 = j.c2 / (j.c2 - 1.0)
    value = j.eps * j.eps * j.m / (g2 * j.t)
    dlog = 2.0 * j.deps / j.eps + j.dm / j.m + j.dc2 / (j.c2 * (j.c2 - 1.0)) - 1.0 / j.t
    return value, value * dlog


def mach_from_downstream_mach(M2, T1, gas):
    """Plain core: M1 from the downstream Mach number M2 in (M2_∞, 1].

    M2_∞ = √((γ_∞ - 1)/(2γ_∞)) with γ_∞ = (c_f + 1)/c_f, the fully excited strong-shock
    limit (0.3333 for air); M2 falls monotonically towards it as M1 grows.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import mach_from_downstream_mach
    >>> round(float(mach_from_downstream_mach(0.35709638489667866, 250.0,
    ...                                       AIR_THERMALLY_PERFECT)), 9)
    10.0
    """

    def residual(tau, target, up):
        value, slope = _downstream_mach_squared(shock_jump(tau, up), up)
        return value - target * target, slope

    def start(target, up):
        g1 = up.c1 / (up.c1 - 1.0)
        low = np.sqrt((g1 - 1.0) / (2.0 * g1)) * 1.001
        M1 = _perfect_gas_from_downstream_mach(np.maximum(target, low), g1)
        w = (M1 - 1.0) * (M1 + 1.0)
        return normal_jump(w, up, newton_steps=0)

    def valid(target, up):
        g_inf = (up.cf + 1.0) / up.cf
        return (target <= 1.0) & (target > np.sqrt((g_inf - 1.0) / (2.0 * g_inf)))

    M1 = _inverse(M2, T1, gas, residual, start, lambda v, up: (0.0 * v, _TAU_MAX + 0.0 * v),
                  False, valid)
    return np.where(np.asarray(M2) == 1.0, 1.0, M1)


def mach_from_stagnation_pressure_ratio(p02_p01, T1, gas):
    """Plain core: M1 from p02/p01 in (0, 1]: Newton in ln τ on ln((s2 - s1)/R).

    Near p02/p01 = 1 the entropy rise is O(τ³), so the inverse is cube-root sensitive
    (as for a perfect gas); below 1 - 1e-12 the entropy rise is lost in rounding.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import (
    ...     mach_from_stagnation_pressure_ratio)
    >>> round(float(mach_from_stagnation_pressure_ratio(0.0014629970560434062, 250.0,
    ...                                                 AIR_THERMALLY_PERFECT)), 10)
    10.0
    """

    def residual(log_tau, target, up):
        tau = np.exp(log_tau)
        j = shock_jump(tau, up)
        rise = entropy_rise(j, tau, up)
        slope = tau * ((j.c2 - 1.0) / j.t + j.deps / j.eps) / rise
        return np.log(rise) - np.log(target), slope

    def start(target, up):
        g1 = up.c1 / (up.c1 - 1.0)
        M1 = _perfect_gas_from_recovery(np.exp(-target), g1)
        w = (M1 - 1.0) * (M1 + 1.0)
        return np.log(normal_jump(w, up, newton_steps=0))

    value, T1 = np.broadcast_arrays(np.asarray(p02_p01, dtype=float), np.asarray(T1, dtype=float))
    with np.errstate(divide="ignore", invalid="ignore"):
        rise = -np.log(value)
    up = upstream_state(T1, gas)
    with np.errstate(all="ignore"):
        log_tau = _bracketed_tau(lambda x: residual(x, rise, up), start(rise, up),
                                 np.full(rise.shape, -40.0), np.full(rise.shape, 20.0), True)
        M1 = upstream_mach(shock_jump(np.exp(log_tau), up, derivatives=False), up)
    M1 = np.where(value == 1.0, 1.0, M1)
    return np.where((value > 0.0) & (value <= 1.0), M1, np.nan)


def mach_from_pitot_ratio(p02_p1, T1, gas):
    """Plain core: M1 from the pitot ratio p02/p1 (at least its value at M1 = 1).

    ln(p02/p1) = -(s2 - s1)/R + (φ(T0) - φ(T1))/R rises monotonically with τ; its slope
    is -d(s2 - s1)/dτ/R + T1 m'(τ)/(2 T0).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import mach_from_pitot_ratio
    >>> round(float(mach_from_pitot_ratio(12.100442600413047, 300.0, AIR_THERMALLY_PERFECT)), 10)
    3.0
    """

    def residual(tau, target, up):
        j = shock_jump(tau, up)
        M1 = upstream_mach(j, up)
        T0 = stagnation_temperature(M1, T1, up.gas)
        value = log_stagnation_over_static(M1, T1, up) - entropy_rise(j, tau, up)
        slope = -((j.c2 - 1.0) / j.t + j.deps / j.eps) + T1 * j.dm / (2.0 * T0)
        return value - target, slope

    def start(target, up):
        g1 = up.c1 / (up.c1 - 1.0)
        M1 = _perfect_gas_from_pitot_ratio(np.exp(target), g1)
        w = (M1 - 1.0) * (M1 + 1.0)
        return normal_jump(w, up, newton_steps=0)

    value, T1 = np.broadcast_arrays(np.asarray(p02_p1, dtype=float), np.asarray(T1, dtype=float))
    up = upstream_state(T1, gas)
    with np.errstate(all="ignore"):
        target = np.log(value)
        low = log_stagnation_over_static(np.ones_like(T1), T1, up)  # M1 = 1: p0/p
        tau = _bracketed_tau(lambda x: residual(x, target, up), start(target, up),
                             np.zeros_like(target), np.full(target.shape, _TAU_MAX), True)
        M1 = upstream_mach(shock_jump(tau, up, derivatives=False), up)
    M1 = np.where(target == low, 1.0, M1)
    return np.where((target >= low) & (value < np.inf), M1, np.nan)
