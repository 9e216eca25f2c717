"""Events of a fitted channel march: shocks starting, reflecting, crossing, refracting.

Plain-core internals of :mod:`gasdyn2d.characteristics.fitted_shocks` (the march
itself is there): the station and interface records, the flow properties on a
streamline, and the events that change a station's zones:

- :func:`insert_shocks`: a shock starts where a compressive stretch of a wall begins;
- :func:`reflect_from_wall`: regular reflection of a shock from a wall (or the reason
  it has none: a Mach reflection);
- :func:`cross_shocks`: two shocks of opposite families cross; transmitted shocks and a
  slip line, with pressure and direction matched across it (oblique-shock relations,
  weak branch; the region graph of :func:`gasdyn2d.patterns.interactions.shock_crossing`);
- :func:`refract_through_slip_line`: a shock passes through a slip line;
- :func:`merge_shocks`: a shock overtakes another of its family; they go on as one.

References: oblique-shock relations, NACA Report 1135 (Ames Research Staff, 1953), eqs.
128-132, 138 and 168 (detachment); shock crossings, Ben-Dor (2007), *Shock Wave
Reflection Phenomena*, ch. 3.
"""

from __future__ import annotations

import math

import numpy as np

from ..relations.normal_shock_inverses import mach_from_pressure_jump
from ..relations.oblique_shocks import oblique_shock_ratios
from ..relations.theta_beta_mach import (
    detachment_angles,
    sonic_angles,
    wave_angle_from_deflection,
)

__all__ = ["Station", "Interface", "zone_layout", "flow_properties", "insert_shocks",
           "reflect_from_wall", "cross_shocks", "refract_through_slip_line", "merge_shocks",
           "CFL_NUMBER", "cfl_step", "zone_node_count", "wave_angle_of_jump"]

CFL_NUMBER = 1.0  #: feet of C± about one target spacing from the node


class Interface:
    """A fitted shock (or slip line, family 0) being marched: its current position and
    direction, and its path."""

    def __init__(self, family, x, y, direction, wave_angle, p2_p1):
        self.family = family
        self.is_shock = family != 0
        self.y = y
        self.direction = direction
        self.wave_angle = wave_angle
        self.path = [(x, y, wave_angle, p2_p1)]
        self.end = "length"

    def record(self, x, wave_angle, p2_p1):
        self.wave_angle = wave_angle
        self.path.append((x, self.y, wave_angle, p2_p1))


class Station:
    """Nodes of one station, zone by zone (arrays over all nodes)."""

    def __init__(self, x, counts, y, lp, th, lp0, shocks):
        self.x = x
        self.counts = np.asarray(counts, dtype=np.intp)
        self.y, self.lp, self.th, self.lp0 = y, lp, th, lp0
        self.shocks = shocks  # list of Interface, len(counts) - 1, between zone i and i + 1
        self.zone, self.eta, self.start, self.stop = zone_layout(self.counts)
        self.xi = 2.0 * self.zone + self.eta  # increasing: one interpolation for all zones


def cfl_step(theta, mu, h):
    """The marching step [m] that puts the feet of C± about ``CFL_NUMBER`` target spacings
    ``h`` from their node, for the steepest pair of characteristics among θ, μ."""
    return CFL_NUMBER * 2.0 * h / float(np.max(np.tan(theta + mu) - np.tan(theta - mu)))


def zone_node_count(thickness, h):
    """Nodes of a zone of ``thickness`` (array or float): as many as keep the spacing at
    most ``h``, at least its two boundary nodes."""
    return np.maximum(2, np.ceil(np.asarray(thickness) / h - 1e-9).astype(np.intp) + 1)


def wave_angle_of_jump(mach, p2_p1, gamma):
    """Wave angle β [rad] of the shock with pressure ratio ``p2_p1`` (>= 1) in a stream of
    Mach number ``mach``: Mn1 from p2/p1 (NACA Report 1135, eq. 93 inverted,
    :func:`~gasdyn2d.relations.normal_shock_inverses.mach_from_pressure_jump`), β = asin(Mn1/M)
    (π/2 where Mn1 >= M)."""
    return np.arcsin(np.minimum(mach_from_pressure_jump(p2_p1, gamma) / mach, 1.0))


def zone_layout(counts):
    """Zone of each node, its even position η in [0, 1] in the zone, first and last index."""
    zone = np.repeat(np.arange(counts.size), counts)
    stop = np.cumsum(counts) - 1
    start = stop - counts + 1
    eta = (np.arange(zone.size) - start[zone]) / (counts[zone] - 1.0)
    return zone, eta, start, stop


def flow_properties(lp, lp0, gamma):
    """Mach number, Mach angle and B from ln p and ln p0 of the streamline."""
    m2 = 2.0 / (gamma - 1.0) * np.expm1((gamma - 1.0) / gamma * (lp0 - lp))
    mach = np.sqrt(m2)
    mu = np.arcsin(1.0 / mach)
    b = np.sqrt(m2 - 1.0) / (gamma * m2)
    return mach, mu, b


def reflect_from_wall(station, hit, walls, gamma, finished):
    """Replace a shock that has reached a wall by its regular reflection (new station)."""
    k, wall_index = hit
    shocks = list(station.shocks)
    incident = shocks[k]
    counts = station.counts.copy()
    _, _, start, stop = zone_layout(counts)
    wall = walls[wall_index]
    theta_wall = float(np.arctan(wall.slope(station.x)))
    behind = start[k + 1] if wall_index == 0 else stop[k]  # the incident's downstream node
    lp2, th2, lp02 = station.lp[behind], station.th[behind], station.lp0[behind]
    mach2 = float(flow_properties(lp2, lp02, gamma)[0])
    family = -incident.family
    deflection = family * (theta_wall - th2)
    y_wall = float(station.y[behind])
    if deflection > float(detachment_angles(mach2, gamma)[0]):
        return station, ("mach_reflection", (station.x, y_wall))
    if deflection > 0.0:
        beta = float(wave_angle_from_deflection(mach2, deflection, gamma))
        ratios = oblique_shock_ratios(mach2, beta, gamma)
        ratio, p0_ratio = float(ratios.p2_p1), float(ratios.p02_p01)
        if not ratios.M2 > 1.0:  # regular, but subsonic behind: characteristics end here
            return station, ("sonic", (station.x, y_wall))
    else:  # the incident shock has died out before the wall: a Mach wave reflects
        beta, ratio, p0_ratio = math.asin(1.0 / mach2), 1.0, 1.0
    incident.end = "wall"
    finished.append(incident)
    reflected = Interface(family, station.x, y_wall, th2 + family * beta, beta, ratio)
    state = (lp2 + math.log(ratio), theta_wall, lp02 + math.log(p0_ratio))
    # the zone between the wall and the incident shock has closed; a zone between the wall
    # and the reflected shock opens (two nodes at the wall point, the state behind it)
    keep = np.ones(station.y.size, bool)
    gone = slice(start[k], stop[k] + 1) if wall_index == 0 else slice(start[k + 1], stop[k + 1] + 1)
    keep[gone] = False
    parts = [station.y, station.lp, station.th, station.lp0]
    opened = [np.full(2, y_wall)] + [np.full(2, v) for v in state]
    if wall_index == 0:
        arrays = [np.concatenate([o, p[keep]]) for o, p in zip(opened, parts)]
        counts = np.concatenate([[2], np.delete(counts, k)])
    else:
        arrays = [np.concatenate([p[keep], o]) for o, p in zip(opened, parts)]
        counts = np.concatenate([np.delete(counts, k + 1), [2]])
    shocks[k] = reflected
    return Station(station.x, counts, *arrays, shocks), "ok"


def cross_shocks(station, i, span, gamma, finished):
    """Two shocks crossing at a point: transmitted shocks and a slip line (new station).

    Interfaces i (a +1 shock, below) and i + span (a -1 shock, above) meet, with a slip
    line between them when ``span`` is 2 (it ends there); the zones between them have
    closed. The -1 shock goes on into the flow behind
    the +1 one (region 2, below) and the +1 shock into the flow behind the -1 one (region
    3, above); the flows behind them (4 and 5) share pressure and direction across a slip
    line, their stagnation pressures differ. θ on the slip line is found by bisection of
    the pressure mismatch (oblique-shock relations for the two turns, weak branch).
    """
    counts = station.counts
    _, _, start, stop = zone_layout(counts)
    below, above = stop[i], start[i + span + 1]  # region 2 (behind the +1 shock), region 3
    (lp2, th2, lp02), (lp3, th3, lp03) = ((station.lp[k], station.th[k], station.lp0[k])
                                          for k in (below, above))
    m2, m3 = (float(flow_properties(lp, lp0, gamma)[0]) for lp, lp0 in ((lp2, lp02), (lp3, lp03)))
    y_meet = float(station.y[below + 1])
    where = (station.x, y_meet)
    turn_max = (float(detachment_angles(m2, gamma)[0]), float(detachment_angles(m3, gamma)[0]))

    def transmitted(mach, turn):
        beta = float(wave_angle_from_deflection(mach, turn, gamma)) if turn > 0.0 else \
            math.asin(1.0 / mach)
        return beta, oblique_shock_ratios(mach, beta, gamma)

    def mismatch(theta):  # ln p4 - ln p5: falls as θ rises
        lp4 = lp2 + math.log(transmitted(m2, th2 - theta)[1].p2_p1)
        return lp4 - lp3 - math.log(transmitted(m3, theta - th3)[1].p2_p1)

    low, high = max(th3, th2 - turn_max[0]), min(th2, th3 + turn_max[1])
    if not (low <= high and mismatch(low) >= 0.0 >= mismatch(high)):
        return station, ("shock_crossing", where)  # no regular crossing of two shocks
    for _ in range(60):
        middle = 0.5 * (low + high)
        low, high = (middle, high) if mismatch(middle) > 0.0 else (low, middle)
    theta = 0.5 * (low + high)
    (beta_a, after_a), (beta_b, after_b) = transmitted(m2, th2 - theta), transmitted(m3, theta - th3)
    if not (after_a.M2 > 1.0 and after_b.M2 > 1.0):  # subsonic behind a transmitted shock
        return station, ("sonic", where)
    lp4 = lp2 + math.log(after_a.p2_p1)
    state4 = (y_meet, lp4, theta, lp02 + math.log(after_a.p02_p01))
    state5 = (y_meet, lp4, theta, lp03 + math.log(after_b.p02_p01))
    for shock in station.shocks[i:i + span + 1]:
        shock.end = "crossing"
        finished.append(shock)
    new_shocks = [Interface(-1, station.x, y_meet, th2 - beta_a, beta_a, float(after_a.p2_p1)),
                  Interface(0, station.x, y_meet, theta, 0.0, 1.0),
                  Interface(1, station.x, y_meet, th3 + beta_b, beta_b, float(after_b.p2_p1))]
    head, tail = np.arange(station.y.size) <= stop[i], np.arange(station.y.size) >= above
    arrays = [np.concatenate([v[head], np.full(2, a), np.full(2, b), v[tail]])
              for v, a, b in zip((station.y, station.lp, station.th, station.lp0), state4, state5)]
    new_counts = np.concatenate([counts[:i + 1], [2, 2], counts[i + span + 1:]])
    shocks = list(station.shocks[:i]) + new_shocks + list(station.shocks[i + span + 1:])
    return Station(station.x, new_counts, *arrays, shocks), "ok"


def refract_through_slip_line(station, i, span, gamma, finished):
    """A shock passing through a slip line (new station).

    Interfaces i and i + 1 are a +1 shock below a slip line, or a slip line below a -1
    shock; the zone between them has closed. The transmitted shock turns the flow on the
    far side of the slip line to the direction of the flow behind the incident shock
    (weak branch). The pressures on the two sides then differ a little: the wave this
    reflects from the slip line is not fitted; the slip line's own unit process (C+ from
    below, C- from above) sends it into the flow, where the interpolation carries it.
    """
    counts = station.counts
    _, _, start, stop = zone_layout(counts)
    incident = station.shocks[i] if station.shocks[i].is_shock else station.shocks[i + 1]
    family = incident.family
    low, high = stop[i], start[i + 2]  # the outer nodes: below and above the closed zone
    ahead, behind = (high, low) if family > 0 else (low, high)
    lp_a, th_a, lp0_a = station.lp[ahead], station.th[ahead], station.lp0[ahead]
    th_b = station.th[behind]
    mach = float(flow_properties(lp_a, lp0_a, gamma)[0])
    turn = family * (th_b - th_a)
    y_meet = float(station.y[low + 1])
    if turn > float(detachment_angles(mach, gamma)[0]):
        return station, ("shock_crossing", (station.x, y_meet))
    if turn > 0.0:
        beta = float(wave_angle_from_deflection(mach, turn, gamma))
    else:
        beta, turn = math.asin(1.0 / mach), 0.0
    after = oblique_shock_ratios(mach, beta, gamma)
    if not after.M2 > 1.0:  # subsonic behind the transmitted shock
        return station, ("sonic", (station.x, y_meet))
    state = (y_meet, lp_a + math.log(after.p2_p1), th_a + family * turn,
             lp0_a + math.log(after.p02_p01))
    incident.end = "slip line"
    finished.append(incident)
    slip = station.shocks[i + 1] if family > 0 else station.shocks[i]
    transmitted = Interface(family, station.x, y_meet, th_a + family * beta, beta,
                         float(after.p2_p1))
    pair = [slip, transmitted] if family > 0 else [transmitted, slip]
    head, tail = np.arange(station.y.size) <= low, np.arange(station.y.size) >= high
    arrays = [np.concatenate([v[head], np.full(2, a), v[tail]])
              for v, a in zip((station.y, station.lp, station.th, station.lp0), state)]
    new_counts = np.concatenate([counts[:i + 1], [2], counts[i + 2:]])
    shocks = list(station.shocks[:i]) + pair + list(station.shocks[i + 2:])
    return Station(station.x, new_counts, *arrays, shocks), "ok"


def merge_shocks(station, i, span, gamma, finished):
    """Two shocks of one family meeting (the one behind overtakes the one ahead): one
    shock goes on from the meeting point (new station).

    Interfaces i and i + 1 have the same family; the zone between them has closed. The
    merged shock has the state ahead of the front shock on one side and the state behind
    the rear one on the other; its pressure ratio is theirs, its wave angle from it
    (NACA Report 1135, eq. 128), and the next step's shock point makes the two sides
    consistent with the oblique-shock relations. The weak wave and the slip line that
    the exact merging also sends downstream (their strengths are of third order in the
    shocks' turns) are not fitted.
    """
    counts = station.counts
    _, _, start, stop = zone_layout(counts)
    lower, upper = station.shocks[i], station.shocks[i + 1]
    family = lower.family
    below, above = stop[i], start[i + 2]  # the outer nodes, either side of the closed zone
    ahead, behind = (above, below) if family > 0 else (below, above)
    ratio = max(float(np.exp(station.lp[behind] - station.lp[ahead])), 1.0)
    mach = float(flow_properties(station.lp[ahead], station.lp0[ahead], gamma)[0])
    beta = float(wave_angle_of_jump(mach, ratio, gamma))
    y_meet = float(station.y[below + 1])
    for shock in (lower, upper):
        shock.end = "merged"
        finished.append(shock)
    merged = Interface(family, station.x, y_meet, float(station.th[ahead]) + family * beta,
                       beta, ratio)
    keep = np.ones(station.y.size, bool)
    keep[start[i + 1]:stop[i + 1] + 1] = False
    arrays = [v[keep] for v in (station.y, station.lp, station.th, station.lp0)]
    shocks = list(station.shocks[:i]) + [merged] + list(station.shocks[i + 2:])
    return Station(station.x, np.delete(counts, i + 1), *arrays, shocks), "ok"


def insert_shocks(station, starts, walls, n, gamma):
    """Insert a shock at each wall where a compressive stretch begins at this station.

    A stretch longer than a marching step gets a Mach wave of zero strength, which the
    compression then strengthens from behind. A shorter one (a sharp corner or a short
    arc, which the mesh cannot resolve) gets the oblique shock of its whole turn at
    once, as at a corner placed at the stretch's start (error of the order of the
    stretch's length). Returns the new station, or (None, (reason, position)) where the
    turn is beyond what an attached supersonic shock can take.
    """
    for x_start, side, x_end in starts:
        if abs(x_start - station.x) > 1e-12 * max(1.0, abs(station.x)):
            continue
        lower = side == "lower"
        wall = walls[0 if lower else 1]
        index = 0 if lower else station.y.size - 1
        lp, th, lp0 = station.lp[index], station.th[index], station.lp0[index]
        mach, mu, _ = (float(v) for v in flow_properties(lp, lp0, gamma))
        family = 1 if lower else -1
        h = float(walls[1].height(station.x) - walls[0].height(station.x)) / (n - 1)
        step = cfl_step(th, mu, h)
        ahead, after = x_start - 1e-9 * step, x_end + 1e-9 * step  # either side of a corner
        turn = family * float(np.arctan(wall.slope(after)) - np.arctan(wall.slope(ahead)))
        beta, ratio, p0_ratio = mu, 1.0, 1.0
        if x_end - x_start <= step and turn > 0.0:
            if turn > float(sonic_angles(mach, gamma)[0]):
                return None, ("sonic", (station.x, float(station.y[index])))
            beta = float(wave_angle_from_deflection(mach, turn, gamma))
            ratios = oblique_shock_ratios(mach, beta, gamma)
            ratio, p0_ratio = float(ratios.p2_p1), float(ratios.p02_p01)
        else:
            turn = 0.0
        shock = Interface(family, station.x, float(station.y[index]), th + family * beta, beta,
                       ratio)
        parts = [station.y, station.lp, station.th, station.lp0]
        behind = (station.y[index], lp + math.log(ratio), th + family * turn,
                  lp0 + math.log(p0_ratio))
        opened = [np.full(2, v) for v in behind]
        if lower:
            arrays = [np.concatenate([o, p]) for o, p in zip(opened, parts)]
            counts = np.concatenate([[2], station.counts])
            shocks = [shock] + list(station.shocks)
        else:
            arrays = [np.concatenate([p, o]) for o, p in zip(opened, parts)]
            counts = np.concatenate([station.counts, [2]])
            shocks = list(station.shocks) + [shock]
        station = Station(station.x, counts, *arrays, shocks)
    return station
