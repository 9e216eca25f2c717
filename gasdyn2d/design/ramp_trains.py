"""The waves of a train of compression ramps: the flow behind each stage, and the
boundary-layer separation flag.

Plain core (floats and ndarrays, radians, no pint):

- :func:`ramp_shock_train` — Mach number, wave angle, normal Mach number, pressure and
  temperature ratios behind each ramp stage: an oblique shock (weak branch) or an
  isentropic (Prandtl–Meyer) compression, for a perfect or a thermally perfect gas;
- :func:`isentropic_stage_flags` — which stages are isentropic compressions;
- :func:`incipient_separation_pressure_ratio` — Korkegi's estimate of the pressure rise
  that starts turbulent separation.

Part of the ramp intake of :mod:`gasdyn2d.design.intakes` (its unit boundary
:func:`~gasdyn2d.design.intakes.ramp_intake`, which re-exports these plain cores under
their old paths); the geometry the waves set is in :mod:`gasdyn2d.design.intake_geometry`.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from ..relations import thermally_perfect as tp
from ..relations import thermally_perfect_oblique as tpo
from ..relations.expansion_fans import fan_pressure_ratio, mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from ..relations.isentropic import mach_angle_of
from ..relations.oblique_shocks import oblique_shock_ratios
from ..relations.theta_beta_mach import detachment_angles, wave_angle_from_deflection

__all__ = [
    "ShockTrain",
    "ramp_shock_train",
    "isentropic_stage_flags",
    "incipient_separation_pressure_ratio",
]

_KORKEGI_SWITCH_MACH = 4.5  # Korkegi (1975): the two fits meet near M = 4.5 (from memory)


class ShockTrain(NamedTuple):
    """Plain-core result of :func:`ramp_shock_train` (ndarrays; angles in radians).

    Per-ramp arrays have the ramps on the last axis (length n); ``mach`` has
    n + 1 entries: the free stream first, then the flow behind each ramp stage.
    For an isentropic stage ``wave_angle`` is the Mach angle of its first
    characteristic, ``normal_mach`` is 1 and ``detachment_deflection`` the turn
    that would bring the flow to M = 1.
    """

    mach: np.ndarray
    wave_angle: np.ndarray
    normal_mach: np.ndarray
    pressure_ratio: np.ndarray
    stagnation_pressure_ratio: np.ndarray
    detachment_deflection: np.ndarray
    #: static temperature over the free stream's, n + 1 entries like ``mach``
    temperature_ratio: np.ndarray | None = None


def isentropic_stage_flags(isentropic, n):
    """Plain core: per ramp, whether the stage is an isentropic compression (bool array of
    length n, the per-ramp ``isentropic`` flags broadcast; all False when None)."""
    if isentropic is None:
        return np.zeros(n, dtype=bool)
    return np.broadcast_to(np.asarray(isentropic, dtype=bool), (n,))


def ramp_shock_train(M, deflections, gamma=1.4, isentropic=None, *, T=None, gas=None):
    """Plain core: the waves of a train of compression ramps.

    Parameters
    ----------
    M : float or ndarray
        Free-stream Mach number [-].
    deflections : ndarray
        Turn of each ramp [rad], ramps on the last axis; the batch axes
        broadcast with ``M`` and ``gamma``.
    gamma : float or ndarray
        Ratio of specific heats [-].
    isentropic : sequence of bool, optional
        Per ramp: an isentropic (Prandtl–Meyer) compression instead of an
        oblique shock. Default: every ramp a shock.
    T : float or ndarray, optional
        Free-stream static temperature [K], for a thermally perfect ``gas``.
    gas : Gas, optional
        A thermally perfect gas (``gamma`` is then not used): every stage is that gas's
        wave at its own upstream (M, T).

    Returns
    -------
    ShockTrain
        NaN from the first ramp whose turn exceeds the detachment deflection at
        its upstream Mach number (``detachment_deflection`` says which), or, for an
        isentropic stage, the turn that brings the flow to M = 1.

    Notes
    -----
    Shock k sees the flow behind stage k - 1 (Mach M(k-1), already parallel to
    ramp k - 1) and turns it by θk: β(k) from the θ-β-M relation on the weak
    branch, M(k) = Mn2/sin(β - θ) (NACA Report 1135, eqs. 128-150). A zero turn
    gives a Mach wave with no loss. An isentropic stage keeps p0 and lowers the
    Prandtl–Meyer function by θk: ν(M(k)) = ν(M(k-1)) - θk (eq. 171).

    Examples
    --------
    >>> import numpy as np
    >>> from gasdyn2d.design.ramp_trains import ramp_shock_train
    >>> train = ramp_shock_train(2.0, np.radians([10.0]))
    >>> round(float(np.degrees(train.wave_angle[0])), 4), round(float(train.mach[1]), 5)
    (39.3139, 1.64052)
    >>> iso = ramp_shock_train(2.0, np.radians([10.0]), isentropic=[True])
    >>> round(float(iso.stagnation_pressure_ratio[0]), 12), round(float(iso.mach[1]), 5)
    (1.0, 1.65142)
    """
    theta = np.atleast_1d(np.asarray(deflections, dtype=float))
    M = np.asarray(M, dtype=float)
    if gas is not None and gas.is_thermally_perfect:
        return _hot_ramp_shock_train(M, np.asarray(T, dtype=float), theta, gas, isentropic)
    gamma = np.asarray(gamma, dtype=float)
    shape = np.broadcast_shapes(M.shape, theta.shape[:-1], gamma.shape)
    n = theta.shape[-1]
    iso = isentropic_stage_flags(isentropic, n)
    theta = np.broadcast_to(theta, shape + (n,))
    gamma = np.broadcast_to(gamma, shape) if gamma.ndim else gamma
    machs = [np.broadcast_to(M, shape).astype(float)]
    temperatures = [np.ones(shape)]
    columns = {name: [] for name in ShockTrain._fields[1:-1]}
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(n):
            upstream = machs[-1]
            if iso[k]:
                nu = prandtl_meyer_angle(upstream, gamma)
                downstream = mach_from_prandtl_meyer_angle(nu - theta[..., k], gamma)
                beyond = np.isnan(downstream) | (theta[..., k] > nu)
                downstream = np.where(beyond, np.nan, downstream)
                nan = np.isnan(downstream)
                machs.append(downstream)
                columns["wave_angle"].append(mach_angle_of(upstream))
                columns["normal_mach"].append(np.where(nan, np.nan, 1.0))
                columns["pressure_ratio"].append(fan_pressure_ratio(upstream, downstream, gamma))
                columns["stagnation_pressure_ratio"].append(np.where(nan, np.nan, 1.0))
                columns["detachment_deflection"].append(nu)
                h = 0.5 * (gamma - 1.0)
                temperatures.append(temperatures[-1] * (1.0 + h * upstream**2)
                                    / (1.0 + h * downstream**2))
                continue
            theta_max, _ = detachment_angles(upstream, gamma)
            beta = wave_angle_from_deflection(upstream, theta[..., k], gamma)
            ratios = oblique_shock_ratios(upstream, beta, gamma)
            machs.append(ratios.M2)
            temperatures.append(temperatures[-1] * ratios.T2_T1)
            columns["wave_angle"].append(beta)
            columns["normal_mach"].append(ratios.Mn1)
            columns["pressure_ratio"].append(ratios.p2_p1)
            columns["stagnation_pressure_ratio"].append(ratios.p02_p01)
            columns["detachment_deflection"].append(np.broadcast_to(theta_max, shape))
    return ShockTrain(_stack(machs), *(_stack(columns[name]) for name in ShockTrain._fields[1:-1]),
                      _stack(temperatures))


def _stack(arrays):
    return np.stack(np.broadcast_arrays(*arrays), axis=-1)


def _hot_ramp_shock_train(M, T, theta, gas, isentropic):
    """:func:`ramp_shock_train` for a thermally perfect gas: each stage the thermally perfect
    oblique shock (or isentropic compression) at its upstream (M, T)."""
    shape = np.broadcast_shapes(M.shape, T.shape, theta.shape[:-1])
    n = theta.shape[-1]
    iso = isentropic_stage_flags(isentropic, n)
    theta = np.broadcast_to(theta, shape + (n,))
    machs = [np.broadcast_to(M, shape).astype(float)]
    temperatures = [np.ones(shape)]
    T_now = np.broadcast_to(T, shape).astype(float)
    columns = {name: [] for name in ShockTrain._fields[1:-1]}
    with np.errstate(invalid="ignore", divide="ignore"):
        for k in range(n):
            upstream = machs[-1]
            if iso[k]:
                wave = tp.isentropic_compression_from_turn(upstream, T_now, -theta[..., k], gas)
                downstream = np.where(theta[..., k] == 0.0, upstream, wave.M2)
                ratio = np.where(theta[..., k] == 0.0, 1.0, wave.T2_T1)
                nan = np.isnan(downstream)
                columns["wave_angle"].append(mach_angle_of(upstream))
                columns["normal_mach"].append(np.where(nan, np.nan, 1.0))
                columns["pressure_ratio"].append(np.where(theta[..., k] == 0.0, 1.0, wave.p2_p1))
                columns["stagnation_pressure_ratio"].append(np.where(nan, np.nan, 1.0))
                columns["detachment_deflection"].append(wave.nu1)
            else:
                shock = tpo.oblique_shock_from_deflection(upstream, T_now, theta[..., k], gas)
                downstream, ratio = shock.M2, shock.T2_T1
                columns["wave_angle"].append(shock.wave_angle)
                columns["normal_mach"].append(shock.Mn1)
                columns["pressure_ratio"].append(shock.p2_p1)
                columns["stagnation_pressure_ratio"].append(shock.p02_p01)
                columns["detachment_deflection"].append(
                    tpo.detachment_angles(upstream, T_now, gas)[0])
            machs.append(downstream)
            temperatures.append(temperatures[-1] * ratio)
            T_now = T_now * ratio
    return ShockTrain(_stack(machs), *(_stack(columns[name]) for name in ShockTrain._fields[1:-1]),
                      _stack(temperatures))


def incipient_separation_pressure_ratio(M):
    """Plain core: Korkegi's estimate of the shock pressure ratio that separates a
    turbulent boundary layer in two-dimensional flow.

    p2/p1 = 1 + 0.3 M² for M < 4.5, and 0.17 M^2.5 above (coefficients from memory).

    Parameters
    ----------
    M : float or ndarray
        Mach number ahead of the shock [-].

    Returns
    -------
    float or ndarray
        Pressure ratio [-] at incipient separation: an estimate for an adiabatic
        wall in air at high Reynolds number, a fit through scattered experiments,
        so a flag for a closer look rather than a prediction.

    References
    ----------
    Korkegi, R. H. (1975), "Comparison of shock-induced two- and
    three-dimensional incipient turbulent separation", AIAA J. 13(4), 534-535
    (the correlation for ramps and incident shocks; details from memory).

    Examples
    --------
    >>> from gasdyn2d.design.ramp_trains import incipient_separation_pressure_ratio
    >>> round(float(incipient_separation_pressure_ratio(2.0)), 3)
    2.2
    """
    M = np.asarray(M, dtype=float)
    with np.errstate(invalid="ignore"):
        return np.where(M < _KORKEGI_SWITCH_MACH, 1.0 + 0.3 * M * M, 0.17 * M**2.5)

