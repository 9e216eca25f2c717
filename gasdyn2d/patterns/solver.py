"""The solver of a wave pattern: every unknown turn, for one case or a batch (plain core).

Input: a :class:`~gasdyn2d.patterns.graph.SolvePlan` (the checked graph: waves in an
order where each upstream region is known before use, the unknown turns, the
conditions) and the case values in SI (floats for one case, flat ndarrays for a
batch; γ may stay a float beside arrays). Output: a :class:`RawSolution` of plain
floats or arrays. No units, labels or containers here: that is the boundary's job.

The unknowns are the turns of the waves given neither a turn, a direction nor a
pressure; the residuals are the conditions' mismatches (wall: direction; free
boundary: log pressure; slip line: log pressure and direction). One pass through the
waves from the inflow gives the residuals **and their exact Jacobian** by forward
differentiation: every region carries the derivatives of its Mach number, log
pressure and direction with respect to the unknowns, and each wave maps them through
the partial derivatives of its own relation (:mod:`gasdyn2d.patterns.wave_steps`), which use the
d ln p / d turn that :func:`~gasdyn2d.relations.simple_waves.turn_state` returns. A
damped Newton iteration then runs on every case at once (cases leave as they
converge; a step is halved per case while it detaches a wave or does not reduce the
residual). A single case runs the same iteration on Python floats (the scalar plain
cores), falling back to the batch form only to explain a failure, so that both give
one message.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from ..errors import InvalidInputError
from ..relations import thermally_perfect as tp
from ..relations import thermally_perfect_oblique as tpo
from ..relations.expansion_fans import prandtl_meyer_angle
from ..relations.oblique_shocks import detachment_angles
from .wave_steps import (RegionState, RegionValues, log_of, scalar_state, structural_zero,
                         take_cases, take_state, through_wave, wave_partials)

__all__ = ["RawSolution", "RegionValues", "solve_cases", "validate_cases", "wave_partials"]

_EPS = np.finfo(float).eps
_MAX_HALVINGS = 30
#: A Newton step of at most this fraction of the turns is inside the quadratic basin of the
#: exact Jacobian: it is taken whole, and a residual that rounding keeps from falling
#: after it means convergence.
_BASIN = 1e-6


class RawSolution(NamedTuple):
    """The solver's plain result (floats for one case, flat ndarrays for a batch)."""

    regions: dict  #: name -> RegionValues
    waves: dict  #: name -> (turn [rad], WaveState)
    ok: object  #: bool per case
    failure: object  #: reason per case ("" where solved or NaN in)
    detached_given: object  #: the failure is a given turn beyond detachment (an input error)
    iterations: int


# ------------------------------------------------------------------ one evaluation


def _evaluate(plan, x, case, constant=None):
    """Every region and wave at the unknown turns ``x`` (list of floats or arrays).

    ``constant`` holds the regions and waves that depend on no unknown, already
    evaluated for these cases (they are computed once per solve)."""
    k = len(plan.unknowns)
    M = case["M"]
    zeros = [0.0] * k
    zero = 0.0 if type(M) is float else np.zeros_like(M)
    regions = {plan.inflow: RegionState(RegionValues(M, zero, case["d"], zero, zero), zeros,
                                    list(zeros), list(zeros))}
    waves = {}
    for link in plan.order:
        if constant is not None and link.name in constant[1]:
            regions[link.downstream] = constant[0][link.downstream]
            waves[link.name] = constant[1][link.name]
            continue
        turn, state, region = through_wave(link, regions[link.upstream], x, case,
                                           plan.index.get(link.name), plan.gas)
        regions[link.downstream] = region
        waves[link.name] = (turn, state)
    return regions, waves


def _constant_part(plan, case):
    """The regions and waves that no unknown reaches, evaluated once per solve."""
    k = len(plan.unknowns)
    zeros = [0.0] * k
    M = case["M"]
    zero = 0.0 if type(M) is float else np.zeros_like(M)
    regions = {plan.inflow: RegionState(RegionValues(M, zero, case["d"], zero, zero), zeros,
                                    list(zeros), list(zeros))}
    waves = {}
    for link in plan.order:
        if plan.deps[link.downstream]:
            continue
        turn, state, region = through_wave(link, regions[link.upstream], None, case, None,
                                           plan.gas)
        regions[link.downstream] = region
        waves[link.name] = (turn, state)
    del regions[plan.inflow]
    return regions, waves


def _take_constant(constant, idx):
    regions, waves = constant
    return ({name: RegionState(RegionValues(*(take_cases(v, idx) for v in r.values)), r.dM, r.dlnp,
                           r.dd) for name, r in regions.items()},
            {name: (take_cases(turn, idx), take_state(s, idx))
             for name, (turn, s) in waves.items()})


def _system(plan, x, case, constant):
    """(regions, waves, residuals, Jacobian rows) at the unknown turns ``x``.

    For a perfect gas the Jacobian comes exact from the forward differentiation through
    the waves; for a thermally perfect gas (``plan.gas``), whose waves carry no
    derivatives, from forward differences of the residuals (:func:`_difference_jacobian`).
    """
    regions, waves = _evaluate(plan, x, case, constant)
    r, J = _residuals(plan, regions, case)
    if plan.gas is not None and len(x):
        J = _difference_jacobian(plan, x, case, constant, r)
    return regions, waves, r, J


#: Relative step of the difference Jacobian (about √eps: the Jacobian is then good to about
#: 1e-8, so Newton converges to rounding in one or two more steps than with the exact one).
_DIFFERENCE_STEP = 1e-8
_SMALLEST_TURN = 1e-3  # [rad]: the scale of the step where a turn is near zero


def _difference_jacobian(plan, x, case, constant, r):
    """Jacobian rows by forward differences, one evaluation per unknown (floats or arrays).

    Each turn is stepped towards zero (away from detachment and vacuum); where that
    evaluation fails (a wave lost), the other way.
    """
    k = len(x)
    columns = []
    for j in range(k):
        xj = x[j]
        if type(xj) is float:
            h = _DIFFERENCE_STEP * max(abs(xj), _SMALLEST_TURN) * (-1.0 if xj > 0.0 else 1.0)
        else:
            h = (_DIFFERENCE_STEP * np.maximum(np.abs(xj), _SMALLEST_TURN)
                 * np.where(xj > 0.0, -1.0, 1.0))
        column = _difference_column(plan, x, case, constant, r, j, h)
        lost = [v != v for v in column] if type(xj) is float else None
        if type(xj) is float:
            if any(lost):
                column = _difference_column(plan, x, case, constant, r, j, -h)
        else:
            bad = np.zeros(np.shape(xj), dtype=bool)
            for v in column:
                bad |= ~np.isfinite(v)
            if bad.any():
                other = _difference_column(plan, x, case, constant, r, j, np.where(bad, -h, h))
                column = [np.where(bad, o, c) for o, c in zip(other, column)]
        columns.append(column)
    return [[columns[j][i] for j in range(k)] for i in range(len(r))]


def _difference_column(plan, x, case, constant, r, j, h):
    stepped = list(x)
    stepped[j] = x[j] + h
    h = stepped[j] - x[j]  # the step actually taken, in floating point
    regions, _ = _evaluate(plan, stepped, case, constant)
    r_h, _ = _residuals(plan, regions, case)
    return [(a - b) / h for a, b in zip(r_h, r)]


def _residuals(plan, regions, case):
    """(residuals, Jacobian rows): lists of floats or arrays, one per condition equation."""
    r, J = [], []
    for i, c in enumerate(plan.conditions):
        a = regions[c.regions[0]]
        if c.kind == "wall":
            r.append(a.values.direction - case[f"c:{i}"])
            J.append(a.dd)
        elif c.kind == "free boundary":
            r.append(a.values.lnp - log_of(case[f"c:{i}"]))
            J.append(a.dlnp)
        else:
            b = regions[c.regions[1]]
            r += [a.values.lnp - b.values.lnp, a.values.direction - b.values.direction]
            J += [[p - q for p, q in zip(a.dlnp, b.dlnp)],
                  [p - q for p, q in zip(a.dd, b.dd)]]
    return r, J


# ------------------------------------------------------------------ input checks


def validate_cases(plan, case, shape, check, note):
    """Check the case inputs in place by the call's NaN policy (raise, or NaN them).

    ``note(bad_mask, text)`` records a per-case reason for elements turned to NaN.
    The checks run in the case ``shape``, so that a message's index is the caller's.
    """
    def checked(key, name, test, requirement, unit_text=""):
        value = case[key]
        if isinstance(value, np.ndarray):
            value = value.reshape(shape)
            with np.errstate(invalid="ignore"):
                bad = test(value) & ~np.isnan(value)
            if not bad.any():
                return
            out = check.reject(bad, value, name, requirement, unit_text=unit_text)
            note(bad.reshape(-1), f"{name} = {{}} is not {requirement}.", value.reshape(-1),
                 unit_text)
            case[key] = np.asarray(out, dtype=float).reshape(-1)
        else:
            bad = bool(test(np.float64(value))) and value == value
            if bad:
                case[key] = check.reject(True, value, name, requirement, unit_text=unit_text)
                note(True, f"{name} = {{}} is not {requirement}.", value, unit_text)

    checked("M", "inflow Mach number", lambda v: ~(v >= 1.0) | np.isinf(v),
            "finite and >= 1 (supersonic flow)")
    checked("g", "gamma", lambda v: ~(v > 1.0) | np.isinf(v),
            "a finite ratio of specific heats > 1")
    checked("d", "direction", np.isinf, "finite", "rad")
    for link in plan.order:
        if link.given == "pressure":
            checked("w:" + link.name, f"pressure (of wave {link.name!r})",
                    lambda v: ~(v > 0.0) | np.isinf(v), "finite and > 0")
        elif link.given != "unknown":
            checked("w:" + link.name, f"{link.given} (of wave {link.name!r})", np.isinf,
                    "finite", "rad")
    for i, c in enumerate(plan.conditions):
        if c.kind == "wall":
            checked(f"c:{i}", f"direction (of the {c.label()})", np.isinf, "finite", "rad")
        elif c.kind == "free boundary":
            checked(f"c:{i}", f"pressure (of the {c.label()})",
                    lambda v: ~(v > 0.0) | np.isinf(v), "finite and > 0")


def _plainly_valid(plan, case):
    """One case whose inputs are all in range (the common case: no check to run)."""
    inf = math.inf
    if not (1.0 <= case["M"] < inf and 1.0 < case["g"] < inf and -inf < case["d"] < inf):
        return False
    for link in plan.order:
        if link.given == "pressure":
            if not 0.0 < case["w:" + link.name] < inf:
                return False
        elif link.given != "unknown" and not -inf < case["w:" + link.name] < inf:
            return False
    for i, c in enumerate(plan.conditions):
        if c.kind == "wall" and not -inf < case[f"c:{i}"] < inf:
            return False
        if c.kind == "free boundary" and not 0.0 < case[f"c:{i}"] < inf:
            return False
    return True


# ------------------------------------------------------------------ the solve


def solve_cases(plan, case, shape, check, *, max_iterations=40, explain=True):
    """Solve every case of ``case`` (floats: one case; flat arrays: a batch).

    Invalid inputs raise or become NaN with a reason (``check``'s policy); a case with
    any NaN input is NaN out and no failure. Returns a :class:`RawSolution`.
    ``explain=False`` lets a failed single case go without its reason (and the batch
    pass that finds it), for callers that explain failures themselves.
    """
    if not isinstance(max_iterations, int) or isinstance(max_iterations, bool) \
            or max_iterations < 1:
        raise InvalidInputError(f"max_iterations must be an integer >= 1; got "
                                f"{max_iterations!r}.")
    scalar = all(type(v) is float for v in case.values())
    reasons = [""] if scalar else np.full(case["M"].size, "", dtype=object)

    def note(bad, template, values, unit_text=""):
        from ..boundary.checks import format_value

        if scalar:
            if reasons[0] == "":
                reasons[0] = template.format(format_value(values, unit_text))
            return
        for i in np.flatnonzero(bad & (reasons == "")):
            reasons[i] = template.format(format_value(values[i], unit_text))

    case = dict(case)
    if not (scalar and _plainly_valid(plan, case)):
        validate_cases(plan, case, shape, check, note)
    if scalar:
        if not any(v != v for v in case.values()):
            solved = _solve_scalar(plan, case, max_iterations)
            if solved.ok or not explain:
                return solved
        # NaN in, or a failure to explain: the batch form on one case gives the message
        arrays = {key: np.array([v]) for key, v in case.items()}
        raw = _solve_batch(plan, arrays, max_iterations, np.array(reasons, dtype=object))
        return _first_case(raw)
    return _solve_batch(plan, case, max_iterations, reasons)


def _first_case(raw):
    regions = {name: RegionValues(*(float(v[0]) for v in r)) for name, r in raw.regions.items()}
    waves = {name: (float(turn[0]), scalar_state(take_state(s, 0)))
             for name, (turn, s) in raw.waves.items()}
    return RawSolution(regions, waves, bool(raw.ok[0]), str(raw.failure[0]),
                       bool(raw.detached_given[0]), raw.iterations)


def _norm(r):
    """Largest |residual| over the equations (floats or per case)."""
    if not r:
        return 0.0
    if type(r[0]) is float:
        return max(abs(v) for v in r)
    return np.max(np.abs(np.array(r)), axis=0)


# ---- one case, on floats


def _solve_scalar(plan, case, max_iterations):
    """Newton on Python floats: the RawSolution of one case (``ok`` False where it fails,
    its reason left to the batch form, with the last state evaluated)."""
    k = len(plan.unknowns)
    x = [float(case.get("guess:" + name, 0.0)) for name in plan.unknowns]
    constant = _constant_part(plan, case)
    regions, waves, r, J = _system(plan, x, case, constant)
    for _ in range(_MAX_HALVINGS):  # a detached start: pull back towards Mach waves
        if all(v == v and abs(v) != math.inf for v in r):
            break
        x = [0.5 * v for v in x]
        regions, waves, r, J = _system(plan, x, case, constant)
    else:
        return _unsolved(regions, waves, 0)
    norm = _norm(r)
    iterations = 0
    converged = k == 0 or norm == 0.0
    while not converged and iterations < max_iterations:
        iterations += 1
        dx = _solve_small_scalar(J, [-v for v in r])
        if dx is None:
            return _unsolved(regions, waves, iterations)
        scale = max(abs(v) for v in x)
        near = max(abs(v) for v in dx) <= _BASIN * scale
        lam = 1.0
        for _ in range(_MAX_HALVINGS):
            trial = [a + lam * b for a, b in zip(x, dx)]
            t_regions, t_waves, t_r, t_J = _system(plan, trial, case, constant)
            t_norm = _norm(t_r)
            decrease = t_norm <= norm * (1.0 - 1e-4 * lam)
            if t_norm == t_norm and (decrease or near):
                break
            lam *= 0.5
        else:
            return _unsolved(regions, waves, iterations)
        step = lam * max(abs(v) for v in dx)
        x, regions, waves, r, J, norm = trial, t_regions, t_waves, t_r, t_J, t_norm
        converged = (norm == 0.0 or step <= 4.0 * _EPS * max(abs(v) for v in x)
                     or (near and not decrease))
    if not converged or not all(v == v for v in x) or any(
            s.detached or s.vacuum or s.M2 != s.M2 for _, s in waves.values()):
        return _unsolved(regions, waves, iterations)
    return RawSolution({name: reg.values for name, reg in regions.items()}, waves, True, "",
                       False, iterations)


def _unsolved(regions, waves, iterations):
    """A one-case RawSolution that failed (no reason yet: the batch form gives it)."""
    return RawSolution({name: reg.values for name, reg in regions.items()}, waves, False, "",
                       False, iterations)


def _solve_small_scalar(J, b):
    """Gaussian elimination with partial pivoting on a k×k system of floats (None if singular)."""
    k = len(b)
    A = [[float(J[i][j]) for j in range(k)] + [b[i]] for i in range(k)]
    for col in range(k):
        pivot = max(range(col, k), key=lambda i: abs(A[i][col]))
        if not A[pivot][col] or A[pivot][col] != A[pivot][col]:
            return None
        A[col], A[pivot] = A[pivot], A[col]
        for i in range(col + 1, k):
            f = A[i][col] / A[col][col]
            for j in range(col, k + 1):
                A[i][j] -= f * A[col][j]
    out = [0.0] * k
    for i in range(k - 1, -1, -1):
        out[i] = (A[i][k] - sum(A[i][j] * out[j] for j in range(i + 1, k))) / A[i][i]
    return out


# ---- a batch, on arrays


def _solve_batch(plan, case, max_iterations, reasons):
    n = case["M"].size
    k = len(plan.unknowns)
    live = np.ones(n, dtype=bool)
    for value in case.values():
        if isinstance(value, np.ndarray):
            live &= ~np.isnan(value)
    x = np.zeros((k, n))
    for i, name in enumerate(plan.unknowns):
        if "guess:" + name in case:
            x[i] = case["guess:" + name]
    x[:, ~live] = np.nan
    constant = _constant_part(plan, case)
    x, converged, iterations, step = _newton(plan, x, case, constant, live, max_iterations)
    regions, waves = _evaluate(plan, list(x), case, constant)
    r, _ = _residuals(plan, regions, case)
    ok = converged & live & np.all(np.isfinite(x), axis=0)
    for value in r:
        ok &= np.isfinite(value)
    for region in regions.values():
        ok &= np.isfinite(region.values.lnp)
    failure, detached_given = _diagnose(plan, x, step, case, constant, ok & live | ~live,
                                        regions, waves)
    failure = np.where(reasons != "", reasons, failure).astype(str)
    ok &= failure == ""
    values = {name: reg.values for name, reg in regions.items()}
    return RawSolution(values, waves, ok, failure, detached_given & (reasons == ""),
                       iterations)


def _newton(plan, x, case, constant, live, max_iterations):
    """Batched damped Newton iteration on the unknown turns ``x`` (k, n), in place.

    Returns (x, converged, iterations, last step). Each iteration evaluates the
    pattern once on the active cases (residuals and exact Jacobian together); a step
    that does not reduce the largest residual is halved for that case alone, which
    re-evaluates only the halved cases. A case leaves when its step is within 4 ulp of
    its turns, its residual is exactly zero, or no halving reduces the residual (it
    has reached rounding, if its last full step was below 1e-8 of its turns, and has
    stalled otherwise).
    """
    k, n = x.shape
    converged = np.zeros(n, dtype=bool)
    last_step = np.full_like(x, np.nan)
    if k == 0:
        return x, np.ones(n, dtype=bool), 0, last_step
    idx = np.flatnonzero(live & np.all(np.isfinite(x), axis=0))
    sub, sub_constant = _sub_case(case, idx), _take_constant(constant, idx)
    xs = x[:, idx]
    r, J = _system(plan, list(xs), sub, sub_constant)[2:]
    # a detached or vacuous start is pulled back towards Mach waves (always defined)
    for _ in range(_MAX_HALVINGS):
        bad = ~np.all(np.isfinite(_stack(r, idx.size)), axis=0)
        if not bad.any():
            break
        xs[:, bad] *= 0.5
        r, J = _system(plan, list(xs), sub, sub_constant)[2:]
    x[:, idx] = xs
    iterations = 0
    for iterations in range(1, max_iterations + 1):
        if idx.size == 0:
            break
        rs = _stack(r, idx.size)
        norm = np.max(np.abs(rs), axis=0)
        dx = _solve_small(_jacobian(J, k, idx.size), -rs)
        last_step[:, idx] = dx
        finite_step = np.all(np.isfinite(dx), axis=0)
        lam = np.ones(idx.size)
        trial = xs + np.where(finite_step, dx, 0.0)
        t_r, t_J = _system(plan, list(trial), sub, sub_constant)[2:]
        t_rs = _stack(t_r, idx.size)
        t_norm = np.max(np.abs(t_rs), axis=0)
        # in the quadratic basin (a step of 1e-6 of the turns or less) the full step is
        # taken even if rounding keeps the residual from falling
        scale = np.max(np.abs(xs), axis=0)
        near = finite_step & (np.max(np.abs(np.nan_to_num(dx)), axis=0) <= _BASIN * scale)
        for _ in range(_MAX_HALVINGS):
            halve = ~(t_norm <= norm * (1.0 - 1e-4 * lam)) & finite_step & ~near
            if not halve.any():
                break
            j = np.flatnonzero(halve)
            lam[j] *= 0.5
            trial[:, j] = xs[:, j] + lam[j] * dx[:, j]
            part = _sub_case(sub, j)
            p_r, p_J = _system(plan, list(trial[:, j]), part,
                               _take_constant(sub_constant, j))[2:]
            t_rs[:, j] = _stack(p_r, j.size)
            t_norm[j] = np.max(np.abs(t_rs[:, j]), axis=0)
            t_J = _merge_rows(t_J, p_J, j, idx.size)
        decrease = t_norm <= norm * (1.0 - 1e-4 * lam)
        accept = (decrease | near) & np.isfinite(t_norm)
        xs = np.where(accept, trial, xs)
        step = lam * np.max(np.abs(np.nan_to_num(dx)), axis=0)
        small = step <= 4.0 * _EPS * np.max(np.abs(xs), axis=0)
        # converged: residual exactly zero, a step within 4 ulp of the turns, or a step in
        # the quadratic basin that rounding keeps from reducing the residual
        done = accept & ((t_norm == 0.0) | small | (near & ~decrease))
        converged[idx[done]] = True
        x[:, idx] = xs
        keep = accept & ~done  # stalled or undefined steps leave unconverged
        idx, xs = idx[keep], xs[:, keep]
        sub, sub_constant = _sub_case(sub, keep), _take_constant(sub_constant, keep)
        r = [t_rs[i, keep] for i in range(t_rs.shape[0])]
        J = [[take_cases(c, keep) for c in row] for row in t_J]
    return x, converged, iterations, last_step


def _stack(rows, n):
    """Residual rows (arrays, or floats for equations of no case array) as (rows, n)."""
    return np.array([np.broadcast_to(v, (n,)) for v in rows]).reshape(len(rows), n)


def _merge_rows(rows, part_rows, j, n):
    """Jacobian rows with the entries of cases ``j`` replaced by ``part_rows``."""
    out = []
    for row, part in zip(rows, part_rows):
        merged = []
        for full, sub in zip(row, part):
            if structural_zero(full) and structural_zero(sub):
                merged.append(0.0)
                continue
            value = np.array(np.broadcast_to(full, (n,)), dtype=float, copy=True)
            value[j] = sub
            merged.append(value)
        out.append(merged)
    return out


def _sub_case(case, idx):
    return {key: take_cases(value, idx) for key, value in case.items()}


def _jacobian(rows, k, n):
    J = np.zeros((n, len(rows), k))
    for i, row in enumerate(rows):
        for j, value in enumerate(row):
            if not structural_zero(value):
                J[:, i, j] = value
    return J


def _solve_small(J, b):
    """Solve J x = b for a stack of small systems (n, k, k) @ (k, n), NaN where singular."""
    n, k, _ = J.shape
    with np.errstate(all="ignore"):
        if k == 1:
            return b / J[:, 0, 0][None, :]
        if k == 2:
            det = J[:, 0, 0] * J[:, 1, 1] - J[:, 0, 1] * J[:, 1, 0]
            x0 = (b[0] * J[:, 1, 1] - b[1] * J[:, 0, 1]) / det
            x1 = (J[:, 0, 0] * b[1] - J[:, 1, 0] * b[0]) / det
            return np.array([x0, x1])
        good = np.all(np.isfinite(J), axis=(1, 2))
        good[good] = np.abs(np.linalg.det(J[good])) > 0
        out = np.full((k, n), np.nan)
        if np.any(good):
            out[:, good] = np.linalg.solve(J[good], b.T[good][..., None])[..., 0].T
        return out


# ------------------------------------------------------------------ failure reasons


def _diagnose(plan, x, step, case, constant, settled, regions, waves):
    """Per-case reason of failure ('' where solved or NaN in), and whether it is a given
    turn beyond detachment (an input error rather than an unsolvable pattern).

    Checked in order: a given turn detached from a region no unknown reaches; a wave
    whose upstream region is subsonic; a given pressure out of reach; a detached shock
    or a fan to vacuum at the last iterate; for cases where the iteration stalled,
    the same checks at the full last Newton step (where the conditions were heading).
    """
    n = x.shape[1]
    failure = np.full(n, "", dtype=object)
    detached_given = np.zeros(n, dtype=bool)
    bad = ~settled
    if not bad.any():
        return failure, detached_given
    _given_detached(plan, regions, waves, case, bad, failure, detached_given)
    _wave_reasons(plan, regions, waves, bad, failure, "")
    rest = bad & (failure == "")
    if rest.any():
        idx = np.flatnonzero(rest)
        sub = _sub_case(case, idx)
        xt = x[:, idx] + np.nan_to_num(step[:, idx])
        r_t, w_t = _evaluate(plan, list(xt), sub, _take_constant(constant, idx))
        part = np.full(idx.size, "", dtype=object)
        _wave_reasons(plan, r_t, w_t, np.ones(idx.size, dtype=bool), part,
                      " to meet the conditions")
        failure[idx] = part
    rest = bad & (failure == "")
    failure[rest] = ("the conditions cannot be met by attached waves: the Newton "
                     "iteration did not converge (for example, the pressure-deflection "
                     "polars do not intersect).")
    return failure, detached_given


def _given_detached(plan, regions, waves, case, bad, failure, detached_given):
    """Waves given by turn or direction from a region that depends on no unknown, and
    detached there: the input itself is beyond the wave's limit."""
    from ..boundary.checks import format_value

    for link in plan.order:
        if link.given not in ("turn", "direction") or plan.deps[link.upstream]:
            continue
        turn, s = waves[link.name]
        hit = bad & (failure == "") & s.detached
        if not hit.any():
            continue
        M_up = regions[link.upstream].values.M
        g = take_cases(case["g"], hit)
        if plan.gas is not None:  # the limits of a thermally perfect gas at the region's T
            T_up = take_cases(case["T_in"], hit) * np.exp(regions[link.upstream].values.lnT[hit])
        if link.compression == "isentropic":
            if plan.gas is None:
                limit = prandtl_meyer_angle(M_up[hit], g)
            else:
                T0 = tp.stagnation_temperature(M_up[hit], T_up, plan.gas)
                limit = tp.prandtl_meyer_angle(M_up[hit], T0, plan.gas)
            what = ("the Prandtl–Meyer angle ν of its upstream region, the largest turn an "
                    "isentropic compression can make (to sonic flow)")
        else:
            limit = (detachment_angles(M_up[hit], g)[0] if plan.gas is None
                     else tpo.detachment_angles(M_up[hit], T_up, plan.gas)[0])
            what = "the detachment deflection θmax"
        for j, i in enumerate(np.flatnonzero(hit)):
            failure[i] = (f"wave {link.name!r} detached: its turn "
                          f"{format_value(abs(turn[i]), 'rad')} exceeds {what} = "
                          f"{format_value(limit[j], 'rad')} of its upstream region "
                          f"{link.upstream!r} (M = {format_value(M_up[i])}), so no attached "
                          + ("simple compression" if link.compression == "isentropic"
                             else "straight shock") + " exists there.")
            detached_given[i] = True


def _wave_reasons(plan, regions, waves, bad, failure, context):
    for link in plan.order:
        turn, s = waves[link.name]
        open_ = bad & (failure == "")
        with np.errstate(invalid="ignore"):
            subsonic = open_ & (regions[link.upstream].values.M < 1.0)
        failure[subsonic] = (f"region {link.upstream!r}, upstream of wave {link.name!r}, is "
                             f"subsonic{context}, so no oblique shock or fan can stand there.")
        if link.given == "pressure":
            lost = open_ & np.isnan(turn) & ~subsonic
            failure[lost] = (f"the pressure given for wave {link.name!r} cannot be reached: "
                             + ("it is above the normal-shock pressure of its upstream stream."
                                if link.compression == "shock" else
                                "an isentropic compression reaches at most the stagnation "
                                "pressure of its upstream stream at sonic speed."))
        open_ = bad & (failure == "")
        if link.compression == "isentropic":
            failure[open_ & s.detached] = (
                f"wave {link.name!r} cannot compress isentropically that far{context}: the "
                "turn exceeds the Prandtl–Meyer angle of its upstream flow (the flow would "
                "become subsonic).")
        else:
            failure[open_ & s.detached] = (
                f"wave {link.name!r} detached: the compression it needs{context} exceeds the "
                "maximum deflection of its upstream Mach number, so no attached straight "
                "shock exists there.")
        failure[open_ & s.vacuum & ~s.detached] = (
            f"wave {link.name!r} would expand its stream beyond the maximum Prandtl–Meyer "
            f"angle (to vacuum){context}.")
