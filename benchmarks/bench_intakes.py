"""Benchmark the ramp-intake tools against plain baselines measured in the same run.

Cases:
- ``ramp_intake`` for 10^4 free-stream Mach numbers (two ramps, geometry fixed at a design
  Mach number, so the off-design spillage is computed too), against one numpy call of the
  isentropic p/p0 on the same 10^4 numbers, and per case against ``ramp_intake`` called on
  scalars in a Python loop;
- single ``ramp_intake`` calls (the design-code loop): on design, below design (where the
  ramp shocks merge ahead of the cowl and ``merging_shocks`` solves the merger), and with
  an isentropic second stage, against one scalar scipy ``brentq`` θ-β-M solve;
- ``optimal_ramps`` with 3 ramps, time per case, against one scalar scipy ``brentq`` solve of
  the θ-β-M relation (the cost unit of a hand-written optimiser's inner step).

Run ``python benchmarks/bench_intakes.py`` (full) or with ``--quick`` (a few seconds; CI).
"""

import argparse
import math

import numpy as np
from scipy import optimize

from gasdyn2d.design.intake_design import optimal_ramps
from gasdyn2d.design.intakes import ramp_intake
from gasdyn2d.relations.isentropic import pressure_ratio

from timing import shortest_time


def scalar_wave_angle(M, theta, gamma=1.4):
    """Baseline: weak wave angle by scipy brentq on tan θ(β) (NACA Report 1135, eq. 138)."""
    def residual(beta):
        return 2.0 / math.tan(beta) * (M * M * math.sin(beta) ** 2 - 1.0) / (
            M * M * (gamma + math.cos(2.0 * beta)) + 2.0) - math.tan(theta)
    return optimize.brentq(residual, math.asin(1.0 / M), math.radians(64.0))


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a few seconds, for CI")
    args = parser.parse_args(argv)
    repeats = 3 if args.quick else 7
    n_mach = 10_000
    n_loop = 100 if args.quick else 1000
    n_optimal = 5 if args.quick else 40

    ramps = np.radians([8.0, 9.0])  # an invented two-ramp intake designed for M 2.5
    mach = np.linspace(2.0, 3.2, n_mach)
    t_vector = shortest_time(lambda: ramp_intake(mach, ramps, design_mach=2.5), repeats)
    t_numpy = shortest_time(lambda: pressure_ratio(mach), repeats)
    t_loop = shortest_time(lambda: [ramp_intake(float(m), ramps, design_mach=2.5)
                                for m in mach[:n_loop]], 1) / n_loop

    design = np.linspace(2.0, 4.0, n_optimal)
    t_optimal = shortest_time(lambda: optimal_ramps(design, 3), 1) / n_optimal
    t_brentq = shortest_time(lambda: [scalar_wave_angle(2.5, math.radians(10.0))
                                  for _ in range(200)], repeats) / 200

    n_single = 20 if args.quick else 200
    single = {
        "on design": lambda: ramp_intake(2.5, ramps),
        "below design (shocks merge)": lambda: ramp_intake(2.2, ramps, design_mach=2.5),
        "isentropic 2nd stage, off design": lambda: ramp_intake(
            2.3, ramps, design_mach=2.5, stages=["shock", "isentropic"]),
    }
    single_times = {name: shortest_time(lambda: [f() for _ in range(n_single)], repeats) / n_single
                    for name, f in single.items()}

    rows = [
        ("ramp_intake, 10^4 Mach numbers (per case)", t_vector / n_mach,
         f"{t_vector / t_numpy:8.1f} x numpy p/p0 on 10^4",
         f"{t_loop / (t_vector / n_mach):8.0f} x faster than a scalar loop"),
        ("ramp_intake, scalar call in a loop (per case)", t_loop, "", ""),
        ("optimal_ramps, 3 ramps (per case)", t_optimal,
         f"{t_optimal / t_brentq:8.0f} x one scalar brentq θ-β-M solve", ""),
        *((f"single ramp_intake call, {name}", t, f"{t / t_brentq:8.0f} x one scalar brentq "
           "θ-β-M solve", "") for name, t in single_times.items()),
        ("baseline: scalar brentq θ-β-M solve", t_brentq, "", ""),
        ("baseline: numpy p/p0 on 10^4 (per element)", t_numpy / n_mach, "", ""),
    ]
    print(f"{'case':50s} {'time per case':>14s}   ratios")
    for name, seconds, ratio, extra in rows:
        print(f"{name:50s} {seconds * 1e6:11.3f} µs   {ratio} {extra}")


if __name__ == "__main__":
    main()
