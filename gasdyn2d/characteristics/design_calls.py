"""How the floor's design tools meet their caller: one case in, one result out, one unit.

The marchers of this floor compute one nozzle, one channel or one jet per call:
their inputs are single values (a design Mach number, a throat size, a count of
lines), not case arrays. :class:`DesignCall` takes each of them through the
boundary (:class:`gasdyn2d.boundary.Call`: the same types, units and messages as
every public function), refuses arrays with a message naming the argument, and
packages the results: read-only arrays that share no memory, and, when any
input was a pint Quantity, Quantities in the caller's registry with lengths in
the unit of the first length given (the throat size, the channel length) and
angles in the unit of the first angle given (radians otherwise). Every length
of one result, the characteristic net's included, is in that one unit.

NaN policy of the floor: a nozzle design cannot be NaN (there would be nothing
to build), so a NaN design input raises an
:class:`~gasdyn2d.errors.InvalidInputError` naming it; the analyses of a given
geometry (channel flows, jets, section near fields) give a result of NaN for a
NaN flow input (Mach number, pressure ratio, γ), so that sweeps survive. Sizes,
lengths, counts and walls are geometry: NaN there raises, naming the argument.
"""

from __future__ import annotations

import math
import numbers

import numpy as np

from ..boundary import Call, refuse_type
from ..boundary.checks import format_value
from ..boundary.units import KINDS, to_caller_units
from ..errors import InvalidInputError

__all__ = ["DesignCall", "frozen_array"]


def frozen_array(value, dtype=float):
    """A read-only copy of ``value`` as an ndarray (shares memory with nothing)."""
    array = np.array(value, dtype=dtype, copy=True)
    array.flags.writeable = False
    return array


class DesignCall:
    """The inputs of one design call in SI, and the caller's units for its results.

    Parameters
    ----------
    function : str
        Name of the public function (for messages).
    """

    __slots__ = ("function", "call", "nan_inputs")

    def __init__(self, function: str):
        self.function = function
        self.call = Call()
        self.nan_inputs: list = []  # names of flow inputs given as NaN

    # ------------------------------------------------------------------ inputs
    def scalar(self, name, value, unit_text="", *, nan="raise"):
        """One single-valued input in SI (a float); Quantities of any registry accepted.

        ``nan``: "raise" (geometry and designs: NaN is refused, naming ``name``)
        or "record" (a flow input of an analysis: NaN is noted in
        :attr:`nan_inputs`, and the caller returns its NaN result).
        """
        si = self.call.take(name, value, unit_text)
        if type(si) is not float:
            raise InvalidInputError(
                f"{name} must be a single value: {self.function} computes one case; got an "
                f"array of shape {np.shape(si)}. Call it once per case (or loop over the "
                "cases).")
        if si != si:
            if nan == "record":
                self.nan_inputs.append(name)
            else:
                raise InvalidInputError(
                    f"{name} must be a number; got NaN. {self.function} designs a geometry, "
                    "which cannot be NaN.")
        return si

    def positive(self, name, value, unit_text="", *, what=""):
        """A finite single value > 0 (a size, a length)."""
        si = self.scalar(name, value, unit_text)
        if not (0.0 < si < math.inf):
            raise InvalidInputError(
                f"{name} must be finite and > 0{(' (' + what + ')') if what else ''}; got "
                f"{format_value(si, unit_text)}.")
        return si

    def check(self, ok, name, value, requirement, unit_text="", hint=""):
        """Raise an InvalidInputError naming ``name`` unless ``ok`` (NaN passes through:
        it was recorded or refused by :meth:`scalar`)."""
        if value != value or ok:
            return value
        message = (f"{name} must be {requirement}; got {format_value(value, unit_text)}.")
        raise InvalidInputError(message + (" " + hint if hint else ""))

    @staticmethod
    def count(name, value, lower, upper, advice=""):
        """An integer from ``lower`` to ``upper`` (bools, floats and text refused)."""
        if isinstance(value, (bool, np.bool_)) or not isinstance(value, numbers.Integral):
            raise refuse_type(name, value, f"an integer from {lower} to {upper}")
        if not lower <= value <= upper:
            raise InvalidInputError(
                f"{name} must be an integer from {lower} to {upper}; got {value!r}."
                + (" " + advice if advice else ""))
        return int(value)

    # ------------------------------------------------------------------ outputs
    @property
    def registry(self):
        """The registry of the first Quantity input (None: plain numbers in, plain out)."""
        return self.call.registry

    def _like(self, unit_text):
        for text, unit in zip(self.call.unit_texts, self.call.units):
            if text == unit_text and unit is not None:
                if unit_text == "rad" and str(unit.units) == "dimensionless":
                    continue
                return unit
        return None

    def out(self, value, unit_text=""):
        """A result value: a float or a read-only array; a Quantity in the caller's unit
        of its kind (and registry) when any input was a Quantity."""
        if np.ndim(value) == 0 and not isinstance(value, np.ndarray):
            value = float(value)
        else:
            value = frozen_array(value)
        if self.registry is None or not unit_text or unit_text not in KINDS:
            return value
        quantity = to_caller_units(value, unit_text, self._like(unit_text), self.registry)
        if isinstance(quantity.magnitude, np.ndarray):
            quantity.magnitude.flags.writeable = False
        return quantity

    def length(self, value):
        """:meth:`out` for a length [m]."""
        return self.out(value, "m")

    def angle(self, value):
        """:meth:`out` for an angle [rad]."""
        return self.out(value, "rad")

    def net(self, net):
        """A :class:`~gasdyn2d.characteristics.unit_processes.CharacteristicNet` of plain SI
        arrays packaged like every other field of the result (read-only, caller's units)."""
        return type(net)(self.length(net.x), self.length(net.y), frozen_array(net.mach),
                         self.angle(net.theta), frozen_array(net.p_p0),
                         frozen_array(net.plus_segments, np.intp),
                         frozen_array(net.minus_segments, np.intp))
