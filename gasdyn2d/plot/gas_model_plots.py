"""Perfect against thermally perfect gas: normal- and oblique-shock ratios over a Mach range.

Above about Mach 4 in flight, or at any Mach number in a heated stream, the air's
vibration is excited behind a shock: part of the energy goes into vibration instead of
temperature, so T2/T1 falls below the perfect-gas value and the density ratio rises.
:func:`draw_gas_model_comparison` shows by how much, at one upstream temperature, for a
normal shock and for an oblique shock of one deflection.
"""

from __future__ import annotations

import numpy as np

from ..boundary import as_si_scalar
from ..relations.gas import AIR_THERMALLY_PERFECT, Gas
from ..relations.normal_shocks import normal_shock
from ..relations.oblique_shocks import oblique_shock
from ._style import (CYCLE, Drawing, angle_unit_factor, apply_properties, legend_below, plain,
                     reject, tidy)

__all__ = ["draw_gas_model_comparison"]

#: The ratios the figure can show, with their axis labels.
QUANTITIES = {"T2_T1": "temperature T2/T1", "rho2_rho1": "density ρ2/ρ1",
              "p2_p1": "pressure p2/p1", "p02_p01": "stagnation pressure p02/p01",
              "M2": "Mach number M2"}
_MODEL_STYLES = {"thermally perfect": "-", "perfect": (0, (5, 2.5))}


def draw_gas_model_comparison(T1, *, deflection=np.radians(10.0), machs=None,
                              gas=AIR_THERMALLY_PERFECT, quantities=("T2_T1", "rho2_rho1"),
                              ax=None, **line_properties):
    """Normal- and oblique-shock ratios of a perfect and a thermally perfect gas against M1.

    Parameters
    ----------
    T1 : float or Quantity
        Static temperature ahead of the shocks [K], > 0 (°C and °F Quantities converted).
    deflection : float or Quantity, optional
        Deflection of the oblique shock [rad] (default 10°); Mach numbers at which it
        detaches leave a gap in that panel.
    machs : array_like, optional
        Upstream Mach numbers [-], >= 1 (default 200 points from 1.05 to 15).
    gas : Gas, optional
        The thermally perfect gas (default :data:`~gasdyn2d.AIR_THERMALLY_PERFECT`); the
        perfect gas compared with it has its frozen γ (``gas.gamma``) and the same R.
    quantities : sequence of str, optional
        Ratios to draw, from ``"T2_T1"``, ``"rho2_rho1"``, ``"p2_p1"``, ``"p02_p01"``,
        ``"M2"`` (one colour each).
    ax : pair of matplotlib Axes, optional
        Where to draw the normal and the oblique shock (default: a new figure with the
        two panels side by side).
    **line_properties
        matplotlib properties applied to every curve, e.g. ``linewidth=1.2``.

    Returns
    -------
    Drawing
        ``ax`` (the normal-shock axes) and ``axes`` (both); ``lines``
        {(panel, quantity, model): Line2D} with panel "normal" or "oblique" and model
        "thermally perfect" or "perfect"; ``results`` {(panel, model): NormalShock or
        ObliqueShock}; ``legend`` (under the normal-shock axes: colour is the ratio,
        solid the thermally perfect gas, dashed the perfect gas).

    Raises
    ------
    InvalidInputError
        ``gas`` not thermally perfect, an unknown quantity, ``ax`` not two Axes, or the
        arguments the relations refuse (a non-positive T1, a subsonic Mach number).

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d.plot import draw_gas_model_comparison
    >>> drawn = draw_gas_model_comparison(250.0, machs=[2.0, 6.0, 10.0])
    >>> hot = drawn.results["normal", "thermally perfect"]
    >>> round(float(hot.T2_T1[-1]), 4)  # M 10 from 250 K (20.3875 for γ = 1.4)
    17.2163
    """
    if not isinstance(gas, Gas) or not gas.is_thermally_perfect:
        raise reject("gas", "a thermally perfect Gas (with a vibrational_temperature), such "
                     "as AIR_THERMALLY_PERFECT", gas)
    if isinstance(quantities, str):
        quantities = (quantities,)
    unknown = [q for q in quantities if q not in QUANTITIES]
    if unknown or not quantities:
        raise reject("quantities", "one or more of " + ", ".join(repr(q) for q in QUANTITIES),
                     tuple(quantities))
    machs = np.linspace(1.05, 15.0, 200) if machs is None else plain(machs).reshape(-1)
    if np.ndim(plain(deflection)) or np.ndim(getattr(T1, "magnitude", T1)):
        raise reject("T1 and deflection", "single values (one temperature and one deflection "
                     "per figure)", (T1, deflection))
    axes = _two_axes(ax)
    perfect = Gas(gas.gamma, gas.R)
    results = {}
    for model, model_gas in (("thermally perfect", gas), ("perfect", perfect)):
        results["normal", model] = normal_shock(machs, T1=T1, gas=model_gas)
        results["oblique", model] = oblique_shock(machs, deflection=deflection, T1=T1,
                                                  gas=model_gas, errors="nan")
    lines = {}
    for panel, panel_ax in zip(("normal", "oblique"), axes):
        for k, quantity in enumerate(quantities):
            for model, style in _MODEL_STYLES.items():
                values = np.asarray(getattr(results[panel, model], quantity), dtype=float)
                (line,) = panel_ax.plot(machs, values, color=CYCLE[k % len(CYCLE)], ls=style,
                                        lw=1.6, label=f"{QUANTITIES[quantity]}, {model}",
                                        gid=f"{panel}:{quantity}:{model}")
                lines[panel, quantity, model] = line
        panel_ax.set_xlabel("upstream Mach number M1 [-]")
        panel_ax.set_yscale("log")
        tidy(panel_ax)
    apply_properties("draw_gas_model_comparison", list(lines.values()), line_properties)
    factor, unit = angle_unit_factor("deg")
    temperature = as_si_scalar("T1", T1, "K", what="one upstream temperature")
    axes[0].set_title(f"normal shock, T1 = {temperature:.4g} K", fontsize="medium")
    axes[1].set_title(f"oblique shock, θ = {factor * float(plain(deflection)):.3g} {unit}, "
                      f"T1 = {temperature:.4g} K", fontsize="medium")
    axes[0].set_ylabel("ratio across the shock [-]")
    handles = [lines["normal", q, m] for q in quantities for m in _MODEL_STYLES]
    legend = legend_below(axes[0], handles, [h.get_label() for h in handles],
                          columns=len(quantities))
    return Drawing("draw_gas_model_comparison", axes[0], axes=tuple(axes), lines=lines,
                   results=results, legend=legend)


def _two_axes(ax):
    from matplotlib.axes import Axes

    if ax is None:
        import matplotlib.pyplot as plt

        _, pair = plt.subplots(1, 2, figsize=(9.6, 4.4), layout="constrained")
        return list(pair)
    try:
        pair = list(ax)
    except TypeError:
        pair = []
    if len(pair) != 2 or not all(isinstance(a, Axes) for a in pair):
        raise reject("ax", "a pair of matplotlib Axes (normal shock, oblique shock) or None", ax)
    return pair
