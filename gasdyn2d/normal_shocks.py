"""Normal shock waves in a perfect gas.

Plain core (floats and ndarrays, no pint): :func:`normal_shock_ratios` computes
every ratio from ``w = M1² - 1`` (so that weak shocks keep full precision), and
the inverses :func:`mach_from_downstream_mach`, :func:`mach_from_density_jump`,
:func:`mach_from_temperature_jump`, :func:`mach_from_stagnation_pressure_ratio`,
:func:`mach_from_pitot_ratio`. Unit boundary: :func:`normal_shock`.
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numpy as np

from . import _numerics as nx
from ._display import ResultTable, unit_field

__all__ = [
    "normal_shock",
    "NormalShock",
    "NormalShockRatios",
    "normal_shock_ratios",
    "mach_from_downstream_mach",
    "mach_from_density_jump",
    "mach_from_temperature_jump",
    "mach_from_stagnation_pressure_ratio",
    "mach_from_pitot_ratio",
    "pitot_ratio",
]


class NormalShockRatios(NamedTuple):
    """Plain-core result of :func:`normal_shock_ratios` (all ndarrays, dimensionless)."""

    M2: np.ndarray
    p2_p1: np.ndarray
    rho2_rho1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray


def normal_shock_ratios(w, gamma=1.4):
    """Plain core: ratios across a normal shock with upstream normal Mach number √(1 + w).

    ``w = M1² - 1 >= 0`` is the natural variable: every jump is proportional to
    it, so weak shocks lose no digits (NACA Report 1135, eqs. 93-100, rewritten).
    """
    w = np.asarray(w, dtype=float)
    gp, gm = gamma + 1.0, gamma - 1.0
    p2_p1 = 1.0 + 2.0 * gamma / gp * w  # eq. 93
    rho_jump = 2.0 * w / (gm * w + gp)  # ρ2/ρ1 - 1, from eq. 94
    rho2_rho1 = 1.0 + rho_jump
    T2_T1 = p2_p1 / rho2_rho1
    M2 = np.sqrt((gm * w + gp) / (2.0 * gamma * w + gp))  # eq. 96
    # eq. 99: p02/p01 = (ρ2/ρ1)^(γ/(γ-1)) (p2/p1)^(-1/(γ-1)), in logs to keep 1 - O(w³)
    log_p0 = (gamma * np.log1p(rho_jump) - np.log1p(2.0 * gamma / gp * w)) / gm
    p02_p01 = np.exp(log_p0)
    return NormalShockRatios(M2, p2_p1, rho2_rho1, T2_T1, p02_p01)


def pitot_ratio(M1, gamma=1.4):
    """Plain core: p02/p1 behind a normal shock (Rayleigh pitot formula, NACA Report 1135, eq. 100)."""
    M1 = np.asarray(M1, dtype=float)
    m2 = M1 * M1
    return np.exp(gamma / (gamma - 1.0) * np.log(0.5 * (gamma + 1.0) * m2)
                  + 1.0 / (gamma - 1.0) * np.log((gamma + 1.0) / (2.0 * gamma * m2 - gamma + 1.0)))


def mach_from_downstream_mach(M2, gamma=1.4):
    """M1 from M2 in (√((γ-1)/(2γ)), 1]: M1² - 1 = (γ+1)(1 - M2²)/(2γM2² - (γ-1)).

    Written for M1² - 1 (NACA Report 1135, eq. 96 inverted) so that weak shocks keep
    their digits.
    """
    M2 = np.asarray(M2, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        w = (gamma + 1.0) * (1.0 - M2) * (1.0 + M2) / (2.0 * gamma * M2 * M2 - (gamma - 1.0))
        return np.sqrt(1.0 + w)


def mach_from_density_jump(rho2_rho1, gamma=1.4):
    """M1 from ρ2/ρ1 in [1, (γ+1)/(γ-1)): M1² - 1 = (γ+1)(r - 1)/((γ+1) - (γ-1)r)."""
    r = np.asarray(rho2_rho1, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.sqrt(1.0 + (gamma + 1.0) * (r - 1.0) / ((gamma + 1.0) - (gamma - 1.0) * r))


def mach_from_temperature_jump(T2_T1, gamma=1.4):
    """M1 from T2/T1 >= 1: the positive root w = M1² - 1 of a quadratic, without cancellation.

    With t = T2/T1 - 1: 2γ(γ-1)w² + [2(γ²-1) - (γ+1)²t]w - (γ+1)²t = 0 (eqs. 93-95
    combined); the root is taken in whichever of its two algebraic forms avoids the
    difference of nearly equal terms.
    """
    t = np.asarray(T2_T1, dtype=float) - 1.0
    gp = gamma + 1.0
    a = 2.0 * gamma * (gamma - 1.0)
    b = 2.0 * gp * (gamma - 1.0) - gp * gp * t
    c = -gp * gp * t
    with np.errstate(divide="ignore", invalid="ignore"):
        root = np.sqrt(b * b - 4.0 * a * c)
        w = np.where(b > 0.0, -2.0 * c / (b + root), (root - b) / (2.0 * a))
        return np.sqrt(1.0 + w)


def mach_from_stagnation_pressure_ratio(p02_p01, gamma=1.4):
    """M1 from p02/p01 in (0, 1] by a safeguarded Newton iteration in ln(M1² - 1).

    Near p02/p01 = 1 the loss is ≈ 2γ w³ / (3(γ+1)²) with w = M1² - 1, so the
    inverse is cube-root sensitive there: a relative error ε in 1 - p02/p01
    gives ε/3 in w. Starting value: the larger of that weak-shock estimate and
    the strong-shock asymptote.
    """
    r = np.asarray(p02_p01, dtype=float)
    r, gamma = np.broadcast_arrays(r, np.asarray(gamma, dtype=float))
    with np.errstate(all="ignore"):
        loss = -np.log(r)
        weak = (1.5 * (gamma + 1.0) ** 2 / gamma * loss) ** (1.0 / 3.0)
        # strong shocks: p02/p01 ≈ C M^(-2/(γ-1)) with C from eq. 99 as M → ∞
        log_c = (gamma * np.log((gamma + 1.0) / (gamma - 1.0))
                 - np.log((gamma + 1.0) / (2.0 * gamma))) / (gamma - 1.0)
        strong = np.exp((log_c - np.log(r)) * (gamma - 1.0))  # ≈ M1²
        start = np.log(np.maximum(weak, strong - 1.0))

        def residual(log_w):
            w = np.exp(log_w)
            ratios = normal_shock_ratios(w, gamma)
            gp = gamma + 1.0
            # d ln(p02/p01)/dw = γ/(γ-1) * d ln ρ-ratio - 1/(γ-1) * d ln p-ratio
            d_rho = 2.0 * gp / ((gamma - 1.0) * w + gp) ** 2 / ratios.rho2_rho1
            d_p = 2.0 * gamma / gp / ratios.p2_p1
            slope = (gamma * d_rho - d_p) / (gamma - 1.0) * w
            return np.log(ratios.p02_p01) + loss, slope

        log_w = nx.safeguarded_newton(residual, start, np.full_like(r, -40.0),
                                      np.full_like(r, 1500.0))
        M1 = np.sqrt(1.0 + np.exp(log_w))
    M1 = np.where(r == 1.0, 1.0, M1)
    return np.where((r > 1.0) | (r <= 0.0), np.nan, M1)


def mach_from_pitot_ratio(p02_p1, gamma=1.4):
    """M1 from the pitot ratio p02/p1 >= ((γ+1)/2)^(γ/(γ-1)) (its value at M1 = 1).

    Safeguarded Newton on ln(p02/p1) against ln M1; the function is smooth and
    increasing, ≈ 2γ/(γ-1) ln M1 for strong shocks.
    """
    r = np.asarray(p02_p1, dtype=float)
    r, gamma = np.broadcast_arrays(r, np.asarray(gamma, dtype=float))
    with np.errstate(all="ignore"):
        target = np.log(r)

        def residual(log_M):
            M = np.exp(log_M)
            m2 = M * M
            value = np.log(pitot_ratio(M, gamma))
            slope = 2.0 * gamma / (gamma - 1.0) - 4.0 * gamma * m2 / (
                (gamma - 1.0) * (2.0 * gamma * m2 - gamma + 1.0))
            return value - target, slope

        start = np.maximum(target * (gamma - 1.0) / (2.0 * gamma), 1e-3)
        log_M = nx.safeguarded_newton(residual, start, np.zeros_like(r), np.full_like(r, 700.0))
    return np.exp(log_M)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class NormalShock(ResultTable):
    """Flow on both sides of a normal shock (all fields dimensionless)."""

    M1: object = unit_field("")  #: upstream Mach number
    M2: object = unit_field("")  #: downstream Mach number
    p2_p1: object = unit_field("")  #: static pressure ratio
    rho2_rho1: object = unit_field("")  #: density ratio
    T2_T1: object = unit_field("")  #: static temperature ratio
    p02_p01: object = unit_field("")  #: stagnation pressure ratio (recovery), <= 1
    p02_p1: object = unit_field("")  #: pitot ratio: stagnation pressure behind over static ahead


def _upstream_mach(name, value, gamma, errors):
    gp, gm = gamma + 1.0, gamma - 1.0
    with np.errstate(invalid="ignore", divide="ignore"):
        if name == "M1":
            return nx.check_mach_supersonic(value, "M1", errors)
        if name == "M2":
            low = np.sqrt(gm / (2.0 * gamma))
            value = nx.reject(~(value > low) | (value > 1.0), value, "M2",
                              "in (√((γ-1)/(2γ)), 1], the range behind a normal shock", errors,
                              limit=low)
            return mach_from_downstream_mach(value, gamma)
        if name == "p2_p1":
            value = nx.reject((value < 1.0) | np.isinf(value), value, "p2_p1",
                              "finite and >= 1 (a shock compresses)", errors)
            return np.sqrt(1.0 + (value - 1.0) * gp / (2.0 * gamma))
        if name == "rho2_rho1":
            high = gp / gm
            value = nx.reject((value < 1.0) | (value >= high), value, "rho2_rho1",
                              "in [1, (γ+1)/(γ-1)) (the strong-shock density limit)", errors,
                              limit=high)
            return mach_from_density_jump(value, gamma)
        if name == "T2_T1":
            value = nx.reject((value < 1.0) | np.isinf(value), value, "T2_T1",
                              "finite and >= 1 (a shock heats the gas)", errors)
            return mach_from_temperature_jump(value, gamma)
        if name == "p02_p01":
            value = nx.reject(~(value > 0.0) | (value > 1.0), value, "p02_p01",
                              "in (0, 1] (entropy rises across a shock)", errors)
            return mach_from_stagnation_pressure_ratio(value, gamma)
        low = pitot_ratio(1.0, gamma)
        # the pitot ratio near M1 = 1 carries ~γ/(γ-1) ulp from its exponent: that close
        # below the limit is the limit
        value = nx.clamp_to_limit(value, low, "lower",
                                  slack=nx.ROUNDING_SLACK * (1.0 + gamma / (gamma - 1.0)))
        value = nx.reject((value < low) | np.isinf(value), value, "p02_p1",
                          "finite and >= ((γ+1)/2)^(γ/(γ-1)), its value at M1 = 1", errors,
                          limit=low)
        return mach_from_pitot_ratio(value, gamma)


def normal_shock(M1=None, *, M2=None, p2_p1=None, rho2_rho1=None, T2_T1=None, p02_p01=None,
                 p02_p1=None, gamma=1.4, errors="raise"):
    """Normal shock from its upstream Mach number or from any one downstream ratio.

    Parameters
    ----------
    M1 : float or array_like, optional
        Upstream Mach number [-], >= 1.
    M2 : float or array_like, optional
        Downstream Mach number [-], in (√((γ-1)/(2γ)), 1].
    p2_p1, rho2_rho1, T2_T1 : float or array_like, optional
        Static pressure, density or temperature ratio [-], >= 1
        (ρ2/ρ1 below (γ+1)/(γ-1)).
    p02_p01 : float or array_like, optional
        Stagnation-pressure ratio [-], in (0, 1].
    p02_p1 : float or array_like, optional
        Pitot ratio [-]: stagnation pressure behind over static pressure ahead.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    NormalShock

    Raises
    ------
    InvalidInputError
        No or several inputs, a value outside its range, gamma <= 1.

    Notes
    -----
    With w = M1² - 1: p2/p1 = 1 + 2γw/(γ+1), ρ2/ρ1 = 1 + 2w/((γ-1)w + γ+1),
    M2² = ((γ-1)w + γ+1)/(2γw + γ+1). Inverses are closed forms except from
    p02/p01 and p02/p1, which use a safeguarded Newton iteration.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 93-100.

    Examples
    --------
    >>> from gasdyn2d import normal_shock
    >>> shock = normal_shock(2.0)
    >>> round(shock.M2, 6), round(shock.p02_p01, 6)
    (0.57735, 0.720874)
    >>> round(normal_shock(p2_p1=4.5).M1, 12)
    2.0
    """
    nx.check_errors_mode(errors)
    inputs = {"M1": M1, "M2": M2, "p2_p1": p2_p1, "rho2_rho1": rho2_rho1, "T2_T1": T2_T1,
              "p02_p01": p02_p01, "p02_p1": p02_p1}
    name, value = nx.exactly_one(inputs, "normal_shock")
    value, _ = nx.to_si(value, name, "dimensionless")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    value, gamma = nx.broadcast(**{name: value}, gamma=gamma)
    gamma = nx.check_gamma(gamma, errors)
    mach = _upstream_mach(name, value, gamma, errors)
    mach = np.where(np.isnan(gamma) | np.isnan(value), np.nan, mach)
    ratios = normal_shock_ratios((mach - 1.0) * (mach + 1.0), gamma)
    fields = ratios._asdict()
    if name in fields:
        fields[name] = value  # return the caller's exact value, not a round trip
    s = nx.scalar_or_array
    return NormalShock(
        M1=s(mach), M2=s(fields["M2"]), p2_p1=s(fields["p2_p1"]),
        rho2_rho1=s(fields["rho2_rho1"]), T2_T1=s(fields["T2_T1"]),
        p02_p01=s(fields["p02_p01"]),
        p02_p1=s(value if name == "p02_p1" else pitot_ratio(mach, gamma)),
    )
