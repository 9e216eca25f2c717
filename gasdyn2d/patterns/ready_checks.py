"""Shared input checks, per-case reasons and solves of the ready wave problems.

Used by :mod:`gasdyn2d.patterns.reflections` and :mod:`gasdyn2d.patterns.interactions`,
whose checked cores all work the same way: check the inputs with the call's
:class:`~gasdyn2d.boundary.checks.Check` while noting a reason for every case an
invalid input turns to NaN (:class:`CaseReasons`), solve their region graph with
:func:`solve_ready` (floats for one case, flat arrays for a batch), and raise one
:class:`~gasdyn2d.errors.NoSolutionError` naming the first failed case, or return
the reasons per case (:meth:`CaseReasons.finish`).
"""

from __future__ import annotations

import math

import numpy as np

from ..boundary.checks import Check
from ..errors import DetachedShockError, NoSolutionError
from ..relations.oblique_shocks import detachment_angles
from .solver import solve_cases

__all__ = ["CaseReasons", "check_mach_and_gamma", "check_shock_turn", "flat", "scalar_of",
           "shaped", "solve_ready", "show"]

_NAN_CHECK = Check(True)


def show(value) -> str:
    """A value of a reason or message: 6 significant digits."""
    return f"{float(value):.6g}"


def flat(value):
    """A case value for the solver: a number is a float, an array becomes flat."""
    if type(value) is float:
        return value
    if np.ndim(value) == 0:
        return float(value)
    return np.ascontiguousarray(value, dtype=float).reshape(-1)


def shaped(value, shape):
    """A solver value back in the case shape (a float for one case)."""
    if type(value) is float:
        return value
    if not shape:
        return float(np.asarray(value).reshape(-1)[0]) if np.ndim(value) else float(value)
    return np.reshape(value, shape)


def scalar_of(value):
    """A plain-core result as a float when the call is scalar (0-d arrays unwrapped)."""
    return float(value) if np.ndim(value) == 0 else value


class CaseReasons:
    """Why each case of a ready function has no solution ("" where solved or NaN in)."""

    def __init__(self, like):
        self.scalar = type(like) is float
        self.shape = np.shape(like)
        self.text = "" if self.scalar else np.full(self.shape, "", dtype=object)

    def note(self, bad, template, *values):
        """Write ``template`` filled with the case's values where ``bad`` and no reason yet
        (NaN values never count as bad)."""
        if bad is False:
            return
        if self.scalar:
            if bad and self.text == "" and not any(v != v for v in values[:1]):
                self.text = template.format(*(show(v) for v in values))
            return
        bad = np.broadcast_to(bad, self.shape)
        if values:
            with np.errstate(invalid="ignore"):
                bad = bad & ~np.isnan(np.broadcast_to(values[0], self.shape))
        open_ = bad & (self.text == "")
        if not open_.any():
            return
        arrays = [np.broadcast_to(v, self.shape) for v in values]
        for index in zip(*np.nonzero(open_)):
            self.text[index] = template.format(*(show(a[index]) for a in arrays))

    def add(self, failure):
        """Take the solver's reasons (flat or shaped) where no input reason was noted."""
        if self.scalar:
            if self.text == "":
                self.text = str(np.asarray(failure).reshape(-1)[0]) if np.ndim(failure) else \
                    str(failure)
            return
        failure = np.reshape(np.asarray(failure, dtype=object), self.shape)
        empty = self.text == ""
        self.text[empty] = failure[empty]

    def finish(self, check, what, inputs):
        """Raise NoSolutionError for the first failed case, or return the reasons.

        ``inputs`` maps input names to values of the case shape (angles [rad], shown
        in degrees unless the name is M1 or p2_p1).
        """
        if self.scalar:
            if not self.text:
                return ""
            if not check.nan:
                case = ", ".join(_input_text(k, v) for k, v in inputs.items())
                raise NoSolutionError(f"{what} has no solution, for {case}: {self.text} Pass "
                                      "errors='nan' to get NaN for such cases, with the reason "
                                      "in the result's failure field.")
            return self.text
        bad = self.text != ""
        if not check.nan and bad.any():
            index = tuple(int(i) for i in np.argwhere(bad)[0])
            where = f" at index {index}" if self.shape else ""
            if where and getattr(check, "in_block", False):
                where += " of a dask block"
            count = f" ({int(np.count_nonzero(bad))} of {bad.size} cases)" if bad.size > 1 else ""
            case = ", ".join(_input_text(k, np.broadcast_to(v, self.shape)[index])
                             for k, v in inputs.items())
            raise NoSolutionError(f"{what} has no solution{where}{count}, for {case}: "
                                  f"{self.text[index]} Pass errors='nan' to get NaN for such "
                                  "cases, with the reason in the result's failure field.")
        return self.text.astype(str)


def _input_text(name, value):
    if name in ("M1", "p2_p1"):
        return f"{name} = {show(value)}"
    return f"{name} = {show(math.degrees(float(value)))}°"


def check_mach_and_gamma(M, gamma, check, reasons, name="M1"):
    """M1 >= 1 and γ > 1, by the call's policy, with a reason for each case turned to NaN."""
    if type(M) is float and type(gamma) is float and 1.0 <= M < math.inf and \
            1.0 < gamma < math.inf:
        return M, gamma  # one valid case: nothing to check or note
    with np.errstate(invalid="ignore"):
        reasons.note(~(M >= 1.0) | (M == math.inf) if not reasons.scalar
                     else not (1.0 <= M < math.inf),
                     f"{name} = {{}} is not supersonic ({name} >= 1 needed).", M)
        reasons.note(~(gamma > 1.0) | (gamma == math.inf) if type(gamma) is not float
                     else not (1.0 < gamma < math.inf),
                     "gamma = {} is not a finite ratio of specific heats > 1.", gamma)
    M = check.supersonic_mach(M, name)
    gamma = check.gamma(gamma)
    return M, gamma


def check_shock_turn(theta, M, gamma, name, check, reasons, *, upstream="M1",
                     wave="incident shock", free_stream=None, theta_max=None):
    """Reject negative and detached turns of a given shock (DetachedShockError beyond θmax).

    The message of a detached case names the wave and the stream it detaches in
    (``free_stream`` is the free-stream Mach number when ``M`` is another region's).
    ``theta_max`` may be given (a thermally perfect gas's, at the stream's temperature);
    by default it is the perfect gas's of ``gamma``.
    """
    if theta_max is None:
        theta_max = scalar_of(detachment_angles(M, gamma)[0])
    if type(theta) is float and 0.0 <= theta <= theta_max:
        return theta  # one valid case: nothing to note
    with np.errstate(invalid="ignore"):
        negative = theta < 0
        reasons.note(negative, f"{name} = {{}}° is negative: the {wave} needs a compression "
                     "(>= 0).", np.degrees(theta))
        reasons.note(theta > theta_max, f"the {wave} detached: {name} = {{}}° exceeds the "
                     f"detachment deflection θmax({upstream} = {{}}) = {{}}°, so no attached "
                     "shock exists.", np.degrees(theta), M, np.degrees(theta_max))
        theta = check.reject(negative, theta, name, ">= 0 (a compression)")
        detached = theta > theta_max
    where = ""
    if np.any(detached) and not check.nan:
        if reasons.scalar:
            M_here, stream = M, free_stream
        else:
            index = tuple(int(i) for i in np.argwhere(np.broadcast_to(detached, reasons.shape))[0])
            M_here = np.broadcast_to(M, reasons.shape)[index]
            stream = None if free_stream is None else np.broadcast_to(
                free_stream, reasons.shape)[index]
        text = (f"M1 = {show(M_here)}" if stream is None else
                f"M1 = {show(stream)}, {upstream} = {show(M_here)}")
        where = f" The {wave} detaches there ({text})."
    return check.reject(detached, theta, name,
                        f"at most the detachment deflection θmax({upstream})",
                        limit=theta_max, unit_text="rad", error_class=DetachedShockError,
                        hint="No attached shock exists beyond it." + where)


def solve_ready(plan, case, shape, explain=True):
    """Solve a ready problem's region graph on checked inputs (NaN where invalid).

    Floats solve one case (the scalar path), arrays a batch (flattened here); the
    result is the solver's :class:`~gasdyn2d.patterns.solver.RawSolution` with flat
    arrays, its failures as reasons (raising is the ready function's job).
    """
    case = {key: flat(value) for key, value in case.items()}
    scalar = all(type(v) is float for v in case.values())
    if not scalar:
        n = next(v.size for v in case.values() if type(v) is not float)
        case = {key: v if type(v) is float and key == "g" else
                np.broadcast_to(v, (n,)) for key, v in case.items()}
    return solve_cases(plan, case, shape if scalar else (case["M"].size,), _NAN_CHECK,
                       explain=explain)
