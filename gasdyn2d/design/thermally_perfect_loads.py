"""Shock-expansion theory for a thermally perfect gas: the surface march and the wake match.

Plain core (numpy, SI, radians) of :func:`~gasdyn2d.design.section_loads.shock_expansion_loads`
when its free stream is a thermally perfect gas (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`).
The method is that of the perfect gas (an oblique shock or a centred fan at the leading
edge and at every corner, the two streams matched to one pressure and direction at the
trailing edge); what changes is that each wave is the thermally perfect one at its own
upstream temperature, so the march carries the panel temperatures too:

- a shock at a compression corner: the thermally perfect oblique shock at the local
  (M, T) (:func:`~gasdyn2d.relations.thermally_perfect_oblique.turn_state`);
- a run of expansion corners: one centred simple wave at the stagnation temperature T0,
  which no wave changes (the total enthalpy is conserved across shocks and fans alike):
  ν_k = ν_start + Σ turns at that T0, M_k = ν⁻¹(ν_k; T0),
  p_k/p_start = (p/p0)(M_k; T0)/(p/p0)(M_start; T0) and T_k = T0 (T/T0)(M_k; T0);
- the wake: both streams turned by one more wave each to a common direction, found by
  the same bracketed Newton iteration as for the perfect gas, with the slope
  d ln p/d turn of the thermally perfect waves and the bracket from their detachment
  and vacuum limits at the local temperature.

Model limits as in :mod:`gasdyn2d.relations.gas` (no dissociation, vibrational
equilibrium assumed behind every wave).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..boundary.checks import format_value
from ..errors import DetachedShockError, NoSolutionError
from ..relations import thermally_perfect as tp
from ..relations import thermally_perfect_oblique as tpo
from .section_forces import (WAKE_MATCH_ITERATIONS, WAKE_MATCH_TOLERANCE, WAKE_MATCHED,
                             corner_runs)

__all__ = ["HotSurfaceFlow", "hot_surface_pressure_ratios", "hot_match_trailing_edge",
           "hot_raise_for_case"]


class HotSurfaceFlow(NamedTuple):
    """Flow along one surface (plain ndarrays): per panel ``p_ratio``, ``M`` and ``T`` [K],
    shape (..., n_panels); the flags per case, shape (...)."""

    p_ratio: np.ndarray
    M: np.ndarray
    T: np.ndarray
    detached: np.ndarray
    subsonic: np.ndarray
    vacuum: np.ndarray


def hot_surface_pressure_ratios(M, T, first_turn, corner_turns, gas):
    """Plain core: p/p∞, Mach number and temperature on every panel of one surface.

    Parameters
    ----------
    M, T, first_turn : float or ndarray
        Free-stream Mach number [-] and static temperature [K], and the leading-edge turn
        [rad] (> 0 into the flow: an oblique shock; < 0 a fan), broadcast to the cases.
    corner_turns : 1-D array_like
        Turn at each interior corner [rad], the same sign convention, the same for every
        case.
    gas : Gas
        A thermally perfect gas.

    Returns
    -------
    HotSurfaceFlow
        NaN panels for flagged cases.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT
    >>> from gasdyn2d.design.thermally_perfect_loads import hot_surface_pressure_ratios
    >>> flow = hot_surface_pressure_ratios(2.0, 1500.0, np.radians(10.0), np.radians([-20.0]),
    ...                                    AIR_THERMALLY_PERFECT)
    >>> np.round(flow.p_ratio, 5)  # [1.70658, 0.55078] for γ = 1.4
    array([1.65141, 0.57312])
    """
    M, T, first_turn = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                             for v in (M, T, first_turn)))
    corner_turns = np.asarray(corner_turns, dtype=float).reshape(-1)
    with np.errstate(invalid="ignore", divide="ignore"):
        T0 = tp.stagnation_temperature(M, T, gas)
        first = tpo.turn_state(M, T, first_turn, gas)
        detached = np.array(first.detached)
        subsonic = first.is_shock & (first.M2 < 1.0)
        vacuum = np.array(first.vacuum)
        p_panels, M_panels, T_panels = [first.p2_p1], [first.M2], [T * first.T2_T1]
        nu_max = tp.max_prandtl_meyer_angle(T0, gas)
        for kind, i, j in corner_runs(corner_turns):
            M_now, p_now, T_now = M_panels[-1], p_panels[-1], T_panels[-1]
            if kind == "shock":
                wave = tpo.turn_state(M_now, T_now, corner_turns[i], gas)
                detached |= wave.detached
                subsonic |= wave.M2 < 1.0
                p_panels.append(p_now * wave.p2_p1)
                M_panels.append(wave.M2)
                T_panels.append(T_now * wave.T2_T1)
                continue
            run = -np.cumsum(corner_turns[i:j])  # the turns away from the flow, summed
            T0_run = np.broadcast_to(T0[..., None], M.shape + run.shape)
            nu = tp.prandtl_meyer_angle(M_now, T0, gas)[..., None] + run
            vacuum |= np.any(nu > nu_max[..., None], axis=-1)
            M_run = nx.chunked(lambda n, t: tp.mach_from_prandtl_meyer_angle(n, t, gas), nu,
                               T0_run)
            start = tp.isentropic_ratios(M_now, T0, gas).p_p0
            ratios = tp.isentropic_ratios(M_run, T0_run, gas)
            p_panels.extend(np.moveaxis(p_now[..., None] * ratios.p_p0 / start[..., None],
                                        -1, 0))
            M_panels.extend(np.moveaxis(M_run, -1, 0))
            T_panels.extend(np.moveaxis(T0_run * ratios.T_T0, -1, 0))
        p_ratio, M_out, T_out = (np.stack(v, axis=-1) for v in (p_panels, M_panels, T_panels))
    bad = (detached | subsonic | vacuum)[..., None]
    return HotSurfaceFlow(np.where(bad, np.nan, p_ratio), np.where(bad, np.nan, M_out),
                          np.where(bad, np.nan, T_out), detached, subsonic, vacuum)


def _residual(phi, upper, lower, gas):
    """ln p_upper - ln p_lower after turning both streams to direction phi, its slope, and
    ln p_upper."""
    M_u, T_u, lnp_u, dir_u = upper
    M_l, T_l, lnp_l, dir_l = lower
    wave_u = tpo.turn_state(M_u, T_u, phi - dir_u, gas)
    wave_l = tpo.turn_state(M_l, T_l, dir_l - phi, gas)
    ln_p = lnp_u + np.log(wave_u.p2_p1)
    return ln_p - lnp_l - np.log(wave_l.p2_p1), wave_u.dlnp_dturn + wave_l.dlnp_dturn, ln_p


def hot_match_trailing_edge(upper, lower, gas):
    """Plain core: common direction and pressure of the two streams leaving the trailing edge.

    ``upper`` and ``lower`` are (M, T [K], ln(p/p∞), direction [rad]) of the last panel
    of each surface. As :func:`gasdyn2d.design.section_loads._match_trailing_edge` for the
    perfect gas: ln p_u - ln p_l rises with the slip direction phi, bracketed by the
    detachment and vacuum turns of each stream (at its own temperature), and the bracketed
    Newton iteration of :func:`gasdyn2d.numerics.safeguarded_newton` finds the one root.

    Returns
    -------
    phi, ln_p, matched : ndarray
        Slip direction [rad], ln(p/p∞) on the slip line, and whether a root exists in the
        bracket (phi and ln_p NaN where not).
    """
    (M_u, T_u, lnp_u, dir_u), (M_l, T_l, lnp_l, dir_l) = upper, lower
    with np.errstate(all="ignore"):
        T0_u = tp.stagnation_temperature(M_u, T_u, gas)
        T0_l = tp.stagnation_temperature(M_l, T_l, gas)
        room_u = tp.max_prandtl_meyer_angle(T0_u, gas) - tp.prandtl_meyer_angle(M_u, T0_u, gas)
        room_l = tp.max_prandtl_meyer_angle(T0_l, gas) - tp.prandtl_meyer_angle(M_l, T0_l, gas)
        lo = np.maximum(dir_u - room_u, dir_l - tpo.detachment_angles(M_l, T_l, gas)[0])
        hi = np.minimum(dir_u + tpo.detachment_angles(M_u, T_u, gas)[0], dir_l + room_l)
        margin = 1e-9 * (hi - lo)
        lo, hi = lo + margin, hi - margin
        s_u = gas.gamma_at(T_u) * M_u**2 / np.sqrt(M_u**2 - 1.0)
        s_l = gas.gamma_at(T_l) * M_l**2 / np.sqrt(M_l**2 - 1.0)
        phi = (s_u * dir_u + s_l * dir_l - lnp_u + lnp_l) / (s_u + s_l)  # linearised start
        phi = np.where(np.isfinite(phi), np.clip(phi, lo, hi), 0.5 * (lo + hi))
        solvable = (lo < hi) & np.isfinite(lnp_u) & np.isfinite(lnp_l)
        phi = nx.safeguarded_newton(
            lambda x: _residual(x, upper, lower, gas)[:2], np.where(solvable, phi, np.nan),
            lo, hi, max_iter=WAKE_MATCH_ITERATIONS, atol=WAKE_MATCH_TOLERANCE, increasing=True)
        residual, _, ln_p = _residual(phi, upper, lower, gas)
        matched = np.abs(residual) <= WAKE_MATCHED
    return np.where(matched, phi, np.nan), np.where(matched, ln_p, np.nan), matched


def hot_raise_for_case(section, M, T, alpha, bad, check, gas):
    """Raise for the first failing case, re-marching it alone to say where and why (the
    thermally perfect counterpart of the perfect gas's message, with the local limits)."""
    n_bad = int(np.count_nonzero(bad))
    index = tuple(int(i) for i in np.argwhere(bad)[0]) if bad.ndim else ()
    m, t, a = (float(np.broadcast_to(v, bad.shape)[index]) for v in (M, T, alpha))
    where_case = ""
    if bad.size > 1:
        where_case = f" at index {index}" + (" of a dask block" if check.in_block else "")
    case = (f"case{where_case} (M = {m:.10g}, T = {t:.6g} K, alpha = {format_value(a, 'rad')}, "
            "thermally perfect gas)")
    count = f" ({n_bad} of {bad.size} cases fail)" if bad.size > 1 else ""
    T0 = float(tp.stagnation_temperature(m, t, gas))
    for surface, points, sign in (("upper", section.upper, 1.0), ("lower", section.lower, -1.0)):
        angles = np.arctan2(np.diff(points[:, 1]), np.diff(points[:, 0]))
        turns = sign * np.concatenate([[angles[0] - a], np.diff(angles)])
        where = ["the leading edge"] + [f"the corner at x = {x:.6g}" for x in points[1:-1, 0]]
        m_local, t_local = m, t
        for turn, place in zip(turns, where):
            wave = tpo.turn_state(m_local, t_local, float(turn), gas)
            if wave.detached:
                theta_max = float(tpo.detachment_angles(m_local, t_local, gas)[0])
                raise DetachedShockError(
                    f"shock-expansion theory fails for the {case}{count}: the shock at {place} of "
                    f"the {surface} surface needs a deflection of {format_value(turn, 'rad')}, "
                    f"beyond the maximum θmax = {format_value(theta_max, 'rad')} at local Mach "
                    f"{m_local:.6g} and {t_local:.6g} K, so it detaches. Reduce the incidence or "
                    "the surface angle, or pass errors='nan' to get NaN for such cases.")
            if wave.is_shock and wave.M2 < 1.0:
                raise DetachedShockError(
                    f"shock-expansion theory fails for the {case}{count}: the shock at {place} of "
                    f"the {surface} surface (deflection {format_value(turn, 'rad')}, local Mach "
                    f"{m_local:.6g}) leaves subsonic flow behind it (M2 = {float(wave.M2):.6g}), "
                    "where the theory does not apply. Pass errors='nan' to get NaN for such cases.")
            if wave.vacuum:
                room = float(tp.max_prandtl_meyer_angle(T0, gas)
                             - tp.prandtl_meyer_angle(m_local, T0, gas))
                raise NoSolutionError(
                    f"shock-expansion theory fails for the {case}{count}: at {place} the "
                    f"{surface} surface turns the flow away by {format_value(-turn, 'rad')}, more "
                    f"than the {format_value(room, 'rad')} that expands local Mach {m_local:.6g} "
                    "to vacuum. Pass errors='nan' to get NaN for such cases.")
            m_local, t_local = float(wave.M2), t_local * float(wave.T2_T1)
    raise NoSolutionError(f"shock-expansion theory fails for the {case}{count}.")  # pragma: no cover
