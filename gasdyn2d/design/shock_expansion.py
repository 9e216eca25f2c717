"""Shock-expansion theory for supersonic sections: the march along each surface and the wake.

Plain core (numpy only, radians): :func:`surface_pressure_ratios` marches one surface of
panels for many cases at once — an oblique shock or a Prandtl–Meyer fan at the leading
edge, then a fan or a shock at every corner. The loop runs over panels (and over runs of
consecutive expansion corners, which are evaluated in one step); it never runs over
cases. At the trailing edge the two streams are turned to a common pressure and
direction (the wake slip line).

The blocks of the checked core of
:func:`~gasdyn2d.design.section_loads.shock_expansion_loads` live here too:
:func:`shock_expansion_block` (a block of cases, perfect gas),
:func:`hot_shock_expansion_block` (a thermally perfect gas, with the march of
:mod:`gasdyn2d.design.thermally_perfect_loads`) and :func:`shock_expansion_one_case`
(one case on floats, the fast path of a single call on a section of at most
:data:`SCALAR_PANELS` panels). The public functions, the result type and the linear and
second-order theories are in :mod:`gasdyn2d.design.section_loads`, which re-exports
:func:`surface_pressure_ratios` and :class:`SurfaceFlow` under their old paths.

These are inviscid results for preliminary design: no boundary layer, skin friction or
separation.

References
----------
Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley,
ch. 4 (shock-expansion theory).
Ames Research Staff (1953), NACA Report 1135, eqs. 150 and 171.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..boundary.checks import format_value
from ..errors import DetachedShockError, NoSolutionError
from ..relations.expansion_fans import fan_pressure_ratio, mach_from_prandtl_meyer_angle, max_prandtl_meyer_angle
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.simple_waves import turn_state
from ..relations.theta_beta_mach import detachment_angles
from .section_forces import (WAKE_MATCH_ITERATIONS, WAKE_MATCH_TOLERANCE, WAKE_MATCHED,
                             corner_runs, panel_coefficients)
from .thermally_perfect_loads import (hot_match_trailing_edge, hot_raise_for_case,
                                      hot_surface_pressure_ratios)

__all__ = [
    "surface_pressure_ratios",
    "SurfaceFlow",
    "shock_expansion_block",
    "hot_shock_expansion_block",
    "shock_expansion_one_case",
    "SCALAR_PANELS",
]


# --------------------------------------------------------------------- the surface march


class SurfaceFlow(NamedTuple):
    """Flow along one surface (plain ndarrays): ``p_ratio`` and ``M`` per panel,
    shape (..., n_panels); the flags per case, shape (...)."""

    p_ratio: np.ndarray
    M: np.ndarray
    detached: np.ndarray
    subsonic: np.ndarray
    vacuum: np.ndarray


def surface_pressure_ratios(M, first_turn, corner_turns, gamma=1.4):
    """Plain core: p/p∞ and Mach number on every panel of one surface.

    Parameters
    ----------
    M, first_turn, gamma : float or ndarray
        Free-stream Mach number [-], the leading-edge turn [rad] (> 0 into the
        flow: an oblique shock; < 0 a Prandtl–Meyer fan) and γ, broadcast to the
        case shape S.
    corner_turns : 1-D array_like
        Turn at each interior corner [rad], same sign convention; the same for
        every case (it is set by the geometry alone).

    Returns
    -------
    SurfaceFlow
        ``p_ratio`` and ``M`` of shape S + (len(corner_turns) + 1,), NaN for
        flagged cases.

    Notes
    -----
    A run of consecutive expansion corners (turns <= 0) is one simple wave:
    ν_k = ν_start - Σ turns, M_k = M(ν_k), p_k/p_start = (p/p0)(M_k)/(p/p0)(M_start),
    evaluated for the whole run in one array operation. A compression corner
    is an oblique shock (weak branch) from the local state.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.shock_expansion import surface_pressure_ratios
    >>> flow = surface_pressure_ratios(2.0, np.radians(10.0), np.radians([-20.0]))
    >>> np.round(flow.p_ratio, 5)
    array([1.70658, 0.55078])
    """
    M, first_turn, gamma = nx.broadcast_cases(gamma, M, first_turn)
    corner_turns = np.asarray(corner_turns, dtype=float).reshape(-1)
    with np.errstate(invalid="ignore", divide="ignore"):
        first = turn_state(M, first_turn, gamma)
        detached = np.array(first.detached)
        subsonic = first.is_shock & (first.M2 < 1.0)
        vacuum = np.array(first.vacuum)
        p_panels, M_panels = [first.p2_p1], [first.M2]
        nu_max = max_prandtl_meyer_angle(gamma)
        for kind, i, j in corner_runs(corner_turns):
            M_now, p_now = M_panels[-1], p_panels[-1]
            if kind == "shock":
                wave = turn_state(M_now, corner_turns[i], gamma)
                detached |= wave.detached
                subsonic |= wave.M2 < 1.0
                p_panels.append(p_now * wave.p2_p1)
                M_panels.append(wave.M2)
                continue
            nu = prandtl_meyer_angle(M_now, gamma)[..., None] - np.cumsum(corner_turns[i:j])
            vacuum |= np.any(nu > nu_max[..., None], axis=-1)
            M_run = _inverse_prandtl_meyer(nu, gamma)
            p_run = p_now[..., None] * fan_pressure_ratio(M_now[..., None], M_run, gamma[..., None])
            p_panels.extend(np.moveaxis(p_run, -1, 0))
            M_panels.extend(np.moveaxis(M_run, -1, 0))
        p_ratio = np.stack(p_panels, axis=-1)
        M_out = np.stack(M_panels, axis=-1)
    bad = (detached | subsonic | vacuum)[..., None]
    return SurfaceFlow(np.where(bad, np.nan, p_ratio), np.where(bad, np.nan, M_out),
                       detached, subsonic, vacuum)


def _inverse_prandtl_meyer(nu, gamma):
    """M(ν) of a run of corners, shape (cases, run), in cache-sized blocks
    (:func:`gasdyn2d.numerics.chunked`): the run multiplies the case count, and whole-array
    passes of the inverse's Halley steps would stream every temporary through memory."""
    if gamma.ndim == 0:
        return nx.chunked(lambda n: mach_from_prandtl_meyer_angle(n, gamma), nu)
    return nx.chunked(mach_from_prandtl_meyer_angle, nu, np.broadcast_to(gamma[..., None], nu.shape))


def _trailing_edge_residual(phi, upper, lower, gamma):
    """ln p_upper - ln p_lower after turning both streams to direction phi, and its slope."""
    M_u, lnp_u, dir_u = upper
    M_l, lnp_l, dir_l = lower
    wave_u = turn_state(M_u, phi - dir_u, gamma)
    wave_l = turn_state(M_l, dir_l - phi, gamma)
    residual = lnp_u + np.log(wave_u.p2_p1) - lnp_l - np.log(wave_l.p2_p1)
    return residual, wave_u.dlnp_dturn + wave_l.dlnp_dturn, lnp_u + np.log(wave_u.p2_p1)


def _match_trailing_edge(upper, lower, gamma):
    """Common direction and pressure of the two streams leaving the trailing edge.

    ``upper`` and ``lower`` are (M, ln(p/p∞), direction [rad]) of the last
    panel of each surface. The upper stream turns by (phi - dir_u) and the
    lower by (dir_l - phi), each through one shock or fan; ln p_u - ln p_l
    increases with phi, so the bracketed Newton iteration of
    :func:`gasdyn2d.numerics.safeguarded_newton` (slope from
    ``turn_state(...).dlnp_dturn``) finds the one root. The bracket keeps
    both waves attached and short of vacuum; without a root in it the iteration
    ends on a bracket end with a residual far from zero (unmatched). This is the
    wake slip-line match
    of a two-stream wave pattern; it can be routed through the general
    region graph later without changing its inputs or outputs.

    Returns
    -------
    phi, ln_p, matched : ndarray
        Slip direction [rad] (same frame as the inputs), ln(p/p∞) on the slip
        line, and whether a root exists in the bracket.
    """
    (M_u, lnp_u, dir_u), (M_l, lnp_l, dir_l) = upper, lower
    with np.errstate(all="ignore"):
        nu_room = max_prandtl_meyer_angle(gamma)
        lo = np.maximum(dir_u - (nu_room - prandtl_meyer_angle(M_u, gamma)),
                        dir_l - detachment_angles(M_l, gamma)[0])
        hi = np.minimum(dir_u + detachment_angles(M_u, gamma)[0],
                        dir_l + (nu_room - prandtl_meyer_angle(M_l, gamma)))
        margin = 1e-9 * (hi - lo)
        lo, hi = lo + margin, hi - margin
        s_u = gamma * M_u**2 / np.sqrt(M_u**2 - 1.0)
        s_l = gamma * M_l**2 / np.sqrt(M_l**2 - 1.0)
        phi = (s_u * dir_u + s_l * dir_l - lnp_u + lnp_l) / (s_u + s_l)  # linearised start
        phi = np.where(np.isfinite(phi), np.clip(phi, lo, hi), 0.5 * (lo + hi))
        solvable = (lo < hi) & np.isfinite(lnp_u) & np.isfinite(lnp_l)
        phi = nx.safeguarded_newton(  # cases with no bracket (NaN start) are not iterated
            lambda x: _trailing_edge_residual(x, upper, lower, gamma)[:2],
            np.where(solvable, phi, np.nan), lo, hi, max_iter=WAKE_MATCH_ITERATIONS, atol=WAKE_MATCH_TOLERANCE,
            increasing=True)
        residual, _, ln_p = _trailing_edge_residual(phi, upper, lower, gamma)
        # without a root in the bracket the iteration ends on a bracket end, short of zero
        matched = np.abs(residual) <= WAKE_MATCHED
    return np.where(matched, phi, np.nan), np.where(matched, ln_p, np.nan), matched


# --------------------------------------------------------------- blocks of cases


def _surface_turns(section, alpha):
    """Leading-edge turns (> 0 compression) and corner turns of both surfaces."""
    up, lo = section.upper_angles, section.lower_angles
    return (up[0] - alpha, np.diff(up)), (alpha - lo[0], -np.diff(lo))


def shock_expansion_block(M, alpha, gamma, section, geometry, check):
    """Shock-expansion loads of one block of cases, for the checked core of
    :func:`~gasdyn2d.design.section_loads.shock_expansion_loads`.

    ``M``, ``alpha`` [rad] are ndarrays of one shape, ``gamma`` a 0-d array or of the same
    shape; ``geometry`` is the section's :class:`~gasdyn2d.design.section_forces.PanelGeometry`
    and ``check`` the call's :class:`~gasdyn2d.boundary.checks.Check` (a failing case raises
    under errors="raise", naming the surface, the place and the limit). Returns the
    per-case fields of :class:`~gasdyn2d.design.section_loads.SectionLoads` after M and α,
    in order.
    """
    (le_u, corners_u), (le_l, corners_l) = _surface_turns(section, alpha)
    upper = surface_pressure_ratios(M, le_u, corners_u, gamma)
    lower = surface_pressure_ratios(M, le_l, corners_l, gamma)
    detached = upper.detached | lower.detached
    subsonic = upper.subsonic | lower.subsonic
    vacuum = upper.vacuum | lower.vacuum
    if not check.nan and (detached.any() or subsonic.any() or vacuum.any()):
        _raise_for_case(section, M, alpha, gamma, detached | subsonic | vacuum, check)
    dir_u = section.upper_angles[-1] + 0.0 * alpha
    dir_l = section.lower_angles[-1] + 0.0 * alpha
    phi, ln_p, matched = _match_trailing_edge(
        (upper.M[..., -1], np.log(upper.p_ratio[..., -1]), dir_u),
        (lower.M[..., -1], np.log(lower.p_ratio[..., -1]), dir_l), gamma)
    unmatched = np.isfinite(upper.M[..., -1]) & np.isfinite(lower.M[..., -1]) & ~matched
    q = (0.5 * gamma * M * M)[..., None]
    cp_u = (upper.p_ratio - 1.0) / q
    cp_l = (lower.p_ratio - 1.0) / q
    cl, cd, cm_le, x_cp = panel_coefficients(geometry, cp_u, cp_l, alpha, True)
    return (cl, cd, cm_le, x_cp, phi - alpha, np.exp(ln_p), cp_u, cp_l, detached, subsonic,
            vacuum, unmatched)


def hot_shock_expansion_block(M, alpha, T, section, geometry, check, gas):
    """:func:`shock_expansion_block` for a thermally perfect ``gas`` (free-stream static
    temperature T [K] in place of γ): the march and the wake match of
    :mod:`gasdyn2d.design.thermally_perfect_loads`, q = γ(T) p M²/2 = ρV²/2."""
    (le_u, corners_u), (le_l, corners_l) = _surface_turns(section, alpha)
    upper = hot_surface_pressure_ratios(M, T, le_u, corners_u, gas)
    lower = hot_surface_pressure_ratios(M, T, le_l, corners_l, gas)
    detached = upper.detached | lower.detached
    subsonic = upper.subsonic | lower.subsonic
    vacuum = upper.vacuum | lower.vacuum
    if not check.nan and (detached.any() or subsonic.any() or vacuum.any()):
        hot_raise_for_case(section, M, T, alpha, detached | subsonic | vacuum, check, gas)
    dir_u = section.upper_angles[-1] + 0.0 * alpha
    dir_l = section.lower_angles[-1] + 0.0 * alpha
    phi, ln_p, matched = hot_match_trailing_edge(
        (upper.M[..., -1], upper.T[..., -1], np.log(upper.p_ratio[..., -1]), dir_u),
        (lower.M[..., -1], lower.T[..., -1], np.log(lower.p_ratio[..., -1]), dir_l), gas)
    unmatched = np.isfinite(upper.M[..., -1]) & np.isfinite(lower.M[..., -1]) & ~matched
    q = (0.5 * gas.gamma_at(T) * M * M)[..., None]  # ρV²/2 with γ at the free-stream T
    cp_u = (upper.p_ratio - 1.0) / q
    cp_l = (lower.p_ratio - 1.0) / q
    cl, cd, cm_le, x_cp = panel_coefficients(geometry, cp_u, cp_l, alpha, True)
    return (cl, cd, cm_le, x_cp, phi - alpha, np.exp(ln_p), cp_u, cp_l, detached, subsonic,
            vacuum, unmatched)


#: Panels (both surfaces) up to which a single case is marched on floats, one wave per
#: corner; longer surfaces go through the array march, which takes a run of fans at once.
SCALAR_PANELS = 8


def _march_scalar(M, turns, gamma):
    """One surface of one case on floats: (p/p∞ per panel, M at the end, flags)."""
    p, m, pressures = 1.0, M, []
    detached = subsonic = vacuum = False
    for turn in turns:
        wave = turn_state(m, float(turn), gamma)
        detached, vacuum = bool(wave.detached), bool(wave.vacuum)
        m = float(wave.M2)
        subsonic = bool(wave.is_shock) and m < 1.0
        p *= float(wave.p2_p1)
        pressures.append(p)
        if detached or vacuum or subsonic:  # the surface fails here: the first reason only
            pressures += [math.nan] * (len(turns) - len(pressures))
            break
    return np.array(pressures), m, detached, subsonic, vacuum


def _match_trailing_edge_scalar(upper, lower, gamma):
    """:func:`_match_trailing_edge` for one case, on floats (the same bracket, start,
    Newton step with bisection fallback, tolerances and matched test)."""
    (M_u, lnp_u, dir_u), (M_l, lnp_l, dir_l) = upper, lower

    def residual(phi):
        wave_u = turn_state(M_u, phi - dir_u, gamma)
        wave_l = turn_state(M_l, dir_l - phi, gamma)
        ln_p = lnp_u + math.log(float(wave_u.p2_p1))
        return (ln_p - lnp_l - math.log(float(wave_l.p2_p1)),
                float(wave_u.dlnp_dturn) + float(wave_l.dlnp_dturn), ln_p)

    nu_room = float(max_prandtl_meyer_angle(gamma))
    lo = max(dir_u - (nu_room - float(prandtl_meyer_angle(M_u, gamma))),
             dir_l - float(detachment_angles(M_l, gamma)[0]))
    hi = min(dir_u + float(detachment_angles(M_u, gamma)[0]),
             dir_l + (nu_room - float(prandtl_meyer_angle(M_l, gamma))))
    margin = 1e-9 * (hi - lo)
    lo, hi = lo + margin, hi - margin
    if not (lo < hi and math.isfinite(lnp_u) and math.isfinite(lnp_l)):
        return math.nan, math.nan, False
    s_u = gamma * M_u * M_u / math.sqrt(M_u * M_u - 1.0) if M_u > 1.0 else math.inf
    s_l = gamma * M_l * M_l / math.sqrt(M_l * M_l - 1.0) if M_l > 1.0 else math.inf
    phi = (s_u * dir_u + s_l * dir_l - lnp_u + lnp_l) / (s_u + s_l)
    phi = min(max(phi, lo), hi) if math.isfinite(phi) else 0.5 * (lo + hi)
    best = (math.inf, phi)
    for _ in range(WAKE_MATCH_ITERATIONS):
        f, df, _ = residual(phi)
        if abs(f) < best[0]:
            best = (abs(f), phi)
        if f == 0.0 or f != f:
            break
        if f < 0.0:
            lo = phi
        else:
            hi = phi
        step = f / df
        new = phi - step
        if abs(step) <= max(4.0 * 2.2e-16 * abs(phi), WAKE_MATCH_TOLERANCE):
            phi = new if lo <= new <= hi else phi
            break
        if not lo < new < hi:
            new = 0.5 * (lo + hi)
        if hi - lo <= 4.0 * 2.2e-16 * max(abs(lo), abs(hi)):
            break
        phi = new
    f, _, ln_p = residual(phi)
    if not abs(f) <= abs(best[0]):
        phi = best[1]
        f, _, ln_p = residual(phi)
    if abs(f) <= WAKE_MATCHED:
        return phi, ln_p, True
    return math.nan, math.nan, False


def shock_expansion_one_case(M, alpha, gamma, section, geometry, check):
    """Shock-expansion loads of one case on floats: the fast path of a single call on a
    section of at most :data:`SCALAR_PANELS` panels, one wave per corner (the same
    waves, bracket, Newton step and tolerances as :func:`shock_expansion_block`). Returns
    the per-case fields after M and α as floats, the panel fields as arrays."""
    (le_u, corners_u), (le_l, corners_l) = _surface_turns(section, alpha)
    p_u, M_u, *flags_u = _march_scalar(M, [le_u, *corners_u], gamma)
    p_l, M_l, *flags_l = _march_scalar(M, [le_l, *corners_l], gamma)
    detached, subsonic, vacuum = (a or b for a, b in zip(flags_u, flags_l))
    bad = detached or subsonic or vacuum
    if bad and not check.nan:
        _raise_for_case(section, np.array([M]), np.array([alpha]), gamma, np.array([True]),
                        check)
    nan = math.nan
    q = 0.5 * gamma * M * M
    if bad or M != M or alpha != alpha or gamma != gamma:  # a failed surface is NaN, as in
        cp_u = np.full(len(p_u), nan) if any(flags_u) else (p_u - 1.0) / q  # the array march
        cp_l = np.full(len(p_l), nan) if any(flags_l) else (p_l - 1.0) / q
        return (nan, nan, nan, nan, nan, nan, cp_u, cp_l, detached, subsonic, vacuum, False)
    phi, ln_p, matched = _match_trailing_edge_scalar(
        (M_u, math.log(p_u[-1]), float(section.upper_angles[-1])),
        (M_l, math.log(p_l[-1]), float(section.lower_angles[-1])), gamma)
    cp_u, cp_l = (p_u - 1.0) / q, (p_l - 1.0) / q
    cl, cd, cm_le, x_cp = (float(v[0]) for v in panel_coefficients(
        geometry, cp_u[None], cp_l[None], np.array([alpha]), True))
    return (cl, cd, cm_le, x_cp, phi - alpha, math.exp(ln_p), cp_u, cp_l, detached, subsonic,
            vacuum, not matched)


def _raise_for_case(section, M, alpha, gamma, bad, check):
    """Raise for the first failing case, re-marching it alone to say where and why."""
    n_bad = int(np.count_nonzero(bad))
    index = tuple(int(i) for i in np.argwhere(bad)[0]) if bad.ndim else ()
    m, a = float(M[index]), float(alpha[index])
    g = float(gamma) if np.ndim(gamma) == 0 else float(gamma[index])
    where_case = ""
    if bad.size > 1:
        where_case = f" at index {index}" + (" of a dask block" if check.in_block else "")
    case = (f"case{where_case} (M = {m:.10g}, alpha = {format_value(a, 'rad')}, "
            f"gamma = {g:g})")
    count = f" ({n_bad} of {bad.size} cases fail)" if bad.size > 1 else ""
    for surface, points, sign in (("upper", section.upper, 1.0), ("lower", section.lower, -1.0)):
        angles = np.arctan2(np.diff(points[:, 1]), np.diff(points[:, 0]))
        turns = sign * np.concatenate([[angles[0] - a], np.diff(angles)])
        where = ["the leading edge"] + [f"the corner at x = {x:.6g}" for x in points[1:-1, 0]]
        m_local = m
        for turn, place in zip(turns, where):
            wave = turn_state(m_local, float(turn), g)
            if wave.detached:
                theta_max = float(detachment_angles(m_local, g)[0])
                raise DetachedShockError(
                    f"shock-expansion theory fails for the {case}{count}: the shock at {place} of the "
                    f"{surface} surface needs a deflection of {format_value(turn, 'rad')}, beyond "
                    f"the maximum θmax = {format_value(theta_max, 'rad')} at local Mach "
                    f"{m_local:.6g}, so it detaches. Reduce the incidence or the surface angle, or "
                    "pass errors='nan' to get NaN for such cases."
                )
            if wave.is_shock and wave.M2 < 1.0:
                raise DetachedShockError(
                    f"shock-expansion theory fails for the {case}{count}: the shock at {place} of the "
                    f"{surface} surface (deflection {format_value(turn, 'rad')}, local Mach "
                    f"{m_local:.6g}) leaves subsonic flow behind it (M2 = {float(wave.M2):.6g}), "
                    "where the theory does not apply. Pass errors='nan' to get NaN for such cases."
                )
            if wave.vacuum:
                room = float(max_prandtl_meyer_angle(g) - prandtl_meyer_angle(m_local, g))
                raise NoSolutionError(
                    f"shock-expansion theory fails for the {case}{count}: at {place} the {surface} "
                    f"surface turns the flow away by {format_value(-turn, 'rad')}, more than the "
                    f"{format_value(room, 'rad')} that expands local Mach {m_local:.6g} to vacuum. "
                    "Pass errors='nan' to get NaN for such cases."
                )
            m_local = float(wave.M2)
    raise NoSolutionError(f"shock-expansion theory fails for the {case}{count}.")  # pragma: no cover

