"""Isentropic flow of a perfect gas: static-to-stagnation ratios, A/A*, Mach angle.

Plain core (floats and ndarrays, no pint): :func:`temperature_ratio`,
:func:`pressure_ratio`, :func:`density_ratio`, :func:`area_ratio`,
:func:`mach_angle_of` and the inverses :func:`mach_from_temperature_ratio`,
:func:`mach_from_pressure_ratio`, :func:`mach_from_density_ratio`,
:func:`mach_from_area_ratio`. Unit boundary: :func:`isentropic_flow`.

Each plain core has a scalar form on the math module right after it (the same
algorithm, floats in and out); the array form hands plain floats to it. Huge
Mach numbers (up to 1e300 and inf) give the limits, without overflow warnings.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from .. import numerics as nx
from ..boundary import SCALAR_CHECKS, Call, ResultTable, choice, clamp_to_limit, one_of, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..boundary.units import TWO_PI
from ..numerics import nan_where_nan
from .gas import gas_of_call
from .prandtl_meyer_function import (
    check_prandtl_meyer_angle,
    mach_from_prandtl_meyer_angle,
    prandtl_meyer_angle,
    prandtl_meyer_degree_limit,
    prandtl_meyer_of_root,
)
from .prandtl_meyer_function import mach_angle_of, mach_from_mach_angle  # re-exported here
from .area_ratio import area_ratio, mach_from_area_ratio  # re-exported here

__all__ = [
    "isentropic_flow",
    "IsentropicFlow",
    "temperature_ratio",
    "pressure_ratio",
    "density_ratio",
    "area_ratio",
    "mach_angle_of",
    "mach_from_mach_angle",
    "mach_from_temperature_ratio",
    "mach_from_pressure_ratio",
    "mach_from_density_ratio",
    "mach_from_area_ratio",
    "mach_after_isentropic_pressure_change",
    "log_stagnation_temperature_ratio",
]

#: Above this Mach number M² may overflow: the relations switch to logarithmic forms
#: (1e150² = 1e300 leaves room for the constants multiplying it).
HUGE_MACH = nx.HUGE_MACH  # above this M² may overflow (the large-M forms take over)
_HUGE_LOG = 700.0  # exp of more than this overflows (709.78): take the square root first


# ------------------------------------------------------------------ plain core


def log_stagnation_temperature_ratio(M, gamma=1.4):
    """Plain core: ln(T0/T) = ln(1 + (γ-1)M²/2) [-], with no overflow for any M.

    Above M = 1e150 (where M² may overflow) it is 2 ln M + ln((γ-1)/2); the
    dropped term ln(1 + 2/((γ-1)M²)) is below 1e-299. M = inf gives inf.

    Examples
    --------
    >>> from gasdyn2d.relations.isentropic import log_stagnation_temperature_ratio
    >>> round(float(log_stagnation_temperature_ratio(1e200)), 6)  # 2 ln 1e200 + ln 0.2
    919.424599
    """
    if nx.plain_scalars(M, gamma):
        return _log_stagnation_temperature_ratio_scalar(M, gamma)
    M = np.asarray(M, dtype=float)
    h = 0.5 * (gamma - 1.0)
    huge = M > HUGE_MACH
    if not nx.any_true(huge):
        return np.log1p(h * M * M)
    log_huge = 2.0 * np.log(np.where(huge, M, 1.0)) + np.log(h)
    return np.where(huge, log_huge, log_stagnation_temperature_ratio(np.where(huge, 2.0, M), gamma))


def _log_stagnation_temperature_ratio_scalar(M, gamma):
    """Scalar form of :func:`log_stagnation_temperature_ratio` (math module)."""
    h = 0.5 * (gamma - 1.0)
    if M > HUGE_MACH:
        return 2.0 * nx.flog(M) + nx.flog(h)
    return nx.flog1p(h * M * M)

def temperature_ratio(M, gamma=1.4):
    """T/T0 = 1/(1 + (γ-1)M²/2)  (NACA Report 1135, eq. 43)."""
    if nx.plain_scalars(M, gamma):
        return _temperature_ratio_scalar(M, gamma)
    M = np.asarray(M, dtype=float)
    huge = M > HUGE_MACH
    if nx.any_true(huge):  # 1/((γ-1)M²/2) without forming M², down to 0 at M = inf
        return np.where(huge, np.exp(-log_stagnation_temperature_ratio(M, gamma)),
                        temperature_ratio(np.where(huge, 2.0, M), gamma))
    return 1.0 / (1.0 + 0.5 * (gamma - 1.0) * M * M)


def _temperature_ratio_scalar(M, gamma):
    if M > HUGE_MACH:
        return nx.fexp(-_log_stagnation_temperature_ratio_scalar(M, gamma))
    return nx.fdiv(1.0, 1.0 + 0.5 * (gamma - 1.0) * M * M)

def pressure_ratio(M, gamma=1.4):
    """p/p0 = (1 + (γ-1)M²/2)^(-γ/(γ-1))  (NACA Report 1135, eq. 44)."""
    if nx.plain_scalars(M, gamma):
        return _pressure_ratio_scalar(M, gamma)
    M = np.asarray(M, dtype=float)
    return np.exp(-gamma / (gamma - 1.0) * log_stagnation_temperature_ratio(M, gamma))


def _pressure_ratio_scalar(M, gamma):
    exponent = nx.fdiv(gamma, gamma - 1.0)
    return nx.fexp(-exponent * _log_stagnation_temperature_ratio_scalar(M, gamma))

def density_ratio(M, gamma=1.4):
    """ρ/ρ0 = (1 + (γ-1)M²/2)^(-1/(γ-1))  (NACA Report 1135, eq. 45)."""
    if nx.plain_scalars(M, gamma):
        return _density_ratio_scalar(M, gamma)
    M = np.asarray(M, dtype=float)
    return np.exp(-1.0 / (gamma - 1.0) * log_stagnation_temperature_ratio(M, gamma))


def _density_ratio_scalar(M, gamma):
    return nx.fexp(-nx.fdiv(1.0, gamma - 1.0) * _log_stagnation_temperature_ratio_scalar(M, gamma))

def mach_from_temperature_ratio(T_T0, gamma=1.4):
    """M = √(2(1 - T/T0)/((γ-1) T/T0)) for 0 < T/T0 <= 1."""
    if nx.plain_scalars(T_T0, gamma):
        return _mach_from_temperature_ratio_scalar(T_T0, gamma)
    T_T0 = np.asarray(T_T0, dtype=float)
    with np.errstate(divide="ignore", over="ignore"):
        tiny = T_T0 < 1e-300
        if nx.any_true(tiny):  # √T apart, so that a subnormal T/T0 cannot overflow
            return np.where(tiny, np.sqrt(2.0 * (1.0 - T_T0) / (gamma - 1.0)) / np.sqrt(T_T0),
                            np.sqrt(2.0 * (1.0 - T_T0) / ((gamma - 1.0) * T_T0)))
        return np.sqrt(2.0 * (1.0 - T_T0) / ((gamma - 1.0) * T_T0))


def _mach_from_temperature_ratio_scalar(T_T0, gamma):
    if T_T0 < 1e-300:
        return nx.fdiv(nx.fsqrt(nx.fdiv(2.0 * (1.0 - T_T0), gamma - 1.0)), nx.fsqrt(T_T0))
    return nx.fsqrt(nx.fdiv(2.0 * (1.0 - T_T0), (gamma - 1.0) * T_T0))

def _mach_from_log_stagnation_temperature(log_T0_T, gamma):
    """M = √(2 (T0/T - 1)/(γ-1)) from ln(T0/T); past ln(T0/T) = 700 as
    √(2/(γ-1)) e^(L/2) √(1 - e^(-L)), which overflows only when M does."""
    huge = np.asarray(log_T0_T) > _HUGE_LOG
    if nx.any_true(huge):
        with np.errstate(over="ignore"):
            return np.where(huge, np.sqrt(2.0 / (gamma - 1.0) * -np.expm1(-log_T0_T))
                            * np.exp(0.5 * log_T0_T),
                            np.sqrt(2.0 / (gamma - 1.0) * np.expm1(log_T0_T)))
    return np.sqrt(2.0 / (gamma - 1.0) * np.expm1(log_T0_T))


def _mach_from_log_stagnation_temperature_scalar(log_T0_T, gamma):
    scale = nx.fdiv(2.0, gamma - 1.0)
    if log_T0_T > _HUGE_LOG:
        return nx.fsqrt(scale * -math.expm1(-log_T0_T)) * nx.fexp(0.5 * log_T0_T)
    return nx.fsqrt(scale * nx.fexpm1(log_T0_T))

def mach_after_isentropic_pressure_change(M1, p2_p1, gamma=1.4):
    """Plain core: Mach number after an isentropic change of static pressure by p2/p1 > 0.

    ln(T0/T2) = ln(T0/T1) - (γ-1)/γ ln(p2/p1), in logarithms so that no product of
    small ratios loses digits (the fan of a strong expansion, p2/p1 → 0).

    Parameters
    ----------
    M1 : float or ndarray
        Mach number before the change [-].
    p2_p1 : float or ndarray
        Static pressure ratio [-], > 0.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        Mach number after the change [-].

    Examples
    --------
    >>> from gasdyn2d.relations.isentropic import mach_after_isentropic_pressure_change
    >>> round(float(mach_after_isentropic_pressure_change(2.0, 0.5)), 5)  # a fan at Mach 2
    2.44359
    """
    if nx.plain_scalars(M1, p2_p1, gamma):
        return _mach_after_isentropic_pressure_change_scalar(M1, p2_p1, gamma)
    log_T0_T2 = (log_stagnation_temperature_ratio(M1, gamma)
                 - (gamma - 1.0) / gamma * np.log(p2_p1))
    return _mach_from_log_stagnation_temperature(log_T0_T2, gamma)


def _mach_after_isentropic_pressure_change_scalar(M1, p2_p1, gamma):
    log_T0_T2 = (_log_stagnation_temperature_ratio_scalar(M1, gamma)
                 - (gamma - 1.0) / gamma * nx.flog(p2_p1))
    return _mach_from_log_stagnation_temperature_scalar(log_T0_T2, gamma)

def mach_from_pressure_ratio(p_p0, gamma=1.4):
    """M from p/p0 in (0, 1] (closed form through T0/T = (p0/p)^((γ-1)/γ))."""
    if nx.plain_scalars(p_p0, gamma):
        return _mach_from_pressure_ratio_scalar(p_p0, gamma)
    p_p0 = np.asarray(p_p0, dtype=float)
    with np.errstate(divide="ignore"):
        return _mach_from_log_stagnation_temperature(-(gamma - 1.0) / gamma * np.log(p_p0), gamma)


def _mach_from_pressure_ratio_scalar(p_p0, gamma):
    return _mach_from_log_stagnation_temperature_scalar(
        -(gamma - 1.0) / gamma * nx.flog(p_p0), gamma)

def mach_from_density_ratio(rho_rho0, gamma=1.4):
    """M from ρ/ρ0 in (0, 1] (closed form through T0/T = (ρ0/ρ)^(γ-1))."""
    if nx.plain_scalars(rho_rho0, gamma):
        return _mach_from_density_ratio_scalar(rho_rho0, gamma)
    rho_rho0 = np.asarray(rho_rho0, dtype=float)
    with np.errstate(divide="ignore"):
        return _mach_from_log_stagnation_temperature(-(gamma - 1.0) * np.log(rho_rho0), gamma)


def _mach_from_density_ratio_scalar(rho_rho0, gamma):
    return _mach_from_log_stagnation_temperature_scalar(-(gamma - 1.0) * nx.flog(rho_rho0), gamma)

def isentropic_state(M, gamma=1.4):
    """Plain core: (T/T0, p/p0, ρ/ρ0, A/A*, μ, ν) at Mach number M >= 0 in one call.

    The array form calls :func:`temperature_ratio`, :func:`pressure_ratio`,
    :func:`density_ratio`, :func:`area_ratio`, :func:`mach_angle_of` and
    :func:`~gasdyn2d.relations.prandtl_meyer_function.prandtl_meyer_angle`; the scalar
    form is the same formulas with the logarithm ln(1 + (γ-1)M²/2) taken once (below
    ``HUGE_MACH``; above, the functions' own large-M forms). μ and ν are NaN below M = 1.

    Examples
    --------
    >>> from gasdyn2d.relations.isentropic import isentropic_state
    >>> [round(x, 6) for x in isentropic_state(2.0)]
    [0.555556, 0.127805, 0.230048, 1.6875, 0.523599, 0.460414]
    """
    if type(M) is float and type(gamma) is float and 1.0 <= M < HUGE_MACH and gamma > 1.0:
        return _isentropic_state_scalar(M, gamma)
    return (temperature_ratio(M, gamma), pressure_ratio(M, gamma), density_ratio(M, gamma),
            area_ratio(M, gamma), mach_angle_of(M), prandtl_meyer_angle(M, gamma))


def _isentropic_state_scalar(M, gamma):
    """Scalar form of :func:`isentropic_state` for 1 <= M < HUGE_MACH: the forms of
    :func:`_log_stagnation_temperature_ratio_scalar`, :func:`_pressure_ratio_scalar`,
    :func:`_density_ratio_scalar`, the area ratio of :mod:`~gasdyn2d.relations.area_ratio` and
    :func:`_mach_angle_scalar`, sharing ln T0/T."""
    gm = gamma - 1.0
    log_t = math.log1p(0.5 * gm * M * M)  # ln T0/T, as _log_stagnation_temperature_ratio
    exponent = 0.5 * (gamma + 1.0) / gm
    a = (M - 1.0) * (M + 1.0)
    log_area = -math.log(M) + exponent * math.log1p(gm * a / (gamma + 1.0))
    z = math.sqrt(a)
    return (math.exp(-log_t), math.exp(-gamma / gm * log_t), math.exp(-log_t / gm),
            math.exp(log_area), math.atan2(1.0, z), prandtl_meyer_of_root(z, gamma))


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class IsentropicFlow(ResultTable):
    """Isentropic state of a perfect or thermally perfect gas at one Mach number.

    Angles are in radians (Quantities when the input was a Quantity); the Mach
    angle and Prandtl–Meyer angle are NaN for subsonic flow, where they do not
    exist. For a thermally perfect gas the ratios are those at the stagnation
    temperature T0 of the call (ν is measured from the sonic state of that T0).
    """

    M: FloatArray = unit_field("", "Mach number")
    T_T0: FloatArray = unit_field("", "static over stagnation temperature")
    p_p0: FloatArray = unit_field("", "static over stagnation pressure")
    rho_rho0: FloatArray = unit_field("", "static over stagnation density")
    A_Astar: FloatArray = unit_field("", "area over sonic-throat area")
    mach_angle: FloatArray = unit_field("rad", "Mach angle μ = asin(1/M)")
    prandtl_meyer: FloatArray = unit_field("rad", "Prandtl–Meyer angle ν(M)")


_STAGNATION_INVERSES = {"T_T0": mach_from_temperature_ratio, "p_p0": mach_from_pressure_ratio,
                        "rho_rho0": mach_from_density_ratio}


def _checked_mach(name, value, gamma, check, supersonic):
    """(the checked input, the Mach number it gives)."""
    if name == "M":
        value = check.mach(value, "M")
        return value, value
    if name in _STAGNATION_INVERSES:
        value = check.within(value, name, 0.0, 1.0, "in (0, 1] (a static-to-stagnation ratio)",
                             lower_open=True)
        return value, _STAGNATION_INVERSES[name](value, gamma)
    if name == "A_Astar":
        value = check.within(value, "A_Astar", 1.0, math.inf,
                             "finite and >= 1 (no section is smaller than the sonic throat)",
                             upper_open=True)
        return value, mach_from_area_ratio(value, gamma, supersonic=supersonic)
    if name == "mach_angle":
        value = check.within(value, "mach_angle", 0.0, 0.5 * math.pi, "in (0, π/2] rad (0 to 90°)",
                             lower_open=True)
        return value, mach_from_mach_angle(value)
    value = check_prandtl_meyer_angle(value, gamma, "prandtl_meyer", check)
    return value, mach_from_prandtl_meyer_angle(value, gamma)


def _isentropic_core(value, gamma, check, *, name, supersonic):
    """Checked core of :func:`isentropic_flow` (floats or arrays): the fields in order."""
    gamma = check.gamma(gamma)
    value, M = _checked_mach(name, value, gamma, check, supersonic)
    if name != "M":  # an inverse that lands a few ulp below 1 is the sonic point (μ, ν exist)
        M = clamp_to_limit(M, 1.0, "lower")
    M = nan_where_nan(gamma, M)
    ratios = isentropic_state(M, gamma)
    if name == "M":
        return (M, *ratios)
    given = _GIVEN_FIELD[name]
    return (M, *(value if i == given else r for i, r in enumerate(ratios)))


_BRANCHES = ("supersonic", "subsonic")
_GIVEN_FIELD = {"T_T0": 0, "p_p0": 1, "rho_rho0": 2, "A_Astar": 3, "mach_angle": 4,
                "prandtl_meyer": 5}


def isentropic_flow(M: ArrayInput = None, *, T_T0: ArrayInput = None, p_p0: ArrayInput = None,
                    rho_rho0: ArrayInput = None, A_Astar: ArrayInput = None,
                    mach_angle: ArrayInput = None, prandtl_meyer: ArrayInput = None,
                    branch: str = "supersonic", T0: ArrayInput = None,
                    gamma: ArrayInput = None, gas=None,
                    errors: str = "raise") -> IsentropicFlow:
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
    T0 : float, array_like or Quantity, optional
        Stagnation temperature [K], > 0: required for a thermally perfect ``gas``
        (offset units such as °C are converted); with a perfect gas it is checked and
        broadcast but does not change the ratios.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T0`` and no ``gamma``; its
        ν_max, and so the range of ``prandtl_meyer``, depends on T0.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    IsentropicFlow

    Raises
    ------
    InvalidInputError
        No or several inputs, a value outside the range above, gamma <= 1,
        a wrong unit or type, shapes that do not broadcast, a thermally perfect gas
        without ``T0`` (or with ``gamma``), a non-positive ``T0``.

    Notes
    -----
    T/T0 = (1 + (γ-1)M²/2)⁻¹, p/p0 = (T/T0)^(γ/(γ-1)), ρ/ρ0 = (T/T0)^(1/(γ-1)),
    A/A* = (1/M)[(2 + (γ-1)M²)/(γ+1)]^((γ+1)/(2(γ-1))). Inverses from T/T0,
    p/p0, ρ/ρ0 and μ are closed forms; A/A* is inverted by three Halley steps
    from an explicit start (:func:`mach_from_area_ratio`) and ν by
    :func:`~gasdyn2d.mach_from_prandtl_meyer`.

    For a thermally perfect gas (:mod:`~gasdyn2d.relations.thermally_perfect`) the
    energy equation h(T0) = h(T) + M² γ(T) R T/2 is solved for T by Newton steps from
    the perfect gas at γ(T0); p/p0 = exp((φ(T) - φ(T0))/R) (the entropy integral) and
    A/A* = ρ*V*/(ρV). The inverses from p/p0, ρ/ρ0, A/A* and ν are bracketed Newton
    iterations in ln(T0/T); from T/T0 and μ they are closed forms.

    References
    ----------
    Ames Research Staff (1953), *Equations, Tables, and Charts for
    Compressible Flow*, NACA Report 1135, eqs. 43-45 and 80 (and its imperfect-gas
    section for the thermally perfect gas, from memory).

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
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT
    >>> hot = isentropic_flow(5.0, T0=2500.0, gas=AIR_THERMALLY_PERFECT)
    >>> round(hot.T_T0, 6), round(hot.p_p0, 8)  # 0.166667, 0.00189004 for γ = 1.4
    (0.192117, 0.00133294)
    """
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(M) is float and type(gamma) is float and 0.0 <= M < math.inf
            and 1.0 < gamma < math.inf and T_T0 is None and p_p0 is None and rho_rho0 is None
            and A_Astar is None and mach_angle is None and prandtl_meyer is None
            and T0 is None and gas is None and errors in SCALAR_CHECKS and branch in _BRANCHES):
        # the scalar fast lane: valid plain floats, for which the general path's checked
        # core returns (M, *isentropic_state(M, γ)); anything else takes the general path
        return IsentropicFlow.from_fields((M, *isentropic_state(M, gamma)))
    name, value = one_of("isentropic_flow", M=M, T_T0=T_T0, p_p0=p_p0, rho_rho0=rho_rho0,
                         A_Astar=A_Astar, mach_angle=mach_angle, prandtl_meyer=prandtl_meyer)
    supersonic = choice("branch", branch, {"supersonic": True, "subsonic": False})
    gamma, hot = gas_of_call("isentropic_flow", gamma, gas, T0, "T0", "stagnation temperature")
    call = Call(errors)
    if name in ("mach_angle", "prandtl_meyer"):
        limit = (prandtl_meyer_degree_limit(gamma) if name == "prandtl_meyer" and hot is None
                 else TWO_PI)
        call.take(name, value, "rad", degrees_above=limit)
    else:
        call.take(name, value)
    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T0 is None:
            return call.run(IsentropicFlow, _isentropic_core, name=name, supersonic=supersonic)
    from .thermally_perfect_calls import hot_isentropic_core, perfect_with_temperature

    call.take("T0", T0, "K")
    if hot is None:  # a perfect gas: T0 checked and broadcast, the ratios do not depend on it
        return call.run(IsentropicFlow, perfect_with_temperature(_isentropic_core, "T0"),
                        name=name, supersonic=supersonic)
    return call.run(IsentropicFlow, hot_isentropic_core, name=name, supersonic=supersonic,
                    gas=hot)
