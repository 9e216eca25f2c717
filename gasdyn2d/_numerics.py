"""Shared internal numerics: argument checking, broadcasting, NaN policy, units.

This is the one internal module the relation modules share. Nothing here is
public API; the public unit boundary of each relation is built from these
pieces so that every function checks, converts and reports in the same way.
"""

from __future__ import annotations

import math
import os
import sys
import warnings

import numpy as np
import pint

from .errors import InvalidInputError, ProbablyDegreesWarning

_PACKAGE_DIR = os.path.dirname(os.path.abspath(__file__))
_ERROR_MODES = ("raise", "nan")


# --------------------------------------------------------------------------- units


def is_quantity(value) -> bool:
    """True for a pint Quantity of any registry."""
    return isinstance(value, pint.Quantity)


def ureg():
    """pint's application registry (looked up on every call, never modified)."""
    return pint.get_application_registry()


_DIMENSIONS = {
    "dimensionless": "[]",
    "angle": "[]",
    "pressure": "[pressure]",
    "temperature": "[temperature]",
    "length": "[length]",
    "velocity": "[length] / [time]",
    "density": "[mass] / [length] ** 3",
    "gas_constant": "[length] ** 2 / [time] ** 2 / [temperature]",
}
_KIND_TEXT = {"dimensionless": "a dimensionless number", "angle": "an angle",
              "gas_constant": "a specific gas constant"}
_SI_UNITS = {
    "dimensionless": "dimensionless",
    "angle": "radian",
    "pressure": "pascal",
    "temperature": "kelvin",
    "length": "meter",
    "velocity": "meter / second",
    "density": "kilogram / meter ** 3",
    "gas_constant": "joule / kilogram / kelvin",
}


def to_si(value, name: str, kind: str, *, degrees_above: float = 2.0 * math.pi):
    """Convert ``value`` (number, sequence, ndarray or Quantity) to a float ndarray in SI.

    Returns ``(array, unit)`` where ``unit`` is the Quantity's unit (or ``None``
    for a plain number), so that angular results can be returned in the unit the
    caller used. A plain angle above ``degrees_above`` (2π, or a larger limit for
    angles that can legitimately exceed it, like ν at γ < 1.08) warns.
    """
    if is_quantity(value):
        try:
            magnitude = value.to(_SI_UNITS[kind]).magnitude
        except pint.DimensionalityError:
            raise InvalidInputError(
                f"{name} has units of {value.units:~} ({value.dimensionality}); "
                f"expected {_KIND_TEXT.get(kind, 'a ' + kind)} ({_DIMENSIONS[kind]}). "
                + (f"Give {name} as a plain number or a dimensionless Quantity."
                   if kind == "dimensionless" else
                   f"Give {name} in {_KIND_TEXT.get(kind, 'a ' + kind)} unit or as a plain "
                   f"number in {_SI_UNITS[kind]}.")
            ) from None
        unit = value.units
    else:
        magnitude = value
        unit = None
    try:
        array = np.asarray(magnitude, dtype=float)
    except (TypeError, ValueError):
        raise InvalidInputError(
            f"{name} must be a real number or an array of real numbers; got {value!r}."
        ) from None
    if kind == "angle" and unit is None:
        _warn_if_degrees(array, name, degrees_above)
    return array, unit


def _warn_if_degrees(array: np.ndarray, name: str, limit: float = 2.0 * math.pi) -> None:
    with np.errstate(invalid="ignore"):
        if not np.any(np.abs(array) > limit):  # the common case, in one pass
            return
        big = (np.abs(array) > limit) & np.isfinite(array)  # inf is no degree slip
    if np.any(big):
        first = array[big].flat[0]
        bound = "2π" if limit == 2.0 * math.pi else f"{limit:.4g} rad"
        warnings.warn(
            f"{name} = {first:g} is larger than {bound} as a plain number; plain angles are in "
            f"radians, so this was probably meant in degrees. Pass np.radians({first:g}) "
            f"or a Quantity such as {first:g} * ureg.deg.",
            ProbablyDegreesWarning,
            stacklevel=caller_stacklevel(),
        )


def _inside_package(filename: str) -> bool:
    """True for a file in the package folder or below it (not a sibling like "gasdyn2d_x")."""
    folder = os.path.dirname(os.path.abspath(filename))
    return folder == _PACKAGE_DIR or folder.startswith(_PACKAGE_DIR + os.sep)


def prandtl_meyer_degree_limit(gamma) -> float:
    """Largest plain ν [rad] not to be taken for degrees: 2π, or ν_max of the smallest γ
    given when that is larger (ν_max exceeds 2π for γ below about 1.08)."""
    with np.errstate(all="ignore"):
        g = np.asarray(gamma, dtype=float)
        g = g[np.isfinite(g) & (g > 1.0)] if g.ndim else (g if np.isfinite(g) and g > 1.0 else None)
        if g is None or np.size(g) == 0:
            return 2.0 * math.pi
        g_min = float(np.min(g))
    nu_max = 0.5 * math.pi * (math.sqrt((g_min + 1.0) / (g_min - 1.0)) - 1.0)
    return max(2.0 * math.pi, nu_max)


def caller_stacklevel() -> int:
    """The ``stacklevel`` that points a warning at the first frame outside gasdyn2d."""
    frame = sys._getframe(1)
    level = 1
    while frame is not None and _inside_package(frame.f_code.co_filename):
        frame = frame.f_back
        level += 1
    return level


def angle_out(value, unit):
    """Attach an angle unit to a radian result when the caller used Quantities."""
    if unit is None:
        return value
    return ureg().Quantity(value, "radian").to(unit)


def quantity_out(value, si_unit: str, unit):
    """Attach ``si_unit`` and convert to the caller's ``unit`` when they used Quantities."""
    if unit is None:
        return value
    return ureg().Quantity(value, si_unit).to(unit)


# ----------------------------------------------------------------- shapes and NaNs


def any_true(mask) -> bool:
    """``mask.any()`` without numpy's dispatch overhead for 0-d masks (the scalar-call case)."""
    mask = np.asarray(mask)
    return bool(mask) if mask.ndim == 0 else bool(mask.any())


def broadcast(**arrays):
    """Broadcast named arrays together, with an error that names them if they do not fit.

    Returns fresh float arrays (never views of the caller's data); equal shapes, the
    common case for scalar calls, skip the broadcasting machinery.
    """
    values = list(arrays.values())
    shape = np.shape(values[0])
    if all(np.shape(v) == shape for v in values[1:]):
        return [np.array(a, dtype=float) for a in values]
    try:
        shaped = np.broadcast_arrays(*arrays.values())
    except ValueError:
        shapes = ", ".join(f"{k} {np.shape(v)}" for k, v in arrays.items())
        raise InvalidInputError(
            f"the array arguments do not broadcast together: {shapes}. Give arrays "
            "whose shapes broadcast like numpy's (equal, 1, or missing dimensions)."
        ) from None
    return [np.array(a, dtype=float) for a in shaped]


def broadcast_cases(gamma, *arrays):
    """Plain-core broadcasting of case arrays, keeping a scalar γ a scalar.

    Returns the float arrays broadcast together (views) and γ: a 0-d γ is returned
    as it is, so that the γ-only terms of a relation cost nothing per case; an array
    γ is broadcast with the rest.
    """
    gamma = np.asarray(gamma, dtype=float)
    arrays = [np.asarray(a, dtype=float) for a in arrays]
    if gamma.ndim == 0:
        return (*np.broadcast_arrays(*arrays), gamma)
    return tuple(np.broadcast_arrays(*arrays, gamma))


def scalar_or_array(value):
    """Return a Python float for 0-d results, the ndarray otherwise."""
    value = np.asarray(value)
    if value.ndim == 0:
        return float(value)
    return value


def check_errors_mode(errors: str) -> None:
    if errors not in _ERROR_MODES:
        raise InvalidInputError(f"errors must be 'raise' or 'nan'; got {errors!r}.")


def check_branch(branch: str, allowed: tuple[str, ...]) -> None:
    if branch not in allowed:
        choices = " or ".join(repr(b) for b in allowed)
        raise InvalidInputError(f"branch must be {choices}; got {branch!r}.")


def reject(
    bad,
    array: np.ndarray,
    name: str,
    requirement: str,
    errors: str,
    *,
    limit=None,
    error_class=InvalidInputError,
    unit_text: str = "",
    hint: str = "",
) -> np.ndarray:
    """Report invalid elements of ``array`` (mask ``bad``; NaN elements never count).

    With ``errors="raise"`` an exception names the argument, the first offending
    value, how many elements failed, and the limit (``limit`` may be an array
    aligned with ``array``, in which case the limit of the first failing element is
    quoted). With ``errors="nan"`` the returned copy has NaN at those elements.
    """
    bad = np.asarray(bad, dtype=bool)
    if not any_true(bad):  # the common case: one pass, no NaN mask
        return array
    bad = bad & ~np.isnan(array)
    if not any_true(bad):
        return array
    if errors == "nan":
        out = np.array(array, dtype=float, copy=True)
        out[bad] = np.nan
        return out
    n_bad = int(np.count_nonzero(bad))
    index = np.argwhere(bad)[0] if array.ndim else ()
    first = array[tuple(index)]
    first_text = format_value(first, unit_text)
    where = f" at index {tuple(int(i) for i in index)}" if array.ndim else ""
    count = f" ({n_bad} of {array.size} elements fail)" if array.size > 1 else ""
    limit_text = ""
    if limit is not None:
        limit_value = np.broadcast_to(limit, array.shape)[tuple(index)]
        limit_text = f"; the limit there is {format_value(limit_value, unit_text)}"
        if format_value(limit_value, unit_text) == format_value(first, unit_text):
            # equal to 10 digits: show every digit so the reader sees which side it is on
            limit_text = f"; the limit there is {format_value(limit_value, unit_text, True)}"
            first_text = format_value(first, unit_text, True)
    message = (
        f"{name} must be {requirement}; got {first_text}{where}"
        f"{count}{limit_text}."
    )
    if hint:
        message += " " + hint
    message += " Pass errors='nan' to get NaN for invalid elements instead."
    raise error_class(message)


def format_value(value, unit_text: str = "", all_digits: bool = False) -> str:
    value = float(value)
    text = repr(value) if all_digits else f"{value:.10g}"
    if unit_text == "rad":
        return f"{text} rad ({math.degrees(value):.6g}°)"
    return f"{text}{(' ' + unit_text) if unit_text else ''}"


#: Relative slack for limits that a caller may compute by another formula: a value
#: this close to a limit (a few ulp) is taken as the limit itself, not rejected.
ROUNDING_SLACK = 1e-15


def clamp_to_limit(value, limit, side, slack=ROUNDING_SLACK):
    """Move values within ``slack`` (relative) beyond ``limit`` onto it (side "lower"/"upper")."""
    if np.ndim(value) == 0 and np.ndim(limit) == 0:  # scalar call: decide in plain floats
        v, lim = float(value), float(limit)
        if not (v < lim if side == "lower" else v > lim):
            return value
    with np.errstate(invalid="ignore"):
        if not np.any(value < limit if side == "lower" else value > limit):
            return value
        if side == "lower":
            near = (value < limit) & (value >= limit * (1.0 - slack))
        else:
            near = (value > limit) & (value <= limit * (1.0 + slack))
    return np.where(near, limit, value)


def check_gamma(gamma: np.ndarray, errors: str) -> np.ndarray:
    """γ must be a finite number above 1."""
    if gamma.ndim == 0 and 1.0 < float(gamma) < math.inf:  # the scalar call: nothing to check
        return gamma
    with np.errstate(invalid="ignore"):
        bad = ~(gamma > 1.0) | ~np.isfinite(gamma)
    return reject(bad, gamma, "gamma", "a finite ratio of specific heats > 1", errors)


def check_finite_at_least(array, name, lower, errors, *, what="", inclusive=True, allow_inf=False):
    """Reject elements below ``lower`` (or equal, if not inclusive) and non-finite ones."""
    if array.ndim == 0:  # the scalar call: an in-range value needs no mask or message
        v = float(array)
        if (v >= lower if inclusive else v > lower) and (allow_inf or v < math.inf):
            return array
    with np.errstate(invalid="ignore"):
        bad = (array < lower) if inclusive else (array <= lower)
        if not allow_inf:
            bad |= np.isinf(array)
    relation = ">=" if inclusive else ">"
    requirement = f"{relation} {lower:g}{(' (' + what + ')') if what else ''}"
    if not allow_inf:
        requirement = "finite and " + requirement
    return reject(bad, array, name, requirement, errors)


def check_mach_supersonic(M, name, errors):
    """M >= 1; a value a few ulp below 1 (say M1·sin β of a Mach wave) is taken as 1."""
    M = clamp_to_limit(M, 1.0, "lower")
    return check_finite_at_least(M, name, 1.0, errors, what="supersonic flow")


def check_nonnegative_mach(M, name, errors):
    return check_finite_at_least(M, name, 0.0, errors, what="a Mach number")


# ----------------------------------------------------------------- robust solver


#: Convergence tolerance of :func:`safeguarded_newton`, in ulp of the iterate.
NEWTON_ULPS = 4.0


def safeguarded_newton(func, x0, lower, upper, *, max_iter=60, rtol=None, atol=0.0,
                       increasing=None):
    """Vectorised Newton iteration kept inside a bracket, with bisection fallback.

    ``func(x)`` returns ``(residual, derivative)`` for an increasing or decreasing
    residual with a single root in ``[lower, upper]``. The bracket shrinks on every
    step (using the residual's sign at ``lower``, evaluated once unless the caller
    says the residual is ``increasing`` or not), so the iteration cannot leave it;
    the loop runs over iterations, never over elements. ``func`` is always called
    on the full array (it may close over full-shape parameters such as γ), but the
    bookkeeping and the early exit follow the still-active elements only.

    An element stops when any of these holds: its residual is exactly zero; its
    step is within ``rtol`` (default 4 ulp) of the iterate, or within ``atol``
    (absolute, for unknowns such as angles that may be near zero); its bracket has
    collapsed to that width; or a small Newton step (below 1e-8 relative) failed to
    reduce the residual, which means the iterates are flipping at rounding level.
    The iterate with the smallest residual seen is returned.
    """
    eps = np.finfo(float).eps
    rtol = NEWTON_ULPS * eps if rtol is None else rtol
    x_out = np.array(x0, dtype=float, copy=True)
    shape = x_out.shape
    x_out = x_out.reshape(-1)
    lo = np.broadcast_to(np.asarray(lower, dtype=float), shape).reshape(-1).copy()
    hi = np.broadcast_to(np.asarray(upper, dtype=float), shape).reshape(-1).copy()
    with np.errstate(all="ignore"):
        if increasing is None:
            f_lo, _ = func(lo.reshape(shape))
            sign_lo = np.sign(np.asarray(f_lo, dtype=float)).reshape(-1)
        else:
            sign_lo = np.full(lo.shape, -1.0 if increasing else 1.0)
        index = np.flatnonzero(np.isfinite(x_out))
        x, lo, hi, sign_lo = x_out[index], lo[index], hi[index], sign_lo[index]
        best_f = np.full_like(x, np.inf)
        small_step = np.zeros(x.shape, dtype=bool)
        for _ in range(max_iter):
            if index.size == 0:
                break
            f, df = func(_scatter(x, index, x_out, shape))
            f = np.asarray(f, dtype=float).reshape(-1)[index]
            df = np.asarray(df, dtype=float).reshape(-1)[index]
            abs_f = np.abs(f)
            stalled = small_step & ~(abs_f < best_f)  # rounding-level flip-flop: keep the best
            improved = abs_f < best_f
            x_out[index[improved]] = x[improved]
            best_f = np.where(improved, abs_f, best_f)
            same = np.sign(f) == sign_lo
            lo = np.where(same, x, lo)
            hi = np.where(same, hi, x)
            newton = f / df
            x_new = x - newton
            # a Newton step of a few ulp is convergence, even if it lands on the bracket end
            scale = np.maximum(np.abs(x), np.finfo(float).tiny)
            tiny_step = (np.abs(newton) <= np.maximum(rtol * scale, atol)) & np.isfinite(df)
            # (np.isfinite(df): a step f/inf = 0 is no convergence)
            outside = ~((x_new > lo) & (x_new < hi)) | ~np.isfinite(x_new)
            x_new = np.where(outside & ~tiny_step, 0.5 * (lo + hi), x_new)
            small_step = ~outside & (np.abs(newton) <= 1e-8 * scale) & np.isfinite(df)
            collapsed = np.abs(hi - lo) <= rtol * np.maximum(np.abs(lo), np.abs(hi))
            undefined = np.isnan(f)
            x_out[index[undefined]] = np.nan
            done = (f == 0) | stalled | collapsed | tiny_step | undefined
            keep = ~done
            x, lo, hi, sign_lo = x_new[keep], lo[keep], hi[keep], sign_lo[keep]
            best_f, small_step, index = best_f[keep], small_step[keep], index[keep]
        if index.size:
            x_out[index] = x
    return x_out.reshape(shape)


def regula_falsi(func, lo, hi, f_lo, f_hi, tol, max_iter):
    """Vectorised Illinois iteration for a root of f in each bracket [lo, hi].

    ``f_lo > 0 > f_hi`` (cases without such a bracket are NaN); ``func(index, x)``
    returns (f, extra) at x for the flat cases ``index``, so only the cases still
    moving are evaluated; a NaN f counts as the ``lo`` side (used where the
    function is undefined below the root). The Illinois rule halves the value kept
    at an end that survives twice in a row, which makes regula falsi superlinear.
    Returns the last x and ``extra`` there (NaN where the bracket was invalid).
    """
    shape = np.shape(lo)
    lo, hi, f_lo, f_hi = (np.array(v, dtype=float).reshape(-1) for v in (lo, hi, f_lo, f_hi))
    ok = (f_lo > 0) & (f_hi < 0)
    x = np.where(ok, lo, np.nan)
    extra = np.full(x.shape, np.nan)
    side = np.zeros(x.shape, dtype=int)
    active = np.flatnonzero(ok)
    for _ in range(max_iter):
        if active.size == 0:
            break
        i = active
        new = (lo[i] * f_hi[i] - hi[i] * f_lo[i]) / (f_hi[i] - f_lo[i])
        f_new, extra_new = (np.broadcast_to(np.asarray(v, dtype=float), new.shape)
                            for v in func(i, new))
        moved = np.abs(new - x[i])
        x[i], extra[i] = new, extra_new
        positive = (f_new > 0) | np.isnan(f_new)
        f_new = np.where(np.isnan(f_new), f_lo[i], f_new)
        f_hi[i] = np.where(positive & (side[i] == 1), 0.5 * f_hi[i], f_hi[i])
        f_lo[i] = np.where(~positive & (side[i] == -1), 0.5 * f_lo[i], f_lo[i])
        lo[i], f_lo[i] = np.where(positive, new, lo[i]), np.where(positive, f_new, f_lo[i])
        hi[i], f_hi[i] = np.where(positive, hi[i], new), np.where(positive, f_hi[i], f_new)
        side[i] = np.where(positive, 1, -1)
        done = (moved <= tol) | (hi[i] - lo[i] <= tol) | (f_new == 0)
        active = active[~done]
    return x.reshape(shape), extra.reshape(shape)


def _scatter(values, index, template, shape):
    """The full-shape argument for ``func``: ``template`` with ``values`` at ``index``.

    Elements that are no longer iterated keep their final value, so ``func`` sees a
    full array (it may close over full-shape parameters such as γ) but only the active
    elements' results are used.
    """
    full = template.copy()
    full[index] = values
    return full.reshape(shape)


def output_angle_unit(angle_unit, *other_units):
    """Unit for angular results: the caller's angle unit, radian if any other
    argument was a Quantity, or ``None`` (plain radians) when none was."""
    if angle_unit is not None and str(angle_unit) != "dimensionless":
        return angle_unit
    if angle_unit is not None or any(u is not None for u in other_units):
        return ureg().radian
    return None


def exactly_one(names_values: dict, function: str):
    """Return the (name, value) of the single non-None keyword, or raise."""
    given = [(k, v) for k, v in names_values.items() if v is not None]
    if len(given) != 1:
        names = ", ".join(names_values)
        got = ", ".join(k for k, _ in given) or "none"
        raise InvalidInputError(
            f"{function} takes exactly one of {names}; got {got}."
        )
    return given[0]


#: Elements per block in :func:`chunked`: small enough that a block's temporaries stay in
#: cache (measured: 1.7x faster than whole-array passes at 10^6 elements), large enough
#: that the Python loop over blocks costs nothing.
CHUNK_SIZE = 16384


def chunked(func, *arrays, size=CHUNK_SIZE):
    """Apply an elementwise plain-core ``func`` to equal-shape arrays block by block.

    ``func`` takes 1-d arrays and returns an array or a tuple (NamedTuple) of
    arrays of the same length; the results are reassembled in the input shape.
    Scalars (0-d) are passed to every block unchanged. Small inputs go straight
    through. The loop runs over blocks, never elements.
    """
    shape = np.shape(arrays[0])
    n = int(np.prod(shape))
    if n <= size:
        return func(*arrays)
    flat = [a if np.ndim(a) == 0 else np.ascontiguousarray(a).reshape(-1) for a in arrays]
    outputs = None
    for start in range(0, n, size):
        result = func(*(a if np.ndim(a) == 0 else a[start:start + size] for a in flat))
        parts = result if isinstance(result, tuple) else (result,)
        if outputs is None:
            outputs = [np.empty(n, dtype=np.result_type(p)) for p in parts]
        for out, part in zip(outputs, parts):
            out[start:start + size] = part
    outputs = [o.reshape(shape) for o in outputs]
    if not isinstance(result, tuple):
        return outputs[0]
    return type(result)(*outputs) if hasattr(result, "_fields") else tuple(outputs)
