"""Pressure–deflection polars: every state one wave can reach from a given stream.

A region graph's solution is an intersection of these curves: a wall fixes
the direction (a vertical line in the polar plane), a free boundary the
pressure (a horizontal line), and a slip line joins two regions at a point
common to both of their polars. :func:`pressure_deflection_polar` traces them
for plotting and for explaining a solution.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary import Call, ResultTable, as_si_scalar, unit_field
from ..boundary.types import FloatArray
from ..boundary.units import to_caller_units
from ..errors import InvalidInputError
from ..relations.expansion_fans import (fan_pressure_ratio, mach_from_prandtl_meyer_angle,
                                        max_prandtl_meyer_angle, prandtl_meyer_angle)
from ..relations.flow_state import FlowState
from ..relations import thermally_perfect as tp
from ..relations import thermally_perfect_oblique as tpo
from ..relations.isentropic import mach_after_isentropic_pressure_change, mach_angle_of
from ..relations.oblique_shocks import detachment_angles, oblique_shock_ratios

__all__ = ["pressure_deflection_polar", "PressureDeflectionPolar"]


@dataclasses.dataclass(frozen=True, repr=False)
class PressureDeflectionPolar(ResultTable):
    """Arrays tracing the polars of one stream (last axis: points along the curve).

    The shock polar is one closed-looking curve from the right-running Mach
    wave (weak end), through the normal shock (top), to the left-running
    Mach wave, each point a shock of wave angle ``shock_wave_angle``;
    ``shock_strong`` marks the strong-branch points (wave angle above that
    of maximum deflection). The expansion branches start at the stream's own
    point and follow centred fans of each family down to
    ``min_pressure_ratio``. Directions are absolute (the stream's direction
    plus the turn).
    """

    shock_direction: FloatArray = unit_field("rad", "flow direction behind the shock")
    shock_pressure_ratio: FloatArray = unit_field("", "p behind the shock over the stream's p")
    shock_wave_angle: FloatArray = unit_field("rad", "wave angle from the stream")
    shock_strong: FloatArray = unit_field("", "True on the strong branch", dtype=bool)
    expansion_direction_left: FloatArray = unit_field("rad", "behind a left-running fan")
    expansion_direction_right: FloatArray = unit_field("rad", "behind a right-running fan")
    expansion_pressure_ratio: FloatArray = unit_field("", "p behind the fan over the stream's p")
    max_deflection: FloatArray = unit_field("rad", "θmax of the stream")


def pressure_deflection_polar(state, *, n=201, min_pressure_ratio=0.05):
    """Trace the shock polar (both branches) and the expansion branches of a stream.

    Parameters
    ----------
    state : FlowState or float
        The upstream stream (a Mach number is taken as air flowing along x).
        A batch of states gives arrays of shape ``state.shape + (n,)``. A state of
        a thermally perfect gas gives its polar at the state's temperature.
    n : int, optional
        Points along each branch: the weak and the strong part of each half
        of the shock polar (so the shock arrays have 4n - 3 points) and each
        expansion branch (n points).
    min_pressure_ratio : float, optional
        Lowest pressure ratio traced on the expansion branches (above the
        vacuum limit).

    Returns
    -------
    PressureDeflectionPolar
        Directions in radians (Quantities in the state's angle unit when its
        direction was a Quantity).

    Notes
    -----
    Shock polar parametrised by the wave angle β from μ to π/2 on each
    side: θ(β) from the θ-β-M relation (NACA Report 1135, eq. 138) and
    p2/p1 = 1 + 2γ(M² sin²β - 1)/(γ + 1) (eq. 128); a left-running shock
    turns the flow by +θ, a right-running one by -θ. Expansion branch: the
    isentropic pressure ratio of a centred fan, sampled uniformly in the
    Prandtl–Meyer angle up to the ratio ``min_pressure_ratio``.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.patterns.polars import pressure_deflection_polar
    >>> polar = pressure_deflection_polar(2.0, n=101)
    >>> round(float(np.degrees(np.max(polar.shock_direction))), 4)
    22.9735
    >>> round(float(np.max(polar.shock_pressure_ratio)), 4)
    4.5
    """
    call = Call()
    hot = None
    if isinstance(state, FlowState):
        call.take("state.M", state.M)
        call.take("state.direction", state.direction, "rad")
        g = float(state.gas.gamma)
        if state.gas.is_thermally_perfect:
            hot = state.gas
            call.take("state.T", state.T, "K")
    else:
        call.take("state", state)  # a Mach number: air along x
        call.take("direction", 0.0, "rad")
        g = 1.4
    if call.labels is not None or call.lazy:
        raise InvalidInputError(
            "pressure_deflection_polar traces curves of points (a last axis of points) for "
            "plotting: give the state as a FlowState or Mach number of plain numbers, arrays "
            "or Quantities, not DataArrays, Series or dask arrays (select a case first).")
    if not isinstance(n, (int, np.integer)) or isinstance(n, (bool, np.bool_)) or n < 3:
        raise InvalidInputError(f"n must be an integer >= 3; got {n!r}.")
    n = int(n)
    min_pressure_ratio = as_si_scalar("min_pressure_ratio", min_pressure_ratio)
    if not 0.0 < min_pressure_ratio < 1.0:
        raise InvalidInputError(
            f"min_pressure_ratio must be between 0 and 1; got {min_pressure_ratio!r}.")
    M, d, *T = (np.asarray(v, dtype=float) for v in call.prepare())
    M = np.asarray(call.check.supersonic_mach(M if M.ndim else float(M), "state.M"))
    M = M[..., None]
    d = d[..., None]
    T = T[0][..., None] if T else None
    mu = mach_angle_of(M)
    theta_max, beta_star = (detachment_angles(M, g) if hot is None else
                            tpo.detachment_angles(M, T, hot))
    # cluster points near both ends and near detachment with a cosine spacing in β
    s = 0.5 * (1.0 - np.cos(np.linspace(0.0, np.pi, n)))
    beta = np.concatenate([mu + (beta_star - mu) * s[:-1],
                           beta_star + (0.5 * np.pi - beta_star) * s], axis=-1)
    if hot is None:
        shock = oblique_shock_ratios(M, beta, g)
    else:
        shock = tpo.oblique_shock_from_wave_angle(M, T, beta, hot)
    theta = np.nan_to_num(shock.deflection, nan=0.0)
    half_direction = np.concatenate([-theta, theta[..., ::-1][..., 1:]], axis=-1)
    direction = d + half_direction
    pressure = np.concatenate([shock.p2_p1, shock.p2_p1[..., ::-1][..., 1:]], axis=-1)
    wave_angle = np.concatenate([beta, beta[..., ::-1][..., 1:]], axis=-1)
    strong = wave_angle > beta_star

    if hot is None:
        nu1 = prandtl_meyer_angle(M, g)
        nu_max = max_prandtl_meyer_angle(g)
        # fan to the lowest pressure: isentropic M from p/p0, then its ν
        M_low = mach_after_isentropic_pressure_change(M, min_pressure_ratio, g)
        nu_low = np.minimum(prandtl_meyer_angle(M_low, g), nu_max)
        turn = (nu_low - nu1) * np.linspace(0.0, 1.0, n)
        M_fan = mach_from_prandtl_meyer_angle(nu1 + turn, g)
        p_fan = fan_pressure_ratio(M, M_fan, g)
    else:  # the same at the stream's stagnation temperature, T0 held through the fan
        T0 = tp.stagnation_temperature(M, T, hot)
        nu1 = tp.prandtl_meyer_angle(M, T0, hot)
        p1_p0 = tp.isentropic_ratios(M, T0, hot).p_p0
        M_low = tp.mach_from_pressure_ratio(min_pressure_ratio * p1_p0, T0, hot)
        turn = (tp.prandtl_meyer_angle(M_low, T0, hot) - nu1) * np.linspace(0.0, 1.0, n)
        M_fan = tp.mach_from_prandtl_meyer_angle(nu1 + turn, T0, hot)
        p_fan = tp.isentropic_ratios(M_fan, T0, hot).p_p0 / p1_p0
        p_fan[..., 0] = 1.0
    angle = _angle_packer(call)
    theta_max = theta_max[..., 0]
    fields = (angle(direction), pressure, angle(wave_angle), strong, angle(d - turn),
              angle(d + turn), p_fan, angle(float(theta_max) if theta_max.ndim == 0
                                           else theta_max))
    for value in fields:  # results are read-only, and share no memory
        magnitude = getattr(value, "magnitude", value)
        if isinstance(magnitude, np.ndarray):
            magnitude.flags.writeable = False
    return PressureDeflectionPolar(*fields)


def _angle_packer(call):
    """Angles in the caller's angle unit and registry when a Quantity was given."""
    like = next((u for t, u in zip(call.unit_texts, call.units) if t == "rad" and u is not None
                 and str(u.units) != "dimensionless"), None)
    if call.registry is None:
        return lambda value: np.array(value, dtype=float) if np.ndim(value) else value
    return lambda value: to_caller_units(np.array(value, dtype=float) if np.ndim(value)
                                         else value, "rad", like, call.registry)
