"""Thermally perfect gas (vibrational excitation): isentropic flow and Prandtl–Meyer fans.

Plain core only (floats and ndarrays, SI units, radians, no pint); invalid elements
come out as NaN. Every function takes the gas as a :class:`~gasdyn2d.relations.gas.Gas`
with a ``vibrational_temperature`` (the harmonic-oscillator model of
:mod:`gasdyn2d.relations.gas`) and the temperature that fixes the state: the
stagnation temperature T0 for isentropic flow and ν, the static temperature T1
ahead of a fan. The shocks are in
:mod:`gasdyn2d.relations.thermally_perfect_shocks` (normal) and
:mod:`gasdyn2d.relations.thermally_perfect_oblique` (oblique, and the simple-wave
primitive).

- :func:`isentropic_ratios` (M, T0) → T/T0, p/p0, ρ/ρ0, A/A*, γ; its inverses
  :func:`mach_from_temperature_ratio`, :func:`mach_from_pressure_ratio`,
  :func:`mach_from_density_ratio`, :func:`mach_from_area_ratio` (both branches) and
  :func:`mach_from_prandtl_meyer_angle` (the Mach angle needs no gas:
  M = 1/sin μ); :func:`static_temperature`, :func:`sonic_temperature`,
  :func:`stagnation_temperature`, :func:`temperature_from_enthalpy`;
- :func:`prandtl_meyer_angle` ν(M; T0) and :func:`max_prandtl_meyer_angle`;
- the centred fan from (M1, T1) and a turn, a pressure ratio or M2:
  :func:`fan_from_turn`, :func:`fan_from_pressure_ratio`, :func:`fan_from_downstream_mach`.

State variable: d = T0/T - 1
----------------------------
Along an isentrope at fixed T0 every quantity is a closed form of the static
temperature, and the variable that keeps them exact at both ends is
d = T0/T - 1 (for a perfect gas d = (γ-1)M²/2). With c̄ the mean of cp/R between
T and T0 (a divided difference of the closed-form enthalpy, free of cancellation),
the energy equation h(T0) - h(T) = V²/2 = M² γ(T) R T/2 reads

    M² = 2 c̄ d/γ(T) = 2 c̄ d (c - 1)/c,   c = cp(T)/R,

so M → 0 keeps its digits (T0 - T = T d is never formed by subtraction), and
p/p0 = exp((φ(T) - φ(T0))/R) is -c_f ln(1 + d) plus a difference of vibrational
entropies. From M, d is found by a fixed number of Newton steps from the
perfect-gas value at γ(T0) (four steps: measured to reach rounding for
T0 <= 10⁴ K, M <= 50); the inverses are closed form (from T/T0) or a bracketed
Newton iteration in u = ln(1 + d) = ln(T0/T), in which ln p, ln ρ and ln A/A*
are nearly linear (their slopes are -c, -(c - 1) and (c - 1)(1 - 1/M²)).

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
from ..errors import InvalidInputError
from .expansion_fans import mach_from_prandtl_meyer_angle as _perfect_gas_nu_inverse
from .expansion_fans import prandtl_meyer_angle as _perfect_gas_nu
from .isentropic import mach_from_area_ratio as _perfect_gas_area_inverse
from .gas import oscillator_terms

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

_MACH_STEPS = 4  # Newton steps for d(M): from γ(T0)'s value, 3 reach rounding (measured)
_ENTHALPY_STEPS = 5  # Newton steps for T(h) from an upper bound (monotone; 3 reach rounding)
_ACCEPT_STEP = 1e-10  # a larger last fixed step (relative) sends the element to the fallback
_PANEL_NODES = 24  # Gauss–Legendre points per panel of the ν quadrature (see module docs)
_FROZEN_X = 40.0  # θv/T beyond which the vibrational terms (< x² e^-x ≈ 7e-15) are dropped
_U_SPAN = 60.0  # bracket width in u = ln(T0/T) above the sonic point (T/T0 down to e^-60)

_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(_PANEL_NODES)


def gas_constants(gas):
    """Plain core: (c_f, θv) = (cp_frozen/R [-], vibrational temperature [K]) of a
    thermally perfect :class:`~gasdyn2d.relations.gas.Gas`; raises for a perfect gas.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import gas_constants
    >>> gas_constants(AIR_THERMALLY_PERFECT)
    (3.5000000000000004, 3055.6)
    """
    theta = getattr(gas, "vibrational_temperature", None)
    if theta is None:
        raise InvalidInputError(
            f"the thermally perfect relations need a Gas with a vibrational_temperature; "
            f"got {gas!r}. Use the perfect-gas relations for a perfect gas."
        )
    return gas.gamma / (gas.gamma - 1.0), theta


# ------------------------------------------------------------------ gas terms per unit R


def _heat_capacity(x, E, om, cf):
    """c = cp/R at the state (x, E, 1 - E)."""
    return cf + x * x * E / (om * om)


def _enthalpy(T, E, om, cf, theta):
    """h/R [K]."""
    return cf * T + theta * E / om


def _vibrational_entropy(x, E, om):
    """Vibrational part of φ/R: x E/(1 - E) - ln(1 - E)."""
    return x * E / om - np.log(om)


def _log_gamma_slope(x, E, om, c, cf):
    """T dc/dT = -c_vib (2 - x coth(x/2)), coth(x/2) = (1 + E)/(1 - E)."""
    return -(c - cf) * (2.0 - x * (1.0 + E) / om)


def _mean_heat_capacity_below(x0, E0, om0, d, cf):
    """c̄ = (h(T0) - h(T))/(R (T0 - T)) for T = T0/(1 + d), with the state at T.

    Divided difference of the vibrational energy θE/(1 - E), written with
    Δx = x - x0 = x0 d > 0 and em = 1 - e^(-Δx) so that nothing cancels as d → 0:
    c̄ = c_f + x x0 E0 (em/Δx)/((1 - E0)(1 - E)), E = E0 (1 - em).
    Returns (c̄, x, E, 1 - E).
    """
    dx = np.maximum(x0 * d, 1e-300)  # d = 0 (M = 0): em/Δx → 1
    em = -np.expm1(-dx)
    E0em = E0 * em
    om = om0 + E0em
    x = x0 + dx
    cbar = cf + x * x0 * E0 * (em / dx) / (om0 * om)
    return cbar, x, E0 - E0em, om


# ------------------------------------------------------------------ isentropic: d from M


def _excess_residual(d, m2, x0, E0, om0, cf):
    """Residual 2 c̄ d (c - 1)/c - M² of the energy equation in d, and its slope."""
    cbar, x, E, om = _mean_heat_capacity_below(x0, E0, om0, d, cf)
    c = _heat_capacity(x, E, om, cf)
    two_over_gamma = 2.0 * (c - 1.0) / c
    one_d = 1.0 + d
    # d c̄/dd = -(c̄ - c)/(d (1 + d)); d ln γ/dd = T c'/((c - 1) c (1 + d))
    slope = two_over_gamma * (cbar - (cbar - c) / one_d
                              - cbar * d * _log_gamma_slope(x, E, om, c, cf)
                              / ((c - 1.0) * c * one_d))
    return two_over_gamma * cbar * d - m2, slope


def _excess_from_mach(M, T0, cf, theta):
    """d = T0/T - 1 at Mach M (plain arrays of equal shape or scalars)."""
    x0, E0, om0 = oscillator_terms(T0, theta)
    c0 = _heat_capacity(x0, E0, om0, cf)
    m2 = M * M
    d = 0.5 * m2 / (c0 - 1.0)  # the perfect gas at γ(T0)
    with np.errstate(all="ignore"):
        for _ in range(_MACH_STEPS):
            residual, slope = _excess_residual(d, m2, x0, E0, om0, cf)
            step = residual / slope
            d = d - step
        retry = ~(np.abs(step) <= _ACCEPT_STEP * d) & np.isfinite(m2) & (m2 > 0) & (x0 > 0)
        if nx.any_true(retry):
            d = _excess_fallback(d, retry, m2, x0, E0, om0, cf)
        return np.where(M == np.inf, np.inf, d)


def _excess_fallback(d, retry, m2, x0, E0, om0, cf):
    """Bracketed Newton for the elements the fixed steps left unconverged.

    c_f <= c̄ <= c_f + 1 and γ between 1 and γ_f bound d to
    [M²/(2(c_f + 1)), M²/(2(c_f - 1))] (the frozen perfect gas is the upper end).
    """
    shape = np.broadcast(d, m2, x0).shape
    d = np.array(np.broadcast_to(d, shape), dtype=float)
    m, x, E, om = (np.broadcast_to(a, shape)[retry] for a in (m2, x0, E0, om0))
    lo, hi = 0.5 * m / (cf + 1.0), 0.5 * m / (cf - 1.0)
    d[retry] = nx.safeguarded_newton(lambda dd: _excess_residual(dd, m, x, E, om, cf),
                                     np.clip(d[retry], lo, hi), lo, hi, increasing=True)
    return d


def _prepare(*arrays):
    return np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in arrays))


def kelvin(T):
    """Plain core: the temperature array with NaN where it is not finite and positive.

    Examples
    --------
    >>> from gasdyn2d.relations.thermally_perfect import kelvin
    >>> kelvin([300.0, 0.0, -5.0, float("inf")])
    array([300.,  nan,  nan,  nan])
    """
    T = np.asarray(T, dtype=float)
    with np.errstate(invalid="ignore"):
        good = (T > 0.0) & (T < np.inf)
    return T if good.all() else np.where(good, T, np.nan)


def static_temperature(M, T0, gas):
    """Plain core: static temperature T [K] at Mach M for stagnation temperature T0 [K].

    Solves h(T0) = h(T) + M² γ(T) R T/2 by Newton steps in d = T0/T - 1 (module docs).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import static_temperature
    >>> round(float(static_temperature(5.0, 2500.0, AIR_THERMALLY_PERFECT)), 4)
    480.2932
    """
    cf, theta = gas_constants(gas)
    M, T0 = _prepare(M, kelvin(T0))
    return T0 / (1.0 + _excess_from_mach(M, T0, cf, theta))


def sonic_temperature(T0, gas):
    """Plain core: the sonic (throat) temperature T* [K] for stagnation temperature T0 [K].

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import sonic_temperature
    >>> round(float(sonic_temperature(300.0, AIR_THERMALLY_PERFECT)), 3)  # 250 K if perfect
    250.027
    """
    return static_temperature(1.0, T0, gas)


def _temperature_from_enthalpy_per_R(H, cf, theta, below=None, steps=_ENTHALPY_STEPS,
                                     accept=_ACCEPT_STEP):
    """T [K] from h/R [K]: Newton from an upper bound, monotone since h is convex in T.

    h >= c_f T and, because 1/(e^x - 1) >= 1/x - 1/2, h >= (c_f + 1) T - R θ/2: both
    T <= H/c_f and T <= (H + θ/2)/(c_f + 1); the smaller is the start, and Newton on a
    convex increasing function from above never overshoots the root. ``below``: a known
    state (T1, h1/R, c1) below the root gives a third, much closer bound
    T <= T1 + (H - h1)/c1 (the tangent at T1 lies below the convex h).
    """
    T = np.minimum(H / cf, (H + 0.5 * theta) / (cf + 1.0))
    if below is not None:
        T1, H1, c1 = below
        T = np.minimum(T, T1 + (H - H1) / c1)
    with np.errstate(all="ignore"):
        for _ in range(steps):
            x, E, om = oscillator_terms(T, theta)
            step = (_enthalpy(T, E, om, cf, theta) - H) / _heat_capacity(x, E, om, cf)
            T = T - step
        retry = ~(np.abs(step) <= accept * T) & np.isfinite(H) & (H > 0)
        if nx.any_true(retry):
            H_r = np.broadcast_to(H, T.shape)[retry]

            def residual(TT):
                x, E, om = oscillator_terms(TT, theta)
                return _enthalpy(TT, E, om, cf, theta) - H_r, _heat_capacity(x, E, om, cf)

            T = np.array(T, dtype=float, copy=True)
            T[retry] = nx.safeguarded_newton(residual, T[retry], 0.0 * H_r,
                                             H_r / cf, increasing=True)
    return np.where(H == 0.0, 0.0, T)


def temperature_from_enthalpy(h, gas):
    """Plain core: temperature T [K] whose enthalpy h(T) (zero at 0 K) is ``h`` [J/kg].

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT as air
    >>> from gasdyn2d.relations.thermally_perfect import temperature_from_enthalpy
    >>> round(float(temperature_from_enthalpy(air.enthalpy(2000.0), air)), 9)
    2000.0
    """
    cf, theta = gas_constants(gas)
    h = np.asarray(h, dtype=float)
    with np.errstate(invalid="ignore"):
        h = np.where((h >= 0.0) & (h < np.inf), h, np.nan)
    return _temperature_from_enthalpy_per_R(h / gas.R, cf, theta)


#: Newton steps for T0 from the stream's own tangent bound, and the last step accepted
#: (relative): from above the error after a step s is at most (T c'/2c) s² <= 0.15 s² (h
#: convex), so a last step of 2e-8 leaves < 1e-16; from a start within 4 % (the tangent
#: bound at M <= 20, T <= 6000 K, measured) three steps reach it
_STAGNATION_STEPS = 3
_STAGNATION_ACCEPT = 2e-8


def _stagnation_per_R(M, T, cf, theta):
    """(h0/R [K], T0 [K], state terms at T) for a stream (M, T)."""
    x, E, om = oscillator_terms(T, theta)
    c = _heat_capacity(x, E, om, cf)
    H = _enthalpy(T, E, om, cf, theta)
    H0 = H + 0.5 * M * M * c / (c - 1.0) * T  # + V²/(2R)
    return H0, _temperature_from_enthalpy_per_R(H0, cf, theta, (T, H, c), _STAGNATION_STEPS,
                                                _STAGNATION_ACCEPT), (x, E, om, c)


def stagnation_temperature(M, T, gas):
    """Plain core: stagnation temperature T0 [K] of a stream at Mach M and temperature T [K].

    h(T0) = h(T) + M² γ(T) R T/2, inverted by :func:`temperature_from_enthalpy`.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import stagnation_temperature
    >>> round(float(stagnation_temperature(5.0, 480.29323560374246, AIR_THERMALLY_PERFECT)), 6)
    2500.0
    """
    cf, theta = gas_constants(gas)
    M, T = _prepare(M, kelvin(T))
    return _stagnation_per_R(M, T, cf, theta)[1]


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
    cbar, x, E, om = _mean_heat_capacity_below(x0, E0, om0, d, cf)
    c = _heat_capacity(x, E, om, cf)
    log_T0_T = np.log1p(d)
    # (φ(T) - φ(T0))/R: c_f ln(T/T0) plus the vibrational entropy difference
    log_p = -cf * log_T0_T + _vibrational_entropy(x, E, om) - _vibrational_entropy(x0, E0, om0)
    gamma = c / (c - 1.0)
    m2 = 2.0 * cbar * d / gamma
    # ln ρV = ln(p/p0) + ln(T0/T) + ln M + ½ ln(γ T/T0) = ln(p/p0) + ½ ln(T0/T) + ½ ln(M² γ)
    return log_p, log_p + 0.5 * log_T0_T + 0.5 * np.log(m2 * gamma), m2, c


def _sonic_log_flux(T0, x0, E0, om0, cf, theta):
    ds = _excess_from_mach(np.ones_like(T0), T0, cf, theta)
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
        ratios = _ratios_from_excess(_excess_from_mach(m, t0, cf, theta), t0, cf, theta)
        return ratios._replace(M=m.copy(), A_Astar=np.where(m == 0.0, np.inf, ratios.A_Astar))

    return nx.chunked(block, M, T0)


def _mach_from_excess(d, T0, cf, theta):
    """M = √(2 c̄ d (c - 1)/c) at d = T0/T - 1 (inf at d = inf)."""
    with np.errstate(invalid="ignore", over="ignore"):
        x0, E0, om0 = oscillator_terms(T0, theta)
        cbar, x, E, om = _mean_heat_capacity_below(x0, E0, om0, d, cf)
        c = _heat_capacity(x, E, om, cf)
        M = np.sqrt(2.0 * cbar * d * (c - 1.0) / c)
    return np.where(d == np.inf, np.inf, M)


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
        M = _mach_from_excess((1.0 - r) / r, T0, cf, theta)
    return np.where((r > 0.0) & (r <= 1.0), M, np.nan)


def _isentropic_log_ratio_excess(log_ratio, T0, cf, theta, density):
    """d from ln(p/p0) (or ln(ρ/ρ0) if ``density``) <= 0: bracketed Newton in u = ln(1 + d).

    ln p/p0 = -c_f u + s_v(T) - s_v(T0) has slope -c(T) in u, between -c(T0) and -c_f, so
    u lies in [-L/c(T0), -L/c_f] (for ρ: slope -(c - 1), the same bracket with c - 1).
    """
    x0, E0, om0 = oscillator_terms(T0, theta)
    shift = 1.0 if density else 0.0
    c0 = _heat_capacity(x0, E0, om0, cf)
    lo, hi = -log_ratio / (c0 - shift), -log_ratio / (cf - shift)
    sv0 = _vibrational_entropy(x0, E0, om0)

    def residual(u):
        x, E, om = oscillator_terms(T0 * np.exp(-u), theta)
        value = -(cf - shift) * u + _vibrational_entropy(x, E, om) - sv0 - log_ratio
        return value, -(_heat_capacity(x, E, om, cf) - shift)

    with np.errstate(all="ignore"):
        u = nx.safeguarded_newton(residual, lo, lo, hi, increasing=False)
    return np.expm1(u)


def _inverse_from_log_ratio(ratio, T0, gas, density):
    cf, theta = gas_constants(gas)
    r, T0 = _prepare(ratio, kelvin(T0))
    with np.errstate(divide="ignore", invalid="ignore"):
        d = _isentropic_log_ratio_excess(np.log(r), T0, cf, theta, density)
        M = _mach_from_excess(d, T0, cf, theta)
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
        cs = _heat_capacity(*oscillator_terms(T0 / (1.0 + ds), theta), cf)
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
        M = _mach_from_excess(np.expm1(u), T0, cf, theta)
    M = np.where(A == 1.0, 1.0, M)
    return np.where(A >= 1.0, M, np.nan)


# ------------------------------------------------------------------ Prandtl–Meyer


def _integrand(T, H0, cf, theta):
    """√(M² - 1) c/(V²/R) [1/K] at temperature T on the isentrope of h0/R = H0."""
    x, E, om = oscillator_terms(T, theta)
    c = _heat_capacity(x, E, om, cf)
    V2 = 2.0 * (H0 - _enthalpy(T, E, om, cf, theta))  # V²/R [K]
    m2 = V2 * (c - 1.0) / (c * T)
    return np.sqrt(np.maximum(m2 - 1.0, 0.0)) * c / V2


def _nu_of_excess(d, T0, ds, cf, theta):
    """ν [rad] at d = T0/T - 1 (inf for T = 0) for T0, sonic d* = ``ds`` (module docs)."""
    with np.errstate(all="ignore"):
        x0, E0, om0 = oscillator_terms(T0, theta)
        H0 = _enthalpy(T0, E0, om0, cf, theta)
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
    return _excess_from_mach(np.ones_like(T0), T0, cf, theta)


def prandtl_meyer_angle(M, T0, gas):
    """Plain core: Prandtl–Meyer function ν(M) [rad] at stagnation temperature T0 [K].

    ν = ∫ √(M² - 1) dV/V from the sonic state along the isentrope, by the two-panel
    Gauss–Legendre rule and frozen tail of the module docs (<= 2e-14 relative, measured).
    NaN for M < 1; M = inf gives :func:`max_prandtl_meyer_angle`.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect import prandtl_meyer_angle
    >>> round(float(np.degrees(prandtl_meyer_angle(2.0, 300.0, AIR_THERMALLY_PERFECT))), 4)
    26.3813
    """
    cf, theta = gas_constants(gas)
    M, T0 = _prepare(M, kelvin(T0))

    def block(m, t0):
        return _nu_of_excess(_excess_from_mach(m, t0, cf, theta), t0,
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
    >>> from gasdyn2d.relations.thermally_perfect import max_prandtl_meyer_angle
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
        cs = _heat_capacity(*oscillator_terms(T0 / (1.0 + ds), theta), cf)
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
            cbar, x, E, om = _mean_heat_capacity_below(x0, E0, om0, d, cf)
            c = _heat_capacity(x, E, om, cf)
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
    >>> from gasdyn2d.relations.thermally_perfect import mach_from_prandtl_meyer_angle
    >>> round(float(mach_from_prandtl_meyer_angle(0.46044052413902887, 300.0,
    ...                                           AIR_THERMALLY_PERFECT)), 12)
    2.0
    """
    cf, theta = gas_constants(gas)
    nu, T0 = _prepare(nu, kelvin(T0))
    d = _excess_from_nu(nu, T0, cf, theta)
    M = _mach_from_excess(d, T0, cf, theta)
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
    H0, T0, (x1, E1, om1, c1) = _stagnation_per_R(M1, T1, cf, theta)
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
        log_p = cf * log_T + _vibrational_entropy(x2, E2, om2) - _vibrational_entropy(x1, E1, om1)
        c1 = _heat_capacity(x1, E1, om1, cf)
        c2 = _heat_capacity(x2, E2, om2, cf)
        M2 = _mach_from_excess(d2, T0, cf, theta)
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
    >>> from gasdyn2d.relations.thermally_perfect import fan_from_turn
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
    >>> from gasdyn2d.relations.thermally_perfect import isentropic_compression_from_turn
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
    >>> from gasdyn2d.relations.thermally_perfect import fan_from_pressure_ratio
    >>> round(float(fan_from_pressure_ratio(2.0, 1500.0, 0.571028791264424,
    ...                                     AIR_THERMALLY_PERFECT).M2), 5)
    2.33679
    """
    cf, theta = gas_constants(gas)
    M1, T1, p = _prepare(M1, kelvin(T1), p2_p1)
    T0, d1, ds, nu1, terms1 = _upstream(M1, T1, cf, theta)
    with np.errstate(all="ignore"):
        # T1/T2 = 1 + d' with d' from the pressure ratio relative to T1 (as p/p0 to T0)
        d_rel = _isentropic_log_ratio_excess(np.log(p), T1, cf, theta, False)
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
    >>> from gasdyn2d.relations.thermally_perfect import fan_from_downstream_mach
    >>> fan = fan_from_downstream_mach(2.0, 1500.0, 2.3367873735080775, AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(fan.turn)), 4)
    10.0
    """
    cf, theta = gas_constants(gas)
    M1, T1, M2 = _prepare(M1, kelvin(T1), M2)
    T0, d1, ds, nu1, terms1 = _upstream(M1, T1, cf, theta)
    with np.errstate(invalid="ignore"):
        d2 = np.where(M2 >= M1, _excess_from_mach(M2, T0, cf, theta), np.nan)
        nu2 = _nu_of_excess(d2, T0, ds, cf, theta)
    return _fan_state(T0, T1, d2, nu2 - nu1, terms1, cf, theta, nu1, nu2)
