"""Argument checks with one message format and one NaN policy, for floats and arrays alike.

Every check takes the value as a Python float (the scalar fast path) or as a
float ndarray (a batch, or one block of a dask array) and either returns it, or
returns it with NaN at the invalid elements (``errors="nan"``), or raises an
:class:`~gasdyn2d.errors.InvalidInputError` (or a subclass) whose message names the
argument, the first offending value, where it is and how many elements fail, the
limit, and what to do. NaN elements never count as invalid: NaN in gives NaN out.

The scalar and the array form of each check sit side by side in the same
function, so a change to one is seen in the other.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InvalidInputError

__all__ = ["Check", "ROUNDING_SLACK", "choice", "errors_mode", "format_value", "one_of"]

_NAN = math.nan
_INF = math.inf

#: Relative slack for limits that a caller may compute by another formula: a value this
#: close to a limit (a few ulp) is taken as the limit itself, not rejected.
ROUNDING_SLACK = 1e-15


def errors_mode(errors) -> bool:
    """True for ``errors="nan"``, False for ``"raise"``; anything else is refused."""
    if errors == "raise":
        return False
    if errors == "nan":
        return True
    raise InvalidInputError(f"errors must be 'raise' or 'nan'; got {errors!r}.")


def choice(name: str, value, allowed: dict):
    """The entry of ``allowed`` for the option ``value`` (a string), or a clear error."""
    if isinstance(value, str) and value in allowed:
        return allowed[value]
    choices = " or ".join(repr(key) for key in allowed)
    raise InvalidInputError(f"{name} must be {choices}; got {value!r}.")


def one_of(function: str, **named):
    """The ``(name, value)`` of the single keyword that is not None, or a clear error."""
    given = [(key, value) for key, value in named.items() if value is not None]
    if len(given) != 1:
        names = ", ".join(named)
        got = ", ".join(key for key, _ in given) or "none"
        raise InvalidInputError(f"{function} takes exactly one of {names}; got {got}.")
    return given[0]


def format_value(value, unit_text: str = "", all_digits: bool = False) -> str:
    """A value for a message: 10 significant digits (or all), with degrees beside radians."""
    value = float(value)
    text = repr(value) if all_digits else f"{value:.10g}"
    if unit_text == "rad":
        return f"{text} rad ({math.degrees(value):.6g}°)"
    return f"{text}{(' ' + unit_text) if unit_text else ''}"


class Check:
    """The NaN policy of one call: raise on invalid elements, or NaN them.

    Parameters
    ----------
    nan : bool
        True for ``errors="nan"``.
    in_block : bool
        True when the values are one block of a lazily computed (dask) array, so
        that an index would be relative to the block: messages then say so.
    """

    __slots__ = ("nan", "in_block")

    def __init__(self, nan: bool = False, in_block: bool = False):
        self.nan = nan
        self.in_block = in_block

    # ------------------------------------------------------------ the one mechanism
    def reject(self, bad, value, name: str, requirement: str, *, limit=None,
               error_class=InvalidInputError, unit_text: str = "", hint: str = ""):
        """``value`` with the elements where ``bad`` holds handled by the policy.

        ``bad`` is a bool (scalar form) or a bool array aligned with ``value``;
        ``limit`` (a float or an array aligned with ``value``) is quoted in the
        message at the first failing element.
        """
        if type(value) is float:  # the scalar form
            if not bad or value != value:
                return value
            if self.nan:
                return _NAN
            raise error_class(self._message(value, name, requirement, limit, unit_text, hint,
                                            where="", count=""))
        if not bad.any():  # the common case: one pass, no NaN mask
            return value
        bad = bad & ~np.isnan(value)
        if not bad.any():
            return value
        if self.nan:
            out = np.array(value, dtype=float, copy=True)
            out[bad] = _NAN
            return out
        index = tuple(int(i) for i in np.argwhere(bad)[0]) if value.ndim else ()
        first = value[index]
        if limit is not None:
            limit = np.broadcast_to(limit, value.shape)[index]
        n_bad = int(np.count_nonzero(bad))
        count = f" ({n_bad} of {value.size} elements fail)" if value.size > 1 else ""
        where = ""
        if value.size > 1:
            where = f" at index {index}" + (" of a dask block" if self.in_block else "")
        raise error_class(self._message(first, name, requirement, limit, unit_text, hint,
                                        where, count))

    def _message(self, first, name, requirement, limit, unit_text, hint, where, count):
        first_text = format_value(first, unit_text)
        limit_text = ""
        if limit is not None:
            limit_text = format_value(limit, unit_text)
            if limit_text == first_text:  # equal to 10 digits: show every digit
                limit_text = format_value(limit, unit_text, True)
                first_text = format_value(first, unit_text, True)
            limit_text = f"; the limit there is {limit_text}"
        message = f"{name} must be {requirement}; got {first_text}{where}{count}{limit_text}."
        if hint:
            message += " " + hint
        return message + " Pass errors='nan' to get NaN for invalid elements instead."

    # ------------------------------------------------------------ common checks
    def at_least(self, value, name: str, lower: float, *, inclusive: bool = True,
                 allow_inf: bool = False, what: str = "", unit_text: str = ""):
        """Elements below ``lower`` (or equal, if not inclusive), and infinite ones, fail."""
        if type(value) is float:
            if (value >= lower if inclusive else value > lower) and (allow_inf or value < _INF):
                return value
            bad = (value < lower if inclusive else value <= lower) or (
                not allow_inf and value == _INF)
        else:
            with np.errstate(invalid="ignore"):
                bad = (value < lower) if inclusive else (value <= lower)
                if not allow_inf:
                    bad |= np.isinf(value)
        relation = ">=" if inclusive else ">"
        requirement = f"{relation} {lower:g}{(' ' + unit_text) if unit_text else ''}"
        requirement += f" ({what})" if what else ""
        if not allow_inf:
            requirement = "finite and " + requirement
        return self.reject(bad, value, name, requirement, unit_text=unit_text)

    def within(self, value, name: str, lower, upper, requirement: str, *,
               lower_open: bool = False, upper_open: bool = False, limit=None,
               error_class=InvalidInputError, unit_text: str = "", hint: str = ""):
        """Elements outside [lower, upper] (ends open where asked) fail; ``lower`` and
        ``upper`` may be arrays aligned with ``value``."""
        if type(value) is float:
            bad = ((value <= lower) if lower_open else (value < lower)) or (
                (value >= upper) if upper_open else (value > upper))
        else:
            with np.errstate(invalid="ignore"):
                bad = (value <= lower) if lower_open else (value < lower)
                bad |= (value >= upper) if upper_open else (value > upper)
        return self.reject(bad, value, name, requirement, limit=limit,
                           error_class=error_class, unit_text=unit_text, hint=hint)

    def positive(self, value, name: str, unit_text: str = "", what: str = ""):
        """A finite value > 0 (pressures, temperatures, lengths)."""
        return self.at_least(value, name, 0.0, inclusive=False, what=what, unit_text=unit_text)

    def finite(self, value, name: str, unit_text: str = ""):
        """Any finite value (directions, coordinates)."""
        if type(value) is float:
            bad = value in (_INF, -_INF)
        else:
            bad = np.isinf(value)
        return self.reject(bad, value, name, "finite", unit_text=unit_text)

    def gamma(self, value):
        """γ must be a finite number above 1."""
        if type(value) is float:
            if 1.0 < value < _INF:
                return value
            bad = not (value > 1.0) or value == _INF
        else:
            with np.errstate(invalid="ignore"):
                bad = ~(value > 1.0) | np.isinf(value)
        return self.reject(bad, value, "gamma", "a finite ratio of specific heats > 1")

    def supersonic_mach(self, value, name: str):
        """M >= 1; a value a few ulp below 1 (say M1·sin β of a Mach wave) is taken as 1."""
        value = clamp_to_limit(value, 1.0, "lower")
        return self.at_least(value, name, 1.0, what="supersonic flow")

    def mach(self, value, name: str):
        """A finite Mach number >= 0."""
        return self.at_least(value, name, 0.0, what="a Mach number")


def clamp_to_limit(value, limit, side: str, slack: float = ROUNDING_SLACK):
    """Values within ``slack`` (relative) beyond ``limit`` moved onto it (side "lower"/"upper").

    A limit that the caller computed by another formula may differ from ours in
    the last place; such a value is the limit itself, not an error.
    """
    if type(value) is float:
        limit = float(limit)
        if side == "lower":
            return limit if limit * (1.0 - slack) <= value < limit else value
        return limit if limit < value <= limit * (1.0 + slack) else value
    with np.errstate(invalid="ignore"):
        if side == "lower":
            near = (value < limit) & (value >= limit * (1.0 - slack))
        else:
            near = (value > limit) & (value <= limit * (1.0 + slack))
    if not near.any():
        return value
    return np.where(near, limit, value)
