"""Shared input checks and result shaping of the ready wave problems.

Private to :mod:`gasdyn2d.patterns.reflections` and :mod:`gasdyn2d.patterns.interactions`,
which both state their problems as region graphs and report per-case failures
the same way.
"""

from __future__ import annotations


import numpy as np

from .. import _numerics as nx
from ..errors import DetachedShockError, NoSolutionError
from ..relations.oblique_shocks import detachment_angles


# ---------------------------------------------------------------- input checks


def _inputs(errors, gamma, M1, failure=None, **angles):
    """Convert and check (M1, angles..., gamma); returns arrays, angle unit, shape.

    ``failure``, a list, receives a per-case array of reasons for inputs
    turned to NaN under ``errors="nan"`` ("" elsewhere).
    """
    nx.check_errors_mode(errors)
    M, _ = nx.to_si(M1, "M1", "dimensionless")
    g, _ = nx.to_si(gamma, "gamma", "dimensionless")
    converted, units = {}, []
    for name, value in angles.items():
        converted[name], unit = nx.to_si(value, name, "angle")
        units.append(unit)
    arrays = nx.broadcast(M1=M, gamma=g, **converted)
    M0, g0, rest = arrays[0], arrays[1], arrays[2:]
    M = nx.check_mach_supersonic(M0, "M1", errors)
    g = nx.check_gamma(g0, errors)
    if failure is not None:
        failure.append(_input_reasons(M0, M, g0, g))
    unit = nx.output_angle_unit(next((u for u in units if u is not None), None))
    return M, g, rest, unit


def _input_reasons(M0, M, g0, g):
    """Reasons for M1 and gamma turned to NaN by their checks ("" elsewhere)."""
    reasons = np.full(M.shape, "", dtype=object)
    _note(reasons, np.isnan(M) & ~np.isnan(M0), "M1 = {} is not supersonic (M1 >= 1 needed).",
          M0)
    _note(reasons, np.isnan(g) & ~np.isnan(g0), "gamma = {} is not a finite ratio of specific "
          "heats > 1.", g0)
    return reasons


def _note(reasons, mask, template, *values):
    """Write ``template`` filled with the case's values where ``mask`` and no reason yet."""
    flat = reasons.reshape(-1)  # a view: writes land in ``reasons``
    mask = np.broadcast_to(mask, reasons.shape).reshape(-1) & (flat == "")
    values = [np.broadcast_to(v, reasons.shape).reshape(-1) for v in values]
    for i in np.flatnonzero(mask):
        flat[i] = template.format(*(_show(v[i]) for v in values))


def _show(value):
    return f"{float(value):.6g}"


def _check_shock_turn(theta, M, g, name, errors, upstream="M1", wave="incident shock",
                      failure=None, free_stream=None, shape=None):
    """Reject negative and detached turns (flat arrays, messages indexed in ``shape``)."""
    shape = theta.shape if shape is None else shape
    theta_max, _ = detachment_angles(M, g)
    with np.errstate(invalid="ignore"):
        if failure is not None:
            deg = np.degrees
            _note(failure, theta < 0, f"{name} = {{}}° is negative: the {wave} needs a "
                  "compression (>= 0).", deg(theta))
            _note(failure, theta > theta_max, f"the {wave} detached: {name} = {{}}° exceeds "
                  f"the detachment deflection θmax({upstream} = {{}}) = {{}}°, so no attached "
                  "shock exists.", deg(theta), M, deg(theta_max))
        theta = nx.reject((theta < 0).reshape(shape), theta.reshape(shape), name,
                          ">= 0 (a compression)", errors).reshape(-1)
        detached = theta > theta_max
        where = ""
        if np.any(detached):
            i = int(np.flatnonzero(detached)[0])
            stream = f"M1 = {_show(M.flat[i])}" if free_stream is None else (
                f"M1 = {_show(free_stream.flat[i])}, {upstream} = {_show(M.flat[i])}")
            where = f" The {wave} detaches there ({stream})."
        return nx.reject(detached.reshape(shape), theta.reshape(shape), name,
                         f"at most the detachment deflection θmax({upstream})", errors,
                         limit=theta_max.reshape(shape), unit_text="rad",
                         error_class=DetachedShockError,
                         hint="No attached shock exists beyond it." + where).reshape(-1)


def _finish(value, unit=None, angle=False):
    value = nx.scalar_or_array(value)
    return nx.angle_out(value, unit) if angle else value


def _labels(array):
    array = np.asarray(array)
    return str(array) if array.ndim == 0 else array


def _collect_failures(failure, solution):
    """Per-case reasons: the input reasons, then the graph's where it failed ("" if solved)."""
    graph = np.asarray(solution.failure, dtype=object).reshape(-1)
    out = failure.copy()
    out[out == ""] = graph[out == ""]
    return out


def _raise_or_label(failure, shape, errors, what, inputs):
    """Raise NoSolutionError for the first failed case, or return the reasons shaped.

    ``inputs`` maps input names to flat arrays (angles [rad], shown in degrees).
    """
    bad = failure != ""
    if errors == "raise" and np.any(bad):
        first = int(np.flatnonzero(bad)[0])
        index = tuple(int(i) for i in np.unravel_index(first, shape))
        where = f" at index {index}" if shape else ""
        count = f" ({int(np.count_nonzero(bad))} of {bad.size} cases)" if bad.size > 1 else ""
        case = ", ".join(f"{k} = {_show(v[first])}" + ("" if k in ("M1", "p2_p1") else "°")
                         for k, v in inputs.items())
        raise NoSolutionError(f"{what} has no solution{where}{count}, for {case}: "
                              f"{failure[first]} Pass errors='nan' to get NaN for such "
                              "cases, with the reason in the result's failure field.")
    return _labels(failure.astype(str).reshape(shape))


# ---------------------------------------------------------------- wall reflection


# ---------------------------------------------------------------- helpers for graph results


def _flat_inputs(errors, gamma, M1, **angles):
    """Flat (M, g, angles, unit, shape, failure); ``failure`` holds the input reasons."""
    failure = []
    M, g, rest, unit = _inputs(errors, gamma, M1, failure, **angles)
    shape = M.shape
    return (M.reshape(-1), g.reshape(-1), [a.reshape(-1) for a in rest], unit, shape,
            failure[0].reshape(-1))


def _shaped(shape, unit):
    def out(value, angular=False):
        return _finish(np.reshape(np.asarray(value, dtype=float), shape), unit, angular)
    return out


def _wave_kind(solution, name, shape):
    return _labels(np.reshape(np.asarray(solution.wave(name).kind), shape))
