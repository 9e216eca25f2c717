"""Conical probes: the free-stream Mach number from a cone's surface pressure.

A cone at zero incidence with pressure holes on its surface is how supersonic
tunnels and flight probes commonly measure the Mach number (common practice):
the ratio of the surface pressure to the pitot pressure (or to the free-stream
stagnation pressure) depends, at a fixed cone angle, on the Mach number alone
and falls monotonically with it.

Plain core: :func:`mach_from_cone_pressure` (floats and ndarrays, no pint).
Unit boundary: :func:`cone_probe_flow` (result
:class:`~gasdyn2d.relations.conical_flow.ConeFlow`).
"""

from __future__ import annotations

import numpy as np

from .. import numerics as nx
from ..boundary import Call, choice
from ..boundary.types import ArrayInput
from ..errors import InvalidInputError
from ..numerics import nan_where_nan
from .conical_flow import (ConeFlow, check_cone_angle, cone_detachment_angles,
                           cone_flow_from_cone_angle)
from .normal_shocks import pitot_ratio
from .oblique_shocks import detachment_angles

__all__ = ["cone_probe_flow", "mach_from_cone_pressure"]


_PROBE_REFERENCES = ("pitot", "stagnation")
_PROBE_MAX_MACH = 1000.0  # above this the ratio is taken as out of reach
_PROBE_TOL = 1e-14  # in ln(M1 - 1)
_PROBE_ITER = 80
_ATTACHED_SIDE = 1e-9  # in ln(M1 - 1): just above the Mach number where the shock attaches


def _probe_log_ratio(M1, theta, gamma, reference):
    """ln(p_cone/p_ref) at M1 on the cone θc (NaN where the shock detaches)."""
    scalar = nx.plain_scalars(M1, theta, gamma)
    flow = cone_flow_from_cone_angle(M1, theta, gamma)
    with np.errstate(invalid="ignore", divide="ignore"):
        if reference == "pitot":  # p02 behind a normal shock (NACA Report 1135, eq. 100)
            log_ref = np.log(pitot_ratio(M1, gamma))
        else:  # p01/p1 (eq. 44)
            log_ref = gamma / (gamma - 1.0) * np.log1p(0.5 * (gamma - 1.0) * M1 * M1)
        out = np.log(flow.p_cone_p1) - log_ref
    return float(out) if scalar else out


def _wedge_attachment_mach(theta, gamma):
    """Mach number above which a wedge of half-angle θ has an attached shock (inf if
    none: θ >= asin(1/γ)); bisection in ln(M - 1) on the closed-form θmax (eq. 168)."""
    theta, gamma = np.broadcast_arrays(np.asarray(theta, float), np.asarray(gamma, float))
    lo, hi = np.full(theta.shape, -30.0), np.full(theta.shape, 12.0)
    with np.errstate(invalid="ignore"):
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            attached = detachment_angles(1.0 + np.exp(mid), gamma)[0] >= theta
            lo, hi = np.where(attached, lo, mid), np.where(attached, mid, hi)
        return np.where(theta < np.arcsin(1.0 / gamma), 1.0 + np.exp(hi), np.inf)


def mach_from_cone_pressure(pressure_ratio, cone_angle, gamma=1.4, reference="pitot"):
    """Plain core: free-stream Mach number from a cone's surface pressure ratio.

    Parameters
    ----------
    pressure_ratio : float or ndarray
        p_cone/p_pitot (``reference="pitot"``: the pressure a pitot tube reads, behind
        a normal shock) or p_cone/p01 (``"stagnation"``: free-stream stagnation
        pressure) [-].
    cone_angle : float or ndarray
        Cone half-angle θc [rad], > 0.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].
    reference : {"pitot", "stagnation"}

    Returns
    -------
    float or ndarray
        M1 [-]; NaN where no attached shock gives the ratio (above the ratio at the
        Mach number where the shock detaches, or below the hypersonic limit).

    Notes
    -----
    Both ratios fall monotonically with M1 at a fixed cone angle (checked from
    detachment to M1 = 30 for θc 5°-40°). The root is bracketed in ln(M1 - 1),
    starting where a wedge of the same half-angle attaches (the cone's shock is
    attached there too), stepping by factors e until the residual changes sign
    (bisecting towards the first attached Mach number when a step lands on a
    detached shock), and refined by the Illinois iteration; each evaluation is a
    vectorised :func:`cone_flow_from_cone_angle`. At high Mach numbers the pitot
    ratio tends to a constant (Mach-number independence), so there M1 is badly
    conditioned in the ratio: |d ln M1/d ln ratio| grows without bound.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_flow import cone_flow_from_cone_angle
    >>> from gasdyn2d.relations.cone_probes import mach_from_cone_pressure
    >>> from gasdyn2d.relations.normal_shocks import pitot_ratio
    >>> flow = cone_flow_from_cone_angle(2.5, math.radians(10.0))
    >>> ratio = flow.p_cone_p1 / float(pitot_ratio(2.5))
    >>> round(mach_from_cone_pressure(ratio, math.radians(10.0)), 10)
    2.5
    """
    if reference not in _PROBE_REFERENCES:
        raise InvalidInputError(f"reference must be 'pitot' or 'stagnation'; got {reference!r}.")
    scalar = nx.plain_scalars(pressure_ratio, cone_angle, gamma)
    ratio, theta, gamma = nx.broadcast_cases(gamma, pressure_ratio, cone_angle)
    g = np.broadcast_to(gamma, ratio.shape)
    with np.errstate(invalid="ignore", divide="ignore"):
        log_target = np.where((ratio > 0) & (theta > 0), np.log(ratio), np.nan)
        shape = ratio.shape
        t_flat, g_flat, goal = theta.reshape(-1), g.reshape(-1), log_target.reshape(-1)

        def residual(index, u):
            M1 = 1.0 + np.exp(u)
            if scalar:
                return _probe_log_ratio(float(M1[0]), float(t_flat[0]), float(g_flat[0]),
                                        reference) - goal[index], None
            return _probe_log_ratio(M1, t_flat[index], g_flat[index], reference) - goal[index], None

        lo, hi, f_lo, f_hi = _probe_bracket(residual, t_flat, g_flat, goal)
        u, _ = nx.regula_falsi(lambda i, x: (residual(i, x)[0], 0.0 * x), lo, hi, f_lo, f_hi,
                             _PROBE_TOL, _PROBE_ITER)
        M1 = (1.0 + np.exp(u)).reshape(shape)
    return float(M1) if scalar else M1


def _attachment_log_mach(theta, gamma, u_attached):
    """u = ln(M1 - 1) at which cones θ (arrays) have θc,max(M1) = θ: the Illinois
    iteration on θ - θc,max(1 + e^u) between u_attached (an attached Mach number) and
    6 below it (a factor 400 in M1 - 1; NaN there counts as detached)."""
    theta, gamma = np.broadcast_arrays(theta, gamma)

    def excess(index, u):
        return theta[index] - cone_detachment_angles(1.0 + np.exp(u), gamma[index])[0], None

    index = np.arange(theta.size)
    lo = u_attached - 6.0
    f_lo, _ = excess(index, lo)
    f_hi, _ = excess(index, u_attached)
    u, _ = nx.regula_falsi(lambda i, u: (excess(i, u)[0], 0.0 * u), lo, u_attached,
                           np.where(np.isnan(f_lo), theta, f_lo), f_hi, 1e-12, _PROBE_ITER)
    return u


def _probe_bracket(residual, theta, gamma, goal):
    """[lo, hi] in u = ln(M1 - 1) with residual(lo) > 0 > residual(hi) (see
    :func:`mach_from_cone_pressure`); NaN residuals where no bracket exists."""
    u0 = np.log(_wedge_attachment_mach(theta, gamma) - 1.0)
    u0 = np.where(np.isfinite(u0), u0, np.log(20.0))
    n = u0.size
    lo, hi = np.full(n, np.nan), np.full(n, np.nan)
    f_lo, f_hi = np.full(n, np.nan), np.full(n, np.nan)
    u, f = u0.copy(), np.full(n, np.nan)
    todo = np.flatnonzero(np.isfinite(goal))
    f[todo] = residual(todo, u[todo])[0]
    # upwards from attached points above the target, downwards from the others
    for _ in range(int(np.log(_PROBE_MAX_MACH)) + 2):
        up = todo[f[todo] > 0]
        lo[up], f_lo[up] = u[up], f[up]
        down = todo[f[todo] < 0]
        hi[down], f_hi[down] = u[down], f[down]
        todo = np.concatenate([up[np.isnan(hi[up])], down[np.isnan(lo[down])]])
        todo = todo[np.isnan(lo[todo]) | np.isnan(hi[todo])]
        if todo.size == 0:
            break
        step = np.where(np.isnan(hi[todo]), 1.0, -1.0)
        u[todo] = u[todo] + step
        beyond = u[todo] > np.log(_PROBE_MAX_MACH)
        todo = todo[~beyond]
        f[todo] = residual(todo, u[todo])[0]
        detached = todo[np.isnan(f[todo])]
        if detached.size:  # the step passed attachment: the bracket's low end is attachment
            u_attach = _attachment_log_mach(theta[detached], gamma[detached], hi[detached])
            u[detached] = u_attach + _ATTACHED_SIDE
            f[detached] = residual(detached, u[detached])[0]
            found = f[detached] > 0  # else the ratio is above its value at attachment: none
            lo[detached[found]], f_lo[detached[found]] = u[detached[found]], f[detached[found]]
            todo = todo[~np.isnan(f[todo])]
            todo = np.setdiff1d(todo, detached)
    return lo, hi, f_lo, f_hi


# ------------------------------------------------------------------ unit boundary


def _reach(theta, gamma, reference):
    """(largest, smallest) ratio an attached shock gives on the cone θ and the Mach number
    where it attaches: at attachment (:func:`_attachment_log_mach`) and at M1 = 1000."""
    u_wedge = float(np.log(_wedge_attachment_mach(theta, gamma) - 1.0))
    u_wedge = u_wedge if np.isfinite(u_wedge) else float(np.log(_PROBE_MAX_MACH - 1.0))
    u = _attachment_log_mach(np.array([theta]), np.array([gamma]), np.array([u_wedge]))[0]
    M_attach = 1.0 + float(np.exp(u + _ATTACHED_SIDE))
    return (float(np.exp(_probe_log_ratio(M_attach, theta, gamma, reference))),
            float(np.exp(_probe_log_ratio(_PROBE_MAX_MACH, theta, gamma, reference))), M_attach)


def _probe_core(ratio, theta, gamma, check, *, reference):
    """Checked core of :func:`cone_probe_flow` (floats or arrays): the ConeFlow fields."""
    gamma = check.gamma(gamma)
    ratio = check.positive(ratio, "pressure_ratio", what="a pressure ratio")
    theta = check_cone_angle(theta, check)
    if type(theta) is float:
        bad = theta == 0.0
    else:
        bad = theta == 0.0
    theta = check.reject(bad, theta, "cone_angle", "> 0 (a probe cone)", unit_text="rad",
                         hint="A zero-angle cone reads the static pressure: use "
                              "gasdyn2d.relations.normal_shocks.mach_from_pitot_ratio.")
    M1 = mach_from_cone_pressure(ratio, theta, gamma, reference)
    if type(M1) is float:
        failed = M1 != M1 and not (ratio != ratio or theta != theta or gamma != gamma)
        failed_any = failed
    else:
        with np.errstate(invalid="ignore"):
            failed = np.isnan(M1) & ~np.isnan(ratio) & ~np.isnan(theta) & ~np.isnan(gamma)
        failed_any = bool(failed.any())
    if failed_any:
        if not check.nan:
            flat = np.atleast_1d(failed)
            first = int(np.flatnonzero(flat.reshape(-1))[0])
            high, low, M_attach = _reach(
                float(np.broadcast_to(theta, flat.shape).reshape(-1)[first]),
                float(np.broadcast_to(gamma, flat.shape).reshape(-1)[first]), reference)
            check.reject(failed, ratio, "pressure_ratio",
                         f"a ratio an attached conical shock gives on this cone ({reference} "
                         "reference)",
                         hint=f"On that cone the ratio runs from {high:.10g} where the shock "
                              f"attaches (M1 = {M_attach:.6g}) down to {low:.10g} at M1 = "
                              f"{_PROBE_MAX_MACH:g}; a larger ratio means a detached bow shock.")
    flow = cone_flow_from_cone_angle(M1, theta, gamma)
    return (M1, nan_where_nan(flow.wave_angle, theta), *flow[1:])


def cone_probe_flow(pressure_ratio: ArrayInput, *, cone_angle: ArrayInput,
                    reference: str = "pitot", gamma: ArrayInput = 1.4,
                    errors: str = "raise") -> ConeFlow:
    """The free stream over a conical probe, from its surface pressure ratio.

    Parameters
    ----------
    pressure_ratio : float or array_like
        Measured surface pressure of the cone over the pitot pressure
        (``reference="pitot"``, the pressure behind a normal shock) or over the
        free-stream stagnation pressure (``"stagnation"``) [-].
    cone_angle : float, array_like or Quantity
        Half-angle of the probe's cone [rad], > 0.
    reference : {"pitot", "stagnation"}, optional
        Which pressure the surface pressure is divided by.
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        ``"nan"`` returns NaN for invalid elements instead of raising.

    Returns
    -------
    ConeFlow
        The flow at the Mach number that gives the ratio (its ``M1`` field), with
        the shock and surface quantities.

    Raises
    ------
    InvalidInputError
        A ratio no attached conical shock gives on this cone (above the value at
        the Mach number where the shock attaches, or below the value at M1 = 1000;
        the message gives both), a cone angle <= 0, gamma <= 1, an unknown
        ``reference``.

    Notes
    -----
    :func:`mach_from_cone_pressure` (bracketed Illinois iteration in ln(M1 - 1) on
    the vectorised cone solution). The pitot ratio flattens at high Mach numbers
    (the cone and the pitot tube both approach Newtonian pressures), so a probe
    read that way resolves the Mach number less and less well there.

    Examples
    --------
    >>> from gasdyn2d import cone_flow, cone_probe_flow, ureg
    >>> from gasdyn2d.relations.normal_shocks import pitot_ratio
    >>> true = cone_flow(2.5, cone_angle=10 * ureg.deg)  # an invented tunnel probe
    >>> reading = true.p_cone_p1 / float(pitot_ratio(2.5))
    >>> round(cone_probe_flow(reading, cone_angle=10 * ureg.deg).M1, 9)
    2.5
    """
    choice("reference", reference, {r: r for r in _PROBE_REFERENCES})
    call = Call(errors)
    call.take("pressure_ratio", pressure_ratio)
    call.take("cone_angle", cone_angle, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ConeFlow, _probe_core, reference=reference)
