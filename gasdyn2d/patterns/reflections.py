"""Reflections from walls and free boundaries, each stated and solved as a region graph.

Every function here builds a :class:`~gasdyn2d.patterns.graph.WavePattern`
(inflow region ``"1"`` along the x axis), solves it for all cases at once, and
returns a small result object of fixed fields:

- :func:`wall_reflection` — a shock reflecting from a straight wall, regular or
  Mach (three-shock theory at the triple point), with the dual-solution domain;
- :func:`reflection_transition` — the detachment and von Neumann conditions;
- :func:`free_boundary_reflection` — a shock reflecting from a constant-pressure
  jet edge as a fan.

Crossing and merging shocks and pressure matching live in
:mod:`gasdyn2d.patterns.interactions`.

All are inviscid, perfect-gas results for preliminary design: in a real duct
or jet the boundary layer interacts with a reflecting shock and may separate.

References
----------
Hornung, H. (1986), "Regular and Mach reflection of shock waves", Annu. Rev.
Fluid Mech. 18, 33-58 (detachment and von Neumann criteria, three-shock theory).
Ben-Dor, G. (2007), *Shock Wave Reflection Phenomena*, 2nd ed., Springer
(dual-solution domain, ch. 1-2).
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary.results import ResultTable, unit_field
from ..relations.normal_shocks import normal_shock_ratios
from ..relations.oblique_shocks import detachment_angles, oblique_shock_ratios
from .graph import WavePattern
from ..relations.simple_waves import turn_for_pressure_ratio, turn_state
from .ready_checks import (
    _inputs,
    _check_shock_turn,
    _finish,
    _labels,
    _collect_failures,
    _raise_or_label,
    _flat_inputs,
    _shaped,
)

__all__ = [
    "wall_reflection", "WallReflection",
    "reflection_transition", "ReflectionTransition", "TransitionCondition",
    "free_boundary_reflection", "FreeBoundaryReflection",
]


@dataclasses.dataclass(frozen=True, repr=False)
class WallReflection(ResultTable):
    """A shock reflecting from a straight wall parallel to the free stream.

    Regions: 1 free stream, 2 behind the incident shock, 3 behind the
    reflected shock, 4 behind the Mach stem (Mach reflection only).
    ``kind`` is ``"regular"`` where a regular reflection exists (also in the
    dual-solution domain, ``dual`` True, where the Mach solution is given as
    well), ``"mach"`` where only the three-shock solution exists, and
    ``"none"`` where neither does. The ``mach_*`` fields, ``M4`` and
    ``slip_angle_to_wall`` hold the three-shock solution wherever it exists.
    """

    kind: object = unit_field("")  #: "regular", "mach" or "none" per case
    dual: object = unit_field("")  #: True in the dual-solution domain
    M2: object = unit_field("")  #: Mach number behind the incident shock
    M3: object = unit_field("")  #: Mach number behind the reflected shock (of ``kind``)
    p3_p1: object = unit_field("")  #: pressure behind the reflected shock over p1
    reflected_angle_to_wall: object = unit_field("rad")  #: reflected shock to wall
    M4: object = unit_field("")  #: Mach number behind the Mach stem
    slip_angle_to_wall: object = unit_field("rad")  #: slip line to wall, towards the wall
    mach_M3: object = unit_field("")  #: M3 of the three-shock solution
    mach_p3_p1: object = unit_field("")  #: p3/p1 (= p4/p1) of the three-shock solution
    mach_reflected_angle_to_wall: object = unit_field("rad")  #: its reflected shock to wall
    failure: object = unit_field("", default="")  #: why a case has no solution ("" where solved)


def _regular_pattern(M, theta, g):
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    pattern.add_wave("reflected", upstream="2", downstream="3", family="left", guess=theta)
    pattern.add_wall("3", direction=0.0)
    return pattern


def _stem_scan(M, theta, g, samples=48):
    """Starting guess for three-shock theory: scan the stem's wave angle.

    Along the strong branch of the free-stream polar (stem wave angle from
    the detachment angle to 90°), the reflected shock needed to reach the
    stem pressure from region 2 is found in closed form; the first sign
    change, from the normal stem downwards, of the direction mismatch
    brackets the triple-point solution. Returns the stem and reflected turns
    (NaN where no bracket exists).
    """
    _, beta_star = detachment_angles(M, g)
    fraction = np.linspace(1.0, 0.0, samples)[:, None]
    beta = beta_star + fraction * (0.5 * np.pi - beta_star)
    with np.errstate(all="ignore"):
        stem = oblique_shock_ratios(M, beta, g)
        incident = turn_state(M, theta, g)
        ratio = stem.p2_p1 / incident.p2_p1
        M2 = incident.M2
        _, beta2 = detachment_angles(M2, g)
        p_det = oblique_shock_ratios(M2, beta2, g).p2_p1
        reflected = np.where(ratio <= p_det, turn_for_pressure_ratio(M2, ratio, g), np.nan)
        mismatch = (-theta + reflected) - (-stem.deflection)
        sign_change = (mismatch[:-1] * mismatch[1:] <= 0) & np.isfinite(mismatch[:-1] *
                                                                        mismatch[1:])
        has = np.any(sign_change, axis=0)
        i = np.argmax(sign_change, axis=0)
        cols = np.arange(M.size)
        m0, m1 = mismatch[i, cols], mismatch[i + 1, cols]
        t = np.clip(m0 / (m0 - m1), 0.0, 1.0)
        stem_turn = -((1 - t) * stem.deflection[i, cols] + t * stem.deflection[i + 1, cols])
        refl_turn = (1 - t) * reflected[i, cols] + t * reflected[i + 1, cols]
    return np.where(has, stem_turn, np.nan), np.where(has, refl_turn, np.nan)


def _mach_pattern(M, theta, g, reflected="weak"):
    """Three-shock theory; a strong-branch (subsonic) reflected shock starts half-way."""
    if reflected == "weak":
        stem_guess, reflected_guess = _stem_scan(M, theta, g)
    else:
        reflected_guess = 0.5 * detachment_angles(turn_state(M, theta, g).M2, g)[0]
        stem_guess = -0.5 * detachment_angles(M, g)[0]
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    pattern.add_wave("reflected", upstream="2", downstream="3", family="left",
                     branch=reflected, guess=reflected_guess)
    pattern.add_wave("Mach stem", upstream="1", downstream="4", family="right",
                     branch="strong", guess=stem_guess)
    pattern.add_slip_line("3", "4")
    return pattern


def _incident_mach(regular, M, theta, g):
    """M2 from the regular solution, or from the incident wave where it failed."""
    M2 = np.asarray(regular.region("2").M)
    missing = np.isnan(M2)
    if np.any(missing):
        M2 = M2.copy()
        M2[missing] = turn_state(M[missing], theta[missing], g[missing]).M2
    return M2


def wall_reflection(M1, deflection, *, gamma=1.4, errors="raise"):
    """Reflection of an oblique shock from a straight wall, regular or Mach.

    A wall-parallel stream M1 meets a shock (from a wedge on the opposite
    side) that turns it by ``deflection`` towards the wall; the shock
    reflects and the flow behind the reflected shock is parallel to the wall
    again (regular reflection). Where the reflected shock would detach, the
    Mach reflection is solved at its triple point.

    Parameters
    ----------
    M1 : float or array_like
        Free-stream Mach number, > 1.
    deflection : float, array_like or Quantity
        Flow turn of the incident shock [rad], 0 <= deflection <= θmax(M1).
    gamma : float or array_like, optional
        Ratio of specific heats.
    errors : {"raise", "nan"}
        Invalid input or a case where neither reflection exists: raise, or NaN
        (the reason per case in ``failure``).

    Returns
    -------
    WallReflection

    Raises
    ------
    DetachedShockError
        The incident deflection exceeds θmax(M1).
    NoSolutionError
        Neither a regular reflection nor a three-shock solution exists
        (e.g. weak reflections at low M1, the von Neumann paradox region).

    Notes
    -----
    Regular: the reflected shock turns the flow back by the incident
    deflection, θ3 = 0. Mach: incident and reflected shocks weak, the stem on
    the strong branch of the free-stream polar, and the slip line between
    regions 3 and 4 gives p3 = p4 and θ3 = θ4 (three-shock theory). Dual
    domain: a regular reflection exists and p3 >= the normal-shock pressure
    of M1 (the von Neumann condition is passed). The stem is treated as
    straight at the triple point; the stem height needs the downstream
    geometry and is not computed.

    References
    ----------
    Hornung (1986), Annu. Rev. Fluid Mech. 18, 33-58, sections 2-3.
    Ben-Dor (2007), *Shock Wave Reflection Phenomena*, ch. 1.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.patterns.reflections import wall_reflection
    >>> r = wall_reflection(2.8, np.radians(10.0))
    >>> r.kind, round(r.M3, 4), round(r.p3_p1, 4)
    ('regular', 1.9468, 3.5729)
    >>> wall_reflection(2.8, np.radians(22.0)).kind
    'mach'
    """
    M, g, (theta,), unit, shape, failure = _flat_inputs(errors, gamma, M1,
                                                        deflection=deflection)
    theta = _check_shock_turn(theta, M, g, "deflection", errors, failure=failure, shape=shape)
    regular = _regular_pattern(M, theta, g).solve(errors="nan")
    r3 = regular.region("3")
    rr_ok = np.asarray(regular.ok) & np.isfinite(theta)
    p_normal = normal_shock_ratios((M - 1.0) * (M + 1.0), g).p2_p1
    with np.errstate(invalid="ignore"):
        dual = rr_ok & (np.asarray(r3.p_ratio) >= p_normal)
    try_mach = (~rr_ok | dual) & np.isfinite(theta) & np.isfinite(M)
    nan = np.full(M.shape, np.nan)
    mach = {key: nan.copy() for key in ("M3", "p3", "angle", "M4", "slip")}
    mr_ok = np.zeros(M.shape, dtype=bool)
    if np.any(try_mach):
        idx = np.nonzero(try_mach)
        sub = _mach_pattern(M[idx], theta[idx], g[idx]).solve(errors="nan")
        ok_sub = np.asarray(sub.ok) & (np.asarray(sub.region("4").direction) <= 0.0)
        keep = lambda v: np.where(ok_sub, v, np.nan)  # noqa: E731
        reflected = sub.wave("reflected")
        mach["M3"][idx] = keep(sub.region("3").M)
        mach["p3"][idx] = keep(sub.region("3").p_ratio)
        mach["angle"][idx] = keep(reflected.head_line_direction)
        mach["M4"][idx] = keep(sub.region("4").M)
        mach["slip"][idx] = keep(-np.asarray(sub.region("4").direction))
        mr_ok[idx] = ok_sub
    kind = np.where(rr_ok, "regular", np.where(mr_ok, "mach", "none"))
    dual = rr_ok & mr_ok  # both reflections found (the p3 >= p_normal cases)
    none = (kind == "none") & np.isfinite(M) & np.isfinite(theta) & np.isfinite(g)
    if np.any(none):
        failure[none] = _no_reflection_reasons(M[none], theta[none], g[none])
    failure = _raise_or_label(failure, shape, errors, "wall_reflection",
                              {"M1": M, "deflection": np.degrees(theta)})
    reflected_rr = np.asarray(regular.wave("reflected").head_line_direction)
    M3 = np.where(rr_ok, r3.M, mach["M3"])
    p3 = np.where(rr_ok, r3.p_ratio, mach["p3"])
    angle = np.where(rr_ok, reflected_rr, mach["angle"])
    out = lambda v, angular=False: _finish(np.reshape(v, shape), unit, angular)  # noqa: E731
    return WallReflection(
        kind=_labels(kind.reshape(shape)),
        dual=dual.reshape(shape) if shape else bool(dual[0]),
        M2=out(np.where(np.isfinite(theta), _incident_mach(regular, M, theta, g), np.nan)),
        M3=out(M3), p3_p1=out(p3), reflected_angle_to_wall=out(angle, True),
        M4=out(mach["M4"]), slip_angle_to_wall=out(mach["slip"], True),
        mach_M3=out(mach["M3"]), mach_p3_p1=out(mach["p3"]),
        mach_reflected_angle_to_wall=out(mach["angle"], True), failure=failure)


def _no_reflection_reasons(M, theta, g):
    """Why neither a regular nor a (weak-reflected) Mach reflection exists, per case."""
    M2 = turn_state(M, theta, g).M2
    reach = detachment_angles(M2, g)[0]
    strong = _mach_pattern(M, theta, g, reflected="strong").solve(errors="nan")
    found = np.atleast_1d(strong.ok) & (np.atleast_1d(strong.region("4").direction) <= 0.0)
    reasons = np.empty(M.size, dtype=object)
    for i in range(M.size):
        why = (f"the reflected shock would detach: turning the flow behind the incident "
               f"shock (M2 = {M2[i]:.6g}) back by {np.degrees(theta[i]):.6g}° exceeds its "
               f"maximum deflection {np.degrees(reach[i]):.6g}°" if theta[i] > reach[i]
               else "none was found")
        text = (f"no regular reflection ({why}) and no triple point with a weak reflected "
                "shock and a strong-branch Mach stem.")
        if found[i]:
            text += (" A triple point with a strong-branch (subsonic) reflected shock exists: "
                     "state it with WavePattern and branch='strong' on the reflected wave.")
        else:
            text += " A search with a strong-branch reflected shock found none either."
        reasons[i] = text
    return reasons


# ---------------------------------------------------------------- transition


@dataclasses.dataclass(frozen=True, repr=False)
class TransitionCondition(ResultTable):
    """Incident shock at a reflection transition condition."""

    deflection: object = unit_field("rad")  #: incident flow turn
    wave_angle: object = unit_field("rad")  #: incident shock angle from the free stream


@dataclasses.dataclass(frozen=True, repr=False)
class ReflectionTransition(ResultTable):
    """The detachment and von Neumann conditions of shock reflection at M1."""

    detachment: TransitionCondition = unit_field("")  #: regular reflection ceases to exist
    von_neumann: TransitionCondition = unit_field("")  #: Mach stem becomes normal (NaN if none)


def _bisect(func, lo, hi, iterations=64):
    """Vectorised bisection for a decreasing-sign change from lo (f > 0) to hi (f <= 0)."""
    for _ in range(iterations):
        mid = 0.5 * (lo + hi)
        positive = func(mid) > 0
        lo, hi = np.where(positive, mid, lo), np.where(positive, hi, mid)
    return 0.5 * (lo + hi)


def _reflected_pressure(theta, M, g):
    """p3/p1 of the regular reflection of an incident deflection θ (weak reflected shock)."""
    incident = turn_state(M, theta, g)
    reflected = turn_state(incident.M2, theta, g)
    return incident.p2_p1 * reflected.p2_p1, incident.M2


def reflection_transition(M1, *, gamma=1.4, errors="raise"):
    """Incident shocks at the detachment and von Neumann transition conditions.

    Parameters
    ----------
    M1 : float or array_like
        Free-stream Mach number, > 1.
    gamma : float or array_like, optional
        Ratio of specific heats.
    errors : {"raise", "nan"}

    Returns
    -------
    ReflectionTransition
        ``detachment`` and ``von_neumann``, each with the incident
        ``deflection`` and ``wave_angle`` [rad]. The von Neumann condition
        exists only above the Mach number where the two criteria meet
        (2.20203 for γ = 1.4); NaN below.

    Notes
    -----
    Detachment: θmax(M2(θ)) = θ — the reflected shock can just turn the flow
    back. Von Neumann: p3(θ) = p_normal(M1) with a weak reflected shock — the
    regular-reflection pressure equals that behind a normal stem. Both are
    single roots in θ, found by vectorised bisection to rounding on the
    closed-form wave relations (:func:`gasdyn2d.relations.simple_waves.turn_state`), not by the
    region graph: they are conditions on one pattern, not patterns.

    References
    ----------
    Hornung (1986), Annu. Rev. Fluid Mech. 18, 33-58, section 3.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.patterns.reflections import reflection_transition
    >>> t = reflection_transition(4.0)
    >>> np.round(np.degrees([t.von_neumann.wave_angle, t.detachment.wave_angle]), 3)
    array([33.444, 39.232])
    """
    M, g, _, _ = _inputs(errors, gamma, M1)
    theta_max, _ = detachment_angles(M, g)
    with np.errstate(all="ignore"):
        def det_gap(theta):
            M2 = turn_state(M, theta, g).M2
            gap = detachment_angles(M2, g)[0] - theta
            return np.where(M2 > 1.0, gap, -1.0)

        theta_det = _bisect(det_gap, np.zeros_like(M), theta_max)
        log_normal = np.log(normal_shock_ratios((M - 1.0) * (M + 1.0), g).p2_p1)

        def vn_gap(theta):
            p3, _ = _reflected_pressure(theta, M, g)
            return log_normal - np.log(p3)

        incident = turn_state(M, theta_det, g)
        _, beta2 = detachment_angles(incident.M2, g)
        p3_max = incident.p2_p1 * oblique_shock_ratios(incident.M2, beta2, g).p2_p1
        exists = np.log(p3_max) >= log_normal
        theta_vn = np.where(exists, _bisect(vn_gap, np.zeros_like(M), theta_det), np.nan)
        beta_det = turn_state(M, theta_det, g).wave_angle
        beta_vn = turn_state(M, theta_vn, g).wave_angle
    return ReflectionTransition(
        detachment=TransitionCondition(_finish(theta_det), _finish(beta_det)),
        von_neumann=TransitionCondition(_finish(theta_vn), _finish(beta_vn)))


# ---------------------------------------------------------------- free boundary


@dataclasses.dataclass(frozen=True, repr=False)
class FreeBoundaryReflection(ResultTable):
    """A shock reflected from a constant-pressure jet edge as an expansion fan.

    Regions: 1 jet core at the edge pressure, 2 behind the shock, 3 behind
    the reflected fan (back at the edge pressure).
    """

    M2: object = unit_field("")  #: Mach number behind the shock
    M3: object = unit_field("")  #: Mach number behind the reflected fan
    fan_deflection: object = unit_field("rad")  #: flow turn across the fan (magnitude)
    boundary_turn: object = unit_field("rad")  #: total turn of the jet edge, away from the jet
    failure: object = unit_field("", default="")  #: why a case has no solution ("" where solved)


def free_boundary_reflection(M1, deflection, *, gamma=1.4, errors="raise"):
    """A shock inside a jet reflecting from the jet edge (at the jet's own pressure).

    Parameters
    ----------
    M1 : float or array_like
        Jet Mach number, > 1.
    deflection : float, array_like or Quantity
        Flow turn of the shock, towards the edge [rad], within θmax(M1).
    gamma : float or array_like, optional
    errors : {"raise", "nan"}
        A case without solution: raise (naming the case, its inputs and the wave
        or condition that fails), or NaN with the reason in ``failure``.

    Returns
    -------
    FreeBoundaryReflection

    Notes
    -----
    Region graph: 1 -(shock, left, +δ)-> 2 -(reflected, right, unknown)-> 3
    with a free boundary on 3 at p1. The reflected wave must bring p2 back
    to p1, so it is a fan, which turns the flow further towards the edge:
    the edge turns by δ + fan_deflection.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.patterns.reflections import free_boundary_reflection
    >>> r = free_boundary_reflection(2.2, np.radians(5.0))
    >>> round(r.M3, 4), round(float(np.degrees(r.boundary_turn)), 4)
    (2.1984, 10.0036)
    """
    M, g, (theta,), unit, shape, failure = _flat_inputs(errors, gamma, M1, deflection=deflection)
    inputs = {"M1": M, "deflection": np.degrees(theta)}
    theta = _check_shock_turn(theta, M, g, "deflection", errors, wave="shock", failure=failure,
                              shape=shape)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("shock", upstream="1", downstream="2", family="left", turn=theta)
    pattern.add_wave("reflected", upstream="2", downstream="3", family="right", guess=theta)
    pattern.add_free_boundary("3", pressure=1.0)
    solution = pattern.solve(errors="nan")
    failure = _raise_or_label(_collect_failures(failure, solution), shape, errors,
                              "free_boundary_reflection", inputs)
    out = _shaped(shape, unit)
    return FreeBoundaryReflection(
        out(solution.region("2").M), out(solution.region("3").M),
        out(solution.wave("reflected").turn, True), out(solution.region("3").direction, True),
        failure)

