"""Prandtl–Meyer function and centred expansion fans.

Plain core (floats and ndarrays, radians, no pint): :func:`fan_pressure_ratio`,
:func:`fan_temperature_ratio`, :func:`mach_after_turn`,
:func:`mach_after_fan_pressure_ratio`; the Prandtl–Meyer function itself is in
:mod:`gasdyn2d.relations.prandtl_meyer_function` (re-exported here). Unit boundary: :func:`prandtl_meyer`,
:func:`mach_from_prandtl_meyer`, :func:`expansion_fan`.

Each plain core has a scalar form on the math module right after it (the same
algorithm, floats in and out); the array form hands plain floats to it. Huge
Mach numbers (up to 1e300 and inf) give the limits, without overflow warnings.
"""

from __future__ import annotations

import dataclasses
import math
from typing import Any

import numpy as np

from .. import numerics as nx
from ..boundary import SCALAR_CHECKS, Call, ResultTable, one_of, unit_field
from ..boundary.units import TWO_PI
from ..boundary.types import ArrayInput, FloatArray
from .gas import gas_of_call
from .isentropic import mach_after_isentropic_pressure_change, mach_angle_of
from .prandtl_meyer_function import (
    check_prandtl_meyer_angle,
    mach_from_prandtl_meyer_angle,
    max_prandtl_meyer_angle,
    prandtl_meyer_angle,
    prandtl_meyer_degree_limit,
)

__all__ = [
    "prandtl_meyer",
    "mach_from_prandtl_meyer",
    "expansion_fan",
    "ExpansionFan",
    "prandtl_meyer_angle",
    "mach_from_prandtl_meyer_angle",
    "max_prandtl_meyer_angle",
    "fan_pressure_ratio",
    "fan_temperature_ratio",
    "mach_after_turn",
    "mach_after_fan_pressure_ratio",
]

_LARGE_FAN_MACH = 1e8  # above this the fan pressure ratio's logarithms would cancel


def fan_temperature_ratio(M1, M2, gamma=1.4):
    """Plain core: T2/T1 across an isentropic turn from M1 to M2 (0 when M2 is infinite)."""
    if type(M1) is float and type(M2) is float and type(gamma) is float:
        h = 0.5 * (gamma - 1.0)
        return 0.0 if M2 == math.inf else (1.0 + h * M1 * M1) / (1.0 + h * M2 * M2)
    h = 0.5 * (np.asarray(gamma, dtype=float) - 1.0)
    with np.errstate(over="ignore", invalid="ignore"):
        ratio = (1.0 + h * M1 * M1) / (1.0 + h * M2 * M2)
    return np.where(np.isinf(M2), 0.0, ratio)


def mach_after_turn(M1, nu1, turn, gamma=1.4):
    """Plain core: Mach number after a fan of ``turn`` >= 0 [rad] from M1 (ν(M1) = ``nu1``).

    A fan never slows the flow: the inverse's rounding may not give M2 < M1.
    """
    if type(M1) is float and type(turn) is float and type(nu1) is float:
        if turn == 0.0:
            return M1
        M2 = mach_from_prandtl_meyer_angle(nu1 + turn, gamma)
        return max(M2, M1) if M2 == M2 else M2
    M2 = mach_from_prandtl_meyer_angle(nu1 + turn, gamma)
    with np.errstate(invalid="ignore"):
        M2 = np.where(turn == 0.0, M1, np.fmax(M2, M1))
    return np.where(np.isnan(nu1 + turn) | np.isnan(M1 + turn), np.nan, M2)  # fmax hid NaN


def mach_after_fan_pressure_ratio(M1, p2_p1, gamma=1.4):
    """Plain core: Mach number after a fan to pressure ratio 0 <= p2/p1 <= 1 (inf at 0)."""
    if type(M1) is float and type(p2_p1) is float:
        if p2_p1 == 1.0:
            return M1
        if p2_p1 == 0.0:
            return math.inf
        M2 = mach_after_isentropic_pressure_change(M1, p2_p1, gamma)
        return max(M2, M1) if M2 == M2 else M2
    with np.errstate(divide="ignore", invalid="ignore"):
        M2 = mach_after_isentropic_pressure_change(M1, p2_p1, gamma)
        M2 = np.where(p2_p1 == 1.0, M1, np.fmax(M2, M1))  # rounding must not slow the flow
    return np.where(np.isnan(p2_p1) | np.isnan(M1), np.nan, M2)


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


def _prandtl_meyer_core(M, gamma, check):
    gamma = check.gamma(gamma)
    return prandtl_meyer_angle(check.supersonic_mach(M, "M"), gamma)


def _run_value(function, call, T, T_name, gamma, hot, core, hot_core, unit_text, name, doc):
    """Run a one-value relation: perfect gas (T absent or only checked) or thermally perfect."""
    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T is None:
            return call.run_value(core, unit_text, name, doc)
    from .thermally_perfect_calls import perfect_with_temperature

    call.take(T_name, T, "K")
    if hot is None:  # a perfect gas: the temperature checked and broadcast, not used
        return call.run_value(perfect_with_temperature(core, T_name), unit_text, name, doc)
    return call.run_value(hot_core, unit_text, name, doc, gas=hot)


def prandtl_meyer(M: ArrayInput, *, T0: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                  errors: str = "raise") -> FloatArray:
    """Prandtl–Meyer function ν(M): the turn that expands a sonic stream to Mach M.

    Parameters
    ----------
    M : float or array_like
        Mach number [-], >= 1.
    T0 : float, array_like or Quantity, optional
        Stagnation temperature [K], > 0: required for a thermally perfect ``gas`` (ν is
        then measured from the sonic state of that T0); with a perfect gas it is checked
        and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T0`` and no ``gamma``.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    float or ndarray
        ν [rad] (a Quantity in radians if ``M`` was a Quantity).

    Raises
    ------
    InvalidInputError
        M below 1 or not finite; gamma <= 1; a thermally perfect gas without ``T0``
        (or with ``gamma``); a non-positive ``T0``.

    Notes
    -----
    ν = √((γ+1)/(γ-1)) atan √((γ-1)(M²-1)/(γ+1)) - atan √(M²-1), evaluated
    through a series near M = 1 where the two terms cancel. For a thermally perfect
    gas ν = ∫ √(M² - 1) dV/V along the isentrope of T0 has no closed form: two 24-point
    Gauss–Legendre panels and a frozen-gas tail (:func:`~gasdyn2d.relations.
    thermally_perfect.prandtl_meyer_angle`, <= 2e-14 relative against mpmath).

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 171 (and its imperfect-gas
    section for the thermally perfect gas, from memory).

    Examples
    --------
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT, prandtl_meyer
    >>> import numpy as np
    >>> round(float(np.degrees(prandtl_meyer(2.0))), 4)
    26.3798
    >>> round(float(np.degrees(prandtl_meyer(2.0, T0=300.0, gas=AIR_THERMALLY_PERFECT))), 4)
    26.3813
    """
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(M) is float and type(gamma) is float and 1.0 <= M < math.inf
            and 1.0 < gamma < math.inf and T0 is None and gas is None
            and errors in SCALAR_CHECKS):
        return prandtl_meyer_angle(M, gamma)  # the scalar fast lane
    gamma, hot = gas_of_call("prandtl_meyer", gamma, gas, T0, "T0", "stagnation temperature")
    call = Call(errors)
    call.take("M", M)
    from_hot: Any = None
    if hot is not None:
        from .thermally_perfect_calls import hot_prandtl_meyer_core as from_hot
    return _run_value("prandtl_meyer", call, T0, "T0", gamma, hot, _prandtl_meyer_core,
                      from_hot, "rad", "prandtl_meyer", "Prandtl–Meyer angle ν")


def _mach_from_prandtl_meyer_core(nu, gamma, check):
    gamma = check.gamma(gamma)
    return mach_from_prandtl_meyer_angle(check_prandtl_meyer_angle(nu, gamma, "nu", check), gamma)


def mach_from_prandtl_meyer(nu: ArrayInput, *, T0: ArrayInput = None,
                            gamma: ArrayInput = None, gas=None,
                            errors: str = "raise") -> FloatArray:
    """Mach number whose Prandtl–Meyer function is ``nu``.

    Parameters
    ----------
    nu : float, array_like or Quantity
        Prandtl–Meyer angle [rad], 0 <= ν <= ν_max (ν_max = 130.454° for γ = 1.4; for a
        thermally perfect gas ν_max(T0), 130.46° at 300 K and 141.60° at 3000 K for air).
    T0 : float, array_like or Quantity, optional
        Stagnation temperature [K], > 0: required for a thermally perfect ``gas``; with a
        perfect gas it is checked and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T0`` and no ``gamma``.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    float or ndarray
        Mach number [-] (``inf`` at ν = ν_max).

    Raises
    ------
    InvalidInputError
        ν negative or above ν_max; gamma <= 1; a thermally perfect gas without ``T0``
        (or with ``gamma``); a non-positive ``T0``.

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
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(nu) is float and type(gamma) is float and 0.0 <= nu <= TWO_PI
            and 1.0 < gamma < math.inf and T0 is None and gas is None
            and errors in SCALAR_CHECKS):
        M = mach_from_prandtl_meyer_angle(nu, gamma)  # the scalar fast lane; NaN beyond
        if M == M:                                    # ν_max takes the general path
            return M
    gamma, hot = gas_of_call("mach_from_prandtl_meyer", gamma, gas, T0, "T0",
                             "stagnation temperature")
    call = Call(errors)
    call.take("nu", nu, "rad",
              degrees_above=prandtl_meyer_degree_limit(gamma) if hot is None else TWO_PI)
    from_hot: Any = None
    if hot is not None:
        from .thermally_perfect_calls import hot_mach_from_prandtl_meyer_core as from_hot
    return _run_value("mach_from_prandtl_meyer", call, T0, "T0", gamma, hot,
                      _mach_from_prandtl_meyer_core, from_hot, "", "M", "Mach number")


@dataclasses.dataclass(frozen=True, repr=False)
class ExpansionFan(ResultTable):
    """States on either side of a centred Prandtl–Meyer expansion fan.

    Angles are in radians (Quantities in the caller's angle unit when any input
    was a Quantity); ``mu1`` and ``mu2`` are the Mach angles of the head and tail
    Mach lines measured from the local flow direction on each side.
    """

    M1: FloatArray = unit_field("", "upstream Mach number")
    M2: FloatArray = unit_field("", "downstream Mach number")
    deflection: FloatArray = unit_field("rad", "flow turn through the fan, >= 0")
    nu1: FloatArray = unit_field("rad", "Prandtl–Meyer angle upstream")
    nu2: FloatArray = unit_field("rad", "Prandtl–Meyer angle downstream")
    p2_p1: FloatArray = unit_field("", "static pressure ratio")
    T2_T1: FloatArray = unit_field("", "static temperature ratio")
    rho2_rho1: FloatArray = unit_field("", "density ratio")
    mu1: FloatArray = unit_field("rad", "Mach angle upstream (head of the fan)")
    mu2: FloatArray = unit_field("rad", "Mach angle downstream (tail of the fan)")
    gamma1: FloatArray = unit_field("", "ratio of specific heats upstream")
    gamma2: FloatArray = unit_field("", "ratio of specific heats downstream")



def _fan_core(M1, given, gamma, check, *, name):
    """Checked core of :func:`expansion_fan` (floats or arrays): the fields in order."""
    gamma = check.gamma(gamma)
    M1 = check.supersonic_mach(M1, "M1")
    nu1 = prandtl_meyer_angle(M1, gamma)
    if name == "deflection":
        given = check.at_least(given, "deflection", 0.0, allow_inf=True, unit_text="rad",
                               what="a fan turns the flow away from a compression; use "
                                    "oblique_shock for compressions")
        room = max_prandtl_meyer_angle(gamma) - nu1
        given = check.within(given, "deflection", -math.inf, room,
                             "<= ν_max - ν(M1), the turn that expands the stream to vacuum",
                             limit=room, unit_text="rad")
        M2 = mach_after_turn(M1, nu1, given, gamma)
        nu2 = nu1 + given
    else:
        if name == "M2":
            given = check.within(given, "M2", M1, math.inf,
                                 "finite and >= M1 (a fan accelerates the flow)",
                                 upper_open=True, limit=M1)
            M2 = given
        else:
            given = check.within(given, "p2_p1", 0.0, 1.0,
                                 "between 0 and 1 (a fan lowers the pressure)")
            M2 = mach_after_fan_pressure_ratio(M1, given, gamma)
        nu2 = prandtl_meyer_angle(M2, gamma)
    p2_p1 = given if name == "p2_p1" else fan_pressure_ratio(M1, M2, gamma)
    T2_T1 = fan_temperature_ratio(M1, M2, gamma)
    return (M1, M2, given if name == "deflection" else nu2 - nu1, nu1, nu2, p2_p1, T2_T1,
            p2_p1 ** (1.0 / gamma),  # isentropic: ρ ∝ p^(1/γ)
            mach_angle_of(M1), mach_angle_of(M2), gamma, gamma)


def expansion_fan(M1: ArrayInput, *, deflection: ArrayInput = None, p2_p1: ArrayInput = None,
                  M2: ArrayInput = None, T1: ArrayInput = None, gamma: ArrayInput = None,
                  gas=None, errors: str = "raise") -> ExpansionFan:
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
    T1 : float, array_like or Quantity, optional
        Static temperature ahead of the fan [K], > 0: required for a thermally perfect
        ``gas``; with a perfect gas it is checked and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T1`` and no ``gamma``.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    ExpansionFan
        ``gamma1``, ``gamma2``: γ at the temperatures ahead of and behind the fan (both
        ``gamma`` for a perfect gas). For a thermally perfect gas ``nu1`` and ``nu2`` are
        measured at the stream's stagnation temperature.

    Raises
    ------
    InvalidInputError
        An input outside the ranges above, for example a turn that would
        expand the stream past vacuum; a thermally perfect gas without ``T1``
        (or with ``gamma``); a non-positive ``T1``.

    Notes
    -----
    ν2 = ν1 + θ; M2 = ν⁻¹(ν2); the ratios follow from the isentropic relations.
    For a thermally perfect gas the same holds at the stream's stagnation temperature
    (from h(T0) = h(T1) + V1²/2), with ν from the quadrature of
    :func:`~gasdyn2d.relations.thermally_perfect.prandtl_meyer_angle` and the ratios
    from the entropy function (:func:`~gasdyn2d.relations.thermally_perfect.fan_from_turn`).

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 43-45 and 171 (and its
    imperfect-gas section for the thermally perfect gas, from memory).

    Examples
    --------
    >>> from gasdyn2d import expansion_fan, ureg
    >>> fan = expansion_fan(2.0, deflection=10 * ureg.deg)
    >>> round(fan.M2, 4), round(fan.p2_p1, 4)
    (2.3849, 0.548)
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT
    >>> hot = expansion_fan(2.0, deflection=10 * ureg.deg, T1=1500.0, gas=AIR_THERMALLY_PERFECT)
    >>> round(hot.M2, 4), round(hot.p2_p1, 4)
    (2.3368, 0.571)
    """
    if gas is None and gamma is None:
        gamma = 1.4
    check = SCALAR_CHECKS.get(errors)
    if (type(M1) is float and type(deflection) is float and type(gamma) is float
            and check is not None and p2_p1 is None and M2 is None and T1 is None
            and gas is None and 0.0 <= deflection <= TWO_PI):
        # the scalar fast lane: the general path's checked core on the floats as given
        return ExpansionFan.from_fields(_fan_core(M1, deflection, gamma, check,
                                                  name="deflection"))
    name, value = one_of("expansion_fan", deflection=deflection, p2_p1=p2_p1, M2=M2)
    gamma, hot = gas_of_call("expansion_fan", gamma, gas, T1, "T1",
                             "upstream static temperature")
    call = Call(errors)
    call.take("M1", M1)
    if name == "deflection":
        call.take(name, value, "rad", degrees_above=prandtl_meyer_degree_limit(gamma)
                  if hot is None else TWO_PI)
    else:
        call.take(name, value)
    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T1 is None:
            return call.run(ExpansionFan, _fan_core, name=name)
    from .thermally_perfect_calls import hot_fan_core, perfect_with_temperature

    call.take("T1", T1, "K")
    if hot is None:  # a perfect gas: T1 checked and broadcast, the ratios do not depend on it
        return call.run(ExpansionFan, perfect_with_temperature(_fan_core, "T1"), name=name)
    return call.run(ExpansionFan, hot_fan_core, name=name, gas=hot)
