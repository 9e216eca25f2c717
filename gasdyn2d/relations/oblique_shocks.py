"""Oblique shock waves: the flow behind the shock, and the public functions.

Plain core (floats and ndarrays, radians, no pint):

- :func:`oblique_shock_ratios` — every downstream ratio from (M1, β);
- ``_shock_from_deflection`` — β and every ratio from (M1, θ) in one pass, taken
  straight from the θ-β-M solve's variables.

Unit boundary: :func:`oblique_shock`, :func:`max_deflection`,
:func:`sonic_deflection`.

The θ-β-M relation itself lives in two modules, whose plain cores are re-exported
here under the paths they always had (``gasdyn2d.relations.oblique_shocks.<name>``):

- :mod:`gasdyn2d.relations.theta_beta_mach` — β from θ on either branch
  (:func:`~gasdyn2d.relations.theta_beta_mach.wave_angle_from_deflection`,
  :func:`~gasdyn2d.relations.theta_beta_mach.wv_from_deflection`,
  :func:`~gasdyn2d.relations.theta_beta_mach.scaled_wv_from_deflection`,
  :func:`~gasdyn2d.relations.theta_beta_mach.wave_angle_from_scaled_wv`) and the
  detachment and sonic points
  (:func:`~gasdyn2d.relations.theta_beta_mach.detachment_angles`,
  :func:`~gasdyn2d.relations.theta_beta_mach.sonic_angles`);
- :mod:`gasdyn2d.relations.shock_angles` — θ from β
  (:func:`~gasdyn2d.relations.shock_angles.deflection_from_wave_angle`), the polar's
  slope (:func:`~gasdyn2d.relations.shock_angles.deflection_slope_wv`) and β from the
  shock variables (:func:`~gasdyn2d.relations.shock_angles.wave_angle_from_wv`,
  :func:`~gasdyn2d.relations.shock_angles.wave_angle_from_normal_excess`).

Throughout, ``w = M1² sin²β - 1`` (the normal Mach number squared, less one)
and ``v = M1² cos²β`` are the variables in which the relation has no
cancellation: w → 0 at the Mach wave, v → 0 at the normal shock, and
w + v = M1² - 1; the solve works in z = w/(M1² - 1) and y = v/(M1² - 1) = 1 - z.

Every plain core has a scalar form on the math module right after it (same
algorithm); the array form hands plain floats to it (``nx.plain_scalars``).
"""

from __future__ import annotations

import dataclasses
import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..numerics import HUGE_MACH
from ..boundary import SCALAR_CHECKS, Call, ResultTable, choice, clamp_to_limit, one_of, unit_field
from ..boundary.units import TWO_PI
from ..boundary.results import FieldInfo
from ..boundary.types import ArrayInput, FloatArray
from ..errors import DetachedShockError, NoSolutionError
from .prandtl_meyer_function import mach_angle_of
from .gas import gas_of_call
from .normal_shocks import normal_shock_ratios
from .shock_angles import (
    deflection_from_wave_angle,
    deflection_slope_wv,
    small_disturbance_shock,
    tiny_hypersonic_turn,
    wave_angle_from_normal_excess,
    wave_angle_from_wv,
)
from .theta_beta_mach import (
    detachment_angles,
    scaled_wv_from_deflection,
    sonic_angles,
    wave_angle_from_deflection,
    wave_angle_from_scaled_wv,
    wv_from_deflection,
)

__all__ = [
    "oblique_shock",
    "max_deflection",
    "sonic_deflection",
    "ObliqueShock",
    "ObliqueShockRatios",
    "wave_angle_from_deflection",
    "wv_from_deflection",
    "scaled_wv_from_deflection",
    "wave_angle_from_scaled_wv",
    "wave_angle_from_wv",
    "wave_angle_from_normal_excess",
    "deflection_slope_wv",
    "deflection_from_wave_angle",
    "detachment_angles",
    "sonic_angles",
    "oblique_shock_ratios",
]

_HUGE_W = 1e300  # as in normal_shocks: above, the ratios take their forms in 1/w


# ------------------------------------------------------------------ plain core


def _shock_from_deflection(M1, theta, gamma, strong):
    """Plain core of ``oblique_shock(M1, deflection=θ)``: β and every ratio in one pass,
    the ratios taken straight from z = w/a (no sin β round trip). Returns a flat
    tuple (β, *ObliqueShockRatios without the deflection) so that
    :func:`~gasdyn2d.numerics.chunked` can block it."""
    if nx.plain_scalars(M1, theta, gamma):
        return _shock_from_deflection_scalar(M1, theta, gamma, strong)
    z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        if invalid.any():
            z = np.where(invalid, np.nan, z)
        w, v = a * z, a * y
        Mn1 = np.sqrt(1.0 + w)
        beta = np.arctan2(Mn1, np.sqrt(v))  # wave_angle_from_scaled_wv, reusing Mn1
        if not nx.any_true(M1 > HUGE_MACH):  # the usual case: nothing can overflow
            ratios = normal_shock_ratios(w, gamma)
            # the tangential velocity is conserved: M2² = Mn2² + M1² cos²β · T1/T2 (no trig)
            M2 = np.sqrt(ratios.M2 * ratios.M2 + v / ratios.T2_T1)
            return (beta, Mn1, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
                    ratios.T2_T1, ratios.p02_p01, ratios.strength)
        huge = np.isinf(a)
        if huge.any():  # M1² overflowed: Mn1 = M1 sin β, sin²β = (z + 1/a)/(1 + 1/a)
            Mn1 = np.where(huge, M1 * np.sqrt((z + 1.0 / a) / (1.0 + 1.0 / a)), Mn1)
            w = np.where(huge, (Mn1 - 1.0) * (Mn1 + 1.0), w)  # finite where Mn1² is
            beta = wave_angle_from_scaled_wv(z, y, a)
        tiny = tiny_hypersonic_turn(M1, theta, strong)
        if tiny is not None:
            beta_tiny, w_tiny = small_disturbance_shock(M1, theta, gamma)
            beta = np.where(tiny, beta_tiny, beta)
            w = np.where(tiny, w_tiny, w)
            Mn1 = np.where(tiny, np.sqrt(1.0 + w), Mn1)
            z = np.where(tiny, 0.0, z)
        ratios = normal_shock_ratios(w, gamma)
        # M2² = Mn2² + v T1/T2 with v T1/T2 = y (ρ2/ρ1)/(1/a + 2γz/(γ+1)) (divided by a)
        M2 = np.sqrt(ratios.M2 * ratios.M2 + y * ratios.rho2_rho1
                     / (1.0 / a + 2.0 * gamma / (gamma + 1.0) * z))
        if tiny is not None:  # there M2² = M1² cos²β T1/T2 (1 + O(1/M1²)), cos β = 1
            M2 = np.where(tiny, M1 / np.sqrt(ratios.T2_T1), M2)
    return (beta, Mn1, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
            ratios.T2_T1, ratios.p02_p01, ratios.strength)


def _shock_from_deflection_scalar(M1, theta, gamma, strong):
    """Scalar form of :func:`_shock_from_deflection` (a flat tuple of floats)."""
    z, y, a, invalid = scaled_wv_from_deflection(M1, theta, gamma, strong)  # its scalar form
    if invalid:
        z = math.nan
    w, v = a * z, a * y
    if 0.0 <= w < _HUGE_W and 0.0 <= v < _HUGE_W and M1 <= HUGE_MACH:
        # the usual case, every operation in range: _normal_shock_ratios_scalar's formulas
        # in its order, inline (no tuples), then M2 from the conserved tangential velocity
        Mn1 = math.sqrt(1.0 + w)
        gp, gm = gamma + 1.0, gamma - 1.0
        p_jump = 2.0 * gamma / gp * w
        p2_p1 = 1.0 + p_jump
        den = gm * w + gp
        rho_jump = 2.0 * w / den
        rho2_rho1 = 1.0 + rho_jump
        T2_T1 = p2_p1 / rho2_rho1
        Mn2 = math.sqrt(den / (gp * p2_p1))
        p02_p01 = math.exp((gamma * math.log1p(rho_jump) - math.log1p(p_jump)) / gm)
        return (math.atan2(Mn1, math.sqrt(v)), Mn1, Mn2, math.sqrt(Mn2 * Mn2 + v / T2_T1),
                p2_p1, rho2_rho1, T2_T1, p02_p01, p_jump)
    Mn1 = nx.fsqrt(1.0 + w)
    beta = math.atan2(Mn1, nx.fsqrt(v))
    if math.isinf(w) or math.isinf(v):
        inv_a = nx.fdiv(1.0, a)
        Mn1 = M1 * nx.fsqrt((z + inv_a) / (1.0 + inv_a))
        w = (Mn1 - 1.0) * (Mn1 + 1.0)
        beta = wave_angle_from_scaled_wv(z, y, a)
    tiny = tiny_hypersonic_turn(M1, theta, strong)
    if tiny:
        beta, w = small_disturbance_shock(M1, theta, gamma)
        Mn1 = nx.fsqrt(1.0 + w)
        z = 0.0
    ratios = normal_shock_ratios(w, gamma)
    if M1 > HUGE_MACH:
        M2 = nx.fsqrt(ratios.M2 * ratios.M2 + nx.fdiv(y * ratios.rho2_rho1, nx.fdiv(1.0, a)
                                                       + 2.0 * gamma / (gamma + 1.0) * z))
    else:
        M2 = nx.fsqrt(ratios.M2 * ratios.M2 + nx.fdiv(v, ratios.T2_T1))
    if tiny:
        M2 = M1 / math.sqrt(ratios.T2_T1)
    return (beta, Mn1, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
            ratios.T2_T1, ratios.p02_p01, ratios.strength)


class ObliqueShockRatios(NamedTuple):
    """Plain-core result of :func:`oblique_shock_ratios` (ndarrays; angles in radians)."""

    deflection: np.ndarray
    Mn1: np.ndarray
    Mn2: np.ndarray
    M2: np.ndarray
    p2_p1: np.ndarray
    rho2_rho1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray
    strength: np.ndarray  #: (p2 - p1)/p1 = 2γ(Mn1² - 1)/(γ+1), without cancellation


def oblique_shock_ratios(M1, beta, gamma=1.4):
    """Plain core: every quantity behind an oblique shock of wave angle β [rad].

    The normal component obeys the normal-shock relations with Mn1 = M1 sin β
    (NACA Report 1135, eqs. 128-132); M2 = Mn2 / sin(β - θ).
    """
    if nx.plain_scalars(M1, beta, gamma):
        return _oblique_shock_ratios_scalar(M1, beta, gamma)
    M1, beta, gamma = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (M1, beta, gamma)))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        ms = M1 * np.sin(beta)
        w = np.maximum((ms - 1.0) * (ms + 1.0), 0.0)
        ms = np.where(ms < 1.0, np.sqrt(1.0 + w), ms)  # a Mach wave rounded below Mn1 = 1
        theta = deflection_from_wave_angle(M1, beta, gamma)
        ratios = normal_shock_ratios(w, gamma)
        M2 = ratios.M2 / np.sin(beta - theta)
    return ObliqueShockRatios(theta, ms, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
                              ratios.T2_T1, ratios.p02_p01, ratios.strength)


def _oblique_shock_ratios_scalar(M1, beta, gamma):
    """Scalar form of :func:`oblique_shock_ratios` (an ObliqueShockRatios of floats)."""
    ms = M1 * math.sin(beta) if math.isfinite(beta) else math.nan
    w = (ms - 1.0) * (ms + 1.0)
    w = w if w > 0.0 or w != w else 0.0
    if ms < 1.0:
        ms = nx.fsqrt(1.0 + w)
    theta = deflection_from_wave_angle(M1, beta, gamma)  # its scalar form
    ratios = normal_shock_ratios(w, gamma)
    M2 = nx.fdiv(ratios.M2, math.sin(beta - theta)) if theta == theta else math.nan
    return ObliqueShockRatios(theta, ms, ratios.M2, M2, ratios.p2_p1, ratios.rho2_rho1,
                              ratios.T2_T1, ratios.p02_p01, ratios.strength)


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class ObliqueShock(ResultTable):
    """Flow on both sides of a straight oblique shock (perfect or thermally perfect gas).

    Angles are in radians (Quantities in the caller's angle unit when any input
    was a Quantity); ``deflection`` is the flow turn, ``wave_angle`` the angle
    between the shock and the upstream flow.
    """

    M1: FloatArray = unit_field("", "upstream Mach number")
    deflection: FloatArray = unit_field("rad", "flow turn θ")
    wave_angle: FloatArray = unit_field("rad", "shock angle β from the upstream flow")
    Mn1: FloatArray = unit_field("", "upstream normal Mach number M1 sin β")
    Mn2: FloatArray = unit_field("", "downstream normal Mach number M2 sin(β - θ)")
    M2: FloatArray = unit_field("", "downstream Mach number")
    p2_p1: FloatArray = unit_field("", "static pressure ratio")
    rho2_rho1: FloatArray = unit_field("", "density ratio")
    T2_T1: FloatArray = unit_field("", "static temperature ratio")
    p02_p01: FloatArray = unit_field("", "stagnation pressure ratio, <= 1")
    strength: FloatArray = unit_field(
        "", "(p2 - p1)/p1, the shock strength, computed without cancellation")
    gamma1: FloatArray = unit_field("", "ratio of specific heats ahead of the shock")
    gamma2: FloatArray = unit_field("", "ratio of specific heats behind the shock")


def _check_deflection(theta, M1, gamma, check):
    theta = check.at_least(theta, "deflection", 0.0, allow_inf=True, unit_text="rad",
                           what="a shock turns the flow into itself; for a turn away from the "
                                "wall use expansion_fan")
    theta_max, _ = detachment_angles(M1, gamma)
    return check.within(
        theta, "deflection", -math.inf, theta_max,
        "at most the detachment deflection θmax(M1, γ)", limit=theta_max, unit_text="rad",
        error_class=DetachedShockError,
        hint="Beyond θmax no attached shock exists: the shock stands off as a curved bow wave. "
             "Lower the deflection or raise M1.")


def _from_deflection(M1, theta, gamma, check, strong):
    """Checked core from θ: solve first, check only if something failed (the limits cost as
    much as the solve); a failure no check explains is a bug, never a silent NaN."""
    beta, *fields = _shock_from_deflection_blocks(M1, theta, gamma, strong)
    if type(beta) is float:
        if beta != beta and not (theta != theta or M1 != M1 or gamma != gamma):
            theta = _check_deflection(theta, M1, gamma, check)  # raises, or NaN
            if theta == theta:
                _refuse_unexplained_nan(np.array(True), np.array(M1), np.array(theta), gamma)
        return (theta, beta, *fields)
    failed = np.isnan(beta)
    if failed.any():
        theta = _check_deflection(theta, M1, gamma, check)  # raises, or NaNs the same cases
        _refuse_unexplained_nan(failed, M1, theta, gamma)
    return (theta, beta, *fields)


def _shock_from_deflection_blocks(M1, theta, gamma, strong):
    if type(M1) is float and type(theta) is float:
        return _shock_from_deflection(M1, theta, gamma, strong)
    M1, theta = np.broadcast_arrays(M1, theta)
    return nx.chunked(lambda m, t, g: _shock_from_deflection(m, t, g, strong), M1, theta, gamma)


def _refuse_unexplained_nan(failed, M1, theta, gamma):
    """A NaN from the solve that no input check explains is a solver bug: raise, never
    return it silently (the consistency check behind "no silent wrong number")."""
    with np.errstate(invalid="ignore"):
        unexplained = failed & ~np.isnan(theta) & ~np.isnan(M1) & ~np.isnan(gamma)
    if nx.any_true(unexplained):
        i = tuple(np.argwhere(unexplained)[0]) if unexplained.ndim else ()
        g = np.broadcast_to(gamma, unexplained.shape)[i]
        m = np.broadcast_to(M1, unexplained.shape)[i]
        t = np.broadcast_to(theta, unexplained.shape)[i]
        raise NoSolutionError(
            f"internal error: the oblique-shock solve gave NaN for a valid case (M1 = "
            f"{float(m)!r}, deflection = {float(t)!r} rad, gamma = {float(g)!r}). This is a "
            "bug in gasdyn2d; please report it with these values.")


def _checked_wave_angle(name, value, M1, gamma, check):
    """(the checked input, the wave angle it gives) for wave_angle, Mn1 or p2_p1."""
    if name == "wave_angle":
        mu = mach_angle_of(M1)
        value = clamp_to_limit(value, mu, "lower")  # asin(1/M1) may round below μ
        value = check.within(value, "wave_angle", mu, 0.5 * math.pi,
                             "between the Mach angle μ = asin(1/M1) and π/2 (90°)", limit=mu,
                             unit_text="rad")
        return value, value
    if name == "Mn1":
        value = clamp_to_limit(clamp_to_limit(value, 1.0, "lower"), M1, "upper")
        value = check.within(value, "Mn1", 1.0, M1,
                             "between 1 and M1 (the normal Mach number of a shock)", limit=M1)
        w = (value - 1.0) * (value + 1.0)
    else:
        p_max = 1.0 + 2.0 * gamma / (gamma + 1.0) * (M1 - 1.0) * (M1 + 1.0)
        value = clamp_to_limit(value, p_max, "upper")
        value = check.within(value, "p2_p1", 1.0, p_max,
                             "between 1 and the normal-shock pressure ratio at M1", limit=p_max)
        w = (value - 1.0) * (gamma + 1.0) / (2.0 * gamma)  # Mn1² - 1, from eq. 93
    return value, wave_angle_from_normal_excess(M1, w)


def _oblique_core(M1, value, gamma, check, *, name, strong):
    """Checked core of :func:`oblique_shock` (floats or arrays): the fields in order."""
    gamma = check.gamma(gamma)
    M1 = check.supersonic_mach(M1, "M1")
    if name == "deflection":
        return (M1, *_from_deflection(M1, value, gamma, check, strong), gamma, gamma)
    value, beta = _checked_wave_angle(name, value, M1, gamma, check)
    if type(M1) is float and type(beta) is float:
        ratios = oblique_shock_ratios(M1, beta, gamma)
    else:
        M1, beta = np.broadcast_arrays(M1, beta)
        ratios = nx.chunked(oblique_shock_ratios, M1, beta, gamma)
    return (M1, ratios.deflection, beta, value if name == "Mn1" else ratios.Mn1, ratios.Mn2,
            ratios.M2, value if name == "p2_p1" else ratios.p2_p1, ratios.rho2_rho1,
            ratios.T2_T1, ratios.p02_p01, value - 1.0 if name == "p2_p1" else ratios.strength,
            gamma, gamma)


def oblique_shock(M1: ArrayInput, *, deflection: ArrayInput = None, wave_angle: ArrayInput = None,
                  Mn1: ArrayInput = None, p2_p1: ArrayInput = None, branch: str = "weak",
                  T1: ArrayInput = None, gamma: ArrayInput = None, gas=None,
                  errors: str = "raise") -> ObliqueShock:
    """Oblique shock from the upstream Mach number and one of θ, β, Mn1 or p2/p1.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    deflection : float, array_like or Quantity, optional
        Flow deflection θ [rad], 0 <= θ <= θmax(M1, γ).
    wave_angle : float, array_like or Quantity, optional
        Shock angle β [rad] from the upstream flow, μ <= β <= π/2.
    Mn1 : float or array_like, optional
        Upstream normal Mach number [-], 1 <= Mn1 <= M1.
    p2_p1 : float or array_like, optional
        Static pressure ratio [-], between 1 and the normal-shock value.
    branch : {"weak", "strong"}, optional
        Root of the θ-β-M relation when ``deflection`` is given.
    T1 : float, array_like or Quantity, optional
        Static temperature ahead of the shock [K], > 0: required for a thermally perfect
        ``gas`` (offset units such as °C are converted); with a perfect gas it is checked
        and broadcast but does not change the ratios.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``). A thermally perfect gas
        (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) needs ``T1`` and no ``gamma``.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ObliqueShock
        ``gamma1`` and ``gamma2`` are γ at the temperatures ahead of and behind the
        shock (both ``gamma`` for a perfect gas).

    Raises
    ------
    DetachedShockError
        ``deflection`` above θmax(M1, γ) (θmax(M1, T1) for a thermally perfect gas);
        the message gives θmax.
    InvalidInputError
        Any other input outside its range, gamma <= 1, several inputs, a thermally
        perfect gas without ``T1`` (or with ``gamma``), a non-positive ``T1``.

    Notes
    -----
    From ``deflection`` the wave angle is the closed-form (trigonometric)
    root of the θ-β-M cubic in sin²β, then one Newton step in a
    cancellation-free variable: exact to rounding from the Mach wave (θ → 0)
    to close to detachment, with no iteration to convergence.

    For a thermally perfect gas (:mod:`~gasdyn2d.relations.thermally_perfect_oblique`)
    the normal component obeys the thermally perfect normal shock at the same T1 and the
    tangential velocity is conserved; from ``deflection`` the jump τ = T2/T1 - 1 starts
    from the perfect-gas solution and takes three Newton steps on tan θ(τ) (a bracketed
    iteration for the few cases near detachment).

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eqs. 138-150 (and its imperfect-gas
    section for the thermally perfect gas, from memory).
    Thompson, M. J. (1950), "A note on the calculation of oblique shock-wave
    characteristics", J. Aeronaut. Sci. 17(11), 744.
    Wolf, T. (1993), "Comment on approximate formula of weak oblique shock
    wave angle", AIAA J. 31(7), 1363.

    Examples
    --------
    >>> from gasdyn2d import oblique_shock, ureg
    >>> shock = oblique_shock(2.0, deflection=10 * ureg.deg)
    >>> round(shock.wave_angle.m_as("deg"), 4), round(shock.p2_p1, 5)
    (39.3139, 1.70658)
    >>> round(oblique_shock(2.0, deflection=10 * ureg.deg, branch="strong").wave_angle.m, 4)
    83.7001
    >>> from gasdyn2d import AIR_THERMALLY_PERFECT
    >>> hot = oblique_shock(5.0, deflection=0.5, T1=300.0, gas=AIR_THERMALLY_PERFECT)
    >>> round(float(np.degrees(hot.wave_angle)), 4), round(hot.p2_p1, 4)
    (39.9462, 11.9818)
    """
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(M1) is float and type(deflection) is float and type(gamma) is float
            and 1.0 <= M1 < math.inf and 0.0 <= deflection <= TWO_PI and 1.0 < gamma < math.inf
            and wave_angle is None and Mn1 is None and p2_p1 is None and T1 is None
            and gas is None and errors in SCALAR_CHECKS and branch in _BRANCHES):
        # the scalar fast lane: valid plain floats and an attached shock, for which the
        # general path's checked core returns exactly these fields; anything else (a
        # detached shock among them) takes the general path and its message
        beta, *fields = _shock_from_deflection_scalar(M1, deflection, gamma, branch == "strong")
        if beta == beta:
            return ObliqueShock.from_fields((M1, deflection, beta, *fields, gamma, gamma))
    name, value = one_of("oblique_shock", deflection=deflection, wave_angle=wave_angle, Mn1=Mn1,
                         p2_p1=p2_p1)
    strong = choice("branch", branch, {"weak": False, "strong": True})
    gamma, hot = gas_of_call("oblique_shock", gamma, gas, T1, "T1",
                             "upstream static temperature")
    call = Call(errors)
    call.take("M1", M1)
    call.take(name, value, "rad" if name in ("deflection", "wave_angle") else "")
    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T1 is None:
            return call.run(ObliqueShock, _oblique_core, name=name, strong=strong)
    from .thermally_perfect_calls import hot_oblique_core, perfect_with_temperature

    call.take("T1", T1, "K")
    if hot is None:  # a perfect gas: T1 checked and broadcast, the ratios do not depend on it
        return call.run(ObliqueShock, perfect_with_temperature(_oblique_core, "T1"), name=name,
                        strong=strong)
    return call.run(ObliqueShock, hot_oblique_core, name=name, strong=strong, gas=hot)


_ANGLE_PAIR = (FieldInfo("deflection", "rad", np.dtype(float), "flow deflection θ", "rad"),
               FieldInfo("wave_angle", "rad", np.dtype(float), "wave angle β", "rad"))


_BRANCHES = ("weak", "strong")


def _angle_pair(function, M1, T1, gamma, gas, errors, plain):
    if gas is None and gamma is None:
        gamma = 1.4
    if (type(M1) is float and type(gamma) is float and 1.0 <= M1 < math.inf
            and 1.0 < gamma < math.inf and T1 is None and gas is None
            and errors in SCALAR_CHECKS):
        return plain(M1, gamma)  # the scalar fast lane (plain cores dispatch to math forms)
    gamma, hot = gas_of_call(function, gamma, gas, T1, "T1", "upstream static temperature")
    call = Call(errors)
    call.take("M1", M1)

    def core(M1, gamma, check):
        gamma = check.gamma(gamma)
        return plain(check.supersonic_mach(M1, "M1"), gamma)

    if hot is None:
        call.take("gamma", gamma, keep_scalar=True)
        if T1 is None:
            return tuple(call.evaluate(_ANGLE_PAIR, core))
    from . import thermally_perfect_calls as calls

    call.take("T1", T1, "K")
    if hot is None:  # a perfect gas: T1 checked and broadcast, the angles do not depend on it
        return tuple(call.evaluate(_ANGLE_PAIR, calls.perfect_with_temperature(core, "T1")))
    hot_core = calls.hot_detachment_core if plain is detachment_angles else calls.hot_sonic_core
    return tuple(call.evaluate(_ANGLE_PAIR, hot_core, gas=hot))


def max_deflection(M1: ArrayInput, *, T1: ArrayInput = None, gamma: ArrayInput = None,
                   gas=None, errors: str = "raise") -> tuple[FloatArray, FloatArray]:
    """Detachment point: the largest deflection an attached shock can give, and its wave angle.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    T1 : float, array_like or Quantity, optional
        Static temperature ahead of the shock [K], > 0: required for a thermally perfect
        ``gas``; with a perfect gas it is checked and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``); a thermally perfect one needs ``T1``.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    deflection, wave_angle : float or ndarray
        θmax and β at θmax [rad].

    Notes
    -----
    Closed form (NACA Report 1135, eq. 168); θmax → asin(1/γ) as M1 → ∞. For a
    thermally perfect gas, a bracketed Newton iteration on d tan θ/dτ = 0 along the
    shock polar in τ = T2/T1 - 1 (:func:`~gasdyn2d.relations.thermally_perfect_oblique.detachment_angles`).

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 168.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import max_deflection
    >>> theta, beta = max_deflection(2.0)
    >>> round(float(np.degrees(theta)), 4), round(float(np.degrees(beta)), 3)
    (22.9735, 64.669)
    """
    return _angle_pair("max_deflection", M1, T1, gamma, gas, errors, detachment_angles)


def sonic_deflection(M1: ArrayInput, *, T1: ArrayInput = None, gamma: ArrayInput = None,
                     gas=None, errors: str = "raise") -> tuple[FloatArray, FloatArray]:
    """Deflection and wave angle at which the flow behind the shock is exactly sonic.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], >= 1.
    T1 : float, array_like or Quantity, optional
        Static temperature ahead of the shock [K], > 0: required for a thermally perfect
        ``gas``; with a perfect gas it is checked and broadcast, and not used.
    gamma : float or array_like, optional
        Ratio of specific heats of a perfect gas [-], > 1 (default 1.4, or ``gas.gamma``).
    gas : Gas, optional
        The gas (default: a perfect gas of ``gamma``); a thermally perfect one needs ``T1``.
    errors : {"raise", "nan"}, optional
        What to do with invalid elements.

    Returns
    -------
    deflection, wave_angle : float or ndarray
        θ and β [rad] with M2 = 1; slightly below the detachment values.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, eq. 167.

    Examples
    --------
    >>> from gasdyn2d import sonic_deflection, oblique_shock
    >>> theta, beta = sonic_deflection(3.0)
    >>> round(oblique_shock(3.0, wave_angle=beta).M2, 12)
    1.0
    """
    return _angle_pair("sonic_deflection", M1, T1, gamma, gas, errors, sonic_angles)
