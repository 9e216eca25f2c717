"""Ready-made coupled wave problems, each stated and solved as a region graph.

Every function here builds a :class:`~gasdyn2d.region_graph.WavePattern`
(inflow region ``"1"`` along the x axis), solves it for all cases at once, and
returns a small result object of fixed fields:

- :func:`wall_reflection` — a shock reflecting from a straight wall, regular or
  Mach (three-shock theory at the triple point), with the dual-solution domain;
- :func:`reflection_transition` — the detachment and von Neumann conditions;
- :func:`shock_crossing` — two shocks from opposite wedges crossing;
- :func:`merging_shocks` — two shocks of the same family merging;
- :func:`free_boundary_reflection` — a shock reflecting from a constant-pressure
  jet edge as a fan;
- :func:`turn_to_pressure` — the single wave that brings a stream to a pressure.

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

from . import _numerics as nx
from ._display import ResultTable, unit_field
from .errors import DetachedShockError, NoSolutionError
from .normal_shocks import normal_shock_ratios
from .oblique_shocks import detachment_angles, oblique_shock_ratios
from .region_graph import WavePattern
from .waves import turn_for_pressure_ratio, turn_state

__all__ = [
    "wall_reflection", "WallReflection",
    "reflection_transition", "ReflectionTransition", "TransitionCondition",
    "shock_crossing", "ShockCrossing",
    "merging_shocks", "MergingShocks",
    "free_boundary_reflection", "FreeBoundaryReflection",
    "turn_to_pressure", "PressureMatchingWave",
]


# ---------------------------------------------------------------- input checks


def _inputs(errors, gamma, M1, **angles):
    """Convert and check (M1, angles..., gamma); returns arrays, angle unit, shape."""
    nx.check_errors_mode(errors)
    M, _ = nx.to_si(M1, "M1", "dimensionless")
    g, _ = nx.to_si(gamma, "gamma", "dimensionless")
    converted, units = {}, []
    for name, value in angles.items():
        converted[name], unit = nx.to_si(value, name, "angle")
        units.append(unit)
    arrays = nx.broadcast(M1=M, gamma=g, **converted)
    M, g, rest = arrays[0], arrays[1], arrays[2:]
    M = nx.check_mach_supersonic(M, "M1", errors)
    g = nx.check_gamma(g, errors)
    unit = nx.output_angle_unit(next((u for u in units if u is not None), None))
    return M, g, rest, unit


def _check_shock_turn(theta, M, g, name, errors, upstream="M1"):
    theta_max, _ = detachment_angles(M, g)
    with np.errstate(invalid="ignore"):
        theta = nx.reject(theta < 0, theta, name, ">= 0 (a compression)", errors)
        return nx.reject(theta > theta_max, theta, name,
                         f"at most the detachment deflection θmax({upstream})", errors,
                         limit=theta_max, unit_text="rad", error_class=DetachedShockError,
                         hint="No attached shock exists beyond it.")


def _finish(value, unit=None, angle=False):
    value = nx.scalar_or_array(value)
    return nx.angle_out(value, unit) if angle else value


def _labels(array):
    array = np.asarray(array)
    return str(array) if array.ndim == 0 else array


def _raise_if_failed(solution, M, shape, errors, what):
    """Raise NoSolutionError for the first failed case (flat arrays, original ``shape``)."""
    bad = ~np.asarray(solution.ok, dtype=bool).reshape(-1) & ~np.isnan(M)
    if errors == "raise" and np.any(bad):
        first = int(np.flatnonzero(bad)[0])
        reason = np.asarray(solution.failure).reshape(-1)[first]
        index = tuple(int(i) for i in np.unravel_index(first, shape))
        where = f" at index {index}" if shape else ""
        count = f" ({int(np.count_nonzero(bad))} of {bad.size} cases)" if bad.size > 1 else ""
        raise NoSolutionError(f"{what} has no solution{where}{count}: {reason} Pass "
                              "errors='nan' to get NaN for such cases.")


# ---------------------------------------------------------------- wall reflection


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


def _mach_pattern(M, theta, g):
    stem_guess, reflected_guess = _stem_scan(M, theta, g)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("incident", upstream="1", downstream="2", family="right", turn=-theta)
    pattern.add_wave("reflected", upstream="2", downstream="3", family="left",
                     guess=reflected_guess)
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
        Invalid input or a case where neither reflection exists: raise, or NaN.

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
    >>> from gasdyn2d.reflections import wall_reflection
    >>> r = wall_reflection(2.8, np.radians(10.0))
    >>> r.kind, round(r.M3, 4), round(r.p3_p1, 4)
    ('regular', 1.9468, 3.5729)
    >>> wall_reflection(2.8, np.radians(22.0)).kind
    'mach'
    """
    M, g, (theta,), unit = _inputs(errors, gamma, M1, deflection=deflection)
    theta = _check_shock_turn(theta, M, g, "deflection", errors)
    shape = M.shape
    M, theta, g = M.reshape(-1), theta.reshape(-1), g.reshape(-1)
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
    if errors == "raise":
        bad = (kind == "none") & np.isfinite(M) & np.isfinite(theta)
        if np.any(bad):
            first = int(np.flatnonzero(bad)[0])
            index = tuple(int(i) for i in np.unravel_index(first, shape))
            where = f" at index {index}" if shape else ""
            raise NoSolutionError(
                f"wall_reflection has no solution{where}: M1 = {M[first]:.6g}, "
                f"deflection = {np.degrees(theta[first]):.6g}°: the reflected shock "
                "would detach (no regular reflection) and three-shock theory has no "
                "solution with a weak reflected shock and a strong-branch stem. (Below "
                "M1 ≈ 2.2 for γ = 1.4 a triple point may still exist with a strong-branch "
                "reflected shock: state it with WavePattern and branch='strong'.) Pass "
                "errors='nan' to get NaN for such cases.")
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
        mach_reflected_angle_to_wall=out(mach["angle"], True))


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

    def _rows(self):
        for name in ("detachment", "von_neumann"):
            for field, text, unit in getattr(self, name)._rows():
                yield f"{name}.{field}", text, unit


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
    closed-form wave relations (:func:`gasdyn2d.waves.turn_state`), not by the
    region graph: they are conditions on one pattern, not patterns.

    References
    ----------
    Hornung (1986), Annu. Rev. Fluid Mech. 18, 33-58, section 3.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.reflections import reflection_transition
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


# ---------------------------------------------------------------- helpers for graph results


def _flat_inputs(errors, gamma, M1, **angles):
    M, g, rest, unit = _inputs(errors, gamma, M1, **angles)
    shape = M.shape
    return M.reshape(-1), g.reshape(-1), [a.reshape(-1) for a in rest], unit, shape


def _shaped(shape, unit):
    def out(value, angular=False):
        return _finish(np.reshape(np.asarray(value, dtype=float), shape), unit, angular)
    return out


def _wave_kind(solution, name, shape):
    return _labels(np.reshape(np.asarray(solution.wave(name).kind), shape))


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
    >>> from gasdyn2d.reflections import shock_crossing
    >>> x = shock_crossing(3.0, np.radians(8.0), np.radians(12.0))
    >>> round(float(np.degrees(x.slip_direction)), 4), round(x.p_p1, 4)
    (3.9605, 3.8303)
    """
    M, g, (du, dl), unit, shape = _flat_inputs(errors, gamma, M1,
                                               deflection_upper=deflection_upper,
                                               deflection_lower=deflection_lower)
    du = _check_shock_turn(du, M, g, "deflection_upper", errors)
    dl = _check_shock_turn(dl, M, g, "deflection_lower", errors)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("upper shock", upstream="1", downstream="2", family="right", turn=-du)
    pattern.add_wave("lower shock", upstream="1", downstream="3", family="left", turn=dl)
    pattern.add_wave("transmitted above", upstream="2", downstream="4", family="left", guess=dl)
    pattern.add_wave("transmitted below", upstream="3", downstream="5", family="right",
                     guess=-du)
    pattern.add_slip_line("4", "5")
    solution = pattern.solve(errors="nan")
    _raise_if_failed(solution, M, shape, errors, "shock_crossing")
    out = _shaped(shape, unit)
    above, below = solution.wave("transmitted above"), solution.wave("transmitted below")
    return ShockCrossing(
        out(solution.region("4").direction, True), out(solution.region("4").p_ratio),
        out(solution.region("4").M), out(solution.region("5").M),
        _wave_kind(solution, "transmitted above", shape), out(above.turn, True),
        out(above.wave_angle, True),
        _wave_kind(solution, "transmitted below", shape), out(below.turn, True),
        out(below.wave_angle, True))


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
    >>> from gasdyn2d.reflections import merging_shocks
    >>> m = merging_shocks(2.4, np.radians(6.0), np.radians(7.0))
    >>> m.reflected_kind, round(float(np.degrees(m.slip_direction)), 4)
    ('fan', 13.0091)
    """
    M, g, (d1, d2), unit, shape = _flat_inputs(errors, gamma, M1,
                                               deflection_first=deflection_first,
                                               deflection_second=deflection_second)
    d1 = _check_shock_turn(d1, M, g, "deflection_first", errors)
    M2 = turn_state(M, d1, g).M2
    d2 = _check_shock_turn(d2, M2, g, "deflection_second", errors, upstream="M2")
    theta_max, _ = detachment_angles(M, g)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("first", upstream="1", downstream="2", family="left", turn=d1)
    pattern.add_wave("second", upstream="2", downstream="3", family="left", turn=d2)
    pattern.add_wave("merged", upstream="1", downstream="4", family="left",
                     guess=np.minimum(d1 + d2, 0.999 * theta_max))
    pattern.add_wave("reflected", upstream="3", downstream="5", family="right", guess=0.0)
    pattern.add_slip_line("4", "5")
    solution = pattern.solve(errors="nan")
    _raise_if_failed(solution, M, shape, errors, "merging_shocks")
    out = _shaped(shape, unit)
    merged, reflected = solution.wave("merged"), solution.wave("reflected")
    return MergingShocks(
        out(solution.region("4").direction, True), out(solution.region("4").p_ratio),
        out(merged.wave_angle, True), out(merged.turn, True),
        _wave_kind(solution, "reflected", shape), out(reflected.turn, True),
        out(solution.region("4").M), out(solution.region("5").M))


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
    >>> from gasdyn2d.reflections import free_boundary_reflection
    >>> r = free_boundary_reflection(2.2, np.radians(5.0))
    >>> round(r.M3, 4), round(float(np.degrees(r.boundary_turn)), 4)
    (2.1984, 10.0036)
    """
    M, g, (theta,), unit, shape = _flat_inputs(errors, gamma, M1, deflection=deflection)
    theta = _check_shock_turn(theta, M, g, "deflection", errors)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("shock", upstream="1", downstream="2", family="left", turn=theta)
    pattern.add_wave("reflected", upstream="2", downstream="3", family="right", guess=theta)
    pattern.add_free_boundary("3", pressure=1.0)
    solution = pattern.solve(errors="nan")
    _raise_if_failed(solution, M, shape, errors, "free_boundary_reflection")
    out = _shaped(shape, unit)
    return FreeBoundaryReflection(
        out(solution.region("2").M), out(solution.region("3").M),
        out(solution.wave("reflected").turn, True), out(solution.region("3").direction, True))


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
    >>> from gasdyn2d.reflections import turn_to_pressure
    >>> lip = turn_to_pressure(2.0, 1.5)
    >>> lip.kind, round(float(np.degrees(lip.deflection)), 4), round(lip.M2, 4)
    ('shock', 7.4933, 1.7321)
    """
    nx.check_errors_mode(errors)
    M, _ = nx.to_si(M1, "M1", "dimensionless")
    p, _ = nx.to_si(p2_p1, "p2_p1", "dimensionless")
    g, _ = nx.to_si(gamma, "gamma", "dimensionless")
    M, p, g = nx.broadcast(M1=M, p2_p1=p, gamma=g)
    shape = M.shape
    M = nx.check_mach_supersonic(M, "M1", errors)
    g = nx.check_gamma(g, errors)
    with np.errstate(invalid="ignore"):
        p = nx.reject(~(p > 0) | np.isinf(p), p, "p2_p1", "finite and > 0", errors)
        p_max = normal_shock_ratios((M - 1.0) * (M + 1.0), g).p2_p1
        p = nx.reject(p > p_max, p, "p2_p1", "at most the normal-shock pressure ratio of M1 "
                      "(no single wave reaches more)", errors, limit=p_max,
                      error_class=NoSolutionError)
    M, p, g = M.reshape(-1), p.reshape(-1), g.reshape(-1)
    pattern = WavePattern(M, gamma=g)
    pattern.add_wave("lip wave", upstream="1", downstream="2", family="left", pressure=p)
    solution = pattern.solve(errors="nan")
    out = _shaped(shape, None)
    wave = solution.wave("lip wave")
    shock = np.asarray(wave.kind) == "shock"
    fan = np.asarray(wave.kind) == "fan"
    return PressureMatchingWave(
        _wave_kind(solution, "lip wave", shape), out(np.abs(wave.turn), True),
        out(solution.region("2").M), out(wave.wave_angle, True),
        out(np.where(fan, wave.head_mach_angle, np.nan), True),
        out(np.where(fan, wave.tail_mach_angle, np.nan), True))
