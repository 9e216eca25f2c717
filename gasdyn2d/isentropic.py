"""Isentropic flow of a perfect gas: static-to-stagnation ratios, A/A*, Mach angle.

Plain core (floats and ndarrays, no pint): :func:`temperature_ratio`,
:func:`pressure_ratio`, :func:`density_ratio`, :func:`area_ratio`,
:func:`mach_angle_of` and the inverses :func:`mach_from_temperature_ratio`,
:func:`mach_from_pressure_ratio`, :func:`mach_from_density_ratio`,
:func:`mach_from_area_ratio`. Unit boundary: :func:`isentropic_flow`.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from . import _numerics as nx
from ._display import ResultTable, unit_field

__all__ = [
    "isentropic_flow",
    "IsentropicFlow",
    "temperature_ratio",
    "pressure_ratio",
    "density_ratio",
    "area_ratio",
    "mach_angle_of",
    "mach_from_temperature_ratio",
    "mach_from_pressure_ratio",
    "mach_from_density_ratio",
    "mach_from_area_ratio",
]


# ------------------------------------------------------------------ plain core


def _log_stagnation_temperature_ratio(M, gamma):
    """ln(T0/T) = ln(1 + (γ-1)M²/2)."""
    return np.log1p(0.5 * (gamma - 1.0) * M * M)


def temperature_ratio(M, gamma=1.4):
    """T/T0 = 1/(1 + (γ-1)M²/2)  (NACA Report 1135, eq. 43)."""
    M = np.asarray(M, dtype=float)
    return 1.0 / (1.0 + 0.5 * (gamma - 1.0) * M * M)


def pressure_ratio(M, gamma=1.4):
    """p/p0 = (1 + (γ-1)M²/2)^(-γ/(γ-1))  (NACA Report 1135, eq. 44)."""
    M = np.asarray(M, dtype=float)
    return np.exp(-gamma / (gamma - 1.0) * _log_stagnation_temperature_ratio(M, gamma))


def density_ratio(M, gamma=1.4):
    """ρ/ρ0 = (1 + (γ-1)M²/2)^(-1/(γ-1))  (NACA Report 1135, eq. 45)."""
    M = np.asarray(M, dtype=float)
    return np.exp(-1.0 / (gamma - 1.0) * _log_stagnation_temperature_ratio(M, gamma))


def _log_area_ratio(M, gamma):
    """ln(A/A*) = -ln M + (γ+1)/(2(γ-1)) ln(1 + (γ-1)(M²-1)/(γ+1))."""
    exponent = 0.5 * (gamma + 1.0) / (gamma - 1.0)
    return -np.log(M) + exponent * np.log1p((gamma - 1.0) * (M - 1.0) * (M + 1.0) / (gamma + 1.0))


def area_ratio(M, gamma=1.4):
    """A/A* = (1/M)[(2 + (γ-1)M²)/(γ+1)]^((γ+1)/(2(γ-1)))  (NACA Report 1135, eq. 80)."""
    M = np.asarray(M, dtype=float)
    with np.errstate(divide="ignore", over="ignore"):  # A/A* → ∞ as M → 0 (inf is exact)
        return np.exp(_log_area_ratio(M, gamma))


def mach_angle_of(M):
    """μ = asin(1/M) [rad] for M >= 1 (NaN below), as atan2(1, √(M²-1)) for accuracy near M = 1."""
    M = np.asarray(M, dtype=float)
    with np.errstate(invalid="ignore"):
        return np.arctan2(1.0, np.sqrt((M - 1.0) * (M + 1.0)))


def mach_from_temperature_ratio(T_T0, gamma=1.4):
    """M = √(2(1 - T/T0)/((γ-1) T/T0)) for 0 < T/T0 <= 1."""
    T_T0 = np.asarray(T_T0, dtype=float)
    with np.errstate(divide="ignore"):
        return np.sqrt(2.0 * (1.0 - T_T0) / ((gamma - 1.0) * T_T0))


def _mach_from_log_stagnation_temperature(log_T0_T, gamma):
    return np.sqrt(2.0 / (gamma - 1.0) * np.expm1(log_T0_T))


def mach_from_pressure_ratio(p_p0, gamma=1.4):
    """M from p/p0 in (0, 1] (closed form through T0/T = (p0/p)^((γ-1)/γ))."""
    p_p0 = np.asarray(p_p0, dtype=float)
    with np.errstate(divide="ignore"):
        return _mach_from_log_stagnation_temperature(-(gamma - 1.0) / gamma * np.log(p_p0), gamma)


def mach_from_density_ratio(rho_rho0, gamma=1.4):
    """M from ρ/ρ0 in (0, 1] (closed form through T0/T = (ρ0/ρ)^(γ-1))."""
    rho_rho0 = np.asarray(rho_rho0, dtype=float)
    with np.errstate(divide="ignore"):
        return _mach_from_log_stagnation_temperature(-(gamma - 1.0) * np.log(rho_rho0), gamma)


def mach_from_area_ratio(A_Astar, gamma=1.4, supersonic=True):
    """M from A/A* >= 1 on the supersonic (default) or subsonic branch.

    Safeguarded Newton iteration on G(M) = sign(M-1)·√(ln A/A*), which is
    smooth and monotonic through M = 1 (so the sonic end is well conditioned),
    started from the near-sonic expansion ln A/A* ≈ 2(M-1)²/(γ+1) or the
    far-field asymptote, whichever is closer. Converges to rounding.
    """
    A, gamma = np.broadcast_arrays(
        np.asarray(A_Astar, dtype=float), np.asarray(gamma, dtype=float)
    )
    exponent = 0.5 * (gamma + 1.0) / (gamma - 1.0)
    with np.errstate(all="ignore"):
        target = np.sqrt(np.log(A))
        near_sonic = np.sqrt(0.5 * (gamma + 1.0)) * target
        if supersonic:
            far = (A * ((gamma + 1.0) / (gamma - 1.0)) ** exponent) ** (0.5 * (gamma - 1.0))
            lower, upper = np.ones_like(A), np.maximum(far, 1.0 + near_sonic)
            start = np.minimum(far, 1.0 + near_sonic)
            sign = 1.0
        else:
            far = (2.0 / (gamma + 1.0)) ** exponent / A
            lower, upper = np.zeros_like(A), np.ones_like(A)
            start = np.clip(np.maximum(far, 1.0 - near_sonic), 1e-300, 1.0)
            sign = -1.0
        slope_at_sonic = np.sqrt(2.0 / (gamma + 1.0))

        def residual(M):
            log_area = np.maximum(_log_area_ratio(M, gamma), 0.0)
            root = np.sqrt(log_area)
            dlog = 2.0 * (M - 1.0) * (M + 1.0) / (M * (2.0 + (gamma - 1.0) * M * M))
            slope = np.where(root > 1e-7, dlog / (2.0 * root) * sign, slope_at_sonic)
            return sign * root - sign * target, slope

        M = nx.safeguarded_newton(residual, start, lower, upper)
    M = np.where(A == 1.0, 1.0, M)
    return np.where(A < 1.0, np.nan, M)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class IsentropicFlow(ResultTable):
    """Isentropic state of a perfect gas at one Mach number.

    Angles are in radians (Quantities when the input was a Quantity); the Mach
    angle and Prandtl–Meyer angle are NaN for subsonic flow, where they do not
    exist.
    """

    M: object = unit_field("")  #: Mach number
    T_T0: object = unit_field("")  #: static over stagnation temperature
    p_p0: object = unit_field("")  #: static over stagnation pressure
    rho_rho0: object = unit_field("")  #: static over stagnation density
    A_Astar: object = unit_field("")  #: area over sonic-throat area
    mach_angle: object = unit_field("rad")  #: μ = asin(1/M)
    prandtl_meyer: object = unit_field("rad")  #: ν(M)


def _mach_from_input(name, value, gamma, branch, errors):
    """Check the single given input and turn it into a Mach number."""
    from .expansion import _check_nu, mach_from_prandtl_meyer_angle

    with np.errstate(invalid="ignore"):
        if name == "M":
            return nx.check_nonnegative_mach(value, "M", errors)
        if name in ("T_T0", "p_p0", "rho_rho0"):
            value = nx.reject(~(value > 0) | (value > 1), value, name,
                              "in (0, 1] (a static-to-stagnation ratio)", errors)
            inverse = {"T_T0": mach_from_temperature_ratio, "p_p0": mach_from_pressure_ratio,
                       "rho_rho0": mach_from_density_ratio}[name]
            return inverse(value, gamma)
        if name == "A_Astar":
            value = nx.reject((value < 1) | np.isinf(value), value, "A_Astar",
                              "finite and >= 1 (no section is smaller than the sonic throat)",
                              errors)
            return mach_from_area_ratio(value, gamma, supersonic=(branch == "supersonic"))
        if name == "mach_angle":
            value = nx.reject(~(value > 0) | (value > np.pi / 2), value, "mach_angle",
                              "in (0, π/2] rad (0 to 90°)", errors)
            return 1.0 / np.sin(value)
        value = _check_nu(value, gamma, "prandtl_meyer", errors)
        return mach_from_prandtl_meyer_angle(value, gamma)


def isentropic_flow(M=None, *, T_T0=None, p_p0=None, rho_rho0=None, A_Astar=None,
                    mach_angle=None, prandtl_meyer=None, branch="supersonic", gamma=1.4,
                    errors="raise"):
    """Isentropic ratios at a Mach number, or the Mach number from any one of them.

    Parameters
    ----------
    M : float or array_like, optional
        Mach number [-], >= 0.
    T_T0, p_p0, rho_rho0 : float or array_like, optional
        Static over stagnation temperature, pressure or density [-], in (0, 1].
    A_Astar : float or array_like, optional
        Area over sonic-throat area [-], >= 1; ``branch`` picks the root.
    mach_angle : float, array_like or Quantity, optional
        Mach angle μ [rad], in (0, π/2].
    prandtl_meyer : float, array_like or Quantity, optional
        Prandtl–Meyer angle ν [rad], in [0, ν_max].
    branch : {"supersonic", "subsonic"}, optional
        Root of the area-ratio inverse (ignored for other inputs).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    IsentropicFlow

    Raises
    ------
    InvalidInputError
        No or several inputs, a value outside the range above, gamma <= 1,
        a wrong unit, or shapes that do not broadcast.

    Notes
    -----
    T/T0 = (1 + (γ-1)M²/2)⁻¹, p/p0 = (T/T0)^(γ/(γ-1)), ρ/ρ0 = (T/T0)^(1/(γ-1)),
    A/A* = (1/M)[(2 + (γ-1)M²)/(γ+1)]^((γ+1)/(2(γ-1))). Inverses from T/T0,
    p/p0, ρ/ρ0 and μ are closed forms; A/A* is inverted by a safeguarded
    Newton iteration and ν by :func:`~gasdyn2d.mach_from_prandtl_meyer`.

    References
    ----------
    Ames Research Staff (1953), *Equations, Tables, and Charts for
    Compressible Flow*, NACA Report 1135, eqs. 43-45 and 80.

    Examples
    --------
    >>> from gasdyn2d import isentropic_flow
    >>> flow = isentropic_flow(2.0)
    >>> round(flow.p_p0, 6), round(flow.A_Astar, 4)
    (0.127805, 1.6875)
    >>> round(isentropic_flow(A_Astar=1.6875).M, 6)
    2.0
    >>> round(isentropic_flow(A_Astar=1.6875, branch="subsonic").M, 4)
    0.3722
    """
    from .expansion import prandtl_meyer_angle

    nx.check_errors_mode(errors)
    nx.check_branch(branch, ("supersonic", "subsonic"))
    inputs = {"M": M, "T_T0": T_T0, "p_p0": p_p0, "rho_rho0": rho_rho0, "A_Astar": A_Astar,
              "mach_angle": mach_angle, "prandtl_meyer": prandtl_meyer}
    name, value = nx.exactly_one(inputs, "isentropic_flow")
    is_angle = name in ("mach_angle", "prandtl_meyer")
    value, unit = nx.to_si(value, name, "angle" if is_angle else "dimensionless")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    value, gamma = nx.broadcast(**{name: value}, gamma=gamma)
    gamma = nx.check_gamma(gamma, errors)
    Mach = _mach_from_input(name, value, gamma, branch, errors)
    Mach = np.where(np.isnan(gamma), np.nan, Mach)
    angle_unit = nx.output_angle_unit(unit if is_angle else None, unit)
    sonic_or_more = nx.clamp_to_limit(Mach, 1.0, "lower")  # M = 1 - ulp from an inverse has μ, ν
    s = nx.scalar_or_array
    return IsentropicFlow(
        M=s(Mach),
        T_T0=s(value if name == "T_T0" else temperature_ratio(Mach, gamma)),
        p_p0=s(value if name == "p_p0" else pressure_ratio(Mach, gamma)),
        rho_rho0=s(value if name == "rho_rho0" else density_ratio(Mach, gamma)),
        A_Astar=s(value if name == "A_Astar" else area_ratio(Mach, gamma)),
        mach_angle=nx.angle_out(
            s(value if name == "mach_angle" else mach_angle_of(sonic_or_more)), angle_unit),
        prandtl_meyer=nx.angle_out(
            s(value if name == "prandtl_meyer" else prandtl_meyer_angle(sonic_or_more, gamma)),
            angle_unit),
    )
