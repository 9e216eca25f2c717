"""Benchmark of the method-of-characteristics tools: time per case and ratios in the same run.

Run from the repository root::

    python benchmarks/bench_characteristics.py           # best of 5 repeats
    python benchmarks/bench_characteristics.py --quick   # one repeat, a few seconds (CI)

Cases: ``minimum_length_nozzle`` for n = 100 and 400 characteristics, planar
and round, the channel solver on a case of about 10^4 nodes, a slot jet of 100
lip characteristics, a round jet, rounded-throat nozzles and a conical
nozzle; then ``performance`` of a round nozzle over 10^4 ambient pressures. Two
baselines are timed in the same run, on the same number of nodes as each case:

- "relation": one vectorised ν(M) and M(ν) evaluation over that many nodes
  (:func:`gasdyn2d.relations.expansion_fans.prandtl_meyer_angle` and its inverse), so the
  column reads "costs as much as N passes of the Prandtl–Meyer relation";
- "scalar loop": :func:`gasdyn2d.characteristics.unit_processes.interior_point` called once
  per node on Python floats (timed on a subset, scaled per node), the plain
  way to write the method; the column is the speed-up over it.

Targets: ``minimum_length_nozzle`` with n = 100 in under 0.1 s (issue 5, planar);
round (issue 12): n = 100 in under 0.1 s and n = 400 in under 1 s, and a performance
sweep over 10^4 ambient pressures in under 10 ms (its baseline: one vectorised p/p0
evaluation over the same 10^4 points). Process CPU time is printed beside the wall
time: the machine may be shared, and CPU time is what the code itself costs.
"""

from __future__ import annotations

import argparse
import math
import platform
import time

import numpy as np

from gasdyn2d.characteristics.channels import channel_flow
from gasdyn2d.characteristics.unit_processes import WallContour, interior_point
from gasdyn2d.relations.expansion_fans import mach_from_prandtl_meyer_angle, prandtl_meyer_angle
from gasdyn2d.characteristics.conical_nozzles import conical_nozzle
from gasdyn2d.characteristics.jets import underexpanded_slot_jet
from gasdyn2d.characteristics.nozzles import minimum_length_nozzle, rounded_throat_nozzle
from gasdyn2d.relations.isentropic import pressure_ratio

from timing import best_time

TARGET_N100_SECONDS = 0.1
#: issue 12 targets [s]: round minimum-length nozzle n = 100 and n = 400, performance sweep
ROUND_TARGETS = {"round minimum_length n=100": 0.1, "round minimum_length n=400": 1.0}
SWEEP_TARGET_SECONDS = 0.010
SWEEP_POINTS = 10_000


def best_cpu_time(func, repeats):
    """Best process CPU time [s] of ``repeats`` calls (insensitive to other processes)."""
    best = math.inf
    for _ in range(repeats):
        start = time.process_time()
        func()
        best = min(best, time.process_time() - start)
    return best


def relation_baseline(n_nodes, repeats):
    """Time of one vectorised ν(M) and M(ν) pass over ``n_nodes`` nodes [s]."""
    M = np.linspace(1.1, 4.0, n_nodes)

    def run():
        return mach_from_prandtl_meyer_angle(prandtl_meyer_angle(M))

    return best_time(run, repeats)[0]


def scalar_loop_per_node(repeats, n_sample):
    """Time per node [s] of a plain loop calling ``interior_point`` on Python floats."""
    rng = np.random.default_rng(0)  # invented states
    states = rng.uniform([-0.1, 0.3, -0.1, 0.3], [0.1, 0.6, 0.1, 0.6], (n_sample, 4)).tolist()

    def run():
        for th1, nu1, th2, nu2 in states:
            interior_point(0.0, 0.0, th1, nu1, 0.0, 1.0, th2, nu2)

    return best_time(run, repeats)[0] / n_sample


def cases():
    """(label, callable returning an object with ``.net``)."""
    channel_roof = WallContour.bend(0.1, 0.02, math.radians(8.0), 0.2)
    return [
        ("minimum_length_nozzle n=100", lambda: minimum_length_nozzle(2.8, n_characteristics=100)),
        ("minimum_length_nozzle n=400", lambda: minimum_length_nozzle(2.8, n_characteristics=400)),
        ("channel_flow (≈1e4 nodes)", lambda: channel_flow(
            2.2, lower_wall=WallContour.straight(0.0), upper_wall=channel_roof, length=0.55,
            n_points=51)),
        ("underexpanded_slot_jet n=100", lambda: underexpanded_slot_jet(
            2.0, 1.5, n_characteristics=100)),
        ("rounded_throat_nozzle 41 pts", lambda: rounded_throat_nozzle(
            2.8, throat_radius=3.0, n_points=41)),
        ("round minimum_length n=100", lambda: minimum_length_nozzle(
            2.8, n_characteristics=100, geometry="axisymmetric")),
        ("round minimum_length n=400", lambda: minimum_length_nozzle(
            2.8, n_characteristics=400, geometry="axisymmetric")),
        ("round rounded_throat 41 pts", lambda: rounded_throat_nozzle(
            2.8, throat_radius=3.0, n_points=41, geometry="axisymmetric")),
        ("round jet n=60", lambda: underexpanded_slot_jet(
            2.0, 1.5, n_characteristics=60, geometry="axisymmetric")),
        ("conical_nozzle 15° 41 pts", lambda: conical_nozzle(
            3.0, math.radians(15.0), throat_radius_of_curvature=4.0, throat_half_height=1.0,
            n_points=41)),
    ]


def performance_sweep(repeats):
    """Time of a round nozzle's performance over 10^4 ambient pressures, and its baseline."""
    nozzle = minimum_length_nozzle(2.8, n_characteristics=50, throat_half_height=0.02,
                                   geometry="axisymmetric")
    ambient = np.linspace(0.0, 101_325.0, SWEEP_POINTS)
    mach = np.linspace(1.0, 4.0, SWEEP_POINTS)

    def sweep():
        return nozzle.performance(p0=3.0e6, T0=2800.0, p_ambient=ambient)

    seconds = best_time(sweep, repeats)[0]
    cpu = best_cpu_time(sweep, repeats)
    baseline = best_time(lambda: pressure_ratio(mach), repeats)[0]
    return seconds, cpu, baseline


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="one repeat, smaller samples (CI)")
    args = parser.parse_args(argv)
    repeats = 1 if args.quick else 5
    n_sample = 300 if args.quick else 3000
    print(f"Python {platform.python_version()}, numpy {np.__version__}, "
          f"{'quick' if args.quick else 'full'} run, best of {repeats}")
    loop_per_node = scalar_loop_per_node(repeats, n_sample)
    print(f"scalar loop baseline: {loop_per_node * 1e6:.1f} µs per interior_point call")
    header = (f"{'case':<30} {'nodes':>7} {'time [ms]':>10} {'µs/node':>8} "
              f"{'× relation':>11} {'speed-up vs loop':>17}")
    print(header)
    print("-" * len(header))
    timings, cpu_timings = {}, {}
    for label, run in cases():
        run()  # warm up: first calls pay for lazy imports
        seconds, result = best_time(run, repeats)
        nodes = result.net.x.size
        relation = relation_baseline(nodes, repeats)
        timings[label] = seconds
        if label in ROUND_TARGETS:
            cpu_timings[label] = best_cpu_time(run, repeats)
        print(f"{label:<30} {nodes:>7d} {seconds * 1e3:>10.2f} {seconds / nodes * 1e6:>8.2f} "
              f"{seconds / relation:>11.1f} {loop_per_node * nodes / seconds:>17.1f}")
    n100 = timings["minimum_length_nozzle n=100"]
    verdict = "meets" if n100 < TARGET_N100_SECONDS else "MISSES"
    print(f"\nminimum_length_nozzle n=100: {n100 * 1e3:.1f} ms, {verdict} the "
          f"{TARGET_N100_SECONDS * 1e3:.0f} ms target")
    for label, target in ROUND_TARGETS.items():
        wall, cpu = timings[label], cpu_timings[label]
        verdict = "meets" if min(wall, cpu) < target else "MISSES"
        print(f"{label}: {wall * 1e3:.1f} ms wall, {cpu * 1e3:.1f} ms CPU, {verdict} the "
              f"{target * 1e3:.0f} ms target")
    seconds, cpu, baseline = performance_sweep(repeats)
    verdict = "meets" if min(seconds, cpu) < SWEEP_TARGET_SECONDS else "MISSES"
    print(f"performance over {SWEEP_POINTS} ambient pressures: {seconds * 1e3:.2f} ms wall, "
          f"{cpu * 1e3:.2f} ms CPU, {seconds / baseline:.1f} x one p/p0 pass over as many "
          f"points; {verdict} the {SWEEP_TARGET_SECONDS * 1e3:.0f} ms target")


if __name__ == "__main__":
    main()
