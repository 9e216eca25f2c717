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
    """The :class:`UnitOf` of a Quantity argument (its unit, in its own registry).

    The cache is keyed by the quantity's unit container (``_units``, hashable and
    cheap: ``quantity.units`` builds a new Unit object on every access).
    """
    registry = quantity._REGISTRY
    container = getattr(quantity, "_units", None)
    if container is not None:
        found = _BY_CONTAINER.get((id(registry), container, unit_text))
        if found is not None and found.registry is registry:
            return found
    found = si_conversion(quantity.units, registry, unit_text, name)
    if container is not None:
        _BY_CONTAINER[(id(registry), container, unit_text)] = found
    return found


_BY_CONTAINER: dict = {}


def to_caller_units(value_si, unit_text: str, like: UnitOf | None, registry):
    """``value_si`` (float or array in SI) as a Quantity: in ``like``'s unit if given,
    else in the SI unit of the kind, in ``registry`` (the caller's)."""
    if like is None:
        like = si_conversion(KINDS[unit_text].si_unit, registry, unit_text, "result")
    if like.offset == 0.0:
        value = value_si / like.scale if like.scale != 1.0 else value_si
    else:
        value = (value_si - like.offset) / like.scale
    if type(value) is float:
        return _scalar_quantity(value, like)
    return like.registry.Quantity(value, like.units)


_FAST_QUANTITY: dict = {}


def _scalar_quantity(value: float, like: UnitOf):
    """A float Quantity in ``like``'s unit and registry, built directly (about 0.2 µs against
    about 3 µs through pint's constructor, which parses and converts its arguments).

    pint keeps a Quantity's state in two attributes, ``_magnitude`` and ``_units``. That
    is pint's own layout, not its API, so the direct build is checked once per registry
    and unit against pint's constructor (same class, state, value and unit) and used only
    where they agree; a registry that forces magnitudes into arrays (pint-xarray sets
    that) always goes through the constructor.
    """
    registry = like.registry
    key = (id(registry), like.units)
    recipe = _FAST_QUANTITY.get(key)
    if recipe is None:
        recipe = _FAST_QUANTITY[key] = _fast_quantity_recipe(registry, like.units)
    if recipe is False or registry.force_ndarray_like or registry.force_ndarray:
        return registry.Quantity(value, like.units)
    cls, container = recipe
    quantity = object.__new__(cls)
    quantity._magnitude = value
    quantity._units = container
    return quantity


def _fast_quantity_recipe(registry, units):
    """(class, unit container) for direct builds, or False where they would differ."""
    try:
        official = registry.Quantity(0.25, units)
        cls, container = type(official), official._units
        built = object.__new__(cls)
        built._magnitude = 0.25
        built._units = container
        same = (vars(built) == vars(official) and built.units == official.units
                and built.magnitude == 0.25 and built.to_base_units() == official.to_base_units())
    except Exception:  # any change of pint's layout: use its constructor
        return False
    return (cls, container) if same else False


def degrees_hint(value: float) -> str:
    """The advice of a ProbablyDegreesWarning for a plain angle ``value``."""
    return (f"Pass np.radians({value:g}) or a Quantity such as {value:g} * ureg.deg.")


TWO_PI = 2.0 * math.pi
