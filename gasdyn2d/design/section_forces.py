"""Forces and moment of a section from its panel pressures (plain core, numpy, chord units).

- :class:`PanelGeometry` and :func:`panel_geometry` — the per-panel weights of the force
  sums of a :class:`~gasdyn2d.design.sections.Section`: projections dx, dy, mid-points
  and moment arms;
- :func:`panel_coefficients` — cl, cd, cm_le and x_cp from the pressure coefficient on
  every panel, by the exact projection (shock-expansion theory) or the thin-section forms
  (linear and second-order theories);
- :func:`corner_runs` and the tolerances of the trailing-edge (wake) match, shared by the
  perfect-gas and thermally perfect surface marches of shock-expansion theory.

Shared by the theories of :mod:`gasdyn2d.design.section_loads` and
:mod:`gasdyn2d.design.shock_expansion`.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .sections import Section

__all__ = ["PanelGeometry", "panel_geometry", "panel_coefficients", "corner_runs",
           "WAKE_MATCH_ITERATIONS", "WAKE_MATCH_TOLERANCE", "WAKE_MATCHED"]

#: most bracketed Newton steps of the trailing-edge match of shock-expansion theory
WAKE_MATCH_ITERATIONS = 40
#: absolute tolerance [rad] on the wake slip-line direction
WAKE_MATCH_TOLERANCE = 1e-15
#: |ln p_upper - ln p_lower| below which the two streams count as matched
WAKE_MATCHED = 1e-10


def corner_runs(corner_turns):
    """Split a surface's corners into the waves that march it.

    ``corner_turns`` are the turns at the corners in order (positive: into the flow, a
    shock). Returns a list of ``("shock", i, i + 1)`` for each compression corner and
    ``("fan", i, j)`` for each run of consecutive expansion corners i..j-1, which one
    centred simple wave covers.
    """
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


class PanelGeometry(NamedTuple):
    """Per-panel weights of the force sums (plain 1-d arrays, chord units), from
    :func:`panel_geometry`: projections, mid-points and moment arms of each panel."""

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


def panel_geometry(section: Section) -> PanelGeometry:
    """Plain core: the :class:`PanelGeometry` of a section (its points in chord units).

    Examples
    --------
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_forces import panel_geometry
    >>> panel_geometry(Section.flat_plate()).x_upper
    array([0.5])
    """
    d_up, d_lo = np.diff(section.upper, axis=0), np.diff(section.lower, axis=0)
    mid_up = 0.5 * (section.upper[1:] + section.upper[:-1])
    mid_lo = 0.5 * (section.lower[1:] + section.lower[:-1])
    arm_up, arm_lo = mid_up[:, 0] * d_up[:, 0], mid_lo[:, 0] * d_lo[:, 0]
    return PanelGeometry(d_up[:, 0], d_up[:, 1], d_lo[:, 0], d_lo[:, 1], mid_up[:, 0],
                          mid_lo[:, 0], arm_up, arm_lo, arm_up + mid_up[:, 1] * d_up[:, 1],
                          arm_lo + mid_lo[:, 1] * d_lo[:, 1])


def _panel_sum(cp, weights):
    """Σ cp·w over the panels (last axis), without BLAS.

    A matrix-vector product would go to the BLAS library, whose threads made these sums
    20 times slower on a busy two-core machine (benchmarks/bench_section_loads.py
    measures it); einsum's own loop is single-threaded and as fast on one core.
    """
    return np.einsum("...i,i->...", cp, weights)


def panel_coefficients(geometry, cp_upper, cp_lower, alpha, exact):
    """Plain core: (cl, cd, cm_le, x_cp) [-, -, -, chord] from the pressure coefficients on
    the panels (last axis, ``geometry`` a :class:`PanelGeometry`) at incidence α [rad].

    cn = Σ cp_l dx_l - Σ cp_u dx_u and ca = Σ cp_u dy_u - Σ cp_l dy_l; with ``exact``
    (shock-expansion theory) cl = cn cos α - ca sin α, cd = ca cos α + cn sin α and
    cm_le = Σ cp_u (x dx + y dy)_u - Σ cp_l (x dx + y dy)_l; otherwise the thin-section
    (small-angle) forms cl = cn, cd = ca + α·cn, cm_le = -Σ Δcp x dx of the linear and
    second-order theories. x_cp = -cm_le/cn (NaN where cn = 0).
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

