"""Waves meeting waves: crossing and merging shocks, and pressure matching.

Each function states its problem as a :class:`~gasdyn2d.patterns.graph.WavePattern`
(inflow region ``"1"`` along the x axis), solves it for all cases at once, and
returns a small result object of fixed fields:

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

from .. import _numerics as nx
from ..boundary.results import ResultTable, unit_field
from ..errors import NoSolutionError
from ..relations.normal_shocks import normal_shock_ratios
from ..relations.oblique_shocks import detachment_angles
from .graph import WavePattern
from ..relations.simple_waves import turn_state
from .ready_checks import (
    _input_reasons,
    _note,
    _check_shock_turn,
    _collect_failures,
    _raise_or_label,
    _flat_inputs,
    _shaped,
    _wave_kind,
)

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

    slip_direction: object = unit_field("rad")  #: slip-line direction, > 0 towards the upper wedge
    p_p1: object = unit_field("")  #: pressure on the slip line over p1
    M_above_slip: object = unit_field("")  #: Mach number in region 4
    M_below_slip: object = unit_field("")  #: Mach number in region 5
    transmitted_above_kind: object = unit_field("")  #: "shock" or "fan"
    transmitted_above_turn: object = unit_field("rad")  #: its signed turn
    transmitted_above_wave_angle: object = unit_field("rad")  #: shock angle from region 2's flow
    transmitted_below_kind: object = unit_field("")  #: "shock" or "fan"
    transmitted_below_turn: object = unit_field("rad")  #: its signed turn
    transmitted_below_wave_angle: object = unit_field("rad")  #: shock angle from region 3's flow
    failure: object = unit_field("", default="")  #: why a case has no solution ("" where solved)


def shock_crossing(M1, deflection_upper, deflection_lower, *, gamma=1.4, errors="raise"):
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
    M, g, (du, dl), unit, shape, failure = _flat_inputs(errors, gamma, M1,
                                                        deflection_upper=deflection_upper,
                                                        deflection_lower=deflection_lower)
    inputs = {"M1": M, "deflection_upper": np.degrees(du), "deflection_lower": np.degrees(dl)}
    du = _check_shock_turn(du, M, g, "deflection_upper", errors, wave="upper shock",
                           failure=failure, shape=shape)
    dl = _check_shock_turn(dl, M, g, "deflection_lower", errors, wave="lower shock",
                           failure=failure, shape=shape)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("upper shock", upstream="1", downstream="2", family="right", turn=-du)
    pattern.add_wave("lower shock", upstream="1", downstream="3", family="left", turn=dl)
    pattern.add_wave("transmitted above", upstream="2", downstream="4", family="left", guess=dl)
    pattern.add_wave("transmitted below", upstream="3", downstream="5", family="right",
                     guess=-du)
    pattern.add_slip_line("4", "5")
    solution = pattern.solve(errors="nan")
    failure = _raise_or_label(_collect_failures(failure, solution), shape, errors,
                              "shock_crossing", inputs)
    out = _shaped(shape, unit)
    above, below = solution.wave("transmitted above"), solution.wave("transmitted below")
    return ShockCrossing(
        out(solution.region("4").direction, True), out(solution.region("4").p_ratio),
        out(solution.region("4").M), out(solution.region("5").M),
        _wave_kind(solution, "transmitted above", shape), out(above.turn, True),
        out(above.wave_angle, True),
        _wave_kind(solution, "transmitted below", shape), out(below.turn, True),
        out(below.wave_angle, True), failure)


# ---------------------------------------------------------------- merging shocks


@dataclasses.dataclass(frozen=True, repr=False)
class MergingShocks(ResultTable):
    """Two left-running shocks from successive corners of a lower wall merging.

    Regions: 1 free stream, 2 between the corners, 3 on the second ramp,
    4 behind the merged shock (above the slip line), 5 behind the reflected
    wave (below it).
    """

    slip_direction: object = unit_field("rad")  #: slip-line direction from the x axis
    p_p1: object = unit_field("")  #: pressure on the slip line over p1
    wave_angle: object = unit_field("rad")  #: merged shock angle from the free stream
    merged_turn: object = unit_field("rad")  #: flow turn across the merged shock
    reflected_kind: object = unit_field("")  #: "shock" or "fan"
    reflected_turn: object = unit_field("rad")  #: signed turn across the reflected wave
    M_above_slip: object = unit_field("")  #: Mach number in region 4
    M_below_slip: object = unit_field("")  #: Mach number in region 5
    failure: object = unit_field("", default="")  #: why a case has no solution ("" where solved)


def merging_shocks(M1, deflection_first, deflection_second, *, gamma=1.4, errors="raise"):
    """Two shocks of the same family meet and merge; a reflected wave and a slip line leave.

    Parameters
    ----------
    M1 : float or array_like
        Free-stream Mach number, > 1.
    deflection_first, deflection_second : float, array_like or Quantity
        Turns of the first corner (within θmax(M1)) and of the second
        corner (within θmax(M2)) [rad].
    gamma : float or array_like, optional
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
    M, g, (d1, d2), unit, shape, failure = _flat_inputs(errors, gamma, M1,
                                                        deflection_first=deflection_first,
                                                        deflection_second=deflection_second)
    inputs = {"M1": M, "deflection_first": np.degrees(d1), "deflection_second": np.degrees(d2)}
    d1 = _check_shock_turn(d1, M, g, "deflection_first", errors, wave="first shock",
                           failure=failure, shape=shape)
    M2 = turn_state(M, d1, g).M2
    d2 = _check_shock_turn(d2, M2, g, "deflection_second", errors, upstream="M2",
                           wave="second shock", failure=failure, free_stream=M, shape=shape)
    theta_max, _ = detachment_angles(M, g)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("first", upstream="1", downstream="2", family="left", turn=d1)
    pattern.add_wave("second", upstream="2", downstream="3", family="left", turn=d2)
    pattern.add_wave("merged", upstream="1", downstream="4", family="left",
                     guess=np.minimum(d1 + d2, 0.999 * theta_max))
    pattern.add_wave("reflected", upstream="3", downstream="5", family="right", guess=0.0)
    pattern.add_slip_line("4", "5")
    solution = pattern.solve(errors="nan")
    failure = _raise_or_label(_collect_failures(failure, solution), shape, errors,
                              "merging_shocks", inputs)
    out = _shaped(shape, unit)
    merged, reflected = solution.wave("merged"), solution.wave("reflected")
    return MergingShocks(
        out(solution.region("4").direction, True), out(solution.region("4").p_ratio),
        out(merged.wave_angle, True), out(merged.turn, True),
        _wave_kind(solution, "reflected", shape), out(reflected.turn, True),
        out(solution.region("4").M), out(solution.region("5").M), failure)


# ---------------------------------------------------------------- pressure matching


@dataclasses.dataclass(frozen=True, repr=False)
class PressureMatchingWave(ResultTable):
    """The single wave that brings a stream to a given pressure."""

    kind: object = unit_field("")  #: "shock" (p2/p1 > 1) or "fan" (< 1)
    deflection: object = unit_field("rad")  #: magnitude of the flow turn
    M2: object = unit_field("")  #: Mach number behind the wave
    wave_angle: object = unit_field("rad")  #: shock angle from the upstream flow (NaN for a fan)
    #: Mach angle of the fan's first line, from the upstream flow (NaN for a shock)
    fan_head_angle: object = unit_field("rad")
    #: Mach angle of the fan's last line, from the turned flow (NaN for a shock)
    fan_tail_angle: object = unit_field("rad")
    failure: object = unit_field("", default="")  #: why a case has no solution ("" where solved)


def turn_to_pressure(M1, p2_p1, *, gamma=1.4, errors="raise"):
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
    nx.check_errors_mode(errors)
    M, _ = nx.to_si(M1, "M1", "dimensionless")
    p, _ = nx.to_si(p2_p1, "p2_p1", "dimensionless")
    g, _ = nx.to_si(gamma, "gamma", "dimensionless")
    M0, p0, g0 = nx.broadcast(M1=M, p2_p1=p, gamma=g)
    shape = M0.shape
    # checked in the case shape (an index in a message is the caller's), then flattened
    M = nx.check_mach_supersonic(M0, "M1", errors)
    g = nx.check_gamma(g0, errors)
    failure = _input_reasons(M0, M, g0, g)
    with np.errstate(invalid="ignore"):
        positive = (p0 > 0) & ~np.isinf(p0) | np.isnan(p0)
        _note(failure, ~positive, "p2_p1 = {} is not a finite pressure ratio > 0.", p0)
        p = nx.reject(~positive, p0, "p2_p1", "finite and > 0", errors)
        p_max = normal_shock_ratios((M - 1.0) * (M + 1.0), g).p2_p1
        _note(failure, p > p_max, "the wave cannot reach p2_p1 = {}: a single shock gives at "
              "most the normal-shock ratio {} of M1 = {}.", p, p_max, M)
        p = nx.reject(p > p_max, p, "p2_p1", "at most the normal-shock pressure ratio of M1 "
                      "(no single wave reaches more)", errors, limit=p_max,
                      error_class=NoSolutionError)
    M, g, p, failure = (np.reshape(a, -1) for a in (M, g, p, failure))
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("lip wave", upstream="1", downstream="2", family="left", pressure=p)
    solution = pattern.solve(errors="nan")
    out = _shaped(shape, None)
    wave = solution.wave("lip wave")
    fan = np.asarray(wave.kind) == "fan"
    return PressureMatchingWave(
        _wave_kind(solution, "lip wave", shape), out(np.abs(wave.turn), True),
        out(solution.region("2").M), out(wave.wave_angle, True),
        out(np.where(fan, wave.head_mach_angle, np.nan), True),
        out(np.where(fan, wave.tail_mach_angle, np.nan), True),
        _raise_or_label(_collect_failures(failure, solution), shape, errors,
                        "turn_to_pressure", {"M1": M, "p2_p1": p}))
