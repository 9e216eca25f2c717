"""The uniform state of one flow region: Mach number, pressure, temperature, direction."""

from __future__ import annotations

import dataclasses

import numpy as np

from ..boundary import Call, ResultTable, unit_field
from ..boundary.types import ArrayInput, FloatArray
from ..errors import InvalidInputError
from .gas import AIR, Gas
from .prandtl_meyer_function import prandtl_meyer_angle
from .prandtl_meyer_function import mach_angle_of

__all__ = ["FlowState"]


@dataclasses.dataclass(frozen=True, repr=False, init=False, eq=False)
class FlowState(ResultTable):
    """Uniform flow of a perfect or thermally perfect gas: the state of one region.

    Parameters
    ----------
    M : float or array_like
        Mach number [-], >= 0.
    p : float, array_like or Quantity
        Static pressure [Pa], > 0.
    T : float, array_like or Quantity
        Static temperature [K], > 0.
    direction : float, array_like or Quantity, optional
        Flow direction [rad], counterclockwise from the x axis.
    gas : Gas, optional
        The gas (default :data:`~gasdyn2d.AIR`, a perfect gas). With a thermally perfect
        gas (:data:`~gasdyn2d.AIR_THERMALLY_PERFECT`) the derived quantities use its
        temperature-dependent properties at ``T``: a² = γ(T) R T, h(T0) = h(T) + V²/2,
        p0/p = exp((φ(T0) - φ(T))/R), q = γ(T) p M²/2 and ν at the stagnation
        temperature T0.

    Notes
    -----
    Arrays broadcast together. When ``p`` or ``T`` is a Quantity, the
    dimensional fields come back as Quantities (pressures in the unit of
    ``p``, temperatures in the unit of ``T``, other quantities in SI);
    ``direction``, ``nu`` and ``mu`` come back in the unit of ``direction``
    (radians if it was a plain number). With plain numbers in, everything is
    plain SI. ``*_si`` attributes always hold the plain SI arrays.

    Examples
    --------
    >>> from gasdyn2d import FlowState, ureg
    >>> rig = FlowState(2.5, 18 * ureg.kPa, 170 * ureg.K)
    >>> round(rig.V.m_as("m/s"), 1), round(rig.p0.m_as("kPa"), 2)
    (653.4, 307.55)
    """

    M: FloatArray = unit_field("", "Mach number")
    p: FloatArray = unit_field("Pa", "static pressure")
    T: FloatArray = unit_field("K", "static temperature")
    direction: FloatArray = unit_field("rad", "flow direction from the x axis")
    gas: Gas = dataclasses.field(default=AIR, repr=False)

    def __init__(self, M: ArrayInput, p: ArrayInput, T: ArrayInput,
                 direction: ArrayInput = 0.0, gas: Gas = AIR, *, errors: str = "raise"):
        if not isinstance(gas, Gas):
            raise InvalidInputError(f"gas must be a gasdyn2d.Gas; got {gas!r}.")
        call = Call(errors)
        call.take("M", M)
        call.take("p", p, "Pa")
        call.take("T", T, "K")
        call.take("direction", direction, "rad")
        if call.lazy:
            raise InvalidInputError(
                "FlowState holds computed states: give numbers, arrays, Quantities, DataArrays "
                "or Series, not dask arrays (compute them first, or sweep the relations, which "
                "stay lazy).")
        M_si, p_si, T_si, d_si = call.prepare()
        check = call.check
        M_si = check.mach(M_si, "M")
        p_si = check.positive(p_si, "p", "Pa")
        T_si = check.positive(T_si, "T", "K")
        d_si = check.finite(d_si, "direction", "rad")
        scalars = (M_si, p_si, T_si, d_si)
        # the *_si attributes are always read-only ndarrays (0-d for one state), the form
        # every plain core and the region graph take
        M_si, p_si, T_si, d_si = (np.array(v, dtype=float) for v in np.broadcast_arrays(
            M_si, p_si, T_si, d_si))
        for value in (M_si, p_si, T_si, d_si):
            value.flags.writeable = False
        set_field = object.__setattr__
        set_field(self, "gas", gas)
        set_field(self, "_boundary", call)
        for name, value in (("M_si", M_si), ("p_si", p_si), ("T_si", T_si),
                            ("direction_si", d_si)):
            set_field(self, name, value)
        if call.scalar:
            M_si, p_si, T_si, d_si = scalars
        set_field(self, "M", call.wrap(M_si, "", "M", "Mach number"))
        set_field(self, "p", call.wrap(p_si, "Pa", "p", "static pressure"))
        set_field(self, "T", call.wrap(T_si, "K", "T", "static temperature"))
        set_field(self, "direction", call.wrap(d_si, "rad", "direction", "flow direction"))

    # -- unit helpers
    def _out(self, value, unit_text, name=""):
        return self._boundary.wrap(value, unit_text, name)

    def _angle(self, value, name=""):
        return self._boundary.wrap(value, "rad", name)

    # -- plain SI derived values
    @property
    def T0_si(self):
        """Stagnation temperature [K], plain."""
        if self.gas.is_thermally_perfect:  # h(T0) = h(T) + V²/2, inverted
            from .thermally_perfect import stagnation_temperature

            return stagnation_temperature(self.M_si, self.T_si, self.gas)
        return self.T_si * (1.0 + 0.5 * (self.gas.gamma - 1.0) * self.M_si**2)

    @property
    def p0_si(self):
        """Stagnation pressure [Pa], plain."""
        if self.gas.is_thermally_perfect:  # ln(p0/p) = (φ(T0) - φ(T))/R
            from .thermally_perfect_shocks import log_stagnation_over_static, upstream_state

            with np.errstate(invalid="ignore"):
                return self.p_si * np.exp(log_stagnation_over_static(
                    self.M_si, self.T_si, upstream_state(self.T_si, self.gas)))
        g = self.gas.gamma
        return self.p_si * np.exp(g / (g - 1.0) * np.log1p(0.5 * (g - 1.0) * self.M_si**2))

    @property
    def rho_si(self):
        """Density [kg/m³], plain."""
        return self.p_si / (self.gas.R * self.T_si)

    @property
    def gamma_si(self):
        """Ratio of specific heats at the static temperature [-], plain (``gas.gamma`` for a
        perfect gas)."""
        if self.gas.is_thermally_perfect:
            return self.gas.gamma_at(self.T_si)
        return np.full(np.shape(self.T_si), self.gas.gamma)

    @property
    def a_si(self):
        """Speed of sound [m/s], plain."""
        return np.sqrt(self.gamma_si * self.gas.R * self.T_si)

    # -- public derived fields, in the caller's units
    @property
    def rho(self):
        """Density [kg/m³]."""
        return self._out(self.rho_si, "kg/m³", "rho")

    @property
    def a(self):
        """Speed of sound [m/s]."""
        return self._out(self.a_si, "m/s", "a")

    @property
    def V(self):
        """Flow speed [m/s]."""
        return self._out(self.M_si * self.a_si, "m/s", "V")

    @property
    def p0(self):
        """Stagnation pressure [Pa] (unit of ``p`` when it was a Quantity)."""
        return self._out(self.p0_si, "Pa", "p0")

    @property
    def T0(self):
        """Stagnation temperature [K] (unit of ``T`` when it was a Quantity)."""
        return self._out(self.T0_si, "K", "T0")

    @property
    def q(self):
        """Dynamic pressure ρV²/2 = γpM²/2 [Pa] (unit of ``p`` when it was a Quantity)."""
        return self._out(0.5 * self.gamma_si * self.p_si * self.M_si**2, "Pa", "q")

    @property
    def gamma(self):
        """Ratio of specific heats at the static temperature [-] (``gas.gamma`` for a
        perfect gas, γ(T) for a thermally perfect one)."""
        return self._out(self.gamma_si, "", "gamma")

    @property
    def nu(self):
        """Prandtl–Meyer angle [rad] (NaN for subsonic flow); for a thermally perfect gas
        measured from the sonic state of the stagnation temperature T0."""
        if self.gas.is_thermally_perfect:
            from .thermally_perfect import prandtl_meyer_angle as hot_prandtl_meyer_angle

            with np.errstate(invalid="ignore"):
                nu = hot_prandtl_meyer_angle(self.M_si, self.T0_si, self.gas)
            return self._angle(nu, "nu")
        return self._angle(prandtl_meyer_angle(self.M_si, self.gas.gamma), "nu")

    @property
    def mu(self):
        """Mach angle [rad] (NaN for subsonic flow)."""
        return self._angle(mach_angle_of(self.M_si), "mu")

    @property
    def shape(self):
        """Broadcast shape of the state's arrays (``()`` for a single state)."""
        return np.shape(self.M_si)

    def _extra_columns(self):
        for name in ("rho", "a", "V", "p0", "T0", "q", "nu", "mu", "gamma"):
            value = getattr(self, name)
            unit = f"{value.units:~P}" if hasattr(value, "units") else {
                "rho": "kg/m³", "a": "m/s", "V": "m/s", "p0": "Pa", "T0": "K", "q": "Pa",
                "nu": "rad", "mu": "rad", "gamma": ""}[name]
            yield name, unit, value

    def __eq__(self, other):
        if not isinstance(other, FlowState):
            return NotImplemented
        return self.gas == other.gas and all(
            np.array_equal(getattr(self, k), getattr(other, k), equal_nan=True)
            for k in ("M_si", "p_si", "T_si", "direction_si"))

    __hash__ = None  # type: ignore[assignment]  # holds arrays: unhashable
