"""pint at the boundary: SI magnitudes in through cached factors, the caller's units out.

A Quantity is converted to SI once, at the boundary, with a factor (and, for
temperatures in degrees Celsius or Fahrenheit, an offset) looked up in a cache
keyed by the caller's registry and unit; pint never runs inside a computation.
On the way out a result is put back into the caller's unit *and the caller's
registry*, so that it adds to the caller's own Quantities. The registry is never
modified and no pint warning is silenced.
"""

from __future__ import annotations

import math
import sys
from typing import Any, NamedTuple

from ..errors import InvalidInputError

__all__ = ["KINDS", "UnitOf", "application_registry", "is_quantity", "si_conversion",
           "to_caller_units", "unit_of_quantity"]


class Kind(NamedTuple):
    """A physical kind of argument or result: its pint dimensionality and SI unit."""

    name: str
    dimensionality: str
    si_unit: str
    text: str  # how a message names it ("an angle")


#: Every kind of quantity that crosses the boundary, by the unit text used in result
#: field metadata ("" for a plain ratio or Mach number). A field unit text that is not
#: here ("chord") is a label for tables only: such fields stay plain numbers.
KINDS = {
    "": Kind("dimensionless", "[]", "dimensionless", "a dimensionless number"),
    "rad": Kind("angle", "[]", "radian", "an angle"),
    "Pa": Kind("pressure", "[pressure]", "pascal", "a pressure"),
    "K": Kind("temperature", "[temperature]", "kelvin", "a temperature"),
    "m": Kind("length", "[length]", "meter", "a length"),
    "m/s": Kind("velocity", "[length] / [time]", "meter / second", "a speed"),
    "kg/m³": Kind("density", "[mass] / [length] ** 3", "kilogram / meter ** 3", "a density"),
    "J/(kg·K)": Kind("gas constant", "[length] ** 2 / [time] ** 2 / [temperature]",
                     "joule / kilogram / kelvin", "a specific gas constant"),
    "kg/s": Kind("mass flow", "[mass] / [time]", "kilogram / second", "a mass flow"),
    "kg/(s·m)": Kind("mass flow per unit depth", "[mass] / [time] / [length]",
                     "kilogram / second / meter", "a mass flow per unit depth"),
    "N": Kind("force", "[force]", "newton", "a force"),
    "N/m": Kind("force per unit depth", "[force] / [length]", "newton / meter",
                "a force per unit depth"),
    "s": Kind("time", "[time]", "second", "a time"),
    "m²": Kind("area", "[length] ** 2", "meter ** 2", "an area"),
}


def application_registry():
    """pint's application registry (looked up on every call, never modified)."""
    import pint

    return pint.get_application_registry()


def is_quantity(value) -> bool:
    """True for a pint Quantity of any registry.

    pint is imported only when a caller uses it: a value cannot be a Quantity unless
    pint is already imported, so ``import gasdyn2d`` does not pay for pint.
    """
    pint = sys.modules.get("pint")
    return pint is not None and isinstance(value, pint.Quantity)


class UnitOf(NamedTuple):
    """The unit a caller used for one argument: unit, registry and the SI conversion.

    ``si = magnitude * scale + offset``; the offset is non-zero only for
    temperatures on an offset scale (°C, °F).
    """

    units: Any
    registry: Any
    scale: float
    offset: float


_CONVERSIONS: dict = {}


def si_conversion(units, registry, unit_text: str, name: str) -> UnitOf:
    """The cached :class:`UnitOf` for ``units`` of ``registry`` as a ``unit_text`` kind.

    Raises :class:`InvalidInputError` naming the argument when the dimensionality
    does not fit.
    """
    key = (id(registry), units, unit_text)
    found = _CONVERSIONS.get(key)
    if found is not None and found.registry is registry:
        return found
    kind = KINDS[unit_text]
    one = registry.Quantity(1.0, units)
    if not one.check(kind.dimensionality):
        advice = (f"Give {name} as a plain number or a dimensionless Quantity."
                  if kind.name == "dimensionless" else
                  f"Give {name} in a unit of {kind.name} or as a plain number in {kind.si_unit}.")
        raise InvalidInputError(
            f"{name} has units of {one.units:~} ({one.dimensionality}); expected {kind.text} "
            f"({kind.dimensionality}). {advice}")
    zero_si = float(registry.Quantity(0.0, units).to(kind.si_unit).magnitude)
    scale = float(one.to(kind.si_unit).magnitude) - zero_si
    found = UnitOf(units, registry, scale, zero_si)
    _CONVERSIONS[key] = found
    return found


def unit_of_quantity(quantity, unit_text: str, name: str) -> UnitOf:
    """The :class:`UnitOf` of a Quantity argument (its unit, in its own registry)."""
    return si_conversion(quantity.units, quantity._REGISTRY, unit_text, name)


def to_caller_units(value_si, unit_text: str, like: UnitOf | None, registry):
    """``value_si`` (float or array in SI) as a Quantity: in ``like``'s unit if given,
    else in the SI unit of the kind, in ``registry`` (the caller's)."""
    if like is None:
        return registry.Quantity(value_si, KINDS[unit_text].si_unit)
    if like.offset == 0.0:
        return like.registry.Quantity(value_si / like.scale if like.scale != 1.0 else value_si,
                                      like.units)
    return like.registry.Quantity((value_si - like.offset) / like.scale, like.units)


def degrees_hint(value: float) -> str:
    """The advice of a ProbablyDegreesWarning for a plain angle ``value``."""
    return (f"Pass np.radians({value:g}) or a Quantity such as {value:g} * ureg.deg.")


TWO_PI = 2.0 * math.pi
