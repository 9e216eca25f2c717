"""Figures of gasdyn2d results: polars, wave patterns, characteristic nets, surface pressures.

Needs matplotlib (``pip install "gasdyn2d[plot]"``); importing :mod:`gasdyn2d`
itself never imports matplotlib. Every function draws on the axes ``ax`` you
give it (or on new axes of a new figure sized to what it draws), leaves global
matplotlib settings untouched, passes extra keyword arguments on to the lines it
draws, and returns a :class:`Drawing` — the axes and the artists by role — so a
figure can be restyled, tested or combined with others. Each kind of line has
one style in every figure (:data:`WAVE_STYLES`), with a key under the axes.
Bad arguments raise :class:`~gasdyn2d.errors.InvalidInputError` naming them.

Public functions
----------------
- :func:`draw_polars` — pressure–deflection polars of one or several streams,
  with solution points marked; :func:`draw_pattern_polars` does the same for
  regions of a solved :class:`~gasdyn2d.patterns.graph.WavePattern`.
- :func:`draw_wave_pattern` — the wave diagram of a solved pattern with its
  walls: shocks as lines, fans as rays from head to tail, slip lines dashed,
  free boundaries from the solution, regions labelled with their Mach numbers.
- :func:`draw_characteristic_net` — the characteristic net of a nozzle,
  channel or jet, coloured by Mach number, with the walls or jet boundary.
- :func:`draw_surface_pressures` — pressure coefficient along both surfaces
  of a section by the exact (shock-expansion), linear and second-order theories.
- :func:`draw_gas_model_comparison` — normal- and oblique-shock ratios of a perfect and
  a thermally perfect gas against the Mach number, at one upstream temperature.
- :func:`tour_figure` — one summary figure saved to a file (used by
  ``python -m gasdyn2d``).
- :func:`draw_cone_flow` — a cone, its conical shock and the shock layer's rays
  coloured by Mach number (optionally a spike intake's cowl lip);
  :func:`draw_cone_pressures` — cone and wedge surface pressures against
  half-angle, up to detachment.
- :func:`draw_pressure_signature` — the pressure signature of a section's near field
  below and above it, against distance along the flight direction.
- :class:`Drawing` — what every ``draw_*`` function returns.
- :data:`PALETTE` — the colour-blind-safe colours used throughout;
  :data:`WAVE_STYLES` — the line style of each kind of line.
"""

try:
    import matplotlib  # noqa: F401
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError(
        "gasdyn2d.plot needs matplotlib, which is not installed. Install the plot extra: "
        'pip install "gasdyn2d[plot]"') from exc

from ._style import PALETTE, WAVE_STYLES, Drawing
from .polar_plots import draw_pattern_polars, draw_polars
from .wave_pattern_plots import draw_wave_pattern
from .net_plots import draw_characteristic_net
from .pressure_plots import draw_surface_pressures
from .gas_model_plots import draw_gas_model_comparison
from .tour import tour_figure
from .cone_plots import draw_cone_flow, draw_cone_pressures
from .signature_plots import draw_pressure_signature

__all__ = [
    "Drawing", "PALETTE", "WAVE_STYLES", "draw_polars", "draw_pattern_polars", "draw_wave_pattern",
    "draw_characteristic_net", "draw_surface_pressures", "draw_gas_model_comparison",
    "tour_figure", "draw_cone_flow", "draw_cone_pressures", "draw_pressure_signature",
]
