"""The Taylor–Maccoll march: the shock layer of a cone at zero incidence, all cases at once.

Plain core (floats and ndarrays, radians, no pint). :func:`march_shock_layer`
integrates the conical flow between a straight conical shock and the cone
surface, for a batch of cases in one vectorised march, or for one case on
Python floats with the ``math`` module (the scalar form: the same slopes, the
same Runge–Kutta tableau and the same steps, so the two agree to rounding).
:func:`shock_start` gives the state just behind the shock from
``w = M1² sin²β - 1``. The conical-flow relations built on them are in
:mod:`gasdyn2d.relations.conical_flow`.

Variables
---------
The flow between shock and cone depends on the polar angle θ of the ray
only (Taylor & Maccoll 1933). With δ the flow angle from the axis, ψ = θ - δ
the angle between ray and velocity, M the Mach number and D = 1 - M² sin²ψ
(one minus the square of the Mach number normal to the ray), continuity and
irrotationality give

    dδ/dθ = -sin δ cos ψ / (sin θ D),      d ln T/dθ = -(γ-1) M² tan ψ (-dδ/dθ),

equivalent to the textbook equation for the velocity components
V_r = V cos ψ, V_θ = -V sin ψ (derivation in ``docs/conical-flow.md``). The
march carries y = (ln θ, L, ln D), with L = ln(T/T2) the isentropic
temperature rise since the shock, and runs in the independent variable

    τ = s - ½ ln D,      s = ln(θ/δ),

which is exactly 0 on the cone (θ = δ, D = 1) and known just behind the
shock, so every case ends on its surface after a fixed number of steps, with
no event location. Both parts are monotonic (dδ/dθ < 0 and D grows towards the
cone), so dτ/ds = 1 - ½ d ln D/ds >= 1 never vanishes. Why these variables:
in s the flow of a slender cone is nearly linear (ln θ = ln θc + s/2 in the
inner, source-like layer; θ ∝ e^s in the near-uniform outer layer), which
steps of fixed size cannot resolve in θ or in V_θ when θc ≪ β; the ½ ln D
term stretches the thin layer behind a weak shock, where D rises from
~M1² sin²β - 1 to O(1). D is carried as a variable because 1 - M² sin²ψ
loses all its digits there.

Method and accuracy
-------------------
Fixed steps of the 8th-order Runge–Kutta formula of Dormand and Prince
(the 12-stage solution of their 8(5,3) pair), ``12 + ceil(τs/0.5)`` steps per
case (14 for a fat hypersonic cone, ~110 for θc = 1e-4 rad). Measured order
8; error about 2e-12 relative or less in θc and in L over M1 1.05–20,
γ 1.1–1.67, cone angles from 1e-4 rad to detachment (measured against marches
with 25 times finer steps, and through the relations built on it against a
30-digit reference in ``tests/test_conical_flow.py``). A tangent march
(forward-mode derivative of the same steps with respect to ln w) gives the exact
derivative of the discrete map for Newton steps.

References
----------
Taylor, G. I. & Maccoll, J. W. (1933), "The air pressure on a cone moving at
high speeds", Proc. R. Soc. Lond. A 139, 278-311.
Prince, P. J. & Dormand, J. R. (1981), "High order embedded Runge-Kutta
formulae", J. Comput. Appl. Math. 7(1), 67-75; coefficients as tabulated for
DOP853 in Hairer, Nørsett & Wanner (1993), *Solving Ordinary Differential
Equations I*, 2nd ed., Springer, sec. II.10.
"""

from __future__ import annotations

import math
from types import SimpleNamespace
from typing import NamedTuple

import numpy as np

__all__ = ["ShockStart", "shock_start", "MarchResult", "march_shock_layer", "step_count",
           "ARRAY_MATH"]

#: Weight of ln D in the independent variable τ = s - BLEND ln D (chosen by measurement:
#: 0 leaves the layer behind weak shocks under-resolved, 1 spends steps where none are needed).
BLEND = 0.5
#: Largest step in τ and the fixed extra steps of every case; with these the error bound
#: above holds (measured: halving the step lowers the error about 2^8-fold).
STEP = 0.5
MIN_STEPS = 12

# Dormand–Prince 8th-order formula (12 stages): nodes, stage coefficients (nonzero a_ij as
# (j, a_ij)), weights. Hairer, Nørsett & Wanner (1993), sec. II.10, DOP853.
_NODES = (
    0.0, 0.05260015195876773, 0.0789002279381516, 0.1183503419072274, 0.2816496580927726,
    0.3333333333333333, 0.25, 0.3076923076923077, 0.6512820512820513, 0.6, 0.8571428571428571,
    1.0)
_STAGES = (
    (),
    ((0, 0.05260015195876773),),
    ((0, 0.0197250569845379), (1, 0.0591751709536137)),
    ((0, 0.02958758547680685), (2, 0.08876275643042054)),
    ((0, 0.2413651341592667), (2, -0.8845494793282861), (3, 0.924834003261792)),
    ((0, 0.037037037037037035), (3, 0.17082860872947386), (4, 0.12546768756682242)),
    ((0, 0.037109375), (3, 0.17025221101954405), (4, 0.06021653898045596),
     (5, -0.017578125)),
    ((0, 0.03709200011850479), (3, 0.17038392571223998), (4, 0.10726203044637328),
     (5, -0.015319437748624402), (6, 0.008273789163814023)),
    ((0, 0.6241109587160757), (3, -3.3608926294469414), (4, -0.868219346841726),
     (5, 27.59209969944671), (6, 20.154067550477894), (7, -43.48988418106996)),
    ((0, 0.47766253643826434), (3, -2.4881146199716677), (4, -0.590290826836843),
     (5, 21.230051448181193), (6, 15.279233632882423), (7, -33.28821096898486),
     (8, -0.020331201708508627)),
    ((0, -0.9371424300859873), (3, 5.186372428844064), (4, 1.0914373489967295),
     (5, -8.149787010746927), (6, -18.52006565999696), (7, 22.739487099350505),
     (8, 2.4936055526796523), (9, -3.0467644718982196)),
    ((0, 2.273310147516538), (3, -10.53449546673725), (4, -2.0008720582248625),
     (5, -17.9589318631188), (6, 27.94888452941996), (7, -2.8589982771350235),
     (8, -8.87285693353063), (9, 12.360567175794303), (10, 0.6433927460157636)),
)
_WEIGHTS = ((0, 0.054293734116568765), (5, 4.450312892752409), (6, 1.8915178993145003),
            (7, -5.801203960010585), (8, 0.3111643669578199), (9, -0.1521609496625161),
            (10, 0.20136540080403034), (11, 0.04471061572777259))
_N_STAGES = len(_NODES)

#: The elementary functions of the array form, under the ``math`` module's names, so that
#: one formula serves both forms (``math`` itself is the scalar form's namespace).
ARRAY_MATH = SimpleNamespace(exp=np.exp, expm1=np.expm1, log=np.log, log1p=np.log1p,
                             sqrt=np.sqrt, tan=np.tan, atan=np.arctan, atan2=np.arctan2)


def _dense(row, width):
    out = np.zeros(width)
    for j, a in row:
        out[j] = a
    return out


_STAGE_ROWS = [_dense(row, i) for i, row in enumerate(_STAGES)]
_WEIGHT_ROW = _dense(_WEIGHTS, _N_STAGES)


# ------------------------------------------------------------------ start behind the shock


class ShockStart(NamedTuple):
    """State just behind the shock, in the march's variables (floats or ndarrays).

    ``tau`` is τs = ln(β/δs) - ½ ln Ds; ``log_ray``, ``log_D`` are ln β and ln Ds;
    ``M2_sq`` is M2²; ``k`` = M2² + 2/(γ-1) (so that M² = M2² + k expm1(-L));
    ``deflection`` is δs. The ``d_*`` fields are derivatives with respect to ln w
    (zero when not asked for).
    """

    tau: object
    log_ray: object
    log_D: object
    M2_sq: object
    k: object
    deflection: object
    d_tau: object
    d_log_ray: object
    d_log_D: object
    d_M2_sq: object


def shock_start(M1, w, v, gamma, beta=None, tangent=False):
    """Plain core: the march's start behind a shock with w = M1² sin²β - 1, v = M1² cos²β.

    Parameters
    ----------
    M1, w, v : float or ndarray
        Upstream Mach number [-], normal-Mach variable w > 0 [-] and v [-].
    gamma : float or ndarray
        Ratio of specific heats [-].
    beta : float or ndarray, optional
        Wave angle [rad] when the caller has it (else atan2(√(1+w), √v)).
    tangent : bool
        Also return the derivatives with respect to ln w at fixed M1 (v = M1² - 1 - w).

    Returns
    -------
    ShockStart
        Python floats when every input is a Python float (computed with ``math``),
        else ndarrays.

    Notes
    -----
    tan δs = 2w √(v/(1+w)) / ((γ-1)M1² + 2 + 2v) (NACA Report 1135, eq. 138 in w, v);
    Ds = 1 - Mn2² = (γ+1)w/(2γw + γ + 1) and M2² = Mn2² + v T1/T2 (eqs. 96, 97 and the
    conserved tangential velocity), all free of cancellation as w → 0.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.taylor_maccoll import shock_start
    >>> beta = math.radians(31.206)
    >>> w, v = 4 * math.sin(beta) ** 2 - 1, 4 * math.cos(beta) ** 2
    >>> start = shock_start(2.0, w, v, 1.4, beta)
    >>> round(math.degrees(start.deflection), 4), round(math.sqrt(start.M2_sq), 4)
    (1.4762, 1.9468)
    """
    scalar = all(type(x) is float for x in (M1, w, v, gamma)) and type(beta) in (float, type(None))
    m = math if scalar else ARRAY_MATH
    gm, gp = gamma - 1.0, gamma + 1.0
    one_w = 1.0 + w
    if beta is None:
        beta = m.atan2(m.sqrt(one_w), m.sqrt(v))
    cm = gm * M1 * M1 + 2.0
    den = cm + 2.0 * v
    r = m.sqrt(v / one_w)
    tan_d = 2.0 * w * r / den
    delta = m.atan(tan_d)
    p_fac = 2.0 * gamma * w + gp  # (γ+1) p2/p1
    q_fac = gm * w + gp  # (γ+1) ρ1/ρ2 (1 + w)
    D = gp * w / p_fac
    Mn2_sq = q_fac / p_fac
    T21 = p_fac * q_fac / (gp * gp * one_w)
    M2_sq = Mn2_sq + v / T21
    log_ray = m.log(beta)
    log_D = m.log(D)
    tau = log_ray - m.log(delta) - BLEND * log_D
    zero = 0.0 * w
    if not tangent:
        return ShockStart(tau, log_ray, log_D, M2_sq, M2_sq + 2.0 / gm, delta,
                          zero, zero, zero, zero)
    # derivatives with respect to ln w (dw = w, dv = -w)
    d_beta = w / (2.0 * m.sqrt(v * one_w))
    dr = -M1 * M1 / (2.0 * r * one_w * one_w)  # dr/dw (deflection_slope_wv)
    d_tan = 2.0 * w * ((r + w * dr) * den + 2.0 * w * r) / (den * den)
    d_log_delta = d_tan / ((1.0 + tan_d * tan_d) * delta)
    d_log_D = gp / p_fac
    d_Mn2 = -w * gp * gp / (p_fac * p_fac)
    d_log_T21 = w * (2.0 * gamma / p_fac + gm / q_fac - 1.0 / one_w)
    d_M2_sq = d_Mn2 + (-w - v * d_log_T21) / T21
    d_log_ray = d_beta / beta
    d_tau = d_log_ray - d_log_delta - BLEND * d_log_D
    return ShockStart(tau, log_ray, log_D, M2_sq, M2_sq + 2.0 / gm, delta,
                      d_tau, d_log_ray, d_log_D, d_M2_sq)


def step_count(tau):
    """Plain core: steps of the march from τs (ndarray of int; 0 where τs is not finite)."""
    tau = np.asarray(tau, dtype=float)
    with np.errstate(invalid="ignore"):
        ok = np.isfinite(tau) & (tau > 0)
        return np.where(ok, MIN_STEPS + np.ceil(np.where(ok, tau, 0.0) / STEP), 0).astype(int)


# ------------------------------------------------------------------ slopes (shared by both forms)


def _slopes(t, y, M2_sq, k, gm, m, tangent=None):
    """dy/dτ at τ = t for y = (ln θ, L, ln D); with ``tangent`` = (dt, dy, dM2_sq) also
    the directional derivative. ``m`` is numpy or math: one formula for both forms.

    In s = ln(θ/δ), with R = θ sin δ cos ψ/(δ sin θ D) (the ratio of the terms of ds/dθ):
    d ln θ/ds = 1/(1+R), dL/ds = -(γ-1) M² tan ψ δ R/(1+R),
    dD/ds = -sin²ψ dM²/ds - M² sin 2ψ dψ/ds; then dy/dτ = (dy/ds)/(1 - ½ d ln D/ds).
    Angles enter through tangents only (numpy's tan is vectorised, its sin and cos are not).
    """
    log_ray, L, log_D = y
    s = t + BLEND * log_D
    ray = m.exp(log_ray)
    e = m.exp(-s)
    em1 = m.expm1(-s)
    delta = ray * e
    psi = -ray * em1
    eL = m.expm1(-L)
    M_sq = M2_sq + k * eL
    D = m.exp(log_D)
    tp = m.tan(psi)
    tp2 = tp * tp
    cos2 = 1.0 / (1.0 + tp2)
    sin2 = tp2 * cos2
    t_ray = m.tan(ray)
    t_delta = m.tan(delta)
    tr2, td2 = t_ray * t_ray, t_delta * t_delta
    # R = θ sin δ cos ψ/(δ sin θ D); sin δ/sin θ = (tan δ/tan θ) √((1+tan²θ)/(1+tan²δ))
    R = m.sqrt(td2 * (1.0 + tr2) * cos2 / (tr2 * (1.0 + td2))) / (e * D)
    f1 = 1.0 / (1.0 + R)
    Mtp = M_sq * tp
    g = Mtp * delta * R * f1
    f2 = -gm * g
    dpsi = ray * (e - f1 * em1)
    k1 = k * (1.0 + eL)  # M² + 2/(γ-1)
    dD = sin2 * k1 * f2 - 2.0 * Mtp * cos2 * dpsi
    f3 = dD / D
    scale = 1.0 / (1.0 - BLEND * f3)
    out = (f1 * scale, f2 * scale, f3 * scale)
    if tangent is None:
        return out
    dt, (d_log_ray, dL, d_log_D), dM2 = tangent
    ds = dt + BLEND * d_log_D
    d_ray = ray * d_log_ray
    de = -e * ds
    d_delta = d_ray * e + ray * de
    d_psi = -(d_ray * em1 + ray * de)
    d_eL = -(1.0 + eL) * dL
    dM = dM2 + dM2 * eL + k * d_eL
    d_tp = (1.0 + tp2) * d_psi
    d_cos2 = -2.0 * cos2 * cos2 * tp * d_tp
    d_sin2 = 2.0 * tp * d_tp * cos2 + tp2 * d_cos2
    # d ln R = cot δ dδ - cot θ dθ + ½ d ln cos²ψ + ds - d ln D
    dR = R * (d_delta / t_delta - d_ray / t_ray + 0.5 * d_cos2 / cos2 + ds - d_log_D)
    df1 = -f1 * f1 * dR
    dg = (dM * tp * delta * R * f1 + M_sq * (d_tp * delta * R * f1 + tp * (
        d_delta * R * f1 + delta * (dR * f1 + R * df1))))
    df2 = -gm * dg
    d_dpsi = d_ray * (e - f1 * em1) + ray * (de - df1 * em1 - f1 * de)
    dk1 = dM2 * (1.0 + eL) + k * d_eL
    d_dD = ((d_sin2 * k1 + sin2 * dk1) * f2 + sin2 * k1 * df2
            - 2.0 * ((dM * tp + M_sq * d_tp) * cos2 * dpsi
                     + M_sq * tp * (d_cos2 * dpsi + cos2 * d_dpsi)))
    df3 = (d_dD - dD * d_log_D) / D
    d_scale = BLEND * df3 * scale
    return out, ((df1 + f1 * d_scale) * scale, (df2 + f2 * d_scale) * scale,
                 (df3 + f3 * d_scale) * scale)


# ------------------------------------------------------------------ the march


class MarchResult(NamedTuple):
    """Plain-core result of :func:`march_shock_layer` (floats or ndarrays).

    ``log_cone`` is ln θc, ``L`` = ln(Tc/T2) on the surface, ``M_sq`` = Mc²; the
    ``d_*`` fields are derivatives with respect to ln w (NaN when not asked for).
    ``rays``, when asked for, holds (τ, ln θ, L, ln D) at every step node, nodes on the
    last axis (shock first), NaN past a case's last node.
    """

    log_cone: object
    L: object
    M_sq: object
    d_log_cone: object
    d_L: object
    rays: object


def march_shock_layer(start, gamma, n_steps=None, tangent=False, keep_rays=False):
    """Plain core: march from the shock to the cone surface for every case at once.

    Parameters
    ----------
    start : ShockStart
        From :func:`shock_start` (with ``tangent=True`` when ``tangent`` is asked).
    gamma : float or ndarray
        Ratio of specific heats [-].
    n_steps : int or ndarray, optional
        Steps per case (default :func:`step_count` of ``start.tau``).
    tangent : bool
        Also march the derivative with respect to ln w.
    keep_rays : bool
        Keep the state at every step node (for the ray-by-ray field).

    Returns
    -------
    MarchResult

    Notes
    -----
    When every field of ``start`` is a Python float the march runs on floats with
    the ``math`` module (the scalar form), and so does a batch of one case (its
    results keep the array shape); otherwise on arrays, sorted by their step counts
    so that each step computes only the cases still marching (a prefix of the sorted
    batch): no Python loop over cases. Cases with a non-finite or
    non-positive τs (NaN inputs, the Mach cone w = 0) give NaN.

    Examples
    --------
    >>> import math
    >>> from gasdyn2d.relations.taylor_maccoll import shock_start, march_shock_layer
    >>> beta = math.radians(31.206090967454408)  # M1 = 2, 10° cone (SOURCES.md)
    >>> w, v = 4 * math.sin(beta) ** 2 - 1, 4 * math.cos(beta) ** 2
    >>> out = march_shock_layer(shock_start(2.0, w, v, 1.4, beta), 1.4)
    >>> round(math.degrees(math.exp(out.log_cone)), 10), round(math.sqrt(out.M_sq), 5)
    (10.0, 1.83403)
    """
    if all(type(x) is float for x in start) and type(gamma) is float:
        n = int(step_count(start.tau)) if n_steps is None else int(n_steps)
        return _march_scalar(start, gamma, n, tangent, keep_rays)
    if all(np.size(x) == 1 for x in (*start, gamma, n_steps)):
        return _march_one_case(start, gamma, n_steps, tangent, keep_rays)
    return _march_arrays(start, gamma, n_steps, tangent, keep_rays)


def _march_one_case(start, gamma, n_steps, tangent, keep_rays):
    """A batch of one case (a solver's last unconverged case, say) runs in the scalar
    form, ~20 times faster than numpy on 1-element arrays; results keep the array shape."""
    shape = np.broadcast_shapes(*(np.shape(x) for x in (*start, gamma)))
    one = lambda x: float(np.asarray(x, dtype=float).reshape(-1)[0])  # noqa: E731
    start = ShockStart(*(one(x) for x in start))
    n = int(step_count(start.tau)) if n_steps is None else int(np.asarray(n_steps).reshape(-1)[0])
    out = _march_scalar(start, one(gamma), n, tangent, keep_rays)
    rays = None
    if keep_rays:
        rays = np.asarray(out.rays, dtype=float).reshape((4,) + shape + (-1,))
    return MarchResult(*(np.full(shape, v) for v in out[:5]), rays)


def _combine(row, K, y, h):
    """y + h Σ a_l K_l for the three components (``row`` = ((l, a_l), ...))."""
    s0 = s1 = s2 = 0.0
    for l, a in row:
        k = K[l]
        s0 += a * k[0]
        s1 += a * k[1]
        s2 += a * k[2]
    return (y[0] + h * s0, y[1] + h * s1, y[2] + h * s2)


def _combine_tangent(row, K, dK, dy, h, dh):
    """The derivative of :func:`_combine`: dy + Σ a_l (dh K_l + h dK_l)."""
    s0 = s1 = s2 = 0.0
    for l, a in row:
        k, dk = K[l], dK[l]
        s0 += a * (dh * k[0] + h * dk[0])
        s1 += a * (dh * k[1] + h * dk[1])
        s2 += a * (dh * k[2] + h * dk[2])
    return (dy[0] + s0, dy[1] + s1, dy[2] + s2)


def _march_scalar(start, gamma, n, tangent, keep_rays):
    """The scalar form: the march on Python floats with the ``math`` module."""
    nan = math.nan
    if n <= 0 or not math.isfinite(start.tau):
        rays = [[start.tau], [start.log_ray], [0.0], [start.log_D]] if keep_rays else None
        return MarchResult(nan, nan, nan, nan, nan, rays)
    gm = gamma - 1.0
    tau, d_tau = start.tau, start.d_tau
    h, dh = -tau / n, -d_tau / n
    y = (start.log_ray, 0.0, start.log_D)
    dy = (start.d_log_ray, 0.0, start.d_log_D)
    M2, k, dM2 = start.M2_sq, start.k, start.d_M2_sq
    rays = [[tau], [y[0]], [y[1]], [y[2]]] if keep_rays else None
    for j in range(n):
        K, dK = [None] * _N_STAGES, [None] * _N_STAGES
        for i in range(_N_STAGES):
            frac = 1.0 - (j + _NODES[i]) / n
            z = _combine(_STAGES[i], K, y, h)
            if tangent:
                dz = _combine_tangent(_STAGES[i], K, dK, dy, h, dh)
                K[i], dK[i] = _slopes(tau * frac, z, M2, k, gm, math, (d_tau * frac, dz, dM2))
            else:
                K[i] = _slopes(tau * frac, z, M2, k, gm, math)
        if tangent:
            dy = _combine_tangent(_WEIGHTS, K, dK, dy, h, dh)
        y = _combine(_WEIGHTS, K, y, h)
        if keep_rays:
            for values, value in zip(rays, (tau * (1.0 - (j + 1) / n), *y)):
                values.append(value)
    M_sq = M2 + k * math.expm1(-y[1])
    if not tangent:
        dy = (nan, nan, nan)
    return MarchResult(y[0], y[1], M_sq, dy[0], dy[1], rays)


def _march_arrays(start, gamma, n_steps, tangent, keep_rays):
    """The array form: all cases in one march, longest first."""
    fields = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (*start, gamma)))
    shape = fields[0].shape
    flat = [f.reshape(-1) for f in fields]
    st = ShockStart(*flat[:-1])
    g = flat[-1]
    n = step_count(st.tau) if n_steps is None else np.broadcast_to(n_steps, shape).reshape(-1)
    n = np.where(np.isfinite(st.tau) & (st.tau > 0), n, 0).astype(int)
    order = np.argsort(-n, kind="stable")
    n_sorted = n[order]
    tau, d_tau = st.tau[order], st.d_tau[order]
    M2, k, dM2, gm = st.M2_sq[order], st.k[order], st.d_M2_sq[order], g[order] - 1.0
    h, dh = -tau / np.maximum(n_sorted, 1), -d_tau / np.maximum(n_sorted, 1)
    y = np.stack([st.log_ray[order], np.zeros_like(tau), st.log_D[order]])
    dy = np.stack([st.d_log_ray[order], np.zeros_like(tau), st.d_log_D[order]])
    n_max = int(n_sorted[0]) if n_sorted.size else 0
    rays = np.full((4, tau.size, n_max + 1), np.nan) if keep_rays else None
    if keep_rays:
        rays[0, :, 0], rays[1:, :, 0] = tau, y
    active = np.count_nonzero(n_sorted > np.arange(n_max)[:, None], axis=1)
    with np.errstate(all="ignore"):
        for j in range(n_max):
            a = int(active[j])
            _rk_step_arrays(j, a, y, dy if tangent else None, tau, d_tau, h, dh, n_sorted,
                            M2, k, dM2, gm)
            if keep_rays:
                rays[0, :a, j + 1] = tau[:a] * (1.0 - (j + 1) / n_sorted[:a])
                rays[1:, :a, j + 1] = y[:, :a]
        M_sq = M2 + k * np.expm1(-y[1])
    done = n_sorted > 0
    y[:, ~done] = np.nan
    dy[:, ~done | (not tangent)] = np.nan
    M_sq[~done] = np.nan
    inverse = np.empty_like(order)
    inverse[order] = np.arange(order.size)
    unsort = lambda a: a[..., inverse].reshape(a.shape[:-1] + shape)  # noqa: E731
    if keep_rays:
        rays = rays[:, inverse].reshape((4,) + shape + (n_max + 1,))
    return MarchResult(unsort(y[0]), unsort(y[1]), unsort(M_sq), unsort(dy[0]), unsort(dy[1]),
                       rays)


def _rk_step_arrays(j, a, y, dy, tau, d_tau, h, dh, n, M2, k, dM2, gm):
    """One Runge–Kutta step, in place, of the first ``a`` (still marching) cases."""
    ya, ha = y[:, :a], h[:a]
    K = np.empty((_N_STAGES, 3 * a))  # stage slopes, flattened so a weighted sum is one gemv
    dK = np.empty((_N_STAGES, 3 * a)) if dy is not None else None
    combine = lambda row, stages: (row @ stages).reshape(3, a)  # noqa: E731
    for i in range(_N_STAGES):
        frac = 1.0 - (j + _NODES[i]) / n[:a]
        if i:
            inc = combine(_STAGE_ROWS[i], K[:i])
            z = ya + ha * inc
        else:
            z = ya
        if dy is None:
            K[i].reshape(3, a)[...] = _slopes(tau[:a] * frac, z, M2[:a], k[:a], gm[:a],
                                               ARRAY_MATH)
            continue
        dz = dy[:, :a] + (dh[:a] * inc + ha * combine(_STAGE_ROWS[i], dK[:i]) if i else 0.0)
        f, df = _slopes(tau[:a] * frac, z, M2[:a], k[:a], gm[:a], ARRAY_MATH,
                        (d_tau[:a] * frac, dz, dM2[:a]))
        K[i].reshape(3, a)[...] = f
        dK[i].reshape(3, a)[...] = df
    inc = combine(_WEIGHT_ROW, K)
    if dy is not None:
        dy[:, :a] += dh[:a] * inc + ha * combine(_WEIGHT_ROW, dK)
    y[:, :a] += ha * inc
