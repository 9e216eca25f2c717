"""Benchmark of the region-graph solvers: batch time per case against a scipy loop.

Run from the repository root::

    python benchmarks/bench_region_graph.py           # 10^4 cases per problem
    python benchmarks/bench_region_graph.py --quick   # 10^3 cases, a few seconds (CI)

For each problem the batched solve (one call on all cases) is timed, best of
a few repeats, and compared with a plain baseline timed in the same run: a
Python loop of per-case ``scipy.optimize.root`` solves of the same coupled
equations (the same wave relations, called on scalars, from the same starting
guess), timed on a subset and scaled per case. The baseline's answers are
compared with the batch's as a check that both solved the same problem.

Cases are invented random draws: regular reflections below detachment, Mach
reflections just beyond it, and crossings of shocks from two wedges.
"""

from __future__ import annotations

import argparse
import math
import platform
import time

import numpy as np
from scipy.optimize import root

from gasdyn2d.relations.oblique_shocks import detachment_angles
from gasdyn2d.patterns.reflections import _stem_scan, reflection_transition, wall_reflection
from gasdyn2d.patterns.interactions import shock_crossing
from gasdyn2d.relations.simple_waves import turn_state

TARGET_SPEEDUP = 50.0  # issue 3: at least 50x faster per case than the scipy loop
TARGET_REGULAR_SECONDS = 0.2  # issue 3: 10^4 regular reflections in under 0.2 s


def best_time(func, repeats):
    best, out = math.inf, None
    for _ in range(repeats):
        start = time.perf_counter()
        out = func()
        best = min(best, time.perf_counter() - start)
    return best, out


def _ln_p_dir(M, compression_turn, strong=False):
    s = turn_state(M, compression_turn, 1.4, strong=strong)
    return float(s.M2), math.log(float(s.p2_p1))


# --------------------------------------------------------------- scipy baselines


def regular_loop(M, theta):
    out = []
    for m, th in zip(M, theta):
        M2, lnp2 = _ln_p_dir(m, th)

        def residual(x, th=th):  # wall: direction behind the reflected shock is 0
            return [-th + x[0]]

        t = root(residual, [0.5 * th]).x[0]
        M3, lnp3 = _ln_p_dir(M2, t)
        out.append(math.exp(lnp2 + lnp3))
    return np.array(out)


def mach_loop(M, theta, guess_stem, guess_reflected):
    out = []
    for m, th, gs, gr in zip(M, theta, guess_stem, guess_reflected):
        M2, lnp2 = _ln_p_dir(m, th)

        def residual(x, m=m, th=th, M2=M2, lnp2=lnp2):
            _, lnp3 = _ln_p_dir(M2, x[0])
            _, lnp4 = _ln_p_dir(m, -x[1], strong=True)
            return [lnp2 + lnp3 - lnp4, (-th + x[0]) - x[1]]

        x = root(residual, [gr, gs]).x
        out.append(math.exp(_ln_p_dir(m, -x[1], strong=True)[1]))
    return np.array(out)


def crossing_loop(M, du, dl):
    out = []
    for m, a, b in zip(M, du, dl):
        M2, lnp2 = _ln_p_dir(m, a)
        M3, lnp3 = _ln_p_dir(m, b)

        def residual(x, M2=M2, M3=M3, lnp2=lnp2, lnp3=lnp3, a=a, b=b):
            _, lnp4 = _ln_p_dir(M2, x[0])
            _, lnp5 = _ln_p_dir(M3, -x[1])
            return [lnp2 + lnp4 - lnp3 - lnp5, (-a + x[0]) - (b + x[1])]

        x = root(residual, [b, -a]).x
        out.append(math.exp(lnp2 + _ln_p_dir(M2, x[0])[1]))
    return np.array(out)


# --------------------------------------------------------------- cases


def cases(n, rng):
    M = rng.uniform(2.0, 5.0, n)
    theta_det = np.asarray(reflection_transition(M).detachment.deflection)
    regular = (M, rng.uniform(0.1, 0.9, n) * theta_det)
    Mm = rng.uniform(2.6, 5.0, n)
    det_m = np.asarray(reflection_transition(Mm).detachment.deflection)
    mach = (Mm, det_m + np.radians(rng.uniform(0.3, 2.0, n)))
    tmax = detachment_angles(M, 1.4)[0]
    crossing = (M, rng.uniform(0.05, 0.35, n) * tmax, rng.uniform(0.05, 0.35, n) * tmax)
    return regular, mach, crossing


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="10^3 cases, for CI")
    args = parser.parse_args()
    n = 1_000 if args.quick else 10_000
    n_loop = 30 if args.quick else 300
    repeats = 2 if args.quick else 3
    rng = np.random.default_rng(3)
    regular, mach, crossing = cases(n, rng)
    print(f"gasdyn2d region graph benchmark: {n} cases per problem, scipy loop on {n_loop}; "
          f"numpy {np.__version__}, Python {platform.python_version()}")
    rows = []

    t, batch = best_time(lambda: wall_reflection(*regular), repeats)
    tl, loop = best_time(lambda: regular_loop(regular[0][:n_loop], regular[1][:n_loop]), 1)
    rows.append(("wall_reflection, regular", t, tl / n_loop,
                 np.max(np.abs(loop / batch.p3_p1[:n_loop] - 1))))
    regular_total = t

    t, batch = best_time(lambda: wall_reflection(*mach), repeats)
    assert np.all(batch.kind == "mach")
    gs, gr = _stem_scan(mach[0][:n_loop], mach[1][:n_loop], 1.4)
    tl, loop = best_time(lambda: mach_loop(mach[0][:n_loop], mach[1][:n_loop], gs, gr), 1)
    rows.append(("wall_reflection, Mach", t, tl / n_loop,
                 np.max(np.abs(loop / batch.p3_p1[:n_loop] - 1))))

    t, batch = best_time(lambda: shock_crossing(*crossing), repeats)
    tl, loop = best_time(lambda: crossing_loop(*(c[:n_loop] for c in crossing)), 1)
    rows.append(("shock_crossing", t, tl / n_loop,
                 np.max(np.abs(loop / batch.p_p1[:n_loop] - 1))))

    print(f"{'problem':<28}{'batch total':>13}{'per case':>12}{'scipy loop':>13}"
          f"{'speed-up':>10}{'max rel diff':>14}")
    worst = math.inf
    for name, total, loop_per_case, diff in rows:
        per_case = total / n
        speedup = loop_per_case / per_case
        worst = min(worst, speedup)
        print(f"{name:<28}{total * 1e3:>10.1f} ms{per_case * 1e6:>9.2f} µs"
              f"{loop_per_case * 1e6:>10.1f} µs{speedup:>9.0f}x{diff:>14.1e}")
    print(f"\nworst speed-up {worst:.0f}x (target >= {TARGET_SPEEDUP:.0f}x)")
    if n == 10_000:
        print(f"10^4 regular reflections take {regular_total:.3f} s "
              f"(target < {TARGET_REGULAR_SECONDS} s)")
    else:
        print("quick mode: the batch figures include the fixed cost of a call, which 10^3 "
              "cases do not amortise; run without --quick to check the targets")


if __name__ == "__main__":
    main()
