"""One summary figure of an invented vehicle, for ``python -m gasdyn2d``."""

from __future__ import annotations

import numpy as np

__all__ = ["tour_figure"]


def tour_figure(path, *, dpi=110):
    """Save a two-panel figure: the polars of a duct reflection and its wave pattern.

    The scenario is ours: the Mach 2.2 stream of the *Quillmoss* demonstrator
    (see ``python -m gasdyn2d``) meets an 8° ramp inside a duct of unit
    height; the ramp shock reflects from the opposite wall.

    Parameters
    ----------
    path : str or path-like
        Where to save the figure (the format follows the extension, e.g. ``.png``).
    dpi : int
        Resolution [dots per inch], at least 10.

    Returns
    -------
    matplotlib.figure.Figure
        The saved figure (closed after saving is left to the caller).

    Examples
    --------
    >>> import matplotlib, os, tempfile
    >>> matplotlib.use("Agg")
    >>> from gasdyn2d.plot import tour_figure
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     figure = tour_figure(os.path.join(folder, "tour.png"))
    ...     os.path.getsize(os.path.join(folder, "tour.png")) > 10_000
    True
    """
    from matplotlib.figure import Figure

    from ._style import check_count
    from ..patterns.graph import WavePattern
    from .polar_plots import draw_pattern_polars
    from .wave_pattern_plots import draw_wave_pattern

    check_count("dpi", dpi, 10)
    ramp = np.radians(8.0)
    duct = WavePattern(2.2)
    duct.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp,
                  start=(0.0, 0.0))
    duct.add_wave("reflected shock", upstream="2", downstream="3", family="right")
    duct.add_wall("3", direction=0.0)
    solution = duct.solve()
    figure = Figure(figsize=(11.0, 4.6), layout="constrained")
    left, right = figure.subplots(1, 2, width_ratios=[1.0, 1.6])
    draw_pattern_polars(solution, ["1", "2"], marks=["2", "3"], ax=left)
    left.set_title("polars: the reflected shock brings region 3 back to 0°", fontsize="medium")
    x_end = 3.2
    walls = [([-0.4, 0.0, x_end], [0.0, 0.0, x_end * np.tan(ramp)]), ([-0.4, x_end], [1.0, 1.0])]
    draw_wave_pattern(solution, walls=walls, ax=right)
    right.set_title("Quillmoss intake: ramp shock reflecting in a unit-height duct (inviscid)",
                    fontsize="medium")
    figure.savefig(path, dpi=dpi)
    return figure
