"""Pressure, lift, wave drag and moment of supersonic sections and fins.

Three theories for the same :class:`~gasdyn2d.design.sections.Section`, with the same
result type :class:`SectionLoads`:

- :func:`shock_expansion_loads`: exact shock-expansion theory (an oblique shock
  or a Prandtl–Meyer fan at the leading edge of each surface, then a fan or a
  shock at every corner; trailing-edge waves and the wake slip line matched to
  a common pressure and direction);
- :func:`linear_loads`: linearised theory (Ackeret);
- :func:`second_order_loads`: second-order theory (Busemann).

Plain core (numpy only, radians): :func:`surface_pressure_ratios` marches one
surface of panels for many cases at once. The loop runs over panels (and over
runs of consecutive expansion corners, which are evaluated in one step); it
never runs over cases.

These are inviscid results for preliminary design: no boundary layer, skin
friction or separation; a perfect gas, or with ``gas=`` a thermally perfect one
(vibration in equilibrium, no dissociation: see :mod:`gasdyn2d.relations.gas`).
"""

from __future__ import annotations

import dataclasses
import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..boundary import Call, ResultTable, unit_field
from ..boundary.checks import format_value
from ..boundary.results import result_fields
from ..boundary.types import ArrayInput, FloatArray
from ..errors import DetachedShockError, InvalidInputError, NoSolutionError
from ..relations.expansion_fans import fan_pressure_ratio, mach_from_prandtl_meyer_angle, max_prandtl_meyer_angle
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.oblique_shocks import detachment_angles
from ..relations.simple_waves import turn_state
from ..relations.flow_state import FlowState
from ..relations.gas import gas_of_call, refuse_thermally_perfect
from ..relations.thermally_perfect_calls import perfect_with_temperature
from .sections import Section
from .thermally_perfect_loads import (hot_match_trailing_edge, hot_raise_for_case,
                                      hot_surface_pressure_ratios)

__all__ = [
    "SectionLoads",
    "shock_expansion_loads",
    "linear_loads",
    "second_order_loads",
    "loads_function",
    "THEORIES",
    "surface_pressure_ratios",
    "SurfaceFlow",
]

_TE_MAX_ITER = 40
_TE_TOLERANCE = 1e-15  # [rad], absolute, on the slip direction
_TE_MATCHED = 1e-10  # |ln p_upper - ln p_lower| below which the two streams are matched


# --------------------------------------------------------------------- result type


@dataclasses.dataclass(frozen=True, repr=False)
class SectionLoads(ResultTable):
    """Aerodynamic coefficients of a section, per (M, α) case.

    Coefficients are per unit span, based on the chord and the free-stream
    dynamic pressure q = γ p M²/2. Case fields have the broadcast shape of
    (M, α, γ); per-panel fields add one trailing axis (one entry per panel, in
    the order of the section's points, leading edge first).

    Attributes
    ----------
    M : float or ndarray
        Free-stream Mach number [-].
    alpha : float, ndarray or Quantity
        Incidence of the chord to the free stream [rad], > 0 nose up.
    cl, cd : float or ndarray
        Lift and wave-drag coefficients [-] (wind axes).
    cm_le : float or ndarray
        Pitching-moment coefficient about the leading edge [-], > 0 nose up.
    x_cp : float or ndarray
        Centre of pressure [chord], -cm_le / cn with cn the chord-normal force
        coefficient (NaN where cn = 0).
    slip_direction : float, ndarray or Quantity
        Direction of the wake slip line at the trailing edge, from the
        free-stream direction [rad], > 0 towards the upper side.
    wake_pressure_ratio : float or ndarray
        Pressure on the wake slip line at the trailing edge over free-stream [-].
    cp_upper, cp_lower : ndarray
        Pressure coefficient on each panel [-], shape (..., n_panels).
    x_upper, x_lower : ndarray
        Chordwise mid-point of each panel [chord].
    detached : bool or ndarray
        A leading-edge or corner shock would need more than the maximum
        deflection θmax (the shock detaches; results NaN).
    subsonic : bool or ndarray
        The flow behind a shock is subsonic (between the sonic and the maximum
        deflection; the theory does not apply; results NaN).
    vacuum : bool or ndarray
        A surface turns the flow further than an expansion to vacuum can
        (results NaN).
    wake_unmatched : bool or ndarray
        No common pressure and direction at the trailing edge with attached
        weak-branch waves (slip_direction and wake_pressure_ratio NaN; the
        surface loads are unaffected, as trailing-edge waves cannot act
        upstream in supersonic flow).
    theory : str
        "shock-expansion", "linear" or "second-order".
    """

    M: FloatArray = unit_field("", "free-stream Mach number")
    alpha: FloatArray = unit_field("rad", "incidence of the chord, > 0 nose up")
    cl: FloatArray = unit_field("", "lift coefficient")
    cd: FloatArray = unit_field("", "wave-drag coefficient")
    cm_le: FloatArray = unit_field("", "pitching-moment coefficient about the leading edge")
    x_cp: FloatArray = unit_field("chord", "centre of pressure, in chords from the leading edge")
    slip_direction: FloatArray = unit_field("rad", "wake slip-line direction from the free stream")
    wake_pressure_ratio: FloatArray = unit_field("", "wake pressure over free-stream pressure")
    cp_upper: FloatArray = unit_field("", "pressure coefficient per upper panel",
                                      trailing="panel_upper")
    cp_lower: FloatArray = unit_field("", "pressure coefficient per lower panel",
                                      trailing="panel_lower")
    x_upper: np.ndarray = unit_field("", "mid-chord of each upper panel [chord]",
                                     trailing="panel_upper")
    x_lower: np.ndarray = unit_field("", "mid-chord of each lower panel [chord]",
                                     trailing="panel_lower")
    detached: FloatArray = unit_field("", "a shock would detach", dtype=bool)
    subsonic: FloatArray = unit_field("", "subsonic flow behind a shock", dtype=bool)
    vacuum: FloatArray = unit_field("", "a surface expands beyond vacuum", dtype=bool)
    wake_unmatched: FloatArray = unit_field("", "no trailing-edge match", dtype=bool)
    theory: str = unit_field("", "shock-expansion, linear or second-order", dtype=str)


#: The fields computed per case (everything but the section's panel positions and the theory).
_CASE_FIELDS = tuple(f for f in result_fields(SectionLoads)
                     if f.name not in ("x_upper", "x_lower", "theory"))


# --------------------------------------------------------------------- plain core


class SurfaceFlow(NamedTuple):
    """Flow along one surface (plain ndarrays): ``p_ratio`` and ``M`` per panel,
    shape (..., n_panels); the flags per case, shape (...)."""

    p_ratio: np.ndarray
    M: np.ndarray
    detached: np.ndarray
    subsonic: np.ndarray
    vacuum: np.ndarray


def _runs(corner_turns):
    """Split corner indices into runs: ('shock', i, i+1) or ('fan', i, j)."""
    runs, i, n = [], 0, len(corner_turns)
    while i < n:
        if corner_turns[i] > 0.0:
            runs.append(("shock", i, i + 1))
            i += 1
        else:
            j = i
            while j < n and corner_turns[j] <= 0.0:
                j += 1
            runs.append(("fan", i, j))
            i = j
    return runs


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
    >>> from gasdyn2d.design.section_loads import surface_pressure_ratios
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
        for kind, i, j in _runs(corner_turns):
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
            np.where(solvable, phi, np.nan), lo, hi, max_iter=_TE_MAX_ITER, atol=_TE_TOLERANCE,
            increasing=True)
        residual, _, ln_p = _trailing_edge_residual(phi, upper, lower, gamma)
        # without a root in the bracket the iteration ends on a bracket end, short of zero
        matched = np.abs(residual) <= _TE_MATCHED
    return np.where(matched, phi, np.nan), np.where(matched, ln_p, np.nan), matched


# --------------------------------------------------------------- forces on panels


class _PanelGeometry(NamedTuple):
    """Per-panel weights of the force sums (plain 1-d arrays, chord units)."""

    dx_upper: np.ndarray
    dy_upper: np.ndarray
    dx_lower: np.ndarray
    dy_lower: np.ndarray
    x_upper: np.ndarray  # panel mid-points
    x_lower: np.ndarray
    arm_upper: np.ndarray  # x dx (thin-section moment arm)
    arm_lower: np.ndarray
    arm_upper_exact: np.ndarray  # x dx + y dy (exact moment arm)
    arm_lower_exact: np.ndarray


def _panel_geometry(section: Section) -> _PanelGeometry:
    d_up, d_lo = np.diff(section.upper, axis=0), np.diff(section.lower, axis=0)
    mid_up = 0.5 * (section.upper[1:] + section.upper[:-1])
    mid_lo = 0.5 * (section.lower[1:] + section.lower[:-1])
    arm_up, arm_lo = mid_up[:, 0] * d_up[:, 0], mid_lo[:, 0] * d_lo[:, 0]
    return _PanelGeometry(d_up[:, 0], d_up[:, 1], d_lo[:, 0], d_lo[:, 1], mid_up[:, 0],
                          mid_lo[:, 0], arm_up, arm_lo, arm_up + mid_up[:, 1] * d_up[:, 1],
                          arm_lo + mid_lo[:, 1] * d_lo[:, 1])


def _panel_sum(cp, weights):
    """Σ cp·w over the panels (last axis), without BLAS.

    A matrix-vector product would go to the BLAS library, whose threads made these sums
    20 times slower on a busy two-core machine (benchmarks/bench_section_loads.py
    measures it); einsum's own loop is single-threaded and as fast on one core.
    """
    return np.einsum("...i,i->...", cp, weights)


def _coefficients(geometry, cp_upper, cp_lower, alpha, exact):
    """cl, cd, cm_le, x_cp from panel pressure coefficients.

    Exact projection for shock-expansion theory; the thin-section
    (small-angle) forms cl = cn, cd = ca + α·cn, cm_le = -Σ Δcp x dx for the
    linear and second-order theories.
    """
    g = geometry
    cn = _panel_sum(cp_lower, g.dx_lower) - _panel_sum(cp_upper, g.dx_upper)
    ca = _panel_sum(cp_upper, g.dy_upper) - _panel_sum(cp_lower, g.dy_lower)
    if exact:
        cm_le = _panel_sum(cp_upper, g.arm_upper_exact) - _panel_sum(cp_lower, g.arm_lower_exact)
        cos_a, sin_a = np.cos(alpha), np.sin(alpha)
        cl = cn * cos_a - ca * sin_a
        cd = ca * cos_a + cn * sin_a
    else:
        cm_le = _panel_sum(cp_upper, g.arm_upper) - _panel_sum(cp_lower, g.arm_lower)
        cl, cd = cn, ca + alpha * cn
    with np.errstate(invalid="ignore", divide="ignore"):
        x_cp = -cm_le / cn
    x_cp[cn == 0.0] = np.nan
    return cl, cd, cm_le, x_cp


# ------------------------------------------------------------------ checked cores


def _surface_turns(section, alpha):
    """Leading-edge turns (> 0 compression) and corner turns of both surfaces."""
    up, lo = section.upper_angles, section.lower_angles
    return (up[0] - alpha, np.diff(up)), (alpha - lo[0], -np.diff(lo))


def _shock_expansion_block(M, alpha, gamma, section, geometry, check):
    """Plain shock-expansion loads of one block of cases (ndarrays of one shape; γ a 0-d
    array or of the same shape): the per-case fields after M and α, in order."""
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
    cl, cd, cm_le, x_cp = _coefficients(geometry, cp_u, cp_l, alpha, True)
    return (cl, cd, cm_le, x_cp, phi - alpha, np.exp(ln_p), cp_u, cp_l, detached, subsonic,
            vacuum, unmatched)


def _small_disturbance_block(M, alpha, gamma, section, geometry, second_order):
    """Plain linear (Ackeret) or second-order (Busemann) loads of one block of cases."""
    nan_case = np.isnan(M) | np.isnan(alpha) | np.isnan(gamma)  # γ too: NaN in, NaN out
    root = np.sqrt((M - 1.0) * (M + 1.0))
    c1 = np.where(nan_case, np.nan, 2.0 / root)[..., None]
    a = alpha[..., None]
    if second_order:  # deflection angles; Busemann (1935)
        c2 = (((gamma + 1.0) * M**4 - 4.0 * (M * M - 1.0)) / (2.0 * root**4))[..., None]
        theta_u, theta_l = section.upper_angles - a, a - section.lower_angles
        cp_u = c1 * theta_u + c2 * theta_u**2
        cp_l = c1 * theta_l + c2 * theta_l**2
    else:  # surface slopes; Ackeret (1925)
        theta_u = geometry.dy_upper / geometry.dx_upper - a
        theta_l = a - geometry.dy_lower / geometry.dx_lower
        cp_u, cp_l = c1 * theta_u, c1 * theta_l
    cl, cd, cm_le, x_cp = _coefficients(geometry, cp_u, cp_l, alpha, False)
    slip = np.where(nan_case, np.nan, 0.0)
    p_wake = np.where(nan_case, np.nan, 1.0)
    no = np.zeros(M.shape, dtype=bool)
    return (cl, cd, cm_le, x_cp, slip, p_wake, cp_u, cp_l, no, no.copy(), no.copy(), no.copy())


def _loads_core(M, alpha, gamma, check, *, theory, section, geometry):
    """Checked core of the three theories (floats or arrays): the per-case fields in order.

    Floats (a single case) are run as one-element arrays; arrays are evaluated in
    cache-sized blocks of cases (:func:`gasdyn2d.numerics.chunked`), so the temporaries of
    the march never exceed a block whatever the number of cases.
    """
    gamma = check.gamma(gamma)
    if theory == "shock-expansion":
        M = check.supersonic_mach(M, "M")
    else:
        M = check.at_least(M, "M", 1.0, inclusive=False, what="supersonic flow")
    alpha = check.finite(alpha, "alpha", "rad")
    scalar = type(M) is float and type(alpha) is float
    if (scalar and type(gamma) is float and theory == "shock-expansion"
            and sum(section.n_panels) <= _SCALAR_PANELS):
        return (M, alpha, *_shock_expansion_scalar(M, alpha, gamma, section, geometry, check))
    if scalar:
        M_a, alpha_a = np.array([M]), np.array([alpha])
    else:
        M_a, alpha_a = np.broadcast_arrays(M, alpha)
    gamma_a = np.asarray(gamma, dtype=float)
    if gamma_a.ndim:
        gamma_a = np.broadcast_to(gamma_a, M_a.shape)

    def block(m, a, g):
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if theory == "shock-expansion":
                return _shock_expansion_block(m, a, g, section, geometry, check)
            return _small_disturbance_block(m, a, g, section, geometry,
                                            theory == "second-order")

    fields = nx.chunked(block, M_a, alpha_a, gamma_a)
    if scalar:
        return (M, alpha, *(f[0] for f in fields))
    return (M, alpha, *fields)


def _hot_shock_expansion_block(M, alpha, T, section, geometry, check, gas):
    """:func:`_shock_expansion_block` for a thermally perfect gas (free-stream T [K]): the
    march and the wake match of :mod:`gasdyn2d.design.thermally_perfect_loads`."""
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
    cl, cd, cm_le, x_cp = _coefficients(geometry, cp_u, cp_l, alpha, True)
    return (cl, cd, cm_le, x_cp, phi - alpha, np.exp(ln_p), cp_u, cp_l, detached, subsonic,
            vacuum, unmatched)


def _hot_loads_core(M, alpha, T, check, *, section, geometry, gas):
    """Checked core of :func:`shock_expansion_loads` for a thermally perfect gas."""
    M = check.supersonic_mach(M, "M")
    alpha = check.finite(alpha, "alpha", "rad")
    T = check.positive(T, "T", "K", "the free-stream static temperature")
    scalar = type(M) is float and type(alpha) is float and type(T) is float
    M_a, alpha_a, T_a = np.broadcast_arrays(*(np.atleast_1d(np.asarray(v, dtype=float))
                                              for v in (M, alpha, T)))

    def block(m, a, t):
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            out = _hot_shock_expansion_block(m, a, t, section, geometry, check, gas)
            nan_case = np.isnan(t)  # NaN in, NaN out (the march sees only M and the turns)
            if nan_case.any():
                out = tuple(np.where(nan_case.reshape(nan_case.shape + (1,) * (np.ndim(f) -
                                     nan_case.ndim)), np.nan if f.dtype.kind == "f" else False,
                                     f) for f in map(np.asarray, out))
            return out

    fields = nx.chunked(block, M_a, alpha_a, T_a)
    if scalar:
        return (M, alpha, *(f[0] for f in fields))
    return (M_a, alpha_a, *fields)


#: Panels (both surfaces) up to which a single case is marched on floats, one wave per
#: corner; longer surfaces go through the array march, which takes a run of fans at once.
_SCALAR_PANELS = 8


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
    for _ in range(_TE_MAX_ITER):
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
        if abs(step) <= max(4.0 * 2.2e-16 * abs(phi), _TE_TOLERANCE):
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
    if abs(f) <= _TE_MATCHED:
        return phi, ln_p, True
    return math.nan, math.nan, False


def _shock_expansion_scalar(M, alpha, gamma, section, geometry, check):
    """Shock-expansion loads of one case on floats (the fast path of a single call on a
    few-panel section): the per-case fields after M and α, panel fields as arrays."""
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
    cl, cd, cm_le, x_cp = (float(v[0]) for v in _coefficients(
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


# ------------------------------------------------------------------ unit boundary


def _free_stream(function, M, T, gamma, gas):
    """(M, T, gamma, gas) of a loads call whose ``M`` may be a FlowState (then it carries
    the free-stream temperature and gas, and none of them may be given besides)."""
    if not isinstance(M, FlowState):
        return M, T, gamma, gas
    given = [name for name, value in (("T", T), ("gamma", gamma), ("gas", gas))
             if value is not None]
    if given:
        raise InvalidInputError(
            f"{function} takes the free stream as a FlowState or as M with T, gamma and gas; "
            f"got a FlowState and {', '.join(given)}. Set them on the FlowState instead.")
    return M.M, M.T, None, M.gas


def _loads(theory, section, M, alpha, T, gamma, gas, errors):
    """Cross the boundary once: take (M, α, γ or T), run the checked core, package
    SectionLoads."""
    if not isinstance(section, Section):
        raise InvalidInputError(
            f"section must be a gasdyn2d Section (see Section.from_points); got "
            f"{type(section).__name__}.")
    function = f"{theory.replace('-', '_')}_loads"
    M, T, gamma, gas = _free_stream(function, M, T, gamma, gas)
    gamma, hot = gas_of_call(function, gamma, gas, T, "T", "free-stream static temperature")
    if theory == "second-order":
        refuse_thermally_perfect(
            hot, "gas", "second_order_loads",
            "Busemann's C2 = [(γ+1)M⁴ - 4(M² - 1)]/[2(M² - 1)²] is a perfect-gas coefficient; "
            "use shock_expansion_loads (exact for the gas) or linear_loads (which needs no γ).")
    call = Call(errors)
    call.take("M", M)
    call.take("alpha", alpha, "rad")
    n_upper, n_lower = section.n_panels
    call.trailing("panel_upper", n_upper)
    call.trailing("panel_lower", n_lower)
    geometry = _panel_geometry(section)
    if hot is not None and theory == "shock-expansion":
        call.take("T", T, "K")
        core, options = _hot_loads_core, {"gas": hot}
    else:  # a perfect gas, or linear theory (cp = 2θ/√(M² - 1) needs no γ)
        call.take("gamma", hot.gamma if hot is not None else gamma, keep_scalar=True)
        core, options = _loads_core, {"theory": theory}
        if T is not None:
            call.take("T", T, "K")
            core = perfect_with_temperature(core, "T")
    values = dict(zip((f.name for f in _CASE_FIELDS),
                      call.evaluate(_CASE_FIELDS, core, section=section, geometry=geometry,
                                    **options)))
    values["x_upper"] = _read_only(geometry.x_upper)
    values["x_lower"] = _read_only(geometry.x_lower)
    values["theory"] = theory
    return SectionLoads.from_fields([values[f.name] for f in result_fields(SectionLoads)])


def _read_only(array):
    array = np.array(array, dtype=float)
    array.flags.writeable = False
    return array


def shock_expansion_loads(section: Section, M: ArrayInput, alpha: ArrayInput, *,
                          T: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                          errors: str = "raise") -> SectionLoads:
    """Loads on a section by exact shock-expansion theory, for many (M, α) cases at once.

    Parameters
    ----------
    section : Section
        The section, in chord units.
    M : float, array_like, DataArray, Series, dask array or FlowState
        Free-stream Mach number [-], >= 1; or the free stream as a
        :class:`~gasdyn2d.FlowState` (its M, T and gas; its direction is not used, the
        incidence is ``alpha``).
    alpha : float, array_like or Quantity (or a labelled or lazy array of them)
        Incidence [rad], > 0 nose up (the free stream meets the lower surface).
    T : float, array_like or Quantity, optional
        Free-stream static temperature [K], > 0: required for a thermally perfect ``gas``
        (each wave is then that gas's at its local temperature); with a perfect gas it is
        checked and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``); a thermally perfect one needs ``T``.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN (with the case's flag set) for cases where a shock
        detaches, the flow behind a shock is subsonic or a surface expands to
        vacuum, instead of raising.

    Returns
    -------
    SectionLoads
        Immutable: read-only arrays, no two fields sharing memory. The case fields
        follow the inputs' container (floats for floats; DataArrays broadcast by
        dimension name with the coordinates kept; Series on the input's index; lazy
        dask arrays, computed block by block over the cases); the per-panel fields
        add a last axis ``panel_upper`` / ``panel_lower`` (a DataFrame for Series
        inputs). NaN in any input gives NaN out for that case.

    Raises
    ------
    DetachedShockError
        A leading-edge or corner shock would detach, or leave subsonic flow
        behind it; the message names the first case, the surface, the
        deflection and θmax there.
    NoSolutionError
        A surface expands beyond vacuum; the message names the case and the limit.
    InvalidInputError
        M < 1, non-finite incidence, gamma <= 1, a bad ``section``, or an input
        of the wrong type (strings, bools, complex numbers).

    Notes
    -----
    Each surface meets the free stream with a turn θ_LE = δ_u - α (upper) or
    α - δ_l (lower), δ the first panel's inclination: θ_LE > 0 is an oblique
    shock (weak branch, θ-β-M relation), θ_LE < 0 a Prandtl–Meyer fan. At a
    corner where the surface turns away from the flow the fan gives
    ν2 = ν1 + |Δδ| with p0 constant; where it turns into the flow a shock.
    Panel pressures give cp = (p/p∞ - 1)/(γM²/2) and the chord-axis forces

        cn = Σ cp_l dx_l - Σ cp_u dx_u,   ca = Σ cp_u dy_u - Σ cp_l dy_l,
        cl = cn cos α - ca sin α,         cd = ca cos α + cn sin α,
        cm_le = Σ cp_u (x dx + y dy)_u - Σ cp_l (x dx + y dy)_l   (panel mid-points).

    At the trailing edge each stream turns through one more wave to a common
    direction and pressure (the wake slip line; Newton on the slip direction).
    Waves reflected from the fans onto the shocks (and back) are neglected, as
    in the classical method; their effect on surface pressure is of third
    order in the turn angles. Cp loses relative precision ~1e-16/|p/p∞ - 1|
    for very small turns.

    For a thermally perfect gas every wave is that gas's at the local panel temperature
    (a run of fans at the stagnation temperature, which no wave changes), and
    q = γ(T∞) p∞ M²/2 = ρ∞V∞²/2 (:mod:`gasdyn2d.design.thermally_perfect_loads`).

    References
    ----------
    Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley,
    ch. 4 (shock-expansion theory).
    Ames Research Staff (1953), NACA Report 1135, eqs. 150 and 171.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_loads import shock_expansion_loads
    >>> loads = shock_expansion_loads(Section.double_wedge(0.05), 2.5, np.radians([0.0, 4.0]))
    >>> np.round(loads.cl, 5), np.round(loads.cd, 5)
    (array([0.     , 0.12291]), array([0.00437, 0.01304]))
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT, FlowState
    >>> hot = FlowState(7.0, 1.2e3, 230.0, gas=AIR_THERMALLY_PERFECT)  # an invented glider
    >>> round(shock_expansion_loads(Section.double_wedge(0.05), hot, np.radians(6.0)).cl, 5)
    0.06831
    """
    return _loads("shock-expansion", section, M, alpha, T, gamma, gas, errors)


def linear_loads(section: Section, M: ArrayInput, alpha: ArrayInput, *, T: ArrayInput = None,
                 gamma: ArrayInput = None, gas=None, errors: str = "raise") -> SectionLoads:
    """Loads on a section by linearised supersonic theory (Ackeret).

    Same parameters and result as :func:`shock_expansion_loads`, but M > 1
    strictly. ``gamma`` does not enter the linear pressure; it is accepted (and
    checked) for a uniform call, and so is a thermally perfect ``gas`` with its ``T``
    (the linear cp is the same for every gas).

    Notes
    -----
    cp = 2θ/√(M² - 1) on each panel, θ = dy/dx - α (upper) or α - dy/dx (lower),
    with the thin-section forms cl = cn, cd = ca + α·cn, cm_le = -Σ Δcp·x·dx.
    For a flat plate cl = 4α/√(M²-1), cd = 4α²/√(M²-1), cm_le = -2α/√(M²-1); for
    a symmetric double wedge of t/c = τ, cd = 4(α² + τ²)/√(M²-1). The wake
    leaves parallel to the free stream at free-stream pressure.

    References
    ----------
    Ackeret, J. (1925), "Luftkräfte auf Flügel, die mit größerer als
    Schallgeschwindigkeit bewegt werden", Z. Flugtech. Motorluftschiffahrt 16, 72-74.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_loads import linear_loads
    >>> loads = linear_loads(Section.flat_plate(), 2.0, np.radians(3.0))
    >>> round(loads.cl, 6), round(float(4 * np.radians(3.0) / np.sqrt(3.0)), 6)
    (0.12092, 0.12092)
    """
    return _loads("linear", section, M, alpha, T, gamma, gas, errors)


def second_order_loads(section: Section, M: ArrayInput, alpha: ArrayInput, *,
                       T: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                       errors: str = "raise") -> SectionLoads:
    """Loads on a section by second-order (Busemann) theory.

    Same parameters and result as :func:`linear_loads`; a thermally perfect ``gas`` is
    refused (C2 below is the perfect gas's).

    Notes
    -----
    cp = C1·θ + C2·θ², θ = δ - α (upper) or α - δ (lower) the panel's deflection
    angle from the free stream, with

        C1 = 2/√(M² - 1),   C2 = [(γ+1)M⁴ - 4(M² - 1)] / [2(M² - 1)²]

    (C2 → (γ+1)/2 as M → ∞), and the thin-section force forms of
    :func:`linear_loads`. Shock and simple-wave pressures agree to second order
    in θ, so one formula serves both; the error is of third order.

    References
    ----------
    Busemann, A. (1935), "Aerodynamischer Auftrieb bei Überschallgeschwindigkeit",
    Luftfahrtforschung 12, 210-220.
    Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley, ch. 4.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_loads import second_order_loads
    >>> loads = second_order_loads(Section.flat_plate(), 3.0, 0.05)
    >>> c1 = 2 / np.sqrt(8.0)
    >>> round(float((loads.cp_lower[0] - c1 * 0.05) / 0.05**2), 5)
    1.26875
    """
    return _loads("second-order", section, M, alpha, T, gamma, gas, errors)


#: The section-load theories by name.
THEORIES = {"shock-expansion": shock_expansion_loads, "linear": linear_loads,
            "second-order": second_order_loads}


def loads_function(theory: str, name: str = "theory"):
    """The loads function of a theory named ``theory`` ("shock-expansion", "linear" or
    "second-order"); any other value is an :class:`~gasdyn2d.errors.InvalidInputError`
    naming the argument ``name`` (as the caller calls it) and the choices.

    Examples
    --------
    >>> from gasdyn2d.design.section_loads import loads_function
    >>> loads_function("linear").__name__
    'linear_loads'
    """
    if isinstance(theory, str) and theory in THEORIES:
        return THEORIES[theory]
    choices = ", ".join(repr(key) for key in THEORIES)
    raise InvalidInputError(f"{name} must name a section-load theory ({choices}); got "
                            f"{theory!r}.")
