"""Round (axisymmetric) nozzle contours by the method of characteristics: the plain core.

The public functions are :func:`~gasdyn2d.characteristics.nozzles.minimum_length_nozzle`
and :func:`~gasdyn2d.characteristics.nozzles.rounded_throat_nozzle` with
``geometry="axisymmetric"``; this module designs their round contours (throat
radius 1).

A round minimum-length nozzle differs from the planar one in three ways:

- The corner angle is not ν(M_exit)/2: the waves of the corner fan
  strengthen as they converge on the axis, so the corner angle that brings the
  axis to M_exit exactly where the last fan line arrives is found by a
  root-find on whole kernel marches (about 0.22 ν(M_exit) at Mach 2). Nor is
  it the largest wall angle: the wall bends further out past the corner.
- The flow between the kernel's last C- and the exit characteristic is no
  simple wave: it is marched (:mod:`~gasdyn2d.characteristics.turning_regions`)
  and the wall traced through it as a streamline.
- The fan lines are clustered towards the sonic end, ν_a = θ_max (a/n)⁴. The
  first reflected C+ line leaves the sonic axis at x ∝ cot μ1 ∝ ν1^(1/3) and
  drifts like x1/(1 - y) through the fan, so it crosses the last fan line
  at a distance ∝ ν1^(1/6) from the corner; the wall between the corner and
  that crossing is not resolved, and in a round nozzle (unlike a planar one)
  the flow there is not uniform. With equal steps the area ratio converges
  like n^(-1/3) (2.8 % short at n = 100, Mach 2); with ν1 ∝ n^(-4) the
  distance falls like n^(-2/3) and the area ratio converges at first order
  (-4.8e-4 at n = 100, Mach 2, measured; the tests record it).

Root-finding the corner angle: the kernels of several candidate angles are
marched together (one batch: numpy's per-call cost is shared), first on
coarse nets (8 and 16 lines, extrapolated to n at second order, about the
measured order of the corner angle), then seven candidates at n around it.
The root of the residual polynomial through them is the corner angle, and
the kernel there is the Lagrange interpolant of the
seven marched kernels in the angle (the march is smooth in it): its error
(∝ spread⁷) is estimated from the six-point interpolant at run time and must
be below 1e-11 of the node coordinates, else the candidates close in on the
root and the batch is marched again.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..errors import NoSolutionError
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.isentropic import area_ratio as isentropic_area_ratio
from ..relations.isentropic import mach_angle_of
from .fan_nets import band_segments, march_fan_band
from .turning_regions import march_turning_region, trace_wall
from .unit_processes import (
    AXISYMMETRIC_CORRECTORS,
    axis_node_axisymmetric,
    cot_mach_angle_step,
    node_record,
)

__all__ = [
    "FAN_EXPONENT",
    "round_kernel",
    "round_minimum_length_design",
    "sauer_round_field",
    "sauer_round_start_line",
    "sauer_round_discharge_coefficient",
    "round_rounded_throat_design",
]

#: fan lines of a round kernel: ν_a = θ_a = θ_max (a/n)^FAN_EXPONENT (see the module notes)
FAN_EXPONENT = 4
_COARSE_LINES = (8, 16)
_STENCIL = np.arange(-3.0, 4.0)  # seven candidates, in units of the spread
_INTERPOLATION_TOLERANCE = 1e-11
#: candidates 0.25 % apart: they cover ±0.75 %, more than the error of the coarse estimate
#: (0.2 % at Mach 3, n = 100), and the seven-point interpolant's error is ~1e-13 (the
#: five-point one, 1 % apart, was 4e-9 at Mach 3: error ∝ spread^degree)
_FINE_SPREAD = 0.0025


def round_kernel(corner_angle, n, gamma=1.4):
    """Plain core: the kernel band of a round minimum-length nozzle (throat radius 1).

    ``corner_angle`` [rad] may be an array of K candidates (a batch, marched
    together). Returns the band of :func:`~gasdyn2d.characteristics.fan_nets.march_fan_band`.
    """
    fan = np.multiply.outer((np.arange(1, n + 1) / n) ** FAN_EXPONENT,
                            np.asarray(corner_angle, dtype=float))
    return march_fan_band(fan, fan, 0.0, 1.0, boundary="open", n_plus_lines=n, gamma=gamma,
                          geometry="axisymmetric")


def _axis_excess(fractions, n, nu_exit, gamma):
    """ν - ν_exit where the last fan line meets the axis, for corner angles fraction·ν_exit."""
    band = round_kernel(np.asarray(fractions) * nu_exit, n, gamma)
    return band.records[3, n, n] - nu_exit, band


def _scan_root(fractions, excess):
    """Root of a scanned, increasing residual: cubic through the four points around the change."""
    excess = np.where(np.isnan(excess), np.inf, excess)  # failed candidates expanded too far
    above = np.flatnonzero(excess > 0.0)
    if above.size == 0 or above[0] == 0:
        return None
    k = int(np.clip(above[0] - 2, 0, fractions.size - 4))
    xs, ys = fractions[k:k + 4], excess[k:k + 4]
    if not np.all(np.isfinite(ys)):
        xs, ys = fractions[above[0] - 1:above[0] + 1], excess[above[0] - 1:above[0] + 1]
    poly = np.polynomial.Polynomial.fit(xs, ys, xs.size - 1)
    roots = poly.roots()
    roots = roots[np.isreal(roots)].real
    lo, hi = fractions[above[0] - 1], fractions[above[0]]
    inside = roots[(roots >= lo) & (roots <= hi)]
    return float(inside[0]) if inside.size else float(lo - excess[above[0] - 1] * (hi - lo) / (
        excess[above[0]] - excess[above[0] - 1]))


def _stencil_root(centre, spread, n, nu_exit, gamma):
    """March candidates centre·(1 + spread·(-3..3)); the root and the kernel there, or None."""
    u = _STENCIL
    fractions = centre * (1.0 + spread * u)
    excess, band = _axis_excess(fractions, n, nu_exit, gamma)
    if not np.all(np.isfinite(excess)):
        return None, excess, fractions
    edge = float(u[-1])
    poly = np.polynomial.Polynomial.fit(u, excess, u.size - 1, domain=[-edge, edge],
                                        window=[-edge, edge])
    roots = poly.roots()
    roots = roots[np.abs(roots.imag) < 1e-12].real
    if roots.size == 0:
        return None, excess, fractions
    root = float(roots[np.argmin(np.abs(roots))])
    if abs(root) > edge:
        return None, excess, fractions
    weights = _lagrange_weights(u, root)
    # error estimate: the interpolant of the six candidates nearest the root
    keep = np.argsort(np.abs(u - root))[:u.size - 1]
    weights4 = np.zeros_like(weights)
    weights4[keep] = _lagrange_weights(u[keep], root)
    records = band.records
    kernel = records @ weights
    scale = np.nanmax(np.abs(kernel[:4]))
    error = np.nanmax(np.abs(kernel - records @ weights4)[:4]) / scale
    if not error <= _INTERPOLATION_TOLERANCE:
        return None, excess, fractions
    return (centre * (1.0 + spread * root), kernel, band.valid), excess, fractions


def _lagrange_weights(nodes, at):
    weights = np.ones(nodes.size)
    for k in range(nodes.size):
        others = np.delete(nodes, k)
        weights[k] = np.prod((at - others) / (nodes[k] - others))
    return weights


def _corner_angle_estimate(n, nu_exit, gamma):
    """Corner angle (fraction of ν_exit) from coarse nets, and the relative spread to search."""
    n1, n2 = (min(n, c) for c in _COARSE_LINES)
    scan = np.linspace(0.02, 0.5, 25)
    root1 = _scan_root(scan, _axis_excess(scan, n1, nu_exit, gamma)[0])
    if root1 is None:
        raise NoSolutionError(
            "no corner angle up to ν(M_exit)/2 expands the round kernel to M_exit on the axis.")
    if n <= n1:
        return root1, _FINE_SPREAD
    local = root1 * (1.0 + 0.02 * np.linspace(-2.0, 2.0, 9))
    root2 = _scan_root(local, _axis_excess(local, n2, nu_exit, gamma)[0])
    if root2 is None:
        root2 = root1
    if n <= n2:
        return root2, _FINE_SPREAD
    # θ(n) = θ∞ + c/n² (second order, measured), from the two coarse nets
    c = (root1 - root2) / (1.0 / n1**2 - 1.0 / n2**2)
    estimate = root2 + c * (1.0 / n**2 - 1.0 / n2**2)
    return estimate, _FINE_SPREAD


def solve_round_kernel(n, nu_exit, gamma):
    """Corner angle [rad] and kernel records (7, n+1, n+1) of a round minimum-length nozzle."""
    centre, spread = _corner_angle_estimate(n, nu_exit, gamma)
    for _ in range(12):
        found, excess, fractions = _stencil_root(centre, spread, n, nu_exit, gamma)
        if found is not None:
            fraction, records, valid = found
            return fraction * nu_exit, records, valid
        finite = np.isfinite(excess)
        if np.count_nonzero(finite) >= 2 and np.ptp(excess[finite]) > 0:
            slope = np.polyfit(fractions[finite], excess[finite], 1)
            new_centre = -slope[1] / slope[0]
            moved = abs(new_centre / centre - 1.0)
            centre = new_centre
            spread = min(max(0.5 * moved, 0.1 * spread), 0.05)
        else:
            spread *= 0.25
    raise NoSolutionError("the corner angle of the round kernel did not converge.")


@dataclasses.dataclass
class RoundDesign:
    """Plain-core result of a round nozzle design (throat radius 1)."""

    wall: np.ndarray  # (4, k): x, y, θ, ν of the wall from the throat corner to the lip
    corner_angle: float  # wall angle where the design starts: throat corner or arc end [rad]
    net: tuple  # (x, y, θ, ν, plus_segments, minus_segments) of the characteristic net


def round_minimum_length_design(M_exit, n, gamma=1.4):
    """Plain core: the round minimum-length nozzle of ``n`` fan lines (throat radius 1).

    Returns a :class:`RoundDesign`.
    """
    nu_exit = float(prandtl_meyer_angle(M_exit, gamma))
    corner_angle, records, valid = solve_round_kernel(n, nu_exit, gamma)
    line = records[:, np.arange(n + 1), n]  # the last fan line, corner (b = 0) to the axis
    exit_radius = np.sqrt(float(isentropic_area_ratio(M_exit, gamma)))
    exit_length = exit_radius / np.sin(float(mach_angle_of(M_exit)))

    def wall_bound(x):  # the wall rises to its lip, within a few per cent of exit_radius
        return np.full_like(x, 1.25 * exit_radius)

    # C- lines at half the C+ count (at least 48): the area ratio moves by 1e-5 at n = 100
    # (its error, 5e-4, comes from the corner) and the region costs half as much; coarse
    # nets need the 48 (measured)
    n_minus = 48 if n < 48 else (n + 1) // 2
    for _ in range(4):
        region = march_turning_region(line, nu_exit, gamma, exit_length=exit_length,
                                      wall_bound=wall_bound, n_minus_lines=n_minus)
        wall, crossing, reach = trace_wall(region, line[:4, 0])
        if reach <= 1.0:
            break
        exit_length *= 1.5  # the wall left the netted region: net further out
        wall_bound = None
    else:
        raise NoSolutionError("the wall of the round nozzle left its turning region.")
    net = _assemble_net(records, valid, n, region, wall, crossing)
    return RoundDesign(wall, corner_angle, net)


def _assemble_net(records, valid, n, region, wall, crossing):
    """Kernel, turning-region nodes inside the nozzle and wall nodes, with their segments."""
    plus_k, minus_k, keep = band_segments(valid)
    index = np.full(valid.shape, -1, dtype=np.intp)
    index[keep] = np.arange(np.count_nonzero(keep))
    parts = [records[:4, keep]]
    count = parts[0].shape[1]
    plus, minus = [plus_k], [minus_k]
    m = region.records.shape[1] - 1
    # j = 0 of the region: the kernel's last fan line, already in the net
    return _with_turning_region(parts, plus, minus, count, index[np.arange(m + 1), n],
                                region, wall, crossing)


def _with_turning_region(parts, plus, minus, count, first_column, region, wall, crossing):
    """A net's node parts and segment lists completed with the turning region's nodes inside
    the nozzle and the wall nodes; ``first_column`` indexes the region's j = 0 nodes, which
    the net already holds. Returns (x, y, theta, nu, plus, minus)."""
    m = region.records.shape[1] - 1
    region_index = np.full(region.valid.shape, -1, dtype=np.intp)
    region_index[:, 0] = first_column
    for k in range(1, m + 1):
        j = np.arange(1, crossing[k] + 1)
        if j.size:
            region_index[k, j] = count + np.arange(j.size)
            parts.append(region.records[:4, k, j])
            count += j.size
    wall_index = count + np.arange(m)
    parts.append(wall[:, 1:])
    for k in range(1, m + 1):
        line = region_index[k, :crossing[k] + 1]
        line = line[line >= 0]
        plus.append(np.column_stack([line[:-1], line[1:]]))
        plus.append(np.array([[line[-1], wall_index[k - 1]]]))
    upper, lower = region_index[:-1, 1:], region_index[1:, 1:]
    pairs = (upper >= 0) & (lower >= 0)
    minus.append(np.column_stack([upper[pairs], lower[pairs]]))
    x, y, theta, nu = np.concatenate(parts, axis=1)
    return x, y, theta, nu, np.concatenate(plus), np.concatenate(minus)


# --------------------------------------------------------------- round throat start


def sauer_round_field(xi, y, throat_radius, gamma=1.4):
    """Plain core: Sauer's axisymmetric transonic field (u/a* - 1, v/a*) at (ξ, y), throat radius 1.

    Notes
    -----
    The transonic small-disturbance equation (γ+1) u' ∂u'/∂ξ = ∂v/∂y + δ v/y
    with ∂u'/∂y = ∂v/∂ξ (irrotational) has, for δ = 1 (axisymmetric),

        u' = αξ + (γ+1)α²y²/4,   v = (γ+1)α²ξy/2 + (γ+1)²α³y³/16,
        α = √(2/((γ+1)R)),

    R the wall's radius of curvature at the throat in throat radii (the wall
    streamline y = 1 has curvature 2·(γ+1)α²/4 = 1/R there). ξ = 0 is the sonic
    point of the axis; the wall is narrowest at ξ = -(γ+1)α/8, the sonic line
    is ξ = -(γ+1)αy²/4. The planar field (δ = 0) is in
    :func:`~gasdyn2d.characteristics.nozzles.sauer_start_line`.

    References
    ----------
    Sauer, R. (1947), NACA TM 1147 (number from memory); the δ-form as in
    Zucrow & Hoffman (1977), *Gas Dynamics* Vol. 2, ch. 15 (from memory);
    re-derived here from the transonic small-disturbance equation.
    """
    k = gamma + 1.0
    alpha = np.sqrt(2.0 / (k * throat_radius))
    u = alpha * xi + 0.25 * k * alpha**2 * y * y
    v = 0.5 * k * alpha**2 * xi * y + k * k * alpha**3 * y**3 / 16.0
    return u, v, alpha


def _sauer_mach_and_angle(u, v, gamma):
    q2 = (1.0 + u) ** 2 + v * v  # (q/a*)²
    mach = np.sqrt(2.0 * q2 / ((gamma + 1.0) - (gamma - 1.0) * q2))
    return mach, np.arctan2(v, 1.0 + u)


def sauer_round_start_line(throat_radius, n_points, gamma=1.4, axis_excess=0.02):
    """Plain core: x, y, θ, ν [rad] on a straight start line just past a round rounded throat.

    Throat radius 1 at x = 0 (the narrowest section), wall radius of curvature
    ``throat_radius``; the line stands where u/a* - 1 = ``axis_excess`` on the
    axis (as the planar start, :func:`~gasdyn2d.characteristics.nozzles.sauer_start_line`).
    """
    k = gamma + 1.0
    alpha = np.sqrt(2.0 / (k * throat_radius))
    xi0 = axis_excess / alpha
    x_line = xi0 + k * alpha / 8.0  # the narrowest section is at ξ = -(γ+1)α/8
    y_wall = 1.0 + throat_radius - np.sqrt(throat_radius**2 - x_line * x_line)
    y = np.linspace(0.0, y_wall, n_points)
    u, v, _ = sauer_round_field(xi0, y, throat_radius, gamma)
    mach, theta = _sauer_mach_and_angle(u, v, gamma)
    theta[-1] = np.arcsin(x_line / throat_radius)  # the wall's own angle at the last node
    return np.full(n_points, x_line), y, theta, prandtl_meyer_angle(mach, gamma)


def sauer_round_discharge_coefficient(throat_radius, gamma=1.4, n_points=2001):
    """Plain core: mass flow of Sauer's round throat over ρ*a*·π r*² (R in throat radii).

    Integrates ρu/(ρ*a*) · 2y dy across the narrowest section (trapezoidal rule).
    For large R it tends to 1 - (γ+1)/(96R²): at the throat
    u' = (2y² - 1)/(4R) and ρq/(ρ*a*) ≈ 1 - (γ+1)u'²/2, whose mean over the
    disc, ∫(2y² - 1)² 2y dy = 1/3, gives (γ+1)/(96R²) (derived here).

    Examples
    --------
    >>> from gasdyn2d.characteristics.round_nozzles import sauer_round_discharge_coefficient
    >>> round(sauer_round_discharge_coefficient(5.0), 6)
    0.998976
    """
    k = gamma + 1.0
    alpha = np.sqrt(2.0 / (k * throat_radius))
    y = np.linspace(0.0, 1.0, n_points)
    u, v, _ = sauer_round_field(-k * alpha / 8.0, y, throat_radius, gamma)
    mach, theta = _sauer_mach_and_angle(u, v, gamma)
    flux = np.cos(theta) / isentropic_area_ratio(mach, gamma) * 2.0 * y
    return float(np.sum(0.5 * (flux[1:] + flux[:-1]) * np.diff(y)))


# ------------------------------------------------------------ round rounded throat


def round_rounded_throat_design(M_exit, throat_radius, n_points, gamma=1.4):
    """Plain core: the round nozzle with a circular-arc throat of radius R (throat radius 1).

    Returns (RoundDesign, arc end x, arc end angle [rad], discharge coefficient).

    Notes
    -----
    The kernel is marched in rows from Sauer's round start line
    (:func:`sauer_round_start_line`) along the axis and the throat arc. The
    arc ends at A where the C- from A reaches the axis exactly at ν(M_exit):
    the C- is built from A through the kernel's C+ lines (at each crossing
    the C+ line's invariant θ - ν interpolated along its segment, the C-
    invariant θ + ν carried with the source term), and A is found by Brent's
    method along the arc. The flow between that C- and the exit
    characteristic is marched and the wall traced through it as in the round
    minimum-length nozzle.
    """
    from scipy.optimize import brentq

    from .channels import march_rows
    from .unit_processes import WallContour

    nu_exit = float(prandtl_meyer_angle(M_exit, gamma))
    discharge = sauer_round_discharge_coefficient(throat_radius, gamma)
    x0, y0, th0, nu0 = sauer_round_start_line(throat_radius, n_points, gamma)
    too_low = (f"M_exit = {M_exit:g} is too low for a round throat of radius {throat_radius:g} "
               "throat radii: the C- from the start of the arc already reaches ν(M_exit) on the "
               "axis. Use a larger throat_radius (or minimum_length_nozzle).")
    if not th0[-1] < 0.5 * nu_exit:  # the arc would have to end before the start line
        raise NoSolutionError(too_low)
    arc = WallContour.bend(1.0, 0.0, 0.5 * nu_exit, throat_radius)

    def past_exit_state(row):
        return row.lower_on_wall and row.nu[0] > nu_exit and row.theta[-1] + row.nu[-1] > nu_exit

    nodes, _, reason, fold = march_rows(x0, y0, th0, nu0, None, arc, gamma, past_exit_state,
                                        geometry="axisymmetric")
    axis_nu = nodes.records()[3][nodes.records()[1] == 0.0]
    # a fold downstream of the axis point E (where ν reaches ν_exit) is outside the design
    if reason != "length" and not np.max(axis_nu) > nu_exit:
        raise NoSolutionError(
            f"the kernel of the round rounded throat folded ({reason}) at x = {fold[0]:.6g}, "
            f"y = {fold[1]:.6g} throat radii before reaching M_exit on the axis; try a larger "
            "throat_radius or more n_points.")
    kernel = _RoundKernel(nodes)
    upper = kernel.upper
    # the C- from each wall node reaches the axis above or below ν_exit: bracket, then refine
    if not kernel.minus_line_from_wall(1, arc, nu_exit, gamma)[1] < 0.0:
        raise NoSolutionError(too_low)
    lo, hi = 1, upper.size - 1
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if kernel.minus_line_from_wall(mid, arc, nu_exit, gamma)[1] < 0.0:
            lo = mid
        else:
            hi = mid
    x_lo, x_hi = kernel.x[upper[lo]], kernel.x[upper[hi]]
    x_a = brentq(lambda x: kernel.minus_line_from_arc(x, arc, nu_exit, gamma)[1], x_lo, x_hi,
                 xtol=1e-12, rtol=1e-12)
    line, _ = kernel.minus_line_from_arc(x_a, arc, nu_exit, gamma)
    exit_radius = np.sqrt(float(isentropic_area_ratio(M_exit, gamma)) * discharge)
    exit_length = exit_radius / np.sin(float(mach_angle_of(M_exit)))
    region = wall = crossing = None
    for _ in range(4):
        region = march_turning_region(line, nu_exit, gamma, exit_length=exit_length)
        wall, crossing, reach = trace_wall(region, line[:4, 0])
        if reach <= 1.0:
            break
        exit_length *= 1.5
    else:
        raise NoSolutionError("the wall of the round nozzle left its turning region.")
    keep_wall = kernel.x[upper] < x_a
    arc_wall = np.array([kernel.x[upper][keep_wall], kernel.y[upper][keep_wall],
                         kernel.theta[upper][keep_wall], kernel.nu[upper][keep_wall]])
    full_wall = np.concatenate([np.array([[0.0], [1.0], [0.0], [np.nan]]), arc_wall, wall],
                               axis=1)
    net = kernel.net_with(line, region, wall, crossing)
    design = RoundDesign(full_wall, float(wall[2, 0]), net)
    return design, x_a, float(line[2, 0]), discharge


class _RoundKernel:
    """The kernel of a round rounded throat: node records and its C+ lines as polylines."""

    def __init__(self, nodes):
        self.records = nodes.records()
        self.x, self.y, self.theta, self.nu = self.records[:4]
        self.upper = np.array(nodes.upper)
        plus = np.concatenate(nodes.plus)
        self.minus = np.concatenate(nodes.minus)
        self.plus = plus
        self.start, self.end = plus[:, 0], plus[:, 1]
        line_id = np.arange(self.x.size)
        for block in nodes.plus:  # blocks in marching order: predecessors come first
            line_id[block[:, 1]] = line_id[block[:, 0]]
        self.segment_line = line_id[self.start]
        # segments sorted by their upstream end, for a windowed search ahead of a point
        x_lo = np.minimum(self.x[self.start], self.x[self.end])
        self.by_x = np.argsort(x_lo)
        self.sorted_lo = x_lo[self.by_x]
        self.x_hi = np.maximum(self.x[self.start], self.x[self.end])
        self.window = 4.0 * float(np.max(self.x_hi - x_lo))
        axis = np.flatnonzero(self.y == 0.0)
        self.axis_x, self.axis_slope = self.x[axis], self.records[6, axis]

    def minus_line_from_wall(self, k, arc, nu_exit, gamma):
        return self.minus_line_from_arc(self.x[self.upper[k]], arc, nu_exit, gamma)

    def minus_line_from_arc(self, x_a, arc, nu_exit, gamma):
        """Records (7, m + 1) of the C- from the arc at ``x_a`` to the axis, and ν - ν_exit."""
        upper = self.upper
        k = int(np.clip(np.searchsorted(self.x[upper], x_a), 1, upper.size - 1))
        i, j = upper[k - 1], upper[k]
        w = (x_a - self.x[i]) / (self.x[j] - self.x[i])
        k_plus = (self.theta[i] - self.nu[i]) + w * ((self.theta[j] - self.nu[j])
                                                     - (self.theta[i] - self.nu[i]))
        theta_a = float(np.arctan(arc.slope(x_a)))
        point = node_record(x_a, float(arc.height(x_a)), theta_a, theta_a - k_plus, gamma)
        line = [np.array(point, dtype=float)]
        crossed = -1
        for _ in range(self.x.size):
            step = self._next_crossing(line[-1], crossed, gamma)
            if step is None:
                break
            node, crossed = step
            line.append(node)
        line.append(self._axis_node(line[-1], gamma))
        line = np.array(line).T
        if line[0, -1] > self.axis_x[-1]:
            # the C- left the kernel downstream: it meets the axis beyond E (ν > ν_exit there)
            return line, np.inf
        return line, float(line[3, -1] - nu_exit)

    def _next_crossing(self, point, crossed, gamma):
        """The node where the C- from ``point`` next crosses a kernel C+ line, or None (axis)."""
        x_p, y_p, th_p, nu_p, z_p, mu_p, s_p = point
        direction = th_p - mu_p
        window = self.by_x[:np.searchsorted(self.sorted_lo, x_p + self.window)]
        window = window[(self.x_hi[window] >= x_p) & (self.segment_line[window] != crossed)]
        usable = np.zeros(self.start.size, dtype=bool)
        usable[window] = True
        node = None
        for _ in range(1 + AXISYMMETRIC_CORRECTORS):
            hit = _ray_meets_segments(x_p, y_p, direction, self.x[self.start[usable]],
                                      self.y[self.start[usable]], self.x[self.end[usable]],
                                      self.y[self.end[usable]])
            if hit is None:
                return None
            x3, y3, t, r, index = hit
            seg = np.flatnonzero(usable)[index]
            a, b = self.start[seg], self.end[seg]
            k_plus = (self.theta[a] - self.nu[a]) + r * ((self.theta[b] - self.nu[b])
                                                         - (self.theta[a] - self.nu[a]))
            th_guess = node[2] if node is not None else 0.5 * (self.theta[a] + self.theta[b])
            mu_guess = node[5] if node is not None else 0.5 * (self.records[5, a]
                                                               + self.records[5, b])
            mean = 0.5 * (th_p + th_guess)
            source = np.sin(mean) * np.sin(0.5 * (mu_p + mu_guess)) / (0.5 * (y_p + y3))
            k_minus = (th_p + nu_p) + source * t  # dK-/ds = +Q along the C-
            theta3, nu3 = 0.5 * (k_minus + k_plus), 0.5 * (k_minus - k_plus)
            z3 = node[4] if node is not None else 0.5 * (self.records[4, a] + self.records[4, b])
            for _ in range(3):
                z3 = float(cot_mach_angle_step(z3, nu3, gamma))
            node = np.array([x3, y3, theta3, nu3, z3, np.arctan2(1.0, z3), np.sin(theta3) / y3])
            direction = 0.5 * ((th_p - mu_p) + (node[2] - node[5]))
        return node, self.segment_line[seg]

    def _axis_node(self, point, gamma):
        """The axis node of the C- from ``point`` (∂θ/∂y interpolated from the kernel's axis)."""
        x_guess = point[0] + point[1] / np.tan(point[5] - point[2])
        slope = float(np.interp(x_guess, self.axis_x, self.axis_slope))
        node, _ = axis_node_axisymmetric(tuple(point), slope, gamma)
        return np.array(node, dtype=float)

    def net_with(self, line, region, wall, crossing):
        """Kernel nodes upstream of the last C-, that line, the turning region and the wall."""
        # keep kernel nodes left of the last C- (a line from the arc down to the axis)
        order = np.argsort(line[1])
        x_line = np.interp(self.y, line[1][order], line[0][order])
        keep = self.x < x_line - 1e-12
        index = np.full(self.x.size, -1, dtype=np.intp)
        index[keep] = np.arange(np.count_nonzero(keep))
        parts = [self.records[:4, keep]]
        count = parts[0].shape[1]
        plus = [index[self.plus][np.all(index[self.plus] >= 0, axis=1)]]
        minus = [index[self.minus][np.all(index[self.minus] >= 0, axis=1)]]
        m = line.shape[1] - 1
        line_index = count + np.arange(m + 1)
        parts.append(line[:4])
        count += m + 1
        minus.append(np.column_stack([line_index[:-1], line_index[1:]]))
        return _with_turning_region(parts, plus, minus, count, line_index, region, wall, crossing)


def _ray_meets_segments(x0, y0, direction, xa, ya, xb, yb):
    """First crossing (t > 0) of a ray with the segments a→b: (x, y, t, r, index), or None."""
    c, s = np.cos(direction), np.sin(direction)
    ex, ey = xb - xa, yb - ya
    with np.errstate(divide="ignore", invalid="ignore"):
        det = ex * s - ey * c
        t = (ex * (ya - y0) - ey * (xa - x0)) / det
        r = (c * (ya - y0) - s * (xa - x0)) / det
    hit = (r >= 0) & (r <= 1) & (t > 1e-12)
    if not np.any(hit):
        return None
    k = np.flatnonzero(hit)[np.argmin(t[hit])]
    return float(x0 + t[k] * c), float(y0 + t[k] * s), float(t[k]), float(r[k]), int(k)
