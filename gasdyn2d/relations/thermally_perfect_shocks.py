"""Thermally perfect gas (vibrational excitation): normal and oblique shocks (plain core).

Plain core only (floats and ndarrays, SI units, radians, no pint); invalid elements
come out as NaN. The gas is a :class:`~gasdyn2d.relations.gas.Gas` with a
``vibrational_temperature``; the upstream static temperature T1 [K] fixes the state.
Isentropic flow and fans are in :mod:`gasdyn2d.relations.thermally_perfect`.

- :func:`normal_shock_ratios` (M1, T1) → M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, γ2;
  :func:`pitot_ratio`; the inverses :func:`mach_from_temperature_jump` (closed form),
  :func:`mach_from_pressure_jump`, :func:`mach_from_density_jump`,
  :func:`mach_from_downstream_mach`, :func:`mach_from_stagnation_pressure_ratio`,
  :func:`mach_from_pitot_ratio`;
- :func:`oblique_shock_from_wave_angle`, :func:`oblique_shock_from_deflection` (weak
  and strong branches), :func:`detachment_angles`, :func:`sonic_angles`;
- :func:`turn_state`: the simple-wave primitive (shock for a positive turn, centred
  fan for a negative one) of :mod:`gasdyn2d.relations.simple_waves` for this gas.

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

The oblique shock's deflection is a closed form of τ too (the normal component at
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

from .. import _numerics as nx
from .gas import oscillator_terms
from .oblique_shocks import detachment_angles as _perfect_gas_detachment
from .oblique_shocks import sonic_angles as _perfect_gas_sonic
from .oblique_shocks import wv_from_deflection as _perfect_gas_wv
from .simple_waves import WaveState
from .thermally_perfect import fan_from_turn, gas_constants, kelvin, stagnation_temperature

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
    "ObliqueShockRatios",
    "oblique_shock_from_wave_angle",
    "oblique_shock_from_deflection",
    "detachment_angles",
    "sonic_angles",
    "turn_state",
]

_FIXED_STEPS = 2  # fixed-point steps τ ← P(c̄(τ)) - 1 before Newton (contraction <= 0.06)
_NEWTON_STEPS = 2  # then Newton: <= 2e-15 in T2/T1 (measured, module docs)
_OBLIQUE_STEPS = 3  # Newton steps on tan θ(τ) from the perfect gas at γ(T1)
_TINY_TAU = 1e-6  # below this τ, d c̄/dτ (a cancelling divided difference) is left out
_TAU_MAX = 1e9  # upper bracket of τ where no closer bound exists (T2 up to 10^9 T1)


# ------------------------------------------------------------------ the jump in τ


class _Upstream(NamedTuple):
    x1: np.ndarray
    E1: np.ndarray
    om1: np.ndarray
    c1: np.ndarray
    sv1: np.ndarray
    x1_om1: np.ndarray  #: x1/(1 - E1)
    cf: float
    theta: float
    gas: object


def _upstream(T1, gas):
    cf, theta = gas_constants(gas)
    x1, E1, om1 = oscillator_terms(kelvin(T1), theta)
    with np.errstate(all="ignore"):
        c1 = cf + x1 * x1 * E1 / (om1 * om1)
        sv1 = x1 * E1 / om1 - np.log(om1)
        x1_om1 = x1 / om1
    return _Upstream(x1, E1, om1, c1, sv1, x1_om1, cf, theta, gas)


def _mean_heat_capacity(tau, up):
    """(c̄, x2, E2, 1 - E2) for T2 = T1 (1 + τ): c̄ = c_f + x1 x2 (E2 - E1)/(Δx (1-E1)(1-E2)).

    E2 - E1 = E2 (1 - e^(-Δx)) with Δx = x1 - x2 > 0, so nothing cancels as τ → 0 and
    nothing overflows at low temperature (where E1, E2 underflow to their limit 0).
    """
    x2 = up.x1 / (1.0 + tau)
    dx = np.maximum(up.x1 - x2, 1e-300)
    minus_x2 = -x2
    E2 = np.exp(minus_x2)
    om2 = -np.expm1(minus_x2)
    cbar = up.cf + up.x1_om1 * x2 * E2 * np.expm1(-dx) / (-dx * om2)
    return cbar, x2, E2, om2


class _Jump(NamedTuple):
    """Everything across the shock at τ; the ``d*`` fields are τ-derivatives (NaN-free
    only when :func:`_jump` was asked for them)."""

    t: np.ndarray
    cbar: np.ndarray
    c2: np.ndarray
    eps: np.ndarray  #: ρ1/ρ2
    delta: np.ndarray  #: 1 - ε
    m: np.ndarray  #: u_n1²/(R T1)
    x2: np.ndarray
    E2: np.ndarray
    om2: np.ndarray
    BS: np.ndarray  #: B + S
    deps: object = None
    dm: object = None
    dc2: object = None


def _jump(tau, up, derivatives=True):
    """The jump at τ (module docs), with dε/dτ, dm/dτ and dc2/dτ if ``derivatives``."""
    cbar, x2, E2, om2 = _mean_heat_capacity(tau, up)
    cf = up.cf
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
    jump = _Jump(t, cbar, c2, eps, 4.0 * cm * tau / q, m, x2, E2, om2, BS)
    if not derivatives:
        return jump
    # d c̄/dτ = (c2 - c̄)/τ (the derivative of a mean over [T1, T2]); B' = 2(c2 - c̄) + 2c̄ - 1
    diff = c2 - cbar
    dcbar = diff / np.maximum(tau, _TINY_TAU)
    dB = 2.0 * diff + tc
    dBS = dB + (B * dB + 2.0) / S
    deps = (2.0 - eps * dBS) / BS  # from ε (B + S) = 2t
    dm = m * (-dcbar / (cbar * cm) + dBS / q - deps / one_eps)
    dc2 = -(c2 - cf) * (2.0 - x2 * (1.0 + E2) / om2) / t  # T1 dc/dT at T2
    return jump._replace(deps=deps, dm=dm, dc2=dc2)


def _tau_of_mean(cbar, c1, w, mu):
    """τ = P(c̄) - 1: the perfect-gas T2/T1 - 1 at cp = c̄R for μ = u1²/(RT1) = c1(1+w)/(c1-1).

    P - 1 = 2(μ + 1)[c1 w (c̄ - 1) + c̄ - c1]/((c1 - 1)(2c̄ - 1)² μ), which keeps its
    digits as w → 0 (c̄ - c1 = O(τ)).
    """
    tc = 2.0 * cbar - 1.0
    return 2.0 * (mu + 1.0) * (c1 * w * (cbar - 1.0) + cbar - c1) / ((c1 - 1.0) * tc * tc * mu)


def _start_tau(w, up, mu, steps=_FIXED_STEPS):
    """The perfect gas at γ(T1), then the fixed-point steps τ ← P(c̄(τ)) - 1."""
    tau = _tau_of_mean(up.c1, up.c1, w, mu)
    for _ in range(steps):
        tau = _tau_of_mean(_mean_heat_capacity(tau, up)[0], up.c1, w, mu)
    return tau


def _solve_normal(w, up):
    """τ of the normal shock with upstream normal Mach number √(1 + w), w >= 0.

    With μ = u1²/(R T1) = γ1(1 + w), :func:`_tau_of_mean` reads τ = k N/(2c̄ - 1)²,
    N = (a + 1) c̄ - (a + c1), a = c1 w, k = 2(μ + 1)/((c1 - 1) μ). Fixed-point steps, then
    Newton on G(τ) = τ(c̄(τ)) - τ with G' = (dτ/dc̄)(dc̄/dτ) - 1 < -1 (never zero) and
    dτ/dc̄ = k (a + 1)/(2c̄ - 1)² - 4τ/(2c̄ - 1).
    """
    c1 = up.c1
    mu = c1 / (c1 - 1.0) * (1.0 + w)  # γ1 M1²
    k = 2.0 * (mu + 1.0) / ((c1 - 1.0) * mu)
    a = c1 * w
    a1, a0 = a + 1.0, a + c1
    ka1 = k * a1
    with np.errstate(all="ignore"):
        tc = 2.0 * c1 - 1.0
        tau = k * a * (c1 - 1.0) / (tc * tc)  # the perfect gas at γ(T1)
        for _ in range(_FIXED_STEPS):
            cbar = _mean_heat_capacity(tau, up)[0]
            tc = 2.0 * cbar - 1.0
            tau = k * (a1 * cbar - a0) / (tc * tc)
        for _ in range(_NEWTON_STEPS):
            cbar, x2, E2, om2 = _mean_heat_capacity(tau, up)
            c2 = up.cf + x2 * x2 * E2 / (om2 * om2)
            inv_tc = 1.0 / (2.0 * cbar - 1.0)
            target = k * (a1 * cbar - a0) * inv_tc * inv_tc
            dtau_dc = (ka1 * inv_tc - 4.0 * target) * inv_tc
            slope = dtau_dc * (c2 - cbar) / np.maximum(tau, _TINY_TAU) - 1.0
            tau = tau - (target - tau) / slope
    return np.maximum(tau, 0.0)


def _entropy_rise(j, tau, up):
    """(s2 - s1)/R = (c_f - 1) ln t + ln ε + s_v(T2) - s_v(T1) (φ difference less ln p2/p1)."""
    sv2 = j.x2 * j.E2 / j.om2 - np.log(j.om2)
    return (up.cf - 1.0) * np.log1p(tau) + np.log(j.eps) + sv2 - up.sv1


def _mach_from_tau(j, up):
    return np.sqrt(j.m * (up.c1 - 1.0) / up.c1)  # M1² = m/γ1


# ------------------------------------------------------------------ normal shock


class NormalShockRatios(NamedTuple):
    """Plain-core result of :func:`normal_shock_ratios` (ndarrays, dimensionless)."""

    M2: np.ndarray  #: downstream Mach number
    p2_p1: np.ndarray  #: static pressure ratio
    rho2_rho1: np.ndarray  #: density ratio
    T2_T1: np.ndarray  #: static temperature ratio
    p02_p01: np.ndarray  #: stagnation pressure ratio, exp(-(s2 - s1)/R)
    gamma2: np.ndarray  #: ratio of specific heats behind the shock


def _normal_block(M1, T1, gas):
    up = _upstream(T1, gas)
    with np.errstate(all="ignore"):
        w = np.maximum((M1 - 1.0) * (M1 + 1.0), 0.0)
        tau = _solve_normal(w, up)
        j = _jump(tau, up, derivatives=False)
        gamma2 = j.c2 / (j.c2 - 1.0)
        mu = up.c1 / (up.c1 - 1.0) * (1.0 + w)
        M2 = j.eps * np.sqrt(mu / (gamma2 * j.t))
        invalid = ~(M1 >= 1.0)
        out = NormalShockRatios(M2, j.t / j.eps, j.BS / (2.0 * j.t), j.t,
                                np.exp(-_entropy_rise(j, tau, up)), gamma2)
    if nx.any_true(invalid):
        out = NormalShockRatios(*(np.where(invalid, np.nan, v) for v in out))
    return out


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
        M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01 and γ behind the shock.

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


def _log_stagnation_over_static(M1, T1, up):
    """ln(p01/p1) = (φ(T01) - φ(T1))/R."""
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
    up = _upstream(T1, gas)
    shock = normal_shock_ratios(M1, T1, gas)
    with np.errstate(all="ignore"):
        return shock.p02_p01 * np.exp(_log_stagnation_over_static(M1, T1, up))


# ------------------------------------------------------------------ normal-shock inverses


def _bracketed_tau(residual, start, lo, hi, increasing):
    with np.errstate(all="ignore"):
        lo, hi = np.broadcast_arrays(lo, hi)
        return nx.safeguarded_newton(residual, np.clip(start, lo, hi), lo, hi,
                                     increasing=increasing)


def _inverse(value, T1, gas, residual_of, start_of, bounds_of, increasing, valid_of):
    """M1 from one downstream quantity: τ by a bracketed Newton iteration, then M1(τ)."""
    value, T1 = np.broadcast_arrays(np.asarray(value, dtype=float), np.asarray(T1, dtype=float))
    up = _upstream(T1, gas)
    with np.errstate(all="ignore"):
        valid = valid_of(value, up)
        lo, hi = bounds_of(value, up)
        tau = _bracketed_tau(lambda x: residual_of(x, value, up), start_of(value, up), lo, hi,
                             increasing)
        M1 = _mach_from_tau(_jump(tau, up, derivatives=False), up)
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
    up = _upstream(T1, gas)
    with np.errstate(all="ignore"):
        M1 = _mach_from_tau(_jump(r - 1.0, up, derivatives=False), up)
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
        j = _jump(tau, up)
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
        j = _jump(tau, up)
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
    from .normal_shocks import mach_from_downstream_mach as perfect_gas_inverse

    def residual(tau, target, up):
        value, slope = _downstream_mach_squared(_jump(tau, up), up)
        return value - target * target, slope

    def start(target, up):
        g1 = up.c1 / (up.c1 - 1.0)
        M1 = perfect_gas_inverse(np.maximum(target, np.sqrt((g1 - 1.0) / (2.0 * g1)) * 1.001), g1)
        w = (M1 - 1.0) * (M1 + 1.0)
        return _start_tau(w, up, g1 * M1 * M1)

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
    from .normal_shocks import mach_from_stagnation_pressure_ratio as perfect_gas_inverse

    def residual(log_tau, target, up):
        tau = np.exp(log_tau)
        j = _jump(tau, up)
        rise = _entropy_rise(j, tau, up)
        slope = tau * ((j.c2 - 1.0) / j.t + j.deps / j.eps) / rise
        return np.log(rise) - np.log(target), slope

    def start(target, up):
        g1 = up.c1 / (up.c1 - 1.0)
        M1 = perfect_gas_inverse(np.exp(-target), g1)
        w = (M1 - 1.0) * (M1 + 1.0)
        return np.log(_start_tau(w, up, g1 * M1 * M1))

    value, T1 = np.broadcast_arrays(np.asarray(p02_p01, dtype=float), np.asarray(T1, dtype=float))
    with np.errstate(divide="ignore", invalid="ignore"):
        rise = -np.log(value)
    up = _upstream(T1, gas)
    with np.errstate(all="ignore"):
        log_tau = _bracketed_tau(lambda x: residual(x, rise, up), start(rise, up),
                                 np.full(rise.shape, -40.0), np.full(rise.shape, 20.0), True)
        M1 = _mach_from_tau(_jump(np.exp(log_tau), up, derivatives=False), up)
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
    from .normal_shocks import mach_from_pitot_ratio as perfect_gas_inverse

    def residual(tau, target, up):
        j = _jump(tau, up)
        M1 = _mach_from_tau(j, up)
        T0 = stagnation_temperature(M1, T1, up.gas)
        value = _log_stagnation_over_static(M1, T1, up) - _entropy_rise(j, tau, up)
        slope = -((j.c2 - 1.0) / j.t + j.deps / j.eps) + T1 * j.dm / (2.0 * T0)
        return value - target, slope

    def start(target, up):
        g1 = up.c1 / (up.c1 - 1.0)
        M1 = perfect_gas_inverse(np.exp(target), g1)
        w = (M1 - 1.0) * (M1 + 1.0)
        return _start_tau(w, up, g1 * M1 * M1)

    value, T1 = np.broadcast_arrays(np.asarray(p02_p1, dtype=float), np.asarray(T1, dtype=float))
    up = _upstream(T1, gas)
    with np.errstate(all="ignore"):
        target = np.log(value)
        low = _log_stagnation_over_static(np.ones_like(T1), T1, up)  # M1 = 1: p0/p
        tau = _bracketed_tau(lambda x: residual(x, target, up), start(target, up),
                             np.zeros_like(target), np.full(target.shape, _TAU_MAX), True)
        M1 = _mach_from_tau(_jump(tau, up, derivatives=False), up)
    M1 = np.where(target == low, 1.0, M1)
    return np.where((target >= low) & (value < np.inf), M1, np.nan)


# ------------------------------------------------------------------ oblique shocks


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
        j.t / j.eps, j.BS / (2.0 * j.t), j.t, np.exp(-_entropy_rise(j, tau, up)), g2)


def _stream(M1, T1, gas):
    M1, T1 = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(T1, dtype=float))
    up = _upstream(T1, gas)
    return M1, T1, up, up.c1 / (up.c1 - 1.0) * M1 * M1  # μ1 = γ1 M1²


def oblique_shock_from_wave_angle(M1, T1, beta, gas):
    """Plain core: every quantity behind an oblique shock of wave angle β [rad].

    The normal component M1 sin β obeys :func:`normal_shock_ratios` at the same T1;
    NaN for β outside [μ, π/2] or M1 < 1.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import oblique_shock_from_wave_angle
    >>> shock = oblique_shock_from_wave_angle(3.0, 300.0, 0.7, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(shock.deflection)), 4), round(float(shock.p2_p1), 5)
    (22.0151, 4.19955)
    """
    M1, beta = np.broadcast_arrays(np.asarray(M1, dtype=float), np.asarray(beta, dtype=float))
    M1, T1, up, mu1 = _stream(M1, T1, gas)
    with np.errstate(all="ignore"):
        ms = M1 * np.sin(beta)
        w = (ms - 1.0) * (ms + 1.0)
        invalid = (w < -1e-15 * M1 * M1) | (beta > 0.5 * np.pi) | ~(M1 >= 1.0)
        w = np.maximum(w, 0.0)
        tau = _solve_normal(w, up)
        j = _jump(tau, up, derivatives=False)
        # the normal component's m is γ1(1 + w) exactly: keep it (no round trip through τ)
        j = j._replace(m=up.c1 / (up.c1 - 1.0) * (1.0 + w))
        mc = M1 * np.cos(beta)
        vm = up.c1 / (up.c1 - 1.0) * mc * mc  # the tangential part, exact near β = 90°
        out = _oblique_ratios(tau, j, up, j.m + vm, vm)
    out = out._replace(wave_angle=beta.copy())
    return ObliqueShockRatios(*(np.where(invalid, np.nan, v) for v in out))


def _polar(tau, up, mu1):
    """(tan θ, d tan θ/dτ, jump) along the shock polar of a stream μ1 = u1²/(R T1)."""
    j = _jump(tau, up)
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
    Returns τ and u_t²/(R T1) of that start.
    """
    g1 = up.c1 / (up.c1 - 1.0)
    w, _, invalid = _perfect_gas_wv(M1, theta, g1, strong)
    w = np.where(invalid, np.nan, w)
    cbar = _mean_heat_capacity(_start_tau(w, up, g1 * (1.0 + w), steps=1), up)[0]
    g_e = cbar / (cbar - 1.0)
    w, v, invalid = _perfect_gas_wv(M1 * np.sqrt(g1 / g_e), theta, g_e, strong)
    mu = np.where(invalid, np.nan, g_e * (1.0 + w))  # u_n1²/(R T1)
    return _tau_of_mean(cbar, up.c1, mu / g1 - 1.0, mu), g_e * v  # and u_t²/(R T1)


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
    return _start_tau(w, up, g1 * (1.0 + w))


def _normal_tau(M1, up):
    return _solve_normal(np.maximum((M1 - 1.0) * (M1 + 1.0), 0.0), up)


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
        step = np.full_like(target, np.inf)
        if strong:
            tau_n = _normal_tau(M1, up)
            # near the normal shock τ_n - τ ≈ τ_n u_t²/u1² is the better start for y²
            y = np.sqrt(np.where(tau_n - start > 0.1 * tau_n * vm / mu1, tau_n - start,
                                 tau_n * vm / mu1))
            for _ in range(_OBLIQUE_STEPS):
                f, df, _ = _polar(tau_n - y * y, up, mu1)
                # the step in y, written as the step in τ (2y dy) for the convergence test
                previous, step = step, (f - target) / df
                y = np.maximum(y + 0.5 * step / y, 0.5 * y)  # never past the normal shock
            tau = np.where(theta == 0.0, tau_n, tau_n - y * y)
            good = (_converged(step, previous, tau) & (df < 0.0)) | (theta == 0.0)
        else:
            tau = start
            for _ in range(_OBLIQUE_STEPS):
                f, df, _ = _polar(tau, up, mu1)
                previous, step = step, (f - target) / df
                tau = np.maximum(tau - step, 0.5 * tau)  # never past the Mach wave
            good = (_converged(step, previous, tau) & (df > 0.0)) | (theta == 0.0)
            tau = np.where(theta == 0.0, 0.0, tau)
        retry = ~good & ~invalid & ~np.isnan(target + M1 + T1)
        if nx.any_true(retry):
            sub = _Upstream(*(np.broadcast_to(a, M1.shape)[retry] if isinstance(a, np.ndarray)
                              else a for a in up))
            tau = np.array(tau, copy=True)
            tau[retry], _ = _bracketed_deflection(M1[retry], target[retry], sub, mu1[retry],
                                                  strong)
        tau = np.where(invalid, np.nan, tau)
        j = _jump(tau, up, derivatives=False)
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
    >>> from gasdyn2d.relations.thermally_perfect_shocks import oblique_shock_from_deflection
    >>> shock = oblique_shock_from_deflection(5.0, 300.0, 0.5, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(shock.wave_angle)), 4), round(float(shock.p2_p1), 4)
    (39.9462, 11.9818)
    """
    M1, T1, theta = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (M1, T1, theta)))
    return nx.chunked(lambda m, t, th: _deflection_block(m, t, th, gas, strong), M1, T1, theta)


def _angles(M1, tau, up, mu1):
    j = _jump(tau, up, derivatives=False)
    out = _oblique_ratios(tau, j, up, mu1)
    return out.deflection, out.wave_angle


def detachment_angles(M1, T1, gas):
    """Plain core: (θmax, β at θmax) [rad] for a stream (M1 >= 1, T1 [K]).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_shocks import detachment_angles
    >>> theta, beta = detachment_angles(5.0, 300.0, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(theta)), 4), round(float(np.degrees(beta)), 4)  # 41.1177 if perfect
    (43.169, 67.8524)
    """
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
    >>> from gasdyn2d.relations.thermally_perfect_shocks import sonic_angles
    >>> theta, beta = sonic_angles(5.0, 300.0, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(theta)), 4), round(float(np.degrees(beta)), 4)
    (43.1617, 67.4057)
    """
    M1, T1, up, mu1 = _stream(M1, T1, gas)

    def residual(tau):
        j = _jump(tau, up)
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
        start = np.minimum(_start_tau(w, up, g1 * (1.0 + w)), tau_n)
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
    >>> from gasdyn2d.relations.thermally_perfect_shocks import turn_state
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
            up = _upstream(t, gas)
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
