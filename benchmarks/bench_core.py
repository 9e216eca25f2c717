"""Benchmark of the core relations: time per case, and ratios measured in the same run.

Run from the repository root::

    python benchmarks/bench_core.py           # 10^6 random cases per relation
    python benchmarks/bench_core.py --quick   # 10^4 cases, a few seconds (CI)

Every figure is the best of several repeats timed with ``time.perf_counter``.
Three kinds of ratio are printed, all against baselines timed in this run:

- each relation's time per case over that of one plain isentropic p/p0
  evaluation (:func:`gasdyn2d.relations.isentropic.pressure_ratio` on the same array),
  so the table reads as "costs as much as N pressure ratios";
- the speed-up of ``oblique_shock(M1, deflection=...)`` over a scalar
  root-finding loop (``scipy.optimize.brentq`` on θ(β) - θ for each case,
  with the θ-β-M relation written with the ``math`` module, timed on a subset);
- ``mach_from_prandtl_meyer`` against ``prandtl_meyer``.

It also prints the per-call overhead of scalar calls (plain numbers and pint
Quantities) in microseconds. Environment variables are left as they are; the
numpy version and BLAS build are printed so that figures can be compared.
"""

from __future__ import annotations

import argparse
import math
import platform
import sys

import numpy as np
from scipy.optimize import brentq

import gasdyn2d
from gasdyn2d import (
    expansion_fan,
    isentropic_flow,
    mach_from_prandtl_meyer,
    max_deflection,
    normal_shock,
    oblique_shock,
    prandtl_meyer,
    sonic_deflection,
    ureg,
)
from gasdyn2d.relations import expansion_fans as expansion
from gasdyn2d.relations import isentropic, normal_shocks, oblique_shocks
from gasdyn2d.relations import simple_waves as waves

from timing import shortest_time

GAMMA = 1.4
TARGET_LOOP_SPEEDUP = 100.0  # issue 2: the vectorised solve must beat a brentq loop 100x
TARGET_PM_INVERSE_RATIO = 10.0  # issue 2: ν⁻¹ within 10x the cost of ν


# ------------------------------------------------------------------ timing helpers


def per_call_microseconds(func, calls, repeats):
    """Best time per call [µs] of a scalar call repeated ``calls`` times."""

    def many():
        for _ in range(calls):
            func()

    return shortest_time(many, repeats) / calls * 1e6


def describe_environment():
    """One line each for Python, numpy (and its BLAS), scipy, pint and gasdyn2d."""
    import pint
    import scipy

    blas = "unknown"
    try:
        config = np.show_config(mode="dicts")
        info = config["Build Dependencies"]["blas"]
        blas = f"{info.get('name', '?')} {info.get('version', '')}".strip()
    except Exception:  # older numpy: no dict mode; the BLAS name is informative only
        pass
    return [
        f"python {platform.python_version()} on {platform.machine()} ({platform.system()})",
        f"numpy {np.__version__} (BLAS: {blas}), scipy {scipy.__version__}, "
        f"pint {pint.__version__}, gasdyn2d {gasdyn2d.__version__}",
    ]


# ------------------------------------------------------------------ random cases


def make_cases(n, seed=20261201):
    """Random supersonic cases, and every derived input the inverses need (untimed)."""
    rng = np.random.default_rng(seed)
    M = rng.uniform(1.05, 5.0, n)
    fraction = rng.uniform(0.01, 0.99, n)  # of the detachment deflection
    theta_max, _ = oblique_shocks.detachment_angles(M, GAMMA)
    theta = fraction * theta_max
    beta = oblique_shocks.wave_angle_from_deflection(M, theta, GAMMA)
    nu = expansion.prandtl_meyer_angle(M, GAMMA)
    turn = rng.uniform(0.0, 0.5, n) * (expansion.max_prandtl_meyer_angle(GAMMA) - nu)
    fan_M2 = expansion.mach_from_prandtl_meyer_angle(nu + turn, GAMMA)
    shock = normal_shock(M, gamma=GAMMA)
    flow = isentropic_flow(M, gamma=GAMMA)
    return dict(
        M=M, theta=theta, beta=beta, Mn1=M * np.sin(beta),
        p2_p1_oblique=oblique_shocks.oblique_shock_ratios(M, beta, GAMMA).p2_p1,
        nu=nu, turn=turn, fan_M2=fan_M2,
        fan_p2_p1=expansion.fan_pressure_ratio(M, fan_M2, GAMMA),
        signed_turn=np.where(rng.random(n) < 0.5, theta, -turn),
        w=(M - 1.0) * (M + 1.0),
        shock=shock, flow=flow,
        A_sub=rng.uniform(1.0, 25.0, n),
    )


def relation_cases(c):
    """(group, label, callable) for every timed relation, plain cores last."""
    M, th, be = c["M"], c["theta"], c["beta"]
    sh, fl = c["shock"], c["flow"]
    return [
        ("isentropic", "isentropic_flow(M)", lambda: isentropic_flow(M)),
        ("isentropic", "isentropic_flow(T_T0=...)", lambda: isentropic_flow(T_T0=fl.T_T0)),
        ("isentropic", "isentropic_flow(p_p0=...)", lambda: isentropic_flow(p_p0=fl.p_p0)),
        ("isentropic", "isentropic_flow(rho_rho0=...)",
         lambda: isentropic_flow(rho_rho0=fl.rho_rho0)),
        ("isentropic", "isentropic_flow(A_Astar=..., supersonic)",
         lambda: isentropic_flow(A_Astar=fl.A_Astar)),
        ("isentropic", "isentropic_flow(A_Astar=..., subsonic)",
         lambda: isentropic_flow(A_Astar=c["A_sub"], branch="subsonic")),
        ("isentropic", "isentropic_flow(mach_angle=...)",
         lambda: isentropic_flow(mach_angle=fl.mach_angle)),
        ("isentropic", "isentropic_flow(prandtl_meyer=...)",
         lambda: isentropic_flow(prandtl_meyer=fl.prandtl_meyer)),
        ("normal shock", "normal_shock(M1)", lambda: normal_shock(M)),
        ("normal shock", "normal_shock(M2=...)", lambda: normal_shock(M2=sh.M2)),
        ("normal shock", "normal_shock(p2_p1=...)", lambda: normal_shock(p2_p1=sh.p2_p1)),
        ("normal shock", "normal_shock(rho2_rho1=...)",
         lambda: normal_shock(rho2_rho1=sh.rho2_rho1)),
        ("normal shock", "normal_shock(T2_T1=...)", lambda: normal_shock(T2_T1=sh.T2_T1)),
        ("normal shock", "normal_shock(p02_p01=...)", lambda: normal_shock(p02_p01=sh.p02_p01)),
        ("normal shock", "normal_shock(p02_p1=...)", lambda: normal_shock(p02_p1=sh.p02_p1)),
        ("oblique shock", "oblique_shock(M1, deflection=..., weak)",
         lambda: oblique_shock(M, deflection=th)),
        ("oblique shock", "oblique_shock(M1, deflection=..., strong)",
         lambda: oblique_shock(M, deflection=th, branch="strong")),
        ("oblique shock", "oblique_shock(M1, wave_angle=...)",
         lambda: oblique_shock(M, wave_angle=be)),
        ("oblique shock", "oblique_shock(M1, Mn1=...)", lambda: oblique_shock(M, Mn1=c["Mn1"])),
        ("oblique shock", "oblique_shock(M1, p2_p1=...)",
         lambda: oblique_shock(M, p2_p1=c["p2_p1_oblique"])),
        ("oblique shock", "max_deflection(M1)", lambda: max_deflection(M)),
        ("oblique shock", "sonic_deflection(M1)", lambda: sonic_deflection(M)),
        ("expansion", "prandtl_meyer(M)", lambda: prandtl_meyer(M)),
        ("expansion", "mach_from_prandtl_meyer(nu)", lambda: mach_from_prandtl_meyer(c["nu"])),
        ("expansion", "expansion_fan(M1, deflection=...)",
         lambda: expansion_fan(M, deflection=c["turn"])),
        ("expansion", "expansion_fan(M1, p2_p1=...)",
         lambda: expansion_fan(M, p2_p1=c["fan_p2_p1"])),
        ("expansion", "expansion_fan(M1, M2=...)", lambda: expansion_fan(M, M2=c["fan_M2"])),
        ("plain core", "isentropic.temperature_ratio", lambda: isentropic.temperature_ratio(M)),
        ("plain core", "isentropic.area_ratio", lambda: isentropic.area_ratio(M)),
        ("plain core", "isentropic.mach_from_area_ratio",
         lambda: isentropic.mach_from_area_ratio(fl.A_Astar)),
        ("plain core", "normal_shocks.normal_shock_ratios",
         lambda: normal_shocks.normal_shock_ratios(c["w"])),
        ("plain core", "normal_shocks.pitot_ratio", lambda: normal_shocks.pitot_ratio(M)),
        ("plain core", "oblique_shocks.wave_angle_from_deflection (weak)",
         lambda: oblique_shocks.wave_angle_from_deflection(M, th)),
        ("plain core", "oblique_shocks.wave_angle_from_deflection (strong)",
         lambda: oblique_shocks.wave_angle_from_deflection(M, th, strong=True)),
        ("plain core", "oblique_shocks.deflection_from_wave_angle",
         lambda: oblique_shocks.deflection_from_wave_angle(M, be)),
        ("plain core", "oblique_shocks.detachment_angles",
         lambda: oblique_shocks.detachment_angles(M)),
        ("plain core", "oblique_shocks.oblique_shock_ratios",
         lambda: oblique_shocks.oblique_shock_ratios(M, be)),
        ("plain core", "expansion.prandtl_meyer_angle", lambda: expansion.prandtl_meyer_angle(M)),
        ("plain core", "expansion.mach_from_prandtl_meyer_angle",
         lambda: expansion.mach_from_prandtl_meyer_angle(c["nu"])),
        ("plain core", "waves.turn_state (half shocks, half fans)",
         lambda: waves.turn_state(M, c["signed_turn"])),
    ]


# ------------------------------------------------------------------ scalar root-finding loop


def _deflection_scalar(M, beta, gamma):
    """θ(β) for one case with the math module: tan θ = 2 cot β (M² sin²β - 1)/(M²(γ + cos 2β) + 2)."""
    s = math.sin(beta)
    return math.atan(2.0 * (M * M * s * s - 1.0) / (math.tan(beta) * (M * M * (gamma + math.cos(2.0 * beta)) + 2.0)))


def _detachment_wave_angle_scalar(M, gamma):
    """β at θmax for one case (NACA Report 1135, eq. 168), the top of the weak-branch bracket."""
    m2 = M * M
    root = math.sqrt((gamma + 1.0) * ((gamma + 1.0) * m2 * m2 / 16.0 + 0.5 * (gamma - 1.0) * m2 + 1.0))
    return math.asin(math.sqrt(((gamma + 1.0) * m2 / 4.0 - 1.0 + root) / (gamma * m2)))


def brentq_loop(M, theta, gamma=GAMMA, xtol=1e-15):
    """Weak-branch β for each case by scipy brentq on θ(β) - θ in [μ, β*] (the plain baseline)."""
    out = np.empty_like(M)
    for i in range(M.size):
        m, t = float(M[i]), float(theta[i])
        out[i] = brentq(lambda b: _deflection_scalar(m, b, gamma) - t,
                        math.asin(1.0 / m), _detachment_wave_angle_scalar(m, gamma), xtol=xtol)
    return out


# ------------------------------------------------------------------ hand-written numpy baseline


def handwritten_oblique_numpy(M, theta, gamma=GAMMA):
    """Weak-branch β as a user would write it in numpy: the trigonometric root of the θ-β-M
    cubic in sin²β (NACA Report 1135, eq. 150) and one Newton step on θ(β), then p2/p1
    and M2. The baseline the batched solve is compared with (same cases, same run)."""
    m2 = M * M
    s2 = np.sin(theta) ** 2
    b = -(m2 + 2.0) / m2 - gamma * s2
    c = (2.0 * m2 + 1.0) / (m2 * m2) + ((gamma + 1.0) ** 2 / 4.0 + (gamma - 1.0) / m2) * s2
    d = -np.cos(theta) ** 2 / (m2 * m2)
    p = c - b * b / 3.0
    q = 2.0 * b ** 3 / 27.0 - b * c / 3.0 + d
    r = np.sqrt(-p / 3.0)
    phi = np.arccos(np.clip(3.0 * q / (2.0 * p * r), -1.0, 1.0)) / 3.0
    x = 2.0 * r * np.cos(phi - 2.0 * np.pi / 3.0) - b / 3.0
    beta = np.arcsin(np.sqrt(x))
    # one Newton step on tan θ(β) - tan θ
    sb, cb = np.sin(beta), np.cos(beta)
    num = 2.0 * (m2 * sb * sb - 1.0) * cb / sb
    den = m2 * (gamma + np.cos(2.0 * beta)) + 2.0
    f = num / den - np.tan(theta)
    h = 1e-7
    f2 = 2.0 * (m2 * np.sin(beta + h) ** 2 - 1.0) / np.tan(beta + h) / (
        m2 * (gamma + np.cos(2.0 * (beta + h))) + 2.0) - np.tan(theta)
    beta = beta - f * h / (f2 - f)
    mn2 = m2 * np.sin(beta) ** 2
    p2_p1 = 1.0 + 2.0 * gamma / (gamma + 1.0) * (mn2 - 1.0)
    Mn2 = np.sqrt(((gamma - 1.0) * mn2 + 2.0) / (2.0 * gamma * mn2 - (gamma - 1.0)))
    return beta, p2_p1, Mn2 / np.sin(beta - theta)


def peak_memory_ratio(func, inputs):
    """Peak memory traced during ``func()`` over the bytes of its inputs and outputs."""
    import tracemalloc

    tracemalloc.start()
    tracemalloc.reset_peak()
    result = func()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    outputs = result if isinstance(result, tuple) else [getattr(result, f) for f in
                                                       result.__dataclass_fields__]
    size = sum(np.asarray(a).nbytes for a in inputs)
    size += sum(a.nbytes for a in outputs if isinstance(a, np.ndarray))
    return peak / size


#: issue 10's batched targets [ns per case at 10^6 cases], on the machine they were set on
BATCH_TARGETS = {"oblique_shock(M1, deflection=..., weak)": 65.0, "isentropic_flow(M)": 47.0,
                 "mach_from_prandtl_meyer(nu)": 90.0, "expansion_fan(M1, deflection=...)": 120.0}
TARGET_MEMORY = 3.0


# ------------------------------------------------------------------ the report


def format_row(label, seconds_per_case, ratio):
    return f"  {label:<52s} {seconds_per_case * 1e9:10.1f} ns {ratio:10.1f}x"


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true",
                        help="10^4 cases and fewer repeats: finishes in a few seconds (for CI)")
    args = parser.parse_args(argv)
    n = 10_000 if args.quick else 1_000_000
    repeats = 3 if args.quick else 5
    n_loop = 200 if args.quick else 3_000
    calls = 200 if args.quick else 2_000

    print("gasdyn2d core benchmark" + (" (quick mode)" if args.quick else ""))
    for line in describe_environment():
        print("  " + line)
    print(f"  {n} random cases per relation, M1 uniform in [1.05, 5], deflections uniform in "
          f"[0.01, 0.99] θmax, γ = {GAMMA}; best of {repeats} repeats")
    cases = make_cases(n)

    baseline = shortest_time(lambda: isentropic.pressure_ratio(cases["M"]), repeats) / n
    print()
    print(f"  {'relation':<52s} {'per case':>13s} {'vs p/p0':>11s}")
    print(format_row("baseline: isentropic.pressure_ratio (plain p/p0)", baseline, 1.0))
    times = {}
    group = None
    for this_group, label, func in relation_cases(cases):
        if this_group != group:
            print(f"  -- {this_group}")
            group = this_group
        times[label] = shortest_time(func, repeats) / n
        print(format_row(label, times[label], times[label] / baseline))

    # the vectorised oblique-shock solve against a scalar brentq loop, same cases
    M_sub, theta_sub = cases["M"][:n_loop], cases["theta"][:n_loop]
    loop = shortest_time(lambda: brentq_loop(M_sub, theta_sub), max(2, repeats // 2)) / n_loop
    loop_default = shortest_time(lambda: brentq_loop(M_sub, theta_sub, xtol=2e-12),
                             max(2, repeats // 2)) / n_loop
    vector_beta = cases["beta"][:n_loop]
    agreement = np.max(np.abs(brentq_loop(M_sub, theta_sub) - vector_beta) / vector_beta)
    solve = times["oblique_shock(M1, deflection=..., weak)"]
    solve_core = times["oblique_shocks.wave_angle_from_deflection (weak)"]
    pm = times["prandtl_meyer(M)"]
    pm_inverse = times["mach_from_prandtl_meyer(nu)"]
    pm_core = times["expansion.prandtl_meyer_angle"]
    pm_core_inverse = times["expansion.mach_from_prandtl_meyer_angle"]
    print()
    print("Ratios measured in this run")
    print(f"  scalar brentq loop on θ(β) - θ (math module, xtol 1e-15), {n_loop} cases: "
          f"{loop * 1e6:.2f} µs per case")
    print(f"    agreement with the vectorised weak-branch β: max relative difference "
          f"{agreement:.1e}")
    print(f"    the same loop at scipy's default xtol (2e-12): "
          f"{loop_default * 1e6:.2f} µs per case, speed-up {loop_default / solve:,.0f}x")
    speedup, speedup_core = loop / solve, loop / solve_core
    verdict = "meets" if speedup >= TARGET_LOOP_SPEEDUP else "MISSES"
    print(f"  oblique_shock(M1, deflection=...) speed-up over the loop: {speedup:,.0f}x "
          f"(target >= {TARGET_LOOP_SPEEDUP:.0f}x: {verdict}); plain core "
          f"wave_angle_from_deflection: {speedup_core:,.0f}x")
    ratio = pm_inverse / pm
    verdict = "meets" if ratio <= TARGET_PM_INVERSE_RATIO else "MISSES"
    print(f"  mach_from_prandtl_meyer / prandtl_meyer: {ratio:.2f}x "
          f"(target <= {TARGET_PM_INVERSE_RATIO:.0f}x: {verdict}); plain cores: "
          f"{pm_core_inverse / pm_core:.2f}x")

    print()
    print("Issue 10 batch targets (absolute, so a busy machine reads slower; the ratio to the")
    print("hand-written numpy form, timed on the same cases in this run, is the robust figure)")
    M_all, th_all = cases["M"], cases["theta"]
    hand = shortest_time(lambda: handwritten_oblique_numpy(M_all, th_all), repeats) / n
    hand_beta = handwritten_oblique_numpy(M_all, th_all)[0]
    hand_error = np.nanmax(np.abs(hand_beta - cases["beta"]) / cases["beta"])
    print(f"  hand-written numpy oblique solve (cubic + one Newton step): {hand * 1e9:.1f} ns per "
          f"case; its worst relative error in β {hand_error:.1e} (ours: rounding)")
    print(f"  oblique_shock(M1, deflection=...) over it: {solve / hand:.2f}x")
    for label, target in BATCH_TARGETS.items():
        verdict = "meets" if times[label] * 1e9 <= target else "misses"
        print(f"  {label:<52s} {times[label] * 1e9:7.1f} ns (target <= {target:g} ns: {verdict})")
    n_memory = 100_000 if args.quick else 10_000_000
    mem_cases = make_cases(n_memory, seed=7)
    Mm, thm, num = mem_cases["M"], mem_cases["theta"], mem_cases["nu"]
    print(f"  peak memory over inputs plus outputs at {n_memory:.0e} cases "
          f"(target < {TARGET_MEMORY:g}):")
    for label, func, inputs in [
            ("isentropic_flow(M)", lambda: isentropic_flow(Mm), [Mm]),
            ("normal_shock(M1)", lambda: normal_shock(Mm), [Mm]),
            ("oblique_shock(M1, deflection=...)", lambda: oblique_shock(Mm, deflection=thm),
             [Mm, thm]),
            ("mach_from_prandtl_meyer(nu)", lambda: (mach_from_prandtl_meyer(num),), [num]),
            ("expansion_fan(M1, deflection=...)",
             lambda: expansion_fan(Mm, deflection=mem_cases["turn"]), [Mm, mem_cases["turn"]])]:
        ratio = peak_memory_ratio(func, inputs)
        verdict = "meets" if ratio < TARGET_MEMORY else "MISSES"
        print(f"    {label:<50s} {ratio:5.2f}x  ({verdict})")
    del mem_cases, Mm, thm, num

    print()
    print("Per-call overhead of one scalar call (best of repeats)")
    theta_deg = 5.7 * ureg.deg
    scalar_cases = [
        ("isentropic.pressure_ratio(2.0)  [plain core]", lambda: isentropic.pressure_ratio(2.0)),
        ("isentropic_flow(2.0)", lambda: isentropic_flow(2.0)),
        ("normal_shock(2.0)", lambda: normal_shock(2.0)),
        ("oblique_shocks.wave_angle_from_deflection(2.0, 0.1)  [plain core]",
         lambda: oblique_shocks.wave_angle_from_deflection(2.0, 0.1)),
        ("oblique_shock(2.0, deflection=0.1)", lambda: oblique_shock(2.0, deflection=0.1)),
        ("oblique_shock(2.0, deflection=5.7 * ureg.deg)",
         lambda: oblique_shock(2.0, deflection=theta_deg)),
        ("one brentq solve of θ(β) - θ  [scalar baseline]",
         lambda: brentq_loop(np.array([2.0]), np.array([0.1]))),
        ("expansion.prandtl_meyer_angle(2.0)  [plain core]",
         lambda: expansion.prandtl_meyer_angle(2.0)),
        ("prandtl_meyer(2.0)", lambda: prandtl_meyer(2.0)),
        ("mach_from_prandtl_meyer(0.46)", lambda: mach_from_prandtl_meyer(0.46)),
        ("mach_from_prandtl_meyer(26.4 * ureg.deg)",
         lambda: mach_from_prandtl_meyer(26.4 * ureg.deg)),
        ("expansion_fan(2.0, deflection=0.1)", lambda: expansion_fan(2.0, deflection=0.1)),
    ]
    for label, func in scalar_cases:
        print(f"  {label:<68s} {per_call_microseconds(func, calls, repeats):8.1f} µs")
    return 0


if __name__ == "__main__":
    sys.exit(main())
