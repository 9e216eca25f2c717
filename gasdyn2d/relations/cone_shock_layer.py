"""The conical flow on every ray between the shock and the cone.

Plain core: :func:`shock_layer_rays` (floats and ndarrays, radians, no pint).
Unit boundary: :func:`cone_shock_layer` (result :class:`ConeShockLayer`).

Between a straight conical shock and the cone the flow is uniform along each
ray from the apex (Taylor & Maccoll 1933), so the whole field is the set of
(ray angle, flow angle, Mach number, pressure, ...) values between the two: what
a drawing of the shock layer shows, and the starting line from which an
axisymmetric characteristics march continues downstream of a cone.
"""

from __future__ import annotations

import dataclasses
from typing import NamedTuple

import numpy as np

from .. import numerics as nx
from ..boundary import Call, ResultTable, one_of, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..errors import InvalidInputError
from .conical_flow import cone_core
from .normal_shocks import normal_shock_ratios
from .taylor_maccoll import march_shock_layer, shock_start, step_count

__all__ = ["cone_shock_layer", "ConeShockLayer", "ShockLayerRays", "shock_layer_rays"]


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
        Upstream Mach number [-] and wave angle β [rad], μ < β <= π/2.
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
        shock and near the surface of a slender cone. NaN for invalid cases.

    Notes
    -----
    Along each ray the flow is uniform; on ray θ the velocity makes the angle δ
    with the axis, and p, T, ρ follow isentropically from the state behind the
    shock (NACA Report 1135, eqs. 43-45).

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.cone_shock_layer import shock_layer_rays
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
        delta = ray * np.exp(-(tau + 0.5 * log_D))  # s = τ + ½ ln D = ln(θ/δ)
        M_sq = start.M2_sq[..., None] + start.k[..., None] * np.expm1(-L)
        ns = normal_shock_ratios(w, gamma)
        log_p = np.log(ns.p2_p1)[..., None] + g / (g - 1.0) * L
        T = ns.T2_T1[..., None] * np.exp(L)
        log_p01 = gamma / (gamma - 1.0) * np.log1p(0.5 * (gamma - 1.0) * M1 * M1)  # eq. 44
        return ShockLayerRays(ray, delta, np.sqrt(M_sq), np.exp(log_p), T, np.exp(log_p) / T,
                              np.exp(log_p - np.expand_dims(log_p01, -1)))


@dataclasses.dataclass(frozen=True, repr=False)
class ConeShockLayer(ResultTable):
    """The flow on the rays between a conical shock and its cone.

    Per-ray fields have the rays on the last axis (``ray``), from the shock (first)
    to the surface (last); angles in radians, or Quantities in the caller's angle unit.
    """

    M1: FloatArray = unit_field("", "upstream Mach number")
    cone_angle: FloatArray = unit_field("rad", "cone half-angle θc")
    wave_angle: FloatArray = unit_field("rad", "half-angle β of the conical shock")
    ray_angle: FloatArray = unit_field("rad", "polar angle θ of each ray from the axis",
                                       trailing="ray")
    flow_angle: FloatArray = unit_field("rad", "flow direction δ on each ray, from the axis",
                                        trailing="ray")
    M: FloatArray = unit_field("", "Mach number on each ray", trailing="ray")
    p_p1: FloatArray = unit_field("", "static pressure over free-stream static pressure",
                                  trailing="ray")
    T_T1: FloatArray = unit_field("", "static temperature over free-stream static",
                                  trailing="ray")
    rho_rho1: FloatArray = unit_field("", "density over free-stream density", trailing="ray")
    p_p01: FloatArray = unit_field("", "static pressure over free-stream stagnation pressure",
                                   trailing="ray")


def _layer_core(M1, value, gamma, check, *, name, n_rays):
    """Checked core of :func:`cone_shock_layer`: the cone's fields, then its rays (one ray
    count for the whole batch: the largest any case needs)."""
    M1, cone, beta, *_ = cone_core(M1, value, gamma, check, name=name)
    rays = shock_layer_rays(M1, beta, gamma, n_rays)
    return (M1, cone, beta, *rays)


def cone_shock_layer(M1: ArrayInput, *, cone_angle: ArrayInput = None,
                     wave_angle: ArrayInput = None, n_rays: int | None = None,
                     gamma: ArrayInput = 1.4, errors: str = "raise") -> ConeShockLayer:
    """The flow on every ray between the conical shock and the cone.

    Parameters
    ----------
    M1 : float or array_like
        Upstream Mach number [-], > 1.
    cone_angle, wave_angle : float, array_like or Quantity
        Exactly one: the cone half-angle θc or the shock half-angle β [rad], as in
        :func:`~gasdyn2d.relations.conical_flow.cone_flow`.
    n_rays : int, optional
        At least this many rays (default: the nodes of the march, 15-110).
    gamma : float or array_like, optional
        Ratio of specific heats [-], > 1.
    errors : {"raise", "nan"}, optional
        As in :func:`~gasdyn2d.relations.conical_flow.cone_flow`.

    Returns
    -------
    ConeShockLayer

    Notes
    -----
    The rays are the nodes of the march (:func:`shock_layer_rays`): exact to its
    accuracy, clustered where the flow changes fastest. The flow angle runs from
    the deflection behind the shock to the cone angle on the surface, where the
    ray and the flow coincide.

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d import cone_shock_layer, ureg
    >>> layer = cone_shock_layer(2.0, cone_angle=10 * ureg.deg)
    >>> round(float(layer.ray_angle.m[-1]), 9), round(float(layer.flow_angle.m[-1]), 9)
    (10.0, 10.0)
    >>> bool(np.all(np.diff(layer.M) < 0))  # the flow slows down towards the cone
    True
    """
    if n_rays is not None and (isinstance(n_rays, bool) or not isinstance(n_rays, (int, np.integer))
                               or n_rays < 2):
        raise InvalidInputError(f"n_rays must be an integer >= 2 (or None); got {n_rays!r}.")
    name, value = one_of("cone_shock_layer", cone_angle=cone_angle, wave_angle=wave_angle)
    call = Call(errors)
    call.take("M1", M1)
    call.take(name, value, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    if call.lazy:
        raise InvalidInputError(
            "cone_shock_layer takes numbers, arrays, Quantities, DataArrays or Series, not dask "
            "arrays: its ray count is the largest any case of the batch needs, known only once "
            "computed (cone_flow itself stays lazy).")
    return call.run(ConeShockLayer, _layer_core, elementwise=False, name=name, n_rays=n_rays)
