"""Waves meeting waves: crossing and merging shocks, and pressure matching.

Each function states its problem as a region graph (inflow region ``"1"`` along the
x axis, the graph written out in its Notes), solves it for all cases at once with the
pattern solver (:mod:`gasdyn2d.patterns.solver`), and returns a small result object of
fixed fields:

- :func:`shock_crossing` — two shocks from opposite wedges crossing, with the
  transmitted waves and the slip line;
- :func:`merging_shocks` — two shocks of the same family merging, with the
  reflected wave and the slip line;
- :func:`turn_to_pressure` — the single wave that brings a stream to a pressure.

All are inviscid, perfect-gas results for preliminary design.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary import Call, ResultTable, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..errors import NoSolutionError
from ..relations.isentropic import mach_angle_of
from ..relations.normal_shocks import normal_shock_ratios
from ..relations import thermally_perfect_oblique as tpo
from ..relations.gas import gas_of_call
from ..relations.oblique_shocks import detachment_angles
from ..relations.simple_waves import turn_state
from .graph import ConditionLink, WaveLink, plan_pattern
from .ready_checks import (CaseReasons, check_mach_and_gamma, check_shock_turn, scalar_of,
                           shaped, solve_ready)

__all__ = [
    "shock_crossing", "ShockCrossing",
    "merging_shocks", "MergingShocks",
    "turn_to_pressure", "PressureMatchingWave",
]


# ---------------------------------------------------------------- shock crossing


@dataclasses.dataclass(frozen=True, repr=False)
class ShockCrossing(ResultTable):
    """Two shocks from opposite wedges crossing, with the slip line they leave.

    Regions: 1 free stream, 2 below the upper wedge, 3 above the lower wedge,
    4 above the slip line (region 2 after the transmitted lower shock),
    5 below it (region 3 after the transmitted upper shock). Transmitted
    waves are called ``above`` (crossing region 2, left-running) and
    ``below`` (crossing region 3, right-running); their ``turn`` is the
    signed change of flow direction.
    """

    slip_direction: FloatArray = unit_field(
        "rad", "slip-line direction, > 0 towards the upper wedge")
    p_p1: FloatArray = unit_field("", "pressure on the slip line over p1")
    M_above_slip: FloatArray = unit_field("", "Mach number in region 4")
    M_below_slip: FloatArray = unit_field("", "Mach number in region 5")
    transmitted_above_kind: FloatArray = unit_field("", "'shock' or 'fan'", dtype=str)
    transmitted_above_turn: FloatArray = unit_field("rad", "its signed turn")
    transmitted_above_wave_angle: FloatArray = unit_field(
        "rad", "shock angle from region 2's flow")
    transmitted_below_kind: FloatArray = unit_field("", "'shock' or 'fan'", dtype=str)
    transmitted_below_turn: FloatArray = unit_field("rad", "its signed turn")
    transmitted_below_wave_angle: FloatArray = unit_field(
        "rad", "shock angle from region 3's flow")
    failure: FloatArray = unit_field("", "why a case has no solution ('' where solved)",
                                     dtype=str, default="")


#: 1 -(upper, right, -δu)-> 2 -(left, unknown)-> 4; 1 -(lower, left, +δl)-> 3 -(right,
#: unknown)-> 5; slip line 4|5.
_CROSSING = plan_pattern("1", (
    WaveLink("upper shock", "1", "2", "right", "turn"),
    WaveLink("lower shock", "1", "3", "left", "turn"),
    WaveLink("transmitted above", "2", "4", "left"),
    WaveLink("transmitted below", "3", "5", "right")), (ConditionLink("slip line", ("4", "5")),))


def shock_crossing(M1: ArrayInput, deflection_upper: ArrayInput, deflection_lower: ArrayInput,
                   *, gamma: ArrayInput = 1.4, errors: str = "raise") -> ShockCrossing:
    """Crossing of the shocks from an upper wedge (turning the flow down) and a lower one (up).

    Parameters
    ----------
    M1 : float or array_like
        Free-stream Mach number, > 1.
    deflection_upper, deflection_lower : float, array_like or Quantity
        Flow turns of the two incident shocks [rad], each within θmax(M1).
    gamma : float or array_like, optional
    errors : {"raise", "nan"}
        A case without solution: raise (naming the case, its inputs and the wave
        or condition that fails), or NaN with the reason in ``failure``.

    Returns
    -------
    ShockCrossing

    Notes
    -----
    Region graph: 1 -(upper, right-running, turn -δu)-> 2 -(left-running,
    unknown)-> 4; 1 -(lower, left-running, turn +δl)-> 3 -(right-running,
    unknown)-> 5; slip line 4|5 (p4 = p5, θ4 = θ5). Two unknowns, two
    conditions, started from the linear-theory guess θ4 = δl - δu.

    References
    ----------
    Ben-Dor (2007), *Shock Wave Reflection Phenomena*, ch. 3 (shock-wave
    interactions of opposite families).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import shock_crossing
    >>> x = shock_crossing(3.0, np.radians(8.0), np.radians(12.0))
    >>> round(float(np.degrees(x.slip_direction)), 4), round(x.p_p1, 4)
    (3.9605, 3.8303)
    """
    call = Call(errors)
    call.take("M1", M1)
    call.take("deflection_upper", deflection_upper, "rad")
    call.take("deflection_lower", deflection_lower, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ShockCrossing, _crossing_core)


def _crossing_core(M, du, dl, g, check):
    """Checked core of :func:`shock_crossing` (floats or case-shaped arrays)."""
    reasons = CaseReasons(M)
    M, g = check_mach_and_gamma(M, g, check, reasons)
    inputs = {"M1": M, "deflection_upper": du, "deflection_lower": dl}
    du = check_shock_turn(du, M, g, "deflection_upper", check, reasons, wave="upper shock")
    dl = check_shock_turn(dl, M, g, "deflection_lower", check, reasons, wave="lower shock")
    shape = np.shape(M)
    raw = solve_ready(_CROSSING, {"M": M, "d": 0.0, "g": g, "w:upper shock": -du,
                                  "w:lower shock": dl, "guess:transmitted above": dl,
                                  "guess:transmitted below": -du, "c:0": 0.0}, shape)
    reasons.add(raw.failure)
    failure = reasons.finish(check, "shock_crossing", inputs)
    keep = _keeper(raw, shape)
    above, below = raw.waves["transmitted above"], raw.waves["transmitted below"]
    return (keep(raw.regions["4"].direction), keep(np.exp(raw.regions["4"].lnp)),
            keep(raw.regions["4"].M), keep(raw.regions["5"].M), _kind(raw, "transmitted above",
                                                                        shape),
            keep(above[0]), keep(above[1].wave_angle), _kind(raw, "transmitted below", shape),
            keep(below[0]), keep(below[1].wave_angle), failure)


def _keeper(raw, shape):
    """Values of solved cases in the case shape (NaN elsewhere)."""
    return lambda v: shaped(np.where(raw.ok, v, np.nan), shape)


def _kind(raw, name, shape):
    """'shock' or 'fan' per solved case, 'none' elsewhere."""
    is_shock = raw.waves[name][1].is_shock
    kind = np.where(raw.ok, np.where(is_shock, "shock", "fan"), "none")
    return str(kind) if not shape else np.reshape(kind, shape)


# ---------------------------------------------------------------- merging shocks

@dataclasses.dataclass(frozen=True, repr=False)
class MergingShocks(ResultTable):
    """Two left-running shocks from successive corners of a lower wall merging.

    Regions: 1 free stream, 2 between the corners, 3 on the second ramp,
    4 behind the merged shock (above the slip line), 5 behind the reflected
    wave (below it).
    """

    slip_direction: FloatArray = unit_field("rad", "slip-line direction from the x axis")
    p_p1: FloatArray = unit_field("", "pressure on the slip line over p1")
    wave_angle: FloatArray = unit_field("rad", "merged shock angle from the free stream")
    merged_turn: FloatArray = unit_field("rad", "flow turn across the merged shock")
    reflected_kind: FloatArray = unit_field("", "'shock' or 'fan'", dtype=str)
    reflected_turn: FloatArray = unit_field("rad", "signed turn across the reflected wave")
    M_above_slip: FloatArray = unit_field("", "Mach number in region 4")
    M_below_slip: FloatArray = unit_field("", "Mach number in region 5")
    failure: FloatArray = unit_field("", "why a case has no solution ('' where solved)",
                                     dtype=str, default="")


#: 1 -(+δ1)-> 2 -(+δ2)-> 3, 1 -(merged, left, unknown)-> 4, 3 -(reflected, right, unknown)-> 5,
#: slip line 4|5.
_MERGING = plan_pattern("1", (
    WaveLink("first", "1", "2", "left", "turn"),
    WaveLink("second", "2", "3", "left", "turn"),
    WaveLink("merged", "1", "4", "left"),
    WaveLink("reflected", "3", "5", "right")), (ConditionLink("slip line", ("4", "5")),))


def merging_shocks(M1: ArrayInput, deflection_first: ArrayInput, deflection_second: ArrayInput,
                   *, T1: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                   errors: str = "raise") -> MergingShocks:
    """Two shocks of the same family meet and merge; a reflected wave and a slip line leave.

    Parameters
    ----------
    M1 : float or array_like
        Free-stream Mach number, > 1.
    deflection_first, deflection_second : float, array_like or Quantity
        Turns of the first corner (within θmax(M1)) and of the second
        corner (within θmax(M2)) [rad].
    T1 : float, array_like or Quantity, optional
        Free-stream static temperature [K]: required for a thermally perfect ``gas``
        (every wave is then that gas's at its region's temperature).
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``); a thermally perfect one needs ``T1``.
    errors : {"raise", "nan"}
        A case without solution: raise (naming the case, its inputs and the wave
        or condition that fails), or NaN with the reason in ``failure``.

    Returns
    -------
    MergingShocks

    Notes
    -----
    Region graph: 1 -(+δ1)-> 2 -(+δ2)-> 3, 1 -(merged, left, unknown)-> 4,
    3 -(reflected, right, unknown)-> 5, slip line 4|5. The reflected wave
    is a shock or a fan as the solution decides, and weak either way: the
    two routes from region 1 differ only through the entropy jumps, which
    are third order in the shock strengths, so its turn is of third order in
    the corner turns.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import merging_shocks
    >>> m = merging_shocks(2.4, np.radians(6.0), np.radians(7.0))
    >>> m.reflected_kind, round(float(np.degrees(m.slip_direction)), 4)
    ('fan', 13.0091)
    """
    gamma, hot = gas_of_call("merging_shocks", gamma, gas, T1, "T1",
                             "free-stream static temperature")
    call = Call(errors)
    call.take("M1", M1)
    call.take("deflection_first", deflection_first, "rad")
    call.take("deflection_second", deflection_second, "rad")
    call.take("gamma", gamma if hot is None else hot.gamma, keep_scalar=True)
    if hot is None:
        return call.run(MergingShocks, _merging_core)
    call.take("T1", T1, "K")
    return call.run(MergingShocks, _merging_core, gas=hot)


def _merging_core(M, d1, d2, g, *rest, gas=None):
    """Checked core of :func:`merging_shocks` (floats or case-shaped arrays); with a
    thermally perfect ``gas`` the free-stream temperature comes before the check."""
    *T1, check = rest
    reasons = CaseReasons(M)
    M, g = check_mach_and_gamma(M, g, check, reasons)
    inputs = {"M1": M, "deflection_first": d1, "deflection_second": d2}
    extra = {}
    if gas is None:
        limit1, limit2 = None, None
        M2 = None
    else:  # the limits of the thermally perfect gas at each region's temperature
        T1 = T1[0]
        with np.errstate(invalid="ignore"):
            bad = (T1 <= 0.0) | (T1 == np.inf)  # NaN is not bad: NaN in, NaN out
        reasons.note(bad if not reasons.scalar else bool(bad),
                     "T1 = {} K is not a finite temperature > 0.", T1)
        T1 = check.positive(T1, "T1", "K", "the free-stream static temperature")
        limit1 = scalar_of(tpo.detachment_angles(M, T1, gas)[0])
        extra = {"T_in": T1}
    d1 = check_shock_turn(d1, M, g, "deflection_first", check, reasons, wave="first shock",
                          theta_max=limit1)
    if gas is None:
        M2 = scalar_of(turn_state(M, d1, g).M2)
        theta_max = scalar_of(detachment_angles(M, g)[0])
    else:
        first = tpo.turn_state(M, T1, d1, gas)
        M2, T2 = scalar_of(first.M2), T1 * scalar_of(first.T2_T1)
        limit2 = scalar_of(tpo.detachment_angles(M2, T2, gas)[0])
        theta_max = limit1
    d2 = check_shock_turn(d2, M2, g, "deflection_second", check, reasons, upstream="M2",
                          wave="second shock", free_stream=M, theta_max=limit2)
    shape = np.shape(M)
    plan = _MERGING if gas is None else _MERGING._replace(gas=gas)
    raw = solve_ready(plan, {"M": M, "d": 0.0, "g": g, "w:first": d1, "w:second": d2,
                             "guess:merged": np.minimum(d1 + d2, 0.999 * theta_max),
                             "guess:reflected": 0.0, "c:0": 0.0, **extra}, shape)
    reasons.add(raw.failure)
    failure = reasons.finish(check, "merging_shocks", inputs)
    keep = _keeper(raw, shape)
    merged, reflected = raw.waves["merged"], raw.waves["reflected"]
    return (keep(raw.regions["4"].direction), keep(np.exp(raw.regions["4"].lnp)),
            keep(merged[1].wave_angle), keep(merged[0]), _kind(raw, "reflected", shape),
            keep(reflected[0]), keep(raw.regions["4"].M), keep(raw.regions["5"].M), failure)


# ---------------------------------------------------------------- pressure matching

@dataclasses.dataclass(frozen=True, repr=False)
class PressureMatchingWave(ResultTable):
    """The single wave that brings a stream to a given pressure."""

    kind: FloatArray = unit_field("", "'shock' (p2/p1 > 1) or 'fan' (< 1)", dtype=str)
    deflection: FloatArray = unit_field("rad", "magnitude of the flow turn")
    M2: FloatArray = unit_field("", "Mach number behind the wave")
    wave_angle: FloatArray = unit_field(
        "rad", "shock angle from the upstream flow (NaN for a fan)")
    #: Mach angle of the fan's first line, from the upstream flow (NaN for a shock)
    fan_head_angle: object = unit_field("rad")
    #: Mach angle of the fan's last line, from the turned flow (NaN for a shock)
    fan_tail_angle: object = unit_field("rad")
    failure: FloatArray = unit_field("", "why a case has no solution ('' where solved)",
                                     dtype=str, default="")


#: 1 -(lip wave, left, given pressure)-> 2.
_LIP = plan_pattern("1", (WaveLink("lip wave", "1", "2", "left", "pressure"),), ())


def turn_to_pressure(M1: ArrayInput, p2_p1: ArrayInput, *, gamma: ArrayInput = 1.4,
                     errors: str = "raise") -> PressureMatchingWave:
    """The single shock or fan that takes a stream M1 to the pressure ratio p2/p1.

    As at the lip of a planar nozzle exhausting into still air: an
    over-expanded jet (ambient above exit pressure) turns through a shock, an
    under-expanded one through a fan.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number, > 1.
    p2_p1 : float or array_like
        Pressure ratio to reach, > 0 and at most the normal-shock ratio.
    gamma : float or array_like, optional
    errors : {"raise", "nan"}
        A case without solution: raise (naming the case, its inputs and the wave
        or condition that fails), or NaN with the reason in ``failure``.

    Returns
    -------
    PressureMatchingWave

    Raises
    ------
    NoSolutionError
        p2_p1 above the normal-shock pressure ratio of M1 (unreachable).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import turn_to_pressure
    >>> lip = turn_to_pressure(2.0, 1.5)
    >>> lip.kind, round(float(np.degrees(lip.deflection)), 4), round(lip.M2, 4)
    ('shock', 7.4933, 1.7321)
    """
    call = Call(errors)
    call.take("M1", M1)
    call.take("p2_p1", p2_p1)
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(PressureMatchingWave, _pressure_core)


def _pressure_core(M, p, g, check):
    """Checked core of :func:`turn_to_pressure` (floats or case-shaped arrays)."""
    reasons = CaseReasons(M)
    M, g = check_mach_and_gamma(M, g, check, reasons)
    with np.errstate(invalid="ignore"):
        positive = (p > 0) & (p != np.inf)
        reasons.note(~positive if not reasons.scalar else not positive,
                     "p2_p1 = {} is not a finite pressure ratio > 0.", p)
        p = check.reject(~positive if not reasons.scalar else not positive, p, "p2_p1",
                         "finite and > 0")
        p_max = scalar_of(normal_shock_ratios((M - 1.0) * (M + 1.0), g).p2_p1)
        reasons.note(p > p_max, "the wave cannot reach p2_p1 = {}: a single shock gives at "
                     "most the normal-shock ratio {} of M1 = {}.", p, p_max, M)
        p = check.reject(p > p_max, p, "p2_p1", "at most the normal-shock pressure ratio of M1 "
                         "(no single wave reaches more)", limit=p_max,
                         error_class=NoSolutionError)
    shape = np.shape(M)
    raw = solve_ready(_LIP, {"M": M, "d": 0.0, "g": g, "w:lip wave": p}, shape)
    reasons.add(raw.failure)
    failure = reasons.finish(check, "turn_to_pressure", {"M1": M, "p2_p1": p})
    keep = _keeper(raw, shape)
    turn, state = raw.waves["lip wave"]
    fan = ~np.asarray(state.is_shock)
    with np.errstate(invalid="ignore"):  # the Mach angles of a fan's head and tail
        head = np.where(fan, mach_angle_of(raw.regions["1"].M), np.nan)
        tail = np.where(fan, mach_angle_of(state.M2), np.nan)
    return (_kind(raw, "lip wave", shape), keep(np.abs(turn)), keep(raw.regions["2"].M),
            keep(state.wave_angle), keep(head), keep(tail), failure)
