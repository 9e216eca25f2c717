"""Thermally perfect gas: the energy equation along an isentrope, in the state variable d.

Plain core only (floats and ndarrays, SI units, no pint); invalid elements come out as
NaN. The gas is a :class:`~gasdyn2d.relations.gas.Gas` with a
``vibrational_temperature`` (the harmonic-oscillator model of
:mod:`gasdyn2d.relations.gas`); its terms per unit gas constant R are written on the
oscillator terms (x, E, 1 - E) = (θv/T, e^(-θv/T), 1 - e^(-θv/T)) of
:func:`~gasdyn2d.relations.gas.oscillator_terms`.

- :func:`gas_constants` (c_f, θv) and :func:`kelvin` (a checked temperature array);
- the gas terms per unit R: :func:`heat_capacity_over_R` c = cp/R,
  :func:`enthalpy_over_R` h/R, :func:`vibrational_entropy_over_R`, and
  :func:`mean_heat_capacity_below` c̄, the mean of cp/R between T and T0;
- the state variable d = T0/T - 1 from M (:func:`excess_from_mach`), M from d
  (:func:`mach_from_excess`) and d from ln(p/p0) or ln(ρ/ρ0)
  (:func:`excess_from_log_ratio`);
- the temperatures of a stream: :func:`static_temperature`, :func:`sonic_temperature`,
  :func:`stagnation_temperature` (with :func:`stagnation_per_R`),
  :func:`temperature_from_enthalpy`.

The isentropic ratios built on these are in :mod:`gasdyn2d.relations.thermally_perfect`
(which re-exports this module's public names under their old paths), the Prandtl–Meyer
function and the centred fans in :mod:`gasdyn2d.relations.thermally_perfect_fans`.

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

Model limits: see :mod:`gasdyn2d.relations.gas` (no dissociation, vibrational
equilibrium assumed). Results are for preliminary design.

References
----------
Ames Research Staff (1953), *Equations, Tables, and Charts for Compressible
Flow*, NACA Report 1135, imperfect-gas section (from memory).
"""

from __future__ import annotations

import numpy as np

from .. import numerics as nx
from ..errors import InvalidInputError
from .gas import oscillator_terms

__all__ = [
    "gas_constants",
    "kelvin",
    "heat_capacity_over_R",
    "enthalpy_over_R",
    "vibrational_entropy_over_R",
    "mean_heat_capacity_below",
    "excess_from_mach",
    "mach_from_excess",
    "excess_from_log_ratio",
    "static_temperature",
    "sonic_temperature",
    "stagnation_per_R",
    "stagnation_temperature",
    "temperature_from_enthalpy",
]

_MACH_STEPS = 4  # Newton steps for d(M): from γ(T0)'s value, 3 reach rounding (measured)
_ENTHALPY_STEPS = 5  # Newton steps for T(h) from an upper bound (monotone; 3 reach rounding)
_ACCEPT_STEP = 1e-10  # a larger last fixed step (relative) sends the element to the fallback


def gas_constants(gas):
    """Plain core: (c_f, θv) = (cp_frozen/R [-], vibrational temperature [K]) of a
    thermally perfect :class:`~gasdyn2d.relations.gas.Gas`; raises for a perfect gas.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_energy import gas_constants
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


def heat_capacity_over_R(x, E, om, cf):
    """Plain core: c = cp/R [-] at the oscillator terms (x, E, om = 1 - E) of a temperature.

    c = c_f + x² E/(1 - E)² (harmonic oscillator in equilibrium), with c_f = cp_frozen/R
    from :func:`gas_constants` and (x, E, 1 - E) from
    :func:`~gasdyn2d.relations.gas.oscillator_terms`.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT as air, oscillator_terms
    >>> from gasdyn2d.relations.thermally_perfect_energy import (gas_constants,
    ...                                                          heat_capacity_over_R)
    >>> cf, theta = gas_constants(air)
    >>> round(float(heat_capacity_over_R(*oscillator_terms(3000.0, theta), cf)), 6)
    4.417855
    """
    return cf + x * x * E / (om * om)


def enthalpy_over_R(T, E, om, cf, theta):
    """Plain core: h/R [K] at temperature T [K] (zero at 0 K), given its oscillator terms
    (E, om = 1 - E), c_f and θv [K]: h/R = c_f T + θv E/(1 - E)."""
    return cf * T + theta * E / om


def vibrational_entropy_over_R(x, E, om):
    """Plain core: the vibrational part of the entropy function φ/R [-] at the oscillator
    terms (x, E, om = 1 - E): x E/(1 - E) - ln(1 - E)."""
    return x * E / om - np.log(om)


def _log_gamma_slope(x, E, om, c, cf):
    """T dc/dT = -c_vib (2 - x coth(x/2)), coth(x/2) = (1 + E)/(1 - E)."""
    return -(c - cf) * (2.0 - x * (1.0 + E) / om)


def mean_heat_capacity_below(x0, E0, om0, d, cf):
    """Plain core: c̄ = (h(T0) - h(T))/(R (T0 - T)) [-] for T = T0/(1 + d), with the
    oscillator terms at T; (x0, E0, om0) are those of T0.

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
    cbar, x, E, om = mean_heat_capacity_below(x0, E0, om0, d, cf)
    c = heat_capacity_over_R(x, E, om, cf)
    two_over_gamma = 2.0 * (c - 1.0) / c
    one_d = 1.0 + d
    # d c̄/dd = -(c̄ - c)/(d (1 + d)); d ln γ/dd = T c'/((c - 1) c (1 + d))
    slope = two_over_gamma * (cbar - (cbar - c) / one_d
                              - cbar * d * _log_gamma_slope(x, E, om, c, cf)
                              / ((c - 1.0) * c * one_d))
    return two_over_gamma * cbar * d - m2, slope


def excess_from_mach(M, T0, cf, theta):
    """Plain core: d = T0/T - 1 [-] at Mach M on the isentrope of stagnation temperature
    T0 [K] (plain arrays of equal shape or scalars; c_f, θv from :func:`gas_constants`).

    Fixed Newton steps on 2 c̄ d (c - 1)/c = M² from the perfect gas at γ(T0), and a
    bracketed Newton iteration for any element they leave unconverged (module docs).
    """
    x0, E0, om0 = oscillator_terms(T0, theta)
    c0 = heat_capacity_over_R(x0, E0, om0, cf)
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


# ------------------------------------------------------------------ temperatures of a stream


def _prepare(*arrays):
    return np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in arrays))


def kelvin(T):
    """Plain core: the temperature array with NaN where it is not finite and positive.

    Examples
    --------
    >>> from gasdyn2d.relations.thermally_perfect_energy import kelvin
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
    >>> from gasdyn2d.relations.thermally_perfect_energy import static_temperature
    >>> round(float(static_temperature(5.0, 2500.0, AIR_THERMALLY_PERFECT)), 4)
    480.2932
    """
    cf, theta = gas_constants(gas)
    M, T0 = _prepare(M, kelvin(T0))
    return T0 / (1.0 + excess_from_mach(M, T0, cf, theta))


def sonic_temperature(T0, gas):
    """Plain core: the sonic (throat) temperature T* [K] for stagnation temperature T0 [K].

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_energy import sonic_temperature
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
            step = (enthalpy_over_R(T, E, om, cf, theta) - H) / heat_capacity_over_R(x, E, om, cf)
            T = T - step
        retry = ~(np.abs(step) <= accept * T) & np.isfinite(H) & (H > 0)
        if nx.any_true(retry):
            H_r = np.broadcast_to(H, T.shape)[retry]

            def residual(TT):
                x, E, om = oscillator_terms(TT, theta)
                return (enthalpy_over_R(TT, E, om, cf, theta) - H_r,
                        heat_capacity_over_R(x, E, om, cf))

            T = np.array(T, dtype=float, copy=True)
            T[retry] = nx.safeguarded_newton(residual, T[retry], 0.0 * H_r,
                                             H_r / cf, increasing=True)
    return np.where(H == 0.0, 0.0, T)


def temperature_from_enthalpy(h, gas):
    """Plain core: temperature T [K] whose enthalpy h(T) (zero at 0 K) is ``h`` [J/kg].

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT as air
    >>> from gasdyn2d.relations.thermally_perfect_energy import temperature_from_enthalpy
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


def stagnation_per_R(M, T, cf, theta):
    """Plain core: (h0/R [K], T0 [K], (x, E, 1 - E, c) at T) for a stream at Mach M and
    static temperature T [K]: h0 = h(T) + M² γ(T) R T/2, T0 from h0 by Newton steps from
    the stream's own tangent bound (below :func:`temperature_from_enthalpy`'s)."""
    x, E, om = oscillator_terms(T, theta)
    c = heat_capacity_over_R(x, E, om, cf)
    H = enthalpy_over_R(T, E, om, cf, theta)
    H0 = H + 0.5 * M * M * c / (c - 1.0) * T  # + V²/(2R)
    return H0, _temperature_from_enthalpy_per_R(H0, cf, theta, (T, H, c), _STAGNATION_STEPS,
                                                _STAGNATION_ACCEPT), (x, E, om, c)


def stagnation_temperature(M, T, gas):
    """Plain core: stagnation temperature T0 [K] of a stream at Mach M and temperature T [K].

    h(T0) = h(T) + M² γ(T) R T/2, inverted by :func:`temperature_from_enthalpy`.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.relations.thermally_perfect_energy import stagnation_temperature
    >>> round(float(stagnation_temperature(5.0, 480.29323560374246, AIR_THERMALLY_PERFECT)), 6)
    2500.0
    """
    cf, theta = gas_constants(gas)
    M, T = _prepare(M, kelvin(T))
    return stagnation_per_R(M, T, cf, theta)[1]


# ------------------------------------------------------------------ M from d, d from p/p0 or ρ/ρ0


def mach_from_excess(d, T0, cf, theta):
    """Plain core: M = √(2 c̄ d (c - 1)/c) [-] at d = T0/T - 1 on the isentrope of
    stagnation temperature T0 [K] (inf at d = inf)."""
    with np.errstate(invalid="ignore", over="ignore"):
        x0, E0, om0 = oscillator_terms(T0, theta)
        cbar, x, E, om = mean_heat_capacity_below(x0, E0, om0, d, cf)
        c = heat_capacity_over_R(x, E, om, cf)
        M = np.sqrt(2.0 * cbar * d * (c - 1.0) / c)
    return np.where(d == np.inf, np.inf, M)


def excess_from_log_ratio(log_ratio, T0, cf, theta, density):
    """Plain core: d = T0/T - 1 from ln(p/p0) (or ln(ρ/ρ0) if ``density``) <= 0 at
    stagnation temperature T0 [K]: bracketed Newton in u = ln(1 + d).

    ln p/p0 = -c_f u + s_v(T) - s_v(T0) has slope -c(T) in u, between -c(T0) and -c_f, so
    u lies in [-L/c(T0), -L/c_f] (for ρ: slope -(c - 1), the same bracket with c - 1).
    """
    x0, E0, om0 = oscillator_terms(T0, theta)
    shift = 1.0 if density else 0.0
    c0 = heat_capacity_over_R(x0, E0, om0, cf)
    lo, hi = -log_ratio / (c0 - shift), -log_ratio / (cf - shift)
    sv0 = vibrational_entropy_over_R(x0, E0, om0)

    def residual(u):
        x, E, om = oscillator_terms(T0 * np.exp(-u), theta)
        value = -(cf - shift) * u + vibrational_entropy_over_R(x, E, om) - sv0 - log_ratio
        return value, -(heat_capacity_over_R(x, E, om, cf) - shift)

    with np.errstate(all="ignore"):
        u = nx.safeguarded_newton(residual, lo, lo, hi, increasing=False)
    return np.expm1(u)

