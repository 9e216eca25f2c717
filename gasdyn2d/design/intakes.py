"""Planar external-compression ramp intakes: shock trains, shock-on-lip geometry, spillage.

A ramp intake turns the free stream through a sequence of planar compression
ramps, each starting an oblique shock (or, for an isentropic stage, a
Prandtl–Meyer compression focused on the cowl lip), and ends the supersonic
compression with a terminal normal shock at the cowl lip. This module gives the
flow through that wave train, the ramp and cowl-lip geometry that focuses every
ramp wave on the lip at the design Mach number, the spillage of that fixed
geometry off design, the ramp shocks that merge ahead of the cowl off design,
and a flag for shocks strong enough to separate a turbulent boundary layer.

Unit boundary: :func:`ramp_intake` (result :class:`RampIntake`), in this module. Its
plain core lives beside it, and the first four modules' plain cores are re-exported here
under the paths they always had (``gasdyn2d.design.intakes.<name>``):

- :mod:`gasdyn2d.design.ramp_trains` —
  :func:`~gasdyn2d.design.ramp_trains.ramp_shock_train`, the Mach number, wave angle,
  normal Mach number and pressure ratios behind each ramp stage, and
  :func:`~gasdyn2d.design.ramp_trains.incipient_separation_pressure_ratio`, Korkegi's
  estimate of the pressure rise that starts turbulent separation;
- :mod:`gasdyn2d.design.intake_geometry` —
  :func:`~gasdyn2d.design.intake_geometry.shock_on_lip_geometry`, the ramp corners, ramp
  lengths and the lip, and :func:`~gasdyn2d.design.intake_geometry.lip_streamline_capture`,
  where each wave crosses the lip height and the captured free-stream height, for any
  Mach number with the geometry fixed;
- :mod:`gasdyn2d.design.intake_off_design` — ramp shocks that merge ahead of the cowl,
  and isentropic compressions whose characteristics cross ahead of it;
- :mod:`gasdyn2d.design.intake_waves` — the isentropic stage's wall and where its
  characteristics cross, and where two ramp waves meet.

The optimum ramps and the starting limits of internal contraction live in
:mod:`gasdyn2d.design.intake_design`.

Coordinates: the first ramp's leading edge is the origin, the free stream runs
along +x, and the ramps turn the flow towards +y (the cowl side). Ramp k's
surface is inclined at the ramp angle δk = θ1 + ... + θk to the free stream.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary import Call, ResultTable, choice, refuse_type, unit_field
from ..boundary.results import result_fields
from ..boundary.types import ArrayInput, FloatArray
from ..boundary.units import is_quantity
from ..errors import DetachedShockError, InvalidInputError
from ..relations import thermally_perfect_shocks as tps
from ..relations.flow_state import FlowState
from ..relations.gas import gas_of_call
from ..relations.normal_shocks import normal_shock_ratios
from .intake_geometry import (
    IntakeGeometry,
    LipCapture,
    lip_streamline_capture,
    shock_on_lip_geometry,
)
from .intake_off_design import compression_coalescence, ramp_shock_mergers
from .ramp_trains import ShockTrain, incipient_separation_pressure_ratio, ramp_shock_train

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

_ON_LIP_TOLERANCE = 1e-9  # relative to the lip's distance: "shock on the lip" below this
#: The kinds of ramp stage: an oblique shock, or an isentropic (Prandtl–Meyer) compression.
STAGE_KINDS = ("shock", "isentropic")


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
    lip_slack = _ON_LIP_TOLERANCE * lip_distance
    coalescence = compression_coalescence(geometry, theta, train, design_train, gamma, iso,
                                          lip_slack)
    merging = ramp_shock_mergers(geometry, theta, train, gamma, iso, lip_slack, hot)
    return (M, design, theta, geometry.ramp_angle, train.mach[..., 1:], train.wave_angle,
            shock_machs, p_ratios, p0_ratios, ns.M2, np.prod(counted, axis=-1),
            np.prod(counted_p, axis=-1), geometry.ramp_lengths, geometry.lip_x, geometry.lip_y,
            geometry.entrance_height, capture.shock_lead, enters, ratio, separation, risk,
            geometry.corner_x, geometry.corner_y, geometry.compression_end_x,
            geometry.compression_end_y, *coalescence, *merging)


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
