"""Normal shock waves in a perfect gas.

Plain core (floats and ndarrays, no pint): :func:`normal_shock_ratios` computes
every ratio from ``w = M1² - 1`` (so that weak shocks keep full precision), and
the inverses :func:`mach_from_downstream_mach`, :func:`mach_from_density_jump`,
:func:`mach_from_temperature_jump`, :func:`mach_from_stagnation_pressure_ratio`,
:func:`mach_from_pitot_ratio`. Unit boundary: :func:`normal_shock`.

Each plain core has a scalar form on the math module right after it (the same
algorithm, floats in and out); the array form hands plain floats to it. Huge
Mach numbers (up to 1e300 and inf) give the limits, without overflow warnings.
"""

from __future__ import annotations

import dataclasses
import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..boundary import SCALAR_CHECKS, Call, ResultTable, clamp_to_limit, one_of, unit_field
from ..boundary.checks import ROUNDING_SLACK
from ..boundary.types import ArrayInput, FloatArray
from ..numerics import nan_where_nan
from .normal_shock_inverses import (  # re-exported here
    mach_from_density_jump,
    mach_from_downstream_mach,
    mach_from_pitot_ratio,
    mach_from_pressure_jump,
    mach_from_stagnation_pressure_ratio,
    mach_from_temperature_jump,
)
from .gas import Gas, gas_of_call

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
    "mach_from_pressure_jump",
    "lowest_downstream_mach",
    "mach_squared_minus_one",
    "normal_shock_state",
]

_HUGE_W = 1e300  # above this M1² - 1 the ratios switch to their forms in 1/w (no overflow)
_HUGE_MACH = 1e150  # above this M² may overflow
_EPS = float(np.finfo(float).eps)


def mach_squared_minus_one(M):
    """Plain core: w = M² - 1 = (M - 1)(M + 1) [-], exact near M = 1, inf (no warning)
    once M² overflows; the argument of :func:`normal_shock_ratios`.

    Examples
    --------
    >>> from gasdyn2d.relations.normal_shocks import mach_squared_minus_one
    >>> float(mach_squared_minus_one(1e200))
    inf
    """
    if nx.plain_scalars(M):
        return _mach_squared_minus_one_scalar(M)
    M = np.asarray(M, dtype=float)
    with np.errstate(over="ignore"):
        return (M - 1.0) * (M + 1.0)


def _mach_squared_minus_one_scalar(M):
    return (M - 1.0) * (M + 1.0)

class NormalShockRatios(NamedTuple):
    """Plain-core result of :func:`normal_shock_ratios` (all ndarrays, dimensionless)."""

    M2: np.ndarray
    p2_p1: np.ndarray
    rho2_rho1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray
    strength: np.ndarray  #: (p2 - p1)/p1 = 2γw/(γ+1), without the cancellation of p2/p1 - 1


def normal_shock_ratios(w, gamma=1.4):
    """Plain core: ratios across a normal shock with upstream normal Mach number √(1 + w).

    ``w = M1² - 1 >= 0`` is the natural variable: every jump is proportional to
    it, so weak shocks lose no digits (NACA Report 1135, eqs. 93-100, rewritten).
    Above w = 1e300 (and at w = inf) ρ2/ρ1 - 1 = 2/((γ-1) + (γ+1)/w) and
    M2² = ((γ-1) + (γ+1)/w)/(2γ + (γ+1)/w), the limits of a strong shock; the
    ratios that grow like w overflow to inf only where they exceed the float range.
    """
    if nx.plain_scalars(w, gamma):
        return _normal_shock_ratios_scalar(w, gamma)
    w = np.asarray(w, dtype=float)
    if nx.any_true(w > _HUGE_W):
        return _normal_shock_ratios_huge(w, gamma)
    gp, gm = gamma + 1.0, gamma - 1.0
    p_jump = 2.0 * gamma / gp * w  # p2/p1 - 1, eq. 93
    p2_p1 = 1.0 + p_jump
    den = gm * w + gp
    rho_jump = 2.0 * w / den  # ρ2/ρ1 - 1, from eq. 94
    rho2_rho1 = 1.0 + rho_jump
    T2_T1 = p2_p1 / rho2_rho1
    M2 = np.sqrt(den / (gp * p2_p1))  # eq. 96: 2γw + γ + 1 = (γ+1) p2/p1
    # eq. 99: p02/p01 = (ρ2/ρ1)^(γ/(γ-1)) (p2/p1)^(-1/(γ-1)), in logs to keep 1 - O(w³)
    log_p0 = (gamma * np.log1p(rho_jump) - np.log1p(p_jump)) / gm
    p02_p01 = np.exp(log_p0)
    return NormalShockRatios(M2, p2_p1, rho2_rho1, T2_T1, p02_p01, p_jump)


def _normal_shock_ratios_scalar(w, gamma):
    """Scalar form of :func:`normal_shock_ratios` (a NormalShockRatios of floats)."""
    gp, gm = gamma + 1.0, gamma - 1.0
    p_jump = 2.0 * gamma / gp * w
    p2_p1 = 1.0 + p_jump
    if w > _HUGE_W:  # the forms in 1/w (_normal_shock_ratios_huge)
        iw = 1.0 / w
        rho2_rho1 = 1.0 + 2.0 / (gm + gp * iw)
        M2 = math.sqrt((gm + gp * iw) / (2.0 * gamma + gp * iw))
        log_p = math.log(2.0 * gamma / gp) + math.log(w) + math.log1p(gp / (2.0 * gamma) * iw)
        p02_p01 = nx.fexp((gamma * math.log(rho2_rho1) - log_p) / gm)
        return NormalShockRatios(M2, p2_p1, rho2_rho1, p2_p1 / rho2_rho1, p02_p01, p_jump)
    den = gm * w + gp
    rho_jump = nx.fdiv(2.0 * w, den)
    rho2_rho1 = 1.0 + rho_jump
    M2 = nx.fsqrt(nx.fdiv(den, gp * p2_p1))
    log_p0 = nx.fdiv(gamma * nx.flog1p(rho_jump) - nx.flog1p(p_jump), gm)
    return NormalShockRatios(M2, p2_p1, rho2_rho1, nx.fdiv(p2_p1, rho2_rho1), nx.fexp(log_p0),
                             p_jump)

def _normal_shock_ratios_huge(w, gamma):
    """:func:`normal_shock_ratios` for arrays with some w > 1e300, in the forms in 1/w."""
    huge = w > _HUGE_W
    usual = normal_shock_ratios(np.where(huge, 1.0, w), gamma)
    gp, gm = gamma + 1.0, gamma - 1.0
    with np.errstate(over="ignore"):
        iw = 1.0 / np.where(huge, w, 1.0)
        p_jump = 2.0 * gamma / gp * w
        rho2_rho1 = 1.0 + 2.0 / (gm + gp * iw)
        T2_T1 = (1.0 + p_jump) / rho2_rho1
        M2 = np.sqrt((gm + gp * iw) / (2.0 * gamma + gp * iw))
        # eq. 99 in logs: ln(p02/p01) = [γ ln(ρ2/ρ1) - ln(p2/p1)]/(γ-1), p2/p1 = 1 + 2γw/(γ+1)
        log_p = (np.log(2.0 * gamma / gp) + np.log(np.where(huge, w, 1.0))
                 + np.log1p(gp / (2.0 * gamma) * iw))
        p02_p01 = np.exp((gamma * np.log(rho2_rho1) - log_p) / gm)
    pick = lambda far, near: np.where(huge, far, near)  # noqa: E731
    return NormalShockRatios(pick(M2, usual.M2), pick(1.0 + p_jump, usual.p2_p1),
                             pick(rho2_rho1, usual.rho2_rho1), pick(T2_T1, usual.T2_T1),
                             pick(p02_p01, usual.p02_p01), pick(p_jump, usual.strength))


def pitot_ratio(M1, gamma=1.4):
    """Plain core: p02/p1 behind a normal shock (Rayleigh pitot formula, NACA Report 1135, eq. 100)."""
    if nx.plain_scalars(M1, gamma):
        return _pitot_ratio_scalar(M1, gamma)
    M1 = np.asarray(M1, dtype=float)
    if nx.any_true(M1 > _HUGE_MACH):
        # ln(p02/p1) = 2 ln M1 + [γ ln((γ+1)/2) + ln(γ+1) - ln(2γ - (γ-1)/M1²)]/(γ-1),
        # the same formula without M1² (which may overflow); inf where p02/p1 does
        with np.errstate(over="ignore"):
            im2 = (1.0 / M1) / M1
            gp, gm = gamma + 1.0, gamma - 1.0
            far = np.exp(2.0 * np.log(M1) + (gamma * np.log(0.5 * gp) + np.log(gp)
                                             - np.log(2.0 * gamma - gm * im2)) / gm)
            return np.where(M1 > _HUGE_MACH, far, pitot_ratio(np.where(M1 > _HUGE_MACH, 2.0, M1),
                                                              gamma))
    m2 = M1 * M1
    return np.exp(gamma / (gamma - 1.0) * np.log(0.5 * (gamma + 1.0) * m2)
                  + 1.0 / (gamma - 1.0) * np.log((gamma + 1.0) / (2.0 * gamma * m2 - gamma + 1.0)))


def _pitot_ratio_scalar(M1, gamma):
    gp, gm = gamma + 1.0, gamma - 1.0
    if M1 > _HUGE_MACH:
        im2 = (1.0 / M1) / M1
        return nx.fexp(2.0 * math.log(M1) + (gamma * math.log(0.5 * gp) + math.log(gp)
                                             - math.log(2.0 * gamma - gm * im2)) / gm)
    m2 = M1 * M1
    return nx.fexp(nx.fdiv(gamma, gm) * nx.flog(0.5 * gp * m2)
                   + nx.fdiv(1.0, gm) * nx.flog(nx.fdiv(gp, 2.0 * gamma * m2 - gamma + 1.0)))

def normal_shock_state(M1, gamma=1.4):
    """Plain core: (M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, p02/p1, strength) behind a normal shock
    of upstream Mach number M1 >= 1, in one call.

    The array form is :func:`normal_shock_ratios` of w = M1² - 1 and :func:`pitot_ratio`;
    the scalar form runs the same formulas in the same order (for 1 <= M1 < 1e150, the
    other cases through those functions), without building intermediate tuples.

    Examples
    --------
    >>> from gasdyn2d.relations.normal_shocks import normal_shock_state
    >>> [round(x, 6) for x in normal_shock_state(2.0)]
    [0.57735, 4.5, 2.666667, 1.6875, 0.720874, 5.640441, 3.5]
    """
    if type(M1) is float and type(gamma) is float and 1.0 <= M1 < _HUGE_MACH and gamma > 1.0:
        gp, gm = gamma + 1.0, gamma - 1.0
        w = (M1 - 1.0) * (M1 + 1.0)  # mach_squared_minus_one
        p_jump = 2.0 * gamma / gp * w  # _normal_shock_ratios_scalar, eq. 93
        p2_p1 = 1.0 + p_jump
        den = gm * w + gp
        rho_jump = 2.0 * w / den
        rho2_rho1 = 1.0 + rho_jump
        m2 = M1 * M1  # _pitot_ratio_scalar, eq. 100
        pitot = math.exp(gamma / gm * math.log(0.5 * gp * m2)
                         + 1.0 / gm * math.log(gp / (2.0 * gamma * m2 - gamma + 1.0)))
        return (math.sqrt(den / (gp * p2_p1)), p2_p1, rho2_rho1, p2_p1 / rho2_rho1,
                math.exp((gamma * math.log1p(rho_jump) - math.log1p(p_jump)) / gm), pitot,
                p_jump)
    r = normal_shock_ratios(mach_squared_minus_one(M1), gamma)
    return (r.M2, r.p2_p1, r.rho2_rho1, r.T2_T1, r.p02_p01, pitot_ratio(M1, gamma), r.strength)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class NormalShock(ResultTable):
    """Flow on both sides of a normal shock (all fields dimensionless)."""

    M1: FloatArray = unit_field("", "upstream Mach number")
    M2: FloatArray = unit_field("", "downstream Mach number")
    p2_p1: FloatArray = unit_field("", "static pressure ratio")
    rho2_rho1: FloatArray = unit_field("", "density ratio")
    T2_T1: FloatArray = unit_field("", "static temperature ratio")
    p02_p01: FloatArray = unit_field("", "stagnation pressure ratio (recovery), <= 1")
    p02_p1: FloatArray = unit_field(
        "", "pitot ratio: stagnation pressure behind over static pressure ahead")
    strength: FloatArray = unit_field(
        "", "(p2 - p1)/p1, the shock strength, computed without cancellation")
    gamma1: FloatArray = unit_field("", "ratio of specific heats ahead of the shock")
    gamma2: FloatArray = unit_field("", "ratio of specific heats behind the shock")


def _checked_upstream_mach(name, value, gamma, check):
    """(the checked input, the upstream Mach number it gives)."""
    if name == "M1":
        value = check.supersonic_mach(value, "M1")
        return value, value
    if name == "M2":
        low = lowest_downstream_mach(gamma)
        value = check.within(value, "M2", low, 1.0,
                             "in (√((γ-1)/(2γ)), 1], the range behind a normal shock",
                             lower_open=True, limit=low)
        return value, mach_from_downstream_mach(value, gamma)
    if name == "p2_p1":
        value = check.within(value, "p2_p1", 1.0, math.inf, "finite and >= 1 (a shock compresses)",
                             upper_open=True)
        return value, mach_from_pressure_jump(value, gamma)
    if name == "rho2_rho1":
        high = (gamma + 1.0) / (gamma - 1.0)
        value = check.within(value, "rho2_rho1", 1.0, high,
                             "in [1, (γ+1)/(γ-1)) (the strong-shock density limit, reached "
                             "only as M1 → ∞)", upper_open=True, limit=high)
        return value, mach_from_density_jump(value, gamma)
    if name == "T2_T1":
        value = check.within(value, "T2_T1", 1.0, math.inf,
                             "finite and >= 1 (a shock heats the gas)", upper_open=True)
        return value, mach_from_temperature_jump(value, gamma)
    if name == "p02_p01":
        value = check.within(value, "p02_p01", 0.0, 1.0, "in (0, 1] (entropy rises across a shock)",
                             lower_open=True)
        return value, mach_from_stagnation_pressure_ratio(value, gamma)
    low = pitot_ratio(1.0, gamma)
    # the pitot ratio near M1 = 1 carries ~γ/(γ-1) ulp from its exponent: that close below
    # the limit is the limit
    clamped = clamp_to_limit(value, low, "lower",
                             slack=ROUNDING_SLACK * (1.0 + gamma / (gamma - 1.0)))
    clamped = check.within(clamped, "p02_p1", low, math.inf,
                           "finite and >= ((γ+1)/2)^(γ/(γ-1)), its value at M1 = 1",
                           upper_open=True, limit=low)
    return nan_where_nan(clamped, value), mach_from_pitot_ratio(clamped, gamma)


def lowest_downstream_mach(gamma=1.4):
    """√((γ-1)/(2γ)): the Mach number behind a normal shock as M1 → ∞."""
    if type(gamma) is float:
        return math.sqrt((gamma - 1.0) / (2.0 * gamma))
    return np.sqrt((gamma - 1.0) / (2.0 * gamma))


def _normal_shock_core(value, gamma, check, *, name):
    """Checked core of :func:`normal_shock` (floats or arrays): the fields in order."""
    gamma = check.gamma(gamma)
    value, M1 = _checked_upstream_mach(name, value, gamma, check)
    M1 = nan_where_nan(gamma, M1)
    fields = list(normal_shock_state(M1, gamma))
    if name != "M1":
        fields[_STATE_INDEX[name]] = value  # the caller's exact value, not a round trip
        if name == "p2_p1":
            fields[6] = value - 1.0
    return (M1, *fields, gamma, gamma)


_STATE_INDEX = {"M2": 0, "p2_p1": 1, "rho2_rho1": 2, "T2_T1": 3, "p02_p01": 4, "p02_p1": 5}


def normal_shock(M1: ArrayInput = None, *, M2: ArrayInput = None, p2_p1: ArrayInput = None,
                 rho2_rho1: ArrayInput = None, T2_T1: ArrayInput = None,
                 p02_p01: ArrayInput = None, p02_p1: ArrayInput = None, T1: ArrayInput = None,
                 gamma: ArrayInput = None, gas: Gas = None,
                 errors: str = "raise") -> NormalShock:
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
    T1 : float, array_like or Quantity, optional
        Static temperature ahead of the shock [K], > 0: required for a thermally perfect
        ``gas`` (offset units such as °C are converted); with a perfect gas it is checked
        and broadcast but does not change the ratios.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T1`` and no ``gamma``.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    NormalShock
        ``gamma1`` and ``gamma2`` are γ at the temperatures ahead of and behind the
        shock (both ``gamma`` for a perfect gas).

    Raises
    ------
    InvalidInputError
        No or several inputs, a value outside its range, gamma <= 1, a thermally perfect
        gas without ``T1`` (or with ``gamma``), a non-positive ``T1``.

    Notes
    -----
    With w = M1² - 1: p2/p1 = 1 + 2γw/(γ+1), ρ2/ρ1 = 1 + 2w/((γ-1)w + γ+1),
    M2² = ((γ-1)w + γ+1)/(2γw + γ+1). Inverses are closed forms except from
    p02/p01 and p02/p1, which use four Halley steps from explicit starts
    (:func:`mach_from_stagnation_pressure_ratio`, :func:`mach_from_pitot_ratio`).

    For a thermally perfect gas (:mod:`~gasdyn2d.relations.thermally_perfect_shocks`) the
    same three laws hold with h(T) of the gas: they are solved for τ = T2/T1 - 1 by
    fixed-point and Newton steps from the perfect gas at γ(T1), and the inverses by
    bracketed Newton iterations in τ (the inverse from T2/T1 is closed form).

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 93-100 (and its imperfect-gas
    section for the thermally perfect gas, from memory).

    Examples
    --------
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT, normal_shock
    >>> shock = normal_shock(2.0)
    >>> round(shock.M2, 6), round(shock.p02_p01, 6)
    (0.57735, 0.720874)
    >>> round(normal_shock(p2_p1=4.5).M1, 12)
    2.0
    >>> hot = normal_shock(10.0, T1=250.0, gas=AIR_THERMALLY_PERFECT)
    >>> round(hot.T2_T1, 4), round(hot.gamma2, 4)  # 20.3875 and 1.4 for γ = 1.4
    (17.2163, 1.2891)
    """
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(M1) is float and type(gamma) is float and 1.0 <= M1 < math.inf
            and 1.0 < gamma < math.inf and M2 is None and p2_p1 is None and rho2_rho1 is None
            and T2_T1 is None and p02_p01 is None and p02_p1 is None and T1 is None
            and gas is None and errors in SCALAR_CHECKS):
        # the scalar fast lane: valid plain floats, for which the general path's checked
        # core returns exactly these fields; anything else takes the general path
        return NormalShock.from_fields((M1, *normal_shock_state(M1, gamma), gamma, gamma))
    name, value = one_of("normal_shock", M1=M1, M2=M2, p2_p1=p2_p1, rho2_rho1=rho2_rho1,
                         T2_T1=T2_T1, p02_p01=p02_p01, p02_p1=p02_p1)
    gamma, hot = gas_of_call("normal_shock", gamma, gas, T1, "T1",
                             "upstream static temperature")
    call = Call(errors)
    call.take(name, value)
    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T1 is None:
            return call.run(NormalShock, _normal_shock_core, name=name)
    from .thermally_perfect_calls import hot_normal_shock_core, perfect_with_temperature

    call.take("T1", T1, "K")
    if hot is None:  # a perfect gas: T1 checked and broadcast, the ratios do not depend on it
        return call.run(NormalShock, perfect_with_temperature(_normal_shock_core, "T1"),
                        name=name)
    return call.run(NormalShock, hot_normal_shock_core, name=name, gas=hot)
