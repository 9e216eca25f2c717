"""Benchmark: the near field of a biconvex section to 10 chords (goal: <= 2 s).

Times :func:`section_near_field` on a 5 % biconvex section at Mach 2 and 2° incidence
(signatures at 1 to 10 chords on both sides), and its ratio to a baseline measured in the
same run: the shock-expansion surface solve of the same section
(:func:`shock_expansion_loads`, which the near field calls once for its trailing-edge
match), and, for scale, one vectorised shock-point solve over as many lines as the field
has. Cases: 64 panels a surface with the default fan resolution (0.25°), and 256 panels
with 0.02° (the field of the decay check, traced to tens of thousands of chords).

Run ``python benchmarks/bench_near_field.py`` or with ``--quick`` (fewer repeats).
"""

from __future__ import annotations

import argparse
import math

import numpy as np

from gasdyn2d.characteristics.shock_points import shock_point
from gasdyn2d.design.near_fields import section_near_field
from gasdyn2d.design.section_loads import shock_expansion_loads
from gasdyn2d.design.sections import Section

from timing import shortest_time

GOAL = 2.0  # [s] per near field to 10 chords (issue 13)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats (CI)")
    args = parser.parse_args(argv)
    repeats = 2 if args.quick else 7
    M, alpha = 2.0, math.radians(2.0)
    distances = np.linspace(1.0, 10.0, 10)
    worst = 0.0
    for n, turn_deg in ((64, 0.25), (256, 0.02)):
        section = Section.biconvex(0.05, n=n)
        turn = math.radians(turn_deg)
        field = section_near_field(section, M, alpha, distances, max_line_turn=turn)
        lines = field.x_below.shape[1]
        t_field = shortest_time(lambda: section_near_field(section, M, alpha, distances,
                                                       max_line_turn=turn), repeats)
        t_loads = shortest_time(lambda: shock_expansion_loads(section, M, alpha), repeats)
        mach = np.full(lines, 1.9)
        t_points = shortest_time(lambda: shock_point(2.0, 0.0, 1.0, mach, 0.05, 1.3, 1), repeats)
        worst = max(worst, t_field)
        print(f"biconvex 5 %, {n} panels a surface, lines {turn_deg}° apart "
              f"(~{lines} samples a signature): near field to 10 chords {t_field * 1e3:8.1f} ms "
              f"({t_field / GOAL:.3f} of the {GOAL:g} s goal) = {t_field / t_loads:6.1f} x the "
              f"shock-expansion surface solve ({t_loads * 1e3:.2f} ms), "
              f"{t_field / t_points:6.1f} x one shock-point solve over {lines} lines "
              f"({t_points * 1e3:.2f} ms)")
    status = "meets" if worst <= GOAL else "MISSES"
    print(f"slowest near field {worst:.3f} s: {status} the {GOAL:g} s goal")
    return 0 if worst <= GOAL else 1


if __name__ == "__main__":
    raise SystemExit(main())
