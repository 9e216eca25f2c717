"""The uniform state of one flow region: Mach number, pressure, temperature, direction."""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import _numerics as nx
from .._display import ResultTable, _format, unit_field
from .expansion_fans import prandtl_meyer_angle
from .gas import AIR, Gas
from .isentropic import mach_angle_of

__all__ = ["FlowState"]


@dataclasses.dataclass(frozen=True, repr=False, init=False, eq=False)
class FlowState(ResultTable):
    """Uniform flow of a perfect gas: the state of one region of a wave pattern.

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
        The perfect gas (default :data:`~gasdyn2d.AIR`).

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

    M: object = unit_field("")  #: Mach number
    p: object = unit_field("Pa")  #: static pressure
    T: object = unit_field("K")  #: static temperature
    direction: object = unit_field("rad")  #: flow direction from the x axis
    gas: Gas = dataclasses.field(default=AIR, repr=False)

    def __init__(self, M, p, T, direction=0.0, gas=AIR):
        if not isinstance(gas, Gas):
            raise nx.InvalidInputError(f"gas must be a gasdyn2d.Gas; got {gas!r}.")
        M_si, _ = nx.to_si(M, "M", "dimensionless")
        p_si, p_unit = nx.to_si(p, "p", "pressure")
        T_si, T_unit = nx.to_si(T, "T", "temperature")
        d_si, d_unit = nx.to_si(direction, "direction", "angle")
        M_si, p_si, T_si, d_si = nx.broadcast(M=M_si, p=p_si, T=T_si, direction=d_si)
        M_si = nx.check_nonnegative_mach(M_si, "M", "raise")
        with np.errstate(invalid="ignore"):
            nx.reject(~(p_si > 0) | np.isinf(p_si), p_si, "p", "finite and > 0 Pa", "raise")
            nx.reject(~(T_si > 0) | np.isinf(T_si), T_si, "T", "finite and > 0 K", "raise")
            nx.reject(np.isinf(d_si), d_si, "direction", "finite", "raise")
        object.__setattr__(self, "gas", gas)
        for name, value in (("M_si", M_si), ("p_si", p_si), ("T_si", T_si),
                            ("direction_si", d_si)):
            value.setflags(write=False)
            object.__setattr__(self, name, value)
        any_unit = p_unit is not None or T_unit is not None or d_unit is not None
        object.__setattr__(self, "_units", {
            "p": p_unit if p_unit is not None else ("Pa" if any_unit else None),
            "T": T_unit if T_unit is not None else ("K" if any_unit else None),
            "angle": nx.output_angle_unit(d_unit, p_unit, T_unit),
            "si": any_unit,
        })
        s = nx.scalar_or_array
        object.__setattr__(self, "M", s(M_si))
        object.__setattr__(self, "p", self._out(p_si, "Pa", "p"))
        object.__setattr__(self, "T", self._out(T_si, "K", "T"))
        object.__setattr__(self, "direction", nx.angle_out(s(d_si), self._units["angle"]))

    # -- unit helpers
    def _out(self, value, si_unit, kind=None):
        unit = self._units.get(kind) if kind else (si_unit if self._units["si"] else None)
        return nx.quantity_out(nx.scalar_or_array(value), si_unit, unit)

    def _angle(self, value):
        return nx.angle_out(nx.scalar_or_array(value), self._units["angle"])

    # -- plain SI derived values
    @property
    def T0_si(self):
        """Stagnation temperature [K], plain."""
        return self.T_si * (1.0 + 0.5 * (self.gas.gamma - 1.0) * self.M_si**2)

    @property
    def p0_si(self):
        """Stagnation pressure [Pa], plain."""
        g = self.gas.gamma
        return self.p_si * np.exp(g / (g - 1.0) * np.log1p(0.5 * (g - 1.0) * self.M_si**2))

    @property
    def rho_si(self):
        """Density [kg/m³], plain."""
        return self.p_si / (self.gas.R * self.T_si)

    @property
    def a_si(self):
        """Speed of sound [m/s], plain."""
        return np.sqrt(self.gas.gamma * self.gas.R * self.T_si)

    # -- public derived fields, in the caller's units
    @property
    def rho(self):
        """Density [kg/m³]."""
        return self._out(self.rho_si, "kg/m**3")

    @property
    def a(self):
        """Speed of sound [m/s]."""
        return self._out(self.a_si, "m/s")

    @property
    def V(self):
        """Flow speed [m/s]."""
        return self._out(self.M_si * self.a_si, "m/s")

    @property
    def p0(self):
        """Stagnation pressure [Pa] (unit of ``p`` when it was a Quantity)."""
        return self._out(self.p0_si, "Pa", "p")

    @property
    def T0(self):
        """Stagnation temperature [K] (unit of ``T`` when it was a Quantity)."""
        return self._out(self.T0_si, "K", "T")

    @property
    def q(self):
        """Dynamic pressure ρV²/2 = γpM²/2 [Pa] (unit of ``p`` when it was a Quantity)."""
        return self._out(0.5 * self.gas.gamma * self.p_si * self.M_si**2, "Pa", "p")

    @property
    def nu(self):
        """Prandtl–Meyer angle [rad] (NaN for subsonic flow)."""
        return self._angle(prandtl_meyer_angle(self.M_si, self.gas.gamma))

    @property
    def mu(self):
        """Mach angle [rad] (NaN for subsonic flow)."""
        return self._angle(mach_angle_of(self.M_si))

    @property
    def shape(self):
        """Broadcast shape of the state's arrays (``()`` for a single state)."""
        return self.M_si.shape

    def _rows(self):
        yield from super()._rows()
        for name in ("rho", "a", "V", "p0", "T0", "q", "nu", "mu"):
            value = getattr(self, name)
            unit = f"{value.units:~P}" if hasattr(value, "units") else {
                "rho": "kg/m³", "a": "m/s", "V": "m/s", "p0": "Pa", "T0": "K", "q": "Pa",
                "nu": "rad", "mu": "rad"}[name]
            yield name, _format(value), unit

    def __eq__(self, other):
        if not isinstance(other, FlowState):
            return NotImplemented
        return self.gas == other.gas and all(
            np.array_equal(getattr(self, k), getattr(other, k), equal_nan=True)
            for k in ("M_si", "p_si", "T_si", "direction_si"))

    __hash__ = None
