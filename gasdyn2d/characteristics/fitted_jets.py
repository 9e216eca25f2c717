"""Shock-fitted march of a jet, planar or round: the constant-pressure boundary as a zone
boundary.

Plain core of :func:`gasdyn2d.characteristics.jets.underexpanded_slot_jet` and
:func:`~gasdyn2d.characteristics.jets.overexpanded_slot_jet` (planar): the march of
:mod:`gasdyn2d.characteristics.fitted_shocks` with the centreline as its lower wall and,
as its upper boundary, a :class:`FreeBoundary`: a streamline on which the pressure is the
ambient one. Lengths are in slot half-heights b (the lip at (0, 1)); pressures over the
exit stagnation pressure.

Method
------
The boundary node takes the ambient pressure; the C+ arriving from the jet gives its
direction (θ - ν constant along it, ν at the mean stagnation pressure of its ends: exact
where the flow is homentropic, so a strong fan centred at the boundary turns in one step;
:meth:`FreeBoundary.turn_to_ambient`), and the boundary moves along the mean of its old
and new directions.

- Under-expanded: the march starts at x0 = b√(Me² - 1), where the head of the lip fan
  reaches the centreline, from the exact centred simple wave (each node's flow angle
  solves y = b + x0 tan(θ - μ(ν_e + θ))).
- Over-expanded: the lip shock (family -1) brings the exit flow to ambient pressure:
  Mn1² = 1 + (γ + 1)(pa/pe - 1)/(2γ) (NACA Report 1135, eq. 128) and the deflection from
  θ-β-M; the march starts at the lip.
- Compressions: the first shock of an under-expanded jet starts where the characteristic
  net (which resolves the convergence of the reflected compression better than this
  march) first folds (``first_fold``; :func:`start_shock_near`). Later ones are inserted
  between two neighbouring nodes inside a zone where their characteristics of one family
  would cross within :data:`FOLD_STEPS` marching steps (:func:`insert_at_folds`): the
  march's interpolation keeps a steepening compression a few nodes wide, so
  characteristics never cross exactly; four steps catches strong compressions while
  leaving gentle ones as waves. Shocks of one family that meet merge.
- A shock reaching the centreline of a planar jet reflects regularly
  (:func:`~gasdyn2d.characteristics.fitted_events.reflect_from_wall`); where only a Mach
  reflection exists (in a round jet, after the shock has strengthened converging on the
  axis, or where it turns the flow behind it subsonic within two spacings of the axis),
  or where a shock in the inner half of the jet grows so strong that the flow behind it
  would be subsonic, the march stops (``"mach_disc"``: the Mach disc and the subsonic
  core behind it are not modelled). A shock that does so in the outer half (a lip shock
  near detachment) stops it with ``"sonic"``.
- Round jets (``geometry="axisymmetric"``): the compatibility relations carry the
  axisymmetric source term; an under-expanded round jet starts at the lip, its lip fan
  captured by the march (first order there: the first cell end moves by 0.24 % from
  n = 41 to 81 at pe/pa = 1.02).
- A shock reaching the boundary ends there; the boundary node takes the ambient pressure
  on the next step, so the fan it reflects (centred at the point) is captured by the
  march, not fitted: first order there.
- Cells: the boundary is narrowest where its angle turns from inward to outward; each such
  point ends a cell (for an under-expanded jet the lip begins the first). The march stops
  once the cells asked for are complete (``"cells"``).

References
----------
Zucrow, M. J. and Hoffman, J. D., 1977, *Gas Dynamics*, vol. 2, Wiley, ch. 16 (inverse
marching with fitted shocks and free boundaries; chapter from memory).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from ..relations.isentropic import mach_from_pressure_ratio, pressure_ratio
from ..relations.normal_shock_inverses import mach_from_pressure_jump
from ..relations.oblique_shocks import oblique_shock_ratios
from ..relations.prandtl_meyer_function import mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from ..relations.theta_beta_mach import sonic_angles
from .fitted_events import (Interface, Station, cfl_step, flow_properties, wave_angle_of_jump,
                            zone_layout, zone_node_count)
from .fitted_shocks import FittedMarch, march_fitted_channel
from .walls import WallContour

__all__ = ["FreeBoundary", "JetMarch", "march_fitted_jet", "insert_at_folds", "start_shock_near",
           "FOLD_STEPS"]

#: a shock is inserted where neighbouring characteristics of one family would cross within
#: this many marching steps
FOLD_STEPS = 4.0



class JetMarch(NamedTuple):
    """Plain-core result of :func:`march_fitted_jet` (lengths in slot half-heights)."""

    march: FittedMarch  #: the stations, shocks and stop reason ("cells" when complete)
    narrowest_x: np.ndarray  #: where the boundary is narrowest (cell ends), lip excluded
    widest_x: np.ndarray  #: where the boundary is widest
    widest_y: np.ndarray  #: its half-width there
    lip_turn: float  #: the boundary's turn at the lip [rad], > 0 outward


class FreeBoundary:
    """A jet's constant-pressure boundary as the upper boundary of a fitted march.

    Known up to the last station marched, straight beyond it (``height``, ``slope``);
    it follows the march (:meth:`follow`, which also starts the shocks: where the
    characteristic net first folds, and where the march's characteristics are about to
    fold), ends the shocks that reach it (:meth:`end_shock`), and records where it is
    narrowest and widest.
    """

    is_free = True
    corners_x = ()

    def __init__(self, log_pressure, station, cells, first_fold=None):
        self.log_pressure = log_pressure
        self.first_fold = first_fold  # (x, y) where the first shock forms, or None
        self.cells = cells
        self.x, self.y, self.theta = station.x, float(station.y[-1]), float(station.th[-1])
        self.corner = False  # a shock ended here on the last station: the next step turns
        self.hits = []
        self.narrowest, self.widest, self.widest_y = [], [], []

    def height(self, x):
        return self.y + (np.asarray(x, dtype=float) - self.x) * math.tan(self.theta)

    def slope(self, x):
        return np.full(np.shape(x), math.tan(self.theta)) if np.ndim(x) else math.tan(self.theta)

    def position(self, dx, theta_new):
        """Height of the boundary a step dx on, moving along the mean direction (along the
        new one from a corner, where a shock ended)."""
        direction = theta_new if self.corner else 0.5 * (self.theta + theta_new)
        return self.y + dx * math.tan(direction)

    def turn_to_ambient(self, lp_foot, lp0_foot, lp0_node, gamma):
        """Turn of the flow [rad] along a C+ from a foot at ln p to the boundary's ambient
        pressure: θ - ν is constant on a C+ (Prandtl–Meyer, exact where the flow is
        homentropic, so a strong fan centred at the boundary is turned in one step without
        the error of the averaged coefficient); ν at the mean stagnation pressure of the two
        ends."""
        lp0 = 0.5 * (lp0_foot + lp0_node)
        mach = flow_properties(np.array([lp_foot, self.log_pressure]), lp0, gamma)[0]
        nu = prandtl_meyer_angle(mach, gamma)
        return float(nu[1] - nu[0])

    def end_shock(self, station, k, finished):
        """A shock (the last interface, family +1) ends on the boundary: the zone ahead of it
        has closed; the node behind it becomes the boundary node."""
        shocks = list(station.shocks)
        incident = shocks.pop(k)
        incident.end = "free boundary"
        finished.append(incident)
        _, _, _, stop = zone_layout(station.counts)
        keep = np.arange(station.y.size) <= stop[k]
        arrays = [v[keep] for v in (station.y, station.lp, station.th, station.lp0)]
        self.hits.append(station.x)
        return Station(station.x, station.counts[:k + 1].copy(), *arrays, shocks), "ok"

    def follow(self, station, n, gamma):
        """Take the station's boundary node as the boundary's latest point; record a narrowest
        or widest point passed; insert a shock where the first one forms, or where the
        characteristics are about to fold."""
        x, y, theta = station.x, float(station.y[-1]), float(station.th[-1])
        hit_here = bool(self.hits) and self.hits[-1] == x
        if self.theta <= 0.0 < theta and self.x > 0.0:  # turned outward: narrowest
            self.narrowest.append(self.x if self.hits and self.hits[-1] == self.x else
                                  _zero_crossing(self.x, x, self.theta, theta))
        elif self.theta > 0.0 >= theta:
            w = self.theta / (self.theta - theta)
            self.widest.append(self.x + w * (x - self.x))
            self.widest_y.append(self.y + w * (y - self.y))
        self.x, self.y, self.theta, self.corner = x, y, theta, hit_here
        if self.first_fold is not None and x >= self.first_fold[0]:
            y_fold, self.first_fold = self.first_fold[1], None
            return start_shock_near(station, y_fold, n, gamma)
        return insert_at_folds(station, n, gamma)

    def cells_done(self):
        return len(self.narrowest) >= self.cells


def insert_at_folds(station, n, gamma):
    """Insert a shock where two neighbouring characteristics of one family, inside a zone,
    would cross within :data:`FOLD_STEPS` steps (the net is about to fold): between those
    two nodes, with the lower node's state on one side and the upper's on the other.

    Each zone split this way is resampled with evenly spaced nodes (linear interpolation,
    the jump kept sharp). The pressure ratio of the new shock is that of the two states;
    the shock point of the next step makes it consistent with the oblique-shock relations.
    """
    mach, mu, _ = flow_properties(station.lp, station.lp0, gamma)
    reach = FOLD_STEPS * cfl_step(station.th, mu, float(station.y[-1] - station.y[0]) / (n - 1))
    for family in (-1, 1):
        slope = np.tan(station.th + family * mu)
        gap = np.diff(station.y)
        closing = slope[:-1] - slope[1:]
        # pairs inside a zone, neither node on its edge: a compression reaching a shock or
        # a boundary is taken up there (by the shock point, or reflected)
        inside = (station.zone[:-1] == station.zone[1:]) & (station.eta[:-1] > 0.0) \
            & (station.eta[1:] < 1.0)
        folds = np.flatnonzero(inside & (closing > 0.0) & (gap < closing * reach))
        if folds.size:
            return _split_zone(station, int(folds[0]), family, mach, gamma, n)
    return station


def start_shock_near(station, y, n, gamma):
    """Insert a shock near height ``y``: between the two neighbouring nodes (within three
    of ``y``, in one zone) whose characteristics of one family would cross soonest, of that
    family. Used where the characteristic net, which resolves the convergence of a
    compression better than the march, says the first shock forms."""
    mach, mu, _ = flow_properties(station.lp, station.lp0, gamma)
    k = int(np.clip(np.searchsorted(station.y, y) - 1, 0, station.y.size - 2))
    pairs = np.arange(max(k - 3, 0), min(k + 4, station.y.size - 1))
    pairs = pairs[(station.zone[pairs] == station.zone[pairs + 1])
                  & (station.y[pairs + 1] > station.y[pairs])]  # not in a collapsed zone
    best = (math.inf, 0, 0)
    for family in (-1, 1):
        slope = np.tan(station.th + family * mu)
        closing = slope[pairs] - slope[pairs + 1]
        with np.errstate(divide="ignore", invalid="ignore"):
            reach = np.where(closing > 0.0, np.diff(station.y)[pairs] / closing, np.inf)
        if reach.size and float(np.min(reach)) < best[0]:
            best = (float(np.min(reach)), family, int(pairs[np.argmin(reach)]))
    if not math.isfinite(best[0]):  # nothing converges there (a coarse mesh): no shock yet
        return insert_at_folds(station, n, gamma)
    return _split_zone(station, best[2], best[1], mach, gamma, n)


def _split_zone(station, j, family, mach, gamma, n):
    """The station with a shock of ``family`` inserted between nodes j and j + 1."""
    z = int(station.zone[j])
    first, last = int(station.start[z]), int(station.stop[z])
    y_s = 0.5 * (station.y[j] + station.y[j + 1])
    ahead, behind = (j, j + 1) if family < 0 else (j + 1, j)
    ratio = max(float(np.exp(station.lp[behind] - station.lp[ahead])), 1.0)
    beta = float(wave_angle_of_jump(float(mach[ahead]), ratio, gamma))
    shock = Interface(family, station.x, y_s, float(station.th[ahead]) + family * beta, beta,
                      ratio)
    values = (station.lp, station.th, station.lp0)
    h = float(station.y[-1] - station.y[0]) / (n - 1)
    pieces = []
    for lo, hi, known in ((station.y[first], y_s, np.arange(first, j + 1)),
                          (y_s, station.y[last], np.arange(j + 1, last + 1))):
        count = int(zone_node_count(hi - lo, h))
        y_new = np.linspace(lo, hi, count)
        y_known = station.y[known]
        y_known = np.concatenate([[lo], y_known]) if known[0] > j else \
            np.concatenate([y_known, [hi]])
        edge = j + 1 if known[0] > j else j  # the state carried to the shock's side
        parts = [y_new]
        for v in values:
            v_known = np.concatenate([[v[edge]], v[known]]) if known[0] > j else \
                np.concatenate([v[known], [v[edge]]])
            parts.append(np.interp(y_new, y_known, v_known))
        pieces.append((count, parts))
    head = np.arange(station.y.size) < first
    tail = np.arange(station.y.size) > last
    arrays = [np.concatenate([a[head], pieces[0][1][k], pieces[1][1][k], a[tail]])
              for k, a in enumerate((station.y,) + values)]
    counts = np.concatenate([station.counts[:z], [pieces[0][0], pieces[1][0]],
                             station.counts[z + 1:]])
    shocks = list(station.shocks[:z]) + [shock] + list(station.shocks[z:])
    return Station(station.x, counts, *arrays, shocks)


def _zero_crossing(x0, x1, f0, f1):
    return x0 + f0 / (f0 - f1) * (x1 - x0)


def march_fitted_jet(M_exit, p_exit_p_ambient, gamma, n, n_cells, geometry="planar",
                     first_fold=None):
    """Plain core: march the upper half of a planar jet from a slot, with fitted shocks.

    Parameters
    ----------
    M_exit : float
        Uniform, parallel exit Mach number (> 1).
    p_exit_p_ambient : float
        Exit-to-ambient pressure ratio: > 1 under-expanded, < 1 over-expanded.
    gamma : float
        Ratio of specific heats.
    n : int
        Nodes across the slot half-height (the target spacing is the local half-width
        over n - 1).
    n_cells : int
        Cells to march (each ends where the boundary is narrowest).
    geometry : {"planar", "axisymmetric"}, optional
        A slot jet (default) or a round jet (lengths in exit radii); a round
        under-expanded jet starts at the lip, its lip fan captured by the march.
    first_fold : tuple, optional
        (x, y) where the first shock forms, from the characteristic net
        (:func:`~gasdyn2d.characteristics.jets.underexpanded_slot_jet`'s ``shock_x``,
        ``shock_y`` in slot half-heights): a shock is started there
        (:func:`start_shock_near`).

    Returns
    -------
    JetMarch

    Examples
    --------
    >>> from gasdyn2d.characteristics.fitted_jets import march_fitted_jet
    >>> jet = march_fitted_jet(2.0, 0.8, 1.4, 41, 1)   # over-expanded: a lip shock
    >>> jet.march.reason, [(shock[0], shock[-1]) for shock in jet.march.shocks]
    ('cells', [(-1, 'wall'), (1, 'free boundary')])
    """
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        return _march_jet(M_exit, p_exit_p_ambient, gamma, n, n_cells, geometry, first_fold)


def _march_jet(M, ratio, gamma, n, n_cells, geometry, first_fold):
    p_exit = float(pressure_ratio(M, gamma))
    log_ambient = math.log(p_exit / ratio)
    axis = WallContour.straight(0.0)
    if ratio > 1.0:
        start, turn = _lip_fan_station(M, ratio, gamma, n, p_exit)
        cells = n_cells
        if geometry == "axisymmetric":  # no simple wave: the lip fan is captured from x = 0
            y = np.linspace(0.0, 1.0, n)
            start = Station(0.0, [n], y, np.full(n, math.log(p_exit)), np.zeros(n),
                            np.zeros(n), [])
    else:
        start, turn = _lip_shock_station(M, ratio, gamma, n, p_exit)
        cells = n_cells + 1  # the first narrowest point lies inside the first cell
        if start is None:  # the lip shock cannot turn the flow to ambient pressure
            march = FittedMarch(np.array([0.0]), [], [], [], [], [], [], "sonic", (0.0, 1.0))
            return JetMarch(march, np.empty(0), np.empty(0), np.empty(0), math.nan)
    boundary = FreeBoundary(log_ambient, start, cells, first_fold)
    beta = math.sqrt((M - 1.0) * (M + 1.0))
    cap = 8.0 * (n_cells + 1) * beta * max(ratio, 1.0 / ratio)  # well past the cells asked
    march = march_fitted_channel(M, gamma, axis, boundary, cap, n, start=start,
                                 geometry=geometry)
    near_centre = march.stop_position[1] < 0.5 * boundary.y
    if march.reason == "mach_reflection" or (march.reason == "sonic" and near_centre):
        # on the centreline, or a shock near it that can no longer leave supersonic flow
        # behind it: where the Mach disc stands
        shocks = [shock[:-1] + ("mach_disc" if shock[-1] == march.reason else shock[-1],)
                  for shock in march.shocks]
        march = march._replace(reason="mach_disc", shocks=shocks)
    return JetMarch(march, np.array(boundary.narrowest), np.array(boundary.widest),
                    np.array(boundary.widest_y), turn)


def _lip_fan_station(M, ratio, gamma, n, p_exit):
    """The first station of an under-expanded jet: x0 = √(Me² - 1), where the lip fan's
    head meets the centreline; the exact centred simple wave across it."""
    nu_exit = float(prandtl_meyer_angle(M, gamma))
    M_jet = float(mach_from_pressure_ratio(p_exit / ratio, gamma))
    turn = float(prandtl_meyer_angle(M_jet, gamma)) - nu_exit
    x0 = math.sqrt((M - 1.0) * (M + 1.0))
    y_top = 1.0 + x0 * math.tan(turn)
    y = np.linspace(0.0, y_top, n)
    target = (y - 1.0) / x0  # tan(θ - μ) of the fan ray through each node

    def ray_slope(theta):
        mach = mach_from_prandtl_meyer_angle(nu_exit + theta, gamma)
        return np.tan(theta - np.arcsin(1.0 / mach))

    low, high = np.zeros(n), np.full(n, turn)
    for _ in range(60):  # bisection: the ray slope rises with θ
        middle = 0.5 * (low + high)
        rising = ray_slope(middle) < target
        low, high = np.where(rising, middle, low), np.where(rising, high, middle)
    theta = np.clip(0.5 * (low + high), 0.0, turn)
    theta[target >= float(ray_slope(np.array(turn)))] = turn  # above the fan's tail
    theta[0] = 0.0  # the head's foot on the centreline
    mach = mach_from_prandtl_meyer_angle(nu_exit + theta, gamma)
    lp = np.log(pressure_ratio(mach, gamma))
    return Station(x0, [n], y, lp, theta, np.zeros(n), []), turn


def _lip_shock_station(M, ratio, gamma, n, p_exit):
    """The first station of an over-expanded jet: the exit flow at the lip, with the lip
    shock (family -1) that brings it to ambient pressure; None if that shock has no
    supersonic flow behind it."""
    rise = 1.0 / ratio
    mn = float(mach_from_pressure_jump(rise, gamma))  # NACA Report 1135, eq. 93 inverted
    beta = float(wave_angle_of_jump(M, rise, gamma))
    if mn >= M or beta >= float(sonic_angles(M, gamma)[1]):
        return None, math.nan
    after = oblique_shock_ratios(M, beta, gamma)
    turn = float(after.deflection)
    y = np.linspace(0.0, 1.0, n)
    lp = np.full(n, math.log(p_exit))
    shock = Interface(-1, 0.0, 1.0, -beta, beta, float(after.p2_p1))
    behind = (1.0, math.log(p_exit * float(after.p2_p1)), -turn, math.log(float(after.p02_p01)))
    arrays = [np.concatenate([part, np.full(2, value)])
              for part, value in zip((y, lp, np.zeros(n), np.zeros(n)), behind)]
    return Station(0.0, [n, 2], *arrays, [shock]), -turn
