"""The straightening wall of a nozzle: the flow between a kernel's last C- and the exit.

A nozzle kernel (the corner fan of a minimum-length nozzle, the throat arc of
a rounded-throat one) ends on a C- characteristic running from the wall to
the axis point E where the design Mach number is reached. Downstream of it the
flow must turn parallel: the last characteristic, the C+ from E, carries the
uniform exit state (θ = 0, ν = ν_exit). The flow between the two is fixed by
the data on both (a characteristic initial-value, or Goursat, problem), and
the wall is the streamline through it from the kernel's wall point.

In planar flow that region is a simple wave (every C+ straight with one
state), which :func:`~gasdyn2d.characteristics.unit_processes.cancellation_point`
exploits. In axisymmetric flow the states change along the lines, so the
region is marched here: a net of the C+ lines through the nodes of the last
C- and of C- lines through points of the exit characteristic, each node by
the interior unit process from its C+ neighbour (upstream) and its C-
neighbour (downstream, on the side of the exit characteristic: the C-
relation is integrated backwards). The net is continued beyond the wall
(the same flow, outside the nozzle) so that each C+ line is crossed by the
wall streamline between two of its nodes.

Plain core only: :func:`march_turning_region`, :func:`trace_wall`.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .unit_processes import (
    interior_nodes_stacked,
    interior_point_given_mach_angles,
    ray_line_intersection,
)
from ..relations.isentropic import mach_angle_of
from ..relations.expansion_fans import mach_from_prandtl_meyer_angle

__all__ = ["march_turning_region", "trace_wall", "TurningRegion"]

_WALL_PASSES = 4  # fixed-point passes of the mean wall angle on each C+ line
_REACH = 1.1  # the exit characteristic is netted to this multiple of its estimated length


@dataclasses.dataclass
class TurningRegion:
    """Plain-core result: the net between a kernel's last C- and the exit characteristic.

    ``records[:, k, j]`` is node (x, y, θ, ν, z, μ, s) where C+ line k (through
    node k of the last C-; k = m is the exit characteristic from E) crosses C-
    line j (j = 0 is the last C- itself); ``valid`` marks computed nodes.
    """

    records: np.ndarray  # (7, m + 1, J + 1)
    valid: np.ndarray  # (m + 1, J + 1)
    exit_angle: float  # Mach angle of the exit state [rad]: direction of the exit C+


def march_turning_region(line_records, nu_exit, gamma, *, exit_length, n_minus_lines=None,
                         axisymmetric=True, wall_bound=None):
    """Plain core: march the net between a last C- line and the exit C+.

    Parameters
    ----------
    line_records : tuple of 7 ndarrays, shape (m + 1,)
        Node records (x, y, θ, ν, z, μ, s) of the last C- line of the kernel,
        from its wall point (k = 0) to the axis point E (k = m, y = 0).
    nu_exit : float
        Prandtl–Meyer angle of the uniform exit flow [rad]; θ = 0 there.
    gamma : float
    exit_length : float
        Estimated length of the exit characteristic from E to the wall [m];
        C- lines are started at equal steps along ``_REACH`` times it.
    n_minus_lines : int, optional
        Number of C- lines (default m).
    axisymmetric : bool, optional
        False marches the planar net with the planar interior process (a
        simple wave: used to check this march against the planar
        cancellation construction).
    wall_bound : callable, optional
        y_max(x), a height the wall cannot exceed [m]. A node is marched only
        if its C+ neighbour upstream lies below it: a C+ line that has crossed
        the wall (a streamline: C+ lines cross streamlines one way) stays
        outside, and its nodes beyond the first one outside are not needed.

    Returns
    -------
    TurningRegion
    """
    line = np.asarray(line_records, dtype=float)
    m = line.shape[1] - 1
    n_j = m if n_minus_lines is None else int(n_minus_lines)
    records = np.full((7, m + 1, n_j + 1), np.nan)
    valid = np.zeros((m + 1, n_j + 1), dtype=bool)
    records[:, :, 0] = line
    valid[:, 0] = True
    mach_exit = float(mach_from_prandtl_meyer_angle(nu_exit, gamma))
    mu_exit = float(mach_angle_of(mach_exit))
    distance = _REACH * exit_length * np.arange(1, n_j + 1) / n_j
    x_e, y_e = line[0, m], line[1, m]
    records[:, m, 1:] = np.broadcast_arrays(
        x_e + distance * np.cos(mu_exit), y_e + distance * np.sin(mu_exit), 0.0, nu_exit,
        np.sqrt(mach_exit**2 - 1.0), mu_exit, 0.0)
    valid[m, 1:] = True
    k_all = np.arange(1, m)  # C+ line 0 leaves the wall's first point outwards: not needed
    with np.errstate(all="ignore"):
        for diagonal in range(2, (m - 1) + n_j + 1):
            j_all = diagonal - (m - k_all)
            keep = (j_all >= 1) & (j_all <= n_j)
            k, j = k_all[keep], j_all[keep]
            if k.size == 0:
                continue
            usable = valid[k, j - 1] & valid[k + 1, j]
            if wall_bound is not None:
                usable &= records[1, k, j - 1] <= wall_bound(records[0, k, j - 1])
            if not np.any(usable):
                continue
            k, j = k[usable], j[usable]
            if axisymmetric:  # C+ neighbour (k, j-1) upstream, C- neighbour (k+1, j) downstream
                node, t_plus, t_minus = interior_nodes_stacked(records[:, (k, k + 1), (j - 1, j)],
                                                          gamma)
                node = np.array(node)
            else:
                p1, p2 = records[:, k, j - 1], records[:, k + 1, j]
                x3, y3, th3, nu3, t_plus, t_minus, mu3 = interior_point_given_mach_angles(
                    p1[0], p1[1], p1[2], p1[3], p1[5], p2[0], p2[1], p2[2], p2[3], p2[5], gamma)
                node = np.array([x3, y3, th3, nu3, 1.0 / np.tan(mu3), mu3, np.sin(th3) / y3])
            ok = (t_plus > 0) & (t_minus < 0) & (node[1] > 0) & (node[3] > 0) \
                & np.all(np.isfinite(node), axis=0)
            records[:, k[ok], j[ok]] = node[:, ok]
            valid[k[ok], j[ok]] = True
    return TurningRegion(records, valid, mu_exit)


def trace_wall(region, start):
    """Plain core: the wall streamline from ``start`` = (x, y, θ, ν) through a turning region.

    On each C+ line k = 1..m-1 the wall point is where the streamline from the
    previous wall point, straight at the mean of the flow angles at its ends,
    crosses the line (states interpolated linearly along the line's segment);
    the last point is on the exit characteristic (θ = 0), the nozzle lip.

    Returns
    -------
    wall : ndarray, shape (4, m + 1)
        x, y, θ, ν of the wall points, ``start`` first and the lip last.
    crossing : ndarray of int, shape (m + 1,)
        Index j of the segment (j, j + 1) of each C+ line that the wall crosses
        (nodes 0..j of the line are inside the nozzle); -1 for the start.
    reach : float
        Largest segment parameter of a crossing: > 1 means the wall left the
        netted part of a line (extrapolated); the caller nets further.
    """
    records, valid = region.records, region.valid
    m = records.shape[1] - 1
    wall = np.empty((4, m + 1))
    wall[:, 0] = start
    crossing = np.full(m + 1, -1)
    reach = 0.0
    with np.errstate(divide="ignore", invalid="ignore"):
        for k in range(1, m):
            count = int(np.argmin(valid[k])) if not np.all(valid[k]) else valid.shape[1]
            point, index, r = _streamline_meets_line(wall[:, k - 1], records[:, k, :count])
            wall[:, k], crossing[k] = point, index
            reach = max(reach, r)
    # the lip: the straight exit characteristic from E, θ = 0
    x_w, y_w, th_w, _ = wall[:, m - 1]
    x_e, y_e, _, nu_exit = records[:4, m, 0]
    x, y, _, _ = ray_line_intersection(x_w, y_w, 0.5 * th_w, x_e, y_e, region.exit_angle)
    wall[:, m] = (x, y, 0.0, nu_exit)
    exit_nodes = records[0, m] < x
    crossing[m] = int(np.count_nonzero(exit_nodes & valid[m])) - 1
    return wall, crossing, reach


def _streamline_meets_line(wall_point, nodes):
    """Crossing of the streamline from ``wall_point`` with the polyline ``nodes`` (6, count)."""
    x_w, y_w, th_w, _ = wall_point
    x, y, theta, nu = nodes[:4]
    ex, ey = x[1:] - x[:-1], y[1:] - y[:-1]
    rx, ry = x[:-1] - x_w, y[:-1] - y_w
    theta_new = theta[0]
    for _ in range(_WALL_PASSES):
        direction = 0.5 * (th_w + theta_new)
        c, s = np.cos(direction), np.sin(direction)
        r = (c * ry - s * rx) / (ex * s - ey * c)  # along each segment
        inside = np.flatnonzero((r >= 0.0) & (r <= 1.0))
        index = int(inside[0]) if inside.size else x.size - 2  # else extrapolate the last
        w = float(r[index])
        theta_new = theta[index] + w * (theta[index + 1] - theta[index])
    point = (x[index] + w * ex[index], y[index] + w * ey[index], theta_new,
             nu[index] + w * (nu[index + 1] - nu[index]))
    return point, index, w
