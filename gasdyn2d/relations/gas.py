"""The gas model: a perfect gas, or a thermally perfect gas with vibrational excitation.

A perfect (calorically perfect) gas has constant specific heats. A thermally
perfect gas still obeys p = ρRT, but its specific heats rise with temperature
as the molecules' vibration is excited. The model here is the harmonic
oscillator with one characteristic vibrational temperature θv, the
calorically imperfect gas of NACA Report 1135's imperfect-gas section:

    cp(T) = cp_f + R (θv/T)² e^(θv/T)/(e^(θv/T) - 1)²,    cp_f = γR/(γ - 1),

where γ is the frozen (low-temperature) ratio. Everything else follows in
closed form, with x = θv/T and E = e^(-x) (computed as e^(-x) so that nothing
overflows at low temperature):

    h(T) = cp_f T + R θv E/(1 - E)                       (enthalpy, h(0) = 0)
    e(T) = h(T) - R T                                    (internal energy)
    φ(T) = ∫ cp/T dT = cp_f ln T + R [x E/(1 - E) - ln(1 - E)]   (entropy function)
    γ(T) = cp/(cp - R),   a² = γ(T) R T                  (speed of sound)

The entropy of a state is s = φ(T) - R ln p (plus a constant). The model
ignores dissociation and ionisation (air dissociates above about 2500 K at
low pressure) and assumes the vibrational energy is in equilibrium, which
fails in the rapid expansion of a nozzle or just behind a strong shock.

The plain functions :func:`vibrational_energy`,
:func:`vibrational_heat_capacity` and :func:`vibrational_entropy` give the
oscillator's terms per unit R (plain numpy, SI); the methods of :class:`Gas`
add the frozen part.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..boundary import as_si_scalar
from ..boundary.results import ResultTable, unit_field
from ..errors import InvalidInputError

__all__ = [
    "Gas",
    "AIR",
    "AIR_THERMALLY_PERFECT",
    "oscillator_terms",
    "vibrational_energy",
    "vibrational_heat_capacity",
    "vibrational_entropy",
    "refuse_thermally_perfect",
    "gas_of_call",
]


# ------------------------------------------------------------------ the oscillator (plain core)


def oscillator_terms(T, theta):
    """Plain core: x = θ/T, E = e^(-x) and 1 - E [-] at temperature T [K].

    The three numbers every closed form of the harmonic oscillator is written in;
    E is formed as e^(-x), so nothing overflows at low temperature (E underflows to 0,
    which is the exact limit), and 1 - E as -expm1(-x), without cancellation at high
    temperature.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import oscillator_terms
    >>> [round(float(v), 6) for v in oscillator_terms(1000.0, 2000.0)]
    [2.0, 0.135335, 0.864665]
    """
    T = np.asarray(T, dtype=float)
    with np.errstate(divide="ignore", over="ignore"):
        x = theta / T
    E = np.exp(-x)
    return x, E, -np.expm1(-x)


def vibrational_energy(T, theta):
    """Plain core: vibrational energy per unit R, θ/(e^(θ/T) - 1) [K].

    Parameters
    ----------
    T : float or ndarray
        Temperature [K], > 0.
    theta : float
        Characteristic vibrational temperature θv [K].

    Returns
    -------
    float or ndarray
        e_vib/R [K]; tends to T - θ/2 at high temperature and to 0 (exponentially) at low.

    References
    ----------
    Ames Research Staff (1953), NACA Report 1135, imperfect-gas section (harmonic-oscillator
    vibrational energy; from memory).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import vibrational_energy
    >>> round(float(vibrational_energy(3000.0, 3000.0)), 4)  # θ/(e - 1)
    1745.9301
    """
    x, E, one_minus_E = oscillator_terms(T, theta)
    return theta * E / one_minus_E


def vibrational_heat_capacity(T, theta):
    """Plain core: vibrational heat capacity per unit R, x² e^x/(e^x - 1)², x = θ/T [-].

    Rises from 0 at low temperature to 1 (full excitation) at high temperature.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import vibrational_heat_capacity
    >>> round(float(vibrational_heat_capacity(3000.0, 3000.0)), 6)  # e/(e - 1)²
    0.920674
    """
    x, E, one_minus_E = oscillator_terms(T, theta)
    with np.errstate(invalid="ignore"):
        value = x * x * E / (one_minus_E * one_minus_E)
    return np.where(x == np.inf, 0.0, value) if np.any(x == np.inf) else value


def vibrational_entropy(T, theta):
    """Plain core: vibrational entropy per unit R, x E/(1 - E) - ln(1 - E), x = θ/T [-].

    Its temperature derivative is (vibrational heat capacity)/T, so that the entropy
    function φ(T) = cp_f ln T + R·(this) satisfies dφ/dT = cp(T)/T.

    Examples
    --------
    >>> from gasdyn2d.relations.gas import vibrational_entropy
    >>> round(float(vibrational_entropy(3000.0, 3000.0)), 6)  # 1/(e - 1) - ln(1 - 1/e)
    1.040652
    """
    x, E, one_minus_E = oscillator_terms(T, theta)
    with np.errstate(invalid="ignore"):
        value = x * E / one_minus_E - np.log(one_minus_E)
    return np.where(x == np.inf, 0.0, value) if np.any(x == np.inf) else value


# ------------------------------------------------------------------ the gas


@dataclasses.dataclass(frozen=True, repr=False)
class Gas(ResultTable):
    """A perfect gas, or a thermally perfect gas with vibrational excitation.

    Parameters
    ----------
    gamma : float
        Ratio of specific heats cp/cv [-], greater than 1; for a thermally perfect
        gas the frozen value (all vibration unexcited, T → 0).
    R : float
        Specific gas constant [J/(kg·K)], positive. A pint Quantity of any
        compatible unit is accepted and stored in SI.
    vibrational_temperature : float, Quantity or None, optional
        Characteristic vibrational temperature θv [K], positive and finite. ``None``
        (the default) is the calorically perfect gas; a value makes the gas thermally
        perfect, with the harmonic-oscillator heat capacity of the module docstring.

    Notes
    -----
    ``cp``, ``cv`` and ``gamma`` are the constant (frozen) values; the
    temperature-dependent ones are :meth:`cp_at`, :meth:`cv_at`,
    :meth:`gamma_at`, with :meth:`enthalpy`, :meth:`internal_energy`,
    :meth:`entropy_function` and :meth:`sound_speed`. For a perfect gas these
    methods give the constant-property values, so code can use them for either.
    The thermally perfect model ignores dissociation, ionisation and
    vibrational non-equilibrium (see the module docstring).

    References
    ----------
    Ames Research Staff (1953), *Equations, Tables, and Charts for Compressible
    Flow*, NACA Report 1135, imperfect-gas section (from memory).

    Examples
    --------
    >>> from gasdyn2d import Gas
    >>> helium = Gas(gamma=5 / 3, R=2077.1)
    >>> round(helium.cp, 1)
    5192.8
    >>> hot_air = Gas(1.4, 287.05, vibrational_temperature=3055.6)
    >>> round(float(hot_air.gamma_at(2000.0)), 5)
    1.30064
    """

    gamma: float = unit_field("", default=1.4)
    R: float = unit_field("J/(kg·K)", default=287.05)
    vibrational_temperature: float | None = unit_field("K", default=None)

    def __post_init__(self):
        gamma = as_si_scalar("gamma", self.gamma, what="a single ratio of specific heats")
        R = as_si_scalar("R", self.R, "J/(kg·K)", what="a single specific gas constant")
        theta = self.vibrational_temperature
        if theta is not None:
            theta = as_si_scalar("vibrational_temperature", theta, "K",
                                 what="a single characteristic vibrational temperature")
        if not (math.isfinite(gamma) and gamma > 1.0):
            raise InvalidInputError(f"gamma must be a finite number > 1; got {gamma!r}.")
        if not (math.isfinite(R) and R > 0.0):
            raise InvalidInputError(f"R must be a finite number > 0 J/(kg·K); got {R!r}.")
        if theta is not None and not (math.isfinite(theta) and theta > 0.0):
            raise InvalidInputError(
                f"vibrational_temperature must be a finite temperature > 0 K; got {theta!r}. "
                "Give None for a perfect gas (no vibrational excitation)."
            )
        object.__setattr__(self, "gamma", gamma)
        object.__setattr__(self, "R", R)
        object.__setattr__(self, "vibrational_temperature", theta)

    # -- constant (frozen) properties
    @property
    def cp(self) -> float:
        """Specific heat at constant pressure [J/(kg·K)] (frozen value for a thermally
        perfect gas)."""
        return self.gamma * self.R / (self.gamma - 1.0)

    @property
    def cv(self) -> float:
        """Specific heat at constant volume [J/(kg·K)] (frozen value for a thermally
        perfect gas)."""
        return self.R / (self.gamma - 1.0)

    @property
    def is_thermally_perfect(self) -> bool:
        """True when the specific heats depend on temperature (a vibrational temperature
        is set)."""
        return self.vibrational_temperature is not None

    # -- temperature-dependent properties (plain numpy, SI)
    def _vibrational(self, function, T):
        T = np.asarray(T, dtype=float)
        if self.vibrational_temperature is None:
            return np.zeros_like(T)
        return function(T, self.vibrational_temperature)

    def cp_at(self, T):
        """Specific heat at constant pressure at temperature ``T`` [K], in J/(kg·K)."""
        return self.cp + self.R * self._vibrational(vibrational_heat_capacity, T)

    def cv_at(self, T):
        """Specific heat at constant volume at temperature ``T`` [K], in J/(kg·K)."""
        return self.cv + self.R * self._vibrational(vibrational_heat_capacity, T)

    def gamma_at(self, T):
        """Ratio of specific heats γ(T) = cp(T)/(cp(T) - R) [-] at temperature ``T`` [K]."""
        c = self.cp_at(T) / self.R
        return c / (c - 1.0)

    def enthalpy(self, T):
        """Specific enthalpy h(T) = cp_f T + R θv/(e^(θv/T) - 1) [J/kg], zero at T = 0."""
        T = np.asarray(T, dtype=float)
        return self.cp * T + self.R * self._vibrational(vibrational_energy, T)

    def internal_energy(self, T):
        """Specific internal energy e(T) = h(T) - R T [J/kg]."""
        T = np.asarray(T, dtype=float)
        return self.cv * T + self.R * self._vibrational(vibrational_energy, T)

    def entropy_function(self, T):
        """Entropy function φ(T) = ∫ cp/T dT [J/(kg·K)]; s = φ(T) - R ln p + constant.

        For isentropic changes p2/p1 = exp((φ(T2) - φ(T1))/R).
        """
        T = np.asarray(T, dtype=float)
        with np.errstate(divide="ignore"):
            return self.cp * np.log(T) + self.R * self._vibrational(vibrational_entropy, T)

    def sound_speed(self, T):
        """Speed of sound a = √(γ(T) R T) [m/s] at ``T`` [K]."""
        T = np.asarray(T, dtype=float)
        return np.sqrt(self.gamma_at(T) * self.R * T)


def refuse_thermally_perfect(gas, name: str, where: str, instead: str = "") -> None:
    """Raise an :class:`~gasdyn2d.errors.InvalidInputError` when ``gas`` is a thermally
    perfect :class:`Gas`, for a consumer (``where``) that would otherwise use its frozen γ.

    ``name`` is the argument as the caller wrote it (``"gas"``, ``"inflow.gas"``);
    ``instead`` says what to do (a sentence).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR, refuse_thermally_perfect
    >>> refuse_thermally_perfect(AIR, "gas", "this tool")  # a perfect gas passes
    """
    if isinstance(gas, Gas) and gas.is_thermally_perfect:
        raise InvalidInputError(
            f"{name} is a thermally perfect Gas (vibrational_temperature = "
            f"{gas.vibrational_temperature:g} K); {where} does not support a thermally perfect "
            "gas yet and would use its frozen gamma, which is wrong once vibration is excited. "
            + (instead or "Give a perfect Gas (vibrational_temperature=None)."))


def gas_of_call(function: str, gamma, gas, temperature, temperature_name: str,
                temperature_what: str):
    """The gas model of a public relation called with ``gamma=``, ``gas=`` and a temperature.

    Returns ``(gamma, hot_gas)``: the ratio of specific heats to use (the caller's
    ``gamma`` argument unchanged, 1.4 by default, or a perfect gas's ``gas.gamma``) and
    None; or None and the thermally perfect :class:`Gas`.

    The rules, the same for every relation:

    - ``gas`` None: a perfect gas of ``gamma`` (default 1.4, air);
    - a perfect ``gas``: its ``gamma``; ``gamma`` given as well must be one number equal
      to it (to 1e-12), else an error (two different gases were asked for);
    - a thermally perfect ``gas``: ``gamma`` must not be given (γ varies with temperature),
      and the temperature that fixes the state (``temperature_name``) is required;
    - anything else as ``gas`` is refused.

    The temperature itself is checked by the relation (it may be an array or a Quantity).

    Examples
    --------
    >>> from gasdyn2d.relations.gas import AIR, AIR_THERMALLY_PERFECT, gas_of_call
    >>> gas_of_call("f", None, None, None, "T1", "upstream static temperature")
    (1.4, None)
    >>> gas_of_call("f", None, AIR_THERMALLY_PERFECT, 300.0, "T1", "upstream temperature")[0]
    """
    if gas is None:
        return (1.4 if gamma is None else gamma), None
    if not isinstance(gas, Gas):
        raise InvalidInputError(
            f"gas must be a gasdyn2d.Gas (such as AIR or AIR_THERMALLY_PERFECT); got {gas!r}.")
    if gas.is_thermally_perfect:
        if gamma is not None:
            raise InvalidInputError(
                f"{function} takes gamma or a thermally perfect gas, not both: the gas's ratio "
                "of specific heats varies with temperature, γ(T) = cp(T)/(cp(T) - R). Leave "
                "gamma out (the gas's frozen value is gas.gamma).")
        if temperature is None:
            raise InvalidInputError(
                f"{function} needs the {temperature_what} {temperature_name}=... for a thermally "
                f"perfect gas (its specific heats depend on temperature): give {temperature_name} "
                "in K or as a temperature Quantity.")
        return None, gas
    if gamma is not None:
        value = as_si_scalar("gamma", gamma, what="one ratio of specific heats when gas is given")
        if not abs(value - gas.gamma) <= 1e-12 * gas.gamma:
            raise InvalidInputError(
                f"gamma = {value!r} and gas.gamma = {gas.gamma!r} disagree; give one of them "
                "(gas=Gas(gamma=...) or gamma=...).")
    return gas.gamma, None


#: Dry air as a perfect gas: γ = 1.4, R = 287.05 J/(kg·K).
AIR = Gas(1.4, 287.05)

#: Dry air with vibrational excitation (thermally perfect): frozen γ = 1.4,
#: R = 287.05 J/(kg·K), θv = 3055.6 K, i.e. 5500 °R, the value of NACA Report 1135's
#: imperfect-gas section (from memory). Valid below dissociation (about 2500 K).
AIR_THERMALLY_PERFECT = Gas(1.4, 287.05, vibrational_temperature=3055.6)
