"""Intake design rules: optimum ramp turns and the starting limits of internal contraction.

- :func:`optimal_ramps` — the ramp turns of a planar external-compression
  intake that maximise the stagnation-pressure recovery with a terminal normal
  shock, found by numerical optimisation, with the simpler all-shocks-equal
  rule beside it;
- :func:`contraction_limits` — how far an internal-contraction (or the
  internal part of a mixed-compression) intake may contract and still start:
  the Kantrowitz limit, with the isentropic limit beside it.

Plain core (ndarrays, radians, no pint): :func:`train_from_normal_machs`,
:func:`equal_strength_normal_mach`, :func:`kantrowitz_area_ratio`,
:func:`isentropic_area_ratio_limit`.
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numbers

import numpy as np

from ..boundary import Call, ResultTable, refuse_type, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..errors import InvalidInputError, NoSolutionError
from ..relations.isentropic import area_ratio
from ..relations.normal_shocks import normal_shock_ratios
from ..relations.oblique_shocks import oblique_shock_ratios, sonic_angles

__all__ = [
    "optimal_ramps",
    "OptimalRamps",
    "contraction_limits",
    "ContractionLimits",
    "RampTrain",
    "train_from_normal_machs",
    "equal_strength_normal_mach",
    "kantrowitz_area_ratio",
    "isentropic_area_ratio_limit",
]

_BISECTION_STEPS = 64  # halves [1, M] to below 1e-16 relative
_DIFFERENCE_STEP = 1e-6  # central differences in the logit variables: error ~ h² ~ 1e-12
_GRADIENT_TOLERANCE = 1e-10


# ------------------------------------------------------------------ plain core


class RampTrain(NamedTuple):
    """Plain-core result of :func:`train_from_normal_machs` (ramps on the last axis)."""

    deflections: np.ndarray
    mach: np.ndarray
    log_recovery: np.ndarray
    terminal_normal_mach: np.ndarray


def train_from_normal_machs(M, normal_machs, gamma=1.4):
    """Plain core: ramp turns and recovery of oblique shocks with given normal Mach numbers.

    Parameters
    ----------
    M : float or ndarray
        Free-stream Mach number [-].
    normal_machs : ndarray
        Upstream normal Mach number of each ramp shock [-], ramps on the last axis.
    gamma : float or ndarray
        Ratio of specific heats [-].

    Returns
    -------
    RampTrain
        ``deflections`` [rad] (n), ``mach`` (n + 1, free stream first),
        ``log_recovery`` (ln p0 ratio including a terminal normal shock at the
        last Mach number), ``terminal_normal_mach``. NaN where a normal Mach
        number exceeds the Mach number it acts on.

    Notes
    -----
    βk = asin(Mn,k / M(k-1)); θk and M(k) from the oblique-shock relations
    (NACA Report 1135, eqs. 128-138); ln p0 ratios add (eq. 99).
    """
    mn = np.atleast_1d(np.asarray(normal_machs, dtype=float))
    machs = [np.asarray(M, dtype=float) + 0.0 * mn[..., 0]]
    thetas, log_recovery = [], 0.0
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(mn.shape[-1]):
            beta = np.arcsin(mn[..., k] / machs[-1])
            ratios = oblique_shock_ratios(machs[-1], beta, gamma)
            thetas.append(ratios.deflection)
            machs.append(ratios.M2)
            log_recovery = log_recovery + np.log(ratios.p02_p01)
        last = machs[-1]
        log_recovery = log_recovery + np.log(normal_shock_ratios((last - 1.0) * (last + 1.0),
                                                                  gamma).p02_p01)
    return RampTrain(np.stack(thetas, axis=-1), np.stack(machs, axis=-1), log_recovery, last)


def equal_strength_normal_mach(M, n_ramps, gamma=1.4):
    """Plain core: the normal Mach number shared by n ramp shocks and the terminal shock.

    The all-shocks-equal rule: every oblique shock and the terminal normal shock
    have the same upstream normal Mach number m, i.e. M(n)(m) = m. Found by
    bisection on [1, M] (a fixed number of halvings, vectorised over cases);
    M(n) falls as m rises, so the root is unique.

    Examples
    --------
    >>> from gasdyn2d.design.intake_design import equal_strength_normal_mach
    >>> round(float(equal_strength_normal_mach(3.0, 2)), 6)
    1.572148
    """
    M = np.asarray(M, dtype=float)
    gamma = np.asarray(gamma, dtype=float)
    lo = np.ones(np.broadcast_shapes(M.shape, gamma.shape))
    hi = lo * M
    for _ in range(_BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        last = train_from_normal_machs(M, np.repeat(mid[..., None], n_ramps, axis=-1),
                                       gamma).terminal_normal_mach
        too_weak = last > mid  # NaN (a shock too strong for its stage) counts as too strong
        lo, hi = np.where(too_weak, mid, lo), np.where(too_weak, hi, mid)
    return np.where(np.isnan(M) | np.isnan(gamma), np.nan, 0.5 * (lo + hi))


def _normal_machs_from_logits(M, z, gamma):
    """Mn,k = 1 + (M(k-1) sin βs - 1) / (1 + e^-z): every shock weak, every stage supersonic.

    ``z`` has shape (cases, n); βs is the sonic wave angle at M(k-1), so the
    flow behind every shock stays supersonic and the map covers every such train.
    """
    mach = np.broadcast_to(np.asarray(M, dtype=float), z.shape[:-1])
    normal = []
    with np.errstate(invalid="ignore", over="ignore"):
        for k in range(z.shape[-1]):
            _, beta_sonic = sonic_angles(mach, gamma)
            mn = 1.0 + (mach * np.sin(beta_sonic) - 1.0) / (1.0 + np.exp(-z[..., k]))
            normal.append(mn)
            ratios = oblique_shock_ratios(mach, np.arcsin(np.minimum(mn / mach, 1.0)), gamma)
            mach = ratios.M2
    return np.stack(normal, axis=-1)


def _logits_from_normal_machs(M, mn, gamma):
    mach, z = M, []
    for k in range(mn.shape[-1]):
        _, beta_sonic = sonic_angles(mach, gamma)
        u = (mn[k] - 1.0) / (mach * np.sin(beta_sonic) - 1.0)
        u = min(max(u, 1e-12), 1.0 - 1e-12)
        z.append(np.log(u / (1.0 - u)))
        mach = float(oblique_shock_ratios(mach, np.arcsin(mn[k] / mach), gamma).M2)
    return np.array(z)


def _optimise_one(M, n_ramps, gamma, start):
    """Maximise ln recovery over the logits of one case (BFGS, vectorised central differences)."""
    from scipy import optimize  # imported when first used: it is slow to import

    n = n_ramps
    steps = np.vstack([np.zeros(n), _DIFFERENCE_STEP * np.eye(n), -_DIFFERENCE_STEP * np.eye(n)])

    def loss(points):
        return -train_from_normal_machs(M, _normal_machs_from_logits(M, points, gamma),
                                        gamma).log_recovery

    z0 = _logits_from_normal_machs(M, start, gamma)
    scale = 1.0 / max(float(loss(z0[None, :])[0]), 1e-300)  # the loss relative to the start's

    def value_and_gradient(z):
        values = scale * loss(z[None, :] + steps)
        gradient = (values[1:n + 1] - values[n + 1:]) / (2.0 * _DIFFERENCE_STEP)
        return values[0], gradient

    result = optimize.minimize(value_and_gradient, z0, jac=True, method="BFGS",
                               options={"gtol": _GRADIENT_TOLERANCE, "maxiter": 400})
    if not np.isfinite(result.fun):
        raise NoSolutionError(f"optimal_ramps: the optimisation failed at M = {M:.6g} "
                              f"({result.message}).")
    return _normal_machs_from_logits(M, result.x[None, :], gamma)[0]


# ------------------------------------------------------------------ unit boundary


@dataclasses.dataclass(frozen=True, repr=False)
class OptimalRamps(ResultTable):
    """Ramp turns of maximum recovery, and the all-shocks-equal rule beside them.

    Per-shock fields have the shocks on the last axis: the n ramp shocks, and
    for ``normal_mach`` the terminal normal shock last.
    """

    M: FloatArray = unit_field("", "free-stream Mach number")
    deflections: FloatArray = unit_field("rad", "optimum turn of each ramp", trailing="ramp")
    recovery: FloatArray = unit_field("", "optimum stagnation-pressure recovery")
    normal_mach: FloatArray = unit_field("", "upstream normal Mach number of every shock",
                                         trailing="shock")
    stage_mach: FloatArray = unit_field("", "Mach number behind each ramp shock", trailing="ramp")
    equal_strength_deflections: FloatArray = unit_field("rad", "ramp turns of the equal rule",
                                                        trailing="ramp")
    equal_strength_recovery: FloatArray = unit_field("", "recovery of the all-shocks-equal rule")
    equal_strength_normal_mach: FloatArray = unit_field("", "the shared normal Mach number")


def _optimal_core(M, gamma, check, *, n_ramps):
    """Checked core of :func:`optimal_ramps` (floats or arrays): the fields in order."""
    scalar = type(M) is float
    gamma = check.gamma(gamma)
    M = check.at_least(np.array([M]) if scalar else M, "M", 1.0, inclusive=False,
                       what="supersonic flow")
    gamma_a = np.broadcast_to(np.asarray(gamma, dtype=float), M.shape)
    equal = equal_strength_normal_mach(M, n_ramps, gamma_a)
    equal_train = train_from_normal_machs(M, np.repeat(equal[..., None], n_ramps, axis=-1),
                                          gamma_a)
    best = np.full(M.shape + (n_ramps,), np.nan)
    for index in np.ndindex(M.shape):  # one optimisation per case (a few ms each)
        if np.isfinite(M[index]) and np.isfinite(gamma_a[index]):
            start = np.full(n_ramps, equal[index])
            best[index] = _optimise_one(float(M[index]), n_ramps, float(gamma_a[index]), start)
    train = train_from_normal_machs(M, best, gamma_a)
    fields = (M, train.deflections, np.exp(train.log_recovery),
              np.concatenate([best, train.terminal_normal_mach[..., None]], axis=-1),
              train.mach[..., 1:], equal_train.deflections, np.exp(equal_train.log_recovery),
              equal)
    return tuple(f[0] for f in fields) if scalar else fields


def _ramp_count(n_ramps):
    if isinstance(n_ramps, (bool, np.bool_)) or not isinstance(n_ramps, numbers.Integral):
        if isinstance(n_ramps, numbers.Real) and not isinstance(n_ramps, (bool, np.bool_)) and \
                float(n_ramps).is_integer():
            n_ramps = int(n_ramps)
        else:
            raise refuse_type("n_ramps", n_ramps, "a positive whole number of ramps")
    if n_ramps < 1:
        raise InvalidInputError(f"n_ramps must be a positive integer; got {n_ramps!r}.")
    return int(n_ramps)


def optimal_ramps(M: ArrayInput, n_ramps: int, *, gamma: ArrayInput = 1.4,
                  errors: str = "raise") -> OptimalRamps:
    """The n ramp turns that maximise the recovery of an external-compression intake.

    Parameters
    ----------
    M : float or array_like
        Free-stream (design) Mach number [-], > 1.
    n_ramps : int
        Number of compression ramps (oblique shocks) ahead of the terminal normal shock, >= 1.
    gamma : float, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid Mach numbers instead of raising.

    Returns
    -------
    OptimalRamps
        Angles in radians (radian Quantities when ``M`` was a Quantity); pass
        ``deflections`` straight to :func:`gasdyn2d.design.intakes.ramp_intake`.

    Raises
    ------
    InvalidInputError
        ``M`` <= 1, ``n_ramps`` not a positive integer, gamma <= 1.
    NoSolutionError
        The optimiser failed (not expected for 1 < M < 20).

    Notes
    -----
    Recovery = ∏ p0 ratios of the n oblique shocks and the terminal normal
    shock at M(n). The unknowns are the oblique shocks' normal Mach numbers,
    each mapped through a logistic function onto (1, M(k-1) sin βs) so that
    every shock is weak and every stage supersonic; BFGS (scipy.optimize)
    maximises ln recovery with a central-difference gradient evaluated in one
    numpy call, warm-started from the all-shocks-equal rule (every shock, the
    terminal one too, at one normal Mach number). Cases loop in Python; each
    takes a few milliseconds.

    Oswatitsch showed that at the optimum the oblique shocks have equal normal
    Mach numbers and the terminal shock is slightly weaker; the optimiser does
    not assume it, and the tests check that it finds it.

    References
    ----------
    Oswatitsch, K. (1944), "Pressure recovery for missiles with reaction
    propulsion at high supersonic speeds (the efficiency of shock diffusers)",
    translated as NACA TM 1140, 1947.

    Examples
    --------
    >>> from gasdyn2d.design.intake_design import optimal_ramps
    >>> best = optimal_ramps(3.0, 2)
    >>> round(best.recovery, 6), round(best.equal_strength_recovery, 6)
    (0.743652, 0.742157)
    >>> [round(float(m), 5) for m in best.normal_mach]
    [1.59936, 1.59936, 1.50727]
    """
    n_ramps = _ramp_count(n_ramps)
    call = Call(errors)
    call.take("M", M)
    call.take("gamma", gamma, keep_scalar=True)
    call.trailing("ramp", n_ramps)
    call.trailing("shock", n_ramps + 1)
    return call.run(OptimalRamps, _optimal_core, n_ramps=n_ramps)


# ------------------------------------------------------------------ starting limits


def kantrowitz_area_ratio(M, gamma=1.4):
    """Plain core: the Kantrowitz limit A(throat)/A(entrance) for entrance Mach number M.

    A normal shock standing at the entrance leaves subsonic flow at M2 with
    stagnation pressure p02 = p01 (p02/p01); the throat passes that flow without
    choking the shock back out if A(throat)/A(entrance) >= A*2/A(entrance) =
    (p01/p02) · A*1/A(entrance) = 1 / [(A/A*)(M) · (p02/p01)(M)].
    Tends to 0.6 as M → ∞ for γ = 1.4.
    """
    M = np.asarray(M, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        p0 = normal_shock_ratios((M - 1.0) * (M + 1.0), gamma).p02_p01
        return 1.0 / (area_ratio(M, gamma) * p0)


def isentropic_area_ratio_limit(M, gamma=1.4):
    """Plain core: A*/A(M), the contraction of an isentropic compression to sonic flow."""
    M = np.asarray(M, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return 1.0 / area_ratio(M, gamma)


@dataclasses.dataclass(frozen=True, repr=False)
class ContractionLimits(ResultTable):
    """How much an internal-contraction duct may contract, as throat/entrance area ratios."""

    entrance_mach: FloatArray = unit_field("", "Mach number entering the internal contraction")
    self_starting: FloatArray = unit_field("", "Kantrowitz limit: largest contraction that starts")
    isentropic: FloatArray = unit_field("", "A*/A: most contraction a started duct can run at")


def _contraction_core(M, gamma, check):
    gamma = check.gamma(gamma)
    M = check.supersonic_mach(M, "entrance_mach")
    if type(M) is float:
        return (M, float(kantrowitz_area_ratio(M, gamma)),
                float(isentropic_area_ratio_limit(M, gamma)))
    return M, kantrowitz_area_ratio(M, gamma), isentropic_area_ratio_limit(M, gamma)


def contraction_limits(entrance_mach: ArrayInput, *, gamma: ArrayInput = 1.4,
                       errors: str = "raise") -> ContractionLimits:
    """Starting limits of an internal-contraction duct at a supersonic entrance Mach number.

    Parameters
    ----------
    entrance_mach : float or array_like
        Mach number at the entrance of the internal contraction [-], >= 1:
        the free stream for an all-internal intake, the flow behind the
        external ramps for a mixed-compression one
        (``ramp_intake(..., terminal="none").stage_mach[..., -1]``).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ContractionLimits
        ``self_starting`` (Kantrowitz) and ``isentropic`` area ratios
        A(throat)/A(entrance); a duct with a ratio between them runs supersonically
        once started but does not start by itself.

    Notes
    -----
    Kantrowitz: A(throat)/A(entrance) = 1/[(A/A*)(M) (p02/p01)(M)], the throat
    that passes the flow behind a normal shock standing at the entrance; with
    less area the shock is pushed out ahead of the duct and the intake stays
    unstarted (Kantrowitz & Donaldson, 1945; derivation from memory). The
    isentropic limit A*/A(M) is the most a started duct can contract. For
    γ = 1.4 the Kantrowitz ratio rises from 1 at M = 1 to 0.6 as M → ∞.

    References
    ----------
    Kantrowitz, A. and Donaldson, C. duP. (1945), "Preliminary investigation of
    supersonic diffusers", NACA ACR L5D20 (details from memory).

    Examples
    --------
    >>> from gasdyn2d.design.intake_design import contraction_limits
    >>> limits = contraction_limits(2.0)
    >>> round(limits.self_starting, 5), round(limits.isentropic, 5)
    (0.82205, 0.59259)
    """
    call = Call(errors)
    call.take("entrance_mach", entrance_mach)
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ContractionLimits, _contraction_core)
