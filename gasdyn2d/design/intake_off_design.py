"""A ramp intake away from its design Mach number: ramp shocks that merge ahead of the
cowl, and isentropic compressions whose characteristics cross.

Plain core (ndarrays, radians, no pint), the off-design fields of
:class:`~gasdyn2d.design.intakes.RampIntake`:

- :func:`ramp_shock_mergers` — per pair of successive shock stages: where their shocks
  meet outside the duct, and the merged shock, the reflected wave and the slip line there
  (:func:`gasdyn2d.merging_shocks`, in the frame of the flow ahead of the first);
- :func:`compression_coalescence` — per isentropic stage: whether its characteristics
  first cross ahead of the lip plane (a shock forms there), and where.

Both take the fixed geometry (:func:`~gasdyn2d.design.intake_geometry.shock_on_lip_geometry`)
and the wave trains (:func:`~gasdyn2d.design.ramp_trains.ramp_shock_train`) at the Mach
number of interest (and, for the coalescence, at design), and ``lip_slack``, the distance
[length of the geometry] within which a point counts as on the lip. The wave geometry
itself (where two straight waves meet, where characteristics first cross) is in
:mod:`gasdyn2d.design.intake_waves`.
"""

from __future__ import annotations

import numpy as np

from ..patterns.interactions import merging_shocks
from ..relations import thermally_perfect_oblique as tpo
from ..relations.isentropic import mach_angle_of
from ..relations.oblique_shocks import oblique_shock_ratios
from ..relations.theta_beta_mach import wave_angle_from_deflection
from .intake_waves import first_coalescence, wave_meeting_points

__all__ = ["ramp_shock_mergers", "compression_coalescence"]


def compression_coalescence(geometry, theta, train, design_train, gamma, iso, lip_slack):
    """Plain core: per stage, do an isentropic stage's characteristics cross ahead of the
    cowl, and where: (flag, x, y), ramps on the last axis (False and NaN for shock stages
    and where they do not).

    ``geometry`` is the :class:`~gasdyn2d.design.intake_geometry.IntakeGeometry` built at
    design, ``theta`` the ramp turns [rad], ``train`` and ``design_train`` the
    :class:`~gasdyn2d.design.ramp_trains.ShockTrain` at the Mach number of interest and at
    design, ``iso`` the isentropic-stage flags; a crossing counts as ahead when it lies
    more than ``lip_slack`` ahead of the lip plane.
    """
    shape = theta.shape
    flag = np.zeros(shape, dtype=bool)
    x, y = np.full(shape, np.nan), np.full(shape, np.nan)
    upstream = geometry.ramp_angle - theta
    for k in np.flatnonzero(iso):
        point = first_coalescence(
            geometry.corner_x[..., k], geometry.corner_y[..., k], geometry.lip_x, geometry.lip_y,
            upstream[..., k], design_train.mach[..., k], train.mach[..., k], theta[..., k], gamma)
        with np.errstate(invalid="ignore"):
            ahead = point.x < geometry.lip_x - lip_slack
        flag[..., k] = ahead
        x[..., k] = np.where(ahead, point.x, np.nan)
        y[..., k] = np.where(ahead, point.y, np.nan)
    return flag, x, y


def ramp_shock_mergers(geometry, theta, train, gamma, iso, lip_slack, hot=None):
    """Plain core: per pair of successive shock stages, where their shocks meet outside the
    duct (more than ``lip_slack`` ahead of the lip plane or above the lip), and the merged
    shock, reflected wave and slip line there (:func:`gasdyn2d.merging_shocks`, with the
    stage temperatures for a thermally perfect gas, ``hot`` = (gas, free-stream T)).

    Returns the ``ramp_pair`` fields of :class:`~gasdyn2d.design.intakes.RampIntake` in
    order, from ``merges`` to ``reflected_enters_cowl`` (NaN, "" or False where the pair
    does not merge outside the duct).
    """
    shape = theta.shape[:-1] + (theta.shape[-1] - 1,)
    merges = np.zeros(shape, dtype=bool)
    out = {name: np.full(shape, np.nan) for name in (
        "x", "y", "wave_angle", "turn", "mach", "p", "p0", "reflected_turn", "reflected_angle",
        "slip")}
    kinds = np.full(shape, "", dtype="<U5")
    slip_in, reflected_in = np.zeros(shape, dtype=bool), np.zeros(shape, dtype=bool)
    upstream = geometry.ramp_angle - theta
    sigma = upstream + train.wave_angle
    p_ahead = np.cumprod(train.pressure_ratio, axis=-1) / train.pressure_ratio
    p0_ahead = np.cumprod(train.stagnation_pressure_ratio, axis=-1) / train.stagnation_pressure_ratio
    for k in range(shape[-1]):
        if iso[k] or iso[k + 1]:
            continue  # a compression fan beside a shock is not a shock merger
        meet = wave_meeting_points(geometry.corner_x[..., k], geometry.corner_y[..., k],
                                   sigma[..., k], geometry.corner_x[..., k + 1],
                                   geometry.corner_y[..., k + 1], sigma[..., k + 1])
        with np.errstate(invalid="ignore"):
            outside_duct = ((meet.x < geometry.lip_x - lip_slack)
                            | (meet.y > geometry.lip_y + lip_slack))
            here = (meet.along_first > 0.0) & (meet.along_second > 0.0) & outside_duct
        if not here.any():
            continue
        merges[..., k] = here
        index = np.nonzero(here)
        g = float(gamma) if np.ndim(gamma) == 0 else gamma[index]
        M_up = train.mach[..., k][index]
        if hot is None:
            merged = merging_shocks(M_up, theta[..., k][index], theta[..., k + 1][index],
                                    gamma=g, errors="nan")
        else:
            gas, T_free = hot
            T_stage = np.broadcast_to(T_free[..., None], train.temperature_ratio.shape) * \
                train.temperature_ratio
            T_up, T3 = T_stage[..., k][index], T_stage[..., k + 2][index]
            merged = merging_shocks(M_up, theta[..., k][index], theta[..., k + 1][index],
                                    T1=T_up, gas=gas, errors="nan")
        direction = upstream[..., k][index]
        x, y = meet.x[index], meet.y[index]
        lip_x, lip_y = geometry.lip_x[index], geometry.lip_y[index]
        kind = np.asarray(merged.reflected_kind, dtype="<U5")
        turn = np.asarray(merged.reflected_turn, dtype=float)
        behind = geometry.ramp_angle[..., k + 1][index]  # flow direction ahead of the reflection
        M3 = train.mach[..., k + 2][index]
        with np.errstate(invalid="ignore"):
            if hot is None:
                reflected_beta = wave_angle_from_deflection(M3, np.abs(turn), g)
                merged_p0 = oblique_shock_ratios(
                    M_up, np.asarray(merged.wave_angle, dtype=float), g).p02_p01
            else:
                reflected_beta = tpo.oblique_shock_from_deflection(M3, T3, np.abs(turn),
                                                                   gas).wave_angle
                merged_p0 = tpo.oblique_shock_from_wave_angle(
                    M_up, T_up, np.asarray(merged.wave_angle, dtype=float), gas).p02_p01
            reflected_angle = behind - np.where(kind == "shock", reflected_beta, mach_angle_of(M3))
            wave_angle = direction + np.asarray(merged.wave_angle, dtype=float)
            slip = direction + np.asarray(merged.slip_direction, dtype=float)
            run = lip_x - x  # from the merge to the lip plane; none from behind the lip
            slip_in[..., k][index] = (run > 0.0) & (y + run * np.tan(slip) < lip_y)
            reflected_in[..., k][index] = (run > 0.0) & (y + run * np.tan(reflected_angle) < lip_y)
        kinds[..., k][index] = kind
        for name, value in (("x", x), ("y", y), ("wave_angle", wave_angle),
                            ("turn", merged.merged_turn), ("mach", merged.M_above_slip),
                            ("p", p_ahead[..., k][index] * np.asarray(merged.p_p1, dtype=float)),
                            ("p0", p0_ahead[..., k][index] * merged_p0),
                            ("reflected_turn", turn), ("reflected_angle", reflected_angle),
                            ("slip", slip)):
            out[name][..., k][index] = value
    return (merges, out["x"], out["y"], out["wave_angle"], out["turn"], out["mach"], out["p"],
            out["p0"], kinds, out["reflected_turn"], out["reflected_angle"], out["slip"],
            slip_in, reflected_in)
