"""Prandtl–Meyer function and centred expansion fans.

Plain core (floats and ndarrays, radians, no pint): :func:`prandtl_meyer_angle`,
:func:`mach_from_prandtl_meyer_angle`, :func:`max_prandtl_meyer_angle`,
:func:`fan_pressure_ratio`. Unit boundary: :func:`prandtl_meyer`,
:func:`mach_from_prandtl_meyer`, :func:`expansion_fan`.

Each plain core has a scalar form on the math module right after it (the same
algorithm, floats in and out); the array form hands plain floats to it. Huge
Mach numbers (up to 1e300 and inf) give the limits, without overflow warnings.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from .. import _numerics as nx
from .._display import ResultTable, unit_field
from .isentropic import HUGE_MACH, mach_after_isentropic_pressure_change, mach_angle_of

__all__ = [
    "prandtl_meyer",
    "mach_from_prandtl_meyer",
    "expansion_fan",
    "ExpansionFan",
    "prandtl_meyer_angle",
    "mach_from_prandtl_meyer_angle",
    "max_prandtl_meyer_angle",
    "fan_pressure_ratio",
]

_SERIES_LIMIT = 0.5  # below this |x|, atan(x) - x comes from its Taylor series
_SERIES_TERMS = 30  # 0.5**60 < 1e-18: the series is exact to rounding at the limit
_LARGE_FAN_MACH = 1e8  # above this the fan pressure ratio's logarithms would cancel
_HALLEY_STEPS = 3  # cubic convergence: start error 0.2 -> 1e-3 -> 1e-9 -> rounding


def _atan_minus_x_series(x):
    """atan(x) - x for 0 <= x <= 0.5 by its Taylor series (no cancellation)."""
    x2 = x * x
    acc = np.zeros_like(x)
    for n in range(_SERIES_TERMS, 0, -1):  # Horner over a fixed number of terms
        acc = acc * x2 + (-1.0) ** n / (2 * n + 1)
    return acc * x2 * x


_SERIES_COEFFICIENTS = tuple((-1.0) ** n / (2 * n + 1) for n in range(_SERIES_TERMS, 0, -1))


def _atan_minus_x_series_scalar(x):
    """Scalar form of :func:`_atan_minus_x_series` (the same terms in the same order)."""
    x2 = x * x
    acc = 0.0
    for coefficient in _SERIES_COEFFICIENTS:
        acc = acc * x2 + coefficient
    return acc * x2 * x

def _nu_of_z(z, gamma):
    """ν as a function of z = sqrt(M² - 1) (plain core, radians)."""
    z = np.asarray(z, dtype=float)
    k = (np.asarray(gamma, dtype=float) - 1.0) / (gamma + 1.0)
    if z.shape != k.shape:
        z, k = np.broadcast_arrays(z, k)
    sk = np.sqrt(k)
    small = z < _SERIES_LIMIT
    if small.ndim == 0 and small:  # a scalar near M = 1: the series alone
        return _atan_minus_x_series(sk * z) / sk - _atan_minus_x_series(z)
    nu = np.array(np.arctan(sk * z) / sk - np.arctan(z), dtype=float)  # NACA 1135, eq. 171
    if nx.any_true(small):
        # near M = 1 the two arctangents cancel: use [atan(√k z) - √k z]/√k - [atan z - z]
        zs, sks = z[small], sk[small]
        nu[small] = _atan_minus_x_series(sks * zs) / sks - _atan_minus_x_series(zs)
    return nu


def _nu_of_z_scalar(z, gamma):
    """Scalar form of :func:`_nu_of_z`."""
    sk = math.sqrt((gamma - 1.0) / (gamma + 1.0))
    if z < _SERIES_LIMIT:
        return _atan_minus_x_series_scalar(sk * z) / sk - _atan_minus_x_series_scalar(z)
    return math.atan(sk * z) / sk - math.atan(z)  # NACA 1135, eq. 171

def _dnu_dz(z, gamma):
    z2 = z * z
    return z2 / ((1.0 + z2) * (1.0 + 0.5 * (gamma - 1.0) * (1.0 + z2)))


def max_prandtl_meyer_angle(gamma=1.4):
    """ν_max = (π/2)(√((γ+1)/(γ-1)) - 1) [rad], the turn that expands a sonic flow to vacuum."""
    if nx.plain_scalars(gamma):
        return _max_prandtl_meyer_angle_scalar(gamma)
    gamma = np.asarray(gamma, dtype=float)
    return 0.5 * np.pi * (np.sqrt((gamma + 1.0) / (gamma - 1.0)) - 1.0)


def _max_prandtl_meyer_angle_scalar(gamma):
    return 0.5 * math.pi * (nx.fsqrt(nx.fdiv(gamma + 1.0, gamma - 1.0)) - 1.0)

def prandtl_meyer_angle(M, gamma=1.4):
    """Plain core: Prandtl–Meyer function ν(M) [rad] for M >= 1 (NaN below 1).

    Accurate to a few ulp from M = 1 (series form) to M → ∞ (ν → ν_max).
    """
    if nx.plain_scalars(M, gamma):
        return _prandtl_meyer_angle_scalar(M, gamma)
    M = np.asarray(M, dtype=float)
    with np.errstate(invalid="ignore"):
        huge = M > HUGE_MACH
        if nx.any_true(huge):  # √(M² - 1) = M to rounding there (and M² may overflow)
            safe = np.where(huge, 2.0, M)
            z = np.where(huge, M, np.sqrt((safe - 1.0) * (safe + 1.0)))
        else:
            z = np.sqrt((M - 1.0) * (M + 1.0))
        nu = _nu_of_z(z, gamma)
    # M = inf is the vacuum limit ν_max (0·inf must not turn it into NaN)
    infinite = M == np.inf
    if not nx.any_true(infinite):
        return nu
    return np.where(infinite, max_prandtl_meyer_angle(gamma), nu)


def _prandtl_meyer_angle_scalar(M, gamma):
    """Scalar form of :func:`prandtl_meyer_angle`."""
    if M == math.inf:
        return _max_prandtl_meyer_angle_scalar(gamma)
    z = M if M > HUGE_MACH else nx.fsqrt((M - 1.0) * (M + 1.0))
    return _nu_of_z_scalar(z, gamma)

def mach_from_prandtl_meyer_angle(nu, gamma=1.4):
    """Plain core: Mach number from ν [rad], 0 <= ν <= ν_max (NaN outside).

    Start from an explicit blend of the two asymptotes, z ≈ (3ν/(1-k))^(1/3)
    near ν = 0 and z ≈ (1/k - 1)/(ν_max - ν) near ν_max (k = (γ-1)/(γ+1),
    z = √(M²-1)), then three Halley steps (cubically convergent) in ln z.
    The start is within 20 % for 1.01 <= γ <= 3, so three steps reach
    rounding: a few ulp times the condition number of the inverse,
    |d ln M/d ln ν| = ν √(M²-1)(1 + (γ-1)M²/2)/M², which is 1 to 3 for
    moderate M and grows like M near ν_max (the problem itself amplifies the
    rounding of ν there).
    """
    if nx.plain_scalars(nu, gamma):
        return _mach_from_prandtl_meyer_angle_scalar(nu, gamma)
    nu = np.asarray(nu, dtype=float)
    gamma = np.asarray(gamma, dtype=float)
    k = (gamma - 1.0) / (gamma + 1.0)
    nu_max = max_prandtl_meyer_angle(gamma)
    with np.errstate(all="ignore"):
        bad = (nu < 0.0) | (nu > nu_max)
        z = (3.0 * nu / (1.0 - k)) ** (1.0 / 3.0) + (1.0 / k - 1.0) * (
            1.0 / (nu_max - nu) - 1.0 / nu_max
        )
        log_z = np.log(z)
        h = 0.5 * (gamma - 1.0)
        for _ in range(_HALLEY_STEPS):
            z = np.exp(log_z)
            z2 = z * z
            # f(u) = ν(e^u) - ν, u = ln z; f' = z dν/dz; f''/f' = d ln f'/du
            slope = z * _dnu_dz(z, gamma)
            curvature = 3.0 - 2.0 * z2 / (1.0 + z2) - 2.0 * h * z2 / (1.0 + h + h * z2)
            newton = (_nu_of_z(z, gamma) - nu) / slope
            log_z = log_z - newton / (1.0 - 0.5 * newton * curvature)
        M = np.hypot(1.0, np.exp(log_z))
    M = np.where(nu == 0.0, 1.0, M)
    M = np.where(nu == nu_max, np.inf, M)
    return np.where(bad, np.nan, M)


def _mach_from_prandtl_meyer_angle_scalar(nu, gamma):
    """Scalar form of :func:`mach_from_prandtl_meyer_angle` (the same start and steps)."""
    k = (gamma - 1.0) / (gamma + 1.0)
    nu_max = _max_prandtl_meyer_angle_scalar(gamma)
    if not (0.0 <= nu <= nu_max):
        return math.nan
    if nu == 0.0:
        return 1.0
    if nu == nu_max:
        return math.inf
    z = (3.0 * nu / (1.0 - k)) ** (1.0 / 3.0) + (1.0 / k - 1.0) * (
        1.0 / (nu_max - nu) - 1.0 / nu_max
    )
    log_z = math.log(z)
    h = 0.5 * (gamma - 1.0)
    for _ in range(_HALLEY_STEPS):
        z = nx.fexp(log_z)
        z2 = z * z
        slope = z * (z2 / ((1.0 + z2) * (1.0 + h * (1.0 + z2))))  # z dν/dz, _dnu_dz
        curvature = 3.0 - 2.0 * z2 / (1.0 + z2) - 2.0 * h * z2 / (1.0 + h + h * z2)
        newton = nx.fdiv(_nu_of_z_scalar(z, gamma) - nu, slope)
        log_z = log_z - nx.fdiv(newton, 1.0 - 0.5 * newton * curvature)
    return math.hypot(1.0, nx.fexp(log_z))

def fan_pressure_ratio(M1, M2, gamma=1.4):
    """Plain core: p2/p1 across an isentropic turn from M1 to M2.

    p2/p1 = [(1 + (γ-1)M1²/2)/(1 + (γ-1)M2²/2)]^(γ/(γ-1)) (NACA Report 1135, eq. 44
    twice), in logarithms. Where either Mach number exceeds 1e8 the logarithm of the
    ratio is taken as 2 ln(M1/M2) + ln((h + 1/M1²)/(h + 1/M2²)), h = (γ-1)/2, which
    neither cancels nor overflows (up to M = inf); M1 = M2 (no turn) gives 1.
    """
    if nx.plain_scalars(M1, M2, gamma):
        return _fan_pressure_ratio_scalar(M1, M2, gamma)
    M1 = np.asarray(M1, dtype=float)
    M2 = np.asarray(M2, dtype=float)
    gamma = np.asarray(gamma, dtype=float)
    h = 0.5 * (gamma - 1.0)
    big = (M1 > _LARGE_FAN_MACH) | (M2 > _LARGE_FAN_MACH)
    if not nx.any_true(big):
        return np.exp(gamma / (gamma - 1.0) * (np.log1p(h * M1 * M1) - np.log1p(h * M2 * M2)))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        far = 2.0 * np.log(M1 / M2) + np.log((h + 1.0 / (M1 * M1)) / (h + 1.0 / (M2 * M2)))
        near = np.log1p(h * M1 * M1) - np.log1p(h * M2 * M2)
        ratio = np.exp(gamma / (gamma - 1.0) * np.where(big, far, near))
        return np.where(M1 == M2, 1.0, ratio)


def _fan_pressure_ratio_scalar(M1, M2, gamma):
    """Scalar form of :func:`fan_pressure_ratio`."""
    h = 0.5 * (gamma - 1.0)
    exponent = nx.fdiv(gamma, gamma - 1.0)
    if M1 > _LARGE_FAN_MACH or M2 > _LARGE_FAN_MACH:
        if M1 == M2:
            return 1.0
        far = (2.0 * nx.flog(nx.fdiv(M1, M2))
               + nx.flog(nx.fdiv(h + nx.fdiv(1.0, M1 * M1), h + nx.fdiv(1.0, M2 * M2))))
        return nx.fexp(exponent * far)
    return nx.fexp(exponent * (nx.flog1p(h * M1 * M1) - nx.flog1p(h * M2 * M2)))

# ------------------------------------------------------------------ unit boundary


def _check_nu(nu, gamma, name, errors):
    nu_max = max_prandtl_meyer_angle(gamma)
    with np.errstate(invalid="ignore"):
        nu = nx.reject(nu < 0.0, nu, name, ">= 0 rad", errors)
        return nx.reject(
            nu > nu_max, nu, name, "<= ν_max = (π/2)(√((γ+1)/(γ-1)) - 1)", errors,
            limit=nu_max, unit_text="rad",
        )


def prandtl_meyer(M, *, gamma=1.4, errors="raise"):
    """Prandtl–Meyer function ν(M): the turn that expands a sonic stream to Mach M.

    Parameters
    ----------
    M : float or array_like
        Mach number [-], >= 1.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    float or ndarray
        ν [rad] (a Quantity in radians if ``M`` was a Quantity).

    Raises
    ------
    InvalidInputError
        M below 1 or not finite; gamma <= 1.

    Notes
    -----
    ν = √((γ+1)/(γ-1)) atan √((γ-1)(M²-1)/(γ+1)) - atan √(M²-1), evaluated
    through a series near M = 1 where the two terms cancel.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 171.

    Examples
    --------
    >>> from gasdyn2d import prandtl_meyer
    >>> import numpy as np
    >>> round(float(np.degrees(prandtl_meyer(2.0))), 4)
    26.3798
    """
    nx.check_errors_mode(errors)
    M, unit = nx.to_si(M, "M", "dimensionless")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    M, gamma = nx.broadcast(M=M, gamma=gamma)
    gamma = nx.check_gamma(gamma, errors)
    M = nx.check_mach_supersonic(M, "M", errors)
    nu = nx.scalar_or_array(prandtl_meyer_angle(M, gamma))
    return nx.angle_out(nu, nx.output_angle_unit(None, unit))


def mach_from_prandtl_meyer(nu, *, gamma=1.4, errors="raise"):
    """Mach number whose Prandtl–Meyer function is ``nu``.

    Parameters
    ----------
    nu : float, array_like or Quantity
        Prandtl–Meyer angle [rad], 0 <= ν <= ν_max (ν_max = 130.454° for γ = 1.4).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    float or ndarray
        Mach number [-] (``inf`` at ν = ν_max).

    Raises
    ------
    InvalidInputError
        ν negative or above ν_max; gamma <= 1.

    Notes
    -----
    Non-iterative in the sense of a fixed cost: an explicit starting value
    from the small-ν and near-ν_max asymptotes and three Newton steps in
    ln √(M²-1). Hall (1975) gives a rational start for γ = 1.4 only; this
    start serves any γ.

    References
    ----------
    Hall, I. M. (1975), "Inversion of the Prandtl-Meyer relation",
    Aeronautical Journal 79, 417-418 (for the idea of an explicit start).

    Examples
    --------
    >>> from gasdyn2d import mach_from_prandtl_meyer, ureg
    >>> round(mach_from_prandtl_meyer(26.3798 * ureg.deg), 4)
    2.0
    """
    nx.check_errors_mode(errors)
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    nu, _ = nx.to_si(nu, "nu", "angle", degrees_above=nx.prandtl_meyer_degree_limit(gamma))
    nu, gamma = nx.broadcast(nu=nu, gamma=gamma)
    gamma = nx.check_gamma(gamma, errors)
    nu = _check_nu(nu, gamma, "nu", errors)
    return nx.scalar_or_array(mach_from_prandtl_meyer_angle(nu, gamma))


@dataclasses.dataclass(frozen=True, repr=False)
class ExpansionFan(ResultTable):
    """States on either side of a centred Prandtl–Meyer expansion fan.

    Angles are in radians (Quantities in the caller's angle unit when any input
    was a Quantity); ``mu1`` and ``mu2`` are the Mach angles of the head and tail
    Mach lines measured from the local flow direction on each side.
    """

    M1: object = unit_field("")  #: upstream Mach number
    M2: object = unit_field("")  #: downstream Mach number
    deflection: object = unit_field("rad")  #: flow turn through the fan, >= 0
    nu1: object = unit_field("rad")  #: Prandtl–Meyer angle upstream
    nu2: object = unit_field("rad")  #: Prandtl–Meyer angle downstream
    p2_p1: object = unit_field("")  #: static pressure ratio
    T2_T1: object = unit_field("")  #: static temperature ratio
    rho2_rho1: object = unit_field("")  #: density ratio
    mu1: object = unit_field("rad")  #: Mach angle upstream (head of the fan)
    mu2: object = unit_field("rad")  #: Mach angle downstream (tail of the fan)


def expansion_fan(M1, *, deflection=None, p2_p1=None, M2=None, gamma=1.4, errors="raise"):
    """Centred expansion fan from its upstream Mach number and one of turn, p2/p1 or M2.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    deflection : float, array_like or Quantity, optional
        Flow turn [rad], 0 <= θ <= ν_max - ν(M1).
    p2_p1 : float or array_like, optional
        Static pressure ratio [-], 0 <= p2/p1 <= 1.
    M2 : float or array_like, optional
        Downstream Mach number [-], >= M1.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    ExpansionFan

    Raises
    ------
    InvalidInputError
        An input outside the ranges above, for example a turn that would
        expand the stream past vacuum.

    Notes
    -----
    ν2 = ν1 + θ; M2 = ν⁻¹(ν2); the ratios follow from the isentropic relations.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 43-45 and 171.

    Examples
    --------
    >>> from gasdyn2d import expansion_fan, ureg
    >>> fan = expansion_fan(2.0, deflection=10 * ureg.deg)
    >>> round(fan.M2, 4), round(fan.p2_p1, 4)
    (2.3849, 0.548)
    """
    nx.check_errors_mode(errors)
    name, value = nx.exactly_one(
        {"deflection": deflection, "p2_p1": p2_p1, "M2": M2}, "expansion_fan"
    )
    M1, unit_m = nx.to_si(M1, "M1", "dimensionless")
    given, unit_in = nx.to_si(value, name, "angle" if name == "deflection" else "dimensionless")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    M1, given, gamma = nx.broadcast(M1=M1, **{name: given}, gamma=gamma)
    gamma = nx.check_gamma(gamma, errors)
    M1 = nx.check_mach_supersonic(M1, "M1", errors)
    nu1 = prandtl_meyer_angle(M1, gamma)
    nu_max = max_prandtl_meyer_angle(gamma)
    with np.errstate(invalid="ignore", divide="ignore"):
        if name == "deflection":
            given = nx.reject(given < 0, given, "deflection", ">= 0 (a fan turns the flow away "
                              "from a compression; use oblique_shock for compressions)", errors)
            given = nx.reject(given > nu_max - nu1, given, "deflection",
                              "<= ν_max - ν(M1), the turn that expands the stream to vacuum",
                              errors, limit=nu_max - nu1, unit_text="rad")
            nu2 = nu1 + given
            # a fan never slows the flow: keep the inverse's rounding from giving M2 < M1
            M2 = np.where(given == 0.0, M1, np.fmax(mach_from_prandtl_meyer_angle(nu2, gamma), M1))
            M2 = np.where(np.isnan(nu2) | np.isnan(nu_max), np.nan, M2)  # fmax hid NaN
        elif name == "M2":
            given = nx.reject(~(given >= M1) | np.isinf(given), given, "M2",
                              "finite and >= M1 (a fan accelerates the flow)", errors, limit=M1)
            M2 = given
            nu2 = prandtl_meyer_angle(M2, gamma)
        else:
            given = nx.reject((given < 0) | (given > 1), given, "p2_p1",
                              "between 0 and 1 (a fan lowers the pressure)", errors)
            M2 = mach_after_isentropic_pressure_change(M1, given, gamma)
            M2 = np.where(given == 1.0, M1, np.fmax(M2, M1))  # rounding must not slow the flow
            M2 = np.where(np.isnan(given), np.nan, M2)
            nu2 = prandtl_meyer_angle(M2, gamma)
        nan = np.isnan(given)
        M2 = np.where(nan, np.nan, M2)
        nu2 = np.where(nan, np.nan, nu2)
        deflection_out = given if name == "deflection" else nu2 - nu1
        p_ratio = fan_pressure_ratio(M1, M2, gamma)
        T_ratio = (1.0 + 0.5 * (gamma - 1.0) * M1**2) / (1.0 + 0.5 * (gamma - 1.0) * M2**2)
        T_ratio = np.where(np.isinf(M2), 0.0, T_ratio)
        rho_ratio = p_ratio ** (1.0 / gamma)  # isentropic: ρ ∝ p^(1/γ)
    angle_unit = nx.output_angle_unit(unit_in if name == "deflection" else None, unit_m, unit_in)
    s = nx.scalar_or_array
    a = lambda v: nx.angle_out(s(v), angle_unit)  # noqa: E731
    return ExpansionFan(
        M1=s(M1), M2=s(M2), deflection=a(deflection_out), nu1=a(nu1), nu2=a(nu2),
        p2_p1=s(p_ratio), T2_T1=s(T_ratio), rho2_rho1=s(rho_ratio),
        mu1=a(mach_angle_of(M1)), mu2=a(mach_angle_of(M2)),
    )
