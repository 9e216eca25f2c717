"""Pressure, lift, wave drag and moment of supersonic sections and fins.

Three theories for the same :class:`~gasdyn2d.design.sections.Section`, with the same
result type :class:`SectionLoads`:

- :func:`shock_expansion_loads`: exact shock-expansion theory (an oblique shock
  or a Prandtl–Meyer fan at the leading edge of each surface, then a fan or a
  shock at every corner; trailing-edge waves and the wake slip line matched to
  a common pressure and direction);
- :func:`linear_loads`: linearised theory (Ackeret);
- :func:`second_order_loads`: second-order theory (Busemann).

This module holds the result type, the unit boundary of the three theories, their
checked cores and the linear and second-order plain cores (one line of algebra per
panel each). Shock-expansion theory's plain core — :func:`surface_pressure_ratios`,
which marches one surface of panels for many cases at once, and the wake match — is in
:mod:`gasdyn2d.design.shock_expansion` (re-exported here, with :class:`SurfaceFlow`,
under the paths they always had); the force and moment sums over the panels, shared by
all three theories, in :mod:`gasdyn2d.design.section_forces`.

These are inviscid results for preliminary design: no boundary layer, skin
friction or separation; a perfect gas, or with ``gas=`` a thermally perfect one
(vibration in equilibrium, no dissociation: see :mod:`gasdyn2d.relations.gas`).
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import numerics as nx
from ..boundary import Call, ResultTable, unit_field
from ..boundary.results import result_fields
from ..boundary.types import ArrayInput, FloatArray
from ..errors import InvalidInputError
from ..relations.flow_state import FlowState
from ..relations.gas import gas_of_call, refuse_thermally_perfect
from ..relations.thermally_perfect_calls import perfect_with_temperature
from .section_forces import panel_coefficients, panel_geometry
from .sections import Section
from .shock_expansion import (
    SCALAR_PANELS,
    SurfaceFlow,
    hot_shock_expansion_block,
    shock_expansion_block,
    shock_expansion_one_case,
    surface_pressure_ratios,
)

__all__ = [
    "SectionLoads",
    "shock_expansion_loads",
    "linear_loads",
    "second_order_loads",
    "loads_function",
    "THEORIES",
    "surface_pressure_ratios",
    "SurfaceFlow",
]

# --------------------------------------------------------------------- result type


@dataclasses.dataclass(frozen=True, repr=False)
class SectionLoads(ResultTable):
    """Aerodynamic coefficients of a section, per (M, α) case.

    Coefficients are per unit span, based on the chord and the free-stream
    dynamic pressure q = γ p M²/2. Case fields have the broadcast shape of
    (M, α, γ); per-panel fields add one trailing axis (one entry per panel, in
    the order of the section's points, leading edge first).

    Attributes
    ----------
    M : float or ndarray
        Free-stream Mach number [-].
    alpha : float, ndarray or Quantity
        Incidence of the chord to the free stream [rad], > 0 nose up.
    cl, cd : float or ndarray
        Lift and wave-drag coefficients [-] (wind axes).
    cm_le : float or ndarray
        Pitching-moment coefficient about the leading edge [-], > 0 nose up.
    x_cp : float or ndarray
        Centre of pressure [chord], -cm_le / cn with cn the chord-normal force
        coefficient (NaN where cn = 0).
    slip_direction : float, ndarray or Quantity
        Direction of the wake slip line at the trailing edge, from the
        free-stream direction [rad], > 0 towards the upper side.
    wake_pressure_ratio : float or ndarray
        Pressure on the wake slip line at the trailing edge over free-stream [-].
    cp_upper, cp_lower : ndarray
        Pressure coefficient on each panel [-], shape (..., n_panels).
    x_upper, x_lower : ndarray
        Chordwise mid-point of each panel [chord].
    detached : bool or ndarray
        A leading-edge or corner shock would need more than the maximum
        deflection θmax (the shock detaches; results NaN).
    subsonic : bool or ndarray
        The flow behind a shock is subsonic (between the sonic and the maximum
        deflection; the theory does not apply; results NaN).
    vacuum : bool or ndarray
        A surface turns the flow further than an expansion to vacuum can
        (results NaN).
    wake_unmatched : bool or ndarray
        No common pressure and direction at the trailing edge with attached
        weak-branch waves (slip_direction and wake_pressure_ratio NaN; the
        surface loads are unaffected, as trailing-edge waves cannot act
        upstream in supersonic flow).
    theory : str
        "shock-expansion", "linear" or "second-order".
    """

    M: FloatArray = unit_field("", "free-stream Mach number")
    alpha: FloatArray = unit_field("rad", "incidence of the chord, > 0 nose up")
    cl: FloatArray = unit_field("", "lift coefficient")
    cd: FloatArray = unit_field("", "wave-drag coefficient")
    cm_le: FloatArray = unit_field("", "pitching-moment coefficient about the leading edge")
    x_cp: FloatArray = unit_field("chord", "centre of pressure, in chords from the leading edge")
    slip_direction: FloatArray = unit_field("rad", "wake slip-line direction from the free stream")
    wake_pressure_ratio: FloatArray = unit_field("", "wake pressure over free-stream pressure")
    cp_upper: FloatArray = unit_field("", "pressure coefficient per upper panel",
                                      trailing="panel_upper")
    cp_lower: FloatArray = unit_field("", "pressure coefficient per lower panel",
                                      trailing="panel_lower")
    x_upper: np.ndarray = unit_field("", "mid-chord of each upper panel [chord]",
                                     trailing="panel_upper")
    x_lower: np.ndarray = unit_field("", "mid-chord of each lower panel [chord]",
                                     trailing="panel_lower")
    detached: FloatArray = unit_field("", "a shock would detach", dtype=bool)
    subsonic: FloatArray = unit_field("", "subsonic flow behind a shock", dtype=bool)
    vacuum: FloatArray = unit_field("", "a surface expands beyond vacuum", dtype=bool)
    wake_unmatched: FloatArray = unit_field("", "no trailing-edge match", dtype=bool)
    theory: str = unit_field("", "shock-expansion, linear or second-order", dtype=str)


#: The fields computed per case (everything but the section's panel positions and the theory).
_CASE_FIELDS = tuple(f for f in result_fields(SectionLoads)
                     if f.name not in ("x_upper", "x_lower", "theory"))


# ------------------------------------------------------------------ checked cores


def _small_disturbance_block(M, alpha, gamma, section, geometry, second_order):
    """Plain linear (Ackeret) or second-order (Busemann) loads of one block of cases."""
    nan_case = np.isnan(M) | np.isnan(alpha) | np.isnan(gamma)  # γ too: NaN in, NaN out
    root = np.sqrt((M - 1.0) * (M + 1.0))
    c1 = np.where(nan_case, np.nan, 2.0 / root)[..., None]
    a = alpha[..., None]
    if second_order:  # deflection angles; Busemann (1935)
        c2 = (((gamma + 1.0) * M**4 - 4.0 * (M * M - 1.0)) / (2.0 * root**4))[..., None]
        theta_u, theta_l = section.upper_angles - a, a - section.lower_angles
        cp_u = c1 * theta_u + c2 * theta_u**2
        cp_l = c1 * theta_l + c2 * theta_l**2
    else:  # surface slopes; Ackeret (1925)
        theta_u = geometry.dy_upper / geometry.dx_upper - a
        theta_l = a - geometry.dy_lower / geometry.dx_lower
        cp_u, cp_l = c1 * theta_u, c1 * theta_l
    cl, cd, cm_le, x_cp = panel_coefficients(geometry, cp_u, cp_l, alpha, False)
    slip = np.where(nan_case, np.nan, 0.0)
    p_wake = np.where(nan_case, np.nan, 1.0)
    no = np.zeros(M.shape, dtype=bool)
    return (cl, cd, cm_le, x_cp, slip, p_wake, cp_u, cp_l, no, no.copy(), no.copy(), no.copy())


def _loads_core(M, alpha, gamma, check, *, theory, section, geometry):
    """Checked core of the three theories (floats or arrays): the per-case fields in order.

    Floats (a single case) are run as one-element arrays; arrays are evaluated in
    cache-sized blocks of cases (:func:`gasdyn2d.numerics.chunked`), so the temporaries of
    the march never exceed a block whatever the number of cases.
    """
    gamma = check.gamma(gamma)
    if theory == "shock-expansion":
        M = check.supersonic_mach(M, "M")
    else:
        M = check.at_least(M, "M", 1.0, inclusive=False, what="supersonic flow")
    alpha = check.finite(alpha, "alpha", "rad")
    scalar = type(M) is float and type(alpha) is float
    if (scalar and type(gamma) is float and theory == "shock-expansion"
            and sum(section.n_panels) <= SCALAR_PANELS):
        return (M, alpha, *shock_expansion_one_case(M, alpha, gamma, section, geometry, check))
    if scalar:
        M_a, alpha_a = np.array([M]), np.array([alpha])
    else:
        M_a, alpha_a = np.broadcast_arrays(M, alpha)
    gamma_a = np.asarray(gamma, dtype=float)
    if gamma_a.ndim:
        gamma_a = np.broadcast_to(gamma_a, M_a.shape)

    def block(m, a, g):
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if theory == "shock-expansion":
                return shock_expansion_block(m, a, g, section, geometry, check)
            return _small_disturbance_block(m, a, g, section, geometry,
                                            theory == "second-order")

    fields = nx.chunked(block, M_a, alpha_a, gamma_a)
    if scalar:
        return (M, alpha, *(f[0] for f in fields))
    return (M, alpha, *fields)


def _hot_loads_core(M, alpha, T, check, *, section, geometry, gas):
    """Checked core of :func:`shock_expansion_loads` for a thermally perfect gas."""
    M = check.supersonic_mach(M, "M")
    alpha = check.finite(alpha, "alpha", "rad")
    T = check.positive(T, "T", "K", "the free-stream static temperature")
    scalar = type(M) is float and type(alpha) is float and type(T) is float
    M_a, alpha_a, T_a = np.broadcast_arrays(*(np.atleast_1d(np.asarray(v, dtype=float))
                                              for v in (M, alpha, T)))

    def block(m, a, t):
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            out = hot_shock_expansion_block(m, a, t, section, geometry, check, gas)
            nan_case = np.isnan(t)  # NaN in, NaN out (the march sees only M and the turns)
            if nan_case.any():
                out = tuple(np.where(nan_case.reshape(nan_case.shape + (1,) * (np.ndim(f) -
                                     nan_case.ndim)), np.nan if f.dtype.kind == "f" else False,
                                     f) for f in map(np.asarray, out))
            return out

    fields = nx.chunked(block, M_a, alpha_a, T_a)
    if scalar:
        return (M, alpha, *(f[0] for f in fields))
    return (M_a, alpha_a, *fields)


# ------------------------------------------------------------------ unit boundary


def _free_stream(function, M, T, gamma, gas):
    """(M, T, gamma, gas) of a loads call whose ``M`` may be a FlowState (then it carries
    the free-stream temperature and gas, and none of them may be given besides)."""
    if not isinstance(M, FlowState):
        return M, T, gamma, gas
    given = [name for name, value in (("T", T), ("gamma", gamma), ("gas", gas))
             if value is not None]
    if given:
        raise InvalidInputError(
            f"{function} takes the free stream as a FlowState or as M with T, gamma and gas; "
            f"got a FlowState and {', '.join(given)}. Set them on the FlowState instead.")
    return M.M, M.T, None, M.gas


def _loads(theory, section, M, alpha, T, gamma, gas, errors):
    """Cross the boundary once: take (M, α, γ or T), run the checked core, package
    SectionLoads."""
    if not isinstance(section, Section):
        raise InvalidInputError(
            f"section must be a gasdyn2d Section (see Section.from_points); got "
            f"{type(section).__name__}.")
    function = f"{theory.replace('-', '_')}_loads"
    M, T, gamma, gas = _free_stream(function, M, T, gamma, gas)
    gamma, hot = gas_of_call(function, gamma, gas, T, "T", "free-stream static temperature")
    if theory == "second-order":
        refuse_thermally_perfect(
            hot, "gas", "second_order_loads",
            "Busemann's C2 = [(γ+1)M⁴ - 4(M² - 1)]/[2(M² - 1)²] is a perfect-gas coefficient; "
            "use shock_expansion_loads (exact for the gas) or linear_loads (which needs no γ).")
    call = Call(errors)
    call.take("M", M)
    call.take("alpha", alpha, "rad")
    n_upper, n_lower = section.n_panels
    call.trailing("panel_upper", n_upper)
    call.trailing("panel_lower", n_lower)
    geometry = panel_geometry(section)
    if hot is not None and theory == "shock-expansion":
        call.take("T", T, "K")
        core, options = _hot_loads_core, {"gas": hot}
    else:  # a perfect gas, or linear theory (cp = 2θ/√(M² - 1) needs no γ)
        call.take("gamma", hot.gamma if hot is not None else gamma, keep_scalar=True)
        core, options = _loads_core, {"theory": theory}
        if T is not None:
            call.take("T", T, "K")
            core = perfect_with_temperature(core, "T")
    values = dict(zip((f.name for f in _CASE_FIELDS),
                      call.evaluate(_CASE_FIELDS, core, section=section, geometry=geometry,
                                    **options)))
    values["x_upper"] = _read_only(geometry.x_upper)
    values["x_lower"] = _read_only(geometry.x_lower)
    values["theory"] = theory
    return SectionLoads.from_fields([values[f.name] for f in result_fields(SectionLoads)])


def _read_only(array):
    array = np.array(array, dtype=float)
    array.flags.writeable = False
    return array


def shock_expansion_loads(section: Section, M: ArrayInput, alpha: ArrayInput, *,
                          T: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                          errors: str = "raise") -> SectionLoads:
    """Loads on a section by exact shock-expansion theory, for many (M, α) cases at once.

    Parameters
    ----------
    section : Section
        The section, in chord units.
    M : float, array_like, DataArray, Series, dask array or FlowState
        Free-stream Mach number [-], >= 1; or the free stream as a
        :class:`~gasdyn2d.FlowState` (its M, T and gas; its direction is not used, the
        incidence is ``alpha``).
    alpha : float, array_like or Quantity (or a labelled or lazy array of them)
        Incidence [rad], > 0 nose up (the free stream meets the lower surface).
    T : float, array_like or Quantity, optional
        Free-stream static temperature [K], > 0: required for a thermally perfect ``gas``
        (each wave is then that gas's at its local temperature); with a perfect gas it is
        checked and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``); a thermally perfect one needs ``T``.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN (with the case's flag set) for cases where a shock
        detaches, the flow behind a shock is subsonic or a surface expands to
        vacuum, instead of raising.

    Returns
    -------
    SectionLoads
        Immutable: read-only arrays, no two fields sharing memory. The case fields
        follow the inputs' container (floats for floats; DataArrays broadcast by
        dimension name with the coordinates kept; Series on the input's index; lazy
        dask arrays, computed block by block over the cases); the per-panel fields
        add a last axis ``panel_upper`` / ``panel_lower`` (a DataFrame for Series
        inputs). NaN in any input gives NaN out for that case.

    Raises
    ------
    DetachedShockError
        A leading-edge or corner shock would detach, or leave subsonic flow
        behind it; the message names the first case, the surface, the
        deflection and θmax there.
    NoSolutionError
        A surface expands beyond vacuum; the message names the case and the limit.
    InvalidInputError
        M < 1, non-finite incidence, gamma <= 1, a bad ``section``, or an input
        of the wrong type (strings, bools, complex numbers).

    Notes
    -----
    Each surface meets the free stream with a turn θ_LE = δ_u - α (upper) or
    α - δ_l (lower), δ the first panel's inclination: θ_LE > 0 is an oblique
    shock (weak branch, θ-β-M relation), θ_LE < 0 a Prandtl–Meyer fan. At a
    corner where the surface turns away from the flow the fan gives
    ν2 = ν1 + |Δδ| with p0 constant; where it turns into the flow a shock.
    Panel pressures give cp = (p/p∞ - 1)/(γM²/2) and the chord-axis forces

        cn = Σ cp_l dx_l - Σ cp_u dx_u,   ca = Σ cp_u dy_u - Σ cp_l dy_l,
        cl = cn cos α - ca sin α,         cd = ca cos α + cn sin α,
        cm_le = Σ cp_u (x dx + y dy)_u - Σ cp_l (x dx + y dy)_l   (panel mid-points).

    At the trailing edge each stream turns through one more wave to a common
    direction and pressure (the wake slip line; Newton on the slip direction).
    Waves reflected from the fans onto the shocks (and back) are neglected, as
    in the classical method; their effect on surface pressure is of third
    order in the turn angles. Cp loses relative precision ~1e-16/|p/p∞ - 1|
    for very small turns.

    For a thermally perfect gas every wave is that gas's at the local panel temperature
    (a run of fans at the stagnation temperature, which no wave changes), and
    q = γ(T∞) p∞ M²/2 = ρ∞V∞²/2 (:mod:`gasdyn2d.design.thermally_perfect_loads`).

    References
    ----------
    Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley,
    ch. 4 (shock-expansion theory).
    Ames Research Staff (1953), NACA Report 1135, eqs. 150 and 171.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_loads import shock_expansion_loads
    >>> loads = shock_expansion_loads(Section.double_wedge(0.05), 2.5, np.radians([0.0, 4.0]))
    >>> np.round(loads.cl, 5), np.round(loads.cd, 5)
    (array([0.     , 0.12291]), array([0.00437, 0.01304]))
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT, FlowState
    >>> hot = FlowState(7.0, 1.2e3, 230.0, gas=AIR_THERMALLY_PERFECT)  # an invented glider
    >>> round(shock_expansion_loads(Section.double_wedge(0.05), hot, np.radians(6.0)).cl, 5)
    0.06831
    """
    return _loads("shock-expansion", section, M, alpha, T, gamma, gas, errors)


def linear_loads(section: Section, M: ArrayInput, alpha: ArrayInput, *, T: ArrayInput = None,
                 gamma: ArrayInput = None, gas=None, errors: str = "raise") -> SectionLoads:
    """Loads on a section by linearised supersonic theory (Ackeret).

    Same parameters and result as :func:`shock_expansion_loads`, but M > 1
    strictly. ``gamma`` does not enter the linear pressure; it is accepted (and
    checked) for a uniform call, and so is a thermally perfect ``gas`` with its ``T``
    (the linear cp is the same for every gas).

    Notes
    -----
    cp = 2θ/√(M² - 1) on each panel, θ = dy/dx - α (upper) or α - dy/dx (lower),
    with the thin-section forms cl = cn, cd = ca + α·cn, cm_le = -Σ Δcp·x·dx.
    For a flat plate cl = 4α/√(M²-1), cd = 4α²/√(M²-1), cm_le = -2α/√(M²-1); for
    a symmetric double wedge of t/c = τ, cd = 4(α² + τ²)/√(M²-1). The wake
    leaves parallel to the free stream at free-stream pressure.

    References
    ----------
    Ackeret, J. (1925), "Luftkräfte auf Flügel, die mit größerer als
    Schallgeschwindigkeit bewegt werden", Z. Flugtech. Motorluftschiffahrt 16, 72-74.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_loads import linear_loads
    >>> loads = linear_loads(Section.flat_plate(), 2.0, np.radians(3.0))
    >>> round(loads.cl, 6), round(float(4 * np.radians(3.0) / np.sqrt(3.0)), 6)
    (0.12092, 0.12092)
    """
    return _loads("linear", section, M, alpha, T, gamma, gas, errors)


def second_order_loads(section: Section, M: ArrayInput, alpha: ArrayInput, *,
                       T: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                       errors: str = "raise") -> SectionLoads:
    """Loads on a section by second-order (Busemann) theory.

    Same parameters and result as :func:`linear_loads`; a thermally perfect ``gas`` is
    refused (C2 below is the perfect gas's).

    Notes
    -----
    cp = C1·θ + C2·θ², θ = δ - α (upper) or α - δ (lower) the panel's deflection
    angle from the free stream, with

        C1 = 2/√(M² - 1),   C2 = [(γ+1)M⁴ - 4(M² - 1)] / [2(M² - 1)²]

    (C2 → (γ+1)/2 as M → ∞), and the thin-section force forms of
    :func:`linear_loads`. Shock and simple-wave pressures agree to second order
    in θ, so one formula serves both; the error is of third order.

    References
    ----------
    Busemann, A. (1935), "Aerodynamischer Auftrieb bei Überschallgeschwindigkeit",
    Luftfahrtforschung 12, 210-220.
    Liepmann, H. W. and Roshko, A. (1957), Elements of Gasdynamics, Wiley, ch. 4.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.sections import Section
    >>> from gasdyn2d.design.section_loads import second_order_loads
    >>> loads = second_order_loads(Section.flat_plate(), 3.0, 0.05)
    >>> c1 = 2 / np.sqrt(8.0)
    >>> round(float((loads.cp_lower[0] - c1 * 0.05) / 0.05**2), 5)
    1.26875
    """
    return _loads("second-order", section, M, alpha, T, gamma, gas, errors)


#: The section-load theories by name.
THEORIES = {"shock-expansion": shock_expansion_loads, "linear": linear_loads,
            "second-order": second_order_loads}


def loads_function(theory: str, name: str = "theory"):
    """The loads function of a theory named ``theory`` ("shock-expansion", "linear" or
    "second-order"); any other value is an :class:`~gasdyn2d.errors.InvalidInputError`
    naming the argument ``name`` (as the caller calls it) and the choices.

    Examples
    --------
    >>> from gasdyn2d.design.section_loads import loads_function
    >>> loads_function("linear").__name__
    'linear_loads'
    """
    if isinstance(theory, str) and theory in THEORIES:
        return THEORIES[theory]
    choices = ", ".join(repr(key) for key in THEORIES)
    raise InvalidInputError(f"{name} must name a section-load theory ({choices}); got "
                            f"{theory!r}.")
