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
import math

import numpy as np

from .. import numerics as nx
from ..boundary import Call, ResultTable, result_fields, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..relations.isentropic import mach_angle_of
from ..relations.normal_shocks import normal_shock_ratios
from ..relations.oblique_shocks import (deflection_slope_wv, detachment_angles,
                                         oblique_shock_ratios)
from ..relations.simple_waves import turn_for_pressure_ratio, turn_state
from .graph import ConditionLink, WaveLink, plan_pattern
from .ready_checks import (CaseReasons, check_mach_and_gamma, check_shock_turn, flat, shaped,
                           solve_ready)

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

    kind: FloatArray = unit_field("", "regular, mach or none", dtype=str)
    dual: FloatArray = unit_field("", "True in the dual-solution domain", dtype=bool)
    M2: FloatArray = unit_field("", "Mach number behind the incident shock")
    M3: FloatArray = unit_field("", "Mach number behind the reflected shock (of kind)")
    p3_p1: FloatArray = unit_field("", "pressure behind the reflected shock over p1")
    reflected_angle_to_wall: FloatArray = unit_field("rad", "reflected shock to wall")
    M4: FloatArray = unit_field("", "Mach number behind the Mach stem")
    slip_angle_to_wall: FloatArray = unit_field("rad", "slip line to wall, towards the wall")
    mach_M3: FloatArray = unit_field("", "M3 of the three-shock solution")
    mach_p3_p1: FloatArray = unit_field("", "p3/p1 (= p4/p1) of the three-shock solution")
    mach_reflected_angle_to_wall: FloatArray = unit_field(
        "rad", "reflected shock to wall, three-shock solution")
    failure: FloatArray = unit_field("", "why a case has no solution ('' where solved)",
                                     dtype=str, default="")


#: Regular reflection: 1 -(incident, right, turn -θ)-> 2 -(reflected, left, unknown)-> 3,
#: wall on 3 along the free stream.
_REGULAR = plan_pattern("1", (
    WaveLink("incident", "1", "2", "right", "turn"),
    WaveLink("reflected", "2", "3", "left")), (ConditionLink("wall", ("3",)),))


def _mach_plan(reflected_branch):
    """Three-shock theory: the incident and reflected shocks, a strong-branch stem from the
    free stream, and the slip line between regions 3 and 4."""
    return plan_pattern("1", (
        WaveLink("incident", "1", "2", "right", "turn"),
        WaveLink("reflected", "2", "3", "left", branch=reflected_branch),
        WaveLink("Mach stem", "1", "4", "right", branch="strong")),
        (ConditionLink("slip line", ("3", "4")),))


_MACH = {"weak": _mach_plan("weak"), "strong": _mach_plan("strong")}


def _regular(M, theta, g):
    """The regular reflection of every case (flat arrays or floats); a failed case is
    explained by :func:`_no_reflection_reasons` if the Mach reflection fails too."""
    return solve_ready(_REGULAR, {"M": M, "d": 0.0, "g": g, "w:incident": -theta,
                                  "guess:reflected": theta, "c:0": 0.0}, (), explain=False)


_STEM_SAMPLES = 48


def _stem_scan(M, theta, g):
    """Starting guess for three-shock theory: scan the stem's wave angle.

    Along the strong branch of the free-stream polar (stem wave angle from
    the detachment angle to 90°), the reflected shock needed to reach the
    stem pressure from region 2 is found in closed form; the first sign
    change, from the normal stem downwards, of the direction mismatch
    brackets the triple-point solution. Returns the stem and reflected turns
    (NaN where no bracket exists). The scan runs in blocks of cases whose
    samples fit in cache (:func:`gasdyn2d.numerics.chunked`).
    """
    M, theta = np.broadcast_arrays(np.asarray(M, dtype=float), np.asarray(theta, dtype=float))
    if np.ndim(g):
        g = np.broadcast_to(g, M.shape)
        return nx.chunked(_stem_scan_block, M, theta, g, size=nx.CHUNK_SIZE // _STEM_SAMPLES)
    return nx.chunked(lambda m, t: _stem_scan_block(m, t, g), M, theta,
                      size=nx.CHUNK_SIZE // _STEM_SAMPLES)


def _stem_scan_block(M, theta, g):
    """:func:`_stem_scan` on one block of cases (1-d arrays; γ a float or an array).

    The stem polar is sampled uniformly in c = M1 cos β from the normal stem (c = 0)
    to detachment (c*), in the cancellation-free variables w = M1² sin²β - 1 = M1² - 1 - c²
    and v = c², so that its pressure (1 + 2γw/(γ+1)) and deflection (tan θ in w, v) need
    no trigonometry; the reflected shock's w follows from the pressure ratio to region 2.
    """
    k = 2.0 * g / (g + 1.0)
    with np.errstate(all="ignore"):
        _, beta_star = detachment_angles(M, g)
        c = np.linspace(0.0, 1.0, _STEM_SAMPLES)[:, None] * (M * np.cos(beta_star))
        v = c * c
        w = (M - 1.0) * (M + 1.0) - v
        stem_deflection = np.arctan(deflection_slope_wv(w, v, M, g)[0])
        incident = turn_state(M, theta, g)
        M2 = incident.M2
        ratio = (1.0 + k * w) / incident.p2_p1
        _, beta2 = detachment_angles(M2, g)
        s2 = M2 * np.sin(beta2)
        w_reflected = (ratio - 1.0) / k
        weak = (w_reflected >= 0.0) & (w_reflected <= (s2 - 1.0) * (s2 + 1.0))
        reflected = np.where(weak, np.arctan(deflection_slope_wv(
            w_reflected, (M2 - 1.0) * (M2 + 1.0) - w_reflected, M2, g)[0]), np.nan)
        expansion = ratio < 1.0  # a reflected fan (rare): the closed-form inverse
        if expansion.any():
            fan = turn_for_pressure_ratio(np.broadcast_to(M2, ratio.shape)[expansion],
                                          ratio[expansion],
                                          np.broadcast_to(g, ratio.shape)[expansion])
            reflected[expansion] = fan
        mismatch = (-theta + reflected) + stem_deflection
        product = mismatch[:-1] * mismatch[1:]
        sign_change = (product <= 0) & np.isfinite(product)
        has = np.any(sign_change, axis=0)
        i = np.argmax(sign_change, axis=0)
        cols = np.arange(M.size)
        m0, m1 = mismatch[i, cols], mismatch[i + 1, cols]
        t = np.clip(m0 / (m0 - m1), 0.0, 1.0)
        stem_turn = -((1 - t) * stem_deflection[i, cols] + t * stem_deflection[i + 1, cols])
        refl_turn = (1 - t) * reflected[i, cols] + t * reflected[i + 1, cols]
    return np.where(has, stem_turn, np.nan), np.where(has, refl_turn, np.nan)


def _mach(M, theta, g, reflected="weak"):
    """Three-shock theory for every case (flat arrays or floats); NaN inputs skip."""
    scalar = type(M) is float
    Ma, ta = np.atleast_1d(M), np.atleast_1d(theta)
    if reflected == "weak":
        stem_guess, reflected_guess = _stem_scan(Ma, ta, g)
    else:
        reflected_guess = 0.5 * detachment_angles(turn_state(Ma, ta, g).M2, g)[0]
        stem_guess = -0.5 * detachment_angles(Ma, g)[0]
    if scalar:
        stem_guess, reflected_guess = float(stem_guess[0]), float(reflected_guess[0])
    return solve_ready(_MACH[reflected], {
        "M": M, "d": 0.0, "g": g, "w:incident": -theta, "guess:reflected": reflected_guess,
        "guess:Mach stem": stem_guess, "c:0": 0.0}, (), explain=False)


def wall_reflection(M1: ArrayInput, deflection: ArrayInput, *, gamma: ArrayInput = 1.4,
                    errors: str = "raise") -> WallReflection:
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
    call = Call(errors)
    call.take("M1", M1)
    call.take("deflection", deflection, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(WallReflection, _wall_reflection_core)


def _wall_reflection_core(M, theta, g, check):
    """Checked core of :func:`wall_reflection` (floats, or arrays of the case shape)."""
    reasons = CaseReasons(M)
    M, g = check_mach_and_gamma(M, g, check, reasons)
    theta = check_shock_turn(theta, M, g, "deflection", check, reasons)
    if type(M) is float:
        return _wall_reflection_one(M, theta, g, check, reasons)
    shape = np.shape(M)
    Mf, tf, gf = flat(M), flat(theta), g if type(g) is float else flat(g)
    regular = _regular(Mf, tf, gf)
    with np.errstate(invalid="ignore"):
        r3 = regular.regions["3"]
        rr_ok = regular.ok & np.isfinite(tf)
        p_normal = normal_shock_ratios((Mf - 1.0) * (Mf + 1.0), gf).p2_p1
        dual = rr_ok & (np.exp(r3.lnp) >= p_normal)
        inputs_finite = np.isfinite(Mf) & np.isfinite(tf) & np.isfinite(gf)
        try_mach = (~rr_ok | dual) & inputs_finite
    nan = np.nan if type(Mf) is float else np.full(Mf.shape, np.nan)
    mach = dict.fromkeys(("M3", "p3", "angle", "M4", "slip"), nan)
    mr_ok = False if type(Mf) is float else np.zeros(Mf.shape, dtype=bool)
    if np.any(try_mach):
        scalar = type(Mf) is float
        idx = slice(None) if scalar else np.flatnonzero(try_mach)
        pick = (lambda v: v) if scalar else (lambda v: v if type(v) is float else v[idx])
        sub = _mach(pick(Mf), pick(tf), pick(gf))
        with np.errstate(invalid="ignore"):
            ok = sub.ok & (sub.regions["4"].direction <= 0.0)
            keep = lambda v: np.where(ok, v, np.nan)  # noqa: E731
            found = {"M3": keep(sub.regions["3"].M), "p3": keep(np.exp(sub.regions["3"].lnp)),
                     "angle": keep(_reflected_angle(sub)), "M4": keep(sub.regions["4"].M),
                     "slip": keep(-sub.regions["4"].direction)}
        if scalar:
            mach, mr_ok = found, ok
        else:
            mr_ok[idx] = ok
            for key, value in found.items():
                mach[key] = mach[key].copy()
                mach[key][idx] = value
    kind = np.where(rr_ok, "regular", np.where(mr_ok, "mach", "none"))
    dual = rr_ok & mr_ok  # both reflections found (the p3 >= p_normal cases)
    none = (kind == "none") & inputs_finite
    if np.any(none):
        why = np.full(np.shape(kind), "", dtype=object)
        if type(Mf) is float:
            why = _no_reflection_reasons(np.array([Mf]), np.array([tf]), gf)[0]
        else:
            why[none] = _no_reflection_reasons(Mf[none], tf[none],
                                               gf if type(gf) is float else gf[none])
        reasons.add(why)
    failure = reasons.finish(check, "wall_reflection", {"M1": M, "deflection": theta})
    M3 = np.where(rr_ok, r3.M, mach["M3"])
    p3 = np.where(rr_ok, np.exp(r3.lnp), mach["p3"])
    angle = np.where(rr_ok, _reflected_angle(regular), mach["angle"])
    out = lambda v: shaped(v, shape)  # noqa: E731
    return (_labels(kind, shape), bool(dual) if not shape else np.reshape(dual, shape),
            out(np.where(np.isfinite(tf), regular.regions["2"].M, np.nan)), out(M3), out(p3),
            out(angle), out(mach["M4"]), out(mach["slip"]), out(mach["M3"]), out(mach["p3"]),
            out(mach["angle"]), failure)


def _wall_reflection_one(M, theta, g, check, reasons):
    """The scalar form of :func:`_wall_reflection_core` (one case on Python floats)."""
    nan = math.nan
    regular = _regular(M, theta, g)
    r3 = regular.regions["3"]
    rr_ok = regular.ok
    finite = math.isfinite(M) and math.isfinite(theta) and math.isfinite(g)
    dual = False
    if rr_ok:
        p_normal = float(normal_shock_ratios((M - 1.0) * (M + 1.0), g).p2_p1)
        dual = math.exp(r3.lnp) >= p_normal
    mach = (nan, nan, nan, nan, nan)
    mr_ok = False
    if finite and (dual or not rr_ok):
        sub = _mach(M, theta, g)
        if sub.ok and sub.regions["4"].direction <= 0.0:
            mr_ok = True
            mach = (sub.regions["3"].M, math.exp(sub.regions["3"].lnp), _reflected_angle(sub),
                    sub.regions["4"].M, -sub.regions["4"].direction)
    kind = "regular" if rr_ok else ("mach" if mr_ok else "none")
    if kind == "none" and finite:
        reasons.add(_no_reflection_reasons(np.array([M]), np.array([theta]), g)[0])
    failure = reasons.finish(check, "wall_reflection", {"M1": M, "deflection": theta})
    if rr_ok:
        M3, p3, angle = r3.M, math.exp(r3.lnp), _reflected_angle(regular)
    else:
        M3, p3, angle = mach[0], mach[1], mach[2]
    M2 = regular.regions["2"].M if theta == theta else nan
    return (kind, bool(rr_ok and mr_ok), M2, M3, p3, angle, mach[3], mach[4], mach[0], mach[1],
            mach[2], failure)


def _reflected_angle(raw):
    """Plane direction of the reflected (left-running) shock: region 2's flow plus its
    wave angle; with the wall along x it is the shock's angle to the wall."""
    state = raw.waves["reflected"][1]
    if type(state.wave_angle) is float:  # one case
        angle = state.wave_angle if state.is_shock else float(mach_angle_of(raw.regions["2"].M))
        return raw.regions["2"].direction + angle
    with np.errstate(invalid="ignore"):  # a zero turn is the Mach wave, at the Mach angle
        angle = np.where(state.is_shock, state.wave_angle, mach_angle_of(raw.regions["2"].M))
    return raw.regions["2"].direction + angle


def _labels(kind, shape):
    return str(kind) if not shape else np.reshape(kind, shape)


def _no_reflection_reasons(M, theta, g):
    """Why neither a regular nor a (weak-reflected) Mach reflection exists, per case."""
    M2 = turn_state(M, theta, g).M2
    reach = detachment_angles(M2, g)[0]
    strong = _mach(M, theta, g, reflected="strong")
    found = np.atleast_1d(strong.ok) & (np.atleast_1d(strong.regions["4"].direction) <= 0.0)
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

    deflection: FloatArray = unit_field("rad", "incident flow turn")
    wave_angle: FloatArray = unit_field("rad", "incident shock angle from the free stream")


@dataclasses.dataclass(frozen=True, repr=False)
class ReflectionTransition(ResultTable):
    """The detachment and von Neumann conditions of shock reflection at M1."""

    detachment: TransitionCondition = unit_field("", "regular reflection ceases to exist")
    von_neumann: TransitionCondition = unit_field("", "Mach stem becomes normal (NaN if none)")


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


def reflection_transition(M1: ArrayInput, *, gamma: ArrayInput = 1.4,
                          errors: str = "raise") -> ReflectionTransition:
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
    call = Call(errors)
    call.take("M1", M1)
    call.take("gamma", gamma, keep_scalar=True)
    fields = result_fields(TransitionCondition)
    names = [(prefix, f) for prefix in ("detachment", "von_neumann") for f in fields]
    infos = tuple(f._replace(name=f"{prefix}.{f.name}") for prefix, f in names)
    values = call.evaluate(infos, _transition_core)
    return ReflectionTransition(TransitionCondition.from_fields(values[:2]),
                                TransitionCondition.from_fields(values[2:]))


def _transition_core(M, g, check):
    """Checked core of :func:`reflection_transition`: (θ, β) at detachment, then von Neumann."""
    M = check.supersonic_mach(M, "M1")
    g = check.gamma(g)
    scalar = type(M) is float
    shape = np.shape(M)
    M = np.atleast_1d(M).reshape(-1)
    g = g if type(g) is float else np.reshape(g, -1)
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
    out = (lambda v: float(v[0])) if scalar else (lambda v: np.reshape(v, shape))
    return out(theta_det), out(beta_det), out(theta_vn), out(beta_vn)


# ---------------------------------------------------------------- free boundary


@dataclasses.dataclass(frozen=True, repr=False)
class FreeBoundaryReflection(ResultTable):
    """A shock reflected from a constant-pressure jet edge as an expansion fan.

    Regions: 1 jet core at the edge pressure, 2 behind the shock, 3 behind
    the reflected fan (back at the edge pressure).
    """

    M2: FloatArray = unit_field("", "Mach number behind the shock")
    M3: FloatArray = unit_field("", "Mach number behind the reflected fan")
    fan_deflection: FloatArray = unit_field("rad", "flow turn across the fan (magnitude)")
    boundary_turn: FloatArray = unit_field("rad", "total turn of the jet edge, away from the jet")
    failure: FloatArray = unit_field("", "why a case has no solution ('' where solved)",
                                     dtype=str, default="")


#: 1 -(shock, left, +δ)-> 2 -(reflected, right, unknown)-> 3, free boundary on 3 at p1.
_FREE_BOUNDARY = plan_pattern("1", (
    WaveLink("shock", "1", "2", "left", "turn"),
    WaveLink("reflected", "2", "3", "right")), (ConditionLink("free boundary", ("3",)),))


def free_boundary_reflection(M1: ArrayInput, deflection: ArrayInput, *,
                             gamma: ArrayInput = 1.4,
                             errors: str = "raise") -> FreeBoundaryReflection:
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
    call = Call(errors)
    call.take("M1", M1)
    call.take("deflection", deflection, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(FreeBoundaryReflection, _free_boundary_core)


def _free_boundary_core(M, theta, g, check):
    """Checked core of :func:`free_boundary_reflection` (floats or case-shaped arrays)."""
    reasons = CaseReasons(M)
    M, g = check_mach_and_gamma(M, g, check, reasons)
    theta = check_shock_turn(theta, M, g, "deflection", check, reasons, wave="shock")
    shape = np.shape(M)
    raw = solve_ready(_FREE_BOUNDARY, {"M": M, "d": 0.0, "g": g, "w:shock": theta,
                                       "guess:reflected": theta, "c:0": 1.0}, shape)
    reasons.add(raw.failure)
    failure = reasons.finish(check, "free_boundary_reflection", {"M1": M, "deflection": theta})
    keep = lambda v: shaped(np.where(raw.ok, v, np.nan), shape)  # noqa: E731
    return (keep(raw.regions["2"].M), keep(raw.regions["3"].M), keep(raw.waves["reflected"][0]),
            keep(raw.regions["3"].direction), failure)
