"""Benchmark of a sweep too big for memory: 10^8 oblique shocks through dask, reduced on the fly.

Run from the repository root::

    python benchmarks/bench_sweeps.py           # 10^8 cases (a minute or two on 2 cores)
    python benchmarks/bench_sweeps.py --quick   # 10^6 cases (CI)

The free-stream Mach numbers and turns are generated lazily, blocks of 5·10^6 cases
are solved by ``oblique_shock`` (``errors="nan"``) and reduced to the attached
fraction and the largest pressure ratio, so no field of 10^8 elements ever exists.
The same blocks solved by numpy in a plain loop (one block at a time, in this
process) are the baseline timed in the same run; the ratio shows what dask's
scheduling costs or gains on this machine. Needs the ``sweeps`` extra.
"""

from __future__ import annotations

import argparse
import sys
import time

import numpy as np

import gasdyn2d as gd


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="10^6 cases instead of 10^8")
    args = parser.parse_args(argv)
    try:
        import dask
        import dask.array as da
    except ImportError:
        print("dask is not installed (pip install 'gasdyn2d[sweeps]'): nothing to time")
        return 0
    n = 10**6 if args.quick else 10**8
    chunk = min(n, 5 * 10**6)
    mach = da.random.default_rng(1).uniform(1.5, 5.0, n, chunks=chunk)
    turn = da.random.default_rng(2).uniform(0.02, 0.3, n, chunks=chunk)
    start = time.perf_counter()
    shock = gd.oblique_shock(mach, deflection=turn, errors="nan")
    attached, p_max = dask.compute(da.isfinite(shock.p2_p1).mean(), da.nanmax(shock.p2_p1),
                                   scheduler="threads")
    lazy_seconds = time.perf_counter() - start

    start = time.perf_counter()
    count, largest = 0, 0.0
    for block_m, block_t in zip(mach.to_delayed(), turn.to_delayed()):
        m, t = dask.compute(block_m, block_t, scheduler="synchronous")
        p = gd.oblique_shock(m, deflection=t, errors="nan").p2_p1
        count += int(np.isfinite(p).sum())
        largest = max(largest, float(np.nanmax(p)))
    loop_seconds = time.perf_counter() - start
    assert abs(count / n - attached) < 1e-12 and largest == p_max
    print(f"dask sweep of {n:.0e} oblique shocks, blocks of {chunk:.0e}, threaded scheduler")
    print(f"  attached fraction {attached:.4f}, largest p2/p1 {p_max:.3f}")
    print(f"  dask: {lazy_seconds:.2f} s ({lazy_seconds / n * 1e9:.1f} ns/case); "
          f"block-by-block numpy loop in this process: {loop_seconds:.2f} s "
          f"({loop_seconds / n * 1e9:.1f} ns/case); ratio {lazy_seconds / loop_seconds:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
