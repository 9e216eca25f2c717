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
from .numerics import (  # noqa: F401  (re-exported while modules move to the boundary)
    CHUNK_SIZE, NEWTON_ULPS, any_true, broadcast_cases, chunked, safeguarded_newton)

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


