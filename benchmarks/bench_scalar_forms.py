"""Cost of one plain-float call of each relation plain core: its scalar (math-module) form
against the same call on one-element arrays, and against hand-written math-module
closed forms timed in the same run.

Run from the repository root::

    python benchmarks/bench_scalar_forms.py           # 20 000 calls per row, best of 5
    python benchmarks/bench_scalar_forms.py --quick   # 500 calls per row (CI)

The baselines are written here with the math module only: the weak oblique-shock wave
angle as the trigonometric root of the θ-β-M cubic in sin²β (NACA Report 1135, eq. 150;
no polishing, so less accurate near M1 = 1 and near detachment than the library), and
p/p0 (eq. 44). The ratios are per call, measured in this run.
"""

from __future__ import annotations

import argparse
import math
import sys
import timeit

import numpy as np

from gasdyn2d.relations import expansion_fans as fans
from gasdyn2d.relations import isentropic as isen
from gasdyn2d.relations import normal_shocks as ns
from gasdyn2d.relations import oblique_shocks as obl
from gasdyn2d.relations.simple_waves import turn_for_pressure_ratio, turn_state


def closed_form_weak_wave_angle(M, theta, gamma=1.4):
    """Weak β from the cubic in x = sin²β (NACA Report 1135, eq. 150), trigonometric root."""
    m2 = M * M
    s2 = math.sin(theta) ** 2
    b = -(m2 + 2.0) / m2 - gamma * s2
    c = (2.0 * m2 + 1.0) / (m2 * m2) + ((gamma + 1.0) ** 2 / 4.0 + (gamma - 1.0) / m2) * s2
    d = -(1.0 - s2) / (m2 * m2)
    p = c - b * b / 3.0
    q = 2.0 * b ** 3 / 27.0 - b * c / 3.0 + d
    phi = math.acos(1.5 * q / p * math.sqrt(-3.0 / p)) / 3.0
    x = 2.0 * math.sqrt(-p / 3.0) * math.cos(phi - 2.0 * math.pi / 3.0) - b / 3.0
    return math.asin(math.sqrt(x))


def closed_form_pressure_ratio(M, gamma=1.4):
    """p/p0 = (1 + (γ-1)M²/2)^(-γ/(γ-1)) (NACA Report 1135, eq. 44)."""
    return (1.0 + 0.5 * (gamma - 1.0) * M * M) ** (-gamma / (gamma - 1.0))


def per_call(func, calls, repeats):
    return min(timeit.repeat(func, number=calls, repeat=repeats)) / calls * 1e6


def rows():
    one = lambda x: np.array([x])  # noqa: E731
    return [
        ("oblique", "wave_angle_from_deflection(2.0, 0.1) weak",
         lambda: obl.wave_angle_from_deflection(2.0, 0.1),
         lambda: obl.wave_angle_from_deflection(one(2.0), one(0.1))),
        ("oblique", "wave_angle_from_deflection(2.0, 0.1) strong",
         lambda: obl.wave_angle_from_deflection(2.0, 0.1, 1.4, True),
         lambda: obl.wave_angle_from_deflection(one(2.0), one(0.1), 1.4, True)),
        ("oblique", "near detachment (0.9999 θmax, square-root polish)",
         lambda: obl.wave_angle_from_deflection(2.0, 0.9999 * 0.40096),
         lambda: obl.wave_angle_from_deflection(one(2.0), one(0.9999 * 0.40096))),
        ("oblique", "oblique_shock_ratios(2.0, 0.6)",
         lambda: obl.oblique_shock_ratios(2.0, 0.6, 1.4),
         lambda: obl.oblique_shock_ratios(one(2.0), one(0.6), 1.4)),
        ("oblique", "detachment_angles(2.0)", lambda: obl.detachment_angles(2.0, 1.4),
         lambda: obl.detachment_angles(one(2.0), 1.4)),
        ("isentropic", "pressure_ratio(2.0)", lambda: isen.pressure_ratio(2.0, 1.4),
         lambda: isen.pressure_ratio(one(2.0), 1.4)),
        ("isentropic", "mach_from_area_ratio(1.6875)",
         lambda: isen.mach_from_area_ratio(1.6875, 1.4),
         lambda: isen.mach_from_area_ratio(one(1.6875), 1.4)),
        ("normal shock", "normal_shock_ratios(3.0)", lambda: ns.normal_shock_ratios(3.0, 1.4),
         lambda: ns.normal_shock_ratios(one(3.0), 1.4)),
        ("normal shock", "mach_from_stagnation_pressure_ratio(0.72)",
         lambda: ns.mach_from_stagnation_pressure_ratio(0.72, 1.4),
         lambda: ns.mach_from_stagnation_pressure_ratio(one(0.72), 1.4)),
        ("fans", "prandtl_meyer_angle(2.0)", lambda: fans.prandtl_meyer_angle(2.0, 1.4),
         lambda: fans.prandtl_meyer_angle(one(2.0), 1.4)),
        ("fans", "mach_from_prandtl_meyer_angle(0.46)",
         lambda: fans.mach_from_prandtl_meyer_angle(0.46, 1.4),
         lambda: fans.mach_from_prandtl_meyer_angle(one(0.46), 1.4)),
        ("simple waves", "turn_state(2.0, 0.1) (shock)", lambda: turn_state(2.0, 0.1),
         lambda: turn_state(one(2.0), one(0.1))),
        ("simple waves", "turn_state(2.0, -0.1) (fan)", lambda: turn_state(2.0, -0.1),
         lambda: turn_state(one(2.0), one(-0.1))),
        ("simple waves", "turn_for_pressure_ratio(2.0, 1.5)",
         lambda: turn_for_pressure_ratio(2.0, 1.5),
         lambda: turn_for_pressure_ratio(one(2.0), one(1.5))),
    ]


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="500 calls per row (CI)")
    args = parser.parse_args(argv)
    calls, repeats = (500, 3) if args.quick else (20_000, 5)
    beta_base = per_call(lambda: closed_form_weak_wave_angle(2.0, 0.1), calls, repeats)
    p_base = per_call(lambda: closed_form_pressure_ratio(2.0), calls, repeats)
    print("gasdyn2d plain cores, one call with plain floats" + (" (quick)" if args.quick else ""))
    print(f"  baseline: hand-written math closed form, weak β     {beta_base:7.2f} µs")
    print(f"  baseline: hand-written math closed form, p/p0       {p_base:7.2f} µs")
    print(f"  {'relation':<58s} {'scalar':>9s} {'vs β base':>10s} {'1-element array':>16s}")
    for group, label, scalar, array in rows():
        t_scalar = per_call(scalar, calls, repeats)
        t_array = per_call(array, max(calls // 10, 50), repeats)
        print(f"  {group + ': ' + label:<58s} {t_scalar:7.2f} µs {t_scalar / beta_base:9.1f}x "
              f"{t_array:12.1f} µs")
    return 0


if __name__ == "__main__":
    sys.exit(main())
