"""Conical shocks: the attached shock and surface flow of a cone at zero incidence (plain core).

The round counterpart of the wedge shock. A straight conical shock of wave
angle β stands on a cone of half-angle θc < β; behind it the flow keeps
compressing isentropically towards the surface (Taylor & Maccoll 1933), so the
shock is weaker than a wedge's of the same half-angle and the surface pressure
is higher than the pressure just behind the shock.

Plain core (floats and ndarrays, radians, no pint; NaN for invalid elements):

- :func:`cone_flow_from_wave_angle` — every quantity from (M1, β): one march;
- :func:`cone_flow_from_cone_angle` — the same from (M1, θc): one Newton step in
  ln w (w = M1² sin²β - 1) with the exact derivative of the discrete map (a
  tangent march), then secant steps, on the whole batch inside a bracket;
- :func:`cone_detachment_angles` — (θc, β) at the largest cone angle, where
  dθc/dβ = 0 (Illinois iteration on the exact derivative);
- :func:`sonic_cone_angles` — (θc, β) at which the surface flow is sonic.

Each dispatches to the scalar form of the march (Python floats, ``math``) when
every argument is a Python float. The march itself is in
:mod:`gasdyn2d.relations.taylor_maccoll`; the unit boundary
(:func:`~gasdyn2d.relations.conical_flow.cone_flow`,
:func:`~gasdyn2d.relations.conical_flow.max_cone_angle`,
:func:`~gasdyn2d.relations.conical_flow.sonic_cone_angle`, the checks the cone tools
share) in :mod:`gasdyn2d.relations.conical_flow`, which also re-exports these plain
cores under their old paths.

References
----------
Taylor, G. I. & Maccoll, J. W. (1933), Proc. R. Soc. Lond. A 139, 278-311.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from .normal_shocks import normal_shock_ratios
from .taylor_maccoll import ARRAY_MATH, march_shock_layer, shock_start, step_count
from .theta_beta_mach import detachment_angles, wv_from_deflection

__all__ = [
    "ConeFlowRatios",
    "cone_flow_from_wave_angle",
    "cone_flow_from_cone_angle",
    "cone_detachment_angles",
    "sonic_cone_angles",
]

_MACH_WAVE_SLACK = 4e-15  # |M1² sin²β - 1| that rounding of sin β alone can give at β = μ
_BRACKET_WIDTH = 40.0  # the root in ln w lies within this below the explicit start
_LOG_W_TOL = 1e-14  # tolerance of the iterations in ln w (relative in w), absolute below |x| = 1
_RESIDUAL_TOL = 1e-10  # a converged |ln θc - ln θ| above this marks a failed solve
_ROOT_ITER = 60
_DETACHMENT_OFFSETS = (math.radians(-1.5), math.radians(8.0))  # β* bracket about the wedge's
_DETACHMENT_ITER = 60
_DETACHMENT_TOL = 1e-13  # in β [rad]; θc,max is second-order insensitive to it


# ------------------------------------------------------------------ plain core


class ConeFlowRatios(NamedTuple):
    """Plain-core result: the fields of :class:`~gasdyn2d.relations.conical_flow.ConeFlow` as
    floats or ndarrays (radians)."""

    cone_angle: object
    wave_angle: object
    deflection: object
    M2: object
    p2_p1: object
    rho2_rho1: object
    T2_T1: object
    p02_p01: object
    M_cone: object
    p_cone_p1: object
    T_cone_T1: object
    rho_cone_rho1: object
    cp_cone: object


def _fields(M1, w, beta, gamma, start, out):
    """Every field from the shock (w, β) and the march; logarithms keep the small
    jumps of weak shocks and slender cones (p2/p1 - 1 ∝ w, cp ∝ θc²) to full precision."""
    m = math if type(out.L) is float else ARRAY_MATH
    ns = normal_shock_ratios(w, gamma)
    if m is math:
        ns = type(ns)(*(float(x) for x in ns))
    gm = gamma - 1.0
    L = out.L
    log_p_cone = m.log1p(2.0 * gamma / (gamma + 1.0) * w) + gamma / gm * L  # ln(p2/p1) + ln(pc/p2)
    log_rho_cone = m.log1p(2.0 * w / (gm * w + gamma + 1.0)) + L / gm
    return ConeFlowRatios(
        cone_angle=m.exp(out.log_cone), wave_angle=beta, deflection=start.deflection,
        M2=m.sqrt(start.M2_sq), p2_p1=ns.p2_p1, rho2_rho1=ns.rho2_rho1, T2_T1=ns.T2_T1,
        p02_p01=ns.p02_p01, M_cone=m.sqrt(out.M_sq), p_cone_p1=m.exp(log_p_cone),
        T_cone_T1=ns.T2_T1 * m.exp(L), rho_cone_rho1=m.exp(log_rho_cone),
        cp_cone=2.0 * m.expm1(log_p_cone) / (gamma * M1 * M1))


def _mach_cone(M1, beta):
    """Fields of the zero-angle cone: a Mach cone, the free stream on both sides."""
    one = 1.0 + 0.0 * M1
    return ConeFlowRatios(0.0 * M1, beta, 0.0 * M1, M1, one, one, one, one, M1, one, one, one,
                          0.0 * M1)


def _put_cases(fields, mask, values):
    """``fields`` with the cases under ``mask`` replaced by those of ``values``."""
    if not np.any(mask):
        return fields
    return type(fields)(*(np.where(mask, np.broadcast_to(v, np.shape(f)), f)
                          for f, v in zip(fields, values)))


def cone_flow_from_wave_angle(M1, wave_angle, gamma=1.4):
    """Plain core: the shock layer behind a conical shock of wave angle β [rad].

    Parameters
    ----------
    M1, wave_angle : float or ndarray
        Upstream Mach number [-] and wave angle β [rad], μ <= β <= π/2.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].

    Returns
    -------
    ConeFlowRatios
        Floats when every argument is a Python float (the scalar form), else
        ndarrays. NaN where β < μ, β > π/2 or M1 < 1; β = μ gives the Mach cone
        (θc = 0, the free stream everywhere).

    Notes
    -----
    One march (:func:`~gasdyn2d.relations.taylor_maccoll.march_shock_layer`) from the
    state behind the shock; no iteration. Above the wave angle of the largest cone
    (the strong branch) the march loses accuracy as β → π/2 (the near-normal shock
    stands on a thin layer of fast-turning flow): 1e-11 up to 84°, 1e-4 at 89°.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_shocks import cone_flow_from_wave_angle
    >>> flow = cone_flow_from_wave_angle(2.0, math.radians(31.206090967454408))
    >>> round(math.degrees(flow.cone_angle), 9), round(flow.M_cone, 5), round(flow.cp_cone, 6)
    (10.0, 1.83403, 0.104471)
    """
    if nx.plain_scalars(M1, wave_angle, gamma):
        return _from_wave_angle_block(M1, wave_angle, gamma)
    M1, beta, gamma = nx.broadcast_cases(gamma, M1, wave_angle)
    return nx.chunked(_from_wave_angle_block, M1, beta, gamma)


def _from_wave_angle_block(M1, beta, gamma):
    m = math if type(M1) is float else ARRAY_MATH
    with np.errstate(invalid="ignore", divide="ignore"):
        ms = M1 * (math.sin(beta) if m is math else np.sin(beta))
        mc = M1 * (math.cos(beta) if m is math else np.cos(beta))
        w = (ms - 1.0) * (ms + 1.0)
        valid = (beta <= 0.5 * math.pi) & (M1 >= 1.0) & (w >= -_MACH_WAVE_SLACK) & (gamma > 1.0)
        if m is math:
            if not valid:
                return ConeFlowRatios(*([math.nan] * 13))
            if w <= 0.0:
                return _mach_cone(M1, beta)
            start = shock_start(M1, w, mc * mc, gamma, beta)
            return _fields(M1, w, beta, gamma, start, march_shock_layer(start, gamma))
        mach_cone = valid & (w <= 0.0)
        w = np.where(valid & ~mach_cone, w, np.nan)
        start = shock_start(M1, w, mc * mc, gamma, beta)
        fields = _fields(M1, w, beta, gamma, start, march_shock_layer(start, gamma))
        return _put_cases(fields, mach_cone, _mach_cone(M1, beta))


def _shock_from_log_w(M1, x, gamma, a, tangent=False):
    """The march start for ln w = x at fixed M1 (v = M1² - 1 - w): floats stay floats."""
    if type(M1) is float:
        w = math.exp(float(x))
        return w, shock_start(M1, w, a - w, gamma, tangent=tangent)
    w = np.exp(x)
    return w, shock_start(M1, w, a - w, gamma, tangent=tangent)


def _as_case(x, scalar):
    """A Python float for the scalar form (from a float, a 0-d or a 1-element array)."""
    return float(np.asarray(x).reshape(-1)[0]) if scalar else x


def _explicit_start(M1, theta, gamma, a):
    """ln w from the two asymptotic laws of the conical shock, the smaller of:

    slender cones, w = ¾ (γ+1)² M1⁶ θc⁴/(M1² - 1): the equal-area shock of the
    linearised cone flow (Whitham 1952, his F-function F(y) = 2θc² √y); and
    hypersonic cones, w = (γ+1)/2 M1² sin²θc, i.e. sin β/sin θc =
    √((γ+1)/2 + 1/(M1 sin θc)²) (Rasmussen 1967; form from memory). Measured
    within a factor 1.5 of the answer everywhere, within 7 % for M1 θc < 0.1 or > 1.
    """
    with np.errstate(divide="ignore"):
        slender = np.log(0.75 * (gamma + 1.0) ** 2 / a) + 6.0 * np.log(M1) + 4.0 * np.log(theta)
        hypersonic = np.log(0.5 * (gamma + 1.0)) + 2.0 * np.log(M1 * np.sin(theta))
    return np.minimum(slender, hypersonic)


def cone_flow_from_cone_angle(M1, cone_angle, gamma=1.4):
    """Plain core: the shock layer on a cone of half-angle θc [rad] (attached shock).

    Parameters
    ----------
    M1, cone_angle : float or ndarray
        Upstream Mach number [-] and cone half-angle θc [rad], 0 <= θc <= θc,max.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].

    Returns
    -------
    ConeFlowRatios
        Floats for Python-float arguments (the scalar form), else ndarrays. NaN
        beyond detachment, for θc < 0 or M1 < 1; θc = 0 gives the Mach cone.

    Notes
    -----
    The unknown is x = ln w, w = M1² sin²β - 1, in which ln θc is nearly linear
    (slope ¼ for slender cones, where w ∝ θc⁴; ½ to 1 for thick ones). From the
    explicit start of :func:`_explicit_start` one Newton step on ln θc(x) - ln θc
    with the exact derivative of the discrete march (a tangent march, three times
    the cost of a march), then secant steps (plain marches): on average 1.1 tangent
    and 3.6 plain marches per case over the issue's domain (:func:`_root_in_log_w`). The bracket [start - 40, x_hi] keeps every step
    safe: x_hi is the shock of a wedge of the same half-angle, whose cone angle
    always exceeds θc (the cone's shock is weaker), or, for cones thicker than any
    wedge with an attached shock, the detachment point (:func:`cone_detachment_angles`).

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_shocks import cone_flow_from_cone_angle
    >>> flow = cone_flow_from_cone_angle(2.0, math.radians(10.0))
    >>> round(math.degrees(flow.wave_angle), 4), round(flow.p_cone_p1, 5)
    (31.2061, 1.29252)
    """
    scalar = nx.plain_scalars(M1, cone_angle, gamma)
    M1, theta, gamma = nx.broadcast_cases(gamma, M1, cone_angle)
    if scalar:
        return _from_cone_angle_block(M1, theta, gamma, True)
    return nx.chunked(lambda m, t, g: _from_cone_angle_block(m, t, g, False), M1, theta, gamma)


def _from_cone_angle_block(M1, theta, gamma, scalar):
    with np.errstate(invalid="ignore", divide="ignore"):
        valid = (M1 >= 1.0) & (theta >= 0.0) & (gamma > 1.0) & np.isfinite(theta)
        mach_cone = valid & (theta == 0.0)
        solve = valid & ~mach_cone
        x, found, a = _solve_log_w(M1, np.where(solve, theta, np.nan), gamma, scalar)
        fields = _fields_of(M1, found, a, gamma, scalar)
        # a solve that ended on a bracket end instead of the root is no answer
        missed = solve & ~(np.abs(np.log(fields.cone_angle) - np.log(theta)) <= _RESIDUAL_TOL)
        if scalar:
            if bool(mach_cone):
                return _mach_cone(float(M1), float(np.arcsin(1.0 / M1)))
            return ConeFlowRatios(*([math.nan] * 13)) if bool(missed) else fields
        fields = _put_cases(fields, missed, ConeFlowRatios(*([np.nan] * 13)))
        return _put_cases(fields, mach_cone, _mach_cone(M1, np.arcsin(1.0 / M1)))


class _Evaluation(NamedTuple):
    """What one march at ln w leaves behind (the fields need nothing else)."""

    w: object
    deflection: object
    M2_sq: object
    tau: object
    log_cone: object
    L: object
    M_sq: object


def _fields_of(M1, found, a, gamma, scalar):
    """ConeFlowRatios from the last march of a solve (floats for the scalar form)."""
    beta = np.arctan2(np.sqrt(1.0 + found.w), np.sqrt(a - found.w))
    if scalar:
        found = _Evaluation(*(_as_case(v, True) for v in found))
        M1, beta, gamma = (_as_case(v, True) for v in (M1, beta, gamma))
    return _fields(M1, found.w, beta, gamma, found, found)


def _marcher(M1, gamma, a, scalar, target):
    """``evaluate(index, x, n, tangent)`` for :func:`_root_in_log_w`: the march at ln w = x
    for the flat cases ``index`` (n steps, or the march's own count if None), returning
    target(start, out) (a residual and its x-derivative, None unless ``tangent``), the
    step counts used and an :class:`_Evaluation`."""
    Mf, gf, af = (np.broadcast_to(v, np.shape(M1)).reshape(-1) for v in (M1, gamma, a))
    flat = lambda v: np.atleast_1d(np.asarray(v, dtype=float))  # noqa: E731

    def evaluate(index, x, n, tangent):
        if scalar:
            w, start = _shock_from_log_w(float(Mf[0]), float(x[0]), float(gf[0]), float(af[0]),
                                         tangent=tangent)
            steps = int(step_count(start.tau)) if n is None else int(n[0])
            out = march_shock_layer(start, float(gf[0]), n_steps=steps, tangent=tangent)
        else:
            w, start = _shock_from_log_w(Mf[index], x, gf[index], af[index], tangent=tangent)
            steps = step_count(start.tau) if n is None else n
            out = march_shock_layer(start, gf[index], n_steps=steps, tangent=tangent)
        f, slope = target(index, start, out)
        record = _Evaluation(*(flat(v) for v in (w, start.deflection, start.M2_sq, start.tau,
                                                  out.log_cone, out.L, out.M_sq)))
        return flat(f), flat(slope) if tangent else None, np.atleast_1d(steps), record
    return evaluate


def _root_in_log_w(evaluate, x0, lo, hi, increasing, n=None):
    """Root in x = ln w of a smooth residual, for every case at once: one Newton step with
    the exact slope of a tangent march, then secant steps (plain marches, a third of the
    cost) inside the bracket [lo, hi], bisection where a step would leave it. The step
    count of each case is held fixed while it iterates, so the discrete map is smooth;
    converged cases drop out (only the rest are marched). A case stops when its next step
    would be below the tolerance: the last march is then the answer, and its
    :class:`_Evaluation` is returned with x and the step counts."""
    shape = np.shape(x0)
    x, lo, hi = (np.array(np.broadcast_to(v, shape), dtype=float).reshape(-1)
                 for v in (x0, lo, hi))
    steps = np.zeros(x.size, dtype=int) if n is None else np.array(n).reshape(-1).copy()
    found = _Evaluation(*(np.full(x.size, np.nan) for _ in _Evaluation._fields))
    idx = np.flatnonzero(np.isfinite(x) & np.isfinite(lo) & np.isfinite(hi))
    x[np.setdiff1d(np.arange(x.size), idx)] = np.nan
    sign = 1.0 if increasing else -1.0

    def keep(index, record):
        for name, values in zip(_Evaluation._fields, record):
            getattr(found, name)[index] = values

    if idx.size:
        f, slope, used, record = evaluate(idx, x[idx], None if n is None else steps[idx], True)
        steps[idx] = used
        keep(idx, record)
    for _ in range(_ROOT_ITER):
        if idx.size == 0:
            break
        below = sign * f < 0  # the root lies above x
        lo[idx] = np.where(below, x[idx], lo[idx])
        hi[idx] = np.where(below, hi[idx], x[idx])
        step = -f / slope
        # a step below the tolerance is convergence: the march just made is the answer
        done = (np.abs(step) <= _LOG_W_TOL * np.maximum(1.0, np.abs(x[idx]))) | (f == 0)
        done |= np.isnan(f)
        new = x[idx] + step
        bisect = ~((new > lo[idx]) & (new < hi[idx])) | ~(sign * slope > 0)
        new = np.where(bisect, 0.5 * (lo[idx] + hi[idx]), new)
        more = ~done
        idx, x_old, f_old = idx[more], x[idx][more], f[more]
        if idx.size == 0:
            break
        x[idx] = new[more]
        f, _, _, record = evaluate(idx, x[idx], steps[idx], False)
        keep(idx, record)
        slope = (f - f_old) / (x[idx] - x_old)
    return x.reshape(shape), steps.reshape(shape), _Evaluation(*(v.reshape(shape) for v in found))


def _solve_log_w(M1, theta, gamma, scalar):
    """(x = ln w, the last march's :class:`_Evaluation`, M1² - 1) of the attached conical
    shock on cones θ (NaN where none). See :func:`cone_flow_from_cone_angle`."""
    a = (M1 - 1.0) * (M1 + 1.0)
    theta_wedge, _ = detachment_angles(M1, gamma)
    M1, theta, a, theta_wedge = np.broadcast_arrays(M1, theta, a, theta_wedge)
    g = np.broadcast_to(gamma, M1.shape)
    beyond_wedge = theta > theta_wedge
    w_wedge, _, _ = wv_from_deflection(M1, np.minimum(theta, theta_wedge), g)
    x_hi = np.log(w_wedge)
    if np.any(beyond_wedge):  # thicker than any wedge: only the cone's own detachment bounds it
        theta_max, x_star = _detachment(M1[beyond_wedge], g[beyond_wedge], scalar)
        x_hi = np.array(x_hi, dtype=float, copy=True)
        x_hi[beyond_wedge] = np.where(theta[beyond_wedge] <= theta_max, x_star, np.nan)
    x_hi = np.where(np.isnan(theta), np.nan, x_hi)
    x0 = np.minimum(_explicit_start(M1, theta, g, a), x_hi)
    log_theta = np.log(theta).reshape(-1)
    evaluate = _marcher(M1, g, a, scalar,
                        lambda i, start, out: (out.log_cone - log_theta[i], out.d_log_cone))
    x, n, found = _root_in_log_w(evaluate, x0, x0 - _BRACKET_WIDTH, x_hi, True)
    # the forward march at the root takes step_count(τs) steps; where that differs from
    # the count held while iterating, polish with it (a secant step or two), so that the
    # cone angle -> wave angle -> cone angle round trip closes to rounding
    forward_n = step_count(found.tau)
    other = (forward_n != n) & np.isfinite(x)
    if np.any(other):
        width = 1e-6 * np.maximum(1.0, np.abs(x))
        x2, _, found2 = _root_in_log_w(evaluate, np.where(other, x, np.nan), x - width,
                                       x + width, True, n=forward_n)
        x = np.where(other, x2, x)
        found = _Evaluation(*(np.where(other, b, a_) for a_, b in zip(found, found2)))
    return x, found, a


# ------------------------------------------------------------------ detachment and sonic points


def _log_w_of_beta(M1, beta):
    ms = M1 * np.sin(beta)
    return np.log((ms - 1.0) * (ms + 1.0))


def _slope_at(M1, x, gamma, a, scalar):
    """(d ln θc/d ln w, ln θc) at x = ln w, from one tangent march."""
    _, start = _shock_from_log_w(_as_case(M1, scalar), _as_case(x, scalar),
                                 _as_case(gamma, scalar), _as_case(a, scalar), tangent=True)
    out = march_shock_layer(start, _as_case(gamma, scalar), tangent=True)
    return np.asarray(out.d_log_cone, dtype=float), np.asarray(out.log_cone, dtype=float)


def _beta_slope_at(M1, beta, gamma, a, scalar):
    """(d ln θc/dβ, ln θc) at the wave angle β: the slope in ln w times
    d ln w/dβ = 2√(v(1+w))/w, which stays finite up to β = π/2."""
    x = _log_w_of_beta(M1, beta)
    g, log_cone = _slope_at(M1, x, gamma, a, scalar)
    w = np.exp(x)
    return g * 2.0 * np.sqrt((a - w) * (1.0 + w)) / w, log_cone


def _detachment(M1, gamma, scalar=False):
    """(θc,max, ln w there): the zero of the exact slope d ln θc/dβ (tangent marches) by
    the Illinois variant of regula falsi in β (``gasdyn2d.numerics.regula_falsi``).

    Bracket: the cone's β* lies between 1.1° below and 7.4° above the wedge's β*w
    (NACA Report 1135, eq. 168) for M1 1.01-50 and γ 1.05-1.67 (measured), so
    [β*w - 1.5°, β*w + 8°] is tried first (within [μ + ½(β*w - μ), 89.5°]); a case
    whose slopes do not change sign there is retried on that outer interval (the
    march keeps the sign of the slope near 90° even where it loses digits). NaN if
    that fails too.
    """
    M1 = np.asarray(M1, dtype=float)
    gamma = np.broadcast_to(np.asarray(gamma, dtype=float), M1.shape)
    a = (M1 - 1.0) * (M1 + 1.0)
    _, beta_wedge = detachment_angles(M1, gamma)
    mu = np.arcsin(1.0 / M1)
    bottom, top = mu + 0.5 * (beta_wedge - mu), math.radians(89.5)
    lo = np.maximum(beta_wedge + _DETACHMENT_OFFSETS[0], bottom)
    hi = np.minimum(beta_wedge + _DETACHMENT_OFFSETS[1], top)
    g_lo, _ = _beta_slope_at(M1, lo, gamma, a, scalar)
    g_hi, _ = _beta_slope_at(M1, hi, gamma, a, scalar)
    retry = ~((g_lo > 0) & (g_hi < 0)) & np.isfinite(beta_wedge)
    if np.any(retry):
        lo = np.where(retry, bottom, lo)
        hi = np.where(retry, top, hi)
        g_lo, _ = _beta_slope_at(M1, lo, gamma, a, scalar)
        g_hi, _ = _beta_slope_at(M1, hi, gamma, a, scalar)
    Mf, gf, af = M1.reshape(-1), gamma.reshape(-1), a.reshape(-1)
    beta, log_cone = nx.regula_falsi(
        lambda i, b: _beta_slope_at(Mf[i], b, gf[i], af[i], scalar), lo, hi, g_lo, g_hi,
        _DETACHMENT_TOL, _DETACHMENT_ITER)
    return np.exp(log_cone), _log_w_of_beta(M1, beta)


def cone_detachment_angles(M1, gamma=1.4):
    """Plain core: (largest cone angle θc,max, its wave angle β*) [rad] with an attached shock.

    Parameters
    ----------
    M1 : float or ndarray
        Upstream Mach number [-], > 1.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].

    Returns
    -------
    cone_angle, wave_angle : float or ndarray
        θc,max and β* [rad]; floats for Python-float arguments.

    Notes
    -----
    θc(β) has its maximum where dθc/dβ = 0 (there is no closed form, unlike the
    wedge's NACA Report 1135 eq. 168): found on the exact derivative of the march
    (:func:`_detachment`). θc,max is second-order insensitive to the location of the
    maximum, so it carries the march's accuracy; β* is good to ~1e-11.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_shocks import cone_detachment_angles
    >>> theta, beta = cone_detachment_angles(2.0)
    >>> round(math.degrees(theta), 3), round(math.degrees(beta), 2)
    (40.688, 69.42)
    """
    scalar = nx.plain_scalars(M1, gamma)
    M1, gamma = nx.broadcast_cases(gamma, M1)
    with np.errstate(invalid="ignore", divide="ignore"):
        theta, x = _detachment(np.where(M1 > 1.0, M1, np.nan), gamma, scalar)
        w = np.exp(x)
        beta = np.arctan2(np.sqrt(1.0 + w), np.sqrt((M1 - 1.0) * (M1 + 1.0) - w))
    if scalar:
        return float(theta), float(beta)
    return theta, beta


def sonic_cone_angles(M1, gamma=1.4):
    """Plain core: (cone angle, wave angle) [rad] at which the surface flow is exactly sonic.

    Parameters
    ----------
    M1 : float or ndarray
        Upstream Mach number [-], > 1.
    gamma : float or ndarray, optional
        Ratio of specific heats [-].

    Returns
    -------
    cone_angle, wave_angle : float or ndarray
        θc and β [rad] with Mc = 1; just below the detachment values (the surface
        flow of the largest cone is subsonic, Mc ≈ 0.7-0.9).

    Notes
    -----
    The root of ln Mc² in ln w below the detachment point, as in
    :func:`cone_flow_from_cone_angle` (a Newton step with the exact derivative
    d ln Mc²/d ln w = e^(-L)(dM2²/d ln w - k dL/d ln w)/Mc² of the tangent march,
    then secant steps).

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_shocks import sonic_cone_angles, cone_flow_from_cone_angle
    >>> theta, beta = sonic_cone_angles(2.0)
    >>> round(cone_flow_from_cone_angle(2.0, theta).M_cone, 9)
    1.0
    """
    scalar = nx.plain_scalars(M1, gamma)
    M1, gamma = nx.broadcast_cases(gamma, M1)
    with np.errstate(invalid="ignore", divide="ignore"):
        M1 = np.where(M1 > 1.0, M1, np.nan)
        _, x_star = _detachment(M1, gamma, scalar)
        a = (M1 - 1.0) * (M1 + 1.0)
        g = np.broadcast_to(gamma, M1.shape)

        def log_mach_sq(index, start, out):
            M_sq, L = np.asarray(out.M_sq), np.asarray(out.L)
            slope = np.exp(-L) * (np.asarray(start.d_M2_sq) - np.asarray(start.k) * out.d_L)
            return np.log(M_sq), slope / M_sq

        x, _, found = _root_in_log_w(_marcher(M1, g, a, scalar, log_mach_sq), x_star,
                                     x_star - _BRACKET_WIDTH, x_star, False)
        theta = np.exp(found.log_cone)
        beta = np.arctan2(np.sqrt(1.0 + found.w), np.sqrt(a - found.w))
    if scalar:
        return float(theta), float(beta)
    return theta, beta
