"""Benchmark of conical flow: the vectorised Taylor–Maccoll solve against a per-case loop.

Cases: random cones at zero incidence, M1 log-uniform in [1.1, 10], γ = 1.4,
cone angles between 5 % and 90 % of the largest wedge angle with an attached
shock at that M1 (so that the baseline has a ready bracket, see below; thinner
cones put the wave angle within 1e-13 of the Mach angle, where a root-finder in
β runs out of digits).

Timed in the same run:

- ``cone_flow_from_cone_angle`` (plain core) and ``cone_flow(M1, cone_angle=...)``
  (unit boundary) on the whole batch, time per case;
- the baseline: for each case in a subset, ``scipy.optimize.brentq`` on the
  wave angle, each evaluation one ``scipy.integrate.solve_ivp`` of the textbook
  Taylor–Maccoll equation (DOP853, rtol 1e-10, atol 1e-12: what a careful script
  needs for about 1e-9 in the cone angle) from the shock to the surface ray
  (event V_θ = 0); bracket from just above the Mach angle to the wave angle of a
  wedge of the same half-angle (whose cone angle always exceeds the target);
- the scalar fast path (one case on Python floats) against the same call on
  1-element arrays and against one baseline case;
- ``cone_flow_from_wave_angle`` (one march, no iteration) and
  ``max_cone_angle`` on the batch.

The issue's target: the batch at least 100 times faster per case than the loop.

Run ``python benchmarks/bench_conical_flow.py`` (10^4 cases, 100 baseline cases)
or with ``--quick`` (2000 cases, 10 baseline cases; CI).
"""

from __future__ import annotations

import argparse
import math
import time

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from gasdyn2d import cone_flow
from gasdyn2d.relations.conical_flow import (cone_detachment_angles, cone_flow_from_cone_angle,
                                             cone_flow_from_wave_angle)
from gasdyn2d.relations.oblique_shocks import detachment_angles, wave_angle_from_deflection

from timing import shortest_time

GAMMA = 1.4
TARGET_RATIO = 100.0  # issue 11


# ------------------------------------------------------------------ the baseline


def _taylor_maccoll(theta, y, g):
    """Textbook Taylor–Maccoll equation, velocities over the maximum speed."""
    vr, vt = y
    a2 = 0.5 * (g - 1.0) * (1.0 - vr * vr - vt * vt)
    return [vt, (vr * vt * vt - a2 * (2.0 * vr + vt / math.tan(theta))) / (a2 - vt * vt)]


def _surface_event(theta, y, g):
    return y[1]


_surface_event.terminal = True


def baseline_cone_angle(M1, beta, g=GAMMA):
    """Cone angle behind a shock of wave angle β: solve_ivp from the shock to V_θ = 0."""
    mn1 = M1 * math.sin(beta)
    delta = math.atan(2.0 / math.tan(beta) * (mn1 * mn1 - 1.0)
                      / (M1 * M1 * (g + math.cos(2.0 * beta)) + 2.0))
    mn2 = math.sqrt((1.0 + 0.5 * (g - 1.0) * mn1 * mn1) / (g * mn1 * mn1 - 0.5 * (g - 1.0)))
    M2 = mn2 / math.sin(beta - delta)
    V = 1.0 / math.sqrt(1.0 + 2.0 / ((g - 1.0) * M2 * M2))
    y0 = [V * math.cos(beta - delta), -V * math.sin(beta - delta)]
    sol = solve_ivp(_taylor_maccoll, (beta, 1e-6), y0, method="DOP853", rtol=1e-10, atol=1e-12,
                    events=_surface_event, args=(g,))
    # a shock this close to the Mach wave leaves no measurable cone: count it as zero
    return sol.t_events[0][0] if sol.t_events[0].size else 0.0


def baseline_wave_angle(M1, theta_c, beta_hi, g=GAMMA):
    """Wave angle of the cone θc by brentq on the baseline cone angle."""
    mu = math.asin(1.0 / M1)
    return brentq(lambda b: baseline_cone_angle(M1, b, g) - theta_c, mu * (1.0 + 1e-13),
                  beta_hi, xtol=1e-15)


# ------------------------------------------------------------------ cases and timing


def make_cases(n, seed=20261202):
    rng = np.random.default_rng(seed)
    M = np.exp(rng.uniform(math.log(1.1), math.log(10.0), n))
    theta_wedge, _ = detachment_angles(M, GAMMA)
    theta = rng.uniform(0.05, 0.9, n) * theta_wedge
    beta_hi = wave_angle_from_deflection(M, theta, GAMMA)  # the wedge's wave angle
    return M, theta, beta_hi


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a few seconds, for CI")
    args = parser.parse_args(argv)
    n = 2000 if args.quick else 10_000
    n_loop = 10 if args.quick else 100
    repeats = 1 if args.quick else 3
    M, theta, beta_hi = make_cases(n)

    t_core = shortest_time(lambda: cone_flow_from_cone_angle(M, theta, GAMMA), repeats) / n
    t_api = shortest_time(lambda: cone_flow(M, cone_angle=theta), repeats) / n
    flow = cone_flow_from_cone_angle(M, theta, GAMMA)
    t_forward = shortest_time(lambda: cone_flow_from_wave_angle(M, flow.wave_angle, GAMMA),
                          repeats) / n
    n_det = min(n, 1000)
    t_detach = shortest_time(lambda: cone_detachment_angles(M[:n_det], GAMMA), 1) / n_det

    start = time.perf_counter()
    baseline = [baseline_wave_angle(float(M[i]), float(theta[i]), float(beta_hi[i]))
                for i in range(n_loop)]
    t_loop = (time.perf_counter() - start) / n_loop
    worst = float(np.max(np.abs(np.array(baseline) / flow.wave_angle[:n_loop] - 1.0)))

    m0, t0 = float(M[0]), float(theta[0])
    t_scalar = shortest_time(lambda: cone_flow_from_cone_angle(m0, t0, GAMMA), 5)
    t_one = shortest_time(lambda: cone_flow_from_cone_angle(M[:1], theta[:1], GAMMA), 3)

    ratio = t_loop / t_core
    rows = [
        (f"cone_flow_from_cone_angle, {n} cases (per case)", t_core,
         f"{ratio:8.0f} x faster than the solve_ivp + brentq loop"),
        (f"cone_flow(M1, cone_angle=...), {n} cases (per case)", t_api,
         f"{t_loop / t_api:8.0f} x faster than the loop"),
        (f"cone_flow_from_wave_angle, {n} cases (per case)", t_forward,
         f"{t_forward / t_core:8.2f} x the cone-angle solve"),
        (f"cone_detachment_angles, {n_det} cases (per case)", t_detach,
         f"{t_detach / t_core:8.2f} x the cone-angle solve"),
        ("scalar fast path, one case on floats", t_scalar,
         f"{t_loop / t_scalar:8.1f} x faster than one baseline case"),
        ("the same on 1-element arrays", t_one,
         f"{t_one / t_scalar:8.1f} x the scalar fast path"),
        (f"baseline: solve_ivp + brentq, loop of {n_loop} (per case)", t_loop, ""),
    ]
    print(f"{'case':58s} {'time per case':>14s}   ratios")
    for name, seconds, text in rows:
        print(f"{name:58s} {seconds * 1e6:11.1f} µs   {text}")
    print(f"baseline wave angles agree with gasdyn2d to {worst:.1e} (relative, worst of "
          f"{n_loop})")
    verdict = "meets" if ratio >= TARGET_RATIO else "MISSES"
    print(f"batch/loop speed-up {ratio:.0f} {verdict} the target of {TARGET_RATIO:.0f}")


if __name__ == "__main__":
    main()
