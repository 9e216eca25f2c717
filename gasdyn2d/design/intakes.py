"""Planar external-compression ramp intakes: shock trains, shock-on-lip geometry, spillage.

A ramp intake turns the free stream through a sequence of planar compression
ramps, each starting an oblique shock (or, for an isentropic stage, a
Prandtl–Meyer compression focused on the cowl lip), and ends the supersonic
compression with a terminal normal shock at the cowl lip. This module gives the
flow through that wave train, the ramp and cowl-lip geometry that focuses every
ramp wave on the lip at the design Mach number, the spillage of that fixed
geometry off design, the ramp shocks that merge ahead of the cowl off design,
and a flag for shocks strong enough to separate a turbulent boundary layer.

Plain core (floats and ndarrays, radians, no pint):

- :func:`ramp_shock_train` — Mach number, wave angle, normal Mach number and
  pressure ratios behind each ramp stage;
- :func:`shock_on_lip_geometry` — ramp corners, ramp lengths and the lip;
- :func:`lip_streamline_capture` — where each wave crosses the lip height and
  the captured free-stream height, for any Mach number with the geometry fixed;
- :func:`incipient_separation_pressure_ratio` — Korkegi's estimate of the
  pressure rise that starts turbulent separation;
- :mod:`gasdyn2d.design.intake_waves` — the isentropic stage's wall and where its
  characteristics cross, and where two ramp waves meet.

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

from ..boundary import Call, ResultTable, choice, refuse_type, unit_field
from ..boundary.results import result_fields
from ..boundary.types import ArrayInput, FloatArray
from ..boundary.units import is_quantity
from ..errors import DetachedShockError, InvalidInputError
from ..patterns.interactions import merging_shocks
from ..relations.expansion_fans import fan_pressure_ratio, mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from ..relations import thermally_perfect as tp
from ..relations import thermally_perfect_oblique as tpo
from ..relations import thermally_perfect_shocks as tps
from ..relations.flow_state import FlowState
from ..relations.gas import gas_of_call
from ..relations.isentropic import mach_angle_of
from ..relations.normal_shocks import normal_shock_ratios
from ..relations.oblique_shocks import (
    detachment_angles,
    oblique_shock_ratios,
    wave_angle_from_deflection,
)
from .intake_waves import (
    first_coalescence,
    isentropic_arc_length,
    isentropic_radius_ratio,
    wave_meeting_points,
)

__all__ = [
    "ramp_intake",
    "RampIntake",
    "ShockTrain",
    "IntakeGeometry",
    "LipCapture",
    "STAGE_KINDS",
    "ramp_shock_train",
    "shock_on_lip_geometry",
    "lip_streamline_capture",
    "incipient_separation_pressure_ratio",
]

_KORKEGI_SWITCH_MACH = 4.5  # Korkegi (1975): the two fits meet near M = 4.5 (from memory)
_ON_LIP_TOLERANCE = 1e-9  # relative to the lip's distance: "shock on the lip" below this
#: The kinds of ramp stage: an oblique shock, or an isentropic (Prandtl–Meyer) compression.
STAGE_KINDS = ("shock", "isentropic")


# ------------------------------------------------------------------ plain core


class ShockTrain(NamedTuple):
    """Plain-core result of :func:`ramp_shock_train` (ndarrays; angles in radians).

    Per-ramp arrays have the ramps on the last axis (length n); ``mach`` has
    n + 1 entries: the free stream first, then the flow behind each ramp stage.
    For an isentropic stage ``wave_angle`` is the Mach angle of its first
    characteristic, ``normal_mach`` is 1 and ``detachment_deflection`` the turn
    that would bring the flow to M = 1.
    """

    mach: np.ndarray
    wave_angle: np.ndarray
    normal_mach: np.ndarray
    pressure_ratio: np.ndarray
    stagnation_pressure_ratio: np.ndarray
    detachment_deflection: np.ndarray
    #: static temperature over the free stream's, n + 1 entries like ``mach``
    temperature_ratio: np.ndarray | None = None


def _isentropic_flags(isentropic, n):
    if isentropic is None:
        return np.zeros(n, dtype=bool)
    return np.broadcast_to(np.asarray(isentropic, dtype=bool), (n,))


def ramp_shock_train(M, deflections, gamma=1.4, isentropic=None, *, T=None, gas=None):
    """Plain core: the waves of a train of compression ramps.

    Parameters
    ----------
    M : float or ndarray
        Free-stream Mach number [-].
    deflections : ndarray
        Turn of each ramp [rad], ramps on the last axis; the batch axes
        broadcast with ``M`` and ``gamma``.
    gamma : float or ndarray
        Ratio of specific heats [-].
    isentropic : sequence of bool, optional
        Per ramp: an isentropic (Prandtl–Meyer) compression instead of an
        oblique shock. Default: every ramp a shock.
    T : float or ndarray, optional
        Free-stream static temperature [K], for a thermally perfect ``gas``.
    gas : Gas, optional
        A thermally perfect gas (``gamma`` is then not used): every stage is that gas's
        wave at its own upstream (M, T).

    Returns
    -------
    ShockTrain
        NaN from the first ramp whose turn exceeds the detachment deflection at
        its upstream Mach number (``detachment_deflection`` says which), or, for an
        isentropic stage, the turn that brings the flow to M = 1.

    Notes
    -----
    Shock k sees the flow behind stage k - 1 (Mach M(k-1), already parallel to
    ramp k - 1) and turns it by θk: β(k) from the θ-β-M relation on the weak
    branch, M(k) = Mn2/sin(β - θ) (NACA Report 1135, eqs. 128-150). A zero turn
    gives a Mach wave with no loss. An isentropic stage keeps p0 and lowers the
    Prandtl–Meyer function by θk: ν(M(k)) = ν(M(k-1)) - θk (eq. 171).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.intakes import ramp_shock_train
    >>> train = ramp_shock_train(2.0, np.radians([10.0]))
    >>> round(float(np.degrees(train.wave_angle[0])), 4), round(float(train.mach[1]), 5)
    (39.3139, 1.64052)
    >>> iso = ramp_shock_train(2.0, np.radians([10.0]), isentropic=[True])
    >>> round(float(iso.stagnation_pressure_ratio[0]), 12), round(float(iso.mach[1]), 5)
    (1.0, 1.65142)
    """
    theta = np.atleast_1d(np.asarray(deflections, dtype=float))
    M = np.asarray(M, dtype=float)
    if gas is not None and gas.is_thermally_perfect:
        return _hot_ramp_shock_train(M, np.asarray(T, dtype=float), theta, gas, isentropic)
    gamma = np.asarray(gamma, dtype=float)
    shape = np.broadcast_shapes(M.shape, theta.shape[:-1], gamma.shape)
    n = theta.shape[-1]
    iso = _isentropic_flags(isentropic, n)
    theta = np.broadcast_to(theta, shape + (n,))
    gamma = np.broadcast_to(gamma, shape) if gamma.ndim else gamma
    machs = [np.broadcast_to(M, shape).astype(float)]
    temperatures = [np.ones(shape)]
    columns = {name: [] for name in ShockTrain._fields[1:-1]}
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(n):
            upstream = machs[-1]
            if iso[k]:
                nu = prandtl_meyer_angle(upstream, gamma)
                downstream = mach_from_prandtl_meyer_angle(nu - theta[..., k], gamma)
                beyond = np.isnan(downstream) | (theta[..., k] > nu)
                downstream = np.where(beyond, np.nan, downstream)
                nan = np.isnan(downstream)
                machs.append(downstream)
                columns["wave_angle"].append(mach_angle_of(upstream))
                columns["normal_mach"].append(np.where(nan, np.nan, 1.0))
                columns["pressure_ratio"].append(fan_pressure_ratio(upstream, downstream, gamma))
                columns["stagnation_pressure_ratio"].append(np.where(nan, np.nan, 1.0))
                columns["detachment_deflection"].append(nu)
                h = 0.5 * (gamma - 1.0)
                temperatures.append(temperatures[-1] * (1.0 + h * upstream**2)
                                    / (1.0 + h * downstream**2))
                continue
            theta_max, _ = detachment_angles(upstream, gamma)
            beta = wave_angle_from_deflection(upstream, theta[..., k], gamma)
            ratios = oblique_shock_ratios(upstream, beta, gamma)
            machs.append(ratios.M2)
            temperatures.append(temperatures[-1] * ratios.T2_T1)
            columns["wave_angle"].append(beta)
            columns["normal_mach"].append(ratios.Mn1)
            columns["pressure_ratio"].append(ratios.p2_p1)
            columns["stagnation_pressure_ratio"].append(ratios.p02_p01)
            columns["detachment_deflection"].append(np.broadcast_to(theta_max, shape))
    return ShockTrain(_stack(machs), *(_stack(columns[name]) for name in ShockTrain._fields[1:-1]),
                      _stack(temperatures))


def _stack(arrays):
    return np.stack(np.broadcast_arrays(*arrays), axis=-1)


def _hot_ramp_shock_train(M, T, theta, gas, isentropic):
    """:func:`ramp_shock_train` for a thermally perfect gas: each stage the thermally perfect
    oblique shock (or isentropic compression) at its upstream (M, T)."""
    shape = np.broadcast_shapes(M.shape, T.shape, theta.shape[:-1])
    n = theta.shape[-1]
    iso = _isentropic_flags(isentropic, n)
    theta = np.broadcast_to(theta, shape + (n,))
    machs = [np.broadcast_to(M, shape).astype(float)]
    temperatures = [np.ones(shape)]
    T_now = np.broadcast_to(T, shape).astype(float)
    columns = {name: [] for name in ShockTrain._fields[1:-1]}
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(n):
            upstream = machs[-1]
            if iso[k]:
                wave = tp.isentropic_compression_from_turn(upstream, T_now, -theta[..., k], gas)
                downstream = np.where(theta[..., k] == 0.0, upstream, wave.M2)
                ratio = np.where(theta[..., k] == 0.0, 1.0, wave.T2_T1)
                nan = np.isnan(downstream)
                columns["wave_angle"].append(mach_angle_of(upstream))
                columns["normal_mach"].append(np.where(nan, np.nan, 1.0))
                columns["pressure_ratio"].append(np.where(theta[..., k] == 0.0, 1.0, wave.p2_p1))
                columns["stagnation_pressure_ratio"].append(np.where(nan, np.nan, 1.0))
                columns["detachment_deflection"].append(wave.nu1)
            else:
                shock = tpo.oblique_shock_from_deflection(upstream, T_now, theta[..., k], gas)
                downstream, ratio = shock.M2, shock.T2_T1
                columns["wave_angle"].append(shock.wave_angle)
                columns["normal_mach"].append(shock.Mn1)
                columns["pressure_ratio"].append(shock.p2_p1)
                columns["stagnation_pressure_ratio"].append(shock.p02_p01)
                columns["detachment_deflection"].append(
                    tpo.detachment_angles(upstream, T_now, gas)[0])
            machs.append(downstream)
            temperatures.append(temperatures[-1] * ratio)
            T_now = T_now * ratio
    return ShockTrain(_stack(machs), *(_stack(columns[name]) for name in ShockTrain._fields[1:-1]),
                      _stack(temperatures))


def _direction(angle):
    return np.cos(angle), np.sin(angle)


def _line_parameter(px, py, ux, uy, qx, qy, vx, vy):
    """t such that P + t·u lies on the line through Q with direction v."""
    return ((qx - px) * vy - (qy - py) * vx) / (ux * vy - uy * vx)


class IntakeGeometry(NamedTuple):
    """Plain-core result of :func:`shock_on_lip_geometry` (lengths in the unit of
    ``first_ramp_length``; per-ramp arrays on the last axis).

    ``corner_x``, ``corner_y`` are the n ramp starts (the leading edge first);
    ``ramp_lengths`` run along each ramp surface (an isentropic stage's curved
    wall included), the last one to the entrance plane (the normal dropped from
    the lip onto the last ramp); ``entrance_height`` is the length of that
    normal. ``compression_end_x``, ``compression_end_y`` are where each stage's
    compression ends on the wall: its start for a shock stage, the end of the
    curved wall for an isentropic one (from there the ramp is straight).
    """

    ramp_angle: np.ndarray
    corner_x: np.ndarray
    corner_y: np.ndarray
    ramp_lengths: np.ndarray
    lip_x: np.ndarray
    lip_y: np.ndarray
    entrance_height: np.ndarray
    compression_end_x: np.ndarray
    compression_end_y: np.ndarray


def shock_on_lip_geometry(deflections, wave_angles, first_ramp_length=1.0, *, stage_mach=None,
                          isentropic=None, gamma=1.4):
    """Plain core: ramp lengths and lip position at which every ramp wave meets the lip.

    Parameters
    ----------
    deflections, wave_angles : ndarray
        Turn of each ramp and wave angle of its shock (for an isentropic stage, the
        Mach angle of its first characteristic) relative to its upstream flow [rad]
        at the design Mach number, ramps on the last axis.
    first_ramp_length : float or ndarray
        Length of the first ramp along its surface [any length unit].
    stage_mach : ndarray, optional
        Mach numbers of the train at design (n + 1 entries, free stream first;
        :attr:`ShockTrain.mach`): needed for isentropic stages only.
    isentropic : sequence of bool, optional
        Per ramp: an isentropic compression focused on the lip. The first stage must
        be a shock (it sizes the intake from the leading edge); NaN otherwise.
    gamma : float or ndarray, optional
        Ratio of specific heats [-] (isentropic stages only).

    Returns
    -------
    IntakeGeometry

    Notes
    -----
    Wave k starts at the corner C(k-1) at the angle σk = δ(k-1) + βk to the
    free stream. The lip is where waves 1 and 2 cross; each later corner C(k)
    is where ramp k's surface meets the line drawn back from the lip at σ(k+1).
    The last ramp ends at the entrance plane, the normal from the lip to its
    surface (where the terminal shock stands); that also places the lip of a
    single-ramp intake, on the shock above the ramp's end. Because σ(k+1) > σk always (a shock is
    slower than the Mach waves behind it), every length comes out positive,
    unless two ramps in a row have zero turn (parallel Mach waves: NaN).

    An isentropic stage k is a centred compression centred on the lip: its wall
    runs from C(k-1) (on its first characteristic through the lip) to the point
    at distance r(M(k)) = |lip - C(k-1)| · [(1 + hM(k)²)/(1 + hM(k-1)²)]^((γ+1)/(2(γ-1)))
    from the lip on the last characteristic, σ = δk + μ(M(k))
    (:mod:`gasdyn2d.design.intake_waves`); then the ramp is straight at δk.

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
    iso = _isentropic_flags(isentropic, n)
    theta = np.broadcast_to(theta, shape + (n,))
    beta = np.broadcast_to(beta, shape + (n,))
    length = np.broadcast_to(length, shape)
    delta = np.cumsum(theta, axis=-1)
    upstream_delta = delta - theta
    sigma = upstream_delta + beta
    if iso.any():
        mach = np.broadcast_to(np.asarray(stage_mach, dtype=float), shape + (n + 1,))
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
        if iso[0]:  # a first isentropic stage cannot be sized from the leading edge
            lip_x, lip_y = lip_x * np.nan, lip_y * np.nan
        zero = np.zeros(shape)
        starts_x, starts_y, ends_x, ends_y, lengths = [zero], [zero], [zero], [zero], [length]
        straight = length  # the straight part of the ramp before the next corner
        for k in range(1, n):
            px = ends_x[-1] + straight * np.cos(delta[..., k - 1])
            py = ends_y[-1] + straight * np.sin(delta[..., k - 1])
            starts_x.append(px)
            starts_y.append(py)
            arc = 0.0
            if iso[k]:
                r0 = np.hypot(lip_x - px, lip_y - py)
                r_end = r0 * isentropic_radius_ratio(mach[..., k], mach[..., k + 1], gamma)
                tail = delta[..., k] + mach_angle_of(mach[..., k + 1])
                px, py = lip_x - r_end * np.cos(tail), lip_y - r_end * np.sin(tail)
                arc = isentropic_arc_length(r0, mach[..., k], mach[..., k + 1], gamma)
            ends_x.append(px)
            ends_y.append(py)
            rx, ry = _direction(delta[..., k])
            if k < n - 1:
                vx, vy = _direction(sigma[..., k + 1])
                straight = _line_parameter(px, py, rx, ry, lip_x, lip_y, vx, vy)
            else:  # to the foot of the normal from the lip: the entrance plane
                straight = (lip_x - px) * rx + (lip_y - py) * ry
            lengths.append(arc + straight)
        last = delta[..., -1]
        entrance = (lip_y - ends_y[-1]) * np.cos(last) - (lip_x - ends_x[-1]) * np.sin(last)
    stack = lambda arrays: np.stack(np.broadcast_arrays(*arrays), axis=-1)  # noqa: E731
    return IntakeGeometry(delta, stack(starts_x), stack(starts_y), stack(lengths), lip_x, lip_y,
                          entrance, stack(ends_x), stack(ends_y))


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

    Per-stage fields have the stages on the last axis (``ramp``, n entries): the
    n ramp waves; the fields of length n + 1 (``shock``) have the terminal normal
    shock last; the merging fields (``ramp_pair``, n - 1 entries) describe ramp
    waves k and k + 1 meeting ahead of the cowl off design. Angles are in radians
    (Quantities in the caller's angle unit when the deflections were Quantities);
    lengths are in metres, or in the unit of ``first_ramp_length`` when it was a
    Quantity (plain numbers: the unit of the plain first_ramp_length).

    For a drawing: the ramp wall runs through ``corner_x/y`` (each stage's start),
    ``compression_end_x/y`` (the end of an isentropic stage's curved wall, whose
    points :func:`gasdyn2d.design.intake_waves.isentropic_ramp_contour` gives with
    the lip as focus at ``design_mach``) and on straight at ``ramp_angles`` for
    ``ramp_lengths``. Ramp wave k leaves ``corner_x/y[k]`` at ``ramp_angles[k-1] +
    wave_angles[k]`` from the free stream; where ``merges[k]`` it ends at
    ``merge_x/y[k]``, as does wave k + 1, and from there run the merged shock (at
    ``merged_wave_angle``), the slip line (at ``slip_direction``) and the reflected
    wave (at ``reflected_wave_angle``). An isentropic stage whose characteristics
    cross ahead of the cowl has ``compression_coalesces`` and the point
    ``coalescence_x/y`` where the shock forms.
    """

    M: FloatArray = unit_field("", "free-stream Mach number")
    design_mach: FloatArray = unit_field("", "Mach number at which every ramp wave meets the lip")
    deflections: FloatArray = unit_field("rad", "turn of each ramp", trailing="ramp")
    ramp_angles: FloatArray = unit_field("rad", "ramp surface inclination to the free stream",
                                         trailing="ramp")
    stage_mach: FloatArray = unit_field("", "Mach number behind each ramp stage", trailing="ramp")
    wave_angles: FloatArray = unit_field(
        "rad", "angle of each ramp shock (isentropic stage: first characteristic) to its "
        "upstream flow", trailing="ramp")
    normal_mach: FloatArray = unit_field("", "upstream normal Mach number of every wave",
                                         trailing="shock")
    pressure_ratios: FloatArray = unit_field("", "static pressure ratio across every wave",
                                             trailing="shock")
    stagnation_pressure_ratios: FloatArray = unit_field("", "p0 ratio across every wave",
                                                        trailing="shock")
    terminal_mach: FloatArray = unit_field("", "subsonic Mach number behind the terminal shock")
    recovery: FloatArray = unit_field("", "overall stagnation-pressure ratio p0(out)/p0(free stream)")
    static_pressure_rise: FloatArray = unit_field("", "static pressure out over free-stream static")
    ramp_lengths: FloatArray = unit_field("m", "length of each ramp along its surface",
                                          trailing="ramp")
    lip_x: FloatArray = unit_field("m", "cowl lip, streamwise from the leading edge")
    lip_y: FloatArray = unit_field("m", "cowl lip height above the leading edge (capture height)")
    entrance_height: FloatArray = unit_field("m", "lip to last ramp surface, normal to it")
    shock_lead: FloatArray = unit_field("m", "how far each ramp wave is ahead of the lip",
                                        trailing="ramp")
    shock_enters_cowl: FloatArray = unit_field("", "ramp wave passes behind the lip", dtype=bool,
                                               trailing="ramp")
    mass_flow_ratio: FloatArray = unit_field("", "captured over geometric-capture mass flow, <= 1")
    separation_pressure_ratios: FloatArray = unit_field("", "Korkegi estimate per shock",
                                                        trailing="shock")
    separation_risk: FloatArray = unit_field("", "shock pressure rise above the estimate",
                                             dtype=bool, trailing="shock")
    stages: np.ndarray = unit_field("", "kind of each ramp stage: shock or isentropic",
                                    dtype=str, trailing="ramp")
    corner_x: FloatArray = unit_field("m", "start of each ramp stage on the wall", trailing="ramp")
    corner_y: FloatArray = unit_field("m", "start of each ramp stage on the wall", trailing="ramp")
    compression_end_x: FloatArray = unit_field(
        "m", "end of each stage's compression on the wall (its start for a shock stage)",
        trailing="ramp")
    compression_end_y: FloatArray = unit_field(
        "m", "end of each stage's compression on the wall (its start for a shock stage)",
        trailing="ramp")
    compression_coalesces: FloatArray = unit_field(
        "", "an isentropic stage's characteristics cross ahead of the cowl (a shock forms)",
        dtype=bool, trailing="ramp")
    coalescence_x: FloatArray = unit_field("m", "where they first cross (NaN if not ahead)",
                                           trailing="ramp")
    coalescence_y: FloatArray = unit_field("m", "where they first cross (NaN if not ahead)",
                                           trailing="ramp")
    merges: FloatArray = unit_field("", "ramp shocks k and k+1 meet outside the duct",
                                    dtype=bool, trailing="ramp_pair")
    merge_x: FloatArray = unit_field("m", "where they meet (NaN if they do not)",
                                     trailing="ramp_pair")
    merge_y: FloatArray = unit_field("m", "where they meet (NaN if they do not)",
                                     trailing="ramp_pair")
    merged_wave_angle: FloatArray = unit_field("rad", "merged shock angle from the free stream",
                                               trailing="ramp_pair")
    merged_turn: FloatArray = unit_field("rad", "flow turn across the merged shock",
                                         trailing="ramp_pair")
    merged_mach: FloatArray = unit_field("", "Mach number behind the merged shock",
                                         trailing="ramp_pair")
    merged_pressure_ratio: FloatArray = unit_field(
        "", "static pressure behind the merged shock over free-stream static", trailing="ramp_pair")
    merged_recovery: FloatArray = unit_field(
        "", "stagnation pressure behind the merged shock over free-stream p0", trailing="ramp_pair")
    reflected_kind: FloatArray = unit_field("", "wave sent back from the merge: shock or fan",
                                            dtype=str, trailing="ramp_pair")
    reflected_turn: FloatArray = unit_field("rad", "signed flow turn across the reflected wave",
                                            trailing="ramp_pair")
    reflected_wave_angle: FloatArray = unit_field(
        "rad", "reflected shock (or fan head) from the free stream", trailing="ramp_pair")
    slip_direction: FloatArray = unit_field("rad", "slip line from the merge, from the free stream",
                                            trailing="ramp_pair")
    slip_line_enters_cowl: FloatArray = unit_field(
        "", "the slip line passes below the lip (into the intake)", dtype=bool,
        trailing="ramp_pair")
    reflected_enters_cowl: FloatArray = unit_field(
        "", "the reflected wave passes below the lip (into the intake)", dtype=bool,
        trailing="ramp_pair")


_CASE_FIELDS = tuple(f for f in result_fields(RampIntake) if f.name != "stages")


def _take_ramps(call, deflections):
    """Take the ramp turns as n case arguments ``deflections[k]`` (the last axis split), so
    that each broadcasts with M like any case argument; returns n."""
    if deflections is None:
        raise InvalidInputError("deflections is required; got None.")
    if isinstance(deflections, (str, bytes, bool, np.bool_, complex)):
        raise refuse_type("deflections", deflections, "a sequence of ramp turns")
    module = type(deflections).__module__.partition(".")[0]
    if module == "pandas":
        raise InvalidInputError(
            "deflections must be a list or array with the ramps on the last axis (or a "
            "DataArray with a 'ramp' dimension); a pandas object is ambiguous here. Give "
            "the ramp turns of each case as a row of a 2-D array.")
    if module == "xarray":
        dim = "ramp" if "ramp" in deflections.dims else deflections.dims[-1]
        parts = [deflections.isel({dim: k}, drop=True) for k in range(deflections.sizes[dim])]
    elif isinstance(deflections, (list, tuple)) and any(is_quantity(d) for d in deflections):
        parts = list(deflections)  # one Quantity per ramp
    elif is_quantity(deflections) or module == "dask" or isinstance(deflections, np.ndarray):
        parts = [deflections] if np.ndim(deflections) == 0 else [
            deflections[..., k] for k in range(deflections.shape[-1])]
    else:
        array = np.asarray(deflections) if isinstance(deflections, (list, tuple)) else deflections
        parts = [array] if np.ndim(array) == 0 else [array[..., k] for k in range(array.shape[-1])]
    if not parts:
        raise InvalidInputError("deflections must hold at least one ramp turn; got none.")
    for k, part in enumerate(parts):
        call.take(f"deflections[{k}]", part, "rad")
    return len(parts)


def _stage_kinds(stages, n):
    if stages is None:
        return ("shock",) * n
    if isinstance(stages, str) or not isinstance(stages, (list, tuple)):
        raise InvalidInputError(
            f"stages must be a list of 'shock' or 'isentropic', one per ramp; got {stages!r}.")
    if len(stages) != n:
        raise InvalidInputError(
            f"stages must name one kind per ramp ({n} ramps); got {len(stages)}: {stages!r}.")
    kinds = tuple(choice(f"stages[{k}]", kind, {name: name for name in STAGE_KINDS})
                  for k, kind in enumerate(stages))
    if kinds[0] != "shock":
        raise InvalidInputError(
            "stages[0] must be 'shock': the first ramp starts at the sharp leading edge, and "
            "the intake is sized from it (give a small first turn for a nearly isentropic "
            "intake).")
    return kinds


def _checked_turns(thetas, check):
    """Reject negative turns and two zero turns in a row (NaN under errors='nan')."""
    out = []
    for k, theta in enumerate(thetas):
        with np.errstate(invalid="ignore"):
            theta = check.reject(theta < 0, theta, f"deflections[{k}]",
                                 f">= 0 (ramp {k + 1} must compress the flow)", unit_text="rad")
            if k:
                theta = check.reject(
                    (theta == 0) & (out[-1] == 0), theta, f"deflections[{k}]",
                    f"> 0 when deflections[{k - 1}] is 0", unit_text="rad",
                    hint="Two zero turns in a row make parallel Mach waves that never meet at a "
                         "lip; merge the two ramps into one.")
        out.append(theta)
    return np.stack(out, axis=-1)


def _attached_train(M, theta, gamma, check, mach_name, iso, hot=None):
    """The wave train, every ramp checked against detachment (or, for an isentropic stage,
    against reaching M = 1) at its stage's Mach number. A failing stage is NaN in the
    train and so is every later one; under 'raise' the first failing ramp is named.
    ``hot``: (thermally perfect gas, free-stream T) or None."""
    train = _train(M, theta, gamma, iso, hot)
    theta = np.array(theta, dtype=float)
    for k in range(theta.shape[-1]):
        upstream, theta_max = train.mach[..., k], train.detachment_deflection[..., k]
        with np.errstate(invalid="ignore"):
            bad = ~(theta[..., k] <= theta_max) & ~np.isnan(upstream) & ~np.isnan(theta[..., k])
        limit, hint = None, ""
        if not check.nan and bad.any():
            index = tuple(np.argwhere(bad)[0]) if bad.ndim else ()
            stage_mach = float(upstream[index])
            if iso[k] and stage_mach >= 1.0:
                limit = theta_max
                hint = (f"Ramp {k + 1} (isentropic) sees the flow at M = {stage_mach:.6g} "
                        f"({mach_name} {float(M[index]):.6g}); a larger turn would compress it "
                        f"below M = 1. Lower the turn of ramp {k + 1} or of the ramps ahead.")
            elif stage_mach >= 1.0:
                limit = theta_max
                hint = (f"Ramp {k + 1} sees the flow at M = {stage_mach:.6g} ({mach_name} "
                        f"{float(M[index]):.6g}); above θmax no attached shock exists. Lower "
                        f"the turn of ramp {k + 1} or of the ramps ahead of it.")
            else:
                hint = (f"The flow behind ramp {k} is subsonic (M = {stage_mach:.6g}) at "
                        f"{mach_name} {float(M[index]):.6g}, so ramp {k + 1} cannot start an "
                        f"attached shock. Lower the turns of the ramps ahead of it.")
        requirement = (f"at most the turn that brings ramp {k + 1}'s flow to M = 1"
                       if iso[k] else f"at most the detachment deflection of ramp {k + 1} at "
                       "its upstream Mach number")
        theta[..., k] = check.reject(bad, theta[..., k], f"deflections[{k}]", requirement,
                                     limit=limit, unit_text="rad",
                                     error_class=DetachedShockError, hint=hint)
    return theta, train


def _train(M, theta, gamma, iso, hot):
    if hot is None:
        return ramp_shock_train(M, theta, gamma, iso)
    return ramp_shock_train(M, theta, isentropic=iso, T=hot[1], gas=hot[0])


def _ramp_intake_core(*args, n, has_design, terminal, iso, has_T=False, gas=None):
    """Checked core of :func:`ramp_intake` (floats or arrays): the fields in order.

    ``args`` are M, the n ramp turns, design_mach (if given), first_ramp_length, gamma,
    the free-stream temperature T (if ``has_T``) and the Check. A single case (floats)
    runs as one-element arrays. ``gas``: a thermally perfect gas (T then given).
    """
    *values, check = args
    T = values.pop() if has_T else None
    scalar = all(type(v) is float for v in values[:-1]) and (T is None or type(T) is float)
    gamma = check.gamma(values[-1])
    length = values[-2]
    M, thetas = values[0], values[1:1 + n]
    design = values[1 + n] if has_design else None
    if scalar:
        M, length = np.array([M]), np.array([length])
        thetas = [np.array([t]) for t in thetas]
        design = None if design is None else np.array([design])
        T = None if T is None else np.array([T])
    M = check.at_least(M, "M", 1.0, inclusive=False, what="supersonic flow")
    if design is not None:
        design = check.at_least(design, "design_mach", 1.0, inclusive=False,
                                what="supersonic flow")
    length = check.positive(length, "first_ramp_length", "m", what="a ramp length")
    if T is not None:
        T = check.positive(T, "T", "K", what="the free-stream static temperature")
        M = np.where(np.isnan(T), np.nan, M)  # NaN in, NaN out (before the trains' checks)
    hot = None if gas is None else (gas, T)
    theta = _checked_turns(thetas, check)
    gamma_a = np.asarray(gamma, dtype=float)
    theta, train = _attached_train(M, theta, gamma_a, check, "free-stream M", iso, hot)
    design_train = train
    if design is not None:  # a thermally perfect design point: the same static temperature
        theta, design_train = _attached_train(design, theta, gamma_a, check, "design_mach", iso,
                                              hot)
    else:
        design = M
    case_nan = np.isnan(M) | np.isnan(design) | np.isnan(length) | np.isnan(gamma_a)
    case_nan |= np.isnan(theta).any(axis=-1)
    if T is not None:
        case_nan |= np.isnan(T)
    if case_nan.any():  # blank whole cases: every field of a rejected case is NaN
        M, design = np.where(case_nan, np.nan, M), np.where(case_nan, np.nan, design)
        theta = np.where(case_nan[..., None], np.nan, theta)
        train = _train(M, theta, gamma_a, iso, hot)
        design_train = _train(design, theta, gamma_a, iso, hot)
    fields = _assemble(M, design, theta, length, gamma_a, terminal, train, design_train, iso,
                       hot)
    if scalar:
        return tuple(f[0] for f in fields)
    return fields


def _terminal_shock(last, gamma, train, hot):
    """The normal shock at the Mach number (and temperature) behind the last ramp."""
    if hot is None:
        return normal_shock_ratios((last - 1.0) * (last + 1.0), gamma)
    gas, T = hot
    return tps.normal_shock_ratios(last, T * train.temperature_ratio[..., -1], gas)


def _assemble(M, design, theta, length, gamma, terminal, train, design_train, iso, hot=None):
    geometry = shock_on_lip_geometry(theta, design_train.wave_angle, length,
                                     stage_mach=design_train.mach, isentropic=iso, gamma=gamma)
    capture = lip_streamline_capture(geometry, train.wave_angle)
    last = train.mach[..., -1]
    with np.errstate(invalid="ignore"):
        ns = _terminal_shock(last, gamma, train, hot)
        if not terminal:
            ns = ns._replace(**{k: np.full_like(last, np.nan) for k in ns._fields})
        shock_machs = np.concatenate([train.normal_mach, last[..., None] + 0.0 * ns.M2[..., None]],
                                     axis=-1)
        p_ratios = np.concatenate([train.pressure_ratio, ns.p2_p1[..., None]], axis=-1)
        p0_ratios = np.concatenate([train.stagnation_pressure_ratio, ns.p02_p01[..., None]],
                                   axis=-1)
        counted = p0_ratios if terminal else p0_ratios[..., :-1]
        counted_p = p_ratios if terminal else p_ratios[..., :-1]
        ahead = np.concatenate([train.mach[..., :-1], last[..., None]], axis=-1)
        separation = incipient_separation_pressure_ratio(ahead)
        risk = p_ratios > separation
        risk[..., :-1] &= ~iso  # an isentropic compression has no shock to separate at
        lip_distance = np.hypot(geometry.lip_x, geometry.lip_y)
        enters = capture.shock_lead < -_ON_LIP_TOLERANCE * lip_distance[..., None]
        on_design = np.all(np.abs(capture.shock_lead)
                           <= _ON_LIP_TOLERANCE * lip_distance[..., None], axis=-1)
        ratio = np.where(on_design, 1.0, capture.captured_height / geometry.lip_y)
    coalescence = _coalescence(geometry, theta, train, design_train, gamma, iso, lip_distance)
    merging = _merging(geometry, theta, train, gamma, iso, lip_distance, hot)
    return (M, design, theta, geometry.ramp_angle, train.mach[..., 1:], train.wave_angle,
            shock_machs, p_ratios, p0_ratios, ns.M2, np.prod(counted, axis=-1),
            np.prod(counted_p, axis=-1), geometry.ramp_lengths, geometry.lip_x, geometry.lip_y,
            geometry.entrance_height, capture.shock_lead, enters, ratio, separation, risk,
            geometry.corner_x, geometry.corner_y, geometry.compression_end_x,
            geometry.compression_end_y, *coalescence, *merging)


def _coalescence(geometry, theta, train, design_train, gamma, iso, lip_distance):
    """Per stage: do an isentropic stage's characteristics cross ahead of the cowl, and where."""
    shape = theta.shape
    flag = np.zeros(shape, dtype=bool)
    x, y = np.full(shape, np.nan), np.full(shape, np.nan)
    upstream = geometry.ramp_angle - theta
    for k in np.flatnonzero(iso):
        point = first_coalescence(
            geometry.corner_x[..., k], geometry.corner_y[..., k], geometry.lip_x, geometry.lip_y,
            upstream[..., k], design_train.mach[..., k], train.mach[..., k], theta[..., k], gamma)
        with np.errstate(invalid="ignore"):
            ahead = point.x < geometry.lip_x - _ON_LIP_TOLERANCE * lip_distance
        flag[..., k] = ahead
        x[..., k] = np.where(ahead, point.x, np.nan)
        y[..., k] = np.where(ahead, point.y, np.nan)
    return flag, x, y


def _merging(geometry, theta, train, gamma, iso, lip_distance, hot=None):
    """Per pair of successive shock stages: where they meet outside the duct (ahead of the lip
    plane or above the lip), and the merged shock, reflected wave and slip line there
    (:func:`gasdyn2d.merging_shocks`, with the stage temperatures for a thermally perfect
    gas, ``hot`` = (gas, free-stream T))."""
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
        slack = _ON_LIP_TOLERANCE * lip_distance
        with np.errstate(invalid="ignore"):
            outside_duct = (meet.x < geometry.lip_x - slack) | (meet.y > geometry.lip_y + slack)
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
def ramp_intake(M: ArrayInput, deflections: ArrayInput, *, design_mach: ArrayInput = None,
                first_ramp_length: ArrayInput = 1.0, terminal: str = "normal", stages=None,
                T: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                errors: str = "raise") -> RampIntake:
    """Flow, losses and shock-on-lip geometry of a planar external-compression ramp intake.

    Parameters
    ----------
    M : float, array_like, DataArray, Series, dask array or FlowState
        Free-stream Mach number [-], > 1; or the free stream as a
        :class:`~gasdyn2d.FlowState` (its M, T and gas; its direction is not used).
    deflections : array_like or Quantity
        Turn of each ramp [rad] (n values, first ramp first, each >= 0); a
        2-D array gives one set of ramps per row, broadcasting with ``M``. A
        list of angle Quantities is accepted, and a DataArray whose ``ramp``
        dimension (or last one) holds the ramps; pandas objects are refused
        (ambiguous).
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
    stages : sequence of {"shock", "isentropic"}, optional
        Kind of each ramp stage (default: every one a shock). An isentropic stage
        is a concave ramp whose Prandtl–Meyer compression is focused on the lip at
        ``design_mach``; the first stage must be a shock. Not yet with a thermally
        perfect gas (the focused wall is a perfect-gas closed form).
    T : float, array_like or Quantity, optional
        Free-stream static temperature [K], > 0: required for a thermally perfect ``gas``
        (the geometry at ``design_mach`` is then built at the same static temperature, as
        for a vehicle at one altitude); with a perfect gas it is checked and broadcast,
        and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). With a thermally perfect gas every
        ramp shock, the terminal shock and the merging shocks are that gas's at the local
        temperature.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for cases with invalid inputs instead of raising.

    Returns
    -------
    RampIntake
        Immutable (read-only arrays, no shared memory), in the inputs' container:
        floats for a single case; DataArrays with the inputs' dimensions (per-ramp
        fields add ``ramp``, ``shock`` or ``ramp_pair``); Series on the input's index
        (per-ramp fields as DataFrames); lazy dask arrays, computed blockwise.

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

    **Merging shocks.** Off design two successive ramp shocks meet short of the
    lip (at design they meet on it). Where they meet outside the duct (ahead of the
    lip plane, or above the lip) they merge (:func:`gasdyn2d.merging_shocks`, in the frame of the flow ahead of
    the first): the merged shock runs on outward, a weak reflected wave (shock or
    fan) and a slip line run downstream; the result gives where (``merge_x``,
    ``merge_y``), the merged shock's angle and the state behind it, and whether the
    slip line and the reflected wave pass below the lip into the intake. Below
    design the merge lies above the lip, in the spilled flow; above design the
    shocks can meet below the lip, and the merged shock, the slip line and the
    reflected wave then enter the cowl. The spillage estimate traces the lip
    streamline through the single shocks, and the recovery is that of the stream
    below the merge, which holds while the merge lies above the lip streamline
    (the tests check typical layouts). With three or more ramps each successive
    pair is treated on its own.

    **Isentropic stages.** ν falls by the turn and p0 is kept; at ``design_mach``
    the compression is focused on the lip and exact. Off design the built wall's
    characteristics cross: ``compression_coalesces`` flags a stage where they first
    cross ahead of the lip plane (a shock forms there, which the model does not
    follow; the stage's numbers are then those of the isentropic compression), and
    the spillage trace turns the flow on the stage's first characteristic (exact at
    design, an approximation off it).

    ``separation_risk`` compares each shock's pressure ratio with Korkegi's
    incipient-separation estimate for turbulent boundary layers at the Mach
    number ahead of it (:func:`incipient_separation_pressure_ratio`).

    Inviscid, perfect or thermally perfect gas (no dissociation): boundary layers, bleed
    and shock–boundary-layer interaction decide how a real intake performs.

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
    terminal = choice("terminal", terminal, {"normal": True, "none": False})
    if isinstance(M, FlowState):
        given = [k for k, v in (("T", T), ("gamma", gamma), ("gas", gas)) if v is not None]
        if given:
            raise InvalidInputError(
                f"ramp_intake takes the free stream as a FlowState or as M with T, gamma and "
                f"gas; got a FlowState and {', '.join(given)}. Set them on the FlowState.")
        state: FlowState = M
        M, T, gas = state.M, state.T, state.gas
    gamma, hot = gas_of_call("ramp_intake", gamma, gas, T, "T", "free-stream static temperature")
    call = Call(errors)
    call.take("M", M)
    n = _take_ramps(call, deflections)
    kinds = _stage_kinds(stages, n)
    if hot is not None and "isentropic" in kinds:
        raise InvalidInputError(
            "stages: an 'isentropic' stage does not support a thermally perfect gas yet (its "
            "focused wall, arc length and coalescence point are perfect-gas closed forms); "
            "give shock stages, or a perfect gas.")
    has_design = design_mach is not None
    if has_design:
        call.take("design_mach", design_mach)
    call.take("first_ramp_length", first_ramp_length, "m")
    call.take("gamma", gamma if hot is None else hot.gamma, keep_scalar=True)
    if T is not None:
        call.take("T", T, "K")
    for name, size in (("ramp", n), ("shock", n + 1), ("ramp_pair", n - 1)):
        call.trailing(name, size)
    iso = np.array([kind == "isentropic" for kind in kinds])
    values = dict(zip((f.name for f in _CASE_FIELDS), call.evaluate(
        _CASE_FIELDS, _ramp_intake_core, n=n, has_design=has_design, terminal=terminal,
        iso=iso, has_T=T is not None, gas=hot)))
    values["stages"] = np.array(kinds)
    values["stages"].flags.writeable = False
    return RampIntake.from_fields([values[f.name] for f in result_fields(RampIntake)])
