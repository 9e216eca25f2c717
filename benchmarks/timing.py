"""Timing helpers shared by the benchmark scripts (run as scripts from the repository root,
so this folder is on ``sys.path``)."""

from __future__ import annotations

import math
import time


def best_time(func, repeats, number=1, clock=time.perf_counter):
    """Best of ``repeats`` timings of ``number`` calls of ``func()``, per call [s], on
    ``clock``; and the last result."""
    best, result = math.inf, None
    for _ in range(repeats):
        start = clock()
        for _ in range(number):
            result = func()
        best = min(best, (clock() - start) / number)
    return best, result


def shortest_time(func, repeats, number=1):
    """Best wall time [s] per call of ``func()`` over ``repeats`` timings (the result is
    dropped)."""
    return best_time(func, repeats, number)[0]
