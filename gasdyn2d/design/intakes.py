"""Planar external-compression ramp intakes: shock trains, shock-on-lip geometry, spillage.

A ramp intake turns the free stream through a sequence of planar compression
ramps, each starting an oblique shock, and ends the supersonic compression with
a terminal normal shock at the cowl lip. This module gives the flow through
that shock train, the ramp and cowl-lip geometry that focuses every ramp shock
on the lip at the design Mach number, the spillage of that fixed geometry off
design, and a flag for shocks strong enough to separate a turbulent boundary
layer.

Plain core (floats and ndarrays, radians, no pint):

- :func:`ramp_shock_train` — Mach number, wave angle, normal Mach number and
  pressure ratios behind each ramp shock;
- :func:`shock_on_lip_geometry` — ramp corners, ramp lengths and the lip;
- :func:`lip_streamline_capture` — where each shock crosses the lip height and
  the captured free-stream height, for any Mach number with the geometry fixed;
- :func:`incipient_separation_pressure_ratio` — Korkegi's estimate of the
  pressure rise that starts turbulent separation.

Unit boundary: :func:`ramp_intake`. The optimum ramps and the starting limits
of internal contraction live in :mod:`gasdyn2d.design.intake_design`.

Coordinates: the first ramp's leading edge is the origin, the free stream runs
along +x, and the ramps turn the flow towards +y (the cowl side). Ramp k's
surface is inclined at the ramp angle δk = θ1 + ... + θk to the free stream.
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numpy as np

from .. import _numerics as nx
from ..boundary.results import ResultTable, unit_field
from ..errors import DetachedShockError, InvalidInputError
from ..relations.normal_shocks import normal_shock_ratios
from ..relations.oblique_shocks import detachment_angles, oblique_shock_ratios, wave_angle_from_deflection

__all__ = [
    "ramp_intake",
    "RampIntake",
    "ShockTrain",
    "IntakeGeometry",
    "LipCapture",
    "ramp_shock_train",
    "shock_on_lip_geometry",
    "lip_streamline_capture",
    "incipient_separation_pressure_ratio",
]

_TERMINALS = ("normal", "none")
_KORKEGI_SWITCH_MACH = 4.5  # Korkegi (1975): the two fits meet near M = 4.5 (from memory)
_ON_LIP_TOLERANCE = 1e-9  # relative to the lip's distance: "shock on the lip" below this


# ------------------------------------------------------------------ plain core


class ShockTrain(NamedTuple):
    """Plain-core result of :func:`ramp_shock_train` (ndarrays; angles in radians).

    Per-ramp arrays have the ramps on the last axis (length n); ``mach`` has
    n + 1 entries: the free stream first, then the flow behind each ramp shock.
    """

    mach: np.ndarray
    wave_angle: np.ndarray
    normal_mach: np.ndarray
    pressure_ratio: np.ndarray
    stagnation_pressure_ratio: np.ndarray
    detachment_deflection: np.ndarray


def ramp_shock_train(M, deflections, gamma=1.4):
    """Plain core: the oblique shocks of a train of compression ramps.

    Parameters
    ----------
    M : float or ndarray
        Free-stream Mach number [-].
    deflections : ndarray
        Turn of each ramp [rad], ramps on the last axis; the batch axes
        broadcast with ``M`` and ``gamma``.
    gamma : float or ndarray
        Ratio of specific heats [-].

    Returns
    -------
    ShockTrain
        NaN from the first ramp whose turn exceeds the detachment deflection at
        its upstream Mach number (``detachment_deflection`` says which).

    Notes
    -----
    Shock k sees the flow behind shock k - 1 (Mach M(k-1), already parallel to
    ramp k - 1) and turns it by θk: β(k) from the θ-β-M relation on the weak
    branch, M(k) = Mn2/sin(β - θ) (NACA Report 1135, eqs. 128-150). A zero turn
    gives a Mach wave with no loss.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intakes import ramp_shock_train
    >>> train = ramp_shock_train(2.0, np.radians([10.0]))
    >>> round(float(np.degrees(train.wave_angle[0])), 4), round(float(train.mach[1]), 5)
    (39.3139, 1.64052)
    """
    theta = np.atleast_1d(np.asarray(deflections, dtype=float))
    M = np.asarray(M, dtype=float)
    gamma = np.asarray(gamma, dtype=float)
    shape = np.broadcast_shapes(M.shape, theta.shape[:-1], gamma.shape)
    n = theta.shape[-1]
    theta = np.broadcast_to(theta, shape + (n,))
    gamma = np.broadcast_to(gamma, shape)
    machs = [np.broadcast_to(M, shape).astype(float)]
    columns = {name: [] for name in ShockTrain._fields[1:]}
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(n):
            upstream = machs[-1]
            theta_max, _ = detachment_angles(upstream, gamma)
            beta = wave_angle_from_deflection(upstream, theta[..., k], gamma)
            ratios = oblique_shock_ratios(upstream, beta, gamma)
            machs.append(ratios.M2)
            columns["wave_angle"].append(beta)
            columns["normal_mach"].append(ratios.Mn1)
            columns["pressure_ratio"].append(ratios.p2_p1)
            columns["stagnation_pressure_ratio"].append(ratios.p02_p01)
            columns["detachment_deflection"].append(theta_max)
    stack = lambda arrays: np.stack(arrays, axis=-1)  # noqa: E731
    return ShockTrain(stack(machs), *(stack(columns[name]) for name in ShockTrain._fields[1:]))


def _direction(angle):
    return np.cos(angle), np.sin(angle)


def _line_parameter(px, py, ux, uy, qx, qy, vx, vy):
    """t such that P + t·u lies on the line through Q with direction v."""
    return ((qx - px) * vy - (qy - py) * vx) / (ux * vy - uy * vx)


class IntakeGeometry(NamedTuple):
    """Plain-core result of :func:`shock_on_lip_geometry` (lengths in the unit of
    ``first_ramp_length``; per-ramp arrays on the last axis).

    ``corner_x``, ``corner_y`` are the n ramp starts (the leading edge first);
    ``ramp_lengths`` run along each ramp surface, the last one to the entrance
    plane (the normal dropped from the lip onto the last ramp);
    ``entrance_height`` is the length of that normal.
    """

    ramp_angle: np.ndarray
    corner_x: np.ndarray
    corner_y: np.ndarray
    ramp_lengths: np.ndarray
    lip_x: np.ndarray
    lip_y: np.ndarray
    entrance_height: np.ndarray


def shock_on_lip_geometry(deflections, wave_angles, first_ramp_length=1.0):
    """Plain core: ramp lengths and lip position at which every ramp shock meets the lip.

    Parameters
    ----------
    deflections, wave_angles : ndarray
        Turn of each ramp and wave angle of its shock relative to its upstream
        flow [rad] at the design Mach number, ramps on the last axis.
    first_ramp_length : float or ndarray
        Length of the first ramp along its surface [any length unit].

    Returns
    -------
    IntakeGeometry

    Notes
    -----
    Shock k starts at the corner C(k-1) at the angle σk = δ(k-1) + βk to the
    free stream. The lip is where shocks 1 and 2 cross; each later corner C(k)
    is where ramp k's surface meets the line drawn back from the lip at σ(k+1).
    The last ramp ends at the entrance plane, the normal from the lip to its
    surface (where the terminal shock stands); that also places the lip of a
    single-ramp intake, on the shock above the ramp's end. Because σ(k+1) > σk always (a shock is
    slower than the Mach waves behind it), every length comes out positive,
    unless two ramps in a row have zero turn (parallel Mach waves: NaN).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intakes import shock_on_lip_geometry
    >>> geometry = shock_on_lip_geometry(np.radians([10.0]), np.radians([39.3139]))
    >>> round(float(geometry.lip_x), 6), round(float(geometry.lip_y), 6)
    (0.887306, 0.726611)
    """
    theta = np.atleast_1d(np.asarray(deflections, dtype=float))
    beta = np.atleast_1d(np.asarray(wave_angles, dtype=float))
    theta, beta = np.broadcast_arrays(theta, beta)
    length = np.asarray(first_ramp_length, dtype=float)
    shape = np.broadcast_shapes(theta.shape[:-1], length.shape)
    n = theta.shape[-1]
    theta = np.broadcast_to(theta, shape + (n,))
    beta = np.broadcast_to(beta, shape + (n,))
    length = np.broadcast_to(length, shape)
    delta = np.cumsum(theta, axis=-1)
    upstream_delta = delta - theta
    sigma = upstream_delta + beta
    with np.errstate(invalid="ignore", divide="ignore"):
        cx1, cy1 = length * np.cos(delta[..., 0]), length * np.sin(delta[..., 0])
        if n == 1:  # the lip stands on the shock, normal to the ramp at its end
            height = length * np.tan(beta[..., 0] - theta[..., 0])
            lip_x = cx1 - height * np.sin(delta[..., 0])
            lip_y = cy1 + height * np.cos(delta[..., 0])
        else:
            ux, uy = _direction(sigma[..., 0])
            vx, vy = _direction(sigma[..., 1])
            t = _line_parameter(0.0, 0.0, ux, uy, cx1, cy1, vx, vy)
            lip_x, lip_y = t * ux, t * uy
        corners_x, corners_y, lengths = [np.zeros(shape)], [np.zeros(shape)], [length]
        for k in range(1, n):
            rx, ry = _direction(delta[..., k])
            px, py = corners_x[-1] + lengths[-1] * np.cos(delta[..., k - 1]), \
                corners_y[-1] + lengths[-1] * np.sin(delta[..., k - 1])
            corners_x.append(px)
            corners_y.append(py)
            if k < n - 1:
                vx, vy = _direction(sigma[..., k + 1])
                lengths.append(_line_parameter(px, py, rx, ry, lip_x, lip_y, vx, vy))
            else:  # to the foot of the normal from the lip: the entrance plane
                lengths.append((lip_x - px) * rx + (lip_y - py) * ry)
        last = delta[..., -1]
        entrance = (lip_y - corners_y[-1]) * np.cos(last) - (lip_x - corners_x[-1]) * np.sin(last)
    stack = lambda arrays: np.stack(arrays, axis=-1)  # noqa: E731
    return IntakeGeometry(delta, stack(corners_x), stack(corners_y), stack(lengths), lip_x,
                          lip_y, entrance)


class LipCapture(NamedTuple):
    """Plain-core result of :func:`lip_streamline_capture`.

    ``shock_lead`` is, per ramp shock, how far ahead of the lip (along x) the
    shock crosses the lip's height: > 0 ahead of the lip (spilling), < 0
    inside the cowl. ``captured_height`` is the free-stream height of the
    streamline that reaches the lip.
    """

    shock_lead: np.ndarray
    captured_height: np.ndarray


def lip_streamline_capture(geometry, wave_angles):
    """Plain core: shock positions relative to the lip and the captured stream tube.

    Parameters
    ----------
    geometry : IntakeGeometry
        Fixed geometry (from :func:`shock_on_lip_geometry` at the design Mach number).
    wave_angles : ndarray
        Wave angles of the ramp shocks [rad] at the Mach number of interest,
        ramps on the last axis, broadcasting with the geometry's batch axes.

    Returns
    -------
    LipCapture

    Notes
    -----
    The shocks are straight lines from the fixed corners at σk = δ(k-1) + βk.
    The streamline that reaches the lip is traced upstream: behind shock k the
    flow is uniform and parallel to ramp k, so the trace is straight until it
    meets shock k, where it turns to the direction of ramp k - 1; ahead of
    shock 1 it is horizontal at the captured height. A shock that lies behind
    the lip (inside the cowl) is not crossed. Below design, neighbouring
    shocks cross each other above the lip streamline (the tests check this for
    typical layouts), so the streamline meets each shock on its own; the merged
    shock above it and the weak wave the merger sends back are neglected
    (common practice for preliminary spillage estimates).
    """
    beta = np.asarray(wave_angles, dtype=float)
    n = beta.shape[-1]
    sigma = geometry.ramp_angle - np.diff(geometry.ramp_angle, axis=-1, prepend=0.0) + beta
    shape = np.broadcast_shapes(sigma.shape[:-1], geometry.lip_x.shape)
    lip_x = np.broadcast_to(geometry.lip_x, shape)
    lip_y = np.broadcast_to(geometry.lip_y, shape)
    sigma = np.broadcast_to(sigma, shape + (n,))
    delta = np.broadcast_to(geometry.ramp_angle, shape + (n,))
    cx = np.broadcast_to(geometry.corner_x, shape + (n,))
    cy = np.broadcast_to(geometry.corner_y, shape + (n,))
    with np.errstate(invalid="ignore", divide="ignore"):
        lead = lip_x[..., None] - (cx + (lip_y[..., None] - cy) / np.tan(sigma))
        px, py = lip_x, lip_y
        for k in range(n - 1, -1, -1):
            ux, uy = _direction(delta[..., k])
            vx, vy = _direction(sigma[..., k])
            back = -_line_parameter(px, py, ux, uy, cx[..., k], cy[..., k], vx, vy)
            back = np.maximum(back, 0.0)  # a shock inside the cowl is not crossed
            px, py = px - back * ux, py - back * uy
    return LipCapture(lead, py)


def incipient_separation_pressure_ratio(M):
    """Plain core: Korkegi's estimate of the shock pressure ratio that separates a
    turbulent boundary layer in two-dimensional flow.

    p2/p1 = 1 + 0.3 M² for M < 4.5, and 0.17 M^2.5 above (coefficients from memory).

    Parameters
    ----------
    M : float or ndarray
        Mach number ahead of the shock [-].

    Returns
    -------
    float or ndarray
        Pressure ratio [-] at incipient separation: an estimate for an adiabatic
        wall in air at high Reynolds number, a fit through scattered experiments,
        so a flag for a closer look rather than a prediction.

    References
    ----------
    Korkegi, R. H. (1975), "Comparison of shock-induced two- and
    three-dimensional incipient turbulent separation", AIAA J. 13(4), 534-535
    (the correlation for ramps and incident shocks; details from memory).

    Examples
    --------
    >>> from gasdyn2d.design.intakes import incipient_separation_pressure_ratio
    >>> round(float(incipient_separation_pressure_ratio(2.0)), 3)
    2.2
    """
    M = np.asarray(M, dtype=float)
    with np.errstate(invalid="ignore"):
        return np.where(M < _KORKEGI_SWITCH_MACH, 1.0 + 0.3 * M * M, 0.17 * M**2.5)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class RampIntake(ResultTable):
    """Flow through a planar external-compression ramp intake and its geometry.

    Per-shock fields have the shocks on the last axis: the n ramp shocks, and
    for the fields of length n + 1 the terminal normal shock last. Angles are
    in radians (Quantities in the caller's angle unit when the deflections
    were Quantities); lengths are in the unit of ``first_ramp_length``
    (Quantities when it was one).
    """

    M: object = unit_field("")  #: free-stream Mach number
    design_mach: object = unit_field("")  #: Mach number at which every ramp shock meets the lip
    deflections: object = unit_field("rad")  #: turn of each ramp (n)
    ramp_angles: object = unit_field("rad")  #: ramp surface inclination to the free stream (n)
    stage_mach: object = unit_field("")  #: Mach number behind each ramp shock (n)
    wave_angles: object = unit_field("rad")  #: angle of each ramp shock to its upstream flow (n)
    normal_mach: object = unit_field("")  #: upstream normal Mach number of every shock (n + 1)
    pressure_ratios: object = unit_field("")  #: static pressure ratio across every shock (n + 1)
    stagnation_pressure_ratios: object = unit_field("")  #: p0 ratio across every shock (n + 1)
    terminal_mach: object = unit_field("")  #: subsonic Mach number behind the terminal shock
    recovery: object = unit_field("")  #: overall stagnation-pressure ratio p0(out)/p0(free stream)
    static_pressure_rise: object = unit_field("")  #: static pressure out over free-stream static
    ramp_lengths: object = unit_field("m")  #: length of each ramp along its surface (n)
    lip_x: object = unit_field("m")  #: cowl lip, streamwise from the leading edge
    lip_y: object = unit_field("m")  #: cowl lip height above the leading edge (capture height)
    entrance_height: object = unit_field("m")  #: lip to last ramp surface, normal to it
    shock_lead: object = unit_field("m")  #: how far each ramp shock is ahead of the lip (n)
    shock_enters_cowl: object = unit_field("")  #: ramp shock passes behind the lip (n)
    mass_flow_ratio: object = unit_field("")  #: captured over geometric-capture mass flow, <= 1
    separation_pressure_ratios: object = unit_field("")  #: Korkegi estimate per shock (n + 1)
    separation_risk: object = unit_field("")  #: shock pressure rise above the estimate (n + 1)


def _deflections_to_si(deflections):
    """Deflections as an ndarray [rad]; a list of Quantities is converted one by one."""
    if isinstance(deflections, (list, tuple)) and any(nx.is_quantity(d) for d in deflections):
        converted = [nx.to_si(d, f"deflections[{i}]", "angle") for i, d in enumerate(deflections)]
        units = [u for _, u in converted if u is not None]
        return np.stack([np.asarray(a) for a, _ in converted], axis=-1), units[0]
    theta, unit = nx.to_si(deflections, "deflections", "angle")
    if theta.ndim == 0:
        theta = theta[None]
    if theta.shape[-1] == 0:
        raise InvalidInputError("deflections must hold at least one ramp turn; got none.")
    return theta, unit


def _check_turns(theta, errors):
    """Reject negative turns and two zero turns in a row (NaN under errors='nan')."""
    theta = np.array(theta, dtype=float)
    for k in range(theta.shape[-1]):
        with np.errstate(invalid="ignore"):
            theta[..., k] = nx.reject(theta[..., k] < 0, theta[..., k], f"deflections[{k}]",
                                      f">= 0 (ramp {k + 1} must compress the flow)", errors,
                                      unit_text="rad")
            if k:
                theta[..., k] = nx.reject(
                    (theta[..., k] == 0) & (theta[..., k - 1] == 0), theta[..., k],
                    f"deflections[{k}]", f"> 0 when deflections[{k - 1}] is 0", errors,
                    unit_text="rad", hint="Two zero turns in a row make parallel Mach waves "
                    "that never meet at a lip; merge the two ramps into one.")
    return theta


def _attached_train(M, theta, gamma, errors, mach_name):
    """The shock train, with every ramp checked against detachment at its stage's Mach number.

    One train is computed; a detached stage is NaN in it and in every later stage, so
    under errors='nan' the whole case comes out NaN. Under 'raise' the first failing ramp
    is named with its upstream Mach number.
    """
    train = ramp_shock_train(M, theta, gamma)
    theta = np.array(theta, dtype=float)
    for k in range(theta.shape[-1]):
        upstream, theta_max = train.mach[..., k], train.detachment_deflection[..., k]
        with np.errstate(invalid="ignore"):
            bad = ~(theta[..., k] <= theta_max) & ~np.isnan(upstream) & ~np.isnan(theta[..., k])
        limit, hint = None, ""
        if np.any(bad) and errors == "raise":
            index = tuple(np.argwhere(bad)[0]) if bad.ndim else ()
            stage_mach = float(upstream[index])
            if stage_mach >= 1.0:
                limit = theta_max
                hint = (f"Ramp {k + 1} sees the flow at M = {stage_mach:.6g} ({mach_name} "
                        f"{float(M[index]):.6g}); above θmax no attached shock exists. Lower "
                        f"the turn of ramp {k + 1} or of the ramps ahead of it.")
            else:
                hint = (f"The flow behind ramp {k} is subsonic (M = {stage_mach:.6g}) at "
                        f"{mach_name} {float(M[index]):.6g}, so ramp {k + 1} cannot start an "
                        f"attached shock. Lower the turns of the ramps ahead of it.")
        theta[..., k] = nx.reject(
            bad, theta[..., k], f"deflections[{k}]",
            f"at most the detachment deflection of ramp {k + 1} at its upstream Mach number",
            errors, limit=limit, unit_text="rad", error_class=DetachedShockError, hint=hint)
    return theta, train


def ramp_intake(M, deflections, *, design_mach=None, first_ramp_length=1.0, terminal="normal",
                gamma=1.4, errors="raise"):
    """Flow, losses and shock-on-lip geometry of a planar external-compression ramp intake.

    Parameters
    ----------
    M : float or array_like
        Free-stream Mach number [-], > 1.
    deflections : array_like or Quantity
        Turn of each ramp [rad] (n values, first ramp first, each >= 0); a
        2-D array gives one set of ramps per row, broadcasting with ``M``. A
        list of angle Quantities is accepted.
    design_mach : float or array_like, optional
        Mach number at which the ramp shocks all meet at the cowl lip; fixes the
        geometry. Default: ``M`` (on design).
    first_ramp_length : float, array_like or Quantity, optional
        Length of the first ramp along its surface [m]; every length scales with
        it. Default 1 (lengths in first-ramp lengths).
    terminal : {"normal", "none"}, optional
        ``"normal"``: a terminal normal shock at the lip at the Mach number
        behind the last ramp (critical operation). ``"none"``: the ramp shocks
        only (as for the external part of a mixed-compression intake).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for cases with invalid inputs instead of raising.

    Returns
    -------
    RampIntake

    Raises
    ------
    DetachedShockError
        A ramp turns the flow beyond the detachment deflection at its stage's
        Mach number (at ``M`` or at ``design_mach``); the message names the ramp.
    InvalidInputError
        Subsonic ``M`` or ``design_mach``, a negative turn, two zero turns in
        a row (parallel Mach waves never meet at a lip), a non-positive
        length, gamma <= 1, an unknown ``terminal``.

    Notes
    -----
    Ramp shock k: βk from θ-β-M at M(k-1); p0 ratio of the normal component
    Mn = M(k-1) sin βk (NACA Report 1135, eqs. 128-150). Terminal normal shock
    at M(n) (eqs. 93-100). Recovery = ∏ p0 ratios.

    The geometry is built at ``design_mach`` (see :func:`shock_on_lip_geometry`)
    and held fixed. At another Mach number the shocks are straight lines from
    the same corners at their new angles; below design they stand ahead of the
    lip and the stream tube between the lip streamline and the ramp is smaller
    than the geometric capture height ``lip_y``: mass-flow ratio =
    (captured free-stream height)/``lip_y`` < 1 (spillage, see
    :func:`lip_streamline_capture`). Above design the shocks enter the cowl
    (``shock_enters_cowl``), the full stream tube is captured (ratio 1) and
    the shocks reflect inside the duct, which this model does not follow.

    ``separation_risk`` compares each shock's pressure ratio with Korkegi's
    incipient-separation estimate for turbulent boundary layers at the Mach
    number ahead of it (:func:`incipient_separation_pressure_ratio`).

    Inviscid, perfect gas: boundary layers, bleed and shock–boundary-layer
    interaction decide how a real intake performs.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 93-100, 128-150.
    Korkegi, R. H. (1975), AIAA J. 13(4), 534-535 (details from memory).

    Examples
    --------
    >>> from gasdyn2d import ureg
    >>> from gasdyn2d.design.intakes import ramp_intake
    >>> intake = ramp_intake(2.5, [8.0, 9.0] * ureg.deg, first_ramp_length=0.3 * ureg.m)
    >>> round(intake.recovery, 4), round(intake.terminal_mach, 4)
    (0.7774, 0.6094)
    >>> round(intake.mass_flow_ratio, 12), intake.lip_x.units
    (1.0, <Unit('meter')>)
    >>> round(ramp_intake(2.2, [8.0, 9.0] * ureg.deg, design_mach=2.5).mass_flow_ratio, 4)
    0.9131
    """
    nx.check_errors_mode(errors)
    if terminal not in _TERMINALS:
        raise InvalidInputError(f"terminal must be 'normal' or 'none'; got {terminal!r}.")
    M, unit_m = nx.to_si(M, "M", "dimensionless")
    theta, unit_theta = _deflections_to_si(deflections)
    length, unit_length = nx.to_si(first_ramp_length, "first_ramp_length", "length")
    gamma, _ = nx.to_si(gamma, "gamma", "dimensionless")
    design, _ = nx.to_si(M if design_mach is None else design_mach, "design_mach", "dimensionless")
    n = theta.shape[-1]
    M, design, length, gamma, _ = nx.broadcast(
        M=M, design_mach=design, first_ramp_length=length, gamma=gamma,
        sets_of_deflections=theta[..., 0])  # the batch axes of deflections (ramps last)
    theta = np.broadcast_to(theta, M.shape + (n,))
    gamma = nx.check_gamma(gamma, errors)
    M = nx.check_finite_at_least(M, "M", 1.0, errors, what="supersonic flow", inclusive=False)
    design = nx.check_finite_at_least(design, "design_mach", 1.0, errors,
                                      what="supersonic flow", inclusive=False)
    length = nx.check_finite_at_least(length, "first_ramp_length", 0.0, errors,
                                      what="a ramp length", inclusive=False)
    theta = _check_turns(theta, errors)
    theta, train = _attached_train(M, theta, gamma, errors, "free-stream M")
    design_train = train
    if design_mach is not None:
        theta, design_train = _attached_train(design, theta, gamma, errors, "design_mach")
    case_nan = np.isnan(M) | np.isnan(design) | np.isnan(length) | np.isnan(gamma)
    case_nan |= np.isnan(theta).any(axis=-1)
    if np.any(case_nan):  # blank whole cases: every field of a rejected case is NaN
        M, design = np.where(case_nan, np.nan, M), np.where(case_nan, np.nan, design)
        theta = np.where(case_nan[..., None], np.nan, theta)
        train = ramp_shock_train(M, theta, gamma)
        design_train = ramp_shock_train(design, theta, gamma)
    return _assemble(M, design, theta, length, gamma, terminal, train, design_train,
                     unit_m, unit_theta, unit_length)


def _assemble(M, design, theta, length, gamma, terminal, train, design_train, unit_m,
              unit_theta, unit_length):
    geometry = shock_on_lip_geometry(theta, design_train.wave_angle, length)
    capture = lip_streamline_capture(geometry, train.wave_angle)
    last = train.mach[..., -1]
    with np.errstate(invalid="ignore"):
        ns = normal_shock_ratios((last - 1.0) * (last + 1.0), gamma)
        if terminal == "none":
            ns = ns._replace(**{k: np.full_like(last, np.nan) for k in ns._fields})
        shock_machs = np.concatenate([train.normal_mach, last[..., None] + 0.0 * ns.M2[..., None]],
                                     axis=-1)
        p_ratios = np.concatenate([train.pressure_ratio, ns.p2_p1[..., None]], axis=-1)
        p0_ratios = np.concatenate([train.stagnation_pressure_ratio, ns.p02_p01[..., None]],
                                   axis=-1)
        counted = p0_ratios if terminal == "normal" else p0_ratios[..., :-1]
        recovery = np.prod(counted, axis=-1)
        counted_p = p_ratios if terminal == "normal" else p_ratios[..., :-1]
        ahead = np.concatenate([train.mach[..., :-1], last[..., None]], axis=-1)
        separation = incipient_separation_pressure_ratio(ahead)
        risk = p_ratios > separation
        lip_distance = np.hypot(geometry.lip_x, geometry.lip_y)[..., None]
        enters = capture.shock_lead < -_ON_LIP_TOLERANCE * lip_distance
        on_design = np.all(np.abs(capture.shock_lead) <= _ON_LIP_TOLERANCE * lip_distance, axis=-1)
        ratio = np.where(on_design, 1.0, capture.captured_height / geometry.lip_y)
    s = nx.scalar_or_array
    angle_unit = nx.output_angle_unit(unit_theta, unit_m, unit_length)
    angle = lambda value: nx.angle_out(s(value), angle_unit)  # noqa: E731
    if unit_length is None and (unit_theta is not None or unit_m is not None):
        unit_length = nx.ureg().meter  # a Quantity anywhere in: lengths come out as Quantities
    size = lambda value: nx.quantity_out(s(value), "meter", unit_length)  # noqa: E731
    return RampIntake(
        M=s(M), design_mach=s(design), deflections=angle(theta),
        ramp_angles=angle(geometry.ramp_angle), stage_mach=s(train.mach[..., 1:]),
        wave_angles=angle(train.wave_angle), normal_mach=s(shock_machs),
        pressure_ratios=s(p_ratios), stagnation_pressure_ratios=s(p0_ratios),
        terminal_mach=s(ns.M2), recovery=s(recovery),
        static_pressure_rise=s(np.prod(counted_p, axis=-1)),
        ramp_lengths=size(geometry.ramp_lengths), lip_x=size(geometry.lip_x),
        lip_y=size(geometry.lip_y), entrance_height=size(geometry.entrance_height),
        shock_lead=size(capture.shock_lead), shock_enters_cowl=np.asarray(enters),
        mass_flow_ratio=s(ratio), separation_pressure_ratios=s(separation),
        separation_risk=np.asarray(risk),
    )
