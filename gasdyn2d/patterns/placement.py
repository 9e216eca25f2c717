"""Placing a solved pattern's straight wave lines in the plane: starts and meeting points.

Given start points of waves and points of walls and free boundaries, the starts
the pattern implies are found (reflection points, the crossing of two waves ahead
of a slip line) and every meeting point is listed (plain SI, case-shaped).
"""

from __future__ import annotations

import numpy as np

__all__ = ["intersect", "place_waves", "shaped"]


def shaped(value, shape):
    """A float for one case; else ``value`` (flat, of the cases' size, or a scalar) in the
    case shape."""
    if type(value) is float and not shape:
        return value
    array = np.asarray(value, dtype=float)
    if not shape:
        return float(array.reshape(-1)[0])
    if array.ndim and array.size == int(np.prod(shape)):
        return array.reshape(shape)
    return np.broadcast_to(array, shape)


def intersect(p1, a1, p2, a2):
    """Crossing point of the lines (p1, direction a1) and (p2, a2) [m, rad]; NaN if parallel."""
    (x1, y1), (x2, y2) = p1, p2
    c1, s1, c2, s2 = np.cos(a1), np.sin(a1), np.cos(a2), np.sin(a2)
    with np.errstate(divide="ignore", invalid="ignore"):
        den = c1 * s2 - s1 * c2
        t = ((x2 - x1) * s2 - (y2 - y1) * c2) / den
        t = np.where(np.abs(den) < 1e-14, np.nan, t)
    return x1 + t * c1, y1 + t * s1


def _chain(region, made_by):
    """Waves and regions from ``region`` back to the inflow: ([wave, ...], [region, ...])."""
    waves, regions = [], [region]
    while region in made_by:
        w = made_by[region]
        waves.append(w)
        region = w.upstream
        regions.append(region)
    return waves, regions


def place_waves(plan, si, points, shape):
    """Given and implied start points [m], their sources, and the meeting points."""
    links = {w.name: w for w in plan.order}
    made_by = {w.downstream: w for w in plan.order}
    starts = {}
    for name in links:
        if f"start:{name}:x" in points:
            starts[name] = (shaped(points[f"start:{name}:x"], shape),
                            shaped(points[f"start:{name}:y"], shape))
    sources = {n: "given" for n in starts}
    meetings, seen = [], set()

    def head(name):
        return si["waves"][name][6]

    def meet(kind, incoming, outgoing, region, point):
        key = (kind, incoming, region)
        if key in seen:
            return
        seen.add(key)
        point = tuple(shaped(v, shape) for v in point)
        meetings.append((kind, incoming, outgoing, region, *point))
        for name in outgoing:
            if name not in starts:
                starts[name] = point
                sources[name] = "wave meeting" if kind == "waves" else kind

    for w in plan.order:
        parent = made_by.get(w.upstream)
        for i, c in enumerate(plan.conditions):
            if (c.kind == "slip line" or f"through:{i}:x" not in points
                    or c.regions[0] != w.downstream or parent is None
                    or parent.name not in starts):
                continue
            line = (si["conditions"][i] if c.kind == "wall"
                    else si["regions"][parent.upstream][4])
            through = (points[f"through:{i}:x"], points[f"through:{i}:y"])
            point = intersect(starts[parent.name], head(parent.name),
                               tuple(shaped(v, shape) for v in through), line)
            meet(c.kind, (parent.name,), (w.name,), c.regions[0], point)
        for c in plan.conditions:
            if c.kind != "slip line" or w.downstream not in c.regions:
                continue
            a, b = c.regions
            if a not in made_by or b not in made_by:
                continue
            (wa, *in_a), regions_a = _chain(a, made_by)
            (wb, *in_b), regions_b = _chain(b, made_by)
            common = next(r for r in regions_a if r in regions_b)
            in_a = in_a[:regions_a.index(common) - 1]
            in_b = in_b[:regions_b.index(common) - 1]
            incoming = [v.name for v in in_a + in_b]
            if len(incoming) != 2 or not all(n in starts for n in incoming):
                continue
            point = intersect(starts[incoming[0]], head(incoming[0]),
                               starts[incoming[1]], head(incoming[1]))
            meet("waves", tuple(incoming), (wa.name, wb.name), "", point)
    return starts, sources, meetings


