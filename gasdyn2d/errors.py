"""Exceptions and warnings raised by gasdyn2d.

Every exception is a subclass of :class:`ValueError`, so code that already
catches ``ValueError`` keeps working; catch the narrower classes to react to a
particular physical limit.
"""

__all__ = [
    "GasDynamicsError",
    "InvalidInputError",
    "DetachedShockError",
    "NoSolutionError",
    "IllPosedProblemError",
    "ProbablyDegreesWarning",
]


class GasDynamicsError(ValueError):
    """Base class of every error raised by gasdyn2d."""


class InvalidInputError(GasDynamicsError):
    """An argument is outside the domain of the relation (wrong value, unit or shape)."""


class DetachedShockError(InvalidInputError):
    """A flow deflection exceeds the maximum an attached oblique shock can produce."""


class NoSolutionError(GasDynamicsError):
    """A coupled wave problem has no solution for some cases (a wave detached, a
    pressure could not be reached, or the iteration failed to converge)."""


class IllPosedProblemError(GasDynamicsError):
    """A wave pattern cannot be solved as stated: unknowns and conditions do not
    match, or a region cannot be reached from the inflow."""


class ProbablyDegreesWarning(UserWarning):
    """A plain-number angle is larger than 2π radians: it was probably given in degrees."""
