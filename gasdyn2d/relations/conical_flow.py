"""Conical flow: the attached shock and surface flow of a cone at zero incidence.

The round counterpart of the wedge shock. A straight conical shock of wave
angle β stands on a cone of half-angle θc < β; behind it the flow keeps
compressing isentropically towards the surface (Taylor & Maccoll 1933), so the
shock is weaker than a wedge's of the same half-angle and the surface pressure
is higher than the pressure just behind the shock.

Plain core (floats and ndarrays, radians, no pint; NaN for invalid elements):

- :func:`cone_flow_from_wave_angle` — every quantity from (M1, β): one march;
- :func:`cone_flow_from_cone_angle` — the same from (M1, θc): bracketed Newton
  steps in ln w (w = M1² sin²β - 1) on the whole batch, each one a tangent march
  that gives the exact derivative of the discrete map;
- :func:`cone_detachment_angles` — (θc, β) at the largest cone angle, where
  dθc/dβ = 0 (Illinois iteration on the exact derivative);
- :func:`sonic_cone_angles` — (θc, β) at which the surface flow is sonic;
- :func:`mach_from_cone_pressure` — the free-stream Mach number from a cone's
  surface pressure over the pitot or free-stream stagnation pressure;
- :func:`shock_layer_rays` — the flow on every ray between shock and cone.

Each dispatches to the scalar form of the march (Python floats, ``math``) when
every argument is a Python float. The march itself is in
:mod:`gasdyn2d.relations.taylor_maccoll`.

Unit boundary: :func:`cone_flow`, :func:`max_cone_angle`,
:func:`sonic_cone_angle`, :func:`cone_probe_mach`, :func:`cone_shock_layer`.
"""

from __future__ import annotations

import dataclasses
import math
from typing import NamedTuple

import numpy as np

from .. import _numerics as nx
from .._display import ResultTable, unit_field
from ..errors import DetachedShockError, InvalidInputError, NoSolutionError
from .normal_shocks import normal_shock_ratios, pitot_ratio
from .oblique_shocks import detachment_angles, wv_from_deflection
from .taylor_maccoll import ARRAY_MATH, march_shock_layer, shock_start, step_count

__all__ = [
    "cone_flow",
    "ConeFlow",
    "max_cone_angle",
    "sonic_cone_angle",
    "cone_probe_mach",
    "cone_shock_layer",
    "ConeShockLayer",
    "ConeFlowRatios",
    "cone_flow_from_wave_angle",
    "cone_flow_from_cone_angle",
    "cone_detachment_angles",
    "sonic_cone_angles",
    "mach_from_cone_pressure",
    "ShockLayerRays",
    "shock_layer_rays",
]

_MACH_WAVE_SLACK = 4e-15  # |M1² sin²β - 1| that rounding of sin β alone can give at β = μ
_BRACKET_WIDTH = 40.0  # the root in ln w lies within this below the explicit start
_LOG_W_TOL = 1e-14  # absolute tolerance in ln w (relative in w) of the Newton iterations
_RESIDUAL_TOL = 1e-10  # a converged |ln θc - ln θ| above this marks a failed solve
_DETACHMENT_OFFSETS = (math.radians(-1.5), math.radians(8.0))  # β* bracket about the wedge's
_DETACHMENT_ITER = 60
_DETACHMENT_TOL = 1e-13  # in β [rad]; θc,max is second-order insensitive to it


# ------------------------------------------------------------------ plain core


class ConeFlowRatios(NamedTuple):
    """Plain-core result: the fields of :class:`ConeFlow` as floats or ndarrays (radians)."""

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


def _all_floats(*args):
    return all(type(a) is float for a in args)


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
    >>> from gasdyn2d.relations.conical_flow import cone_flow_from_wave_angle
    >>> flow = cone_flow_from_wave_angle(2.0, math.radians(31.206090967454408))
    >>> round(math.degrees(flow.cone_angle), 9), round(flow.M_cone, 5), round(flow.cp_cone, 6)
    (10.0, 1.83403, 0.104471)
    """
    if _all_floats(M1, wave_angle, gamma):
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
    (slope ¼ for slender cones, where w ∝ θc⁴; ½ to 1 for thick ones), so Newton
    steps on ln θc(x) - ln θc converge in 3-5 steps from the explicit start of
    :func:`_explicit_start`. The derivative is that of the discrete march (a tangent
    march), the bracket [start - 40, x_hi] keeps every step safe: x_hi is the shock
    of a wedge of the same half-angle, whose cone angle always exceeds θc (the
    cone's shock is weaker), or, for cones thicker than any wedge with an attached
    shock, the detachment point (:func:`cone_detachment_angles`).

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_flow import cone_flow_from_cone_angle
    >>> flow = cone_flow_from_cone_angle(2.0, math.radians(10.0))
    >>> round(math.degrees(flow.wave_angle), 4), round(flow.p_cone_p1, 5)
    (31.2061, 1.29252)
    """
    scalar = _all_floats(M1, cone_angle, gamma)
    M1, theta, gamma = nx.broadcast_cases(gamma, M1, cone_angle)
    if scalar:
        return _from_cone_angle_block(M1, theta, gamma, True)
    return nx.chunked(lambda m, t, g: _from_cone_angle_block(m, t, g, False), M1, theta, gamma)


def _from_cone_angle_block(M1, theta, gamma, scalar):
    with np.errstate(invalid="ignore", divide="ignore"):
        valid = (M1 >= 1.0) & (theta >= 0.0) & (gamma > 1.0) & np.isfinite(theta)
        mach_cone = valid & (theta == 0.0)
        solve = valid & ~mach_cone
        x, a = _solve_log_w(M1, np.where(solve, theta, np.nan), gamma, scalar)
        w, start = _shock_from_log_w(_as_case(M1, scalar), _as_case(x, scalar),
                                     _as_case(gamma, scalar), _as_case(a, scalar))
        beta = np.arctan2(np.sqrt(1.0 + w), np.sqrt(a - w))
        out = march_shock_layer(start, _as_case(gamma, scalar))
        fields = _fields(_as_case(M1, scalar), w, _as_case(beta, scalar), _as_case(gamma, scalar),
                         start, out)
        if scalar:
            if bool(mach_cone):
                return _mach_cone(float(M1), float(np.arcsin(1.0 / M1)))
            return fields
        return _put_cases(fields, mach_cone, _mach_cone(M1, np.arcsin(1.0 / M1)))


def _solve_log_w(M1, theta, gamma, scalar):
    """x = ln w of the attached conical shock on cones θ (NaN where none); and M1² - 1."""
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
    log_theta = np.log(theta)

    def residual(x):
        _, start = _shock_from_log_w(_as_case(M1, scalar), _as_case(x, scalar),
                                     _as_case(g, scalar), _as_case(a, scalar), tangent=True)
        out = march_shock_layer(start, _as_case(g, scalar), tangent=True)
        return np.asarray(out.log_cone) - log_theta, np.asarray(out.d_log_cone)

    x = nx.safeguarded_newton(residual, x0, x0 - _BRACKET_WIDTH, x_hi, atol=_LOG_W_TOL,
                              increasing=True)
    return x, a


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


def _regula_falsi(func, lo, hi, f_lo, f_hi, tol, max_iter):
    """Vectorised Illinois iteration for a root of f in each bracket [lo, hi].

    ``f_lo > 0 > f_hi`` (cases without such a bracket are NaN); ``func(index, x)``
    returns (f, extra) at x for the flat cases ``index``, so only the cases still
    moving are evaluated; a NaN f counts as the ``lo`` side (used where the
    function is undefined below the root). The Illinois rule halves the value kept
    at an end that survives twice in a row, which makes regula falsi superlinear.
    Returns the last x and ``extra`` there (NaN where the bracket was invalid).
    """
    shape = np.shape(lo)
    lo, hi, f_lo, f_hi = (np.array(v, dtype=float).reshape(-1) for v in (lo, hi, f_lo, f_hi))
    ok = (f_lo > 0) & (f_hi < 0)
    x = np.where(ok, lo, np.nan)
    extra = np.full(x.shape, np.nan)
    side = np.zeros(x.shape, dtype=int)
    active = np.flatnonzero(ok)
    for _ in range(max_iter):
        if active.size == 0:
            break
        i = active
        new = (lo[i] * f_hi[i] - hi[i] * f_lo[i]) / (f_hi[i] - f_lo[i])
        f_new, extra_new = (np.broadcast_to(np.asarray(v, dtype=float), new.shape)
                            for v in func(i, new))
        moved = np.abs(new - x[i])
        x[i], extra[i] = new, extra_new
        positive = (f_new > 0) | np.isnan(f_new)
        f_new = np.where(np.isnan(f_new), f_lo[i], f_new)
        f_hi[i] = np.where(positive & (side[i] == 1), 0.5 * f_hi[i], f_hi[i])
        f_lo[i] = np.where(~positive & (side[i] == -1), 0.5 * f_lo[i], f_lo[i])
        lo[i], f_lo[i] = np.where(positive, new, lo[i]), np.where(positive, f_new, f_lo[i])
        hi[i], f_hi[i] = np.where(positive, hi[i], new), np.where(positive, f_hi[i], f_new)
        side[i] = np.where(positive, 1, -1)
        done = (moved <= tol) | (hi[i] - lo[i] <= tol) | (f_new == 0)
        active = active[~done]
    return x.reshape(shape), extra.reshape(shape)


def _detachment(M1, gamma, scalar=False):
    """(θc,max, ln w there): the zero of the exact slope d ln θc/dβ (tangent marches) by
    the Illinois variant of regula falsi in β (:func:`_regula_falsi`).

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
    beta, log_cone = _regula_falsi(
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
    >>> from gasdyn2d.relations.conical_flow import cone_detachment_angles
    >>> theta, beta = cone_detachment_angles(2.0)
    >>> round(math.degrees(theta), 3), round(math.degrees(beta), 2)
    (40.688, 69.42)
    """
    scalar = _all_floats(M1, gamma)
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
    Bracketed Newton steps in ln w on ln Mc² = 0 below the detachment point, with
    the exact derivative d ln Mc²/d ln w = e^(-L)(dM2²/d ln w - k dL/d ln w)/Mc² of
    the tangent march.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_flow import sonic_cone_angles, cone_flow_from_cone_angle
    >>> theta, beta = sonic_cone_angles(2.0)
    >>> round(cone_flow_from_cone_angle(2.0, theta).M_cone, 9)
    1.0
    """
    scalar = _all_floats(M1, gamma)
    M1, gamma = nx.broadcast_cases(gamma, M1)
    with np.errstate(invalid="ignore", divide="ignore"):
        M1 = np.where(M1 > 1.0, M1, np.nan)
        _, x_star = _detachment(M1, gamma, scalar)
        a = (M1 - 1.0) * (M1 + 1.0)
        g = np.broadcast_to(gamma, M1.shape)

        def residual(x):
            _, start = _shock_from_log_w(_as_case(M1, scalar), _as_case(x, scalar),
                                         _as_case(g, scalar), _as_case(a, scalar), tangent=True)
            out = march_shock_layer(start, _as_case(g, scalar), tangent=True)
            M_sq, L = np.asarray(out.M_sq), np.asarray(out.L)
            slope = np.exp(-L) * (np.asarray(start.d_M2_sq) - np.asarray(start.k) * out.d_L)
            return np.log(M_sq), slope / M_sq

        x = nx.safeguarded_newton(residual, x_star, x_star - _BRACKET_WIDTH, x_star,
                                  atol=_LOG_W_TOL, increasing=False)
        w, start = _shock_from_log_w(_as_case(M1, scalar), _as_case(x, scalar),
                                     _as_case(g, scalar), _as_case(a, scalar))
        theta = np.exp(march_shock_layer(start, _as_case(g, scalar)).log_cone)
        beta = np.arctan2(np.sqrt(1.0 + w), np.sqrt(a - w))
    if scalar:
        return float(theta), float(beta)
    return theta, beta


# ------------------------------------------------------------------ the ray-by-ray field


class ShockLayerRays(NamedTuple):
    """Plain-core result of :func:`shock_layer_rays`: the flow on each ray from the shock
    (first) to the cone surface (last), rays on the last axis (radians)."""

    ray_angle: np.ndarray
    flow_angle: np.ndarray
    M: np.ndarray
    p_p1: np.ndarray
    T_T1: np.ndarray
    rho_rho1: np.ndarray
    p_p01: np.ndarray


def shock_layer_rays(M1, wave_angle, gamma=1.4, n_rays=None):
    """Plain core: the conical flow on every ray between the shock and the cone.

    Parameters
    ----------
    M1, wave_angle : float or ndarray
        Upstream Mach number [-] and wave angle β [rad].
    gamma : float or ndarray, optional
        Ratio of specific heats [-].
    n_rays : int, optional
        At least this many rays (default: the march's own nodes, ~15-110).

    Returns
    -------
    ShockLayerRays
        Arrays of shape ``broadcast shape + (rays,)``: the nodes of one march with
        the same step count for every case (the largest any case needs, or
        ``n_rays - 1``), so they are exact to the march's accuracy (no
        interpolation). Rays cluster where the flow changes fastest: behind a weak
        shock and near the surface of a slender cone.

    Notes
    -----
    Along each ray the flow is uniform (conical flow); on ray θ the velocity makes
    the angle δ with the axis, and p, T, ρ follow isentropically from the state
    behind the shock (NACA Report 1135, eqs. 43-45). These rays, with their Mach
    numbers and flow angles, are the starting line of an axisymmetric
    characteristics march downstream of a cone.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.conical_flow import shock_layer_rays
    >>> rays = shock_layer_rays(2.0, math.radians(31.206090967454408))
    >>> round(math.degrees(rays.ray_angle[0]), 4), round(math.degrees(rays.ray_angle[-1]), 6)
    (31.2061, 10.0)
    >>> bool(rays.p_p1[-1] > rays.p_p1[0])  # compression between shock and cone
    True
    """
    M1, beta, gamma = nx.broadcast_cases(gamma, M1, wave_angle)
    with np.errstate(invalid="ignore", divide="ignore"):
        ms, mc = M1 * np.sin(beta), M1 * np.cos(beta)
        w = (ms - 1.0) * (ms + 1.0)
        w = np.where((w > 0) & (beta <= 0.5 * np.pi), w, np.nan)
        start = shock_start(M1, w, mc * mc, gamma, beta)
        counts = step_count(start.tau)
        n = max(int(np.max(counts)) if counts.size else 0, (n_rays or 0) - 1)
        out = march_shock_layer(start, gamma, n_steps=np.where(counts > 0, n, 0), keep_rays=True)
        tau, log_ray, L, log_D = out.rays
        g = np.expand_dims(gamma, -1) if np.ndim(gamma) else gamma
        ray = np.exp(log_ray)
        delta = ray * np.exp(-(tau + 0.5 * log_D))
        M_sq = start.M2_sq[..., None] + start.k[..., None] * np.expm1(-L)
        ns = normal_shock_ratios(w, gamma)
        log_p = np.log(ns.p2_p1)[..., None] + g / (g - 1.0) * L
        T = ns.T2_T1[..., None] * np.exp(L)
        stag = 1.0 + 0.5 * (gamma - 1.0) * M1 * M1  # T01/T1
        log_p01 = np.log(stag) * gamma / (gamma - 1.0)
        return ShockLayerRays(ray, delta, np.sqrt(M_sq), np.exp(log_p), T, np.exp(log_p) / T,
                              np.exp(log_p - np.expand_dims(log_p01, -1)))


# ------------------------------------------------------------------ conical probes

_PROBE_REFERENCES = ("pitot", "stagnation")
_PROBE_MAX_MACH = 1000.0  # above this the ratio is taken as out of reach
_PROBE_TOL = 1e-14  # in ln(M1 - 1)
_PROBE_ITER = 80


def _probe_log_ratio(M1, theta, gamma, reference):
    """ln(p_cone/p_ref) at M1 on the cone θc (NaN where the shock detaches)."""
    scalar = _all_floats(M1, theta, gamma)
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
    >>> from gasdyn2d.relations.conical_flow import cone_flow_from_cone_angle, mach_from_cone_pressure
    >>> from gasdyn2d.relations.normal_shocks import pitot_ratio
    >>> flow = cone_flow_from_cone_angle(2.5, math.radians(10.0))
    >>> ratio = flow.p_cone_p1 / float(pitot_ratio(2.5))
    >>> round(mach_from_cone_pressure(ratio, math.radians(10.0)), 10)
    2.5
    """
    if reference not in _PROBE_REFERENCES:
        raise InvalidInputError(f"reference must be 'pitot' or 'stagnation'; got {reference!r}.")
    scalar = _all_floats(pressure_ratio, cone_angle, gamma)
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
        u, _ = _regula_falsi(lambda i, x: (residual(i, x)[0], 0.0 * x), lo, hi, f_lo, f_hi,
                             _PROBE_TOL, _PROBE_ITER)
        M1 = (1.0 + np.exp(u)).reshape(shape)
    return float(M1) if scalar else M1


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
        if detached.size:  # bisect between the detached point and the attached one above it
            a, b = u[detached], hi[detached]
            for _ in range(50):
                mid = 0.5 * (a + b)
                fm = residual(detached, mid)[0]
                a = np.where(np.isnan(fm), mid, a)
                got = ~np.isnan(fm) & (fm > 0)
                lo[detached] = np.where(got & np.isnan(lo[detached]), mid, lo[detached])
                f_lo[detached] = np.where(got & np.isnan(f_lo[detached]), fm, f_lo[detached])
                b = np.where(~np.isnan(fm) & (fm <= 0), mid, b)
                hi[detached] = np.where(~np.isnan(fm) & (fm <= 0), mid, hi[detached])
                f_hi[detached] = np.where(~np.isnan(fm) & (fm <= 0), fm, f_hi[detached])
                if np.all(~np.isnan(lo[detached]) | (b - a < 1e-12)):
                    break
            todo = todo[~np.isnan(f[todo])]
    return lo, hi, f_lo, f_hi
