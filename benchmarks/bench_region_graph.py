"""Benchmark of the region-graph solvers: single calls and batches, as ratios.

Run from the repository root (with the package you mean to time importable: the
header prints which one)::

    python benchmarks/bench_region_graph.py           # 10^4 cases per problem
    python benchmarks/bench_region_graph.py --quick   # 10^3 cases, a few seconds (CI)

Two kinds of figure, each a ratio against a baseline timed in the same run:

- **single calls**: one plain-float call of each ready function, and a one-unknown
  ``WavePattern`` solve, against a hand-written ``math``-module oblique-shock solve
  (the trigonometric root of the θ-β-M cubic, NACA Report 1135, eq. 150, and the
  normal-shock relations on M1 sin β). A regular reflection by hand is two such
  solves; the target is a single ``wall_reflection`` within 100 times that.
- **batches**: time per case of one call on all cases, against a Python loop of
  per-case ``scipy.optimize.root`` solves of the same coupled equations (the same
  wave relations on scalars, from the same start), timed on a subset. The loop's
  answers are compared with the batch's, as a check that both solved the same
  problem. Target: Mach reflection at most 8 µs per case at 10^4 cases.

Cases are invented random draws: regular reflections below detachment, Mach
reflections just beyond it, and crossings of shocks from two wedges.
"""

from __future__ import annotations

import argparse
import math
import platform

import numpy as np
from scipy.optimize import root

import gasdyn2d
from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.patterns.interactions import shock_crossing, turn_to_pressure
from gasdyn2d.patterns.reflections import (free_boundary_reflection, reflection_transition,
                                           wall_reflection)
from gasdyn2d.relations.oblique_shocks import detachment_angles
from gasdyn2d.relations.simple_waves import turn_state

from timing import best_time

TARGET_SINGLE_RATIO = 100.0  # single wall_reflection / two math-module oblique solves
TARGET_MACH_US = 8.0  # Mach reflection, µs per case at 10^4 cases
TARGET_SPEEDUP = 50.0  # batch against the scipy loop


# --------------------------------------------------------------- hand-written baselines


def oblique_by_hand(M, theta, g=1.4):
    """Weak oblique shock on the math module: (M2, p2/p1) for M, θ [rad].

    Cubic in x = sin²β (NACA Report 1135, eq. 150), three real roots by the
    trigonometric method, the middle one the weak shock; then the normal-shock
    relations on Mn1 = M sin β and M2 = Mn2 / sin(β - θ).
    """
    m2 = M * M
    s = math.sin(theta) ** 2
    b = -(m2 + 2.0) / m2 - g * s
    c = (2.0 * m2 + 1.0) / (m2 * m2) + ((g + 1.0) ** 2 / 4.0 + (g - 1.0) / m2) * s
    d = -math.cos(theta) ** 2 / (m2 * m2)
    p = c - b * b / 3.0
    q = 2.0 * b ** 3 / 27.0 - b * c / 3.0 + d
    r = math.sqrt(-p / 3.0)
    phi = math.acos(max(-1.0, min(1.0, 3.0 * q / (2.0 * p * r)))) / 3.0
    x = 2.0 * r * math.cos(phi - 2.0 * math.pi / 3.0) - b / 3.0  # the middle root: weak
    beta = math.asin(math.sqrt(x))
    mn1 = M * math.sin(beta)
    mn2 = math.sqrt((1.0 + 0.5 * (g - 1.0) * mn1 * mn1) / (g * mn1 * mn1 - 0.5 * (g - 1.0)))
    return mn2 / math.sin(beta - theta), 1.0 + 2.0 * g / (g + 1.0) * (mn1 * mn1 - 1.0)


def regular_by_hand(M, theta):
    """A regular reflection by hand: two oblique solves of the same deflection."""
    M2, p2 = oblique_by_hand(M, theta)
    M3, p3 = oblique_by_hand(M2, theta)
    return M3, p2 * p3


def _ln_p_dir(M, compression_turn, strong=False):
    s = turn_state(np.array([M]), np.array([compression_turn]), 1.4, strong=strong)
    return float(s.M2[0]), math.log(float(s.p2_p1[0]))


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


def _small_pattern():
    p = WavePattern(2.8)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=0.15)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    return p


def single_calls(quick):
    """Per-call times of single plain-float calls and their ratio to the hand baseline."""
    number = 20 if quick else 200
    repeats = 3 if quick else 5
    M, theta = 2.8, math.radians(9.0)
    t_hand, hand = best_time(lambda: regular_by_hand(M, theta), repeats, number * 10)
    t_one, _ = best_time(lambda: oblique_by_hand(M, theta), repeats, number * 10)
    pattern = _small_pattern()
    rows = [
        ("wall_reflection (regular)", lambda: wall_reflection(M, theta)),
        ("wall_reflection (Mach)", lambda: wall_reflection(2.8, math.radians(22.0))),
        ("shock_crossing", lambda: shock_crossing(M, theta, 0.1)),
        ("free_boundary_reflection", lambda: free_boundary_reflection(M, theta)),
        ("turn_to_pressure", lambda: turn_to_pressure(M, 1.7)),
        ("WavePattern.solve (1 unknown)", pattern.solve),
        ("WavePattern build + solve", lambda: _small_pattern().solve()),
    ]
    check = wall_reflection(M, theta)
    assert abs(check.p3_p1 / hand[1] - 1.0) < 1e-12, "baseline and library disagree"
    print(f"\nsingle plain-float calls ({number} calls, best of {repeats}); baseline: two "
          f"hand-written math-module oblique solves = {t_hand * 1e6:.2f} µs "
          f"(one: {t_one * 1e6:.2f} µs)")
    print(f"{'call':<32}{'per call':>12}{'÷ baseline':>12}")
    ratios = {}
    for name, func in rows:
        t, _ = best_time(func, repeats, number)
        ratios[name] = t / t_hand
        print(f"{name:<32}{t * 1e6:>9.1f} µs{t / t_hand:>11.0f}x")
    return ratios["wall_reflection (regular)"]


def batches(quick):
    n = 1_000 if quick else 10_000
    n_loop = 30 if quick else 300
    repeats = 2 if quick else 3
    regular, mach, crossing = cases(n, np.random.default_rng(3))
    rows = []
    t, batch = best_time(lambda: wall_reflection(*regular), repeats)
    tl, loop = best_time(lambda: regular_loop(regular[0][:n_loop], regular[1][:n_loop]), 1)
    rows.append(("wall_reflection, regular", t, tl / n_loop,
                 np.max(np.abs(loop / batch.p3_p1[:n_loop] - 1))))
    t, batch = best_time(lambda: wall_reflection(*mach), repeats)
    assert np.all(batch.kind == "mach")
    mach_per_case = t / n
    gs = -np.asarray(batch.slip_angle_to_wall[:n_loop])
    gr = np.asarray(mach[1][:n_loop])
    tl, loop = best_time(lambda: mach_loop(mach[0][:n_loop], mach[1][:n_loop], gs, gr), 1)
    rows.append(("wall_reflection, Mach", t, tl / n_loop,
                 np.max(np.abs(loop / batch.p3_p1[:n_loop] - 1))))
    t, batch = best_time(lambda: shock_crossing(*crossing), repeats)
    tl, loop = best_time(lambda: crossing_loop(*(c[:n_loop] for c in crossing)), 1)
    rows.append(("shock_crossing", t, tl / n_loop,
                 np.max(np.abs(loop / batch.p_p1[:n_loop] - 1))))
    print(f"\nbatches: {n} cases per problem, scipy loop on {n_loop}")
    print(f"{'problem':<28}{'batch total':>13}{'per case':>12}{'scipy loop':>13}"
          f"{'speed-up':>10}{'max rel diff':>14}")
    worst = math.inf
    for name, total, loop_per_case, diff in rows:
        per_case = total / n
        speedup = loop_per_case / per_case
        worst = min(worst, speedup)
        print(f"{name:<28}{total * 1e3:>10.1f} ms{per_case * 1e6:>9.2f} µs"
              f"{loop_per_case * 1e6:>10.1f} µs{speedup:>9.0f}x{diff:>14.1e}")
    return mach_per_case, worst, n


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="10^3 cases, for CI")
    args = parser.parse_args()
    print(f"gasdyn2d region graph benchmark ({gasdyn2d.__file__}); numpy {np.__version__}, "
          f"Python {platform.python_version()}")
    single = single_calls(args.quick)
    mach_per_case, worst, n = batches(args.quick)
    print(f"\nsingle wall_reflection: {single:.0f}x two hand-written oblique solves "
          f"(target <= {TARGET_SINGLE_RATIO:.0f}x)")
    print(f"worst batch speed-up {worst:.0f}x against the scipy loop "
          f"(target >= {TARGET_SPEEDUP:.0f}x)")
    if n == 10_000:
        print(f"Mach reflection: {mach_per_case * 1e6:.2f} µs per case at 10^4 "
              f"(target <= {TARGET_MACH_US:.0f} µs)")
    else:
        print("quick mode: the batch figures include the fixed cost of a call, which 10^3 "
              "cases do not amortise; run without --quick to check the targets")


if __name__ == "__main__":
    main()
