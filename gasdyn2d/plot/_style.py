"""The house look of gasdyn2d figures: a colour-blind-safe palette and tidy axes.

Nothing here touches matplotlib's global settings: each drawing function
styles only the axes it draws on.

References
----------
Okabe, M. & Ito, K. (2008), "Color Universal Design (CUD): how to make figures
and presentations that are friendly to colorblind people", web publication,
J*FLY (the eight colours of :data:`PALETTE`; publication details from memory).
Nuñez, J. R., Anderton, C. R. & Renslow, R. S. (2018), "Optimizing colormaps
with consideration for color vision deficiency to enable accurate
interpretation of scientific data", PLoS ONE 13(7), e0199239 (the ``cividis``
map used for Mach numbers; details from memory).
"""

from __future__ import annotations

import numpy as np

#: Okabe–Ito colours, by role (hex sRGB).
PALETTE = {
    "black": "#000000",
    "orange": "#E69F00",
    "sky blue": "#56B4E9",
    "bluish green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish purple": "#CC79A7",
}

#: Colours for a sequence of curves (several polars, several theories).
CYCLE = [PALETTE[k] for k in ("blue", "vermillion", "bluish green", "reddish purple",
                               "orange", "sky blue", "black")]

SHOCK_COLOUR = PALETTE["vermillion"]
FAN_COLOUR = PALETTE["blue"]
SLIP_COLOUR = PALETTE["black"]
WALL_COLOUR = "#4D4D4D"
WALL_FILL = "#D9D9D9"
MACH_COLOURMAP = "cividis"  # perceptually uniform and colour-vision-deficiency friendly


def axes_or_new(ax, *, figsize=(6.4, 4.2)):
    """The given axes, or new axes on a new figure (pyplot is imported only here)."""
    if ax is not None:
        return ax
    import matplotlib.pyplot as plt

    _, ax = plt.subplots(figsize=figsize, layout="constrained")
    return ax


def tidy(ax, *, grid=True):
    """Light grid, no top/right frame: our plain look."""
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    if grid:
        ax.grid(True, color="#E5E5E5", linewidth=0.6)
        ax.set_axisbelow(True)
    ax.tick_params(direction="out", length=3)


def angle_unit_factor(unit):
    """(factor from radians, label text) for ``"deg"`` or ``"rad"``."""
    if unit in ("deg", "degree", "degrees"):
        return 180.0 / np.pi, "deg"
    if unit in ("rad", "radian", "radians"):
        return 1.0, "rad"
    raise ValueError(f"angle_unit must be 'deg' or 'rad'; got {unit!r}.")


def plain(value):
    """Magnitude in SI of a number, array or pint Quantity (angles in radians, lengths in m)."""
    if hasattr(value, "units"):
        if value.dimensionality == {"[length]": 1}:
            value = value.to("meter")
        elif not value.dimensionality:
            value = value.to("radian")  # radians are dimensionless in pint: ratios pass unchanged
        return np.asarray(value.magnitude, dtype=float)
    return np.asarray(value, dtype=float)
