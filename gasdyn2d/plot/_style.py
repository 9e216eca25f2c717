"""The house look of gasdyn2d figures: palette, one style per wave type, legends, sizes.

Nothing here touches matplotlib's global settings: each drawing function
styles only the axes it draws on. Shared by the drawing modules of this
package: the :class:`Drawing` they return, argument checks with
:class:`~gasdyn2d.errors.InvalidInputError`, length units, and legends placed
outside the data.

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

from ..errors import InvalidInputError

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

#: One line style per kind of line, the same in every figure (and in its legend).
WAVE_STYLES = {
    "shock": {"color": SHOCK_COLOUR, "linewidth": 1.8, "linestyle": "-"},
    "expansion fan": {"color": FAN_COLOUR, "linewidth": 0.9, "linestyle": "-"},
    "slip line": {"color": SLIP_COLOUR, "linewidth": 1.1, "linestyle": (0, (5, 3))},
    "wall": {"color": WALL_COLOUR, "linewidth": 2.4, "linestyle": "-"},
    "free boundary": {"color": PALETTE["reddish purple"], "linewidth": 1.6,
                      "linestyle": (0, (8, 2.5, 1.5, 2.5))},
    "centreline": {"color": "#8C8C8C", "linewidth": 0.9, "linestyle": (0, (12, 3, 2, 3))},
}

#: The marker where a characteristic net folds into a shock.
SHOCK_FORMS_STYLE = {"marker": "*", "markersize": 11, "linestyle": "none",
                     "color": SHOCK_COLOUR, "markeredgecolor": "black",
                     "markeredgewidth": 0.6}

#: Length units the drawings accept, with their size in metres.
LENGTH_UNITS = {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "km": 1e3, "in": 0.0254, "ft": 0.3048}


class Drawing:
    """What a ``draw_*`` function drew: the Axes and the artists, by role.

    Attributes are the roles (``ax``, ``shocks``, ``fans``, ``legend``, ...,
    listed in :attr:`roles`); ``drawing["shocks"]`` reads the same as
    ``drawing.shocks``. The repr is one line: the function and how many
    artists of each role it drew.
    """

    def __init__(self, function: str, ax, **artists):
        self.function = function
        self.ax = ax
        self.roles = ("ax", *artists)
        for role, value in artists.items():
            setattr(self, role, value)

    @property
    def figure(self):
        """The matplotlib Figure the axes belong to."""
        return self.ax.figure

    def __getitem__(self, role):
        if role not in self.roles:
            raise KeyError(f"{self.function} drew no {role!r}; its roles are {self.roles}.")
        return getattr(self, role)

    def __repr__(self) -> str:
        parts = []
        for role in self.roles[1:]:
            value = getattr(self, role)
            if isinstance(value, (list, tuple, dict)):
                parts.append(f"{role} ×{len(value)}")
            elif value is not None:
                parts.append(role)
        return f"<Drawing of {self.function}: {', '.join(parts)}>"


# ------------------------------------------------------------------ argument checks


def reject(name: str, requirement: str, value) -> InvalidInputError:
    """The error for an argument of a drawing function (raise what it returns)."""
    shown = repr(value)
    if len(shown) > 60:
        shown = shown[:57] + "..."
    return InvalidInputError(f"{name} must be {requirement}; got {shown}.")


def check_count(name: str, value, lowest: int) -> int:
    """An integer argument of at least ``lowest``."""
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < lowest:
        raise reject(name, f"an integer of at least {lowest}", value)
    return int(value)


def check_axes(ax):
    """``ax`` is None or a matplotlib Axes."""
    from matplotlib.axes import Axes

    if ax is not None and not isinstance(ax, Axes):
        raise reject("ax", "a matplotlib Axes or None", ax)
    return ax


def apply_properties(function: str, artists, properties: dict):
    """Set matplotlib properties (the caller's ``**kwargs``) on the drawn artists."""
    if not properties:
        return
    for artist in artists:
        for key, value in properties.items():
            setter = getattr(artist, f"set_{key}", None)
            if setter is None:
                raise InvalidInputError(
                    f"{function} got the keyword {key!r}, which is not a property of the "
                    f"{type(artist).__name__} it draws (extra keywords go to the lines, "
                    "as in matplotlib's plot).")
            setter(value)


# ------------------------------------------------------------------ units


def angle_unit_factor(unit):
    """(factor from radians, label text) for ``"deg"`` or ``"rad"``."""
    if unit in ("deg", "degree", "degrees"):
        return 180.0 / np.pi, "deg"
    if unit in ("rad", "radian", "radians"):
        return 1.0, "rad"
    raise reject("angle_unit", "'deg' or 'rad'", unit)


def length_unit_factor(unit):
    """(factor from metres, label text) of a length unit of :data:`LENGTH_UNITS`."""
    if isinstance(unit, str) and unit in LENGTH_UNITS:
        return 1.0 / LENGTH_UNITS[unit], unit
    raise reject("length_unit", "one of " + ", ".join(repr(u) for u in LENGTH_UNITS), unit)


def plain(value):
    """Magnitude in SI of a number, array or pint Quantity (angles in radians, lengths in m)."""
    if hasattr(value, "units"):
        if value.dimensionality == {"[length]": 1}:
            value = value.to("meter")
        elif not value.dimensionality:
            value = value.to("radian")  # radians are dimensionless in pint: ratios pass unchanged
        return np.asarray(value.magnitude, dtype=float)
    return np.asarray(value, dtype=float)


def polyline(name: str, line):
    """An (x, y) pair of equal-length 1-D arrays [m], or a clear error naming ``name``."""
    try:
        x, y = line
        x, y = plain(x), plain(y)
    except (TypeError, ValueError):
        raise reject(name, "(x, y) pairs of coordinate arrays", line) from None
    if x.ndim != 1 or x.shape != y.shape or x.size < 2:
        raise reject(name, "(x, y) pairs of 1-D arrays of equal length, at least 2 points",
                     line)
    return x, y


# ------------------------------------------------------------------ axes, legends, sizes


def axes_or_new(ax, *, figsize=(6.4, 4.2)):
    """The given axes, or new axes on a new figure (pyplot is imported only here)."""
    if ax is not None:
        return ax
    import matplotlib.pyplot as plt

    _, ax = plt.subplots(figsize=figsize, layout="constrained")
    return ax


def figure_size_for(width_m, height_m, *, width=7.0, extra_height=1.1, colourbar=False):
    """Figure size [in] for a drawing of equal aspect whose data span ``width_m`` by
    ``height_m``: the data fill the width, the height follows (with room for the axis
    labels and the legend below), within 2 to 9 inches."""
    aspect = height_m / width_m if width_m > 0 else 1.0
    beside = 1.45 if colourbar else 0.7  # y label and tick labels, and a colour bar
    height = (width - beside) * aspect + extra_height
    if height > 9.0:  # a tall drawing: narrower instead
        return ((9.0 - extra_height) / aspect + beside, 9.0)
    return (width, max(height, 2.6 if colourbar else 1.8))


def tidy(ax, *, grid=True):
    """Light grid, no top/right frame: our plain look."""
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    if grid:
        ax.grid(True, color="#E5E5E5", linewidth=0.6)
        ax.set_axisbelow(True)
    ax.tick_params(direction="out", length=3)


def key_handles(roles):
    """Legend handles and labels, one per kind of line drawn, in the house styles."""
    from matplotlib.lines import Line2D

    handles = []
    for role in roles:
        if role == "shock forms":
            handles.append(Line2D([], [], **SHOCK_FORMS_STYLE))
        else:
            handles.append(Line2D([], [], **WAVE_STYLES[role]))
    return handles, [("shock forms here" if r == "shock forms" else r) for r in roles]


def _below_axes_points(ax) -> float:
    """Height [pt] of what hangs under the axes: ticks, tick labels and the x label."""
    import matplotlib as mpl

    tick_font = mpl.font_manager.FontProperties(size=mpl.rcParams["xtick.labelsize"])
    height = (mpl.rcParams["xtick.major.size"] + mpl.rcParams["xtick.major.pad"]
              + 1.3 * tick_font.get_size_in_points())
    if ax.get_xlabel():
        height += ax.xaxis.labelpad + 1.3 * ax.xaxis.label.get_size()
    return height


def legend_below(ax, handles, labels, *, columns=None, title=None):
    """A legend under the x-axis label, outside the data, centred on the axes.

    It hangs a fixed distance in points below the axes (the height of the tick
    labels and the label), so it stays clear of them when a layout engine
    resizes the axes.
    """
    from matplotlib.transforms import ScaledTranslation

    if not handles:
        return None
    gap = (_below_axes_points(ax) + 4.0) / 72.0  # [in]
    offset = ScaledTranslation(0.0, -gap, ax.figure.dpi_scale_trans)
    columns = columns or min(len(handles), 4)
    return ax.legend(handles, labels, loc="upper center", bbox_to_anchor=(0.5, 0.0),
                     bbox_transform=ax.transAxes + offset, ncols=columns, frameon=False,
                     fontsize="small", title=title, title_fontsize="small",
                     handlelength=2.8, columnspacing=1.4)
