"""Characteristic nets grown from a centred fan: nozzle kernels and jets, by diagonals.

A centred fan of n lines (the corner of a minimum-length nozzle, the lip of a
jet) leaves a corner as C- characteristics, reflects from the symmetry line or
axis as C+ characteristics and meets an upper boundary. Node (b, a) is where
C+ line b crosses C- line a; the net is marched one diagonal a + b = s at a
time, every node of a diagonal in one vectorised call.

Plain core: :func:`march_fan_band` (planar or axisymmetric) and
:func:`band_segments`.
"""

from __future__ import annotations

import dataclasses
import functools

import numpy as np

from ..relations.expansion_fans import mach_from_prandtl_meyer_angle
from .unit_processes import (
    axis_node_axisymmetric,
    free_boundary_node_axisymmetric,
    interior_nodes_stacked,
    ray_line_intersection,
    check_geometry,
    mach_angle_from_nu,
)

__all__ = ["march_fan_band", "band_segments"]


@dataclasses.dataclass
class _Band:
    """Node arrays [b, a] of a net grown from a centred fan (see :func:`march_fan_band`)."""

    x: np.ndarray
    y: np.ndarray
    theta: np.ndarray
    nu: np.ndarray
    valid: np.ndarray
    boundary_index: object
    fold: tuple | None  # (x, y, b, a) of the first folded cell, or None
    #: axisymmetric nets: node records (x, y, θ, ν, z, μ, s) stacked, shape (7, b, a)
    records: np.ndarray | None = None


def march_fan_band(fan_theta, fan_nu, corner_x, corner_y, *, boundary, n_plus_lines,
                   nu_boundary=None, gamma=1.4, x_stop=np.inf, geometry="planar",
                   upstream_lines=None):
    """Plain core: march the net of a centred fan at an upper corner over a symmetry line or axis.

    The n lines of the fan leave the corner as C- characteristics (label a =
    1..n), reflect from the symmetry line y = 0 as C+ characteristics (label
    b = 1, 2, ...) and meet the upper boundary. Node (b, a) is where C+ line b
    crosses C- line a; it lies on the symmetry line when a = b and on the
    upper boundary when a = boundary_index(b).

    Parameters
    ----------
    fan_theta, fan_nu : ndarray, shape (n,)
        Flow angle and Prandtl–Meyer angle [rad] on each fan line at the corner.
    corner_x, corner_y : float
        Position of the corner [m].
    boundary : {"cancel", "pressure", "open"}
        ``"cancel"`` (planar only): a wall that turns each arriving C+ away
        without reflection (minimum-length nozzle contour); boundary nodes at
        a = n + 1. ``"pressure"``: a constant-pressure free boundary with
        Prandtl–Meyer angle ``nu_boundary``; each C+ reflects as a new C- of
        label b + n. ``"open"`` (axisymmetric only): no upper boundary, the
        net ends on the last fan line a = n (the kernel of a round nozzle).
    n_plus_lines : int
        Number of C+ lines to march.
    gamma : float, optional
        Ratio of specific heats [-].
    x_stop : float, optional
        Stop after the first diagonal lying wholly beyond ``x_stop`` [m].
    geometry : {"planar", "axisymmetric"}, optional
        Axisymmetric: y is the radius and the invariants gather the source
        term, so node states are found with the positions, diagonal by
        diagonal (see :mod:`gasdyn2d.characteristics.unit_processes`).
    upstream_lines : tuple (x, y, θ, ν) of arrays of length M, optional
        Axisymmetric only: M C+ lines started upstream of the fan (on the exit
        plane of a jet, from the lip down to the axis), which become C+ lines
        1..M; the axis reflections follow as lines M+1, ... In planar flow
        they would all carry the same state (a uniform region); in round flow
        they resolve the flow, and the boundary, ahead of the first reflected
        wave.

    Returns
    -------
    _Band
        Arrays indexed [b, a] (``valid`` marks computed nodes) and the first
        fold (same-family crossing, where a shock forms), or None.

    Notes
    -----
    The invariants are labels of the lines: C- line a carries K-_a = θ + ν
    (the fan's value for a <= n), C+ line b carries K+_b = -K-_b (reflection
    from the symmetry line, θ = 0), and a C- reflected from the boundary
    carries K-_(b+n) = K+_b + 2ν_boundary (constant pressure) or, at a
    cancelling wall, nothing new. So every node state, θ = (K-_a + K+_b)/2 and
    ν = (K-_a - K+_b)/2, is known before the march, exactly; and with it every
    Mach angle, in one vectorised call. The march then only places the nodes,
    exactly as :func:`interior_point`, :func:`symmetry_point`,
    :func:`cancellation_point` and :func:`free_boundary_point` do (straight
    segments at the averaged directions), one diagonal a + b = s at a time:
    nodes of a diagonal depend only on earlier diagonals.

    In axisymmetric flow the invariants change along their lines, so the
    states are found with the positions by the axisymmetric unit processes;
    a node on the axis takes ∂θ/∂y (for the limit of the source term) from θ/y
    of the node above it on the same diagonal, (b - 1, b + 1).
    """
    if check_geometry(geometry):
        return _march_axisymmetric_band(np.asarray(fan_theta, float), np.asarray(fan_nu, float),
                                        corner_x, corner_y, boundary, n_plus_lines, nu_boundary,
                                        gamma, x_stop, upstream_lines)
    n = len(fan_theta)
    if boundary == "cancel":
        def boundary_index(b):
            return np.full_like(np.asarray(b), n + 1)
    else:
        def boundary_index(b):
            return np.asarray(b) + n
    shape = (n_plus_lines + 1, int(boundary_index(n_plus_lines)) + 1)
    theta, nu = _band_states(np.asarray(fan_theta, float), np.asarray(fan_nu, float), shape,
                             boundary, nu_boundary)
    with np.errstate(invalid="ignore"):
        mu = mach_angle_from_nu(nu, gamma)
    plus_dir, minus_dir = theta + mu, theta - mu
    x, y = np.full(shape, np.nan), np.full(shape, np.nan)
    valid = np.zeros(shape, dtype=bool)
    lip = np.arange(1, n + 1) if boundary != "cancel" else np.arange(1, n + 2)
    x[0, lip], y[0, lip], valid[0, lip] = corner_x, corner_y, True
    b_all = np.arange(1, n_plus_lines + 1)
    top = boundary_index(b_all)
    fold = None
    for s in range(2, int(top[-1]) + n_plus_lines + 1):
        a_all = s - b_all
        keep = (a_all >= b_all) & (a_all <= top)
        b, a = b_all[keep], a_all[keep]
        if b.size == 0:
            continue
        x3, y3, ok = _place_diagonal(b, a, top[keep], boundary, x, y, theta, plus_dir, minus_dir)
        if not np.all(ok):
            bad = np.flatnonzero(~ok)
            first = bad[np.argmin(np.where(np.isnan(x3[bad]), np.inf, x3[bad]))]
            i, j = b[first], a[first]
            upstream = (i, j - 1) if j > i else (i - 1, j)
            fold = (float(x[upstream]), float(y[upstream]), int(i), int(j))
            break
        x[b, a], y[b, a] = x3, y3
        valid[b, a] = True
        if np.min(x3) > x_stop:
            break
    return _Band(x, y, theta, nu, valid, boundary_index, fold)


def _band_states(fan_theta, fan_nu, shape, boundary, nu_boundary):
    """θ, ν [rad] of every node (b, a) of the band from the invariants its lines carry."""
    n = fan_theta.size
    n_b, n_a = shape
    minus = np.full(n_a, np.nan)  # K-_a
    minus[1:n + 1] = fan_theta + fan_nu
    if boundary == "cancel":
        minus[n + 1:] = minus[n]  # the cancelling wall reflects nothing
    else:
        for start in range(n + 1, n_a, n):  # K-_(b+n) = K+_b + 2ν_b = 2ν_b - K-_b
            stop = min(start + n, n_a)
            minus[start:stop] = 2.0 * nu_boundary - minus[start - n:stop - n]
    plus = -minus[:n_b]  # K+_b = -K-_b (reflection from the symmetry line)
    plus[0] = fan_theta[0] - fan_nu[0]  # row 0 is the corner: the fan's own K+
    theta = 0.5 * (minus[None, :] + plus[:, None])
    nu = 0.5 * (minus[None, :] - plus[:, None])
    return theta, nu


def _place_diagonal(b, a, top, boundary, x, y, theta, plus_dir, minus_dir):
    """Positions of the nodes (b, a) of one diagonal; ``ok`` is False where the net folds."""
    x3, y3 = np.empty(b.size), np.empty(b.size)
    ok = np.ones(b.size, dtype=bool)
    on_axis, on_top = a == b, a == top
    inner = ~on_axis & ~on_top
    i, j = b[inner], a[inner]  # from (b, a-1) along the C+ and (b-1, a) along the C-
    x3[inner], y3[inner], t_plus, t_minus = ray_line_intersection(
        x[i, j - 1], y[i, j - 1], 0.5 * (plus_dir[i, j - 1] + plus_dir[i, j]),
        x[i - 1, j], y[i - 1, j], 0.5 * (minus_dir[i - 1, j] + minus_dir[i, j]))
    ok[inner] = (t_plus > 0) & (t_minus > 0)
    if np.any(on_axis):
        i = b[on_axis]
        direction = 0.5 * (minus_dir[i - 1, i] + minus_dir[i, i])
        t_minus = -y[i - 1, i] / np.sin(direction)
        x3[on_axis] = x[i - 1, i] + t_minus * np.cos(direction)
        y3[on_axis] = 0.0
        ok[on_axis] = t_minus > 0
    if np.any(on_top):
        i, j = b[on_top], a[on_top]
        previous = top[on_top] if boundary == "cancel" else j - 1
        x3[on_top], y3[on_top], t_plus, t_stream = ray_line_intersection(
            x[i, j - 1], y[i, j - 1], 0.5 * (plus_dir[i, j - 1] + plus_dir[i, j]),
            x[i - 1, previous], y[i - 1, previous], 0.5 * (theta[i - 1, previous] + theta[i, j]))
        ok[on_top] = (t_plus > 0) & (t_stream >= 0)
    return x3, y3, ok & np.isfinite(x3) & np.isfinite(y3)


def band_segments(valid, skip=None):
    """(C+ pairs, C- pairs) of flat node indices joining valid neighbours of a band.

    Along a C+ line b >= 1 the neighbours are (b, a) → (b, a+1) over valid nodes
    (nodes marked in ``skip`` are jumped over; row b = 0 is the corner, where the
    fan lines start, not a C+); along a C- line a they are (b, a) → (b+1, a).
    """
    keep = valid & ~(skip if skip is not None else np.zeros_like(valid))
    index = np.full(valid.shape, -1, dtype=np.intp)
    index[keep] = np.arange(np.count_nonzero(keep))
    plus = []
    for row in index[1:]:
        row = row[row >= 0]
        plus.append(np.column_stack([row[:-1], row[1:]]))
    minus = np.column_stack([index[:-1].ravel(), index[1:].ravel()])
    minus = minus[(minus >= 0).all(axis=1)]
    return np.concatenate(plus + [np.empty((0, 2), np.intp)]), minus, keep


# ---------------------------------------------------------------- axisymmetric band


def _march_axisymmetric_band(fan_theta, fan_nu, corner_x, corner_y, boundary, n_plus_lines,
                             nu_boundary, gamma, x_stop, upstream_lines=None):
    """The axisymmetric twin of the planar band march: states found diagonal by diagonal.

    ``fan_theta`` and ``fan_nu`` may have a trailing batch axis (n, K): K fans
    marched together (the candidates of a root-find). A batch is marched to
    the end; a candidate whose net folds gets NaN nodes from there on, and
    ``fold`` is None.
    """
    n = fan_theta.shape[0]
    batch = fan_theta.shape[1:]
    if boundary == "open":
        def boundary_index(b):
            return np.full_like(np.asarray(b), n)
    elif boundary == "pressure":
        def boundary_index(b):
            return np.asarray(b) + n
    else:
        raise ValueError(f"boundary {boundary!r} is planar only; use 'open' or 'pressure'")
    shape = (n_plus_lines + 1, int(boundary_index(n_plus_lines)) + 1)
    records = np.full((7,) + shape + batch, np.nan)  # x, y, θ, ν, z, μ, sin θ / y
    valid = np.zeros(shape, dtype=bool)
    mach = mach_from_prandtl_meyer_angle(fan_nu, gamma)
    z = np.sqrt((mach - 1.0) * (mach + 1.0))
    mu = np.arctan2(1.0, z)
    records[:, 0, 1:n + 1] = np.broadcast_arrays(corner_x, corner_y, fan_theta, fan_nu, z, mu,
                                                 np.sin(fan_theta) / corner_y)
    valid[0, 1:n + 1] = True
    offset = 0
    if upstream_lines is not None:  # their start nodes sit in column a = 0
        ux, uy, uth, unu = (np.asarray(v, dtype=float) for v in upstream_lines)
        offset = ux.size
        u_mach = mach_from_prandtl_meyer_angle(unu, gamma)
        uz = np.sqrt((u_mach - 1.0) * (u_mach + 1.0))
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.where(uy > 0.0, np.sin(uth) / uy, 0.0)
        start = np.array([ux, uy, uth, unu, uz, np.arctan2(1.0, uz), ratio])
        records[:, 1:offset + 1, 0] = start.reshape(start.shape + (1,) * len(batch))
        valid[1:offset + 1, 0] = True
    with np.errstate(all="ignore"):  # folded or sonic nodes are caught by the checks below
        fold = _march_diagonals(records, valid, n_plus_lines, n, boundary, nu_boundary, gamma,
                                x_stop, stop_on_fold=not batch, offset=offset)
    x, y, theta, nu = records[:4]
    return _Band(x, y, theta, nu, valid, boundary_index, fold, records)


def _march_diagonals(records, valid, n_plus_lines, n_fan, boundary, nu_boundary, gamma,
                     x_stop, stop_on_fold=True, offset=0):
    """The diagonals of an axisymmetric band, in place; returns the first fold or None.

    C+ lines 1..``offset`` start upstream (column a = 0) and meet the fan from
    a = 1; line b > offset starts on the axis at a = b - offset.
    """
    for plan in _diagonal_plans(int(n_plus_lines), int(n_fan), offset, boundary):
        b, a = plan.b, plan.a
        ok = _advance_diagonal(records, plan, nu_boundary, gamma)
        if not stop_on_fold:
            if not np.all(ok):  # this candidate of the batch is lost from here on
                nodes = records[:, b, a]
                nodes[:, ~ok] = np.nan
                records[:, b, a] = nodes
            valid[b, a] = True
            continue
        if not np.all(ok):
            x3 = records[0, b, a]
            bad = np.flatnonzero(~ok)
            first = bad[np.argmin(np.where(np.isnan(x3[bad]), np.inf, x3[bad]))]
            i, j = b[first], a[first]
            upstream = (i, j - 1) if j > i - offset else (i - 1, j)
            records[:, b, a] = np.nan
            return (float(records[0][upstream]), float(records[1][upstream]), int(i), int(j))
        valid[b, a] = True
        if np.min(records[0, b, a]) > x_stop:
            break
    return None


@dataclasses.dataclass(frozen=True)
class _DiagonalPlan:
    """Index arrays of one diagonal of a band: its nodes in the order inner, top, axis."""

    b: np.ndarray
    a: np.ndarray
    inner: tuple  # gather index of (upstream C+, upstream C-) and the nodes' own index
    top: tuple | None
    axis: tuple | None


@functools.lru_cache(maxsize=32)
def _diagonal_plans(n_plus_lines, n_fan, offset, boundary):
    """The diagonals of a band (same for every march of that shape: computed once)."""
    b_all = np.arange(1, n_plus_lines + 1)
    top = b_all + n_fan if boundary == "pressure" else np.full_like(b_all, n_fan)
    lowest = np.where(b_all <= offset, 1, b_all - offset)
    plans = []
    for s in range(2, int(top[-1]) + n_plus_lines + 1):
        a_all = s - b_all
        keep = (a_all >= lowest) & (a_all <= top)
        b, a = b_all[keep], a_all[keep]
        if b.size == 0:
            continue
        on_axis = (a == b - offset) & (b > offset)
        on_top = (a == top[keep]) & (boundary == "pressure")
        inner = ~on_axis & ~on_top
        i, j = b[inner], a[inner]  # from (b, a-1) along the C+ and (b-1, a) along the C-
        inner_plan = ((np.stack([i, i - 1]), np.stack([j - 1, j])), (i, j))
        top_plan = None
        if np.any(on_top):
            i, j = b[on_top], a[on_top]  # C+ from (b, a-1), boundary streamline from (b-1, a-1)
            top_plan = ((i, j - 1), (i - 1, j - 1), (i, j))
        axis_plan = None
        if np.any(on_axis):
            i = b[on_axis]
            j = i - offset  # the C- line reflected here
            # ∂θ/∂y on the axis from the node above on this diagonal (θ odd in y: θ/y to
            # O(y²)), or from the arriving point where there is none (the last fan line of a
            # kernel; the corner row b = 0 is not above the node)
            top_above = (i - 1) + n_fan if boundary == "pressure" else np.full_like(i, n_fan)
            has_above = (j + 1 <= top_above) & (i >= 2)
            axis_plan = ((i - 1, j), (i - 1, np.where(has_above, j + 1, j)), has_above, (i, j))
        order = np.concatenate([np.flatnonzero(inner), np.flatnonzero(on_top),
                                np.flatnonzero(on_axis)])
        plans.append(_DiagonalPlan(b[order], a[order], inner_plan, top_plan, axis_plan))
    return tuple(plans)


def _advance_diagonal(records, plan, nu_boundary, gamma):
    """Records of the nodes of one diagonal (written in place); False where it folds."""
    batch = records.shape[3:]
    checks = []
    gather, own = plan.inner
    if own[0].size:
        node, t_plus, t_minus = interior_nodes_stacked(records[:, gather[0], gather[1]], gamma)
        records[:, own[0], own[1]] = node
        checks.append((t_plus > 0) & (t_minus > 0))
    if plan.top is not None:
        upstream, previous, own = plan.top
        node, t_plus, t_stream = free_boundary_node_axisymmetric(
            records[:, upstream[0], upstream[1]], records[0][previous], records[1][previous],
            records[2][previous], nu_boundary, gamma)
        records[:, own[0], own[1]] = node
        checks.append((t_plus > 0) & (t_stream >= 0))
    if plan.axis is not None:
        upstream, above, has_above, own = plan.axis
        arriving = records[:, upstream[0], upstream[1]]
        has_above = has_above.reshape(has_above.shape + (1,) * len(batch))
        slope = np.where(has_above, records[6][above], arriving[6])
        node, t_minus = axis_node_axisymmetric(arriving, slope, gamma)
        records[:, own[0], own[1]] = node
        checks.append(t_minus > 0)
    ok = np.concatenate(checks) if len(checks) > 1 else checks[0]
    nodes = records[:4, plan.b, plan.a]
    return ok & (nodes[3] > 0.0) & np.isfinite(nodes[0]) & np.isfinite(nodes[1])
