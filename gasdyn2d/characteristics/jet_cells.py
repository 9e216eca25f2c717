"""Shock cells of a planar jet from a slot, marched cell after cell with fitted shocks.

Unit boundary: :func:`slot_jet_cells` (under- or over-expanded); result
:class:`SlotJetCells`. The plain core is
:func:`gasdyn2d.characteristics.fitted_jets.march_fitted_jet`.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..boundary.results import ResultTable, unit_field
from ..relations.isentropic import mach_from_pressure_ratio, pressure_ratio
from .design_calls import DesignCall, frozen_array
from .fitted_jets import JetMarch, march_fitted_jet
from .fitted_shocks import FittedMarch, FittedShock
from .jets import jet_inputs, linear_cell_length, linear_extrema, underexpanded_slot_jet
from .unit_processes import ROUND_LINE_LIMIT, CharacteristicNet, check_geometry

__all__ = ["slot_jet_cells", "SlotJetCells"]

#: the march of a jet whose flow input was NaN: no stations, NaN where it stopped
_NAN_JET = JetMarch(FittedMarch(np.empty(0), [], [], [], [], [], [], "nan",
                                (math.nan, math.nan)),
                    np.empty(0), np.empty(0), np.empty(0), math.nan)


@dataclasses.dataclass(frozen=True, repr=False)
class SlotJetCells(ResultTable):
    """Upper half of a planar jet marched through its shock cells (centreline y = 0, lip
    at (0, ``slot_half_height``)).

    Lengths are in the unit of ``slot_half_height`` (a Quantity if it was one). A cell
    ends where the jet boundary is narrowest (its angle turns from inward to outward);
    an under-expanded jet's first cell begins at the lip.
    """

    mach_exit: float = unit_field("")  #: Mach number at the slot exit
    mach_jet: float = unit_field("")  #: fully expanded Mach number (at ambient pressure)
    p_exit_p_ambient: float = unit_field("")  #: exit-to-ambient pressure ratio
    lip_turn: float = unit_field("rad", "turn of the boundary at the lip, > 0 outward")
    stop_reason: str = unit_field("", "'cells' (all asked for), 'mach_disc', 'sonic', "
                                  "'shock_crossing', 'slip_line', 'length' or 'nan'",
                                  dtype=str)
    stop_x: float = unit_field("m", "where the march stopped short (NaN at 'cells')")
    stop_y: float = unit_field("m")
    cell_lengths: np.ndarray = unit_field("m", "computed length of each complete cell")
    #: linear theory's cell, 2h√(Mj² - 1) with h = 2b; round, π D√(Mj² - 1)/j0 (Prandtl
    #: 1904; Pack 1950)
    cell_length_linear: float = unit_field("m")
    narrowest_x: np.ndarray = unit_field("m", "where the boundary is narrowest (cell ends)")
    #: linear theory's narrowest points (:func:`~gasdyn2d.characteristics.jets.linear_extrema`)
    narrowest_x_linear: np.ndarray = unit_field("m")
    widest_x: np.ndarray = unit_field("m", "where the boundary is widest, one per cell")
    widest_x_linear: np.ndarray = unit_field("m", "linear theory's widest points")
    widest_half_width: np.ndarray = unit_field("m", "the half-width there")
    boundary_x: np.ndarray = unit_field("m", "jet boundary (constant pressure), one point "
                                        "per marching station")
    boundary_y: np.ndarray = unit_field("m")
    boundary_theta: np.ndarray = unit_field("rad")
    centreline_p_p0: np.ndarray = unit_field("", "static pressure on the centreline over "
                                             "the exit stagnation pressure")
    #: the fitted shocks (:class:`~gasdyn2d.characteristics.fitted_shocks.FittedShock`) in
    #: the order they start; a reflection from the centreline starts a new entry
    shocks: tuple = dataclasses.field(default=(), metadata={"unit": ""}, repr=False)
    #: the marching stations' nodes (x = const lines, centreline to boundary, a shock point
    #: twice); no characteristic segments
    net: CharacteristicNet | None = dataclasses.field(default=None, metadata={"unit": ""},
                                                      repr=False)
    geometry: str = unit_field("", "'planar' (a slot) or 'axisymmetric' (a round jet)",
                               default="planar")
    #: where the first shock of an under-expanded jet forms: the first fold of its
    #: characteristic net (``underexpanded_slot_jet``'s ``shock_x``, ``shock_y``); the march
    #: starts a shock there (NaN for an over-expanded jet, whose lip shocks start at the lip)
    shock_forms_x: float = unit_field("m", default=float("nan"))
    shock_forms_y: float = unit_field("m", default=float("nan"))


def slot_jet_cells(M_exit, p_exit_p_ambient, *, n_points=81, n_cells=2, gamma=1.4,
                   slot_half_height=0.01, geometry="planar"):
    """Shock cells of a planar jet leaving a slot, marched with fitted shocks.

    The jet's constant-pressure boundary is a boundary of the shock-fitted space march
    (:mod:`gasdyn2d.characteristics.fitted_jets`); shocks reflect regularly from the
    centreline and end at the boundary, which reflects them as fans. Cells are computed
    one after another, not extrapolated from the first.

    Parameters
    ----------
    M_exit : float
        Uniform, parallel Mach number at the slot exit [-], > 1.
    p_exit_p_ambient : float
        Exit-to-ambient static pressure ratio [-]: > 1 under-expanded (lip fans),
        < 1 over-expanded (lip shocks).
    n_points : int, optional
        Nodes across the jet's half-width (target spacing half-width/(n_points - 1));
        81 by default, where a cell is good to about 0.1 %.
    n_cells : int, optional
        Complete cells to march (1 to 20).
    gamma : float, optional
        Ratio of specific heats [-].
    slot_half_height : float or Quantity, optional
        Half-height b of the slot [m] (the exit radius R of a round jet); every length of
        the result is in its unit.
    geometry : {"planar", "axisymmetric"}, optional
        A slot jet (default) or a round jet (the axisymmetric source term in the
        compatibility relations; the centreline is the axis).

    Returns
    -------
    SlotJetCells

    Notes
    -----
    Where the march stops short: ``"mach_disc"``, a shock reaching the centreline at
    a turn beyond detachment, where only a Mach reflection (a Mach disc) exists, or a
    shock in the inner half of the jet grown so strong that the flow behind it would be
    subsonic (the barrel shock of a strongly under-expanded round jet); the disc and the
    subsonic flow behind it are not modelled. ``"sonic"``: the same in the outer half of
    the jet (a lip shock of an over-expanded jet that cannot bring the flow to ambient
    pressure with supersonic flow behind it, or nearly so). ``"shock_crossing"``: shocks crossing beyond
    detachment; ``"slip_line"``: a slip line reaching the centreline or the boundary;
    ``"length"``: the cells asked for not complete within 8(n_cells + 1) linear cells.
    Near the transition from regular reflection to a Mach disc the outcome depends on the
    mesh: refine (compare ``n_points`` 81 and 161).

    The first shock of an under-expanded jet starts where the characteristic net of
    :func:`~gasdyn2d.characteristics.jets.underexpanded_slot_jet` first folds
    (``shock_forms_x``, ``shock_forms_y``) and gathers the compression from behind; later
    ones where neighbouring characteristics of the march would cross within four steps.
    A weak compression stays partly a steep isentropic wave beside its shock (the march's
    interpolation keeps it a few nodes wide). Lip shocks of over-expanded jets are fitted
    from the lip. The fan that a shock reflects from the boundary is captured by the
    march (first order there). Inviscid: the mixing layer at the jet boundary, which
    in a real jet grows and damps the cells downstream, is not modelled.

    References
    ----------
    Zucrow and Hoffman (1977), *Gas Dynamics*, vol. 2, ch. 16 (inverse marching with
    fitted shocks and free boundaries; chapter from memory). Prandtl (1904); Pack
    (1950) for the linear cell length.

    Examples
    --------
    A made-up cooling slot 4 mm wide at Mach 2, 5 % above ambient pressure:

    >>> from gasdyn2d.characteristics.jet_cells import slot_jet_cells
    >>> jet = slot_jet_cells(2.0, 1.05, slot_half_height=0.002)
    >>> jet.stop_reason, [round(float(c) * 1e3, 2) for c in jet.cell_lengths]
    ('cells', [14.53, 14.54])
    >>> round(float(jet.cell_length_linear) * 1e3, 2)
    14.15
    """
    call = DesignCall("slot_jet_cells")
    M, ratio, g, b = jet_inputs(call, M_exit, p_exit_p_ambient, gamma, slot_half_height)
    call.check(1.0 < M < np.inf, "M_exit", M, "finite and > 1")
    call.check(0.0 < ratio < np.inf and ratio != 1.0, "p_exit_p_ambient", ratio,
               "finite, > 0 and not 1 (a jet at ambient pressure has no cells)")
    n = call.count("n_points", n_points, 5, 2000)
    cells = call.count("n_cells", n_cells, 1, 20)
    geometry = "axisymmetric" if check_geometry(geometry) else "planar"
    if call.nan_inputs:  # NaN in, NaN out: no stations
        return _cells_result(_NAN_JET, M, math.nan, ratio, b, call, geometry, None)
    sonic = pressure_ratio(M, g) / (2.0 / (g + 1.0)) ** (g / (g - 1.0))
    call.check(ratio > sonic, "p_exit_p_ambient", ratio,
               f"above {sonic:.10g}: the ambient pressure must lie below the sonic pressure "
               "of the stream, so that the fully expanded jet is supersonic")
    M_jet = float(mach_from_pressure_ratio(pressure_ratio(M, g) / ratio, g))
    call.check(np.isfinite(M_jet), "p_exit_p_ambient", ratio,
               "small enough that the jet does not expand to vacuum")
    fold = None
    if ratio > 1.0:  # where the first shock forms: the characteristic net's first fold
        net = underexpanded_slot_jet(M, ratio, n_characteristics=min(n - 1, ROUND_LINE_LIMIT),
                                     gamma=g, slot_half_height=1.0, geometry=geometry)
        fold = (float(net.shock_x), float(net.shock_y)) if net.shock_formed else None
    jet = march_fitted_jet(M, ratio, g, n, cells, geometry, first_fold=fold)
    return _cells_result(jet, M, M_jet, ratio, b, call, geometry, fold)


def _cells_result(jet, M, M_jet, ratio, b, call, geometry, fold):
    march = jet.march
    counts = np.array([y.size for y in march.y], dtype=np.intp)
    top = np.cumsum(counts) - 1
    empty = np.empty(0)
    x = np.repeat(march.station_x, counts) if counts.size else empty
    y, mach, theta, p_p0 = ((np.concatenate(v) if counts.size else empty)
                            for v in (march.y, march.mach, march.theta, march.p_p0))
    no_segments = np.empty((0, 2), np.intp)
    net = CharacteristicNet(b * x, b * y, mach, theta, p_p0, no_segments, no_segments)
    ends = jet.narrowest_x
    starts = np.concatenate([[0.0], ends]) if ratio > 1.0 else ends
    lengths = np.diff(starts)

    def length(value):
        return call.length(b * np.asarray(value, dtype=float))

    shocks = tuple(FittedShock(family=int(f), x=length(sx), y=length(sy),
                               wave_angle=call.angle(beta), p2_p1=frozen_array(r), end=end)
                   for f, sx, sy, beta, r, end in march.shocks)
    stop_x, stop_y = march.stop_position
    count = max(ends.size, jet.widest_x.size)
    linear = (linear_extrema(M_jet, 1.0, count, ratio > 1.0, geometry) if M_jet > 1.0
              else (np.full(count, math.nan),) * 2)
    return SlotJetCells(
        mach_exit=M, mach_jet=M_jet, p_exit_p_ambient=ratio, lip_turn=call.angle(jet.lip_turn),
        stop_reason=march.reason, stop_x=length(stop_x), stop_y=length(stop_y),
        cell_lengths=length(lengths),
        cell_length_linear=length(float(linear_cell_length(M_jet, 2.0, geometry))
                                  if M_jet > 1.0 else math.nan),
        narrowest_x_linear=length(linear[0]), widest_x_linear=length(linear[1]),
        narrowest_x=length(ends), widest_x=length(jet.widest_x),
        widest_half_width=length(jet.widest_y), boundary_x=length(x[top]),
        boundary_y=length(y[top]), boundary_theta=call.angle(theta[top]),
        centreline_p_p0=frozen_array(p_p0[top - counts + 1]), shocks=shocks, net=call.net(net),
        geometry=geometry, shock_forms_x=length(fold[0] if fold else math.nan),
        shock_forms_y=length(fold[1] if fold else math.nan),
    )
