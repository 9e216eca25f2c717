"""Under-expanded supersonic jet from a slot (planar) or a round nozzle, by characteristics.

Unit boundary: :func:`underexpanded_slot_jet` (``geometry="planar"`` or
``"axisymmetric"``). The net is marched by
:func:`gasdyn2d.characteristics.fan_nets.march_fan_band` with a constant-pressure
upper boundary, to the first shock.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..boundary.results import ResultTable, unit_field
from .design_calls import DesignCall, frozen_array
from .fan_nets import band_segments, march_fan_band
from .nozzles import line_count
from .unit_processes import ROUND_LINE_LIMIT, CharacteristicNet, check_geometry
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.isentropic import mach_from_pressure_ratio, pressure_ratio

__all__ = ["underexpanded_slot_jet", "SlotJet", "linear_cell_length", "ROUND_JET_WIDEST_POINT",
           "ROUND_JET_WIDEST_POINTS", "ROUND_JET_NARROWEST_POINTS", "linear_extrema", "jet_inputs"]


#: first zero of the Bessel function J0 (Abramowitz & Stegun 1964, Table 9.5)
_J0_FIRST_ZERO = 2.404825557695773
#: linear theory of a round jet: its boundary is widest at x = ξ R √(Mj² - 1) with ξ the
#: first root of Σ sin(j_k ξ)/j_k over the zeros j_k of J0 (derived here: the Fourier-Bessel
#: solution of the linearised potential; computed with 10^5 zeros and Lanczos factors,
#: 1.43634071 to 8 digits; a planar jet's is 2, half its cell)
ROUND_JET_WIDEST_POINT = 1.43634071
#: linear theory of a round under-expanded jet, in units of R√(Mj² - 1): where its boundary
#: is widest and narrowest, where Σ sin(j_k ξ)/j_k changes sign from + to - and from - to +
#: (computed here twice: with 2·10^5 zeros and Lanczos factors, and independently with
#: mpmath, the zeros beyond the 400th from McMahon's expansion and the sum of its leading
#: terms in closed form by Clausen functions, to 5e-12). At ξ = 4, 8, 12, 16 the sum jumps
#: across zero by exactly ±1: the lip wave, back after focusing twice on the axis, arrives
#: as a step, and the linear boundary has a corner there, not a smooth extremum. The modes
#: are not harmonics, so these are not multiples of one cell; an over-expanded jet swaps
#: them.
ROUND_JET_WIDEST_POINTS = (1.43634071, 4.0, 6.35006999, 9.16422312, 12.0, 14.21022706,
                           16.89911518, 19.90544414)
ROUND_JET_NARROWEST_POINTS = (2.44712834, 5.30401364, 8.0, 10.27195797, 13.02682933, 16.0,
                              18.16190383, 20.78442935)


def linear_cell_length(M_jet, slot_width, geometry="planar"):
    """Plain core: shock-cell length of linear theory [m], planar L = 2h√(M² - 1).

    ``slot_width`` h is the *full* width of the planar jet (twice the slot
    half-height): a wave leaving the lip crosses the half-width b four times
    per cell at the Mach angle, L = 4b√(M² - 1) = 2h√(M² - 1). For a round jet
    (``geometry="axisymmetric"``) ``slot_width`` is the diameter D and
    L = π D √(M² - 1)/j0 = 1.3064 D √(M² - 1), j0 = 2.404826 the first zero of
    J0: the linearised potential is J0(kr) cos(kx/√(M² - 1))-like and the
    boundary condition p = pa at r = D/2 needs J0(kD/2) = 0.

    References
    ----------
    Prandtl, L. (1904), "Über die stationären Wellen in einem Gasstrahl",
    Physikalische Zeitschrift 5; Pack, D. C. (1950), "A note on Prandtl's
    formula for the wave-length of a supersonic gas jet", Q. J. Mech. Appl.
    Math. 3, 173-181 (volume and pages from memory).

    Examples
    --------
    >>> from gasdyn2d.characteristics.jets import linear_cell_length
    >>> round(float(linear_cell_length(2.0, 1.0)), 12)   # 2√3
    3.464101615138
    >>> round(float(linear_cell_length(2.0, 1.0, "axisymmetric")), 6)   # π√3/j0 = 1.3064·√3
    2.2627
    """
    M = np.asarray(M_jet, dtype=float)
    root = np.sqrt((M - 1.0) * (M + 1.0))
    if check_geometry(geometry):
        return np.pi * np.asarray(slot_width, dtype=float) * root / _J0_FIRST_ZERO
    return 2.0 * np.asarray(slot_width, dtype=float) * root


def linear_extrema(M_jet, slot_half_height, count, under_expanded=True, geometry="planar"):
    """Plain core: where linear theory puts the first ``count`` narrowest and widest points
    of a jet's boundary [m] (NaN beyond those tabulated for a round jet).

    Planar (``slot_half_height`` b): narrowest at k·L and widest at (k - 1/2)·L, L =
    4b√(Mj² - 1), for an under-expanded jet; swapped for an over-expanded one. Round
    (exit radius R): :data:`ROUND_JET_NARROWEST_POINTS` and :data:`ROUND_JET_WIDEST_POINTS`
    times R√(Mj² - 1).

    Examples
    --------
    >>> from gasdyn2d.characteristics.jets import linear_extrema
    >>> [round(float(v), 4) for v in linear_extrema(2.0, 1.0, 2)[0]]   # 4√3 k
    [6.9282, 13.8564]
    """
    scale = float(slot_half_height) * math.sqrt((M_jet - 1.0) * (M_jet + 1.0))
    if check_geometry(geometry):
        table = [np.array(t[:count]) for t in (ROUND_JET_NARROWEST_POINTS,
                                                ROUND_JET_WIDEST_POINTS)]
        narrowest, widest = (np.pad(t, (0, count - t.size), constant_values=np.nan)
                             for t in table)
    else:
        narrowest = 4.0 * np.arange(1, count + 1)
        widest = narrowest - 2.0
    if not under_expanded:
        narrowest, widest = widest, narrowest
    return scale * narrowest, scale * widest


@dataclasses.dataclass(frozen=True, repr=False)
class SlotJet(ResultTable):
    """Upper half of an under-expanded jet (centreline or axis y = 0, lip at (0, half-height)).

    Lengths are in the unit of ``slot_half_height`` (the exit radius of a round
    jet; a Quantity if it was one). ``cell_length`` and the width fields are
    NaN if the first shock forms before the feature is reached.
    """

    mach_exit: float = unit_field("")  #: Mach number at the slot exit
    mach_jet: float = unit_field("")  #: fully expanded Mach number (at ambient pressure)
    p_exit_p_ambient: float = unit_field("")  #: exit-to-ambient pressure ratio
    lip_turn: object = unit_field("rad")  #: outward turn of the boundary at the lip, ν(Mj) - ν(Me)
    boundary_x: object = unit_field("m")  #: jet boundary (constant pressure) abscissae
    boundary_y: object = unit_field("m")  #: jet boundary ordinates
    boundary_theta: object = unit_field("rad")  #: flow angle along the boundary
    boundary_nodes: object = unit_field("")  #: indices of the boundary nodes in ``net``
    max_half_width: object = unit_field("m")  #: widest half-width of the first cell
    max_width_x: object = unit_field("m")  #: where the boundary is widest
    #: twice the distance to the widest point (planar; linear theory's estimate from the
    #: first half-cell: ``slot_jet_cells`` computes the cells)
    cell_length: object = unit_field("m")
    #: linear theory: 2h√(Mj² - 1), h the full width (round: 1.3064 D√(Mj² - 1))
    cell_length_linear: object = unit_field("m")
    shock_formed: bool = unit_field("")  #: compressions coalesced within the marched length
    shock_x: object = unit_field("m")  #: where the net first folds (NaN if not)
    shock_y: object = unit_field("m")
    net: CharacteristicNet | None = dataclasses.field(default=None, metadata={"unit": ""}, repr=False)
    geometry: str = unit_field("", default="planar")  #: "planar" (a slot) or "axisymmetric"
    #: linear theory's widest point: 2b√(Mj² - 1) planar, 1.43634 R√(Mj² - 1) round
    max_width_x_linear: object = unit_field("m", default=None)


def underexpanded_slot_jet(M_exit, p_exit_p_ambient, *, n_characteristics=50, gamma=1.4,
                           slot_half_height=0.01, n_cells=1, geometry="planar"):
    """Characteristic net of a jet leaving a slot (or a round nozzle) above ambient pressure.

    The lip fans expand the stream to ambient pressure; their waves reflect
    from the centreline (as expansions) and from the constant-pressure jet
    boundary (as compressions), which head back to the centreline. Where the
    compressions of one family cross, the net folds: the first shock forms
    there and the march stops. In a planar jet that happens within the first
    cell however weak the jet (see Notes). With ``geometry="axisymmetric"``
    the jet is round (``slot_half_height`` is its exit radius) and the march
    carries the axisymmetric source term, to the first shock as well. For the
    cells beyond the first shock, computed with fitted shocks, see
    :func:`gasdyn2d.characteristics.jet_cells.slot_jet_cells`.

    Parameters
    ----------
    M_exit : float
        Uniform, parallel Mach number at the slot exit [-], >= 1.
    p_exit_p_ambient : float
        Exit-to-ambient static pressure ratio [-], > 1.
    n_characteristics : int, optional
        Lines in each lip fan.
    gamma : float, optional
        Ratio of specific heats [-].
    slot_half_height : float or Quantity, optional
        Half-height b of the slot [m] (the full width is h = 2b); the exit
        radius of a round jet. Default 0.01 m (a 20 mm slot); every length of
        the result is in the unit given here (metres for a plain number).
    n_cells : int, optional
        Shock cells to march if no shock forms first (in practice the first
        shock ends the march within the first cell).
    geometry : {"planar", "axisymmetric"}, optional
        A planar slot jet (default) or a round jet.

    Returns
    -------
    SlotJet

    Notes
    -----
    Fan lines: θk = Δ·k/n, νk = ν(Me) + θk with Δ = ν(Mj) - ν(Me), and Mj from
    p0/pa = (p0/pe)(pe/pa). On the boundary ν = ν(Mj) and θ = (θ - ν) + ν(Mj).
    Linear theory puts the widest point of the boundary at half the cell
    length 2h√(Mj² - 1), so ``cell_length`` is twice the distance to the
    widest point; it departs from linear theory at first order in the
    excess pressure ratio ε = pe/pa - 1 (measured 0.43ε at Me 1.6, 0.53ε
    at 2, 0.62ε at 3) and from its n → ∞ limit at first order in 1/n.
    The compressions reflected from the boundary are spread over a length
    ∝ ε and converge at a rate ∝ ε, so they cross at a fixed fraction of the
    cell (0.755 to 0.775 of the linear cell length for Me 1.6 to 3 and
    ε = 0.01 to 0.05, near the centreline)
    however weak the jet: the first shock forms before the boundary narrows
    again, and the net stops there (``shock_x``, ``shock_y``, within one
    mesh cell of the first crossing).
    Inviscid, homentropic: mixing at the jet boundary and the shocks that end
    the first cell are outside the method.

    Round jets: linear theory gives the shock-cell length 1.3064 D √(Mj² - 1)
    (Prandtl 1904; Pack 1950) but, its Bessel modes not being harmonics, a
    boundary that is not symmetric about its widest point, which lies at
    1.43634 R √(Mj² - 1) (``max_width_x_linear``; derived in
    :data:`ROUND_JET_WIDEST_POINT`), so ``cell_length`` is NaN for a round
    jet. The net's widest point tends to that value as ε → 0, at first order
    (1.4378 R√(Mj² - 1) at Me 1.6, ε = 0.005). The C+ lines that reach the
    boundary before the first reflected wave are started on the head of the
    lip fan: in planar flow they would carry one state, in round flow they
    resolve the boundary there.

    References
    ----------
    Prandtl (1904), Physikalische Zeitschrift 5; Pack (1950), Q. J. Mech.
    Appl. Math. 3, 173-181 (linear cell length; pages from memory).

    Examples
    --------
    A cooling-air slot of a made-up test rig, 4 mm wide, at Mach 1.6 and
    10 % above ambient pressure:

    >>> from gasdyn2d.characteristics.jets import underexpanded_slot_jet
    >>> jet = underexpanded_slot_jet(1.6, 1.1, n_characteristics=60, slot_half_height=0.002)
    >>> round(float(jet.cell_length) * 1e3, 2), round(float(jet.cell_length_linear) * 1e3, 2)
    (11.09, 10.64)
    >>> bool(jet.shock_formed), round(float(jet.shock_x) * 1e3, 2)   # near the centreline
    (True, 8.44)
    """
    call = DesignCall("underexpanded_slot_jet")
    M, ratio, g, b = jet_inputs(call, M_exit, p_exit_p_ambient, gamma, slot_half_height)
    call.check(1.0 <= M < np.inf, "M_exit", M, "finite and >= 1")
    call.check(1.0 < ratio < np.inf, "p_exit_p_ambient", ratio,
               "finite and > 1 (an under-expanded jet; an over-expanded one starts with lip "
               "shocks, outside this method)")
    round_ = check_geometry(geometry)
    n = line_count(call, n_characteristics, ROUND_LINE_LIMIT if round_ else 5000)
    geometry_name = "axisymmetric" if round_ else "planar"
    n_cells = call.count("n_cells", n_cells, 1, 20)
    if call.nan_inputs:
        return _nan_jet(call, M, ratio, geometry_name)
    M_jet = float(mach_from_pressure_ratio(pressure_ratio(M, g) / ratio, g))
    nu_exit = float(prandtl_meyer_angle(M, g))
    nu_jet = float(prandtl_meyer_angle(M_jet, g))
    call.check(np.isfinite(nu_jet), "p_exit_p_ambient", ratio,
               "small enough that the jet does not expand to vacuum")
    turn = nu_jet - nu_exit
    fan_theta = turn * np.arange(1, n + 1) / n
    if geometry_name == "planar":
        band = march_fan_band(fan_theta, nu_exit + fan_theta, 0.0, 1.0, boundary="pressure",
                              n_plus_lines=2 * n * n_cells, nu_boundary=nu_jet, gamma=g)
    else:
        # The C+ lines that reach the boundary before the first reflected wave (at twice the
        # head's run to the axis) cross the head of the lip fan, the C- from the lip with the
        # exit state: they are started there, from the lip down to the axis. (In a planar
        # jet they all carry one state, a uniform region; in a round one they do not.)
        y_start = 1.0 - np.arange(1, n + 1) / n
        x_start = (1.0 - y_start) * np.sqrt((M - 1.0) * (M + 1.0))
        band = march_fan_band(fan_theta, nu_exit + fan_theta, 0.0, 1.0, boundary="pressure",
                              n_plus_lines=n + 2 * n * n_cells, nu_boundary=nu_jet, gamma=g,
                              geometry="axisymmetric",
                              upstream_lines=(x_start, y_start, 0.0 * y_start,
                                              np.full(n, nu_exit)))
    return _jet_result(band, n, M, M_jet, ratio, turn, b, call, g, geometry_name)


def jet_inputs(call, M_exit, p_exit_p_ambient, gamma, slot_half_height):
    """The inputs every jet function takes, through the boundary: (M, pe/pa, γ, b), NaN
    recorded (a NaN flow input gives a NaN result), γ checked."""
    M = call.scalar("M_exit", M_exit, nan="record")
    ratio = call.scalar("p_exit_p_ambient", p_exit_p_ambient, nan="record")
    g = call.scalar("gamma", gamma, nan="record")
    b = call.positive("slot_half_height", slot_half_height, "m")
    call.check(1.0 < g < np.inf, "gamma", g, "a finite ratio of specific heats > 1")
    return M, ratio, g, b


def _jet_result(band, n, M, M_jet, ratio, turn, b, call, gamma, geometry="planar"):
    rows = np.arange(band.x.shape[0])
    cols = band.boundary_index(rows)
    on_boundary = band.valid[rows, cols]
    bx, by, bth = (a[rows, cols][on_boundary] for a in (band.x, band.y, band.theta))
    widest = _first_crossing(bx, by, bth)
    plus, minus, keep = band_segments(band.valid)
    # (a round band's column 0 holds the fan's head, the C- through the upstream lines' starts)
    flat_index = (np.cumsum(keep.ravel()) - 1).reshape(keep.shape)
    net = CharacteristicNet.from_nodes(b * band.x[keep], b * band.y[keep], band.theta[keep],
                                       band.nu[keep], plus, minus, gamma)

    def length(value):
        return call.length(b * value)

    fold = band.fold or (np.nan, np.nan)
    beta_jet = float(np.sqrt((M_jet - 1.0) * (M_jet + 1.0)))
    widest_linear = (ROUND_JET_WIDEST_POINT if geometry != "planar" else 2.0) * beta_jet
    return SlotJet(
        mach_exit=M, mach_jet=M_jet, p_exit_p_ambient=ratio, lip_turn=call.angle(turn),
        boundary_x=length(bx), boundary_y=length(by), boundary_theta=call.angle(bth),
        boundary_nodes=frozen_array(flat_index[rows, cols][on_boundary], np.intp),
        max_half_width=length(widest[1]), max_width_x=length(widest[0]),
        cell_length=length(2.0 * widest[0] if geometry == "planar" else np.nan),
        cell_length_linear=length(float(linear_cell_length(M_jet, 2.0, geometry))),
        shock_formed=band.fold is not None,
        shock_x=length(float(fold[0])), shock_y=length(float(fold[1])),
        net=call.net(net), geometry=geometry, max_width_x_linear=length(widest_linear),
    )


def _nan_jet(call, M, ratio, geometry):
    """The result of a jet whose flow input was NaN: NaN values, no nodes."""
    empty, nan = np.empty(0), np.nan
    net = CharacteristicNet(empty, empty, empty, empty, empty, np.empty((0, 2), np.intp),
                            np.empty((0, 2), np.intp))
    return SlotJet(
        mach_exit=M, mach_jet=nan, p_exit_p_ambient=ratio, lip_turn=call.angle(nan),
        boundary_x=call.length(empty), boundary_y=call.length(empty),
        boundary_theta=call.angle(empty), boundary_nodes=frozen_array(empty, np.intp),
        max_half_width=call.length(nan), max_width_x=call.length(nan),
        cell_length=call.length(nan), cell_length_linear=call.length(nan), shock_formed=False,
        shock_x=call.length(nan), shock_y=call.length(nan), net=call.net(net),
        geometry=geometry, max_width_x_linear=call.length(nan))


def _first_crossing(x, y, theta):
    """(x, y) where the boundary angle first falls through zero (linear interpolation)."""
    sign = np.sign(theta)
    candidates = np.flatnonzero((sign[:-1] > 0) & (sign[1:] <= 0))
    if candidates.size == 0:
        return np.nan, np.nan
    k = candidates[0]
    w = theta[k] / (theta[k] - theta[k + 1])
    return float(x[k] + w * (x[k + 1] - x[k])), float(y[k] + w * (y[k + 1] - y[k]))
