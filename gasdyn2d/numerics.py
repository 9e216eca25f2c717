"""Shared numerics of the plain cores: a safeguarded vectorised Newton solver, block
evaluation in cache-sized chunks, and the broadcasting of case arrays.

Used by every floor; nothing here knows about units, containers or messages (that
is the boundary's job, :mod:`gasdyn2d.boundary`).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["CHUNK_SIZE", "HUGE_MACH", "NEWTON_ULPS", "any_true", "broadcast_cases", "chunked",
           "safeguarded_newton", "safeguarded_newton_scalar", "regula_falsi", "plain_scalars", "fsqrt", "flog",
           "flog1p", "fexp", "fexpm1", "fdiv", "fclip", "nan_where_nan", "clip_below"]


def any_true(mask) -> bool:
    """``mask.any()`` without numpy's dispatch overhead for 0-d masks (the scalar-call case)."""
    mask = np.asarray(mask)
    return bool(mask) if mask.ndim == 0 else bool(mask.any())


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


def _scatter(values, index, template, shape):
    """The full-shape argument for ``func``: ``template`` with ``values`` at ``index``.

    Elements that are no longer iterated keep their final value, so ``func`` sees a
    full array (it may close over full-shape parameters such as γ) but only the active
    elements' results are used.
    """
    full = template.copy()
    full[index] = values
    return full.reshape(shape)


#: Elements per block in :func:`chunked`: small enough that a block's temporaries stay in
#: cache (measured: 1.7x faster than whole-array passes at 10^6 elements), large enough
#: that the Python loop over blocks costs nothing.
CHUNK_SIZE = 16384


def chunked(func, *arrays, size=CHUNK_SIZE):
    """Apply an elementwise plain-core ``func`` to equal-shape arrays block by block.

    ``func`` takes 1-d arrays and returns an array or a tuple (NamedTuple) of
    arrays of the same length; the results are reassembled in the input shape.
    A result may have trailing axes beyond the block (one entry per panel, say):
    they are kept after the input shape.
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
            outputs = [np.empty((n, *np.shape(p)[1:]), dtype=np.result_type(p)) for p in parts]
        for out, part in zip(outputs, parts):
            out[start:start + size] = part
    outputs = [o.reshape(shape + o.shape[1:]) for o in outputs]
    if not isinstance(result, tuple):
        return outputs[0]
    return type(result)(*outputs) if hasattr(result, "_fields") else tuple(outputs)


def nan_where_nan(reference, value):
    """``value`` with NaN wherever ``reference`` is NaN (floats or arrays; ``reference``
    may be a float beside an array ``value``)."""
    if type(reference) is float:
        return value if reference == reference else value * np.nan
    mask = np.isnan(reference)
    if not mask.any():
        return value
    return np.where(mask, np.nan, value)


def clip_below(value, lower):
    """max(value, lower) elementwise (floats or arrays; NaN stays NaN)."""
    if type(value) is float:
        return value if not (value < lower) else lower
    return np.maximum(value, lower)


# ----------------------------------------------------------------- scalar fast forms
#
# Each relation's plain core has a scalar form on the math module beside its array
# form (same algorithm, floats in and out). The array form dispatches to it when every
# argument is a plain number: a Python float or int, or an np.float64 (a float
# subclass, taken as the float it is). The helpers below give the math module numpy's
# answers where it would raise instead: NaN for a domain error, ±inf for a division
# by zero or an overflow.

_SCALAR_TYPES = frozenset((float, int, np.float64))

#: Above this Mach number M² may overflow: the relations switch to their large-M forms.
HUGE_MACH = 1e150
NAN = math.nan
INF = math.inf
_EPS = float(np.finfo(float).eps)
_TINY = float(np.finfo(float).tiny)


def plain_scalars(*args) -> bool:
    """True when every argument is a plain float, int or np.float64 (not bool, not 0-d)."""
    for arg in args:
        if type(arg) not in _SCALAR_TYPES:
            return False
    return True


def fsqrt(x):
    """math.sqrt with numpy's NaN below 0."""
    return math.sqrt(x) if x >= 0.0 else NAN


def flog(x):
    """math.log with numpy's -inf at 0 and NaN below."""
    if x > 0.0:
        return math.log(x)
    return -INF if x == 0.0 else NAN


def flog1p(x):
    """math.log1p with numpy's -inf at -1 and NaN below."""
    if x > -1.0:
        return math.log1p(x)
    return -INF if x == -1.0 else NAN


def fexp(x):
    """math.exp with numpy's inf on overflow."""
    try:
        return math.exp(x)
    except OverflowError:
        return INF


def fexpm1(x):
    """math.expm1 with numpy's inf on overflow."""
    try:
        return math.expm1(x)
    except OverflowError:
        return INF


def fdiv(a, b):
    """a / b with numpy's ±inf (or NaN for 0/0 or NaN) at b = 0."""
    if b != 0.0:
        return a / b
    if a != a or a == 0.0:
        return NAN
    return math.copysign(INF, a) * math.copysign(1.0, b)


def fclip(x, lower, upper):
    """np.clip for floats (NaN stays NaN)."""
    return lower if x < lower else (upper if x > upper else x)


def _sign(value):
    """np.sign for a float (NaN stays NaN)."""
    return NAN if value != value else float((value > 0.0) - (value < 0.0))


def safeguarded_newton_scalar(func, x0, lower, upper, *, max_iter=60, rtol=None, atol=0.0,
                              increasing=None):
    """Scalar form of :func:`safeguarded_newton` (floats; the same steps and stops)."""
    rtol = NEWTON_ULPS * _EPS if rtol is None else rtol
    lo, hi = float(lower), float(upper)
    if increasing is None:
        sign_lo = _sign(func(lo)[0])
    else:
        sign_lo = -1.0 if increasing else 1.0
    x = x_out = float(x0)
    if not math.isfinite(x):
        return x
    best_f = INF
    small_step = False
    for _ in range(max_iter):
        f, df = func(x)
        abs_f = abs(f)
        stalled = small_step and not abs_f < best_f
        if abs_f < best_f:
            x_out, best_f = x, abs_f
        if _sign(f) == sign_lo:
            lo = x
        else:
            hi = x
        newton = fdiv(f, df)
        x_new = x - newton
        scale = max(abs(x), _TINY)
        finite_df = math.isfinite(df)
        tiny_step = abs(newton) <= max(rtol * scale, atol) and finite_df
        outside = not (lo < x_new < hi) or not math.isfinite(x_new)
        if outside and not tiny_step:
            x_new = 0.5 * (lo + hi)
        small_step = not outside and abs(newton) <= 1e-8 * scale and finite_df
        collapsed = abs(hi - lo) <= rtol * max(abs(lo), abs(hi))
        if f != f:
            return NAN
        if f == 0 or stalled or collapsed or tiny_step:
            return x_out
        x = x_new
    return x


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
