"""Two-dimensional section shapes (aerofoils, fins) as polylines in chord units.

A :class:`Section` is an immutable pair of surfaces, each a polyline from the
leading edge (0, 0) to the trailing edge (1, 0) with strictly increasing x.
The section-load theories (:mod:`gasdyn2d.design.section_loads`) treat every segment
between two points as a flat panel and every interior point as a corner.
"""

from __future__ import annotations

import math
import dataclasses

import numbers

import numpy as np

from ..boundary import as_si_scalar, is_quantity, refuse_type
from ..errors import InvalidInputError

__all__ = ["Section"]

_END_TOLERANCE = 1e-9  # chord units: how far an end point may sit from (0, 0) or (1, 0)
_CROSSING_TOLERANCE = 1e-12  # chord units: how far upper may dip below lower
#: Fewest panels a surface of a biconvex section may have: with one panel the two arcs
#: collapse onto the chord (a flat plate of zero thickness and zero wave drag).
BICONVEX_MIN_PANELS = 2


def _as_points(points, surface: str) -> np.ndarray:
    if is_quantity(points):  # chord units: a dimensionless Quantity is accepted as such
        if not points.dimensionless:
            raise InvalidInputError(
                f"{surface} must be (x, y) points in chord units (dimensionless); got a "
                f"Quantity in {points.units:~}. Divide the coordinates by the chord.")
        points = points.m_as("dimensionless")
    if isinstance(points, (str, bytes)):
        raise InvalidInputError(
            f"{surface} must be a sequence of (x, y) points; got {points!r}.")
    try:
        raw = np.asarray(points)
    except (TypeError, ValueError):
        raise InvalidInputError(
            f"{surface} must be a sequence of (x, y) points; got {points!r}.") from None
    kind = raw.dtype.kind
    if kind == "O" and all(isinstance(v, numbers.Real) and not isinstance(v, (bool, np.bool_))
                           for v in raw.reshape(-1)):
        kind = "f"
    if kind not in "fiu":
        if kind in "US":
            raise InvalidInputError(
                f"{surface} must be a sequence of (x, y) points; got {points!r}.")
        raise refuse_type(surface, raw, "a sequence of (x, y) points of real numbers")
    array = np.array(raw, dtype=float)
    if array.ndim != 2 or array.shape[1] != 2 or array.shape[0] < 2:
        hint = " (transpose it: the array has shape (2, n))" if array.ndim == 2 and array.shape[0] == 2 else ""
        raise InvalidInputError(
            f"{surface} must have shape (n, 2) with n >= 2 points (x, y); got shape "
            f"{array.shape}{hint}."
        )
    if not np.all(np.isfinite(array)):
        index = int(np.argwhere(~np.isfinite(array))[0][0])
        raise InvalidInputError(
            f"{surface} point {index} is not finite: {tuple(array[index])}."
        )
    return array


def _check_ends(array: np.ndarray, surface: str) -> np.ndarray:
    for index, target, name in ((0, (0.0, 0.0), "leading edge"), (-1, (1.0, 0.0), "trailing edge")):
        gap = np.hypot(*(array[index] - target))
        if gap > _END_TOLERANCE:
            raise InvalidInputError(
                f"{surface} must {'start' if index == 0 else 'end'} at the {name} {target}; got "
                f"({array[index, 0]:.10g}, {array[index, 1]:.10g}), {gap:.3g} chord away (limit "
                f"{_END_TOLERANCE:g}). The section is open: give both surfaces from (0, 0) to "
                "(1, 0), scaled to chord units."
            )
        array[index] = target
    return array


def _check_monotonic(array: np.ndarray, surface: str) -> None:
    dx = np.diff(array[:, 0])
    if np.any(dx <= 0.0):
        i = int(np.argmax(dx <= 0.0))
        raise InvalidInputError(
            f"x along {surface} must increase strictly from leading edge to trailing edge; "
            f"point {i + 1} has x = {array[i + 1, 0]:.10g} after x = {array[i, 0]:.10g} at point "
            f"{i}. Give each surface as its own polyline ordered from x = 0 to x = 1."
        )


def _surface_y(points: np.ndarray, x: np.ndarray) -> np.ndarray:
    return np.interp(x, points[:, 0], points[:, 1])


def _check_not_crossing(upper: np.ndarray, lower: np.ndarray) -> None:
    # Both surfaces are piecewise linear in x, so their gap is piecewise linear
    # between the union of the nodes: checking it there is exact.
    x = np.union1d(upper[:, 0], lower[:, 0])
    gap = _surface_y(upper, x) - _surface_y(lower, x)
    if np.any(gap < -_CROSSING_TOLERANCE):
        i = int(np.argmin(gap))
        swapped = np.all(gap[1:-1] <= _CROSSING_TOLERANCE)
        hint = (" Upper and lower look swapped: give the surface with the larger y first."
                if swapped else " The outline crosses itself; check the coordinates.")
        raise InvalidInputError(
            f"the upper surface must not pass below the lower surface; at x = {x[i]:.10g} it is "
            f"{-gap[i]:.6g} chord below it (limit {_CROSSING_TOLERANCE:g}).{hint}"
        )


def _readonly(array: np.ndarray) -> np.ndarray:
    array = np.array(array, dtype=float)
    array.flags.writeable = False
    return array


def _positive_below(value, name: str, upper: float) -> float:
    number = as_si_scalar(name, value)
    if not (0.0 < number < upper):
        raise InvalidInputError(
            f"{name} must be > 0 and < {upper:g}; got {number!r}."
        )
    return number


@dataclasses.dataclass(frozen=True, eq=False)
class Section:
    """An immutable 2-D section: upper and lower polylines in chord units.

    Build one with :meth:`from_points`, :meth:`flat_plate`,
    :meth:`double_wedge` or :meth:`biconvex`.

    Attributes
    ----------
    upper, lower : ndarray, shape (n, 2)
        Read-only (x, y) points [chord] from the leading edge (0, 0) to the
        trailing edge (1, 0), x strictly increasing, upper never below lower.

    Examples
    --------
    >>> from gasdyn2d.design.sections import Section
    >>> fin = Section.double_wedge(0.04, ridge=0.4)
    >>> fin.n_panels, round(fin.thickness_ratio, 6)
    ((2, 2), 0.04)
    >>> import numpy as np
    >>> np.round(np.degrees(fin.upper_angles), 4)
    array([ 2.8624, -1.9092])
    """

    upper: np.ndarray
    lower: np.ndarray

    # ------------------------------------------------------------ constructors

    @classmethod
    def from_points(cls, upper, lower) -> "Section":
        """Section from two point lists ``[(x, y), ...]`` [chord], LE to TE.

        Raises
        ------
        InvalidInputError
            A surface is not of shape (n, 2), does not start at (0, 0) or end at
            (1, 0) (an open section), has x not strictly increasing, or the upper
            surface passes below the lower one (a self-intersecting outline).
        """
        surfaces = []
        for name, points in (("upper", upper), ("lower", lower)):
            array = _check_ends(_as_points(points, name), name)
            _check_monotonic(array, name)
            surfaces.append(array)
        _check_not_crossing(*surfaces)
        return cls(_readonly(surfaces[0]), _readonly(surfaces[1]))

    @classmethod
    def flat_plate(cls) -> "Section":
        """A flat plate of unit chord (one panel per surface)."""
        plate = [(0.0, 0.0), (1.0, 0.0)]
        return cls.from_points(plate, plate)

    @classmethod
    def double_wedge(cls, thickness_ratio, ridge=0.5) -> "Section":
        """Symmetric double wedge (diamond) of thickness ratio t/c, ridge at x = ``ridge``.

        Parameters
        ----------
        thickness_ratio : float
            Maximum thickness over chord [-], 0 < t/c < 2.
        ridge : float, optional
            Chordwise position of maximum thickness [chord], 0 < ridge < 1.
        """
        t = _positive_below(thickness_ratio, "thickness_ratio", 2.0)
        x = _positive_below(ridge, "ridge", 1.0)
        return cls.from_points([(0, 0), (x, 0.5 * t), (1, 0)], [(0, 0), (x, -0.5 * t), (1, 0)])

    @classmethod
    def biconvex(cls, thickness_ratio, n=64) -> "Section":
        """Symmetric biconvex (two circular arcs) section sampled with ``n`` panels a surface.

        The points are spaced in arc angle by a cosine law, φ_i = φ0·cos(πi/n)
        with φ0 = 2·atan(t/c) the arc's slope at the leading edge: panels are
        short at both edges. The first panel's slope then differs from the
        leading-edge tangent by O(1/n²) rather than half a panel's turn, so the
        leading-edge shock (and the entropy of the whole surface flow behind
        it) converges at second order, like the panel pressures; with equal
        spacing the lift would converge only at first order.

        Parameters
        ----------
        thickness_ratio : float
            Maximum thickness over chord [-], 0 < t/c < 1 (1 is a full circle).
        n : int, optional
            Panels per surface, >= 2 (one panel would be the chord itself: a flat
            plate of zero thickness).

        Notes
        -----
        A circular arc through (0, 0) and (1, 0) of height h = t/2 at mid-chord has
        radius R = (1/4 + h²)/(2h) and its centre at (1/2, h - R); its slope at
        the leading edge is tan φ0 with φ0 = 2·atan(2h).
        """
        t = _positive_below(thickness_ratio, "thickness_ratio", 1.0)
        n = _panel_count(n)
        h = 0.5 * t
        radius = (0.25 + h * h) / (2.0 * h)
        phi0 = 2.0 * np.arctan(2.0 * h)
        phi = phi0 * np.cos(np.linspace(0.0, np.pi, int(n) + 1))  # tangent angle along the arc
        # x = R (sin φ0 - sin φ), y = R (cos φ - cos φ0), in product form (no cancellation)
        half_sum, half_gap = 0.5 * (phi0 + phi), 0.5 * (phi0 - phi)
        x = 2.0 * radius * np.cos(half_sum) * np.sin(half_gap)
        y = 2.0 * radius * np.sin(half_sum) * np.sin(half_gap)
        x[0], y[0], x[-1], y[-1] = 0.0, 0.0, 1.0, 0.0
        return cls.from_points(np.column_stack([x, y]), np.column_stack([x, -y]))

    # ------------------------------------------------------------- properties

    @property
    def n_panels(self) -> tuple[int, int]:
        """Number of panels (upper, lower)."""
        return len(self.upper) - 1, len(self.lower) - 1

    @property
    def upper_angles(self) -> np.ndarray:
        """Inclination of each upper panel to the chord [rad], > 0 rising towards the TE."""
        return _panel_angles(self.upper)

    @property
    def lower_angles(self) -> np.ndarray:
        """Inclination of each lower panel to the chord [rad], > 0 rising towards the TE."""
        return _panel_angles(self.lower)

    @property
    def thickness_ratio(self) -> float:
        """Largest gap between the surfaces at one x [chord]."""
        x = np.union1d(self.upper[:, 0], self.lower[:, 0])
        return float(np.max(_surface_y(self.upper, x) - _surface_y(self.lower, x)))

    @property
    def is_symmetric(self) -> bool:
        """True when the lower surface is the mirror image of the upper one."""
        return self.upper.shape == self.lower.shape and bool(
            np.all(self.upper[:, 0] == self.lower[:, 0]) and np.all(self.upper[:, 1] == -self.lower[:, 1])
        )

    def mirrored(self) -> "Section":
        """The section reflected in its chord line (upper and lower exchanged)."""
        flip = np.array([1.0, -1.0])
        return Section(_readonly(self.lower * flip), _readonly(self.upper * flip))

    def __repr__(self) -> str:
        n_upper, n_lower = self.n_panels
        return (f"Section({n_upper} upper and {n_lower} lower panels, "
                f"thickness ratio {self.thickness_ratio:.6g})")


def _panel_count(n) -> int:
    """The biconvex panel count as an int; bools, text, fractions and too few refused."""
    if isinstance(n, (bool, np.bool_)) or not isinstance(n, numbers.Real):
        raise refuse_type("n", n, f"a whole number of panels >= {BICONVEX_MIN_PANELS}")
    n_float = float(n)
    if not (math.isfinite(n_float) and int(n_float) == n_float
            and n_float >= BICONVEX_MIN_PANELS):
        raise InvalidInputError(
            f"n must be a whole number of panels >= {BICONVEX_MIN_PANELS} (one panel is the "
            f"chord itself: a flat plate of zero thickness); got {n!r}.")
    return int(n_float)


def _panel_angles(points: np.ndarray) -> np.ndarray:
    d = np.diff(points, axis=0)
    return np.arctan2(d[:, 1], d[:, 0])

