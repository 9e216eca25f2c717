"""Benchmark of single calls: one case at a time, as design codes and optimisers call.

Run from the repository root::

    python benchmarks/bench_single_calls.py           # full repeats
    python benchmarks/bench_single_calls.py --quick   # a few seconds (CI)

Each public relation called with plain floats is timed against a hand-written
``math``-module form of the same relation, timed in the same run (what a user would
write in a few lines: the closed forms, the trigonometric root of the θ-β-M cubic,
a rational start and Newton steps for the Prandtl–Meyer inverse). The same call with
a degree or kPa Quantity is timed against the plain call. Ratios, not absolute
times, are the figures to compare across machines. The import time of the package
(a fresh interpreter, best of several) is printed too.

Targets (issue 10): plain single calls <= 4x the hand-written form; the Quantity call
<= 6x the plain call; ``import gasdyn2d`` <= 0.4 s.
"""

from __future__ import annotations

import argparse
import math
import subprocess
import sys
import time

import gasdyn2d as gd
from gasdyn2d import ureg

TARGET_PLAIN = 4.0
TARGET_QUANTITY = 6.0
TARGET_IMPORT = 0.4
GAMMA = 1.4


# ------------------------------------------------------------------ hand-written baselines


def handwritten_isentropic(M, g=GAMMA):
    """T/T0, p/p0, ρ/ρ0, A/A*, μ, ν at M (NACA Report 1135, eqs. 43-45, 80, 171)."""
    t = 1.0 + 0.5 * (g - 1.0) * M * M
    T = 1.0 / t
    p = t ** (-g / (g - 1.0))
    rho = t ** (-1.0 / (g - 1.0))
    A = (2.0 * t / (g + 1.0)) ** (0.5 * (g + 1.0) / (g - 1.0)) / M
    mu = math.asin(1.0 / M)
    k = math.sqrt((g + 1.0) / (g - 1.0))
    z = math.sqrt(M * M - 1.0)
    nu = k * math.atan(z / k) - math.atan(z)
    return T, p, rho, A, mu, nu


def handwritten_normal_shock(M, g=GAMMA):
    """M2, p2/p1, ρ2/ρ1, T2/T1, p02/p01, p02/p1 (NACA Report 1135, eqs. 93-100)."""
    m2 = M * M
    p = 1.0 + 2.0 * g / (g + 1.0) * (m2 - 1.0)
    rho = (g + 1.0) * m2 / ((g - 1.0) * m2 + 2.0)
    T = p / rho
    M2 = math.sqrt(((g - 1.0) * m2 + 2.0) / (2.0 * g * m2 - (g - 1.0)))
    p0 = rho ** (g / (g - 1.0)) * p ** (-1.0 / (g - 1.0))
    pitot = (0.5 * (g + 1.0) * m2) ** (g / (g - 1.0)) * ((g + 1.0) / (2.0 * g * m2 - g + 1.0)) ** (
        1.0 / (g - 1.0))
    return M2, p, rho, T, p0, pitot


def handwritten_oblique_shock(M, theta, g=GAMMA):
    """Weak-branch β from the trigonometric root of the θ-β-M cubic in sin²β (NACA Report
    1135, eq. 150), then the ratios of the normal component."""
    m2 = M * M
    s2 = math.sin(theta) ** 2
    b = -(m2 + 2.0) / m2 - g * s2
    c = (2.0 * m2 + 1.0) / (m2 * m2) + ((g + 1.0) ** 2 / 4.0 + (g - 1.0) / m2) * s2
    d = -math.cos(theta) ** 2 / (m2 * m2)
    p = c - b * b / 3.0
    q = 2.0 * b ** 3 / 27.0 - b * c / 3.0 + d
    r = math.sqrt(-p / 3.0)
    phi = math.acos(max(-1.0, min(1.0, 3.0 * q / (2.0 * p * r)))) / 3.0
    x = 2.0 * r * math.cos(phi - 2.0 * math.pi / 3.0) - b / 3.0  # the middle root: weak
    beta = math.asin(math.sqrt(x))
    mn2 = m2 * x
    pr = 1.0 + 2.0 * g / (g + 1.0) * (mn2 - 1.0)
    rho = (g + 1.0) * mn2 / ((g - 1.0) * mn2 + 2.0)
    Mn2 = math.sqrt(((g - 1.0) * mn2 + 2.0) / (2.0 * g * mn2 - (g - 1.0)))
    M2 = Mn2 / math.sin(beta - theta)
    p0 = rho ** (g / (g - 1.0)) * pr ** (-1.0 / (g - 1.0))
    return beta, math.sqrt(mn2), Mn2, M2, pr, rho, pr / rho, p0


def handwritten_mach_from_prandtl_meyer(nu, g=GAMMA):
    """Hall's (1975) rational start for γ = 1.4 (coefficients from memory, SOURCES.md), then
    two Newton steps on ν(M) - ν."""
    nu_max = 0.5 * math.pi * (math.sqrt((g + 1.0) / (g - 1.0)) - 1.0)
    y = (nu / nu_max) ** (2.0 / 3.0)
    M = (1.0 + 1.3604 * y + 0.0962 * y * y - 0.5127 * y ** 3) / (1.0 - 0.6722 * y - 0.3278 * y * y)
    k = math.sqrt((g + 1.0) / (g - 1.0))
    for _ in range(2):
        z = math.sqrt(M * M - 1.0)
        f = k * math.atan(z / k) - math.atan(z) - nu
        dfdM = z / (M * (1.0 + 0.5 * (g - 1.0) * M * M))
        M -= f / dfdM
    return M


# ------------------------------------------------------------------ timing


def per_call_us(func, calls, repeats):
    best = math.inf
    for _ in range(repeats):
        start = time.perf_counter()
        for _ in range(calls):
            func()
        best = min(best, time.perf_counter() - start)
    return best / calls * 1e6


def import_seconds(repeats):
    best = math.inf
    for _ in range(repeats):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-c", "import gasdyn2d"], check=True)
        best = min(best, time.perf_counter() - start)
    baseline = math.inf
    for _ in range(repeats):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-c", "pass"], check=True)
        baseline = min(baseline, time.perf_counter() - start)
    return best, best - baseline


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="few repeats, for CI")
    args = parser.parse_args(argv)
    calls, repeats = (300, 3) if args.quick else (3000, 7)

    # the Quantities are built once, outside the timed calls (the call is what is timed)
    theta_q = math.degrees(0.1) * ureg.deg
    mu_q, nu_q = 30 * ureg.deg, 26.4 * ureg.deg
    p_q, T_q = 18 * ureg.kPa, 170 * ureg.K
    rows = [
        ("isentropic_flow(2.0)", lambda: gd.isentropic_flow(2.0),
         lambda: handwritten_isentropic(2.0), lambda: gd.isentropic_flow(2.0),
         "isentropic_flow(mach_angle=30 deg)",
         lambda: gd.isentropic_flow(mach_angle=mu_q),
         lambda: gd.isentropic_flow(mach_angle=math.radians(30.0))),
        ("normal_shock(2.0)", lambda: gd.normal_shock(2.0),
         lambda: handwritten_normal_shock(2.0), None, None, None, None),
        ("oblique_shock(2.0, deflection=0.1)", lambda: gd.oblique_shock(2.0, deflection=0.1),
         lambda: handwritten_oblique_shock(2.0, 0.1), None,
         "oblique_shock(2.0, deflection=5.73 deg)",
         lambda: gd.oblique_shock(2.0, deflection=theta_q),
         lambda: gd.oblique_shock(2.0, deflection=0.1)),
        ("mach_from_prandtl_meyer(0.46)", lambda: gd.mach_from_prandtl_meyer(0.46),
         lambda: handwritten_mach_from_prandtl_meyer(0.46), None,
         "mach_from_prandtl_meyer(26.4 deg)",
         lambda: gd.mach_from_prandtl_meyer(nu_q),
         lambda: gd.mach_from_prandtl_meyer(math.radians(26.4))),
        ("FlowState(2.5, 18 kPa, 170 K)", None, None, None,
         "FlowState(2.5, 18 kPa, 170 K)",
         lambda: gd.FlowState(2.5, p_q, T_q),
         lambda: gd.FlowState(2.5, 18e3, 170.0)),
    ]
    print(f"gasdyn2d single-call benchmark ({'quick' if args.quick else 'full'}): "
          f"{calls} calls, best of {repeats}")
    print(f"  {'call':44s} {'gasdyn2d':>10s} {'by hand':>10s} {'ratio':>7s}  target")
    worst_plain = 0.0
    for name, ours, hand, _, q_name, q_call, q_plain in rows:
        if ours is not None:
            t_ours = per_call_us(ours, calls, repeats)
            t_hand = per_call_us(hand, calls, repeats)
            ratio = t_ours / t_hand
            worst_plain = max(worst_plain, ratio)
            verdict = "meets" if ratio <= TARGET_PLAIN else "MISSES"
            print(f"  {name:44s} {t_ours:8.2f} µs {t_hand:8.2f} µs {ratio:6.2f}x  "
                  f"<= {TARGET_PLAIN:g}x: {verdict}")
    print(f"\n  {'Quantity call':44s} {'Quantity':>10s} {'plain':>10s} {'ratio':>7s}  target")
    for *_, q_name, q_call, q_plain in rows:
        if q_call is None:
            continue
        t_q = per_call_us(q_call, calls, repeats)
        t_p = per_call_us(q_plain, calls, repeats)
        ratio = t_q / t_p
        verdict = "meets" if ratio <= TARGET_QUANTITY else "MISSES"
        print(f"  {q_name:44s} {t_q:8.2f} µs {t_p:8.2f} µs {ratio:6.2f}x  "
              f"<= {TARGET_QUANTITY:g}x: {verdict}")
    total, net = import_seconds(3 if args.quick else 7)
    verdict = "meets" if total <= TARGET_IMPORT else "MISSES"
    print(f"\n  import gasdyn2d in a fresh interpreter: {total:.3f} s ({net:.3f} s beyond a bare "
          f"interpreter start); target <= {TARGET_IMPORT:g} s: {verdict}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
