"""The Mach-wave functions: the Mach angle, the Prandtl–Meyer function and their inverses
(plain core, the floor's lowest module).

ν(M) is the turn that expands a sonic stream isentropically to Mach M; it is used
by the isentropic relations (the ν field and input of ``isentropic_flow``), the
expansion fans, the simple-wave primitive and the method of characteristics, so
it lives here, importing nothing of the package but the shared numerics and
checks.
"""

from __future__ import annotations

import math

import numpy as np

from .. import numerics as nx
from ..numerics import HUGE_MACH

__all__ = [
    "mach_angle_of",
    "mach_from_mach_angle",
    "prandtl_meyer_angle",
    "prandtl_meyer_of_root",
    "mach_from_prandtl_meyer_angle",
    "max_prandtl_meyer_angle",
    "check_prandtl_meyer_angle",
    "prandtl_meyer_degree_limit",
]

_SERIES_LIMIT = 0.5  # below this |x|, atan(x) - x comes from its Taylor series
_SERIES_TERMS = 30  # 0.5**60 < 1e-18: the series is exact to rounding at the limit
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


def prandtl_meyer_of_root(z, gamma=1.4):
    """Plain core: ν [rad] as a function of z = √(M² - 1) >= 0 (NACA Report 1135, eq. 171
    in z; a series near z = 0, where its two arctangents cancel).

    For callers that have z already (the Mach angle is atan2(1, z)); floats take the
    ``math`` form.

    Examples
    --------
    >>> from gasdyn2d.relations.prandtl_meyer_function import prandtl_meyer_of_root
    >>> round(prandtl_meyer_of_root(3.0 ** 0.5), 6)  # M = 2
    0.460414
    """
    if type(z) is float and type(gamma) is float:
        return _nu_of_z_scalar(z, gamma)
    return _nu_of_z(z, gamma)


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


def mach_angle_of(M):
    """μ = asin(1/M) [rad] for M >= 1 (NaN below), as atan2(1, √(M²-1)) for accuracy near M = 1."""
    if nx.plain_scalars(M):
        return _mach_angle_scalar(M)
    M = np.asarray(M, dtype=float)
    if nx.any_true(M > HUGE_MACH):  # √(M² - 1) = M to rounding there (and M² may overflow)
        with np.errstate(invalid="ignore", over="ignore"):
            return np.arctan2(1.0, np.where(M > HUGE_MACH, M, np.sqrt((M - 1.0) * (M + 1.0))))
    with np.errstate(invalid="ignore"):
        return np.arctan2(1.0, np.sqrt((M - 1.0) * (M + 1.0)))


def _mach_angle_scalar(M):
    if M > HUGE_MACH:
        return math.atan2(1.0, M)
    return math.atan2(1.0, nx.fsqrt((M - 1.0) * (M + 1.0)))


def mach_from_mach_angle(mu):
    """M = 1/sin μ for 0 < μ <= π/2."""
    if type(mu) is float:
        return 1.0 / math.sin(mu)
    return 1.0 / np.sin(np.asarray(mu, dtype=float))


def check_prandtl_meyer_angle(nu, gamma, name, check):
    """Checked ν [rad]: 0 <= ν <= ν_max(γ), by the call's NaN policy (floats or arrays)."""
    nu = check.at_least(nu, name, 0.0, unit_text="rad", allow_inf=True)
    nu_max = max_prandtl_meyer_angle(gamma)
    return check.within(nu, name, -math.inf, nu_max, "<= ν_max = (π/2)(√((γ+1)/(γ-1)) - 1)",
                        limit=nu_max, unit_text="rad")


def prandtl_meyer_degree_limit(gamma) -> float:
    """Largest plain ν [rad] not to be taken for degrees: 2π, or ν_max of the smallest γ
    given when that is larger (ν_max exceeds 2π for γ below about 1.08).

    ``gamma`` is the caller's raw argument (a float, an array, a Quantity); anything
    that is not a plain number or array gives 2π, the common case.
    """
    if type(gamma) is float:
        g_min = gamma
    else:
        try:
            g = np.asarray(getattr(gamma, "magnitude", gamma), dtype=float)
        except (TypeError, ValueError):
            return 2.0 * math.pi
        with np.errstate(invalid="ignore"):
            g = g[np.isfinite(g) & (g > 1.0)]
        if g.size == 0:
            return 2.0 * math.pi
        g_min = float(g.min())
    if not (g_min > 1.0 and g_min < math.inf):
        return 2.0 * math.pi
    return max(2.0 * math.pi, 0.5 * math.pi * (math.sqrt((g_min + 1.0) / (g_min - 1.0)) - 1.0))
