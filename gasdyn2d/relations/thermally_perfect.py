"""Thermally perfect gas (vibrational excitation): isentropic flow.

Plain core only (floats and ndarrays, SI units, radians, no pint); invalid elements
come out as NaN. Every function takes the gas as a :class:`~gasdyn2d.relations.gas.Gas`
with a ``vibrational_temperature`` (the harmonic-oscillator model of
:mod:`gasdyn2d.relations.gas`) and the stagnation temperature T0 that fixes the
isentrope.

- :func:`isentropic_ratios` (M, T0) → T/T0, p/p0, ρ/ρ0, A/A*, γ; its inverses
  :func:`mach_from_temperature_ratio`, :func:`mach_from_pressure_ratio`,
  :func:`mach_from_density_ratio`, :func:`mach_from_area_ratio` (both branches).

The rest of the thermally perfect plain core lives beside it and is re-exported here
under the paths it always had (``gasdyn2d.relations.thermally_perfect.<name>``):

- :mod:`gasdyn2d.relations.thermally_perfect_energy` — the energy equation in the
  state variable d = T0/T - 1 (see there) and the temperatures of a stream:
  :func:`~gasdyn2d.relations.thermally_perfect_energy.gas_constants`,
  :func:`~gasdyn2d.relations.thermally_perfect_energy.kelvin`,
  :func:`~gasdyn2d.relations.thermally_perfect_energy.static_temperature`,
  :func:`~gasdyn2d.relations.thermally_perfect_energy.sonic_temperature`,
  :func:`~gasdyn2d.relations.thermally_perfect_energy.stagnation_temperature`,
  :func:`~gasdyn2d.relations.thermally_perfect_energy.temperature_from_enthalpy`;
- :mod:`gasdyn2d.relations.thermally_perfect_fans` — ν(M; T0) and its inverse
  (:func:`~gasdyn2d.relations.thermally_perfect_fans.prandtl_meyer_angle`,
  :func:`~gasdyn2d.relations.thermally_perfect_fans.max_prandtl_meyer_angle`,
  :func:`~gasdyn2d.relations.thermally_perfect_fans.mach_from_prandtl_meyer_angle`;
  the Mach angle needs no gas: M = 1/sin μ) and the centred fan from (M1, T1) and a
  turn, a pressure ratio or M2
  (:func:`~gasdyn2d.relations.thermally_perfect_fans.fan_from_turn`,
  :func:`~gasdyn2d.relations.thermally_perfect_fans.fan_from_pressure_ratio`,
  :func:`~gasdyn2d.relations.thermally_perfect_fans.fan_from_downstream_mach`,
  :func:`~gasdyn2d.relations.thermally_perfect_fans.isentropic_compression_from_turn`).

The shocks are in :mod:`gasdyn2d.relations.thermally_perfect_shocks` (normal) and
:mod:`gasdyn2d.relations.thermally_perfect_oblique` (oblique, and the simple-wave
primitive).

Along the isentrope, p/p0 = exp((φ(T) - φ(T0))/R) is -c_f ln(1 + d) plus a difference
of vibrational entropies, and the mass flux ρV ∝ (p/p0)(T0/T) M √(γ T/T0) gives
A/A* = ρ*V*/(ρV). From M, d comes from the energy equation by fixed Newton steps; the
inverses are closed form (from T/T0) or a bracketed Newton iteration in
u = ln(1 + d) = ln(T0/T), in which ln p, ln ρ and ln A/A* are nearly linear (their
slopes are -c, -(c - 1) and (c - 1)(1 - 1/M²)).

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
from .gas import oscillator_terms
from .area_ratio import mach_from_area_ratio as _perfect_gas_area_inverse
from .thermally_perfect_energy import (
    excess_from_log_ratio,
    excess_from_mach,
    gas_constants,
    heat_capacity_over_R,
    kelvin,
    mach_from_excess,
    mean_heat_capacity_below,
    sonic_temperature,
    stagnation_temperature,
    static_temperature,
    temperature_from_enthalpy,
    vibrational_entropy_over_R,
)
from .thermally_perfect_fans import (
    FanState,
    fan_from_downstream_mach,
    fan_from_pressure_ratio,
    fan_from_turn,
    isentropic_compression_from_turn,
    mach_from_prandtl_meyer_angle,
    max_prandtl_meyer_angle,
    prandtl_meyer_angle,
)

__all__ = [
    "gas_constants",
    "kelvin",
    "IsentropicRatios",
    "isentropic_ratios",
    "static_temperature",
    "sonic_temperature",
    "stagnation_temperature",
    "temperature_from_enthalpy",
    "mach_from_temperature_ratio",
    "mach_from_pressure_ratio",
    "mach_from_density_ratio",
    "mach_from_area_ratio",
    "prandtl_meyer_angle",
    "max_prandtl_meyer_angle",
    "mach_from_prandtl_meyer_angle",
    "FanState",
    "fan_from_turn",
    "fan_from_pressure_ratio",
    "fan_from_downstream_mach",
    "isentropic_compression_from_turn",
]

_U_SPAN = 60.0  # bracket width in u = ln(T0/T) above the sonic point (T/T0 down to e^-60)


def _prepare(*arrays):
    return np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in arrays))


# ------------------------------------------------------------------ isentropic ratios


class IsentropicRatios(NamedTuple):
    """Plain-core result of :func:`isentropic_ratios` (ndarrays, dimensionless)."""

    M: np.ndarray  #: Mach number
    T_T0: np.ndarray  #: static over stagnation temperature
    p_p0: np.ndarray  #: static over stagnation pressure
    rho_rho0: np.ndarray  #: static over stagnation density
    A_Astar: np.ndarray  #: area over sonic-throat area
    gamma: np.ndarray  #: ratio of specific heats at the static temperature


def _log_flux_terms(d, x0, E0, om0, cf):
    """(ln p/p0, ln(ρV) + const, M², c) at d; ρV ∝ (p/p0)(T0/T) M √(γ T/T0)."""
    cbar, x, E, om = mean_heat_capacity_below(x0, E0, om0, d, cf)
    c = heat_capacity_over_R(x, E, om, cf)
    log_T0_T = np.log1p(d)
    # (φ(T) - φ(T0))/R: c_f ln(T/T0) plus the vibrational entropy difference
    log_p = (-cf * log_T0_T + vibrational_entropy_over_R(x, E, om)
             - vibrational_entropy_over_R(x0, E0, om0))
    gamma = c / (c - 1.0)
    m2 = 2.0 * cbar * d / gamma
    # ln ρV = ln(p/p0) + ln(T0/T) + ln M + ½ ln(γ T/T0) = ln(p/p0) + ½ ln(T0/T) + ½ ln(M² γ)
    return log_p, log_p + 0.5 * log_T0_T + 0.5 * np.log(m2 * gamma), m2, c


def _sonic_log_flux(T0, x0, E0, om0, cf, theta):
    ds = excess_from_mach(np.ones_like(T0), T0, cf, theta)
    return _log_flux_terms(ds, x0, E0, om0, cf)[1], ds


def _ratios_from_excess(d, T0, cf, theta):
    x0, E0, om0 = oscillator_terms(T0, theta)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        log_p, log_flux, m2, c = _log_flux_terms(d, x0, E0, om0, cf)
        log_flux_star, _ = _sonic_log_flux(T0, x0, E0, om0, cf, theta)
        out = IsentropicRatios(np.sqrt(m2), 1.0 / (1.0 + d), np.exp(log_p),
                               np.exp(log_p) * (1.0 + d), np.exp(log_flux_star - log_flux),
                               c / (c - 1.0))
    vacuum = (d == np.inf) & ~np.isnan(T0)  # M = inf: expanded to T = 0, frozen vibration
    if nx.any_true(vacuum):
        limits = (np.inf, 0.0, 0.0, 0.0, np.inf, cf / (cf - 1.0))
        out = IsentropicRatios(*(np.where(vacuum, v, f) for v, f in zip(limits, out)))
    return out


def isentropic_ratios(M, T0, gas):
    """Plain core: isentropic ratios at Mach M for stagnation temperature T0 [K].

    Parameters
    ----------
    M : float or ndarray
        Mach number [-], >= 0.
    T0 : float or ndarray
        Stagnation temperature [K], > 0.
    gas : Gas
        A thermally perfect gas.

    Returns
    -------
    IsentropicRatios
        M, T/T0, p/p0 = exp((φ(T) - φ(T0))/R), ρ/ρ0 = (p/p0)(T0/T), A/A* = ρ*V*/(ρV)
        and γ(T).

    Notes
    -----
    Energy h(T0) = h(T) + M² γ(T) R T/2 solved for d = T0/T - 1 (module docs);
    against mpmath the ratios agree to about 1e-15 (tests/test_thermally_perfect.py).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import isentropic_ratios
    >>> flow = isentropic_ratios(5.0, 2500.0, AIR_THERMALLY_PERFECT)
    >>> round(float(flow.T_T0), 6), round(float(flow.p_p0), 8)  # 0.166667, 0.00189004 if perfect
    (0.192117, 0.00133294)
    """
    cf, theta = gas_constants(gas)
    M, T0 = _prepare(M, kelvin(T0))

    def block(m, t0):
        ratios = _ratios_from_excess(excess_from_mach(m, t0, cf, theta), t0, cf, theta)
        return ratios._replace(M=m.copy(), A_Astar=np.where(m == 0.0, np.inf, ratios.A_Astar))

    return nx.chunked(block, M, T0)


def mach_from_temperature_ratio(T_T0, T0, gas):
    """Plain core: M from T/T0 in (0, 1], in closed form (d = (1 - T/T0)/(T/T0)).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import mach_from_temperature_ratio
    >>> round(float(mach_from_temperature_ratio(0.19211729424149698, 2500.0,
    ...                                         AIR_THERMALLY_PERFECT)), 12)
    5.0
    """
    cf, theta = gas_constants(gas)
    r, T0 = _prepare(T_T0, kelvin(T0))
    with np.errstate(divide="ignore", invalid="ignore"):
        M = mach_from_excess((1.0 - r) / r, T0, cf, theta)
    return np.where((r > 0.0) & (r <= 1.0), M, np.nan)


def _inverse_from_log_ratio(ratio, T0, gas, density):
    cf, theta = gas_constants(gas)
    r, T0 = _prepare(ratio, kelvin(T0))
    with np.errstate(divide="ignore", invalid="ignore"):
        d = excess_from_log_ratio(np.log(r), T0, cf, theta, density)
        M = mach_from_excess(d, T0, cf, theta)
    M = np.where(r == 1.0, 0.0, M)
    return np.where((r > 0.0) & (r <= 1.0), M, np.nan)


def mach_from_pressure_ratio(p_p0, T0, gas):
    """Plain core: M from p/p0 in (0, 1] at stagnation temperature T0 [K].

    Solves (φ(T) - φ(T0))/R = ln(p/p0) for T (bracketed Newton in ln(T0/T)).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import mach_from_pressure_ratio
    >>> round(float(mach_from_pressure_ratio(0.001332940245956457, 2500.0,
    ...                                      AIR_THERMALLY_PERFECT)), 12)
    5.0
    """
    return _inverse_from_log_ratio(p_p0, T0, gas, False)


def mach_from_density_ratio(rho_rho0, T0, gas):
    """Plain core: M from ρ/ρ0 in (0, 1] at stagnation temperature T0 [K].

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import mach_from_density_ratio
    >>> round(float(mach_from_density_ratio(0.006938158541213435, 2500.0,
    ...                                     AIR_THERMALLY_PERFECT)), 12)
    5.0
    """
    return _inverse_from_log_ratio(rho_rho0, T0, gas, True)


def mach_from_area_ratio(A_Astar, T0, gas, supersonic=True):
    """Plain core: M from A/A* >= 1 on the supersonic (default) or subsonic branch.

    Bracketed Newton in u = ln(T0/T) on the signed root sign(M - 1)·√(ln A/A*), smooth
    through the sonic point, with d ln(A/A*)/du = (c - 1)(1 - 1/M²); the bracket is
    [u*, u* + 60] (supersonic) or [0, u*] (subsonic). The start is the perfect gas at
    γ(T*). Like the perfect-gas inverse it is ill-conditioned at A/A* = 1 (dA/dM = 0).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import mach_from_area_ratio
    >>> round(float(mach_from_area_ratio(37.20382346137602, 2500.0,
    ...                                  AIR_THERMALLY_PERFECT)), 11)
    5.0
    """
    cf, theta = gas_constants(gas)
    A, T0 = _prepare(A_Astar, kelvin(T0))
    sign = 1.0 if supersonic else -1.0
    with np.errstate(all="ignore"):
        x0, E0, om0 = oscillator_terms(T0, theta)
        log_flux_star, ds = _sonic_log_flux(T0, x0, E0, om0, cf, theta)
        target = sign * np.sqrt(np.log(A))
        u_star = np.log1p(ds)
        cs = heat_capacity_over_R(*oscillator_terms(T0 / (1.0 + ds), theta), cf)
        M0 = _perfect_gas_area_inverse(A, cs / (cs - 1.0), supersonic)
        # the perfect gas at γ*: d = d* M²(γ* + 1)/(2 + (γ* - 1) M²)·... (same T*/T0)
        d0 = (1.0 + ds) * (1.0 + 0.5 * M0 * M0 / (cs - 1.0)) / (1.0 + 0.5 / (cs - 1.0)) - 1.0
        lo, hi = (u_star, u_star + _U_SPAN) if supersonic else (0.0 * u_star, u_star)
        start = np.clip(np.log1p(d0), lo, hi)

        def residual(u):
            _, log_flux, m2, c = _log_flux_terms(np.expm1(u), x0, E0, om0, cf)
            L = np.maximum(log_flux_star - log_flux, 0.0)
            root = np.sqrt(L)
            slope = (c - 1.0) * np.abs(1.0 - 1.0 / m2) / (2.0 * root)
            return np.sign(u - u_star) * root - target, slope  # increasing in u

        u = nx.safeguarded_newton(residual, start, lo, hi, increasing=True)
        M = mach_from_excess(np.expm1(u), T0, cf, theta)
    M = np.where(A == 1.0, 1.0, M)
    return np.where(A >= 1.0, M, np.nan)

