"""Benchmark of jets marched cell after cell with fitted shocks (issue 13): time against a
baseline.

Run from the repository root::

    python benchmarks/bench_jet_cells.py           # best of 3 repeats
    python benchmarks/bench_jet_cells.py --quick   # one repeat, coarser (CI)

Cases (invented), two cells each: a weakly under-expanded slot jet (pe/pa = 1.05, Mach 2),
a strongly under-expanded one (pe/pa = 3, shocks fitted where its compression folds), an
over-expanded one (pe/pa = 0.8, lip shocks), and a round jet (pe/pa = 1.2). Baseline,
timed in the same run: the unfitted characteristic net of ``underexpanded_slot_jet`` to
its first shock, per node. The ratio column reads "a node of the march costs as much as N
nodes of the net". The issue sets no target for jets; the channel's (10^4 nodes with two
fitted shocks <= 0.5 s) is printed for comparison.
"""

from __future__ import annotations

import argparse
import platform

from gasdyn2d.characteristics.jet_cells import slot_jet_cells
from gasdyn2d.characteristics.jets import underexpanded_slot_jet

from timing import best_time

CHANNEL_TARGET_PER_NODE = 0.5 / 1.0e4  # s per node, issue 13's channel target


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="one repeat, coarser meshes")
    args = parser.parse_args(argv)
    repeats, n = (1, 41) if args.quick else (3, 81)
    print(f"bench_jet_cells: n_points = {n}, best of {repeats}; Python "
          f"{platform.python_version()} on {platform.machine()}")
    net_run = lambda: underexpanded_slot_jet(2.0, 1.5, n_characteristics=2 * n)  # noqa: E731
    net_run()
    net_seconds, net = best_time(net_run, repeats)
    per_net_node = net_seconds / net.net.x.size
    print(f"  baseline: underexpanded_slot_jet net, {net.net.x.size} nodes: "
          f"{net_seconds * 1e3:.1f} ms ({per_net_node * 1e6:.2f} µs per node)")
    cases = [("slot, pe/pa = 1.05", dict(p_exit_p_ambient=1.05)),
             ("slot, pe/pa = 3 (shocks fitted)", dict(p_exit_p_ambient=3.0)),
             ("slot, pe/pa = 0.8 (lip shocks)", dict(p_exit_p_ambient=0.8)),
             ("round, pe/pa = 1.2", dict(p_exit_p_ambient=1.2, geometry="axisymmetric"))]
    print(f"  {'case':<34s} {'nodes':>7s} {'time':>9s} {'µs/node':>8s} {'vs net':>7s} "
          f"{'channel target':>15s}")
    for label, options in cases:
        run = lambda options=options: slot_jet_cells(2.0, n_points=n, **options)  # noqa: E731
        seconds, jet = best_time(run, repeats)
        nodes = jet.net.x.size
        per_node = seconds / nodes
        verdict = "within" if per_node <= CHANNEL_TARGET_PER_NODE else "over"
        print(f"  {label:<34s} {nodes:7d} {seconds * 1e3:7.1f} ms {per_node * 1e6:8.2f} "
              f"{per_node / per_net_node:6.1f}x {verdict:>15s}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
