"""Shared numerics of the plain cores: a safeguarded vectorised Newton solver, block
evaluation in cache-sized chunks, and the broadcasting of case arrays.

Used by every floor; nothing here knows about units, containers or messages (that
is the boundary's job, :mod:`gasdyn2d.boundary`).
"""

from __future__ import annotations

import numpy as np

__all__ = ["CHUNK_SIZE", "NEWTON_ULPS", "any_true", "broadcast_cases", "chunked",
           "safeguarded_newton"]


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
