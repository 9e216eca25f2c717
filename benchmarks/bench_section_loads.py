"""Benchmark: shock-expansion loads for many (M, α) cases on 200-panel sections.

Prints the time per case of :func:`shock_expansion_loads` (vectorised over the
cases, looping over panels) and its ratio to plain baselines measured in the
same run:

- one isentropic p/p0 evaluation over an array of the same number of cases;
- one isentropic p/p0 evaluation over cases × panels elements (the least any
  panel method must touch);
- the same call made case by case in a Python loop (a subset of the cases).

It also prints the time of a single call on a few-panel section (the design-code
loop), the panel sums by einsum against the BLAS matrix-vector product they replace,
and the peak memory (tracemalloc) of each theory over many cases against the size of
its inputs plus outputs (the target: below 3 times; 10^6 cases, 10^7 with ``--memory``).

Run ``python benchmarks/bench_section_loads.py`` (10^4 cases) or with
``--quick`` (10^3 cases, a few seconds).
"""

from __future__ import annotations

import argparse
import math
import tracemalloc

import numpy as np

from gasdyn2d.relations.isentropic import pressure_ratio
from gasdyn2d.design.section_loads import linear_loads, second_order_loads, shock_expansion_loads
from gasdyn2d.design.sections import Section

from timing import shortest_time


def wavy_section(n_panels_per_surface, tau=0.04):
    """Invented worst case: a saw-tooth upper surface (a shock at every other corner)."""
    x = np.linspace(0.0, 1.0, n_panels_per_surface + 1)
    y = 0.5 * tau * np.sin(np.pi * x) + 0.002 * (np.arange(x.size) % 2)
    y[[0, -1]] = 0.0
    return Section.from_points(np.column_stack([x, y]), np.column_stack([x, -0.5 * tau * np.sin(np.pi * x)]))


def single_call_rows(repeats):
    """Per-call time of one (M, alpha) case against one hand-written math-module
    oblique-shock evaluation from the wave angle (NACA Report 1135, eqs. 128, 138)."""
    wedge = Section.double_wedge(0.05)

    def hand_shock():  # closed forms from the wave angle: tan θ (eq. 138) and p2/p1 (eq. 128)
        M, beta, g = 2.5, 0.45, 1.4
        mn2 = (M * math.sin(beta)) ** 2
        tan_theta = 2.0 / math.tan(beta) * (mn2 - 1.0) / (M * M * (g + math.cos(2.0 * beta)) + 2.0)
        return tan_theta, 1.0 + 2.0 * g / (g + 1.0) * (mn2 - 1.0)

    n = 20 if repeats == 1 else 200
    t_call = shortest_time(lambda: [shock_expansion_loads(wedge, 2.5, 0.05) for _ in range(n)],
                       max(repeats, 3)) / n
    t_hand = shortest_time(lambda: [hand_shock() for _ in range(1000)], max(repeats, 3)) / 1000
    print(f"single shock_expansion_loads call, double wedge (2+2 panels): "
          f"{t_call * 1e6:9.1f} us = {t_call / t_hand:7.0f} x one hand-written math-module "
          f"oblique shock from its wave angle ({t_hand * 1e6:.2f} us)")


def panel_sum_rows(repeats, n_cases):
    """einsum (single-threaded, no BLAS) against the BLAS product it replaced."""
    rng = np.random.default_rng(1)
    cp = rng.normal(size=(n_cases, 200))
    weights = rng.normal(size=200)
    t_einsum = shortest_time(lambda: np.einsum("...i,i->...", cp, weights), max(repeats, 5))
    t_blas = shortest_time(lambda: cp @ weights, max(repeats, 5))
    print(f"panel sums of {n_cases} x 200 cp: einsum {t_einsum * 1e3:.3f} ms, BLAS matmul "
          f"{t_blas * 1e3:.3f} ms (matmul/einsum {t_blas / t_einsum:.2f}; BLAS threads "
          "compete with other work on a busy machine, einsum's loop does not)")


def memory_rows(n_cases):
    """Peak traced memory of each theory over n_cases, over its inputs plus outputs."""
    rng = np.random.default_rng(3)
    section = Section.double_wedge(0.05)
    M = rng.uniform(1.5, 4.0, n_cases)
    alpha = rng.uniform(-0.05, 0.05, n_cases)
    for name, theory in (("shock-expansion", shock_expansion_loads), ("linear", linear_loads),
                         ("second-order", second_order_loads)):
        tracemalloc.start()
        loads = theory(section, M, alpha, errors="nan")
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        sizes = sum(np.asarray(v).nbytes for v in loads.to_dict().values()
                    if isinstance(v, np.ndarray)) + M.nbytes + alpha.nbytes
        print(f"peak memory, {name:<16} {n_cases:.0e} cases: {peak / 2**20:8.1f} MiB = "
              f"{peak / sizes:5.2f} x inputs + outputs ({sizes / 2**20:.1f} MiB)")
        del loads


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="10^3 cases, one repeat")
    parser.add_argument("--memory", action="store_true", help="memory at 10^7 cases (slow)")
    args = parser.parse_args()
    n_cases = 1_000 if args.quick else 10_000
    n_loop = 10 if args.quick else 100
    repeats = 1 if args.quick else 3

    rng = np.random.default_rng(2026)
    M = rng.uniform(1.5, 5.0, n_cases)
    alpha = rng.uniform(-0.08, 0.08, n_cases)
    sections = {
        "biconvex t/c 0.06, 100+100 panels": Section.biconvex(0.06, n=100),
        "saw-tooth, 100+100 panels": wavy_section(100),
        "flat plate, 1+1 panels": Section.flat_plate(),
    }

    t_isentropic = shortest_time(lambda: pressure_ratio(M, 1.4), max(repeats, 5))
    print(f"gasdyn2d section loads benchmark: {n_cases} (M, alpha) cases, best of {repeats}")
    print(f"baseline: isentropic p/p0 of {n_cases} elements: {t_isentropic * 1e3:.3f} ms")
    print()
    header = (f"{'section':<36} {'theory':<16} {'us/case':>9} {'x isen(N)':>10} "
              f"{'x isen(N*panels)':>17} {'loop us/case':>13} {'loop/vector':>12}")
    print(header)
    print("-" * len(header))
    for name, section in sections.items():
        n_panels = sum(section.n_panels)
        grid = np.broadcast_to(M[:, None], (n_cases, n_panels))
        t_panel_floor = shortest_time(lambda: pressure_ratio(grid, 1.4), repeats)
        for theory_name, theory in (("shock-expansion", shock_expansion_loads),
                                    ("second-order", second_order_loads), ("linear", linear_loads)):
            t_vector = shortest_time(lambda: theory(section, M, alpha, errors="nan"), repeats)
            row = (f"{name:<36} {theory_name:<16} {t_vector / n_cases * 1e6:9.3f} "
                   f"{t_vector / t_isentropic:10.1f} {t_vector / t_panel_floor:17.2f}")
            if theory is shock_expansion_loads:
                t_loop = shortest_time(lambda: [theory(section, float(m), float(a), errors="nan")
                                            for m, a in zip(M[:n_loop], alpha[:n_loop])], 1)
                per_case = t_loop / n_loop
                row += f" {per_case * 1e6:13.1f} {per_case / (t_vector / n_cases):12.1f}"
            print(row)
    print()
    print("us/case: microseconds per (M, alpha) case of the vectorised call;")
    print("x isen(N): time over one isentropic p/p0 evaluation of N cases;")
    print("x isen(N*panels): time over one p/p0 evaluation of N x panels elements;")
    print(f"loop: the same call case by case for the first {n_loop} cases.")
    print()
    single_call_rows(repeats)
    panel_sum_rows(repeats, n_cases)
    memory_rows(10_000 if args.quick else (10_000_000 if args.memory else 1_000_000))


if __name__ == "__main__":
    main()
