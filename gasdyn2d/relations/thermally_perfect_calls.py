"""Checked cores of the public relations for a thermally perfect gas.

Every public relation (:func:`~gasdyn2d.isentropic_flow`, :func:`~gasdyn2d.normal_shock`,
:func:`~gasdyn2d.oblique_shock`, :func:`~gasdyn2d.max_deflection`,
:func:`~gasdyn2d.sonic_deflection`, :func:`~gasdyn2d.prandtl_meyer`,
:func:`~gasdyn2d.mach_from_prandtl_meyer`, :func:`~gasdyn2d.expansion_fan`) crosses the
boundary once with :class:`~gasdyn2d.boundary.Call`; when its ``gas`` is thermally perfect
it hands one of the checked cores here to ``Call.run`` instead of its perfect-gas core. A
core here checks its arguments with the call's :class:`~gasdyn2d.boundary.checks.Check`
(the same messages and NaN policy as the perfect gas, with the temperature-dependent
limits), calls the plain cores of :mod:`~gasdyn2d.relations.thermally_perfect`,
:mod:`~gasdyn2d.relations.thermally_perfect_shocks` and
:mod:`~gasdyn2d.relations.thermally_perfect_oblique`, and returns the fields of the
relation's one result type in order.

The temperature that fixes the state is always the last case argument:

=========================================  ==============================================
relation                                   temperature
=========================================  ==============================================
isentropic_flow, prandtl_meyer,            ``T0``, the stagnation temperature (constant
mach_from_prandtl_meyer                    along the isentrope)
normal_shock, oblique_shock,               ``T1``, the static temperature ahead of the
max_deflection, sonic_deflection,          wave
expansion_fan
=========================================  ==============================================

:func:`perfect_with_temperature` wraps a perfect-gas core for a call that gives the
temperature with a perfect gas: it is checked (finite, > 0) and broadcast with the cases,
and otherwise ignored (a perfect gas does not depend on it), so that one call can sweep
either gas model.
"""

from __future__ import annotations

import math

import numpy as np

from .. import numerics as nx
from ..errors import DetachedShockError, NoSolutionError
from ..numerics import nan_where_nan
from ..boundary.checks import clamp_to_limit
from . import thermally_perfect as tp
from . import thermally_perfect_oblique as tpo
from . import thermally_perfect_shocks as tps
from .prandtl_meyer_function import mach_angle_of, mach_from_mach_angle
from .shock_angles import wave_angle_from_normal_excess

__all__ = [
    "perfect_with_temperature",
    "hot_isentropic_core",
    "hot_normal_shock_core",
    "hot_oblique_core",
    "hot_detachment_core",
    "hot_sonic_core",
    "hot_prandtl_meyer_core",
    "hot_mach_from_prandtl_meyer_core",
    "hot_fan_core",
    "TEMPERATURE_WHAT",
]

#: How a message names each temperature argument.
TEMPERATURE_WHAT = {"T0": "a stagnation temperature", "T1": "the static temperature ahead "
                    "of the wave", "T": "a static temperature"}


def _temperature(check, value, name):
    return check.positive(value, name, "K", TEMPERATURE_WHAT[name])


def _nan_where(reference, fields):
    if isinstance(fields, tuple):
        return tuple(nan_where_nan(reference, f) for f in fields)
    return nan_where_nan(reference, fields)


def perfect_with_temperature(core, name):
    """A perfect-gas checked core for a call that also gave the temperature ``name``.

    The temperature comes last among the case arguments; it is checked (finite, > 0, by
    the call's NaN policy), broadcast with the cases (the result has its shape) and NaN
    where it is NaN or invalid, and not otherwise used: a perfect gas's ratios do not
    depend on temperature.
    """

    def checked(*args, **options):
        *values, temperature, check = args
        temperature = _temperature(check, temperature, name)
        return _nan_where(temperature, core(*values, check, **options))

    return checked


def _refuse_unexplained(failed, what, **inputs):
    """A NaN no input check explains is a bug: raise (never a silent NaN)."""
    if not nx.any_true(failed):
        return
    index = tuple(np.argwhere(failed)[0]) if np.ndim(failed) else ()
    values = ", ".join(f"{k} = {float(np.broadcast_to(v, np.shape(failed))[index])!r}"
                       for k, v in inputs.items())
    raise NoSolutionError(
        f"internal error: the thermally perfect {what} gave NaN for a valid case ({values}). "
        "This is a bug in gasdyn2d; please report it with these values.")


def _valid(*values):
    out = True
    for v in values:
        out = out & ~np.isnan(v)
    return out


# ------------------------------------------------------------------ isentropic flow


def _checked_isentropic_mach(name, value, T0, gas, check, supersonic):
    """(the checked input, the Mach number it gives) at stagnation temperature T0."""
    if name == "M":
        value = check.mach(value, "M")
        return value, value
    if name in ("T_T0", "p_p0", "rho_rho0"):
        value = check.within(value, name, 0.0, 1.0, "in (0, 1] (a static-to-stagnation ratio)",
                             lower_open=True)
        inverse = {"T_T0": tp.mach_from_temperature_ratio, "p_p0": tp.mach_from_pressure_ratio,
                   "rho_rho0": tp.mach_from_density_ratio}[name]
        return value, inverse(value, T0, gas)
    if name == "A_Astar":
        value = check.within(value, "A_Astar", 1.0, math.inf,
                             "finite and >= 1 (no section is smaller than the sonic throat)",
                             upper_open=True)
        return value, tp.mach_from_area_ratio(value, T0, gas, supersonic=supersonic)
    if name == "mach_angle":
        value = check.within(value, "mach_angle", 0.0, 0.5 * math.pi,
                             "in (0, π/2] rad (0 to 90°)", lower_open=True)
        return value, mach_from_mach_angle(value)
    value = _checked_nu(value, T0, gas, "prandtl_meyer", check)
    return value, tp.mach_from_prandtl_meyer_angle(value, T0, gas)


def _checked_nu(nu, T0, gas, name, check):
    nu = check.at_least(nu, name, 0.0, unit_text="rad", allow_inf=True)
    nu_max = tp.max_prandtl_meyer_angle(T0, gas)
    return check.within(nu, name, -math.inf, nu_max,
                        "<= ν_max(T0), the turn that expands a sonic stream to vacuum",
                        limit=nu_max, unit_text="rad")


def hot_isentropic_core(value, T0, check, *, name, supersonic, gas):
    """Checked core of :func:`~gasdyn2d.isentropic_flow` for a thermally perfect gas:
    (M, T/T0, p/p0, ρ/ρ0, A/A*, μ, ν) at stagnation temperature T0 [K]."""
    T0 = _temperature(check, T0, "T0")
    value, M = _checked_isentropic_mach(name, value, T0, gas, check, supersonic)
    if name != "M":  # an inverse that lands a few ulp below 1 is the sonic point
        M = clamp_to_limit(M, 1.0, "lower")
    M = nan_where_nan(T0, M)
    ratios = tp.isentropic_ratios(M, T0, gas)
    with np.errstate(invalid="ignore"):
        nu = tp.prandtl_meyer_angle(M, T0, gas)
    fields = [M, ratios.T_T0, ratios.p_p0, ratios.rho_rho0, ratios.A_Astar, mach_angle_of(M), nu]
    if name != "M":
        fields[1 + ("T_T0", "p_p0", "rho_rho0", "A_Astar", "mach_angle",
                    "prandtl_meyer").index(name)] = value
    return tuple(fields)


# ------------------------------------------------------------------ normal shock


def _checked_upstream_mach(name, value, T1, gas, check):
    """(the checked input, the upstream Mach number it gives) at upstream temperature T1."""
    cf, _ = tp.gas_constants(gas)
    if name == "M1":
        value = check.supersonic_mach(value, "M1")
        return value, value
    if name == "M2":
        g_inf = (cf + 1.0) / cf  # every mode excited: the strong-shock limit
        low = math.sqrt((g_inf - 1.0) / (2.0 * g_inf))
        value = check.within(value, "M2", low, 1.0,
                             "in (√((γ∞-1)/(2γ∞)), 1], the range behind a normal shock in this "
                             "gas (γ∞ the fully excited ratio)", lower_open=True, limit=low)
        return value, tps.mach_from_downstream_mach(value, T1, gas)
    if name == "p2_p1":
        value = check.within(value, "p2_p1", 1.0, math.inf,
                             "finite and >= 1 (a shock compresses)", upper_open=True)
        return value, tps.mach_from_pressure_jump(value, T1, gas)
    if name == "rho2_rho1":
        high = 2.0 * cf + 1.0
        value = check.within(value, "rho2_rho1", 1.0, high,
                             "in [1, 2cp_f/R + 1) (the strong-shock density limit with every "
                             "vibrational mode excited, reached only as M1 → ∞)",
                             upper_open=True, limit=high)
        return value, tps.mach_from_density_jump(value, T1, gas)
    if name == "T2_T1":
        value = check.within(value, "T2_T1", 1.0, math.inf,
                             "finite and >= 1 (a shock heats the gas)", upper_open=True)
        return value, tps.mach_from_temperature_jump(value, T1, gas)
    if name == "p02_p01":
        value = check.within(value, "p02_p01", 0.0, 1.0,
                             "in (0, 1] (entropy rises across a shock)", lower_open=True)
        return value, tps.mach_from_stagnation_pressure_ratio(value, T1, gas)
    with np.errstate(invalid="ignore"):
        low = np.exp(tps.log_stagnation_over_static(np.ones_like(np.asarray(T1, dtype=float)),
                                                    T1, tps.upstream_state(T1, gas)))
    low = float(low) if type(value) is float else low
    clamped = clamp_to_limit(value, low, "lower", slack=1e-14)
    clamped = check.within(clamped, "p02_p1", low, math.inf,
                           "finite and >= its value at M1 = 1 (p0/p of a sonic stream at T1)",
                           upper_open=True, limit=low)
    return nan_where_nan(clamped, value), tps.mach_from_pitot_ratio(clamped, T1, gas)


_NORMAL_GIVEN = {"M2": 1, "p2_p1": 2, "rho2_rho1": 3, "T2_T1": 4, "p02_p01": 5, "p02_p1": 6}


def hot_normal_shock_core(value, T1, check, *, name, gas):
    """Checked core of :func:`~gasdyn2d.normal_shock` for a thermally perfect gas: the
    :class:`~gasdyn2d.NormalShock` fields at upstream static temperature T1 [K]."""
    T1 = _temperature(check, T1, "T1")
    value, M1 = _checked_upstream_mach(name, value, T1, gas, check)
    M1 = nan_where_nan(T1, M1)
    if name != "M1":
        M1 = clamp_to_limit(M1, 1.0, "lower")
    shock, pitot = tps.normal_shock_and_pitot(M1, T1, gas)
    fields = [M1, shock.M2, shock.p2_p1, shock.rho2_rho1, shock.T2_T1, shock.p02_p01, pitot,
              shock.strength, shock.gamma1, shock.gamma2]
    if name != "M1":
        fields[_NORMAL_GIVEN[name]] = value  # the caller's exact value, not a round trip
        if name == "p2_p1":
            fields[7] = value - 1.0
    return tuple(fields)


# ------------------------------------------------------------------ oblique shock


def _oblique_fields(M1, ratios):
    return (M1, ratios.deflection, ratios.wave_angle, ratios.Mn1, ratios.Mn2, ratios.M2,
            ratios.p2_p1, ratios.rho2_rho1, ratios.T2_T1, ratios.p02_p01, ratios.strength,
            ratios.gamma1, ratios.gamma2)


def _check_hot_deflection(theta, M1, T1, gas, check):
    theta = check.at_least(theta, "deflection", 0.0, allow_inf=True, unit_text="rad",
                           what="a shock turns the flow into itself; for a turn away from the "
                                "wall use expansion_fan")
    theta_max = tpo.detachment_angles(M1, T1, gas)[0]
    theta_max = float(theta_max) if type(theta) is float else theta_max
    return check.within(
        theta, "deflection", -math.inf, theta_max,
        "at most the detachment deflection θmax(M1, T1) of the gas", limit=theta_max,
        unit_text="rad", error_class=DetachedShockError,
        hint="Beyond θmax no attached shock exists: the shock stands off as a curved bow wave. "
             "Lower the deflection or raise M1.")


def hot_oblique_core(M1, value, T1, check, *, name, strong, gas):
    """Checked core of :func:`~gasdyn2d.oblique_shock` for a thermally perfect gas: the
    :class:`~gasdyn2d.ObliqueShock` fields at upstream static temperature T1 [K]."""
    T1 = _temperature(check, T1, "T1")
    M1 = check.supersonic_mach(M1, "M1")
    M1 = nan_where_nan(T1, M1)
    if name == "deflection":
        theta = value
        ratios = tpo.oblique_shock_from_deflection(M1, T1, theta, gas, strong)
        failed = np.isnan(ratios.wave_angle) & _valid(theta, M1, T1)
        if nx.any_true(failed):  # the limits cost as much as the solve: only on failure
            theta = _check_hot_deflection(theta, M1, T1, gas, check)
            _refuse_unexplained(failed & _valid(theta), "oblique-shock solve", M1=M1,
                                deflection=theta, T1=T1)
        return _oblique_fields(M1, ratios._replace(deflection=nan_where_nan(
            ratios.wave_angle, theta + 0.0 * ratios.wave_angle)))
    if name == "wave_angle":
        mu = mach_angle_of(M1)
        value = clamp_to_limit(value, mu, "lower")  # asin(1/M1) may round below μ
        value = check.within(value, "wave_angle", mu, 0.5 * math.pi,
                             "between the Mach angle μ = asin(1/M1) and π/2 (90°)", limit=mu,
                             unit_text="rad")
        beta = value
    elif name == "Mn1":
        value = clamp_to_limit(clamp_to_limit(value, 1.0, "lower"), M1, "upper")
        value = check.within(value, "Mn1", 1.0, M1,
                             "between 1 and M1 (the normal Mach number of a shock)", limit=M1)
        beta = wave_angle_from_normal_excess(M1, (value - 1.0) * (value + 1.0))
    else:
        with np.errstate(invalid="ignore"):
            p_max = tps.normal_shock_ratios(M1, T1, gas).p2_p1
        p_max = float(p_max) if type(value) is float else p_max
        value = clamp_to_limit(value, p_max, "upper")
        value = check.within(value, "p2_p1", 1.0, p_max,
                             "between 1 and the normal-shock pressure ratio at (M1, T1)",
                             limit=p_max)
        Mn1 = tps.mach_from_pressure_jump(value, T1, gas)
        Mn1 = np.minimum(Mn1, M1)  # the normal shock itself, to rounding
        beta = wave_angle_from_normal_excess(M1, (Mn1 - 1.0) * (Mn1 + 1.0))
    ratios = tpo.oblique_shock_from_wave_angle(M1, T1, beta, gas)
    fields = list(_oblique_fields(M1, ratios))
    if name == "Mn1":
        fields[3] = value
    elif name == "p2_p1":
        fields[6], fields[10] = value, value - 1.0
    return tuple(fields)


def _angle_pair(plain, M1, T1, check, gas):
    T1 = _temperature(check, T1, "T1")
    M1 = nan_where_nan(T1, check.supersonic_mach(M1, "M1"))
    theta, beta = plain(M1, T1, gas)
    at_one = np.asarray(M1) == 1.0  # M1 = 1: both points are the Mach wave at 90°
    if nx.any_true(at_one):
        theta, beta = np.where(at_one, 0.0, theta), np.where(at_one, 0.5 * math.pi, beta)
    return theta, beta


def hot_detachment_core(M1, T1, check, *, gas):
    """Checked core of :func:`~gasdyn2d.max_deflection` for a thermally perfect gas."""
    return _angle_pair(tpo.detachment_angles, M1, T1, check, gas)


def hot_sonic_core(M1, T1, check, *, gas):
    """Checked core of :func:`~gasdyn2d.sonic_deflection` for a thermally perfect gas."""
    return _angle_pair(tpo.sonic_angles, M1, T1, check, gas)


# ------------------------------------------------------------------ Prandtl–Meyer and fans


def hot_prandtl_meyer_core(M, T0, check, *, gas):
    """Checked core of :func:`~gasdyn2d.prandtl_meyer` for a thermally perfect gas."""
    T0 = _temperature(check, T0, "T0")
    M = nan_where_nan(T0, check.supersonic_mach(M, "M"))
    return tp.prandtl_meyer_angle(M, T0, gas)


def hot_mach_from_prandtl_meyer_core(nu, T0, check, *, gas):
    """Checked core of :func:`~gasdyn2d.mach_from_prandtl_meyer` for a thermally perfect gas."""
    T0 = _temperature(check, T0, "T0")
    nu = nan_where_nan(T0, _checked_nu(nu, T0, gas, "nu", check))
    return tp.mach_from_prandtl_meyer_angle(nu, T0, gas)


def _check_room(turn, M1, T1, gas, check):
    """The turn against ν_max(T0) - ν(M1), the turn that expands the stream to vacuum."""
    T0 = tp.stagnation_temperature(M1, T1, gas)
    room = tp.max_prandtl_meyer_angle(T0, gas) - tp.prandtl_meyer_angle(M1, T0, gas)
    room = float(room) if type(turn) is float else room
    return check.within(turn, "deflection", -math.inf, room,
                        "<= ν_max(T0) - ν(M1), the turn that expands the stream to vacuum",
                        limit=room, unit_text="rad")


def hot_fan_core(M1, given, T1, check, *, name, gas):
    """Checked core of :func:`~gasdyn2d.expansion_fan` for a thermally perfect gas: the
    :class:`~gasdyn2d.ExpansionFan` fields at upstream static temperature T1 [K]."""
    T1 = _temperature(check, T1, "T1")
    M1 = nan_where_nan(T1, check.supersonic_mach(M1, "M1"))
    if name == "deflection":
        given = check.at_least(given, "deflection", 0.0, allow_inf=True, unit_text="rad",
                               what="a fan turns the flow away from a compression; use "
                                    "oblique_shock for compressions")
        fan = tp.fan_from_turn(M1, T1, given, gas)
        failed = np.isnan(fan.M2) & _valid(given, M1, T1)
        if nx.any_true(failed):
            given = _check_room(given, M1, T1, gas, check)
            _refuse_unexplained(failed & _valid(given), "fan", M1=M1, deflection=given, T1=T1)
    elif name == "M2":
        given = check.within(given, "M2", M1, math.inf,
                             "finite and >= M1 (a fan accelerates the flow)",
                             upper_open=True, limit=M1)
        fan = tp.fan_from_downstream_mach(M1, T1, given, gas)
    else:
        given = check.within(given, "p2_p1", 0.0, 1.0,
                             "between 0 and 1 (a fan lowers the pressure)")
        fan = tp.fan_from_pressure_ratio(M1, T1, given, gas)
        with np.errstate(invalid="ignore"):
            vacuum = np.asarray(given) == 0.0  # expanded to vacuum: M2 = ∞, ν2 = ν_max
        if nx.any_true(vacuum):
            T0 = tp.stagnation_temperature(M1, T1, gas)
            nu_max = tp.max_prandtl_meyer_angle(T0, gas)
            zero = np.zeros(np.shape(vacuum))
            fan = fan._replace(M2=np.where(vacuum, np.inf, fan.M2),
                               p2_p1=np.where(vacuum, zero, fan.p2_p1),
                               T2_T1=np.where(vacuum, zero, fan.T2_T1),
                               rho2_rho1=np.where(vacuum, zero, fan.rho2_rho1),
                               gamma2=np.where(vacuum, gas.gamma, fan.gamma2),  # frozen at 0 K
                               nu2=np.where(vacuum, nu_max, fan.nu2),
                               turn=np.where(vacuum, nu_max - fan.nu1, fan.turn))
    with np.errstate(invalid="ignore"):
        M2 = np.where(np.isnan(fan.M2), np.nan, np.fmax(fan.M2, M1))  # never slower than M1
    turn = given if name == "deflection" else fan.turn
    p2_p1 = given if name == "p2_p1" else fan.p2_p1
    shape = np.shape(M2)
    nu2 = fan.nu2
    if name == "deflection":
        nu2 = np.where(np.isnan(M2), np.nan, fan.nu1 + turn)  # ν1 + turn exactly
    return (M1, given if name == "M2" else M2, turn, np.broadcast_to(fan.nu1, shape), nu2,
            p2_p1, fan.T2_T1, fan.rho2_rho1, mach_angle_of(np.broadcast_to(M1, shape)),
            mach_angle_of(M2), fan.gamma1, fan.gamma2)
