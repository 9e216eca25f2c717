"""Benchmark of channels marched through fitted shocks (issue 13): time against a baseline.

Run from the repository root::

    python benchmarks/bench_channel_shocks.py           # best of 5 repeats
    python benchmarks/bench_channel_shocks.py --quick   # one repeat, a few seconds (CI)

Cases (invented), Mach 2.2 ducts 0.1 m high marched to 0.5 m, about 10^4 nodes:
floor and roof both turn 3° into the flow at sharp corners, so two fitted shocks
start together, cross (transmitted shocks and a slip line), reflect from the walls
and pass through the slip line, again and again (every crossing or reflection
starts new entries of ``shocks``); the roof alone turns 6° down at a corner (a
shock and its reflections); and the same with a 4° expansion corner on the roof
that overtakes and bends the reflected shocks.

Target (issue 13): about 10^4 nodes with two fitted shocks in <= 0.5 s. Baseline,
timed in the same run on about the same number of nodes: today's unfitted
characteristic net of ``channel_flow`` (a roof that turns *away* from the flow, so
no shock forms). The ratio column reads "costs as much as N nets of the same
size". Process CPU time is printed beside the wall time: the machine may be
shared, and CPU time is what the code itself costs.
"""

from __future__ import annotations

import argparse
import math
import platform
import time

import numpy as np

from gasdyn2d.characteristics.channels import channel_flow
from gasdyn2d.characteristics.unit_processes import WallContour

from timing import best_time

TARGET_SECONDS = 0.5
FLOOR = WallContour.straight(0.0)


def cases(quick):
    """(label, callable) of the fitted cases; the quick run marches a shorter duct."""
    length = 0.2 if quick else 0.5
    corner = WallContour.bend(0.1, 0.05, math.radians(-6.0), 1e-4)
    corner_and_fan = WallContour.polyline([0.0, 0.05, 0.15, 0.6],
                                          [0.1, 0.1, 0.1 - 0.1 * math.tan(math.radians(6.0)),
                                           0.1 - 0.1 * math.tan(math.radians(6.0))
                                           + 0.45 * math.tan(math.radians(-2.0))])
    turn = math.radians(3.0)
    return [
        ("two 3° corners: shocks cross", lambda: channel_flow(
            2.2, lower_wall=WallContour.bend(0.0, 0.05, turn, 1e-4),
            upper_wall=WallContour.bend(0.1, 0.05, -turn, 1e-4), length=length, n_points=41)),
        ("6° corner shock + reflections", lambda: channel_flow(
            2.2, lower_wall=FLOOR, upper_wall=corner, length=length, n_points=41)),
        ("6° corner, then a 4° fan", lambda: channel_flow(
            2.2, lower_wall=FLOOR, upper_wall=corner_and_fan, length=length, n_points=41)),
    ]


def baseline(nodes, repeats):
    """Time of an unfitted characteristic net of about ``nodes`` nodes, and its size."""
    roof = WallContour.bend(0.1, 0.02, math.radians(8.0), 0.2)
    n = 51
    length = 0.55 * nodes / 1.0e4  # ≈ 1e4 nodes at 0.55 m with 51 points (bench_characteristics)
    run = lambda: channel_flow(2.2, lower_wall=FLOOR, upper_wall=roof,  # noqa: E731
                               length=length, n_points=n)
    run()
    seconds, result = best_time(run, repeats)
    return seconds, result.net.x.size


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="one repeat, shorter duct (CI)")
    args = parser.parse_args(argv)
    repeats = 1 if args.quick else 5
    print(f"Python {platform.python_version()}, numpy {np.__version__}, "
          f"{'quick' if args.quick else 'full'} run, best of {repeats}")
    header = (f"{'case':<32} {'nodes':>7} {'shocks':>6} {'time [ms]':>10} {'CPU [ms]':>9} "
              f"{'× unfitted net':>15}")
    print(header)
    print("-" * len(header))
    verdicts = []
    for label, run in cases(args.quick):
        run()  # warm up: first calls pay for lazy imports
        seconds, result = best_time(run, repeats)
        cpu, _ = best_time(run, repeats, clock=time.process_time)
        nodes = result.net.x.size
        net_seconds, net_nodes = baseline(nodes, repeats)
        ratio = (seconds / nodes) / (net_seconds / net_nodes)
        print(f"{label:<32} {nodes:>7d} {len(result.shocks):>6d} {seconds * 1e3:>10.1f} "
              f"{cpu * 1e3:>9.1f} {ratio:>15.1f}")
        scaled = min(seconds, cpu) * 1.0e4 / nodes
        verdicts.append((label, scaled, result.stop_reason))
    print()
    for label, scaled, reason in verdicts:
        verdict = "meets" if scaled <= TARGET_SECONDS else "MISSES"
        if args.quick:  # a short duct and one repeat: the fixed costs weigh more per node
            verdict = "(quick run: the target is judged on the full run) vs"
        print(f"{label}: {scaled * 1e3:.0f} ms per 10^4 nodes (stop: {reason}), {verdict} the "
              f"{TARGET_SECONDS * 1e3:.0f} ms target")


if __name__ == "__main__":
    main()
