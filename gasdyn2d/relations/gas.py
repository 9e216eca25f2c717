"""The perfect gas: ratio of specific heats and specific gas constant."""

from __future__ import annotations

import dataclasses
import math

from ..boundary.results import ResultTable, unit_field
from ..errors import InvalidInputError

__all__ = ["Gas", "AIR"]


@dataclasses.dataclass(frozen=True, repr=False)
class Gas(ResultTable):
    """A calorically perfect gas.

    Parameters
    ----------
    gamma : float
        Ratio of specific heats cp/cv [-], greater than 1.
    R : float
        Specific gas constant [J/(kg·K)], positive. A pint Quantity of any
        compatible unit is accepted and stored in SI.

    Examples
    --------
    >>> from gasdyn2d import Gas
    >>> helium = Gas(gamma=5 / 3, R=2077.1)
    >>> round(helium.cp, 1)
    5192.8
    """

    gamma: float = unit_field("", default=1.4)
    R: float = unit_field("J/(kg·K)", default=287.05)

    def __post_init__(self):
        from .._numerics import is_quantity, to_si

        gamma = self.gamma
        if is_quantity(gamma):
            gamma = float(to_si(gamma, "gamma", "dimensionless")[0])
        R = float(to_si(self.R, "R", "gas_constant")[0]) if is_quantity(self.R) else self.R
        try:
            gamma, R = float(gamma), float(R)
        except (TypeError, ValueError):
            raise InvalidInputError(
                f"Gas takes scalar gamma and R; got gamma={self.gamma!r}, R={self.R!r}."
            ) from None
        if not (math.isfinite(gamma) and gamma > 1.0):
            raise InvalidInputError(f"gamma must be a finite number > 1; got {gamma!r}.")
        if not (math.isfinite(R) and R > 0.0):
            raise InvalidInputError(f"R must be a finite number > 0 J/(kg·K); got {R!r}.")
        object.__setattr__(self, "gamma", gamma)
        object.__setattr__(self, "R", R)

    @property
    def cp(self) -> float:
        """Specific heat at constant pressure [J/(kg·K)]."""
        return self.gamma * self.R / (self.gamma - 1.0)

    @property
    def cv(self) -> float:
        """Specific heat at constant volume [J/(kg·K)]."""
        return self.R / (self.gamma - 1.0)


#: Dry air as a perfect gas: γ = 1.4, R = 287.05 J/(kg·K).
AIR = Gas(1.4, 287.05)
