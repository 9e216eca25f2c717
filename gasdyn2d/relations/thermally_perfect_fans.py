"""Thermally perfect gas: the Prandtl–Meyer function and centred simple waves.

Plain core only (floats and ndarrays, SI units, radians, no pint); invalid elements
come out as NaN. Every function takes the gas as a
:class:`~gasdyn2d.relations.gas.Gas` with a ``vibrational_temperature`` and the
temperature that fixes the state: the stagnation temperature T0 for ν, the static
temperature T1 ahead of a wave. The state variable d = T0/T - 1 and the gas terms
per unit R are those of :mod:`gasdyn2d.relations.thermally_perfect_energy`; the
isentropic ratios are in :mod:`gasdyn2d.relations.thermally_perfect`, which
re-exports this module's public names under their old paths.

- :func:`prandtl_meyer_angle` ν(M; T0), :func:`max_prandtl_meyer_angle` and the
  inverse :func:`mach_from_prandtl_meyer_angle`;
- the centred fan from (M1, T1) and a turn, a pressure ratio or M2:
  :func:`fan_from_turn`, :func:`fan_from_pressure_ratio`, :func:`fan_from_downstream_mach`,
  and the centred simple wave of either sign, :func:`isentropic_compression_from_turn`.

The Prandtl–Meyer function
--------------------------
ν = ∫ √(M² - 1) dV/V along the isentrope (the turn from the sonic state) has no
closed form for this gas. Written in T it is ∫_T^T* √(M² - 1) c/(V²/R) dT. It is
integrated with two fixed 24-point Gauss–Legendre panels and a closed-form tail:

- from T*/2 to T* in σ, the Mach angle of a perfect gas with the same T*/T0
  (T = T0 sin²σ/(sin²σ + d*)); this substitution removes the √(T* - T) singularity
  at M = 1 (the integrand is smooth in σ at σ = π/2) and the pole at T = T0;
- from T_f to T*/2 in ln T, where the poles of cp(T) at T = ±iθv/(2πk) all lie at
  Im ln T = ±π/2, so the rule converges like ρ^(-2n) with ρ >= 2.3 whatever the range;
- below T_f = θv/40 the vibrational terms are below e^(-40) ≈ 4e-18 of the frozen
  ones: the gas is perfect there (frozen γ, stagnation temperature h(T0)/cp_f) and
  the tail is the perfect-gas closed form.

Error bound: against an mpmath quadrature at 30 digits, <= 2e-14 relative for
200 K <= T0 <= 6000 K, 1.1 <= M <= ∞ (tests/test_thermally_perfect.py);
with 16 points per panel the same cases reach 2e-11, with 20 points 1e-13 (the
measured convergence, so 24 points hold a margin of about 10³). Near M = 1 the
relative error grows like 1e-16/(M² - 1) (the integrand's √(M² - 1) cancels at
the nodes next to the sonic end). The inverse is a bracketed Newton iteration
in u with dν/du = √(M² - 1)(c - 1)/M², each step one quadrature.

Model limits: see :mod:`gasdyn2d.relations.gas` (no dissociation, vibrational
equilibrium assumed). Results are for preliminary design.

References
----------
Ames Research Staff (1953), *Equations, Tables, and Charts for Compressible
Flow*, NACA Report 1135, imperfect-gas section (from memory).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from .prandtl_meyer_function import mach_from_prandtl_meyer_angle as _perfect_gas_nu_inverse
from .prandtl_meyer_function import prandtl_meyer_angle as _perfect_gas_nu
from .gas import oscillator_terms
from .thermally_perfect_energy import (
    enthalpy_over_R,
    excess_from_log_ratio,
    excess_from_mach,
    gas_constants,
    heat_capacity_over_R,
    kelvin,
    mach_from_excess,
    mean_heat_capacity_below,
    stagnation_per_R,
    vibrational_entropy_over_R,
)

__all__ = [
    "prandtl_meyer_angle",
    "max_prandtl_meyer_angle",
    "mach_from_prandtl_meyer_angle",
    "FanState",
    "fan_from_turn",
    "fan_from_pressure_ratio",
    "fan_from_downstream_mach",
    "isentropic_compression_from_turn",
]

_PANEL_NODES = 24  # Gauss–Legendre points per panel of the ν quadrature (see module docs)
_FROZEN_X = 40.0  # θv/T beyond which the vibrational terms (< x² e^-x ≈ 7e-15) are dropped
_U_SPAN = 60.0  # bracket width in u = ln(T0/T) above the sonic point (T/T0 down to e^-60)

_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(_PANEL_NODES)


def _prepare(*arrays):
    return np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in arrays))


# ------------------------------------------------------------------ Prandtl–Meyer


def _integrand(T, H0, cf, theta):
    """√(M² - 1) c/(V²/R) [1/K] at temperature T on the isentrope of h0/R = H0."""
    x, E, om = oscillator_terms(T, theta)
    c = heat_capacity_over_R(x, E, om, cf)
    V2 = 2.0 * (H0 - enthalpy_over_R(T, E, om, cf, theta))  # V²/R [K]
    m2 = V2 * (c - 1.0) / (c * T)
    return np.sqrt(np.maximum(m2 - 1.0, 0.0)) * c / V2


def _nu_of_excess(d, T0, ds, cf, theta):
    """ν [rad] at d = T0/T - 1 (inf for T = 0) for T0, sonic d* = ``ds`` (module docs)."""
    with np.errstate(all="ignore"):
        x0, E0, om0 = oscillator_terms(T0, theta)
        H0 = enthalpy_over_R(T0, E0, om0, cf, theta)
        T = T0 / (1.0 + d)
        T_star = T0 / (1.0 + ds)
        T_split = 0.5 * T_star
        T_frozen = np.minimum(theta / _FROZEN_X, T_split)
        # panel A in σ, from max(T, T*/2) to T*: sin²σ = d*/d there
        d_a = np.minimum(d, 1.0 + 2.0 * ds)
        sigma_lo = np.arcsin(np.sqrt(ds / d_a))
        half = 0.25 * np.pi - 0.5 * sigma_lo
        middle = 0.25 * np.pi + 0.5 * sigma_lo
        nu = np.zeros(np.shape(d))
        for node, weight in zip(_NODES, _WEIGHTS):
            z = np.tan(0.5 * (middle + half * node))  # sin, cos from tan(σ/2): fast in numpy
            z2 = z * z
            sin = 2.0 * z / (1.0 + z2)
            cos = (1.0 - z2) / (1.0 + z2)
            s2 = sin * sin
            den = s2 + ds
            dT = 2.0 * T0 * ds * sin * cos / (den * den)
            nu += (weight * half) * _integrand(T0 * s2 / den, H0, cf, theta) * dT
        # panel B in ln T, from max(T, T_f) to T*/2 (empty when T >= T*/2)
        lo = np.log(np.clip(T, T_frozen, T_split))
        hi = np.log(T_split)
        half_b, middle_b = 0.5 * (hi - lo), 0.5 * (hi + lo)
        for node, weight in zip(_NODES, _WEIGHTS):
            Tn = np.exp(middle_b + half_b * node)
            nu += (weight * half_b) * _integrand(Tn, H0, cf, theta) * Tn
        # frozen tail below T_f: a perfect gas with γ_f and stagnation temperature h0/cp_f
        k = 2.0 * (cf - 1.0)
        T0_frozen = H0 / cf
        tail_lo = np.minimum(T, T_frozen)
        gamma_f = cf / (cf - 1.0)
        nu += (_perfect_gas_nu(np.sqrt(k * (T0_frozen / tail_lo - 1.0)), gamma_f)
               - _perfect_gas_nu(np.sqrt(k * (T0_frozen / T_frozen - 1.0)), gamma_f))
        return np.where(d < ds, np.nan, np.where(d == ds, 0.0, nu))


def _sonic_excess(T0, cf, theta):
    return excess_from_mach(np.ones_like(T0), T0, cf, theta)


def prandtl_meyer_angle(M, T0, gas):
    """Plain core: Prandtl–Meyer function ν(M) [rad] at stagnation temperature T0 [K].

    ν = ∫ √(M² - 1) dV/V from the sonic state along the isentrope, by the two-panel
    Gauss–Legendre rule and frozen tail of the module docs (<= 2e-14 relative, measured).
    NaN for M < 1; M = inf gives :func:`max_prandtl_meyer_angle`.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import prandtl_meyer_angle
    >>> round(float(np.degrees(prandtl_meyer_angle(2.0, 300.0, AIR_THERMALLY_PERFECT))), 4)
    26.3813
    """
    cf, theta = gas_constants(gas)
    M, T0 = _prepare(M, kelvin(T0))

    def block(m, t0):
        return _nu_of_excess(excess_from_mach(m, t0, cf, theta), t0,
                             _sonic_excess(t0, cf, theta), cf, theta)

    return nx.chunked(block, M, T0)


def max_prandtl_meyer_angle(T0, gas):
    """Plain core: ν as M → ∞ (expansion to T = 0) [rad] at stagnation temperature T0 [K].

    Larger than the perfect gas's at frozen γ (130.454° for γ = 1.4), since the
    vibrational energy is also turned into speed.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import max_prandtl_meyer_angle
    >>> [round(float(np.degrees(max_prandtl_meyer_angle(T0, AIR_THERMALLY_PERFECT))), 4)
    ...  for T0 in (300.0, 3000.0)]
    [130.4556, 141.5987]
    """
    cf, theta = gas_constants(gas)
    T0 = kelvin(T0)
    return _nu_of_excess(np.full_like(T0, np.inf), T0, _sonic_excess(T0, cf, theta), cf, theta)


def _excess_from_nu(nu, T0, cf, theta):
    """d from ν at T0: bracketed Newton in u = ln(1 + d), dν/du = √(M² - 1)(c - 1)/M²."""
    with np.errstate(all="ignore"):
        ds = _sonic_excess(T0, cf, theta)
        x0, E0, om0 = oscillator_terms(T0, theta)
        cs = heat_capacity_over_R(*oscillator_terms(T0 / (1.0 + ds), theta), cf)
        nu_max = _nu_of_excess(np.full_like(T0, np.inf), T0, ds, cf, theta)
        # start: the perfect gas at γ* = γ(T*) (M from ν), mapped to d with the same T*/T0
        gamma_star = cs / (cs - 1.0)
        M0 = _perfect_gas_nu_inverse(np.minimum(nu, 0.999 * np.pi * 0.5 * (
            np.sqrt((gamma_star + 1.0) / (gamma_star - 1.0)) - 1.0)), gamma_star)
        d0 = (1.0 + ds) * (1.0 + 0.5 * M0 * M0 / (cs - 1.0)) / (1.0 + 0.5 / (cs - 1.0)) - 1.0
        u_star = np.log1p(ds)
        lo, hi = u_star, u_star + _U_SPAN

        def residual(u):
            d = np.expm1(u)
            cbar, x, E, om = mean_heat_capacity_below(x0, E0, om0, d, cf)
            c = heat_capacity_over_R(x, E, om, cf)
            m2 = 2.0 * cbar * d * (c - 1.0) / c
            slope = np.sqrt(np.maximum(m2 - 1.0, 0.0)) * (c - 1.0) / m2
            return _nu_of_excess(d, T0, ds, cf, theta) - nu, slope

        u = nx.safeguarded_newton(residual, np.clip(np.log1p(d0), lo, hi), lo, hi,
                                  increasing=True)
        d = np.expm1(u)
    d = np.where(nu == 0.0, ds, d)
    d = np.where(nu == nu_max, np.inf, d)
    return np.where((nu < 0.0) | (nu > nu_max), np.nan, d)


def mach_from_prandtl_meyer_angle(nu, T0, gas):
    """Plain core: Mach number whose ν at stagnation temperature T0 [K] is ``nu`` [rad].

    NaN outside [0, ν_max(T0)]. Each Newton step is one quadrature of
    :func:`prandtl_meyer_angle`, so this costs a few of those.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import mach_from_prandtl_meyer_angle
    >>> round(float(mach_from_prandtl_meyer_angle(0.46044052413902887, 300.0,
    ...                                           AIR_THERMALLY_PERFECT)), 12)
    2.0
    """
    cf, theta = gas_constants(gas)
    nu, T0 = _prepare(nu, kelvin(T0))
    d = _excess_from_nu(nu, T0, cf, theta)
    M = mach_from_excess(d, T0, cf, theta)
    return np.where(d == np.inf, np.inf, M)


# ------------------------------------------------------------------ centred fans


class FanState(NamedTuple):
    """Plain-core result of the centred-fan functions (ndarrays; angles in radians)."""

    M2: np.ndarray  #: Mach number behind the fan
    turn: np.ndarray  #: flow turn through the fan [rad], >= 0 (away from the flow)
    p2_p1: np.ndarray  #: static pressure ratio, <= 1
    T2_T1: np.ndarray  #: static temperature ratio, <= 1
    rho2_rho1: np.ndarray  #: density ratio, <= 1
    gamma2: np.ndarray  #: ratio of specific heats behind the fan
    nu1: np.ndarray  #: Prandtl–Meyer angle ahead of the fan [rad] (at the stream's T0)
    nu2: np.ndarray  #: Prandtl–Meyer angle behind the fan [rad]
    gamma1: np.ndarray  #: ratio of specific heats ahead of the fan


def _upstream(M1, T1, cf, theta):
    """(T0, d1, d*, ν1, state terms at T1) for a stream (M1, T1)."""
    H0, T0, (x1, E1, om1, c1) = stagnation_per_R(M1, T1, cf, theta)
    with np.errstate(invalid="ignore"):
        d1 = T0 / T1 - 1.0
    ds = _sonic_excess(T0, cf, theta)
    return T0, d1, ds, _nu_of_excess(d1, T0, ds, cf, theta), (x1, E1, om1)


def _fan_state(T0, T1, d2, turn, terms1, cf, theta, nu1, nu2):
    x1, E1, om1 = terms1
    T2 = T0 / (1.0 + d2)
    x2, E2, om2 = oscillator_terms(T2, theta)
    with np.errstate(all="ignore"):
        log_T = np.log(T2 / T1)
        log_p = (cf * log_T + vibrational_entropy_over_R(x2, E2, om2)
                 - vibrational_entropy_over_R(x1, E1, om1))
        c1 = heat_capacity_over_R(x1, E1, om1, cf)
        c2 = heat_capacity_over_R(x2, E2, om2, cf)
        M2 = mach_from_excess(d2, T0, cf, theta)
    return FanState(np.where(d2 == np.inf, np.inf, M2), turn, np.exp(log_p), T2 / T1,
                    np.exp(log_p - log_T), c2 / (c2 - 1.0), nu1 + np.zeros(np.shape(turn)),
                    np.where(np.isnan(d2), np.nan, nu2), c1 / (c1 - 1.0) + np.zeros(np.shape(turn)))


def fan_from_turn(M1, T1, turn, gas):
    """Plain core: the centred fan that turns a stream (M1 >= 1, T1 [K]) by ``turn`` >= 0 [rad].

    ν(M2) = ν(M1) + turn at the stream's stagnation temperature; NaN fields beyond the
    vacuum turn ν_max - ν(M1).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import fan_from_turn
    >>> fan = fan_from_turn(2.0, 1500.0, np.radians(10.0), AIR_THERMALLY_PERFECT)
    >>> round(float(fan.M2), 5), round(float(fan.p2_p1), 5)  # 2.38264, 0.54797 if perfect
    (2.33679, 0.57103)
    """
    return _simple_wave_from_turn(M1, T1, turn, gas, compression=False)


def _simple_wave_from_turn(M1, T1, turn, gas, compression):
    """ν2 = ν1 + turn at the stream's T0; turn < 0 (an isentropic compression) only when
    ``compression`` (NaN below ν2 = 0: no simple wave compresses past sonic speed)."""
    cf, theta = gas_constants(gas)
    M1, T1, turn = _prepare(M1, kelvin(T1), turn)
    T0, d1, ds, nu1, terms1 = _upstream(M1, T1, cf, theta)
    with np.errstate(invalid="ignore"):
        nu2 = nu1 + turn if compression else np.where(turn >= 0.0, nu1 + turn, np.nan)
        d2 = _excess_from_nu(nu2, T0, cf, theta)
        d2 = np.where(turn == 0.0, d1, d2)  # no turn: the upstream state itself
    return _fan_state(T0, T1, d2, turn, terms1, cf, theta, nu1, nu2)


def isentropic_compression_from_turn(M1, T1, turn, gas):
    """Plain core: the centred simple wave that turns a stream (M1 >= 1, T1 [K]) by ``turn``
    [rad] away from itself (turn >= 0, a fan) or into itself (turn < 0, an isentropic
    compression: ν2 = ν1 + turn >= 0, NaN past the sonic state).

    The fields are those of :class:`FanState` (``turn`` as given, signed).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import isentropic_compression_from_turn
    >>> wave = isentropic_compression_from_turn(2.0, 1500.0, np.radians(-10.0),
    ...                                         AIR_THERMALLY_PERFECT)
    >>> round(float(wave.M2), 5), round(float(wave.p2_p1), 5)
    (1.68609, 1.65113)
    """
    return _simple_wave_from_turn(M1, T1, turn, gas, compression=True)


def fan_from_pressure_ratio(M1, T1, p2_p1, gas):
    """Plain core: the centred fan that takes a stream (M1, T1 [K]) to pressure ratio p2/p1 <= 1.

    The entropy function gives T2 (φ(T2) = φ(T1) + R ln(p2/p1)); the turn is
    ν(M2) - ν(M1).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import fan_from_pressure_ratio
    >>> round(float(fan_from_pressure_ratio(2.0, 1500.0, 0.571028791264424,
    ...                                     AIR_THERMALLY_PERFECT).M2), 5)
    2.33679
    """
    cf, theta = gas_constants(gas)
    M1, T1, p = _prepare(M1, kelvin(T1), p2_p1)
    T0, d1, ds, nu1, terms1 = _upstream(M1, T1, cf, theta)
    with np.errstate(all="ignore"):
        # T1/T2 = 1 + d' with d' from the pressure ratio relative to T1 (as p/p0 to T0)
        d_rel = excess_from_log_ratio(np.log(p), T1, cf, theta, False)
        d2 = (1.0 + d1) * (1.0 + d_rel) - 1.0
        d2 = np.where(p <= 1.0, d2, np.nan)
        nu2 = _nu_of_excess(d2, T0, ds, cf, theta)
    return _fan_state(T0, T1, d2, nu2 - nu1, terms1, cf, theta, nu1, nu2)


def fan_from_downstream_mach(M1, T1, M2, gas):
    """Plain core: the centred fan that accelerates a stream (M1, T1 [K]) to M2 >= M1.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_fans import fan_from_downstream_mach
    >>> fan = fan_from_downstream_mach(2.0, 1500.0, 2.3367873735080775, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(fan.turn)), 4)
    10.0
    """
    cf, theta = gas_constants(gas)
    M1, T1, M2 = _prepare(M1, kelvin(T1), M2)
    T0, d1, ds, nu1, terms1 = _upstream(M1, T1, cf, theta)
    with np.errstate(invalid="ignore"):
        d2 = np.where(M2 >= M1, excess_from_mach(M2, T0, cf, theta), np.nan)
        nu2 = _nu_of_excess(d2, T0, ds, cf, theta)
    return _fan_state(T0, T1, d2, nu2 - nu1, terms1, cf, theta, nu1, nu2)
