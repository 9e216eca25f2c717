"""Wall contours y(x) for the characteristic marchers: straight, bent, splined or polygonal.

:class:`WallContour` holds two vectorised callables, the height y(x) [m] and the
slope dy/dx [-]. Its constructors take their sizes and angles through the
boundary (plain SI numbers or pint Quantities of any unit) and build the
callables from small module-level shapes, so a contour can be pickled (sent to
a worker process, cached on disk) and two contours built alike compare equal.

Corners: :meth:`WallContour.polyline` is straight between its points, with
corners at them (``corners_x``, which the shock-fitting marcher steps onto:
an expansion corner sends a centred fan, a compression corner an attached
shock). :meth:`WallContour.bend` turns along a circular arc; a sharp corner is
a bend of tiny radius.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..boundary import as_si_scalar, is_quantity, refuse_type
from ..boundary.units import degrees_hint
from ..errors import InvalidInputError

__all__ = ["WallContour"]

_HALF_PI = 0.5 * math.pi


def _wall_angle(name, value, *, limit=_HALF_PI):
    """A wall angle [rad] of size below ``limit``; larger plain numbers were probably degrees."""
    angle = as_si_scalar(name, value, "rad", what="a single angle")
    if not (math.isfinite(angle) and abs(angle) < limit):
        hint = ""
        if math.isfinite(angle) and abs(angle) >= limit and not is_quantity(value):
            hint = " Plain angles are in radians: this was probably meant in degrees. " \
                + degrees_hint(angle)
        raise InvalidInputError(
            f"{name} must be finite and smaller than π/2 in size (a wall y(x) cannot turn "
            f"back); got {angle!r} rad.{hint}")
    return angle


def _finite(name, value, unit_text="m"):
    number = as_si_scalar(name, value, unit_text, what="a single value")
    if not math.isfinite(number):
        raise InvalidInputError(f"{name} must be a finite number; got {number!r} "
                                f"{unit_text}. A wall is geometry: it cannot be NaN.")
    return number


@dataclasses.dataclass(frozen=True)
class _Straight:
    """y = y0 + x tan(angle)."""

    y0: float
    tangent: float

    def height(self, x):
        return self.y0 + self.tangent * np.asarray(x, dtype=float)

    def slope(self, x):
        return self.tangent + 0.0 * np.asarray(x, dtype=float)


@dataclasses.dataclass(frozen=True)
class _Bend:
    """Straight at y0 up to x_start, a circular arc of ``radius`` turning by ``turn``, straight."""

    y0: float
    x_start: float
    turn: float  # signed [rad]
    radius: float

    @property
    def x_end(self):
        return self.x_start + self.radius * math.sin(abs(self.turn))

    def height(self, x):
        x = np.asarray(x, dtype=float)
        sign = math.copysign(1.0, self.turn)
        turn, radius, x_end = abs(self.turn), self.radius, self.x_end
        s = np.clip(x - self.x_start, 0.0, x_end - self.x_start)
        arc = self.y0 + sign * (radius - np.sqrt(np.maximum(radius**2 - s * s, 0.0)))
        y_end = self.y0 + sign * radius * (1.0 - math.cos(turn))
        after = y_end + sign * math.tan(turn) * (x - x_end)
        return np.where(x <= x_end, arc, after)

    def slope(self, x):
        x = np.asarray(x, dtype=float)
        sign = math.copysign(1.0, self.turn)
        s = np.clip(x - self.x_start, 0.0, self.x_end - self.x_start)
        with np.errstate(invalid="ignore", divide="ignore"):
            arc = sign * s / np.sqrt(np.maximum(self.radius**2 - s * s, 0.0))
        return np.where(x <= self.x_end, arc, sign * math.tan(abs(self.turn)))


@dataclasses.dataclass(frozen=True, eq=False)
class _Spline:
    """Natural cubic spline through points; straight (tangent) beyond the ends."""

    x: np.ndarray
    y: np.ndarray

    def __post_init__(self):
        from scipy.interpolate import CubicSpline

        spline = CubicSpline(self.x, self.y, bc_type="natural")
        object.__setattr__(self, "_spline", spline)
        object.__setattr__(self, "_derivative", spline.derivative())

    def __eq__(self, other):
        return (type(other) is type(self) and np.array_equal(self.x, other.x)
                and np.array_equal(self.y, other.y))

    def __hash__(self):
        return hash((type(self).__name__, self.x.tobytes(), self.y.tobytes()))

    def __getstate__(self):
        return {"x": self.x, "y": self.y}

    def __setstate__(self, state):
        object.__setattr__(self, "x", state["x"])
        object.__setattr__(self, "y", state["y"])
        self.__post_init__()

    def height(self, x):
        x = np.asarray(x, dtype=float)
        xc = np.clip(x, self.x[0], self.x[-1])
        return self._spline(xc) + self._derivative(xc) * (x - xc)

    def slope(self, x):
        return self._derivative(np.clip(np.asarray(x, dtype=float), self.x[0], self.x[-1]))


@dataclasses.dataclass(frozen=True, eq=False)
class _Polyline:
    """Straight between points, corners at them; straight (first/last panel) beyond the ends."""

    x: np.ndarray
    y: np.ndarray

    def __eq__(self, other):
        return (type(other) is type(self) and np.array_equal(self.x, other.x)
                and np.array_equal(self.y, other.y))

    def __hash__(self):
        return hash((type(self).__name__, self.x.tobytes(), self.y.tobytes()))

    def _panel(self, x):
        return np.clip(np.searchsorted(self.x, x, side="right") - 1, 0, self.x.size - 2)

    def height(self, x):
        x = np.asarray(x, dtype=float)
        k = self._panel(x)
        x0, y0 = self.x[k], self.y[k]
        return y0 + (self.y[k + 1] - y0) / (self.x[k + 1] - x0) * (x - x0)

    def slope(self, x):
        k = self._panel(np.asarray(x, dtype=float))
        return (self.y[k + 1] - self.y[k]) / (self.x[k + 1] - self.x[k])


@dataclasses.dataclass(frozen=True)
class _Part:
    """One callable of a shape (its height or slope): picklable, equal when the shapes are."""

    shape: object
    name: str

    def __call__(self, x):
        return getattr(self.shape, self.name)(x)


def _parts(shape):
    return _Part(shape, "height"), _Part(shape, "slope")


def _points(name, values):
    """A 1-D float array [m] of a contour's points (Quantities of any length unit)."""
    if is_quantity(values):
        try:
            values = values.m_as("meter")
        except Exception:  # pint's DimensionalityError, kept out of the import path
            raise InvalidInputError(
                f"{name} must be lengths (or plain numbers in metres); got a Quantity in "
                f"{values.units:~}.") from None
    elif isinstance(values, (list, tuple)) and any(is_quantity(v) for v in values):
        values = [as_si_scalar(name, v, "m") for v in values]
    array = np.asarray(values)
    if array.dtype.kind not in "fiu":
        raise refuse_type(name, values, "a 1-D array of real numbers")
    return np.array(array, dtype=float)


@dataclasses.dataclass(frozen=True)
class WallContour:
    """A wall y(x) with its slope, as a straight line, a bend, a spline or a polyline.

    Build one with :meth:`straight`, :meth:`bend` (straight, circular arc,
    straight: a smooth turn), :meth:`through_points` (cubic spline) or
    :meth:`polyline` (straight panels with corners). ``height(x)`` [m] and
    ``slope(x)`` [-] are vectorised; beyond the last point the wall continues
    straight. Sizes and angles may be plain SI numbers or Quantities.
    Contours pickle, and two built from equal numbers compare equal.

    Examples
    --------
    >>> import pickle
    >>> from gasdyn2d.characteristics.walls import WallContour
    >>> roof = WallContour.straight(0.1, 0.05)
    >>> pickle.loads(pickle.dumps(roof)) == roof
    True
    """

    height: object  #: callable x -> y [m]
    slope: object  #: callable x -> dy/dx [-]
    #: abscissae of the corners of a polyline [m] (empty for smooth contours)
    corners_x: tuple = ()

    @classmethod
    def straight(cls, y0, angle=0.0):
        """Straight wall through (0, ``y0``) [m] at ``angle`` [rad] to the x axis.

        A plain angle larger than 2π warns (:class:`~gasdyn2d.errors.ProbablyDegreesWarning`);
        any angle of π/2 or more in size is refused (with the same hint).
        """
        y0 = _finite("y0", y0)
        line = _Straight(y0, math.tan(_wall_angle("angle", angle)))
        return cls(*_parts(line))

    @classmethod
    def bend(cls, y0, x_start, turn, radius):
        """Wall at height ``y0`` up to ``x_start``, then a circular arc of ``radius`` [m]
        turning it by ``turn`` [rad] (> 0 turns the wall towards +y), then straight.

        Examples
        --------
        >>> import numpy as np
        >>> from gasdyn2d.characteristics.walls import WallContour
        >>> wall = WallContour.bend(1.0, 2.0, np.radians(10.0), 5.0)
        >>> round(float(np.degrees(np.arctan(wall.slope(100.0)))), 10)
        10.0
        """
        y0, x_start = _finite("y0", y0), _finite("x_start", x_start)
        radius = as_si_scalar("radius", radius, "m", what="a single length")
        if not (math.isfinite(radius) and radius > 0):
            raise InvalidInputError(f"radius must be finite and > 0; got {radius!r} m.")
        shape = _Bend(y0, x_start, _wall_angle("turn", turn), radius)
        return cls(*_parts(shape))

    @classmethod
    def through_points(cls, x, y):
        """Cubic spline through points (``x`` increasing) [m]; straight beyond the ends."""
        x, y = _points("x", x), _points("y", y)
        _check_points(x, y, 3)
        shape = _Spline(_read_only(x), _read_only(y))
        return cls(*_parts(shape))

    @classmethod
    def polyline(cls, x, y):
        """Straight panels between points (``x`` increasing) [m], corners at the points.

        Beyond the ends the first and last panels continue. The inner points
        are the corners (``corners_x``).

        Examples
        --------
        >>> import numpy as np
        >>> from gasdyn2d.characteristics.walls import WallContour
        >>> ridge = WallContour.polyline([0.0, 0.5, 1.0], [0.0, 0.05, 0.0])
        >>> float(ridge.height(0.25)), ridge.corners_x
        (0.025, (0.5,))
        """
        x, y = _points("x", x), _points("y", y)
        _check_points(x, y, 2)
        shape = _Polyline(_read_only(x), _read_only(y))
        return cls(*_parts(shape), tuple(float(v) for v in x[1:-1]))


def _read_only(array):
    array = np.array(array, dtype=float)
    array.flags.writeable = False
    return array


def _check_points(x, y, fewest):
    if x.ndim != 1 or x.shape != y.shape or x.size < fewest or not np.all(np.diff(x) > 0):
        raise InvalidInputError(
            f"x and y must be 1-D arrays of the same length (>= {fewest} points) with x "
            f"strictly increasing; got shapes {x.shape} and {y.shape}.")
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise InvalidInputError("x and y of a wall contour must be finite.")
