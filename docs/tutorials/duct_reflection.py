"""Tutorial: a wedge shock reflecting in the test section of a wind tunnel.

Invented scenario: the *Spindlebrook* blowdown tunnel has a Mach 2.6 test section
120 mm high. A 7° wedge model sits on the floor with its tip at x = 0; its
shock crosses the test section, reflects from the roof, and comes back down.
Where does the reflected shock land, and is the reflection regular?

Run: ``python duct_reflection.py [output folder]``. Inviscid, perfect-gas
estimate: the roof's boundary layer thickens and may separate where the
shock reflects, which moves the reflected shock; check against the tunnel's
schlieren pictures before trusting a model position.
"""

import sys
from pathlib import Path

import matplotlib
import matplotlib.pyplot as plt
import numpy as np

from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.patterns.reflections import wall_reflection
from gasdyn2d.plot import draw_pattern_polars, draw_wave_pattern

matplotlib.use("Agg")  # script only
out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path.cwd()  # script only
out.mkdir(parents=True, exist_ok=True)  # script only

# %% [markdown]
# ## Is a regular reflection possible at all?

# %%
M_TEST = 2.6  # test-section Mach number
HEIGHT = 0.120  # test-section height [m]
WEDGE = np.radians(7.0)  # wedge half-angle seen by the stream
MODEL_LENGTH = 0.30  # wedge surface length [m]

reflection = wall_reflection(M_TEST, WEDGE)
print(f"reflection at the roof: {reflection.kind}; "
      f"p3/p1 = {reflection.p3_p1:.3f}, M3 = {reflection.M3:.3f}")

# %% [markdown]
# ## The same pattern as a region graph with geometry
#
# The wedge shock starts at the tip; the roof is a wall parallel to the stream.

# %%
pattern = WavePattern(M_TEST)
pattern.add_wave("wedge shock", upstream="1", downstream="2", family="left", turn=WEDGE,
                 start=(0.0, 0.0))
pattern.add_wave("roof reflection", upstream="2", downstream="3", family="right")
pattern.add_wall("3", direction=0.0)  # the roof is parallel to the free stream
solution = pattern.solve()
print(solution)

# %% [markdown]
# ## Polars and the wave diagram

# %%
x_end = 0.55
base_x, base_y = MODEL_LENGTH * np.cos(WEDGE), MODEL_LENGTH * np.sin(WEDGE)
floor = ([-0.05, 0.0, base_x, base_x, x_end], [0.0, 0.0, base_y, 0.0, 0.0])
roof = ([-0.05, x_end], [HEIGHT, HEIGHT])
fig, (top, bottom) = plt.subplots(2, 1, figsize=(7.0, 7.0), height_ratios=[2.2, 1.0],
                                  layout="constrained")
draw_pattern_polars(solution, ["1", "2"], marks=["2", "3"], ax=top)
top.set_title("polars of the free stream and of region 2", fontsize="medium")
drawn = draw_wave_pattern(solution, walls=[floor, roof], extent=(-0.05, x_end, -0.005, 0.125),
                          length_unit="mm", ax=bottom)
bottom.set_title("Spindlebrook test section, 7° wedge at Mach 2.6", fontsize="medium")
fig.savefig(out / "duct_reflection.png", dpi=100)  # script only

# %% [markdown]
# ## Where does the reflected shock land?

# %%
x_hit, y_hit = drawn.lines["roof reflection"][0][2:]  # in the drawing's unit, mm
print(f"the wedge shock reaches the roof at x = {drawn.lines['wedge shock'][0][2]:.1f} "
      f"mm; the reflection lands at x = {x_hit:.1f} mm, y = {abs(y_hit):.1f} mm")
on_model = x_hit <= 1000 * base_x
print("the reflected shock lands on the model: move the model upstream or shorten it"
      if on_model else "the reflected shock lands behind the model")
